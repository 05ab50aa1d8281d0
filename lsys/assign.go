package lsys

import (
	"errors"
	"fmt"
	"math"
	"math/cmplx"

	"gonum.org/v1/gonum/mat"
)

// Assignment is a pole assignment: state feedback u = -K x with the
// eigenvalues of A - B K at the requested places (Observer: an observer
// gain L with the eigenvalues of A - L C there, found by duality).
type Assignment struct {
	System    *System
	Observer  bool
	Gain      *mat.Dense // K (m x n), or L (n x p) for an observer
	Requested []complex128
	Achieved  []complex128 // eigenvalues of A - B K (A - L C), in the order of Requested
	// MaxError is the largest |achieved - requested| / max(1, |requested|).
	MaxError float64
	// CondX is the 2-norm condition number of the closed-loop eigenvector
	// matrix X: the achieved poles move by up to about CondX times a
	// relative change of the data (Bauer & Fike 1960). Small is robust.
	CondX    float64
	GainNorm float64 // ||K||_F
	Sweeps   int     // iterations of the robust method (0 with one input)
	Method   string
}

// AssignTol is the relative distance within which requested poles count
// as equal (a repeated pole) and conjugate pairs are matched.
const AssignTol = 1e-10

// Assign places the poles of A - B K (observer: of A - L C) by the robust
// eigenstructure method of Kautsky, Nichols & Van Dooren (1985, "Robust
// pole assignment in linear state feedback", Int. J. Control 41(5)),
// "method 0": with B = [U0 U1] [Z; 0] (QR), the eigenvector x_j of pole
// l_j must lie in S_j, the null space of U1^T (A - l_j I); each sweep
// replaces every x_j by the unit vector of S_j closest to the direction
// orthogonal to the other eigenvectors, which lowers the condition of X;
// then K = Z^-1 U0^T (A - X diag(l) X^-1). With one input S_j is a line
// and K is the unique exact gain. Sweeps stop when the condition number
// of X changes by less than 1e-3 relative, at most 30. A mode that the
// inputs cannot move (observer: the outputs cannot see) is named in the
// error (PBH test of Modes). A pole may be repeated at most m times (the
// number of inputs), as the closed loop is kept diagonalizable.
func Assign(g *System, poles []complex128, observer bool) (*Assignment, error) {
	n := g.N()
	if n == 0 {
		return nil, errors.New("the system has no states")
	}
	if len(poles) != n {
		return nil, fmt.Errorf("give one pole per state: %d asked for, the system has %d states", len(poles), n)
	}
	for _, p := range poles {
		if cmplx.IsNaN(p) || cmplx.IsInf(p) {
			return nil, errors.New("the poles must be finite numbers")
		}
	}
	A, B := g.A, g.B
	what, inputs := "inputs", "reachable"
	if observer {
		if g.P() == 0 {
			return nil, errors.New("an observer needs outputs")
		}
		A = mat.DenseCopyOf(g.A.T())
		B = mat.DenseCopyOf(g.C.T())
		what, inputs = "outputs", "observable"
	} else if g.M() == 0 {
		return nil, errors.New("state feedback needs inputs")
	}
	// Modes the feedback cannot move.
	mt, err := Modes(g)
	if err != nil {
		return nil, err
	}
	var fixed []complex128
	for _, md := range mt.Modes {
		if (!observer && !md.Reachable) || (observer && !md.Observable) {
			fixed = append(fixed, md.Eigenvalue)
		}
	}
	if len(fixed) > 0 {
		return nil, fmt.Errorf("%s %s not %s from the %s, so no gain can move %s; design on the %s part (decompose) and leave %s where %s", plural(len(fixed), "mode"), listValues(fixed), inputs, what, choose(len(fixed) == 1, "it", "them"), inputs, choose(len(fixed) == 1, "it", "them"), choose(len(fixed) == 1, "it is", "they are"))
	}
	req, err := conjugateClosed(poles)
	if err != nil {
		return nil, err
	}
	K, achieved, condX, sweeps, err := knv(A, B, req)
	if err != nil {
		return nil, err
	}
	out := &Assignment{System: g, Observer: observer, Requested: req, Sweeps: sweeps, CondX: condX,
		Method: "robust eigenstructure assignment (Kautsky, Nichols & Van Dooren 1985, method 0)"}
	if B.RawMatrix().Cols == 1 {
		out.Method = "eigenvector method, one input: the gain is unique (Kautsky, Nichols & Van Dooren 1985)"
		if observer {
			out.Method = "eigenvector method, one output: the gain is unique (Kautsky, Nichols & Van Dooren 1985, by duality)"
		}
	}
	if observer {
		out.Gain = mat.DenseCopyOf(K.T())
	} else {
		out.Gain = K
	}
	out.GainNorm = mat.Norm(K, 2)
	out.Achieved = matchOrder(req, achieved)
	for i, r := range req {
		out.MaxError = math.Max(out.MaxError, cmplx.Abs(out.Achieved[i]-r)/math.Max(1, cmplx.Abs(r)))
	}
	return out, nil
}

func choose(ok bool, a, b string) string {
	if ok {
		return a
	}
	return b
}

// conjugateClosed checks that complex poles come in conjugate pairs and
// returns them with each pair exactly conjugate, real ones exactly real.
func conjugateClosed(poles []complex128) ([]complex128, error) {
	out := make([]complex128, len(poles))
	used := make([]bool, len(poles))
	for i, p := range poles {
		tol := AssignTol * math.Max(1, cmplx.Abs(p))
		if math.Abs(imag(p)) <= tol {
			out[i] = complex(real(p), 0)
			used[i] = true
		}
	}
	for i, p := range poles {
		if used[i] {
			continue
		}
		tol := AssignTol * math.Max(1, cmplx.Abs(p))
		found := false
		for j := i + 1; j < len(poles); j++ {
			if !used[j] && cmplx.Abs(poles[j]-cmplx.Conj(p)) <= tol {
				out[i], out[j] = p, cmplx.Conj(p)
				used[i], used[j] = true, true
				found = true
				break
			}
		}
		if !found {
			return nil, fmt.Errorf("the complex pole %s has no conjugate in the list; a real gain places complex poles in pairs a ± bj", fmtComplex(p))
		}
	}
	return out, nil
}

// matchOrder orders achieved like req (greedy nearest match).
func matchOrder(req, got []complex128) []complex128 {
	out := make([]complex128, len(req))
	used := make([]bool, len(got))
	for i, r := range req {
		best, bd := -1, math.Inf(1)
		for j, v := range got {
			if !used[j] && cmplx.Abs(v-r) < bd {
				best, bd = j, cmplx.Abs(v-r)
			}
		}
		if best >= 0 {
			used[best] = true
			out[i] = got[best]
		}
	}
	return out
}

// knv is the method of Assign for A - B K.
func knv(A, B *mat.Dense, poles []complex128) (K *mat.Dense, achieved []complex128, condX float64, sweeps int, err error) {
	n, m := B.Dims()
	var qr mat.QR
	qr.Factorize(B)
	var Q, R mat.Dense
	qr.QTo(&Q)
	qr.RTo(&R)
	Z := mat.DenseCopyOf(R.Slice(0, m, 0, m))
	for i := 0; i < m; i++ {
		if math.Abs(Z.At(i, i)) <= 1e3*2.2e-16*math.Max(1, mat.Norm(B, 2)) {
			return nil, nil, 0, 0, errors.New("the columns of B (the inputs' directions) are linearly dependent; remove the redundant inputs")
		}
	}
	U0 := mat.DenseCopyOf(Q.Slice(0, n, 0, m))
	var U1 *mat.Dense
	if m < n {
		U1 = mat.DenseCopyOf(Q.Slice(0, n, m, n))
	}
	// Repeated poles: count and refuse more than m.
	counts := map[int]int{}
	rep := make([]int, n) // index of the first equal pole
	for i, p := range poles {
		rep[i] = i
		for j := 0; j < i; j++ {
			if cmplx.Abs(poles[j]-p) <= AssignTol*math.Max(1, cmplx.Abs(p)) {
				rep[i] = rep[j]
				break
			}
		}
		counts[rep[i]]++
		if counts[rep[i]] > m {
			return nil, nil, 0, 0, fmt.Errorf("the pole %s is asked for %d times, but with %d input(s) at most %d closed-loop poles may coincide here; spread them a little", fmtComplex(p), counts[rep[i]], m, m)
		}
	}
	// Bases S_j (n x m, complex, orthonormal columns).
	S := make([][][]complex128, n)
	for i, p := range poles {
		if rep[i] != i {
			S[i] = S[rep[i]]
			continue
		}
		if S[i], err = nullBasis(A, U1, p, m); err != nil {
			return nil, nil, 0, 0, err
		}
	}
	// Initial X: the k-th occurrence of a pole takes column k of its basis.
	X := make([][]complex128, n) // columns
	seen := map[int]int{}
	for i := range poles {
		k := seen[rep[i]]
		seen[rep[i]]++
		X[i] = colOf(S[i], k) // poles below the axis: replaced by their partner's conjugate below
		if imag(poles[i]) > 0 && len(S[i]) > 1 {
			// A complex pole's vector must not be real (up to a phase),
			// or it and its conjugate coincide: mix in the next basis
			// vector with a complex weight.
			nx := colOf(S[i], k+1)
			for r := range X[i] {
				X[i][r] += complex(0.5, 0.5) * nx[r]
			}
			nrm := math.Sqrt(real(cdot(X[i], X[i])))
			for r := range X[i] {
				X[i][r] /= complex(nrm, 0)
			}
		}
	}
	partner := make([]int, n)
	for i := range partner {
		partner[i] = -1
	}
	for i, p := range poles {
		if imag(p) > 0 {
			for j := range poles {
				if partner[j] < 0 && j != i && imag(poles[j]) < 0 && cmplx.Abs(poles[j]-cmplx.Conj(p)) <= AssignTol*math.Max(1, cmplx.Abs(p)) {
					partner[i], partner[j] = j, i
					X[j] = conjVec(X[i])
					break
				}
			}
		}
	}
	Xm := cmat(n, X)
	Xinv, ok := cinverse(Xm, n)
	if !ok {
		return nil, nil, 0, 0, errors.New("the closed-loop eigenvectors are dependent for these poles; spread repeated poles a little")
	}
	condX = ccond(Xm, n)
	if m > 1 {
		for sweeps = 1; sweeps <= 30; sweeps++ {
			for j := 0; j < n; j++ {
				if imag(poles[j]) < 0 {
					continue
				}
				// y: orthogonal to every other column (row j of X^-1, conjugated).
				y := make([]complex128, n)
				for k := 0; k < n; k++ {
					y[k] = cmplx.Conj(Xinv[j*n+k])
				}
				xn := projectUnit(S[j], y)
				if xn == nil {
					continue
				}
				replaceColumn(Xm, Xinv, n, j, xn)
				if p := partner[j]; p >= 0 {
					replaceColumn(Xm, Xinv, n, p, conjVec(xn))
				}
			}
			// Refresh the inverse (rank-one updates accumulate rounding).
			if Xinv, ok = cinverse(Xm, n); !ok {
				return nil, nil, 0, 0, errors.New("the eigenvector iteration lost rank; spread repeated poles a little")
			}
			c := ccond(Xm, n)
			done := math.Abs(c-condX) <= 1e-3*condX
			condX = c
			if done {
				break
			}
		}
		if sweeps > 30 {
			sweeps = 30
		}
	}
	// M = X diag(l) X^-1, real up to rounding.
	M := mat.NewDense(n, n, nil)
	for i := 0; i < n; i++ {
		for k := 0; k < n; k++ {
			var v complex128
			for j := 0; j < n; j++ {
				v += Xm[i*n+j] * poles[j] * Xinv[j*n+k]
			}
			M.Set(i, k, real(v))
		}
	}
	AM := mat.DenseCopyOf(A)
	AM.Sub(AM, M)
	rhs := mulT(U0, AM)
	var Kd mat.Dense
	if err := Kd.Solve(Z, rhs); err != nil {
		return nil, nil, 0, 0, err
	}
	Acl := mat.DenseCopyOf(A)
	Acl.Sub(Acl, mul(B, &Kd))
	var eig mat.Eigen
	if !eig.Factorize(Acl, mat.EigenNone) {
		return nil, nil, 0, 0, errors.New("the eigenvalues of the closed loop did not converge")
	}
	return &Kd, eig.Values(nil), condX, sweeps, nil
}

// nullBasis returns an orthonormal basis (m complex columns) of the null
// space of U1^T (A - p I), from the SVD of its real form
// [[Mr, -Mi], [Mi, Mr]], whose null space holds (Re x, Im x) and
// (-Im x, Re x) for every complex null vector x.
func nullBasis(A, U1 *mat.Dense, p complex128, m int) ([][]complex128, error) {
	n, _ := A.Dims()
	if U1 == nil {
		// m == n: every vector is allowed.
		out := make([][]complex128, n)
		for i := range out {
			out[i] = make([]complex128, n)
			out[i][i] = 1
		}
		return out, nil
	}
	Am := mat.DenseCopyOf(A)
	for i := 0; i < n; i++ {
		Am.Set(i, i, Am.At(i, i)-real(p))
	}
	Mr := mulT(U1, Am)            // (n-m) x n
	Mi := mat.DenseCopyOf(U1.T()) // times -Im(p)
	Mi.Scale(-imag(p), Mi)
	k := n - m
	var basis [][]complex128
	if imag(p) == 0 {
		var svd mat.SVD
		if !svd.Factorize(Mr, mat.SVDFull) {
			return nil, errors.New("a singular value decomposition did not converge")
		}
		var V mat.Dense
		svd.VTo(&V)
		for c := k; c < n; c++ {
			col := make([]complex128, n)
			for i := 0; i < n; i++ {
				col[i] = complex(V.At(i, c), 0)
			}
			basis = append(basis, col)
		}
		return basis, nil
	}
	R := blocks([]int{k, k}, []int{n, n}, [][]*mat.Dense{{Mr, scale(-1, Mi)}, {Mi, Mr}})
	var svd mat.SVD
	if !svd.Factorize(R, mat.SVDFull) {
		return nil, errors.New("a singular value decomposition did not converge")
	}
	var V mat.Dense
	svd.VTo(&V)
	for c := 2 * k; c < 2*n; c++ {
		x := make([]complex128, n)
		for i := 0; i < n; i++ {
			x[i] = complex(V.At(i, c), V.At(n+i, c))
		}
		// Gram-Schmidt against the basis so far (twice, for accuracy).
		for pass := 0; pass < 2; pass++ {
			for _, b := range basis {
				d := cdot(b, x)
				for i := range x {
					x[i] -= d * b[i]
				}
			}
		}
		nrm := math.Sqrt(real(cdot(x, x)))
		if nrm > 1e-6 {
			for i := range x {
				x[i] /= complex(nrm, 0)
			}
			basis = append(basis, x)
		}
		if len(basis) == m {
			break
		}
	}
	if len(basis) < m {
		return nil, fmt.Errorf("the pole %s: the allowed eigenvectors could not be found", fmtComplex(p))
	}
	return basis, nil
}

func cdot(a, b []complex128) complex128 { // a^H b
	var s complex128
	for i := range a {
		s += cmplx.Conj(a[i]) * b[i]
	}
	return s
}

func conjVec(v []complex128) []complex128 {
	out := make([]complex128, len(v))
	for i, z := range v {
		out[i] = cmplx.Conj(z)
	}
	return out
}

func colOf(S [][]complex128, k int) []complex128 {
	return append([]complex128(nil), S[k%len(S)]...)
}

// projectUnit returns S S^H y normalized, nil when it vanishes.
func projectUnit(S [][]complex128, y []complex128) []complex128 {
	x := make([]complex128, len(y))
	for _, b := range S {
		d := cdot(b, y)
		for i := range x {
			x[i] += d * b[i]
		}
	}
	nrm := math.Sqrt(real(cdot(x, x)))
	if nrm < 1e-14 {
		return nil
	}
	for i := range x {
		x[i] /= complex(nrm, 0)
	}
	return x
}

// cmat builds a row-major n x n matrix from columns.
func cmat(n int, cols [][]complex128) []complex128 {
	M := make([]complex128, n*n)
	for j, c := range cols {
		for i := 0; i < n; i++ {
			M[i*n+j] = c[i]
		}
	}
	return M
}

// replaceColumn sets column j of X to x and updates X^-1 by the
// Sherman-Morrison formula.
func replaceColumn(X, Xinv []complex128, n, j int, x []complex128) {
	u := make([]complex128, n)
	for i := 0; i < n; i++ {
		u[i] = x[i] - X[i*n+j]
		X[i*n+j] = x[i]
	}
	w := make([]complex128, n) // Xinv u
	for i := 0; i < n; i++ {
		var s complex128
		for k := 0; k < n; k++ {
			s += Xinv[i*n+k] * u[k]
		}
		w[i] = s
	}
	den := 1 + w[j]
	if cmplx.Abs(den) < 1e-12 {
		return // the refresh after the sweep repairs it
	}
	row := append([]complex128(nil), Xinv[j*n:(j+1)*n]...)
	for i := 0; i < n; i++ {
		f := w[i] / den
		for k := 0; k < n; k++ {
			Xinv[i*n+k] -= f * row[k]
		}
	}
}

// cinverse inverts a complex n x n matrix by Gaussian elimination with
// partial pivoting; ok is false when it is singular to working precision.
func cinverse(M []complex128, n int) ([]complex128, bool) {
	a := append([]complex128(nil), M...)
	inv := make([]complex128, n*n)
	for i := 0; i < n; i++ {
		inv[i*n+i] = 1
	}
	scaleM := 0.0
	for _, z := range a {
		scaleM = math.Max(scaleM, cmplx.Abs(z))
	}
	for k := 0; k < n; k++ {
		p := k
		for i := k + 1; i < n; i++ {
			if cmplx.Abs(a[i*n+k]) > cmplx.Abs(a[p*n+k]) {
				p = i
			}
		}
		if cmplx.Abs(a[p*n+k]) <= 1e-14*scaleM {
			return nil, false
		}
		if p != k {
			for j := 0; j < n; j++ {
				a[k*n+j], a[p*n+j] = a[p*n+j], a[k*n+j]
				inv[k*n+j], inv[p*n+j] = inv[p*n+j], inv[k*n+j]
			}
		}
		piv := a[k*n+k]
		for j := 0; j < n; j++ {
			a[k*n+j] /= piv
			inv[k*n+j] /= piv
		}
		for i := 0; i < n; i++ {
			if i == k {
				continue
			}
			f := a[i*n+k]
			if f == 0 {
				continue
			}
			for j := 0; j < n; j++ {
				a[i*n+j] -= f * a[k*n+j]
				inv[i*n+j] -= f * inv[k*n+j]
			}
		}
	}
	return inv, true
}

// ccond is the 2-norm condition number of a complex matrix, from the
// singular values of its real form (each appears twice there).
func ccond(M []complex128, n int) float64 {
	R := mat.NewDense(2*n, 2*n, nil)
	for i := 0; i < n; i++ {
		for j := 0; j < n; j++ {
			z := M[i*n+j]
			R.Set(i, j, real(z))
			R.Set(i, j+n, -imag(z))
			R.Set(i+n, j, imag(z))
			R.Set(i+n, j+n, real(z))
		}
	}
	var svd mat.SVD
	if !svd.Factorize(R, mat.SVDNone) {
		return math.NaN()
	}
	v := svd.Values(nil)
	if v[len(v)-1] == 0 {
		return math.Inf(1)
	}
	return v[0] / v[len(v)-1]
}
