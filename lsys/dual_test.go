package lsys

import (
	"math"
	"testing"
)

func hdNear(a, b, tol float64) bool { return math.Abs(a-b) <= tol*math.Max(1, math.Abs(b)) }

// First and second derivatives of elementary functions against their
// closed forms (calculus tables, common practice).
func TestHyperDualDerivatives(t *testing.T) {
	x0 := 0.7
	x := HyperDual{V: x0, E1: 1, E2: 1}
	cases := []struct {
		name   string
		f      HyperDual
		d1, d2 float64
	}{
		{"sin", x.Sin(), math.Cos(x0), -math.Sin(x0)},
		{"cos", x.Cos(), -math.Sin(x0), -math.Cos(x0)},
		{"tan", x.Tan(), 1 / (math.Cos(x0) * math.Cos(x0)), 2 * math.Tan(x0) / (math.Cos(x0) * math.Cos(x0))},
		{"exp", x.Exp(), math.Exp(x0), math.Exp(x0)},
		{"log", x.Log(), 1 / x0, -1 / (x0 * x0)},
		{"sqrt", x.Sqrt(), 0.5 / math.Sqrt(x0), -0.25 * math.Pow(x0, -1.5)},
		{"x^3", x.PowInt(3), 3 * x0 * x0, 6 * x0},
		{"x^-2", x.PowInt(-2), -2 * math.Pow(x0, -3), 6 * math.Pow(x0, -4)},
		{"x^2.5", x.PowReal(2.5), 2.5 * math.Pow(x0, 1.5), 3.75 * math.Pow(x0, 0.5)},
		{"x^x", x.Pow(x), math.Pow(x0, x0) * (math.Log(x0) + 1), math.Pow(x0, x0) * ((math.Log(x0)+1)*(math.Log(x0)+1) + 1/x0)},
		{"1/x", Const(1).Div(x), -1 / (x0 * x0), 2 / (x0 * x0 * x0)},
		{"abs(-x)", x.Neg().Abs(), 1, 0},
		{"x*sin(x)", x.Mul(x.Sin()), math.Sin(x0) + x0*math.Cos(x0), 2*math.Cos(x0) - x0*math.Sin(x0)},
	}
	for _, c := range cases {
		if !hdNear(c.f.E1, c.d1, 1e-14) || !hdNear(c.f.E2, c.d1, 1e-14) || !hdNear(c.f.E12, c.d2, 1e-13) {
			t.Errorf("%s: got f' = %v, %v, f'' = %v; want %v, %v", c.name, c.f.E1, c.f.E2, c.f.E12, c.d1, c.d2)
		}
	}
}

// Mixed partial d2/dx dy of x^2 y + sin(x y) at (x, y) = (0.3, -1.2):
// 2x + cos(xy) - xy sin(xy) (calculus, common practice).
func TestHyperDualMixed(t *testing.T) {
	x0, y0 := 0.3, -1.2
	x := HyperDual{V: x0, E1: 1}
	y := HyperDual{V: y0, E2: 1}
	f := x.Mul(x).Mul(y).Add(x.Mul(y).Sin())
	xy := x0 * y0
	if want := 2*x0 + math.Cos(xy) - xy*math.Sin(xy); !hdNear(f.E12, want, 1e-14) {
		t.Errorf("mixed partial %v, want %v", f.E12, want)
	}
	if want := 2*x0*y0 + y0*math.Cos(xy); !hdNear(f.E1, want, 1e-14) {
		t.Errorf("d/dx %v, want %v", f.E1, want)
	}
	if want := x0*x0 + x0*math.Cos(xy); !hdNear(f.E2, want, 1e-14) {
		t.Errorf("d/dy %v, want %v", f.E2, want)
	}
	if !f.IsFinite() || Const(0).Inv().IsFinite() {
		t.Error("IsFinite")
	}
}
