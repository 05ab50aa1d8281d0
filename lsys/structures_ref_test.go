package lsys

import (
	"context"
	"encoding/json"
	"math"
	"os"
	"testing"
)

// Reference values from scipy (tools/ref/structures_ref.py: scipy.linalg.eigh
// for dense models, scipy.sparse.linalg.eigsh with shift-and-invert at 0 for
// lattices, the MAC formula in numpy).
type structuresRef struct {
	Dense []struct {
		Name   string      `json:"name"`
		RawM   [][]float64 `json:"M"`
		RawK   [][]float64 `json:"K"`
		Lambda []float64   `json:"lambda"`
	} `json:"dense"`
	Sparse []struct {
		Name   string    `json:"name"`
		Dims   []int     `json:"dims"`
		K      float64   `json:"k"`
		M      float64   `json:"m"`
		Count  int       `json:"count"`
		Lambda []float64 `json:"lambda"`
	} `json:"sparse"`
	MAC struct {
		A, B, MAC [][]float64
	} `json:"mac"`
}

func TestStructuresRef(t *testing.T) {
	b, err := os.ReadFile("testdata/structures_ref.json")
	if err != nil {
		t.Fatal(err)
	}
	var ref structuresRef
	if err := json.Unmarshal(b, &ref); err != nil {
		t.Fatal(err)
	}
	// The file holds 12 significant digits; the solvers agree to rounding.
	const denseTol, sparseTol = 1e-11, 1e-10
	for _, c := range ref.Dense {
		sm, err := UndampedModes(denseOf(c.RawM), denseOf(c.RawK))
		if err != nil {
			t.Fatal(err)
		}
		top := c.Lambda[len(c.Lambda)-1]
		worst := 0.0
		defer func(name string) { t.Logf("%s: largest |w^2 - scipy| / largest w^2 = %.1e", name, worst) }(c.Name)
		for j, want := range c.Lambda {
			worst = math.Max(worst, math.Abs(sm.Lambda[j]-want)/top)
			if d := math.Abs(sm.Lambda[j] - want); d > denseTol*top {
				t.Errorf("%s mode %d: w^2 %.12g, scipy eigh %.12g", c.Name, j+1, sm.Lambda[j], want)
			}
		}
	}
	for _, c := range ref.Sparse {
		K, M, err := SpringLattice(c.Dims, c.K, c.M, true)
		if err != nil {
			t.Fatal(err)
		}
		sm, err := SparseModes(context.Background(), K, M, SparseModeOptions{Count: c.Count})
		if err != nil {
			t.Fatal(err)
		}
		worst := 0.0
		for j, want := range c.Lambda {
			worst = math.Max(worst, math.Abs(sm.Lambda[j]-want)/want)
			if d := math.Abs(sm.Lambda[j] - want); d > sparseTol*want {
				t.Errorf("%s mode %d: w^2 %.12g, scipy eigsh %.12g (rel %.1e)", c.Name, j+1, sm.Lambda[j], want, d/want)
			}
		}
		t.Logf("%s: largest relative difference from eigsh %.1e", c.Name, worst)
	}
	got, err := MAC(denseOf(ref.MAC.A), denseOf(ref.MAC.B))
	if err != nil {
		t.Fatal(err)
	}
	for i, r := range ref.MAC.MAC {
		for j, want := range r {
			if d := math.Abs(got.At(i, j) - want); d > 1e-11 {
				t.Errorf("MAC[%d, %d] = %.12g, numpy %.12g", i+1, j+1, got.At(i, j), want)
			}
		}
	}
}

func TestStructuresRefFresh(t *testing.T) {
	checkRefFresh(t, "structures_ref.py", "structures_ref.json")
}
