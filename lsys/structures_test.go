package lsys

import (
	"context"
	"errors"
	"math"
	"reflect"
	"strings"
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
		if sm.Orthogonality > 1e-10 || sm.Sparse.Residual > 1e-9 {
			t.Errorf("%v: orthogonality %g, residual %g", tc.dims, sm.Orthogonality, sm.Sparse.Residual)
		}
		t.Logf("%v: restarts %d solves %d L nnz %d shift %g (%s)", tc.dims, sm.Sparse.Restarts, sm.Sparse.Solves, sm.Sparse.FactorNNZ, sm.Sparse.Shift, sm.Sparse.ShiftNote)
	}
}

func sparseToDense(a *SparseSym) *mat.Dense { return sparseDense(a) }

// The modal model with every mode kept reproduces the full model at any
// frequency (classical damping); with few modes and the static correction
// its zero-frequency gain of displacement outputs is exact.
func TestModalModel(t *testing.T) {
	const n = 8
	K, M := chain(n, 5e3, 1.5, true)
	F := mat.NewDense(n, 1, nil)
	F.Set(n-1, 0, 1)
	out := mat.NewDense(2, n, nil)
	out.Set(0, n-1, 1)
	out.Set(1, 3, 1)
	s, err := NewSecondOrder(M, nil, K, F, out, []string{MeasureDisplacement, MeasureAcceleration})
	if err != nil {
		t.Fatal(err)
	}
	if s, err = s.WithRayleigh(10, 0.02, 100, 0.03); err != nil {
		t.Fatal(err)
	}
	full, err := s.System()
	if err != nil {
		t.Fatal(err)
	}
	all, err := NewModalModel(context.Background(), s, n, false)
	if err != nil {
		t.Fatal(err)
	}
	for _, w := range []float64{0.3, 7, 31, 120} {
		a, _ := GainAt(full, w)
		b, _ := GainAt(all.Sys, w)
		for i := range a {
			if d := cmplxAbs(a[i] - b[i]); d > 1e-9*cmplxAbs(a[i]) {
				t.Errorf("all modes, w=%g channel %d: %v vs %v", w, i, a[i], b[i])
			}
		}
	}
	part, err := NewModalModel(context.Background(), s, 2, true)
	if err != nil {
		t.Fatal(err)
	}
	a, _ := GainAt(full, 0)
	b, _ := GainAt(part.Sys, 0)
	if d := cmplxAbs(a[0] - b[0]); d > 1e-12*cmplxAbs(a[0]) {
		t.Errorf("static correction: DC gain %v vs full %v", b[0], a[0])
	}
	if part.Check == nil || !(part.Check.MaxRelErr >= 0) {
		t.Fatalf("no frequency check: %+v", part.Check)
	}
	// Rayleigh: each mode's ratio is alpha/(2w) + beta w/2.
	sd := s.Damping
	for j, w := range part.Modes.Omega {
		want := sd.Alpha/(2*w) + sd.Beta*w/2
		if math.Abs(part.Modes.Damping[j]-want) > 1e-12 {
			t.Errorf("mode %d: ratio %g, Rayleigh %g", j+1, part.Modes.Damping[j], want)
		}
	}
	if math.Abs(sd.Alpha/20+sd.Beta*5-0.02) > 1e-15 || math.Abs(sd.Alpha/200+sd.Beta*50-0.03) > 1e-15 {
		t.Errorf("Rayleigh fit misses its two points: alpha %g beta %g", sd.Alpha, sd.Beta)
	}
	// Modal damping reproduces the ratios given.
	md, err := s.WithModalDamping([]float64{0.05})
	if err != nil {
		t.Fatal(err)
	}
	mm, err := StructuralModesOf(md, nil, nil)
	if err != nil {
		t.Fatal(err)
	}
	for j, z := range mm.Damping {
		if math.Abs(z-0.05) > 1e-12 {
			t.Errorf("modal damping: mode %d ratio %g", j+1, z)
		}
	}
	if mm.Coupling > 1e-10 {
		t.Errorf("modal damping is classical, coupling %g", mm.Coupling)
	}
}

// A simply supported Euler-Bernoulli beam in 40 cubic (Hermite) elements
// with consistent mass: the lowest frequencies approach
// w_j = (j pi / L)^2 sqrt(EI / (rho A)) (the classical result, from memory)
// with an error of order (j h / L)^4: measured 2e-6 relative at mode 3, so
// 1e-5 for the first three.
func TestSimplySupportedBeam(t *testing.T) {
	const (
		ne  = 40
		L   = 12.0
		EI  = 2.1e11 * 8.3e-6
		rhA = 7850 * 5.4e-3
	)
	h := L / ne
	nd := 2 * (ne + 1)
	K := mat.NewDense(nd, nd, nil)
	M := mat.NewDense(nd, nd, nil)
	ke := []float64{12, 6 * h, -12, 6 * h, 6 * h, 4 * h * h, -6 * h, 2 * h * h, -12, -6 * h, 12, -6 * h, 6 * h, 2 * h * h, -6 * h, 4 * h * h}
	me := []float64{156, 22 * h, 54, -13 * h, 22 * h, 4 * h * h, 13 * h, -3 * h * h, 54, 13 * h, 156, -22 * h, -13 * h, -3 * h * h, -22 * h, 4 * h * h}
	for e := 0; e < ne; e++ {
		for a := 0; a < 4; a++ {
			for b := 0; b < 4; b++ {
				i, j := 2*e+a, 2*e+b
				K.Set(i, j, K.At(i, j)+EI/(h*h*h)*ke[4*a+b])
				M.Set(i, j, M.At(i, j)+rhA*h/420*me[4*a+b])
			}
		}
	}
	// Pinned at both ends: drop the two end deflections.
	keep := []int{}
	for i := 0; i < nd; i++ {
		if i != 0 && i != nd-2 {
			keep = append(keep, i)
		}
	}
	sub := func(a *mat.Dense) *mat.Dense {
		o := mat.NewDense(len(keep), len(keep), nil)
		for x, i := range keep {
			for y, j := range keep {
				o.Set(x, y, a.At(i, j))
			}
		}
		return o
	}
	sm, err := UndampedModes(sub(M), sub(K))
	if err != nil {
		t.Fatal(err)
	}
	for j := 1; j <= 3; j++ {
		want := math.Pow(float64(j)*math.Pi/L, 2) * math.Sqrt(EI/rhA)
		if rel := math.Abs(sm.Omega[j-1]-want) / want; rel > 1e-5 {
			t.Errorf("beam mode %d: %.10g rad/s, Euler-Bernoulli %.10g (rel %.1e)", j, sm.Omega[j-1], want, rel)
		}
	}
}

// Matrix Market: what WriteMatrixMarket writes reads back exactly.
func TestMatrixMarketRoundTrip(t *testing.T) {
	K, _, err := SpringLattice([]int{4, 3}, 1.25e3, 1, true)
	if err != nil {
		t.Fatal(err)
	}
	var b strings.Builder
	if err := WriteMatrixMarket(&b, K); err != nil {
		t.Fatal(err)
	}
	back, err := ReadMatrixMarket(strings.NewReader(b.String()))
	if err != nil {
		t.Fatal(err)
	}
	if !reflect.DeepEqual(back, K) {
		t.Errorf("round trip differs")
	}
	for _, bad := range []string{"", "%%MatrixMarket matrix array real general\n2 2\n", "%%MatrixMarket matrix coordinate real symmetric\n2 2 1\n1 2 3\n", "%%MatrixMarket matrix coordinate real general\n2 2 2\n1 2 3\n2 1 4\n", "%%MatrixMarket matrix coordinate real symmetric\n2 2 3\n1 1 1\n"} {
		if _, err := ReadMatrixMarket(strings.NewReader(bad)); err == nil {
			t.Errorf("accepted %q", bad)
		}
	}
}

// Both sparse factorizations solve the shifted (indefinite) stiffness to
// rounding and count the same eigenvalues below the shift (inertia).
func TestSparseFactorizations(t *testing.T) {
	for _, dims := range [][]int{{1}, {2}, {60}, {9, 7}, {30, 30}, {5, 4, 6}, {12, 13, 11}} {
		K, M, err := SpringLattice(dims, 2e3, 0.7, true)
		if err != nil {
			t.Fatal(err)
		}
		A := K.Combine(-3000, M) // between eigenvalues: indefinite for all but the smallest
		perm := NestedDissection(A)
		up, err := FactorLDL(context.Background(), A, perm, nil)
		if err != nil {
			t.Fatal(err)
		}
		mf, err := FactorSupernodal(context.Background(), A, perm, nil)
		if err != nil {
			t.Fatal(err)
		}
		if up.Negative != mf.Negative {
			t.Errorf("%v: %d negative pivots up-looking, %d multifrontal", dims, up.Negative, mf.Negative)
		}
		if A.N <= 400 {
			dense, err := UndampedModes(sparseToDense(M), sparseToDense(K))
			if err != nil {
				t.Fatal(err)
			}
			below := 0
			for _, l := range dense.Lambda {
				if l < 3000 {
					below++
				}
			}
			if below != mf.Negative {
				t.Errorf("%v: inertia %d, dense eigenvalues below the shift %d", dims, mf.Negative, below)
			}
		}
		for name, f := range map[string]ldlFactor{"up-looking": up, "multifrontal": mf} {
			b := make([]float64, A.N)
			for i := range b {
				b[i] = math.Sin(float64(i) + 1)
			}
			x := append([]float64(nil), b...)
			tmp := make([]float64, A.N)
			f.Solve(x, tmp)
			A.MulVec(tmp, x)
			res, xn := 0.0, 0.0
			for i := range b {
				res = math.Max(res, math.Abs(tmp[i]-b[i]))
				xn = math.Max(xn, math.Abs(x[i]))
			}
			// Backward error relative to ||A|| ||x||, a small multiple of
			// machine epsilon for a stable solve.
			if rel := res / (A.Norm1() * xn); rel > 1e-13 {
				t.Errorf("%v %s: residual %g relative", dims, name, rel)
			}
		}
	}
}

// An interrupt (a cancelled context) stops the sparse path with the
// context's error.
func TestSparseModesInterrupt(t *testing.T) {
	K, M, err := SpringLattice([]int{40, 40}, 1, 1, true)
	if err != nil {
		t.Fatal(err)
	}
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	if _, err := SparseModes(ctx, K, M, SparseModeOptions{Count: 5}); !errors.Is(err, context.Canceled) {
		t.Errorf("got %v, want context.Canceled", err)
	}
}

// The sparse modal model equals the dense one on the same small model
// (same modes, same modal damping, the static correction from K^-1 F
// against the sum over the truncated modes).
func TestSparseModalModel(t *testing.T) {
	K, M, err := SpringLattice([]int{7, 5}, 4e3, 0.8, true)
	if err != nil {
		t.Fatal(err)
	}
	n := K.N
	F := mat.NewDense(n, 2, nil)
	F.Set(n-1, 0, 1)
	F.Set(10, 1, 1)
	out := mat.NewDense(2, n, nil)
	out.Set(0, n-1, 1)
	out.Set(1, 17, 1)
	measure := []string{MeasureDisplacement, MeasureAcceleration}
	s, err := NewSecondOrder(sparseToDense(M), nil, sparseToDense(K), F, out, measure)
	if err != nil {
		t.Fatal(err)
	}
	if s, err = s.WithModalDamping([]float64{0.03}); err != nil {
		t.Fatal(err)
	}
	for _, static := range []bool{false, true} {
		dense, err := NewModalModel(context.Background(), s, 4, static)
		if err != nil {
			t.Fatal(err)
		}
		sparse, err := NewSparseModalModel(context.Background(), K, M, 4, static, SparseModalSpec{F: F, Out: out, Measure: measure, Ratios: []float64{0.03}}, nil)
		if err != nil {
			t.Fatal(err)
		}
		for _, w := range []float64{0, 5, 40, 90} {
			a, _ := GainAt(dense.Sys, w)
			b, _ := GainAt(sparse.Sys, w)
			for i := range a {
				if d := cmplxAbs(a[i] - b[i]); d > 1e-8*cmplxAbs(a[i])+1e-14 {
					t.Errorf("static %v, w=%g, channel %d: dense %v, sparse %v", static, w, i, a[i], b[i])
				}
			}
		}
	}
	// With one ratio for all modes, a model this small is compared with its
	// full form, and finds the error the dense path finds.
	sp, err := NewSparseModalModel(context.Background(), K, M, 6, true, SparseModalSpec{F: F, Out: out, Measure: measure, Ratios: []float64{0.03}}, nil)
	if err != nil {
		t.Fatal(err)
	}
	dn, err := NewModalModel(context.Background(), s, 6, true)
	if err != nil {
		t.Fatal(err)
	}
	if sp.Check == nil || dn.Check == nil || math.Abs(sp.Check.MaxRelErr-dn.Check.MaxRelErr) > 1e-6*dn.Check.MaxRelErr {
		t.Errorf("frequency comparison: sparse %v, dense %v", sp.Check != nil, dn.Check != nil)
	}
	if _, err := NewSparseModalModel(context.Background(), K, M, 40, false, SparseModalSpec{F: F}, nil); err == nil {
		t.Error("40 modes of 35 DOF accepted")
	}
}

// Sizes down to one DOF, all modes asked (the basis then spans the whole
// space), lowest and nearest a shift, against the dense solver.
func TestSparseModesSmall(t *testing.T) {
	const tol = 1e-10
	for _, n := range []int{1, 2, 3, 5, 8, 13} {
		K, M, err := SpringLattice([]int{n}, 3, 1, true)
		if err != nil {
			t.Fatal(err)
		}
		d, err := UndampedModes(sparseToDense(M), sparseToDense(K))
		if err != nil {
			t.Fatal(err)
		}
		for _, k := range []int{1, (n + 1) / 2, n} {
			sm, err := SparseModes(context.Background(), K, M, SparseModeOptions{Count: k})
			if err != nil {
				t.Errorf("n=%d k=%d: %v", n, k, err)
				continue
			}
			for j := 0; j < k; j++ {
				if r := math.Abs(sm.Lambda[j]-d.Lambda[j]) / d.Lambda[j]; r > tol {
					t.Errorf("n=%d k=%d mode %d: %g, dense %g", n, k, j+1, sm.Lambda[j], d.Lambda[j])
				}
			}
		}
		// The mode nearest the middle eigenvalue's neighbourhood is that
		// eigenvalue.
		mid := d.Lambda[n/2]
		sm, err := SparseModes(context.Background(), K, M, SparseModeOptions{Count: 1, Shift: mid * (1 + 1e-3), Nearest: true})
		if err != nil {
			t.Fatalf("n=%d near: %v", n, err)
		}
		if r := math.Abs(sm.Lambda[0]-mid) / mid; r > tol {
			t.Errorf("n=%d near %g: got %g", n, mid, sm.Lambda[0])
		}
	}
}
