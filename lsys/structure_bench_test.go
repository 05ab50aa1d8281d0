package lsys

import (
	"fmt"
	"math/rand/v2"
	"testing"
)

func benchSystem(b *testing.B, n int) *System {
	b.Helper()
	rng := rand.New(rand.NewPCG(uint64(n), 500))
	A := randDense(rng, n, n)
	for i := 0; i < n; i++ {
		A.Set(i, i, A.At(i, i)-float64(n)/4)
	}
	s, err := FromMatrices(A, randDense(rng, n, 2), randDense(rng, 2, n), nil, 0)
	if err != nil {
		b.Fatal(err)
	}
	return s
}

// go test ./lsys -run '^$' -bench 'Modes|Structure' -benchtime 3x
func BenchmarkModes(b *testing.B) {
	for _, n := range []int{10, 100, 500} {
		s := benchSystem(b, n)
		b.Run(fmt.Sprintf("n=%d", n), func(b *testing.B) {
			for i := 0; i < b.N; i++ {
				if _, err := Modes(s); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}

func BenchmarkStructure(b *testing.B) {
	for _, n := range []int{10, 100, 500} {
		s := benchSystem(b, n)
		b.Run(fmt.Sprintf("n=%d", n), func(b *testing.B) {
			for i := 0; i < b.N; i++ {
				if _, err := StructureOf(s, 0); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}

func BenchmarkZeros(b *testing.B) {
	for _, n := range []int{10, 100} {
		s := benchSystem(b, n)
		b.Run(fmt.Sprintf("n=%d", n), func(b *testing.B) {
			for i := 0; i < b.N; i++ {
				if _, err := Zeros(s, 0); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}
