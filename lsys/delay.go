package lsys

import (
	"fmt"
	"math"
)

// Pade returns the [n/n] Pade approximant of the dead time e^{-sT}:
//
//	num(s) = sum_k c_k (-sT)^k,  den(s) = sum_k c_k (sT)^k,
//	c_k = (2n-k)! n! / ((2n)! k! (n-k)!),
//
// the diagonal Pade approximant of e^x at x = -sT (Golub & Van Loan,
// Matrix Computations, 4th ed., 2013, Section 9.3.1). It is all-pass with
// unit gain at every frequency, and its phase matches -wT to order
// (wT)^(2n+1). Orders 1 to 10 are accepted: beyond that the coefficients
// span more than 20 decades and the realization is ill-conditioned.
func Pade(T float64, n int) (*Rational, error) {
	if math.IsNaN(T) || math.IsInf(T, 0) || T < 0 {
		return nil, fmt.Errorf("the dead time must be a finite number >= 0 s, got %v", T)
	}
	if n < 1 || n > 10 {
		return nil, fmt.Errorf("the order must be between 1 and 10, got %d", n)
	}
	if T == 0 {
		return &Rational{Num: Poly{1}, Den: Poly{1}}, nil
	}
	num, den := make(Poly, n+1), make(Poly, n+1)
	c := 1.0 // c_0
	for k := 0; k <= n; k++ {
		if k > 0 {
			// c_k / c_{k-1} = (n-k+1) / (k (2n-k+1))
			c *= float64(n-k+1) / (float64(k) * float64(2*n-k+1))
		}
		tk := c * math.Pow(T, float64(k))
		den[k] = tk
		if k%2 == 1 {
			num[k] = -tk
		} else {
			num[k] = tk
		}
	}
	return &Rational{Num: num, Den: den}, nil
}

// Delay returns a minimal state-space realization of Pade(T, n), with
// input "in" and output "out". It realizes the approximant in the scaled
// variable sT (coefficients of order one) and then scales A and B by 1/T,
// which keeps the companion form well conditioned for small T.
func Delay(T float64, n int) (*System, error) {
	r, err := Pade(1, n)
	if err != nil {
		return nil, err
	}
	if _, err := Pade(T, n); err != nil {
		return nil, err
	}
	s, err := Realize([][]*Rational{{r}}, 0)
	if err != nil {
		return nil, err
	}
	if T == 0 {
		return s.WithNames(nil, []string{"in"}, []string{"out"})
	}
	A, B := scale(1/T, s.A), scale(1/T, s.B)
	s, err = NewSystem(s.N(), 1, 1, A, B, s.C, s.D, 0)
	if err != nil {
		return nil, err
	}
	return s.WithNames(nil, []string{"in"}, []string{"out"})
}
