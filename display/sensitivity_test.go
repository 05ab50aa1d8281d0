package display

import (
	"encoding/json"
	"math"
	"strings"
	"testing"

	"gonum.org/v1/gonum/mat"

	"lsys/lsys"
)

// Sensitivities of the poles of m s^2 + c s + k against the derivatives of
// the closed form s = -c/2m + j w_d, w_d = sqrt(k/m - (c/2m)^2) (common
// practice): ds/dk = j/(2 m w_d), ds/dc = -1/2m - j c/(4 m^2 w_d); the
// relative sensitivity to k is (k/|s|) ds/dk with |s| = sqrt(k/m).
func TestSensitivityDisplayClosedForm(t *testing.T) {
	m, c, k := 2.0, 0.8, 10.0
	A := mat.NewDense(2, 2, []float64{0, 1, -k / m, -c / m})
	dk := mat.NewDense(2, 2, []float64{0, 0, -1 / m, 0})
	dc := mat.NewDense(2, 2, []float64{0, 0, 0, -1 / m})
	s, err := lsys.EigenvalueSensitivity(A, []*mat.Dense{dk, dc}, []string{"k", "c"}, []float64{k, c}, 0)
	if err != nil {
		t.Fatal(err)
	}
	wd := math.Sqrt(k/m - (c/(2*m))*(c/(2*m)))
	dsdk := complex(0, 1/(2*m*wd))
	dsdc := complex(-1/(2*m), -c/(4*m*m*wd))
	relk := dsdk * complex(k/math.Sqrt(k/m), 0)
	relc := dsdc * complex(c/math.Sqrt(k/m), 0)
	b := Render(s, Options{})
	text := b.Data[Text].(string)
	h := b.Data[HTML].(string)
	for _, want := range []string{
		fmtComplex(complex(-c/(2*m), wd), true), lcComplex(dsdk), lcComplex(dsdc),
		lcComplex(relk), lcComplex(relc), "at k = 10, c = 0.8",
	} {
		if !strings.Contains(text, want) {
			t.Errorf("text lacks %q:\n%s", want, text)
		}
		if !strings.Contains(h, want) {
			t.Errorf("HTML lacks %q:\n%s", want, h)
		}
	}
	if lcComplex(dsdk) != fmtNum(imag(dsdk))+"j" {
		t.Errorf("a purely imaginary derivative is shown as %q", lcComplex(dsdk))
	}
	// k moves the pole more, relative to the sizes, than c does
	if !strings.Contains(text, "k ("+fmtNum(math.Hypot(real(relk), imag(relk)))+")") {
		t.Errorf("ranking column should name k:\n%s", text)
	}
	if Render(s, Options{}).Data[Text] != text || Render(s, Options{}).Data[HTML] != h {
		t.Error("two renders differ")
	}
	if _, err := json.Marshal(b.Data[JSON]); err != nil {
		t.Errorf("JSON: %v", err)
	}
}

// A double integrator has a defective eigenvalue at 0 (one Jordan block of
// size 2): no derivative exists (Wilkinson 1965, ch. 2), and the display
// says so instead of printing numbers.
func TestSensitivityDisplayDefective(t *testing.T) {
	A := mat.NewDense(2, 2, []float64{0, 1, 0, 0})
	dA := mat.NewDense(2, 2, []float64{0, 0, -1, 0})
	s, err := lsys.EigenvalueSensitivity(A, []*mat.Dense{dA}, []string{"k"}, []float64{0}, 0)
	if err != nil {
		t.Fatal(err)
	}
	b := Render(s, Options{})
	text := b.Data[Text].(string)
	if !strings.Contains(text, "undefined") || !strings.Contains(text, "defective") {
		t.Errorf("defective eigenvalue not reported:\n%s", text)
	}
	if _, err := json.Marshal(b.Data[JSON]); err != nil {
		t.Errorf("JSON with an undefined derivative: %v", err)
	}
}
