package display

import (
	"fmt"
	"math"

	"gonum.org/v1/plot/vg/draw"

	"lsys/lsys"
)

// The margins chart is lsys's own picture of stability margins: one curve,
// the distance |1 + L(jw)| of the loop's frequency response from the
// critical point -1, over frequency. Every margin is a distance on it: its
// lowest point is the modulus margin; at a gain crossover (|L| = 1) the
// distance is 2 sin(PM/2); at a phase crossover (L negative real) it is
// |1 - |L||; and where it falls below 1 (the dashed line) the feedback
// amplifies disturbances instead of reducing them.

func init() {
	Register((*lsys.Margins)(nil), renderMargins)
}

// mgCaption explains the chart in one sentence (text and HTML alike).
const mgCaption = "chart: |1 + L|, the distance of the loop's frequency response from the critical point -1, over frequency; " +
	"triangle: its lowest point, the modulus margin; circles: gain crossovers (|L| = 1); squares: phase crossovers (L negative real); " +
	"dashed line: distance 1, below which feedback amplifies disturbances"

// rpListWith lists frequencies each with a figure in brackets.
func rpListWith(ws, vals []float64, hz bool, what, unit string) string {
	i := -1
	return joinList(ws, func(w float64) string {
		i++
		if i < len(vals) {
			return rpFreq(w, hz) + " (" + what + " " + fmtNum(vals[i]) + unit + ")"
		}
		return rpFreq(w, hz)
	})
}

// mgModulus is the table's entry for the modulus margin.
func mgModulus(mg *lsys.Margins, hz bool) string {
	m := mg.ModulusMargin
	switch {
	case math.IsInf(m, 1) || math.IsNaN(m):
		return "n/a"
	case m == 0:
		return "0: the loop passes through -1 at " + rpFreq(mg.ModulusFreq, hz)
	}
	where := "at " + rpFreq(mg.ModulusFreq, hz)
	switch {
	case math.IsInf(mg.ModulusFreq, 1):
		where = "approached as the frequency grows (|L| falls to 0)"
	case mg.ModulusFreq == 0:
		where = "at zero frequency"
	}
	return fmt.Sprintf("%s %s (largest sensitivity |1/(1 + L)| %s dB)", fmtNum(m), where, fmtNum(-20*math.Log10(m)))
}

func renderMargins(v any, opt Options) Bundle {
	mg := v.(*lsys.Margins)
	f := mg.Loop
	hz := f.Hz
	gm := "infinite (no phase crossover)"
	if !math.IsInf(mg.GainMargin, 1) {
		gm = fmt.Sprintf("%s dB (factor %s) at %s", fmtNum(mg.GainMarginDB), fmtNum(mg.GainMargin), rpFreq(mg.PhaseCrossover, hz))
	}
	pm := "infinite (no gain crossover)"
	dm := "infinite"
	if !math.IsInf(mg.PhaseMargin, 1) {
		pm = fmt.Sprintf("%s deg at %s", fmtNum(mg.PhaseMargin), rpFreq(mg.GainCrossover, hz))
		dm = fmtNum(mg.DelayMargin) + " s"
	}
	verdict := "closed loop (negative unity feedback): stability not checked"
	if mg.ClosedChecked {
		switch {
		case mg.ClosedStable:
			verdict = "closed loop (negative unity feedback) is stable"
		case mg.ClosedBoundary > 0:
			verdict = fmt.Sprintf("closed loop (negative unity feedback) is marginally stable: %s on the stability boundary, none beyond it (often a state the loop does not see, such as a position under a speed loop; check that it may drift)",
				count(mg.ClosedBoundary, "pole", "poles"))
		default:
			verdict = "closed loop (negative unity feedback) is UNSTABLE: the margins do not describe a working loop"
		}
	}
	bw := rpFreq(mg.Bandwidth, hz)
	if math.IsNaN(mg.Bandwidth) {
		bw = "n/a: " + mg.BandwidthNote
	}
	peak := fmt.Sprintf("%s dB at %s", fmtNum(mg.ResonantPeak), rpFreq(mg.ResonantFreq, hz))
	if mg.ClosedNote != "" {
		dm, peak = "n/a: "+mg.ClosedNote, "n/a: "+mg.ClosedNote
	}
	head := []string{"figure", "value"}
	rows := [][]string{
		{"gain margin", gm},
		{"phase margin (180 + angle L, in (-180, 180] deg)", pm},
		{"delay margin", dm},
		{"modulus margin (smallest |1 + L|)", mgModulus(mg, hz)},
		{"gain crossovers (|L| = 1)", rpListWith(mg.GainCrossovers, mg.PhaseMargins, hz, "phase margin", " deg")},
		{"phase crossovers (angle L = -180 deg)", rpListWith(mg.PhaseCrossovers, mg.GainMarginsDB, hz, "gain margin", " dB")},
		{"closed-loop bandwidth (-3 dB)", bw},
		{"closed-loop resonant peak", peak},
	}
	text := textTable("loop margins", head, rows) + "\n" + verdict
	for _, n := range mg.Notes {
		text += "\nnote: " + n
	}
	text += "\n" + mgCaption
	b := rpBundle(text, mgFigure(mg), opt)
	b.Data[HTML] = htmlTableCard("lsys-response", "Loop margins", head, rows, 2, append(append([]string{verdict}, mg.Notes...), mgCaption)...)
	notes := mg.Notes
	if notes == nil {
		notes = []string{}
	}
	b.Data[JSON] = map[string]any{
		"gain_margin": jsonNum(mg.GainMargin), "gain_margin_db": jsonNum(mg.GainMarginDB), "phase_crossover": jsonNum(mg.PhaseCrossover),
		"phase_margin_deg": jsonNum(mg.PhaseMargin), "gain_crossover": jsonNum(mg.GainCrossover), "delay_margin": jsonNum(mg.DelayMargin),
		"modulus_margin": jsonNum(mg.ModulusMargin), "modulus_margin_freq": jsonNum(mg.ModulusFreq),
		"gain_crossovers": mg.GainCrossovers, "phase_crossovers": mg.PhaseCrossovers,
		"phase_margins_deg": jsonNums(mg.PhaseMargins), "gain_margins_db": jsonNums(mg.GainMarginsDB), "bandwidth": jsonNum(mg.Bandwidth),
		"resonant_peak_db": jsonNum(mg.ResonantPeak), "resonant_freq": jsonNum(mg.ResonantFreq), "closed_loop_stable": mg.ClosedStable,
		"notes": notes, "phase_margin_convention": "180 + angle L, in (-180, 180] deg",
	}
	if mg.BandwidthNote != "" {
		b.Data[JSON].(map[string]any)["bandwidth_note"] = "n/a: " + mg.BandwidthNote
	}
	if mg.ClosedNote != "" {
		b.Data[JSON].(map[string]any)["closed_loop_note"] = "n/a: " + mg.ClosedNote
	}
	return b
}

// mgFigure draws the distance from -1 over frequency with the margins
// marked on it (see the top of this file).
func mgFigure(mg *lsys.Margins) *rpFigure {
	f := mg.Loop
	x, xl, sc := rpFreqAxis(f)
	pn := newPanel("distance from the critical point -1", xl, "|1 + L|")
	pn.LogX = true
	pn.LinYTicks = true
	pn.Legend = true
	pn.LegendBelow = true
	pn.Series = []rpSeries{{Name: "|1 + L|, distance from -1", X: x, Y: mg.Distance, Style: 0}}
	pn.Lines = []rpLine{{At: 1, Dashed: true}}
	if f.Nyquist > 0 {
		pn.Lines = append(pn.Lines, rpLine{At: f.Nyquist * sc, Vertical: true, Dashed: true, Label: "Nyquist"})
	}
	// The frame: from 0 up to a little above the highest mark, and to at
	// least 1.2 so the line at 1 shows; the curve's far reaches (near an
	// integrator |1 + L| grows without bound) are cut at 2.5.
	top := 1.2
	var label rpText
	marks := func(name string, ws, ds []float64, style int, shape draw.GlyphDrawer, radius float64) {
		var px, py []float64
		for i, w := range ws {
			if i < len(ds) && ok(ds[i]) && ok(w) && w > 0 {
				px, py = append(px, w*sc), append(py, ds[i])
				top = math.Max(top, 1.15*ds[i])
			}
		}
		if len(px) > 0 {
			pn.Series = append(pn.Series, rpSeries{Name: name, X: px, Y: py, Style: style, Points: true, Shape: shape, Radius: radius})
		}
	}
	marks("gain crossovers (|L| = 1)", mg.GainCrossovers, mg.GainDistances, 1, draw.CircleGlyph{}, 3.5)
	marks("phase crossovers (L negative real)", mg.PhaseCrossovers, mg.PhaseDistances, 2, draw.BoxGlyph{}, 3.5)
	if w := mg.ModulusFreq; ok(w) && w > 0 && ok(mg.ModulusMargin) {
		marks("modulus margin (smallest distance)", []float64{w}, []float64{mg.ModulusMargin}, 3, draw.TriangleGlyph{}, 4.5)
		label = rpText{X: w * sc, Y: mg.ModulusMargin, Text: "modulus margin " + fmtNum(mg.ModulusMargin)}
	}
	hi := 0.0
	for _, d := range mg.Distance {
		if ok(d) {
			hi = math.Max(hi, d)
		}
	}
	top = math.Max(top, math.Min(2.5, 1.05*hi))
	pn.YMin, pn.YMax = 0, top
	if label.Text != "" {
		// below the lowest point, where the curve is not: it rises on
		// both sides of its minimum
		label.Y -= 0.08 * top
		pn.Texts = append(pn.Texts, label)
	}
	return &rpFigure{Rows: 1, Cols: 1, Panels: []*rpPanel{pn}, W: 16 * cmLen, H: 11 * cmLen}
}
