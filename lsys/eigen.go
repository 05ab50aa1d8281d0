package lsys

import (
	"errors"
	"fmt"
	"math"
	"math/cmplx"
	"sort"

	"gonum.org/v1/gonum/mat"
)

// EigenStructure holds the eigenvalues of a square real matrix with their
// right and left eigenvectors and condition numbers.
type EigenStructure struct {
	// Values are the eigenvalues; a complex-conjugate pair appears as two
	// consecutive entries, the one with positive imaginary part first.
	Values []complex128
	// Right[k] is a right eigenvector of Values[k] (A v = lambda v), of unit
	// 2-norm with its largest entry real.
	Right [][]complex128
	// Left[k] is a left eigenvector of Values[k] (w^H A = lambda w^H), of unit
	// 2-norm.
	Left [][]complex128
	// Cond[k] = 1/|w^H v| is the condition number of Values[k]: a relative
	// perturbation eps of A moves the eigenvalue by about eps*||A||*Cond[k]
	// (Wilkinson 1965, The Algebraic Eigenvalue Problem, ch. 2). It is +Inf
	// when w and v are orthogonal (a defective eigenvalue).
	Cond []float64
	// decide, when set (see decisionEigen), holds the condition numbers
	// the clustering decides with: those of each eigenvalue in its own
	// irreducible block. Cond stays that of the whole balanced matrix.
	decide []float64
	// entered is the matrix as entered, when balancing changed it, and
	// enteredCond the condition numbers there: the second opinion of
	// JordanCluster.Entered.
	entered     *mat.Dense
	enteredCond []float64
	// part[k], when set, is the strongly connected part of A whose block
	// gave Values[k] (see partEigenvalues).
	part []int
}

// Eigen computes the eigen-structure of the square matrix a by balancing,
// Hessenberg reduction and the shifted QR algorithm, with left and right
// eigenvectors from the Schur form (gonum's Dgeev: Parlett & Reinsch 1969 for
// the balancing, Francis 1961 for the QR iteration). Entries must be finite.
func Eigen(a mat.Matrix) (*EigenStructure, error) {
	if a == nil || isNilDense(a) {
		return &EigenStructure{}, nil
	}
	r, c := a.Dims()
	if r != c {
		return nil, &ShapeError{What: "eigenvalues need a square matrix", Got: Shape(a), Other: fmt.Sprintf("%dx%d", r, r)}
	}
	if err := CheckFinite("matrix", a); err != nil {
		return nil, err
	}
	var e mat.Eigen
	if !e.Factorize(a, mat.EigenBoth) {
		return nil, errors.New("the eigenvalue iteration did not converge; try balancing or rescaling the states")
	}
	vals := e.Values(nil)
	var vr, vl mat.CDense
	e.VectorsTo(&vr)
	e.LeftVectorsTo(&vl)
	es := &EigenStructure{Values: vals}
	n := r
	es.Right = make([][]complex128, n)
	es.Left = make([][]complex128, n)
	es.Cond = make([]float64, n)
	for k := 0; k < n; k++ {
		v := make([]complex128, n)
		w := make([]complex128, n)
		for i := 0; i < n; i++ {
			v[i] = vr.At(i, k)
			w[i] = vl.At(i, k)
		}
		unitNormalize(v)
		unitNormalize(w)
		es.Right[k], es.Left[k] = v, w
		d := cmplx.Abs(eigDotH(w, v))
		if d == 0 {
			es.Cond[k] = math.Inf(1)
		} else {
			es.Cond[k] = 1 / d
		}
	}
	return es, nil
}

// Poles returns the eigenvalues of the system's A (the poles), in the order
// of the mode table: by natural frequency, then damping; a conjugate pair as
// two consecutive entries, positive imaginary part first. A static gain has
// no poles. Rounding residue is removed with the boundary tolerance of
// StabilityOf, tol = 1000 u max(1, ||A||_F) (u the unit roundoff): a real
// part within tol of 0 is reported as exactly 0 (continuous time; a sampled
// pole within tol of 1 as exactly 1), and an imaginary part within tol of 0
// as exactly 0, so a rigid-body mode or an integrator reads as s = 0, not
// as a tiny stable or unstable pole. A multiple pole is listed by its
// cluster's mean, once per multiplicity, as in the mode table.
func Poles(s *System) ([]complex128, error) {
	if s.N() == 0 {
		return nil, nil
	}
	es, us, err := decisionEigen(s.A)
	if err != nil {
		return nil, err
	}
	tol := boundaryTol(us.A)
	// A multiple pole split by rounding (a double pole comes out about
	// sqrt(u) |p| apart, as a close pair) is reported as its cluster's
	// mean, repeated, with the clustering of the mode table (see Jordan),
	// decided in unit-free coordinates (see unitScaling).
	vals := append([]complex128(nil), es.Values...)
	normA := mat.Norm(us.A, 2)
	decide := es.Cond
	if es.decide != nil {
		decide = es.decide
	}
	// A simple eigenvalue is accurate to about u ||A|| times its
	// condition, so its boundary tolerance grows with it, as in the
	// stability verdict (see JordanCluster.BoundaryTol); a cluster's mean
	// keeps tol.
	btol := make([]float64, len(vals))
	for _, g := range clusterEigenvalues(vals, decide, normA, 1e-3*math.Max(normA, dlamchE), 0) {
		for _, k := range g.idx {
			btol[k] = tol
		}
		if len(g.idx) < 2 {
			btol[g.idx[0]] = tol * math.Max(1, decide[g.idx[0]])
			continue
		}
		var mean complex128
		for _, k := range g.idx {
			mean += es.Values[k]
		}
		mean /= complex(float64(len(g.idx)), 0)
		if g.real {
			mean = complex(real(mean), 0)
		}
		for _, k := range g.idx {
			vals[k] = mean
		}
	}
	idx := orderEigenvalues(vals, s.Ts)
	out := make([]complex128, len(idx))
	for i, k := range idx {
		out[i] = snapParts(vals[k], s.Ts, tol, btol[k])
	}
	return out, nil
}

// boundaryTol is 1000 u max(1, ||A||_F), below which the computation does
// not resolve the distance of an eigenvalue from the stability boundary.
// Callers pass the balanced A (see unitScaling), so it does not depend on
// units.
func boundaryTol(A *mat.Dense) float64 {
	return 1e3 * dlamchE * math.Max(1, mat.Norm(A, 2))
}

// snapValue sets parts of v within tol of the boundary (Re s = 0, or z = 1
// when ts > 0) or of the real axis exactly there.
func snapValue(v complex128, ts, tol float64) complex128 { return snapParts(v, ts, tol, tol) }

// snapParts is snapValue with one tolerance for the real axis (imTol) and
// another for the stability boundary (boundTol).
func snapParts(v complex128, ts, imTol, boundTol float64) complex128 {
	re, im := real(v), imag(v)
	if math.Abs(im) <= imTol {
		im = 0
	}
	if ts > 0 {
		if im == 0 && math.Abs(re-1) <= boundTol {
			re = 1
		}
	} else if math.Abs(re) <= boundTol {
		re = 0
	}
	return complex(re, im)
}

// orderEigenvalues returns the indices of vals sorted by natural frequency,
// then damping, then imaginary part descending, then real part, so that
// equal inputs always give the same order.
func orderEigenvalues(vals []complex128, ts float64) []int {
	type key struct{ wn, zeta, im, re float64 }
	keys := make([]key, len(vals))
	idx := make([]int, len(vals))
	for i, v := range vals {
		s := continuousEquivalent(v, ts)
		wn, zeta := naturalAndDamping(s)
		keys[i] = key{wn, zeta, imag(v), real(v)}
		idx[i] = i
	}
	sort.SliceStable(idx, func(a, b int) bool {
		ka, kb := keys[idx[a]], keys[idx[b]]
		if ka.wn != kb.wn {
			return ka.wn < kb.wn
		}
		if ka.zeta != kb.zeta {
			return ka.zeta < kb.zeta
		}
		// Positive imaginary first so pairs read (+, -).
		if ka.im != kb.im {
			return ka.im > kb.im
		}
		return ka.re < kb.re
	})
	return idx
}

// continuousEquivalent maps an eigenvalue to the s-plane: itself for
// continuous time, log(z)/Ts for sampled systems (principal branch, so a
// negative real z maps to the Nyquist frequency pi/Ts). z = 0 maps to
// -Inf (a deadbeat mode).
func continuousEquivalent(v complex128, ts float64) complex128 {
	if ts <= 0 {
		return v
	}
	if v == 0 {
		return complex(math.Inf(-1), 0)
	}
	return cmplx.Log(v) / complex(ts, 0)
}

// naturalAndDamping returns |s| and -Re(s)/|s| with the conventions of the
// mode table: damping 0 at the origin, 1 for a deadbeat mode.
func naturalAndDamping(s complex128) (wn, zeta float64) {
	if math.IsInf(real(s), -1) {
		return math.Inf(1), 1
	}
	wn = cmplx.Abs(s)
	if wn == 0 {
		return 0, 0
	}
	return wn, -real(s) / wn
}

func eigDotH(w, v []complex128) complex128 { // w^H v
	var s complex128
	for i := range w {
		s += cmplx.Conj(w[i]) * v[i]
	}
	return s
}

func eigNorm2(v []complex128) float64 {
	var scale, ssq float64 = 0, 1
	for _, x := range v {
		for _, f := range [2]float64{real(x), imag(x)} {
			if f != 0 {
				a := math.Abs(f)
				if scale < a {
					ssq = 1 + ssq*(scale/a)*(scale/a)
					scale = a
				} else {
					ssq += (a / scale) * (a / scale)
				}
			}
		}
	}
	return scale * math.Sqrt(ssq)
}

func unitNormalize(v []complex128) {
	nv := eigNorm2(v)
	if nv == 0 {
		return
	}
	for i := range v {
		v[i] /= complex(nv, 0)
	}
}
