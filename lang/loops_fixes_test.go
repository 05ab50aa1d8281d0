package lang_test

import (
	"context"
	"testing"

	"lsys/lang"
	"lsys/lang/builtins"
	"lsys/lang/langtest"
)

// Issue 15, friction 1: P * 3000/(0.005*s + 1) groups as (P*3000)/(...)
// and means P * (3000/(0.005 s + 1)): 3000/(0.005 s + 1) = 600000/(s + 200),
// times 1/(s^2 + 0.4 s + 4) (by hand).
func TestSystemDividedByTransferFunction(t *testing.T) {
	const p = "P = system([[0, 1], [-4, -0.4]], [0, 1], [1, 0])\n"
	langtest.RunCells(t, []langtest.Cell{
		{Src: p + "transfer(P * 3000/(0.005*s + 1))", Want: "600000 / (s^3 + 200.4*s^2 + 84*s + 800)"},
		{Src: p + "transfer(P/2)", Want: "0.5 / (s^2 + 0.4*s + 4)"},
		{Src: p + "P/(1/(s + 1))", Err: "its reciprocal is not proper", Line: 2, Col: 2},
		{Src: p + "P/P", Err: "There is no division by a system", Line: 2, Col: 2},
		{Src: p + "P/0", Err: "division of a system by zero", Line: 2, Col: 2},
		{Src: "G = system([[-1, 0], [0, -2]], identity(2), identity(2))\ngain(G/(s + 1))", Want: "1    0\n0  0.5"},
	})
}

// Issue 15, friction 2: an output named like a state is that state.
func TestOutputNamedLikeState(t *testing.T) {
	const blk = "G = system {\n  states x, v\n  inputs u\n  outputs x, speed\n  x' = v\n  v' = u - 2*x\n  speed = 3*v\n}\n"
	langtest.RunCells(t, []langtest.Cell{
		{Src: blk + "G.C", Want: "1  0\n0  3"},
		{Src: "H = system {\n  outputs x\n  states x\n  inputs u\n  x' = -x + u\n}\ntransfer(H)", Want: "1 / (s + 1)"},
		{Src: "system {\n  states x\n  outputs x\n  x' = -x\n  x = 2*x\n}", Err: "'x' is a state; its equation is written x' = ...", Line: 5, Col: 3},
		{Src: "system {\n  states x\n  outputs x, x\n  x' = -x\n}", Err: "'x' is declared twice", Line: 3, Col: 14},
	})
}

// Issue 15, friction 3: completion inside a call leaves out the
// parameters already given by position (and by name).
func TestCompleteSkipsPositionalArguments(t *testing.T) {
	s := lang.NewSession(lang.Options{Builtins: builtins.Registry(), Dir: t.TempDir()})
	if _, err := s.Run(context.Background(), "G = 1/(s + 1)\nf(a, b, c) = a + b + c", nil); err != nil {
		t.Fatal(err)
	}
	for _, c := range []struct {
		src     string
		want    []string
		notWant []string
	}{
		{"response(G, step, ", []string{"initial: ", "until: "}, []string{"system: ", "input: "}},
		{"response(G, ", []string{"input: ", "until: "}, []string{"system: "}},
		{"response(G, sine(2, amplitude: 3), ", []string{"until: "}, []string{"system: ", "input: ", "amplitude: "}},
		{"response(G, until: 3, ", []string{"input: ", "dt: "}, []string{"system: ", "until: "}},
		{"response([[1, 2], [3, 4]], ", []string{"input: "}, []string{"system: "}},
		{"f(1, ", []string{"b: ", "c: "}, []string{"a: "}},
	} {
		m, _, _ := s.Complete(c.src, len([]rune(c.src)))
		got := map[string]bool{}
		for _, x := range m {
			got[x] = true
		}
		for _, w := range c.want {
			if !got[w] {
				t.Errorf("Complete(%q) lacks %q: %v", c.src, w, m)
			}
		}
		for _, w := range c.notWant {
			if got[w] {
				t.Errorf("Complete(%q) offers %q, given already", c.src, w)
			}
		}
	}
}
