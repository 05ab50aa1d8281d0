package display

// Displays of a locus: how the modes of a family of systems move as one
// parameter varies. Text and HTML give where each mode starts and ends and
// where it crosses the stability boundary; the chart draws each branch in
// the complex plane over the damping and natural-frequency grid of the
// pole-zero map, from a cross at the first parameter value to a square at
// the last, with arrowheads for the direction and the parameter value at a
// few points.

import (
	"fmt"
	"math"
	"math/cmplx"
	"strings"

	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"

	"lsys/lsys"
)

func init() {
	Register((*lsys.Locus)(nil), renderLocus)
}

// lcFreq is the natural frequency (rad/s) and damping ratio of an
// eigenvalue; a sampled one is mapped back by s = ln(z)/T (common
// practice). ok is false where they are undefined (z = 0).
func lcFreq(l complex128, ts float64) (wn, zeta float64, ok bool) {
	if ts > 0 {
		if l == 0 {
			return 0, 0, false
		}
		l = cmplx.Log(l) / complex(ts, 0)
	}
	wn = cmplx.Abs(l)
	if wn == 0 {
		return 0, math.NaN(), true
	}
	return wn, -real(l) / wn, true
}

// lcStable tells whether an eigenvalue is strictly inside the stability
// region (open left half-plane, or open unit disc when sampled).
func lcStable(l complex128, ts float64) bool {
	if ts > 0 {
		return cmplx.Abs(l) < 1
	}
	return real(l) < 0
}

// lcMargin is the signed distance to the stability boundary (negative
// inside): Re(l), or |l| - 1 when sampled.
func lcMargin(l complex128, ts float64) float64 {
	if ts > 0 {
		return cmplx.Abs(l) - 1
	}
	return real(l)
}

// lcCrossing is a parameter value where a branch crosses the stability
// boundary, linearly interpolated between the two neighbouring values.
type lcCrossing struct {
	Mode     int
	At       float64
	Unstable bool // true: the mode becomes unstable as the parameter runs on
}

func lcCrossings(l *lsys.Locus) []lcCrossing {
	var out []lcCrossing
	for i, br := range l.Branches {
		// points within rounding of the boundary (a pole computed at 0)
		// are on it, on neither side: a crossing is a change from one
		// side to the other, between the last point off the boundary and
		// the next
		prev := -1
		for k := range br {
			a := lcMargin(br[k], l.Ts)
			if math.IsNaN(a) || math.Abs(a) <= 1e-10*math.Max(1, cmplx.Abs(br[k])) {
				continue
			}
			if prev >= 0 {
				b := lcMargin(br[prev], l.Ts)
				if (a < 0) != (b < 0) {
					t := b / (b - a)
					out = append(out, lcCrossing{Mode: i + 1, At: l.Values[prev] + t*(l.Values[k]-l.Values[prev]), Unstable: a > 0})
				}
			}
			prev = k
		}
	}
	return out
}

func lcFreqCell(l complex128, ts float64) (string, string) {
	wn, zeta, ok := lcFreq(l, ts)
	if !ok {
		return "n/a", "n/a"
	}
	return fmtNum(wn), fmtNum(zeta)
}

// lcTable is the start/end table shared by the text and HTML forms.
func lcTable(l *lsys.Locus) (title string, head []string, rows [][]string, notes []string) {
	last := len(l.Values) - 1
	p := l.Parameter
	kind := "continuous time"
	if l.Ts > 0 {
		kind = "sampled every " + fmtNum(l.Ts) + " s"
	}
	// A conjugate pair is one mode, as in the mode table; the branches
	// are eigenvalues, so say both when they differ.
	pairs := 0
	for _, br := range l.Branches {
		if imag(br[0]) < -1e-12*math.Max(1, cmplx.Abs(br[0])) {
			pairs++
		}
	}
	what := fmt.Sprintf("%d %s", len(l.Branches), plural(len(l.Branches), "mode", "modes"))
	if pairs > 0 {
		what = fmt.Sprintf("%d eigenvalues (%d %s at %s = %s: a conjugate pair is one mode)", len(l.Branches), len(l.Branches)-pairs,
			plural(len(l.Branches)-pairs, "mode", "modes"), p, fmtNum(l.Values[0]))
	}
	title = fmt.Sprintf("locus of %s as %s runs from %s to %s (%d values), %s",
		what, p, fmtNum(l.Values[0]), fmtNum(l.Values[last]), len(l.Values), kind)
	a, b := fmtNum(l.Values[0]), fmtNum(l.Values[last])
	head = []string{"branch", "at " + p + " = " + a, "at " + p + " = " + b,
		"ωn (rad/s) at " + a, "ωn (rad/s) at " + b, "ζ at " + a, "ζ at " + b}
	for i, br := range l.Branches {
		w0, z0 := lcFreqCell(br[0], l.Ts)
		w1, z1 := lcFreqCell(br[last], l.Ts)
		rows = append(rows, []string{fmt.Sprint(i + 1), lcComplex(br[0]), lcComplex(br[last]), w0, w1, z0, z1})
	}
	for _, c := range lcCrossings(l) {
		verb := "becomes unstable"
		if !c.Unstable {
			verb = "becomes stable"
		}
		notes = append(notes, fmt.Sprintf("branch %d %s near %s = %s (interpolated between neighbouring values)", c.Mode, verb, p, fmtNum(c.At)))
	}
	if len(notes) == 0 {
		st := 0
		for _, br := range l.Branches {
			if lcStable(br[0], l.Ts) {
				st++
			}
		}
		switch {
		case st == len(l.Branches):
			notes = append(notes, "every mode is stable at the first value and none crosses the stability boundary at the values computed")
		case st == 0:
			notes = append(notes, "no mode is stable at the first value and none crosses the stability boundary at the values computed")
		default:
			notes = append(notes, "no mode crosses the stability boundary at the values computed")
		}
	}
	notes = append(notes, "each branch is one eigenvalue, followed by matching eigenvalues between neighbouring values (not by sorting)")
	return title, head, rows, notes
}

func renderLocus(v any, opt Options) Bundle {
	l := v.(*lsys.Locus)
	if len(l.Values) == 0 || len(l.Branches) == 0 {
		return NewBundle("empty locus")
	}
	title, head, rows, notes := lcTable(l)
	text := textTable(title, head, rows) + "\n" + strings.Join(notes, "\n")
	b := rpBundle(text, lcFigure(l), opt)
	b.Data[HTML] = htmlTableCard("lsys-locus", title, head, rows, 2, strings.Join(notes, "; ")+".")
	var branches [][][2]float64
	for _, br := range l.Branches {
		branches = append(branches, rpComplexJSON(br))
	}
	vals := make([]any, len(l.Values))
	for i, x := range l.Values {
		vals[i] = jsonNum(x)
	}
	b.Data[JSON] = map[string]any{"parameter": l.Parameter, "values": vals, "branches": branches, "sampled": l.Ts > 0, "sample_time": l.Ts}
	return b
}

// lcThin drops points closer than tol to the last kept one (keeping the
// ends), so a branch of 100,000 values stays a small chart; the drawn path
// differs from the full one by less than tol.
func lcThin(br []complex128, tol float64) (x, y []float64) {
	var last complex128
	for k, z := range br {
		if cmplx.IsNaN(z) || cmplx.IsInf(z) {
			continue
		}
		if len(x) > 0 && k < len(br)-1 && cmplx.Abs(z-last) < tol {
			continue
		}
		x, y = append(x, real(z)), append(y, imag(z))
		last = z
	}
	return x, y
}

// lcFigure draws the branches over the damping and frequency grid.
func lcFigure(l *lsys.Locus) *rpFigure {
	p := l.Parameter
	last := len(l.Values) - 1
	pn := newPanel("locus over "+p, "real part", "imaginary part")
	if l.Ts > 0 {
		pn.Title = "locus over " + p + " (z-plane)"
	} else {
		pn.XLabel, pn.YLabel = "real part (1/s)", "imaginary part (rad/s)"
	}
	pn.Equal = true
	pn.LinTicks = true
	pn.Legend = true
	pn.LegendBelow = true // like the other charts: clear of the branches and of each other
	// extent of the branches
	xmin, xmax, ymin, ymax := 0.0, 0.0, 0.0, 0.0
	R := 0.0
	for _, br := range l.Branches {
		for _, z := range br {
			if cmplx.IsNaN(z) || cmplx.IsInf(z) {
				continue
			}
			xmin, xmax = math.Min(xmin, real(z)), math.Max(xmax, real(z))
			ymin, ymax = math.Min(ymin, imag(z)), math.Max(ymax, imag(z))
			R = math.Max(R, cmplx.Abs(z))
		}
	}
	if R == 0 {
		R = 1
	}
	span := math.Max(math.Max(xmax-xmin, ymax-ymin), 1e-3*R)
	if l.Ts > 0 {
		span = math.Max(span, 2)
	}
	view := lcViewWidth(xmin, xmax, ymin, ymax, R, l.Ts)
	var texts []rpText
	pn.Series, texts = lcGrid(R, l.Ts)
	// branches, thinned to 1/2000 of the extent
	for i, br := range l.Branches {
		x, y := lcThin(br, span/2000)
		pn.Series = append(pn.Series, rpSeries{Name: fmt.Sprintf("branch %d", i+1), X: x, Y: y, Style: i})
	}
	// direction: an arrowhead in the branch's colour 40 % of the way along
	// each branch (by arc length), pointing the way the parameter runs
	h := view / 60
	for i, br := range l.Branches {
		if k, dir, ok := lcMidway(br); ok {
			tip := br[k]
			back := -dir * complex(h, 0)
			left := tip + back*cmplx.Exp(complex(0, 0.45))
			right := tip + back*cmplx.Exp(complex(0, -0.45))
			pn.Series = append(pn.Series, rpSeries{X: []float64{real(left), real(tip), real(right)}, Y: []float64{imag(left), imag(tip), imag(right)},
				Style: i, Width: 1.5, Color: styleColor(i)})
		}
	}
	// parameter values at a few points between the ends (the legend
	// gives the ends), in the upper half-plane only (the lower half
	// mirrors it), and never two labels on top of each other: a label
	// takes about 1/90 of the chart's width per character and 1/20 of
	// its height (9 pt text on a 16 x 10 cm chart)
	type box struct{ x, y, w float64 }
	var boxes []box
	overlaps := func(nb box) bool {
		for _, o := range boxes {
			left, right := o, nb
			if nb.x < o.x {
				left, right = nb, o
			}
			if right.x-left.x < left.w && math.Abs(nb.y-o.y) < view/1.6/20 {
				return true
			}
		}
		return false
	}
	// damping-ratio labels that would cover one another move inward
	// along their ray, or are left out (the ray stays)
	var grid []rpText
	for _, t := range texts {
		var zeta float64
		if _, err := fmt.Sscanf(t.Text, "ζ %g", &zeta); err != nil {
			grid = append(grid, t)
			continue
		}
		for _, f := range []float64{1, 0.8, 0.62} {
			nb := box{t.X * f, t.Y * f, view / 90 * float64(len([]rune(t.Text))+1)}
			if !overlaps(nb) {
				boxes = append(boxes, nb)
				grid = append(grid, rpText{X: nb.x, Y: nb.y, Text: t.Text})
				break
			}
		}
	}
	texts = grid
	var lx, ly []float64
	for _, k := range lcLabelIndices(len(l.Values)) {
		for _, br := range l.Branches {
			z := br[k]
			if imag(z) < 0 || cmplx.IsNaN(z) || cmplx.IsInf(z) {
				continue
			}
			txt := p + " = " + fmtNum(l.Values[k])
			nb := box{real(z), imag(z), view / 90 * float64(len([]rune(txt))+1)}
			free := cmplx.Abs(z-br[0]) > view/50 && cmplx.Abs(z-br[last]) > view/50
			if !free || overlaps(nb) {
				continue
			}
			boxes = append(boxes, nb)
			lx, ly = append(lx, real(z)), append(ly, imag(z))
			texts = append(texts, rpText{X: real(z), Y: imag(z), Text: txt})
		}
	}
	if len(lx) > 0 {
		pn.Series = append(pn.Series, rpSeries{X: lx, Y: ly, Style: -1, Points: true, Shape: draw.CircleGlyph{}, Radius: 1.8})
	}
	starts := make([]complex128, len(l.Branches))
	ends := make([]complex128, len(l.Branches))
	for i, br := range l.Branches {
		starts[i], ends[i] = br[0], br[last]
	}
	st := rpMark("start, "+p+" = "+fmtNum(l.Values[0]), starts, -1, draw.CrossGlyph{}, 4.5)
	en := rpMark("end, "+p+" = "+fmtNum(l.Values[last]), ends, -1, draw.BoxGlyph{}, 3)
	pn.Series = append(pn.Series, st, en)
	pn.Texts = texts
	// equal scales for the data area's real shape, the figure's height
	// following the branches' shape (between a square and a wide data
	// area) so little of the frame is empty
	fig := &rpFigure{Rows: 1, Cols: 1, Panels: []*rpPanel{pn}, W: 16 * cmLen, H: 10 * cmLen}
	if w, h := xmax-xmin, ymax-ymin; w > 0 && h > 0 {
		want := math.Min(math.Max(w/h, 0.75), 2.2)
		if dw, dh := fig.dataSize(0); dw > 0 && dh > 0 {
			fig.H = min(max(fig.H-dh+dw/vg.Length(want), 8*cmLen), 17*cmLen)
		}
	}
	pn.Ratio = fig.dataRatio(0)
	return fig
}

// lcViewWidth estimates the width of the chart in data units, as the
// equal-axis chart will frame the branches and the grid.
func lcViewWidth(xmin, xmax, ymin, ymax, R, ts float64) float64 {
	if ts > 0 {
		xmin, xmax = math.Min(xmin, -1), math.Max(xmax, 1)
		ymin, ymax = math.Min(ymin, -1), math.Max(ymax, 1)
	} else {
		xmin, xmax = math.Min(xmin, -1.15*R), math.Max(xmax, 0)
		ymin, ymax = math.Min(ymin, -1.15*R), math.Max(ymax, 1.15*R)
	}
	return 1.1 * math.Max(xmax-xmin, 1.6*(ymax-ymin))
}

// lcMidway finds the point 40 % of the way along a branch by arc length and the
// unit direction of travel there. ok is false for a branch that does not
// move.
func lcMidway(br []complex128) (int, complex128, bool) {
	total := 0.0
	for k := 1; k < len(br); k++ {
		total += cmplx.Abs(br[k] - br[k-1])
	}
	if !(total > 0) || math.IsInf(total, 0) {
		return 0, 0, false
	}
	acc := 0.0
	for k := 1; k < len(br); k++ {
		d := cmplx.Abs(br[k] - br[k-1])
		acc += d
		if acc >= 0.4*total && d > 0 {
			return k, (br[k] - br[k-1]) / complex(d, 0), true
		}
	}
	return 0, 0, false
}

// lcLabelIndices picks up to three parameter values to label, at a
// quarter, half and three quarters of the sweep (by index).
func lcLabelIndices(n int) []int {
	var out []int
	for _, f := range []int{1, 2, 3} {
		k := f * (n - 1) / 4
		if k > 0 && k < n-1 && (len(out) == 0 || out[len(out)-1] != k) {
			out = append(out, k)
		}
	}
	return out
}

// lcGrid is the locus chart's grid (splaneGrid), with the imaginary axis,
// the stability boundary, drawn as a grey line in continuous time.
func lcGrid(R, ts float64) ([]rpSeries, []rpText) {
	if ts > 0 {
		return splaneGrid(ts, R, gridLabelBelowAxis)
	}
	R *= 1.15
	ss, texts := splaneGrid(0, R, gridLabelBelowAxis)
	ss = append(ss, rpSeries{X: []float64{0, 0}, Y: []float64{-R, R}, Style: -1, Width: 0.8, Color: rpGrey})
	return ss, texts
}
