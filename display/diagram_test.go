package display

import (
	"regexp"
	"strconv"
	"strings"
	"testing"

	"gonum.org/v1/gonum/mat"

	"lsys/lsys"
)

// The diagram of a system with a mode no input reaches and an output that
// sees nothing: those links are labelled, the text is at least 11 px, and
// the same system gives the same bytes.
func TestDiagramRender(t *testing.T) {
	A := mat.NewDense(3, 3, []float64{-1, 0, 0, 0, -0.2, 3, 0, -3, -0.2})
	B := mat.NewDense(3, 1, []float64{0, 1, 0})
	C := mat.NewDense(2, 3, []float64{1, 1, 0, 0, 0, 0})
	s, err := lsys.FromMatrices(A, B, C, nil, 0)
	if err != nil {
		t.Fatal(err)
	}
	d, err := lsys.Diagram(s)
	if err != nil {
		t.Fatal(err)
	}
	b := Render(d, Options{})
	svg, _ := b.Data[SVG].(string)
	txt, _ := b.Data[Text].(string)
	for _, want := range []string{"not reached", "not seen", "mode 1 · real", "mode 2 · pair"} {
		if !strings.Contains(svg, want) || !strings.Contains(txt, want) {
			t.Errorf("diagram lacks %q:\n%s", want, txt)
		}
	}
	for _, m := range regexp.MustCompile(`font-size="([\d.]+)"`).FindAllStringSubmatch(svg, -1) {
		if v, _ := strconv.ParseFloat(m[1], 64); v < 11 {
			t.Errorf("text of %s px", m[1])
		}
	}
	if again := Render(d, Options{}); again.Data[SVG] != b.Data[SVG] {
		t.Error("two renderings differ")
	}
	if !strings.Contains(b.Data[HTML].(string), "data:image/svg+xml;base64,") {
		t.Error("the diagram is not in the HTML part")
	}
}
