package lsys

import "math"

// HyperDual is a hyper-dual number a + b e1 + c e2 + d e1e2 with
// e1^2 = e2^2 = 0 and e1e2 != 0 (Fike & Alonso, "The development of
// hyper-dual numbers for exact second-derivative calculations", AIAA
// 2011-886). Evaluating a function f on x = a + e1 + e2 (seeds in both
// parts) gives f(a) + f'(a) e1 + f'(a) e2 + f2(a) e1e2 (f2 the second derivative); seeding e1 on one
// variable and e2 on another gives the mixed second derivative in E12.
// Unlike finite differences there is no step size: first and second
// derivatives are exact up to rounding.
//
// With E2 = E12 = 0 it is an ordinary dual number (forward-mode automatic
// differentiation, first derivatives only).
type HyperDual struct {
	V, E1, E2, E12 float64
}

// Const returns the hyper-dual number of a constant.
func Const(v float64) HyperDual { return HyperDual{V: v} }

// Add returns x + y.
func (x HyperDual) Add(y HyperDual) HyperDual {
	return HyperDual{x.V + y.V, x.E1 + y.E1, x.E2 + y.E2, x.E12 + y.E12}
}

// Sub returns x - y.
func (x HyperDual) Sub(y HyperDual) HyperDual {
	return HyperDual{x.V - y.V, x.E1 - y.E1, x.E2 - y.E2, x.E12 - y.E12}
}

// Neg returns -x.
func (x HyperDual) Neg() HyperDual { return HyperDual{-x.V, -x.E1, -x.E2, -x.E12} }

// Scale returns k x.
func (x HyperDual) Scale(k float64) HyperDual {
	return HyperDual{k * x.V, k * x.E1, k * x.E2, k * x.E12}
}

// Mul returns x y.
func (x HyperDual) Mul(y HyperDual) HyperDual {
	return HyperDual{
		V:   x.V * y.V,
		E1:  x.V*y.E1 + x.E1*y.V,
		E2:  x.V*y.E2 + x.E2*y.V,
		E12: x.V*y.E12 + x.E12*y.V + x.E1*y.E2 + x.E2*y.E1,
	}
}

// chain applies a scalar function with value f0 and derivatives f1, f2 at x.V.
func (x HyperDual) chain(f0, f1, f2 float64) HyperDual {
	return HyperDual{
		V:   f0,
		E1:  f1 * x.E1,
		E2:  f1 * x.E2,
		E12: f1*x.E12 + f2*x.E1*x.E2,
	}
}

// Inv returns 1/x; x.V must not be 0.
func (x HyperDual) Inv() HyperDual {
	r := 1 / x.V
	return x.chain(r, -r*r, 2*r*r*r)
}

// Div returns x / y; y.V must not be 0.
func (x HyperDual) Div(y HyperDual) HyperDual {
	if y.E1 == 0 && y.E2 == 0 && y.E12 == 0 {
		// Division by a constant: divide each part, exactly as written.
		return HyperDual{x.V / y.V, x.E1 / y.V, x.E2 / y.V, x.E12 / y.V}
	}
	return x.Mul(y.Inv())
}

// PowInt returns x^k for a whole k by repeated multiplication (exact
// derivatives also at x.V == 0).
func (x HyperDual) PowInt(k int) HyperDual {
	if k < 0 {
		return x.PowInt(-k).Inv()
	}
	out := Const(1)
	for k > 0 {
		if k&1 == 1 {
			out = out.Mul(x)
		}
		x = x.Mul(x)
		k >>= 1
	}
	return out
}

// PowReal returns x^p for a constant real p (x.V > 0 unless p is whole).
func (x HyperDual) PowReal(p float64) HyperDual {
	if p == math.Trunc(p) && math.Abs(p) <= 1<<20 {
		return x.PowInt(int(p))
	}
	return x.chain(math.Pow(x.V, p), p*math.Pow(x.V, p-1), p*(p-1)*math.Pow(x.V, p-2))
}

// Pow returns x^y for a hyper-dual exponent, as exp(y log x) (x.V > 0).
func (x HyperDual) Pow(y HyperDual) HyperDual {
	if y.E1 == 0 && y.E2 == 0 && y.E12 == 0 {
		return x.PowReal(y.V)
	}
	return y.Mul(x.Log()).Exp()
}

// Sin returns sin x.
func (x HyperDual) Sin() HyperDual {
	s, c := math.Sincos(x.V)
	return x.chain(s, c, -s)
}

// Cos returns cos x.
func (x HyperDual) Cos() HyperDual {
	s, c := math.Sincos(x.V)
	return x.chain(c, -s, -c)
}

// Tan returns tan x.
func (x HyperDual) Tan() HyperDual {
	t := math.Tan(x.V)
	d := 1 + t*t
	return x.chain(t, d, 2*t*d)
}

// Exp returns e^x.
func (x HyperDual) Exp() HyperDual {
	e := math.Exp(x.V)
	return x.chain(e, e, e)
}

// Log returns the natural logarithm (x.V > 0).
func (x HyperDual) Log() HyperDual {
	return x.chain(math.Log(x.V), 1/x.V, -1/(x.V*x.V))
}

// Sqrt returns the square root (x.V > 0 for finite derivatives).
func (x HyperDual) Sqrt() HyperDual {
	r := math.Sqrt(x.V)
	return x.chain(r, 0.5/r, -0.25/(r*x.V))
}

// Abs returns |x|. At x.V == 0, where |x| has no derivative, the
// derivative is taken as 0 (the mean of the one-sided ones).
func (x HyperDual) Abs() HyperDual {
	switch {
	case x.V > 0:
		return x
	case x.V < 0:
		return x.Neg()
	}
	return HyperDual{}
}

// IsFinite reports whether every part is finite.
func (x HyperDual) IsFinite() bool {
	for _, v := range [4]float64{x.V, x.E1, x.E2, x.E12} {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return false
		}
	}
	return true
}
