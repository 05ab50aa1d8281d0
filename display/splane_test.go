package display

import (
	"math"
	"math/cmplx"
	"testing"
)

// The grid is where the closed forms put it. Continuous: a pole
// s = wn(-zeta + j sqrt(1 - zeta^2)) has damping ratio zeta = -Re(s)/|s|,
// so the ray of constant zeta makes that ratio at every point; a circle of
// radius wn holds the poles of natural frequency wn (common practice).
// Sampled: the same curves mapped through z = exp(sT) (Franklin, Powell &
// Workman, Digital Control of Dynamic Systems, 3rd ed. 1998, section on
// the z-plane grid; from memory), so s = log(z)/T recovers zeta and wn.
func TestSplaneGrid(t *testing.T) {
	ss, texts := splaneGrid(0, 10, gridLabelOnAxis)
	// four damping ratios, two rays each; circles every niceStep(2.5) = 5
	// (the first of 1, 2, 5 x 10^k at or above R/4) up to 10: 5 and 10
	if len(ss) != 8+2 {
		t.Fatalf("%d curves, want 10", len(ss))
	}
	for i, zeta := range gridDampings {
		for _, c := range ss[2*i : 2*i+2] {
			for k := range c.X {
				s := complex(c.X[k], c.Y[k])
				if cmplx.Abs(s) == 0 {
					continue
				}
				if got := -real(s) / cmplx.Abs(s); math.Abs(got-zeta) > 1e-12 {
					t.Errorf("ray of zeta %g has a point of damping %g", zeta, got)
				}
			}
		}
	}
	for j, c := range ss[8:] {
		wn := 5 * float64(j+1)
		for k := range c.X {
			if r := math.Hypot(c.X[k], c.Y[k]); math.Abs(r-wn) > 1e-12*wn {
				t.Errorf("circle %g has a point at radius %g", wn, r)
			}
			if c.X[k] > 1e-12 {
				t.Errorf("circle %g reaches into the right half-plane (%g)", wn, c.X[k])
			}
		}
	}
	if l := texts[len(texts)-1]; l.X != -10 || l.Y != 0 || l.Text != "10" {
		t.Errorf("label of the last circle on the axis: %+v", l)
	}
	_, below := splaneGrid(0, 10, gridLabelBelowAxis)
	if l := below[len(below)-1]; l.Y >= 0 || math.Abs(math.Hypot(l.X, l.Y)-10) > 1e-12 {
		t.Errorf("label of the last circle below the axis: %+v", l)
	}

	const T = 0.01
	ss, _ = splaneGrid(T, 0, gridLabelOnAxis)
	for k := range ss[0].X {
		if r := math.Hypot(ss[0].X[k], ss[0].Y[k]); math.Abs(r-1) > 1e-12 {
			t.Fatalf("unit circle point at radius %g", r)
		}
	}
	for i, zeta := range gridDampings {
		for _, c := range ss[1+2*i : 3+2*i] {
			for k := 1; k < len(c.X); k++ {
				s := cmplx.Log(complex(c.X[k], c.Y[k])) / T
				if got := -real(s) / cmplx.Abs(s); math.Abs(got-zeta) > 1e-9 {
					t.Errorf("sampled curve of zeta %g has a point of damping %g", zeta, got)
				}
			}
		}
	}
	for j, c := range ss[9:] {
		wn := 0.2 * float64(j+1) * math.Pi / T
		for k := range c.X {
			s := cmplx.Log(complex(c.X[k], c.Y[k])) / T
			if math.Abs(cmplx.Abs(s)-wn) > 1e-9*wn {
				t.Errorf("sampled curve of wn %g has a point of frequency %g", wn, cmplx.Abs(s))
			}
		}
	}
}
