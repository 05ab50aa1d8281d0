package lsys

import (
	"bufio"
	"errors"
	"fmt"
	"io"
	"math"
	"sort"
	"strconv"
	"strings"
)

// SparseSym is a real symmetric sparse matrix stored with both triangles in
// compressed columns (row indices sorted in each column), so that products,
// graphs for ordering and the factorization all read it directly.
type SparseSym struct {
	N      int
	ColPtr []int
	RowIdx []int32
	Val    []float64
}

// NNZ is the number of stored entries (both triangles).
func (a *SparseSym) NNZ() int { return len(a.RowIdx) }

// Bytes is the memory the matrix holds.
func (a *SparseSym) Bytes() int64 {
	return int64(len(a.ColPtr))*8 + int64(len(a.RowIdx))*4 + int64(len(a.Val))*8
}

// Triplet is one entry (0-based) of a matrix being assembled.
type Triplet struct {
	I, J int
	V    float64
}

// NewSparseSym assembles an n x n symmetric matrix from entries given in
// one triangle or both: duplicates are summed (finite-element assembly);
// an entry given at (i, j) with i != j is mirrored to (j, i) unless both
// triangles are given, which is read off the entries themselves (any
// strictly lower and any strictly upper entry present means both). With
// both given, the two triangles must agree within SymmetryTol of the
// largest entry.
func NewSparseSym(n int, ts []Triplet) (*SparseSym, error) {
	if n <= 0 {
		return nil, errors.New("a sparse matrix needs at least one row")
	}
	lower, upper := false, false
	for _, t := range ts {
		if t.I < 0 || t.J < 0 || t.I >= n || t.J >= n {
			return nil, fmt.Errorf("entry (%d, %d) lies outside a %dx%d matrix", t.I+1, t.J+1, n, n)
		}
		if math.IsNaN(t.V) || math.IsInf(t.V, 0) {
			return nil, fmt.Errorf("entry (%d, %d) is %v; every entry must be finite", t.I+1, t.J+1, t.V)
		}
		if t.I > t.J {
			lower = true
		} else if t.I < t.J {
			upper = true
		}
	}
	both := lower && upper
	all := make([]Triplet, 0, 2*len(ts))
	for _, t := range ts {
		all = append(all, t)
		if !both && t.I != t.J {
			all = append(all, Triplet{t.J, t.I, t.V})
		}
	}
	sort.Slice(all, func(a, b int) bool {
		if all[a].J != all[b].J {
			return all[a].J < all[b].J
		}
		return all[a].I < all[b].I
	})
	a := &SparseSym{N: n, ColPtr: make([]int, n+1)}
	for k := 0; k < len(all); {
		t := all[k]
		v := 0.0
		for k < len(all) && all[k].I == t.I && all[k].J == t.J {
			v += all[k].V
			k++
		}
		a.RowIdx = append(a.RowIdx, int32(t.I))
		a.Val = append(a.Val, v)
		a.ColPtr[t.J+1]++
	}
	for j := 0; j < n; j++ {
		a.ColPtr[j+1] += a.ColPtr[j]
	}
	if both {
		if err := a.checkSym(); err != nil {
			return nil, err
		}
	}
	return a, nil
}

// at returns entry (i, j) by binary search in column j.
func (a *SparseSym) at(i, j int) float64 {
	lo, hi := a.ColPtr[j], a.ColPtr[j+1]
	k := lo + sort.Search(hi-lo, func(k int) bool { return int(a.RowIdx[lo+k]) >= i })
	if k < hi && int(a.RowIdx[k]) == i {
		return a.Val[k]
	}
	return 0
}

func (a *SparseSym) checkSym() error {
	big := 0.0
	for _, v := range a.Val {
		big = math.Max(big, math.Abs(v))
	}
	for j := 0; j < a.N; j++ {
		for p := a.ColPtr[j]; p < a.ColPtr[j+1]; p++ {
			i := int(a.RowIdx[p])
			if i <= j {
				continue
			}
			if d := math.Abs(a.Val[p] - a.at(j, i)); d > SymmetryTol*big {
				return fmt.Errorf("the matrix is not symmetric: entry (%d, %d) = %g but (%d, %d) = %g (tolerance %g of the largest entry)", i+1, j+1, a.Val[p], j+1, i+1, a.at(j, i), SymmetryTol)
			}
		}
	}
	return nil
}

// MulVec sets dst = A x.
func (a *SparseSym) MulVec(dst, x []float64) {
	for i := range dst[:a.N] {
		dst[i] = 0
	}
	for j := 0; j < a.N; j++ {
		xj := x[j]
		if xj == 0 {
			continue
		}
		for p := a.ColPtr[j]; p < a.ColPtr[j+1]; p++ {
			dst[a.RowIdx[p]] += a.Val[p] * xj
		}
	}
}

// Norm1 is the largest column sum of absolute values.
func (a *SparseSym) Norm1() float64 {
	m := 0.0
	for j := 0; j < a.N; j++ {
		s := 0.0
		for p := a.ColPtr[j]; p < a.ColPtr[j+1]; p++ {
			s += math.Abs(a.Val[p])
		}
		m = math.Max(m, s)
	}
	return m
}

// Diag returns the diagonal.
func (a *SparseSym) Diag() []float64 {
	d := make([]float64, a.N)
	for j := range d {
		d[j] = a.at(j, j)
	}
	return d
}

// Combine returns A + s B (the union of the two patterns).
func (a *SparseSym) Combine(s float64, b *SparseSym) *SparseSym {
	c := &SparseSym{N: a.N, ColPtr: make([]int, a.N+1)}
	c.RowIdx = make([]int32, 0, a.NNZ()+b.NNZ())
	c.Val = make([]float64, 0, a.NNZ()+b.NNZ())
	for j := 0; j < a.N; j++ {
		p, q := a.ColPtr[j], b.ColPtr[j]
		pe, qe := a.ColPtr[j+1], b.ColPtr[j+1]
		for p < pe || q < qe {
			switch {
			case q >= qe || (p < pe && a.RowIdx[p] < b.RowIdx[q]):
				c.RowIdx = append(c.RowIdx, a.RowIdx[p])
				c.Val = append(c.Val, a.Val[p])
				p++
			case p >= pe || b.RowIdx[q] < a.RowIdx[p]:
				c.RowIdx = append(c.RowIdx, b.RowIdx[q])
				c.Val = append(c.Val, s*b.Val[q])
				q++
			default:
				c.RowIdx = append(c.RowIdx, a.RowIdx[p])
				c.Val = append(c.Val, a.Val[p]+s*b.Val[q])
				p++
				q++
			}
		}
		c.ColPtr[j+1] = len(c.RowIdx)
	}
	return c
}

// ReadMatrixMarket reads a real square matrix in the Matrix Market
// exchange format of NIST (Boisvert, Pozo & Remington, "The Matrix Market
// exchange formats: initial design", NISTIR 5935, 1996): the header
// "%%MatrixMarket matrix coordinate real|integer symmetric|general",
// comment lines, "rows cols entries", then one "i j value" per line
// (1-based). A general matrix must be symmetric (within SymmetryTol).
func ReadMatrixMarket(r io.Reader) (*SparseSym, error) {
	sc := bufio.NewScanner(r)
	sc.Buffer(make([]byte, 1<<16), 1<<20)
	line := 0
	next := func() (string, bool) {
		for sc.Scan() {
			line++
			s := strings.TrimSpace(sc.Text())
			if s == "" || (strings.HasPrefix(s, "%") && line > 1) {
				continue
			}
			return s, true
		}
		return "", false
	}
	head, ok := next()
	if !ok {
		return nil, errors.New("the file is empty; a Matrix Market file starts with %%MatrixMarket")
	}
	f := strings.Fields(strings.ToLower(head))
	if len(f) != 5 || f[0] != "%%matrixmarket" || f[1] != "matrix" {
		return nil, fmt.Errorf("line 1 is %q; a Matrix Market file starts with \"%%%%MatrixMarket matrix coordinate real symmetric\" (or general)", head)
	}
	if f[2] != "coordinate" {
		return nil, fmt.Errorf("only the coordinate (sparse) form is read, not %q", f[2])
	}
	if f[3] != "real" && f[3] != "integer" {
		return nil, fmt.Errorf("only real or integer entries are read, not %q", f[3])
	}
	if f[4] != "symmetric" && f[4] != "general" {
		return nil, fmt.Errorf("only symmetric or general matrices are read, not %q", f[4])
	}
	size, ok := next()
	if !ok {
		return nil, errors.New("the size line (rows columns entries) is missing")
	}
	var rows, cols, nnz int
	if _, err := fmt.Sscan(size, &rows, &cols, &nnz); err != nil {
		return nil, fmt.Errorf("line %d: the size line must be three whole numbers, not %q", line, size)
	}
	if rows != cols || rows <= 0 || nnz < 0 {
		return nil, fmt.Errorf("line %d: a square matrix with at least one row is needed, not %dx%d", line, rows, cols)
	}
	ts := make([]Triplet, 0, nnz)
	for k := 0; k < nnz; k++ {
		s, ok := next()
		if !ok {
			return nil, fmt.Errorf("the file ends after %d of %d entries", k, nnz)
		}
		e := strings.Fields(s)
		if len(e) != 3 {
			return nil, fmt.Errorf("line %d: an entry is \"row column value\", not %q", line, s)
		}
		i, err1 := strconv.Atoi(e[0])
		j, err2 := strconv.Atoi(e[1])
		v, err3 := strconv.ParseFloat(e[2], 64)
		if err1 != nil || err2 != nil || err3 != nil {
			return nil, fmt.Errorf("line %d: cannot read %q as row, column, value", line, s)
		}
		if i < 1 || j < 1 || i > rows || j > cols {
			return nil, fmt.Errorf("line %d: entry (%d, %d) lies outside %dx%d", line, i, j, rows, cols)
		}
		if f[4] == "symmetric" && i < j {
			return nil, fmt.Errorf("line %d: a symmetric Matrix Market file holds the lower triangle only, but (%d, %d) is above the diagonal", line, i, j)
		}
		ts = append(ts, Triplet{i - 1, j - 1, v})
	}
	if err := sc.Err(); err != nil {
		return nil, err
	}
	return NewSparseSym(rows, ts)
}

// WriteMatrixMarket writes the lower triangle of a in the symmetric
// coordinate form, numbers in Go's shortest round-trip form.
func WriteMatrixMarket(w io.Writer, a *SparseSym) error {
	bw := bufio.NewWriter(w)
	cnt := 0
	for j := 0; j < a.N; j++ {
		for p := a.ColPtr[j]; p < a.ColPtr[j+1]; p++ {
			if int(a.RowIdx[p]) >= j {
				cnt++
			}
		}
	}
	fmt.Fprintf(bw, "%%%%MatrixMarket matrix coordinate real symmetric\n%d %d %d\n", a.N, a.N, cnt)
	for j := 0; j < a.N; j++ {
		for p := a.ColPtr[j]; p < a.ColPtr[j+1]; p++ {
			if i := int(a.RowIdx[p]); i >= j {
				fmt.Fprintf(bw, "%d %d %s\n", i+1, j+1, strconv.FormatFloat(a.Val[p], 'g', -1, 64))
			}
		}
	}
	return bw.Flush()
}
