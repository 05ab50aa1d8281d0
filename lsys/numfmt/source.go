package numfmt

import (
	"math"
	"strconv"
	"strings"
	"unicode"
)

// The text form of a linear system is the lsys source that rebuilds it,
// so a user can copy it into a cell: an equation block while the
// equations stay short, else a call of system with the matrices laid out
// as tables, row by row. Numbers are written in their shortest form that
// reads back to the same float64 (Exact), so the source rebuilds the very
// same matrices. It lives here, beside the number forms, because the
// language (print, inspect) and display (text/plain) both show it.

// SystemForm is what the source of a linear system needs: its signal
// names, its matrices as entry functions (n x n, n x m, p x n, p x m with
// n, m, p the numbers of names) and its sample time (0: continuous).
type SystemForm struct {
	States, Inputs, Outputs []string
	A, B, C, D              func(i, j int) float64
	Every                   float64
}

// Source limits: an equation block while no equation has more than
// sourceTerms terms, a table otherwise; no source above sourceMax states,
// inputs or outputs (Source then returns "").
const (
	sourceTerms = 8
	sourceMax   = 16
)

// Exact writes v in the shortest form that reads back to the same
// float64 in the language: 0.1, -2, 1.5e-7, 6.02e23 (no "+" and no
// leading zeros in the exponent).
func Exact(v float64) string {
	if v == 0 {
		return "0" // also -0: the language has no negative zero
	}
	s := strconv.FormatFloat(v, 'g', -1, 64)
	if i := strings.IndexByte(s, 'e'); i >= 0 {
		mant, exp := s[:i], s[i+1:]
		sign := ""
		if exp[0] == '+' || exp[0] == '-' {
			if exp[0] == '-' {
				sign = "-"
			}
			exp = exp[1:]
		}
		exp = strings.TrimLeft(exp, "0")
		s = mant + "e" + sign + exp
	}
	return s
}

// Source is the lsys source that rebuilds the system, or "" when it is
// too large to show (more than 16 states, inputs or outputs) or not
// finite.
func Source(f SystemForm) string {
	n, m, p := len(f.States), len(f.Inputs), len(f.Outputs)
	if n > sourceMax || m > sourceMax || p > sourceMax || !f.finite() {
		return ""
	}
	if p == 0 && n > 0 {
		// neither form can say "no outputs": a block without outputs
		// and a call without C both make every state an output
		return ""
	}
	if s, ok := f.block(); ok {
		return s
	}
	return f.table()
}

func (f SystemForm) finite() bool {
	n, m, p := len(f.States), len(f.Inputs), len(f.Outputs)
	for _, b := range []struct {
		at   func(i, j int) float64
		r, c int
	}{{f.A, n, n}, {f.B, n, m}, {f.C, p, n}, {f.D, p, m}} {
		for i := 0; i < b.r; i++ {
			for j := 0; j < b.c; j++ {
				if v := b.at(i, j); math.IsNaN(v) || math.IsInf(v, 0) {
					return false
				}
			}
		}
	}
	return true
}

// blockWords are names an equation block cannot take as signals: the
// language's keywords, the block's own words, its functions and constants.
var blockWords = map[string]bool{
	"true": true, "false": true, "and": true, "or": true, "not": true, "if": true, "then": true, "else": true,
	"system": true, "every": true, "states": true, "inputs": true, "outputs": true, "next": true,
	"sin": true, "cos": true, "tan": true, "exp": true, "log": true, "sqrt": true, "abs": true,
	"pi": true, "inf": true, "nan": true,
}

// isName reports whether s is a name of the language usable as a signal.
func isName(s string) bool {
	if s == "" || blockWords[s] {
		return false
	}
	for i, r := range s {
		if !(unicode.IsLetter(r) || r == '_' || i > 0 && unicode.IsDigit(r)) {
			return false
		}
	}
	return true
}

// block writes the equation block, or reports that the names or the
// length of the equations do not allow one.
func (f SystemForm) block() (string, bool) {
	n, m, p := len(f.States), len(f.Inputs), len(f.Outputs)
	// When every state is an output of the same name (C = I, D = 0) the
	// block declares no outputs: that is how such a block is written.
	statesOut := p == n && n > 0
	for i := 0; statesOut && i < p; i++ {
		statesOut = f.Outputs[i] == f.States[i]
		for j := 0; statesOut && j < n; j++ {
			want := 0.0
			if i == j {
				want = 1
			}
			statesOut = f.C(i, j) == want
		}
		for j := 0; statesOut && j < m; j++ {
			statesOut = f.D(i, j) == 0
		}
	}
	seen := map[string]bool{}
	names := append(append([]string(nil), f.States...), f.Inputs...)
	if !statesOut {
		names = append(names, f.Outputs...)
	}
	for _, s := range names {
		if !isName(s) || seen[s] {
			return "", false
		}
		seen[s] = true
	}
	var b strings.Builder
	b.WriteString("system ")
	if f.Every > 0 {
		b.WriteString("every " + Exact(f.Every) + " ")
	}
	b.WriteString("{\n")
	if n > 0 {
		b.WriteString("  states " + strings.Join(f.States, ", ") + "\n")
	}
	if m > 0 {
		b.WriteString("  inputs " + strings.Join(f.Inputs, ", ") + "\n")
	}
	if p > 0 && !statesOut {
		b.WriteString("  outputs " + strings.Join(f.Outputs, ", ") + "\n")
	}
	row := func(x, u func(j int) float64) (string, bool) {
		var terms []string
		for j := 0; j < n; j++ {
			terms = appendTerm(terms, x(j), f.States[j])
		}
		for j := 0; j < m; j++ {
			terms = appendTerm(terms, u(j), f.Inputs[j])
		}
		if len(terms) > sourceTerms {
			return "", false
		}
		if len(terms) == 0 {
			return "0", true
		}
		s := strings.Join(terms, " ")
		if strings.HasPrefix(s, "+ ") {
			s = s[2:]
		} else {
			s = "-" + s[2:] // "- 2*x" first: "-2*x"
		}
		return s, true
	}
	for i := 0; i < n; i++ {
		rhs, ok := row(func(j int) float64 { return f.A(i, j) }, func(j int) float64 { return f.B(i, j) })
		if !ok {
			return "", false
		}
		if f.Every > 0 {
			b.WriteString("  next " + f.States[i] + " = " + rhs + "\n")
		} else {
			b.WriteString("  " + f.States[i] + "' = " + rhs + "\n")
		}
	}
	for i := 0; i < p && !statesOut; i++ {
		rhs, ok := row(func(j int) float64 { return f.C(i, j) }, func(j int) float64 { return f.D(i, j) })
		if !ok {
			return "", false
		}
		b.WriteString("  " + f.Outputs[i] + " = " + rhs + "\n")
	}
	b.WriteString("}")
	return b.String(), true
}

// appendTerm adds "+ c*name" or "- c*name" (no factor for 1; nothing for 0).
func appendTerm(terms []string, c float64, name string) []string {
	if c == 0 {
		return terms
	}
	sign := "+ "
	if c < 0 {
		sign, c = "- ", -c
	}
	if c == 1 {
		return append(terms, sign+name)
	}
	return append(terms, sign+Exact(c)+"*"+name)
}

// table writes a call of system with named matrices laid out row by row.
func (f SystemForm) table() string {
	n, m, p := len(f.States), len(f.Inputs), len(f.Outputs)
	var args []string
	mat := func(name string, at func(i, j int) float64, r, c int) {
		if r == 0 || c == 0 {
			return
		}
		cells := make([][]string, r)
		width := make([]int, c)
		for i := range cells {
			cells[i] = make([]string, c)
			for j := range cells[i] {
				cells[i][j] = Exact(at(i, j))
				width[j] = max(width[j], len(cells[i][j]))
			}
		}
		var b strings.Builder
		b.WriteString(name + ": [")
		pad := strings.Repeat(" ", 2+len(name)+3)
		for i, row := range cells {
			if i > 0 {
				b.WriteString(",\n" + pad)
			}
			b.WriteString("[")
			for j, v := range row {
				if j > 0 {
					b.WriteString(", ")
				}
				b.WriteString(strings.Repeat(" ", width[j]-len(v)) + v)
			}
			b.WriteString("]")
		}
		b.WriteString("]")
		args = append(args, b.String())
	}
	mat("A", f.A, n, n)
	mat("B", f.B, n, m)
	if p > 0 {
		mat("C", f.C, p, n)
	}
	mat("D", f.D, p, m)
	list := func(name string, ss []string) {
		if len(ss) == 0 {
			return
		}
		q := make([]string, len(ss))
		for i, s := range ss {
			q[i] = quote(s)
		}
		args = append(args, name+": ["+strings.Join(q, ", ")+"]")
	}
	list("states", f.States)
	list("inputs", f.Inputs)
	list("outputs", f.Outputs)
	if f.Every > 0 {
		args = append(args, "every: "+Exact(f.Every))
	}
	return "system(\n  " + strings.Join(args, ",\n  ") + ")"
}

// quote writes s as a string of the language, whose escapes are \n \t
// \" and \\.
func quote(s string) string {
	r := strings.NewReplacer(`\`, `\\`, `"`, `\"`, "\n", `\n`, "\t", `\t`)
	return `"` + r.Replace(s) + `"`
}
