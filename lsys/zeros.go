package lsys

import (
	"errors"
	"fmt"
	"math"
	"math/cmplx"

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
	// Tol is the absolute rank tolerance of the pencil reduction,
	// RelTol times the Frobenius norm of [[A, B], [C, D]].
	Tol, RelTol float64
	// ReducedOrder is the order of the regular pencil left by the
	// reduction, whose generalized eigenvalues are the zeros.
	ReducedOrder int
}

// Zeros computes the invariant zeros of s from the system pencil reduced as
// in Emami-Naeini & Van Dooren (1982, Computation of zeros of linear
// multivariable systems, Automatica 18(4)): orthogonal row and column
// compressions, with every rank decided by singular values at
// tol = relTol * ||[[A, B], [C, D]]||_F, remove the infinite zeros and the
// non-square part, leaving a regular pencil whose finite generalized
// eigenvalues (by QZ) are the zeros. Transmission zeros come from the same
// computation on a minimal realization; decoupling zeros from the staircase
// forms. relTol <= 0 means DefaultRelTol. MIMO and non-square systems are
// handled; a static gain has no zeros.
func Zeros(s *System, relTol float64) (*ZeroSet, error) {
	if relTol <= 0 || math.IsNaN(relTol) {
		relTol = DefaultRelTol
	}
	zs := &ZeroSet{System: s, RelTol: relTol}
	if s.N() == 0 {
		return zs, nil
	}
	var err error
	zs.Invariant, zs.ReducedOrder, zs.Tol, err = invariantZeros(s, relTol)
	if err != nil {
		return nil, err
	}
	mr, err := Minimal(s, relTol)
	if err != nil {
		return nil, err
	}
	if mr.N() > 0 {
		zs.Transmission, _, _, err = invariantZeros(mr, relTol)
		if err != nil {
			return nil, err
		}
	}
	st, err := StructureOf(s, relTol)
	if err != nil {
		return nil, err
	}
	zs.InputDecoupling = st.UncontrollableModes
	zs.OutputDecoupling = st.UnobservableModes
	return zs, nil
}

func invariantZeros(s *System, relTol float64) ([]complex128, int, float64, error) {
	n, m, p := s.N(), s.M(), s.P()
	P := mat.NewDense(n+p, n+m, nil)
	P.Slice(0, n, 0, n).(*mat.Dense).Copy(s.A)
	if m > 0 {
		P.Slice(0, n, n, n+m).(*mat.Dense).Copy(s.B)
	}
	if p > 0 {
		P.Slice(n, n+p, 0, n).(*mat.Dense).Copy(s.C)
	}
	if m > 0 && p > 0 {
		P.Slice(n, n+p, n, n+m).(*mat.Dense).Copy(s.D)
	}
	tol := relTol * mat.Norm(P, 2)
	if m == 0 || p == 0 {
		// No inputs or no outputs: the pencil [A - sI; C] or [A - sI, B]
		// loses rank exactly at the unobservable / uncontrollable modes.
		return nil, 0, tol, nil
	}
	r := &zsys{A: mat.DenseCopyOf(s.A), B: mat.DenseCopyOf(s.B), C: mat.DenseCopyOf(s.C), D: mat.DenseCopyOf(s.D), n: n, m: m, p: p}
	r = zeroReduce(r, tol)
	if r.n == 0 {
		return nil, 0, tol, nil
	}
	// Dual reduction on the transposed system.
	t := &zsys{A: zTr(r.A), B: zTr(r.C), C: zTr(r.B), D: zTr(r.D), n: r.n, m: r.p, p: r.m}
	t = zeroReduce(t, tol)
	if t.n == 0 {
		return nil, 0, tol, nil
	}
	f := &zsys{A: zTr(t.A), B: zTr(t.C), C: zTr(t.B), D: zTr(t.D), n: t.n, m: t.p, p: t.m}
	nf, mf := f.n, f.m
	// Compress the columns of [C D]: [C D] W = [0 D~]; the zeros are the
	// generalized eigenvalues of ([A B] W1, [I 0] W1), W1 the first nf
	// columns of W.
	var W *mat.Dense
	if f.p > 0 {
		CD := stHcat(f.p, f.C, f.D)
		W = stRowSpaceLast(CD, tol)
	} else {
		W = identity(nf + mf)
	}
	if W == nil {
		return nil, nf, tol, errors.New("zeros: the reduced pencil could not be compressed")
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
		return nil, nf, tol, fmt.Errorf("zeros: the reduced pencil is %dx%d, not square: a rank decision is borderline at tolerance %.3g; try another tolerance", nf, k, tol)
	}
	W1 := W.Slice(0, nf+mf, 0, nf)
	var Af, Ef mat.Dense
	Af.Mul(AB, W1)
	Ef.Mul(IE, W1)
	ge, err := QZ(&Af, &Ef)
	if err != nil {
		return nil, nf, tol, err
	}
	var vals []complex128
	for _, g := range ge {
		if g.Finite(1e3 * dlamchE * float64(nf)) {
			vals = append(vals, g.Value())
		}
	}
	vals = realPencilValues(vals)
	idx := orderEigenvalues(vals, 0)
	out := make([]complex128, len(vals))
	for i, j := range idx {
		out[i] = vals[j]
	}
	return out, nf, tol, nil
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
