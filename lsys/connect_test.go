package lsys

import (
	"math"
	"math/cmplx"
	"strings"
	"testing"

	"gonum.org/v1/gonum/mat"
)

// tf builds a SISO rational function from ascending coefficients.
func tf(num, den []float64) *Rational { return &Rational{Num: num, Den: den} }

func siso(t *testing.T, num, den []float64) *System {
	t.Helper()
	s, err := Realize([][]*Rational{{tf(num, den)}}, 0)
	if err != nil {
		t.Fatal(err)
	}
	return s
}

func polyAt(p []float64, s complex128) complex128 {
	var acc complex128
	for i := len(p) - 1; i >= 0; i-- {
		acc = acc*s + complex(p[i], 0)
	}
	return acc
}

func ratAt(num, den []float64, s complex128) complex128 { return polyAt(num, s) / polyAt(den, s) }

// points where the tests compare transfer functions; none is a pole.
var testPoints = []complex128{0.3i, 1i, 2.5i, 10i, -0.7 + 1.3i, 4 - 2i}

func evalSys(t *testing.T, s *System, at complex128) []complex128 {
	t.Helper()
	h := newHessenberg(s)
	out := make([]complex128, s.P()*s.M())
	if err := h.at(at, out); err != nil {
		t.Fatalf("eval at %v: %v", at, err)
	}
	return out
}

func closeC(a, b complex128, tol float64) bool {
	return cmplx.Abs(a-b) <= tol*math.Max(1, cmplx.Abs(b))
}

func TestSeriesParallelCloseLoopClosedForms(t *testing.T) {
	g1 := siso(t, []float64{1}, []float64{1, 1}) // 1/(s+1)
	g2 := siso(t, []float64{1}, []float64{2, 1}) // 1/(s+2)
	ser, err := Series(g1, g2)
	if err != nil {
		t.Fatal(err)
	}
	par, err := Parallel(g1, g2, -1)
	if err != nil {
		t.Fatal(err)
	}
	// Closed forms (common practice, by hand): 1/(s+1) * 1/(s+2) and
	// 1/(s+1) - 1/(s+2), both equal to 1/((s+1)(s+2)).
	for _, s := range testPoints {
		want := ratAt([]float64{1}, []float64{2, 3, 1}, s)
		if got := evalSys(t, ser, s)[0]; !closeC(got, want, 1e-12) {
			t.Errorf("series at %v: got %v want %v", s, got, want)
		}
		if got := evalSys(t, par, s)[0]; !closeC(got, want, 1e-12) {
			t.Errorf("parallel at %v: got %v want %v", s, got, want)
		}
	}
	// Unity negative feedback around K/(s(s+1)) gives K/(s^2+s+K)
	// (common practice: T = L/(1+L)).
	K := 4.0
	L := siso(t, []float64{K}, []float64{0, 1, 1})
	one, _ := NewSystem(0, 1, 1, nil, nil, nil, mat.NewDense(1, 1, []float64{1}), 0)
	cl, err := CloseLoop(L, one, -1)
	if err != nil {
		t.Fatal(err)
	}
	pos, err := CloseLoop(L, one, +1)
	if err != nil {
		t.Fatal(err)
	}
	for _, s := range testPoints {
		if got, want := evalSys(t, cl, s)[0], ratAt([]float64{K}, []float64{K, 1, 1}, s); !closeC(got, want, 1e-12) {
			t.Errorf("feedback at %v: got %v want %v", s, got, want)
		}
		// positive feedback: L/(1-L) = K/(s^2+s-K)
		if got, want := evalSys(t, pos, s)[0], ratAt([]float64{K}, []float64{-K, 1, 1}, s); !closeC(got, want, 1e-12) {
			t.Errorf("positive feedback at %v: got %v want %v", s, got, want)
		}
	}
	// Static algebraic loop: 2/(1+2*1) = 2/3.
	two, _ := NewSystem(0, 1, 1, nil, nil, nil, mat.NewDense(1, 1, []float64{2}), 0)
	st, err := CloseLoop(two, one, -1)
	if err != nil {
		t.Fatal(err)
	}
	if got := st.D.At(0, 0); math.Abs(got-2.0/3) > 1e-15 {
		t.Errorf("static loop: got %v want 2/3", got)
	}
	// Ill-posed: 1 with positive unity feedback.
	if _, err := CloseLoop(one, one, +1); err == nil {
		t.Error("ill-posed algebraic loop accepted")
	}
}

func TestInterconnectionNamesAndShapes(t *testing.T) {
	g := siso(t, []float64{1}, []float64{1, 1})
	g, _ = g.WithNames([]string{"speed"}, []string{"torque"}, []string{"rate"})
	h, _ := g.WithNames(nil, []string{"cmd"}, []string{"torque"})
	s, err := Series(g, h)
	if err != nil {
		t.Fatal(err)
	}
	if s.InputNames[0] != "cmd" || s.OutputNames[0] != "rate" || s.StateNames[0] != "speed" || s.StateNames[1] != "speed_2" {
		t.Errorf("series names: %v %v %v", s.InputNames, s.OutputNames, s.StateNames)
	}
	st, err := Stack(g, g, h)
	if err != nil {
		t.Fatal(err)
	}
	if st.N() != 3 || st.M() != 3 || st.P() != 3 {
		t.Fatalf("stack dims %d %d %d", st.N(), st.M(), st.P())
	}
	if st.InputNames[1] != "torque_2" || st.OutputNames[2] != "torque" {
		t.Errorf("stack names %v %v", st.InputNames, st.OutputNames)
	}
	two := siso(t, []float64{1}, []float64{1, 1})
	two2, _ := Stack(two, two)
	if _, err := Series(g, two2); err == nil {
		t.Error("series with 2 outputs into 1 input accepted")
	}
	d := g.Copy()
	d.Ts = 0.1
	if _, err := Parallel(g, d, 1); err == nil {
		t.Error("parallel of continuous and sampled accepted")
	}
}

func TestWireByName(t *testing.T) {
	// plant: torque -> rate, controller: error -> torque, summing junction:
	// (ref, rate) -> error = ref - rate. Connecting by name must equal the
	// unity feedback loop around plant*controller.
	plant := siso(t, []float64{2}, []float64{0, 1, 1}) // 2/(s(s+1))
	plant, _ = plant.WithNames(nil, []string{"torque"}, []string{"rate"})
	ctrl := siso(t, []float64{3, 1}, []float64{5, 1}) // (s+3)/(s+5)
	ctrl, _ = ctrl.WithNames(nil, []string{"error"}, []string{"torque"})
	sum, _ := NewSystem(0, 2, 1, nil, nil, nil, mat.NewDense(1, 2, []float64{1, -1}), 0)
	sum, _ = sum.WithNames(nil, []string{"ref", "rate"}, []string{"error"})
	cl, err := Wire([]*System{plant, ctrl, sum}, []string{"rate"})
	if err != nil {
		t.Fatal(err)
	}
	if cl.M() != 1 || cl.InputNames[0] != "ref" || cl.P() != 1 {
		t.Fatalf("connect: inputs %v outputs %v", cl.InputNames, cl.OutputNames)
	}
	// L = 2(s+3)/(s(s+1)(s+5)); T = L/(1+L) (common practice).
	num := polyMul([]float64{2}, []float64{3, 1})
	den := polyMul([]float64{0, 1, 1}, []float64{5, 1})
	tden := make([]float64, len(den))
	copy(tden, den)
	for i, c := range num {
		tden[i] += c
	}
	for _, s := range testPoints {
		if got, want := evalSys(t, cl, s)[0], ratAt(num, tden, s); !closeC(got, want, 1e-11) {
			t.Errorf("connect at %v: got %v want %v", s, got, want)
		}
	}
	if _, err := Wire([]*System{plant, plant}, nil); err == nil {
		t.Error("two blocks producing the same output accepted")
	}
	if _, err := Wire([]*System{plant, ctrl, sum}, []string{"nope"}); err == nil {
		t.Error("unknown output name accepted")
	}
}

func TestCloseLoopMIMOAgainstFormula(t *testing.T) {
	// T = (I - sign G K)^{-1} G for 2x2 blocks with direct feedthrough
	// (common practice: the closed-loop transfer matrix with K in the
	// return path), compared at test points.
	G := randomStable(4, 3)
	G2, _ := FromMatrices(G.A, mat.NewDense(4, 2, []float64{1, 0, 0, 1, 1, 1, 0.5, -1}), mat.NewDense(2, 4, []float64{1, 0, 1, 0, 0, 1, 0, 1}), mat.NewDense(2, 2, []float64{0.1, 0, 0.2, 0.3}), 0)
	K, _ := FromMatrices(mat.NewDense(1, 1, []float64{-5}), mat.NewDense(1, 2, []float64{1, 2}), mat.NewDense(2, 1, []float64{3, -1}), mat.NewDense(2, 2, []float64{0.5, 0.1, 0, 0.4}), 0)
	for _, sign := range []float64{-1, 1} {
		cl, err := CloseLoop(G2, K, sign)
		if err != nil {
			t.Fatal(err)
		}
		for _, s := range testPoints {
			g, k, got := evalSys(t, G2, s), evalSys(t, K, s), evalSys(t, cl, s)
			// M = I - sign G K
			var M [4]complex128
			for i := 0; i < 2; i++ {
				for j := 0; j < 2; j++ {
					var acc complex128
					for l := 0; l < 2; l++ {
						acc += g[i*2+l] * k[l*2+j]
					}
					M[i*2+j] = -complex(sign, 0) * acc
					if i == j {
						M[i*2+j]++
					}
				}
			}
			det := M[0]*M[3] - M[1]*M[2]
			inv := [4]complex128{M[3] / det, -M[1] / det, -M[2] / det, M[0] / det}
			for i := 0; i < 2; i++ {
				for j := 0; j < 2; j++ {
					want := inv[i*2]*g[j] + inv[i*2+1]*g[2+j]
					if !closeC(got[i*2+j], want, 1e-11) {
						t.Errorf("sign %g at %v [%d,%d]: got %v want %v", sign, s, i, j, got[i*2+j], want)
					}
				}
			}
		}
	}
}

func TestWireSharedInputAndAllOutputs(t *testing.T) {
	// Two sensors read the same external signal "force"; with outputs nil
	// every block output is kept, in block order.
	a, _ := siso(t, []float64{1}, []float64{1, 1}).WithNames(nil, []string{"force"}, []string{"accel"})
	b, _ := siso(t, []float64{2}, []float64{3, 1}).WithNames(nil, []string{"force"}, []string{"strain"})
	c, err := Wire([]*System{a, b}, nil)
	if err != nil {
		t.Fatal(err)
	}
	if c.M() != 1 || c.InputNames[0] != "force" || c.P() != 2 || c.OutputNames[1] != "strain" {
		t.Fatalf("inputs %v outputs %v", c.InputNames, c.OutputNames)
	}
	for _, s := range testPoints {
		got := evalSys(t, c, s)
		if !closeC(got[0], 1/(s+1), 1e-13) || !closeC(got[1], 2/(s+3), 1e-13) {
			t.Errorf("at %v: %v", s, got)
		}
	}
}

func TestConnectionNames(t *testing.T) {
	// Our own naming rules (see connect.go): numbered in state order, the
	// sum of two different signals is a new signal, the closed loop's input
	// is the reference.
	a := siso(t, []float64{1}, []float64{0, 1})
	b := siso(t, []float64{1, 1}, []float64{10, 1})
	ab, _ := Series(a, b)
	abb, err := Series(ab, b)
	if err != nil {
		t.Fatal(err)
	}
	if got := strings.Join(abb.StateNames, ","); got != "x1,x1_2,x1_3" {
		t.Errorf("series states %s, want x1,x1_2,x1_3", got)
	}
	g := a.Copy()
	g.OutputNames = []string{"trolley"}
	h := b.Copy()
	h.OutputNames = []string{"sway"}
	sum, _ := Parallel(g, h, 1)
	if sum.OutputNames[0] != "y1" {
		t.Errorf("sum of trolley and sway named %q, want y1", sum.OutputNames[0])
	}
	h.OutputNames = []string{"trolley"}
	sum, _ = Parallel(g, h, 1)
	if sum.OutputNames[0] != "trolley" {
		t.Errorf("sum of two 'trolley' outputs named %q", sum.OutputNames[0])
	}
	g.InputNames = []string{"error"}
	cl, err := CloseLoop(g, nil1(t), -1)
	if err != nil {
		t.Fatal(err)
	}
	if cl.InputNames[0] != "r1" || cl.OutputNames[0] != "trolley" {
		t.Errorf("closed loop %v -> %v, want r1 -> trolley", cl.InputNames, cl.OutputNames)
	}
	// a user's own suffixed name without repeats stays as it is
	if got := unique([]string{"v_2", "v"}); got[0] != "v_2" || got[1] != "v" {
		t.Errorf("unique renamed %v", got)
	}
}

func nil1(t *testing.T) *System {
	t.Helper()
	s, err := NewSystem(0, 1, 1, nil, nil, nil, mat.NewDense(1, 1, []float64{1}), 0)
	if err != nil {
		t.Fatal(err)
	}
	return s
}
