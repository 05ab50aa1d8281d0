package lsys

import (
	"context"
	"math"
	"testing"

	"gonum.org/v1/gonum/mat"
)

// TestModalResponseMatchesDense holds the modal propagation of larger
// models to the dense zero-order-hold step x[k+1] = e^(Ah) x[k] + Gamma
// (Van Loan 1978) at every sample: the same exact-at-the-samples
// response, up to rounding.
func TestModalResponseMatchesDense(t *testing.T) {
	const tol = 1e-9 // relative to the largest output value: rounding of u cond(V) and 2000 steps
	for _, n := range []int{modalMinStates, 41, 80} {
		g := randomStable(n, uint64(n))
		B := mat.NewDense(n, 2, nil)
		for i := 0; i < n; i++ {
			B.Set(i, 0, g.B.At(i, 0))
			B.Set(i, 1, float64(i%3)-1)
		}
		g, _ = FromMatrices(g.A, B, g.C, nil, 0)
		h, N := 0.01, 2000
		x0 := make([]float64, n)
		for i := range x0 {
			x0[i] = math.Sin(float64(i))
		}
		for _, kind := range []string{"step", "impulse", "initial"} {
			var r *Response
			var err error
			opt := ResponseOptions{Until: h * float64(N), Step: h}
			switch kind {
			case "step":
				r, err = Step(context.Background(), g, opt)
			case "impulse":
				r, err = Impulse(context.Background(), g, opt)
			default:
				r, err = Initial(context.Background(), g, x0, opt)
			}
			if err != nil {
				t.Fatal(err)
			}
			Phi, Gam, err := zohPair(g.A, g.B, h)
			if err != nil {
				t.Fatal(err)
			}
			for c := range r.Channels {
				x := mat.NewVecDense(n, nil)
				switch kind {
				case "impulse":
					x.CopyVec(g.B.ColView(c))
				case "initial":
					x = mat.NewVecDense(n, append([]float64(nil), x0...))
				}
				var worst, big float64
				for k := 0; k <= N; k++ {
					y := mat.Dot(g.C.RowView(0), x)
					worst = math.Max(worst, math.Abs(r.Y[0][c][k]-y))
					big = math.Max(big, math.Abs(y))
					var next mat.VecDense
					next.MulVec(Phi, x)
					if kind == "step" {
						next.AddVec(&next, Gam.ColView(c))
					}
					x = &next
				}
				if worst > tol*big {
					t.Errorf("n = %d, %s, channel %d: modal and dense differ by %.3g (largest value %.3g)", n, kind, c, worst, big)
				}
			}
		}
	}
}

// TestModalResponseDeclinesIllConditioned checks that a nearly defective
// A (a Jordan-like chain, eigenvectors nearly parallel) is left to the
// dense step.
func TestModalResponseDeclinesIllConditioned(t *testing.T) {
	n := 40
	A := mat.NewDense(n, n, nil)
	for i := 0; i < n; i++ {
		A.Set(i, i, -1-1e-6*float64(i))
		if i+1 < n {
			A.Set(i, i+1, 1)
		}
	}
	B := mat.NewDense(n, 1, nil)
	B.Set(n-1, 0, 1)
	C := mat.NewDense(1, n, nil)
	C.Set(0, 0, 1)
	g, err := FromMatrices(A, B, C, nil, 0)
	if err != nil {
		t.Fatal(err)
	}
	r := &Response{T: make([]float64, 11), Channels: []string{"u"}, Y: [][][]float64{{make([]float64, 11)}}}
	vals, err := modalResponse(context.Background(), g, "step", nil, 0.1, r, ResponseOptions{})
	if err != nil || vals != nil {
		t.Errorf("modal propagation taken (%v) for a nearly defective A", err)
	}
}
