package display

import (
	"math"
	"strings"
	"testing"

	"lsys/lsys"
)

// TestChartLogY: chart(..., yscale: "log") draws a decaying impulse response
// on a log axis: values at or below zero are left out, ticks are powers of
// ten, and the chart is embedded once (the chart's value is rendered
// through Render, which embeds its image already).
func TestChartLogY(t *testing.T) {
	n := 101
	r := &lsys.Response{Kind: "impulse", T: make([]float64, n), Y: [][][]float64{{make([]float64, n)}}, Outputs: []string{"y1"}, Channels: []string{"u1"}}
	for k := 0; k < n; k++ {
		r.T[k] = 0.1 * float64(k)
		r.Y[0][0][k] = math.Exp(-r.T[k]) // closed form of the impulse response of 1/(s + 1)
	}
	r.Y[0][0][n-1] = 0 // a point a log axis cannot draw
	b := Render(&lsys.Chart{Value: r, XMin: math.NaN(), XMax: math.NaN(), YMin: math.NaN(), YMax: math.NaN(), YScale: "log"}, Options{})
	svg, _ := b.Data[SVG].(string)
	if !strings.Contains(svg, "1e-4") && !strings.Contains(svg, "1e-3") {
		t.Errorf("no power-of-ten ticks on the log axis")
	}
	if h, _ := b.Data[HTML].(string); strings.Count(h, "<img") != 1 {
		t.Errorf("chart embedded %d times, want once", strings.Count(h, "<img"))
	}
}
