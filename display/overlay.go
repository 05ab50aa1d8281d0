package display

// Overlays: several results of one kind on one chart. Result k is drawn in
// palette colour k with line pattern k (marker shape k on pole-zero maps),
// named in one legend below the panels, so the comparison reads in grey
// print and for every kind of colour vision.

import (
	"fmt"
	"math"
	"math/cmplx"
	"sort"
	"strings"

	"gonum.org/v1/plot/vg/draw"

	"lsys/lsys"
)

func init() {
	Register((*lsys.Overlay)(nil), renderOverlay)
}

// ovPoleShapes and ovZeroShapes mark result k's poles and zeros: poles
// stay crosses and zeros rings (the trade's convention), told apart by
// shape within each family and by colour.
var (
	ovPoleShapes = []draw.GlyphDrawer{draw.CrossGlyph{}, draw.PlusGlyph{}, draw.TriangleGlyph{}, draw.SquareGlyph{}}
	ovZeroShapes = []draw.GlyphDrawer{draw.RingGlyph{}, draw.SquareGlyph{}, draw.PyramidGlyph{}, draw.BoxGlyph{}}
)

func renderOverlay(v any, opt Options) Bundle {
	o := v.(*lsys.Overlay)
	switch {
	case len(o.Responses) > 0:
		return ovResponses(o, opt)
	case len(o.Frequencies) > 0:
		return ovFrequencies(o, o.Frequencies, opt)
	case len(o.Polars) > 0:
		return ovPolars(o, opt)
	case len(o.PoleZeros) > 0:
		return ovPoleZeros(o, opt)
	}
	return NewBundle("(an empty overlay)")
}

func ovHead(o *lsys.Overlay, what string) string {
	var parts []string
	for k, n := range o.Names {
		parts = append(parts, fmt.Sprintf("%s (%s)", n, rpStyleWords(k)))
	}
	return fmt.Sprintf("overlay of %d %s: %s", o.Len(), what, strings.Join(parts, ", "))
}

// rpStyleWords names style k's colour and pattern for the text form.
func rpStyleWords(k int) string {
	colours := []string{"blue", "vermillion", "bluish green", "orange", "reddish purple", "sky blue", "black", "yellow"}
	lines := []string{"solid", "dashed", "dotted", "dash-dot", "long dashes", "short dashes", "dash-dot-dot", "sparse dots"}
	return colours[k%len(colours)] + ", " + lines[k%len(lines)]
}

func ovResponses(o *lsys.Overlay, opt Options) Bundle {
	r0 := o.Responses[0]
	var t strings.Builder
	t.WriteString(ovHead(o, rpKindTitle[r0.Kind]+"s"))
	for k, r := range o.Responses {
		fmt.Fprintf(&t, "\n%s: %s", o.Names[k], strings.ReplaceAll(rpResponseText(r), "\n", "\n  "))
	}
	if r0.Kind == "input" {
		t.WriteString("\n(the inputs are not drawn: see each response on its own)")
	}
	rows, _ := rpClip(len(r0.Outputs), rpMaxRows)
	cols, _ := rpClip(len(r0.Channels), rpMaxCols)
	multi := len(r0.Outputs) > 1 || len(r0.Channels) > 1
	f := &rpFigure{Rows: rows, Cols: cols}
	for i := 0; i < rows; i++ {
		for c := 0; c < cols; c++ {
			title := rpKindTitle[r0.Kind]
			if multi {
				title = rpPanelTitle(r0.Outputs[i], r0.Channels[c], r0.Kind, multi)
			}
			pn := newPanel(title, "time (s)", r0.Outputs[i])
			for k, r := range o.Responses {
				pn.Series = append(pn.Series, rpSeries{Name: o.Names[k], X: r.T, Y: r.Y[i][c], Style: k, Stairs: r.Sampled})
			}
			pn.Legend, pn.LegendBelow = i == 0 && c == 0, true
			f.Panels = append(f.Panels, pn)
		}
	}
	return rpBundle(t.String(), f, opt)
}

func ovFrequencies(o *lsys.Overlay, fs []*lsys.FrequencyResponse, opt Options) Bundle {
	f0 := fs[0]
	var t strings.Builder
	t.WriteString(ovHead(o, "frequency responses"))
	for k, f := range fs {
		fmt.Fprintf(&t, "\n%s: %s", o.Names[k], strings.ReplaceAll(rpFreqText(f, "frequency response"), "\n", "\n  "))
	}
	_, xl, sc := rpFreqAxis(f0)
	p, _ := rpClip(len(f0.Outputs), 3)
	m, _ := rpClip(len(f0.Inputs), 4)
	multi := len(f0.Outputs) > 1 || len(f0.Inputs) > 1
	fig := &rpFigure{Rows: 2 * p, Cols: m}
	var mags, phs []*rpPanel
	for i := 0; i < p; i++ {
		for j := 0; j < m; j++ {
			title := "magnitude"
			if multi {
				title = f0.Outputs[i] + " from " + f0.Inputs[j]
			}
			mg := newPanel(title, xl, "magnitude (dB)")
			mg.LogX, mg.DBTicks = true, true
			ph := newPanel("", xl, "phase (deg)")
			ph.LogX, ph.PhaseTicks = true, true
			nyq := map[float64]bool{}
			for k, f := range fs {
				x := make([]float64, len(f.W))
				for q, w := range f.W {
					x[q] = w * sc
				}
				mg.Series = append(mg.Series, rpSeries{Name: o.Names[k], X: x, Y: db(f.Magnitude(i, j)), Style: k})
				ph.Series = append(ph.Series, rpSeries{Name: o.Names[k], X: x, Y: f.Phase(i, j), Style: k})
				if f.Nyquist > 0 && !nyq[f.Nyquist] {
					nyq[f.Nyquist] = true
					mg.Lines = append(mg.Lines, rpLine{At: f.Nyquist * sc, Vertical: true, Dashed: true, Label: "Nyquist"})
					ph.Lines = append(ph.Lines, rpLine{At: f.Nyquist * sc, Vertical: true, Dashed: true})
				}
			}
			mg.Legend, mg.LegendBelow = i == 0 && j == 0, true
			mags, phs = append(mags, mg), append(phs, ph)
		}
	}
	for i := 0; i < p; i++ {
		fig.Panels = append(fig.Panels, mags[i*m:(i+1)*m]...)
		fig.Panels = append(fig.Panels, phs[i*m:(i+1)*m]...)
	}
	if p == 1 && m == 1 {
		fig.W, fig.H = 16*cmLen, 15*cmLen
	}
	return rpBundle(t.String(), fig, opt)
}

func ovPolars(o *lsys.Overlay, opt Options) Bundle {
	f0 := o.Polars[0].Frequency
	var t strings.Builder
	t.WriteString(ovHead(o, "polar charts") + "\npositive frequencies only (the mirror images are left out); cross: the critical point -1")
	p, _ := rpClip(len(f0.Outputs), 3)
	m, _ := rpClip(len(f0.Inputs), 3)
	multi := len(f0.Outputs) > 1 || len(f0.Inputs) > 1
	fig := &rpFigure{Rows: p, Cols: m}
	for i := 0; i < p; i++ {
		for j := 0; j < m; j++ {
			title := "polar chart"
			if multi {
				title = f0.Outputs[i] + " from " + f0.Inputs[j]
			}
			pn := newPanel(title, "real part", "imaginary part")
			pn.Equal, pn.LinTicks = true, true
			pn.Legend, pn.LegendBelow = i == 0 && j == 0, true
			xmin, xmax, ymin, ymax := -1.2, 0.2, -0.2, 0.2
			for k, pc := range o.Polars {
				f := pc.Frequency
				n := len(f.W)
				re, im, mags := make([]float64, n), make([]float64, n), make([]float64, n)
				for q := range f.W {
					g := f.G[q][i*len(f.Inputs)+j]
					re[q], im[q], mags[q] = real(g), imag(g), cmplx.Abs(g)
				}
				pn.Series = append(pn.Series, rpSeries{Name: o.Names[k], X: re, Y: im, Style: k, Glyph: true})
				// as on a single polar chart: near an integrator frame the
				// part within the 85th percentile of |G|
				R := math.Inf(1)
				if f.InfiniteDC && n > 0 {
					sorted := append([]float64(nil), mags...)
					sort.Float64s(sorted)
					R = math.Max(1.2, sorted[int(0.85*float64(n-1))]*1.1)
				}
				for q := range re {
					if mags[q] <= R {
						xmin, xmax = math.Min(xmin, re[q]), math.Max(xmax, re[q])
						ymin, ymax = math.Min(ymin, im[q]), math.Max(ymax, im[q])
					}
				}
			}
			pn.Series = append(pn.Series, rpMark("critical point -1", []complex128{-1}, -1, draw.CrossGlyph{}, 4))
			pn.XMin, pn.XMax, pn.YMin, pn.YMax = xmin, xmax, ymin, ymax
			fig.Panels = append(fig.Panels, pn)
		}
	}
	if len(fig.Panels) > 0 {
		ratio := fig.dataRatio(0)
		for _, pn := range fig.Panels {
			pn.Ratio = ratio
		}
	}
	return rpBundle(t.String(), fig, opt)
}

func ovPoleZeros(o *lsys.Overlay, opt Options) Bundle {
	var t strings.Builder
	sampled := o.PoleZeros[0].System.Sampled()
	t.WriteString(ovHead(o, "pole-zero maps"))
	var all []complex128
	for k, pz := range o.PoleZeros {
		fmt.Fprintf(&t, "\n%s: poles %s", o.Names[k], rpComplexList(pz.Poles))
		if pz.ZerosKnown {
			fmt.Fprintf(&t, "; zeros %s", rpComplexList(pz.Zeros))
			all = append(all, pz.Zeros...)
		}
		all = append(all, pz.Poles...)
	}
	// the frame holds the points up to the widest gap in their sizes (as
	// on a single map); the others are listed, not drawn
	var mods []float64
	for _, p := range all {
		if !cmplx.IsInf(p) && !cmplx.IsNaN(p) && cmplx.Abs(p) > 0 {
			mods = append(mods, cmplx.Abs(p))
		}
	}
	sort.Float64s(mods)
	within := 0.0
	if !sampled && len(mods) >= 3 {
		best := 5.0
		for i := (len(mods)+1)/2 - 1; i+1 < len(mods); i++ {
			if r := mods[i+1] / mods[i]; r >= best {
				best, within = r, math.Sqrt(mods[i]*mods[i+1])
			}
		}
	}
	near := func(v []complex128) (in []complex128, out []string) {
		for _, p := range v {
			if within > 0 && cmplx.Abs(p) > within {
				out = append(out, fmtComplex(p, false))
			} else {
				in = append(in, p)
			}
		}
		return
	}
	pn := newPanel("pole-zero maps", "real part (1/s)", "imaginary part (rad/s)")
	if sampled {
		pn.Title, pn.XLabel, pn.YLabel = "pole-zero maps (z-plane)", "real part", "imaginary part"
	}
	var nearAll []complex128
	for k, pz := range o.PoleZeros {
		ps, far := near(pz.Poles)
		nearAll = append(nearAll, ps...)
		pn.Series = append(pn.Series, rpMark(o.Names[k]+" poles", ps, k, ovPoleShapes[k%len(ovPoleShapes)], 4.5))
		if pz.ZerosKnown && len(pz.Zeros) > 0 {
			zs, farZ := near(pz.Zeros)
			nearAll = append(nearAll, zs...)
			far = append(far, farZ...)
			pn.Series = append(pn.Series, rpMark(o.Names[k]+" zeros", zs, k, ovZeroShapes[k%len(ovZeroShapes)], 4.5))
		}
		if len(far) > 0 {
			fmt.Fprintf(&t, "\n%s, beyond the chart (|s| > %s): %s", o.Names[k], fmtNum(within), strings.Join(far, ", "))
		}
	}
	fr := pzFrame(nearAll, sampled)
	probe := newPanel(pn.Title, pn.XLabel, pn.YLabel)
	probe.Series = pn.Series
	probe.Legend, probe.LegendBelow, probe.LinTicks, probe.Exact = true, true, true, true
	probe.XMin, probe.XMax, probe.YMin, probe.YMax = fr.x0, fr.x1, fr.y0, fr.y1
	fig := &rpFigure{Rows: 1, Cols: 1, Panels: []*rpPanel{probe}, W: 16 * cmLen, H: 10 * cmLen}
	fr, equal := pzEqualFrame(fig, fr, sampled)
	if !equal {
		t.WriteString("\nthe chart's axes have different scales (to fit the points)")
	}
	gR := math.Max(math.Hypot(math.Max(-fr.x0, fr.x1), math.Max(-fr.y0, fr.y1)), 1e-300)
	grid, texts := splaneGrid(o.PoleZeros[0].System.Ts, gR, gridLabelOnAxis)
	if !sampled {
		texts = gridRayLabelsIn(texts, fr.x0, fr.x1, fr.y0, fr.y1)
		pn.Lines = append(pn.Lines, rpLine{At: 0, Vertical: true})
	}
	pn.Series = append(grid, pn.Series...)
	pn.Texts = texts
	pn.Exact, pn.LinTicks, pn.Legend, pn.LegendBelow = true, true, true, true
	pn.XMin, pn.XMax, pn.YMin, pn.YMax = fr.x0, fr.x1, fr.y0, fr.y1
	fig.Panels = []*rpPanel{pn}
	return rpBundle(t.String(), fig, opt)
}
