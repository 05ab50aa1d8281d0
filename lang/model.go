package lang

// Equation blocks: system [every T] { states ...; inputs ...; outputs ...;
// x' = ...; next x = ...; y = ... }.
//
// A block is compiled once, when it is evaluated: declarations and
// equations are checked, the parameters it uses are copied from the session
// (so later rebinding does not change the model), and its right-hand sides
// are evaluated over hyper-dual numbers (lsys.HyperDual). Seeding the e1
// part of one state or input gives one column of the Jacobian exactly, with
// no step size. A block whose right-hand sides are linear in the states and
// inputs gives an *lsys.System directly; otherwise an *lsys.Model that
// must be linearized at an operating point before linear analysis.

import (
	"fmt"
	"math"
	"strings"
	"weak"

	"gonum.org/v1/gonum/mat"

	"lsys/lang/syntax"
	"lsys/lsys"
)

// blockSource is a compiled equation block.
type blockSource struct {
	src                     string
	block                   *syntax.SystemBlock
	states, inputs, outputs []string
	ts                      float64
	plain                   []*syntax.Equation // outputs and helpers, in source order
	stateEq                 []*syntax.Equation // by state index
	outEq                   []*syntax.Equation // by output index; nil: the output is the state of that name
	params                  map[string]float64
	paramOrder              []string
	funcs                   map[string]*Function
	firstNL                 syntax.Expr // first nonlinear term, nil when linear
}

// describe is the value of a block whose right-hand sides are not all
// linear in the states and inputs: lsys's Model, which must be linearized
// (linearize) before linear analysis.
func (bs *blockSource) describe() *lsys.Model {
	m := &lsys.Model{
		StateNames: bs.states, InputNames: bs.inputs, OutputNames: bs.outputs, Ts: bs.ts,
		FirstNonlinear: syntax.ExprString(bs.firstNL), Line: bs.firstNL.Pos().Line, Column: bs.firstNL.Pos().Column,
	}
	for _, p := range bs.paramOrder {
		m.ParameterNames = append(m.ParameterNames, p)
		m.ParameterValues = append(m.ParameterValues, bs.params[p])
	}
	for i, s := range bs.states {
		kind := "derivative"
		if bs.stateEq[i].Kind == syntax.EqNext {
			kind = "next"
		}
		m.Equations = append(m.Equations, lsys.ModelEquation{Kind: kind, Name: s, Rhs: syntax.ExprString(bs.stateEq[i].Rhs)})
	}
	for _, e := range bs.plain {
		m.Equations = append(m.Equations, lsys.ModelEquation{Kind: "plain", Name: e.Name.Name, Rhs: syntax.ExprString(e.Rhs)})
	}
	return m
}

// modelFields are the fields of a nonlinear model.
var modelFields = []Field{
	FieldOf("states", "the state names", func(m *lsys.Model) any { return NameList(m.StateNames) }),
	FieldOf("inputs", "the input names", func(m *lsys.Model) any { return NameList(m.InputNames) }),
	FieldOf("outputs", "the output names", func(m *lsys.Model) any { return NameList(m.OutputNames) }),
	FieldOf("parameters", "the parameters the block copied from the session, as a record", func(m *lsys.Model) any {
		return &Record{Names: append([]string(nil), m.ParameterNames...), Values: numbers(m.ParameterValues)}
	}),
	FieldOf("every", "the sample time in seconds, 0 when continuous", func(m *lsys.Model) any { return m.Ts }),
}

// numbers are the values of a record of numbers.
func numbers(v []float64) []any {
	out := make([]any, len(v))
	for i, x := range v {
		out[i] = x
	}
	return out
}

// needLinearize says that m must be linearized where a linear system is
// needed.
func needLinearize(m *lsys.Model, ev *evaluator, pos syntax.Pos) error {
	return ev.errorAt(pos, fmt.Sprintf("this is a nonlinear model, not a linear system: its first nonlinear term is %s (line %d, column %d of the cell that defines it)",
		m.FirstNonlinear, m.Line, m.Column),
		"Linearize it first: linearize(model, at: {state: value, ..., input: value}); equilibrium(model, inputs: {...}) finds an operating point.")
}

// mval is a value during the evaluation of a block: a hyper-dual number
// and whether it depends on a state or an input.
type mval struct {
	x   lsys.HyperDual
	dep bool
}

// meval evaluates right-hand sides of a block.
type meval struct {
	ev         *evaluator
	bs         *blockSource
	vars       map[string]mval // states, inputs, names defined so far
	later      map[string]*syntax.Equation
	frames     []map[string]mval
	structural bool // compile pass: find nonlinear terms, skip numeric checks
	compiling  bool // resolve parameters from the session (else the snapshot)
	pseed      string
	params     map[string]float64
	depth      int
	callSite   syntax.Expr // the outermost user-function call being evaluated
}

var equationFuncs = map[string]bool{"sin": true, "cos": true, "tan": true, "exp": true, "log": true, "sqrt": true, "abs": true}

// EquationFunction reports whether the right-hand sides of equation blocks
// may call the built-in name (sin, cos, tan, exp, log, sqrt, abs).
func EquationFunction(name string) bool { return equationFuncs[name] }

// nonlinear records a nonlinear term; the first in source order wins.
// Inside a user function the term is the call in the block.
func (me *meval) nonlinear(e syntax.Expr) {
	if !me.structural {
		return
	}
	if me.callSite != nil {
		e = me.callSite
	}
	if f := me.bs.firstNL; f == nil || e.Pos().Offset < f.Pos().Offset {
		me.bs.firstNL = e
	}
}

func (me *meval) numErr(e syntax.Expr, msg string) error {
	return me.ev.errorAt(e.Pos(), msg+" at this operating point",
		"Choose another operating point, or check the equation.")
}

func (me *meval) lookup(id *syntax.Ident) (mval, error) {
	if n := len(me.frames); n > 0 {
		if v, ok := me.frames[n-1][id.Name]; ok {
			return v, nil
		}
	}
	if v, ok := me.vars[id.Name]; ok {
		return v, nil
	}
	if eq, ok := me.later[id.Name]; ok {
		return mval{}, me.ev.errorAt(id.NamePos, fmt.Sprintf("'%s' is used before its equation (line %d)", id.Name, eq.Start.Line),
			"Put the equation that defines it above this one.")
	}
	if v, ok := me.params[id.Name]; ok {
		x := lsys.Const(v)
		if id.Name == me.pseed {
			x.E2 = 1
		}
		return mval{x: x}, nil
	}
	if me.compiling {
		if v, ok := me.ev.scopeGet(id.Name); ok {
			switch t := v.(type) {
			case float64:
				me.bs.params[id.Name] = t
				me.bs.paramOrder = append(me.bs.paramOrder, id.Name)
				return mval{x: lsys.Const(t)}, nil
			case *Function:
				return mval{}, me.ev.errorAt(id.NamePos, fmt.Sprintf("'%s' is a function; call it: %s(...)", id.Name, id.Name), "Equations use numbers: call the function with arguments.")
			}
			hint := "Bind a number to it before the block, or declare it as a state or input."
			if me.ev.isLocal(id.Name) {
				hint = fmt.Sprintf("'%s' is a parameter of the function being called: call it with a number for '%s'.", id.Name, id.Name)
			}
			return mval{}, me.ev.errorAt(id.NamePos, fmt.Sprintf("'%s' is %s; a parameter in an equation must be a real number", id.Name, me.ev.typeName(v)), hint)
		}
	}
	if b, ok := me.ev.s.reg.Lookup(id.Name); ok && b.Fn == nil {
		if f, ok := b.Value.(float64); ok {
			return mval{x: lsys.Const(f)}, nil
		}
	}
	var cands []string
	cands = append(cands, me.bs.states...)
	cands = append(cands, me.bs.inputs...)
	for k := range me.vars {
		cands = append(cands, k)
	}
	for k := range me.params {
		cands = append(cands, k)
	}
	if me.compiling {
		cands = append(cands, me.ev.s.Names()...)
		if n := len(me.ev.frames); n > 0 {
			for k := range me.ev.frames[n-1] {
				cands = append(cands, k)
			}
		}
	}
	msg := fmt.Sprintf("'%s' is not a state, input or parameter of this system", id.Name)
	if c := closest(id.Name, cands); c != "" {
		kind := "a parameter"
		switch {
		case contains(me.bs.states, c):
			kind = "a state"
		case contains(me.bs.inputs, c):
			kind = "an input"
		case contains(me.bs.outputs, c):
			kind = "an output"
		}
		msg += fmt.Sprintf("; did you mean '%s' (%s)?", c, kind)
	}
	return mval{}, me.ev.errorAt(id.NamePos, msg,
		"Declare it under states or inputs, bind it as a number before the block, or fix the spelling.")
}

func contains(l []string, s string) bool {
	for _, x := range l {
		if x == s {
			return true
		}
	}
	return false
}

func (me *meval) eval(e syntax.Expr) (mval, error) {
	if err := me.ev.step(e.Pos()); err != nil {
		return mval{}, err
	}
	switch x := e.(type) {
	case *syntax.Ident:
		return me.lookup(x)
	case *syntax.NumberLit:
		if x.Imag {
			return mval{}, me.ev.errorAt(x.LitPos, "complex numbers cannot appear in equations", "States, inputs and parameters are real.")
		}
		return mval{x: lsys.Const(x.Value)}, nil
	case *syntax.UnaryExpr:
		if x.Op != syntax.SUB {
			return mval{}, me.ev.errorAt(x.OpPos, "'not' cannot appear in an equation outside an if condition", "Write if not (x > 0) then ... else ...")
		}
		v, err := me.eval(x.X)
		v.x = v.x.Neg()
		return v, err
	case *syntax.BinaryExpr:
		return me.binary(x)
	case *syntax.CallExpr:
		return me.call(x)
	case *syntax.IfExpr:
		c, dep, err := me.cond(x.Cond)
		if err != nil {
			return mval{}, err
		}
		if dep {
			me.nonlinear(x)
		}
		var v mval
		if c {
			v, err = me.eval(x.Then)
		} else {
			v, err = me.eval(x.Else)
		}
		v.dep = v.dep || dep
		return v, err
	case *syntax.FieldExpr:
		// A field of a record bound in the session is a parameter named
		// by its path, e.g. "p.k".
		key := syntax.ExprString(x)
		if v, ok := me.params[key]; ok {
			h := lsys.Const(v)
			if key == me.pseed {
				h.E2 = 1
			}
			return mval{x: h}, nil
		}
		if me.compiling {
			v, err := me.ev.eval(x)
			if err != nil {
				return mval{}, err
			}
			if f, ok := v.(float64); ok {
				me.bs.params[key] = f
				me.bs.paramOrder = append(me.bs.paramOrder, key)
				return mval{x: lsys.Const(f)}, nil
			}
			return mval{}, me.ev.errorAt(x.Name.NamePos, fmt.Sprintf("%s is %s; equations need real numbers", key, me.ev.typeName(v)), "Use a field that holds a number.")
		}
	}
	return mval{}, me.ev.errorAt(e.Pos(), fmt.Sprintf("%s cannot appear in an equation", syntax.ExprString(e)),
		"Equations use numbers, names, + - * / ^, and sin, cos, tan, exp, log, sqrt, abs.")
}

func (me *meval) cond(e syntax.Expr) (bool, bool, error) {
	switch x := e.(type) {
	case *syntax.BoolLit:
		return x.Value, false, nil
	case *syntax.UnaryExpr:
		if x.Op == syntax.NOT {
			b, dep, err := me.cond(x.X)
			return !b, dep, err
		}
	case *syntax.BinaryExpr:
		switch x.Op {
		case syntax.AND, syntax.OR:
			a, da, err := me.cond(x.X)
			if err != nil {
				return false, false, err
			}
			b, db, err := me.cond(x.Y)
			if err != nil {
				return false, false, err
			}
			if x.Op == syntax.AND {
				return a && b, da || db, nil
			}
			return a || b, da || db, nil
		case syntax.LSS, syntax.LEQ, syntax.GTR, syntax.GEQ, syntax.EQL, syntax.NEQ:
			a, err := me.eval(x.X)
			if err != nil {
				return false, false, err
			}
			b, err := me.eval(x.Y)
			if err != nil {
				return false, false, err
			}
			av, bv := a.x.V, b.x.V
			r := map[syntax.Token]bool{syntax.LSS: av < bv, syntax.LEQ: av <= bv, syntax.GTR: av > bv, syntax.GEQ: av >= bv, syntax.EQL: av == bv, syntax.NEQ: av != bv}[x.Op]
			return r, a.dep || b.dep, nil
		}
	}
	return false, false, me.ev.errorAt(e.Pos(), "the condition of 'if' must be a comparison", "Write it like if angle > 0 then ... else ...")
}

func (me *meval) binary(x *syntax.BinaryExpr) (mval, error) {
	switch x.Op {
	case syntax.ADD, syntax.SUB, syntax.MUL, syntax.DIV, syntax.POW:
	default:
		return mval{}, me.ev.errorAt(x.OpPos, fmt.Sprintf("'%s' gives true or false, which an equation cannot use", x.Op), "Use it inside if ... then ... else ...")
	}
	a, err := me.eval(x.X)
	if err != nil {
		return mval{}, err
	}
	b, err := me.eval(x.Y)
	if err != nil {
		return mval{}, err
	}
	dep := a.dep || b.dep
	var r lsys.HyperDual
	switch x.Op {
	case syntax.ADD:
		r = a.x.Add(b.x)
	case syntax.SUB:
		r = a.x.Sub(b.x)
	case syntax.MUL:
		if a.dep && b.dep {
			me.nonlinear(x)
		}
		r = a.x.Mul(b.x)
	case syntax.DIV:
		if b.dep {
			me.nonlinear(x)
		}
		if b.x.V == 0 && !me.structural {
			return mval{}, me.numErr(x, "division by zero")
		}
		r = a.x.Div(b.x)
	case syntax.POW:
		if b.dep {
			me.nonlinear(x)
			if a.x.V <= 0 && !me.structural {
				return mval{}, me.numErr(x, "a power with a variable exponent needs a positive base")
			}
			r = a.x.Pow(b.x)
		} else {
			p := b.x.V
			switch {
			case !a.dep:
			case p == 1:
			case p == 0:
				dep = false
			default:
				me.nonlinear(x)
			}
			if !me.structural && p != math.Trunc(p) && a.x.V < 0 {
				return mval{}, me.numErr(x, fmt.Sprintf("a negative number to the power %s", FormatNumber(p)))
			}
			if !me.structural && p < 0 && a.x.V == 0 {
				return mval{}, me.numErr(x, "zero to a negative power")
			}
			r = a.x.PowReal(p)
		}
	}
	if !me.structural && !r.IsFinite() {
		return mval{}, me.numErr(x, "the result is not a finite number")
	}
	return mval{x: r, dep: dep}, nil
}

func (me *meval) call(x *syntax.CallExpr) (mval, error) {
	id, ok := x.Fun.(*syntax.Ident)
	if !ok {
		return mval{}, me.ev.errorAt(x.Pos(), "only named functions can be called in an equation", "Call sin, cos, tan, exp, log, sqrt, abs or a function you defined with f(x) = ...")
	}
	// A user function: bound in the session when the block is compiled.
	var f *Function
	if fn, ok := me.bs.funcs[id.Name]; ok {
		f = fn
	} else if me.compiling {
		if v, ok := me.ev.scopeGet(id.Name); ok {
			if fn, ok := v.(*Function); ok {
				f = fn
				me.bs.funcs[id.Name] = fn
			}
		}
	}
	if f != nil {
		for _, a := range x.Args {
			if a.Name != nil {
				return mval{}, me.ev.errorAt(a.Name.NamePos, "named arguments are not allowed in equations", "Pass the arguments in order.")
			}
		}
		if len(x.Args) != len(f.Params) {
			return mval{}, me.ev.errorAt(x.Lparen, fmt.Sprintf("%s takes %s, not %d", f.Name, Plural(len(f.Params), "argument"), len(x.Args)), fmt.Sprintf("It is defined as %s.", f))
		}
		frame := map[string]mval{}
		for i, a := range x.Args {
			v, err := me.eval(a.Value)
			if err != nil {
				return mval{}, err
			}
			frame[f.Params[i]] = v
		}
		if me.depth >= me.ev.s.limits.Depth {
			return mval{}, me.ev.errorAt(x.Pos(), fmt.Sprintf("functions call each other more than %d levels deep", me.ev.s.limits.Depth), "Look for a function that calls itself without reaching its end case.")
		}
		me.depth++
		me.frames = append(me.frames, frame)
		oldSrc, oldSite := me.ev.src, me.callSite
		me.ev.src = f.src
		if me.callSite == nil {
			me.callSite = x
		}
		v, err := me.eval(f.Body)
		me.ev.src, me.callSite = oldSrc, oldSite
		me.frames = me.frames[:len(me.frames)-1]
		me.depth--
		return v, err
	}
	if !equationFuncs[id.Name] {
		return mval{}, me.ev.errorAt(id.NamePos, fmt.Sprintf("'%s' cannot be used in an equation", id.Name),
			"Equations may call sin, cos, tan, exp, log, sqrt, abs and user functions of numbers.")
	}
	if len(x.Args) != 1 || x.Args[0].Name != nil {
		return mval{}, me.ev.errorAt(x.Lparen, fmt.Sprintf("%s takes one argument", id.Name), fmt.Sprintf("Write %s(x).", id.Name))
	}
	a, err := me.eval(x.Args[0].Value)
	if err != nil {
		return mval{}, err
	}
	if a.dep {
		me.nonlinear(x)
	}
	v := a.x.V
	if !me.structural {
		switch {
		case id.Name == "log" && v <= 0:
			return mval{}, me.numErr(x, fmt.Sprintf("log of %s", FormatNumber(v)))
		case id.Name == "sqrt" && v < 0:
			return mval{}, me.numErr(x, fmt.Sprintf("sqrt of %s", FormatNumber(v)))
		case id.Name == "sqrt" && v == 0 && a.dep:
			return mval{}, me.numErr(x, "sqrt has no derivative at 0")
		}
	}
	var r lsys.HyperDual
	switch id.Name {
	case "sin":
		r = a.x.Sin()
	case "cos":
		r = a.x.Cos()
	case "tan":
		r = a.x.Tan()
	case "exp":
		r = a.x.Exp()
	case "log":
		r = a.x.Log()
	case "sqrt":
		r = a.x.Sqrt()
	case "abs":
		r = a.x.Abs()
	}
	if !me.structural && !r.IsFinite() {
		return mval{}, me.numErr(x, "the result is not a finite number")
	}
	return mval{x: r, dep: a.dep}, nil
}

// evalSystemBlock compiles a block into a system or a nonlinear model.
func (ev *evaluator) evalSystemBlock(b *syntax.SystemBlock) (any, error) {
	bs, err := ev.compileBlock(b)
	if err != nil {
		return nil, err
	}
	if bs.firstNL != nil {
		m := bs.describe()
		remember(ev.s, ev.s.models, m, bs)
		return m, nil
	}
	n, m := len(bs.states), len(bs.inputs)
	x := make([]float64, n)
	u := make([]float64, m)
	// Constant parts: a linear system has none.
	f0, y0, err := bs.evalAt(ev, x, u, -1, "", nil)
	if err != nil {
		return nil, err
	}
	check := func(eq *syntax.Equation, v lsys.HyperDual, name string) error {
		if v.V != 0 {
			return ev.errorAt(eq.Rhs.Pos(), fmt.Sprintf("the equation for '%s' has a constant part (%s) that depends on no state or input", name, FormatNumber(v.V)),
				"A linear system has no constant terms: make it an input (inputs load; ... + load), or measure the variable from its operating point.")
		}
		return nil
	}
	for i, eq := range bs.stateEq {
		if err := check(eq, f0[i], bs.states[i]); err != nil {
			return nil, err
		}
	}
	for i, eq := range bs.outEq {
		if eq != nil {
			if err := check(eq, y0[i], bs.outputs[i]); err != nil {
				return nil, err
			}
		}
	}
	A, B, C, D, err := bs.jacobians(ev, x, u, "", nil)
	if err != nil {
		return nil, err
	}
	g, err := bs.system(A, B, C, D)
	if err != nil {
		return nil, ev.errorAt(b.SystemPos, err.Error(), "Check the parameters: a coefficient is not a finite number.")
	}
	remember(ev.s, ev.s.sources, g, bs)
	return g, nil
}

func (bs *blockSource) system(A, B, C, D *mat.Dense) (*lsys.System, error) {
	g, err := lsys.NewSystem(len(bs.states), len(bs.inputs), len(bs.outputs), A, B, C, D, bs.ts)
	if err != nil {
		return nil, err
	}
	return g.WithNames(bs.states, bs.inputs, bs.outputs)
}

// evalAt evaluates every right-hand side at states x and inputs u. seed is
// the index (states first, then inputs) whose e1 part is seeded, -1 for
// none; pseed names the parameter whose e2 part is seeded. params replaces
// the parameter values when not nil.
func (bs *blockSource) evalAt(ev *evaluator, x, u []float64, seed int, pseed string, params map[string]float64) (f, y []lsys.HyperDual, err error) {
	if params == nil {
		params = bs.params
	}
	me := &meval{ev: ev, bs: bs, vars: map[string]mval{}, later: map[string]*syntax.Equation{}, pseed: pseed, params: params}
	oldSrc, oldWhere := ev.src, ev.where
	ev.src = bs.src
	if ev.where == "" {
		ev.where = "in the equations of the model"
	}
	defer func() { ev.src, ev.where = oldSrc, oldWhere }()
	for i, s := range bs.states {
		v := lsys.Const(x[i])
		if seed == i {
			v.E1 = 1
		}
		me.vars[s] = mval{x: v, dep: true}
	}
	for j, s := range bs.inputs {
		v := lsys.Const(u[j])
		if seed == len(bs.states)+j {
			v.E1 = 1
		}
		me.vars[s] = mval{x: v, dep: true}
	}
	for _, eq := range bs.plain {
		me.later[eq.Name.Name] = eq
	}
	for _, eq := range bs.plain {
		delete(me.later, eq.Name.Name)
		v, err := me.eval(eq.Rhs)
		if err != nil {
			return nil, nil, err
		}
		me.vars[eq.Name.Name] = v
	}
	f = make([]lsys.HyperDual, len(bs.states))
	for i, eq := range bs.stateEq {
		v, err := me.eval(eq.Rhs)
		if err != nil {
			return nil, nil, err
		}
		f[i] = v.x
	}
	y = make([]lsys.HyperDual, len(bs.outputs))
	for i, o := range bs.outputs {
		y[i] = me.vars[o].x
	}
	return f, y, nil
}

// jacobians returns A = df/dx, B = df/du, C = dg/dx, D = dg/du at (x, u)
// (lsys.Jacobians: one forward pass of the block per state and input).
// With pseed set it returns the derivatives of those matrices with respect
// to that parameter instead.
func (bs *blockSource) jacobians(ev *evaluator, x, u []float64, pseed string, params map[string]float64) (A, B, C, D *mat.Dense, err error) {
	return lsys.Jacobians(len(bs.states), len(bs.inputs), len(bs.outputs), pseed != "", func(seed int) (f, y []lsys.HyperDual, err error) {
		return bs.evalAt(ev, x, u, seed, pseed, params)
	})
}

// compileBlock checks a block's declarations and equations and finds its
// parameters and its first nonlinear term.
func (ev *evaluator) compileBlock(b *syntax.SystemBlock) (*blockSource, error) {
	bs := &blockSource{src: ev.src, block: b, params: map[string]float64{}, funcs: map[string]*Function{}}
	if b.Every != nil {
		v, err := ev.eval(b.Every)
		if err != nil {
			return nil, err
		}
		t, ok := v.(float64)
		if !ok || !(t > 0) || math.IsInf(t, 0) {
			return nil, ev.errorAt(b.Every.Pos(), fmt.Sprintf("the sample time must be a positive number of seconds, not %s", FormatValue(v)),
				"Write system every 0.01 { ... }.")
		}
		bs.ts = t
	}
	kindOf := map[string]string{}
	declPos := map[string]syntax.Pos{}
	stateOut := map[string]bool{} // outputs that are states of the same name
	var eqs []*syntax.Equation
	for _, it := range b.Items {
		switch d := it.(type) {
		case *syntax.Decl:
			for _, id := range d.Names {
				kind := strings.TrimSuffix(d.Kind, "s")
				// An output named like a state is that state (y = x), as
				// the matrix form names outputs after the states it reads.
				if prev := kindOf[id.Name]; prev == "state" && kind == "output" && !stateOut[id.Name] {
					stateOut[id.Name] = true
					bs.outputs = append(bs.outputs, id.Name)
					continue
				} else if prev == "output" && kind == "state" && !stateOut[id.Name] {
					stateOut[id.Name] = true
					kindOf[id.Name] = "state"
					bs.states = append(bs.states, id.Name)
					continue
				}
				if prev, dup := kindOf[id.Name]; dup {
					what := "twice"
					if prev != kind && !stateOut[id.Name] {
						what = fmt.Sprintf("as %s and as %s", article(prev), article(kind))
					}
					return nil, ev.errorAt(id.NamePos, fmt.Sprintf("'%s' is declared %s (first at line %d, column %d)", id.Name, what, declPos[id.Name].Line, declPos[id.Name].Column),
						"States, inputs and outputs need distinct names.")
				}
				if equationFuncs[id.Name] {
					return nil, ev.errorAt(id.NamePos, fmt.Sprintf("'%s' is a function that equations use", id.Name), "Choose another name for the signal.")
				}
				kindOf[id.Name] = kind
				declPos[id.Name] = id.NamePos
				switch kind {
				case "state":
					bs.states = append(bs.states, id.Name)
				case "input":
					bs.inputs = append(bs.inputs, id.Name)
				case "output":
					bs.outputs = append(bs.outputs, id.Name)
				}
			}
		case *syntax.Equation:
			eqs = append(eqs, d)
		}
	}
	bs.stateEq = make([]*syntax.Equation, len(bs.states))
	bs.outEq = make([]*syntax.Equation, len(bs.outputs))
	stateIdx := indexOf(bs.states)
	outIdx := indexOf(bs.outputs)
	helpers := map[string]*syntax.Equation{}
	var firstTimeEq *syntax.Equation
	for _, eq := range eqs {
		name := eq.Name.Name
		switch eq.Kind {
		case syntax.EqDerivative, syntax.EqNext:
			if firstTimeEq != nil && firstTimeEq.Kind != eq.Kind {
				return nil, ev.errorAt(eq.Start, fmt.Sprintf("continuous (x' = ...) and sampled (next x = ...) equations are mixed; line %d has the other kind", firstTimeEq.Start.Line),
					"A block is either continuous (x' = ...) or sampled (system every T { next x = ... }).")
			}
			if firstTimeEq == nil {
				firstTimeEq = eq
			}
			if eq.Kind == syntax.EqDerivative && bs.ts > 0 {
				return nil, ev.errorAt(eq.Start, fmt.Sprintf("%s' = ... is a continuous-time equation, but this system is sampled (every %s)", name, FormatNumber(bs.ts)),
					fmt.Sprintf("In a sampled system write next %s = ...", name))
			}
			if eq.Kind == syntax.EqNext && bs.ts == 0 {
				return nil, ev.errorAt(eq.Start, fmt.Sprintf("next %s = ... is a sampled equation, but this system is continuous", name),
					"Give the sample time: system every 0.01 { ... }, or write "+name+"' = ... for a continuous system.")
			}
			i, ok := stateIdx[name]
			if !ok {
				switch kindOf[name] {
				case "input":
					return nil, ev.errorAt(eq.Name.NamePos, fmt.Sprintf("'%s' is an input; inputs come from outside and have no equation", name), "Declare it as a state if the system computes it.")
				case "output":
					return nil, ev.errorAt(eq.Name.NamePos, fmt.Sprintf("'%s' is an output; write %s = ...", name, name), "Outputs are defined by plain equations; only states have x' = ... or next x = ...")
				}
				return nil, ev.errorAt(eq.Name.NamePos, fmt.Sprintf("'%s' is not a declared state%s", name, DidYouMean(name, bs.states)),
					fmt.Sprintf("Declare it: states %s, ...", name))
			}
			if prev := bs.stateEq[i]; prev != nil {
				return nil, ev.errorAt(eq.Start, fmt.Sprintf("a second equation for the state '%s' (the first is at line %d)", name, prev.Start.Line),
					"Each state has exactly one equation.")
			}
			bs.stateEq[i] = eq
		case syntax.EqPlain:
			switch kindOf[name] {
			case "state":
				d := name + "' = ..."
				if bs.ts > 0 {
					d = "next " + name + " = ..."
				}
				hint := "To output a state, declare it as an output too (outputs " + name + "): the output is the state itself."
				if stateOut[name] {
					hint = "The output '" + name + "' is the state itself and needs no equation; to output something else, give that output another name."
				}
				return nil, ev.errorAt(eq.Name.NamePos, fmt.Sprintf("'%s' is a state; its equation is written %s", name, d), hint)
			case "input":
				return nil, ev.errorAt(eq.Name.NamePos, fmt.Sprintf("'%s' is an input; inputs come from outside and have no equation", name), "Declare it as a state or a helper if the system computes it.")
			}
			if prev, dup := helpers[name]; dup {
				return nil, ev.errorAt(eq.Start, fmt.Sprintf("'%s' is defined twice (first at line %d)", name, prev.Start.Line), "Give it one equation.")
			}
			if equationFuncs[name] {
				return nil, ev.errorAt(eq.Name.NamePos, fmt.Sprintf("'%s' is a function that equations use", name), "Choose another name.")
			}
			helpers[name] = eq
			if i, ok := outIdx[name]; ok {
				bs.outEq[i] = eq
			}
			bs.plain = append(bs.plain, eq)
		}
	}
	for i, s := range bs.states {
		if bs.stateEq[i] == nil {
			d := s + "' = ..."
			if bs.ts > 0 {
				d = "next " + s + " = ..."
			}
			return nil, ev.errorAt(declPos[s], fmt.Sprintf("the state '%s' has no equation", s), "Add "+d)
		}
	}
	for i, o := range bs.outputs {
		if bs.outEq[i] == nil && !stateOut[o] {
			var defined []string
			for _, e := range bs.plain {
				defined = append(defined, e.Name.Name)
			}
			return nil, ev.errorAt(declPos[o], fmt.Sprintf("the output '%s' is never defined%s", o, DidYouMean(o, defined)),
				fmt.Sprintf("Add %s = ... (an expression of states and inputs), or remove it from outputs.", o))
		}
	}
	if len(bs.outputs) == 0 {
		// No outputs declared: every state is an output.
		for _, s := range bs.states {
			bs.outputs = append(bs.outputs, s)
			bs.outEq = append(bs.outEq, nil)
		}
	}
	if len(bs.states) == 0 && len(bs.outputs) == 0 {
		return nil, ev.errorAt(b.SystemPos, "the system has no states and no outputs", "Declare them: states angle, rate / outputs angle.")
	}
	// A signal named like a number bound in the session hides it inside
	// the block; say so, since the number may have been meant as a
	// parameter.
	var hidden []string
	seenHidden := map[string]bool{}
	for _, names := range [][]string{bs.states, bs.inputs, bs.outputs} {
		for _, n := range names {
			if seenHidden[n] {
				continue
			}
			seenHidden[n] = true
			if v, ok := ev.scopeGet(n); ok {
				if _, num := v.(float64); num {
					hidden = append(hidden, fmt.Sprintf("'%s' (= %s)", n, FormatValue(v)))
				}
			}
		}
	}
	if len(hidden) > 0 && ev.out != nil {
		ev.out.Stderr(fmt.Sprintf("note (line %d): inside this system block the signal names %s hide numbers bound in the session; they are signals here, not parameters\n",
			b.SystemPos.Line, strings.Join(hidden, ", ")))
	}
	// Structural pass at the origin: resolves every name (copying the
	// parameters from the session) and finds the first nonlinear term.
	me := &meval{ev: ev, bs: bs, vars: map[string]mval{}, later: map[string]*syntax.Equation{}, structural: true, compiling: true, params: bs.params}
	for _, s := range bs.states {
		me.vars[s] = mval{dep: true}
	}
	for _, s := range bs.inputs {
		me.vars[s] = mval{dep: true}
	}
	for _, eq := range bs.plain {
		me.later[eq.Name.Name] = eq
	}
	for _, eq := range bs.plain {
		delete(me.later, eq.Name.Name)
		v, err := me.eval(eq.Rhs)
		if err != nil {
			return nil, err
		}
		me.vars[eq.Name.Name] = v
	}
	for _, eq := range bs.stateEq {
		if _, err := me.eval(eq.Rhs); err != nil {
			return nil, err
		}
	}
	return bs, nil
}

// outputValue: an output without an equation (no outputs declared) is the
// state of the same name; evalAt finds it in vars.

func indexOf(l []string) map[string]int {
	m := make(map[string]int, len(l))
	for i, s := range l {
		m[s] = i
	}
	return m
}

func article(kind string) string {
	if kind == "input" || kind == "output" {
		return "an " + kind
	}
	return "a " + kind
}

// scopeGet looks a name up where the block is evaluated: the parameters of
// the user function being called (so family(k) = system { ... k ... }
// works), then the session.
func (ev *evaluator) scopeGet(name string) (any, bool) {
	if n := len(ev.frames); n > 0 {
		if v, ok := ev.frames[n-1][name]; ok {
			return v, true
		}
	}
	return ev.s.Get(name)
}

func (ev *evaluator) isLocal(name string) bool {
	if n := len(ev.frames); n > 0 {
		_, ok := ev.frames[n-1][name]
		return ok
	}
	return false
}

// sourceOf returns the compiled block behind v: a nonlinear model, or a
// system built from an equation block in this session.
func (s *Session) sourceOf(v any) (*blockSource, bool) {
	switch t := v.(type) {
	case *lsys.Model:
		s.mu.RLock()
		defer s.mu.RUnlock()
		bs, ok := s.models[weak.Make(t)]
		return bs, ok
	case *lsys.System:
		s.mu.RLock()
		defer s.mu.RUnlock()
		bs, ok := s.sources[weak.Make(t)]
		return bs, ok
	}
	return nil, false
}

// Block is what built-ins see of an equation block: its signals and
// parameters, and its right-hand sides and their exact Jacobians at an
// operating point (evaluated in the calling cell, so errors in the
// equations point at the block's own lines).
type Block struct {
	bs *blockSource
	ev *evaluator
}

// Block returns the equation block behind v: a nonlinear model, or a
// system built from an equation block in this session.
func (c *Call) Block(v any) (*Block, bool) {
	bs, ok := c.ev.s.sourceOf(v)
	if !ok {
		return nil, false
	}
	return &Block{bs: bs, ev: c.ev}, true
}

// States, Inputs and Outputs are the block's signal names in declaration
// order (every state when no outputs are declared). Do not modify them.
func (b *Block) States() []string  { return b.bs.states }
func (b *Block) Inputs() []string  { return b.bs.inputs }
func (b *Block) Outputs() []string { return b.bs.outputs }

// Every is the sample time, 0 for a continuous block.
func (b *Block) Every() float64 { return b.bs.ts }

// Parameters are the names of the numbers the block copied from the
// session, in the order its equations first use them.
func (b *Block) Parameters() []string { return b.bs.paramOrder }

// Parameter is the value the block holds for a parameter.
func (b *Block) Parameter(name string) (float64, bool) {
	v, ok := b.bs.params[name]
	return v, ok
}

// Linear reports whether every right-hand side is linear in the states and
// inputs.
func (b *Block) Linear() bool { return b.bs.firstNL == nil }

// Eval evaluates the block at states x and inputs u: the state equations'
// right-hand sides dx (x', or next x when sampled) and the outputs y.
func (b *Block) Eval(x, u []float64) (dx, y []float64, err error) {
	f, g, err := b.bs.evalAt(b.ev, x, u, -1, "", nil)
	if err != nil {
		return nil, nil, err
	}
	dx = make([]float64, len(f))
	for i := range f {
		dx[i] = f[i].V
	}
	y = make([]float64, len(g))
	for i := range g {
		y[i] = g[i].V
	}
	return dx, y, nil
}

// Feedthrough reports whether some output depends on some input at (x, u)
// (a nonzero derivative), which would make a loop closed around the model
// algebraic.
func (b *Block) Feedthrough(x, u []float64) (bool, error) {
	for j := range u {
		_, y, err := b.bs.evalAt(b.ev, x, u, len(x)+j, "", nil)
		if err != nil {
			return false, err
		}
		for _, v := range y {
			if v.E1 != 0 {
				return true, nil
			}
		}
	}
	return false, nil
}

// Jacobians returns A = df/dx, B = df/du, C = dg/dx, D = dg/du at (x, u),
// exact (dual numbers). With param set it returns the derivatives of those
// matrices with respect to that parameter instead.
func (b *Block) Jacobians(x, u []float64, param string) (A, B, C, D *mat.Dense, err error) {
	return b.bs.jacobians(b.ev, x, u, param, nil)
}

// System is the linear system with the given matrices and the block's
// signal names and sample time.
func (b *Block) System(A, B, C, D *mat.Dense) (*lsys.System, error) {
	return b.bs.system(A, B, C, D)
}
