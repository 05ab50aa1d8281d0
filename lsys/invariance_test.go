package lsys

import (
	"flag"
	"fmt"
	"math"
	"math/cmplx"
	"math/rand/v2"
	"reflect"
	"sort"
	"strings"
	"testing"

	"gonum.org/v1/gonum/mat"
)

// The property behind every verdict: a change of units (diagonal scalings
// of states, inputs and outputs over 1e-6..1e6), a well-conditioned change
// of coordinates, or another way of entering the same model must not
// change any decision (clusters, multiplicities, Jordan blocks, stability,
// reachability, visibility, the Kalman parts) nor any figure that is
// invariant in exact arithmetic (poles, natural frequencies, damping,
// zeros). Systems are generated with the structures that make decisions
// hard: repeated and defective real and complex eigenvalues, rigid-body
// modes and integrators, lightly damped pairs, planted unreachable and
// unseen modes, weak couplings of 1e-6 and 1e-12, continuous and sampled.

var invarianceCount = flag.Int("invariance", 0, "number of generated systems for TestVerdictsInvariant and TestVerdictsSameWhateverTheEntry (0: the quick default)")

// genSystem is one generated system with what was planted in it.
type genSystem struct {
	s    *System
	what string
}

// genModal builds a real block-diagonal A with a chosen eigen-structure, and
// B, C with planted unreachable, unseen and weakly coupled modes, all in
// modal coordinates, then hides it by a random well-conditioned similarity
// (an orthogonal matrix times a diagonal in [0.5, 2]), so the realization is
// dense as physical models are.
func genModal(rng *rand.Rand, sampled bool) genSystem {
	type block struct {
		a    *mat.Dense
		kind string
	}
	var blocks []block
	var desc []string
	// Distinct magnitudes so unrelated eigenvalues are well apart.
	used := map[int]bool{}
	pick := func() float64 {
		for {
			k := rng.IntN(12)
			if !used[k] {
				used[k] = true
				return 0.3 * math.Pow(1.7, float64(k))
			}
		}
	}
	nb := 1 + rng.IntN(4)
	for b := 0; b < nb; b++ {
		w := pick()
		var a *mat.Dense
		kind := ""
		switch rng.IntN(9) {
		case 0: // stable real
			a, kind = mat.NewDense(1, 1, []float64{-w}), "real"
		case 1: // unstable real
			a, kind = mat.NewDense(1, 1, []float64{w}), "unstable real"
		case 2: // lightly damped pair
			z := 0.005 + 0.05*rng.Float64()
			a, kind = pairBlock(-z*w, w*math.Sqrt(1-z*z)), "light pair"
		case 3: // defective real, Jordan block of 2 or 3
			k := 2 + rng.IntN(2)
			a = mat.NewDense(k, k, nil)
			for i := 0; i < k; i++ {
				a.Set(i, i, -w)
				if i+1 < k {
					a.Set(i, i+1, w)
				}
			}
			kind = fmt.Sprintf("Jordan %d at real", k)
		case 4: // semisimple repeated real
			a, kind = mat.NewDense(2, 2, []float64{-w, 0, 0, -w}), "double real, semisimple"
		case 5: // defective complex pair
			z := 0.1
			s, o := -z*w, w*math.Sqrt(1-z*z)
			a = mat.NewDense(4, 4, nil)
			a.Slice(0, 2, 0, 2).(*mat.Dense).Copy(pairBlock(s, o))
			a.Slice(2, 4, 2, 4).(*mat.Dense).Copy(pairBlock(s, o))
			a.Set(0, 2, w)
			a.Set(1, 3, w)
			kind = "defective pair"
		case 6: // rigid-body mode: double zero in a Jordan block
			a, kind = mat.NewDense(2, 2, []float64{0, w, 0, 0}), "rigid body"
		case 7: // integrator
			a, kind = mat.NewDense(1, 1, []float64{0}), "integrator"
		case 8: // undamped pair
			a, kind = pairBlock(0, w), "undamped pair"
		}
		blocks = append(blocks, block{a, kind})
		desc = append(desc, kind)
	}
	n := 0
	for _, b := range blocks {
		r, _ := b.a.Dims()
		n += r
	}
	A := mat.NewDense(n, n, nil)
	off := 0
	var starts []int
	for _, b := range blocks {
		r, _ := b.a.Dims()
		A.Slice(off, off+r, off, off+r).(*mat.Dense).Copy(b.a)
		starts = append(starts, off)
		off += r
	}
	m, p := 1+rng.IntN(2), 1+rng.IntN(2)
	B := randDense(rng, n, m)
	C := randDense(rng, p, n)
	// Plant in one block: its last rows of B (the left eigenvectors of a
	// modal or Jordan block live there) zero or weak, or its first
	// columns of C (the right eigenvectors) zero.
	bi := rng.IntN(len(blocks))
	r, _ := blocks[bi].a.Dims()
	rows := 1
	if strings.Contains(blocks[bi].kind, "pair") {
		rows = 2
	}
	switch rng.IntN(5) {
	case 0:
		for i := starts[bi] + r - rows; i < starts[bi]+r; i++ {
			for j := 0; j < m; j++ {
				B.Set(i, j, 0)
			}
		}
		desc = append(desc, fmt.Sprintf("block %d unreachable", bi))
	case 1:
		for i := starts[bi]; i < starts[bi]+rows; i++ {
			for j := 0; j < p; j++ {
				C.Set(j, i, 0)
			}
		}
		desc = append(desc, fmt.Sprintf("block %d unseen", bi))
	case 2, 3:
		f := 1e-6
		if rng.IntN(2) == 0 {
			f = 1e-12
		}
		for i := starts[bi] + r - rows; i < starts[bi]+r; i++ {
			for j := 0; j < m; j++ {
				B.Set(i, j, f*B.At(i, j))
			}
		}
		desc = append(desc, fmt.Sprintf("block %d reached through %g", bi, f))
	}
	ts := 0.0
	if sampled {
		// The exact sampled model of the same modes: A_d = exp(A T).
		ts = 0.05
		var at mat.Dense
		at.Scale(ts, A)
		var err error
		A, err = Expm(&at)
		if err != nil {
			panic(err)
		}
		desc = append(desc, "sampled")
	}
	T := wellConditioned(rng, n)
	var Ti mat.Dense
	if err := Ti.Inverse(T); err != nil {
		panic(err)
	}
	var TA, TAT, TB, CT mat.Dense
	TA.Mul(T, A)
	TAT.Mul(&TA, &Ti)
	TB.Mul(T, B)
	CT.Mul(C, &Ti)
	D := mat.NewDense(p, m, nil)
	s, err := FromMatrices(&TAT, &TB, &CT, D, ts)
	if err != nil {
		panic(err)
	}
	return genSystem{s, strings.Join(desc, ", ")}
}

func pairBlock(sigma, omega float64) *mat.Dense {
	return mat.NewDense(2, 2, []float64{sigma, omega, -omega, sigma})
}

// wellConditioned is Q diag(d) with Q orthogonal and d in [0.5, 2]:
// condition number at most 4.
func wellConditioned(rng *rand.Rand, n int) *mat.Dense {
	Q := randOrthogonal(rng, n)
	for j := 0; j < n; j++ {
		d := math.Exp2(-1 + 2*rng.Float64())
		for i := 0; i < n; i++ {
			Q.Set(i, j, Q.At(i, j)*d)
		}
	}
	return Q
}

// unitScaled returns s in other units: states, inputs and outputs scaled by
// factors drawn log-uniformly from 1e-6..1e6 (x = Sx x', u = Su u',
// y = Sy y').
func unitScaled(rng *rand.Rand, s *System) *System {
	f := func() float64 { return math.Pow(10, -6+12*rng.Float64()) }
	n, m, p := s.N(), s.M(), s.P()
	sx, su, sy := make([]float64, n), make([]float64, m), make([]float64, p)
	for i := range sx {
		sx[i] = f()
	}
	for i := range su {
		su[i] = f()
	}
	for i := range sy {
		sy[i] = f()
	}
	A, B, C, D := mat.NewDense(n, n, nil), mat.NewDense(n, m, nil), mat.NewDense(p, n, nil), mat.NewDense(p, m, nil)
	for i := 0; i < n; i++ {
		for j := 0; j < n; j++ {
			A.Set(i, j, s.A.At(i, j)*sx[j]/sx[i])
		}
		for j := 0; j < m; j++ {
			B.Set(i, j, s.B.At(i, j)*su[j]/sx[i])
		}
	}
	for i := 0; i < p; i++ {
		for j := 0; j < n; j++ {
			C.Set(i, j, s.C.At(i, j)*sx[j]/sy[i])
		}
		for j := 0; j < m; j++ {
			D.Set(i, j, s.D.At(i, j)*su[j]/sy[i])
		}
	}
	out, err := FromMatrices(A, B, C, D, s.Ts)
	if err != nil {
		panic(err)
	}
	return out
}

// similar returns s in coordinates x = T x' with T well-conditioned.
func similar(rng *rand.Rand, s *System) *System {
	n := s.N()
	T := wellConditioned(rng, n)
	var Ti mat.Dense
	if err := Ti.Inverse(T); err != nil {
		panic(err)
	}
	var A, AT, B, C mat.Dense
	A.Mul(&Ti, s.A)
	AT.Mul(&A, T)
	B.Mul(&Ti, s.B)
	C.Mul(s.C, T)
	out, err := FromMatrices(&AT, &B, &C, s.D, s.Ts)
	if err != nil {
		panic(err)
	}
	return out
}

// verdicts lists every decision about s in one comparable string, and the
// invariant figures beside it.
type verdicts struct {
	decisions string
	close     bool // some call was said to be close
	// oneWay: some defective cluster comes from a one-way coupling of
	// parts (see JordanCluster.OneWay).
	oneWay   bool
	poles    []complex128
	wn, zeta []float64
}

func verdictsOf(s *System) (v verdicts, err error) {
	var b strings.Builder
	st, err := StabilityOf(s)
	if err != nil {
		return v, err
	}
	fmt.Fprintf(&b, "stable %v marginal %v unstable %d boundary %d\n", st.Stable, st.Marginal, st.Unstable, st.Boundary)
	js, err := Jordan(s.A, 0, 0)
	if err != nil {
		return v, err
	}
	for _, c := range js.Clusters {
		fmt.Fprintf(&b, "cluster alg %d blocks %v\n", c.Algebraic, c.Blocks)
		v.close = v.close || c.IsClose()
		v.oneWay = v.oneWay || c.OneWay
	}
	mt, err := Modes(s)
	if err != nil {
		return v, err
	}
	for _, m := range mt.Modes {
		fmt.Fprintf(&b, "mode mult %d blocks %v reached %v seen %v\n", m.Multiplicity, m.Blocks, m.Reachable, m.Observable)
		v.close = v.close || m.ReachClose || m.ObserveClose
		v.wn = append(v.wn, m.NaturalFreq)
		v.zeta = append(v.zeta, m.Damping)
	}
	str, err := StructureOf(s, 0)
	if err != nil {
		return v, err
	}
	v.close = v.close || str.AngleClose > 0 || str.Reach.Close() > 0 || str.Observe.Close() > 0
	fmt.Fprintf(&b, "structure reach %d observe %d parts", str.Reach.Dim, str.Observe.Dim)
	for _, p := range str.Parts {
		fmt.Fprintf(&b, " %d", p.Dim)
	}
	b.WriteString("\n")
	v.poles, err = Poles(s)
	if err != nil {
		return v, err
	}
	// Order within a kind of line is the mode table's order by natural
	// frequency, which ties (two modes at |z| = 1) may swap: compare sets.
	lines := strings.Split(strings.TrimSpace(b.String()), "\n")
	sort.Strings(lines)
	v.decisions = strings.Join(lines, "\n") + "\n"
	return v, nil
}

// sameFigures compares the invariant figures; values are accurate to about
// u^(1/k) relative for a k-fold defective eigenvalue's members, and the
// cluster means much better, so 1e-6 relative to the largest pole covers
// rounding without hiding a real change.
func sameFigures(a, b verdicts) string {
	if len(a.poles) != len(b.poles) {
		return fmt.Sprintf("%d poles, then %d", len(a.poles), len(b.poles))
	}
	scale := 1.0
	for _, p := range a.poles {
		scale = math.Max(scale, cmplx.Abs(p))
	}
	pa, pb := sortedComplex(a.poles), sortedComplex(b.poles)
	for i := range pa {
		if cmplx.Abs(pa[i]-pb[i]) > 1e-6*scale {
			return fmt.Sprintf("pole %v, then %v", pa[i], pb[i])
		}
	}
	for i := range a.wn {
		if math.Abs(a.wn[i]-b.wn[i]) > 1e-6*scale || math.Abs(a.zeta[i]-b.zeta[i]) > 1e-6*math.Max(1, scale/math.Max(a.wn[i], 1e-300)) && a.wn[i] > 1e-6*scale {
			return fmt.Sprintf("mode %d: wn %.6g zeta %.6g, then wn %.6g zeta %.6g", i, a.wn[i], a.zeta[i], b.wn[i], b.zeta[i])
		}
	}
	return ""
}

func sortedComplex(v []complex128) []complex128 {
	out := append([]complex128(nil), v...)
	sort.Slice(out, func(i, j int) bool {
		if math.Abs(real(out[i])-real(out[j])) > 1e-6*math.Max(1, cmplx.Abs(out[i])) {
			return real(out[i]) < real(out[j])
		}
		return imag(out[i]) < imag(out[j])
	})
	return out
}

// TestVerdictsInvariant generates systems and checks that every verdict
// and invariant figure is the same in other units, in other well-conditioned
// coordinates, and in both at once. A realization whose displays say a call
// is close (with the figures compared) is counted apart: there the model
// itself, rounded differently, sits at a threshold. So is a realization
// that is, as entered, an exact one-way coupling of parts with equal
// eigenvalues (JordanCluster.OneWay without Coupled): a change of
// coordinates can round a semisimple double into [[a, 0], [c, a]], which is
// a Jordan block in exact arithmetic and, since only products of couplings
// around cycles are unit-free, cannot be told in any units from a cascade
// of equal stages; no decision procedure can call both alike. The quick run
// (300 systems) is part of go test; go test ./lsys -run VerdictsInvariant
// -invariance 10000 runs the long one.
func TestVerdictsInvariant(t *testing.T) {
	count := *invarianceCount
	if count == 0 {
		count = 300
	}
	rng := rand.New(rand.NewPCG(2026, 12))
	failed, systems, closeCalls, oneWay := 0, 0, 0, 0
	for k := 0; k < count; k++ {
		g := genModal(rng, k%4 == 3)
		base, err := verdictsOf(g.s)
		if err != nil {
			t.Errorf("system %d (%s): %v", k, g.what, err)
			failed++
			continue
		}
		bad := false
		for trial, other := range []*System{unitScaled(rng, g.s), similar(rng, g.s), unitScaled(rng, similar(rng, g.s))} {
			got, err := verdictsOf(other)
			why := ""
			switch {
			case err != nil:
				why = err.Error()
			case got.decisions != base.decisions && (base.close || got.close):
				closeCalls++
				continue
			case got.decisions != base.decisions && (base.oneWay || got.oneWay):
				oneWay++
				continue
			case got.decisions != base.decisions:
				why = fmt.Sprintf("decisions differ:\n%s---- then\n%s", base.decisions, got.decisions)
			default:
				why = sameFigures(base, got)
			}
			if why != "" {
				failed++
				bad = true
				if failed <= 30 {
					t.Errorf("system %d (%s), change %d (%s): %s\nA = %v", k, g.what, trial, []string{"units", "coordinates", "both"}[trial], why, mat.Formatted(g.s.A, mat.Squeeze()))
				}
			}
		}
		if bad {
			systems++
		}
	}
	t.Logf("%d generated systems, each in 3 other realizations: %d changes of verdict in %d systems; %d differing realizations flagged as close calls; %d differing where one realization is an exact one-way coupling of equal parts", count, failed, systems, closeCalls, oneWay)
	// A guard, not a reference: exemptions must stay rare, or close-call
	// flags set too freely would let the test pass whatever the decisions
	// do (1% measured at 20000 systems; the bound is common practice).
	if f := float64(closeCalls+oneWay) / float64(3*count); f > 0.05 {
		t.Errorf("%.1f%% of the realizations differ on exempted calls; close calls are flagged too freely", 100*f)
	}
}

// TestUnitFreeRegressions: the decisions found wrong in other units or
// other realizations, each against an outside reference.
func TestUnitFreeRegressions(t *testing.T) {
	// 1. The gimbal with the payload angle and rate in mrad (z = diag(1,
	// 1, 1000, 1000) x). Characteristic polynomial s^2 (s^2 + 26.667 s +
	// 20667) (numpy.poly of this A, Debian numpy 1.24: coefficients 1,
	// 26.667, 20667, 5e-13, -1e-15): poles 0, 0 and -13.3335 +- 143.14055j
	// (numpy.linalg.eigvals), the double pole at 0 a Jordan block (rigid
	// body: the position grows like t), so the model is unstable.
	g, err := FromMatrices(mat.NewDense(4, 4, []float64{0, 1, 0, 0, -15500, -20, 15.5, 0.02, 0, 0, 0, 1, 5167000, 6667, -5167, -6.667}), nil, nil, nil, 0)
	if err != nil {
		t.Fatal(err)
	}
	p, err := Poles(g)
	if err != nil {
		t.Fatal(err)
	}
	want := []complex128{0, 0, complex(-13.3335, 143.14055253), complex(-13.3335, -143.14055253)}
	for i := range want {
		if cmplx.Abs(p[i]-want[i]) > 1e-6*143 {
			t.Errorf("gimbal in mrad: pole %d = %v, want %v", i, p[i], want[i])
		}
	}
	st, _ := StabilityOf(g)
	if st.Stable || st.Marginal || st.Unstable != 2 {
		t.Errorf("gimbal in mrad: %+v, want unstable (defective double pole at 0)", st)
	}
	js, _ := Jordan(g.A, 0, 0)
	if len(js.Clusters) != 2 || js.Clusters[0].Value != 0 || !reflect.DeepEqual(js.Clusters[0].Blocks, []int{2}) {
		t.Errorf("gimbal in mrad: Jordan %+v, want a block of 2 at 0", js.Clusters)
	}

	// 2. Two identical resonators in cascade: (s^2 + 0.4 s + 4)^2, each of
	// -0.2 +- 1.98997j (closed form: -0.2 +- j sqrt(4 - 0.04)) a Jordan
	// block of 2 (the coupling entry 1 is nonzero); undamped, the same
	// cascade grows like t sin 2t: unstable.
	for _, c := range []struct {
		damp float64
		want complex128
	}{{0.4, complex(-0.2, math.Sqrt(3.96))}, {0, complex(0, 2)}} {
		A := mat.NewDense(4, 4, []float64{0, 1, 0, 0, -4, -c.damp, 0, 0, 0, 0, 0, 1, 1, 0, -4, -c.damp})
		js, err := Jordan(A, 0, 0)
		if err != nil {
			t.Fatal(err)
		}
		if len(js.Clusters) != 1 || !reflect.DeepEqual(js.Clusters[0].Blocks, []int{2}) || cmplx.Abs(js.Clusters[0].Value-c.want) > 1e-9 {
			t.Errorf("cascade, damping %g: %+v, want one block of 2 at %v", c.damp, js.Clusters, c.want)
		}
		s, _ := FromMatrices(A, nil, nil, nil, 0)
		st, _ := StabilityOf(s)
		if c.damp == 0 && (st.Marginal || st.Unstable == 0) {
			t.Errorf("undamped cascade: %+v, want unstable", st)
		}
	}

	// 3. Reachability depends on (A, B) alone: A = diag(-1, -2), B = [1;
	// 1e-12] is reachable (exact: the eigenvalues are distinct and both
	// rows of B nonzero, Hautus 1969), whatever C is.
	for _, C := range [][]float64{{1, 0}, {1, 1}} {
		s, _ := FromMatrices(mat.NewDense(2, 2, []float64{-1, 0, 0, -2}), mat.NewDense(2, 1, []float64{1, 1e-12}), mat.NewDense(1, 2, C), nil, 0)
		str, err := StructureOf(s, 0)
		if err != nil {
			t.Fatal(err)
		}
		if !str.Controllable {
			t.Errorf("C = %v: not controllable, want controllable", C)
		}
		mt, _ := Modes(s)
		for _, m := range mt.Modes {
			if !m.Reachable {
				t.Errorf("C = %v: mode %v unreached", C, m.Eigenvalue)
			}
		}
	}
}

// TestVerdictsSameWhateverTheEntry: the same model entered as matrices and
// as a transfer function (its coefficients, realized again) gets the same
// verdicts on the part the transfer function carries, the minimal
// realization: stability, clusters with their Jordan blocks, and poles.
// Generated single-input single-output systems as in
// TestVerdictsInvariant (continuous and sampled). Polynomial coefficients
// hold a k-fold pole only to about u^(1/k), so poles are compared to 1e-4
// of the largest. An equation block yields the same matrices exactly (the
// language builds A, B, C, D by dual numbers), so its verdicts are those of
// the matrices. A realization whose Realize warning says its coefficients
// cannot fix a pole, or that a pole was cancelled on a close call, counts as
// a close call said so, as does a transfer function whose note says its
// coefficients do not carry its poles. The quick run (600 generated, about
// 150 of them single-input single-output) is part of go test; -invariance N
// runs N.
func TestVerdictsSameWhateverTheEntry(t *testing.T) {
	count := *invarianceCount
	if count == 0 {
		count = 600
	}
	rng := rand.New(rand.NewPCG(2026, 13))
	tried, failed, closeCalls := 0, 0, 0
	for k := 0; k < count; k++ {
		g := genModal(rng, k%4 == 3)
		if g.s.M() != 1 || g.s.P() != 1 {
			continue
		}
		min, err := Minimal(g.s, 0)
		if err != nil || min.N() == 0 {
			continue
		}
		tf, err := TransferFunctions(g.s, 0)
		if err != nil {
			t.Errorf("system %d (%s): %v", k, g.what, err)
			continue
		}
		re, info, err := RealizeChecked(tf, g.s.Ts, 0)
		if err != nil {
			t.Errorf("system %d (%s): realizing its transfer function: %v", k, g.what, err)
			continue
		}
		tried++
		a, err1 := entryVerdicts(min)
		b, err2 := entryVerdicts(re)
		if err1 != nil || err2 != nil {
			t.Errorf("system %d (%s): %v %v", k, g.what, err1, err2)
			continue
		}
		if a.decisions != b.decisions {
			// A realization whose warning says its coefficients cannot
			// fix the poles is a close call said so.
			if a.close || b.close || info.Warning != "" {
				closeCalls++
				continue
			}
			failed++
			if failed <= 30 {
				t.Errorf("system %d (%s): as matrices (minimal part, %d states)\n%s---- as a transfer function (%d states; %s)\n%s", k, g.what, min.N(), a.decisions, re.N(), info.Warning, b.decisions)
			}
			continue
		}
		pa, pb := sortedComplex(a.poles), sortedComplex(b.poles)
		scale := 1.0
		for _, p := range pa {
			scale = math.Max(scale, cmplx.Abs(p))
		}
		for i := range pa {
			if i < len(pb) && cmplx.Abs(pa[i]-pb[i]) > 1e-4*scale {
				failed++
				t.Errorf("system %d (%s): pole %v as matrices, %v as a transfer function", k, g.what, pa[i], pb[i])
				break
			}
		}
	}
	t.Logf("%d single-input single-output systems entered both ways: %d differ, %d close calls", tried, failed, closeCalls)
	// A guard, not a reference, as in TestVerdictsInvariant (3.5% measured
	// at 964 systems; the bound is common practice).
	if tried > 0 && float64(closeCalls)/float64(tried) > 0.1 {
		t.Errorf("%d of %d systems differ on calls said to be close: too many to trust the exemption", closeCalls, tried)
	}
}

// entryVerdicts is verdictsOf without what depends on the coordinates
// (the Kalman parts of a minimal system are trivially all one part).
func entryVerdicts(s *System) (v verdicts, err error) {
	var b strings.Builder
	st, err := StabilityOf(s)
	if err != nil {
		return v, err
	}
	fmt.Fprintf(&b, "stable %v marginal %v unstable %d boundary %d\n", st.Stable, st.Marginal, st.Unstable, st.Boundary)
	js, err := Jordan(s.A, 0, 0)
	if err != nil {
		return v, err
	}
	var lines []string
	for _, c := range js.Clusters {
		lines = append(lines, fmt.Sprintf("cluster alg %d blocks %v", c.Algebraic, c.Blocks))
		v.close = v.close || c.IsClose()
	}
	sort.Strings(lines)
	b.WriteString(strings.Join(lines, "\n") + "\n")
	v.poles, err = Poles(s)
	v.decisions = b.String()
	return v, err
}

// TestRoundingLevelCouplingsSaidClose: decisions that rest on entries at
// rounding level in the units entered are marked close, and a weakly
// reached Jordan chain whose staircase step rounds to zero is still found
// reached, as its PBH test says.
func TestRoundingLevelCouplingsSaidClose(t *testing.T) {
	// [[1, 0], [c, 1]] with any c != 0 is diagonally similar to [[1, 0],
	// [1, 1]]: one Jordan block of size 2 (Golub & Wilkinson 1976, sec. 1).
	// c = 3.5e-18 is below the rounding of the entries, so the call is
	// close: rounding in those units would have given a semisimple
	// double eigenvalue.
	A := mat.NewDense(2, 2, []float64{1, 0, 3.5e-18, 1})
	js, err := Jordan(A, 0, 0)
	if err != nil {
		t.Fatal(err)
	}
	if len(js.Clusters) != 1 || fmt.Sprint(js.Clusters[0].Blocks) != "[2]" {
		t.Fatalf("clusters %+v, want one block of size 2", js.Clusters)
	}
	if c := js.Clusters[0]; !c.IsClose() || c.Entered != "blocks [1 1]" {
		t.Errorf("the call is not marked close at the entered scale: Entered %q", c.Entered)
	}
	// In balanced units the same decision is not close.
	js, err = Jordan(mat.NewDense(2, 2, []float64{1, 0, 1, 1}), 0, 0)
	if err != nil {
		t.Fatal(err)
	}
	if js.Clusters[0].IsClose() {
		t.Errorf("[[1, 0], [1, 1]] marked close: %+v", js.Clusters[0])
	}

	// A Jordan chain of 3 at -2 reached only through its last state,
	// with weight 1e-6, plus a simple mode at -5: in exact arithmetic
	// [B, AB, A^2B, A^3B] has full rank 4 (Kalman 1960 rank condition;
	// the chain's last state feeds the others), so all 4 states are
	// reached.
	A = mat.NewDense(4, 4, []float64{-2, 1, 0, 0, 0, -2, 1, 0, 0, 0, -2, 0, 0, 0, 0, -5})
	B := mat.NewDense(4, 1, []float64{1, 1, 1e-6, 1})
	C := mat.NewDense(1, 4, []float64{1, 1, 1, 1})
	rng := rand.New(rand.NewPCG(7, 7))
	for trial := 0; trial < 20; trial++ {
		s, err := FromMatrices(A, B, C, nil, 0)
		if err != nil {
			t.Fatal(err)
		}
		s = similar(rng, s)
		str, err := StructureOf(s, 0)
		if err != nil {
			t.Fatal(err)
		}
		if str.Reach.Dim != 4 {
			t.Errorf("trial %d: reachable dimension %d, want 4", trial, str.Reach.Dim)
		}
	}
}
