package display

// The plotting theme and figure builder for the response displays.
//
// Colours are the colour-blind-safe palette of Okabe & Ito (2008, "Color
// Universal Design", https://jfly.uni-koeln.de/color/), and every series
// also has its own line style and marker shape, so charts read in grey
// scale and for every kind of colour vision. Curves are decimated to the
// screen resolution before drawing (see rpDecimate), which keeps a
// 10,000-sample response a small SVG, and all output is deterministic:
// the same data give the same bytes.

import (
	"bytes"
	"encoding/base64"
	"image/color"
	"math"
	"sort"
	"strconv"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgimg"
	"gonum.org/v1/plot/vg/vgsvg"
)

// rpPalette is Okabe & Ito's palette in the order we use it: blue,
// vermillion, bluish green, orange, reddish purple, sky blue, black,
// yellow (last: weak on white).
var rpPalette = []color.NRGBA{
	{0x00, 0x72, 0xB2, 0xFF}, // blue
	{0xD5, 0x5E, 0x00, 0xFF}, // vermillion
	{0x00, 0x9E, 0x73, 0xFF}, // bluish green
	{0xE6, 0x9F, 0x00, 0xFF}, // orange
	{0xCC, 0x79, 0xA7, 0xFF}, // reddish purple
	{0x56, 0xB4, 0xE9, 0xFF}, // sky blue
	{0x00, 0x00, 0x00, 0xFF}, // black
	{0xF0, 0xE4, 0x42, 0xFF}, // yellow
}

var (
	rpBlack = color.NRGBA{0, 0, 0, 0xFF}
	rpGrey  = color.NRGBA{0x99, 0x99, 0x99, 0xFF}
	rpGrid  = color.NRGBA{0xE4, 0xE4, 0xE4, 0xFF}
)

// rpDashes gives each series index its own line pattern besides colour.
var rpDashes = [][]vg.Length{
	nil,
	{vg.Points(6), vg.Points(3)},
	{vg.Points(1.5), vg.Points(2.5)},
	{vg.Points(7), vg.Points(2.5), vg.Points(1.5), vg.Points(2.5)},
	{vg.Points(11), vg.Points(4)},
	{vg.Points(3), vg.Points(3)},
	{vg.Points(9), vg.Points(2.5), vg.Points(1.5), vg.Points(2.5), vg.Points(1.5), vg.Points(2.5)},
	{vg.Points(2), vg.Points(5)},
}

// rpGlyphs gives each series index its own marker shape.
var rpGlyphs = []draw.GlyphDrawer{
	draw.CircleGlyph{}, draw.TriangleGlyph{}, draw.BoxGlyph{}, draw.PyramidGlyph{},
	draw.RingGlyph{}, draw.SquareGlyph{}, draw.PlusGlyph{}, draw.CrossGlyph{},
}

// rpSeries is one curve.
type rpSeries struct {
	Name   string
	X, Y   []float64
	Style  int     // index into the palette, dashes and glyphs; -1: black reference style
	Width  float64 // points; 0 means 1.5
	Stairs bool    // sampled signal: hold each value to the next sample
	Glyph  bool    // draw markers at a few places along the curve
	Points bool    // draw markers only (no line), e.g. poles and zeros
	Shape  draw.GlyphDrawer
	Radius float64
	Color  color.Color // overrides the style's colour (grid curves)
}

// rpLine is a reference line across a panel (horizontal or vertical).
type rpLine struct {
	At       float64
	Vertical bool
	Dashed   bool
	Label    string // written beside the line's top (vertical) or right end
}

// rpText is an annotation placed at data coordinates.
type rpText struct {
	X, Y float64
	Text string
}

// rpPanel is one chart.
type rpPanel struct {
	Title, XLabel, YLabel string
	LogX                  bool
	// LogY draws the y axis on a log scale; points at y <= 0 are left
	// out (applyChart sets it; the chart's own tick styles give way).
	LogY   bool
	Series []rpSeries
	Lines  []rpLine
	Texts  []rpText
	Legend bool
	// Fixed ranges (both ends set) or NaN for automatic.
	XMin, XMax, YMin, YMax float64
	Equal                  bool // equal scales on both axes (pole-zero and polar charts)
	// Ratio is the width over the height of the data area that Equal
	// assumes (measure it with rpFigure.dataRatio); 0 means 1.6.
	Ratio float64
	// Exact uses the fixed ranges as they are: no equal-scale widening and
	// no padding (a chart that marks points on the frame's edge).
	Exact bool
	// LinTicks labels both axes with rpLinTicks (one format per axis, 0
	// always labelled); charts in the complex plane set it.
	LinTicks   bool
	LinYTicks  bool // the y axis alone labelled with rpLinTicks (a linear y beside a log x)
	PhaseTicks bool // y ticks at multiples of 45, 90 or 180 degrees
	DBTicks    bool // y ticks at multiples of 10, 20, 40 ... dB
	// Legends are drawn in a strip below the figure, never over the data:
	// with LegendBelow this panel's entries alone (set it on the one panel
	// whose legend stands for all), otherwise the entries of all panels
	// with Legend, each name once.
	LegendBelow bool
	// Simplify drops points that lie within a quarter pixel of the line
	// through their neighbours after decimation (smooth curves then need
	// a few hundred points, not thousands); newPanel sets it.
	Simplify bool

	below []rpLegendEntry // filled by build when Legend
}

// rpLegendEntry is a legend line drawn outside a panel.
type rpLegendEntry struct {
	name   string
	thumbs []plot.Thumbnailer
}

// rpLogTicks labels every decade and marks the values in between. Unlike
// gonum's LogTicks it rounds the lower decade down (with a tolerance for
// log10 of a power of ten computed just above or below the integer), so a
// range starting at 0.1 gets its 0.1 label.
type rpLogTicks struct{}

func (rpLogTicks) Ticks(min, max float64) []plot.Tick {
	if !(min > 0) || !(max > min) {
		return nil
	}
	lo := int(math.Floor(math.Log10(min) + 1e-9))
	hi := int(math.Ceil(math.Log10(max) - 1e-9))
	// the decades that get a label
	first, last := lo, hi
	if math.Pow10(first) < min*(1-1e-9) {
		first++
	}
	if math.Pow10(last) > max*(1+1e-9) {
		last--
	}
	var out []plot.Tick
	for e := lo; e <= hi; e++ {
		v := math.Pow10(e)
		if v >= min*(1-1e-9) && v <= max*(1+1e-9) {
			out = append(out, plot.Tick{Value: v, Label: rpDecadeLabel(e, first, last)})
		}
		for i := 2; i < 10 && e < hi; i++ {
			if w := v * float64(i); w >= min && w <= max {
				out = append(out, plot.Tick{Value: w})
			}
		}
	}
	return out
}

// rpDecadeLabel labels the decade 10^e on an axis whose labelled decades
// run from lo to hi: plain numbers (0.01 ... 1000) when they all fit in
// five characters, otherwise every decade as 1eN (1e-3, 1e0, 1e6), one
// style per axis instead of 'g' formatting's mix of "100000" and "1e+06".
// Superscript exponents (10⁶) would read best, but the chart font lacks
// ⁰, ⁹ and the superscript minus, so a PNG would drop them.
func rpDecadeLabel(e, lo, hi int) string {
	if lo >= -2 && hi <= 3 {
		return strconv.FormatFloat(math.Pow10(e), 'f', -1, 64)
	}
	return "1e" + strconv.Itoa(e)
}

// rpStepTicker puts ticks at multiples of the first step that gives at
// most seven labels: 45, 90, 180 ... for phase, 10, 20, 40 ... for dB.
type rpStepTicker struct{ steps []float64 }

var (
	rpPhaseTicker = rpStepTicker{[]float64{45, 90, 180, 360, 720, 1440, 2880}}
	rpDBTicker    = rpStepTicker{[]float64{5, 10, 20, 40, 60, 100, 200, 500}}
)

func (tk rpStepTicker) Ticks(min, max float64) []plot.Tick {
	step := tk.steps[0]
	for _, s := range tk.steps {
		step = s
		if (max-min)/s <= 6 {
			break
		}
	}
	var out []plot.Tick
	for v := math.Ceil(min/step) * step; v <= max; v += step {
		if v == 0 {
			v = 0 // not "-0" when the range starts just below zero
		}
		out = append(out, plot.Tick{Value: v, Label: strconv.FormatFloat(v, 'f', -1, 64)})
	}
	return out
}

// rpLinTicks puts ticks at multiples of a round step (1, 2 or 5 x 10^k)
// giving three to six labels, so a range across zero always gets its 0,
// and writes every label of the axis with the step's number of decimals
// (75, 0, -75, not 75.00 beside 0). Axes reaching a million and beyond
// are labelled in units of the step's decade (4e5, 0, -4e5).
type rpLinTicks struct{}

func (rpLinTicks) Ticks(min, max float64) []plot.Tick {
	if !(max > min) || !ok(min) || !ok(max) {
		return nil
	}
	step := niceStep((max - min) / 6)
	e := int(math.Floor(math.Log10(step) + 1e-9))
	big := math.Max(math.Abs(min), math.Abs(max)) >= 1e6
	dec := max0(-e)
	var out []plot.Tick
	for k := math.Ceil(min/step - 1e-9); k*step <= max+1e-9*step; k++ {
		v := k * step
		if k == 0 {
			v = 0 // not "-0"
		}
		var lab string
		switch {
		case k == 0:
			lab = "0"
		case big:
			lab = strconv.FormatFloat(v/math.Pow10(e), 'f', 0, 64) + "e" + strconv.Itoa(e)
		default:
			lab = strconv.FormatFloat(v, 'f', dec, 64)
		}
		out = append(out, plot.Tick{Value: v, Label: lab})
	}
	return out
}

func max0(i int) int {
	if i < 0 {
		return 0
	}
	return i
}

func newPanel(title, xl, yl string) *rpPanel {
	nan := math.NaN()
	return &rpPanel{Title: title, XLabel: xl, YLabel: yl, XMin: nan, XMax: nan, YMin: nan, YMax: nan, Simplify: true}
}

// rpFigure is a grid of panels, row-major.
type rpFigure struct {
	Rows, Cols int
	Panels     []*rpPanel
	W, H       vg.Length
}

// rpPixels is the horizontal resolution a curve is decimated to: enough
// for a chart up to about 1000 px wide on screen.
const rpPixels = 1000

const cmLen = vg.Centimeter

// rpDecimate keeps, for every one of the given number of buckets along x,
// the first, last, lowest and highest points, in their original order
// (the M4 aggregation: Jugel et al. 2014, "M4: a visualization-oriented
// time series data aggregation", Proc. VLDB Endowment 7(10)). At screen
// resolution the drawn line is then the same as the full one. Non-finite
// points are dropped. x must be increasing; logX buckets in log10(x).
func rpDecimate(x, y []float64, buckets int, logX bool) (xs, ys []float64) {
	var idx []int
	for k := range x {
		if ok(x[k]) && ok(y[k]) && (!logX || x[k] > 0) {
			idx = append(idx, k)
		}
	}
	if len(idx) <= 4*buckets {
		for _, k := range idx {
			xs, ys = append(xs, x[k]), append(ys, y[k])
		}
		return
	}
	tx := func(v float64) float64 {
		if logX {
			return math.Log10(v)
		}
		return v
	}
	lo, hi := tx(x[idx[0]]), tx(x[idx[len(idx)-1]])
	width := (hi - lo) / float64(buckets)
	if !(width > 0) {
		width = 1
	}
	start := 0
	for start < len(idx) {
		b := math.Floor((tx(x[idx[start]]) - lo) / width)
		end := start
		for end+1 < len(idx) && math.Floor((tx(x[idx[end+1]])-lo)/width) == b {
			end++
		}
		first, last := idx[start], idx[end]
		mn, mx := first, first
		for _, k := range idx[start : end+1] {
			if y[k] < y[mn] {
				mn = k
			}
			if y[k] > y[mx] {
				mx = k
			}
		}
		keep := []int{first, mn, mx, last}
		sort.Ints(keep)
		prev := -1
		for _, k := range keep {
			if k != prev {
				xs, ys = append(xs, x[k]), append(ys, y[k])
				prev = k
			}
		}
		start = end + 1
	}
	return
}

func ok(v float64) bool { return !math.IsNaN(v) && !math.IsInf(v, 0) }

// stairs turns samples into a held (zero-order) curve.
func stairs(x, y []float64) ([]float64, []float64) {
	if len(x) == 0 {
		return nil, nil
	}
	xs := make([]float64, 0, 2*len(x))
	ys := make([]float64, 0, 2*len(y))
	for k := range x {
		if k > 0 {
			xs, ys = append(xs, x[k]), append(ys, y[k-1])
		}
		xs, ys = append(xs, x[k]), append(ys, y[k])
	}
	return xs, ys
}

func xys(x, y []float64) plotter.XYs {
	out := make(plotter.XYs, len(x))
	for i := range x {
		out[i].X, out[i].Y = x[i], y[i]
	}
	return out
}

func styleColor(i int) color.Color {
	if i < 0 {
		return rpBlack
	}
	return rpPalette[i%len(rpPalette)]
}

// build makes the gonum plot of a panel.
func (pn *rpPanel) build(buckets int) *plot.Plot {
	p := plot.New()
	p.Title.Text = pn.Title
	p.Title.TextStyle.Font.Size = vg.Points(11)
	p.X.Label.Text = pn.XLabel
	p.Y.Label.Text = pn.YLabel
	for _, ax := range []*plot.Axis{&p.X, &p.Y} {
		ax.Label.TextStyle.Font.Size = vg.Points(10)
		ax.Tick.Label.Font.Size = rpSmallText
	}
	p.Legend.TextStyle.Font.Size = rpSmallText
	p.Legend.Padding = vg.Points(3) // keeps entries apart, also when a viewer substitutes a taller font
	p.Legend.Top = true
	p.Legend.ThumbnailWidth = vg.Points(26)
	grid := plotter.NewGrid()
	grid.Vertical.Color, grid.Horizontal.Color = rpGrid, rpGrid
	grid.Vertical.Width, grid.Horizontal.Width = vg.Points(0.5), vg.Points(0.5)
	p.Add(grid)
	if pn.LogX {
		p.X.Scale = plot.LogScale{}
		p.X.Tick.Marker = rpLogTicks{}
	}
	if pn.LinTicks {
		p.X.Tick.Marker, p.Y.Tick.Marker = rpLinTicks{}, rpLinTicks{}
	}
	if pn.LinYTicks {
		p.Y.Tick.Marker = rpLinTicks{}
	}
	if pn.PhaseTicks {
		p.Y.Tick.Marker = rpPhaseTicker
	}
	if pn.DBTicks {
		p.Y.Tick.Marker = rpDBTicker
	}
	if pn.LogY {
		p.Y.Scale = plot.LogScale{}
		p.Y.Tick.Marker = rpLogTicks{}
	}
	// data range, for reference lines and fixed ranges
	xmin, xmax, ymin, ymax := math.Inf(1), math.Inf(-1), math.Inf(1), math.Inf(-1)
	pn.below = nil
	yspan := 0.0 // the panel's y range, the scale of rpSimplify's tolerance
	if pn.Simplify {
		lo, hi := math.Inf(1), math.Inf(-1)
		for _, s := range pn.Series {
			for _, v := range s.Y {
				if ok(v) {
					lo, hi = math.Min(lo, v), math.Max(hi, v)
				}
			}
		}
		if ok(lo) && ok(hi) {
			yspan = hi - lo
		}
		if ok(pn.YMin) && ok(pn.YMax) {
			yspan = pn.YMax - pn.YMin
		}
	}
	for si, s := range pn.Series {
		x, y := s.X, s.Y
		if s.Stairs {
			x, y = stairs(x, y)
		}
		var lx, ly []float64 // the drawn line, maybe simplified; x, y place the markers
		if !s.Points {
			x, y = rpDecimate(x, y, buckets, pn.LogX)
			lx, ly = x, y
			if pn.Simplify {
				xspan := 0.0 // the curve's own x range, unless the panel fixes one
				if ok(pn.XMin) && ok(pn.XMax) && !pn.LogX {
					xspan = pn.XMax - pn.XMin
				}
				lx, ly = rpSimplify(x, y, xspan, yspan, pn.LogX)
			}
		} else {
			var fx, fy []float64
			for k := range x {
				if ok(x[k]) && ok(y[k]) {
					fx, fy = append(fx, x[k]), append(fy, y[k])
				}
			}
			x, y = fx, fy
		}
		if len(x) == 0 {
			continue
		}
		for k := range x {
			xmin, xmax = math.Min(xmin, x[k]), math.Max(xmax, x[k])
			ymin, ymax = math.Min(ymin, y[k]), math.Max(ymax, y[k])
		}
		col := styleColor(s.Style)
		if s.Color != nil {
			col = s.Color
		}
		shape := s.Shape
		if shape == nil {
			shape = rpGlyphs[max(s.Style, 0)%len(rpGlyphs)]
		}
		rad := s.Radius
		if rad == 0 {
			rad = 3
		}
		gs := draw.GlyphStyle{Color: col, Radius: vg.Points(rad), Shape: shape}
		var thumbs []plot.Thumbnailer
		if !s.Points {
			l, err := plotter.NewLine(xys(lx, ly))
			if err != nil {
				continue
			}
			w := s.Width
			if w == 0 {
				w = 1.5
			}
			l.LineStyle = draw.LineStyle{Color: col, Width: vg.Points(w)}
			if s.Style >= 0 && s.Color == nil {
				l.LineStyle.Dashes = rpDashes[s.Style%len(rpDashes)]
			}
			p.Add(l)
			thumbs = append(thumbs, l)
		}
		if s.Glyph || s.Points {
			var gx, gy []float64
			if s.Points {
				gx, gy = x, y
			} else {
				// six markers along the curve, shifted per series so that
				// markers of overlapping curves do not hide each other
				// (by arc length on charts with equal axes, by sample
				// index otherwise)
				pos := make([]float64, len(x))
				for k := 1; k < len(x); k++ {
					if pn.Equal {
						// only the part inside a fixed frame counts
						in := !ok(pn.XMin) || (x[k] >= pn.XMin && x[k] <= pn.XMax && y[k] >= pn.YMin && y[k] <= pn.YMax)
						pos[k] = pos[k-1]
						if in {
							pos[k] += math.Hypot(x[k]-x[k-1], y[k]-y[k-1])
						}
					} else {
						pos[k] = float64(k)
					}
				}
				total := pos[len(pos)-1]
				k := 0
				for j := 0; j < 6; j++ {
					target := (float64(j) + 0.3 + 0.11*float64(si%5)) / 6 * total
					for k < len(x)-1 && pos[k] < target {
						k++
					}
					gx, gy = append(gx, x[k]), append(gy, y[k])
				}
			}
			sc, err := plotter.NewScatter(xys(gx, gy))
			if err == nil {
				sc.GlyphStyle = gs
				p.Add(sc)
				thumbs = append(thumbs, sc)
			}
		}
		// every legend goes below the panels: inside the frame, at 9 pt,
		// it covered the curves
		if pn.Legend && s.Name != "" && len(thumbs) > 0 {
			pn.below = append(pn.below, rpLegendEntry{s.Name, thumbs})
		}
	}
	if !ok(xmin) {
		xmin, xmax, ymin, ymax = 0, 1, 0, 1
		if pn.LogX {
			xmin, xmax = 1, 10
		}
	}
	if ok(pn.XMin) && ok(pn.XMax) {
		xmin, xmax = pn.XMin, pn.XMax
	}
	if ok(pn.YMin) && ok(pn.YMax) {
		ymin, ymax = pn.YMin, pn.YMax
	}
	if pn.DBTicks && !(ok(pn.YMin) && ok(pn.YMax)) {
		ymin = rpDBFloor(pn, ymin, ymax)
	}
	for _, l := range pn.Lines {
		if l.Vertical {
			xmin, xmax = math.Min(xmin, l.At), math.Max(xmax, l.At)
		} else {
			ymin, ymax = math.Min(ymin, l.At), math.Max(ymax, l.At)
		}
	}
	if pn.LogY {
		// a log axis needs positive ends and some span: a decade at least
		if !(ymax > 0) {
			ymax = 1
		}
		if !(ymin > 0) || ymin > ymax/10 {
			ymin = math.Min(math.Max(ymin, ymax*1e-6), ymax/10)
		}
	} else if ymax-ymin <= 1e-12*math.Max(1, math.Abs(ymax)) {
		d := math.Max(1, math.Abs(ymax)) * 0.1
		ymin, ymax = ymin-d, ymax+d
	}
	if xmax <= xmin {
		xmax = xmin + 1
	}
	for _, l := range pn.Lines {
		var pts plotter.XYs
		if l.Vertical {
			pts = plotter.XYs{{X: l.At, Y: ymin}, {X: l.At, Y: ymax}}
		} else {
			pts = plotter.XYs{{X: xmin, Y: l.At}, {X: xmax, Y: l.At}}
		}
		ln, err := plotter.NewLine(pts)
		if err != nil {
			continue
		}
		ln.LineStyle = draw.LineStyle{Color: rpGrey, Width: vg.Points(0.8)}
		if l.Dashed {
			ln.LineStyle.Dashes = []vg.Length{vg.Points(4), vg.Points(3)}
		}
		p.Add(ln)
	}
	texts := append([]rpText(nil), pn.Texts...)
	for _, l := range pn.Lines {
		if l.Label != "" && l.Vertical {
			y := ymax - 0.08*(ymax-ymin)
			if pn.LogY {
				y = ymax * math.Pow(ymin/ymax, 0.08)
			}
			texts = append(texts, rpText{X: l.At, Y: y, Text: l.Label})
		}
	}
	if len(texts) > 0 {
		// a label in the right quarter of the frame ends at its point
		// instead of starting there, so it is not cut by the frame
		tx := func(v float64) float64 {
			if pn.LogX {
				return math.Log10(v)
			}
			return v
		}
		var left, right plotter.XYLabels
		for _, t := range texts {
			if !ok(t.X) || !ok(t.Y) || (pn.LogX && t.X <= 0) || (pn.LogY && t.Y <= 0) {
				continue
			}
			side := &left
			if tx(t.X) > tx(xmin)+0.75*(tx(xmax)-tx(xmin)) {
				side = &right
			}
			side.XYs = append(side.XYs, plotter.XY{X: t.X, Y: t.Y})
			side.Labels = append(side.Labels, t.Text)
		}
		for k, lx := range []plotter.XYLabels{left, right} {
			if len(lx.XYs) == 0 {
				continue
			}
			if lb, err := plotter.NewLabels(lx); err == nil {
				for i := range lb.TextStyle {
					lb.TextStyle[i].Font.Size = rpSmallText
					lb.TextStyle[i].Color = rpBlack
					lb.TextStyle[i].XAlign = draw.XLeft
				}
				lb.Offset = vg.Point{X: vg.Points(3), Y: vg.Points(3)}
				if k == 1 {
					for i := range lb.TextStyle {
						lb.TextStyle[i].XAlign = draw.XRight
					}
					lb.Offset.X = -vg.Points(3)
					lb.Offset.Y = -vg.Points(13) // below its point, off the curve it marks
				}
				p.Add(lb)
			}
		}
	}
	if pn.Equal && !pn.Exact {
		// widen the shorter span so both axes have the same scale (the
		// panel is drawn about 1.6 times wider than high)
		r := pn.Ratio
		if !(r > 0) {
			r = 1.6
		}
		cx, cy := (xmin+xmax)/2, (ymin+ymax)/2
		sx, sy := (xmax-xmin)*1.1, (ymax-ymin)*1.1
		if sx < r*sy {
			sx = r * sy
		} else {
			sy = sx / r
		}
		xmin, xmax, ymin, ymax = cx-sx/2, cx+sx/2, cy-sy/2, cy+sy/2
	}
	p.X.Min, p.X.Max = xmin, xmax
	p.Y.Min, p.Y.Max = ymin, ymax
	if pn.LogY {
		f := math.Pow(ymax/ymin, 0.04)
		p.Y.Min, p.Y.Max = ymin/f, ymax*f
	} else if !pn.Equal && !pn.Exact {
		pad := 0.04 * (ymax - ymin)
		p.Y.Min, p.Y.Max = ymin-pad, ymax+pad
	}
	return p
}

// draw renders the figure onto a canvas.
func (f *rpFigure) draw(c vg.CanvasSizer) {
	plots, canvases := f.layout(c)
	for r := range plots {
		for k := range plots[r] {
			plots[r][k].Draw(canvases[r][k])
		}
	}
}

// dataRatio is the width over the height of panel i's data area when the
// figure is drawn at its size: what a chart with equal scales on both
// axes must give its frame (the frame's own width over height).
func (f *rpFigure) dataRatio(i int) float64 {
	dw, dh := f.dataSize(i)
	if !(dw > 0) || !(dh > 0) {
		return 1.6
	}
	return float64(dw / dh)
}

// dataSize is the size of panel i's data area when the figure is drawn.
func (f *rpFigure) dataSize(i int) (vg.Length, vg.Length) {
	w, h := f.size()
	plots, canvases := f.layout(vgimg.NewWith(vgimg.UseWH(w, h), vgimg.UseDPI(96)))
	r, k := i/max(f.Cols, 1), i%max(f.Cols, 1)
	da := plots[r][k].DataCanvas(canvases[r][k])
	return da.Max.X - da.Min.X, da.Max.Y - da.Min.Y
}

// layout builds the panels' plots and the canvases they are drawn on.
func (f *rpFigure) layout(c vg.CanvasSizer) ([][]*plot.Plot, [][]draw.Canvas) {
	dc := draw.New(c)
	buckets := rpPixels / max(f.Cols, 1)
	plots := make([][]*plot.Plot, f.Rows)
	for r := range plots {
		plots[r] = make([]*plot.Plot, f.Cols)
		for k := 0; k < f.Cols; k++ {
			i := r*f.Cols + k
			if i < len(f.Panels) && f.Panels[i] != nil {
				plots[r][k] = f.Panels[i].build(buckets)
			} else {
				plots[r][k] = plot.New()
				plots[r][k].HideAxes()
			}
		}
	}
	// a legend strip below the panels: from the first panel that asks
	// for one, else the entries of every panel with a legend, each name
	// once (panels that share curves share entries)
	var below []rpLegendEntry
	for _, pn := range f.Panels {
		if pn != nil && pn.LegendBelow && len(pn.below) > 0 {
			below = pn.below
			break
		}
	}
	if below == nil {
		seen := map[string]bool{}
		for _, pn := range f.Panels {
			if pn == nil {
				continue
			}
			for _, e := range pn.below {
				if !seen[e.name] {
					seen[e.name] = true
					below = append(below, e)
				}
			}
		}
	}
	if len(below) > 0 {
		dc = f.drawLegendBelow(dc, below)
	}
	pad := vg.Points(6)
	tiles := draw.Tiles{Rows: f.Rows, Cols: f.Cols, PadTop: pad, PadBottom: pad, PadLeft: pad, PadRight: pad, PadX: vg.Points(14), PadY: vg.Points(12)}
	return plots, plot.Align(plots, tiles, dc)
}

// drawLegendBelow draws the entries in columns along the bottom of the
// canvas and returns the canvas left for the panels.
func (f *rpFigure) drawLegendBelow(dc draw.Canvas, entries []rpLegendEntry) draw.Canvas {
	mk := func() plot.Legend {
		l := plot.NewLegend()
		l.TextStyle.Font.Size = rpSmallText
		l.ThumbnailWidth = vg.Points(26)
		l.Padding = vg.Points(3)
		l.Top, l.Left = true, true
		return l
	}
	probe := mk()
	var widest vg.Length
	for _, e := range entries {
		if w := probe.TextStyle.Rectangle(" " + e.name).Max.X; w > widest {
			widest = w
		}
	}
	// a quarter more than measured: viewers may substitute a wider font
	colW := probe.ThumbnailWidth + widest*5/4 + vg.Points(14)
	width := dc.Max.X - dc.Min.X - vg.Points(24)
	ncol := max(1, min(len(entries), int(width/colW), 4))
	nrow := (len(entries) + ncol - 1) / ncol
	lineH := probe.TextStyle.Rectangle("Mg").Max.Y + probe.Padding
	h := vg.Length(nrow)*lineH + vg.Points(8)
	strip := draw.Crop(dc, vg.Points(24), 0, vg.Points(2), -(dc.Max.Y - dc.Min.Y - h))
	for c := 0; c < ncol; c++ {
		l := mk()
		for r := 0; r < nrow; r++ {
			if i := c*nrow + r; i < len(entries) {
				l.Add(entries[i].name, entries[i].thumbs...)
			}
		}
		cc := strip
		cc.Min.X = strip.Min.X + vg.Length(c)*colW
		cc.Max.X = cc.Min.X + colW
		l.Draw(cc)
	}
	return draw.Crop(dc, 0, 0, h, 0)
}

// rpDBFloor is the bottom of a magnitude axis in dB: the lowest value
// drawn, but no more than 60 dB below the level that 97 % of the points
// stay above, so that a few points plunging towards a zero on the axis
// (-240 dB at the Nyquist frequency of a sampled system with a zero at
// z = -1) or one rounding spike do not decide the range; such points run
// out of the frame. Annotations (margin bars and labels) stay inside.
func rpDBFloor(pn *rpPanel, ymin, ymax float64) float64 {
	var all []float64
	for _, s := range pn.Series {
		for _, v := range s.Y {
			if ok(v) {
				all = append(all, v)
			}
		}
	}
	if len(all) < 20 {
		return ymin
	}
	sort.Float64s(all)
	floor := math.Min(all[len(all)*3/100]-60, ymax-20)
	for _, t := range pn.Texts {
		if ok(t.Y) {
			floor = math.Min(floor, t.Y-10)
		}
	}
	for _, s := range pn.Series {
		if s.Width >= 2.5 { // the margin bars
			for _, v := range s.Y {
				floor = math.Min(floor, v-10)
			}
		}
	}
	return math.Max(ymin, floor)
}

// rpSimplify drops the points that lie within a quarter pixel of the
// chord between kept neighbours (Ramer 1972, "An iterative procedure for
// the polygonal approximation of plane curves", Computer Graphics and
// Image Processing 1; Douglas & Peucker 1973, Cartographica 10(2)), with
// distances measured on a 1000 x 600 pixel frame spanning xspan (0: the
// curve's x range) and the panel's y range (yspan). The first and last
// points stay.
func rpSimplify(x, y []float64, xspan, yspan float64, logX bool) ([]float64, []float64) {
	n := len(x)
	if n < 3 {
		return x, y
	}
	tx := func(v float64) float64 {
		if logX {
			return math.Log10(v)
		}
		return v
	}
	if xspan == 0 {
		lo, hi := math.Inf(1), math.Inf(-1)
		for _, v := range x {
			lo, hi = math.Min(lo, tx(v)), math.Max(hi, tx(v))
		}
		xspan = hi - lo
	}
	if !(xspan > 0) || !(yspan > 0) || math.IsInf(xspan, 0) || math.IsInf(yspan, 0) {
		return x, y
	}
	px := make([]float64, n)
	py := make([]float64, n)
	for k := range x {
		px[k] = tx(x[k]) / xspan * rpPixels
		py[k] = y[k] / yspan * 600
	}
	const tol = 0.25
	keep := make([]bool, n)
	keep[0], keep[n-1] = true, true
	stack := [][2]int{{0, n - 1}}
	for len(stack) > 0 {
		a, b := stack[len(stack)-1][0], stack[len(stack)-1][1]
		stack = stack[:len(stack)-1]
		if b-a < 2 {
			continue
		}
		dx, dy := px[b]-px[a], py[b]-py[a]
		L := math.Hypot(dx, dy)
		far, at := -1.0, -1
		for k := a + 1; k < b; k++ {
			var d float64
			if L == 0 {
				d = math.Hypot(px[k]-px[a], py[k]-py[a])
			} else {
				d = math.Abs(dx*(py[k]-py[a])-dy*(px[k]-px[a])) / L
			}
			if d > far {
				far, at = d, k
			}
		}
		if far > tol {
			keep[at] = true
			stack = append(stack, [2]int{a, at}, [2]int{at, b})
		}
	}
	var xs, ys []float64
	for k := range x {
		if keep[k] {
			xs, ys = append(xs, x[k]), append(ys, y[k])
		}
	}
	return xs, ys
}

// rpSmallText is the size of tick labels, legends and annotations: 9 pt
// is 12 CSS px, so at 100 % zoom no text of a chart is below 11 px (a
// chart is never wider than rpMaxWidth, so a notebook does not shrink it).
const rpSmallText = vg.Length(9)

// rpMaxWidth fits a 980 px notebook column (964 px at 96 dpi).
const rpMaxWidth = 25.5 * vg.Centimeter

// size chooses the figure size: 16 x 10 cm for one panel; otherwise at
// least 16 cm wide (a column of panels uses the width instead of being a
// thin strip), 9 cm per column up to rpMaxWidth, and 6.5 cm per row (7 cm
// when the rows are full width).
func (f *rpFigure) size() (vg.Length, vg.Length) {
	if f.W > 0 && f.H > 0 {
		return f.W, f.H
	}
	if f.Rows == 1 && f.Cols == 1 {
		return 16 * vg.Centimeter, 10 * vg.Centimeter
	}
	w := max(vg.Length(f.Cols)*9*vg.Centimeter, 16*vg.Centimeter)
	w = min(w, rpMaxWidth)
	row := 6.5 * vg.Centimeter
	if f.Cols == 1 {
		row = 7 * vg.Centimeter
	}
	return w, vg.Length(f.Rows) * row
}

// SVG renders the figure as SVG bytes (fonts referenced, not embedded).
func (f *rpFigure) SVG() []byte {
	w, h := f.size()
	c := vgsvg.New(w, h)
	f.draw(c)
	var buf bytes.Buffer
	if _, err := c.WriteTo(&buf); err != nil {
		return nil
	}
	return buf.Bytes()
}

// PNG renders the figure as PNG bytes at 96 dpi.
func (f *rpFigure) PNG() []byte {
	w, h := f.size()
	c := vgimg.NewWith(vgimg.UseWH(w, h), vgimg.UseDPI(96))
	f.draw(c)
	var buf bytes.Buffer
	if _, err := (vgimg.PngCanvas{Canvas: c}).WriteTo(&buf); err != nil {
		return nil
	}
	return buf.Bytes()
}

// rpBundle makes a bundle with the text, the SVG chart and, on request,
// the PNG (base64, as Jupyter expects).
func rpBundle(text string, f *rpFigure, opt Options) (b Bundle) {
	b = NewBundle(text)
	if f == nil || len(f.Panels) == 0 {
		return b
	}
	defer func() {
		// gonum/plot may panic on degenerate data; the text still shows.
		if r := recover(); r != nil {
			delete(b.Data, SVG)
			delete(b.Data, PNG)
			b.Data[Text] = text + "\n(chart not drawn: the data could not be plotted)"
		}
	}()
	applyChart(f, opt.chart)
	b.Data[SVG] = string(f.SVG())
	if opt.PNG {
		b.Data[PNG] = base64.StdEncoding.EncodeToString(f.PNG())
	}
	return b
}
