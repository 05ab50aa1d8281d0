package lang

// The one registry of built-in functions.
//
// Every built-in of the language is a *Builtin in this registry. The same
// entry drives evaluation (Fn), tab completion (Name, Params), inspection
// (Signature, Help, Doc, Examples) and the language reference in the README
// (Reference). There is no second list anywhere.
//
// # Adding built-ins from your own file
//
// Engineers who own a part of the library add their built-ins in a file of
// their own in this package, e.g. lang/builtins_structure.go, without
// touching any other file:
//
//	package lang
//
//	func init() {
//		Register(&Builtin{
//			Name:  "poles",
//			Group: GroupAnalysis,
//			Params: []Param{
//				{Name: "system", Doc: "a system, transfer function or linear equation block"},
//			},
//			Help:     "The poles of a system (eigenvalues of A).",
//			Doc:      "Longer explanation, the method and its paper, tolerances...",
//			Examples: []string{"G = system([[0, 1], [-2, -3]], [0, 1], [1, 0])\npoles(G)"},
//			Fn: func(c *Call) (any, error) {
//				g, err := c.System("system")
//				if err != nil {
//					return nil, err
//				}
//				return lsys.Poles(g)
//			},
//		})
//	}
//
// Rules:
//   - Names are plain English words of the trade, lower case.
//   - Every example must run (TestRegistryExamples runs them all) and every
//     built-in needs at least one test of its own.
//   - Read arguments in one step with c.Bind("system", &g, "tol", &tol):
//     the variable's type says what the argument must be, and an optional
//     argument that was not written leaves its variable (the default) as it
//     was. One argument may also be read with its typed getter (c.System).
//   - Fn must not panic on user input (a panic is still caught and reported
//     as an error at the call, but that is a bug). Return errors: Bind, the
//     Call helpers (c.Float, c.System, c.Errorf, ...) return errors that
//     point at the offending argument; any other error is reported at the
//     call, prefixed with the built-in's name (so lsys's errors carry none).
//   - Long loops call c.Check() (cancellation, step budget) and may show
//     progress with c.Progress.
//   - Go types handed out that the language should know by name (for
//     messages) or whose fields r.name reads are described with
//     RegisterType, also from an init function in your file. Its field list
//     serves evaluation, completion, inspection and the "did you mean" of
//     errors alike (fieldsOf in eval.go is the one field protocol).
//   - Hand out lsys's own result types; numerics (Newton, rank decisions)
//     belong in lsys, their rendering in display.
//   - Named arguments beyond the parameters (locus(f, k: ...)): set AnyNamed
//     and read c.Extra. Variadic last parameters: c.Rest. Files beside the
//     notebook: c.Dir(). Calling a user function: c.Apply(f, args...).
//   - After adding or changing a built-in, regenerate the reference in the
//     README: go test ./lang -run Reference -update.

import (
	"context"
	"errors"
	"fmt"
	"math"
	"math/cmplx"
	"path/filepath"
	"reflect"
	"runtime"
	"sort"
	"strings"
	"sync"

	"gonum.org/v1/gonum/mat"

	"lsys/lang/syntax"
	"lsys/lsys"
)

// Groups order the language reference.
const (
	GroupSystems  = "Describing systems"
	GroupAnalysis = "Modes and structure"
	GroupResponse = "Responses and connections"
	GroupModels   = "Nonlinear models and parameters"
	GroupMatrices = "Matrices"
	GroupMath     = "Numbers and functions"
	GroupOutput   = "Output and data"
)

var groupOrder = []string{GroupSystems, GroupAnalysis, GroupResponse, GroupModels, GroupMatrices, GroupMath, GroupOutput}

// Param is a parameter of a built-in. A parameter is required unless it has
// a Default or is Optional (absent: c.Has reports false).
type Param struct {
	Name     string
	Doc      string
	Default  any  // value used when the argument is not given
	Optional bool // may be left out; no default value
	Variadic bool // last parameter only: takes all remaining positional arguments
}

// Builtin is one built-in function (or constant, when Value is set).
type Builtin struct {
	Name     string
	Group    string
	Params   []Param
	Help     string   // one line
	Doc      string   // longer explanation (Markdown)
	Examples []string // each is a cell that runs
	// AnyNamed lets the call take named arguments that are not parameters
	// (e.g. locus(f, k: values)); they are in c.Extra.
	AnyNamed bool
	// Fn computes the result. For a constant leave Fn nil and set Value.
	Fn    func(c *Call) (any, error)
	Value any

	file string // the Go file that registered it (for tests)
}

// Signature is name(p1, p2: default, ...) as shown by inspect.
func (b *Builtin) Signature() string {
	if b.Fn == nil {
		return b.Name
	}
	parts := make([]string, 0, len(b.Params))
	for _, p := range b.Params {
		switch {
		case p.Variadic:
			parts = append(parts, p.Name+"...")
		case p.Default != nil:
			parts = append(parts, p.Name+": "+inlineString(p.Default, nil))
		case p.Optional:
			parts = append(parts, p.Name+"?")
		default:
			parts = append(parts, p.Name)
		}
	}
	if b.AnyNamed {
		parts = append(parts, "name: values")
	}
	return b.Name + "(" + strings.Join(parts, ", ") + ")"
}

func (b *Builtin) String() string { return "built-in " + b.Signature() }

var (
	regMu    sync.RWMutex
	registry = map[string]*Builtin{}
)

// Register adds b to the registry. It panics at start-up (init) on a
// duplicate name or a malformed entry, so mistakes show in every test run.
func Register(b *Builtin) {
	regMu.Lock()
	defer regMu.Unlock()
	if b.Name == "" || b.Help == "" || len(b.Examples) == 0 {
		panic("lang.Register: " + b.Name + ": Name, Help and at least one example are required")
	}
	if (b.Fn == nil) == (b.Value == nil) {
		panic("lang.Register: " + b.Name + ": set exactly one of Fn and Value")
	}
	if syntax.IsKeyword(b.Name) {
		panic("lang.Register: " + b.Name + " is a keyword")
	}
	if _, dup := registry[b.Name]; dup {
		panic("lang.Register: two built-ins named " + b.Name)
	}
	for i, p := range b.Params {
		if p.Variadic && i != len(b.Params)-1 {
			panic("lang.Register: " + b.Name + ": only the last parameter may be variadic")
		}
	}
	if b.Group == "" {
		b.Group = GroupMath
	}
	// The registering file: Register is called from an init function or a
	// helper in the file that owns the built-in.
	for skip := 1; skip < 4; skip++ {
		if _, file, _, ok := runtime.Caller(skip); ok && !strings.HasSuffix(file, "registry.go") {
			b.file = filepath.Base(file)
			break
		}
	}
	registry[b.Name] = b
}

// Lookup returns the built-in called name.
func Lookup(name string) (*Builtin, bool) {
	regMu.RLock()
	defer regMu.RUnlock()
	b, ok := registry[name]
	return b, ok
}

// Builtins returns all built-ins sorted by name.
func Builtins() []*Builtin {
	regMu.RLock()
	defer regMu.RUnlock()
	out := make([]*Builtin, 0, len(registry))
	for _, b := range registry {
		out = append(out, b)
	}
	sort.Slice(out, func(i, j int) bool { return out[i].Name < out[j].Name })
	return out
}

func builtinNames() []string {
	var names []string
	for _, b := range Builtins() {
		names = append(names, b.Name)
	}
	return names
}

// TypeInfo describes a Go type that built-ins hand out, so the language can
// name it in messages and read its fields with r.name.
type TypeInfo struct {
	Name   string   // for messages: "a step response"
	Fields []string // field names, for completion after '.'
	// FieldNames, when set, lists the fields of one value (names that
	// depend on it, such as an equilibrium's states); else Fields.
	FieldNames func(v any) []string
	// Field returns the named field; ok false when there is none.
	Field func(v any, name string) (value any, ok bool)
}

type typeRegistry struct {
	mu sync.RWMutex
	m  map[reflect.Type]TypeInfo
}

var typeNames = &typeRegistry{m: map[reflect.Type]TypeInfo{}}

// RegisterType describes the type of sample (a typed nil pointer is fine).
func RegisterType(sample any, info TypeInfo) {
	typeNames.mu.Lock()
	defer typeNames.mu.Unlock()
	t := reflect.TypeOf(sample)
	if _, dup := typeNames.m[t]; dup {
		panic("lang.RegisterType: twice for " + t.String())
	}
	typeNames.m[t] = info
}

func (r *typeRegistry) info(v any) (TypeInfo, bool) {
	r.mu.RLock()
	defer r.mu.RUnlock()
	ti, ok := r.m[reflect.TypeOf(v)]
	return ti, ok
}

func (r *typeRegistry) lookup(v any) (string, bool) {
	ti, ok := r.info(v)
	if !ok || ti.Name == "" {
		return "", false
	}
	return ti.Name, true
}

// Call is what a built-in's Fn receives: its arguments bound to the
// parameters, and access to the session's context and output.
type Call struct {
	Builtin *Builtin
	ev      *evaluator
	pos     syntax.Pos // of the call
	vals    []any
	poss    []syntax.Pos
	given   []bool
	// Rest holds the values of a variadic parameter, RestPos their positions.
	Rest    []any
	RestPos []syntax.Pos
	// Extra holds named arguments that are not parameters (AnyNamed only).
	Extra []NamedValue
}

// NamedValue is a named argument.
type NamedValue struct {
	Name     string
	Value    any
	Pos      syntax.Pos // of the name
	ValuePos syntax.Pos // of the value
}

func (c *Call) index(name string) int {
	for i, p := range c.Builtin.Params {
		if p.Name == name {
			return i
		}
	}
	panic("lang: built-in " + c.Builtin.Name + " has no parameter " + name)
}

// Context is the cell's context; long loops check it (or call Check).
func (c *Call) Context() context.Context { return c.ev.ctx }

// Out is the cell's output.
func (c *Call) Out() Output { return c.ev.out }

// Dir is the folder data files are read from (the notebook's folder), for
// built-ins such as load.
func (c *Call) Dir() string { return c.ev.s.dir }

// Format is the text form of v as print shows it in this session.
func (c *Call) Format(v any) string { return c.ev.s.Format(v) }

// Pos is the position of the call.
func (c *Call) Pos() syntax.Pos { return c.pos }

// Check returns an error when the cell was interrupted or ran out of its
// evaluation budget. Call it in long loops.
func (c *Call) Check() error {
	if err := c.ev.ctx.Err(); err != nil {
		return c.ev.interrupted(c.pos, err)
	}
	return c.ev.step(c.pos)
}

// Has reports whether the argument was given (or has a default).
func (c *Call) Has(name string) bool {
	i := c.index(name)
	return c.given[i] || c.Builtin.Params[i].Default != nil
}

// Given reports whether the argument was written in the call.
func (c *Call) Given(name string) bool { return c.given[c.index(name)] }

// Value returns the argument (or its default; nil when absent).
func (c *Call) Value(name string) any {
	i := c.index(name)
	if c.given[i] {
		return c.vals[i]
	}
	return c.Builtin.Params[i].Default
}

// ArgPos returns where the argument was written (the call when defaulted).
func (c *Call) ArgPos(name string) syntax.Pos {
	i := c.index(name)
	if c.given[i] {
		return c.poss[i]
	}
	return c.pos
}

// Errorf returns an error pointing at the argument name (at the call when
// name is "" or the argument was not written). The hint says what to do.
func (c *Call) Errorf(name, hint, format string, args ...any) error {
	pos := c.pos
	if name != "" {
		pos = c.ArgPos(name)
	}
	if hint == "" {
		hint = c.helpHint()
	}
	return c.ev.errorAt(pos, fmt.Sprintf(format, args...), hint)
}

func (c *Call) typeError(name, want string, got any) error {
	return c.Errorf(name, c.helpHint(),
		"%s: the argument '%s' must be %s, not %s", c.Builtin.Name, name, want, typeName(got))
}

func (c *Call) helpHint() string {
	return fmt.Sprintf("Usage: %s. Put the cursor on '%s' and ask for help (shift-tab) for more.", c.Builtin.Signature(), c.Builtin.Name)
}

// Float returns a real-number argument.
func (c *Call) Float(name string) (float64, error) {
	v := c.Value(name)
	switch x := v.(type) {
	case float64:
		return x, nil
	case complex128:
		if imag(x) == 0 {
			return real(x), nil
		}
	}
	return 0, c.typeError(name, "a real number", v)
}

// Int returns a whole-number argument.
func (c *Call) Int(name string) (int, error) {
	f, err := c.Float(name)
	if err != nil {
		return 0, err
	}
	if f != math.Trunc(f) || math.Abs(f) > 1<<31 {
		return 0, c.Errorf(name, c.helpHint(), "%s: the argument '%s' must be a whole number, not %s", c.Builtin.Name, name, FormatNumber(f))
	}
	return int(f), nil
}

// String returns a string argument.
func (c *Call) String(name string) (string, error) {
	v := c.Value(name)
	if s, ok := v.(string); ok {
		return s, nil
	}
	return "", c.typeError(name, "a string", v)
}

// Bool returns a boolean argument.
func (c *Call) Bool(name string) (bool, error) {
	v := c.Value(name)
	if b, ok := v.(bool); ok {
		return b, nil
	}
	return false, c.typeError(name, "true or false", v)
}

// Matrix returns a real matrix argument; a number is a 1x1 matrix.
func (c *Call) Matrix(name string) (*mat.Dense, error) {
	v := c.Value(name)
	switch x := v.(type) {
	case *mat.Dense:
		return x, nil
	case float64:
		return mat.NewDense(1, 1, []float64{x}), nil
	}
	return nil, c.typeError(name, "a real matrix or vector", v)
}

// Strings returns a list of strings ("names"), also accepting one string.
func (c *Call) Strings(name string) ([]string, error) {
	v := c.Value(name)
	switch x := v.(type) {
	case string:
		return []string{x}, nil
	case *List:
		out := make([]string, len(x.Items))
		for i, it := range x.Items {
			s, ok := it.(string)
			if !ok {
				return nil, c.Errorf(name, `Write names as strings: ["k", "b"].`, "%s: item %d of '%s' must be a string, not %s", c.Builtin.Name, i+1, name, typeName(it))
			}
			out[i] = s
		}
		return out, nil
	}
	return nil, c.typeError(name, `a list of names such as ["k", "b"]`, v)
}

// System returns a linear system argument. Transfer functions and transfer
// matrices are realized; a nonlinear model is refused with an error that
// names its first nonlinear term and says to linearize.
func (c *Call) System(name string) (*lsys.System, error) {
	v := c.Value(name)
	g, err := c.ev.toSystem(v, c.ArgPos(name))
	if err != nil {
		return nil, err
	}
	if g == nil {
		return nil, c.typeError(name, "a system", v)
	}
	return g, nil
}

// Bind reads arguments into Go variables in one step, by name:
//
//	var g *lsys.System
//	var from, to float64
//	if err := c.Bind("system", &g, "from", &from, "to", &to); err != nil {
//		return nil, err
//	}
//
// The variable's type says what the argument must be, with the same rules
// and messages as the typed getters: *float64 (a real number), *int (a
// whole number), *string, *bool, **mat.Dense (a real matrix; a number is
// 1x1), *[]string (names; one string is one name), **lsys.System (a
// system; transfer functions are realized), *any (as given). An optional
// argument that was not written and has no default leaves its variable as
// it was, so set defaults before the call.
func (c *Call) Bind(pairs ...any) error {
	if len(pairs)%2 != 0 {
		panic("lang: Bind takes name, pointer pairs")
	}
	for i := 0; i < len(pairs); i += 2 {
		name := pairs[i].(string)
		if !c.Has(name) {
			continue
		}
		var err error
		switch p := pairs[i+1].(type) {
		case *float64:
			*p, err = c.Float(name)
		case *int:
			*p, err = c.Int(name)
		case *string:
			*p, err = c.String(name)
		case *bool:
			*p, err = c.Bool(name)
		case **mat.Dense:
			*p, err = c.Matrix(name)
		case *[]string:
			*p, err = c.Strings(name)
		case **lsys.System:
			*p, err = c.System(name)
		case *any:
			*p = c.Value(name)
		default:
			panic(fmt.Sprintf("lang: Bind cannot fill a %T (argument %s of %s)", p, name, c.Builtin.Name))
		}
		if err != nil {
			return err
		}
	}
	return nil
}

// Apply calls a function value (user function or built-in) with
// positional arguments, as a cell would.
func (c *Call) Apply(f any, args ...any) (any, error) {
	return c.ev.apply(f, args, nil, c.pos)
}

// Progress shows or updates a progress display with a stable id.
func (c *Call) Progress(id string, v any, first bool) {
	if c.ev.out == nil {
		return
	}
	if first {
		c.ev.out.Display(v, id)
	} else {
		c.ev.out.UpdateDisplay(v, id)
	}
}

// wrapErr turns an error returned by a built-in into a positioned one.
func (c *Call) wrapErr(err error) error {
	var e *syntax.Error
	if errors.As(err, &e) {
		return err
	}
	var l syntax.ErrorList
	if errors.As(err, &l) {
		return err
	}
	if errors.Is(err, context.Canceled) || errors.Is(err, context.DeadlineExceeded) {
		return c.ev.interrupted(c.pos, err)
	}
	hint := c.helpHint()
	var se *lsys.ShapeError
	if errors.As(err, &se) {
		hint = "Check the sizes of the matrices. " + hint
	}
	msg := err.Error()
	if !strings.HasPrefix(msg, c.Builtin.Name+":") {
		msg = c.Builtin.Name + ": " + msg
	}
	ee := c.ev.errorAt(c.pos, msg, hint).(*syntax.Error)
	ee.Err = err
	return ee
}

// finiteOrError refuses non-finite numbers where they enter.
func finite(v any) bool {
	switch x := v.(type) {
	case float64:
		return !math.IsNaN(x) && !math.IsInf(x, 0)
	case complex128:
		return !cmplx.IsNaN(x) && !cmplx.IsInf(x)
	}
	return true
}
