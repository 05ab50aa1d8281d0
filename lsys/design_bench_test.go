package lsys

import (
	"context"
	"fmt"
	"testing"

	"gonum.org/v1/gonum/mat"
)

// Run times of the design numerics at n = 50 and 200 (README, "Run
// times"): go test ./lsys -run '^$' -bench Design -benchtime 3x.
func BenchmarkDesign(b *testing.B) {
	for _, n := range []int{50, 200} {
		A := designStable(n, uint64(n), false)
		Ad := designStable(n, uint64(n), true)
		B := designMat(n, 3, 5)
		C := designMat(2, n, 6)
		var Q mat.Dense
		Q.Mul(B, B.T())
		var Qc mat.Dense
		Qc.Mul(C.T(), C)
		for i := 0; i < n; i++ {
			Qc.Set(i, i, Qc.At(i, i)+0.1)
		}
		g, _ := NewSystem(n, 3, 2, A, B, C, nil, 0)
		b.Run(fmt.Sprintf("lyapunov/n=%d", n), func(b *testing.B) {
			for i := 0; i < b.N; i++ {
				if _, err := LyapunovEq(A, &Q, false); err != nil {
					b.Fatal(err)
				}
			}
		})
		b.Run(fmt.Sprintf("lyapunov-sampled/n=%d", n), func(b *testing.B) {
			for i := 0; i < b.N; i++ {
				if _, err := LyapunovEq(Ad, &Q, true); err != nil {
					b.Fatal(err)
				}
			}
		})
		b.Run(fmt.Sprintf("riccati/n=%d", n), func(b *testing.B) {
			for i := 0; i < b.N; i++ {
				if _, err := CARE(A, B, &Qc, identity(3), nil); err != nil {
					b.Fatal(err)
				}
			}
		})
		b.Run(fmt.Sprintf("riccati-sampled/n=%d", n), func(b *testing.B) {
			for i := 0; i < b.N; i++ {
				if _, err := DARE(Ad, B, &Qc, identity(3), nil); err != nil {
					b.Fatal(err)
				}
			}
		})
		b.Run(fmt.Sprintf("hinf/n=%d", n), func(b *testing.B) {
			for i := 0; i < b.N; i++ {
				if _, err := HinfNorm(g); err != nil {
					b.Fatal(err)
				}
			}
		})
		b.Run(fmt.Sprintf("reduce/n=%d", n), func(b *testing.B) {
			for i := 0; i < b.N; i++ {
				if _, err := Reduce(context.Background(), g, ReduceOptions{Order: 10}); err != nil {
					b.Fatal(err)
				}
			}
		})
		poles := make([]complex128, n)
		for i := range poles {
			poles[i] = complex(-1-float64(i)/float64(n), 0)
		}
		Bm := designMat(n, n/3, 8)
		gm, _ := NewSystem(n, n/3, 2, A, Bm, C, nil, 0)
		b.Run(fmt.Sprintf("assign/n=%d", n), func(b *testing.B) {
			for i := 0; i < b.N; i++ {
				if _, err := Assign(gm, poles, false); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}
