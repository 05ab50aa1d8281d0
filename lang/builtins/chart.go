package builtins

import (
	"math"

	"gonum.org/v1/gonum/mat"

	"lsys/lang"
	"lsys/lsys"
)

func init() {
	register(&lang.Builtin{
		Name: "chart", Group: lang.GroupOutput,
		Returns: (*lsys.Chart)(nil),
		Params: []lang.Param{
			{Name: "result", Doc: "a result drawn as a chart: a time or frequency response, margins, loop shapes, a polar chart, a pole-zero map, a locus, an overlay ..."},
			{Name: "title", Optional: true, Doc: "the chart's title"},
			{Name: "xmin", Optional: true, Doc: "left end of the x axis, in the units the axis shows (s, rad/s, or Hz for a response asked in Hz)"},
			{Name: "xmax", Optional: true, Doc: "right end of the x axis"},
			{Name: "ymin", Optional: true, Doc: "lower end of the y axis (dB on magnitude charts); on a frequency chart it applies to the magnitude panels"},
			{Name: "ymax", Optional: true, Doc: "upper end of the y axis"},
			{Name: "xscale", Optional: true, Doc: `"log" or "linear": the x axis (a time axis on a log scale leaves out t = 0)`},
			{Name: "yscale", Optional: true, Doc: `"log": the y axis on a log scale (values at or below 0 are left out; not for dB or phase, which are logarithmic already)`},
			{Name: "outputs", Optional: true, Doc: "the outputs to show, by name, e.g. [\"angle\"] (time and frequency responses, polar charts)"},
			{Name: "width", Optional: true, Doc: "width in cm (with height)"},
			{Name: "height", Optional: true, Doc: "height in cm (with width)"},
		},
		Help: "A result's chart with a title, axis ranges, linear or log axes, chosen outputs and a size.",
		Doc: "The result keeps its tables and text; only the drawing changes, and nothing is recomputed: to evaluate a frequency response " +
			"on another range give from: and to: to frequency() itself, and chart(...) then frames what is drawn. An end left out stays automatic.",
		Examples: []string{
			"G = 4/(s^2 + 0.4*s + 4)\nchart(frequency(G), title: \"suspension mode\", xmin: 0.5, xmax: 10, ymin: -30)",
			"G = system([[-1, 0], [0, -3]], [[1], [1]], [[1, 0], [0, 1]], outputs: [\"near\", \"far\"])\nchart(response(G, step), outputs: [\"far\"], xscale: \"log\", width: 12, height: 6)",
			"G = 1/(s + 1)\nchart(response(G, impulse, until: 10), yscale: \"log\", title: \"decay on a log scale\")",
		},
		Fn: func(c *lang.Call) (any, error) {
			v := c.Value("result")
			switch v.(type) {
			case float64, complex128, string, bool, *mat.Dense, *mat.CDense, *lsys.System, *lsys.Rational:
				return nil, c.Errorf("result", "Give a result drawn as a chart, e.g. chart(frequency(G), ...).", "chart: %s has no chart", c.TypeName(v))
			}
			ch := lsys.NewChart(v)
			var err error
			if c.Given("title") {
				if ch.Title, err = c.String("title"); err != nil {
					return nil, err
				}
			}
			for _, f := range []struct {
				name string
				dst  *float64
			}{{"xmin", &ch.XMin}, {"xmax", &ch.XMax}, {"ymin", &ch.YMin}, {"ymax", &ch.YMax}, {"width", &ch.Width}, {"height", &ch.Height}} {
				if !c.Given(f.name) {
					continue
				}
				if *f.dst, err = optFloat(c, f.name); err != nil {
					return nil, err
				}
			}
			if !math.IsNaN(ch.XMin) && !math.IsNaN(ch.XMax) && !(ch.XMax > ch.XMin) {
				return nil, c.Errorf("xmax", "", "chart: xmax must be above xmin")
			}
			if !math.IsNaN(ch.YMin) && !math.IsNaN(ch.YMax) && !(ch.YMax > ch.YMin) {
				return nil, c.Errorf("ymax", "", "chart: ymax must be above ymin")
			}
			if c.Given("width") != c.Given("height") || c.Given("width") && !(ch.Width >= 4 && ch.Width <= 60 && ch.Height >= 3 && ch.Height <= 60) {
				return nil, c.Errorf("width", "Give both, e.g. width: 16, height: 10 (cm).", "chart: width and height go together, each from 4 (height 3) to 60 cm")
			}
			if c.Given("xscale") {
				if ch.XScale, err = c.String("xscale"); err != nil {
					return nil, err
				}
				if ch.XScale != "log" && ch.XScale != "linear" {
					return nil, c.Errorf("xscale", `Write xscale: "log" or xscale: "linear".`, "chart: xscale must be \"log\" or \"linear\", not %q", ch.XScale)
				}
				switch v.(type) {
				case *lsys.PolarChart, *lsys.PoleZeroMap, *lsys.Locus:
					return nil, c.Errorf("xscale", "Leave xscale out; frame the chart with xmin, xmax, ymin, ymax.", "chart: a chart in the complex plane has linear axes")
				}
				if ch.XScale == "log" && (ch.XMin <= 0 || ch.XMax <= 0) {
					return nil, c.Errorf("xscale", "", "chart: a log axis needs xmin and xmax above 0")
				}
			}
			if c.Given("yscale") {
				if ch.YScale, err = c.String("yscale"); err != nil {
					return nil, err
				}
				if ch.YScale != "log" {
					return nil, c.Errorf("yscale", `Write yscale: "log", or leave it out for the chart's own axis.`, "chart: yscale must be \"log\", not %q", ch.YScale)
				}
				switch v.(type) {
				case *lsys.Response, *lsys.Overlay:
				default:
					return nil, c.Errorf("yscale", "Magnitudes are in dB already; a log y axis is for time responses.", "chart: a log y axis is for time responses (and overlays of them)")
				}
				if ch.YMin <= 0 || ch.YMax <= 0 {
					return nil, c.Errorf("yscale", "", "chart: a log axis needs ymin and ymax above 0")
				}
			}
			if c.Given("outputs") {
				names, err := c.Strings("outputs")
				if err != nil {
					return nil, err
				}
				if ch.Value, err = lsys.SelectOutputs(v, names); err != nil {
					return nil, c.Errorf("outputs", "", "chart: %v", err)
				}
			}
			return ch, nil
		},
	})
}
