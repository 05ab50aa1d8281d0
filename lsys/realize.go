package lsys

import (
	"errors"
	"fmt"
	"math"
	"math/cmplx"
	"slices"
	"sort"

	"gonum.org/v1/gonum/lapack"
	"gonum.org/v1/gonum/lapack/gonum"
	"gonum.org/v1/gonum/mat"
)

// RealizeInfo tells how a realization was obtained and how far it can be
// trusted.
type RealizeInfo struct {
	// Scales holds the frequency scale of each input column: a power of two
	// near the geometric mean of the magnitudes of the column's nonzero
	// poles (1 when there are none).
	Scales []float64
	// Order is the order of the column-wise companion realization before
	// reduction; Removed is the number of states the staircase removed as
	// pole-zero cancellations (SISO) or shared poles (MIMO).
	Order, Removed int
	// Tol is the relative rank tolerance of the staircase.
	Tol float64
	// Spread is the largest ratio between nonzero coefficients of a monic
	// denominator as given (a measure of how badly scaled the input is).
	Spread float64
	// Check is the worst relative difference between the realization's
	// transfer function and direct evaluation of the rational entries, at
	// points on circles through every pole magnitude (relative to the
	// entry's size there, sum |num_k| |s|^k / |den(s)|).
	Check float64
	// Warning is non-empty when something needs the reader's attention: a
	// reduction refused because it would change the transfer function, or
	// a realization that reproduces the transfer function only poorly.
	Warning string
}

// Tolerances of realization (common practice, chosen by us):
const (
	// realizeRankTol is the default relative rank tolerance of the
	// staircase: singular values at or below realizeRankTol * ||A||_F count
	// as zero (A of the scaled, balanced realization).
	realizeRankTol = 1e-10
	// realizeCancelTol bounds the change of the transfer function a
	// reduction may make, relative, at the check points: a pole and a zero
	// cancel only when they agree to about this fraction of the pole's
	// magnitude. A reduction that changes more is refused.
	realizeCancelTol = 1e-8
	// realizeFailTol: a realization that differs from the rational entries
	// by more than this (relative) at the check points is an error, since
	// its poles and gains cannot be trusted.
	realizeFailTol = 1e-6
)

// Realize returns a minimal state-space realization of a transfer matrix
// given as rows (outputs) of columns (inputs) of rational functions, all with
// sample time ts (0 for functions of s, > 0 for functions of z). It is
// RealizeWithInfo with the default tolerance; a realization whose transfer
// function differs from the entries by more than 1e-6 (relative) at the
// check points is refused with an error that gives the difference and the
// coefficient spread.
func Realize(tf [][]*Rational, ts float64) (*System, error) {
	return RealizeTol(tf, ts, 0)
}

// RealizeTol is Realize with an explicit relative rank tolerance for the
// staircase (see RealizeWithInfo).
func RealizeTol(tf [][]*Rational, ts float64, tol float64) (*System, error) {
	s, _, err := RealizeChecked(tf, ts, tol)
	return s, err
}

// RealizeChecked is RealizeTol that also hands back the report, so callers
// can pass its Warning on to the reader.
func RealizeChecked(tf [][]*Rational, ts float64, tol float64) (*System, *RealizeInfo, error) {
	s, info, err := RealizeWithInfo(tf, ts, tol)
	if err != nil {
		return nil, nil, err
	}
	if info.Check > realizeFailTol {
		return nil, nil, errors.New("realize: " + info.Warning)
	}
	return s, info, nil
}

// RealizeWithInfo returns a minimal state-space realization of a transfer
// matrix and a report on how it was obtained and how well it reproduces
// the entries.
//
// Method:
//  1. Each entry is made monic; common roots at the origin (s^k or z^k
//     factors of numerator and denominator) are cancelled exactly.
//  2. Each column is realized in controllable companion form over the
//     product of its distinct denominators, after scaling the variable by a
//     power of two w near the geometric mean of the nonzero pole magnitudes
//     (s = w*sigma: the coefficients of the scaled polynomial are near 1 for
//     a cluster of poles, and the companion form is balanced, Parlett &
//     Reinsch 1969). The scaling is undone exactly (powers of two) by
//     A = w*A_sigma, B = w*B_sigma. The columns are stacked block-diagonally,
//     so the realization is controllable by construction.
//  3. Unobservable states (pole-zero cancellations, poles shared between
//     columns) are removed by Minimal: orthogonal staircases (Van Dooren
//     1981, "The generalized eigenstructure problem in linear system
//     theory", IEEE TAC 26(1)) on balanced pairs, made to agree with the PBH
//     test of every mode, a relative tolerance tol (<= 0 selects 1e-10), so
//     the modes kept are those the matrices would keep. A single entry with
//     a constant numerator cannot cancel and is not reduced.
//  4. The reduced and the unreduced realizations are checked against direct
//     evaluation of the entries at points on circles through every pole
//     magnitude. A reduction that changes the transfer function by more than
//     1e-8 relative is refused (never drop a pole that is there: a
//     cancellation must hold to about 1e-8 of the pole's magnitude) and the
//     Warning says so; the unreduced realization is returned.
//
// Every entry must be proper (degree of numerator <= degree of
// denominator); an improper entry is refused, since it has no state-space
// form.
func RealizeWithInfo(tf [][]*Rational, ts float64, tol float64) (*System, *RealizeInfo, error) {
	p := len(tf)
	if p == 0 || len(tf[0]) == 0 {
		return nil, nil, errors.New("realize: the transfer matrix is empty")
	}
	if math.IsNaN(ts) || math.IsInf(ts, 0) || ts < 0 {
		return nil, nil, fmt.Errorf("realize: sample time must be finite and >= 0, got %v", ts)
	}
	if math.IsNaN(tol) || math.IsInf(tol, 0) {
		return nil, nil, fmt.Errorf("realize: the tolerance must be finite, got %v", tol)
	}
	if tol <= 0 {
		tol = realizeRankTol
	}
	m := len(tf[0])
	for i, row := range tf {
		if len(row) != m {
			return nil, nil, fmt.Errorf("realize: row %d has %d entries but row 1 has %d; every output needs one entry per input", i+1, len(row), m)
		}
	}
	info := &RealizeInfo{Tol: tol, Scales: make([]float64, m), Spread: 1}
	type entry struct{ num, den []float64 }
	ent := make([][]entry, p)
	for i := range tf {
		ent[i] = make([]entry, m)
		for j, r := range tf[i] {
			where := fmt.Sprintf("entry [%d, %d]", i+1, j+1)
			if r == nil {
				return nil, nil, fmt.Errorf("realize: %s is missing", where)
			}
			if r.Ts != ts {
				return nil, nil, fmt.Errorf("realize: %s has sample time %s but the matrix is %s", where, tsText(r.Ts), tsText(ts))
			}
			num, den := polyTrim(r.Num), polyTrim(r.Den)
			for _, c := range append(append([]float64(nil), num...), den...) {
				if math.IsNaN(c) || math.IsInf(c, 0) {
					return nil, nil, fmt.Errorf("realize: %s has a coefficient %v; coefficients must be finite", where, c)
				}
			}
			if len(den) == 0 {
				return nil, nil, fmt.Errorf("realize: %s has a zero denominator", where)
			}
			if len(num) > len(den) {
				return nil, nil, fmt.Errorf("realize: %s is improper (numerator degree %d above denominator degree %d); a state-space model needs a proper transfer function", where, len(num)-1, len(den)-1)
			}
			if len(num) == 0 {
				// A zero entry has no poles to realize.
				ent[i][j] = entry{nil, []float64{1}}
				continue
			}
			// Exact cancellation of common roots at the origin.
			k := min(lowZeros(num), lowZeros(den))
			num, den = num[k:], den[k:]
			lead := den[len(den)-1]
			e := entry{polyScale(1/lead, num), polyScale(1/lead, den)}
			ent[i][j] = e
			info.Spread = math.Max(info.Spread, coefSpread(e.den))
		}
	}
	var As, Bs, Cs []*mat.Dense
	var colDens [][]float64
	ns := make([]int, m)
	D := mat.NewDense(p, m, nil)
	for j := 0; j < m; j++ {
		// distinct monic denominators of the column
		var dens [][]float64
		which := make([]int, p)
		for i := 0; i < p; i++ {
			k := -1
			for q, d := range dens {
				if polyEqual(d, ent[i][j].den) {
					k = q
					break
				}
			}
			if k < 0 {
				k = len(dens)
				dens = append(dens, ent[i][j].den)
			}
			which[i] = k
		}
		d := []float64{1}
		for _, dd := range dens {
			d = polyMul(d, dd)
		}
		colDens = append(colDens, d)
		nj := len(d) - 1
		ns[j] = nj
		e := scaleExponent(d)
		info.Scales[j] = math.Ldexp(1, e)
		Cj := mat.NewDense(p, max(nj, 1), nil)
		for i := 0; i < p; i++ {
			num := ent[i][j].num
			for q, dd := range dens {
				if q != which[i] {
					num = polyMul(num, dd)
				}
			}
			// num has degree <= nj; split off the direct term.
			full := make([]float64, nj+1)
			copy(full, num)
			dij := full[nj]
			D.Set(i, j, dij)
			for k := 0; k < nj; k++ {
				// coefficient of sigma^k of the scaled strictly proper part,
				// divided by w^nj: exact (power of two).
				Cj.Set(i, k, math.Ldexp(full[k]-dij*d[k], -e*(nj-k)))
			}
		}
		if nj == 0 {
			As, Bs, Cs = append(As, nil), append(Bs, nil), append(Cs, nil)
			continue
		}
		// Companion form of the scaled monic denominator d(w sigma)/w^nj.
		Aj := mat.NewDense(nj, nj, nil)
		for k := 0; k+1 < nj; k++ {
			Aj.Set(k, k+1, 1)
		}
		for k := 0; k < nj; k++ {
			Aj.Set(nj-1, k, -math.Ldexp(d[k], -e*(nj-k)))
		}
		Bj := mat.NewDense(nj, 1, nil)
		Bj.Set(nj-1, 0, 1)
		balanceScale(Aj, Bj, Cj)
		// Undo the scaling of the variable: s = w sigma.
		Aj.Scale(info.Scales[j], Aj)
		Bj.Scale(info.Scales[j], Bj)
		As, Bs, Cs = append(As, Aj), append(Bs, Bj), append(Cs, Cj)
	}
	n := 0
	for _, v := range ns {
		n += v
	}
	info.Order = n
	if n == 0 {
		s, err := NewSystem(0, m, p, nil, nil, nil, D, ts)
		return s, info, err
	}
	ones := make([]int, m)
	for j := range ones {
		ones[j] = 1
	}
	Ab := make([][]*mat.Dense, m)
	Bb := make([][]*mat.Dense, m)
	Cb := [][]*mat.Dense{make([]*mat.Dense, m)}
	for j := 0; j < m; j++ {
		Ab[j], Bb[j] = make([]*mat.Dense, m), make([]*mat.Dense, m)
		Ab[j][j], Bb[j][j] = As[j], Bs[j]
		if ns[j] > 0 {
			Cb[0][j] = Cs[j]
		}
	}
	A := blocks(ns, ns, Ab)
	B := blocks(ns, ones, Bb)
	C := blocks([]int{p}, ns, Cb)
	full, err := NewSystem(n, m, p, A, B, C, D, ts)
	if err != nil {
		return nil, nil, err
	}
	points, err := checkPoints(A, ts)
	if err != nil {
		return nil, nil, err
	}
	rat := func(i, j int, s complex128) (val complex128, size float64) {
		e := ent[i][j]
		den := polyAtC(e.den, s)
		return polyAtC(e.num, s) / den, polyAbsAt(e.num, cmplx.Abs(s)) / cmplx.Abs(den)
	}
	info.Check = realizeCheck(full, points, rat)
	out := full
	// A single entry with a constant numerator has no zeros, so nothing can
	// cancel; the companion form is minimal.
	reducible := p > 1 || m > 1 || len(ent[0][0].num) > 1
	if reducible {
		// The reduction is Minimal's: staircases made to agree with the
		// PBH test of every mode, so a transfer function and the
		// matrices it came from keep the same modes (a weakly reached
		// defective pole drops a staircase step far below its PBH
		// margin; see agreeingStaircase).
		red, err := Minimal(full, tol)
		if err != nil {
			return nil, nil, fmt.Errorf("realize: %w", err)
		}
		if red.N() < n {
			if red, err = red.WithNames(defaultNames("x", red.N()), nil, nil); err != nil {
				return nil, nil, err
			}
			chk := realizeCheck(red, points, rat)
			if chk <= math.Max(realizeCancelTol, 10*info.Check) {
				out, info.Removed, info.Check = red, n-red.N(), chk
				if w, err := closeCancellation(full); err != nil {
					return nil, nil, err
				} else if w != "" && info.Warning == "" {
					info.Warning = w
				}
				if p == 1 && m == 1 && info.Warning == "" {
					info.Warning = approximateCancellation(full, red, ent[0][0].num, ent[0][0].den, ts)
				}
			} else {
				info.Warning = fmt.Sprintf("the staircase (rank tolerance %.1e) would remove %d state(s), but that changes the transfer function by %.1e (relative) at the check points, more than %.0e: no pole-zero cancellation that close, so all %d states are kept (the realization may not be minimal)", tol, n-red.N(), chk, realizeCancelTol, n)
			}
		}
	}
	for _, row := range tf {
		for _, r := range row {
			if r.Note != "" && info.Warning == "" {
				info.Warning = r.Note
			}
		}
	}
	for j, d := range colDens {
		if w := poleUncertainty(d, ts); w != "" && info.Warning == "" {
			info.Warning = w
			if m > 1 {
				info.Warning = fmt.Sprintf("column %d: %s", j+1, w)
			}
		}
	}
	if info.Check > realizeFailTol {
		info.Warning = fmt.Sprintf("the realization reproduces the transfer function only to %.1e (relative) at the check points; the denominator coefficients span a ratio of %.1e, too much for double precision: give the transfer function as a product of low-order sections (series connection) instead", info.Check, info.Spread)
	}
	return out, info, nil
}

// checkPoints returns the points where a realization is compared with the
// rational entries: on a circle through the magnitude of every distinct
// nonzero eigenvalue of A (and radius 1 when there is none), at two angles
// that avoid the real and imaginary axes, where poles of real systems
// usually sit.
func checkPoints(A *mat.Dense, ts float64) ([]complex128, error) {
	es, err := Eigen(A)
	if err != nil {
		return nil, fmt.Errorf("realize: %w", err)
	}
	var radii []float64
	for _, v := range es.Values {
		if r := cmplx.Abs(v); r > 0 {
			radii = append(radii, r)
		}
	}
	if len(radii) == 0 {
		radii = []float64{1}
	}
	sort.Float64s(radii)
	var pts []complex128
	last := 0.0
	for _, r := range radii {
		if last > 0 && r < last*1.01 {
			continue
		}
		last = r
		for _, th := range []float64{1.1, 1.9} {
			pts = append(pts, cmplx.Rect(r, th))
		}
	}
	return pts, nil
}

// realizeCheck is the worst relative difference between the transfer
// function of s and the rational entries (rat gives the value and the size
// sum |num_k| |x|^k / |den(x)| that the difference is measured against).
// Points where either side is not finite are skipped.
func realizeCheck(s *System, points []complex128, rat func(i, j int, x complex128) (complex128, float64)) float64 {
	h := newHessenberg(s)
	g := make([]complex128, s.P()*s.M())
	worst := 0.0
	for _, x := range points {
		if err := h.at(x, g); err != nil {
			continue
		}
		for i := 0; i < s.P(); i++ {
			for j := 0; j < s.M(); j++ {
				want, size := rat(i, j, x)
				if cmplx.IsInf(want) || cmplx.IsNaN(want) || math.IsInf(size, 0) || size == 0 {
					if size == 0 && g[i*s.M()+j] != 0 {
						worst = math.Inf(1)
					}
					continue
				}
				worst = math.Max(worst, cmplx.Abs(g[i*s.M()+j]-want)/size)
			}
		}
	}
	return worst
}

// scaleExponent returns e such that 2^e is near the geometric mean of the
// magnitudes of the nonzero roots of the monic polynomial d (ascending
// coefficients): that mean is |d_l|^(1/(n-l)) for the lowest nonzero
// coefficient d_l, since the product of the nonzero roots is +-d_l.
func scaleExponent(d []float64) int {
	n := len(d) - 1
	l := lowZeros(d)
	if n <= l {
		return 0
	}
	g := math.Log2(math.Abs(d[l])) / float64(n-l)
	return int(math.Round(g))
}

// lowZeros counts the leading zero coefficients of p (ascending order):
// the multiplicity of the root at the origin.
func lowZeros(p []float64) int {
	k := 0
	for k < len(p) && p[k] == 0 {
		k++
	}
	return k
}

// coefSpread is the ratio of the largest to the smallest nonzero
// coefficient magnitude of p.
func coefSpread(p []float64) float64 {
	lo, hi := math.Inf(1), 0.0
	for _, c := range p {
		if a := math.Abs(c); a > 0 {
			lo, hi = math.Min(lo, a), math.Max(hi, a)
		}
	}
	if hi == 0 {
		return 1
	}
	return hi / lo
}

// polyAbsAt is sum |p_k| r^k, the size against which rounding in p(x),
// |x| = r, is measured.
func polyAbsAt(p []float64, r float64) float64 {
	acc := 0.0
	for i := len(p) - 1; i >= 0; i-- {
		acc = acc*r + math.Abs(p[i])
	}
	return acc
}

// balanceScale applies the diagonal similarity of LAPACK's balancing
// (Dgebal, scaling only; Parlett & Reinsch 1969, "Balancing a matrix for
// calculation of eigenvalues and eigenvectors", Numer. Math. 13) in place:
// A <- D^-1 A D, B <- D^-1 B, C <- C D. Companion forms of polynomials with
// widely spread coefficients (a short dead time, fast and slow poles
// together) have huge entries; balancing brings the norm near the spectral
// radius, which the rank decisions and all later computations benefit from.
// Powers of two only, so the transfer function is not changed by rounding.
func balanceScale(A, B, C *mat.Dense) {
	n, _ := A.Dims()
	raw := A.RawMatrix()
	d := make([]float64, n)
	gonum.Implementation{}.Dgebal(lapack.Scale, n, raw.Data, raw.Stride, d)
	for i := 0; i < n; i++ {
		for j := 0; j < B.RawMatrix().Cols; j++ {
			B.Set(i, j, B.At(i, j)/d[i])
		}
		for j := 0; j < C.RawMatrix().Rows; j++ {
			C.Set(j, i, C.At(j, i)*d[i])
		}
	}
}

func zeroBlock(X *mat.Dense, r0, r1, c0, c1 int) {
	for i := r0; i < r1; i++ {
		for j := c0; j < c1; j++ {
			X.Set(i, j, 0)
		}
	}
}

// polyTrim drops exactly-zero highest coefficients (ascending order).
func polyTrim(p Poly) []float64 {
	k := len(p)
	for k > 0 && p[k-1] == 0 {
		k--
	}
	return append([]float64(nil), p[:k]...)
}

func polyScale(f float64, p []float64) []float64 {
	out := make([]float64, len(p))
	for i, c := range p {
		out[i] = f * c
	}
	return out
}

func polyMul(a, b []float64) []float64 {
	if len(a) == 0 || len(b) == 0 {
		return nil
	}
	out := make([]float64, len(a)+len(b)-1)
	for i, x := range a {
		for j, y := range b {
			out[i+j] += x * y
		}
	}
	return out
}

// polyEqual compares monic polynomials coefficient by coefficient with a
// relative tolerance of 1e-12 (common practice for exact-arithmetic input).
func polyEqual(a, b []float64) bool {
	if len(a) != len(b) {
		return false
	}
	for i := range a {
		if math.Abs(a[i]-b[i]) > 1e-12*math.Max(1, math.Max(math.Abs(a[i]), math.Abs(b[i]))) {
			return false
		}
	}
	return true
}

// poleUncertainty says when the coefficients of the monic denominator d
// (ascending) cannot fix its roots well enough for the verdicts made on
// them. A cluster of m roots at l moves under coefficient errors of eps
// relative to e_k (the coefficients of prod(x + |mu|) over all roots, at
// least |d_k|) by about r = (eps sum e_k |l|^k / prod |l - mu|)^(1/m), the product
// over the other roots (first-order root sensitivity; Wilkinson 1963,
// Rounding Errors in Algebraic Processes, ch. 2), with eps = n u, the
// rounding of forming or typing the n + 1 coefficients. When that disk
// reaches the stability boundary, or another root, the realized model's
// stability or multiplicities may not be the model's: the warning names the
// pole and the figures. Sampled models with crowded poles near z = 1 are
// the common case (their coefficients are nearly binomial).
func poleUncertainty(d []float64, ts float64) string {
	n := len(d) - 1
	if n < 2 {
		return ""
	}
	A := companion(d)
	poles := polyRootsMonic(d, ts)
	if poles == nil {
		return ""
	}
	// Distinct values: Poles repeats a cluster's mean once per member.
	var cs []complex128
	for _, p := range poles {
		if !slices.Contains(cs, p) {
			cs = append(cs, p)
		}
	}
	eps := float64(n) * dlamchE
	btol := boundaryTol(balanceEigen(A).A)
	for i, c := range cs {
		r := rootRadius(d, c, poles)
		a := cmplx.Abs(c)
		dist := math.Abs(real(c))
		where := "the imaginary axis"
		if ts > 0 {
			dist = math.Abs(a - 1)
			where = "the unit circle"
		}
		what := ""
		// Within btol of the boundary the verdict is "on it" either way.
		if r >= dist && r > btol {
			what = fmt.Sprintf("%s (%.2g away)", where, dist)
		}
		for k, o := range cs {
			if d := cmplx.Abs(c - o); k != i && what == "" && r >= d/2 {
				what = fmt.Sprintf("the pole at %s (%.2g away)", fmtComplexShort(o), d)
			}
		}
		if what != "" {
			return fmt.Sprintf("the denominator's coefficients fix the pole at %s only to within %.2g (first-order root sensitivity to coefficient errors of %.1g relative), which reaches %s: this realization's stability or multiplicities may not be the model's. Give the transfer function as a product of low-order factors, or as matrices", fmtComplexShort(c), r, eps, what)
		}
	}
	return ""
}

// fmtComplexShort writes v with 6 significant digits, a pair as a +- bj.
func fmtComplexShort(v complex128) string {
	if imag(v) == 0 {
		return fmt.Sprintf("%.6g", real(v))
	}
	return fmt.Sprintf("%.6g +- %.6gj", real(v), math.Abs(imag(v)))
}

// closeCancellation names a pole that the reduction removed on a close call:
// its PBH margin in the companion realization (Hautus 1969; see Modes) is
// within a factor 10 of its tolerance, so a realization of the same model
// in other coordinates (the matrices it came from) may keep it.
func closeCancellation(full *System) (string, error) {
	mt, err := Modes(full)
	if err != nil {
		return "", err
	}
	for _, m := range mt.Modes {
		margin, tol, what := 0.0, 0.0, ""
		switch {
		case !m.Observable && m.ObserveClose:
			margin, tol, what = m.ObserveMargin, m.ObserveTol, "seen"
		case !m.Reachable && m.ReachClose:
			margin, tol, what = m.ReachMargin, m.ReachTol, "reached"
		default:
			continue
		}
		return fmt.Sprintf("the pole at %s was cancelled against a zero on a close call: it is %s with a PBH margin of %.3g against a tolerance of %.3g, so a realization of the same model in other coordinates may keep it", fmtComplexShort(m.Eigenvalue), what, margin, tol), nil
	}
	return "", nil
}

// approximateCancellation names a pole that a single-input single-output
// reduction removed although no zero sits on it within what rounding of
// the coefficients explains (first-order root sensitivity of both
// polynomials, as in poleUncertainty, times 10): a near cancellation, which
// the rank tolerance decided and another realization of the same model
// (the matrices it came from, where PBH margins are measured in other
// coordinates) may keep.
func approximateCancellation(full, red *System, num, den []float64, ts float64) string {
	pf, err := Poles(full)
	if err != nil {
		return ""
	}
	pr, err := Poles(red)
	if err != nil {
		return ""
	}
	zs := polyRootsMonic(num, ts)
	if len(zs) == 0 {
		return ""
	}
	used := make([]bool, len(pf))
	for _, r := range pr {
		best, bi := math.Inf(1), -1
		for i, p := range pf {
			if d := cmplx.Abs(p - r); !used[i] && d < best {
				best, bi = d, i
			}
		}
		if bi >= 0 {
			used[bi] = true
		}
	}
	for i, p := range pf {
		if used[i] || imag(p) < 0 {
			continue
		}
		best, at := math.Inf(1), complex128(0)
		for _, z := range zs {
			if d := cmplx.Abs(z - p); d < best {
				best, at = d, z
			}
		}
		if best > 10*(rootRadius(den, p, pf)+rootRadius(num, at, zs)) {
			return fmt.Sprintf("the pole at %s was cancelled against the zero at %s, %.2g away, more than rounding of the coefficients explains: an approximate cancellation decided by the rank tolerance, which the matrices it came from may not make", fmtComplexShort(p), fmtComplexShort(at), best)
		}
	}
	return ""
}
