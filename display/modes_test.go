package display

import (
	"strings"
	"testing"

	"gonum.org/v1/gonum/mat"

	"lsys/lsys"
)

func TestModeTableStatesBothTolerances(t *testing.T) {
	// A diagonal A with a zero row of B and a zero column of C: mode -2 is
	// not reached and mode -3 not seen (Hautus 1969, fact of the trade).
	// The note must state the reach and the seen tolerance separately,
	// each RelTol times the norm of the balanced B or C.
	A := mat.NewDense(3, 3, []float64{-1, 0, 0, 0, -2, 0, 0, 0, -3})
	B := mat.NewDense(3, 1, []float64{1e-6, 0, 1e-6})
	C := mat.NewDense(1, 3, []float64{1e3, 1e3, 0})
	s, err := lsys.FromMatrices(A, B, C, nil, 0)
	if err != nil {
		t.Fatal(err)
	}
	mt, err := lsys.Modes(s)
	if err != nil {
		t.Fatal(err)
	}
	b := Render(mt, Options{})
	txt := b.Data[Text].(string)
	for _, want := range []string{
		"reached if the margin exceeds 1e-10 x ||B~|| = " + fmtNum(mt.ReachTol),
		"seen if it exceeds 1e-10 x ||C~|| = " + fmtNum(mt.ObserveTol),
		"reach margin  seen margin",
	} {
		if !strings.Contains(txt, want) {
			t.Errorf("text lacks %q:\n%s", want, txt)
		}
	}
	if mt.ReachTol <= 0 || mt.ObserveTol <= 0 {
		t.Errorf("tolerances %g %g", mt.ReachTol, mt.ObserveTol)
	}
	verdicts := [][2]bool{{true, true}, {false, true}, {true, false}}
	for i, md := range mt.Modes {
		if md.Reachable != verdicts[i][0] || md.Observable != verdicts[i][1] {
			t.Errorf("mode %d: reached %v seen %v, want %v", i+1, md.Reachable, md.Observable, verdicts[i])
		}
	}
	h := b.Data[HTML].(string)
	if !strings.Contains(h, "against tolerance "+fmtNum(mt.ObserveTol)) || !strings.Contains(h, "against tolerance "+fmtNum(mt.ReachTol)) {
		t.Errorf("HTML verdict titles do not quote the two tolerances")
	}
}
