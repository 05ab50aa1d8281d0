package builtins

// Built-ins for responses and connections: time and frequency responses,
// metrics, margins, pole-zero maps, interconnection, sampling, delays and
// input signals.

import (
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"

	"gonum.org/v1/gonum/mat"

	"lsys/lang"
	"lsys/lsys"
)

var (
	sigStep    = &lsys.Signal{Kind: "step", Amp: 1, Name: "step"}
	sigImpulse = &lsys.Signal{Kind: "impulse", Amp: 1, Name: "impulse"}
	sigRamp    = &lsys.Signal{Kind: "ramp", Amp: 1, Name: "ramp"}
)

const respExample = "G = 4 / (s^2 + 0.8*s + 4)\n"

func init() {
	for _, b := range responseBuiltins() {
		register(b)
	}
	registerType((*lsys.Signal)(nil), lang.TypeInfo{Name: "an input signal"})
	registerType((*lsys.Response)(nil), lang.TypeInfo{Name: "a time response", Fields: []lang.Field{
		lang.FieldOf("t", "the sample times in s", func(r *lsys.Response) any { return lang.RealVector(r.T) }),
		lang.FieldOf("y", "the outputs, one column per output and channel (output 1 for each channel, then output 2, ...)", func(r *lsys.Response) any {
			return responseMatrix(r.Y, len(r.T))
		}),
		lang.FieldOf("u", "the input applied, one column per input (responses to an input signal only)", func(r *lsys.Response) any {
			if r.U == nil {
				return nil
			}
			return responseMatrix([][][]float64{r.U}, len(r.T))
		}),
		lang.FieldOf("kind", `"step", "impulse", "initial" or "input"`, func(r *lsys.Response) any { return r.Kind }),
	}})
	registerType((*lsys.ModalResponse)(nil), lang.TypeInfo{Name: "a response split by mode", Fields: []lang.Field{
		lang.FieldOf("response", "the whole response", func(m *lsys.ModalResponse) any { return m.Response }),
		lang.FieldOf("modes", "the eigenvalue of each part as text (\"-1 ± 2j\"), or \"direct\"", func(m *lsys.ModalResponse) any { return lang.NameList(m.Labels) }),
	}})
	metric := func(name, doc string, f func(r lsys.Metric) float64) lang.Field {
		return lang.FieldOf(name, doc, func(m *lsys.Metrics) any {
			if len(m.Rows) == 1 {
				return f(m.Rows[0])
			}
			out := make([]float64, len(m.Rows))
			for i, r := range m.Rows {
				out[i] = f(r)
			}
			return lang.RealVector(out)
		})
	}
	registerType((*lsys.Metrics)(nil), lang.TypeInfo{Name: "response metrics", Fields: []lang.Field{
		metric("rise_time", "s from 10 % to 90 % of the change (a vector when there are several outputs or channels)", func(r lsys.Metric) float64 { return r.RiseTime }),
		metric("settling_time", "s until the last entry into the band of 2 % of the change", func(r lsys.Metric) float64 { return r.SettlingTime }),
		metric("overshoot", "% of the change beyond the steady value (0 if none)", func(r lsys.Metric) float64 { return r.Overshoot }),
		metric("peak", "the extreme value beyond the steady value; nan without overshoot", func(r lsys.Metric) float64 { return r.Peak }),
		metric("peak_time", "s at the peak", func(r lsys.Metric) float64 { return r.PeakTime }),
		metric("steady", "the final value: the steady-state gain of a stable step response, else the last sample", func(r lsys.Metric) float64 { return r.Steady }),
	}})
	registerType((*lsys.Margins)(nil), lang.TypeInfo{Name: "loop margins", Fields: []lang.Field{
		lang.FieldOf("gain_margin", "1/|L| at the phase crossover that sets it; inf if there is none", func(m *lsys.Margins) any { return m.GainMargin }),
		lang.FieldOf("gain_margin_db", "the gain margin in dB", func(m *lsys.Margins) any { return m.GainMarginDB }),
		lang.FieldOf("phase_crossover", "rad/s where the phase of L crosses -180 degrees; nan if none", func(m *lsys.Margins) any { return m.PhaseCrossover }),
		lang.FieldOf("phase_margin", "degrees, 180 + the phase of L at the gain crossover that sets it; inf if none", func(m *lsys.Margins) any { return m.PhaseMargin }),
		lang.FieldOf("gain_crossover", "rad/s where |L| = 1; nan if none", func(m *lsys.Margins) any { return m.GainCrossover }),
		lang.FieldOf("delay_margin", "s of added delay the loop stands: the smallest phase margin / frequency over the gain crossovers", func(m *lsys.Margins) any { return m.DelayMargin }),
		lang.FieldOf("bandwidth", "rad/s where the closed loop falls 3 dB below its value at 0", func(m *lsys.Margins) any { return m.Bandwidth }),
		lang.FieldOf("resonant_peak", "dB, the largest gain of the closed loop", func(m *lsys.Margins) any { return m.ResonantPeak }),
		lang.FieldOf("resonant_frequency", "rad/s of the resonant peak", func(m *lsys.Margins) any { return m.ResonantFreq }),
		lang.FieldOf("stable", "whether the closed loop is stable (from its poles)", func(m *lsys.Margins) any { return m.ClosedStable }),
	}})
	registerType((*lsys.FrequencyResponse)(nil), lang.TypeInfo{Name: "a frequency response", Fields: []lang.Field{
		// .w is always in rad/s and .f in Hz, whatever hz: the chart shows.
		lang.FieldOf("w", "the frequencies in rad/s", func(f *lsys.FrequencyResponse) any { return lang.RealVector(f.W) }),
		lang.FieldOf("f", "the same frequencies in Hz", func(f *lsys.FrequencyResponse) any { return lang.RealVector(inHz(f.W)) }),
		lang.FieldOf("magnitude", "dB, one column per output and input pair (output 1 for each input, then output 2, ...)", func(f *lsys.FrequencyResponse) any {
			return frequencyColumns(f, func(i, j int) []float64 {
				mg := f.Magnitude(i, j)
				for k := range mg {
					mg[k] = 20 * math.Log10(mg[k])
				}
				return mg
			})
		}),
		lang.FieldOf("phase", "degrees, in the same columns", func(f *lsys.FrequencyResponse) any { return frequencyColumns(f, f.Phase) }),
	}})
	registerType((*lsys.PolarChart)(nil), lang.TypeInfo{Name: "a polar chart"})
	registerType((*lsys.SingularValues)(nil), lang.TypeInfo{Name: "singular values against frequency", Fields: []lang.Field{
		lang.FieldOf("w", "the frequencies in rad/s", func(sv *lsys.SingularValues) any { return lang.RealVector(sv.Frequency.W) }),
		lang.FieldOf("f", "the same frequencies in Hz", func(sv *lsys.SingularValues) any { return lang.RealVector(inHz(sv.Frequency.W)) }),
		lang.FieldOf("values", "the singular values, one row per frequency, largest first", func(sv *lsys.SingularValues) any {
			if len(sv.S) == 0 || len(sv.S[0]) == 0 {
				return nil
			}
			M := mat.NewDense(len(sv.S), len(sv.S[0]), nil)
			for k, row := range sv.S {
				M.SetRow(k, row)
			}
			return M
		}),
	}})
	registerType((*lsys.PoleZeroMap)(nil), lang.TypeInfo{Name: "a pole-zero map", Fields: []lang.Field{
		lang.FieldOf("poles", "the poles, a complex vector", func(pz *lsys.PoleZeroMap) any { return complexColumn(pz.Poles) }),
		lang.FieldOf("zeros", "the zeros, a complex vector; absent when they were not computed (the map says why)", func(pz *lsys.PoleZeroMap) any {
			if !pz.ZerosKnown {
				return nil
			}
			return complexColumn(pz.Zeros)
		}),
	}})
}

// frequencyColumns puts a figure of every (output, input) pair in columns:
// column i*inputs + j.
func frequencyColumns(f *lsys.FrequencyResponse, get func(i, j int) []float64) *mat.Dense {
	p, m := len(f.Outputs), len(f.Inputs)
	M := mat.NewDense(len(f.W), p*m, nil)
	for i := 0; i < p; i++ {
		for j := 0; j < m; j++ {
			M.SetCol(i*m+j, get(i, j))
		}
	}
	return M
}

// complexColumn is a complex column vector, [] when empty.
func complexColumn(vals []complex128) any {
	if len(vals) == 0 {
		return &lang.List{}
	}
	return mat.NewCDense(len(vals), 1, append([]complex128(nil), vals...))
}

// responseMatrix puts the samples of every (output, channel) pair in
// columns: column i*channels + c.
func responseMatrix(y [][][]float64, n int) *mat.Dense {
	cols := 0
	for i := range y {
		cols += len(y[i])
	}
	if cols == 0 || n == 0 {
		return mat.NewDense(1, 1, []float64{math.NaN()})
	}
	M := mat.NewDense(n, cols, nil)
	k := 0
	for i := range y {
		for c := range y[i] {
			M.SetCol(k, y[i][c])
			k++
		}
	}
	return M
}

// optFloat reads an optional real argument (0 when absent).
func optFloat(c *lang.Call, name string) (float64, error) {
	if !c.Has(name) || c.Value(name) == nil {
		return 0, nil
	}
	v, err := c.Float(name)
	if err != nil {
		return 0, err
	}
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return 0, c.Errorf(name, "", "%s: '%s' must be a finite number, not %s", c.Builtin.Name, name, lang.FormatNumber(v))
	}
	return v, nil
}

func vectorArg(c *lang.Call, name string) ([]float64, error) {
	M, err := c.Matrix(name)
	if err != nil {
		return nil, err
	}
	r, cc := M.Dims()
	if cc != 1 && r != 1 {
		return nil, c.Errorf(name, "Write a vector as [1, 2, 3].", "%s: '%s' must be a vector, not a %dx%d matrix", c.Builtin.Name, name, r, cc)
	}
	out := make([]float64, 0, r*cc)
	for i := 0; i < r; i++ {
		for j := 0; j < cc; j++ {
			out = append(out, M.At(i, j))
		}
	}
	return out, nil
}

func freqOptions(c *lang.Call) (lsys.FrequencyOptions, error) {
	var o lsys.FrequencyOptions
	var err error
	if o.From, err = optFloat(c, "from"); err != nil {
		return o, err
	}
	if o.To, err = optFloat(c, "to"); err != nil {
		return o, err
	}
	if o.Hz, err = c.Bool("hz"); err != nil {
		return o, err
	}
	if o.Hz {
		o.From *= 2 * math.Pi
		o.To *= 2 * math.Pi
	}
	if c.Has("delay") {
		if o.Delay, err = optFloat(c, "delay"); err != nil {
			return o, err
		}
		if o.Delay < 0 {
			return o, c.Errorf("delay", "Give the dead time in seconds, e.g. delay: 0.01.", "%s: 'delay' must be >= 0 s, not %s", c.Builtin.Name, lang.FormatNumber(o.Delay))
		}
	}
	return o, nil
}

var freqParams = []lang.Param{
	{Name: "from", Optional: true, Doc: "lowest frequency (rad/s, or Hz with hz: true); default from the modes"},
	{Name: "to", Optional: true, Doc: "highest frequency; default from the modes (sampled: the Nyquist frequency)"},
	{Name: "hz", Default: false, Doc: "true: the chart and tables in Hz instead of rad/s; the fields stay .w in rad/s and .f in Hz either way"},
	{Name: "delay", Optional: true, Doc: "a dead time T in s in series, applied exactly as e^(-jwT) (no Padé approximation)"},
}

// signalOf turns a value into an input signal: a signal, or a user
// function of time.
func signalOf(c *lang.Call, name string) (*lsys.Signal, error) {
	v := c.Value(name)
	switch x := v.(type) {
	case *lsys.Signal:
		return x, nil
	case *lang.Function, *lang.Builtin:
		fname := "u"
		if f, ok := x.(*lang.Function); ok {
			fname = f.Name
		} else {
			fname = x.(*lang.Builtin).Name
		}
		s := lsys.FuncSignal(fname, func(t float64) (float64, error) {
			if err := c.Check(); err != nil {
				return 0, err
			}
			r, err := c.Apply(v, t)
			if err != nil {
				return 0, err
			}
			switch y := r.(type) {
			case float64:
				return y, nil
			case complex128:
				if imag(y) == 0 {
					return real(y), nil
				}
			}
			return 0, fmt.Errorf("the input function %s(t) must give a real number, but gave %s at t = %s", fname, c.TypeName(r), lang.FormatNumber(t))
		})
		return &s, nil
	}
	return nil, c.Errorf(name, "Use step, impulse, ramp, sine(w), a table from load(\"file.csv\") or table(t, u), or a function f(t) = ...",
		"%s: '%s' must be an input signal, not %s", c.Builtin.Name, name, c.TypeName(v))
}

func responseBuiltins() []*lang.Builtin {
	return []*lang.Builtin{
		{
			Name: "step", Group: lang.GroupResponse, Value: sigStep,
			Help:     "The unit step input, for response(G, step).",
			Doc:      "A step of height 1 at t = 0 on each input in turn (one panel per input/output pair).",
			Examples: []string{respExample + "response(G, step)"},
		},
		{
			Name: "impulse", Group: lang.GroupResponse, Value: sigImpulse,
			Help:     "The unit impulse input, for response(G, impulse).",
			Doc:      "A unit impulse at t = 0 on each input in turn. For a continuous system the response is the free response from x(0+) = B; the impulse D*delta(t) of a direct feedthrough is not drawn. For a sampled system it is the unit-pulse response.",
			Examples: []string{respExample + "response(G, impulse)"},
		},
		{
			Name: "ramp", Group: lang.GroupResponse, Value: sigRamp,
			Help:     "The unit ramp input u(t) = t, for response(G, ramp).",
			Doc:      "Propagated exactly: the input is linear between samples (first-order hold through a block matrix exponential, Van Loan 1978).",
			Examples: []string{respExample + "response(G, ramp, until: 5)"},
		},
		{
			Name: "sine", Group: lang.GroupResponse,
			Params: []lang.Param{
				{Name: "w", Doc: "angular frequency in rad/s"},
				{Name: "amplitude", Default: 1.0, Doc: "amplitude"},
				{Name: "phase", Default: 0.0, Doc: "phase in rad"},
				{Name: "start", Default: 0.0, Doc: "the signal is zero before this time (s)"},
			},
			Help:     "A sine input amplitude*sin(w t + phase), for response(G, sine(w)).",
			Doc:      "Between samples the input is taken as linear (first-order hold), an O(h^2) approximation of the sine with the step h the response uses.",
			Examples: []string{respExample + "response(G, sine(2), until: 20)"},
			Fn: func(c *lang.Call) (any, error) {
				var w, a, ph, st float64
				err := c.Bind("w", &w, "amplitude", &a, "phase", &ph, "start", &st)
				if err != nil {
					return nil, err
				}
				for _, v := range []float64{w, a, ph, st} {
					if math.IsNaN(v) || math.IsInf(v, 0) {
						return nil, c.Errorf("", "", "sine: every argument must be a finite number")
					}
				}
				s := lsys.Sine(w, a)
				s.Phase, s.Delay = ph, st
				return &s, nil
			},
		},
		{
			Name: "table", Group: lang.GroupResponse,
			Params: []lang.Param{
				{Name: "t", Doc: "times (s), increasing"},
				{Name: "u", Doc: "values: a vector (one channel) or a matrix with one row per time and one column per input"},
				{Name: "hold", Default: lsys.HoldLinear, Doc: `"linear" between rows, or "zero-order" to hold each row until the next`},
			},
			Help:     "An input signal from a table of times and values, built in a cell.",
			Doc:      "After the last time the last row is held. With one column the same values drive every input.",
			Examples: []string{respExample + "u = table([0, 1, 2, 10], [0, 1, 1, 1], hold: \"zero-order\")\nresponse(G, u)"},
			Fn: func(c *lang.Call) (any, error) {
				t, err := vectorArg(c, "t")
				if err != nil {
					return nil, err
				}
				U, err := c.Matrix("u")
				if err != nil {
					return nil, err
				}
				r, cc := U.Dims()
				if r == 1 && cc == len(t) && cc > 1 {
					U = mat.DenseCopyOf(U.T())
					r, cc = cc, 1
				}
				if r != len(t) {
					return nil, c.Errorf("u", "", "table: %d times but %d rows of values; give one row per time", len(t), r)
				}
				rows := make([][]float64, r)
				for i := range rows {
					rows[i] = mat.Row(nil, i, U)
				}
				return makeTable(c, t, rows, "table")
			},
		},
		{
			Name: "load", Group: lang.GroupOutput,
			Params: []lang.Param{
				{Name: "file", Doc: "a CSV file beside the notebook: time in the first column, one column per input"},
				{Name: "hold", Default: lsys.HoldLinear, Doc: `"linear" between rows, or "zero-order" to hold each row until the next`},
			},
			Help: "Read an input signal from a CSV table beside the notebook.",
			Doc: "The first row may hold column names. Separators: comma (or semicolon). The file must lie in the notebook's folder " +
				"or below it. Rows must have increasing times and finite numbers.",
			Examples: []string{"# u = load(\"bench_test.csv\") reads time, then one column per input\nreadings(name) = load(name, hold: \"zero-order\")"},
			Fn: func(c *lang.Call) (any, error) {
				name, err := c.String("file")
				if err != nil {
					return nil, err
				}
				return loadTable(c, name)
			},
		},
		{
			Name: "response", Group: lang.GroupResponse,
			Returns: (*lsys.Response)(nil),
			Params: []lang.Param{
				{Name: "system", Doc: "a system or transfer function"},
				{Name: "input", Optional: true, Doc: "step, impulse, ramp, sine(w), a table, or a function f(t); leave out with initial:"},
				{Name: "initial", Optional: true, Doc: "initial state, a vector with one entry per state"},
				{Name: "until", Optional: true, Doc: "horizon in s; default from the modes"},
				{Name: "dt", Optional: true, Doc: "time step in s (continuous systems); default from the modes"},
				{Name: "by", Optional: true, Doc: `"mode": split the response into the contributions of the modes`},
			},
			Help: "Time response to a step, an impulse, an initial state or an input signal.",
			Doc: "Exact at the samples: continuous systems are propagated through one block matrix exponential per step " +
				"(Van Loan 1978) with the input held (step, tables held at zero order) or linear between samples (ramp, sine, tables, functions). " +
				"Without until/dt the horizon lets the slowest mode settle (6 time constants, 5 periods of an undamped mode, " +
				"capped at 5 time constants of a growing mode, rounded up to 1, 2 or 5 times a power of ten) and the step resolves " +
				"the fastest mode with 20 samples per period (200 to 10,000 steps). MIMO step and impulse responses have one panel " +
				"per input/output pair. by: \"mode\" splits the response into parts per mode (per invariant block where modes cannot be separated) that sum to it.",
			Examples: []string{
				respExample + "response(G, step)",
				"A = [[0, 1], [-4, -0.4]]\nG = system(A, [0, 1], [1, 0])\nresponse(G, initial: [1, 0], until: 10)",
				respExample + "response(G * 1/(s + 3), step, by: \"mode\")",
			},
			Fn: func(c *lang.Call) (any, error) {
				g, err := c.System("system")
				if err != nil {
					return nil, err
				}
				var opt lsys.ResponseOptions
				if opt.Until, err = optFloat(c, "until"); err != nil {
					return nil, err
				}
				if opt.Step, err = optFloat(c, "dt"); err != nil {
					return nil, err
				}
				var x0 []float64
				if c.Given("initial") {
					if x0, err = vectorArg(c, "initial"); err != nil {
						return nil, err
					}
					if len(x0) != g.N() {
						return nil, c.Errorf("initial", "Give one value per state: "+strings.Join(g.StateNames, ", ")+".",
							"response: the initial state has %d entries but the system has %d states", len(x0), g.N())
					}
				}
				byMode := false
				if c.Given("by") {
					by, err := c.String("by")
					if err != nil {
						return nil, err
					}
					if by != "mode" {
						return nil, c.Errorf("by", `Write by: "mode".`, "response: by must be \"mode\", not %q", by)
					}
					byMode = true
				}
				ctx := c.Context()
				done := func() {}
				if g.N() >= 200 {
					opt.Progress, done = progress(c, "response")
				}
				defer done()
				kind := "initial"
				var sig *lsys.Signal
				if c.Given("input") {
					if sig, err = signalOf(c, "input"); err != nil {
						return nil, err
					}
					switch {
					case sig.Kind == "impulse":
						if x0 != nil {
							return nil, c.Errorf("initial", "", "response: an impulse response starts from rest; leave out initial:")
						}
						kind = "impulse"
					case sig.Kind == "step" && x0 == nil:
						kind = "step"
					default:
						kind = "input"
					}
				} else if x0 == nil {
					return nil, c.Errorf("", "Give an input (step, impulse, ramp, sine(w), a table) or an initial state: response(G, initial: [1, 0]).",
						"response: nothing drives the system")
				}
				if note := lsys.ResolutionWarning(g, opt); note != "" {
					// the rule says it too, but a chart shows no rule
					c.Out().Stderr("response: " + note + "\n")
				}
				if byMode {
					return lsys.ByMode(ctx, g, kind, x0, sig, opt)
				}
				switch kind {
				case "step":
					return lsys.Step(ctx, g, opt)
				case "impulse":
					return lsys.Impulse(ctx, g, opt)
				case "initial":
					return lsys.Initial(ctx, g, x0, opt)
				}
				return lsys.Simulate(ctx, g, *sig, x0, opt)
			},
		},
		{
			Name: "metrics", Group: lang.GroupResponse,
			Returns:  (*lsys.Metrics)(nil),
			Params:   []lang.Param{{Name: "r", Doc: "a time response (usually a step response)"}},
			Help:     "Rise time (10-90 %), settling time (2 % band), overshoot, peak and peak time, steady value of a response.",
			Doc:      "Measured on the computed response, crossing times interpolated between samples. The steady value of a stable step response is the exact steady-state gain; otherwise the last sample (and the table says so). Definitions as in Ogata, Modern Control Engineering, Section 5-3.",
			Examples: []string{respExample + "metrics(response(G, step))"},
			Fn: func(c *lang.Call) (any, error) {
				switch r := c.Value("r").(type) {
				case *lsys.Response:
					return lsys.ResponseMetrics(r)
				case *lsys.ModalResponse:
					return lsys.ResponseMetrics(r.Response)
				default:
					return nil, c.TypeError("r", "a time response", r)
				}
			},
		},
		{
			Name: "frequency", Group: lang.GroupResponse,
			Returns: (*lsys.FrequencyResponse)(nil),
			Params:  append([]lang.Param{{Name: "system", Doc: "a system or transfer function"}}, freqParams...),
			Help:    "Frequency response: magnitude (dB) and unwrapped phase (degrees) against frequency.",
			Doc: "One Hessenberg reduction, then an O(n^2) complex Hessenberg solve per frequency (Laub 1981). " +
				"The range runs a decade beyond the slowest and fastest modes (sampled: up to the Nyquist frequency); " +
				"20 points per decade, refined where the magnitude moves more than 1 dB or the phase more than 5 degrees between points. " +
				"The fields .w and .f hold the frequencies in rad/s and in Hz whatever hz: the display uses.",
			Examples: []string{respExample + "frequency(G)", respExample + "frequency(G, from: 0.01, to: 10, hz: true)", respExample + "frequency(G, hz: true).f[1]"},
			Fn: func(c *lang.Call) (any, error) {
				f, err := respFrequency(c)
				if err != nil {
					return nil, err
				}
				return f, nil
			},
		},
		{
			Name: "polar", Group: lang.GroupResponse,
			Params:   append([]lang.Param{{Name: "system", Doc: "a system or transfer function (often a loop L = G*K)"}}, freqParams...),
			Help:     "The polar (Nyquist) chart: G(jw) in the complex plane, with the critical point -1.",
			Doc:      "Positive frequencies solid, their mirror image (negative frequencies) dashed. Near an integrator the curve runs off to infinity; the chart frames the finite part.",
			Examples: []string{"L = 2 / (s*(s + 1)*(s + 2))\npolar(L)"},
			Fn: func(c *lang.Call) (any, error) {
				f, err := respFrequency(c)
				if err != nil {
					return nil, err
				}
				return &lsys.PolarChart{Frequency: f}, nil
			},
		},
		{
			Name: "singular", Group: lang.GroupResponse,
			Returns:  (*lsys.SingularValues)(nil),
			Params:   append([]lang.Param{{Name: "system", Doc: "a system (MIMO)"}}, freqParams...),
			Help:     "Singular values of the frequency response against frequency (the MIMO gain).",
			Doc:      "At every frequency, the singular values of G(jw) from the real SVD of [[Re G, -Im G], [Im G, Re G]].",
			Examples: []string{"G = system([[-1, 0], [0, -3]], [[1, 0], [1, 1]], [[1, 0], [0, 1]])\nsingular(G)"},
			Fn: func(c *lang.Call) (any, error) {
				f, err := respFrequency(c)
				if err != nil {
					return nil, err
				}
				return lsys.Singular(f)
			},
		},
		{
			Name: "gain", Group: lang.GroupResponse,
			Params: []lang.Param{
				{Name: "system", Doc: "a system or transfer function"},
				{Name: "at", Optional: true, Doc: "angular frequency w in rad/s: the (complex) response G(jw)"},
			},
			Help:     "Steady-state gain G(0) (sampled: G(1)); with at: w the frequency response G(jw).",
			Doc:      "The steady-state gain is D - C A^-1 B (sampled: D + C (I - A)^-1 B); a pole at s = 0 (z = 1) makes it infinite and gives an error. A SISO system gives a number, a MIMO one a matrix.",
			Examples: []string{respExample + "gain(G)\ngain(G, at: 2)"},
			Fn: func(c *lang.Call) (any, error) {
				g, err := c.System("system")
				if err != nil {
					return nil, err
				}
				if g.M() == 0 || g.P() == 0 {
					return nil, c.Errorf("system", "", "gain: the system has no inputs or no outputs")
				}
				if !c.Given("at") {
					G, ok := lsys.DCGain(g)
					if !ok {
						return nil, c.Errorf("system", "Look at gain(G, at: w) for a small w, or remove the integrator.",
							"gain: the system has a pole at %s, so its steady-state gain is infinite", map[bool]string{true: "z = 1", false: "s = 0"}[g.Sampled()])
					}
					if g.M() == 1 && g.P() == 1 {
						return G.At(0, 0), nil
					}
					return G, nil
				}
				w, err := c.Float("at")
				if err != nil {
					return nil, err
				}
				v, err := lsys.GainAt(g, w)
				if err != nil {
					return nil, err
				}
				if len(v) == 1 {
					return v[0], nil
				}
				return mat.NewCDense(g.P(), g.M(), v), nil
			},
		},
		{
			Name: "margins", Group: lang.GroupResponse,
			Returns: (*lsys.Margins)(nil),
			Params:  append([]lang.Param{{Name: "loop", Doc: "the loop transfer function L (SISO), negative feedback assumed"}}, freqParams...),
			Help:    "Gain, phase, delay and modulus margins with all crossovers; closed-loop bandwidth and resonant peak; a chart of the loop's distance from -1.",
			Doc: "Crossovers are bracketed on the adaptive frequency grid and refined by bisection. The gain margin is the one of smallest |dB| " +
				"over the phase crossovers, the phase margin the smallest over the gain crossovers, the delay margin PM/w minimised over gain crossovers. " +
				"The modulus margin is the smallest distance of L(jw) from the critical point -1, min |1 + L| (the inverse of the peak sensitivity), refined between grid points by golden-section search. " +
				"The chart draws that distance |1 + L| over frequency, with the modulus margin and the gain and phase crossovers marked on it (at a gain crossover the distance is 2 sin(PM/2), at a phase crossover |1 - |L||). " +
				"Bandwidth and resonant peak are those of T = L/(1 + L). The margins mean something only if the closed loop is stable; the display says whether it is.",
			Examples: []string{"L = 2 / (s*(s + 1)*(s + 2))\nmargins(L)"},
			Fn: func(c *lang.Call) (any, error) {
				g, err := c.System("loop")
				if err != nil {
					return nil, err
				}
				o, err := freqOptions(c)
				if err != nil {
					return nil, err
				}
				return lsys.LoopMargins(c.Context(), g, o)
			},
		},
		{
			Name: "polezero", Group: lang.GroupResponse,
			Returns: (*lsys.PoleZeroMap)(nil),
			Params: []lang.Param{{Name: "system", Doc: "a system or transfer function"},
				{Name: "within", Optional: true, Doc: "radius of the region shown (1/s; sampled: in the z-plane); points beyond it are marked at the edge with their value"}},
			Help: "The pole-zero map: poles as crosses, zeros as circles, with damping and natural-frequency grid (sampled: the unit circle).",
			Doc: "Zeros are the invariant zeros (zeros(G)), so decoupling zeros show on top of the poles they cancel. " +
				"Without within: the chart frames the points below the widest gap (a factor of 5 or more in distance from the origin) above the nearer half of them, else up to 10 times the median distance, and marks farther ones at its edge with their value.",
			Examples: []string{"G = (s + 2) / (s^3 + 2*s^2 + 5*s + 1)\npolezero(G)"},
			Fn: func(c *lang.Call) (any, error) {
				g, err := c.System("system")
				if err != nil {
					return nil, err
				}
				var zeros []complex128
				known := false
				if g.N() > 0 && g.M() > 0 && g.P() > 0 {
					if zs, err := lsys.Zeros(g, 0); err == nil {
						zeros, known = zs.Invariant, true
					}
				} else {
					known = true
				}
				pz, err := lsys.PoleZero(g, zeros, known)
				if err != nil || !c.Given("within") {
					return pz, err
				}
				r, err := c.Float("within")
				if err != nil {
					return nil, err
				}
				if !(r > 0) || math.IsInf(r, 0) {
					return nil, c.Errorf("within", "Give the radius of the region to show, e.g. within: 1e5", "polezero: 'within' must be a positive number, not %s", lang.FormatNumber(r))
				}
				pz.Within = r
				return pz, nil
			},
		},
		{
			Name: "closeloop", Group: lang.GroupResponse,
			Params: []lang.Param{
				{Name: "G", Doc: "the forward path, from the loop's input (after the summing point) to its output"},
				{Name: "through", Default: 1.0, NamedOnly: true, Formerly: "K", Doc: "the return path from the output back to the summing point; 1 (the default) returns the output itself"},
				{Name: "sense", Default: "negative", NamedOnly: true, Formerly: "sign", Doc: `"negative": the returned signal is subtracted from the reference; "positive": added to it`},
			},
			Help: "Close a feedback loop around G, returning its output through a block to a summing point at its input.",
			Doc: "The loop's input is the reference r; the summing point gives G the reference minus the returned signal (sense \"negative\") or plus it (\"positive\"). " +
				"Outputs are named as G's; the inputs carry the reference and are named r1, r2, ...; states are G's then those of the return path. With direct feedthrough on both sides the loop is algebraic and must be well posed " +
				"(the identity minus or plus the product of the two feedthroughs invertible). For a controller C in the forward path write closeloop(G*C).",
			Examples: []string{"P = 2 / (s*(s + 1))\nT = closeloop(P * (s + 3)/(s + 5))\nresponse(T, step)",
				"P = 2 / (s*(s + 1))\nsensor = 10 / (s + 10)\nclosedloop = closeloop(P, through: sensor, sense: \"negative\")\npoles(closedloop)"},
			Fn: func(c *lang.Call) (any, error) {
				g, err := c.System("G")
				if err != nil {
					return nil, err
				}
				how, isWord := c.Value("sense").(string)
				if !isWord || (how != "negative" && how != "positive") {
					return nil, c.Errorf("sense", `Write sense: "negative" (the returned signal is subtracted) or sense: "positive" (added).`,
						"closeloop: the sense of the feedback is \"negative\" or \"positive\", not %s", lang.FormatValue(c.Value("sense")))
				}
				sign := -1.0
				if how == "positive" {
					sign = 1
				}
				var k *lsys.System
				if kv, ok := c.Value("through").(float64); ok && g.M() == g.P() {
					// a number in the return path: that gain on every channel
					D := mat.NewDense(g.P(), g.P(), nil)
					for i := 0; i < g.P(); i++ {
						D.Set(i, i, kv)
					}
					if k, err = lsys.NewSystem(0, g.P(), g.M(), nil, nil, nil, D, g.Ts); err != nil {
						return nil, err
					}
				} else if k, err = c.System("through"); err != nil {
					return nil, err
				}
				return lsys.CloseLoop(g, k, sign)
			},
		},
		{
			Name: "stack", Group: lang.GroupResponse,
			Params:   []lang.Param{{Name: "systems", Variadic: true, Doc: "two or more systems"}},
			Help:     "Block-diagonal combination: the systems side by side, inputs and outputs concatenated.",
			Doc:      "Names are kept; a repeated name gets a suffix _2, _3, ...",
			Examples: []string{"stack(1/(s + 1), 2/(s + 3))"},
			Fn: func(c *lang.Call) (any, error) {
				gs, err := systemsOf(c)
				if err != nil {
					return nil, err
				}
				return lsys.Stack(gs...)
			},
		},
		{
			Name: "wire", Group: lang.GroupResponse, Formerly: []string{"connect"},
			Params: []lang.Param{
				{Name: "blocks", Variadic: true, Doc: "the blocks to wire together, with named signals; then optionally outputs: [names] to keep (default: every block output)"},
			},
			AnyNamed: true,
			Help:     "Wire blocks together by signal name: every input named like some block's output is fed by it; the other inputs stay external.",
			Doc: "Output names must be unique across the blocks. Blocks sharing an external input name share that input. " +
				"Algebraic loops through direct feedthroughs must be well posed.",
			Examples: []string{
				"plant = system(2/(s*(s + 1)), inputs: [\"torque\"], outputs: [\"angle\"])\n" +
					"C = (s + 3)/(s + 5)\n" +
					"ctrl = system([[C, -C]], inputs: [\"ref\", \"angle\"], outputs: [\"torque\"])\n" +
					"wire(plant, ctrl, outputs: [\"angle\"])",
			},
			Fn: func(c *lang.Call) (any, error) {
				gs, err := systemsOf(c)
				if err != nil {
					return nil, err
				}
				var outs []string
				for _, nv := range c.Extra {
					if nv.Name != "outputs" {
						return nil, c.ErrorAt(nv.Pos, `Usage: wire(block1, block2, ..., outputs: ["name"]).`, "wire has no argument named '%s'", nv.Name)
					}
					l, ok := nv.Value.(*lang.List)
					if s, isStr := nv.Value.(string); isStr {
						outs = []string{s}
						continue
					}
					if !ok {
						return nil, c.ErrorAt(nv.Pos, `Write outputs: ["angle"].`, "wire: outputs must be a list of names")
					}
					outs = []string{}
					for i, it := range l.Items {
						s, ok := it.(string)
						if !ok {
							return nil, c.ErrorAt(nv.Pos, `Write outputs: ["angle"].`, "wire: output %d must be a name in quotes, not %s", i+1, c.TypeName(it))
						}
						outs = append(outs, s)
					}
				}
				return lsys.Wire(gs, outs)
			},
		},
		{
			Name: "sample", Group: lang.GroupResponse,
			Params: []lang.Param{
				{Name: "system", Doc: "a continuous system"},
				{Name: "T", Doc: "sample period in s"},
				{Name: "by", Default: lsys.ZeroOrderHold, Formerly: "method", Doc: `"zero-order hold", "first-order hold", "bilinear" or "matched pole-zero"`},
				{Name: "prewarp", Default: 0.0, Doc: "bilinear only: the prewarp frequency (rad/s), where the sampled response equals the continuous one exactly"},
			},
			Help: "The sampled equivalent of a continuous system.",
			Doc: "By zero-order hold: exact for inputs held between samples (block matrix exponential, Van Loan 1978); by first-order hold: exact for inputs linear between samples " +
				"(triangle hold); bilinear: the substitution s = (2/T)(z - 1)/(z + 1), with a prewarp frequency where the response is to match exactly; matched pole-zero: poles and zeros mapped by z = e^(sT) (SISO).",
			Examples: []string{respExample + "Gd = sample(G, 0.1)\nresponse(Gd, step)", respExample + "sample(G, 0.1, by: \"bilinear\", prewarp: 2)"},
			Fn: func(c *lang.Call) (any, error) {
				var g *lsys.System
				var T, pw float64
				var method string
				if err := c.Bind("system", &g, "T", &T, "by", &method, "prewarp", &pw); err != nil {
					return nil, err
				}
				if err := checkMethod(c, method, lsys.SampleMethods); err != nil {
					return nil, err
				}
				return lsys.Sample(g, T, method, pw)
			},
		},
		{
			Name: "continuous", Group: lang.GroupResponse,
			Params: []lang.Param{
				{Name: "system", Doc: "a sampled system"},
				{Name: "by", Default: lsys.ZeroOrderHold, Formerly: "method", Doc: `how it was sampled: "zero-order hold", "first-order hold" or "bilinear"`},
				{Name: "prewarp", Default: 0.0, Doc: "bilinear only: the prewarp frequency used when sampling"},
			},
			Help:     "The continuous system whose sampled equivalent is the given one (the inverse of sample).",
			Doc:      "Zero-order and first-order hold: through the principal matrix logarithm (refused when a pole lies on the negative real axis of the z-plane); bilinear: the inverse substitution (refused for a pole at z = -1).",
			Examples: []string{respExample + "continuous(sample(G, 0.1))", respExample + "continuous(sample(G, 0.1, by: \"first-order hold\"), by: \"first-order hold\")"},
			Fn: func(c *lang.Call) (any, error) {
				var g *lsys.System
				var method string
				var pw float64
				if err := c.Bind("system", &g, "by", &method, "prewarp", &pw); err != nil {
					return nil, err
				}
				if err := checkMethod(c, method, lsys.SampleMethods); err != nil {
					return nil, err
				}
				return lsys.Continuous(g, method, pw)
			},
		},
		{
			Name: "delay", Group: lang.GroupResponse,
			Params: []lang.Param{
				{Name: "T", Doc: "dead time in s"},
				{Name: "order", Default: 3.0, Doc: "order of the Pade approximant, 1 to 10"},
			},
			Help: "A rational (Pade) approximant of the dead time e^(-sT), as a transfer function.",
			Doc: "The diagonal [n/n] Pade approximant (Golub & Van Loan, Matrix Computations, Section 9.3.1): all-pass, phase exact to order (wT)^(2n+1). " +
				"Use it where a finite state model is needed (time responses, closed-loop poles). For frequency analysis give the dead time itself instead: " +
				"frequency(G, delay: T), polar(L, delay: T) and margins(L, delay: T) use e^(-jwT) exactly.",
			Examples: []string{"P = 1/(s + 1) * delay(0.2, order: 3)\nresponse(P, step)"},
			Fn: func(c *lang.Call) (any, error) {
				var T float64
				var n int
				if err := c.Bind("T", &T, "order", &n); err != nil {
					return nil, err
				}
				return lsys.Pade(T, n)
			},
		},
	}
}

// shortMethods are abbreviations of sampling methods met elsewhere: each
// gets an error naming lsys's words for it.
var shortMethods = map[string]string{"zoh": lsys.ZeroOrderHold, "foh": lsys.FirstOrderHold, "tustin": lsys.Bilinear, "matched": lsys.MatchedPoleZero}

// checkMethod accepts one of methods, the trade's words in full, for the
// argument by: of sample and continuous.
func checkMethod(c *lang.Call, method string, methods []string) error {
	for _, m := range methods {
		if method == m {
			return nil
		}
	}
	quoted := make([]string, len(methods))
	for i, m := range methods {
		quoted[i] = strconv.Quote(m)
	}
	list := strings.Join(quoted[:len(quoted)-1], ", ") + " or " + quoted[len(quoted)-1]
	if full, ok := shortMethods[strings.ToLower(method)]; ok {
		return c.Errorf("by", "Write by: "+strconv.Quote(full)+".", "%s: the method is written in full: did you mean %q?", c.Builtin.Name, full)
	}
	return c.Errorf("by", "Write one of "+list+".", "%s: unknown method %q%s", c.Builtin.Name, method, lang.DidYouMean(method, methods))
}

// progress shows "what: 40 %" in a display that updates in steps of 10 %
// (update_display_data in the kernel) and empties it when done.
func progress(c *lang.Call, what string) (func(float64), func()) {
	const id = "lsys-response-progress"
	shown, last := false, -1
	step := func(f float64) {
		pct := int(f*10) * 10
		if pct == last {
			return
		}
		last = pct
		c.Progress(id, fmt.Sprintf("%s: %d %%", what, pct), !shown)
		shown = true
	}
	end := func() {
		if shown {
			c.Progress(id, "", false)
		}
	}
	return step, end
}

func systemsOf(c *lang.Call) ([]*lsys.System, error) {
	if len(c.Rest) == 0 {
		return nil, c.Errorf("", c.HelpHint(), "%s: give at least one system", c.Builtin.Name)
	}
	out := make([]*lsys.System, len(c.Rest))
	for i, v := range c.Rest {
		g, err := c.ToSystem(v, c.RestPos[i])
		if err != nil {
			return nil, err
		}
		if g == nil {
			return nil, c.ErrorAt(c.RestPos[i], c.HelpHint(), "%s: argument %d must be a system, not %s", c.Builtin.Name, i+1, c.TypeName(v))
		}
		out[i] = g
	}
	return out, nil
}

func makeTable(c *lang.Call, t []float64, rows [][]float64, name string) (any, error) {
	hold, err := c.String("hold")
	if err != nil {
		return nil, err
	}
	if hold == "zoh" {
		return nil, c.Errorf("hold", `Write hold: "zero-order".`, "%s: the hold is written in words: did you mean \"zero-order\"?", c.Builtin.Name)
	}
	if hold != lsys.HoldLinear && hold != lsys.HoldZeroOrder {
		return nil, c.Errorf("hold", `Write hold: "linear" or hold: "zero-order".`, "%s: hold must be \"linear\" or \"zero-order\", not %q", c.Builtin.Name, hold)
	}
	s, err := lsys.TableSignal(t, rows, name)
	if err != nil {
		return nil, err
	}
	s.Hold = hold
	return &s, nil
}

// loadTable reads a CSV file from the notebook's folder (or below it).
func loadTable(c *lang.Call, name string) (any, error) {
	if name == "" || filepath.IsAbs(name) || strings.Contains(filepath.ToSlash(filepath.Clean(name)), "../") || filepath.Clean(name) == ".." {
		return nil, c.Errorf("file", "Put the file in the notebook's folder and give its name, e.g. load(\"test_run.csv\").",
			"load: %q is outside the notebook's folder", name)
	}
	dir := c.Dir()
	if dir == "" {
		dir = "."
	}
	// Links are followed, then the target must still lie in the folder and
	// be a regular file: a link out of the folder (to /etc/passwd) or a
	// named pipe (which would block the cell for ever) is refused before
	// anything is read, and the error says nothing about the target.
	outside := c.Errorf("file", "Copy the data into the notebook's folder and load the copy.", "load: %q leads outside the notebook's folder", name)
	base, err := filepath.EvalSymlinks(dir)
	if err != nil {
		return nil, c.Errorf("file", "", "load: the notebook's folder cannot be read: %v", err)
	}
	base, _ = filepath.Abs(base)
	target, err := filepath.EvalSymlinks(filepath.Join(dir, filepath.Clean(name)))
	if err != nil {
		if errors.Is(err, os.ErrNotExist) {
			return nil, c.Errorf("file", "Check the name; the file must lie beside the notebook.", "load: there is no file %q beside the notebook", name)
		}
		return nil, outside
	}
	target, _ = filepath.Abs(target)
	if rel, err := filepath.Rel(base, target); err != nil || rel == ".." || strings.HasPrefix(rel, ".."+string(filepath.Separator)) {
		return nil, outside
	}
	if st, err := os.Stat(target); err != nil || !st.Mode().IsRegular() {
		return nil, c.Errorf("file", "Save the data as an ordinary CSV file and load that.", "load: %q is not an ordinary file", name)
	}
	f, err := os.Open(target)
	if err != nil {
		return nil, c.Errorf("file", "", "load: cannot open %q: %v", name, err)
	}
	defer f.Close()
	br := io.LimitReader(f, 64<<20)
	raw, err := io.ReadAll(br)
	if err != nil {
		return nil, c.Errorf("file", "", "load: cannot read %q: %v", name, err)
	}
	text := string(raw)
	sep := ','
	if !strings.Contains(text, ",") && strings.Contains(text, ";") {
		sep = ';'
	}
	rd := csv.NewReader(strings.NewReader(text))
	rd.Comma = sep
	rd.Comment = '#'
	rd.TrimLeadingSpace = true
	recs, err := rd.ReadAll()
	if err != nil {
		return nil, c.Errorf("file", "Every row needs the same number of columns.", "load: %q is not a valid CSV table: %v", name, err)
	}
	var t []float64
	var rows [][]float64
	for i, rec := range recs {
		if len(rec) < 2 {
			return nil, c.Errorf("file", "Write time in the first column and at least one column of values.", "load: row %d of %q has %d column(s)", i+1, name, len(rec))
		}
		vals := make([]float64, len(rec))
		numeric := true
		for j, f := range rec {
			v, err := strconv.ParseFloat(strings.TrimSpace(f), 64)
			if err != nil {
				numeric = false
				break
			}
			vals[j] = v
		}
		if !numeric {
			if i == 0 {
				continue // a header row of names
			}
			return nil, c.Errorf("file", "Every row after the header must hold numbers only.", "load: row %d of %q is not all numbers", i+1, name)
		}
		t = append(t, vals[0])
		rows = append(rows, vals[1:])
	}
	if len(t) == 0 {
		return nil, c.Errorf("file", "", "load: %q holds no rows of numbers", name)
	}
	return makeTable(c, t, rows, filepath.Base(name))
}

// respFrequency is the frequency response of the call's "system" argument
// over the range its frequency arguments give.
func respFrequency(c *lang.Call) (*lsys.FrequencyResponse, error) {
	g, err := c.System("system")
	if err != nil {
		return nil, err
	}
	o, err := freqOptions(c)
	if err != nil {
		return nil, err
	}
	return lsys.Frequency(c.Context(), g, o)
}

// inHz converts angular frequencies (rad/s) to Hz.
func inHz(w []float64) []float64 {
	f := make([]float64, len(w))
	for i, v := range w {
		f[i] = v / (2 * math.Pi)
	}
	return f
}
