package lang

import (
	"fmt"
	"math"
	"math/cmplx"

	"gonum.org/v1/gonum/mat"

	"lsys/lang/syntax"
	"lsys/lsys"
)

func toComplex(v any) complex128 {
	switch x := v.(type) {
	case float64:
		return complex(x, 0)
	case complex128:
		return x
	}
	return 0
}

// Number normalises a complex result with an exactly zero imaginary part
// to a real number.
func Number(c complex128) any {
	if imag(c) == 0 {
		return real(c)
	}
	return c
}

func isNumber(v any) bool {
	switch v.(type) {
	case float64, complex128:
		return true
	}
	return false
}

func (ev *evaluator) negate(v any, pos syntax.Pos) (any, error) {
	switch x := v.(type) {
	case float64:
		return -x, nil
	case complex128:
		return -x, nil
	case *mat.Dense:
		var m mat.Dense
		m.Scale(-1, x)
		return &m, nil
	case *mat.CDense:
		r, c := x.Dims()
		m := mat.NewCDense(r, c, nil)
		for i := 0; i < r; i++ {
			for j := 0; j < c; j++ {
				m.Set(i, j, -x.At(i, j))
			}
		}
		return m, nil
	case *lsys.Rational:
		return x.Neg(), nil
	case *lsys.System:
		return ev.binary(syntax.MUL, -1.0, x, pos, nil)
	}
	return nil, ev.errorAt(pos, fmt.Sprintf("cannot negate %s", ev.typeName(v)), "Numbers, matrices, transfer functions and systems can be negated.")
}

var opVerb = map[syntax.Token]string{syntax.ADD: "add", syntax.SUB: "subtract", syntax.MUL: "multiply", syntax.DIV: "divide", syntax.POW: "raise"}

func (ev *evaluator) opError(op syntax.Token, a, b any, pos syntax.Pos, hint string) error {
	var msg string
	switch op {
	case syntax.ADD:
		msg = fmt.Sprintf("cannot add %s and %s", ev.typeName(a), ev.typeName(b))
	case syntax.SUB:
		msg = fmt.Sprintf("cannot subtract %s from %s", ev.typeName(b), ev.typeName(a))
	case syntax.MUL:
		msg = fmt.Sprintf("cannot multiply %s by %s", ev.typeName(a), ev.typeName(b))
	case syntax.DIV:
		msg = fmt.Sprintf("cannot divide %s by %s", ev.typeName(a), ev.typeName(b))
	case syntax.POW:
		msg = fmt.Sprintf("cannot raise %s to the power %s", ev.typeName(a), ev.typeName(b))
	default:
		msg = fmt.Sprintf("cannot compare %s with %s using '%s'", ev.typeName(a), ev.typeName(b), op)
	}
	return ev.errorAt(pos, msg, hint)
}

// binary applies op to a and b. node is the expression (may be nil).
func (ev *evaluator) binary(op syntax.Token, a, b any, pos syntax.Pos, node *syntax.BinaryExpr) (any, error) {
	switch op {
	case syntax.EQL, syntax.NEQ, syntax.LSS, syntax.LEQ, syntax.GTR, syntax.GEQ:
		return ev.compare(op, a, b, pos)
	}
	// Numbers.
	if isNumber(a) && isNumber(b) {
		return ev.scalar(op, a, b, pos)
	}
	if sa, ok := a.(string); ok {
		if sb, ok := b.(string); ok && op == syntax.ADD {
			// Checked before the bytes are asked for: doubling a string
			// forty times would ask for a terabyte.
			if n := int64(len(sa)) + int64(len(sb)); n > ev.s.limits.Memory {
				return nil, ev.overBudget(pos, "joining these strings", n)
			}
			return sa + sb, nil
		}
	}
	// Models kept in another form (second-order structures, modal models)
	// connect as their first-order systems.
	for _, x := range []*any{&a, &b} {
		if f, ok := (*x).(lsys.FirstOrder); ok {
			g, err := f.System()
			if err != nil {
				return nil, ev.errorAt(pos, err.Error(), "")
			}
			*x = g
		}
	}
	// Systems: series and parallel connections.
	if _, ok := a.(*lsys.System); ok {
		return ev.systemOp(op, a, b, pos)
	}
	if _, ok := b.(*lsys.System); ok {
		return ev.systemOp(op, a, b, pos)
	}
	if m, ok := a.(*lsys.Model); ok {
		return nil, needLinearize(m, ev, pos)
	}
	if m, ok := b.(*lsys.Model); ok {
		return nil, needLinearize(m, ev, pos)
	}
	// Transfer functions.
	_, ra := a.(*lsys.Rational)
	_, rb := b.(*lsys.Rational)
	if ra || rb {
		return ev.rationalOp(op, a, b, pos)
	}
	// Matrices.
	_, ma := a.(*mat.Dense)
	_, mb := b.(*mat.Dense)
	_, ca := a.(*mat.CDense)
	_, cb := b.(*mat.CDense)
	_, za := a.(complex128)
	_, zb := b.(complex128)
	if ca || cb || (ma && zb) || (za && mb) {
		return ev.complexMatrixOp(op, a, b, pos)
	}
	if ma || mb {
		return ev.matrixOp(op, a, b, pos)
	}
	return nil, ev.opError(op, a, b, pos, "")
}

func (ev *evaluator) scalar(op syntax.Token, a, b any, pos syntax.Pos) (any, error) {
	fa, okA := a.(float64)
	fb, okB := b.(float64)
	inputsFinite := Finite(a) && Finite(b)
	var r any
	if okA && okB {
		switch op {
		case syntax.ADD:
			r = fa + fb
		case syntax.SUB:
			r = fa - fb
		case syntax.MUL:
			r = fa * fb
		case syntax.DIV:
			if fb == 0 {
				return nil, ev.errorAt(pos, "division by zero", "The divisor is zero here; check the values it is made of.")
			}
			r = fa / fb
		case syntax.POW:
			if fa == 0 && fb < 0 {
				return nil, ev.errorAt(pos, "zero to a negative power is division by zero", "The base is zero here; check the values it is made of.")
			}
			if fa < 0 && fb != math.Trunc(fb) {
				r = Number(cmplx.Pow(complex(fa, 0), complex(fb, 0)))
			} else {
				r = math.Pow(fa, fb)
			}
		}
	} else {
		ca, cb := toComplex(a), toComplex(b)
		switch op {
		case syntax.ADD:
			r = Number(ca + cb)
		case syntax.SUB:
			r = Number(ca - cb)
		case syntax.MUL:
			r = Number(ca * cb)
		case syntax.DIV:
			if cb == 0 {
				return nil, ev.errorAt(pos, "division by zero", "The divisor is zero here; check the values it is made of.")
			}
			r = Number(ca / cb)
		case syntax.POW:
			if ca == 0 && real(cb) < 0 {
				return nil, ev.errorAt(pos, "zero to a negative power is division by zero", "The base is zero here; check the values it is made of.")
			}
			if imag(cb) == 0 && real(cb) == math.Trunc(real(cb)) && math.Abs(real(cb)) <= 64 {
				r = Number(cpowInt(ca, int(real(cb))))
			} else {
				r = Number(cmplx.Pow(ca, cb))
			}
		}
	}
	if !Finite(r) {
		if !inputsFinite {
			if f, ok := r.(float64); ok && math.IsInf(f, 0) {
				return r, nil
			}
		}
		return nil, ev.errorAt(pos, fmt.Sprintf("the result of %s %s %s is not a finite number", FormatValue(a), op, FormatValue(b)),
			"Numbers must stay below about 1.8e308; rescale the quantities (other units).")
	}
	return r, nil
}

// cpowInt is exact repeated multiplication, so (1j)^2 is exactly -1.
func cpowInt(c complex128, k int) complex128 {
	if k < 0 {
		return 1 / cpowInt(c, -k)
	}
	out := complex(1, 0)
	for k > 0 {
		if k&1 == 1 {
			out *= c
		}
		c *= c
		k >>= 1
	}
	return out
}

func (ev *evaluator) compare(op syntax.Token, a, b any, pos syntax.Pos) (any, error) {
	if op == syntax.EQL || op == syntax.NEQ {
		var eq bool
		switch {
		case isNumber(a) && isNumber(b):
			eq = toComplex(a) == toComplex(b)
		default:
			switch x := a.(type) {
			case string:
				y, ok := b.(string)
				eq = ok && x == y
				if !ok {
					return nil, ev.opError(op, a, b, pos, "")
				}
			case bool:
				y, ok := b.(bool)
				eq = ok && x == y
				if !ok {
					return nil, ev.opError(op, a, b, pos, "")
				}
			case *mat.Dense:
				y, ok := b.(*mat.Dense)
				if !ok {
					return nil, ev.opError(op, a, b, pos, "")
				}
				eq = mat.Equal(x, y)
			default:
				return nil, ev.opError(op, a, b, pos, "Only numbers, strings, booleans and matrices can be compared.")
			}
		}
		if op == syntax.NEQ {
			eq = !eq
		}
		return eq, nil
	}
	fa, okA := a.(float64)
	fb, okB := b.(float64)
	if !okA || !okB {
		hint := ""
		if isNumber(a) && isNumber(b) {
			hint = "Complex numbers have no order; compare real(x) or abs(x)."
		}
		return nil, ev.opError(op, a, b, pos, hint)
	}
	switch op {
	case syntax.LSS:
		return fa < fb, nil
	case syntax.LEQ:
		return fa <= fb, nil
	case syntax.GTR:
		return fa > fb, nil
	}
	return fa >= fb, nil
}

func (ev *evaluator) matrixOp(op syntax.Token, a, b any, pos syntax.Pos) (any, error) {
	ma, aMat := a.(*mat.Dense)
	mb, bMat := b.(*mat.Dense)
	fa, aNum := a.(float64)
	fb, bNum := b.(float64)
	var out mat.Dense
	switch {
	case aMat && bMat:
		ar, ac := ma.Dims()
		br, bc := mb.Dims()
		switch op {
		case syntax.ADD, syntax.SUB:
			if ar != br || ac != bc {
				return nil, ev.errorAt(pos, fmt.Sprintf("cannot %s a %dx%d and a %dx%d matrix: the shapes differ", opVerb[op], ar, ac, br, bc),
					"Both sides of + and - need the same number of rows and columns.")
			}
			if op == syntax.ADD {
				out.Add(ma, mb)
			} else {
				out.Sub(ma, mb)
			}
		case syntax.MUL:
			if ac != br {
				return nil, ev.errorAt(pos, fmt.Sprintf("cannot multiply a %dx%d by a %dx%d matrix: %d columns against %d rows", ar, ac, br, bc, ac, br),
					"In A*B the columns of A must match the rows of B; transpose(v) turns a column into a row.")
			}
			if ar*bc > MaxEntries {
				return nil, ev.tooBig(pos, ar, bc)
			}
			out.Mul(ma, mb)
		case syntax.DIV:
			return nil, ev.errorAt(pos, "cannot divide by a matrix", "Use solve(A, b) for A x = b, or inverse(A).")
		case syntax.POW:
			return nil, ev.errorAt(pos, "the power must be a whole number", "Write M^2, M^-1.")
		}
	case aMat && bNum:
		switch op {
		case syntax.MUL:
			out.Scale(fb, ma)
		case syntax.DIV:
			if fb == 0 {
				return nil, ev.errorAt(pos, "division by zero", "The divisor is zero here; check the values it is made of.")
			}
			out.Scale(1/fb, ma)
		case syntax.POW:
			return ev.matrixPow(ma, fb, pos)
		default:
			return nil, ev.opError(op, a, b, pos, "To shift the diagonal write M + k*identity(n).")
		}
	case aNum && bMat:
		if op != syntax.MUL {
			return nil, ev.opError(op, a, b, pos, "To shift the diagonal write k*identity(n) + M.")
		}
		out.Scale(fa, mb)
	default:
		hint := ""
		if isNumber(a) || isNumber(b) {
			hint = "Complex numbers times real matrices are not supported; scale by a real number."
		}
		return nil, ev.opError(op, a, b, pos, hint)
	}
	if err := lsys.CheckFinite("the result", &out); err != nil {
		return nil, ev.errorAt(pos, err.Error(), "Rescale the quantities (other units).")
	}
	return &out, nil
}

func (ev *evaluator) matrixPow(m *mat.Dense, k float64, pos syntax.Pos) (any, error) {
	r, c := m.Dims()
	if r != c {
		return nil, ev.errorAt(pos, fmt.Sprintf("only a square matrix has powers, not a %dx%d one", r, c), "For the product of M with its transpose write M * transpose(M).")
	}
	if k != math.Trunc(k) || math.Abs(k) > 1e6 {
		return nil, ev.errorAt(pos, fmt.Sprintf("a matrix power must be a whole number, not %s", FormatNumber(k)), "For exp(A t) use exp(t*A).")
	}
	base := mat.DenseCopyOf(m)
	if k < 0 {
		var inv mat.Dense
		if err := inv.Inverse(m); err != nil {
			return nil, ev.errorAt(pos, "the matrix is singular (or nearly): it has no inverse", "Check it with rank(M) or det(M).")
		}
		base = &inv
		k = -k
	}
	out := mat.NewDense(r, r, nil)
	for i := 0; i < r; i++ {
		out.Set(i, i, 1)
	}
	n := int(k)
	for n > 0 {
		if err := ev.ctx.Err(); err != nil {
			return nil, ev.interrupted(pos, err)
		}
		if n&1 == 1 {
			var t mat.Dense
			t.Mul(out, base)
			out = &t
		}
		var t mat.Dense
		t.Mul(base, base)
		base = &t
		n >>= 1
	}
	if err := lsys.CheckFinite("the result", out); err != nil {
		return nil, ev.errorAt(pos, err.Error(), "Check the operands of this operator.")
	}
	return out, nil
}

func (ev *evaluator) rationalOp(op syntax.Token, a, b any, pos syntax.Pos) (any, error) {
	if op == syntax.POW {
		ra, ok := a.(*lsys.Rational)
		k, okk := b.(float64)
		if !ok || !okk || k != math.Trunc(k) || math.Abs(k) > 100 {
			return nil, ev.opError(op, a, b, pos, "A transfer function can be raised to a whole power up to 100: (s + 1)^2.")
		}
		if nd, dd := ra.Degree(); float64(max(nd, dd))*math.Abs(k) > MaxDegree {
			return nil, ev.errorAt(pos, fmt.Sprintf("this power would give a transfer function of degree above the limit of %d", MaxDegree),
				"High-order models are better written as systems (state-space) than as polynomials.")
		}
		r, err := ra.Pow(int(k))
		if err != nil {
			return nil, ev.errorAt(pos, err.Error(), "Check the base of the power.")
		}
		return simplifyRational(r), nil
	}
	ra, okA := asRational(a)
	rb, okB := asRational(b)
	if !okA || !okB {
		return nil, ev.opError(op, a, b, pos, "Transfer functions combine with numbers and other transfer functions; a list of lists of them is a transfer matrix.")
	}
	var r *lsys.Rational
	var err error
	switch op {
	case syntax.ADD:
		r, err = ra.Add(rb)
	case syntax.SUB:
		r, err = ra.Sub(rb)
	case syntax.MUL:
		r, err = ra.Mul(rb)
	case syntax.DIV:
		r, err = ra.Div(rb)
	}
	if err != nil {
		return nil, ev.errorAt(pos, err.Error(), "Check the operands of this operator.")
	}
	if err := ev.checkDegree(r, pos); err != nil {
		return nil, err
	}
	return simplifyRational(r), nil
}

// MaxDegree bounds the degree of polynomials in transfer functions.
const MaxDegree = 200

func (ev *evaluator) checkDegree(r *lsys.Rational, pos syntax.Pos) error {
	if n, d := r.Degree(); n > MaxDegree || d > MaxDegree {
		return ev.errorAt(pos, fmt.Sprintf("a transfer function of degree %d is beyond the limit of %d", max(n, d), MaxDegree),
			"High-order models are better written as systems (state-space) than as polynomials.")
	}
	return nil
}

// simplifyRational turns a constant rational into a plain number.
func simplifyRational(r *lsys.Rational) any {
	if r.IsConstant() && r.Ts <= 0 {
		if len(r.Num) == 0 {
			return 0.0
		}
		return r.Num[0] / r.Den[0]
	}
	return r
}

// systemOp: G*K is the series connection (K feeds G), G+H and G-H the
// parallel ones. Numbers and transfer functions are turned into systems.
func (ev *evaluator) systemOp(op syntax.Token, a, b any, pos syntax.Pos) (any, error) {
	if op == syntax.DIV {
		// G / k and G / r(s) are G * (1/k) and G * (1/r) when 1/r is
		// proper: so P * 3000/(0.005*s + 1), read (P*3000)/(0.005*s + 1),
		// is what was meant
		var err error
		if b, err = ev.divisorAsFactor(a, b, pos); err != nil {
			return nil, err
		}
		op = syntax.MUL
	}
	if op != syntax.ADD && op != syntax.SUB && op != syntax.MUL {
		return nil, ev.opError(op, a, b, pos, "Between systems, * is the series connection and + and - the parallel ones.")
	}
	// A transfer function in z with no sample time yet takes the one of
	// the system it is combined with (SPEC section 8); a matrix of numbers
	// is a static gain of its shape.
	if g, ok := a.(*lsys.System); ok {
		b = withSampleTime(b, g.Ts)
	}
	if g, ok := b.(*lsys.System); ok {
		a = withSampleTime(a, g.Ts)
	}
	if g, ok := a.(*lsys.System); ok {
		b = matrixGain(b, g.Ts)
	}
	if g, ok := b.(*lsys.System); ok {
		a = matrixGain(a, g.Ts)
	}
	for _, pair := range [][2]any{{a, b}, {b, a}} {
		if g, ok := pair[0].(*lsys.System); ok && g.Ts == 0 && openSampleTime(pair[1]) {
			return nil, ev.errorAt(pos, "cannot combine a transfer function in z with a continuous system",
				"Sample the system first, sample(G, T), or write the continuous part in s.")
		}
	}
	ga, err := ev.toSystem(a, pos)
	if err != nil {
		return nil, err
	}
	gb, err := ev.toSystem(b, pos)
	if err != nil {
		return nil, err
	}
	if ga == nil || gb == nil {
		return nil, ev.opError(op, a, b, pos, "Systems combine with systems, transfer functions, numbers and matrices of numbers (static gains).")
	}
	// A number is a static gain of matching size.
	// Its signals take the names of the system's signals it meets, so
	// 0.05 * G and G * 0.05 both keep G's names.
	if f, ok := a.(float64); ok && op == syntax.MUL {
		ga, err = scalarGain(f, gb.P(), gb.Ts)
		nameGain(ga, gb.OutputNames, gb.OutputNames)
	} else if f, ok := b.(float64); ok && op == syntax.MUL {
		gb, err = scalarGain(f, ga.M(), ga.Ts)
		nameGain(gb, ga.InputNames, ga.InputNames)
	} else if f, ok := a.(float64); ok {
		ga, err = scalarGain(f, gb.P(), gb.Ts)
		nameGain(ga, gb.InputNames, gb.OutputNames)
		if err == nil && gb.M() != gb.P() {
			return nil, ev.errorAt(pos, "adding a number to a system needs as many inputs as outputs", "Add a static gain system of the right size instead: system(..., D).")
		}
	} else if f, ok := b.(float64); ok {
		gb, err = scalarGain(f, ga.P(), ga.Ts)
		nameGain(gb, ga.InputNames, ga.OutputNames)
		if err == nil && ga.M() != ga.P() {
			return nil, ev.errorAt(pos, "adding a number to a system needs as many inputs as outputs", "Add a static gain system of the right size instead: system(..., D).")
		}
	}
	if err != nil {
		return nil, ev.errorAt(pos, err.Error(), "Check the operands of this operator.")
	}
	var g *lsys.System
	switch op {
	case syntax.MUL:
		if ga.M() != gb.P() {
			return nil, ev.errorAt(pos, fmt.Sprintf("cannot connect in series: the left system has %s but the right one has %s",
				Plural(ga.M(), "input"), Plural(gb.P(), "output")),
				"In G * K the outputs of K feed the inputs of G, so their numbers must match.")
		}
		err = guard(func() (err error) { g, err = lsys.Series(ga, gb); return })
	case syntax.ADD, syntax.SUB:
		if ga.M() != gb.M() || ga.P() != gb.P() {
			return nil, ev.errorAt(pos, fmt.Sprintf("cannot connect in parallel a system with %s and %s to one with %s and %s",
				Plural(ga.M(), "input"), Plural(ga.P(), "output"), Plural(gb.M(), "input"), Plural(gb.P(), "output")),
				"Both sides of + and - need the same numbers of inputs and outputs.")
		}
		sign := 1.0
		if op == syntax.SUB {
			sign = -1
		}
		err = guard(func() (err error) { g, err = lsys.Parallel(ga, gb, sign); return })
	}
	if err != nil {
		return nil, ev.errorAt(pos, err.Error(), "Check the operands of this operator.")
	}
	return g, nil
}

// divisorAsFactor turns the divisor of G / b into the factor 1/b: a
// nonzero number, or a SISO transfer function whose reciprocal is proper
// (on each of G's inputs when G has several). Anything else is an error
// that says how * and / group.
func (ev *evaluator) divisorAsFactor(a, b any, pos syntax.Pos) (any, error) {
	g, ok := a.(*lsys.System)
	const grouping = "* and / group left to right: P * a/b is (P*a)/b. Write P * (a/b) if that was meant; to close a loop use closeloop(G, through: K)."
	switch d := b.(type) {
	case float64:
		if ok && d != 0 {
			return 1 / d, nil
		}
		if ok {
			return nil, ev.errorAt(pos, "division of a system by zero", "Check the divisor.")
		}
	case *lsys.Rational:
		if !ok {
			break
		}
		inv, err := lsys.Constant(1).Div(d)
		if err == nil {
			inv, err = inv.Normalize()
		}
		if err != nil || !inv.Proper() {
			return nil, ev.errorAt(pos, fmt.Sprintf("cannot divide a system by %s: its reciprocal is not proper (more zeros than poles)", d), grouping)
		}
		f, err := ev.toSystem(inv, pos)
		if err != nil || f == nil {
			return nil, ev.errorAt(pos, "cannot divide a system by a transfer function here", grouping)
		}
		if g.M() > 1 {
			copies := make([]*lsys.System, g.M())
			for i := range copies {
				copies[i] = f
			}
			if f, err = lsys.Stack(copies...); err == nil {
				f, err = f.WithNames(nil, g.InputNames, g.InputNames)
			}
			if err != nil {
				return nil, ev.errorAt(pos, err.Error(), grouping)
			}
		}
		return f, nil
	}
	return nil, ev.opError(syntax.DIV, a, b, pos, "There is no division by a system. "+grouping)
}

// matrixGain turns a real matrix combined with a system into the static
// gain y = D u of its shape, with the system's sample time: [[1, -1]] * G
// is G's two outputs subtracted. Anything else is returned unchanged.
func matrixGain(v any, ts float64) any {
	if d, ok := v.(*mat.Dense); ok {
		if g, err := staticGain(d, ts); err == nil {
			return g
		}
	}
	return v
}

// withSampleTime gives a transfer function in z (or a transfer matrix
// holding some) whose sample time is still open the sample time ts of a
// sampled system it is combined with; with ts == 0 (a continuous system)
// it is left open, and realizing it then says so.
func withSampleTime(v any, ts float64) any {
	w, _ := setSampleTime(v, ts)
	return w
}

// openSampleTime reports whether v is, or holds, a transfer function in z
// whose sample time is still open.
func openSampleTime(v any) bool {
	switch t := v.(type) {
	case *lsys.Rational:
		return t.Ts < 0
	case *List:
		for _, it := range t.Items {
			if openSampleTime(it) {
				return true
			}
		}
	}
	return false
}

func setSampleTime(v any, ts float64) (any, bool) {
	if ts <= 0 {
		return v, false
	}
	switch t := v.(type) {
	case *lsys.Rational:
		if t.Ts < 0 {
			q := *t
			q.Ts = ts
			return &q, true
		}
	case *List:
		var items []any
		for i, it := range t.Items {
			w, changed := setSampleTime(it, ts)
			if changed && items == nil {
				items = append([]any(nil), t.Items...)
			}
			if items != nil {
				items[i] = w
			}
		}
		if items != nil {
			return &List{Items: items}, true
		}
	}
	return v, false
}

func scalarGain(k float64, n int, ts float64) (*lsys.System, error) {
	d := mat.NewDense(n, n, nil)
	for i := 0; i < n; i++ {
		d.Set(i, i, k)
	}
	if n == 0 {
		return lsys.NewSystem(0, 0, 0, nil, nil, nil, nil, ts)
	}
	return staticGain(d, ts)
}

// nameGain names the signals of the static gain g built for a number
// (nothing when g is missing or the sizes differ).
func nameGain(g *lsys.System, in, out []string) {
	if g == nil || len(in) != g.M() || len(out) != g.P() {
		return
	}
	g.InputNames = append([]string(nil), in...)
	g.OutputNames = append([]string(nil), out...)
}

// asCMatrix returns v as a complex matrix (real matrices are copied).
func asCMatrix(v any) (*mat.CDense, bool) {
	switch t := v.(type) {
	case *mat.CDense:
		return t, true
	case *mat.Dense:
		r, c := t.Dims()
		m := mat.NewCDense(r, c, nil)
		for i := 0; i < r; i++ {
			for j := 0; j < c; j++ {
				m.Set(i, j, complex(t.At(i, j), 0))
			}
		}
		return m, true
	}
	return nil, false
}

// RealIfPossible turns a complex matrix whose imaginary parts are all
// exactly zero into a real one.
func RealIfPossible(m *mat.CDense) any {
	r, c := m.Dims()
	for i := 0; i < r; i++ {
		for j := 0; j < c; j++ {
			if imag(m.At(i, j)) != 0 {
				return m
			}
		}
	}
	d := mat.NewDense(r, c, nil)
	for i := 0; i < r; i++ {
		for j := 0; j < c; j++ {
			d.Set(i, j, real(m.At(i, j)))
		}
	}
	return d
}

// complexMatrixOp: + - * between complex (or mixed) matrices, and scaling
// by complex numbers, entry by entry in complex arithmetic.
func (ev *evaluator) complexMatrixOp(op syntax.Token, a, b any, pos syntax.Pos) (any, error) {
	ma, aMat := asCMatrix(a)
	mb, bMat := asCMatrix(b)
	var out *mat.CDense
	switch {
	case aMat && bMat:
		ar, ac := ma.Dims()
		br, bc := mb.Dims()
		switch op {
		case syntax.ADD, syntax.SUB:
			if ar != br || ac != bc {
				return nil, ev.errorAt(pos, fmt.Sprintf("cannot %s a %dx%d and a %dx%d matrix: the shapes differ", opVerb[op], ar, ac, br, bc),
					"Both sides of + and - need the same number of rows and columns.")
			}
			out = mat.NewCDense(ar, ac, nil)
			for i := 0; i < ar; i++ {
				for j := 0; j < ac; j++ {
					if op == syntax.ADD {
						out.Set(i, j, ma.At(i, j)+mb.At(i, j))
					} else {
						out.Set(i, j, ma.At(i, j)-mb.At(i, j))
					}
				}
			}
		case syntax.MUL:
			if ac != br {
				return nil, ev.errorAt(pos, fmt.Sprintf("cannot multiply a %dx%d by a %dx%d matrix: %d columns against %d rows", ar, ac, br, bc, ac, br),
					"In A*B the columns of A must match the rows of B.")
			}
			if ar*bc > MaxEntries {
				return nil, ev.tooBig(pos, ar, bc)
			}
			out = mat.NewCDense(ar, bc, nil)
			for i := 0; i < ar; i++ {
				for j := 0; j < bc; j++ {
					var sum complex128
					for k := 0; k < ac; k++ {
						sum += ma.At(i, k) * mb.At(k, j)
					}
					out.Set(i, j, sum)
				}
			}
		default:
			return nil, ev.opError(op, a, b, pos, "Complex matrices support +, - and *.")
		}
	case aMat && isNumber(b) && (op == syntax.MUL || op == syntax.DIV):
		k := toComplex(b)
		if op == syntax.DIV {
			if k == 0 {
				return nil, ev.errorAt(pos, "division by zero", "The divisor is zero here; check the values it is made of.")
			}
			k = 1 / k
		}
		out = scaleC(ma, k)
	case isNumber(a) && bMat && op == syntax.MUL:
		out = scaleC(mb, toComplex(a))
	default:
		return nil, ev.opError(op, a, b, pos, "Matrices combine with matrices (+, -, *) and are scaled by numbers (*, /).")
	}
	r, c := out.Dims()
	for i := 0; i < r; i++ {
		for j := 0; j < c; j++ {
			if !Finite(out.At(i, j)) {
				return nil, ev.errorAt(pos, "the result has entries that are not finite numbers", "Rescale the quantities (other units).")
			}
		}
	}
	return RealIfPossible(out), nil
}

func scaleC(m *mat.CDense, k complex128) *mat.CDense {
	r, c := m.Dims()
	out := mat.NewCDense(r, c, nil)
	for i := 0; i < r; i++ {
		for j := 0; j < c; j++ {
			out.Set(i, j, k*m.At(i, j))
		}
	}
	return out
}
