package lsys

import (
	"testing"

	"gonum.org/v1/gonum/mat"
)

// The stability verdict a system carries is StabilityOf's, computed once:
// names do not change it, and a deep copy that is then changed gets its own.
func TestStabilityCarried(t *testing.T) {
	g, err := FromMatrices(mat.NewDense(2, 2, []float64{0, 1, -4, -0.4}), mat.NewDense(2, 1, []float64{0, 1}), nil, nil, 0)
	if err != nil {
		t.Fatal(err)
	}
	want, _ := StabilityOf(g)
	if got, _ := g.Stability(); got != want || !got.Stable {
		t.Fatalf("Stability %+v, StabilityOf %+v", got, want)
	}
	named, err := g.WithNames([]string{"angle", "rate"}, nil, nil)
	if err != nil {
		t.Fatal(err)
	}
	if got, _ := named.Stability(); got != want {
		t.Errorf("renamed: %+v, want %+v", got, want)
	}
	c := g.Copy()
	c.A.Set(1, 1, 0.4) // now unstable
	if got, _ := c.Stability(); got.Stable || got.Unstable != 2 {
		t.Errorf("changed copy: %+v, want 2 unstable poles", got)
	}
	if got, _ := g.Stability(); !got.Stable {
		t.Errorf("the original changed with its copy: %+v", got)
	}
}
