package lsys

import (
	"math"
	"math/cmplx"
	"testing"
)

func TestPolyArithmetic(t *testing.T) {
	// (s + 1)(s + 2) = s^2 + 3 s + 2 (algebra).
	p := Poly{1, 1}.Mul(Poly{2, 1})
	if !samePoly(p, Poly{2, 3, 1}) {
		t.Errorf("(s+1)(s+2) = %v", p)
	}
	if got := p.Format("s"); got != "s^2 + 3*s + 2" {
		t.Errorf("Format = %q", got)
	}
	if got := (Poly{-1, 0, -2}).Format("z"); got != "-2*z^2 - 1" {
		t.Errorf("Format = %q", got)
	}
	if d := (Poly{1, 2, 0, 0}).Degree(); d != 1 {
		t.Errorf("degree %d, want 1", d)
	}
	if d := (Poly{0, 0}).Degree(); d != -1 {
		t.Errorf("degree of zero %d, want -1", d)
	}
	if s := (Poly{1, 2}).Sub(Poly{1, 2}); !s.IsZero() {
		t.Errorf("p - p = %v", s)
	}
	// Horner at s = 1j: 2 + 3j - 1 = 1 + 3j.
	if v := p.Eval(1i); v != complex(1, 3) {
		t.Errorf("p(1j) = %v", v)
	}
}

func TestRationalArithmetic(t *testing.T) {
	s := Variable(0)
	one := Constant(1)
	// 1/(s+1) + 1/(s+2) = (2s + 3)/(s^2 + 3s + 2) (partial fractions, algebra).
	a, _ := one.Div(mustAdd(t, s, Constant(1)))
	b, _ := one.Div(mustAdd(t, s, Constant(2)))
	sum, err := a.Add(b)
	if err != nil {
		t.Fatal(err)
	}
	if !samePoly(sum.Num, Poly{3, 2}) || !samePoly(sum.Den, Poly{2, 3, 1}) {
		t.Errorf("sum = %v", sum)
	}
	// 5/(s^2 + 2s + 5): steady-state gain H(0) = 1, and |H(j sqrt(5))| = 5/(2 sqrt 5)
	// at the undamped natural frequency (second-order closed form, common practice).
	h := &Rational{Num: Poly{5}, Den: Poly{5, 2, 1}}
	if g := h.Eval(0); g != 1 {
		t.Errorf("H(0) = %v", g)
	}
	w := math.Sqrt(5)
	if g := cmplx.Abs(h.Eval(complex(0, w))); math.Abs(g-5/(2*w)) > 1e-15 {
		t.Errorf("|H(j wn)| = %v, want %v", g, 5/(2*w))
	}
	if got := h.String(); got != "5 / (s^2 + 2*s + 5)" {
		t.Errorf("String = %q", got)
	}
	// Normalisation makes the denominator monic.
	n, _ := (&Rational{Num: Poly{2}, Den: Poly{4, 2}}).Normalize()
	if !samePoly(n.Num, Poly{1}) || !samePoly(n.Den, Poly{2, 1}) {
		t.Errorf("normalised %v", n)
	}
	// (s + 1)^-2
	p, err := mustAdd(t, s, one).Pow(-2)
	if err != nil || !samePoly(p.Den, Poly{1, 2, 1}) || !samePoly(p.Num, Poly{1}) {
		t.Errorf("(s+1)^-2 = %v, %v", p, err)
	}
	if nd, dd := p.Degree(); nd != 0 || dd != 2 || !p.Proper() {
		t.Errorf("degrees %d %d", nd, dd)
	}
	if _, err := one.Div(Constant(0)); err == nil {
		t.Error("division by zero accepted")
	}
}

func TestRationalSampleTimes(t *testing.T) {
	s, z := Variable(0), Variable(-1)
	if _, err := s.Add(z); err == nil {
		t.Error("s + z accepted")
	}
	zd := Variable(0.1)
	r, err := z.Mul(zd)
	if err != nil || r.Ts != 0.1 {
		t.Errorf("z * z(0.1): ts %v, %v", r.Ts, err)
	}
	c, err := Constant(2).Add(z)
	if err != nil || c.Ts != -1 || c.VarName() != "z" {
		t.Errorf("2 + z: %v %v", c, err)
	}
	if _, err := Variable(0.1).Add(Variable(0.2)); err == nil {
		t.Error("different sample times accepted")
	}
}

func mustAdd(t *testing.T, a, b *Rational) *Rational {
	t.Helper()
	r, err := a.Add(b)
	if err != nil {
		t.Fatal(err)
	}
	return r
}
