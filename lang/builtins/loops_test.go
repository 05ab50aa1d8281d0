package builtins_test

import (
	"context"
	"math"
	"strings"
	"testing"

	"lsys/lang"
	"lsys/lang/builtins"
	"lsys/lang/langtest"
	"lsys/lsys"
)

// margins(L, delay: T) of L = k/s: PM = 90 - kT deg (closed form; see
// lsys.TestMarginsExactDelay), and polar/frequency accept the same option.
func TestDelayOption(t *testing.T) {
	mg := stRun(t, "margins(2/s, delay: 0.1)").(*lsys.Margins)
	if want := 90 - 0.2*180/math.Pi; math.Abs(mg.PhaseMargin-want) > 1e-7 {
		t.Errorf("PM %g want %g", mg.PhaseMargin, want)
	}
	f := stRun(t, "frequency(1/(s + 1), delay: 0.5)").(*lsys.FrequencyResponse)
	if f.Delay != 0.5 || !strings.Contains(f.Rule, "e^(-jwT)") {
		t.Errorf("delay %g, rule %q", f.Delay, f.Rule)
	}
	if p := stRun(t, "polar(1/(s + 1), delay: 0.5)").(*lsys.PolarChart); p.Frequency.Delay != 0.5 {
		t.Error("polar lost the delay")
	}
	stRunErr(t, "frequency(1/(s + 1), delay: -1)", "'delay' must be >= 0")
}

// loopshapes of L = wn^2/(s (s + 2 z wn)): the T peak 1/(2 z sqrt(1 - z^2))
// (Ogata, Modern Control Engineering, 5th ed., Section 7-2); the modulus
// margin is 1/peak_s (definition).
func TestLoopShapesBuiltin(t *testing.T) {
	ls := stRun(t, "loopshapes(4/(s*(s + 1.2)), 1)").(*lsys.LoopShape)
	z := 0.3
	if want := 1 / (2 * z * math.Sqrt(1-z*z)); math.Abs(ls.Peak[1]-want) > 1e-12*want {
		t.Errorf("peak T %g want %g", ls.Peak[1], want)
	}
	if mm := stRun(t, "loopshapes(4/(s*(s + 1.2)), 1).modulus_margin").(float64); math.Abs(mm*ls.Peak[0]-1) > 1e-15 {
		t.Errorf("modulus margin %g, peak S %g", mm, ls.Peak[0])
	}
	stRunErr(t, "loopshapes(system([[-1, 0], [0, -2]], [[1, 0], [0, 1]], [[1, 0], [0, 1]]), 1)", "one input and one output")
}

// Issue 15, friction 4: a locus that fails (or is interrupted) part way
// says where it stopped; it does not leave "0 of N" standing.
func TestLocusProgressStopped(t *testing.T) {
	s := lang.NewSession(lang.Options{Builtins: builtins.Registry(), Dir: t.TempDir()})
	r := &langtest.Recorder{}
	_, err := s.Run(context.Background(), "f(k) = if k < 30 then system([[-k]]) else 1\nlocus(f, k: linear(1, 60, n: 60))", r)
	if err == nil {
		t.Fatal("no error")
	}
	if len(r.Updates) == 0 || r.Updates[len(r.Updates)-1] != "locus: stopped after 29 of 60 values" {
		t.Errorf("updates %v", r.Updates)
	}
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	r = &langtest.Recorder{}
	if _, err := s.Run(ctx, "g(k) = system([[-k]])\nlocus(g, k: linear(1, 60, n: 60))", r); err == nil {
		t.Fatal("not interrupted")
	}
	if len(r.Displays) > 0 && (len(r.Updates) == 0 || !strings.HasPrefix(r.Updates[len(r.Updates)-1].(string), "locus: stopped after")) {
		t.Errorf("stale progress left: displays %v, updates %v", r.Displays, r.Updates)
	}
}

// chart(...) carries its options and picks outputs by name.
func TestChartBuiltin(t *testing.T) {
	const g = "G = system([[-1, 0], [0, -3]], [[1], [1]], [[1, 0], [0, 1]], outputs: [\"near\", \"far\"])\n"
	c := stRun(t, g+`chart(response(G, step), title: "t", outputs: ["far"], xmin: 0.1, xscale: "log", width: 12, height: 6)`).(*lsys.Chart)
	r := c.Value.(*lsys.Response)
	if c.Title != "t" || c.XMin != 0.1 || !math.IsNaN(c.XMax) || c.XScale != "log" || len(r.Outputs) != 1 || r.Outputs[0] != "far" {
		t.Errorf("chart %+v outputs %v", c, r.Outputs)
	}
	// the step response of 1/(s + 3) settles at 1/3 (closed form)
	if v := r.Final.At(0, 0); math.Abs(v-1.0/3) > 1e-15 {
		t.Errorf("final %v", v)
	}
	f := stRun(t, g+`chart(frequency(G), outputs: ["far", "near"])`).(*lsys.Chart).Value.(*lsys.FrequencyResponse)
	if f.Outputs[0] != "far" || len(f.G[0]) != 2 {
		t.Errorf("frequency outputs %v", f.Outputs)
	}
	stRunErr(t, g+`chart(response(G, step), outputs: ["mid"])`, `there is no output "mid"`)
	stRunErr(t, "chart(3)", "has no chart")
	stRunErr(t, g+`chart(response(G, step), xscale: "cubic")`, `"log" or "linear"`)
	stRunErr(t, g+`chart(response(G, step), width: 10)`, "width and height go together")
	stRunErr(t, `chart(polezero(1/(s + 1)), xscale: "log")`, "complex plane has linear axes")
}

// The modulus margin of loopshapes and of margins are the same figure,
// computed apart (1/max|S| on the loop-shape grid; min |1 + L| in margins),
// with and without a dead time.
func TestModulusMarginAgrees(t *testing.T) {
	for _, d := range []string{"", ", delay: 0.05"} {
		ls := stRun(t, "P = 3/((s + 1)*(0.2*s + 1))\nloopshapes(P, threeterm(1.5, integral: 0.7)"+d+")").(*lsys.LoopShape)
		mg := stRun(t, "P = 3/((s + 1)*(0.2*s + 1))\nmargins(P * threeterm(1.5, integral: 0.7)"+d+")").(*lsys.Margins)
		if math.Abs(ls.ModulusMargin-mg.ModulusMargin) > 1e-9*mg.ModulusMargin {
			t.Errorf("delay%q: loopshapes %.12g, margins %.12g", d, ls.ModulusMargin, mg.ModulusMargin)
		}
	}
}

// Issue 15, friction 5: the warning reaches the error stream, which a
// notebook shows (a chart shows no rule); a step given says nothing.
func TestResponseWarnsUnresolvedOnStderr(t *testing.T) {
	s := lang.NewSession(lang.Options{Builtins: builtins.Registry(), Dir: t.TempDir()})
	r := &langtest.Recorder{}
	if _, err := s.Run(context.Background(), "G = 4/(s^2 + 0.4*s + 4)\nresponse(G, step, until: 1e6)", r); err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(r.Err.String(), "response: 1 mode faster than") {
		t.Errorf("stderr %q", r.Err.String())
	}
	r = &langtest.Recorder{}
	if _, err := s.Run(context.Background(), "response(G, step, until: 20)\nresponse(G, step, until: 1e3, dt: 0.1)", r); err != nil {
		t.Fatal(err)
	}
	if r.Err.Len() != 0 {
		t.Errorf("stderr %q", r.Err.String())
	}
}
