package display

import (
	"context"
	"reflect"
	"strings"
	"testing"

	"gonum.org/v1/gonum/mat"

	"lsys/lsys"
)

func soTestModel(t *testing.T) *lsys.SecondOrder {
	t.Helper()
	M := mat.NewDense(3, 3, []float64{2000, 0, 0, 0, 2000, 0, 0, 0, 1500})
	K := mat.NewDense(3, 3, []float64{6e6, -3e6, 0, -3e6, 5e6, -2e6, 0, -2e6, 2e6})
	F := mat.NewDense(3, 1, []float64{0, 0, 1})
	s, err := lsys.NewSecondOrder(M, nil, K, F, mat.NewDense(1, 3, []float64{0, 0, 1}), nil)
	if err != nil {
		t.Fatal(err)
	}
	if s, err = s.WithRayleigh(12, 0.02, 60, 0.03); err != nil {
		t.Fatal(err)
	}
	return s
}

// Every structural display renders, twice to the same bytes, with the
// figures it promises.
func TestStructuresDisplays(t *testing.T) {
	s := soTestModel(t)
	R := mat.NewDense(3, 1, []float64{1, 1, 1})
	sm, err := lsys.StructuralModesOf(s, R, []string{"x"})
	if err != nil {
		t.Fatal(err)
	}
	mac, err := lsys.MAC(sm.Shapes, sm.Shapes)
	if err != nil {
		t.Fatal(err)
	}
	mm, err := lsys.NewModalModel(context.Background(), s, 2, true)
	if err != nil {
		t.Fatal(err)
	}
	line, err := lsys.NewShapePlot(sm, []int{0, 1}, nil, nil, [2]int{})
	if err != nil {
		t.Fatal(err)
	}
	K, M, err := lsys.SpringLattice([]int{6, 4}, 1, 1, true)
	if err != nil {
		t.Fatal(err)
	}
	lm, err := lsys.SparseModes(context.Background(), K, M, lsys.SparseModeOptions{Count: 3})
	if err != nil {
		t.Fatal(err)
	}
	grid, err := lsys.NewShapePlot(lm, nil, nil, nil, [2]int{6, 4})
	if err != nil {
		t.Fatal(err)
	}
	for _, c := range []struct {
		v     any
		mime  string
		wants []string
	}{
		{s, HTML, []string{"3 degrees of freedom", "Rayleigh", "alpha"}},
		{sm, HTML, []string{"f Hz", "w rad/s", "eff. mass x", "cum. x", "90 %", "Rayleigh"}},
		{&lsys.MACMatrix{Values: mac, Rows: []string{"1", "2", "3"}, Cols: []string{"a", "b", "c"}}, HTML, []string{"1.000", "background:#"}},
		{mm, HTML, []string{"data:image/svg+xml;base64,", "static correction", "largest error"}},
		{line, SVG, []string{"<svg", "mode 1"}},
		{grid, SVG, []string{"<svg"}},
		{lm, Text, []string{"Sparse path", "Memory held"}},
		{K, Text, []string{"sparse symmetric matrix 24 x 24"}},
	} {
		a, b := Render(c.v, Options{}), Render(c.v, Options{})
		if !reflect.DeepEqual(a, b) {
			t.Errorf("%T: two renderings differ", c.v)
		}
		got, _ := a.Data[c.mime].(string)
		for _, w := range c.wants {
			if !strings.Contains(got, w) {
				t.Errorf("%T %s lacks %q:\n%.600s", c.v, c.mime, w, got)
			}
		}
	}
}
