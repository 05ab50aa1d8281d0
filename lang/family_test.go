package lang_test

import (
	"context"
	"math"
	"math/cmplx"
	"runtime"
	"testing"
	"time"

	"lsys/lang"
	"lsys/lang/builtins"
	"lsys/lang/langtest"
	"lsys/lsys"
)

// mountFamily is a mass on a spring of stiffness k and a damper c, written
// as a function of k whose body is an equation block.
const mountFamily = `m = 1; c = 0.4
family(k) = system {
  states x, v
  inputs f
  x' = v
  v' = (f - k*x - c*v)/m
}
`

// The parameters of a user function are parameters of an equation block in
// its body (values: the block's matrices follow from m x” + c x' + k x = f,
// common practice).
func TestFunctionParametersInBlocks(t *testing.T) {
	langtest.RunCells(t, []langtest.Cell{
		{Src: mountFamily + "family(4).A", Want: " 0     1\n-4  -0.4"},
		{Src: mountFamily + "family(k: 2.5).A[2, 1]", Want: "-2.5"},
		// the function's parameter hides a session binding of the same name
		{Src: "k = 100\nf(k) = system {\n  states x\n  x' = -k*x\n}\nf(2).A", Want: "-2"},
		// and the block copies it: the session's k is unchanged
		{Src: "k = 100\nf(k) = system {\n  states x\n  x' = -k*x\n}\ng = f(2)\nk", Want: "100"},
		// a record passed as the parameter: its fields are parameters
		{Src: "f(p) = system {\n  states x\n  x' = -p.k*x\n}\nf({k: 3}).A", Want: "-3"},
		// a function passed as the parameter can be called in the equations
		{Src: "sq(a) = a^2\nf(g) = system {\n  states x\n  x' = -g(2)*x\n}\nf(sq).A", Want: "-4"},
		// nonlinear models record the function's parameter
		{Src: "f(k) = system {\n  states x\n  x' = -k*x^3\n}\nf(2).parameters", Want: "{k: 2}"},
		// a block in a function called from another function sees the
		// inner function's parameters
		{Src: "inner(a) = system {\n  states x\n  x' = -a*x\n}\nouter(b) = inner(2*b)\nouter(3).A", Want: "-6"},
		{Src: mountFamily + "l = locus(family, k: [1, 4, 9])\nl.values", Want: "1\n4\n9"},
		{Src: mountFamily + "sensitivity(family(5)).parameters", Want: "[\"k\", \"c\", \"m\"]"},
	})
}

// Errors that involve a function's parameters inside a block: message,
// line and column.
func TestFunctionParametersInBlocksErrors(t *testing.T) {
	langtest.RunCells(t, []langtest.Cell{
		{Src: "f(gain) = system {\n  states x\n  x' = -gian*x\n}\nf(2)", Err: "'gian' is not a state, input or parameter of this system; did you mean 'gain' (a parameter)?", Line: 3, Col: 9},
		{Src: "f(k) = system {\n  states x\n  x' = -k*x\n}\nf([1, 2])", Err: "'k' is a vector of 2; a parameter in an equation must be a real number", Line: 3, Col: 9},
		{Src: "f(k) = system {\n  states x\n  x' = -k*x\n}\nf(\"stiff\")", Err: "'k' is a string", Line: 3, Col: 9},
		{Src: mountFamily + "sensitivity(family, [\"k\"])", Err: "sensitivity needs a model, not the function family", Line: 8, Col: 13},
		{Src: mountFamily + "sensitivity(family(5), [\"q\"])", Err: "'q' is not a parameter of this model", Line: 8, Col: 24},
		{Src: "f(k) = system {\n  states x\n  x' = -2*x\n}\nsensitivity(f(1))", Err: "this model uses no named parameters", Line: 5, Col: 13},
		{Src: mountFamily + "sensitivity(family(5), [])", Err: "give at least one parameter name", Line: 8, Col: 24},
	})
}

// The locus of m x” + c x' + k x = 0 as k varies, against the closed form
// of the roots of m s^2 + c s + k: s = -c/2m ± j sqrt(k/m - (c/2m)^2) while
// k > c^2/4m (common practice), and sensitivities of the same family at
// k = 5 against the derivative of that closed form:
// d s/dk = j / (2 m w_d), d s/dc = -1/2m - j c / (4 m^2 w_d).
func TestFamilyLocusAndSensitivityClosedForm(t *testing.T) {
	s := lang.NewSession(lang.Options{Builtins: builtins.Registry(), Dir: t.TempDir()})
	v, err := s.Run(context.Background(), mountFamily+"locus(family, k: linear(1, 10, n: 19))", &langtest.Recorder{})
	if err != nil {
		t.Fatal(err)
	}
	l := v.(*lsys.Locus)
	m, c := 1.0, 0.4
	if len(l.Branches) != 2 || l.Parameter != "k" {
		t.Fatalf("locus: %d branches over %q", len(l.Branches), l.Parameter)
	}
	sign := 1.0
	if imag(l.Branches[0][0]) < 0 {
		sign = -1
	}
	for i, k := range l.Values {
		wd := math.Sqrt(k/m - (c/(2*m))*(c/(2*m)))
		want := complex(-c/(2*m), sign*wd)
		if d := cmplx.Abs(l.Branches[0][i] - want); d > 1e-13 {
			t.Errorf("k = %g: branch 1 at %v, want %v", k, l.Branches[0][i], want)
		}
		if d := cmplx.Abs(l.Branches[1][i] - cmplx.Conj(want)); d > 1e-13 {
			t.Errorf("k = %g: branch 2 at %v, want %v", k, l.Branches[1][i], cmplx.Conj(want))
		}
	}
	v, err = s.Run(context.Background(), `sensitivity(family(5), ["k", "c"])`, &langtest.Recorder{})
	if err != nil {
		t.Fatal(err)
	}
	sens := v.(*lsys.Sensitivity)
	k := 5.0
	wd := math.Sqrt(k/m - (c/(2*m))*(c/(2*m)))
	wantK := complex(0, 1/(2*m*wd))
	wantC := complex(-1/(2*m), -c/(4*m*m*wd))
	if len(sens.D) != 1 {
		t.Fatalf("one oscillatory mode expected, got %v", sens.Eigenvalues)
	}
	if d := cmplx.Abs(sens.D[0][0] - wantK); d > 1e-13 {
		t.Errorf("ds/dk = %v, want %v", sens.D[0][0], wantK)
	}
	if d := cmplx.Abs(sens.D[0][1] - wantC); d > 1e-13 {
		t.Errorf("ds/dc = %v, want %v", sens.D[0][1], wantC)
	}
	if sens.Values[0] != 5 || sens.Values[1] != 0.4 {
		t.Errorf("parameter values %v, want [5 0.4]", sens.Values)
	}
}

// Slicing with ranges lo:hi (both ends included, 1-based): values follow
// from the definition in SPEC.md section 5.
func TestSlicing(t *testing.T) {
	const M = "M = [[1, 2, 3], [4, 5, 6], [7, 8, 9]]\n"
	langtest.RunCells(t, []langtest.Cell{
		{Src: M + "M[1, :]", Want: "1  2  3"},
		{Src: M + "M[:, 2]", Want: "2\n5\n8"},
		{Src: M + "M[2:3, 1:2]", Want: "4  5\n7  8"},
		{Src: M + "M[2:, :2]", Want: "4  5\n7  8"},
		{Src: M + "M[:, :] == M", Want: "true"},
		{Src: M + "M[2, 3]", Want: "6"},
		{Src: M + "M[3, 2:2]", Want: "8"},
		{Src: "v = [10, 20, 30, 40]\nv[2:3]", Want: "20\n30"},
		{Src: "v = [10, 20, 30, 40]\nv[3:]", Want: "30\n40"},
		{Src: "r = [[10, 20, 30]]\nr[:2]", Want: "10  20"},
		{Src: "[\"k\", \"b\", \"m\"][2:3]", Want: "[\"b\", \"m\"]"},
		{Src: "C = [[1 + 2j, 3], [4, 5j]]\nC[2, :]", Want: "4  5j"},
		{Src: "C = [[1 + 2j, 3], [4, 5j]]\nC[:, 1]", Want: "1 + 2j\n     4"},
		{Src: "C = [[1 + 2j, 3], [4, 5j]]\nC[2, 1:1]", Want: "4"},
		{Src: "G = system([[0, 1], [-2, -3]], [0, 1], [1, 0])\nG.A[2, :]", Want: "-2  -3"},
	})
	langtest.RunCells(t, []langtest.Cell{
		{Src: "v = [1, 2, 3]\nv[3:2]", Err: "the range 3:2 is empty", Line: 2, Col: 4},
		{Src: "v = [1, 2, 3]\nv[2:5]", Err: "index 5 is out of range", Line: 2, Col: 5},
		{Src: "M = [[1, 2], [3, 4]]\nM[1:2]", Err: "needs a row and a column", Line: 2, Col: 2},
		{Src: "M = [[1, 2], [3, 4]]\nM[:, 0]", Err: "index 0 is out of range for the columns", Line: 2, Col: 6},
		{Src: "x = 3\nx[1:2]", Err: "a number cannot be sliced", Line: 2, Col: 4},
		{Src: "v = [1, 2]\nv[1:1.5]", Err: "an index must be a whole number", Line: 2, Col: 5},
	})
}

// The systems a locus builds from a family are not kept by the session:
// their block sources go with them (the session keeps sources under weak
// keys), while a system still bound keeps its source for sensitivity.
func TestLocusDoesNotKeepItsSystems(t *testing.T) {
	s := lang.NewSession(lang.Options{Builtins: builtins.Registry(), Dir: t.TempDir()})
	if _, err := s.Run(context.Background(), mountFamily+"kept = family(2)\nl = locus(family, k: linear(1, 10, n: 2000))", &langtest.Recorder{}); err != nil {
		t.Fatal(err)
	}
	n := 0
	for try := 0; try < 200; try++ {
		runtime.GC()
		n = lang.SourcesCount(s)
		if n <= 1 {
			break
		}
		time.Sleep(2 * time.Millisecond)
	}
	if n > 1 {
		t.Errorf("%d block sources kept after a locus of 2000 values; want only the bound system's", n)
	}
	if _, err := s.Run(context.Background(), `sensitivity(kept, ["k"])`, &langtest.Recorder{}); err != nil {
		t.Errorf("the bound system lost its source: %v", err)
	}
}
