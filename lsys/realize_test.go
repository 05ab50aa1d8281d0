package lsys

import (
	"fmt"
	"math"
	"math/cmplx"
	"strings"
	"testing"

	"gonum.org/v1/gonum/mat"
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

// sortedPoles returns the poles of s; it fails the test on error.
func sortedPoles(t *testing.T, s *System) []complex128 {
	t.Helper()
	p, err := Poles(s)
	if err != nil {
		t.Fatal(err)
	}
	return p
}

// wantPoles checks that got holds exactly the poles want (as a multiset),
// each within tol relative to max(its magnitude, floor): a pole at the
// origin is only determined to rounding relative to the other poles of the
// input, so floor is the largest pole magnitude of the input.
func wantPoles(t *testing.T, what string, got, want []complex128, tol, floor float64) {
	t.Helper()
	if len(got) != len(want) {
		t.Errorf("%s: poles %v, want %v", what, got, want)
		return
	}
	used := make([]bool, len(got))
	for _, w := range want {
		bi, best := -1, math.Inf(1)
		for i, g := range got {
			if !used[i] && cmplx.Abs(g-w) < best {
				bi, best = i, cmplx.Abs(g-w)
			}
		}
		used[bi] = true
		if best > tol*math.Max(cmplx.Abs(w), floor) {
			t.Errorf("%s: pole %v for %v (difference %.2g)", what, got[bi], w, best)
		}
	}
}

// typeIII is the compensator ki/s * (1 + s/wz)^2 / (1 + s/wp)^2 with
// ki = 1000, wz = 15811, wp = 6e5 (the converter loop of the worked
// examples).
func typeIII() *Rational {
	ki, wz, wp := 1000.0, 15811.0, 6e5
	num := Poly{ki}.Mul(Poly{1, 1 / wz}).Mul(Poly{1, 1 / wz})
	den := Poly{0, 1}.Mul(Poly{1, 1 / wp}).Mul(Poly{1, 1 / wp})
	return &Rational{Num: num, Den: den}
}

// TestRealizeKeepsPolesOfBadlyScaledFunctions: the two failures of the
// worked example. Poles by closed form (the factors as written); a double
// pole is determined by the coefficients only to about sqrt(eps) relative
// (Wilkinson 1963, from memory), hence 1e-6.
func TestRealizeKeepsPolesOfBadlyScaledFunctions(t *testing.T) {
	den := Poly{0, 1}.Mul(Poly{1, 1e-5}).Mul(Poly{1, 1e-5})
	s, err := Realize([][]*Rational{{{Num: Poly{1}, Den: den}}}, 0)
	if err != nil {
		t.Fatal(err)
	}
	wantPoles(t, "1/(s (s/1e5 + 1)^2)", sortedPoles(t, s), []complex128{0, -1e5, -1e5}, 1e-6, 1e5)
	k, err := Realize([][]*Rational{{typeIII()}}, 0)
	if err != nil {
		t.Fatal(err)
	}
	wantPoles(t, "type-III compensator", sortedPoles(t, k), []complex128{0, -6e5, -6e5}, 1e-6, 6e5)
}

// TestRealizeTypeIIILoopSteadyState: with the integrator of the
// compensator in the loop, the unity-feedback closed loop of a stable plant
// has steady-state gain T(0) = 1 (final value theorem; common practice).
// Plant: the ideal buck converter's duty-to-output transfer function
// Vin / (L C s^2 + (L/R) s + 1) (Erickson & Maksimovic, Fundamentals of
// Power Electronics, 2nd ed., 2001, ch. 8, from memory) with Vin = 12 V,
// L = 10 uH, C = 100 uF, R = 1 ohm.
func TestRealizeTypeIIILoopSteadyState(t *testing.T) {
	vin, l, c, r := 12.0, 10e-6, 100e-6, 1.0
	g, err := Realize([][]*Rational{{{Num: Poly{vin}, Den: Poly{1, l / r, l * c}}}}, 0)
	if err != nil {
		t.Fatal(err)
	}
	k, err := Realize([][]*Rational{{typeIII()}}, 0)
	if err != nil {
		t.Fatal(err)
	}
	loop, err := Series(g, k)
	if err != nil {
		t.Fatal(err)
	}
	one, err := NewSystem(0, 1, 1, nil, nil, nil, mat.NewDense(1, 1, []float64{1}), 0)
	if err != nil {
		t.Fatal(err)
	}
	cl, err := CloseLoop(loop, one, -1)
	if err != nil {
		t.Fatal(err)
	}
	for _, p := range sortedPoles(t, cl) {
		if real(p) >= 0 {
			t.Fatalf("closed loop unstable: pole %v", p)
		}
	}
	dc, err := GainAt(cl, 0)
	if err != nil {
		t.Fatal(err)
	}
	t.Logf("closed-loop steady-state gain %v", dc[0])
	if e := cmplx.Abs(dc[0] - 1); e > 1e-9 {
		t.Errorf("closed-loop steady-state gain %v, want 1 (error %.2g)", dc[0], e)
	}
	integ := false
	for _, p := range sortedPoles(t, loop) {
		integ = integ || cmplx.Abs(p) < 1e-9
	}
	if !integ {
		t.Error("the open loop has no pole at s = 0: the integrator was lost")
	}
}

// TestRealizeCancelsOnlyWhatCancels: exact cancellations (also repeated and
// badly scaled ones) are removed; a pole 1e-6 (relative) away from a zero is
// kept even when a loose rank tolerance would remove it, with a warning.
func TestRealizeCancelsOnlyWhatCancels(t *testing.T) {
	for _, c := range []struct {
		what     string
		num, den Poly
		poles    []complex128
		floor    float64
	}{
		{"(s+1)^2/(s+1)^3", Poly{1, 2, 1}, Poly{1, 3, 3, 1}, []complex128{-1}, 1},
		{"(s/1e5+1)/(s (s/1e5+1))", Poly{1, 1e-5}, Poly{0, 1, 1e-5}, []complex128{0}, 1e5},
		{"(s+2e6)/((s+2e6)(s+3))", Poly{2e6, 1}, Poly{6e6, 2e6 + 3, 1}, []complex128{-3}, 2e6},
		{"(s+1+1e-6)/((s+1)(s+2))", Poly{1 + 1e-6, 1}, Poly{2, 3, 1}, []complex128{-1, -2}, 2},
	} {
		s, err := Realize([][]*Rational{{{Num: c.num, Den: c.den}}}, 0)
		if err != nil {
			t.Fatal(err)
		}
		wantPoles(t, c.what, sortedPoles(t, s), c.poles, 1e-9, c.floor)
	}
	s, info, err := RealizeWithInfo([][]*Rational{{{Num: Poly{1 + 1e-6, 1}, Den: Poly{2, 3, 1}}}}, 0, 1e-4)
	if err != nil {
		t.Fatal(err)
	}
	if s.N() != 2 || info.Removed != 0 || !strings.Contains(info.Warning, "kept") {
		t.Errorf("near cancellation with rank tolerance 1e-4: n = %d, removed %d, warning %q", s.N(), info.Removed, info.Warning)
	}
}

// TestRealizeCheckSeesADroppedPole: the check that guards every reduction
// reports a realization that lost the integrator of the compensator (the
// old failure: 1000 (1 + s/wz)^2/(1 + s/wp)^2 without 1/s) as wrong by
// order 1, and the correct one as right to rounding.
func TestRealizeCheckSeesADroppedPole(t *testing.T) {
	k := typeIII()
	good, err := Realize([][]*Rational{{k}}, 0)
	if err != nil {
		t.Fatal(err)
	}
	lost, err := Realize([][]*Rational{{{Num: k.Num, Den: Poly(k.Den[1:])}}}, 0)
	if err != nil {
		t.Fatal(err)
	}
	pts, err := checkPoints(good.A, 0)
	if err != nil {
		t.Fatal(err)
	}
	num, den := k.Num, k.Den
	rat := func(_, _ int, x complex128) (complex128, float64) {
		d := polyAtC(den, x)
		return polyAtC(num, x) / d, polyAbsAt(num, cmplx.Abs(x)) / cmplx.Abs(d)
	}
	if e := realizeCheck(good, pts, rat); e > 1e-12 {
		t.Errorf("check of the right realization %.2g", e)
	}
	if e := realizeCheck(lost, pts, rat); e < 0.1 {
		t.Errorf("check of the realization without integrator %.2g, want order 1", e)
	}
}

// TestRealizeMIMOWidelySpreadColumns: columns at very different frequency
// scales keep all their poles. McMillan degree by the ranks of the residue
// matrices (Kailath, Linear Systems, 1980, Section 6.5, from memory): for
// the row [slow, fast] each pole appears once (degree 1 + 3); for
// [[slow, fast], [fast, slow]] every residue matrix is a nonsingular 2x2
// (degree 2 + 2*3).
func TestRealizeMIMOWidelySpreadColumns(t *testing.T) {
	slow := tf([]float64{1}, []float64{1e-3, 1})                               // 1/(s + 1e-3)
	fast := tf([]float64{1}, Poly{0, 1}.Mul(Poly{1, 1e-5}).Mul(Poly{1, 1e-5})) // 1/(s (s/1e5+1)^2)
	row, err := Realize([][]*Rational{{slow, fast}}, 0)
	if err != nil {
		t.Fatal(err)
	}
	wantPoles(t, "[slow, fast]", sortedPoles(t, row), []complex128{-1e-3, 0, -1e5, -1e5}, 1e-6, 1e5)
	s, err := Realize([][]*Rational{{slow, fast}, {fast, slow}}, 0)
	if err != nil {
		t.Fatal(err)
	}
	wantPoles(t, "[[slow, fast], [fast, slow]]", sortedPoles(t, s),
		[]complex128{-1e-3, -1e-3, 0, 0, -1e5, -1e5, -1e5, -1e5}, 1e-6, 1e5)
	for _, w := range []float64{1e-4, 1, 1e5} {
		g := evalSys(t, s, complex(0, w))
		for i, want := range []complex128{
			ratAt(slow.Num, slow.Den, complex(0, w)), ratAt(fast.Num, fast.Den, complex(0, w)),
			ratAt(fast.Num, fast.Den, complex(0, w)), ratAt(slow.Num, slow.Den, complex(0, w)),
		} {
			if cmplx.Abs(g[i]-want) > 1e-9*cmplx.Abs(want) {
				t.Errorf("entry %d at w = %g: %v want %v", i, w, g[i], want)
			}
		}
	}
}

// The compensator 1000/s * (1 + s/15811)^2 / (1 + s/6e5)^2 keeps its
// integrator: three poles, nothing removed, and the realization reproduces
// the rational function to rounding.
func ExampleRealizeWithInfo() {
	k := &Rational{
		Num: Poly{1000}.Mul(Poly{1, 1 / 15811.0}).Mul(Poly{1, 1 / 15811.0}),
		Den: Poly{0, 1}.Mul(Poly{1, 1 / 6e5}).Mul(Poly{1, 1 / 6e5}),
	}
	s, info, err := RealizeWithInfo([][]*Rational{{k}}, 0, 0)
	if err != nil {
		fmt.Println(err)
		return
	}
	p, _ := Poles(s)
	fmt.Printf("order %d, removed %d, frequency scale %g\n", s.N(), info.Removed, info.Scales[0])
	for _, v := range p {
		fmt.Printf("pole %.6g\n", real(v))
	}
	fmt.Println("reproduces the transfer function to 1e-12:", info.Check < 1e-12)
	// Output:
	// order 3, removed 0, frequency scale 524288
	// pole 0
	// pole -600000
	// pole -600000
	// reproduces the transfer function to 1e-12: true
}

// BenchmarkRealizeOrder20: one SISO entry with 20 real poles 1..20 and two
// zeros (the staircase and the check run).
func BenchmarkRealizeOrder20(b *testing.B) {
	den := Poly{1}
	for i := 1; i <= 20; i++ {
		den = den.Mul(Poly{float64(i), 1})
	}
	tf := [][]*Rational{{{Num: Poly{3, 4, 1}, Den: den}}}
	for b.Loop() {
		if _, err := Realize(tf, 0); err != nil {
			b.Fatal(err)
		}
	}
}

// TestRealizeWarnsWhenCoefficientsCannotFixPoles: Wilkinson's polynomial
// prod (x - k), k = 1..20, is the classic case of roots that coefficients
// cannot fix (Wilkinson 1963, Rounding Errors in Algebraic Processes,
// ch. 2: a change of 2^-23 in the coefficient of x^19 turns the roots
// 10..19 into five complex pairs). Realizing 1/prod(s + k) must say so; a
// second-order entry and an undamped sampled pair exactly on the unit
// circle must not.
func TestRealizeWarnsWhenCoefficientsCannotFixPoles(t *testing.T) {
	var roots []complex128
	for k := 1; k <= 20; k++ {
		roots = append(roots, complex(-float64(k), 0))
	}
	den := polyFromRoots(roots)
	_, info, err := RealizeChecked([][]*Rational{{{Num: Poly{1}, Den: den}}}, 0, 0)
	if err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(info.Warning, "fix the pole") {
		t.Errorf("no warning for Wilkinson's polynomial: %q", info.Warning)
	}
	for _, c := range []struct {
		den Poly
		ts  float64
	}{
		{Poly{2, 3, 1}, 0},                    // (s + 1)(s + 2)
		{Poly{1, -2 * math.Cos(0.3), 1}, 0.1}, // z = exp(+-0.3j), on the unit circle
	} {
		_, info, err := RealizeChecked([][]*Rational{{{Num: Poly{1}, Den: c.den, Ts: c.ts}}}, c.ts, 0)
		if err != nil {
			t.Fatal(err)
		}
		if info.Warning != "" {
			t.Errorf("%v: unexpected warning %q", c.den, info.Warning)
		}
	}
}

// TestRealizeSaysApproximateCancellations: (s + 1)/((s + 1)(s + 2)) is
// 1/(s + 2) exactly (closed form) and cancels without a word; with the pole
// at -1 - 1e-11 the cancellation is approximate, decided by the rank
// tolerance, and the warning names it.
func TestRealizeSaysApproximateCancellations(t *testing.T) {
	for _, c := range []struct {
		eps  float64
		warn bool
	}{{0, false}, {1e-11, true}} {
		p := 1 + c.eps
		den := Poly{2 * p, 2 + p, 1} // (s + p)(s + 2)
		s, info, err := RealizeChecked([][]*Rational{{{Num: Poly{1, 1}, Den: den}}}, 0, 0)
		if err != nil {
			t.Fatal(err)
		}
		if s.N() != 1 {
			t.Errorf("eps %g: %d states, want 1 (the pole at -1 cancelled)", c.eps, s.N())
		}
		if got := strings.Contains(info.Warning, "approximate cancellation"); got != c.warn {
			t.Errorf("eps %g: warning %q", c.eps, info.Warning)
		}
	}
}
