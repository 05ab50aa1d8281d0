package lsys

import (
	"math"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/mat"
)

func polyNear(t *testing.T, what string, got Poly, want []float64, tol float64) {
	t.Helper()
	g := got.Trim()
	if len(g) != len(want) {
		t.Errorf("%s: %v, want %v", what, got, want)
		return
	}
	for i := range want {
		if math.Abs(g[i]-want[i]) > tol*math.Max(1, math.Abs(want[i])) {
			t.Errorf("%s: %v, want %v", what, got, want)
			return
		}
	}
}

func TestTransferFunctions(t *testing.T) {
	// Controllable canonical form of (s + 2)/(s^2 + 4s + 3) read back
	// (closed form), and with D = 1 and C = [2, -1]:
	// 1 + (2 - s)/(s^2 + 4s + 3) = (s^2 + 3s + 5)/(s^2 + 4s + 3).
	A := mat.NewDense(2, 2, []float64{0, 1, -3, -4})
	B := mat.NewDense(2, 1, []float64{0, 1})
	s, _ := FromMatrices(A, B, mat.NewDense(1, 2, []float64{2, 1}), nil, 0)
	rng := rand.New(rand.NewPCG(5, 1))
	s, _ = Transform(s, randDense(rng, 2, 2))
	tf, err := TransferFunctions(s, 0)
	if err != nil {
		t.Fatal(err)
	}
	polyNear(t, "num", tf[0][0].Num, []float64{2, 1}, 1e-12)
	polyNear(t, "den", tf[0][0].Den, []float64{3, 4, 1}, 1e-12)
	s2, _ := FromMatrices(A, B, mat.NewDense(1, 2, []float64{2, -1}), mat.NewDense(1, 1, []float64{1}), 0)
	tf2, _ := TransferFunctions(s2, 0)
	polyNear(t, "num", tf2[0][0].Num, []float64{5, 3, 1}, 1e-12)
	// MIMO: [[1/(s+1), 2/(s+3)], [1/(s+1), 1/(s+1)]]; each channel is
	// first order after cancelling what it does not see.
	Am := mat.NewDense(3, 3, []float64{-1, 0, 0, 0, -3, 0, 0, 0, -1})
	Bm := mat.NewDense(3, 2, []float64{1, 0, 0, 2, 0, 1})
	Cm := mat.NewDense(2, 3, []float64{1, 1, 0, 1, 0, 1})
	sm, _ := FromMatrices(Am, Bm, Cm, nil, 0)
	tfm, err := TransferFunctions(sm, 0)
	if err != nil {
		t.Fatal(err)
	}
	want := [2][2][2][]float64{
		{{{1}, {1, 1}}, {{2}, {3, 1}}},
		{{{1}, {1, 1}}, {{1}, {1, 1}}},
	}
	for i := 0; i < 2; i++ {
		for j := 0; j < 2; j++ {
			polyNear(t, "mimo num", tfm[i][j].Num, want[i][j][0], 1e-12)
			polyNear(t, "mimo den", tfm[i][j].Den, want[i][j][1], 1e-12)
		}
	}
	// Sampled: x[k+1] = 0.5 x[k] + u[k], y = x: 1/(z - 0.5).
	sd, _ := FromMatrices(mat.NewDense(1, 1, []float64{0.5}), mat.NewDense(1, 1, []float64{1}), nil, nil, 0.1)
	tfd, _ := TransferFunctions(sd, 0)
	polyNear(t, "sampled den", tfd[0][0].Den, []float64{-0.5, 1}, 1e-14)
	if tfd[0][0].Ts != 0.1 {
		t.Errorf("sample time %v", tfd[0][0].Ts)
	}
}
