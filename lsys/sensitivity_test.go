package lsys

import (
	"math"
	"math/cmplx"
	"testing"

	"gonum.org/v1/gonum/mat"
)

// Poles of m s^2 + c s + k: s = -c/2m + j w_d, w_d = sqrt(k/m - (c/2m)^2);
// differentiating the closed form (common practice): ds/dk = j/(2 m w_d),
// ds/dc = -1/2m - j c/(4 m^2 w_d).
func TestEigenvalueSensitivityClosedForm(t *testing.T) {
	m, c, k := 2.0, 0.8, 10.0
	A := mat.NewDense(2, 2, []float64{0, 1, -k / m, -c / m})
	dk := mat.NewDense(2, 2, []float64{0, 0, -1 / m, 0})
	dc := mat.NewDense(2, 2, []float64{0, 0, 0, -1 / m})
	s, err := EigenvalueSensitivity(A, []*mat.Dense{dk, dc}, []string{"k", "c"}, []float64{k, c}, 0)
	if err != nil {
		t.Fatal(err)
	}
	wd := math.Sqrt(k/m - (c/(2*m))*(c/(2*m)))
	if len(s.Eigenvalues) != 1 || cmplx.Abs(s.Eigenvalues[0]-complex(-c/(2*m), wd)) > 1e-14 {
		t.Fatalf("eigenvalues %v", s.Eigenvalues)
	}
	for j, want := range []complex128{complex(0, 1/(2*m*wd)), complex(-1/(2*m), -c/(4*m*m*wd))} {
		if d := cmplx.Abs(s.D[0][j] - want); d > 1e-14 {
			t.Errorf("d/d%s = %v, want %v", s.Parameters[j], s.D[0][j], want)
		}
	}
	// relative sensitivity to k: (k/|s|) ds/dk with |s| = sqrt(k/m)
	if d := cmplx.Abs(s.Relative(0, 0) - complex(0, k/math.Sqrt(k/m)/(2*m*wd))); d > 1e-14 {
		t.Errorf("relative to k: %v", s.Relative(0, 0))
	}
	if s.Multiplicity[0] != 1 || s.Defective[0] {
		t.Errorf("a simple eigenvalue reported as repeated")
	}
}

// Repeated eigenvalues have no (unique) derivative (Wilkinson 1965, ch. 2):
// a double integrator's defective 0 and the semisimple -1 of -I are each
// listed once, with the derivative undefined.
func TestEigenvalueSensitivityRepeated(t *testing.T) {
	for _, c := range []struct {
		A         []float64
		value     complex128
		defective bool
	}{
		{[]float64{0, 1, 0, 0}, 0, true},
		{[]float64{-1, 0, 0, -1}, -1, false},
	} {
		A := mat.NewDense(2, 2, c.A)
		dA := mat.NewDense(2, 2, []float64{0, 0, -1, 0})
		s, err := EigenvalueSensitivity(A, []*mat.Dense{dA}, []string{"k"}, []float64{0}, 0)
		if err != nil {
			t.Fatal(err)
		}
		if len(s.Eigenvalues) != 1 || cmplx.Abs(s.Eigenvalues[0]-c.value) > 1e-12 || s.Multiplicity[0] != 2 {
			t.Fatalf("A = %v: eigenvalues %v multiplicity %v, want %v once, twice repeated", c.A, s.Eigenvalues, s.Multiplicity, c.value)
		}
		if s.Defective[0] != c.defective || !cmplx.IsNaN(s.D[0][0]) {
			t.Errorf("A = %v: defective %v, derivative %v", c.A, s.Defective[0], s.D[0][0])
		}
		if c.defective && !math.IsInf(s.Cond[0], 1) {
			t.Errorf("A = %v: condition %v, want +Inf", c.A, s.Cond[0])
		}
	}
}
