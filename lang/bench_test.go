package lang_test

import (
	"context"
	"strings"
	"testing"

	"lsys/lang"
	"lsys/lang/builtins"
	"lsys/lang/langtest"
)

// BenchmarkEquationBlock: parse and compile the four-state gimbal block
// into A, B, C, D.
func BenchmarkEquationBlock(b *testing.B) {
	s := lang.NewSession(lang.Options{Builtins: builtins.Registry()})
	for i := 0; i < b.N; i++ {
		if _, err := s.Run(context.Background(), langtest.Gimbal, nil); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkLinearizeEquilibrium: Newton's equilibrium and the linearization
// of the pendulum.
func BenchmarkLinearizeEquilibrium(b *testing.B) {
	s := lang.NewSession(lang.Options{Builtins: builtins.Registry()})
	if _, err := s.Run(context.Background(), langtest.Pendulum, nil); err != nil {
		b.Fatal(err)
	}
	for i := 0; i < b.N; i++ {
		if _, err := s.Run(context.Background(), "linearize(pendulum, at: equilibrium(pendulum, inputs: {torque: 1}, guess: {angle: 0.1}))", nil); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkRecursion: evaluation speed of user functions (fact(20) 1000 times).
func BenchmarkRecursion(b *testing.B) {
	s := lang.NewSession(lang.Options{Builtins: builtins.Registry()})
	if _, err := s.Run(context.Background(), "fact(n) = if n <= 1 then 1 else n*fact(n - 1)", nil); err != nil {
		b.Fatal(err)
	}
	for i := 0; i < b.N; i++ {
		if _, err := s.Run(context.Background(), "fact(20)", nil); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkLocusBlockFamily: a locus of 1000 values over a two-state
// family written as an equation block in a function (each value compiles
// the block, extracts A by automatic differentiation and takes its
// eigenvalues).
func BenchmarkLocusBlockFamily(b *testing.B) {
	s := lang.NewSession(lang.Options{Builtins: builtins.Registry()})
	if _, err := s.Run(context.Background(), mountFamily, nil); err != nil {
		b.Fatal(err)
	}
	for i := 0; i < b.N; i++ {
		if _, err := s.Run(context.Background(), "locus(family, k: linear(1, 10, n: 1000))", nil); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkLongSum: a one-line sum of 10^5 terms (the reliability target is
// under 0.5 s; positions are stored in the nodes and the left-leaning chain
// is evaluated in a loop, so the work is linear in the terms).
func BenchmarkLongSum(b *testing.B) {
	src := "x = " + strings.Repeat("1 + ", 99999) + "1"
	for i := 0; i < b.N; i++ {
		s := lang.NewSession(lang.Options{})
		if _, err := s.Run(context.Background(), src, nil); err != nil {
			b.Fatal(err)
		}
	}
}
