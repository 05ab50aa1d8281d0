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
	"lsys/lsys"
)

func stRun(t *testing.T, src string) any {
	t.Helper()
	s := lang.NewSession(lang.Options{Builtins: builtins.Registry(), Dir: t.TempDir()})
	v, err := s.Run(context.Background(), src, &langtest.Recorder{})
	if err != nil {
		t.Fatalf("%s\n%v", src, err)
	}
	return v
}

func stRunErr(t *testing.T, src, frag string) {
	t.Helper()
	s := lang.NewSession(lang.Options{Builtins: builtins.Registry(), Dir: t.TempDir()})
	_, err := s.Run(context.Background(), src, &langtest.Recorder{})
	if err == nil || !strings.Contains(err.Error(), frag) {
		t.Errorf("%s: want an error containing %q, got %v", src, frag, err)
	}
}

// A mass-spring-damper with m = 2, c = 1.6, k = 8: poles -0.4 +- 1.96j
// (wn = 2, zeta = 0.2; Inman, Engineering Vibration, 2014, ch. 1).
const stMSD = "G = system([[0, 1], [-4, -0.8]], [0, 0.5], [1, 0])\n"

func TestBuiltinPoles(t *testing.T) {
	v := stRun(t, stMSD+"poles(G)")
	m, ok := v.(*mat.CDense)
	if !ok {
		t.Fatalf("poles gave %T", v)
	}
	wd := 2 * math.Sqrt(1-0.04)
	if cmplx.Abs(m.At(0, 0)-complex(-0.4, wd)) > 1e-13 || cmplx.Abs(m.At(1, 0)-complex(-0.4, -wd)) > 1e-13 {
		t.Errorf("poles %v %v", m.At(0, 0), m.At(1, 0))
	}
	// Real poles give a real vector; a static gain none.
	if _, ok := stRun(t, "poles(system([[-1, 0], [0, -2]], [1, 1], [1, 1]))").(*mat.Dense); !ok {
		t.Error("real poles should be a real vector")
	}
}

func TestBuiltinZeros(t *testing.T) {
	// (s + 2)/(s^2 + 4s + 3): zero at -2 (closed form).
	v := stRun(t, "zeros(system([[0, 1], [-3, -4]], [0, 1], [2, 1])).invariant")
	m, ok := v.(*mat.Dense)
	if !ok || math.Abs(m.At(0, 0)+2) > 1e-12 {
		t.Fatalf("zeros: %v", lang.FormatValue(v))
	}
	if _, ok := stRun(t, stMSD+"zeros(G)").(*lsys.ZeroSet); !ok {
		t.Error("zeros should give a zero set")
	}
	stRunErr(t, stMSD+"zeros(G, tol: 2)", "tol must be between 0 and 1")
}

func TestBuiltinEigenJordan(t *testing.T) {
	// Normal matrix: condition numbers 1 (Wilkinson 1965).
	c := stRun(t, "eigen([[2, 1], [1, 2]]).cond").(*mat.Dense)
	for i := 0; i < 2; i++ {
		if math.Abs(c.At(i, 0)-1) > 1e-14 {
			t.Errorf("cond %v", c.At(i, 0))
		}
	}
	// [[-1, 1], [0, -1]]: one eigenvalue, algebraic 2, geometric 1
	// (Golub & Wilkinson 1976).
	if d := stRun(t, "jordan([[-1, 1], [0, -1]]).defective"); d != true {
		t.Errorf("defective = %v", d)
	}
	g := stRun(t, "jordan([[-2, 0], [0, -2]]).geometric").(*mat.Dense)
	if g.At(0, 0) != 2 {
		t.Errorf("geometric %v", g.At(0, 0))
	}
	stRunErr(t, "eigen([[1, 2, 3], [4, 5, 6]])", "square")
}

func TestBuiltinStructureFamily(t *testing.T) {
	// diag(-1, -2) driven only at the first state, seen at both: mode -2
	// is not reachable (Hautus 1969).
	const g = "G = system([[-1, 0], [0, -2]], [1, 0], [1, 1])\n"
	if v := stRun(t, g+"structure(G).controllable"); v != false {
		t.Errorf("controllable = %v", v)
	}
	if v := stRun(t, g+"structure(G).stabilizable"); v != true {
		t.Errorf("stabilizable = %v", v)
	}
	u := stRun(t, g+"structure(G).uncontrollable").(*mat.Dense)
	if math.Abs(u.At(0, 0)+2) > 1e-12 {
		t.Errorf("uncontrollable %v", u.At(0, 0))
	}
	if v := stRun(t, g+"minimal(G)").(*lsys.System); v.N() != 1 {
		t.Errorf("minimal order %d", v.N())
	}
	if v := stRun(t, g+"reachable(G).dim"); v != 1.0 {
		t.Errorf("reachable dim %v", v)
	}
	if v := stRun(t, g+"unobservable(G).dim"); v != 0.0 {
		t.Errorf("unobservable dim %v", v)
	}
	s := stRun(t, g+"decompose(G).sizes").(*mat.Dense)
	if s.At(0, 0) != 1 || s.At(2, 0) != 1 {
		t.Errorf("sizes %v", mat.Formatted(s))
	}
}

func TestBuiltinTransformSpectralInvariant(t *testing.T) {
	v := stRun(t, stMSD+"transform(G, [[1, 0], [1, 1]])").(*lsys.System)
	if v.A.At(0, 0) != -1 { // T A T^-1 with T = [[1, 0], [1, 1]]: first entry 0 - 1 = -1
		t.Errorf("transformed A %v", mat.Formatted(v.A))
	}
	stRunErr(t, stMSD+"transform(G, [[1, 2], [2, 4]])", "nearly singular")
	stRunErr(t, stMSD+"transform(G, [[1]])", "2 states")
	if v := stRun(t, "spectral(system([[1, 2], [0, -3]], [0, 1], [1, 0]), \"unstable\").dim"); v != 1.0 {
		t.Errorf("unstable dim %v", v)
	}
	if v := stRun(t, "spectral(system([[1, 2], [0, -3]], [0, 1], [1, 0]), [-3]).dim"); v != 1.0 {
		t.Errorf("spectral at -3 dim %v", v)
	}
	stRunErr(t, "spectral(system([[1, 2], [0, -3]], [0, 1], [1, 0]), \"fast\")", "unknown selection")
	if v := stRun(t, "invariant([[1, 2], [0, 3]], [1, 0]).invariant"); v != true {
		t.Errorf("e1 invariant = %v", v)
	}
	if v := stRun(t, "invariant([[1, 2], [0, 3]], [0, 1]).invariant"); v != false {
		t.Errorf("e2 invariant = %v", v)
	}
}

func TestBuiltinModeTableFields(t *testing.T) {
	z := stRun(t, stMSD+"modes(G).damping").(*mat.Dense)
	if math.Abs(z.At(0, 0)-0.2) > 1e-13 {
		t.Errorf("damping %v", z.At(0, 0))
	}
}

func TestBuiltinTransfer(t *testing.T) {
	// Controllable canonical form of (s + 2)/(s^2 + 4s + 3) read back.
	v := stRun(t, "transfer(system([[0, 1], [-3, -4]], [0, 1], [2, 1]))")
	r, ok := v.(*lsys.Rational)
	if !ok {
		t.Fatalf("transfer gave %T", v)
	}
	for _, x := range []complex128{1i, 2 + 1i} {
		want := (x + 2) / (x*x + 4*x + 3)
		if cmplx.Abs(r.Eval(x)-want) > 1e-12 {
			t.Errorf("G(%v) = %v, want %v", x, r.Eval(x), want)
		}
	}
	if l, ok := stRun(t, "transfer(system([[-1, 0], [0, -2]], [[1, 0], [0, 1]], [[1, 1]]))").(*lang.List); !ok || len(l.Items) != 1 {
		t.Errorf("MIMO transfer: %v", l)
	}
}

func TestBuiltinTransformStatesInvariantNames(t *testing.T) {
	named := "G = system([[0, 1], [-4, -0.8]], [0, 0.5], [1, 0], states: [\"position\", \"velocity\"])\n"
	// transform takes names for the new states.
	v := stRun(t, named+"transform(G, [[1, 0], [1, 1]], states: [\"p\", \"sum\"])").(*lsys.System)
	if strings.Join(v.StateNames, ",") != "p,sum" {
		t.Errorf("states %v, want p, sum", v.StateNames)
	}
	if v.A.At(0, 0) != -1 { // as in TestBuiltinTransformSpectralInvariant
		t.Errorf("transformed A %v", mat.Formatted(v.A))
	}
	stRunErr(t, named+"transform(G, [[1, 0], [1, 1]], states: [\"p\"])", "1 state names given")
	stRunErr(t, named+"transform(G, [[1, 0], [1, 1]], states: [\"p\", \"p\"])", "appears twice")
	// invariant(G, V) labels the rows with the system's state names; e1 is
	// not invariant under [[0, 1], [-4, -0.8]] (A e1 = -4 e2): it has no
	// eigenvalues.
	ic := stRun(t, named+"invariant(G, [1, 0])").(*lsys.InvariantCheck)
	if strings.Join(ic.Subspace.StateNames, ",") != "position,velocity" {
		t.Errorf("row names %v", ic.Subspace.StateNames)
	}
	if ic.Subspace.Invariant || ic.Subspace.Values != nil {
		t.Errorf("e1: invariant %v, values %v; want not invariant, no eigenvalues", ic.Subspace.Invariant, ic.Subspace.Values)
	}
	// The whole space is invariant and holds both eigenvalues -0.4 +- 1.96j.
	ic = stRun(t, named+"invariant(G, [[1, 0], [0, 1]])").(*lsys.InvariantCheck)
	if !ic.Subspace.Invariant || len(ic.Subspace.Values) != 2 {
		t.Errorf("whole space: invariant %v, values %v", ic.Subspace.Invariant, ic.Subspace.Values)
	}
}
