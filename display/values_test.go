package display

import (
	"fmt"
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

// TestLargeMatrixSummary: a matrix beyond MaxListed rows or columns shows
// its size, a summary and its corners, not every entry (identity(1000) was
// 97 MB of output). Closed forms for the identity: Frobenius norm
// sqrt(1000), n nonzeros, symmetric; rank 300 and condition 1 for a
// 300 x 300 one.
func TestLargeMatrixSummary(t *testing.T) {
	for _, n := range []int{300, 1000} {
		a := mat.NewDense(n, n, nil)
		for i := 0; i < n; i++ {
			a.Set(i, i, 1)
		}
		b := Render(a, Options{})
		total := 0
		for _, v := range b.Data {
			if s, ok := v.(string); ok {
				total += len(s)
			}
		}
		if total > 20000 {
			t.Errorf("identity(%d): %d bytes of output, want a summary under 20 KB", n, total)
		}
		text := b.Data[Text].(string)
		for _, want := range []string{fmt.Sprintf("%dx%d matrix", n, n), fmt.Sprintf("%d of %d entries nonzero", n, n*n), "symmetric", "M[1:10, 1:10]"} {
			if !strings.Contains(text, want) {
				t.Errorf("identity(%d): text lacks %q:\n%s", n, want, text)
			}
		}
		if n == 300 && !strings.Contains(text, "rank 300") {
			t.Errorf("identity(300): rank not 300:\n%s", text)
		}
	}
}

// TestBundleCap: no display exceeds MaxBundle; what is held back is said.
func TestBundleCap(t *testing.T) {
	long := strings.Repeat("0123456789\n", 400000) // 4.4 MB of text
	b := Render(long, Options{})
	if n := len(b.Data[Text].(string)); n > MaxBundle {
		t.Errorf("text of %d bytes, over the cap %d", n, MaxBundle)
	}
	if !strings.Contains(b.Data[Text].(string), "output held back") {
		t.Error("no note of what was held back")
	}
}
