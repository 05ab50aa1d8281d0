package lsys

import (
	"context"
	"math"
	"testing"

	"gonum.org/v1/gonum/mat"
)

func TestNoiseFirstOrder(t *testing.T) {
	// x' = -a x + b w, y = c x, intensity W: P = b^2 W / (2 a), so the RMS
	// of y is |c| b sqrt(W / (2 a)) (closed form).
	a, b, c, W := 2.0, 3.0, 0.5, 0.8
	g := sys(t, []float64{-a}, []float64{b}, []float64{c}, nil, 1, 1, 1, 0)
	cv, err := NoiseResponse(context.Background(), g, mat.NewDense(1, 1, []float64{W}))
	if err != nil {
		t.Fatal(err)
	}
	want := c * b * math.Sqrt(W/(2*a))
	if !closeRel(cv.RMS[0], want, 1e-15) {
		t.Fatalf("RMS %v want %v", cv.RMS[0], want)
	}
	// The variance is (1/pi) times the integral of the density over
	// w >= 0: trapezoid on the response grid, plus the tail beyond it
	// (c b)^2 W / w^2 integrated analytically, and the part below it.
	fr := cv.Spectrum
	I := 0.0
	for k := 1; k < len(fr.W); k++ {
		I += (fr.W[k] - fr.W[k-1]) * (cv.Density[0][k] + cv.Density[0][k-1]) / 2
	}
	I += cv.Density[0][0] * fr.W[0]
	I += c * c * b * b * W / fr.W[len(fr.W)-1]
	if !closeRel(I/math.Pi, want*want, 5e-3) {
		t.Fatalf("integrated density %v, variance %v", I/math.Pi, want*want)
	}
	// Sampled x[k+1] = a x + w, y = x: P = W / (1 - a^2) (closed form).
	gd := sys(t, []float64{0.9}, []float64{1}, []float64{1}, nil, 1, 1, 1, 0.01)
	cv, err = NoiseResponse(context.Background(), gd, mat.NewDense(1, 1, []float64{2}))
	if err != nil || !closeRel(cv.RMS[0], math.Sqrt(2/(1-0.81)), 1e-14) {
		t.Fatalf("sampled RMS %v (%v)", cv.RMS, err)
	}
}
