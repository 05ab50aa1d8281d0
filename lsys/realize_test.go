package lsys

import (
	"math"
	"testing"
)

func TestRealizeSISO(t *testing.T) {
	// 5/(s^2+2s+5): a standard second-order system, wn = sqrt(5).
	s := siso(t, []float64{5}, []float64{5, 2, 1})
	if s.N() != 2 {
		t.Fatalf("order %d, want 2", s.N())
	}
	for _, p := range testPoints {
		if got, want := evalSys(t, s, p)[0], ratAt([]float64{5}, []float64{5, 2, 1}, p); !closeC(got, want, 1e-12) {
			t.Errorf("at %v: got %v want %v", p, got, want)
		}
	}
	// Biproper (s+3)/(s+1): D = 1 (leading coefficients), one state.
	b := siso(t, []float64{3, 1}, []float64{1, 1})
	if b.N() != 1 || b.D.At(0, 0) != 1 {
		t.Errorf("biproper: n=%d D=%v", b.N(), b.D.At(0, 0))
	}
}

func TestRealizeCancels(t *testing.T) {
	// (s+1)/((s+1)(s+2)) = 1/(s+2): minimal order 1, pole -2.
	s := siso(t, []float64{1, 1}, []float64{2, 3, 1})
	if s.N() != 1 {
		t.Fatalf("order %d, want 1 after the cancellation", s.N())
	}
	if a := s.A.At(0, 0); math.Abs(a+2) > 1e-12 {
		t.Errorf("pole %v, want -2", a)
	}
	// A pure gain: 3s/(s) has no state after the cancellation.
	g := siso(t, []float64{0, 3}, []float64{0, 1})
	if g.N() != 0 || g.D.At(0, 0) != 3 {
		t.Errorf("gain: n=%d D=%v", g.N(), g.D)
	}
}

func TestRealizeMIMOMcMillanDegree(t *testing.T) {
	// For simple poles the McMillan degree is the sum over poles of the
	// ranks of the residue matrices (Kailath, Linear Systems, 1980, Section
	// 6.5, from memory). G1 = [[1/(s+1), 2/(s+1)], [1/(s+2), 1/(s+1)]]:
	// residue at -1 is [[1,2],[0,1]] (rank 2), at -2 [[0,0],[1,0]] (rank 1).
	g1 := [][]*Rational{
		{tf([]float64{1}, []float64{1, 1}), tf([]float64{2}, []float64{1, 1})},
		{tf([]float64{1}, []float64{2, 1}), tf([]float64{1}, []float64{1, 1})},
	}
	// G2 = [1/(s+1), 1/(s+1)]: one residue of rank 1.
	g2 := [][]*Rational{{tf([]float64{1}, []float64{1, 1}), tf([]float64{1}, []float64{1, 1})}}
	for _, c := range []struct {
		g    [][]*Rational
		want int
	}{{g1, 3}, {g2, 1}} {
		s, err := Realize(c.g, 0)
		if err != nil {
			t.Fatal(err)
		}
		if s.N() != c.want {
			t.Errorf("order %d, want %d", s.N(), c.want)
		}
		for _, p := range testPoints {
			got := evalSys(t, s, p)
			for i := range c.g {
				for j := range c.g[i] {
					want := ratAt(c.g[i][j].Num, c.g[i][j].Den, p)
					if !closeC(got[i*s.M()+j], want, 1e-12) {
						t.Errorf("[%d,%d] at %v: got %v want %v", i, j, p, got[i*s.M()+j], want)
					}
				}
			}
		}
	}
}

func TestRealizeRefuses(t *testing.T) {
	if _, err := Realize([][]*Rational{{tf([]float64{0, 0, 1}, []float64{1, 1})}}, 0); err == nil {
		t.Error("improper s^2/(s+1) accepted")
	}
	if _, err := Realize([][]*Rational{{tf([]float64{1}, []float64{0})}}, 0); err == nil {
		t.Error("zero denominator accepted")
	}
	if _, err := Realize([][]*Rational{{tf([]float64{math.NaN()}, []float64{1, 1})}}, 0); err == nil {
		t.Error("NaN accepted")
	}
	r := tf([]float64{1}, []float64{-0.5, 1})
	r.Ts = 0.1
	if _, err := Realize([][]*Rational{{r}}, 0); err == nil {
		t.Error("sampled entry in a continuous matrix accepted")
	}
	d, err := Realize([][]*Rational{{r}}, 0.1)
	if err != nil || d.Ts != 0.1 || d.N() != 1 {
		t.Errorf("sampled realization: %v %v", d, err)
	}
}

func TestRealizeBalancesSmallDelay(t *testing.T) {
	// Pade(0.02, 3) has denominator coefficients spread over seven decades;
	// the balanced realization keeps |G(jw)| = 1 (all-pass, see
	// TestPadeCoefficients) to near machine precision.
	r, err := Pade(0.02, 3)
	if err != nil {
		t.Fatal(err)
	}
	s, err := Realize([][]*Rational{{r}}, 0)
	if err != nil {
		t.Fatal(err)
	}
	for _, w := range []float64{1, 30, 300, 3000} {
		g := evalSys(t, s, complex(0, w))[0]
		if e := math.Abs(cmplxAbs(g) - 1); e > 1e-12 {
			t.Errorf("|G(j%g)| - 1 = %g", w, e)
		}
	}
}

func cmplxAbs(z complex128) float64 { return math.Hypot(real(z), imag(z)) }
