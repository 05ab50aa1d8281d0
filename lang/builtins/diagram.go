package builtins

import (
	"lsys/lang"
	"lsys/lsys"
)

// The modal diagram built-in. Written against the public Call API only, so
// it moves with the other built-ins unchanged.

func init() {
	register(&lang.Builtin{
		Name: "diagram", Group: lang.GroupAnalysis,
		Returns: (*lsys.ModalDiagram)(nil),
		Params:  []lang.Param{{Name: "system", Doc: "a system, transfer function or linear equation block"}},
		Help:    "The modal diagram: the system drawn as its decoupled modal subsystems between its inputs and outputs.",
		Doc: "One card per mode of the mode table (eigenvalue, natural frequency, damping, whether it decays), in " +
			"parallel between the inputs on the left and the outputs on the right, in the order of natural frequency. " +
			"Each link carries its gain in the modal coordinates of modal(system) (unit mode shapes): the norm of the " +
			"mode's rows of the modal B for an input, of its columns of the modal C for an output; its weight is the " +
			"unit-free reach or visibility of the mode table. A link whose mode is not reached (not seen), or whose " +
			"reach (visibility) is at most the table's relative tolerance, is drawn dotted and labelled \"not reached\" " +
			"(\"not seen\"). Above 30 blocks, neighbouring blocks share a card showing their ranges.",
		Examples: []string{"G = system([[0, 1], [-4, -0.8]], [0, 0.5], [1, 0], states: [\"position\", \"velocity\"], inputs: [\"force\"], outputs: [\"position\"])\ndiagram(G)",
			"diagram(system([[-1, 0], [0, -2]], [1, 0], [1, 1]))"},
		Fn: func(c *lang.Call) (any, error) {
			var g *lsys.System
			if err := c.Bind("system", &g); err != nil {
				return nil, err
			}
			return lsys.Diagram(g)
		},
	})
	registerType((*lsys.ModalDiagram)(nil), lang.TypeInfo{Name: "a modal diagram", Fields: []lang.Field{
		lang.FieldOf("modes", "the mode table the cards show", func(d *lsys.ModalDiagram) any { return d.Table }),
		lang.FieldOf("modal", "the modal form whose gains the links carry", func(d *lsys.ModalDiagram) any { return d.Form }),
	}})
}
