package lsys

import (
	"context"
	"math"
	"testing"

	"gonum.org/v1/gonum/mat"
)

func sys(t *testing.T, A, B, C, D []float64, n, m, p int, ts float64) *System {
	t.Helper()
	dense := func(r, c int, v []float64) *mat.Dense {
		if v == nil {
			return nil
		}
		return mat.NewDense(r, c, v)
	}
	g, err := NewSystem(n, m, p, dense(n, n, A), dense(n, m, B), dense(p, n, C), dense(p, m, D), ts)
	if err != nil {
		t.Fatal(err)
	}
	return g
}

func closeRel(a, b, tol float64) bool {
	return math.Abs(a-b) <= tol*math.Max(math.Abs(a), math.Abs(b))
}

func TestHankelFirstOrder(t *testing.T) {
	// 1/(s+1): P = Q = 1/2, so the Hankel singular value is 1/2 (closed form).
	g := sys(t, []float64{-1}, []float64{1}, []float64{1}, nil, 1, 1, 1, 0)
	gr, err := GramiansOf(g)
	if err != nil {
		t.Fatal(err)
	}
	if !closeRel(gr.HSV[0], 0.5, 1e-15) {
		t.Fatalf("HSV %v, want 0.5", gr.HSV)
	}
}

func TestH2Closed(t *testing.T) {
	// ||1/(s+1)||_2 = 1/sqrt(2) (closed form: integral of e^{-2t}).
	g := sys(t, []float64{-1}, []float64{1}, []float64{1}, nil, 1, 1, 1, 0)
	n, err := H2Norm(g)
	if err != nil || !closeRel(n.Value, 1/math.Sqrt2, 1e-15) {
		t.Fatalf("H2 %v %v", n.Value, err)
	}
	// Sampled 1/(z - a): impulse response a^(k-1), k >= 1, so the squared
	// norm is 1/(1 - a^2) (closed form, geometric series).
	a := 0.6
	gd := sys(t, []float64{a}, []float64{1}, []float64{1}, nil, 1, 1, 1, 0.1)
	n, err = H2Norm(gd)
	if err != nil || !closeRel(n.Value, 1/math.Sqrt(1-a*a), 1e-15) {
		t.Fatalf("sampled H2 %v %v", n.Value, err)
	}
	// Feedthrough: infinite with a reason.
	gD := sys(t, []float64{-1}, []float64{1}, []float64{1}, []float64{1}, 1, 1, 1, 0)
	n, _ = H2Norm(gD)
	if !math.IsInf(n.Value, 1) || n.Reason == "" {
		t.Fatalf("H2 with D: %v %q", n.Value, n.Reason)
	}
}

func TestHinfLightlyDamped(t *testing.T) {
	// 1/(s^2 + 2 zeta s + 1) peaks at 1/(2 zeta sqrt(1 - zeta^2)) at
	// w = sqrt(1 - 2 zeta^2) (closed form, resonance of a second-order system).
	for _, z := range []float64{0.3, 0.05, 0.001} {
		g := sys(t, []float64{0, 1, -1, -2 * z}, []float64{0, 1}, []float64{1, 0}, nil, 2, 1, 1, 0)
		n, err := HinfNorm(g)
		if err != nil {
			t.Fatal(err)
		}
		want := 1 / (2 * z * math.Sqrt(1-z*z))
		if !closeRel(n.Value, want, 1e-9) || !closeRel(n.Peak, math.Sqrt(1-2*z*z), 1e-4) {
			t.Errorf("zeta %g: %v at %v, want %v at %v (iterations %d, upper %v)", z, n.Value, n.Peak, want, math.Sqrt(1-2*z*z), n.Iterations, n.Upper)
		}
		if !(n.Upper >= want*(1-1e-12)) {
			t.Errorf("zeta %g: upper bound %v below the norm %v", z, n.Upper, want)
		}
	}
	// Sampled 0.5/(z - 0.5): the gain is largest at z = 1, where it is 1.
	gd := sys(t, []float64{0.5}, []float64{1}, []float64{0.5}, nil, 1, 1, 1, 0.01)
	n, err := HinfNorm(gd)
	if err != nil || !closeRel(n.Value, 1, 1e-12) || n.Peak > 1e-6 {
		t.Fatalf("sampled: %v at %v (%v)", n.Value, n.Peak, err)
	}
	// Unstable: infinite with the reason.
	gu := sys(t, []float64{1}, []float64{1}, []float64{1}, nil, 1, 1, 1, 0)
	n, err = HinfNorm(gu)
	if err != nil || !math.IsInf(n.Value, 1) || n.Reason == "" {
		t.Fatalf("unstable: %v %q %v", n.Value, n.Reason, err)
	}
}

func TestReduceBound(t *testing.T) {
	ctx := context.Background()
	for _, n := range []int{4, 12, 30} {
		for _, sampled := range []bool{false, true} {
			A := designStable(n, uint64(100+n), sampled)
			ts := 0.0
			if sampled {
				ts = 0.1
			}
			g, err := NewSystem(n, 2, 2, A, designMat(n, 2, uint64(n)), designMat(2, n, uint64(n+5)), nil, ts)
			if err != nil {
				t.Fatal(err)
			}
			for _, keep := range []bool{false, true} {
				for _, r := range []int{1, n / 2, n - 1} {
					red, err := Reduce(ctx, g, ReduceOptions{Order: r, KeepDC: keep})
					if err != nil {
						t.Fatal(err)
					}
					if red.Error > red.Bound*(1+1e-6)+1e-12 {
						t.Errorf("n=%d sampled=%v keepDC=%v r=%d: error %g above the bound %g", n, sampled, keep, r, red.Error, red.Bound)
					}
					if keep {
						d1, _ := DCGain(g)
						d2, _ := DCGain(red.Reduced)
						var df mat.Dense
						df.Sub(d1, d2)
						if mat.Norm(&df, 2) > 1e-9*mat.Norm(d1, 2) {
							t.Errorf("n=%d r=%d: steady-state gain not kept: %v", n, r, mat.Norm(&df, 2))
						}
					}
				}
			}
		}
	}
}

func TestReduceUnstableKept(t *testing.T) {
	// 1/(s - 1) + 1/(s + 1) + 0.001/(s + 10): the unstable mode stays.
	g := sys(t, []float64{1, 0, 0, 0, -1, 0, 0, 0, -10}, []float64{1, 1, 1}, []float64{1, 1, 0.001}, nil, 3, 1, 1, 0)
	red, err := Reduce(context.Background(), g, ReduceOptions{Order: 2})
	if err != nil {
		t.Fatal(err)
	}
	if red.Unstable != 1 || red.Reduced.N() != 2 || red.Error > red.Bound*(1+1e-9) {
		t.Fatalf("unstable %d, order %d, error %g bound %g", red.Unstable, red.Reduced.N(), red.Error, red.Bound)
	}
	poles, _ := Poles(red.Reduced)
	found := false
	for _, p := range poles {
		if math.Abs(real(p)-1) < 1e-12 {
			found = true
		}
	}
	if !found {
		t.Fatalf("unstable pole lost: %v", poles)
	}
}

func TestBalanced(t *testing.T) {
	A := designStable(8, 3, false)
	g, _ := NewSystem(8, 1, 1, A, designMat(8, 1, 1), designMat(1, 8, 2), nil, 0)
	b, err := BalancedOf(g)
	if err != nil {
		t.Fatal(err)
	}
	if b.Deviation > 1e-10 {
		t.Fatalf("balanced gramians deviate by %g", b.Deviation)
	}
}

// The H-infinity norm against a dense frequency sweep refined around its
// peak (common practice): the sweep never exceeds the certified upper
// bound, and the refined peak agrees with the norm.
func TestHinfAgainstSweep(t *testing.T) {
	for _, c := range []struct {
		n       int
		sampled bool
	}{{6, false}, {15, false}, {6, true}, {15, true}} {
		ts := 0.0
		if c.sampled {
			ts = 0.05
		}
		A := designStable(c.n, uint64(c.n+500), c.sampled)
		g, err := NewSystem(c.n, 2, 3, A, designMat(c.n, 2, 1), designMat(3, c.n, 2), designMat(3, 2, 3), ts)
		if err != nil {
			t.Fatal(err)
		}
		nm, err := HinfNorm(g)
		if err != nil {
			t.Fatal(err)
		}
		gain := func(w float64) float64 {
			v, err := GainAt(g, w)
			if err != nil {
				t.Fatal(err)
			}
			return gainNorm(v, 3, 2)
		}
		hi := 1e3
		if c.sampled {
			hi = math.Pi / ts
		}
		best, at := gain(0), 0.0
		for k := 0; k <= 4000; k++ {
			w := 1e-3 * math.Pow(hi/1e-3, float64(k)/4000)
			if v := gain(w); v > best {
				best, at = v, w
			}
		}
		// Golden-section refinement around the grid peak.
		a, b := at*0.99, math.Min(at*1.01, hi)
		if at == 0 {
			a, b = 0, 1e-3
		}
		for i := 0; i < 80; i++ {
			m1, m2 := b-(b-a)*0.618, a+(b-a)*0.618
			if gain(m1) > gain(m2) {
				b = m2
			} else {
				a = m1
			}
		}
		best = math.Max(best, gain((a+b)/2))
		if best > nm.Upper*(1+1e-12) || math.Abs(best-nm.Value) > 1e-7*nm.Value {
			t.Errorf("n=%d sampled=%v: sweep peak %v, norm %v (upper %v) at %v", c.n, c.sampled, best, nm.Value, nm.Upper, nm.Peak)
		}
	}
}
