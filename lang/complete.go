package lang

import (
	"fmt"
	"sort"
	"strings"
	"unicode/utf8"

	"lsys/lang/syntax"
	"lsys/lsys"
)

// IsComplete reports "complete", "incomplete" (open bracket or block; indent
// is the suggested indent for the next line) or "invalid".
func (s *Session) IsComplete(src string) (status, indent string) {
	defer func() {
		if r := recover(); r != nil {
			status, indent = "invalid", ""
		}
	}()
	var sc syntax.Scanner
	sc.Init(src)
	var stack []syntax.Token
	for {
		tok, _, _ := sc.Scan()
		if tok == syntax.EOF {
			break
		}
		switch tok {
		case syntax.LPAREN, syntax.LBRACK, syntax.LBRACE:
			stack = append(stack, tok)
		case syntax.RPAREN, syntax.RBRACK, syntax.RBRACE:
			want := map[syntax.Token]syntax.Token{syntax.RPAREN: syntax.LPAREN, syntax.RBRACK: syntax.LBRACK, syntax.RBRACE: syntax.LBRACE}[tok]
			if len(stack) == 0 || stack[len(stack)-1] != want {
				return "invalid", ""
			}
			stack = stack[:len(stack)-1]
		}
	}
	// A line ending in a backslash continues.
	if strings.HasSuffix(strings.TrimRight(src, " \t\r"), "\\") {
		return "incomplete", ""
	}
	if len(sc.Errors) > 0 {
		return "invalid", ""
	}
	if len(stack) > 0 {
		return "incomplete", strings.Repeat("  ", len(stack))
	}
	if _, err := syntax.ParseCell(src); err != nil {
		return "invalid", ""
	}
	return "complete", ""
}

func isIdentRune(r rune) bool { return syntax.IsLetter(r) || syntax.IsDigit(r) }

// openContext describes the innermost open bracket before a point.
type openContext struct {
	tok      syntax.Token // LPAREN, LBRACK, LBRACE or EOF when none
	callee   string       // name before '(' when it is a call
	block    bool         // a system block
	declared []string
	given    []string // named arguments already written in the call
	// positional counts the arguments written by position before the
	// one at the point: they fill the first parameters.
	positional int
	recordIn   string // inside a record that is an argument of a call whose first argument is this name
}

// contextAt scans src[:off] (byte offset) for the innermost open bracket.
func contextAt(src string) openContext {
	var sc syntax.Scanner
	sc.Init(src)
	type frame struct {
		tok      syntax.Token
		callee   string
		block    bool
		declared []string
		given    []string
		firstArg string // a name written as the first argument of a call
		// the argument being scanned: written yet, named; and how many
		// finished arguments were positional
		argSeen, argNamed bool
		positional        int
	}
	var stack []*frame
	prev, prevLit := syntax.EOF, ""
	pendingBlock := false // saw "system every": the next '{' opens a block
	declKind := ""
	for {
		tok, _, lit := sc.Scan()
		if tok == syntax.EOF {
			break
		}
		var top *frame
		if len(stack) > 0 {
			top = stack[len(stack)-1]
		}
		if top != nil && tok != syntax.COMMA && tok != syntax.NEWLINE {
			top.argSeen = true
		}
		switch tok {
		case syntax.COMMA:
			if top != nil && top.tok == syntax.LPAREN {
				if top.argSeen && !top.argNamed {
					top.positional++
				}
				top.argSeen, top.argNamed = false, false
			}
		case syntax.LPAREN, syntax.LBRACK, syntax.LBRACE:
			f := &frame{tok: tok}
			if tok == syntax.LPAREN && prev == syntax.IDENT {
				f.callee = prevLit
			}
			if tok == syntax.LBRACE && ((prev == syntax.IDENT && prevLit == "system") || pendingBlock) {
				f.block = true
				pendingBlock = false
			}
			stack = append(stack, f)
		case syntax.RPAREN, syntax.RBRACK, syntax.RBRACE:
			if len(stack) > 0 {
				stack = stack[:len(stack)-1]
			}
		case syntax.COLON:
			if top != nil && top.tok == syntax.LPAREN && prev == syntax.IDENT {
				top.given = append(top.given, prevLit)
				top.argNamed = true
			}
		case syntax.IDENT:
			if top != nil && top.tok == syntax.LPAREN && prev == syntax.LPAREN {
				top.firstArg = lit
			}
			if lit == "every" && prev == syntax.IDENT && prevLit == "system" {
				pendingBlock = true
			}
			if top != nil && top.block {
				if (lit == "states" || lit == "inputs" || lit == "outputs") && (prev == syntax.NEWLINE || prev == syntax.LBRACE) {
					declKind = lit
				} else if declKind != "" {
					top.declared = append(top.declared, lit)
				}
			}
		case syntax.NEWLINE:
			declKind = ""
			pendingBlock = false
		}
		prev, prevLit = tok, lit
	}
	if len(stack) == 0 {
		return openContext{tok: syntax.EOF}
	}
	f := stack[len(stack)-1]
	oc := openContext{tok: f.tok, callee: f.callee, block: f.block, given: f.given, positional: f.positional}
	if len(stack) > 1 && f.tok == syntax.LBRACE && !f.block {
		if p := stack[len(stack)-2]; p.tok == syntax.LPAREN {
			oc.recordIn = p.firstArg
		}
	}
	// Names declared in any enclosing block.
	for _, fr := range stack {
		oc.declared = append(oc.declared, fr.declared...)
	}
	return oc
}

// Complete returns candidates for the word ending at cursor (a rune offset
// into src) and the rune range [start, end) they replace.
func (s *Session) Complete(src string, cursor int) (matches []string, start, end int) {
	defer func() {
		if r := recover(); r != nil {
			matches, start, end = nil, cursor, cursor
		}
	}()
	runes := []rune(src)
	if cursor < 0 {
		cursor = 0
	}
	if cursor > len(runes) {
		cursor = len(runes)
	}
	start = cursor
	for start > 0 && isIdentRune(runes[start-1]) {
		start--
	}
	prefix := string(runes[start:cursor])
	before := string(runes[:start])
	seen := map[string]bool{}
	add := func(list []string, suffix string) {
		var found []string
		for _, c := range list {
			if strings.HasPrefix(c, prefix) && !seen[c+suffix] {
				seen[c+suffix] = true
				found = append(found, c+suffix)
			}
		}
		sort.Strings(found)
		matches = append(matches, found...)
	}
	// After a dot: fields of the value before it.
	if start > 0 && runes[start-1] == '.' {
		if v, ok := s.valueBefore(runes[:start-1]); ok {
			add(s.reg.fieldNames(v), "")
		}
		return matches, start, cursor
	}
	if inString(before) {
		return nil, cursor, cursor
	}
	oc := contextAt(before)
	if oc.tok == syntax.LPAREN && oc.callee != "" {
		var params []string
		given := map[string]bool{}
		for _, g := range oc.given {
			given[g] = true
		}
		if b, ok := s.reg.Lookup(oc.callee); ok && b.Fn != nil {
			for i, p := range b.Params {
				if !p.Variadic && !given[p.Name] && i >= oc.positional {
					params = append(params, p.Name)
				}
			}
		} else if v, ok := s.Get(oc.callee); ok {
			if f, ok := v.(*Function); ok {
				for i, p := range f.Params {
					if !given[p] && i >= oc.positional {
						params = append(params, p)
					}
				}
			}
		}
		if prefix != "" || len(params) > 0 {
			add(params, ": ")
		}
	}
	if oc.block {
		add(oc.declared, "")
	}
	// Inside a record passed to a call on a model (at: {...}, inputs: {...}):
	// the model's states and inputs.
	if oc.recordIn != "" {
		if v, ok := s.Get(oc.recordIn); ok {
			var names []string
			if bs, ok := s.sourceOf(v); ok {
				names = append(append(names, bs.states...), bs.inputs...)
			} else if g, ok := v.(*lsys.System); ok {
				names = append(append(names, g.StateNames...), g.InputNames...)
			}
			add(names, ": ")
		}
	}
	if prefix == "" && oc.tok != syntax.LPAREN && !oc.block {
		return matches, start, cursor
	}
	add(s.Names(), "")
	add(s.reg.Names(), "")
	var kws []string
	for k := range syntax.Keywords {
		kws = append(kws, k)
	}
	if prefix != "" {
		add(kws, "")
	}
	return matches, start, cursor
}

// inString reports whether the text ends inside an open string literal.
func inString(text string) bool {
	line := text
	if k := strings.LastIndexByte(text, '\n'); k >= 0 {
		line = text[k+1:]
	}
	in := false
	for i := 0; i < len(line); i++ {
		switch line[i] {
		case '\\':
			if in {
				i++
			}
		case '"':
			in = !in
		case '#':
			if !in {
				return true // in a comment: no completion either
			}
		}
	}
	return in
}

// valueBefore evaluates a chain name.field.field ending just before the
// dot, without running any code.
func (s *Session) valueBefore(runes []rune) (any, bool) {
	end := len(runes)
	start := end
	for start > 0 && (isIdentRune(runes[start-1]) || runes[start-1] == '.') {
		start--
	}
	chain := strings.Split(string(runes[start:end]), ".")
	if len(chain) == 0 || chain[0] == "" {
		return nil, false
	}
	v, ok := s.Get(chain[0])
	if !ok {
		return nil, false
	}
	for _, f := range chain[1:] {
		fr, has := s.reg.fieldsOf(v)
		if !has {
			return nil, false
		}
		next, found, err := fr.get(f)
		if !found || err != nil {
			return nil, false
		}
		v = next
	}
	return v, true
}

// Inspect returns help for the name under or before cursor (rune offset):
// signature, doc and example for a built-in, a summary for a binding.
// found is false when there is nothing to say.
func (s *Session) Inspect(src string, cursor int) (text string, found bool) {
	defer func() {
		if r := recover(); r != nil {
			text, found = "", false
		}
	}()
	runes := []rune(src)
	if cursor < 0 {
		cursor = 0
	}
	if cursor > len(runes) {
		cursor = len(runes)
	}
	start, end := cursor, cursor
	for start > 0 && isIdentRune(runes[start-1]) {
		start--
	}
	for end < len(runes) && isIdentRune(runes[end]) {
		end++
	}
	name := string(runes[start:end])
	if name != "" && start > 0 && runes[start-1] == '.' {
		if v, ok := s.valueBefore(runes[:start-1]); ok {
			var fv any
			has := false
			if fr, ok := s.reg.fieldsOf(v); ok {
				var err error
				fv, has, err = fr.get(name)
				has = has && err == nil
			}
			if has {
				return fmt.Sprintf("%s: %s\n\n%s", name, s.reg.TypeName(fv), s.Format(fv)), true
			}
		}
	}
	if name == "" || syntax.IsDigit(runes[start]) {
		oc := contextAt(string(runes[:cursor]))
		if oc.tok != syntax.LPAREN || oc.callee == "" {
			return "", false
		}
		name = oc.callee
	}
	if v, ok := s.Get(name); ok {
		return s.bindingHelp(name, v), true
	}
	if b, ok := s.reg.Lookup(name); ok {
		return s.reg.HelpText(b), true
	}
	if syntax.IsKeyword(name) {
		return keywordHelp[name], keywordHelp[name] != ""
	}
	return "", false
}

var keywordHelp = map[string]string{
	"if":    "if condition then value else other\n\nChooses between two values; both branches are required.",
	"then":  "if condition then value else other",
	"else":  "if condition then value else other",
	"and":   "a and b: true when both are true (b is not evaluated when a is false).",
	"or":    "a or b: true when either is true (b is not evaluated when a is true).",
	"not":   "not a: true when a is false.",
	"true":  "The boolean true.",
	"false": "The boolean false.",
}

// bindingHelp summarises a bound value for inspect.
func (s *Session) bindingHelp(name string, v any) string {
	var text string
	switch t := v.(type) {
	case *lsys.System:
		text = systemText(t)
	case *Function:
		text = "function " + t.String()
	default:
		text = s.Format(v)
	}
	const limit = 4000
	if len(text) > limit {
		cut := limit
		for cut > 0 && !utf8.RuneStart(text[cut]) {
			cut--
		}
		text = text[:cut] + "\n..."
	}
	return fmt.Sprintf("%s: %s\n\n%s", name, s.reg.TypeName(v), text)
}
