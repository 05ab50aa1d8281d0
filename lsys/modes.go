package lsys

import (
	"math"
	"math/cmplx"

	"gonum.org/v1/gonum/mat"
)

// Mode is one mode of a system: a real eigenvalue, or a complex-conjugate
// pair counted once (Eigenvalue then has the positive imaginary part).
// Continuous-time figures are reported for sampled systems too, through
// s = log(z)/Ts.
type Mode struct {
	Eigenvalue complex128 // of A (z-plane for sampled systems)
	S          complex128 // the s-plane equivalent: Eigenvalue, or log(z)/Ts
	Pair       bool       // a complex-conjugate pair (counted once)

	// NaturalFreq is |s| in rad/s and FreqHz the same in Hz. A mode at the
	// origin has 0; a deadbeat mode (z = 0) has +Inf.
	NaturalFreq, FreqHz float64
	// Damping is -Re(s)/|s|: 1 for a decaying real mode, -1 for a growing
	// one, 0 on the imaginary axis and, by convention, at the origin.
	Damping float64
	// TimeConstant is -1/Re(s) in seconds: positive for a decaying mode,
	// negative for a growing one, +Inf when Re(s) == 0, 0 for deadbeat.
	TimeConstant float64
	// Period is the damped period 2*pi/Im(s) in seconds of an oscillatory
	// mode; 0 when the mode does not oscillate.
	Period float64

	// Multiplicity is the algebraic multiplicity (eigenvalues clustered
	// within the table's tolerance); Blocks are the Jordan block sizes,
	// largest first. A simple mode has 1 and [1].
	Multiplicity int
	Blocks       []int
	// Cond is the eigenvalue condition number 1/|w^H v| (unit left and right
	// eigenvectors w, v); large values mean the eigenvalue moves a lot under
	// small changes of A. +Inf for a defective eigenvalue.
	Cond float64

	// Reach[j] = |w^H b_j| / ||b_j|| is how strongly input j drives the
	// mode and Visibility[i] = |c_i v| / ||c_i|| how strongly output i sees
	// it, both measured in the balanced system of the PBH verdicts (see
	// ModesTol), with w and v the unit left and right eigenvectors there: a
	// number between 0 (the input cannot move the mode, the output cannot
	// see it) and 1 (the input acts, the output looks, along the
	// eigenvector), independent of the units of the signal. For a cluster
	// the largest over its members is given.
	Reach, Visibility []float64
	// Reachable and Observable are the PBH verdicts (Hautus 1969): the mode
	// can be moved by the inputs / seen by the outputs. The margins are the
	// distances the verdicts rest on, in the balanced system (A~, B~, C~):
	// ||w^H B~|| and ||C~ v|| for a simple eigenvalue, the smallest singular
	// value of [A~ - lambda I, B~] and of [A~ - lambda I; C~] for a cluster.
	// ReachMargin is compared against ReachTol = RelTol ||B~||_F and
	// ObserveMargin against ObserveTol = RelTol ||C~||_F, so each verdict
	// is relative to what it decides and neither depends on units.
	Reachable, Observable      bool
	ReachMargin, ObserveMargin float64
	// ReachClose and ObserveClose mark a margin within a factor 10 of its
	// tolerance: a genuinely close call, which another realization of the
	// same model (other units or coordinates) may decide the other way.
	ReachClose, ObserveClose bool
	ReachTol, ObserveTol     float64
	// Tol is the larger of ReachTol and ObserveTol, a single figure for
	// logs; the verdicts use the two tolerances separately.
	Tol float64
	// Shape is the right eigenvector scaled so its largest entry is 1 (real
	// and positive): the relative amplitude and phase of each state.
	Shape []complex128
}

// Stable reports whether the mode decays: Re(s) < 0 (|z| < 1 when sampled).
func (m Mode) Stable() bool { return real(m.S) < 0 }

// ModeTable is the result of Modes: one row per mode, ordered by natural
// frequency then damping.
type ModeTable struct {
	System *System
	Modes  []Mode
	// RelTol is the relative tolerance of the PBH verdicts and of the
	// clustering of eigenvalues. ReachTol = RelTol ||B~||_F and ObserveTol =
	// RelTol ||C~||_F are the absolute tolerances of the reached and seen
	// verdicts, B~ and C~ the input and output matrices of the balanced
	// system (see ModesTol); 0 when there are no inputs (outputs).
	RelTol               float64
	ReachTol, ObserveTol float64
}

// DefaultRelTol is the relative tolerance of rank and multiplicity
// verdicts unless a caller chooses another: a quantity below 1e-10 times the
// norm it is compared with counts as zero. It sits well above the rounding
// level (n * 2.2e-16 for the sizes we meet) and well below physically
// meaningful gains.
const DefaultRelTol = 1e-10

// Stability describes whether every mode decays.
type Stability struct {
	Stable bool // asymptotically stable: every eigenvalue in the open left half plane (inside the unit circle when sampled)
	// Marginal: not asymptotically stable, but no eigenvalue beyond the
	// boundary and those on it (within Tol) non-defective, so free
	// responses stay bounded (an integrator, an undamped oscillator).
	Marginal bool
	Unstable int // eigenvalues beyond the boundary, or on it in a Jordan block larger than 1
	Boundary int // eigenvalues on the boundary (|Re s| <= Tol, or ||z| - 1| <= Tol)
	Tol      float64
	// Beyond counts the eigenvalues beyond the boundary (right half-plane,
	// outside the unit circle); Defective those on it in Jordan blocks
	// larger than 1. The first Listed of those eigenvalues (at most 4; a
	// conjugate pair once, by its upper member) are in DefectiveAt with
	// the largest block of each in DefectiveBlocks: arrays, so that a
	// Stability stays comparable with ==. Unstable = Beyond + Defective.
	Beyond, Defective int
	Listed            int
	MoreDefective     bool // more defective eigenvalues than listed
	DefectiveAt       [4]complex128
	DefectiveBlocks   [4]int
}

// StabilityOf reports the stability of s from its poles (Lyapunov's
// eigenvalue criterion; a defective eigenvalue on the boundary grows like a
// power of t). Tol = 1000 u max(1, ||A||_F) decides "on the boundary".
func StabilityOf(s *System) (Stability, error) {
	st := Stability{Stable: true}
	if s.N() == 0 {
		return st, nil
	}
	es, us, err := decisionEigen(s.A)
	if err != nil {
		return Stability{}, err
	}
	js, err := jordanFrom(us.A, es, 0, DefaultRelTol, s.Ts)
	if err != nil {
		return Stability{}, err
	}
	st.Tol = boundaryTol(us.A)
	for _, c := range js.Clusters {
		// A cluster off the real axis stands for its conjugate too; a
		// cluster is judged by its mean (its members straddle it).
		w := len(c.Members)
		if imag(c.Value) > 0 {
			w *= 2
		}
		d := real(c.Value) // distance beyond the boundary
		if s.Ts > 0 {
			d = cmplx.Abs(c.Value) - 1
		}
		// The mean is accurate to about u ||A|| times its members'
		// condition, so that widens the boundary (see JordanCluster).
		tol := st.Tol * math.Max(1, c.BoundaryTol/math.Max(js.ZeroTol, dlamchE))
		switch {
		case d > tol:
			st.Unstable += w
			st.Beyond += w
		case d >= -tol:
			st.Boundary += w
			if c.Defective() {
				st.Unstable += w
				st.Defective += w
				if st.Listed < len(st.DefectiveAt) {
					st.DefectiveAt[st.Listed], st.DefectiveBlocks[st.Listed] = c.Value, c.Blocks[0]
					st.Listed++
				} else {
					st.MoreDefective = true
				}
			}
		}
	}
	st.Stable = st.Unstable == 0 && st.Boundary == 0
	st.Marginal = st.Unstable == 0 && st.Boundary > 0
	return st, nil
}

// Modes computes the mode table of s: eigenvalues by balancing and the
// shifted Hessenberg QR algorithm (see Eigen), left and right eigenvectors,
// eigenvalue condition numbers, input reach and output visibility, PBH
// verdicts (Hautus 1969) and mode shapes. Conjugate pairs are one
// oscillatory mode. A static gain has an empty table.
func Modes(s *System) (*ModeTable, error) {
	return ModesTol(s, DefaultRelTol)
}

// ModesTol is Modes with a chosen relative tolerance (0 means the default).
//
// The eigenvalues, their clusters and Jordan blocks are decided on A
// balanced alone, the reached verdicts on (A, B) balanced together and the
// seen verdicts on (A, C) balanced together (see unitScaling: states
// balanced as in Osborne 1960 and Parlett & Reinsch 1969, decoupled parts
// scaled as a whole, inputs and outputs scaled to the size of A, all by
// powers of two): A~ = T A T^-1, B~ = T B Su, C~ = Sy C T^-1 with the unit
// left and right eigenvectors there, so reachability depends on (A, B)
// only and observability on (A, C) only. Otherwise the verdicts
// would depend on units: in SI units a floor of 2000 t driven in N has
// b = 5e-7 next to k/m = 2000, and a tolerance relative to ||[[A, B]]|| calls
// every mode unreached; a tolerance on ||C v|| relative to ||[[A, B]]|| is set
// by the size of B. The reach of a mode is judged against RelTol ||B~||_F
// and its visibility against RelTol ||C~||_F.
func ModesTol(s *System, relTol float64) (*ModeTable, error) {
	if relTol <= 0 || math.IsNaN(relTol) {
		relTol = DefaultRelTol
	}
	mt := &ModeTable{System: s, RelTol: relTol}
	if s.N() == 0 {
		return mt, nil
	}
	es, eus, err := decisionEigen(s.A)
	if err != nil {
		return nil, err
	}
	js, err := jordanFrom(eus.A, es, 0, relTol, s.Ts)
	if err != nil {
		return nil, err
	}
	n, nu, ny := s.N(), s.M(), s.P()
	// Reach is judged on (A, B) alone and visibility on (A, C) alone,
	// each balanced in unit-free coordinates of its own (see unitScaling).
	ur, uo := balanceReach(s.A, s.B), balanceSeen(s.A, s.C)
	bB, bC := ur.B, uo.C
	if bB != nil {
		mt.ReachTol = relTol * mat.Norm(bB, 2)
	}
	if bC != nil {
		mt.ObserveTol = relTol * mat.Norm(bC, 2)
	}
	colNorm := make([]float64, nu)
	for j := range colNorm {
		colNorm[j] = mat.Norm(bB.ColView(j), 2)
	}
	rowNorm := make([]float64, ny)
	for i := range rowNorm {
		rowNorm[i] = mat.Norm(bC.RowView(i), 2)
	}
	for _, cl := range js.Clusters {
		lam := cl.Value
		m := Mode{Eigenvalue: lam, Pair: imag(lam) > 0, Multiplicity: cl.Algebraic, Blocks: cl.Blocks, Cond: cl.Cond}
		if m.Pair {
			// Reported once for the pair; multiplicity counts one member.
			m.Multiplicity = 0
			for _, v := range cl.Members {
				if imag(v) > 0 {
					m.Multiplicity++
				}
			}
		}
		fillFigures(&m, s.Ts)
		// Reach and visibility along the unit left and right eigenvectors
		// of the members in the balanced coordinates x~ = diag(S)^-1 x of
		// each: w~ = w .* S for reach, v~ = v ./ S for visibility (the
		// largest over a cluster).
		m.Reach = make([]float64, nu)
		m.Visibility = make([]float64, ny)
		var wb2, cv2 float64
		first := -1
		for _, k := range cl.idx {
			if imag(es.Values[k]) < 0 {
				continue
			}
			if first < 0 {
				first = k
			}
			w, v := ur.toBalanced(es.Left[k], true), uo.toBalanced(es.Right[k], false)
			unitNormalize(w)
			unitNormalize(v)
			var wbk, cvk float64
			for j := 0; j < nu; j++ {
				var g complex128
				for i := 0; i < n; i++ {
					g += cmplx.Conj(w[i]) * complex(bB.At(i, j), 0)
				}
				a := cmplx.Abs(g)
				wbk += a * a
				if colNorm[j] > 0 {
					m.Reach[j] = math.Max(m.Reach[j], a/colNorm[j])
				}
			}
			for i := 0; i < ny; i++ {
				var g complex128
				for l := 0; l < n; l++ {
					g += complex(bC.At(i, l), 0) * v[l]
				}
				a := cmplx.Abs(g)
				cvk += a * a
				if rowNorm[i] > 0 {
					m.Visibility[i] = math.Max(m.Visibility[i], a/rowNorm[i])
				}
			}
			wb2, cv2 = math.Max(wb2, wbk), math.Max(cv2, cvk)
		}
		m.ReachTol, m.ObserveTol = mt.ReachTol, mt.ObserveTol
		m.Tol = math.Max(m.ReachTol, m.ObserveTol)
		if cl.Algebraic == 1 {
			m.ReachMargin, m.ObserveMargin = math.Sqrt(wb2), math.Sqrt(cv2)
		} else {
			// A cluster: the PBH ranks of [A~ - lambda I, B~] and
			// [A~ - lambda I; C~] by singular values.
			// A defective eigenvalue (largest Jordan block b > 1) moves
			// by about (tol ||A||^(b-1))^(1/b) under a perturbation of
			// the size of the tolerance, and the distance to losing rank
			// is smallest near it, not at it: the margin is the least
			// over that disk (Eising 1984, Between controllable and
			// uncontrollable, Systems & Control Letters 4).
			b := 1
			if len(cl.Blocks) > 0 {
				b = cl.Blocks[0]
			}
			m.ReachMargin = pbhMarginNear(ur.A, bB, lam, pbhRadius(ur.A, mt.ReachTol, b), false)
			m.ObserveMargin = pbhMarginNear(uo.A, bC, lam, pbhRadius(uo.A, mt.ObserveTol, b), true)
		}
		m.Reachable = m.ReachMargin > m.ReachTol
		m.Observable = m.ObserveMargin > m.ObserveTol
		m.ReachClose = closeCall(m.ReachMargin, m.ReachTol)
		m.ObserveClose = closeCall(m.ObserveMargin, m.ObserveTol)
		if cl.Algebraic > 1 {
			// The members' eigenvectors of a cluster are only accurate to
			// about the cluster's spread; the null vector of A - lambda I
			// at the cluster mean is the accurate mode shape.
			if v := nullVectorAt(s.A, lam); v != nil {
				m.Shape = modeShape(v)
			}
		}
		if m.Shape == nil {
			m.Shape = modeShape(es.Right[first])
		}
		mt.Modes = append(mt.Modes, m)
	}
	return mt, nil
}

// pbhMargin is the n-th singular value of [A - lambda I, B] (dual: of
// [A - lambda I; C]), the distance from losing rank n at lambda (Hautus
// 1969; Paige 1981). A complex lambda uses the real 2n x 2(n+m) embedding
// [[Re, -Im], [Im, Re]], whose singular values are those of the complex
// matrix, each twice.
func pbhMargin(A, B *mat.Dense, lam complex128, dual bool) float64 {
	n, _ := A.Dims()
	if B == nil {
		return 0
	}
	Ar := mat.DenseCopyOf(A)
	Bm := B
	if dual {
		Ar = mat.DenseCopyOf(A.T())
		Bm = mat.DenseCopyOf(B.T())
	}
	_, m := Bm.Dims()
	for i := 0; i < n; i++ {
		Ar.Set(i, i, Ar.At(i, i)-real(lam))
	}
	var M *mat.Dense
	if imag(lam) == 0 {
		M = stHcat(n, Ar, Bm)
	} else {
		w := imag(lam)
		M = mat.NewDense(2*n, 2*(n+m), nil)
		for i := 0; i < n; i++ {
			for j := 0; j < n; j++ {
				M.Set(i, j, Ar.At(i, j))
				M.Set(n+i, n+j, Ar.At(i, j))
			}
			M.Set(i, n+i, w)
			M.Set(n+i, i, -w)
			for j := 0; j < m; j++ {
				M.Set(i, 2*n+j, Bm.At(i, j))
				M.Set(n+i, 2*n+m+j, Bm.At(i, j))
			}
		}
	}
	var svd mat.SVD
	if !svd.Factorize(M, mat.SVDNone) {
		return 0
	}
	sv := svd.Values(nil)
	if imag(lam) == 0 {
		return sv[n-1]
	}
	return sv[2*n-1]
}

// fillFigures sets the s-plane figures of a mode from its eigenvalue.
// rigidZ is the distance from z = 1 within which a sampled eigenvalue is a
// pole at z = 1 (s = 0): 1000 unit roundoffs of the unit circle's scale.
const rigidZ = 1e3 * 1.1102230246251565e-16

func fillFigures(m *Mode, ts float64) {
	s := continuousEquivalent(m.Eigenvalue, ts)
	if ts > 0 && cmplx.Abs(m.Eigenvalue-1) <= rigidZ {
		// z = 1 within rounding: a rigid-body mode or an integrator, not
		// a mode of wn 1e-12 rad/s and time constant 1e11 s
		s = 0
	}
	m.S = s
	m.NaturalFreq, m.Damping = naturalAndDamping(s)
	m.FreqHz = m.NaturalFreq / (2 * math.Pi)
	switch {
	case math.IsInf(real(s), -1):
		m.TimeConstant = 0
	case s == 0:
		// at the origin nothing decays or oscillates: damping and time
		// constant are not defined (n/a), the natural frequency is 0
		m.Damping, m.TimeConstant = math.NaN(), math.NaN()
	case real(s) == 0:
		m.TimeConstant = math.Inf(1)
	default:
		m.TimeConstant = -1 / real(s)
	}
	if imag(s) != 0 && !math.IsInf(real(s), 0) {
		m.Period = 2 * math.Pi / math.Abs(imag(s))
	}
}

// modeShape scales v so that its largest entry (the first of equal ones)
// becomes 1: unit size, zero phase on the dominant state.
func modeShape(v []complex128) []complex128 {
	out := make([]complex128, len(v))
	big, at := 0.0, -1
	for i, x := range v {
		if a := cmplx.Abs(x); a > big*(1+1e-12) {
			big, at = a, i
		}
	}
	if at < 0 {
		return out
	}
	piv := v[at]
	for i, x := range v {
		out[i] = x / piv
	}
	out[at] = 1
	return out
}

// stackedNorm is the Frobenius norm of [a b] (or [a; b]); b may be nil.
func stackedNorm(a, b *mat.Dense) float64 {
	na := 0.0
	if a != nil {
		na = mat.Norm(a, 2)
	}
	nb := 0.0
	if b != nil {
		nb = mat.Norm(b, 2)
	}
	return math.Hypot(na, nb)
}

// nullVectorAt returns the right singular vector of the smallest singular
// value of A - lambda I (real embedding for complex lambda), or nil.
func nullVectorAt(A *mat.Dense, lam complex128) []complex128 {
	n, _ := A.Dims()
	var M *mat.Dense
	if imag(lam) == 0 {
		M = mat.DenseCopyOf(A)
		for i := 0; i < n; i++ {
			M.Set(i, i, M.At(i, i)-real(lam))
		}
	} else {
		// (X + iY)(x + iy) with X = A - Re(lambda) I, Y = -Im(lambda) I
		// is [[X, -Y], [Y, X]] [x; y].
		M = mat.NewDense(2*n, 2*n, nil)
		for i := 0; i < n; i++ {
			for j := 0; j < n; j++ {
				M.Set(i, j, A.At(i, j))
				M.Set(n+i, n+j, A.At(i, j))
			}
			M.Set(i, i, M.At(i, i)-real(lam))
			M.Set(n+i, n+i, M.At(n+i, n+i)-real(lam))
			M.Set(i, n+i, imag(lam))
			M.Set(n+i, i, -imag(lam))
		}
	}
	var svd mat.SVD
	if !svd.Factorize(M, mat.SVDFull) {
		return nil
	}
	var V mat.Dense
	svd.VTo(&V)
	_, c := V.Dims()
	v := make([]complex128, n)
	for i := 0; i < n; i++ {
		if imag(lam) == 0 {
			v[i] = complex(V.At(i, c-1), 0)
		} else {
			v[i] = complex(V.At(i, c-1), V.At(n+i, c-1))
		}
	}
	return v
}

// pbhRadius is the distance an eigenvalue in a Jordan block of size b
// moves under a perturbation of size tol: (tol ||A||^(b-1))^(1/b) (Lidskii
// 1966; Moro, Burke & Overton 1997, On the Lidskii-Vishik-Lyusternik
// perturbation theory for eigenvalues of matrices with arbitrary Jordan
// structure, SIAM J. Matrix Anal. Appl. 18). 0 for b = 1.
func pbhRadius(A *mat.Dense, tol float64, b int) float64 {
	if b <= 1 || tol <= 0 {
		return 0
	}
	normA := mat.Norm(A, 2)
	return math.Pow(tol*math.Pow(normA, float64(b-1)), 1/float64(b))
}

// pbhMarginNear is the least of pbhMargin over the disk of radius rho
// around lam: rings at rho/4, rho/2 and rho in 16 directions, then a
// pattern search from the best point with steps halving down to rho/64.
func pbhMarginNear(A, B *mat.Dense, lam complex128, rho float64, dual bool) float64 {
	best := pbhMargin(A, B, lam, dual)
	if rho <= 0 || B == nil {
		return best
	}
	at := lam
	for _, r := range []float64{rho / 4, rho / 2, rho} {
		for k := 0; k < 16; k++ {
			s := lam + cmplx.Rect(r, 2*math.Pi*float64(k)/16)
			if v := pbhMargin(A, B, s, dual); v < best {
				best, at = v, s
			}
		}
	}
	for step := rho / 8; step >= rho/64; step /= 2 {
		for moved := true; moved; {
			moved = false
			for _, d := range []complex128{complex(step, 0), complex(-step, 0), complex(0, step), complex(0, -step)} {
				s := at + d
				if cmplx.Abs(s-lam) > rho {
					continue
				}
				if v := pbhMargin(A, B, s, dual); v < best {
					best, at, moved = v, s, true
				}
			}
		}
	}
	return best
}

// closeCall reports whether margin is within a factor 10 of tol either
// way.
func closeCall(margin, tol float64) bool {
	return tol > 0 && margin >= 0.1*tol && margin <= 10*tol
}

// nearerCall returns whichever of best and v/tol is nearer 1, v/tol counting
// only when closeCall(v, tol) (best 0: none yet): the closest of several
// calls, for a display that names one.
func nearerCall(best, v, tol float64) float64 {
	if !closeCall(v, tol) {
		return best
	}
	if r := v / tol; best == 0 || math.Abs(math.Log(r)) < math.Abs(math.Log(best)) {
		return r
	}
	return best
}
