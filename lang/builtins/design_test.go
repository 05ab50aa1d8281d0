package builtins_test

import (
	"math"
	"strings"
	"testing"

	"gonum.org/v1/gonum/mat"

	"lsys/lang"
	"lsys/lang/builtins"
	"lsys/lang/langtest"
	"lsys/lsys"
)

func TestBuiltinLyapunov(t *testing.T) {
	// a x + x a + q = 0 with a = -2, q = 3: x = 3/4 (closed form).
	s := stRun(t, "lyapunov(-2, 3)").(*lsys.LyapunovSolution)
	if math.Abs(s.X.At(0, 0)-0.75) > 1e-15 {
		t.Fatalf("X = %v", s.X.At(0, 0))
	}
	// Sampled: a x a - x + q = 0, a = 0.5, q = 3: x = 4 (closed form).
	if x := stRun(t, "lyapunov(0.5, 3, sampled: true).X").(*mat.Dense); math.Abs(x.At(0, 0)-4) > 1e-15 {
		t.Fatalf("sampled X = %v", x.At(0, 0))
	}
	stRunErr(t, "lyapunov([[1, 2]], 1)", "square")
	// A X + X B = C with scalars: x = c / (a + b) (closed form).
	if x := stRun(t, "sylvester(-1, -3, 8).X").(*mat.Dense); math.Abs(x.At(0, 0)+2) > 1e-15 {
		t.Fatalf("sylvester X = %v", x.At(0, 0))
	}
}

func TestBuiltinRiccatiRegulator(t *testing.T) {
	// Double integrator, Q = I, R = 1: K = [1, sqrt 3] (closed form).
	k := stRun(t, "G = system([[0, 1], [0, 0]], [0, 1], [1, 0])\nregulator(G, identity(2), 1).K").(*mat.Dense)
	if math.Abs(k.At(0, 0)-1) > 1e-14 || math.Abs(k.At(0, 1)-math.Sqrt(3)) > 1e-14 {
		t.Fatalf("K = %v", k.RawMatrix().Data)
	}
	x := stRun(t, "riccati([[0, 1], [0, 0]], [[0], [1]], 1, 1).X").(*mat.Dense)
	if math.Abs(x.At(0, 0)-math.Sqrt(3)) > 1e-14 {
		t.Fatalf("X = %v", x.RawMatrix().Data)
	}
	// An unreachable unstable mode has no stabilizing solution.
	stRunErr(t, "riccati([[1, 0], [0, -1]], [[0], [1]], 1, 1)", "no stabilizing solution")
	stRunErr(t, "G = system([[0, 1], [0, 0]], [0, 1], [1, 0])\nregulator(G, identity(3), 1)", "2x2")
}

func TestBuiltinEstimator(t *testing.T) {
	// x' = -0.5 x + w, y = x + v, W = 4, V = 0.25: L = a + sqrt(a^2 + W/V)
	// (closed form of the scalar Riccati equation).
	l := stRun(t, "estimator(system(-0.5, 1, 1), 4, 0.25).L").(*mat.Dense)
	if want := -0.5 + math.Sqrt(0.25+16); math.Abs(l.At(0, 0)-want) > 1e-14 {
		t.Fatalf("L = %v want %v", l.At(0, 0), want)
	}
}

func TestBuiltinNormsAndReduction(t *testing.T) {
	if v := stRun(t, "norm(system(-1, 1, 1), 2).value").(float64); math.Abs(v-1/math.Sqrt2) > 1e-15 {
		t.Fatalf("H2 = %v", v)
	}
	// zeta = 0.05: peak 1/(2 zeta sqrt(1 - zeta^2)) (closed form).
	v := stRun(t, "norm(system([[0, 1], [-1, -0.1]], [0, 1], [1, 0]), inf).value").(float64)
	if want := 1 / (0.1 * math.Sqrt(1-0.0025)); math.Abs(v-want) > 1e-8*want {
		t.Fatalf("Hinf = %v want %v", v, want)
	}
	stRunErr(t, "norm(system(-1, 1, 1), 3)", "2 or inf")
	h := stRun(t, "hankel(system(-1, 1, 1)).values").(*mat.Dense)
	if math.Abs(h.At(0, 0)-0.5) > 1e-15 {
		t.Fatalf("HSV = %v", h.At(0, 0))
	}
	g := "G = system([[-1, 1, 0, 0], [0, -2, 1, 0], [0, 0, -5, 1], [0, 0, 0, -20]], [0, 0, 0, 20], [1, 0, 0, 0])\n"
	r := stRun(t, g+"reduce(G, order: 2)").(*lsys.Reduction)
	if r.Reduced.N() != 2 || r.Error > r.Bound {
		t.Fatalf("order %d error %g bound %g", r.Reduced.N(), r.Error, r.Bound)
	}
	stRunErr(t, g+"reduce(G)", "either order or tol")
	stRunErr(t, g+"reduce(G, order: 2, tol: 0.1)", "either order or tol")
	if _, ok := stRun(t, g+"gramians(G).P").(*mat.Dense); !ok {
		t.Fatal("gramians(G).P is not a matrix")
	}
	if _, ok := stRun(t, g+"balanced(G).T").(*mat.Dense); !ok {
		t.Fatal("balanced(G).T is not a matrix")
	}
	stRunErr(t, "gramians(system(1, 1, 1))", "stable")
}

func TestBuiltinAssign(t *testing.T) {
	// Companion form s^2 + 0.8 s + 4 with B = [0, 0.5]: poles -2 +- 2j need
	// s^2 + 4 s + 8, so K = [(8 - 4)/0.5, (4 - 0.8)/0.5] = [8, 6.4] (closed form).
	k := stRun(t, stMSD+"assign(G, [-2 + 2j, -2 - 2j]).K").(*mat.Dense)
	if math.Abs(k.At(0, 0)-8) > 1e-13 || math.Abs(k.At(0, 1)-6.4) > 1e-13 {
		t.Fatalf("K = %v", k.RawMatrix().Data)
	}
	stRunErr(t, stMSD+"assign(G, [-1 + 1j, -2])", "conjugate")
	stRunErr(t, "assign(system([[-1, 0], [0, -3]], [1, 0], [1, 1]), [-5, -6])", "not reachable")
	if _, ok := stRun(t, stMSD+"assign(G, [-10, -12], observer: true).L").(*mat.Dense); !ok {
		t.Fatal("observer gain missing")
	}
}

func TestBuiltinCovariance(t *testing.T) {
	// x' = -2 x + 3 w, y = 0.5 x, W = 0.8: RMS = 0.5 * 3 * sqrt(0.8/4)
	// (closed form, P = b^2 W / (2a)).
	r := stRun(t, "covariance(system(-2, 3, 0.5), 0.8).rms").(*lang.Record)
	if v := r.Values[0].(float64); math.Abs(v-1.5*math.Sqrt(0.2)) > 1e-15 {
		t.Fatalf("RMS = %v", v)
	}
	s := lang.NewSession(lang.Options{Builtins: builtins.Registry(), Dir: t.TempDir()})
	v, err := s.Run(t.Context(), "covariance(system(-2, 3, 0.5, 1), 0.8)", &langtest.Recorder{})
	if err != nil {
		t.Fatal(err)
	}
	if cv := v.(*lsys.Covariance); !math.IsInf(cv.RMS[0], 1) || !strings.Contains(cv.Infinite, "feedthrough") {
		t.Fatalf("feedthrough: %v %q", cv.RMS, cv.Infinite)
	}
}

func TestBuiltinSimulate(t *testing.T) {
	// Logistic growth x' = r x (1 - x/K): x(t) = K / (1 + (K/x0 - 1) e^(-r t))
	// (closed form).
	src := "m = system {\n  states x\n  outputs y\n  x' = 1.3 * x * (1 - x / 10)\n  y = x\n}\n" +
		"s = simulate(m, until: 6, initial: {x: 0.2}, rtol: 1e-10, atol: 1e-12)\n"
	y := stRun(t, src+"s.y").(*mat.Dense)
	ts := stRun(t, src+"s.t").(*mat.Dense)
	for k := 0; k < len(ts.RawMatrix().Data); k += 50 {
		tk := ts.At(k, 0)
		want := 10 / (1 + (10/0.2-1)*math.Exp(-1.3*tk))
		if math.Abs(y.At(k, 0)-want) > 1e-8*want {
			t.Fatalf("t=%g: %v want %v", tk, y.At(k, 0), want)
		}
	}
	// A pendulum closed by a gain keeps its linear model's answer for
	// small angles: the two curves agree to second order.
	pend := "p = system {\n  states angle, rate\n  inputs torque\n  outputs a\n  angle' = rate\n  rate' = -9.81 * sin(angle) - 0.2 * rate + torque\n  a = angle\n}\n" +
		"G = linearize(p, at: {angle: 0, rate: 0, torque: 0})\n"
	s := stRun(t, pend+"simulate(p, until: 3, initial: {angle: 0.01}, controller: -2, linear: G)").(*lsys.Simulation)
	for k := range s.T {
		if math.Abs(s.Y[k][0]-s.Linear[k][0]) > 1e-6 {
			t.Fatalf("t=%g: model %v linear %v", s.T[k], s.Y[k][0], s.Linear[k][0])
		}
	}
	stRunErr(t, pend+"simulate(G)", "equation block")
	stRunErr(t, pend+"simulate(p, initial: {speed: 1})", "not one of the model's names")
}
