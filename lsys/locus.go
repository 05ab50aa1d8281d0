package lsys

import (
	"fmt"
	"math"
	"math/cmplx"
	"strings"
)

// Locus is how the eigenvalues (poles) of a family of systems move as one
// parameter varies: Branches[i][k] is mode i at Values[k]. Branches are
// followed by matching eigenvalues between neighbouring steps (see
// MatchEigenvalues), not by sorting, so a branch is one physical mode even
// where modes cross.
type Locus struct {
	Parameter string
	Values    []float64
	Branches  [][]complex128
	Ts        float64 // sample time of the systems (0: continuous)
}

// NewLocus builds a locus from the eigenvalues at each parameter value,
// matching each step to the previous one. Every step must have the same
// number of eigenvalues.
func NewLocus(parameter string, values []float64, eig [][]complex128, ts float64) (*Locus, error) {
	if len(values) != len(eig) {
		return nil, fmt.Errorf("%d parameter values but %d sets of eigenvalues", len(values), len(eig))
	}
	if len(values) == 0 {
		return nil, fmt.Errorf("a locus needs at least one parameter value")
	}
	n := len(eig[0])
	l := &Locus{Parameter: parameter, Values: append([]float64(nil), values...), Ts: ts}
	l.Branches = make([][]complex128, n)
	for i := range l.Branches {
		l.Branches[i] = make([]complex128, len(values))
	}
	prev := append([]complex128(nil), eig[0]...)
	for k, e := range eig {
		if len(e) != n {
			return nil, fmt.Errorf("at %s = %g the system has %d eigenvalues, but %d at the first value", parameter, values[k], len(e), n)
		}
		if k > 0 {
			prev = MatchEigenvalues(prev, e)
		}
		for i := range prev {
			l.Branches[i][k] = prev[i]
		}
	}
	return l, nil
}

// MatchEigenvalues reorders next so that next[i] continues prev[i]: the
// assignment minimises the sum of distances |prev[i] - next[j]| (Kuhn,
// "The Hungarian method for the assignment problem", 1955; Munkres 1957),
// which follows crossing branches where sorting would swap them.
func MatchEigenvalues(prev, next []complex128) []complex128 {
	n := len(prev)
	if n != len(next) || n == 0 {
		return append([]complex128(nil), next...)
	}
	cost := make([][]float64, n)
	for i := range cost {
		cost[i] = make([]float64, n)
		for j := range cost[i] {
			cost[i][j] = cmplx.Abs(prev[i] - next[j])
		}
	}
	assign := hungarian(cost)
	out := make([]complex128, n)
	for i, j := range assign {
		out[i] = next[j]
	}
	return out
}

// hungarian returns, for each row, the column assigned to it in a
// minimum-cost perfect matching of the square cost matrix (O(n^3), with
// row and column potentials).
func hungarian(a [][]float64) []int {
	n := len(a)
	inf := math.Inf(1)
	u := make([]float64, n+1)
	v := make([]float64, n+1)
	p := make([]int, n+1) // p[j]: row matched to column j (1-based), 0 none
	way := make([]int, n+1)
	for i := 1; i <= n; i++ {
		p[0] = i
		j0 := 0
		minv := make([]float64, n+1)
		used := make([]bool, n+1)
		for j := range minv {
			minv[j] = inf
		}
		for {
			used[j0] = true
			i0, delta, j1 := p[j0], inf, 0
			for j := 1; j <= n; j++ {
				if used[j] {
					continue
				}
				cur := a[i0-1][j-1] - u[i0] - v[j]
				if cur < minv[j] {
					minv[j], way[j] = cur, j0
				}
				if minv[j] < delta {
					delta, j1 = minv[j], j
				}
			}
			if j1 == 0 { // only with NaN costs; keep what is matched
				break
			}
			for j := 0; j <= n; j++ {
				if used[j] {
					u[p[j]] += delta
					v[j] -= delta
				} else {
					minv[j] -= delta
				}
			}
			j0 = j1
			if p[j0] == 0 {
				break
			}
		}
		for j0 != 0 {
			j1 := way[j0]
			p[j0] = p[j1]
			j0 = j1
		}
	}
	res := make([]int, n)
	taken := make([]bool, n)
	for i := range res {
		res[i] = -1
	}
	for j := 1; j <= n; j++ {
		if p[j] > 0 && res[p[j]-1] < 0 {
			res[p[j]-1] = j - 1
			taken[j-1] = true
		}
	}
	// Rows left unmatched (NaN costs) take the free columns in order.
	for i := range res {
		if res[i] < 0 {
			for j := range taken {
				if !taken[j] {
					res[i], taken[j] = j, true
					break
				}
			}
		}
	}
	return res
}

// String summarises each branch: where it starts and ends.
func (l *Locus) String() string {
	var b strings.Builder
	last := len(l.Values) - 1
	fmt.Fprintf(&b, "locus over %s from %.6g to %.6g (%d values), %d eigenvalues", l.Parameter, l.Values[0], l.Values[last], len(l.Values), len(l.Branches))
	for i, br := range l.Branches {
		fmt.Fprintf(&b, "\n  mode %d: %s -> %s", i+1, fmtC(br[0]), fmtC(br[last]))
	}
	return b.String()
}
