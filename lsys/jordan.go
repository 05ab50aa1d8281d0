package lsys

import (
	"errors"
	"fmt"
	"math"
	"math/cmplx"
	"sort"

	"gonum.org/v1/gonum/mat"
)

// JordanCluster is one eigenvalue of the Jordan structure: a cluster of
// computed eigenvalues taken as one (a conjugate pair of clusters is listed
// once, by its upper member).
type JordanCluster struct {
	Value     complex128   // mean of the clustered eigenvalues
	Members   []complex128 // the computed eigenvalues in the cluster
	Algebraic int          // algebraic multiplicity (cluster size)
	Geometric int          // geometric multiplicity, n - rank(A - lambda I)
	Blocks    []int        // Jordan block sizes, largest first
	// Ranks[j] is the numerical rank of (A - lambda I)^(j+1) (for a complex
	// cluster, that of the real quadratic factor, halved in deficiency).
	Ranks []int
	// Spread is the largest distance of a member from Value; Tol the
	// clustering tolerance that merged them; RankTol the relative
	// tolerance of the rank decisions on the powers. SpreadTol is the
	// absolute rank tolerance the spread imposes on the first power: the
	// members are up to Spread away from Value, so A - Value I has singular
	// values of that size that belong to the cluster (see jordanBlocks).
	Spread, Tol, RankTol, SpreadTol float64
	// Cond is the largest eigenvalue condition number in the cluster; +Inf
	// when the cluster is defective.
	Cond float64
	// Close is the ratio distance/tolerance, between 0.1 and 10, of the
	// pair of computed eigenvalues nearest the clustering threshold that
	// involves a member, 0 when none is that near: such a call (merged or
	// kept apart) is genuinely close, and another realization of the same
	// model may decide it the other way; the display says so.
	Close float64
	// Entered, when not empty, is the call the same rules make at the
	// scale of the matrix as entered (its norm and its eigenvalue
	// conditions in those coordinates), when that differs: the decision
	// rests on entries that are at rounding level in the units entered
	// (a one-way coupling of 1e-17, or a realization computed at a scale
	// far above its balanced size), so rounding in any computation that
	// produced the matrix in those units can turn it. The display says so.
	Entered string
	// Coupled, when not 0, is the largest difference between members that
	// come from different one-way coupled parts of A, in a cluster that is
	// defective: the blocks exist only through the coupling between those
	// parts, and their eigenvalues are not equal but Coupled apart, so in
	// units that shrink the coupling to that size the cluster is
	// semisimple. No change of units can tell such a coupling from rounding
	// left by a change of coordinates; the call is close. Parts with
	// exactly equal eigenvalues (identical stages in cascade) are not.
	Coupled float64
	// OneWay reports a defective cluster whose members come from
	// different one-way coupled parts of A (a cascade): its blocks exist
	// through couplings whose size no change of units can tell, so an
	// exact Jordan block as entered and the rounding of a semisimple pair
	// look alike. Coupled > 0 says when that is a close call.
	OneWay bool
	// BoundaryTol = ZeroTol x max(1, condition) for a simple eigenvalue,
	// ZeroTol for a cluster: a value closer than this to the stability
	// boundary is on it.
	BoundaryTol float64

	idx []int // indices of the members in the EigenStructure
}

// IsClose reports whether the call is close: near the clustering threshold,
// made otherwise at the entered scale, or defective only through a one-way
// coupling of parts whose eigenvalues differ.
func (c JordanCluster) IsClose() bool { return c.Close > 0 || c.Entered != "" || c.Coupled > 0 }

// Defective reports whether the eigenvalue has fewer eigenvectors than its
// multiplicity.
func (c JordanCluster) Defective() bool { return c.Geometric < c.Algebraic }

// JordanStructure is the result of Jordan.
type JordanStructure struct {
	N        int
	Clusters []JordanCluster
	// ClusterFactor c: eigenvalues i and j are clustered when
	// |l_i - l_j| <= c * u * ||A||_F * max(cond_i, cond_j) (u the unit
	// roundoff), capped at CapTol; or when closer than the caller's
	// absolute tolerance.
	ClusterFactor, CapTol, AbsTol float64
	RankTol                       float64
	// ZeroTol = 1000 u ||A||_F: a cluster whose mean has a smaller real
	// part is reported with real part exactly 0.
	ZeroTol float64
}

// Jordan computes the Jordan structure of A: eigenvalues are clustered by
// their perturbation bounds (an eigenvalue with condition number k moves by
// about u*||A||*k under rounding), then for each cluster with mean lambda
// the block sizes follow from the ranks of the powers (A - lambda I)^j
// decided by singular values (Golub & Wilkinson 1976, Ill-conditioned
// eigensystems and the computation of the Jordan canonical form, SIAM
// Review 18(4)). absTol > 0 also clusters eigenvalues closer than absTol;
// relTol <= 0 means DefaultRelTol for the rank decisions. Whether an
// eigenvalue is defective is a numerical judgement: the tolerances are
// reported with every cluster. Every decision is made on A balanced by
// powers of two (see unitScaling), with the norms, conditions and
// tolerances of the balanced matrix, so the structure found is the same in
// any units; the rank tolerance of the j-th power is relTol ||A - lambda I||^j.
func Jordan(A *mat.Dense, absTol, relTol float64) (*JordanStructure, error) {
	if A == nil {
		return &JordanStructure{}, nil
	}
	n, c := A.Dims()
	if n != c {
		return nil, &ShapeError{What: "the Jordan structure needs a square matrix", Got: Shape(A), Other: fmt.Sprintf("%dx%d", n, n)}
	}
	es, us, err := decisionEigen(A)
	if err != nil {
		return nil, err
	}
	return jordanFrom(us.A, es, absTol, relTol, 0)
}

const jordanClusterFactor = 1e3

// jordanFrom computes the Jordan structure from an eigen-structure of
// decisionEigen; A is the balanced matrix it was computed from.
func jordanFrom(A *mat.Dense, es *EigenStructure, absTol, relTol, ts float64) (*JordanStructure, error) {
	n, _ := A.Dims()
	if relTol <= 0 || math.IsNaN(relTol) {
		relTol = DefaultRelTol
	}
	if absTol < 0 || math.IsNaN(absTol) {
		absTol = 0
	}
	normA := mat.Norm(A, 2)
	js := &JordanStructure{N: n, ClusterFactor: jordanClusterFactor, CapTol: 1e-3 * math.Max(normA, dlamchE), AbsTol: absTol, RankTol: relTol, ZeroTol: 1e3 * dlamchE * normA}
	decide := es.Cond
	if es.decide != nil {
		decide = es.decide
	}
	groups := clusterEigenvalues(es.Values, decide, normA, js.CapTol, absTol)
	var err error
	for _, g := range groups {
		var mean complex128
		maxCond, maxDecide := 0.0, 0.0
		members := make([]complex128, len(g.idx))
		for i, k := range g.idx {
			mean += es.Values[k]
			members[i] = es.Values[k]
			maxCond = math.Max(maxCond, es.Cond[k])
			maxDecide = math.Max(maxDecide, decide[k])
		}
		mean /= complex(float64(len(g.idx)), 0)
		if imag(mean) < 0 {
			continue // the conjugate cluster carries the information
		}
		// A cluster straddling the real axis is real: its members are
		// pairs of the same cluster.
		if g.real {
			mean = complex(real(mean), 0)
		}
		// A real part within 1000 u ||A|| of zero is below what the
		// computation resolves (rigid-body modes, integrators): say 0.
		// A simple eigenvalue is accurate to about u ||A|| times its
		// condition (first-order perturbation bound), so the boundary
		// tolerance grows with it: an integrator in badly balanced
		// coordinates is still at 0. The mean of a cluster is far more
		// accurate than its members (their conditions measure their
		// spread), so it keeps ZeroTol.
		bt := js.ZeroTol
		if len(g.idx) == 1 {
			bt *= math.Max(1, maxDecide)
		}
		if math.Abs(real(mean)) <= bt {
			mean = complex(0, imag(mean))
		}
		spread := 0.0
		for _, v := range members {
			spread = math.Max(spread, cmplx.Abs(v-mean))
		}
		sort.Slice(members, func(a, b int) bool {
			if real(members[a]) != real(members[b]) {
				return real(members[a]) < real(members[b])
			}
			return imag(members[a]) > imag(members[b])
		})
		jc := JordanCluster{Value: mean, Members: members, Algebraic: len(members), Spread: spread, Tol: g.tol, RankTol: relTol, Cond: maxCond, BoundaryTol: bt, Close: g.near, idx: g.idx}
		if jc.Algebraic == 1 {
			jc.Geometric, jc.Blocks = 1, []int{1}
		} else {
			jc.SpreadTol = jordanSpreadTol(mean, spread)
			jc.Ranks, jc.Blocks, err = jordanBlocks(A, mean, jc.Algebraic, relTol, jc.SpreadTol)
			if err != nil {
				return nil, err
			}
			jc.Geometric = len(jc.Blocks)
			if jc.Defective() && es.part != nil {
				for a, i := range g.idx {
					for _, j := range g.idx[a+1:] {
						if es.part[i] != es.part[j] {
							jc.OneWay = true
							jc.Coupled = math.Max(jc.Coupled, cmplx.Abs(es.Values[i]-es.Values[j]))
						}
					}
				}
			}
			if jc.Defective() {
				// No eigenvector basis: the eigenvalue is infinitely
				// sensitive (its perturbations grow like eps^(1/k)).
				jc.Cond = math.Inf(1)
			}
		}
		js.Clusters = append(js.Clusters, jc)
	}
	if es.entered != nil {
		if err := secondOpinion(js, es, absTol, relTol); err != nil {
			return nil, err
		}
	}
	// Mode-table order.
	vals := make([]complex128, len(js.Clusters))
	for i, c := range js.Clusters {
		vals[i] = c.Value
	}
	idx := orderEigenvalues(vals, ts)
	out := make([]JordanCluster, len(idx))
	for i, k := range idx {
		out[i] = js.Clusters[k]
	}
	js.Clusters = out
	return js, nil
}

// secondOpinion makes the clustering and block decisions again on the
// matrix as entered, with its norm and the eigenvalue conditions in its
// coordinates (the cap on the clustering tolerance stays the balanced one:
// bad units must not merge a whole spectrum), and records in
// JordanCluster.Entered every cluster decided otherwise there. Decisions
// stay those of the balanced matrix, the same in any units; the second
// opinion only says which of them the units entered put within rounding.
func secondOpinion(js *JordanStructure, es *EigenStructure, absTol, relTol float64) error {
	A := es.entered
	normE := mat.Norm(A, 2)
	groups := clusterEigenvalues(es.Values, es.enteredCond, normE, js.CapTol, absTol)
	groupOf := make([]int, len(es.Values))
	for gi, g := range groups {
		for _, k := range g.idx {
			groupOf[k] = gi
		}
	}
	for ci := range js.Clusters {
		c := &js.Clusters[ci]
		g := groups[groupOf[c.idx[0]]]
		same := len(g.idx) == len(c.idx)
		for _, k := range c.idx {
			same = same && groupOf[k] == groupOf[c.idx[0]]
		}
		if !same {
			c.Entered = fmt.Sprintf("one eigenvalue of multiplicity %d", len(g.idx))
			if len(g.idx) < len(c.idx) {
				c.Entered = "split"
			}
			continue
		}
		if c.Algebraic == 1 {
			continue
		}
		spread := 0.0
		for _, k := range c.idx {
			spread = math.Max(spread, cmplx.Abs(es.Values[k]-c.Value))
		}
		_, blocks, err := jordanBlocks(A, c.Value, c.Algebraic, relTol, jordanSpreadTol(c.Value, spread))
		if err != nil {
			return err
		}
		if fmt.Sprint(blocks) != fmt.Sprint(c.Blocks) {
			c.Entered = fmt.Sprintf("blocks %v", blocks)
		}
	}
	return nil
}

type eigGroup struct {
	idx  []int
	tol  float64
	real bool // the cluster contains real eigenvalues or both members of pairs
	// near is the ratio distance/tolerance, between 0.1 and 10, of the
	// pair of eigenvalues nearest the clustering threshold that involves
	// a member (0: none so near): a call that a change of coordinates
	// could turn.
	near float64
}

// clusterEigenvalues groups eigenvalues by single linkage: i and j join when
// |l_i - l_j| <= min(cap, max(abs, c u ||A|| max(cond_i, cond_j))).
func clusterEigenvalues(vals []complex128, cond []float64, normA, capTol, absTol float64) []eigGroup {
	n := len(vals)
	sets := newUnionFind(n)
	find := sets.root
	pairTol := func(i, j int) float64 {
		t := jordanClusterFactor * dlamchE * math.Max(normA, dlamchE) * math.Max(cond[i], cond[j])
		if math.IsNaN(t) || t > capTol {
			t = capTol
		}
		return math.Max(t, absTol)
	}
	tols := make([]float64, n)
	near := make([]float64, n)
	for i := 0; i < n; i++ {
		for j := i + 1; j < n; j++ {
			t := pairTol(i, j)
			d := cmplx.Abs(vals[i] - vals[j])
			if d <= t {
				sets.join(i, j)
				tols[i] = math.Max(tols[i], t)
				tols[j] = math.Max(tols[j], t)
			}
			// The two members of a conjugate pair count too: whether
			// they are one oscillatory mode or a double real (or
			// defective) eigenvalue is the same call.
			near[i] = nearerCall(near[i], d, t)
			near[j] = nearerCall(near[j], d, t)
		}
	}
	byRoot := map[int]*eigGroup{}
	var roots []int
	for i := 0; i < n; i++ {
		r := find(i)
		g, ok := byRoot[r]
		if !ok {
			g = &eigGroup{}
			byRoot[r] = g
			roots = append(roots, r)
		}
		g.idx = append(g.idx, i)
		g.tol = math.Max(g.tol, tols[i])
		if near[i] != 0 && (g.near == 0 || math.Abs(math.Log(near[i])) < math.Abs(math.Log(g.near))) {
			g.near = near[i]
		}
		if imag(vals[i]) == 0 {
			g.real = true
		}
	}
	// A group holding both members of a pair is real too.
	out := make([]eigGroup, 0, len(roots))
	for _, r := range roots {
		g := byRoot[r]
		var pos, neg bool
		for _, k := range g.idx {
			if imag(vals[k]) > 0 {
				pos = true
			}
			if imag(vals[k]) < 0 {
				neg = true
			}
		}
		if pos && neg {
			g.real = true
		}
		if g.tol == 0 {
			g.tol = pairTol(g.idx[0], g.idx[0])
		}
		out = append(out, *g)
	}
	return out
}

// jordanBlocks returns the ranks of the powers of A - lambda I, j = 1..k,
// and the block sizes they imply: the number of blocks of size >= j is
// r_{j-1} - r_j (r_0 = n). For complex lambda the real quadratic factor
// Q = A^2 - 2 Re(lambda) A + |lambda|^2 I is used: its null space holds
// those of A - lambda I and A - conj(lambda) I, equal in dimension.
//
// The members of a cluster lie up to its spread d from lambda, so the
// powers have singular values of size about d^j (|2 Im lambda| d per factor
// for the quadratic one) that belong to the cluster, not to the rest of
// the spectrum: singular values below spreadTol^j also count as zero
// (spreadTol = 2 d, from jordanSpreadTol). Without that a clustered pair
// -100, -99 would show rank 2 for A - lambda I, that is no eigenvector at
// all, and be reported as semisimple.
func jordanBlocks(A *mat.Dense, lam complex128, k int, relTol, spreadTol float64) ([]int, []int, error) {
	n, _ := A.Dims()
	var M mat.Dense
	halve := false
	if imag(lam) == 0 {
		M.CloneFrom(A)
		for i := 0; i < n; i++ {
			M.Set(i, i, M.At(i, i)-real(lam))
		}
	} else {
		M.Mul(A, A)
		var t mat.Dense
		t.Scale(2*real(lam), A)
		M.Sub(&M, &t)
		a2 := real(lam)*real(lam) + imag(lam)*imag(lam)
		for i := 0; i < n; i++ {
			M.Set(i, i, M.At(i, i)+a2)
		}
		halve = true
	}
	P := mat.DenseCopyOf(&M)
	ranks := []int{}
	prev := n
	atLeast := []int{} // number of blocks of size >= j
	target := n - k
	if halve {
		target = n - 2*k
	}
	norm1 := 0.0
	for j := 1; j <= k; j++ {
		if j > 1 {
			P.Mul(P, &M)
		}
		var svd mat.SVD
		if !svd.Factorize(P, mat.SVDNone) {
			return nil, nil, errors.New("singular value decomposition did not converge")
		}
		sv := svd.Values(nil)
		if j == 1 {
			// The scale of the factor M: ||A||_F + |lambda| (squared for
			// the quadratic factor), or ||M|| if larger. A scalar
			// matrix has M = rounding only, and a tolerance relative to
			// ||M|| alone would count that rounding as rank.
			base := mat.Norm(A, 2) + cmplx.Abs(lam)
			if halve {
				base *= base
			}
			norm1 = math.Max(sv[0], base)
		}
		// Relative to the j-th power of that scale, the size the power
		// would have without the cluster: a power that vanishes on the
		// cluster (a defective pair whose quadratic factor squared is 0)
		// has only rounding left, and a tolerance relative to its own
		// norm would count rounding as rank.
		tol := relTol * math.Pow(norm1, float64(j))
		tol = math.Max(tol, math.Pow(spreadTol, float64(j)))
		r := 0
		for _, v := range sv {
			if v > tol {
				r++
			}
		}
		// The null space cannot exceed the cluster's share.
		if r < target {
			r = target
		}
		d := prev - r
		if halve {
			ranks = append(ranks, n-(n-r)/2)
			d /= 2
		} else {
			ranks = append(ranks, r)
		}
		if d <= 0 {
			break
		}
		atLeast = append(atLeast, d)
		prev = r
		if r == target {
			break
		}
	}
	// sizes: blocks of size exactly j = atLeast[j-1] - atLeast[j].
	var blocks []int
	total := 0
	for j := len(atLeast); j >= 1; j-- {
		next := 0
		if j < len(atLeast) {
			next = atLeast[j]
		}
		for c := 0; c < atLeast[j-1]-next; c++ {
			blocks = append(blocks, j)
			total += j
		}
	}
	// If rank decisions fell short of the multiplicity (tolerance too
	// tight), the remainder is reported as 1x1 blocks, the conservative
	// reading.
	for total < k {
		blocks = append(blocks, 1)
		total++
	}
	return ranks, blocks, nil
}

// jordanSpreadTol is the singular value size that a cluster of spread d
// around lam leaves in one factor of jordanBlocks: 2 d for A - lam I, and
// 2 d (2 |Im lam| + d) for the real quadratic factor of a complex cluster.
func jordanSpreadTol(lam complex128, d float64) float64 {
	if imag(lam) == 0 {
		return 2 * d
	}
	return 2 * d * (2*math.Abs(imag(lam)) + d)
}
