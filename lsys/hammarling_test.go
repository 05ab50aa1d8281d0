package lsys

import (
	"math"
	"testing"

	"gonum.org/v1/gonum/mat"
)

func TestHammarlingFactor(t *testing.T) {
	// 1/(s+1): P = 1/2, so the factor is 1/sqrt(2) (closed form).
	L, err := LyapunovFactor(d1(-1), d1(1), false)
	if err != nil || math.Abs(math.Abs(L.At(0, 0))-1/math.Sqrt2) > 1e-15 {
		t.Fatalf("L = %v (%v)", L, err)
	}
	for _, n := range []int{2, 7, 30, 120} {
		for _, sampled := range []bool{false, true} {
			A := designStable(n, uint64(n+300), sampled)
			B := designMat(n, 2, uint64(n+301))
			L, err := LyapunovFactor(A, B, sampled)
			if err != nil {
				t.Fatal(err)
			}
			var Q mat.Dense
			Q.Mul(B, B.T())
			s, err := LyapunovEq(A, &Q, sampled)
			if err != nil {
				t.Fatal(err)
			}
			var LLt mat.Dense
			LLt.Mul(L, L.T())
			e := relDiff(&LLt, s.X)
			t.Logf("n=%d sampled=%v: L L^T vs Bartels-Stewart %.2g", n, sampled, e)
			if e > 1e-12 {
				t.Errorf("n=%d sampled=%v: L L^T differs from the Bartels-Stewart solution by %g", n, sampled, e)
			}
		}
	}
}
