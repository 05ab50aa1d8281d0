package lsys

import (
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"testing"

	"gonum.org/v1/gonum/mat"
)

// Reference values from tools/ref/design_ref.py (scipy.linalg's Lyapunov,
// Sylvester and Riccati solvers; scipy.integrate.solve_ivp).
type designRef struct {
	Lyapunov []struct {
		Name    string
		Sampled bool
		A, B, X [][]float64
	}
	Sylvester []struct {
		Name       string
		A, B, C, X [][]float64
	}
	Riccati []struct {
		Name          string
		Sampled       bool
		A, B, C, N, X [][]float64
		R, Q          float64
	}
	Norms []struct {
		Name    string
		Sampled bool
		A, B, C [][]float64
		H2      float64
		HSV     []float64
	}
	IVP []struct {
		Name string
		T    []float64
		X    [][]float64
	}
}

func loadDesignRef(t *testing.T) *designRef {
	t.Helper()
	b, err := os.ReadFile(filepath.Join("testdata", "design_ref.json"))
	if err != nil {
		t.Fatal(err)
	}
	var d designRef
	if err := json.Unmarshal(b, &d); err != nil {
		t.Fatal(err)
	}
	return &d
}

func refDense(v [][]float64) *mat.Dense {
	if len(v) == 0 {
		return nil
	}
	m := mat.NewDense(len(v), len(v[0]), nil)
	for i, row := range v {
		for j, x := range row {
			m.Set(i, j, x)
		}
	}
	return m
}

// relDiff is max |a - b| / max(1, max |b|).
func relDiff(a, b *mat.Dense) float64 {
	var d mat.Dense
	d.Sub(a, b)
	return maxAbs(&d) / math.Max(1, maxAbs(b))
}

func TestDesignAgainstReference(t *testing.T) {
	d := loadDesignRef(t)
	worst := 0.0
	for _, c := range d.Lyapunov {
		A, B := refDense(c.A), refDense(c.B)
		var Q mat.Dense
		Q.Mul(B, B.T())
		s, err := LyapunovEq(A, &Q, c.Sampled)
		if err != nil {
			t.Fatal(err)
		}
		e := relDiff(s.X, refDense(c.X))
		worst = math.Max(worst, e)
		if e > 1e-10 {
			t.Errorf("%s: X differs by %g", c.Name, e)
		}
	}
	for _, c := range d.Sylvester {
		s, err := SylvesterEq(refDense(c.A), refDense(c.B), refDense(c.C), false)
		if err != nil {
			t.Fatal(err)
		}
		e := relDiff(s.X, refDense(c.X))
		worst = math.Max(worst, e)
		if e > 1e-10 {
			t.Errorf("%s: X differs by %g", c.Name, e)
		}
	}
	for _, c := range d.Riccati {
		A, B, C := refDense(c.A), refDense(c.B), refDense(c.C)
		n, _ := A.Dims()
		_, m := B.Dims()
		var Q mat.Dense
		Q.Mul(C.T(), C)
		for i := 0; i < n; i++ {
			Q.Set(i, i, Q.At(i, i)+c.Q)
		}
		R := identity(m)
		R.Scale(c.R, R)
		var s *RiccatiSolution
		var err error
		if c.Sampled {
			s, err = DARE(A, B, &Q, R, refDense(c.N))
		} else {
			s, err = CARE(A, B, &Q, R, refDense(c.N))
		}
		if err != nil {
			t.Fatalf("%s: %v", c.Name, err)
		}
		e := relDiff(s.X, refDense(c.X))
		worst = math.Max(worst, e)
		if e > 1e-9 || !s.Stable {
			t.Errorf("%s: X differs by %g (%s), stable %v", c.Name, e, s.Method, s.Stable)
		}
	}
	for _, c := range d.Norms {
		ts := 0.0
		if c.Sampled {
			ts = 0.1
		}
		g, err := FromMatrices(refDense(c.A), refDense(c.B), refDense(c.C), nil, ts)
		if err != nil {
			t.Fatal(err)
		}
		h2, err := H2Norm(g)
		if err != nil {
			t.Fatal(err)
		}
		if e := math.Abs(h2.Value-c.H2) / c.H2; e > 1e-10 {
			t.Errorf("%s: H2 %v vs %v", c.Name, h2.Value, c.H2)
		}
		gr, err := GramiansOf(g)
		if err != nil {
			t.Fatal(err)
		}
		for i, v := range c.HSV {
			// The reference squares the spread (eig of P Q), so small
			// values are compared absolutely against the largest.
			if math.Abs(gr.HSV[i]-v) > 1e-9*c.HSV[0] {
				t.Errorf("%s: HSV %d %v vs %v", c.Name, i, gr.HSV[i], v)
			}
		}
		// The balanced-truncation bound holds at every order.
		for r := 1; r < g.N(); r++ {
			red, err := Reduce(t.Context(), g, ReduceOptions{Order: r})
			if err != nil {
				t.Fatal(err)
			}
			if red.Error > red.Bound*(1+1e-8) {
				t.Errorf("%s order %d: error %g above the bound %g", c.Name, r, red.Error, red.Bound)
			}
		}
	}
	t.Logf("worst relative difference from scipy: %.2g", worst)
}

func TestDesignRefFresh(t *testing.T) { checkRefFresh(t, "design_ref.py", "design_ref.json") }
