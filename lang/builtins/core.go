package builtins

// Core built-ins of the language: output, constants, numbers and
// elementary functions, matrix tools, grids, and building systems in
// matrix form. Other files add theirs the same way (see the package doc in registry.go).

import (
	"fmt"
	"math"
	"math/cmplx"
	"strings"
	"time"
	"unicode/utf8"

	"gonum.org/v1/gonum/mat"

	"lsys/lang"
	"lsys/lsys"
)

func init() {
	for _, b := range coreBuiltins() {
		register(b)
	}
}

func coreBuiltins() []*lang.Builtin {
	bs := []*lang.Builtin{
		{
			Name: "print", Group: lang.GroupOutput,
			Params:   []lang.Param{{Name: "values", Variadic: true, Doc: "values to write, separated by spaces"}},
			Help:     "Write values as text to the cell's standard output.",
			Doc:      "Strings are written as they are, other values in their text form. Several values are separated by spaces and the line ends with a newline.",
			Examples: []string{`k = 3.1` + "\n" + `print("stiffness", k, "N m/rad")`},
			Fn: func(c *lang.Call) (any, error) {
				c.Out().Stdout(joinValues(c, c.Rest) + "\n")
				return nil, nil
			},
		},
		{
			Name: "warn", Group: lang.GroupOutput,
			Params:   []lang.Param{{Name: "values", Variadic: true, Doc: "values to write, separated by spaces"}},
			Help:     "Write values as text to the cell's error stream (shown highlighted).",
			Doc:      "Like print, but on the error stream, for cautions that should stand out. The cell goes on running.",
			Examples: []string{`warn("the model is not validated above 50 Hz")`},
			Fn: func(c *lang.Call) (any, error) {
				c.Out().Stderr(joinValues(c, c.Rest) + "\n")
				return nil, nil
			},
		},
		{
			Name: "show", Group: lang.GroupOutput,
			Params:   []lang.Param{{Name: "value", Doc: "any value"}},
			Help:     "Display a value now, with its rich display (tables, plots), besides the cell's result.",
			Doc:      "Only the last expression of a cell is displayed as its result; show displays other values on the way.",
			Examples: []string{"A = [[0, 1], [-4, -0.4]]\nshow(A)\nA * A"},
			Fn: func(c *lang.Call) (any, error) {
				c.Out().Display(c.Value("value"), "")
				return nil, nil
			},
		},
		{
			Name: "clear", Group: lang.GroupOutput,
			Params:   []lang.Param{{Name: "wait", Default: false, Doc: "true: clear only when the next output arrives (no flicker)"}},
			Help:     "Clear the cell's output shown so far.",
			Doc:      "Useful in a cell that shows progress and then its result.",
			Examples: []string{"print(\"working\")\nclear()\nprint(\"done\")"},
			Fn: func(c *lang.Call) (any, error) {
				w, err := c.Bool("wait")
				if err != nil {
					return nil, err
				}
				c.Out().ClearOutput(w)
				return nil, nil
			},
		},
		{
			Name: "pause", Group: lang.GroupOutput,
			Params:   []lang.Param{{Name: "seconds", Doc: "how long to wait, at most 3600"}},
			Help:     "Wait for a number of seconds (an interrupt ends the wait).",
			Doc:      "For demonstrations and for testing interrupts; analysis never needs it.",
			Examples: []string{"pause(0.01)"},
			Fn: func(c *lang.Call) (any, error) {
				sec, err := c.Float("seconds")
				if err != nil {
					return nil, err
				}
				if sec < 0 || sec > 3600 {
					return nil, c.Errorf("seconds", "", "pause takes 0 to 3600 seconds, not %s", lang.FormatNumber(sec))
				}
				t := time.NewTimer(time.Duration(sec * float64(time.Second)))
				defer t.Stop()
				select {
				case <-t.C:
					return nil, nil
				case <-c.Context().Done():
					return nil, c.Context().Err()
				}
			},
		},
		{
			Name: "pi", Group: lang.GroupMath, Value: math.Pi,
			Help:     "The number pi = 3.14159...",
			Examples: []string{"f = 50\n2*pi*f"},
		},
		{
			Name: "inf", Group: lang.GroupMath, Value: math.Inf(1),
			Help:     "Infinity, for bounds and norms (norm(G, inf)); matrices and systems refuse it.",
			Examples: []string{"inf > 1e300"},
		},
		{
			Name: "s", Group: lang.GroupSystems, Value: lsys.Variable(0),
			Help:     "The Laplace variable: write transfer functions as rational expressions in s.",
			Doc:      "`5 / (s^2 + 2*s + 5)` is a transfer function; a list of lists of them is a transfer matrix. Where a system is needed they are realized as state-space models. You may bind s to something else; the built-in comes back when the session restarts.",
			Examples: []string{"H = 5 / (s^2 + 2*s + 5)\nH"},
		},
		{
			Name: "z", Group: lang.GroupSystems, Value: lsys.Variable(-1),
			Help:     "The shift variable of sampled systems: rational expressions in z.",
			Doc:      "A transfer function in z needs a sample time before it becomes a system: `system(0.1 / (z - 0.9), every: 0.01)`.",
			Examples: []string{"H = 0.1 / (z - 0.9)\nH"},
		},
	}
	bs = append(bs, mathBuiltins()...)
	bs = append(bs, matrixBuiltins()...)
	bs = append(bs, systemBuiltins()...)
	return bs
}

func joinValues(c *lang.Call, vs []any) string {
	parts := make([]string, len(vs))
	for i, v := range vs {
		parts[i] = c.Format(v)
	}
	return joinBlocks(parts)
}

// joinBlocks joins texts with spaces; a text of several lines (a matrix)
// is set as a block, its later lines indented to where its first began,
// so that print("A =", A) keeps the rows of A aligned.
func joinBlocks(parts []string) string {
	var lines []string
	for i, p := range parts {
		pl := strings.Split(p, "\n")
		if i == 0 {
			lines = pl
			continue
		}
		last := lines[len(lines)-1] + " "
		pad := strings.Repeat(" ", utf8.RuneCountInString(last))
		lines[len(lines)-1] = last + pl[0]
		for _, l := range pl[1:] {
			lines = append(lines, pad+l)
		}
	}
	return strings.Join(lines, "\n")
}

// elementary builds a built-in for a function of one number; real inputs
// outside the real domain go to the complex one (sqrt(-1) is 1j).
func elementary(name, help, example string, real func(float64) (float64, bool), cplx func(complex128) complex128, extra func(c *lang.Call, v any) (any, bool, error)) *lang.Builtin {
	return &lang.Builtin{
		Name: name, Group: lang.GroupMath,
		Params:   []lang.Param{{Name: "x", Doc: "a number"}},
		Help:     help,
		Doc:      elementaryDoc(name),
		Examples: []string{example},
		Fn: func(c *lang.Call) (any, error) {
			v := c.Value("x")
			if extra != nil {
				if r, ok, err := extra(c, v); ok || err != nil {
					return r, err
				}
			}
			var r any
			switch x := v.(type) {
			case float64:
				if y, ok := real(x); ok {
					r = y
				} else if cplx != nil {
					r = lang.Number(cplx(complex(x, 0)))
				} else {
					return nil, c.Errorf("x", "", "%s(%s) is not defined", name, lang.FormatNumber(x))
				}
			case complex128:
				if cplx == nil {
					return nil, c.TypeError("x", "a real number", v)
				}
				r = lang.Number(cplx(x))
			default:
				return nil, c.TypeError("x", "a number", v)
			}
			if !lang.Finite(r) && lang.Finite(v) {
				return nil, c.Errorf("x", "Rescale the quantities.", "%s(%s) is not a finite number", name, lang.FormatValue(v))
			}
			return r, nil
		},
	}
}

// entrywise applies abs, real, imag, phase and conjugate to every entry of
// a real or complex matrix (handy on mode shapes and eigenvectors).
func entrywise(c *lang.Call, v any) (any, bool, error) {
	var r, cc int
	var at func(i, j int) complex128
	switch m := v.(type) {
	case *mat.Dense:
		r, cc = m.Dims()
		at = func(i, j int) complex128 { return complex(m.At(i, j), 0) }
	case *mat.CDense:
		r, cc = m.Dims()
		at = m.At
	default:
		return nil, false, nil
	}
	var f func(complex128) complex128
	switch c.Builtin.Name {
	case "abs":
		f = func(x complex128) complex128 { return complex(cmplx.Abs(x), 0) }
	case "real":
		f = func(x complex128) complex128 { return complex(real(x), 0) }
	case "imag":
		f = func(x complex128) complex128 { return complex(imag(x), 0) }
	case "phase":
		f = func(x complex128) complex128 { return complex(cmplx.Phase(x), 0) }
	case "conjugate":
		f = cmplx.Conj
	}
	out := mat.NewCDense(r, cc, nil)
	for i := 0; i < r; i++ {
		for j := 0; j < cc; j++ {
			out.Set(i, j, f(at(i, j)))
		}
	}
	return lang.RealIfPossible(out), true, nil
}

func elementaryDoc(name string) string {
	var parts []string
	if lang.EquationFunction(name) {
		parts = append(parts, "Also allowed on the right-hand sides of equation blocks, where it makes the model nonlinear when its argument depends on a state or an input.")
	}
	switch name {
	case "abs", "real", "imag", "phase", "conjugate":
		parts = append(parts, "On a matrix or vector it applies to every entry.")
	case "exp":
		parts = append(parts, "On a square matrix it is the matrix exponential (scaling and squaring with Pade approximants, Higham 2005).")
	}
	return strings.Join(parts, " ")
}

func mathBuiltins() []*lang.Builtin {
	always := func(f func(float64) float64) func(float64) (float64, bool) {
		return func(x float64) (float64, bool) { return f(x), true }
	}
	return []*lang.Builtin{
		elementary("sin", "Sine of an angle in radians.", "sin(pi/6)", always(math.Sin), cmplx.Sin, nil),
		elementary("cos", "Cosine of an angle in radians.", "cos(pi/3)", always(math.Cos), cmplx.Cos, nil),
		elementary("tan", "Tangent of an angle in radians.", "tan(pi/4)", always(math.Tan), cmplx.Tan, nil),
		elementary("exp", "The exponential e^x of a number, or of a square matrix (e^(A t) is exp(t*A)).",
			"exp(1)\nexp(0.1*[[0, 1], [-4, -0.4]])",
			always(math.Exp), cmplx.Exp, func(c *lang.Call, v any) (any, bool, error) {
				m, ok := v.(*mat.Dense)
				if !ok {
					return nil, false, nil
				}
				r, cc := m.Dims()
				if r != cc {
					return nil, true, c.Errorf("x", "", "exp of a matrix needs a square matrix, not a %dx%d one", r, cc)
				}
				// Scaling and squaring with Pade approximants (lsys.Expm).
				e, err := lsys.Expm(m)
				if err != nil {
					return nil, true, c.Errorf("x", "The matrix is too large in norm; scale time down.", "%v", err)
				}
				return e, true, nil
			}),
		elementary("log", "Natural logarithm (of a negative number: complex).", "log(exp(2))",
			func(x float64) (float64, bool) { return math.Log(x), x > 0 }, cmplx.Log, nil),
		elementary("sqrt", "Square root (of a negative number: imaginary).", "sqrt(2)\nsqrt(-4)",
			func(x float64) (float64, bool) { return math.Sqrt(x), x >= 0 }, cmplx.Sqrt, nil),
		elementary("abs", "Absolute value; the modulus of a complex number.", "abs(-3)\nabs(3 + 4j)",
			always(math.Abs), func(x complex128) complex128 { return complex(cmplx.Abs(x), 0) }, entrywise),
		elementary("real", "Real part of a complex number.", "real(-1 + 2j)",
			always(func(x float64) float64 { return x }), func(x complex128) complex128 { return complex(real(x), 0) }, entrywise),
		elementary("imag", "Imaginary part of a complex number.", "imag(-1 + 2j)",
			always(func(float64) float64 { return 0 }), func(x complex128) complex128 { return complex(imag(x), 0) }, entrywise),
		elementary("phase", "Phase (angle) of a complex number in radians, from -pi to pi.", "phase(1j)",
			always(func(x float64) float64 { return math.Atan2(0, x) }), func(x complex128) complex128 { return complex(cmplx.Phase(x), 0) }, entrywise),
		elementary("conjugate", "Complex conjugate.", "conjugate(-1 + 2j)",
			always(func(x float64) float64 { return x }), cmplx.Conj, entrywise),
	}
}

// squareMatrix reads a square matrix argument.
func squareMatrix(c *lang.Call, name string) (*mat.Dense, error) {
	m, err := c.Matrix(name)
	if err != nil {
		return nil, err
	}
	if r, cc := m.Dims(); r != cc {
		return nil, c.Errorf(name, "", "%s needs a square matrix, not a %dx%d one", c.Builtin.Name, r, cc)
	}
	return m, nil
}

func matrixBuiltins() []*lang.Builtin {
	return []*lang.Builtin{
		{
			Name: "identity", Group: lang.GroupMatrices,
			Params:   []lang.Param{{Name: "n", Doc: "the size"}},
			Help:     "The n x n identity matrix.",
			Examples: []string{"identity(3)"},
			Fn: func(c *lang.Call) (any, error) {
				n, err := c.Int("n")
				if err != nil {
					return nil, err
				}
				if n < 1 || n*n > lang.MaxEntries {
					return nil, c.Errorf("n", "", "identity(%d): the size must be between 1 and %d", n, int(math.Sqrt(lang.MaxEntries)))
				}
				m := mat.NewDense(n, n, nil)
				for i := 0; i < n; i++ {
					m.Set(i, i, 1)
				}
				return m, nil
			},
		},
		{
			Name: "diagonal", Group: lang.GroupMatrices,
			Params:   []lang.Param{{Name: "v", Doc: "a vector (or a square matrix)"}},
			Help:     "The diagonal matrix with v on its diagonal; of a square matrix, its diagonal as a vector.",
			Examples: []string{"diagonal([1, 2, 3])", "diagonal([[1, 2], [3, 4]])"},
			Fn: func(c *lang.Call) (any, error) {
				m, err := c.Matrix("v")
				if err != nil {
					return nil, err
				}
				r, cc := m.Dims()
				switch {
				case cc == 1 || r == 1:
					n := r * cc
					if n*n > lang.MaxEntries {
						return nil, c.Errorf("v", "", "a %dx%d diagonal matrix is larger than the limit of %d entries", n, n, lang.MaxEntries)
					}
					d := mat.NewDense(n, n, nil)
					for i := 0; i < n; i++ {
						if cc == 1 {
							d.Set(i, i, m.At(i, 0))
						} else {
							d.Set(i, i, m.At(0, i))
						}
					}
					return d, nil
				case r == cc:
					d := mat.NewDense(r, 1, nil)
					for i := 0; i < r; i++ {
						d.Set(i, 0, m.At(i, i))
					}
					return d, nil
				}
				return nil, c.Errorf("v", "", "diagonal needs a vector or a square matrix, not a %dx%d matrix", r, cc)
			},
		},
		{
			Name: "transpose", Group: lang.GroupMatrices,
			Params:   []lang.Param{{Name: "M", Doc: "a matrix or vector"}},
			Help:     "The transpose: rows become columns (a column vector becomes a row); complex entries are not conjugated.",
			Examples: []string{"transpose([[1, 2], [3, 4]])", "transpose([1, 2, 3])"},
			Fn: func(c *lang.Call) (any, error) {
				if z, ok := c.Value("M").(*mat.CDense); ok {
					r, cc := z.Dims()
					t := mat.NewCDense(cc, r, nil)
					for i := 0; i < r; i++ {
						for j := 0; j < cc; j++ {
							t.Set(j, i, z.At(i, j))
						}
					}
					return t, nil
				}
				m, err := c.Matrix("M")
				if err != nil {
					return nil, err
				}
				return mat.DenseCopyOf(m.T()), nil
			},
		},
		{
			Name: "inverse", Group: lang.GroupMatrices,
			Params:   []lang.Param{{Name: "M", Doc: "a square, non-singular matrix"}},
			Help:     "The inverse of a square matrix, refused when it is singular or nearly so.",
			Doc:      "Computed by LU factorization with partial pivoting. The matrix is refused when its condition number exceeds 1/eps (about 4.5e15), since the inverse would then carry no correct digits. Prefer solve(A, b) to inverse(A)*b.",
			Examples: []string{"inverse([[2, 1], [1, 3]])"},
			Fn: func(c *lang.Call) (any, error) {
				m, err := squareMatrix(c, "M")
				if err != nil {
					return nil, err
				}
				var inv mat.Dense
				if err := inv.Inverse(m); err != nil {
					return nil, c.Errorf("M", "Check it with det(M); a model with a singular matrix may have a redundant state.", "the matrix is singular or nearly so (%v)", err)
				}
				return &inv, nil
			},
		},
		{
			Name: "det", Group: lang.GroupMatrices,
			Params:   []lang.Param{{Name: "M", Doc: "a square matrix"}},
			Help:     "The determinant of a square matrix (by LU factorization).",
			Examples: []string{"det([[2, 1], [1, 3]])"},
			Fn: func(c *lang.Call) (any, error) {
				m, err := squareMatrix(c, "M")
				if err != nil {
					return nil, err
				}
				return mat.Det(m), nil
			},
		},
		{
			Name: "solve", Group: lang.GroupMatrices,
			Params: []lang.Param{
				{Name: "A", Doc: "a square matrix"},
				{Name: "b", Doc: "a vector or matrix with as many rows as A"},
			},
			Help:     "The solution x of A x = b.",
			Doc:      "By LU factorization with partial pivoting; refused when A is singular or its condition number exceeds 1/eps.",
			Examples: []string{"solve([[2, 1], [1, 3]], [3, 5])"},
			Fn: func(c *lang.Call) (any, error) {
				a, err := squareMatrix(c, "A")
				if err != nil {
					return nil, err
				}
				b, err := c.Matrix("b")
				if err != nil {
					return nil, err
				}
				ar, _ := a.Dims()
				br, bc := b.Dims()
				if br != ar {
					return nil, c.Errorf("b", "", "A is %dx%d but b is %dx%d: b needs %d rows", ar, ar, br, bc, ar)
				}
				var x mat.Dense
				if err := x.Solve(a, b); err != nil {
					return nil, c.Errorf("A", "", "A is singular or nearly so (%v)", err)
				}
				return &x, nil
			},
		},
		gridBuiltin("linear", "Evenly spaced values from a to b (n of them), as a vector.", "linear(0, 1, n: 5)", false),
		gridBuiltin("logarithmic", "Logarithmically spaced values from a to b (both > 0), as a vector.", "logarithmic(0.1, 1000, n: 5)", true),
	}
}

func gridBuiltin(name, help, example string, logScale bool) *lang.Builtin {
	return &lang.Builtin{
		Name: name, Group: lang.GroupMatrices,
		Params: []lang.Param{
			{Name: "a", Doc: "first value"},
			{Name: "b", Doc: "last value"},
			{Name: "n", Default: 50.0, Doc: "how many values (at least 2)"},
		},
		Help:     help,
		Doc:      "Grids for sweeps such as locus(f, k: linear(1, 10)) and for frequency ranges.",
		Examples: []string{example},
		Fn: func(c *lang.Call) (any, error) {
			var a, b float64
			var n int
			err := c.Bind("a", &a, "b", &b, "n", &n)
			if err != nil {
				return nil, err
			}
			if n < 2 || n > lang.MaxEntries {
				return nil, c.Errorf("n", "", "n must be between 2 and %d, not %d", lang.MaxEntries, n)
			}
			if math.IsInf(a, 0) || math.IsInf(b, 0) {
				return nil, c.Errorf("a", "", "the ends of a grid must be finite")
			}
			if logScale && (a <= 0 || b <= 0) {
				return nil, c.Errorf("a", "Use linear(a, b) for values that include zero or negatives.", "a logarithmic grid needs a > 0 and b > 0")
			}
			v := mat.NewDense(n, 1, nil)
			for i := 0; i < n; i++ {
				t := float64(i) / float64(n-1)
				if logScale {
					v.Set(i, 0, math.Pow(10, math.Log10(a)+t*(math.Log10(b)-math.Log10(a))))
				} else {
					v.Set(i, 0, a+t*(b-a))
				}
			}
			v.Set(0, 0, a)
			v.Set(n-1, 0, b)
			return v, nil
		},
	}
}

func systemBuiltins() []*lang.Builtin {
	return []*lang.Builtin{
		{
			Name: "system", Group: lang.GroupSystems,
			Params: []lang.Param{
				{Name: "A", Optional: true, Doc: "state matrix (n x n), or a transfer function / transfer matrix; leave out (with B and C) for a static gain D"},
				{Name: "B", Optional: true, Doc: "input matrix (n x m); leave out for no inputs"},
				{Name: "C", Optional: true, Doc: "output matrix (p x n); default: identity (every state is an output)"},
				{Name: "D", Optional: true, Doc: "feedthrough matrix (p x m); default: zeros"},
				{Name: "states", Optional: true, Doc: "state names, a list of strings"},
				{Name: "inputs", Optional: true, Doc: "input names"},
				{Name: "outputs", Optional: true, Doc: "output names"},
				{Name: "every", Default: 0.0, Doc: "sample time in seconds; 0 for continuous time"},
			},
			Help: "A linear system from its matrices x' = A x + B u, y = C x + D u (or from a transfer function).",
			Doc: "Matrices are written row by row: `[[0, 1], [-2, -3]]`. A plain list `[0, 1]` is a column; for C a plain list of n numbers is taken as one output row. " +
				"With `every: T` the system is sampled: x[k+1] = A x[k] + B u[k]. " +
				"Given a transfer function (a rational expression in s or z) or a list of lists of them, it returns a minimal state-space realization. " +
				"Given D alone (`system(D: [[1, -1]])`) it is a static gain y = D u with no states, such as a summing junction for wire. " +
				"A matrix of numbers next to a system in `*`, `+` or `-` is such a gain too: `[[1, -1]] * G` subtracts G's second output from its first. " +
				"The equation form `system { ... }` (see lang/SPEC.md) is usually clearer.",
			Examples: []string{
				"G = system([[0, 1], [-2, -3]], [0, 1], [1, 0], 0)\nG",
				"system([[0.9]], [0.1], every: 0.01, states: [\"level\"], inputs: [\"inflow\"], outputs: [\"level\"])",
				"system(D: [[1, -1]], inputs: [\"ref\", \"v_out\"], outputs: [\"error\"])",
			},
			Fn: systemFn,
		},
		{
			Name: "modes", Group: lang.GroupAnalysis,
			Returns: (*lsys.ModeTable)(nil),
			Params:  []lang.Param{{Name: "system", Doc: "a system, transfer function or linear equation block"}, stTolParam},
			Help:    "The mode table: eigenvalue, natural frequency, damping ratio and time constant of each mode.",
			Doc: "Conjugate pairs are one oscillatory mode. See the mode table's display for the columns. " +
				"tol is the relative tolerance of the reached/seen (PBH) verdicts, decided on the system balanced for units.",
			Examples: []string{"G = system([[0, 1], [-4, -0.4]], [0, 1], [1, 0])\nmodes(G)", "G = system([[0, 1], [-4, -0.4]], [0, 1], [1, 0])\nmodes(G, tol: 1e-6)"},
			Fn:       stSystemTol(lsys.ModesTol),
		},
	}
}

func systemFn(c *lang.Call) (any, error) {
	ts, err := c.Float("every")
	if err != nil {
		return nil, err
	}
	if ts < 0 || math.IsInf(ts, 0) {
		return nil, c.Errorf("every", "Give the sample time in seconds, or 0 for continuous time.", "the sample time must be finite and >= 0, not %s", lang.FormatNumber(ts))
	}
	var g *lsys.System
	first := c.Value("A")
	if !c.Given("A") {
		// A static gain: D alone.
		if !c.Given("D") || c.Given("B") || c.Given("C") {
			return nil, c.Errorf("", "Give A (and B, C, D) for a system with states, or D alone for a static gain: system(D: [[1, -1]]).",
				"system needs the state matrix A, or only D for a static gain")
		}
		D, err := c.Matrix("D")
		if err != nil {
			return nil, err
		}
		// A static gain: no states, D from the inputs to the outputs.
		r, cc := D.Dims()
		if g, err = lsys.NewSystem(0, cc, r, nil, nil, nil, D, ts); err != nil {
			return nil, c.Errorf("D", "", "%v", err)
		}
	}
	switch first.(type) {
	case nil:
		// the static gain above
	case *lsys.Rational, *lang.List, *lsys.System, *lsys.Model:
		if c.Given("B") || c.Given("C") || c.Given("D") {
			return nil, c.Errorf("B", "Give either matrices or a transfer function.", "system(H) from a transfer function takes no B, C or D")
		}
		if q, ok := first.(*lsys.Rational); ok && q.Ts < 0 && ts > 0 {
			q2 := *q
			q2.Ts = ts
			first = &q2
		}
		if l, ok := first.(*lang.List); ok && ts > 0 {
			if rows, ok := lang.TransferRows(l); ok {
				for _, r := range rows {
					for k, q := range r {
						if q.Ts < 0 {
							q2 := *q
							q2.Ts = ts
							r[k] = &q2
						}
					}
				}
				g, err = c.Realize(rows, c.ArgPos("A"))
				if err != nil {
					return nil, err
				}
			}
		}
		if g == nil {
			g, err = c.ToSystem(first, c.ArgPos("A"))
			if err != nil {
				return nil, err
			}
			if g == nil {
				return nil, c.TypeError("A", "a matrix or a transfer function", first)
			}
		}
		if c.Given("every") && g.Ts != ts {
			return nil, c.Errorf("every", "To sample a continuous system use sample(G, T).", "this system's sample time is %s, not %s", lang.FormatNumber(g.Ts), lang.FormatNumber(ts))
		}
	default:
		if m, ok := first.(*mat.Dense); ok && !c.Given("B") && !c.Given("C") && !c.Given("D") {
			if r, cc := m.Dims(); r != cc {
				return nil, c.Errorf("A", fmt.Sprintf("For a static gain y = D u (no states) give D alone: system(D: M); here M is %dx%d, %s and %s.", r, cc, lang.Plural(cc, "input"), lang.Plural(r, "output")),
					"system needs a square matrix, not a %dx%d one", r, cc)
			}
		}
		A, err := squareMatrix(c, "A")
		if err != nil {
			return nil, err
		}
		n, _ := A.Dims()
		var B, C, D *mat.Dense
		if c.Has("B") {
			if B, err = c.Matrix("B"); err != nil {
				return nil, err
			}
		}
		if c.Has("C") {
			if C, err = c.Matrix("C"); err != nil {
				return nil, err
			}
			// A plain list of n numbers is one output row.
			if r, cc := C.Dims(); cc == 1 && r == n && n > 1 {
				C = mat.DenseCopyOf(C.T())
			}
		}
		if c.Has("D") {
			if D, err = c.Matrix("D"); err != nil {
				return nil, err
			}
			if r, cc := D.Dims(); cc == 1 && r > 1 && C != nil && B != nil {
				if p, _ := C.Dims(); p == 1 {
					if _, m := B.Dims(); m == r {
						D = mat.DenseCopyOf(D.T())
					}
				}
			}
		}
		g, err = lsys.FromMatrices(A, B, C, D, ts)
		if err != nil {
			return nil, c.Errorf("", "Matrices: A is n x n, B n x m, C p x n, D p x m. "+c.HelpHint(), "%v", err)
		}
	}
	var names [3][]string
	for i, k := range []string{"states", "inputs", "outputs"} {
		if !c.Given(k) {
			continue
		}
		l, err := c.Strings(k)
		if err != nil {
			return nil, err
		}
		want := []int{g.N(), g.M(), g.P()}[i]
		if len(l) != want {
			return nil, c.Errorf(k, "", "%d %s names given for a system with %s", len(l), strings.TrimSuffix(k, "s"), lang.Plural(want, strings.TrimSuffix(k, "s")))
		}
		if err := checkNames(l); err != nil {
			return nil, c.Errorf(k, "", "%v", err)
		}
		names[i] = l
	}
	if names[0] != nil || names[1] != nil || names[2] != nil {
		g, err = g.WithNames(names[0], names[1], names[2])
		if err != nil {
			return nil, err
		}
	}
	return g, nil
}

func checkNames(names []string) error {
	seen := map[string]bool{}
	for _, n := range names {
		if n == "" {
			return fmt.Errorf("a signal name may not be empty")
		}
		if seen[n] {
			return fmt.Errorf("the name %q appears twice", n)
		}
		seen[n] = true
	}
	return nil
}
