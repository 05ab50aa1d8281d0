package lang

// ModelEquations are the right-hand sides of an equation block, for
// built-ins that evaluate a model at many points (simulate): Eval gives
// the state derivatives (sampled: the next states) and the outputs at
// states x and inputs u.
type ModelEquations struct {
	States, Inputs, Outputs []string
	Ts                      float64
	Eval                    func(x, u []float64) (dx, y []float64, err error)
	// Feedthrough reports whether some output depends on some input at
	// (x, u) (a nonzero derivative), which would make a loop closed
	// around the model algebraic.
	Feedthrough func(x, u []float64) (bool, error)
}

// Model returns the equations behind the argument name: a nonlinear model
// or a system built from an equation block in this session. ok is false
// for any other value (a system in matrix form has no equations here).
func (c *Call) Model(name string) (me *ModelEquations, ok bool) {
	bs, ok := c.ev.s.sourceOf(c.Value(name))
	if !ok {
		return nil, false
	}
	ev := c.ev
	me = &ModelEquations{States: bs.states, Inputs: bs.inputs, Outputs: bs.outputs, Ts: bs.ts}
	me.Eval = func(x, u []float64) ([]float64, []float64, error) {
		f, y, err := bs.evalAt(ev, x, u, -1, "", nil)
		if err != nil {
			return nil, nil, err
		}
		dx := make([]float64, len(f))
		for i, v := range f {
			dx[i] = v.V
		}
		out := make([]float64, len(y))
		for i, v := range y {
			out[i] = v.V
		}
		return dx, out, nil
	}
	me.Feedthrough = func(x, u []float64) (bool, error) {
		for j := range u {
			_, y, err := bs.evalAt(ev, x, u, len(x)+j, "", nil)
			if err != nil {
				return false, err
			}
			for _, v := range y {
				if v.E1 != 0 {
					return true, nil
				}
			}
		}
		return false, nil
	}
	return me, true
}
