package lsys

import (
	"context"
	"errors"
	"fmt"
	"math"
	"sort"

	"gonum.org/v1/gonum/mat"
)

// SparseStats says how a sparse eigen-solution was found and what it cost.
type SparseStats struct {
	N             int     // degrees of freedom
	NNZK          int     // stored entries of K (both triangles)
	FactorNNZ     int     // entries of L below the diagonal
	Ordering      string  // the fill-reducing order used
	Factorization string  // the sparse factorization used
	Shift         float64 // sigma (rad/s squared) actually used
	ShiftNote     string  // why the shift differs from the one asked, if it does
	Below         int     // eigenvalues below the shift (negative pivots; Sylvester's inertia)
	Basis         int     // Lanczos basis size
	Restarts      int
	Solves        int     // applications of (K - sigma M)^-1
	Tol           float64 // convergence tolerance on the Ritz residual, relative
	Residual      float64 // largest ||K phi - w^2 M phi|| / (||K||_1 ||phi||) over the modes
	Memory        int64   // bytes held by the matrices, the factor and the basis
	FactorMem     int64
	FactorWork    int64   // peak bytes of fronts and pending updates while factoring
	MinPivot      float64 // smallest |d_k| relative to the largest diagonal entry
	Nearest       bool    // modes nearest the shift (rather than the lowest)
	Requested     int
	Converged     int
}

// SparseModeOptions choose what SparseModes computes.
type SparseModeOptions struct {
	Count int // modes wanted (k)
	// Shift is sigma in rad^2/s^2. With Nearest false (the lowest modes) it
	// should lie at or below the lowest eigenvalue; 0 is the usual choice.
	Shift   float64
	Nearest bool    // the Count modes nearest Shift rather than the lowest
	Tol     float64 // relative Ritz residual; 0 means LanczosTol
	// Progress, when not nil, is told the stage, its fraction done and the
	// modes converged so far.
	Progress func(stage string, frac float64, converged int)
	DOFNames []string
}

// LanczosTol is the default convergence test: a Ritz pair (theta, y) of the
// shift-inverted operator is accepted when |beta_m e_m^T y| <= LanczosTol
// |theta| (Parlett, The Symmetric Eigenvalue Problem, 1980, section 13.2),
// which bounds the relative error of w^2 near the shift by about LanczosTol.
const LanczosTol = 1e-10

// SparseModes finds the lowest (or nearest-to-the-shift) undamped modes of
// a large sparse model K phi = w^2 M phi by shift-and-invert Lanczos with
// thick restarts (Wu & Simon, "Thick-restart Lanczos method for large
// symmetric eigenvalue problems", SIAM J. Matrix Anal. Appl. 22, 2000) in
// the M-inner product, the operator (K - sigma M)^-1 M applied through a
// sparse L D L^T factorization in a nested-dissection order
// (NestedDissection), as in Grimes, Lewis & Simon (SIAM J. Matrix Anal.
// Appl. 15, 1994). The factorization is multifrontal (FactorSupernodal)
// when the fronts are dense enough to profit (denseFronts), else
// up-looking (FactorLDL). Full reorthogonalization (two Gram-Schmidt passes) keeps
// the basis M-orthonormal. When K is singular to working precision at a
// zero shift (rigid-body modes) the shift moves to -1e-8 ||K||_1/||M||_1 and
// the stats say so. The start vector is fixed, so the same input gives the
// same output.
func SparseModes(ctx context.Context, K, M *SparseSym, opt SparseModeOptions) (*StructuralModes, error) {
	if K.N != M.N {
		return nil, fmt.Errorf("K is %dx%d but M is %dx%d", K.N, K.N, M.N, M.N)
	}
	n := K.N
	k := opt.Count
	if k <= 0 {
		return nil, errors.New("ask for at least one mode")
	}
	if k > n {
		return nil, fmt.Errorf("%d modes asked of a model with %d degrees of freedom", k, n)
	}
	for j, d := range M.Diag() {
		if !(d > 0) {
			return nil, fmt.Errorf("M[%d, %d] = %g: a positive definite mass matrix has a positive diagonal", j+1, j+1, d)
		}
	}
	tol := opt.Tol
	if tol <= 0 {
		tol = LanczosTol
	}
	progress := func(stage string, frac float64, conv int) {
		if opt.Progress != nil {
			opt.Progress(stage, frac, conv)
		}
	}
	scale := K.Norm1() / M.Norm1()
	st := &SparseStats{N: n, NNZK: K.NNZ(), Shift: opt.Shift, Tol: tol, Nearest: opt.Nearest, Requested: k,
		Ordering: "nested dissection on level structures (George 1973; George & Liu 1981)"}
	progress("ordering", 0, 0)
	A := K.Combine(-opt.Shift, M)
	perm := NestedDissection(A)
	if err := ctx.Err(); err != nil {
		return nil, err
	}
	factor := func() (ldlFactor, error) {
		prog := func(f float64) { progress("factorizing", f, 0) }
		if denseFronts(A, perm) {
			st.Factorization = "multifrontal L D L^T on relaxed supernodes (Duff & Reid 1983; Ashcraft & Grimes 1989)"
			return FactorSupernodal(ctx, A, perm, prog)
		}
		st.Factorization = "up-looking L D L^T (Davis 2005)"
		return FactorLDL(ctx, A, perm, prog)
	}
	F, err := factor()
	var sp *SingularPivotError
	for tries := 0; errors.As(err, &sp) && tries < 3; tries++ {
		// On an eigenvalue (or rigid-body modes at 0): move the shift by a
		// small amount below, relative to the problem's scale.
		old := st.Shift
		st.Shift -= 1e-8 * scale * math.Pow(10, float64(tries))
		st.ShiftNote = fmt.Sprintf("K - sigma M was singular at sigma = %.6g (%v); shifted to %.6g", old, sp, st.Shift)
		A = K.Combine(-st.Shift, M)
		F, err = factor()
	}
	if err != nil {
		return nil, err
	}
	st.FactorNNZ, st.FactorMem, st.FactorWork = F.NNZ(), F.Bytes(), F.peakWork()
	st.Below, st.MinPivot = F.negative(), F.minPivot()
	A = nil

	m := 2*k + 1
	if m < k+20 {
		m = k + 20
	}
	if m > n {
		m = n
	}
	st.Basis = m
	// What is held while iterating; the factorization's fronts and pending
	// updates (FactorWork) come and go before.
	st.Memory = K.Bytes() + M.Bytes() + F.Bytes() + int64(2*(m+1)*n*8) + int64(4*n*8)
	if w := K.Bytes() + M.Bytes() + F.Bytes() + F.peakWork(); w > st.Memory {
		st.Memory = w
	}
	V := make([][]float64, m+1)
	MV := make([][]float64, m+1)
	for i := range V {
		V[i] = make([]float64, n)
		MV[i] = make([]float64, n)
	}
	tmp := make([]float64, n)
	w := make([]float64, n)
	mw := make([]float64, n)
	T := mat.NewDense(m, m, nil)
	h := make([]float64, m+1)

	// A fixed pseudo-random start (a linear congruential sequence).
	seed := uint64(0x9E3779B97F4A7C15)
	rnd := func() float64 {
		seed = seed*6364136223846793005 + 1442695040888963407
		return float64(seed>>11)/float64(1<<53) - 0.5
	}
	newVector := func(j int) error {
		// A random vector through the operator (so it lies in its range),
		// made M-orthogonal to V[0:j].
		for tries := 0; tries < 3; tries++ {
			for i := range w {
				w[i] = rnd()
			}
			M.MulVec(tmp, w)
			F.Solve(tmp, mw)
			copy(w, tmp)
			st.Solves++
			M.MulVec(mw, w)
			orthogonalize(V[:j], MV[:j], w, mw, h, M)
			b := math.Sqrt(math.Max(dot(w, mw), 0))
			if b > 0 {
				for i := range w {
					V[j][i] = w[i] / b
					MV[j][i] = mw[i] / b
				}
				return nil
			}
		}
		return errors.New("could not find a start vector (M may not be positive definite)")
	}
	if err := newVector(0); err != nil {
		return nil, err
	}
	j := 0
	var theta []float64
	var Y mat.Dense
	var order []int
	betaM := 0.0
	maxRestarts := 1000
	// ritz computes the Ritz pairs of the leading mm x mm projected matrix
	// and counts the wanted ones that have converged.
	ritz := func(mm int) (int, error) {
		var es mat.EigenSym
		if !es.Factorize(symOf(T.Slice(0, mm, 0, mm).(*mat.Dense)), true) {
			return 0, errors.New("the eigenvalues of the Lanczos matrix did not converge")
		}
		theta = es.Values(nil)
		Y.Reset()
		es.VectorsTo(&Y)
		order = make([]int, mm)
		for i := range order {
			order[i] = i
		}
		sort.SliceStable(order, func(a, b int) bool {
			ta, tb := theta[order[a]], theta[order[b]]
			if opt.Nearest {
				return math.Abs(ta) > math.Abs(tb)
			}
			return ta > tb
		})
		conv := 0
		for _, i := range order[:k] {
			if math.Abs(betaM*Y.At(mm-1, i)) <= tol*math.Abs(theta[i]) {
				conv++
			}
		}
		return conv, nil
	}
	mm := m // the basis size of the last Ritz pairs
	for {
		done := false
		for ; j < m; j++ {
			if err := ctx.Err(); err != nil {
				return nil, err
			}
			copy(tmp, MV[j])
			F.Solve(tmp, w)
			copy(w, tmp)
			st.Solves++
			M.MulVec(mw, w)
			for i := range h {
				h[i] = 0
			}
			orthogonalize(V[:j+1], MV[:j+1], w, mw, h, M)
			for i := 0; i <= j; i++ {
				T.Set(i, j, h[i])
				T.Set(j, i, h[i])
			}
			b := math.Sqrt(math.Max(dot(w, mw), 0))
			tiny := 1e-12 * math.Abs(h[j])
			if b <= tiny || j+1 == n {
				// An invariant subspace: go on with a fresh direction,
				// coupled by 0 (none is left once the basis spans the
				// whole space).
				b = 0
				if j+1 < n {
					if err := newVector(j + 1); err != nil {
						return nil, err
					}
				} else {
					clear(V[j+1])
					clear(MV[j+1])
				}
			} else {
				for i := range w {
					V[j+1][i] = w[i] / b
					MV[j+1][i] = mw[i] / b
				}
			}
			betaM = b
			// Every fourth step once the basis can hold the wanted modes,
			// see whether they have converged already (a small symmetric
			// eigenproblem; it saves solves, which cost far more).
			if j+1 >= k && j+1 < m && (j+1)%4 == 0 {
				conv, err := ritz(j + 1)
				if err != nil {
					return nil, err
				}
				if conv == k {
					mm, done = j+1, true
					st.Converged = conv
					break
				}
			}
		}
		if done {
			break
		}
		mm = m
		conv, err := ritz(m)
		if err != nil {
			return nil, err
		}
		st.Converged = conv
		progress("iterating", float64(conv)/float64(k), conv)
		if conv == k || m == n || st.Restarts >= maxRestarts {
			break
		}
		// Thick restart: keep the p best Ritz vectors and the residual
		// direction; the projected matrix becomes diagonal plus an arrow,
		// which the next step's Gram-Schmidt coefficients fill in.
		p := k + (m-k)/2
		if p >= m {
			p = m - 1
		}
		keepV := make([][]float64, p)
		keepMV := make([][]float64, p)
		for l := 0; l < p; l++ {
			keepV[l] = make([]float64, n)
			keepMV[l] = make([]float64, n)
			col := order[l]
			for r := 0; r < m; r++ {
				y := Y.At(r, col)
				if y == 0 {
					continue
				}
				axpy(keepV[l], y, V[r])
				axpy(keepMV[l], y, MV[r])
			}
		}
		last, lastM := V[m], MV[m]
		for l := 0; l < p; l++ {
			V[l], MV[l] = keepV[l], keepMV[l]
		}
		V[p], MV[p] = last, lastM
		for l := p + 1; l <= m; l++ {
			V[l] = make([]float64, n)
			MV[l] = make([]float64, n)
		}
		T.Zero()
		for l := 0; l < p; l++ {
			T.Set(l, l, theta[order[l]])
		}
		j = p
		st.Restarts++
	}
	if st.Converged < k {
		return nil, fmt.Errorf("Lanczos converged %d of %d modes in %d restarts; ask for fewer modes or move the shift", st.Converged, k, st.Restarts)
	}
	// Ritz vectors of the k wanted values.
	lam := make([]float64, k)
	phi := mat.NewDense(n, k, nil)
	col := make([]float64, n)
	for l := 0; l < k; l++ {
		c := order[l]
		lam[l] = st.Shift + 1/theta[c]
		for i := range col {
			col[i] = 0
		}
		for r := 0; r < mm; r++ {
			axpy(col, Y.At(r, c), V[r])
		}
		phi.SetCol(l, col)
	}
	sm := finishModes(lam, phi, RigidTolRel*scale)
	sm.Sparse = st
	sm.Method = "shift-and-invert Lanczos with thick restarts (Wu & Simon 2000; Grimes, Lewis & Simon 1994) on a sparse L D L^T in nested-dissection order (George 1973)"
	sm.DOFNames = opt.DOFNames
	if sm.DOFNames == nil {
		sm.DOFNames = defaultNames("q", n)
	}
	// Residuals and M-orthogonality of what is handed out.
	knorm := K.Norm1()
	kx := make([]float64, n)
	mx := make([]float64, n)
	mphi := mat.NewDense(n, k, nil)
	for l := 0; l < k; l++ {
		mat.Col(col, l, sm.Shapes)
		K.MulVec(kx, col)
		M.MulVec(mx, col)
		mphi.SetCol(l, mx)
		r := 0.0
		for i := range kx {
			d := kx[i] - sm.Lambda[l]*mx[i]
			r += d * d
		}
		rel := math.Sqrt(r) / (knorm * math.Sqrt(dot(col, col)))
		st.Residual = math.Max(st.Residual, rel)
	}
	var g mat.Dense
	g.Mul(sm.Shapes.T(), mphi)
	for a := 0; a < k; a++ {
		for b := 0; b < k; b++ {
			want := 0.0
			if a == b {
				want = 1
			}
			sm.Orthogonality = math.Max(sm.Orthogonality, math.Abs(g.At(a, b)-want))
		}
	}
	sm.Complete = k == n
	progress("done", 1, k)
	return sm, nil
}

// orthogonalize makes w M-orthogonal to the columns V (MV = M V) by two
// classical Gram-Schmidt passes ("twice is enough": Giraud, Langou &
// Rozloznik 2005), adds the coefficients to h and sets mw = M w afresh
// (tracking it by the same updates loses all accuracy when most of w
// cancels, as it does once Ritz vectors converge).
func orthogonalize(V, MV [][]float64, w, mw, h []float64, M *SparseSym) {
	c := make([]float64, len(V))
	for pass := 0; pass < 2; pass++ {
		for i := range V {
			c[i] = dot(MV[i], w)
		}
		for i := range V {
			axpy(w, -c[i], V[i])
			h[i] += c[i]
		}
	}
	M.MulVec(mw, w)
}

func axpy(y []float64, a float64, x []float64) {
	if a == 0 {
		return
	}
	x = x[:len(y)]
	for i := range y {
		y[i] += a * x[i]
	}
}

// SparseStructuralModes is SparseModes with participation for the
// directions R (n x d, nil for none) named dirs.
func SparseStructuralModes(ctx context.Context, K, M *SparseSym, opt SparseModeOptions, R *mat.Dense, dirs []string) (*StructuralModes, error) {
	sm, err := SparseModes(ctx, K, M, opt)
	if err != nil {
		return nil, err
	}
	if err := sm.participation(M.MulVec, R, dirs); err != nil {
		return nil, err
	}
	return sm, nil
}

// SpringLattice builds the stiffness and mass matrices of a lattice of
// identical masses m joined by identical springs k along each axis of a
// grid of the given sizes (one scalar degree of freedom per node; 1, 2 or 3
// axes), the nodes of the face x = 0 tied to the ground by springs k too
// (grounded = false leaves it free: one rigid-body mode). Node (i, j, l) is
// degree of freedom i + nx (j + ny l). A test and benchmark model with the
// sparsity of plate (2-D) and solid (3-D) meshes.
func SpringLattice(dims []int, k, m float64, grounded bool) (K, M *SparseSym, err error) {
	if len(dims) < 1 || len(dims) > 3 {
		return nil, nil, errors.New("a lattice has 1, 2 or 3 axes")
	}
	d := [3]int{1, 1, 1}
	n := 1
	for i, v := range dims {
		if v < 1 {
			return nil, nil, fmt.Errorf("axis %d has %d nodes; at least 1 is needed", i+1, v)
		}
		d[i] = v
		n *= v
	}
	if n > 1<<26 {
		return nil, nil, fmt.Errorf("%d nodes is more than this builder makes (%d)", n, 1<<26)
	}
	idx := func(i, j, l int) int { return i + d[0]*(j+d[1]*l) }
	ts := make([]Triplet, 0, 4*n)
	diag := make([]float64, n)
	for l := 0; l < d[2]; l++ {
		for j := 0; j < d[1]; j++ {
			for i := 0; i < d[0]; i++ {
				a := idx(i, j, l)
				if i == 0 && grounded {
					diag[a] += k
				}
				for _, nb := range [][3]int{{i + 1, j, l}, {i, j + 1, l}, {i, j, l + 1}} {
					if nb[0] >= d[0] || nb[1] >= d[1] || nb[2] >= d[2] {
						continue
					}
					b := idx(nb[0], nb[1], nb[2])
					diag[a] += k
					diag[b] += k
					ts = append(ts, Triplet{b, a, -k})
				}
			}
		}
	}
	for i, v := range diag {
		ts = append(ts, Triplet{i, i, v})
	}
	if K, err = NewSparseSym(n, ts); err != nil {
		return nil, nil, err
	}
	mt := make([]Triplet, n)
	for i := range mt {
		mt[i] = Triplet{i, i, m}
	}
	M, err = NewSparseSym(n, mt)
	return K, M, err
}

// ldlFactor is a sparse L D L^T either way it was computed.
type ldlFactor interface {
	Solve(b, tmp []float64)
	NNZ() int
	Bytes() int64
	negative() int
	minPivot() float64
	peakWork() int64
}

func (f *SparseLDL) negative() int         { return f.Negative }
func (f *SparseLDL) minPivot() float64     { return f.MinPivot }
func (f *SparseLDL) peakWork() int64       { return 0 }
func (f *SupernodalLDL) negative() int     { return f.Negative }
func (f *SupernodalLDL) minPivot() float64 { return f.MinPivot }
func (f *SupernodalLDL) peakWork() int64   { return f.PeakWork }

// denseFronts decides between the two factorizations from the column
// counts of L: the multifrontal one pays for its dense fronts once the
// mean column count, weighted by the work of each column (sum c_j^2 /
// sum c_j), exceeds 200 (3-D meshes: 269 at 10^4 DOF, 1179 at 10^5);
// below (chains 2, plates 43 to 104 at 10^4 to 10^5 DOF) the
// column-by-column one is faster (measured on the lattices of
// BenchmarkLattice).
func denseFronts(a *SparseSym, perm []int) bool {
	pinv := make([]int, len(perm))
	for k, p := range perm {
		pinv[p] = k
	}
	_, lnz := etreeCounts(a, perm, pinv)
	var s1, s2 float64
	for _, c := range lnz {
		s1 += float64(c)
		s2 += float64(c) * float64(c)
	}
	return s1 > 0 && s2 > 200*s1
}
