package lsys

import (
	"context"
	"errors"
	"fmt"
	"math"
	"math/cmplx"
	"sort"
	"strings"

	"gonum.org/v1/gonum/mat"
)

// FrequencyResponse is G(jw) (or G(e^{jwTs}) for sampled systems) on a grid
// of angular frequencies: G[k] is the p x m matrix at W[k], row-major.
type FrequencyResponse struct {
	System  *System
	W       []float64      // rad/s, increasing
	G       [][]complex128 // G[k][i*m+j]: output i, input j
	Inputs  []string
	Outputs []string
	Hz      bool    // display frequencies in Hz
	Nyquist float64 // pi/Ts for sampled systems, else 0
	Rule    string  // how the range and grid were chosen
	// InfiniteDC is set when the gain at zero frequency is infinite (an
	// integrator): polar charts then frame the finite part of the curve.
	InfiniteDC bool
	// Delay is the dead time (s) included exactly as e^(-jwT) in G; 0 if none.
	Delay float64
}

// FrequencyOptions choose the grid; zero values choose it from the modes
// (see Frequency).
type FrequencyOptions struct {
	From, To float64   // rad/s
	Points   int       // points of the base grid (default 20 per decade)
	Grid     []float64 // explicit grid (rad/s, increasing); no refinement
	Hz       bool
	// Delay is a dead time T in seconds in series with every channel,
	// applied exactly: G(jw) e^(-jwT). It holds for sampled systems too
	// (the delay then need not be a whole number of samples).
	Delay float64
	// Progress, when set, is called with the fraction of an explicit grid
	// done (0 to 1) about every 64 frequencies.
	Progress func(done float64)
}

// Frequency evaluates the frequency response of g. A = Q H Q^T is reduced
// to Hessenberg form once; each frequency then costs one O(n^2) complex
// Hessenberg solve per input (Laub 1981, "Efficient multivariable frequency
// response computations", IEEE TAC 26(2)).
//
// Grid rule, when no grid is given: the range runs from a decade below the
// slowest nonzero pole or zero to a decade above the fastest (|s|, sampled
// systems through s = log(z)/Ts; zeros for models up to 200 states),
// widened to whole decades, at least 3 decades; sampled systems stop at the
// Nyquist frequency pi/Ts. Where some channel's gain still heads toward
// 0 dB at an edge (as beside an integrator), the range is widened by whole
// decades, at most 3 each way, until the crossing is in it (see
// bracketRange). The base grid has 20 points per decade plus the
// natural frequency of every pole and zero with damping below 0.5; then every interval across which some channel's magnitude
// changes by more than 1 dB or its phase by more than 5 degrees is bisected
// (geometrically), up to 8 times and 5,000 points in all.
func Frequency(ctx context.Context, g *System, opt FrequencyOptions) (*FrequencyResponse, error) {
	return frequency(ctx, g, opt, false)
}

// frequency is Frequency; loop asks the automatic range to bracket the
// phase crossovers of a SISO loop too (see bracketRange).
func frequency(ctx context.Context, g *System, opt FrequencyOptions, loop bool) (*FrequencyResponse, error) {
	if g == nil {
		return nil, errors.New("the system is missing")
	}
	if g.M() == 0 || g.P() == 0 {
		return nil, errors.New("the system has no inputs or no outputs, so no frequency response")
	}
	f := &FrequencyResponse{System: g, Inputs: append([]string(nil), g.InputNames...), Outputs: append([]string(nil), g.OutputNames...), Hz: opt.Hz}
	if g.Sampled() {
		f.Nyquist = math.Pi / g.Ts
	}
	if _, finite := DCGain(g); !finite {
		f.InfiniteDC = true
	}
	if err := checkDelay(opt.Delay); err != nil {
		return nil, err
	}
	ev := newFreqEval(g)
	ev.delay, f.Delay = opt.Delay, opt.Delay
	if opt.Grid != nil {
		for i, w := range opt.Grid {
			if !(w >= 0) || math.IsInf(w, 0) || i > 0 && !(w > opt.Grid[i-1]) {
				return nil, fmt.Errorf("the grid must be finite, >= 0 and increasing (entry %d is %g)", i+1, w)
			}
		}
		f.W = append([]float64(nil), opt.Grid...)
		f.Rule = "grid given"
		f.G = make([][]complex128, len(f.W))
		for k, w := range f.W {
			if k&63 == 0 {
				if err := ctx.Err(); err != nil {
					return nil, fmt.Errorf("interrupted: %w", err)
				}
				if opt.Progress != nil {
					opt.Progress(float64(k) / float64(len(f.W)))
				}
			}
			v, err := ev.at(w)
			if err != nil {
				return nil, fmt.Errorf("at %g rad/s: %w", w, err)
			}
			f.G[k] = v
		}
		return f, nil
	}
	lo, hi, extra, rule := autoRange(g)
	if opt.From == 0 && opt.To == 0 {
		maxDec := 3
		if loop {
			maxDec = 6
		}
		// With a dead time the range stops where it has turned the phase
		// by delayTop rad (about 5 turns): beyond, the grid would need
		// ever more points to follow it, and nothing of the loop is left
		// to see. Widening stops there too, as at the Nyquist frequency.
		limit, top := f.Nyquist, 0.0
		if opt.Delay > 0 {
			top = math.Max(delayTop/opt.Delay, lo*10)
			if limit == 0 || top < limit {
				limit = top
			}
		}
		var down, up int
		lo, hi, down, up = bracketRange(ev, lo, hi, limit, loop, maxDec)
		rule += widenedRule(down, up, loop)
		if top > 0 && hi >= top*(1-1e-12) && (f.Nyquist == 0 || top < f.Nyquist) {
			hi = top
			rule += fmt.Sprintf("; stopped at %.4g rad/s, where the dead time has turned the phase by %.3g rad", hi, hi*opt.Delay)
		}
	}
	if opt.From != 0 || opt.To != 0 {
		if opt.From > 0 {
			lo = opt.From
		}
		if opt.To > 0 {
			hi = opt.To
		}
		if !(hi > lo) || math.IsInf(hi, 0) {
			return nil, fmt.Errorf("the range must satisfy 0 < from < to, got from %g to %g rad/s", lo, hi)
		}
		if d := math.Log10(hi) - math.Log10(lo); d > MaxDecades {
			return nil, fmt.Errorf("the range from %g to %g rad/s spans %.0f decades; at most %d can be charted (20 points a decade, 5,000 points in all): narrow it", lo, hi, d, MaxDecades)
		}
		rule = "range given"
	}
	if f.Nyquist > 0 && hi > f.Nyquist {
		hi = f.Nyquist
	}
	perDecade := 20.0
	dec := math.Log10(hi / lo)
	npts := int(math.Ceil(dec*perDecade)) + 1
	if opt.Points > 1 {
		npts = opt.Points
	}
	var W []float64
	// hi/lo is finite: ranges are at most MaxDecades wide.
	for i := 0; i < npts; i++ {
		W = append(W, lo*math.Pow(hi/lo, float64(i)/float64(npts-1)))
	}
	for _, w := range extra {
		if w > lo && w < hi {
			W = append(W, w)
		}
	}
	sort.Float64s(W)
	W = dedupe(W)
	pts := map[float64][]complex128{}
	eval := func(w float64) ([]complex128, error) {
		if v, ok := pts[w]; ok {
			return v, nil
		}
		v, err := ev.at(w)
		if errors.Is(err, errAtPole) {
			// a pole on the axis: step aside by a relative 1e-9
			v, err = ev.at(w * (1 + 1e-9))
		}
		if err != nil {
			return nil, fmt.Errorf("at %g rad/s: %w", w, err)
		}
		pts[w] = v
		return v, nil
	}
	for _, w := range W {
		if _, err := eval(w); err != nil {
			return nil, err
		}
	}
	for pass := 0; pass < 8 && len(W) < 5000; pass++ {
		if err := ctx.Err(); err != nil {
			return nil, fmt.Errorf("interrupted: %w", err)
		}
		var next []float64
		added := 0
		for k := 0; k < len(W); k++ {
			next = append(next, W[k])
			if k+1 == len(W) || len(W)+added >= 5000 {
				continue
			}
			if coarse(pts[W[k]], pts[W[k+1]]) {
				mid := math.Sqrt(W[k] * W[k+1])
				if W[k] == 0 {
					mid = W[k+1] / 2
				}
				if _, err := eval(mid); err != nil {
					return nil, err
				}
				next = append(next, mid)
				added++
			}
		}
		W = next
		if added == 0 {
			break
		}
	}
	f.W = W
	f.G = make([][]complex128, len(W))
	for k, w := range W {
		f.G[k] = pts[w]
	}
	f.Rule = rule + "; 20 points per decade, refined where the magnitude moves more than 1 dB or the phase more than 5 degrees between points"
	if opt.Delay > 0 {
		f.Rule += fmt.Sprintf("; dead time %.6g s included exactly as e^(-jwT)", opt.Delay)
	}
	return f, nil
}

func dedupe(w []float64) []float64 {
	out := w[:0]
	for i, v := range w {
		if i == 0 || v > out[len(out)-1]*(1+1e-12) {
			out = append(out, v)
		}
	}
	return out
}

// coarse reports whether some channel moves by more than 1 dB or 5 degrees.
func coarse(a, b []complex128) bool {
	for i := range a {
		ma, mb := cabs(a[i]), cabs(b[i])
		if ma == 0 || mb == 0 {
			if ma != mb {
				return true
			}
			continue
		}
		if math.Abs(20*math.Log10(mb/ma)) > 1 {
			return true
		}
		d := cmplx.Phase(b[i]/a[i]) * 180 / math.Pi
		if math.Abs(d) > 5 {
			return true
		}
	}
	return false
}

// autoRange picks the frequency range from the modes (see Frequency).
func autoRange(g *System) (lo, hi float64, extra []float64, rule string) {
	var wmin, wmax float64
	pts := continuousPoles(g)
	// Zeros matter too: a lightly damped pair of zeros is an
	// anti-resonance the grid must resolve. They are computed for models up
	// to 200 states (the pencil reduction is cubic).
	if g.N() > 0 && g.N() <= 200 {
		if zs, err := Zeros(g, 0); err == nil {
			thr := negligible(g.A)
			for _, z := range zs.Invariant {
				switch {
				case g.Sampled() && z == 0:
					continue
				case g.Sampled() && cmplx.Abs(z-1) <= thr, !g.Sampled() && cmplx.Abs(z) <= thr:
					z = 0
				case g.Sampled():
					z = cmplx.Log(z) / complex(g.Ts, 0)
				}
				pts = append(pts, z)
			}
		}
	}
	for _, s := range pts {
		w := cmplx.Abs(s)
		if w == 0 || math.IsInf(w, 0) || math.IsNaN(w) {
			continue
		}
		if wmin == 0 || w < wmin {
			wmin = w
		}
		wmax = math.Max(wmax, w)
		if z := -real(s) / w; z < 0.5 {
			extra = append(extra, w, math.Abs(imag(s)))
		}
	}
	rule = "range: a decade beyond the slowest and fastest poles and zeros"
	if wmax == 0 {
		wmin, wmax = 1, 1
		rule = "range: no nonzero pole or zero, 0.1 to 100 rad/s"
	}
	// the 1e-9 keeps a pole computed a rounding below 1 rad/s from
	// costing a whole decade
	lo = math.Pow(10, math.Floor(math.Log10(wmin/10)+1e-9))
	hi = math.Pow(10, math.Ceil(math.Log10(wmax*10)-1e-9))
	if hi/lo < 1000 {
		hi = lo * 1000
		for hi < wmax*10 {
			hi *= 10
		}
	}
	if g.Sampled() {
		ny := math.Pi / g.Ts
		hi = ny
		if lo >= ny/1000 {
			lo = math.Pow(10, math.Floor(math.Log10(ny/1000)))
		}
		rule += "; up to the Nyquist frequency"
	}
	return lo, hi, extra, rule
}

// bracketRange widens [lo, hi] by whole decades, at most maxDec each way,
// while something of interest lies beyond an edge: some channel's gain
// heads toward 0 dB there (at more than 1 dB per decade, as beside an
// integrator, where |G| grows without bound), or, with phase set, the
// phase of a SISO loop still moves toward the next odd multiple of 180
// degrees fast enough to reach it. Beyond its last corner the slope of a
// rational function's phase falls about tenfold per decade, so what is
// left to come is about slope/ln(10); we widen while the distance is below
// the slope (degrees per decade, measured over the last tenth of a decade).
// For a loop, an edge where |L| is within 0.5 dB of 1 and still moving
// also widens, so that no crossover sits on the frame of the chart.
// Sampled systems never go above the Nyquist frequency.
func bracketRange(ev *freqEval, lo, hi, nyquist float64, phase bool, maxDec int) (float64, float64, int, int) {
	down, up := 0, 0
	for down < maxDec && beyondEdge(ev, lo, -1, phase) {
		lo /= 10
		down++
	}
	for up < maxDec && (nyquist == 0 || hi < nyquist) && beyondEdge(ev, hi, 1, phase) {
		hi *= 10
		up++
	}
	if nyquist > 0 && hi > nyquist {
		hi = nyquist
	}
	return lo, hi, down, up
}

func widenedRule(down, up int, loop bool) string {
	if down == 0 && up == 0 {
		return ""
	}
	what := "the 0 dB crossings"
	if loop {
		what = "the gain and phase crossovers"
	}
	var parts []string
	if down > 0 {
		parts = append(parts, fmt.Sprintf("%d decade(s) lower", down))
	}
	if up > 0 {
		parts = append(parts, fmt.Sprintf("%d decade(s) higher", up))
	}
	return "; widened " + strings.Join(parts, " and ") + " to take in " + what
}

// beyondEdge reports whether a 0 dB crossing (or, with phase, a phase
// crossover of channel (0,0)) seems to lie beyond w in direction dir (-1
// below, +1 above): see bracketRange.
func beyondEdge(ev *freqEval, w float64, dir float64, phase bool) bool {
	const step = 0.1 // decades
	a, err1 := ev.at(w)
	b, err2 := ev.at(w * math.Pow(10, dir*step))
	if err1 != nil || err2 != nil || !(w > 0) {
		return false
	}
	for i := range a {
		ma, mb := cabs(a[i]), cabs(b[i])
		if ma == 0 || mb == 0 || math.IsInf(ma, 0) || math.IsInf(mb, 0) {
			continue
		}
		m0 := 20 * math.Log10(ma)
		s := (20*math.Log10(mb) - m0) / step
		if m0*s < 0 && math.Abs(s) > 1 {
			return true
		}
		// a loop that crosses 0 dB right at the edge: widen once more so
		// the chart shows the crossover inside, not on its frame
		if phase && math.Abs(m0) < 0.5 && math.Abs(s) > 1 {
			return true
		}
	}
	if !phase || cabs(a[0]) == 0 || cabs(b[0]) == 0 {
		return false
	}
	p0 := cmplx.Phase(a[0]) * 180 / math.Pi
	p1 := p0 + cmplx.Phase(b[0]/a[0])*180/math.Pi
	ps := (p1 - p0) / step
	if math.Abs(ps) <= 1 {
		return false
	}
	// distance from p0 to the next odd multiple of 180 in the direction of travel
	var target float64
	if ps > 0 {
		target = 360*math.Floor((p0+180)/360) + 180
	} else {
		target = 360*math.Ceil((p0-180)/360) - 180
	}
	return math.Abs(target-p0) < math.Abs(ps)
}

// freqEval evaluates G at angular frequencies through the Hessenberg form.
type freqEval struct {
	h     *hessenberg
	ts    float64
	delay float64 // dead time in s, applied exactly as e^(-jw delay)
}

// delayTop is w*T at the upper end of an automatic range with a dead time T.
const delayTop = 30

func checkDelay(T float64) error {
	if !(T >= 0) || math.IsInf(T, 0) {
		return fmt.Errorf("the dead time must be a finite number >= 0 s, got %v", T)
	}
	return nil
}

func newFreqEval(g *System) *freqEval { return &freqEval{h: newHessenberg(g), ts: g.Ts} }

func (e *freqEval) point(w float64) complex128 {
	if e.ts > 0 {
		return cmplx.Exp(complex(0, w*e.ts))
	}
	return complex(0, w)
}

func (e *freqEval) at(w float64) ([]complex128, error) {
	out := make([]complex128, e.h.p*e.h.m)
	if err := e.h.at(e.point(w), out); err != nil {
		return nil, err
	}
	if e.delay > 0 {
		d := cmplx.Exp(complex(0, -w*e.delay))
		for i := range out {
			out[i] *= d
		}
	}
	return out, nil
}

// GainAt returns G at the angular frequency w (rad/s): G(jw), or
// G(e^{jwTs}) for a sampled system, as a p x m row-major slice.
func GainAt(g *System, w float64) ([]complex128, error) {
	if g == nil {
		return nil, errors.New("the system is missing")
	}
	if math.IsNaN(w) || math.IsInf(w, 0) || w < 0 {
		return nil, fmt.Errorf("the frequency must be a finite number >= 0 rad/s, got %v", w)
	}
	v, err := newFreqEval(g).at(w)
	if err != nil {
		return nil, fmt.Errorf("at %g rad/s: %w (the system has a pole there)", w, err)
	}
	return v, nil
}

// Magnitude returns |G| of channel (i, j) along the grid.
func (f *FrequencyResponse) Magnitude(i, j int) []float64 {
	m := len(f.Inputs)
	out := make([]float64, len(f.W))
	for k := range f.W {
		out[k] = cabs(f.G[k][i*m+j])
	}
	return out
}

// Phase returns the unwrapped phase of channel (i, j) in degrees: each
// point within 180 degrees of its neighbour, the first one on the branch
// nearest -90 n degrees, where -20 n dB/decade is the magnitude slope over
// the first two frequencies. For a minimum-phase response that is the
// low-frequency asymptote of Bode's gain-phase relation (Bode, Network
// Analysis and Feedback Amplifier Design, 1945, Ch. 14), so a loop with
// n integrators starts near -90 n degrees (a triple integrator at -270,
// not +90). Without a usable slope the first point lies in (-180, 180].
func (f *FrequencyResponse) Phase(i, j int) []float64 {
	m := len(f.Inputs)
	out := make([]float64, len(f.W))
	start := 0.0
	if len(f.W) >= 2 && f.W[0] > 0 && f.W[1] > f.W[0] {
		a, b := cabs(f.G[0][i*m+j]), cabs(f.G[1][i*m+j])
		if a > 0 && b > 0 && !math.IsInf(a, 0) && !math.IsInf(b, 0) {
			slope := math.Log(b/a) / math.Log(f.W[1]/f.W[0])
			start = -90 * math.Round(-slope)
		}
	}
	for k := range f.W {
		d := cmplx.Phase(f.G[k][i*m+j]) * 180 / math.Pi
		if k > 0 {
			d += 360 * math.Round((out[k-1]-d)/360)
		} else if start != 0 {
			d += 360 * math.Round((start-d)/360)
		}
		out[k] = d
	}
	return out
}

// SingularValues are the singular values of G(jw) against frequency.
type SingularValues struct {
	Frequency *FrequencyResponse
	S         [][]float64 // S[k]: min(p, m) values at W[k], decreasing
}

// Singular returns the singular values of f.G at every frequency. A complex
// p x m matrix M = X + iY has the singular values of the real
// 2p x 2m matrix [[X, -Y], [Y, X]], each twice (common practice), so gonum's
// real SVD suffices.
func Singular(f *FrequencyResponse) (*SingularValues, error) {
	p, m := len(f.Outputs), len(f.Inputs)
	r := min(p, m)
	out := &SingularValues{Frequency: f, S: make([][]float64, len(f.W))}
	R := mat.NewDense(2*p, 2*m, nil)
	for k := range f.W {
		for i := 0; i < p; i++ {
			for j := 0; j < m; j++ {
				v := f.G[k][i*m+j]
				R.Set(i, j, real(v))
				R.Set(i, j+m, -imag(v))
				R.Set(i+p, j, imag(v))
				R.Set(i+p, j+m, real(v))
			}
		}
		var svd mat.SVD
		if !svd.Factorize(R, mat.SVDNone) {
			return nil, fmt.Errorf("the SVD failed at %g rad/s", f.W[k])
		}
		sv := svd.Values(nil)
		s := make([]float64, r)
		for i := range s {
			s[i] = sv[2*i]
		}
		out.S[k] = s
	}
	return out, nil
}

// MaxDecades is the widest frequency range a response is computed over.
const MaxDecades = 100
