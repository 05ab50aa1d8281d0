package lsys

import (
	"context"
	"math"
	"testing"
)

func TestIntegrateLogistic(t *testing.T) {
	// x' = r x (1 - x/K): x(t) = K / (1 + (K/x0 - 1) e^(-r t)) (closed form).
	r, K, x0 := 1.3, 10.0, 0.2
	f := func(t float64, x, dx []float64) error { dx[0] = r * x[0] * (1 - x[0]/K); return nil }
	var ts []float64
	for k := 1; k <= 40; k++ {
		ts = append(ts, 0.25*float64(k))
	}
	for _, tol := range []float64{1e-6, 1e-10} {
		xs, st, err := Integrate(context.Background(), f, []float64{x0}, 0, ts, ODEOptions{RelTol: tol, AbsTol: tol * 1e-3})
		if err != nil {
			t.Fatal(err)
		}
		worst := 0.0
		for k, tk := range ts {
			want := K / (1 + (K/x0-1)*math.Exp(-r*tk))
			worst = math.Max(worst, math.Abs(xs[k][0]-want)/want)
		}
		// The global error stays within a small multiple of the tolerance.
		if worst > 50*tol {
			t.Errorf("rtol %g: worst relative error %g (%d steps)", tol, worst, st.Steps)
		}
		t.Logf("rtol %g: worst relative error %.2g, %d steps, %d rejected", tol, worst, st.Steps, st.Rejected)
	}
}

func TestIntegratePendulumEnergy(t *testing.T) {
	// theta'' = -w2 sin(theta): E = theta'^2/2 - w2 cos(theta) is constant
	// (closed form first integral).
	w2 := 9.81
	f := func(t float64, x, dx []float64) error { dx[0], dx[1] = x[1], -w2*math.Sin(x[0]); return nil }
	ts := []float64{1, 2, 5, 10, 20}
	xs, _, err := Integrate(context.Background(), f, []float64{3, 0}, 0, ts, ODEOptions{RelTol: 1e-10, AbsTol: 1e-12})
	if err != nil {
		t.Fatal(err)
	}
	E0 := -w2 * math.Cos(3)
	for k := range ts {
		E := xs[k][1]*xs[k][1]/2 - w2*math.Cos(xs[k][0])
		if math.Abs(E-E0) > 1e-7*math.Abs(E0) {
			t.Errorf("t=%g: energy %v, started %v", ts[k], E, E0)
		}
	}
}

func TestIntegrateAgainstReference(t *testing.T) {
	d := loadDesignRef(t)
	rhs := map[string]ODEFunc{
		"pendulum": func(t float64, x, dx []float64) error {
			dx[0], dx[1] = x[1], -9.81*math.Sin(x[0])-0.1*x[1]
			return nil
		},
		"van_der_pol": func(t float64, x, dx []float64) error {
			dx[0], dx[1] = x[1], 2*(1-x[0]*x[0])*x[1]-x[0]
			return nil
		},
	}
	x0 := map[string][]float64{"pendulum": {2.5, 0}, "van_der_pol": {2, 0}}
	for _, c := range d.IVP {
		xs, _, err := Integrate(context.Background(), rhs[c.Name], x0[c.Name], 0, c.T, ODEOptions{RelTol: 1e-11, AbsTol: 1e-12})
		if err != nil {
			t.Fatal(err)
		}
		for k := range c.T {
			for i, want := range c.X[k] {
				if math.Abs(xs[k][i]-want) > 1e-8*math.Max(1, math.Abs(want)) {
					t.Errorf("%s t=%g state %d: %v vs %v", c.Name, c.T[k], i, xs[k][i], want)
				}
			}
		}
	}
}

func TestIntegrateInterrupt(t *testing.T) {
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	f := func(t float64, x, dx []float64) error { dx[0] = -x[0]; return nil }
	if _, _, err := Integrate(ctx, f, []float64{1}, 0, []float64{1}, ODEOptions{}); err == nil {
		t.Fatal("a cancelled context must stop the integration")
	}
}
