package runner

import (
	"context"
	"os"
	"path/filepath"
	"regexp"
	"strings"
	"testing"
)

func runFile(t *testing.T, path string, opt Options) (*Notebook, *Result) {
	t.Helper()
	data, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	nb, err := ReadNotebook(data)
	if err != nil {
		t.Fatal(err)
	}
	opt.Dir = filepath.Dir(path)
	res, err := Run(context.Background(), nb, opt)
	if err != nil {
		t.Fatal(err)
	}
	return nb, res
}

// A report is one file: no URL of any kind that a browser would fetch or
// follow, styles inline, charts as data, code highlighted, a print layout,
// and a header naming the version and the digest of the inputs.
func TestReportStandsAlone(t *testing.T) {
	paths, _ := filepath.Glob("../notebooks/*.ipynb")
	url := regexp.MustCompile(`(?i)https?://|//[a-z0-9.-]+\.[a-z]{2,}/|src="(?:[^d"]|d[^a])`)
	for _, p := range paths {
		nb, res := runFile(t, p, Options{})
		rep := string(Report(nb, res, ReportInfo{Title: "t", Version: "v1.2.3", Digest: Digest(nb, nil)}))
		name := filepath.Base(p)
		if m := url.FindString(rep); m != "" {
			i := strings.Index(rep, m)
			t.Errorf("%s: external reference %q in the report: ...%s...", name, m, rep[max(0, i-60):min(len(rep), i+60)])
		}
		for _, want := range []string{"lsys v1.2.3", "sha256:", "@media print", "@page", `<span class="cm-builtin">`, `<span class="cm-number">`, "data:image/svg+xml;base64,", "<h1>"} {
			if want == "data:image/svg+xml;base64," && !strings.Contains(string(nb.Encode()), "image/svg+xml") {
				continue
			}
			if !strings.Contains(rep, want) {
				t.Errorf("%s: report lacks %q", name, want)
			}
		}
		if strings.Contains(rep, "<script") || strings.Contains(rep, "<link") {
			t.Errorf("%s: report has a script or linked resource", name)
		}
		if strings.Contains(rep, "$$") {
			t.Errorf("%s: report leaves $$ equations for a typesetting script", name)
		}
		// Same inputs, same bytes.
		nb2, res2 := runFile(t, p, Options{})
		if rep2 := string(Report(nb2, res2, ReportInfo{Title: "t", Version: "v1.2.3", Digest: Digest(nb2, nil)})); rep2 != rep {
			t.Errorf("%s: two runs give different reports", name)
		}
	}
}

const failing = `# %%
a = 1
# %%
b = 2
c = undefined_name + 1
# %%
d = 4
d
`

// A failing cell stops the run and is named with its line; the cells after
// it are marked not run. With KeepGoing they run.
func TestFailingCell(t *testing.T) {
	nb := NewNotebook(SplitScript(failing))
	res, err := Run(context.Background(), nb, Options{Dir: t.TempDir()})
	if err != nil {
		t.Fatal(err)
	}
	if len(res.Failures) != 1 {
		t.Fatalf("failures %v", res.Failures)
	}
	f := res.Failures[0]
	if f.Cell != 1 || f.Line != 2 || !strings.Contains(f.String(), "cell 2 (cell-01), line 2, column ") || !strings.Contains(f.String(), "undefined_name") {
		t.Errorf("failure %+v: %s", f, f)
	}
	if !res.NotRun[2] || len(nb.Cells()[2].Outputs()) != 0 {
		t.Errorf("the cell after the failure ran: %v", res.NotRun)
	}
	rep := string(Report(nb, res, ReportInfo{Version: "x", Digest: "d"}))
	if !strings.Contains(rep, "This run failed") || !strings.Contains(rep, "not run: an earlier cell failed") {
		t.Error("the report does not show the failure")
	}

	nb = NewNotebook(SplitScript(failing))
	res, err = Run(context.Background(), nb, Options{Dir: t.TempDir(), KeepGoing: true})
	if err != nil {
		t.Fatal(err)
	}
	if len(res.Failures) != 1 || len(res.NotRun) != 0 {
		t.Fatalf("keep going: failures %v, not run %v", res.Failures, res.NotRun)
	}
	outs := nb.Cells()[2].Outputs()
	if len(outs) != 1 || outs[0]["output_type"] != "execute_result" {
		t.Errorf("keep going: last cell outputs %v", outs)
	}
}

// --set overrides a binding of the parameters cell: the run uses it, the
// notebook shows it in a cell of its own, and the result lists the values.
func TestSetParameters(t *testing.T) {
	src := "# %% parameters\nL = 8\ng = 9.81\n# %%\nsqrt(g / L)\n"
	nb := NewNotebook(SplitScript(src))
	res, err := Run(context.Background(), nb, Options{Set: []string{"L=4"}})
	if err != nil {
		t.Fatal(err)
	}
	cells := nb.Cells()
	if len(cells) != 3 || !cells[1].HasTag(InjectedTag) || cells[1].Source() != "L = 4" {
		t.Fatalf("injected cell: %v", cells[1].m)
	}
	data := cells[2].Outputs()[0]["data"].(map[string]any)
	if got := data["text/plain"]; got != "1.566045976" { // sqrt(9.81/4)
		t.Errorf("result %v", got)
	}
	want := []Param{{"L", "4", true}, {"g", "9.81", false}}
	if len(res.Params) != 2 || res.Params[0] != want[0] || res.Params[1] != want[1] {
		t.Errorf("params %v", res.Params)
	}
	rep := string(Report(nb, res, ReportInfo{Version: "x", Digest: Digest(nb, []string{"L=4"})}))
	if !strings.Contains(rep, "<th>L</th><td><code>4</code></td><td class=\"note\">set on the command line</td>") {
		t.Error("the report does not record the value used")
	}
	// Running the result again with another value replaces the injected cell.
	if _, err := Run(context.Background(), nb, Options{Set: []string{"L=2"}}); err != nil {
		t.Fatal(err)
	}
	if c := nb.Cells(); len(c) != 3 || c[1].Source() != "L = 2" {
		t.Errorf("second run: %d cells, %q", len(c), c[1].Source())
	}
	for _, bad := range []string{"x=1", "L", "L=", "L=1 "} {
		nb := NewNotebook(SplitScript(src))
		_, err := Run(context.Background(), nb, Options{Set: []string{bad, "L=3"}})
		if err == nil && bad != "L=1 " {
			t.Errorf("--set %q: no error", bad)
		}
	}
	if _, err := Run(context.Background(), NewNotebook(SplitScript("a = 1")), Options{Set: []string{"a=2"}}); err == nil ||
		!strings.Contains(err.Error(), "tagged") {
		t.Errorf("no parameters cell: %v", err)
	}
}

// The digest changes with any input and with the overrides, and with
// nothing else.
func TestDigest(t *testing.T) {
	a := Digest(NewNotebook(SplitScript("x = 1")), nil)
	if a != Digest(NewNotebook(SplitScript("x = 1")), nil) {
		t.Error("same input, different digest")
	}
	if a == Digest(NewNotebook(SplitScript("x = 2")), nil) || a == Digest(NewNotebook(SplitScript("x = 1")), []string{"x=1"}) {
		t.Error("different input, same digest")
	}
}

func TestMarkdown(t *testing.T) {
	got := markdown("# Title\n\nSome *it* and **bold** with `a < b`.\n\n- one\n- two\n\n1. first\n2. second\n\n<script>x</script>")
	for _, want := range []string{"<h1>Title</h1>", "<i>it</i>", "<b>bold</b>", "<code>a &lt; b</code>", "<ul>\n<li>one</li>\n<li>two</li></ul>",
		"<ol>\n<li>first</li>\n<li>second</li></ol>", "&lt;script&gt;"} {
		if !strings.Contains(got, want) {
			t.Errorf("markdown lacks %q:\n%s", want, got)
		}
	}
}

// Lists and records of results render rich through both front ends: each
// member with its own HTML.
func TestRecordOfResults(t *testing.T) {
	nb := NewNotebook(SplitScript("G = system([[-1, 0], [0, -2]], [1, 1], [1, 0])\n{plant: G, poles: poles(G), modes: [modes(G)]}"))
	if _, err := Run(context.Background(), nb, Options{}); err != nil {
		t.Fatal(err)
	}
	data := nb.Cells()[0].Outputs()[0]["data"].(map[string]any)
	h, _ := data["text/html"].(string)
	for _, want := range []string{"lsys-members", ">plant</div>", "lsys-system", ">modes</div>"} {
		if !strings.Contains(h, want) {
			t.Errorf("HTML lacks %q", want)
		}
	}
}
