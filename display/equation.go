package display

// State equations typeset in HTML: bracketed matrices and named signal
// vectors laid out with inline tables, no MathJax. A notebook of many
// system cards then shows its equations as soon as each cell's output
// arrives (MathJax took about a quarter of a second per card and left raw
// LaTeX on screen for seconds after Run All), and each matrix is sent
// once: the equation carries A, B, C and D, so the card shows no separate
// tables for them. The LaTeX form stays in the bundle's text/latex part
// for converters that want it.

import (
	"fmt"
	"html"
	"strconv"
	"strings"

	"gonum.org/v1/gonum/mat"

	"lsys/lsys"
	"lsys/lsys/numfmt"
)

const (
	eqRow     = `<table style="display:inline-table;vertical-align:middle;border-collapse:collapse;margin:0 2px">`
	eqBracket = "border:1.5px solid #333;width:5px;padding:0"
	eqCell    = "padding:1px 7px;text-align:right;font-family:monospace;white-space:nowrap"
	eqName    = "padding:1px 6px;text-align:left;font-style:italic;white-space:nowrap"
)

// eqMatrix writes one bracketed matrix (entries) or vector (names).
func eqMatrix(b *strings.Builder, r, c int, at func(i, j int) (string, string)) {
	b.WriteString(eqRow)
	for i := 0; i < r; i++ {
		b.WriteString("<tr>")
		if i == 0 {
			fmt.Fprintf(b, `<td rowspan="%d" style="%s;border-right:none"></td>`, r, eqBracket)
		}
		for j := 0; j < c; j++ {
			txt, style := at(i, j)
			fmt.Fprintf(b, `<td style="%s">%s</td>`, style, html.EscapeString(txt))
		}
		if i == 0 {
			fmt.Fprintf(b, `<td rowspan="%d" style="%s;border-left:none"></td>`, r, eqBracket)
		}
		b.WriteString("</tr>")
	}
	b.WriteString("</table>")
}

func eqNums(b *strings.Builder, a *mat.Dense, r, c int) {
	eqMatrix(b, r, c, func(i, j int) (string, string) {
		v := a.At(i, j)
		if v == 0 {
			return "0", eqCell + ";color:#aaa"
		}
		return fmtNum(v), eqCell
	})
}

func eqNames(b *strings.Builder, names []string, sub string) {
	eqMatrix(b, len(names), 1, func(i, _ int) (string, string) { return names[i] + sub, eqName })
}

func eqOp(b *strings.Builder, s string) {
	fmt.Fprintf(b, `<span style="margin:0 6px;vertical-align:middle">%s</span>`, html.EscapeString(s))
}

// sxEquationHTML is the state equations of s in HTML; "" when they are
// not shown (no states, or more than 8 states, inputs or outputs).
func sxEquationHTML(s *lsys.System) string {
	n, m, p := s.N(), s.M(), s.P()
	if n == 0 || n > 8 || m > 8 || p > 8 {
		return ""
	}
	sub, next := "", ""
	if s.Sampled() {
		sub, next = "[k]", "[k+1]"
	}
	var b strings.Builder
	b.WriteString(`<div class="lsys-equations" style="margin:6px 0;line-height:1.25">`)
	b.WriteString(`<div style="margin:3px 0;white-space:nowrap;overflow-x:auto">`)
	if s.Sampled() {
		eqNames(&b, s.StateNames, next)
	} else {
		eqOp(&b, "d/dt")
		eqNames(&b, s.StateNames, "")
	}
	eqOp(&b, "=")
	eqNums(&b, s.A, n, n)
	eqNames(&b, s.StateNames, sub)
	if m > 0 {
		eqOp(&b, "+")
		eqNums(&b, s.B, n, m)
		eqNames(&b, s.InputNames, sub)
	}
	b.WriteString(`</div>`)
	if p > 0 {
		b.WriteString(`<div style="margin:3px 0;white-space:nowrap;overflow-x:auto">`)
		eqNames(&b, s.OutputNames, sub)
		eqOp(&b, "=")
		eqNums(&b, s.C, p, n)
		eqNames(&b, s.StateNames, sub)
		if m > 0 && !sxAllZero(s.D) {
			eqOp(&b, "+")
			eqNums(&b, s.D, p, m)
			eqNames(&b, s.InputNames, sub)
		}
		b.WriteString(`</div>`)
	}
	b.WriteString(`</div>`)
	return b.String()
}

// htmlNum writes a formatted number, 1.5e-07 as 1.5·10<sup>-7</sup>.
func htmlNum(s string) string {
	if i := strings.IndexByte(s, 'e'); i >= 0 {
		if exp, err := strconv.Atoi(s[i+1:]); err == nil {
			return html.EscapeString(s[:i]) + "·10<sup>" + strconv.Itoa(exp) + "</sup>"
		}
	}
	return html.EscapeString(s)
}

// htmlPoly writes p in descending powers of v with 6 significant digits,
// as latexPoly does.
func htmlPoly(p lsys.Poly, v string) string {
	iv := "<i>" + html.EscapeString(v) + "</i>"
	return writePoly(p, polyStyle{minus: "−", num: htmlNum, sep: " ", power: func(k int) string {
		if k == 1 {
			return iv
		}
		return iv + "<sup>" + strconv.Itoa(k) + "</sup>"
	}})
}

// rationalHTML is a transfer function as a fraction, typeset without
// MathJax (see the top of this file).
func rationalHTML(r *lsys.Rational) string {
	var b strings.Builder
	b.WriteString(`<div class="lsys-rational" style="margin:4px 0;font-size:14px;white-space:nowrap;overflow-x:auto">`)
	if r.Den.Degree() == 0 && r.Den.Lead() == 1 {
		b.WriteString(htmlPoly(r.Num, r.VarName()))
	} else {
		b.WriteString(`<table style="display:inline-table;vertical-align:middle;border-collapse:collapse">`)
		fmt.Fprintf(&b, `<tr><td style="text-align:center;padding:1px 6px">%s</td></tr>`, htmlPoly(r.Num, r.VarName()))
		fmt.Fprintf(&b, `<tr><td style="text-align:center;padding:1px 6px;border-top:1.5px solid #333">%s</td></tr></table>`, htmlPoly(r.Den, r.VarName()))
	}
	if r.Ts > 0 {
		b.WriteString(`<span style="margin-left:2em;vertical-align:middle">T = ` + htmlNum(numfmt.Digits(r.Ts, 6)) + ` s</span>`)
	}
	b.WriteString(`</div>`)
	return b.String()
}
