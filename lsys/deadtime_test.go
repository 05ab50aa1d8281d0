package lsys

import (
	"context"
	"math"
	"math/cmplx"
	"strings"
	"testing"

	"gonum.org/v1/gonum/mat"
)

// L(s) = k e^(-sT)/s: |L| = 1 at w = k; phase -90 - wT deg, so
// PM = 90 - kT (deg), the phase crossover at w = pi/(2T) with GM = pi/(2kT),
// the delay margin pi/(2k) - T, and the closed loop stable iff kT < pi/2
// (closed forms, derived by hand; the classic integrator-with-delay loop).
func TestMarginsExactDelay(t *testing.T) {
	for _, tc := range []struct{ k, T float64 }{{2, 0.1}, {10, 0.05}, {1, 1}, {3, 0.6}} {
		L := siso(t, []float64{tc.k}, []float64{0, 1})
		mg, err := LoopMargins(context.Background(), L, FrequencyOptions{Delay: tc.T})
		if err != nil {
			t.Fatal(err)
		}
		const tol = 1e-9 // bisection to 60 halvings of a log interval
		if math.Abs(mg.GainCrossover-tc.k) > tol*tc.k {
			t.Errorf("k %g T %g: gain crossover %g", tc.k, tc.T, mg.GainCrossover)
		}
		pm := 90 - tc.k*tc.T*180/math.Pi
		if math.Abs(mg.PhaseMargin-pm) > 1e-7 {
			t.Errorf("k %g T %g: PM %g want %g", tc.k, tc.T, mg.PhaseMargin, pm)
		}
		wpc := math.Pi / (2 * tc.T)
		if math.Abs(mg.PhaseCrossover-wpc) > tol*wpc {
			t.Errorf("k %g T %g: phase crossover %g want %g", tc.k, tc.T, mg.PhaseCrossover, wpc)
		}
		if gm := wpc / tc.k; math.Abs(mg.GainMargin-gm) > 1e-8*gm {
			t.Errorf("k %g T %g: GM %g want %g", tc.k, tc.T, mg.GainMargin, gm)
		}
		stable := tc.k*tc.T < math.Pi/2
		if !mg.ClosedChecked || mg.ClosedStable != stable {
			t.Errorf("k %g T %g: closed stable %v (checked %v), want %v; notes %q", tc.k, tc.T, mg.ClosedStable, mg.ClosedChecked, stable, mg.Notes)
		}
		if stable {
			if dm := math.Pi/(2*tc.k) - tc.T; math.Abs(mg.DelayMargin-dm) > 1e-9 {
				t.Errorf("k %g T %g: delay margin %g want %g", tc.k, tc.T, mg.DelayMargin, dm)
			}
		}
		if !strings.Contains(strings.Join(mg.Notes, "\n"), "Padé") {
			t.Errorf("no note on the Padé model used for stability: %q", mg.Notes)
		}
		// several phase crossovers, at w T = pi/2 + 2 pi j
		if len(mg.PhaseCrossovers) < 2 || math.Abs(mg.PhaseCrossovers[1]*tc.T-2.5*math.Pi) > 1e-8 {
			t.Errorf("k %g T %g: phase crossovers %v", tc.k, tc.T, mg.PhaseCrossovers)
		}
	}
}

// The frequency response with a delay is G(jw) e^(-jwT) at every point, and
// its unwrapped phase follows -wT past many turns.
func TestFrequencyExactDelay(t *testing.T) {
	G := siso(t, []float64{4}, []float64{4, 1.2, 1})
	T := 0.3
	f, err := Frequency(context.Background(), G, FrequencyOptions{Delay: T})
	if err != nil {
		t.Fatal(err)
	}
	g0, err := Frequency(context.Background(), G, FrequencyOptions{Grid: f.W})
	if err != nil {
		t.Fatal(err)
	}
	ph, ph0 := f.Phase(0, 0), g0.Phase(0, 0)
	for k, w := range f.W {
		want := g0.G[k][0] * cmplx.Exp(complex(0, -w*T))
		if cmplx.Abs(f.G[k][0]-want) > 1e-15*cmplx.Abs(want) {
			t.Fatalf("at %g: %v want %v", w, f.G[k][0], want)
		}
		if d := ph[k] - ph0[k] + w*T*180/math.Pi; math.Abs(d) > 1e-9 {
			t.Fatalf("unwrapped phase at %g off by %g deg", w, d)
		}
	}
	if top := f.W[len(f.W)-1] * T; top > delayTop*(1+1e-12) {
		t.Errorf("range runs to wT = %g", top)
	}
	if _, err := Frequency(context.Background(), G, FrequencyOptions{Delay: -1}); err == nil {
		t.Error("negative delay accepted")
	}
}

// A sampled loop with a dead time of whole sample periods: the verdict
// uses z^-k exactly, and agrees with the loop written with 1/z^k. L =
// 0.5/(z - 1) with T = k Ts: characteristic z^k (z - 1) + 0.5, stable for
// k = 1 (roots of z^2 - z + 0.5: |z| = 0.707) and unstable for k = 3
// (z^4 - z^3 + 0.5 has a pair of roots of modulus 1.024, by numpy.roots).
func TestMarginsSampledDeadTime(t *testing.T) {
	A := mat.NewDense(1, 1, []float64{1})
	L, err := NewSystem(1, 1, 1, A, mat.NewDense(1, 1, []float64{1}), mat.NewDense(1, 1, []float64{0.5}), mat.NewDense(1, 1, nil), 0.1)
	if err != nil {
		t.Fatal(err)
	}
	for _, tc := range []struct {
		T      float64
		stable bool
	}{{0.1, true}, {0.3, false}} {
		mg, err := LoopMargins(context.Background(), L, FrequencyOptions{Delay: tc.T})
		if err != nil {
			t.Fatal(err)
		}
		if !mg.ClosedChecked || mg.ClosedStable != tc.stable {
			t.Errorf("T %g: checked %v stable %v, want %v; notes %q", tc.T, mg.ClosedChecked, mg.ClosedStable, tc.stable, mg.Notes)
		}
	}
	mg, err := LoopMargins(context.Background(), L, FrequencyOptions{Delay: 0.05})
	if err != nil {
		t.Fatal(err)
	}
	if mg.ClosedChecked || !strings.Contains(strings.Join(mg.Notes, " "), "not a whole number of sample periods") {
		t.Errorf("fractional delay: checked %v notes %q", mg.ClosedChecked, mg.Notes)
	}
}
