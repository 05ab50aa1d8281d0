package lsys

import (
	"bytes"
	"os"
	"os/exec"
	"path/filepath"
	"testing"
)

// checkRefFresh runs tools/ref/<script> with Debian's Python (numpy, scipy)
// into a temporary file and requires it to equal lsys/testdata/<data> byte
// for byte. It fails, never skips, when Python or its packages are missing:
// ./install and .ci/run install them, and CI must really regenerate.
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
	fresh, err := os.ReadFile(out)
	if err != nil {
		t.Fatal(err)
	}
	committed, err := os.ReadFile(filepath.Join("testdata", data))
	if err != nil {
		t.Fatal(err)
	}
	if !bytes.Equal(fresh, committed) {
		t.Fatalf("lsys/testdata/%s differs from what tools/ref/%s writes; regenerate it with /usr/bin/python3 tools/ref/%s lsys/testdata/%s and review the change", data, script, script, data)
	}
}
