// Package lang is the lsys system-description language: scanner, parser,
// evaluator and the one registry of built-in functions that drives
// evaluation, completion, inspection and the language reference.
//
// The kernel and the headless runner use it only through Session.
package lang

import (
	"context"
	"errors"
)

// Output receives what a cell produces besides its final value. The kernel
// forwards these to iopub; the headless runner writes them into a report.
// Values passed to Display are lsys result types or plain Go values that
// package display knows how to render.
type Output interface {
	Stdout(text string)
	Stderr(text string)
	// Display shows an extra value. id is "" or a stable id that a later
	// UpdateDisplay with the same id replaces (used for progress).
	Display(v any, id string)
	UpdateDisplay(v any, id string)
	ClearOutput(wait bool)
}

// Session holds the bindings of one notebook session.
type Session struct {
	dir string
}

// NewSession starts an empty session; dir is the folder that load() reads
// data files from (the notebook's folder).
func NewSession(dir string) *Session { return &Session{dir: dir} }

// Run evaluates one cell. value is what the cell's last expression evaluated
// to, or nil when the cell ends in a binding (nothing to show). err, when not
// nil, is meant for people: its Error() text names line and column, quotes
// the line with a caret and says what to do. A cancelled ctx stops long loops
// and returns an error wrapping ctx.Err(). Run never panics; bindings made
// before an error stay.
func (s *Session) Run(ctx context.Context, src string, out Output) (value any, err error) {
	return nil, errors.New("not implemented yet")
}

// IsComplete reports "complete", "incomplete" (open bracket or block; indent
// is the suggested indent for the next line) or "invalid".
func (s *Session) IsComplete(src string) (status, indent string) {
	return "complete", ""
}

// Complete returns candidates for the word ending at cursor (a rune offset
// into src) and the rune range [start, end) they replace.
func (s *Session) Complete(src string, cursor int) (matches []string, start, end int) {
	return nil, cursor, cursor
}

// Inspect returns help for the name under or before cursor (rune offset):
// signature, doc and example for a built-in, a summary for a binding.
// found is false when there is nothing to say.
func (s *Session) Inspect(src string, cursor int) (text string, found bool) {
	return "", false
}

// Names lists the bindings of the session, sorted.
func (s *Session) Names() []string { return nil }
