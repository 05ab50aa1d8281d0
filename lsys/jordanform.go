package lsys

import (
	"errors"
	"fmt"
	"math"
	"math/cmplx"

	"gonum.org/v1/gonum/mat"
)

// JordanForm is A = T J T^-1 with J in Jordan form: one block per entry of
// the Jordan structure, eigenvalue on the diagonal and 1 above it. J and T
// are complex when A has complex eigenvalues (a conjugate pair's blocks
// come one after the other, T's columns conjugate).
type JordanForm struct {
	Structure *JordanStructure
	J, T      *mat.CDense
	Real      bool // every eigenvalue real: J and T are real
	// BlockValues[i] and BlockSizes[i] describe the i-th block along J's
	// diagonal.
	BlockValues []complex128
	BlockSizes  []int
	// Cond is the 2-norm condition number of T: computing with T loses
	// about log10(Cond) digits; Residual is ||A T - T J||_F/(||A||_F ||T||_F).
	Cond, Residual float64
	Warning        string
}

// JordanFormOf computes the Jordan form of A from its Jordan structure
// (block sizes decided by Jordan with absTol and relTol). For each
// eigenvalue lambda, with N = A - lambda I and the kernel dimensions d_j =
// dim null(N^j) that the block sizes imply, the chains are built from the
// largest block down: a new chain of length j starts at a vector of
// null(N^j) (its d_j right singular vectors of smallest singular value)
// furthest from null(N^(j-1)) plus the level-j vectors of the longer chains
// (pivoted Gram-Schmidt), and continues v, N v, ..., N^(j-1) v (Golub &
// Wilkinson 1976, Section 9; the dimensions are prescribed, so no rank is
// decided twice). The work is done on A balanced by a diagonal scaling
// (as the structure's decisions are) and T is mapped back. Each chain is
// scaled to a largest column of norm 1.
//
// The Jordan form is not a continuous function of A: the structure is a
// numerical judgement (see Jordan) and T of a defective eigenvalue is ill
// conditioned by nature; Cond says how much, and Warning says it in words.
func JordanFormOf(A *mat.Dense, absTol, relTol float64) (*JordanForm, error) {
	if A == nil {
		return nil, errors.New("the matrix is empty")
	}
	n, c := A.Dims()
	if n != c {
		return nil, &ShapeError{What: "the Jordan form needs a square matrix", Got: Shape(A), Other: fmt.Sprintf("%dx%d", n, n)}
	}
	if n > 200 {
		return nil, fmt.Errorf("the Jordan form of a %dx%d matrix is not computed (at most 200 x 200): use modes or the modal form, which are well conditioned", n, n)
	}
	es, us, err := decisionEigen(A)
	if err != nil {
		return nil, err
	}
	js, err := jordanFrom(us.A, es, absTol, relTol, 0)
	if err != nil {
		return nil, err
	}
	Ab := us.A
	jf := &JordanForm{Structure: js, Real: true}
	var cols [][]complex128
	for _, cl := range js.Clusters {
		chains, err := jordanChains(Ab, cl.Value, cl.Blocks)
		if err != nil {
			return nil, err
		}
		add := func(lam complex128, conj bool) {
			for _, ch := range chains {
				jf.BlockValues = append(jf.BlockValues, lam)
				jf.BlockSizes = append(jf.BlockSizes, len(ch))
				for _, v := range ch {
					w := us.fromBalanced(v, false)
					if conj {
						for i := range w {
							w[i] = cmplx.Conj(w[i])
						}
					}
					cols = append(cols, w)
				}
			}
		}
		add(cl.Value, false)
		if imag(cl.Value) != 0 {
			jf.Real = false
			add(cmplx.Conj(cl.Value), true)
		}
	}
	if len(cols) != n {
		return nil, fmt.Errorf("the Jordan chains found span %d of %d dimensions", len(cols), n)
	}
	jf.T = mat.NewCDense(n, n, nil)
	jf.J = mat.NewCDense(n, n, nil)
	for j, col := range cols {
		for i := range col {
			jf.T.Set(i, j, col[i])
		}
	}
	k := 0
	for b, size := range jf.BlockSizes {
		for i := 0; i < size; i++ {
			jf.J.Set(k+i, k+i, jf.BlockValues[b])
			if i > 0 {
				jf.J.Set(k+i-1, k+i, 1)
			}
		}
		k += size
	}
	// residual and conditioning
	num, nA, nT := 0.0, mat.Norm(A, 2), 0.0
	for i := 0; i < n; i++ {
		for j := 0; j < n; j++ {
			var at, tj complex128
			for l := 0; l < n; l++ {
				at += complex(A.At(i, l), 0) * jf.T.At(l, j)
				tj += jf.T.At(i, l) * jf.J.At(l, j)
			}
			d := cmplx.Abs(at - tj)
			num += d * d
			x := cmplx.Abs(jf.T.At(i, j))
			nT += x * x
		}
	}
	if nA == 0 {
		nA = 1
	}
	jf.Residual = math.Sqrt(num) / (math.Sqrt(nT) * nA)
	jf.Cond = complexCond(jf.T)
	defective := false
	for _, cl := range js.Clusters {
		defective = defective || cl.Defective()
	}
	switch {
	case jf.Cond > 1e8:
		jf.Warning = fmt.Sprintf("T is ill conditioned (condition number %.2g): computing with it loses about %.0f of 16 digits. ", jf.Cond, math.Log10(jf.Cond))
	case defective:
		jf.Warning = fmt.Sprintf("T has condition number %.2g. ", jf.Cond)
	}
	if defective {
		jf.Warning += "Defective eigenvalues: the blocks are a numerical judgement (see the tolerances of jordan) and change under perturbations as small as the rounding; prefer modes and the modal form for computing."
	} else if jf.Cond > 1e8 {
		jf.Warning += "Nearly equal eigenvalues with nearly parallel eigenvectors: the modes are hard to tell apart."
	}
	return jf, nil
}

// jordanChains returns the Jordan chains of A at lam with the given block
// sizes (largest first), each chain as [N^(b-1) v, ..., N v, v] (the
// columns of T for one block, the eigenvector first).
func jordanChains(A *mat.Dense, lam complex128, blocks []int) ([][][]complex128, error) {
	n, _ := A.Dims()
	N := make([]complex128, n*n)
	for i := 0; i < n; i++ {
		for j := 0; j < n; j++ {
			N[i*n+j] = complex(A.At(i, j), 0)
		}
		N[i*n+i] -= lam
	}
	isReal := imag(lam) == 0
	m := 0
	for _, b := range blocks {
		m = max(m, b)
	}
	dim := func(j int) int {
		d := 0
		for _, b := range blocks {
			d += min(b, j)
		}
		return d
	}
	// powers N^j, j = 1..m
	pow := [][]complex128{nil, N}
	for j := 2; j <= m; j++ {
		pow = append(pow, cmatmul(pow[j-1], N, n))
	}
	apply := func(v []complex128) []complex128 {
		out := make([]complex128, n)
		for i := 0; i < n; i++ {
			var s complex128
			for l := 0; l < n; l++ {
				s += N[i*n+l] * v[l]
			}
			out[i] = s
		}
		return out
	}
	var chains [][][]complex128
	for j := m; j >= 1; j-- {
		count := 0
		for _, b := range blocks {
			if b == j {
				count++
			}
		}
		if count == 0 {
			continue
		}
		var W [][]complex128
		if j > 1 {
			W = append(W, jordanNull(pow[j-1], n, dim(j-1), isReal)...)
		}
		for _, ch := range chains {
			// the level-j vector of a longer chain: its (j-1)-th from the eigenvector
			W = append(W, ch[j-1])
		}
		Q := jordanOrth(W)
		K := jordanNull(pow[j], n, dim(j), isReal)
		tops := jordanPick(K, Q, count)
		if len(tops) < count {
			return nil, fmt.Errorf("the Jordan chains at %v could not be completed", lam)
		}
		for _, v := range tops {
			ch := make([][]complex128, j)
			ch[j-1] = v
			for i := j - 2; i >= 0; i-- {
				ch[i] = apply(ch[i+1])
			}
			// one scale for the chain (the 1s of J fix the ratios): the
			// largest column of norm 1, and the eigenvector's largest entry
			// real and positive, so that the result does not depend on
			// the phase the singular vectors came with
			big := 0.0
			for _, c := range ch {
				big = math.Max(big, cnorm(c))
			}
			lead := complex(0, 0)
			for _, x := range ch[0] {
				if cmplx.Abs(x) > cmplx.Abs(lead)*(1+1e-12) {
					lead = x
				}
			}
			f := complex(big, 0)
			if lead != 0 {
				f *= lead / complex(cmplx.Abs(lead), 0)
			}
			for _, c := range ch {
				for i := range c {
					c[i] /= f
				}
			}
			chains = append(chains, ch)
		}
	}
	// longest chains first, as the structure lists its blocks
	for a := 1; a < len(chains); a++ {
		for b := a; b > 0 && len(chains[b]) > len(chains[b-1]); b-- {
			chains[b], chains[b-1] = chains[b-1], chains[b]
		}
	}
	return chains, nil
}

func cmatmul(a, b []complex128, n int) []complex128 {
	out := make([]complex128, n*n)
	for i := 0; i < n; i++ {
		for l := 0; l < n; l++ {
			x := a[i*n+l]
			if x == 0 {
				continue
			}
			for j := 0; j < n; j++ {
				out[i*n+j] += x * b[l*n+j]
			}
		}
	}
	return out
}

func cnorm(v []complex128) float64 {
	s := 0.0
	for _, x := range v {
		a := cmplx.Abs(x)
		s += a * a
	}
	return math.Sqrt(s)
}

// jordanNull returns r orthonormal vectors spanning the numerical null
// space of the n x n matrix M (row-major): the right singular vectors of
// its r smallest singular values. A complex M goes through the real
// embedding [[Re, -Im], [Im, Re]], whose null space holds (Re v; Im v) and
// (-Im v; Re v) for each complex null vector v.
func jordanNull(M []complex128, n, r int, isReal bool) [][]complex128 {
	if r == 0 {
		return nil
	}
	if isReal {
		D := mat.NewDense(n, n, nil)
		for i := 0; i < n; i++ {
			for j := 0; j < n; j++ {
				D.Set(i, j, real(M[i*n+j]))
			}
		}
		var svd mat.SVD
		if !svd.Factorize(D, mat.SVDFull) {
			return nil
		}
		var V mat.Dense
		svd.VTo(&V)
		out := make([][]complex128, r)
		for k := 0; k < r; k++ {
			v := make([]complex128, n)
			for i := range v {
				v[i] = complex(V.At(i, n-r+k), 0)
			}
			out[k] = v
		}
		return out
	}
	E := mat.NewDense(2*n, 2*n, nil)
	for i := 0; i < n; i++ {
		for j := 0; j < n; j++ {
			x := M[i*n+j]
			E.Set(i, j, real(x))
			E.Set(i+n, j+n, real(x))
			E.Set(i+n, j, imag(x))
			E.Set(i, j+n, -imag(x))
		}
	}
	var svd mat.SVD
	if !svd.Factorize(E, mat.SVDFull) {
		return nil
	}
	var V mat.Dense
	svd.VTo(&V)
	var cand [][]complex128
	for k := 2*n - 2*r; k < 2*n; k++ {
		v := make([]complex128, n)
		for i := range v {
			v[i] = complex(V.At(i, k), V.At(i+n, k))
		}
		cand = append(cand, v)
	}
	return jordanPick(cand, nil, r)
}

// jordanOrth returns an orthonormal basis of the span of W (modified
// Gram-Schmidt, twice; vectors that add less than 1e-10 of their norm are
// dropped as dependent).
func jordanOrth(W [][]complex128) [][]complex128 {
	var Q [][]complex128
	for _, w := range W {
		v := append([]complex128(nil), w...)
		n0 := cnorm(v)
		if n0 == 0 {
			continue
		}
		jordanProject(v, Q)
		jordanProject(v, Q)
		if nv := cnorm(v); nv > 1e-10*n0 {
			for i := range v {
				v[i] /= complex(nv, 0)
			}
			Q = append(Q, v)
		}
	}
	return Q
}

// jordanProject removes from v its components along the orthonormal Q.
func jordanProject(v []complex128, Q [][]complex128) {
	for _, q := range Q {
		var d complex128
		for i := range q {
			d += cmplx.Conj(q[i]) * v[i]
		}
		for i := range q {
			v[i] -= d * q[i]
		}
	}
}

// jordanPick chooses count vectors from the span of K, each as far as
// possible from span(Q) and the ones chosen before (pivoted Gram-Schmidt on
// the residuals), normalized.
func jordanPick(K, Q [][]complex128, count int) [][]complex128 {
	res := make([][]complex128, len(K))
	for i, k := range K {
		v := append([]complex128(nil), k...)
		jordanProject(v, Q)
		jordanProject(v, Q)
		res[i] = v
	}
	var out [][]complex128
	for len(out) < count {
		best, bn := -1, 0.0
		for i, v := range res {
			if v == nil {
				continue
			}
			if nv := cnorm(v); nv > bn {
				best, bn = i, nv
			}
		}
		if best < 0 || bn == 0 {
			break
		}
		v := res[best]
		res[best] = nil
		for i := range v {
			v[i] /= complex(bn, 0)
		}
		out = append(out, v)
		for _, r := range res {
			if r != nil {
				jordanProject(r, [][]complex128{v})
			}
		}
	}
	return out
}

// complexCond is the 2-norm condition number of a complex matrix through
// its real embedding (same singular values, each twice).
func complexCond(T *mat.CDense) float64 {
	n, _ := T.Dims()
	E := mat.NewDense(2*n, 2*n, nil)
	for i := 0; i < n; i++ {
		for j := 0; j < n; j++ {
			x := T.At(i, j)
			E.Set(i, j, real(x))
			E.Set(i+n, j+n, real(x))
			E.Set(i+n, j, imag(x))
			E.Set(i, j+n, -imag(x))
		}
	}
	var svd mat.SVD
	if !svd.Factorize(E, mat.SVDNone) {
		return math.Inf(1)
	}
	s := svd.Values(nil)
	if s[len(s)-1] == 0 {
		return math.Inf(1)
	}
	return s[0] / s[len(s)-1]
}
