package lsys

import (
	"fmt"
	"math"
	"math/cmplx"

	"gonum.org/v1/gonum/mat"
)

// MatrixNorm returns a norm of the r x c complex matrix given entrywise by
// at: kind "1" (largest column sum of moduli), "2" (largest singular
// value), "inf" (largest row sum) or "fro" (Frobenius). A vector (one row
// or one column) takes the vector norms: sum of moduli, Euclidean length,
// largest modulus; "fro" is then the Euclidean length too. The 2-norm of a
// matrix is the largest singular value of the real embedding [[Re, -Im],
// [Im, Re]], which has the same singular values, each twice (Golub & Van
// Loan, Matrix Computations, 4th ed., 2013, Section 2.3 for the norms).
func MatrixNorm(r, c int, at func(i, j int) complex128, kind string) (float64, error) {
	vector := r == 1 || c == 1
	switch kind {
	case "1":
		if vector {
			return sumAbs(r, c, at), nil
		}
		best := 0.0
		for j := 0; j < c; j++ {
			s := 0.0
			for i := 0; i < r; i++ {
				s += cmplx.Abs(at(i, j))
			}
			best = math.Max(best, s)
		}
		return best, nil
	case "inf":
		best := 0.0
		for i := 0; i < r; i++ {
			s := 0.0
			for j := 0; j < c; j++ {
				if vector {
					s = math.Max(s, cmplx.Abs(at(i, j)))
				} else {
					s += cmplx.Abs(at(i, j))
				}
			}
			best = math.Max(best, s)
		}
		return best, nil
	case "fro":
		return frobenius(r, c, at), nil
	case "2":
		if vector {
			return frobenius(r, c, at), nil
		}
		e := mat.NewDense(2*r, 2*c, nil)
		for i := 0; i < r; i++ {
			for j := 0; j < c; j++ {
				v := at(i, j)
				if cmplx.IsNaN(v) || cmplx.IsInf(v) {
					return math.NaN(), nil
				}
				e.Set(i, j, real(v))
				e.Set(i+r, j+c, real(v))
				e.Set(i+r, j, imag(v))
				e.Set(i, j+c, -imag(v))
			}
		}
		var svd mat.SVD
		if !svd.Factorize(e, mat.SVDNone) {
			return 0, fmt.Errorf("the singular value decomposition did not converge")
		}
		return svd.Values(nil)[0], nil
	}
	return 0, fmt.Errorf("the kind of norm must be 1, 2, inf or \"fro\", not %s", kind)
}

func sumAbs(r, c int, at func(i, j int) complex128) float64 {
	s := 0.0
	for i := 0; i < r; i++ {
		for j := 0; j < c; j++ {
			s += cmplx.Abs(at(i, j))
		}
	}
	return s
}

// frobenius scales by the largest modulus so that squares neither
// overflow nor underflow (as the reference BLAS nrm2 does).
func frobenius(r, c int, at func(i, j int) complex128) float64 {
	scale := 0.0
	for i := 0; i < r; i++ {
		for j := 0; j < c; j++ {
			scale = math.Max(scale, cmplx.Abs(at(i, j)))
		}
	}
	if scale == 0 || math.IsNaN(scale) || math.IsInf(scale, 0) {
		return scale
	}
	s := 0.0
	for i := 0; i < r; i++ {
		for j := 0; j < c; j++ {
			a := cmplx.Abs(at(i, j)) / scale
			s += a * a
		}
	}
	return scale * math.Sqrt(s)
}
