package lsys

import (
	"encoding/json"
	"math"
	"math/cmplx"
	"os"
	"path/filepath"
	"testing"

	"gonum.org/v1/gonum/mat"
)

// The reference data in testdata/structure_ref.json is written by
// tools/ref/structure_ref.py with numpy 1.24 / scipy 1.10 (Debian packages)
// as an independent implementation: eigenvalues (numpy.linalg.eigvals),
// real Schur form (scipy.linalg.schur), invariant zeros as finite
// generalized eigenvalues of the Rosenbrock pencil (scipy.linalg.eig),
// PBH rank losses (numpy SVD) and exp(A t) (scipy.linalg.expm).

type refSystem struct {
	Name            string        `json:"name"`
	Ts              float64       `json:"ts"`
	A, B, C, D      [][]float64   `json:"-"`
	RawA            [][]float64   `json:"A"`
	RawB            [][]float64   `json:"B"`
	RawC            [][]float64   `json:"C"`
	RawD            [][]float64   `json:"D"`
	Eigenvalues     [][2]float64  `json:"eigenvalues"`
	SchurValues     [][2]float64  `json:"schur_values"`
	StableDim       int           `json:"stable_dim"`
	StableProjector [][]float64   `json:"stable_projector"`
	Zeros           *[][2]float64 `json:"zeros"`
	Uncontrollable  [][2]float64  `json:"uncontrollable"`
	Unobservable    [][2]float64  `json:"unobservable"`
	ExpmT           float64       `json:"expm_t"`
	Expm            [][]float64   `json:"expm"`
}

func denseOf(rows [][]float64) *mat.Dense {
	if len(rows) == 0 || len(rows[0]) == 0 {
		return nil
	}
	d := mat.NewDense(len(rows), len(rows[0]), nil)
	for i, r := range rows {
		for j, v := range r {
			d.Set(i, j, v)
		}
	}
	return d
}

func complexList(v [][2]float64) []complex128 {
	out := make([]complex128, len(v))
	for i, x := range v {
		out[i] = complex(x[0], x[1])
	}
	return out
}

func loadRef(t *testing.T) []refSystem {
	t.Helper()
	raw, err := os.ReadFile(filepath.Join("testdata", "structure_ref.json"))
	if err != nil {
		t.Fatal(err)
	}
	var data struct {
		Systems []refSystem `json:"systems"`
	}
	if err := json.Unmarshal(raw, &data); err != nil {
		t.Fatal(err)
	}
	return data.Systems
}

// matchWorst pairs got with want (greedy nearest) and returns the largest
// error relative to max(1, |want|) after subtracting the per-value
// allowance allow(want) (negative when all within it).
func matchWorst(got, want []complex128) (worst float64, ok bool) {
	if len(got) != len(want) {
		return math.Inf(1), false
	}
	used := make([]bool, len(got))
	for _, w := range want {
		best, bi := math.Inf(1), -1
		for i, g := range got {
			if !used[i] {
				if d := cmplx.Abs(g - w); d < best {
					best, bi = d, i
				}
			}
		}
		used[bi] = true
		worst = math.Max(worst, best/math.Max(1, cmplx.Abs(w)))
	}
	return worst, true
}

// distinct merges values closer than tol (for comparing sets of modes
// where a defective eigenvalue may be listed once or split in two).
func distinct(v []complex128, tol float64) []complex128 {
	var out []complex128
	for _, x := range v {
		dup := false
		for _, y := range out {
			if cmplx.Abs(x-y) <= tol*math.Max(1, cmplx.Abs(y)) {
				dup = true
			}
		}
		if !dup {
			out = append(out, x)
		}
	}
	return out
}

func TestStructureAgainstReference(t *testing.T) {
	var worstEig, worstSchur, worstProj, worstZero, worstExp float64
	for _, r := range loadRef(t) {
		s, err := FromMatrices(denseOf(r.RawA), denseOf(r.RawB), denseOf(r.RawC), denseOf(r.RawD), r.Ts)
		if err != nil {
			t.Fatalf("%s: %v", r.Name, err)
		}
		normA := mat.Norm(s.A, 2)
		// A defective eigenvalue is only determined to about sqrt(u ||A||)
		// (Golub & Wilkinson 1976); such systems get that allowance.
		js, err := Jordan(s.A, 0, 0)
		if err != nil {
			t.Fatal(err)
		}
		defective := false
		for _, c := range js.Clusters {
			if c.Defective() {
				defective = true
			}
		}
		tolEig := 1e-10
		if defective {
			tolEig = 10 * math.Sqrt(dlamchE*normA)
		}
		poles, err := Poles(s)
		if err != nil {
			t.Fatal(err)
		}
		w, ok := matchWorst(poles, complexList(r.Eigenvalues))
		if !ok || w > tolEig {
			t.Errorf("%s: eigenvalues differ from the reference by %.3g (tol %.3g)", r.Name, w, tolEig)
		}
		if !defective {
			worstEig = math.Max(worstEig, w)
		}
		// Schur form: orthogonal, reproduces A, same block eigenvalues.
		sf, err := Schur(s.A)
		if err != nil {
			t.Fatal(err)
		}
		var R mat.Dense
		R.Mul(sf.Z, sf.T)
		R.Mul(&R, sf.Z.T())
		R.Sub(&R, s.A)
		if e := mat.Norm(&R, 2) / normA; e > 1e-13 {
			t.Errorf("%s: ||Z T Z' - A|| / ||A|| = %.3g", r.Name, e)
		}
		var blockVals []complex128
		for _, i := range schurBlocks(sf.T) {
			v := schurBlockValue(sf.T, i)
			blockVals = append(blockVals, v)
			if imag(v) != 0 {
				blockVals = append(blockVals, cmplx.Conj(v))
			}
		}
		w, ok = matchWorst(blockVals, complexList(r.SchurValues))
		if !ok || w > tolEig {
			t.Errorf("%s: Schur block eigenvalues differ by %.3g", r.Name, w)
		}
		if !defective {
			worstSchur = math.Max(worstSchur, w)
		}
		// Stable invariant subspace: the orthogonal projector is unique;
		// skipped when an eigenvalue sits on the stability boundary.
		nearBoundary := false
		for _, p := range poles {
			d := math.Abs(real(p))
			if r.Ts > 0 {
				d = math.Abs(cmplx.Abs(p) - 1)
			}
			if d < 1e-5*math.Max(1, normA) {
				nearBoundary = true
			}
		}
		if !nearBoundary {
			sub, err := Spectral(s, "stable")
			if err != nil {
				t.Fatal(err)
			}
			if sub.Dim != r.StableDim {
				t.Errorf("%s: stable subspace dimension %d, reference %d", r.Name, sub.Dim, r.StableDim)
			} else if sub.Dim > 0 {
				var P mat.Dense
				P.Mul(sub.Basis, sub.Basis.T())
				P.Sub(&P, denseOf(r.StableProjector))
				e := mat.Norm(&P, 2) / math.Sqrt(float64(sub.Dim))
				worstProj = math.Max(worstProj, e)
				if e > 1e-9 {
					t.Errorf("%s: stable projector differs by %.3g", r.Name, e)
				}
			}
		}
		// Invariant zeros of square systems.
		if r.Zeros != nil {
			zs, err := Zeros(s, 0)
			if err != nil {
				t.Fatal(err)
			}
			want := complexList(*r.Zeros)
			w, ok := matchWorst(zs.Invariant, want)
			tolZ := 1e-8
			if defective {
				tolZ = 10 * math.Sqrt(dlamchE*normA)
			}
			if !ok || w > tolZ {
				t.Errorf("%s: zeros %v, reference %v (worst %.3g)", r.Name, zs.Invariant, want, w)
			}
			if !defective {
				worstZero = math.Max(worstZero, w)
			}
		}
		// Uncontrollable and unobservable modes as sets.
		st, err := StructureOf(s, 0)
		if err != nil {
			t.Fatal(err)
		}
		for _, c := range []struct {
			what      string
			got, want []complex128
		}{
			{"uncontrollable", st.UncontrollableModes, complexList(r.Uncontrollable)},
			{"unobservable", st.UnobservableModes, complexList(r.Unobservable)},
		} {
			g, w := distinct(c.got, 1e-5), distinct(c.want, 1e-5)
			if e, ok := matchWorst(g, w); !ok || e > 1e-5 {
				t.Errorf("%s: %s modes %v, reference %v", r.Name, c.what, c.got, c.want)
			}
		}
		// exp(A t).
		E, err := Transition(s.A, r.ExpmT)
		if err != nil {
			t.Fatal(err)
		}
		e := maxRelDiff(E, denseOf(r.Expm))
		worstExp = math.Max(worstExp, e)
		if e > 1e-10 {
			t.Errorf("%s: exp(A t) differs by %.3g", r.Name, e)
		}
	}
	t.Logf("worst relative differences from the reference: eigenvalues %.3g, Schur block eigenvalues %.3g, stable projector %.3g, zeros %.3g, exp %.3g",
		worstEig, worstSchur, worstProj, worstZero, worstExp)
}

// TestStructureRefFresh regenerates the reference data with the committed script
// and fails if it differs from the committed file, so no reference can be
// tuned by hand.
func TestStructureRefFresh(t *testing.T) { checkRefFresh(t, "structure_ref.py", "structure_ref.json") }

// TestQZAgainstReferencePencil runs the QZ directly on the unreduced
// Rosenbrock pencil ([[A, B], [C, D]], [[I, 0], [0, 0]]) of every square
// reference system, so its deflation of infinite eigenvalues is exercised,
// and compares the finite ones with scipy.linalg.eig on the same pencil.
func TestQZAgainstReferencePencil(t *testing.T) {
	worst := 0.0
	for _, r := range loadRef(t) {
		if r.Zeros == nil {
			continue
		}
		s, err := FromMatrices(denseOf(r.RawA), denseOf(r.RawB), denseOf(r.RawC), denseOf(r.RawD), r.Ts)
		if err != nil {
			t.Fatal(err)
		}
		n, m, p := s.N(), s.M(), s.P()
		PA := mat.NewDense(n+p, n+m, nil)
		PA.Slice(0, n, 0, n).(*mat.Dense).Copy(s.A)
		PA.Slice(0, n, n, n+m).(*mat.Dense).Copy(s.B)
		PA.Slice(n, n+p, 0, n).(*mat.Dense).Copy(s.C)
		PA.Slice(n, n+p, n, n+m).(*mat.Dense).Copy(s.D)
		PE := mat.NewDense(n+p, n+m, nil)
		for i := 0; i < n; i++ {
			PE.Set(i, i, 1)
		}
		ge, err := QZ(PA, PE)
		if err != nil {
			t.Errorf("%s: %v", r.Name, err)
			continue
		}
		var fin []complex128
		for _, g := range ge {
			if g.Finite(1e-9) {
				fin = append(fin, g.Value())
			}
		}
		w, ok := matchWorst(fin, complexList(*r.Zeros))
		if !ok || w > 1e-9 {
			t.Errorf("%s: QZ finite eigenvalues %v, reference %v", r.Name, fin, *r.Zeros)
		}
		worst = math.Max(worst, w)
	}
	t.Logf("worst relative difference of QZ from the reference pencil eigenvalues: %.3g", worst)
}
