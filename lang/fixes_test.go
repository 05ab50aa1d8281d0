package lang_test

import (
	"context"
	"errors"
	"regexp"
	"testing"

	"lsys/lang"
	"lsys/lang/builtins"
	"lsys/lang/langtest"
	"lsys/lang/syntax"
	"lsys/lsys"
)

// The shift variable z takes its sample time from what it is combined
// with (SPEC sections 5 and 8). Reference values: the zero-order-hold
// equivalent of 1/(s + 1) sampled every T is (1 - e^-T)/(z - e^-T)
// (Franklin, Powell & Workman, Digital Control of Dynamic Systems, 3rd ed.
// 1998, table of ZOH equivalents; from memory), so with T = 0.1 its pole is
// e^-0.1 = 0.904837418 (standard tables); 1/z adds a pole at 0 and keeps
// the steady-state gain 1 (z = 1).
func TestShiftVariableTakesSampleTime(t *testing.T) {
	const gz = "Gz = sample(system(1/(s + 1)), 0.1)\n"
	langtest.RunCells(t, []langtest.Cell{
		{Src: gz + "poles(Gz * (1/z))", Want: "0.904837418\n          0"},
		{Src: gz + "poles((1/z) * Gz)", Want: "0.904837418\n          0"},
		{Src: gz + "gain(Gz * (1/z))", Want: "1"},
		{Src: gz + "(Gz * (1/z)).every", Want: "0.1"},
		{Src: "Gz = sample(system(1/(s + 1)), 5e-6)\n(Gz * (1/z)).every", Want: "5e-06"},
		{Src: gz + "poles(Gz + 1/z)", Want: "0.904837418\n          0"},
		{Src: gz + "(Gz - 0.5/z^2).every", Want: "0.1"},
		// A transfer matrix: open z entries and constants take the sample time.
		{Src: gz + "(Gz * [[1/z, 1]]).every", Want: "0.1"},
		{Src: "system([[0.1/(z - 0.9), 1]], every: 0.5).every", Want: "0.5"},
		// Nothing to take it from.
		{Src: "system(0.1/(z - 0.9))", Err: "this transfer function in z has no sample time yet", Line: 1, Col: 8},
		{Src: "G = system(1/(s + 1))\nG * (1/z)", Err: "cannot combine a transfer function in z with a continuous system", Line: 2, Col: 3},
		{Src: "G = system(1/(s + 1))\n(1/z) + G", Err: "cannot combine a transfer function in z with a continuous system", Line: 2, Col: 7},
		{Src: gz + "Gz * sample(system(1/(s + 2)), 0.2)", Err: "sample time", Line: 2, Col: 4},
		// Arguments of one call: closing the loop through one sample of
		// delay, G = b/(z - a) with a = e^-0.1, b = 1 - a, K = 1/z, has the
		// characteristic polynomial z^2 - a z + b, roots
		// (a +- sqrt(a^2 - 4b))/2 = 0.7833569303, 0.1214804877 (closed form).
		{Src: gz + "poles(closeloop(Gz, through: 1/z))", Want: "0.7833569303\n0.1214804877"},
		{Src: gz + "stack(Gz, 1/z).every", Want: "0.1"},
		{Src: gz + "stack(Gz, sample(system(1/(s + 2)), 0.2), 1/z)", Err: "this transfer function in z has no sample time yet", Line: 2, Col: 43},
	})
}

// Static gains with no states (SPEC section 8: system(D: M); section 5: a
// matrix next to a system). Reference values by hand: the plant
// diag(1/(s + 1), 1/(s + 2)) driven by one input has the steady-state
// gains 1 and 0.5 (closed form, G(0) = -C A^-1 B), so [[1, -1]] * G has
// 1 - 0.5 = 0.5 and [[2, 3]] * G has 2 + 1.5 = 3.5.
func TestStaticGainSystems(t *testing.T) {
	const g = "G = system([[-1, 0], [0, -2]], [[1], [1]], identity(2))\n"
	const sum = `S = system(D: [[1, -1]], inputs: ["ref", "v_out"], outputs: ["error"])` + "\n"
	langtest.RunCells(t, []langtest.Cell{
		{Src: sum + "S.D", Want: "1  -1"},
		{Src: sum + "S.inputs", Want: `["ref", "v_out"]`},
		{Src: sum + "S.outputs", Want: `["error"]`},
		{Src: sum + "poles(S)", Want: "[]"},
		{Src: "system(D: 2, every: 0.1).every", Want: "0.1"},
		{Src: "gain(system(D: [[1, -1], [0, 3]]))", Want: "1  -1\n0   3"},
		{Src: g + "gain([[1, -1]] * G)", Want: "0.5"},
		{Src: g + "gain([[2, 3]] * G)", Want: "3.5"},
		{Src: g + "gain(G * [[1, -1]])", Want: "  1    -1\n0.5  -0.5"},
		{Src: g + "gain(G + [[1], [2]])", Want: "  2\n2.5"},
		{Src: g + "gain([[1], [2]] - G)", Want: "  0\n1.5"},
		// A summing junction wired by connect: error = ref - angle around
		// the integrator plant 1/s with unit gain gives the closed loop
		// 1/(s + 1), steady-state gain 1 (closed form).
		{Src: sum + `P = system(1/s, inputs: ["error"], outputs: ["v_out"])` + "\n" +
			`T = wire(S, P, outputs: ["v_out"])` + "\npoles(T)", Want: "-1"},
		{Src: `system([[1, -1]], inputs: ["ref", "v_out"], outputs: ["error"])`, Err: "give D alone: system(D: M); here M is 1x2, 2 inputs and 1 output", Line: 1, Col: 8},
		{Src: "system(B: [1])", Err: "system needs the state matrix A, or only D for a static gain", Line: 1, Col: 1},
		{Src: "system(D: [[1, -1]], C: [1])", Err: "system needs the state matrix A, or only D for a static gain", Line: 1, Col: 1},
		{Src: "system()", Err: "system needs the state matrix A, or only D for a static gain", Line: 1, Col: 1},
		{Src: `system(D: "a")`, Err: "the argument 'D' must be a real matrix or vector, not a string", Line: 1, Col: 11},
		{Src: `system(D: [[1, -1]], inputs: ["ref"])`, Err: "1 input names given for a system with 2 inputs", Line: 1, Col: 30},
		{Src: g + "G + [[1, -1]]", Err: "cannot connect in parallel a system with 1 input and 2 outputs to one with 2 inputs and 1 output", Line: 2, Col: 3},
		{Src: g + "[[1, -1, 1]] * G", Err: "cannot connect in series: the left system has 3 inputs but the right one has 2 outputs", Line: 2, Col: 14},
	})
}

// goSyntax matches Go type syntax that must never reach a message.
var goSyntax = regexp.MustCompile(`\*|\blang\.|\blsys\.|\bmat\.|\[\]|\bfloat64\b|\bcomplex128\b|\bmap\[`)

// No Go type name leaks into what the user reads: every value a built-in's
// example gives, and every field of it, is named in words, and a
// misspelt field on it gives a message in words.
func TestTypeNamesInWords(t *testing.T) {
	for _, b := range builtins.Registry().Builtins() {
		for _, ex := range b.Examples {
			s := lang.NewSession(lang.Options{Builtins: builtins.Registry(), Dir: t.TempDir()})
			v, err := s.Run(context.Background(), ex, &langtest.Recorder{})
			if err != nil || v == nil {
				continue
			}
			if n := builtins.Registry().TypeName(v); goSyntax.MatchString(n) {
				t.Errorf("%s example: the result is named %q", b.Name, n)
			}
			s.Set("value", v)
			for _, f := range lang.FieldNames(s, v) {
				fv, err := s.Run(context.Background(), "value."+f, &langtest.Recorder{})
				if err != nil {
					// Some listed fields are empty for some values (A of
					// a static gain); the message must still be in words.
					if goSyntax.MatchString(err.Error()) {
						t.Errorf("%s example: field %s: %v", b.Name, f, err)
					}
					continue
				}
				if n := builtins.Registry().TypeName(fv); goSyntax.MatchString(n) {
					t.Errorf("%s example: field %s is named %q", b.Name, f, n)
				}
			}
			_, err = s.Run(context.Background(), "value.qqqqqq", &langtest.Recorder{})
			if err != nil && goSyntax.MatchString(err.Error()) {
				t.Errorf("%s example: %v", b.Name, err)
			}
		}
	}
	if n := lang.WordsOfType(&lsys.PoleZeroMap{}); n != "a result (pole zero map)" {
		t.Errorf("fallback name %q", n)
	}
}

// Misspelt fields name the type in words and suggest the nearest field
// or signal (crane-like pendulum model; names as in the notebooks).
func TestFieldErrorsInWords(t *testing.T) {
	const crane = "g = 9.81; L = 2\ncrane = system {\n  states x, v, theta, omega\n  inputs force\n" +
		"  x' = v\n  v' = force\n  theta' = omega\n  omega' = -(g/L)*sin(theta) - force/L\n}\n"
	langtest.RunCells(t, []langtest.Cell{
		{Src: crane + "crane.omegaa", Err: "a nonlinear model has no field 'omegaa'; did you mean the signal 'omega'?", Line: 10, Col: 7},
		{Src: crane + "crane.omega", Err: "a nonlinear model has no field 'omega'", Line: 10, Col: 7},
		{Src: crane + "crane.stats", Err: "a nonlinear model has no field 'stats'; did you mean 'states'?", Line: 10, Col: 7},
		{Src: crane + "crane.inputs", Want: `["force"]`},
		{Src: crane + "e = equilibrium(crane, inputs: {force: 0})\ne.residul", Err: "a steady state (equilibrium) has no field 'residul'; did you mean 'residual'?", Line: 11, Col: 3},
		{Src: crane + "crane[1]", Err: "a nonlinear model cannot be indexed", Line: 10, Col: 6},
		{Src: crane + "crane + 1", Err: "this is a nonlinear model, not a linear system", Line: 10, Col: 7},
		{Src: "p = polezero(1/(s + 1))\np.pols", Err: "a pole-zero map has no field 'pols'; did you mean 'poles'?", Line: 2, Col: 3},
	})
}

// A state's derivative used on a right-hand side is refused with a hint to
// define a helper, once, with no follow-on error at the block's brace; the
// parser goes on with the next equation (SPEC section 9: one error per
// line). The helper form gives the matrices of the hand-derived model
// (common practice: x' = A x + B u read off the equations).
func TestDerivativeOnRightHandSide(t *testing.T) {
	const head = "m = system {\n  states v, omega\n  inputs f\n  v' = f\n"
	langtest.RunCells(t, []langtest.Cell{
		{Src: head + "  omega' = -(v'/2)\n}", Err: "the derivative v' cannot be used on a right-hand side", Line: 5, Col: 15},
		{Src: head + "  omega' = -v' / 2\n}", Err: "Define a helper with the right-hand side of v' (dv = ...)", Line: 5, Col: 14},
		{Src: "m = system {\n  states v, omega\n  inputs f\n  dv = f\n  v' = dv\n  omega' = -dv/2\n}\nm.B", Want: "   1\n-0.5"},
		{Src: "y = x'", Err: "a derivative x' can only be written inside system { ... }", Line: 1, Col: 6},
		{Src: "x' = 3", Err: "a derivative x' can only be written inside system { ... }", Line: 1, Col: 2},
	})
	s := lang.NewSession(lang.Options{Builtins: builtins.Registry(), Dir: t.TempDir()})
	_, err := s.Run(context.Background(), head+"  omega' = -(v'/2)\n}", &langtest.Recorder{})
	var l syntax.ErrorList
	if !errors.As(err, &l) || len(l) != 1 {
		t.Errorf("want exactly one error, got %v", err)
	}
	// Two bad equations: both reported.
	_, err = s.Run(context.Background(), "m = system {\n  states v, w\n  v' = w'\n  w' = v' + 1\n}", &langtest.Recorder{})
	if !errors.As(err, &l) || len(l) != 2 || l[0].Pos.Line != 3 || l[1].Pos.Line != 4 {
		t.Errorf("want two errors on lines 3 and 4, got %v", err)
	}
	for _, c := range []struct{ src, status string }{
		{"m = system {\n  states x\n  x' = (", "incomplete"},
		{"m = system {\n  states x\n  x' = x'\n}", "invalid"},
		{"m = system {\n  states x\n  x' = -x\n}", "complete"},
	} {
		if st, _ := s.IsComplete(c.src); st != c.status {
			t.Errorf("IsComplete(%q) = %q, want %q", c.src, st, c.status)
		}
	}
}

// An equilibrium that is one member of a family says so and gives the free
// directions (null space of df/dx at the result). References, hand-derived
// Jacobians (common practice): the crane trolley x' = v, v' = F,
// theta' = omega, omega' = -(g/L) sin(theta) - F/L has at rest
// J = [[0,1,0,0],[0,0,0,0],[0,0,0,1],[0,0,-g/L,0]], rank 3, null space
// the trolley position x; two tanks exchanging fluid, h1' = h2 - h1,
// h2' = (h1 - h2)(1 + h1^2), are at rest wherever h1 = h2, J has rank 1
// and null space (1, 1)/sqrt(2) = 0.7071067812; the pendulum
// angle' = rate, rate' = -9.81 sin(angle) - 0.1 rate at angle = pi has
// det J = -9.81 != 0: unique.
func TestEquilibriumFamily(t *testing.T) {
	const crane = "g = 9.81; L = 2\ncrane = system {\n  states x, v, theta, omega\n  inputs force\n" +
		"  x' = v\n  v' = force\n  theta' = omega\n  omega' = -(g/L)*sin(theta) - force/L\n}\n" +
		"e = equilibrium(crane, inputs: {force: 0}, guess: {x: 3, theta: 0.1})\n"
	const tanks = "tanks = system {\n  states h1, h2\n  h1' = h2 - h1\n  h2' = (h1 - h2)*(1 + h1^2)\n}\n" +
		"e = equilibrium(tanks, guess: {h1: 1, h2: 0.5})\n"
	const pendulum = "pendulum = system {\n  states angle, rate\n  inputs torque\n  angle' = rate\n" +
		"  rate' = -9.81*sin(angle) - 0.1*rate + torque\n}\ne = equilibrium(pendulum, inputs: {torque: 0}, guess: {angle: 3})\n"
	const masses = "two = system {\n  states x1, v1, x2, v2\n  x1' = v1\n  v1' = -v1\n  x2' = v2\n  v2' = -v2 + 0.1*v2^3\n}\n" +
		"e = equilibrium(two, guess: {x1: 1, x2: -2, v1: 0.1})\n"
	langtest.RunCells(t, []langtest.Cell{
		{Src: crane + "e.free", Want: "1\n0\n0\n0"},
		{Src: crane + "e.unique", Want: "false"},
		{Src: crane + "e.rank", Want: "3"},
		{Src: crane + "e.x", Want: "3"},
		{Src: tanks + "e.free", Want: "0.7071067812\n0.7071067812"},
		{Src: tanks + "[e.rank, abs(e.h1 - e.h2) < 1e-12]", Want: "[1, true]"},
		{Src: pendulum + "[e.unique, e.rank]", Want: "[true, 2]"},
		{Src: pendulum + "e.free", Want: "[]"},
		{Src: pendulum + "abs(e.angle - pi) < 1e-12", Want: "true"},
		// Two free positions: the projector onto the free directions does
		// not depend on the basis chosen.
		{Src: masses + "e.rank", Want: "2"},
		{Src: masses + "P = e.free * transpose(e.free)\n[P[1, 1], P[3, 3], P[2, 2], P[4, 4], P[1, 3]]", Want: "1\n1\n0\n0\n0"},
		// A system in matrix form: the state of least norm, and the family.
		{Src: "e = equilibrium(system([[0, 1], [0, -2]], [0, 1]), inputs: {u1: 0})\ne.free", Want: "1\n0"},
		{Src: "e = equilibrium(system([[0, 1], [0, -2]], [0, 1]), inputs: {u1: 0})\n[e.iterations, e.residual, e.rank, e.x1, e.x2]", Want: "1\n0\n1\n0\n0"},
		// Sampled: a and b swap each step; at rest wherever a = b (J = A - I =
		// [[-1, 1], [1, -1]], rank 1, null space (1, 1)/sqrt(2)).
		{Src: "m = system every 0.1 {\n  states a, b\n  next a = b\n  next b = a\n}\ne = equilibrium(m, guess: {a: 2, b: 2})\n[e.rank, e.free[1], e.free[2]]", Want: "           1\n0.7071067812\n0.7071067812"},
		{Src: pendulum + "e.fre", Err: "a steady state (equilibrium) has no field 'fre'; did you mean 'free'?", Line: 8, Col: 3},
	})
	// The verdict is lsys's own result type, which display renders
	// (display/equilibrium_test.go checks the words).
	s := lang.NewSession(lang.Options{Builtins: builtins.Registry(), Dir: t.TempDir()})
	if e, ok := langtest.Run(t, s, crane+"e").(*lsys.Equilibrium); !ok || e.Free == nil || e.MinNorm {
		t.Errorf("crane equilibrium: %#v", e)
	}
	if e := langtest.Run(t, s, pendulum+"e").(*lsys.Equilibrium); e.Free != nil {
		t.Errorf("pendulum equilibrium called a family: rank %d", e.Rank)
	}
}

// A number times a system is a static gain on the side it multiplies, named
// after the signals it meets: 0.05 * G and G * 0.05 keep G's names (issue
// 8, item 7; the rule of SPEC section 5 on scalar multiplication).
func TestScalarTimesSystemKeepsNames(t *testing.T) {
	const g = `G = system([[-1, 0], [0, -2]], [[1, 0], [0, 1]], [[1, 0], [0, 1]], inputs: ["force", "torque"], outputs: ["pos", "angle"])` + "\n"
	langtest.RunCells(t, []langtest.Cell{
		{Src: g + "(0.05 * G).outputs", Want: `["pos", "angle"]`},
		{Src: g + "(0.05 * G).inputs", Want: `["force", "torque"]`},
		{Src: g + "(G * 0.05).outputs", Want: `["pos", "angle"]`},
		{Src: g + "(G * 0.05).inputs", Want: `["force", "torque"]`},
		{Src: g + "(G + 2).outputs", Want: `["pos", "angle"]`},
		{Src: g + "(2 + G).inputs", Want: `["force", "torque"]`},
		{Src: g + "(2 - G).outputs", Want: `["pos", "angle"]`},
		// the gain itself: 0.05 times 1/(s + 1) at s = 0 (closed form)
		{Src: g + "gain(0.05 * G)[1, 1]", Want: "0.05"},
	})
}

// frequency(..., hz: true) shows Hz; its fields say their unit by name:
// .w in rad/s and .f in Hz whatever the display (issue 8, item 6). From
// 0.01 to 10 Hz, the first point is 0.01 Hz = 2 pi 0.01 rad/s (definition).
func TestFrequencyFieldsInStatedUnits(t *testing.T) {
	langtest.RunCells(t, []langtest.Cell{
		{Src: "frequency(1/(s + 1), from: 0.01, to: 10, hz: true).f[1]", Want: "0.01"},
		{Src: "frequency(1/(s + 1), from: 0.01, to: 10, hz: true).w[1]", Want: "0.06283185307"},
		{Src: "frequency(1/(s + 1), from: 0.01, to: 10).w[1]", Want: "0.01"},
	})
}
