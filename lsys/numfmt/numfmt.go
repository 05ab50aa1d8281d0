// Package numfmt writes numbers as the language prints them: up to 10
// significant digits, "inf", "nan", no "-0". It is the one owner of that
// form, shared by the language (print, records) and display (the text of
// results that quote such values), so the two never drift apart.
package numfmt

import (
	"math"
	"math/cmplx"
	"strconv"
)

// Number writes a real number with up to 10 significant digits.
func Number(v float64) string {
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
	return strconv.FormatFloat(v, 'g', 10, 64)
}

// Complex writes a + bj (or a - bj); a real value as a real number.
func Complex(c complex128) string {
	re, im := real(c), imag(c)
	if cmplx.IsNaN(c) {
		return "nan"
	}
	if im == 0 {
		return Number(re)
	}
	if re == 0 {
		return Number(im) + "j"
	}
	sign := " + "
	if im < 0 || (im == 0 && math.Signbit(im)) {
		sign = " - "
		im = -im
	}
	return Number(re) + sign + Number(im) + "j"
}
