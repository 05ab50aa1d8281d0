package lsys

import (
	"errors"
	"fmt"
	"math"
	"math/cmplx"

	"gonum.org/v1/gonum/mat"
)

// Gramians are the reachability gramian P and the observability gramian Q
// of a stable system,
//
//	A P + P A^T + B B^T = 0,   A^T Q + Q A + C^T C = 0      (continuous)
//	A P A^T - P + B B^T = 0,   A^T Q A - Q + C^T C = 0      (sampled)
//
// solved by Bartels & Stewart (LyapunovEq), with Cholesky factors
// P = Lc Lc^T and Q = Lo Lo^T computed directly by Hammarling's method
// (LyapunovFactor) and the Hankel singular values sqrt(eig(P Q)) as the
// singular values of Lo^T Lc (never from the product P Q, which squares
// their spread).
type Gramians struct {
	System *System
	P, Q   *mat.Dense
	Lc, Lo *mat.Dense
	// HSV are the Hankel singular values, largest first.
	HSV []float64
	// CondP and CondQ are the 2-norm condition numbers of P and Q (+Inf
	// when singular): large values mean states that are hard to reach or
	// to see.
	CondP, CondQ float64
	// ResidualP and ResidualQ are the backward errors of the two Lyapunov
	// solutions (see LyapunovSolution.Residual).
	ResidualP, ResidualQ float64
	// Indefinite is the most negative eigenvalue of P or Q relative to
	// its largest: rounding residue (set to zero in the factors) unless it
	// is well above 1e-12.
	Indefinite float64
}

// GramiansOf computes the gramians of a stable system. An unstable or
// marginally stable system has no finite gramians: the error says which
// modes are the reason.
func GramiansOf(g *System) (*Gramians, error) {
	if g.N() == 0 {
		return nil, errors.New("the system has no states, so it has no gramians")
	}
	if err := needStable(g, "gramians"); err != nil {
		return nil, err
	}
	B, C := g.B, g.C
	if B == nil {
		B = mat.NewDense(g.N(), 1, nil)
	}
	if C == nil {
		C = mat.NewDense(1, g.N(), nil)
	}
	var BB, CC mat.Dense
	BB.Mul(B, B.T())
	CC.Mul(C.T(), C)
	sp, err := LyapunovEq(g.A, &BB, g.Sampled())
	if err != nil {
		return nil, err
	}
	sq, err := LyapunovEq(mat.DenseCopyOf(g.A.T()), &CC, g.Sampled())
	if err != nil {
		return nil, err
	}
	out := &Gramians{System: g, P: sp.X, Q: sq.X, ResidualP: sp.Residual, ResidualQ: sq.Residual}
	// The factors by Hammarling's method, straight from A, B and C, so
	// that small Hankel singular values keep their accuracy.
	if out.Lc, err = LyapunovFactor(g.A, B, g.Sampled()); err != nil {
		return nil, err
	}
	if out.Lo, err = LyapunovFactor(mat.DenseCopyOf(g.A.T()), mat.DenseCopyOf(C.T()), g.Sampled()); err != nil {
		return nil, err
	}
	_, negP, err := psdFactor(sp.X)
	if err != nil {
		return nil, err
	}
	_, negQ, err := psdFactor(sq.X)
	if err != nil {
		return nil, err
	}
	out.Indefinite = math.Max(negP, negQ)
	out.CondP = symCond(sp.X)
	out.CondQ = symCond(sq.X)
	var M mat.Dense
	M.Mul(out.Lo.T(), out.Lc)
	var svd mat.SVD
	if !svd.Factorize(&M, mat.SVDNone) {
		return nil, errors.New("the singular value decomposition of the gramian factors did not converge")
	}
	out.HSV = svd.Values(nil)
	return out, nil
}

// symCond is the 2-norm condition number of a symmetric semidefinite
// matrix (+Inf when its smallest eigenvalue is not positive).
func symCond(X *mat.Dense) float64 {
	n, _ := X.Dims()
	sym := mat.NewSymDense(n, nil)
	for i := 0; i < n; i++ {
		for j := i; j < n; j++ {
			sym.SetSym(i, j, (X.At(i, j)+X.At(j, i))/2)
		}
	}
	var es mat.EigenSym
	if !es.Factorize(sym, false) {
		return math.NaN()
	}
	v := es.Values(nil)
	if v[0] <= 0 {
		return math.Inf(1)
	}
	return v[n-1] / v[0]
}

// needStable returns an error naming the modes that are not strictly
// stable (the house boundary tolerance of StabilityOf decides).
func needStable(g *System, what string) error {
	st, err := StabilityOf(g)
	if err != nil {
		return err
	}
	if st.Stable {
		return nil
	}
	vals, err := Poles(g)
	if err != nil {
		return err
	}
	var bad []complex128
	for _, v := range vals {
		if !strictlyStable(v, g.Ts, st.Tol) && imag(v) >= 0 {
			bad = append(bad, v)
		}
	}
	where := "in the right half plane or on the imaginary axis"
	if g.Sampled() {
		where = "on or outside the unit circle"
	}
	return fmt.Errorf("%s needs a stable system, but %s %s %s; split off the unstable part first (reduce keeps it whole), or stabilize the system with feedback", what, plural(len(bad), "mode"), listValues(bad), where)
}

func plural(n int, what string) string {
	if n == 1 {
		return "1 " + what + " is"
	}
	return fmt.Sprintf("%d %ss are", n, what)
}

func listValues(v []complex128) string {
	s := ""
	for i, z := range v {
		if i == 6 {
			s += fmt.Sprintf(", ... (%d more)", len(v)-6)
			break
		}
		if i > 0 {
			s += ", "
		}
		s += fmtComplex(z)
	}
	return "(" + s + ")"
}

func strictlyStable(v complex128, ts, tol float64) bool {
	if ts > 0 {
		return cmplx.Abs(v) < 1-tol
	}
	return real(v) < -tol
}

// Balanced is a balanced realization (Moore 1981, "Principal component
// analysis in linear systems", IEEE TAC 26(1)) by the square-root method
// (Laub, Heath, Paige & Ward 1987, "Computation of system balancing
// transformations", IEEE TAC 32(2); Tombs & Postlethwaite 1987): with
// Lo^T Lc = U S V^T, the new states are xb = T x with
// T = S^(-1/2) U^T Lo^T and T^-1 = Lc V S^(-1/2); both gramians of the
// balanced system equal diag(S).
type Balanced struct {
	System    *System // the balanced system
	T, Tinv   *mat.Dense
	HSV       []float64
	Gramians  *Gramians
	CondT     float64 // 2-norm condition number of T
	Deviation float64 // max |P_b - S|, |Q_b - S| relative to S_1: the balancing achieved
}

// hsvTol is the relative size below which a Hankel singular value counts
// as zero (a state that is unreachable or unobservable to working
// precision): n u times the largest, with u = 2.2e-16 and a factor 10
// for the two Lyapunov solutions behind it.
func hsvTol(hsv []float64) float64 {
	if len(hsv) == 0 {
		return 0
	}
	return 10 * float64(len(hsv)) * 2.2e-16 * hsv[0]
}

// BalancedOf balances a stable minimal system. A Hankel singular value
// below hsvTol means a state that does not matter at all (nonminimal):
// balancing would divide by it, so the error says to reduce instead.
func BalancedOf(g *System) (*Balanced, error) {
	gr, err := GramiansOf(g)
	if err != nil {
		return nil, err
	}
	k := 0
	tol := hsvTol(gr.HSV)
	for _, s := range gr.HSV {
		if s > tol {
			k++
		}
	}
	if k < g.N() {
		return nil, fmt.Errorf("the system is not minimal: %d of its %d Hankel singular values are below %.3g (n u times the largest), so %d states are not reachable or not observable; reduce(G, order: %d) removes them", g.N()-k, g.N(), tol, g.N()-k, k)
	}
	b, err := balanceOrder(g, gr, k)
	if err != nil {
		return nil, err
	}
	return b, nil
}

// balanceOrder returns the balanced realization of the k states with the
// largest Hankel singular values (k = n: all of it) — the square-root
// truncation; names the states b1..bk.
func balanceOrder(g *System, gr *Gramians, k int) (*Balanced, error) {
	var M mat.Dense
	M.Mul(gr.Lo.T(), gr.Lc)
	var svd mat.SVD
	if !svd.Factorize(&M, mat.SVDFull) {
		return nil, errors.New("the singular value decomposition of the gramian factors did not converge")
	}
	var U, V mat.Dense
	svd.UTo(&U)
	svd.VTo(&V)
	s := svd.Values(nil)
	n := g.N()
	T := mat.NewDense(k, n, nil)
	Ti := mat.NewDense(n, k, nil)
	var LoU, LcV mat.Dense
	LoU.Mul(gr.Lo, U.Slice(0, n, 0, k))
	LcV.Mul(gr.Lc, V.Slice(0, n, 0, k))
	for j := 0; j < k; j++ {
		f := 1 / math.Sqrt(s[j])
		for i := 0; i < n; i++ {
			T.Set(j, i, LoU.At(i, j)*f)
			Ti.Set(i, j, LcV.At(i, j)*f)
		}
	}
	A := mul(mul(T, g.A), Ti)
	var B, C *mat.Dense
	if g.M() > 0 {
		B = mul(T, g.B)
	}
	if g.P() > 0 {
		C = mul(g.C, Ti)
	}
	bs, err := NewSystem(k, g.M(), g.P(), A, B, C, g.D, g.Ts)
	if err != nil {
		return nil, err
	}
	bs.StateNames = defaultNames("b", k)
	bs.InputNames = append([]string(nil), g.InputNames...)
	bs.OutputNames = append([]string(nil), g.OutputNames...)
	out := &Balanced{System: bs, T: T, Tinv: Ti, HSV: s[:k], Gramians: gr}
	if k == n {
		var tsvd mat.SVD
		if tsvd.Factorize(T, mat.SVDNone) {
			v := tsvd.Values(nil)
			out.CondT = v[0] / v[len(v)-1]
		}
		// How balanced the result is: gramians of the balanced system.
		if bg, err := GramiansOf(bs); err == nil {
			dev := 0.0
			for i := 0; i < k; i++ {
				for j := 0; j < k; j++ {
					want := 0.0
					if i == j {
						want = s[i]
					}
					dev = math.Max(dev, math.Max(math.Abs(bg.P.At(i, j)-want), math.Abs(bg.Q.At(i, j)-want)))
				}
			}
			out.Deviation = dev / s[0]
		}
	}
	return out, nil
}

// HankelValues are the Hankel singular values of a system's stable part.
type HankelValues struct {
	System *System
	HSV    []float64 // of the stable part, largest first
	// Unstable is the number of modes outside the stable region; they have
	// no Hankel singular value (their energy is unbounded).
	Unstable int
	Tol      float64 // below this a value counts as zero (hsvTol)
}

// Hankel returns the Hankel singular values of g's stable part (the whole
// of g when g is stable; see SplitStable).
func Hankel(g *System) (*HankelValues, error) {
	if g.N() == 0 {
		return nil, errors.New("the system has no states, so it has no Hankel singular values")
	}
	sp, err := SplitStable(g)
	if err != nil {
		return nil, err
	}
	out := &HankelValues{System: g, Unstable: sp.Unstable.N()}
	if sp.Stable.N() > 0 {
		gr, err := GramiansOf(sp.Stable)
		if err != nil {
			return nil, err
		}
		out.HSV = gr.HSV
		out.Tol = hsvTol(gr.HSV)
	}
	return out, nil
}

// Split is an additive decomposition G = Stable + Unstable.
type Split struct {
	Stable, Unstable *System // Stable carries D; Unstable has D = 0
	// CondX is 1 + ||X||_F of the Sylvester solution that decouples the
	// parts: a large value means stable and unstable modes lie close
	// together and the split is sensitive.
	CondX float64
}

// SplitStable decomposes g additively into its stable part and the rest
// (modes on or beyond the stability boundary, within the boundary
// tolerance of StabilityOf): an ordered real Schur form A = Z T Z^T with
// the stable eigenvalues first (Bai & Demmel 1993, Dtrexc), then the
// Sylvester equation T11 X - X T22 + T12 = 0 (Bartels & Stewart) removes
// the coupling block (block diagonalization, common practice).
func SplitStable(g *System) (*Split, error) {
	n, m, p := g.N(), g.M(), g.P()
	st, err := StabilityOf(g)
	if err != nil {
		return nil, err
	}
	if st.Stable {
		return &Split{Stable: g, Unstable: emptyLike(g), CondX: 1}, nil
	}
	sf, err := Schur(g.A)
	if err != nil {
		return nil, err
	}
	k, err := sf.Reorder(func(v complex128) bool { return strictlyStable(v, g.Ts, st.Tol) })
	if err != nil {
		return nil, err
	}
	T, Z := sf.T, sf.Z
	T11 := mat.DenseCopyOf(T.Slice(0, k, 0, k))
	T12 := mat.DenseCopyOf(T.Slice(0, k, k, n))
	T22 := mat.DenseCopyOf(T.Slice(k, n, k, n))
	X := mat.NewDense(max(k, 1), max(n-k, 1), nil)
	cond := 1.0
	if k > 0 {
		var mT22, mT12 mat.Dense
		mT22.Scale(-1, T22)
		mT12.Scale(-1, T12)
		sol, err := SylvesterEq(T11, &mT22, &mT12, false)
		if err != nil {
			return nil, err
		}
		if sol.Singular {
			return nil, errors.New("the stable and unstable parts could not be separated: modes on both sides of the boundary coincide to working precision")
		}
		X = sol.X
		cond = 1 + mat.Norm(X, 2)
	}
	var ZB, CZ *mat.Dense
	if m > 0 {
		ZB = mulT(Z, g.B)
	}
	if p > 0 {
		CZ = mul(g.C, Z)
	}
	mk := func(A, B, C, D *mat.Dense, nn int, names []string) (*System, error) {
		s, err := NewSystem(nn, m, p, A, B, C, D, g.Ts)
		if err != nil {
			return nil, err
		}
		s.StateNames = names
		s.InputNames = append([]string(nil), g.InputNames...)
		s.OutputNames = append([]string(nil), g.OutputNames...)
		return s, nil
	}
	var Bs, Bu, Cs, Cu *mat.Dense
	if m > 0 && k > 0 {
		Bs = mat.DenseCopyOf(ZB.Slice(0, k, 0, m))
		Bs.Sub(Bs, mul(X, mat.DenseCopyOf(ZB.Slice(k, n, 0, m))))
	}
	if m > 0 {
		Bu = mat.DenseCopyOf(ZB.Slice(k, n, 0, m))
	}
	if p > 0 && k > 0 {
		Cs = mat.DenseCopyOf(CZ.Slice(0, p, 0, k))
	}
	if p > 0 {
		Cu = mat.DenseCopyOf(CZ.Slice(0, p, k, n))
		if k > 0 {
			Cu.Add(Cu, mul(Cs, X))
		}
	}
	var As *mat.Dense
	if k > 0 {
		As = T11
	}
	gs, err := mk(As, Bs, Cs, g.D, k, defaultNames("s", k))
	if err != nil {
		return nil, err
	}
	gu, err := mk(T22, Bu, Cu, nil, n-k, defaultNames("u", n-k))
	if err != nil {
		return nil, err
	}
	gu.StateNames = defaultNames("xu", n-k)
	gs.StateNames = defaultNames("xs", k)
	return &Split{Stable: gs, Unstable: gu, CondX: cond}, nil
}

func emptyLike(g *System) *System {
	s, _ := NewSystem(0, g.M(), g.P(), nil, nil, nil, nil, g.Ts)
	s.InputNames = append([]string(nil), g.InputNames...)
	s.OutputNames = append([]string(nil), g.OutputNames...)
	return s
}
