package lsys

import (
	"math"
	"math/cmplx"
	"testing"

	"gonum.org/v1/gonum/mat"
)

// The 3x3 assignment example with optimum 5: rows 1, 2, 3 take columns
// 2, 1, 3 (a common textbook example, from memory).
func TestHungarian(t *testing.T) {
	got := hungarian([][]float64{{4, 1, 3}, {2, 0, 5}, {3, 2, 2}})
	want := []int{1, 0, 2}
	for i := range want {
		if got[i] != want[i] {
			t.Fatalf("assignment %v, want %v", got, want)
		}
	}
	// Ties and a 1x1 case.
	if got := hungarian([][]float64{{7}}); got[0] != 0 {
		t.Errorf("1x1: %v", got)
	}
	if got := hungarian([][]float64{{0, 0}, {0, 0}}); got[0] == got[1] {
		t.Errorf("ties must still give a permutation: %v", got)
	}
	if got := hungarian([][]float64{{math.NaN(), 1}, {1, math.NaN()}}); got[0] == got[1] {
		t.Errorf("NaN costs must still give a permutation: %v", got)
	}
}

// Two modes that cross: sorted by real part they would swap at the
// crossing; matched, each branch keeps going straight.
func TestLocusFollowsCrossingModes(t *testing.T) {
	var vals []float64
	var eig [][]complex128
	for k := 1.0; k <= 10; k++ {
		a, b := complex(-k, 0.5), complex(-(11-k), -0.5)
		vals = append(vals, k)
		if real(a) > real(b) { // present them sorted, as an eigen solver might
			eig = append(eig, []complex128{a, b})
		} else {
			eig = append(eig, []complex128{b, a})
		}
	}
	l, err := NewLocus("k", vals, eig, 0)
	if err != nil {
		t.Fatal(err)
	}
	for _, br := range l.Branches {
		for k := 1; k < len(br); k++ {
			if d := cmplx.Abs(br[k] - br[k-1]); math.Abs(d-1) > 1e-12 {
				t.Fatalf("branch jumps by %v between steps %d and %d: %v", d, k, k+1, br)
			}
		}
	}
	if _, err := NewLocus("k", []float64{1, 2}, [][]complex128{{1}, {1, 2}}, 0); err == nil {
		t.Error("changing mode count accepted")
	}
}

// d lambda/dk for A = [[0, 1], [-k, -c]]: lambda^2 + c lambda + k = 0 gives
// d lambda/dk = -1/(2 lambda + c) (implicit differentiation, common practice).
func TestEigenvalueSensitivity(t *testing.T) {
	k, c := 4.0, 0.4
	A := mat.NewDense(2, 2, []float64{0, 1, -k, -c})
	dA := mat.NewDense(2, 2, []float64{0, 0, -1, 0})
	s, err := EigenvalueSensitivity(A, []*mat.Dense{dA}, []string{"k"}, []float64{k}, 0)
	if err != nil {
		t.Fatal(err)
	}
	if len(s.Eigenvalues) != 1 || imag(s.Eigenvalues[0]) <= 0 {
		t.Fatalf("eigenvalues %v", s.Eigenvalues)
	}
	l := s.Eigenvalues[0]
	if want := -1 / (2*l + complex(c, 0)); cmplx.Abs(s.D[0][0]-want) > 1e-14 {
		t.Errorf("d lambda/dk = %v, want %v", s.D[0][0], want)
	}
	if r := s.Relative(0, 0); cmplx.Abs(r-s.D[0][0]*complex(k/cmplx.Abs(l), 0)) > 1e-15 {
		t.Errorf("relative %v", r)
	}
	if _, err := EigenvalueSensitivity(A, []*mat.Dense{mat.NewDense(3, 3, nil)}, []string{"k"}, []float64{k}, 0); err == nil {
		t.Error("shape mismatch accepted")
	}
	if s.String() == "" {
		t.Error("empty text")
	}
}
