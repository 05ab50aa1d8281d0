package lsys

import (
	"context"
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"testing"

	"gonum.org/v1/gonum/mat"
)

// Reference data from tools/ref/response_ref.py (numpy/scipy as an
// independent reference: scipy.linalg.expm, scipy.signal.cont2discrete,
// dense complex solves, closed-form step responses).
type responseRef struct {
	Systems []struct {
		Name       string
		T          float64
		A, B, C, D [][]float64
		ExpmT      float64 `json:"expm_t"`
		Expm       [][]float64
		ZOH        refSys `json:"zoh"`
		FOH        refSys `json:"foh"`
		Bilinear   refSys `json:"tustin"`
		W          []float64
		FreqRe     [][]float64 `json:"freq_re"`
		FreqIm     [][]float64 `json:"freq_im"`
		Wd         []float64
		DfreqRe    [][]float64 `json:"dfreq_re"`
		DfreqIm    [][]float64 `json:"dfreq_im"`
		StepT      []float64   `json:"step_t"`
		Step       [][]float64
	}
}

type refSys struct{ A, B, C, D [][]float64 }

func dense(rows [][]float64) *mat.Dense {
	if len(rows) == 0 || len(rows[0]) == 0 {
		return nil
	}
	m := mat.NewDense(len(rows), len(rows[0]), nil)
	for i, r := range rows {
		m.SetRow(i, r)
	}
	return m
}

// relErr is max |a - b| / max(1, max |b|) over the entries.
func relErr(a mat.Matrix, b [][]float64) float64 {
	var worst, scale float64
	for i := range b {
		for j := range b[i] {
			scale = math.Max(scale, math.Abs(b[i][j]))
		}
	}
	scale = math.Max(1, scale)
	for i := range b {
		for j := range b[i] {
			worst = math.Max(worst, math.Abs(a.At(i, j)-b[i][j])/scale)
		}
	}
	return worst
}

func loadResponseRef(t *testing.T) *responseRef {
	raw, err := os.ReadFile(filepath.Join("testdata", "response_ref.json"))
	if err != nil {
		t.Fatal(err)
	}
	var ref responseRef
	if err := json.Unmarshal(raw, &ref); err != nil {
		t.Fatal(err)
	}
	if len(ref.Systems) == 0 {
		t.Fatal("no reference systems")
	}
	return &ref
}

func TestResponseAgainstReference(t *testing.T) {
	ref := loadResponseRef(t)
	worst := map[string]float64{}
	note := func(what string, e, tol float64, name string) {
		worst[what] = math.Max(worst[what], e)
		if e > tol {
			t.Errorf("%s %s: relative error %.3g above %.0e", name, what, e, tol)
		}
	}
	for _, r := range ref.Systems {
		g, err := FromMatrices(dense(r.A), dense(r.B), dense(r.C), dense(r.D), 0)
		if err != nil {
			t.Fatal(err)
		}
		E, err := Expm(scale(r.ExpmT, g.A))
		if err != nil {
			t.Fatalf("%s: %v", r.Name, err)
		}
		note("expm", relErr(E, r.Expm), 1e-11, r.Name)
		for _, c := range []struct {
			method string
			want   refSys
		}{{ZeroOrderHold, r.ZOH}, {FirstOrderHold, r.FOH}, {Bilinear, r.Bilinear}} {
			d, err := Sample(g, r.T, c.method, 0)
			if err != nil {
				t.Fatal(err)
			}
			e := math.Max(math.Max(relErr(d.A, c.want.A), relErr(d.B, c.want.B)), math.Max(relErr(d.C, c.want.C), relErr(d.D, c.want.D)))
			note(c.method, e, 1e-10, r.Name)
		}
		f, err := Frequency(context.Background(), g, FrequencyOptions{Grid: r.W})
		if err != nil {
			t.Fatal(err)
		}
		var fe float64
		for k := range r.W {
			for i, v := range f.G[k] {
				want := complex(r.FreqRe[k][i], r.FreqIm[k][i])
				fe = math.Max(fe, cabs(v-want)/math.Max(1e-3, cabs(want)))
			}
		}
		note("frequency response", fe, 1e-9, r.Name)
		d, _ := Sample(g, r.T, ZeroOrderHold, 0)
		fd, err := Frequency(context.Background(), d, FrequencyOptions{Grid: r.Wd})
		if err != nil {
			t.Fatal(err)
		}
		fe = 0
		for k := range r.Wd {
			for i, v := range fd.G[k] {
				want := complex(r.DfreqRe[k][i], r.DfreqIm[k][i])
				fe = math.Max(fe, cabs(v-want)/math.Max(1e-3, cabs(want)))
			}
		}
		note("sampled frequency response", fe, 1e-9, r.Name)
		// step response at the reference times: choose a step that lands on them
		st, err := Step(context.Background(), g, ResponseOptions{Until: 10, Step: 0.0025})
		if err != nil {
			t.Fatal(err)
		}
		var se float64
		for q, tq := range r.StepT {
			k := int(math.Round(tq / 0.0025))
			if math.Abs(st.T[k]-tq) > 1e-12 {
				t.Fatalf("grid misses %g", tq)
			}
			for i := 0; i < g.P(); i++ {
				for j := 0; j < g.M(); j++ {
					want := r.Step[q][i*g.M()+j]
					se = math.Max(se, math.Abs(st.Y[i][j][k]-want)/math.Max(1, math.Abs(want)))
				}
			}
		}
		note("step response", se, 1e-9, r.Name)
	}
	for _, k := range []string{"expm", ZeroOrderHold, FirstOrderHold, Bilinear, "frequency response", "sampled frequency response", "step response"} {
		t.Logf("worst relative error against numpy/scipy, %s: %.3g", k, worst[k])
	}
}

// TestResponseRefFresh regenerates the reference data with the committed script
// and fails if it differs from the committed file, so no reference can be
// tuned by hand.
func TestResponseRefFresh(t *testing.T) { checkRefFresh(t, "response_ref.py", "response_ref.json") }
