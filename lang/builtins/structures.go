package builtins

// Built-ins for structures as engineers get them: second-order models
// M q'' + D q' + K q = F u, their undamped (normal) modes, modal models,
// large sparse models from Matrix Market files and the modal assurance
// criterion. Written against the public call API only.

import (
	"fmt"
	"math"
	"os"
	"path/filepath"
	"strings"

	"gonum.org/v1/gonum/mat"

	"lsys/lang"
	"lsys/lsys"
)

func init() {
	for _, b := range structuresBuiltins() {
		register(b)
	}
	registerType((*lsys.SecondOrder)(nil), lang.TypeInfo{Name: "a second-order model", Fields: []lang.Field{
		lang.FieldOf("M", "the mass matrix", func(s *lsys.SecondOrder) any { return mat.DenseCopyOf(s.M) }),
		lang.FieldOf("D", "the damping matrix", func(s *lsys.SecondOrder) any { return mat.DenseCopyOf(s.D) }),
		lang.FieldOf("K", "the stiffness matrix", func(s *lsys.SecondOrder) any { return mat.DenseCopyOf(s.K) }),
		lang.FieldOf("F", "the force map, one column per input", func(s *lsys.SecondOrder) any { return mat.DenseCopyOf(s.F) }),
		lang.FieldOf("sensors", "the output map, one row per output", func(s *lsys.SecondOrder) any { return mat.DenseCopyOf(s.Out) }),
		lang.FieldOf("measure", "what each output measures", func(s *lsys.SecondOrder) any { return lang.NameList(s.Measure) }),
		lang.FieldOf("dofs", "the names of the degrees of freedom", func(s *lsys.SecondOrder) any { return lang.NameList(s.DOFNames) }),
		lang.FieldOf("inputs", "the input names", func(s *lsys.SecondOrder) any { return lang.NameList(s.InputNames) }),
		lang.FieldOf("outputs", "the output names", func(s *lsys.SecondOrder) any { return lang.NameList(s.OutputNames) }),
		lang.FieldOf("system", "the first-order system (states q and q')", func(s *lsys.SecondOrder) any {
			g, err := s.System()
			if err != nil {
				return nil
			}
			return g
		}),
	}})
	registerType((*lsys.StructuralModes)(nil), lang.TypeInfo{Name: "a table of normal modes", Fields: []lang.Field{
		lang.FieldOf("frequencies", "natural frequencies, Hz (0 for rigid-body modes)", func(m *lsys.StructuralModes) any { return lang.RealVector(m.Freq) }),
		lang.FieldOf("omega", "natural frequencies, rad/s", func(m *lsys.StructuralModes) any { return lang.RealVector(m.Omega) }),
		lang.FieldOf("damping", "damping ratios (nan where none)", func(m *lsys.StructuralModes) any { return lang.RealVector(m.Damping) }),
		lang.FieldOf("shapes", "mass-normalized shapes, one column per mode", func(m *lsys.StructuralModes) any { return mat.DenseCopyOf(m.Shapes) }),
		lang.FieldOf("rigid", "whether each mode is a rigid-body mode", func(m *lsys.StructuralModes) any {
			l := &lang.List{}
			for _, r := range m.Rigid {
				l.Items = append(l.Items, r)
			}
			return l
		}),
		lang.FieldOf("modalmass", "phi' M phi with each shape scaled to a largest entry of 1", func(m *lsys.StructuralModes) any { return lang.RealVector(m.ModalMass) }),
		lang.FieldOf("participation", "participation factors, one row per mode, one column per direction", func(m *lsys.StructuralModes) any { return columns(m.Participation) }),
		lang.FieldOf("effective", "effective masses, one row per mode, one column per direction", func(m *lsys.StructuralModes) any { return columns(m.EffectiveMass) }),
		lang.FieldOf("cumulative", "cumulative fraction of the total mass, one row per mode, one column per direction", func(m *lsys.StructuralModes) any { return columns(m.Cumulative) }),
		lang.FieldOf("total", "total mass r' M r of each direction", func(m *lsys.StructuralModes) any { return lang.RealVector(m.TotalMass) }),
		lang.FieldOf("directions", "the names of the directions", func(m *lsys.StructuralModes) any { return lang.NameList(m.Directions) }),
	}})
	registerType((*lsys.ModalModel)(nil), lang.TypeInfo{Name: "a modal model", Fields: []lang.Field{
		lang.FieldOf("system", "the modal model as a first-order system", func(m *lsys.ModalModel) any { return m.Sys }),
		lang.FieldOf("kept", "the number of modes kept", func(m *lsys.ModalModel) any { return float64(m.Kept) }),
		lang.FieldOf("error", "largest error up to the highest kept mode, relative to the channel's peak (nan without the comparison)", func(m *lsys.ModalModel) any {
			if m.Check == nil {
				return math.NaN()
			}
			return m.Check.MaxRelErr
		}),
		lang.FieldOf("modes", "all normal modes of the full model", func(m *lsys.ModalModel) any { return m.Modes }),
	}})
	registerType((*lsys.SparseSym)(nil), lang.TypeInfo{Name: "a sparse symmetric matrix", Fields: []lang.Field{
		lang.FieldOf("size", "rows (= columns)", func(a *lsys.SparseSym) any { return float64(a.N) }),
		lang.FieldOf("nonzeros", "stored entries (both triangles)", func(a *lsys.SparseSym) any { return float64(a.NNZ()) }),
	}})
	registerType((*lsys.MACMatrix)(nil), lang.TypeInfo{Name: "a MAC matrix", Fields: []lang.Field{
		lang.FieldOf("values", "the MAC values, one row per shape of the first set", func(m *lsys.MACMatrix) any { return mat.DenseCopyOf(m.Values) }),
	}})
	registerType((*lsys.ShapePlot)(nil), lang.TypeInfo{Name: "a mode-shape chart"})
}

// columns is a matrix with one column per direction, one row per mode.
func columns(src [][]float64) any {
	if len(src) == 0 {
		return &lang.List{}
	}
	m := mat.NewDense(len(src[0]), len(src), nil)
	for k, col := range src {
		m.SetCol(k, col)
	}
	return m
}

// A three-storey frame as masses and storey stiffnesses (invented).
const soFrame = "M = [[2000, 0, 0], [0, 2000, 0], [0, 0, 1500]]\n" +
	"K = [[6e6, -3e6, 0], [-3e6, 5e6, -2e6], [0, -2e6, 2e6]]\n" +
	"frame = secondorder(M, K, [0, 0, 1], damping: 0.02, dofs: [\"floor1\", \"floor2\", \"roof\"], inputs: [\"wind\"], outputs: [\"roof\"], sensors: [[0, 0, 1]])\n"

// A free-free chain (one rigid-body mode) as a sparse lattice.
const soChain = "chain = springlattice([40], 1e4, 0.5, grounded: false)\n"

func structuresBuiltins() []*lang.Builtin {
	return []*lang.Builtin{
		{
			Name: "secondorder", Group: lang.GroupSystems,
			Returns: (*lsys.SecondOrder)(nil),
			Params: []lang.Param{
				{Name: "M", Doc: "mass matrix, n x n, symmetric positive definite"},
				{Name: "K", Doc: "stiffness matrix, n x n, symmetric"},
				{Name: "F", Doc: "force map, n x m: column j is how input j loads the degrees of freedom"},
				{Name: "sensors", Doc: "output map, p x n: row i is the combination of DOFs output i measures (default: every DOF)", Optional: true},
				{Name: "measure", Doc: `"displacement", "velocity" or "acceleration", or a list with one per output`, Default: "displacement", NamedOnly: true},
				{Name: "damping", Doc: "a damping matrix D (n x n), one damping ratio for every mode, or a vector of ratios, one per mode", Optional: true, NamedOnly: true},
				{Name: "dofs", Doc: "names of the degrees of freedom", Optional: true, NamedOnly: true},
				{Name: "inputs", Doc: "names of the inputs", Optional: true, NamedOnly: true},
				{Name: "outputs", Doc: "names of the outputs", Optional: true, NamedOnly: true},
			},
			Help: "A structural model M q'' + D q' + K q = F u with outputs measuring displacements, velocities or accelerations; used as a system everywhere.",
			Doc: "Keeps the second-order form: `normalmodes` and `modalmodel` work on M, D and K directly. Wherever a " +
				"system is needed (`modes`, `step`, `frequency`, `series`, ...) it is converted to first order with states " +
				"q and q' (named after the DOFs, rates with a prime): A = [0 I; -M^-1 K, -M^-1 D], M^-1 applied through its " +
				"Cholesky factor. An acceleration output gets the feedthrough Ca M^-1 F.\n\n" +
				"Damping: a matrix is used as it is; ratios give modal damping D = M Phi diag(2 zeta_j w_j) Phi^T M " +
				"(classical, exactly those ratios; rigid-body modes undamped); `rayleigh(model, ...)` fits alpha M + beta K. " +
				"M, K and D must be symmetric within 1e-10 of their largest entry, M positive definite (every DOF needs mass).",
			Examples: []string{soFrame + "frame", soFrame + "modes(frame)"},
			Fn:       fnSecondOrder,
		},
		{
			Name: "rayleigh", Group: lang.GroupSystems,
			Returns: (*lsys.SecondOrder)(nil),
			Params: []lang.Param{
				{Name: "model", Doc: "a second-order model"},
				{Name: "f1", Doc: "first frequency, Hz"},
				{Name: "zeta1", Doc: "damping ratio at f1"},
				{Name: "f2", Doc: "second frequency, Hz"},
				{Name: "zeta2", Doc: "damping ratio at f2"},
			},
			Help: "The model with Rayleigh damping D = alpha M + beta K fitted to two damping ratios at two frequencies.",
			Doc: "A mode at w (rad/s) then has the ratio alpha/(2w) + beta w/2: exactly zeta1 at f1 and zeta2 at f2, more " +
				"below f1 (the alpha M part) and above f2 (the beta K part). Negative coefficients are refused (they would " +
				"damp some modes negatively). `normalmodes` shows alpha, beta and the two fitting points.",
			Examples: []string{soFrame + "normalmodes(rayleigh(frame, 2, 0.02, 10, 0.03))"},
			Fn: func(c *lang.Call) (any, error) {
				var s *lsys.SecondOrder
				if err := secondOrderArg(c, "model", &s); err != nil {
					return nil, err
				}
				var f1, z1, f2, z2 float64
				if err := c.Bind("f1", &f1, "zeta1", &z1, "f2", &f2, "zeta2", &z2); err != nil {
					return nil, err
				}
				return s.WithRayleigh(2*math.Pi*f1, z1, 2*math.Pi*f2, z2)
			},
		},
		{
			Name: "normalmodes", Group: lang.GroupAnalysis,
			Returns: (*lsys.StructuralModes)(nil),
			Params: []lang.Param{
				{Name: "model", Doc: "a second-order model"},
				{Name: "directions", Doc: "excitation directions, n x d: each column a rigid displacement pattern (e.g. all ones for a translation along a chain), or a number: every DOF displaced by it", Optional: true},
				{Name: "along", Doc: "names of the directions", Optional: true, NamedOnly: true},
			},
			Help: "The undamped modes of a second-order model: frequencies, damping ratios, mass-normalized shapes, participation and effective mass per direction.",
			Doc: "Solves K phi = w^2 M phi (Cholesky of M, symmetric QR; Golub & Van Loan 2013, 8.7.2). Shapes are " +
				"mass-normalized (Phi^T M Phi = I; the display shows the largest deviation) and signed so their largest " +
				"entry is positive. A mode is rigid-body when its w^2 is at most 1e-9 of the largest eigenvalue. Damping " +
				"ratios are phi^T D phi / (2w); the coupling figure says how far D is from classical damping.\n\n" +
				"With directions r: participation Gamma_j = phi_j^T M r, effective mass Gamma_j^2 (summing to r^T M r " +
				"over all modes) and the cumulative fraction; a common acceptance figure is 90 % of the total mass in " +
				"each direction (common practice). Modal mass is phi^T M phi with the shape scaled to a largest entry of 1. " +
				"For large sparse models use `lowestmodes`.",
			Examples: []string{soFrame + "normalmodes(frame, [1, 1, 1], along: [\"x\"])"},
			Fn: func(c *lang.Call) (any, error) {
				var s *lsys.SecondOrder
				if err := secondOrderArg(c, "model", &s); err != nil {
					return nil, err
				}
				R, dirs, err := directionsArg(c, s.N())
				if err != nil {
					return nil, err
				}
				return lsys.StructuralModesOf(s, R, dirs)
			},
		},
		{
			Name: "lowestmodes", Group: lang.GroupAnalysis,
			Returns: (*lsys.StructuralModes)(nil),
			Params: []lang.Param{
				{Name: "K", Doc: "stiffness: a sparse matrix (readmtx, springlattice) or a matrix"},
				{Name: "M", Doc: "mass: a sparse matrix or a matrix, symmetric positive definite"},
				{Name: "count", Doc: "how many modes", Default: 10.0},
				{Name: "near", Doc: "a frequency in Hz: the modes nearest it instead of the lowest", Optional: true, NamedOnly: true},
				{Name: "directions", Doc: "excitation directions, n x d, or a number: every DOF displaced by it (one uniform direction)", Optional: true, NamedOnly: true},
				{Name: "along", Doc: "names of the directions", Optional: true, NamedOnly: true},
				{Name: "dofs", Doc: "names of the degrees of freedom", Optional: true, NamedOnly: true},
			},
			Help: "The lowest modes (or those nearest a frequency) of a large sparse model, by shift-and-invert Lanczos on a sparse factorization.",
			Doc: "Thick-restart Lanczos (Wu & Simon 2000) on (K - sigma M)^-1 M in the M-inner product with full " +
				"reorthogonalization, as in Grimes, Lewis & Simon (1994); K - sigma M is factored as L D L^T after a " +
				"nested-dissection ordering on level structures (George 1973; George & Liu 1981): multifrontal on relaxed " +
				"supernodes (Duff & Reid 1983; Ashcraft & Grimes 1989) when the fronts are dense (3-D meshes), up-looking " +
				"(Davis 2005) otherwise. `near:` returns the modes whose w^2 is nearest (2 pi f)^2. " +
				"A Ritz pair is accepted when its residual is at most 1e-10 of its value. sigma is 0 for the lowest modes; " +
				"when K is singular there (rigid-body modes) it moves to -1e-8 ||K||_1/||M||_1 and the display says so. " +
				"The display also gives the count of eigenvalues below the shift (Sylvester's inertia of the factor), the " +
				"largest residual ||K phi - w^2 M phi|| / (||K||_1 ||phi||), the fill of the factor and the memory held. " +
				"Progress shows while it runs; an interrupt stops it. Rigid-body modes: w^2 at most 1e-9 ||K||_1/||M||_1.",
			Examples: []string{soChain + "lowestmodes(chain.K, chain.M, count: 4)",
				soChain + "lowestmodes(chain.K, chain.M, count: 3, near: 20)"},
			Fn: fnLowestModes,
		},
		{
			Name: "modalmodel", Group: lang.GroupAnalysis,
			Returns: (*lsys.ModalModel)(nil),
			Params: []lang.Param{
				{Name: "model", Doc: "a second-order model, or the stiffness K of a large sparse model (then give M and F)"},
				{Name: "count", Doc: "how many modes to keep (the lowest; rigid-body modes must all be kept)"},
				{Name: "static", Doc: "add the static correction of the truncated modes to displacement outputs", Default: true, NamedOnly: true},
				{Name: "M", Doc: "sparse model: the mass matrix", Optional: true, NamedOnly: true},
				{Name: "F", Doc: "sparse model: the force map, n x m, or a vector of fewer than n DOF numbers (a unit force at each)", Optional: true, NamedOnly: true},
				{Name: "sensors", Doc: "sparse model: the output map, p x n, or a vector of fewer than n DOF numbers (one output each; default every DOF)", Optional: true, NamedOnly: true},
				{Name: "measure", Doc: `sparse model: "displacement", "velocity" or "acceleration", or one per output`, Optional: true, NamedOnly: true},
				{Name: "damping", Doc: "sparse model: the modal damping ratio of every kept mode, or one per kept mode", Optional: true, NamedOnly: true},
				{Name: "inputs", Doc: "sparse model: names of the inputs", Optional: true, NamedOnly: true},
				{Name: "outputs", Doc: "sparse model: names of the outputs", Optional: true, NamedOnly: true},
			},
			Help: "The first modes of a structure as a small state-space system, with the static correction for the rest; compared with the full model over frequency where it is small.",
			Doc: "States are the modal displacements (mass-normalized shapes) and their rates, mode j damped by " +
				"phi_j^T D phi_j for a second-order model (exact for classical damping) or by the ratios given for a " +
				"sparse one. The static correction adds the residual flexibility of the truncated modes as a feedthrough " +
				"to displacement outputs, so the static gain is exact (Craig & Kurdila 2006, 13.4): the sum over the " +
				"truncated modes of phi phi^T / w^2 for a second-order model, K^-1 F minus the kept modes' part for a " +
				"sparse one (K^-1 by the sparse factorization; refused when K has rigid-body modes). For models up to " +
				"300 DOF (sparse ones with one damping ratio, then given to every mode of the full model) the display " +
				"compares the two over frequency on the channel where they differ most, " +
				"with the largest error up to the highest kept mode relative to the channel's peak. The lowest modes of a " +
				"sparse model come from `lowestmodes`' Lanczos path. Used as a system wherever one is needed.",
			Examples: []string{soFrame + "modalmodel(frame, 2)",
				"p = springlattice([20, 10], 1e4, 0.2)\nmodalmodel(p.K, 3, M: p.M, F: [200], sensors: [200, 100], damping: 0.02)"},
			Fn: func(c *lang.Call) (any, error) {
				var r int
				static := true
				if err := c.Bind("count", &r, "static", &static); err != nil {
					return nil, err
				}
				if s, ok := c.Value("model").(*lsys.SecondOrder); ok {
					for _, name := range []string{"M", "F", "sensors", "measure", "damping", "inputs", "outputs"} {
						if c.Given(name) {
							return nil, c.Errorf(name, "A second-order model carries its own matrices and names; give them to secondorder.", "modalmodel: '%s' is for sparse models (modalmodel(K, count, M: ..., F: ...))", name)
						}
					}
					return lsys.NewModalModel(c.Context(), s, r, static)
				}
				if _, ok := c.Value("model").(*lsys.SparseSym); !ok {
					if _, dense := c.Value("model").(*mat.Dense); !dense {
						return nil, c.Errorf("model", "Build one with secondorder(M, K, F, ...), or give a sparse K with M: and F:.", "modalmodel: 'model' must be a second-order model or a stiffness matrix, not %s", c.TypeName(c.Value("model")))
					}
				}
				if !c.Has("M") || !c.Has("F") {
					return nil, c.Errorf("", "Write modalmodel(K, count, M: M, F: F, ...).", "modalmodel: a stiffness matrix needs the mass matrix M: and the force map F:")
				}
				K, err := sparseArg(c, "model")
				if err != nil {
					return nil, err
				}
				M, err := sparseArg(c, "M")
				if err != nil {
					return nil, err
				}
				var spec lsys.SparseModalSpec
				if err := c.Bind("measure", &spec.Measure, "inputs", &spec.Inputs, "outputs", &spec.Outputs); err != nil {
					return nil, err
				}
				if spec.F, err = dofMap(c, "F", K.N, false); err != nil {
					return nil, err
				}
				if c.Has("sensors") {
					if spec.Out, err = dofMap(c, "sensors", K.N, true); err != nil {
						return nil, err
					}
				}
				if c.Has("damping") {
					var d *mat.Dense
					if err := c.Bind("damping", &d); err != nil {
						return nil, err
					}
					rr, cc := d.Dims()
					for k := 0; k < rr*cc; k++ {
						spec.Ratios = append(spec.Ratios, d.At(k/cc, k%cc))
					}
				}
				return lsys.NewSparseModalModel(c.Context(), K, M, r, static, spec, lowestProgress(c, r))
			},
		},
		{
			Name: "mac", Group: lang.GroupAnalysis,
			Returns: (*lsys.MACMatrix)(nil),
			Params: []lang.Param{
				{Name: "a", Doc: "shapes: a table of normal modes or a matrix with one shape per column"},
				{Name: "b", Doc: "shapes to compare with (same number of rows)"},
			},
			Help: "The modal assurance criterion between two sets of mode shapes, as a coloured grid with its values.",
			Doc: "MAC_ij = (a_i^T b_j)^2 / ((a_i^T a_i)(b_j^T b_j)) (Allemang & Brown 1982): 1 for shapes that are " +
				"parallel, 0 for orthogonal ones. Not mass-weighted, so measured shapes can be compared with a model's; " +
				"compare a model with itself to see how distinct its shapes look at the measured points.",
			Examples: []string{soFrame + "m = normalmodes(frame)\nmeasured = [[0.4, 1, 0.9], [0.8, 0.6, -1], [1, -0.9, 0.5]]\nmac(m, measured)"},
			Fn: func(c *lang.Call) (any, error) {
				A, an, err := shapesArg(c, "a")
				if err != nil {
					return nil, err
				}
				B, bn, err := shapesArg(c, "b")
				if err != nil {
					return nil, err
				}
				v, err := lsys.MAC(A, B)
				if err != nil {
					return nil, err
				}
				return &lsys.MACMatrix{Values: v, Rows: an, Cols: bn}, nil
			},
		},
		{
			Name: "modeshapes", Group: lang.GroupAnalysis,
			Params: []lang.Param{
				{Name: "modes", Doc: "a table of normal modes"},
				{Name: "which", Doc: "the modes to draw (numbers from 1; default the first four)", Optional: true, NamedOnly: true},
				{Name: "dofs", Doc: "the DOFs to draw, one per node in node order (numbers from 1; default all)", Optional: true, NamedOnly: true},
				{Name: "at", Doc: "positions of the nodes along a line-like structure", Optional: true, NamedOnly: true},
				{Name: "grid", Doc: "[nx, ny]: nodes of a grid-like structure, node i + nx (j - 1)", Optional: true, NamedOnly: true},
			},
			Help: "Charts of mode shapes: each deflected shape over the undeformed structure, for line-like or grid-like structures.",
			Doc: "Line-like: deflection against position, the undeformed line dashed. Grid-like: a wireframe in an " +
				"oblique view, deflections drawn upwards, the undeformed grid in grey. Shapes are scaled to a largest " +
				"drawn deflection of 1 (shape charts show form, not size).",
			Examples: []string{soChain + "m = lowestmodes(chain.K, chain.M, count: 3)\nmodeshapes(m, which: [2, 3])",
				"p = springlattice([8, 5], 1e4, 1)\nmodeshapes(lowestmodes(p.K, p.M, count: 2), grid: [8, 5])"},
			Fn: fnModeShapes,
		},
		{
			Name: "readmtx", Group: lang.GroupOutput,
			Returns: (*lsys.SparseSym)(nil),
			Params: []lang.Param{
				{Name: "file", Doc: "a .mtx file beside the notebook, or the text of one"},
			},
			Help: "A sparse symmetric matrix from a Matrix Market file (coordinate, real or integer, symmetric or general).",
			Doc: "The NIST exchange format (Boisvert, Pozo & Remington 1996), as finite-element programs export stiffness " +
				"and mass matrices. Duplicate entries are summed; a general matrix must be symmetric within 1e-10 of its " +
				"largest entry. The argument may also be the file's text itself (starting with %%MatrixMarket).",
			Examples: []string{"K = readmtx(\"%%MatrixMarket matrix coordinate real symmetric\\n2 2 3\\n1 1 2e4\\n2 1 -1e4\\n2 2 1e4\")\nK"},
			Fn:       fnReadMtx,
		},
		{
			Name: "springlattice", Group: lang.GroupSystems,
			Params: []lang.Param{
				{Name: "sizes", Doc: "nodes along each axis: [n], [nx, ny] or [nx, ny, nz]"},
				{Name: "k", Doc: "stiffness of every spring, N/m"},
				{Name: "m", Doc: "mass of every node, kg"},
				{Name: "grounded", Doc: "tie the face x = first node to the ground with springs k", Default: true, NamedOnly: true},
			},
			Help: "Sparse K and M of a lattice of equal masses and springs (one DOF per node): a test model with the sparsity of beams, plates and solids.",
			Doc: "Returns a record {K, M} of sparse matrices. Node (i, j, l) is DOF i + nx (j - 1) + nx ny (l - 1). " +
				"The benchmark of `lowestmodes` uses these lattices.",
			Examples: []string{"p = springlattice([30, 20], 1e4, 0.2)\np.K"},
			Fn: func(c *lang.Call) (any, error) {
				var sizes *mat.Dense
				var k, m float64
				grounded := true
				if err := c.Bind("sizes", &sizes, "k", &k, "m", &m, "grounded", &grounded); err != nil {
					return nil, err
				}
				var dims []int
				r, cc := sizes.Dims()
				for i := 0; i < r*cc; i++ {
					v := sizes.At(i/cc, i%cc)
					if v != math.Trunc(v) || v < 1 || v > 1<<24 {
						return nil, c.Errorf("sizes", "Give whole numbers of nodes, e.g. [30, 20].", "springlattice: %s is not a number of nodes", lang.FormatNumber(v))
					}
					dims = append(dims, int(v))
				}
				if !(k > 0) || !(m > 0) || math.IsInf(k, 0) || math.IsInf(m, 0) {
					return nil, c.Errorf("", "", "springlattice: k and m must be finite and > 0")
				}
				K, M, err := lsys.SpringLattice(dims, k, m, grounded)
				if err != nil {
					return nil, err
				}
				return &lang.Record{Names: []string{"K", "M"}, Values: []any{K, M}}, nil
			},
		},
	}
}

func fnSecondOrder(c *lang.Call) (any, error) {
	var M, K, F, S *mat.Dense
	if err := c.Bind("M", &M, "K", &K, "F", &F, "sensors", &S); err != nil {
		return nil, err
	}
	var measure []string
	if err := c.Bind("measure", &measure); err != nil {
		return nil, err
	}
	n, _ := M.Dims()
	var D *mat.Dense
	var ratios []float64
	if c.Has("damping") {
		switch v := c.Value("damping").(type) {
		case float64:
			ratios = []float64{v}
		case *mat.Dense:
			r, cc := v.Dims()
			switch {
			case r == n && cc == n && n > 1 || r == 1 && cc == 1:
				D = v
			case cc == 1 && r == n || r == 1 && cc == n:
				for i := 0; i < r; i++ {
					for j := 0; j < cc; j++ {
						ratios = append(ratios, v.At(i, j))
					}
				}
			default:
				return nil, c.Errorf("damping", "Give a damping matrix (n x n), one ratio, or one ratio per mode.", "secondorder: damping is %dx%d, but the model has %d degrees of freedom", r, cc, n)
			}
		default:
			return nil, c.Errorf("damping", "Give a damping matrix (n x n), one ratio such as 0.02, or one ratio per mode.", "secondorder: damping must be a matrix or ratios, not %s", c.TypeName(v))
		}
	}
	s, err := lsys.NewSecondOrder(M, D, K, F, S, measure)
	if err != nil {
		return nil, err
	}
	if ratios != nil {
		if s, err = s.WithModalDamping(ratios); err != nil {
			return nil, err
		}
	}
	var dofs, ins, outs []string
	if err := c.Bind("dofs", &dofs, "inputs", &ins, "outputs", &outs); err != nil {
		return nil, err
	}
	return s.WithNames(dofs, ins, outs)
}

func secondOrderArg(c *lang.Call, name string, dst **lsys.SecondOrder) error {
	v := c.Value(name)
	s, ok := v.(*lsys.SecondOrder)
	if !ok {
		return c.Errorf(name, "Build one with secondorder(M, K, F, ...).", "%s: '%s' must be a second-order model, not %s", c.Builtin.Name, name, c.TypeName(v))
	}
	*dst = s
	return nil
}

// directionsArg reads the excitation directions: a matrix n x d, or a
// number (every DOF displaced by it: one uniform direction).
func directionsArg(c *lang.Call, n int) (*mat.Dense, []string, error) {
	var R *mat.Dense
	var dirs []string
	if c.Has("directions") {
		if x, ok := c.Value("directions").(float64); ok {
			R = mat.NewDense(n, 1, nil)
			for i := 0; i < n; i++ {
				R.Set(i, 0, x)
			}
		} else if err := c.Bind("directions", &R); err != nil {
			return nil, nil, err
		}
	}
	if err := c.Bind("along", &dirs); err != nil {
		return nil, nil, err
	}
	if R == nil && dirs != nil {
		return nil, nil, c.Errorf("along", "Give the directions too: directions: [1, 1, 1].", "%s: names without directions", c.Builtin.Name)
	}
	return R, dirs, nil
}

// sparseArg reads a sparse matrix, converting a dense one.
func sparseArg(c *lang.Call, name string) (*lsys.SparseSym, error) {
	switch v := c.Value(name).(type) {
	case *lsys.SparseSym:
		return v, nil
	case *mat.Dense:
		r, cc := v.Dims()
		if r != cc {
			return nil, c.Errorf(name, "", "%s: '%s' must be square, not %dx%d", c.Builtin.Name, name, r, cc)
		}
		var ts []lsys.Triplet
		for i := 0; i < r; i++ {
			for j := 0; j < r; j++ {
				if x := v.At(i, j); x != 0 {
					ts = append(ts, lsys.Triplet{I: i, J: j, V: x})
				}
			}
		}
		s, err := lsys.NewSparseSym(r, ts)
		if err != nil {
			return nil, c.Errorf(name, "", "%s: %v", c.Builtin.Name, err)
		}
		return s, nil
	case float64:
		return lsys.NewSparseSym(1, []lsys.Triplet{{I: 0, J: 0, V: v}})
	default:
		return nil, c.Errorf(name, "Read it with readmtx(\"file.mtx\") or give a matrix.", "%s: '%s' must be a sparse or dense matrix, not %s", c.Builtin.Name, name, c.TypeName(v))
	}
}

func fnLowestModes(c *lang.Call) (any, error) {
	K, err := sparseArg(c, "K")
	if err != nil {
		return nil, err
	}
	M, err := sparseArg(c, "M")
	if err != nil {
		return nil, err
	}
	count := 10
	var dofs []string
	if err := c.Bind("count", &count, "dofs", &dofs); err != nil {
		return nil, err
	}
	if dofs != nil && len(dofs) != K.N {
		return nil, c.Errorf("dofs", "", "lowestmodes: %d names for %d degrees of freedom", len(dofs), K.N)
	}
	opt := lsys.SparseModeOptions{Count: count, DOFNames: dofs}
	if c.Has("near") {
		var f float64
		if err := c.Bind("near", &f); err != nil {
			return nil, err
		}
		if f < 0 || math.IsInf(f, 0) {
			return nil, c.Errorf("near", "", "lowestmodes: near must be a frequency >= 0 Hz")
		}
		w := 2 * math.Pi * f
		opt.Shift, opt.Nearest = w*w, true
	}
	R, dirs, err := directionsArg(c, K.N)
	if err != nil {
		return nil, err
	}
	opt.Progress = lowestProgress(c, count)
	return lsys.SparseStructuralModes(c.Context(), K, M, opt, R, dirs)
}

func shapesArg(c *lang.Call, name string) (*mat.Dense, []string, error) {
	switch v := c.Value(name).(type) {
	case *lsys.StructuralModes:
		_, r := v.Shapes.Dims()
		labels := make([]string, r)
		for j := range labels {
			labels[j] = fmt.Sprintf("%d (%s Hz)", j+1, lang.FormatNumber(roundSig(v.Freq[j], 4)))
		}
		return v.Shapes, labels, nil
	case *mat.Dense:
		_, r := v.Dims()
		labels := make([]string, r)
		for j := range labels {
			labels[j] = fmt.Sprint(j + 1)
		}
		return v, labels, nil
	default:
		return nil, nil, c.Errorf(name, "Give normal modes or a matrix with one shape per column.", "mac: '%s' must be mode shapes, not %s", name, c.TypeName(v))
	}
}

func roundSig(v float64, d int) float64 {
	if v == 0 || math.IsNaN(v) || math.IsInf(v, 0) {
		return v
	}
	p := math.Pow(10, float64(d-1)-math.Floor(math.Log10(math.Abs(v))))
	return math.Round(v*p) / p
}

func indexList(c *lang.Call, name string) ([]int, error) {
	if !c.Has(name) {
		return nil, nil
	}
	var m *mat.Dense
	if err := c.Bind(name, &m); err != nil {
		return nil, err
	}
	var out []int
	r, cc := m.Dims()
	for k := 0; k < r*cc; k++ {
		v := m.At(k/cc, k%cc)
		if v != math.Trunc(v) || v < 1 || v > 1<<30 {
			return nil, c.Errorf(name, "Number them from 1.", "%s: %s is not a position", c.Builtin.Name, lang.FormatNumber(v))
		}
		out = append(out, int(v)-1)
	}
	return out, nil
}

func fnModeShapes(c *lang.Call) (any, error) {
	sm, ok := c.Value("modes").(*lsys.StructuralModes)
	if !ok {
		return nil, c.Errorf("modes", "Compute them with normalmodes or lowestmodes.", "modeshapes: 'modes' must be normal modes, not %s", c.TypeName(c.Value("modes")))
	}
	which, err := indexList(c, "which")
	if err != nil {
		return nil, err
	}
	dofs, err := indexList(c, "dofs")
	if err != nil {
		return nil, err
	}
	var x []float64
	if c.Has("at") {
		var at *mat.Dense
		if err := c.Bind("at", &at); err != nil {
			return nil, err
		}
		r, cc := at.Dims()
		for k := 0; k < r*cc; k++ {
			x = append(x, at.At(k/cc, k%cc))
		}
	}
	var grid [2]int
	if c.Has("grid") {
		g, err := indexList(c, "grid")
		if err != nil {
			return nil, err
		}
		if len(g) != 2 {
			return nil, c.Errorf("grid", "Write grid: [nx, ny].", "modeshapes: grid needs two numbers, not %d", len(g))
		}
		grid = [2]int{g[0] + 1, g[1] + 1}
	}
	return lsys.NewShapePlot(sm, which, dofs, x, grid)
}

func fnReadMtx(c *lang.Call) (any, error) {
	var name string
	if err := c.Bind("file", &name); err != nil {
		return nil, err
	}
	if strings.HasPrefix(strings.TrimSpace(name), "%%MatrixMarket") {
		return lsys.ReadMatrixMarket(strings.NewReader(name))
	}
	if name == "" || filepath.IsAbs(name) || strings.Contains(filepath.ToSlash(filepath.Clean(name)), "../") || filepath.Clean(name) == ".." {
		return nil, c.Errorf("file", "Put the file in the notebook's folder and give its name, e.g. readmtx(\"deck_K.mtx\").", "readmtx: %q is outside the notebook's folder", name)
	}
	f, err := os.Open(filepath.Join(c.Dir(), filepath.Clean(name)))
	if err != nil {
		if os.IsNotExist(err) {
			return nil, c.Errorf("file", "Check the name; the file must lie beside the notebook.", "readmtx: there is no file %q beside the notebook", name)
		}
		return nil, c.Errorf("file", "", "readmtx: cannot open %q: %v", name, err)
	}
	defer f.Close()
	a, err := lsys.ReadMatrixMarket(f)
	if err != nil {
		return nil, fmt.Errorf("%s: %w", name, err)
	}
	return a, nil
}

// lowestProgress shows the sparse path's stages in one display that
// updates while it runs and is emptied at the end.
func lowestProgress(c *lang.Call, count int) func(string, float64, int) {
	const id = "lsys-lowestmodes-progress"
	shown, last := false, ""
	return func(stage string, frac float64, conv int) {
		var msg string
		switch stage {
		case "ordering":
			msg = fmt.Sprintf("%s: ordering the degrees of freedom", c.Builtin.Name)
		case "factorizing":
			msg = fmt.Sprintf("%s: factorizing, %d %%", c.Builtin.Name, int(frac*10)*10)
		case "iterating":
			msg = fmt.Sprintf("%s: %d of %d modes converged", c.Builtin.Name, conv, count)
		}
		if msg == last {
			return
		}
		last = msg
		c.Progress(id, msg, !shown)
		shown = true
	}
}

// dofMap reads a force map (n x m) or sensor map (p x n, rows when rows is
// set); a vector of fewer than n whole numbers names DOFs instead, a unit
// force or a unit sensor at each, so large models need no n-long vectors.
func dofMap(c *lang.Call, name string, n int, rows bool) (*mat.Dense, error) {
	var a *mat.Dense
	if err := c.Bind(name, &a); err != nil {
		return nil, err
	}
	r, cc := a.Dims()
	if (r == 1 || cc == 1) && r*cc < n {
		out := mat.NewDense(n, r*cc, nil)
		if rows {
			out = mat.NewDense(r*cc, n, nil)
		}
		for k := 0; k < r*cc; k++ {
			v := a.At(k/cc, k%cc)
			if v != math.Trunc(v) || v < 1 || v > float64(n) {
				return nil, c.Errorf(name, "Give DOF numbers from 1 to the model's size, or a full matrix.", "%s: %s is not a degree of freedom of this %d-DOF model", c.Builtin.Name, lang.FormatNumber(v), n)
			}
			if rows {
				out.Set(k, int(v)-1, 1)
			} else {
				out.Set(int(v)-1, k, 1)
			}
		}
		return out, nil
	}
	return a, nil
}
