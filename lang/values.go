package lang

import (
	"fmt"
	"reflect"
	"strconv"
	"strings"
	"unicode"

	"gonum.org/v1/gonum/mat"

	"lsys/lang/syntax"
	"lsys/lsys"
	"lsys/lsys/numfmt"
)

// Values handed out by the language are plain Go values where one fits:
// float64, complex128, bool, string, *mat.Dense (real vectors are n x 1),
// *mat.CDense (complex matrices), and lsys's own types (*lsys.System,
// *lsys.ModeTable, *lsys.Rational, ...). The language-only values below
// implement fmt.Stringer so any front end can show them as text.

// Record is {name: value, ...}; fields keep the order they were written in.
type Record struct {
	Names  []string
	Values []any
}

// Get returns the value of field name.
func (r *Record) Get(name string) (any, bool) {
	for i, n := range r.Names {
		if n == name {
			return r.Values[i], true
		}
	}
	return nil, false
}

func (r *Record) String() string { return r.TextWith(nil) }

// Members returns the field names and values, so a front end's renderer
// can show each member with its own display.
func (r *Record) Members() (names []string, values []any) { return r.Names, r.Values }

// TextWith is the record's text form with text formatting the members the
// language does not format itself; package display calls it with its own
// text renderer, so a record of results shows each result's text.
func (r *Record) TextWith(text func(any) (string, bool)) string {
	var b strings.Builder
	b.WriteByte('{')
	for i, n := range r.Names {
		if i > 0 {
			b.WriteString(", ")
		}
		b.WriteString(n)
		b.WriteString(": ")
		b.WriteString(inlineString(r.Values[i], text))
	}
	b.WriteByte('}')
	return b.String()
}

// List is a list of values that is not a numeric vector or matrix: names,
// systems, rows of transfer functions, records.
type List struct {
	Items []any
}

func (l *List) String() string { return l.TextWith(nil) }

// Members returns the items (names is nil for a list).
func (l *List) Members() (names []string, values []any) { return nil, l.Items }

// TextWith is the list's text form; see Record.TextWith.
func (l *List) TextWith(text func(any) (string, bool)) string {
	var b strings.Builder
	b.WriteByte('[')
	for i, v := range l.Items {
		if i > 0 {
			b.WriteString(", ")
		}
		b.WriteString(inlineString(v, text))
	}
	b.WriteByte(']')
	return b.String()
}

// Function is a user function f(a, b) = body.
type Function struct {
	Name   string
	Params []string
	Body   syntax.Expr
	src    string // the cell it was defined in, for error messages
}

func (f *Function) String() string {
	return fmt.Sprintf("%s(%s) = %s", f.Name, strings.Join(f.Params, ", "), syntax.ExprString(f.Body))
}

// FormatNumber writes a real number with up to 10 significant digits.
func FormatNumber(v float64) string { return numfmt.Number(v) }

// FormatComplex writes a + bj (or a - bj).
func FormatComplex(c complex128) string { return numfmt.Complex(c) }

// inlineString is the one-line form of a value, used inside lists and records.
func inlineString(v any, text func(any) (string, bool)) string {
	switch x := v.(type) {
	case string:
		return syntax.Quote(x)
	case *mat.Dense:
		r, c := x.Dims()
		if c == 1 && r <= 8 {
			parts := make([]string, r)
			for i := range parts {
				parts[i] = FormatNumber(x.At(i, 0))
			}
			return "[" + strings.Join(parts, ", ") + "]"
		}
		return fmt.Sprintf("(%dx%d matrix)", r, c)
	case *lsys.System:
		return "(" + systemSummary(x) + ")"
	}
	return formatValue(v, text)
}

// FormatValue is the language's own text form of any value; analysis
// results show as "(a mode table; show(x) displays it)". Session.Format
// shows them with the session's text option instead.
func FormatValue(v any) string { return formatValue(v, nil) }

func formatValue(v any, text func(any) (string, bool)) string {
	switch x := v.(type) {
	case nil:
		return "(nothing)"
	case float64:
		return FormatNumber(x)
	case complex128:
		return FormatComplex(x)
	case bool:
		return strconv.FormatBool(x)
	case string:
		return x
	case *mat.Dense:
		return formatMatrix(x.Dims, func(i, j int) string { return FormatNumber(x.At(i, j)) })
	case *mat.CDense:
		return formatMatrix(x.Dims, func(i, j int) string { return FormatComplex(x.At(i, j)) })
	case *lsys.System:
		return systemText(x)
	case *Builtin:
		return "built-in " + x.Signature()
	case *Record:
		return x.TextWith(text)
	case *List:
		return x.TextWith(text)
	case fmt.Stringer:
		return x.String()
	}
	if text != nil {
		if t, ok := text(v); ok {
			return t
		}
	}
	return "(" + fallbackTypeName(v) + "; show(x) displays it)"
}

func formatMatrix(dims func() (int, int), at func(i, j int) string) string {
	r, c := dims()
	cells := make([][]string, r)
	for i := range cells {
		cells[i] = make([]string, c)
		for j := range cells[i] {
			cells[i][j] = at(i, j)
		}
	}
	return strings.TrimSuffix(numfmt.Columns(cells, "", 0), "\n")
}

// Plural is "1 state", "2 states".
func Plural(n int, word string) string {
	if n == 1 {
		return fmt.Sprintf("%d %s", n, word)
	}
	return fmt.Sprintf("%d %ss", n, word)
}

// systemSummary is a one-line description of a system.
func systemSummary(g *lsys.System) string {
	kind := "continuous"
	if g.Ts > 0 {
		kind = "sampled every " + FormatNumber(g.Ts) + " s"
	}
	return fmt.Sprintf("system: %s, %s, %s, %s", Plural(g.N(), "state"), Plural(g.M(), "input"), Plural(g.P(), "output"), kind)
}

// systemText is the source that rebuilds the system (numfmt.Source, the
// same as display's text form) under a comment line with its sizes; when
// there is none (no outputs, or too large), its signal names.
func systemText(g *lsys.System) string {
	at := func(a *mat.Dense) func(i, j int) float64 {
		return func(i, j int) float64 { return a.At(i, j) }
	}
	src := numfmt.Source(numfmt.SystemForm{States: g.StateNames, Inputs: g.InputNames, Outputs: g.OutputNames,
		A: at(g.A), B: at(g.B), C: at(g.C), D: at(g.D), Every: g.Ts})
	if src != "" {
		return "# " + systemSummary(g) + "\n" + src
	}
	var b strings.Builder
	b.WriteString("# " + systemSummary(g))
	if g.N() > 0 {
		fmt.Fprintf(&b, "\n#   states:  %s", strings.Join(g.StateNames, ", "))
	}
	if g.M() > 0 {
		fmt.Fprintf(&b, "\n#   inputs:  %s", strings.Join(g.InputNames, ", "))
	}
	if g.P() > 0 {
		fmt.Fprintf(&b, "\n#   outputs: %s", strings.Join(g.OutputNames, ", "))
	}
	b.WriteString("\n#   (read the matrices as G.A, G.B, G.C, G.D)")
	return b.String()
}

// fallbackTypeName names v without a registry: the language's own types,
// else words from its Go type name. Session.Format names results with the
// session's registry before it comes to this.
func fallbackTypeName(v any) string {
	if n, ok := builtinTypeName(v); ok {
		return n
	}
	return wordsOfType(v)
}

// builtinTypeName names the language's own kinds of value and the lsys
// types it builds itself; ok is false for any other type.
func builtinTypeName(v any) (string, bool) {
	switch x := v.(type) {
	case nil:
		return "nothing", true
	case float64:
		return "a number", true
	case complex128:
		return "a complex number", true
	case bool:
		return "a boolean", true
	case string:
		return "a string", true
	case *mat.Dense:
		r, c := x.Dims()
		if c == 1 {
			return fmt.Sprintf("a vector of %d", r), true
		}
		return fmt.Sprintf("a %dx%d matrix", r, c), true
	case *mat.CDense:
		r, c := x.Dims()
		if c == 1 {
			return fmt.Sprintf("a complex vector of %d", r), true
		}
		return fmt.Sprintf("a complex %dx%d matrix", r, c), true
	case *Record:
		return "a record", true
	case *List:
		return fmt.Sprintf("a list of %d", len(x.Items)), true
	case *Function:
		return "a function", true
	case *Builtin:
		return "a built-in function", true
	case *lsys.System:
		return "a system", true
	case *lsys.Rational:
		return "a transfer function", true
	case *lsys.ModeTable:
		return "a mode table", true
	case *lsys.Model:
		return "a nonlinear model", true
	}
	return "", false
}

// wordsOfType names a value whose type no registry describes (Registry.AddType)
// in words taken from its Go type name (lsys.PoleZeroMap -> "a result: pole
// zero map"), so that no Go syntax reaches a message.
func wordsOfType(v any) string {
	t := reflect.TypeOf(v)
	for t.Kind() == reflect.Pointer || t.Kind() == reflect.Slice {
		t = t.Elem()
	}
	name := t.Name()
	var b strings.Builder
	for i, r := range name {
		if unicode.IsUpper(r) && i > 0 {
			b.WriteByte(' ')
		}
		b.WriteRune(unicode.ToLower(r))
	}
	if b.Len() == 0 {
		return "a value of another kind"
	}
	return "a result (" + b.String() + ")"
}

// The one conversion of result slices to language values: a column vector,
// or an empty list when there is nothing (no zeros, no crossovers), so an
// empty result prints as [] and has length 0 whatever built-in made it.

// RealVector is a real column vector.
func RealVector(vals []float64) any {
	if len(vals) == 0 {
		return &List{}
	}
	return mat.NewDense(len(vals), 1, append([]float64(nil), vals...))
}

// IntVector is a column vector of whole numbers.
func IntVector(vals []int) any {
	f := make([]float64, len(vals))
	for i, v := range vals {
		f[i] = float64(v)
	}
	return RealVector(f)
}

// ComplexVector is a column vector of complex values: a real vector when
// every imaginary part is zero.
func ComplexVector(vals []complex128) any {
	if len(vals) == 0 {
		return &List{}
	}
	allReal := true
	for _, v := range vals {
		if imag(v) != 0 {
			allReal = false
		}
	}
	if allReal {
		m := mat.NewDense(len(vals), 1, nil)
		for i, v := range vals {
			m.Set(i, 0, real(v))
		}
		return m
	}
	return mat.NewCDense(len(vals), 1, append([]complex128(nil), vals...))
}
