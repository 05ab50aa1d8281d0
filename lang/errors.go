package lang

import (
	"context"
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
func lineAt(src string, line int) string {
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
func attachSource(err error, src string) {
	var l ErrorList
	if errors.As(err, &l) {
		for _, e := range l {
			if e.Source == "" && e.Pos.IsValid() {
				e.Source = lineAt(src, e.Pos.Line)
			}
		}
		return
	}
	var e *Error
	if errors.As(err, &e) && e.Source == "" && e.Pos.IsValid() {
		e.Source = lineAt(src, e.Pos.Line)
	}
}

// editDistance is the Levenshtein distance between a and b, in runes.
func editDistance(a, b string) int {
	ra, rb := []rune(a), []rune(b)
	prev := make([]int, len(rb)+1)
	cur := make([]int, len(rb)+1)
	for j := range prev {
		prev[j] = j
	}
	for i := 1; i <= len(ra); i++ {
		cur[0] = i
		for j := 1; j <= len(rb); j++ {
			cost := 1
			if ra[i-1] == rb[j-1] {
				cost = 0
			}
			cur[j] = min(prev[j]+1, cur[j-1]+1, prev[j-1]+cost)
		}
		prev, cur = cur, prev
	}
	return prev[len(rb)]
}

// closest returns the candidate nearest to name by edit distance, if it is
// near enough to be a likely misspelling; ties go to the first in sorted order.
func closest(name string, candidates []string) string {
	best, bestD := "", 1<<30
	limit := 1 + utf8.RuneCountInString(name)/3
	if limit > 3 {
		limit = 3
	}
	sorted := append([]string(nil), candidates...)
	sort.Strings(sorted)
	for _, c := range sorted {
		if c == name {
			continue
		}
		d := editDistance(strings.ToLower(name), strings.ToLower(c))
		if d < bestD {
			best, bestD = c, d
		}
	}
	if bestD <= limit {
		return best
	}
	return ""
}

// didYouMean returns "; did you mean 'x'?" or "".
func didYouMean(name string, candidates []string) string {
	if c := closest(name, candidates); c != "" {
		return fmt.Sprintf("; did you mean '%s'?", c)
	}
	return ""
}

// Describe splits a cell's error into what both front ends show: a kind
// ("Error", or "Interrupted" when the cell was cancelled), the headline
// (the first line) and all lines of the message.
func Describe(err error) (kind, headline string, lines []string) {
	if errors.Is(err, context.Canceled) {
		kind = "Interrupted"
		headline = "the cell was interrupted; bindings made before the interrupt are kept"
		return kind, headline, []string{kind + ": " + headline}
	}
	msg := err.Error()
	headline = msg
	if i := strings.IndexByte(msg, '\n'); i >= 0 {
		headline = msg[:i]
	}
	return "Error", headline, strings.Split(msg, "\n")
}
