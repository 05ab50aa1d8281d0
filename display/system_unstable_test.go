package display

import (
	"strings"
	"testing"

	"gonum.org/v1/gonum/mat"

	"lsys/lsys"
)

// Issue 15, friction 6: the card says how many poles are in the right
// half-plane, how many on the axis, and which are in Jordan blocks. A =
// diag(J2(0), 2): a double integrator (one Jordan block of 2 at 0) and a
// pole at 2 (by construction).
func TestSystemCardSaysWhereUnstablePolesAre(t *testing.T) {
	A := mat.NewDense(3, 3, []float64{0, 1, 0, 0, 0, 0, 0, 0, 2})
	s, err := lsys.FromMatrices(A, mat.NewDense(3, 1, []float64{0, 0, 1}), mat.NewDense(1, 3, []float64{1, 0, 0}), nil, 0)
	if err != nil {
		t.Fatal(err)
	}
	got := sxStability(s)
	for _, want := range []string{"1 pole in the right half-plane", "2 on the imaginary axis", "2 of them in Jordan blocks", "0 (block of 2)"} {
		if !strings.Contains(got, want) {
			t.Errorf("%q lacks %q", got, want)
		}
	}
	Ad := mat.NewDense(2, 2, []float64{1.5, 0, 0, 0.5})
	sd, err := lsys.FromMatrices(Ad, mat.NewDense(2, 1, []float64{1, 1}), mat.NewDense(1, 2, []float64{1, 1}), nil, 0.1)
	if err != nil {
		t.Fatal(err)
	}
	if got := sxStability(sd); got != "unstable: 1 pole outside the unit circle" {
		t.Errorf("sampled: %q", got)
	}
}
