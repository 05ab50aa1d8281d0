package syntax

import (
	"fmt"
	"strconv"
	"strings"
	"unicode"
	"unicode/utf8"
)

// Pos is a position in a cell: Line and Column are 1-based, Column counts
// runes (what an editor shows), Offset is the byte offset.
type Pos struct {
	Offset, Line, Column int
}

// IsValid reports whether p points somewhere (Line 0 means "no position").
func (p Pos) IsValid() bool { return p.Line > 0 }

func (p Pos) String() string { return fmt.Sprintf("line %d, column %d", p.Line, p.Column) }

// Token is the kind of a lexical token.
type Token int

// The tokens of the language.
const (
	ILLEGAL Token = iota
	EOF
	NEWLINE // also produced by ';'
	IDENT
	NUMBER // 2, 0.5, 1e-3
	IMAG   // 2j, 0.5j
	STRING // "text"

	ADD // +
	SUB // -
	MUL // *
	DIV // /
	POW // ^

	ASSIGN // =
	EQL    // ==
	NEQ    // !=
	LSS    // <
	LEQ    // <=
	GTR    // >
	GEQ    // >=

	LPAREN // (
	RPAREN // )
	LBRACK // [
	RBRACK // ]
	LBRACE // {
	RBRACE // }
	COMMA  // ,
	COLON  // :
	DOT    // .
	PRIME  // ' (time derivative in equation blocks)

	keywordBeg
	TRUE
	FALSE
	AND
	OR
	NOT
	IF
	THEN
	ELSE
	keywordEnd
)

var tokenText = [...]string{
	ILLEGAL: "illegal character", EOF: "end of cell", NEWLINE: "end of line",
	IDENT: "name", NUMBER: "number", IMAG: "imaginary number", STRING: "string",
	ADD: "+", SUB: "-", MUL: "*", DIV: "/", POW: "^",
	ASSIGN: "=", EQL: "==", NEQ: "!=", LSS: "<", LEQ: "<=", GTR: ">", GEQ: ">=",
	LPAREN: "(", RPAREN: ")", LBRACK: "[", RBRACK: "]", LBRACE: "{", RBRACE: "}",
	COMMA: ",", COLON: ":", DOT: ".", PRIME: "'",
	TRUE: "true", FALSE: "false", AND: "and", OR: "or", NOT: "not",
	IF: "if", THEN: "then", ELSE: "else",
}

func (t Token) String() string {
	if t >= 0 && int(t) < len(tokenText) && tokenText[t] != "" {
		return tokenText[t]
	}
	return fmt.Sprintf("token(%d)", int(t))
}

var Keywords = map[string]Token{
	"true": TRUE, "false": FALSE, "and": AND, "or": OR, "not": NOT,
	"if": IF, "then": THEN, "else": ELSE,
}

// IsKeyword reports whether name is reserved and cannot be bound.
func IsKeyword(name string) bool { _, ok := Keywords[name]; return ok }

// Scanner splits a cell into tokens. Like go/scanner it never stops at an
// error: it records it and carries on, so the parser can report several.
type Scanner struct {
	src    string
	off    int // byte offset of ch
	line   int
	col    int // rune column of ch (1-based)
	ch     rune
	chw    int
	Errors ErrorList
}

// Init prepares s to scan src.
func (s *Scanner) Init(src string) {
	s.src = src
	s.off, s.line, s.col = 0, 1, 1
	s.Errors = nil
	s.load()
}

func (s *Scanner) load() {
	if s.off >= len(s.src) {
		s.ch, s.chw = -1, 0
		return
	}
	r, w := utf8.DecodeRuneInString(s.src[s.off:])
	s.ch, s.chw = r, w
}

func (s *Scanner) next() {
	if s.ch < 0 {
		return
	}
	if s.ch == '\n' {
		s.line++
		s.col = 1
	} else {
		s.col++
	}
	s.off += s.chw
	s.load()
}

func (s *Scanner) peek() rune {
	o := s.off + s.chw
	if o >= len(s.src) {
		return -1
	}
	r, _ := utf8.DecodeRuneInString(s.src[o:])
	return r
}

func (s *Scanner) pos() Pos { return Pos{Offset: s.off, Line: s.line, Column: s.col} }

func (s *Scanner) error(p Pos, msg, hint string) {
	s.Errors = append(s.Errors, &Error{Pos: p, Msg: msg, Hint: hint})
}

func IsLetter(r rune) bool { return r == '_' || unicode.IsLetter(r) }
func IsDigit(r rune) bool  { return '0' <= r && r <= '9' }

// Scan returns the next token, its position and its literal text (for
// names, numbers and strings; the string literal is already unquoted).
func (s *Scanner) Scan() (tok Token, pos Pos, lit string) {
	for {
		for s.ch == ' ' || s.ch == '\t' || s.ch == '\r' || s.ch == '\f' || s.ch == '\v' || s.ch == 0xFEFF {
			s.next()
		}
		if s.ch == '#' {
			for s.ch >= 0 && s.ch != '\n' {
				s.next()
			}
		}
		// A backslash at the end of a line joins it with the next.
		if s.ch == '\\' {
			p := s.pos()
			s.next()
			for s.ch == ' ' || s.ch == '\t' || s.ch == '\r' {
				s.next()
			}
			if s.ch == '\n' {
				s.next()
				continue
			}
			s.error(p, "a backslash may only end a line (to continue it on the next)", "Remove the backslash.")
			continue
		}
		break
	}
	pos = s.pos()
	ch := s.ch
	switch {
	case ch < 0:
		return EOF, pos, ""
	case IsLetter(ch):
		start := s.off
		for IsLetter(s.ch) || IsDigit(s.ch) {
			s.next()
		}
		lit = s.src[start:s.off]
		if kw, ok := Keywords[lit]; ok {
			return kw, pos, lit
		}
		return IDENT, pos, lit
	case IsDigit(ch) || (ch == '.' && IsDigit(s.peek())):
		return s.number(pos)
	case ch == '"':
		return STRING, pos, s.str(pos)
	}
	s.next()
	switch ch {
	case '\n', ';':
		return NEWLINE, pos, string(ch)
	case '+':
		return ADD, pos, ""
	case '-':
		return SUB, pos, ""
	case '*':
		if s.ch == '*' {
			s.next()
			s.error(pos, "'**' is not an operator here", "Write powers with '^', as in s^2.")
			return POW, pos, ""
		}
		return MUL, pos, ""
	case '/':
		return DIV, pos, ""
	case '^':
		return POW, pos, ""
	case '=':
		if s.ch == '=' {
			s.next()
			return EQL, pos, ""
		}
		return ASSIGN, pos, ""
	case '!':
		if s.ch == '=' {
			s.next()
			return NEQ, pos, ""
		}
		s.error(pos, "'!' is not an operator", "Write 'not x' for negation and '!=' for 'not equal'.")
		return ILLEGAL, pos, "!"
	case '<':
		if s.ch == '=' {
			s.next()
			return LEQ, pos, ""
		}
		return LSS, pos, ""
	case '>':
		if s.ch == '=' {
			s.next()
			return GEQ, pos, ""
		}
		return GTR, pos, ""
	case '(':
		return LPAREN, pos, ""
	case ')':
		return RPAREN, pos, ""
	case '[':
		return LBRACK, pos, ""
	case ']':
		return RBRACK, pos, ""
	case '{':
		return LBRACE, pos, ""
	case '}':
		return RBRACE, pos, ""
	case ',':
		return COMMA, pos, ""
	case ':':
		return COLON, pos, ""
	case '.':
		return DOT, pos, ""
	case '\'', '\u2032': // ' and the typographic prime, as pasted from documents
		return PRIME, pos, ""
	case '\u2212': // the typographic minus sign
		return SUB, pos, ""
	}
	hint := "Remove it; names are letters, digits and '_', strings use double quotes."
	switch ch {
	case '`', '\u201c', '\u201d', '\u2018', '\u2019':
		hint = "Strings use straight double quotes: \"text\"."
	case '\u00d7', '\u22c5', '\u00b7':
		hint = "Write multiplication with '*'."
	}
	s.error(pos, fmt.Sprintf("unexpected character %q", ch), hint)
	return ILLEGAL, pos, string(ch)
}

func (s *Scanner) number(pos Pos) (Token, Pos, string) {
	start := s.off
	for IsDigit(s.ch) {
		s.next()
	}
	if s.ch == '.' && !IsLetter(s.peek()) {
		s.next()
		for IsDigit(s.ch) {
			s.next()
		}
	}
	if s.ch == 'e' || s.ch == 'E' {
		p := s.peek()
		if IsDigit(p) || p == '+' || p == '-' {
			s.next()
			if s.ch == '+' || s.ch == '-' {
				s.next()
			}
			if !IsDigit(s.ch) {
				s.error(s.pos(), "exponent has no digits", "Write it like 1e-3.")
			}
			for IsDigit(s.ch) {
				s.next()
			}
		}
	}
	lit := s.src[start:s.off]
	tok := NUMBER
	if s.ch == 'j' && !IsLetter(s.peek()) && !IsDigit(s.peek()) {
		s.next()
		tok = IMAG
	}
	if IsLetter(s.ch) || IsDigit(s.ch) {
		bad := s.pos()
		for IsLetter(s.ch) || IsDigit(s.ch) {
			s.next()
		}
		s.error(bad, fmt.Sprintf("a number runs into a name: %q", s.src[start:s.off]),
			"Put '*' between a number and a name (2*k); the imaginary unit is written 2j.")
	}
	return tok, pos, lit
}

func (s *Scanner) str(pos Pos) string {
	s.next() // opening quote
	var b strings.Builder
	for {
		switch s.ch {
		case -1, '\n':
			s.error(pos, "string not closed on this line", "Add the closing double quote \".")
			return b.String()
		case '"':
			s.next()
			return b.String()
		case '\\':
			p := s.pos()
			s.next()
			switch s.ch {
			case 'n':
				b.WriteByte('\n')
			case 't':
				b.WriteByte('\t')
			case '"', '\\':
				b.WriteRune(s.ch)
			case -1, '\n':
				continue
			default:
				s.error(p, fmt.Sprintf("unknown escape \\%c in a string", s.ch), `Use \n, \t, \" or \\.`)
			}
			s.next()
		default:
			b.WriteRune(s.ch)
			s.next()
		}
	}
}

// parseNumber converts a NUMBER or IMAG literal.
func parseNumber(lit string) (float64, error) {
	return strconv.ParseFloat(lit, 64)
}
