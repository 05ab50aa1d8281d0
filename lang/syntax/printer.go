package syntax

import (
	"strconv"
	"strings"
)

// quote writes a string literal with the language's escapes only.
func Quote(s string) string {
	r := strings.NewReplacer("\\", "\\\\", "\"", "\\\"", "\n", "\\n", "\t", "\\t")
	return "\"" + r.Replace(s) + "\""
}

// ExprString writes an expression back as source text (normalised
// spacing), for messages and summaries.
func ExprString(e Expr) string {
	var b strings.Builder
	writeExpr(&b, e, 0)
	return b.String()
}

func precedence(op Token) int {
	switch op {
	case OR:
		return 1
	case AND:
		return 2
	case EQL, NEQ, LSS, LEQ, GTR, GEQ:
		return 4
	case ADD, SUB:
		return 5
	case MUL, DIV:
		return 6
	case POW:
		return 8
	}
	return 0
}

func writeExpr(b *strings.Builder, e Expr, outer int) {
	switch x := e.(type) {
	case *Ident:
		b.WriteString(x.Name)
	case *NumberLit:
		b.WriteString(x.Lit)
		if x.Imag {
			b.WriteByte('j')
		}
	case *StringLit:
		b.WriteString(Quote(x.Value))
	case *BoolLit:
		b.WriteString(strconv.FormatBool(x.Value))
	case *ListLit:
		b.WriteByte('[')
		for i, el := range x.Elems {
			if i > 0 {
				b.WriteString(", ")
			}
			writeExpr(b, el, 0)
		}
		b.WriteByte(']')
	case *RecordLit:
		b.WriteByte('{')
		for i, f := range x.Fields {
			if i > 0 {
				b.WriteString(", ")
			}
			b.WriteString(f.Name.Name)
			b.WriteString(": ")
			writeExpr(b, f.Value, 0)
		}
		b.WriteByte('}')
	case *UnaryExpr:
		prec := 7
		if x.Op == NOT {
			prec = 3
		}
		if outer > prec {
			b.WriteByte('(')
		}
		if x.Op == NOT {
			b.WriteString("not ")
		} else {
			b.WriteByte('-')
		}
		writeExpr(b, x.X, prec)
		if outer > prec {
			b.WriteByte(')')
		}
	case *BinaryExpr:
		prec := precedence(x.Op)
		paren := outer > prec
		if paren {
			b.WriteByte('(')
		}
		left, right := prec, prec+1
		if prec == 4 { // comparisons do not chain
			left = prec + 1
		}
		if x.Op == POW {
			left, right = prec+1, 7 // right associative; unary minus allowed in the exponent
		}
		writeExpr(b, x.X, left)
		switch x.Op {
		case POW:
			b.WriteString("^")
		case MUL, DIV:
			b.WriteString(x.Op.String())
		default:
			b.WriteString(" " + x.Op.String() + " ")
		}
		writeExpr(b, x.Y, right)
		if paren {
			b.WriteByte(')')
		}
	case *CallExpr:
		writeExpr(b, x.Fun, 9)
		b.WriteByte('(')
		for i, a := range x.Args {
			if i > 0 {
				b.WriteString(", ")
			}
			if a.Name != nil {
				b.WriteString(a.Name.Name + ": ")
			}
			writeExpr(b, a.Value, 0)
		}
		b.WriteByte(')')
	case *IndexExpr:
		writeExpr(b, x.X, 9)
		b.WriteByte('[')
		for i, a := range x.Indices {
			if i > 0 {
				b.WriteString(", ")
			}
			writeExpr(b, a, 0)
		}
		b.WriteByte(']')
	case *RangeExpr:
		if x.Lo != nil {
			writeExpr(b, x.Lo, 0)
		}
		b.WriteByte(':')
		if x.Hi != nil {
			writeExpr(b, x.Hi, 0)
		}
	case *FieldExpr:
		writeExpr(b, x.X, 9)
		b.WriteByte('.')
		b.WriteString(x.Name.Name)
	case *IfExpr:
		if outer > 0 {
			b.WriteByte('(')
		}
		b.WriteString("if ")
		writeExpr(b, x.Cond, 0)
		b.WriteString(" then ")
		writeExpr(b, x.Then, 0)
		b.WriteString(" else ")
		writeExpr(b, x.Else, 0)
		if outer > 0 {
			b.WriteByte(')')
		}
	case *SystemBlock:
		b.WriteString("system")
		if x.Every != nil {
			b.WriteString(" every ")
			writeExpr(b, x.Every, 0)
		}
		b.WriteString(" {")
		for i, it := range x.Items {
			if i > 0 {
				b.WriteString(";")
			}
			b.WriteString(" ")
			switch d := it.(type) {
			case *Decl:
				b.WriteString(d.Kind + " ")
				for k, n := range d.Names {
					if k > 0 {
						b.WriteString(", ")
					}
					b.WriteString(n.Name)
				}
			case *Equation:
				switch d.Kind {
				case EqNext:
					b.WriteString("next " + d.Name.Name)
				case EqDerivative:
					b.WriteString(d.Name.Name + "'")
				default:
					b.WriteString(d.Name.Name)
				}
				b.WriteString(" = ")
				writeExpr(b, d.Rhs, 0)
			}
		}
		b.WriteString(" }")
	default:
		b.WriteString("?")
	}
}
