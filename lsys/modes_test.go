package lsys

import (
	"math"
	"math/cmplx"
	"testing"

	"gonum.org/v1/gonum/mat"
)

func near(a, b, rel float64) bool {
	if a == b {
		return true
	}
	return math.Abs(a-b) <= rel*math.Max(1, math.Max(math.Abs(a), math.Abs(b)))
}

// massSpringDamper is m q” + c q' + k q = f with states (q, q').
func massSpringDamper(t *testing.T, m, c, k float64) *System {
	t.Helper()
	A := mat.NewDense(2, 2, []float64{0, 1, -k / m, -c / m})
	B := mat.NewDense(2, 1, []float64{0, 1 / m})
	C := mat.NewDense(1, 2, []float64{1, 0})
	s, err := FromMatrices(A, B, C, nil, 0)
	if err != nil {
		t.Fatal(err)
	}
	return s
}

func TestModesMassSpringDamper(t *testing.T) {
	// Reference: Inman, Engineering Vibration (4th ed., 2014), ch. 1:
	// wn = sqrt(k/m), zeta = c / (2 sqrt(k m)), damped frequency
	// wd = wn sqrt(1 - zeta^2), for m = 2, c = 1.6, k = 8: wn = 2, zeta = 0.2.
	m, c, k := 2.0, 1.6, 8.0
	s := massSpringDamper(t, m, c, k)
	mt, err := Modes(s)
	if err != nil {
		t.Fatal(err)
	}
	if len(mt.Modes) != 1 {
		t.Fatalf("got %d modes, want one oscillatory pair", len(mt.Modes))
	}
	md := mt.Modes[0]
	wn := math.Sqrt(k / m)
	zeta := c / (2 * math.Sqrt(k*m))
	wd := wn * math.Sqrt(1-zeta*zeta)
	if !md.Pair || !near(md.NaturalFreq, wn, 1e-13) || !near(md.Damping, zeta, 1e-13) {
		t.Errorf("got pair=%v wn=%v zeta=%v, want pair wn=%v zeta=%v", md.Pair, md.NaturalFreq, md.Damping, wn, zeta)
	}
	if !near(md.FreqHz, wn/(2*math.Pi), 1e-13) || !near(md.TimeConstant, 1/(zeta*wn), 1e-13) || !near(md.Period, 2*math.Pi/wd, 1e-13) {
		t.Errorf("Hz %v tau %v period %v", md.FreqHz, md.TimeConstant, md.Period)
	}
	if !near(imag(md.Eigenvalue), wd, 1e-13) || !near(real(md.Eigenvalue), -zeta*wn, 1e-13) {
		t.Errorf("eigenvalue %v, want %v +- %vj", md.Eigenvalue, -zeta*wn, wd)
	}
	if !md.Reachable || !md.Observable || md.Multiplicity != 1 {
		t.Errorf("verdicts %+v", md)
	}
	// Shape of the pair: v = (1, lambda)/norm, so shape = (1, lambda)
	// when |lambda| = wn > 1 ... the largest entry is the rate here.
	// Fact of the trade: for x = (q, q'), q' = lambda q on the mode.
	ratio := md.Shape[1] / md.Shape[0]
	if cmplx.Abs(ratio-md.Eigenvalue) > 1e-12 {
		t.Errorf("shape ratio %v, want the eigenvalue %v", ratio, md.Eigenvalue)
	}
	if md.Shape[1] != 1 {
		t.Errorf("largest shape entry %v, want 1", md.Shape[1])
	}
}

func TestModesOrderAndRealModes(t *testing.T) {
	// Closed form: a diagonal A has its diagonal as eigenvalues; real modes
	// have damping 1 (decaying) or -1 (growing) and tau = -1/lambda; at
	// the origin neither is defined (NaN: nothing decays; issue 8, item 6).
	A := mat.NewDense(4, 4, []float64{
		-10, 0, 0, 0,
		0, 0.5, 0, 0,
		0, 0, -2, 0,
		0, 0, 0, 0,
	})
	s, err := FromMatrices(A, nil, nil, nil, 0)
	if err != nil {
		t.Fatal(err)
	}
	mt, err := Modes(s)
	if err != nil {
		t.Fatal(err)
	}
	want := []struct{ lam, wn, zeta, tau float64 }{
		{0, 0, math.NaN(), math.NaN()},
		{0.5, 0.5, -1, -2},
		{-2, 2, 1, 0.5},
		{-10, 10, 1, 0.1},
	}
	if len(mt.Modes) != len(want) {
		t.Fatalf("%d modes", len(mt.Modes))
	}
	for i, w := range want {
		m := mt.Modes[i]
		same := func(a, b float64) bool { return a == b || math.IsNaN(a) && math.IsNaN(b) }
		if real(m.Eigenvalue) != w.lam || !near(m.NaturalFreq, w.wn, 1e-15) || !same(m.Damping, w.zeta) || !same(m.TimeConstant, w.tau) {
			t.Errorf("mode %d: %+v, want %+v", i, m, w)
		}
	}
}

func TestModesSampled(t *testing.T) {
	// Reference: z = exp(s Ts) (Franklin, Powell & Workman, Digital Control
	// of Dynamic Systems, 3rd ed. 1998, ch. 4). A = r [[cos th, sin th],
	// [-sin th, cos th]] has z = r e^{+-j th}, so s = (ln r +- j th)/Ts.
	ts := 0.01
	sigma, omega := -3.0, 40.0
	r, th := math.Exp(sigma*ts), omega*ts
	A := mat.NewDense(3, 3, []float64{
		r * math.Cos(th), r * math.Sin(th), 0,
		-r * math.Sin(th), r * math.Cos(th), 0,
		0, 0, -0.5,
	})
	s, err := FromMatrices(A, nil, nil, nil, ts)
	if err != nil {
		t.Fatal(err)
	}
	mt, err := Modes(s)
	if err != nil {
		t.Fatal(err)
	}
	if len(mt.Modes) != 2 {
		t.Fatalf("%d modes", len(mt.Modes))
	}
	p := mt.Modes[0]
	if !p.Pair || !near(real(p.S), sigma, 1e-12) || !near(imag(p.S), omega, 1e-12) {
		t.Errorf("pair s = %v, want %v+%vj", p.S, sigma, omega)
	}
	if !near(p.NaturalFreq, math.Hypot(sigma, omega), 1e-12) || !near(p.Damping, -sigma/math.Hypot(sigma, omega), 1e-12) {
		t.Errorf("pair wn %v zeta %v", p.NaturalFreq, p.Damping)
	}
	// z = -0.5 alternates sign every step: s = (ln 0.5 + j pi)/Ts, the
	// Nyquist frequency pi/Ts (same reference).
	q := mt.Modes[1]
	if q.Pair || !near(imag(q.S), math.Pi/ts, 1e-12) || !near(real(q.S), math.Log(0.5)/ts, 1e-12) {
		t.Errorf("alternating mode s = %v", q.S)
	}
}

func TestModesUnreachableUnseen(t *testing.T) {
	// Fact of the trade (Hautus 1969): with A diagonal, a zero row of B is
	// a mode no input reaches, a zero column of C one no output sees.
	A := mat.NewDense(3, 3, []float64{-1, 0, 0, 0, -2, 0, 0, 0, -3})
	B := mat.NewDense(3, 1, []float64{1, 0, 1})
	C := mat.NewDense(1, 3, []float64{1, 1, 0})
	s, err := FromMatrices(A, B, C, nil, 0)
	if err != nil {
		t.Fatal(err)
	}
	mt, err := Modes(s)
	if err != nil {
		t.Fatal(err)
	}
	want := []struct{ reach, see bool }{{true, true}, {false, true}, {true, false}}
	for i, w := range want {
		m := mt.Modes[i]
		if m.Reachable != w.reach || m.Observable != w.see {
			t.Errorf("mode %v: reachable %v observable %v, want %v %v", m.Eigenvalue, m.Reachable, m.Observable, w.reach, w.see)
		}
	}
}

func TestStability(t *testing.T) {
	s := massSpringDamper(t, 1, -0.1, 1) // negative damping grows (fact of the trade)
	st, err := StabilityOf(s)
	if err != nil {
		t.Fatal(err)
	}
	if st.Stable || st.Unstable != 2 {
		t.Errorf("got %+v, want unstable with 2 poles", st)
	}
}

func TestEigenConditionNormal(t *testing.T) {
	// Wilkinson (1965): a normal matrix has every eigenvalue condition 1.
	A := mat.NewDense(2, 2, []float64{1, 2, 2, -3})
	es, err := Eigen(A)
	if err != nil {
		t.Fatal(err)
	}
	for k, c := range es.Cond {
		if !near(c, 1, 1e-14) {
			t.Errorf("cond[%d] = %v, want 1", k, c)
		}
	}
}

func TestEigenRefusesNonSquare(t *testing.T) {
	if _, err := Eigen(mat.NewDense(2, 3, nil)); err == nil {
		t.Fatal("want an error for a 2x3 matrix")
	}
}

func TestStabilityBoundary(t *testing.T) {
	// Lyapunov's eigenvalue criterion (facts of the trade): an integrator and
	// an undamped oscillator stay bounded (marginally stable); a double
	// integrator (a Jordan block at 0) grows like t: unstable.
	cases := []struct {
		name     string
		A        []float64
		n        int
		marginal bool
		unstable int
	}{
		{"integrator and lag", []float64{0, 0, 0, -1}, 2, true, 0},
		{"undamped oscillator", []float64{0, 1, -4, 0}, 2, true, 0},
		{"double integrator", []float64{0, 1, 0, 0}, 2, false, 2},
	}
	for _, c := range cases {
		s, _ := FromMatrices(mat.NewDense(c.n, c.n, c.A), nil, nil, nil, 0)
		st, err := StabilityOf(s)
		if err != nil {
			t.Fatal(err)
		}
		if st.Stable || st.Marginal != c.marginal || st.Unstable != c.unstable {
			t.Errorf("%s: %+v", c.name, st)
		}
	}
}

func TestPolesMultipleAndBoundary(t *testing.T) {
	// Two identical cascaded lags 100/(s + 100): A = [[-100, 0], [100, -100]]
	// is a Jordan block, whose computed eigenvalues split by about
	// sqrt(u) * 100 (Wilkinson 1965, ch. 2); the poles are -100 twice
	// (closed form), and must be listed so, not as a close pair.
	s := sysOf(t, mat.NewDense(2, 2, []float64{-100, 0, 100, -100}), mat.NewDense(2, 1, []float64{100, 0}), mat.NewDense(1, 2, []float64{0, 1}), nil)
	p, err := Poles(s)
	if err != nil {
		t.Fatal(err)
	}
	if len(p) != 2 || p[0] != p[1] || cmplx.Abs(p[0]+100) > 1e-12*100 {
		t.Errorf("poles %v, want -100 twice", p)
	}
	// A double integrator with a rounding-level perturbation: the poles
	// are exactly 0 (within the stated boundary tolerance).
	s2 := sysOf(t, mat.NewDense(2, 2, []float64{1e-17, 1, 0, -1e-17}), mat.NewDense(2, 1, []float64{0, 1}), mat.NewDense(1, 2, []float64{1, 0}), nil)
	p2, _ := Poles(s2)
	if len(p2) != 2 || p2[0] != 0 || p2[1] != 0 {
		t.Errorf("poles %v, want exactly 0 twice", p2)
	}
}

// chain3 is three equal masses m in a line, joined to each other and to
// fixed walls at both ends by springs k, with stiffness-proportional
// damping beta*K; states (q1, q2, q3, v1, v2, v3). force selects the mass
// the single input pushes (scaled by gain), sense the mass whose
// displacement is the single output, qScale the unit of the positions
// (1 for m, 1000 for mm).
func chain3(t *testing.T, m, k, beta, gain float64, force, sense int, qScale float64) *System {
	t.Helper()
	K := [][]float64{{2, -1, 0}, {-1, 2, -1}, {0, -1, 2}}
	A := mat.NewDense(6, 6, nil)
	for i := 0; i < 3; i++ {
		A.Set(i, 3+i, 1)
		for j := 0; j < 3; j++ {
			A.Set(3+i, j, -k*K[i][j]/m)
			A.Set(3+i, 3+j, -beta*k*K[i][j]/m)
		}
	}
	B := mat.NewDense(6, 1, nil)
	B.Set(3+force, 0, gain/m)
	C := mat.NewDense(1, 6, nil)
	C.Set(0, sense, 1)
	s, err := FromMatrices(A, B, C, nil, 0)
	if err != nil {
		t.Fatal(err)
	}
	if qScale != 1 {
		// Positions and rates in another length unit: z = T x.
		T := mat.NewDense(6, 6, nil)
		for i := 0; i < 6; i++ {
			T.Set(i, i, qScale)
		}
		if s, err = Transform(s, T); err != nil {
			t.Fatal(err)
		}
	}
	return s
}

func TestModesPBHUnitIndependent(t *testing.T) {
	// Three floors of 2000 t on storey springs of 4e6 kN/m, as a chain
	// fixed at both ends. Closed form (eigenvalues of the tridiagonal
	// Toeplitz matrix [-1 2 -1], from memory; e.g. Meyer, Matrix Analysis
	// and Applied Linear Algebra, 2000, sec. 7.2): wj^2 = (k/m)(2 - 2
	// cos(j pi/4)), shapes (1, sqrt2, 1), (1, 0, -1), (1, -sqrt2, 1); so the
	// middle mass is a node of mode 2. Stiffness-proportional damping keeps
	// these shapes (Caughey 1960; common practice), zeta_j = beta wj / 2.
	// A force on the node cannot move mode 2 and a sensor on the node
	// cannot see it (Hautus 1969); every other verdict is yes. The same
	// building in t, kN, m and in SI (kg, N: B 1000 times smaller), with
	// the input scaled by 1e4 and with positions in mm must give the same
	// verdicts and the same margins relative to their tolerances.
	const mT, kT, beta = 2000.0, 4e6, 1e-3 // t, kN/m, s
	type variant struct {
		name             string
		m, k, gain, qUse float64
	}
	variants := []variant{
		{"t, kN, m", mT, kT, 1, 1},
		{"kg, N, m", mT * 1e3, kT * 1e3, 1, 1},
		{"kg, N, m; input x 1e4", mT * 1e3, kT * 1e3, 1e4, 1},
		{"kg, N, mm", mT * 1e3, kT * 1e3, 1, 1000},
	}
	for _, planted := range []struct {
		name          string
		force, sense  int
		reach2, seen2 bool
	}{
		{"force on the node", 1, 0, false, true},
		{"sensor on the node", 0, 1, true, false},
	} {
		var ref *ModeTable
		for _, v := range variants {
			s := chain3(t, v.m, v.k, beta, v.gain, planted.force, planted.sense, v.qUse)
			mt, err := Modes(s)
			if err != nil {
				t.Fatal(err)
			}
			if len(mt.Modes) != 3 {
				t.Fatalf("%s, %s: %d modes", planted.name, v.name, len(mt.Modes))
			}
			for j, md := range mt.Modes {
				wn := math.Sqrt(kT / mT * (2 - 2*math.Cos(float64(j+1)*math.Pi/4)))
				if !near(md.NaturalFreq, wn, 1e-10) || !near(md.Damping, beta*wn/2, 1e-9) {
					t.Errorf("%s, %s: mode %d wn %v zeta %v, want %v %v", planted.name, v.name, j+1, md.NaturalFreq, md.Damping, wn, beta*wn/2)
				}
				wantR, wantO := true, true
				if j == 1 {
					wantR, wantO = planted.reach2, planted.seen2
				}
				if md.Reachable != wantR || md.Observable != wantO {
					t.Errorf("%s, %s: mode %d reached %v (margin %.3g, tol %.3g) seen %v (margin %.3g, tol %.3g), want %v %v",
						planted.name, v.name, j+1, md.Reachable, md.ReachMargin, md.ReachTol, md.Observable, md.ObserveMargin, md.ObserveTol, wantR, wantO)
				}
				if ref == nil {
					continue
				}
				// Margins relative to their tolerances: the balancing works
				// in powers of two, so a unit change not a power of two may
				// move a scaled quantity by up to a factor 2 (common practice
				// for power-of-two scaling); a verdict sits orders of
				// magnitude away from its tolerance.
				r := ref.Modes[j]
				if wantR && !within(md.ReachMargin/md.ReachTol, r.ReachMargin/r.ReachTol, 2) {
					t.Errorf("%s, %s: mode %d reach margin/tol %.4g, in t, kN, m %.4g", planted.name, v.name, j+1, md.ReachMargin/md.ReachTol, r.ReachMargin/r.ReachTol)
				}
				if wantO && !within(md.ObserveMargin/md.ObserveTol, r.ObserveMargin/r.ObserveTol, 2) {
					t.Errorf("%s, %s: mode %d seen margin/tol %.4g, in t, kN, m %.4g", planted.name, v.name, j+1, md.ObserveMargin/md.ObserveTol, r.ObserveMargin/r.ObserveTol)
				}
				// The per-signal figures are unit-free shares in [0, 1].
				for _, x := range append(append([]float64{}, md.Reach...), md.Visibility...) {
					if !(x >= 0 && x <= 1+1e-12) {
						t.Errorf("%s, %s: mode %d reach/visibility %v outside [0, 1]", planted.name, v.name, j+1, x)
					}
				}
				if wantR && !within(md.Reach[0], r.Reach[0], 2) || wantO && !within(md.Visibility[0], r.Visibility[0], 2) {
					t.Errorf("%s, %s: mode %d reach %v visibility %v, in t, kN, m %v %v", planted.name, v.name, j+1, md.Reach, md.Visibility, r.Reach, r.Visibility)
				}
			}
			t.Logf("%s, %s: reach margin/tol %.3g %.3g %.3g, seen margin/tol %.3g %.3g %.3g (tol %.3g, %.3g)", planted.name, v.name,
				mt.Modes[0].ReachMargin/mt.ReachTol, mt.Modes[1].ReachMargin/mt.ReachTol, mt.Modes[2].ReachMargin/mt.ReachTol,
				mt.Modes[0].ObserveMargin/mt.ObserveTol, mt.Modes[1].ObserveMargin/mt.ObserveTol, mt.Modes[2].ObserveMargin/mt.ObserveTol, mt.ReachTol, mt.ObserveTol)
			if ref == nil {
				ref = mt
			}
		}
	}
}

// within reports whether a and b (positive) agree within a factor f.
func within(a, b, f float64) bool {
	return a > 0 && b > 0 && a <= f*b && b <= f*a
}

func TestModesPBHTwoInputsOneScaled(t *testing.T) {
	// The chain of TestModesPBHUnitIndependent (closed-form shapes
	// (1, sqrt2, 1), (1, 0, -1), (1, -sqrt2, 1); from memory) with two
	// inputs that both miss the antisymmetric mode 2: a force on the
	// middle mass (its node) and a jack pushing masses 1 and 3 equally
	// (a symmetric load); outputs q2 (blind to mode 2) and q1 - q3 (sees
	// mode 2 only). PBH (Hautus 1969): mode 2 not reached, every mode seen
	// by the pair of outputs. Rescaling the first input by 1e4 (another
	// force unit) must not change the verdicts, and the margins relative to
	// their tolerances may move at most by the powers-of-two rounding of
	// the input scaling (a factor 2; common practice). The per-input shares
	// |w^H b_j|/||b_j|| are free of the input's unit altogether.
	const m, k, beta = 2e6, 4e9, 1e-3 // kg, N/m, s
	build := func(g float64) *System {
		K := [][]float64{{2, -1, 0}, {-1, 2, -1}, {0, -1, 2}}
		A := mat.NewDense(6, 6, nil)
		for i := 0; i < 3; i++ {
			A.Set(i, 3+i, 1)
			for j := 0; j < 3; j++ {
				A.Set(3+i, j, -k*K[i][j]/m)
				A.Set(3+i, 3+j, -beta*k*K[i][j]/m)
			}
		}
		B := mat.NewDense(6, 2, []float64{0, 0, 0, 0, 0, 0, 0, 1 / m, g / m, 0, 0, 1 / m})
		C := mat.NewDense(2, 6, []float64{0, 1, 0, 0, 0, 0, 1, 0, -1, 0, 0, 0})
		s, err := FromMatrices(A, B, C, nil, 0)
		if err != nil {
			t.Fatal(err)
		}
		return s
	}
	var ref *ModeTable
	for _, g := range []float64{1, 1e4} {
		mt, err := Modes(build(g))
		if err != nil {
			t.Fatal(err)
		}
		for j, md := range mt.Modes {
			if md.Reachable != (j != 1) || !md.Observable {
				t.Errorf("input gain %g: mode %d reached %v (margin %.3g, tol %.3g) seen %v (margin %.3g, tol %.3g), want %v true",
					g, j+1, md.Reachable, md.ReachMargin, md.ReachTol, md.Observable, md.ObserveMargin, md.ObserveTol, j != 1)
			}
			if ref == nil {
				continue
			}
			r := ref.Modes[j]
			if j != 1 && !within(md.ReachMargin/md.ReachTol, r.ReachMargin/r.ReachTol, 2) {
				t.Errorf("mode %d: reach margin/tol %.4g with the input x 1e4, %.4g without", j+1, md.ReachMargin/md.ReachTol, r.ReachMargin/r.ReachTol)
			}
			if !within(md.ObserveMargin/md.ObserveTol, r.ObserveMargin/r.ObserveTol, 2) {
				t.Errorf("mode %d: seen margin/tol %.4g with the input x 1e4, %.4g without", j+1, md.ObserveMargin/md.ObserveTol, r.ObserveMargin/r.ObserveTol)
			}
			for i := range md.Reach {
				if j != 1 && !near(md.Reach[i], r.Reach[i], 1e-9) {
					t.Errorf("mode %d: share of input %d %.6g with the input x 1e4, %.6g without", j+1, i, md.Reach[i], r.Reach[i])
				}
			}
		}
		t.Logf("input gain %g: reach margin/tol %.3g %.3g %.3g, seen margin/tol %.3g %.3g %.3g, shares %v %v %v", g,
			mt.Modes[0].ReachMargin/mt.ReachTol, mt.Modes[1].ReachMargin/mt.ReachTol, mt.Modes[2].ReachMargin/mt.ReachTol,
			mt.Modes[0].ObserveMargin/mt.ObserveTol, mt.Modes[1].ObserveMargin/mt.ObserveTol, mt.Modes[2].ObserveMargin/mt.ObserveTol,
			mt.Modes[0].Reach, mt.Modes[1].Reach, mt.Modes[2].Reach)
		if ref == nil {
			ref = mt
		}
	}
}

// A sampled rigid-body mode sits at z = 1 up to rounding: it reads wn 0,
// damping and time constant n/a, not wn 1e-12 rad/s and tau 1e11 s (issue
// 8, item 6). The ZOH equivalent of the double integrator 1/s^2 has the
// double eigenvalue z = 1 exactly (Franklin, Powell & Workman, Digital
// Control of Dynamic Systems, 3rd ed., 1998, from memory); here it is
// perturbed by 1e-14, below the stated 1000 u.
func TestModesSampledRigidBodyAtOrigin(t *testing.T) {
	A := mat.NewDense(2, 2, []float64{1 + 1e-14, 0.01, 0, 1 - 3e-14})
	s, err := FromMatrices(A, nil, nil, nil, 0.01)
	if err != nil {
		t.Fatal(err)
	}
	mt, err := Modes(s)
	if err != nil {
		t.Fatal(err)
	}
	for _, m := range mt.Modes {
		if m.NaturalFreq != 0 || !math.IsNaN(m.Damping) || !math.IsNaN(m.TimeConstant) {
			t.Errorf("mode %v: wn %g, damping %g, tau %g; want 0, n/a, n/a", m.Eigenvalue, m.NaturalFreq, m.Damping, m.TimeConstant)
		}
	}
}
