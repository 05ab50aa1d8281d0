package builtins

import (
	"testing"

	"gonum.org/v1/gonum/mat"

	"lsys/lsys"
)

func TestModalBuiltinReady(t *testing.T) {
	// Not registered yet (see stModalBuiltin); its function must work.
	b := stModalBuiltin()
	if b.Name != "modal" || b.Fn == nil || len(b.Examples) == 0 {
		t.Fatal("modal built-in malformed")
	}
	g, _ := lsys.FromMatrices(mat.NewDense(2, 2, []float64{0, 1, -4, -0.8}), mat.NewDense(2, 1, []float64{0, 0.5}), nil, nil, 0)
	mf, err := lsys.Modal(g)
	if err != nil || mf.System == nil {
		t.Fatal(err)
	}
}
