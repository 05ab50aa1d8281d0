package lsys_test

import (
	"fmt"

	"lsys/lsys"
)

// A transfer function as a ratio of polynomials in s: the sum of two
// first-order lags, its steady-state gain and its degrees.
func ExampleRational() {
	s := lsys.Variable(0)
	one := lsys.Constant(1)
	p1, _ := s.Add(lsys.Constant(1))
	p2, _ := s.Add(lsys.Constant(2))
	a, _ := one.Div(p1)
	b, _ := one.Div(p2)
	h, _ := a.Add(b)
	fmt.Println(h)
	fmt.Println(h.Eval(0))
	fmt.Println(h.Degree())
	// Output:
	// (2*s + 3) / (s^2 + 3*s + 2)
	// (1.5+0i)
	// 1 2
}

// Exact first and second derivatives of sin(x) at x = 0 with hyper-dual
// numbers: cos(0) = 1 and -sin(0) = 0.
func ExampleHyperDual() {
	x := lsys.HyperDual{V: 0, E1: 1, E2: 1}
	y := x.Sin()
	fmt.Println(y.V, y.E1, y.E12)
	// Output: 0 1 0
}

// Following two crossing modes: the new eigenvalues are reordered so that
// each continues the nearest previous one.
func ExampleMatchEigenvalues() {
	prev := []complex128{-1, -2}
	next := []complex128{-1.9, -1.1}
	fmt.Println(lsys.MatchEigenvalues(prev, next))
	// Output: [(-1.1+0i) (-1.9+0i)]
}
