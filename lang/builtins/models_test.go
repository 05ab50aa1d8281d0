package builtins_test

import (
	"context"
	"math"
	"math/cmplx"
	"strings"
	"testing"

	"gonum.org/v1/gonum/mat"

	"lsys/lang"
	"lsys/lang/builtins"
	"lsys/lang/langtest"
	"lsys/lang/syntax"
	"lsys/lsys"
)

func matNear(t *testing.T, what string, got, want *mat.Dense, tol float64) {
	t.Helper()
	if got == nil || want == nil {
		if got != want {
			t.Errorf("%s: got %v, want %v", what, got, want)
		}
		return
	}
	gr, gc := got.Dims()
	wr, wc := want.Dims()
	if gr != wr || gc != wc {
		t.Fatalf("%s: shape %dx%d, want %dx%d", what, gr, gc, wr, wc)
	}
	for i := 0; i < gr; i++ {
		for j := 0; j < gc; j++ {
			g, w := got.At(i, j), want.At(i, j)
			if math.Abs(g-w) > tol*math.Max(1, math.Abs(w)) {
				t.Errorf("%s[%d,%d] = %v, want %v", what, i+1, j+1, g, w)
			}
		}
	}
}

// The two-inertia drive (motor and payload coupled by a spring k and a
// damper b) in equation form against its matrix form written from Newton's
// second law by hand (common practice).
func TestEquationFormMatchesMatrixForm(t *testing.T) {
	s := lang.NewSession(lang.Options{Builtins: builtins.Registry(), Dir: t.TempDir()})
	g := langtest.Run(t, s, langtest.Gimbal).(*lsys.System)
	Jm, Jl, k, b := 2e-4, 6e-4, 3.1, 0.004
	A := mat.NewDense(4, 4, []float64{
		0, 1, 0, 0,
		-k / Jm, -b / Jm, k / Jm, b / Jm,
		0, 0, 0, 1,
		k / Jl, b / Jl, -k / Jl, -b / Jl,
	})
	B := mat.NewDense(4, 1, []float64{0, 1 / Jm, 0, 0})
	C := mat.NewDense(1, 4, []float64{0, 0, 0, 1})
	D := mat.NewDense(1, 1, []float64{0})
	matNear(t, "A", g.A, A, 1e-15)
	matNear(t, "B", g.B, B, 1e-15)
	matNear(t, "C", g.C, C, 0)
	matNear(t, "D", g.D, D, 0)
	if strings.Join(g.StateNames, ",") != "motor_angle,motor_rate,payload_angle,payload_rate" ||
		strings.Join(g.InputNames, ",") != "torque" || strings.Join(g.OutputNames, ",") != "speed" {
		t.Errorf("names %v %v %v", g.StateNames, g.InputNames, g.OutputNames)
	}
	// The same in matrix form through the language.
	m := langtest.Run(t, s, `system([[0, 1, 0, 0], [-k/Jm, -b/Jm, k/Jm, b/Jm], [0, 0, 0, 1], [k/Jl, b/Jl, -k/Jl, -b/Jl]], [0, 1/Jm, 0, 0], [0, 0, 0, 1])`).(*lsys.System)
	matNear(t, "A (matrix form)", m.A, g.A, 0)
	matNear(t, "B (matrix form)", m.B, g.B, 0)
	matNear(t, "C (matrix form)", m.C, g.C, 0)
	// Parameters are copied when the block is evaluated.
	langtest.Run(t, s, "k = 100")
	if got := langtest.Run(t, s, "gimbal.A[2, 1]").(float64); got != -3.1/2e-4 {
		t.Errorf("rebinding k changed the model: %v", got)
	}
}

// A sampled first-order tank, x[k+1] = a x[k] + (1 - a) u[k], in both forms;
// a feedthrough output and a helper definition.
func TestSampledBlockAndHelpers(t *testing.T) {
	s := lang.NewSession(lang.Options{Builtins: builtins.Registry(), Dir: t.TempDir()})
	g := langtest.Run(t, s, `a = 0.9
tank = system every 0.5 {
  states level
  inputs inflow
  outputs measured, total
  next level = a*level + (1 - a)*inflow
  spill = 0.1*inflow      # a helper, used below
  measured = 2*level
  total = level + spill
}
tank`).(*lsys.System)
	if g.Ts != 0.5 {
		t.Errorf("Ts = %v", g.Ts)
	}
	matNear(t, "A", g.A, mat.NewDense(1, 1, []float64{0.9}), 0)
	a := 0.9
	matNear(t, "B", g.B, mat.NewDense(1, 1, []float64{1 - a}), 0)
	matNear(t, "C", g.C, mat.NewDense(2, 1, []float64{2, 1}), 0)
	matNear(t, "D", g.D, mat.NewDense(2, 1, []float64{0, 0.1}), 0)
	// No outputs declared: every state is an output (C = I).
	h := langtest.Run(t, s, "system { states p, q; p' = q; q' = -p }").(*lsys.System)
	matNear(t, "C", h.C, mat.NewDense(2, 2, []float64{1, 0, 0, 1}), 0)
	if h.M() != 0 || strings.Join(h.OutputNames, ",") != "p,q" {
		t.Errorf("inputs %d, outputs %v", h.M(), h.OutputNames)
	}
	// Fields select signals.
	sp := langtest.Run(t, s, "tank.total").(*lsys.System)
	if sp.P() != 1 || sp.D.At(0, 0) != 0.1 {
		t.Errorf("tank.total: %v", lang.FormatValue(sp))
	}
}

// The pendulum angle” = -(g/L) sin(angle) - c angle' + torque linearized by
// hand: A = [[0, 1], [-(g/L) cos(a0), -c]], B = [0; 1], C = [L cos(a0), 0]
// (Taylor expansion to first order, common practice).
func TestLinearizePendulum(t *testing.T) {
	s := lang.NewSession(lang.Options{Builtins: builtins.Registry(), Dir: t.TempDir()})
	langtest.Run(t, s, langtest.Pendulum)
	g, L, c := 9.81, 0.5, 0.2
	for _, a0 := range []float64{0, 0.3, math.Pi} {
		s.Set("a0", a0)
		lin := langtest.Run(t, s, "linearize(pendulum, at: {angle: a0, rate: 0.7, torque: 2})").(*lsys.System)
		matNear(t, "A", lin.A, mat.NewDense(2, 2, []float64{0, 1, -g / L * math.Cos(a0), -c}), 1e-15)
		matNear(t, "B", lin.B, mat.NewDense(2, 1, []float64{0, 1}), 0)
		matNear(t, "C", lin.C, mat.NewDense(1, 2, []float64{L * math.Cos(a0), 0}), 1e-15)
		matNear(t, "D", lin.D, mat.NewDense(1, 1, []float64{0}), 0)
	}
	// Using the model where a linear system is needed names the term.
	_, err := s.Run(context.Background(), "modes(pendulum)", nil)
	if err == nil || !strings.Contains(err.Error(), "first nonlinear term is sin(angle) (line 7, column 18") ||
		!strings.Contains(err.Error(), "linearize(") {
		t.Errorf("error: %v", err)
	}
}

// Equilibria with closed forms: the pendulum held by a constant torque,
// sin(angle) = torque L / g (statics), and a draining tank,
// level' = (inflow - k sqrt(level)) / area, level = (inflow/k)^2
// (Torricelli's law, common practice).
func TestEquilibrium(t *testing.T) {
	s := lang.NewSession(lang.Options{Builtins: builtins.Registry(), Dir: t.TempDir()})
	langtest.Run(t, s, langtest.Pendulum)
	e := langtest.Run(t, s, "equilibrium(pendulum, inputs: {torque: 1}, guess: {angle: 0.1})").(*lsys.Equilibrium)
	want := math.Asin(1 * 0.5 / 9.81)
	if a, _ := e.State("angle"); math.Abs(a-want) > 1e-12 {
		t.Errorf("angle %v, want %v", a, want)
	}
	if e.Residual >= 1e-10 {
		t.Errorf("residual %v", e.Residual)
	}
	// The inverted branch from a guess near pi.
	e2 := langtest.Run(t, s, "equilibrium(pendulum, inputs: {torque: 1}, guess: {angle: 3})").(*lsys.Equilibrium)
	if a, _ := e2.State("angle"); math.Abs(a-(math.Pi-want)) > 1e-12 || e2.Residual >= 1e-10 {
		t.Errorf("angle %v, want %v (residual %v)", a, math.Pi-want, e2.Residual)
	}
	// linearize accepts the equilibrium.
	lin := langtest.Run(t, s, "e = equilibrium(pendulum, inputs: {torque: 1}, guess: {angle: 0.1})\nlinearize(pendulum, at: e)").(*lsys.System)
	if got := lin.A.At(1, 0); math.Abs(got-(-9.81/0.5*math.Cos(want))) > 1e-12 {
		t.Errorf("A[2,1] at the equilibrium %v", got)
	}
	if r := langtest.Run(t, s, "e.residual").(float64); r >= 1e-10 {
		t.Errorf("e.residual %v", r)
	}
	langtest.Run(t, s, `k = 0.5; area = 2
tank = system {
  states level
  inputs inflow
  level' = (inflow - k*sqrt(level)) / area
}`)
	e3 := langtest.Run(t, s, "equilibrium(tank, inputs: {inflow: 0.3}, guess: {level: 1})").(*lsys.Equilibrium)
	if l, _ := e3.State("level"); math.Abs(l-0.36) > 1e-12 || e3.Residual >= 1e-10 {
		t.Errorf("tank level %v, want 0.36 (residual %v)", l, e3.Residual)
	}
	// No steady state: the torque exceeds what gravity can hold (g/L = 19.62).
	_, err := s.Run(context.Background(), "equilibrium(pendulum, inputs: {torque: 30})", nil)
	if err == nil || !strings.Contains(err.Error(), "equilibrium:") {
		t.Errorf("want a Newton failure, got %v", err)
	}
	if _, ok := syntax.Position(err); !ok {
		t.Errorf("failure without position: %v", err)
	}
}

// Mass-spring-damper m x” + b x' + k x = F with k = 4, b = 0.4, m = 1:
// lambda = (-b + j sqrt(4km - b^2)) / (2m), so d lambda/dk = j/sqrt(4km - b^2)
// and d lambda/db = -1/(2m) - j b/(2m sqrt(4km - b^2)) (differentiating the
// quadratic formula, common practice). Also checked against a central
// Finite difference of the eigenvalues (test only).
func TestSensitivity(t *testing.T) {
	s := lang.NewSession(lang.Options{Builtins: builtins.Registry(), Dir: t.TempDir()})
	src := `k = 4; b = 0.4; mass = 1
axis = system {
  states position, velocity
  inputs force
  position' = velocity
  velocity' = (force - k*position - b*velocity) / mass
}
`
	langtest.Run(t, s, src)
	sens := langtest.Run(t, s, `sensitivity(axis, ["k", "b"])`).(*lsys.Sensitivity)
	if len(sens.Eigenvalues) != 1 {
		t.Fatalf("one oscillatory mode expected, got %v", sens.Eigenvalues)
	}
	r := math.Sqrt(4*4*1 - 0.4*0.4)
	wantK := complex(0, 1/r)
	wantB := complex(-0.5, -0.4/(2*r))
	if d := cmplx.Abs(sens.D[0][0] - wantK); d > 1e-12 {
		t.Errorf("dl/dk = %v, want %v", sens.D[0][0], wantK)
	}
	if d := cmplx.Abs(sens.D[0][1] - wantB); d > 1e-12 {
		t.Errorf("dl/db = %v, want %v", sens.D[0][1], wantB)
	}
	// Finite differences on the rebuilt block.
	eig := func(k, b float64) complex128 {
		s2 := lang.NewSession(lang.Options{Builtins: builtins.Registry(), Dir: t.TempDir()})
		s2.Set("k", k)
		s2.Set("b", b)
		langtest.Run(t, s2, strings.Replace(src, "k = 4; b = 0.4; ", "", 1))
		g, _ := s2.Get("axis")
		p, err := lsys.Poles(g.(*lsys.System))
		if err != nil {
			t.Fatal(err)
		}
		for _, l := range p {
			if imag(l) > 0 {
				return l
			}
		}
		t.Fatal("no pair")
		return 0
	}
	h := 1e-6
	fdK := (eig(4+h, 0.4) - eig(4-h, 0.4)) / complex(2*h, 0)
	fdB := (eig(4, 0.4+h) - eig(4, 0.4-h)) / complex(2*h, 0)
	if d := cmplx.Abs(sens.D[0][0] - fdK); d > 1e-7 {
		t.Errorf("dl/dk %v against finite difference %v", sens.D[0][0], fdK)
	}
	if d := cmplx.Abs(sens.D[0][1] - fdB); d > 1e-7 {
		t.Errorf("dl/db %v against finite difference %v", sens.D[0][1], fdB)
	}
	// A nonlinear model at an operating point: the pendulum's small-swing
	// pair lambda^2 + c lambda + (g/L) cos(a0) = 0 at a0 = 0;
	// d lambda/dg = (1/L) / (-(2 lambda + c)) (implicit differentiation).
	langtest.Run(t, s, langtest.Pendulum)
	ps := langtest.Run(t, s, `sensitivity(pendulum, ["g"], at: {angle: 0, rate: 0, torque: 0})`).(*lsys.Sensitivity)
	l := ps.Eigenvalues[0]
	want := complex(-1/0.5, 0) / (2*l + complex(0.2, 0))
	if d := cmplx.Abs(ps.D[0][0] - want); d > 1e-12 {
		t.Errorf("pendulum dl/dg = %v, want %v", ps.D[0][0], want)
	}
}

// Mode matching against sorting: two real modes -k and -(11 - k) cross at
// k = 5.5; each branch must keep its own mode (facts of the construction).
func TestLocus(t *testing.T) {
	s := lang.NewSession(lang.Options{Builtins: builtins.Registry(), Dir: t.TempDir()})
	r := &langtest.Recorder{}
	v, err := s.Run(context.Background(), "crossing(k) = system([[-k, 0.001], [0, -(11 - k)]])\nlocus(crossing, k: linear(1, 10, n: 91))", r)
	if err != nil {
		t.Fatal(err)
	}
	l := v.(*lsys.Locus)
	for _, br := range l.Branches {
		start, end := real(br[0]), real(br[len(br)-1])
		if !(math.Abs(start+1) < 1e-9 && math.Abs(end+10) < 1e-9) && !(math.Abs(start+10) < 1e-9 && math.Abs(end+1) < 1e-9) {
			t.Errorf("branch from %v to %v: modes were swapped at the crossing", start, end)
		}
	}
	if len(r.Displays) != 1 || len(r.Updates) == 0 || r.Updates[len(r.Updates)-1] != "locus: 91 values done" {
		t.Errorf("progress: displays %v, updates %v", r.Displays, r.Updates)
	}
	// Errors.
	for _, c := range []struct{ src, err string }{
		{"f(k) = system([[-k]])\nlocus(f, gain: [1, 2])", "the function's parameter is 'k', not 'gain'"},
		{"f(k) = system([[-k]])\nlocus(f)", "locus needs one named argument"},
		{"f(k) = k\nlocus(f, k: [1, 2])", "at k = 1 the system has no states"},
		{"locus(sin, k: [1, 2])", "not the built-in sin"},
		{"f(k) = if k < 2 then system([[-k]]) else system([[-k, 0], [0, -1]])\nlocus(f, k: [1, 2, 3])", "has 2 states, but 1 at the first value"},
	} {
		_, err := s.Run(context.Background(), c.src, nil)
		if err == nil || !strings.Contains(err.Error(), c.err) {
			t.Errorf("%q: error %v, want %q", c.src, err, c.err)
		}
		if _, ok := syntax.Position(err); !ok {
			t.Errorf("%q: no position", c.src)
		}
	}
}

// The pointed errors of equation blocks: message, line and column.
func TestBlockErrors(t *testing.T) {
	pre := "torque_gain = 2\n"
	langtest.RunCells(t, []langtest.Cell{
		{Src: "system {\n  states x\n  inputs torque\n  x' = -x + torqe\n}", Err: "'torqe' is not a state, input or parameter of this system; did you mean 'torque' (an input)?", Line: 4, Col: 13},
		{Src: "system {\n  states x, v\n  x' = v\n}", Err: "the state 'v' has no equation", Line: 2, Col: 13},
		{Src: "system {\n  states x\n  x' = -x\n  x' = -2*x\n}", Err: "a second equation for the state 'x' (the first is at line 3)", Line: 4, Col: 3},
		{Src: "system {\n  states x\n  outputs y\n  x' = -x\n}", Err: "the output 'y' is never defined", Line: 3, Col: 11},
		{Src: "system {\n  states x\n  outputs y\n  x' = -x\n  yy = x\n}", Err: "the output 'y' is never defined; did you mean 'yy'?", Line: 3, Col: 11},
		{Src: "system {\n  states x\n  inputs x\n  x' = -x\n}", Err: "'x' is declared as a state and as an input (first at line 2, column 10)", Line: 3, Col: 10},
		{Src: "system {\n  states x, x\n  x' = -x\n}", Err: "'x' is declared twice", Line: 2, Col: 13},
		{Src: "system {\n  states x, y\n  x' = y\n  next y = x\n}", Err: "continuous (x' = ...) and sampled (next x = ...) equations are mixed", Line: 4, Col: 3},
		{Src: "system every 0.1 {\n  states x\n  x' = -x\n}", Err: "is a continuous-time equation, but this system is sampled", Line: 3, Col: 3},
		{Src: "system {\n  states x\n  next x = x\n}", Err: "next x = ... is a sampled equation, but this system is continuous", Line: 3, Col: 3},
		{Src: "system {\n  states x\n  inputs u\n  u' = x\n  x' = u\n}", Err: "'u' is an input; inputs come from outside", Line: 4, Col: 3},
		{Src: "system {\n  states x\n  z' = -x\n}", Err: "'z' is not a declared state", Line: 3, Col: 3},
		{Src: "system {\n  states x\n  x = 1\n}", Err: "'x' is a state; its equation is written x' = ...", Line: 3, Col: 3},
		{Src: "system {\n  states x\n  x' = -x + 5\n}", Err: "has a constant part (5)", Line: 3, Col: 8},
		{Src: "system every -1 {\n  states x\n  next x = x\n}", Err: "the sample time must be a positive number", Line: 1, Col: 14},
		{Src: "system {\n  states x\n  h = 2*w\n  w = x\n  x' = -h\n}", Err: "'w' is used before its equation (line 4)", Line: 3, Col: 9},
		{Src: "system {\n  states sin\n  sin' = 1\n}", Err: "'sin' is a function that equations use", Line: 2, Col: 10},
		{Src: "system {\n  states x\n  x' = modes(x)\n}", Err: "'modes' cannot be used in an equation", Line: 3, Col: 8},
		{Src: "system {\n  states x\n  x' = [1, 2]\n}", Err: "cannot appear in an equation", Line: 3, Col: 8},
		{Src: "system {\n  states x\n  x' = 2j*x\n}", Err: "complex numbers cannot appear in equations", Line: 3, Col: 8},
		{Src: pre + "system {\n  states x\n  x' = -x*torque_gainn\n}", Err: "did you mean 'torque_gain' (a parameter)?", Line: 4, Col: 11},
		{Src: "r = \"text\"\nsystem {\n  states x\n  x' = -r*x\n}", Err: "'r' is a string; a parameter in an equation must be a real number", Line: 4, Col: 9},
		{Src: "system {\n  states x\n  x' = -x\n  y' = 1", Err: "expected '}' to close the system block", Line: 4, Col: 9},
		{Src: "system {\n  states x y\n}", Err: "expected ',' between names in the states list", Line: 2, Col: 12},
		{Src: "system {\n  x' -x\n}", Err: "expected '=' in the equation for 'x'", Line: 2, Col: 6},
		{Src: "system {\n  states x\n  next x' = x\n}", Err: "either 'next x = ...' (sampled) or", Line: 3, Col: 9},
		{Src: "system {\n}", Err: "the system has no states and no outputs", Line: 1, Col: 1},
		{Src: "m = system {\n  states x\n  inputs u\n  x' = -x*u\n}\nmodes(m)", Err: "first nonlinear term is -x*u (line 4, column 8", Line: 6, Col: 7},
		{Src: "m = system {\n  states x\n  inputs u\n  x' = -x*u\n}\nlinearize(m, at: {x: 1})", Err: "at gives no value for the input 'u'", Line: 6, Col: 18},
		{Src: "m = system {\n  states x\n  inputs u\n  x' = -x*u\n}\nlinearize(m, at: {x: 1, u: 0, w: 2})", Err: "'w' is not a state or input of this model", Line: 6, Col: 18},
		{Src: "m = system {\n  states x\n  x' = -log(x)\n}\nlinearize(m, at: {x: -1})", Err: "log of -1 at this operating point", Line: 3, Col: 9},
		{Src: "m = system {\n  states x\n  x' = -x\n}\nsensitivity(m, [\"k\"])", Err: "'k' is not a parameter of this model", Line: 5, Col: 16},
		{Src: "sensitivity(system([[-1]]), [\"k\"])", Err: "this one was built from matrices", Line: 1, Col: 13},
	})
}

// Nonlinear terms of every kind make a model; linear ones do not.
func TestNonlinearDetection(t *testing.T) {
	for _, c := range []struct {
		rhs  string
		term string // "" when linear
	}{
		{"-2*x + 3*u", ""},
		{"-(x - u)/4", ""},
		{"x^1 - u", ""},
		{"-x*x", "-x*x"},
		{"sin(x)", "sin(x)"},
		{"cos(u) - x", "cos(u)"},
		{"tan(x)", "tan(x)"},
		{"exp(-x)", "exp(-x)"},
		{"log(2 + x)", "log(2 + x)"},
		{"sqrt(1 + x)", "sqrt(1 + x)"},
		{"abs(x)", "abs(x)"},
		{"x^2", "x^2"},
		{"2^x", "2^x"},
		{"1/(1 + x)", "1/(1 + x)"},
		{"-x*u", "-x*u"},
		{"if x > 0 then -x else -2*x", "if x > 0 then -x else -2*x"},
	} {
		s := lang.NewSession(lang.Options{Builtins: builtins.Registry(), Dir: t.TempDir()})
		v, err := s.Run(context.Background(), "system {\n  states x\n  inputs u\n  x' = "+c.rhs+"\n}", nil)
		if err != nil {
			t.Errorf("%s: %v", c.rhs, err)
			continue
		}
		m, nl := v.(*lsys.Model)
		switch {
		case c.term == "" && nl:
			t.Errorf("%s: linear, but a nonlinear model (%s)", c.rhs, m.FirstNonlinear)
		case c.term != "" && !nl:
			t.Errorf("%s: nonlinear, but %s", c.rhs, builtins.Registry().TypeName(v))
		case nl && m.FirstNonlinear != c.term:
			t.Errorf("%s: first nonlinear term %s, want %s", c.rhs, m.FirstNonlinear, c.term)
		}
	}
}

// A user function inside equations, and a record field as a parameter.
func TestEquationsWithFunctionsAndRecords(t *testing.T) {
	s := lang.NewSession(lang.Options{Builtins: builtins.Registry(), Dir: t.TempDir()})
	g := langtest.Run(t, s, `spring(d) = p.k*d
p = {k: 3, c: 0.5}
system {
  states x, v
  x' = v
  v' = -spring(x) - p.c*v
}`).(*lsys.System)
	matNear(t, "A", g.A, mat.NewDense(2, 2, []float64{0, 1, -3, -0.5}), 0)
	sens := langtest.Run(t, s, `sensitivity(system {
  states x, v
  x' = v
  v' = -spring(x) - p.c*v
}, ["p.k"])`).(*lsys.Sensitivity)
	// lambda^2 + c lambda + k = 0: d lambda/dk = -1/(2 lambda + c) (implicit differentiation).
	l := sens.Eigenvalues[0]
	if want := -1 / (2*l + 0.5); cmplx.Abs(sens.D[0][0]-want) > 1e-12 {
		t.Errorf("dl/dk = %v, want %v", sens.D[0][0], want)
	}
}

// A sampled logistic growth model, next x = x + r x (1 - x/K) + u: its
// steady state for u = 0 is x = K, where the linearization is
// 1 + r - 2 r x/K = 1 - r (logistic map, common practice).
func TestSampledNonlinearModel(t *testing.T) {
	s := lang.NewSession(lang.Options{Builtins: builtins.Registry(), Dir: t.TempDir()})
	langtest.Run(t, s, `r = 0.3; K = 50
growth = system every 1 {
  states x
  inputs u
  next x = x + r*x*(1 - x/K) + u
}`)
	e := langtest.Run(t, s, "equilibrium(growth, inputs: {u: 0}, guess: {x: 40})").(*lsys.Equilibrium)
	if x, _ := e.State("x"); math.Abs(x-50) > 1e-10 || e.Residual >= 1e-10 {
		t.Errorf("x = %v, want 50 (residual %v)", x, e.Residual)
	}
	lin := langtest.Run(t, s, "linearize(growth, at: equilibrium(growth, inputs: {u: 0}, guess: {x: 40}))").(*lsys.System)
	if lin.Ts != 1 || math.Abs(lin.A.At(0, 0)-0.7) > 1e-14 || lin.B.At(0, 0) != 1 {
		t.Errorf("linearized: Ts %v A %v B %v", lin.Ts, lin.A.At(0, 0), lin.B.At(0, 0))
	}
	m := langtest.Run(t, s, "growth").(*lsys.Model)
	if want := (lsys.ModelEquation{Kind: "next", Name: "x", Rhs: "x + r*x*(1 - x/K) + u"}); m.Ts != 1 || len(m.Equations) != 1 || m.Equations[0] != want {
		t.Errorf("model: every %v, equations %+v", m.Ts, m.Equations)
	}
	if p := langtest.Run(t, s, "growth.parameters").(*lang.Record); lang.FormatValue(p) != "{r: 0.3, K: 50}" {
		t.Errorf("parameters %s", lang.FormatValue(p))
	}
}

// A signal named like a session number is a signal inside the block, and
// the cell says so on stderr.
func TestSignalHidesSessionNumber(t *testing.T) {
	s := lang.NewSession(lang.Options{Builtins: builtins.Registry(), Dir: t.TempDir()})
	r := &langtest.Recorder{}
	v, err := s.Run(context.Background(), "x = 5\nsystem {\n  states x\n  x' = -2*x\n}", r)
	if err != nil {
		t.Fatal(err)
	}
	if g := v.(*lsys.System); g.A.At(0, 0) != -2 {
		t.Errorf("A = %v", g.A.At(0, 0))
	}
	if !strings.Contains(r.Err.String(), "note (line 2): inside this system block the signal names 'x' (= 5) hide numbers bound in the session") {
		t.Errorf("stderr %q", r.Err.String())
	}
}

// The steady state of a linear system in matrix form: for x' = A x + B u,
// x = -A^-1 B u; with A = [[0, 1], [-4, -0.4]], B = [0, 4], u = 2 the
// position settles at 2 (static gain 1, second-order form, common practice).
func TestLinearEquilibrium(t *testing.T) {
	s := lang.NewSession(lang.Options{Builtins: builtins.Registry(), Dir: t.TempDir()})
	e := langtest.Run(t, s, "G = system([[0, 1], [-4, -0.4]], [0, 4], [1, 0])\nequilibrium(G, inputs: {u1: 2})").(*lsys.Equilibrium)
	if x, _ := e.State("x1"); math.Abs(x-2) > 1e-14 {
		t.Errorf("x1 = %v, want 2", x)
	}
	// Sampled: x = a x + (1 - a) u settles at x = u.
	d := langtest.Run(t, s, "equilibrium(system([[0.9]], [0.1], every: 1), inputs: {u1: 3})").(*lsys.Equilibrium)
	if x, _ := d.State("x1"); math.Abs(x-3) > 1e-13 {
		t.Errorf("sampled x1 = %v, want 3", x)
	}
	// An integrator driven by a constant input has no steady state.
	_, err := s.Run(context.Background(), "equilibrium(system([[0]], [1]), inputs: {u1: 1})", nil)
	if err == nil || !strings.Contains(err.Error(), "no steady state for these inputs") {
		t.Errorf("integrator: %v", err)
	}
}
