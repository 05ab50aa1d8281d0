package builtins_test

import (
	"context"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"gonum.org/v1/gonum/mat"

	"lsys/lang"
	"lsys/lang/builtins"
	"lsys/lang/langtest"
	"lsys/lsys"
)

func runOne(t *testing.T, dir, src string) any {
	t.Helper()
	s := lang.NewSession(lang.Options{Builtins: builtins.Registry(), Dir: dir})
	v, err := s.Run(context.Background(), src, &langtest.Recorder{})
	if err != nil {
		t.Fatalf("%s\n%v", src, err)
	}
	return v
}

func wantNum(t *testing.T, src string, want, tol float64) {
	t.Helper()
	v := runOne(t, t.TempDir(), src)
	f, ok := v.(float64)
	if !ok {
		t.Fatalf("%s: got %s, want a number", src, builtins.Registry().TypeName(v))
	}
	if math.Abs(f-want) > tol {
		t.Errorf("%s: got %.15g want %.15g", src, f, want)
	}
}

func TestResponseBuiltinsNumbers(t *testing.T) {
	// steady-state gain of 4/(s^2+0.8s+4) is 1 (s = 0, common practice)
	wantNum(t, "gain(4 / (s^2 + 0.8*s + 4))", 1, 1e-15)
	// |1/(s+2)| at w = 2 is 1/sqrt(8) (common practice)
	wantNum(t, "abs(gain(1/(s + 2), at: 2))", 1/math.Sqrt(8), 1e-15)
	// K/(s(s+1)(s+2)) has gain margin 6/K at sqrt(2) rad/s (by hand, see
	// lsys TestMarginsThirdOrder)
	wantNum(t, "m = margins(2 / (s*(s + 1)*(s + 2)))\nm.gain_margin", 3, 1e-9)
	wantNum(t, "m = margins(2 / (s*(s + 1)*(s + 2)))\nm.phase_crossover", math.Sqrt2, 1e-9)
	// overshoot of the standard second order system, zeta = 0.2:
	// 100 exp(-pi zeta/sqrt(1-zeta^2)) (Ogata, Modern Control Engineering,
	// 5th ed., Section 5-3)
	z := 0.2
	wantNum(t, "G = 4 / (s^2 + 0.8*s + 4)\nr = metrics(response(G, step, dt: 0.001))\nr.overshoot", 100*math.Exp(-math.Pi*z/math.Sqrt(1-z*z)), 1e-3)
	// unity feedback around 2/(s(s+1)): T = 2/(s^2+s+2), gain 1
	wantNum(t, "gain(closeloop(2 / (s*(s + 1))))", 1, 1e-14)
	// positive feedback around 1/(s+2): 1/(s+1), gain 1
	wantNum(t, "gain(closeloop(1/(s + 2), sense: \"positive\"))", 1, 1e-14)
	// a return path 2/(s + 3) (negative feedback): T(0) = (1/2)/(1 + (1/2)(2/3)) = 3/8 (by hand)
	wantNum(t, "gain(closeloop(1/(s + 2), through: 2/(s + 3)))", 0.375, 1e-14)
	// ZOH of 1/(s+1) with T = 0.1: Phi = e^-0.1 (Franklin, Powell & Workman)
	wantNum(t, "Gd = sample(1/(s + 1), 0.1)\ngain(Gd)", 1, 1e-14)
	// a delay approximant is all-pass
	wantNum(t, "abs(gain(delay(0.2, order: 3), at: 5))", 1, 1e-12)
}

func TestResponseBuiltinsValues(t *testing.T) {
	dir := t.TempDir()
	csv := "time,torque\n0,0\n1,1\n2,1\n5,1\n"
	if err := os.WriteFile(filepath.Join(dir, "run.csv"), []byte(csv), 0o644); err != nil {
		t.Fatal(err)
	}
	cases := []struct {
		src  string
		kind string
	}{
		{"response(1/(s + 1), step)", "*lsys.Response"},
		{"response(1/(s + 1), impulse)", "*lsys.Response"},
		{"response(1/(s + 1), ramp, until: 3)", "*lsys.Response"},
		{"response(1/(s + 1), sine(2, amplitude: 0.5))", "*lsys.Response"},
		{"f(t) = t^2\nresponse(1/(s + 1), f, until: 2)", "*lsys.Response"},
		{"response(1/(s + 1), load(\"run.csv\"))", "*lsys.Response"},
		{"response(1/((s + 1)*(s + 4)), step, by: \"mode\")", "*lsys.ModalResponse"},
		{"frequency(1/(s + 1))", "*lsys.FrequencyResponse"},
		{"polar(1/(s + 1))", "*lsys.PolarChart"},
		{"singular(stack(1/(s + 1), 2/(s + 3)))", "*lsys.SingularValues"},
		{"polezero((s + 2)/(s^2 + s + 1))", "*lsys.PoleZeroMap"},
		{"continuous(sample(1/(s + 1), 0.1, by: \"bilinear\"), by: \"bilinear\")", "*lsys.System"},
		{"sample(1/(s + 1), 0.1, by: \"matched pole-zero\")", "*lsys.System"},
		{"sample(1/(s + 1), 0.1, by: \"first-order hold\")", "*lsys.System"},
		{"delay(0.1)", "*lsys.Rational"},
		{"table([0, 1], [0, 1])", "*lsys.Signal"},
	}
	for _, c := range cases {
		v := runOne(t, dir, c.src)
		if got := strings.TrimPrefix(typeNameGo(v), ""); got != c.kind {
			t.Errorf("%s: got %s want %s", c.src, got, c.kind)
		}
	}
	// the loaded table drives the first-order lag: y(5) = 1 - ... > 0.9
	v := runOne(t, dir, "r = response(1/(s + 1), load(\"run.csv\", hold: \"zero-order\"), dt: 0.01)\nr.y")
	y := v.(interface{ At(int, int) float64 })
	if got := y.At(500, 0); got < 0.9 || got > 1 {
		t.Errorf("load-driven response at 5 s: %g", got)
	}
	if v := runOne(t, dir, "abs(polezero((s + 2)/(s^2 + s + 1)).poles[1])"); v != 1.0 {
		// |p| = wn = 1 for s^2 + s + 1 (common practice)
		if f, ok := v.(float64); !ok || math.Abs(f-1) > 1e-14 {
			t.Errorf("|pole| = %v, want 1", v)
		}
	}
	pz := runOne(t, dir, "polezero((s + 2)/(s^2 + s + 1))").(*lsys.PoleZeroMap)
	if !pz.ZerosKnown || len(pz.Zeros) != 1 || math.Abs(real(pz.Zeros[0])+2) > 1e-12 {
		t.Errorf("zeros %v", pz.Zeros)
	}
}

func typeNameGo(v any) string {
	switch v.(type) {
	case *lsys.Response:
		return "*lsys.Response"
	case *lsys.ModalResponse:
		return "*lsys.ModalResponse"
	case *lsys.FrequencyResponse:
		return "*lsys.FrequencyResponse"
	case *lsys.PolarChart:
		return "*lsys.PolarChart"
	case *lsys.SingularValues:
		return "*lsys.SingularValues"
	case *lsys.PoleZeroMap:
		return "*lsys.PoleZeroMap"
	case *lsys.System:
		return "*lsys.System"
	case *lsys.Rational:
		return "*lsys.Rational"
	case *lsys.Signal:
		return "*lsys.Signal"
	}
	return builtins.Registry().TypeName(v)
}

func TestResponseBuiltinsErrors(t *testing.T) {
	langtest.RunCells(t, []langtest.Cell{
		{Src: "response(1/(s + 1))", Err: "nothing drives the system"},
		{Src: "response(1/(s + 1), 3)", Err: "must be an input signal"},
		{Src: "gain(1/s)", Err: "steady-state gain is infinite"},
		{Src: "load(\"../secret.csv\")", Err: "outside the notebook's folder"},
		{Src: "load(\"missing.csv\")", Err: "no file"},
		{Src: "closeloop(1/(s + 1), sense: -1)", Err: "the sense of the feedback is \"negative\" or \"positive\", not -1"},
		{Src: "closeloop(1/(s + 1), sign: -1)", Err: "no argument named 'sign' (it was renamed); did you mean 'sense'?"},
		{Src: "closeloop(1/(s + 1), 2)", Err: "closeloop takes 'through' by name only"},
		{Src: "polezero(1/(s + 1), within: -3)", Err: "'within' must be a positive number"},
		{Src: "sample(1/(s + 1), 0.1, by: \"fast\")", Err: "unknown method"},
		{Src: "sample(1/(s + 1), 0.1, by: \"zoh\")", Err: "did you mean \"zero-order hold\"?"},
		{Src: "continuous(sample(1/(s + 1), 0.1), by: \"tustin\")", Err: "did you mean \"bilinear\"?"},
		{Src: "sample(1/(s + 1), 0.1, method: \"zoh\")", Err: "no argument named 'method' (it was renamed); did you mean 'by'?"},
		{Src: "response(1/(s + 1), step, by: \"pole\")", Err: "by must be"},
		{Src: "table([0, 1], [0, 1], hold: \"zoh\")", Err: "did you mean \"zero-order\"?"},
		{Src: "wire(1/(s + 1), nope: 1)", Err: "no argument named 'nope'"},
		{Src: "connect(1/(s + 1))", Err: "'connect' was renamed; did you mean 'wire'?"},
		{Src: "G = system([[0, 1], [-2, -3]], [0, 1], [1, 0])\nresponse(G, initial: [1])", Err: "initial state has 1 entries"},
	})
}

func TestResponseProgress(t *testing.T) {
	// a 200-state chain of first-order lags shows progress and then empties it
	s := lang.NewSession(lang.Options{Builtins: builtins.Registry(), Dir: t.TempDir()})
	rec := &langtest.Recorder{}
	g, err := lsys.FromMatrices(negIdentity(200), unitCol(200), unitRow(200), nil, 0)
	if err != nil {
		t.Fatal(err)
	}
	s.Set("G", g)
	if _, err := s.Run(context.Background(), "response(G, step, until: 5, dt: 0.001)", rec); err != nil {
		t.Fatal(err)
	}
	if len(rec.Displays) != 1 || len(rec.Updates) < 2 {
		t.Fatalf("displays %d, updates %d", len(rec.Displays), len(rec.Updates))
	}
	if last := rec.Updates[len(rec.Updates)-1]; last != "" {
		t.Errorf("progress not emptied: %v", last)
	}
}

func negIdentity(n int) *mat.Dense {
	m := mat.NewDense(n, n, nil)
	for i := 0; i < n; i++ {
		m.Set(i, i, -1)
	}
	return m
}

func unitCol(n int) *mat.Dense { m := mat.NewDense(n, 1, nil); m.Set(0, 0, 1); return m }
func unitRow(n int) *mat.Dense { m := mat.NewDense(1, n, nil); m.Set(0, 0, 1); return m }

func TestPoleZeroWithin(t *testing.T) {
	// within: is handed to the map as given (our own argument)
	v := runOne(t, t.TempDir(), "polezero((s + 1000)/((s + 1)*(s + 2)), within: 5)")
	pz, ok := v.(*lsys.PoleZeroMap)
	if !ok || pz.Within != 5 {
		t.Fatalf("got %#v", v)
	}
}
