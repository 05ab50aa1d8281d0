package lsys

// Poly is a real polynomial with coefficients in ascending powers:
// Poly{c0, c1, c2} is c0 + c1 x + c2 x^2. Placeholder contract: the language
// work owns this file and fills in arithmetic, evaluation and display helpers.
type Poly []float64

// Rational is a ratio of polynomials in s (Ts == 0) or z (Ts > 0).
type Rational struct {
	Num, Den Poly
	Ts       float64
}
