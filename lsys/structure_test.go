package lsys

import (
	"math"
	"math/cmplx"
	"math/rand/v2"
	"sort"
	"testing"

	"gonum.org/v1/gonum/mat"
)

// randDense fills an r x c matrix with standard normal entries.
func randDense(rng *rand.Rand, r, c int) *mat.Dense {
	d := mat.NewDense(r, c, nil)
	for i := 0; i < r; i++ {
		for j := 0; j < c; j++ {
			d.Set(i, j, rng.NormFloat64())
		}
	}
	return d
}

// randOrthogonal is the Q factor of a random Gaussian matrix.
func randOrthogonal(rng *rand.Rand, n int) *mat.Dense {
	var qr mat.QR
	qr.Factorize(randDense(rng, n, n))
	var q mat.Dense
	qr.QTo(&q)
	return &q
}

// freqResp evaluates C (s I - A)^-1 B + D by complex Gaussian elimination
// with partial pivoting (for tests only).
func freqResp(sys *System, s complex128) [][]complex128 {
	n, m, p := sys.N(), sys.M(), sys.P()
	M := make([][]complex128, n)
	for i := range M {
		M[i] = make([]complex128, n+m)
		for j := 0; j < n; j++ {
			M[i][j] = complex(-sys.A.At(i, j), 0)
		}
		M[i][i] += s
		for j := 0; j < m; j++ {
			M[i][n+j] = complex(sys.B.At(i, j), 0)
		}
	}
	for k := 0; k < n; k++ {
		piv := k
		for i := k + 1; i < n; i++ {
			if cmplx.Abs(M[i][k]) > cmplx.Abs(M[piv][k]) {
				piv = i
			}
		}
		M[k], M[piv] = M[piv], M[k]
		for i := k + 1; i < n; i++ {
			f := M[i][k] / M[k][k]
			for j := k; j < n+m; j++ {
				M[i][j] -= f * M[k][j]
			}
		}
	}
	X := make([][]complex128, n)
	for i := n - 1; i >= 0; i-- {
		X[i] = make([]complex128, m)
		for j := 0; j < m; j++ {
			v := M[i][n+j]
			for l := i + 1; l < n; l++ {
				v -= M[i][l] * X[l][j]
			}
			X[i][j] = v / M[i][i]
		}
	}
	G := make([][]complex128, p)
	for i := 0; i < p; i++ {
		G[i] = make([]complex128, m)
		for j := 0; j < m; j++ {
			v := complex(sys.D.At(i, j), 0)
			for l := 0; l < n; l++ {
				v += complex(sys.C.At(i, l), 0) * X[l][j]
			}
			G[i][j] = v
		}
	}
	return G
}

// planted builds a system in Kalman form with parts of sizes k[0..3] whose
// diagonal blocks are upper triangular with the given eigenvalues (real),
// then hides the structure behind a random similarity with condition
// number about cond (orthogonal when cond == 1). The planted structure is
// the reference: Kalman (1963), the canonical structure theorem.
func planted(t *testing.T, rng *rand.Rand, k [4]int, eig [4][]float64, m, p int, cond float64) *System {
	t.Helper()
	n := k[0] + k[1] + k[2] + k[3]
	off := [5]int{0, k[0], k[0] + k[1], k[0] + k[1] + k[2], n}
	A := mat.NewDense(n, n, nil)
	// Allowed nonzero blocks of the Kalman form (row part, column part).
	allowed := map[[2]int]bool{{0, 0}: true, {0, 2}: true, {1, 0}: true, {1, 1}: true, {1, 2}: true, {1, 3}: true, {2, 2}: true, {3, 2}: true, {3, 3}: true}
	for bi := 0; bi < 4; bi++ {
		for bj := 0; bj < 4; bj++ {
			if !allowed[[2]int{bi, bj}] {
				continue
			}
			for i := off[bi]; i < off[bi+1]; i++ {
				for j := off[bj]; j < off[bj+1]; j++ {
					if bi == bj && j < i {
						continue
					}
					A.Set(i, j, rng.NormFloat64())
				}
			}
		}
		for i := off[bi]; i < off[bi+1]; i++ {
			A.Set(i, i, eig[bi][i-off[bi]])
		}
	}
	B := mat.NewDense(n, m, nil)
	for i := 0; i < off[2]; i++ {
		for j := 0; j < m; j++ {
			B.Set(i, j, rng.NormFloat64())
		}
	}
	C := mat.NewDense(p, n, nil)
	for i := 0; i < p; i++ {
		for j := 0; j < n; j++ {
			if (j >= off[0] && j < off[1]) || (j >= off[2] && j < off[3]) {
				C.Set(i, j, rng.NormFloat64())
			}
		}
	}
	s, err := FromMatrices(A, B, C, nil, 0)
	if err != nil {
		t.Fatal(err)
	}
	// Similarity S = U diag(1..cond) V.
	U, V := randOrthogonal(rng, n), randOrthogonal(rng, n)
	D := mat.NewDense(n, n, nil)
	for i := 0; i < n; i++ {
		D.Set(i, i, math.Pow(cond, float64(i)/math.Max(1, float64(n-1))))
	}
	var S mat.Dense
	S.Mul(U, D)
	S.Mul(&S, V)
	out, err := Transform(s, &S)
	if err != nil {
		t.Fatal(err)
	}
	return out
}

func sortedReal(v []complex128) []float64 {
	out := make([]float64, len(v))
	for i, x := range v {
		out[i] = real(x)
	}
	sort.Float64s(out)
	return out
}

func TestStructurePlanted(t *testing.T) {
	rng := rand.New(rand.NewPCG(4, 2026))
	cases := []struct {
		k    [4]int
		eig  [4][]float64
		m, p int
		cond float64
	}{
		{[4]int{3, 0, 0, 0}, [4][]float64{{-1, -2, -3}, nil, nil, nil}, 1, 1, 1},
		{[4]int{2, 1, 1, 1}, [4][]float64{{-1, -2}, {-3}, {0.5}, {-4}}, 1, 1, 10},
		{[4]int{3, 2, 2, 1}, [4][]float64{{-1, -2, -5}, {-3, 2}, {-0.5, -6}, {-4}}, 2, 2, 100},
		{[4]int{4, 0, 3, 0}, [4][]float64{{-1, -2, -5, -7}, nil, {1, -6, -8}, nil}, 1, 2, 10},
		{[4]int{2, 3, 0, 0}, [4][]float64{{-1, -2}, {-3, -9, 3}, nil, nil}, 2, 1, 10},
		{[4]int{1, 0, 0, 4}, [4][]float64{{-1}, nil, nil, {-2, -3, -4, -5}}, 1, 1, 1},
	}
	for ci, c := range cases {
		s := planted(t, rng, c.k, c.eig, c.m, c.p, c.cond)
		st, err := StructureOf(s, 0)
		if err != nil {
			t.Fatalf("case %d: %v", ci, err)
		}
		wantC := c.k[2]+c.k[3] == 0
		wantO := c.k[1]+c.k[3] == 0
		if st.Controllable != wantC || st.Observable != wantO {
			t.Errorf("case %d: controllable %v observable %v, want %v %v (tol %.3g, kept %.3g dropped %.3g)", ci, st.Controllable, st.Observable, wantC, wantO, st.Reach.Tol, st.Reach.Kept, st.Reach.Dropped)
		}
		stab, det := true, true
		for _, v := range append(append([]float64{}, c.eig[2]...), c.eig[3]...) {
			if v >= 0 {
				stab = false
			}
		}
		for _, v := range append(append([]float64{}, c.eig[1]...), c.eig[3]...) {
			if v >= 0 {
				det = false
			}
		}
		if st.Stabilizable != stab || st.Detectable != det {
			t.Errorf("case %d: stabilizable %v detectable %v, want %v %v", ci, st.Stabilizable, st.Detectable, stab, det)
		}
		for i := 0; i < 4; i++ {
			if st.Parts[i].Dim != c.k[i] {
				t.Errorf("case %d: part %q has %d states, want %d", ci, st.Parts[i].Name, st.Parts[i].Dim, c.k[i])
				continue
			}
			got := sortedReal(st.Parts[i].Modes)
			want := append([]float64(nil), c.eig[i]...)
			sort.Float64s(want)
			for j := range want {
				if math.Abs(got[j]-want[j]) > 1e-7*math.Max(1, math.Abs(want[j])) {
					t.Errorf("case %d part %d: modes %v, want %v", ci, i, got, want)
					break
				}
			}
		}
		// Minimal realization: order k[0], same transfer function (Kalman 1963).
		mr, err := Minimal(s, 0)
		if err != nil {
			t.Fatal(err)
		}
		if mr.N() != c.k[0] {
			t.Errorf("case %d: minimal order %d, want %d", ci, mr.N(), c.k[0])
		}
		for _, s0 := range []complex128{0.3 + 1i, 2i, -0.7 + 0.2i} {
			g1, g2 := freqResp(s, s0), freqResp(mr, s0)
			for i := range g1 {
				for j := range g1[i] {
					if cmplx.Abs(g1[i][j]-g2[i][j]) > 1e-8*math.Max(1, cmplx.Abs(g1[i][j])) {
						t.Errorf("case %d: G(%v)[%d,%d] = %v, minimal gives %v", ci, s0, i, j, g1[i][j], g2[i][j])
					}
				}
			}
		}
		// Decomposition: structural zeros of the Kalman form hold.
		dec, err := Decompose(s, 0)
		if err != nil {
			t.Fatal(err)
		}
		checkKalmanZeros(t, ci, dec)
		// Subspaces: dimensions and invariance.
		rsub, err := Reachable(s, 0)
		if err != nil {
			t.Fatal(err)
		}
		usub, err := Unobservable(s, 0)
		if err != nil {
			t.Fatal(err)
		}
		if rsub.Dim != c.k[0]+c.k[1] || usub.Dim != c.k[1]+c.k[3] || !rsub.Invariant || !usub.Invariant {
			t.Errorf("case %d: reachable dim %d inv %v res %.3g, unobservable dim %d inv %v res %.3g", ci, rsub.Dim, rsub.Invariant, rsub.Residual, usub.Dim, usub.Invariant, usub.Residual)
		}
		// Per-mode PBH in the mode table agrees with the planted parts.
		mt, err := Modes(s)
		if err != nil {
			t.Fatal(err)
		}
		for _, md := range mt.Modes {
			part := -1
			for i := 0; i < 4; i++ {
				for _, v := range c.eig[i] {
					if math.Abs(real(md.Eigenvalue)-v) < 1e-6 {
						part = i
					}
				}
			}
			wantR, wantO := part == 0 || part == 1, part == 0 || part == 2
			if md.Reachable != wantR || md.Observable != wantO {
				t.Errorf("case %d: mode %v reachable %v (margin %.3g) observable %v (margin %.3g), want %v %v, tol %.3g", ci, md.Eigenvalue, md.Reachable, md.ReachMargin, md.Observable, md.ObserveMargin, wantR, wantO, md.Tol)
			}
		}
	}
}

func checkKalmanZeros(t *testing.T, ci int, d *Decomposition) {
	t.Helper()
	k := d.Sizes
	off := [5]int{0, k[0], k[0] + k[1], k[0] + k[1] + k[2], k[0] + k[1] + k[2] + k[3]}
	A, B, C := d.System.A, d.System.B, d.System.C
	scale := mat.Norm(A, 2)
	zeroA := [][2]int{{0, 1}, {0, 3}, {2, 0}, {2, 1}, {2, 3}, {3, 0}, {3, 1}}
	for _, z := range zeroA {
		for i := off[z[0]]; i < off[z[0]+1]; i++ {
			for j := off[z[1]]; j < off[z[1]+1]; j++ {
				if math.Abs(A.At(i, j)) > 1e-9*scale {
					t.Errorf("case %d: decomposed A[%d,%d] = %.3g in zero block %v", ci, i, j, A.At(i, j), z)
				}
			}
		}
	}
	for i := off[2]; i < off[4]; i++ {
		for j := 0; j < d.System.M(); j++ {
			if math.Abs(B.At(i, j)) > 1e-9*scale {
				t.Errorf("case %d: decomposed B[%d,%d] = %.3g should be 0", ci, i, j, B.At(i, j))
			}
		}
	}
	for j := off[1]; j < off[2]; j++ {
		for i := 0; i < d.System.P(); i++ {
			if math.Abs(C.At(i, j)) > 1e-9*scale {
				t.Errorf("case %d: decomposed C[%d,%d] = %.3g should be 0", ci, i, j, C.At(i, j))
			}
		}
	}
	for j := off[3]; j < off[4]; j++ {
		for i := 0; i < d.System.P(); i++ {
			if math.Abs(C.At(i, j)) > 1e-9*scale {
				t.Errorf("case %d: decomposed C[%d,%d] = %.3g should be 0", ci, i, j, C.At(i, j))
			}
		}
	}
}

func TestTransformKeepsTransferFunction(t *testing.T) {
	// Fact of the trade: G(s) = C (sI - A)^-1 B + D is invariant under
	// z = T x for any invertible T.
	rng := rand.New(rand.NewPCG(7, 7))
	A := randDense(rng, 5, 5)
	B := randDense(rng, 5, 2)
	C := randDense(rng, 3, 5)
	D := randDense(rng, 3, 2)
	s, _ := FromMatrices(A, B, C, D, 0)
	for trial := 0; trial < 5; trial++ {
		T := randDense(rng, 5, 5)
		g, err := Transform(s, T)
		if err != nil {
			t.Fatal(err)
		}
		for _, s0 := range []complex128{1i, 0.5 + 3i, 10} {
			g1, g2 := freqResp(s, s0), freqResp(g, s0)
			for i := range g1 {
				for j := range g1[i] {
					if cmplx.Abs(g1[i][j]-g2[i][j]) > 1e-10*math.Max(1, cmplx.Abs(g1[i][j])) {
						t.Errorf("G(%v)[%d,%d]: %v vs %v", s0, i, j, g1[i][j], g2[i][j])
					}
				}
			}
		}
	}
	// Nearly singular T is refused with its condition number.
	T := mat.NewDense(5, 5, nil)
	for i := 0; i < 5; i++ {
		T.Set(i, i, 1)
	}
	T.Set(4, 4, 1e-14)
	if _, err := Transform(s, T); err == nil {
		t.Error("a T with condition 1e14 was accepted")
	}
	if _, err := Transform(s, mat.NewDense(4, 4, nil)); err == nil {
		t.Error("a 4x4 T for 5 states was accepted")
	}
}

func TestStaircaseNoInputs(t *testing.T) {
	A := mat.NewDense(2, 2, []float64{-1, 0, 0, -2})
	st, err := ControllabilityStaircase(A, nil, 0)
	if err != nil || st.Dim != 0 {
		t.Fatalf("dim %v err %v", st, err)
	}
}

func TestSpectralAndInvariant(t *testing.T) {
	// Fact of the trade: the stable subspace of a block-triangular A with
	// stable leading block is spanned by the leading coordinates.
	A := mat.NewDense(4, 4, []float64{
		-1, 2, 3, 4,
		-2, -1, 5, 6,
		0, 0, 1, 7,
		0, 0, 0, 2,
	})
	s, _ := FromMatrices(A, nil, nil, nil, 0)
	sub, err := Spectral(s, "stable")
	if err != nil {
		t.Fatal(err)
	}
	if sub.Dim != 2 || !sub.Invariant {
		t.Fatalf("stable subspace dim %d invariant %v residual %g", sub.Dim, sub.Invariant, sub.Residual)
	}
	// Basis lies in span(e1, e2).
	for i := 2; i < 4; i++ {
		for j := 0; j < 2; j++ {
			if math.Abs(sub.Basis.At(i, j)) > 1e-13 {
				t.Errorf("basis[%d,%d] = %g", i, j, sub.Basis.At(i, j))
			}
		}
	}
	for _, v := range sub.Values {
		if math.Abs(real(v)+1) > 1e-13 || math.Abs(math.Abs(imag(v))-2) > 1e-13 {
			t.Errorf("stable eigenvalue %v, want -1 +- 2j", v)
		}
	}
	un, err := Spectral(s, "unstable")
	if err != nil || un.Dim != 2 {
		t.Fatalf("unstable: %v %v", un, err)
	}
	one, err := SpectralAt(s, []complex128{2})
	if err != nil || one.Dim != 1 || math.Abs(real(one.Values[0])-2) > 1e-13 {
		t.Fatalf("spectral at 2: %+v %v", one, err)
	}
	// span(e1, e2) is invariant; span(e1, e3) is not.
	V := mat.NewDense(4, 2, []float64{1, 0, 0, 1, 0, 0, 0, 0})
	ic, err := Invariant(A, V, 0)
	if err != nil || !ic.Subspace.Invariant {
		t.Fatalf("%+v %v", ic, err)
	}
	W := mat.NewDense(4, 2, []float64{1, 0, 0, 0, 0, 1, 0, 0})
	ic, err = Invariant(A, W, 0)
	if err != nil || ic.Subspace.Invariant || ic.Subspace.Residual < 0.1 {
		t.Fatalf("%+v %v", ic, err)
	}
}

func TestStructureSampled(t *testing.T) {
	// Sampled: a mode no input reaches is harmless inside the unit circle
	// and fatal outside it (stabilizability, |z| < 1; Franklin, Powell &
	// Workman 1998, ch. 8).
	for _, c := range []struct {
		z    float64
		stab bool
	}{{0.5, true}, {1.5, false}, {-1.2, false}} {
		A := mat.NewDense(2, 2, []float64{0.9, 0, 0, c.z})
		s, _ := FromMatrices(A, mat.NewDense(2, 1, []float64{1, 0}), mat.NewDense(1, 2, []float64{1, 1}), nil, 0.01)
		st, err := StructureOf(s, 0)
		if err != nil {
			t.Fatal(err)
		}
		if st.Controllable || st.Stabilizable != c.stab || !st.Detectable {
			t.Errorf("z=%v: %+v", c.z, st)
		}
	}
}

func TestInvariantRankDeficientV(t *testing.T) {
	// Two equal columns span one direction: rank 1 (closed form).
	A := mat.NewDense(2, 2, []float64{1, 2, 0, 3})
	V := mat.NewDense(2, 2, []float64{1, 1, 0, 0})
	ic, err := Invariant(A, V, 0)
	if err != nil || ic.Rank != 1 || !ic.Subspace.Invariant {
		t.Errorf("%+v %v", ic, err)
	}
	if _, err := Invariant(A, mat.NewDense(3, 1, nil), 0); err == nil {
		t.Error("V with 3 rows accepted for a 2x2 A")
	}
}

func TestStructureUnitsAndWeakMode(t *testing.T) {
	// The frame of TestZerosUnitsInvariant with the roof mass 2% above half
	// a floor mass. At exactly half (mr = m/2) the second mode has a node at
	// floor 2 (closed form: floor2 <- shaker has the output-decoupling pair
	// -2 +- j sqrt(1996), see TestZerosUnitsInvariant), so with mr = 0.51 m
	// the floor-2 sensor sees that mode only weakly. Verdicts must not
	// depend on units (t, kN, m versus kg, N, m: B differs by 1e-3), and the
	// staircase report must show the weak direction as one small step.
	for _, u := range []struct {
		name     string
		m, mr, k float64
	}{{"t, kN, m", 20, 10.2, 2e4}, {"kg, N, m", 20000, 10200, 2e7}} {
		f := frameModel(t, u.m, u.mr, u.k, 0.002)
		s := sysOf(t, f.A, f.B, mat.NewDense(1, 6, []float64{0, 1, 0, 0, 0, 0}), nil)
		st, err := StructureOf(s, 1e-4)
		if err != nil {
			t.Fatal(err)
		}
		// Before the scaling, tol 1e-4 dropped every input ("0 of 6
		// reachable") in t, kN, m and still saw all six states.
		if !st.Controllable || !st.Observable {
			t.Errorf("%s, tol 1e-4: controllable %v observable %v, want both", u.name, st.Controllable, st.Observable)
		}
		norm := stackedNorm(st.Observe.A, st.Observe.B)
		small := 0
		for _, v := range st.Observe.StepKept {
			if v < 1e-2*norm {
				small++
			} else if v < 0.1*norm {
				t.Errorf("%s: step value %.3g is neither small nor of the size of A (%.3g)", u.name, v, norm)
			}
		}
		if small != 1 {
			t.Errorf("%s: observability steps %v (norm %.3g): want exactly one small step, the weakly seen mode", u.name, st.Observe.StepKept, norm)
		}
		st2, err := StructureOf(s, 1e-2)
		if err != nil {
			t.Fatal(err)
		}
		if !st2.Controllable || st2.Observe.Dim != 4 || len(st2.UnobservableModes) != 2 || cmplx.Abs(st2.UnobservableModes[0]-complex(-2, math.Sqrt(1996))) > 1 {
			t.Errorf("%s, tol 1e-2: observable %d of 6, modes not seen %v; want the weak pair near -2 +- 44.68j", u.name, st2.Observe.Dim, st2.UnobservableModes)
		}
	}
}
