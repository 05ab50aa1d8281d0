package lsys

import (
	"math"
	"testing"
)

// A pendulum x1' = x2, x2' = -k sin(x1) + u, y = x1^2 at x = (a, 0):
// A = [[0, 1], [-k cos a, 0]], B = [0; 1], C = [2a, 0], D = 0 (calculus),
// and dA/dk = [[0, 0], [-cos a, 0]] with k seeded in E2.
func TestJacobiansExact(t *testing.T) {
	const a, k = 0.3, 4.0
	eval := func(mixed bool) func(j int) ([]HyperDual, []HyperDual, error) {
		return func(j int) ([]HyperDual, []HyperDual, error) {
			x := []HyperDual{Const(a), Const(0)}
			u := Const(0)
			if j < 2 {
				x[j].E1 = 1
			} else {
				u.E1 = 1
			}
			kk := Const(k)
			if mixed {
				kk.E2 = 1
			}
			f := []HyperDual{x[1], kk.Mul(x[0].Sin()).Neg().Add(u)}
			return f, []HyperDual{x[0].Mul(x[0])}, nil
		}
	}
	A, B, C, D, err := Jacobians(2, 1, 1, false, eval(false))
	if err != nil {
		t.Fatal(err)
	}
	const tol = 1e-15
	for _, c := range []struct {
		what      string
		got, want float64
	}{
		{"A11", A.At(0, 0), 0}, {"A12", A.At(0, 1), 1}, {"A21", A.At(1, 0), -k * math.Cos(a)}, {"A22", A.At(1, 1), 0},
		{"B2", B.At(1, 0), 1}, {"C1", C.At(0, 0), 2 * a}, {"D", D.At(0, 0), 0},
	} {
		if math.Abs(c.got-c.want) > tol {
			t.Errorf("%s = %v, want %v", c.what, c.got, c.want)
		}
	}
	dA, _, _, _, err := Jacobians(2, 1, 1, true, eval(true))
	if err != nil {
		t.Fatal(err)
	}
	if got := dA.At(1, 0); math.Abs(got+math.Cos(a)) > tol || dA.At(0, 1) != 0 {
		t.Errorf("dA/dk = %v, want [[0, 0], [%v, 0]]", dA.RawMatrix().Data, -math.Cos(a))
	}
}
