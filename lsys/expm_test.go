package lsys

import (
	"math"
	"math/cmplx"
	"testing"

	"gonum.org/v1/gonum/mat"
)

func maxRelDiff(a, b *mat.Dense) float64 {
	var d mat.Dense
	d.Sub(a, b)
	return mat.Norm(&d, math.Inf(1)) / math.Max(1e-300, mat.Norm(b, math.Inf(1)))
}

func TestExpmTextbook2x2(t *testing.T) {
	// Reference: Ogata, Modern Control Engineering (5th ed., 2010), ch. 9,
	// state-transition matrix of A = [[0, 1], [-2, -3]] (from memory):
	// e^{At} = [[2e^-t - e^-2t, e^-t - e^-2t], [-2e^-t + 2e^-2t, -e^-t + 2e^-2t]].
	A := mat.NewDense(2, 2, []float64{0, 1, -2, -3})
	for _, tt := range []float64{0, 0.1, 1, 3.7, 10} {
		e1, e2 := math.Exp(-tt), math.Exp(-2*tt)
		want := mat.NewDense(2, 2, []float64{2*e1 - e2, e1 - e2, -2*e1 + 2*e2, -e1 + 2*e2})
		got, err := Transition(A, tt)
		if err != nil {
			t.Fatal(err)
		}
		if d := maxRelDiff(got, want); d > 1e-14 {
			t.Errorf("t = %v: relative error %.3g", tt, d)
		}
	}
}

func TestExpmClosedForms(t *testing.T) {
	// Rotation: exp([[0, w], [-w, 0]] t) = [[cos wt, sin wt], [-sin wt, cos wt]];
	// Jordan block: exp([[l, 1], [0, l]] t) = e^{lt} [[1, t], [0, 1]]
	// (Moler & Van Loan 2003, Nineteen dubious ways to compute the
	// exponential of a matrix, twenty-five years later, SIAM Review 45(1)).
	w, tt := 3.0, 2.5
	R, _ := Transition(mat.NewDense(2, 2, []float64{0, w, -w, 0}), tt)
	c, s := math.Cos(w*tt), math.Sin(w*tt)
	if d := maxRelDiff(R, mat.NewDense(2, 2, []float64{c, s, -s, c})); d > 1e-14 {
		t.Errorf("rotation: relative error %.3g", d)
	}
	l := -0.4
	J, _ := Transition(mat.NewDense(2, 2, []float64{l, 1, 0, l}), tt)
	e := math.Exp(l * tt)
	if d := maxRelDiff(J, mat.NewDense(2, 2, []float64{e, e * tt, 0, e})); d > 1e-14 {
		t.Errorf("Jordan block: relative error %.3g", d)
	}
	// The classic hard case of the same paper: A = [[-49, 24], [-64, 31]] =
	// V diag(-1, -17) V^-1 with V = [[1, 3], [2, 4]].
	A := mat.NewDense(2, 2, []float64{-49, 24, -64, 31})
	V := mat.NewDense(2, 2, []float64{1, 3, 2, 4})
	var Vi, want mat.Dense
	Vi.Inverse(V)
	want.Mul(V, mat.NewDense(2, 2, []float64{math.Exp(-1), 0, 0, math.Exp(-17)}))
	want.Mul(&want, &Vi)
	got, _ := Expm(A)
	if d := maxRelDiff(got, &want); d > 1e-12 {
		t.Errorf("Moler-Van Loan example: relative error %.3g", d)
	}
}

func TestExpmEigenvectors(t *testing.T) {
	// e^{At} v = e^{lambda t} v for an eigenvector v, so a state started on
	// an eigenvector stays on it (fact of the trade).
	A := mat.NewDense(3, 3, []float64{-1, 2, 0.5, -3, -1, 1, 0.2, 0.1, -4})
	es, err := Eigen(A)
	if err != nil {
		t.Fatal(err)
	}
	for _, tt := range []float64{0.3, 1.7} {
		E, _ := Transition(A, tt)
		for k, lam := range es.Values {
			v := es.Right[k]
			ev := cmplx.Exp(lam * complex(tt, 0))
			for i := 0; i < 3; i++ {
				var x complex128
				for j := 0; j < 3; j++ {
					x += complex(E.At(i, j), 0) * v[j]
				}
				if cmplx.Abs(x-ev*v[i]) > 1e-13 {
					t.Errorf("t=%v lambda=%v: (e^At v)[%d] = %v, want %v", tt, lam, i, x, ev*v[i])
				}
			}
		}
	}
}

func TestPower(t *testing.T) {
	// [[1, 1], [1, 0]]^k holds Fibonacci numbers (closed form).
	F := mat.NewDense(2, 2, []float64{1, 1, 1, 0})
	P, err := Power(F, 10)
	if err != nil {
		t.Fatal(err)
	}
	if P.At(0, 0) != 89 || P.At(0, 1) != 55 || P.At(1, 1) != 34 {
		t.Errorf("F^10 = %v", mat.Formatted(P))
	}
	Pi, _ := Power(F, -3)
	var I mat.Dense
	P3, _ := Power(F, 3)
	I.Mul(Pi, P3)
	if d := maxRelDiff(&I, identity(2)); d > 1e-15 {
		t.Errorf("F^-3 F^3 differs from I by %.3g", d)
	}
	if _, err := Power(mat.NewDense(2, 2, []float64{1, 2, 2, 4}), -1); err == nil {
		t.Error("inverse power of a singular matrix accepted")
	}
}

func TestExpmRefusesBadInput(t *testing.T) {
	if _, err := Expm(mat.NewDense(2, 3, nil)); err == nil {
		t.Error("2x3 accepted")
	}
	if _, err := Expm(mat.NewDense(1, 1, []float64{1000})); err == nil {
		t.Error("overflow not reported")
	}
}
