package lsys

import (
	"errors"
	"fmt"
	"math"
	"math/cmplx"
	"sort"

	"gonum.org/v1/gonum/mat"
)

// ZeroSet is the answer of Zeros.
type ZeroSet struct {
	System *System
	// Invariant are the invariant zeros: the finite values where the system
	// pencil [[A - s I, B], [C, D]] loses rank below its normal rank. They
	// include the decoupling zeros below.
	Invariant []complex128
	// Transmission are the zeros of a minimal realization (the invariant
	// zeros without the decoupling ones).
	Transmission []complex128
	// InputDecoupling are the modes no input reaches (eigenvalues of the
	// uncontrollable part); OutputDecoupling those no output sees.
	InputDecoupling, OutputDecoupling []complex128
	// Tol is the absolute rank tolerance of the pencil reduction: RelTol
	// times the Frobenius norm of the balanced system matrix [[A, B], [C, D]] (see
	// balancePencil: states balanced, inputs and outputs scaled so every
	// block has a comparable norm), so results do not depend on units.
	Tol, RelTol float64
	// MergeTol: zeros closer than MergeTol times the larger of their
	// modulus and Scale are one multiple zero, listed (once per
	// multiplicity) by the cluster's mean; InvariantMultiple and
	// TransmissionMultiple give each multiple zero with its spread.
	// Scale is the size of the system (root-mean-square row of the
	// balanced system matrix). Parts of a zero below about ZeroTol =
	// 1000 u Scale are rounding residue and shown as 0.
	MergeTol, Scale, ZeroTol                float64
	InvariantMultiple, TransmissionMultiple []MultipleValue
	// ReducedOrder is the order of the regular pencil left by the
	// reduction, whose generalized eigenvalues are the zeros.
	ReducedOrder int
}

// Zeros computes the invariant zeros of s from the system pencil reduced as
// in Emami-Naeini & Van Dooren (1982, Computation of zeros of linear
// multivariable systems, Automatica 18(4)): after a diagonal balancing of
// the system matrix (states, inputs and outputs; it leaves the zeros
// unchanged and makes them independent of the units), orthogonal row and
// column compressions, with every rank decided by singular values at
// tol = relTol * ||[[A, B], [C, D]]||_F of the balanced matrix, remove the
// infinite zeros and the non-square part, leaving a regular pencil whose
// finite generalized eigenvalues (by QZ) are the zeros; zeros closer than
// sqrt(relTol) of their size are one multiple zero, listed by the mean of
// the cluster (see mergeMultiple). Transmission zeros come from the same
// computation on a minimal realization; decoupling zeros from the staircase
// forms. relTol <= 0 means DefaultRelTol. MIMO and non-square systems are
// handled; a static gain has no zeros.
func Zeros(s *System, relTol float64) (*ZeroSet, error) {
	if relTol <= 0 || math.IsNaN(relTol) {
		relTol = DefaultRelTol
	}
	zs := &ZeroSet{System: s, RelTol: relTol, MergeTol: math.Sqrt(relTol)}
	if s.N() == 0 {
		return zs, nil
	}
	inv, order, tol, err := invariantZeros(s, relTol)
	if err != nil {
		return nil, err
	}
	zs.Invariant, zs.InvariantMultiple, zs.ReducedOrder, zs.Tol, zs.Scale = inv.vals, inv.multi, order, tol, inv.scale
	zs.ZeroTol = 1e3 * dlamchE * inv.scale
	mr, err := Minimal(s, relTol)
	if err != nil {
		return nil, err
	}
	if mr.N() > 0 {
		tr, _, _, err := invariantZeros(mr, relTol)
		if err != nil {
			return nil, err
		}
		zs.Transmission, zs.TransmissionMultiple = tr.vals, tr.multi
	}
	st, err := StructureOf(s, relTol)
	if err != nil {
		return nil, err
	}
	zs.InputDecoupling = st.UncontrollableModes
	zs.OutputDecoupling = st.UnobservableModes
	return zs, nil
}

func invariantZeros(s *System, relTol float64) (zeroResult, int, float64, error) {
	if relTol <= 0 || math.IsNaN(relTol) {
		relTol = DefaultRelTol
	}
	n, m, p := s.N(), s.M(), s.P()
	if m == 0 || p == 0 {
		// No inputs or no outputs: the pencil [A - sI; C] or [A - sI, B]
		// loses rank exactly at the unobservable / uncontrollable modes.
		return zeroResult{}, 0, 0, nil
	}
	D := s.D
	if D == nil {
		D = mat.NewDense(p, m, nil)
	}
	bA, bB, bC, bD := balancePencil(s.A, s.B, s.C, D)
	P := mat.NewDense(n+p, n+m, nil)
	P.Slice(0, n, 0, n).(*mat.Dense).Copy(bA)
	P.Slice(0, n, n, n+m).(*mat.Dense).Copy(bB)
	P.Slice(n, n+p, 0, n).(*mat.Dense).Copy(bC)
	P.Slice(n, n+p, n, n+m).(*mat.Dense).Copy(bD)
	tol := relTol * mat.Norm(P, 2)
	r := &zsys{A: bA, B: bB, C: bC, D: bD, n: n, m: m, p: p}
	r = zeroReduce(r, tol)
	if r.n == 0 {
		return zeroResult{}, 0, tol, nil
	}
	// Dual reduction on the transposed system.
	t := &zsys{A: zTr(r.A), B: zTr(r.C), C: zTr(r.B), D: zTr(r.D), n: r.n, m: r.p, p: r.m}
	t = zeroReduce(t, tol)
	if t.n == 0 {
		return zeroResult{}, 0, tol, nil
	}
	f := &zsys{A: zTr(t.A), B: zTr(t.C), C: zTr(t.B), D: zTr(t.D), n: t.n, m: t.p, p: t.m}
	nf, mf := f.n, f.m
	// Compress the columns of [[C, D]]: [[C, D]] W = [[0, D~]]; the zeros are the
	// generalized eigenvalues of ([[A, B]] W1, [[I, 0]] W1), W1 the first nf
	// columns of W.
	var W *mat.Dense
	if f.p > 0 {
		CD := stHcat(f.p, f.C, f.D)
		W = stRowSpaceLast(CD, tol)
	} else {
		W = identity(nf + mf)
	}
	if W == nil {
		return zeroResult{}, nf, tol, errors.New("the reduced pencil could not be compressed")
	}
	AB := stHcat(nf, f.A, f.B)
	IE := mat.NewDense(nf, nf+mf, nil)
	for i := 0; i < nf; i++ {
		IE.Set(i, i, 1)
	}
	_, wc := W.Dims()
	k := wc
	if f.p > 0 {
		k = wc - stRank(stHcat(f.p, f.C, f.D), tol)
	}
	if k != nf {
		// The reductions leave D invertible (Emami-Naeini & Van Dooren
		// 1982, sec. 3), so this pencil is square unless a rank decision
		// was borderline.
		return zeroResult{}, nf, tol, fmt.Errorf("the reduced pencil is %dx%d, not square: a rank decision is borderline at tolerance %.3g; try another tolerance", nf, k, tol)
	}
	W1 := W.Slice(0, nf+mf, 0, nf)
	var Af, Ef mat.Dense
	Af.Mul(AB, W1)
	Ef.Mul(IE, W1)
	ge, err := QZ(&Af, &Ef)
	if err != nil {
		return zeroResult{}, nf, tol, err
	}
	var vals []complex128
	for _, g := range ge {
		if g.Finite(1e3 * dlamchE * float64(nf)) {
			vals = append(vals, g.Value())
		}
	}
	// The size of the system: the root-mean-square row of the balanced
	// system matrix; residue below 1000 u ||P|| is 0 (as for poles).
	scale := mat.Norm(P, 2) / math.Sqrt(float64(n+p))
	vals, multi := mergeMultiple(realPencilValues(vals), math.Sqrt(relTol), scale, 1e3*dlamchE*mat.Norm(P, 2))
	idx := orderEigenvalues(vals, 0)
	out := make([]complex128, len(vals))
	for i, j := range idx {
		out[i] = vals[j]
	}
	return zeroResult{out, multi, scale}, nf, tol, nil
}

// zeroResult is what invariantZeros finds: the zeros (a multiple zero
// repeated), the multiple ones with their spread, and the size of the
// system the merging and residue tolerances are relative to.
type zeroResult struct {
	vals  []complex128
	multi []MultipleValue
	scale float64
}

type zsys struct {
	A, B, C, D *mat.Dense
	n, m, p    int
}

func zTr(a *mat.Dense) *mat.Dense {
	if a == nil {
		return nil
	}
	return mat.DenseCopyOf(a.T())
}

func stRank(a *mat.Dense, tol float64) int {
	if a == nil {
		return 0
	}
	var svd mat.SVD
	if !svd.Factorize(a, mat.SVDNone) {
		return 0
	}
	r := 0
	for _, v := range svd.Values(nil) {
		if v > tol {
			r++
		}
	}
	return r
}

// stRowSpaceLast returns an orthogonal W with M W = [0 X]: the first
// columns of W span the null space of M, the last rank(M) its row space.
func stRowSpaceLast(M *mat.Dense, tol float64) *mat.Dense {
	_, c := M.Dims()
	var svd mat.SVD
	if !svd.Factorize(M, mat.SVDFull) {
		return nil
	}
	sv := svd.Values(nil)
	r := 0
	for _, v := range sv {
		if v > tol {
			r++
		}
	}
	var V mat.Dense
	svd.VTo(&V)
	W := mat.NewDense(c, c, nil)
	// null space first, then the row space
	if c > r {
		W.Slice(0, c, 0, c-r).(*mat.Dense).Copy(V.Slice(0, c, r, c))
	}
	if r > 0 {
		W.Slice(0, c, c-r, c).(*mat.Dense).Copy(V.Slice(0, c, 0, r))
	}
	return W
}

// zeroReduce is the reduction step of Emami-Naeini & Van Dooren (1982):
// repeat until D has full row rank or no state is left: compress the rows of
// D; the rows with zero D part, C_t, constrain the states: compress the
// columns of C_t, remove the constrained states (their equations become
// outputs with D = the corresponding rows of B). The zeros are unchanged.
func zeroReduce(s *zsys, tol float64) *zsys {
	for s.n > 0 && s.p > 0 {
		n, m, p := s.n, s.m, s.p
		// Row compression of D: U^T D = [D_s; 0].
		sigma := 0
		C := mat.DenseCopyOf(s.C)
		var D *mat.Dense
		if m > 0 {
			var svd mat.SVD
			if !svd.Factorize(s.D, mat.SVDFull) {
				return s
			}
			for _, v := range svd.Values(nil) {
				if v > tol {
					sigma++
				}
			}
			var U mat.Dense
			svd.UTo(&U)
			C.Mul(U.T(), s.C)
			D = new(mat.Dense)
			D.Mul(U.T(), s.D)
		}
		tau := p - sigma
		if tau == 0 {
			return s
		}
		var Cs, Ds *mat.Dense
		if sigma > 0 {
			Cs = mat.DenseCopyOf(C.Slice(0, sigma, 0, n))
			Ds = mat.DenseCopyOf(D.Slice(0, sigma, 0, m))
		}
		Ct := mat.DenseCopyOf(C.Slice(sigma, p, 0, n))
		// Column compression of C_t: C_t V = [0, C2], C2 full column rank rho.
		var svd2 mat.SVD
		if !svd2.Factorize(Ct, mat.SVDFull) {
			return s
		}
		rho := 0
		for _, v := range svd2.Values(nil) {
			if v > tol {
				rho++
			}
		}
		if rho == 0 {
			// The rows are zero: they do not affect the zeros.
			s = &zsys{A: s.A, B: s.B, C: Cs, D: Ds, n: n, m: m, p: sigma}
			if sigma == 0 {
				return &zsys{A: s.A, B: s.B, n: n, m: m, p: 0}
			}
			continue
		}
		var Vt mat.Dense
		svd2.VTo(&Vt)
		V := mat.NewDense(n, n, nil)
		if n > rho {
			V.Slice(0, n, 0, n-rho).(*mat.Dense).Copy(Vt.Slice(0, n, rho, n))
		}
		V.Slice(0, n, n-rho, n).(*mat.Dense).Copy(Vt.Slice(0, n, 0, rho))
		var A, B, tmp mat.Dense
		tmp.Mul(s.A, V)
		A.Mul(V.T(), &tmp)
		if m > 0 {
			B.Mul(V.T(), s.B)
		}
		k := n - rho
		np := rho + sigma
		var nA, nB, nC, nD *mat.Dense
		if k > 0 {
			nA = mat.DenseCopyOf(A.Slice(0, k, 0, k))
			if m > 0 {
				nB = mat.DenseCopyOf(B.Slice(0, k, 0, m))
			}
			nC = mat.NewDense(np, k, nil)
			nC.Slice(0, rho, 0, k).(*mat.Dense).Copy(A.Slice(k, n, 0, k))
		}
		if m > 0 {
			nD = mat.NewDense(np, m, nil)
			nD.Slice(0, rho, 0, m).(*mat.Dense).Copy(B.Slice(k, n, 0, m))
		}
		if sigma > 0 {
			var CsV mat.Dense
			CsV.Mul(Cs, V)
			if k > 0 {
				nC.Slice(rho, np, 0, k).(*mat.Dense).Copy(CsV.Slice(0, sigma, 0, k))
			}
			nD.Slice(rho, np, 0, m).(*mat.Dense).Copy(Ds)
		}
		s = &zsys{A: nA, B: nB, C: nC, D: nD, n: k, m: m, p: np}
	}
	return s
}

// zerosClose reports whether two zero lists agree as multisets within rel.
func zerosClose(a, b []complex128, rel float64) bool {
	if len(a) != len(b) {
		return false
	}
	used := make([]bool, len(b))
	for _, x := range a {
		best, bj := math.Inf(1), -1
		for j, y := range b {
			if !used[j] {
				if d := cmplx.Abs(x - y); d < best {
					best, bj = d, j
				}
			}
		}
		if bj < 0 || best > rel*math.Max(1, cmplx.Abs(x)) {
			return false
		}
		used[bj] = true
	}
	return true
}

// balancePencil returns copies of A, B, C, D scaled so that the blocks of
// the system matrix [[A, B], [C, D]] have comparable norms:
// A~ = T A T^-1, B~ = T B Su, C~ = Sy C T^-1, D~ = Sy D Su with T, Su, Sy
// diagonal. The zeros are invariant under these scalings (they multiply the
// pencil by nonsingular constant matrices on both sides), while the rank
// decisions of the reduction are not: in SI units an actuator entry 1/m
// = 1e-4 next to stiffness entries k/m = 1e3 falls below a tolerance
// relative to the whole pencil. The state scaling T is the balancing
// iteration of Osborne (1960, On pre-conditioning of matrices, J. ACM 7)
// and Parlett & Reinsch (1969) applied to the rows of [[A, B]] and columns of
// [[A], [C]] together; each input column of [[B], [D]] and output row of [[C, D]] is
// then scaled to the root-mean-square column norm of A (1 if A = 0). All
// factors are powers of two, so the scaling itself adds no rounding.
func balancePencil(A, B, C, D *mat.Dense) (*mat.Dense, *mat.Dense, *mat.Dense, *mat.Dense) {
	bA, bB, bC, bD, _, _, _ := balanceSystem(A, B, C, D)
	return bA, bB, bC, bD
}

// balanceSystem is balancePencil that also returns the input and output
// scalings su, sy and the state scaling sx: with T = diag(sx)^-1,
// A~ = T A T^-1, B~ = T B diag(su), C~ = diag(sy) C T^-1, so x = diag(sx) x~.
// D may be nil.
func balanceSystem(A, B, C, D *mat.Dense) (bA, bB, bC, bD *mat.Dense, su, sy, sx []float64) {
	n, _ := A.Dims()
	A = mat.DenseCopyOf(A)
	m, p := 0, 0
	if B != nil {
		B = mat.DenseCopyOf(B)
		_, m = B.Dims()
	}
	if C != nil {
		C = mat.DenseCopyOf(C)
		p, _ = C.Dims()
	}
	if D != nil {
		D = mat.DenseCopyOf(D)
	}
	su, sy, sx = make([]float64, m), make([]float64, p), make([]float64, n)
	for i := range sx {
		sx[i] = 1
	}
	for j := range su {
		su[j] = 1
	}
	for i := range sy {
		sy[i] = 1
	}
	dAt := func(i, j int) float64 {
		if D == nil {
			return 0
		}
		return D.At(i, j)
	}
	pow2 := func(x float64) float64 { return math.Exp2(math.Round(math.Log2(x))) }
	for sweep := 0; sweep < 40; sweep++ {
		changed := false
		for i := 0; i < n; i++ {
			var r, c float64
			for j := 0; j < n; j++ {
				if j != i {
					r = math.Hypot(r, A.At(i, j))
					c = math.Hypot(c, A.At(j, i))
				}
			}
			for j := 0; j < m; j++ {
				r = math.Hypot(r, B.At(i, j))
			}
			for j := 0; j < p; j++ {
				c = math.Hypot(c, C.At(j, i))
			}
			if r == 0 || c == 0 {
				continue
			}
			f := pow2(math.Sqrt(r / c))
			if f == 1 {
				continue
			}
			// Only accept a step that reduces r + c noticeably, as in
			// Parlett & Reinsch, so the sweeps end.
			if r/f+c*f >= 0.95*(r+c) {
				continue
			}
			changed = true
			sx[i] *= f
			for j := 0; j < n; j++ {
				A.Set(i, j, A.At(i, j)/f)
				A.Set(j, i, A.At(j, i)*f)
			}
			for j := 0; j < m; j++ {
				B.Set(i, j, B.At(i, j)/f)
			}
			for j := 0; j < p; j++ {
				C.Set(j, i, C.At(j, i)*f)
			}
		}
		ref := mat.Norm(A, 2) / math.Sqrt(float64(n)) // Frobenius norm
		if ref == 0 {
			ref = 1
		}
		for j := 0; j < m; j++ {
			nc := 0.0
			for i := 0; i < n; i++ {
				nc = math.Hypot(nc, B.At(i, j))
			}
			for i := 0; i < p; i++ {
				nc = math.Hypot(nc, dAt(i, j))
			}
			if nc == 0 {
				continue
			}
			if f := pow2(ref / nc); f != 1 && (f > 2 || f < 0.5) {
				changed = true
				su[j] *= f
				for i := 0; i < n; i++ {
					B.Set(i, j, B.At(i, j)*f)
				}
				for i := 0; D != nil && i < p; i++ {
					D.Set(i, j, D.At(i, j)*f)
				}
			}
		}
		for i := 0; i < p; i++ {
			nr := 0.0
			for j := 0; j < n; j++ {
				nr = math.Hypot(nr, C.At(i, j))
			}
			for j := 0; j < m; j++ {
				nr = math.Hypot(nr, dAt(i, j))
			}
			if nr == 0 {
				continue
			}
			if f := pow2(ref / nr); f != 1 && (f > 2 || f < 0.5) {
				changed = true
				sy[i] *= f
				for j := 0; j < n; j++ {
					C.Set(i, j, C.At(i, j)*f)
				}
				for j := 0; D != nil && j < m; j++ {
					D.Set(i, j, D.At(i, j)*f)
				}
			}
		}
		if !changed {
			break
		}
	}
	return A, B, C, D, su, sy, sx
}

// MultipleValue is a multiple zero: its value (the mean of the computed
// cluster), its multiplicity and the spread of the computed values about
// the mean (their largest distance from it).
type MultipleValue struct {
	Value  complex128
	Count  int
	Spread float64
}

// mergeMultiple replaces each cluster of values closer to one another than
// rel*max(|a|, |b|, scale) (single linkage) by the cluster's mean, repeated
// once per member, so a multiple zero reads as one value; scale is the size
// of the system, so a multiple zero at the origin, split by rounding into
// values of size sqrt(u) scale, is found too. A k-fold zero perturbed by
// rounding splits into k values about u^(1/k) apart (relative; u the unit
// roundoff), so a double zero comes out as a close pair, real or complex,
// while the mean of the cluster is accurate to about u (Wilkinson 1965, The
// Algebraic Eigenvalue Problem, ch. 2, on multiple eigenvalues). A mean
// whose imaginary part is below rel of its modulus is real. Parts of a
// value (real or imaginary) below zeroTol are rounding residue and set to
// exactly 0. The clusters of more than one value are returned with their
// spread.
func mergeMultiple(vals []complex128, rel, scale, zeroTol float64) ([]complex128, []MultipleValue) {
	n := len(vals)
	snap := func(v complex128) complex128 {
		re, im := real(v), imag(v)
		if math.Abs(re) <= zeroTol {
			re = 0
		}
		if math.Abs(im) <= zeroTol {
			im = 0
		}
		return complex(re, im)
	}
	if n < 2 {
		out := make([]complex128, n)
		for i, v := range vals {
			out[i] = snap(v)
		}
		return realPencilValues(out), nil
	}
	sets := newUnionFind(n)
	for i := 0; i < n; i++ {
		for j := i + 1; j < n; j++ {
			if cmplx.Abs(vals[i]-vals[j]) <= rel*math.Max(scale, math.Max(cmplx.Abs(vals[i]), cmplx.Abs(vals[j]))) {
				sets.join(i, j)
			}
		}
	}
	find := sets.root
	sum := make([]complex128, n)
	cnt := make([]int, n)
	for i, v := range vals {
		r := find(i)
		sum[r] += v
		cnt[r]++
	}
	out := make([]complex128, n)
	spread := make([]float64, n)
	for i := range vals {
		r := find(i)
		if cnt[r] == 1 {
			out[i] = snap(vals[i])
			continue
		}
		mean := sum[r] / complex(float64(cnt[r]), 0)
		if math.Abs(imag(mean)) <= rel*cmplx.Abs(mean) {
			mean = complex(real(mean), 0)
		}
		out[i] = snap(mean)
		spread[r] = math.Max(spread[r], cmplx.Abs(vals[i]-mean))
	}
	var multi []MultipleValue
	for r := 0; r < n; r++ {
		if cnt[r] > 1 && find(r) == r {
			// A complex cluster and its conjugate are one entry, by the
			// upper member.
			if imag(out[r]) < 0 {
				continue
			}
			multi = append(multi, MultipleValue{Value: out[r], Count: cnt[r], Spread: spread[r]})
		}
	}
	sort.Slice(multi, func(a, b int) bool {
		if real(multi[a].Value) != real(multi[b].Value) {
			return real(multi[a].Value) < real(multi[b].Value)
		}
		return imag(multi[a].Value) > imag(multi[b].Value)
	})
	return realPencilValues(out), multi
}
