package lsys

import (
	"context"
	"errors"
	"fmt"
	"math"

	"gonum.org/v1/gonum/mat"
)

// ReduceOptions choose the order of a reduced model: Order when > 0, else
// the smallest order whose error bound 2 * (sum of the discarded Hankel
// singular values) is at most Tol. KeepDC selects singular perturbation
// (the steady-state gain kept exactly) instead of truncation.
type ReduceOptions struct {
	Order  int
	Tol    float64
	KeepDC bool
}

// Reduction is a reduced model with what it rests on.
type Reduction struct {
	Full, Reduced *System
	HSV           []float64 // of the stable part, largest first
	Order         int       // states of the reduced stable part
	Unstable      int       // unstable modes, kept whole in Reduced
	Method        string
	// Bound is 2 * the sum of the discarded Hankel singular values: no
	// frequency has a larger gain error (Enns 1984; Glover 1984). Error
	// is the true H-infinity norm of Full - Reduced, at ErrorPeak rad/s.
	Bound, Error, ErrorPeak float64
	// Why says how the order was chosen.
	Why string
	// SplitCond is the conditioning of the stable/unstable split (1 when
	// the system is stable); see Split.CondX.
	SplitCond float64
	// FullResponse and ReducedResponse are on one frequency grid.
	FullResponse, ReducedResponse *FrequencyResponse
}

// Reduce returns a reduced model by balanced truncation (Moore 1981) in
// the square-root form (Laub, Heath, Paige & Ward 1987), or, with KeepDC,
// by singular perturbation of the balanced realization (Liu & Anderson
// 1989, "Singular perturbation approximation of balanced systems", Int. J.
// Control 50(4)), which keeps the gain at zero frequency (at z = 1 when
// sampled). Both satisfy ||G - Gr||_inf <= 2 * sum of the discarded Hankel
// singular values (Enns 1984; Glover 1984, Int. J. Control 39(6); Al-Saggaf
// & Franklin 1987 for the sampled case). Modes on or beyond the stability
// boundary are split off first (SplitStable) and kept whole; only the
// stable part is reduced.
func Reduce(ctx context.Context, g *System, opt ReduceOptions) (*Reduction, error) {
	if g.N() == 0 {
		return nil, errors.New("the system has no states to remove")
	}
	if opt.Order < 0 {
		return nil, fmt.Errorf("the order must be a whole number >= 0, got %d", opt.Order)
	}
	if opt.Order == 0 && !(opt.Tol > 0) {
		return nil, errors.New("give the order (order: r) or the error allowed (tol: e)")
	}
	sp, err := SplitStable(g)
	if err != nil {
		return nil, err
	}
	out := &Reduction{Full: g, Unstable: sp.Unstable.N(), SplitCond: sp.CondX, Method: "balanced truncation"}
	if opt.KeepDC {
		out.Method = "singular perturbation of the balanced model (steady-state gain kept)"
	}
	gs := sp.Stable
	var grs *System
	if gs.N() == 0 {
		return nil, errors.New("the system has no stable part to reduce: every mode is on or beyond the stability boundary")
	}
	gr, err := GramiansOf(gs)
	if err != nil {
		return nil, err
	}
	hsv := gr.HSV
	out.HSV = hsv
	ns := len(hsv)
	tol := hsvTol(hsv)
	minimal := 0
	for _, s := range hsv {
		if s > tol {
			minimal++
		}
	}
	tail := make([]float64, ns+1) // tail[r] = 2 * sum_{i >= r} hsv[i]
	for i := ns - 1; i >= 0; i-- {
		tail[i] = tail[i+1] + 2*hsv[i]
	}
	r := opt.Order
	if r > 0 {
		if r < out.Unstable {
			return nil, fmt.Errorf("order %d is below the %d unstable modes, which are kept whole; ask for order %d or more", r, out.Unstable, out.Unstable)
		}
		r -= out.Unstable
		if r > ns {
			r = ns
		}
		out.Why = fmt.Sprintf("%d, as asked", opt.Order)
	} else {
		r = ns
		for k := 0; k <= ns; k++ {
			if tail[k] <= opt.Tol {
				r = k
				break
			}
		}
		out.Why = fmt.Sprintf("%d, the smallest whose bound 2 * (sum of discarded Hankel singular values) is <= %.4g", r+out.Unstable, opt.Tol)
	}
	if r > minimal {
		out.Why += fmt.Sprintf("; only %d Hankel singular values are above %.3g (n u times the largest), so the order is %d: the other states are not reachable or not observable", minimal, tol, minimal+out.Unstable)
		r = minimal
	}
	out.Order = r
	out.Bound = tail[r]
	if out.Unstable > 0 {
		out.Why += fmt.Sprintf("; the %d unstable modes are kept whole and counted in the order", out.Unstable)
	}
	switch {
	case r == 0:
		// Only the feedthrough (continuous) or the gain at z = 1 remains.
		grs = emptyLike(gs)
		D := mat.DenseCopyOf(gs.D)
		if opt.KeepDC {
			if dc, ok := DCGain(gs); ok {
				D = dc
			}
		}
		if grs, err = NewSystem(0, gs.M(), gs.P(), nil, nil, nil, D, gs.Ts); err != nil {
			return nil, err
		}
		grs.InputNames, grs.OutputNames = gs.InputNames, gs.OutputNames
	case !opt.KeepDC:
		b, err := balanceOrder(gs, gr, r)
		if err != nil {
			return nil, err
		}
		grs = b.System
	default:
		b, err := balanceOrder(gs, gr, minimal)
		if err != nil {
			return nil, err
		}
		if grs, err = residualize(b.System, r); err != nil {
			return nil, err
		}
	}
	red := grs
	if out.Unstable > 0 {
		if red, err = Parallel(grs, sp.Unstable, 1); err != nil {
			return nil, err
		}
		red.StateNames = append(defaultNames("b", grs.N()), defaultNames("xu", sp.Unstable.N())...)
	}
	red.InputNames = append([]string(nil), g.InputNames...)
	red.OutputNames = append([]string(nil), g.OutputNames...)
	out.Reduced = red
	// The true error: the unstable parts are identical and cancel.
	diff, err := Parallel(gs, grs, -1)
	if err != nil {
		return nil, err
	}
	e, err := HinfNorm(diff)
	if err != nil {
		return nil, err
	}
	out.Error, out.ErrorPeak = e.Value, e.Peak
	if err := ctx.Err(); err != nil {
		return nil, err
	}
	if out.FullResponse, err = Frequency(ctx, g, FrequencyOptions{}); err != nil {
		return nil, err
	}
	if out.ReducedResponse, err = Frequency(ctx, red, FrequencyOptions{Grid: out.FullResponse.W}); err != nil {
		return nil, err
	}
	return out, nil
}

// residualize keeps the first r states of a balanced system and sets the
// derivatives of the others to zero (sampled: their next values equal
// their current ones): with A22 the block of the discarded states,
//
//	Ar = A11 + A12 (s0 I - A22)^-1 A21,  Br = B1 + A12 (s0 I - A22)^-1 B2,
//	Cr = C1 + C2 (s0 I - A22)^-1 A21,    Dr = D + C2 (s0 I - A22)^-1 B2,
//
// with s0 = 0 (continuous) or 1 (sampled), which keeps G(s0).
func residualize(b *System, r int) (*System, error) {
	n, m, p := b.N(), b.M(), b.P()
	if r >= n {
		return b, nil
	}
	s0 := 0.0
	if b.Sampled() {
		s0 = 1
	}
	A := b.A
	M := mat.NewDense(n-r, n-r, nil)
	for i := 0; i < n-r; i++ {
		for j := 0; j < n-r; j++ {
			M.Set(i, j, -A.At(r+i, r+j))
		}
		M.Set(i, i, M.At(i, i)+s0)
	}
	var lu mat.LU
	lu.Factorize(M)
	if c := lu.Cond(); c > 1e12 || math.IsInf(c, 0) {
		return nil, fmt.Errorf("the discarded states cannot be residualized: their block is nearly singular (condition %.3g); use truncation", c)
	}
	sol := func(X *mat.Dense) *mat.Dense {
		var Y mat.Dense
		_ = lu.SolveTo(&Y, false, X)
		return &Y
	}
	A12 := mat.DenseCopyOf(A.Slice(0, r, r, n))
	A21 := mat.DenseCopyOf(A.Slice(r, n, 0, r))
	Ar := mat.DenseCopyOf(A.Slice(0, r, 0, r))
	Ar.Add(Ar, mul(A12, sol(A21)))
	var Br, Cr, Dr *mat.Dense
	if m > 0 {
		B2 := mat.DenseCopyOf(b.B.Slice(r, n, 0, m))
		Br = mat.DenseCopyOf(b.B.Slice(0, r, 0, m))
		Br.Add(Br, mul(A12, sol(B2)))
		if p > 0 {
			C2 := mat.DenseCopyOf(b.C.Slice(0, p, r, n))
			Dr = mat.DenseCopyOf(b.D)
			Dr.Add(Dr, mul(C2, sol(B2)))
		}
	}
	if p > 0 {
		C2 := mat.DenseCopyOf(b.C.Slice(0, p, r, n))
		Cr = mat.DenseCopyOf(b.C.Slice(0, p, 0, r))
		Cr.Add(Cr, mul(C2, sol(A21)))
	}
	out, err := NewSystem(r, m, p, Ar, Br, Cr, Dr, b.Ts)
	if err != nil {
		return nil, err
	}
	out.StateNames = defaultNames("b", r)
	out.InputNames, out.OutputNames = b.InputNames, b.OutputNames
	return out, nil
}
