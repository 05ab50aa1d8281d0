package lsys

import (
	"errors"
	"fmt"
	"math"
	"math/cmplx"
	"strings"

	"gonum.org/v1/gonum/lapack"
	"gonum.org/v1/gonum/lapack/gonum"
	"gonum.org/v1/gonum/mat"
)

// SchurForm is a real Schur decomposition A = Z T Z^T: Z orthogonal, T upper
// quasi-triangular with 1x1 blocks for real eigenvalues and 2x2 blocks
// [[a, b], [c, a]] (b c < 0) for complex pairs.
type SchurForm struct {
	T, Z   *mat.Dense
	Values []complex128 // eigenvalues in the order of T's diagonal blocks
}

// Schur computes the real Schur form by Householder reduction to Hessenberg
// form and the Francis double-shift QR algorithm (Francis 1961; Dgehrd, Dorghr and
// Dhseqr of the dense backend). No scaling is applied, so Z stays orthogonal.
func Schur(A *mat.Dense) (*SchurForm, error) {
	if A == nil {
		return &SchurForm{}, nil
	}
	n, c := A.Dims()
	if n != c {
		return nil, &ShapeError{What: "the Schur form needs a square matrix", Got: Shape(A), Other: fmt.Sprintf("%dx%d", n, n)}
	}
	if err := CheckFinite("matrix", A); err != nil {
		return nil, err
	}
	if n == 1 {
		return &SchurForm{T: mat.DenseCopyOf(A), Z: identity(1), Values: []complex128{complex(A.At(0, 0), 0)}}, nil
	}
	impl := denseImpl
	h := mat.DenseCopyOf(A)
	hr := h.RawMatrix()
	tau := make([]float64, max(n-1, 1))
	work := make([]float64, 1)
	impl.Dgehrd(n, 0, n-1, hr.Data, hr.Stride, tau, work, -1)
	work = make([]float64, int(work[0])+n)
	impl.Dgehrd(n, 0, n-1, hr.Data, hr.Stride, tau, work, len(work))
	z := mat.DenseCopyOf(h)
	zr := z.RawMatrix()
	impl.Dorghr(n, 0, n-1, zr.Data, zr.Stride, tau, work, -1)
	if int(work[0]) > len(work) {
		work = make([]float64, int(work[0]))
	}
	impl.Dorghr(n, 0, n-1, zr.Data, zr.Stride, tau, work, len(work))
	for i := 0; i < n; i++ {
		for j := 0; j < i-1; j++ {
			h.Set(i, j, 0)
		}
	}
	wr := make([]float64, n)
	wi := make([]float64, n)
	impl.Dhseqr(lapack.EigenvaluesAndSchur, lapack.SchurOrig, n, 0, n-1, hr.Data, hr.Stride, wr, wi, zr.Data, zr.Stride, work, -1)
	if int(work[0]) > len(work) {
		work = make([]float64, int(work[0]))
	}
	if unconv := impl.Dhseqr(lapack.EigenvaluesAndSchur, lapack.SchurOrig, n, 0, n-1, hr.Data, hr.Stride, wr, wi, zr.Data, zr.Stride, work, len(work)); unconv != 0 {
		return nil, errors.New("the Schur iteration did not converge; try rescaling the states")
	}
	sf := &SchurForm{T: h, Z: z, Values: make([]complex128, n)}
	for i := range wr {
		sf.Values[i] = complex(wr[i], wi[i])
	}
	return sf, nil
}

// schurBlocks returns the first row of each diagonal block of T.
func schurBlocks(T *mat.Dense) []int {
	n, _ := T.Dims()
	var out []int
	for i := 0; i < n; {
		out = append(out, i)
		if i+1 < n && T.At(i+1, i) != 0 {
			i += 2
		} else {
			i++
		}
	}
	return out
}

func schurBlockValue(T *mat.Dense, i int) complex128 {
	n, _ := T.Dims()
	if i+1 < n && T.At(i+1, i) != 0 {
		a, b, c := T.At(i, i), T.At(i, i+1), T.At(i+1, i)
		return complex(a, math.Sqrt(math.Abs(b))*math.Sqrt(math.Abs(c)))
	}
	return complex(T.At(i, i), 0)
}

// Reorder moves the diagonal blocks whose eigenvalue satisfies sel to the
// top-left of T by orthogonal swaps of adjacent blocks (Bai & Demmel 1993,
// On swapping diagonal blocks in real Schur form, Lin. Alg. Appl. 186;
// gonum's Dtrexc), updating Z. It returns the dimension of the selected
// invariant subspace, spanned by the first columns of Z. sel is asked for
// the eigenvalue with nonnegative imaginary part of each block.
func (sf *SchurForm) Reorder(sel func(complex128) bool) (int, error) {
	if sf.T == nil {
		return 0, nil
	}
	n, _ := sf.T.Dims()
	impl := gonum.Implementation{}
	tr, zr := sf.T.RawMatrix(), sf.Z.RawMatrix()
	work := make([]float64, n)
	ks := 0
	for i := 0; i < n; {
		size := 1
		if i+1 < n && sf.T.At(i+1, i) != 0 {
			size = 2
		}
		if sel(schurBlockValue(sf.T, i)) {
			if i != ks {
				_, _, ok := impl.Dtrexc(lapack.UpdateSchur, n, tr.Data, tr.Stride, zr.Data, zr.Stride, i, ks, work)
				if !ok {
					return 0, errors.New("reordering the Schur form failed: two eigenvalues are too close to be separated; group them with a larger selection")
				}
			}
			ks += size
		}
		i += size
	}
	// Refresh eigenvalues in the new order.
	sf.Values = sf.Values[:0]
	for _, i := range schurBlocks(sf.T) {
		v := schurBlockValue(sf.T, i)
		sf.Values = append(sf.Values, v)
		if imag(v) != 0 {
			sf.Values = append(sf.Values, cmplx.Conj(v))
		}
	}
	return ks, nil
}

// Subspace is a subspace of the state space with an orthonormal basis.
type Subspace struct {
	What       string     // e.g. "reachable subspace"
	N          int        // dimension of the state space
	Dim        int        // dimension of the subspace
	Basis      *mat.Dense // N x Dim, orthonormal columns; nil when Dim == 0
	StateNames []string
	// Values are the eigenvalues of A restricted to the subspace; nil when
	// the subspace is not A-invariant (it has no eigenvalues then).
	Values []complex128
	// Residual is ||A V - V (V^T A V)||_F / ||A||_F, zero for an exactly
	// A-invariant subspace; Invariant compares it with Tol.
	Residual  float64
	Invariant bool
	Tol       float64
	Note      string // how it was computed and the tolerance of its rank decisions
}

func newSubspace(what string, s *System, A, V *mat.Dense, tol float64) *Subspace {
	sub := &Subspace{What: what, N: s.N(), StateNames: s.StateNames, Tol: tol}
	if V != nil {
		_, sub.Dim = V.Dims()
	}
	if sub.Dim == 0 {
		sub.Invariant = true
		return sub
	}
	sub.Basis = V
	sub.Residual, sub.Values = invariantResidual(A, V)
	sub.Invariant = sub.Residual <= tol
	if !sub.Invariant {
		// The eigenvalues of V^T A V belong to no subspace of A unless
		// span(V) is invariant: a non-invariant subspace has none.
		sub.Values = nil
	}
	return sub
}

// invariantResidual returns ||A V - V H||_F / ||A||_F with H = V^T A V for
// orthonormal V, and the eigenvalues of H.
func invariantResidual(A, V *mat.Dense) (float64, []complex128) {
	var AV, H, R mat.Dense
	AV.Mul(A, V)
	H.Mul(V.T(), &AV)
	R.Mul(V, &H)
	R.Sub(&AV, &R)
	na := mat.Norm(A, 2)
	res := mat.Norm(&R, 2)
	if na > 0 {
		res /= na
	}
	var vals []complex128
	if es, err := Eigen(&H); err == nil {
		idx := orderEigenvalues(es.Values, 0)
		for _, k := range idx {
			vals = append(vals, es.Values[k])
		}
	}
	return res, vals
}

// Spectral returns the invariant subspace of A belonging to the chosen
// eigenvalues, with an orthonormal basis from the ordered real Schur form.
// which is "stable" (Re s < 0, or |z| < 1 when sampled) or "unstable" (the
// rest); SpectralAt selects a list of eigenvalues.
func Spectral(s *System, which string) (*Subspace, error) {
	var sel func(complex128) bool
	switch which {
	case "stable":
		sel = func(v complex128) bool { return stableValue(v, s.Ts) }
	case "unstable":
		sel = func(v complex128) bool { return !stableValue(v, s.Ts) }
	default:
		return nil, fmt.Errorf("unknown selection %q; use \"stable\", \"unstable\" or a list of eigenvalues", which)
	}
	return spectral(s, which+" subspace", sel)
}

func stableValue(v complex128, ts float64) bool {
	if ts > 0 {
		return cmplx.Abs(v) < 1
	}
	return real(v) < 0
}

// SpectralAt returns the invariant subspace of the listed eigenvalues of
// A: each listed value selects every eigenvalue within 1e-6 relative of it
// (so values typed with six digits still match). Listing one member of a
// conjugate pair selects the pair (a real subspace must hold both).
func SpectralAt(s *System, values []complex128) (*Subspace, error) {
	if s.N() == 0 {
		return &Subspace{What: "spectral subspace"}, nil
	}
	es, err := Eigen(s.A)
	if err != nil {
		return nil, err
	}
	const rel = 1e-6
	for _, want := range values {
		found := false
		for _, v := range es.Values {
			if cmplx.Abs(v-want) <= rel*math.Max(1, cmplx.Abs(want)) || cmplx.Abs(cmplx.Conj(v)-want) <= rel*math.Max(1, cmplx.Abs(want)) {
				found = true
			}
		}
		if !found {
			var list []string
			for _, v := range es.Values {
				list = append(list, fmtComplex(v))
			}
			return nil, fmt.Errorf("%s is not an eigenvalue of A (within 1e-6 relative); the eigenvalues are %s", fmtComplex(want), strings.Join(list, ", "))
		}
	}
	sel := func(v complex128) bool {
		for _, want := range values {
			tol := rel * math.Max(1, cmplx.Abs(want))
			if cmplx.Abs(v-want) <= tol || cmplx.Abs(cmplx.Conj(v)-want) <= tol {
				return true
			}
		}
		return false
	}
	return spectral(s, "spectral subspace", sel)
}

func spectral(s *System, what string, sel func(complex128) bool) (*Subspace, error) {
	if s.N() == 0 {
		return &Subspace{What: what}, nil
	}
	sf, err := Schur(s.A)
	if err != nil {
		return nil, err
	}
	k, err := sf.Reorder(sel)
	if err != nil {
		return nil, err
	}
	var V *mat.Dense
	if k > 0 {
		V = mat.DenseCopyOf(sf.Z.Slice(0, s.N(), 0, k))
	}
	sub := newSubspace(what, s, s.A, V, 1e3*float64(s.N())*dlamchE)
	sub.Note = "leading Schur vectors of the reordered real Schur form"
	return sub, nil
}

const dlamchE = 1.1102230246251565e-16 // unit roundoff, 2^-53

// InvariantCheck is the result of Invariant.
type InvariantCheck struct {
	Subspace *Subspace
	Rank     int     // rank of the given V (columns spanning the subspace)
	Tol      float64 // tolerance on the relative residual
}

// Invariant reports whether span(V) is A-invariant: it orthonormalises V
// (singular value decomposition, rank decided at relTol*||V||), and compares
// the relative residual ||A Q - Q (Q^T A Q)||_F / ||A||_F with
// tol = 1000 n u (u the unit roundoff) unless relTol asks for more.
func Invariant(A, V *mat.Dense, relTol float64) (*InvariantCheck, error) {
	if A == nil || V == nil {
		return nil, errors.New("A and V must be non-empty matrices")
	}
	n, c := A.Dims()
	if n != c {
		return nil, &ShapeError{What: "A must be square", Got: Shape(A), Other: fmt.Sprintf("%dx%d", n, n)}
	}
	if vr, _ := V.Dims(); vr != n {
		return nil, &ShapeError{What: "V must have as many rows as A", Got: Shape(V), Other: Shape(A)}
	}
	if err := CheckFinite("A", A); err != nil {
		return nil, err
	}
	if err := CheckFinite("V", V); err != nil {
		return nil, err
	}
	if relTol <= 0 || math.IsNaN(relTol) {
		relTol = DefaultRelTol
	}
	Q, _ := stOrth(V, relTol)
	tol := math.Max(1e3*float64(n)*dlamchE, relTol)
	s := &System{A: A, n: n, StateNames: defaultNames("x", n)}
	sub := newSubspace("span(V)", s, A, Q, tol)
	rank := 0
	if Q != nil {
		_, rank = Q.Dims()
	}
	sub.Note = fmt.Sprintf("orthonormal basis of V (rank %d at tolerance %.3g relative)", rank, relTol)
	return &InvariantCheck{Subspace: sub, Rank: rank, Tol: tol}, nil
}

// stOrth returns an orthonormal basis of range(V) from its singular value
// decomposition, with the rank decided at relTol times the largest singular
// value; nil when V is zero. It also returns the singular values.
func stOrth(V *mat.Dense, relTol float64) (*mat.Dense, []float64) {
	r, c := V.Dims()
	var svd mat.SVD
	if !svd.Factorize(V, mat.SVDThin) {
		return nil, nil
	}
	sv := svd.Values(nil)
	k := 0
	for _, v := range sv {
		if len(sv) > 0 && v > relTol*sv[0] && v > 0 {
			k++
		}
	}
	if k == 0 {
		return nil, sv
	}
	var U mat.Dense
	svd.UTo(&U)
	_ = c
	return mat.DenseCopyOf(U.Slice(0, r, 0, k)), sv
}

// stNullRight returns an orthonormal basis of the right null space of M
// (columns), with singular values at or below tol counted as zero.
func stNullRight(M *mat.Dense, tol float64) *mat.Dense {
	r, c := M.Dims()
	var svd mat.SVD
	if !svd.Factorize(M, mat.SVDFull) {
		return nil
	}
	sv := svd.Values(nil)
	rank := 0
	for _, v := range sv {
		if v > tol {
			rank++
		}
	}
	_ = r
	if rank >= c {
		return nil
	}
	var Vt mat.Dense
	svd.VTo(&Vt)
	return mat.DenseCopyOf(Vt.Slice(0, c, rank, c))
}

// stComplement returns an orthonormal basis of the orthogonal complement of
// range(Q) (Q with orthonormal columns, or nil) in R^n.
func stComplement(Q *mat.Dense, n int) *mat.Dense {
	if Q == nil {
		return identity(n)
	}
	_, k := Q.Dims()
	if k >= n {
		return nil
	}
	var svd mat.SVD
	if !svd.Factorize(Q, mat.SVDFull) {
		return nil
	}
	var U mat.Dense
	svd.UTo(&U)
	return mat.DenseCopyOf(U.Slice(0, n, k, n))
}

// stHcat joins matrices side by side, skipping nil ones; nil if all are.
func stHcat(n int, parts ...*mat.Dense) *mat.Dense {
	total := 0
	for _, p := range parts {
		if p != nil {
			_, c := p.Dims()
			total += c
		}
	}
	if total == 0 {
		return nil
	}
	out := mat.NewDense(n, total, nil)
	col := 0
	for _, p := range parts {
		if p == nil {
			continue
		}
		_, c := p.Dims()
		out.Slice(0, n, col, col+c).(*mat.Dense).Copy(p)
		col += c
	}
	return out
}
