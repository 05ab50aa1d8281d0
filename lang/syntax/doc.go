// Package syntax is the lsys language's scanner, syntax tree, parser and
// printer, and its positioned errors for people. It knows nothing of values
// or evaluation (package lang) and nothing of front ends: a tool that only
// reads cells (a highlighter, a formatter) needs this package alone.
// Every node stores where it starts, so Pos is O(1).
package syntax
