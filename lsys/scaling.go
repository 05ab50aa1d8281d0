package lsys

import (
	"math"
	"math/cmplx"
	"sort"

	"gonum.org/v1/gonum/floats"
	"gonum.org/v1/gonum/mat"
)

// Unit-free coordinates for the decisions.
//
// A change of units is a diagonal similarity x = D x~ (with diagonal input
// and output scalings). Exact reachability, observability, multiplicities
// and Jordan blocks do not change under it; numerical decisions made with a
// tolerance relative to a norm do, unless they are made in coordinates that
// do not depend on the units the model came in. Each decision here is made
// after a canonical diagonal scaling of the matrices it depends on, and of
// nothing else:
//
//   - eigenvalue clustering and Jordan blocks: A alone (balanceEigen);
//   - reachability: A and B alone (balanceReach);
//   - observability: A and C alone (balanceSeen).
//
// The scaling is that of Osborne (1960, On pre-conditioning of matrices,
// J. ACM 7) in the form of Parlett & Reinsch (1969, Balancing a matrix for
// calculation of eigenvalues and eigenvectors, Numer. Math. 13): each state
// is scaled by a power of two until the 2-norm of the weights coming into it
// (the off-diagonal entries of its row of A, and its row of B) equals that
// of the weights leaving it (its column of A off the diagonal, and its
// column of C). For an irreducible A this balanced form is unique up to one
// common factor (Osborne 1960; Eaves, Hoffman, Rothblum & Schneider 1985,
// Line-sum-symmetric scalings of square nonnegative matrices, Math.
// Programming Study 25), so the result, and every decision made on it, is
// the same whatever the units were, up to the powers of two.
//
// A reducible A (decoupled or one-way coupled parts, as in a modal form or
// a cascade) has no unique balanced form: each strongly connected part of
// its coupling graph can be rescaled on its own, and plain balancing drives
// the coupling into a part that feeds nothing else toward zero, so that a
// cascade of two identical resonators would look like two independent ones
// and a decoupled mode with a small input entry like an unreachable one.
// Here such a part is scaled as a whole: one that feeds no other part gets
// its incoming weights to the size of A (the root-mean-square entry of the
// balanced A, ref), one that nothing feeds gets its outgoing weights to that
// size, and one in between has its incoming and outgoing weights balanced.
// Inputs and outputs (columns of B, rows of C) are scaled to ref too. What
// remains unit-dependent is only what no change of units can alter: exact
// zeros. All factors are powers of two, so the scaling adds no rounding.
type unitScaling struct {
	A, B, C *mat.Dense // scaled copies; B or C nil when not asked for
	// S is the state scaling, x = diag(S) x~; U the input scaling
	// (B~ = T B diag(U)), Y the output scaling (C~ = diag(Y) C T^-1).
	S, U, Y []float64
	Ref     float64 // root-mean-square entry of the scaled A (1 if A = 0)
	// Parts are the strongly connected parts of A's coupling graph (the
	// irreducible diagonal blocks of its Frobenius normal form).
	Parts [][]int
}

// balanceEigen scales A alone (see unitScaling).
func balanceEigen(A *mat.Dense) *unitScaling { return balanceUnits(A, nil, nil) }

// balanceReach scales (A, B) for the reachability decisions.
func balanceReach(A, B *mat.Dense) *unitScaling { return balanceUnits(A, B, nil) }

// balanceSeen scales (A, C) for the observability decisions.
func balanceSeen(A, C *mat.Dense) *unitScaling { return balanceUnits(A, nil, C) }

// balanceUnits returns the canonical diagonal scaling of (A, B, C) (see
// unitScaling); B and C may be nil.
func balanceUnits(A, B, C *mat.Dense) *unitScaling {
	n, _ := A.Dims()
	us := &unitScaling{A: mat.DenseCopyOf(A)}
	A = us.A
	m, p := 0, 0
	if B != nil {
		us.B = mat.DenseCopyOf(B)
		_, m = B.Dims()
	}
	if C != nil {
		us.C = mat.DenseCopyOf(C)
		p, _ = C.Dims()
	}
	B, C = us.B, us.C
	us.S, us.U, us.Y = ones(n), ones(m), ones(p)
	if n == 0 {
		us.Ref = 1
		return us
	}

	// The coupling graph: edge j -> i when A[i][j] != 0, i != j. Only
	// exact zeros count as missing: in units a million apart a real
	// coupling can be 1e-24 of ||A||, below any rounding threshold.
	edge := make([]bool, n*n)
	for i := 0; i < n; i++ {
		for j := 0; j < n; j++ {
			edge[i*n+j] = i != j && A.At(i, j) != 0
		}
	}
	link := func(i, j int) bool { return edge[i*n+j] }
	part := stronglyConnected(n, link)
	nparts := 0
	for _, k := range part {
		nparts = max(nparts, k+1)
	}
	members := make([][]int, nparts)
	for i, k := range part {
		members[k] = append(members[k], i)
	}
	us.Parts = members

	pow2 := func(x float64) float64 { return math.Exp2(math.Round(math.Log2(x))) }
	// scale multiplies states idx by f: rows of A and B divided by f,
	// columns of A and C multiplied.
	scale := func(idx []int, f float64) {
		for _, i := range idx {
			us.S[i] *= f
			for j := 0; j < n; j++ {
				A.Set(i, j, A.At(i, j)/f)
			}
			for j := 0; j < n; j++ {
				A.Set(j, i, A.At(j, i)*f)
			}
			for j := 0; j < m; j++ {
				B.Set(i, j, B.At(i, j)/f)
			}
			for j := 0; j < p; j++ {
				C.Set(j, i, C.At(j, i)*f)
			}
		}
	}
	// weights returns the 2-norms of the weights into and out of the
	// states of one part (in, out), counting A entries only across the
	// part's boundary, plus B rows and C columns.
	inPart := make([]int, n)
	weights := func(k int) (in, out float64) {
		for _, i := range members[k] {
			inPart[i] = k + 1
		}
		for _, i := range members[k] {
			for j := 0; j < n; j++ {
				if inPart[j] != k+1 && link(i, j) {
					in = math.Hypot(in, A.At(i, j))
				}
				if inPart[j] != k+1 && link(j, i) {
					out = math.Hypot(out, A.At(j, i))
				}
			}
			for j := 0; j < m; j++ {
				in = math.Hypot(in, B.At(i, j))
			}
			for j := 0; j < p; j++ {
				out = math.Hypot(out, C.At(j, i))
			}
		}
		for _, i := range members[k] {
			inPart[i] = 0
		}
		return in, out
	}
	refOf := func() float64 {
		r := frobeniusFast(A) / math.Sqrt(float64(n))
		if r == 0 {
			return 1
		}
		return r
	}

	for sweep := 0; sweep < 60; sweep++ {
		changed := false
		// States within a part: Osborne's step, accepted only when it
		// reduces in + out noticeably, as in Parlett & Reinsch, so the
		// sweeps end.
		for i := 0; i < n; i++ {
			// Sums of squares (math.Hypot per entry was most of the time
			// of modes at n = 500); the rare sum that over- or underflows
			// is redone entry by entry.
			var r2, c2 float64
			for j := 0; j < n; j++ {
				if part[j] != part[i] {
					continue
				}
				if link(i, j) {
					x := A.At(i, j)
					r2 += x * x
				}
				if link(j, i) {
					x := A.At(j, i)
					c2 += x * x
				}
			}
			r, c := math.Sqrt(r2), math.Sqrt(c2)
			if !safeSquares(r2) || !safeSquares(c2) {
				r, c = 0, 0
				for j := 0; j < n; j++ {
					if part[j] != part[i] {
						continue
					}
					if link(i, j) {
						r = math.Hypot(r, A.At(i, j))
					}
					if link(j, i) {
						c = math.Hypot(c, A.At(j, i))
					}
				}
			}
			if r == 0 || c == 0 {
				continue
			}
			f := pow2(math.Sqrt(r / c))
			if f == 1 || r/f+c*f >= 0.95*(r+c) {
				continue
			}
			changed = true
			scale([]int{i}, f)
		}
		// Whole parts against one another and against B and C.
		ref := refOf()
		for k := 0; k < nparts; k++ {
			in, out := weights(k)
			var f float64
			switch {
			case in == 0 && out == 0:
				continue
			case out == 0: // feeds nothing: bring what comes in to ref
				f = pow2(in / ref)
			case in == 0: // fed by nothing: bring what leaves to ref
				f = pow2(ref / out)
			default:
				f = pow2(math.Sqrt(in / out))
				if f != 1 && in/f+out*f >= 0.95*(in+out) {
					f = 1
				}
			}
			if f == 1 || (f <= 2 && f >= 0.5 && (in == 0 || out == 0)) {
				continue
			}
			changed = true
			scale(members[k], f)
		}
		// Inputs and outputs to the size of A.
		ref = refOf()
		for j := 0; j < m; j++ {
			nc := mat.Norm(B.ColView(j), 2)
			if nc == 0 {
				continue
			}
			if f := pow2(ref / nc); f > 2 || f < 0.5 {
				changed = true
				us.U[j] *= f
				for i := 0; i < n; i++ {
					B.Set(i, j, B.At(i, j)*f)
				}
			}
		}
		for i := 0; i < p; i++ {
			nr := mat.Norm(C.RowView(i), 2)
			if nr == 0 {
				continue
			}
			if f := pow2(ref / nr); f > 2 || f < 0.5 {
				changed = true
				us.Y[i] *= f
				for j := 0; j < n; j++ {
					C.Set(i, j, C.At(i, j)*f)
				}
			}
		}
		if !changed {
			break
		}
	}
	us.Ref = refOf()
	return us
}

// toBalanced maps a vector of the original coordinates to the scaled ones:
// v~ = v ./ S for a right (state) vector, w~ = w .* S for a left one.
func (us *unitScaling) toBalanced(v []complex128, left bool) []complex128 {
	out := make([]complex128, len(v))
	for i, x := range v {
		if left {
			out[i] = x * complex(us.S[i], 0)
		} else {
			out[i] = x / complex(us.S[i], 0)
		}
	}
	return out
}

// fromBalanced maps a vector of the scaled coordinates back: v = S .* v~
// for a right vector, w = w~ ./ S for a left one.
func (us *unitScaling) fromBalanced(v []complex128, left bool) []complex128 {
	out := make([]complex128, len(v))
	for i, x := range v {
		if left {
			out[i] = x / complex(us.S[i], 0)
		} else {
			out[i] = x * complex(us.S[i], 0)
		}
	}
	return out
}

func ones(n int) []float64 {
	v := make([]float64, n)
	for i := range v {
		v[i] = 1
	}
	return v
}

// stronglyConnected labels the strongly connected components of the graph
// on 0..n-1 with an edge j -> i when link(i, j) (Tarjan 1972,
// Depth-first search and linear graph algorithms, SIAM J. Comput. 1),
// numbering them in the order they complete. Iterative, so deep graphs do
// not grow the stack.
func stronglyConnected(n int, link func(i, j int) bool) []int {
	index := make([]int, n)
	low := make([]int, n)
	onStack := make([]bool, n)
	comp := make([]int, n)
	for i := range index {
		index[i] = -1
		comp[i] = -1
	}
	var stack []int
	next, ncomp := 0, 0
	type frame struct{ v, j int }
	for root := 0; root < n; root++ {
		if index[root] >= 0 {
			continue
		}
		call := []frame{{root, 0}}
		index[root], low[root] = next, next
		next++
		stack = append(stack, root)
		onStack[root] = true
		for len(call) > 0 {
			f := &call[len(call)-1]
			v := f.v
			if f.j < n {
				w := f.j
				f.j++
				// successors of v: states w that v feeds (A[w][v] != 0).
				if !link(w, v) {
					continue
				}
				if index[w] < 0 {
					index[w], low[w] = next, next
					next++
					stack = append(stack, w)
					onStack[w] = true
					call = append(call, frame{w, 0})
				} else if onStack[w] {
					low[v] = min(low[v], index[w])
				}
				continue
			}
			if low[v] == index[v] {
				for {
					w := stack[len(stack)-1]
					stack = stack[:len(stack)-1]
					onStack[w] = false
					comp[w] = ncomp
					if w == v {
						break
					}
				}
				ncomp++
			}
			call = call[:len(call)-1]
			if len(call) > 0 {
				u := call[len(call)-1].v
				low[u] = min(low[u], low[v])
			}
		}
	}
	return comp
}

// decisionEigen returns the eigen-structure of A computed in the unit-free
// coordinates of balanceEigen, with the scaling used: the eigenvalues and
// their condition numbers are those of the balanced matrix (so clustering
// and Jordan decisions do not depend on units), the vectors are mapped back
// to the original coordinates, of unit 2-norm with the largest entry real.
//
// When A is reducible, its eigenvalues are those of the irreducible
// diagonal blocks of its Frobenius normal form, and each is computed, with
// its condition number, from its own block (balanced on its own, as the
// isolation and balancing of Parlett & Reinsch 1969 do): the coupling
// between blocks changes no eigenvalue, but it splits equal eigenvalues of
// two blocks (two identical resonators in cascade) by about sqrt(u), and
// it inflates the first-order condition numbers of eigenvalues that a
// permutation isolates exactly (an integrator feeding nothing back).
func decisionEigen(A *mat.Dense) (*EigenStructure, *unitScaling, error) {
	us := balanceEigen(A)
	es, err := Eigen(us.A)
	if err != nil {
		return nil, nil, err
	}
	if len(us.Parts) > 1 {
		if err := partEigenvalues(us, es); err != nil {
			return nil, nil, err
		}
	}
	for k := range es.Values {
		es.Right[k] = unitLargestReal(us.fromBalanced(es.Right[k], false))
		es.Left[k] = unitLargestReal(us.fromBalanced(es.Left[k], true))
	}
	if lo, hi := floats.Min(us.S), floats.Max(us.S); hi > lo {
		// Kept for the second opinion at the entered scale (see
		// JordanCluster.Entered).
		es.entered = A
		es.enteredCond = make([]float64, len(es.Values))
		for k := range es.Values {
			var d complex128
			for i, w := range es.Left[k] {
				d += cmplx.Conj(w) * es.Right[k][i]
			}
			es.enteredCond[k] = 1 / cmplx.Abs(d)
		}
	}
	return es, us, nil
}

// unitLargestReal scales v to unit 2-norm with its largest entry real and
// positive.
func unitLargestReal(v []complex128) []complex128 {
	unitNormalize(v)
	big, at := 0.0, -1
	for i, x := range v {
		if a := cmplx.Abs(x); a > big {
			big, at = a, i
		}
	}
	if at >= 0 {
		ph := cmplx.Conj(v[at]) / complex(big, 0)
		for i := range v {
			v[i] *= ph
		}
		v[at] = complex(real(v[at]), 0)
	}
	return v
}

// partEigenvalues replaces the eigenvalues of es, and sets the condition
// numbers the decisions use,
// (computed on the whole balanced matrix) by those of the irreducible
// diagonal blocks, matching each computed value to the nearest block value
// (closest pairs first), so the vectors of es stay with their values.
func partEigenvalues(us *unitScaling, es *EigenStructure) error {
	var vals []complex128
	var conds []float64
	var partOf []int
	for pi, idx := range us.Parts {
		k := len(idx)
		sub := mat.NewDense(k, k, nil)
		for a, i := range idx {
			for b, j := range idx {
				sub.Set(a, b, us.A.At(i, j))
			}
		}
		pe, err := Eigen(sub)
		if err != nil {
			return err
		}
		vals = append(vals, pe.Values...)
		conds = append(conds, pe.Cond...)
		for range pe.Values {
			partOf = append(partOf, pi)
		}
	}
	n := len(es.Values)
	type pair struct {
		d    float64
		i, j int
	}
	pairs := make([]pair, 0, n*n)
	for i, v := range es.Values {
		for j, w := range vals {
			pairs = append(pairs, pair{cmplx.Abs(v - w), i, j})
		}
	}
	sort.Slice(pairs, func(a, b int) bool {
		if pairs[a].d != pairs[b].d {
			return pairs[a].d < pairs[b].d
		}
		if pairs[a].i != pairs[b].i {
			return pairs[a].i < pairs[b].i
		}
		return pairs[a].j < pairs[b].j
	})
	usedI, usedJ := make([]bool, n), make([]bool, n)
	es.decide = make([]float64, n)
	es.part = make([]int, n)
	for _, p := range pairs {
		if usedI[p.i] || usedJ[p.j] {
			continue
		}
		usedI[p.i], usedJ[p.j] = true, true
		es.Values[p.i], es.decide[p.i], es.part[p.i] = vals[p.j], conds[p.j], partOf[p.j]
	}
	return nil
}

// safeSquares reports whether a sum of squares is free of overflow and of
// underflow that would matter (zero is exact).
func safeSquares(s float64) bool {
	return s == 0 || s > 0x1p-900 && s < 0x1p900
}

// frobeniusFast is mat.Norm(A, 2) by a plain sum of squares, which is several
// times faster than its overflow-safe scaled sum (Dlassq) and is used
// when the sum is safe (balancing recomputes it every sweep).
func frobeniusFast(A *mat.Dense) float64 {
	raw := A.RawMatrix()
	var s float64
	for i := 0; i < raw.Rows; i++ {
		for _, x := range raw.Data[i*raw.Stride : i*raw.Stride+raw.Cols] {
			s += x * x
		}
	}
	if !safeSquares(s) {
		return mat.Norm(A, 2)
	}
	return math.Sqrt(s)
}
