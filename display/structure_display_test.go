package display

import (
	"encoding/json"
	"strings"
	"testing"

	"gonum.org/v1/gonum/mat"

	"lsys/lsys"
)

func sxTestSystem(t *testing.T) *lsys.System {
	t.Helper()
	// A mass-spring-damper, m = 2, c = 1.6, k = 8 (wn = 2, zeta = 0.2 by
	// Inman, Engineering Vibration, 2014, ch. 1).
	A := mat.NewDense(2, 2, []float64{0, 1, -4, -0.8})
	B := mat.NewDense(2, 1, []float64{0, 0.5})
	C := mat.NewDense(1, 2, []float64{1, 0})
	s, err := lsys.FromMatrices(A, B, C, nil, 0)
	if err != nil {
		t.Fatal(err)
	}
	s, err = s.WithNames([]string{"position", "velocity"}, []string{"force"}, []string{"position"})
	if err != nil {
		t.Fatal(err)
	}
	return s
}

func TestSystemCard(t *testing.T) {
	s := sxTestSystem(t)
	b := Render(s, Options{})
	txt := b.Data[Text].(string)
	for _, want := range []string{"continuous-time system: 2 states, 1 input, 1 output; stable", "velocity", "-0.8", "force"} {
		if !strings.Contains(txt, want) {
			t.Errorf("text lacks %q:\n%s", want, txt)
		}
	}
	h := b.Data[HTML].(string)
	if !strings.Contains(h, "lsys-system") || !strings.Contains(h, "lsys-equations") || !strings.Contains(h, "d/dt") {
		t.Errorf("html card incomplete: %s", h)
	}
	// The equations are HTML, typeset without MathJax, and carry the
	// matrices: no LaTeX and no second copy of A as a table in the card.
	if strings.Contains(h, "$$") || strings.Contains(h, `\begin`) || strings.Contains(h, "<caption") {
		t.Errorf("card has LaTeX or matrix tables beside its equations: %s", h)
	}
	if l, _ := b.Data[LaTeX].(string); !strings.Contains(l, `\frac{d}{dt}`) {
		t.Errorf("text/latex part lacks the equations: %q", l)
	}
	if _, err := json.Marshal(b.Data); err != nil {
		t.Fatal(err)
	}
	again := Render(s, Options{})
	for k, v := range b.Data {
		x, _ := json.Marshal(v)
		y, _ := json.Marshal(again.Data[k])
		if string(x) != string(y) {
			t.Errorf("%s differs between two renderings", k)
		}
	}
}

func TestSystemCardUnstableSampled(t *testing.T) {
	A := mat.NewDense(1, 1, []float64{1.5})
	s, err := lsys.FromMatrices(A, nil, nil, nil, 0.1)
	if err != nil {
		t.Fatal(err)
	}
	txt := Render(s, Options{}).Data[Text].(string)
	if !strings.Contains(txt, "sampled system, every 0.1 s") || !strings.Contains(txt, "unstable: 1 pole outside the unit circle") {
		t.Errorf("got:\n%s", txt)
	}
}

func TestModeTableDisplay(t *testing.T) {
	s := sxTestSystem(t)
	mt, err := lsys.Modes(s)
	if err != nil {
		t.Fatal(err)
	}
	b := Render(mt, Options{})
	txt := b.Data[Text].(string)
	for _, want := range []string{"1 mode", "-0.4 ± 1.96j", "0.2", "2.5", "yes"} {
		if !strings.Contains(txt, want) {
			t.Errorf("text lacks %q:\n%s", want, txt)
		}
	}
	if !strings.Contains(b.Data[HTML].(string), "<table") {
		t.Error("no html table")
	}
	if _, err := json.Marshal(b.Data); err != nil {
		t.Fatal(err)
	}
	x, _ := json.Marshal(b.Data)
	y, _ := json.Marshal(Render(mt, Options{}).Data)
	if string(x) != string(y) {
		t.Error("two renderings differ")
	}
}

func TestNumberFormat(t *testing.T) {
	cases := map[float64]string{0: "0", 1: "1", -0.8: "-0.8", 12345.678: "12346", 99999: "99999", 0.0012345: "0.001234", 2.5e-3: "0.0025", 1e-4: "1e-04", 1.5e-7: "1.5e-07", 1234567: "1.235e+06", 0.5: "0.5"}
	for v, want := range cases {
		if got := fmtNum(v); got != want {
			t.Errorf("fmtNum(%v) = %q, want %q", v, got, want)
		}
	}
}

func TestStructureRenderers(t *testing.T) {
	// diag(-1, -2, -3) with the middle mode not reached and the last not
	// seen (Hautus 1969): every report names them.
	A := mat.NewDense(3, 3, []float64{-1, 0, 0, 0, -2, 0, 0, 0, -3})
	B := mat.NewDense(3, 1, []float64{1, 0, 1})
	C := mat.NewDense(1, 3, []float64{1, 1, 0})
	s, err := lsys.FromMatrices(A, B, C, nil, 0)
	if err != nil {
		t.Fatal(err)
	}
	st, _ := lsys.StructureOf(s, 0)
	zs, _ := lsys.Zeros(s, 0)
	mf, _ := lsys.Modal(s)
	js, _ := lsys.Jordan(mat.NewDense(2, 2, []float64{-1, 1, 0, -1}), 0, 0)
	dec, _ := lsys.Decompose(s, 0)
	sub, _ := lsys.Reachable(s, 0)
	ic, _ := lsys.Invariant(A, mat.NewDense(3, 1, []float64{1, 0, 0}), 0)
	es, _ := lsys.Eigen(A)
	cases := []struct {
		v    any
		want []string
	}{
		{st, []string{"controllable", "NO", "-2", "Kalman parts", "neither"}},
		{zs, []string{"input-decoupling (not reached)", "-2", "-3"}},
		{mf, []string{"real modal form", "q1"}},
		{js, []string{"DEFECTIVE", "2"}},
		{dec, []string{"Kalman decomposition", "ro1"}},
		{sub, []string{"reachable subspace: dimension 2 of 3"}},
		{ic, []string{"is A-invariant"}},
		{es, []string{"eigen-structure", "condition"}},
	}
	for _, c := range cases {
		b := Render(c.v, Options{})
		txt := b.Data[Text].(string)
		for _, w := range c.want {
			if !strings.Contains(txt, w) {
				t.Errorf("%T: text lacks %q:\n%s", c.v, w, txt)
			}
		}
		if _, ok := b.Data[HTML].(string); !ok {
			t.Errorf("%T: no HTML", c.v)
		}
		x, err := json.Marshal(b.Data)
		if err != nil {
			t.Fatalf("%T: %v", c.v, err)
		}
		y, _ := json.Marshal(Render(c.v, Options{}).Data)
		if string(x) != string(y) {
			t.Errorf("%T: two renderings differ", c.v)
		}
	}
}

func TestSystemCardLarge(t *testing.T) {
	// A 40-state chain: the card stays small (no matrices, names elided).
	A := mat.NewDense(40, 40, nil)
	for i := 0; i < 40; i++ {
		A.Set(i, i, -1)
	}
	s, _ := lsys.FromMatrices(A, nil, nil, nil, 0)
	b := Render(s, Options{})
	txt := b.Data[Text].(string)
	if !strings.Contains(txt, "no source form above 16") || !strings.Contains(txt, "(27 more)") || len(txt) > 2000 {
		t.Errorf("large card (%d bytes):\n%s", len(txt), txt)
	}
}
