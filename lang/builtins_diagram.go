package lang

import "lsys/lsys"

// The modal diagram built-in. Written against the public Call API only, so
// it moves with the other built-ins unchanged.

func init() {
	Register(&Builtin{
		Name: "diagram", Group: GroupAnalysis,
		Params: []Param{{Name: "system", Doc: "a system, transfer function or linear equation block"}},
		Help:   "The modal diagram: the system drawn as its decoupled modal subsystems between its inputs and outputs.",
		Doc: "One card per mode of the mode table (eigenvalue, natural frequency, damping, whether it decays), in " +
			"parallel between the inputs on the left and the outputs on the right, in the order of natural frequency. " +
			"Each link carries its gain in the modal coordinates of modal(system) (unit mode shapes): the norm of the " +
			"mode's rows of the modal B for an input, of its columns of the modal C for an output; its weight is the " +
			"unit-free reach or visibility of the mode table. A link whose mode is not reached (not seen), or whose " +
			"reach (visibility) is at most the table's relative tolerance, is drawn dotted and labelled \"not reached\" " +
			"(\"not seen\"). Above 30 blocks, neighbouring blocks share a card showing their ranges. Fields: modes " +
			"(the mode table), modal (the modal form).",
		Examples: []string{"G = system([[0, 1], [-4, -0.8]], [0, 0.5], [1, 0], states: [\"position\", \"velocity\"], inputs: [\"force\"], outputs: [\"position\"])\ndiagram(G)",
			"diagram(system([[-1, 0], [0, -2]], [1, 0], [1, 1]))"},
		Fn: func(c *Call) (any, error) {
			var g *lsys.System
			if err := c.Bind("system", &g); err != nil {
				return nil, err
			}
			return lsys.Diagram(g)
		},
	})
	RegisterType((*lsys.ModalDiagram)(nil), TypeInfo{Name: "a modal diagram", Fields: []string{"modes", "modal"},
		Field: func(v any, f string) (any, bool) {
			d := v.(*lsys.ModalDiagram)
			switch f {
			case "modes":
				return d.Table, true
			case "modal":
				return d.Form, true
			}
			return nil, false
		}})
}
