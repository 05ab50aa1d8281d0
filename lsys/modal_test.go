package lsys

import (
	"math"
	"math/cmplx"
	"math/rand/v2"
	"strings"
	"testing"

	"gonum.org/v1/gonum/mat"
)

func TestModalMassSpringDamper(t *testing.T) {
	// wn = 2, zeta = 0.2 (Inman 2014, ch. 1): the modal block is
	// [[sigma, omega], [-omega, sigma]] with sigma = -zeta wn = -0.4,
	// omega = wn sqrt(1 - zeta^2).
	s := massSpringDamper(t, 2, 1.6, 8)
	mf, err := Modal(s)
	if err != nil {
		t.Fatal(err)
	}
	if mf.BlockDiagonal || len(mf.Blocks) != 1 || mf.Blocks[0].Kind != "pair" {
		t.Fatalf("%+v", mf)
	}
	sig, om := -0.4, 2*math.Sqrt(1-0.04)
	want := mat.NewDense(2, 2, []float64{sig, om, -om, sig})
	if d := maxRelDiff(mf.System.A, want); d > 1e-14 {
		t.Errorf("modal A = %v, relative error %.3g", mat.Formatted(mf.System.A), d)
	}
}

// modalCheck verifies, for a modal form, the facts of the trade: the
// eigenvectors map to unit vectors (e_k, or e_k + j e_{k+1} for a pair, up
// to scale), and the transfer function is unchanged.
func modalCheck(t *testing.T, s *System, mf *ModalForm) {
	t.Helper()
	es, _ := Eigen(s.A)
	n := s.N()
	for k, lam := range es.Values {
		if imag(lam) < 0 {
			continue
		}
		z := make([]complex128, n)
		for i := 0; i < n; i++ {
			for j := 0; j < n; j++ {
				z[i] += complex(mf.T.At(i, j), 0) * es.Right[k][j]
			}
		}
		// Find the block whose eigenvalue matches.
		for _, b := range mf.Blocks {
			if cmplx.Abs(b.Values[0]-lam) > 1e-8*math.Max(1, cmplx.Abs(lam)) {
				continue
			}
			var in, out float64
			for i := 0; i < n; i++ {
				if i >= b.Start && i < b.Start+b.Size {
					in = math.Hypot(in, cmplx.Abs(z[i]))
				} else {
					out = math.Hypot(out, cmplx.Abs(z[i]))
				}
			}
			if out > 1e-10*in {
				t.Errorf("eigenvector of %v leaks out of its modal block: %.3g vs %.3g", lam, out, in)
			}
			if b.Kind == "pair" && cmplx.Abs(z[b.Start+1]-1i*z[b.Start]) > 1e-10*in {
				t.Errorf("pair %v: modal eigenvector %v, want proportional to (1, j)", lam, z[b.Start:b.Start+2])
			}
		}
	}
	for _, s0 := range []complex128{0.5i, 1 + 1i, 7i} {
		g1, g2 := freqResp(s, s0), freqResp(mf.System, s0)
		for i := range g1 {
			for j := range g1[i] {
				if cmplx.Abs(g1[i][j]-g2[i][j]) > 1e-9*math.Max(1, cmplx.Abs(g1[i][j])) {
					t.Errorf("G(%v) changed: %v vs %v", s0, g1[i][j], g2[i][j])
				}
			}
		}
	}
}

func TestModalUnreachableRowUnseenColumn(t *testing.T) {
	// A zero row of the modal B is a mode no input reaches; a zero column
	// of the modal C a mode no output sees (facts of the trade). Plant them
	// in diagonal coordinates and hide them by a random similarity.
	rng := rand.New(rand.NewPCG(3, 9))
	Am := mat.NewDense(5, 5, nil)
	Am.Set(0, 0, -1)
	Am.Set(1, 1, -0.3)
	Am.Set(1, 2, 4)
	Am.Set(2, 1, -4)
	Am.Set(2, 2, -0.3)
	Am.Set(3, 3, -7)
	Am.Set(4, 4, -20)
	Bm := mat.NewDense(5, 1, []float64{1, 0, 0, 2, 1})  // the pair is not reached
	Cm := mat.NewDense(1, 5, []float64{1, 1, -1, 0, 1}) // mode -7 is not seen
	s0, _ := FromMatrices(Am, Bm, Cm, nil, 0)
	S := randDense(rng, 5, 5)
	s, err := Transform(s0, S)
	if err != nil {
		t.Fatal(err)
	}
	mf, err := Modal(s)
	if err != nil {
		t.Fatal(err)
	}
	modalCheck(t, s, mf)
	nb := mat.Norm(mf.System.B, 2)
	for _, b := range mf.Blocks {
		rowNorm := 0.0
		for i := b.Start; i < b.Start+b.Size; i++ {
			rowNorm = math.Hypot(rowNorm, mf.System.B.At(i, 0))
		}
		colNorm := 0.0
		for j := b.Start; j < b.Start+b.Size; j++ {
			colNorm = math.Hypot(colNorm, mf.System.C.At(0, j))
		}
		lam := b.Values[0]
		unreached := math.Abs(real(lam)+0.3) < 1e-9
		unseen := math.Abs(real(lam)+7) < 1e-9
		if unreached != (rowNorm < 1e-12*nb) {
			t.Errorf("mode %v: modal B rows norm %.3g", lam, rowNorm)
		}
		if unseen != (colNorm < 1e-12*mat.Norm(mf.System.C, 2)) {
			t.Errorf("mode %v: modal C columns norm %.3g", lam, colNorm)
		}
	}
}

func TestModalDefectiveFallsBack(t *testing.T) {
	// A defective eigenvalue has no eigenvector basis (Golub & Wilkinson
	// 1976): the block-diagonal Schur form is used, and says so. The
	// cluster at -1 (a 2x2 Jordan block) must stay together; the others
	// decouple into 1x1 and 2x2 [[s, w], [-w, s]] blocks.
	J := mat.NewDense(5, 5, []float64{
		-1, 1, 0, 0, 0,
		0, -1, 0, 0, 0,
		0, 0, -2, 3, 0,
		0, 0, -3, -2, 0,
		0, 0, 0, 0, -5,
	})
	rng := rand.New(rand.NewPCG(5, 5))
	S := randDense(rng, 5, 5)
	s0, _ := FromMatrices(J, randDense(rng, 5, 2), randDense(rng, 2, 5), nil, 0)
	s, err := Transform(s0, S)
	if err != nil {
		t.Fatal(err)
	}
	mf, err := Modal(s)
	if err != nil {
		t.Fatal(err)
	}
	if !mf.BlockDiagonal || !strings.Contains(mf.Note, "defective") {
		t.Fatalf("note %q", mf.Note)
	}
	kinds := map[string]int{}
	for _, b := range mf.Blocks {
		kinds[b.Kind]++
	}
	if kinds["cluster"] != 1 || kinds["pair"] != 1 || kinds["real"] != 1 {
		t.Errorf("blocks %+v", mf.Blocks)
	}
	// Off-block entries vanish.
	A := mf.System.A
	inBlock := func(i, j int) bool {
		for _, b := range mf.Blocks {
			if i >= b.Start && i < b.Start+b.Size && j >= b.Start && j < b.Start+b.Size {
				return true
			}
		}
		return false
	}
	for i := 0; i < 5; i++ {
		for j := 0; j < 5; j++ {
			if !inBlock(i, j) && math.Abs(A.At(i, j)) > 1e-10*mat.Norm(A, 2) {
				t.Errorf("modal A[%d,%d] = %.3g outside the blocks", i, j, A.At(i, j))
			}
		}
	}
	for _, s0 := range []complex128{0.5i, 1 + 1i} {
		g1, g2 := freqResp(s, s0), freqResp(mf.System, s0)
		for i := range g1 {
			for j := range g1[i] {
				if cmplx.Abs(g1[i][j]-g2[i][j]) > 1e-9*math.Max(1, cmplx.Abs(g1[i][j])) {
					t.Errorf("G(%v) changed", s0)
				}
			}
		}
	}
}

func TestSylvesterQuasi(t *testing.T) {
	// Residual check of A X - X B = C (Bartels & Stewart 1972) for
	// quasi-triangular A and B with 2x2 blocks.
	A := mat.NewDense(3, 3, []float64{1, 2, 3, -2, 1, 4, 0, 0, 5})
	B := mat.NewDense(3, 3, []float64{-1, 0.5, 1, 0, -2, 3, 0, -1, -2})
	C := mat.NewDense(3, 3, []float64{1, 2, 3, 4, 5, 6, 7, 8, 9})
	X, ok := solveQuasiSylvester(A, B, C)
	if !ok {
		t.Fatal("not ok")
	}
	var R, t2 mat.Dense
	R.Mul(A, X)
	t2.Mul(X, B)
	R.Sub(&R, &t2)
	R.Sub(&R, C)
	if mat.Norm(&R, 2) > 1e-13 {
		t.Errorf("residual %.3g", mat.Norm(&R, 2))
	}
}

func TestModalExactBlocks(t *testing.T) {
	// The frame of TestZerosUnitsInvariant in t, kN, m (m = 20, roof 10,
	// k = 2e4, beta = 0.002). With the roof mass half a floor mass the
	// chain's natural frequencies are w_i^2 = (k/m)(2 - 2 cos((2i - 1) pi/6)),
	// i = 1, 2, 3 (closed form of the fixed-free uniform chain, seen as half
	// of a symmetric chain of 6 storeys), and stiffness-proportional damping
	// gives lambda = -beta w^2/2 +- j w sqrt(1 - (beta w/2)^2). The modal A
	// is block diagonal by construction: off-block entries must be exactly
	// 0 and the blocks [[sigma, omega], [-omega, sigma]] from the eigenvalues.
	f := frameModel(t, 20, 10, 2e4, 0.002)
	mf, err := Modal(f)
	if err != nil {
		t.Fatal(err)
	}
	if mf.BlockDiagonal || len(mf.Blocks) != 3 {
		t.Fatalf("blocks %v", mf.Blocks)
	}
	for i, b := range mf.Blocks {
		w2 := 1000 * (2 - 2*math.Cos(float64(2*i+1)*math.Pi/6))
		w := math.Sqrt(w2)
		sg, om := -0.002*w2/2, w*math.Sqrt(1-0.002*0.002*w2/4)
		k := b.Start
		A := mf.System.A
		if math.Abs(A.At(k, k)-sg) > 1e-12*w || math.Abs(A.At(k, k+1)-om) > 1e-12*w ||
			A.At(k+1, k) != -A.At(k, k+1) || A.At(k+1, k+1) != A.At(k, k) {
			t.Errorf("block %d: [[%v, %v], [%v, %v]], want sigma %v omega %v", i, A.At(k, k), A.At(k, k+1), A.At(k+1, k), A.At(k+1, k+1), sg, om)
		}
		for r := 0; r < 6; r++ {
			for c := 0; c < 6; c++ {
				if (r < k || r > k+1) && (c == k || c == k+1) && A.At(r, c) != 0 {
					t.Errorf("off-block entry A[%d,%d] = %v, want exactly 0", r, c, A.At(r, c))
				}
			}
		}
	}
	if mf.Residual <= 0 || mf.Residual > 1e-12 {
		t.Errorf("residual %v: want the rounding that was removed, between 0 and 1e-12", mf.Residual)
	}
}
