package main

import (
	"bytes"
	"errors"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"
)

// lsys run on every demo notebook: --inplace leaves the stored notebook
// byte for byte as it was (its outputs are what the kernel stored), the
// notebook validates with Debian's nbformat, and the report is written.
func TestRunNotebooks(t *testing.T) {
	paths, _ := filepath.Glob("notebooks/*.ipynb")
	if len(paths) == 0 {
		t.Fatal("no notebooks")
	}
	dir := t.TempDir()
	for _, p := range paths {
		data, err := os.ReadFile(p)
		if err != nil {
			t.Fatal(err)
		}
		// Data files load() reads sit beside the notebook.
		nb := filepath.Join(dir, filepath.Base(p))
		if err := os.WriteFile(nb, data, 0o644); err != nil {
			t.Fatal(err)
		}
		copyData(t, filepath.Dir(p), dir)
		rep := strings.TrimSuffix(nb, ".ipynb") + ".html"
		var stdout, stderr bytes.Buffer
		if err := runHeadless([]string{nb, "--inplace", "--html", rep}, &stdout, &stderr); err != nil {
			t.Fatalf("%s: %v\n%s", p, err, stderr.String())
		}
		got, _ := os.ReadFile(nb)
		if !bytes.Equal(got, data) {
			t.Errorf("%s: lsys run --inplace changed the stored notebook", p)
		}
		if fi, err := os.Stat(rep); err != nil || fi.Size() < 10_000 {
			t.Errorf("%s: report %v", p, err)
		}
		validate(t, nb)
	}
}

func copyData(t *testing.T, from, to string) {
	entries, _ := os.ReadDir(from)
	for _, e := range entries {
		if e.IsDir() || strings.HasSuffix(e.Name(), ".ipynb") {
			continue
		}
		data, err := os.ReadFile(filepath.Join(from, e.Name()))
		if err != nil {
			t.Fatal(err)
		}
		os.WriteFile(filepath.Join(to, e.Name()), data, 0o644)
	}
}

// validate checks a notebook against the nbformat 4 schema with Debian's
// nbformat, the reference implementation of the format.
func validate(t *testing.T, path string) {
	t.Helper()
	cmd := exec.Command("/usr/bin/python3", "-c", "import sys, nbformat; nbformat.validate(nbformat.read(sys.argv[1], as_version=4))", path)
	if out, err := cmd.CombinedOutput(); err != nil {
		t.Errorf("%s does not validate with nbformat: %v\n%s", path, err, out)
	}
}

// A failing cell: exit status (errFailed), a message naming file, cell and
// line; --keep-going runs the rest; the written notebook still validates.
func TestRunFailingScript(t *testing.T) {
	dir := t.TempDir()
	script := filepath.Join(dir, "study.lsys")
	os.WriteFile(script, []byte("# %% parameters\nk = 2\n# %%\nx = k *\n# %%\ny = k + 1\ny\n"), 0o644)
	out := filepath.Join(dir, "out.ipynb")
	var stdout, stderr bytes.Buffer
	err := runHeadless([]string{script, "-o", out, "-q"}, &stdout, &stderr)
	if !errors.Is(err, errFailed) {
		t.Fatalf("err %v", err)
	}
	if msg := stderr.String(); !strings.Contains(msg, "study.lsys: cell 2 (cell-01), line 1, column 8: ") {
		t.Errorf("stderr %q", msg)
	}
	validate(t, out)
	data, _ := os.ReadFile(out)
	if strings.Contains(string(data), `"4"`) {
		t.Error("the cell after the failure ran")
	}

	stderr.Reset()
	err = runHeadless([]string{"--keep-going", script, "-o", out, "--set", "k=3", "-q"}, &stdout, &stderr)
	if !errors.Is(err, errFailed) {
		t.Fatalf("keep going: err %v", err)
	}
	data, _ = os.ReadFile(out)
	if !strings.Contains(string(data), `"4"`) {
		t.Errorf("keep going did not run the last cell with k=3:\n%s", data)
	}
	validate(t, out)

	// Without an output option the transcript goes to stdout.
	stdout.Reset()
	os.WriteFile(script, []byte("a = 2\na + 1\n"), 0o644)
	if err := runHeadless([]string{script, "-q"}, &stdout, &stderr); err != nil {
		t.Fatal(err)
	}
	if stdout.String() != "[1]: a = 2\n     a + 1\n3\n\n" {
		t.Errorf("transcript %q", stdout.String())
	}
}
