package lang

import (
	"context"
	"math"
	"math/cmplx"
	"runtime"
	"testing"
	"time"

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
	runCells(t, []cell{
		{src: mountFamily + "family(4).A", want: " 0     1\n-4  -0.4"},
		{src: mountFamily + "family(k: 2.5).A[2, 1]", want: "-2.5"},
		// the function's parameter hides a session binding of the same name
		{src: "k = 100\nf(k) = system {\n  states x\n  x' = -k*x\n}\nf(2).A", want: "-2"},
		// and the block copies it: the session's k is unchanged
		{src: "k = 100\nf(k) = system {\n  states x\n  x' = -k*x\n}\ng = f(2)\nk", want: "100"},
		// a record passed as the parameter: its fields are parameters
		{src: "f(p) = system {\n  states x\n  x' = -p.k*x\n}\nf({k: 3}).A", want: "-3"},
		// a function passed as the parameter can be called in the equations
		{src: "sq(a) = a^2\nf(g) = system {\n  states x\n  x' = -g(2)*x\n}\nf(sq).A", want: "-4"},
		// nonlinear models record the function's parameter
		{src: "f(k) = system {\n  states x\n  x' = -k*x^3\n}\nf(2).parameters", want: "{k: 2}"},
		// a block in a function called from another function sees the
		// inner function's parameters
		{src: "inner(a) = system {\n  states x\n  x' = -a*x\n}\nouter(b) = inner(2*b)\nouter(3).A", want: "-6"},
		{src: mountFamily + "l = locus(family, k: [1, 4, 9])\nl.values", want: "1\n4\n9"},
		{src: mountFamily + "sensitivity(family(5)).parameters", want: "[\"k\", \"c\", \"m\"]"},
	})
}

// Errors that involve a function's parameters inside a block: message,
// line and column.
func TestFunctionParametersInBlocksErrors(t *testing.T) {
	runCells(t, []cell{
		{src: "f(gain) = system {\n  states x\n  x' = -gian*x\n}\nf(2)", err: "'gian' is not a state, input or parameter of this system; did you mean 'gain' (a parameter)?", line: 3, col: 9},
		{src: "f(k) = system {\n  states x\n  x' = -k*x\n}\nf([1, 2])", err: "'k' is a vector of 2; a parameter in an equation must be a real number", line: 3, col: 9},
		{src: "f(k) = system {\n  states x\n  x' = -k*x\n}\nf(\"stiff\")", err: "'k' is a string", line: 3, col: 9},
		{src: mountFamily + "sensitivity(family, [\"k\"])", err: "sensitivity needs a model, not the function family", line: 8, col: 13},
		{src: mountFamily + "sensitivity(family(5), [\"q\"])", err: "'q' is not a parameter of this model", line: 8, col: 24},
		{src: "f(k) = system {\n  states x\n  x' = -2*x\n}\nsensitivity(f(1))", err: "this model uses no named parameters", line: 5, col: 13},
		{src: mountFamily + "sensitivity(family(5), [])", err: "give at least one parameter name", line: 8, col: 24},
	})
}

// The locus of m x” + c x' + k x = 0 as k varies, against the closed form
// of the roots of m s^2 + c s + k: s = -c/2m ± j sqrt(k/m - (c/2m)^2) while
// k > c^2/4m (common practice), and sensitivities of the same family at
// k = 5 against the derivative of that closed form:
// d s/dk = j / (2 m w_d), d s/dc = -1/2m - j c / (4 m^2 w_d).
func TestFamilyLocusAndSensitivityClosedForm(t *testing.T) {
	s := NewSession(Options{Dir: t.TempDir()})
	v, err := s.Run(context.Background(), mountFamily+"locus(family, k: linear(1, 10, n: 19))", &recorder{})
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
	v, err = s.Run(context.Background(), `sensitivity(family(5), ["k", "c"])`, &recorder{})
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
	runCells(t, []cell{
		{src: M + "M[1, :]", want: "1  2  3"},
		{src: M + "M[:, 2]", want: "2\n5\n8"},
		{src: M + "M[2:3, 1:2]", want: "4  5\n7  8"},
		{src: M + "M[2:, :2]", want: "4  5\n7  8"},
		{src: M + "M[:, :] == M", want: "true"},
		{src: M + "M[2, 3]", want: "6"},
		{src: M + "M[3, 2:2]", want: "8"},
		{src: "v = [10, 20, 30, 40]\nv[2:3]", want: "20\n30"},
		{src: "v = [10, 20, 30, 40]\nv[3:]", want: "30\n40"},
		{src: "r = [[10, 20, 30]]\nr[:2]", want: "10  20"},
		{src: "[\"k\", \"b\", \"m\"][2:3]", want: "[\"b\", \"m\"]"},
		{src: "C = [[1 + 2j, 3], [4, 5j]]\nC[2, :]", want: "4  5j"},
		{src: "C = [[1 + 2j, 3], [4, 5j]]\nC[:, 1]", want: "1 + 2j\n     4"},
		{src: "C = [[1 + 2j, 3], [4, 5j]]\nC[2, 1:1]", want: "4"},
		{src: "G = system([[0, 1], [-2, -3]], [0, 1], [1, 0])\nG.A[2, :]", want: "-2  -3"},
	})
	runCells(t, []cell{
		{src: "v = [1, 2, 3]\nv[3:2]", err: "the range 3:2 is empty", line: 2, col: 4},
		{src: "v = [1, 2, 3]\nv[2:5]", err: "index 5 is out of range", line: 2, col: 5},
		{src: "M = [[1, 2], [3, 4]]\nM[1:2]", err: "needs a row and a column", line: 2, col: 2},
		{src: "M = [[1, 2], [3, 4]]\nM[:, 0]", err: "index 0 is out of range for the columns", line: 2, col: 6},
		{src: "x = 3\nx[1:2]", err: "a number cannot be sliced", line: 2, col: 4},
		{src: "v = [1, 2]\nv[1:1.5]", err: "an index must be a whole number", line: 2, col: 5},
	})
}

// The systems a locus builds from a family are not kept by the session:
// their block sources go with them (the session keeps sources under weak
// keys), while a system still bound keeps its source for sensitivity.
func TestLocusDoesNotKeepItsSystems(t *testing.T) {
	s := NewSession(Options{Dir: t.TempDir()})
	if _, err := s.Run(context.Background(), mountFamily+"kept = family(2)\nl = locus(family, k: linear(1, 10, n: 2000))", &recorder{}); err != nil {
		t.Fatal(err)
	}
	n := 0
	for try := 0; try < 200; try++ {
		runtime.GC()
		s.mu.RLock()
		n = len(s.sources)
		s.mu.RUnlock()
		if n <= 1 {
			break
		}
		time.Sleep(2 * time.Millisecond)
	}
	if n > 1 {
		t.Errorf("%d block sources kept after a locus of 2000 values; want only the bound system's", n)
	}
	if _, err := s.Run(context.Background(), `sensitivity(kept, ["k"])`, &recorder{}); err != nil {
		t.Errorf("the bound system lost its source: %v", err)
	}
}
