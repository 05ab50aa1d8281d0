package builtins_test

import (
	"math"
	"testing"

	"gonum.org/v1/gonum/mat"

	"lsys/lsys"
)

// [[2, 1], [-1, 4]] has the double eigenvalue 3 with one eigenvector
// (trace 6, determinant 9; A - 3I = [[-1, 1], [-1, 1]] has rank 1): J =
// [[3, 1], [0, 3]] (by hand), and T J T^-1 gives A back. T's columns are
// orthogonal, the eigenvector of norm 1 and the next of norm 1/2 (chains
// scaled to a largest column of norm 1): cond(T) = 2.
func TestJordanFormBuiltin(t *testing.T) {
	f := stRun(t, "jordanform([[2, 1], [-1, 4]])").(*lsys.JordanForm)
	if !f.Real || f.J.At(0, 0) != 3 || f.J.At(0, 1) != 1 || f.J.At(1, 1) != 3 {
		t.Errorf("J = %v", f.J)
	}
	back := stRun(t, "F = jordanform([[2, 1], [-1, 4]])\nF.T * F.J * inverse(F.T)").(*mat.Dense)
	if !mat.EqualApprox(back, mat.NewDense(2, 2, []float64{2, 1, -1, 4}), 1e-14) {
		t.Errorf("T J T^-1 = %v", mat.Formatted(back))
	}
	if c := stRun(t, "jordanform([[2, 1], [-1, 4]]).cond").(float64); math.Abs(c-2) > 1e-12 {
		t.Errorf("cond %g", c)
	}
	stRunErr(t, "jordanform([[1, 2]])", "square")
}
