package display

import (
	"fmt"
	"html"
	"math"
	"math/cmplx"
	"strconv"
	"strings"

	"lsys/lsys"
)

func init() {
	Register((*lsys.ModeTable)(nil), renderModes)
}

func sxBlocks(b []int) string {
	parts := make([]string, len(b))
	for i, k := range b {
		parts[i] = strconv.Itoa(k)
	}
	return strings.Join(parts, "+")
}

// sxModeRow is the common columns of a mode, text and HTML alike.
func sxModeRow(i int, m lsys.Mode) []string {
	period := ""
	if m.Period > 0 {
		period = fmtNum(m.Period)
	}
	mult := ""
	if m.Multiplicity > 1 {
		mult = fmt.Sprintf("%d (%s)", m.Multiplicity, sxBlocks(m.Blocks))
	}
	return []string{
		strconv.Itoa(i + 1),
		fmtComplex(m.Eigenvalue, m.Pair),
		fmtNum(m.NaturalFreq),
		fmtNum(m.FreqHz),
		fmtNum(m.Damping),
		fmtNum(m.TimeConstant),
		period,
		mult,
		fmtNum(m.Cond),
		choose(m.Reachable, "yes", "NO") + choose(m.ReachClose, " (close)", ""),
		choose(m.Observable, "yes", "NO") + choose(m.ObserveClose, " (close)", ""),
	}
}

var sxModeHeads = []string{"#", "eigenvalue", "wn rad/s", "f Hz", "damping", "tau s", "period s", "mult (blocks)", "cond", "reached", "seen"}

func sxModesTitle(t *lsys.ModeTable) string {
	s := t.System
	kind := "continuous-time"
	if s != nil && s.Sampled() {
		kind = "sampled (every " + fmtNum(s.Ts) + " s; figures through s = log(z)/Ts)"
	}
	n := 0
	if s != nil {
		n = s.N()
	}
	return fmt.Sprintf("modes of a %s system with %s: %s, by natural frequency then damping", kind,
		count(n, "state", "states"), count(len(t.Modes), "mode", "modes"))
}

// sxVerdictNote states how the reached and seen verdicts were decided and
// their two tolerances.
func sxVerdictNote(t *lsys.ModeTable) string {
	return fmt.Sprintf("verdicts: PBH test per mode, reach on (A, B) and visibility on (A, C), each pair balanced on its own (states, inputs and outputs scaled by powers of two, so units do not matter); reached if the margin exceeds %s x ||B~|| = %s, seen if it exceeds %s x ||C~|| = %s; for a defective eigenvalue the margin is the least over the disk it moves in under a perturbation of that size; (close) marks a margin within a factor 10 of its tolerance, a call that other units or coordinates may turn",
		fmtNum(t.RelTol), fmtNum(t.ReachTol), fmtNum(t.RelTol), fmtNum(t.ObserveTol))
}

func renderModes(v any, _ Options) Bundle {
	t := v.(*lsys.ModeTable)
	if t == nil {
		return NewBundle("(no modes)")
	}
	s := t.System
	var b strings.Builder
	b.WriteString(sxModesTitle(t) + "\n")
	if len(t.Modes) == 0 {
		b.WriteString("  (a static gain has no modes)\n")
		return NewBundle(b.String())
	}
	cells := [][]string{sxModeHeads}
	for i, m := range t.Modes {
		cells = append(cells, sxModeRow(i, m))
	}
	writeColumns(&b, cells, "  ", 1)
	b.WriteString("  " + sxVerdictNote(t) + "\n")

	// Reach and visibility per signal.
	if s != nil && (s.M() > 0 || s.P() > 0) {
		b.WriteString("\nreach |w^H b_j|/||b_j|| per input, visibility |c_i v|/||c_i|| per output (balanced system, unit eigenvectors: 0 none, 1 along the mode), PBH margins\n")
		head := []string{"#"}
		for _, u := range s.InputNames {
			head = append(head, "<- "+u)
		}
		for _, y := range s.OutputNames {
			head = append(head, "-> "+y)
		}
		head = append(head, "reach margin", "seen margin")
		g := [][]string{head}
		for i, m := range t.Modes {
			row := []string{strconv.Itoa(i + 1)}
			for _, r := range m.Reach {
				row = append(row, fmtNum(r))
			}
			for _, o := range m.Visibility {
				row = append(row, fmtNum(o))
			}
			row = append(row, fmtNum(m.ReachMargin), fmtNum(m.ObserveMargin))
			g = append(g, row)
		}
		writeColumns(&b, g, "  ", 1)
	}
	// Mode shapes.
	if s != nil && s.N() <= 12 {
		b.WriteString("\nmode shapes (largest entry 1; magnitude and phase in degrees)\n")
		head := []string{"state"}
		for i := range t.Modes {
			head = append(head, "mode "+strconv.Itoa(i+1))
		}
		g := [][]string{head}
		for k, name := range s.StateNames {
			row := []string{name}
			for _, m := range t.Modes {
				row = append(row, sxShapeEntry(m.Shape[k], m.Pair || imag(m.Eigenvalue) != 0))
			}
			g = append(g, row)
		}
		writeColumns(&b, g, "  ", 1)
	}

	out := NewBundle(b.String())
	out.Data[HTML] = sxModesHTML(t)
	out.Data[JSON] = sxModesJSON(t)
	return out
}

// sxShapeEntry writes a shape entry: a signed magnitude for real modes,
// magnitude and phase for oscillatory ones.
func sxShapeEntry(z complex128, complexMode bool) string {
	if !complexMode {
		return fmtNum(real(z))
	}
	a := cmplx.Abs(z)
	if a == 0 {
		return "0"
	}
	ph := cmplx.Phase(z) * 180 / math.Pi
	return fmtNum(a) + " ∠" + strconv.FormatFloat(math.Round(ph), 'f', 0, 64)
}

func sxModesHTML(t *lsys.ModeTable) string {
	s := t.System
	var h strings.Builder
	htmlCard(&h, "lsys-modes", sxModesTitle(t))
	if len(t.Modes) == 0 {
		h.WriteString("<div style=\"color:#555\">a static gain has no modes</div></div>")
		return h.String()
	}
	th := "<th " + thStyle + ">"
	h.WriteString("<table style=\"border-collapse:collapse\"><tr>")
	for _, c := range sxModeHeads {
		h.WriteString(th + html.EscapeString(c) + "</th>")
	}
	var inputs, outputs []string
	if s != nil {
		inputs, outputs = s.InputNames, s.OutputNames
	}
	// One table fits a 980 px notebook column with up to two signal
	// columns; with more, the reach and visibility bars and the shapes
	// move to a second table (one row per mode), transposed (one row per
	// signal) when there are more signals than modes.
	split := len(inputs)+len(outputs) > 2
	showShape := s != nil && s.N() <= 24
	if !split {
		for _, u := range inputs {
			h.WriteString(th + "reach from " + html.EscapeString(u) + "</th>")
		}
		for _, y := range outputs {
			h.WriteString(th + "seen by " + html.EscapeString(y) + "</th>")
		}
		if showShape {
			h.WriteString(th + "shape</th>")
		}
	}
	h.WriteString("</tr>")
	// Bars are scaled per signal column against the largest value in it.
	maxReach := make([]float64, len(inputs))
	maxVis := make([]float64, len(outputs))
	for _, m := range t.Modes {
		for j, r := range m.Reach {
			if !math.IsInf(r, 0) {
				maxReach[j] = math.Max(maxReach[j], r)
			}
		}
		for i, o := range m.Visibility {
			maxVis[i] = math.Max(maxVis[i], o)
		}
	}
	for i, m := range t.Modes {
		bg := ""
		if !m.Stable() {
			bg = " style=\"background:#fbeee6\""
		}
		fmt.Fprintf(&h, "<tr%s>", bg)
		for k, c := range sxModeRow(i, m) {
			style := tdNumStyle
			title := ""
			if k == 9 || k == 10 {
				if strings.HasPrefix(c, "NO") {
					style += ";font-weight:bold"
				}
				mg, tol := m.ReachMargin, m.ReachTol
				if k == 10 {
					mg, tol = m.ObserveMargin, m.ObserveTol
				}
				title = fmt.Sprintf(" title=\"PBH margin %s against tolerance %s\"", fmtNum(mg), fmtNum(tol))
			}
			fmt.Fprintf(&h, "<td style=\"%s\"%s>%s</td>", style, title, html.EscapeString(c))
		}
		if !split {
			for j, r := range m.Reach {
				h.WriteString(sxBarCell(r, maxReach[j]))
			}
			for k, o := range m.Visibility {
				h.WriteString(sxBarCell(o, maxVis[k]))
			}
			if showShape {
				h.WriteString("<td style=\"padding:2px 6px\">" + sxShapeBars(m, s.StateNames) + "</td>")
			}
		}
		h.WriteString("</tr>")
	}
	h.WriteString("</table>")
	if split {
		sxLinksHTML(&h, t, inputs, outputs, maxReach, maxVis, showShape)
	}
	fmt.Fprintf(&h, "<div style=\"color:#555;margin-top:4px\">%s. Shaded rows do not decay. Bars: reach |w<sup>H</sup> b<sub>j</sub>|/||b<sub>j</sub>|| and visibility |c<sub>i</sub> v|/||c<sub>i</sub>|| in the balanced system (unit left and right eigenvectors w, v; 0 = none, 1 = along the mode) relative to the largest for the same signal; hover a verdict for its margin. Shape: one bar per state, magnitude relative to the largest; bars below the line are in antiphase (phase beyond &plusmn;90&deg;).</div>", html.EscapeString(sxVerdictNote(t)))
	h.WriteString("</div>")
	return h.String()
}

// sxLinksHTML is the second table of a mode table with many signals:
// reach per input and visibility per output with their bars, and the
// shapes; one row per mode, or one row per signal when there are more
// signals than modes (so the table grows down, not across).
func sxLinksHTML(h *strings.Builder, t *lsys.ModeTable, inputs, outputs []string, maxReach, maxVis []float64, showShape bool) {
	th := "<th " + thStyle + ">"
	thL := `<th style="padding:2px 6px;text-align:left;font-weight:normal;color:#333">`
	h.WriteString("<div style=\"font-weight:bold;margin:8px 0 2px 0\">reach and visibility</div><table style=\"border-collapse:collapse\">")
	if len(inputs)+len(outputs) > len(t.Modes) {
		h.WriteString("<tr>" + th + "</th>")
		for i := range t.Modes {
			fmt.Fprintf(h, "%smode %d</th>", th, i+1)
		}
		h.WriteString("</tr>")
		row := func(label string, at func(m lsys.Mode) string) {
			h.WriteString("<tr>" + thL + html.EscapeString(label) + "</th>")
			for _, m := range t.Modes {
				h.WriteString(at(m))
			}
			h.WriteString("</tr>")
		}
		for j, u := range inputs {
			row("reach from "+u, func(m lsys.Mode) string { return sxBarCell(m.Reach[j], maxReach[j]) })
		}
		for i, y := range outputs {
			row("seen by "+y, func(m lsys.Mode) string { return sxBarCell(m.Visibility[i], maxVis[i]) })
		}
		if showShape {
			row("shape", func(m lsys.Mode) string {
				return "<td style=\"padding:2px 6px\">" + sxShapeBars(m, t.System.StateNames) + "</td>"
			})
		}
		h.WriteString("</table>")
		return
	}
	h.WriteString("<tr>" + th + "#</th>")
	for _, u := range inputs {
		h.WriteString(th + "from " + html.EscapeString(u) + "</th>")
	}
	for _, y := range outputs {
		h.WriteString(th + "to " + html.EscapeString(y) + "</th>")
	}
	if showShape {
		h.WriteString(th + "shape</th>")
	}
	h.WriteString("</tr>")
	for i, m := range t.Modes {
		fmt.Fprintf(h, "<tr><td style=\"%s\">%d</td>", tdNumStyle, i+1)
		for j, r := range m.Reach {
			h.WriteString(sxBarCell(r, maxReach[j]))
		}
		for k, o := range m.Visibility {
			h.WriteString(sxBarCell(o, maxVis[k]))
		}
		if showShape {
			h.WriteString("<td style=\"padding:2px 6px\">" + sxShapeBars(m, t.System.StateNames) + "</td>")
		}
		h.WriteString("</tr>")
	}
	h.WriteString("</table>")
}

// sxBarCell is a number with a horizontal bar scaled to max.
func sxBarCell(v, max float64) string {
	w := 0.0
	if max > 0 && !math.IsInf(v, 0) {
		w = math.Round(60 * v / max)
	}
	if math.IsInf(v, 1) {
		w = 60
	}
	return fmt.Sprintf("<td style=\"padding:2px 6px;font-family:monospace;text-align:right;white-space:nowrap\"><span style=\"display:inline-block;width:%.0fpx;height:8px;background:#0072b2;margin-right:4px\"></span>%s</td>", w, fmtNum(v))
}

// sxShapeBars draws the mode shape as a row of vertical bars, one per
// state: height by magnitude, above the line when in phase with the largest
// entry, below when in antiphase. The title of each bar gives the numbers.
func sxShapeBars(m lsys.Mode, names []string) string {
	var b strings.Builder
	b.WriteString("<span style=\"display:inline-flex;align-items:center;gap:2px;height:28px\">")
	for k, z := range m.Shape {
		a := cmplx.Abs(z)
		ph := cmplx.Phase(z) * 180 / math.Pi
		hgt := math.Round(12 * a)
		up := math.Abs(ph) <= 90
		title := fmt.Sprintf("%s: %s at %.0f deg", names[k], fmtNum(a), ph)
		if up {
			fmt.Fprintf(&b, "<span title=\"%s\" style=\"display:inline-block;width:6px;height:28px;position:relative\"><span style=\"position:absolute;bottom:14px;left:0;width:6px;height:%.0fpx;background:#009e73\"></span></span>", html.EscapeString(title), hgt)
		} else {
			fmt.Fprintf(&b, "<span title=\"%s\" style=\"display:inline-block;width:6px;height:28px;position:relative\"><span style=\"position:absolute;top:14px;left:0;width:6px;height:%.0fpx;background:#d55e00\"></span></span>", html.EscapeString(title), hgt)
		}
	}
	b.WriteString("</span>")
	return b.String()
}

func sxModesJSON(t *lsys.ModeTable) map[string]any {
	modes := make([]any, len(t.Modes))
	for i, m := range t.Modes {
		shape := make([]any, len(m.Shape))
		for k, z := range m.Shape {
			shape[k] = jsonComplex(z)
		}
		reach := make([]any, len(m.Reach))
		for j, r := range m.Reach {
			reach[j] = jsonNum(r)
		}
		vis := make([]any, len(m.Visibility))
		for j, r := range m.Visibility {
			vis[j] = jsonNum(r)
		}
		modes[i] = map[string]any{
			"eigenvalue":     jsonComplex(m.Eigenvalue),
			"s":              jsonComplex(m.S),
			"pair":           m.Pair,
			"natural_freq":   jsonNum(m.NaturalFreq),
			"freq_hz":        jsonNum(m.FreqHz),
			"damping":        jsonNum(m.Damping),
			"time_constant":  jsonNum(m.TimeConstant),
			"period":         jsonNum(m.Period),
			"multiplicity":   m.Multiplicity,
			"blocks":         m.Blocks,
			"cond":           jsonNum(m.Cond),
			"reach":          reach,
			"visibility":     vis,
			"reachable":      m.Reachable,
			"observable":     m.Observable,
			"reach_margin":   jsonNum(m.ReachMargin),
			"observe_margin": jsonNum(m.ObserveMargin),
			"reach_tol":      jsonNum(m.ReachTol),
			"observe_tol":    jsonNum(m.ObserveTol),
			"shape":          shape,
		}
	}
	return map[string]any{"kind": "modes", "rel_tol": t.RelTol, "reach_tol": jsonNum(t.ReachTol), "observe_tol": jsonNum(t.ObserveTol), "modes": modes}
}
