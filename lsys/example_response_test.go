package lsys_test

import (
	"context"
	"fmt"

	"lsys/lsys"
)

// A motion axis with a lead compensator: the loop 2(s+3)/(s(s+1)(s+5)),
// closed with unity negative feedback.
func ExampleLoopMargins() {
	L, _ := lsys.Realize([][]*lsys.Rational{{{Num: lsys.Poly{6, 2}, Den: lsys.Poly{0, 5, 6, 1}}}}, 0)
	m, _ := lsys.LoopMargins(context.Background(), L, lsys.FrequencyOptions{})
	fmt.Printf("phase margin %.1f deg at %.3f rad/s\n", m.PhaseMargin, m.GainCrossover)
	fmt.Printf("gain margin: infinite? %v; closed loop stable: %v\n", len(m.PhaseCrossovers) == 0, m.ClosedStable)
	// Output:
	// phase margin 54.2 deg at 0.912 rad/s
	// gain margin: infinite? true; closed loop stable: true
}

// The step response of a lightly damped mount, 9/(s^2 + 0.6 s + 9), and
// its figures.
func ExampleResponseMetrics() {
	G, _ := lsys.Realize([][]*lsys.Rational{{{Num: lsys.Poly{9}, Den: lsys.Poly{9, 0.6, 1}}}}, 0)
	r, _ := lsys.Step(context.Background(), G, lsys.ResponseOptions{Until: 20, Step: 0.001})
	m, _ := lsys.ResponseMetrics(r)
	row := m.Rows[0]
	fmt.Printf("overshoot %.1f %%, peak time %.3f s, settling time %.2f s\n", row.Overshoot, row.PeakTime, row.SettlingTime)
	// Output:
	// overshoot 72.9 %, peak time 1.052 s, settling time 12.79 s
}

// Sampling a first-order lag 1/(s+2) with a zero-order hold every 0.1 s.
func ExampleSample() {
	G, _ := lsys.Realize([][]*lsys.Rational{{{Num: lsys.Poly{1}, Den: lsys.Poly{2, 1}}}}, 0)
	Gd, _ := lsys.Sample(G, 0.1, lsys.ZeroOrderHold, 0)
	fmt.Printf("pole %.6f (e^-0.2 = 0.818731)\n", Gd.A.At(0, 0))
	// Output:
	// pole 0.818731 (e^-0.2 = 0.818731)
}
