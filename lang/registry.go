package lang

// The one registry of built-in functions.
//
// Every built-in of the language is a *Builtin in a *Registry, and a
// session evaluates with the registry its Options give it. The same entry
// drives evaluation (Fn), tab completion (Name, Params), inspection
// (Signature, Help, Doc, Examples), help() and the language reference in
// the README (Registry.Reference). There is no second list anywhere.
//
// The built-ins of lsys live in package lang/builtins, which uses only the
// public API of this package (Call, Block, the value types); its Registry
// function returns the registry the front ends pass to NewSession. How to
// add a built-in is in that package's documentation.

import (
	"path/filepath"
	"reflect"
	"runtime"
	"slices"
	"sort"
	"strings"
	"sync"

	"lsys/lang/syntax"
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
	GroupDesign   = "Design and reduction"
)

var groupOrder = []string{GroupSystems, GroupAnalysis, GroupResponse, GroupModels, GroupMatrices, GroupMath, GroupOutput, GroupDesign}

// Param is a parameter of a built-in. A parameter is required unless it has
// a Default or is Optional (absent: c.Has reports false).
type Param struct {
	Name     string
	Doc      string
	Default  any  // value used when the argument is not given
	Optional bool // may be left out; no default value
	Variadic bool // last parameter only: takes all remaining positional arguments
	// NamedOnly: the argument is written with its name, never by position
	// (where the name says what the value means, as the return path of a
	// loop). Named-only parameters come after the positional ones.
	NamedOnly bool
	// Formerly is the name this argument had before it was renamed; a call
	// that still uses it gets an error naming the new one.
	Formerly string
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
	// Formerly lists names this built-in had before it was renamed; using
	// one is an error that names the new one (no alias: one name each).
	Formerly []string
	// Returns is a value of the result's type (a typed nil pointer is
	// fine), so that help() and the reference list the fields of results.
	Returns any
	// Fn computes the result. For a constant leave Fn nil and set Value.
	Fn    func(c *Call) (any, error)
	Value any

	file string // the Go file that registered it (for tests)
}

// File is the base name of the Go file that added the built-in, so that a
// test can ask each file's built-ins for tests of their own.
func (b *Builtin) File() string { return b.file }

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

// Registry holds the built-ins of a language and the result types they
// hand out (TypeInfo). A nil *Registry is an empty one: a session without
// built-ins still evaluates arithmetic, matrices and user functions.
// Fill a registry once, before the sessions that use it run; reading it is
// safe from several goroutines.
type Registry struct {
	mu       sync.RWMutex
	builtins map[string]*Builtin
	types    map[reflect.Type]*TypeInfo
	former   map[string]string // a former name -> the built-in's name now
}

// NewRegistry returns an empty registry.
func NewRegistry() *Registry {
	return &Registry{builtins: map[string]*Builtin{}, types: map[reflect.Type]*TypeInfo{}, former: map[string]string{}}
}

// Add adds built-ins. It panics on a duplicate name or a malformed entry,
// so mistakes show in every test run.
func (r *Registry) Add(bs ...*Builtin) {
	r.mu.Lock()
	defer r.mu.Unlock()
	for _, b := range bs {
		if b.Name == "" || b.Help == "" || len(b.Examples) == 0 {
			panic("lang.Registry.Add: " + b.Name + ": Name, Help and at least one example are required")
		}
		if (b.Fn == nil) == (b.Value == nil) {
			panic("lang.Registry.Add: " + b.Name + ": set exactly one of Fn and Value")
		}
		if syntax.IsKeyword(b.Name) {
			panic("lang.Registry.Add: " + b.Name + " is a keyword")
		}
		if _, dup := r.builtins[b.Name]; dup {
			panic("lang.Registry.Add: two built-ins named " + b.Name)
		}
		for i, p := range b.Params {
			if i > 0 && b.Params[i-1].NamedOnly && !p.NamedOnly {
				panic("lang.Registry.Add: " + b.Name + ": named-only parameters come last")
			}
			if p.Variadic && i != len(b.Params)-1 {
				panic("lang.Registry.Add: " + b.Name + ": only the last parameter may be variadic")
			}
		}
		if b.Group == "" {
			b.Group = GroupMath
		}
		// The adding file: Add is called from a function in the file that
		// owns the built-in, or from a helper one or two calls further.
		for skip := 1; skip < 4; skip++ {
			if _, file, _, ok := runtime.Caller(skip); ok && !strings.HasSuffix(file, "registry.go") {
				b.file = filepath.Base(file)
				break
			}
		}
		r.builtins[b.Name] = b
		for _, old := range b.Formerly {
			r.former[old] = b.Name
		}
	}
	for old, now := range r.former {
		if _, taken := r.builtins[old]; taken {
			panic("lang.Registry.Add: " + old + " is both a built-in and a former name of " + now)
		}
	}
}

// Renamed returns the name now of a built-in formerly called old.
func (r *Registry) Renamed(old string) (string, bool) {
	if r == nil {
		return "", false
	}
	r.mu.RLock()
	defer r.mu.RUnlock()
	now, ok := r.former[old]
	return now, ok
}

// Lookup returns the built-in called name.
func (r *Registry) Lookup(name string) (*Builtin, bool) {
	if r == nil {
		return nil, false
	}
	r.mu.RLock()
	defer r.mu.RUnlock()
	b, ok := r.builtins[name]
	return b, ok
}

// Builtins returns all built-ins sorted by name.
func (r *Registry) Builtins() []*Builtin {
	if r == nil {
		return nil
	}
	r.mu.RLock()
	defer r.mu.RUnlock()
	out := make([]*Builtin, 0, len(r.builtins))
	for _, b := range r.builtins {
		out = append(out, b)
	}
	sort.Slice(out, func(i, j int) bool { return out[i].Name < out[j].Name })
	return out
}

// Names returns the names of all built-ins, sorted.
func (r *Registry) Names() []string {
	var names []string
	for _, b := range r.Builtins() {
		names = append(names, b.Name)
	}
	return names
}

// ByGroup returns the groups in the reference's order (the known groups
// first, others sorted after them) and the built-ins of each, by name;
// help() and the reference both list built-ins this way.
func (r *Registry) ByGroup() (groups []string, members map[string][]*Builtin) {
	members = map[string][]*Builtin{}
	for _, b := range r.Builtins() {
		members[b.Group] = append(members[b.Group], b)
	}
	var extra []string
	for g := range members {
		if !slices.Contains(groupOrder, g) {
			extra = append(extra, g)
		}
	}
	sort.Strings(extra)
	for _, g := range append(append([]string(nil), groupOrder...), extra...) {
		if len(members[g]) > 0 {
			groups = append(groups, g)
		}
	}
	return groups, members
}

// AddType describes the type of sample (a typed nil pointer is fine).
func (r *Registry) AddType(sample any, info TypeInfo) {
	r.mu.Lock()
	defer r.mu.Unlock()
	t := reflect.TypeOf(sample)
	if _, dup := r.types[t]; dup {
		panic("lang.Registry.AddType: twice for " + t.String())
	}
	r.types[t] = &info
}

// typeInfo is the description of v's type, if one was added.
func (r *Registry) typeInfo(v any) (*TypeInfo, bool) {
	if r == nil {
		return nil, false
	}
	r.mu.RLock()
	defer r.mu.RUnlock()
	ti, ok := r.types[reflect.TypeOf(v)]
	return ti, ok
}

// TypeName names the kind of a value for messages ("a number", "a system",
// "a step response").
func (r *Registry) TypeName(v any) string {
	if n, ok := builtinTypeName(v); ok {
		return n
	}
	if ti, ok := r.typeInfo(v); ok && ti.Name != "" {
		return ti.Name
	}
	return wordsOfType(v)
}
