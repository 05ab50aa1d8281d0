package display

import (
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
