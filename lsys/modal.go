package lsys

import (
	"errors"
	"fmt"
	"math"
	"math/cmplx"

	"gonum.org/v1/gonum/lapack"
	"gonum.org/v1/gonum/lapack/gonum"
	"gonum.org/v1/gonum/mat"
)

// ModalBlock is one diagonal block of a modal form.
type ModalBlock struct {
	Start, Size int          // rows/columns of the block in the modal A
	Values      []complex128 // its eigenvalues, in mode-table order
	// Kind is "real" (1x1), "pair" (2x2 [[sigma, omega], [-omega, sigma]]),
	// or "cluster" (a quasi-triangular block holding eigenvalues that could
	// not be separated safely: defective, nearly so, or too close).
	Kind string
}

// ModalForm is the result of Modal: the system in modal coordinates z = T x.
type ModalForm struct {
	From   *System // the system in its original coordinates
	System *System
	T      *mat.Dense // z = T x
	Tinv   *mat.Dense // x = Tinv z: its columns are the mode shapes
	Blocks []ModalBlock
	// BlockDiagonal is true when the eigenvector basis was refused
	// (defective or ill-conditioned eigenvalues) and the form comes from
	// the ordered Schur form with Sylvester decoupling instead.
	BlockDiagonal bool
	Cond          float64 // condition number of T
	// Residual is the largest entry of the transformed A outside its
	// diagonal blocks (and, for 1x1 and 2x2 blocks, the largest deviation
	// from the exact eigenvalue entries) relative to ||A||_2, before those
	// entries were set exactly: the form is block diagonal by construction,
	// so what is removed is rounding of size u ||A|| cond(T).
	Residual float64
	// CondLimit is the largest condition number of the eigenvector basis
	// accepted; XBound the bound on the decoupling solutions (Bavely &
	// Stewart's growth control).
	CondLimit, XBound float64
	Note              string
}

// ModalCondLimit is the largest condition number of the eigenvector basis
// that Modal accepts before falling back to the block-diagonal form. The
// modal gains of two nearly parallel mode shapes are large and cancel in the
// transfer function, so its error grows like u*cond^2: at 1e4 about eight of
// sixteen digits remain.
const ModalCondLimit = 1e4

// modalXBound bounds the entries of each Sylvester solution in the
// block-diagonal reduction; a larger solution merges the next cluster
// instead (Bavely & Stewart 1979).
const modalXBound = 1e3

// Modal returns the real modal form of s: 1x1 blocks for real eigenvalues
// and 2x2 blocks [[sigma, omega], [-omega, sigma]] for pairs sigma +- j omega,
// so the modes decouple, with T built from the right eigenvectors (each
// mode shape of unit norm; for a pair the real and imaginary parts made
// orthogonal). Blocks follow the mode table's order. When an eigenvalue is
// defective (a Jordan block) or the eigenvector basis has condition number
// above ModalCondLimit, it returns instead the block-diagonal form from
// the ordered real Schur form with Sylvester decoupling, clusters of close
// eigenvalues kept together (Bavely & Stewart 1979, An algorithm for
// computing reducing subspaces by block diagonalization, SIAM J. Numer.
// Anal. 16(2)), and says so in Note.
func Modal(s *System) (*ModalForm, error) {
	if s.N() == 0 {
		return nil, errors.New("a static gain has no modes")
	}
	es, us, err := decisionEigen(s.A)
	if err != nil {
		return nil, err
	}
	js, err := jordanFrom(us.A, es, 0, DefaultRelTol, s.Ts)
	if err != nil {
		return nil, err
	}
	simple := true
	for _, c := range js.Clusters {
		if c.Algebraic > 1 {
			simple = false
		}
	}
	if simple {
		mf, err := modalFromVectors(s, es, js)
		if err == nil && mf.Cond <= ModalCondLimit {
			return mf, nil
		}
		why := "the eigenvector basis is nearly singular"
		if mf != nil {
			why = fmt.Sprintf("the eigenvector basis has condition number %.3g > %.3g", mf.Cond, ModalCondLimit)
		}
		return modalFromSchur(s, js, why)
	}
	why := "some eigenvalues are repeated or defective"
	for _, c := range js.Clusters {
		if c.Defective() {
			why = fmt.Sprintf("the eigenvalue %s is defective (Jordan blocks %v)", fmtComplex(c.Value), c.Blocks)
			break
		}
	}
	return modalFromSchur(s, js, why)
}

func fmtComplex(z complex128) string {
	if imag(z) == 0 {
		return fmt.Sprintf("%.6g", real(z))
	}
	return fmt.Sprintf("%.6g%+.6gj", real(z), imag(z))
}

func modalFromVectors(s *System, es *EigenStructure, js *JordanStructure) (*ModalForm, error) {
	n := s.N()
	V := mat.NewDense(n, n, nil)
	mf := &ModalForm{CondLimit: ModalCondLimit, XBound: modalXBound}
	col := 0
	for _, c := range js.Clusters {
		k := c.idx[0]
		if imag(es.Values[k]) < 0 {
			for _, j := range c.idx {
				if imag(es.Values[j]) > 0 {
					k = j
				}
			}
		}
		v := append([]complex128(nil), es.Right[k]...)
		lam := es.Values[k]
		if imag(lam) == 0 {
			nv := 0.0
			for _, x := range v {
				nv = math.Hypot(nv, real(x))
			}
			for i := 0; i < n; i++ {
				V.Set(i, col, real(v[i])/nv)
			}
			mf.Blocks = append(mf.Blocks, ModalBlock{Start: col, Size: 1, Values: []complex128{lam}, Kind: "real"})
			col++
			continue
		}
		// Rotate v by e^{j phi} so that Re v and Im v are orthogonal with
		// |Re v| >= |Im v|: tan 2 phi = -2 (vr.vi) / (|vr|^2 - |vi|^2).
		var a, cdot float64
		for _, x := range v {
			a += real(x)*real(x) - imag(x)*imag(x)
			cdot += real(x) * imag(x)
		}
		phi := 0.5 * math.Atan2(-2*cdot, a)
		rot := cmplx.Rect(1, phi)
		nv := 0.0
		for i := range v {
			v[i] *= rot
			nv = math.Hypot(nv, cmplx.Abs(v[i]))
		}
		for i := 0; i < n; i++ {
			V.Set(i, col, real(v[i])/nv)
			V.Set(i, col+1, imag(v[i])/nv)
		}
		mf.Blocks = append(mf.Blocks, ModalBlock{Start: col, Size: 2, Values: []complex128{lam, cmplx.Conj(lam)}, Kind: "pair"})
		col += 2
	}
	if col != n {
		return nil, fmt.Errorf("%d columns for %d states", col, n)
	}
	T, cond, err := stInverse(V)
	mf.Cond = cond
	if err != nil {
		return mf, err
	}
	sys, err := transformWith(s, T, V)
	if err != nil {
		return nil, err
	}
	// Write the exact block values: the eigenvalues are known to full
	// accuracy and the off-block entries are rounding noise of size
	// u*||A||*cond.
	mf.Residual = modalClean(sys.A, mf.Blocks, mat.Norm(s.A, 2), true)
	sys.StateNames = modalNames(mf.Blocks)
	mf.System, mf.T, mf.Tinv, mf.From = sys, T, V, s
	mf.Note = fmt.Sprintf("real modal form from the eigenvectors (condition number of T %.3g); entries outside the blocks, at most %.3g relative to ||A|| (rounding), set to 0 and the blocks to the exact eigenvalues", cond, mf.Residual)
	return mf, nil
}

func modalNames(blocks []ModalBlock) []string {
	var out []string
	for i, b := range blocks {
		switch {
		case b.Size == 1:
			out = append(out, fmt.Sprintf("q%d", i+1))
		case b.Kind == "pair":
			out = append(out, fmt.Sprintf("q%da", i+1), fmt.Sprintf("q%db", i+1))
		default:
			for j := 0; j < b.Size; j++ {
				out = append(out, fmt.Sprintf("q%d_%d", i+1, j+1))
			}
		}
	}
	return out
}

// modalFromSchur builds the block-diagonal form: reorder the real Schur form
// so that clusters are contiguous in mode-table order, then decouple block
// after block by solving T11 X - X T22 = -T12, merging the next cluster into
// the current block whenever the solution would exceed modalXBound.
func modalFromSchur(s *System, js *JordanStructure, why string) (*ModalForm, error) {
	n := s.N()
	sf, err := Schur(s.A)
	if err != nil {
		return nil, err
	}
	impl := gonum.Implementation{}
	tr, zr := sf.T.RawMatrix(), sf.Z.RawMatrix()
	work := make([]float64, n)
	// Cluster of a Schur block: the nearest cluster value.
	clusterOf := func(v complex128) int {
		best, bi := math.Inf(1), 0
		for i, c := range js.Clusters {
			for _, w := range []complex128{c.Value, cmplx.Conj(c.Value)} {
				if d := cmplx.Abs(v - w); d < best {
					best, bi = d, i
				}
			}
		}
		return bi
	}
	var bounds []int // start of each cluster in the reordered T
	ks := 0
	for ci := range js.Clusters {
		bounds = append(bounds, ks)
		for i := ks; i < n; {
			size := 1
			if i+1 < n && sf.T.At(i+1, i) != 0 {
				size = 2
			}
			if clusterOf(schurBlockValue(sf.T, i)) == ci {
				if i != ks {
					_, _, ok := impl.Dtrexc(lapack.UpdateSchur, n, tr.Data, tr.Stride, zr.Data, zr.Stride, i, ks, work)
					if !ok {
						return nil, errors.New("reordering the Schur form failed; eigenvalues too close to separate")
					}
				}
				ks += size
			}
			i += size
		}
	}
	bounds = append(bounds, n)
	T := sf.T
	W := mat.DenseCopyOf(sf.Z) // x = W z
	var starts []int
	s0 := 0
	g := 1
	for s0 < n {
		e := bounds[g]
		for {
			if e == n {
				break
			}
			T11 := mat.DenseCopyOf(T.Slice(s0, e, s0, e))
			T22 := mat.DenseCopyOf(T.Slice(e, n, e, n))
			C := mat.DenseCopyOf(T.Slice(s0, e, e, n))
			C.Scale(-1, C)
			X, ok := solveQuasiSylvester(T11, T22, C)
			if ok && maxAbs(X) <= modalXBound {
				// T <- Y^-1 T Y, W <- W Y with Y = [[I, X], [0, I]].
				T.Slice(s0, e, e, n).(*mat.Dense).Zero()
				var wx mat.Dense
				wx.Mul(W.Slice(0, n, s0, e), X)
				wsub := W.Slice(0, n, e, n).(*mat.Dense)
				wsub.Add(wsub, &wx)
				// Rows above s0 mix too: T[0:s0, e:n] += T[0:s0, s0:e] X.
				if s0 > 0 {
					var tx mat.Dense
					tx.Mul(T.Slice(0, s0, s0, e), X)
					tsub := T.Slice(0, s0, e, n).(*mat.Dense)
					tsub.Add(tsub, &tx)
				}
				break
			}
			g++
			e = bounds[g]
		}
		starts = append(starts, s0)
		s0 = e
		g++
		if g >= len(bounds) {
			g = len(bounds) - 1
		}
	}
	starts = append(starts, n)
	mf := &ModalForm{BlockDiagonal: true, CondLimit: ModalCondLimit, XBound: modalXBound}
	for b := 0; b+1 < len(starts); b++ {
		a, e := starts[b], starts[b+1]
		blk := ModalBlock{Start: a, Size: e - a, Kind: "cluster"}
		for i := a; i < e; {
			v := schurBlockValue(T, i)
			if imag(v) != 0 {
				blk.Values = append(blk.Values, v, cmplx.Conj(v))
				i += 2
			} else {
				blk.Values = append(blk.Values, v)
				i++
			}
		}
		switch {
		case e-a == 1:
			blk.Kind = "real"
		case e-a == 2 && imag(blk.Values[0]) != 0:
			// Standardise [[a, b], [c, a]] (b c < 0) to [[a, w], [-w, a]]
			// by a diagonal scaling of the second coordinate.
			bb, cc := T.At(a, a+1), T.At(a+1, a)
			w := math.Sqrt(math.Abs(bb * cc))
			d := w / bb
			T.Set(a, a+1, w)
			T.Set(a+1, a, -w)
			for i := 0; i < n; i++ {
				W.Set(i, a+1, W.At(i, a+1)*d)
			}
			for j := e; j < n; j++ {
				T.Set(a+1, j, T.At(a+1, j)/d)
			}
			for i := 0; i < a; i++ {
				T.Set(i, a+1, T.At(i, a+1)*d)
			}
			blk.Kind = "pair"
		}
		mf.Blocks = append(mf.Blocks, blk)
	}
	Tm, cond, err := stInverse(W)
	if err != nil {
		return nil, fmt.Errorf("%v", err)
	}
	sys, err := transformWith(s, Tm, W)
	if err != nil {
		return nil, err
	}
	mf.Residual = modalClean(sys.A, mf.Blocks, mat.Norm(s.A, 2), false)
	sys.StateNames = modalNames(mf.Blocks)
	mf.System, mf.T, mf.Tinv, mf.Cond, mf.From = sys, Tm, W, cond, s
	nc := 0
	for _, b := range mf.Blocks {
		if b.Kind == "cluster" {
			nc++
		}
	}
	mf.Note = fmt.Sprintf("block-diagonal form from the ordered real Schur form with Sylvester decoupling, because %s; %d %s kept together as quasi-triangular blocks (decoupling solutions bounded by %.3g; condition number of T %.3g); entries outside the blocks, at most %.3g relative to ||A|| (rounding), set to 0",
		why, nc, map[bool]string{true: "cluster", false: "clusters"}[nc == 1], modalXBound, cond, mf.Residual)
	return mf, nil
}

func maxAbs(a *mat.Dense) float64 {
	r, c := a.Dims()
	m := 0.0
	for i := 0; i < r; i++ {
		for j := 0; j < c; j++ {
			m = math.Max(m, math.Abs(a.At(i, j)))
		}
	}
	return m
}

// solveQuasiSylvester solves A X - X B = C for upper quasi-triangular A
// (p x p) and B (q x q) in real Schur form by block back substitution
// (Bartels & Stewart 1972, Solution of the matrix equation AX + XB = C,
// Comm. ACM 15(9)), each 1x1/2x2 block pair by gonum's Dlasy2. ok is false
// when A and B share an eigenvalue (a block system was perturbed to be
// solved, so X is not to be trusted).
func solveQuasiSylvester(A, B, C *mat.Dense) (*mat.Dense, bool) {
	p, _ := A.Dims()
	q, _ := B.Dims()
	impl := gonum.Implementation{}
	X := mat.NewDense(p, q, nil)
	ab := schurBlocks(A)
	bb := schurBlocks(B)
	size := func(starts []int, i, n int) int {
		if i+1 < len(starts) {
			return starts[i+1] - starts[i]
		}
		return n - starts[i]
	}
	okAll := true
	for l := 0; l < len(bb); l++ {
		l0, n2 := bb[l], size(bb, l, q)
		for k := len(ab) - 1; k >= 0; k-- {
			k0, n1 := ab[k], size(ab, k, p)
			rhs := make([]float64, 4)
			for i := 0; i < n1; i++ {
				for j := 0; j < n2; j++ {
					v := C.At(k0+i, l0+j)
					for t := k0 + n1; t < p; t++ {
						v -= A.At(k0+i, t) * X.At(t, l0+j)
					}
					for t := 0; t < l0; t++ {
						v += X.At(k0+i, t) * B.At(t, l0+j)
					}
					rhs[i*2+j] = v
				}
			}
			tl := make([]float64, 4)
			trr := make([]float64, 4)
			for i := 0; i < n1; i++ {
				for j := 0; j < n1; j++ {
					tl[i*2+j] = A.At(k0+i, k0+j)
				}
			}
			for i := 0; i < n2; i++ {
				for j := 0; j < n2; j++ {
					trr[i*2+j] = B.At(l0+i, l0+j)
				}
			}
			x := make([]float64, 4)
			scale, _, ok := impl.Dlasy2(false, false, -1, n1, n2, tl, 2, trr, 2, rhs, 2, x, 2)
			if !ok {
				okAll = false
			}
			for i := 0; i < n1; i++ {
				for j := 0; j < n2; j++ {
					X.Set(k0+i, l0+j, x[i*2+j]/scale)
				}
			}
		}
	}
	return X, okAll
}

// modalClean sets the entries of the modal A outside its diagonal blocks to
// zero and, when exact is set, writes 1x1 and 2x2 blocks from their
// eigenvalues ([[sigma, omega], [-omega, sigma]]); it returns the largest
// change relative to normA.
func modalClean(A *mat.Dense, blocks []ModalBlock, normA float64, exact bool) float64 {
	n, _ := A.Dims()
	block := make([]int, n)
	for b, blk := range blocks {
		for i := blk.Start; i < blk.Start+blk.Size; i++ {
			block[i] = b
		}
	}
	worst := 0.0
	set := func(i, j int, v float64) {
		worst = math.Max(worst, math.Abs(A.At(i, j)-v))
		A.Set(i, j, v)
	}
	for i := 0; i < n; i++ {
		for j := 0; j < n; j++ {
			if block[i] != block[j] {
				set(i, j, 0)
			}
		}
	}
	if exact {
		for _, blk := range blocks {
			k := blk.Start
			switch blk.Kind {
			case "real":
				set(k, k, real(blk.Values[0]))
			case "pair":
				sg, om := real(blk.Values[0]), imag(blk.Values[0])
				set(k, k, sg)
				set(k, k+1, om)
				set(k+1, k, -om)
				set(k+1, k+1, sg)
			}
		}
	}
	if normA == 0 {
		return worst
	}
	return worst / normA
}
