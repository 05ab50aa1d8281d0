// Package lang is the lsys system-description language: the evaluator, its
// values, and the public API built-ins are written against (Registry,
// Builtin, Call, Block). The scanner, syntax tree and parser are in
// lang/syntax; the built-ins themselves in lang/builtins, whose registry
// the front ends pass to NewSession.
//
// The kernel and the headless runner use it only through Session.
package lang

import (
	"context"
	"errors"
	"fmt"
	"runtime"
	"runtime/debug"
	"sort"
	"strings"
	"sync"
	"weak"

	"lsys/lang/syntax"
	"lsys/lsys"
)

// Output receives what a cell produces besides its final value. The kernel
// forwards these to iopub; the headless runner writes them into a report.
// Values passed to Display are lsys result types or plain Go values that
// package display knows how to render.
type Output interface {
	Stdout(text string)
	Stderr(text string)
	// Display shows an extra value. id is "" or a stable id that a later
	// UpdateDisplay with the same id replaces (used for progress).
	Display(v any, id string)
	UpdateDisplay(v any, id string)
	ClearOutput(wait bool)
}

// Pager is an optional interface of Output: a front end with a pager (the
// Jupyter page payload) shows long help there instead of in the cell's output.
type Pager interface {
	Page(text string)
}

// Options are what a front end passes to a new session. The language sets
// no package globals from outside: two sessions with different options can
// run side by side in one process.
type Options struct {
	// Dir is the folder load() reads data files from (the notebook's
	// folder); "" is the current folder.
	Dir string
	// Text formats, for print, inspect and the members of lists and
	// records, the values the language does not format itself (the results
	// of analysis). Front ends pass the text/plain renderer of package
	// display, which the language cannot import. nil leaves such values as
	// "(a mode table; show(x) displays it)".
	Text func(v any) (string, bool)
	// Limits bound one cell's work; zero fields take the defaults.
	Limits Limits
	// Builtins is the registry of built-ins the session evaluates with
	// (front ends pass builtins.Registry() of package lang/builtins); nil
	// is a language without built-ins.
	Builtins *Registry
}

// Limits bound the work of one cell so that a runaway loop or recursion
// ends with a message instead of hanging a front end.
type Limits struct {
	Steps int64 // evaluation steps per cell (default MaxSteps)
	Depth int   // nesting of user function calls (default MaxDepth)
	// Memory is the budget in bytes for one value a cell makes (a matrix,
	// a response, a string); default DefaultMemory(). A value over it is
	// refused with its size and the budget, and the session keeps what it
	// had.
	Memory int64
}

// LanguageInfo describes the language as notebooks record it (the
// metadata's language_info); both front ends hand out this one map.
func LanguageInfo() map[string]any {
	return map[string]any{
		"name":           "lsys",
		"version":        "1",
		"mimetype":       "text/x-lsys",
		"file_extension": ".lsys",
		"pygments_lexer": "text",
		// our own editor mode, shipped in the kernelspec folder (kernel.js)
		"codemirror_mode": "lsys",
	}
}

// Session holds the bindings of one notebook session. Its methods may be
// called from several goroutines (the kernel answers completion requests
// while a cell runs); Run calls are serialised.
type Session struct {
	reg    *Registry
	dir    string
	text   func(v any) (string, bool)
	limits Limits

	runMu   sync.Mutex // one cell at a time
	mu      sync.RWMutex
	globals map[string]any
	// sources remembers, for systems built from equation blocks, the block
	// they came from, so parameter sensitivities can be taken later. The
	// keys are weak: a system nobody holds any more (the thousands a
	// locus builds) takes its entry with it (see remember).
	sources map[weak.Pointer[lsys.System]]*blockSource
	// models does the same for nonlinear models, whose equations only the
	// block can evaluate.
	models map[weak.Pointer[lsys.Model]]*blockSource
}

// NewSession starts an empty session with the given options.
func NewSession(opt Options) *Session {
	lim := opt.Limits
	if lim.Steps <= 0 {
		lim.Steps = MaxSteps
	}
	if lim.Depth <= 0 {
		lim.Depth = MaxDepth
	}
	if lim.Memory <= 0 {
		lim.Memory = DefaultMemory()
	}
	return &Session{reg: opt.Builtins, dir: opt.Dir, text: opt.Text, limits: lim, globals: map[string]any{}, sources: map[weak.Pointer[lsys.System]]*blockSource{}, models: map[weak.Pointer[lsys.Model]]*blockSource{}}
}

// Format is the text form of v as print shows it in this session: the
// language's own form, or the session's Text option for analysis results.
func (s *Session) Format(v any) string { return formatValue(v, s.textOrName) }

// textOrName is the session's Text option, and for what it does not
// format the result's kind as the registry names it.
func (s *Session) textOrName(v any) (string, bool) {
	if s.text != nil {
		if t, ok := s.text(v); ok {
			return t, true
		}
	}
	return "(" + s.reg.TypeName(v) + "; show(x) displays it)", true
}

// Builtins is the session's registry of built-ins (front ends ask it which
// words to highlight as built-ins).
func (s *Session) Builtins() *Registry { return s.reg }

// remember records in m the block behind a system or model built from it;
// the entry goes when the value is garbage collected.
func remember[T any](s *Session, m map[weak.Pointer[T]]*blockSource, v *T, bs *blockSource) {
	wp := weak.Make(v)
	s.mu.Lock()
	m[wp] = bs
	s.mu.Unlock()
	runtime.AddCleanup(v, func(wp weak.Pointer[T]) {
		s.mu.Lock()
		delete(m, wp)
		s.mu.Unlock()
	}, wp)
}

// Dir is the folder data files are read from.
func (s *Session) Dir() string { return s.dir }

func (s *Session) bind(name string, v any) {
	s.mu.Lock()
	defer s.mu.Unlock()
	s.globals[name] = v
}

// Set binds name to v, as a cell's name = ... does; v should be a value
// the language hands out (a number, a matrix, an lsys result).
func (s *Session) Set(name string, v any) { s.bind(name, v) }

// Get returns the value bound to name.
func (s *Session) Get(name string) (any, bool) {
	s.mu.RLock()
	defer s.mu.RUnlock()
	v, ok := s.globals[name]
	return v, ok
}

type nopOutput struct{}

func (nopOutput) Stdout(string)             {}
func (nopOutput) Stderr(string)             {}
func (nopOutput) Display(any, string)       {}
func (nopOutput) UpdateDisplay(any, string) {}
func (nopOutput) ClearOutput(bool)          {}

// Run evaluates one cell. value is what the cell's last expression evaluated
// to, or nil when the cell ends in a binding (nothing to show). err, when not
// nil, is meant for people: its Error() text names line and column, quotes
// the line with a caret and says what to do. A cancelled ctx stops long loops
// and returns an error wrapping ctx.Err(). Run never panics; bindings made
// before an error stay.
func (s *Session) Run(ctx context.Context, src string, out Output) (value any, err error) {
	s.runMu.Lock()
	defer s.runMu.Unlock()
	if ctx == nil {
		ctx = context.Background()
	}
	if out == nil {
		out = nopOutput{}
	}
	defer func() {
		if r := recover(); r != nil {
			value = nil
			msg := fmt.Sprintf("internal error: %v", r)
			if debugPanics {
				msg += "\n" + string(debug.Stack())
			}
			err = &syntax.Error{Pos: syntax.Pos{Line: 1, Column: 1}, Msg: msg,
				Hint: "This is a bug in lsys, not in your cell; please report it with this cell.", Source: syntax.LineAt(src, 1)}
		}
	}()
	stmts, perr := syntax.ParseCell(src)
	if perr != nil {
		syntax.AttachSource(perr, src)
		return nil, perr
	}
	g := &guardedOutput{out: out}
	defer g.close()
	ev := &evaluator{s: s, ctx: ctx, out: g, src: src}
	value, err = ev.run(stmts)
	if err != nil {
		syntax.AttachSource(err, src)
		return nil, err
	}
	return value, nil
}

// Names lists the bindings of the session, sorted.
func (s *Session) Names() []string {
	s.mu.RLock()
	defer s.mu.RUnlock()
	names := make([]string, 0, len(s.globals))
	for k := range s.globals {
		names = append(names, k)
	}
	sort.Strings(names)
	return names
}

// Describe splits a cell's error into what both front ends show: a kind
// ("Error", or "Interrupted" when the cell was cancelled), the headline
// (the first line) and all lines of the message.
func Describe(err error) (kind, headline string, lines []string) {
	if errors.Is(err, context.Canceled) {
		kind = "Interrupted"
		headline = "the cell was interrupted; bindings made before the interrupt are kept"
		return kind, headline, []string{kind + ": " + headline}
	}
	msg := err.Error()
	headline = msg
	if i := strings.IndexByte(msg, '\n'); i >= 0 {
		headline = msg[:i]
	}
	return "Error", headline, strings.Split(msg, "\n")
}

// guardedOutput passes a cell's output on until the cell ends; a built-in
// abandoned at an interrupt (see runBuiltin) may still try to print or
// show progress, and that must not land in a later cell's output.
type guardedOutput struct {
	mu     sync.Mutex
	out    Output
	closed bool
}

func (g *guardedOutput) close() {
	g.mu.Lock()
	g.closed = true
	g.mu.Unlock()
}

func (g *guardedOutput) do(f func(o Output)) {
	g.mu.Lock()
	defer g.mu.Unlock()
	if !g.closed {
		f(g.out)
	}
}

func (g *guardedOutput) Stdout(text string) { g.do(func(o Output) { o.Stdout(text) }) }
func (g *guardedOutput) Stderr(text string) { g.do(func(o Output) { o.Stderr(text) }) }
func (g *guardedOutput) Display(v any, id string) {
	g.do(func(o Output) { o.Display(v, id) })
}
func (g *guardedOutput) UpdateDisplay(v any, id string) {
	g.do(func(o Output) { o.UpdateDisplay(v, id) })
}
func (g *guardedOutput) ClearOutput(wait bool) { g.do(func(o Output) { o.ClearOutput(wait) }) }

// Page forwards to the front end's pager when it has one; otherwise the
// text goes to stdout, as help does without a pager.
func (g *guardedOutput) Page(text string) {
	g.do(func(o Output) {
		if p, ok := o.(Pager); ok {
			p.Page(text)
		} else {
			o.Stdout(text + "\n")
		}
	})
}
