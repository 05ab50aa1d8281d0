package lsys

import (
	"math"
	"math/cmplx"
	"testing"
)

func TestPadeCoefficients(t *testing.T) {
	// Published low orders (Franklin, Powell & Emami-Naeini, Feedback
	// Control of Dynamic Systems, Section 5.6 on delay approximations, from
	// memory): order 1: (1 - sT/2)/(1 + sT/2); order 2:
	// (1 - sT/2 + (sT)^2/12)/(1 + sT/2 + (sT)^2/12); order 3 denominator
	// 1 + sT/2 + (sT)^2/10 + (sT)^3/120.
	T := 0.3
	want := map[int][]float64{
		1: {1, T / 2},
		2: {1, T / 2, T * T / 12},
		3: {1, T / 2, T * T / 10, T * T * T / 120},
	}
	for n, den := range want {
		r, err := Pade(T, n)
		if err != nil {
			t.Fatal(err)
		}
		for k := range den {
			if math.Abs(r.Den[k]-den[k]) > 1e-15 {
				t.Errorf("order %d den[%d] = %g want %g", n, k, r.Den[k], den[k])
			}
			sign := 1.0
			if k%2 == 1 {
				sign = -1
			}
			if math.Abs(r.Num[k]-sign*den[k]) > 1e-15 {
				t.Errorf("order %d num[%d] = %g", n, k, r.Num[k])
			}
		}
	}
	// All-pass, and phase close to -wT at low frequency (order 4).
	s, err := Delay(T, 4)
	if err != nil {
		t.Fatal(err)
	}
	for _, w := range []float64{0.1, 1, 5} {
		g := evalSys(t, s, complex(0, w))[0]
		if math.Abs(cmplx.Abs(g)-1) > 1e-12 {
			t.Errorf("|G(j%g)| = %g, want 1", w, cmplx.Abs(g))
		}
		// leading error term (n!)^2/((2n)!(2n+1)!) x^(2n+1), n = 4 (from memory), doubled
		lead := 576.0 / (40320 * 362880) * math.Pow(w*T, 9)
		if e := math.Abs(cmplx.Phase(g) + w*T); e > 2*lead+1e-13 {
			t.Errorf("phase at %g off by %g", w, e)
		}
	}
	if _, err := Pade(-1, 2); err == nil {
		t.Error("negative delay accepted")
	}
}
