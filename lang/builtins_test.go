package lang

import (
	"context"
	"math"
	"math/cmplx"
	"os"
	"path/filepath"
	"regexp"
	"strings"
	"testing"

	"gonum.org/v1/gonum/mat"

	"lsys/lsys"
)

// Values of the core built-ins. Sources: trigonometric and exponential
// values from the standard tables (common practice); matrix results worked
// by hand (2x2 inverse by the adjugate, Cramer's rule); exp of a nilpotent
// matrix from its series, exp(t [[0, 1], [-1, 0]]) the rotation matrix.
func TestBuiltinValues(t *testing.T) {
	runCells(t, []cell{
		{src: "sin(pi/6)", want: "0.5"},
		{src: "cos(pi/3)", want: "0.5"},
		{src: "tan(pi/4)", want: "1"},
		{src: "exp(1)", want: "2.718281828"},
		{src: "log(exp(2))", want: "2"},
		{src: "log(-1)", want: "3.141592654j"}, // principal branch: log(-1) = j pi
		{src: "sqrt(2)", want: "1.414213562"},
		{src: "sqrt(-4)", want: "2j"},
		{src: "abs(-3)", want: "3"},
		{src: "abs(3 + 4j)", want: "5"},
		{src: "real(-1 + 2j)", want: "-1"},
		{src: "imag(-1 + 2j)", want: "2"},
		{src: "phase(1j)", want: "1.570796327"},
		{src: "phase(-1)", want: "3.141592654"},
		{src: "conjugate(-1 + 2j)", want: "-1 - 2j"},
		{src: "exp([[0, 1], [0, 0]])", want: "1  1\n0  1"},
		{src: "t = pi/2\nexp(t*[[0, 1], [-1, 0]])[1, 2]", want: "1"},
		{src: "identity(2)", want: "1  0\n0  1"},
		{src: "diagonal([1, 2])", want: "1  0\n0  2"},
		{src: "diagonal([[1, 2], [3, 4]])", want: "1\n4"},
		{src: "transpose([[1, 2], [3, 4]])", want: "1  3\n2  4"},
		{src: "transpose([1, 2, 3])", want: "1  2  3"},
		{src: "inverse([[2, 1], [1, 3]]) * 5", want: " 3  -1\n-1   2"},
		{src: "det([[2, 1], [1, 3]])", want: "5"},
		{src: "solve([[2, 1], [1, 3]], [3, 5])", want: "0.8\n1.4"},
		{src: "linear(0, 1, n: 5)", want: "   0\n0.25\n 0.5\n0.75\n   1"},
		{src: "logarithmic(0.1, 1000, n: 5)", want: " 0.1\n   1\n  10\n 100\n1000"},
		{src: "pi", want: "3.141592654"},
		{src: "inf", want: "inf"},
		{src: "-inf < 0", want: "true"},
		{src: "s", want: "s"},
		{src: "z", want: "z"},
		{src: "(s + 1)^2", want: "s^2 + 2*s + 1"},
		{src: "1/(s + 1) + 1/(s + 2)", want: "(2*s + 3) / (s^2 + 3*s + 2)"},
		{src: "2/(2*s + 4)", want: "1 / (s + 2)"},
		{src: "(s + 1)/(s + 1)", want: "(s + 1) / (s + 1)"}, // no silent cancellation
		{src: "0.1/(z - 0.9)", want: "0.1 / (z - 0.9)"},
		{src: "H = 5/(s^2 + 2*s + 5)\nH(0)", want: "1"},   // steady-state gain
		{src: "H = 1/(s + 1)\nH(1j)", want: "0.5 - 0.5j"}, // 1/(1 + j) by hand
		{src: "x = [1, 2j]\nx[2]", want: "2j"},
		{src: "[[1, 2j], [3, 4]][2, 1]", want: "3"},
		{src: "[1, 2j] + [1, -2j]", want: "2\n0"}, // real again: exact zeros
		{src: "[[1, 1j]] * [1j, 1]", want: "2j"},  // 1*1j + 1j*1 (by hand)
		{src: "1j * [[1, 2]]", want: "1j  2j"},
		{src: "[[2j, 4]] / 2", want: "1j  2"},
		{src: "x = [1j, 1]\nx - x", want: "0\n0"},
		{src: "abs([3 + 4j, -1])", want: "5\n1"},
		{src: "real([1 + 2j, 3])", want: "1\n3"},
		{src: "imag([[1 + 2j, 3]])", want: "2  0"},
		{src: "conjugate([1j])", want: "-1j"},
		{src: "phase([-1, 1j])", want: "3.141592654\n1.570796327"},
		{src: "transpose([1j, 2])", want: "1j  2"},
		{src: "pause(0)", want: "(nothing)"},
		{src: "clear()", want: "(nothing)"},
		{src: "clear(wait: true)", want: "(nothing)"},
		{src: "print(\"a\")", want: "(nothing)"},
		{src: "warn(\"a\")", want: "(nothing)"},
		{src: "show(1)", want: "(nothing)"},
	})
}

func TestBuiltinErrors(t *testing.T) {
	runCells(t, []cell{
		{src: "sin(\"a\")", err: "sin: the argument 'x' must be a number, not a string", line: 1, col: 5},
		{src: "sin([1, 2])", err: "must be a number, not a vector of 2", line: 1, col: 5},
		{src: "exp([[1, 2]])", err: "exp of a matrix needs a square matrix, not a 1x2 one", line: 1, col: 5},
		{src: "exp(1000)", err: "exp(1000) is not a finite number", line: 1, col: 5},
		{src: "identity(0)", err: "the size must be between 1 and", line: 1, col: 10},
		{src: "identity(1.5)", err: "must be a whole number", line: 1, col: 10},
		{src: "diagonal([[1, 2, 3], [4, 5, 6]])", err: "diagonal needs a vector or a square matrix, not a 2x3 matrix", line: 1, col: 10},
		{src: "inverse([[1, 2], [2, 4]])", err: "the matrix is singular", line: 1, col: 9},
		{src: "det([[1, 2]])", err: "det needs a square matrix, not a 1x2 one", line: 1, col: 5},
		{src: "solve([[2, 1], [1, 3]], [1, 2, 3])", err: "A is 2x2 but b is 3x1: b needs 2 rows", line: 1, col: 25},
		{src: "solve([[1, 2], [2, 4]], [1, 2])", err: "A is singular", line: 1, col: 7},
		{src: "linear(0, 1, n: 1)", err: "n must be between 2 and", line: 1, col: 17},
		{src: "logarithmic(0, 1)", err: "a logarithmic grid needs a > 0 and b > 0", line: 1, col: 13},
		{src: "pause(-1)", err: "pause takes 0 to 3600 seconds", line: 1, col: 7},
		{src: "clear(wait: 1)", err: "must be true or false", line: 1, col: 13},
		{src: "show()", err: "show needs the argument 'value'", line: 1, col: 1},
		{src: "system([[0, 1], [0, 0]], [0, 1], every: -1)", err: "the sample time must be finite and >= 0", line: 1, col: 41},
		{src: "system([[-1]], [1], states: [\"a\", \"b\"])", err: "2 state names given for a system with 1 state", line: 1, col: 29},
		{src: "system([[-1, 0], [0, -2]], states: [\"a\", \"a\"])", err: "the name \"a\" appears twice", line: 1, col: 36},
		{src: "system([[inf]])", err: "entry 1 is inf; matrices hold finite numbers only", line: 1, col: 10},
		{src: "system(0.1/(z - 0.9))", err: "has no sample time yet", line: 1, col: 8},
		{src: "s + z", err: "cannot combine a transfer function in s with one in z", line: 1, col: 3},
		{src: "modes(\"G\")", err: "modes: the argument 'system' must be a system, not a string", line: 1, col: 7},
		{src: "1/(s - s)", err: "division by zero", line: 1, col: 2},
		{src: "system([[]])", err: "a transfer matrix needs at least one column", line: 1, col: 8},
		{src: "[1j, 2] + [1, 2, 3]", err: "cannot add a 2x1 and a 3x1 matrix", line: 1, col: 9},
		{src: "[1j, 2] / [1, 2]", err: "cannot divide a complex vector of 2 by a vector of 2", line: 1, col: 9},
		{src: "H = 1/(s + 1)\nH(-1)", err: "-1 is a pole of the transfer function", line: 2, col: 3},
		{src: "H = 1/(s + 1)\nH(1, 2)", err: "a transfer function is evaluated at one number", line: 2, col: 2},
		{src: "(s + 1)^300", err: "A transfer function can be raised to a whole power up to 100", line: 1, col: 8},
		{src: "(s^3 + 1)^90", err: "degree above the limit of 200", line: 1, col: 10},
		{src: "h = (s + 1)^100\nh*h*h", err: "a transfer function of degree 300 is beyond the limit of 200", line: 2, col: 4},
	})
}

func TestPrintShowClear(t *testing.T) {
	s := NewSession(Options{Dir: t.TempDir()})
	r := &recorder{}
	cleared := 0
	out := &clearCounter{recorder: r, n: &cleared}
	if _, err := s.Run(context.Background(), "print(\"a\", 1, 2j, true)\nwarn([1, 2])\nclear()\nshow({k: 1})", out); err != nil {
		t.Fatal(err)
	}
	if r.stdout.String() != "a 1 2j true\n" || r.stderr.String() != "1\n2\n" || cleared != 1 {
		t.Errorf("stdout %q stderr %q cleared %d", r.stdout.String(), r.stderr.String(), cleared)
	}
	if len(r.displays) != 1 || FormatValue(r.displays[0]) != "{k: 1}" {
		t.Errorf("displays %v", r.displays)
	}
}

type clearCounter struct {
	*recorder
	n *int
}

func (c *clearCounter) ClearOutput(bool) { *c.n++ }

// pause ends at once when the cell is interrupted.
func TestPauseInterrupted(t *testing.T) {
	s := NewSession(Options{Dir: t.TempDir()})
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	_, err := s.Run(ctx, "pause(60)", nil)
	if err == nil || !strings.Contains(err.Error(), "interrupted") {
		t.Errorf("want an interrupt, got %v", err)
	}
}

// A standard second-order system: x” + 2 zeta wn x' + wn^2 x = wn^2 u with
// wn = 2, zeta = 0.1 (A = [[0, 1], [-4, -0.4]]): natural frequency 2 rad/s,
// damping ratio 0.1 (textbook second-order form, common practice).
func TestSystemAndModes(t *testing.T) {
	s := NewSession(Options{Dir: t.TempDir()})
	g := run(t, s, "G = system([[0, 1], [-4, -0.4]], [0, 4], [1, 0], states: [\"position\", \"velocity\"], inputs: [\"force\"], outputs: [\"position\"])\nG").(*lsys.System)
	if g.N() != 2 || g.M() != 1 || g.P() != 1 || g.StateNames[1] != "velocity" || g.InputNames[0] != "force" {
		t.Fatalf("system %v", FormatValue(g))
	}
	mt, err := s.Run(context.Background(), "modes(G)", nil)
	if err != nil {
		if strings.Contains(err.Error(), "not implemented") {
			t.Skip("modes waits for its numerics")
		}
		t.Fatal(err)
	}
	modes := mt.(*lsys.ModeTable).Modes
	if len(modes) != 1 || !modes[0].Pair {
		t.Fatalf("modes %+v", modes)
	}
	if math.Abs(modes[0].NaturalFreq-2) > 1e-12 || math.Abs(modes[0].Damping-0.1) > 1e-12 {
		t.Errorf("wn %v zeta %v, want 2 and 0.1", modes[0].NaturalFreq, modes[0].Damping)
	}
	// C given as a plain list is one output row; D as a number.
	h := run(t, s, "system([[0, 1], [-4, -0.4]], [0, 4], [1, 0], 0.5)").(*lsys.System)
	if h.D.At(0, 0) != 0.5 || h.C.At(0, 0) != 1 {
		t.Errorf("C %v D %v", h.C, h.D)
	}
	// Sampled, from a transfer function in z.
	d := run(t, s, "system(0.1/(z - 0.9), every: 0.1)").(*lsys.System)
	if d.Ts != 0.1 || d.N() != 1 {
		t.Errorf("sampled: %v", FormatValue(d))
	}
	if p, _ := lsys.Poles(d); len(p) != 1 || cmplx.Abs(p[0]-0.9) > 1e-12 {
		t.Errorf("pole %v, want 0.9", p)
	}
}

// Transfer functions and transfer matrices become systems where needed;
// series and parallel connections. Reference: the poles of the product
// and the sum are those of the factors (facts of the trade), and the
// steady-state gain of a series connection is the product of the gains.
func TestTransferFunctionsAndConnections(t *testing.T) {
	s := NewSession(Options{Dir: t.TempDir()})
	g := run(t, s, "system(5/(s^2 + 2*s + 5))").(*lsys.System)
	if g.N() != 2 {
		t.Fatalf("order %d, want 2", g.N())
	}
	dc := func(g *lsys.System) float64 {
		// y/u at s = 0: D - C A^-1 B.
		var x mat.Dense
		if err := x.Solve(g.A, g.B); err != nil {
			t.Fatal(err)
		}
		var cx mat.Dense
		cx.Mul(g.C, &x)
		return g.D.At(0, 0) - cx.At(0, 0)
	}
	if k := dc(g); math.Abs(k-1) > 1e-12 {
		t.Errorf("steady-state gain %v, want 1", k)
	}
	ser, err := s.Run(context.Background(), "G = system(5/(s^2 + 2*s + 5))\nK = system(2/(s + 4))\nG * K", nil)
	if err != nil {
		t.Fatal(err)
	}
	sg := ser.(*lsys.System)
	if sg.N() != 3 || math.Abs(dc(sg)-0.5) > 1e-12 {
		t.Errorf("series: order %d gain %v, want 3 and 0.5", sg.N(), dc(sg))
	}
	par := run(t, s, "G + K").(*lsys.System)
	if par.N() != 3 || math.Abs(dc(par)-1.5) > 1e-12 {
		t.Errorf("parallel: order %d gain %v, want 3 and 1.5", par.N(), dc(par))
	}
	diff := run(t, s, "G - K").(*lsys.System)
	if math.Abs(dc(diff)-0.5) > 1e-12 {
		t.Errorf("difference gain %v, want 0.5", dc(diff))
	}
	scaled := run(t, s, "3 * G").(*lsys.System)
	if math.Abs(dc(scaled)-3) > 1e-12 {
		t.Errorf("3*G gain %v", dc(scaled))
	}
	neg := run(t, s, "-G").(*lsys.System)
	if math.Abs(dc(neg)+1) > 1e-12 {
		t.Errorf("-G gain %v", dc(neg))
	}
	mixed := run(t, s, "G * (1/(s + 1))").(*lsys.System)
	if mixed.N() != 3 {
		t.Errorf("system times transfer function: order %d", mixed.N())
	}
	// A 2x2 transfer matrix.
	tm := run(t, s, "system([[1/(s + 1), 0], [0, 2/(s + 3)]])").(*lsys.System)
	if tm.M() != 2 || tm.P() != 2 || tm.N() != 2 {
		t.Errorf("transfer matrix: %v", FormatValue(tm))
	}
	for _, c := range []struct{ src, err string }{
		{"G * system([[-1, 0], [0, -2]])", "cannot connect in series: the left system has 1 input but the right one has 2 outputs"},
		{"G + system([[-1, 0], [0, -2]])", "cannot connect in parallel"},
		{"G / K", "cannot divide a system by a system"},
		{"G * \"a\"", "cannot multiply a system by a string"},
	} {
		_, err := s.Run(context.Background(), c.src, nil)
		if err == nil || !strings.Contains(err.Error(), c.err) {
			t.Errorf("%s: %v, want %q", c.src, err, c.err)
		}
	}
}

func TestMatrixSizeLimit(t *testing.T) {
	runCells(t, []cell{
		{src: "identity(3000)", err: "the size must be between 1 and 1000", line: 1, col: 10},
		{src: "diagonal(linear(0, 1, n: 3000))", err: "larger than the limit of 1000000 entries", line: 1, col: 10},
		{src: "v = linear(0, 1, n: 3000)\nv * transpose(v)", err: "a 3000x3000 matrix is larger than the limit", line: 2, col: 3},
	})
}

// Every built-in appears in at least one test of this package: a call
// name( or, for constants, the bare name in a test cell.
func TestEveryBuiltinTested(t *testing.T) {
	files, _ := filepath.Glob("*_test.go")
	var all strings.Builder
	for _, f := range files {
		if f == "fuzz_test.go" {
			continue
		}
		b, err := os.ReadFile(f)
		if err != nil {
			t.Fatal(err)
		}
		all.Write(b)
	}
	text := all.String()
	for _, b := range Builtins() {
		pat := `\b` + regexp.QuoteMeta(b.Name) + `\(`
		if b.Fn == nil {
			pat = `"[^"\n]*\b` + regexp.QuoteMeta(b.Name) + `\b`
		}
		if regexp.MustCompile(pat).MatchString(text) {
			continue
		}
		if strings.HasPrefix(b.file, "builtins_core") || strings.HasPrefix(b.file, "builtins_models") {
			t.Errorf("built-in %s (from %s) has no test", b.Name, b.file)
		} else {
			t.Logf("built-in %s (from %s) has no test in this package yet", b.Name, b.file)
		}
	}
}

// The text option of a session formats analysis results for print and
// inspect, in records and lists too; a session without it, or another
// session in the same process, is not affected.
func TestTextOption(t *testing.T) {
	type opaque struct{ a int }
	if got := FormatValue(&opaque{1}); !strings.Contains(got, "show(x) displays it") {
		t.Errorf("without a formatter: %q", got)
	}
	text := func(v any) (string, bool) {
		if _, ok := v.(*opaque); ok {
			return "opaque text", true
		}
		return "", false
	}
	s := NewSession(Options{Text: text})
	if got := s.Format(&opaque{1}); got != "opaque text" {
		t.Errorf("with a formatter: %q", got)
	}
	rec := &Record{Names: []string{"x"}, Values: []any{&List{Items: []any{&opaque{1}}}}}
	if got := s.Format(rec); got != "{x: [opaque text]}" {
		t.Errorf("record with a formatter: %q", got)
	}
	if got := NewSession(Options{}).Format(&opaque{1}); !strings.Contains(got, "show(x) displays it") {
		t.Errorf("a second session without the option: %q", got)
	}
}

// Evaluation, completion and inspection read fields through one protocol:
// a field of an analysis result completes and inspects like a record's.
func TestOneFieldProtocol(t *testing.T) {
	s := NewSession(Options{Dir: t.TempDir()})
	if _, err := s.Run(context.Background(), "G = system([[-1, 0], [0, -2]], [[1], [1]], [[1, 1]])\nz = zeros(G)\nr = {z: z}", nil); err != nil {
		t.Fatal(err)
	}
	for _, src := range []string{"z.invariant", "r.z.invariant", "G.A"} {
		if _, err := s.Run(context.Background(), src, nil); err != nil {
			t.Errorf("%s: %v", src, err)
		}
		if text, found := s.Inspect(src, len([]rune(src))); !found || !strings.HasPrefix(text, src[strings.LastIndexByte(src, '.')+1:]+": ") {
			t.Errorf("inspect %s: %v %q", src, found, text)
		}
	}
	matches, _, _ := s.Complete("r.z.inv", len("r.z.inv"))
	if len(matches) != 1 || matches[0] != "invariant" {
		t.Errorf("completion after r.z.: %v", matches)
	}
	_, err := s.Run(context.Background(), "z.invarient", nil)
	if err == nil || !strings.Contains(err.Error(), "did you mean 'invariant'") {
		t.Errorf("misspelt field: %v", err)
	}
}
