package lang_test

import (
	"context"
	"flag"
	"fmt"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
	"time"

	"lsys/lang"
	"lsys/lang/builtins"
	"lsys/lang/langtest"
	"lsys/lang/syntax"
)

// Seeds shared by the fuzzers; the committed corpus in testdata/fuzz holds
// more (cells from the tests and the examples of the registry).
var fuzzSeeds = []string{
	"1 + 2*3",
	"x = [[0, 1], [-2, -3]]\nx[2, 1]",
	"G = system([[0, 1], [-2, -3]], [0, 1], [1, 0])\nmodes(G)",
	"f(k) = if k <= 1 then 1 else k*f(k - 1)\nf(5)",
	"r = {angle: 0.1, rate: 0}\nr.angle",
	"H = 5 / (s^2 + 2*s + 5)\nsystem(H)",
	"system every 0.1 {\n  states level\n  inputs inflow\n  next level = 0.9*level + 0.1*inflow\n}",
	langtest.Pendulum + "linearize(pendulum, at: {angle: pi, rate: 0, torque: 0})",
	"\"unterminated",
	"x = (1 +",
	"a.b.c[1, 2](3)",
	"system { states x; x' = -x*x }",
	"1e999 + 2j ** 3",
	"# only a comment",
	"M = [[1, 2], [3, 4]]\nM[:, 2] + M[1:, :1]\n[1, 2, 3][2:][:1]",
	"f(k) = system {\n  states x\n  x' = -k*x\n}\nlocus(f, k: [1, 2])",
}

func seedFuzz(f *testing.F) {
	for _, s := range fuzzSeeds {
		f.Add(s)
	}
	for _, b := range builtins.Registry().Builtins() {
		for _, ex := range b.Examples {
			f.Add(ex)
		}
	}
}

func FuzzEval(f *testing.F) {
	seedFuzz(f)
	f.Fuzz(func(t *testing.T, src string) {
		s := lang.NewSession(lang.Options{Builtins: builtins.Registry()})
		ctx, cancel := context.WithTimeout(context.Background(), 200*time.Millisecond)
		defer cancel()
		_, err := s.Run(ctx, src, nil)
		if err == nil {
			return
		}
		text := err.Error()
		if strings.Contains(text, "internal error") || strings.Contains(text, "failed inside") || strings.Contains(text, "internal failure") {
			t.Fatalf("panic inside the evaluator for %q:\n%s", src, text)
		}
		if _, ok := syntax.Position(err); !ok {
			t.Fatalf("error without a position for %q: %v", src, err)
		}
	})
}

var writeCorpus = flag.Bool("writecorpus", false, "write the seed corpus into testdata/fuzz")

// TestWriteFuzzCorpus writes the seeds, the cells of the test tables and the
// registry's examples as the committed seed corpus (run with -writecorpus).
func TestWriteFuzzCorpus(t *testing.T) {
	if !*writeCorpus {
		t.Skip("run with -writecorpus to rewrite testdata/fuzz")
	}
	seeds := append([]string(nil), fuzzSeeds...)
	for _, c := range corpusCells {
		seeds = append(seeds, c)
	}
	for _, b := range builtins.Registry().Builtins() {
		seeds = append(seeds, b.Examples...)
	}
	// The scanner's and parser's fuzzers live in package syntax, which
	// cannot see the registry's examples; their corpus is written from here.
	for _, dir := range []string{filepath.Join("syntax", "testdata", "fuzz", "FuzzScan"),
		filepath.Join("syntax", "testdata", "fuzz", "FuzzParse"), filepath.Join("testdata", "fuzz", "FuzzEval")} {
		if err := os.MkdirAll(dir, 0o755); err != nil {
			t.Fatal(err)
		}
		for i, s := range seeds {
			body := "go test fuzz v1\nstring(" + strconv.Quote(s) + ")\n"
			if err := os.WriteFile(filepath.Join(dir, fmt.Sprintf("seed%03d", i)), []byte(body), 0o644); err != nil {
				t.Fatal(err)
			}
		}
	}
}

// corpusCells are cells that reach the corners of the language.
var corpusCells = []string{
	"torqe = 1\ntorque",
	"[[1, 2], [3]]",
	"v = [1, 2]\nv[0]",
	"system([[0, 1], [0, 0]], [1, 2, 3])",
	"h(n) = h(n + 1)\nh(1)",
	"x' = 1",
	"1 < 2 < 3",
	"10^400",
	"(1 + 2j) < 3",
	"[[2, 0], [0, 4]]^-1",
	"{a: 1, a: 2}",
	"system {\n  states x, v\n  x' = v\n}",
	"system {\n  states x, y\n  x' = y\n  next y = x\n}",
	"m = system {\n  states x\n  inputs u\n  x' = -x*u\n}\nlinearize(m, at: {x: 1, u: 2})",
	"m = system {\n  states x\n  x' = -log(x)\n}\nequilibrium(m, guess: {x: 2})",
	"f(k) = system([[-k]])\nlocus(f, k: linear(1, 2, n: 3))",
	"1/(s + 1) + 2/(s^2 + s + 1)",
	"system(0.1/(z - 0.9), every: 0.1)",
	"a = 1 + \\\n 2",
	"if true then [1] else \"no\"",
	"\"a\\n\\t\\\"b\" + \"c\"",
	"x = [1, 2j]\nx[2]",
	"[[1, 2j], [3, 4]][2, 1] + [[1j]][1]",
	"H = 1/(s + 1)\nH(1j) + H(-1)",
	"G = system(1/(s + 1))\nG.A + G.u1.B",
	"e = equilibrium(system {\n  states x\n  inputs u\n  x' = u - x^3\n}, inputs: {u: 8})\ne.x",
	"sensitivity(system {\n  states x\n  x' = -k*x\n}, [\"k\"])",
	"p = {k: 2}\nsystem every 0.1 {\n  states x\n  next x = x/p.k\n}",
	"Gz = sample(system(1/(s + 1)), 0.1)\nGz * (1/z) + [[1/z]] * Gz",
	"S = system(D: [[1, -1]], inputs: [\"r\", \"y\"], outputs: [\"e\"])\n[[2]] * S * [[1], [1]]",
	"m = system {\n  states v, w\n  v' = -(w'/2)\n  w' = (v'\n  w' = v\n}",
	"e = equilibrium(system {\n  states a, b\n  a' = b - a\n  b' = a - b\n}, guess: {a: 1})\ne.free",
}
