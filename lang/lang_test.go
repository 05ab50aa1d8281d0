package lang_test

import (
	"context"
	"errors"
	"strings"
	"testing"

	"lsys/lang"
	"lsys/lang/builtins"
	"lsys/lang/langtest"
	"lsys/lang/syntax"
)

// Values here follow from the arithmetic rules of the language (common
// practice: precedence and associativity as in mathematics).
func TestCellsValues(t *testing.T) {
	langtest.RunCells(t, []langtest.Cell{
		{Src: "1 + 2*3", Want: "7"},
		{Src: "(1 + 2)*3", Want: "9"},
		{Src: "-2^2", Want: "-4"},
		{Src: "2^3^2", Want: "512"},
		{Src: "2^-1", Want: "0.5"},
		{Src: "7 / 2", Want: "3.5"},
		{Src: "1e-3 * 1000", Want: "1"},
		{Src: ".5 + 1.", Want: "1.5"},
		{Src: "x = 4; y = x / 2\ny", Want: "2"},
		{Src: "x = 4\nx = x + 1\nx", Want: "5"},
		{Src: "# a comment\nk = 3 # trailing\nk", Want: "3"},
		{Src: "a = 1 + \\\n  2\na", Want: "3"},
		{Src: "-1 + 2j", Want: "-1 + 2j"},
		{Src: "(1 + 2j) * (1 - 2j)", Want: "5"}, // |1+2j|^2 = 5
		{Src: "1j^2", Want: "-1"},
		{Src: "abs(3 + 4j)", Want: "5"},
		{Src: "sqrt(-4)", Want: "2j"},
		{Src: "\"gimbal\" + \" axis\"", Want: "gimbal axis"},
		{Src: "true and not false", Want: "true"},
		{Src: "1 < 2 or 1/0 > 1", Want: "true"}, // or does not evaluate its right side
		{Src: "3 == 3.0", Want: "true"},
		{Src: "\"a\" != \"b\"", Want: "true"},
		{Src: "if 2 > 1 then \"yes\" else \"no\"", Want: "yes"},
		{Src: "[1, 2, 3]", Want: "1\n2\n3"},
		{Src: "[[0, 1], [-2, -3]]", Want: " 0   1\n-2  -3"},
		{Src: "[[1, 2, 3]]", Want: "1  2  3"},
		{Src: "[[1],\n [2]]", Want: "1\n2"},
		{Src: "M = [[0, 1], [-2, -3]]\nM[2, 1]", Want: "-2"},
		{Src: "v = [10, 20, 30]\nv[3]", Want: "30"},
		{Src: "[[1, 2], [3, 4]] * [1, 1]", Want: "3\n7"},
		{Src: "[[1, 2], [3, 4]] + [[1, 0], [0, 1]]", Want: "2  2\n3  5"},
		{Src: "2 * [[1, 2], [3, 4]] / 4", Want: "0.5  1\n1.5  2"},
		{Src: "[[2, 0], [0, 3]]^2", Want: "4  0\n0  9"},
		{Src: "[[2, 0], [0, 4]]^-1", Want: "0.5     0\n  0  0.25"},
		{Src: "r = {angle: 0.1, rate: 0}\nr.angle", Want: "0.1"},
		{Src: "{angle: 0.1, rate: [1, 2]}", Want: "{angle: 0.1, rate: [1, 2]}"},
		{Src: "[\"k\", \"b\"]", Want: "[\"k\", \"b\"]"},
		{Src: "[\"k\", \"b\"][2]", Want: "b"},
		{Src: "[]", Want: "[]"},
		{Src: "f(k) = k^2 + 1\nf(3)", Want: "10"},
		{Src: "f(a, b) = a - b\nf(b: 1, a: 5)", Want: "4"},
		{Src: "fact(n) = if n <= 1 then 1 else n*fact(n - 1)\nfact(10)", Want: "3628800"},
		{Src: "pi", Want: "3.141592654"},
		{Src: "inf > 1e300", Want: "true"},
		{Src: "x = 1", Want: "(nothing)"},
		{Src: "print(1)", Want: "(nothing)"},
		{Src: "{a: 1}", Want: "{a: 1}"},
		{Src: "f = 50\n2*pi*f", Want: "314.1592654"},
		{Src: "g(x) = [x, 2*x]\ng(3)[2]", Want: "6"},
		{Src: "5 \u2212 3", Want: "2"}, // a typographic minus, as pasted
		{Src: "system {\n  states x\n  x\u2032 = \u22122*x\n}.A", Want: "-2"},
	})
}

// The error table: message fragment, line and column (1-based, in runes).
func TestCellsErrors(t *testing.T) {
	langtest.RunCells(t, []langtest.Cell{
		{Src: "torqe = 1\ntorque", Err: "unknown name 'torque'; did you mean 'torqe'?", Line: 2, Col: 1},
		{Src: "x = 1 +", Err: "expected a value, found end of cell", Line: 1, Col: 8},
		{Src: "x = (1 + 2", Err: "expected ')'", Line: 1, Col: 11},
		{Src: "x = [1, 2\ny = 3", Err: "expected ']' to close the list", Line: 2, Col: 1},
		{Src: "1 / 0", Err: "division by zero", Line: 1, Col: 3},
		{Src: "[[1, 2], [3]]", Err: "row 2 has 1 entry but row 1 has 2", Line: 1, Col: 10},
		{Src: "[[1, 2], [3, 4]] * [1, 2, 3]", Err: "cannot multiply a 2x2 by a 3x1 matrix", Line: 1, Col: 18},
		{Src: "[[1, 2]] + [[1, 2, 3]]", Err: "cannot add a 1x2 and a 1x3 matrix", Line: 1, Col: 10},
		{Src: "v = [1, 2]\nv[3]", Err: "index 3 is out of range", Line: 2, Col: 3},
		{Src: "v = [1, 2]\nv[0]", Err: "index 0 is out of range", Line: 2, Col: 3},
		{Src: "v = [1, 2]\nv[1.5]", Err: "an index must be a whole number", Line: 2, Col: 3},
		{Src: "r = {angle: 1}\nr.angel", Err: "has no field 'angel'; did you mean 'angle'?", Line: 2, Col: 3},
		{Src: "sin(1, 2)", Err: "sin takes at most 1 argument", Line: 1, Col: 8},
		{Src: "system([[0]], sample: 1)", Err: "system has no argument named 'sample'", Line: 1, Col: 15},
		{Src: "system([[0, 1]])", Err: "needs a square matrix, not a 1x2 one", Line: 1, Col: 8},
		{Src: "system([[0, 1], [0, 0]], [1, 2, 3])", Err: "B must have as many rows as A: got 3x1 against 2x2", Line: 1, Col: 1},
		{Src: "system()", Err: "system needs the state matrix A, or only D for a static gain", Line: 1, Col: 1},
		{Src: "modes = 3\nmodes(1)", Err: "hides the built-in modes(system, tol?)", Line: 2, Col: 6},
		{Src: "m = system {\n states x\n inputs u\n x' = -x^3 + u\n}\nequilibrium(m, inputs: {v: 1})", Err: "'v' is not an input of this model", Line: 6, Col: 24},
		{Src: "m = system {\n states x\n inputs u\n x' = -x^3 + u\n}\nequilibrium(m, guess: {y: 1})", Err: "'y' is not a state of this model", Line: 6, Col: 23},
		{Src: "m = system {\n states x\n inputs u\n x' = -x^3 + u\n}\nequilibrium(m, guess: {x: \"a\"})", Err: "the value of 'x' must be a finite real number", Line: 6, Col: 23},
		{Src: "equilibrium(system([[-1]], [1]), inputs: {w: 1})", Err: "'w' is not an input of this system", Line: 1, Col: 42},
		{Src: "equilibrium(system([[-1]], [1]), inputs: 3)", Err: "a record such as {torque: 0}", Line: 1, Col: 42},
		{Src: "x = 3\nx(2)", Err: "x is a number, not a function", Line: 2, Col: 2},
		{Src: "f(k) = k\nf(1, 2)", Err: "f takes 1 argument", Line: 2, Col: 6},
		{Src: "f(k) = g(k)\nf(1)", Err: "unknown name 'g'", Line: 1, Col: 8},
		{Src: "h(n) = h(n + 1)\nh(1)", Err: "more than 200 levels deep", Line: 1, Col: 8},
		{Src: "if 1 then 2 else 3", Err: "the condition of 'if' must be true or false", Line: 1, Col: 4},
		{Src: "\"abc", Err: "string not closed", Line: 1, Col: 1},
		{Src: "x = 2k", Err: "a number runs into a name", Line: 1, Col: 6},
		{Src: "x = 1 $ 2", Err: "unexpected character '$'", Line: 1, Col: 7},
		{Src: "x = \u201ctext\u201d", Err: "Strings use straight double quotes", Line: 1, Col: 5},
		{Src: "k = 2 \u00d7 3", Err: "Write multiplication with '*'", Line: 1, Col: 7},
		{Src: "a.b = 1", Err: "the left side of '=' must be a name", Line: 1, Col: 5},
		{Src: "x' = 1", Err: "derivative x' can only be written inside system", Line: 1, Col: 2},
		{Src: "f(1) = 2", Err: "parameters of a function definition must be plain names", Line: 1, Col: 3},
		{Src: "f(x, y: 1, 3)", Err: "a positional argument cannot follow a named one", Line: 1, Col: 12},
		{Src: "1 < 2 < 3", Err: "comparisons cannot be chained", Line: 1, Col: 7},
		{Src: "1e999", Err: "number 1e999 is too large", Line: 1, Col: 1},
		{Src: "10^400", Err: "is not a finite number", Line: 1, Col: 3},
		{Src: "(1 + 2j) < 3", Err: "Complex numbers have no order", Line: 1, Col: 10},
		{Src: "[1, 2] / [1, 2]", Err: "cannot divide by a matrix", Line: 1, Col: 8},
		{Src: "x = print(1)", Err: "gives no value to bind", Line: 1, Col: 5},
		{Src: "identity(1e9)", Err: "the size must be between 1 and 1000", Line: 1, Col: 10},
		{Src: "{a: 1, a: 2}", Err: "field 'a' appears twice", Line: 1, Col: 8},
		{Src: "x = 1\n)", Err: "found ')'", Line: 2, Col: 1},
		{Src: "[1; 2]", Err: "expected ']' to close the list, found ';'", Line: 1, Col: 3},
		{Src: "ok = 1\nbad = 1 +\nalso = (", Err: "expected a value", Line: 2, Col: 10},
	})
}

func TestBindingsSurviveErrors(t *testing.T) {
	s := lang.NewSession(lang.Options{Builtins: builtins.Registry(), Dir: t.TempDir()})
	ctx := context.Background()
	if _, err := s.Run(ctx, "k = 2\nj = k / 0\nm = 3", nil); err == nil {
		t.Fatal("want an error")
	}
	if v, _ := s.Get("k"); v != 2.0 {
		t.Errorf("k = %v, want 2 (bindings before the error stay)", v)
	}
	if _, ok := s.Get("m"); ok {
		t.Error("m is bound though the cell stopped before it")
	}
	// A syntax error runs nothing.
	if _, err := s.Run(ctx, "q = 1\nr = (", nil); err == nil {
		t.Fatal("want a syntax error")
	}
	if _, ok := s.Get("q"); ok {
		t.Error("a cell with a syntax error must not run")
	}
	if got := strings.Join(s.Names(), ","); got != "k" {
		t.Errorf("Names = %s, want k", got)
	}
}

func TestOutputStreams(t *testing.T) {
	s := lang.NewSession(lang.Options{Builtins: builtins.Registry(), Dir: t.TempDir()})
	r := &langtest.Recorder{}
	v, err := s.Run(context.Background(), "x = 1.5\nprint(\"x is\", x, [1, 2])\nwarn(\"careful\")\nshow(x)\nx", r)
	if err != nil {
		t.Fatal(err)
	}
	if v != 1.5 {
		t.Errorf("value %v, want 1.5", v)
	}
	if got := r.Out.String(); got != "x is 1.5 1\n         2\n" { // a matrix keeps its rows aligned after a label
		t.Errorf("stdout %q", got)
	}
	if got := r.Err.String(); got != "careful\n" {
		t.Errorf("stderr %q", got)
	}
	if len(r.Displays) != 1 || r.Displays[0] != 1.5 {
		t.Errorf("displays %v", r.Displays)
	}
}

func TestErrorText(t *testing.T) {
	s := lang.NewSession(lang.Options{Builtins: builtins.Registry(), Dir: t.TempDir()})
	_, err := s.Run(context.Background(), "torque = 1\ny = 2 * torqe", nil)
	want := "line 2, column 9: unknown name 'torqe'; did you mean 'torque'?\n" +
		"    y = 2 * torqe\n" +
		"            ^\n" +
		"Bind it first (name = value), or check the spelling."
	if err == nil || err.Error() != want {
		t.Errorf("error text:\n%v\nwant:\n%s", err, want)
	}
}

func TestInterrupt(t *testing.T) {
	s := lang.NewSession(lang.Options{Builtins: builtins.Registry(), Dir: t.TempDir()})
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	_, err := s.Run(ctx, "f(n) = if n <= 0 then 0 else f(n - 1)\nf(100)", nil)
	if !errors.Is(err, context.Canceled) {
		t.Fatalf("want an error wrapping context.Canceled, got %v", err)
	}
	if _, ok := syntax.Position(err); !ok {
		t.Errorf("interrupt error has no position: %v", err)
	}
}

func TestStepLimit(t *testing.T) {
	s := lang.NewSession(lang.Options{Builtins: builtins.Registry(), Dir: t.TempDir()})
	// Doubly recursive: 2^40 calls, far beyond MaxSteps.
	_, err := s.Run(context.Background(), "f(n) = if n <= 0 then 0 else f(n - 1) + f(n - 1)\nf(40)", nil)
	if err == nil || !strings.Contains(err.Error(), "evaluation steps") {
		t.Fatalf("want the step limit, got %v", err)
	}
}

func TestIsComplete(t *testing.T) {
	s := lang.NewSession(lang.Options{Builtins: builtins.Registry(), Dir: t.TempDir()})
	for _, c := range []struct{ src, status, indent string }{
		{"x = 1", "complete", ""},
		{"", "complete", ""},
		{"x = [1,", "incomplete", "  "},
		{"G = system {\n  states a\n", "incomplete", "  "},
		{"f(a, [1,", "incomplete", "    "},
		{"x = 1 +\\", "incomplete", ""},
		{"x = )", "invalid", ""},
		{"x = 1 +", "invalid", ""},
		{"\"abc", "invalid", ""},
		{"x = (1]", "invalid", ""},
	} {
		st, ind := s.IsComplete(c.src)
		if st != c.status || ind != c.indent {
			t.Errorf("IsComplete(%q) = %q, %q; want %q, %q", c.src, st, ind, c.status, c.indent)
		}
	}
}

func TestComplete(t *testing.T) {
	s := lang.NewSession(lang.Options{Builtins: builtins.Registry(), Dir: t.TempDir()})
	if _, err := s.Run(context.Background(), "gimbal = system([[0, 1], [-2, -3]], [0, 1], [1, 0], states: [\"angle\", \"rate\"], inputs: [\"torque\"], outputs: [\"speed\"])\ngain_k = 2\nrec = {angle: 1, rate: 2}", nil); err != nil {
		t.Fatal(err)
	}
	for _, c := range []struct {
		src        string
		cursor     int
		want       []string
		start, end int
	}{
		{"mode", 4, []string{"modes"}, 0, 4},
		{"moda", 4, []string{"modal"}, 0, 4},
		{"x = gim", 7, []string{"gimbal"}, 4, 7},
		{"gimbal.ra", 9, []string{"rate"}, 7, 9},
		{"gimbal.tor", 10, []string{"torque"}, 7, 10},
		{"rec.an", 6, []string{"angle"}, 4, 6},
		{"system([[1]], ev", 16, []string{"every: "}, 14, 16},
		{"system([[1]], every: 1, sta", 27, []string{"states: "}, 24, 27},
		{"ab", 2, []string{"abs"}, 0, 2},
		{"π = gai", 7, []string{"gain_k"}, 4, 7},
		{"system {\n  states angle, rate\n  ang", 35, []string{"angle"}, 32, 35},
		{"linearize(gimbal, at: {angle: 0, ra", 35, []string{"rate: "}, 33, 35},
		{"linearize(gimbal, at: {", 23, []string{"angle: ", "rate: ", "torque: "}, 23, 23},
	} {
		m, st, en := s.Complete(c.src, c.cursor)
		// Built-ins added later may add matches: the wanted ones must be
		// there, in order, ahead of the others only for named arguments.
		if !langtest.HasInOrder(m, c.want) || st != c.start || en != c.end {
			t.Errorf("Complete(%q, %d) = %v, %d, %d; want %v, %d, %d", c.src, c.cursor, m, st, en, c.want, c.start, c.end)
		}
	}
}

func TestInspect(t *testing.T) {
	s := lang.NewSession(lang.Options{Builtins: builtins.Registry(), Dir: t.TempDir()})
	if _, err := s.Run(context.Background(), "G = system([[0, 1], [-2, -3]], [0, 1], [1, 0])\nf(k) = k + 1", nil); err != nil {
		t.Fatal(err)
	}
	for _, c := range []struct {
		src    string
		cursor int
		want   []string
	}{
		{"modes(G)", 2, []string{"modes(system, tol?)", "mode table", "Example:"}},
		{"modes(", 6, []string{"modes(system, tol?)"}},
		{"system(A, ", 10, []string{"system(A?, B?, C?, D?, states?, inputs?, outputs?, every: 0)"}},
		{"G", 1, []string{"G: a system", "1 state"[:0] + "2 states, 1 input, 1 output, continuous"}},
		{"f", 0, []string{"f: a function", "f(k) = k + 1"}},
		{"G.A", 3, []string{"A: a 2x2 matrix"}},
	} {
		text, ok := s.Inspect(c.src, c.cursor)
		if !ok {
			t.Errorf("Inspect(%q, %d) found nothing", c.src, c.cursor)
			continue
		}
		for _, w := range c.want {
			if !strings.Contains(text, w) {
				t.Errorf("Inspect(%q, %d) = %q; want it to contain %q", c.src, c.cursor, text, w)
			}
		}
	}
	if _, ok := s.Inspect("   ", 1); ok {
		t.Error("Inspect of blanks found something")
	}
}

// Every example in the registry runs (those of built-ins whose numerics
// are not in the tree yet are reported, not failed).
func TestRegistryExamples(t *testing.T) {
	for _, b := range builtins.Registry().Builtins() {
		for _, ex := range b.Examples {
			s := lang.NewSession(lang.Options{Builtins: builtins.Registry(), Dir: t.TempDir()})
			_, err := s.Run(context.Background(), ex, &langtest.Recorder{})
			if err != nil {
				if strings.Contains(err.Error(), "not implemented yet") {
					t.Logf("%s: example waits for its numerics: %v", b.Name, strings.SplitN(err.Error(), "\n", 2)[0])
					continue
				}
				t.Errorf("example of %s fails:\n%s\n%v", b.Name, ex, err)
			}
		}
	}
}

func TestRegistryEntries(t *testing.T) {
	for _, b := range builtins.Registry().Builtins() {
		if b.Help == "" || len(b.Examples) == 0 {
			t.Errorf("%s: help and an example are required", b.Name)
		}
		if strings.ToLower(b.Name) != b.Name && b.Name != "A" {
			t.Errorf("%s: built-in names are lower case", b.Name)
		}
	}
}

// Completion and inspection while a cell runs (the kernel answers them
// from another goroutine); run with -race to check.
func TestConcurrentHelpWhileRunning(t *testing.T) {
	s := lang.NewSession(lang.Options{Builtins: builtins.Registry(), Dir: t.TempDir()})
	done := make(chan error)
	go func() {
		_, err := s.Run(context.Background(), "f(n) = if n <= 0 then 0 else 1 + f(n - 1)\nfor_k = 3\nG = system([[0, 1], [-2, -3]], [0, 1], [1, 0])\nx = f(150)", nil)
		done <- err
	}()
	for i := 0; i < 200; i++ {
		s.Complete("G.", 2)
		s.Inspect("G", 1)
		s.Names()
		s.IsComplete("x = [1,")
	}
	if err := <-done; err != nil {
		t.Fatal(err)
	}
}

func TestErrorInFunctionFromEarlierCell(t *testing.T) {
	s := lang.NewSession(lang.Options{Builtins: builtins.Registry(), Dir: t.TempDir()})
	if _, err := s.Run(context.Background(), "# helpers\nratio(a, b) = a / b", nil); err != nil {
		t.Fatal(err)
	}
	_, err := s.Run(context.Background(), "x = 1\nratio(x, 0)", nil)
	want := "line 2, column 17: division by zero (in ratio(a, b), defined in an earlier cell, called at line 2, column 1)\n" +
		"    ratio(a, b) = a / b\n" +
		"                    ^"
	if err == nil || !strings.HasPrefix(err.Error(), want) {
		t.Errorf("error:\n%v\nwant it to start with:\n%s", err, want)
	}
}
