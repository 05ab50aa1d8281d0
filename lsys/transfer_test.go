package lsys

import (
	"math"
	"math/rand/v2"
	"strings"
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

// craneModel is a trolley (mass M, drag ct) carrying a load (mass m) on a
// cable of length L with rope damping cp, linearized about the hanging
// position: states x, v, theta, omega; input the force on the trolley;
// outputs the trolley position and the sway angle. Equations of the
// trolley-pendulum pair (Lagrange, small angles).
func craneModel(t *testing.T) *System {
	t.Helper()
	M, m, L, g, ct, cp := 1000.0, 2000.0, 8.0, 9.81, 200.0, 500.0
	A := mat.NewDense(4, 4, []float64{0, 1, 0, 0,
		0, -ct / M, m * g / M, cp / (M * L),
		0, 0, 0, 1,
		0, ct / (M * L), -(m*g/M + g) / L, -cp/(M*L*L) - cp/(m*L*L)})
	B := mat.NewDense(4, 1, []float64{0, 1 / M, 0, -1 / (M * L)})
	C := mat.NewDense(2, 4, []float64{1, 0, 0, 0, 0, 0, 1, 0})
	s, err := FromMatrices(A, B, C, nil, 0)
	if err != nil {
		t.Fatal(err)
	}
	return s
}

func relCoeffs(t *testing.T, what string, got Poly, want []float64, rel float64) float64 {
	t.Helper()
	g := got.Trim()
	if len(g) != len(want) {
		t.Errorf("%s: %v, want %v", what, got, want)
		return math.Inf(1)
	}
	worst := 0.0
	for i := range want {
		var e float64
		if want[i] == 0 {
			if g[i] != 0 {
				e = math.Inf(1)
			}
		} else {
			e = math.Abs(g[i]-want[i]) / math.Abs(want[i])
		}
		worst = math.Max(worst, e)
	}
	if worst > rel {
		t.Errorf("%s: %v, want %v (worst relative error %.3g > %.3g)", what, got, want, worst, rel)
	}
	return worst
}

func TestTransferExactZerosAndDigits(t *testing.T) {
	// Closed form for the crane (M = 1000, m = 2000, L = 8, g = 9.81,
	// ct = 200, cp = 500), derived from the model's equations by Cramer's
	// rule: with den(s) = s (s^3 + a2 s^2 + a1 s + a0),
	// a2 = ct/M + cp (M + m)/(M m L^2) = 0.21171875,
	// a1 = g (M + m)/(M L) + ct cp/(M m L^2) = 3.67953125,
	// a0 = ct g/(M L) = 0.24525,
	// trolley/force = (s^2/M + cp/(M m L^2) s + g/(M L)) / den
	//               = (0.001 s^2 + 3.90625e-6 s + 0.00122625) / den,
	// sway/force = -(1/(M L)) s^2 / den = -0.000125 s / (den/s).
	// The rigid-body pole s = 0 and the zero of the sway channel at s = 0
	// are exact: their coefficients must be exactly 0, not rounding residue.
	G := craneModel(t)
	den := []float64{0, 0.24525, 3.67953125, 0.21171875, 1}
	tf, err := TransferFunctions(G, 0)
	if err != nil {
		t.Fatal(err)
	}
	// The s coefficient is 300 x smaller than the others, so rounding of
	// size u times the largest weighs 300 x more in its own relative error
	// (1.2e-12 with the LAPACK backend's eigenvalues): 1e-11 for this one.
	relCoeffs(t, "trolley num", tf[0][0].Num, []float64{0.00122625, 3.90625e-6, 0.001}, 1e-11)
	relCoeffs(t, "trolley den", tf[0][0].Den, den, 1e-12)
	relCoeffs(t, "sway num", tf[1][0].Num, []float64{0, -0.000125}, 1e-12)
	relCoeffs(t, "sway den", tf[1][0].Den, den[1:], 1e-12)
	p, err := Poles(G)
	if err != nil {
		t.Fatal(err)
	}
	if p[0] != 0 {
		t.Errorf("the rigid-body pole is %v, want exactly 0", p[0])
	}
	// The load position x + L theta is the parallel connection of the two
	// channels: its s^2 terms cancel exactly, leaving
	// (cp/(M m L^2) s + g/(M L)) / den = (3.90625e-6 s + 0.00122625) / den.
	// Through the 8-state parallel connection and its minimal realization
	// the coefficients must keep their digits (they lost 1.5e-8 when the
	// gain was matched far beyond the poles).
	A := mat.NewDense(8, 8, nil)
	A.Slice(0, 4, 0, 4).(*mat.Dense).Copy(G.A)
	A.Slice(4, 8, 4, 8).(*mat.Dense).Copy(G.A)
	B := mat.NewDense(8, 1, nil)
	C := mat.NewDense(1, 8, nil)
	for i := 0; i < 4; i++ {
		B.Set(i, 0, G.B.At(i, 0))
		B.Set(4+i, 0, G.B.At(i, 0))
		C.Set(0, i, G.C.At(0, i))
		C.Set(0, 4+i, 8*G.C.At(1, i))
	}
	par, _ := FromMatrices(A, B, C, nil, 0)
	mr, err := Minimal(par, 0)
	if err != nil {
		t.Fatal(err)
	}
	if mr.N() != 4 {
		t.Fatalf("minimal realization has %d states, want 4", mr.N())
	}
	tfl, err := TransferFunctions(mr, 0)
	if err != nil {
		t.Fatal(err)
	}
	e1 := relCoeffs(t, "load num", tfl[0][0].Num, []float64{0.00122625, 3.90625e-6}, 1e-12)
	e2 := relCoeffs(t, "load den", tfl[0][0].Den, den, 1e-12)
	t.Logf("load position: worst relative coefficient error num %.2g, den %.2g", e1, e2)
}

// TestTransferCoefficientsOfWideSpectra: the denominator of a diagonal
// system is prod (s + p_i) exactly (closed form). With poles 1 .. 1e5 its
// coefficients span 1e15; the leading 1 must stay (a residue test relative
// to the largest coefficient once dropped it). With poles 1 .. 20 the
// coefficients cannot carry the roots (Wilkinson 1963, Rounding Errors in
// Algebraic Processes, ch. 2), and the transfer function says so.
func TestTransferCoefficientsOfWideSpectra(t *testing.T) {
	diag := func(poles []float64) *System {
		n := len(poles)
		A := mat.NewDense(n, n, nil)
		B := mat.NewDense(n, 1, nil)
		C := mat.NewDense(1, n, nil)
		for i, p := range poles {
			A.Set(i, i, -p)
			B.Set(i, 0, 1)
			C.Set(0, i, 1)
		}
		s, err := NewSystem(n, 1, 1, A, B, C, nil, 0)
		if err != nil {
			t.Fatal(err)
		}
		return s
	}
	wide := []float64{1, 10, 100, 1e3, 1e4, 1e5}
	tf, err := TransferFunctions(diag(wide), 0)
	if err != nil {
		t.Fatal(err)
	}
	den := tf[0][0].Den.Trim()
	if len(den) != 7 || den[6] != 1 {
		t.Fatalf("denominator %v, want degree 6 with leading 1", den)
	}
	if want := 1e15; math.Abs(den[0]-want) > 1e-12*want {
		t.Errorf("constant coefficient %v, want %v", den[0], want)
	}
	if tf[0][0].Note != "" {
		t.Errorf("well-separated poles got a note: %q", tf[0][0].Note)
	}
	var w []float64
	for k := 1; k <= 20; k++ {
		w = append(w, float64(k))
	}
	tf, err = TransferFunctions(diag(w), 0)
	if err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(tf[0][0].Note, "do not carry its poles") {
		t.Errorf("no note for poles 1..20: %q", tf[0][0].Note)
	}
}
