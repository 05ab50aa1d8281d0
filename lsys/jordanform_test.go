package lsys

import (
	"math"
	"math/cmplx"
	"testing"

	"gonum.org/v1/gonum/mat"
)

// A = S J0 S^-1 with J0 known (blocks chosen by hand) and S a fixed,
// well-conditioned matrix: the form must give J0's blocks, A T = T J to
// rounding (relative residual 1e-12) and T^-1 A T = J to 1e-8 (a defective
// eigenvalue is computed only to about u^(1/k); the chains are built at
// the cluster's mean, which is far more accurate).
func TestJordanFormPlanted(t *testing.T) {
	S := mat.NewDense(5, 5, []float64{
		2, 1, 0, 0.5, 1,
		0, 1, 1, 0, -1,
		1, 0, 3, 1, 0,
		0, 0.5, 0, 1, 1,
		1, 1, 0, 0, 2,
	})
	cases := []struct {
		name  string
		J0    []float64
		sizes []int
		real  bool
	}{
		{"block 3 and 1 at 2, simple -1", []float64{
			2, 1, 0, 0, 0,
			0, 2, 1, 0, 0,
			0, 0, 2, 0, 0,
			0, 0, 0, 2, 0,
			0, 0, 0, 0, -1}, []int{3, 1, 1}, true},
		{"two blocks of 2 at -1, simple -3", []float64{
			-1, 1, 0, 0, 0,
			0, -1, 0, 0, 0,
			0, 0, -1, 1, 0,
			0, 0, 0, -1, 0,
			0, 0, 0, 0, -3}, []int{2, 2, 1}, true},
		// a defective pair at -0.5 +- 2j in real form (blocks of 2 at each)
		{"defective complex pair", []float64{
			-0.5, 2, 1, 0, 0,
			-2, -0.5, 0, 1, 0,
			0, 0, -0.5, 2, 0,
			0, 0, -2, -0.5, 0,
			0, 0, 0, 0, -4}, []int{2, 2, 1}, false},
	}
	for _, tc := range cases {
		var Si mat.Dense
		if err := Si.Inverse(S); err != nil {
			t.Fatal(err)
		}
		var A mat.Dense
		A.Product(S, mat.NewDense(5, 5, tc.J0), &Si)
		jf, err := JordanFormOf(&A, 0, 0)
		if err != nil {
			t.Fatal(err)
		}
		var sizes []int
		for _, b := range jf.BlockSizes {
			sizes = append(sizes, b)
		}
		if len(sizes) != len(tc.sizes) {
			t.Fatalf("%s: blocks %v want %v", tc.name, sizes, tc.sizes)
		}
		if jf.Real != tc.real {
			t.Errorf("%s: real %v", tc.name, jf.Real)
		}
		if jf.Residual > 1e-12 {
			t.Errorf("%s: residual %g", tc.name, jf.Residual)
		}
		// T^-1 A T = J
		n := 5
		Tr := mat.NewDense(2*n, 2*n, nil)
		for i := 0; i < n; i++ {
			for j := 0; j < n; j++ {
				x := jf.T.At(i, j)
				Tr.Set(i, j, real(x))
				Tr.Set(i+n, j+n, real(x))
				Tr.Set(i+n, j, imag(x))
				Tr.Set(i, j+n, -imag(x))
			}
		}
		var Ti mat.Dense
		if err := Ti.Inverse(Tr); err != nil {
			t.Fatal(err)
		}
		for i := 0; i < n; i++ {
			for j := 0; j < n; j++ {
				var s complex128
				for k := 0; k < n; k++ {
					for l := 0; l < n; l++ {
						tik := complex(Ti.At(i, k), Ti.At(i+n, k))
						s += tik * complex(A.At(k, l), 0) * jf.T.At(l, j)
					}
				}
				if d := cmplx.Abs(s - jf.J.At(i, j)); d > 1e-8 {
					t.Errorf("%s: (T^-1 A T - J)[%d,%d] = %g", tc.name, i, j, d)
				}
			}
		}
		if jf.Warning == "" || math.IsInf(jf.Cond, 0) {
			t.Errorf("%s: cond %g, warning %q", tc.name, jf.Cond, jf.Warning)
		}
	}
}

// A diagonalizable matrix gives a diagonal J and T of eigenvectors, no
// warning when they are well conditioned.
func TestJordanFormDiagonalizable(t *testing.T) {
	A := mat.NewDense(2, 2, []float64{0, 1, -4, -0.4})
	jf, err := JordanFormOf(A, 0, 0)
	if err != nil {
		t.Fatal(err)
	}
	if jf.Real || jf.J.At(0, 1) != 0 || jf.Residual > 1e-14 || jf.Warning != "" {
		t.Errorf("J %v residual %g warning %q", jf.J, jf.Residual, jf.Warning)
	}
	if v := jf.J.At(0, 0); cmplx.Abs(v-complex(-0.2, math.Sqrt(3.96))) > 1e-14 {
		t.Errorf("eigenvalue %v", v)
	}
}
