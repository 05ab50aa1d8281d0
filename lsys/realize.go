package lsys

import (
	"errors"
	"fmt"
	"math"

	"gonum.org/v1/gonum/lapack"
	"gonum.org/v1/gonum/lapack/gonum"
	"gonum.org/v1/gonum/mat"
)

// Realize returns a minimal state-space realization of a transfer matrix
// given as rows (outputs) of columns (inputs) of rational functions, all with
// sample time ts (0 for functions of s, > 0 for functions of z).
//
// Method: each column is realized in controllable companion form over the
// product of its distinct denominators (so the realization is controllable
// by construction), the columns are stacked block-diagonally, and the
// uncontrollable and unobservable parts are removed with the orthogonal
// staircase reduction (Van Dooren 1981, "The generalized eigenstructure
// problem in linear system theory", IEEE TAC 26(1)), which is where
// pole-zero cancellations disappear. Rank decisions use the tolerance of
// RealizeTol with tol = 0 (see there).
//
// Every entry must be proper (degree of numerator <= degree of
// denominator); an improper entry is refused, since it has no state-space
// form.
func Realize(tf [][]*Rational, ts float64) (*System, error) {
	return RealizeTol(tf, ts, 0)
}

// RealizeTol is Realize with an explicit absolute tolerance for the rank
// decisions of the staircase reduction: a singular value at or below tol
// counts as zero. tol <= 0 selects the default
// 1e-10 * max(1, ||[A B]||_F) of the non-minimal companion realization
// (a pole and a zero closer than about this relative distance cancel).
func RealizeTol(tf [][]*Rational, ts float64, tol float64) (*System, error) {
	p := len(tf)
	if p == 0 || len(tf[0]) == 0 {
		return nil, errors.New("realize: the transfer matrix is empty")
	}
	if math.IsNaN(ts) || math.IsInf(ts, 0) || ts < 0 {
		return nil, fmt.Errorf("realize: sample time must be finite and >= 0, got %v", ts)
	}
	m := len(tf[0])
	for i, row := range tf {
		if len(row) != m {
			return nil, fmt.Errorf("realize: row %d has %d entries but row 1 has %d; every output needs one entry per input", i+1, len(row), m)
		}
	}
	type entry struct{ num, den []float64 }
	ent := make([][]entry, p)
	for i := range tf {
		ent[i] = make([]entry, m)
		for j, r := range tf[i] {
			where := fmt.Sprintf("entry [%d, %d]", i+1, j+1)
			if r == nil {
				return nil, fmt.Errorf("realize: %s is missing", where)
			}
			if r.Ts != ts {
				return nil, fmt.Errorf("realize: %s has sample time %s but the matrix is %s", where, tsText(r.Ts), tsText(ts))
			}
			num, den := polyTrim(r.Num), polyTrim(r.Den)
			for _, c := range append(append([]float64(nil), num...), den...) {
				if math.IsNaN(c) || math.IsInf(c, 0) {
					return nil, fmt.Errorf("realize: %s has a coefficient %v; coefficients must be finite", where, c)
				}
			}
			if len(den) == 0 {
				return nil, fmt.Errorf("realize: %s has a zero denominator", where)
			}
			if len(num) > len(den) {
				return nil, fmt.Errorf("realize: %s is improper (numerator degree %d above denominator degree %d); a state-space model needs a proper transfer function", where, len(num)-1, len(den)-1)
			}
			lead := den[len(den)-1]
			ent[i][j] = entry{polyScale(1/lead, num), polyScale(1/lead, den)}
		}
	}
	var As, Bs, Cs []*mat.Dense
	ns := make([]int, m)
	D := mat.NewDense(p, m, nil)
	for j := 0; j < m; j++ {
		// distinct monic denominators of the column
		var dens [][]float64
		which := make([]int, p)
		for i := 0; i < p; i++ {
			k := -1
			for q, d := range dens {
				if polyEqual(d, ent[i][j].den) {
					k = q
					break
				}
			}
			if k < 0 {
				k = len(dens)
				dens = append(dens, ent[i][j].den)
			}
			which[i] = k
		}
		d := []float64{1}
		for _, dd := range dens {
			d = polyMul(d, dd)
		}
		nj := len(d) - 1
		ns[j] = nj
		Cj := mat.NewDense(p, max(nj, 1), nil)
		for i := 0; i < p; i++ {
			num := ent[i][j].num
			for q, dd := range dens {
				if q != which[i] {
					num = polyMul(num, dd)
				}
			}
			// num has degree <= nj; split off the direct term.
			full := make([]float64, nj+1)
			copy(full, num)
			dij := full[nj]
			D.Set(i, j, dij)
			for k := 0; k < nj; k++ {
				Cj.Set(i, k, full[k]-dij*d[k])
			}
		}
		if nj == 0 {
			As, Bs, Cs = append(As, nil), append(Bs, nil), append(Cs, nil)
			continue
		}
		Aj := mat.NewDense(nj, nj, nil)
		for k := 0; k+1 < nj; k++ {
			Aj.Set(k, k+1, 1)
		}
		for k := 0; k < nj; k++ {
			Aj.Set(nj-1, k, -d[k])
		}
		Bj := mat.NewDense(nj, 1, nil)
		Bj.Set(nj-1, 0, 1)
		As, Bs, Cs = append(As, Aj), append(Bs, Bj), append(Cs, Cj)
	}
	n := 0
	for _, v := range ns {
		n += v
	}
	if n == 0 {
		return NewSystem(0, m, p, nil, nil, nil, D, ts)
	}
	ones := make([]int, m)
	for j := range ones {
		ones[j] = 1
	}
	Ab := make([][]*mat.Dense, m)
	Bb := make([][]*mat.Dense, m)
	Cb := [][]*mat.Dense{make([]*mat.Dense, m)}
	for j := 0; j < m; j++ {
		Ab[j], Bb[j] = make([]*mat.Dense, m), make([]*mat.Dense, m)
		Ab[j][j], Bb[j][j] = As[j], Bs[j]
		if ns[j] > 0 {
			Cb[0][j] = Cs[j]
		}
	}
	A := blocks(ns, ns, Ab)
	B := blocks(ns, ones, Bb)
	C := blocks([]int{p}, ns, Cb)
	balanceScale(A, B, C)
	if tol <= 0 {
		var AB mat.Dense
		AB.Augment(A, B)
		tol = 1e-10 * math.Max(1, mat.Norm(&AB, 2))
	}
	A, B, C = staircase(A, B, C, tol)
	if A != nil {
		var At, Ct, Bt *mat.Dense
		At, Ct, Bt = staircase(mat.DenseCopyOf(A.T()), mat.DenseCopyOf(C.T()), mat.DenseCopyOf(B.T()), tol)
		if At == nil {
			A, B, C = nil, nil, nil
		} else {
			A, B, C = mat.DenseCopyOf(At.T()), mat.DenseCopyOf(Bt.T()), mat.DenseCopyOf(Ct.T())
		}
	}
	nr := 0
	if A != nil {
		nr, _ = A.Dims()
	}
	return NewSystem(nr, m, p, A, B, C, D, ts)
}

// balanceScale applies the diagonal similarity of LAPACK's balancing
// (Dgebal, scaling only; Parlett & Reinsch 1969, "Balancing a matrix for
// calculation of eigenvalues and eigenvectors", Numer. Math. 13) in place:
// A <- D^-1 A D, B <- D^-1 B, C <- C D. Companion forms of polynomials with
// widely spread coefficients (a short dead time, fast and slow poles
// together) have huge entries; balancing brings the norm near the spectral
// radius, which the rank decisions and all later computations benefit from.
// Powers of two only, so the transfer function is not changed by rounding.
func balanceScale(A, B, C *mat.Dense) {
	n, _ := A.Dims()
	raw := A.RawMatrix()
	d := make([]float64, n)
	gonum.Implementation{}.Dgebal(lapack.Scale, n, raw.Data, raw.Stride, d)
	for i := 0; i < n; i++ {
		for j := 0; j < B.RawMatrix().Cols; j++ {
			B.Set(i, j, B.At(i, j)/d[i])
		}
		for j := 0; j < C.RawMatrix().Rows; j++ {
			C.Set(j, i, C.At(j, i)*d[i])
		}
	}
}

// staircase returns the controllable part of (A, B, C) by the orthogonal
// staircase reduction (Van Dooren 1981): the columns of B, then of each new
// subdiagonal block of A, are compressed by an SVD, singular values at or
// below tol counting as zero, until no new direction is reached. It returns
// nil matrices when nothing is controllable.
func staircase(A, B, C *mat.Dense, tol float64) (*mat.Dense, *mat.Dense, *mat.Dense) {
	n, _ := A.Dims()
	A, B, C = mat.DenseCopyOf(A), mat.DenseCopyOf(B), mat.DenseCopyOf(C)
	k, kprev := 0, 0
	first := true
	for k < n {
		var M mat.Matrix
		if first {
			M = B.Slice(k, n, 0, B.RawMatrix().Cols)
		} else {
			M = A.Slice(k, n, kprev, k)
		}
		var svd mat.SVD
		if !svd.Factorize(M, mat.SVDFull) {
			break
		}
		r := 0
		for _, s := range svd.Values(nil) {
			if s > tol {
				r++
			}
		}
		if r == 0 {
			break
		}
		var U mat.Dense
		svd.UTo(&U)
		rows := func(X *mat.Dense) {
			_, c := X.Dims()
			sub := X.Slice(k, n, 0, c)
			var t mat.Dense
			t.Mul(U.T(), sub)
			sub.(*mat.Dense).Copy(&t)
		}
		cols := func(X *mat.Dense) {
			r, _ := X.Dims()
			sub := X.Slice(0, r, k, n)
			var t mat.Dense
			t.Mul(sub, &U)
			sub.(*mat.Dense).Copy(&t)
		}
		rows(A)
		cols(A)
		rows(B)
		cols(C)
		// Zero what the rank decision declared zero, so the form is exact.
		if first {
			zeroBlock(B, k+r, n, 0, B.RawMatrix().Cols)
		} else {
			zeroBlock(A, k+r, n, kprev, k)
		}
		first = false
		kprev = k
		k += r
	}
	if k == 0 {
		return nil, nil, nil
	}
	_, mc := B.Dims()
	pr, _ := C.Dims()
	return mat.DenseCopyOf(A.Slice(0, k, 0, k)), mat.DenseCopyOf(B.Slice(0, k, 0, mc)), mat.DenseCopyOf(C.Slice(0, pr, 0, k))
}

func zeroBlock(X *mat.Dense, r0, r1, c0, c1 int) {
	for i := r0; i < r1; i++ {
		for j := c0; j < c1; j++ {
			X.Set(i, j, 0)
		}
	}
}

// polyTrim drops exactly-zero highest coefficients (ascending order).
func polyTrim(p Poly) []float64 {
	k := len(p)
	for k > 0 && p[k-1] == 0 {
		k--
	}
	return append([]float64(nil), p[:k]...)
}

func polyScale(f float64, p []float64) []float64 {
	out := make([]float64, len(p))
	for i, c := range p {
		out[i] = f * c
	}
	return out
}

func polyMul(a, b []float64) []float64 {
	if len(a) == 0 || len(b) == 0 {
		return nil
	}
	out := make([]float64, len(a)+len(b)-1)
	for i, x := range a {
		for j, y := range b {
			out[i+j] += x * y
		}
	}
	return out
}

// polyEqual compares monic polynomials coefficient by coefficient with a
// relative tolerance of 1e-12 (common practice for exact-arithmetic input).
func polyEqual(a, b []float64) bool {
	if len(a) != len(b) {
		return false
	}
	for i := range a {
		if math.Abs(a[i]-b[i]) > 1e-12*math.Max(1, math.Max(math.Abs(a[i]), math.Abs(b[i]))) {
			return false
		}
	}
	return true
}
