package kernel_test

import (
	"encoding/json"
	"fmt"
	"os"
	"os/exec"
	"path/filepath"
	"reflect"
	"strings"
	"testing"
)

// TestNotebooksExecute runs every notebook in notebooks/ through Jupyter
// (nbconvert --execute, as ./install does), checks that each stored output
// is what a fresh run gives byte for byte (notebooks are stored executed,
// and same input must give same output), checks that lsys run writes the
// same notebook byte for byte, then renders Jupyter's HTML.
// Regenerate a notebook after a deliberate display change with
// jupyter nbconvert --to notebook --execute --inplace
// --ExecutePreprocessor.record_timing=False notebooks/NAME.ipynb
func TestNotebooksExecute(t *testing.T) {
	needJupyter(t, "nbconvert", "nbclient", "jupyter_client")
	bin, env := buildKernel(t)
	nbs, _ := filepath.Glob("../notebooks/*.ipynb")
	if len(nbs) == 0 {
		t.Fatal("no notebooks in notebooks/")
	}
	out := t.TempDir()
	for _, nb := range nbs {
		nb := nb
		base := strings.TrimSuffix(filepath.Base(nb), ".ipynb")
		t.Run(base, func(t *testing.T) {
			run := func(args ...string) {
				t.Helper()
				cmd := exec.Command(python, append([]string{"-m", "nbconvert"}, args...)...)
				cmd.Env = env
				if b, err := cmd.CombinedOutput(); err != nil {
					t.Fatalf("nbconvert %v: %v\n%s", args, err, b)
				}
			}
			fresh := filepath.Join(out, base+".ipynb")
			run("--to", "notebook", "--execute", "--ExecutePreprocessor.kernel_name=lsys",
				"--ExecutePreprocessor.timeout=600", "--ExecutePreprocessor.record_timing=False",
				"--output-dir", out, nb)
			compareOutputs(t, nb, fresh)
			// The headless front end writes the very bytes Jupyter stores
			// from this kernel, whether or not the stored notebook is fresh.
			headless := filepath.Join(out, base+".run.ipynb")
			if b, err := exec.Command(bin, "run", "-q", nb, "-o", headless).CombinedOutput(); err != nil {
				t.Fatalf("lsys run: %v\n%s", err, b)
			}
			want, _ := os.ReadFile(fresh)
			if got, _ := os.ReadFile(headless); string(got) != string(want) {
				t.Errorf("lsys run and Jupyter with the kernel wrote different notebooks:\n%s", firstDiff(string(got), string(want)))
			}
			run("--to", "html", "--output-dir", out, fresh)
			html, err := os.ReadFile(filepath.Join(out, base+".html"))
			if err != nil {
				t.Fatal(err)
			}
			if !strings.Contains(string(html), "jp-OutputArea") {
				t.Errorf("%s: rendered HTML has no output areas", nb)
			}
		})
	}
}

type notebook struct {
	Cells []struct {
		CellType string `json:"cell_type"`
		Metadata struct {
			Tags []string `json:"tags"`
		} `json:"metadata"`
		Source  any              `json:"source"`
		Outputs []map[string]any `json:"outputs"`
	} `json:"cells"`
}

func readNotebook(t *testing.T, path string) notebook {
	t.Helper()
	b, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	var nb notebook
	if err := json.Unmarshal(b, &nb); err != nil {
		t.Fatalf("%s: %v", path, err)
	}
	return nb
}

// compareOutputs checks stored outputs against a fresh run's, cell by cell.
func compareOutputs(t *testing.T, storedPath, freshPath string) {
	t.Helper()
	stored, fresh := readNotebook(t, storedPath), readNotebook(t, freshPath)
	if len(stored.Cells) != len(fresh.Cells) {
		t.Fatalf("cell counts differ: %d stored, %d fresh", len(stored.Cells), len(fresh.Cells))
	}
	for i, c := range stored.Cells {
		if c.CellType != "code" {
			continue
		}
		f := fresh.Cells[i]
		// A cell tagged raises-exception shows an error on purpose (nbclient
		// honours the tag); any other error output fails the notebook.
		expectError := false
		for _, tag := range c.Metadata.Tags {
			expectError = expectError || tag == "raises-exception"
		}
		sawError := false
		for _, o := range f.Outputs {
			if o["output_type"] == "error" {
				sawError = true
				if !expectError {
					t.Errorf("cell %d raised an error: %v", i+1, o["evalue"])
				}
			}
		}
		if expectError && !sawError {
			t.Errorf("cell %d is tagged raises-exception but raised none", i+1)
		}
		if !reflect.DeepEqual(c.Outputs, f.Outputs) {
			sb, _ := json.MarshalIndent(c.Outputs, "", " ")
			fb, _ := json.MarshalIndent(f.Outputs, "", " ")
			t.Errorf("cell %d: stored outputs differ from a fresh run; re-execute the notebook if the change is deliberate\n%s", i+1, firstDiff(string(sb), string(fb)))
		}
	}
}

func firstDiff(a, b string) string {
	la, lb := strings.Split(a, "\n"), strings.Split(b, "\n")
	for i := 0; i < len(la) && i < len(lb); i++ {
		if la[i] != lb[i] {
			return fmt.Sprintf("line %d:\n  stored: %.300s\n  fresh:  %.300s", i+1, la[i], lb[i])
		}
	}
	return fmt.Sprintf("lengths differ: %d stored lines, %d fresh", len(la), len(lb))
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
