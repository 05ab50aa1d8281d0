package display

import (
	"fmt"
	"html"
	"math"
	"strconv"
	"strings"

	"lsys/lsys"

	"gonum.org/v1/gonum/mat"
)

func init() {
	Register((*lsys.System)(nil), renderSystem)
}

// sxNum formats a real number for tables: four significant digits, plain
// notation for moderate magnitudes, exponent notation otherwise, no "-0".
func sxNum(v float64) string {
	switch {
	case math.IsNaN(v):
		return "n/a"
	case math.IsInf(v, 1):
		return "inf"
	case math.IsInf(v, -1):
		return "-inf"
	case v == 0:
		return "0"
	}
	a := math.Abs(v)
	if a >= 1e-3 && a < 1e5 {
		// Four significant digits, trailing zeros trimmed.
		dec := 3 - int(math.Floor(math.Log10(a)))
		if dec < 0 {
			dec = 0
		}
		s := strconv.FormatFloat(v, 'f', dec, 64)
		if strings.Contains(s, ".") {
			s = strings.TrimRight(strings.TrimRight(s, "0"), ".")
		}
		if s == "-0" {
			s = "0"
		}
		return s
	}
	s := strconv.FormatFloat(v, 'e', 3, 64)
	if i := strings.IndexByte(s, 'e'); i > 0 {
		mant := strings.TrimRight(strings.TrimRight(s[:i], "0"), ".")
		s = mant + s[i:]
	}
	return s
}

// sxComplex formats an eigenvalue; pair == true writes "a ± bj".
func sxComplex(z complex128, pair bool) string {
	re, im := real(z), imag(z)
	if pair {
		return sxNum(re) + " ± " + sxNum(math.Abs(im)) + "j"
	}
	if im == 0 {
		return sxNum(re)
	}
	sign := " + "
	if im < 0 {
		sign = " - "
	}
	return sxNum(re) + sign + sxNum(math.Abs(im)) + "j"
}

// sxStability is the one-line verdict for a system.
func sxStability(s *lsys.System) string {
	if s.N() == 0 {
		return "static gain"
	}
	st, err := lsys.StabilityOf(s)
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
		return fmt.Sprintf("marginally stable: %d %s on the boundary (%s within %s of it), none defective", st.Boundary, sxPlural(st.Boundary, "pole", "poles"), where, sxNum(st.Tol))
	}
	return fmt.Sprintf("unstable: %d %s beyond the boundary or defective on it", st.Unstable, sxPlural(st.Unstable, "pole", "poles"))
}

func sxPlural(n int, one, many string) string {
	if n == 1 {
		return one
	}
	return many
}

func sxCount(n int, one, many string) string {
	return fmt.Sprintf("%d %s", n, sxPlural(n, one, many))
}

// sxHeadline is e.g. "continuous-time system: 2 states, 1 input, 1 output; stable".
func sxHeadline(s *lsys.System) string {
	kind := "continuous-time system"
	if s.Sampled() {
		kind = "sampled system, every " + sxNum(s.Ts) + " s"
	}
	return fmt.Sprintf("%s: %s, %s, %s; %s", kind,
		sxCount(s.N(), "state", "states"), sxCount(s.M(), "input", "inputs"),
		sxCount(s.P(), "output", "outputs"), sxStability(s))
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
			cells[i+1] = append(cells[i+1], sxNum(a.At(i, j)))
		}
	}
	sxWriteColumns(b, cells, "  ")
}

// sxWriteColumns writes a grid with the first column left-aligned and the
// others right-aligned, each line prefixed by indent.
func sxWriteColumns(b *strings.Builder, cells [][]string, indent string) {
	width := map[int]int{}
	for _, row := range cells {
		for j, s := range row {
			if l := len([]rune(s)); l > width[j] {
				width[j] = l
			}
		}
	}
	for _, row := range cells {
		line := indent
		for j, s := range row {
			pad := strings.Repeat(" ", width[j]-len([]rune(s)))
			if j == 0 {
				line += s + pad
			} else {
				line += "  " + pad + s
			}
		}
		b.WriteString(strings.TrimRight(line, " "))
		b.WriteByte('\n')
	}
}

// sxCardStyle is the shared look of our HTML cards: a thin frame, a bold
// title line, small monospace numbers.
const sxCardStyle = `style="border:1px solid #bbb;border-radius:4px;padding:6px 10px;margin:2px 0;font-family:sans-serif;font-size:13px;display:inline-block"`

const sxTableStyle = `style="border-collapse:collapse;margin:4px 12px 4px 0;display:inline-table;vertical-align:top"`

// sxMatrixHTML renders a labelled matrix as an HTML table.
func sxMatrixHTML(b *strings.Builder, name string, a *mat.Dense, rows, cols []string) {
	r, c := len(rows), len(cols)
	fmt.Fprintf(b, "<table %s><caption style=\"text-align:left;font-weight:bold\">%s <span style=\"font-weight:normal;color:#555\">%dx%d</span></caption>", sxTableStyle, html.EscapeString(name), r, c)
	if r == 0 || c == 0 {
		b.WriteString("<tr><td style=\"color:#555\">(empty)</td></tr></table>")
		return
	}
	b.WriteString("<tr><th></th>")
	for _, h := range cols {
		fmt.Fprintf(b, "<th style=\"padding:1px 6px;color:#555;font-weight:normal;text-align:right\">%s</th>", html.EscapeString(h))
	}
	b.WriteString("</tr>")
	for i := 0; i < r; i++ {
		fmt.Fprintf(b, "<tr><th style=\"padding:1px 6px;color:#555;font-weight:normal;text-align:left\">%s</th>", html.EscapeString(rows[i]))
		for j := 0; j < c; j++ {
			v := a.At(i, j)
			color := ""
			if v == 0 {
				color = "color:#aaa;"
			}
			fmt.Fprintf(b, "<td style=\"padding:1px 6px;text-align:right;font-family:monospace;%s\">%s</td>", color, sxNum(v))
		}
		b.WriteString("</tr>")
	}
	b.WriteString("</table>")
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
			b.WriteString(sxLatexNum(a.At(i, j)))
		}
		if i < r-1 {
			b.WriteString(` \\ `)
		}
	}
	b.WriteString(`\end{bmatrix}`)
	return b.String()
}

func sxLatexNum(v float64) string {
	s := sxNum(v)
	if i := strings.Index(s, "e"); i >= 0 {
		exp, _ := strconv.Atoi(s[i+1:])
		return s[:i] + `\cdot 10^{` + strconv.Itoa(exp) + `}`
	}
	return s
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

func renderSystem(v any, _ Options) Bundle {
	s := v.(*lsys.System)
	if s == nil {
		return NewBundle("(no system)")
	}
	n, m, p := s.N(), s.M(), s.P()
	var t strings.Builder
	t.WriteString(sxHeadline(s) + "\n")
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
	for _, r := range sig {
		fmt.Fprintf(&t, "  %-8s %s\n", r[0], r[1])
	}
	type blk struct {
		name       string
		a          *mat.Dense
		rows, cols []string
	}
	blocks := []blk{
		{"A", s.A, s.StateNames, s.StateNames},
		{"B", s.B, s.StateNames, s.InputNames},
		{"C", s.C, s.OutputNames, s.StateNames},
		{"D", s.D, s.OutputNames, s.InputNames},
	}
	// Large models: matrices are not printed (read them with G.A etc.).
	showMatrices := n <= sxMaxShown && m <= sxMaxShown && p <= sxMaxShown
	if !showMatrices {
		blocks = nil
		fmt.Fprintf(&t, "  (matrices not shown above %d states, inputs or outputs; read them as G.A, G.B, G.C, G.D)\n", sxMaxShown)
	}
	for _, bl := range blocks {
		if len(bl.rows) == 0 || len(bl.cols) == 0 {
			continue
		}
		t.WriteString("\n")
		sxMatrixText(&t, bl.name, bl.a, bl.rows, bl.cols)
	}

	var h strings.Builder
	fmt.Fprintf(&h, "<div class=\"lsys-system\" %s>", sxCardStyle)
	fmt.Fprintf(&h, "<div style=\"font-weight:bold;margin-bottom:4px\">%s</div>", html.EscapeString(sxHeadline(s)))
	if len(sig) > 0 {
		h.WriteString("<table style=\"border-collapse:collapse;margin-bottom:4px\">")
		for _, r := range sig {
			fmt.Fprintf(&h, "<tr><td style=\"padding:0 8px 0 0;color:#555\">%s</td><td>%s</td></tr>", r[0], html.EscapeString(r[1]))
		}
		h.WriteString("</table>")
	}
	eq := sxStateEquations(s)
	if eq != "" {
		fmt.Fprintf(&h, "<div style=\"margin:4px 0\">$$%s$$</div>", html.EscapeString(eq))
	}
	if !showMatrices {
		fmt.Fprintf(&h, "<div style=\"color:#555\">Matrices not shown above %d states, inputs or outputs; read them as G.A, G.B, G.C, G.D.</div>", sxMaxShown)
	}
	h.WriteString("<div>")
	for _, bl := range blocks {
		if len(bl.rows) == 0 || len(bl.cols) == 0 {
			continue
		}
		sxMatrixHTML(&h, bl.name, bl.a, bl.rows, bl.cols)
	}
	h.WriteString("</div></div>")

	b := NewBundle(t.String())
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

// sxJSONNum maps non-finite numbers, which JSON cannot carry, to strings.
func sxJSONNum(v float64) any {
	switch {
	case math.IsNaN(v):
		return "nan"
	case math.IsInf(v, 1):
		return "inf"
	case math.IsInf(v, -1):
		return "-inf"
	}
	return v
}

func sxJSONComplex(z complex128) []any {
	return []any{sxJSONNum(real(z)), sxJSONNum(imag(z))}
}
