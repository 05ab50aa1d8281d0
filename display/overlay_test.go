package display

import (
	"context"
	"strings"
	"testing"

	"gonum.org/v1/gonum/mat"

	"lsys/lsys"
)

// Every kind of overlay draws one chart with a legend entry per result and
// says which colour and line style each result has.
func TestOverlayRender(t *testing.T) {
	mk := func(w, z float64) *lsys.System {
		s, err := lsys.FromMatrices(mat.NewDense(2, 2, []float64{0, 1, -w * w, -2 * z * w}), mat.NewDense(2, 1, []float64{0, w * w}), mat.NewDense(1, 2, []float64{1, 0}), nil, 0)
		if err != nil {
			t.Fatal(err)
		}
		return s
	}
	a, b := mk(2, 0.2), mk(3, 0.5)
	ctx := context.Background()
	ra, _ := lsys.Step(ctx, a, lsys.ResponseOptions{})
	rb, _ := lsys.Step(ctx, b, lsys.ResponseOptions{})
	fa, _ := lsys.Frequency(ctx, a, lsys.FrequencyOptions{})
	fb, _ := lsys.Frequency(ctx, b, lsys.FrequencyOptions{})
	pa, _ := lsys.PoleZero(a, nil, true)
	pb, _ := lsys.PoleZero(b, nil, true)
	for _, items := range [][]any{{ra, rb}, {fa, fb}, {&lsys.PolarChart{Frequency: fa}, &lsys.PolarChart{Frequency: fb}}, {pa, pb}} {
		o, err := lsys.NewOverlay([]string{"before", "after"}, items)
		if err != nil {
			t.Fatal(err)
		}
		bd := Render(o, Options{})
		svg, _ := bd.Data[SVG].(string)
		txt := bd.Data[Text].(string)
		if !strings.Contains(svg, ">before") || !strings.Contains(svg, ">after") {
			t.Errorf("%T: legend lacks the names", items[0])
		}
		if !strings.Contains(txt, "before (blue, solid)") || !strings.Contains(txt, "after (vermillion, dashed)") {
			t.Errorf("%T: text does not say the styles:\n%s", items[0], txt)
		}
		if again := Render(o, Options{}); again.Data[SVG] != bd.Data[SVG] {
			t.Errorf("%T: two renderings differ", items[0])
		}
	}
}
