package lsys

import (
	"errors"
	"fmt"
	"math"
	"math/cmplx"

	"gonum.org/v1/gonum/mat"
)

// Sampling methods understood by Sample and Continuous, in the trade's
// words in full.
const (
	ZeroOrderHold   = "zero-order hold"   // inputs held constant over a period
	FirstOrderHold  = "first-order hold"  // triangle hold: inputs linear between samples
	Bilinear        = "bilinear"          // the substitution s = (2/T)(z-1)/(z+1), optionally prewarped
	MatchedPoleZero = "matched pole-zero" // poles and zeros mapped by z = e^(sT) (needs the zeros of the system)
)

// SampleMethods lists the methods of Sample in the order help shows them.
var SampleMethods = []string{ZeroOrderHold, FirstOrderHold, Bilinear, MatchedPoleZero}

// Sample returns the sampled equivalent of the continuous system g with
// period T.
//
//   - zero-order hold: exact for inputs held constant between samples. Phi = e^{AT}
//     and Gamma = int_0^T e^{As} ds B from one exponential of the block
//     matrix [[A, B], [0, 0]] T (Van Loan 1978, "Computing integrals
//     involving the matrix exponential", IEEE TAC 23(3):395-404).
//   - first-order hold: exact for inputs linear between samples (triangle hold), from
//     the exponential of [[A, B, 0], [0, 0, I/T], [0, 0, 0]] T giving Phi,
//     Gamma1, Gamma2; then Bd = Gamma1 + (Phi - I) Gamma2, Cd = C,
//     Dd = D + C Gamma2 (Franklin, Powell & Workman, Digital Control of
//     Dynamic Systems, 3rd ed., 1998, Section 6.3.2).
//   - bilinear: the bilinear substitution with step h = T, or, with
//     prewarp w0 > 0, h = 2 tan(w0 T/2)/w0 so that the frequency response
//     agrees exactly at w0. With M = I - hA/2: Ad = M^{-1}(I + hA/2),
//     Bd = M^{-1} B h, Cd = C M^{-1}, Dd = D + C M^{-1} B h/2.
//   - matched pole-zero (SISO): the poles and finite zeros of a minimal realization
//     map by z = e^{sT}; of the zeros at infinity all but one go to z = -1
//     and one stays at infinity, so a strictly proper system stays strictly
//     proper (a one-sample computation delay); the gain is matched at
//     s = 0, or at w = pi/(10 T) when there is a pole at s = 0 (Franklin,
//     Powell & Workman, Digital Control of Dynamic Systems, 3rd ed., 1998,
//     Section 6.3.3, from memory; the treatment of zeros at infinity varies
//     between texts and is ours as stated).
//
// The exponential is gonum's scaling and squaring with Pade approximants
// (Higham 2005, "The scaling and squaring method for the matrix
// exponential revisited", SIAM J. Matrix Anal. Appl. 26(4)).
func Sample(g *System, T float64, method string, prewarp float64) (*System, error) {
	if g == nil {
		return nil, errors.New("the system is missing")
	}
	if g.Sampled() {
		return nil, fmt.Errorf("the system is already sampled (%s); convert it back with continuous first", tsText(g.Ts))
	}
	if !(T > 0) || math.IsInf(T, 0) {
		return nil, fmt.Errorf("the period must be a finite number > 0, got %v", T)
	}
	if math.IsNaN(prewarp) || math.IsInf(prewarp, 0) || prewarp < 0 {
		return nil, fmt.Errorf("the prewarp frequency must be finite and >= 0 rad/s, got %v", prewarp)
	}
	if prewarp > 0 && method != Bilinear {
		return nil, fmt.Errorf("a prewarp frequency applies to the bilinear method only, not to %q", method)
	}
	if prewarp*T/2 >= math.Pi/2 {
		return nil, fmt.Errorf("the prewarp frequency %g rad/s must be below the Nyquist frequency pi/T = %g rad/s", prewarp, math.Pi/T)
	}
	n, m, p := g.N(), g.M(), g.P()
	var out *System
	var err error
	switch method {
	case ZeroOrderHold, "":
		if n == 0 || m == 0 {
			out, err = sampleFree(g, T)
			break
		}
		Phi, Gam, xerr := zohPair(g.A, g.B, T)
		if xerr != nil {
			return nil, xerr
		}
		out, err = NewSystem(n, m, p, Phi, Gam, g.C, g.D, T)
	case FirstOrderHold:
		if n == 0 || m == 0 {
			out, err = sampleFree(g, T)
			break
		}
		Phi, G1, G2, xerr := fohTriple(g.A, g.B, T)
		if xerr != nil {
			return nil, xerr
		}
		var PmI mat.Dense
		PmI.Sub(Phi, identity(n))
		Bd := add(G1, mul(&PmI, G2))
		out, err = NewSystem(n, m, p, Phi, Bd, g.C, add(g.D, mul(g.C, G2)), T)
	case Bilinear:
		h := T
		if prewarp > 0 {
			h = 2 * math.Tan(prewarp*T/2) / prewarp
		}
		out, err = bilinear(g, h, T)
	case MatchedPoleZero:
		out, err = matched(g, T)
	default:
		return nil, fmt.Errorf("unknown method %q; use \"zero-order hold\", \"first-order hold\", \"bilinear\" or \"matched pole-zero\"", method)
	}
	if err != nil {
		return nil, err
	}
	out.StateNames = append([]string(nil), g.StateNames...)
	out.InputNames = append([]string(nil), g.InputNames...)
	out.OutputNames = append([]string(nil), g.OutputNames...)
	return out, nil
}

// Continuous returns the continuous system whose sampled equivalent is gd,
// inverting Sample where that is defined:
//
//   - bilinear (with the same prewarp as used for sampling): exact inverse,
//     needs Ad + I invertible (no pole at z = -1).
//   - zero-order hold: the principal matrix logarithm of [[Ad, Bd], [0, I]] divided by
//     T, by inverse scaling and squaring (Kenney & Laub 1989, "Condition
//     estimates for matrix functions", SIAM J. Matrix Anal. Appl. 10(2);
//     Higham, Functions of Matrices, 2008, Section 11.5) with Denman-Beavers
//     square roots. Defined when Ad has no eigenvalue on the closed negative
//     real axis; refused otherwise.
//   - first-order hold: A from the same logarithm of Ad, then B and D from the linear
//     relations Bd = (M1 + (Ad - I) M2) B and Dd = D + C M2 B, with M1, M2
//     the hold integrals of the block exponential.
//   - matched pole-zero is not inverted here.
func Continuous(gd *System, method string, prewarp float64) (*System, error) {
	if gd == nil {
		return nil, errors.New("the system is missing")
	}
	if !gd.Sampled() {
		return nil, errors.New("the system is already continuous")
	}
	T := gd.Ts
	n, m, p := gd.N(), gd.M(), gd.P()
	var out *System
	var err error
	switch method {
	case Bilinear:
		h := T
		if prewarp > 0 {
			if prewarp*T/2 >= math.Pi/2 {
				return nil, fmt.Errorf("the prewarp frequency %g rad/s must be below pi/T = %g rad/s", prewarp, math.Pi/T)
			}
			h = 2 * math.Tan(prewarp*T/2) / prewarp
		}
		if n == 0 {
			out, err = NewSystem(0, m, p, nil, nil, nil, gd.D, 0)
			break
		}
		// M = 2 (Ad + I)^{-1}; A = (2/h)(I - M); B = M Bd / h; C = Cd M;
		// D = Dd - Cd (Ad + I)^{-1} Bd.
		var ApI mat.Dense
		ApI.Add(gd.A, identity(n))
		var lu mat.LU
		lu.Factorize(&ApI)
		if c := lu.Cond(); c > 1e12 || lu.Det() == 0 {
			return nil, errors.New("the sampled system has a pole at z = -1 (or very near it), which has no continuous counterpart under the bilinear map")
		}
		var inv mat.Dense
		if err := lu.SolveTo(&inv, false, identity(n)); err != nil {
			return nil, err
		}
		M := scale(2, &inv)
		A := scale(2/h, add(identity(n), scale(-1, M)))
		B := scale(1/h, mul(M, gd.B))
		C := mul(gd.C, M)
		D := add(gd.D, scale(-1, mul(gd.C, mul(&inv, gd.B))))
		out, err = NewSystem(n, m, p, A, B, C, D, 0)
	case ZeroOrderHold, "":
		if n == 0 {
			out, err = NewSystem(0, m, p, nil, nil, nil, gd.D, 0)
			break
		}
		F := blocks([]int{n, m}, []int{n, m}, [][]*mat.Dense{{gd.A, gd.B}, {nil, identity(m)}})
		L, lerr := logm(F)
		if lerr != nil {
			return nil, lerr
		}
		L.Scale(1/T, L)
		var A, B *mat.Dense
		A = mat.DenseCopyOf(L.Slice(0, n, 0, n))
		if m > 0 {
			B = mat.DenseCopyOf(L.Slice(0, n, n, n+m))
		}
		out, err = NewSystem(n, m, p, A, B, gd.C, gd.D, 0)
	case FirstOrderHold:
		if n == 0 {
			out, err = NewSystem(0, m, p, nil, nil, nil, gd.D, 0)
			break
		}
		// A = log(Ad)/T; with Gamma1 = M1 B and Gamma2 = M2 B (M1, M2 from
		// the block exponential with B = I), Bd = (M1 + (Ad - I) M2) B,
		// Dd = D + C M2 B.
		L, lerr := logm(gd.A)
		if lerr != nil {
			return nil, lerr
		}
		A := scale(1/T, L)
		_, M1, M2, xerr := fohTriple(A, identity(n), T)
		if xerr != nil {
			return nil, xerr
		}
		N := add(M1, mul(add(gd.A, scale(-1, identity(n))), M2))
		var lu mat.LU
		lu.Factorize(N)
		if c := lu.Cond(); c > 1e12 || lu.Det() == 0 {
			return nil, errors.New("the first-order-hold input map cannot be inverted (singular integral of the exponential)")
		}
		var B *mat.Dense
		if m > 0 {
			B = mat.NewDense(n, m, nil)
			if err := lu.SolveTo(B, false, gd.B); err != nil {
				return nil, err
			}
		}
		D := add(gd.D, scale(-1, mul(gd.C, mul(M2, B))))
		out, err = NewSystem(n, m, p, A, B, gd.C, D, 0)
	default:
		return nil, fmt.Errorf("method %q cannot be inverted here; use \"zero-order hold\", \"first-order hold\" or \"bilinear\"", method)
	}
	if err != nil {
		return nil, err
	}
	out.StateNames = append([]string(nil), gd.StateNames...)
	out.InputNames = append([]string(nil), gd.InputNames...)
	out.OutputNames = append([]string(nil), gd.OutputNames...)
	return out, nil
}

func bilinear(g *System, h, T float64) (*System, error) {
	n, m, p := g.N(), g.M(), g.P()
	if n == 0 {
		return NewSystem(0, m, p, nil, nil, nil, g.D, T)
	}
	Mm := add(identity(n), scale(-h/2, g.A))
	var lu mat.LU
	lu.Factorize(Mm)
	if c := lu.Cond(); c > 1e12 || lu.Det() == 0 {
		return nil, fmt.Errorf("bilinear: I - A h/2 is singular (a pole at s = 2/h = %g); choose another period", 2/h)
	}
	var inv mat.Dense
	if err := lu.SolveTo(&inv, false, identity(n)); err != nil {
		return nil, err
	}
	Ad := mul(&inv, add(identity(n), scale(h/2, g.A)))
	Bd := scale(h, mul(&inv, g.B))
	Cd := mul(g.C, &inv)
	Dd := add(g.D, scale(h/2, mul(Cd, g.B)))
	return NewSystem(n, m, p, Ad, Bd, Cd, Dd, T)
}

// sampleFree samples a system without states or without inputs: only
// A changes, to e^{AT}.
func sampleFree(g *System, T float64) (*System, error) {
	var Ad *mat.Dense
	if g.N() > 0 {
		var err error
		if Ad, err = Expm(scale(T, g.A)); err != nil {
			return nil, err
		}
	}
	return NewSystem(g.N(), g.M(), g.P(), Ad, nil, g.C, g.D, T)
}

// zohPair returns Phi = e^{AT} and Gamma = int_0^T e^{As} ds B (Van Loan 1978).
func zohPair(A, B *mat.Dense, T float64) (*mat.Dense, *mat.Dense, error) {
	n, _ := A.Dims()
	_, m := B.Dims()
	M := blocks([]int{n, m}, []int{n, m}, [][]*mat.Dense{{scale(T, A), scale(T, B)}, {nil, nil}})
	E, err := Expm(M)
	if err != nil {
		return nil, nil, err
	}
	return mat.DenseCopyOf(E.Slice(0, n, 0, n)), mat.DenseCopyOf(E.Slice(0, n, n, n+m)), nil
}

// fohTriple returns Phi, Gamma1 = int_0^T e^{As} ds B and
// Gamma2 = int_0^T e^{A(T-t)} B t/T dt from one block exponential (Van Loan 1978).
func fohTriple(A, B *mat.Dense, T float64) (*mat.Dense, *mat.Dense, *mat.Dense, error) {
	n, _ := A.Dims()
	_, m := B.Dims()
	M := blocks([]int{n, m, m}, []int{n, m, m}, [][]*mat.Dense{
		{scale(T, A), scale(T, B), nil},
		{nil, nil, identity(m)},
		{nil, nil, nil},
	})
	E, err := Expm(M)
	if err != nil {
		return nil, nil, nil, err
	}
	return mat.DenseCopyOf(E.Slice(0, n, 0, n)), mat.DenseCopyOf(E.Slice(0, n, n, n+m)), mat.DenseCopyOf(E.Slice(0, n, n+m, n+2*m)), nil
}

// logm is the principal logarithm by inverse scaling and squaring: take
// Denman-Beavers square roots (Denman & Beavers 1976, "The matrix sign
// function and computations in systems", Appl. Math. Comput. 2(1)) until
// ||X - I||_1 <= 0.25, then sum the series of log(I + E) to 1e-17 and scale
// back by 2^k (Higham, Functions of Matrices, 2008, Ch. 11).
func logm(F *mat.Dense) (*mat.Dense, error) {
	n, _ := F.Dims()
	var ev mat.Eigen
	if ok := ev.Factorize(F, mat.EigenNone); !ok {
		return nil, errors.New("the eigenvalues of the sampled state matrix could not be computed")
	}
	nrm := mat.Norm(F, 1)
	for _, l := range ev.Values(nil) {
		if real(l) <= 0 && math.Abs(imag(l)) <= 1e-12*math.Max(1, nrm) {
			return nil, fmt.Errorf("the sampled system has an eigenvalue %.4g on the closed negative real axis; it has no real continuous zero-order-hold counterpart", real(l))
		}
	}
	X := mat.DenseCopyOf(F)
	I := identity(n)
	k := 0
	for ; k < 60; k++ {
		var E mat.Dense
		E.Sub(X, I)
		if mat.Norm(&E, 1) <= 0.25 {
			break
		}
		Y, Z := mat.DenseCopyOf(X), mat.DenseCopyOf(I)
		for it := 0; it < 100; it++ {
			var Yi, Zi mat.Dense
			if err := Yi.Inverse(Y); err != nil {
				return nil, errors.New("the square-root iteration met a singular matrix")
			}
			if err := Zi.Inverse(Z); err != nil {
				return nil, errors.New("the square-root iteration met a singular matrix")
			}
			var Yn, Zn mat.Dense
			Yn.Add(Y, &Zi)
			Yn.Scale(0.5, &Yn)
			Zn.Add(Z, &Yi)
			Zn.Scale(0.5, &Zn)
			var d mat.Dense
			d.Sub(&Yn, Y)
			Y, Z = &Yn, &Zn
			if mat.Norm(&d, 1) <= 1e-15*mat.Norm(Y, 1) {
				break
			}
		}
		X = Y
	}
	var E mat.Dense
	E.Sub(X, I)
	// log(I+E) = sum (-1)^{j+1} E^j / j
	L := mat.NewDense(n, n, nil)
	P := mat.DenseCopyOf(&E)
	for j := 1; j < 200; j++ {
		var t mat.Dense
		t.Scale(math.Pow(-1, float64(j+1))/float64(j), P)
		L.Add(L, &t)
		if mat.Norm(&t, 1) <= 1e-17*math.Max(mat.Norm(L, 1), 1e-300) {
			break
		}
		var q mat.Dense
		q.Mul(P, &E)
		P = &q
	}
	L.Scale(math.Ldexp(1, k), L)
	if err := CheckFinite("log", L); err != nil {
		return nil, errors.New("the matrix logarithm did not converge")
	}
	return L, nil
}

// matched implements the matched pole-zero method (see Sample).
func matched(g *System, T float64) (*System, error) {
	if g.M() != 1 || g.P() != 1 {
		return nil, fmt.Errorf("the matched method is for one input and one output; this system has %d and %d (sample each channel, or use the zero-order hold)", g.M(), g.P())
	}
	if g.N() == 0 {
		return NewSystem(0, 1, 1, nil, nil, nil, g.D, T)
	}
	mg, err := Minimal(g, 0)
	if err != nil {
		return nil, err
	}
	if mg.N() == 0 {
		return NewSystem(0, 1, 1, nil, nil, nil, mg.D, T)
	}
	poles, err := Poles(mg)
	if err != nil {
		return nil, err
	}
	zs, err := Zeros(mg, 0)
	if err != nil {
		return nil, err
	}
	var zp, zz []complex128
	for _, p := range poles {
		zp = append(zp, cmplx.Exp(p*complex(T, 0)))
	}
	for _, z := range zs.Invariant {
		zz = append(zz, cmplx.Exp(z*complex(T, 0)))
	}
	for k := len(zs.Invariant); k < len(poles)-1; k++ {
		zz = append(zz, -1)
	}
	num, den := polyFromRoots(zz), polyFromRoots(zp)
	// gain matching point
	w0 := 0.0
	for _, p := range poles {
		if cmplx.Abs(p) <= 1e-9*math.Max(1, mat.Norm(mg.A, 1)) {
			w0 = math.Pi / (10 * T)
		}
	}
	gc, err := GainAt(mg, w0)
	if err != nil {
		return nil, fmt.Errorf("the gain cannot be matched at %g rad/s: %w", w0, err)
	}
	zpt := cmplx.Exp(complex(0, w0*T))
	gd := polyAtC(num, zpt) / polyAtC(den, zpt)
	if gd == 0 || cmplx.IsNaN(gd) || cmplx.IsInf(gd) {
		return nil, errors.New("the gain cannot be matched: the sampled system vanishes or has a pole at the matching point")
	}
	ratio := gc[0] / gd
	K := cmplx.Abs(ratio)
	if real(ratio) < 0 {
		K = -K
	}
	d, err := Realize([][]*Rational{{{Num: polyScale(K, num), Den: den, Ts: T}}}, T)
	if err != nil {
		return nil, err
	}
	return d, nil
}

func polyAtC(p []float64, z complex128) complex128 {
	var acc complex128
	for i := len(p) - 1; i >= 0; i-- {
		acc = acc*z + complex(p[i], 0)
	}
	return acc
}
