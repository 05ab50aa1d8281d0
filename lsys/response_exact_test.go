package lsys

import (
	"context"
	"math"
	"strings"
	"testing"
)

// lagPiece is the response of the unit lag y' = -y + u over a piece on
// which u = u0 + r tau, from y(0) = y0: y = u0 + r (tau - 1) +
// (y0 - u0 + r) e^-tau (closed form, by variation of constants).
func lagPiece(y0, u0, r, tau float64) float64 {
	return u0 + r*(tau-1) + (y0-u0+r)*math.Exp(-tau)
}

// lagTable is the exact response of 1/(s + 1) from rest to the table
// (times tb, values ub), held or linear between rows and held after the
// last, at time t.
func lagTable(tb, ub []float64, held bool, t float64) float64 {
	y, at := 0.0, 0.0
	for i := 0; i < len(tb) && at < t; i++ {
		// piece i: from tb[i] to tb[i+1] (or on), starting at value ub[i]
		end := math.Inf(1)
		if i+1 < len(tb) {
			end = tb[i+1]
		}
		if tb[i] > at { // before the first row: the first value
			seg := math.Min(tb[i], t) - at
			y = lagPiece(y, ub[0], 0, seg)
			at += seg
			if at >= t {
				break
			}
		}
		r := 0.0
		if !held && i+1 < len(tb) {
			r = (ub[i+1] - ub[i]) / (tb[i+1] - tb[i])
		}
		seg := math.Min(end, t) - at
		y = lagPiece(y, ub[i], r, seg)
		at += seg
	}
	return y
}

// Issue 8, item 4: a held table switches exactly at its rows, not at the
// next sample, and a linear table is exact at and between its rows. The
// reference is the closed form above; the tolerance 1e-12 is rounding of
// the block exponential (Van Loan 1978), not a model error.
func TestSimulateTableExactBetweenSamples(t *testing.T) {
	g := siso(t, []float64{1}, []float64{1, 1})
	tb := []float64{0, 0.35, 1.23}
	ub := []float64{0, 1, -1}
	rows := [][]float64{{0}, {1}, {-1}}
	for _, hold := range []string{HoldZeroOrder, HoldLinear} {
		u, err := TableSignal(tb, rows, "")
		if err != nil {
			t.Fatal(err)
		}
		u.Hold = hold
		for _, dt := range []float64{0.1, 0.01, 0.3} {
			r, err := Simulate(context.Background(), g, u, nil, ResponseOptions{Until: 3, Step: dt})
			if err != nil {
				t.Fatal(err)
			}
			worst := 0.0
			for k, tk := range r.T {
				worst = math.Max(worst, math.Abs(r.Y[0][0][k]-lagTable(tb, ub, hold == HoldZeroOrder, tk)))
			}
			if worst > 1e-12 {
				t.Errorf("hold %s, dt %g: largest error %.3g against the closed form", hold, dt, worst)
			}
			// between samples too (ValueAt), in the middle of each step
			worst = 0
			for k := 0; k+1 < len(r.T); k++ {
				tm := (r.T[k] + r.T[k+1]) / 2
				v, ok := r.ValueAt(0, 0, tm)
				if !ok {
					t.Fatalf("hold %s: no exact value between samples", hold)
				}
				worst = math.Max(worst, math.Abs(v-lagTable(tb, ub, hold == HoldZeroOrder, tm)))
			}
			if worst > 1e-12 {
				t.Errorf("hold %s, dt %g: largest error between samples %.3g against the closed form", hold, dt, worst)
			}
		}
	}
	// a delayed step switches at its delay: 1 - e^-(t - 0.25) (closed form)
	st := StepSignal(1)
	st.Delay = 0.25
	r, err := Simulate(context.Background(), g, st, nil, ResponseOptions{Until: 1, Step: 0.1})
	if err != nil {
		t.Fatal(err)
	}
	for k, tk := range r.T {
		want := 0.0
		if tk > 0.25 {
			want = 1 - math.Exp(-(tk - 0.25))
		}
		if math.Abs(r.Y[0][0][k]-want) > 1e-12 {
			t.Errorf("delayed step at t = %g: %v, want %v (closed form)", tk, r.Y[0][0][k], want)
		}
	}
}

// A sampled system reads its input at the samples only: a held switch
// between samples acts at the next one, and the rule says by how much.
// With T = 0.1 the row at 0.35 s is read at 0.4 s (0.05 s late), the one
// at 1.23 s at 1.3 s (0.07 s late, the largest; arithmetic).
func TestSimulateSampledTableWarnsTiming(t *testing.T) {
	g := siso(t, []float64{1}, []float64{1, 1})
	gz, err := Sample(g, 0.1, ZeroOrderHold, 0)
	if err != nil {
		t.Fatal(err)
	}
	u, _ := TableSignal([]float64{0, 0.35, 1.23}, [][]float64{{0}, {1}, {-1}}, "")
	u.Hold = HoldZeroOrder
	r, err := Simulate(context.Background(), gz, u, nil, ResponseOptions{Until: 2})
	if err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(r.Rule, "the latest by 0.07 s, at t = 1.23 s") {
		t.Errorf("rule %q does not name the largest timing error 0.07 s", r.Rule)
	}
	u.Hold = "linear"
	r, _ = Simulate(context.Background(), gz, u, nil, ResponseOptions{Until: 2})
	if strings.Contains(r.Rule, "warning") {
		t.Errorf("a linear table is sampled as it is, yet: %q", r.Rule)
	}
}
