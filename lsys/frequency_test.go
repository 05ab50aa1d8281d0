package lsys

import (
	"context"
	"math"
	"math/cmplx"
	"strings"
	"testing"

	"gonum.org/v1/gonum/mat"
)

func TestFrequencyClosedForms(t *testing.T) {
	ctx := context.Background()
	// 1/(s+1): |G| = 1/sqrt(1+w^2), phase -atan(w) (common practice).
	f, err := Frequency(ctx, first(1), FrequencyOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if f.W[0] > 0.1 || f.W[len(f.W)-1] < 10 {
		t.Errorf("range %g..%g does not span a decade each side of 1 rad/s", f.W[0], f.W[len(f.W)-1])
	}
	mag, ph := f.Magnitude(0, 0), f.Phase(0, 0)
	for k, w := range f.W {
		if e := math.Abs(mag[k] - 1/math.Sqrt(1+w*w)); e > 1e-15 {
			t.Fatalf("|G| at %g off by %g", w, e)
		}
		if e := math.Abs(ph[k] + math.Atan(w)*180/math.Pi); e > 1e-12 {
			t.Fatalf("phase at %g off by %g", w, e)
		}
	}
	// Standard second order: |G| = wn^2/sqrt((wn^2-w^2)^2 + (2 zeta wn w)^2),
	// phase -atan2(2 zeta wn w, wn^2 - w^2), resonant peak
	// 1/(2 zeta sqrt(1 - zeta^2)) at wn sqrt(1 - 2 zeta^2) (Ogata, Modern
	// Control Engineering, 5th ed., Section 7-2, from memory).
	zeta, wn := 0.1, 10.0
	f, err = Frequency(ctx, secondOrder(zeta, wn), FrequencyOptions{})
	if err != nil {
		t.Fatal(err)
	}
	mag, ph = f.Magnitude(0, 0), f.Phase(0, 0)
	peak := 0.0
	for k, w := range f.W {
		want := wn * wn / math.Hypot(wn*wn-w*w, 2*zeta*wn*w)
		if e := math.Abs(mag[k]-want) / want; e > 1e-13 {
			t.Fatalf("|G| at %g rel err %g", w, e)
		}
		if e := math.Abs(ph[k] + math.Atan2(2*zeta*wn*w, wn*wn-w*w)*180/math.Pi); e > 1e-11 {
			t.Fatalf("phase at %g off by %g", w, e)
		}
		peak = math.Max(peak, mag[k])
	}
	mr := 1 / (2 * zeta * math.Sqrt(1-zeta*zeta))
	if e := (mr - peak) / mr; e < 0 || e > 0.005 {
		t.Errorf("adaptive grid peak %g vs resonant peak %g (rel %g)", peak, mr, e)
	}
	// a sampled system stops at Nyquist
	d, _ := Sample(first(1), 0.1, ZeroOrderHold, 0)
	f, _ = Frequency(ctx, d, FrequencyOptions{})
	if last := f.W[len(f.W)-1]; math.Abs(last-math.Pi/0.1) > 1e-9 {
		t.Errorf("sampled grid ends at %g, want pi/T", last)
	}
	// gain at one frequency
	g, err := GainAt(first(2), 2)
	if err != nil {
		t.Fatal(err)
	}
	if want := 1 / complex(2, 2); cmplx.Abs(g[0]-want) > 1e-16 {
		t.Errorf("GainAt: %v want %v", g[0], want)
	}
	if _, err := GainAt(siso(t, []float64{1}, []float64{0, 1}), 0); err == nil {
		t.Error("gain of an integrator at w = 0 accepted")
	}
}

func TestSingularValuesDiagonal(t *testing.T) {
	// For a block-diagonal system the singular values are the channel
	// magnitudes, sorted (common practice).
	s, _ := Stack(first(1), secondOrder(0.2, 3))
	f, err := Frequency(context.Background(), s, FrequencyOptions{Grid: []float64{0.5, 3, 20}})
	if err != nil {
		t.Fatal(err)
	}
	sv, err := Singular(f)
	if err != nil {
		t.Fatal(err)
	}
	for k, w := range f.W {
		a := 1 / math.Sqrt(1+w*w)
		b := 9 / math.Hypot(9-w*w, 1.2*w)
		hi, lo := math.Max(a, b), math.Min(a, b)
		if math.Abs(sv.S[k][0]-hi) > 1e-14 || math.Abs(sv.S[k][1]-lo) > 1e-14 {
			t.Errorf("at %g: %v want %g %g", w, sv.S[k], hi, lo)
		}
	}
}

func TestMarginsThirdOrder(t *testing.T) {
	// L = K/(s(s+1)(s+2)): the denominator at jw is -3w^2 + j(2w - w^3),
	// real at w = sqrt(2) where its magnitude is 6, so the phase crossover
	// is sqrt(2) rad/s and the gain margin 6/K (by hand; the same loop is
	// the classic Routh example with critical gain 6, Ogata, Modern Control
	// Engineering, 5th ed., Section 5-6, from memory).
	K := 2.0
	L := siso(t, []float64{K}, []float64{0, 2, 3, 1})
	mg, err := LoopMargins(context.Background(), L, FrequencyOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if e := math.Abs(mg.PhaseCrossover - math.Sqrt2); e > 1e-9 {
		t.Errorf("phase crossover %g want sqrt(2)", mg.PhaseCrossover)
	}
	if e := math.Abs(mg.GainMargin - 6/K); e > 1e-9 {
		t.Errorf("gain margin %g want %g", mg.GainMargin, 6/K)
	}
	// Gain crossover: w sqrt(1+w^2) sqrt(4+w^2) = K, solved by bisection
	// here; PM = 90 - atan(w) - atan(w/2) degrees.
	lo, hi := 0.0, 10.0
	for i := 0; i < 200; i++ {
		mid := (lo + hi) / 2
		if mid*math.Sqrt(1+mid*mid)*math.Sqrt(4+mid*mid) < K {
			lo = mid
		} else {
			hi = mid
		}
	}
	wc := lo
	pm := 90 - (math.Atan(wc)+math.Atan(wc/2))*180/math.Pi
	if math.Abs(mg.GainCrossover-wc) > 1e-9 || math.Abs(mg.PhaseMargin-pm) > 1e-7 {
		t.Errorf("gain crossover %g PM %g want %g %g", mg.GainCrossover, mg.PhaseMargin, wc, pm)
	}
	if want := pm * math.Pi / 180 / wc; math.Abs(mg.DelayMargin-want) > 1e-8 {
		t.Errorf("delay margin %g want %g", mg.DelayMargin, want)
	}
	if !mg.ClosedStable {
		t.Error("closed loop with K=2 < 6 reported unstable")
	}
	mg, _ = LoopMargins(context.Background(), siso(t, []float64{8}, []float64{0, 2, 3, 1}), FrequencyOptions{})
	if mg.ClosedStable || mg.GainMargin >= 1 {
		t.Errorf("K=8 > 6: stable=%v GM=%g", mg.ClosedStable, mg.GainMargin)
	}
}

func TestMarginsSecondOrderLoop(t *testing.T) {
	// L = wn^2/(s(s + 2 zeta wn)) closes into the standard second order
	// system. PM = atan(2 zeta / sqrt(sqrt(1 + 4 zeta^4) - 2 zeta^2)),
	// bandwidth wn sqrt(1 - 2 zeta^2 + sqrt(4 zeta^4 - 4 zeta^2 + 2)),
	// resonant peak 1/(2 zeta sqrt(1 - zeta^2)) (Ogata, Modern Control
	// Engineering, 5th ed., Sections 7-2 and 7-7, from memory).
	zeta, wn := 0.3, 4.0
	L := siso(t, []float64{wn * wn}, []float64{0, 2 * zeta * wn, 1})
	mg, err := LoopMargins(context.Background(), L, FrequencyOptions{})
	if err != nil {
		t.Fatal(err)
	}
	pm := math.Atan(2*zeta/math.Sqrt(math.Sqrt(1+4*math.Pow(zeta, 4))-2*zeta*zeta)) * 180 / math.Pi
	if math.Abs(mg.PhaseMargin-pm) > 1e-7 {
		t.Errorf("PM %g want %g", mg.PhaseMargin, pm)
	}
	bw := wn * math.Sqrt(1-2*zeta*zeta+math.Sqrt(4*math.Pow(zeta, 4)-4*zeta*zeta+2))
	if math.Abs(mg.Bandwidth-bw)/bw > 1e-9 {
		t.Errorf("bandwidth %g want %g", mg.Bandwidth, bw)
	}
	mr := 20 * math.Log10(1/(2*zeta*math.Sqrt(1-zeta*zeta)))
	if math.Abs(mg.ResonantPeak-mr) > 1e-9 {
		t.Errorf("resonant peak %g dB want %g", mg.ResonantPeak, mr)
	}
	if !math.IsInf(mg.GainMargin, 1) || len(mg.PhaseCrossovers) != 0 {
		t.Errorf("second-order loop has no phase crossover, got GM %g at %v", mg.GainMargin, mg.PhaseCrossovers)
	}
}

func BenchmarkFrequency200(b *testing.B) { benchFreq(b, 200) }
func BenchmarkFrequency500(b *testing.B) { benchFreq(b, 500) }

// randomStable returns an n-state SISO system with A = -(I*shift) + R
// scaled so the eigenvalues lie left of -0.1 (invented numbers: benchmark
// only).
func randomStable(n int, seed uint64) *System {
	A := mat.NewDense(n, n, nil)
	B := mat.NewDense(n, 1, nil)
	C := mat.NewDense(1, n, nil)
	x := seed
	rnd := func() float64 {
		x ^= x << 13
		x ^= x >> 7
		x ^= x << 17
		return float64(x%2000001)/1e6 - 1
	}
	for i := 0; i < n; i++ {
		for j := 0; j < n; j++ {
			A.Set(i, j, rnd()/math.Sqrt(float64(n)))
		}
		A.Set(i, i, A.At(i, i)-2)
		B.Set(i, 0, rnd())
		C.Set(0, i, rnd())
	}
	s, _ := FromMatrices(A, B, C, nil, 0)
	return s
}

func benchFreq(b *testing.B, n int) {
	g := randomStable(n, 7)
	grid := make([]float64, 1000)
	for i := range grid {
		grid[i] = math.Pow(10, -2+4*float64(i)/999)
	}
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		if _, err := Frequency(context.Background(), g, FrequencyOptions{Grid: grid}); err != nil {
			b.Fatal(err)
		}
	}
}

func BenchmarkStep500x10000(b *testing.B) {
	g := randomStable(500, 11)
	for i := 0; i < b.N; i++ {
		if _, err := Step(context.Background(), g, ResponseOptions{Until: 10, Step: 0.001}); err != nil {
			b.Fatal(err)
		}
	}
}

func TestMarginsDoubleIntegrator(t *testing.T) {
	// 1/s^2 sits on -180 degrees at every frequency: |L| = 1 at w = 1 and
	// the phase margin is 0 (by hand); rounding noise in the phase must
	// not be counted as phase crossovers.
	mg, err := LoopMargins(context.Background(), siso(t, []float64{1}, []float64{0, 0, 1}), FrequencyOptions{From: 0.01, To: 100})
	if err != nil {
		t.Fatal(err)
	}
	if len(mg.PhaseCrossovers) > 1 {
		t.Errorf("%d phase crossovers from rounding noise", len(mg.PhaseCrossovers))
	}
	if math.Abs(mg.GainCrossover-1) > 1e-9 || math.Abs(mg.PhaseMargin) > 1e-9 {
		t.Errorf("gain crossover %g, PM %g; want 1 and 0", mg.GainCrossover, mg.PhaseMargin)
	}
}

func TestFrequencyResolvesAntiResonance(t *testing.T) {
	// A deep notch (s^2 + 0.002 s + 100)/((s + 5)(s + 20)), as a two-mass
	// mount shows: at s = j10 the numerator is 0.02j and the denominator
	// 250j, so |G| = 8e-5 there (by hand), close to the minimum. The poles
	// are well damped: the zeros and the refinement must find the notch.
	g := siso(t, []float64{100, 0.002, 1}, []float64{100, 25, 1})
	f, err := Frequency(context.Background(), g, FrequencyOptions{})
	if err != nil {
		t.Fatal(err)
	}
	lo := math.Inf(1)
	for _, m := range f.Magnitude(0, 0) {
		lo = math.Min(lo, m)
	}
	if db := 20 * math.Log10(lo/8e-5); db > 1 {
		t.Errorf("notch depth missed by %.2f dB (min |G| %g)", db, lo)
	}
}

func TestPhaseStartsOnLowFrequencyAsymptote(t *testing.T) {
	// arg((jw)^-n) = -90 n degrees and arg of 1/(jw + 1)^3 -> -270 at high
	// frequency (closed forms): the unwrapped phase starts on that branch.
	for _, c := range []struct {
		den  []float64
		grid []float64
		want float64 // phase at the first point, degrees
	}{
		{[]float64{0, 0, 0, 1}, []float64{0.1, 1, 10}, -270},
		{[]float64{0, 0, 1}, []float64{0.1, 1, 10}, -180},
		{[]float64{0, 1}, []float64{0.1, 1, 10}, -90},
		{[]float64{1, 3, 3, 1}, []float64{1000, 2000}, -270 + 3*math.Atan(1/1000.0)*180/math.Pi},
		{[]float64{1, 1}, []float64{0.001, 0.01}, -math.Atan(0.001) * 180 / math.Pi},
	} {
		g := siso(t, []float64{1}, c.den)
		f, err := Frequency(context.Background(), g, FrequencyOptions{Grid: c.grid})
		if err != nil {
			t.Fatal(err)
		}
		if got := f.Phase(0, 0)[0]; math.Abs(got-c.want) > 1e-6 {
			t.Errorf("1/%v: phase starts at %.8g, want %.8g", c.den, got, c.want)
		}
	}
}

// TestFrequencyRangeTooWide: from 1e-200 to 1e200 rad/s silently gave no
// frequencies (hi/lo overflows); it is an error naming the span.
func TestFrequencyRangeTooWide(t *testing.T) {
	g, err := FromMatrices(mat.NewDense(1, 1, []float64{-1}), mat.NewDense(1, 1, []float64{1}), mat.NewDense(1, 1, []float64{1}), nil, 0)
	if err != nil {
		t.Fatal(err)
	}
	if _, err := Frequency(context.Background(), g, FrequencyOptions{From: 1e-200, To: 1e200}); err == nil || !strings.Contains(err.Error(), "400 decades") {
		t.Fatalf("err = %v, want the span refused", err)
	}
	// 60 decades still work, in logarithms.
	f, err := Frequency(context.Background(), g, FrequencyOptions{From: 1e-30, To: 1e30})
	if err != nil || len(f.W) < 1000 || math.IsNaN(f.W[len(f.W)/2]) {
		t.Fatalf("60 decades: %v, %d points", err, len(f.W))
	}
}
