package builtins_test

import (
	"testing"

	"lsys/lsys"
)

func TestBuiltinDiagram(t *testing.T) {
	v := stRun(t, stMSD+"d = diagram(G)\nd")
	d, ok := v.(*lsys.ModalDiagram)
	if !ok {
		t.Fatalf("diagram gave %T", v)
	}
	if len(d.Boxes) != 1 || len(d.Boxes[0].Modes) != 1 || !d.Boxes[0].Reached[0] || !d.Boxes[0].Seen[0] {
		t.Errorf("mass-spring-damper: %+v", d.Boxes)
	}
	if _, ok := stRun(t, stMSD+"diagram(G).modes").(*lsys.ModeTable); !ok {
		t.Error("diagram(G).modes is not the mode table")
	}
	stRunErr(t, "diagram(3)", "system")
}
