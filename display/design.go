package display

// Displays of the design and reduction results: matrix-equation
// solutions, gramians, Hankel singular values, balanced realizations,
// reductions, norms, regulators, estimators, pole assignments and noise
// responses. Every figure shown is carried by the result; the renderers
// only format it (and take magnitudes of complex gains for charts).

import (
	"fmt"
	"math"
	"strings"

	"gonum.org/v1/gonum/mat"

	"lsys/lsys"
)

func init() {
	Register((*lsys.LyapunovSolution)(nil), renderLyapunov)
	Register((*lsys.RiccatiSolution)(nil), renderRiccati)
	Register((*lsys.Gramians)(nil), renderGramians)
	Register((*lsys.HankelValues)(nil), renderHankel)
	Register((*lsys.Balanced)(nil), renderBalanced)
	Register((*lsys.Reduction)(nil), renderReduction)
	Register((*lsys.Norm)(nil), renderNorm)
	Register((*lsys.Regulator)(nil), renderRegulator)
	Register((*lsys.Estimator)(nil), renderEstimator)
	Register((*lsys.Assignment)(nil), renderAssignment)
	Register((*lsys.Covariance)(nil), renderCovariance)
	Register((*lsys.Simulation)(nil), renderSimulation)
}

// dgMatrix writes a labelled matrix to both halves of a card.
func dgMatrix(c *card, name string, a *mat.Dense, rows, cols []string) {
	sxMatrixText(&c.t, name, a, rows, cols)
	sxMatrixHTML(&c.h, name, a, rows, cols)
}

// dgResidualNote says how to read a backward error.
func dgResidualNote(r float64) string {
	switch {
	case r <= 1e-13:
		return "as accurate as the data allow"
	case r <= 1e-8:
		return "some accuracy lost to conditioning"
	}
	return "inaccurate: the problem is badly conditioned; rescale the states or check the data"
}

func dgJSONMatrix(a *mat.Dense) [][]any {
	if a == nil {
		return nil
	}
	r, c := a.Dims()
	out := make([][]any, r)
	for i := range out {
		out[i] = make([]any, c)
		for j := range out[i] {
			out[i][j] = jsonNum(a.At(i, j))
		}
	}
	return out
}

func renderLyapunov(v any, _ Options) Bundle {
	s := v.(*lsys.LyapunovSolution)
	title := "Lyapunov equation"
	if strings.Contains(s.Equation, "B") {
		title = "Sylvester equation"
	}
	if s.Sampled {
		title += ", sampled form"
	}
	c := newCard("lsys-equation", title)
	r, cc := s.X.Dims()
	keyTable(&c.t, &c.h, [][2]string{
		{"equation", s.Equation},
		{"method", "Bartels & Stewart (real Schur form, block back substitution)"},
		{"residual", fmtNum(s.Residual) + " (" + dgResidualNote(s.Residual) + ")"},
	})
	dgMatrix(c, "X", s.X, numbered(r), numbered(cc))
	if s.Singular {
		note(&c.t, &c.h, "Warning: the equation is singular or nearly so (eigenvalues l1 + l2 = 0, sampled l1 l2 = 1): X is not unique and not to be trusted.")
	}
	b := c.bundle()
	b.Data[JSON] = map[string]any{"equation": s.Equation, "X": dgJSONMatrix(s.X), "residual": jsonNum(s.Residual), "singular": s.Singular}
	return b
}

func dgEigenList(v []complex128) string {
	var parts []string
	for _, z := range v {
		if imag(z) < 0 {
			continue
		}
		parts = append(parts, fmtComplex(z, imag(z) > 0))
	}
	return joinList(parts, func(s string) string { return s })
}

func renderRiccati(v any, _ Options) Bundle {
	s := v.(*lsys.RiccatiSolution)
	title := "Riccati equation"
	if s.Sampled {
		title += ", sampled"
	}
	c := newCard("lsys-equation", title)
	n, _ := s.X.Dims()
	m, _ := s.K.Dims()
	rows := [][2]string{
		{"equation", s.Equation},
		{"method", s.Method},
		{"residual", fmtNum(s.Residual) + " (" + dgResidualNote(s.Residual) + ")"},
	}
	if !math.IsNaN(s.CondU1) {
		rows = append(rows, [2]string{"condition of U1", fmtNum(s.CondU1) + choose(s.CondU1 > 1e8, " (large: X is sensitive to the data)", "")})
	}
	rows = append(rows, [2]string{"closed loop A - B K", choose(s.Stable, "stable", "NOT stable") + ": " + dgEigenList(s.ClosedLoop)})
	keyTable(&c.t, &c.h, rows)
	dgMatrix(c, "X", s.X, numbered(n), numbered(n))
	dgMatrix(c, "K", s.K, numbered(m), numbered(n))
	b := c.bundle()
	b.Data[JSON] = map[string]any{"equation": s.Equation, "X": dgJSONMatrix(s.X), "K": dgJSONMatrix(s.K), "residual": jsonNum(s.Residual), "stable": s.Stable}
	return b
}

func dgHSVRows(hsv []float64, keep int, tol float64) [][]string {
	var rows [][]string
	total := 0.0
	for _, s := range hsv {
		total += s
	}
	for i, s := range hsv {
		status := ""
		if keep >= 0 {
			status = choose(i < keep, "kept", "removed")
		}
		if s <= tol {
			status = strings.TrimSpace(status + " (zero to working precision)")
		}
		row := []string{fmt.Sprint(i + 1), fmtNum(s), fmtNum(s / hsv[0])}
		if keep >= 0 || status != "" {
			row = append(row, status)
		}
		rows = append(rows, row)
	}
	return rows
}

func renderGramians(v any, _ Options) Bundle {
	g := v.(*lsys.Gramians)
	c := newCard("lsys-gramians", "gramians")
	names := g.System.StateNames
	kind := "A P + P A' + B B' = 0 and A'Q + Q A + C'C = 0"
	if g.System.Sampled() {
		kind = "A P A' - P + B B' = 0 and A'Q A - Q + C'C = 0"
	}
	keyTable(&c.t, &c.h, [][2]string{
		{"equations", kind},
		{"condition of P (reachability)", fmtNum(g.CondP)},
		{"condition of Q (observability)", fmtNum(g.CondQ)},
		{"residuals", fmtNum(g.ResidualP) + ", " + fmtNum(g.ResidualQ)},
	})
	dgMatrix(c, "P", g.P, names, names)
	dgMatrix(c, "Q", g.Q, names, names)
	c.t.WriteString("Hankel singular values\n")
	htmlSection(&c.h, "Hankel singular values")
	gridTable(&c.t, &c.h, []string{"#", "value", "relative"}, dgHSVRows(g.HSV, -1, 0), 1)
	if g.Indefinite > 1e-10 {
		note(&c.t, &c.h, fmt.Sprintf("P or Q has a negative eigenvalue of %s relative to its largest: more than rounding; the system may be close to unstable.", fmtNum(-g.Indefinite)))
	}
	note(&c.t, &c.h, "A large condition means directions of the state that take much input energy to reach (P) or give little output (Q).")
	b := c.bundle()
	b.Data[JSON] = map[string]any{"P": dgJSONMatrix(g.P), "Q": dgJSONMatrix(g.Q), "hsv": jsonNums(g.HSV), "cond_P": jsonNum(g.CondP), "cond_Q": jsonNum(g.CondQ)}
	return b
}

// dgHSVPanel charts Hankel singular values in dB against their index;
// the first keep are drawn in the first style, the rest in the second.
func dgHSVPanel(hsv []float64, keep int, tol float64) *rpPanel {
	pn := newPanel("Hankel singular values", "state of the balanced model", "value (dB)")
	pn.DBTicks = true
	pn.Simplify = false
	var kx, ky, rx, ry []float64
	for i, s := range hsv {
		if s <= tol || s <= 0 {
			continue
		}
		if keep < 0 || i < keep {
			kx, ky = append(kx, float64(i+1)), append(ky, 20*math.Log10(s))
		} else {
			rx, ry = append(rx, float64(i+1)), append(ry, 20*math.Log10(s))
		}
	}
	if len(kx) > 0 {
		pn.Series = append(pn.Series, rpSeries{Name: choose(keep >= 0, "kept", "value"), X: kx, Y: ky, Style: 0, Points: true, Radius: 3})
	}
	if len(rx) > 0 {
		pn.Series = append(pn.Series, rpSeries{Name: "removed", X: rx, Y: ry, Style: 1, Points: true, Radius: 3})
		pn.Legend = true
	}
	pn.XMin, pn.XMax = 0.5, float64(len(hsv))+0.5
	return pn
}

func renderHankel(v any, opt Options) Bundle {
	h := v.(*lsys.HankelValues)
	var t strings.Builder
	t.WriteString("Hankel singular values\n")
	if len(h.HSV) == 0 {
		t.WriteString("  none: the system has no stable part\n")
	} else {
		writeColumns(&t, append([][]string{{"#", "value", "relative"}}, dgHSVRows(h.HSV, -1, h.Tol)...), "  ", 1)
	}
	if h.Unstable > 0 {
		fmt.Fprintf(&t, "  %s unstable or on the stability boundary: %s no Hankel singular value (unbounded energy); reduce keeps %s whole\n", count(h.Unstable, "mode is", "modes are"), choose(h.Unstable == 1, "it has", "they have"), choose(h.Unstable == 1, "it", "them"))
	}
	text := strings.TrimRight(t.String(), "\n")
	var fig *rpFigure
	if len(h.HSV) > 0 {
		fig = &rpFigure{Rows: 1, Cols: 1, Panels: []*rpPanel{dgHSVPanel(h.HSV, -1, h.Tol)}, W: 14 * cmLen, H: 8 * cmLen}
	}
	b := rpBundle(text, fig, opt)
	b.Data[JSON] = map[string]any{"hsv": jsonNums(h.HSV), "unstable": h.Unstable}
	return b
}

func renderBalanced(v any, _ Options) Bundle {
	bl := v.(*lsys.Balanced)
	c := newCard("lsys-balanced", "balanced realization")
	keyTable(&c.t, &c.h, [][2]string{
		{"method", "square root (Laub, Heath, Paige & Ward 1987); new states xb = T x"},
		{"Hankel singular values", joinList(bl.HSV, fmtNum)},
		{"condition of T", fmtNum(bl.CondT)},
		{"balance achieved", fmtNum(bl.Deviation) + " (largest gramian entry off diag(HSV), relative)"},
	})
	g := bl.System
	dgMatrix(c, "A", g.A, g.StateNames, g.StateNames)
	if g.M() > 0 {
		dgMatrix(c, "B", g.B, g.StateNames, g.InputNames)
	}
	if g.P() > 0 {
		dgMatrix(c, "C", g.C, g.OutputNames, g.StateNames)
	}
	if g.M() > 0 && g.P() > 0 {
		dgMatrix(c, "D", g.D, g.OutputNames, g.InputNames)
	}
	dgMatrix(c, "T", bl.T, g.StateNames, bl.Gramians.System.StateNames)
	b := c.bundle()
	b.Data[JSON] = map[string]any{"hsv": jsonNums(bl.HSV), "T": dgJSONMatrix(bl.T), "cond_T": jsonNum(bl.CondT)}
	return b
}

func renderReduction(v any, opt Options) Bundle {
	r := v.(*lsys.Reduction)
	var t strings.Builder
	fmt.Fprintf(&t, "reduced model: %s of %s (%s)\n", count(r.Reduced.N(), "state", "states"), count(r.Full.N(), "state", "states"), r.Method)
	fmt.Fprintf(&t, "  order: %s\n", r.Why)
	fmt.Fprintf(&t, "  error bound 2 * (sum of removed Hankel singular values): %s\n", fmtNum(r.Bound))
	fmt.Fprintf(&t, "  true error (largest gain of full - reduced): %s at %s rad/s\n", fmtNum(r.Error), fmtNum(r.ErrorPeak))
	if r.Unstable > 0 {
		fmt.Fprintf(&t, "  %s kept whole (not reduced; no Hankel singular value)\n", count(r.Unstable, "unstable mode", "unstable modes"))
		if r.SplitCond > 1e6 {
			fmt.Fprintf(&t, "  the stable and unstable parts are close together (split condition %s): the reduction is sensitive\n", fmtNum(r.SplitCond))
		}
	}
	t.WriteString("Hankel singular values of the stable part\n")
	writeColumns(&t, append([][]string{{"#", "value", "relative", ""}}, dgHSVRows(r.HSV, r.Order, 0)...), "  ", 1)
	text := strings.TrimRight(t.String(), "\n")
	fig := &rpFigure{Rows: 1, Cols: 2, W: 22 * cmLen, H: 9 * cmLen}
	fig.Panels = append(fig.Panels, dgHSVPanel(r.HSV, r.Order, 0))
	full, red := r.FullResponse, r.ReducedResponse
	if full != nil && red != nil && len(full.W) > 0 && len(full.Inputs) > 0 && len(full.Outputs) > 0 {
		x, xl, _ := rpFreqAxis(full)
		title := "gain"
		if len(full.Inputs) > 1 || len(full.Outputs) > 1 {
			title = full.Outputs[0] + " from " + full.Inputs[0]
			text += fmt.Sprintf("\n(chart shows %s from %s)", full.Outputs[0], full.Inputs[0])
		}
		pn := newPanel(title, xl, "magnitude (dB)")
		pn.LogX = true
		pn.DBTicks = true
		pn.Legend = true
		pn.Series = []rpSeries{
			{Name: fmt.Sprintf("full (%d)", r.Full.N()), X: x, Y: db(full.Magnitude(0, 0)), Style: 0},
			{Name: fmt.Sprintf("reduced (%d)", r.Reduced.N()), X: x, Y: db(red.Magnitude(0, 0)), Style: 1},
		}
		fig.Panels = append(fig.Panels, pn)
	} else {
		fig.Cols = 1
	}
	b := rpBundle(text, fig, opt)
	b.Data[JSON] = map[string]any{"order": r.Reduced.N(), "full_order": r.Full.N(), "bound": jsonNum(r.Bound), "error": jsonNum(r.Error), "error_at_rad_s": jsonNum(r.ErrorPeak), "hsv": jsonNums(r.HSV), "unstable": r.Unstable, "method": r.Method}
	return b
}

func renderNorm(v any, _ Options) Bundle {
	n := v.(*lsys.Norm)
	var t strings.Builder
	if n.Kind == "2" {
		fmt.Fprintf(&t, "H2 norm: %s", fmtNum(n.Value))
		if n.Reason != "" {
			fmt.Fprintf(&t, "\n  infinite: %s", n.Reason)
		} else {
			fmt.Fprintf(&t, "\n  the RMS of the outputs (summed in squares) under unit-intensity white noise on every input; %s", n.Method)
		}
	} else {
		fmt.Fprintf(&t, "H-infinity norm: %s", fmtNum(n.Value))
		if n.Reason != "" {
			fmt.Fprintf(&t, "\n  infinite: %s", n.Reason)
		} else {
			if n.Value > 0 {
				fmt.Fprintf(&t, " (%s dB)", fmtNum(20*math.Log10(n.Value)))
			}
			switch {
			case math.IsInf(n.Peak, 1):
				t.WriteString(" at infinite frequency (the feedthrough D)")
			case !math.IsNaN(n.Peak):
				fmt.Fprintf(&t, " at %s rad/s (%s Hz)", fmtNum(n.Peak), fmtNum(n.Peak/(2*math.Pi)))
			}
			fmt.Fprintf(&t, "\n  between %s and %s (%s; relative accuracy %s)", fmtNum(n.Lower), fmtNum(n.Upper), n.Method, fmtNum(n.Tol))
			if !n.Certified {
				t.WriteString("\n  the upper bound is not certified: the test stopped on eigenvalues at rounding level near the axis")
			}
		}
	}
	b := NewBundle(t.String())
	js := map[string]any{"kind": n.Kind, "value": jsonNum(n.Value)}
	if n.Kind == "inf" {
		js["peak_rad_s"] = jsonNum(n.Peak)
	}
	if n.Reason != "" {
		js["reason"] = n.Reason
	}
	b.Data[JSON] = js
	return b
}

// dgAppend adds a rendered result (its text and HTML) under a card.
func dgAppend(b *Bundle, sub Bundle) {
	if s, ok := sub.Data[Text].(string); ok {
		b.Data[Text] = strings.TrimRight(b.Data[Text].(string), "\n") + "\n" + s
	}
	if h, ok := sub.Data[HTML].(string); ok {
		b.Data[HTML] = b.Data[HTML].(string) + h
	}
}

func renderRegulator(v any, opt Options) Bundle {
	r := v.(*lsys.Regulator)
	g := r.System
	c := newCard("lsys-regulator", "LQ regulator u = -K x")
	s := r.Riccati
	rows := [][2]string{
		{"Riccati equation", s.Method},
		{"residual", fmtNum(s.Residual) + " (" + dgResidualNote(s.Residual) + ")"},
	}
	if !math.IsNaN(s.CondU1) {
		rows = append(rows, [2]string{"condition of U1", fmtNum(s.CondU1)})
	}
	rows = append(rows, [2]string{"closed loop", choose(s.Stable, "stable", "NOT stable")})
	keyTable(&c.t, &c.h, rows)
	dgMatrix(c, "K", r.K, g.InputNames, g.StateNames)
	b := c.bundle()
	c.t.Reset()
	dgAppend(&b, Render(r.Modes, opt))
	b.Data[JSON] = map[string]any{"K": dgJSONMatrix(r.K), "residual": jsonNum(s.Residual), "stable": s.Stable}
	return b
}

func renderEstimator(v any, opt Options) Bundle {
	e := v.(*lsys.Estimator)
	g := e.System
	title := "Kalman estimator"
	if g.Sampled() {
		title += " (one-step predictor)"
	}
	c := newCard("lsys-estimator", title)
	s := e.Riccati
	keyTable(&c.t, &c.h, [][2]string{
		{"Riccati equation", s.Equation},
		{"method", s.Method},
		{"residual", fmtNum(s.Residual) + " (" + dgResidualNote(s.Residual) + ")"},
		{"estimation error", choose(s.Stable, "decays (stable)", "does NOT decay")},
	})
	dgMatrix(c, "L", e.L, g.StateNames, g.OutputNames)
	dgMatrix(c, "P (error covariance)", e.P, g.StateNames, g.StateNames)
	b := c.bundle()
	dgAppend(&b, Render(e.Modes, opt))
	b.Data[JSON] = map[string]any{"L": dgJSONMatrix(e.L), "P": dgJSONMatrix(e.P), "residual": jsonNum(s.Residual)}
	return b
}

func renderAssignment(v any, _ Options) Bundle {
	a := v.(*lsys.Assignment)
	g := a.System
	title := "pole assignment u = -K x"
	if a.Observer {
		title = "observer poles: eigenvalues of A - L C"
	}
	c := newCard("lsys-assign", title)
	verdict := "well conditioned"
	switch {
	case a.CondX > 1e8:
		verdict = "very badly conditioned: the poles will move far under small model errors"
	case a.CondX > 1e4:
		verdict = "badly conditioned: the poles are sensitive to model errors"
	case a.CondX > 100:
		verdict = "moderately conditioned"
	}
	keyTable(&c.t, &c.h, [][2]string{
		{"method", a.Method},
		{"condition of the eigenvectors", fmtNum(a.CondX) + " (" + verdict + ")"},
		{"size of the gain", fmtNum(a.GainNorm) + " (Frobenius norm)"},
		{"largest pole error", fmtNum(a.MaxError) + " (relative)"},
	})
	if a.Observer {
		dgMatrix(c, "L", a.Gain, g.StateNames, g.OutputNames)
	} else {
		dgMatrix(c, "K", a.Gain, g.InputNames, g.StateNames)
	}
	var rows [][]string
	for i, p := range a.Requested {
		rows = append(rows, []string{fmtComplex(p, false), fmtComplex(a.Achieved[i], false)})
	}
	c.t.WriteString("poles\n")
	htmlSection(&c.h, "poles")
	gridTable(&c.t, &c.h, []string{"asked for", "achieved"}, rows, 0)
	b := c.bundle()
	b.Data[JSON] = map[string]any{"gain": dgJSONMatrix(a.Gain), "cond": jsonNum(a.CondX), "max_error": jsonNum(a.MaxError), "observer": a.Observer}
	return b
}

func renderCovariance(v any, opt Options) Bundle {
	cv := v.(*lsys.Covariance)
	g := cv.System
	var t strings.Builder
	kind := "continuous white noise of intensity W (two-sided spectral density W)"
	if g.Sampled() {
		kind = fmt.Sprintf("sampled white noise of covariance W every %s s", fmtNum(g.Ts))
	}
	fmt.Fprintf(&t, "response to white noise: %s on the inputs\n", kind)
	var rows [][]string
	for i, name := range g.OutputNames {
		variance := math.Inf(1)
		if cv.Outputs != nil && !math.IsInf(cv.RMS[i], 1) {
			variance = cv.Outputs.At(i, i)
		}
		rows = append(rows, []string{name, fmtNum(cv.RMS[i]), fmtNum(variance)})
	}
	writeColumns(&t, append([][]string{{"output", "RMS", "variance"}}, rows...), "  ", 1)
	if cv.Infinite != "" {
		fmt.Fprintf(&t, "  inf: %s\n", cv.Infinite)
	}
	if cv.States != nil {
		fmt.Fprintf(&t, "  state RMS: %s\n", strings.Join(dgNamed(g.StateNames, cv.StateRMS), ", "))
		fmt.Fprintf(&t, "  residual of the Lyapunov solution: %s\n", fmtNum(cv.Residual))
	}
	text := strings.TrimRight(t.String(), "\n")
	var fig *rpFigure
	if fr := cv.Spectrum; fr != nil && len(fr.W) > 0 {
		x, xl, _ := rpFreqAxis(fr)
		pn := newPanel("output spectral density", xl, "density (dB)")
		pn.LogX = true
		pn.DBTicks = true
		pn.Legend = len(cv.Density) > 1
		for i, d := range cv.Density {
			if i == 8 {
				break
			}
			y := make([]float64, len(d))
			for k, s := range d {
				y[k] = 10 * math.Log10(s)
			}
			pn.Series = append(pn.Series, rpSeries{Name: g.OutputNames[i], X: x, Y: y, Style: i, Glyph: len(cv.Density) > 1})
		}
		fig = &rpFigure{Rows: 1, Cols: 1, Panels: []*rpPanel{pn}, W: 16 * cmLen, H: 9 * cmLen}
		text += "\n  chart: the two-sided spectral density of each output per rad/s; the variance is 1/(2 pi) times its integral over all frequencies"
		if g.Sampled() {
			text = strings.Replace(text, "1/(2 pi) times its integral over all frequencies", "Ts/(2 pi) times its integral from -pi/Ts to pi/Ts", 1)
		}
	}
	b := rpBundle(text, fig, opt)
	rms := map[string]any{}
	for i, name := range g.OutputNames {
		rms[name] = jsonNum(cv.RMS[i])
	}
	b.Data[JSON] = map[string]any{"rms": rms, "outputs": dgJSONMatrix(cv.Outputs)}
	return b
}

func dgNamed(names []string, v []float64) []string {
	out := make([]string, len(v))
	for i := range v {
		out[i] = names[i] + " " + fmtNum(v[i])
	}
	return out
}

func renderSimulation(v any, opt Options) Bundle {
	s := v.(*lsys.Simulation)
	var t strings.Builder
	what := "nonlinear simulation"
	if s.Controller != "" {
		what += ", loop closed by " + s.Controller
	}
	fmt.Fprintf(&t, "%s: %s from 0 to %s s, %s\n", what, count(len(s.T), "output time", "output times"), fmtNum(s.T[len(s.T)-1]), s.Method)
	if !s.Sampled {
		fmt.Fprintf(&t, "  tolerances per step: relative %s, absolute %s; %d steps (%d rejected), %d evaluations of the equations\n",
			fmtNum(s.RelTol), fmtNum(s.AbsTol), s.Stats.Steps, s.Stats.Rejected, s.Stats.Evaluations)
	}
	last := len(s.T) - 1
	var rows [][]string
	for i, name := range s.Outputs {
		row := []string{name, fmtNum(s.Y[last][i])}
		if s.Linear != nil {
			worst := 0.0
			for k := range s.T {
				worst = math.Max(worst, math.Abs(s.Y[k][i]-s.Linear[k][i]))
			}
			row = append(row, fmtNum(s.Linear[last][i]), fmtNum(worst))
		}
		rows = append(rows, row)
	}
	head := []string{"output", "final"}
	if s.Linear != nil {
		head = append(head, "linear final", "largest difference")
	}
	writeColumns(&t, append([][]string{head}, rows...), "  ", 1)
	text := strings.TrimRight(t.String(), "\n")
	np, cut := rpClip(len(s.Outputs), 4)
	if cut {
		text += fmt.Sprintf("\n(chart shows the first %d outputs)", np)
	}
	fig := &rpFigure{Rows: np, Cols: 1}
	for i := 0; i < np; i++ {
		pn := newPanel(s.Outputs[i], "time (s)", s.Outputs[i])
		y := make([]float64, len(s.T))
		for k := range s.T {
			y[k] = s.Y[k][i]
		}
		pn.Series = append(pn.Series, rpSeries{Name: "model", X: s.T, Y: y, Style: 0, Stairs: s.Sampled})
		if s.Linear != nil {
			yl := make([]float64, len(s.T))
			for k := range s.T {
				yl[k] = s.Linear[k][i]
			}
			pn.Series = append(pn.Series, rpSeries{Name: s.LinearName, X: s.T, Y: yl, Style: 1, Stairs: s.Sampled})
			pn.Legend = true
		}
		fig.Panels = append(fig.Panels, pn)
	}
	if np == 1 {
		fig.W, fig.H = 16*cmLen, 9*cmLen
	}
	b := rpBundle(text, fig, opt)
	final := map[string]any{}
	for i, name := range s.Outputs {
		final[name] = jsonNum(s.Y[last][i])
	}
	b.Data[JSON] = map[string]any{"points": len(s.T), "final": final, "steps": s.Stats.Steps, "rtol": s.RelTol, "atol": s.AbsTol}
	return b
}
