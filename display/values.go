package display

import (
	"fmt"
	"html"
	"math"
	"math/cmplx"
	"strconv"
	"strings"

	"gonum.org/v1/gonum/mat"
)

// Plain values: numbers, booleans, strings, real and complex matrices. The
// text form shows up to 10 significant digits (as the language's print
// does); the HTML and LaTeX forms show 6, for reading; JSON keeps full
// precision.
func init() {
	Register(float64(0), func(v any, _ Options) Bundle {
		x := v.(float64)
		b := NewBundle(valNum(x))
		b.Data[JSON] = map[string]any{"value": valJSON(x)}
		return b
	})
	Register(complex128(0), func(v any, _ Options) Bundle {
		z := v.(complex128)
		b := NewBundle(valComplex(z, 10))
		b.Data[JSON] = map[string]any{"re": valJSON(real(z)), "im": valJSON(imag(z))}
		return b
	})
	Register(false, func(v any, _ Options) Bundle { return NewBundle(strconv.FormatBool(v.(bool))) })
	Register("", func(v any, _ Options) Bundle { return NewBundle(v.(string)) })
	Register((*mat.Dense)(nil), func(v any, _ Options) Bundle {
		a := v.(*mat.Dense)
		r, c := a.Dims()
		return matrixBundle(r, c, func(i, j int) complex128 { return complex(a.At(i, j), 0) }, false)
	})
	Register((*mat.CDense)(nil), func(v any, _ Options) Bundle {
		a := v.(*mat.CDense)
		r, c := a.Dims()
		return matrixBundle(r, c, a.At, true)
	})
}

func valNum(v float64) string { return valDigits(v, 10) }

// valDigits writes v with at most d significant digits, without "-0".
func valDigits(v float64, d int) string {
	switch {
	case math.IsNaN(v):
		return "nan"
	case math.IsInf(v, 1):
		return "inf"
	case math.IsInf(v, -1):
		return "-inf"
	case v == 0:
		return "0"
	}
	return strconv.FormatFloat(v, 'g', d, 64)
}

// valComplex writes a + bj in the language's notation.
func valComplex(z complex128, d int) string {
	if cmplx.IsNaN(z) {
		return "nan"
	}
	re, im := real(z), imag(z)
	if im == 0 {
		return valDigits(re, d)
	}
	if re == 0 {
		return valDigits(im, d) + "j"
	}
	sign := " + "
	if im < 0 {
		sign, im = " - ", -im
	}
	return valDigits(re, d) + sign + valDigits(im, d) + "j"
}

// valJSON is a JSON-safe number: non-finite values become strings.
func valJSON(v float64) any {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return valNum(v)
	}
	return v
}

func matrixBundle(r, c int, at func(i, j int) complex128, isComplex bool) Bundle {
	kind := "matrix"
	switch {
	case c == 1:
		kind = "column vector"
	case r == 1:
		kind = "row vector"
	}
	if isComplex {
		kind = "complex " + kind
	}
	title := fmt.Sprintf("%dx%d %s", r, c, kind)

	// text/plain: right-aligned columns.
	cells := make([][]string, r)
	width := make([]int, c)
	for i := range cells {
		cells[i] = make([]string, c)
		for j := range cells[i] {
			cells[i][j] = valComplex(at(i, j), 10)
			width[j] = max(width[j], len([]rune(cells[i][j])))
		}
	}
	var t strings.Builder
	t.WriteString(title)
	for i := range cells {
		t.WriteString("\n")
		for j, s := range cells[i] {
			t.WriteString(strings.Repeat(" ", width[j]-len([]rune(s))+2))
			t.WriteString(s)
		}
	}

	// text/html: a compact table with row and column numbers.
	var h strings.Builder
	fmt.Fprintf(&h, `<table class="lsys-matrix" style="border-collapse:collapse;font-size:13px"><caption style="text-align:left;color:#555">%s</caption>`, html.EscapeString(title))
	h.WriteString(`<tr><th></th>`)
	for j := 0; j < c; j++ {
		fmt.Fprintf(&h, `<th style="padding:1px 8px;color:#888;font-weight:normal;text-align:right">%d</th>`, j+1)
	}
	h.WriteString(`</tr>`)
	for i := 0; i < r; i++ {
		fmt.Fprintf(&h, `<tr><th style="padding:1px 8px;color:#888;font-weight:normal;text-align:right">%d</th>`, i+1)
		for j := 0; j < c; j++ {
			z := at(i, j)
			grey := ""
			if z == 0 {
				grey = "color:#aaa;"
			}
			fmt.Fprintf(&h, `<td style="padding:1px 8px;text-align:right;font-family:monospace;%s">%s</td>`, grey, html.EscapeString(valComplex(z, 6)))
		}
		h.WriteString(`</tr>`)
	}
	h.WriteString(`</table>`)

	// text/latex: a bracketed matrix, exponents written as powers of ten.
	var l strings.Builder
	l.WriteString(`$$\begin{bmatrix}`)
	for i := 0; i < r; i++ {
		if i > 0 {
			l.WriteString(` \\ `)
		}
		for j := 0; j < c; j++ {
			if j > 0 {
				l.WriteString(` & `)
			}
			l.WriteString(valLatex(valComplex(at(i, j), 6)))
		}
	}
	l.WriteString(`\end{bmatrix}$$`)

	// application/json: rows of numbers ([re, im] pairs when complex).
	rows := make([]any, r)
	for i := range rows {
		row := make([]any, c)
		for j := range row {
			z := at(i, j)
			if isComplex {
				row[j] = []any{valJSON(real(z)), valJSON(imag(z))}
			} else {
				row[j] = valJSON(real(z))
			}
		}
		rows[i] = row
	}
	b := NewBundle(t.String())
	b.Data[HTML] = h.String()
	b.Data[LaTeX] = l.String()
	b.Data[JSON] = map[string]any{"rows": r, "cols": c, "complex": isComplex, "data": rows}
	return b
}

// valLatex turns 1.5e-07 into 1.5\cdot 10^{-7} and j into \mathrm{j}.
func valLatex(s string) string {
	var out []string
	for _, part := range strings.Fields(s) {
		if strings.HasSuffix(part, "j") {
			part = valLatexNum(strings.TrimSuffix(part, "j")) + `\,\mathrm{j}`
		} else if part != "+" && part != "-" {
			part = valLatexNum(part)
		}
		out = append(out, part)
	}
	return strings.Join(out, " ")
}

func valLatexNum(s string) string {
	if i := strings.IndexByte(s, 'e'); i >= 0 {
		exp, err := strconv.Atoi(s[i+1:])
		if err == nil {
			return s[:i] + `\cdot 10^{` + strconv.Itoa(exp) + `}`
		}
	}
	return s
}
