package lsys

// NestedDissection returns a fill-reducing elimination order for the graph
// of a (perm[k] is the original index of the k-th pivot) by automatic
// nested dissection on level structures (George 1973, "Nested dissection
// of a regular finite element mesh", SIAM J. Numer. Anal. 10; the automatic
// form for irregular meshes: George & Liu, Computer Solution of Large
// Sparse Positive Definite Systems, 1981, chapter 8). Each piece is
// separated by the middle level of a breadth-first level structure rooted at
// a pseudo-peripheral node, the separator trimmed of nodes with no neighbour
// beyond it, the two sides ordered first (recursively) and the separator
// last. Pieces of at most ndLeaf nodes are ordered as found. The order is
// fully determined by the matrix (no random choices).
func NestedDissection(a *SparseSym) []int {
	n := a.N
	nd := &ndState{a: a, set: make([]int32, n), level: make([]int32, n), perm: make([]int, 0, n)}
	for i := range nd.set {
		nd.set[i] = 0
	}
	all := make([]int32, n)
	for i := range all {
		all[i] = int32(i)
	}
	nd.next = 1
	nd.order(all, 0)
	return nd.perm
}

const ndLeaf = 48

// ndBalance: a separator level may move off the middle while each side
// keeps a third of the nodes, to the smallest level in that range. On the
// benchmark lattices this cuts the factorization's work by 10 to 18 %
// against the plain middle level (measured: 316^2 3.76e8 -> 3.08e8,
// 22^3 3.43e8 -> 2.99e8, 35^3 5.97e9 -> 4.96e9 multiply-adds).
const ndBalance = 1.0 / 3

type ndState struct {
	a     *SparseSym
	set   []int32 // the id of the piece each node is in
	level []int32
	next  int32
	perm  []int
	queue []int32
}

// bfs builds the level structure of the piece id from root; it returns
// the nodes in BFS order and the start of each level.
func (nd *ndState) bfs(root int32, id int32, buf []int32) ([]int32, []int) {
	q := buf[:0]
	q = append(q, root)
	nd.level[root] = 0
	seen := nd.next
	nd.next++
	nd.set[root] = seen
	starts := []int{0}
	for h := 0; h < len(q); h++ {
		v := q[h]
		if h > 0 && nd.level[v] != nd.level[q[h-1]] {
			starts = append(starts, h)
		}
		for p := nd.a.ColPtr[v]; p < nd.a.ColPtr[v+1]; p++ {
			w := nd.a.RowIdx[p]
			if nd.set[w] == id {
				nd.set[w] = seen
				nd.level[w] = nd.level[v] + 1
				q = append(q, w)
			}
		}
	}
	// Restore the piece id for the nodes reached.
	for _, v := range q {
		nd.set[v] = id
	}
	starts = append(starts, len(q))
	return q, starts
}

func (nd *ndState) degreeIn(v, id int32) int {
	d := 0
	for p := nd.a.ColPtr[v]; p < nd.a.ColPtr[v+1]; p++ {
		if w := nd.a.RowIdx[p]; w != v && nd.set[w] == id {
			d++
		}
	}
	return d
}

func (nd *ndState) order(nodes []int32, depth int) {
	if len(nodes) == 0 {
		return
	}
	id := nd.next
	nd.next++
	for _, v := range nodes {
		nd.set[v] = id
	}
	if len(nodes) <= ndLeaf || depth > 60 {
		for _, v := range nodes {
			nd.perm = append(nd.perm, int(v))
			nd.set[v] = -1
		}
		return
	}
	// A pseudo-peripheral root: start at a node of least degree, move to a
	// least-degree node of the last level while the depth grows (George &
	// Liu 1979).
	root := nodes[0]
	best := nd.degreeIn(root, id)
	for _, v := range nodes[1:] {
		if d := nd.degreeIn(v, id); d < best {
			root, best = v, d
		}
	}
	buf := make([]int32, 0, len(nodes))
	q, starts := nd.bfs(root, id, buf)
	if len(q) < len(nodes) {
		// Disconnected: order each component on its own.
		var comps [][]int32
		comps = append(comps, append([]int32(nil), q...))
		for _, v := range q {
			nd.set[v] = -2
		}
		for _, v := range nodes {
			if nd.set[v] == id {
				qq, _ := nd.bfs(v, id, nil)
				comps = append(comps, append([]int32(nil), qq...))
				for _, w := range qq {
					nd.set[w] = -2
				}
			}
		}
		for _, c := range comps {
			nd.order(c, depth+1)
		}
		return
	}
	for it := 0; it < 8; it++ {
		last := q[starts[len(starts)-2]:]
		cand, cd := last[0], nd.degreeIn(last[0], id)
		for _, v := range last[1:] {
			if d := nd.degreeIn(v, id); d < cd {
				cand, cd = v, d
			}
		}
		q2, s2 := nd.bfs(cand, id, make([]int32, 0, len(nodes)))
		if len(s2) <= len(starts) {
			// Rebuild the kept structure's levels, which this try overwrote.
			q, starts = nd.bfs(root, id, q2[:0])
			break
		}
		root, q, starts = cand, q2, s2
	}
	nlev := len(starts) - 1
	if nlev < 3 {
		for _, v := range nodes {
			nd.perm = append(nd.perm, int(v))
			nd.set[v] = -1
		}
		return
	}
	// The middle level: the first whose end passes half the nodes; then
	// the smallest level whose sides both keep at least ndBalance of the
	// nodes (a smaller separator fills less; lopsided sides cost depth).
	mid := 1
	for mid < nlev-2 && starts[mid+1] < len(q)/2 {
		mid++
	}
	{
		best := mid
		for l := 1; l < nlev-1; l++ {
			lo, hi := starts[l], len(q)-starts[l+1]
			if float64(lo) < ndBalance*float64(len(q)) || float64(hi) < ndBalance*float64(len(q)) {
				continue
			}
			if starts[l+1]-starts[l] < starts[best+1]-starts[best] {
				best = l
			}
		}
		mid = best
	}
	var lower, upper, sep []int32
	lower = append(lower, q[:starts[mid]]...)
	upper = append(upper, q[starts[mid+1]:]...)
	for _, v := range q[starts[mid]:starts[mid+1]] {
		// Trim: a separator node with no neighbour in the next level
		// separates nothing; it joins the lower side.
		touches := false
		for p := nd.a.ColPtr[v]; p < nd.a.ColPtr[v+1]; p++ {
			w := nd.a.RowIdx[p]
			if nd.set[w] == id && nd.level[w] == int32(mid+1) {
				touches = true
				break
			}
		}
		if touches {
			sep = append(sep, v)
		} else {
			lower = append(lower, v)
		}
	}
	for _, v := range sep {
		nd.set[v] = -1
	}
	nd.order(lower, depth+1)
	nd.order(upper, depth+1)
	for _, v := range sep {
		nd.perm = append(nd.perm, int(v))
	}
}
