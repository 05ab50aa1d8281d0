package lang_test

import (
	"testing"

	"lsys/lang/langtest"
)

// Issue 15, friction 1: P * 3000/(0.005*s + 1) groups as (P*3000)/(...)
// and means P * (3000/(0.005 s + 1)): 3000/(0.005 s + 1) = 600000/(s + 200),
// times 1/(s^2 + 0.4 s + 4) (by hand).
func TestSystemDividedByTransferFunction(t *testing.T) {
	const p = "P = system([[0, 1], [-4, -0.4]], [0, 1], [1, 0])\n"
	langtest.RunCells(t, []langtest.Cell{
		{Src: p + "transfer(P * 3000/(0.005*s + 1))", Want: "600000 / (s^3 + 200.4*s^2 + 84*s + 800)"},
		{Src: p + "transfer(P/2)", Want: "0.5 / (s^2 + 0.4*s + 4)"},
		{Src: p + "P/(1/(s + 1))", Err: "its reciprocal is not proper", Line: 2, Col: 2},
		{Src: p + "P/P", Err: "There is no division by a system", Line: 2, Col: 2},
		{Src: p + "P/0", Err: "division of a system by zero", Line: 2, Col: 2},
		{Src: "G = system([[-1, 0], [0, -2]], identity(2), identity(2))\ngain(G/(s + 1))", Want: "1    0\n0  0.5"},
	})
}
