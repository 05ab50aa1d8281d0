package lsys

import (
	"errors"
	"fmt"
	"math"

	"gonum.org/v1/gonum/mat"
)

// The Lyapunov and Sylvester equations, continuous and sampled, by the
// method of Bartels & Stewart (1972, "Solution of the matrix equation
// AX + XB = C", Comm. ACM 15(9)): both coefficients are brought to real
// Schur form by orthogonal transformations, the transformed equation is
// solved by block back substitution over the 1x1 and 2x2 diagonal blocks,
// and the solution is transformed back. The sampled (Stein) form uses the
// same reduction with the column recurrence of Barraud (1977, "A numerical
// algorithm to solve A^T X A - X = Q", IEEE Trans. Autom. Control 22(5)),
// which keeps the cost at O(n^3). Each block system (at most 4x4, the
// Kronecker form of a 2x2 by 2x2 block equation) is solved by Gaussian
// elimination with complete pivoting, as LAPACK's Dlasy2 does; a pivot
// below u * (its block's size) means the equation is (nearly) singular and
// is reported, never hidden.

// LyapunovSolution is the solution of a Lyapunov or Sylvester equation.
type LyapunovSolution struct {
	X *mat.Dense
	// Equation says which equation was solved, e.g. "A X + X A^T + Q = 0".
	Equation string
	Sampled  bool
	// Residual is ||residual||_F / (sum of the Frobenius norms of the terms),
	// the backward error of the computed X; a value near the unit roundoff
	// 1.1e-16 (times a modest factor) is as good as the data allow.
	Residual float64
	// Singular is true when a block system was (nearly) singular: A has
	// eigenvalues l1, l2 with l1 + l2 = 0 (continuous) or l1 l2 = 1
	// (sampled); X is then not to be trusted.
	Singular bool
}

// smallBlockSolve solves M y = r for n <= 4 by Gaussian elimination with
// complete pivoting. A pivot below tiny is replaced by tiny (as Dlasy2
// does) and reported by ok == false.
func smallBlockSolve(M []float64, r []float64, n int, tiny float64) (y []float64, ok bool) {
	ok = true
	perm := make([]int, n)
	for i := range perm {
		perm[i] = i
	}
	a := make([]float64, n*n)
	copy(a, M)
	b := make([]float64, n)
	copy(b, r)
	for k := 0; k < n; k++ {
		pi, pj, pv := k, k, -1.0
		for i := k; i < n; i++ {
			for j := k; j < n; j++ {
				if v := math.Abs(a[i*n+j]); v > pv {
					pi, pj, pv = i, j, v
				}
			}
		}
		if pi != k {
			for j := 0; j < n; j++ {
				a[k*n+j], a[pi*n+j] = a[pi*n+j], a[k*n+j]
			}
			b[k], b[pi] = b[pi], b[k]
		}
		if pj != k {
			for i := 0; i < n; i++ {
				a[i*n+k], a[i*n+pj] = a[i*n+pj], a[i*n+k]
			}
			perm[k], perm[pj] = perm[pj], perm[k]
		}
		if math.Abs(a[k*n+k]) < tiny {
			a[k*n+k] = tiny
			ok = false
		}
		for i := k + 1; i < n; i++ {
			f := a[i*n+k] / a[k*n+k]
			if f == 0 {
				continue
			}
			for j := k; j < n; j++ {
				a[i*n+j] -= f * a[k*n+j]
			}
			b[i] -= f * b[k]
		}
	}
	z := make([]float64, n)
	for k := n - 1; k >= 0; k-- {
		v := b[k]
		for j := k + 1; j < n; j++ {
			v -= a[k*n+j] * z[j]
		}
		z[k] = v / a[k*n+k]
	}
	y = make([]float64, n)
	for k := 0; k < n; k++ {
		y[perm[k]] = z[k]
	}
	return y, ok
}

// quasiBlocks returns the start and size of each diagonal block of an upper
// quasi-triangular matrix (row-major data, stride s).
func quasiBlocks(t []float64, n, s int) (start, size []int) {
	for i := 0; i < n; {
		k := 1
		if i+1 < n && t[(i+1)*s+i] != 0 {
			k = 2
		}
		start = append(start, i)
		size = append(size, k)
		i += k
	}
	return start, size
}

// triSylvester solves, for upper quasi-triangular S (p x p) and R (q x q),
//
//	S Y + Y op(R) = F          (sampled == false)
//	S Y op(R) - Y = F          (sampled == true)
//
// with op(R) = R^T when trans, else R. It returns Y and whether every block
// system was regular.
func triSylvester(S, R, F *mat.Dense, trans, sampled bool) (*mat.Dense, bool) {
	p, _ := S.Dims()
	q, _ := R.Dims()
	sr, rr := S.RawMatrix(), R.RawMatrix()
	sd, ss, rd, rs := sr.Data, sr.Stride, rr.Data, rr.Stride
	Y := mat.NewDense(p, q, nil)
	yr := Y.RawMatrix()
	yd, ys := yr.Data, yr.Stride
	fr := F.RawMatrix()
	// opR(j, l) is entry (j, l) of op(R).
	opR := func(j, l int) float64 {
		if trans {
			return rd[l*rs+j]
		}
		return rd[j*rs+l]
	}
	kst, ksz := quasiBlocks(sd, p, ss)
	lst, lsz := quasiBlocks(rd, q, rs)
	// Scale for the pivot threshold: the size of the coefficients.
	norm := 0.0
	for _, v := range sd[:max(0, (p-1)*ss+p)] {
		norm = math.Max(norm, math.Abs(v))
	}
	for _, v := range rd[:max(0, (q-1)*rs+q)] {
		norm = math.Max(norm, math.Abs(v))
	}
	if sampled {
		norm = math.Max(norm*norm, 1)
	}
	tiny := math.Max(norm*2.2e-16, math.SmallestNonzeroFloat64*1e10)
	ok := true
	order := make([]int, len(lst))
	for i := range order {
		order[i] = i
		if trans {
			order[i] = len(lst) - 1 - i
		}
	}
	done := make([]bool, q) // columns of Y already solved
	G := make([]float64, p*2)
	V := make([]float64, p*2) // rows of (Y op(R)) in column block l
	for _, lb := range order {
		l0, n2 := lst[lb], lsz[lb]
		if sampled {
			// G = sum over solved columns j of Y(:, j) op(R)(j, l-block).
			for i := 0; i < p; i++ {
				for b := 0; b < n2; b++ {
					v := 0.0
					for j := 0; j < q; j++ {
						if done[j] {
							v += yd[i*ys+j] * opR(j, l0+b)
						}
					}
					G[i*2+b] = v
				}
			}
		}
		for kb := len(kst) - 1; kb >= 0; kb-- {
			k0, n1 := kst[kb], ksz[kb]
			rhs := make([]float64, n1*n2)
			for a := 0; a < n1; a++ {
				for b := 0; b < n2; b++ {
					v := fr.Data[(k0+a)*fr.Stride+l0+b]
					if sampled {
						for c := 0; c < n1; c++ {
							v -= sd[(k0+a)*ss+k0+c] * G[(k0+c)*2+b]
						}
						for i := k0 + n1; i < p; i++ {
							v -= sd[(k0+a)*ss+i] * V[i*2+b]
						}
					} else {
						for i := k0 + n1; i < p; i++ {
							v -= sd[(k0+a)*ss+i] * yd[i*ys+l0+b]
						}
						for j := 0; j < q; j++ {
							if done[j] {
								v -= yd[(k0+a)*ys+j] * opR(j, l0+b)
							}
						}
					}
					rhs[a*n2+b] = v
				}
			}
			// Kronecker form: unknown (c, d) at c*n2+d.
			M := make([]float64, (n1*n2)*(n1*n2))
			for a := 0; a < n1; a++ {
				for b := 0; b < n2; b++ {
					row := (a*n2 + b) * n1 * n2
					for c := 0; c < n1; c++ {
						for d := 0; d < n2; d++ {
							s := sd[(k0+a)*ss+k0+c]
							r := opR(l0+d, l0+b)
							var v float64
							if sampled {
								v = s * r
								if a == c && b == d {
									v--
								}
							} else {
								if b == d {
									v += s
								}
								if a == c {
									v += r
								}
							}
							M[row+c*n2+d] = v
						}
					}
				}
			}
			y, good := smallBlockSolve(M, rhs, n1*n2, tiny)
			ok = ok && good
			for a := 0; a < n1; a++ {
				for b := 0; b < n2; b++ {
					yd[(k0+a)*ys+l0+b] = y[a*n2+b]
				}
			}
			if sampled {
				for a := 0; a < n1; a++ {
					for b := 0; b < n2; b++ {
						v := G[(k0+a)*2+b]
						for d := 0; d < n2; d++ {
							v += y[a*n2+d] * opR(l0+d, l0+b)
						}
						V[(k0+a)*2+b] = v
					}
				}
			}
		}
		for b := 0; b < n2; b++ {
			done[l0+b] = true
		}
	}
	return Y, ok
}

// LyapunovEq solves A X + X A^T + Q = 0 (sampled: A X A^T - X + Q = 0)
// by Bartels & Stewart (see the top of this file). Q need not be
// symmetric; when it is, X is returned exactly symmetric (the mean of X
// and X^T, which only removes rounding). The equation has a unique
// solution unless A has eigenvalues l1, l2 with l1 + l2 = 0 (sampled:
// l1 l2 = 1), which Singular reports.
func LyapunovEq(A, Q *mat.Dense, sampled bool) (*LyapunovSolution, error) {
	if A == nil {
		return nil, errors.New("A is empty")
	}
	n, c := A.Dims()
	if n != c {
		return nil, &ShapeError{What: "A must be square", Got: Shape(A), Other: fmt.Sprintf("%dx%d", n, n)}
	}
	if qr, qc := Q.Dims(); qr != n || qc != n {
		return nil, &ShapeError{What: "Q must be the size of A", Got: Shape(Q), Other: Shape(A)}
	}
	if err := CheckFinite("A", A); err != nil {
		return nil, err
	}
	if err := CheckFinite("Q", Q); err != nil {
		return nil, err
	}
	sf, err := Schur(A)
	if err != nil {
		return nil, err
	}
	U, T := sf.Z, sf.T
	F := mulT(U, mul(Q, U))
	F.Scale(-1, F)
	Y, ok := triSylvester(T, T, F, true, sampled)
	X := mulBT(mul(U, Y), U)
	if mat.EqualApprox(Q, Q.T(), 0) {
		symmetrize(X)
	}
	sol := &LyapunovSolution{X: X, Sampled: sampled, Singular: !ok}
	var Rs, t1 mat.Dense
	if sampled {
		sol.Equation = "A X A^T - X + Q = 0"
		t1.Mul(A, X)
		Rs.Mul(&t1, A.T())
		Rs.Sub(&Rs, X)
		Rs.Add(&Rs, Q)
		sol.Residual = mat.Norm(&Rs, 2) / (mat.Norm(A, 2)*mat.Norm(A, 2)*mat.Norm(X, 2) + mat.Norm(X, 2) + mat.Norm(Q, 2) + tinyNorm)
	} else {
		sol.Equation = "A X + X A^T + Q = 0"
		t1.Mul(A, X)
		Rs.Mul(X, A.T())
		Rs.Add(&Rs, &t1)
		Rs.Add(&Rs, Q)
		sol.Residual = mat.Norm(&Rs, 2) / (2*mat.Norm(A, 2)*mat.Norm(X, 2) + mat.Norm(Q, 2) + tinyNorm)
	}
	return sol, nil
}

const tinyNorm = 1e-300

// SylvesterEq solves A X + X B = C (sampled: A X B - X = C) by Bartels &
// Stewart on the real Schur forms of A and B. It is singular when A and -B
// (sampled: A and the reciprocals of B's eigenvalues) share an eigenvalue.
func SylvesterEq(A, B, C *mat.Dense, sampled bool) (*LyapunovSolution, error) {
	if A == nil || B == nil || C == nil {
		return nil, errors.New("A, B and C must not be empty")
	}
	p, pc := A.Dims()
	q, qc := B.Dims()
	if p != pc {
		return nil, &ShapeError{What: "A must be square", Got: Shape(A), Other: fmt.Sprintf("%dx%d", p, p)}
	}
	if q != qc {
		return nil, &ShapeError{What: "B must be square", Got: Shape(B), Other: fmt.Sprintf("%dx%d", q, q)}
	}
	if cr, cc := C.Dims(); cr != p || cc != q {
		return nil, &ShapeError{What: "C must have the rows of A and the columns of B", Got: Shape(C), Other: fmt.Sprintf("%dx%d expected", p, q)}
	}
	for _, m := range []struct {
		n string
		a *mat.Dense
	}{{"A", A}, {"B", B}, {"C", C}} {
		if err := CheckFinite(m.n, m.a); err != nil {
			return nil, err
		}
	}
	sa, err := Schur(A)
	if err != nil {
		return nil, err
	}
	sb, err := Schur(B)
	if err != nil {
		return nil, err
	}
	F := mulT(sa.Z, mul(C, sb.Z))
	Y, ok := triSylvester(sa.T, sb.T, F, false, sampled)
	X := mulBT(mul(sa.Z, Y), sb.Z)
	sol := &LyapunovSolution{X: X, Sampled: sampled, Singular: !ok}
	var Rs, t1 mat.Dense
	if sampled {
		sol.Equation = "A X B - X = C"
		t1.Mul(A, X)
		Rs.Mul(&t1, B)
		Rs.Sub(&Rs, X)
		Rs.Sub(&Rs, C)
		sol.Residual = mat.Norm(&Rs, 2) / (mat.Norm(A, 2)*mat.Norm(B, 2)*mat.Norm(X, 2) + mat.Norm(X, 2) + mat.Norm(C, 2) + tinyNorm)
	} else {
		sol.Equation = "A X + X B = C"
		t1.Mul(A, X)
		Rs.Mul(X, B)
		Rs.Add(&Rs, &t1)
		Rs.Sub(&Rs, C)
		sol.Residual = mat.Norm(&Rs, 2) / ((mat.Norm(A, 2)+mat.Norm(B, 2))*mat.Norm(X, 2) + mat.Norm(C, 2) + tinyNorm)
	}
	return sol, nil
}

func symmetrize(X *mat.Dense) {
	n, _ := X.Dims()
	for i := 0; i < n; i++ {
		for j := i + 1; j < n; j++ {
			v := (X.At(i, j) + X.At(j, i)) / 2
			X.Set(i, j, v)
			X.Set(j, i, v)
		}
	}
}

// psdFactor returns L (n x n) with X = L L^T for a symmetric positive
// semidefinite X, from its symmetric eigendecomposition (gonum's Dsyev:
// tridiagonal QR). Eigenvalues below zero are rounding residue of
// a semidefinite solution and are set to 0; the most negative one,
// relative to the largest, is returned so that callers can report an
// indefinite X (which means the data were not what the equation assumes).
func psdFactor(X *mat.Dense) (*mat.Dense, float64, error) {
	n, _ := X.Dims()
	var es mat.EigenSym
	sym := mat.NewSymDense(n, nil)
	for i := 0; i < n; i++ {
		for j := i; j < n; j++ {
			sym.SetSym(i, j, (X.At(i, j)+X.At(j, i))/2)
		}
	}
	if !es.Factorize(sym, true) {
		return nil, 0, errors.New("the symmetric eigenvalue iteration did not converge")
	}
	vals := es.Values(nil)
	var V mat.Dense
	es.VectorsTo(&V)
	top := 0.0
	for _, v := range vals {
		top = math.Max(top, math.Abs(v))
	}
	neg := 0.0
	L := mat.NewDense(n, n, nil)
	for j, v := range vals {
		if v < 0 {
			if top > 0 {
				neg = math.Max(neg, -v/top)
			}
			v = 0
		}
		s := math.Sqrt(v)
		for i := 0; i < n; i++ {
			L.Set(i, j, V.At(i, j)*s)
		}
	}
	return L, neg, nil
}

// mulT is a^T b; mulBT is a b^T.
func mulT(a, b *mat.Dense) *mat.Dense {
	var c mat.Dense
	c.Mul(a.T(), b)
	return &c
}

func mulBT(a, b *mat.Dense) *mat.Dense {
	var c mat.Dense
	c.Mul(a, b.T())
	return &c
}
