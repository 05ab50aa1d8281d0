package display

import (
	"context"
	"strings"
	"testing"

	"gonum.org/v1/gonum/mat"

	"lsys/lsys"
)

func TestMarginsChartMarksEveryCrossoverOnTheDistance(t *testing.T) {
	// 1/s * 100/(s^2 + 0.4 s + 100): a lightly damped mode lifts |L| over
	// 1 near 10 rad/s, so |L| = 1 three times and the phase passes -180
	// once (from the chart of this loop; the crossovers themselves are
	// tested in lsys).
	g, err := lsys.FromMatrices(
		mat.NewDense(3, 3, []float64{0, 1, 0, 0, 0, 1, 0, -100, -0.4}),
		mat.NewDense(3, 1, []float64{0, 0, 100}),
		mat.NewDense(1, 3, []float64{1, 0, 0}), nil, 0)
	if err != nil {
		t.Fatal(err)
	}
	mg, err := lsys.LoopMargins(context.Background(), g, lsys.FrequencyOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if len(mg.GainCrossovers) != 3 || len(mg.PhaseCrossovers) != 1 {
		t.Fatalf("crossovers %v / %v, want 3 gain and 1 phase", mg.GainCrossovers, mg.PhaseCrossovers)
	}
	b := Render(mg, Options{})
	svg, _ := b.Data[SVG].(string)
	for _, want := range []string{">gain crossovers (|L| = 1)<", ">phase crossovers (L negative real)<", ">modulus margin (smallest distance)<", ">modulus margin " + fmtNum(mg.ModulusMargin) + "<"} {
		if !strings.Contains(strings.ReplaceAll(svg, "&lt;", "<"), want) {
			t.Errorf("the chart lacks %q", want)
		}
	}
	// lsys's own look: no magnitude/phase pair with bars labelled by
	// abbreviations of the margins
	for _, old := range []string{">GM ", ">PM ", "phase (deg)", "magnitude (dB)"} {
		if strings.Contains(svg, old) {
			t.Errorf("the chart still shows %q", old)
		}
	}
	txt, _ := b.Data[Text].(string)
	if strings.Count(txt, "(phase margin ") != 3 || !strings.Contains(txt, "modulus margin (smallest |1 + L|)") || !strings.Contains(txt, mgCaption) {
		t.Errorf("text lacks the three phase margins, the modulus margin or the caption:\n%s", txt)
	}
}
