package lang_test

import (
	"flag"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"lsys/lang/builtins"
)

var update = flag.Bool("update", false, "rewrite the language reference in README.md")

const (
	refStart = "<!-- reference:start -->"
	refEnd   = "<!-- reference:end -->"
)

// TestReferenceInREADME checks that README.md carries the reference
// generated from the registry; with -update it rewrites the text between
// the markers (and nothing else).
func TestReferenceInREADME(t *testing.T) {
	path := filepath.Join("..", "README.md")
	data, err := os.ReadFile(path)
	if err != nil {
		t.Fatalf("reading README.md: %v", err)
	}
	text := string(data)
	i, j := strings.Index(text, refStart), strings.Index(text, refEnd)
	if i < 0 || j < 0 || j < i {
		t.Fatalf("README.md must contain the markers %s and %s (in that order) where the language reference goes; add them, then run go test ./lang -run Reference -update", refStart, refEnd)
	}
	want := refStart + "\n" + builtins.Registry().Reference() + refEnd
	got := text[i : j+len(refEnd)]
	if got == want {
		return
	}
	if *update {
		out := text[:i] + want + text[j+len(refEnd):]
		if err := os.WriteFile(path, []byte(out), 0o644); err != nil {
			t.Fatal(err)
		}
		t.Logf("rewrote the language reference in %s", path)
		return
	}
	t.Errorf("the language reference in README.md is out of date with the registry; run: go test ./lang -run Reference -update")
}

func TestReferenceContents(t *testing.T) {
	ref := builtins.Registry().Reference()
	for _, b := range builtins.Registry().Builtins() {
		if !strings.Contains(ref, "#### `"+b.Signature()+"`") {
			t.Errorf("reference lacks %s", b.Name)
		}
	}
	if builtins.Registry().Reference() != ref {
		t.Error("the reference is not deterministic")
	}
}
