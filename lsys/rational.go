package lsys

import (
	"errors"
	"fmt"
	"math"
	"strconv"
	"strings"
)

// Poly is a real polynomial with coefficients in ascending powers:
// Poly{c0, c1, c2} is c0 + c1 x + c2 x^2. The zero polynomial is Poly{} or
// Poly{0}. Operations return new polynomials and never modify their
// arguments.
type Poly []float64

// Rational is a ratio of polynomials in s (Ts == 0) or z (Ts > 0). Ts < 0
// marks a rational function in z whose sample time is not known yet (the
// bare variable z); it takes the sample time of what it is combined with,
// and must be given one before it becomes a system.
type Rational struct {
	Num, Den Poly
	Ts       float64
	// Note, when not empty, says how far the coefficients can be trusted:
	// set by TransferFunctions when the roots of the denominator it formed
	// are not the poles it formed it from (see coefficientFidelity). It
	// does not survive arithmetic.
	Note string
}

// Trim drops trailing zero coefficients (the zero polynomial becomes Poly{}).
func (p Poly) Trim() Poly {
	n := len(p)
	for n > 0 && p[n-1] == 0 {
		n--
	}
	return append(Poly(nil), p[:n]...)
}

// Degree is the degree of p; the zero polynomial has degree -1.
func (p Poly) Degree() int { return len(p.Trim()) - 1 }

// IsZero reports whether every coefficient is zero.
func (p Poly) IsZero() bool { return p.Degree() < 0 }

// Lead is the coefficient of the highest power (0 for the zero polynomial).
func (p Poly) Lead() float64 {
	t := p.Trim()
	if len(t) == 0 {
		return 0
	}
	return t[len(t)-1]
}

// Add returns p + q.
func (p Poly) Add(q Poly) Poly {
	out := make(Poly, max(len(p), len(q)))
	for i := range out {
		if i < len(p) {
			out[i] += p[i]
		}
		if i < len(q) {
			out[i] += q[i]
		}
	}
	return out.Trim()
}

// Scale returns k p.
func (p Poly) Scale(k float64) Poly {
	out := make(Poly, len(p))
	for i, c := range p {
		out[i] = k * c
	}
	return out.Trim()
}

// Sub returns p - q.
func (p Poly) Sub(q Poly) Poly { return p.Add(q.Scale(-1)) }

// Mul returns p q.
func (p Poly) Mul(q Poly) Poly {
	p, q = p.Trim(), q.Trim()
	if len(p) == 0 || len(q) == 0 {
		return Poly{}
	}
	out := make(Poly, len(p)+len(q)-1)
	for i, a := range p {
		for j, b := range q {
			out[i+j] += a * b
		}
	}
	return out.Trim()
}

// Eval evaluates p at the complex point x by Horner's rule.
func (p Poly) Eval(x complex128) complex128 {
	var acc complex128
	for i := len(p) - 1; i >= 0; i-- {
		acc = acc*x + complex(p[i], 0)
	}
	return acc
}

// Format writes p in descending powers of the variable v, in the
// language's syntax: "s^2 + 2*s + 5".
func (p Poly) Format(v string) string {
	t := p.Trim()
	if len(t) == 0 {
		return "0"
	}
	var b strings.Builder
	for i := len(t) - 1; i >= 0; i-- {
		c := t[i]
		if c == 0 {
			continue
		}
		if b.Len() == 0 {
			if c < 0 {
				b.WriteString("-")
			}
		} else if c < 0 {
			b.WriteString(" - ")
		} else {
			b.WriteString(" + ")
		}
		a := math.Abs(c)
		num := strconv.FormatFloat(a, 'g', 10, 64)
		switch {
		case i == 0:
			b.WriteString(num)
		case a == 1:
			b.WriteString(v)
		default:
			b.WriteString(num + "*" + v)
		}
		if i > 1 {
			b.WriteString("^" + strconv.Itoa(i))
		}
	}
	return b.String()
}

// Constant returns the rational function k (continuous time until combined).
func Constant(k float64) *Rational { return &Rational{Num: Poly{k}, Den: Poly{1}} }

// Variable returns s (ts == 0) or z (ts != 0; ts < 0 leaves the sample time open).
func Variable(ts float64) *Rational { return &Rational{Num: Poly{0, 1}, Den: Poly{1}, Ts: ts} }

// IsConstant reports whether r does not depend on its variable.
func (r *Rational) IsConstant() bool { return r.Num.Degree() <= 0 && r.Den.Degree() == 0 }

// VarName is "s" or "z".
func (r *Rational) VarName() string {
	if r.Ts != 0 {
		return "z"
	}
	return "s"
}

// ErrMixedTime is returned when continuous and sampled (or differently
// sampled) transfer functions are combined.
var ErrMixedTime = errors.New("cannot combine a transfer function in s with one in z, or two with different sample times")

// combineTs decides the sample time of a combination of r and q.
func combineTs(r, q *Rational) (float64, error) {
	switch {
	case r.IsConstant() && r.Ts <= 0:
		return q.Ts, nil
	case q.IsConstant() && q.Ts <= 0:
		return r.Ts, nil
	case r.Ts == q.Ts:
		return r.Ts, nil
	case r.Ts < 0 && q.Ts > 0:
		return q.Ts, nil
	case q.Ts < 0 && r.Ts > 0:
		return r.Ts, nil
	}
	return 0, ErrMixedTime
}

// Normalize returns r with trimmed polynomials and a monic denominator.
// It does not cancel common factors: deciding that two roots are equal is
// a tolerance question left to realization.
func (r *Rational) Normalize() (*Rational, error) {
	num, den := r.Num.Trim(), r.Den.Trim()
	if len(den) == 0 {
		return nil, errors.New("division by zero: the denominator is the zero polynomial")
	}
	k := den[len(den)-1]
	out := &Rational{Num: num.Scale(1 / k), Den: den.Scale(1 / k), Ts: r.Ts}
	for _, c := range append(append(Poly(nil), out.Num...), out.Den...) {
		if math.IsNaN(c) || math.IsInf(c, 0) {
			return nil, errors.New("a coefficient overflowed to a non-finite number")
		}
	}
	if len(out.Num) == 0 {
		out.Num = Poly{}
	}
	return out, nil
}

// Add returns r + q.
func (r *Rational) Add(q *Rational) (*Rational, error) {
	ts, err := combineTs(r, q)
	if err != nil {
		return nil, err
	}
	if samePoly(r.Den, q.Den) {
		return (&Rational{Num: r.Num.Add(q.Num), Den: r.Den, Ts: ts}).Normalize()
	}
	return (&Rational{Num: r.Num.Mul(q.Den).Add(q.Num.Mul(r.Den)), Den: r.Den.Mul(q.Den), Ts: ts}).Normalize()
}

// Sub returns r - q.
func (r *Rational) Sub(q *Rational) (*Rational, error) { return r.Add(q.Neg()) }

// Neg returns -r.
func (r *Rational) Neg() *Rational { return &Rational{Num: r.Num.Scale(-1), Den: r.Den, Ts: r.Ts} }

// Mul returns r q.
func (r *Rational) Mul(q *Rational) (*Rational, error) {
	ts, err := combineTs(r, q)
	if err != nil {
		return nil, err
	}
	return (&Rational{Num: r.Num.Mul(q.Num), Den: r.Den.Mul(q.Den), Ts: ts}).Normalize()
}

// Div returns r / q.
func (r *Rational) Div(q *Rational) (*Rational, error) {
	if q.Num.IsZero() {
		return nil, errors.New("division by zero")
	}
	ts, err := combineTs(r, q)
	if err != nil {
		return nil, err
	}
	return (&Rational{Num: r.Num.Mul(q.Den), Den: r.Den.Mul(q.Num), Ts: ts}).Normalize()
}

// Pow returns r^k for a whole k (negative k inverts).
func (r *Rational) Pow(k int) (*Rational, error) {
	if k < 0 {
		if r.Num.IsZero() {
			return nil, errors.New("division by zero")
		}
		r = &Rational{Num: r.Den, Den: r.Num, Ts: r.Ts}
		k = -k
	}
	out := &Rational{Num: Poly{1}, Den: Poly{1}, Ts: r.Ts}
	base := r
	for k > 0 {
		if k&1 == 1 {
			out = &Rational{Num: out.Num.Mul(base.Num), Den: out.Den.Mul(base.Den), Ts: r.Ts}
		}
		base = &Rational{Num: base.Num.Mul(base.Num), Den: base.Den.Mul(base.Den), Ts: r.Ts}
		k >>= 1
	}
	return out.Normalize()
}

// Eval evaluates r at the complex point x. At a pole the result is an
// infinity of cmplx.Inf.
func (r *Rational) Eval(x complex128) complex128 {
	return r.Num.Eval(x) / r.Den.Eval(x)
}

// Degree returns the degrees of numerator and denominator.
func (r *Rational) Degree() (num, den int) { return r.Num.Degree(), r.Den.Degree() }

// Proper reports whether deg num <= deg den (realizable as a state-space
// model without derivatives of the input).
func (r *Rational) Proper() bool { n, d := r.Degree(); return n <= d }

func samePoly(p, q Poly) bool {
	p, q = p.Trim(), q.Trim()
	if len(p) != len(q) {
		return false
	}
	for i := range p {
		if p[i] != q[i] {
			return false
		}
	}
	return true
}

// String writes r in the language's syntax, e.g. "5 / (s^2 + 2*s + 5)".
func (r *Rational) String() string {
	v := r.VarName()
	num := r.Num.Format(v)
	if r.Den.Degree() == 0 && r.Den.Lead() == 1 {
		return num
	}
	if r.Num.Degree() > 0 && len(nonzero(r.Num)) > 1 {
		num = "(" + num + ")"
	}
	den := r.Den.Format(v)
	if len(nonzero(r.Den)) > 1 || (r.Den.Degree() > 0 && r.Den.Lead() != 1) {
		den = "(" + den + ")"
	}
	return fmt.Sprintf("%s / %s", num, den)
}

func nonzero(p Poly) []float64 {
	var out []float64
	for _, c := range p {
		if c != 0 {
			out = append(out, c)
		}
	}
	return out
}
