package builtins

// Built-ins of modes and structure: poles, zeros, eigen-structure, modal and
// Jordan forms, coordinates, controllability and observability, the Kalman
// decomposition, minimal realizations and invariant subspaces. The numerics
// live in package lsys; each built-in binds arguments and hands out lsys's
// own result types, which package display renders.

import (
	"math"

	"gonum.org/v1/gonum/mat"

	"lsys/lang"
	"lsys/lsys"
)

func stMatrixOrEmpty(m *mat.Dense) any {
	if m == nil {
		return &lang.List{}
	}
	return m
}

// stTol reads the optional relative tolerance argument "tol".
func stTol(c *lang.Call) (float64, error) {
	if !c.Given("tol") {
		return 0, nil
	}
	t, err := c.Float("tol")
	if err != nil {
		return 0, err
	}
	if !(t > 0 && t < 1) {
		return 0, c.Errorf("tol", "A relative tolerance such as 1e-8: singular values below tol times the norm count as zero.", "tol must be between 0 and 1, not %s", lang.FormatNumber(t))
	}
	return t, nil
}

var stTolParam = lang.Param{Name: "tol", Optional: true, Doc: "relative tolerance of the rank decisions (default 1e-10: below 1e-10 times the norm counts as zero)"}

var stSystemParam = lang.Param{Name: "system", Doc: "a system, transfer function or linear equation block"}

// stMatrixOrSystem returns the square matrix given, or the A of a system.
func stMatrixOrSystem(c *lang.Call, name string) (*mat.Dense, error) {
	if m, ok := c.Value(name).(*mat.Dense); ok {
		r, cc := m.Dims()
		if r != cc {
			return nil, c.Errorf(name, "", "%s needs a square matrix, not a %dx%d one", c.Builtin.Name, r, cc)
		}
		return m, nil
	}
	g, err := c.System(name)
	if err != nil {
		return nil, err
	}
	if g.N() == 0 {
		return nil, c.Errorf(name, "", "%s: this system has no states (a static gain)", c.Builtin.Name)
	}
	return g.A, nil
}

func init() {
	for _, b := range structureBuiltins() {
		register(b)
	}
	register(stModalBuiltin())
	registerStructureTypes()
}

func structureBuiltins() []*lang.Builtin {
	const gimbal = "G = system([[0, 1, 0, 0], [-15500, -20, 15500, 20], [0, 0, 0, 1], [5167, 6.67, -5167, -6.67]], [0, 5000, 0, 0], [0, 0, 0, 1], states: [\"motor\", \"motor_rate\", \"load\", \"load_rate\"], inputs: [\"torque\"], outputs: [\"speed\"])\n"
	const msd = "G = system([[0, 1], [-4, -0.8]], [0, 0.5], [1, 0], states: [\"position\", \"velocity\"], inputs: [\"force\"], outputs: [\"position\"])\n"
	return []*lang.Builtin{
		{
			Name: "poles", Group: lang.GroupAnalysis,
			Params: []lang.Param{stSystemParam},
			Help:   "The poles of a system: the eigenvalues of A, ordered by natural frequency then damping.",
			Doc: "Eigenvalues by balancing and the shifted Hessenberg QR algorithm. A conjugate pair appears as two " +
				"consecutive entries, positive imaginary part first. A static gain has none (an empty list).",
			Examples: []string{msd + "poles(G)"},
			Fn: func(c *lang.Call) (any, error) {
				g, err := c.System("system")
				if err != nil {
					return nil, err
				}
				p, err := lsys.Poles(g)
				if err != nil {
					return nil, err
				}
				return lang.ComplexVector(p), nil
			},
		},
		{
			Name: "transfer", Group: lang.GroupAnalysis,
			Params: []lang.Param{stSystemParam, stTolParam},
			Help:   "The transfer function of each input/output pair (a transfer matrix for several inputs or outputs).",
			Doc: "Each channel is reduced to a minimal realization; its poles, zeros and gain give numerator and " +
				"denominator (Varga & Sima 1981), so hidden modes cancel. A single-input single-output system gives one " +
				"transfer function; otherwise a list of rows (outputs) of entries (inputs).",
			Examples: []string{msd + "transfer(G)"},
			Fn: func(c *lang.Call) (any, error) {
				g, err := c.System("system")
				if err != nil {
					return nil, err
				}
				tol, err := stTol(c)
				if err != nil {
					return nil, err
				}
				tf, err := lsys.TransferFunctions(g, tol)
				if err != nil {
					return nil, err
				}
				if len(tf) == 1 && len(tf[0]) == 1 {
					return tf[0][0], nil
				}
				rows := &lang.List{}
				for _, r := range tf {
					row := &lang.List{}
					for _, q := range r {
						row.Items = append(row.Items, q)
					}
					rows.Items = append(rows.Items, row)
				}
				return rows, nil
			},
		},
		{
			Name: "zeros", Group: lang.GroupAnalysis,
			Params: []lang.Param{stSystemParam, stTolParam},
			Help:   "Invariant zeros of a system (MIMO too), with transmission and input-/output-decoupling zeros listed separately.",
			Doc: "The system pencil [[A - sI, B], [C, D]] is reduced by orthogonal row and column compressions " +
				"(Emami-Naeini & Van Dooren 1982) to a regular pencil whose generalized eigenvalues, found by a QZ " +
				"iteration (Moler & Stewart 1973), are the zeros. Transmission zeros are those of a minimal realization; " +
				"input-decoupling zeros are modes no input reaches, output-decoupling zeros modes no output sees. " +
				"Fields: invariant, transmission, input_decoupling, output_decoupling.",
			Examples: []string{msd + "zeros(G)", gimbal + "zeros(G).transmission"},
			Fn:       stSystemTol(lsys.Zeros),
		},
		{
			Name: "eigen", Group: lang.GroupMatrices,
			Params: []lang.Param{{Name: "M", Doc: "a square matrix, or a system (its A)"}},
			Help:   "Eigenvalues with right and left eigenvectors and the condition number of each eigenvalue.",
			Doc: "Balancing, Hessenberg QR and back substitution. Eigenvectors have unit 2-norm; the condition number " +
				"1/|w^H v| says how far the eigenvalue moves under a small change of the matrix. Fields: values, right, left, cond.",
			Examples: []string{"eigen([[2, 1], [0, 3]])"},
			Fn: func(c *lang.Call) (any, error) {
				A, err := stMatrixOrSystem(c, "M")
				if err != nil {
					return nil, err
				}
				return lsys.Eigen(A)
			},
		},
		{
			Name: "transform", Group: lang.GroupAnalysis,
			Params: []lang.Param{stSystemParam, {Name: "T", Doc: "an invertible n x n matrix: the new states are z = T x"},
				{Name: "states", Optional: true, Doc: "names of the new states, a list of strings (default z1, z2, ...)"}},
			Help:     "The system in new coordinates z = T x (A~ = T A T^-1, B~ = T B, C~ = C T^-1).",
			Doc:      "The transfer function is unchanged. A nearly singular T is refused with its condition number.",
			Examples: []string{msd + "transform(G, [[1, 0], [1, 1]])", msd + "transform(G, [[1, 0], [1, 1]], states: [\"position\", \"sum\"])"},
			Fn: func(c *lang.Call) (any, error) {
				var g *lsys.System
				var T *mat.Dense
				if err := c.Bind("system", &g, "T", &T); err != nil {
					return nil, err
				}
				if r, cc := T.Dims(); r != g.N() || cc != g.N() {
					return nil, c.Errorf("T", "T must be square with one row per state.", "T is %dx%d but the system has %d states", r, cc, g.N())
				}
				out, err := lsys.Transform(g, T)
				if err != nil || !c.Given("states") {
					return out, err
				}
				names, err := c.Strings("states")
				if err != nil {
					return nil, err
				}
				if len(names) != g.N() {
					return nil, c.Errorf("states", "Give one name per state.", "%d state names given for a system with %s", len(names), lang.Plural(g.N(), "state"))
				}
				if err := checkNames(names); err != nil {
					return nil, c.Errorf("states", "", "%v", err)
				}
				return out.WithNames(names, nil, nil)
			},
		},
		{
			Name: "jordan", Group: lang.GroupAnalysis,
			Params: []lang.Param{
				{Name: "M", Doc: "a square matrix, or a system (its A)"},
				{Name: "cluster", Optional: true, Doc: "also treat eigenvalues closer than this (absolute) as one"},
				stTolParam,
			},
			Help: "Jordan structure: distinct eigenvalues, algebraic and geometric multiplicity, Jordan block sizes, with the tolerances used.",
			Doc: "Eigenvalues are clustered by their perturbation bounds (condition numbers), then block sizes follow from " +
				"the ranks of powers of (A - lambda I) (Golub & Wilkinson 1976). Whether an eigenvalue is defective is a " +
				"numerical judgement: every cluster shows its tolerance. Fields: values, algebraic, geometric, defective.",
			Examples: []string{"jordan([[-1, 1], [0, -1]])", "jordan([[-2, 0], [2, -2]])"},
			Fn: func(c *lang.Call) (any, error) {
				A, err := stMatrixOrSystem(c, "M")
				if err != nil {
					return nil, err
				}
				abs := 0.0
				if c.Given("cluster") {
					if abs, err = c.Float("cluster"); err != nil {
						return nil, err
					}
					if abs < 0 || math.IsInf(abs, 0) {
						return nil, c.Errorf("cluster", "", "cluster must be a finite distance >= 0")
					}
				}
				tol, err := stTol(c)
				if err != nil {
					return nil, err
				}
				return lsys.Jordan(A, abs, tol)
			},
		},
		{
			Name: "structure", Group: lang.GroupAnalysis,
			Params: []lang.Param{stSystemParam, stTolParam},
			Help:   "Controllable, observable, stabilizable, detectable, and the four Kalman parts with their modes.",
			Doc: "Decided from orthogonal staircase forms (Van Dooren 1981; Paige 1981) with every rank tolerance shown, " +
				"never from the rank of the Krylov matrix. Fields: controllable, observable, stabilizable, detectable, " +
				"uncontrollable, unobservable (the modes), parts.",
			Examples: []string{msd + "structure(G)", "structure(system([[-1, 0], [0, -2]], [1, 0], [1, 1]))"},
			Fn:       stSystemTol(lsys.StructureOf),
		},
		{
			Name: "decompose", Group: lang.GroupAnalysis,
			Params: []lang.Param{stSystemParam, stTolParam},
			Help:   "The Kalman decomposition: the system in coordinates ordered reachable-and-observable, reachable only, observable only, neither; with T.",
			Doc: "Built from orthonormal bases of the reachable and unobservable subspaces (staircase forms) and their " +
				"intersection; the condition number of T is shown. Fields: system, T, sizes, cond.",
			Examples: []string{"decompose(system([[-1, 0], [0, -2]], [1, 0], [1, 1]))"},
			Fn:       stSystemTol(lsys.Decompose),
		},
		{
			Name: "minimal", Group: lang.GroupAnalysis,
			Params:   []lang.Param{stSystemParam, stTolParam},
			Help:     "A minimal realization: the reachable and observable part, found by orthogonal staircase reductions.",
			Doc:      "Same transfer function with as few states as possible (Van Dooren 1981). States are renamed z1, z2, ...",
			Examples: []string{"minimal(system([[-1, 0], [0, -2]], [1, 0], [1, 1]))"},
			Fn:       stSystemTol(lsys.Minimal),
		},
		{
			Name: "reachable", Group: lang.GroupAnalysis,
			Params:   []lang.Param{stSystemParam, stTolParam},
			Help:     "The reachable (controllable) subspace, as an orthonormal basis.",
			Doc:      "Leading columns of the controllability staircase form. Fields: basis, dim, residual, invariant, values.",
			Examples: []string{"reachable(system([[-1, 0], [0, -2]], [1, 0], [1, 1]))"},
			Fn:       stSystemTol(lsys.Reachable),
		},
		{
			Name: "unobservable", Group: lang.GroupAnalysis,
			Params:   []lang.Param{stSystemParam, stTolParam},
			Help:     "The unobservable subspace, as an orthonormal basis.",
			Doc:      "Trailing columns of the observability staircase form. Fields: basis, dim, residual, invariant, values.",
			Examples: []string{gimbal + "unobservable(G)"},
			Fn:       stSystemTol(lsys.Unobservable),
		},
		{
			Name: "spectral", Group: lang.GroupAnalysis,
			Params: []lang.Param{stSystemParam, {Name: "which", Default: "stable", Doc: "\"stable\", \"unstable\", or a list of eigenvalues"}},
			Help:   "The invariant subspace of the stable or unstable modes, or of listed eigenvalues, as an orthonormal basis.",
			Doc: "Leading Schur vectors of the real Schur form reordered so the chosen eigenvalues come first (Bai & Demmel " +
				"1993 swaps). Listing one member of a conjugate pair selects the pair. Fields: basis, dim, residual, invariant, values.",
			Examples: []string{"spectral(system([[1, 2], [0, -3]], [0, 1], [1, 0]), \"unstable\")", "spectral(system([[1, 2], [0, -3]], [0, 1], [1, 0]), [-3])"},
			Fn: func(c *lang.Call) (any, error) {
				g, err := c.System("system")
				if err != nil {
					return nil, err
				}
				switch w := c.Value("which").(type) {
				case string:
					if w != "stable" && w != "unstable" {
						return nil, c.Errorf("which", "Use \"stable\", \"unstable\" or a list of eigenvalues such as [-1, -2+3j].", "unknown selection %q", w)
					}
					return lsys.Spectral(g, w)
				case float64:
					return lsys.SpectralAt(g, []complex128{complex(w, 0)})
				case complex128:
					return lsys.SpectralAt(g, []complex128{w})
				case *mat.Dense:
					r, cc := w.Dims()
					var vals []complex128
					for i := 0; i < r; i++ {
						for j := 0; j < cc; j++ {
							vals = append(vals, complex(w.At(i, j), 0))
						}
					}
					return lsys.SpectralAt(g, vals)
				case *mat.CDense:
					r, cc := w.Dims()
					var vals []complex128
					for i := 0; i < r; i++ {
						for j := 0; j < cc; j++ {
							vals = append(vals, w.At(i, j))
						}
					}
					return lsys.SpectralAt(g, vals)
				default:
					return nil, c.Errorf("which", "Use \"stable\", \"unstable\" or a list of eigenvalues such as [-1, -2+3j].", "which must be a string or a list of eigenvalues, not %s", c.TypeName(w))
				}
			},
		},
		{
			Name: "invariant", Group: lang.GroupAnalysis,
			Params: []lang.Param{
				{Name: "A", Doc: "a square matrix, or a system (its A)"},
				{Name: "V", Doc: "a matrix whose columns span the subspace (one row per state)"},
				stTolParam,
			},
			Help: "Whether span(V) is A-invariant (A V = V H for some H), with the relative residual.",
			Doc: "V is orthonormalised (its rank decided by singular values), then ||A Q - Q (Q' A Q)|| / ||A|| is compared " +
				"with a tolerance near the rounding level. Fields: invariant, residual, basis, rank.",
			Examples: []string{"invariant([[1, 2], [0, 3]], [1, 0])", "invariant([[1, 2], [0, 3]], [0, 1])"},
			Fn: func(c *lang.Call) (any, error) {
				A, err := stMatrixOrSystem(c, "A")
				if err != nil {
					return nil, err
				}
				V, err := c.Matrix("V")
				if err != nil {
					return nil, err
				}
				n, _ := A.Dims()
				if r, cc := V.Dims(); r != n {
					return nil, c.Errorf("V", "V needs one row per row of A.", "V is %dx%d but A is %dx%d", r, cc, n, n)
				}
				tol, err := stTol(c)
				if err != nil {
					return nil, err
				}
				ic, err := lsys.Invariant(A, V, tol)
				if err != nil {
					return nil, err
				}
				// Rows of a system's subspace carry its state names.
				if _, isMatrix := c.Value("A").(*mat.Dense); !isMatrix {
					if g, err := c.System("A"); err == nil && len(g.StateNames) == n {
						ic.Subspace.StateNames = append([]string(nil), g.StateNames...)
					}
				}
				return ic, nil
			},
		},
	}
}

// stModalBuiltin is the modal built-in.
func stModalBuiltin() *lang.Builtin {
	const msd = "G = system([[0, 1], [-4, -0.8]], [0, 0.5], [1, 0], states: [\"position\", \"velocity\"], inputs: [\"force\"], outputs: [\"position\"])\n"
	return &lang.Builtin{
		Name: "modal", Group: lang.GroupAnalysis,
		Params: []lang.Param{stSystemParam},
		Help:   "The system in real modal coordinates (1x1 and 2x2 [[sigma, omega], [-omega, sigma]] blocks), with the transformation.",
		Doc: "The modal coordinates q = T x come from the right eigenvectors (unit mode shapes). When an eigenvalue is " +
			"defective or the eigenvector basis is ill-conditioned (condition above 1e4), a block-diagonal form from the " +
			"ordered real Schur form with Sylvester decoupling (Bavely & Stewart 1979) is returned instead, and the " +
			"display says so. Fields: system, T, shapes (the columns of T^-1), block_diagonal, cond.",
		Examples: []string{msd + "modal(G)", "modal(system([[-1, 1], [0, -1]], [0, 1], [1, 0]))"},
		Fn: func(c *lang.Call) (any, error) {
			g, err := c.System("system")
			if err != nil {
				return nil, err
			}
			return lsys.Modal(g)
		},
	}
}

// stFields builds a TypeInfo from an ordered list of field names and a
// getter.
func stFields(name string, fields []string, get func(v any, f string) (any, bool)) lang.TypeInfo {
	return lang.TypeInfo{Name: name, Fields: fields, Field: get}
}

func registerStructureTypes() {
	registerType((*lsys.ZeroSet)(nil), stFields("a set of zeros",
		[]string{"invariant", "transmission", "input_decoupling", "output_decoupling", "tol"},
		func(v any, f string) (any, bool) {
			z := v.(*lsys.ZeroSet)
			switch f {
			case "invariant":
				return lang.ComplexVector(z.Invariant), true
			case "transmission":
				return lang.ComplexVector(z.Transmission), true
			case "input_decoupling":
				return lang.ComplexVector(z.InputDecoupling), true
			case "output_decoupling":
				return lang.ComplexVector(z.OutputDecoupling), true
			case "tol":
				return z.Tol, true
			}
			return nil, false
		}))
	registerType((*lsys.EigenStructure)(nil), stFields("an eigen-structure",
		[]string{"values", "right", "left", "cond"},
		func(v any, f string) (any, bool) {
			e := v.(*lsys.EigenStructure)
			vecs := func(cols [][]complex128) any {
				n := len(cols)
				if n == 0 {
					return &lang.List{}
				}
				m := mat.NewCDense(n, n, nil)
				for j, col := range cols {
					for i, x := range col {
						m.Set(i, j, x)
					}
				}
				return m
			}
			switch f {
			case "values":
				return lang.ComplexVector(e.Values), true
			case "right":
				return vecs(e.Right), true
			case "left":
				return vecs(e.Left), true
			case "cond":
				return lang.RealVector(e.Cond), true
			}
			return nil, false
		}))
	registerType((*lsys.ModalForm)(nil), stFields("a modal form",
		[]string{"system", "T", "shapes", "block_diagonal", "cond"},
		func(v any, f string) (any, bool) {
			m := v.(*lsys.ModalForm)
			switch f {
			case "system":
				return m.System, true
			case "T":
				return m.T, true
			case "shapes":
				return m.Tinv, true
			case "block_diagonal":
				return m.BlockDiagonal, true
			case "cond":
				return m.Cond, true
			}
			return nil, false
		}))
	registerType((*lsys.JordanStructure)(nil), stFields("a Jordan structure",
		[]string{"values", "algebraic", "geometric", "defective"},
		func(v any, f string) (any, bool) {
			js := v.(*lsys.JordanStructure)
			var vals []complex128
			var alg, geo []int
			def := false
			for _, c := range js.Clusters {
				vals = append(vals, c.Value)
				alg = append(alg, c.Algebraic)
				geo = append(geo, c.Geometric)
				if c.Defective() {
					def = true
				}
			}
			switch f {
			case "values":
				return lang.ComplexVector(vals), true
			case "algebraic":
				return lang.IntVector(alg), true
			case "geometric":
				return lang.IntVector(geo), true
			case "defective":
				return def, true
			}
			return nil, false
		}))
	registerType((*lsys.Structure)(nil), stFields("a structure report",
		[]string{"controllable", "observable", "stabilizable", "detectable", "uncontrollable", "unobservable", "parts"},
		func(v any, f string) (any, bool) {
			st := v.(*lsys.Structure)
			switch f {
			case "controllable":
				return st.Controllable, true
			case "observable":
				return st.Observable, true
			case "stabilizable":
				return st.Stabilizable, true
			case "detectable":
				return st.Detectable, true
			case "uncontrollable":
				return lang.ComplexVector(st.UncontrollableModes), true
			case "unobservable":
				return lang.ComplexVector(st.UnobservableModes), true
			case "parts":
				l := &lang.List{}
				for _, p := range st.Parts {
					l.Items = append(l.Items, &lang.Record{Names: []string{"name", "states", "modes"}, Values: []any{p.Name, float64(p.Dim), lang.ComplexVector(p.Modes)}})
				}
				return l, true
			}
			return nil, false
		}))
	registerType((*lsys.Decomposition)(nil), stFields("a Kalman decomposition",
		[]string{"system", "T", "sizes", "cond"},
		func(v any, f string) (any, bool) {
			d := v.(*lsys.Decomposition)
			switch f {
			case "system":
				return d.System, true
			case "T":
				return d.T, true
			case "sizes":
				return lang.IntVector(d.Sizes[:]), true
			case "cond":
				return d.Cond, true
			}
			return nil, false
		}))
	subspaceField := func(s *lsys.Subspace, f string) (any, bool) {
		switch f {
		case "basis":
			return stMatrixOrEmpty(s.Basis), true
		case "dim":
			return float64(s.Dim), true
		case "residual":
			return s.Residual, true
		case "invariant":
			return s.Invariant, true
		case "values":
			return lang.ComplexVector(s.Values), true
		}
		return nil, false
	}
	registerType((*lsys.Subspace)(nil), stFields("a subspace",
		[]string{"basis", "dim", "residual", "invariant", "values"},
		func(v any, f string) (any, bool) { return subspaceField(v.(*lsys.Subspace), f) }))
	registerType((*lsys.InvariantCheck)(nil), stFields("an invariance check",
		[]string{"invariant", "residual", "basis", "rank"},
		func(v any, f string) (any, bool) {
			ic := v.(*lsys.InvariantCheck)
			if f == "rank" {
				return float64(ic.Rank), true
			}
			return subspaceField(ic.Subspace, f)
		}))
	registerType((*lsys.ModeTable)(nil), stFields("a mode table",
		[]string{"eigenvalues", "frequencies", "hz", "damping", "time_constants", "multiplicity", "reachable", "observable"},
		func(v any, f string) (any, bool) {
			mt := v.(*lsys.ModeTable)
			var ev []complex128
			var wn, hz, z, tau, mult []float64
			var reach, obs []any
			for _, m := range mt.Modes {
				ev = append(ev, m.Eigenvalue)
				wn = append(wn, m.NaturalFreq)
				hz = append(hz, m.FreqHz)
				z = append(z, m.Damping)
				tau = append(tau, m.TimeConstant)
				mult = append(mult, float64(m.Multiplicity))
				reach = append(reach, m.Reachable)
				obs = append(obs, m.Observable)
			}
			switch f {
			case "eigenvalues":
				return lang.ComplexVector(ev), true
			case "frequencies":
				return lang.RealVector(wn), true
			case "hz":
				return lang.RealVector(hz), true
			case "damping":
				return lang.RealVector(z), true
			case "time_constants":
				return lang.RealVector(tau), true
			case "multiplicity":
				return lang.RealVector(mult), true
			case "reachable":
				return &lang.List{Items: reach}, true
			case "observable":
				return &lang.List{Items: obs}, true
			}
			return nil, false
		}))
}

// stSystemTol adapts an analysis of a system at a tolerance to a built-in's
// Fn: the "system" argument and the optional "tol".
func stSystemTol[T any](f func(*lsys.System, float64) (T, error)) func(*lang.Call) (any, error) {
	return func(c *lang.Call) (any, error) {
		g, err := c.System("system")
		if err != nil {
			return nil, err
		}
		tol, err := stTol(c)
		if err != nil {
			return nil, err
		}
		r, err := f(g, tol)
		if err != nil {
			return nil, err
		}
		return r, nil
	}
}
