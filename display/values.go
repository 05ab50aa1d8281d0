package display

import (
	"fmt"
	"strconv"
	"strings"

	"gonum.org/v1/gonum/mat"

	"lsys/lsys/numfmt"
)

// Plain values: numbers, booleans, strings, real and complex matrices. The
// text form shows up to 10 significant digits (as the language's print
// does); the HTML and LaTeX forms show 6, for reading; JSON keeps full
// precision.
func init() {
	Register(float64(0), func(v any, _ Options) Bundle {
		x := v.(float64)
		b := NewBundle(numfmt.Digits(x, 10))
		b.Data[JSON] = map[string]any{"value": jsonNum(x)}
		return b
	})
	Register(complex128(0), func(v any, _ Options) Bundle {
		z := v.(complex128)
		b := NewBundle(numfmt.ComplexDigits(z, 10))
		b.Data[JSON] = map[string]any{"re": jsonNum(real(z)), "im": jsonNum(imag(z))}
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
	for i := range cells {
		cells[i] = make([]string, c)
		for j := range cells[i] {
			cells[i][j] = numfmt.ComplexDigits(at(i, j), 10)
		}
	}
	var t strings.Builder
	t.WriteString(title + "\n")
	writeColumns(&t, cells, "  ", 0)

	// text/html: our matrix table, rows and columns numbered.
	var h strings.Builder
	htmlMatrix(&h, kind, fmt.Sprintf("%dx%d", r, c), numbered(r), numbered(c), func(i, j int) (string, bool) {
		z := at(i, j)
		return numfmt.ComplexDigits(z, 6), z == 0
	})

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
			l.WriteString(valLatex(numfmt.ComplexDigits(at(i, j), 6)))
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
				row[j] = []any{jsonNum(real(z)), jsonNum(imag(z))}
			} else {
				row[j] = jsonNum(real(z))
			}
		}
		rows[i] = row
	}
	b := NewBundle(strings.TrimSuffix(t.String(), "\n"))
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
			part = latexNum(strings.TrimSuffix(part, "j")) + `\,\mathrm{j}`
		} else if part != "+" && part != "-" {
			part = latexNum(part)
		}
		out = append(out, part)
	}
	return strings.Join(out, " ")
}
