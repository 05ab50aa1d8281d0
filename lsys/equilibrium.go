package lsys

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/mat"
)

// Equilibrium is a steady state of a model: f(x, u) = 0 (continuous) or
// f(x, u) = x (sampled), with the rank verdict on the Jacobian there.
type Equilibrium struct {
	StateNames, InputNames []string
	X, U                   []float64 // the states found, the inputs held
	Residual               float64   // max |F| at the result
	Iterations             int       // Newton steps taken

	// The rank verdict on J = dF/dx at the result (df/dx, minus I when
	// sampled): singular values at or below Tol = FamilyTol times the
	// largest count as zero. When Rank < n the steady state is one member
	// of a family, and the columns of Free (orthonormal, n x (n - Rank))
	// span the null space of J: the directions in which the states can
	// move and stay at rest, to first order. Free is nil when unique.
	Rank     int
	Tol      float64
	Singular []float64 // singular values of J, largest first
	Free     *mat.Dense
	// MinNorm is set when the state was solved from a linear system as
	// the member of least norm of its family; otherwise the guess decides.
	MinNorm bool
}

// FamilyTol is the relative tolerance of the rank decision on the
// Jacobian at an equilibrium; it is the one below which a Newton step
// treats singular values as zero (NewtonStep), so the verdict and the
// iteration agree.
const FamilyTol = 1e-12

// NewEquilibrium records a steady state and decides the rank of the
// Jacobian J there.
func NewEquilibrium(states, inputs []string, x, u []float64, residual float64, iterations int, J *mat.Dense, minNorm bool) *Equilibrium {
	e := &Equilibrium{StateNames: states, InputNames: inputs, X: x, U: u, Residual: residual, Iterations: iterations, MinNorm: minNorm}
	e.decideFamily(J)
	return e
}

// State returns the value of the state or input called name.
func (e *Equilibrium) State(name string) (float64, bool) {
	for i, s := range e.StateNames {
		if s == name {
			return e.X[i], true
		}
	}
	for j, s := range e.InputNames {
		if s == name {
			return e.U[j], true
		}
	}
	return 0, false
}

// decideFamily decides the rank of J by its singular values (numerical
// rank with a relative tolerance: Golub & Van Loan, Matrix Computations,
// 4th ed. 2013, section 5.4.1) and keeps the null space. Entries of a free
// direction below 1e-14 of its largest are rounding and set to 0; a single
// direction has its largest entry positive.
func (e *Equilibrium) decideFamily(J *mat.Dense) {
	n, _ := J.Dims()
	var svd mat.SVD
	if !svd.Factorize(J, mat.SVDFull) {
		e.Rank = n
		return
	}
	sv := svd.Values(nil)
	e.Singular = sv
	smax := 0.0
	if len(sv) > 0 {
		smax = sv[0]
	}
	e.Tol = FamilyTol * smax
	rank := 0
	for _, x := range sv {
		if x > e.Tol {
			rank++
		}
	}
	e.Rank = rank
	if rank == n {
		return
	}
	var V mat.Dense
	svd.VTo(&V)
	free := mat.DenseCopyOf(V.Slice(0, n, rank, n))
	_, k := free.Dims()
	for j := 0; j < k; j++ {
		big, at := 0.0, 0
		for i := 0; i < n; i++ {
			if a := math.Abs(free.At(i, j)); a > big {
				big, at = a, i
			}
		}
		sign := 1.0
		if k == 1 && free.At(at, j) < 0 {
			sign = -1
		}
		for i := 0; i < n; i++ {
			v := sign * free.At(i, j)
			if math.Abs(v) < 1e-14*big {
				v = 0
			}
			free.Set(i, j, v)
		}
	}
	e.Free = free
}

// SteadyResidual evaluates F(x) (f(x, u), minus x when sampled) and, when
// jac is set, its Jacobian dF/dx.
type SteadyResidual func(x []float64, jac bool) (F []float64, J *mat.Dense, err error)

// NewtonFailure says why Newton's method found no steady state.
type NewtonFailure int

// The ways Newton's method can fail.
const (
	NewtonSingular     NewtonFailure = iota // the Jacobian is zero: no step
	NewtonStuck                             // the line search cannot reduce the residual
	NewtonNotConverged                      // the step limit was reached
)

// NewtonError is a failed search for a steady state.
type NewtonError struct {
	Kind     NewtonFailure
	Step     int     // the step at which it failed (1-based), or the steps taken
	Residual float64 // max |F| there
}

func (e *NewtonError) Error() string {
	switch e.Kind {
	case NewtonSingular:
		return fmt.Sprintf("the Jacobian is singular at step %d (residual %.3g); Newton cannot go on", e.Step, e.Residual)
	case NewtonStuck:
		return fmt.Sprintf("the line search cannot reduce the residual %.3g at step %d; the iteration is stuck (near a minimum of |f| that is not zero?)", e.Residual, e.Step)
	}
	return fmt.Sprintf("no steady state found after %d Newton steps; the residual is still %.3g", e.Step, e.Residual)
}

// NewtonMaxSteps bounds the Newton iteration of SolveSteady.
const NewtonMaxSteps = 100

// SolveSteady finds x with F(x) = 0 from the guess x0 by Newton's method
// with a backtracking (Armijo) line search on |F|^2 (Dennis & Schnabel,
// Numerical Methods for Unconstrained Optimization and Nonlinear
// Equations, 1983, section 6.3). It accepts x when max |F| <= 1e-9 max(1,
// max |x|). check, when not nil, is called every step (for interrupts).
// It returns x, max |F| there, the steps taken and the Jacobian at x.
func SolveSteady(F SteadyResidual, x0 []float64, check func() error) (x []float64, residual float64, steps int, J *mat.Dense, err error) {
	n := len(x0)
	x = append([]float64(nil), x0...)
	sq := func(F []float64) float64 {
		s := 0.0
		for _, f := range F {
			s += f * f
		}
		return s
	}
	Fx, J, err := F(x, true)
	if err != nil {
		return nil, 0, 0, nil, err
	}
	iter := 0
	for ; iter < NewtonMaxSteps; iter++ {
		if check != nil {
			if err := check(); err != nil {
				return nil, 0, 0, nil, err
			}
		}
		r := maxAbsVec(Fx)
		if r == 0 {
			break
		}
		// Newton step J dx = -F; a (nearly) singular J falls back to the
		// least-squares step from the SVD.
		dx, ok := NewtonStep(J, Fx)
		if !ok {
			return nil, 0, 0, nil, &NewtonError{Kind: NewtonSingular, Step: iter + 1, Residual: r}
		}
		phi0 := sq(Fx)
		t := 1.0
		var xn, Fn []float64
		accepted := false
		for t > 1e-10 {
			xn = make([]float64, n)
			for i := range xn {
				xn[i] = x[i] + t*dx[i]
			}
			var e error
			Fn, _, e = F(xn, false)
			if e == nil && sq(Fn) <= (1-2e-4*t)*phi0 {
				accepted = true
				break
			}
			t /= 2
		}
		if !accepted {
			if r <= 1e-12*math.Max(1, maxAbsVec(x)) {
				break // already at the rounding level
			}
			return nil, 0, 0, nil, &NewtonError{Kind: NewtonStuck, Step: iter + 1, Residual: r}
		}
		small := true
		for i := range dx {
			if math.Abs(t*dx[i]) > 1e-15*math.Max(1, math.Abs(x[i])) {
				small = false
			}
		}
		x = xn
		Fx, J, err = F(x, true)
		if err != nil {
			return nil, 0, 0, nil, err
		}
		if small || maxAbsVec(Fx) <= 1e-15*math.Max(1, maxAbsVec(x)) {
			iter++
			break
		}
	}
	res := maxAbsVec(Fx)
	if res > 1e-9*math.Max(1, maxAbsVec(x)) {
		return nil, 0, 0, nil, &NewtonError{Kind: NewtonNotConverged, Step: iter, Residual: res}
	}
	return x, res, iter, J, nil
}

// SteadyError is a linear system without a steady state for its inputs.
type SteadyError struct {
	Residual float64 // of the closest state; 0 when the state matrix is zero
}

func (e *SteadyError) Error() string {
	if e.Residual == 0 {
		return "no steady state for these inputs: the state matrix is zero, every state integrates its inputs"
	}
	return fmt.Sprintf("no steady state for these inputs: the closest state leaves a residual of %.3g (the state matrix is singular)", e.Residual)
}

// LinearEquilibrium solves A x + B u = 0 (continuous) or A x + B u = x
// (sampled) for the inputs u; of a family of solutions it gives the one of
// least norm.
func LinearEquilibrium(g *System, u []float64) (*Equilibrium, error) {
	n, m := g.N(), g.M()
	if n == 0 {
		return nil, fmt.Errorf("the system has no states")
	}
	if len(u) != m {
		return nil, &ShapeError{What: "one value per input", Got: fmt.Sprint(len(u)), Other: fmt.Sprint(m)}
	}
	J := mat.DenseCopyOf(g.A)
	if g.Ts > 0 {
		for i := 0; i < n; i++ {
			J.Set(i, i, J.At(i, i)-1)
		}
	}
	F := make([]float64, n)
	for i := 0; i < n; i++ {
		for j := 0; j < m; j++ {
			F[i] += g.B.At(i, j) * u[j]
		}
	}
	x := make([]float64, n)
	if maxAbsVec(F) > 0 {
		dx, ok := NewtonStep(J, F)
		if !ok {
			return nil, &SteadyError{}
		}
		x = dx
	}
	res := 0.0
	for i := 0; i < n; i++ {
		r := F[i]
		for j := 0; j < n; j++ {
			r += J.At(i, j) * x[j]
		}
		res = math.Max(res, math.Abs(r))
	}
	if res > 1e-9*math.Max(1, maxAbsVec(x)) {
		return nil, &SteadyError{Residual: res}
	}
	return NewEquilibrium(g.StateNames, g.InputNames, x, append([]float64(nil), u...), res, 1, J, true), nil
}

// NewtonStep solves J dx = -F by LU with partial pivoting; when J is
// singular or its condition exceeds 1e12 it takes the minimum-norm
// least-squares step from the SVD, truncating singular values at or below
// FamilyTol of the largest. ok is false when J is zero.
func NewtonStep(J *mat.Dense, F []float64) ([]float64, bool) {
	n := len(F)
	rhs := mat.NewVecDense(n, nil)
	for i, f := range F {
		rhs.SetVec(i, -f)
	}
	var lu mat.LU
	lu.Factorize(J)
	if c := lu.Cond(); !math.IsInf(c, 0) && c < 1e12 {
		var dx mat.VecDense
		if err := lu.SolveVecTo(&dx, false, rhs); err == nil {
			return dx.RawVector().Data, true
		}
	}
	var svd mat.SVD
	if !svd.Factorize(J, mat.SVDFull) {
		return nil, false
	}
	s := svd.Values(nil)
	if len(s) == 0 || s[0] == 0 {
		return nil, false
	}
	var U, V mat.Dense
	svd.UTo(&U)
	svd.VTo(&V)
	dx := make([]float64, n)
	for k, sk := range s {
		if sk <= FamilyTol*s[0] {
			break
		}
		var coef float64
		for i := 0; i < n; i++ {
			coef += U.At(i, k) * rhs.AtVec(i)
		}
		coef /= sk
		for i := 0; i < n; i++ {
			dx[i] += coef * V.At(i, k)
		}
	}
	return dx, true
}

func maxAbsVec(v []float64) float64 {
	m := 0.0
	for _, x := range v {
		m = math.Max(m, math.Abs(x))
	}
	return m
}
