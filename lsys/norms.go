package lsys

import (
	"errors"
	"fmt"
	"math"
	"math/cmplx"

	"gonum.org/v1/gonum/mat"
)

// Norm is a system norm: the H2 norm (the RMS of the outputs under unit
// white noise on every input) or the H-infinity norm (the largest gain
// over all frequencies, the peak of the largest singular value).
type Norm struct {
	System *System
	Kind   string  // "2" or "inf"
	Value  float64 // +Inf when the norm is infinite (Reason says why)
	// Peak is the frequency (rad/s) where the H-infinity norm is reached;
	// +Inf when it is reached at infinite frequency (the feedthrough D),
	// NaN for the H2 norm.
	Peak float64
	// Lower and Upper bracket the H-infinity norm: Lower is a gain
	// actually reached (at Peak); Upper is certified by the Hamiltonian
	// test having no eigenvalue on the imaginary axis. Their relative gap
	// is at most Tol.
	Lower, Upper float64
	Tol          float64
	Iterations   int
	// Certified is false when the iteration stopped on eigenvalues near
	// the imaginary axis that no longer raised the gain (rounding level):
	// Upper is then not proven.
	Certified bool
	Reason    string // why the norm is infinite; "" otherwise
	Method    string
}

// H2Norm returns the H2 norm sqrt(trace(C P C^T)) with P the reachability
// gramian (sampled: sqrt(trace(C P C^T + D D^T))). A continuous system with
// feedthrough (D != 0) or an unstable system has an infinite H2 norm; the
// result says so with the reason.
func H2Norm(g *System) (*Norm, error) {
	out := &Norm{System: g, Kind: "2", Peak: math.NaN(), Lower: math.NaN(), Upper: math.NaN(),
		Method: "from the reachability gramian (Lyapunov equation, Bartels & Stewart)"}
	if !g.Sampled() && g.D != nil && maxAbs(g.D) != 0 {
		out.Value = math.Inf(1)
		out.Reason = "the feedthrough D is not zero: white noise passes straight to the outputs, whose variance is then infinite; add a roll-off (a filter) or use the sampled model"
		return out, nil
	}
	if g.N() == 0 {
		if g.D != nil {
			out.Value = mat.Norm(g.D, 2)
		}
		return out, nil
	}
	if err := needStable(g, "the H2 norm"); err != nil {
		out.Value = math.Inf(1)
		out.Reason = err.Error()
		return out, nil
	}
	v, err := outputVariance(g, nil)
	if err != nil {
		return nil, err
	}
	tr := 0.0
	for i := 0; i < g.P(); i++ {
		tr += v.At(i, i)
	}
	out.Value = math.Sqrt(math.Max(tr, 0))
	return out, nil
}

// outputVariance returns C P C^T (+ D W D^T when sampled) with
// A P + P A^T + B W B^T = 0 (sampled: A P A^T - P + B W B^T = 0); W nil
// means the identity.
func outputVariance(g *System, W *mat.Dense) (*mat.Dense, error) {
	BW := g.B
	if W != nil {
		BW = mul(g.B, W)
	}
	var Q mat.Dense
	Q.Mul(BW, g.B.T())
	sol, err := LyapunovEq(g.A, &Q, g.Sampled())
	if err != nil {
		return nil, err
	}
	Y := mul(mul(g.C, sol.X), mat.DenseCopyOf(g.C.T()))
	if g.Sampled() && g.D != nil {
		DW := g.D
		if W != nil {
			DW = mul(g.D, W)
		}
		Y.Add(Y, mul(DW, mat.DenseCopyOf(g.D.T())))
	}
	return Y, nil
}

// HinfTol is the relative accuracy of the H-infinity norm: the iteration
// stops when the certified upper bound is within this of a gain reached.
const HinfTol = 1e-9

// HinfNorm returns the H-infinity norm by the Hamiltonian iteration of
// Boyd, Balakrishnan & Kabamba (1989, "A bisection method for computing the
// H-infinity norm of a transfer matrix", Math. Control Signals Systems 2)
// in the quadratically convergent form of Boyd & Balakrishnan (1990, Systems
// & Control Letters 15) and Bruinsma & Steinbuch (1990, "A fast algorithm
// to compute the H-infinity norm of a transfer function matrix", Systems &
// Control Letters 14): gamma is a singular value of G(jw) exactly when jw
// is an eigenvalue of the Hamiltonian matrix
//
//	H = [[A + B R^-1 D^T C,  B R^-1 B^T], [-C^T (I + D R^-1 D^T) C, -(A + B R^-1 D^T C)^T]]
//
// with R = gamma^2 I - D^T D. Starting from the gain at 0, at infinity and
// at the natural frequencies of the least damped poles, each step takes
// gamma = (1 + 2 Tol) times the best gain so far, finds the imaginary-axis
// eigenvalues of H, and evaluates the gain at the geometric midpoints of
// the intervals they bound; when H has none, gamma is an upper bound.
// A sampled system is mapped to continuous time by the bilinear transform
// z = (1 + s)/(1 - s), which keeps the norm; its frequencies map back by
// w = 2 atan(v)/Ts. An unstable system has an infinite norm (the reason is
// given).
func HinfNorm(g *System) (*Norm, error) {
	out := &Norm{System: g, Kind: "inf", Tol: HinfTol, Method: "Hamiltonian iteration (Boyd & Balakrishnan 1990; Bruinsma & Steinbuch 1990)"}
	if g.M() == 0 || g.P() == 0 {
		return out, nil
	}
	if g.N() == 0 {
		out.Value = maxSingular(g.D)
		out.Lower, out.Upper, out.Peak, out.Certified = out.Value, out.Value, 0, true
		return out, nil
	}
	if err := needStable(g, "the H-infinity norm"); err != nil {
		out.Value = math.Inf(1)
		out.Lower, out.Upper, out.Peak = math.Inf(1), math.Inf(1), math.NaN()
		out.Reason = err.Error()
		return out, nil
	}
	c := g
	if g.Sampled() {
		var err error
		if c, err = bilinearToContinuous(g); err != nil {
			return nil, err
		}
	}
	lo, at, upper, it, cert, err := hinfContinuous(c)
	if err != nil {
		return nil, err
	}
	if g.Sampled() && !math.IsInf(at, 1) {
		at = 2 * math.Atan(at) / g.Ts
	} else if g.Sampled() {
		at = math.Pi / g.Ts
	}
	out.Value, out.Lower, out.Upper, out.Peak, out.Iterations, out.Certified = lo, lo, upper, at, it, cert
	return out, nil
}

// bilinearToContinuous maps a sampled system by z = (1 + s)/(1 - s):
// Ac = (A + I)^-1 (A - I), Bc = sqrt2 (A + I)^-1 B, Cc = sqrt2 C (A + I)^-1,
// Dc = D - C (A + I)^-1 B. The gain at z = e^{j theta} equals the gain at
// s = j tan(theta/2). Stable systems have no eigenvalue at -1.
func bilinearToContinuous(g *System) (*System, error) {
	n := g.N()
	ApI := mat.DenseCopyOf(g.A)
	for i := 0; i < n; i++ {
		ApI.Set(i, i, ApI.At(i, i)+1)
	}
	var lu mat.LU
	lu.Factorize(ApI)
	if lu.Det() == 0 {
		return nil, errors.New("the bilinear map needs A without an eigenvalue at -1")
	}
	AmI := mat.DenseCopyOf(g.A)
	for i := 0; i < n; i++ {
		AmI.Set(i, i, AmI.At(i, i)-1)
	}
	var Ac, Bc, CcT mat.Dense
	if err := lu.SolveTo(&Ac, false, AmI); err != nil {
		return nil, fmt.Errorf("bilinear map: %w", err)
	}
	if err := lu.SolveTo(&Bc, false, g.B); err != nil {
		return nil, fmt.Errorf("bilinear map: %w", err)
	}
	// Cc^T = (A + I)^-T C^T.
	if err := lu.SolveTo(&CcT, true, mat.DenseCopyOf(g.C.T())); err != nil {
		return nil, fmt.Errorf("bilinear map: %w", err)
	}
	Dc := mat.DenseCopyOf(g.D)
	Dc.Sub(Dc, mul(g.C, &Bc))
	Bc.Scale(math.Sqrt2, &Bc)
	Cc := mat.DenseCopyOf(CcT.T())
	Cc.Scale(math.Sqrt2, Cc)
	return NewSystem(n, g.M(), g.P(), &Ac, &Bc, Cc, Dc, 0)
}

func maxSingular(M *mat.Dense) float64 {
	if M == nil {
		return 0
	}
	var svd mat.SVD
	if !svd.Factorize(M, mat.SVDNone) {
		return math.NaN()
	}
	return svd.Values(nil)[0]
}

// gainNorm is the largest singular value of the complex p x m matrix G
// (row-major), from the real form [[Re, -Im], [Im, Re]], whose singular
// values are those of G, each twice.
func gainNorm(G []complex128, p, m int) float64 {
	R := mat.NewDense(2*p, 2*m, nil)
	for i := 0; i < p; i++ {
		for j := 0; j < m; j++ {
			z := G[i*m+j]
			R.Set(i, j, real(z))
			R.Set(i, j+m, -imag(z))
			R.Set(i+p, j, imag(z))
			R.Set(i+p, j+m, real(z))
		}
	}
	return maxSingular(R)
}

// hinfContinuous is the iteration of HinfNorm for a stable continuous
// system: the best gain found, its frequency, the certified upper bound
// and the number of Hamiltonian eigenvalue problems solved.
func hinfContinuous(g *System) (lo, at, upper float64, it int, cert bool, err error) {
	n, m, p := g.N(), g.M(), g.P()
	fe := newFreqEval(g)
	gain := func(w float64) float64 {
		v, err := fe.at(w)
		if err != nil {
			return 0
		}
		return gainNorm(v, p, m)
	}
	// Starting points: infinity (D), zero, and the least damped poles.
	lo, at = maxSingular(g.D), math.Inf(1)
	if v := gain(0); v > lo {
		lo, at = v, 0
	}
	poles, err := Poles(g)
	if err != nil {
		return 0, 0, 0, 0, false, err
	}
	type cand struct{ w, score float64 }
	var cs []cand
	for _, s := range poles {
		if imag(s) < 0 {
			continue
		}
		r := math.Hypot(real(s), imag(s))
		if r == 0 {
			continue
		}
		cs = append(cs, cand{r, math.Abs(imag(s)) / (math.Abs(real(s)) * r)})
	}
	// The 20 least damped (the score of Bruinsma & Steinbuch's start).
	for i := 0; i < len(cs) && i < 20; i++ {
		best := i
		for j := i + 1; j < len(cs); j++ {
			if cs[j].score > cs[best].score {
				best = j
			}
		}
		cs[i], cs[best] = cs[best], cs[i]
		if v := gain(cs[i].w); v > lo {
			lo, at = v, cs[i].w
		}
	}
	if lo == 0 {
		return 0, 0, 0, 0, true, nil
	}
	A, B, C, D := g.A, g.B, g.C, g.D
	var DtD, DDt mat.Dense
	DtD.Mul(D.T(), D)
	DDt.Mul(D, D.T())
	for it = 1; it <= 60; it++ {
		gam := (1 + 2*HinfTol) * lo
		R := mat.NewDense(m, m, nil)
		for i := 0; i < m; i++ {
			R.Set(i, i, gam*gam)
		}
		R.Sub(R, &DtD)
		var Ri mat.Dense
		if err := Ri.Inverse(R); err != nil {
			return 0, 0, 0, it, false, fmt.Errorf("H-infinity iteration: %w", err)
		}
		Ak := mat.DenseCopyOf(A)
		Ak.Add(Ak, mul(mul(mul(B, &Ri), mat.DenseCopyOf(D.T())), C))
		G12 := mul(mul(B, &Ri), mat.DenseCopyOf(B.T()))
		Mid := mul(mul(D, &Ri), mat.DenseCopyOf(D.T()))
		for i := 0; i < p; i++ {
			Mid.Set(i, i, Mid.At(i, i)+1)
		}
		G21 := mul(mul(mat.DenseCopyOf(C.T()), Mid), C)
		G21.Scale(-1, G21)
		AkT := mat.DenseCopyOf(Ak.T())
		AkT.Scale(-1, AkT)
		H := blocks([]int{n, n}, []int{n, n}, [][]*mat.Dense{{Ak, G12}, {G21, AkT}})
		var eig mat.Eigen
		if !eig.Factorize(H, mat.EigenNone) {
			return 0, 0, 0, it, false, errors.New("H-infinity iteration: the eigenvalues of the Hamiltonian matrix did not converge")
		}
		normH := mat.Norm(H, 2)
		var ws []float64
		for _, v := range eig.Values(nil) {
			if imag(v) > 0 && math.Abs(real(v)) <= 1e-8*math.Max(cmplx.Abs(v), 1e-6*normH) {
				ws = append(ws, imag(v))
			}
		}
		if len(ws) == 0 {
			return lo, at, gam, it, true, nil
		}
		sortFloats(ws)
		improved := false
		for i := 0; i+1 < len(ws); i++ {
			w := math.Sqrt(ws[i] * ws[i+1])
			if v := gain(w); v > lo {
				if v > (1+HinfTol)*lo {
					improved = true
				}
				lo, at = v, w
			}
		}
		if len(ws) == 1 {
			if v := gain(ws[0]); v > lo {
				improved = v > (1+HinfTol)*lo
				lo, at = v, ws[0]
			}
		}
		if !improved {
			// The axis eigenvalues are rounding-level: gamma is as good
			// as the data allow.
			return lo, at, gam, it, false, nil
		}
	}
	return lo, at, (1 + 2*HinfTol) * lo, it, false, nil
}

func sortFloats(v []float64) {
	for i := 1; i < len(v); i++ {
		for j := i; j > 0 && v[j] < v[j-1]; j-- {
			v[j], v[j-1] = v[j-1], v[j]
		}
	}
}
