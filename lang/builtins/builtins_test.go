package builtins_test

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

	"lsys/lang"
	"lsys/lang/builtins"
	"lsys/lang/langtest"
	"lsys/lsys"
)

// Values of the core built-ins. Sources: trigonometric and exponential
// values from the standard tables (common practice); matrix results worked
// by hand (2x2 inverse by the adjugate, Cramer's rule); exp of a nilpotent
// matrix from its series, exp(t [[0, 1], [-1, 0]]) the rotation matrix.
func TestBuiltinValues(t *testing.T) {
	langtest.RunCells(t, []langtest.Cell{
		{Src: "sin(pi/6)", Want: "0.5"},
		{Src: "cos(pi/3)", Want: "0.5"},
		{Src: "tan(pi/4)", Want: "1"},
		{Src: "exp(1)", Want: "2.718281828"},
		{Src: "log(exp(2))", Want: "2"},
		{Src: "log(-1)", Want: "3.141592654j"}, // principal branch: log(-1) = j pi
		{Src: "sqrt(2)", Want: "1.414213562"},
		{Src: "sqrt(-4)", Want: "2j"},
		{Src: "abs(-3)", Want: "3"},
		{Src: "abs(3 + 4j)", Want: "5"},
		{Src: "real(-1 + 2j)", Want: "-1"},
		{Src: "imag(-1 + 2j)", Want: "2"},
		{Src: "phase(1j)", Want: "1.570796327"},
		{Src: "phase(-1)", Want: "3.141592654"},
		{Src: "conjugate(-1 + 2j)", Want: "-1 - 2j"},
		{Src: "exp([[0, 1], [0, 0]])", Want: "1  1\n0  1"},
		{Src: "t = pi/2\nexp(t*[[0, 1], [-1, 0]])[1, 2]", Want: "1"},
		{Src: "identity(2)", Want: "1  0\n0  1"},
		{Src: "diagonal([1, 2])", Want: "1  0\n0  2"},
		{Src: "diagonal([[1, 2], [3, 4]])", Want: "1\n4"},
		{Src: "transpose([[1, 2], [3, 4]])", Want: "1  3\n2  4"},
		{Src: "transpose([1, 2, 3])", Want: "1  2  3"},
		{Src: "inverse([[2, 1], [1, 3]]) * 5", Want: " 3  -1\n-1   2"},
		{Src: "det([[2, 1], [1, 3]])", Want: "5"},
		{Src: "solve([[2, 1], [1, 3]], [3, 5])", Want: "0.8\n1.4"},
		{Src: "linear(0, 1, n: 5)", Want: "   0\n0.25\n 0.5\n0.75\n   1"},
		{Src: "logarithmic(0.1, 1000, n: 5)", Want: " 0.1\n   1\n  10\n 100\n1000"},
		{Src: "pi", Want: "3.141592654"},
		{Src: "inf", Want: "inf"},
		{Src: "-inf < 0", Want: "true"},
		{Src: "s", Want: "s"},
		{Src: "z", Want: "z"},
		{Src: "(s + 1)^2", Want: "s^2 + 2*s + 1"},
		{Src: "1/(s + 1) + 1/(s + 2)", Want: "(2*s + 3) / (s^2 + 3*s + 2)"},
		{Src: "2/(2*s + 4)", Want: "1 / (s + 2)"},
		{Src: "(s + 1)/(s + 1)", Want: "(s + 1) / (s + 1)"}, // no silent cancellation
		{Src: "0.1/(z - 0.9)", Want: "0.1 / (z - 0.9)"},
		{Src: "H = 5/(s^2 + 2*s + 5)\nH(0)", Want: "1"},   // steady-state gain
		{Src: "H = 1/(s + 1)\nH(1j)", Want: "0.5 - 0.5j"}, // 1/(1 + j) by hand
		{Src: "x = [1, 2j]\nx[2]", Want: "2j"},
		{Src: "[[1, 2j], [3, 4]][2, 1]", Want: "3"},
		{Src: "[1, 2j] + [1, -2j]", Want: "2\n0"}, // real again: exact zeros
		{Src: "[[1, 1j]] * [1j, 1]", Want: "2j"},  // 1*1j + 1j*1 (by hand)
		{Src: "1j * [[1, 2]]", Want: "1j  2j"},
		{Src: "[[2j, 4]] / 2", Want: "1j  2"},
		{Src: "x = [1j, 1]\nx - x", Want: "0\n0"},
		{Src: "abs([3 + 4j, -1])", Want: "5\n1"},
		{Src: "real([1 + 2j, 3])", Want: "1\n3"},
		{Src: "imag([[1 + 2j, 3]])", Want: "2  0"},
		{Src: "conjugate([1j])", Want: "-1j"},
		{Src: "phase([-1, 1j])", Want: "3.141592654\n1.570796327"},
		{Src: "transpose([1j, 2])", Want: "1j  2"},
		{Src: "pause(0)", Want: "(nothing)"},
		{Src: "clear()", Want: "(nothing)"},
		{Src: "clear(wait: true)", Want: "(nothing)"},
		{Src: "print(\"a\")", Want: "(nothing)"},
		{Src: "warn(\"a\")", Want: "(nothing)"},
		{Src: "show(1)", Want: "(nothing)"},
	})
}

func TestBuiltinErrors(t *testing.T) {
	langtest.RunCells(t, []langtest.Cell{
		{Src: "sin(\"a\")", Err: "sin: the argument 'x' must be a number, not a string", Line: 1, Col: 5},
		{Src: "sin([1, 2])", Err: "must be a number, not a vector of 2", Line: 1, Col: 5},
		{Src: "exp([[1, 2]])", Err: "exp of a matrix needs a square matrix, not a 1x2 one", Line: 1, Col: 5},
		{Src: "exp(1000)", Err: "exp(1000) is not a finite number", Line: 1, Col: 5},
		{Src: "identity(0)", Err: "the size must be between 1 and", Line: 1, Col: 10},
		{Src: "identity(1.5)", Err: "must be a whole number", Line: 1, Col: 10},
		{Src: "diagonal([[1, 2, 3], [4, 5, 6]])", Err: "diagonal needs a vector or a square matrix, not a 2x3 matrix", Line: 1, Col: 10},
		{Src: "inverse([[1, 2], [2, 4]])", Err: "the matrix is singular", Line: 1, Col: 9},
		{Src: "det([[1, 2]])", Err: "det needs a square matrix, not a 1x2 one", Line: 1, Col: 5},
		{Src: "solve([[2, 1], [1, 3]], [1, 2, 3])", Err: "A is 2x2 but b is 3x1: b needs 2 rows", Line: 1, Col: 25},
		{Src: "solve([[1, 2], [2, 4]], [1, 2])", Err: "A is singular", Line: 1, Col: 7},
		{Src: "linear(0, 1, n: 1)", Err: "n must be between 2 and", Line: 1, Col: 17},
		{Src: "logarithmic(0, 1)", Err: "a logarithmic grid needs a > 0 and b > 0", Line: 1, Col: 13},
		{Src: "pause(-1)", Err: "pause takes 0 to 3600 seconds", Line: 1, Col: 7},
		{Src: "clear(wait: 1)", Err: "must be true or false", Line: 1, Col: 13},
		{Src: "show()", Err: "show needs the argument 'value'", Line: 1, Col: 1},
		{Src: "system([[0, 1], [0, 0]], [0, 1], every: -1)", Err: "the sample time must be finite and >= 0", Line: 1, Col: 41},
		{Src: "system([[-1]], [1], states: [\"a\", \"b\"])", Err: "2 state names given for a system with 1 state", Line: 1, Col: 29},
		{Src: "system([[-1, 0], [0, -2]], states: [\"a\", \"a\"])", Err: "the name \"a\" appears twice", Line: 1, Col: 36},
		{Src: "system([[inf]])", Err: "entry 1 is inf; matrices hold finite numbers only", Line: 1, Col: 10},
		{Src: "system(0.1/(z - 0.9))", Err: "has no sample time yet", Line: 1, Col: 8},
		{Src: "s + z", Err: "cannot combine a transfer function in s with one in z", Line: 1, Col: 3},
		{Src: "modes(\"G\")", Err: "modes: the argument 'system' must be a system, not a string", Line: 1, Col: 7},
		{Src: "1/(s - s)", Err: "division by zero", Line: 1, Col: 2},
		{Src: "system([[]])", Err: "a transfer matrix needs at least one column", Line: 1, Col: 8},
		{Src: "[1j, 2] + [1, 2, 3]", Err: "cannot add a 2x1 and a 3x1 matrix", Line: 1, Col: 9},
		{Src: "[1j, 2] / [1, 2]", Err: "cannot divide a complex vector of 2 by a vector of 2", Line: 1, Col: 9},
		{Src: "H = 1/(s + 1)\nH(-1)", Err: "-1 is a pole of the transfer function", Line: 2, Col: 3},
		{Src: "H = 1/(s + 1)\nH(1, 2)", Err: "a transfer function is evaluated at one number", Line: 2, Col: 2},
		{Src: "(s + 1)^300", Err: "A transfer function can be raised to a whole power up to 100", Line: 1, Col: 8},
		{Src: "(s^3 + 1)^90", Err: "degree above the limit of 200", Line: 1, Col: 10},
		{Src: "h = (s + 1)^100\nh*h*h", Err: "a transfer function of degree 300 is beyond the limit of 200", Line: 2, Col: 4},
	})
}

func TestPrintShowClear(t *testing.T) {
	s := lang.NewSession(lang.Options{Builtins: builtins.Registry(), Dir: t.TempDir()})
	r := &langtest.Recorder{}
	cleared := 0
	out := &clearCounter{Recorder: r, n: &cleared}
	if _, err := s.Run(context.Background(), "print(\"a\", 1, 2j, true)\nwarn([1, 2])\nclear()\nshow({k: 1})", out); err != nil {
		t.Fatal(err)
	}
	if r.Out.String() != "a 1 2j true\n" || r.Err.String() != "1\n2\n" || cleared != 1 {
		t.Errorf("stdout %q stderr %q cleared %d", r.Out.String(), r.Err.String(), cleared)
	}
	if len(r.Displays) != 1 || lang.FormatValue(r.Displays[0]) != "{k: 1}" {
		t.Errorf("displays %v", r.Displays)
	}
}

type clearCounter struct {
	*langtest.Recorder
	n *int
}

func (c *clearCounter) ClearOutput(bool) { *c.n++ }

// pause ends at once when the cell is interrupted.
func TestPauseInterrupted(t *testing.T) {
	s := lang.NewSession(lang.Options{Builtins: builtins.Registry(), Dir: t.TempDir()})
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
	s := lang.NewSession(lang.Options{Builtins: builtins.Registry(), Dir: t.TempDir()})
	g := langtest.Run(t, s, "G = system([[0, 1], [-4, -0.4]], [0, 4], [1, 0], states: [\"position\", \"velocity\"], inputs: [\"force\"], outputs: [\"position\"])\nG").(*lsys.System)
	if g.N() != 2 || g.M() != 1 || g.P() != 1 || g.StateNames[1] != "velocity" || g.InputNames[0] != "force" {
		t.Fatalf("system %v", lang.FormatValue(g))
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
	h := langtest.Run(t, s, "system([[0, 1], [-4, -0.4]], [0, 4], [1, 0], 0.5)").(*lsys.System)
	if h.D.At(0, 0) != 0.5 || h.C.At(0, 0) != 1 {
		t.Errorf("C %v D %v", h.C, h.D)
	}
	// Sampled, from a transfer function in z.
	d := langtest.Run(t, s, "system(0.1/(z - 0.9), every: 0.1)").(*lsys.System)
	if d.Ts != 0.1 || d.N() != 1 {
		t.Errorf("sampled: %v", lang.FormatValue(d))
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
	s := lang.NewSession(lang.Options{Builtins: builtins.Registry(), Dir: t.TempDir()})
	g := langtest.Run(t, s, "system(5/(s^2 + 2*s + 5))").(*lsys.System)
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
	par := langtest.Run(t, s, "G + K").(*lsys.System)
	if par.N() != 3 || math.Abs(dc(par)-1.5) > 1e-12 {
		t.Errorf("parallel: order %d gain %v, want 3 and 1.5", par.N(), dc(par))
	}
	diff := langtest.Run(t, s, "G - K").(*lsys.System)
	if math.Abs(dc(diff)-0.5) > 1e-12 {
		t.Errorf("difference gain %v, want 0.5", dc(diff))
	}
	scaled := langtest.Run(t, s, "3 * G").(*lsys.System)
	if math.Abs(dc(scaled)-3) > 1e-12 {
		t.Errorf("3*G gain %v", dc(scaled))
	}
	neg := langtest.Run(t, s, "-G").(*lsys.System)
	if math.Abs(dc(neg)+1) > 1e-12 {
		t.Errorf("-G gain %v", dc(neg))
	}
	mixed := langtest.Run(t, s, "G * (1/(s + 1))").(*lsys.System)
	if mixed.N() != 3 {
		t.Errorf("system times transfer function: order %d", mixed.N())
	}
	// A 2x2 transfer matrix.
	tm := langtest.Run(t, s, "system([[1/(s + 1), 0], [0, 2/(s + 3)]])").(*lsys.System)
	if tm.M() != 2 || tm.P() != 2 || tm.N() != 2 {
		t.Errorf("transfer matrix: %v", lang.FormatValue(tm))
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
	langtest.RunCells(t, []langtest.Cell{
		{Src: "identity(3000)", Err: "the size must be between 1 and 1000", Line: 1, Col: 10},
		{Src: "diagonal(linear(0, 1, n: 3000))", Err: "larger than the limit of 1000000 entries", Line: 1, Col: 10},
		{Src: "v = linear(0, 1, n: 3000)\nv * transpose(v)", Err: "a 3000x3000 matrix is larger than the limit", Line: 2, Col: 3},
	})
}

// Every built-in appears in at least one test of this package: a call
// name( or, for constants, the bare name in a test cell.
func TestEveryBuiltinTested(t *testing.T) {
	// The tests of the language (../) call built-ins too.
	files, _ := filepath.Glob("*_test.go")
	more, _ := filepath.Glob("../*_test.go")
	files = append(files, more...)
	var all strings.Builder
	for _, f := range files {
		if filepath.Base(f) == "fuzz_test.go" {
			continue
		}
		b, err := os.ReadFile(f)
		if err != nil {
			t.Fatal(err)
		}
		all.Write(b)
	}
	text := all.String()
	for _, b := range builtins.Registry().Builtins() {
		pat := `\b` + regexp.QuoteMeta(b.Name) + `\(`
		if b.Fn == nil {
			pat = `"[^"\n]*\b` + regexp.QuoteMeta(b.Name) + `\b`
		}
		if regexp.MustCompile(pat).MatchString(text) {
			continue
		}
		if b.File() == "core.go" || b.File() == "models.go" {
			t.Errorf("built-in %s (from %s) has no test", b.Name, b.File())
		} else {
			t.Logf("built-in %s (from %s) has no test yet", b.Name, b.File())
		}
	}
}

// The text option of a session formats analysis results for print and
// inspect, in records and lists too; a session without it, or another
// session in the same process, is not affected.
func TestTextOption(t *testing.T) {
	type opaque struct{ a int }
	if got := lang.FormatValue(&opaque{1}); !strings.Contains(got, "show(x) displays it") {
		t.Errorf("without a formatter: %q", got)
	}
	text := func(v any) (string, bool) {
		if _, ok := v.(*opaque); ok {
			return "opaque text", true
		}
		return "", false
	}
	s := lang.NewSession(lang.Options{Builtins: builtins.Registry(), Text: text})
	if got := s.Format(&opaque{1}); got != "opaque text" {
		t.Errorf("with a formatter: %q", got)
	}
	rec := &lang.Record{Names: []string{"x"}, Values: []any{&lang.List{Items: []any{&opaque{1}}}}}
	if got := s.Format(rec); got != "{x: [opaque text]}" {
		t.Errorf("record with a formatter: %q", got)
	}
	if got := lang.NewSession(lang.Options{Builtins: builtins.Registry()}).Format(&opaque{1}); !strings.Contains(got, "show(x) displays it") {
		t.Errorf("a second session without the option: %q", got)
	}
}

// Evaluation, completion and inspection read fields through one protocol:
// a field of an analysis result completes and inspects like a record's.
func TestOneFieldProtocol(t *testing.T) {
	s := lang.NewSession(lang.Options{Builtins: builtins.Registry(), Dir: t.TempDir()})
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
