package display

import (
	"testing"

	"lsys/lsys"
)

func TestRationalDisplay(t *testing.T) {
	cases := []struct {
		r         *lsys.Rational
		text, tex string
	}{
		{&lsys.Rational{Num: lsys.Poly{5}, Den: lsys.Poly{5, 2, 1}}, "5 / (s^2 + 2*s + 5)", `$$\frac{5}{s^{2} + 2\,s + 5}$$`},
		{&lsys.Rational{Num: lsys.Poly{-0.05, 0.1}, Den: lsys.Poly{0.5, -1.2, 1}, Ts: 0.01},
			"(0.1*z - 0.05) / (z^2 - 1.2*z + 0.5)", `$$\frac{0.1\,z - 0.05}{z^{2} - 1.2\,z + 0.5}\qquad T = 0.01\,\mathrm{s}$$`},
		{&lsys.Rational{Num: lsys.Poly{0, -2e-7}, Den: lsys.Poly{1}}, "-2e-07*s", `$$-2\cdot 10^{-7}\,s$$`},
	}
	for _, c := range cases {
		b := Render(c.r, Options{})
		if b.Data[Text] != c.text || b.Data[LaTeX] != c.tex {
			t.Errorf("got %q / %q\nwant %q / %q", b.Data[Text], b.Data[LaTeX], c.text, c.tex)
		}
	}
}
