package display

import (
	"math"

	"gonum.org/v1/plot/vg"

	"lsys/lsys"
)

func init() {
	Register((*lsys.Chart)(nil), renderChart)
}

// renderChart renders the value inside with its chart options: the
// figure is built as usual and rpBundle applies them (applyChart).
func renderChart(v any, opt Options) Bundle {
	c := v.(*lsys.Chart)
	opt.chart = c
	return Render(c.Value, opt)
}

// applyChart sets a figure's title, ranges, x scale and size from the
// options of chart(...). The y range goes to the panels of the first
// panel's kind (magnitude, not phase, on a frequency chart). With a
// logarithmic x axis, points at x <= 0 (t = 0 of a time response) cannot
// be drawn and are left out.
func applyChart(f *rpFigure, c *lsys.Chart) {
	if c == nil || f == nil || len(f.Panels) == 0 {
		return
	}
	if c.Title != "" {
		f.Panels[0].Title = c.Title
	}
	first := f.Panels[0].YLabel
	for _, pn := range f.Panels {
		switch c.XScale {
		case "log":
			pn.LogX = true
			for i := range pn.Series {
				s := &pn.Series[i]
				var x, y []float64
				for k := range s.X {
					if s.X[k] > 0 {
						x, y = append(x, s.X[k]), append(y, s.Y[k])
					}
				}
				s.X, s.Y = x, y
			}
		case "linear":
			pn.LogX = false
		}
		if c.YScale == "log" && pn.YLabel == first {
			pn.LogY, pn.Simplify = true, false // rpSimplify measures y linearly
			pn.DBTicks, pn.PhaseTicks, pn.LinTicks, pn.LinYTicks = false, false, false, false
			for i := range pn.Series {
				s := &pn.Series[i]
				var x, y []float64
				for k := range s.X {
					if k < len(s.Y) && s.Y[k] > 0 {
						x, y = append(x, s.X[k]), append(y, s.Y[k])
					}
				}
				s.X, s.Y = x, y
			}
			var lines []rpLine
			for _, l := range pn.Lines {
				if l.Vertical || l.At > 0 {
					lines = append(lines, l)
				}
			}
			pn.Lines = lines
		}
		xlo, xhi, ylo, yhi := seriesExtent(pn)
		if !math.IsNaN(c.XMin) || !math.IsNaN(c.XMax) {
			pn.XMin, pn.XMax = pick(c.XMin, xlo), pick(c.XMax, xhi)
		}
		if pn.YLabel == first && (!math.IsNaN(c.YMin) || !math.IsNaN(c.YMax)) {
			pn.YMin, pn.YMax = pick(c.YMin, ylo), pick(c.YMax, yhi)
		}
	}
	if c.Width > 0 && c.Height > 0 {
		f.W, f.H = vg.Length(c.Width)*cmLen, vg.Length(c.Height)*cmLen
	}
}

func pick(given, auto float64) float64 {
	if math.IsNaN(given) {
		return auto
	}
	return given
}

// seriesExtent is the range of the finite points of a panel's curves.
func seriesExtent(pn *rpPanel) (xlo, xhi, ylo, yhi float64) {
	xlo, ylo = math.Inf(1), math.Inf(1)
	xhi, yhi = math.Inf(-1), math.Inf(-1)
	for _, s := range pn.Series {
		for k := range s.X {
			if k < len(s.Y) && ok(s.X[k]) && ok(s.Y[k]) && (!pn.LogX || s.X[k] > 0) {
				xlo, xhi = math.Min(xlo, s.X[k]), math.Max(xhi, s.X[k])
				ylo, yhi = math.Min(ylo, s.Y[k]), math.Max(yhi, s.Y[k])
			}
		}
	}
	return
}
