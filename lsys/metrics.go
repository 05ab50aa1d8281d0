package lsys

import (
	"errors"
	"fmt"
	"math"
)

// Metric holds the usual figures of one output's response on one channel.
// Times are in seconds; NaN marks a figure the response does not define,
// and Undefined says why for each.
type Metric struct {
	Output, Channel string
	Initial         float64 // y(0)
	Steady          float64 // final value: the steady-state gain of a stable step response, else the last sample
	SteadyFromGain  bool    // Steady is the exact steady-state gain, not the last sample
	RiseTime        float64 // 10 % to 90 % of the change
	SettlingTime    float64 // last entry into the band of 2 % of the change
	Overshoot       float64 // % of the change beyond the steady value (0 if none)
	Peak            float64 // the extreme value beyond the steady value (or the largest deviation, see Note); NaN without overshoot
	PeakTime        float64
	// Note explains figures measured differently, as for a response that
	// returns to where it started (a disturbance rejected).
	Note string
	// Undefined lists each figure left NaN with the reason, in the order
	// of the fields above.
	Undefined []Undefined
}

// Undefined is a figure a response does not define, and why.
type Undefined struct{ Figure, Reason string }

// Metrics is the result of ResponseMetrics: one row per output and channel.
type Metrics struct {
	Response *Response
	Rows     []Metric
	// Method says how times were read: refined on the exact continuous
	// response between samples, or at the samples of a sampled system.
	Method string
}

// crossTol is the relative width to which crossing and peak times are
// refined on the exact response: far below the four digits shown.
const crossTol = 1e-12

// ResponseMetrics computes rise time (10-90 %), settling time (2 % band),
// overshoot, peak and peak time and the steady value of every output and
// channel of r. The definitions are the usual ones (Ogata, Modern Control
// Engineering, 5th ed., 2010, Section 5-3), measured on the computed
// response rather than from the second-order formulas.
//
// For a continuous system the samples only bracket each figure: crossing
// times (10 %, 90 %, the edge of the 2 % band) are then found by
// bisection on the exact response between the two samples around them
// (Response.ValueAt: the block exponential, Van Loan 1978), to 1e-12 of the
// time, and the peak by golden-section search between the samples beside
// the largest one (to about 1e-8 of the time, the square root of the
// rounding unit, as the response is flat at its peak); sample maxima after
// the last exit from the band that come within 20 % of its edge are
// refined too, so an excursion between samples is not missed. A sampled
// system holds its values between samples: figures are sample times.
func ResponseMetrics(r *Response) (*Metrics, error) {
	if r == nil || len(r.T) < 2 {
		return nil, errors.New("the response has fewer than two samples")
	}
	out := &Metrics{Response: r}
	if r.Sampled {
		out.Method = "sampled system: times are sample times (values hold between samples)"
	} else {
		out.Method = fmt.Sprintf("times refined on the exact continuous response between samples (crossings to %g of the time, peaks by golden-section search)", crossTol)
	}
	var gain []float64
	p := len(r.Outputs)
	if r.Kind == "step" && Stable(r.System) {
		if G, ok := DCGain(r.System); ok && G != nil {
			_, m := G.Dims()
			gain = make([]float64, p*m)
			for i := 0; i < p; i++ {
				for j := 0; j < m; j++ {
					gain[i*m+j] = G.At(i, j)
				}
			}
		}
	}
	for i := range r.Y {
		for c := range r.Y[i] {
			y := r.Y[i][c]
			row := Metric{Output: r.Outputs[i], Channel: r.Channels[c], Initial: y[0], Steady: y[len(y)-1]}
			if gain != nil {
				row.Steady = gain[i*len(r.Channels)+c]
				row.SteadyFromGain = true
			}
			// the level before the input: 0 from rest (a step or impulse
			// with a direct feedthrough jumps at t = 0), y(0) for a
			// response from an initial state
			base := 0.0
			if r.Kind == "initial" {
				base = y[0]
			}
			ii, cc := i, c
			tr := trace{t: r.T, y: y, sampled: r.Sampled, exact: func(t float64) (float64, bool) { return r.ValueAt(ii, cc, t) }}
			fillMetric(&row, tr, base)
			out.Rows = append(out.Rows, row)
		}
	}
	return out, nil
}

// trace is one output's samples with, for a continuous system, its exact
// value between them.
type trace struct {
	t, y    []float64
	sampled bool
	exact   func(t float64) (float64, bool)
}

// at is the response at time t (t[k] <= t <= t[k+1]); the linear
// interpolation of the samples if the exact value is not available.
func (tr trace) at(k int, t float64) float64 {
	if tr.exact != nil {
		if v, ok := tr.exact(t); ok {
			return v
		}
	}
	if t <= tr.t[k] {
		return tr.y[k]
	}
	return tr.y[k] + (t-tr.t[k])/(tr.t[k+1]-tr.t[k])*(tr.y[k+1]-tr.y[k])
}

// root finds where fn of the response changes sign between a and t[k+1]
// (t[k] <= a), by bisection to crossTol of the time. On a sampled system
// the value holds until the next sample: the crossing is t[k+1].
func (tr trace) root(k int, a float64, fn func(v float64) float64) float64 {
	if tr.sampled {
		return tr.t[k+1]
	}
	b := tr.t[k+1]
	fa := fn(tr.at(k, a))
	if fa == 0 {
		return a
	}
	for i := 0; i < 200 && b-a > crossTol*math.Max(b, 1e-300); i++ {
		mid := a + (b-a)/2
		fm := fn(tr.at(k, mid))
		if fm == 0 {
			return mid
		}
		if (fm > 0) == (fa > 0) {
			a, fa = mid, fm
		} else {
			b = mid
		}
	}
	return a + (b-a)/2
}

// peak maximises dir*y between t[k-1] and t[k+1] by golden-section search
// (unimodal there: the sample k is the largest of the three); yp is the
// value of the response there.
func (tr trace) peak(k int, dir float64) (tp, yp float64) {
	tp, yp = tr.t[k], tr.y[k]
	if tr.sampled || k == 0 || k == len(tr.t)-1 {
		return
	}
	val := func(t float64) float64 {
		j := k - 1
		if t >= tr.t[k] {
			j = k
		}
		return dir * tr.at(j, t)
	}
	a, b := tr.t[k-1], tr.t[k+1]
	g := (math.Sqrt(5) - 1) / 2
	c, d := b-g*(b-a), a+g*(b-a)
	fc, fd := val(c), val(d)
	for i := 0; i < 200 && b-a > 1e-10*b; i++ {
		if fc > fd {
			b, d, fd = d, c, fc
			c = b - g*(b-a)
			fc = val(c)
		} else {
			a, c, fc = c, d, fd
			d = a + g*(b-a)
			fd = val(d)
		}
	}
	if t := a + (b-a)/2; val(t) > dir*yp {
		tp, yp = t, dir*val(t)
	}
	return
}

// returnRatio is the largest net change, as a fraction of the largest
// deviation from the start, for which a response counts as returning to
// where it started: then rise time and overshoot (fractions of the change)
// mean nothing. 2 %, the settling band (common practice).
const returnRatio = 0.02

func fillMetric(row *Metric, tr trace, base float64) {
	t, y := tr.t, tr.y
	y0, yss := row.Initial, row.Steady
	change := yss - y0
	nan := math.NaN()
	na := func(fig, why string) { row.Undefined = append(row.Undefined, Undefined{fig, why}) }
	// the largest deviation from the level before the input, with its sign
	kd := 0
	for k := range y {
		if math.Abs(y[k]-base) > math.Abs(y[kd]-base) {
			kd = k
		}
	}
	dev := y[kd] - base
	if dev == 0 || math.Abs(dev) <= 1e-12*math.Max(math.Abs(yss), math.Abs(base)) {
		row.RiseTime, row.SettlingTime, row.Overshoot = nan, nan, nan
		row.Peak, row.PeakTime = nan, nan
		row.Note = "the response does not move"
		for _, f := range []string{"rise time", "settling time", "overshoot", "peak"} {
			na(f, "the response does not move")
		}
		return
	}
	settleOr := func() {
		row.SettlingTime = settle(tr, yss, returnRatio*math.Abs(dev))
		if math.IsNaN(row.SettlingTime) {
			na("settling time", "outside the 2 % band at the end of the horizon")
		}
	}
	if math.Abs(yss-base) <= returnRatio*math.Abs(dev) {
		// A response that comes back (a rejected disturbance, an impulse
		// response): the peak is the largest deviation, settling is the
		// last entry into 2 % of it around the final value.
		row.RiseTime, row.Overshoot = nan, nan
		dir := math.Copysign(1, dev)
		row.PeakTime, row.Peak = tr.peak(kd, dir)
		row.Note = fmt.Sprintf("net change %.3g, under %g %% of the largest deviation %.4g at t = %.4g s: peak is the largest deviation; settling is into 2 %% of it",
			yss-base, 100*returnRatio, row.Peak-base, row.PeakTime)
		na("rise time", "the response returns to where it started")
		na("overshoot", "the response returns to where it started")
		settleOr()
		return
	}
	if math.Abs(change) <= 1e-12*math.Max(math.Abs(yss), math.Abs(y0)) {
		// it jumps at t = 0 (feedthrough) and stays: nothing rises
		row.RiseTime, row.Overshoot = nan, nan
		dir := math.Copysign(1, y[kd]-yss)
		row.PeakTime, row.Peak = tr.peak(kd, dir)
		na("rise time", "the final value is reached at t = 0 (direct feedthrough)")
		na("overshoot", "the final value is reached at t = 0 (direct feedthrough)")
		settleOr()
		return
	}
	dir := math.Copysign(1, change)
	// normalized progress: 0 at start, 1 at the steady value
	prog := func(v float64) float64 { return (v - y0) / change }
	cross := func(level float64) float64 {
		for k := 1; k < len(y); k++ {
			if prog(y[k]) >= level {
				return tr.root(k-1, t[k-1], func(v float64) float64 { return prog(v) - level })
			}
		}
		return nan
	}
	t10 := cross(0.1)
	t90 := cross(0.9)
	row.RiseTime = t90 - t10
	if math.IsNaN(row.RiseTime) {
		na("rise time", "the response does not reach 90 % of the change within the horizon")
	}
	// peak in the direction of the change
	kp := 0
	for k := range y {
		if dir*(y[k]-y[kp]) > 0 {
			kp = k
		}
	}
	tp, yp := tr.peak(kp, dir)
	row.Overshoot = math.Max(0, 100*dir*(yp-yss)/math.Abs(change))
	switch {
	case dir*(yp-yss) <= 1e-9*math.Abs(change):
		row.Overshoot, row.Peak, row.PeakTime = 0, nan, nan
		na("peak", "no overshoot: the response does not pass its final value")
	case kp == len(y)-1:
		row.Peak, row.PeakTime = nan, nan
		na("peak", "the largest value is at the end of the horizon, not a peak")
	default:
		row.Peak, row.PeakTime = yp, tp
	}
	row.SettlingTime = settle(tr, yss, 0.02*math.Abs(change))
	if math.IsNaN(row.SettlingTime) {
		na("settling time", "outside the 2 % band at the end of the horizon")
	}
}

// settle is the time of the last entry of y into the band |y - yss| <= band,
// 0 if it never leaves, NaN if it is outside at the end. On a continuous
// system the re-entry is found on the exact response, and sample maxima of
// |y - yss| after the last sample outside within 20 % of the band are
// refined in case the response leaves the band between samples.
func settle(tr trace, yss, band float64) float64 {
	t, y := tr.t, tr.y
	last := -1
	for k := range y {
		if math.Abs(y[k]-yss) > band {
			last = k
		}
	}
	if last == len(y)-1 {
		return math.NaN()
	}
	fn := func(v float64) float64 { return math.Abs(v-yss) - band }
	if tr.sampled {
		if last == -1 {
			return 0
		}
		return t[last+1]
	}
	at := 0.0
	if last >= 0 {
		at = tr.root(last, t[last], fn)
	}
	for k := max(last+1, 1); k < len(y)-1; k++ {
		d := math.Abs(y[k] - yss)
		if d < 0.8*band || d < math.Abs(y[k-1]-yss) || d < math.Abs(y[k+1]-yss) {
			continue
		}
		dir := math.Copysign(1, y[k]-yss)
		tp, v := tr.peak(k, dir)
		if dir*(v-yss) > band {
			// out of the band between samples: it re-enters after tp
			j := k
			if tp < t[k] {
				j = k - 1
			}
			at = tr.root(j, tp, fn)
		}
	}
	return at
}
