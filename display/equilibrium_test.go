package display

import (
	"strings"
	"testing"

	"gonum.org/v1/gonum/mat"

	"lsys/lsys"
)

// x' = A x + B u with A = [[0, 1], [0, -2]], B = [0, 1], u = 0: at rest
// wherever x2 = 0, a family along (1, 0) (J = A has rank 1, singular
// values sqrt(5) = 2.236 and 0, common practice).
func TestEquilibriumDisplay(t *testing.T) {
	g, err := lsys.NewSystem(2, 1, 0, mat.NewDense(2, 2, []float64{0, 1, 0, -2}), mat.NewDense(2, 1, []float64{0, 1}), nil, nil, 0)
	if err != nil {
		t.Fatal(err)
	}
	e, err := lsys.LinearEquilibrium(g, []float64{0})
	if err != nil {
		t.Fatal(err)
	}
	b := Render(e, Options{})
	want := "equilibrium after 1 Newton steps, residual 0\n" +
		"states: {x1: 0, x2: 0}\ninputs: {u1: 0}\n" +
		"not unique: the Jacobian df/dx here has rank 1 of 2 (singular values at or below 1e-12 x the largest, 2.24, count as zero), " +
		"so this is one member of a family of steady states; to first order the states can move along 1 direction and stay at rest:\n" +
		"  free direction 1: {x1: 1, x2: 0}\nOf the family, the state of least norm is given."
	if got := b.Data[Text]; got != want {
		t.Errorf("text:\n%s\nwant:\n%s", got, want)
	}
	h, _ := b.Data[HTML].(string)
	for _, s := range []string{"one of a family (the Jacobian df/dx has rank 1 of 2)", ">free direction 1</th>", ">x1</td>", "state of least norm"} {
		if !strings.Contains(h, s) {
			t.Errorf("HTML lacks %q", s)
		}
	}
	if j, _ := b.Data[JSON].(map[string]any); j["unique"] != false || j["rank"] != 1 {
		t.Errorf("JSON %v", j)
	}
}
