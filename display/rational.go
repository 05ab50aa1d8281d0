package display

import (
	"html"
	"math"
	"strconv"
	"strings"

	"lsys/lsys"
	"lsys/lsys/numfmt"
)

// Transfer functions: the text form is the language's own syntax (so it can
// be pasted into a cell); the LaTeX form is a fraction in descending powers,
// and the HTML form (what notebooks show) the same fraction typeset without
// MathJax.
func init() {
	Register((*lsys.Rational)(nil), func(v any, _ Options) Bundle {
		r := v.(*lsys.Rational)
		text := r.String()
		if r.Note != "" {
			// A comment, so the text still pastes into a cell.
			text += "\n# note: " + r.Note
		}
		b := NewBundle(text)
		tex := `$$` + latexPoly(r.Num, r.VarName())
		if !(r.Den.Degree() == 0 && r.Den.Lead() == 1) {
			tex = `$$\frac{` + latexPoly(r.Num, r.VarName()) + `}{` + latexPoly(r.Den, r.VarName()) + `}`
		}
		if r.Ts > 0 {
			tex += `\qquad T = ` + latexNum(numfmt.Digits(r.Ts, 6)) + `\,\mathrm{s}`
		}
		b.Data[LaTeX] = tex + `$$`
		b.Data[HTML] = rationalHTML(r)
		if r.Note != "" {
			b.Data[HTML] = b.Data[HTML].(string) + `<div class="lsys-note" style="color:#555;font-size:12px;margin:2px 0">note: ` + html.EscapeString(r.Note) + `</div>`
		}
		jsonPoly := func(p lsys.Poly) []any { // descending powers, as written
			t := p.Trim()
			out := make([]any, len(t))
			for i := range t {
				out[len(t)-1-i] = jsonNum(t[i])
			}
			return out
		}
		b.Data[JSON] = map[string]any{"variable": r.VarName(), "numerator": jsonPoly(r.Num),
			"denominator": jsonPoly(r.Den), "sample_time": r.Ts}
		if r.Note != "" {
			b.Data[JSON].(map[string]any)["note"] = r.Note
		}
		return b
	})
}

// latexPoly writes p in descending powers of v with 6 significant digits.
func latexPoly(p lsys.Poly, v string) string {
	return writePoly(p, polyStyle{minus: "-", num: latexNum, sep: `\,`, power: func(k int) string {
		if k == 1 {
			return v
		}
		return v + "^{" + strconv.Itoa(k) + "}"
	}})
}

// polyStyle is how one markup writes a polynomial: its minus sign, its
// numbers, the space between a coefficient and a power, and the powers.
type polyStyle struct {
	minus, sep string
	num        func(string) string
	power      func(k int) string
}

// writePoly writes p in descending powers with 6 significant digits, in
// the markup st gives (LaTeX and HTML share it).
func writePoly(p lsys.Poly, st polyStyle) string {
	t := p.Trim()
	if len(t) == 0 {
		return "0"
	}
	var b strings.Builder
	for i := len(t) - 1; i >= 0; i-- {
		c := t[i]
		if c == 0 {
			continue
		}
		switch {
		case b.Len() == 0 && c < 0:
			b.WriteString(st.minus)
		case b.Len() > 0 && c < 0:
			b.WriteString(" " + st.minus + " ")
		case b.Len() > 0:
			b.WriteString(" + ")
		}
		a := math.Abs(c)
		if a != 1 || i == 0 {
			b.WriteString(st.num(numfmt.Digits(a, 6)))
			if i > 0 {
				b.WriteString(st.sep)
			}
		}
		if i > 0 {
			b.WriteString(st.power(i))
		}
	}
	return b.String()
}
