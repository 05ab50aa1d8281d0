package lsys

import (
	"errors"
	"math"
	"math/cmplx"

	"gonum.org/v1/gonum/mat"
)

// DiagramMaxBoxes is the most modal subsystems a diagram shows one by one;
// beyond it, neighbours in the mode table's order share a box.
const DiagramMaxBoxes = 30

// DiagramBox is one box of a modal diagram: a block of the modal form (or,
// for large models, several neighbouring blocks) with the figures of its
// modes and of its links to every input and output.
type DiagramBox struct {
	First, Last int    // 0-based blocks of the modal form it holds (equal unless grouped)
	Modes       []Mode // its rows of the mode table, in table order
	// InGain[j] is the 2-norm of the box's rows of the modal B in column
	// j (how hard input j drives the box's modal coordinates, whose mode
	// shapes have unit norm) and OutGain[i] that of its columns of the
	// modal C in row i. Grouped boxes give the largest of their blocks.
	InGain, OutGain []float64
	// Reach[j] and Visibility[i] are the mode table's unit-free figures
	// (between 0 and 1, the largest over the box's modes); Reached[j] says
	// input j alone moves some mode of the box: the mode is reached (the
	// PBH verdict for all inputs together) and Reach[j] > RelTol. Seen
	// likewise.
	Reach, Visibility []float64
	Reached, Seen     []bool
}

// ModalDiagram is what a modal diagram draws: the system as decoupled
// modal subsystems in parallel between its inputs and outputs.
type ModalDiagram struct {
	Table *ModeTable
	Form  *ModalForm
	Boxes []DiagramBox
	// Grouped is true when the form has more than DiagramMaxBoxes blocks
	// and neighbouring blocks share a box.
	Grouped bool
	RelTol  float64 // the per-link verdict's tolerance (the mode table's)
}

// Diagram returns the figures of a modal diagram of s: the mode table and
// modal form of s, each block of the form with its modes and the gain and
// verdict of every link.
func Diagram(s *System) (*ModalDiagram, error) {
	if s.N() == 0 {
		return nil, errors.New("a static gain has no modes to draw")
	}
	tab, err := Modes(s)
	if err != nil {
		return nil, err
	}
	mf, err := Modal(s)
	if err != nil {
		return nil, err
	}
	d := &ModalDiagram{Table: tab, Form: mf, RelTol: tab.RelTol}
	m, p := s.M(), s.P()
	// each mode to the block holding the nearest eigenvalue
	owner := make([][]int, len(mf.Blocks))
	for k, md := range tab.Modes {
		best, bd := 0, math.Inf(1)
		for bi, b := range mf.Blocks {
			for _, v := range b.Values {
				if dd := cmplx.Abs(v - md.Eigenvalue); dd < bd {
					best, bd = bi, dd
				}
			}
		}
		owner[best] = append(owner[best], k)
	}
	per := 1
	if len(mf.Blocks) > DiagramMaxBoxes {
		per = (len(mf.Blocks) + DiagramMaxBoxes - 1) / DiagramMaxBoxes
		d.Grouped = true
	}
	for first := 0; first < len(mf.Blocks); first += per {
		last := min(first+per, len(mf.Blocks)) - 1
		bx := DiagramBox{First: first, Last: last,
			InGain: make([]float64, m), OutGain: make([]float64, p),
			Reach: make([]float64, m), Visibility: make([]float64, p),
			Reached: make([]bool, m), Seen: make([]bool, p)}
		for bi := first; bi <= last; bi++ {
			b := mf.Blocks[bi]
			for j := 0; j < m; j++ {
				bx.InGain[j] = math.Max(bx.InGain[j], blockNorm(mf.System.B, b.Start, b.Size, j, true))
			}
			for i := 0; i < p; i++ {
				bx.OutGain[i] = math.Max(bx.OutGain[i], blockNorm(mf.System.C, b.Start, b.Size, i, false))
			}
			for _, k := range owner[bi] {
				md := tab.Modes[k]
				bx.Modes = append(bx.Modes, md)
				for j := 0; j < m && j < len(md.Reach); j++ {
					bx.Reach[j] = math.Max(bx.Reach[j], md.Reach[j])
					// a link never contradicts its mode's verdict
					bx.Reached[j] = bx.Reached[j] || (md.Reachable && md.Reach[j] > d.RelTol)
				}
				for i := 0; i < p && i < len(md.Visibility); i++ {
					bx.Visibility[i] = math.Max(bx.Visibility[i], md.Visibility[i])
					bx.Seen[i] = bx.Seen[i] || (md.Observable && md.Visibility[i] > d.RelTol)
				}
			}
		}
		d.Boxes = append(d.Boxes, bx)
	}
	return d, nil
}

// blockNorm is the 2-norm of rows start..start+size-1 of column k of M
// (rows) or of columns start..start+size-1 of row k (cols).
func blockNorm(M *mat.Dense, start, size, k int, rows bool) float64 {
	s := 0.0
	for r := start; r < start+size; r++ {
		if rows {
			s = math.Hypot(s, M.At(r, k))
		} else {
			s = math.Hypot(s, M.At(k, r))
		}
	}
	return s
}
