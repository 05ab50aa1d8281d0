package display

// Displays of structural models and their modes: the second-order model,
// the normal-mode table, the MAC grid, mode-shape charts, the modal model
// with its frequency comparison, and sparse matrices.

import (
	"encoding/base64"
	"fmt"
	"html"
	"image/color"
	"math"
	"strconv"
	"strings"

	"gonum.org/v1/plot/vg"

	"lsys/lsys"
)

func init() {
	Register((*lsys.SecondOrder)(nil), renderSecondOrder)
	Register((*lsys.StructuralModes)(nil), renderStructuralModes)
	Register((*lsys.MACMatrix)(nil), renderMAC)
	Register((*lsys.ShapePlot)(nil), renderShapePlot)
	Register((*lsys.ModalModel)(nil), renderModalModel)
	Register((*lsys.SparseSym)(nil), renderSparse)
}

func fmtBytes(b int64) string {
	switch {
	case b >= 1<<30:
		return fmt.Sprintf("%.2f GB", float64(b)/(1<<30))
	case b >= 1<<20:
		return fmt.Sprintf("%.1f MB", float64(b)/(1<<20))
	case b >= 1<<10:
		return fmt.Sprintf("%.1f kB", float64(b)/(1<<10))
	}
	return fmt.Sprintf("%d bytes", b)
}

func fmtPct(v float64) string {
	if math.IsNaN(v) {
		return ""
	}
	return strconv.FormatFloat(100*v, 'f', 1, 64) + " %"
}

func dampingText(d lsys.DampingSpec) string {
	switch d.Kind {
	case lsys.DampingMatrix:
		return "a damping matrix as given"
	case lsys.DampingModal:
		if len(d.Ratios) == 1 {
			return "modal, ratio " + fmtNum(d.Ratios[0]) + " in every mode"
		}
		return "modal, ratios " + joinList(d.Ratios, fmtNum)
	case lsys.DampingRayleigh:
		return fmt.Sprintf("Rayleigh D = alpha M + beta K, alpha = %s 1/s, beta = %s s (ratio %s at %s Hz and %s at %s Hz)",
			fmtNum(d.Alpha), fmtNum(d.Beta), fmtNum(d.Z1), fmtNum(d.W1/(2*math.Pi)), fmtNum(d.Z2), fmtNum(d.W2/(2*math.Pi)))
	}
	return "none"
}

func renderSecondOrder(v any, opt Options) Bundle {
	s := v.(*lsys.SecondOrder)
	c := newCard("lsys-secondorder", fmt.Sprintf("second-order model M q'' + D q' + K q = F u: %s, %s, %s",
		count(s.N(), "degree of freedom", "degrees of freedom"), count(s.Inputs(), "input", "inputs"), count(s.Outputs(), "output", "outputs")))
	total := 0.0
	for i := 0; i < s.N(); i++ {
		total += s.M.At(i, i)
	}
	outs := make([]string, s.Outputs())
	for i := range outs {
		outs[i] = s.OutputNames[i] + " (" + s.Measure[i] + ")"
	}
	keyTable(&c.t, &c.h, [][2]string{
		{"degrees of freedom", strings.Join(abbrev(s.DOFNames, 12), ", ")},
		{"inputs (forces)", strings.Join(abbrev(s.InputNames, 12), ", ")},
		{"outputs", strings.Join(abbrev(outs, 12), ", ")},
		{"damping", dampingText(s.Damping)},
		{"trace of M", fmtNum(total)},
	})
	note(&c.t, &c.h, "Used as a system wherever one is needed (first order, states q and q'); normalmodes and modalmodel use M, D and K directly.")
	return c.bundle()
}

// abbrev keeps the first k names and says how many more there are.
func abbrev(s []string, k int) []string {
	if len(s) <= k {
		return s
	}
	out := append([]string(nil), s[:k]...)
	return append(out, fmt.Sprintf("... (%d more)", len(s)-k))
}

// smMaxRows caps the mode table; the fields hold every mode.
const smMaxRows = 60

func renderStructuralModes(v any, opt Options) Bundle {
	m := v.(*lsys.StructuralModes)
	n, r := m.Shapes.Dims()
	title := fmt.Sprintf("normal modes: %s of %s", count(r, "mode", "modes"), count(n, "degree of freedom", "degrees of freedom"))
	c := newCard("lsys-normalmodes", title)
	head := []string{"#", "f Hz", "w rad/s", "damping", "modal mass"}
	for _, d := range m.Directions {
		head = append(head, "Gamma "+d, "eff. mass "+d, "cum. "+d)
	}
	var rows [][]string
	for j := 0; j < r && j < smMaxRows; j++ {
		idx := strconv.Itoa(j + 1)
		f, w := fmtNum(m.Freq[j]), fmtNum(m.Omega[j])
		if m.Rigid[j] {
			idx += " rigid"
			f, w = "0 (rigid)", "0"
		}
		row := []string{idx, f, w, fmtDamp(m.Damping[j]), fmtNum(m.ModalMass[j])}
		for k := range m.Directions {
			row = append(row, fmtNum(m.Participation[k][j]), fmtNum(m.EffectiveMass[k][j]), fmtPct(m.Cumulative[k][j]))
		}
		rows = append(rows, row)
	}
	gridTable(&c.t, &c.h, head, rows, 1)
	if r > smMaxRows {
		note(&c.t, &c.h, fmt.Sprintf("The first %d of %d modes are shown; the fields (.frequencies, .shapes, ...) hold all.", smMaxRows, r))
	}
	for k, d := range m.Directions {
		last := m.Cumulative[k][r-1]
		verdict := "reaches"
		if last < 0.9 {
			verdict = "does NOT reach"
		}
		note(&c.t, &c.h, fmt.Sprintf("Direction %s: total mass %s; these modes carry %s of it, which %s the common 90 %% acceptance figure (common practice).",
			d, fmtNum(m.TotalMass[k]), fmtPct(last), verdict))
	}
	note(&c.t, &c.h, fmt.Sprintf("Shapes mass-normalized (largest |Phi^T M Phi - I| = %s); modal mass is phi^T M phi with the shape scaled to a largest entry of 1. Participation Gamma = phi^T M r, effective mass Gamma^2.", fmtNum(m.Orthogonality)))
	note(&c.t, &c.h, fmt.Sprintf("Rigid-body modes: w^2 at most %s (1e-9 of the problem's scale).", fmtNum(m.RigidTol)))
	if m.DampingSpec.Kind != "" && m.DampingSpec.Kind != lsys.DampingNone {
		note(&c.t, &c.h, "Damping: "+dampingText(m.DampingSpec)+".")
	}
	if !math.IsNaN(m.Coupling) {
		q := "classical damping: the ratios are exact"
		if m.Coupling > 1e-6 {
			q = "D is not classical; the ratios are the diagonal of Phi^T D Phi"
			if m.Coupling > 0.1 {
				q += " and are rough (the coupling is large)"
			}
		}
		note(&c.t, &c.h, fmt.Sprintf("Damping coupling between modes (largest normalized off-diagonal of Phi^T D Phi): %s, %s.", fmtNum(m.Coupling), q))
	}
	if m.MassCond > 1e8 {
		note(&c.t, &c.h, fmt.Sprintf("M is ill-conditioned (condition about %s): shapes and the lowest frequencies may have lost digits.", fmtNum(m.MassCond)))
	}
	if st := m.Sparse; st != nil {
		kind := "lowest"
		if st.Nearest {
			kind = "nearest " + fmtNum(math.Sqrt(math.Max(st.Shift, 0))/(2*math.Pi)) + " Hz"
		}
		note(&c.t, &c.h, fmt.Sprintf("Sparse path (%s): %d DOF, %d stored entries of K; %s, %s: L has %d entries (%s); shift %s rad^2/s^2 with %s below it; basis %d, %s, %d solves; largest residual %s (tolerance %s).",
			kind, st.N, st.NNZK, st.Ordering, st.Factorization, st.FactorNNZ, fmtBytes(st.FactorMem), fmtNum(st.Shift), count(st.Below, "eigenvalue", "eigenvalues"), st.Basis, count(st.Restarts, "restart", "restarts"), st.Solves, fmtNum(st.Residual), fmtNum(st.Tol)))
		note(&c.t, &c.h, fmt.Sprintf("Smallest pivot of the factorization: %s of the largest diagonal entry (a factorization fails below %s; near it the shift sits close to an eigenvalue and the solves lose digits).", fmtNum(st.MinPivot), fmtNum(lsys.PivotTol)))
		note(&c.t, &c.h, "Memory held by the matrices, the factor and the Lanczos basis: "+fmtBytes(st.Memory)+".")
		if st.ShiftNote != "" {
			note(&c.t, &c.h, st.ShiftNote+".")
		}
	}
	note(&c.t, &c.h, "Method: "+m.Method+".")
	return c.bundle()
}

func fmtDamp(z float64) string {
	if math.IsNaN(z) {
		return ""
	}
	return fmtNum(z)
}

// macColor is a sequential scale of our own from white (0) to a deep
// blue (1); cells above 0.5 get white text.
func macColor(v float64) string {
	v = math.Max(0, math.Min(1, v))
	r := 255 - v*(255-0x08)
	g := 255 - v*(255-0x45)
	b := 255 - v*(255-0x94)
	return fmt.Sprintf("#%02x%02x%02x", int(math.Round(r)), int(math.Round(g)), int(math.Round(b)))
}

func renderMAC(v any, opt Options) Bundle {
	m := v.(*lsys.MACMatrix)
	ra, rb := m.Values.Dims()
	c := newCard("lsys-mac", fmt.Sprintf("modal assurance criterion: %d x %d shapes", ra, rb))
	head := append([]string{"first \\ second"}, m.Cols...)
	var rows [][]string
	for i := 0; i < ra; i++ {
		row := []string{m.Rows[i]}
		for j := 0; j < rb; j++ {
			row = append(row, strconv.FormatFloat(m.Values.At(i, j), 'f', 3, 64))
		}
		rows = append(rows, row)
	}
	writeColumns(&c.t, append([][]string{head}, rows...), "  ", 1)
	c.h.WriteString("<table style=\"border-collapse:collapse\"><tr>")
	for j, h := range head {
		c.h.WriteString("<th " + choose(j == 0, thLeftStyle, thStyle) + ">" + html.EscapeString(h) + "</th>")
	}
	c.h.WriteString("</tr>")
	for i, row := range rows {
		c.h.WriteString("<tr>")
		for j, cell := range row {
			if j == 0 {
				fmt.Fprintf(&c.h, "<td style=\"%s\">%s</td>", tdTextStyle, html.EscapeString(cell))
				continue
			}
			val := m.Values.At(i, j-1)
			fg := "#000"
			if val > 0.5 {
				fg = "#fff"
			}
			fmt.Fprintf(&c.h, "<td style=\"%s;background:%s;color:%s;border:1px solid #fff;min-width:3.5em\">%s</td>", tdNumStyle, macColor(val), fg, cell)
		}
		c.h.WriteString("</tr>")
	}
	c.h.WriteString("</table>")
	note(&c.t, &c.h, "MAC = (a^T b)^2 / ((a^T a)(b^T b)) (Allemang & Brown 1982): 1 parallel, 0 orthogonal; shading from white (0) to dark blue (1), values printed. Values near 1 off the diagonal mean shapes the measured points cannot tell apart.")
	return c.bundle()
}

func renderSparse(v any, opt Options) Bundle {
	a := v.(*lsys.SparseSym)
	d := a.Diag()
	lo, hi := math.Inf(1), math.Inf(-1)
	for _, x := range d {
		lo, hi = math.Min(lo, x), math.Max(hi, x)
	}
	c := newCard("lsys-sparse", fmt.Sprintf("sparse symmetric matrix %d x %d", a.N, a.N))
	keyTable(&c.t, &c.h, [][2]string{
		{"stored entries", fmt.Sprintf("%d (%.3g %% of all)", a.NNZ(), 100*float64(a.NNZ())/float64(a.N)/float64(a.N))},
		{"diagonal", fmtNum(lo) + " to " + fmtNum(hi)},
		{"1-norm", fmtNum(a.Norm1())},
		{"memory", fmtBytes(a.Bytes())},
	})
	return c.bundle()
}

// svgInline renders a figure for embedding in an HTML card, as an image
// with the SVG inside a data URL (a report then holds no references out).
func svgInline(f *rpFigure) (s string) {
	defer func() {
		if recover() != nil {
			s = ""
		}
	}()
	b := f.SVG()
	if len(b) == 0 {
		return ""
	}
	return `<img alt="chart" src="data:image/svg+xml;base64,` + base64.StdEncoding.EncodeToString(b) + `">`
}

func renderModalModel(v any, opt Options) Bundle {
	mm := v.(*lsys.ModalModel)
	g := mm.Sys
	sizes := fmt.Sprintf("(%s, %s, %s)", count(g.N(), "state", "states"), count(g.M(), "input", "inputs"), count(g.P(), "output", "outputs"))
	title := fmt.Sprintf("modal model: %d of %d modes kept %s", mm.Kept, len(mm.Modes.Freq), sizes)
	if mm.Modes.Sparse != nil {
		title = fmt.Sprintf("modal model: the %d lowest modes of %d degrees of freedom %s", mm.Kept, mm.Modes.Sparse.N, sizes)
	}
	c := newCard("lsys-modalmodel", title)
	keep := make([]string, mm.Kept)
	for j := range keep {
		keep[j] = fmtNum(mm.Modes.Freq[j])
	}
	rows := [][2]string{
		{"kept modes, Hz", strings.Join(abbrev(keep, 12), ", ")},
		{"static correction", choose(mm.Static, "yes: residual flexibility of the truncated modes on displacement outputs", "no")},
	}
	if mm.Modes.Sparse != nil {
		z := make([]string, mm.Kept)
		for j := range z {
			z[j] = fmtDamp(mm.Modes.Damping[j])
		}
		rows = append(rows, [2]string{"damping ratios", strings.Join(abbrev(z, 12), ", ")})
	}
	if mm.Kept < len(mm.Modes.Freq) {
		rows = append(rows, [2]string{"first truncated mode", fmtNum(mm.Modes.Freq[mm.Kept]) + " Hz"})
	}
	if ck := mm.Check; ck != nil {
		rows = append(rows, [2]string{"largest error up to " + fmtNum(ck.Band/(2*math.Pi)) + " Hz", fmt.Sprintf("%s of the peak of %s <- %s", fmtPct(ck.MaxRelErr), ck.OutName, ck.InName)})
	}
	keyTable(&c.t, &c.h, rows)
	if ck := mm.Check; ck != nil {
		f := modalCheckFigure(ck)
		if s := svgInline(f); s != "" {
			c.h.WriteString("<div>" + s + "</div>")
		}
		note(&c.t, &c.h, "The chart compares the modal model with the full model on the channel where they differ most (solid: full, dashed: modal model, dotted: their difference).")
	} else if st := mm.Modes.Sparse; st != nil {
		note(&c.t, &c.h, fmt.Sprintf("Modes from the sparse path (%s; largest residual %s); the full model is not compared over frequency.", st.Factorization, fmtNum(st.Residual)))
	} else {
		note(&c.t, &c.h, fmt.Sprintf("The full model has more than %d degrees of freedom: no frequency comparison.", lsys.ModalCheckMaxDOF))
	}
	note(&c.t, &c.h, "Used as a system wherever one is needed (states: modal displacements and their rates).")
	return c.bundle()
}

func modalCheckFigure(ck *lsys.ModalCheck) *rpFigure {
	pn := newPanel(fmt.Sprintf("%s <- %s", ck.OutName, ck.InName), "frequency (Hz)", "magnitude")
	pn.LogX = true
	hz := make([]float64, len(ck.W))
	for i, w := range ck.W {
		hz[i] = w / (2 * math.Pi)
	}
	db := func(v []float64) []float64 {
		o := make([]float64, len(v))
		for i, x := range v {
			o[i] = 20 * math.Log10(x)
		}
		return o
	}
	pn.YLabel = "magnitude (dB)"
	pn.DBTicks = true
	pn.Series = append(pn.Series,
		rpSeries{Name: "full model", X: hz, Y: db(ck.Full), Style: 0},
		rpSeries{Name: "modal model", X: hz, Y: db(ck.Reduced), Style: 1},
		rpSeries{Name: "difference", X: hz, Y: db(ck.Error), Style: 2})
	pn.Lines = append(pn.Lines, rpLine{At: ck.Band / (2 * math.Pi), Vertical: true, Dashed: true})
	pn.Legend = true
	return &rpFigure{Rows: 1, Cols: 1, Panels: []*rpPanel{pn}}
}

func renderShapePlot(v any, opt Options) Bundle {
	sp := v.(*lsys.ShapePlot)
	m := sp.Modes
	var t strings.Builder
	kind := "line-like"
	if sp.Grid != [2]int{} {
		kind = fmt.Sprintf("grid-like, %d x %d nodes", sp.Grid[0], sp.Grid[1])
	}
	fmt.Fprintf(&t, "mode shapes (%s), each scaled to a largest drawn deflection of 1:\n", kind)
	f := &rpFigure{Cols: min(len(sp.Which), 2)}
	f.Rows = (len(sp.Which) + f.Cols - 1) / f.Cols
	for _, j := range sp.Which {
		y := make([]float64, len(sp.DOFs))
		big := 0.0
		for i, d := range sp.DOFs {
			y[i] = m.Shapes.At(d, j)
			big = math.Max(big, math.Abs(y[i]))
		}
		if big > 0 {
			for i := range y {
				y[i] /= big
			}
		}
		label := fmt.Sprintf("mode %d: %s Hz", j+1, fmtNum(m.Freq[j]))
		if m.Rigid[j] {
			label = fmt.Sprintf("mode %d: rigid body", j+1)
		}
		fmt.Fprintf(&t, "  %s\n", label)
		if sp.Grid == [2]int{} {
			f.Panels = append(f.Panels, shapeLinePanel(label, sp.X, y))
		} else {
			f.Panels = append(f.Panels, shapeGridPanel(label, sp.Grid, y))
		}
	}
	if f.Rows > 1 || f.Cols > 1 {
		f.W = vg.Length(f.Cols) * 9 * vg.Centimeter
		f.H = vg.Length(f.Rows) * 6.5 * vg.Centimeter
	}
	return rpBundle(t.String(), f, opt)
}

func shapeLinePanel(title string, x, y []float64) *rpPanel {
	pn := newPanel(title, "position", "deflection")
	pn.Simplify = false
	if x == nil {
		x = make([]float64, len(y))
		for i := range x {
			x[i] = float64(i + 1)
		}
	}
	zero := make([]float64, len(y))
	pn.Series = append(pn.Series,
		rpSeries{X: x, Y: zero, Style: -1, Width: 0.8, Color: rpGrey},
		rpSeries{X: x, Y: y, Style: 0, Glyph: len(y) <= 60, Points: false})
	pn.YMin, pn.YMax = -1.1, 1.1
	return pn
}

// shapeGridPanel draws the grid in an oblique view: node (i, j) at
// (i + 0.5 j, 0.5 j + h * deflection) with the height scale h chosen so a
// unit deflection is a third of the view's depth.
func shapeGridPanel(title string, grid [2]int, y []float64) *rpPanel {
	nx, ny := grid[0], grid[1]
	pn := newPanel(title, "", "")
	pn.Simplify = false
	sx := 1 / float64(nx-1)
	sy := 0.6 / float64(ny-1)
	h := 0.3
	pt := func(i, j int, w float64) (float64, float64) {
		return float64(i)*sx + 0.45*float64(j)*sy, float64(j)*sy + h*w
	}
	line := func(pts [][2]int, w func(i, j int) float64, style int, col color.Color, width float64) rpSeries {
		var xs, ys []float64
		for _, p := range pts {
			a, b := pt(p[0], p[1], w(p[0], p[1]))
			xs, ys = append(xs, a), append(ys, b)
		}
		return rpSeries{X: xs, Y: ys, Style: style, Color: col, Width: width}
	}
	zero := func(i, j int) float64 { return 0 }
	defl := func(i, j int) float64 { return y[i+nx*j] }
	for pass := 0; pass < 2; pass++ {
		w, style, col, width := zero, -1, color.Color(rpGrey), 0.6
		if pass == 1 {
			w, style, col, width = defl, 0, nil, 1.1
		}
		for j := 0; j < ny; j++ {
			var pts [][2]int
			for i := 0; i < nx; i++ {
				pts = append(pts, [2]int{i, j})
			}
			pn.Series = append(pn.Series, line(pts, w, style, col, width))
		}
		for i := 0; i < nx; i++ {
			var pts [][2]int
			for j := 0; j < ny; j++ {
				pts = append(pts, [2]int{i, j})
			}
			pn.Series = append(pn.Series, line(pts, w, style, col, width))
		}
	}
	return pn
}
