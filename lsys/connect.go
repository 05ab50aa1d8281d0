package lsys

import (
	"errors"
	"fmt"
	"strconv"
	"strings"

	"gonum.org/v1/gonum/mat"
)

// Interconnections keep signal names: a series connection keeps the inputs
// of the first block and the outputs of the last; a parallel connection
// keeps the inputs of the first block and an output name only where both
// blocks give it (else y1, y2, ...: the sum is a new signal); a feedback
// loop keeps the outputs of the forward block and names its inputs r1,
// r2, ... (the reference, a new signal); states keep their names, made
// unique with a suffix _2, _3, ... in state order where blocks share one.
//
// A block with no states and continuous time (a static gain) may be joined
// to a sampled system; otherwise the sample times must agree.

// Series returns the series connection g*k: the outputs of k feed the
// inputs of g (y = G K u). States are ordered k's first, then g's.
//
//	x = [xk; xg],  A = [Ak 0; Bg Ck Ag],  B = [Bk; Bg Dk],
//	C = [Dg Ck  Cg],  D = Dg Dk.
func Series(g, k *System) (*System, error) {
	if g == nil || k == nil {
		return nil, errors.New("series: a system is missing")
	}
	if k.P() != g.M() {
		return nil, &ShapeError{
			What:  fmt.Sprintf("series: the %d outputs of the feeding block must match the %d inputs of the block it feeds", k.P(), g.M()),
			Got:   fmt.Sprintf("%dx%d (outputs x inputs)", k.P(), k.M()),
			Other: fmt.Sprintf("%dx%d", g.P(), g.M()),
		}
	}
	ts, err := commonTs("series", g, k)
	if err != nil {
		return nil, err
	}
	nk, ng := k.N(), g.N()
	m, p := k.M(), g.P()
	A := blocks([]int{nk, ng}, []int{nk, ng}, [][]*mat.Dense{
		{k.A, nil},
		{mul(g.B, k.C), g.A},
	})
	B := blocks([]int{nk, ng}, []int{m}, [][]*mat.Dense{{k.B}, {mul(g.B, k.D)}})
	C := blocks([]int{p}, []int{nk, ng}, [][]*mat.Dense{{mul(g.D, k.C), g.C}})
	D := mul(g.D, k.D)
	s, err := NewSystem(nk+ng, m, p, A, B, C, D, ts)
	if err != nil {
		return nil, fmt.Errorf("series: %w", err)
	}
	s.StateNames = unique(concat(k.StateNames, g.StateNames))
	s.InputNames = append([]string(nil), k.InputNames...)
	s.OutputNames = append([]string(nil), g.OutputNames...)
	return s, nil
}

// Parallel returns g + sign*h: same inputs, outputs added (sign is +1 or -1).
// States are ordered g's first, then h's; inputs are named as g's, outputs
// keep a name only where h's output has the same name (else y1, y2, ...).
func Parallel(g, h *System, sign float64) (*System, error) {
	if g == nil || h == nil {
		return nil, errors.New("parallel: a system is missing")
	}
	if sign != 1 && sign != -1 {
		return nil, fmt.Errorf("parallel: sign must be +1 or -1, got %v", sign)
	}
	if g.M() != h.M() || g.P() != h.P() {
		return nil, &ShapeError{
			What:  "parallel: both blocks need the same numbers of outputs and inputs",
			Got:   fmt.Sprintf("%dx%d (outputs x inputs)", g.P(), g.M()),
			Other: fmt.Sprintf("%dx%d", h.P(), h.M()),
		}
	}
	ts, err := commonTs("parallel", g, h)
	if err != nil {
		return nil, err
	}
	ng, nh, m, p := g.N(), h.N(), g.M(), g.P()
	A := blocks([]int{ng, nh}, []int{ng, nh}, [][]*mat.Dense{{g.A, nil}, {nil, h.A}})
	B := blocks([]int{ng, nh}, []int{m}, [][]*mat.Dense{{g.B}, {h.B}})
	C := blocks([]int{p}, []int{ng, nh}, [][]*mat.Dense{{g.C, scale(sign, h.C)}})
	D := add(g.D, scale(sign, h.D))
	s, err := NewSystem(ng+nh, m, p, A, B, C, D, ts)
	if err != nil {
		return nil, fmt.Errorf("parallel: %w", err)
	}
	s.StateNames = unique(concat(g.StateNames, h.StateNames))
	s.InputNames = append([]string(nil), g.InputNames...)
	s.OutputNames = defaultNames("y", p)
	for i := range s.OutputNames {
		if i < len(g.OutputNames) && i < len(h.OutputNames) && g.OutputNames[i] == h.OutputNames[i] {
			s.OutputNames[i] = g.OutputNames[i]
		}
	}
	s.OutputNames = unique(s.OutputNames)
	return s, nil
}

// CloseLoop closes the loop around g with k in the return path; sign -1 is
// negative feedback (the default of the trade), +1 positive:
//
//	u = r + sign*K y,  y = G u.
//
// k must have as many inputs as g has outputs and as many outputs as g has
// inputs. With direct feedthrough on both sides the loop is algebraic and
// needs I - sign*Dg*Dk to be invertible; when it is singular (or its
// reciprocal condition number is below 1e-12) the loop is refused as
// ill-posed. States are ordered g's first, then k's; outputs are named as
// g's; the inputs, which carry the reference r, are named r1, r2, ...
func CloseLoop(g, k *System, sign float64) (*System, error) {
	if g == nil || k == nil {
		return nil, errors.New("a system is missing")
	}
	if sign != 1 && sign != -1 {
		return nil, fmt.Errorf("sign must be +1 or -1, got %v", sign)
	}
	if k.M() != g.P() || k.P() != g.M() {
		return nil, &ShapeError{
			What:  "closeloop: the return-path block must map the outputs of the forward block back to its inputs",
			Got:   fmt.Sprintf("forward %dx%d (outputs x inputs)", g.P(), g.M()),
			Other: fmt.Sprintf("return path %dx%d (outputs x inputs)", k.P(), k.M()),
		}
	}
	ts, err := commonTs("closeloop", g, k)
	if err != nil {
		return nil, err
	}
	ng, nk, m, p := g.N(), k.N(), g.M(), g.P()
	n := ng + nk
	// y = E^{-1} (Cg xg + sign Dg Ck xk + Dg r), E = I - sign Dg Dk.
	E := identity(p)
	if dd := mul(g.D, k.D); dd != nil {
		E.Sub(E, scale(sign, dd))
	}
	var lu mat.LU
	lu.Factorize(E)
	if c := lu.Cond(); c > 1e12 || lu.Det() == 0 {
		return nil, fmt.Errorf("the loop is algebraic and ill-posed: I - sign*Dg*Dk is singular (condition %.3g); add dynamics or change the direct feedthrough", c)
	}
	solveE := func(b *mat.Dense) *mat.Dense {
		if b == nil {
			return nil
		}
		_, c := b.Dims()
		x := mat.NewDense(p, c, nil)
		if err := lu.SolveTo(x, false, b); err != nil {
			// Cond was checked above; keep going with what LU gave.
			_ = err
		}
		return x
	}
	Cy := solveE(blocks([]int{p}, []int{ng, nk}, [][]*mat.Dense{{g.C, scale(sign, mul(g.D, k.C))}}))
	Dy := solveE(g.D)
	// u = r + sign (Ck xk + Dk y)
	Cu := add(blocks([]int{m}, []int{ng, nk}, [][]*mat.Dense{{nil, scale(sign, k.C)}}), scale(sign, mul(k.D, Cy)))
	Du := add(identity(m), scale(sign, mul(k.D, Dy)))
	A := add(blocks([]int{ng, nk}, []int{ng, nk}, [][]*mat.Dense{{g.A, nil}, {nil, k.A}}),
		blocks([]int{ng, nk}, []int{n}, [][]*mat.Dense{{mul(g.B, Cu)}, {mul(k.B, Cy)}}))
	B := blocks([]int{ng, nk}, []int{m}, [][]*mat.Dense{{mul(g.B, Du)}, {mul(k.B, Dy)}})
	s, err := NewSystem(n, m, p, A, B, Cy, Dy, ts)
	if err != nil {
		return nil, err
	}
	s.StateNames = unique(concat(g.StateNames, k.StateNames))
	s.InputNames = unique(defaultNames("r", m))
	s.OutputNames = append([]string(nil), g.OutputNames...)
	return s, nil
}

// Stack returns the block-diagonal combination of the systems (inputs and
// outputs side by side). Names are kept, with a suffix _2, _3, ... where two
// blocks share one.
func Stack(systems ...*System) (*System, error) {
	if len(systems) == 0 {
		return nil, errors.New("give at least one system")
	}
	for i, s := range systems {
		if s == nil {
			return nil, fmt.Errorf("system %d is missing", i+1)
		}
	}
	ts, err := commonTs("stack", systems...)
	if err != nil {
		return nil, err
	}
	k := len(systems)
	ns, ms, ps := make([]int, k), make([]int, k), make([]int, k)
	var n, m, p int
	As := make([][]*mat.Dense, k)
	Bs := make([][]*mat.Dense, k)
	Cs := make([][]*mat.Dense, k)
	Ds := make([][]*mat.Dense, k)
	var sn, in, on []string
	for i, s := range systems {
		ns[i], ms[i], ps[i] = s.N(), s.M(), s.P()
		n, m, p = n+ns[i], m+ms[i], p+ps[i]
		As[i], Bs[i], Cs[i], Ds[i] = make([]*mat.Dense, k), make([]*mat.Dense, k), make([]*mat.Dense, k), make([]*mat.Dense, k)
		As[i][i], Bs[i][i], Cs[i][i], Ds[i][i] = s.A, s.B, s.C, s.D
		sn, in, on = concat(sn, s.StateNames), concat(in, s.InputNames), concat(on, s.OutputNames)
	}
	out, err := NewSystem(n, m, p, blocks(ns, ns, As), blocks(ns, ms, Bs), blocks(ps, ns, Cs), blocks(ps, ms, Ds), ts)
	if err != nil {
		return nil, err
	}
	out.StateNames, out.InputNames, out.OutputNames = unique(sn), unique(in), unique(on)
	return out, nil
}

// Wire joins several blocks by signal name: every input whose name is
// the name of some block's output is fed by that output; the other inputs
// stay external, and blocks that share an external input name share that
// input. outputs selects the outputs of the result by name (nil keeps every
// block output, in block order). Output names must be unique across the
// blocks, and the algebraic loop through the direct feedthroughs must be
// well posed (I - P D invertible, reciprocal condition above 1e-12).
func Wire(systems []*System, outputs []string) (*System, error) {
	if len(systems) == 0 {
		return nil, errors.New("give at least one system")
	}
	outIndex := map[string]int{}
	var outNames []string
	for bi, s := range systems {
		if s == nil {
			return nil, fmt.Errorf("system %d is missing", bi+1)
		}
		for _, name := range s.OutputNames {
			if _, dup := outIndex[name]; dup {
				return nil, fmt.Errorf("output %q is produced by two blocks (block %d is the second); rename one so each signal has one source", name, bi+1)
			}
			outIndex[name] = len(outNames)
			outNames = append(outNames, name)
		}
	}
	// Raw stacked matrices (names handled here, not by Stack's suffixes).
	st, err := Stack(systems...)
	if err != nil {
		return nil, err
	}
	n, mAll, pAll := st.N(), st.M(), st.P()
	var extNames []string
	extIndex := map[string]int{}
	var rawIn []string
	for _, s := range systems {
		rawIn = append(rawIn, s.InputNames...)
	}
	for _, name := range rawIn {
		if _, internal := outIndex[name]; internal {
			continue
		}
		if _, seen := extIndex[name]; !seen {
			extIndex[name] = len(extNames)
			extNames = append(extNames, name)
		}
	}
	r := len(extNames)
	// u = Pext r + Pint y,  y = C x + D u.
	var Pext, Pint *mat.Dense
	if mAll > 0 && r > 0 {
		Pext = mat.NewDense(mAll, r, nil)
	}
	if mAll > 0 && pAll > 0 {
		Pint = mat.NewDense(mAll, pAll, nil)
	}
	for i, name := range rawIn {
		if j, ok := outIndex[name]; ok {
			Pint.Set(i, j, 1)
		} else {
			Pext.Set(i, extIndex[name], 1)
		}
	}
	// (I - Pint D) u = Pext r + Pint C x
	var Cu, Du *mat.Dense
	if mAll > 0 {
		F := identity(mAll)
		if pd := mul(Pint, st.D); pd != nil {
			F.Sub(F, pd)
		}
		var lu mat.LU
		lu.Factorize(F)
		if c := lu.Cond(); c > 1e12 || lu.Det() == 0 {
			return nil, fmt.Errorf("the algebraic loop through the direct feedthroughs is ill-posed (condition %.3g); add dynamics in the loop", c)
		}
		sol := func(b *mat.Dense) *mat.Dense {
			if b == nil {
				return nil
			}
			_, c := b.Dims()
			x := mat.NewDense(mAll, c, nil)
			_ = lu.SolveTo(x, false, b)
			return x
		}
		Cu = sol(mul(Pint, st.C))
		Du = sol(Pext)
	}
	// Select outputs.
	sel := outNames
	if outputs != nil {
		sel = outputs
	}
	q := len(sel)
	var S *mat.Dense
	if q > 0 && pAll > 0 {
		S = mat.NewDense(q, pAll, nil)
	}
	for i, name := range sel {
		j, ok := outIndex[name]
		if !ok {
			return nil, fmt.Errorf("%q is not an output of any block; the outputs are %v", name, outNames)
		}
		S.Set(i, j, 1)
	}
	A := add(st.A, mul(st.B, Cu))
	B := mul(st.B, Du)
	Cy := add(st.C, mul(st.D, Cu))
	Dy := mul(st.D, Du)
	out, err := NewSystem(n, r, q, A, B, mul(S, Cy), mul(S, Dy), st.Ts)
	if err != nil {
		return nil, err
	}
	out.StateNames = st.StateNames
	out.InputNames = extNames
	out.OutputNames = append([]string(nil), sel...)
	return out, nil
}

// commonTs returns the sample time shared by the systems; a continuous
// static gain fits with anything.
func commonTs(op string, systems ...*System) (float64, error) {
	ts, set := 0.0, false
	for _, s := range systems {
		if s.N() == 0 && s.Ts == 0 {
			continue
		}
		if !set {
			ts, set = s.Ts, true
			continue
		}
		if s.Ts != ts {
			return 0, fmt.Errorf("%s: sample times differ (%s and %s); sample or convert one block first", op, tsText(ts), tsText(s.Ts))
		}
	}
	return ts, nil
}

func tsText(ts float64) string {
	if ts == 0 {
		return "continuous"
	}
	return "every " + strconv.FormatFloat(ts, 'g', -1, 64) + " s"
}

// blocks assembles a block matrix; a nil block is zero. It returns nil when
// the result would have a zero dimension.
func blocks(rows, cols []int, b [][]*mat.Dense) *mat.Dense {
	R, C := 0, 0
	for _, r := range rows {
		R += r
	}
	for _, c := range cols {
		C += c
	}
	if R == 0 || C == 0 {
		return nil
	}
	out := mat.NewDense(R, C, nil)
	r0 := 0
	for i, r := range rows {
		c0 := 0
		for j, c := range cols {
			if blk := b[i][j]; blk != nil && r > 0 && c > 0 {
				out.Slice(r0, r0+r, c0, c0+c).(*mat.Dense).Copy(blk)
			}
			c0 += c
		}
		r0 += r
	}
	return out
}

// mul multiplies with nil meaning an empty or zero factor.
func mul(a, b *mat.Dense) *mat.Dense {
	if a == nil || b == nil {
		return nil
	}
	var c mat.Dense
	c.Mul(a, b)
	return &c
}

// add adds with nil meaning zero.
func add(a, b *mat.Dense) *mat.Dense {
	switch {
	case a == nil && b == nil:
		return nil
	case a == nil:
		return mat.DenseCopyOf(b)
	case b == nil:
		return mat.DenseCopyOf(a)
	}
	var c mat.Dense
	c.Add(a, b)
	return &c
}

func scale(f float64, a *mat.Dense) *mat.Dense {
	if a == nil {
		return nil
	}
	var c mat.Dense
	c.Scale(f, a)
	return &c
}

func concat(a, b []string) []string {
	out := make([]string, 0, len(a)+len(b))
	return append(append(out, a...), b...)
}

// unique makes names distinct by suffixing repeats with _2, _3, ... in
// the order of the names. A name base_k already present beside base (a
// suffix given by an earlier connection) counts as a repeat of base, so
// that chains of connections number in order (x1, x1_2, x1_3) instead of
// by the order in which they were joined. Names without repeats stay.
func unique(names []string) []string {
	group := func(n string) string {
		if i := strings.LastIndexByte(n, '_'); i > 0 && i+1 < len(n) {
			if _, err := strconv.Atoi(n[i+1:]); err == nil && n[i+1] != '0' && n[i+1] != '+' && n[i+1] != '-' {
				return n[:i]
			}
		}
		return n
	}
	count := map[string]int{}
	present := map[string]bool{}
	for _, n := range names {
		count[n]++
		present[n] = true
	}
	// bases with an exact repeat among their members are renumbered
	redo := map[string]bool{}
	for n, c := range count {
		if c > 1 {
			redo[group(n)] = true
			redo[n] = true
		}
	}
	work := make([]string, len(names))
	for i, n := range names {
		b := group(n)
		if b != n && present[b] && redo[b] {
			work[i] = b
		} else {
			work[i] = n
		}
	}
	return uniqueSuffix(work)
}

// uniqueSuffix suffixes the second and later copies of a name with _2,
// _3, ..., skipping suffixed names that exist already.
func uniqueSuffix(names []string) []string {
	seen := map[string]bool{}
	for _, n := range names {
		seen[n] = false
	}
	out := make([]string, len(names))
	used := map[string]bool{}
	for i, n := range names {
		if !used[n] {
			used[n] = true
			out[i] = n
			continue
		}
		for k := 2; ; k++ {
			c := n + "_" + strconv.Itoa(k)
			if _, exists := seen[c]; !exists && !used[c] {
				used[c] = true
				out[i] = c
				break
			}
		}
	}
	return out
}
