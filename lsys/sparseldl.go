package lsys

import (
	"context"
	"fmt"
	"math"
)

// SparseLDL is P A P^T = L D L^T for a sparse symmetric A (L unit lower
// triangular, D diagonal), computed without pivoting by the up-looking
// row-by-row method with the elimination tree (Davis, "Algorithm 849: A
// concise sparse Cholesky factorization package", ACM TOMS 31, 2005). No
// pivoting is sound for positive definite A; for an indefinite shifted
// K - sigma M it holds while no pivot is tiny, which Factor checks
// (PivotTol) and reports. By Sylvester's law of inertia the number of
// negative pivots is the number of eigenvalues of (K, M) below sigma.
type SparseLDL struct {
	N        int
	Perm     []int // Perm[k]: original index of pivot k
	Pinv     []int
	Lp       []int
	Li       []int32
	Lx       []float64
	D        []float64
	Negative int     // negative pivots
	MinPivot float64 // smallest |d_k| / max|a_kk| met
}

// PivotTol: a pivot |d_k| at most PivotTol times the largest diagonal
// entry of A makes the factorization fail as singular (the shift sits on
// an eigenvalue, or K has rigid-body modes at a zero shift): its solves
// would amplify rounding by more than 1/PivotTol.
const PivotTol = 1e-13

// SingularPivotError reports a tiny pivot.
type SingularPivotError struct {
	Index int     // original row
	Ratio float64 // |d_k| / max|a_kk|
}

func (e *SingularPivotError) Error() string {
	return fmt.Sprintf("the shifted stiffness is singular to working precision (pivot at degree of freedom %d is %.2g of the largest diagonal entry, tolerance %g)", e.Index+1, e.Ratio, PivotTol)
}

// Bytes is the memory the factor holds.
func (f *SparseLDL) Bytes() int64 {
	return int64(len(f.Lp))*8 + int64(len(f.Li))*4 + int64(len(f.Lx))*8 + int64(len(f.D))*8 + int64(len(f.Perm)+len(f.Pinv))*8
}

// NNZ is the number of entries of L below its diagonal.
func (f *SparseLDL) NNZ() int { return len(f.Li) }

// FactorLDL computes P A P^T = L D L^T with the given order. progress, when
// not nil, is called now and then with the fraction of columns done; ctx
// is checked at the same times.
func FactorLDL(ctx context.Context, a *SparseSym, perm []int, progress func(done float64)) (*SparseLDL, error) {
	n := a.N
	f := &SparseLDL{N: n, Perm: perm, Pinv: make([]int, n)}
	for k, p := range perm {
		f.Pinv[p] = k
	}
	// Symbolic: the elimination tree and column counts.
	parent, lnz := etreeCounts(a, perm, f.Pinv)
	flag := make([]int, n)
	f.Lp = make([]int, n+1)
	for k := 0; k < n; k++ {
		f.Lp[k+1] = f.Lp[k] + lnz[k]
	}
	total := f.Lp[n]
	f.Li = make([]int32, total)
	f.Lx = make([]float64, total)
	f.D = make([]float64, n)
	y := make([]float64, n)
	pattern := make([]int, n)
	dmax := 0.0
	for j := 0; j < n; j++ {
		dmax = math.Max(dmax, math.Abs(a.at(j, j)))
	}
	if dmax == 0 {
		dmax = 1
	}
	f.MinPivot = math.Inf(1)
	// Numeric: row k of L from a sparse triangular solve.
	work := 0
	for k := 0; k < n; k++ {
		y[k] = 0
		top := n
		flag[k] = k
		lnz[k] = 0
		kk := perm[k]
		for p := a.ColPtr[kk]; p < a.ColPtr[kk+1]; p++ {
			i := f.Pinv[a.RowIdx[p]]
			if i <= k {
				y[i] += a.Val[p]
				ln := 0
				for ; flag[i] != k; i = parent[i] {
					pattern[ln] = i
					ln++
					flag[i] = k
				}
				for ln > 0 {
					top--
					ln--
					pattern[top] = pattern[ln]
				}
			}
		}
		d := y[k]
		y[k] = 0
		for ; top < n; top++ {
			i := pattern[top]
			yi := y[i]
			y[i] = 0
			p2 := f.Lp[i] + lnz[i]
			li := f.Li[f.Lp[i]:p2]
			lx := f.Lx[f.Lp[i]:p2]
			for q, r := range li {
				y[r] -= lx[q] * yi
			}
			work += len(li)
			lki := yi / f.D[i]
			d -= lki * yi
			f.Li[p2] = int32(k)
			f.Lx[p2] = lki
			lnz[i]++
		}
		f.D[k] = d
		r := math.Abs(d) / dmax
		f.MinPivot = math.Min(f.MinPivot, r)
		if r <= PivotTol || math.IsNaN(d) {
			return nil, &SingularPivotError{Index: kk, Ratio: r}
		}
		if d < 0 {
			f.Negative++
		}
		if work > 1<<24 {
			work = 0
			if err := ctx.Err(); err != nil {
				return nil, err
			}
			if progress != nil {
				progress(float64(k) / float64(n))
			}
		}
	}
	return f, nil
}

// Solve overwrites b with A^-1 b; tmp is n of scratch.
func (f *SparseLDL) Solve(b, tmp []float64) {
	n := f.N
	x := tmp[:n]
	for k := 0; k < n; k++ {
		x[k] = b[f.Perm[k]]
	}
	for j := 0; j < n; j++ {
		xj := x[j]
		if xj == 0 {
			continue
		}
		li := f.Li[f.Lp[j]:f.Lp[j+1]]
		lx := f.Lx[f.Lp[j]:f.Lp[j+1]]
		for q, r := range li {
			x[r] -= lx[q] * xj
		}
	}
	for j := 0; j < n; j++ {
		x[j] /= f.D[j]
	}
	for j := n - 1; j >= 0; j-- {
		li := f.Li[f.Lp[j]:f.Lp[j+1]]
		lx := f.Lx[f.Lp[j]:f.Lp[j+1]]
		s := x[j]
		for q, r := range li {
			s -= lx[q] * x[r]
		}
		x[j] = s
	}
	for k := 0; k < n; k++ {
		b[f.Perm[k]] = x[k]
	}
}
