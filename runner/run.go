// Package runner is the headless front end of lsys: it runs a notebook or a
// script through one language session, as the Jupyter kernel would, and
// writes the executed notebook and a standalone HTML report. It uses the
// same session, built-ins and renderers as the kernel, and needs no Jupyter.
package runner

import (
	"context"
	"encoding/json"
	"fmt"
	"io"
	"regexp"
	"sort"
	"strings"
	"time"

	"lsys/display"
	"lsys/lang"
	"lsys/lang/builtins"
	"lsys/lang/syntax"
)

// Options configure a run.
type Options struct {
	Dir       string   // folder load() reads data files from; the notebook's folder
	Set       []string // name=value overrides of the parameters cell, in order
	KeepGoing bool     // run the cells after a failing one
	// Progress, when not nil, receives one line per code cell (the
	// terminal's stderr): long notebooks show where they are.
	Progress io.Writer
	// Limits bound each cell (steps, depth, memory); zero values take the
	// language's defaults.
	Limits lang.Limits
}

// Result says what a run did.
type Result struct {
	Failures []Failure    // cells that failed without being tagged raises-exception
	Params   []Param      // the bindings of the parameters cell, after overrides
	NotRun   map[int]bool // cells (by index) skipped after a failure
}

// Failure is a cell that failed.
type Failure struct {
	Cell  int    // index of the cell in the notebook (0-based)
	ID    string // the cell's id
	Line  int    // line in the cell, 0 when unknown
	Error string // the message, as the cell's error output shows it
}

func (f Failure) String() string {
	where := fmt.Sprintf("cell %d", f.Cell+1)
	if f.ID != "" {
		where += " (" + f.ID + ")"
	}
	head, _, _ := strings.Cut(f.Error, "\n")
	if strings.HasPrefix(head, "line ") {
		return where + ", " + head // the message names line and column
	}
	if f.Line > 0 {
		where += fmt.Sprintf(", line %d", f.Line)
	}
	return where + ": " + head
}

// Param is one binding of the parameters cell as the run used it.
type Param struct {
	Name  string
	Value string // the value's text
	Set   bool   // given on the command line
}

// ParametersTag marks the cell whose bindings --set overrides;
// InjectedTag marks the cell lsys run adds after it with the overrides.
const (
	ParametersTag = "parameters"
	InjectedTag   = "injected-parameters"
	errorsTag     = "raises-exception"
)

// Run executes the notebook's code cells in order, replacing their outputs
// and execution counts as a Jupyter front end would, and sets the
// notebook's language_info. A cell that fails stops the run unless it is
// tagged raises-exception or opt.KeepGoing is set; the cells not run then
// lose their stale outputs. err is for problems with the options (an
// unknown parameter); failing cells are in the Result.
func Run(ctx context.Context, nb *Notebook, opt Options) (*Result, error) {
	s := lang.NewSession(lang.Options{Dir: opt.Dir, Text: display.TextOf, Builtins: builtins.Registry(), Limits: opt.Limits})
	res := &Result{NotRun: map[int]bool{}}
	sets, err := parseSets(opt.Set)
	if err != nil {
		return nil, err
	}
	paramIdx := -1
	for i, c := range nb.Cells() {
		if c.HasTag(InjectedTag) {
			nb.RemoveCell(i) // a previous run's overrides; this run brings its own
			break
		}
	}
	for i, c := range nb.Cells() {
		if c.Type() == "code" && c.HasTag(ParametersTag) {
			paramIdx = i
			break
		}
	}
	var paramNames []string
	if paramIdx >= 0 {
		paramNames = boundNames(nb.Cells()[paramIdx].Source())
	}
	if len(sets) > 0 {
		if paramIdx < 0 {
			return nil, fmt.Errorf("--set needs a code cell tagged %q whose bindings it overrides; the notebook has none (tag the cell in Jupyter: View > Cell Toolbar > Tags, or begin it with '# %%%% parameters' in a script)", ParametersTag)
		}
		var lines []string
		for _, kv := range sets {
			if !contains(paramNames, kv[0]) {
				return nil, fmt.Errorf("--set %s: the parameters cell binds %s, not %s", kv[0], strings.Join(paramNames, ", "), kv[0])
			}
			lines = append(lines, kv[0]+" = "+kv[1])
		}
		nb.InsertCell(paramIdx+1, "injected-parameters", strings.Join(lines, "\n"), []string{InjectedTag})
	}
	nb.Metadata()["language_info"] = jsonTree(lang.LanguageInfo())

	cells := nb.Cells()
	total := 0
	for _, c := range cells {
		if runnable(c) {
			total++
		}
	}
	count := 0
	ids := &displayIDs{m: map[string][]outRef{}}
	stopped := false
	for i, c := range cells {
		if !runnable(c) {
			continue
		}
		if stopped {
			c.m["outputs"] = []any{}
			c.m["execution_count"] = nil
			res.NotRun[i] = true
			continue
		}
		count++
		start := time.Now()
		if opt.Progress != nil {
			fmt.Fprintf(opt.Progress, "lsys run: [%d/%d] cell %d%s: ", count, total, i+1, idNote(c))
		}
		out := &collector{cell: i, c: c, ids: ids, nb: nb}
		c.m["outputs"] = []any{}
		c.m["execution_count"] = json.Number(fmt.Sprint(count))
		value, err := s.Run(ctx, c.Source(), out)
		if err != nil {
			kind, head, lines := lang.Describe(err)
			tb := make([]any, len(lines))
			for j, l := range lines {
				tb[j] = l
			}
			out.add(map[string]any{"output_type": "error", "ename": kind, "evalue": head, "traceback": tb})
			if !c.HasTag(errorsTag) {
				res.Failures = append(res.Failures, Failure{Cell: i, ID: c.ID(), Line: lineOf(err), Error: err.Error()})
				stopped = !opt.KeepGoing
			}
		} else if value != nil {
			b := render(value)
			out.add(map[string]any{"output_type": "execute_result", "execution_count": json.Number(fmt.Sprint(count)),
				"data": jsonTree(b.Data), "metadata": jsonTree(b.Metadata)})
		}
		if opt.Progress != nil {
			status := "ok"
			if err != nil {
				status = "error"
				if c.HasTag(errorsTag) {
					status = "error (expected)"
				}
			}
			fmt.Fprintf(opt.Progress, "%s, %.1f s\n", status, time.Since(start).Seconds())
		}
		if ctx.Err() != nil {
			stopped = true
		}
	}
	for _, c := range nb.Cells() {
		if c.Type() == "code" {
			coalesceStreams(c)
		}
	}
	if paramIdx >= 0 {
		set := map[string]bool{}
		for _, kv := range sets {
			set[kv[0]] = true
		}
		for _, n := range paramNames {
			v, _ := s.Get(n)
			res.Params = append(res.Params, Param{Name: n, Value: s.Format(v), Set: set[n]})
		}
	}
	return res, nil
}

func lineOf(err error) int {
	if p, ok := syntax.Position(err); ok {
		return p.Line
	}
	return 0
}

func runnable(c Cell) bool { return c.Type() == "code" && strings.TrimSpace(c.Source()) != "" }

func idNote(c Cell) string {
	if c.ID() == "" {
		return ""
	}
	return " (" + c.ID() + ")"
}

var setRE = regexp.MustCompile(`^([A-Za-z_][A-Za-z_0-9]*)=(.*)$`)

// parseSets splits name=value arguments; value is an expression of the
// language (a number, "text", a list).
func parseSets(args []string) ([][2]string, error) {
	var out [][2]string
	seen := map[string]bool{}
	for _, a := range args {
		m := setRE.FindStringSubmatch(a)
		if m == nil || strings.TrimSpace(m[2]) == "" {
			return nil, fmt.Errorf("--set %q: write name=value, e.g. --set L=12 or --set 'mode=\"fast\"'", a)
		}
		if seen[m[1]] {
			return nil, fmt.Errorf("--set %s is given twice", m[1])
		}
		seen[m[1]] = true
		out = append(out, [2]string{m[1], strings.TrimSpace(m[2])})
	}
	return out, nil
}

// boundNames lists the names a cell binds at its top level, in order.
func boundNames(src string) []string {
	stmts, err := syntax.ParseCell(src)
	if err != nil {
		return nil
	}
	var names []string
	for _, st := range stmts {
		if a, ok := st.(*syntax.AssignStmt); ok && !contains(names, a.Name.Name) {
			names = append(names, a.Name.Name)
		}
	}
	return names
}

func contains(l []string, s string) bool {
	for _, x := range l {
		if x == s {
			return true
		}
	}
	return false
}

// render renders a value; a renderer that panics costs only its picture.
func render(v any) display.Bundle {
	b, _ := display.RenderSafe(v, display.Options{})
	return b
}

// jsonTree turns a value into the generic JSON tree a front end receives
// over the wire: what the kernel marshals, read back with numbers kept as
// their text.
func jsonTree(v any) any {
	data, err := json.Marshal(v)
	if err != nil {
		return map[string]any{}
	}
	dec := json.NewDecoder(strings.NewReader(string(data)))
	dec.UseNumber()
	var out any
	if err := dec.Decode(&out); err != nil {
		return map[string]any{}
	}
	return out
}

// outRef is where an output with a display id sits.
type outRef struct{ cell, index int }

// displayIDs maps display ids to their outputs across the notebook, as a
// Jupyter front end keeps them for update_display_data.
type displayIDs struct {
	m map[string][]outRef
}

// collector is the lang.Output of one cell: it appends outputs as a
// notebook front end stores them (streams one by one, displays with their
// display ids updated in place, clear_output honoured).
type collector struct {
	nb        *Notebook
	c         Cell
	cell      int
	ids       *displayIDs
	clearNext bool
}

func (o *collector) outputs() []any { l, _ := o.c.m["outputs"].([]any); return l }

func (o *collector) add(out map[string]any) {
	o.addWithID(out, "")
}

func (o *collector) addWithID(out map[string]any, id string) {
	if o.clearNext {
		o.clear()
		o.clearNext = false
	}
	if id != "" {
		o.ids.m[id] = append(o.ids.m[id], outRef{o.cell, len(o.outputs())})
	}
	o.c.m["outputs"] = append(o.outputs(), out)
}

func (o *collector) clear() {
	o.c.m["outputs"] = []any{}
	for id, refs := range o.ids.m {
		kept := refs[:0]
		for _, r := range refs {
			if r.cell != o.cell {
				kept = append(kept, r)
			}
		}
		o.ids.m[id] = kept
	}
}

func (o *collector) Stdout(text string) { o.stream("stdout", text) }
func (o *collector) Stderr(text string) { o.stream("stderr", text) }

func (o *collector) stream(name, text string) {
	if text == "" {
		return
	}
	o.add(map[string]any{"output_type": "stream", "name": name, "text": text})
}

func (o *collector) Display(v any, id string) {
	b := render(v)
	data, md := jsonTree(b.Data), jsonTree(b.Metadata)
	if id != "" {
		o.update(id, data, md)
	}
	o.addWithID(map[string]any{"output_type": "display_data", "data": data, "metadata": md}, id)
}

func (o *collector) UpdateDisplay(v any, id string) {
	if id == "" {
		return
	}
	b := render(v)
	o.update(id, jsonTree(b.Data), jsonTree(b.Metadata))
}

// update replaces the data of every output shown under id.
func (o *collector) update(id string, data, md any) {
	cells := o.nb.Cells()
	refs := append([]outRef(nil), o.ids.m[id]...)
	sort.Slice(refs, func(i, j int) bool { return refs[i].cell < refs[j].cell })
	for _, r := range refs {
		outs, _ := cells[r.cell].m["outputs"].([]any)
		if r.index < len(outs) {
			m := outs[r.index].(map[string]any)
			m["data"], m["metadata"] = data, md
		}
	}
}

func (o *collector) ClearOutput(wait bool) {
	if wait {
		o.clearNext = true
		return
	}
	o.clear()
}

// coalesceStreams merges consecutive outputs of one stream and drops text
// that a carriage return overwrote, as Jupyter's notebook export does after
// a run (its coalesce_streams step).
func coalesceStreams(c Cell) {
	outs, _ := c.m["outputs"].([]any)
	if len(outs) == 0 {
		return
	}
	merged := []any{outs[0]}
	for _, o := range outs[1:] {
		last := merged[len(merged)-1].(map[string]any)
		om := o.(map[string]any)
		if om["output_type"] == "stream" && last["output_type"] == "stream" && last["name"] == om["name"] {
			last["text"] = last["text"].(string) + om["text"].(string)
			continue
		}
		merged = append(merged, o)
	}
	for _, o := range merged {
		om := o.(map[string]any)
		if text, ok := om["text"].(string); ok && om["output_type"] == "stream" && strings.Contains(text, "\r") {
			om["text"] = dropOverwritten(text)
		}
	}
	c.m["outputs"] = merged
}

// dropOverwritten removes, on each line, the text up to the last carriage
// return that has more text after it (what a terminal would overwrite).
func dropOverwritten(text string) string {
	segs := strings.Split(text, "\n")
	for i, seg := range segs {
		if j := strings.LastIndexByte(seg[:max(0, len(seg)-1)], '\r'); j >= 0 {
			segs[i] = seg[j+1:]
		}
	}
	return strings.Join(segs, "\n")
}
