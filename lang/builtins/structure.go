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
			Returns: (*lsys.ZeroSet)(nil),
			Params:  []lang.Param{stSystemParam, stTolParam},
			Help:    "Invariant zeros of a system (MIMO too), with transmission and input-/output-decoupling zeros listed separately.",
			Doc: "The system pencil [[A - sI, B], [C, D]] is reduced by orthogonal row and column compressions " +
				"(Emami-Naeini & Van Dooren 1982) to a regular pencil whose generalized eigenvalues, found by a QZ " +
				"iteration (Moler & Stewart 1973), are the zeros. Transmission zeros are those of a minimal realization; " +
				"input-decoupling zeros are modes no input reaches, output-decoupling zeros modes no output sees.",
			Examples: []string{msd + "zeros(G)", gimbal + "zeros(G).transmission"},
			Fn:       stSystemTol(lsys.Zeros),
		},
		{
			Name: "eigen", Group: lang.GroupMatrices,
			Returns: (*lsys.EigenStructure)(nil),
			Params:  []lang.Param{{Name: "M", Doc: "a square matrix, or a system (its A)"}},
			Help:    "Eigenvalues with right and left eigenvectors and the condition number of each eigenvalue.",
			Doc: "Balancing, Hessenberg QR and back substitution. Eigenvectors have unit 2-norm; the condition number " +
				"1/|w^H v| says how far the eigenvalue moves under a small change of the matrix.",
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
			Returns: (*lsys.JordanStructure)(nil),
			Params: []lang.Param{
				{Name: "M", Doc: "a square matrix, or a system (its A)"},
				{Name: "cluster", Optional: true, Doc: "also treat eigenvalues closer than this (absolute) as one"},
				stTolParam,
			},
			Help: "Jordan structure: distinct eigenvalues, algebraic and geometric multiplicity, Jordan block sizes, with the tolerances used.",
			Doc: "Eigenvalues are clustered by their perturbation bounds (condition numbers), then block sizes follow from " +
				"the ranks of powers of (A - lambda I) (Golub & Wilkinson 1976). Whether an eigenvalue is defective is a " +
				"numerical judgement: every cluster shows its tolerance.",
			Examples: []string{"jordan([[-1, 1], [0, -1]])", "jordan([[-2, 0], [2, -2]])"},
			Fn: func(c *lang.Call) (any, error) {
				A, abs, tol, err := jordanArgs(c)
				if err != nil {
					return nil, err
				}
				return lsys.Jordan(A, abs, tol)
			},
		},
		{
			Name: "structure", Group: lang.GroupAnalysis,
			Returns: (*lsys.Structure)(nil),
			Params:  []lang.Param{stSystemParam, stTolParam},
			Help:    "Controllable, observable, stabilizable, detectable, and the four Kalman parts with their modes.",
			Doc: "Decided from orthogonal staircase forms (Van Dooren 1981; Paige 1981) with every rank tolerance shown, " +
				"never from the rank of the Krylov matrix.",
			Examples: []string{msd + "structure(G)", "structure(system([[-1, 0], [0, -2]], [1, 0], [1, 1]))"},
			Fn:       stSystemTol(lsys.StructureOf),
		},
		{
			Name: "decompose", Group: lang.GroupAnalysis,
			Returns: (*lsys.Decomposition)(nil),
			Params:  []lang.Param{stSystemParam, stTolParam},
			Help:    "The Kalman decomposition: the system in coordinates ordered reachable-and-observable, reachable only, observable only, neither; with T.",
			Doc: "Built from orthonormal bases of the reachable and unobservable subspaces (staircase forms) and their " +
				"intersection; the condition number of T is shown.",
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
			Returns:  (*lsys.Subspace)(nil),
			Params:   []lang.Param{stSystemParam, stTolParam},
			Help:     "The reachable (controllable) subspace, as an orthonormal basis.",
			Doc:      "Leading columns of the controllability staircase form.",
			Examples: []string{"reachable(system([[-1, 0], [0, -2]], [1, 0], [1, 1]))"},
			Fn:       stSystemTol(lsys.Reachable),
		},
		{
			Name: "unobservable", Group: lang.GroupAnalysis,
			Returns:  (*lsys.Subspace)(nil),
			Params:   []lang.Param{stSystemParam, stTolParam},
			Help:     "The unobservable subspace, as an orthonormal basis.",
			Doc:      "Trailing columns of the observability staircase form.",
			Examples: []string{gimbal + "unobservable(G)"},
			Fn:       stSystemTol(lsys.Unobservable),
		},
		{
			Name: "spectral", Group: lang.GroupAnalysis,
			Returns: (*lsys.Subspace)(nil),
			Params:  []lang.Param{stSystemParam, {Name: "which", Default: "stable", Doc: "\"stable\", \"unstable\", or a list of eigenvalues"}},
			Help:    "The invariant subspace of the stable or unstable modes, or of listed eigenvalues, as an orthonormal basis.",
			Doc: "Leading Schur vectors of the real Schur form reordered so the chosen eigenvalues come first (Bai & Demmel " +
				"1993 swaps). Listing one member of a conjugate pair selects the pair.",
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
			Returns: (*lsys.InvariantCheck)(nil),
			Params: []lang.Param{
				{Name: "A", Doc: "a square matrix, or a system (its A)"},
				{Name: "V", Doc: "a matrix whose columns span the subspace (one row per state)"},
				stTolParam,
			},
			Help: "Whether span(V) is A-invariant (A V = V H for some H), with the relative residual.",
			Doc: "V is orthonormalised (its rank decided by singular values), then ||A Q - Q (Q' A Q)|| / ||A|| is compared " +
				"with a tolerance near the rounding level.",
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
		Returns: (*lsys.ModalForm)(nil),
		Params:  []lang.Param{stSystemParam},
		Help:    "The system in real modal coordinates (1x1 and 2x2 [[sigma, omega], [-omega, sigma]] blocks), with the transformation.",
		Doc: "The modal coordinates q = T x come from the right eigenvectors (unit mode shapes). When an eigenvalue is " +
			"defective or the eigenvector basis is ill-conditioned (condition above 1e4), a block-diagonal form from the " +
			"ordered real Schur form with Sylvester decoupling (Bavely & Stewart 1979) is returned instead, and the " +
			"display says so.",
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

func registerStructureTypes() {
	registerType((*lsys.ZeroSet)(nil), lang.TypeInfo{Name: "a set of zeros", Fields: []lang.Field{
		lang.FieldOf("invariant", "the invariant zeros (of the system pencil)", func(z *lsys.ZeroSet) any { return lang.ComplexVector(z.Invariant) }),
		lang.FieldOf("transmission", "the transmission zeros (of the minimal part)", func(z *lsys.ZeroSet) any { return lang.ComplexVector(z.Transmission) }),
		lang.FieldOf("input_decoupling", "the input-decoupling zeros (modes the inputs do not reach)", func(z *lsys.ZeroSet) any { return lang.ComplexVector(z.InputDecoupling) }),
		lang.FieldOf("output_decoupling", "the output-decoupling zeros (modes the outputs do not see)", func(z *lsys.ZeroSet) any { return lang.ComplexVector(z.OutputDecoupling) }),
		lang.FieldOf("tol", "the rank tolerance used", func(z *lsys.ZeroSet) any { return z.Tol }),
	}})
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
	registerType((*lsys.EigenStructure)(nil), lang.TypeInfo{Name: "an eigen-structure", Fields: []lang.Field{
		lang.FieldOf("values", "the eigenvalues", func(e *lsys.EigenStructure) any { return lang.ComplexVector(e.Values) }),
		lang.FieldOf("right", "the right eigenvectors, as columns", func(e *lsys.EigenStructure) any { return vecs(e.Right) }),
		lang.FieldOf("left", "the left eigenvectors, as columns", func(e *lsys.EigenStructure) any { return vecs(e.Left) }),
		lang.FieldOf("cond", "the condition number of each eigenvalue, 1/|w^H v|", func(e *lsys.EigenStructure) any { return lang.RealVector(e.Cond) }),
	}})
	registerType((*lsys.ModalForm)(nil), lang.TypeInfo{Name: "a modal form", Fields: []lang.Field{
		lang.FieldOf("system", "the system in modal coordinates q = T x", func(m *lsys.ModalForm) any { return m.System }),
		lang.FieldOf("T", "the transformation", func(m *lsys.ModalForm) any { return m.T }),
		lang.FieldOf("shapes", "the mode shapes: the columns of T^-1", func(m *lsys.ModalForm) any { return m.Tinv }),
		lang.FieldOf("block_diagonal", "true when the block-diagonal form replaced the eigenvector basis", func(m *lsys.ModalForm) any { return m.BlockDiagonal }),
		lang.FieldOf("cond", "the condition number of T", func(m *lsys.ModalForm) any { return m.Cond }),
	}})
	registerType((*lsys.JordanStructure)(nil), lang.TypeInfo{Name: "a Jordan structure", Fields: []lang.Field{
		lang.FieldOf("values", "the distinct eigenvalues (one per cluster)", func(js *lsys.JordanStructure) any {
			var vals []complex128
			for _, c := range js.Clusters {
				vals = append(vals, c.Value)
			}
			return lang.ComplexVector(vals)
		}),
		lang.FieldOf("algebraic", "the algebraic multiplicity of each", func(js *lsys.JordanStructure) any {
			var n []int
			for _, c := range js.Clusters {
				n = append(n, c.Algebraic)
			}
			return lang.IntVector(n)
		}),
		lang.FieldOf("geometric", "the geometric multiplicity of each (the number of Jordan blocks)", func(js *lsys.JordanStructure) any {
			var n []int
			for _, c := range js.Clusters {
				n = append(n, c.Geometric)
			}
			return lang.IntVector(n)
		}),
		lang.FieldOf("defective", "true when some eigenvalue has fewer eigenvectors than its multiplicity", func(js *lsys.JordanStructure) any {
			for _, c := range js.Clusters {
				if c.Defective() {
					return true
				}
			}
			return false
		}),
	}})
	registerType((*lsys.Structure)(nil), lang.TypeInfo{Name: "a structure report", Fields: []lang.Field{
		lang.FieldOf("controllable", "every mode reached by the inputs", func(st *lsys.Structure) any { return st.Controllable }),
		lang.FieldOf("observable", "every mode seen by the outputs", func(st *lsys.Structure) any { return st.Observable }),
		lang.FieldOf("stabilizable", "every mode the inputs do not reach is stable", func(st *lsys.Structure) any { return st.Stabilizable }),
		lang.FieldOf("detectable", "every mode the outputs do not see is stable", func(st *lsys.Structure) any { return st.Detectable }),
		lang.FieldOf("uncontrollable", "the eigenvalues of the modes the inputs do not reach", func(st *lsys.Structure) any { return lang.ComplexVector(st.UncontrollableModes) }),
		lang.FieldOf("unobservable", "the eigenvalues of the modes the outputs do not see", func(st *lsys.Structure) any { return lang.ComplexVector(st.UnobservableModes) }),
		lang.FieldOf("parts", "the four parts of the Kalman decomposition: records of name, states and modes", func(st *lsys.Structure) any {
			l := &lang.List{}
			for _, p := range st.Parts {
				l.Items = append(l.Items, &lang.Record{Names: []string{"name", "states", "modes"}, Values: []any{p.Name, float64(p.Dim), lang.ComplexVector(p.Modes)}})
			}
			return l
		}),
	}})
	registerType((*lsys.Decomposition)(nil), lang.TypeInfo{Name: "a Kalman decomposition", Fields: []lang.Field{
		lang.FieldOf("system", "the system in the decomposed coordinates", func(d *lsys.Decomposition) any { return d.System }),
		lang.FieldOf("T", "the transformation", func(d *lsys.Decomposition) any { return d.T }),
		lang.FieldOf("sizes", "the number of states of each of the four parts", func(d *lsys.Decomposition) any { return lang.IntVector(d.Sizes[:]) }),
		lang.FieldOf("cond", "the condition number of T", func(d *lsys.Decomposition) any { return d.Cond }),
	}})
	subspace := []lang.Field{
		lang.FieldOf("basis", "an orthonormal basis, as columns", func(s *lsys.Subspace) any { return stMatrixOrEmpty(s.Basis) }),
		lang.FieldOf("dim", "the dimension", func(s *lsys.Subspace) any { return float64(s.Dim) }),
		lang.FieldOf("residual", "how far A maps the subspace out of itself, relative to |A|", func(s *lsys.Subspace) any { return s.Residual }),
		lang.FieldOf("invariant", "true when A maps the subspace into itself", func(s *lsys.Subspace) any { return s.Invariant }),
		lang.FieldOf("values", "the eigenvalues of A restricted to the subspace (when it is invariant)", func(s *lsys.Subspace) any { return lang.ComplexVector(s.Values) }),
	}
	registerType((*lsys.Subspace)(nil), lang.TypeInfo{Name: "a subspace", Fields: subspace})
	// An invariance check reads three fields of its subspace.
	var check []lang.Field
	for _, name := range []string{"invariant", "residual", "basis"} {
		for _, f := range subspace {
			if f.Name == name {
				get := f.Get
				check = append(check, lang.Field{Name: f.Name, Doc: f.Doc, Get: func(v any) any { return get(v.(*lsys.InvariantCheck).Subspace) }})
			}
		}
	}
	check = append(check, lang.FieldOf("rank", "the numerical rank of the given columns", func(ic *lsys.InvariantCheck) any { return float64(ic.Rank) }))
	registerType((*lsys.InvariantCheck)(nil), lang.TypeInfo{Name: "an invariance check", Fields: check})
	mode := func(name, doc string, get func(m lsys.Mode) float64) lang.Field {
		return lang.FieldOf(name, doc, func(mt *lsys.ModeTable) any {
			out := make([]float64, len(mt.Modes))
			for i, m := range mt.Modes {
				out[i] = get(m)
			}
			return lang.RealVector(out)
		})
	}
	verdicts := func(name, doc string, get func(m lsys.Mode) any) lang.Field {
		return lang.FieldOf(name, doc, func(mt *lsys.ModeTable) any {
			out := make([]any, len(mt.Modes))
			for i, m := range mt.Modes {
				out[i] = get(m)
			}
			return &lang.List{Items: out}
		})
	}
	registerType((*lsys.ModeTable)(nil), lang.TypeInfo{Name: "a mode table", Fields: []lang.Field{
		lang.FieldOf("eigenvalues", "the eigenvalue of each mode (the upper of a pair)", func(mt *lsys.ModeTable) any {
			ev := make([]complex128, len(mt.Modes))
			for i, m := range mt.Modes {
				ev[i] = m.Eigenvalue
			}
			return lang.ComplexVector(ev)
		}),
		mode("frequencies", "natural frequencies in rad/s", func(m lsys.Mode) float64 { return m.NaturalFreq }),
		mode("hz", "the same in Hz", func(m lsys.Mode) float64 { return m.FreqHz }),
		mode("damping", "damping ratios", func(m lsys.Mode) float64 { return m.Damping }),
		mode("time_constants", "time constants in s", func(m lsys.Mode) float64 { return m.TimeConstant }),
		mode("multiplicity", "how many times each eigenvalue occurs", func(m lsys.Mode) float64 { return float64(m.Multiplicity) }),
		verdicts("reachable", "whether the inputs reach each mode (PBH test)", func(m lsys.Mode) any { return m.Reachable }),
		verdicts("observable", "whether the outputs see each mode (PBH test)", func(m lsys.Mode) any { return m.Observable }),
	}})
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

// jordanArgs reads the arguments jordan and jordanform share: the matrix
// (or a system's A), the absolute clustering distance and the relative
// rank tolerance.
func jordanArgs(c *lang.Call) (A *mat.Dense, abs, tol float64, err error) {
	if A, err = stMatrixOrSystem(c, "M"); err != nil {
		return nil, 0, 0, err
	}
	if c.Given("cluster") {
		if abs, err = c.Float("cluster"); err != nil {
			return nil, 0, 0, err
		}
		if abs < 0 || math.IsInf(abs, 0) {
			return nil, 0, 0, c.Errorf("cluster", "", "cluster must be a finite distance >= 0")
		}
	}
	tol, err = stTol(c)
	return A, abs, tol, err
}
