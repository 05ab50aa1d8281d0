package lsys

import (
	"context"
	"math"
	"math/cmplx"
	"strings"
	"testing"

	"gonum.org/v1/gonum/mat"
)

// L = wn^2/(s (s + 2 z wn)): T is the standard second-order system, whose
// peak is 1/(2 z sqrt(1 - z^2)) at wn sqrt(1 - 2 z^2) (Ogata, Modern
// Control Engineering, 5th ed., 2010, Section 7-2). The peak of |S| and
// the modulus margin are held to a brute-force maximum of |1/(1 + L)| on a
// dense grid (200,000 points per decade: the maximum is flat, so the grid
// value is within 1e-9 relative of it). S + T = 1, PS = P S, CS = C S at
// every point (identities).
func TestLoopShapesSecondOrder(t *testing.T) {
	for _, tc := range []struct{ wn, z, kc, delay float64 }{{2, 0.3, 1, 0}, {10, 0.5, 1, 0}, {3, 0.2, 2, 0}, {2, 0.4, 1, 0.05}} {
		// the loop split as P = wn^2/(s (s + 2 z wn))/kc, C = kc
		P := siso(t, []float64{tc.wn * tc.wn / tc.kc}, []float64{0, 2 * tc.z * tc.wn, 1})
		C := siso(t, []float64{tc.kc}, []float64{1})
		ls, err := LoopShapes(context.Background(), P, C, FrequencyOptions{Delay: tc.delay})
		if err != nil {
			t.Fatal(err)
		}
		if !ls.ClosedChecked || !ls.ClosedStable {
			t.Fatalf("closed loop not judged stable: %v", ls.Notes)
		}
		if tc.delay == 0 {
			mr := 1 / (2 * tc.z * math.Sqrt(1-tc.z*tc.z))
			wr := tc.wn * math.Sqrt(1-2*tc.z*tc.z)
			if math.Abs(ls.Peak[1]-mr) > 1e-12*mr || math.Abs(ls.PeakW[1]-wr) > 1e-5*wr {
				t.Errorf("T peak %g at %g, want %g at %g", ls.Peak[1], ls.PeakW[1], mr, wr)
			}
		}
		lAt := func(w float64) complex128 {
			s := complex(0, w)
			return complex(tc.wn*tc.wn, 0) / (s * (s + complex(2*tc.z*tc.wn, 0))) * cmplx.Exp(-s*complex(tc.delay, 0))
		}
		best := 0.0
		for k := 0; k <= 600000; k++ {
			w := tc.wn * math.Pow(10, -1.5+float64(k)/200000)
			best = math.Max(best, 1/cmplx.Abs(1+lAt(w)))
		}
		if math.Abs(ls.Peak[0]-best) > 1e-9*best || math.Abs(ls.ModulusMargin-1/best) > 1e-9/best {
			t.Errorf("%+v: S peak %.12g, brute force %.12g", tc, ls.Peak[0], best)
		}
		for k, w := range ls.Frequency.W {
			l := lAt(w)
			S, T := ls.Gain[0][k], ls.Gain[1][k]
			if cmplx.Abs(S+T-1) > 1e-12 || cmplx.Abs(S-1/(1+l)) > 1e-12*cmplx.Abs(S) {
				t.Fatalf("at %g: S %v T %v, 1/(1+L) %v", w, S, T, 1/(1+l))
			}
			if cmplx.Abs(ls.Gain[3][k]-complex(tc.kc, 0)*S) > 1e-12*cmplx.Abs(S)*tc.kc {
				t.Fatalf("CS != C S at %g", w)
			}
			if p := l / complex(tc.kc, 0); cmplx.Abs(ls.Gain[2][k]-p*S) > 1e-12*cmplx.Abs(p*S) {
				t.Fatalf("PS != P S at %g", w)
			}
		}
	}
	// an unstable loop is said so: 1 + 0.5/(s - 1) = 0 at s = 0.5
	P := siso(t, []float64{10}, []float64{-1, 1})
	C := siso(t, []float64{0.05}, []float64{1})
	ls, err := LoopShapes(context.Background(), P, C, FrequencyOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if !ls.ClosedChecked || ls.ClosedStable || len(ls.Notes) == 0 {
		t.Errorf("unstable loop: checked %v stable %v notes %q", ls.ClosedChecked, ls.ClosedStable, ls.Notes)
	}
}

// A speed loop around an axis whose angle the loop does not see: the
// closed loop keeps the angle's pole at 0 (marginally stable, as margins
// says), not "unstable".
func TestLoopShapesMarginal(t *testing.T) {
	P, err := FromMatrices(mat.NewDense(2, 2, []float64{0, 1, 0, -1}), mat.NewDense(2, 1, []float64{0, 1}), mat.NewDense(1, 2, []float64{0, 1}), nil, 0)
	if err != nil {
		t.Fatal(err)
	}
	C := siso(t, []float64{2}, []float64{1})
	ls, err := LoopShapes(context.Background(), P, C, FrequencyOptions{})
	if err != nil {
		t.Fatal(err)
	}
	unstable := false
	for _, n := range ls.Notes {
		unstable = unstable || strings.Contains(n, "unstable")
	}
	if !ls.ClosedChecked || ls.ClosedStable || ls.ClosedBoundary != 1 || unstable {
		t.Errorf("checked %v stable %v boundary %d notes %q", ls.ClosedChecked, ls.ClosedStable, ls.ClosedBoundary, ls.Notes)
	}
}
