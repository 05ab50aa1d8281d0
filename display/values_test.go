package display

import (
	"strings"
	"testing"

	"gonum.org/v1/gonum/mat"
)

func TestPlainValues(t *testing.T) {
	cases := []struct {
		v    any
		text string
	}{
		{3.0, "3"},
		{1.0 / 3, "0.3333333333"},
		{-0.0, "0"},
		{complex(-1, 2), "-1 + 2j"},
		{complex(0, -2), "-2j"},
		{true, "true"},
		{"hello", "hello"},
		{mat.NewDense(2, 2, []float64{1, -2.5, 0, 1e-7}), "2x2 matrix\n  1   -2.5\n  0  1e-07"},
		{mat.NewDense(2, 1, []float64{1, 2}), "2x1 column vector\n  1\n  2"},
		{mat.NewCDense(1, 2, []complex128{1 + 2i, 3}), "1x2 complex row vector\n  1 + 2j  3"},
	}
	for _, c := range cases {
		b := Render(c.v, Options{})
		if got := b.Data[Text]; got != c.text {
			t.Errorf("%#v: text %q, want %q", c.v, got, c.text)
		}
	}
	b := Render(mat.NewDense(1, 2, []float64{1.5e-7, 2}), Options{})
	if l := b.Data[LaTeX].(string); !strings.Contains(l, `1.5\cdot 10^{-7} & 2`) {
		t.Errorf("latex %q", l)
	}
	if h := b.Data[HTML].(string); !strings.Contains(h, "<table") || strings.Count(h, "<tr>") != 2 {
		t.Errorf("html %q", h)
	}
}
