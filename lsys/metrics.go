package lsys

import (
	"errors"
	"fmt"
	"math"
)

// Metric holds the usual figures of one output's response on one channel.
// Times are in seconds; NaN marks a figure the response does not define
// (for example a settling time when the response leaves the band at the
// end of the horizon).
type Metric struct {
	Output, Channel string
	Initial         float64 // y(0)
	Steady          float64 // final value: the steady-state gain of a stable step response, else the last sample
	SteadyFromGain  bool    // Steady is the exact steady-state gain, not the last sample
	RiseTime        float64 // 10 % to 90 % of the change
	SettlingTime    float64 // last entry into the band of 2 % of the change
	Overshoot       float64 // % of the change beyond the steady value (0 if none)
	Peak            float64 // the extreme value in the direction of the change (or the largest deviation, see Note)
	PeakTime        float64
	// Note explains figures left undefined or measured differently, as for
	// a response that returns to where it started (a disturbance rejected).
	Note string
}

// Metrics is the result of ResponseMetrics: one row per output and channel.
type Metrics struct {
	Response *Response
	Rows     []Metric
}

// ResponseMetrics computes rise time (10-90 %), settling time (2 % band),
// overshoot, peak and peak time and the steady value of every output and
// channel of r. Crossing times are interpolated linearly between samples.
// The definitions are the usual ones (Ogata, Modern Control Engineering,
// 5th ed., 2010, Section 5-3), measured on the computed response rather
// than from the second-order formulas.
func ResponseMetrics(r *Response) (*Metrics, error) {
	if r == nil || len(r.T) < 2 {
		return nil, errors.New("the response has fewer than two samples")
	}
	out := &Metrics{Response: r}
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
			fillMetric(&row, r.T, y, base)
			out.Rows = append(out.Rows, row)
		}
	}
	return out, nil
}

// returnRatio is the largest net change, as a fraction of the largest
// deviation from the start, for which a response counts as returning to
// where it started: then rise time and overshoot (fractions of the change)
// mean nothing. 2 %, the settling band (common practice).
const returnRatio = 0.02

func fillMetric(row *Metric, t, y []float64, base float64) {
	y0, yss := row.Initial, row.Steady
	change := yss - y0
	nan := math.NaN()
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
		row.Peak, row.PeakTime = y0, 0
		row.Note = "the response does not move"
		return
	}
	if math.Abs(yss-base) <= returnRatio*math.Abs(dev) {
		// A response that comes back (a rejected disturbance, an impulse
		// response): the peak is the largest deviation, settling is the
		// last entry into 2 % of it around the final value.
		row.RiseTime, row.Overshoot = nan, nan
		row.Peak, row.PeakTime = y[kd], t[kd]
		row.SettlingTime = settle(t, y, yss, returnRatio*math.Abs(dev))
		row.Note = fmt.Sprintf("returns to where it started (net change %.3g, under %g %% of the largest deviation %.4g at t = %.4g s): rise time and overshoot not defined; peak is the largest deviation; settling is into 2 %% of it",
			yss-base, 100*returnRatio, dev, t[kd])
		return
	}
	if math.Abs(change) <= 1e-12*math.Max(math.Abs(yss), math.Abs(y0)) {
		// it jumps at t = 0 (feedthrough) and stays: nothing rises
		row.RiseTime, row.Overshoot = nan, nan
		row.Peak, row.PeakTime = y[kd], t[kd]
		row.SettlingTime = settle(t, y, yss, returnRatio*math.Abs(dev))
		row.Note = "the final value is reached at t = 0 (direct feedthrough): rise time and overshoot not defined"
		return
	}
	dir := math.Copysign(1, change)
	// normalized progress: 0 at start, 1 at the steady value
	f := func(k int) float64 { return (y[k] - y0) / change }
	cross := func(level float64) float64 {
		for k := 1; k < len(y); k++ {
			if f(k) >= level {
				a, b := f(k-1), f(k)
				if b == a {
					return t[k]
				}
				return t[k-1] + (level-a)/(b-a)*(t[k]-t[k-1])
			}
		}
		return nan
	}
	t10 := cross(0.1)
	t90 := cross(0.9)
	row.RiseTime = t90 - t10
	// peak in the direction of the change
	kp := 0
	for k := range y {
		if dir*(y[k]-y[kp]) > 0 {
			kp = k
		}
	}
	row.Peak, row.PeakTime = y[kp], t[kp]
	row.Overshoot = math.Max(0, 100*dir*(y[kp]-yss)/math.Abs(change))
	row.SettlingTime = settle(t, y, yss, 0.02*math.Abs(change))
}

// settle is the time of the last entry of y into the band |y - yss| <= band
// (interpolated), 0 if it never leaves, NaN if it is outside at the end.
func settle(t, y []float64, yss, band float64) float64 {
	nan := math.NaN()
	last := -1
	for k := range y {
		if math.Abs(y[k]-yss) > band {
			last = k
		}
	}
	switch {
	case last == -1:
		return 0
	case last == len(y)-1:
		return nan
	}
	// interpolate where |y - yss| meets the band between last and last+1
	a, b := math.Abs(y[last]-yss), math.Abs(y[last+1]-yss)
	return t[last] + (a-band)/(a-b)*(t[last+1]-t[last])
}
