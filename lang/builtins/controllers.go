package builtins

import (
	"math"

	"lsys/lang"
	"lsys/lsys"
)

// Controller building blocks with physical parameters (issue 15). Each
// returns a transfer function in s; its doc gives the equation block that
// realizes it, and the tests hold the two to each other.

func init() {
	registerType((*lsys.LoopShape)(nil), lang.TypeInfo{Name: "loop shapes", Fields: []lang.Field{
		lang.FieldOf("peak_s", "the largest |S| = |1/(1 + L)|, a ratio", func(l *lsys.LoopShape) any { return l.Peak[0] }),
		lang.FieldOf("peak_t", "the largest |T| = |L/(1 + L)|", func(l *lsys.LoopShape) any { return l.Peak[1] }),
		lang.FieldOf("peak_ps", "the largest |P/(1 + L)|: input disturbance to output", func(l *lsys.LoopShape) any { return l.Peak[2] }),
		lang.FieldOf("peak_cs", "the largest |C/(1 + L)|: reference to control effort", func(l *lsys.LoopShape) any { return l.Peak[3] }),
		lang.FieldOf("modulus_margin", "1/peak_s: the smallest distance from L(jw) to -1", func(l *lsys.LoopShape) any { return l.ModulusMargin }),
		lang.FieldOf("w", "the frequencies in rad/s", func(l *lsys.LoopShape) any { return lang.RealVector(l.Frequency.W) }),
		lang.FieldOf("stable", "whether the closed loop is stable (from its poles)", func(l *lsys.LoopShape) any { return l.ClosedStable }),
	}})
	register(
		&lang.Builtin{
			Name: "loopshapes", Group: lang.GroupResponse,
			Returns: (*lsys.LoopShape)(nil),
			Params: append([]lang.Param{
				{Name: "plant", Doc: "the plant P (SISO)"},
				{Name: "controller", Doc: "the controller C (SISO) in the forward path; negative unity feedback"},
			}, freqParams...),
			Help: "The four closed-loop transfer functions of the loop P C on one chart, with their peaks: S, T, P S and C S; the modulus margin 1/max|S|.",
			Doc: "S = 1/(1 + L) (output disturbance to output), T = L/(1 + L) (reference to output), PS = P/(1 + L) (input disturbance to output), " +
				"CS = C/(1 + L) (reference to control effort), L = P C. Peaks are refined between grid points by golden-section search. " +
				"A dead time (delay: T) belongs to the plant and is applied exactly; closed-loop stability is then judged on a Padé model, and the note says which. " +
				"Common practice asks max|S| below 2 (6 dB; a modulus margin above 0.5) and max|T| below 1.5 (3.5 dB).",
			Examples: []string{
				"P = 1/(s*(s + 1))\nloopshapes(P, leadlag(3, 50, gain: 9))",
				"P = 4/(s + 1)\nloopshapes(P, threeterm(1, integral: 0.8), delay: 0.1).modulus_margin",
			},
			Fn: func(c *lang.Call) (any, error) {
				var p, k *lsys.System
				if err := c.Bind("plant", &p, "controller", &k); err != nil {
					return nil, err
				}
				o, err := freqOptions(c)
				if err != nil {
					return nil, err
				}
				return lsys.LoopShapes(c.Context(), p, k, o)
			},
		},
		&lang.Builtin{
			Name: "threeterm", Group: lang.GroupDesign,
			Params: []lang.Param{
				{Name: "gain", Doc: "proportional gain kp"},
				{Name: "integral", Default: math.Inf(1), Doc: "integral time ti in s; inf (the default): no integral action"},
				{Name: "derivative", Default: 0.0, Doc: "derivative time td in s; 0 (the default): no derivative action"},
				{Name: "filter", Default: 10.0, Doc: "ratio n of td to the derivative filter's time constant td/n (common practice: 5 to 20)"},
				{Name: "form", Default: "rational", Doc: `"rational" (a transfer function) or "block" (a system with the states of its equation block, input e, output u)`},
			},
			Help: "Proportional-integral-derivative controller with a filtered derivative: kp (1 + 1/(ti s) + td s/(td/n s + 1)).",
			Doc: "The parallel form with times. The same controller as an equation block (tf = td/n):\n\n" +
				"    system {\n      states integral, filtered\n      inputs e\n      outputs u\n" +
				"      integral' = e/ti\n      filtered' = (e - filtered)/tf\n      u = kp*(e + integral + td*(e - filtered)/tf)\n    }\n\n" +
				"The filter keeps the derivative's gain bounded at kp (1 + n) above the corner n/td. " +
				"With form: \"block\" the result is that block as a system (states integral and filtered, input e, output u): the form firmware runs.",
			Examples: []string{
				"C = threeterm(2, integral: 0.5, derivative: 0.1)\nC",
				"threeterm(2, integral: 0.5, derivative: 0.1, form: \"block\")",
				"P = 1/(s*(s + 1))\nmargins(P * threeterm(2, integral: 5, derivative: 0.5, filter: 8))",
			},
			Fn: func(c *lang.Call) (any, error) {
				var kp, ti, td, n float64
				if err := c.Bind("gain", &kp, "integral", &ti, "derivative", &td, "filter", &n); err != nil {
					return nil, err
				}
				return blockForm(c, func() (any, error) { return lsys.ThreeTerm(kp, ti, td, n) }, func() (any, error) { return lsys.ThreeTermBlock(kp, ti, td, n) })
			},
		},
		&lang.Builtin{
			Name: "leadlag", Group: lang.GroupDesign,
			Params: []lang.Param{
				{Name: "w", Doc: "frequency in rad/s where the section shifts the phase most"},
				{Name: "phase", Doc: "the phase shift there, in degrees: positive for lead, negative for lag; strictly between -90 and 90"},
				{Name: "gain", Default: 1.0, Doc: "the gain |C(jw)| at w"},
				{Name: "form", Default: "rational", Doc: `"rational" (a transfer function) or "block" (a system with the states of its equation block, input e, output u)`},
			},
			Help: "First-order lead (phase > 0) or lag (phase < 0) section: the given phase shift at w, the most anywhere, with gain |C(jw)| = gain.",
			Doc: "C(s) = k sqrt(a) (s/wz + 1)/(s/wp + 1), a = (1 - sin phase)/(1 + sin phase), wz = w sqrt(a), wp = w/sqrt(a): " +
				"the zero and the pole symmetric about w on a log scale (common practice). A lead of 60 degrees spreads them by a factor 1/a = 14. " +
				"The same section as an equation block:\n\n" +
				"    system {\n      states x\n      inputs e\n      outputs u\n      x' = wp*(e - x)\n      u = k*sqrt(a)*(wp/wz*e + (1 - wp/wz)*x)\n    }\n\n" +
				"form: \"block\" gives that system.",
			Examples: []string{
				"leadlag(10, 45)",
				"P = 1/(s*(s + 1))\nmargins(P * leadlag(3, 50, gain: 9))",
			},
			Fn: func(c *lang.Call) (any, error) {
				var w, ph, k float64
				if err := c.Bind("w", &w, "phase", &ph, "gain", &k); err != nil {
					return nil, err
				}
				return blockForm(c, func() (any, error) { return lsys.LeadLag(w, ph, k) }, func() (any, error) { return lsys.LeadLagBlock(w, ph, k) })
			},
		},
		&lang.Builtin{
			Name: "notch", Group: lang.GroupDesign,
			Params: []lang.Param{
				{Name: "w", Doc: "the notch frequency in rad/s"},
				{Name: "depth", Default: 0.1, Doc: "the gain at w, a ratio from 0 up to 1 (0.1 = -20 dB; 0: a true zero)"},
				{Name: "width", Default: 0.5, Doc: "the relative width: about (w2 - w1)/w between the -3 dB points, when small"},
				{Name: "form", Default: "rational", Doc: `"rational" (a transfer function) or "block" (a system with the states of its equation block, input e, output u)`},
			},
			Help: "Notch section: gain depth at w, 1 far from it: (s^2 + 2 zz w s + w^2)/(s^2 + 2 zp w s + w^2).",
			Doc: "zp = width/2, zz = depth*zp, so that C(jw) = depth exactly. The same section as an equation block:\n\n" +
				"    system {\n      states a, b\n      inputs e\n      outputs u\n      a' = b\n      b' = e - w^2*a - 2*zp*w*b\n      u = e + 2*(zz - zp)*w*b\n    }\n\n" +
				"form: \"block\" gives that system.",
			Examples: []string{"frequency(notch(50, depth: 0.05, width: 0.3))"},
			Fn: func(c *lang.Call) (any, error) {
				var w, d, wd float64
				if err := c.Bind("w", &w, "depth", &d, "width", &wd); err != nil {
					return nil, err
				}
				return blockForm(c, func() (any, error) { return lsys.Notch(w, d, wd) }, func() (any, error) { return lsys.NotchBlock(w, d, wd) })
			},
		},
		&lang.Builtin{
			Name: "lowpass", Group: lang.GroupDesign,
			Params: []lang.Param{
				{Name: "w", Doc: "the corner frequency in rad/s"},
				{Name: "order", Default: 1.0, Doc: "1 or 2"},
				{Name: "damping", Default: math.Sqrt(0.5), Doc: "order 2: the damping ratio (0.7071, the default, is maximally flat)"},
				{Name: "form", Default: "rational", Doc: `"rational" (a transfer function) or "block" (a system with the states of its equation block, input e, output u)`},
			},
			Help: "Low-pass section of unit steady-state gain: w/(s + w), or w^2/(s^2 + 2 z w s + w^2).",
			Doc: "As equation blocks: order 1 `x' = w*(e - x)`, `u = x`; order 2 `a' = b`, `b' = w^2*(e - a) - 2*z*w*b`, `u = a`. " +
				"Cascade sections for a higher order; form: \"block\" gives the block as a system.",
			Examples: []string{"lowpass(100, order: 2)", "response(lowpass(100, order: 2, damping: 0.3), step)"},
			Fn: func(c *lang.Call) (any, error) {
				var w, z float64
				var n int
				if err := c.Bind("w", &w, "order", &n, "damping", &z); err != nil {
					return nil, err
				}
				return blockForm(c, func() (any, error) { return lsys.LowPass(w, n, z) }, func() (any, error) { return lsys.LowPassBlock(w, n, z) })
			},
		},
	)
}

// blockForm returns the rational form or, with form: "block", the system
// of the equation block.
func blockForm(c *lang.Call, rational, block func() (any, error)) (any, error) {
	form, err := c.String("form")
	if err != nil {
		return nil, err
	}
	switch form {
	case "rational":
		return rational()
	case "block":
		return block()
	}
	return nil, c.Errorf("form", `Write form: "rational" or form: "block".`, "%s: form must be \"rational\" or \"block\", not %q", c.Builtin.Name, form)
}
