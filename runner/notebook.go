package runner

import (
	"bytes"
	"encoding/json"
	"fmt"
	"math"
	"sort"
	"strconv"
	"strings"
	"unicode/utf8"
)

// A notebook is kept as the generic JSON tree it was read as, so fields this
// package does not know (attachments, other tools' metadata) survive a run
// untouched. Multi-line strings are joined on reading and split again on
// writing, as nbformat does.

// Notebook is an nbformat 4 notebook.
type Notebook struct {
	tree map[string]any
}

// Cell is one cell of a notebook, a view into its tree.
type Cell struct {
	m map[string]any
}

// ReadNotebook parses an nbformat 4 notebook.
func ReadNotebook(data []byte) (*Notebook, error) {
	dec := json.NewDecoder(bytes.NewReader(data))
	dec.UseNumber() // numbers keep their text: 1 stays an integer, 1.0 a float
	var tree map[string]any
	if err := dec.Decode(&tree); err != nil {
		return nil, fmt.Errorf("not a notebook (JSON): %w", err)
	}
	if n, _ := tree["nbformat"].(json.Number); n.String() != "4" {
		return nil, fmt.Errorf("nbformat is %v; lsys run reads version 4 notebooks (Jupyter's current format)", tree["nbformat"])
	}
	cells, ok := tree["cells"].([]any)
	if !ok {
		return nil, fmt.Errorf("the notebook has no list of cells")
	}
	for i, c := range cells {
		m, ok := c.(map[string]any)
		if !ok {
			return nil, fmt.Errorf("cell %d is not an object", i+1)
		}
		joinLines(m, "source")
		if outs, ok := m["outputs"].([]any); ok {
			for _, o := range outs {
				om, _ := o.(map[string]any)
				joinLines(om, "text")
				if data, ok := om["data"].(map[string]any); ok {
					for k := range data {
						if splitMIME(k) {
							joinLines(data, k)
						}
					}
				}
			}
		}
	}
	if _, ok := tree["metadata"].(map[string]any); !ok {
		tree["metadata"] = map[string]any{}
	}
	return &Notebook{tree: tree}, nil
}

func joinLines(m map[string]any, key string) {
	if m == nil {
		return
	}
	if l, ok := m[key].([]any); ok {
		var b strings.Builder
		for _, s := range l {
			str, _ := s.(string)
			b.WriteString(str)
		}
		m[key] = b.String()
	}
}

// splitMIME says which output data nbformat stores as a list of lines.
func splitMIME(mime string) bool {
	return strings.HasPrefix(mime, "text/") || mime == "image/svg+xml" || mime == "application/javascript"
}

// ScriptCell is one cell of a script.
type ScriptCell struct {
	Source string
	Tags   []string
}

// SplitScript cuts an lsys script into cells at lines "# %%"; words after
// the marker are the cell's tags ("# %% parameters" marks the cell that
// --set overrides). A script without markers is one cell.
func SplitScript(src string) []ScriptCell {
	var cells []ScriptCell
	cur := ScriptCell{}
	var lines []string
	flush := func() {
		text := strings.Trim(strings.Join(lines, "\n"), "\n")
		if text != "" || len(cur.Tags) > 0 {
			cur.Source = text
			cells = append(cells, cur)
		}
	}
	for _, line := range strings.Split(strings.ReplaceAll(src, "\r\n", "\n"), "\n") {
		if rest, ok := strings.CutPrefix(strings.TrimSpace(line), "# %%"); ok {
			flush()
			cur, lines = ScriptCell{Tags: strings.Fields(rest)}, nil
			continue
		}
		lines = append(lines, line)
	}
	flush()
	return cells
}

// NewNotebook makes a notebook of code cells (from a script).
func NewNotebook(cells []ScriptCell) *Notebook {
	list := make([]any, len(cells))
	for i, c := range cells {
		tags := make([]any, len(c.Tags))
		for j, t := range c.Tags {
			tags[j] = t
		}
		md := map[string]any{}
		if len(tags) > 0 {
			md["tags"] = tags
		}
		list[i] = map[string]any{
			"cell_type": "code", "id": fmt.Sprintf("cell-%02d", i), "metadata": md,
			"source": c.Source, "outputs": []any{}, "execution_count": nil,
		}
	}
	return &Notebook{tree: map[string]any{
		"cells": list,
		"metadata": map[string]any{
			// The kernel's registration (lsys kernelspec), so Jupyter opens the result with lsys.
			"kernelspec": map[string]any{"display_name": "lsys (linear systems)", "language": "lsys", "name": "lsys"},
		},
		"nbformat": json.Number("4"), "nbformat_minor": json.Number("5"),
	}}
}

// Cells lists the cells.
func (nb *Notebook) Cells() []Cell {
	l, _ := nb.tree["cells"].([]any)
	out := make([]Cell, len(l))
	for i, c := range l {
		out[i] = Cell{c.(map[string]any)}
	}
	return out
}

// InsertCell puts a new code cell at index i.
func (nb *Notebook) InsertCell(i int, id, source string, tags []string) Cell {
	l, _ := nb.tree["cells"].([]any)
	t := make([]any, len(tags))
	for j, s := range tags {
		t[j] = s
	}
	m := map[string]any{"cell_type": "code", "id": id, "metadata": map[string]any{"tags": t},
		"source": source, "outputs": []any{}, "execution_count": nil}
	l = append(l[:i], append([]any{m}, l[i:]...)...)
	nb.tree["cells"] = l
	return Cell{m}
}

// RemoveCell drops the cell at index i.
func (nb *Notebook) RemoveCell(i int) {
	l, _ := nb.tree["cells"].([]any)
	nb.tree["cells"] = append(l[:i], l[i+1:]...)
}

// Metadata is the notebook's metadata object.
func (nb *Notebook) Metadata() map[string]any { return nb.tree["metadata"].(map[string]any) }

// Type is "code", "markdown" or "raw".
func (c Cell) Type() string { s, _ := c.m["cell_type"].(string); return s }

// Source is the cell's text.
func (c Cell) Source() string { s, _ := c.m["source"].(string); return s }

// ID is the cell's id ("" in notebooks older than nbformat 4.5).
func (c Cell) ID() string { s, _ := c.m["id"].(string); return s }

// Tags are the cell's metadata tags.
func (c Cell) Tags() []string {
	md, _ := c.m["metadata"].(map[string]any)
	l, _ := md["tags"].([]any)
	var out []string
	for _, t := range l {
		if s, ok := t.(string); ok {
			out = append(out, s)
		}
	}
	return out
}

// HasTag says whether the cell carries tag.
func (c Cell) HasTag(tag string) bool {
	for _, t := range c.Tags() {
		if t == tag {
			return true
		}
	}
	return false
}

// Outputs are the cell's outputs (code cells).
func (c Cell) Outputs() []map[string]any {
	l, _ := c.m["outputs"].([]any)
	out := make([]map[string]any, 0, len(l))
	for _, o := range l {
		if m, ok := o.(map[string]any); ok {
			out = append(out, m)
		}
	}
	return out
}

// ExecutionCount is the cell's execution count, 0 when it has none.
func (c Cell) ExecutionCount() int {
	n, _ := c.m["execution_count"].(json.Number)
	i, _ := strconv.Atoi(n.String())
	return i
}

// Encode writes the notebook as nbformat writes it (json.dumps with
// sort_keys, indent 1, ensure_ascii off, multi-line strings split into
// lines, a final newline), so a notebook run here is byte for byte the one
// a Jupyter front end stores.
func (nb *Notebook) Encode() []byte {
	var b bytes.Buffer
	e := pyEncoder{b: &b}
	e.value(splitForWrite(nb.tree, ""), 0)
	b.WriteByte('\n')
	return b.Bytes()
}

// splitForWrite copies the tree with the strings nbformat splits into lines
// split (source; stream text; text/*, SVG and JavaScript output data).
func splitForWrite(v any, key string) any {
	switch x := v.(type) {
	case map[string]any:
		out := make(map[string]any, len(x))
		for k, val := range x {
			out[k] = splitForWrite(val, k)
		}
		if s, ok := out["source"].(string); ok {
			out["source"] = splitLines(s)
		}
		if x["output_type"] == "stream" {
			if s, ok := out["text"].(string); ok {
				out["text"] = splitLines(s)
			}
		}
		if key == "data" {
			for k, val := range out {
				if s, ok := val.(string); ok && splitMIME(k) {
					out[k] = splitLines(s)
				}
			}
		}
		return out
	case []any:
		out := make([]any, len(x))
		for i, val := range x {
			out[i] = splitForWrite(val, "")
		}
		return out
	}
	return v
}

// splitLines is Python's str.splitlines(keepends=True): the line ends it
// knows are \n, \r, \r\n, \v, \f, \x1c-\x1e, \x85, U+2028 and U+2029.
func splitLines(s string) []any {
	out := []any{}
	start := 0
	for i := 0; i < len(s); {
		r, n := utf8.DecodeRuneInString(s[i:])
		end := -1
		switch r {
		case '\n', '\v', '\f', 0x1c, 0x1d, 0x1e, 0x85, 0x2028, 0x2029:
			end = i + n
		case '\r':
			end = i + n
			if end < len(s) && s[end] == '\n' {
				end++
			}
		}
		if end < 0 {
			i += n
			continue
		}
		out = append(out, s[start:end])
		start, i = end, end
	}
	if start < len(s) {
		out = append(out, s[start:])
	}
	return out
}

// pyEncoder writes JSON as Python's json.dumps(indent=1, sort_keys=True,
// ensure_ascii=False, separators=(",", ": ")).
type pyEncoder struct{ b *bytes.Buffer }

func (e pyEncoder) indent(n int) {
	e.b.WriteByte('\n')
	for i := 0; i < n; i++ {
		e.b.WriteByte(' ')
	}
}

func (e pyEncoder) value(v any, depth int) {
	switch x := v.(type) {
	case nil:
		e.b.WriteString("null")
	case bool:
		e.b.WriteString(strconv.FormatBool(x))
	case string:
		e.str(x)
	case json.Number:
		e.number(x.String())
	case float64:
		e.b.WriteString(pyFloat(x))
	case int:
		e.b.WriteString(strconv.Itoa(x))
	case []any:
		if len(x) == 0 {
			e.b.WriteString("[]")
			return
		}
		e.b.WriteByte('[')
		for i, it := range x {
			if i > 0 {
				e.b.WriteByte(',')
			}
			e.indent(depth + 1)
			e.value(it, depth+1)
		}
		e.indent(depth)
		e.b.WriteByte(']')
	case map[string]any:
		if len(x) == 0 {
			e.b.WriteString("{}")
			return
		}
		keys := make([]string, 0, len(x))
		for k := range x {
			keys = append(keys, k)
		}
		sort.Strings(keys) // byte order of UTF-8 is code point order, as Python sorts
		e.b.WriteByte('{')
		for i, k := range keys {
			if i > 0 {
				e.b.WriteByte(',')
			}
			e.indent(depth + 1)
			e.str(k)
			e.b.WriteString(": ")
			e.value(x[k], depth+1)
		}
		e.indent(depth)
		e.b.WriteByte('}')
	default:
		panic(fmt.Sprintf("runner: cannot encode %T in a notebook", v))
	}
}

// number writes a JSON number as Python would after reading it: integers
// as they are, floats in Python's shortest repr.
func (e pyEncoder) number(s string) {
	if !strings.ContainsAny(s, ".eE") {
		if strings.Trim(s, "-0") == "" {
			s = "0" // Python reads -0 as the integer 0
		}
		e.b.WriteString(s)
		return
	}
	f, err := strconv.ParseFloat(s, 64)
	if err != nil {
		e.b.WriteString(s)
		return
	}
	e.b.WriteString(pyFloat(f))
}

// pyFloat is Python's repr of a float: the shortest digits that read back
// exactly, positional for decimal exponents -4 <= exp < 16, else
// scientific with a signed two-digit exponent; integral values keep ".0".
func pyFloat(f float64) string {
	switch {
	case math.IsNaN(f):
		return "NaN"
	case math.IsInf(f, 1):
		return "Infinity"
	case math.IsInf(f, -1):
		return "-Infinity"
	}
	sci := strconv.FormatFloat(f, 'e', -1, 64) // d.ddde±XX
	mant, expStr, _ := strings.Cut(sci, "e")
	exp, _ := strconv.Atoi(expStr)
	if exp < -4 || exp >= 16 {
		sign := "+"
		if exp < 0 {
			sign, exp = "-", -exp
		}
		return fmt.Sprintf("%se%s%02d", mant, sign, exp)
	}
	s := strconv.FormatFloat(f, 'f', -1, 64)
	if !strings.ContainsAny(s, ".") {
		s += ".0"
	}
	return s
}

func (e pyEncoder) str(s string) {
	b := e.b
	b.WriteByte('"')
	for _, r := range s {
		switch r {
		case '"':
			b.WriteString(`\"`)
		case '\\':
			b.WriteString(`\\`)
		case '\n':
			b.WriteString(`\n`)
		case '\r':
			b.WriteString(`\r`)
		case '\t':
			b.WriteString(`\t`)
		case '\b':
			b.WriteString(`\b`)
		case '\f':
			b.WriteString(`\f`)
		default:
			if r < 0x20 {
				fmt.Fprintf(b, `\u%04x`, r)
			} else {
				b.WriteRune(r)
			}
		}
	}
	b.WriteByte('"')
}
