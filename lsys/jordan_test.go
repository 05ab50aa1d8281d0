package lsys

import (
	"math"
	"math/cmplx"
	"math/rand/v2"
	"reflect"
	"testing"

	"gonum.org/v1/gonum/mat"
)

func jordanOf(t *testing.T, A *mat.Dense) *JordanStructure {
	t.Helper()
	js, err := Jordan(A, 0, 0)
	if err != nil {
		t.Fatal(err)
	}
	return js
}

func TestJordanExactCases(t *testing.T) {
	// Closed forms (Golub & Wilkinson 1976, sec. 1): [[-1, 1], [0, -1]] is one
	// Jordan block of size 2; two identical cascaded lags 1/(s+2) feeding
	// each other are the same; two uncoupled identical lags are two 1x1
	// blocks (semisimple).
	cases := []struct {
		name   string
		A      []float64
		value  float64
		blocks []int
	}{
		{"jordan block", []float64{-1, 1, 0, -1}, -1, []int{2}},
		{"cascaded lags", []float64{-2, 0, 2, -2}, -2, []int{2}},
		{"uncoupled lags", []float64{-2, 0, 0, -2}, -2, []int{1, 1}},
	}
	for _, c := range cases {
		js := jordanOf(t, mat.NewDense(2, 2, c.A))
		if len(js.Clusters) != 1 {
			t.Fatalf("%s: %d clusters, want 1", c.name, len(js.Clusters))
		}
		cl := js.Clusters[0]
		if real(cl.Value) != c.value || cl.Algebraic != 2 || !reflect.DeepEqual(cl.Blocks, c.blocks) || cl.Geometric != len(c.blocks) {
			t.Errorf("%s: %+v, want value %v blocks %v", c.name, cl, c.value, c.blocks)
		}
	}
}

func TestJordanHiddenDefective(t *testing.T) {
	// Planted: J = diag(J3(-1), J1(-1), J2(-3), real Jordan block of size 2
	// for the pair -0.5 +- 2j), hidden by a random similarity of condition
	// about 10. Reference: the Jordan form itself (Golub & Wilkinson 1976).
	J := mat.NewDense(10, 10, nil)
	set := func(i, j int, v float64) { J.Set(i, j, v) }
	// J3(-1)
	set(0, 0, -1)
	set(1, 1, -1)
	set(2, 2, -1)
	set(0, 1, 1)
	set(1, 2, 1)
	// J1(-1)
	set(3, 3, -1)
	// J2(-3)
	set(4, 4, -3)
	set(5, 5, -3)
	set(4, 5, 1)
	// [[C, I], [0, C]], C = [[-0.5, 2], [-2, -0.5]]
	for _, o := range []int{6, 8} {
		set(o, o, -0.5)
		set(o+1, o+1, -0.5)
		set(o, o+1, 2)
		set(o+1, o, -2)
	}
	set(6, 8, 1)
	set(7, 9, 1)
	rng := rand.New(rand.NewPCG(1976, 4))
	U, V := randOrthogonal(rng, 10), randOrthogonal(rng, 10)
	D := mat.NewDense(10, 10, nil)
	for i := 0; i < 10; i++ {
		D.Set(i, i, math.Pow(10, float64(i)/9))
	}
	var S, Si, A mat.Dense
	S.Mul(U, D)
	S.Mul(&S, V)
	Si.Inverse(&S)
	A.Mul(&S, J)
	A.Mul(&A, &Si)
	js := jordanOf(t, &A)
	want := map[complex128][]int{-1: {3, 1}, -3: {2}, complex(-0.5, 2): {2}}
	if len(js.Clusters) != 3 {
		for _, c := range js.Clusters {
			t.Logf("cluster %v members %v tol %.3g", c.Value, c.Members, c.Tol)
		}
		t.Fatalf("%d clusters, want 3", len(js.Clusters))
	}
	for _, c := range js.Clusters {
		var key complex128
		for k := range want {
			if math.Abs(real(c.Value-k)) < 1e-6 && math.Abs(imag(c.Value-k)) < 1e-6 {
				key = k
			}
		}
		if !reflect.DeepEqual(c.Blocks, want[key]) {
			t.Errorf("cluster %v: blocks %v (ranks %v, spread %.3g, tol %.3g), want %v", c.Value, c.Blocks, c.Ranks, c.Spread, c.Tol, want[key])
		}
	}
}

func TestJordanNearDefective(t *testing.T) {
	// [[-1, 1], [d, -1]] has eigenvalues -1 +- sqrt(d): for d = 1e-10 they
	// are distinct (+-1e-5 apart) and the matrix is diagonalizable. In these
	// coordinates each eigenvalue has condition 1/(2 sqrt(d)) = 5e4, but a
	// change of units (state 2 scaled by 2^17, the power of two nearest
	// 1/sqrt(d)) makes it the nearly symmetric [[-1, b], [c, -1]] with
	// b = 2^-17, c = d 2^17, whose eigenvalues have condition
	// (b + c) / (2 sqrt(b c)) (closed form: v = (sqrt b, +-sqrt c),
	// w = (sqrt c, +-sqrt b)). Decisions are made in those unit-free
	// coordinates: two simple, well-conditioned eigenvalues.
	A := mat.NewDense(2, 2, []float64{-1, 1, 1e-10, -1})
	js := jordanOf(t, A)
	if len(js.Clusters) != 2 {
		t.Fatalf("%d clusters, want 2 simple eigenvalues", len(js.Clusters))
	}
	b, c := math.Exp2(-17), 1e-10*math.Exp2(17)
	wantCond := (b + c) / (2 * math.Sqrt(b*c))
	for _, cl := range js.Clusters {
		if cl.Algebraic != 1 || cl.Defective() {
			t.Errorf("cluster %+v", cl)
		}
		if math.Abs(cl.Cond-wantCond)/wantCond > 1e-6 {
			t.Errorf("cond %.6g, want %.6g", cl.Cond, wantCond)
		}
	}
	// The same matrix hidden by an orthogonal similarity.
	rng := rand.New(rand.NewPCG(10, 10))
	Q := randOrthogonal(rng, 2)
	var B mat.Dense
	B.Mul(Q, A)
	B.Mul(&B, Q.T())
	if js := jordanOf(t, &B); len(js.Clusters) != 2 {
		t.Errorf("hidden near-defective: %d clusters, want 2", len(js.Clusters))
	}
}

func TestModesDefective(t *testing.T) {
	// Two identical cascaded lags driven at the first: one mode, multiplicity
	// 2, one Jordan block of size 2, reachable (the input reaches the chain)
	// and observable from the last lag (Golub & Wilkinson 1976; Hautus 1969).
	A := mat.NewDense(2, 2, []float64{-2, 0, 2, -2})
	B := mat.NewDense(2, 1, []float64{1, 0})
	C := mat.NewDense(1, 2, []float64{0, 1})
	s, _ := FromMatrices(A, B, C, nil, 0)
	mt, err := Modes(s)
	if err != nil {
		t.Fatal(err)
	}
	if len(mt.Modes) != 1 {
		t.Fatalf("%d modes", len(mt.Modes))
	}
	m := mt.Modes[0]
	if m.Multiplicity != 2 || !reflect.DeepEqual(m.Blocks, []int{2}) || !m.Reachable || !m.Observable {
		t.Errorf("%+v", m)
	}
	// Driving the second lag only cannot reach the first: PBH fails.
	s2, _ := FromMatrices(A, mat.NewDense(2, 1, []float64{0, 1}), C, nil, 0)
	mt2, _ := Modes(s2)
	if mt2.Modes[0].Reachable {
		t.Errorf("input at the end of the chain reported as reaching the whole mode: margin %.3g tol %.3g", mt2.Modes[0].ReachMargin, mt2.Modes[0].Tol)
	}
	// Two uncoupled identical lags with one input: not reachable (PBH,
	// geometric multiplicity 2 > 1 input).
	s3, _ := FromMatrices(mat.NewDense(2, 2, []float64{-2, 0, 0, -2}), mat.NewDense(2, 1, []float64{1, 1}), nil, nil, 0)
	mt3, _ := Modes(s3)
	if mt3.Modes[0].Reachable || !reflect.DeepEqual(mt3.Modes[0].Blocks, []int{1, 1}) {
		t.Errorf("uncoupled lags: %+v", mt3.Modes[0])
	}
}

func TestModesDefectiveShape(t *testing.T) {
	// A two-mass drive with a rigid-body double eigenvalue at 0 (a Jordan
	// block: position grows like t under a constant speed): its shape is
	// both angles equal, rates zero (fact of the trade: rigid rotation).
	A := mat.NewDense(4, 4, []float64{0, 1, 0, 0, -15500, -20, 15500, 20, 0, 0, 0, 1, 5167, 6.67, -5167, -6.67})
	s, _ := FromMatrices(A, mat.NewDense(4, 1, []float64{0, 5000, 0, 0}), mat.NewDense(1, 4, []float64{0, 0, 0, 1}), nil, 0)
	mt, err := Modes(s)
	if err != nil {
		t.Fatal(err)
	}
	m := mt.Modes[0]
	if m.Eigenvalue != 0 || m.Multiplicity != 2 || !reflect.DeepEqual(m.Blocks, []int{2}) {
		t.Fatalf("rigid mode %+v", m)
	}
	want := []complex128{1, 0, 1, 0}
	for i := range want {
		if cmplx.Abs(m.Shape[i]-want[i]) > 1e-10 {
			t.Errorf("shape %v, want %v", m.Shape, want)
			break
		}
	}
	// Speed does not see the rigid position: PBH fails for the output.
	if m.Observable || !m.Reachable {
		t.Errorf("rigid mode reachable %v observable %v", m.Reachable, m.Observable)
	}
}

func TestJordanClusterUsesSpread(t *testing.T) {
	// Two cascaded lags of 10 ms and 10.1 ms: A = [[-100, 0], [100, -99]],
	// eigenvalues -100 and -99. Clustered on purpose (absolute tolerance 2)
	// they are one eigenvalue -99.5 of spread 0.5. A + 99.5 I =
	// [[-0.5, 0], [100, 0.5]] has singular values about 100 and
	// 0.25/100 = 0.0025 (their product is |det| = 0.25, closed form): one
	// of them is below the spread, so within the cluster's tolerance the
	// pair is one Jordan block of size 2 (rank 1, then 0), not two
	// eigenvectors. The diagonal matrix diag(-100, -99) clustered the same
	// way has A + 99.5 I = diag(-0.5, 0.5): rank 0, two blocks of size 1.
	js, err := Jordan(mat.NewDense(2, 2, []float64{-100, 0, 100, -99}), 2, 0)
	if err != nil {
		t.Fatal(err)
	}
	if len(js.Clusters) != 1 {
		t.Fatalf("clusters %v", js.Clusters)
	}
	c := js.Clusters[0]
	if c.Algebraic != 2 || c.Geometric != 1 || len(c.Blocks) != 1 || c.Blocks[0] != 2 || len(c.Ranks) < 1 || c.Ranks[0] != 1 {
		t.Errorf("cascaded lags clustered: alg %d geom %d blocks %v ranks %v; want 2, 1, [2], [1 0]", c.Algebraic, c.Geometric, c.Blocks, c.Ranks)
	}
	jd, err := Jordan(mat.NewDense(2, 2, []float64{-100, 0, 0, -99}), 2, 0)
	if err != nil {
		t.Fatal(err)
	}
	d := jd.Clusters[0]
	if d.Geometric != 2 || len(d.Blocks) != 2 || d.Ranks[0] != 0 {
		t.Errorf("diagonal clustered: geom %d blocks %v ranks %v; want 2, [1 1], [0]", d.Geometric, d.Blocks, d.Ranks)
	}
}
