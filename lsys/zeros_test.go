package lsys

import (
	"context"
	"math"
	"math/cmplx"
	"math/rand/v2"
	"sort"
	"testing"

	"gonum.org/v1/gonum/mat"
)

func sysOf(t *testing.T, A, B, C, D *mat.Dense) *System {
	t.Helper()
	s, err := FromMatrices(A, B, C, D, 0)
	if err != nil {
		t.Fatal(err)
	}
	return s
}

func TestZerosSISO(t *testing.T) {
	// Closed form: the zeros of a SISO transfer function are the roots of
	// its numerator (no cancellation). Controllable canonical form of
	// (s + 2)/(s^2 + 4 s + 3): zero -2.
	A := mat.NewDense(2, 2, []float64{0, 1, -3, -4})
	B := mat.NewDense(2, 1, []float64{0, 1})
	s := sysOf(t, A, B, mat.NewDense(1, 2, []float64{2, 1}), nil)
	z, err := Zeros(s, 0)
	if err != nil {
		t.Fatal(err)
	}
	if !zerosClose(z.Invariant, []complex128{-2}, 1e-12) || !zerosClose(z.Transmission, []complex128{-2}, 1e-12) {
		t.Errorf("zeros %v / %v, want -2", z.Invariant, z.Transmission)
	}
	// With a direct feedthrough: 1 + (2 - s)/(s^2 + 4s + 3) = (s^2 + 3s + 5)/(...):
	// zeros -1.5 +- j sqrt(11)/2.
	s2 := sysOf(t, A, B, mat.NewDense(1, 2, []float64{2, -1}), mat.NewDense(1, 1, []float64{1}))
	z2, err := Zeros(s2, 0)
	if err != nil {
		t.Fatal(err)
	}
	want := []complex128{complex(-1.5, math.Sqrt(11)/2), complex(-1.5, -math.Sqrt(11)/2)}
	if !zerosClose(z2.Invariant, want, 1e-12) {
		t.Errorf("zeros %v, want %v", z2.Invariant, want)
	}
	// Relative degree 2: 1/(s^2 + 4s + 3) has no finite zeros.
	s3 := sysOf(t, A, B, mat.NewDense(1, 2, []float64{1, 0}), nil)
	z3, _ := Zeros(s3, 0)
	if len(z3.Invariant) != 0 {
		t.Errorf("zeros %v, want none", z3.Invariant)
	}
}

func TestZerosMIMO(t *testing.T) {
	// G = [[1/(s+1), 2/(s+3)], [1/(s+1), 1/(s+1)]]: det G = (1 - s) /
	// ((s+1)^2 (s+3)), so one transmission zero at s = 1 (closed form; for
	// a square G without cancellations the zeros are the roots of the
	// numerator of det G, Skogestad & Postlethwaite, Multivariable Feedback
	// Control, 2nd ed. 2005, sec. 4.5, from memory).
	A := mat.NewDense(3, 3, []float64{-1, 0, 0, 0, -3, 0, 0, 0, -1})
	B := mat.NewDense(3, 2, []float64{1, 0, 0, 2, 0, 1})
	C := mat.NewDense(2, 3, []float64{1, 1, 0, 1, 0, 1})
	s := sysOf(t, A, B, C, nil)
	z, err := Zeros(s, 0)
	if err != nil {
		t.Fatal(err)
	}
	if !zerosClose(z.Invariant, []complex128{1}, 1e-12) {
		t.Errorf("zeros %v, want [1]", z.Invariant)
	}
	// Hidden behind a random similarity and with a 3rd output (non-square):
	// a 3x2 system with an extra independent output generically has no
	// zeros; with the extra output a copy of y1 it keeps s = 1.
	rng := rand.New(rand.NewPCG(82, 4))
	C3 := mat.NewDense(3, 3, []float64{1, 1, 0, 1, 0, 1, 1, 1, 0})
	s3, _ := Transform(sysOf(t, A, B, C3, nil), randDense(rng, 3, 3))
	z3, err := Zeros(s3, 0)
	if err != nil {
		t.Fatal(err)
	}
	if !zerosClose(z3.Invariant, []complex128{1}, 1e-9) {
		t.Errorf("non-square zeros %v, want [1]", z3.Invariant)
	}
	C4 := mat.NewDense(3, 3, []float64{1, 1, 0, 1, 0, 1, 0, 1, 0})
	z4, _ := Zeros(sysOf(t, A, B, C4, nil), 0)
	if len(z4.Invariant) != 0 {
		t.Errorf("tall system zeros %v, want none", z4.Invariant)
	}
}

func TestZerosDecoupling(t *testing.T) {
	// A mode no input reaches is an input-decoupling zero; one no output
	// sees an output-decoupling zero (Rosenbrock 1970, State-space and
	// multivariable theory, ch. 3). Plant: diag(-1, -2, -5), B reaches
	// modes 1 and 2, C sees modes 1 and 3.
	A := mat.NewDense(3, 3, []float64{-1, 0, 0, 0, -2, 0, 0, 0, -5})
	B := mat.NewDense(3, 1, []float64{1, 1, 0})
	C := mat.NewDense(1, 3, []float64{1, 0, 1})
	rng := rand.New(rand.NewPCG(70, 3))
	s, _ := Transform(sysOf(t, A, B, C, mat.NewDense(1, 1, []float64{0.5})), randDense(rng, 3, 3))
	z, err := Zeros(s, 0)
	if err != nil {
		t.Fatal(err)
	}
	if !zerosClose(z.InputDecoupling, []complex128{-5}, 1e-10) || !zerosClose(z.OutputDecoupling, []complex128{-2}, 1e-10) {
		t.Errorf("decoupling zeros in %v out %v", z.InputDecoupling, z.OutputDecoupling)
	}
	// Transmission zero of the minimal part 1/(s+1) + 0.5: s = -3.
	if !zerosClose(z.Transmission, []complex128{-3}, 1e-10) {
		t.Errorf("transmission %v, want [-3]", z.Transmission)
	}
	// Invariant zeros hold all three.
	if !zerosClose(z.Invariant, []complex128{-3, -2, -5}, 1e-9) {
		t.Errorf("invariant %v, want -3, -2, -5", z.Invariant)
	}
}

func TestQZKnownPencil(t *testing.T) {
	// Planted: Q diag(1, 2, -3, 4) Z - s Q diag(1, 1, 1, 0) Z has finite
	// generalized eigenvalues 1, 2, -3 and one infinite (Moler & Stewart
	// 1973, sec. 1: equivalence preserves them).
	rng := rand.New(rand.NewPCG(1973, 1))
	Q, Z := randOrthogonal(rng, 4), randDense(rng, 4, 4)
	var A, E mat.Dense
	A.Mul(Q, mat.NewDense(4, 4, []float64{1, 0, 0, 0, 0, 2, 0, 0, 0, 0, -3, 0, 0, 0, 0, 4}))
	A.Mul(&A, Z)
	E.Mul(Q, mat.NewDense(4, 4, []float64{1, 0, 0, 0, 0, 1, 0, 0, 0, 0, 1, 0, 0, 0, 0, 0}))
	E.Mul(&E, Z)
	ge, err := QZ(&A, &E)
	if err != nil {
		t.Fatal(err)
	}
	var fin []complex128
	inf := 0
	for _, g := range ge {
		if g.Finite(1e-10) {
			fin = append(fin, g.Value())
		} else {
			inf++
		}
	}
	if inf != 1 || !zerosClose(fin, []complex128{1, 2, -3}, 1e-12) {
		t.Errorf("finite %v, %d infinite", fin, inf)
	}
}

func TestQZMatchesStandardEigen(t *testing.T) {
	// With E invertible the generalized eigenvalues are those of E^-1 A
	// (definition); compare QZ with the Hessenberg-QR eigenvalues.
	rng := rand.New(rand.NewPCG(11, 12))
	for trial := 0; trial < 20; trial++ {
		n := 2 + trial%9
		A, E := randDense(rng, n, n), randDense(rng, n, n)
		for i := 0; i < n; i++ {
			E.Set(i, i, E.At(i, i)+4) // keep E well-conditioned
		}
		ge, err := QZ(A, E)
		if err != nil {
			t.Fatal(err)
		}
		var M mat.Dense
		if err := M.Solve(E, A); err != nil {
			t.Fatal(err)
		}
		es, _ := Eigen(&M)
		var got []complex128
		for _, g := range ge {
			got = append(got, g.Value())
		}
		if !zerosClose(got, es.Values, 1e-9) {
			sort.Slice(got, func(i, j int) bool { return real(got[i]) < real(got[j]) })
			t.Errorf("n=%d: QZ %v vs eig %v", n, got, es.Values)
		}
	}
	_ = cmplx.Abs
}

func TestZerosInvertibleFeedthrough(t *testing.T) {
	// With D square and invertible, the invariant zeros are the
	// eigenvalues of A - B D^-1 C (Schur complement of the system pencil;
	// Rosenbrock 1970, ch. 3). Random systems of several sizes.
	rng := rand.New(rand.NewPCG(1982, 18))
	worst := 0.0
	for trial := 0; trial < 30; trial++ {
		n, m := 2+trial%12, 1+trial%3
		A, B, C := randDense(rng, n, n), randDense(rng, n, m), randDense(rng, m, n)
		D := randDense(rng, m, m)
		for i := 0; i < m; i++ {
			D.Set(i, i, D.At(i, i)+3)
		}
		s := sysOf(t, A, B, C, D)
		z, err := Zeros(s, 0)
		if err != nil {
			t.Fatal(err)
		}
		var X, BD mat.Dense
		if err := X.Solve(D, C); err != nil {
			t.Fatal(err)
		}
		BD.Mul(B, &X)
		BD.Sub(A, &BD)
		es, _ := Eigen(&BD)
		w, ok := matchWorst(z.Invariant, es.Values)
		if !ok || w > 1e-8 {
			t.Errorf("n=%d m=%d: zeros %v vs %v (worst %.3g)", n, m, z.Invariant, es.Values, w)
		}
		worst = math.Max(worst, w)
	}
	t.Logf("worst relative difference %.3g", worst)
}

func TestZerosStrictlyProperRandom(t *testing.T) {
	// D = 0, square: a random n-state m x m system generically has n - m
	// finite zeros when C B is invertible (Davison & Wang 1974, Properties
	// and calculation of transmission zeros of linear multivariable
	// systems, Automatica 10; from memory). Each zero makes the pencil
	// lose rank: check the smallest singular value there.
	rng := rand.New(rand.NewPCG(1974, 10))
	for trial := 0; trial < 20; trial++ {
		n, m := 3+trial%8, 1+trial%2
		s := sysOf(t, randDense(rng, n, n), randDense(rng, n, m), randDense(rng, m, n), nil)
		z, err := Zeros(s, 0)
		if err != nil {
			t.Fatal(err)
		}
		if len(z.Invariant) != n-m {
			t.Errorf("n=%d m=%d: %d zeros, want %d", n, m, len(z.Invariant), n-m)
		}
		for _, zz := range z.Invariant {
			sv := pencilSmallest(s, zz)
			if sv > 1e-8 {
				t.Errorf("n=%d m=%d: pencil at zero %v has smallest singular value %.3g", n, m, zz, sv)
			}
		}
	}
}

// pencilSmallest is the smallest singular value of [[A - zI, B], [C, D]]
// (real embedding of the complex matrix; each value appears twice).
func pencilSmallest(s *System, z complex128) float64 {
	v := pencilValues(s, z)
	return v[len(v)-1] / v[0]
}

// pencilValues returns the singular values of the real embedding of
// [[A - zI, B], [C, D]] (each singular value of the complex pencil twice).
func pencilValues(s *System, z complex128) []float64 {
	n, m, p := s.N(), s.M(), s.P()
	N, M := n+p, n+m
	E := mat.NewDense(2*N, 2*M, nil)
	set := func(i, j int, v complex128) {
		E.Set(i, j, real(v))
		E.Set(N+i, M+j, real(v))
		E.Set(i, M+j, -imag(v))
		E.Set(N+i, j, imag(v))
	}
	for i := 0; i < n; i++ {
		for j := 0; j < n; j++ {
			v := complex(s.A.At(i, j), 0)
			if i == j {
				v -= z
			}
			set(i, j, v)
		}
		for j := 0; j < m; j++ {
			set(i, n+j, complex(s.B.At(i, j), 0))
		}
	}
	for i := 0; i < p; i++ {
		for j := 0; j < n; j++ {
			set(n+i, j, complex(s.C.At(i, j), 0))
		}
		for j := 0; j < m; j++ {
			set(n+i, n+j, complex(s.D.At(i, j), 0))
		}
	}
	var svd mat.SVD
	svd.Factorize(E, mat.SVDNone)
	return svd.Values(nil)
}

func TestZerosNonSquareAndDegenerate(t *testing.T) {
	// Definition (Rosenbrock 1970; Emami-Naeini & Van Dooren 1982): an
	// invariant zero is where the system pencil loses rank below its
	// normal rank. Random non-square systems, some with repeated input
	// columns or output rows (rank-deficient transfer matrices): at every
	// zero found the pencil's rank must drop.
	rng := rand.New(rand.NewPCG(1982, 4))
	found := 0
	for trial := 0; trial < 120; trial++ {
		n, m, p := 2+trial%6, 1+trial%3, 1+(trial/3)%3
		A, B, C := randDense(rng, n, n), randDense(rng, n, m), randDense(rng, p, n)
		var D *mat.Dense
		if trial%3 == 0 {
			D = randDense(rng, p, m)
		}
		if trial%4 == 0 && m > 1 {
			for i := 0; i < n; i++ {
				B.Set(i, 1, B.At(i, 0))
			}
		}
		s := sysOf(t, A, B, C, D)
		z, err := Zeros(s, 0)
		if err != nil {
			t.Fatalf("n=%d m=%d p=%d: %v", n, m, p, err)
		}
		// Normal rank at a generic point.
		gen := pencilValues(s, complex(0.37, 1.91))
		r := 0
		for _, v := range gen {
			if v > 1e-9*gen[0] {
				r++
			}
		}
		for _, zz := range z.Invariant {
			sv := pencilValues(s, zz)
			if sv[r-1] > 1e-7*sv[0] {
				t.Errorf("n=%d m=%d p=%d: no rank drop at zero %v (sigma %.3g of %.3g)", n, m, p, zz, sv[r-1], sv[0])
			}
			found++
		}
	}
	if found == 0 {
		t.Error("no zeros found at all: the test checks nothing")
	}
}

func TestQZSingularE(t *testing.T) {
	// A - l E with E of rank k < n has exactly k finite generalized
	// eigenvalues generically (Moler & Stewart 1973, sec. 1); each must be
	// a backward-stable answer: the smallest singular value of A - l E
	// small relative to ||A|| + |l| ||E||.
	rng := rand.New(rand.NewPCG(3, 3))
	worst := 0.0
	for trial := 0; trial < 15; trial++ {
		n := 4 + trial*2
		k := n - 1 - trial%4
		A := randDense(rng, n, n)
		var E mat.Dense
		E.Mul(randDense(rng, n, k), randDense(rng, k, n))
		ge, err := QZ(A, &E)
		if err != nil {
			t.Fatalf("n=%d: %v", n, err)
		}
		fin := 0
		for _, g := range ge {
			if !g.Finite(1e-8) {
				continue
			}
			fin++
			l := g.Value()
			M := mat.NewDense(2*n, 2*n, nil)
			for i := 0; i < n; i++ {
				for j := 0; j < n; j++ {
					v := complex(A.At(i, j), 0) - l*complex(E.At(i, j), 0)
					M.Set(i, j, real(v))
					M.Set(n+i, n+j, real(v))
					M.Set(i, n+j, -imag(v))
					M.Set(n+i, j, imag(v))
				}
			}
			var svd mat.SVD
			svd.Factorize(M, mat.SVDNone)
			sv := svd.Values(nil)
			worst = math.Max(worst, sv[2*n-1]/(mat.Norm(A, 2)+cmplx.Abs(l)*mat.Norm(&E, 2)))
		}
		if fin != k {
			t.Errorf("n=%d, rank(E)=%d: %d finite eigenvalues", n, k, fin)
		}
	}
	if worst > 1e-13 {
		t.Errorf("worst backward residual %.3g", worst)
	}
	t.Logf("worst backward residual %.3g", worst)
}

// frameModel is a three-storey shear frame: floor masses m, m and roof mass
// mr, storey stiffness k, stiffness-proportional damping beta, states
// x1, x2, x3 (storey displacements) and v1, v2, v3, inputs forces on each
// floor (brace, tendon, shaker), outputs the displacements.
func frameModel(t *testing.T, m, mr, k, beta float64) *System {
	t.Helper()
	A := mat.NewDense(6, 6, nil)
	K := mat.NewDense(3, 3, []float64{2 * k, -k, 0, -k, 2 * k, -k, 0, -k, k})
	ms := []float64{m, m, mr}
	B := mat.NewDense(6, 3, nil)
	C := mat.NewDense(3, 6, nil)
	for i := 0; i < 3; i++ {
		A.Set(i, i+3, 1)
		for j := 0; j < 3; j++ {
			A.Set(3+i, j, -K.At(i, j)/ms[i])
			A.Set(3+i, 3+j, -beta*K.At(i, j)/ms[i])
		}
		B.Set(3+i, i, 1/ms[i])
		C.Set(i, i, 1)
	}
	return sysOf(t, A, B, C, nil)
}

// channel returns the single channel out <- in of s with its input scaled
// by gu and its output by gy.
func channel(t *testing.T, s *System, out, in int, gy, gu float64) *System {
	t.Helper()
	n := s.N()
	b := mat.NewDense(n, 1, nil)
	c := mat.NewDense(1, n, nil)
	for k := 0; k < n; k++ {
		b.Set(k, 0, gu*s.B.At(k, in))
		c.Set(0, k, gy*s.C.At(out, k))
	}
	return sysOf(t, s.A, b, c, nil)
}

func TestZerosUnitsInvariant(t *testing.T) {
	// Closed form (derived here): with c(s) = k (1 + beta s) the frame obeys
	// Z(s) x = f, Z = [[m s^2 + 2c, -c, 0], [-c, m s^2 + 2c, -c],
	// [0, -c, mr s^2 + c]]. By cofactors, x1/f3 = c^2 / det Z and
	// x2/f3 = c (m s^2 + 2c) / det Z. So floor1 <- shaker has the double
	// zero -1/beta = -500; floor2 <- shaker has -500 and the roots of
	// m s^2 + 2 k beta s + 2k, which for k/m = 1000, beta = 0.002 are
	// -2 +- j sqrt(1996) (a mode with a node at floor 2: an
	// output-decoupling pair, so the transmission zero is -500 alone).
	// The zeros do not depend on units: the model in t, kN, m and in
	// kg, N, m (SI) must give the same, as must scaled inputs, outputs and
	// states (positions in mm).
	pair := []complex128{complex(-2, math.Sqrt(1996)), complex(-2, -math.Sqrt(1996))}
	mm := mat.NewDense(6, 6, nil)
	for i := 0; i < 6; i++ {
		mm.Set(i, i, map[bool]float64{true: 1000, false: 1}[i < 3])
	}
	cases := []struct {
		name        string
		m, mr, k    float64
		gy, gu      float64
		millimetres bool
	}{
		{"t, kN, m", 20, 10, 2e4, 1, 1, false},
		{"kg, N, m", 20000, 10000, 2e7, 1, 1, false},
		{"kg, N, m; output x 1e4", 20000, 10000, 2e7, 1e4, 1, false},
		{"kg, N, m; input x 1e4", 20000, 10000, 2e7, 1, 1e4, false},
		{"kg, N, m; input x 1e-4, output x 1e4", 20000, 10000, 2e7, 1e4, 1e-4, false},
		{"kg, N, mm", 20000, 10000, 2e7, 1000, 1, true},
	}
	for _, c := range cases {
		f := frameModel(t, c.m, c.mr, c.k, 0.002)
		if c.millimetres {
			var err error
			if f, err = Transform(f, mm); err != nil {
				t.Fatal(err)
			}
		}
		z1, err := Zeros(channel(t, f, 0, 2, c.gy, c.gu), 0)
		if err != nil {
			t.Fatalf("%s: %v", c.name, err)
		}
		want := []complex128{-500, -500}
		if !zerosClose(z1.Invariant, want, 1e-9) || !zerosClose(z1.Transmission, want, 1e-9) {
			t.Errorf("%s: floor1 <- shaker zeros %v / %v, want the double zero -500", c.name, z1.Invariant, z1.Transmission)
		}
		z2, err := Zeros(channel(t, f, 1, 2, c.gy, c.gu), 0)
		if err != nil {
			t.Fatalf("%s: %v", c.name, err)
		}
		if !zerosClose(z2.Invariant, append([]complex128{-500}, pair...), 1e-9) || !zerosClose(z2.Transmission, []complex128{-500}, 1e-9) || !zerosClose(z2.OutputDecoupling, pair, 1e-9) {
			t.Errorf("%s: floor2 <- shaker zeros %v / %v / %v, want -500, -2 +- j sqrt(1996)", c.name, z2.Invariant, z2.Transmission, z2.OutputDecoupling)
		}
	}
}

// TestZerosDoubleAtOrigin: s^2 / ((s^2 + 0.2 s + 4)(s + 3)(s + 10)) has a
// double zero at s = 0 exactly (closed form: the numerator). Rounding
// splits it into a pair about sqrt(u) ||A|| apart; it must read as 0 with
// multiplicity 2 and the spread stated, in the invariant and the
// transmission zeros alike.
func TestZerosDoubleAtOrigin(t *testing.T) {
	num := Poly{0, 0, 1}
	den := Poly{1}
	for _, f := range []Poly{{4, 0.2, 1}, {3, 1}, {10, 1}} {
		den = den.Mul(f)
	}
	s, err := Realize([][]*Rational{{{Num: num, Den: den}}}, 0)
	if err != nil {
		t.Fatal(err)
	}
	zs, err := Zeros(s, 0)
	if err != nil {
		t.Fatal(err)
	}
	for name, z := range map[string][]complex128{"invariant": zs.Invariant, "transmission": zs.Transmission} {
		if len(z) != 2 || z[0] != 0 || z[1] != 0 {
			t.Errorf("%s zeros %v, want exactly 0, 0", name, z)
		}
	}
	for name, m := range map[string][]MultipleValue{"invariant": zs.InvariantMultiple, "transmission": zs.TransmissionMultiple} {
		if len(m) != 1 || m[0].Value != 0 || m[0].Count != 2 || !(m[0].Spread > 0 && m[0].Spread < 1e-6) {
			t.Errorf("%s multiple zeros %+v, want one double zero at 0 with a small spread", name, m)
		}
	}
}

// TestFrequencyRangeIgnoresZerosAtOrigin: the default range is a decade
// beyond the slowest and fastest poles and zeros that have a frequency
// (common practice); a double zero at 0 split by rounding into values of
// 1e-8 must not stretch it to 1e-9 rad/s. The slowest pole of
// s^2 / ((s^2 + 0.2 s + 4)(s + 3)(s + 10)) is at 2 rad/s.
func TestFrequencyRangeIgnoresZerosAtOrigin(t *testing.T) {
	num := Poly{0, 0, 1}
	den := Poly{1}
	for _, f := range []Poly{{4, 0.2, 1}, {3, 1}, {10, 1}} {
		den = den.Mul(f)
	}
	s, err := Realize([][]*Rational{{{Num: num, Den: den}}}, 0)
	if err != nil {
		t.Fatal(err)
	}
	fr, err := Frequency(context.Background(), s, FrequencyOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if fr.W[0] < 0.01 {
		t.Errorf("default range starts at %g rad/s, want about a decade below 2 rad/s", fr.W[0])
	}
}
