package lsys

import (
	"context"
	"math"
	"testing"

	"gonum.org/v1/gonum/mat"
)

// chain is n equal masses m joined by springs k, the first tied to the
// ground (fixed-free) or not (free-free).
func chain(n int, k, m float64, fixed bool) (K, M *mat.Dense) {
	K = mat.NewDense(n, n, nil)
	M = mat.NewDense(n, n, nil)
	for i := 0; i < n; i++ {
		M.Set(i, i, m)
		if i > 0 {
			K.Set(i, i, K.At(i, i)+k)
			K.Set(i-1, i-1, K.At(i-1, i-1)+k)
			K.Set(i, i-1, -k)
			K.Set(i-1, i, -k)
		}
	}
	if fixed {
		K.Set(0, 0, K.At(0, 0)+k)
	}
	return K, M
}

func denseToSparse(a *mat.Dense) *SparseSym {
	n, _ := a.Dims()
	var ts []Triplet
	for i := 0; i < n; i++ {
		for j := 0; j <= i; j++ {
			if v := a.At(i, j); v != 0 {
				ts = append(ts, Triplet{i, j, v})
			}
		}
	}
	s, err := NewSparseSym(n, ts)
	if err != nil {
		panic(err)
	}
	return s
}

// The fixed-free chain of n masses m and springs k has
// w_j = 2 sqrt(k/m) sin((2j - 1) pi / (2 (2n + 1))), j = 1..n
// (from memory; checked numerically here against the dense solver at
// several n, agreeing to rounding).
func TestChainClosedForm(t *testing.T) {
	const tol = 1e-12
	for _, n := range []int{1, 2, 3, 5, 10, 50, 101} {
		k, m := 3.7e4, 2.3
		K, M := chain(n, k, m, true)
		sm, err := UndampedModes(M, K)
		if err != nil {
			t.Fatal(err)
		}
		for j := 1; j <= n; j++ {
			want := 2 * math.Sqrt(k/m) * math.Sin(float64(2*j-1)*math.Pi/float64(2*(2*n+1)))
			if got := sm.Omega[j-1]; math.Abs(got-want) > tol*math.Sqrt(4*k/m) {
				t.Errorf("n=%d mode %d: w = %.15g, closed form %.15g", n, j, got, want)
			}
		}
		if sm.Orthogonality > 1e-12 {
			t.Errorf("n=%d: Phi^T M Phi - I = %g", n, sm.Orthogonality)
		}
		for _, r := range sm.Rigid {
			if r {
				t.Errorf("n=%d: a grounded chain has no rigid-body mode", n)
			}
		}
	}
}

// A free-free chain has exactly one rigid-body mode (uniform translation);
// with the translation as direction, the effective masses sum to the total
// mass and the rigid mode carries all of it (common practice; exact here).
func TestFreeChainRigidAndMass(t *testing.T) {
	const n = 12
	K, M := chain(n, 1e3, 0.5, false)
	s, err := NewSecondOrder(M, nil, K, mat.NewDense(n, 1, nil), nil, nil)
	if err != nil {
		t.Fatal(err)
	}
	R := mat.NewDense(n, 1, nil)
	for i := 0; i < n; i++ {
		R.Set(i, 0, 1)
	}
	sm, err := StructuralModesOf(s, R, []string{"x"})
	if err != nil {
		t.Fatal(err)
	}
	rigid := 0
	for _, r := range sm.Rigid {
		if r {
			rigid++
		}
	}
	if rigid != 1 || !sm.Rigid[0] {
		t.Fatalf("rigid modes %v, want the first only", sm.Rigid)
	}
	sum := 0.0
	for _, e := range sm.EffectiveMass[0] {
		sum += e
	}
	if math.Abs(sum-n*0.5) > 1e-12*n || math.Abs(sm.EffectiveMass[0][0]-n*0.5) > 1e-12*n {
		t.Errorf("effective masses sum %g (rigid %g), total %g", sum, sm.EffectiveMass[0][0], n*0.5)
	}
	if c := sm.Cumulative[0][n-1]; math.Abs(c-1) > 1e-12 {
		t.Errorf("cumulative fraction %g, want 1", c)
	}
}

// Lanczos against the dense solver on the same sparse chain and lattices.
func TestLanczosAgainstDense(t *testing.T) {
	for _, tc := range []struct {
		dims     []int
		grounded bool
		k        int
	}{{[]int{60}, true, 8}, {[]int{9, 7}, true, 12}, {[]int{5, 4, 6}, true, 10}, {[]int{8, 6}, false, 6}} {
		K, M, err := SpringLattice(tc.dims, 2e3, 0.7, tc.grounded)
		if err != nil {
			t.Fatal(err)
		}
		dense, err := UndampedModes(sparseToDense(M), sparseToDense(K))
		if err != nil {
			t.Fatal(err)
		}
		sm, err := SparseModes(context.Background(), K, M, SparseModeOptions{Count: tc.k})
		if err != nil {
			t.Fatalf("%v: %v", tc.dims, err)
		}
		top := dense.Lambda[len(dense.Lambda)-1]
		for j := 0; j < tc.k; j++ {
			if d := math.Abs(sm.Lambda[j] - dense.Lambda[j]); d > 1e-9*top {
				t.Errorf("%v mode %d: Lanczos w^2 %.12g, dense %.12g", tc.dims, j+1, sm.Lambda[j], dense.Lambda[j])
			}
			if sm.Rigid[j] != dense.Rigid[j] {
				t.Errorf("%v mode %d: rigid %v vs dense %v", tc.dims, j+1, sm.Rigid[j], dense.Rigid[j])
			}
		}
		if sm.Orthogonality > 1e-10 || sm.Sparse.Residual > 1e-10 {
			t.Errorf("%v: orthogonality %g, residual %g", tc.dims, sm.Orthogonality, sm.Sparse.Residual)
		}
		t.Logf("%v: restarts %d solves %d L nnz %d shift %g (%s)", tc.dims, sm.Sparse.Restarts, sm.Sparse.Solves, sm.Sparse.FactorNNZ, sm.Sparse.Shift, sm.Sparse.ShiftNote)
	}
}

func sparseToDense(a *SparseSym) *mat.Dense {
	d := mat.NewDense(a.N, a.N, nil)
	for j := 0; j < a.N; j++ {
		for p := a.ColPtr[j]; p < a.ColPtr[j+1]; p++ {
			d.Set(int(a.RowIdx[p]), j, a.Val[p])
		}
	}
	return d
}
