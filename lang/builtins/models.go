package builtins

// Built-ins for equation models: linearize, equilibrium, sensitivity and
// locus.

import (
	"errors"
	"fmt"
	"math"
	"slices"
	"strings"
	"time"

	"gonum.org/v1/gonum/mat"

	"lsys/lang"
	"lsys/lsys"
)

func init() {
	for _, b := range modelBuiltins() {
		register(b)
	}
	registerType((*lsys.Sensitivity)(nil), lang.TypeInfo{Name: "an eigenvalue sensitivity table", Fields: []lang.Field{
		lang.FieldOf("eigenvalues", "the eigenvalues, a complex vector", func(s *lsys.Sensitivity) any { return complexList(s.Eigenvalues) }),
		lang.FieldOf("parameters", "the parameter names", func(s *lsys.Sensitivity) any { return lang.NameList(s.Parameters) }),
		lang.FieldOf("values", "the parameter values", func(s *lsys.Sensitivity) any { return lang.RealVector(s.Values) }),
		lang.FieldOf("derivatives", "d eigenvalue / d parameter, one row per eigenvalue, one column per parameter", func(s *lsys.Sensitivity) any {
			return sensitivityMatrix(s, func(k, j int) complex128 { return s.D[k][j] })
		}),
		lang.FieldOf("relative", "(p / eigenvalue) d eigenvalue / dp: the relative change per relative change of the parameter", func(s *lsys.Sensitivity) any {
			return sensitivityMatrix(s, s.Relative)
		}),
		lang.FieldOf("condition", "the condition number of each eigenvalue", func(s *lsys.Sensitivity) any { return lang.RealVector(s.Cond) }),
	}})
	registerType((*lsys.Locus)(nil), lang.TypeInfo{Name: "a locus", Fields: []lang.Field{
		lang.FieldOf("parameter", "the parameter's name", func(l *lsys.Locus) any { return l.Parameter }),
		lang.FieldOf("values", "the parameter values", func(l *lsys.Locus) any { return lang.RealVector(l.Values) }),
		lang.FieldOf("branches", "one complex vector of eigenvalues per parameter value", func(l *lsys.Locus) any {
			out := &lang.List{}
			for _, b := range l.Branches {
				out.Items = append(out.Items, complexList(b))
			}
			return out
		}),
	}})
}

// sensitivityMatrix is a complex eigenvalue-by-parameter matrix; nil when
// there are no eigenvalues or no parameters.
func sensitivityMatrix(s *lsys.Sensitivity, at func(k, j int) complex128) any {
	if len(s.Eigenvalues) == 0 || len(s.Parameters) == 0 {
		return nil
	}
	m := mat.NewCDense(len(s.Eigenvalues), len(s.Parameters), nil)
	for k := range s.Eigenvalues {
		for j := range s.Parameters {
			m.Set(k, j, at(k, j))
		}
	}
	return m
}

func complexList(v []complex128) any {
	m := mat.NewCDense(len(v), 1, nil)
	for i, c := range v {
		m.Set(i, 0, c)
	}
	return m
}

const pendulumExample = `g = 9.81; len = 0.5; damping = 0.2
pendulum = system {
  states angle, rate
  inputs torque
  outputs tip
  angle' = rate
  rate' = -g/len*sin(angle) - damping*rate + torque
  tip = len*sin(angle)
}
`

func modelBuiltins() []*lang.Builtin {
	return []*lang.Builtin{
		{
			Name: "linearize", Group: lang.GroupModels,
			Params: []lang.Param{
				{Name: "model", Doc: "a nonlinear model (an equation block)"},
				{Name: "at", Optional: true, Doc: "the operating point: a record with a value for every state and input, or an equilibrium"},
			},
			Help: "The linear system of a nonlinear model at an operating point, with exact Jacobians.",
			Doc: "The matrices A = df/dx, B = df/du, C = dg/dx, D = dg/du are computed by forward-mode automatic differentiation " +
				"(dual numbers): exact up to rounding, with no step size. The states, inputs and outputs of the result are deviations from " +
				"the operating point. A linear system is returned as it is.",
			Examples: []string{pendulumExample + "linearize(pendulum, at: {angle: pi, rate: 0, torque: 0})"},
			Fn:       linearizeFn,
		},
		{
			Name: "equilibrium", Group: lang.GroupModels,
			Returns: (*lsys.Equilibrium)(nil),
			Params: []lang.Param{
				{Name: "model", Doc: "an equation block (nonlinear model or linear system), or a system in matrix form"},
				{Name: "inputs", Optional: true, Doc: "a record with the constant input values; inputs left out are 0"},
				{Name: "guess", Optional: true, Doc: "a record with starting values for the states; states left out start at 0"},
			},
			Help: "A steady state of a model for constant inputs, by Newton's method with a line search.",
			Doc: "Solves f(x, u) = 0 (continuous) or f(x, u) = x (sampled) for the states x. The Jacobian comes from automatic " +
				"differentiation; each Newton step is shortened until the residual falls (Armijo's rule, Dennis & Schnabel, " +
				"Numerical Methods for Unconstrained Optimization and Nonlinear Equations, 1983, section 6.3). The result gives " +
				"the states, the inputs, the residual max|f| and the number of steps, and can be passed to linearize(model, at: ...). " +
				"When Newton fails, the error says why: a singular Jacobian, a line search that cannot reduce the residual, or too many steps. " +
				"When the Jacobian df/dx at the result is singular (rank decided by its singular values, those at or below 1e-12 x the largest counting as zero), " +
				"the steady state is not unique: it is one member of a family, the display says so, and `e.free` holds the free directions " +
				"(an orthonormal basis of the null space, one column each, one row per state), `e.unique` is false and `e.rank` the rank.",
			Examples: []string{pendulumExample + "e = equilibrium(pendulum, inputs: {torque: 0}, guess: {angle: 3})\nlinearize(pendulum, at: e)"},
			Fn:       equilibriumFn,
		},
		{
			Name: "sensitivity", Group: lang.GroupModels,
			Returns: (*lsys.Sensitivity)(nil),
			Params: []lang.Param{
				{Name: "model", Doc: "an equation block: a system built from one, or a nonlinear model"},
				{Name: "parameters", Optional: true, Doc: `names of parameters used in the block, as strings: ["k", "b"]; left out: every parameter of the block`},
				{Name: "at", Optional: true, Doc: "operating point (nonlinear models only)"},
			},
			Help: "How fast each eigenvalue moves with each named parameter: d(eigenvalue)/d(parameter).",
			Doc: "For each mode, d lambda/dp = w^H (dA/dp) v / (w^H v) with v, w the right and left eigenvectors of A. dA/dp is " +
				"exact: second derivatives of the equations by hyper-dual numbers (Fike & Alonso 2011). A defective eigenvalue has no " +
				"derivative and is marked undefined. The parameters are the values the block used when it was evaluated: numbers bound " +
				"in the session and the parameters of the function whose body holds the block. So for a family f(k) = system { ... } " +
				"write sensitivity(f(5), [\"k\"]): the sensitivities at k = 5. Left out, the list is every parameter of the block. " +
				"The table also gives the relative sensitivity (p/|lambda|) d lambda/dp, the relative change of the eigenvalue per " +
				"relative change of the parameter, which ranks parameters whatever their units.",
			Examples: []string{"k = 4; b = 0.4; mass = 1\naxis = system {\n  states position, velocity\n  inputs force\n  position' = velocity\n  velocity' = (force - k*position - b*velocity) / mass\n}\nsensitivity(axis, [\"k\", \"b\"])",
				"mass = 1; b = 0.4\nmount(k) = system {\n  states position, velocity\n  inputs force\n  position' = velocity\n  velocity' = (force - k*position - b*velocity) / mass\n}\nsensitivity(mount(5))"},
			Fn: sensitivityFn,
		},
		{
			Name: "locus", Group: lang.GroupModels,
			Returns: (*lsys.Locus)(nil),
			Params: []lang.Param{
				{Name: "family", Doc: "a function of one parameter that gives a system, e.g. f(k) = closeloop(G, through: k)"},
			},
			AnyNamed: true,
			Help:     "How the modes of f(k) move as the parameter k runs over values: locus(f, k: linear(0, 10)).",
			Doc: "The named argument gives the parameter's name (that of the function's parameter) and its values. At each value the " +
				"eigenvalues of the system are matched to those of the previous value by a minimum-distance assignment (Kuhn 1955), so " +
				"each branch follows one mode, even where modes cross. Long sweeps show their progress. The function's body may be an " +
				"equation block: its parameter counts as a parameter of the block. The chart draws each branch from a cross at the " +
				"first value to a square at the last, over the damping and frequency grid, with arrowheads for the direction and the parameter value at a few points; the table says where a mode crosses the stability boundary.",
			Examples: []string{"axis(k) = system([[0, 1], [-k, -0.4]], [0, 1], [1, 0])\nlocus(axis, k: linear(1, 10, n: 20))",
				"mass = 1; b = 0.4\nmount(k) = system {\n  states position, velocity\n  inputs force\n  position' = velocity\n  velocity' = (force - k*position - b*velocity) / mass\n}\nlocus(mount, k: linear(0.01, 1, n: 40))"},
			Fn: locusFn,
		},
	}
}

// operatingPoint reads the values of the states and inputs from a record
// or an equilibrium.
func operatingPoint(c *lang.Call, name string, bs *lang.Block, needAll bool) (x, u []float64, err error) {
	v := c.Value(name)
	var rec *lang.Record
	switch t := v.(type) {
	case *lang.Record:
		rec = t
	case *lsys.Equilibrium:
		rec = equilibriumPoint(t)
	default:
		return nil, nil, c.TypeError(name, "a record such as {angle: 0, rate: 0, torque: 0}, or an equilibrium", v)
	}
	known := append(append([]string(nil), bs.States()...), bs.Inputs()...)
	for i, n := range rec.Names {
		if !slices.Contains(known, n) {
			return nil, nil, c.Errorf(name, "Give values for the states and inputs only: "+strings.Join(known, ", ")+".",
				"'%s' is not a state or input of this model%s", n, lang.DidYouMean(n, known))
		}
		if _, ok := rec.Values[i].(float64); !ok {
			return nil, nil, c.Errorf(name, "", "the value of '%s' must be a real number, not %s", n, c.TypeName(rec.Values[i]))
		}
		if f := rec.Values[i].(float64); math.IsInf(f, 0) {
			return nil, nil, c.Errorf(name, "", "the value of '%s' must be finite", n)
		}
	}
	get := func(names []string, kind string) ([]float64, error) {
		out := make([]float64, len(names))
		for i, n := range names {
			f, ok := rec.Get(n)
			if !ok {
				if needAll {
					return nil, c.Errorf(name, "Give a value for every state and input: "+strings.Join(known, ", ")+".",
						"%s gives no value for the %s '%s'", name, kind, n)
				}
				continue
			}
			out[i] = f.(float64)
		}
		return out, nil
	}
	if x, err = get(bs.States(), "state"); err != nil {
		return nil, nil, err
	}
	if u, err = get(bs.Inputs(), "input"); err != nil {
		return nil, nil, err
	}
	return x, u, nil
}

func linearizeFn(c *lang.Call) (any, error) {
	v := c.Value("model")
	if g, ok := v.(*lsys.System); ok {
		return g, nil
	}
	bs, ok := c.Block(v)
	if !ok {
		return nil, c.TypeError("model", "a nonlinear model (an equation block)", v)
	}
	if !c.Has("at") {
		return nil, c.Errorf("", "Write linearize(model, at: {"+strings.Join(append(append([]string(nil), bs.States()...), bs.Inputs()...), ": 0, ")+": 0}).",
			"linearize needs the operating point 'at'")
	}
	x, u, err := operatingPoint(c, "at", bs, true)
	if err != nil {
		return nil, err
	}
	A, B, C, D, err := bs.Jacobians(x, u, "")
	if err != nil {
		return nil, err
	}
	g, err := bs.System(A, B, C, D)
	if err != nil {
		return nil, c.Errorf("at", "", "%v", err)
	}
	return g, nil
}

// The equilibrium built-in hands out lsys's own *lsys.Equilibrium; its
// fields are the states and inputs as records, the verdict, and each state
// and input by name.
func init() {
	registerType((*lsys.Equilibrium)(nil), lang.TypeInfo{Name: "a steady state (equilibrium)",
		Fields: []lang.Field{
			lang.FieldOf("states", "the steady state, a record by state name", func(e *lsys.Equilibrium) any { return numberRecord(e.StateNames, e.X) }),
			lang.FieldOf("inputs", "the constant inputs, a record by input name", func(e *lsys.Equilibrium) any { return numberRecord(e.InputNames, e.U) }),
			lang.FieldOf("residual", "the largest |F| left at the result (F = f(x, u); f(x, u) - x when sampled)", func(e *lsys.Equilibrium) any { return e.Residual }),
			lang.FieldOf("iterations", "the Newton steps taken", func(e *lsys.Equilibrium) any { return float64(e.Iterations) }),
			lang.FieldOf("unique", "true when the steady state is isolated (the Jacobian has full rank)", func(e *lsys.Equilibrium) any { return e.Free == nil }),
			lang.FieldOf("free", "the directions along which the steady state is not unique, as columns; [] when unique", func(e *lsys.Equilibrium) any {
				if e.Free == nil {
					return &lang.List{}
				}
				return mat.DenseCopyOf(e.Free)
			}),
			lang.FieldOf("rank", "the numerical rank of the Jacobian", func(e *lsys.Equilibrium) any { return float64(e.Rank) }),
		},
		ByName: func(v any) ([]string, func(string) (any, bool)) {
			e := v.(*lsys.Equilibrium)
			names := append(append([]string(nil), e.StateNames...), e.InputNames...)
			return names, func(name string) (any, bool) { return e.State(name) }
		}})
}

// numberRecord is {name: value, ...}.
func numberRecord(names []string, vals []float64) *lang.Record {
	r := &lang.Record{Names: append([]string(nil), names...), Values: make([]any, len(vals))}
	for i, v := range vals {
		r.Values[i] = v
	}
	return r
}

// equilibriumPoint is the record of states and inputs linearize reads.
func equilibriumPoint(e *lsys.Equilibrium) *lang.Record {
	return numberRecord(append(append([]string(nil), e.StateNames...), e.InputNames...), append(append([]float64(nil), e.X...), e.U...))
}

func equilibriumFn(c *lang.Call) (any, error) {
	v := c.Value("model")
	bs, ok := c.Block(v)
	if !ok {
		if g, isSys := v.(*lsys.System); isSys {
			return linearEquilibrium(c, g)
		}
		if g, err := c.ToSystem(v, c.ArgPos("model")); err == nil && g != nil {
			return linearEquilibrium(c, g)
		}
		return nil, c.TypeError("model", "a model or a system", v)
	}
	n := len(bs.States())
	if n == 0 {
		return nil, c.Errorf("model", "", "the model has no states")
	}
	u := make([]float64, len(bs.Inputs()))
	if err := recordInto(c, "inputs", bs.Inputs(), "an input of this model", "a record such as {torque: 0}", u); err != nil {
		return nil, err
	}
	x := make([]float64, n)
	if err := recordInto(c, "guess", bs.States(), "a state of this model", "a record such as {angle: 3}", x); err != nil {
		return nil, err
	}
	sampled := bs.Every() > 0
	// residual and Jacobian of F(x) = f(x, u) (- x when sampled).
	eval := func(x []float64, jac bool) ([]float64, *mat.Dense, error) {
		F, _, err := bs.Eval(x, u)
		if err != nil {
			return nil, nil, err
		}
		for i := range F {
			if sampled {
				F[i] -= x[i]
			}
		}
		if !jac {
			return F, nil, nil
		}
		A, _, _, _, err := bs.Jacobians(x, u, "")
		if err != nil {
			return nil, nil, err
		}
		if sampled {
			for i := 0; i < n; i++ {
				A.Set(i, i, A.At(i, i)-1)
			}
		}
		return F, A, nil
	}
	x, res, iter, J, err := lsys.SolveSteady(eval, x, c.Check)
	var ne *lsys.NewtonError
	if errors.As(err, &ne) {
		hint := "Try another guess: equilibrium(model, inputs: {...}, guess: {...})."
		if ne.Kind == lsys.NewtonSingular {
			hint = "Try another guess, or check that the inputs admit a steady state."
		}
		return nil, c.Errorf("", hint, "equilibrium: %v", err)
	}
	if err != nil {
		return nil, err
	}
	return lsys.NewEquilibrium(bs.States(), bs.Inputs(), x, u, res, iter, J, false), nil
}

// linearEquilibrium solves A x + B u = 0 (continuous) or A x + B u = x
// (sampled) for a system given by its matrices.
func linearEquilibrium(c *lang.Call, g *lsys.System) (any, error) {
	n, m := g.N(), g.M()
	if n == 0 {
		return nil, c.Errorf("model", "", "the system has no states")
	}
	u := make([]float64, m)
	if err := recordInto(c, "inputs", g.InputNames, "an input of this system", "a record such as {torque: 0}", u); err != nil {
		return nil, err
	}
	e, err := lsys.LinearEquilibrium(g, u)
	var se *lsys.SteadyError
	if errors.As(err, &se) {
		return nil, c.Errorf("inputs", "A system with an integrator has a steady state only for inputs that leave it at rest.", "%v", err)
	}
	return e, err
}

func sensitivityFn(c *lang.Call) (any, error) {
	v := c.Value("model")
	bs, ok := c.Block(v)
	if !ok {
		if _, isSys := v.(*lsys.System); isSys {
			return nil, c.Errorf("model", "Write the model as an equation block, system { ... }, using named parameters bound before it.",
				"sensitivity needs a system written as an equation block, so that its parameters are known; this one was built from matrices")
		}
		if f, isFn := v.(*lang.Function); isFn {
			ex := f.Name + "(...)"
			if len(f.Params) == 1 {
				ex = f.Name + "(5)"
			}
			return nil, c.Errorf("model", fmt.Sprintf("Evaluate the family at the parameter values you want: sensitivity(%s, [\"%s\"]); the function's parameters count as parameters of its block.", ex, strings.Join(f.Params, "\", \"")),
				"sensitivity needs a model, not the function %s; sensitivities are taken at one value of the parameters", f.Name)
		}
		return nil, c.TypeError("model", "an equation block", v)
	}
	var names []string
	if c.Has("parameters") {
		var err error
		if names, err = c.Strings("parameters"); err != nil {
			return nil, err
		}
		if len(names) == 0 {
			return nil, c.Errorf("parameters", "Leave the list out to take every parameter of the model.", "give at least one parameter name")
		}
	} else {
		names = append(names, bs.Parameters()...)
		if len(names) == 0 {
			return nil, c.Errorf("model", "Write the coefficients as named parameters bound before the block (k = 4), or as parameters of a function: family(k) = system { ... }.",
				"this model uses no named parameters: its equations have numbers only")
		}
	}
	for _, p := range names {
		if _, ok := bs.Parameter(p); !ok {
			hint := "The parameters of this model are: " + strings.Join(bs.Parameters(), ", ") + "."
			if len(bs.Parameters()) == 0 {
				hint = "This model uses no named parameters: its equations have numbers only."
			}
			return nil, c.Errorf("parameters", hint, "'%s' is not a parameter of this model%s", p, lang.DidYouMean(p, bs.Parameters()))
		}
	}
	x := make([]float64, len(bs.States()))
	u := make([]float64, len(bs.Inputs()))
	if !bs.Linear() {
		if !c.Has("at") {
			return nil, c.Errorf("", "Give the operating point: sensitivity(model, [...], at: {...}).",
				"a nonlinear model needs the operating point 'at'")
		}
		var err error
		if x, u, err = operatingPoint(c, "at", bs, true); err != nil {
			return nil, err
		}
	}
	A, _, _, _, err := bs.Jacobians(x, u, "")
	if err != nil {
		return nil, err
	}
	if A == nil {
		return nil, c.Errorf("model", "", "the model has no states, so no eigenvalues")
	}
	var dA []*mat.Dense
	var vals []float64
	for _, p := range names {
		d, _, _, _, err := bs.Jacobians(x, u, p)
		if err != nil {
			return nil, err
		}
		dA = append(dA, d)
		v, _ := bs.Parameter(p)
		vals = append(vals, v)
	}
	return lsys.EigenvalueSensitivity(A, dA, names, vals, bs.Every())
}

// MaxLocusSteps bounds the number of parameter values of one locus.
const MaxLocusSteps = 100_000

func locusFn(c *lang.Call) (any, error) {
	f := c.Value("family")
	var params []string
	switch t := f.(type) {
	case *lang.Function:
		params = t.Params
	case *lang.Builtin:
		return nil, c.Errorf("family", "Define a function first: f(k) = ..., then locus(f, k: values).", "locus needs a function of your own, not the built-in %s", t.Name)
	default:
		return nil, c.TypeError("family", "a function such as f(k) = system(...)", f)
	}
	if len(params) != 1 {
		return nil, c.Errorf("family", "", "the function must have exactly one parameter; it has %d", len(params))
	}
	if len(c.Extra) != 1 {
		return nil, c.Errorf("", fmt.Sprintf("Write locus(f, %s: linear(1, 10)).", params[0]),
			"locus needs one named argument: the parameter '%s' with its values", params[0])
	}
	nv := c.Extra[0]
	if nv.Name != params[0] {
		return nil, c.ErrorAt(nv.Pos, fmt.Sprintf("Write locus(f, %s: values).", params[0]), "the function's parameter is '%s', not '%s'", params[0], nv.Name)
	}
	var values []float64
	switch t := nv.Value.(type) {
	case *mat.Dense:
		r, cc := t.Dims()
		for i := 0; i < r; i++ {
			for j := 0; j < cc; j++ {
				values = append(values, t.At(i, j))
			}
		}
	case float64:
		values = []float64{t}
	default:
		return nil, c.ErrorAt(nv.Pos, "Use linear(a, b, n: 50) or logarithmic(a, b).", "the values of '%s' must be a vector of numbers, not %s", nv.Name, c.TypeName(nv.Value))
	}
	if len(values) > MaxLocusSteps {
		return nil, c.ErrorAt(nv.Pos, "Use fewer values: linear(a, b, n: 200) is usually enough.", "%d values are more than the limit of %d", len(values), MaxLocusSteps)
	}
	// Progress for sweeps of 50 values or more (so whether it shows does
	// not depend on timing), updated every quarter second; an interrupted
	// or failed sweep says where it stopped instead of leaving its last
	// count standing, and a finished one ends with the same text always.
	const id = "locus-progress"
	progress := len(values) >= 50
	last := time.Now()
	done := 0
	if progress {
		c.Progress(id, fmt.Sprintf("locus: 0 of %d values", len(values)), true)
		defer func() {
			if done < len(values) {
				c.Progress(id, fmt.Sprintf("locus: stopped after %d of %d values", done, len(values)), false)
			}
		}()
	}
	var eig [][]complex128
	ts := 0.0
	for k, p := range values {
		if err := c.Check(); err != nil {
			return nil, err
		}
		if now := time.Now(); progress && now.Sub(last) >= 250*time.Millisecond {
			c.Progress(id, fmt.Sprintf("locus: %d of %d values", k, len(values)), false)
			last = now
		}
		r, err := c.Apply(f, p)
		if err != nil {
			return nil, err
		}
		g, err := c.ToSystem(r, c.Pos())
		if err != nil {
			return nil, err
		}
		if g == nil {
			return nil, c.Errorf("family", "", "at %s = %s the function gives %s, not a system", nv.Name, lang.FormatNumber(p), c.TypeName(r))
		}
		if g.N() == 0 {
			return nil, c.Errorf("family", "", "at %s = %s the system has no states, so no modes", nv.Name, lang.FormatNumber(p))
		}
		if k > 0 && g.N() != len(eig[0]) {
			return nil, c.Errorf("family", "A locus follows a fixed number of modes.",
				"at %s = %s the system has %s, but %d at the first value", nv.Name, lang.FormatNumber(p), lang.Plural(g.N(), "state"), len(eig[0]))
		}
		es, err := lsys.Eigen(g.A)
		if err != nil {
			return nil, c.Errorf("family", "", "at %s = %s: %v", nv.Name, lang.FormatNumber(p), err)
		}
		eig = append(eig, es.Values)
		ts = g.Ts
		done = k + 1
	}
	if progress {
		c.Progress(id, fmt.Sprintf("locus: %d values done", len(values)), false)
	}
	return lsys.NewLocus(nv.Name, values, eig, ts)
}

// recordInto reads the record argument param (if given) into dst, whose
// entries are named by names: each field must be one of names and a finite
// real number. what names an entry in messages ("an input of this model");
// example shows the expected form.
func recordInto(c *lang.Call, param string, names []string, what, example string, dst []float64) error {
	if !c.Has(param) {
		return nil
	}
	r, ok := c.Value(param).(*lang.Record)
	if !ok {
		return c.TypeError(param, example, c.Value(param))
	}
	for i, name := range r.Names {
		j := -1
		for k, have := range names {
			if have == name {
				j = k
			}
		}
		if j < 0 {
			return c.Errorf(param, "", "'%s' is not %s%s", name, what, lang.DidYouMean(name, names))
		}
		f, ok := r.Values[i].(float64)
		if !ok || math.IsInf(f, 0) {
			return c.Errorf(param, "", "the value of '%s' must be a finite real number", name)
		}
		dst[j] = f
	}
	return nil
}
