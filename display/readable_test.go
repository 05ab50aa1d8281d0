package display

import (
	"context"
	"math"
	"regexp"
	"strconv"
	"testing"

	"gonum.org/v1/gonum/mat"

	"lsys/lsys"
)

// svgTextPixels is the smallest text of an SVG chart in CSS pixels at
// 100 % zoom, and the chart's width in CSS pixels.
func svgTextPixels(t *testing.T, svg string) (minPx, widthPx float64) {
	t.Helper()
	m := regexp.MustCompile(`<svg width="([\d.]+)(pt|px)?" height="[\d.]+(?:pt|px)?" viewBox="0 0 ([\d.]+)`).FindStringSubmatch(svg)
	if m == nil {
		t.Fatalf("no size in %.200s", svg)
	}
	w, _ := strconv.ParseFloat(m[1], 64)
	vb, _ := strconv.ParseFloat(m[3], 64)
	if m[2] == "pt" {
		w *= 4.0 / 3
	}
	minPx = math.Inf(1)
	for _, f := range regexp.MustCompile(`font-size[:=]"?([\d.]+)`).FindAllStringSubmatch(svg, -1) {
		v, _ := strconv.ParseFloat(f[1], 64)
		minPx = math.Min(minPx, v*w/vb)
	}
	return minPx, w
}

// Charts are read at 100 % zoom in a 980 px notebook column: no text
// below 11 px, no chart wider than the column.
func TestChartsReadableAt100(t *testing.T) {
	A := mat.NewDense(2, 2, []float64{0, 1, -4, -0.8})
	s, err := lsys.FromMatrices(A, mat.NewDense(2, 2, []float64{0, 0, 4, 1}), mat.NewDense(2, 2, []float64{1, 0, 0, 1}), nil, 0)
	if err != nil {
		t.Fatal(err)
	}
	ctx := context.Background()
	st, _ := lsys.Step(ctx, s, lsys.ResponseOptions{})
	fr, _ := lsys.Frequency(ctx, s, lsys.FrequencyOptions{})
	pz, _ := lsys.PoleZero(s, nil, true)
	for _, v := range []any{st, fr, &lsys.PolarChart{Frequency: fr}, pz} {
		svg, _ := Render(v, Options{}).Data[SVG].(string)
		px, w := svgTextPixels(t, svg)
		if px < 11 || w > 980 {
			t.Errorf("%T: smallest text %.1f px, width %.0f px", v, px, w)
		}
	}
}

// A few points plunging towards -240 dB do not set the magnitude axis.
func TestDBFloorIgnoresPlunge(t *testing.T) {
	pn := newPanel("", "", "")
	x, y := make([]float64, 200), make([]float64, 200)
	for k := range x {
		x[k], y[k] = float64(k+1), -20*math.Log10(float64(k+1))
	}
	y[199] = -240
	pn.Series = []rpSeries{{X: x, Y: y}}
	if f := rpDBFloor(pn, -240, 0); f < -120 {
		t.Errorf("floor %g dB: the plunge decided the range", f)
	}
}

// A damping-ratio label on top of a pole moves along its ray.
func TestZetaLabelOffMarker(t *testing.T) {
	fr := pzBox{-10, 1, -6, 6}
	lab := rpText{X: -3, Y: 4, Text: "ζ 0.6"}
	out := pzLabelsOffMarkers([]rpText{lab}, []complex128{complex(-2.9, 4.1)}, fr)
	if len(out) == 1 && out[0] == lab {
		t.Errorf("label left on the pole: %+v", out)
	}
}
