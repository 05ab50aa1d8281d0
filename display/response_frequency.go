package display

import (
	"fmt"
	"math"
	"math/cmplx"
	"sort"
	"strings"

	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"

	"lsys/lsys"
)

func init() {
	Register((*lsys.FrequencyResponse)(nil), renderFrequency)
	Register((*lsys.PolarChart)(nil), renderPolar)
	Register((*lsys.SingularValues)(nil), renderSingular)
	Register((*lsys.PoleZeroMap)(nil), renderPoleZero)
}

// rpFreqAxis returns the frequencies to plot and the axis label.
func rpFreqAxis(f *lsys.FrequencyResponse) ([]float64, string, float64) {
	if !f.Hz {
		return f.W, "frequency (rad/s)", 1
	}
	w := make([]float64, len(f.W))
	for k, v := range f.W {
		w[k] = v / (2 * math.Pi)
	}
	return w, "frequency (Hz)", 1 / (2 * math.Pi)
}

func db(x []float64) []float64 {
	out := make([]float64, len(x))
	for k, v := range x {
		out[k] = 20 * math.Log10(v)
	}
	return out
}

func rpFreqText(f *lsys.FrequencyResponse, what string) string {
	unit, sc := "rad/s", 1.0
	if f.Hz {
		unit, sc = "Hz", 1/(2*math.Pi)
	}
	s := fmt.Sprintf("%s: %d output(s) x %d input(s), %d frequencies from %s to %s %s\n%s",
		what, len(f.Outputs), len(f.Inputs), len(f.W), fmtNum(f.W[0]*sc), fmtNum(f.W[len(f.W)-1]*sc), unit, f.Rule)
	if f.Nyquist > 0 {
		s += fmt.Sprintf("\nsampled: the Nyquist frequency is %s %s", fmtNum(f.Nyquist*sc), unit)
	}
	return s
}

func renderFrequency(v any, opt Options) Bundle {
	f := v.(*lsys.FrequencyResponse)
	if len(f.W) == 0 {
		return NewBundle("frequency response: no frequencies")
	}
	text := rpFreqText(f, "frequency response")
	x, xl, sc := rpFreqAxis(f)
	p, cutR := rpClip(len(f.Outputs), 3)
	m, cutC := rpClip(len(f.Inputs), 4)
	if cutR || cutC {
		text += fmt.Sprintf("\n(chart shows the first %d outputs and %d inputs)", p, m)
	}
	multi := len(f.Outputs) > 1 || len(f.Inputs) > 1
	fig := &rpFigure{Rows: 2 * p, Cols: m}
	mags := make([]*rpPanel, 0, p*m)
	phs := make([]*rpPanel, 0, p*m)
	for i := 0; i < p; i++ {
		for j := 0; j < m; j++ {
			title := "magnitude"
			if multi {
				title = f.Outputs[i] + " from " + f.Inputs[j]
			}
			mg := newPanel(title, xl, "magnitude (dB)")
			mg.LogX = true
			mg.DBTicks = true
			mg.Series = []rpSeries{{X: x, Y: db(f.Magnitude(i, j)), Style: 0}}
			ph := newPanel("", xl, "phase (deg)")
			ph.LogX = true
			ph.PhaseTicks = true
			ph.Series = []rpSeries{{X: x, Y: f.Phase(i, j), Style: 0}}
			if f.Nyquist > 0 {
				mg.Lines = append(mg.Lines, rpLine{At: f.Nyquist * sc, Vertical: true, Dashed: true, Label: "Nyquist"})
				ph.Lines = append(ph.Lines, rpLine{At: f.Nyquist * sc, Vertical: true, Dashed: true, Label: "Nyquist"})
			}
			mags, phs = append(mags, mg), append(phs, ph)
		}
	}
	for i := 0; i < p; i++ {
		fig.Panels = append(fig.Panels, mags[i*m:(i+1)*m]...)
		fig.Panels = append(fig.Panels, phs[i*m:(i+1)*m]...)
	}
	if p == 1 && m == 1 {
		fig.W, fig.H = 16*cmLen, 14*cmLen
	}
	b := rpBundle(text, fig, opt)
	b.Data[JSON] = map[string]any{"outputs": f.Outputs, "inputs": f.Inputs, "points": len(f.W), "from_rad_s": f.W[0], "to_rad_s": f.W[len(f.W)-1]}
	return b
}

func renderPolar(v any, opt Options) Bundle {
	pc := v.(*lsys.PolarChart)
	f := pc.Frequency
	if f == nil || len(f.W) == 0 {
		return NewBundle("polar chart: no frequencies")
	}
	text := rpFreqText(f, "polar (Nyquist) chart") + "\nsolid: positive frequencies; dashed: negative (mirror); cross: the critical point -1"
	p, _ := rpClip(len(f.Outputs), 3)
	m, _ := rpClip(len(f.Inputs), 3)
	fig := &rpFigure{Rows: p, Cols: m}
	multi := len(f.Outputs) > 1 || len(f.Inputs) > 1
	for i := 0; i < p; i++ {
		for j := 0; j < m; j++ {
			title := "polar chart"
			if multi {
				title = f.Outputs[i] + " from " + f.Inputs[j]
			}
			pn := newPanel(title, "real part", "imaginary part")
			pn.Equal = true
			pn.Legend = i == 0 && j == 0 // one legend for the figure, below the panels
			pn.LegendBelow = true
			n := len(f.W)
			re, im := make([]float64, n), make([]float64, n)
			mre, mim := make([]float64, n), make([]float64, n)
			mags := make([]float64, n)
			for k := range f.W {
				g := f.G[k][i*len(f.Inputs)+j]
				re[k], im[k] = real(g), imag(g)
				// the mirror image (negative frequencies) runs back from high to low
				mre[n-1-k], mim[n-1-k] = real(g), -imag(g)
				mags[k] = cmplx.Abs(g)
			}
			pn.Series = append(pn.Series,
				// plain words: a Greek omega in SVG text is drawn turned on
				// its side by some browsers' font fallback
				rpSeries{Name: "positive frequencies", X: re, Y: im, Style: 0, Glyph: true},
				rpSeries{Name: "negative frequencies (mirror)", X: mre, Y: mim, Style: 1, Width: 1},
				rpMark("critical point -1", []complex128{-1}, -1, draw.CrossGlyph{}, 4),
			)
			// Near an integrator |G| runs off to infinity: then frame the
			// part of the curve within the 85th percentile of |G| (and -1);
			// otherwise frame the whole curve.
			sorted := append([]float64(nil), mags...)
			sort.Float64s(sorted)
			R := math.Inf(1)
			if f.InfiniteDC {
				R = math.Max(1.2, sorted[int(0.85*float64(n-1))]*1.1)
			}
			xmin, xmax, ymin, ymax := -1.2, 0.2, -0.2, 0.2
			for k := range re {
				if mags[k] <= R {
					xmin, xmax = math.Min(xmin, re[k]), math.Max(xmax, re[k])
					ymin, ymax = math.Min(ymin, math.Min(im[k], -im[k])), math.Max(ymax, math.Max(im[k], -im[k]))
				}
			}
			pn.XMin, pn.XMax, pn.YMin, pn.YMax = xmin, xmax, ymin, ymax
			fig.Panels = append(fig.Panels, pn)
		}
	}
	// equal scales for the data area's real shape, measured once (the
	// panels are alike)
	if len(fig.Panels) > 0 {
		ratio := fig.dataRatio(0)
		for _, pn := range fig.Panels {
			pn.Ratio = ratio
		}
	}
	b := rpBundle(text, fig, opt)
	b.Data[JSON] = map[string]any{"outputs": f.Outputs, "inputs": f.Inputs, "points": len(f.W)}
	return b
}

func renderSingular(v any, opt Options) Bundle {
	sv := v.(*lsys.SingularValues)
	f := sv.Frequency
	if len(f.W) == 0 {
		return NewBundle("singular values: no frequencies")
	}
	x, xl, _ := rpFreqAxis(f)
	k := len(sv.S[0])
	text := rpFreqText(f, "singular values") + fmt.Sprintf("\n%d singular value(s); the largest peaks at ", k)
	peak, at, kp := 0.0, 0.0, 0
	for n := range f.W {
		if sv.S[n][0] > peak {
			peak, at, kp = sv.S[n][0], x[n], n
		}
	}
	unit := "rad/s"
	if f.Hz {
		unit = "Hz"
	}
	where := "on the grid"
	switch {
	case len(f.W) > 1 && kp == 0:
		where = "the lower edge of the range: it may rise further below"
	case len(f.W) > 1 && kp == len(f.W)-1:
		where = "the upper edge of the range: it may rise further above"
	}
	text += fmt.Sprintf("%s dB at %s %s (%s)", fmtNum(20*math.Log10(peak)), fmtNum(at), unit, where)
	pn := newPanel("singular values", xl, "singular value (dB)")
	pn.LogX = true
	pn.DBTicks = true
	pn.Legend = k > 1
	for i := 0; i < k; i++ {
		y := make([]float64, len(f.W))
		for n := range f.W {
			y[n] = 20 * math.Log10(sv.S[n][i])
		}
		pn.Series = append(pn.Series, rpSeries{Name: fmt.Sprintf("σ%d", i+1), X: x, Y: y, Style: i, Glyph: k > 1})
	}
	if f.Nyquist > 0 {
		_, _, sc := rpFreqAxis(f)
		pn.Lines = append(pn.Lines, rpLine{At: f.Nyquist * sc, Vertical: true, Dashed: true, Label: "Nyquist"})
	}
	b := rpBundle(text, &rpFigure{Rows: 1, Cols: 1, Panels: []*rpPanel{pn}}, opt)
	b.Data[JSON] = map[string]any{"count": k, "points": len(f.W), "peak_db": jsonNum(20 * math.Log10(peak)), "peak_at": at, "unit": unit}
	return b
}

func rpFreq(w float64, hz bool) string {
	if math.IsNaN(w) {
		return "n/a"
	}
	if hz {
		return fmtNum(w/(2*math.Pi)) + " Hz"
	}
	return fmtNum(w) + " rad/s"
}

// interpAt interpolates y(x) linearly in log x.
func interpAt(x, y []float64, at float64) float64 {
	for k := 1; k < len(x); k++ {
		if x[k] >= at {
			a, b := math.Log(x[k-1]), math.Log(x[k])
			t := (math.Log(at) - a) / (b - a)
			return y[k-1] + t*(y[k]-y[k-1])
		}
	}
	return y[len(y)-1]
}

func renderPoleZero(v any, opt Options) Bundle {
	pz := v.(*lsys.PoleZeroMap)
	g := pz.System
	// parts below 1000 u ||A||_1 are rounding (a rigid-body pole computed
	// as 1e-16): show them as 0
	thr := 0.0
	if g.A != nil {
		thr = 1e3 * 1.1102230246251565e-16 * mat.Norm(g.A, 1)
	}
	clean := func(v []complex128) []complex128 {
		out := make([]complex128, len(v))
		for i, z := range v {
			re, im := real(z), imag(z)
			if math.Abs(re) <= thr {
				re = 0
			}
			if math.Abs(im) <= thr {
				im = 0
			}
			out[i] = complex(re, im)
		}
		return out
	}
	pz = &lsys.PoleZeroMap{System: g, Poles: clean(pz.Poles), Zeros: clean(pz.Zeros), ZerosKnown: pz.ZerosKnown, Note: pz.Note, Within: pz.Within}
	var b strings.Builder
	plane := "s-plane"
	if g.Sampled() {
		plane = "z-plane, sampled every " + fmtNum(g.Ts) + " s"
	}
	fmt.Fprintf(&b, "pole-zero map (%s): %d pole(s)", plane, len(pz.Poles))
	if pz.ZerosKnown {
		fmt.Fprintf(&b, ", %d zero(s)", len(pz.Zeros))
	}
	b.WriteString("\npoles: ")
	b.WriteString(rpComplexList(pz.Poles))
	if pz.ZerosKnown {
		b.WriteString("\nzeros: " + rpComplexList(pz.Zeros))
	}
	if pz.Note != "" {
		b.WriteString("\n" + pz.Note)
	}
	text := b.String()
	pn := newPanel("pole-zero map", "real part", "imaginary part")
	if g.Sampled() {
		pn.Title = "pole-zero map (z-plane)"
	} else {
		pn.XLabel, pn.YLabel = "real part (1/s)", "imaginary part (rad/s)"
	}
	pn.Equal = true
	pn.Legend = true
	// Extent of the points. A far zero or pole (an ESR zero at -2e6 beside
	// poles near -1e4) would shrink the rest into a dot, so the frame holds
	// the points up to 10 times the median distance from the origin and
	// marks farther ones at its edge with their value (or the user's
	// radius, within:).
	all := append(append([]complex128(nil), pz.Poles...), pz.Zeros...)
	var mods []float64
	for _, p := range all {
		if !cmplx.IsInf(p) && !cmplx.IsNaN(p) && cmplx.Abs(p) > 0 {
			mods = append(mods, cmplx.Abs(p))
		}
	}
	sort.Float64s(mods)
	within := pz.Within
	if within == 0 && !g.Sampled() && len(mods) >= 3 {
		// the widest gap (a factor of 5 or more) above the lower half of
		// the points, else 10 times the median
		best, cut := 5.0, -1
		for i := (len(mods)+1)/2 - 1; i+1 < len(mods); i++ {
			if r := mods[i+1] / mods[i]; r >= best {
				best, cut = r, i
			}
		}
		switch {
		case cut >= 0:
			within = math.Sqrt(mods[cut] * mods[cut+1])
		case mods[len(mods)-1] > 10*mods[len(mods)/2]:
			within = 10 * mods[len(mods)/2]
		}
	}
	R := 0.0
	for _, m := range mods {
		if within == 0 || m <= within {
			R = math.Max(R, m)
		}
	}
	if pz.Within > 0 {
		R = pz.Within
	}
	if R == 0 {
		R = 1
	}
	var farPoles, farZeros []complex128
	split := func(v []complex128, far *[]complex128) []complex128 {
		if within == 0 {
			return v
		}
		var near []complex128
		for _, p := range v {
			if cmplx.Abs(p) > within {
				*far = append(*far, p)
			} else {
				near = append(near, p)
			}
		}
		return near
	}
	nearPoles := split(pz.Poles, &farPoles)
	var nearZeros []complex128
	if pz.ZerosKnown {
		nearZeros = split(pz.Zeros, &farZeros)
	}
	if len(farPoles)+len(farZeros) > 0 {
		text += fmt.Sprintf("\nthe chart shows |%s| up to %s; marked at its edge with their value: %s",
			map[bool]string{true: "z", false: "s"}[g.Sampled()], fmtNum(R),
			strings.Join(append(rpFarList("pole", farPoles), rpFarList("zero", farZeros)...), ", "))
	}
	// the frame: fitted to the near points (and the origin, or the unit
	// circle when sampled), or the user's radius
	var fr pzBox
	if pz.Within > 0 {
		fr = pzBox{-R, 0.15 * R, -R, R}
		if g.Sampled() {
			fr.x1 = R
		}
	} else {
		fr = pzFrame(append(append([]complex128(nil), nearPoles...), nearZeros...), g.Sampled())
	}
	// the frame's shape for equal scales: that of the chart's data area,
	// measured on a probe of this chart (tick labels and the legend take
	// their room first)
	probe := newPanel(pn.Title, pn.XLabel, pn.YLabel)
	probe.Series = []rpSeries{rpMark("poles", pz.Poles[:min(1, len(pz.Poles))], 0, draw.CrossGlyph{}, 4.5), rpMark("zeros", pz.Poles[:min(1, len(pz.Poles))], 1, draw.RingGlyph{}, 4.5)}
	probe.Legend, probe.LegendBelow, probe.LinTicks, probe.Exact = true, true, true, true
	probe.XMin, probe.XMax, probe.YMin, probe.YMax = fr.x0, fr.x1, fr.y0, fr.y1
	fig := &rpFigure{Rows: 1, Cols: 1, Panels: []*rpPanel{probe}, W: 16 * cmLen, H: 10 * cmLen}
	fr, equal := pzEqualFrame(fig, fr, g.Sampled())
	if !equal {
		text += "\nthe chart's axes have different scales (to fit the points); the damping-ratio lines are drawn to those scales"
	}
	// the grid reaches the frame's far corner
	gR := math.Max(math.Hypot(math.Max(-fr.x0, fr.x1), math.Max(-fr.y0, fr.y1)), 1e-300)
	grid, texts := splaneGrid(g.Ts, gR, gridLabelOnAxis)
	if !g.Sampled() {
		texts = gridRayLabelsIn(texts, fr.x0, fr.x1, fr.y0, fr.y1)
		texts = pzLabelsOffMarkers(texts, append(append([]complex128(nil), nearPoles...), nearZeros...), fr)
	}
	pn.Series = append(pn.Series, grid...)
	if !g.Sampled() {
		pn.Lines = append(pn.Lines, rpLine{At: 0, Vertical: true})
	}
	// far points on the frame's edge, in their direction from the origin,
	// labelled with their value; a label that would overlap one already
	// placed moves a line further from the point (see farLabel)
	// the markers drawn inside count as placed, so no label covers one
	var placed []rpText
	cw := (fr.x1 - fr.x0) / 100
	for _, p := range append(append([]complex128(nil), nearPoles...), nearZeros...) {
		if !cmplx.IsNaN(p) && !cmplx.IsInf(p) {
			placed = append(placed, rpText{X: real(p) - 1.5*cw, Y: imag(p)})
		}
	}
	edge := func(v []complex128) []complex128 {
		out := make([]complex128, len(v))
		for i, p := range v {
			out[i] = fr.edge(p)
			l := fr.farLabel(out[i], rpFarLabel(p), placed)
			placed = append(placed, l)
			texts = append(texts, l)
		}
		return out
	}
	pn.Series = append(pn.Series, rpMark("poles", append(nearPoles, edge(farPoles)...), 0, draw.CrossGlyph{}, 4.5))
	if pz.ZerosKnown && len(pz.Zeros) > 0 {
		pn.Series = append(pn.Series, rpMark("zeros", append(nearZeros, edge(farZeros)...), 1, draw.RingGlyph{}, 4.5))
	}
	pn.Equal = false
	pn.Exact = true
	pn.LinTicks = true
	pn.LegendBelow = true
	pn.XMin, pn.XMax, pn.YMin, pn.YMax = fr.x0, fr.x1, fr.y0, fr.y1
	pn.Texts = texts
	fig.Panels = []*rpPanel{pn}
	out := rpBundle(text, fig, opt)
	js := map[string]any{"sampled": g.Sampled(), "poles": rpComplexJSON(pz.Poles), "zeros_known": pz.ZerosKnown}
	if pz.ZerosKnown {
		js["zeros"] = rpComplexJSON(pz.Zeros)
	}
	out.Data[JSON] = js
	return out
}

// pzEqualFrame gives a pole-zero chart equal scales: the figure (16 cm
// wide, its one panel a probe with the chart's labels and legend) gets a
// height that follows the points' shape, between a square and a wide data
// area, and the frame is widened to the data area's measured shape (to
// the left in continuous time, where the stable points are, not into the
// empty right half plane). equal is false when that would leave more than
// 70 % of the frame empty; the frame is then left as it is.
func pzEqualFrame(fig *rpFigure, fr pzBox, sampled bool) (pzBox, bool) {
	want := math.Min(math.Max((fr.x1-fr.x0)/(fr.y1-fr.y0), 0.75), 2.2)
	if dw, dh := fig.dataSize(0); dw > 0 && dh > 0 {
		fig.H = min(max(fig.H-dh+dw/vg.Length(want), 8*cmLen), 17*cmLen)
	}
	x1 := fr.x1
	fr, equal := fr.aspect(fig.dataRatio(0))
	if equal && !sampled && fr.x1 > x1 {
		fr.x0, fr.x1 = fr.x0-(fr.x1-x1), x1
	}
	return fr, equal
}

// pzLabelsOffMarkers moves a damping-ratio label that would cover a pole
// or zero along its ray (to 0.65, 0.5 or 0.95 of the way to the frame
// instead of 0.8), or leaves it out when every place is covered (the ray
// itself stays). Boxes are estimated for 9 pt text on a 16 cm chart: 1/90
// of the frame's width per character, 1/20 of its height per line.
func pzLabelsOffMarkers(texts []rpText, pts []complex128, fr pzBox) []rpText {
	cw, lh := (fr.x1-fr.x0)/90, (fr.y1-fr.y0)/20
	covers := func(t rpText) bool {
		w := float64(len([]rune(t.Text))+1) * cw
		for _, p := range pts {
			if real(p) > t.X-cw && real(p) < t.X+w && imag(p) > t.Y-0.5*lh && imag(p) < t.Y+1.5*lh {
				return true
			}
		}
		return false
	}
	var out []rpText
	for _, t := range texts {
		var zeta float64
		if _, err := fmt.Sscanf(t.Text, "ζ %g", &zeta); err != nil || !covers(t) {
			out = append(out, t)
			continue
		}
		for _, f := range []float64{0.65 / 0.8, 0.5 / 0.8, 0.95 / 0.8} {
			if n := (rpText{X: t.X * f, Y: t.Y * f, Text: t.Text}); !covers(n) && n.X >= fr.x0 && n.Y <= fr.y1 {
				out = append(out, n)
				break
			}
		}
	}
	return out
}

// pzBox is a chart frame in data coordinates.
type pzBox struct{ x0, x1, y0, y1 float64 }

// pzFrame fits a frame to the points with a margin of 8 % of the span on
// each side. It always holds the origin (continuous time: the stability
// boundary runs through it) or the unit circle (sampled).
func pzFrame(pts []complex128, sampled bool) pzBox {
	b := pzBox{0, 0, 0, 0}
	if sampled {
		b = pzBox{-1, 1, -1, 1}
	}
	for _, p := range pts {
		if cmplx.IsNaN(p) || cmplx.IsInf(p) {
			continue
		}
		b.x0, b.x1 = math.Min(b.x0, real(p)), math.Max(b.x1, real(p))
		b.y0, b.y1 = math.Min(b.y0, imag(p)), math.Max(b.y1, imag(p))
	}
	sx, sy := b.x1-b.x0, b.y1-b.y0
	switch {
	case sx == 0 && sy == 0:
		sx, sy = 1.6, 1
		b = pzBox{-0.8, 0.8, -0.5, 0.5}
	case sy == 0: // points on the real axis only
		sy = sx / 1.6
		b.y0, b.y1 = -sy/2, sy/2
	case sx == 0:
		sx = sy / 4
		b.x0 = -sx
	}
	b.x0, b.x1 = b.x0-0.08*sx, b.x1+0.08*sx
	b.y0, b.y1 = b.y0-0.08*sy, b.y1+0.08*sy
	return b
}

// aspect widens the shorter side of the frame about its centre so both
// axes have the same scale on a chart r times wider than high, unless
// that would leave more than 70 % of the width (or height) empty; then
// the frame stays as it is and equal is false.
func (b pzBox) aspect(r float64) (pzBox, bool) {
	sx, sy := b.x1-b.x0, b.y1-b.y0
	cx, cy := (b.x0+b.x1)/2, (b.y0+b.y1)/2
	if sx < r*sy {
		if sx < 0.3*r*sy {
			return b, false
		}
		sx = r * sy
	} else {
		if sy < 0.3*sx/r {
			return b, false
		}
		sy = sx / r
	}
	return pzBox{cx - sx/2, cx + sx/2, cy - sy/2, cy + sy/2}, true
}

// edge is where the ray from the origin towards p leaves the frame (the
// origin is inside it): the coordinate of the edge it crosses is the
// frame's own, exactly.
func (b pzBox) edge(p complex128) complex128 {
	d := p / complex(cmplx.Abs(p), 0)
	dx, dy := real(d), imag(d)
	t, side := math.Inf(1), 0
	if dx < 0 {
		t, side = b.x0/dx, 1
	} else if dx > 0 {
		t, side = b.x1/dx, 2
	}
	if dy < 0 && b.y0/dy < t {
		t, side = b.y0/dy, 3
	} else if dy > 0 && b.y1/dy < t {
		t, side = b.y1/dy, 4
	}
	x, y := dx*t, dy*t
	switch side {
	case 1:
		x = b.x0
	case 2:
		x = b.x1
	case 3:
		y = b.y0
	case 4:
		y = b.y1
	}
	return complex(x, y)
}

// farLabel places the label of a far point marked at the edge point e:
// a line (6 % of the frame's height) below e, or further down while it
// would overlap a label already placed; where that runs out of the frame
// it goes upward from e instead. In the right half it is shifted left by
// its estimated width (1/100 of the frame's width per character: 8 pt
// text on a 16 cm chart) so the text stays inside.
func (b pzBox) farLabel(e complex128, txt string, placed []rpText) rpText {
	h := 0.06 * (b.y1 - b.y0)
	cw := (b.x1 - b.x0) / 100
	w := float64(len([]rune(txt))+2) * cw
	x := real(e)
	if x > (b.x0+b.x1)/2 {
		x -= w
	}
	free := func(y float64) bool {
		for _, o := range placed {
			ow := float64(len([]rune(o.Text))+2) * cw
			if math.Abs(o.Y-y) < 0.9*h && x < o.X+ow && o.X < x+w {
				return false
			}
		}
		return true
	}
	for y := imag(e) - h; y >= b.y0; y -= h {
		if free(y) {
			return rpText{X: x, Y: y, Text: txt}
		}
	}
	y := imag(e)
	for k := 0; k < 100 && !free(y); k++ {
		y += h
	}
	return rpText{X: x, Y: y, Text: txt}
}

// rpFarLabel is the value of a point drawn at the chart's edge.
func rpFarLabel(p complex128) string {
	if imag(p) == 0 {
		return fmtNum(real(p)) + " (off chart)"
	}
	return fmtComplex(p, false) + " (off chart)"
}

func rpFarList(kind string, v []complex128) []string {
	var out []string
	for _, p := range v {
		out = append(out, kind+" "+fmtComplex(p, false))
	}
	return out
}

func niceStep(x float64) float64 {
	if !(x > 0) {
		return 1
	}
	e := math.Pow(10, math.Floor(math.Log10(x)))
	for _, f := range []float64{1, 2, 5, 10} {
		if f*e >= x {
			return f * e
		}
	}
	return 10 * e
}

func rpComplexList(v []complex128) string {
	return joinList(v, func(z complex128) string { return fmtComplex(z, false) })
}

func rpComplexJSON(v []complex128) [][2]float64 {
	out := make([][2]float64, 0, len(v))
	for _, z := range v {
		out = append(out, [2]float64{real(z), imag(z)})
	}
	return out
}
