package lsys

import (
	"math"
	"math/cmplx"

	"gonum.org/v1/gonum/mat"
)

// Roots of transfer-function polynomials, and how well their coefficients
// fix them: the checks that say when a polynomial cannot carry its poles.

// polyRootsMonic returns the roots of the polynomial p (ascending), as Poles
// of its companion matrix (clustered as the mode table does).
func polyRootsMonic(p []float64, ts float64) []complex128 {
	p = polyTrim(p)
	n := len(p) - 1
	if n < 1 {
		return nil
	}
	sys, err := NewSystem(n, 0, 0, companion(p), nil, nil, nil, ts)
	if err != nil {
		return nil
	}
	r, err := Poles(sys)
	if err != nil {
		return nil
	}
	return r
}

// companion returns the companion matrix of the polynomial p (ascending,
// degree n >= 1): ones above the diagonal, -p_k / p_n in the last row.
func companion(p []float64) *mat.Dense {
	n := len(p) - 1
	lead := p[n]
	A := mat.NewDense(n, n, nil)
	for k := 0; k+1 < n; k++ {
		A.Set(k, k+1, 1)
	}
	for k := 0; k < n; k++ {
		A.Set(n-1, k, -p[k]/lead)
	}
	return A
}

// rootRadius is the first-order movement of the root l of p (ascending)
// under coefficient errors of n u relative to the coefficients of
// prod(x + |r|) over all roots (see poleUncertainty); roots equal to l
// are left out of the product, so a multiple root gets its own scale.
func rootRadius(p []float64, l complex128, roots []complex128) float64 {
	p = polyTrim(p)
	n := len(p) - 1
	if n < 1 {
		return 0
	}
	lead := math.Abs(p[n])
	abs := make([]complex128, len(roots))
	for i, r := range roots {
		abs[i] = complex(-cmplx.Abs(r), 0)
	}
	bound := polyFromRoots(abs)
	a := cmplx.Abs(l)
	sum, pw := 0.0, 1.0
	for k, c := range p {
		b := math.Abs(c) / lead
		if k < len(bound) {
			b = math.Max(b, math.Abs(bound[k]))
		}
		sum += b * pw
		pw *= a
	}
	prod, mult := 1.0, 0
	for _, r := range roots {
		if d := cmplx.Abs(l - r); d > 0 {
			prod *= d
		} else {
			mult++
		}
	}
	if mult < 1 {
		mult = 1
	}
	return math.Pow(float64(n)*dlamchE*sum/prod, 1/float64(mult))
}
