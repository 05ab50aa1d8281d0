package lsys

import (
	"errors"
	"math"
	"math/cmplx"
	"sort"

	"gonum.org/v1/gonum/blas"
	"gonum.org/v1/gonum/lapack/gonum"
	"gonum.org/v1/gonum/mat"
)

// Staircase is the orthogonal controllability staircase form of a pair
// (A, B): with x = Z xs,
//
//	Z^T A Z = [Ar  A12]   Z^T B = [Br]
//	          [0   Au ]           [0 ]
//
// where (Ar, Br) is controllable and in block upper Hessenberg form whose
// sub-diagonal blocks have full row rank (the staircase), and Au, of order
// n - Dim, holds the uncontrollable modes.
type Staircase struct {
	A, B, Z *mat.Dense // transformed A and B, orthogonal Z
	Dim     int        // dimension of the reachable subspace
	Steps   []int      // ranks of the staircase blocks, in order; they sum to Dim
	// Tol is the absolute rank tolerance used at every step: singular values
	// at or below it count as zero. Kept is the smallest singular value
	// kept as nonzero over all steps and Dropped the largest discarded
	// (0 if none): the gap between them is the margin of the verdict.
	Tol, Kept, Dropped float64
	// RaisedFrom, when not 0, is the tolerance the staircase started from
	// before it was changed to agree with the PBH test of each mode (see
	// agreeingStaircase).
	RaisedFrom float64
	// StepKept[i] is the smallest singular value kept at step i: the size
	// of the perturbation that would end the staircase there (Paige 1981),
	// so a small value marks a weakly reached (or seen) direction. It is an
	// upper bound on the distance to an uncontrollable (unobservable)
	// system, not that distance: the PBH margins of the mode table measure
	// each mode.
	StepKept []float64
	// Absorbed, when not 0, is the size of the last step: directions of
	// modes the PBH test finds reached that the staircase left in its
	// uncontrollable block, behind a step that rounding made exactly zero
	// or that was dropped for an unreached mode before them (see
	// absorbReached); its StepKept is 0.
	Absorbed int
	// Direct, when set, says the split came from the left invariant
	// subspaces of the modes the PBH test finds unreached, not from
	// staircase steps (see unreachedDirect): Steps then holds Dim alone.
	Direct bool
	// Scale, when not nil, is the diagonal state scaling the staircase was
	// computed in (see StaircasesOf): A, B and Z belong to the balanced
	// system with x = diag(Scale) x~. Use LeadingBasis and TrailingBasis for
	// subspaces in the original coordinates.
	Scale []float64
}

// LeadingBasis returns an orthonormal basis, in the original coordinates,
// of the span of the first Dim columns of Z (the reachable subspace of a
// controllability staircase); nil when Dim = 0.
func (st *Staircase) LeadingBasis() *mat.Dense {
	n, _ := st.Z.Dims()
	if st.Dim == 0 {
		return nil
	}
	return st.basis(0, st.Dim, n)
}

// TrailingBasis returns an orthonormal basis, in the original coordinates,
// of the span of the last n - Dim columns of Z (the unobservable subspace of
// an observability staircase); nil when Dim = n.
func (st *Staircase) TrailingBasis() *mat.Dense {
	n, _ := st.Z.Dims()
	if st.Dim == n {
		return nil
	}
	return st.basis(st.Dim, n, n)
}

func (st *Staircase) basis(c0, c1, n int) *mat.Dense {
	V := mat.DenseCopyOf(st.Z.Slice(0, n, c0, c1))
	if st.Scale == nil {
		return V
	}
	for i := 0; i < n; i++ {
		for j := 0; j < c1-c0; j++ {
			V.Set(i, j, V.At(i, j)*st.Scale[i])
		}
	}
	// The scaled columns are independent (diag(Scale) is nonsingular):
	// a thin QR makes them orthonormal again.
	var qr mat.QR
	qr.Factorize(V)
	var Q mat.Dense
	qr.QTo(&Q)
	return mat.DenseCopyOf(Q.Slice(0, n, 0, c1-c0))
}

// StaircasesOf returns the controllability and observability staircases of
// s, each computed in unit-free coordinates of its own (see unitScaling):
// the controllability staircase on (A, B) balanced together, the
// observability staircase on (A, C) balanced together, so reachability
// depends on A and B alone and observability on A and C alone, and a
// relative tolerance means the same in any units: in SI units an actuator
// entry 1/m = 1e-4 next to stiffness entries k/m = 1e3 would otherwise be
// dropped by a tolerance relative to ||[[A, B]]||, and steps through the
// kinematic entries 1 of x' = v would look small next to k/m. Tol is
// relTol times the norm of the balanced [[A, B]] (or [[A], [C]]). The reachable
// and unobservable subspaces do not depend on these scalings; use
// LeadingBasis and TrailingBasis to read them in the original coordinates.
func StaircasesOf(s *System, relTol float64) (reach, observe *Staircase, err error) {
	ur, uo := balanceReach(s.A, s.B), balanceSeen(s.A, s.C)
	unreached, unseen, err := pbhRefused(s, relTol)
	if err != nil {
		return nil, nil, err
	}
	if reach, err = agreeingStaircase(ur.A, ur.B, relTol, unreached, false); err != nil {
		return nil, nil, err
	}
	if observe, err = agreeingStaircase(uo.A, uo.C, relTol, unseen, true); err != nil {
		return nil, nil, err
	}
	reach.Scale, observe.Scale = ur.S, uo.S
	return reach, observe, nil
}

// pbhRefused lists the modes of s (both members of a pair) that the PBH
// test of the mode table finds unreached and unseen.
func pbhRefused(s *System, relTol float64) (unreached, unseen []complex128, err error) {
	mt, err := ModesTol(s, relTol)
	if err != nil {
		return nil, nil, err
	}
	for _, m := range mt.Modes {
		vals := []complex128{m.Eigenvalue}
		if m.Pair {
			vals = append(vals, cmplx.Conj(m.Eigenvalue))
		}
		if !m.Reachable {
			unreached = append(unreached, vals...)
		}
		if !m.Observable {
			unseen = append(unseen, vals...)
		}
	}
	return unreached, unseen, nil
}

// agreeingStaircase is the controllability (dual: observability) staircase
// of (A, B), made to agree with the PBH test of each mode. The staircase is
// backward stable, but the singular value kept at a step is only an upper
// bound on the distance to an uncontrollable system (Paige 1981), and a
// dropped one measures a distance minimised over all s, not at the
// eigenvalues: near a defective or ill-conditioned eigenvalue, rounding of
// size u ||A|| can leave a step of 1e-9 where the PBH margin of the mode
// (the distance that decides, Hautus 1969) is 1e-16, and a weakly reached
// Jordan chain can drop a step of 1e-12 while its PBH margin is 1e-6.
// The eigenvalues left in the staircase's uncontrollable block must be
// exactly the modes the PBH test finds unreached (unseen): when one is
// missing the rank tolerance is raised to the smallest singular value kept
// above it; when the block holds a mode the PBH test finds reached, it is
// lowered below the largest singular value dropped; then the staircase runs
// again (raised at most until a lowering is needed, so it ends). A raise
// drops every step after the weak one, reached modes' steps too, so after a
// raise, and when the step dropped is exactly 0, the reached modes are
// instead taken back from the uncontrollable block (absorbReached). The PBH
// verdicts decide; the staircase supplies the subspaces. RaisedFrom records
// the tolerance it started from.
func agreeingStaircase(A, B *mat.Dense, relTol float64, must []complex128, dual bool) (*Staircase, error) {
	if relTol <= 0 || math.IsNaN(relTol) {
		relTol = DefaultRelTol
	}
	run := func(rt float64) (*Staircase, error) {
		if dual {
			return ObservabilityStaircase(A, B, rt)
		}
		return ControllabilityStaircase(A, B, rt)
	}
	st, err := run(relTol)
	if err != nil {
		return st, err
	}
	n, _ := A.Dims()
	norm := st.Tol / relTol
	if norm == 0 {
		return st, nil
	}
	scale := mat.Norm(A, 2) / math.Sqrt(float64(max(n, 1)))
	// The block's eigenvalues are those of a system within the rank
	// tolerance: they match a mode to 1e-4 of the size of A, or to ten
	// times the tolerance when it is coarser (a deliberately coarse
	// tolerance moves them by about that much).
	near := func(a, b complex128) bool {
		return cmplx.Abs(a-b) <= math.Max(1e-4*math.Max(scale, cmplx.Abs(a)), 10*st.Tol)
	}
	start := st.Tol
	lowered, raised := false, false
	for iter := 0; iter < n; iter++ {
		k := st.Dim
		var rest []complex128
		if k < n {
			if rest, err = eigOrdered(mat.DenseCopyOf(st.A.Slice(k, n, k, n)), 0); err != nil {
				return nil, err
			}
		}
		missing, extra := false, false
		for _, lam := range must {
			found := false
			for _, r := range rest {
				found = found || near(r, lam)
			}
			missing = missing || !found
		}
		for _, r := range rest {
			found := false
			for _, lam := range must {
				found = found || near(r, lam)
			}
			extra = extra || !found
		}
		var next float64
		switch {
		case missing && !lowered:
			if direct := unreachedDirect(A, B, dual, st, must, relTol); direct != nil {
				direct.RaisedFrom = start
				return direct, nil
			}
			next = math.Inf(1)
			for _, v := range st.StepKept {
				if v > st.Tol && v < next {
					next = v
				}
			}
			if math.IsInf(next, 1) {
				return st, nil
			}
			next *= 1 + 1e-9
			raised = true
		case extra && !missing:
			if st.Dropped == 0 || raised {
				// Rounding left an exact zero step, or the raise that
				// dropped an unreached mode's step dropped reached
				// modes' later steps with it (one tolerance cannot
				// split a staircase out of Krylov order): take the
				// reached ones back from the uncontrollable block.
				return absorbReached(A, B, dual, st, must, near, relTol)
			}
			next = st.Dropped * (1 - 1e-9)
			lowered = true
		default:
			if raised && k < n {
				// The raise cut a step that may be a real coupling:
				// rebuild what stays behind from the unreached modes'
				// left invariant subspace.
				A0, B0 := A, B
				if dual {
					A0, B0 = stTransposed(A), stTransposed(B)
				}
				var t0 mat.Dense
				t0.Mul(st.Z.T(), A0)
				st.A.Mul(&t0, st.Z)
				if st.B != nil && B0 != nil {
					st.B.Mul(st.Z.T(), B0)
				}
				leftComplement(A0, B0, st, blockValues(mat.DenseCopyOf(st.A.Slice(k, n, k, n))), relTol)
				zeroBelow(st)
			}
			return st, nil
		}
		again, err := run(next / norm)
		if err != nil {
			return nil, err
		}
		st = again
		st.RaisedFrom = start
	}
	return st, nil
}

// leftComplement puts st in coordinates [W^perp, W], W an orthonormal basis
// of the left invariant subspace of A0 (A0^T W = W S) of the modes left
// behind (rest: Schur blocks of what stays behind, one value per pair):
// W^perp is invariant and, as the PBH test says, holds the range of B0 up
// to its margin, so the form is block triangular to rounding with no
// coupling cut by a raised tolerance (a staircase raised to a kept value of
// 0.04 cuts a real coupling and tilts the subspace by as much). The values
// left behind are matched to clusters of A0's eigenvalues (members within
// the clustering cap 1e-3 ||A||, see Jordan). A cluster left behind whole
// gives its left invariant subspace Wc; one left behind in part (one
// direction of a semisimple double, one rigid body of two) gives the part
// of Wc that B0 does not reach: the unobservable subspace of the small
// pair (S, (Wc^T B0)^T), S = Wc^T A0^T Wc, by its own staircase. Nothing
// changes when the dimensions do not add up.
func leftComplement(A0, B0 *mat.Dense, st *Staircase, rest []complex128, relTol float64) {
	n, _ := A0.Dims()
	c := n - st.Dim
	if c <= 0 || len(rest) == 0 {
		return
	}
	left, err := Schur(mat.DenseCopyOf(A0.T()))
	if err != nil {
		return
	}
	vals := left.Values // every eigenvalue, pairs as two
	cap := 1e-3 * mat.Norm(A0, 2)
	// Clusters of A0's eigenvalues by single linkage within cap.
	cl := newUnionFind(len(vals))
	for a := range vals {
		for b := a + 1; b < len(vals); b++ {
			if cmplx.Abs(vals[a]-vals[b]) <= cap {
				cl.join(a, b)
			}
		}
	}
	var want []complex128
	for _, r := range rest {
		want = append(want, r)
		if imag(r) != 0 {
			want = append(want, cmplx.Conj(r))
		}
	}
	if len(want) != c {
		return
	}
	// Dimensions asked of each cluster: every value left behind goes to the
	// cluster of the nearest eigenvalue, which must be within cap.
	asked := map[int]int{}
	for _, r := range want {
		best, bi := math.Inf(1), -1
		for q, v := range vals {
			if d := cmplx.Abs(v - r); d < best {
				best, bi = d, q
			}
		}
		if bi < 0 || best > cap {
			return
		}
		asked[cl.root(bi)]++
	}
	roots := make([]int, 0, len(asked))
	for r := range asked {
		roots = append(roots, r)
	}
	sort.Ints(roots)
	var parts []*mat.Dense
	for _, root := range roots {
		size := 0
		inCluster := func(v complex128) bool {
			for q, w := range vals {
				if cl.root(q) == root && (w == v || w == cmplx.Conj(v)) {
					return true
				}
			}
			return false
		}
		for q := range vals {
			if cl.root(q) == root {
				size++
			}
		}
		sf := &SchurForm{T: mat.DenseCopyOf(left.T), Z: mat.DenseCopyOf(left.Z), Values: append([]complex128(nil), left.Values...)}
		got, err := sf.Reorder(inCluster)
		if err != nil || got != size {
			return
		}
		Wc := mat.DenseCopyOf(sf.Z.Slice(0, n, 0, size))
		q := asked[root]
		if q == size {
			parts = append(parts, Wc)
			continue
		}
		if B0 == nil || q > size {
			return
		}
		// The part of the cluster B0 leaves alone: x' = S x, y = G^T x,
		// its unobservable subspace (S = Wc^T A0^T Wc, G = Wc^T B0).
		var t, S, G mat.Dense
		t.Mul(A0.T(), Wc)
		S.Mul(Wc.T(), &t)
		G.Mul(Wc.T(), B0)
		ost, err := ObservabilityStaircase(&S, mat.DenseCopyOf(G.T()), relTol)
		if err != nil || size-ost.Dim != q {
			return
		}
		var U mat.Dense
		U.Mul(Wc, ost.Z.Slice(0, size, ost.Dim, size))
		parts = append(parts, mat.DenseCopyOf(&U))
	}
	W, _ := stOrth(stHcat(n, parts...), 1e-8)
	if W == nil {
		return
	}
	if _, k := W.Dims(); k != c {
		return
	}
	Z := stHcat(n, stComplement(W, n), W)
	var t mat.Dense
	t.Mul(Z.T(), A0)
	st.A.Mul(&t, Z)
	if st.B != nil && B0 != nil {
		st.B.Mul(Z.T(), B0)
	}
	st.Z = Z
}

// unreachedDirect builds the staircase's split from the modes the PBH test
// finds unreached, instead of raising the rank tolerance (one tolerance cuts
// a staircase in Krylov order, so where it ends depends on the realization):
// for each cluster of A's eigenvalues holding such a mode (members within
// the clustering cap 1e-3 ||A||, see Jordan), Wc is its left invariant
// subspace (ordered Schur form of A^T), and the part of it that B leaves
// alone is the unobservable subspace of the small pair (S, (Wc^T B)^T),
// S = Wc^T A^T Wc, by that pair's own staircase at the same relative
// tolerance. W, their sum, is left invariant; its orthogonal complement is
// the reachable subspace, invariant and holding the range of B up to the
// PBH margins. nil when a cluster cannot be separated or the small pair
// finds everything reached (the caller then raises the tolerance).
func unreachedDirect(A, B *mat.Dense, dual bool, st *Staircase, must []complex128, relTol float64) *Staircase {
	A0, B0 := A, B
	if dual {
		A0, B0 = stTransposed(A), stTransposed(B)
	}
	if B0 == nil {
		return nil
	}
	n, _ := A0.Dims()
	left, err := Schur(mat.DenseCopyOf(A0.T()))
	if err != nil {
		return nil
	}
	vals := left.Values
	cap := 1e-3 * mat.Norm(A0, 2)
	cl := newUnionFind(len(vals))
	for a := range vals {
		for b := a + 1; b < len(vals); b++ {
			if cmplx.Abs(vals[a]-vals[b]) <= cap {
				cl.join(a, b)
			}
		}
	}
	seen := map[int]bool{}
	var roots []int
	for _, lam := range must {
		best, bi := math.Inf(1), -1
		for q, v := range vals {
			if d := cmplx.Abs(v - lam); d < best {
				best, bi = d, q
			}
		}
		if bi < 0 || best > cap {
			return nil
		}
		if r := cl.root(bi); !seen[r] {
			seen[r] = true
			roots = append(roots, r)
		}
	}
	sort.Ints(roots)
	var parts []*mat.Dense
	for _, root := range roots {
		size := 0
		for q := range vals {
			if cl.root(q) == root {
				size++
			}
		}
		inCluster := func(v complex128) bool {
			for q, w := range vals {
				if cl.root(q) == root && (w == v || w == cmplx.Conj(v)) {
					return true
				}
			}
			return false
		}
		sf := &SchurForm{T: mat.DenseCopyOf(left.T), Z: mat.DenseCopyOf(left.Z), Values: append([]complex128(nil), left.Values...)}
		got, err := sf.Reorder(inCluster)
		if err != nil || got != size {
			return nil
		}
		Wc := mat.DenseCopyOf(sf.Z.Slice(0, n, 0, size))
		var t, S, G mat.Dense
		t.Mul(A0.T(), Wc)
		S.Mul(Wc.T(), &t)
		G.Mul(Wc.T(), B0)
		ost, err := ObservabilityStaircase(&S, mat.DenseCopyOf(G.T()), relTol)
		if err != nil || ost.Dim == size {
			return nil
		}
		var U mat.Dense
		U.Mul(Wc, ost.Z.Slice(0, size, ost.Dim, size))
		parts = append(parts, mat.DenseCopyOf(&U))
	}
	W, _ := stOrth(stHcat(n, parts...), 1e-8)
	if W == nil {
		return nil
	}
	_, c := W.Dims()
	if c >= n {
		return nil
	}
	Z := stHcat(n, stComplement(W, n), W)
	out := &Staircase{Z: Z, Tol: st.Tol, Dim: n - c, Steps: []int{n - c}, StepKept: []float64{0}, Direct: true}
	var tz mat.Dense
	tz.Mul(Z.T(), A0)
	out.A = mat.NewDense(n, n, nil)
	out.A.Mul(&tz, Z)
	var b mat.Dense
	b.Mul(Z.T(), B0)
	out.B = mat.DenseCopyOf(&b)
	zeroBelow(out)
	return out
}

// blockValues returns the eigenvalues of a, one per conjugate pair (the
// one with nonnegative imaginary part), from its real Schur form.
func blockValues(a *mat.Dense) []complex128 {
	sf, err := Schur(a)
	if err != nil {
		return nil
	}
	var out []complex128
	for _, i := range schurBlocks(sf.T) {
		out = append(out, schurBlockValue(sf.T, i))
	}
	return out
}

// zeroBelow makes the blocks below the leading Dim rows of A (first Dim
// columns) and of B exactly zero.
func zeroBelow(st *Staircase) {
	n, _ := st.A.Dims()
	for i := st.Dim; i < n; i++ {
		for j := 0; j < st.Dim; j++ {
			st.A.Set(i, j, 0)
		}
		if st.B != nil {
			_, m := st.B.Dims()
			for j := 0; j < m; j++ {
				st.B.Set(i, j, 0)
			}
		}
	}
}

// Close is the ratio to the starting rank tolerance (RaisedFrom when the
// staircase was made to agree with the PBH test, else Tol), between 0.1 and
// 10, of the kept or dropped singular value nearest it; 0 when none is that
// near. Such a step is a close call: another realization of the same model
// may keep or drop it, and with it the dimension of the subspace.
func (st *Staircase) Close() float64 {
	tol := st.Tol
	if st.RaisedFrom > 0 {
		tol = st.RaisedFrom
	}
	if tol <= 0 || st.Direct {
		return 0
	}
	best := 0.0
	consider := func(v float64) {
		if r := v / tol; r >= 0.1 && r <= 10 && (best == 0 || math.Abs(math.Log(r)) < math.Abs(math.Log(best))) {
			best = r
		}
	}
	for i, v := range st.StepKept {
		if st.Absorbed > 0 && i == len(st.StepKept)-1 {
			continue // the absorbed step has no singular value
		}
		consider(v)
	}
	if st.Dropped > 0 {
		consider(st.Dropped)
	}
	return best
}

// absorbReached takes into the reachable part of st the eigenvalues of its
// uncontrollable block that match no mode in must (the modes the PBH test
// finds unreached): the block's real Schur form is reordered to put them
// first (Bai & Demmel 1993), which keeps the form block triangular, so the
// enlarged leading subspace is still invariant and holds the range of B.
// Used when a step came out exactly zero by rounding (a weakly reached
// Jordan chain), where lowering the tolerance cannot help, and when a raised
// tolerance dropped reached modes' steps after an unreached mode's.
func absorbReached(A0, B0 *mat.Dense, dual bool, st *Staircase, must []complex128, near func(a, b complex128) bool, relTol float64) (*Staircase, error) {
	n, _ := st.A.Dims()
	k := st.Dim
	// The staircase set every dropped block to exactly zero; after a raise
	// those were couplings up to the raised tolerance, and the reached
	// modes taken back must keep theirs: start again from Z^T A Z and
	// Z^T B, and zero only what stays behind.
	if dual {
		A0, B0 = stTransposed(A0), stTransposed(B0)
	}
	var t0 mat.Dense
	t0.Mul(st.Z.T(), A0)
	st.A.Mul(&t0, st.Z)
	if st.B != nil && B0 != nil {
		st.B.Mul(st.Z.T(), B0)
	}
	sf, err := Schur(mat.DenseCopyOf(st.A.Slice(k, n, k, n)))
	if err != nil {
		return nil, err
	}
	add, err := sf.Reorder(func(v complex128) bool {
		for _, lam := range must {
			if near(v, lam) || near(cmplx.Conj(v), lam) {
				return false
			}
		}
		return true
	})
	if err != nil || add == 0 {
		return st, err
	}
	// A <- diag(I, Q)^T A diag(I, Q), B and Z alike; A[k:, :k] is zero and
	// stays so.
	var t mat.Dense
	top := mat.DenseCopyOf(st.A.Slice(0, k, k, n))
	t.Mul(top, sf.Z)
	st.A.Slice(0, k, k, n).(*mat.Dense).Copy(&t)
	st.A.Slice(k, n, k, n).(*mat.Dense).Copy(sf.T)
	if st.B != nil {
		_, m := st.B.Dims()
		var tb mat.Dense
		tb.Mul(sf.Z.T(), st.B.Slice(k, n, 0, m))
		st.B.Slice(k, n, 0, m).(*mat.Dense).Copy(&tb)
	}
	var tz mat.Dense
	tz.Mul(st.Z.Slice(0, n, k, n), sf.Z)
	st.Z.Slice(0, n, k, n).(*mat.Dense).Copy(&tz)
	st.Dim += add
	rest := make([]complex128, 0, n-st.Dim)
	for _, i := range schurBlocks(sf.T) {
		if i >= add {
			rest = append(rest, schurBlockValue(sf.T, i))
		}
	}
	leftComplement(A0, B0, st, rest, relTol)
	zeroBelow(st)
	st.Steps = append(st.Steps, add)
	st.StepKept = append(st.StepKept, 0)
	st.Absorbed = add
	return st, nil
}

// ControllabilityStaircase reduces (A, B) to the staircase form by
// orthogonal transformations, deciding each rank by a singular value
// decomposition against tol = relTol * ||[[A, B]]||_F (Van Dooren 1981,
// The generalized eigenstructure problem in linear system theory, IEEE TAC
// 26(1); Paige 1981, Properties of numerical algorithms related to
// computing controllability, IEEE TAC 26(1)). The rank of the Krylov matrix
// [B AB ...] is never used: it is numerically unreliable. relTol <= 0 means
// DefaultRelTol. B may be nil (no inputs: nothing is reachable).
func ControllabilityStaircase(A, B *mat.Dense, relTol float64) (*Staircase, error) {
	if A == nil {
		return nil, errors.New("staircase: the system has no states")
	}
	n, nc := A.Dims()
	if n != nc {
		return nil, &ShapeError{What: "A must be square", Got: Shape(A), Other: "nxn"}
	}
	if relTol <= 0 || math.IsNaN(relTol) {
		relTol = DefaultRelTol
	}
	m := 0
	if B != nil {
		var br int
		br, m = B.Dims()
		if br != n {
			return nil, &ShapeError{What: "B must have as many rows as A", Got: Shape(B), Other: Shape(A)}
		}
	}
	st := &Staircase{A: mat.DenseCopyOf(A), Z: identity(n), Kept: math.Inf(1)}
	if m > 0 {
		st.B = mat.DenseCopyOf(B)
	}
	st.Tol = relTol * stackedNorm(A, B)
	if m == 0 {
		st.Kept = 0
		return st, nil
	}
	impl := gonum.Implementation{}
	start := 0 // first row of the part not yet reduced
	prev := -1 // first column of the block being reduced (-1: it is B)
	cols := m
	for start < n {
		rows := n - start
		blk := mat.NewDense(rows, cols, nil)
		for i := 0; i < rows; i++ {
			for j := 0; j < cols; j++ {
				if prev < 0 {
					blk.Set(i, j, st.B.At(start+i, j))
				} else {
					blk.Set(i, j, st.A.At(start+i, prev+j))
				}
			}
		}
		var svd mat.SVD
		if !svd.Factorize(blk, mat.SVDThin) {
			return nil, errors.New("staircase: singular value decomposition did not converge")
		}
		sv := svd.Values(nil)
		r := 0
		for _, v := range sv {
			if v > st.Tol {
				r++
				st.Kept = math.Min(st.Kept, v)
			} else {
				st.Dropped = math.Max(st.Dropped, v)
			}
		}
		if r > 0 {
			// An orthogonal Q whose first r columns span the leading left
			// singular vectors, as r Householder reflectors (QR of U1), so
			// each step costs O(r n^2) rather than a full rotation.
			var U mat.Dense
			svd.UTo(&U)
			U1 := mat.DenseCopyOf(U.Slice(0, rows, 0, r))
			u1 := U1.RawMatrix()
			tau := make([]float64, r)
			work := make([]float64, 1)
			impl.Dgeqrf(rows, r, u1.Data, u1.Stride, tau, work, -1)
			work = make([]float64, max(int(work[0]), n, m))
			impl.Dgeqrf(rows, r, u1.Data, u1.Stride, tau, work, len(work))
			ar := st.A.RawMatrix()
			// A[start:, :] <- Q^T A[start:, :]; A[:, start:] <- A[:, start:] Q.
			impl.Dormqr(blas.Left, blas.Trans, rows, n, r, u1.Data, u1.Stride, tau, ar.Data[start*ar.Stride:], ar.Stride, work, len(work))
			impl.Dormqr(blas.Right, blas.NoTrans, n, rows, r, u1.Data, u1.Stride, tau, ar.Data[start:], ar.Stride, work, len(work))
			if st.B != nil {
				br := st.B.RawMatrix()
				impl.Dormqr(blas.Left, blas.Trans, rows, m, r, u1.Data, u1.Stride, tau, br.Data[start*br.Stride:], br.Stride, work, len(work))
			}
			zr := st.Z.RawMatrix()
			impl.Dormqr(blas.Right, blas.NoTrans, n, rows, r, u1.Data, u1.Stride, tau, zr.Data[start:], zr.Stride, work, len(work))
		}
		// The block is now zero below its first r rows up to rounding of
		// the dropped singular values; make the zeros exact.
		for i := start + r; i < n; i++ {
			for j := 0; j < cols; j++ {
				if prev < 0 {
					st.B.Set(i, j, 0)
				} else {
					st.A.Set(i, prev+j, 0)
				}
			}
		}
		if r == 0 {
			break
		}
		st.Steps = append(st.Steps, r)
		st.StepKept = append(st.StepKept, sv[r-1])
		prev = start
		cols = r
		start += r
	}
	st.Dim = start
	if math.IsInf(st.Kept, 1) {
		st.Kept = 0
	}
	return st, nil
}

// stTransposed returns a copy of a^T (nil stays nil).
func stTransposed(a *mat.Dense) *mat.Dense {
	if a == nil {
		return nil
	}
	return mat.DenseCopyOf(a.T())
}

// ObservabilityStaircase is the dual staircase: ControllabilityStaircase of
// (A^T, C^T). In the returned form the first Dim columns of Z span the
// orthogonal complement of the unobservable subspace and the remaining
// columns span the unobservable subspace; A and B fields hold Z^T A^T Z and
// Z^T C^T.
func ObservabilityStaircase(A, C *mat.Dense, relTol float64) (*Staircase, error) {
	return ControllabilityStaircase(stTransposed(A), stTransposed(C), relTol)
}
