package builtins_test

import (
	"testing"

	"lsys/lsys"
)

func TestBuiltinOverlay(t *testing.T) {
	v := stRun(t, stMSD+"F = system([[0, 1], [-9, -3]], [0, 9], [1, 0])\noverlay(before: response(G, step), after: response(F, step))")
	o, ok := v.(*lsys.Overlay)
	if !ok || o.Len() != 2 || o.Names[0] != "before" || o.Names[1] != "after" {
		t.Fatalf("overlay gave %T %+v", v, v)
	}
	// a record names the results too; unnamed ones are numbered
	o = stRun(t, stMSD+"overlay({a: polezero(G)}, polezero(G * (1/(s + 1))))").(*lsys.Overlay)
	if o.Names[0] != "a" || o.Names[1] != "2" || len(o.PoleZeros) != 2 {
		t.Errorf("names %v", o.Names)
	}
	stRunErr(t, stMSD+"overlay(one: response(G, step))", "two or more")
	stRunErr(t, stMSD+"overlay(r: response(G, step), f: frequency(G))", "one kind")
}

func TestBuiltinOverlayList(t *testing.T) {
	o := stRun(t, stMSD+"overlay([frequency(G), frequency(G * (1/(s + 1)))])").(*lsys.Overlay)
	if len(o.Frequencies) != 2 || o.Names[0] != "1" || o.Names[1] != "2" {
		t.Errorf("a list: %v", o.Names)
	}
}
