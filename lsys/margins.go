package lsys

import (
	"context"
	"errors"
	"fmt"
	"math"
	"math/cmplx"
	"sort"
	"strings"

	"gonum.org/v1/gonum/mat"
)

// Margins are the stability margins of a SISO loop transfer function L,
// for negative feedback around it, plus closed-loop figures of
// T = L/(1 + L).
type Margins struct {
	Loop *FrequencyResponse // the frequency response of L the chart shows

	GainMargin     float64 // ratio 1/|L| at the phase crossover that sets it; +Inf if there is none
	GainMarginDB   float64
	PhaseCrossover float64 // rad/s; NaN if none
	PhaseMargin    float64 // degrees, 180 + angle L in (-180, 180] at the gain crossover that sets it; +Inf if none
	GainCrossover  float64 // rad/s; NaN if none
	DelayMargin    float64 // s: the smallest PM_i/w_i over gain crossovers; +Inf if none

	GainCrossovers  []float64 // every w with |L| = 1
	PhaseCrossovers []float64 // every w with angle L = -180 + k 360
	PhaseMargins    []float64 // degrees, 180 + angle L in (-180, 180], at each of GainCrossovers
	GainMarginsDB   []float64 // dB, -20 log10 |L|, at each of PhaseCrossovers

	// ModulusMargin is the smallest distance of L(jw) from the critical
	// point -1 over the range, min |1 + L(jw)| (= 1/max|S| for the
	// sensitivity S = 1/(1 + L)), reached at ModulusFreq (rad/s; +Inf
	// when only approached as w grows without bound, 0 at zero frequency).
	ModulusMargin float64
	ModulusFreq   float64
	// Distance is |1 + L(jw)| at each frequency of Loop; GainDistances
	// and PhaseDistances are its values at GainCrossovers and
	// PhaseCrossovers (2 sin(|PM|/2) and |1 - |L|| there).
	Distance       []float64
	GainDistances  []float64
	PhaseDistances []float64

	Bandwidth     float64 // rad/s: first w where |T| falls 3 dB below |T(0)|; NaN if not found (BandwidthNote says why)
	BandwidthNote string  // why Bandwidth is NaN
	ResonantPeak  float64 // max |T| in dB (refined between grid points by golden-section search)
	ResonantFreq  float64 // rad/s
	ClosedStable  bool    // whether T is stable (from its poles)
	ClosedChecked bool    // whether the closed-loop poles could be computed
	// ClosedBoundary counts closed-loop poles on the stability boundary
	// (within the tolerance of StabilityOf) when no pole lies beyond it and
	// none on it is defective: the loop is then marginally stable, which
	// is typical of a state the loop does not see, such as the angle of a
	// speed loop.
	ClosedBoundary int

	// ClosedNote, when set, is why the closed-loop figures (delay margin,
	// bandwidth, resonant peak) are NaN: they describe a working loop only.
	ClosedNote string

	// Notes say where a figure rests on the edge of the range rather than
	// on a true crossing or extremum, and what may lie beyond a range given.
	Notes []string
}

// LoopMargins computes the margins of the SISO loop L. Crossovers are
// bracketed on the adaptive grid of Frequency and refined by bisection
// (60 steps in log frequency) on exact evaluations. The gain margin is the
// one of smallest |dB| over the phase crossovers; the phase margin the
// smallest over the gain crossovers (common practice). The delay margin is
// PM_i (in rad, taken in [0, 2 pi)) / w_i minimised over gain crossovers.
// Margins describe the loop only if the closed loop is stable; ClosedStable
// says whether it is.
//
// The automatic range is the one of Frequency, widened by whole decades
// (at most 6 each way) until the crossovers are bracketed: downward while
// |L| still heads toward 1 (beside integrators |L| grows without bound as
// w -> 0) or the phase still moves toward -180 + k 360 fast enough to
// reach it; upward likewise (see bracketRange). A range or grid given is
// kept, and Notes say when a crossover seems to lie beyond it. Bandwidth
// and resonant peak are searched on the same range; a figure found at an
// edge is not reported as a crossing or extremum: Notes say so.
func LoopMargins(ctx context.Context, L *System, opt FrequencyOptions) (*Margins, error) {
	if L == nil {
		return nil, errors.New("the loop is missing")
	}
	if L.M() != 1 || L.P() != 1 {
		return nil, errors.New("the loop must have one input and one output; pick one channel of a MIMO loop")
	}
	f, err := frequency(ctx, L, opt, true)
	if err != nil {
		return nil, err
	}
	ev := newFreqEval(L)
	ev.delay = opt.Delay
	var notes []string
	unit := func(w float64) string { return fmt.Sprintf("%.4g rad/s", w) }
	if len(f.W) > 0 && (opt.Grid != nil || opt.From != 0 || opt.To != 0) {
		if lo := f.W[0]; lo > 0 && beyondEdge(ev, lo, -1, true) {
			notes = append(notes, "a crossover seems to lie below "+unit(lo)+", outside the range given; widen it or leave the range automatic")
		}
		if hi := f.W[len(f.W)-1]; (f.Nyquist == 0 || hi < f.Nyquist) && beyondEdge(ev, hi, 1, true) {
			notes = append(notes, "a crossover seems to lie above "+unit(hi)+", outside the range given; widen it or leave the range automatic")
		}
	}
	val := func(w float64) complex128 {
		v, err := ev.at(w)
		if err != nil {
			v, _ = ev.at(w * (1 + 1e-9))
		}
		if v == nil {
			return cmplx.NaN()
		}
		return v[0]
	}
	mg := &Margins{Loop: f, GainMargin: math.Inf(1), GainMarginDB: math.Inf(1), PhaseMargin: math.Inf(1),
		DelayMargin: math.Inf(1), PhaseCrossover: math.NaN(), GainCrossover: math.NaN()}
	mag := f.Magnitude(0, 0)
	ph := f.Phase(0, 0)
	bisect := func(a, b float64, fa float64, fn func(w float64) float64) float64 {
		if fa == 0 {
			return a // the grid point itself is the crossing
		}
		for i := 0; i < 60; i++ {
			mid := math.Sqrt(a * b)
			if a == 0 {
				mid = b / 2
			}
			fm := fn(mid)
			if (fm > 0) == (fa > 0) {
				a, fa = mid, fm
			} else {
				b = mid
			}
		}
		return math.Sqrt(a * b)
	}
	logMag := func(w float64) float64 { return math.Log(cabs(val(w))) }
	for k := 0; k+1 < len(f.W); k++ {
		a, b := math.Log(mag[k]), math.Log(mag[k+1])
		if a == 0 {
			mg.GainCrossovers = append(mg.GainCrossovers, f.W[k])
			continue
		}
		if (a > 0) != (b > 0) && b != 0 {
			mg.GainCrossovers = append(mg.GainCrossovers, bisect(f.W[k], f.W[k+1], a, logMag))
		}
	}
	if n := len(mag); n > 0 && mag[n-1] == 1 {
		mg.GainCrossovers = append(mg.GainCrossovers, f.W[n-1])
	}
	var skipped []float64
	maxMag := 0.0
	for _, v := range mag {
		if !math.IsInf(v, 0) {
			maxMag = math.Max(maxMag, v)
		}
	}
	for k := 0; k+1 < len(f.W); k++ {
		// which odd multiple of 180 lies between ph[k] and ph[k+1]?
		// the 1e-9 nudge keeps a phase that sits on -180 (a double
		// integrator) from counting rounding noise as crossings
		c := math.Floor((ph[k]+180)/360 + 1e-9)
		d := math.Floor((ph[k+1]+180)/360 + 1e-9)
		if c == d {
			continue
		}
		target := 360*math.Max(c, d) - 180
		ref := ph[k]
		fn := func(w float64) float64 {
			p := cmplx.Phase(val(w)) * 180 / math.Pi
			p += 360 * math.Round((ref-p)/360)
			return p - target
		}
		w := bisect(f.W[k], f.W[k+1], ph[k]-target, fn)
		if jumpAt(val, w) || cabs(val(w)) <= zeroMag*maxMag {
			// |L| passes through 0 (a zero on the axis): the phase jumps
			// by 180 deg there, it does not cross -180
			skipped = append(skipped, w)
			continue
		}
		mg.PhaseCrossovers = append(mg.PhaseCrossovers, w)
	}
	if len(skipped) > 0 {
		notes = append(notes, fmt.Sprintf("|L| = 0 (a zero on the axis; below %g of the largest |L| on the chart, or the phase jumping by 180 deg) at %s: no phase crossover there", zeroMag, joinFreqs(skipped, unit)))
	}
	sort.Float64s(mg.GainCrossovers)
	sort.Float64s(mg.PhaseCrossovers)
	for _, w := range mg.PhaseCrossovers {
		m := cabs(val(w))
		gm := -20 * math.Log10(m) // +Inf where |L| = 0
		mg.GainMarginsDB = append(mg.GainMarginsDB, gm)
		if m > 0 && math.Abs(gm) < math.Abs(mg.GainMarginDB) {
			mg.GainMargin, mg.GainMarginDB, mg.PhaseCrossover = 1/m, gm, w
		}
	}
	for _, w := range mg.GainCrossovers {
		p := cmplx.Phase(val(w)) * 180 / math.Pi
		pm := 180 + p // p in (-180, 180]: pm in (0, 360]
		if pm > 180 {
			pm -= 360 // in (-180, 180]
		}
		mg.PhaseMargins = append(mg.PhaseMargins, pm)
		if math.Abs(pm) < math.Abs(mg.PhaseMargin) || math.IsInf(mg.PhaseMargin, 1) {
			mg.PhaseMargin, mg.GainCrossover = pm, w
		}
		if w > 0 {
			pmr := math.Mod(pm+360, 360) * math.Pi / 180
			if dm := pmr / w; dm < mg.DelayMargin {
				mg.DelayMargin = dm
			}
		}
	}
	notes = append(notes, mg.modulus(f, L, val, unit)...)
	// closed loop T = L/(1+L) on the same grid
	mg.ResonantPeak = math.Inf(-1)
	t0 := math.NaN()
	if dc, ok := DCGain(L); ok && dc != nil {
		l0 := dc.At(0, 0)
		t0 = math.Abs(l0 / (1 + l0))
	} else {
		t0 = 1 // integrator in the loop: T(0) = 1
	}
	mg.Bandwidth = math.NaN()
	tAt := func(w float64) float64 {
		l := val(w)
		return cabs(l / (1 + l))
	}
	kPeak := -1
	bwBelow := false
	lim := t0 / math.Sqrt2
	for k, w := range f.W {
		l := f.G[k][0]
		T := cabs(l / (1 + l))
		db := 20 * math.Log10(T)
		if db > mg.ResonantPeak {
			mg.ResonantPeak, mg.ResonantFreq, kPeak = db, w, k
		}
		if math.IsNaN(mg.Bandwidth) && !bwBelow && t0 > 0 && T < lim {
			if k == 0 {
				// already below: the -3 dB point lies under the range
				bwBelow = true
			} else {
				// refine |T| = |T(0)|/sqrt(2) by bisection in log w
				mg.Bandwidth = bisect(f.W[k-1], w, math.Log(cabs(f.G[k-1][0]/(1+f.G[k-1][0]))/lim),
					func(w float64) float64 { return math.Log(tAt(w) / lim) })
			}
		}
	}
	if kPeak > 0 && kPeak < len(f.W)-1 {
		// golden-section search for the peak between the grid neighbours
		w, tw := goldenMax(tAt, f.W[kPeak-1], f.W[kPeak+1])
		if db := 20 * math.Log10(tw); db > mg.ResonantPeak {
			mg.ResonantPeak, mg.ResonantFreq = db, w
		}
	}
	if n := len(f.W); n > 0 {
		switch {
		case bwBelow:
			notes = append(notes, "closed-loop bandwidth: |T| is already 3 dB below |T(0)| at "+unit(f.W[0])+", the lower edge of the range; the -3 dB point lies below it")
		case math.IsNaN(mg.Bandwidth) && t0 > 0:
			notes = append(notes, "closed-loop bandwidth: |T| stays within 3 dB of |T(0)| up to "+unit(f.W[n-1])+", the upper edge of the range")
		}
		switch {
		case !math.IsNaN(mg.Bandwidth):
		case bwBelow:
			mg.BandwidthNote = "the -3 dB point lies below the range"
		case t0 > 0:
			mg.BandwidthNote = "|T| stays within 3 dB of |T(0)| up to " + unit(f.W[n-1]) + ", the upper edge of the range"
		case t0 == 0:
			mg.BandwidthNote = "|T(0)| = 0 (the loop gain is 0 at zero frequency): no level to fall 3 dB below"
		default:
			mg.BandwidthNote = "|T(0)| is not defined"
		}
		switch {
		case kPeak == 0 && !math.IsNaN(t0) && 20*math.Log10(t0) >= mg.ResonantPeak-1e-9:
			// |T| falls from its value at w = 0: no resonance
			mg.ResonantPeak, mg.ResonantFreq = 20*math.Log10(t0), 0
			notes = append(notes, "closed loop: |T| is largest at zero frequency; there is no resonant peak")
		case kPeak == 0:
			notes = append(notes, "closed-loop peak: the largest |T| found lies at "+unit(f.W[0])+", the lower edge of the range, not at a true maximum")
		case kPeak == n-1:
			notes = append(notes, "closed-loop peak: the largest |T| found lies at "+unit(f.W[n-1])+", the upper edge of the range, not at a true maximum")
		}
	}
	if !math.IsNaN(mg.Bandwidth) && f.Nyquist > 0 && mg.Bandwidth >= f.Nyquist*(1-1e-9) {
		// |T| reaches the limit only at the Nyquist frequency, where a
		// zero at z = -1 makes it 0: not a -3 dB point within the band
		mg.Bandwidth = math.NaN()
		mg.BandwidthNote = "|T| stays within 3 dB of |T(0)| up to the Nyquist frequency " + unit(f.Nyquist)
	}
	one, err := NewSystem(0, 1, 1, nil, nil, nil, nil, L.Ts)
	if err == nil {
		one.D.Set(0, 0, 1)
		Lc, note, err := withDeadTime(L, opt.Delay, mg.GainCrossovers)
		if note != "" {
			notes = append(notes, note)
		}
		if err == nil {
			if cl, err := CloseLoop(Lc, one, -1); err == nil {
				mg.ClosedChecked = true
				mg.ClosedStable = Stable(cl)
				if st, err := StabilityOf(cl); err == nil && !mg.ClosedStable && st.Marginal {
					mg.ClosedBoundary = st.Boundary
				}
			}
		}
	}
	if mg.ClosedChecked && !mg.ClosedStable && mg.ClosedBoundary == 0 {
		// an unstable closed loop has no bandwidth, resonance or delay
		// margin: the figures would describe a loop that does not work
		mg.ClosedNote = "closed loop unstable"
		mg.DelayMargin, mg.Bandwidth, mg.ResonantPeak, mg.ResonantFreq = math.NaN(), math.NaN(), math.NaN(), math.NaN()
		mg.BandwidthNote = "closed loop unstable"
		var kept []string
		for _, n := range notes {
			if !strings.HasPrefix(n, "closed-loop") && !strings.HasPrefix(n, "closed loop:") {
				kept = append(kept, n)
			}
		}
		notes = kept
	}
	mg.Notes = notes
	return mg, nil
}

// zeroMag is the fraction of the largest |L| on the chart below which |L|
// is rounding residue of a zero on the axis: a "gain margin" of 180 dB or
// more above the loop's own level is no margin.
const zeroMag = 1e-9

// jumpAt reports whether the phase of L jumps by more than 90 deg across
// w (within 1e-6 of it either side): |L| passes through 0 there, as at a
// zero on the imaginary axis (the unit circle), and a phase crossover
// found there is no crossover.
func jumpAt(val func(w float64) complex128, w float64) bool {
	a, b := val(w*(1-1e-6)), val(w*(1+1e-6))
	d := math.Abs(cmplx.Phase(a/b)) * 180 / math.Pi
	return d > 90
}

func joinFreqs(ws []float64, unit func(float64) string) string {
	var s []string
	for _, w := range ws {
		s = append(s, unit(w))
	}
	return strings.Join(s, ", ")
}

// modulus fills the distance from -1 and the modulus margin: the smallest
// |1 + L| on the grid, refined by golden-section search in log frequency
// between the grid neighbours (the same search as the resonant peak). At
// the upper edge of a continuous strictly proper loop |L| -> 0, so the
// distance tends to 1 as w grows: that limit is the margin when nothing
// nearer is found. At the lower edge of a loop with a finite DC gain the
// value at w = 0 is taken when it is smaller. Otherwise a minimum at an
// edge of the range gets a note.
func (mg *Margins) modulus(f *FrequencyResponse, L *System, val func(float64) complex128, unit func(float64) string) []string {
	dist := func(w float64) float64 { return cabs(1 + val(w)) }
	mg.ModulusMargin, mg.ModulusFreq = math.Inf(1), math.NaN()
	mg.Distance = make([]float64, len(f.W))
	k0 := -1
	for k := range f.W {
		d := cabs(1 + f.G[k][0])
		mg.Distance[k] = d
		if d < mg.ModulusMargin {
			mg.ModulusMargin, mg.ModulusFreq, k0 = d, f.W[k], k
		}
	}
	for _, w := range mg.GainCrossovers {
		mg.GainDistances = append(mg.GainDistances, dist(w))
	}
	for _, w := range mg.PhaseCrossovers {
		mg.PhaseDistances = append(mg.PhaseDistances, dist(w))
	}
	n := len(f.W)
	if k0 < 0 {
		return nil
	}
	if k0 > 0 && k0 < n-1 {
		w := goldenMin(f.W[k0-1], f.W[k0+1], dist)
		if d := dist(w); d < mg.ModulusMargin {
			mg.ModulusMargin, mg.ModulusFreq = d, w
		}
		return nil
	}
	if k0 == n-1 {
		if f.Nyquist > 0 && f.W[n-1] >= f.Nyquist*(1-1e-9) {
			return nil // the Nyquist frequency ends the band: a true edge
		}
		if !L.Sampled() && allZero(L.D) && mg.ModulusMargin >= 1-1e-3 {
			mg.ModulusMargin, mg.ModulusFreq = 1, math.Inf(1)
			return nil
		}
		return []string{"modulus margin: the smallest |1 + L| found lies at " + unit(f.W[n-1]) + ", the upper edge of the range, not at a true minimum"}
	}
	if dc, ok := DCGain(L); ok && dc != nil {
		if d := math.Abs(1 + dc.At(0, 0)); d <= mg.ModulusMargin {
			mg.ModulusMargin, mg.ModulusFreq = d, 0
			return nil
		}
	}
	return []string{"modulus margin: the smallest |1 + L| found lies at " + unit(f.W[0]) + ", the lower edge of the range, not at a true minimum"}
}

// goldenMin returns the w in [a, b] (a > 0) where fn is smallest, for fn
// unimodal there, by golden-section search in log w (60 steps).
func goldenMin(a, b float64, fn func(float64) float64) float64 {
	la, lb := math.Log(a), math.Log(b)
	g := (math.Sqrt(5) - 1) / 2
	c, d := lb-g*(lb-la), la+g*(lb-la)
	fc, fd := fn(math.Exp(c)), fn(math.Exp(d))
	for i := 0; i < 60; i++ {
		if fc < fd {
			lb, d, fd = d, c, fc
			c = lb - g*(lb-la)
			fc = fn(math.Exp(c))
		} else {
			la, c, fc = c, d, fd
			d = la + g*(lb-la)
			fd = fn(math.Exp(d))
		}
	}
	return math.Exp((la + lb) / 2)
}

// allZero reports whether every entry of a is zero (a nil matrix is).
func allZero(a *mat.Dense) bool {
	if a == nil {
		return true
	}
	r, c := a.Dims()
	for i := 0; i < r; i++ {
		for j := 0; j < c; j++ {
			if a.At(i, j) != 0 {
				return false
			}
		}
	}
	return true
}
