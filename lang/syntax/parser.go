package syntax

import (
	"fmt"
	"math"
)

// MaxNesting bounds how deeply brackets and operators may nest in one cell,
// so that hostile input cannot exhaust the stack.
const MaxNesting = 200

// ParseCell parses a cell into statements. On syntax errors it returns
// the statements it could read and an ErrorList (sorted by position).
func ParseCell(src string) ([]Stmt, error) {
	var p parser
	p.init(src)
	stmts := p.parseCell()
	errs := append(p.sc.Errors, p.errors...)
	errs.sort()
	errs = dedupeLines(errs)
	if len(errs) > 0 {
		return stmts, errs
	}
	return stmts, nil
}

// dedupeLines keeps the first error of each line: later ones on the same
// line are usually consequences of the first.
func dedupeLines(l ErrorList) ErrorList {
	var out ErrorList
	last := -1
	for _, e := range l {
		if e.Pos.Line == last {
			continue
		}
		last = e.Pos.Line
		out = append(out, e)
	}
	return out
}

type parser struct {
	sc     Scanner
	tok    Token
	pos    Pos
	lit    string
	errors ErrorList
	nlFree []bool // stack: are newlines skipped at this bracket level?
	depth  int
	rhs    int // > 0 while parsing the right-hand side of a block equation
}

type bailout struct{}

func (p *parser) init(src string) {
	p.sc.Init(src)
	p.next()
}

func (p *parser) next() {
	for {
		p.tok, p.pos, p.lit = p.sc.Scan()
		// Newlines are free inside brackets; a ';' is not (it would hide a
		// mistake such as [1; 2]).
		if p.tok == NEWLINE && p.lit != ";" && len(p.nlFree) > 0 && p.nlFree[len(p.nlFree)-1] {
			continue
		}
		return
	}
}

func (p *parser) push(free bool) { p.nlFree = append(p.nlFree, free) }
func (p *parser) pop() {
	if len(p.nlFree) > 0 {
		p.nlFree = p.nlFree[:len(p.nlFree)-1]
	}
}

func (p *parser) errorAt(pos Pos, msg, hint string) {
	p.errors = append(p.errors, &Error{Pos: pos, Msg: msg, Hint: hint})
	if len(p.errors)+len(p.sc.Errors) > 20 {
		panic(bailout{})
	}
}

func (p *parser) describe() string {
	switch p.tok {
	case IDENT:
		return fmt.Sprintf("name '%s'", p.lit)
	case NUMBER, IMAG:
		return fmt.Sprintf("number %s", p.lit)
	case STRING:
		return "a string"
	case NEWLINE:
		if p.lit == ";" {
			return "';'"
		}
		return "end of line"
	case EOF:
		return "end of cell"
	}
	return fmt.Sprintf("'%s'", p.tok)
}

// expect consumes tok or records an error; closing brackets pop the
// newline mode even when missing, so that recovery stays in step.
func (p *parser) expect(tok Token, what string) Pos {
	pos := p.pos
	if tok == RPAREN || tok == RBRACK || tok == RBRACE {
		p.pop()
	}
	if p.tok != tok {
		hint := ""
		switch tok {
		case RPAREN, RBRACK, RBRACE:
			hint = fmt.Sprintf("Close it with '%s', or separate items with ','.", tok)
		}
		p.errorAt(p.pos, fmt.Sprintf("expected %s, found %s", what, p.describe()), hint)
		panic(bailout{})
	}
	p.next()
	return pos
}

func (p *parser) parseCell() (stmts []Stmt) {
	defer func() {
		if r := recover(); r != nil {
			if _, ok := r.(bailout); !ok {
				panic(r)
			}
		}
	}()
	for p.tok != EOF {
		if p.tok == NEWLINE {
			p.next()
			continue
		}
		if s := p.parseStmtRecover(); s != nil {
			stmts = append(stmts, s)
		}
	}
	return stmts
}

// parseStmtRecover parses one statement; after an error it skips to the
// end of the line (outside brackets) and carries on with the next one.
func (p *parser) parseStmtRecover() (s Stmt) {
	n := len(p.errors) + len(p.sc.Errors)
	func() {
		defer func() {
			if r := recover(); r != nil {
				if _, ok := r.(bailout); !ok {
					panic(r)
				}
				s = nil
			}
		}()
		s = p.parseStmt()
	}()
	if len(p.errors)+len(p.sc.Errors) > 20 {
		panic(bailout{})
	}
	if len(p.errors)+len(p.sc.Errors) > n || s == nil {
		p.nlFree = p.nlFree[:0]
		p.depth = 0
		for p.tok != NEWLINE && p.tok != EOF {
			p.next()
		}
		return nil
	}
	return s
}

func (p *parser) parseStmt() Stmt {
	x := p.parseExpr()
	var s Stmt
	if p.tok == ASSIGN {
		eq := p.pos
		switch lhs := x.(type) {
		case *Ident:
			p.next()
			s = &AssignStmt{Name: lhs, Eq: eq, Value: p.parseExpr()}
		case *CallExpr:
			name, ok := lhs.Fun.(*Ident)
			if !ok {
				p.errorAt(lhs.Pos(), "a function is defined as name(parameters) = expression", "Write it like f(k) = k^2 + 1.")
				panic(bailout{})
			}
			var params []*Ident
			seen := map[string]bool{}
			for _, a := range lhs.Args {
				id, ok := a.Value.(*Ident)
				if !ok || a.Name != nil {
					p.errorAt(a.Value.Pos(), "parameters of a function definition must be plain names", "Write it like f(k, b) = expression.")
					panic(bailout{})
				}
				if seen[id.Name] {
					p.errorAt(id.Pos(), fmt.Sprintf("parameter '%s' appears twice", id.Name), "Give each parameter its own name.")
					panic(bailout{})
				}
				seen[id.Name] = true
				params = append(params, id)
			}
			p.next()
			s = &FuncDef{Name: name, Params: params, Eq: eq, Body: p.parseExpr()}
		default:
			p.errorAt(eq, "the left side of '=' must be a name or name(parameters)",
				"To compare two values use '=='.")
			panic(bailout{})
		}
	} else {
		s = &ExprStmt{X: x}
	}
	switch p.tok {
	case NEWLINE:
		p.next()
	case EOF:
	case PRIME:
		p.errorAt(p.pos, "a derivative x' can only be written inside system { ... }",
			"Put the equation in a system block: system { states x; x' = ... }.")
		panic(bailout{})
	default:
		hint := "Put one statement per line, or separate statements with ';'."
		if p.tok == COLON {
			hint = "Named arguments go inside a call: f(x, name: value); records are written {name: value}."
		}
		p.errorAt(p.pos, fmt.Sprintf("unexpected %s after the end of the statement", p.describe()), hint)
		panic(bailout{})
	}
	return s
}

func (p *parser) enter() {
	p.depth++
	if p.depth > MaxNesting {
		p.errorAt(p.pos, fmt.Sprintf("expression nested more than %d levels deep", MaxNesting),
			"Split it into several statements with names for the parts.")
		panic(bailout{})
	}
}

func (p *parser) leave() { p.depth-- }

func (p *parser) parseExpr() Expr {
	p.enter()
	defer p.leave()
	if p.tok == IF {
		pos := p.pos
		p.next()
		cond := p.parseExpr()
		p.expect(THEN, "'then'")
		a := p.parseExpr()
		p.expect(ELSE, "'else' (an if expression needs both branches)")
		b := p.parseExpr()
		return &IfExpr{IfPos: pos, Cond: cond, Then: a, Else: b}
	}
	return p.parseOr()
}

func (p *parser) parseOr() Expr {
	x := p.parseAnd()
	for p.tok == OR {
		pos := p.pos
		p.next()
		x = &BinaryExpr{Start: x.Pos(), X: x, OpPos: pos, Op: OR, Y: p.parseAnd()}
	}
	return x
}

func (p *parser) parseAnd() Expr {
	x := p.parseNot()
	for p.tok == AND {
		pos := p.pos
		p.next()
		x = &BinaryExpr{Start: x.Pos(), X: x, OpPos: pos, Op: AND, Y: p.parseNot()}
	}
	return x
}

func (p *parser) parseNot() Expr {
	if p.tok == NOT {
		p.enter()
		defer p.leave()
		pos := p.pos
		p.next()
		return &UnaryExpr{OpPos: pos, Op: NOT, X: p.parseNot()}
	}
	return p.parseCmp()
}

func (p *parser) parseCmp() Expr {
	x := p.parseAdd()
	switch p.tok {
	case EQL, NEQ, LSS, LEQ, GTR, GEQ:
		op, pos := p.tok, p.pos
		p.next()
		x = &BinaryExpr{Start: x.Pos(), X: x, OpPos: pos, Op: op, Y: p.parseAdd()}
		switch p.tok {
		case EQL, NEQ, LSS, LEQ, GTR, GEQ:
			p.errorAt(p.pos, "comparisons cannot be chained", "Write a < b and b < c.")
			panic(bailout{})
		}
	}
	return x
}

func (p *parser) parseAdd() Expr {
	x := p.parseMul()
	for p.tok == ADD || p.tok == SUB {
		op, pos := p.tok, p.pos
		p.next()
		x = &BinaryExpr{Start: x.Pos(), X: x, OpPos: pos, Op: op, Y: p.parseMul()}
	}
	return x
}

func (p *parser) parseMul() Expr {
	x := p.parseUnary()
	for p.tok == MUL || p.tok == DIV {
		op, pos := p.tok, p.pos
		p.next()
		x = &BinaryExpr{Start: x.Pos(), X: x, OpPos: pos, Op: op, Y: p.parseUnary()}
	}
	return x
}

func (p *parser) parseUnary() Expr {
	if p.tok == SUB || p.tok == ADD {
		p.enter()
		defer p.leave()
		op, pos := p.tok, p.pos
		p.next()
		x := p.parseUnary()
		if op == ADD {
			return x
		}
		return &UnaryExpr{OpPos: pos, Op: SUB, X: x}
	}
	return p.parsePow()
}

// parsePow: '^' binds tighter than unary minus (-2^2 is -4) and is right
// associative (2^3^2 is 2^9), as in mathematics.
func (p *parser) parsePow() Expr {
	x := p.parsePostfix()
	if p.tok == POW {
		p.enter()
		defer p.leave()
		pos := p.pos
		p.next()
		return &BinaryExpr{Start: x.Pos(), X: x, OpPos: pos, Op: POW, Y: p.parseUnary()}
	}
	return x
}

// parseIndexItem parses a position or a range lo:hi (either end may be
// left out) inside [ ].
func (p *parser) parseIndexItem() Expr {
	var lo Expr
	if p.tok != COLON {
		lo = p.parseExpr()
		if p.tok != COLON {
			return lo
		}
	}
	r := &RangeExpr{Start: p.pos, Lo: lo, Colon: p.pos}
	if lo != nil {
		r.Start = lo.Pos()
	}
	p.next()
	if p.tok != COMMA && p.tok != RBRACK {
		r.Hi = p.parseExpr()
	}
	return r
}

func (p *parser) parsePostfix() Expr {
	x := p.parsePrimary()
	for {
		switch p.tok {
		case LPAREN:
			x = p.parseCall(x)
		case PRIME:
			if p.rhs == 0 {
				return x
			}
			// A derivative on a right-hand side: the block gives each
			// state's derivative by its own equation, so a value shared
			// by two equations is a helper.
			name := ExprString(x)
			p.errorAt(p.pos, fmt.Sprintf("the derivative %s' cannot be used on a right-hand side", name),
				fmt.Sprintf("Define a helper with the right-hand side of %[1]s' (d%[1]s = ...), write %[1]s' = d%[1]s, and use d%[1]s here; helpers are evaluated before the state equations.", name))
			panic(bailout{})
		case LBRACK:
			lb := p.pos
			p.push(true)
			p.next()
			var idx []Expr
			for p.tok != RBRACK && p.tok != EOF {
				idx = append(idx, p.parseIndexItem())
				if p.tok != COMMA {
					break
				}
				p.next()
			}
			rb := p.expect(RBRACK, "']' to close the index")
			if len(idx) == 0 {
				p.errorAt(lb, "an index needs a position, as in v[1] or M[2, 1]", "Positions count from 1.")
				panic(bailout{})
			}
			x = &IndexExpr{Start: x.Pos(), X: x, Lbrack: lb, Indices: idx, Rbrack: rb}
		case DOT:
			dot := p.pos
			p.next()
			if p.tok != IDENT {
				p.errorAt(p.pos, fmt.Sprintf("expected a field name after '.', found %s", p.describe()), "Write it like r.angle.")
				panic(bailout{})
			}
			x = &FieldExpr{Start: x.Pos(), X: x, Dot: dot, Name: &Ident{NamePos: p.pos, Name: p.lit}}
			p.next()
		default:
			return x
		}
	}
}

func (p *parser) parseCall(fun Expr) Expr {
	lp := p.pos
	p.push(true)
	p.next()
	var args []*Arg
	named := false
	for p.tok != RPAREN && p.tok != EOF {
		v := p.parseExpr()
		if id, ok := v.(*Ident); ok && p.tok == COLON {
			p.next()
			args = append(args, &Arg{Name: id, Value: p.parseExpr()})
			named = true
		} else {
			if named {
				p.errorAt(v.Pos(), "a positional argument cannot follow a named one",
					"Put positional arguments first: f(G, 2, until: 5).")
				panic(bailout{})
			}
			args = append(args, &Arg{Value: v})
		}
		if p.tok != COMMA {
			break
		}
		p.next()
	}
	rp := p.expect(RPAREN, "')' to close the call")
	return &CallExpr{Start: fun.Pos(), Fun: fun, Lparen: lp, Args: args, Rparen: rp}
}

func (p *parser) parsePrimary() Expr {
	p.enter()
	defer p.leave()
	pos := p.pos
	switch p.tok {
	case IDENT:
		name := p.lit
		p.next()
		if name == "system" && (p.tok == LBRACE || (p.tok == IDENT && p.lit == "every")) {
			return p.parseSystemBlock(pos)
		}
		return &Ident{NamePos: pos, Name: name}
	case NUMBER, IMAG:
		lit, tok := p.lit, p.tok
		p.next()
		v, err := parseNumber(lit)
		if err != nil || math.IsInf(v, 0) {
			p.errorAt(pos, fmt.Sprintf("number %s is too large", lit), "Numbers must be below about 1.8e308.")
			panic(bailout{})
		}
		return &NumberLit{LitPos: pos, Lit: lit, Value: v, Imag: tok == IMAG}
	case STRING:
		v := p.lit
		p.next()
		return &StringLit{LitPos: pos, Value: v}
	case TRUE, FALSE:
		v := p.tok == TRUE
		p.next()
		return &BoolLit{LitPos: pos, Value: v}
	case LPAREN:
		p.push(true)
		p.next()
		x := p.parseExpr()
		p.expect(RPAREN, "')'")
		return x
	case LBRACK:
		p.push(true)
		p.next()
		var elems []Expr
		for p.tok != RBRACK && p.tok != EOF {
			elems = append(elems, p.parseExpr())
			if p.tok != COMMA {
				break
			}
			p.next()
		}
		rb := p.expect(RBRACK, "']' to close the list")
		return &ListLit{Lbrack: pos, Elems: elems, Rbrack: rb}
	case LBRACE:
		p.push(true)
		p.next()
		var fields []*FieldInit
		seen := map[string]bool{}
		for p.tok != RBRACE && p.tok != EOF {
			if p.tok != IDENT {
				p.errorAt(p.pos, fmt.Sprintf("expected a field name, found %s", p.describe()),
					"Records are written {angle: 0.1, rate: 0}.")
				panic(bailout{})
			}
			id := &Ident{NamePos: p.pos, Name: p.lit}
			if seen[id.Name] {
				p.errorAt(id.NamePos, fmt.Sprintf("field '%s' appears twice in this record", id.Name), "Give each field once.")
				panic(bailout{})
			}
			seen[id.Name] = true
			p.next()
			p.expect(COLON, "':' after the field name")
			fields = append(fields, &FieldInit{Name: id, Value: p.parseExpr()})
			if p.tok != COMMA {
				break
			}
			p.next()
		}
		rb := p.expect(RBRACE, "'}' to close the record")
		return &RecordLit{Lbrace: pos, Fields: fields, Rbrace: rb}
	case ILLEGAL:
		// The scanner has reported it.
		panic(bailout{})
	}
	hint := ""
	switch p.tok {
	case NEWLINE, EOF:
		hint = "The expression is incomplete: add what follows the operator."
	case RPAREN, RBRACK, RBRACE:
		hint = "This bracket closes nothing that is open here."
	case PRIME:
		hint = "Strings use double quotes; x' is a derivative inside system { ... }."
	}
	p.errorAt(pos, fmt.Sprintf("expected a value, found %s", p.describe()), hint)
	panic(bailout{})
}

// parseSystemBlock parses system [every T] { items }. Inside the braces
// newlines separate equations (unlike in records).
func (p *parser) parseSystemBlock(pos Pos) Expr {
	b := &SystemBlock{SystemPos: pos}
	if p.tok == IDENT && p.lit == "every" {
		p.next()
		b.Every = p.parseOr()
	}
	if p.tok != LBRACE {
		p.errorAt(p.pos, fmt.Sprintf("expected '{' to open the system block, found %s", p.describe()),
			"Write system every 0.01 { ... }.")
		panic(bailout{})
	}
	b.Lbrace = p.pos
	p.push(false)
	p.next()
	for {
		for p.tok == NEWLINE {
			p.next()
		}
		if p.tok == RBRACE || p.tok == EOF {
			break
		}
		if it := p.parseBlockItemRecover(); it != nil {
			b.Items = append(b.Items, it)
		}
	}
	if p.tok != RBRACE {
		p.errorAt(p.pos, fmt.Sprintf("expected '}' to close the system block, found %s", p.describe()),
			"Close the block with '}' on a line of its own.")
		panic(bailout{})
	}
	b.Rbrace = p.expect(RBRACE, "'}' to close the system block")
	return b
}

// parseBlockItemRecover parses one item of a block and what ends it. After
// an error it skips to the end of the item's line (or the block's '}') and
// returns nil, so that the rest of the block is still read and a mistake
// in one equation is reported once, not again at the closing brace.
func (p *parser) parseBlockItemRecover() (it BlockItem) {
	level, depth := len(p.nlFree), p.depth
	n := len(p.errors) + len(p.sc.Errors)
	func() {
		defer func() {
			if r := recover(); r != nil {
				if _, ok := r.(bailout); !ok || len(p.errors)+len(p.sc.Errors) > 20 {
					panic(r)
				}
				it = nil
			}
		}()
		it = p.parseBlockItem()
		switch p.tok {
		case NEWLINE:
			p.next()
		case RBRACE, EOF:
		default:
			p.errorAt(p.pos, fmt.Sprintf("unexpected %s after the equation", p.describe()),
				"Put one equation or declaration per line, or separate them with ';'.")
			panic(bailout{})
		}
	}()
	if len(p.errors)+len(p.sc.Errors) == n && it != nil {
		return it
	}
	if level <= len(p.nlFree) {
		p.nlFree = p.nlFree[:level]
	}
	p.depth = depth
	braces := 0
	for p.tok != EOF {
		switch p.tok {
		case LBRACE:
			braces++
		case RBRACE:
			if braces == 0 {
				return nil
			}
			braces--
		case NEWLINE:
			if braces == 0 {
				p.next()
				return nil
			}
		}
		p.next()
	}
	return nil
}

func (p *parser) parseBlockItem() BlockItem {
	if p.tok != IDENT {
		p.errorAt(p.pos, fmt.Sprintf("expected a declaration or an equation, found %s", p.describe()),
			"Inside system { } write: states a, b / inputs u / outputs y / a' = ... / y = ...")
		panic(bailout{})
	}
	start, name := p.pos, p.lit
	p.next()
	switch {
	case (name == "states" || name == "inputs" || name == "outputs") && p.tok == IDENT:
		d := &Decl{KindPos: start, Kind: name}
		for {
			if p.tok != IDENT {
				p.errorAt(p.pos, fmt.Sprintf("expected a name in the %s list, found %s", name, p.describe()),
					"Separate names with commas: states angle, rate.")
				panic(bailout{})
			}
			d.Names = append(d.Names, &Ident{NamePos: p.pos, Name: p.lit})
			p.next()
			if p.tok == IDENT {
				p.errorAt(p.pos, fmt.Sprintf("expected ',' between names in the %s list", name),
					"Separate names with commas: states angle, rate.")
				panic(bailout{})
			}
			if p.tok != COMMA {
				break
			}
			p.next()
		}
		return d
	case name == "next" && p.tok == IDENT:
		id := &Ident{NamePos: p.pos, Name: p.lit}
		p.next()
		if p.tok == PRIME {
			p.errorAt(p.pos, "an equation is either 'next x = ...' (sampled) or \"x' = ...\" (continuous), not both",
				"Drop the ' for a sampled system, or 'next' for a continuous one.")
			panic(bailout{})
		}
		eq := p.expect(ASSIGN, "'=' after next "+id.Name)
		return &Equation{Start: start, Kind: EqNext, Name: id, Eq: eq, Rhs: p.parseRhs()}
	}
	id := &Ident{NamePos: start, Name: name}
	kind := EqPlain
	if p.tok == PRIME {
		kind = EqDerivative
		p.next()
	}
	if p.tok != ASSIGN {
		hint := "Write an equation such as rate' = -k*angle, or a declaration such as states angle, rate."
		p.errorAt(p.pos, fmt.Sprintf("expected '=' in the equation for '%s', found %s", name, p.describe()), hint)
		panic(bailout{})
	}
	eq := p.pos
	p.next()
	return &Equation{Start: start, Kind: kind, Name: id, Eq: eq, Rhs: p.parseRhs()}
}

// parseRhs parses the right-hand side of a block equation, where a prime
// after a name is a derivative used as a value.
func (p *parser) parseRhs() Expr {
	p.rhs++
	defer func() { p.rhs-- }()
	return p.parseExpr()
}
