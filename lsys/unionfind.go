package lsys

// unionFind keeps disjoint sets of indices 0..n-1 for single-linkage
// clustering (eigenvalues, zeros): join merges the sets of two indices,
// root names a set. Roots do not depend on path halving, so clusterings
// are the same whichever routine uses it.
type unionFind []int

func newUnionFind(n int) unionFind {
	u := make(unionFind, n)
	for i := range u {
		u[i] = i
	}
	return u
}

// root returns the representative of i's set, halving the path on the way.
func (u unionFind) root(i int) int {
	for u[i] != i {
		u[i] = u[u[i]]
		i = u[i]
	}
	return i
}

// join merges the sets of i and j; the root of i's set stays the root. It
// reports whether the two were apart.
func (u unionFind) join(i, j int) bool {
	a, b := u.root(i), u.root(j)
	if a == b {
		return false
	}
	u[b] = a
	return true
}
