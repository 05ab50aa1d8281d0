package lsys

import (
	"context"
	"errors"
	"fmt"
	"math"
)

// ODEFunc writes dx/dt at time t and state x into dx.
type ODEFunc func(t float64, x, dx []float64) error

// ODEOptions are the tolerances and hooks of Integrate.
type ODEOptions struct {
	// RelTol and AbsTol bound the local error of each step per state:
	// |e_i| <= AbsTol + RelTol * |x_i| in the root-mean-square sense.
	// Defaults 1e-6 and 1e-9.
	RelTol, AbsTol float64
	// MaxStep caps the step (default: the whole interval / 10).
	MaxStep float64
	// MaxSteps caps the number of steps (default 1e6).
	MaxSteps int
	// Progress, when set, is called with the fraction of the interval
	// done, about every 1000 steps.
	Progress func(done float64)
}

// ODEStats counts the work of Integrate.
type ODEStats struct {
	Steps, Rejected, Evaluations int
}

// Dormand & Prince (1980, "A family of embedded Runge-Kutta formulae",
// J. Comput. Appl. Math. 6(1)), the 5(4) pair with the first-same-as-last
// property, and its continuous extension of order 4 (Shampine 1986,
// "Some practical Runge-Kutta formulas", Math. Comp. 46; the coefficients
// as in Hairer, Norsett & Wanner 1993, Solving Ordinary Differential
// Equations I, II.6, from memory and checked against scipy's solve_ivp
// in the tests).
var (
	dpC = [7]float64{0, 1.0 / 5, 3.0 / 10, 4.0 / 5, 8.0 / 9, 1, 1}
	dpA = [7][6]float64{
		{},
		{1.0 / 5},
		{3.0 / 40, 9.0 / 40},
		{44.0 / 45, -56.0 / 15, 32.0 / 9},
		{19372.0 / 6561, -25360.0 / 2187, 64448.0 / 6561, -212.0 / 729},
		{9017.0 / 3168, -355.0 / 33, 46732.0 / 5247, 49.0 / 176, -5103.0 / 18656},
		{35.0 / 384, 0, 500.0 / 1113, 125.0 / 192, -2187.0 / 6784, 11.0 / 84},
	}
	// dpE is b5 - b4, the error estimate.
	dpE = [7]float64{71.0 / 57600, 0, -71.0 / 16695, 71.0 / 1920, -17253.0 / 339200, 22.0 / 525, -1.0 / 40}
	// dpD are the coefficients of the dense output.
	dpD = [7]float64{-12715105075.0 / 11282082432, 0, 87487479700.0 / 32700410799, -10690763975.0 / 1880347072,
		701980252875.0 / 199316789632, -1453857185.0 / 822651844, 69997945.0 / 29380423}
)

// Integrate solves x' = f(t, x) from x0 at t0 and returns x at each of
// the increasing times out (all in [t0, t1], t1 = last of out), by the
// adaptive Dormand-Prince 5(4) method with dense output: steps are chosen
// by the error estimate (factor 0.9 err^(-1/5), between 0.2 and 5), and
// the states at the output times come from the continuous extension, so
// the output grid does not constrain the steps. The context is checked
// every step (interrupt).
func Integrate(ctx context.Context, f ODEFunc, x0 []float64, t0 float64, out []float64, opt ODEOptions) ([][]float64, ODEStats, error) {
	var st ODEStats
	n := len(x0)
	if len(out) == 0 {
		return nil, st, nil
	}
	t1 := out[len(out)-1]
	if !(t1 >= t0) {
		return nil, st, errors.New("the end time must not be before the start")
	}
	rtol, atol := opt.RelTol, opt.AbsTol
	if rtol <= 0 {
		rtol = 1e-6
	}
	if atol <= 0 {
		atol = 1e-9
	}
	hmax := opt.MaxStep
	if hmax <= 0 {
		hmax = (t1 - t0) / 10
	}
	maxSteps := opt.MaxSteps
	if maxSteps <= 0 {
		maxSteps = 1000000
	}
	res := make([][]float64, len(out))
	next := 0
	for next < len(out) && out[next] <= t0 {
		res[next] = append([]float64(nil), x0...)
		next++
	}
	if next == len(out) || t1 == t0 {
		return res, st, nil
	}
	k := make([][]float64, 7)
	for i := range k {
		k[i] = make([]float64, n)
	}
	x := append([]float64(nil), x0...)
	xn := make([]float64, n)
	tmp := make([]float64, n)
	eval := func(t float64, y, dy []float64) error {
		st.Evaluations++
		if err := f(t, y, dy); err != nil {
			return err
		}
		for i, v := range dy {
			if math.IsNaN(v) || math.IsInf(v, 0) {
				return fmt.Errorf("the derivative of state %d is not finite at t = %.6g s (x = %v); the model has a singularity there or the solution escapes", i+1, t, y)
			}
		}
		return nil
	}
	t := t0
	if err := eval(t, x, k[0]); err != nil {
		return nil, st, err
	}
	norm := func(v []float64, ref []float64) float64 {
		s := 0.0
		for i := range v {
			sc := atol + rtol*math.Abs(ref[i])
			s += (v[i] / sc) * (v[i] / sc)
		}
		return math.Sqrt(s / float64(max(n, 1)))
	}
	// Initial step (Hairer, Norsett & Wanner 1993, II.4).
	d0, d1 := norm(x, x), norm(k[0], x)
	h := 1e-6
	if d0 >= 1e-5 && d1 >= 1e-5 {
		h = 0.01 * d0 / d1
	}
	h = math.Min(h, hmax)
	for i := range tmp {
		tmp[i] = x[i] + h*k[0][i]
	}
	if err := eval(t+h, tmp, k[1]); err != nil {
		return nil, st, err
	}
	for i := range tmp {
		tmp[i] = (k[1][i] - k[0][i]) / h
	}
	d2 := norm(tmp, x)
	h1 := math.Max(1e-6, h*1e-3)
	if m := math.Max(d1, d2); m > 1e-15 {
		h1 = math.Pow(0.01/m, 0.2)
	}
	h = math.Min(math.Min(100*h, h1), hmax)
	errv := make([]float64, n)
	lastProgress := 0
	for next < len(out) {
		if err := ctx.Err(); err != nil {
			return nil, st, err
		}
		if st.Steps+st.Rejected >= maxSteps {
			return nil, st, fmt.Errorf("more than %d steps before t = %.6g s: the model is stiff or the tolerances are too tight; loosen rtol or shorten the run", maxSteps, t1)
		}
		if t+h > t1 {
			h = t1 - t
		}
		if h <= 16*2.2e-16*math.Max(math.Abs(t), 1) {
			return nil, st, fmt.Errorf("the step fell below rounding level at t = %.6g s: the solution has a singularity there or the model is too stiff", t)
		}
		for s := 1; s < 7; s++ {
			for i := 0; i < n; i++ {
				v := x[i]
				for j := 0; j < s; j++ {
					v += h * dpA[s][j] * k[j][i]
				}
				tmp[i] = v
			}
			if s == 6 {
				copy(xn, tmp)
			}
			if err := eval(t+dpC[s]*h, tmp, k[s]); err != nil {
				return nil, st, err
			}
		}
		for i := 0; i < n; i++ {
			v := 0.0
			for s := 0; s < 7; s++ {
				v += dpE[s] * k[s][i]
			}
			errv[i] = h * v
		}
		// Scale by the larger of the old and new state.
		s := 0.0
		for i := 0; i < n; i++ {
			sc := atol + rtol*math.Max(math.Abs(x[i]), math.Abs(xn[i]))
			s += (errv[i] / sc) * (errv[i] / sc)
		}
		e := math.Sqrt(s / float64(max(n, 1)))
		if e > 1 || math.IsNaN(e) {
			st.Rejected++
			fac := 0.2
			if !math.IsNaN(e) {
				fac = math.Max(0.2, 0.9*math.Pow(e, -0.2))
			}
			h *= fac
			continue
		}
		st.Steps++
		tn := t + h
		// Dense output on [t, tn].
		for next < len(out) && out[next] <= tn {
			th := (out[next] - t) / h
			row := make([]float64, n)
			for i := 0; i < n; i++ {
				r2 := xn[i] - x[i]
				r3 := h*k[0][i] - r2
				r4 := r2 - h*k[6][i] - r3
				r5 := 0.0
				for s := 0; s < 7; s++ {
					r5 += dpD[s] * k[s][i]
				}
				r5 *= h
				row[i] = x[i] + th*(r2+(1-th)*(r3+th*(r4+(1-th)*r5)))
			}
			if out[next] == tn {
				copy(row, xn)
			}
			res[next] = row
			next++
		}
		t = tn
		copy(x, xn)
		copy(k[0], k[6]) // first same as last
		fac := 5.0
		if e > 0 {
			fac = math.Min(5, math.Max(0.2, 0.9*math.Pow(e, -0.2)))
		}
		h = math.Min(h*fac, hmax)
		if opt.Progress != nil && st.Steps-lastProgress >= 1000 {
			lastProgress = st.Steps
			opt.Progress((t - t0) / (t1 - t0))
		}
	}
	return res, st, nil
}

// Simulation is the time response of a nonlinear model (and, when asked,
// of a linear model on the same grid).
type Simulation struct {
	T       []float64
	States  []string
	Outputs []string
	X       [][]float64 // X[k][i]: state i at T[k]
	Y       [][]float64 // Y[k][i]: output i at T[k]
	// Linear, when set, is the linear model's output on the same grid
	// (same inputs, same initial state).
	Linear [][]float64
	// LinearName says which linear model it is.
	LinearName     string
	Sampled        bool
	RelTol, AbsTol float64
	Stats          ODEStats
	Method         string
	// Controller says what closes the loop ("" for an open-loop run).
	Controller string
}
