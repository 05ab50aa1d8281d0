package lsys

import (
	"errors"
	"fmt"
	"math"

	"gonum.org/v1/gonum/mat"
)

// Expm returns the matrix exponential e^M by scaling and squaring with
// Pade approximants of degree 3 to 13 chosen from the 1-norm (Higham 2005,
// The scaling and squaring method for the matrix exponential revisited,
// SIAM J. Matrix Anal. Appl. 26(4), Algorithm 2.3; gonum's Dense.Exp
// implements it). M must be square and finite; a result that overflows is
// refused.
func Expm(M *mat.Dense) (*mat.Dense, error) {
	if M == nil {
		return nil, errors.New("exp: the matrix is empty")
	}
	r, c := M.Dims()
	if r != c {
		return nil, &ShapeError{What: "exp needs a square matrix", Got: Shape(M), Other: fmt.Sprintf("%dx%d", r, r)}
	}
	if err := CheckFinite("matrix", M); err != nil {
		return nil, err
	}
	var E mat.Dense
	E.Exp(M)
	if err := CheckFinite("exp(matrix)", &E); err != nil {
		return nil, fmt.Errorf("exp overflows (1-norm of the matrix %.3g): %v", mat.Norm(M, 1), err)
	}
	return &E, nil
}

// Transition returns the state transition matrix e^{A t} of x' = A x.
func Transition(A *mat.Dense, t float64) (*mat.Dense, error) {
	if math.IsNaN(t) || math.IsInf(t, 0) {
		return nil, fmt.Errorf("transition: time %v is not a finite number", t)
	}
	if A == nil {
		return nil, errors.New("transition: the system has no states")
	}
	var At mat.Dense
	At.Scale(t, A)
	return Expm(&At)
}

// Power returns M^k for an integer k by repeated squaring (k < 0 uses the
// inverse, refused when M is nearly singular; k = 0 gives the identity).
func Power(M *mat.Dense, k int) (*mat.Dense, error) {
	if M == nil {
		return nil, errors.New("power: the matrix is empty")
	}
	r, c := M.Dims()
	if r != c {
		return nil, &ShapeError{What: "powers need a square matrix", Got: Shape(M), Other: fmt.Sprintf("%dx%d", r, r)}
	}
	if err := CheckFinite("matrix", M); err != nil {
		return nil, err
	}
	base := M
	if k < 0 {
		inv, _, err := stInverse(M)
		if err != nil {
			return nil, fmt.Errorf("power %d: %v", k, err)
		}
		base = inv
		k = -k
	}
	res := identity(r)
	sq := mat.DenseCopyOf(base)
	for k > 0 {
		if k&1 == 1 {
			res.Mul(res, sq)
		}
		k >>= 1
		if k > 0 {
			sq.Mul(sq, sq)
		}
	}
	if err := CheckFinite("power", res); err != nil {
		return nil, fmt.Errorf("the power overflows: %v", err)
	}
	return res, nil
}
