package lang

import (
	"context"
	"errors"
	"fmt"
	"math"
	"math/cmplx"
	"strings"

	"gonum.org/v1/gonum/mat"

	"lsys/lang/syntax"
	"lsys/lsys"
)

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
		hint = c.HelpHint()
	}
	return c.ev.errorAt(pos, fmt.Sprintf(format, args...), hint)
}

// TypeError says that the argument name must be want (a phrase: "a real
// Number"), not what it is.
func (c *Call) TypeError(name, want string, got any) error {
	return c.Errorf(name, c.HelpHint(),
		"%s: the argument '%s' must be %s, not %s", c.Builtin.Name, name, want, c.ev.typeName(got))
}

// HelpHint is the usual hint of a call's errors: the signature and where
// to ask for more.
func (c *Call) HelpHint() string {
	return fmt.Sprintf("Usage: %s. Put the cursor on '%s' and ask for help (shift-tab) for more.", c.Builtin.Signature(), c.Builtin.Name)
}

// ErrorAt returns an error pointing at pos (an argument's ArgPos, a named
// argument's Pos in c.Extra). The hint says what to do.
func (c *Call) ErrorAt(pos syntax.Pos, hint, format string, args ...any) error {
	return c.ev.errorAt(pos, fmt.Sprintf(format, args...), hint)
}

// TypeName names the kind of a value for messages ("a number", "a step
// response"), with the session's registry.
func (c *Call) TypeName(v any) string { return c.ev.typeName(v) }

// Registry is the session's registry of built-ins (for help()).
func (c *Call) Registry() *Registry { return c.ev.s.reg }

// Limits are the session's limits on one cell's work.
func (c *Call) Limits() Limits { return c.ev.s.limits }

// ToSystem turns v into a linear system as arguments are: a system as it
// is, a transfer function or transfer matrix realized, a number a static
// gain. A nonlinear model gives an error at pos that says to linearize it;
// any other value gives nil and no error.
func (c *Call) ToSystem(v any, pos syntax.Pos) (*lsys.System, error) {
	return c.ev.toSystem(v, pos)
}

// Realize realizes a transfer matrix (rows of transfer functions, as
// TransferRows reads them) as a system; errors point at pos.
func (c *Call) Realize(rows [][]*lsys.Rational, pos syntax.Pos) (*lsys.System, error) {
	return c.ev.realize(rows, pos)
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
	return 0, c.TypeError(name, "a real number", v)
}

// Int returns a whole-number argument.
func (c *Call) Int(name string) (int, error) {
	f, err := c.Float(name)
	if err != nil {
		return 0, err
	}
	if f != math.Trunc(f) || math.Abs(f) > 1<<31 {
		return 0, c.Errorf(name, c.HelpHint(), "%s: the argument '%s' must be a whole number, not %s", c.Builtin.Name, name, FormatNumber(f))
	}
	return int(f), nil
}

// String returns a string argument.
func (c *Call) String(name string) (string, error) {
	v := c.Value(name)
	if s, ok := v.(string); ok {
		return s, nil
	}
	return "", c.TypeError(name, "a string", v)
}

// Bool returns a boolean argument.
func (c *Call) Bool(name string) (bool, error) {
	v := c.Value(name)
	if b, ok := v.(bool); ok {
		return b, nil
	}
	return false, c.TypeError(name, "true or false", v)
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
	return nil, c.TypeError(name, "a real matrix or vector", v)
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
				return nil, c.Errorf(name, `Write names as strings: ["k", "b"].`, "%s: item %d of '%s' must be a string, not %s", c.Builtin.Name, i+1, name, c.ev.typeName(it))
			}
			out[i] = s
		}
		return out, nil
	}
	return nil, c.TypeError(name, `a list of names such as ["k", "b"]`, v)
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
		return nil, c.TypeError(name, "a system", v)
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
	hint := c.HelpHint()
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

// Finite reports whether a number is finite (other values count as
// finite); non-finite numbers are refused where they enter.
func Finite(v any) bool {
	switch x := v.(type) {
	case float64:
		return !math.IsNaN(x) && !math.IsInf(x, 0)
	case complex128:
		return !cmplx.IsNaN(x) && !cmplx.IsInf(x)
	}
	return true
}
