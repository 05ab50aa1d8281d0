package lsys

import (
	"context"
	"math"
	"math/cmplx"
	"strings"
	"testing"

	"gonum.org/v1/gonum/mat"
)

func first(a float64) *System {
	s, _ := FromMatrices(mat.NewDense(1, 1, []float64{-a}), mat.NewDense(1, 1, []float64{1}), mat.NewDense(1, 1, []float64{1}), nil, 0)
	return s
}

// secondOrder is wn^2/(s^2 + 2 zeta wn s + wn^2) in companion form.
func secondOrder(zeta, wn float64) *System {
	s, _ := FromMatrices(
		mat.NewDense(2, 2, []float64{0, 1, -wn * wn, -2 * zeta * wn}),
		mat.NewDense(2, 1, []float64{0, wn * wn}),
		mat.NewDense(1, 2, []float64{1, 0}), nil, 0)
	return s
}

// Closed forms for the underdamped standard second-order system (Ogata,
// Modern Control Engineering, 5th ed., 2010, Section 5-3; from memory of the
// section, equation numbers not checked).
func so2Step(zeta, wn, t float64) float64 {
	wd := wn * math.Sqrt(1-zeta*zeta)
	return 1 - math.Exp(-zeta*wn*t)*(math.Cos(wd*t)+zeta/math.Sqrt(1-zeta*zeta)*math.Sin(wd*t))
}

func so2Impulse(zeta, wn, t float64) float64 {
	wd := wn * math.Sqrt(1-zeta*zeta)
	return wn / math.Sqrt(1-zeta*zeta) * math.Exp(-zeta*wn*t) * math.Sin(wd*t)
}

func TestZOHFirstOrderClosedForm(t *testing.T) {
	// ZOH of 1/(s+a): Phi = e^{-aT}, Gamma = (1 - e^{-aT})/a (Franklin,
	// Powell & Workman, Digital Control of Dynamic Systems, 3rd ed., 1998,
	// Section 4.3, from memory).
	for _, c := range []struct{ a, T float64 }{{1, 0.1}, {3, 0.5}, {0.2, 2}} {
		d, err := Sample(first(c.a), c.T, ZeroOrderHold, 0)
		if err != nil {
			t.Fatal(err)
		}
		phi, gam := math.Exp(-c.a*c.T), (1-math.Exp(-c.a*c.T))/c.a
		if e := math.Abs(d.A.At(0, 0) - phi); e > 1e-15 {
			t.Errorf("a=%g T=%g: Phi err %g", c.a, c.T, e)
		}
		if e := math.Abs(d.B.At(0, 0) - gam); e > 1e-15 {
			t.Errorf("a=%g T=%g: Gamma err %g", c.a, c.T, e)
		}
		// FOH: Gamma2 = [T(1-e)/a - 1/a^2 + e(T/a + 1/a^2)]/T, e = e^{-aT}
		// (integral of e^{-a(T-t)} t/T over [0, T], by hand);
		// Bd = Gamma1 + (Phi - 1) Gamma2, Dd = Gamma2.
		f, err := Sample(first(c.a), c.T, FirstOrderHold, 0)
		if err != nil {
			t.Fatal(err)
		}
		a, T, e := c.a, c.T, phi
		g2 := (T*(1-e)/a - 1/(a*a) + e*(T/a+1/(a*a))) / T
		if d := math.Abs(f.B.At(0, 0) - (gam + (phi-1)*g2)); d > 1e-14 {
			t.Errorf("foh Bd err %g", d)
		}
		if d := math.Abs(f.D.At(0, 0) - g2); d > 1e-14 {
			t.Errorf("foh Dd err %g", d)
		}
	}
}

func TestTustinFirstOrderAndRoundTrips(t *testing.T) {
	// Tustin of a/(s+a): Ad = (1 - aT/2)/(1 + aT/2) (common practice, by
	// substituting s = (2/T)(z-1)/(z+1)).
	a, T := 2.0, 0.1
	d, err := Sample(first(a), T, Bilinear, 0)
	if err != nil {
		t.Fatal(err)
	}
	if e := math.Abs(d.A.At(0, 0) - (1-a*T/2)/(1+a*T/2)); e > 1e-15 {
		t.Errorf("tustin Ad err %g", e)
	}
	g := secondOrder(0.3, 5)
	for _, c := range []struct {
		method  string
		prewarp float64
	}{{ZeroOrderHold, 0}, {FirstOrderHold, 0}, {Bilinear, 0}, {Bilinear, 4}} {
		d, err := Sample(g, 0.05, c.method, c.prewarp)
		if err != nil {
			t.Fatal(err)
		}
		back, err := Continuous(d, c.method, c.prewarp)
		if err != nil {
			t.Fatal(err)
		}
		for _, M := range [][2]*mat.Dense{{back.A, g.A}, {back.B, g.B}, {back.C, g.C}, {back.D, g.D}} {
			var diff mat.Dense
			diff.Sub(M[0], M[1])
			if e := mat.Norm(&diff, math.Inf(1)); e > 1e-10*math.Max(1, mat.Norm(M[1], math.Inf(1))) {
				t.Errorf("%s prewarp %g round trip error %g", c.method, c.prewarp, e)
			}
		}
	}
	// Prewarped tustin matches the continuous response exactly at w0.
	w0 := 4.0
	d, _ = Sample(g, 0.05, Bilinear, w0)
	gc := evalSys(t, g, complex(0, w0))[0]
	hd := newHessenberg(d)
	out := make([]complex128, 1)
	z := complex(math.Cos(w0*0.05), math.Sin(w0*0.05))
	if err := hd.at(z, out); err != nil {
		t.Fatal(err)
	}
	if !closeC(out[0], gc, 1e-12) {
		t.Errorf("prewarp: %v vs %v", out[0], gc)
	}
	// A pole at z = -0.5 has no real zoh counterpart.
	neg, _ := FromMatrices(mat.NewDense(1, 1, []float64{-0.5}), mat.NewDense(1, 1, []float64{1}), mat.NewDense(1, 1, []float64{1}), nil, 0.1)
	if _, err := Continuous(neg, ZeroOrderHold, 0); err == nil {
		t.Error("zoh inverse of a negative real pole accepted")
	}
	if _, err := Sample(stackTwo(g), 0.1, MatchedPoleZero, 0); err == nil {
		t.Error("matched accepted a two-input system")
	}
}

func TestStepImpulseClosedForms(t *testing.T) {
	ctx := context.Background()
	// First order 1/(s+1): step 1 - e^{-t}, impulse e^{-t} (common practice).
	g := first(1)
	st, err := Step(ctx, g, ResponseOptions{Until: 5, Step: 0.01})
	if err != nil {
		t.Fatal(err)
	}
	im, err := Impulse(ctx, g, ResponseOptions{Until: 5, Step: 0.01})
	if err != nil {
		t.Fatal(err)
	}
	worst := 0.0
	for k, tk := range st.T {
		worst = math.Max(worst, math.Abs(st.Y[0][0][k]-(1-math.Exp(-tk))))
		worst = math.Max(worst, math.Abs(im.Y[0][0][k]-math.Exp(-tk)))
	}
	if worst > 1e-13 {
		t.Errorf("first order: worst error %g", worst)
	}
	// Second order, zeta = 0.2, wn = 3 (Ogata Section 5-3 closed forms).
	zeta, wn := 0.2, 3.0
	g = secondOrder(zeta, wn)
	st, _ = Step(ctx, g, ResponseOptions{Until: 10, Step: 0.005})
	im, _ = Impulse(ctx, g, ResponseOptions{Until: 10, Step: 0.005})
	worst = 0
	for k, tk := range st.T {
		worst = math.Max(worst, math.Abs(st.Y[0][0][k]-so2Step(zeta, wn, tk)))
		worst = math.Max(worst, math.Abs(im.Y[0][0][k]-so2Impulse(zeta, wn, tk)))
	}
	if worst > 1e-12 {
		t.Errorf("second order: worst error %g", worst)
	}
	// Sampled x[k+1] = 0.5 x + u, y = x: y[k] = 2 (1 - 0.5^k) (geometric sum).
	d, _ := FromMatrices(mat.NewDense(1, 1, []float64{0.5}), mat.NewDense(1, 1, []float64{1}), nil, nil, 0.1)
	sd, err := Step(ctx, d, ResponseOptions{Until: 2})
	if err != nil {
		t.Fatal(err)
	}
	for k := range sd.T {
		if e := math.Abs(sd.Y[0][0][k] - 2*(1-math.Pow(0.5, float64(k)))); e > 1e-14 {
			t.Fatalf("sampled step k=%d error %g", k, e)
		}
	}
}

func TestSimulateInputs(t *testing.T) {
	ctx := context.Background()
	// Ramp into 1/(s+a): y = t/a - (1 - e^{-at})/a^2 (common practice,
	// partial fractions). Linear hold is exact for a ramp.
	a := 2.0
	r, err := Simulate(ctx, first(a), Ramp(1), nil, ResponseOptions{Until: 4, Step: 0.05})
	if err != nil {
		t.Fatal(err)
	}
	worst := 0.0
	for k, tk := range r.T {
		worst = math.Max(worst, math.Abs(r.Y[0][0][k]-(tk/a-(1-math.Exp(-a*tk))/(a*a))))
	}
	if worst > 1e-13 {
		t.Errorf("ramp: worst error %g", worst)
	}
	// sin(wt) into 1/(s+1): y = (sin wt - w cos wt + w e^{-t})/(1 + w^2)
	// (common practice, partial fractions). Linear hold is O(h^2).
	w := 3.0
	r, err = Simulate(ctx, first(1), Sine(w, 1), nil, ResponseOptions{Until: 6, Step: 0.001})
	if err != nil {
		t.Fatal(err)
	}
	worst = 0
	for k, tk := range r.T {
		want := (math.Sin(w*tk) - w*math.Cos(w*tk) + w*math.Exp(-tk)) / (1 + w*w)
		worst = math.Max(worst, math.Abs(r.Y[0][0][k]-want))
	}
	if worst > 1e-6 {
		t.Errorf("sine: worst error %g", worst)
	}
	// A zoh table reproduces the step response exactly.
	tab, err := TableSignal([]float64{0, 10}, [][]float64{{1}, {1}}, "")
	if err != nil {
		t.Fatal(err)
	}
	tab.Hold = HoldZeroOrder
	r, err = Simulate(ctx, first(1), tab, nil, ResponseOptions{Step: 0.1})
	if err != nil {
		t.Fatal(err)
	}
	if got, want := r.Y[0][0][10], 1-math.Exp(-1); math.Abs(got-want) > 1e-14 {
		t.Errorf("table: %g want %g", got, want)
	}
	// Initial state of 1/(s+1): y = x0 e^{-t}.
	in, err := Initial(ctx, first(1), []float64{2}, ResponseOptions{Until: 1, Step: 0.1})
	if err != nil {
		t.Fatal(err)
	}
	if e := math.Abs(in.Y[0][0][10] - 2*math.Exp(-1)); e > 1e-14 {
		t.Errorf("initial error %g", e)
	}
	if _, err := Initial(ctx, first(1), []float64{1, 2}, ResponseOptions{}); err == nil {
		t.Error("wrong initial state length accepted")
	}
	cctx, cancel := context.WithCancel(ctx)
	cancel()
	if _, err := Step(cctx, first(1), ResponseOptions{}); err == nil {
		t.Error("cancelled context ignored")
	}
}

func TestAutoHorizon(t *testing.T) {
	// slowest settling mode at -0.5 (6/0.5 = 12 s -> 20 s); fastest |s| = 100.
	g := secondOrder(0.7, 100)
	s, _ := Stack(g, first(0.5))
	until, step, _ := AutoHorizon(s)
	if until < 12 || until > 20 {
		t.Errorf("horizon %g, want 20 (12 rounded up)", until)
	}
	if step > 2*math.Pi/100/20+1e-12 {
		t.Errorf("step %g does not resolve the fast mode", step)
	}
}

func TestMetricsSecondOrder(t *testing.T) {
	// Overshoot e^{-pi zeta/sqrt(1-zeta^2)} and peak time pi/wd (Ogata,
	// Modern Control Engineering, 5th ed., Section 5-3); rise and settling
	// times found on the closed-form response by bisection and scanning.
	zeta, wn := 0.5, 2.0
	r, err := Step(context.Background(), secondOrder(zeta, wn), ResponseOptions{Until: 10, Step: 0.001})
	if err != nil {
		t.Fatal(err)
	}
	m, err := ResponseMetrics(r)
	if err != nil {
		t.Fatal(err)
	}
	row := m.Rows[0]
	wd := wn * math.Sqrt(1-zeta*zeta)
	if !row.SteadyFromGain || math.Abs(row.Steady-1) > 1e-14 {
		t.Errorf("steady %g", row.Steady)
	}
	if want := 100 * math.Exp(-math.Pi*zeta/math.Sqrt(1-zeta*zeta)); math.Abs(row.Overshoot-want) > 1e-4 {
		t.Errorf("overshoot %g want %g", row.Overshoot, want)
	}
	if want := math.Pi / wd; math.Abs(row.PeakTime-want) > 1e-3 {
		t.Errorf("peak time %g want %g", row.PeakTime, want)
	}
	bis := func(level float64) float64 {
		lo, hi := 0.0, math.Pi/wd
		for i := 0; i < 100; i++ {
			mid := (lo + hi) / 2
			if so2Step(zeta, wn, mid) < level {
				lo = mid
			} else {
				hi = mid
			}
		}
		return lo
	}
	if want := bis(0.9) - bis(0.1); math.Abs(row.RiseTime-want) > 1e-5 {
		t.Errorf("rise %g want %g", row.RiseTime, want)
	}
	ts := 0.0
	for tt := 0.0; tt < 10; tt += 1e-5 {
		if math.Abs(so2Step(zeta, wn, tt)-1) > 0.02 {
			ts = tt
		}
	}
	if math.Abs(row.SettlingTime-ts) > 1e-4 {
		t.Errorf("settling %g want %g", row.SettlingTime, ts)
	}
	// Approximation 4/(zeta wn) (Ogata Section 5-3) within 25 % as a sanity check.
	if math.Abs(row.SettlingTime-4/(zeta*wn)) > 0.25*4/(zeta*wn) {
		t.Errorf("settling %g far from 4/(zeta wn) = %g", row.SettlingTime, 4/(zeta*wn))
	}
}

func TestMatchedPoleZero(t *testing.T) {
	// Matched pole-zero of (s+1)/((s+2)(s+3)), T = 0.1: zero e^{-T},
	// poles e^{-2T}, e^{-3T}, DC gain 1/6 kept (Franklin, Powell & Workman,
	// Digital Control of Dynamic Systems, 3rd ed., Section 6.3.3, from
	// memory). Relative degree 1: no zero at z = -1 is added.
	T := 0.1
	g := siso(t, []float64{1, 1}, []float64{6, 5, 1})
	d, err := Sample(g, T, MatchedPoleZero, 0)
	if err != nil {
		t.Fatal(err)
	}
	dc, ok := DCGain(d)
	if !ok || math.Abs(dc.At(0, 0)-1.0/6) > 1e-13 {
		t.Errorf("DC gain %v want 1/6", dc)
	}
	// the sampled transfer function vanishes at the mapped zero
	out := make([]complex128, 1)
	if err := newHessenberg(d).at(complex(math.Exp(-T), 0), out); err != nil || math.Abs(real(out[0])) > 1e-12 {
		t.Errorf("value at the mapped zero: %v %v", out[0], err)
	}
	poles, _ := Poles(d)
	want := []float64{math.Exp(-3 * T), math.Exp(-2 * T)}
	for i, p := range poles {
		if math.Abs(real(p)-want[i]) > 1e-12 && math.Abs(real(p)-want[1-i]) > 1e-12 {
			t.Errorf("pole %v, want %v", p, want)
		}
	}
	// Relative degree 2: 1/((s+2)(s+3)) gets one zero at z = -1.
	d, err = Sample(siso(t, []float64{1}, []float64{6, 5, 1}), T, MatchedPoleZero, 0)
	if err != nil {
		t.Fatal(err)
	}
	if err := newHessenberg(d).at(-1, out); err != nil || cmplx.Abs(out[0]) > 1e-12 {
		t.Errorf("value at z = -1: %v %v", out[0], err)
	}
}

func stackTwo(g *System) *System {
	s, _ := Stack(g, g)
	return s
}

func TestAutoHorizonSampledAndUnstable(t *testing.T) {
	// sampled pole z = 0.9, Ts = 0.1: s = ln(0.9)/0.1 = -1.054, 6/1.054 =
	// 5.69 s -> 10 s; the step is the sample time.
	d, _ := FromMatrices(mat.NewDense(1, 1, []float64{0.9}), mat.NewDense(1, 1, []float64{1}), nil, nil, 0.1)
	until, step, _ := AutoHorizon(d)
	if math.Abs(until-10) > 1e-12 || step != 0.1 {
		t.Errorf("sampled: horizon %g step %g, want 10 and 0.1", until, step)
	}
	// a growing mode at +2 caps the horizon at 5/2 = 2.5 s -> 5 s, even
	// with a slow stable mode at -0.01 beside it
	u, _ := Stack(first(-2), first(0.01))
	until, _, rule := AutoHorizon(u)
	if until != 5 {
		t.Errorf("unstable: horizon %g (%s), want 5", until, rule)
	}
}

func TestSimulateTablePerInput(t *testing.T) {
	// two decoupled lags 1/(s+1), 1/(s+2) driven by their own table
	// columns (held): y1 = 1 - e^{-t}, y2 = (1 - e^{-2t})/2 * 3 for a
	// height-3 step on input 2 (common practice).
	g, _ := Stack(first(1), first(2))
	y, _ := Series(mustSystem(NewSystem(0, 2, 1, nil, nil, nil, mat.NewDense(1, 2, []float64{1, 1}), 0)), g)
	tab, err := TableSignal([]float64{0, 5}, [][]float64{{1, 3}, {1, 3}}, "two")
	if err != nil {
		t.Fatal(err)
	}
	tab.Hold = HoldZeroOrder
	r, err := Simulate(context.Background(), y, tab, nil, ResponseOptions{Until: 2, Step: 0.01})
	if err != nil {
		t.Fatal(err)
	}
	k := 100 // t = 1
	want := (1 - math.Exp(-1)) + 3*(1-math.Exp(-2))/2
	if e := math.Abs(r.Y[0][0][k] - want); e > 1e-13 {
		t.Errorf("y(1) = %g want %g", r.Y[0][0][k], want)
	}
}

func mustSystem(s *System, err error) *System {
	if err != nil {
		panic(err)
	}
	return s
}

func TestRigidBodyModesDoNotStretchHorizon(t *testing.T) {
	// Two inertias joined by a spring: a double eigenvalue at 0 (rigid
	// body, computed as ~1e-16) and a pair at +-j sqrt(k(1/J1 + 1/J2)).
	// The horizon and frequency range must come from the flexible pair
	// (common practice: rigid-body modes do not settle and ask nothing).
	k, J1, J2 := 3.1, 2e-4, 6e-4
	A := mat.NewDense(4, 4, []float64{
		0, 1, 0, 0,
		-k / J1, -0.004 / J1, k / J1, 0.004 / J1,
		0, 0, 0, 1,
		k / J2, 0.004 / J2, -k / J2, -0.004 / J2,
	})
	g, _ := FromMatrices(A, mat.NewDense(4, 1, []float64{0, 1 / J1, 0, 0}), mat.NewDense(1, 4, []float64{0, 0, 0, 1}), nil, 0)
	until, _, _ := AutoHorizon(g)
	if until > 10 {
		t.Errorf("horizon %g s: stretched by a rigid-body mode", until)
	}
	f, err := Frequency(context.Background(), g, FrequencyOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if f.W[0] < 1e-3 || len(f.W) >= 5000 {
		t.Errorf("frequency grid from %g with %d points: stretched by a rigid-body mode", f.W[0], len(f.W))
	}
}

func TestMetricsResponseThatReturns(t *testing.T) {
	// A rejected disturbance: G(s) = -s/(s+1)^2 has the step response
	// y(t) = -t e^{-t} (inverse Laplace transform of -1/(s+1)^2, any table,
	// e.g. Ogata, Modern Control Engineering, 5th ed., Table 2-1), which
	// returns to 0. Its largest deviation is -1/e at t = 1; rise time and
	// overshoot are not defined; settling into 2 % of the deviation is where
	// t e^{-t} = 0.02/e on the tail.
	g := siso(t, []float64{0, -1}, []float64{1, 2, 1})
	r, err := Step(context.Background(), g, ResponseOptions{Until: 15, Step: 0.001})
	if err != nil {
		t.Fatal(err)
	}
	m, err := ResponseMetrics(r)
	if err != nil {
		t.Fatal(err)
	}
	row := m.Rows[0]
	if !math.IsNaN(row.RiseTime) || !math.IsNaN(row.Overshoot) {
		t.Errorf("rise %g, overshoot %g: want both not defined", row.RiseTime, row.Overshoot)
	}
	if math.Abs(row.Peak+1/math.E) > 1e-6 || math.Abs(row.PeakTime-1) > 1e-3 {
		t.Errorf("peak %g at %g, want -1/e = %g at 1", row.Peak, row.PeakTime, -1/math.E)
	}
	ts := row.SettlingTime
	if f := ts * math.Exp(-ts); ts < 1 || math.Abs(f-0.02/math.E) > 1e-5 {
		t.Errorf("settling %g: t e^-t = %g, want %g", ts, f, 0.02/math.E)
	}
	if !strings.Contains(row.Note, "largest deviation") || len(row.Undefined) != 2 || row.Undefined[0].Reason != "the response returns to where it started" {
		t.Errorf("note %q, undefined %v", row.Note, row.Undefined)
	}
}

// TestResponseSampleLimit: a sampled response with a horizon of 1e12 s was
// computed (or ran the kernel out of memory); every response is capped at
// MaxResponseSamples with an error that names the limit.
func TestResponseSampleLimit(t *testing.T) {
	g, err := FromMatrices(mat.NewDense(1, 1, []float64{0.5}), mat.NewDense(1, 1, []float64{1}), mat.NewDense(1, 1, []float64{1}), nil, 0.1)
	if err != nil {
		t.Fatal(err)
	}
	_, err = Step(context.Background(), g, ResponseOptions{Until: 1e12})
	if err == nil || !strings.Contains(err.Error(), "1000000") {
		t.Fatalf("err = %v, want the sample limit named", err)
	}
}
