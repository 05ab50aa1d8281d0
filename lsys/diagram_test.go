package lsys

import (
	"testing"

	"gonum.org/v1/gonum/mat"
)

// A block-diagonal system whose links are known by construction: the real
// mode at -1 is driven by no input, the pair at -0.2 +- 3j only by input 1,
// the pair at -0.05 +- 12j only by input 2; output 3 sees nothing.
func TestDiagramLinks(t *testing.T) {
	A := mat.NewDense(5, 5, []float64{
		-0.2, 3, 0, 0, 0,
		-3, -0.2, 0, 0, 0,
		0, 0, -1, 0, 0,
		0, 0, 0, -0.05, 12,
		0, 0, 0, -12, -0.05})
	B := mat.NewDense(5, 2, []float64{1, 0, 0.5, 0, 0, 0, 0, 1, 0, 0.2})
	C := mat.NewDense(3, 5, []float64{1, 0, 1, 0, 0, 0, 0, 0, 1, 0, 0, 0, 0, 0, 0})
	s, err := NewSystem(A.RawMatrix().Rows, B.RawMatrix().Cols, C.RawMatrix().Rows, A, B, C, nil, 0)
	if err != nil {
		t.Fatal(err)
	}
	d, err := Diagram(s)
	if err != nil {
		t.Fatal(err)
	}
	if len(d.Boxes) != 3 || d.Grouped {
		t.Fatalf("%d boxes (grouped %v), want 3 ungrouped", len(d.Boxes), d.Grouped)
	}
	want := []struct{ reached, seen []bool }{
		{[]bool{false, false}, []bool{true, false, false}}, // -1, by natural frequency first
		{[]bool{true, false}, []bool{true, false, false}},  // -0.2 +- 3j
		{[]bool{false, true}, []bool{false, true, false}},  // -0.05 +- 12j
	}
	for k, w := range want {
		bx := d.Boxes[k]
		if len(bx.Modes) != 1 {
			t.Fatalf("box %d holds %d modes", k, len(bx.Modes))
		}
		for j := range w.reached {
			if bx.Reached[j] != w.reached[j] {
				t.Errorf("box %d input %d: reached %v, want %v (reach %g)", k, j, bx.Reached[j], w.reached[j], bx.Reach[j])
			}
			if !bx.Reached[j] && bx.InGain[j] > 1e-12 {
				t.Errorf("box %d input %d: gain %g of a link that does not reach", k, j, bx.InGain[j])
			}
		}
		for i := range w.seen {
			if bx.Seen[i] != w.seen[i] {
				t.Errorf("box %d output %d: seen %v, want %v", k, i, bx.Seen[i], w.seen[i])
			}
		}
	}
	// The transfer function is the sum over boxes of c_k b_k / (s - lambda):
	// a real mode's gains multiply to its residue. Mode -1 from output 1:
	// C T^-1 column has norm 1 (unit shape e3) -- from memory of the
	// construction above.
	if g := d.Boxes[0].OutGain[0]; g < 1-1e-12 || g > 1+1e-12 {
		t.Errorf("output gain of the real mode %g, want 1", g)
	}
}

// Beyond DiagramMaxBoxes blocks, neighbours share boxes and every block is
// in exactly one box.
func TestDiagramGroups(t *testing.T) {
	for _, n := range []int{1, 2, 29, 30, 31, 45, 61} {
		A := mat.NewDense(n, n, nil)
		for i := 0; i < n; i++ {
			A.Set(i, i, -float64(i+1))
		}
		B := mat.NewDense(n, 1, nil)
		C := mat.NewDense(1, n, nil)
		for i := 0; i < n; i++ {
			B.Set(i, 0, 1)
			C.Set(0, i, 1)
		}
		s, err := NewSystem(A.RawMatrix().Rows, B.RawMatrix().Cols, C.RawMatrix().Rows, A, B, C, nil, 0)
		if err != nil {
			t.Fatal(err)
		}
		d, err := Diagram(s)
		if err != nil {
			t.Fatal(err)
		}
		if len(d.Boxes) > DiagramMaxBoxes || d.Grouped != (n > DiagramMaxBoxes) {
			t.Errorf("n=%d: %d boxes, grouped %v", n, len(d.Boxes), d.Grouped)
		}
		next, modes := 0, 0
		for _, bx := range d.Boxes {
			if bx.First != next || bx.Last < bx.First {
				t.Errorf("n=%d: box %d..%d after %d", n, bx.First, bx.Last, next)
			}
			next = bx.Last + 1
			modes += len(bx.Modes)
		}
		if next != n || modes != n {
			t.Errorf("n=%d: boxes cover %d blocks and %d modes", n, next, modes)
		}
	}
}
