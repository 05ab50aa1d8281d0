package lsys

import "errors"

// Series returns the series connection g*k: the outputs of k feed the
// inputs of g (y = G K u). Placeholder contract: the interconnection work
// fills it in, keeping signal names.
func Series(g, k *System) (*System, error) { return nil, errors.New("series: not implemented yet") }

// Parallel returns g + sign*h: same inputs, outputs added (sign is +1 or -1).
func Parallel(g, h *System, sign float64) (*System, error) {
	return nil, errors.New("parallel: not implemented yet")
}

// Feedback closes the loop around g with k in the return path; sign -1 is
// negative feedback (the default of the trade), +1 positive.
func Feedback(g, k *System, sign float64) (*System, error) {
	return nil, errors.New("feedback: not implemented yet")
}

// Stack returns the block-diagonal combination of the systems (inputs and
// outputs side by side).
func Stack(systems ...*System) (*System, error) { return nil, errors.New("stack: not implemented yet") }
