package lang

import (
	"context"
	"errors"
	"strings"
	"testing"

	"lsys/lang/syntax"
)

// recorder is an Output that keeps everything for the tests.
type recorder struct {
	stdout, stderr strings.Builder
	displays       []any
	updates        []any
	ids            []string
}

func (r *recorder) Stdout(s string) { r.stdout.WriteString(s) }
func (r *recorder) Stderr(s string) { r.stderr.WriteString(s) }
func (r *recorder) Display(v any, id string) {
	r.displays = append(r.displays, v)
	r.ids = append(r.ids, id)
}
func (r *recorder) UpdateDisplay(v any, id string) { r.updates = append(r.updates, v) }
func (r *recorder) ClearOutput(bool)               {}

// cell is one row of the table: a cell's source and either its expected
// value (as FormatValue prints it) or its expected error (a fragment of
// the message, with line and column).
type cell struct {
	src  string
	want string // expected FormatValue of the result; "" with err set
	err  string // fragment of the expected error message
	line int
	col  int
}

func runCells(t *testing.T, cells []cell) {
	t.Helper()
	for _, c := range cells {
		s := NewSession(Options{Dir: t.TempDir()})
		v, err := s.Run(context.Background(), c.src, &recorder{})
		if c.err != "" {
			if err == nil {
				t.Errorf("%q: want error %q, got value %s", c.src, c.err, FormatValue(v))
				continue
			}
			if !strings.Contains(err.Error(), c.err) {
				t.Errorf("%q: error\n%s\ndoes not contain %q", c.src, err, c.err)
			}
			if h := hintOf(err); h == "" {
				t.Errorf("%q: the error says nothing about what to do:\n%v", c.src, err)
			}
			pos, ok := syntax.Position(err)
			if !ok {
				t.Errorf("%q: error without a position: %v", c.src, err)
				continue
			}
			if c.line != 0 && (pos.Line != c.line || pos.Column != c.col) {
				t.Errorf("%q: error at %d:%d, want %d:%d\n%s", c.src, pos.Line, pos.Column, c.line, c.col, err)
			}
			continue
		}
		if err != nil {
			t.Errorf("%q: unexpected error:\n%v", c.src, err)
			continue
		}
		if got := FormatValue(v); got != c.want {
			t.Errorf("%q:\n got %s\nwant %s", c.src, got, c.want)
		}
	}
}

// Values here follow from the arithmetic rules of the language (common
// practice: precedence and associativity as in mathematics).
func TestCellsValues(t *testing.T) {
	runCells(t, []cell{
		{src: "1 + 2*3", want: "7"},
		{src: "(1 + 2)*3", want: "9"},
		{src: "-2^2", want: "-4"},
		{src: "2^3^2", want: "512"},
		{src: "2^-1", want: "0.5"},
		{src: "7 / 2", want: "3.5"},
		{src: "1e-3 * 1000", want: "1"},
		{src: ".5 + 1.", want: "1.5"},
		{src: "x = 4; y = x / 2\ny", want: "2"},
		{src: "x = 4\nx = x + 1\nx", want: "5"},
		{src: "# a comment\nk = 3 # trailing\nk", want: "3"},
		{src: "a = 1 + \\\n  2\na", want: "3"},
		{src: "-1 + 2j", want: "-1 + 2j"},
		{src: "(1 + 2j) * (1 - 2j)", want: "5"}, // |1+2j|^2 = 5
		{src: "1j^2", want: "-1"},
		{src: "abs(3 + 4j)", want: "5"},
		{src: "sqrt(-4)", want: "2j"},
		{src: "\"gimbal\" + \" axis\"", want: "gimbal axis"},
		{src: "true and not false", want: "true"},
		{src: "1 < 2 or 1/0 > 1", want: "true"}, // or does not evaluate its right side
		{src: "3 == 3.0", want: "true"},
		{src: "\"a\" != \"b\"", want: "true"},
		{src: "if 2 > 1 then \"yes\" else \"no\"", want: "yes"},
		{src: "[1, 2, 3]", want: "1\n2\n3"},
		{src: "[[0, 1], [-2, -3]]", want: " 0   1\n-2  -3"},
		{src: "[[1, 2, 3]]", want: "1  2  3"},
		{src: "[[1],\n [2]]", want: "1\n2"},
		{src: "M = [[0, 1], [-2, -3]]\nM[2, 1]", want: "-2"},
		{src: "v = [10, 20, 30]\nv[3]", want: "30"},
		{src: "[[1, 2], [3, 4]] * [1, 1]", want: "3\n7"},
		{src: "[[1, 2], [3, 4]] + [[1, 0], [0, 1]]", want: "2  2\n3  5"},
		{src: "2 * [[1, 2], [3, 4]] / 4", want: "0.5  1\n1.5  2"},
		{src: "[[2, 0], [0, 3]]^2", want: "4  0\n0  9"},
		{src: "[[2, 0], [0, 4]]^-1", want: "0.5     0\n  0  0.25"},
		{src: "r = {angle: 0.1, rate: 0}\nr.angle", want: "0.1"},
		{src: "{angle: 0.1, rate: [1, 2]}", want: "{angle: 0.1, rate: [1, 2]}"},
		{src: "[\"k\", \"b\"]", want: "[\"k\", \"b\"]"},
		{src: "[\"k\", \"b\"][2]", want: "b"},
		{src: "[]", want: "[]"},
		{src: "f(k) = k^2 + 1\nf(3)", want: "10"},
		{src: "f(a, b) = a - b\nf(b: 1, a: 5)", want: "4"},
		{src: "fact(n) = if n <= 1 then 1 else n*fact(n - 1)\nfact(10)", want: "3628800"},
		{src: "pi", want: "3.141592654"},
		{src: "inf > 1e300", want: "true"},
		{src: "x = 1", want: "(nothing)"},
		{src: "print(1)", want: "(nothing)"},
		{src: "{a: 1}", want: "{a: 1}"},
		{src: "f = 50\n2*pi*f", want: "314.1592654"},
		{src: "g(x) = [x, 2*x]\ng(3)[2]", want: "6"},
		{src: "5 \u2212 3", want: "2"}, // a typographic minus, as pasted
		{src: "system {\n  states x\n  x\u2032 = \u22122*x\n}.A", want: "-2"},
	})
}

// The error table: message fragment, line and column (1-based, in runes).
func TestCellsErrors(t *testing.T) {
	runCells(t, []cell{
		{src: "torqe = 1\ntorque", err: "unknown name 'torque'; did you mean 'torqe'?", line: 2, col: 1},
		{src: "x = 1 +", err: "expected a value, found end of cell", line: 1, col: 8},
		{src: "x = (1 + 2", err: "expected ')'", line: 1, col: 11},
		{src: "x = [1, 2\ny = 3", err: "expected ']' to close the list", line: 2, col: 1},
		{src: "1 / 0", err: "division by zero", line: 1, col: 3},
		{src: "[[1, 2], [3]]", err: "row 2 has 1 entry but row 1 has 2", line: 1, col: 10},
		{src: "[[1, 2], [3, 4]] * [1, 2, 3]", err: "cannot multiply a 2x2 by a 3x1 matrix", line: 1, col: 18},
		{src: "[[1, 2]] + [[1, 2, 3]]", err: "cannot add a 1x2 and a 1x3 matrix", line: 1, col: 10},
		{src: "v = [1, 2]\nv[3]", err: "index 3 is out of range", line: 2, col: 3},
		{src: "v = [1, 2]\nv[0]", err: "index 0 is out of range", line: 2, col: 3},
		{src: "v = [1, 2]\nv[1.5]", err: "an index must be a whole number", line: 2, col: 3},
		{src: "r = {angle: 1}\nr.angel", err: "has no field 'angel'; did you mean 'angle'?", line: 2, col: 3},
		{src: "sin(1, 2)", err: "sin takes at most 1 argument", line: 1, col: 8},
		{src: "system([[0]], sample: 1)", err: "system has no argument named 'sample'", line: 1, col: 15},
		{src: "system([[0, 1]])", err: "needs a square matrix, not a 1x2 one", line: 1, col: 8},
		{src: "system([[0, 1], [0, 0]], [1, 2, 3])", err: "B must have as many rows as A: got 3x1 against 2x2", line: 1, col: 1},
		{src: "system()", err: "system needs the state matrix A, or only D for a static gain", line: 1, col: 1},
		{src: "modes = 3\nmodes(1)", err: "hides the built-in modes(system, tol?)", line: 2, col: 6},
		{src: "m = system {\n states x\n inputs u\n x' = -x^3 + u\n}\nequilibrium(m, inputs: {v: 1})", err: "'v' is not an input of this model", line: 6, col: 24},
		{src: "m = system {\n states x\n inputs u\n x' = -x^3 + u\n}\nequilibrium(m, guess: {y: 1})", err: "'y' is not a state of this model", line: 6, col: 23},
		{src: "m = system {\n states x\n inputs u\n x' = -x^3 + u\n}\nequilibrium(m, guess: {x: \"a\"})", err: "the value of 'x' must be a finite real number", line: 6, col: 23},
		{src: "equilibrium(system([[-1]], [1]), inputs: {w: 1})", err: "'w' is not an input of this system", line: 1, col: 42},
		{src: "equilibrium(system([[-1]], [1]), inputs: 3)", err: "a record such as {torque: 0}", line: 1, col: 42},
		{src: "x = 3\nx(2)", err: "x is a number, not a function", line: 2, col: 2},
		{src: "f(k) = k\nf(1, 2)", err: "f takes 1 argument", line: 2, col: 6},
		{src: "f(k) = g(k)\nf(1)", err: "unknown name 'g'", line: 1, col: 8},
		{src: "h(n) = h(n + 1)\nh(1)", err: "more than 200 levels deep", line: 1, col: 8},
		{src: "if 1 then 2 else 3", err: "the condition of 'if' must be true or false", line: 1, col: 4},
		{src: "\"abc", err: "string not closed", line: 1, col: 1},
		{src: "x = 2k", err: "a number runs into a name", line: 1, col: 6},
		{src: "x = 1 $ 2", err: "unexpected character '$'", line: 1, col: 7},
		{src: "x = \u201ctext\u201d", err: "Strings use straight double quotes", line: 1, col: 5},
		{src: "k = 2 \u00d7 3", err: "Write multiplication with '*'", line: 1, col: 7},
		{src: "a.b = 1", err: "the left side of '=' must be a name", line: 1, col: 5},
		{src: "x' = 1", err: "derivative x' can only be written inside system", line: 1, col: 2},
		{src: "f(1) = 2", err: "parameters of a function definition must be plain names", line: 1, col: 3},
		{src: "f(x, y: 1, 3)", err: "a positional argument cannot follow a named one", line: 1, col: 12},
		{src: "1 < 2 < 3", err: "comparisons cannot be chained", line: 1, col: 7},
		{src: "1e999", err: "number 1e999 is too large", line: 1, col: 1},
		{src: "10^400", err: "is not a finite number", line: 1, col: 3},
		{src: "(1 + 2j) < 3", err: "Complex numbers have no order", line: 1, col: 10},
		{src: "[1, 2] / [1, 2]", err: "cannot divide by a matrix", line: 1, col: 8},
		{src: "x = print(1)", err: "gives no value to bind", line: 1, col: 5},
		{src: "identity(1e9)", err: "the size must be between 1 and 1000", line: 1, col: 10},
		{src: "{a: 1, a: 2}", err: "field 'a' appears twice", line: 1, col: 8},
		{src: "x = 1\n)", err: "found ')'", line: 2, col: 1},
		{src: "[1; 2]", err: "expected ']' to close the list, found ';'", line: 1, col: 3},
		{src: "ok = 1\nbad = 1 +\nalso = (", err: "expected a value", line: 2, col: 10},
	})
}

func TestBindingsSurviveErrors(t *testing.T) {
	s := NewSession(Options{Dir: t.TempDir()})
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
	s := NewSession(Options{Dir: t.TempDir()})
	r := &recorder{}
	v, err := s.Run(context.Background(), "x = 1.5\nprint(\"x is\", x, [1, 2])\nwarn(\"careful\")\nshow(x)\nx", r)
	if err != nil {
		t.Fatal(err)
	}
	if v != 1.5 {
		t.Errorf("value %v, want 1.5", v)
	}
	if got := r.stdout.String(); got != "x is 1.5 1\n2\n" {
		t.Errorf("stdout %q", got)
	}
	if got := r.stderr.String(); got != "careful\n" {
		t.Errorf("stderr %q", got)
	}
	if len(r.displays) != 1 || r.displays[0] != 1.5 {
		t.Errorf("displays %v", r.displays)
	}
}

func TestErrorText(t *testing.T) {
	s := NewSession(Options{Dir: t.TempDir()})
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
	s := NewSession(Options{Dir: t.TempDir()})
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
	s := NewSession(Options{Dir: t.TempDir()})
	// Doubly recursive: 2^40 calls, far beyond MaxSteps.
	_, err := s.Run(context.Background(), "f(n) = if n <= 0 then 0 else f(n - 1) + f(n - 1)\nf(40)", nil)
	if err == nil || !strings.Contains(err.Error(), "evaluation steps") {
		t.Fatalf("want the step limit, got %v", err)
	}
}

func TestIsComplete(t *testing.T) {
	s := NewSession(Options{Dir: t.TempDir()})
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
	s := NewSession(Options{Dir: t.TempDir()})
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
		if !hasInOrder(m, c.want) || st != c.start || en != c.end {
			t.Errorf("Complete(%q, %d) = %v, %d, %d; want %v, %d, %d", c.src, c.cursor, m, st, en, c.want, c.start, c.end)
		}
	}
}

func TestInspect(t *testing.T) {
	s := NewSession(Options{Dir: t.TempDir()})
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
	for _, b := range Builtins() {
		for _, ex := range b.Examples {
			s := NewSession(Options{Dir: t.TempDir()})
			_, err := s.Run(context.Background(), ex, &recorder{})
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
	for _, b := range Builtins() {
		if b.Help == "" || len(b.Examples) == 0 {
			t.Errorf("%s: help and an example are required", b.Name)
		}
		if strings.ToLower(b.Name) != b.Name && b.Name != "A" {
			t.Errorf("%s: built-in names are lower case", b.Name)
		}
	}
}

// hintOf returns the "what to do" line of the first error.
func hintOf(err error) string {
	var l syntax.ErrorList
	if errors.As(err, &l) && len(l) > 0 {
		return l[0].Hint
	}
	var e *syntax.Error
	if errors.As(err, &e) {
		return e.Hint
	}
	return ""
}

// Completion and inspection while a cell runs (the kernel answers them
// from another goroutine); run with -race to check.
func TestConcurrentHelpWhileRunning(t *testing.T) {
	s := NewSession(Options{Dir: t.TempDir()})
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
	s := NewSession(Options{Dir: t.TempDir()})
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

// hasInOrder reports whether want appears in got as a subsequence.
func hasInOrder(got, want []string) bool {
	i := 0
	for _, g := range got {
		if i < len(want) && g == want[i] {
			i++
		}
	}
	return i == len(want)
}
