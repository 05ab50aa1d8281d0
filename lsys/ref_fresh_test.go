package lsys

import (
	"encoding/json"
	"fmt"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"sort"
	"testing"
)

// checkRefFresh runs tools/ref/<script> with Debian's Python (numpy, scipy)
// into a temporary file and requires it to agree with
// lsys/testdata/<data>: the same structure and strings, and every number
// within refFreshRel relative (plus refFreshAbs absolute, for entries that
// are rounding residue around 0). The last digits of LAPACK results depend
// on the BLAS kernels of the machine (OpenBLAS picks them by processor), so
// byte equality would fail on a machine other than the one that wrote the
// file; a number tuned by hand still shows. It fails, never skips, when
// Python or its packages are missing: ./install and .ci/run install them,
// and CI must really regenerate.
func checkRefFresh(t *testing.T, script, data string) {
	t.Helper()
	const py = "/usr/bin/python3"
	if out, err := exec.Command(py, "-c", "import numpy, scipy").CombinedOutput(); err != nil {
		t.Fatalf("%s with numpy and scipy is needed to regenerate the reference data: %v\n%s\nInstall Debian's python3-numpy and python3-scipy (./install does as root).", py, err, out)
	}
	out := filepath.Join(t.TempDir(), "ref.json")
	cmd := exec.Command(py, filepath.Join("..", "tools", "ref", script), out)
	if msg, err := cmd.CombinedOutput(); err != nil {
		t.Fatalf("reference script failed: %v\n%s", err, msg)
	}
	var fresh, committed any
	for _, f := range []struct {
		path string
		v    *any
	}{{out, &fresh}, {filepath.Join("testdata", data), &committed}} {
		b, err := os.ReadFile(f.path)
		if err != nil {
			t.Fatal(err)
		}
		if err := json.Unmarshal(b, f.v); err != nil {
			t.Fatalf("%s: %v", f.path, err)
		}
	}
	var diffs []string
	refDiff(fresh, committed, "", 0, &diffs)
	if len(diffs) > 0 {
		if len(diffs) > 5 {
			diffs = append(diffs[:5], fmt.Sprintf("... and %d more", len(diffs)-5))
		}
		t.Fatalf("lsys/testdata/%s differs from what tools/ref/%s writes: %v; regenerate it with /usr/bin/python3 tools/ref/%s lsys/testdata/%s and review the change", data, script, diffs, script, data)
	}
}

// Numbers agree within refFreshRel relative, or within refFreshNorm of the
// largest magnitude in the innermost enclosing object (one system, one
// case: its matrices set the scale):
// quantities that rounding decides (the members of a defective eigenvalue,
// split by about sqrt(u) of the matrix's size, Schur values and projectors
// near them, singular values far below the largest) come out differently
// from one BLAS kernel to the next at that level, relative to the case,
// not to themselves. A digit changed by hand still shows.
const (
	refFreshRel  = 1e-9
	refFreshAbs  = 1e-12
	refFreshNorm = 1e-6
)

// refMaxAbs is the largest magnitude of the numbers in v.
func refMaxAbs(v any) float64 {
	m := 0.0
	switch x := v.(type) {
	case map[string]any:
		for _, e := range x {
			m = math.Max(m, refMaxAbs(e))
		}
	case []any:
		for _, e := range x {
			m = math.Max(m, refMaxAbs(e))
		}
	case float64:
		m = math.Abs(x)
	}
	return m
}

func refDiff(a, b any, path string, scale float64, diffs *[]string) {
	switch x := a.(type) {
	case map[string]any:
		y, ok := b.(map[string]any)
		if !ok {
			*diffs = append(*diffs, path+": type differs")
			return
		}
		keys := map[string]bool{}
		for k := range x {
			keys[k] = true
		}
		for k := range y {
			keys[k] = true
		}
		sorted := make([]string, 0, len(keys))
		for k := range keys {
			sorted = append(sorted, k)
		}
		sort.Strings(sorted)
		objScale := math.Max(refMaxAbs(x), refMaxAbs(y))
		for _, k := range sorted {
			refDiff(x[k], y[k], path+"/"+k, objScale, diffs)
		}
	case []any:
		y, ok := b.([]any)
		if !ok || len(x) != len(y) {
			*diffs = append(*diffs, path+": length or type differs")
			return
		}
		for i := range x {
			refDiff(x[i], y[i], fmt.Sprintf("%s/%d", path, i), scale, diffs)
		}
	case float64:
		y, ok := b.(float64)
		if !ok || math.Abs(x-y) > math.Max(refFreshRel*math.Max(math.Abs(x), math.Abs(y)), refFreshNorm*scale)+refFreshAbs {
			*diffs = append(*diffs, fmt.Sprintf("%s: %v vs %v", path, a, b))
		}
	default:
		if a != b {
			*diffs = append(*diffs, fmt.Sprintf("%s: %v vs %v", path, a, b))
		}
	}
}
