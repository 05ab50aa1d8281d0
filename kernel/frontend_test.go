package kernel_test

import (
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"
)

// TestNotebooksExecute runs every notebook in notebooks/ through Jupyter
// (nbconvert --execute) to HTML, as ./install does, and fails on any error
// output.
func TestNotebooksExecute(t *testing.T) {
	needJupyter(t, "nbconvert", "nbclient", "jupyter_client")
	_, env := buildKernel(t)
	nbs, _ := filepath.Glob("../notebooks/*.ipynb")
	if len(nbs) == 0 {
		t.Fatal("no notebooks in notebooks/")
	}
	out := t.TempDir()
	for _, nb := range nbs {
		nb := nb
		t.Run(filepath.Base(nb), func(t *testing.T) {
			cmd := exec.Command(python, "-m", "nbconvert", "--to", "html", "--execute",
				"--ExecutePreprocessor.kernel_name=lsys", "--ExecutePreprocessor.timeout=600",
				"--output-dir", out, nb)
			cmd.Env = env
			b, err := cmd.CombinedOutput()
			if err != nil {
				t.Fatalf("nbconvert --execute %s: %v\n%s", nb, err, b)
			}
			html, err := os.ReadFile(filepath.Join(out, strings.TrimSuffix(filepath.Base(nb), ".ipynb")+".html"))
			if err != nil {
				t.Fatal(err)
			}
			// nbconvert stops at the first error unless told otherwise, so
			// reaching here means every cell ran; check something rendered.
			if !strings.Contains(string(html), "jp-OutputArea") {
				t.Errorf("%s: rendered HTML has no output areas", nb)
			}
		})
	}
}

// TestConsoleSession drives `jupyter console --kernel lsys` as a person
// would at a terminal, and checks a cell's result comes back.
func TestConsoleSession(t *testing.T) {
	needJupyter(t, "jupyter_console")
	_, env := buildKernel(t)
	cmd := exec.Command(python, "-m", "jupyter_console", "--kernel", "lsys", "--simple-prompt")
	cmd.Env = env
	cmd.Stdin = strings.NewReader("k = 20\nk + 22\n")
	cmd.Dir = t.TempDir()
	b, err := cmd.CombinedOutput()
	if err != nil {
		t.Fatalf("jupyter console: %v\n%s", err, b)
	}
	if !strings.Contains(string(b), "Out[2]: 42") {
		t.Fatalf("jupyter console did not print the result 42 for cell 2:\n%s", b)
	}
}
