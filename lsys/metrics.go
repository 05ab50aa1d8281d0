package lsys

import (
	"errors"
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
	Peak            float64 // the extreme value in the direction of the change
	PeakTime        float64
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
		return nil, errors.New("metrics: the response has fewer than two samples")
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
			fillMetric(&row, r.T, y)
			out.Rows = append(out.Rows, row)
		}
	}
	return out, nil
}

func fillMetric(row *Metric, t, y []float64) {
	y0, yss := row.Initial, row.Steady
	change := yss - y0
	nan := math.NaN()
	if change == 0 || math.Abs(change) <= 1e-12*math.Max(math.Abs(yss), math.Abs(y0)) {
		row.RiseTime, row.SettlingTime, row.Overshoot = nan, nan, nan
		row.Peak, row.PeakTime = y0, 0
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
	// settling: after the last sample outside the 2 % band
	band := 0.02 * math.Abs(change)
	last := -1
	for k := range y {
		if math.Abs(y[k]-yss) > band {
			last = k
		}
	}
	switch {
	case last == -1:
		row.SettlingTime = 0
	case last == len(y)-1:
		row.SettlingTime = nan
	default:
		// interpolate where |y - yss| meets the band between last and last+1
		a, b := math.Abs(y[last]-yss), math.Abs(y[last+1]-yss)
		row.SettlingTime = t[last] + (a-band)/(a-b)*(t[last+1]-t[last])
	}
}
