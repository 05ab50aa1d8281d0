package display

import (
	"context"
	"strings"
	"testing"

	"gonum.org/v1/gonum/mat"

	"lsys/lsys"
)

// chart(...) options reach the drawing: the title, the frame's x range
// (the axis labels 0.5 ... 10 are drawn, not the automatic 0.1 ... 100),
// the size (12 cm = 340.16 pt), and a log time axis drops t = 0 instead of failing.
func TestChartOptions(t *testing.T) {
	P, err := lsys.Realize([][]*lsys.Rational{{{Num: lsys.Poly{4}, Den: lsys.Poly{4, 0.4, 1}}}}, 0)
	if err != nil {
		t.Fatal(err)
	}
	f, err := lsys.Frequency(context.Background(), P, lsys.FrequencyOptions{})
	if err != nil {
		t.Fatal(err)
	}
	c := lsys.NewChart(f)
	c.Title, c.XMin, c.XMax, c.YMin = "suspension mode", 0.5, 10, -30
	c.Width, c.Height = 12, 9
	svg := Render(c, Options{}).Data[SVG].(string)
	if !strings.Contains(svg, "suspension mode") || strings.Contains(svg, ">100<") || !strings.Contains(svg, `width="340.16pt"`) {
		t.Errorf("options not applied: %.300s", svg)
	}
	plain := Render(f, Options{}).Data[SVG].(string)
	if strings.Contains(plain, "suspension mode") {
		t.Error("options leaked into the plain chart")
	}
	r, err := lsys.Step(context.Background(), P, lsys.ResponseOptions{})
	if err != nil {
		t.Fatal(err)
	}
	c = lsys.NewChart(r)
	c.XScale = "log"
	b := Render(c, Options{})
	if _, ok := b.Data[SVG]; !ok || strings.Contains(b.Data[Text].(string), "not drawn") {
		t.Errorf("log time axis not drawn: %s", b.Data[Text])
	}
}

// The Jordan form's display shows J, T, T's condition and the warning.
func TestJordanFormDisplay(t *testing.T) {
	jf, err := lsys.JordanFormOf(mat.NewDense(2, 2, []float64{2, 1, -1, 4}), 0, 0)
	if err != nil {
		t.Fatal(err)
	}
	b := Render(jf, Options{})
	txt := b.Data[Text].(string)
	for _, want := range []string{"blocks 2 at 3", "J: 2x2 matrix", "T: 2x2 matrix", "condition number of T 2;", "warning: "} {
		if !strings.Contains(txt, want) {
			t.Errorf("text lacks %q:\n%s", want, txt)
		}
	}
	if h := b.Data[HTML].(string); !strings.Contains(h, "Jordan form") || !strings.Contains(h, "warning") {
		t.Errorf("HTML: %.200s", h)
	}
}
