package lsys

import "gonum.org/v1/gonum/mat"

// Model is a nonlinear state-space model, x' = f(x, u) (next x = f(x, u)
// when sampled) and y = g(x, u), with named parameters, as an equation
// block of the language defines it. It carries what its display needs: the
// signals, the parameters with the values the block holds, the equations
// as written and its first nonlinear term. The right-hand sides are
// evaluated by whoever built the model (the language); linear analysis
// needs a linearization at an operating point first, which is a System.
type Model struct {
	StateNames, InputNames, OutputNames []string
	// ParameterNames are the numbers the block uses by name, in the order
	// its equations first use them; ParameterValues their values.
	ParameterNames  []string
	ParameterValues []float64
	Ts              float64 // sample time in seconds; 0 for continuous time
	// Equations as written: one per state in the order of StateNames, then
	// the outputs and helpers in source order.
	Equations []ModelEquation
	// FirstNonlinear is the first term, in source order, that makes the
	// model nonlinear, as written; Line and Column say where it stands in
	// the cell that defines the model.
	FirstNonlinear string
	Line, Column   int
}

// ModelEquation is one equation of a model: Kind is "derivative"
// (name' = rhs), "next" (next name = rhs) or "plain" (name = rhs, an
// output or a helper).
type ModelEquation struct {
	Kind, Name, Rhs string
}

// Sampled reports whether the model is in discrete time.
func (m *Model) Sampled() bool { return m.Ts > 0 }

// Parameter is the value the model holds for a parameter.
func (m *Model) Parameter(name string) (float64, bool) {
	for i, p := range m.ParameterNames {
		if p == name {
			return m.ParameterValues[i], true
		}
	}
	return 0, false
}

// Jacobians assembles A = df/dx, B = df/du, C = dg/dx and D = dg/du of a
// model exactly, by forward-mode differentiation: eval(j) evaluates f and g
// over hyper-dual numbers with the E1 part of variable j seeded (the n
// states, then the m inputs), one pass per variable. With mixed set, eval
// also seeds a parameter in E2, and the E12 parts give the derivatives of
// the four matrices with respect to that parameter (for eigenvalue
// sensitivities).
func Jacobians(n, m, p int, mixed bool, eval func(j int) (f, y []HyperDual, err error)) (A, B, C, D *mat.Dense, err error) {
	if n > 0 {
		A = mat.NewDense(n, n, nil)
	}
	if n > 0 && m > 0 {
		B = mat.NewDense(n, m, nil)
	}
	if p > 0 && n > 0 {
		C = mat.NewDense(p, n, nil)
	}
	if p > 0 && m > 0 {
		D = mat.NewDense(p, m, nil)
	}
	part := func(h HyperDual) float64 {
		if mixed {
			return h.E12
		}
		return h.E1
	}
	for j := 0; j < n+m; j++ {
		f, y, err := eval(j)
		if err != nil {
			return nil, nil, nil, nil, err
		}
		for i := 0; i < n; i++ {
			if j < n {
				A.Set(i, j, part(f[i]))
			} else {
				B.Set(i, j-n, part(f[i]))
			}
		}
		for i := 0; i < p; i++ {
			if j < n {
				C.Set(i, j, part(y[i]))
			} else {
				D.Set(i, j-n, part(y[i]))
			}
		}
	}
	return A, B, C, D, nil
}
