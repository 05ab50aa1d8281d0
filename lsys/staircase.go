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
// again (raised at most until a lowering is needed, so it ends). A missing
// mode is first split off directly from the left invariant subspaces
// (unreachedDirect): a raise drops every step after the weak one, reached
// modes' steps too, at a place that depends on the realization. When that
// fails and a raise is needed, and when the step dropped is exactly 0, the
// reached modes are taken back from the uncontrollable block
// (absorbReached) and what stays behind is rebuilt from the unreached
// modes' left invariant subspaces (leftComplement). The PBH
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
				retransform(A0, B0, st)
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

// leftClusters holds the left invariant subspaces of A's eigenvalue
// clusters (members within the clustering cap 1e-3 ||A||, see Jordan), for
// splitting off the part of a cluster that B leaves alone.
type leftClusters struct {
	A, B *mat.Dense   // the pair, in controllability orientation
	left *SchurForm   // real Schur form of A^T
	vals []complex128 // its eigenvalues, pairs as two
	cl   unionFind
	cap  float64
}

func newLeftClusters(A, B *mat.Dense) *leftClusters {
	left, err := Schur(mat.DenseCopyOf(A.T()))
	if err != nil {
		return nil
	}
	lc := &leftClusters{A: A, B: B, left: left, vals: left.Values, cl: newUnionFind(len(left.Values)), cap: 1e-3 * mat.Norm(A, 2)}
	for a := range lc.vals {
		for b := a + 1; b < len(lc.vals); b++ {
			if cmplx.Abs(lc.vals[a]-lc.vals[b]) <= lc.cap {
				lc.cl.join(a, b)
			}
		}
	}
	return lc
}

// of returns the cluster of the eigenvalue nearest v, -1 when none is
// within the cap.
func (lc *leftClusters) of(v complex128) int {
	best, bi := math.Inf(1), -1
	for q, w := range lc.vals {
		if d := cmplx.Abs(w - v); d < best {
			best, bi = d, q
		}
	}
	if bi < 0 || best > lc.cap {
		return -1
	}
	return lc.cl.root(bi)
}

// size is the number of eigenvalues in the cluster.
func (lc *leftClusters) size(root int) int {
	k := 0
	for q := range lc.vals {
		if lc.cl.root(q) == root {
			k++
		}
	}
	return k
}

// basis is an orthonormal basis of the cluster's left invariant subspace
// (ordered Schur form of A^T, Bai & Demmel 1993); nil when it cannot be
// separated.
func (lc *leftClusters) basis(root int) *mat.Dense {
	n, _ := lc.A.Dims()
	size := lc.size(root)
	in := func(v complex128) bool {
		for q, w := range lc.vals {
			if lc.cl.root(q) == root && (w == v || w == cmplx.Conj(v)) {
				return true
			}
		}
		return false
	}
	sf := &SchurForm{T: mat.DenseCopyOf(lc.left.T), Z: mat.DenseCopyOf(lc.left.Z), Values: append([]complex128(nil), lc.left.Values...)}
	if got, err := sf.Reorder(in); err != nil || got != size {
		return nil
	}
	return mat.DenseCopyOf(sf.Z.Slice(0, n, 0, size))
}

// alone is the part of the cluster's left invariant subspace Wc that B
// leaves alone: the unobservable subspace of the small pair (S, (Wc^T B)^T),
// S = Wc^T A^T Wc, by its own staircase at relTol; nil when B reaches the
// whole cluster or it cannot be computed.
func (lc *leftClusters) alone(root int, relTol float64) *mat.Dense {
	Wc := lc.basis(root)
	if Wc == nil || lc.B == nil {
		return nil
	}
	_, size := Wc.Dims()
	var t, S, G mat.Dense
	t.Mul(lc.A.T(), Wc)
	S.Mul(Wc.T(), &t)
	G.Mul(Wc.T(), lc.B)
	ost, err := ObservabilityStaircase(&S, mat.DenseCopyOf(G.T()), relTol)
	if err != nil || ost.Dim == size {
		return nil
	}
	var U mat.Dense
	U.Mul(Wc, ost.Z.Slice(0, size, ost.Dim, size))
	return mat.DenseCopyOf(&U)
}

// splitOff puts st in coordinates [W^perp, W], W an orthonormal basis of
// the sum of parts (left invariant, so W^perp is invariant), with Dim =
// n - dim W; false when the parts do not make up want dimensions (want < 0:
// any number below n).
func splitOff(A0, B0 *mat.Dense, st *Staircase, parts []*mat.Dense, want int) bool {
	n, _ := A0.Dims()
	W, _ := stOrth(stHcat(n, parts...), 1e-8)
	if W == nil {
		return false
	}
	_, c := W.Dims()
	if c >= n || want >= 0 && c != want {
		return false
	}
	st.Z = stHcat(n, stComplement(W, n), W)
	st.Dim = n - c
	retransform(A0, B0, st)
	return true
}

// retransform sets st.A = Z^T A0 Z and st.B = Z^T B0 from st.Z.
func retransform(A0, B0 *mat.Dense, st *Staircase) {
	n, _ := A0.Dims()
	var t mat.Dense
	t.Mul(st.Z.T(), A0)
	if st.A == nil {
		st.A = mat.NewDense(n, n, nil)
	}
	st.A.Mul(&t, st.Z)
	if B0 != nil {
		var b mat.Dense
		b.Mul(st.Z.T(), B0)
		st.B = mat.DenseCopyOf(&b)
	}
}

// leftComplement puts st in coordinates [W^perp, W], W the left invariant
// subspace of the modes left behind (rest: Schur blocks of what stays
// behind, one value per pair): W^perp is invariant and, as the PBH test
// says, holds the range of B0 up to its margin, so the form is block
// triangular to rounding with no coupling cut by a raised tolerance (a
// staircase raised to a kept value of 0.04 cuts a real coupling and tilts
// the subspace by as much). A cluster left behind whole gives its whole
// left invariant subspace; one left behind in part (one direction of a
// semisimple double, one rigid body of two) the part B0 leaves alone.
// Nothing changes when the dimensions do not add up.
func leftComplement(A0, B0 *mat.Dense, st *Staircase, rest []complex128, relTol float64) {
	n, _ := A0.Dims()
	c := n - st.Dim
	if c <= 0 || len(rest) == 0 {
		return
	}
	lc := newLeftClusters(A0, B0)
	if lc == nil {
		return
	}
	asked := map[int]int{}
	var roots []int
	for _, r := range rest {
		root := lc.of(r)
		if root < 0 {
			return
		}
		if asked[root] == 0 {
			roots = append(roots, root)
		}
		asked[root]++
		if imag(r) != 0 {
			asked[root]++
		}
	}
	sort.Ints(roots)
	var parts []*mat.Dense
	for _, root := range roots {
		var U *mat.Dense
		if asked[root] == lc.size(root) {
			U = lc.basis(root)
		} else {
			U = lc.alone(root, relTol)
		}
		if U == nil {
			return
		}
		if _, k := U.Dims(); k != asked[root] {
			return
		}
		parts = append(parts, U)
	}
	dim := st.Dim
	if !splitOff(A0, B0, st, parts, c) {
		st.Dim = dim
	}
}

// unreachedDirect builds the staircase's split from the modes the PBH test
// finds unreached, instead of raising the rank tolerance (one tolerance cuts
// a staircase in Krylov order, so where it ends depends on the realization):
// W is the sum, over the clusters holding such a mode, of the part of the
// cluster's left invariant subspace that B leaves alone (leftClusters.alone);
// its orthogonal complement is the reachable subspace, invariant and holding
// the range of B up to the PBH margins. nil when a cluster cannot be
// separated or B reaches it whole (the caller then raises the tolerance).
func unreachedDirect(A, B *mat.Dense, dual bool, st *Staircase, must []complex128, relTol float64) *Staircase {
	A0, B0 := A, B
	if dual {
		A0, B0 = stTransposed(A), stTransposed(B)
	}
	if B0 == nil {
		return nil
	}
	lc := newLeftClusters(A0, B0)
	if lc == nil {
		return nil
	}
	seen := map[int]bool{}
	var roots []int
	for _, lam := range must {
		root := lc.of(lam)
		if root < 0 {
			return nil
		}
		if !seen[root] {
			seen[root] = true
			roots = append(roots, root)
		}
	}
	sort.Ints(roots)
	var parts []*mat.Dense
	for _, root := range roots {
		U := lc.alone(root, relTol)
		if U == nil {
			return nil
		}
		parts = append(parts, U)
	}
	out := &Staircase{Tol: st.Tol, Direct: true}
	if !splitOff(A0, B0, out, parts, -1) {
		return nil
	}
	out.Steps, out.StepKept = []int{out.Dim}, []float64{0}
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
	consider := func(v float64) { best = nearerCall(best, v, tol) }
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
	retransform(A0, B0, st)
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
