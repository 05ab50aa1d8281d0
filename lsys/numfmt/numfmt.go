// Package numfmt writes numbers as lsys shows them, in two forms: the
// language's (up to 10 significant digits, "inf", "nan", no "-0"), which
// print, records and the text of plain values use, and the short form of
// tables (4 significant digits). It also lays out a grid of such numbers
// in aligned columns. It is the one owner of these forms, shared by the
// language and display, so the two never drift apart.
package numfmt

import (
	"math"
	"math/cmplx"
	"strconv"
	"strings"
)

// Number writes a real number with up to 10 significant digits.
func Number(v float64) string { return Digits(v, 10) }

// Complex writes a + bj (or a - bj); a real value as a real number.
func Complex(c complex128) string { return ComplexDigits(c, 10) }

// Digits writes v with at most d significant digits: "inf", "-inf",
// "nan", and 0 without a sign.
func Digits(v float64, d int) string {
	switch {
	case math.IsInf(v, 1):
		return "inf"
	case math.IsInf(v, -1):
		return "-inf"
	case math.IsNaN(v):
		return "nan"
	case v == 0:
		return "0" // no "-0"
	}
	return strconv.FormatFloat(v, 'g', d, 64)
}

// ComplexDigits writes a + bj (or a - bj) with at most d significant
// digits per part; a real value as a real number, a pure imaginary one as
// bj.
func ComplexDigits(c complex128, d int) string {
	re, im := real(c), imag(c)
	if cmplx.IsNaN(c) {
		return "nan"
	}
	if im == 0 {
		return Digits(re, d)
	}
	if re == 0 {
		return Digits(im, d) + "j"
	}
	sign := " + "
	if im < 0 {
		sign = " - "
		im = -im
	}
	return Digits(re, d) + sign + Digits(im, d) + "j"
}

// Short is the form of tables: four significant digits, in fixed point
// from 1e-3 to 1e5 and in exponent form outside, trailing zeros trimmed;
// "inf", "-inf", "nan", and 0 without a sign.
func Short(v float64) string {
	switch {
	case math.IsNaN(v), math.IsInf(v, 0), v == 0:
		return Digits(v, 4)
	}
	a := math.Abs(v)
	if a >= 1e-3 && a < 1e5 {
		dec := max(3-int(math.Floor(math.Log10(a))), 0)
		s := strconv.FormatFloat(v, 'f', dec, 64)
		if strings.Contains(s, ".") {
			s = strings.TrimRight(strings.TrimRight(s, "0"), ".")
		}
		if s == "-0" {
			s = "0"
		}
		return s
	}
	s := strconv.FormatFloat(v, 'e', 3, 64)
	if i := strings.IndexByte(s, 'e'); i > 0 {
		mant := strings.TrimRight(strings.TrimRight(s[:i], "0"), ".")
		s = mant + s[i:]
	}
	return s
}

// Columns lays out rows of cells in columns two spaces apart, each line
// starting with indent and ending with a newline: the columns before
// rightFrom aligned left, the others right (numbers), trailing spaces
// trimmed. Widths count characters, not bytes ("±").
func Columns(cells [][]string, indent string, rightFrom int) string {
	var width []int
	for _, row := range cells {
		for j, s := range row {
			if j >= len(width) {
				width = append(width, 0)
			}
			width[j] = max(width[j], len([]rune(s)))
		}
	}
	var b strings.Builder
	for _, row := range cells {
		line := indent
		for j, s := range row {
			if j > 0 {
				line += "  "
			}
			pad := strings.Repeat(" ", width[j]-len([]rune(s)))
			if j < rightFrom {
				line += s + pad
			} else {
				line += pad + s
			}
		}
		b.WriteString(strings.TrimRight(line, " "))
		b.WriteByte('\n')
	}
	return b.String()
}
