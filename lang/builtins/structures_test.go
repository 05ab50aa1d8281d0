package builtins_test

import (
	"context"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"gonum.org/v1/gonum/mat"

	"lsys/lang"
	"lsys/lang/builtins"
	"lsys/lang/langtest"
	"lsys/lsys"
)

// A three-storey frame as masses and storey stiffnesses (invented), as in
// the built-ins' examples.
const soTestFrame = "M = [[2000, 0, 0], [0, 2000, 0], [0, 0, 1500]]\n" +
	"K = [[6e6, -3e6, 0], [-3e6, 5e6, -2e6], [0, -2e6, 2e6]]\n" +
	"frame = secondorder(M, K, [0, 0, 1], damping: 0.02, dofs: [\"floor1\", \"floor2\", \"roof\"], inputs: [\"wind\"], outputs: [\"roof\"], sensors: [[0, 0, 1]])\n"

// The frame as a second-order model is a system everywhere: its poles are
// those of the hand-written first-order model, and series connections and
// frequency responses take it.
func TestBuiltinSecondOrderAsSystem(t *testing.T) {
	v := stRun(t, soTestFrame+"poles(frame)")
	p, ok := v.(*mat.CDense)
	if !ok {
		t.Fatalf("poles: %T", v)
	}
	sm := stRun(t, soTestFrame+"normalmodes(frame)").(*lsys.StructuralModes)
	r, _ := p.Dims()
	if r != 6 {
		t.Fatalf("%d poles, want 6", r)
	}
	// Each mode with ratio 0.02 gives |pole| = w_j (from the definition of
	// the damping ratio).
	for i := 0; i < r; i++ {
		z := p.At(i, 0)
		w := math.Hypot(real(z), imag(z))
		if d := math.Abs(w - sm.Omega[i/2]); d > 1e-9*w {
			t.Errorf("pole %d: |p| = %g, mode %g", i+1, w, sm.Omega[i/2])
		}
		if zeta := -real(z) / w; math.Abs(zeta-0.02) > 1e-9 {
			t.Errorf("pole %d: ratio %g, want 0.02", i+1, zeta)
		}
	}
	stRun(t, soTestFrame+"closeloop(frame, through: 1)")
	stRun(t, soTestFrame+"stack(frame, modalmodel(frame, 1))")
	stRun(t, soTestFrame+"2 * frame + modalmodel(frame, 2)")
	stRun(t, soTestFrame+"frequency(frame)")
	stRun(t, soTestFrame+"frequency(modalmodel(frame, 2))")
	if g := stRun(t, soTestFrame+"frame.system"); g.(*lsys.System).N() != 6 {
		t.Error("frame.system is not the 6-state system")
	}
}

func TestBuiltinStructuresErrors(t *testing.T) {
	stRunErr(t, "secondorder([[1, 0], [0, 1]], [[2, -1], [-1.5, 2]], [1, 0])", "not symmetric")
	stRunErr(t, "secondorder([[1, 0], [0, 0]], [[2, -1], [-1, 2]], [1, 0])", "not positive definite")
	stRunErr(t, "secondorder([[1, 0], [0, 1]], [[2, -1], [-1, 2]], [1, 0], measure: \"force\")", "measures")
	stRunErr(t, soTestFrame+"rayleigh(frame, 2, 0.05, 10, 0.001)", "negative")
	stRunErr(t, soTestFrame+"modalmodel(frame, 4)", "keep between 1 and 3")
	stRunErr(t, "c = springlattice([10], 1, 1, grounded: false)\nlowestmodes(c.K, c.M, count: 11)", "11 modes")
	stRunErr(t, "readmtx(\"../k.mtx\")", "outside the notebook's folder")
	stRunErr(t, "readmtx(\"missing.mtx\")", "no file")
	stRunErr(t, soTestFrame+"normalmodes(frame, [0, 0, 0])", "no mass")
	stRunErr(t, soTestFrame+"modeshapes(normalmodes(frame), grid: [2, 2])", "grid of 2 x 2")
}

// readmtx reads a file beside the notebook; lowestmodes on it agrees with
// normalmodes on the same matrices as dense (the Lanczos and dense paths).
func TestBuiltinReadMtxLowestModes(t *testing.T) {
	dir := t.TempDir()
	K, _, err := lsys.SpringLattice([]int{6, 5}, 3e3, 1, true)
	if err != nil {
		t.Fatal(err)
	}
	f, err := os.Create(filepath.Join(dir, "k.mtx"))
	if err != nil {
		t.Fatal(err)
	}
	if err := lsys.WriteMatrixMarket(f, K); err != nil {
		t.Fatal(err)
	}
	f.Close()
	s := lang.NewSession(lang.Options{Builtins: builtins.Registry(), Dir: dir})
	src := "K = readmtx(\"k.mtx\")\nM = 2*identity(30)\n" +
		"a = lowestmodes(K, M, count: 5, directions: 1)\n" +
		"b = normalmodes(secondorder(M, sparsedense, identity(30)[:, 1]), directions: 1)\n"
	src = strings.Replace(src, "sparsedense", "Kd", 1)
	var kd strings.Builder
	kd.WriteString("Kd = [")
	for i := 0; i < K.N; i++ {
		if i > 0 {
			kd.WriteString(", ")
		}
		kd.WriteString("[")
		for j := 0; j < K.N; j++ {
			if j > 0 {
				kd.WriteString(", ")
			}
			kd.WriteString(lang.FormatNumber(denseAt(K, i, j)))
		}
		kd.WriteString("]")
	}
	kd.WriteString("]\n")
	if _, err := s.Run(context.Background(), kd.String()+src, &langtest.Recorder{}); err != nil {
		t.Fatal(err)
	}
	a, _ := s.Run(context.Background(), "a", &langtest.Recorder{})
	b, _ := s.Run(context.Background(), "b", &langtest.Recorder{})
	am, bm := a.(*lsys.StructuralModes), b.(*lsys.StructuralModes)
	for j := 0; j < 5; j++ {
		if d := math.Abs(am.Omega[j] - bm.Omega[j]); d > 1e-9*bm.Omega[j] {
			t.Errorf("mode %d: Lanczos %g, dense %g rad/s", j+1, am.Omega[j], bm.Omega[j])
		}
		if d := math.Abs(am.EffectiveMass[0][j] - bm.EffectiveMass[0][j]); d > 1e-8*bm.TotalMass[0] {
			t.Errorf("mode %d: effective mass %g vs %g", j+1, am.EffectiveMass[0][j], bm.EffectiveMass[0][j])
		}
	}
}

func denseAt(a *lsys.SparseSym, i, j int) float64 {
	for p := a.ColPtr[j]; p < a.ColPtr[j+1]; p++ {
		if int(a.RowIdx[p]) == i {
			return a.Val[p]
		}
	}
	return 0
}

// Progress: lowestmodes shows and updates one display while it runs.
func TestBuiltinLowestModesProgress(t *testing.T) {
	rec := &langtest.Recorder{}
	s := langtest.NewSession(t)
	if _, err := s.Run(context.Background(), "p = springlattice([20, 20], 1, 1)\nlowestmodes(p.K, p.M, count: 4)", rec); err != nil {
		t.Fatal(err)
	}
	if len(rec.Displays) == 0 {
		t.Error("no progress display")
	}
}

// modalmodel on a stiffness matrix (the sparse path) agrees with the
// same model entered as a second-order model: the static gain (exact with
// the static correction either way) and the poles of the kept modes.
func TestBuiltinModalModelSparse(t *testing.T) {
	src := "K = [[2e4, -1e4, 0, 0], [-1e4, 2e4, -1e4, 0], [0, -1e4, 2e4, -1e4], [0, 0, -1e4, 1e4]]\n" +
		"M = 2*identity(4)\nF = [0, 0, 0, 1]\n"
	for _, probe := range []string{"gain(%s)", "poles(%s)"} {
		a := stRun(t, src+fmt.Sprintf(probe, "modalmodel(K, 2, M: M, F: F, damping: 0.02)"))
		b := stRun(t, src+fmt.Sprintf(probe, "modalmodel(secondorder(M, K, F, damping: 0.02), 2)"))
		if !mat.EqualApprox(asMatrix(a), asMatrix(b), 1e-9) && !mat.CEqualApprox(asCMatrix(a), asCMatrix(b), 1e-6) {
			t.Errorf("%s: sparse %v, dense %v", probe, lang.FormatValue(a), lang.FormatValue(b))
		}
	}
	stRunErr(t, src+"modalmodel(K, 2, F: F)", "needs the mass matrix")
	stRunErr(t, src+"modalmodel(K, 2, M: M, F: [5])", "not a degree of freedom")
	if g := stRun(t, src+"gain(modalmodel(K, 2, M: M, F: [4], sensors: [4]))"); lang.FormatValue(g) != lang.FormatValue(stRun(t, src+"gain(modalmodel(K, 2, M: M, F: F, sensors: transpose(F)))")) {
		t.Errorf("DOF numbers and the full maps differ: %s", lang.FormatValue(g))
	}
	stRunErr(t, src+"modalmodel(secondorder(M, K, F), 2, F: F)", "is for sparse models")
}

func asMatrix(v any) mat.Matrix {
	if m, ok := v.(*mat.Dense); ok {
		return m
	}
	return mat.NewDense(1, 1, []float64{math.NaN()})
}

func asCMatrix(v any) mat.CMatrix {
	if m, ok := v.(*mat.CDense); ok {
		return m
	}
	return mat.NewCDense(1, 1, []complex128{complex(math.NaN(), 0)})
}
