package lsys

import (
	"context"
	"errors"
	"fmt"
	"math"

	"gonum.org/v1/gonum/mat"
)

// Covariance is the steady state of a stable system driven by white noise
// on its inputs with intensity W: E[w(t) w(s)^T] = W delta(t - s) in
// continuous time (a two-sided spectral density W), E[w[k] w[j]^T] = W
// delta_kj when sampled. Then
//
//	A P + P A^T + B W B^T = 0,     Y = C P C^T            (continuous)
//	A P A^T - P + B W B^T = 0,     Y = C P C^T + D W D^T  (sampled)
//
// (a Lyapunov equation, Bartels & Stewart), and the spectral density of
// output i is S_i(w) = [G W G^H]_ii, with variance (1/2 pi) times its
// integral over all frequencies (sampled: Ts/(2 pi) over -pi/Ts..pi/Ts).
type Covariance struct {
	System   *System
	W        *mat.Dense
	States   *mat.Dense // P
	Outputs  *mat.Dense // Y
	RMS      []float64  // sqrt(Y_ii) per output; +Inf where D passes white noise through
	StateRMS []float64  // sqrt(P_ii) per state
	Residual float64    // of the Lyapunov solution
	// Infinite says why an RMS is infinite ("" when none is).
	Infinite string
	// Spectrum: Density[i][k] is S_i at Spectrum.W[k] (rad/s).
	Spectrum *FrequencyResponse
	Density  [][]float64
}

// NoiseResponse computes the covariance of g under white noise of
// intensity W (m x m, symmetric positive semidefinite).
func NoiseResponse(ctx context.Context, g *System, W *mat.Dense) (*Covariance, error) {
	n, m, p := g.N(), g.M(), g.P()
	if m == 0 {
		return nil, errors.New("the system has no inputs for the noise to enter")
	}
	if r, c := W.Dims(); r != m || c != m {
		return nil, &ShapeError{What: "the noise intensity must be square with a row per input", Got: Shape(W), Other: fmt.Sprintf("%dx%d expected", m, m)}
	}
	if err := CheckFinite("the noise intensity", W); err != nil {
		return nil, err
	}
	if !mat.EqualApprox(W, W.T(), 1e-12*math.Max(1, maxAbs(W))) {
		return nil, errors.New("the noise intensity must be symmetric")
	}
	if _, neg, err := psdFactor(W); err != nil || neg > 1e-12 {
		return nil, errors.New("the noise intensity must be positive semidefinite (a covariance)")
	}
	out := &Covariance{System: g, W: W}
	if n > 0 {
		if err := needStable(g, "a steady-state covariance"); err != nil {
			return nil, err
		}
		BW := mul(g.B, W)
		var Q mat.Dense
		Q.Mul(BW, g.B.T())
		symmetrize(&Q)
		sol, err := LyapunovEq(g.A, &Q, g.Sampled())
		if err != nil {
			return nil, err
		}
		out.States, out.Residual = sol.X, sol.Residual
		for i := 0; i < n; i++ {
			out.StateRMS = append(out.StateRMS, math.Sqrt(math.Max(sol.X.At(i, i), 0)))
		}
		if p > 0 {
			out.Outputs = mul(mul(g.C, sol.X), mat.DenseCopyOf(g.C.T()))
		}
	}
	if p > 0 {
		if out.Outputs == nil {
			out.Outputs = mat.NewDense(p, p, nil)
		}
		DWD := mul(mul(g.D, W), mat.DenseCopyOf(g.D.T()))
		for i := 0; i < p; i++ {
			v := out.Outputs.At(i, i)
			if DWD.At(i, i) > 0 && !g.Sampled() {
				out.RMS = append(out.RMS, math.Inf(1))
				out.Infinite = "white noise passes straight through the feedthrough D to an output, whose variance is then infinite; add a roll-off (a filter) to the model"
				continue
			}
			if g.Sampled() {
				v += DWD.At(i, i)
			}
			out.RMS = append(out.RMS, math.Sqrt(math.Max(v, 0)))
		}
		if g.Sampled() {
			out.Outputs.Add(out.Outputs, DWD)
		}
		symmetrize(out.Outputs)
		fr, err := Frequency(ctx, g, FrequencyOptions{})
		if err != nil {
			return nil, err
		}
		out.Spectrum = fr
		out.Density = make([][]float64, p)
		for i := 0; i < p; i++ {
			out.Density[i] = make([]float64, len(fr.W))
			for k := range fr.W {
				// [G W G^H]_ii = sum_jl G_ij W_jl conj(G_il)
				var s complex128
				for j := 0; j < m; j++ {
					for l := 0; l < m; l++ {
						s += fr.G[k][i*m+j] * complex(W.At(j, l), 0) * complex(real(fr.G[k][i*m+l]), -imag(fr.G[k][i*m+l]))
					}
				}
				out.Density[i][k] = real(s)
			}
		}
	}
	return out, nil
}
