package builtins_test

import (
	"math"
	"strings"
	"testing"

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
