package display

import (
	"context"
	"reflect"
	"strings"
	"testing"

	"gonum.org/v1/gonum/mat"

	"lsys/lsys"
)

// Every design result renders, twice to the same bytes, with the figures
// that matter in its text.
func TestDesignDisplays(t *testing.T) {
	ctx := context.Background()
	g, err := lsys.NewSystem(4, 1, 1,
		mat.NewDense(4, 4, []float64{-1, 1, 0, 0, 0, -2, 1, 0, 0, 0, -5, 1, 0, 0, 0, -20}),
		mat.NewDense(4, 1, []float64{0, 0, 0, 20}), mat.NewDense(1, 4, []float64{1, 0, 0, 0}), nil, 0)
	if err != nil {
		t.Fatal(err)
	}
	must := func(v any, err error) any {
		t.Helper()
		if err != nil {
			t.Fatal(err)
		}
		return v
	}
	I := mat.NewDense(4, 4, []float64{1, 0, 0, 0, 0, 1, 0, 0, 0, 0, 1, 0, 0, 0, 0, 1})
	one := mat.NewDense(1, 1, []float64{1})
	cases := []struct {
		v    any
		frag string
	}{
		{must(lsys.LyapunovEq(g.A, I, false)), "residual"},
		{must(lsys.CARE(g.A, g.B, I, one, nil)), "closed loop A - B K"},
		{must(lsys.GramiansOf(g)), "Hankel singular values"},
		{must(lsys.Hankel(g)), "0.06379"},
		{must(lsys.BalancedOf(g)), "condition of T"},
		{must(lsys.Reduce(ctx, g, lsys.ReduceOptions{Order: 2})), "error bound"},
		{must(lsys.HinfNorm(g)), "H-infinity norm"},
		{must(lsys.H2Norm(g)), "H2 norm"},
		{must(lsys.LQ(g, I, one, nil)), "LQ regulator"},
		{must(lsys.Kalman(g, one, one)), "Kalman estimator"},
		{must(lsys.Assign(g, []complex128{-1, -2, -3, -4}, false)), "asked for"},
		{must(lsys.NoiseResponse(ctx, g, one)), "RMS"},
	}
	for _, c := range cases {
		a, b := Render(c.v, Options{}), Render(c.v, Options{})
		if !reflect.DeepEqual(a, b) {
			t.Errorf("%T: two renderings differ", c.v)
		}
		text, _ := a.Data[Text].(string)
		if !strings.Contains(text, c.frag) {
			t.Errorf("%T: text lacks %q:\n%s", c.v, c.frag, text)
		}
		if _, ok := a.Data[JSON]; !ok {
			t.Errorf("%T: no JSON", c.v)
		}
	}
}
