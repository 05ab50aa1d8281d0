package lsys

import (
	"math"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/mat"
)

// randomStable returns an n x n matrix with eigenvalues in the open left
// half plane (sampled: inside the unit disc), a random orthogonal-ish
// similarity of a shifted random matrix (fixed seed).
func designStable(n int, seed uint64, sampled bool) *mat.Dense {
	r := rand.New(rand.NewPCG(seed, 7))
	A := mat.NewDense(n, n, nil)
	for i := 0; i < n; i++ {
		for j := 0; j < n; j++ {
			A.Set(i, j, r.NormFloat64()/math.Sqrt(float64(n)))
		}
	}
	if sampled {
		A.Scale(0.45, A)
		return A
	}
	for i := 0; i < n; i++ {
		A.Set(i, i, A.At(i, i)-1.5)
	}
	return A
}

func designMat(r, c int, seed uint64) *mat.Dense {
	g := rand.New(rand.NewPCG(seed, 11))
	M := mat.NewDense(r, c, nil)
	for i := 0; i < r; i++ {
		for j := 0; j < c; j++ {
			M.Set(i, j, g.NormFloat64())
		}
	}
	return M
}

func TestLyapunovScalar(t *testing.T) {
	// a x + x a + q = 0 gives x = -q/(2a); a x a - x + q = 0 gives
	// x = q/(1 - a^2) (closed forms).
	s, err := LyapunovEq(mat.NewDense(1, 1, []float64{-2}), mat.NewDense(1, 1, []float64{3}), false)
	if err != nil || math.Abs(s.X.At(0, 0)-0.75) > 1e-15 {
		t.Fatalf("continuous scalar: %v %v", s, err)
	}
	s, err = LyapunovEq(mat.NewDense(1, 1, []float64{0.5}), mat.NewDense(1, 1, []float64{3}), true)
	if err != nil || math.Abs(s.X.At(0, 0)-4) > 1e-15 {
		t.Fatalf("sampled scalar: %v %v", s.X.At(0, 0), err)
	}
}

func TestLyapunovRandomResiduals(t *testing.T) {
	for _, n := range []int{2, 5, 17, 50, 200} {
		for _, sampled := range []bool{false, true} {
			A := designStable(n, uint64(n), sampled)
			B := designMat(n, 3, uint64(n)+1)
			var Q mat.Dense
			Q.Mul(B, B.T())
			s, err := LyapunovEq(A, &Q, sampled)
			if err != nil {
				t.Fatal(err)
			}
			if s.Residual > 1e-13 || s.Singular {
				t.Errorf("n=%d sampled=%v: residual %g singular %v", n, sampled, s.Residual, s.Singular)
			}
			t.Logf("n=%d sampled=%v: residual %.2g", n, sampled, s.Residual)
			C := designMat(n, 4, uint64(n)+2)
			Bm := designStable(4, 3, sampled)
			y, err := SylvesterEq(A, Bm, C, sampled)
			if err != nil {
				t.Fatal(err)
			}
			if y.Residual > 1e-13 || y.Singular {
				t.Errorf("Sylvester n=%d sampled=%v: residual %g", n, sampled, y.Residual)
			}
		}
	}
}
