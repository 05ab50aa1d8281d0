package runner

import (
	"bytes"
	"context"
	"os"
	"path/filepath"
	"strconv"
	"testing"
)

// Reading and writing a stored notebook changes no byte: the encoder
// writes what nbformat writes.
func TestNotebookRoundTrip(t *testing.T) {
	paths, _ := filepath.Glob("../notebooks/*.ipynb")
	if len(paths) == 0 {
		t.Fatal("no notebooks found")
	}
	for _, p := range paths {
		data, err := os.ReadFile(p)
		if err != nil {
			t.Fatal(err)
		}
		nb, err := ReadNotebook(data)
		if err != nil {
			t.Fatalf("%s: %v", p, err)
		}
		if got := nb.Encode(); !bytes.Equal(got, data) {
			t.Errorf("%s: %s", p, firstDiff(got, data))
		}
	}
}

// Python's repr of floats, from memory of CPython's float_repr_style 'short'.
func TestPyFloat(t *testing.T) {
	for _, c := range []struct {
		f    float64
		want string
	}{{1, "1.0"}, {0.1, "0.1"}, {1e-5, "1e-05"}, {1e-4, "0.0001"}, {1e16, "1e+16"}, {123456789012345.6, "123456789012345.6"},
		{-2.5e-7, "-2.5e-07"}, {1.5e300, "1.5e+300"}, {0, "0.0"}} {
		if got := pyFloat(c.f); got != c.want {
			t.Errorf("pyFloat(%g) = %s, want %s", c.f, got, c.want)
		}
	}
}

// Python's str.splitlines(True).
func TestSplitLines(t *testing.T) {
	got := splitLines("a\nb\r\nc\rd\u2028e")
	want := []string{"a\n", "b\r\n", "c\r", "d\u2028", "e"}
	if len(got) != len(want) {
		t.Fatalf("%q", got)
	}
	for i := range want {
		if got[i] != want[i] {
			t.Errorf("%d: %q want %q", i, got[i], want[i])
		}
	}
}

// firstDiff shows where two outputs part, with some context.
func firstDiff(got, want []byte) string {
	i := 0
	for i < len(got) && i < len(want) && got[i] == want[i] {
		i++
	}
	lo := max(0, i-80)
	return "differ at byte " + itoa(i) + ":\n got: " + string(got[lo:min(len(got), i+80)]) + "\nwant: " + string(want[lo:min(len(want), i+80)])
}

func itoa(i int) string { return strconv.Itoa(i) }

// Every stored notebook, run here, is byte for byte the notebook the
// Jupyter front end stored from the kernel (kernel/frontend_test.go checks
// the stored notebooks against fresh kernel runs).
func TestNotebooksRunAsStored(t *testing.T) {
	paths, _ := filepath.Glob("../notebooks/*.ipynb")
	for _, p := range paths {
		t.Run(filepath.Base(p), func(t *testing.T) {
			data, err := os.ReadFile(p)
			if err != nil {
				t.Fatal(err)
			}
			nb, err := ReadNotebook(data)
			if err != nil {
				t.Fatal(err)
			}
			res, err := Run(context.Background(), nb, Options{Dir: filepath.Dir(p)})
			if err != nil {
				t.Fatal(err)
			}
			if len(res.Failures) > 0 {
				t.Errorf("failures: %v", res.Failures)
			}
			if got := nb.Encode(); !bytes.Equal(got, data) {
				t.Errorf("%s", firstDiff(got, data))
			}
		})
	}
}
