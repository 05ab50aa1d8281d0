package lsys

import (
	"context"
	"math"
	"strings"
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
	// A Jordan block stays one part: the whole response.
	jb, _ := FromMatrices(mat.NewDense(3, 3, []float64{-1, 1, 0, 0, -1, 0, 0, 0, -4}), mat.NewDense(3, 1, []float64{0, 1, 1}), mat.NewDense(1, 3, []float64{1, 0, 1}), nil, 0)
	mr, err = ByMode(context.Background(), jb, "step", nil, nil, ResponseOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if len(mr.Parts) != 2 {
		t.Fatalf("Jordan case: %d parts %v, want 2", len(mr.Parts), mr.Labels)
	}
	// parts: 1/(s+1)^2 and 1/(s+4) step responses (by hand):
	// 1 - (1+t)e^{-t} and (1 - e^{-4t})/4.
	worst = 0
	for k, tk := range mr.Response.T {
		a, b := 1-(1+tk)*math.Exp(-tk), (1-math.Exp(-4*tk))/4
		p0, p1 := mr.Parts[0][0][0][k], mr.Parts[1][0][0][k]
		if math.Abs(real(mr.Values[0])+4) < 1e-9 {
			p0, p1 = p1, p0
		}
		worst = math.Max(worst, math.Max(math.Abs(p0-a), math.Abs(p1-b)))
	}
	if worst > 1e-9 {
		t.Errorf("Jordan parts worst error %g (%v)", worst, mr.Labels)
	}
}

func TestByModeSampledImpulseWithFeedthrough(t *testing.T) {
	// A sampled unit-pulse response starts with D at k = 0; the direct
	// part must carry it so the parts still sum to the response.
	g := siso(t, []float64{1, 2}, []float64{3, 4, 1})
	d, err := Sample(g, 0.1, Bilinear, 0)
	if err != nil {
		t.Fatal(err)
	}
	mr, err := ByMode(context.Background(), d, "impulse", nil, nil, ResponseOptions{})
	if err != nil {
		t.Fatal(err)
	}
	worst := 0.0
	for k := range mr.Response.T {
		var acc float64
		for q := range mr.Parts {
			acc += mr.Parts[q][0][0][k]
		}
		worst = math.Max(worst, math.Abs(acc-mr.Response.Y[0][0][k]))
	}
	if worst > 1e-12 || mr.Labels[len(mr.Labels)-1] != "direct" {
		t.Errorf("sum error %g, labels %v", worst, mr.Labels)
	}
}

func TestByModeBadlyScaledCascade(t *testing.T) {
	// x3' = -1e4 x3 + u, x2' = -100 x2 + x3, x1' = -x1 + x2 + x3, y = x1:
	// G(s) = (s + 101)/((s + 1)(s + 100)(s + 1e4)) (by hand), whose
	// residues by the cover-up rule (Heaviside's partial fractions, common
	// practice) give the step parts r/lambda (e^{lambda t} - 1). The model is
	// handed over in coordinates scaled by 1, 1e4, 1e8, so A has entries
	// up to 1e8 as in a cascade of fast and slow sections; the split must
	// still give one part per mode.
	d := []float64{1, 1e4, 1e8}
	A0 := [][]float64{{-1, 1, 1}, {0, -100, 1}, {0, 0, -1e4}}
	A := mat.NewDense(3, 3, nil)
	for i := range 3 {
		for j := range 3 {
			A.Set(i, j, A0[i][j]*d[j]/d[i])
		}
	}
	B := mat.NewDense(3, 1, []float64{0, 0, 1 / d[2]})
	C := mat.NewDense(1, 3, []float64{d[0], 0, 0})
	g, err := FromMatrices(A, B, C, nil, 0)
	if err != nil {
		t.Fatal(err)
	}
	mr, err := ByMode(context.Background(), g, "step", nil, nil, ResponseOptions{Until: 0.01, Step: 1e-5})
	if err != nil {
		t.Fatal(err)
	}
	if len(mr.Parts) != 3 {
		t.Fatalf("%d parts %v, want 3 (note %q)", len(mr.Parts), mr.Labels, mr.Note)
	}
	if mr.MaxCond > 1e3 {
		t.Errorf("condition number %g after balancing, want below 1e3", mr.MaxCond)
	}
	res := map[float64]float64{
		-1:   100.0 / (99 * 9999),
		-100: 1 / (-99.0 * 9900),
		-1e4: -9899 / (-9999.0 * -9900),
	}
	worst := 0.0
	for q, v := range mr.Values {
		l := real(v)
		var r float64
		for k, rk := range res {
			if math.Abs(l-k) < 1e-6*math.Abs(k) {
				r = rk
			}
		}
		if r == 0 {
			t.Fatalf("unexpected eigenvalue %v", v)
		}
		for k, tk := range mr.Response.T {
			want := r / l * (math.Exp(l*tk) - 1)
			worst = math.Max(worst, math.Abs(mr.Parts[q][0][0][k]-want))
		}
	}
	if worst > 1e-12 {
		t.Errorf("worst part error %g", worst)
	}
}

func TestByModeSaysWhyItGroups(t *testing.T) {
	// A Jordan block of -1 (defective, so its modes cannot be split; any
	// textbook on the Jordan form) beside a simple mode at -10: two parts,
	// the block and -10, and the note names the defective eigenvalue.
	A := mat.NewDense(3, 3, []float64{-1, 1, 0, 0, -1, 0, 0, 0, -10})
	g, err := FromMatrices(A, mat.NewDense(3, 1, []float64{0, 1, 1}), mat.NewDense(1, 3, []float64{1, 0, 1}), nil, 0)
	if err != nil {
		t.Fatal(err)
	}
	mr, err := ByMode(context.Background(), g, "step", nil, nil, ResponseOptions{Until: 5, Step: 0.01})
	if err != nil {
		t.Fatal(err)
	}
	if len(mr.Parts) != 2 || !strings.HasPrefix(mr.Labels[0], "block") {
		t.Fatalf("parts %v", mr.Labels)
	}
	if !strings.Contains(mr.Note, "defective") || !strings.Contains(mr.Note, "balanced") {
		t.Errorf("note %q", mr.Note)
	}
}
