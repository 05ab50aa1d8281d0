package display

import (
	"fmt"
	"math"
	"math/cmplx"
	"strconv"
	"strings"

	"gonum.org/v1/plot/vg/draw"

	"lsys/lsys"
)

func init() {
	Register((*lsys.Response)(nil), renderResponse)
	Register((*lsys.Metrics)(nil), renderMetrics)
	Register((*lsys.ModalResponse)(nil), renderModalResponse)
	Register((*lsys.Signal)(nil), renderSignal)
}

// rpMaxRows and rpMaxCols bound the panel grid of MIMO charts; the text
// says when channels were left out.
const rpMaxRows, rpMaxCols = 6, 6

var rpKindTitle = map[string]string{
	"step":    "step response",
	"impulse": "impulse response",
	"initial": "response from the initial state",
	"input":   "response",
}

func rpPanelTitle(out, ch string, kind string, multi bool) string {
	if kind == "initial" {
		return out
	}
	if kind == "input" {
		return out + " to " + ch
	}
	if multi {
		return out + " from " + ch
	}
	return out
}

func rpResponseText(r *lsys.Response) string {
	var b strings.Builder
	title := rpKindTitle[r.Kind]
	if r.Kind == "input" && len(r.Channels) > 0 {
		title += " to " + r.Channels[0]
	}
	fmt.Fprintf(&b, "%s: %d output(s) x %d channel(s), 0 to %s s, %d samples", title, len(r.Outputs), len(r.Channels), fmtNum(r.T[len(r.T)-1]), len(r.T))
	if r.Sampled {
		b.WriteString(" (sampled)")
	}
	b.WriteString("\n" + r.Rule + "\n")
	lines := 0
	for i, o := range r.Outputs {
		for c, ch := range r.Channels {
			if lines++; lines > 36 {
				fmt.Fprintf(&b, "  ... (%d pairs in all)\n", len(r.Outputs)*len(r.Channels))
				return strings.TrimRight(b.String(), "\n")
			}
			y := r.Y[i][c]
			fmt.Fprintf(&b, "  %s", o)
			if r.Kind == "step" || r.Kind == "impulse" {
				fmt.Fprintf(&b, " from %s", ch)
			}
			lo, hi := math.Inf(1), math.Inf(-1)
			for _, v := range y {
				lo, hi = math.Min(lo, v), math.Max(hi, v)
			}
			fmt.Fprintf(&b, ": final %s, range [%s, %s]\n", fmtNum(y[len(y)-1]), fmtNum(lo), fmtNum(hi))
		}
	}
	return strings.TrimRight(b.String(), "\n")
}

func rpClip(n, limit int) (int, bool) {
	if n > limit {
		return limit, true
	}
	return n, false
}

func renderResponse(v any, opt Options) Bundle {
	r := v.(*lsys.Response)
	text := rpResponseText(r)
	if len(r.T) == 0 || len(r.Outputs) == 0 {
		return NewBundle(text)
	}
	rows, cutR := rpClip(len(r.Outputs), rpMaxRows)
	cols, cutC := rpClip(len(r.Channels), rpMaxCols)
	if cutR || cutC {
		text += fmt.Sprintf("\n(chart shows the first %d outputs and %d channels)", rows, cols)
	}
	var gain []float64
	if G := r.Final; G != nil {
		_, m := G.Dims()
		for i := 0; i < len(r.Outputs); i++ {
			for j := 0; j < m; j++ {
				gain = append(gain, G.At(i, j))
			}
		}
	}
	multi := len(r.Outputs) > 1 || len(r.Channels) > 1
	f := &rpFigure{Rows: rows, Cols: cols}
	for i := 0; i < rows; i++ {
		for c := 0; c < cols; c++ {
			title := ""
			if multi || r.Kind == "input" {
				title = rpPanelTitle(r.Outputs[i], r.Channels[c], r.Kind, multi)
			} else {
				title = rpKindTitle[r.Kind]
			}
			pn := newPanel(title, "time (s)", r.Outputs[i])
			pn.Series = append(pn.Series, rpSeries{Name: r.Outputs[i], X: r.T, Y: r.Y[i][c], Style: 0, Stairs: r.Sampled})
			if gain != nil {
				pn.Lines = append(pn.Lines, rpLine{At: gain[i*len(r.Channels)+c], Dashed: true})
			}
			f.Panels = append(f.Panels, pn)
		}
	}
	// The input on its own axis below the outputs: it has its own units
	// (a force under a position), and on a shared axis one of the two
	// would be flattened.
	if r.Kind == "input" && len(r.U) == 1 {
		name := r.System.InputNames[0]
		in := newPanel("input "+name, "time (s)", name)
		in.Series = []rpSeries{{Name: name, X: r.T, Y: r.U[0], Style: 1, Width: 1.2, Stairs: r.Sampled}}
		f.Rows++
		for c := 0; c < cols; c++ {
			if c == 0 {
				f.Panels = append(f.Panels, in)
			} else {
				f.Panels = append(f.Panels, nil)
			}
		}
	}
	b := rpBundle(text, f, opt)
	b.Data[JSON] = map[string]any{
		"kind": r.Kind, "outputs": r.Outputs, "channels": r.Channels,
		"samples": len(r.T), "until": r.T[len(r.T)-1], "sampled": r.Sampled, "rule": r.Rule,
	}
	return b
}

func renderMetrics(v any, _ Options) Bundle {
	m := v.(*lsys.Metrics)
	head := []string{"output", "input", "rise time 10-90 % (s)", "settling time 2 % (s)", "overshoot (%)", "peak", "peak time (s)", "steady value"}
	var rows [][]string
	var js []map[string]any
	for _, r := range m.Rows {
		steady := fmtNum(r.Steady)
		if !r.SteadyFromGain {
			steady += " (last sample)"
		}
		rows = append(rows, []string{r.Output, r.Channel, fmtNum(r.RiseTime), fmtNum(r.SettlingTime), fmtNum(r.Overshoot), fmtNum(r.Peak), fmtNum(r.PeakTime), steady})
		js = append(js, map[string]any{
			"output": r.Output, "input": r.Channel, "rise_time": jsonNum(r.RiseTime), "settling_time": jsonNum(r.SettlingTime),
			"overshoot_percent": jsonNum(r.Overshoot), "peak": jsonNum(r.Peak), "peak_time": jsonNum(r.PeakTime), "steady": jsonNum(r.Steady),
			"steady_from_gain": r.SteadyFromGain,
		})
		if r.Note != "" {
			js[len(js)-1]["note"] = r.Note
		}
		if len(r.Undefined) > 0 {
			why := map[string]any{}
			for _, u := range r.Undefined {
				why[strings.ReplaceAll(u.Figure, " ", "_")] = "n/a: " + u.Reason
			}
			js[len(js)-1]["undefined"] = why
		}
	}
	// one line per row with the reasons of its n/a figures (figures with
	// the same reason named together), then the notes and the method
	var notes []string
	for _, r := range m.Rows {
		var figs, whys []string
		for _, u := range r.Undefined {
			if k := len(whys) - 1; k >= 0 && whys[k] == u.Reason {
				figs[k] += ", " + u.Figure
				continue
			}
			figs, whys = append(figs, u.Figure), append(whys, u.Reason)
		}
		var parts []string
		for k := range figs {
			parts = append(parts, figs[k]+" n/a: "+whys[k])
		}
		if r.Note != "" && r.Note != "the response does not move" {
			parts = append(parts, r.Note)
		}
		if len(parts) > 0 {
			notes = append(notes, r.Output+" / "+r.Channel+": "+strings.Join(parts, "; ")+".")
		}
	}
	notes = append(notes, m.Method+".")
	b := NewBundle(textTable("response metrics", head, rows) + "\n" + strings.Join(notes, "\n"))
	b.Data[HTML] = htmlTableCard("lsys-response", "Response metrics", head, rows, 2, notes...)
	b.Data[JSON] = js
	return b
}

func renderModalResponse(v any, opt Options) Bundle {
	mr := v.(*lsys.ModalResponse)
	r := mr.Response
	var b strings.Builder
	fmt.Fprintf(&b, "%s split by mode: %d part(s): %s\n", rpKindTitle[r.Kind], len(mr.Labels), strings.Join(mr.Labels, "; "))
	fmt.Fprintf(&b, "condition number of the modal basis %s; the parts sum to the response", fmtNum(mr.MaxCond))
	if mr.Note != "" {
		fmt.Fprintf(&b, "\n%s", mr.Note)
	}
	text := b.String()
	rows, _ := rpClip(len(r.Outputs), rpMaxRows)
	cols, _ := rpClip(len(r.Channels), rpMaxCols)
	f := &rpFigure{Rows: rows, Cols: cols}
	multi := len(r.Outputs) > 1 || len(r.Channels) > 1
	for i := 0; i < rows; i++ {
		for c := 0; c < cols; c++ {
			title := rpKindTitle[r.Kind] + " by mode"
			if multi {
				title = rpPanelTitle(r.Outputs[i], r.Channels[c], r.Kind, multi)
			}
			pn := newPanel(title, "time (s)", r.Outputs[i])
			pn.Legend = i == 0 && c == 0 // one legend for the figure, below the panels
			pn.LegendBelow, pn.Simplify = true, true
			for q, lab := range mr.Labels {
				pn.Series = append(pn.Series, rpSeries{Name: rpModeLegend(q, lab, mr.Values[q]), X: r.T, Y: mr.Parts[q][i][c], Style: q % 6, Glyph: true, Width: 1.2, Stairs: r.Sampled})
			}
			pn.Series = append(pn.Series, rpSeries{Name: "total", X: r.T, Y: r.Y[i][c], Style: -1, Width: 2, Stairs: r.Sampled})
			f.Panels = append(f.Panels, pn)
		}
	}
	out := rpBundle(text, f, opt)
	out.Data[JSON] = map[string]any{"modes": mr.Labels, "outputs": r.Outputs, "channels": r.Channels, "samples": len(r.T),
		"condition": jsonNum(mr.MaxCond), "note": mr.Note}
	return out
}

// rpModeLegend is the short legend label of a modal part: its number and
// its eigenvalue to two digits ("mode 2: -2.9e4 ± 4.2e4j"); the text
// output has the full values.
func rpModeLegend(q int, label string, v complex128) string {
	switch {
	case label == "direct":
		return "direct"
	case strings.HasPrefix(label, "block"):
		return fmt.Sprintf("part %d: block of %d modes", q+1, strings.Count(label, ",")+1)
	}
	f := func(x float64) string {
		d := 2
		if a := math.Abs(x); a >= 0.01 && a < 1000 {
			d = 3
		}
		s := strconv.FormatFloat(x, 'g', d, 64)
		s = strings.Replace(s, "e+0", "e", 1)
		s = strings.Replace(s, "e-0", "e-", 1)
		return strings.Replace(s, "e+", "e", 1)
	}
	if imag(v) == 0 {
		return fmt.Sprintf("mode %d: %s", q+1, f(real(v)))
	}
	return fmt.Sprintf("mode %d: %s ± %sj", q+1, f(real(v)), f(math.Abs(imag(v))))
}

func renderSignal(v any, _ Options) Bundle {
	s := v.(*lsys.Signal)
	var d string
	switch s.Kind {
	case "step":
		d = fmt.Sprintf("step of height %s at t = %s s", fmtNum(s.Amp), fmtNum(s.Delay))
	case "sine":
		d = fmt.Sprintf("sine: amplitude %s, %s rad/s (%s Hz), phase %s rad", fmtNum(s.Amp), fmtNum(s.Freq), fmtNum(s.Freq/(2*math.Pi)), fmtNum(s.Phase))
	case "ramp":
		d = fmt.Sprintf("ramp of slope %s per second", fmtNum(s.Amp))
	case "table":
		hold := "linear between rows"
		if s.Hold == lsys.HoldZeroOrder {
			hold = "held between rows"
		}
		d = fmt.Sprintf("table %s: %d rows x %d channel(s) from %s to %s s, %s", s.Name, len(s.T), s.Channels(), fmtNum(s.T[0]), fmtNum(s.T[len(s.T)-1]), hold)
	case "function":
		d = "signal " + s.Name + "(t)"
	default:
		d = "signal " + s.Name
	}
	if s.Delay != 0 && s.Kind != "step" {
		d += fmt.Sprintf(", starting at t = %s s", fmtNum(s.Delay))
	}
	return NewBundle(d)
}

// rpMark places a marker series (poles, zeros, the critical point).
func rpMark(name string, pts []complex128, style int, shape draw.GlyphDrawer, radius float64) rpSeries {
	var x, y []float64
	for _, p := range pts {
		if cmplx.IsNaN(p) || cmplx.IsInf(p) {
			continue
		}
		x, y = append(x, real(p)), append(y, imag(p))
	}
	return rpSeries{Name: name, X: x, Y: y, Style: style, Points: true, Shape: shape, Radius: radius}
}
