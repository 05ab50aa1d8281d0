package lsys

import (
	"fmt"
	"math"
	"sort"

	"gonum.org/v1/gonum/mat"
)

// The response of x' = Ax + Bu over an interval on which u is constant or
// linear in time is exact through one block exponential (Van Loan 1978,
// "Computing integrals involving the matrix exponential", IEEE Trans.
// Autom. Control 23(3)): e^{A h}, int_0^h e^{As} ds B and the first-order
// term. A signal that switches or bends between samples (a held table, a
// delayed step, a table's rows) is therefore propagated piece by piece,
// from breakpoint to breakpoint, and stays exact between samples.

// breakSnap is the fraction of a step within which a breakpoint counts as
// lying on the sample: it moves the switch by at most 1e-9 step, far
// below any digit shown, and spares an exponential of a length ~1e-17.
const breakSnap = 1e-9

// maxPieceCache bounds the exponentials kept per response (one per
// distinct piece length); past it the cache starts afresh.
const maxPieceCache = 4096

type pieceMats struct{ Phi, G1, G2 *mat.Dense }

// piecewise propagates the state of a continuous system driven by a signal
// exactly across the signal's breakpoints.
type piecewise struct {
	g      *System
	u      Signal
	held   bool      // the input is constant on each piece (a held table, a step)
	breaks []float64 // sorted times where the signal jumps or bends
	cache  map[float64]pieceMats
	ua, ub *mat.VecDense
	tmp    *mat.VecDense
}

func newPiecewise(g *System, u Signal) *piecewise {
	m := g.M()
	pw := &piecewise{g: g, u: u, cache: map[float64]pieceMats{},
		held: u.Kind == "step" || u.Kind == "table" && u.Hold == HoldZeroOrder,
		ua:   mat.NewVecDense(m, nil), ub: mat.NewVecDense(m, nil), tmp: mat.NewVecDense(max(g.N(), 1), nil)}
	if u.Delay > 0 {
		pw.breaks = append(pw.breaks, u.Delay)
	}
	if u.Kind == "table" {
		for _, t := range u.T {
			if tt := t + u.Delay; tt > 0 {
				pw.breaks = append(pw.breaks, tt)
			}
		}
	}
	sort.Float64s(pw.breaks)
	return pw
}

// mats returns the exponentials for a piece of length h.
func (pw *piecewise) mats(h float64) (pieceMats, error) {
	if pm, ok := pw.cache[h]; ok {
		return pm, nil
	}
	if len(pw.cache) >= maxPieceCache {
		pw.cache = map[float64]pieceMats{}
	}
	var pm pieceMats
	var err error
	if pw.held {
		pm.Phi, pm.G1, err = zohPair(pw.g.A, pw.g.B, h)
	} else {
		pm.Phi, pm.G1, pm.G2, err = fohTriple(pw.g.A, pw.g.B, h)
	}
	if err != nil {
		return pm, err
	}
	pw.cache[h] = pm
	return pm, nil
}

// input fills v with the input vector at time t.
func (pw *piecewise) input(v *mat.VecDense, t float64) error {
	m := pw.g.M()
	for j := 0; j < m; j++ {
		ch := 0
		if pw.u.Channels() == m {
			ch = j
		}
		x, err := pw.u.At(t, ch)
		if err != nil {
			return fmt.Errorf("input at t = %g s: %w", t, err)
		}
		v.SetVec(j, x)
	}
	return nil
}

// advance propagates x from time a to time b (a < b), exactly across every
// breakpoint of the input inside (a, b). step, when > 0, is the grid step
// b - a stands for, so whole steps share one exponential.
func (pw *piecewise) advance(x *mat.VecDense, a, b, step float64) error {
	snap := breakSnap * (b - a)
	i := sort.SearchFloat64s(pw.breaks, a+snap)
	lo := a
	for ; i < len(pw.breaks) && pw.breaks[i] < b-snap; i++ {
		if err := pw.piece(x, lo, pw.breaks[i], 0); err != nil {
			return err
		}
		lo = pw.breaks[i]
	}
	if lo != a {
		step = 0
	}
	return pw.piece(x, lo, b, step)
}

// piece propagates x over [a, b], on which the input is constant (held) or
// linear: a held value is read at the middle of the piece (so a breakpoint
// snapped onto a sample switches there), a linear one at its two ends
// (after the delay: the signal is 0 before it).
func (pw *piecewise) piece(x *mat.VecDense, a, b, step float64) error {
	h := b - a
	if step > 0 {
		h = step
	}
	pm, err := pw.mats(h)
	if err != nil {
		return fmt.Errorf("the transition over %g s: %w", h, err)
	}
	mid := a + (b-a)/2
	pw.tmp.MulVec(pm.Phi, x)
	x.CopyVec(pw.tmp)
	if mid < pw.u.Delay {
		return nil // no input yet
	}
	if pw.held {
		if err := pw.input(pw.ua, mid); err != nil {
			return err
		}
		pw.tmp.MulVec(pm.G1, pw.ua)
		x.AddVec(x, pw.tmp)
		return nil
	}
	if err := pw.input(pw.ua, math.Max(a, pw.u.Delay)); err != nil {
		return err
	}
	if err := pw.input(pw.ub, b); err != nil {
		return err
	}
	pw.tmp.MulVec(pm.G1, pw.ua)
	x.AddVec(x, pw.tmp)
	pw.ub.SubVec(pw.ub, pw.ua)
	pw.tmp.MulVec(pm.G2, pw.ub)
	x.AddVec(x, pw.tmp)
	return nil
}

// sampledTimingError is, for a sampled system driven by u, the largest
// time by which a switch of a held input (a held table's rows, a step's
// start) lies before the sample that first reads it: the system sees the
// input only at its samples. Linear tables and other signals are sampled
// as they are and report 0.
func sampledTimingError(u Signal, ts float64, until float64) (worst, at float64) {
	if !(u.Kind == "step" || u.Kind == "table" && u.Hold == HoldZeroOrder) {
		return 0, 0
	}
	times := []float64{u.Delay}
	if u.Kind == "table" {
		for _, t := range u.T[1:] {
			times = append(times, t+u.Delay)
		}
	}
	for _, t := range times {
		if t <= 0 || t > until {
			continue
		}
		k := math.Ceil(t/ts - breakSnap)
		if e := k*ts - t; e > breakSnap*ts && e > worst {
			worst, at = e, t
		}
	}
	return worst, at
}

// ValueAt returns output i on channel c at time t (0 <= t <= the horizon)
// on the exact continuous response, for refining figures between samples:
// a step response is C int_0^t e^{As} ds b + d, an impulse response
// C e^{At} b, a free response C e^{At} x0 (one block exponential each, Van
// Loan 1978); an input response propagates the state kept at the sample
// before t exactly to t (see piecewise). ok is false for a sampled system
// (its values hold between samples) or when t is outside the horizon.
func (r *Response) ValueAt(i, c int, t float64) (v float64, ok bool) {
	if r == nil || r.Sampled || len(r.T) == 0 || !(t >= 0 && t <= r.T[len(r.T)-1]) {
		return math.NaN(), false
	}
	g := r.System
	n := g.N()
	k := sort.SearchFloat64s(r.T, t)
	if k < len(r.T) && r.T[k] == t {
		return r.Y[i][c][k], true
	}
	if n == 0 {
		return r.Y[i][c][max(k-1, 0)], r.Kind != "input"
	}
	ci := mat.NewVecDense(n, nil)
	for j := 0; j < n; j++ {
		ci.SetVec(j, g.C.At(i, j))
	}
	switch r.Kind {
	case "step":
		_, gam, err := zohPair(g.A, mat.DenseCopyOf(g.B.Slice(0, n, c, c+1)), t)
		if err != nil {
			return math.NaN(), false
		}
		return mat.Dot(ci, gam.ColView(0)) + g.D.At(i, c), true
	case "impulse", "initial":
		E, err := Expm(scale(t, g.A))
		if err != nil {
			return math.NaN(), false
		}
		var x0 mat.Vector = g.B.ColView(c)
		if r.Kind == "initial" {
			if len(r.x0) != n {
				return math.NaN(), false
			}
			x0 = mat.NewVecDense(n, append([]float64(nil), r.x0...))
		}
		var x mat.VecDense
		x.MulVec(E, x0)
		return mat.Dot(ci, &x), true
	case "input":
		if r.signal == nil || len(r.states) < len(r.T)*n {
			return math.NaN(), false
		}
		k-- // the sample before t
		x := mat.NewVecDense(n, append([]float64(nil), r.states[k*n:(k+1)*n]...))
		pw := newPiecewise(g, *r.signal)
		if err := pw.advance(x, r.T[k], t, 0); err != nil {
			return math.NaN(), false
		}
		u := mat.NewVecDense(g.M(), nil)
		if err := pw.input(u, t); err != nil {
			return math.NaN(), false
		}
		v := mat.Dot(ci, x)
		for j := 0; j < g.M(); j++ {
			v += g.D.At(i, j) * u.AtVec(j)
		}
		return v, true
	}
	return math.NaN(), false
}
