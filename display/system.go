package display

import (
	"fmt"
	"html"
	"strings"

	"gonum.org/v1/gonum/mat"

	"lsys/lsys"
	"lsys/lsys/numfmt"
)

func init() {
	Register((*lsys.System)(nil), renderSystem)
}

// sxStability is the one-line verdict for a system.
func sxStability(s *lsys.System) string {
	if s.N() == 0 {
		return "static gain"
	}
	st, err := s.Stability() // carried by the system, computed once in lsys
	if err != nil {
		return "stability unknown: " + err.Error()
	}
	if st.Stable {
		return "stable"
	}
	where := "Re(s)"
	if s.Sampled() {
		where = "|z|"
	}
	if st.Marginal {
		return fmt.Sprintf("marginally stable: %d %s on the boundary (%s within %s of it), none defective", st.Boundary, plural(st.Boundary, "pole", "poles"), where, fmtNum(st.Tol))
	}
	return "unstable: " + sxUnstable(st, s.Sampled())
}

// sxUnstable says plainly where the unstable poles are: how many beyond
// the boundary, how many on it, and which of those are in Jordan blocks.
func sxUnstable(st lsys.Stability, sampled bool) string {
	beyond, on := "in the right half-plane", "on the imaginary axis"
	if sampled {
		beyond, on = "outside the unit circle", "on the unit circle"
	}
	var parts []string
	if st.Beyond > 0 {
		parts = append(parts, fmt.Sprintf("%d %s %s", st.Beyond, plural(st.Beyond, "pole", "poles"), beyond))
	}
	if st.Boundary > 0 {
		p := fmt.Sprintf("%d %s", st.Boundary, on)
		if len(parts) == 0 {
			p = fmt.Sprintf("%d %s %s", st.Boundary, plural(st.Boundary, "pole", "poles"), on)
		}
		if st.Defective > 0 {
			var at []string
			for i, v := range st.DefectiveAt[:st.Listed] {
				z := fmtComplex(v, imag(v) != 0)
				at = append(at, fmt.Sprintf("%s (block of %d)", z, st.DefectiveBlocks[i]))
			}
			if st.MoreDefective {
				at = append(at, "...")
			}
			p += fmt.Sprintf(", %d of them in Jordan blocks, which grow like a power of time: %s", st.Defective, strings.Join(at, ", "))
		}
		parts = append(parts, p)
	}
	return strings.Join(parts, "; ")
}

// sxHeadline is e.g. "continuous-time system: 2 states, 1 input, 1 output; stable".
func sxHeadline(s *lsys.System) string {
	kind := "continuous-time system"
	if s.Sampled() {
		kind = "sampled system, every " + fmtNum(s.Ts) + " s"
	}
	return fmt.Sprintf("%s: %s, %s, %s; %s", kind,
		count(s.N(), "state", "states"), count(s.M(), "input", "inputs"),
		count(s.P(), "output", "outputs"), sxStability(s))
}

// sxMatrixText lays out a labelled matrix as right-aligned text columns.
func sxMatrixText(b *strings.Builder, name string, a *mat.Dense, rows, cols []string) {
	r, c := len(rows), len(cols)
	fmt.Fprintf(b, "%s (%dx%d)\n", name, r, c)
	if r == 0 || c == 0 {
		b.WriteString("  (empty)\n")
		return
	}
	cells := make([][]string, r+1)
	cells[0] = append([]string{""}, cols...)
	for i := 0; i < r; i++ {
		cells[i+1] = []string{rows[i]}
		for j := 0; j < c; j++ {
			cells[i+1] = append(cells[i+1], fmtNum(a.At(i, j)))
		}
	}
	writeColumns(b, cells, "  ", 1)
}

// sxMatrixHTML renders a labelled matrix as an HTML table.
func sxMatrixHTML(b *strings.Builder, name string, a *mat.Dense, rows, cols []string) {
	htmlMatrix(b, name, fmt.Sprintf("%dx%d", len(rows), len(cols)), rows, cols, func(i, j int) (string, bool) {
		v := a.At(i, j)
		return fmtNum(v), v == 0
	})
}

// sxLatexMatrix writes a matrix as a LaTeX bmatrix.
func sxLatexMatrix(a *mat.Dense, r, c int) string {
	if r == 0 || c == 0 {
		return `\left[\,\right]`
	}
	var b strings.Builder
	b.WriteString(`\begin{bmatrix}`)
	for i := 0; i < r; i++ {
		for j := 0; j < c; j++ {
			if j > 0 {
				b.WriteString(" & ")
			}
			b.WriteString(latexNum(fmtNum(a.At(i, j))))
		}
		if i < r-1 {
			b.WriteString(` \\ `)
		}
	}
	b.WriteString(`\end{bmatrix}`)
	return b.String()
}

func sxLatexVector(names []string) string {
	if len(names) == 0 {
		return `\left[\,\right]`
	}
	parts := make([]string, len(names))
	for i, n := range names {
		parts[i] = `\mathrm{` + sxLatexEscape(n) + `}`
	}
	return `\begin{bmatrix}` + strings.Join(parts, ` \\ `) + `\end{bmatrix}`
}

func sxLatexEscape(s string) string {
	r := strings.NewReplacer(`\`, `\backslash `, `_`, `\_`, `{`, `\{`, `}`, `\}`, `#`, `\#`, `$`, `\$`, `%`, `\%`, `&`, `\&`, `^`, `\^{}`, `~`, `\~{}`)
	return r.Replace(s)
}

// sxStateEquations writes the state equations in LaTeX with the system's
// matrices and signal names; empty when the matrices are too big to read.
func sxStateEquations(s *lsys.System) string {
	n, m, p := s.N(), s.M(), s.P()
	if n == 0 || n > 8 || m > 8 || p > 8 {
		return ""
	}
	x := sxLatexVector(s.StateNames)
	u := sxLatexVector(s.InputNames)
	y := sxLatexVector(s.OutputNames)
	lhs := `\frac{d}{dt}` + x
	if s.Sampled() {
		lhs = x + `_{k+1}`
		u += `_k`
		y += `_k`
		x += `_k`
	}
	var b strings.Builder
	b.WriteString(`\begin{aligned}` + lhs + ` &= ` + sxLatexMatrix(s.A, n, n) + x)
	if m > 0 {
		b.WriteString(` + ` + sxLatexMatrix(s.B, n, m) + u)
	}
	if p > 0 {
		b.WriteString(` \\ ` + y + ` &= ` + sxLatexMatrix(s.C, p, n) + x)
		if m > 0 && !sxAllZero(s.D) {
			b.WriteString(` + ` + sxLatexMatrix(s.D, p, m) + u)
		}
	}
	b.WriteString(`\end{aligned}`)
	return b.String()
}

func sxAllZero(a *mat.Dense) bool {
	if a == nil {
		return true
	}
	r, c := a.Dims()
	for i := 0; i < r; i++ {
		for j := 0; j < c; j++ {
			if a.At(i, j) != 0 {
				return false
			}
		}
	}
	return true
}

// Displays stay readable and small: matrices are printed up to sxMaxShown
// rows/columns and carried in JSON up to sxMaxJSON.
const (
	sxMaxShown = 16
	sxMaxJSON  = 60
)

// sxNameList joins names, eliding the middle of long lists.
func sxNameList(names []string) string {
	if len(names) <= 24 {
		return strings.Join(names, ", ")
	}
	return strings.Join(names[:10], ", ") + fmt.Sprintf(", ... (%d more) ..., ", len(names)-13) + strings.Join(names[len(names)-3:], ", ")
}

// sxSource is the lsys source that rebuilds s (numfmt.Source), "" when
// the system is too large or has no outputs.
func sxSource(s *lsys.System) string {
	at := func(a *mat.Dense) func(i, j int) float64 {
		return func(i, j int) float64 { return a.At(i, j) }
	}
	return numfmt.Source(numfmt.SystemForm{States: s.StateNames, Inputs: s.InputNames, Outputs: s.OutputNames,
		A: at(s.A), B: at(s.B), C: at(s.C), D: at(s.D), Every: s.Ts})
}

// renderSystem shows a system as the source that rebuilds it, under a
// comment line with its sizes and stability verdict: a user can copy the
// text into a cell. HTML adds the state equations in LaTeX; the matrices
// show as tables only where the equations are too large to read.
func renderSystem(v any, _ Options) Bundle {
	s := v.(*lsys.System)
	if s == nil {
		return NewBundle("(no system)")
	}
	n, m, p := s.N(), s.M(), s.P()
	src := sxSource(s)
	var t strings.Builder
	t.WriteString("# " + sxHeadline(s) + "\n")
	sig := [][]string{}
	if n > 0 {
		sig = append(sig, []string{"states", sxNameList(s.StateNames)})
	}
	if m > 0 {
		sig = append(sig, []string{"inputs", sxNameList(s.InputNames)})
	}
	if p > 0 {
		sig = append(sig, []string{"outputs", sxNameList(s.OutputNames)})
	}
	showMatrices := n <= sxMaxShown && m <= sxMaxShown && p <= sxMaxShown
	if src != "" {
		t.WriteString(src + "\n")
	} else {
		for _, r := range sig {
			fmt.Fprintf(&t, "#   %-8s %s\n", r[0], r[1])
		}
		if showMatrices {
			t.WriteString("#   (no source form without outputs; read the matrices as G.A, G.B, G.C, G.D)\n")
		} else {
			fmt.Fprintf(&t, "#   (no source form above %d states, inputs or outputs; read the matrices as G.A, G.B, G.C, G.D)\n", sxMaxShown)
		}
	}

	var h strings.Builder
	htmlCard(&h, "lsys-system", sxHeadline(s))
	if len(sig) > 0 {
		h.WriteString("<table style=\"border-collapse:collapse;margin-bottom:4px\">")
		for _, r := range sig {
			fmt.Fprintf(&h, "<tr><td style=\"padding:0 8px 0 0;color:#555\">%s</td><td>%s</td></tr>", r[0], html.EscapeString(r[1]))
		}
		h.WriteString("</table>")
	}
	eq := sxStateEquations(s)
	// the equations carry the matrices: shown, they replace the tables
	eqHTML := sxEquationHTML(s)
	h.WriteString(eqHTML)
	if src != "" {
		fmt.Fprintf(&h, "<details><summary style=\"color:#555\">lsys source that rebuilds it</summary><pre style=\"margin:4px 0\">%s</pre></details>", html.EscapeString(src))
	}
	if !showMatrices {
		fmt.Fprintf(&h, "<div style=\"color:#555\">Matrices not shown above %d states, inputs or outputs; read them as G.A, G.B, G.C, G.D.</div>", sxMaxShown)
	}
	if eqHTML == "" && showMatrices {
		// too large for equations: the matrices as tables, rows and
		// columns labelled with the signals
		h.WriteString("<div>")
		for _, bl := range []struct {
			name       string
			a          *mat.Dense
			rows, cols []string
		}{
			{"state matrix", s.A, s.StateNames, s.StateNames},
			{"input matrix", s.B, s.StateNames, s.InputNames},
			{"output matrix", s.C, s.OutputNames, s.StateNames},
			{"feedthrough", s.D, s.OutputNames, s.InputNames},
		} {
			if len(bl.rows) == 0 || len(bl.cols) == 0 {
				continue
			}
			sxMatrixHTML(&h, bl.name, bl.a, bl.rows, bl.cols)
		}
		h.WriteString("</div>")
	}
	h.WriteString("</div>")

	b := NewBundle(strings.TrimSuffix(t.String(), "\n"))
	b.Data[HTML] = h.String()
	if eq != "" {
		b.Data[LaTeX] = "$$" + eq + "$$"
	}
	b.Data[JSON] = sxSystemJSON(s)
	return b
}

func sxMatrixJSON(a *mat.Dense, r, c int) [][]float64 {
	out := make([][]float64, r)
	for i := range out {
		out[i] = make([]float64, c)
		for j := range out[i] {
			if a != nil {
				out[i][j] = a.At(i, j)
			}
		}
	}
	return out
}

func sxSystemJSON(s *lsys.System) map[string]any {
	n, m, p := s.N(), s.M(), s.P()
	if n > sxMaxJSON || m > sxMaxJSON || p > sxMaxJSON {
		return map[string]any{"kind": "system", "sample_time": s.Ts, "states": s.StateNames, "inputs": s.InputNames, "outputs": s.OutputNames, "sizes": []int{n, m, p}}
	}
	return map[string]any{
		"kind":        "system",
		"sample_time": s.Ts,
		"states":      s.StateNames,
		"inputs":      s.InputNames,
		"outputs":     s.OutputNames,
		"A":           sxMatrixJSON(s.A, n, n),
		"B":           sxMatrixJSON(s.B, n, m),
		"C":           sxMatrixJSON(s.C, p, n),
		"D":           sxMatrixJSON(s.D, p, m),
	}
}
