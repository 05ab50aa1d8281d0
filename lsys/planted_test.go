package lsys

import (
	"math"
	"math/rand/v2"
	"reflect"
	"testing"

	"gonum.org/v1/gonum/mat"
)

// hide returns S M S^-1 for a random S of condition about cond.
func hide(rng *rand.Rand, M *mat.Dense, cond float64) (*mat.Dense, *mat.Dense) {
	n, _ := M.Dims()
	U, V := randOrthogonal(rng, n), randOrthogonal(rng, n)
	D := mat.NewDense(n, n, nil)
	for i := 0; i < n; i++ {
		D.Set(i, i, math.Pow(cond, float64(i)/math.Max(1, float64(n-1))))
	}
	var S, Si, A mat.Dense
	S.Mul(U, D)
	S.Mul(&S, V)
	Si.Inverse(&S)
	A.Mul(&S, M)
	A.Mul(&A, &Si)
	return &A, &S
}

func TestPlantedNearDefectiveCluster(t *testing.T) {
	// J2(-1) perturbed by d = 1e-10 in its (2,1) entry has the distinct
	// eigenvalues -1 +- 1e-5 (closed form: -1 +- sqrt(d)), each with
	// condition about 1/(2 sqrt d) before hiding; the exact J2(-1) is
	// defective (Golub & Wilkinson 1976). Both hidden in a 6-state system
	// with a pair and two real modes.
	build := func(d float64) *mat.Dense {
		M := mat.NewDense(6, 6, nil)
		M.Set(0, 0, -1)
		M.Set(0, 1, 1)
		M.Set(1, 0, d)
		M.Set(1, 1, -1)
		M.Set(2, 2, -0.2)
		M.Set(2, 3, 5)
		M.Set(3, 2, -5)
		M.Set(3, 3, -0.2)
		M.Set(4, 4, -3)
		M.Set(5, 5, -8)
		return M
	}
	for _, c := range []struct {
		d         float64
		defective bool
	}{{0, true}, {1e-10, false}} {
		rng := rand.New(rand.NewPCG(2026, 12))
		A, _ := hide(rng, build(c.d), 3)
		js, err := Jordan(A, 0, 0)
		if err != nil {
			t.Fatal(err)
		}
		def := 0
		for _, cl := range js.Clusters {
			if cl.Defective() {
				def++
				if !reflect.DeepEqual(cl.Blocks, []int{2}) || math.Abs(real(cl.Value)+1) > 1e-6 {
					t.Errorf("d=%g: defective cluster %+v", c.d, cl)
				}
			}
		}
		if (def == 1) != c.defective {
			for _, cl := range js.Clusters {
				t.Logf("cluster %v members %v tol %.3g cond %.3g", cl.Value, cl.Members, cl.Tol, cl.Cond)
			}
			t.Errorf("d=%g: %d defective clusters, want defective=%v", c.d, def, c.defective)
		}
		if !c.defective {
			// Two simple eigenvalues near -1, both reported ill-conditioned.
			near := 0
			for _, cl := range js.Clusters {
				if math.Abs(real(cl.Value)+1) < 1e-4 {
					near++
					if cl.Algebraic != 1 || cl.Cond < 1e4 {
						t.Errorf("near-defective member %+v: want simple with condition above 1e4", cl)
					}
				}
			}
			if near != 2 {
				t.Errorf("near-defective: %d eigenvalues near -1, want 2", near)
			}
		}
		// The modal form must not pretend: defective or ill-conditioned
		// eigenvectors lead to the block-diagonal form, which says why.
		s, _ := FromMatrices(A, randDense(rng, 6, 1), randDense(rng, 1, 6), nil, 0)
		mf, err := Modal(s)
		if err != nil {
			t.Fatal(err)
		}
		if !mf.BlockDiagonal {
			t.Errorf("d=%g: modal form from an eigenvector basis of condition %.3g", c.d, mf.Cond)
		}
		modalCheck(t, s, mf)
	}
}

func TestPlantedComplexUncontrollable(t *testing.T) {
	// Block diagonal: a pair -0.3 +- 4j reached by no input, a pair
	// -1 +- 2j seen by no output, two real modes reached and seen;
	// hidden by a random similarity. PBH (Hautus 1969) must find each.
	M := mat.NewDense(6, 6, []float64{
		-0.3, 4, 0, 0, 0, 0,
		-4, -0.3, 0, 0, 0, 0,
		0, 0, -1, 2, 0, 0,
		0, 0, -2, -1, 0, 0,
		0, 0, 0, 0, -2, 0,
		0, 0, 0, 0, 0, -6,
	})
	B := mat.NewDense(6, 2, []float64{0, 0, 0, 0, 1, 0, 0, 1, 1, 2, 3, -1})
	C := mat.NewDense(2, 6, []float64{1, 0.5, 0, 0, 1, 1, 0, 2, 0, 0, -1, 1})
	rng := rand.New(rand.NewPCG(1969, 6))
	s0, _ := FromMatrices(M, B, C, nil, 0)
	s, err := Transform(s0, randDense(rng, 6, 6))
	if err != nil {
		t.Fatal(err)
	}
	mt, err := Modes(s)
	if err != nil {
		t.Fatal(err)
	}
	for _, m := range mt.Modes {
		wantR := math.Abs(imag(m.Eigenvalue)-4) > 1e-6
		wantO := math.Abs(imag(m.Eigenvalue)-2) > 1e-6
		if m.Reachable != wantR || m.Observable != wantO {
			t.Errorf("mode %v: reachable %v (margin %.3g) observable %v (margin %.3g), want %v %v (tol %.3g)",
				m.Eigenvalue, m.Reachable, m.ReachMargin, m.Observable, m.ObserveMargin, wantR, wantO, m.Tol)
		}
	}
	st, err := StructureOf(s, 0)
	if err != nil {
		t.Fatal(err)
	}
	if st.Reach.Dim != 4 || st.Observe.Dim != 4 || !st.Stabilizable || !st.Detectable {
		t.Errorf("reachable %d observable %d stabilizable %v detectable %v", st.Reach.Dim, st.Observe.Dim, st.Stabilizable, st.Detectable)
	}
	if !zerosClose(st.UncontrollableModes, []complex128{complex(-0.3, 4), complex(-0.3, -4)}, 1e-9) ||
		!zerosClose(st.UnobservableModes, []complex128{complex(-1, 2), complex(-1, -2)}, 1e-9) {
		t.Errorf("uncontrollable %v unobservable %v", st.UncontrollableModes, st.UnobservableModes)
	}
	// Modal coordinates: the unreached pair has zero rows in modal B, the
	// unseen pair zero columns in modal C (facts of the trade).
	mf, err := Modal(s)
	if err != nil {
		t.Fatal(err)
	}
	for _, b := range mf.Blocks {
		var rb, cc float64
		for i := b.Start; i < b.Start+b.Size; i++ {
			for j := 0; j < 2; j++ {
				rb = math.Hypot(rb, mf.System.B.At(i, j))
				cc = math.Hypot(cc, mf.System.C.At(j, i))
			}
		}
		if (math.Abs(imag(b.Values[0])-4) < 1e-6) != (rb < 1e-10) {
			t.Errorf("block %v: modal B rows %.3g", b.Values, rb)
		}
		if (math.Abs(imag(b.Values[0])-2) < 1e-6) != (cc < 1e-10) {
			t.Errorf("block %v: modal C columns %.3g", b.Values, cc)
		}
	}
}
