package lang

import "fmt"

// NonlinearModel is the value of an equation block whose right-hand sides
// are not all linear in the states and inputs.
type NonlinearModel struct {
	Name      string
	States    []string
	Inputs    []string
	Outputs   []string
	Ts        float64
	firstTerm string // source of the first nonlinear term
	firstPos  Pos
}

func (m *NonlinearModel) String() string {
	return fmt.Sprintf("nonlinear model: %s, %s, %s", plural(len(m.States), "state"), plural(len(m.Inputs), "input"), plural(len(m.Outputs), "output"))
}

func (m *NonlinearModel) needLinearize(ev *evaluator, pos Pos) error {
	return ev.errorAt(pos, fmt.Sprintf("this is a nonlinear model (its first nonlinear term is %s at line %d, column %d), not a linear system",
		m.firstTerm, m.firstPos.Line, m.firstPos.Column),
		"Linearize it first: linearize(model, at: {state: value, ..., input: value}); equilibrium(model, inputs: {...}) finds an operating point.")
}

func (ev *evaluator) evalSystemBlock(b *SystemBlock) (any, error) {
	return nil, ev.errorAt(b.SystemPos, "equation blocks are not implemented yet", "Use the matrix form system(A, B, C, D) for now.")
}

// blockSource remembers the equation block a system came from.
type blockSource struct{}
