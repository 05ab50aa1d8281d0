package lsys

import (
	"errors"
	"fmt"
	"math"

	"gonum.org/v1/gonum/mat"
)

// KalmanPart is one of the four parts of the Kalman decomposition.
type KalmanPart struct {
	Name  string       // "reachable and observable", ...
	Dim   int          // number of states in the part
	Modes []complex128 // eigenvalues of the part, in mode-table order
}

// Structure is the answer of StructureOf: which modes the inputs reach and
// the outputs see.
type Structure struct {
	System                                             *System
	Controllable, Observable, Stabilizable, Detectable bool
	// Reach is the controllability staircase of (A, B); Observe the dual
	// staircase of (A^T, C^T). Their Tol, Kept and Dropped fields state the
	// rank decisions.
	Reach, Observe *Staircase
	// UncontrollableModes are the eigenvalues of the uncontrollable block of
	// the staircase form; UnobservableModes those of the unobservable block.
	UncontrollableModes, UnobservableModes []complex128
	// Parts are, in order: reachable and observable, reachable but not
	// observable, observable but not reachable, neither.
	Parts [4]KalmanPart
	// RelTol is the relative tolerance of every rank decision; AngleTol the
	// tolerance (radians) on principal angles when intersecting the
	// reachable and unobservable subspaces.
	RelTol, AngleTol float64
	// AngleClose, when not 0, is the ratio to AngleTol, between 0.1 and
	// 10, of the singular value of [R N] nearest it (R, N orthonormal
	// bases of the reachable and unobservable subspaces): the dimension of
	// their intersection is a close call, which another realization may
	// make otherwise (a multiple eigenvalue reached and seen in part).
	AngleClose float64
	// Cond is the condition number of the Kalman transformation.
	Cond float64
}

// Decomposition is the Kalman decomposition: the system in coordinates
// z = T x ordered as reachable and observable, reachable and unobservable,
// unreachable and observable, unreachable and unobservable.
type Decomposition struct {
	From   *System    // the system in its original coordinates
	System *System    // transformed system
	T      *mat.Dense // z = T x
	Sizes  [4]int     // sizes of the four parts, in order
	Cond   float64    // condition number of T (2-norm)

	angleClose float64 // see Structure.AngleClose
}

var kalmanNames = [4]string{"reachable and observable", "reachable, not observable", "observable, not reachable", "neither reachable nor observable"}

// StructureOf decides controllability, observability, stabilizability and
// detectability from the orthogonal staircase forms (see
// ControllabilityStaircase), and splits the modes into the four Kalman parts
// (Kalman 1963, Mathematical description of linear dynamical systems, SIAM
// J. Control 1). relTol <= 0 means DefaultRelTol.
func StructureOf(s *System, relTol float64) (*Structure, error) {
	if s.N() == 0 {
		return nil, errors.New("a static gain has no states")
	}
	if relTol <= 0 || math.IsNaN(relTol) {
		relTol = DefaultRelTol
	}
	st := &Structure{System: s, RelTol: relTol}
	var err error
	if st.Reach, st.Observe, err = StaircasesOf(s, relTol); err != nil {
		return nil, err
	}
	n := s.N()
	st.Controllable = st.Reach.Dim == n
	st.Observable = st.Observe.Dim == n
	if k := st.Reach.Dim; k < n {
		st.UncontrollableModes, err = eigOrdered(st.Reach.A.Slice(k, n, k, n).(*mat.Dense), s.Ts)
		if err != nil {
			return nil, err
		}
	}
	if k := st.Observe.Dim; k < n {
		st.UnobservableModes, err = eigOrdered(st.Observe.A.Slice(k, n, k, n).(*mat.Dense), s.Ts)
		if err != nil {
			return nil, err
		}
	}
	st.Stabilizable, st.Detectable = true, true
	for _, v := range st.UncontrollableModes {
		if !stableValue(v, s.Ts) {
			st.Stabilizable = false
		}
	}
	for _, v := range st.UnobservableModes {
		if !stableValue(v, s.Ts) {
			st.Detectable = false
		}
	}
	dec, angTol, err := kalman(s, st.Reach, st.Observe, relTol)
	if err != nil {
		return nil, err
	}
	st.AngleTol = angTol
	st.AngleClose = dec.angleClose
	st.Cond = dec.Cond
	off := 0
	for i := 0; i < 4; i++ {
		k := dec.Sizes[i]
		st.Parts[i] = KalmanPart{Name: kalmanNames[i], Dim: k}
		if k > 0 {
			st.Parts[i].Modes, err = eigOrdered(dec.System.A.Slice(off, off+k, off, off+k).(*mat.Dense), s.Ts)
			if err != nil {
				return nil, err
			}
		}
		off += k
	}
	return st, nil
}

// Decompose returns the Kalman decomposition of s (see StructureOf).
func Decompose(s *System, relTol float64) (*Decomposition, error) {
	if s.N() == 0 {
		return nil, errors.New("a static gain has no states")
	}
	if relTol <= 0 || math.IsNaN(relTol) {
		relTol = DefaultRelTol
	}
	rs, os, err := StaircasesOf(s, relTol)
	if err != nil {
		return nil, err
	}
	d, _, err := kalman(s, rs, os, relTol)
	return d, err
}

// kalman builds the decomposition from the reachable subspace R (leading
// columns of the controllability staircase) and the unobservable subspace N
// (trailing columns of the dual staircase): V2 spans R and N's intersection,
// V1 its orthogonal complement in R, V4 its complement in N, V3 the
// orthogonal complement of R + N. Each piece is orthonormal; the whole basis
// [V1 V2 V3 V4] in general is not, and its condition number is reported.
func kalman(s *System, rs, os *Staircase, relTol float64) (*Decomposition, float64, error) {
	n := s.N()
	angTol := math.Sqrt(relTol)
	if rs.Dim == n && os.Dim == n {
		// Minimal already: one part, the identity transformation.
		sys := s.Copy()
		sys.StateNames = kalmanStateNames(n, 0, 0, 0)
		return &Decomposition{From: s, System: sys, T: identity(n), Sizes: [4]int{n, 0, 0, 0}, Cond: 1}, angTol, nil
	}
	// The angles between subspaces change with units, so the intersection
	// and complements are taken in the coordinates of (A, B, C) balanced
	// together (see unitScaling), x = diag(S) x~, and mapped back.
	us := balanceUnits(s.A, s.B, s.C)
	R := rescaleBasis(rs.LeadingBasis(), us.S, true)
	N := rescaleBasis(os.TrailingBasis(), us.S, true)
	var V1, V2, V3, V4 *mat.Dense
	angleClose := 0.0
	if R != nil && N != nil {
		_, r := R.Dims()
		// Null vectors [a; b] of [R N] give R a = -N b in the intersection.
		M := stHcat(n, R, N)
		var svd mat.SVD
		if svd.Factorize(M, mat.SVDNone) {
			for _, v := range svd.Values(nil) {
				angleClose = nearerCall(angleClose, v, angTol)
			}
		}
		null := stNullRight(M, angTol)
		if null != nil {
			var X mat.Dense
			X.Mul(R, null.Slice(0, r, 0, func() int { _, c := null.Dims(); return c }()))
			V2, _ = stOrth(&X, angTol)
		}
	}
	V1 = stComplementWithin(R, V2)
	V4 = stComplementWithin(N, V2)
	RN, _ := func() (*mat.Dense, []float64) {
		J := stHcat(n, R, N)
		if J == nil {
			return nil, nil
		}
		return stOrth(J, angTol)
	}()
	V3 = stComplement(RN, n)
	Tinv := stHcat(n, V1, V2, V3, V4) // x~ = Tinv z, in the balanced coordinates
	cols := 0
	if Tinv != nil {
		_, cols = Tinv.Dims()
	}
	if cols != n {
		return nil, angTol, fmt.Errorf("the four parts have %d states in all, not %d; the reachable and unobservable subspaces are too close to call at angle tolerance %.3g — try another tolerance", cols, n, angTol)
	}
	dims := func(V *mat.Dense) int {
		if V == nil {
			return 0
		}
		_, c := V.Dims()
		return c
	}
	// The condition number is that of the unit-free transformation; the
	// units (x = diag(S) x~, powers of two) are applied exactly around it.
	T, cond, err := stInverse(Tinv)
	if err != nil {
		return nil, angTol, err
	}
	for i := 0; i < n; i++ {
		for j := 0; j < n; j++ {
			Tinv.Set(i, j, Tinv.At(i, j)*us.S[i])
			T.Set(j, i, T.At(j, i)/us.S[i])
		}
	}
	sys, err := transformWith(s, T, Tinv)
	if err != nil {
		return nil, angTol, err
	}
	sys.StateNames = kalmanStateNames(dims(V1), dims(V2), dims(V3), dims(V4))
	return &Decomposition{From: s, System: sys, T: T, Sizes: [4]int{dims(V1), dims(V2), dims(V3), dims(V4)}, Cond: cond, angleClose: angleClose}, angTol, nil
}

func kalmanStateNames(n1, n2, n3, n4 int) []string {
	var out []string
	for i, k := range []int{n1, n2, n3, n4} {
		tag := [4]string{"ro", "rn", "uo", "un"}[i]
		for j := 0; j < k; j++ {
			out = append(out, fmt.Sprintf("%s%d", tag, j+1))
		}
	}
	return out
}

// stComplementWithin returns an orthonormal basis of span(Q) minus span(S)
// (S inside span(Q), both with orthonormal columns; either may be nil).
func stComplementWithin(Q, S *mat.Dense) *mat.Dense {
	if Q == nil {
		return nil
	}
	if S == nil {
		return Q
	}
	n, q := Q.Dims()
	_, k := S.Dims()
	if k >= q {
		return nil
	}
	var W mat.Dense
	W.Mul(Q.T(), S) // q x k, coordinates of S in Q
	C := stComplement(stOrthOrNil(&W), q)
	if C == nil {
		return nil
	}
	var out mat.Dense
	out.Mul(Q, C)
	_ = n
	return &out
}

func stOrthOrNil(W *mat.Dense) *mat.Dense {
	Q, _ := stOrth(W, 1e-12)
	return Q
}

// stInverse inverts T by LU with partial pivoting and returns its 2-norm
// condition number; a nearly singular T is refused.
func stInverse(T *mat.Dense) (*mat.Dense, float64, error) {
	var svd mat.SVD
	if !svd.Factorize(T, mat.SVDNone) {
		return nil, 0, errors.New("singular value decomposition did not converge")
	}
	cond := svd.Cond()
	n, _ := T.Dims()
	// Past 1e-4/u the transformed matrices keep fewer than four correct
	// significant digits.
	if cond > 1e-4/dlamchE || n == 0 {
		return nil, cond, fmt.Errorf("the transformation is nearly singular (condition number %.3g, limit %.3g: results would keep fewer than 4 correct digits); choose a better-conditioned T", cond, 1e-4/dlamchE)
	}
	var inv mat.Dense
	if err := inv.Inverse(T); err != nil {
		return nil, cond, fmt.Errorf("the transformation is singular (condition number %.3g): %v", cond, err)
	}
	return &inv, cond, nil
}

// transformWith returns the system in coordinates z = T x, given T and
// Tinv = T^-1: A~ = T A Tinv, B~ = T B, C~ = C Tinv, D~ = D.
func transformWith(s *System, T, Tinv *mat.Dense) (*System, error) {
	n := s.N()
	var A, B, C mat.Dense
	var tmp mat.Dense
	tmp.Mul(s.A, Tinv)
	A.Mul(T, &tmp)
	var Bp, Cp *mat.Dense
	if s.B != nil {
		B.Mul(T, s.B)
		Bp = &B
	}
	if s.C != nil {
		C.Mul(s.C, Tinv)
		Cp = &C
	}
	out, err := NewSystem(n, s.M(), s.P(), &A, Bp, Cp, s.D, s.Ts)
	if err != nil {
		return nil, err
	}
	out.InputNames = append([]string(nil), s.InputNames...)
	out.OutputNames = append([]string(nil), s.OutputNames...)
	out.StateNames = defaultNames("z", n)
	return out, nil
}

// Transform returns s in coordinates z = T x: A~ = T A T^-1, B~ = T B,
// C~ = C T^-1, D~ = D. The transfer function is unchanged. A T whose
// condition number exceeds 1e-4/u (u the unit roundoff: fewer than four
// correct digits would remain) is refused with its condition number; the state names become z1..zn.
func Transform(s *System, T *mat.Dense) (*System, error) {
	n := s.N()
	if n == 0 {
		return nil, errors.New("a static gain has no states to change")
	}
	if T == nil {
		return nil, errors.New("T is missing")
	}
	if r, c := T.Dims(); r != n || c != n {
		return nil, &ShapeError{What: "T must be n x n with n the number of states", Got: Shape(T), Other: Shape(s.A)}
	}
	if err := CheckFinite("T", T); err != nil {
		return nil, err
	}
	Tinv, _, err := stInverse(T)
	if err != nil {
		return nil, fmt.Errorf("%v", err)
	}
	return transformWith(s, T, Tinv)
}

// Minimal returns a minimal realization of s: the reachable part of the
// controllability staircase, then the observable part of its dual staircase
// (Van Dooren 1981). Both steps are orthogonal; before each the pair it
// decides on is balanced by powers of two ((A, B) for the first, (A, C)
// of the reachable part for the second; see unitScaling) so the rank
// decisions do not depend on units, and the scalings are undone at the
// end. States are named z1..zk.
func Minimal(s *System, relTol float64) (*System, error) {
	if s.N() == 0 {
		return s.Copy(), nil
	}
	ur := balanceReach(s.A, s.B)
	unreached, _, err := pbhRefused(s, relTol)
	if err != nil {
		return nil, err
	}
	rs, err := agreeingStaircase(ur.A, ur.B, relTol, unreached, false)
	if err != nil {
		return nil, err
	}
	n := s.N()
	k := rs.Dim
	if k == 0 {
		return NewSystemNamed(0, s.M(), s.P(), nil, nil, nil, s.D, s.Ts, nil, s.InputNames, s.OutputNames)
	}
	// The reachable part in the staircase coordinates x = diag(S) Z xs,
	// with the input scaling undone. When nothing is unreached the
	// coordinates are kept: those of the balanced staircase of (A, B) can
	// be far from A's own balance (a weakly reached state is scaled up),
	// and rounding there would move a defective eigenvalue further than
	// in the realization given.
	keep := k == n
	Ar := mat.DenseCopyOf(rs.A.Slice(0, k, 0, k))
	if keep {
		Ar = mat.DenseCopyOf(s.A)
	}
	var Br *mat.Dense
	if keep && s.B != nil {
		Br = mat.DenseCopyOf(s.B)
	} else if rs.B != nil {
		Br = mat.DenseCopyOf(rs.B.Slice(0, k, 0, s.M()))
		for j, f := range ur.U {
			for i := 0; i < k; i++ {
				Br.Set(i, j, Br.At(i, j)/f)
			}
		}
	}
	var Cr *mat.Dense
	if keep && s.C != nil {
		Cr = mat.DenseCopyOf(s.C)
	} else if s.C != nil {
		SZ := mat.DenseCopyOf(rs.Z.Slice(0, n, 0, k))
		for i := 0; i < n; i++ {
			for j := 0; j < k; j++ {
				SZ.Set(i, j, SZ.At(i, j)*ur.S[i])
			}
		}
		var t mat.Dense
		t.Mul(s.C, SZ)
		Cr = &t
	}
	uo := balanceSeen(Ar, Cr)
	var unseen []complex128
	if Cr != nil {
		part, err := NewSystem(k, s.M(), s.P(), Ar, Br, Cr, s.D, s.Ts)
		if err != nil {
			return nil, err
		}
		if _, unseen, err = pbhRefused(part, relTol); err != nil {
			return nil, err
		}
	}
	os, err := agreeingStaircase(uo.A, uo.C, relTol, unseen, true)
	if err != nil {
		return nil, err
	}
	q := os.Dim
	if q == 0 {
		return NewSystemNamed(0, s.M(), s.P(), nil, nil, nil, s.D, s.Ts, nil, s.InputNames, s.OutputNames)
	}
	if q == k {
		// Nothing unseen either: no further change of coordinates.
		return NewSystemNamed(q, s.M(), s.P(), Ar, Br, Cr, s.D, s.Ts, defaultNames("z", q), s.InputNames, s.OutputNames)
	}
	Z := os.Z.Slice(0, k, 0, q)
	var A, B, C, tmp mat.Dense
	tmp.Mul(uo.A, Z)
	A.Mul(Z.T(), &tmp)
	var Bp, Cp *mat.Dense
	if Br != nil {
		// B = Z^T diag(S)^-1 Br.
		Bs := mat.DenseCopyOf(Br)
		for i := 0; i < k; i++ {
			for j := 0; j < s.M(); j++ {
				Bs.Set(i, j, Bs.At(i, j)/uo.S[i])
			}
		}
		B.Mul(Z.T(), Bs)
		Bp = &B
	}
	if uo.C != nil {
		// C = diag(Y)^-1 C~ Z.
		C.Mul(uo.C, Z)
		for i, f := range uo.Y {
			for j := 0; j < q; j++ {
				C.Set(i, j, C.At(i, j)/f)
			}
		}
		Cp = &C
	}
	return NewSystemNamed(q, s.M(), s.P(), &A, Bp, Cp, s.D, s.Ts, defaultNames("z", q), s.InputNames, s.OutputNames)
}

// NewSystemNamed is NewSystem followed by naming the signals (nil keeps the
// default names).
func NewSystemNamed(n, m, p int, A, B, C, D *mat.Dense, ts float64, states, inputs, outputs []string) (*System, error) {
	out, err := NewSystem(n, m, p, A, B, C, D, ts)
	if err != nil {
		return nil, err
	}
	return out.WithNames(states, inputs, outputs)
}

// Reachable returns the reachable (controllable) subspace: the leading
// columns of the controllability staircase.
func Reachable(s *System, relTol float64) (*Subspace, error) {
	if s.N() == 0 {
		return &Subspace{What: "reachable subspace"}, nil
	}
	rs, _, err := StaircasesOf(s, relTol)
	if err != nil {
		return nil, err
	}
	V := rs.LeadingBasis()
	sub := newSubspace("reachable subspace", s, s.A, V, math.Max(1e3*float64(s.N())*dlamchE, rs.Tol/math.Max(1, mat.Norm(rs.A, 2))))
	sub.Note = fmt.Sprintf("controllability staircase of (A, B) balanced together, steps %v, rank tolerance %.3g = %.3g x the norm of the balanced [[A, B]] (smallest kept singular value per step %s, largest dropped %.3g)", rs.Steps, rs.Tol, rs.Tol/stackedNorm(rs.A, rs.B), fmtFloats(rs.StepKept), rs.Dropped) + absorbedNote(rs)
	return sub, nil
}

// Unobservable returns the unobservable subspace: the trailing columns of
// the dual (observability) staircase.
func Unobservable(s *System, relTol float64) (*Subspace, error) {
	if s.N() == 0 {
		return &Subspace{What: "unobservable subspace"}, nil
	}
	_, os, err := StaircasesOf(s, relTol)
	if err != nil {
		return nil, err
	}
	n := s.N()
	V := os.TrailingBasis()
	sub := newSubspace("unobservable subspace", s, s.A, V, math.Max(1e3*float64(n)*dlamchE, os.Tol/math.Max(1, mat.Norm(os.A, 2))))
	sub.Note = fmt.Sprintf("observability staircase of (A, C) balanced together, steps %v, rank tolerance %.3g = %.3g x the norm of the balanced [[A], [C]] (smallest kept singular value per step %s, largest dropped %.3g)", os.Steps, os.Tol, os.Tol/stackedNorm(os.A, os.B), fmtFloats(os.StepKept), os.Dropped) + absorbedNote(os)
	return sub, nil
}

// absorbedNote says when the last step of a staircase came from the PBH
// test (see absorbReached).
func absorbedNote(st *Staircase) string {
	if st.Direct {
		return "; the split comes from the left invariant subspaces of the modes the PBH test finds unreached (the part of each cluster the inputs leave alone), not from staircase steps"
	}
	if st.Absorbed == 0 {
		return ""
	}
	return fmt.Sprintf("; the last %d directions (a reordered Schur block, no staircase step) belong to modes the PBH test finds reached that the staircase left behind a step rounding made exactly 0", st.Absorbed)
}

// eigOrdered returns the eigenvalues of a in mode-table order (values only:
// no eigenvectors are formed).
func eigOrdered(a *mat.Dense, ts float64) ([]complex128, error) {
	if err := CheckFinite("matrix", a); err != nil {
		return nil, err
	}
	var e mat.Eigen
	if !e.Factorize(a, mat.EigenNone) {
		return nil, errors.New("the eigenvalue iteration did not converge; try rescaling the states")
	}
	vals := e.Values(nil)
	idx := orderEigenvalues(vals, ts)
	out := make([]complex128, len(idx))
	for i, k := range idx {
		out[i] = vals[k]
	}
	return out, nil
}

// fmtFloats writes values as "[a, b, c]" with 4 significant digits.
func fmtFloats(v []float64) string {
	out := "["
	for i, x := range v {
		if i > 0 {
			out += ", "
		}
		out += fmt.Sprintf("%.4g", x)
	}
	return out + "]"
}

// rescaleBasis maps the columns of V (nil stays nil) between original and
// scaled coordinates, x = diag(S) x~ (toScaled: x~ = x ./ S), and makes
// them orthonormal again (a diagonal scaling keeps them independent).
func rescaleBasis(V *mat.Dense, S []float64, toScaled bool) *mat.Dense {
	if V == nil {
		return nil
	}
	n, k := V.Dims()
	W := mat.DenseCopyOf(V)
	for i := 0; i < n; i++ {
		f := S[i]
		if toScaled {
			f = 1 / f
		}
		for j := 0; j < k; j++ {
			W.Set(i, j, W.At(i, j)*f)
		}
	}
	var qr mat.QR
	qr.Factorize(W)
	var Q mat.Dense
	qr.QTo(&Q)
	return mat.DenseCopyOf(Q.Slice(0, n, 0, k))
}
