package lsys

import (
	"errors"
	"math"
	"math/cmplx"

	"gonum.org/v1/gonum/mat"
)

// Cholesky factors of the solutions of stable Lyapunov equations, computed
// directly without forming the solution, by the method of Hammarling
// (1982, "Numerical solution of the stable, non-negative definite Lyapunov
// equation", IMA J. Numer. Anal. 2): with S upper triangular (a complex
// Schur form) and X = U^H U, U upper triangular, the equations
//
//	S^H X + X S + R^H R = 0        (continuous, Re l < 0)
//	S^H X S - X + R^H R = 0        (sampled, |l| < 1)
//
// are solved one row of U at a time: with S = [[l, s^H], [0, S2]],
// R = [[rho, r^H], [0, R2]] and U = [[nu, u^H], [0, U2]],
// nu = |rho| / sqrt(-2 Re l) (sampled: |rho| / sqrt(1 - |l|^2)),
// u from a triangular system, and the trailing problem has the factor of
// [R2; y^H] for a vector y given below. Working on factors keeps the
// small Hankel singular values accurate: they come from the product of
// two factors, not from the square roots of eigenvalues of P Q.

// complexSchur returns the complex Schur form A = Z T Z^H (T upper
// triangular) from the real Schur form, each 2x2 block triangularized by a
// unitary rotation whose first column is the block's eigenvector for the
// eigenvalue with positive imaginary part.
func complexSchur(A *mat.Dense) (T, Z [][]complex128, err error) {
	sf, err := Schur(A)
	if err != nil {
		return nil, nil, err
	}
	n, _ := A.Dims()
	T = make([][]complex128, n)
	Z = make([][]complex128, n)
	for i := 0; i < n; i++ {
		T[i] = make([]complex128, n)
		Z[i] = make([]complex128, n)
		for j := 0; j < n; j++ {
			T[i][j] = complex(sf.T.At(i, j), 0)
			Z[i][j] = complex(sf.Z.At(i, j), 0)
		}
	}
	for i := 0; i+1 < n; i++ {
		if sf.T.At(i+1, i) == 0 {
			continue
		}
		a, b, c, d := sf.T.At(i, i), sf.T.At(i, i+1), sf.T.At(i+1, i), sf.T.At(i+1, i+1)
		half := (a - d) / 2
		disc := half*half + b*c // < 0 for a complex pair
		lam := complex((a+d)/2, math.Sqrt(math.Max(-disc, 0)))
		v1, v2 := complex(b, 0), lam-complex(a, 0)
		h := math.Hypot(cmplx.Abs(v1), cmplx.Abs(v2))
		if h == 0 {
			return nil, nil, errors.New("a 2x2 block of the Schur form is degenerate")
		}
		v1, v2 = v1/complex(h, 0), v2/complex(h, 0)
		// G = [[v1, -conj(v2)], [v2, conj(v1)]]; T <- G^H T G, Z <- Z G.
		g11, g12, g21, g22 := v1, -cmplx.Conj(v2), v2, cmplx.Conj(v1)
		for j := 0; j < n; j++ { // rows i, i+1 by G^H
			x, y := T[i][j], T[i+1][j]
			T[i][j] = cmplx.Conj(g11)*x + cmplx.Conj(g21)*y
			T[i+1][j] = cmplx.Conj(g12)*x + cmplx.Conj(g22)*y
		}
		for r := 0; r < n; r++ { // columns i, i+1 by G
			x, y := T[r][i], T[r][i+1]
			T[r][i] = x*g11 + y*g21
			T[r][i+1] = x*g12 + y*g22
			x, y = Z[r][i], Z[r][i+1]
			Z[r][i] = x*g11 + y*g21
			Z[r][i+1] = x*g12 + y*g22
		}
		T[i+1][i] = 0
		i++
	}
	return T, Z, nil
}

// addRow updates the upper triangular R (k x k, R^H R = M^H M) to the
// factor of [R; y^H] by complex Givens rotations (y holds the row y^H).
func addRow(R [][]complex128, row []complex128) {
	k := len(R)
	b := append([]complex128(nil), row...)
	for j := 0; j < k; j++ {
		if b[j] == 0 {
			continue
		}
		a := R[j][j]
		h := math.Hypot(cmplx.Abs(a), cmplx.Abs(b[j]))
		var c float64
		var s complex128
		if a == 0 {
			c, s = 0, 1
		} else {
			c = cmplx.Abs(a) / h
			s = (a / complex(cmplx.Abs(a), 0)) * cmplx.Conj(b[j]) / complex(h, 0)
		}
		for l := j; l < k; l++ {
			x, y := R[j][l], b[l]
			R[j][l] = complex(c, 0)*x + s*y
			b[l] = -cmplx.Conj(s)*x + complex(c, 0)*y
		}
		b[j] = 0
	}
}

// hammarlingTri returns U (upper triangular) with X = U^H U solving the
// triangular equation above for the upper triangular S and the rows of
// M (R^H R = M^H M).
func hammarlingTri(S [][]complex128, M [][]complex128, sampled bool) ([][]complex128, error) {
	n := len(S)
	R := make([][]complex128, n)
	for i := range R {
		R[i] = make([]complex128, n)
	}
	for _, row := range M {
		addRow(R, row)
	}
	U := make([][]complex128, n)
	for i := range U {
		U[i] = make([]complex128, n)
	}
	for k := 0; k < n; k++ {
		m := n - k - 1
		lam := S[k][k]
		rho := R[0][0]
		var den float64
		if sampled {
			den = 1 - real(lam)*real(lam) - imag(lam)*imag(lam)
		} else {
			den = -2 * real(lam)
		}
		if !(den > 0) {
			return nil, errors.New("the Lyapunov equation needs a stable matrix")
		}
		nu := cmplx.Abs(rho) / math.Sqrt(den)
		U[k][k] = complex(nu, 0)
		// s and r as columns: s = conj(S[k, k+1:]), r = conj(R[0, 1:]).
		s := make([]complex128, m)
		r := make([]complex128, m)
		for i := 0; i < m; i++ {
			s[i] = cmplx.Conj(S[k][k+1+i])
			r[i] = cmplx.Conj(R[0][1+i])
		}
		u := make([]complex128, m)
		y := make([]complex128, m)
		if nu == 0 {
			copy(y, r)
		} else {
			alpha := rho / complex(nu, 0)
			rhs := make([]complex128, m)
			for i := 0; i < m; i++ {
				if sampled {
					rhs[i] = -(complex(nu, 0)*lam*s[i] + alpha*r[i])
				} else {
					rhs[i] = -(complex(nu, 0)*s[i] + alpha*r[i])
				}
			}
			// Forward substitution with S2^H (lower triangular):
			// (S2^H)_{ij} = conj(S[k+1+j][k+1+i]).
			for i := 0; i < m; i++ {
				var acc complex128
				for j := 0; j < i; j++ {
					acc += cmplx.Conj(S[k+1+j][k+1+i]) * u[j]
				}
				dii := cmplx.Conj(S[k+1+i][k+1+i])
				if sampled {
					u[i] = (rhs[i] - lam*acc) / (lam*dii - 1)
				} else {
					u[i] = (rhs[i] - acc) / (dii + lam)
				}
			}
			if sampled {
				// v = nu s + S2^H u; y = conj(alpha) v - conj(lam) r.
				for i := 0; i < m; i++ {
					var acc complex128
					for j := 0; j <= i; j++ {
						acc += cmplx.Conj(S[k+1+j][k+1+i]) * u[j]
					}
					v := complex(nu, 0)*s[i] + acc
					y[i] = cmplx.Conj(alpha)*v - cmplx.Conj(lam)*r[i]
				}
			} else {
				for i := 0; i < m; i++ {
					y[i] = r[i] - cmplx.Conj(alpha)*u[i]
				}
			}
		}
		for i := 0; i < m; i++ {
			U[k][k+1+i] = cmplx.Conj(u[i])
		}
		// Trailing factor: [R2; y^H].
		R2 := make([][]complex128, m)
		for i := 0; i < m; i++ {
			R2[i] = append([]complex128(nil), R[1+i][1:]...)
		}
		yh := make([]complex128, m)
		for i := range y {
			yh[i] = cmplx.Conj(y[i])
		}
		addRow(R2, yh)
		R = R2
	}
	return U, nil
}

// LyapunovFactor returns a real factor L (n x n, lower triangular) with
// A P + P A^T + B B^T = 0 for P = L L^T (sampled: A P A^T - P + B B^T = 0),
// for a stable A, by Hammarling's method (see the top of this file).
func LyapunovFactor(A, B *mat.Dense, sampled bool) (*mat.Dense, error) {
	n, _ := A.Dims()
	// X = Z^H P Z solves S^H X + X S + ... with S the Schur form of A^T.
	S, Z, err := complexSchur(mat.DenseCopyOf(A.T()))
	if err != nil {
		return nil, err
	}
	_, m := B.Dims()
	// Rows of M = B^T Z (M^H M = Z^H B B^T Z).
	M := make([][]complex128, m)
	for i := 0; i < m; i++ {
		M[i] = make([]complex128, n)
		for j := 0; j < n; j++ {
			var v complex128
			for l := 0; l < n; l++ {
				v += complex(B.At(l, i), 0) * Z[l][j]
			}
			M[i][j] = v
		}
	}
	U, err := hammarlingTri(S, M, sampled)
	if err != nil {
		return nil, err
	}
	// P = L L^H with L = Z U^H; P is real: P = Lr Lr^T + Li Li^T, whose
	// triangular factor comes from the QR decomposition of [Lr Li]^T.
	W := mat.NewDense(2*n, n, nil)
	for i := 0; i < n; i++ {
		for j := 0; j < n; j++ {
			var v complex128
			for l := j; l < n; l++ { // (U^H)_{lj} = conj(U[j][l]), zero for l < j
				v += Z[i][l] * cmplx.Conj(U[j][l])
			}
			W.Set(j, i, real(v))
			W.Set(n+j, i, imag(v))
		}
	}
	var qr mat.QR
	qr.Factorize(W)
	var R mat.Dense
	qr.RTo(&R)
	L := mat.NewDense(n, n, nil)
	for i := 0; i < n; i++ {
		for j := i; j < n; j++ {
			L.Set(j, i, R.At(i, j))
		}
	}
	return L, nil
}
