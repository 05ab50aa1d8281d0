package lsys

import (
	"errors"
	"fmt"
	"math"
	"math/cmplx"

	"gonum.org/v1/gonum/mat"
)

// RiccatiSolution is the stabilizing solution of an algebraic Riccati
// equation,
//
//	A^T X + X A - (X B + N) R^-1 (B^T X + N^T) + Q = 0                  (continuous)
//	A^T X A - X - (A^T X B + N) (R + B^T X B)^-1 (B^T X A + N^T) + Q = 0 (sampled)
//
// with the gain K and the closed-loop matrix A - B K.
type RiccatiSolution struct {
	X        *mat.Dense
	K        *mat.Dense // R^-1 (B^T X + N^T), sampled (R + B^T X B)^-1 (B^T X A + N^T)
	Equation string
	Sampled  bool
	Method   string
	// Residual is the Frobenius norm of the left-hand side relative to
	// the sum of the norms of its terms (a backward error).
	Residual float64
	// CondU1 is the condition number of the basis block U1 that X = U2
	// U1^-1 divides by (Schur method); large values (say 1e8 and more)
	// mean X is sensitive. NaN for the doubling method.
	CondU1 float64
	// ClosedLoop are the eigenvalues of A - B K; Stable says whether they
	// are all strictly inside the stability region.
	ClosedLoop []complex128
	Stable     bool
}

// riccatiData checks the shapes and forms Ã = A - B R^-1 N^T,
// G = B R^-1 B^T and Q̃ = Q - N R^-1 N^T.
func riccatiData(A, B, Q, R, N *mat.Dense) (At, G, Qt, Ri *mat.Dense, err error) {
	n, c := A.Dims()
	if n != c {
		return nil, nil, nil, nil, &ShapeError{What: "A must be square", Got: Shape(A), Other: fmt.Sprintf("%dx%d", n, n)}
	}
	br, m := B.Dims()
	if br != n {
		return nil, nil, nil, nil, &ShapeError{What: "B must have as many rows as A", Got: Shape(B), Other: Shape(A)}
	}
	if r, c := Q.Dims(); r != n || c != n {
		return nil, nil, nil, nil, &ShapeError{What: "Q must be the size of A", Got: Shape(Q), Other: Shape(A)}
	}
	if r, c := R.Dims(); r != m || c != m {
		return nil, nil, nil, nil, &ShapeError{What: "R must be square with a row per input (column of B)", Got: Shape(R), Other: fmt.Sprintf("%dx%d expected", m, m)}
	}
	if N != nil {
		if r, c := N.Dims(); r != n || c != m {
			return nil, nil, nil, nil, &ShapeError{What: "N must have the rows of A and the columns of B", Got: Shape(N), Other: fmt.Sprintf("%dx%d expected", n, m)}
		}
	}
	for _, x := range []struct {
		s string
		a *mat.Dense
	}{{"A", A}, {"B", B}, {"Q", Q}, {"R", R}, {"N", N}} {
		if x.a != nil {
			if err := CheckFinite(x.s, x.a); err != nil {
				return nil, nil, nil, nil, err
			}
		}
	}
	if !mat.EqualApprox(Q, Q.T(), 1e-12*math.Max(1, maxAbs(Q))) {
		return nil, nil, nil, nil, errors.New("Q must be symmetric")
	}
	if !mat.EqualApprox(R, R.T(), 1e-12*math.Max(1, maxAbs(R))) {
		return nil, nil, nil, nil, errors.New("R must be symmetric")
	}
	var ch mat.Cholesky
	Rs := mat.NewSymDense(m, nil)
	for i := 0; i < m; i++ {
		for j := i; j < m; j++ {
			Rs.SetSym(i, j, (R.At(i, j)+R.At(j, i))/2)
		}
	}
	if !ch.Factorize(Rs) || ch.Cond() > 1e14 {
		return nil, nil, nil, nil, errors.New("R must be positive definite (every input must cost something); it is not, or nearly not")
	}
	Ri = mat.NewDense(m, m, nil)
	var ri mat.SymDense
	if err := ch.InverseTo(&ri); err != nil {
		return nil, nil, nil, nil, err
	}
	Ri.Copy(&ri)
	G = mul(mul(B, Ri), mat.DenseCopyOf(B.T()))
	At = mat.DenseCopyOf(A)
	Qt = mat.DenseCopyOf(Q)
	if N != nil {
		At.Sub(At, mul(mul(B, Ri), mat.DenseCopyOf(N.T())))
		Qt.Sub(Qt, mul(mul(N, Ri), mat.DenseCopyOf(N.T())))
	}
	return At, G, Qt, Ri, nil
}

// CARE solves the continuous algebraic Riccati equation by the Schur
// method of Laub (1979, "A Schur method for solving algebraic Riccati
// equations", IEEE TAC 24(6)): the real Schur form of the Hamiltonian
// matrix H = [[Ã, -G], [-Q̃, -Ã^T]] is reordered (Dtrexc) so that its n
// stable eigenvalues come first; their invariant subspace [U1; U2] gives
// X = U2 U1^-1. The stabilizing solution exists when H has no eigenvalue
// on the imaginary axis (within 1e3 u ||H||) and U1 is invertible; else the
// error says why. N may be nil.
func CARE(A, B, Q, R, N *mat.Dense) (*RiccatiSolution, error) {
	At, G, Qt, Ri, err := riccatiData(A, B, Q, R, N)
	if err != nil {
		return nil, err
	}
	n, _ := A.Dims()
	mG := mat.DenseCopyOf(G)
	mG.Scale(-1, mG)
	mQ := mat.DenseCopyOf(Qt)
	mQ.Scale(-1, mQ)
	mAT := mat.DenseCopyOf(At.T())
	mAT.Scale(-1, mAT)
	H := blocks([]int{n, n}, []int{n, n}, [][]*mat.Dense{{At, mG}, {mQ, mAT}})
	tol := 1e3 * 2.2e-16 * mat.Norm(H, 2)
	sf, err := Schur(H)
	if err != nil {
		return nil, err
	}
	for _, v := range sf.Values {
		if math.Abs(real(v)) <= tol {
			return nil, fmt.Errorf("no stabilizing solution: the Hamiltonian matrix has an eigenvalue on the imaginary axis (%s), so a mode on the axis cannot be moved or is not weighted; check that every unstable or axis mode is reachable by the inputs and seen by the weight Q", fmtComplex(v))
		}
	}
	k, err := sf.Reorder(func(v complex128) bool { return real(v) < 0 })
	if err != nil {
		return nil, err
	}
	if k != n {
		return nil, fmt.Errorf("no stabilizing solution: the Hamiltonian matrix has %d stable eigenvalues, not %d", k, n)
	}
	X, cond, err := subspaceSolution(sf.Z, n)
	if err != nil {
		return nil, err
	}
	sol := &RiccatiSolution{X: X, Equation: "A^T X + X A - (X B + N) R^-1 (B^T X + N^T) + Q = 0", Method: "Schur method on the Hamiltonian matrix (Laub 1979)", CondU1: cond}
	if N == nil {
		sol.Equation = "A^T X + X A - X B R^-1 B^T X + Q = 0"
	}
	// K = R^-1 (B^T X + N^T)
	BtX := mulT(B, X)
	if N != nil {
		BtX.Add(BtX, mat.DenseCopyOf(N.T()))
	}
	sol.K = mul(Ri, BtX)
	// Residual with the original data: A^T X + X A - K^T R K + Q.
	var res, t1 mat.Dense
	t1.Mul(A.T(), X)
	res.Mul(X, A)
	res.Add(&res, &t1)
	KtRK := mul(mulT(sol.K, R), sol.K)
	res.Sub(&res, KtRK)
	res.Add(&res, Q)
	sol.Residual = mat.Norm(&res, 2) / (2*mat.Norm(A, 2)*mat.Norm(X, 2) + mat.Norm(KtRK, 2) + mat.Norm(Q, 2) + tinyNorm)
	closedLoop(sol, A, B, false)
	refineRiccati(sol, A, B, Q, R, N, false)
	return sol, nil
}

// riccatiGain returns K and the residual of X for the data (see CARE and
// DARE for the equations and the residual's scaling).
func riccatiGain(X, A, B, Q, R, N *mat.Dense, sampled bool) (*mat.Dense, float64, error) {
	BtX := mulT(B, X)
	if !sampled {
		rhs := mat.DenseCopyOf(BtX)
		if N != nil {
			rhs.Add(rhs, mat.DenseCopyOf(N.T()))
		}
		var K mat.Dense
		if err := K.Solve(R, rhs); err != nil {
			return nil, 0, err
		}
		var res, t1 mat.Dense
		t1.Mul(A.T(), X)
		res.Mul(X, A)
		res.Add(&res, &t1)
		KtRK := mul(mulT(&K, R), &K)
		res.Sub(&res, KtRK)
		res.Add(&res, Q)
		return &K, mat.Norm(&res, 2) / (2*mat.Norm(A, 2)*mat.Norm(X, 2) + mat.Norm(KtRK, 2) + mat.Norm(Q, 2) + tinyNorm), nil
	}
	Rb := mat.DenseCopyOf(R)
	Rb.Add(Rb, mul(BtX, B))
	rhs := mul(BtX, A)
	if N != nil {
		rhs.Add(rhs, mat.DenseCopyOf(N.T()))
	}
	var K mat.Dense
	if err := K.Solve(Rb, rhs); err != nil {
		return nil, 0, err
	}
	var res mat.Dense
	res.Mul(mulT(A, X), A)
	res.Sub(&res, X)
	corr := mulT(rhs, &K)
	res.Sub(&res, corr)
	res.Add(&res, Q)
	na := mat.Norm(A, 2)
	return &K, mat.Norm(&res, 2) / (na*na*mat.Norm(X, 2) + mat.Norm(X, 2) + mat.Norm(corr, 2) + mat.Norm(Q, 2) + tinyNorm), nil
}

// refineRiccati improves a stabilizing solution by Newton's method
// (Kleinman 1968, "On an iterative technique for Riccati equation
// computations", IEEE TAC 13(1); sampled: Hewer 1971, IEEE TAC 16(4)):
// with K from the current X and Ac = A - B K, the next X solves
//
//	Ac^T X + X Ac + Q - N K - K^T N^T + K^T R K = 0   (sampled: Ac^T X Ac - X + ... = 0)
//
// a Lyapunov equation (Bartels & Stewart). Steps are taken while the
// residual falls by at least half and the closed loop stays stable, at
// most 6; the method notes how many were kept. Near the end of its
// accuracy the Schur method's X has a residual well above rounding when
// U1 is ill-conditioned; one or two steps bring it down.
func refineRiccati(sol *RiccatiSolution, A, B, Q, R, N *mat.Dense, sampled bool) {
	if !sol.Stable || sol.Residual < 1e-14 {
		return
	}
	kept := 0
	for it := 0; it < 6 && sol.Residual >= 1e-15; it++ {
		K := sol.K
		Ac := mat.DenseCopyOf(A)
		Ac.Sub(Ac, mul(B, K))
		Qn := mat.DenseCopyOf(Q)
		Qn.Add(Qn, mul(mulT(K, R), K))
		if N != nil {
			NK := mul(N, K)
			Qn.Sub(Qn, NK)
			Qn.Sub(Qn, mat.DenseCopyOf(NK.T()))
		}
		symmetrize(Qn)
		ly, err := LyapunovEq(mat.DenseCopyOf(Ac.T()), Qn, sampled)
		if err != nil || ly.Singular {
			break
		}
		Kn, res, err := riccatiGain(ly.X, A, B, Q, R, N, sampled)
		if err != nil || !(res < sol.Residual/2) {
			break
		}
		trial := &RiccatiSolution{K: Kn}
		closedLoop(trial, A, B, sampled)
		if !trial.Stable {
			break
		}
		sol.X, sol.K, sol.Residual, sol.ClosedLoop = ly.X, Kn, res, trial.ClosedLoop
		kept++
	}
	if kept > 0 {
		sol.Method += fmt.Sprintf("; refined by %d Newton step%s (%s)", kept, map[bool]string{true: "", false: "s"}[kept == 1], map[bool]string{true: "Hewer 1971", false: "Kleinman 1968"}[sampled])
	}
}

// subspaceSolution returns X = U2 U1^-1 from the first n columns of Z
// (2n x 2n), symmetrized, with the condition number of U1.
func subspaceSolution(Z *mat.Dense, n int) (*mat.Dense, float64, error) {
	U1 := mat.DenseCopyOf(Z.Slice(0, n, 0, n))
	U2 := mat.DenseCopyOf(Z.Slice(n, 2*n, 0, n))
	var lu mat.LU
	lu.Factorize(U1)
	cond := lu.Cond()
	if math.IsInf(cond, 0) || cond > 1/(2.2e-16) {
		return nil, cond, errors.New("no stabilizing solution: the stable invariant subspace is not a graph (U1 singular); check that every unstable mode is reachable by the inputs")
	}
	// X U1 = U2, i.e. U1^T X^T = U2^T.
	var Xt mat.Dense
	if err := lu.SolveTo(&Xt, true, mat.DenseCopyOf(U2.T())); err != nil {
		return nil, cond, err
	}
	X := mat.DenseCopyOf(Xt.T())
	symmetrize(X)
	return X, cond, nil
}

func closedLoop(sol *RiccatiSolution, A, B *mat.Dense, sampled bool) {
	Acl := mat.DenseCopyOf(A)
	Acl.Sub(Acl, mul(B, sol.K))
	var eig mat.Eigen
	if eig.Factorize(Acl, mat.EigenNone) {
		sol.ClosedLoop = eig.Values(nil)
	}
	sol.Stable = len(sol.ClosedLoop) > 0
	for _, v := range sol.ClosedLoop {
		if (sampled && cmplx.Abs(v) >= 1) || (!sampled && real(v) >= 0) {
			sol.Stable = false
		}
	}
	sol.Sampled = sampled
}

// DARE solves the sampled algebraic Riccati equation. When Ã is well
// conditioned (||Ã^-1||_F times the largest of ||Ã||_F, ||G||_F and
// ||Q̃||_F below 1e6) it uses the Schur method of Laub
// (1979) on the symplectic matrix
//
//	Z = [[Ã + G Ã^-T Q̃, -G Ã^-T], [-Ã^-T Q̃, Ã^-T]],
//
// whose n eigenvalues inside the unit circle span [U1; U2] with
// X = U2 U1^-1; otherwise (a delay or other state with a zero or near-zero
// eigenvalue) the structure-preserving doubling algorithm of Chu, Fan, Lin
// & Wang (2004, Int. J. Control 77(8); from memory), which needs no inverse
// of A: with W = I + G_k H_k,
// A_{k+1} = A_k W^-1 A_k, G_{k+1} = G_k + A_k W^-1 G_k A_k^T,
// H_{k+1} = H_k + A_k^T H_k W^-1 A_k, and H_k -> X quadratically; it stops
// when the step is below 1e-15 of X (at most 100 steps).
func DARE(A, B, Q, R, N *mat.Dense) (*RiccatiSolution, error) {
	At, G, Qt, _, err := riccatiData(A, B, Q, R, N)
	if err != nil {
		return nil, err
	}
	n, _ := A.Dims()
	var X *mat.Dense
	sol := &RiccatiSolution{Equation: "A^T X A - X - (A^T X B + N) (R + B^T X B)^-1 (B^T X A + N^T) + Q = 0", CondU1: math.NaN()}
	if N == nil {
		sol.Equation = "A^T X A - X - A^T X B (R + B^T X B)^-1 B^T X A + Q = 0"
	}
	var lu mat.LU
	lu.Factorize(At)
	var AiT mat.Dense // Ã^-T
	useSchur := false
	if err := lu.SolveTo(&AiT, true, identity(n)); err == nil {
		// Ã^-1 measured against the size of the data: a large ratio
		// means an eigenvalue of Z near 0 and its reciprocal near inf.
		scale := math.Max(mat.Norm(At, 2), math.Max(mat.Norm(G, 2), mat.Norm(Qt, 2)))
		useSchur = mat.Norm(&AiT, 2)*scale < 1e6
	}
	if useSchur {
		Z11 := mat.DenseCopyOf(At)
		Z11.Add(Z11, mul(mul(G, &AiT), Qt))
		Z12 := mul(G, &AiT)
		Z12.Scale(-1, Z12)
		Z21 := mul(&AiT, Qt)
		Z21.Scale(-1, Z21)
		Z := blocks([]int{n, n}, []int{n, n}, [][]*mat.Dense{{Z11, Z12}, {Z21, &AiT}})
		sf, err := Schur(Z)
		if err != nil {
			return nil, err
		}
		for _, v := range sf.Values {
			if math.Abs(cmplx.Abs(v)-1) <= 1e3*2.2e-16*mat.Norm(Z, 2) {
				return nil, fmt.Errorf("no stabilizing solution: the symplectic matrix has an eigenvalue on the unit circle (%s), so a mode on the circle cannot be moved or is not weighted; check that every unstable mode is reachable by the inputs and seen by the weight Q", fmtComplex(v))
			}
		}
		k, err := sf.Reorder(func(v complex128) bool { return cmplx.Abs(v) < 1 })
		if err != nil {
			return nil, err
		}
		if k != n {
			return nil, fmt.Errorf("no stabilizing solution: the symplectic matrix has %d eigenvalues inside the unit circle, not %d", k, n)
		}
		if X, sol.CondU1, err = subspaceSolution(sf.Z, n); err != nil {
			return nil, err
		}
		sol.Method = "Schur method on the symplectic matrix (Laub 1979)"
	} else {
		Ak, Gk, Hk := mat.DenseCopyOf(At), mat.DenseCopyOf(G), mat.DenseCopyOf(Qt)
		conv := false
		for it := 0; it < 100; it++ {
			W := identity(n)
			W.Add(W, mul(Gk, Hk))
			var wl mat.LU
			wl.Factorize(W)
			if c := wl.Cond(); math.IsInf(c, 0) || c > 1e14 {
				return nil, errors.New("no stabilizing solution: the doubling iteration met a singular step; check that every unstable mode is reachable by the inputs and seen by the weight Q")
			}
			var WiA, WiG mat.Dense // W^-1 A_k, W^-1 G_k
			_ = wl.SolveTo(&WiA, false, Ak)
			_ = wl.SolveTo(&WiG, false, Gk)
			An := mul(Ak, &WiA)
			Gn := mat.DenseCopyOf(Gk)
			Gn.Add(Gn, mul(mul(Ak, &WiG), mat.DenseCopyOf(Ak.T())))
			Hn := mat.DenseCopyOf(Hk)
			Hn.Add(Hn, mul(mulT(Ak, Hk), &WiA))
			var d mat.Dense
			d.Sub(Hn, Hk)
			step := mat.Norm(&d, 2)
			Ak, Gk, Hk = An, Gn, Hn
			symmetrize(Gk)
			symmetrize(Hk)
			if step <= 1e-15*mat.Norm(Hk, 2) {
				conv = true
				break
			}
		}
		if !conv {
			return nil, errors.New("no stabilizing solution: the doubling iteration did not converge in 100 steps; a mode on the unit circle is likely not reachable or not weighted")
		}
		X = Hk
		sol.Method = "structure-preserving doubling (Chu, Fan, Lin & Wang 2004), A being (nearly) singular"
	}
	sol.X = X
	// K = (R + B^T X B)^-1 (B^T X A + N^T)
	BtX := mulT(B, X)
	Rb := mat.DenseCopyOf(R)
	Rb.Add(Rb, mul(BtX, B))
	rhs := mul(BtX, A)
	if N != nil {
		rhs.Add(rhs, mat.DenseCopyOf(N.T()))
	}
	var K mat.Dense
	var rl mat.LU
	rl.Factorize(Rb)
	if err := rl.SolveTo(&K, false, rhs); err != nil {
		return nil, fmt.Errorf("R + B^T X B is singular: %w", err)
	}
	sol.K = &K
	// Residual: A^T X A - X - (B^T X A + N^T)^T K + Q.
	var res mat.Dense
	res.Mul(mulT(A, X), A)
	res.Sub(&res, X)
	corr := mulT(rhs, &K)
	res.Sub(&res, corr)
	res.Add(&res, Q)
	na := mat.Norm(A, 2)
	sol.Residual = mat.Norm(&res, 2) / (na*na*mat.Norm(X, 2) + mat.Norm(X, 2) + mat.Norm(corr, 2) + mat.Norm(Q, 2) + tinyNorm)
	closedLoop(sol, A, B, true)
	refineRiccati(sol, A, B, Q, R, N, true)
	return sol, nil
}

// Regulator is a linear-quadratic state-feedback design u = -K x for
// the cost integral (sum, when sampled) of x^T Q x + u^T R u + 2 x^T N u.
type Regulator struct {
	System     *System
	Q, R, N    *mat.Dense
	K          *mat.Dense
	Riccati    *RiccatiSolution
	ClosedLoop *System // x' = (A - B K) x + B v, y = (C - D K) x + D v
	Modes      *ModeTable
}

// LQ designs the regulator of g (Kalman 1960) from the stabilizing
// solution of the Riccati equation (CARE or DARE by the sample time).
func LQ(g *System, Q, R, N *mat.Dense) (*Regulator, error) {
	if g.N() == 0 || g.M() == 0 {
		return nil, errors.New("a regulator needs a system with states and inputs")
	}
	var sol *RiccatiSolution
	var err error
	if g.Sampled() {
		sol, err = DARE(g.A, g.B, Q, R, N)
	} else {
		sol, err = CARE(g.A, g.B, Q, R, N)
	}
	if err != nil {
		return nil, err
	}
	reg := &Regulator{System: g, Q: Q, R: R, N: N, K: sol.K, Riccati: sol}
	Acl := mat.DenseCopyOf(g.A)
	Acl.Sub(Acl, mul(g.B, sol.K))
	var Ccl *mat.Dense
	if g.P() > 0 {
		Ccl = mat.DenseCopyOf(g.C)
		Ccl.Sub(Ccl, mul(g.D, sol.K))
	}
	cl, err := NewSystem(g.N(), g.M(), g.P(), Acl, g.B, Ccl, g.D, g.Ts)
	if err != nil {
		return nil, err
	}
	cl.StateNames, cl.InputNames, cl.OutputNames = g.StateNames, g.InputNames, g.OutputNames
	reg.ClosedLoop = cl
	if reg.Modes, err = Modes(cl); err != nil {
		return nil, err
	}
	return reg, nil
}

// Estimator is a Kalman state estimator for x' = A x + B (u + w),
// y = C x + D u + v with white noises w (intensity W) and v (intensity V):
// continuous x^' = A x^ + B u + L (y - C x^ - D u); sampled, the one-step
// predictor x^[k+1] = A x^[k] + B u[k] + L (y[k] - C x^[k] - D u[k]).
type Estimator struct {
	System  *System
	W, V    *mat.Dense
	L       *mat.Dense // n x p
	P       *mat.Dense // steady-state error covariance (sampled: of the prediction)
	Riccati *RiccatiSolution
	// Modes are those of the estimation error, eig(A - L C) (of the
	// system e' = (A - L C) e + L y, seen through C).
	Modes *ModeTable
}

// Kalman designs the steady-state estimator of g (Kalman & Bucy 1961;
// Kalman 1960) from the dual Riccati equation: A^T, C^T, B W B^T, V.
func Kalman(g *System, W, V *mat.Dense) (*Estimator, error) {
	if g.N() == 0 || g.P() == 0 {
		return nil, errors.New("an estimator needs a system with states and outputs")
	}
	if r, c := W.Dims(); r != g.M() || c != g.M() {
		return nil, &ShapeError{What: "W must be square with a row per input (the noise enters where the inputs do)", Got: Shape(W), Other: fmt.Sprintf("%dx%d expected", g.M(), g.M())}
	}
	At := mat.DenseCopyOf(g.A.T())
	Ct := mat.DenseCopyOf(g.C.T())
	Qn := mul(mul(g.B, W), mat.DenseCopyOf(g.B.T()))
	symmetrize(Qn)
	var sol *RiccatiSolution
	var err error
	if g.Sampled() {
		sol, err = DARE(At, Ct, Qn, V, nil)
	} else {
		sol, err = CARE(At, Ct, Qn, V, nil)
	}
	if err != nil {
		return nil, err
	}
	sol.Equation = dualEquation(sol.Equation)
	L := mat.DenseCopyOf(sol.K.T())
	est := &Estimator{System: g, W: W, V: V, L: L, P: sol.X, Riccati: sol}
	Ae := mat.DenseCopyOf(g.A)
	Ae.Sub(Ae, mul(L, g.C))
	// The error system, driven by the measurements through L and seen at
	// the outputs, so that the mode table's reach and visibility columns
	// say how the measurements move each error mode.
	es, err := NewSystem(g.N(), g.P(), g.P(), Ae, L, g.C, nil, g.Ts)
	if err != nil {
		return nil, err
	}
	es.StateNames, es.InputNames, es.OutputNames = g.StateNames, g.OutputNames, g.OutputNames
	if est.Modes, err = Modes(es); err != nil {
		return nil, err
	}
	return est, nil
}

func dualEquation(s string) string {
	if s == "A^T X + X A - X B R^-1 B^T X + Q = 0" {
		return "A P + P A^T - P C^T V^-1 C P + B W B^T = 0"
	}
	return "A P A^T - P - A P C^T (V + C P C^T)^-1 C P A^T + B W B^T = 0"
}
