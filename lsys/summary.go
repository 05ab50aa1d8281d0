package lsys

import (
	"math"
	"math/cmplx"

	"gonum.org/v1/gonum/mat"
)

// MatrixSummary describes a matrix too large to read entry by entry: what a
// person checks first about it.
type MatrixSummary struct {
	Rows, Cols int
	// Norm is the Frobenius norm; Largest the largest entry in magnitude,
	// at (LargestRow, LargestCol), 0-based.
	Norm, Largest          float64
	LargestRow, LargestCol int
	Nonzeros               int
	Symmetric              bool // square and equal to its transpose (Hermitian when complex)
	// Rank and Cond (2-norm condition number) by singular values, the
	// rank counting those above RankTol = n u sigma_max (u the unit
	// roundoff); HasRank is false above SummaryRankLimit on the shorter
	// side, where the decomposition would cost seconds: ask for them.
	HasRank bool
	Rank    int
	Cond    float64
	RankTol float64
}

// SummaryRankLimit is the largest shorter side for which Summarize computes
// rank and condition (an SVD of 400 x 400 takes about 0.1 s).
const SummaryRankLimit = 400

// Summarize computes the MatrixSummary of a real or complex matrix given by
// its entries.
func Summarize(r, c int, at func(i, j int) complex128) MatrixSummary {
	s := MatrixSummary{Rows: r, Cols: c, Symmetric: r == c}
	var scale, ssq float64 = 0, 1
	for i := 0; i < r; i++ {
		for j := 0; j < c; j++ {
			z := at(i, j)
			a := cmplx.Abs(z)
			if a != 0 {
				s.Nonzeros++
				if scale < a {
					ssq = 1 + ssq*(scale/a)*(scale/a)
					scale = a
				} else {
					ssq += (a / scale) * (a / scale)
				}
			}
			if a > s.Largest {
				s.Largest, s.LargestRow, s.LargestCol = a, i, j
			}
			if s.Symmetric && j > i && z != cmplx.Conj(at(j, i)) {
				s.Symmetric = false
			}
		}
	}
	s.Norm = scale * math.Sqrt(ssq)
	if min(r, c) == 0 || min(r, c) > SummaryRankLimit {
		return s
	}
	// Rank and condition of the real embedding [[Re, -Im], [Im, Re]] when
	// complex: its singular values are those of the matrix, each twice.
	cplx := false
	for i := 0; i < r && !cplx; i++ {
		for j := 0; j < c; j++ {
			if imag(at(i, j)) != 0 {
				cplx = true
				break
			}
		}
	}
	var M *mat.Dense
	if cplx {
		M = mat.NewDense(2*r, 2*c, nil)
		for i := 0; i < r; i++ {
			for j := 0; j < c; j++ {
				z := at(i, j)
				M.Set(i, j, real(z))
				M.Set(i, c+j, -imag(z))
				M.Set(r+i, j, imag(z))
				M.Set(r+i, c+j, real(z))
			}
		}
	} else {
		M = mat.NewDense(r, c, nil)
		for i := 0; i < r; i++ {
			for j := 0; j < c; j++ {
				M.Set(i, j, real(at(i, j)))
			}
		}
	}
	var svd mat.SVD
	if !svd.Factorize(M, mat.SVDNone) {
		return s
	}
	sv := svd.Values(nil)
	s.HasRank = true
	s.RankTol = float64(max(r, c)) * dlamchE * sv[0]
	for _, v := range sv {
		if v > s.RankTol {
			s.Rank++
		}
	}
	if cplx {
		s.Rank /= 2
	}
	if last := sv[len(sv)-1]; last > 0 {
		s.Cond = sv[0] / last
	} else {
		s.Cond = math.Inf(1)
	}
	return s
}
