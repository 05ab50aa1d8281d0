package syntax

import (
	"strings"
	"testing"
	"unicode/utf8"
)

// The committed corpus in testdata/fuzz holds more seeds: cells from the
// language's tests and the examples of its registry (written by
// TestWriteFuzzCorpus in package lang).
var fuzzSeeds = []string{
	"1 + 2*3",
	"x = [[0, 1], [-2, -3]]\nx[2, 1]",
	"f(k) = if k <= 1 then 1 else k*f(k - 1)\nf(5)",
	"r = {angle: 0.1, rate: 0}\nr.angle",
	"system every 0.1 {\n  states level\n  inputs inflow\n  next level = 0.9*level + 0.1*inflow\n}",
	"\"unterminated",
	"x = (1 +",
	"a.b.c[1, 2](3)",
	"system { states x; x' = -x*x }",
	"M = [[1, 2], [3, 4]]\nM[:, 2] + M[1:, :1]\n[1, 2, 3][2:][:1]",
}

func seedFuzz(f *testing.F) {
	for _, s := range fuzzSeeds {
		f.Add(s)
	}
}

// checkErrPositions: every error is positioned inside the cell.
func checkErrPositions(t *testing.T, src string, errs ErrorList) {
	lines := strings.Count(src, "\n") + 1
	for _, e := range errs {
		if e.Pos.Line < 1 || e.Pos.Line > lines || e.Pos.Column < 1 {
			t.Fatalf("error outside the cell (%d lines): %d:%d %s", lines, e.Pos.Line, e.Pos.Column, e.Msg)
		}
		if e.Pos.Offset < 0 || e.Pos.Offset > len(src) {
			t.Fatalf("offset %d outside the cell of %d bytes", e.Pos.Offset, len(src))
		}
	}
}

func FuzzScan(f *testing.F) {
	seedFuzz(f)
	f.Fuzz(func(t *testing.T, src string) {
		var s Scanner
		s.Init(src)
		for n := 0; ; n++ {
			tok, pos, _ := s.Scan()
			if tok == EOF {
				break
			}
			if n > len(src)+1 {
				t.Fatalf("scanner does not advance: %d tokens from %d bytes", n, len(src))
			}
			if pos.Line < 1 || pos.Column < 1 || pos.Offset > len(src) {
				t.Fatalf("bad position %+v", pos)
			}
		}
		checkErrPositions(t, src, s.Errors)
	})
}

func FuzzParse(f *testing.F) {
	seedFuzz(f)
	f.Fuzz(func(t *testing.T, src string) {
		stmts, err := ParseCell(src)
		if err != nil {
			l, ok := err.(ErrorList)
			if !ok || len(l) == 0 {
				t.Fatalf("parse error is not a positioned list: %T %v", err, err)
			}
			checkErrPositions(t, src, l)
			return
		}
		// What parses prints back to something that parses.
		for _, s := range stmts {
			var text string
			switch x := s.(type) {
			case *ExprStmt:
				text = ExprString(x.X)
			default:
				continue
			}
			if _, err := ParseCell(text); err != nil && utf8.ValidString(src) {
				t.Fatalf("%q printed as %q, which does not parse: %v", src, text, err)
			}
		}
	})
}

// Every node knows where it starts without walking its children: the
// position of a binary, call, index, field or range expression is that of
// its leftmost token.
func TestNodeStart(t *testing.T) {
	src := "y = a.b[2](3) + c^2 - [1, 2][:1]"
	stmts, err := ParseCell(src)
	if err != nil {
		t.Fatal(err)
	}
	x := stmts[0].(*AssignStmt).Value
	var walk func(e Expr)
	n := 0
	walk = func(e Expr) {
		n++
		want := -1
		switch v := e.(type) {
		case *BinaryExpr:
			want = v.X.Pos().Offset
			walk(v.X)
			walk(v.Y)
		case *CallExpr:
			want = v.Fun.Pos().Offset
			walk(v.Fun)
		case *IndexExpr:
			want = v.X.Pos().Offset
			walk(v.X)
			for _, i := range v.Indices {
				walk(i)
			}
		case *FieldExpr:
			want = v.X.Pos().Offset
			walk(v.X)
		case *RangeExpr:
			want = v.Colon.Offset
			if v.Lo != nil {
				want = v.Lo.Pos().Offset
			}
		}
		if want >= 0 && e.Pos().Offset != want {
			t.Errorf("%s starts at %d, want %d", ExprString(e), e.Pos().Offset, want)
		}
	}
	walk(x)
	if x.Pos().Offset != strings.Index(src, "a.b") || n < 10 {
		t.Errorf("start %d, %d nodes", x.Pos().Offset, n)
	}
}
