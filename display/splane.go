package display

import (
	"fmt"
	"math"
	"math/cmplx"
)

// The grid of a chart in the complex plane of poles (pole-zero maps, loci):
// lines of constant damping ratio and circles of constant natural
// frequency (continuous time), or the unit circle with the same curves
// mapped through z = exp(sT) (sampled). One helper so that every such
// chart draws the same grid.

// gridLabelPlace says where the label of a natural-frequency circle goes.
type gridLabelPlace int

const (
	// gridLabelOnAxis puts the label of the circle wn at (-wn, 0).
	gridLabelOnAxis gridLabelPlace = iota
	// gridLabelBelowAxis puts it 0.35 rad below the negative real axis,
	// where branches on the axis and labels in the upper half-plane
	// leave room.
	gridLabelBelowAxis
)

// gridDampings are the damping ratios drawn.
var gridDampings = []float64{0.2, 0.4, 0.6, 0.8}

// splaneGrid returns the grid's curves and labels. For continuous time
// (ts == 0) R is the extent of the chart (rays run from the origin to
// radius R, circles at a rounded step up to R); the stability boundary
// (the imaginary axis) is left to the caller, who draws it in its own way.
// For sampled time (ts > 0) R is not used: the unit circle is drawn, the
// damping curves run up to the Nyquist frequency pi/T and the frequency
// curves are at 0.2 ... 0.8 pi/T, as the z = exp(sT) image of the
// continuous grid.
func splaneGrid(ts, R float64, place gridLabelPlace) ([]rpSeries, []rpText) {
	var ss []rpSeries
	var texts []rpText
	col := rpGrid
	if ts > 0 {
		var ux, uy []float64
		for k := 0; k <= 360; k++ {
			a := float64(k) * math.Pi / 180
			ux, uy = append(ux, math.Cos(a)), append(uy, math.Sin(a))
		}
		ss = append(ss, rpSeries{X: ux, Y: uy, Style: -1, Width: 1, Color: rpGrey})
		for _, zeta := range gridDampings {
			wd := math.Sqrt(1 - zeta*zeta)
			for _, sgn := range []float64{1, -1} {
				var x, y []float64
				for k := 0; k <= 100; k++ {
					wn := float64(k) / 100 * math.Pi / (ts * wd)
					z := cmplx.Exp(complex(-zeta*wn*ts, sgn*wd*wn*ts))
					x, y = append(x, real(z)), append(y, imag(z))
				}
				ss = append(ss, rpSeries{X: x, Y: y, Style: -1, Width: 0.6, Color: col})
				if sgn > 0 {
					texts = append(texts, rpText{X: x[50], Y: y[50], Text: "ζ " + fmtNum(zeta)})
				}
			}
		}
		for _, frac := range []float64{0.2, 0.4, 0.6, 0.8} {
			wn := frac * math.Pi / ts
			var x, y []float64
			for k := 0; k <= 60; k++ {
				zeta := float64(k) / 60
				wd := math.Sqrt(1 - zeta*zeta)
				z := cmplx.Exp(complex(-zeta*wn*ts, wd*wn*ts))
				x, y = append(x, real(z)), append(y, imag(z))
			}
			ss = append(ss, rpSeries{X: x, Y: y, Style: -1, Width: 0.6, Color: col})
			texts = append(texts, rpText{X: x[0], Y: y[0], Text: fmtNum(frac) + "π/T"})
		}
		return ss, texts
	}
	for _, zeta := range gridDampings {
		wd := math.Sqrt(1 - zeta*zeta)
		ss = append(ss,
			rpSeries{X: []float64{0, -zeta * R}, Y: []float64{0, wd * R}, Style: -1, Width: 0.6, Color: col},
			rpSeries{X: []float64{-zeta * R, 0}, Y: []float64{-wd * R, 0}, Style: -1, Width: 0.6, Color: col})
		texts = append(texts, rpText{X: -zeta * R * 0.95, Y: wd * R * 0.95, Text: "ζ " + fmtNum(zeta)})
	}
	step := niceStep(R / 4)
	for wn := step; wn <= R*1.0001; wn += step {
		var x, y []float64
		for k := 0; k <= 60; k++ {
			a := math.Pi/2 + float64(k)/60*math.Pi
			x, y = append(x, wn*math.Cos(a)), append(y, wn*math.Sin(a))
		}
		ss = append(ss, rpSeries{X: x, Y: y, Style: -1, Width: 0.6, Color: col})
		switch place {
		case gridLabelBelowAxis:
			texts = append(texts, rpText{X: -wn * math.Cos(0.35), Y: -wn * math.Sin(0.35), Text: fmtNum(wn)})
		default:
			texts = append(texts, rpText{X: -wn, Y: 0, Text: fmtNum(wn)})
		}
	}
	return ss, texts
}

// gridRayLabelsIn moves the labels of the continuous grid's damping rays
// (texts "ζ ...") to 80 % of the part of their ray inside the frame
// x0..x1, y0..y1 (which holds the origin), so a frame fitted to the
// points still names the rays it shows; a label that would sit within
// 12 % of the width and 7 % of the height of one already placed is
// dropped rather than drawn over it. A circle's label left of the frame
// moves to where the circle crosses its left edge.
func gridRayLabelsIn(texts []rpText, x0, x1, y0, y1 float64) []rpText {
	var out, placed []rpText
	for _, t := range texts {
		var zeta float64
		if _, err := fmt.Sscanf(t.Text, "ζ %g", &zeta); err != nil || !(zeta > 0 && zeta < 1) {
			// a circle's label at (-wn, 0) left of the frame goes where
			// the circle enters it on the left edge, if it does
			if wn := -t.X; t.Y == 0 && wn > 0 && -wn < x0 {
				if y := math.Sqrt(wn*wn - x0*x0); y < y1 {
					out = append(out, rpText{X: x0, Y: y, Text: t.Text})
				}
				continue
			}
			out = append(out, t)
			continue
		}
		dx, dy := -zeta, math.Sqrt(1-zeta*zeta)
		s := math.Min(x0/dx, y1/dy)
		if !(s > 0) || math.IsInf(s, 0) {
			continue
		}
		n := rpText{X: 0.8 * s * dx, Y: 0.8 * s * dy, Text: t.Text}
		free := true
		for _, o := range placed {
			if math.Abs(o.X-n.X) < 0.12*(x1-x0) && math.Abs(o.Y-n.Y) < 0.07*(y1-y0) {
				free = false
			}
		}
		if free {
			placed = append(placed, n)
			out = append(out, n)
		}
	}
	return out
}
