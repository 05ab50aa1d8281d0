package lsys

import (
	"context"
	"errors"
	"fmt"
	"math"
	"sort"
)

// LoopShape holds the four closed-loop transfer functions of the SISO loop
// of a plant P and a controller C with negative unity feedback (u = C (r -
// y), y = P u + d at the plant output, or P (u + di) with di at the plant
// input), on one frequency grid:
//
//	S  = 1/(1 + L)      the sensitivity: output disturbance to output, reference to error
//	T  = L/(1 + L)      the complementary sensitivity: reference to output
//	PS = P/(1 + L)      input disturbance to output
//	CS = C/(1 + L)      reference to control effort
//
// with L = P C. A dead time in the loop (Delay) belongs to the plant: P is
// then P0 e^(-sT), applied exactly.
type LoopShape struct {
	Frequency *FrequencyResponse // the loop L on the grid (its W, Hz, Rule, Delay)
	Names     [4]string          // "S", "T", "PS", "CS"
	Help      [4]string          // what each one is, in words
	Gain      [4][]complex128    // Gain[i][k]: function i at W[k]
	Peak      [4]float64         // the largest |.| on the range (refined between grid points), as a ratio
	PeakW     [4]float64         // rad/s
	// ModulusMargin is 1/Peak[0]: the smallest distance from L(jw) to the
	// critical point -1.
	ModulusMargin float64
	ClosedStable  bool // whether the closed loop is stable (the peaks mean something only then)
	ClosedChecked bool
	// ClosedBoundary counts closed-loop poles on the stability boundary
	// when none lies beyond it and none on it is defective (marginally
	// stable, as LoopMargins says: typically a state the loop does not
	// see, such as a position under a speed loop).
	ClosedBoundary int
	Notes          []string
}

// LoopShapes evaluates S, T, PS and CS of the loop P C (both SISO). The
// grid is the one LoopMargins uses for L (crossovers bracketed); each peak
// is the largest grid value refined by golden-section search between its
// grid neighbours (60 steps in log frequency) on exact evaluations.
// Closed-loop stability is judged from the poles of the closed loop (with
// a Padé model of a dead time, as LoopMargins does, and a note).
func LoopShapes(ctx context.Context, P, C *System, opt FrequencyOptions) (*LoopShape, error) {
	if P == nil || C == nil {
		return nil, errors.New("the plant or the controller is missing")
	}
	if P.M() != 1 || P.P() != 1 || C.M() != 1 || C.P() != 1 {
		return nil, fmt.Errorf("the plant (%d outputs x %d inputs) and the controller (%d x %d) must each have one input and one output; pick one channel", P.P(), P.M(), C.P(), C.M())
	}
	L, err := Series(P, C)
	if err != nil {
		return nil, err
	}
	f, err := frequency(ctx, L, opt, true)
	if err != nil {
		return nil, err
	}
	evP, evC := newFreqEval(P), newFreqEval(C)
	evP.delay = opt.Delay
	at := func(w float64) ([4]complex128, error) {
		p, err := evP.at(w)
		if err != nil {
			return [4]complex128{}, err
		}
		c, err := evC.at(w)
		if err != nil {
			return [4]complex128{}, err
		}
		l := p[0] * c[0]
		d := 1 + l
		return [4]complex128{1 / d, l / d, p[0] / d, c[0] / d}, nil
	}
	ls := &LoopShape{Frequency: f, Names: [4]string{"S", "T", "PS", "CS"},
		Help: [4]string{"sensitivity S = 1/(1 + L): output disturbance to output",
			"complementary sensitivity T = L/(1 + L): reference to output",
			"PS = P/(1 + L): input disturbance to output",
			"CS = C/(1 + L): reference to control effort"}}
	for i := range ls.Gain {
		ls.Gain[i] = make([]complex128, len(f.W))
	}
	for k, w := range f.W {
		v, err := at(w)
		if err != nil {
			// a pole of P or C on the axis: step aside as Frequency does
			if v, err = at(w * (1 + 1e-9)); err != nil {
				return nil, fmt.Errorf("at %g rad/s: %w", w, err)
			}
		}
		for i := range v {
			ls.Gain[i][k] = v[i]
		}
	}
	for i := range ls.Gain {
		kPeak := 0
		for k := range f.W {
			if cabs(ls.Gain[i][k]) > cabs(ls.Gain[i][kPeak]) {
				kPeak = k
			}
		}
		ls.Peak[i], ls.PeakW[i] = cabs(ls.Gain[i][kPeak]), f.W[kPeak]
		n := len(f.W)
		if kPeak > 0 && kPeak < n-1 && f.W[kPeak-1] > 0 {
			mag := func(w float64) float64 {
				v, err := at(w)
				if err != nil {
					return math.NaN()
				}
				return cabs(v[i])
			}
			w, m := goldenMax(mag, f.W[kPeak-1], f.W[kPeak+1])
			if m > ls.Peak[i] {
				ls.Peak[i], ls.PeakW[i] = m, w
			}
		}
		if n > 1 && (kPeak == 0 || kPeak == n-1) && ls.Peak[i] > 0 {
			edge, toward, inner := "lower", "low", f.W[kPeak]*10
			if kPeak == n-1 {
				edge, toward, inner = "upper", "high", f.W[kPeak]/10
			}
			// within 0.1 dB over the last decade: the function levels off
			// at its limit there, which is its supremum, not a peak
			k := sort.SearchFloat64s(f.W, inner)
			if k >= n {
				k = n - 1
			}
			if m := cabs(ls.Gain[i][k]); m > 0 && math.Abs(20*math.Log10(ls.Peak[i]/m)) < 0.1 {
				ls.Notes = append(ls.Notes, fmt.Sprintf("|%s| levels off at %.4g toward %s frequencies: its largest value is that limit, not a peak", ls.Names[i], ls.Peak[i], toward))
			} else {
				ls.Notes = append(ls.Notes, fmt.Sprintf("the largest |%s| found lies at the %s edge of the range (%.4g rad/s), not at a true maximum", ls.Names[i], edge, f.W[kPeak]))
			}
		}
	}
	ls.ModulusMargin = 1 / ls.Peak[0]
	one, err := NewSystem(0, 1, 1, nil, nil, nil, nil, L.Ts)
	if err == nil {
		one.D.Set(0, 0, 1)
		var wc []float64
		for k := 0; k+1 < len(f.W); k++ {
			a, b := cabs(ls.Gain[1][k]/ls.Gain[0][k]), cabs(ls.Gain[1][k+1]/ls.Gain[0][k+1])
			if (a > 1) != (b > 1) {
				wc = append(wc, f.W[k+1])
			}
		}
		Lc, note, err := withDeadTime(L, opt.Delay, wc)
		if note != "" {
			ls.Notes = append(ls.Notes, note)
		}
		if err == nil {
			if cl, err := CloseLoop(Lc, one, -1); err == nil {
				if st, err := StabilityOf(cl); err == nil {
					ls.ClosedChecked = true
					ls.ClosedStable = st.Stable
					if st.Marginal {
						ls.ClosedBoundary = st.Boundary
					}
				}
			}
		}
	}
	if ls.ClosedChecked && !ls.ClosedStable && ls.ClosedBoundary == 0 {
		ls.Notes = append(ls.Notes, "the closed loop is unstable: the peaks and the modulus margin describe no working loop")
	}
	return ls, nil
}

// goldenMax maximizes f over [a, b] (a > 0) by golden-section search in
// log frequency, 60 steps (the bracket shrinks by 0.618^60, about 3e-13).
func goldenMax(f func(float64) float64, a, b float64) (float64, float64) {
	la, lb := math.Log(a), math.Log(b)
	g := (math.Sqrt(5) - 1) / 2
	c, d := lb-g*(lb-la), la+g*(lb-la)
	fc, fd := f(math.Exp(c)), f(math.Exp(d))
	for i := 0; i < 60; i++ {
		if fc > fd {
			lb, d, fd = d, c, fc
			c = lb - g*(lb-la)
			fc = f(math.Exp(c))
		} else {
			la, c, fc = c, d, fd
			d = la + g*(lb-la)
			fd = f(math.Exp(d))
		}
	}
	w := math.Exp((la + lb) / 2)
	return w, f(w)
}
