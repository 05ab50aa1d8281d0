package lsys

import (
	"context"
	"errors"
	"fmt"
	"math"
	"math/cmplx"
	"strconv"

	"gonum.org/v1/gonum/lapack"
	"gonum.org/v1/gonum/lapack/gonum"
	"gonum.org/v1/gonum/mat"
)

// ModalResponse splits a time response into the contributions of the modes:
// Parts[q][output][channel][k] over the same grid as Response, with
// sum over q of Parts[q] equal to Response.Y (up to rounding). The last part
// is the direct feedthrough D u when the system has one (for an impulse
// only in sampled systems, where the pulse response starts with D).
type ModalResponse struct {
	Response *Response
	Labels   []string     // the eigenvalue of each part ("-1 ± 2j"), or "direct"
	Values   []complex128 // the eigenvalue of each part (upper of a pair); NaN for the direct part
	Parts    [][][][]float64
	MaxCond  float64 // condition number of the modal transformation (of the balanced model)
	// Note says how the split was made: the balancing, and when modes are
	// kept together in one block, which and why.
	Note string
}

// ByMode computes the response of kind "step", "impulse", "initial" (from
// x0) or "input" (the signal u, from x0 or rest) together with its modal
// parts. The blocks come from Modal: a real mode, a complex pair, or (for
// defective, nearly defective or very close eigenvalues) one invariant
// block holding the cluster. With z = T x and block rows b, each part is
// C P_b x(t) with the spectral projector P_b = Tinv[:, b] T[b, :] (Kato,
// Perturbation Theory for Linear Operators, 1966, Ch. I, Section 5).
// Because P_b commutes with A, the part is the response of (A, B, C P_b, 0)
// and is computed exactly like the total; the parts sum to the response.
//
// Before the split the model is balanced by a diagonal similarity (powers
// of two; Parlett & Reinsch 1969, "Balancing a matrix for calculation of
// eigenvalues and eigenvectors", Numer. Math. 13): cascades of fast and slow
// sections have entries spread over many decades, and an unbalanced
// eigenvector basis is then needlessly ill-conditioned, which makes the
// decoupling keep well-separated modes together. The parts are computed on
// the balanced model; its outputs are the same.
func ByMode(ctx context.Context, g *System, kind string, x0 []float64, u *Signal, opt ResponseOptions) (*ModalResponse, error) {
	if g == nil {
		return nil, errors.New("the system is missing")
	}
	run := func(s *System) (*Response, error) {
		switch kind {
		case "step":
			return Step(ctx, s, opt)
		case "impulse":
			return Impulse(ctx, s, opt)
		case "initial":
			return Initial(ctx, s, x0, opt)
		case "input":
			if u == nil {
				return nil, errors.New("the input signal is missing")
			}
			return Simulate(ctx, s, *u, x0, opt)
		}
		return nil, fmt.Errorf("unknown kind %q", kind)
	}
	total, err := run(g)
	if err != nil {
		return nil, err
	}
	mr := &ModalResponse{Response: total}
	// every part on the grid of the total
	if len(total.T) > 1 {
		opt = ResponseOptions{Until: total.T[len(total.T)-1]}
		if !g.Sampled() {
			opt.Step = total.T[1] - total.T[0]
		}
	}
	n, p := g.N(), g.P()
	if n > 0 {
		if n > 200 {
			return nil, fmt.Errorf("response by mode: %d states is more than the 200 this split handles; reduce the model first", n)
		}
		gb := balancedCopy(g)
		mf, err := Modal(gb)
		if err != nil {
			return nil, fmt.Errorf("response by mode: %w", err)
		}
		g = gb
		mr.MaxCond = mf.Cond
		mr.Note = "model balanced by a diagonal scaling before the split"
		if mf.BlockDiagonal {
			nc := 0
			for _, b := range mf.Blocks {
				if b.Kind == "cluster" {
					nc++
				}
			}
			if nc > 0 {
				mr.Note += "; " + mf.Note
			}
		}
		for _, blk := range mf.Blocks {
			b0, b1 := blk.Start, blk.Start+blk.Size
			var P mat.Dense
			P.Mul(mf.Tinv.Slice(0, n, b0, b1), mf.T.Slice(b0, b1, 0, n))
			part, err := NewSystem(n, g.M(), p, g.A, g.B, mul(g.C, &P), nil, g.Ts)
			if err != nil {
				return nil, fmt.Errorf("response by mode: %w", err)
			}
			r, err := run(part)
			if err != nil {
				return nil, err
			}
			mr.Parts = append(mr.Parts, r.Y)
			l := cmplx.NaN()
			label := ""
			for i, v := range blk.Values {
				if imag(v) < 0 {
					continue
				}
				if i == 0 {
					l = v
				} else {
					label += ", "
				}
				label += modeLabel(v)
			}
			if blk.Kind == "cluster" {
				label = "block {" + label + "}"
			}
			mr.Values = append(mr.Values, l)
			mr.Labels = append(mr.Labels, label)
		}
	}
	if kind != "initial" && !(kind == "impulse" && !g.Sampled()) && g.D != nil && mat.Norm(g.D, 1) > 0 {
		direct, err := NewSystem(0, g.M(), p, nil, nil, nil, g.D, g.Ts)
		if err != nil {
			return nil, err
		}
		r, err := run(direct)
		if err != nil {
			return nil, err
		}
		mr.Parts = append(mr.Parts, r.Y)
		mr.Values = append(mr.Values, cmplx.NaN())
		mr.Labels = append(mr.Labels, "direct")
	}
	return mr, nil
}

// balancedCopy returns g in the coordinates x = D xb of LAPACK's balancing
// (Dgebal, scaling only): A <- D^-1 A D, B <- D^-1 B, C <- C D. D holds
// powers of two, so no rounding enters.
func balancedCopy(g *System) *System {
	n := g.N()
	A := mat.DenseCopyOf(g.A)
	raw := A.RawMatrix()
	d := make([]float64, n)
	gonum.Implementation{}.Dgebal(lapack.Scale, n, raw.Data, raw.Stride, d)
	out := g.Copy()
	out.A = A
	if g.B != nil {
		B := mat.DenseCopyOf(g.B)
		_, m := B.Dims()
		for i := 0; i < n; i++ {
			for j := 0; j < m; j++ {
				B.Set(i, j, B.At(i, j)/d[i])
			}
		}
		out.B = B
	}
	if g.C != nil {
		C := mat.DenseCopyOf(g.C)
		p, _ := C.Dims()
		for i := 0; i < p; i++ {
			for j := 0; j < n; j++ {
				C.Set(i, j, C.At(i, j)*d[j])
			}
		}
		out.C = C
	}
	return out
}

func modeLabel(l complex128) string {
	f := func(x float64) string { return strconv.FormatFloat(x, 'g', 4, 64) }
	if imag(l) == 0 {
		return f(real(l))
	}
	return f(real(l)) + " ± " + f(math.Abs(imag(l))) + "j"
}
