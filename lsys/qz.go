package lsys

import (
	"errors"
	"fmt"
	"math"
	"math/cmplx"
	"sort"

	"gonum.org/v1/gonum/lapack"
	"gonum.org/v1/gonum/lapack/gonum"
	"gonum.org/v1/gonum/mat"
)

// GenEig is a generalized eigenvalue alpha/beta of a pencil A - lambda E.
// Beta == 0 (to working accuracy) is an infinite eigenvalue.
type GenEig struct {
	Alpha, Beta complex128
}

// Finite reports whether the eigenvalue is finite at relative tolerance
// tol: |beta| > tol * |alpha|.
func (g GenEig) Finite(tol float64) bool {
	return cmplx.Abs(g.Beta) > tol*cmplx.Abs(g.Alpha) && g.Beta != 0
}

// Value is alpha/beta.
func (g GenEig) Value() complex128 { return g.Alpha / g.Beta }

// QZ returns the generalized eigenvalues of the square real pencil
// A - lambda E by the QZ algorithm (Moler & Stewart 1973, An algorithm for
// generalized matrix eigenvalue problems, SIAM J. Numer. Anal. 10(2)):
// E is made upper triangular by a QR factorization, the pair is reduced to
// Hessenberg-triangular form by Givens rotations (gonum's Dgghrd), then
// implicitly shifted QZ sweeps, here with complex single shifts (the
// variant of Moler & Stewart's real double-shift step used in complex
// arithmetic), deflate eigenvalues from the bottom; a zero on the diagonal
// of the triangular factor is chased down and deflated as an infinite
// eigenvalue (Moler & Stewart 1973, sec. 5). Only eigenvalues are computed.
func QZ(A, E *mat.Dense) ([]GenEig, error) {
	if A == nil || E == nil {
		return nil, nil
	}
	n, c := A.Dims()
	if n != c {
		return nil, &ShapeError{What: "the pencil must be square", Got: Shape(A), Other: Shape(E)}
	}
	if r, c := E.Dims(); r != n || c != n {
		return nil, &ShapeError{What: "the two matrices of a pencil must have the same shape", Got: Shape(E), Other: Shape(A)}
	}
	if err := CheckFinite("A", A); err != nil {
		return nil, err
	}
	if err := CheckFinite("E", E); err != nil {
		return nil, err
	}
	// E = Q R; A <- Q^T A.
	var qr mat.QR
	qr.Factorize(E)
	var Q, R mat.Dense
	qr.QTo(&Q)
	qr.RTo(&R)
	var H mat.Dense
	H.Mul(Q.T(), A)
	Rr := mat.DenseCopyOf(&R)
	impl := gonum.Implementation{}
	hr, tr := H.RawMatrix(), Rr.RawMatrix()
	impl.Dgghrd(lapack.OrthoNone, lapack.OrthoNone, n, 0, n-1, hr.Data, hr.Stride, tr.Data, tr.Stride, nil, 1, nil, 1)
	h := make([][]complex128, n)
	t := make([][]complex128, n)
	for i := 0; i < n; i++ {
		h[i] = make([]complex128, n)
		t[i] = make([]complex128, n)
		for j := 0; j < n; j++ {
			if j >= i-1 {
				h[i][j] = complex(H.At(i, j), 0)
			}
			if j >= i {
				t[i][j] = complex(Rr.At(i, j), 0)
			}
		}
	}
	return qzComplex(h, t)
}

// qzGivens returns c (real) and s with [[c, s], [-conj(s), c]] [a; b] = [r; 0].
func qzGivens(a, b complex128) (float64, complex128) {
	if b == 0 {
		return 1, 0
	}
	if a == 0 {
		return 0, cmplx.Conj(b) / complex(cmplx.Abs(b), 0)
	}
	aa, ab := cmplx.Abs(a), cmplx.Abs(b)
	nrm := math.Hypot(aa, ab)
	c := aa / nrm
	s := (a / complex(aa, 0)) * cmplx.Conj(b) / complex(nrm, 0)
	return c, s
}

// qzRightGivens returns c, s with [x y] [[c, s], [-conj(s), c]] = [0 r].
func qzRightGivens(x, y complex128) (float64, complex128) {
	if x == 0 {
		return 1, 0
	}
	if y == 0 {
		return 0, 1
	}
	ay := cmplx.Abs(y)
	nrm := math.Hypot(cmplx.Abs(x), ay)
	c := ay / nrm
	s := cmplx.Conj(x) * y / complex(ay*nrm, 0)
	return c, s
}

// rotRows applies [[c, s], [-conj(s), c]] to rows i, i+1 of m over columns
// lo..hi.
func rotRows(m [][]complex128, i int, c float64, s complex128, lo, hi int) {
	cc := complex(c, 0)
	for j := lo; j <= hi; j++ {
		a, b := m[i][j], m[i+1][j]
		m[i][j] = cc*a + s*b
		m[i+1][j] = -cmplx.Conj(s)*a + cc*b
	}
}

// rotCols applies [[c, s], [-conj(s), c]] from the right to columns j, j+1
// over rows lo..hi.
func rotCols(m [][]complex128, j int, c float64, s complex128, lo, hi int) {
	cc := complex(c, 0)
	for i := lo; i <= hi; i++ {
		x, y := m[i][j], m[i][j+1]
		m[i][j] = x*cc - y*cmplx.Conj(s)
		m[i][j+1] = x*s + y*cc
	}
}

func qzComplex(h, t [][]complex128) ([]GenEig, error) {
	n := len(h)
	out := make([]GenEig, n)
	var hn, tn float64
	for i := 0; i < n; i++ {
		for j := 0; j < n; j++ {
			hn = math.Hypot(hn, cmplx.Abs(h[i][j]))
			tn = math.Hypot(tn, cmplx.Abs(t[i][j]))
		}
	}
	const eps = dlamchE
	htol := eps * math.Max(hn, math.SmallestNonzeroFloat64)
	ttol := eps * math.Max(tn, math.SmallestNonzeroFloat64)
	ihi := n - 1
	iter, sinceDeflate := 0, 0
	maxIter := 60 * max(n, 1)
	for ihi >= 0 {
		if iter > maxIter {
			return nil, fmt.Errorf("QZ did not converge after %d sweeps; the pencil may be singular or badly scaled", iter)
		}
		// Find the active window [ilo, ihi]: scan up for a negligible
		// subdiagonal entry.
		ilo := 0
		for j := ihi; j >= 1; j-- {
			if cmplx.Abs(h[j][j-1]) <= eps*(cmplx.Abs(h[j-1][j-1])+cmplx.Abs(h[j][j])) || cmplx.Abs(h[j][j-1]) <= htol {
				h[j][j-1] = 0
				ilo = j
				break
			}
		}
		if ilo == ihi {
			out[ihi] = GenEig{h[ihi][ihi], t[ihi][ihi]}
			ihi--
			sinceDeflate = 0
			continue
		}
		// A negligible diagonal entry of T: chase it down to ihi and
		// deflate an infinite eigenvalue.
		zeroAt := -1
		for j := ilo; j <= ihi; j++ {
			if cmplx.Abs(t[j][j]) <= ttol {
				t[j][j] = 0
				zeroAt = j
				break
			}
		}
		if zeroAt >= 0 {
			for j := zeroAt; j < ihi; j++ {
				c, s := qzGivens(t[j][j+1], t[j+1][j+1])
				rotRows(t, j, c, s, j, ihi)
				rotRows(h, j, c, s, max(j-1, ilo), ihi)
				t[j+1][j+1] = 0
				if j > ilo {
					c2, s2 := qzRightGivens(h[j+1][j-1], h[j+1][j])
					rotCols(h, j-1, c2, s2, ilo, min(j+1, ihi))
					rotCols(t, j-1, c2, s2, ilo, j+1)
					h[j+1][j-1] = 0
				}
			}
			// Now t[ihi][ihi] == 0: rotate columns ihi-1, ihi to zero
			// h[ihi][ihi-1].
			c, s := qzRightGivens(h[ihi][ihi-1], h[ihi][ihi])
			rotCols(h, ihi-1, c, s, ilo, ihi)
			rotCols(t, ihi-1, c, s, ilo, ihi)
			h[ihi][ihi-1] = 0
			t[ihi][ihi-1] = 0
			iter++
			continue
		}
		// Shift: the eigenvalue of the trailing 2x2 pencil nearest to the
		// last diagonal ratio (Wilkinson's choice); exceptional shifts
		// every 10 sweeps without deflation.
		var mu complex128
		sinceDeflate++
		if sinceDeflate%10 == 0 {
			mu = h[ihi][ihi]/t[ihi][ihi] + complex(cmplx.Abs(h[ihi][ihi-1])/cmplx.Abs(t[ihi-1][ihi-1]), 0)
		} else {
			mu = qzShift(h[ihi-1][ihi-1], h[ihi-1][ihi], h[ihi][ihi-1], h[ihi][ihi], t[ihi-1][ihi-1], t[ihi-1][ihi], t[ihi][ihi])
		}
		// Implicit single-shift sweep over the window.
		x := h[ilo][ilo] - mu*t[ilo][ilo]
		y := h[ilo+1][ilo]
		for k := ilo; k < ihi; k++ {
			var c float64
			var s complex128
			if k == ilo {
				c, s = qzGivens(x, y)
			} else {
				c, s = qzGivens(h[k][k-1], h[k+1][k-1])
			}
			lo := k
			if k > ilo {
				lo = k - 1
			}
			rotRows(h, k, c, s, lo, ihi)
			rotRows(t, k, c, s, k, ihi)
			if k > ilo {
				h[k+1][k-1] = 0
			}
			// Restore T: zero t[k+1][k] by a rotation of columns k, k+1.
			c2, s2 := qzRightGivens(t[k+1][k], t[k+1][k+1])
			rotCols(t, k, c2, s2, ilo, k+1)
			rotCols(h, k, c2, s2, ilo, min(k+2, ihi))
			t[k+1][k] = 0
		}
		iter++
	}
	return out, nil
}

// qzShift returns the eigenvalue of the 2x2 pencil [[a, b], [c, d]] -
// lambda [[p, q], [0, r]] closer to d/r.
func qzShift(a, b, c, d, p, q, r complex128) complex128 {
	if p == 0 || r == 0 {
		if r != 0 {
			return d / r
		}
		return 0
	}
	// det([[a - l p, b - l q], [c, d - l r]]) = 0:
	// (p r) l^2 - (a r + d p - c q) l + (a d - b c) = 0.
	A2 := p * r
	B2 := -(a*r + d*p - c*q)
	C2 := a*d - b*c
	disc := cmplx.Sqrt(B2*B2 - 4*A2*C2)
	l1 := (-B2 + disc) / (2 * A2)
	l2 := (-B2 - disc) / (2 * A2)
	ref := d / r
	if cmplx.Abs(l1-ref) <= cmplx.Abs(l2-ref) {
		return l1
	}
	return l2
}

// realPencilValues turns finite generalized eigenvalues of a real pencil
// into values with exact conjugate symmetry: members with conjugate partners
// are averaged with them, the rest made real (their imaginary parts are
// rounding noise).
func realPencilValues(vals []complex128) []complex128 {
	used := make([]bool, len(vals))
	var out []complex128
	idx := make([]int, len(vals))
	for i := range idx {
		idx[i] = i
	}
	sort.SliceStable(idx, func(a, b int) bool { return imag(vals[idx[a]]) > imag(vals[idx[b]]) })
	for _, i := range idx {
		if used[i] || imag(vals[i]) <= 0 {
			continue
		}
		best, bj := math.Inf(1), -1
		for j := range vals {
			if used[j] || j == i || imag(vals[j]) >= 0 {
				continue
			}
			if d := cmplx.Abs(vals[i] - cmplx.Conj(vals[j])); d < best {
				best, bj = d, j
			}
		}
		if bj >= 0 && best <= 1e-6*math.Max(1, cmplx.Abs(vals[i])) && imag(vals[i]) > best {
			v := (vals[i] + cmplx.Conj(vals[bj])) / 2
			out = append(out, v, cmplx.Conj(v))
			used[i], used[bj] = true, true
		}
	}
	for i, v := range vals {
		if !used[i] {
			out = append(out, complex(real(v), 0))
		}
	}
	return out
}

var errNoPencil = errors.New("empty pencil")
