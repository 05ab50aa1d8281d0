package syntax

import (
	"errors"
	"fmt"
	"sort"
	"strings"
	"unicode/utf8"
)

// Error is an error meant for people. Error() gives
//
//	line L, column C: what went wrong
//	    the line of the cell
//	        ^
//	what to do
//
// Source is the text of the line at Pos; Run fills it in.
type Error struct {
	Pos    Pos
	Msg    string
	Hint   string // what to do; may be empty
	Source string // the source line, without its newline
	Where  string // e.g. "in f(k), defined in an earlier cell"
	Err    error  // wrapped cause (for errors.Is, e.g. context.Canceled)
}

func (e *Error) Error() string {
	var b strings.Builder
	if e.Pos.IsValid() {
		fmt.Fprintf(&b, "line %d, column %d: ", e.Pos.Line, e.Pos.Column)
	}
	b.WriteString(e.Msg)
	if e.Where != "" {
		fmt.Fprintf(&b, " (%s)", e.Where)
	}
	if e.Source != "" && e.Pos.IsValid() {
		line := strings.ReplaceAll(e.Source, "\t", " ")
		b.WriteString("\n    ")
		b.WriteString(line)
		b.WriteString("\n    ")
		col := e.Pos.Column - 1
		if n := utf8.RuneCountInString(line); col > n {
			col = n
		}
		if col < 0 {
			col = 0
		}
		b.WriteString(strings.Repeat(" ", col))
		b.WriteString("^")
	}
	if e.Hint != "" {
		b.WriteString("\n")
		b.WriteString(e.Hint)
	}
	return b.String()
}

func (e *Error) Unwrap() error { return e.Err }

// ErrorList is a list of errors sorted by position, as the parser collects
// them. Error() shows at most the first five.
type ErrorList []*Error

func (l ErrorList) Error() string {
	switch len(l) {
	case 0:
		return "no errors"
	case 1:
		return l[0].Error()
	}
	var parts []string
	for i, e := range l {
		if i == 5 {
			parts = append(parts, fmt.Sprintf("(and %d more errors)", len(l)-5))
			break
		}
		parts = append(parts, e.Error())
	}
	return strings.Join(parts, "\n\n")
}

// Err returns l as an error, or nil when it is empty.
func (l ErrorList) Err() error {
	if len(l) == 0 {
		return nil
	}
	return l
}

func (l ErrorList) sort() {
	sort.SliceStable(l, func(i, j int) bool { return l[i].Pos.Offset < l[j].Pos.Offset })
}

// Position returns the position of err when it is an *Error or an ErrorList
// (the first one); ok is false otherwise.
func Position(err error) (p Pos, ok bool) {
	var l ErrorList
	if errors.As(err, &l) && len(l) > 0 {
		return l[0].Pos, true
	}
	var e *Error
	if errors.As(err, &e) {
		return e.Pos, e.Pos.IsValid()
	}
	return Pos{}, false
}

// lineAt returns the text of the 1-based line of src.
func LineAt(src string, line int) string {
	for i := 1; i < line; i++ {
		k := strings.IndexByte(src, '\n')
		if k < 0 {
			return ""
		}
		src = src[k+1:]
	}
	if k := strings.IndexByte(src, '\n'); k >= 0 {
		src = src[:k]
	}
	return strings.TrimRight(src, "\r")
}

// attachSource fills in Source lines of errors without one.
func AttachSource(err error, src string) {
	var l ErrorList
	if errors.As(err, &l) {
		for _, e := range l {
			if e.Source == "" && e.Pos.IsValid() {
				e.Source = LineAt(src, e.Pos.Line)
			}
		}
		return
	}
	var e *Error
	if errors.As(err, &e) && e.Source == "" && e.Pos.IsValid() {
		e.Source = LineAt(src, e.Pos.Line)
	}
}
