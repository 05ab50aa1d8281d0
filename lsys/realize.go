package lsys

import "errors"

// Realize returns a minimal state-space realization of a transfer matrix
// given as rows (outputs) of columns (inputs) of rational functions, all with
// sample time ts. Placeholder contract: the realization work fills it in.
// The Rational type lives in rational.go (owned by the language work).
func Realize(tf [][]*Rational, ts float64) (*System, error) {
	return nil, errors.New("realize: not implemented yet")
}
