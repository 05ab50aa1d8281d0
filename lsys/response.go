package lsys

import (
	"context"
	"errors"
	"fmt"
	"math"
	"math/cmplx"
	"sort"
	"strconv"

	"gonum.org/v1/gonum/mat"
)

// How a table's values go between its rows.
const (
	HoldLinear    = "linear"     // interpolated linearly (the default)
	HoldZeroOrder = "zero-order" // each row held until the next
)

// Signal is an input signal u(t) for Simulate. Build one with Sine, Ramp,
// StepSignal, TableSignal or FuncSignal. A signal with one channel feeds
// every input of the system the same value; a table may have one column per
// input.
type Signal struct {
	Kind  string  // "step", "sine", "ramp", "table", "function"
	Amp   float64 // step height, sine amplitude, ramp slope (per second)
	Freq  float64 // sine: rad/s
	Phase float64 // sine: rad
	Delay float64 // the signal is zero before this time (s)

	// Table: times (increasing) and values (one row per time, one column
	// per channel). Between rows the value is interpolated linearly (Hold
	// "linear", the default) or held (Hold HoldZeroOrder); after the last
	// row the last value is held.
	T    []float64
	U    [][]float64
	Hold string

	Func func(t float64) (float64, error) // "function": a signal built in a cell
	Name string                           // for displays, e.g. "sine(2)"
}

// Sine returns amp*sin(w t) with w in rad/s.
func Sine(w, amp float64) Signal {
	return Signal{Kind: "sine", Freq: w, Amp: amp, Name: "sine(" + strconv.FormatFloat(w, 'g', 6, 64) + ")"}
}

// Ramp returns slope*t.
func Ramp(slope float64) Signal { return Signal{Kind: "ramp", Amp: slope, Name: "ramp"} }

// StepSignal returns a step of the given height at t = 0.
func StepSignal(height float64) Signal { return Signal{Kind: "step", Amp: height, Name: "step"} }

// TableSignal returns a tabulated signal (times t, one row of values per time).
func TableSignal(t []float64, u [][]float64, name string) (Signal, error) {
	if len(t) == 0 || len(t) != len(u) {
		return Signal{}, fmt.Errorf("%d times but %d rows of values; give one row per time", len(t), len(u))
	}
	w := len(u[0])
	for i := range t {
		if math.IsNaN(t[i]) || math.IsInf(t[i], 0) {
			return Signal{}, fmt.Errorf("time in row %d is %v; every entry must be finite", i+1, t[i])
		}
		if i > 0 && !(t[i] > t[i-1]) {
			return Signal{}, fmt.Errorf("times must increase, but row %d has %g after %g", i+1, t[i], t[i-1])
		}
		if len(u[i]) != w || w == 0 {
			return Signal{}, fmt.Errorf("row %d has %d values but row 1 has %d", i+1, len(u[i]), w)
		}
		for j, v := range u[i] {
			if math.IsNaN(v) || math.IsInf(v, 0) {
				return Signal{}, fmt.Errorf("row %d, column %d is %v; every entry must be finite", i+1, j+1, v)
			}
		}
	}
	if name == "" {
		name = "table"
	}
	return Signal{Kind: "table", T: t, U: u, Name: name}, nil
}

// FuncSignal wraps a function of time.
func FuncSignal(name string, f func(t float64) (float64, error)) Signal {
	return Signal{Kind: "function", Func: f, Name: name}
}

// Channels is the number of channels the signal carries (1 except tables).
func (s Signal) Channels() int {
	if s.Kind == "table" && len(s.U) > 0 {
		return len(s.U[0])
	}
	return 1
}

// At returns channel ch of the signal at time t.
func (s Signal) At(t float64, ch int) (float64, error) {
	if t < s.Delay {
		return 0, nil
	}
	tt := t - s.Delay
	switch s.Kind {
	case "step":
		return s.Amp, nil
	case "sine":
		return s.Amp * math.Sin(s.Freq*tt+s.Phase), nil
	case "ramp":
		return s.Amp * tt, nil
	case "table":
		if tt <= s.T[0] {
			return s.U[0][ch], nil
		}
		k := sort.SearchFloat64s(s.T, tt)
		if k >= len(s.T) {
			return s.U[len(s.T)-1][ch], nil
		}
		if s.T[k] == tt {
			return s.U[k][ch], nil
		}
		if s.Hold == HoldZeroOrder {
			return s.U[k-1][ch], nil
		}
		f := (tt - s.T[k-1]) / (s.T[k] - s.T[k-1])
		return s.U[k-1][ch]*(1-f) + s.U[k][ch]*f, nil
	case "function":
		if s.Func == nil {
			return 0, errors.New("the signal has no function")
		}
		v, err := s.Func(tt)
		if err != nil {
			return 0, err
		}
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return 0, fmt.Errorf("the input signal is %v at t = %g; it must be finite", v, t)
		}
		return v, nil
	}
	return 0, fmt.Errorf("unknown signal kind %q", s.Kind)
}

// Response is a time response: Y[output][channel][k] at times T[k]. For a
// step or impulse response each input is one channel (one panel per
// input/output pair); an initial-state or input response has one channel.
type Response struct {
	System   *System
	Kind     string    // "step", "impulse", "initial", "input"
	T        []float64 // s
	Channels []string  // channel names (inputs, or "initial", or the signal name)
	Outputs  []string
	Y        [][][]float64
	U        [][]float64 // input response: U[input][k], the input applied
	Rule     string      // how the horizon and step were chosen
	Sampled  bool        // sampled system: values hold between samples

	// For exact values between samples (see ValueAt): an input response
	// of a continuous system keeps its signal and its state at every
	// sample, states[k*n:(k+1)*n]; an initial response its initial state.
	signal *Signal
	states []float64
	x0     []float64
	// Final holds, for the step response of a stable system, the values
	// it settles at (the DC gain, outputs x inputs); nil otherwise. The
	// response carries it so a display draws it without recomputing.
	Final *mat.Dense
}

// ResponseOptions set the horizon and step. Zero values choose them from
// the modes (see AutoHorizon).
type ResponseOptions struct {
	Until float64 // horizon in s
	Step  float64 // step in s (continuous systems; sampled ones use Ts)
	// Progress, when set, is called with the fraction done (0 to 1) about
	// every 256 samples, for progress displays of long runs.
	Progress func(done float64)
}

// AutoHorizon chooses the horizon and step of a time response from the
// eigenvalues of A (for sampled systems through s = log(z)/Ts):
//
//   - horizon: the slowest mode settles. Each stable mode with decay rate
//     sigma = -Re(s) asks for 6/sigma (its envelope falls to e^-6 = 0.25 %,
//     inside the 2 % band with room to show the steady state); an undamped
//     oscillation of frequency w asks for 5 periods, 10 pi/w; an unstable
//     mode caps the horizon at 5/Re(s) (growth by e^5 ~ 150) so the
//     plot stays readable. Poles at the origin ask nothing. Without any
//     request the horizon is 10 s (sampled: 50 periods). The horizon is
//     rounded up to 1, 2 or 5 times a power of ten.
//   - step: the fastest mode is resolved with 20 samples per period
//     2 pi/|s|, with at least 200 and at most 10,000 steps over the
//     horizon; when the cap binds the rule says which modes are not
//     resolved. Sampled systems step by Ts.
func AutoHorizon(g *System) (until, step float64, rule string) {
	poles := continuousPoles(g)
	var horizon, cap float64
	var fastest float64
	for _, s := range poles {
		re, w := real(s), cmplx.Abs(s)
		if w == 0 || math.IsInf(w, 0) {
			continue
		}
		fastest = math.Max(fastest, w)
		tiny := 1e-9 * w
		switch {
		case re < -tiny:
			horizon = math.Max(horizon, 6/(-re))
		case re > tiny:
			c := 5 / re
			if cap == 0 || c < cap {
				cap = c
			}
		default:
			horizon = math.Max(horizon, 10*math.Pi/math.Abs(imag(s)))
		}
	}
	rule = "horizon: 6 time constants of the slowest stable mode (5 periods of an undamped one)"
	if horizon == 0 {
		horizon = 10
		if g.Sampled() {
			horizon = 50 * g.Ts
		}
		rule = "horizon: no settling mode, default"
	}
	if cap > 0 && (horizon > cap || horizon == 0) {
		horizon = cap
		rule = "horizon: capped at 5 time constants of the fastest growing mode"
	}
	horizon = niceCeil(horizon)
	if g.Sampled() {
		k := math.Ceil(horizon/g.Ts - 1e-9)
		return k * g.Ts, g.Ts, rule + "; step: the sample period"
	}
	steps := 200.0
	if fastest > 0 {
		steps = math.Max(steps, math.Ceil(horizon/(2*math.Pi/fastest/20)))
	}
	if steps > 10000 {
		steps = 10000
		rule += fmt.Sprintf("; step: 10,000 steps; modes faster than %.3g rad/s are not resolved", 2*math.Pi/(horizon/steps)/20)
	} else {
		rule += "; step: 20 samples per period of the fastest mode"
	}
	return horizon, horizon / steps, rule
}

func niceCeil(x float64) float64 {
	if !(x > 0) || math.IsInf(x, 0) {
		return 10
	}
	e := math.Floor(math.Log10(x))
	b := math.Pow(10, e)
	for _, f := range []float64{1, 2, 5, 10} {
		if f*b >= x*(1-1e-12) {
			return f * b
		}
	}
	return 10 * b
}

// continuousPoles returns the eigenvalues of A, mapped to the s-plane
// through s = log(z)/Ts for sampled systems (z = 0 is skipped: it settles
// in finite time). Eigenvalues within 1000 u ||A||_1 of s = 0 (of z = 1),
// u the unit roundoff, are set to exactly 0: rigid-body modes computed as
// 1e-16 must not ask for a horizon of 1e16 s.
func continuousPoles(g *System) []complex128 {
	if g.N() == 0 {
		return nil
	}
	var ev mat.Eigen
	if !ev.Factorize(g.A, mat.EigenNone) {
		return nil
	}
	thr := negligible(g.A)
	vals := ev.Values(nil)
	if !g.Sampled() {
		for i, v := range vals {
			if cmplx.Abs(v) <= thr {
				vals[i] = 0
			}
		}
		zeroCluster(vals, 0, thr, mat.Norm(g.A, 1))
		return vals
	}
	var out []complex128
	for _, z := range vals {
		switch {
		case z == 0:
			continue
		case cmplx.Abs(z-1) <= thr:
			out = append(out, 0)
		default:
			out = append(out, cmplx.Log(z)/complex(g.Ts, 0))
		}
	}
	return out
}

// negligible is 1000 u ||A||_1: eigenvalue differences below it are
// rounding (Golub & Van Loan, Matrix Computations, 4th ed., Section 7.2:
// backward-stable eigenvalues are exact for A + E with ||E|| ~ u ||A||).
// zeroCluster sets to c the eigenvalues that are a multiple eigenvalue c
// split by rounding. A k-fold defective eigenvalue moves by up to about
// (u ||A||)^(1/k) ||A||^(1-1/k) under rounding, into k values of about
// equal distance from c around it, while their mean stays within rounding
// of c (the mean of a cluster is well conditioned: Kato 1966, Perturbation
// Theory for Linear Operators, II-2.2, from memory). So: the k >= 2
// values nearest c (not already equal to c), within a factor 2 of each
// other in distance, inside that bound, with a mean within thr of c, and
// the next value over 100 times farther, are c. A triple integrator
// otherwise reads as poles near 4e-6 and drags frequency ranges down.
func zeroCluster(vals []complex128, c complex128, thr, norm float64) {
	idx := make([]int, 0, len(vals))
	for i, v := range vals {
		if v != c {
			idx = append(idx, i)
		}
	}
	sort.Slice(idx, func(a, b int) bool { return cmplx.Abs(vals[idx[a]]-c) < cmplx.Abs(vals[idx[b]]-c) })
	const u = 1.1102230246251565e-16
	for k := min(len(idx), 8); k >= 2; k-- {
		var sum complex128
		for _, i := range idx[:k] {
			sum += vals[i] - c
		}
		lo, hi := cmplx.Abs(vals[idx[0]]-c), cmplx.Abs(vals[idx[k-1]]-c)
		bound := math.Pow(1e3*u*norm, 1/float64(k)) * math.Pow(norm, 1-1/float64(k))
		next := math.Inf(1)
		if k < len(idx) {
			next = cmplx.Abs(vals[idx[k]] - c)
		}
		if hi <= 2*lo && hi <= bound && cmplx.Abs(sum)/float64(k) <= thr && next > 100*hi {
			for _, i := range idx[:k] {
				vals[i] = c
			}
			return
		}
	}
}

func negligible(A *mat.Dense) float64 {
	if A == nil {
		return 0
	}
	return 1e3 * 1.1102230246251565e-16 * mat.Norm(A, 1)
}

func (o ResponseOptions) grid(g *System) ([]float64, float64, string, error) {
	// The modes are needed only for what is not given (an eigenvalue
	// computation costs as much as the rest of a large response).
	var until, step float64
	var rule string
	if o.Until == 0 || o.Step == 0 && !g.Sampled() {
		until, step, rule = AutoHorizon(g)
	} else if g.Sampled() {
		step = g.Ts
	}
	if o.Until != 0 {
		if !(o.Until > 0) || math.IsInf(o.Until, 0) {
			return nil, 0, "", fmt.Errorf("the horizon must be a finite number > 0 s, got %v", o.Until)
		}
		rule = "horizon given"
		if g.Sampled() {
			until = math.Ceil(o.Until/g.Ts-1e-9) * g.Ts
		} else {
			until = o.Until
			step = until / math.Max(200, math.Min(10000, math.Ceil(until/step)))
			rule += "; step from the fastest mode (20 samples per period, 200 to 10,000 steps)"
		}
	}
	if o.Step != 0 {
		if g.Sampled() {
			return nil, 0, "", fmt.Errorf("a sampled system steps by its sample time %g s; leave the step out", g.Ts)
		}
		if !(o.Step > 0) || math.IsInf(o.Step, 0) {
			return nil, 0, "", fmt.Errorf("the step must be a finite number > 0 s, got %v", o.Step)
		}
		if until/o.Step > 1e6 {
			return nil, 0, "", fmt.Errorf("horizon %g s with step %g s gives more than 1,000,000 samples; use a larger step", until, o.Step)
		}
		step = o.Step
		rule += "; step given"
	}
	if until/step > MaxResponseSamples {
		hint := "a larger step"
		if g.Sampled() {
			hint = "a shorter horizon (a sampled system steps by its sample time)"
		}
		return nil, 0, "", fmt.Errorf("horizon %g s at %g s a sample gives %.3g samples, over the limit of %d; use %s", until, step, until/step, MaxResponseSamples, hint)
	}
	if o.Until != 0 && o.Step == 0 {
		// the step we chose for a horizon given; a step given is the
		// user's own choice, and the automatic rule says it already
		if note := unresolvedNote(g, step); note != "" {
			rule += "; warning: " + note
		}
	}
	N := int(math.Round(until / step))
	if N < 1 {
		N = 1
	}
	t := make([]float64, N+1)
	for k := range t {
		t[k] = float64(k) * step
	}
	return t, step, rule, nil
}

// Step returns the step response of every output to a unit step on each
// input in turn, starting from rest. For continuous systems it is exact at
// the sample times (zero-order hold of a constant input through the block
// exponential, Van Loan 1978).
func Step(ctx context.Context, g *System, opt ResponseOptions) (*Response, error) {
	return freeOrForced(ctx, g, "step", nil, opt)
}

// Impulse returns the response to a unit impulse on each input in turn:
// the free response from x(0+) = B (continuous) or the unit-pulse response
// (sampled). For continuous systems the impulse D*delta(t) of a direct
// feedthrough is not drawn (it is not a function).
func Impulse(ctx context.Context, g *System, opt ResponseOptions) (*Response, error) {
	return freeOrForced(ctx, g, "impulse", nil, opt)
}

// Initial returns the free response from the initial state x0.
func Initial(ctx context.Context, g *System, x0 []float64, opt ResponseOptions) (*Response, error) {
	if len(x0) != g.N() {
		return nil, fmt.Errorf("the initial state has %d entries but the system has %d states (%v)", len(x0), g.N(), g.StateNames)
	}
	for i, v := range x0 {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return nil, fmt.Errorf("initial state entry %d (%s) is %v; it must be finite", i+1, g.StateNames[i], v)
		}
	}
	r, err := freeOrForced(ctx, g, "initial", x0, opt)
	if r != nil {
		r.x0 = append([]float64(nil), x0...)
	}
	return r, err
}

func freeOrForced(ctx context.Context, g *System, kind string, x0 []float64, opt ResponseOptions) (*Response, error) {
	if g == nil {
		return nil, errors.New("the system is missing")
	}
	t, h, rule, err := opt.grid(g)
	if err != nil {
		return nil, err
	}
	n, m, p := g.N(), g.M(), g.P()
	r := &Response{System: g, Kind: kind, T: t, Outputs: append([]string(nil), g.OutputNames...), Rule: rule, Sampled: g.Sampled()}
	nch := m
	if kind == "initial" {
		nch = 1
		r.Channels = []string{"initial"}
	} else {
		r.Channels = append([]string(nil), g.InputNames...)
		if m == 0 {
			return nil, fmt.Errorf("the system has no inputs, so it has no %s response; use initial: x0", kind)
		}
	}
	N := len(t)
	r.Y = make([][][]float64, p)
	for i := range r.Y {
		r.Y[i] = make([][]float64, nch)
		for c := range r.Y[i] {
			r.Y[i][c] = make([]float64, N)
		}
	}
	if p == 0 {
		return r, nil
	}
	if n >= modalMinStates && !g.Sampled() {
		if vals, err := modalResponse(ctx, g, kind, x0, h, r, opt); err != nil {
			return nil, err
		} else if vals != nil {
			// The decomposition's eigenvalues decide stability too.
			r.final(g, stableValues(g, vals))
			return r, checkFiniteResponse(r)
		}
	}
	r.final(g, Stable(g))
	// X: n x nch states, one column per channel.
	var Phi, Gam *mat.Dense
	if n > 0 {
		if g.Sampled() {
			Phi, Gam = g.A, g.B
		} else {
			var err error
			if m > 0 {
				Phi, Gam, err = zohPair(g.A, g.B, h)
			} else {
				Phi, err = Expm(scale(h, g.A))
			}
			if err != nil {
				return nil, fmt.Errorf("the transition over one step: %w", err)
			}
		}
	}
	// One state vector per channel; matrix-vector products (BLAS Dgemv)
	// are much faster than a matrix product with a single column.
	xs := make([]*mat.VecDense, nch)
	gam := make([]*mat.VecDense, nch)
	for c := range xs {
		if n == 0 {
			break
		}
		xs[c] = mat.NewVecDense(n, nil)
		switch kind {
		case "impulse":
			if !g.Sampled() {
				xs[c].CopyVec(g.B.ColView(c))
			}
		case "initial":
			xs[c].SetVec(0, 0)
			copy(xs[c].RawVector().Data, x0)
		}
		if Gam != nil {
			gam[c] = mat.VecDenseCopyOf(Gam.ColView(c))
		}
	}
	var yv *mat.VecDense
	if n > 0 {
		yv = mat.NewVecDense(p, nil)
	}
	next := mat.NewVecDense(max(n, 1), nil)
	for k := 0; k < N; k++ {
		if k&255 == 0 {
			if err := ctx.Err(); err != nil {
				return nil, fmt.Errorf("interrupted: %w", err)
			}
			if opt.Progress != nil {
				opt.Progress(float64(k) / float64(N))
			}
		}
		for c := 0; c < nch; c++ {
			if n > 0 {
				yv.MulVec(g.C, xs[c])
			}
			for i := 0; i < p; i++ {
				v := 0.0
				if n > 0 {
					v = yv.AtVec(i)
				}
				if kind == "step" || kind == "impulse" && g.Sampled() && k == 0 {
					v += g.D.At(i, c)
				}
				r.Y[i][c][k] = v
			}
			if n == 0 || k == N-1 {
				continue
			}
			next.MulVec(Phi, xs[c])
			switch {
			case kind == "step":
				next.AddVec(next, gam[c])
			case kind == "impulse" && g.Sampled() && k == 0:
				next.AddVec(next, g.B.ColView(c))
			}
			xs[c], next = next, xs[c]
		}
	}
	return r, checkFiniteResponse(r)
}

func checkFiniteResponse(r *Response) error {
	for i := range r.Y {
		for c := range r.Y[i] {
			for k, v := range r.Y[i][c] {
				if math.IsNaN(v) || math.IsInf(v, 0) {
					return fmt.Errorf("output %s overflows at t = %g s (the system grows too fast for this horizon); shorten it with until:", r.Outputs[i], r.T[k])
				}
			}
		}
	}
	return nil
}

// Simulate returns the response to the input signal u from the initial
// state x0 (nil for rest). A one-channel signal drives every input; a table
// with one column per input drives each input by its own column. For
// continuous systems the input is taken as linear between samples
// (first-order hold, exact for ramps and linear-interpolated tables) or, for
// a table with Hold HoldZeroOrder and a step, constant; both are propagated exactly
// through one block exponential (Van Loan 1978), piece by piece across every
// row of a table and a delay between samples, so a switch at 0.35 s acts at
// 0.35 s whatever the step. A sampled system reads the input at its samples:
// when a held switch lies between them the rule says by how much it is late
// at most.
func Simulate(ctx context.Context, g *System, u Signal, x0 []float64, opt ResponseOptions) (*Response, error) {
	if g == nil {
		return nil, errors.New("the system is missing")
	}
	n, m, p := g.N(), g.M(), g.P()
	if m == 0 {
		return nil, errors.New("the system has no inputs to drive")
	}
	if ch := u.Channels(); ch != 1 && ch != m {
		return nil, fmt.Errorf("the input table has %d columns but the system has %d inputs (%v); give one column, or one per input", ch, m, g.InputNames)
	}
	if x0 != nil && len(x0) != n {
		return nil, fmt.Errorf("the initial state has %d entries but the system has %d states", len(x0), n)
	}
	if opt.Until == 0 && u.Kind == "table" {
		opt.Until = u.T[len(u.T)-1] + u.Delay
	}
	t, h, rule, err := opt.grid(g)
	if err != nil {
		return nil, err
	}
	N := len(t)
	r := &Response{System: g, Kind: "input", T: t, Outputs: append([]string(nil), g.OutputNames...), Rule: rule, Sampled: g.Sampled()}
	name := u.Name
	if name == "" {
		name = u.Kind
	}
	r.Channels = []string{name}
	r.U = make([][]float64, m)
	for j := range r.U {
		r.U[j] = make([]float64, N)
	}
	for k, tk := range t {
		for j := 0; j < m; j++ {
			ch := 0
			if u.Channels() == m {
				ch = j
			}
			v, err := u.At(tk, ch)
			if err != nil {
				return nil, fmt.Errorf("input at t = %g s: %w", tk, err)
			}
			r.U[j][k] = v
		}
	}
	r.Y = make([][][]float64, p)
	for i := range r.Y {
		r.Y[i] = [][]float64{make([]float64, N)}
	}
	if n == 0 || p == 0 {
		for k := 0; k < N; k++ {
			for i := 0; i < p; i++ {
				v := 0.0
				for j := 0; j < m; j++ {
					v += g.D.At(i, j) * r.U[j][k]
				}
				r.Y[i][0][k] = v
			}
		}
		return r, checkFiniteResponse(r)
	}
	// Continuous systems: exact piece by piece between the breakpoints
	// of the input (see piecewise). Sampled ones read the input at their
	// samples; a held switch between samples acts at the next one, and
	// the rule says by how much at most.
	var pw *piecewise
	if !g.Sampled() {
		pw = newPiecewise(g, u)
		r.signal = &u
		r.states = make([]float64, 0, N*n)
	} else if e, at := sampledTimingError(u, g.Ts, t[N-1]); e > 0 {
		r.Rule += fmt.Sprintf("; warning: the input switches between samples (the latest by %s s, at t = %s s): a sampled system reads it at its samples only",
			strconv.FormatFloat(e, 'g', 4, 64), strconv.FormatFloat(at, 'g', 6, 64))
	}
	xv := mat.NewVecDense(n, nil)
	if x0 != nil {
		copy(xv.RawVector().Data, x0)
	}
	var nx, tmpv mat.VecDense
	uk := mat.NewVecDense(m, nil)
	yv := mat.NewVecDense(p, nil)
	var cx mat.VecDense
	for k := 0; k < N; k++ {
		if k&255 == 0 {
			if err := ctx.Err(); err != nil {
				return nil, fmt.Errorf("interrupted: %w", err)
			}
			if opt.Progress != nil {
				opt.Progress(float64(k) / float64(N))
			}
		}
		for j := 0; j < m; j++ {
			uk.SetVec(j, r.U[j][k])
		}
		yv.MulVec(g.D, uk)
		cx.MulVec(g.C, xv)
		yv.AddVec(yv, &cx)
		for i := 0; i < p; i++ {
			r.Y[i][0][k] = yv.AtVec(i)
		}
		if pw != nil {
			r.states = append(r.states, xv.RawVector().Data...)
		}
		if k == N-1 {
			continue
		}
		if pw != nil {
			if err := pw.advance(xv, t[k], t[k+1], h); err != nil {
				return nil, err
			}
			continue
		}
		nx.MulVec(g.A, xv)
		tmpv.MulVec(g.B, uk)
		nx.AddVec(&nx, &tmpv)
		xv.CopyVec(&nx)
	}
	return r, checkFiniteResponse(r)
}

// DCGain returns the steady-state gain: D - C A^{-1} B (continuous) or
// D + C (I - A)^{-1} B (sampled). A pole at s = 0 (z = 1) makes it
// infinite: ok is false then (reciprocal condition of the matrix below
// 1e-13).
func DCGain(g *System) (*mat.Dense, bool) {
	n, m, p := g.N(), g.M(), g.P()
	if m == 0 || p == 0 {
		return nil, true
	}
	if n == 0 {
		return mat.DenseCopyOf(g.D), true
	}
	M := mat.DenseCopyOf(g.A)
	if g.Sampled() {
		M = add(identity(n), scale(-1, g.A))
	} else {
		M.Scale(-1, M)
	}
	var lu mat.LU
	lu.Factorize(M)
	if lu.Det() == 0 || lu.Cond() > 1e13 {
		return nil, false
	}
	var x mat.Dense
	if err := lu.SolveTo(&x, false, g.B); err != nil {
		return nil, false
	}
	return add(g.D, mul(g.C, &x)), true
}

// final sets the values a step response settles at, when it does.
func (r *Response) final(g *System, stable bool) {
	if r.Kind == "step" && stable {
		if G, ok := DCGain(g); ok && G != nil {
			r.Final = G
		}
	}
}

// Stable reports whether every pole lies strictly in the stable region
// (Re s < 0, or |z| < 1), by more than 1000 u ||A||_1 so that a rigid-body
// mode computed as -1e-17 does not pass for a stable one.
func Stable(g *System) bool {
	if g.N() == 0 {
		return true
	}
	var ev mat.Eigen
	if !ev.Factorize(g.A, mat.EigenNone) {
		return false
	}
	return stableValues(g, ev.Values(nil))
}

// stableValues is Stable on eigenvalues already computed.
func stableValues(g *System, vals []complex128) bool {
	thr := negligible(g.A)
	for _, l := range vals {
		if g.Sampled() && cmplx.Abs(l) >= 1-thr || !g.Sampled() && real(l) >= -thr {
			return false
		}
	}
	return true
}

// MaxResponseSamples bounds the samples of any time response, continuous or
// sampled: 10^6 samples of 10 outputs and 100 states already take about
// 1 GB with the states kept for exact values between samples.
const MaxResponseSamples = 1000000
