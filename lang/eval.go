package lang

import (
	"context"
	"fmt"
	"math"
	"runtime/debug"
	"strings"

	"gonum.org/v1/gonum/mat"

	"lsys/lang/syntax"
	"lsys/lsys"
)

// Limits that keep one cell from taking the session down. Each is reported
// with a message that names it.
const (
	// MaxSteps is the default number of evaluation steps one cell may take.
	MaxSteps = 10_000_000
	// MaxDepth is the default depth to which user functions may call each other.
	MaxDepth = 200
	// MaxEntries is the largest number of entries of one matrix.
	MaxEntries = 1_000_000
)

type evaluator struct {
	s      *Session
	ctx    context.Context
	out    Output
	src    string // source of the code being evaluated (cell or function)
	where  string // "in f(k), ..." while inside a user function
	steps  int64
	depth  int
	frames []map[string]any
}

// typeName names the kind of v for messages, with the session's registry.
func (ev *evaluator) typeName(v any) string { return ev.s.reg.TypeName(v) }

func (ev *evaluator) errorAt(pos syntax.Pos, msg, hint string) error {
	return &syntax.Error{Pos: pos, Msg: msg, Hint: hint, Source: syntax.LineAt(ev.src, pos.Line), Where: ev.where}
}

func (ev *evaluator) interrupted(pos syntax.Pos, cause error) error {
	e := ev.errorAt(pos, "interrupted", "The cell was stopped; bindings made before this line are kept.").(*syntax.Error)
	e.Err = cause
	return e
}

// step counts one evaluation step and checks for interrupts every 1024.
func (ev *evaluator) step(pos syntax.Pos) error {
	ev.steps++
	if ev.steps&1023 == 0 {
		if err := ev.ctx.Err(); err != nil {
			return ev.interrupted(pos, err)
		}
	}
	if ev.steps > ev.s.limits.Steps {
		return ev.errorAt(pos, fmt.Sprintf("the cell took more than %d evaluation steps", ev.s.limits.Steps),
			"Look for a function that calls itself without end, or split the work over several cells.")
	}
	return nil
}

func (ev *evaluator) run(stmts []syntax.Stmt) (any, error) {
	var last any
	for i, st := range stmts {
		if err := ev.ctx.Err(); err != nil {
			return nil, ev.interrupted(st.Pos(), err)
		}
		last = nil
		switch s := st.(type) {
		case *syntax.AssignStmt:
			if err := ev.checkBindable(s.Name); err != nil {
				return nil, err
			}
			v, err := ev.eval(s.Value)
			if err != nil {
				return nil, err
			}
			if v == nil {
				return nil, ev.errorAt(s.Value.Pos(), "this expression gives no value to bind",
					"Bind the result of a computation; print, warn and show give nothing back.")
			}
			ev.s.bind(s.Name.Name, v)
		case *syntax.FuncDef:
			if err := ev.checkBindable(s.Name); err != nil {
				return nil, err
			}
			params := make([]string, len(s.Params))
			for k, p := range s.Params {
				params[k] = p.Name
			}
			ev.s.bind(s.Name.Name, &Function{Name: s.Name.Name, Params: params, Body: s.Body, src: ev.src})
		case *syntax.ExprStmt:
			v, err := ev.eval(s.X)
			if err != nil {
				return nil, err
			}
			if i == len(stmts)-1 {
				last = v
			}
		}
	}
	return last, nil
}

// checkBindable: a binding may hide a built-in of the same name (gain = 2
// is a natural thing to write); calling it then says what happened.
func (ev *evaluator) checkBindable(id *syntax.Ident) error {
	return nil
}

func (ev *evaluator) lookup(id *syntax.Ident) (any, error) {
	if n := len(ev.frames); n > 0 {
		if v, ok := ev.frames[n-1][id.Name]; ok {
			return v, nil
		}
	}
	// Under the read lock: a built-in abandoned at an interrupt may still
	// evaluate a function argument while the next cell binds names.
	ev.s.mu.RLock()
	v, ok := ev.s.globals[id.Name]
	ev.s.mu.RUnlock()
	if ok {
		return v, nil
	}
	if b, ok := ev.s.reg.Lookup(id.Name); ok {
		if b.Fn == nil {
			return b.Value, nil
		}
		return b, nil
	}
	if now, ok := ev.s.reg.Renamed(id.Name); ok {
		b, _ := ev.s.reg.Lookup(now)
		return nil, ev.errorAt(id.NamePos, fmt.Sprintf("'%s' was renamed; did you mean '%s'?", id.Name, now),
			"Usage: "+b.Signature())
	}
	cands := append(ev.s.Names(), ev.s.reg.Names()...)
	if n := len(ev.frames); n > 0 {
		for k := range ev.frames[n-1] {
			cands = append(cands, k)
		}
	}
	return nil, ev.errorAt(id.NamePos, fmt.Sprintf("unknown name '%s'%s", id.Name, DidYouMean(id.Name, cands)),
		"Bind it first (name = value), or check the spelling.")
}

func (ev *evaluator) eval(e syntax.Expr) (v any, err error) {
	if err := ev.step(e.Pos()); err != nil {
		return nil, err
	}
	switch x := e.(type) {
	case *syntax.Ident:
		return ev.lookup(x)
	case *syntax.NumberLit:
		if x.Imag {
			return complex(0, x.Value), nil
		}
		return x.Value, nil
	case *syntax.StringLit:
		return x.Value, nil
	case *syntax.BoolLit:
		return x.Value, nil
	case *syntax.ListLit:
		return ev.evalList(x)
	case *syntax.RecordLit:
		r := &Record{}
		for _, f := range x.Fields {
			v, err := ev.eval(f.Value)
			if err != nil {
				return nil, err
			}
			if v == nil {
				return nil, ev.errorAt(f.Value.Pos(), fmt.Sprintf("field '%s' has no value", f.Name.Name), "print, warn and show give nothing back; give the field a value.")
			}
			r.Names = append(r.Names, f.Name.Name)
			r.Values = append(r.Values, v)
		}
		return r, nil
	case *syntax.UnaryExpr:
		v, err := ev.eval(x.X)
		if err != nil {
			return nil, err
		}
		if x.Op == syntax.NOT {
			b, ok := v.(bool)
			if !ok {
				return nil, ev.errorAt(x.OpPos, fmt.Sprintf("'not' needs true or false, not %s", ev.typeName(v)), "Use a comparison, such as not (k > 0).")
			}
			return !b, nil
		}
		return ev.negate(v, x.OpPos)
	case *syntax.BinaryExpr:
		if x.Op == syntax.AND || x.Op == syntax.OR {
			return ev.logic(x)
		}
		return ev.evalChain(x)
	case *syntax.CallExpr:
		return ev.evalCall(x)
	case *syntax.IndexExpr:
		return ev.evalIndex(x)
	case *syntax.FieldExpr:
		v, err := ev.eval(x.X)
		if err != nil {
			return nil, err
		}
		return ev.field(v, x.Name)
	case *syntax.IfExpr:
		c, err := ev.eval(x.Cond)
		if err != nil {
			return nil, err
		}
		b, ok := c.(bool)
		if !ok {
			return nil, ev.errorAt(x.Cond.Pos(), fmt.Sprintf("the condition of 'if' must be true or false, not %s", ev.typeName(c)),
				"Compare with <, <=, ==, != ... to get true or false.")
		}
		if b {
			return ev.eval(x.Then)
		}
		return ev.eval(x.Else)
	case *syntax.SystemBlock:
		return ev.evalSystemBlock(x)
	}
	return nil, ev.errorAt(e.Pos(), "cannot evaluate this expression", "This is a bug in lsys; please report it with this cell.")
}

func (ev *evaluator) logic(x *syntax.BinaryExpr) (any, error) {
	a, err := ev.eval(x.X)
	if err != nil {
		return nil, err
	}
	ab, ok := a.(bool)
	if !ok {
		return nil, ev.errorAt(x.X.Pos(), fmt.Sprintf("'%s' needs true or false on both sides, not %s", x.Op, ev.typeName(a)), "Use comparisons: k > 0 and b < 1.")
	}
	if (x.Op == syntax.AND && !ab) || (x.Op == syntax.OR && ab) {
		return ab, nil
	}
	b, err := ev.eval(x.Y)
	if err != nil {
		return nil, err
	}
	bb, ok := b.(bool)
	if !ok {
		return nil, ev.errorAt(x.Y.Pos(), fmt.Sprintf("'%s' needs true or false on both sides, not %s", x.Op, ev.typeName(b)), "Use comparisons: k > 0 and b < 1.")
	}
	return bb, nil
}

// evalList turns [..] into a column vector (all numbers), a matrix (rows
// that are vectors of one length), or a List otherwise.
func (ev *evaluator) evalList(x *syntax.ListLit) (any, error) {
	vals := make([]any, len(x.Elems))
	for i, el := range x.Elems {
		v, err := ev.eval(el)
		if err != nil {
			return nil, err
		}
		if v == nil {
			return nil, ev.errorAt(el.Pos(), "this item has no value", "print, warn and show give nothing back; put values in lists.")
		}
		vals[i] = v
	}
	if len(vals) == 0 {
		return &List{}, nil
	}
	allNum, anyComplex, allVec := true, false, true
	for _, v := range vals {
		switch t := v.(type) {
		case float64:
			allVec = false
		case complex128:
			anyComplex = true
			allVec = false
		case *mat.Dense:
			allNum = false
			if _, c := t.Dims(); c != 1 {
				allVec = false
			}
		case *mat.CDense:
			allNum = false
			anyComplex = true
			if _, c := t.Dims(); c != 1 {
				allVec = false
			}
		default:
			allNum, allVec = false, false
		}
	}
	if allNum {
		if len(vals) > MaxEntries {
			return nil, ev.tooBig(x.Lbrack, len(vals), 1)
		}
		for i, v := range vals {
			if !Finite(v) {
				return nil, ev.errorAt(x.Elems[i].Pos(), fmt.Sprintf("entry %d is %s; matrices hold finite numbers only", i+1, FormatValue(v)), "Check how the entry was computed; inf and nan cannot enter a matrix or a system.")
			}
		}
		if anyComplex {
			m := mat.NewCDense(len(vals), 1, nil)
			for i, v := range vals {
				m.Set(i, 0, toComplex(v))
			}
			return m, nil
		}
		m := mat.NewDense(len(vals), 1, nil)
		for i, v := range vals {
			m.Set(i, 0, v.(float64))
		}
		return m, nil
	}
	if allVec {
		// Rows of a matrix, each written as a list.
		n := vecLen(vals[0])
		for i, v := range vals {
			if k := vecLen(v); k != n {
				return nil, ev.errorAt(x.Elems[i].Pos(), fmt.Sprintf("row %d has %s but row 1 has %d", i+1, entries(k), n),
					"Every row of a matrix needs the same number of entries.")
			}
		}
		if len(vals)*n > MaxEntries {
			return nil, ev.tooBig(x.Lbrack, len(vals), n)
		}
		if anyComplex {
			m := mat.NewCDense(len(vals), n, nil)
			for i, v := range vals {
				for j := 0; j < n; j++ {
					m.Set(i, j, vecAt(v, j))
				}
			}
			return m, nil
		}
		m := mat.NewDense(len(vals), n, nil)
		for i, v := range vals {
			for j := 0; j < n; j++ {
				m.Set(i, j, v.(*mat.Dense).At(j, 0))
			}
		}
		return m, nil
	}
	return &List{Items: vals}, nil
}

func vecLen(v any) int {
	switch t := v.(type) {
	case *mat.Dense:
		r, _ := t.Dims()
		return r
	case *mat.CDense:
		r, _ := t.Dims()
		return r
	}
	return 0
}

func vecAt(v any, i int) complex128 {
	switch t := v.(type) {
	case *mat.Dense:
		return complex(t.At(i, 0), 0)
	case *mat.CDense:
		return t.At(i, 0)
	}
	return 0
}

func (ev *evaluator) tooBig(pos syntax.Pos, r, c int) error {
	return ev.errorAt(pos, fmt.Sprintf("a %dx%d matrix is larger than the limit of %d entries", r, c, MaxEntries),
		"Work with a smaller model, or reduce it first.")
}

func (ev *evaluator) evalCall(x *syntax.CallExpr) (any, error) {
	var fn any
	var err error
	if id, ok := x.Fun.(*syntax.Ident); ok {
		fn, err = ev.lookup(id)
	} else {
		fn, err = ev.eval(x.Fun)
	}
	if err != nil {
		return nil, err
	}
	var pos []syntax.Pos
	var vals []any
	var named []NamedValue
	for _, a := range x.Args {
		v, err := ev.eval(a.Value)
		if err != nil {
			return nil, err
		}
		if v == nil {
			return nil, ev.errorAt(a.Value.Pos(), "this argument has no value", "print, warn and show give nothing back; pass a value instead.")
		}
		if a.Name != nil {
			for _, n := range named {
				if n.Name == a.Name.Name {
					return nil, ev.errorAt(a.Name.NamePos, fmt.Sprintf("argument '%s' is given twice", a.Name.Name), "Give each named argument once.")
				}
			}
			named = append(named, NamedValue{Name: a.Name.Name, Value: v, Pos: a.Name.NamePos, ValuePos: a.Value.Pos()})
		} else {
			vals = append(vals, v)
			pos = append(pos, a.Value.Pos())
		}
	}
	switch f := fn.(type) {
	case *Builtin:
		return ev.callBuiltin(f, vals, pos, named, x.Fun.Pos())
	case *Function:
		return ev.callFunction(f, vals, pos, named, x.Fun.Pos())
	case *lsys.Rational:
		// H(x): the transfer function evaluated at a (complex) point.
		if len(vals) != 1 || len(named) > 0 || !isNumber(vals[0]) {
			return nil, ev.errorAt(x.Lparen, "a transfer function is evaluated at one number: H(2j)",
				"For the frequency response at w rad/s write H(w*1j).")
		}
		v := f.Eval(toComplex(vals[0]))
		if !Finite(v) {
			return nil, ev.errorAt(pos[0], fmt.Sprintf("%s is a pole of the transfer function", FormatValue(vals[0])),
				"Evaluate it at another point.")
		}
		return Number(v), nil
	}
	hint := "Only functions can be called; to index a matrix use M[2, 1]."
	if id, ok := x.Fun.(*syntax.Ident); ok {
		if b, ok := ev.s.reg.Lookup(id.Name); ok && b.Fn != nil {
			hint = fmt.Sprintf("Your binding '%s' hides the built-in %s; give your value another name.", id.Name, b.Signature())
		}
	}
	return nil, ev.errorAt(x.Lparen, fmt.Sprintf("%s is %s, not a function", syntax.ExprString(x.Fun), ev.typeName(fn)), hint)
}

// apply calls f with values (used by built-ins that take functions).
func (ev *evaluator) apply(f any, vals []any, named []NamedValue, pos syntax.Pos) (any, error) {
	poss := make([]syntax.Pos, len(vals))
	for i := range poss {
		poss[i] = pos
	}
	switch fn := f.(type) {
	case *Builtin:
		return ev.callBuiltin(fn, vals, poss, named, pos)
	case *Function:
		return ev.callFunction(fn, vals, poss, named, pos)
	}
	return nil, ev.errorAt(pos, fmt.Sprintf("expected a function, got %s", ev.typeName(f)), "Define one first: f(k) = ...")
}

func (ev *evaluator) callBuiltin(b *Builtin, vals []any, poss []syntax.Pos, named []NamedValue, pos syntax.Pos) (result any, err error) {
	c := &Call{Builtin: b, ev: ev, pos: pos}
	n := len(b.Params)
	c.vals, c.poss, c.given = make([]any, n), make([]syntax.Pos, n), make([]bool, n)
	for i, v := range vals {
		switch {
		case i < n && b.Params[i].NamedOnly:
			return nil, ev.errorAt(poss[i], fmt.Sprintf("%s takes '%s' by name only", b.Name, b.Params[i].Name),
				fmt.Sprintf("Write %s: before it. Usage: %s", b.Params[i].Name, b.Signature()))
		case i < n && !b.Params[i].Variadic:
			c.vals[i], c.poss[i], c.given[i] = v, poss[i], true
		case n > 0 && b.Params[n-1].Variadic:
			c.Rest = append(c.Rest, v)
			c.RestPos = append(c.RestPos, poss[i])
			c.given[n-1] = true
		default:
			return nil, ev.errorAt(poss[i], fmt.Sprintf("%s takes at most %s", b.Name, Plural(n, "argument")), "Usage: "+b.Signature())
		}
	}
	for _, nv := range named {
		i := -1
		for k, p := range b.Params {
			if p.Name == nv.Name && !p.Variadic {
				i = k
			}
		}
		if i < 0 {
			if b.AnyNamed {
				c.Extra = append(c.Extra, nv)
				continue
			}
			var names []string
			for _, p := range b.Params {
				names = append(names, p.Name)
				if p.Formerly == nv.Name {
					return nil, ev.errorAt(nv.Pos, fmt.Sprintf("%s has no argument named '%s' (it was renamed); did you mean '%s'?", b.Name, nv.Name, p.Name),
						"Usage: "+b.Signature())
				}
			}
			return nil, ev.errorAt(nv.Pos, fmt.Sprintf("%s has no argument named '%s'%s", b.Name, nv.Name, DidYouMean(nv.Name, names)),
				"Usage: "+b.Signature())
		}
		if c.given[i] {
			return nil, ev.errorAt(nv.Pos, fmt.Sprintf("argument '%s' of %s is given twice (by position and by name)", nv.Name, b.Name), "Usage: "+b.Signature())
		}
		c.vals[i], c.poss[i], c.given[i] = nv.Value, nv.ValuePos, true
	}
	for i, p := range b.Params {
		if !c.given[i] && p.Default == nil && !p.Optional && !p.Variadic {
			return nil, ev.errorAt(pos, fmt.Sprintf("%s needs the argument '%s'", b.Name, p.Name), "Usage: "+b.Signature())
		}
	}
	c.shareSampleTime()
	result, err = ev.runBuiltin(b, c, pos)
	if err != nil {
		return nil, c.wrapErr(err)
	}
	if err := ev.checkBudget(result, pos, b.Name); err != nil {
		return nil, err
	}
	return result, nil
}

// runBuiltin calls the built-in on a goroutine of its own and waits for it
// or for the cell's interruption, whichever comes first, so an interrupt
// ends the cell within moments even inside a library routine that cannot
// be stopped (a dense eigen-solver on 1500 states runs for seconds between
// any two points where it could look). The abandoned computation finishes
// in the background and its result is dropped; what it would still print
// goes nowhere (see guardedOutput), and it sees the interrupt at its next
// check. A panic inside becomes the cell's error.
func (ev *evaluator) runBuiltin(b *Builtin, c *Call, pos syntax.Pos) (any, error) {
	type outcome struct {
		v     any
		err   error
		pan   any
		stack []byte
	}
	done := make(chan outcome, 1)
	go func() {
		defer func() {
			if r := recover(); r != nil {
				done <- outcome{pan: r, stack: debug.Stack()}
			}
		}()
		v, err := b.Fn(c)
		done <- outcome{v: v, err: err}
	}()
	var o outcome
	select {
	case o = <-done:
	case <-ev.ctx.Done():
		select {
		case o = <-done: // finished at the same moment: keep it
		default:
			return nil, ev.interrupted(pos, ev.ctx.Err())
		}
	}
	if o.pan != nil {
		err := ev.errorAt(pos, fmt.Sprintf("%s failed inside: %v", b.Name, o.pan),
			"This is a bug in lsys, not in your cell; please report it with this cell.")
		if debugPanics {
			err = fmt.Errorf("%w\n%s", err, o.stack)
		}
		return nil, err
	}
	return o.v, o.err
}

// shareSampleTime gives arguments in z whose sample time is still open
// (1/z) the sample time of the call's sampled arguments, when they all
// have one and the same: closeloop(Gz, through: 1/z), wire(Gz, 1/z, ...) (SPEC
// section 8, "taken from what it is combined with").
func (c *Call) shareSampleTime() {
	ts := 0.0
	open := false
	all := append(append([]any(nil), c.vals...), c.Rest...)
	for _, v := range all {
		if openSampleTime(v) {
			open = true
		}
		for _, t := range sampleTimes(v) {
			if ts != 0 && t != ts {
				return // differing sample times: the built-in says so
			}
			ts = t
		}
	}
	if !open || ts == 0 {
		return
	}
	for i, v := range c.vals {
		c.vals[i] = withSampleTime(v, ts)
	}
	for i, v := range c.Rest {
		c.Rest[i] = withSampleTime(v, ts)
	}
}

// sampleTimes lists the sample times (> 0) that v carries.
func sampleTimes(v any) []float64 {
	switch t := v.(type) {
	case *lsys.System:
		if t.Ts > 0 {
			return []float64{t.Ts}
		}
	case *lsys.Rational:
		if t.Ts > 0 {
			return []float64{t.Ts}
		}
	case *List:
		var out []float64
		for _, it := range t.Items {
			out = append(out, sampleTimes(it)...)
		}
		return out
	}
	return nil
}

// debugPanics adds Go stack traces to caught panics (tests set it).
var debugPanics = false

func (ev *evaluator) callFunction(f *Function, vals []any, poss []syntax.Pos, named []NamedValue, pos syntax.Pos) (any, error) {
	if len(vals) > len(f.Params) {
		return nil, ev.errorAt(poss[len(f.Params)], fmt.Sprintf("%s takes %s", f.Name, Plural(len(f.Params), "argument")),
			fmt.Sprintf("It is defined as %s.", f))
	}
	frame := make(map[string]any, len(f.Params))
	for i, v := range vals {
		frame[f.Params[i]] = v
	}
	for _, nv := range named {
		found := false
		for _, p := range f.Params {
			if p == nv.Name {
				found = true
			}
		}
		if !found {
			return nil, ev.errorAt(nv.Pos, fmt.Sprintf("%s has no parameter named '%s'%s", f.Name, nv.Name, DidYouMean(nv.Name, f.Params)),
				fmt.Sprintf("It is defined as %s.", f))
		}
		if _, dup := frame[nv.Name]; dup {
			return nil, ev.errorAt(nv.Pos, fmt.Sprintf("parameter '%s' of %s is given twice", nv.Name, f.Name), fmt.Sprintf("It is defined as %s.", f))
		}
		frame[nv.Name] = nv.Value
	}
	for _, p := range f.Params {
		if _, ok := frame[p]; !ok {
			return nil, ev.errorAt(pos, fmt.Sprintf("%s needs the argument '%s'", f.Name, p), fmt.Sprintf("It is defined as %s.", f))
		}
	}
	if ev.depth >= ev.s.limits.Depth {
		return nil, ev.errorAt(pos, fmt.Sprintf("functions call each other more than %d levels deep", ev.s.limits.Depth),
			"Look for a function that calls itself without reaching its end case.")
	}
	ev.depth++
	ev.frames = append(ev.frames, frame)
	oldSrc, oldWhere := ev.src, ev.where
	ev.src = f.src
	if oldWhere == "" {
		defined := ""
		if f.src != oldSrc {
			defined = ", defined in an earlier cell"
		}
		ev.where = fmt.Sprintf("in %s(%s)%s, called at line %d, column %d", f.Name, strings.Join(f.Params, ", "), defined, pos.Line, pos.Column)
	}
	v, err := ev.eval(f.Body)
	ev.src, ev.where = oldSrc, oldWhere
	ev.frames = ev.frames[:len(ev.frames)-1]
	ev.depth--
	if err != nil {
		return nil, err
	}
	if v == nil {
		return nil, ev.errorAt(pos, fmt.Sprintf("%s gave no value", f.Name), "A function must end in a value; print, warn and show give none.")
	}
	return v, nil
}

func (ev *evaluator) index1(e syntax.Expr, size int, what string) (int, error) {
	v, err := ev.eval(e)
	if err != nil {
		return 0, err
	}
	f, ok := v.(float64)
	if !ok || f != math.Trunc(f) {
		return 0, ev.errorAt(e.Pos(), fmt.Sprintf("an index must be a whole number, not %s", FormatValue(v)), "Positions count from 1.")
	}
	if f < 1 || f > float64(size) {
		hint := fmt.Sprintf("Valid positions are 1 to %d.", size)
		if f == 0 {
			hint = "Positions count from 1: the first entry is [1]."
		}
		if size == 0 {
			hint = "It is empty."
		}
		return 0, ev.errorAt(e.Pos(), fmt.Sprintf("index %s is out of range for %s", FormatNumber(f), what), hint)
	}
	return int(f) - 1, nil
}

// span reads one index: a position or a range lo:hi. It returns the
// 0-based first and last positions (both included) and whether it was a
// range.
func (ev *evaluator) span(e syntax.Expr, size int, what string) (lo, hi int, isRange bool, err error) {
	r, ok := e.(*syntax.RangeExpr)
	if !ok {
		i, err := ev.index1(e, size, what)
		return i, i, false, err
	}
	lo, hi = 0, size-1
	if size == 0 {
		return 0, 0, true, ev.errorAt(r.Pos(), fmt.Sprintf("%s is empty: there is nothing to take", what), "Index something with entries.")
	}
	if r.Lo != nil {
		if lo, err = ev.index1(r.Lo, size, what); err != nil {
			return 0, 0, true, err
		}
	}
	if r.Hi != nil {
		if hi, err = ev.index1(r.Hi, size, what); err != nil {
			return 0, 0, true, err
		}
	}
	if hi < lo {
		return 0, 0, true, ev.errorAt(r.Colon, fmt.Sprintf("the range %d:%d is empty (it counts upwards)", lo+1, hi+1),
			fmt.Sprintf("Write the first position first: [%d:%d].", hi+1, lo+1))
	}
	return lo, hi, true, nil
}

func (ev *evaluator) evalIndex(x *syntax.IndexExpr) (any, error) {
	v, err := ev.eval(x.X)
	if err != nil {
		return nil, err
	}
	switch t := v.(type) {
	case *List:
		if len(x.Indices) != 1 {
			return nil, ev.errorAt(x.Lbrack, "a list takes one index", "Write l[2] or l[2:3].")
		}
		lo, hi, isRange, err := ev.span(x.Indices[0], len(t.Items), ev.typeName(t))
		if err != nil {
			return nil, err
		}
		if isRange {
			return &List{Items: append([]any(nil), t.Items[lo:hi+1]...)}, nil
		}
		return t.Items[lo], nil
	case *mat.Dense, *mat.CDense:
		var r, c int
		if d, ok := v.(*mat.Dense); ok {
			r, c = d.Dims()
		} else {
			r, c = v.(*mat.CDense).Dims()
		}
		at := func(i, j int) any {
			if d, ok := v.(*mat.Dense); ok {
				return d.At(i, j)
			}
			return v.(*mat.CDense).At(i, j)
		}
		// sub copies rows r0..r1 and columns c0..c1 (both included).
		sub := func(r0, r1, c0, c1 int) any {
			if d, ok := v.(*mat.Dense); ok {
				return mat.DenseCopyOf(d.Slice(r0, r1+1, c0, c1+1))
			}
			d := v.(*mat.CDense)
			out := mat.NewCDense(r1-r0+1, c1-c0+1, nil)
			for i := r0; i <= r1; i++ {
				for j := c0; j <= c1; j++ {
					out.Set(i-r0, j-c0, d.At(i, j))
				}
			}
			return RealIfPossible(out)
		}
		switch len(x.Indices) {
		case 1:
			if r != 1 && c != 1 {
				return nil, ev.errorAt(x.Lbrack, fmt.Sprintf("%s needs a row and a column", ev.typeName(v)), "Write M[2, 1] (row 2, column 1), M[2, :] (row 2) or M[:, 1] (column 1).")
			}
			lo, hi, isRange, err := ev.span(x.Indices[0], r*c, ev.typeName(v))
			if err != nil {
				return nil, err
			}
			switch {
			case !isRange && c == 1:
				return at(lo, 0), nil
			case !isRange:
				return at(0, lo), nil
			case c == 1:
				return sub(lo, hi, 0, 0), nil
			}
			return sub(0, 0, lo, hi), nil
		case 2:
			r0, r1, rr, err := ev.span(x.Indices[0], r, fmt.Sprintf("the rows of %s", ev.typeName(v)))
			if err != nil {
				return nil, err
			}
			c0, c1, cr, err := ev.span(x.Indices[1], c, fmt.Sprintf("the columns of %s", ev.typeName(v)))
			if err != nil {
				return nil, err
			}
			if !rr && !cr {
				return at(r0, c0), nil
			}
			return sub(r0, r1, c0, c1), nil
		}
		return nil, ev.errorAt(x.Lbrack, "a matrix takes one or two indices", "Write v[3] or M[2, 1].")
	}
	for _, e := range x.Indices {
		if r, ok := e.(*syntax.RangeExpr); ok {
			return nil, ev.errorAt(r.Colon, fmt.Sprintf("%s cannot be sliced", ev.typeName(v)), "Ranges a:b select entries of vectors, matrices and lists.")
		}
	}
	return nil, ev.errorAt(x.Lbrack, fmt.Sprintf("%s cannot be indexed", ev.typeName(v)), "Index vectors, matrices and lists: v[3], M[2, 1].")
}

// systemFields are the fixed fields of a system; signal names follow.
var systemFields = []string{"A", "B", "C", "D", "states", "inputs", "outputs", "every"}

func (ev *evaluator) field(v any, name *syntax.Ident) (any, error) {
	fr, ok := ev.s.reg.fieldsOf(v)
	if !ok {
		return nil, ev.errorAt(name.NamePos, fmt.Sprintf("%s has no fields", ev.typeName(v)), "Records, systems, models and results of analysis have fields; completion after '.' lists them.")
	}
	f, found, err := fr.get(name.Name)
	if err != nil {
		hint := "This is a bug in lsys, not in your cell; please report it."
		if _, isSys := v.(*lsys.System); isSys {
			hint = "Fields of a system: " + strings.Join(systemFields, ", ") + ", and its signal names."
		}
		return nil, ev.errorAt(name.NamePos, err.Error(), hint)
	}
	if found {
		return f, nil
	}
	fields := fr.names()
	hint := ""
	if len(fields) > 0 {
		hint = "Its fields are: " + strings.Join(fields, ", ") + "."
	}
	if m, ok := v.(*lsys.Model); ok {
		// A model's signals are not fields (a system's are): point the
		// way when the name is, or is close to, one of them.
		signals := append(append(append([]string(nil), m.StateNames...), m.InputNames...), m.OutputNames...)
		sig := ""
		for _, s := range signals {
			if s == name.Name {
				sig = s
			}
		}
		if sig == "" && closest(name.Name, fields) == "" {
			sig = closest(name.Name, signals)
		}
		if sig != "" {
			msg := fmt.Sprintf("a nonlinear model has no field '%s'", name.Name)
			if sig != name.Name {
				msg += fmt.Sprintf("; did you mean the signal '%s'?", sig)
			}
			return nil, ev.errorAt(name.NamePos, msg,
				fmt.Sprintf("A model's signals are reached after linearizing it: linearize(model, at: {...}).%s. %s", sig, hint))
		}
	}
	return nil, ev.errorAt(name.NamePos, fmt.Sprintf("%s has no field '%s'%s", ev.typeName(v), name.Name, DidYouMean(name.Name, fields)), hint)
}

// fieldNames lists what may follow '.' after v, for completion and hints.
func (r *Registry) fieldNames(v any) []string {
	if fr, ok := r.fieldsOf(v); ok {
		return fr.names()
	}
	return nil
}

// fieldReader is the one field protocol: evaluation (r.name), completion
// after '.', inspection and the "did you mean" of errors all read fields
// through fieldsOf, so they agree on every kind of value.
type fieldReader struct {
	names func() []string
	// get reads a field; found is false when v has no such field, err
	// set when it has one that cannot be read (A of a static gain).
	get func(name string) (v any, found bool, err error)
}

// fieldsOf gives the fields of records, systems (matrices, names and
// signals), results of analysis (their registered TypeInfo) and the
// language's own values with fields (models, equilibria).
func (r *Registry) fieldsOf(v any) (fieldReader, bool) {
	switch t := v.(type) {
	case *Record:
		return fieldReader{
			names: func() []string { return t.Names },
			get: func(n string) (any, bool, error) {
				f, ok := t.Get(n)
				return f, ok, nil
			},
		}, true
	case *lsys.System:
		return fieldReader{
			names: func() []string { return systemFieldNames(t) },
			get:   func(n string) (any, bool, error) { return systemField(t, n) },
		}, true
	}
	if t, ok := fieldTable(v); ok {
		return tableReader(v, t, nil), true
	}
	if ti, ok := r.typeInfo(v); ok && (len(ti.Fields) > 0 || ti.ByName != nil) {
		return tableReader(v, ti.Fields, ti.ByName), true
	}
	return fieldReader{}, false
}

// systemFieldNames are a system's fields and then its signal names.
func systemFieldNames(g *lsys.System) []string {
	out := append([]string(nil), systemFields...)
	seen := map[string]bool{}
	for _, f := range out {
		seen[f] = true
	}
	for _, l := range [][]string{g.StateNames, g.InputNames, g.OutputNames} {
		for _, n := range l {
			if !seen[n] {
				seen[n] = true
				out = append(out, n)
			}
		}
	}
	return out
}

// NameList is a list of names (strings).
func NameList(names []string) *List {
	l := &List{Items: make([]any, len(names))}
	for i, n := range names {
		l.Items[i] = n
	}
	return l
}

// systemField reads G.A ... G.every, or selects a signal by name: an output
// or state name gives the system seen from that signal alone, an input name
// the system driven by that input alone.
func systemField(g *lsys.System, name string) (any, bool, error) {
	switch name {
	case "A", "B", "C", "D":
		m := map[string]*mat.Dense{"A": g.A, "B": g.B, "C": g.C, "D": g.D}[name]
		if m == nil {
			return nil, true, fmt.Errorf("%s is empty for this system (%s)", name, systemSummary(g))
		}
		return mat.DenseCopyOf(m), true, nil
	case "states":
		return NameList(g.StateNames), true, nil
	case "inputs":
		return NameList(g.InputNames), true, nil
	case "outputs":
		return NameList(g.OutputNames), true, nil
	case "every":
		return g.Ts, true, nil
	}
	n, m := g.N(), g.M()
	for i, o := range g.OutputNames {
		if o == name {
			var C, D *mat.Dense
			if n > 0 {
				C = mat.NewDense(1, n, nil)
				C.Copy(g.C.Slice(i, i+1, 0, n))
			}
			if m > 0 {
				D = mat.NewDense(1, m, nil)
				D.Copy(g.D.Slice(i, i+1, 0, m))
			}
			s, err := lsys.NewSystem(n, m, 1, g.A, g.B, C, D, g.Ts)
			if err != nil {
				return nil, true, err
			}
			s, err = s.WithNames(g.StateNames, g.InputNames, []string{o})
			return s, true, err
		}
	}
	for i, st := range g.StateNames {
		if st == name {
			C := mat.NewDense(1, n, nil)
			C.Set(0, i, 1)
			s, err := lsys.NewSystem(n, m, 1, g.A, g.B, C, nil, g.Ts)
			if err != nil {
				return nil, true, err
			}
			s, err = s.WithNames(g.StateNames, g.InputNames, []string{st})
			return s, true, err
		}
	}
	for j, in := range g.InputNames {
		if in == name {
			var B, D *mat.Dense
			p := g.P()
			if n > 0 {
				B = mat.NewDense(n, 1, nil)
				B.Copy(g.B.Slice(0, n, j, j+1))
			}
			if p > 0 {
				D = mat.NewDense(p, 1, nil)
				D.Copy(g.D.Slice(0, p, j, j+1))
			}
			s, err := lsys.NewSystem(n, 1, p, g.A, B, g.C, D, g.Ts)
			if err != nil {
				return nil, true, err
			}
			s, err = s.WithNames(g.StateNames, []string{in}, g.OutputNames)
			return s, true, err
		}
	}
	return nil, false, nil
}

// toSystem converts v to a linear system where that makes sense: systems,
// transfer functions, transfer matrices and static gains. It returns
// (nil, nil) when v is something else entirely.
func (ev *evaluator) toSystem(v any, pos syntax.Pos) (*lsys.System, error) {
	switch t := v.(type) {
	case *lsys.System:
		return t, nil
	case lsys.FirstOrder:
		// Models kept in another form (second-order structures, modal
		// models) give their first-order system where one is needed.
		return t.System()
	case *lsys.Model:
		return nil, needLinearize(t, ev, pos)
	case *lsys.Rational:
		return ev.realize([][]*lsys.Rational{{t}}, pos)
	case float64:
		return staticGain(mat.NewDense(1, 1, []float64{t}), 0)
	case *List:
		rows, ok := TransferRows(t)
		if !ok {
			return nil, nil
		}
		return ev.realize(rows, pos)
	}
	return nil, nil
}

func staticGain(d *mat.Dense, ts float64) (*lsys.System, error) {
	r, c := d.Dims()
	return lsys.NewSystem(0, c, r, nil, nil, nil, d, ts)
}

// TransferRows reads a list of lists of transfer functions and numbers.
func TransferRows(l *List) ([][]*lsys.Rational, bool) {
	var rows [][]*lsys.Rational
	for _, it := range l.Items {
		var row []*lsys.Rational
		switch r := it.(type) {
		case *List:
			for _, e := range r.Items {
				q, ok := asRational(e)
				if !ok {
					return nil, false
				}
				row = append(row, q)
			}
		case *mat.Dense:
			n, c := r.Dims()
			if c != 1 {
				return nil, false
			}
			for i := 0; i < n; i++ {
				row = append(row, lsys.Constant(r.At(i, 0)))
			}
		case *lsys.Rational:
			// A flat list: one row.
			return nil, false
		default:
			return nil, false
		}
		rows = append(rows, row)
	}
	if len(rows) == 0 {
		return nil, false
	}
	for _, r := range rows {
		if len(r) != len(rows[0]) {
			return nil, false
		}
	}
	return rows, true
}

func asRational(v any) (*lsys.Rational, bool) {
	switch t := v.(type) {
	case *lsys.Rational:
		return t, true
	case float64:
		return lsys.Constant(t), true
	}
	return nil, false
}

func (ev *evaluator) realize(rows [][]*lsys.Rational, pos syntax.Pos) (*lsys.System, error) {
	// The sample time of a transfer matrix is the one its entries in z
	// carry; entries in z whose sample time is still open, and constants,
	// take it (SPEC section 8).
	ts := 0.0
	for _, r := range rows {
		for _, q := range r {
			if q.Ts > 0 || (q.Ts < 0 && ts == 0) {
				ts = q.Ts
			}
		}
	}
	if ts < 0 {
		return nil, ev.errorAt(pos, "this transfer function in z has no sample time yet",
			"Give it one: system(H, every: 0.01), or combine it with a sampled system (Gz * (1/z)).")
	}
	if ts > 0 {
		fixed := make([][]*lsys.Rational, len(rows))
		for i, r := range rows {
			fixed[i] = make([]*lsys.Rational, len(r))
			for k, q := range r {
				if q.Ts < 0 || (q.Ts == 0 && q.IsConstant()) {
					q2 := *q
					q2.Ts = ts
					q = &q2
				}
				fixed[i][k] = q
			}
		}
		rows = fixed
	}
	if len(rows[0]) == 0 {
		return nil, ev.errorAt(pos, "a transfer matrix needs at least one column", "Write it as rows of transfer functions: [[1/(s + 1), 0], [0, 2/(s + 3)]].")
	}
	var g *lsys.System
	var info *lsys.RealizeInfo
	err := guard(func() (err error) { g, info, err = lsys.RealizeChecked(rows, ts, 0); return })
	if err != nil {
		return nil, ev.errorAt(pos, "cannot turn this transfer function into a system: "+err.Error(), "A transfer function must be proper (numerator degree at most the denominator's) to be a state-space system.")
	}
	if info != nil && info.Warning != "" && ev.out != nil {
		ev.out.Stderr(fmt.Sprintf("line %d, column %d: %s\n", pos.Line, pos.Column, info.Warning))
	}
	return g, nil
}

func entries(k int) string {
	if k == 1 {
		return "1 entry"
	}
	return fmt.Sprintf("%d entries", k)
}

// guard runs a library call and turns a panic into an error, for library
// calls made by operators (built-ins are guarded by callBuiltin).
func guard(f func() error) (err error) {
	defer func() {
		if r := recover(); r != nil {
			err = fmt.Errorf("internal failure of the library (%v); please report it with this cell", r)
		}
	}()
	return f()
}

// evalChain evaluates a binary expression and the chain of binary
// expressions down its left side (a + b + c + ... parses as a left-leaning
// tree) in a loop, not by recursion: a one-line sum of millions of terms
// would otherwise recurse millions deep and overflow the stack, which no
// recover catches.
func (ev *evaluator) evalChain(x *syntax.BinaryExpr) (any, error) {
	var chain []*syntax.BinaryExpr
	for e := x; ; {
		chain = append(chain, e)
		l, ok := e.X.(*syntax.BinaryExpr)
		if !ok || l.Op == syntax.AND || l.Op == syntax.OR {
			break
		}
		if err := ev.step(l.Pos()); err != nil {
			return nil, err
		}
		e = l
	}
	acc, err := ev.eval(chain[len(chain)-1].X)
	if err != nil {
		return nil, err
	}
	for i := len(chain) - 1; i >= 0; i-- {
		e := chain[i]
		b, err := ev.eval(e.Y)
		if err != nil {
			return nil, err
		}
		v, err := ev.binary(e.Op, acc, b, e.OpPos, e)
		if err != nil {
			return nil, err
		}
		if err := ev.checkBudget(v, e.OpPos, "this operation"); err != nil {
			return nil, err
		}
		acc = v
	}
	return acc, nil
}
