package lsys

import (
	"context"
	"math"
	"testing"

	"gonum.org/v1/gonum/mat"
)

func TestByModeSumsAndFirstOrderParts(t *testing.T) {
	// 1/((s+1)(s+3)) = 0.5/(s+1) - 0.5/(s+3) (partial fractions, by hand):
	// the step parts are 0.5(1 - e^{-t}) and -(0.5/3)(1 - e^{-3t}).
	g := siso(t, []float64{1}, []float64{3, 4, 1})
	mr, err := ByMode(context.Background(), g, "step", nil, nil, ResponseOptions{Until: 5, Step: 0.01})
	if err != nil {
		t.Fatal(err)
	}
	if len(mr.Parts) != 2 {
		t.Fatalf("%d parts, want 2", len(mr.Parts))
	}
	worst := 0.0
	for k, tk := range mr.Response.T {
		var sum float64
		for q := range mr.Parts {
			sum += mr.Parts[q][0][0][k]
			want := 0.5 * (1 - math.Exp(-tk))
			if math.Abs(real(mr.Values[q])+3) < 1e-9 {
				want = -0.5 / 3 * (1 - math.Exp(-3*tk))
			}
			worst = math.Max(worst, math.Abs(mr.Parts[q][0][0][k]-want))
		}
		worst = math.Max(worst, math.Abs(sum-mr.Response.Y[0][0][k]))
	}
	if worst > 1e-12 {
		t.Errorf("worst error %g", worst)
	}
	// Oscillatory pair plus a real mode with feedthrough: parts still sum.
	s, _ := Stack(secondOrder(0.1, 4), siso(t, []float64{3, 1}, []float64{1, 1}))
	one, _ := NewSystem(0, 2, 1, nil, nil, nil, mat.NewDense(1, 2, []float64{1, 1}), 0)
	sum, _ := Series(one, s)
	mr, err = ByMode(context.Background(), sum, "step", nil, nil, ResponseOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if len(mr.Labels) != 3 || mr.Labels[2] != "direct" {
		t.Fatalf("labels %v", mr.Labels)
	}
	worst = 0
	for c := 0; c < 2; c++ {
		for k := range mr.Response.T {
			var acc float64
			for q := range mr.Parts {
				acc += mr.Parts[q][0][c][k]
			}
			worst = math.Max(worst, math.Abs(acc-mr.Response.Y[0][c][k]))
		}
	}
	if worst > 1e-12 {
		t.Errorf("sum error %g", worst)
	}
	// A Jordan block is refused.
	jb, _ := FromMatrices(mat.NewDense(2, 2, []float64{-1, 1, 0, -1}), mat.NewDense(2, 1, []float64{0, 1}), mat.NewDense(1, 2, []float64{1, 0}), nil, 0)
	if _, err := ByMode(context.Background(), jb, "step", nil, nil, ResponseOptions{}); err == nil {
		t.Error("defective system split")
	}
}
