package display

import (
	"bytes"
	"encoding/base64"
	"math"
	"math/cmplx"
	"os"
	"strings"
	"testing"

	"gonum.org/v1/gonum/mat"

	"lsys/lsys"
)

// lcMountLocus is the locus of m x” + c x' + k x as k runs over values,
// computed by the library (eigenvalues of the companion matrix, matched
// between steps).
func lcMountLocus(t testing.TB, m, c float64, ks []float64) *lsys.Locus {
	var eig [][]complex128
	for _, k := range ks {
		es, err := lsys.Eigen(mat.NewDense(2, 2, []float64{0, 1, -k / m, -c / m}))
		if err != nil {
			t.Fatal(err)
		}
		eig = append(eig, es.Values)
	}
	l, err := lsys.NewLocus("k", ks, eig, 0)
	if err != nil {
		t.Fatal(err)
	}
	return l
}

func lcLinear(a, b float64, n int) []float64 {
	out := make([]float64, n)
	for i := range out {
		out[i] = a + (b-a)*float64(i)/float64(n-1)
	}
	return out
}

// The text and HTML tables of the locus of m x” + c x' + k x give the
// closed-form poles -c/2m ± j sqrt(k/m - (c/2m)^2), natural frequency
// sqrt(k/m) and damping ratio c / (2 sqrt(k m)) at both ends (common
// practice).
func TestLocusDisplayClosedForm(t *testing.T) {
	m, c := 2.0, 0.8
	l := lcMountLocus(t, m, c, lcLinear(1, 10, 19))
	b := Render(l, Options{})
	text := b.Data[Text].(string)
	for _, k := range []float64{1, 10} {
		wd := math.Sqrt(k/m - (c/(2*m))*(c/(2*m)))
		for _, want := range []string{
			fmtComplex(complex(-c/(2*m), wd), false),
			fmtComplex(complex(-c/(2*m), -wd), false),
			fmtNum(math.Sqrt(k / m)),
			fmtNum(c / (2 * math.Sqrt(k*m))),
		} {
			if !strings.Contains(text, want) {
				t.Errorf("k = %g: text lacks %q:\n%s", k, want, text)
			}
			if !strings.Contains(b.Data[HTML].(string), want) {
				t.Errorf("k = %g: HTML lacks %q", k, want)
			}
		}
	}
	if !strings.Contains(text, "every mode is stable") {
		t.Errorf("stability note missing:\n%s", text)
	}
	svg, _ := b.Data[SVG].(string)
	if !strings.HasPrefix(svg, "<?xml") || !strings.Contains(svg, "k = 10") || !strings.Contains(svg, "branch 2") {
		t.Errorf("SVG missing or without labels (%d bytes)", len(svg))
	}
}

// A branch that crosses into the right half-plane: x” - (a - 1) x' + x,
// whose poles have real part (a - 1)/2, crosses at a = 1 exactly (closed
// form of the roots of s^2 - (a-1) s + 1, common practice).
func TestLocusDisplayCrossing(t *testing.T) {
	as := lcLinear(0, 2, 9) // 0, 0.25, ..., 2: the crossing falls between samples
	as = append(as[:4], 0.9, 1.1, 1.25, 1.5, 1.75, 2)
	var eig [][]complex128
	for _, a := range as {
		es, err := lsys.Eigen(mat.NewDense(2, 2, []float64{0, 1, -1, a - 1}))
		if err != nil {
			t.Fatal(err)
		}
		eig = append(eig, es.Values)
	}
	l, err := lsys.NewLocus("a", as, eig, 0)
	if err != nil {
		t.Fatal(err)
	}
	cr := lcCrossings(l)
	if len(cr) != 2 {
		t.Fatalf("crossings %v, want one per branch", cr)
	}
	for _, c := range cr {
		// real part linear in a: the interpolation is exact
		if math.Abs(c.At-1) > 1e-12 || !c.Unstable {
			t.Errorf("crossing %+v, want at a = 1 into instability", c)
		}
	}
	text := Render(l, Options{}).Data[Text].(string)
	if !strings.Contains(text, "branch 1 becomes unstable near a = 1") {
		t.Errorf("crossing note missing:\n%s", text)
	}
}

// Same input, same bytes; the sampled plane too; and a very long sweep
// stays a small chart.
func TestLocusDisplayDeterministic(t *testing.T) {
	l := lcMountLocus(t, 1, 0.4, lcLinear(0.01, 10, 200))
	a, b := Render(l, Options{PNG: true}), Render(l, Options{PNG: true})
	for _, k := range []string{Text, HTML, SVG, PNG} {
		if a.Data[k] != b.Data[k] {
			t.Errorf("%s differs between two renders", k)
		}
	}
	if os.Getenv("LSYS_WRITE_PNG") != "" {
		png, _ := base64.StdEncoding.DecodeString(a.Data[PNG].(string))
		os.WriteFile("/tmp/locus.png", png, 0o644)
	}
	// sampled: z = exp(sT) of the same poles
	var eig [][]complex128
	for _, br := range [][]complex128{l.Branches[0], l.Branches[1]} {
		_ = br
	}
	for k := range l.Values {
		eig = append(eig, []complex128{cmplx.Exp(l.Branches[0][k] * 0.1), cmplx.Exp(l.Branches[1][k] * 0.1)})
	}
	ld, err := lsys.NewLocus("k", l.Values, eig, 0.1)
	if err != nil {
		t.Fatal(err)
	}
	d := Render(ld, Options{PNG: true})
	if !strings.Contains(d.Data[Text].(string), "sampled every 0.1 s") {
		t.Errorf("sampled text: %s", d.Data[Text])
	}
	if os.Getenv("LSYS_WRITE_PNG") != "" {
		png, _ := base64.StdEncoding.DecodeString(d.Data[PNG].(string))
		os.WriteFile("/tmp/locus_z.png", png, 0o644)
	}
	long := lcMountLocus(t, 1, 0.4, lcLinear(0.01, 10, 20000))
	svg := Render(long, Options{}).Data[SVG].(string)
	short := Render(lcMountLocus(t, 1, 0.4, lcLinear(0.01, 10, 2000)), Options{}).Data[SVG].(string)
	if len(svg) > 2*len(short) || bytes.Count([]byte(svg), []byte("L")) > 40000 {
		t.Errorf("20,000 values give %d bytes of SVG against %d for 2,000", len(svg), len(short))
	}
}

// Unity feedback around k/(s(s+1)(s+2)): the closed-loop polynomial
// s^3 + 3 s^2 + 2 s + k has a pair on the imaginary axis, at ±j sqrt(2),
// when k = 3*2 = 6 (the Routh-Hurwitz condition a2 a1 = a0 of a cubic,
// common practice; this plant is the classic root-locus textbook example,
// from memory).
func TestLocusDisplayRouthCrossing(t *testing.T) {
	ks := lcLinear(0, 15, 301) // step 0.05: 6 is a grid value
	ks[120] += 0.013           // move it off the grid so the crossing is interpolated
	var eig [][]complex128
	for _, k := range ks {
		es, err := lsys.Eigen(mat.NewDense(3, 3, []float64{0, 1, 0, 0, 0, 1, -k, -2, -3}))
		if err != nil {
			t.Fatal(err)
		}
		eig = append(eig, es.Values)
	}
	l, err := lsys.NewLocus("gain", ks, eig, 0)
	if err != nil {
		t.Fatal(err)
	}
	cr := lcCrossings(l)
	if len(cr) != 2 {
		t.Fatalf("crossings %+v, want the two members of the pair", cr)
	}
	for _, c := range cr {
		// linear interpolation over a step of 0.05: a few 1e-4 off
		if math.Abs(c.At-6) > 1e-3 || !c.Unstable {
			t.Errorf("crossing %+v, want into instability at gain = 6", c)
		}
	}
	// the rigid-body pole at 0 for gain = 0 is on the boundary, not a
	// crossing into stability
	text := Render(l, Options{}).Data[Text].(string)
	if strings.Contains(text, "becomes stable") || !strings.Contains(text, "becomes unstable near gain = 6") {
		t.Errorf("text:\n%s", text)
	}
}
