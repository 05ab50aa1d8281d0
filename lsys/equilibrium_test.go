package lsys

import (
	"errors"
	"math"
	"testing"

	"gonum.org/v1/gonum/mat"
)

// Newton on F(x) = x^2 - 2 from 1 converges to sqrt(2); F(x) = x^2 + 1 has
// no real root, and the search says so (common practice).
func TestSolveSteady(t *testing.T) {
	const tol = 1e-15
	sq := func(c float64) SteadyResidual {
		return func(x []float64, jac bool) ([]float64, *mat.Dense, error) {
			F := []float64{x[0]*x[0] + c}
			if !jac {
				return F, nil, nil
			}
			return F, mat.NewDense(1, 1, []float64{2 * x[0]}), nil
		}
	}
	x, res, steps, J, err := SolveSteady(sq(-2), []float64{1}, nil)
	if err != nil || math.Abs(x[0]-math.Sqrt2) > tol || res > 1e-15 || steps < 3 || math.Abs(J.At(0, 0)-2*math.Sqrt2) > 1e-14 {
		t.Errorf("sqrt(2): x %v residual %v steps %d err %v", x, res, steps, err)
	}
	_, _, _, _, err = SolveSteady(sq(1), []float64{1}, nil)
	var ne *NewtonError
	if !errors.As(err, &ne) {
		t.Errorf("x^2 + 1: %v", err)
	}
	stop := errors.New("interrupted")
	if _, _, _, _, err := SolveSteady(sq(-2), []float64{1}, func() error { return stop }); err != stop {
		t.Errorf("check not honoured: %v", err)
	}
}

// A first-order lag x' = -x + u settles at x = u; an integrator x' = u has
// no steady state for u != 0 and a family (every x) for u = 0.
func TestLinearEquilibrium(t *testing.T) {
	lag, _ := NewSystem(1, 1, 0, mat.NewDense(1, 1, []float64{-1}), mat.NewDense(1, 1, []float64{1}), nil, nil, 0)
	e, err := LinearEquilibrium(lag, []float64{3})
	if err != nil || e.X[0] != 3 || e.Free != nil || e.Rank != 1 {
		t.Errorf("lag: %+v %v", e, err)
	}
	if x, ok := e.State("u1"); !ok || x != 3 {
		t.Errorf("State(u1) = %v %v", x, ok)
	}
	integ, _ := NewSystem(1, 1, 0, mat.NewDense(1, 1, []float64{0}), mat.NewDense(1, 1, []float64{1}), nil, nil, 0)
	var se *SteadyError
	if _, err := LinearEquilibrium(integ, []float64{1}); !errors.As(err, &se) {
		t.Errorf("integrator driven: %v", err)
	}
	e, err = LinearEquilibrium(integ, []float64{0})
	if err != nil || e.Free == nil || e.Rank != 0 || !e.MinNorm {
		t.Errorf("integrator at rest: %+v %v", e, err)
	}
}
