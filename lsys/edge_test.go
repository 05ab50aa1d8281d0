package lsys

import (
	"testing"

	"gonum.org/v1/gonum/mat"
)

// Every structure routine must answer (or refuse with an error) on odd but
// legal systems, never panic.
func TestStructureEdgeCases(t *testing.T) {
	mk := func(A, B, C, D *mat.Dense, ts float64) *System {
		s, err := FromMatrices(A, B, C, D, ts)
		if err != nil {
			t.Fatal(err)
		}
		return s
	}
	zero3 := mat.NewDense(3, 3, nil)
	cases := map[string]*System{
		"one state":          mk(mat.NewDense(1, 1, []float64{-2}), mat.NewDense(1, 1, []float64{1}), nil, nil, 0),
		"no inputs":          mk(mat.NewDense(2, 2, []float64{0, 1, -1, 0}), nil, nil, nil, 0),
		"zero A":             mk(zero3, mat.NewDense(3, 1, []float64{1, 0, 0}), mat.NewDense(1, 3, []float64{0, 0, 1}), nil, 0),
		"integrator chain":   mk(mat.NewDense(3, 3, []float64{0, 1, 0, 0, 0, 1, 0, 0, 0}), mat.NewDense(3, 1, []float64{0, 0, 1}), mat.NewDense(1, 3, []float64{1, 0, 0}), nil, 0),
		"sampled deadbeat":   mk(mat.NewDense(2, 2, []float64{0, 1, 0, 0}), mat.NewDense(2, 1, []float64{0, 1}), mat.NewDense(1, 2, []float64{1, 0}), nil, 0.5),
		"zero B and C":       mk(mat.NewDense(2, 2, []float64{-1, 0, 0, -3}), mat.NewDense(2, 1, nil), mat.NewDense(1, 2, nil), mat.NewDense(1, 1, []float64{2}), 0),
		"wide scale":         mk(mat.NewDense(2, 2, []float64{-1e6, 0, 1, -1e-6}), mat.NewDense(2, 1, []float64{1e3, 0}), mat.NewDense(1, 2, []float64{0, 1e-3}), nil, 0),
		"more inputs than n": mk(mat.NewDense(1, 1, []float64{-1}), mat.NewDense(1, 3, []float64{1, 2, 3}), mat.NewDense(2, 1, []float64{1, 1}), nil, 0),
	}
	for name, s := range cases {
		if _, err := Modes(s); err != nil {
			t.Errorf("%s: modes: %v", name, err)
		}
		if _, err := StructureOf(s, 0); err != nil {
			t.Errorf("%s: structure: %v", name, err)
		}
		if _, err := Decompose(s, 0); err != nil {
			t.Errorf("%s: decompose: %v", name, err)
		}
		if _, err := Minimal(s, 0); err != nil {
			t.Errorf("%s: minimal: %v", name, err)
		}
		if _, err := Zeros(s, 0); err != nil {
			t.Errorf("%s: zeros: %v", name, err)
		}
		if _, err := Modal(s); err != nil {
			t.Errorf("%s: modal: %v", name, err)
		}
		if _, err := Jordan(s.A, 0, 0); err != nil {
			t.Errorf("%s: jordan: %v", name, err)
		}
		for _, w := range []string{"stable", "unstable"} {
			if _, err := Spectral(s, w); err != nil {
				t.Errorf("%s: spectral %s: %v", name, w, err)
			}
		}
		if _, err := Reachable(s, 0); err != nil {
			t.Errorf("%s: reachable: %v", name, err)
		}
		if _, err := Unobservable(s, 0); err != nil {
			t.Errorf("%s: unobservable: %v", name, err)
		}
		if s.M() > 0 && s.P() > 0 {
			if _, err := TransferFunctions(s, 0); err != nil {
				t.Errorf("%s: transfer: %v", name, err)
			}
		}
	}
	// The zero A: one eigenvalue 0 of multiplicity 3, semisimple (three 1x1
	// blocks); the integrator chain: one block of size 3 (closed forms).
	js, _ := Jordan(zero3, 0, 0)
	if len(js.Clusters) != 1 || len(js.Clusters[0].Blocks) != 3 {
		t.Errorf("zero matrix: %+v", js.Clusters)
	}
	js, _ = Jordan(cases["integrator chain"].A, 0, 0)
	if len(js.Clusters) != 1 || js.Clusters[0].Blocks[0] != 3 {
		t.Errorf("integrator chain: %+v", js.Clusters)
	}
	// Static gain: no modes, no zeros.
	sg, _ := NewSystem(0, 1, 1, nil, nil, nil, mat.NewDense(1, 1, []float64{3}), 0)
	if mt, err := Modes(sg); err != nil || len(mt.Modes) != 0 {
		t.Errorf("static gain modes %v %v", mt, err)
	}
	if z, err := Zeros(sg, 0); err != nil || len(z.Invariant) != 0 {
		t.Errorf("static gain zeros %v", err)
	}
}
