package main

import (
	"go/build"
	"io/fs"
	"os"
	"path/filepath"
	"sort"
	"strings"
	"testing"
)

// layers says which of our own packages each package may import. Imports
// point one way: front ends -> {language, display} -> lsys -> gonum. A new
// package must be added here, at its layer, before this test passes.
var layers = map[string][]string{
	"lsys/lsys":           {"lsys/lsys/cgolapack"},
	"lsys/lsys/cgolapack": {},
	"lsys/lsys/numfmt":    {},
	"lsys/display":        {"lsys/lsys", "lsys/lsys/numfmt"},
	"lsys/lang/syntax":    {},
	"lsys/lang":           {"lsys/lang/syntax", "lsys/lsys", "lsys/lsys/numfmt"},
	// The built-ins see the language only through its public API (the
	// compiler keeps them from the evaluator's internals) and lsys.
	"lsys/lang/builtins": {"lsys/lang", "lsys/lsys"},
	// Test helpers: a session with every built-in, a recording Output.
	"lsys/lang/langtest": {"lsys/lang", "lsys/lang/builtins", "lsys/lang/syntax"},
	"lsys/kernel":        {"lsys/lang", "lsys/lang/builtins", "lsys/lang/syntax", "lsys/display", "lsys/lsys"},
	"lsys/runner":        {"lsys/lang", "lsys/lang/builtins", "lsys/lang/syntax", "lsys/display", "lsys/lsys"},
	"lsys/bench/inproc":  {"lsys/lsys"},
	"lsys":               {"lsys/kernel", "lsys/runner", "lsys/lang", "lsys/lang/builtins", "lsys/lang/syntax", "lsys/display", "lsys/lsys"},
}

// testLayers are what a package's tests may import besides its own layer:
// the language's tests run cells with the built-ins, which sit above it.
var testLayers = map[string][]string{
	"lsys/lang":          {"lsys/lang/builtins", "lsys/lang/langtest"},
	"lsys/lang/builtins": {"lsys/lang/langtest", "lsys/lang/syntax"},
}

// only lists packages that may import nothing but the standard library,
// gonum and the packages of their layer: the built-ins stay on the
// public API of the language and on lsys.
var only = map[string]bool{"lsys/lang/builtins": true}

// outside lists third-party modules only the protocol may use: numerics,
// display and the language know nothing of ZeroMQ or Jupyter.
var outside = map[string][]string{
	"github.com/go-zeromq/": {"lsys/kernel"},
}

// TestImportsPointOneWay reads the imports of every package in the module,
// tests included, and fails on an import against the layering.
func TestImportsPointOneWay(t *testing.T) {
	seen := 0
	err := filepath.WalkDir(".", func(path string, d fs.DirEntry, err error) error {
		if err != nil {
			return err
		}
		if d.IsDir() && path != "." && (strings.HasPrefix(d.Name(), ".") || d.Name() == "testdata" || d.Name() == "build") {
			return filepath.SkipDir
		}
		if !d.IsDir() {
			return nil
		}
		if _, err := os.Stat(filepath.Join(path, "go.mod")); err == nil && path != "." {
			return filepath.SkipDir // another module (third_party/): not ours to layer
		}
		pkg, err := build.ImportDir(path, 0)
		if err != nil {
			if _, ok := err.(*build.NoGoError); ok {
				return nil
			}
			return err
		}
		name := "lsys"
		if path != "." {
			name = "lsys/" + filepath.ToSlash(path)
		}
		allowed, ok := layers[name]
		if !ok {
			t.Errorf("%s is not in the layer table of layers_test.go; add it with the packages it may import", name)
			return nil
		}
		seen++
		if only[name] {
			for _, imp := range pkg.Imports {
				if strings.Contains(strings.Split(imp, "/")[0], ".") && !strings.HasPrefix(imp, "gonum.org/") {
					t.Errorf("%s imports %s; it may use only the standard library, gonum, %s", name, imp, strings.Join(allowed, ", "))
				}
			}
		}
		imports := append(append([]string{}, pkg.Imports...), pkg.TestImports...)
		imports = append(imports, pkg.XTestImports...)
		sort.Strings(imports)
		isTest := map[string]bool{}
		for _, imp := range append(append([]string{}, pkg.TestImports...), pkg.XTestImports...) {
			if !contains(pkg.Imports, imp) {
				isTest[imp] = true
			}
		}
		for _, imp := range imports {
			if imp == name {
				continue // an external test package importing its own package
			}
			if imp == "lsys" || strings.HasPrefix(imp, "lsys/") {
				if !contains(allowed, imp) && !(isTest[imp] && contains(testLayers[name], imp)) {
					t.Errorf("%s imports %s, which is not below it (allowed: %s)", name, imp, strings.Join(allowed, ", "))
				}
				continue
			}
			for prefix, users := range outside {
				if strings.HasPrefix(imp, prefix) && !contains(users, name) {
					t.Errorf("%s imports %s, which only %s may use", name, imp, strings.Join(users, ", "))
				}
			}
		}
		return nil
	})
	if err != nil {
		t.Fatal(err)
	}
	if seen < 5 {
		t.Fatalf("found %d packages; the walk did not see the module", seen)
	}
}

func contains(list []string, s string) bool {
	for _, x := range list {
		if x == s {
			return true
		}
	}
	return false
}
