package lsys

import (
	"fmt"
	"math"
	"math/cmplx"
	"sort"

	"gonum.org/v1/gonum/mat"
)

// TransferFunctions returns the transfer function of every input/output
// pair: rows are outputs, columns inputs, in s (or z when sampled). Each
// entry comes from a minimal realization of the single channel (the
// staircase forms), its poles (eigenvalues), its zeros (the reduced system
// pencil and QZ) and its gain, matched at one point away from all poles and
// zeros: G(x) = k prod(x - z_i) / prod(x - p_i) (Varga & Sima 1981,
// Numerically stable algorithm for transfer function matrix evaluation,
// Int. J. Control 33(6), use the same pole-zero-gain route). Coefficients of
// conjugate factors are real by construction.
func TransferFunctions(s *System, relTol float64) ([][]*Rational, error) {
	if relTol <= 0 || math.IsNaN(relTol) {
		relTol = DefaultRelTol
	}
	p, m := s.P(), s.M()
	out := make([][]*Rational, p)
	for i := 0; i < p; i++ {
		out[i] = make([]*Rational, m)
		for j := 0; j < m; j++ {
			r, err := tfChannel(s, i, j, relTol)
			if err != nil {
				return nil, fmt.Errorf("transfer function from %s to %s: %v", s.InputNames[j], s.OutputNames[i], err)
			}
			out[i][j] = r
		}
	}
	return out, nil
}

func tfChannel(s *System, i, j int, relTol float64) (*Rational, error) {
	d := 0.0
	if s.D != nil {
		d = s.D.At(i, j)
	}
	n := s.N()
	if n == 0 {
		return &Rational{Num: Poly{d}, Den: Poly{1}, Ts: s.Ts}, nil
	}
	b := mat.NewDense(n, 1, nil)
	c := mat.NewDense(1, n, nil)
	for k := 0; k < n; k++ {
		b.Set(k, 0, s.B.At(k, j))
		c.Set(0, k, s.C.At(i, k))
	}
	siso, err := NewSystem(n, 1, 1, s.A, b, c, mat.NewDense(1, 1, []float64{d}), s.Ts)
	if err != nil {
		return nil, err
	}
	mr, err := Minimal(siso, relTol)
	if err != nil {
		return nil, err
	}
	if mr.N() == 0 {
		return &Rational{Num: Poly{d}, Den: Poly{1}, Ts: s.Ts}, nil
	}
	// Poles as the mode table clusters them: a multiple pole by its
	// cluster's mean, accurate to about u where the split members are only
	// accurate to u^(1/k), so the polynomial gets the multiple factor.
	poles, err := Poles(mr)
	if err != nil {
		return nil, err
	}
	zr, _, _, err := invariantZeros(mr, relTol)
	zs := zr.vals
	if err != nil {
		return nil, err
	}
	// Rounding residue: a pole or zero within the boundary tolerance of the
	// origin (or of the real axis) is exactly there, so the polynomial has
	// an exact factor s (see Poles).
	snapTol := boundaryTol(mr.A)
	for q := range poles {
		poles[q] = snapValue(poles[q], 0, snapTol)
	}
	for q := range zs {
		zs[q] = snapValue(zs[q], 0, snapTol)
	}
	// Match the gain at a point clear of every pole and zero. Far from the
	// poles a channel of relative degree r is ~1/x^r while the terms that
	// make it up are ~1/x, so an evaluation there cancels digits; the point
	// chosen is the one where the value is largest relative to those terms
	// (the sum of |c_l| |((xI - A)^-1 b)_l| and |d|), among points on circles
	// through the poles and zeros and one beyond them, at angles away from
	// the real axis and at least a quarter of their radius from every pole
	// and zero.
	scale := 1.0
	radii := []float64{}
	for _, v := range append(append([]complex128{}, poles...), zs...) {
		scale = math.Max(scale, cmplx.Abs(v))
		if a := cmplx.Abs(v); a > 0 {
			radii = append(radii, a)
		}
	}
	radii = append(radii, 2*scale)
	if s.Ts > 0 {
		radii = append(radii, 1.5)
	}
	// Candidates by how well the evaluation resolves the value (see
	// above); the gain is taken at the best one where it comes out real,
	// as a real system's must: near a multiple pole known only to its
	// cluster mean (its members split by rounding) the value is off, and
	// the matched gain shows it by an imaginary part.
	type cand struct {
		x, g complex128
		q    float64
	}
	var cands []cand
	for _, rad := range radii {
		for _, ang := range []float64{1.1, 0.7, 1.9, 2.6, 0.3} {
			xc := cmplx.Rect(rad, ang)
			clear := true
			for _, v := range append(append([]complex128{}, poles...), zs...) {
				if cmplx.Abs(xc-v) < 0.25*rad {
					clear = false
					break
				}
			}
			if !clear {
				continue
			}
			gc, size, err := tfSisoEval(mr, xc)
			if err != nil || math.IsNaN(real(gc)) || size == 0 {
				continue
			}
			if q := cmplx.Abs(gc) / size; q > 0 {
				cands = append(cands, cand{xc, gc, q})
			}
		}
	}
	if len(cands) == 0 {
		return nil, fmt.Errorf("could not evaluate the channel away from its poles")
	}
	sort.SliceStable(cands, func(a, b int) bool { return cands[a].q > cands[b].q })
	num := polyFromRoots(zs)
	den := polyFromRoots(poles)
	var kc complex128
	ok := false
	for _, c := range cands {
		var nx, dx complex128 = 1, 1
		for _, z := range zs {
			nx *= c.x - z
		}
		for _, p := range poles {
			dx *= c.x - p
		}
		kc = c.g * dx / nx
		if math.Abs(imag(kc)) <= 1e-6*cmplx.Abs(kc) {
			ok = true
			break
		}
	}
	k := real(kc)
	if !ok {
		// The matched gain of a real system is real; a large imaginary
		// part at every point means the poles or zeros are too
		// inaccurate to trust.
		kc0 := cands[0].g
		return nil, fmt.Errorf("the pole-zero-gain form does not reproduce the channel (gain %v at the best point, value %v); the channel is ill-conditioned", kc, kc0)
	}
	for q := range num {
		num[q] *= k
	}
	tfCleanCoefficients(num, zs, k)
	tfCleanCoefficients(den, poles, 1)
	return &Rational{Num: num, Den: den, Ts: s.Ts, Note: coefficientFidelity(den, poles, s.Ts)}, nil
}

// coefficientFidelity compares the roots of the monic denominator den with
// the poles it was formed from (as multisets, nearest first) and says so
// when one moved by more than 1e-6 of the largest pole magnitude, or when
// the roots cross the stability boundary or merge: high-order polynomials
// (a coefficient spread of 1e10 and more, poles crowded near z = 1) cannot
// carry their roots, whatever the care in forming them.
func coefficientFidelity(den Poly, poles []complex128, ts float64) string {
	if len(den)-1 < 2 {
		return ""
	}
	roots := polyRootsMonic(den, ts)
	if len(roots) != len(poles) {
		return ""
	}
	scale := 0.0
	for _, p := range poles {
		scale = math.Max(scale, cmplx.Abs(p))
	}
	used := make([]bool, len(roots))
	worst, at := 0.0, complex128(0)
	for _, p := range poles {
		best, bi := math.Inf(1), -1
		for i, r := range roots {
			if d := cmplx.Abs(r - p); !used[i] && d < best {
				best, bi = d, i
			}
		}
		used[bi] = true
		if best > worst {
			worst, at = best, p
		}
	}
	side := func(v complex128) int {
		d := real(v)
		if ts > 0 {
			d = cmplx.Abs(v) - 1
		}
		switch {
		case d > 0:
			return 1
		case d < 0:
			return -1
		}
		return 0
	}
	var countP, countR [3]int
	for i := range poles {
		countP[side(poles[i])+1]++
		countR[side(roots[i])+1]++
	}
	crossed := countP != countR
	if worst <= 1e-6*math.Max(scale, dlamchE) && !crossed {
		return ""
	}
	return fmt.Sprintf("the denominator's coefficients do not carry its poles: the pole at %s comes back %.2g away from them%s; use the poles and zeros, or the state-space model, for anything that depends on them", fmtComplexShort(at), worst, map[bool]string{true: ", and some come back on the other side of the stability boundary", false: ""}[crossed])
}

// TFCoefficientTol: a coefficient of a transfer-function polynomial formed
// from roots r_i and gain k is rounding residue, and set to exactly 0, when
// it is below TFCoefficientTol |k| e_j, e_j the coefficient of the same
// power in prod(x + |r_i|): the forward error bound of forming it (Higham
// 2002, Accuracy and Stability of Numerical Algorithms, sec. 5.1), 1000 u
// with u the unit roundoff. Relative to the largest coefficient instead, a
// high-order polynomial (coefficients spread over 1e13) lost its leading 1.
const TFCoefficientTol = 1e3 * dlamchE

func tfCleanCoefficients(p Poly, roots []complex128, k float64) {
	abs := make([]complex128, len(roots))
	for i, r := range roots {
		abs[i] = complex(-cmplx.Abs(r), 0)
	}
	bound := polyFromRoots(abs)
	for q, c := range p {
		if q < len(bound) && math.Abs(c) <= TFCoefficientTol*math.Abs(k)*bound[q] {
			p[q] = 0
		}
	}
}

// polyFromRoots returns the monic polynomial prod(x - r) in ascending
// coefficients; complex roots must come in conjugate pairs (the imaginary
// parts of the product are rounding and are dropped).
func polyFromRoots(roots []complex128) Poly {
	c := []complex128{1}
	for _, r := range roots {
		next := make([]complex128, len(c)+1)
		for q, a := range c {
			next[q+1] += a
			next[q] -= r * a
		}
		c = next
	}
	out := make(Poly, len(c))
	for q, a := range c {
		out[q] = real(a)
	}
	return out
}

// tfSisoEval returns c (x I - A)^-1 b + d for a single-input single-output
// system, by Gaussian elimination with partial pivoting, and the size of the
// terms it sums, sum |c_l| |((x I - A)^-1 b)_l| + |d|.
func tfSisoEval(s *System, x complex128) (complex128, float64, error) {
	n := s.N()
	M := make([][]complex128, n)
	for i := range M {
		M[i] = make([]complex128, n+1)
		for j := 0; j < n; j++ {
			M[i][j] = complex(-s.A.At(i, j), 0)
		}
		M[i][i] += x
		M[i][n] = complex(s.B.At(i, 0), 0)
	}
	for k := 0; k < n; k++ {
		piv := k
		for i := k + 1; i < n; i++ {
			if cmplx.Abs(M[i][k]) > cmplx.Abs(M[piv][k]) {
				piv = i
			}
		}
		if M[piv][k] == 0 {
			return 0, 0, fmt.Errorf("singular at %v", x)
		}
		M[k], M[piv] = M[piv], M[k]
		for i := k + 1; i < n; i++ {
			f := M[i][k] / M[k][k]
			for j := k; j <= n; j++ {
				M[i][j] -= f * M[k][j]
			}
		}
	}
	sol := make([]complex128, n)
	for i := n - 1; i >= 0; i-- {
		v := M[i][n]
		for l := i + 1; l < n; l++ {
			v -= M[i][l] * sol[l]
		}
		sol[i] = v / M[i][i]
	}
	g := complex(s.D.At(0, 0), 0)
	size := math.Abs(s.D.At(0, 0))
	for l := 0; l < n; l++ {
		g += complex(s.C.At(0, l), 0) * sol[l]
		size += math.Abs(s.C.At(0, l)) * cmplx.Abs(sol[l])
	}
	return g, size, nil
}
