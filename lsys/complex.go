package lsys

import (
	"errors"
	"math"
	"math/cmplx"

	"gonum.org/v1/gonum/lapack/gonum"
	"gonum.org/v1/gonum/mat"
)

// hessenberg holds a system in upper Hessenberg coordinates,
// A = Q H Q^T, so that G(s) = (C Q) (sI - H)^{-1} (Q^T B) + D needs only
// an O(n^2) solve per point (Laub 1981, "Efficient multivariable frequency
// response computations", IEEE TAC 26(2):407-408).
type hessenberg struct {
	n, m, p int
	h       []float64 // n*n row-major upper Hessenberg
	qb      []float64 // n*m row-major, Q^T B
	cq      []float64 // p*n row-major, C Q
	d       []float64 // p*m row-major
	ts      float64

	work []complex128 // n*n scratch for sI - H
	rhs  []complex128 // n*m scratch
}

// newHessenberg reduces A by orthogonal similarity (Householder, LAPACK
// Dgehrd/Dorghr as implemented in gonum).
func newHessenberg(s *System) *hessenberg {
	n, m, p := s.N(), s.M(), s.P()
	hf := &hessenberg{n: n, m: m, p: p, ts: s.Ts}
	hf.d = make([]float64, p*m)
	for i := 0; i < p; i++ {
		for j := 0; j < m; j++ {
			hf.d[i*m+j] = s.D.At(i, j)
		}
	}
	if n == 0 || m == 0 || p == 0 {
		return hf
	}
	a := mat.DenseCopyOf(s.A)
	raw := a.RawMatrix()
	impl := gonum.Implementation{}
	tau := make([]float64, n-1)
	work := make([]float64, 1)
	if n > 1 {
		impl.Dgehrd(n, 0, n-1, raw.Data, raw.Stride, tau, work, -1)
		work = make([]float64, max(int(work[0]), n))
		impl.Dgehrd(n, 0, n-1, raw.Data, raw.Stride, tau, work, len(work))
	}
	hf.h = make([]float64, n*n)
	for i := 0; i < n; i++ {
		for j := 0; j < n; j++ {
			if j >= i-1 {
				hf.h[i*n+j] = raw.Data[i*raw.Stride+j]
			}
		}
	}
	q := mat.DenseCopyOf(a)
	if n > 1 {
		qr := q.RawMatrix()
		impl.Dorghr(n, 0, n-1, qr.Data, qr.Stride, tau, work, -1)
		if int(work[0]) > len(work) {
			work = make([]float64, int(work[0]))
		}
		impl.Dorghr(n, 0, n-1, qr.Data, qr.Stride, tau, work, len(work))
	} else {
		q.Set(0, 0, 1)
	}
	var qb, cq mat.Dense
	qb.Mul(q.T(), s.B)
	cq.Mul(s.C, q)
	hf.qb = append([]float64(nil), qb.RawMatrix().Data...)
	hf.cq = append([]float64(nil), cq.RawMatrix().Data...)
	hf.work = make([]complex128, n*n)
	hf.rhs = make([]complex128, n*m)
	return hf
}

var errAtPole = errors.New("the point is a pole of the system")

// at evaluates G at the complex point s (the Laplace variable for
// continuous systems, z for sampled ones) into out (p*m, row-major).
func (hf *hessenberg) at(s complex128, out []complex128) error {
	n, m, p := hf.n, hf.m, hf.p
	for i := range out[:p*m] {
		out[i] = complex(hf.d[i], 0)
	}
	if n == 0 || m == 0 || p == 0 {
		return nil
	}
	w := hf.work
	for i := 0; i < n; i++ {
		row := w[i*n : (i+1)*n]
		for j := range row {
			row[j] = 0
		}
		for j := max(i-1, 0); j < n; j++ {
			row[j] = complex(-hf.h[i*n+j], 0)
		}
		row[i] += s
	}
	x := hf.rhs
	for i := range x {
		x[i] = complex(hf.qb[i], 0)
	}
	if err := hessSolve(n, m, w, x); err != nil {
		return err
	}
	for i := 0; i < p; i++ {
		for j := 0; j < m; j++ {
			var acc complex128
			for k := 0; k < n; k++ {
				acc += complex(hf.cq[i*n+k], 0) * x[k*m+j]
			}
			out[i*m+j] += acc
		}
	}
	for _, v := range out[:p*m] {
		if cmplx.IsNaN(v) || cmplx.IsInf(v) {
			return errAtPole
		}
	}
	return nil
}

// hessSolve solves M X = B in place (X overwrites b, n x m row-major) for an
// upper Hessenberg complex M (n x n row-major, overwritten), by Gaussian
// elimination with partial pivoting between neighbouring rows: O(n^2) per
// right-hand side (Golub & Van Loan, Matrix Computations, 4th ed., 2013,
// Section 4.3.4, "Hessenberg systems"). An exactly zero pivot reports that
// the point is a pole.
func hessSolve(n, m int, M, b []complex128) error {
	for k := 0; k < n-1; k++ {
		rk, rk1 := M[k*n:(k+1)*n], M[(k+1)*n:(k+2)*n]
		if cabs(rk1[k]) > cabs(rk[k]) {
			for j := k; j < n; j++ {
				rk[j], rk1[j] = rk1[j], rk[j]
			}
			for j := 0; j < m; j++ {
				b[k*m+j], b[(k+1)*m+j] = b[(k+1)*m+j], b[k*m+j]
			}
		}
		piv := rk[k]
		if piv == 0 {
			if rk1[k] == 0 {
				continue // column already eliminated below the diagonal
			}
		}
		if rk1[k] == 0 {
			continue
		}
		l := cdiv(rk1[k], piv)
		rk1[k] = 0
		for j := k + 1; j < n; j++ {
			rk1[j] -= l * rk[j]
		}
		for j := 0; j < m; j++ {
			b[(k+1)*m+j] -= l * b[k*m+j]
		}
	}
	for i := n - 1; i >= 0; i-- {
		piv := M[i*n+i]
		if piv == 0 {
			return errAtPole
		}
		for j := 0; j < m; j++ {
			acc := b[i*m+j]
			for k := i + 1; k < n; k++ {
				acc -= M[i*n+k] * b[k*m+j]
			}
			b[i*m+j] = cdiv(acc, piv)
		}
	}
	return nil
}

// cabs is |z| without undue overflow.
func cabs(z complex128) float64 { return math.Hypot(real(z), imag(z)) }

// cdiv divides complex numbers by Smith's algorithm (Smith 1962, "Algorithm
// 116: Complex division", CACM 5(8):435), which avoids the overflow and
// underflow of the textbook formula.
func cdiv(a, b complex128) complex128 {
	ar, ai, br, bi := real(a), imag(a), real(b), imag(b)
	if math.Abs(br) >= math.Abs(bi) {
		if br == 0 {
			return complex(math.Inf(1), math.Inf(1))
		}
		r := bi / br
		den := br + bi*r
		return complex((ar+ai*r)/den, (ai-ar*r)/den)
	}
	r := br / bi
	den := bi + br*r
	return complex((ar*r+ai)/den, (ai*r-ar)/den)
}
