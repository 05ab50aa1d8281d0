package kernel

import (
	"os"
	"path/filepath"
	"strings"
	"testing"

	"lsys/lang"
)

// The kernelspec folder carries our editor mode, named in language_info,
// with the registry's built-ins and the shared token classes. (The browser
// test checks that the classic notebook loads it and highlights cells.)
func TestKernelspecShipsEditorMode(t *testing.T) {
	dir := t.TempDir()
	if err := WriteKernelspec(dir, SpecFor("/usr/local/bin/lsys")); err != nil {
		t.Fatal(err)
	}
	js, err := os.ReadFile(filepath.Join(dir, "kernel.js"))
	if err != nil {
		t.Fatal(err)
	}
	if got := lang.LanguageInfo()["codemirror_mode"]; got != "lsys" {
		t.Errorf("language_info codemirror_mode = %v, want lsys", got)
	}
	for _, want := range []string{`defineMode("lsys"`, `defineMIME("text/x-lsys"`, `"diagram"`, `"overlay"`, `"then"`,
		`return "` + lang.TokBuiltin + `"`, `return "` + lang.TokNumber + `"`, "onload"} {
		if !strings.Contains(string(js), want) {
			t.Errorf("kernel.js lacks %s", want)
		}
	}
	css, err := os.ReadFile(filepath.Join(dir, "kernel.css"))
	if err != nil || !strings.Contains(string(css), ".CodeMirror.cm-s-ipython span.cm-"+lang.TokBuiltin+" {") {
		t.Errorf("kernel.css: %v\n%s", err, css)
	}
	if again := EditorModeJS(); again != string(js) {
		t.Error("kernel.js differs between two writes")
	}
}
