package lsys

import (
	"context"
	"fmt"
	"math"
	"math/cmplx"

	"gonum.org/v1/gonum/mat"
)

// Free and step responses of larger continuous systems are propagated in
// modal coordinates when the eigenvectors are well conditioned: with
// A V = V diag(lambda), each coordinate z of x = V z moves on its own,
// z[k+1] = e^(lambda h) z[k] + phi(lambda h) h g (g the coordinate of the
// step's B column), which is the exact zero-order-hold step of that mode,
// so the samples stay exact as with the dense transition e^(A h). The
// dense step costs n^2 per sample and the block exponential; this costs
// one eigen-decomposition and n (p + 1) per sample. The rounding error of
// the change of coordinates grows with cond(V), hence the bound below, and
// small models keep the dense step (it costs little there).
const (
	modalMinStates = 33
	// modalMaxCond bounds the 1-norm condition estimate of the real modal
	// basis: rounding of u cond(V) ~ 1e-11 relative, far below the 10
	// digits shown.
	modalMaxCond = 1e5
)

// modalResponse fills r.Y for a continuous system's step, impulse or
// initial response on the uniform grid of step h and returns the
// eigenvalues, or returns nil (and touches nothing) when the modal basis
// is ill conditioned or the decomposition fails, so that the caller takes
// the dense step.
func modalResponse(ctx context.Context, g *System, kind string, x0 []float64, h float64, r *Response, opt ResponseOptions) ([]complex128, error) {
	n, p := g.N(), g.P()
	var eig mat.Eigen
	if !eig.Factorize(g.A, mat.EigenRight) {
		return nil, nil
	}
	vals := eig.Values(nil)
	var vc mat.CDense
	eig.VectorsTo(&vc)
	// The real modal basis: a real eigenvector, or the real and imaginary
	// parts of the member with positive imaginary part of a conjugate
	// pair (the one LAPACK lists first).
	V := mat.NewDense(n, n, nil)
	var modes []int // first column of each mode in V
	for k := 0; k < n; k++ {
		l := vals[k]
		switch {
		case imag(l) == 0:
			for i := 0; i < n; i++ {
				V.Set(i, k, real(vc.At(i, k)))
			}
		case imag(l) > 0 && k+1 < n && vals[k+1] == cmplx.Conj(l):
			for i := 0; i < n; i++ {
				v := vc.At(i, k)
				V.Set(i, k, real(v))
				V.Set(i, k+1, imag(v))
			}
		default:
			return nil, nil
		}
		modes = append(modes, k)
		if imag(l) != 0 {
			k++
		}
	}
	var lu mat.LU
	lu.Factorize(V)
	if c := lu.Cond(); !(c <= modalMaxCond) {
		return nil, nil
	}
	// Right-hand sides: the initial states of each channel, then B.
	nch := len(r.Channels)
	rhs := mat.NewDense(n, 2*nch, nil)
	for c := 0; c < nch; c++ {
		switch kind {
		case "impulse":
			for i := 0; i < n; i++ {
				rhs.Set(i, c, g.B.At(i, c))
			}
		case "initial":
			for i := 0; i < n; i++ {
				rhs.Set(i, c, x0[i])
			}
		case "step":
			for i := 0; i < n; i++ {
				rhs.Set(i, nch+c, g.B.At(i, c))
			}
		}
	}
	var w mat.Dense
	if err := lu.SolveTo(&w, false, rhs); err != nil {
		return nil, nil
	}
	// A pair's real coordinates (a, b) on (Re v, Im v) are the complex
	// coordinate a - i b on v: x = Re((a - i b) v).
	coord := func(k, col int) complex128 {
		if imag(vals[k]) == 0 {
			return complex(w.At(k, col), 0)
		}
		return complex(w.At(k, col), -w.At(k+1, col))
	}
	nm := len(modes)
	mu := make([]complex128, nm)  // e^(lambda h)
	phi := make([]complex128, nm) // (e^(lambda h) - 1) / lambda
	cv := make([]complex128, p*nm)
	for j, k := range modes {
		mu[j], phi[j] = zohMode(vals[k], h)
		for i := 0; i < p; i++ {
			var s complex128
			for l := 0; l < n; l++ {
				s += complex(g.C.At(i, l), 0) * vc.At(l, k)
			}
			cv[i*nm+j] = s
		}
	}
	z := make([]complex128, nm)
	gam := make([]complex128, nm)
	N := len(r.T)
	for c := 0; c < nch; c++ {
		for j, k := range modes {
			z[j] = coord(k, c)
			gam[j] = 0
			if kind == "step" {
				gam[j] = phi[j] * coord(k, nch+c)
			}
		}
		for k := 0; k < N; k++ {
			if k&255 == 0 {
				if err := ctx.Err(); err != nil {
					return nil, fmt.Errorf("interrupted: %w", err)
				}
				if opt.Progress != nil {
					opt.Progress((float64(c) + float64(k)/float64(N)) / float64(nch))
				}
			}
			for i := 0; i < p; i++ {
				row := cv[i*nm : (i+1)*nm]
				var y float64
				for j, zj := range z {
					y += real(row[j])*real(zj) - imag(row[j])*imag(zj)
				}
				if kind == "step" {
					y += g.D.At(i, c)
				}
				r.Y[i][c][k] = y
			}
			for j := range z {
				z[j] = mu[j]*z[j] + gam[j]
			}
		}
	}
	return vals, nil
}

// zohMode returns e^(l h) and the zero-order-hold integral
// int_0^h e^(l s) ds = (e^(l h) - 1)/l, the latter without cancellation
// for small |l h| (e^(x + iy) - 1 = expm1(x) cos y - 2 sin^2(y/2) +
// i e^x sin y) and exactly h at l = 0.
func zohMode(l complex128, h float64) (mu, phi complex128) {
	zh := l * complex(h, 0)
	x, y := real(zh), imag(zh)
	ex := math.Exp(x)
	sy, cy := math.Sincos(y)
	s2 := math.Sin(y / 2)
	mu = complex(ex*cy, ex*sy)
	if zh == 0 {
		return mu, complex(h, 0)
	}
	em1 := complex(math.Expm1(x)*cy-2*s2*s2, ex*sy)
	return mu, em1 / l
}
