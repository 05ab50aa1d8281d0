package lsys

import (
	"context"
	"math"
	"math/cmplx"
	"testing"

	"gonum.org/v1/gonum/mat"
)

func TestMarginsIntegratorAnyGain(t *testing.T) {
	// L = K/s: |L(jw)| = K/w crosses 1 at w = K with the phase at -90
	// degrees, so the phase margin is 90 degrees and the delay margin
	// (pi/2)/K (common practice). Gains far outside the automatic range
	// 0.1..100 rad/s of a loop with no nonzero pole must still be found.
	for _, K := range []float64{1e-3, 0.5, 30, 2e5} {
		mg, err := LoopMargins(context.Background(), siso(t, []float64{K}, []float64{0, 1}), FrequencyOptions{})
		if err != nil {
			t.Fatal(err)
		}
		if len(mg.GainCrossovers) != 1 || math.Abs(mg.GainCrossover-K)/K > 1e-12 {
			t.Errorf("K=%g: gain crossovers %v, want one at %g", K, mg.GainCrossovers, K)
			continue
		}
		if math.Abs(mg.PhaseMargin-90) > 1e-9 {
			t.Errorf("K=%g: PM %g want 90", K, mg.PhaseMargin)
		}
		if want := math.Pi / 2 / K; math.Abs(mg.DelayMargin-want)/want > 1e-12 {
			t.Errorf("K=%g: delay margin %g want %g", K, mg.DelayMargin, want)
		}
		// T = K/(s+K): bandwidth K, |T| largest at w = 0 (common practice)
		if math.Abs(mg.Bandwidth-K)/K > 1e-9 {
			t.Errorf("K=%g: bandwidth %g want %g", K, mg.Bandwidth, K)
		}
		if mg.ResonantFreq != 0 || math.Abs(mg.ResonantPeak) > 1e-12 || len(mg.Notes) != 1 {
			t.Errorf("K=%g: resonant peak %g dB at %g, notes %q; want 0 dB at 0 with one note", K, mg.ResonantPeak, mg.ResonantFreq, mg.Notes)
		}
	}
}

// buckLoop is a buck converter's output filter (inductor L with
// resistance Rl, capacitor C, load R; duty-cycle voltage in, capacitor
// voltage out) in series with the PI controller 0.05 (1 + 2000/s)
// (invented demo values).
const (
	bkL, bkC, bkR, bkRl = 22e-6, 100e-6, 2.0, 0.02
)

func buckLoop(t *testing.T) *System {
	t.Helper()
	A := mat.NewDense(2, 2, []float64{-bkRl / bkL, -1 / bkL, 1 / bkC, -1 / (bkR * bkC)})
	B := mat.NewDense(2, 1, []float64{1 / bkL, 0})
	C := mat.NewDense(1, 2, []float64{0, 1})
	plant, err := FromMatrices(A, B, C, nil, 0)
	if err != nil {
		t.Fatal(err)
	}
	loop, err := Series(plant, siso(t, []float64{0.05 * 2000, 0.05}, []float64{0, 1}))
	if err != nil {
		t.Fatal(err)
	}
	return loop
}

// buckExact is L(jw) from the circuit by hand: V/U =
// 1/((L s + Rl)(C s + 1/R) + 1), times 0.05 (1 + 2000/s).
func buckExact(w float64) complex128 {
	s := complex(0, w)
	return 1 / ((complex(bkL, 0)*s+complex(bkRl, 0))*(complex(bkC, 0)*s+complex(1/bkR, 0)) + 1) * 0.05 * (1 + 2000/s)
}

// bisectLog finds where f changes sign between a and b (geometric bisection).
func bisectLog(a, b float64, f func(float64) float64) float64 {
	fa := f(a)
	for i := 0; i < 200; i++ {
		m := math.Sqrt(a * b)
		if (f(m) > 0) == (fa > 0) {
			a = m
		} else {
			b = m
		}
	}
	return math.Sqrt(a * b)
}

func TestMarginsConverterCrossoverBelowModes(t *testing.T) {
	// The crossover (|L| = 0.99 at 100 rad/s) lies below the decade under
	// the slowest pole or zero (the PI zero at 2000 rad/s), where the
	// unwidened range used to start. Reference: bisection on the exact
	// |L(jw)| of buckExact.
	mg, err := LoopMargins(context.Background(), buckLoop(t), FrequencyOptions{})
	if err != nil {
		t.Fatal(err)
	}
	wc := bisectLog(10, 1000, func(w float64) float64 { return cmplx.Abs(buckExact(w)) - 1 })
	pm := 180 + cmplx.Phase(buckExact(wc))*180/math.Pi
	if len(mg.GainCrossovers) != 1 || math.Abs(mg.GainCrossover-wc)/wc > 1e-9 {
		t.Fatalf("gain crossovers %v, want %g", mg.GainCrossovers, wc)
	}
	if math.Abs(mg.PhaseMargin-pm) > 1e-7 {
		t.Errorf("PM %g want %g", mg.PhaseMargin, pm)
	}
	if len(mg.PhaseCrossovers) != 0 {
		t.Errorf("phase crossovers %v, want none (the phase stays above -180)", mg.PhaseCrossovers)
	}
	absT := func(w float64) float64 { l := buckExact(w); return cmplx.Abs(l / (1 + l)) }
	bw := bisectLog(10, 1000, func(w float64) float64 { return absT(w) - 1/math.Sqrt2 })
	if math.Abs(mg.Bandwidth-bw)/bw > 1e-9 {
		t.Errorf("bandwidth %g want %g", mg.Bandwidth, bw)
	}
	if mg.ResonantFreq != 0 || len(mg.Notes) != 1 {
		t.Errorf("resonant peak %g dB at %g, notes %q; want |T| largest at 0 and said so", mg.ResonantPeak, mg.ResonantFreq, mg.Notes)
	}
	if mg.Loop.W[0] > wc/3 {
		t.Errorf("chart starts at %g rad/s, above a third of the crossover %g", mg.Loop.W[0], wc)
	}
	// frequency(G) of the same loop takes the crossover in too
	f, err := Frequency(context.Background(), buckLoop(t), FrequencyOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if f.W[0] > wc {
		t.Errorf("frequency range starts at %g rad/s, above the 0 dB crossing %g", f.W[0], wc)
	}
	// a range given is kept, and the notes say a crossover lies below it
	mg, err = LoopMargins(context.Background(), buckLoop(t), FrequencyOptions{From: 200, To: 1e6})
	if err != nil {
		t.Fatal(err)
	}
	if len(mg.GainCrossovers) != 0 || len(mg.Notes) == 0 || mg.Loop.W[0] != 200 {
		t.Errorf("range given: crossovers %v, notes %q, from %g", mg.GainCrossovers, mg.Notes, mg.Loop.W[0])
	}
}

func TestFrequencyRangeWithIntegrator(t *testing.T) {
	// 0.002/s and 5e4/s cross 0 dB at 0.002 and 5e4 rad/s (common
	// practice), outside 0.1..100 rad/s, the range of a system with no
	// nonzero pole or zero: the automatic range widens to take them in.
	for _, K := range []float64{0.002, 5e4} {
		f, err := Frequency(context.Background(), siso(t, []float64{K}, []float64{0, 1}), FrequencyOptions{})
		if err != nil {
			t.Fatal(err)
		}
		if lo, hi := f.W[0], f.W[len(f.W)-1]; lo > K || hi < K {
			t.Errorf("K=%g: range %g..%g misses the crossing (%s)", K, lo, hi, f.Rule)
		}
	}
}

func TestMarginsConditionallyStableTripleIntegrator(t *testing.T) {
	// L = 10 (s+1)^2 / (s^3 (s/100+1)^2): the phase -270 + 2 atan w -
	// 2 atan(w/100) is -180 where 0.99 w / (1 + w^2/100) = 1, that is at
	// w = (99 -+ sqrt(9401))/2, and |L| = 10 (1+w^2) / (w^3 (1+w^2/1e4))
	// (by hand). The triple pole at 0 is computed as a cluster of radius
	// about 4e-6 and must not drag the range down to where the
	// evaluation loses all digits.
	L := siso(t, []float64{10, 20, 10}, []float64{0, 0, 0, 1, 2e-2, 1e-4})
	mg, err := LoopMargins(context.Background(), L, FrequencyOptions{})
	if err != nil {
		t.Fatal(err)
	}
	want := []float64{(99 - math.Sqrt(9401)) / 2, (99 + math.Sqrt(9401)) / 2}
	if len(mg.PhaseCrossovers) != 2 {
		t.Fatalf("phase crossovers %v, want %v", mg.PhaseCrossovers, want)
	}
	for i, w := range want {
		if math.Abs(mg.PhaseCrossovers[i]-w)/w > 1e-9 {
			t.Errorf("phase crossover %d: %g want %g", i, mg.PhaseCrossovers[i], w)
		}
		gm := -20 * math.Log10(10*(1+w*w)/(w*w*w*(1+w*w/1e4)))
		if math.Abs(mg.GainMarginsDB[i]-gm) > 1e-7 {
			t.Errorf("gain margin %d: %g dB want %g", i, mg.GainMarginsDB[i], gm)
		}
	}
	if !mg.ClosedStable {
		t.Error("conditionally stable loop reported unstable")
	}
	if lo := mg.Loop.W[0]; lo < 1e-3 {
		t.Errorf("range starts at %g rad/s", lo)
	}
}

func TestMarginsResonantLoopAllCrossovers(t *testing.T) {
	// L = (1/s) 100/(s^2 + 0.4 s + 100): the phase -90 - atan2(0.4 w,
	// 100 - w^2) is -180 exactly at w = 10, where |L| = 100/(10*4) = 2.5,
	// so GM = -20 log10 2.5 dB; |L| = 100/(w sqrt((100-w^2)^2 + 0.16 w^2))
	// crosses 1 three times (by hand; the crossovers by bisection on that
	// formula). The grid holds w = 10 itself, where the phase is -180 to
	// the last digit: the crossover is that point, not the next one.
	L := siso(t, []float64{100}, []float64{0, 100, 0.4, 1})
	mg, err := LoopMargins(context.Background(), L, FrequencyOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if len(mg.PhaseCrossovers) != 1 || math.Abs(mg.PhaseCrossovers[0]-10) > 1e-9 {
		t.Fatalf("phase crossovers %v, want [10]", mg.PhaseCrossovers)
	}
	if want := -20 * math.Log10(2.5); math.Abs(mg.GainMarginDB-want) > 1e-9 {
		t.Errorf("GM %g dB want %g", mg.GainMarginDB, want)
	}
	mag := func(w float64) float64 { return 100 / (w * math.Hypot(100-w*w, 0.4*w)) }
	var want []float64
	for _, br := range [][2]float64{{0.5, 5}, {5, 10}, {10, 20}} {
		want = append(want, bisectLog(br[0], br[1], func(w float64) float64 { return mag(w) - 1 }))
	}
	if len(mg.GainCrossovers) != 3 {
		t.Fatalf("gain crossovers %v, want %v", mg.GainCrossovers, want)
	}
	for i, w := range want {
		pm := 90 - math.Atan2(0.4*w, 100-w*w)*180/math.Pi
		if math.Abs(mg.GainCrossovers[i]-w)/w > 1e-9 || math.Abs(mg.PhaseMargins[i]-pm) > 1e-6 {
			t.Errorf("crossover %d: %g (PM %g), want %g (PM %g)", i, mg.GainCrossovers[i], mg.PhaseMargins[i], w, pm)
		}
	}
	if mg.ClosedStable {
		t.Error("the loop with GM < 0 dB reported stable")
	}
	if mg.Loop.W[0] >= want[0]/2 {
		t.Errorf("chart starts at %g rad/s: the first crossover %g sits on its frame", mg.Loop.W[0], want[0])
	}
}

// A speed loop around a rigid body whose angle the loop does not see: the
// closed loop keeps the angle's pole at s = 0 (speed' = -speed + r, angle'
// = speed: poles -1 and 0, by hand), so it is marginally stable, not
// unstable.
func TestMarginsSpeedLoopWithUnseenAngle(t *testing.T) {
	A := mat.NewDense(2, 2, []float64{0, 1, 0, 0}) // angle, speed
	B := mat.NewDense(2, 1, []float64{0, 1})
	C := mat.NewDense(1, 2, []float64{0, 1})
	L, err := FromMatrices(A, B, C, nil, 0)
	if err != nil {
		t.Fatal(err)
	}
	mg, err := LoopMargins(context.Background(), L, FrequencyOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if mg.ClosedStable || mg.ClosedBoundary != 1 {
		t.Fatalf("stable %v, boundary %d; want false, 1", mg.ClosedStable, mg.ClosedBoundary)
	}
	// L = 1/s as seen from speed: crossover at 1 rad/s, 90 deg (common practice).
	if math.Abs(mg.GainCrossover-1) > 1e-9 || math.Abs(mg.PhaseMargin-90) > 1e-6 {
		t.Errorf("crossover %g, PM %g", mg.GainCrossover, mg.PhaseMargin)
	}
}

// Issue 8, item 6. L = 20/((s + 1)(s - 1)(s + 3)): 1 + L has the
// characteristic polynomial s^3 + 3s^2 - s + 17, whose coefficients change
// sign, so the closed loop is unstable (Routh-Hurwitz; Ogata, Modern
// Control Engineering, 5th ed., 2010, Section 5-6): delay margin,
// bandwidth and resonant peak are NaN with the reason, not numbers.
func TestMarginsUnstableClosedLoopFiguresUndefined(t *testing.T) {
	mg, err := LoopMargins(context.Background(), siso(t, []float64{20}, []float64{-3, -1, 3, 1}), FrequencyOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if mg.ClosedStable || mg.ClosedNote == "" {
		t.Fatalf("closed loop stable %v, note %q; want unstable with a note", mg.ClosedStable, mg.ClosedNote)
	}
	for name, v := range map[string]float64{"delay margin": mg.DelayMargin, "bandwidth": mg.Bandwidth, "resonant peak": mg.ResonantPeak} {
		if !math.IsNaN(v) {
			t.Errorf("%s %g on an unstable closed loop; want n/a", name, v)
		}
	}
	if mg.BandwidthNote == "" {
		t.Error("bandwidth n/a without a reason")
	}
}

// Phase margins in one convention, 180 + angle L in (-180, 180]: L = K/s
// gives 90 deg (common practice), and L = 100 s/((s+1)(s+2)(s+3)) at its
// low crossover, where angle L is near +90 - atan(w) - atan(w/2) -
// atan(w/3), gives a value inside (-180, 180] equal to 180 + angle L
// (the convention itself).
func TestMarginsPhaseConvention(t *testing.T) {
	L := siso(t, []float64{0, 100}, []float64{6, 11, 6, 1})
	mg, err := LoopMargins(context.Background(), L, FrequencyOptions{})
	if err != nil {
		t.Fatal(err)
	}
	for i, w := range mg.GainCrossovers {
		ang := 90 - (math.Atan(w)+math.Atan(w/2)+math.Atan(w/3))*180/math.Pi
		want := 180 + ang
		if want > 180 {
			want -= 360
		}
		if pm := mg.PhaseMargins[i]; pm <= -180 || pm > 180 || math.Abs(pm-want) > 1e-6 {
			t.Errorf("crossover %g rad/s: PM %g, want %g", w, pm, want)
		}
	}
	if !math.IsNaN(mg.Bandwidth) || mg.BandwidthNote == "" {
		t.Errorf("T(0) = 0: bandwidth %g with note %q; want n/a with the reason", mg.Bandwidth, mg.BandwidthNote)
	}
}

// Where |L| = 0 on the axis the phase jumps: no phase crossover, no gain
// margin. L = 5 (s^2 + 4)/((s+1)(s+2)(s+3)(s+0.5)) is 0 at w = 2 rad/s
// (closed form); the Tustin equivalent of 20/((s+1)(s+2)) at T = 0.1 s
// has a double zero at z = -1 (the bilinear map sends s = infinity
// there; Franklin, Powell & Workman, Digital Control of Dynamic Systems,
// 3rd ed., 1998, from memory), so |L| = 0 at the Nyquist frequency
// pi/0.1 rad/s: no 300 dB "gain margin" there.
func TestMarginsNoCrossoverWhereLoopGainIsZero(t *testing.T) {
	L := siso(t, []float64{20, 0, 5}, []float64{3, 12.5, 17.5, 9.5, 1})
	mg, err := LoopMargins(context.Background(), L, FrequencyOptions{})
	if err != nil {
		t.Fatal(err)
	}
	for _, w := range mg.PhaseCrossovers {
		if math.Abs(w-2) < 1e-3 {
			t.Errorf("phase crossover at the zero 2 rad/s: %v", mg.PhaseCrossovers)
		}
	}
	gz, err := Sample(siso(t, []float64{20}, []float64{2, 3, 1}), 0.1, Bilinear, 0)
	if err != nil {
		t.Fatal(err)
	}
	mg, err = LoopMargins(context.Background(), gz, FrequencyOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if !math.IsInf(mg.GainMarginDB, 1) || len(mg.PhaseCrossovers) != 0 {
		t.Errorf("gain margin %g dB, phase crossovers %v; want none (|L| = 0 at pi/T)", mg.GainMarginDB, mg.PhaseCrossovers)
	}
}

func TestModulusMarginClosedForm(t *testing.T) {
	// L = K/(s(s + 1)): with x = w^2, |1 + L|^2 = 1 + K (K - 2x)/(x (x + 1)),
	// smallest where 2x^2 - 2Kx - K = 0, x* = (K + sqrt(K^2 + 2K))/2
	// (derived by hand from |jw(jw + 1) + K|^2 / |jw(jw + 1)|^2).
	for _, K := range []float64{0.5, 2, 10, 300} {
		mg, err := LoopMargins(context.Background(), siso(t, []float64{K}, []float64{0, 1, 1}), FrequencyOptions{})
		if err != nil {
			t.Fatal(err)
		}
		x := (K + math.Sqrt(K*K+2*K)) / 2
		want := math.Sqrt(1 + K*(K-2*x)/(x*(x+1)))
		if math.Abs(mg.ModulusMargin-want) > 1e-12 {
			t.Errorf("K=%g: modulus margin %.17g, want %.17g", K, mg.ModulusMargin, want)
		}
		// the minimum is flat: its place is known to about sqrt(eps)
		if w := math.Sqrt(x); math.Abs(mg.ModulusFreq-w)/w > 1e-6 {
			t.Errorf("K=%g: at %g rad/s, want %g", K, mg.ModulusFreq, w)
		}
		// at a gain crossover the distance is 2 sin(PM/2) (common practice)
		if len(mg.GainDistances) != 1 || math.Abs(mg.GainDistances[0]-2*math.Sin(mg.PhaseMargin*math.Pi/360)) > 1e-12 {
			t.Errorf("K=%g: distance at the gain crossover %v, PM %g", K, mg.GainDistances, mg.PhaseMargin)
		}
	}
}

func TestModulusMarginAtTheEdges(t *testing.T) {
	// L = K/s: |1 + L| = sqrt(1 + K^2/w^2) falls toward 1 as w grows; the
	// margin is that limit. L = -0.5/(s + 1) (positive feedback in effect):
	// |1 + L|^2 = (0.25 + w^2)/(1 + w^2) is smallest at w = 0, 0.5.
	mg, err := LoopMargins(context.Background(), siso(t, []float64{3}, []float64{0, 1}), FrequencyOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if mg.ModulusMargin != 1 || !math.IsInf(mg.ModulusFreq, 1) {
		t.Errorf("K/s: modulus margin %g at %g, want 1 as w -> inf", mg.ModulusMargin, mg.ModulusFreq)
	}
	mg, err = LoopMargins(context.Background(), siso(t, []float64{-0.5}, []float64{1, 1}), FrequencyOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(mg.ModulusMargin-0.5) > 1e-15 || mg.ModulusFreq != 0 {
		t.Errorf("-0.5/(s + 1): modulus margin %g at %g, want 0.5 at 0", mg.ModulusMargin, mg.ModulusFreq)
	}
}
