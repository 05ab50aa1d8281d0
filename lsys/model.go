package lsys

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
