package lsys

import (
	"encoding/json"
	"math"
	"math/cmplx"
	"os"
	"path/filepath"
	"testing"
)

// realizeRef is one case of lsys/testdata/realize_ref.json, written by
// tools/ref/realize_ref.py (numpy.poly, numpy.roots, numpy.polyval).
type realizeRef struct {
	Name     string
	Ts       float64
	Num, Den []float64
	Spread   float64
	Rre      []float64 `json:"roots_re"`
	Rim      []float64 `json:"roots_im"`
	W        []float64
	Gre      []float64 `json:"g_re"`
	Gim      []float64 `json:"g_im"`
}

func loadRealizeRef(t *testing.T) []realizeRef {
	t.Helper()
	b, err := os.ReadFile(filepath.Join("testdata", "realize_ref.json"))
	if err != nil {
		t.Fatal(err)
	}
	var cases []realizeRef
	if err := json.Unmarshal(b, &cases); err != nil {
		t.Fatal(err)
	}
	if len(cases) < 8 {
		t.Fatalf("only %d reference cases", len(cases))
	}
	return cases
}

func TestRealizeRefFresh(t *testing.T) { checkRefFresh(t, "realize_ref.py", "realize_ref.json") }

// multiplicity counts the reference roots within 1e-6 (relative) of r.
func multiplicity(roots []complex128, r complex128) int {
	k := 0
	for _, q := range roots {
		if cmplx.Abs(q-r) <= 1e-6*math.Max(cmplx.Abs(r), 1e-300) || q == r {
			k++
		}
	}
	return k
}

// TestRealizePolesAndGainsAgainstRef: badly scaled transfer functions
// (denominator coefficients spreading over 1e9 to 1e32) keep every pole:
// the realization's eigenvalues match numpy.roots of the denominator and its
// transfer function matches direct evaluation of the rational function.
// Tolerances: a simple root is determined by the coefficients to about
// cond * eps; we ask 1e-9 relative to the root's magnitude. A root of
// multiplicity k moves by about eps^(1/k) under rounding of the
// coefficients (Wilkinson, Rounding Errors in Algebraic Processes, 1963,
// ch. 2, from memory), so a double root is compared within 1e-6. The
// transfer function: relative error < 1e-9
// (the brief's requirement).
func TestRealizePolesAndGainsAgainstRef(t *testing.T) {
	worstRoot, worstG := 0.0, 0.0
	for _, c := range loadRealizeRef(t) {
		s, info, err := RealizeWithInfo([][]*Rational{{{Num: c.Num, Den: c.Den, Ts: c.Ts}}}, c.Ts, 0)
		if err != nil {
			t.Fatalf("%s: %v", c.Name, err)
		}
		if info.Warning != "" {
			t.Errorf("%s: warning %q", c.Name, info.Warning)
		}
		if s.N() != len(c.Den)-1 {
			t.Errorf("%s: order %d, want %d (no pole may be dropped)", c.Name, s.N(), len(c.Den)-1)
			continue
		}
		got, err := Poles(s)
		if err != nil {
			t.Fatal(err)
		}
		ref := make([]complex128, len(c.Rre))
		for i := range ref {
			ref[i] = complex(c.Rre[i], c.Rim[i])
		}
		used := make([]bool, len(got))
		for _, r := range ref {
			best, bi := math.Inf(1), -1
			for i, g := range got {
				if !used[i] && cmplx.Abs(g-r) < best {
					best, bi = cmplx.Abs(g-r), i
				}
			}
			used[bi] = true
			scale := cmplx.Abs(r)
			if scale == 0 {
				// a root at the origin: exact in both (zero constant term)
				scale = 1
			}
			tol := 1e-9
			if multiplicity(ref, r) > 1 {
				tol = 1e-6
			}
			rel := best / scale
			if multiplicity(ref, r) == 1 {
				worstRoot = math.Max(worstRoot, rel)
			}
			if rel > tol {
				t.Errorf("%s: pole %v, numpy.roots %v (relative difference %.2g > %g)", c.Name, got[bi], r, rel, tol)
			}
		}
		for k, w := range c.W {
			x := complex(0, w)
			if c.Ts > 0 {
				x = cmplx.Exp(complex(0, w*c.Ts))
			}
			g := evalSys(t, s, x)[0]
			want := complex(c.Gre[k], c.Gim[k])
			rel := cmplx.Abs(g-want) / cmplx.Abs(want)
			worstG = math.Max(worstG, rel)
			if rel > 1e-9 {
				t.Errorf("%s: G at w = %g: %v, direct evaluation %v (relative error %.2g)", c.Name, w, g, want, rel)
			}
		}
	}
	t.Logf("worst relative pole error (simple roots) %.2g, worst relative gain error %.2g", worstRoot, worstG)
}
