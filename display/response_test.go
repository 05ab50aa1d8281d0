package display

import (
	"bytes"
	"context"
	"encoding/base64"
	"encoding/json"
	"math"
	"math/cmplx"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/plot"

	"lsys/lsys"
)

func rpSecondOrder(t testing.TB, zeta, wn float64) *lsys.System {
	g, err := lsys.FromMatrices(
		mat.NewDense(2, 2, []float64{0, 1, -wn * wn, -2 * zeta * wn}),
		mat.NewDense(2, 1, []float64{0, wn * wn}),
		mat.NewDense(1, 2, []float64{1, 0}), nil, 0)
	if err != nil {
		t.Fatal(err)
	}
	return g
}

func rpLoop(t testing.TB) *lsys.System {
	// 2/(s(s+1)(s+2)) in companion form
	g, err := lsys.Realize([][]*lsys.Rational{{{Num: lsys.Poly{2}, Den: lsys.Poly{0, 2, 3, 1}}}}, 0)
	if err != nil {
		t.Fatal(err)
	}
	return g
}

// rpSamples builds one value of every type this file set renders.
func rpSamples(t testing.TB) map[string]any {
	ctx := context.Background()
	g := rpSecondOrder(t, 0.25, 3)
	out := map[string]any{}
	st, err := lsys.Step(ctx, g, lsys.ResponseOptions{})
	if err != nil {
		t.Fatal(err)
	}
	out["step"] = st
	m, _ := lsys.ResponseMetrics(st)
	out["metrics"] = m
	two, _ := lsys.Stack(g, rpSecondOrder(t, 0.7, 1))
	mimo, _ := lsys.Step(ctx, two, lsys.ResponseOptions{})
	out["step_mimo"] = mimo
	d, _ := lsys.Sample(g, 0.2, lsys.ZeroOrderHold, 0)
	sd, _ := lsys.Step(ctx, d, lsys.ResponseOptions{})
	out["step_sampled"] = sd
	sig := lsys.Sine(2, 1)
	sim, _ := lsys.Simulate(ctx, g, sig, nil, lsys.ResponseOptions{Until: 10})
	out["sine"] = sim
	mr, err := lsys.ByMode(ctx, two, "impulse", nil, nil, lsys.ResponseOptions{})
	if err != nil {
		t.Fatal(err)
	}
	out["modal"] = mr
	f, _ := lsys.Frequency(ctx, g, lsys.FrequencyOptions{})
	out["bode"] = f
	out["polar"] = &lsys.PolarChart{Frequency: f}
	fl, _ := lsys.Frequency(ctx, rpLoop(t), lsys.FrequencyOptions{})
	out["polar_loop"] = &lsys.PolarChart{Frequency: fl}
	f2, _ := lsys.Frequency(ctx, two, lsys.FrequencyOptions{})
	sv, _ := lsys.Singular(f2)
	out["singular"] = sv
	mg, err := lsys.LoopMargins(ctx, rpLoop(t), lsys.FrequencyOptions{})
	if err != nil {
		t.Fatal(err)
	}
	out["margins"] = mg
	pz, _ := lsys.PoleZero(two, nil, false)
	out["polezero"] = pz
	pzd, _ := lsys.PoleZero(d, nil, false)
	out["polezero_sampled"] = pzd
	return out
}

// TestResponseChartsDeterministic renders every chart twice and asks for
// the same bytes (SVG and PNG). With LSYS_PLOT_DIR set it also writes the
// PNGs there, for looking at them.
func TestResponseChartsDeterministic(t *testing.T) {
	dir := os.Getenv("LSYS_PLOT_DIR")
	for name, v := range rpSamples(t) {
		a := Render(v, Options{PNG: true})
		b := Render(v, Options{PNG: true})
		if _, err := json.Marshal(a.Data); err != nil {
			t.Errorf("%s: bundle does not serialise: %v", name, err)
		}
		txt, _ := a.Data[Text].(string)
		if txt == "" || strings.Contains(txt, "not drawn") {
			t.Errorf("%s: text %q", name, txt)
		}
		for _, mime := range []string{SVG, PNG} {
			x, _ := a.Data[mime].(string)
			y, _ := b.Data[mime].(string)
			if x == "" {
				if name != "metrics" {
					t.Errorf("%s: no %s", name, mime)
				}
				continue
			}
			if x != y {
				t.Errorf("%s: %s differs between two renders", name, mime)
			}
		}
		if dir != "" {
			if p, ok := a.Data[PNG].(string); ok {
				raw, _ := base64.StdEncoding.DecodeString(p)
				os.WriteFile(filepath.Join(dir, name+".png"), raw, 0o644)
			}
			if s, ok := a.Data[SVG].(string); ok {
				os.WriteFile(filepath.Join(dir, name+".svg"), []byte(s), 0o644)
			}
		}
	}
}

func TestLongResponseSVGIsSmall(t *testing.T) {
	// 10,000 samples of a lightly damped response: the SVG must stay under
	// 100 KB thanks to decimation (our own target, DESIGN.md).
	g := rpSecondOrder(t, 0.02, 20)
	r, err := lsys.Step(context.Background(), g, lsys.ResponseOptions{Until: 20, Step: 0.002})
	if err != nil {
		t.Fatal(err)
	}
	if len(r.T) != 10001 {
		t.Fatalf("%d samples", len(r.T))
	}
	svg := Render(r, Options{}).Data[SVG].(string)
	t.Logf("SVG of a 10,001-sample step response: %d bytes", len(svg))
	if len(svg) > 100_000 {
		t.Errorf("SVG is %d bytes, want < 100 KB", len(svg))
	}
	if !bytes.HasPrefix([]byte(strings.TrimSpace(svg)), []byte("<?xml")) {
		t.Error("not an SVG document")
	}
}

func TestDecimateKeepsExtremes(t *testing.T) {
	// a spike inside one bucket must survive decimation
	n := 10000
	x, y := make([]float64, n), make([]float64, n)
	for k := range x {
		x[k] = float64(k)
	}
	y[5003] = 7
	y[7001] = -3
	xs, ys := rpDecimate(x, y, 100, false)
	if len(xs) > 400 {
		t.Errorf("%d points kept, want <= 400", len(xs))
	}
	var hi, lo float64
	for _, v := range ys {
		hi, lo = max(hi, v), min(lo, v)
	}
	if hi != 7 || lo != -3 {
		t.Errorf("extremes lost: %g %g", hi, lo)
	}
	for k := 1; k < len(xs); k++ {
		if xs[k] <= xs[k-1] {
			t.Fatal("order lost")
		}
	}
}

func BenchmarkPlot10000(b *testing.B) {
	g := rpSecondOrder(b, 0.02, 20)
	r, _ := lsys.Step(context.Background(), g, lsys.ResponseOptions{Until: 20, Step: 0.002})
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		Render(r, Options{})
	}
}

func TestAxisTickLabels(t *testing.T) {
	labels := func(ticks []plot.Tick) []string {
		var out []string
		for _, tk := range ticks {
			if tk.Label != "" {
				out = append(out, tk.Label)
			}
		}
		return out
	}
	// one style per axis: plain numbers while all are short, else 1eN
	for _, c := range []struct {
		lo, hi float64
		want   string
	}{
		{0.1, 100, "0.1 1 10 100"},
		{0.01, 1000, "0.01 0.1 1 10 100 1000"},
		{100, 1e6, "1e2 1e3 1e4 1e5 1e6"},
		{3e-4, 20, "1e-3 1e-2 1e-1 1e0 1e1"},
	} {
		if got := strings.Join(labels(rpLogTicks{}.Ticks(c.lo, c.hi)), " "); got != c.want {
			t.Errorf("log ticks %g..%g: %q want %q", c.lo, c.hi, got, c.want)
		}
	}
	// a dB axis starting just below zero labels 0, not -0
	for _, l := range labels(rpDBTicker.Ticks(-1e-9, 30)) {
		if l == "-0" {
			t.Error(`dB axis labels "-0"`)
		}
	}
}

func TestByModeChartSmallWithLegendBelow(t *testing.T) {
	// Six states: a lightly damped pair, a fast pair and two real modes,
	// 10,001 samples. The by-mode chart draws five curves; the SVG must stay
	// under 100 KB (our own target, DESIGN.md) and the legend must sit below
	// the frame (SVG y grows downward: below the x-axis label).
	a, _ := lsys.Stack(rpSecondOrder(t, 0.02, 20), rpSecondOrder(t, 0.3, 200))
	b, _ := lsys.Stack(a, rpSecondOrder(t, 2, 5))
	one, _ := lsys.NewSystem(0, 3, 1, nil, nil, nil, mat.NewDense(1, 3, []float64{1, 1, 1}), 0)
	g, err := lsys.Series(one, b)
	if err != nil {
		t.Fatal(err)
	}
	mr, err := lsys.ByMode(context.Background(), g, "step", nil, nil, lsys.ResponseOptions{Until: 20, Step: 0.002})
	if err != nil {
		t.Fatal(err)
	}
	if len(mr.Response.T) != 10001 || len(mr.Labels) != 4 {
		t.Fatalf("%d samples, parts %v", len(mr.Response.T), mr.Labels)
	}
	svg := Render(mr, Options{}).Data[SVG].(string)
	t.Logf("SVG of a 10,001-sample response split into %d parts: %d bytes", len(mr.Labels), len(svg))
	if len(svg) > 100_000 {
		t.Errorf("SVG is %d bytes, want < 100 KB", len(svg))
	}
	if again := Render(mr, Options{}).Data[SVG].(string); again != svg {
		t.Error("two renderings differ")
	}
	ypos := func(label string) float64 { return svgTextY(t, svg, label) }
	axis := ypos("time (s)")
	for _, l := range []string{"total", "mode 3: -0.4 ± 20j"} {
		if y := ypos(l); y >= axis {
			t.Errorf("legend entry %q at y %g is not below the axis label (y %g)", l, y, axis)
		}
	}
}

func TestModeLegendLabels(t *testing.T) {
	// short labels, two or three digits (our own format)
	for _, c := range []struct {
		q     int
		label string
		v     complex128
		want  string
	}{
		{0, "-5404", -5404, "mode 1: -5.4e3"},
		{1, "-2.889e+04 ± 4.182e+04j", complex(-28890, 41820), "mode 2: -2.9e4 ± 4.2e4j"},
		{2, "-100", -100, "mode 3: -100"},
		{3, "block {-1, -1}", -1, "part 4: block of 2 modes"},
		{4, "direct", cmplx.NaN(), "direct"},
	} {
		if got := rpModeLegend(c.q, c.label, c.v); got != c.want {
			t.Errorf("rpModeLegend(%d, %q) = %q, want %q", c.q, c.label, got, c.want)
		}
	}
}

func TestSimplifyWithinTolerance(t *testing.T) {
	// A straight line keeps its two ends; a sine keeps every dropped point
	// within a quarter pixel of the drawn chord (Ramer 1972; Douglas &
	// Peucker 1973: the tolerance is the algorithm's guarantee).
	x, y := make([]float64, 2000), make([]float64, 2000)
	for k := range x {
		x[k], y[k] = float64(k), 3*float64(k)
	}
	if xs, _ := rpSimplify(x, y, 0, 6000, false); len(xs) != 2 {
		t.Errorf("a straight line keeps %d points, want 2", len(xs))
	}
	for k := range x {
		y[k] = math.Sin(float64(k) / 100)
	}
	xs, ys := rpSimplify(x, y, 0, 2, false)
	if len(xs) > 400 {
		t.Errorf("a sine keeps %d of 2000 points", len(xs))
	}
	j := 0
	worst := 0.0
	for k := range x {
		for j+1 < len(xs) && xs[j+1] < x[k] {
			j++
		}
		if j+1 >= len(xs) {
			break
		}
		// distance to the chord in pixels (x: 2000 samples on 1000 px,
		// y: a span of 2 on 600 px)
		px := func(i float64) float64 { return i / 2 }
		py := func(v float64) float64 { return v / 2 * 600 }
		dx, dy := px(xs[j+1])-px(xs[j]), py(ys[j+1])-py(ys[j])
		d := math.Abs(dx*(py(y[k])-py(ys[j]))-dy*(px(x[k])-px(xs[j]))) / math.Hypot(dx, dy)
		worst = math.Max(worst, d)
	}
	if worst > 0.25 {
		t.Errorf("largest distance to the drawn line %.3g px", worst)
	}
}

// svgTextY is the height of a text in the SVG, in points from the bottom
// (texts are drawn flipped: y="-..." inside a scale(1, -1) frame).
func svgTextY(t *testing.T, svg, label string) float64 {
	t.Helper()
	i := strings.Index(svg, ">"+label+"<")
	if i < 0 {
		t.Fatalf("no text %q in the SVG", label)
	}
	j := strings.LastIndex(svg[:i], "y=\"")
	v, err := strconv.ParseFloat(svg[j+3:j+3+strings.Index(svg[j+3:], "\"")], 64)
	if err != nil {
		t.Fatal(err)
	}
	return -v
}

func TestPolarLegendBelowInWords(t *testing.T) {
	// The legend is text in words (no Greek letter, which some browsers
	// draw turned on its side), in a strip below the chart (our own layout).
	fl, err := lsys.Frequency(context.Background(), rpLoop(t), lsys.FrequencyOptions{})
	if err != nil {
		t.Fatal(err)
	}
	svg := Render(&lsys.PolarChart{Frequency: fl}, Options{}).Data[SVG].(string)
	if strings.Contains(svg, "ω") {
		t.Error("the SVG still holds an omega")
	}
	axis := svgTextY(t, svg, "real part")
	for _, l := range []string{"positive frequencies", "negative frequencies (mirror)", "critical point -1"} {
		if y := svgTextY(t, svg, l); y >= axis {
			t.Errorf("legend entry %q at %g is not below the axis label (%g)", l, y, axis)
		}
	}
}

func TestPoleZeroFramesNearPoints(t *testing.T) {
	// (s + 1e6)/((s + 1)(s^2 + 4s + 13)): poles -1, -2 +- 3j (roots by the
	// quadratic formula), a zero at -1e6. The chart frames the three poles
	// (|p| <= 3.61) and marks the zero at its edge with its value.
	g, err := lsys.Realize([][]*lsys.Rational{{{Num: lsys.Poly{1e6, 1}, Den: lsys.Poly{13, 17, 5, 1}}}}, 0)
	if err != nil {
		t.Fatal(err)
	}
	pz, _ := lsys.PoleZero(g, []complex128{-1e6}, true)
	b := Render(pz, Options{})
	txt := b.Data[Text].(string)
	if !strings.Contains(txt, "the chart shows |s| up to 3.606") || !strings.Contains(txt, "zero -1e+06") {
		t.Errorf("text %q", txt)
	}
	svg := b.Data[SVG].(string)
	if !strings.Contains(svg, "-1e+06 (off chart)") {
		t.Error("the far zero is not labelled on the chart")
	}
	// every x tick label within a few times the poles' extent
	for _, tick := range []string{">-1e+06<", ">-1000000<", ">-500000<"} {
		if strings.Contains(svg, tick) {
			t.Errorf("the frame still reaches the far zero (tick %s)", tick)
		}
	}
	// the user's radius wins
	pz.Within = 100
	txt = Render(pz, Options{}).Data[Text].(string)
	if !strings.Contains(txt, "up to 100;") {
		t.Errorf("within 100: text %q", txt)
	}
}

// A lag has no overshoot: its peak and peak time read n/a in every
// display, each with the reason (issue 8, item 5), and the text says how
// times were read.
func TestMetricsUndefinedWithReason(t *testing.T) {
	g, err := lsys.Realize([][]*lsys.Rational{{{Num: []float64{1}, Den: []float64{1, 1}}}}, 0)
	if err != nil {
		t.Fatal(err)
	}
	st, _ := lsys.Step(context.Background(), g, lsys.ResponseOptions{})
	m, _ := lsys.ResponseMetrics(st)
	b := Render(m, Options{})
	text, html := b.Data[Text].(string), b.Data[HTML].(string)
	const why = "peak n/a: no overshoot: the response does not pass its final value"
	for name, s := range map[string]string{"text": text, "html": html} {
		if !strings.Contains(s, why) || !strings.Contains(s, "refined on the exact continuous response") {
			t.Errorf("%s lacks the reason or the method:\n%s", name, s)
		}
	}
	js := b.Data[JSON].([]map[string]any)
	if u, ok := js[0]["undefined"].(map[string]any); !ok || u["peak"] != "n/a: no overshoot: the response does not pass its final value" {
		t.Errorf("JSON lacks the reason: %v", js[0])
	}
}
