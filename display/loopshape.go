package display

import (
	"fmt"
	"math"
	"math/cmplx"

	"lsys/lsys"
)

func init() {
	Register((*lsys.LoopShape)(nil), renderLoopShape)
}

// renderLoopShape draws |S|, |T|, |PS| and |CS| on one chart, each peak
// marked, with a table of the peaks and the modulus margin.
func renderLoopShape(v any, opt Options) Bundle {
	ls := v.(*lsys.LoopShape)
	f := ls.Frequency
	if f == nil || len(f.W) == 0 {
		return NewBundle("loop shapes: no frequencies")
	}
	hz := f.Hz
	head := []string{"function", "peak", "peak (dB)", "at"}
	var rows [][]string
	for i := range ls.Names {
		rows = append(rows, []string{ls.Help[i], fmtNum(ls.Peak[i]), fmtNum(20 * math.Log10(ls.Peak[i])), rpFreq(ls.PeakW[i], hz)})
	}
	mm := fmt.Sprintf("modulus margin 1/max|S| = %s (the smallest distance from L(jw) to -1)", fmtNum(ls.ModulusMargin))
	verdict := "closed loop (negative unity feedback) is stable"
	switch {
	case !ls.ClosedChecked:
		verdict = "closed-loop stability not judged"
	case !ls.ClosedStable && ls.ClosedBoundary > 0:
		verdict = fmt.Sprintf("closed loop (negative unity feedback) is marginally stable: %d %s on the stability boundary, none beyond it (often a state the loop does not see, such as a position under a speed loop)",
			ls.ClosedBoundary, plural(ls.ClosedBoundary, "pole", "poles"))
	case !ls.ClosedStable:
		verdict = "closed loop (negative unity feedback) is UNSTABLE"
	}
	text := textTable("loop shapes", head, rows) + "\n" + mm + "\n" + verdict + "\n" + rpFreqText(f, "grid")
	for _, n := range ls.Notes {
		text += "\nnote: " + n
	}
	x, xl, sc := rpFreqAxis(f)
	pn := newPanel("closed-loop transfer functions", xl, "magnitude (dB)")
	pn.LogX = true
	pn.DBTicks = true
	pn.Legend = true
	pn.LegendBelow = true
	for i, n := range ls.Names {
		y := make([]float64, len(f.W))
		for k := range f.W {
			y[k] = 20 * math.Log10(cmplx.Abs(ls.Gain[i][k]))
		}
		label := fmt.Sprintf("%s (peak %s dB)", n, fmtNum(20*math.Log10(ls.Peak[i])))
		pn.Series = append(pn.Series, rpSeries{Name: label, X: x, Y: y, Style: i})
		pn.Series = append(pn.Series, rpSeries{X: []float64{ls.PeakW[i] * sc}, Y: []float64{20 * math.Log10(ls.Peak[i])}, Style: i, Points: true, Shape: rpGlyphs[i], Radius: 3.5})
	}
	pn.Lines = []rpLine{{At: 0, Dashed: true}}
	fig := &rpFigure{Rows: 1, Cols: 1, Panels: []*rpPanel{pn}}
	b := rpBundle(text, fig, opt)
	b.Data[HTML] = htmlTableCard("lsys-response", "Loop shapes", head, rows, 1, append([]string{mm, verdict}, ls.Notes...)...)
	peaks := map[string]any{}
	for i, n := range ls.Names {
		peaks[n] = map[string]any{"peak": jsonNum(ls.Peak[i]), "at_rad_s": jsonNum(ls.PeakW[i])}
	}
	notes := ls.Notes
	if notes == nil {
		notes = []string{}
	}
	b.Data[JSON] = map[string]any{"peaks": peaks, "modulus_margin": jsonNum(ls.ModulusMargin), "closed_loop_stable": ls.ClosedStable, "closed_loop_boundary_poles": ls.ClosedBoundary, "notes": notes, "delay": f.Delay}
	return b
}
