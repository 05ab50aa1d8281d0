package lsys

import (
	"math"
	"testing"

	"gonum.org/v1/gonum/mat"
)

func d1(v float64) *mat.Dense { return mat.NewDense(1, 1, []float64{v}) }

func TestRiccatiScalar(t *testing.T) {
	// 2 a x - b^2 x^2 / r + q = 0: x = r (a + sqrt(a^2 + b^2 q / r)) / b^2
	// (closed form, the positive root).
	a, b, q, r := 1.5, 2.0, 3.0, 0.5
	s, err := CARE(d1(a), d1(b), d1(q), d1(r), nil)
	if err != nil {
		t.Fatal(err)
	}
	want := r * (a + math.Sqrt(a*a+b*b*q/r)) / (b * b)
	if !closeRel(s.X.At(0, 0), want, 1e-14) || !s.Stable {
		t.Fatalf("CARE %v want %v", s.X.At(0, 0), want)
	}
	// Sampled, b = 1: x^2 + x (r - a^2 r - q) - q r = 0 (closed form).
	for _, a := range []float64{0.5, 1.2, 0, 1e-12} {
		s, err := DARE(d1(a), d1(1), d1(q), d1(r), nil)
		if err != nil {
			t.Fatal(err)
		}
		c := r - a*a*r - q
		want := (-c + math.Sqrt(c*c+4*q*r)) / 2
		if !closeRel(s.X.At(0, 0), want, 1e-13) || !s.Stable {
			t.Fatalf("DARE a=%g: %v want %v (%s)", a, s.X.At(0, 0), want, s.Method)
		}
	}
}

func TestLQDoubleIntegrator(t *testing.T) {
	// x1' = x2, x2' = u, Q = I, R = 1: X = [[sqrt3, 1], [1, sqrt3]] and
	// K = [1, sqrt3] (closed form, from the three scalar equations
	// x12^2 = 1, 2 x12 - x22^2 + 1 = 0, x11 = x12 x22).
	g := sys(t, []float64{0, 1, 0, 0}, []float64{0, 1}, []float64{1, 0}, nil, 2, 1, 1, 0)
	reg, err := LQ(g, identity(2), d1(1), nil)
	if err != nil {
		t.Fatal(err)
	}
	s3 := math.Sqrt(3)
	X := reg.Riccati.X
	if !closeRel(X.At(0, 0), s3, 1e-14) || !closeRel(X.At(0, 1), 1, 1e-14) || !closeRel(X.At(1, 1), s3, 1e-14) {
		t.Fatalf("X = %v", mat.Formatted(X))
	}
	if !closeRel(reg.K.At(0, 0), 1, 1e-14) || !closeRel(reg.K.At(0, 1), s3, 1e-14) {
		t.Fatalf("K = %v", mat.Formatted(reg.K))
	}
	if reg.Riccati.Residual > 1e-15 {
		t.Fatalf("residual %g", reg.Riccati.Residual)
	}
}

func TestKalmanScalar(t *testing.T) {
	// x' = a x + w, y = x + v: 2 a p - p^2 / V + W = 0, so
	// p = V (a + sqrt(a^2 + W / V)) and L = p / V (closed form).
	a, W, V := -0.5, 4.0, 0.25
	g := sys(t, []float64{a}, []float64{1}, []float64{1}, nil, 1, 1, 1, 0)
	est, err := Kalman(g, d1(W), d1(V))
	if err != nil {
		t.Fatal(err)
	}
	p := V * (a + math.Sqrt(a*a+W/V))
	if !closeRel(est.P.At(0, 0), p, 1e-14) || !closeRel(est.L.At(0, 0), p/V, 1e-14) {
		t.Fatalf("P %v L %v, want %v %v", est.P.At(0, 0), est.L.At(0, 0), p, p/V)
	}
}

func TestRiccatiRandomResiduals(t *testing.T) {
	for _, n := range []int{3, 20, 50, 200} {
		if testing.Short() && n > 50 {
			continue
		}
		for _, sampled := range []bool{false, true} {
			A := designStable(n, uint64(n+40), sampled)
			// Make some modes unstable: the regulator must move them.
			for i := 0; i < n; i++ {
				if sampled {
					A.Set(i, i, A.At(i, i)+0.4)
				} else {
					A.Set(i, i, A.At(i, i)+1)
				}
			}
			m := max(3, n/10)
			B := designMat(n, m, uint64(n+41))
			C := designMat(2, n, uint64(n+42))
			var Q mat.Dense
			Q.Mul(C.T(), C)
			for i := 0; i < n; i++ {
				Q.Set(i, i, Q.At(i, i)+0.1)
			}
			R := identity(m)
			var s *RiccatiSolution
			var err error
			if sampled {
				s, err = DARE(A, B, &Q, R, nil)
			} else {
				s, err = CARE(A, B, &Q, R, nil)
			}
			if err != nil {
				t.Fatalf("n=%d sampled=%v: %v", n, sampled, err)
			}
			if s.Residual > 1e-11 || !s.Stable {
				t.Errorf("n=%d sampled=%v: residual %g stable %v", n, sampled, s.Residual, s.Stable)
			}
			t.Logf("n=%d sampled=%v: residual %.2g, cond U1 %.3g", n, sampled, s.Residual, s.CondU1)
		}
	}
}

// Many unstable modes moved by few inputs make U1 of the Schur method
// ill-conditioned (3.4e13 here): the Schur solution alone has a residual
// of 2e-4; Newton refinement brings it to 1e-10, about what the equation's
// own conditioning allows (a further step no longer halves it).
func TestRiccatiRefined(t *testing.T) {
	n, m := 50, 3
	A := designStable(n, uint64(n+40), false)
	for i := 0; i < n; i++ {
		A.Set(i, i, A.At(i, i)+2)
	}
	B := designMat(n, m, uint64(n+41))
	C := designMat(2, n, uint64(n+42))
	var Q mat.Dense
	Q.Mul(C.T(), C)
	for i := 0; i < n; i++ {
		Q.Set(i, i, Q.At(i, i)+0.1)
	}
	s, err := CARE(A, B, &Q, identity(m), nil)
	if err != nil {
		t.Fatal(err)
	}
	t.Logf("residual %.2g, cond U1 %.3g, %s", s.Residual, s.CondU1, s.Method)
	if s.Residual > 1e-9 || !s.Stable {
		t.Fatalf("residual %g stable %v (%s)", s.Residual, s.Stable, s.Method)
	}
}
