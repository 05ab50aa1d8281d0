package display

// The modal diagram: a system drawn as its decoupled modal subsystems, one
// card per mode (or group of modes), in parallel between the inputs on the
// left and the outputs on the right. Every link carries its gain; a link
// below the tolerance is drawn dotted and grey and says why it is there
// (the mode cannot be reached from that input, or seen at that output).
// The SVG is written by hand: the layout is ours, sized in CSS pixels so
// that its text is 11 to 13 px at 100 % zoom in a 980 px notebook column.

import (
	"fmt"
	"html"
	"math"
	"strings"

	"lsys/lsys"
)

func init() {
	Register((*lsys.ModalDiagram)(nil), renderDiagram)
}

// Layout of the diagram in CSS pixels.
const (
	dgW        = 940.0 // fits a 980 px notebook column and the reports of lsys run
	dgPillW    = 130.0 // input and output name pills
	dgPillH    = 26.0
	dgInX      = 8.0   // left edge of the input pills
	dgStubIn   = 300.0 // where an input link turns horizontal
	dgCardX    = 390.0 // left edge of the mode cards
	dgCardW    = 250.0
	dgStubOut  = dgCardX + dgCardW + 90
	dgOutX     = dgW - 8 - dgPillW
	dgLine     = 16.0 // text line height inside a card
	dgPort     = 17.0 // spacing of link ports along a card's edge
	dgGap      = 16.0 // between cards
	dgMinCardH = 3*dgLine + 14
)

// Stability colours of a card's edge stripe (Okabe & Ito); the card also
// says it in words, so colour is never the only cue.
var dgStable = map[string]string{"decays": "#009E73", "grows": "#D55E00", "on the boundary": "#E69F00"}

func dgStability(m lsys.Mode, _ float64) string {
	switch {
	case m.Stable() || math.IsInf(m.NaturalFreq, 1):
		return "decays"
	case real(m.S) > 0:
		return "grows"
	}
	return "on the boundary"
}

// dgBoxLines are the text lines of a card: a title and two lines of
// figures, all from the mode table.
func dgBoxLines(d *lsys.ModalDiagram, k int, bx lsys.DiagramBox) (title, status string, lines []string) {
	sampled := d.Table.System != nil && d.Table.System.Sampled()
	sym := "λ"
	if sampled {
		sym = "z"
	}
	if len(bx.Modes) == 0 {
		return fmt.Sprintf("block %d", bx.First+1), "", nil
	}
	if !d.Grouped && len(bx.Modes) == 1 {
		m := bx.Modes[0]
		title = fmt.Sprintf("mode %d", k+1)
		switch {
		case m.Multiplicity > 1:
			title += fmt.Sprintf(" · ×%d (Jordan %s)", m.Multiplicity, sxBlocks(m.Blocks))
		case m.Pair:
			title += " · pair"
		default:
			title += " · real"
		}
		lines = []string{
			sym + " = " + fmtComplex(m.Eigenvalue, m.Pair),
			"wn " + fmtNum(m.NaturalFreq) + " rad/s · ζ " + fmtNum(m.Damping),
		}
		return title, dgStability(m, 0), lines
	}
	// several modes in one card: their range
	lo, hi := math.Inf(1), math.Inf(-1)
	zlo, zhi := math.Inf(1), math.Inf(-1)
	worst := "decays"
	for _, m := range bx.Modes {
		lo, hi = math.Min(lo, m.NaturalFreq), math.Max(hi, m.NaturalFreq)
		zlo, zhi = math.Min(zlo, m.Damping), math.Max(zhi, m.Damping)
		switch st := dgStability(m, 0); {
		case st == "grows":
			worst = st
		case st == "on the boundary" && worst == "decays":
			worst = st
		}
	}
	if d.Grouped {
		title = fmt.Sprintf("blocks %d–%d · %d modes", bx.First+1, bx.Last+1, len(bx.Modes))
	} else {
		title = fmt.Sprintf("block %d · %d modes kept together", bx.First+1, len(bx.Modes))
	}
	lines = []string{
		"wn " + dgRange(lo, hi) + " rad/s",
		"ζ " + dgRange(zlo, zhi),
	}
	return title, worst, lines
}

func dgRange(lo, hi float64) string {
	if lo == hi {
		return fmtNum(lo)
	}
	return fmtNum(lo) + " … " + fmtNum(hi)
}

func dgCardH(m, p int) float64 {
	return math.Max(dgMinCardH, float64(max(m, p))*dgPort+10)
}

// dgEsc escapes text for SVG.
func dgEsc(s string) string { return html.EscapeString(s) }

func renderDiagram(v any, _ Options) Bundle {
	d := v.(*lsys.ModalDiagram)
	if d == nil || d.Table == nil || d.Table.System == nil {
		return NewBundle("(no diagram)")
	}
	s := d.Table.System
	m, p := s.M(), s.P()
	text := dgText(d)

	// the explanation, wrapped to the width (6.8 px a character)
	var head []string
	for _, l := range []string{
		fmt.Sprintf("%s in parallel, by natural frequency (%s).", dgCount(d), strings.TrimSuffix(sxHeadline(s), ".")) + dgSampledNote(s),
		"Numbers on links: gains in modal coordinates (unit mode shapes); line weight: the unit-free reach or visibility.",
		fmt.Sprintf("Dotted grey: below the tolerance (%s relative): the mode cannot be reached from that input, or seen at that output.", fmtNum(d.RelTol)),
	} {
		head = append(head, dgWrap(l, 135)...) // (940 - 16) px / 6.8
	}
	headH := float64(len(head))*17 + 7
	// card positions
	cardH := dgCardH(m, p)
	y := headH + 8
	tops := make([]float64, len(d.Boxes))
	for k := range d.Boxes {
		tops[k] = y
		y += cardH + dgGap
	}
	stackH := y - dgGap - (headH + 8)
	H := y + 8
	// pills centred on the card stack, at least one card apart
	pillY := func(n, i int) float64 {
		step := math.Min(math.Max(dgPillH+14, stackH/float64(max(n, 1))), 90)
		span := step * float64(n-1)
		return headH + 8 + stackH/2 - span/2 + float64(i)*step - dgPillH/2
	}

	var b strings.Builder
	fmt.Fprintf(&b, `<svg xmlns="http://www.w3.org/2000/svg" width="%g" height="%g" viewBox="0 0 %g %g" font-family="DejaVu Sans, Verdana, sans-serif" font-size="12">`, dgW, H, dgW, H)
	fmt.Fprintf(&b, `<title>%s</title>`, dgEsc(strings.SplitN(text, "\n", 2)[0]))
	b.WriteString(`<rect width="100%" height="100%" fill="#ffffff"/>`)
	for i, l := range head {
		fmt.Fprintf(&b, `<text x="8" y="%g" fill="#333">%s</text>`, 16+float64(i)*17, dgEsc(l))
	}

	// links under the cards and pills
	for k, bx := range d.Boxes {
		top := tops[k]
		for j := 0; j < m; j++ {
			py := top + cardH/2 + (float64(j)-float64(m-1)/2)*dgPort
			sy := pillY(m, j) + dgPillH/2
			dgLink(&b, dgInX+dgPillW, sy, dgStubIn, dgCardX, py, j, bx.Reached[j], bx.Reach[j], bx.InGain[j], "not reached", true)
		}
		for i := 0; i < p; i++ {
			py := top + cardH/2 + (float64(i)-float64(p-1)/2)*dgPort
			sy := pillY(p, i) + dgPillH/2
			dgLink(&b, dgOutX, sy, dgStubOut, dgCardX+dgCardW, py, i, bx.Seen[i], bx.Visibility[i], bx.OutGain[i], "not seen", false)
		}
	}
	// cards
	for k, bx := range d.Boxes {
		top := tops[k]
		title, status, lines := dgBoxLines(d, k, bx)
		stripe := dgStable[status]
		if stripe == "" {
			stripe = "#999999"
		}
		fmt.Fprintf(&b, `<g><rect x="%g" y="%g" width="%g" height="%g" rx="6" fill="#f7f9fb" stroke="#5a6270" stroke-width="1"/>`, dgCardX, top, dgCardW, cardH)
		fmt.Fprintf(&b, `<rect x="%g" y="%g" width="6" height="%g" rx="2" fill="%s"/>`, dgCardX+1, top+1, cardH-2, stripe)
		ty := top + (cardH-float64(1+len(lines))*dgLine)/2 + 12
		fmt.Fprintf(&b, `<text x="%g" y="%g" font-weight="bold" fill="#1d232b">%s</text>`, dgCardX+14, ty, dgEsc(title))
		if status != "" {
			// on the first line that leaves room for it (estimated widths:
			// 7.4 px a character of bold 12 px text, 6.8 of plain, 6.3 of
			// 11 px), else on a line of its own below the figures
			sy := ty + float64(len(lines)+1)*dgLine
			room := dgCardW - 22 - float64(len([]rune(status)))*6.3
			if float64(len([]rune(title)))*7.4 < room {
				sy = ty
			} else if len(lines) > 0 && float64(len([]rune(lines[0])))*6.8 < room {
				sy = ty + dgLine
			}
			fmt.Fprintf(&b, `<text x="%g" y="%g" text-anchor="end" font-size="11" fill="#333">%s</text>`, dgCardX+dgCardW-8, sy, dgEsc(status))
		}
		for i, l := range lines {
			fmt.Fprintf(&b, `<text x="%g" y="%g" fill="#1d232b">%s</text>`, dgCardX+14, ty+float64(i+1)*dgLine, dgSub(l))
		}
		b.WriteString(`</g>`)
	}
	// pills
	for j := 0; j < m; j++ {
		dgPill(&b, dgInX, pillY(m, j), s.InputNames[j], j, "input")
	}
	for i := 0; i < p; i++ {
		dgPill(&b, dgOutX, pillY(p, i), s.OutputNames[i], i, "output")
	}
	b.WriteString(`</svg>`)

	bd := NewBundle(text)
	bd.Data[SVG] = b.String()
	return bd
}

// dgSub escapes a card line. The natural frequency is "wn" as in the mode
// table's heading: a Greek omega is drawn turned on its side by some
// browsers' font fallback.
func dgSub(l string) string { return dgEsc(l) }

// dgLink draws one link: a slanted run from the signal's pill to a stub
// level with the card's port, the stub carrying the gain (or the reason it
// is absent) so labels of different cards never share a place.
func dgLink(b *strings.Builder, px, py, stubX, cardX, portY float64, sig int, live bool, frac, gain float64, dead string, in bool) {
	col := rpHex(sig)
	width := 1 + 2*math.Min(math.Max(frac, 0), 1)
	dash := ""
	label := fmtNum(gain)
	lcol := "#1d232b"
	style := ""
	if !live {
		col, width, dash, label, lcol, style = "#8c8c8c", 1.2, ` stroke-dasharray="2 3"`, dead, "#555", ` font-style="italic"`
	}
	fmt.Fprintf(b, `<path d="M%g %g L%g %g L%g %g" fill="none" stroke="%s" stroke-width="%.2f"%s/>`, px, py, stubX, portY, cardX, portY, col, width, dash)
	// the label on the stub, above the line
	lx := (stubX + cardX) / 2
	fmt.Fprintf(b, `<text x="%g" y="%g" text-anchor="middle" font-size="11" fill="%s"%s>%s</text>`, lx, portY-3, lcol, style, dgEsc(label))
	// arrowheads where the signal arrives: at the card from an input, at
	// the output's pill from a card
	if in {
		fmt.Fprintf(b, `<path d="M%g %g l-6 -3.5 v7 z" fill="%s"/>`, cardX, portY, col)
	} else {
		fmt.Fprintf(b, `<path d="M%g %g l-6 -3.5 v7 z" fill="%s"/>`, px, py, col)
	}
}

// dgPill draws a signal's name in a rounded box with its colour.
func dgPill(b *strings.Builder, x, y float64, name string, sig int, kind string) {
	fmt.Fprintf(b, `<g><title>%s %s</title><rect x="%g" y="%g" width="%g" height="%g" rx="13" fill="#ffffff" stroke="%s" stroke-width="2"/>`, kind, dgEsc(name), x, y, dgPillW, dgPillH, rpHex(sig))
	fmt.Fprintf(b, `<text x="%g" y="%g" text-anchor="middle" font-size="13" fill="#1d232b">%s</text></g>`, x+dgPillW/2, y+dgPillH/2+4.5, dgEsc(dgClip(name, 16)))
}

func dgClip(s string, n int) string {
	r := []rune(s)
	if len(r) <= n {
		return s
	}
	return string(r[:n-1]) + "…"
}

// rpHex is palette colour i as #rrggbb.
func rpHex(i int) string {
	c := rpPalette[i%(len(rpPalette)-1)] // yellow is too weak for a line on white
	return fmt.Sprintf("#%02x%02x%02x", c.R, c.G, c.B)
}

// dgText is the diagram's text form: one block per card.
func dgText(d *lsys.ModalDiagram) string {
	s := d.Table.System
	var t strings.Builder
	fmt.Fprintf(&t, "modal diagram: %s in parallel (%s)\n", dgCount(d), strings.TrimSuffix(sxHeadline(s), "."))
	fmt.Fprintf(&t, "  gains in modal coordinates (unit mode shapes); links below %s (relative) are not reached / not seen\n", fmtNum(d.RelTol))
	for k, bx := range d.Boxes {
		title, status, lines := dgBoxLines(d, k, bx)
		fmt.Fprintf(&t, "  %s (%s): %s\n", title, status, strings.Join(lines, "; "))
		var ins, outs []string
		for j := range bx.InGain {
			ins = append(ins, s.InputNames[j]+" "+choose(bx.Reached[j], fmtNum(bx.InGain[j]), "not reached"))
		}
		for i := range bx.OutGain {
			outs = append(outs, s.OutputNames[i]+" "+choose(bx.Seen[i], fmtNum(bx.OutGain[i]), "not seen"))
		}
		if len(ins) > 0 {
			fmt.Fprintf(&t, "    from %s\n", strings.Join(ins, ", "))
		}
		if len(outs) > 0 {
			fmt.Fprintf(&t, "    to   %s\n", strings.Join(outs, ", "))
		}
	}
	return strings.TrimRight(t.String(), "\n")
}

func dgCount(d *lsys.ModalDiagram) string {
	if d.Grouped {
		return fmt.Sprintf("%d modal subsystems, drawn as %d groups of neighbours,", len(d.Form.Blocks), len(d.Boxes))
	}
	return count(len(d.Boxes), "modal subsystem", "modal subsystems")
}

// dgWrap breaks a line of text at spaces into lines of at most n
// characters.
func dgWrap(l string, n int) []string {
	var out []string
	for len([]rune(l)) > n {
		r := []rune(l)
		cut := strings.LastIndex(string(r[:n]), " ")
		if cut <= 0 {
			break
		}
		out = append(out, l[:cut])
		l = l[cut+1:]
	}
	return append(out, l)
}

// dgSampledNote says where a sampled system's wn and damping come from.
func dgSampledNote(s *lsys.System) string {
	if !s.Sampled() {
		return ""
	}
	return " Eigenvalues z; wn and ζ through s = log(z)/Ts."
}
