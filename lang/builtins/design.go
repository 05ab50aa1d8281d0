package builtins

// Built-ins of design and reduction: Lyapunov, Sylvester and Riccati
// equations, gramians, Hankel singular values, balancing and reduction,
// system norms, the LQ regulator, the Kalman estimator, pole assignment
// and the response to white noise. The numerics live in package lsys;
// each built-in binds its arguments through the public call API and hands
// out lsys's own result types, which package display renders.

import (
	"fmt"
	"math"
	"strings"

	"gonum.org/v1/gonum/mat"

	"lsys/lang"
	"lsys/lsys"
)

func init() {
	for _, b := range designBuiltins() {
		register(b)
	}
	register(simulateBuiltin())
	registerDesignTypes()
}

// dsSystemParam is the system argument of every design built-in.
var dsSystemParam = lang.Param{Name: "system", Doc: "a system, transfer function or linear equation block"}

// dsWeight reads a weighting or intensity matrix: a number w means w
// times the identity of size n; a matrix must be n x n.
func dsWeight(c *lang.Call, name string, n int, what string) (*mat.Dense, error) {
	switch v := c.Value(name).(type) {
	case float64:
		if !(v >= 0) || math.IsInf(v, 0) {
			return nil, c.Errorf(name, "", "%s: %s must be a number >= 0 or a matrix, not %s", c.Builtin.Name, name, lang.FormatNumber(v))
		}
		M := mat.NewDense(n, n, nil)
		for i := 0; i < n; i++ {
			M.Set(i, i, v)
		}
		return M, nil
	}
	M, err := c.Matrix(name)
	if err != nil {
		return nil, err
	}
	r, cc := M.Dims()
	if n == 1 && cc == 1 && r == 1 {
		return M, nil
	}
	if r != n || cc != n {
		return nil, c.Errorf(name, fmt.Sprintf("Give a %dx%d matrix (%s), or one number for that many times the identity.", n, n, what), "%s: %s must be %dx%d (%s), not %dx%d", c.Builtin.Name, name, n, n, what, r, cc)
	}
	return M, nil
}

// dsPoles reads a list of poles: a real or complex vector, a number or a
// list of numbers.
func dsPoles(c *lang.Call, name string) ([]complex128, error) {
	v := c.Value(name)
	var out []complex128
	switch x := v.(type) {
	case float64:
		out = []complex128{complex(x, 0)}
	case complex128:
		out = []complex128{x}
	case *mat.Dense:
		r, cc := x.Dims()
		if r != 1 && cc != 1 {
			return nil, c.Errorf(name, "Write the poles as a list: [-1, -2 + 1j, -2 - 1j].", "%s: %s must be a list of poles, not a %dx%d matrix", c.Builtin.Name, name, r, cc)
		}
		for i := 0; i < r; i++ {
			for j := 0; j < cc; j++ {
				out = append(out, complex(x.At(i, j), 0))
			}
		}
	case *mat.CDense:
		r, cc := x.Dims()
		if r != 1 && cc != 1 {
			return nil, c.Errorf(name, "Write the poles as a list: [-1, -2 + 1j, -2 - 1j].", "%s: %s must be a list of poles, not a %dx%d matrix", c.Builtin.Name, name, r, cc)
		}
		for i := 0; i < r; i++ {
			for j := 0; j < cc; j++ {
				out = append(out, x.At(i, j))
			}
		}
	case *lang.List:
		for i, it := range x.Items {
			switch z := it.(type) {
			case float64:
				out = append(out, complex(z, 0))
			case complex128:
				out = append(out, z)
			default:
				return nil, c.Errorf(name, "Write the poles as a list: [-1, -2 + 1j, -2 - 1j].", "%s: item %d of %s must be a number", c.Builtin.Name, i+1, name)
			}
		}
	default:
		return nil, c.Errorf(name, "Write the poles as a list: [-1, -2 + 1j, -2 - 1j].", "%s: %s must be a list of poles", c.Builtin.Name, name)
	}
	return out, nil
}

func dsVector(v []float64) *mat.Dense {
	if len(v) == 0 {
		return nil
	}
	return mat.NewDense(len(v), 1, append([]float64(nil), v...))
}

func dsComplexList(v []complex128) any {
	allReal := true
	for _, z := range v {
		if imag(z) != 0 {
			allReal = false
		}
	}
	if len(v) == 0 {
		return &lang.List{}
	}
	if allReal {
		m := mat.NewDense(len(v), 1, nil)
		for i, z := range v {
			m.Set(i, 0, real(z))
		}
		return m
	}
	m := mat.NewCDense(len(v), 1, nil)
	for i, z := range v {
		m.Set(i, 0, z)
	}
	return m
}

func dsSquare(c *lang.Call, name string) (*mat.Dense, error) {
	M, err := c.Matrix(name)
	if err != nil {
		return nil, err
	}
	if r, cc := M.Dims(); r != cc {
		return nil, c.Errorf(name, "", "%s: %s must be square, not %dx%d", c.Builtin.Name, name, r, cc)
	}
	return M, nil
}

func designBuiltins() []*lang.Builtin {
	const msd = "G = system([[0, 1], [-4, -0.8]], [0, 0.5], [1, 0], states: [\"position\", \"velocity\"], inputs: [\"force\"], outputs: [\"position\"])\n"
	const chain = "G = system([[-1, 1, 0, 0], [0, -2, 1, 0], [0, 0, -5, 1], [0, 0, 0, -20]], [0, 0, 0, 20], [1, 0, 0, 0])\n"
	const dint = "G = system([[0, 1], [0, 0]], [0, 1], [1, 0], states: [\"position\", \"velocity\"], inputs: [\"force\"], outputs: [\"position\"])\n"
	return []*lang.Builtin{
		{
			Name: "lyapunov", Group: lang.GroupDesign,
			Returns: (*lsys.LyapunovSolution)(nil),
			Params: []lang.Param{
				{Name: "A", Doc: "a square matrix (or a system: its A)"},
				{Name: "Q", Doc: "a matrix the size of A (usually symmetric)"},
				{Name: "sampled", Default: false, Doc: "true: solve the sampled (Stein) form A X A' - X + Q = 0"},
			},
			Help: "Solves the Lyapunov equation A X + X A' + Q = 0 (sampled: A X A' - X + Q = 0) and shows its residual.",
			Doc: "Bartels & Stewart (1972): A is brought to real Schur form by orthogonal transformations, the " +
				"triangular equation is solved block by block (1x1 and 2x2 blocks, each small system by Gaussian " +
				"elimination with complete pivoting) and transformed back; the sampled form uses Barraud's (1977) " +
				"recurrence. The residual shown is the backward error ||A X + X A' + Q|| / (2 ||A|| ||X|| + ||Q||) " +
				"(Frobenius norms); values near 1e-16 are as good as the data allow. The equation has no unique " +
				"solution when two eigenvalues of A add to zero (sampled: multiply to 1); the result then says so. " +
				"For a stable A and Q = B B', X is the reachability gramian.",
			Examples: []string{"A = [[-1, 2], [0, -3]]\nlyapunov(A, [[1, 0], [0, 1]])",
				"lyapunov([[0.5, 0.2], [0, -0.4]], identity(2), sampled: true)"},
			Fn: func(c *lang.Call) (any, error) {
				var A *mat.Dense
				var err error
				if _, ok := c.Value("A").(float64); ok {
					A, err = c.Matrix("A")
				} else {
					A, err = stMatrixOrSystem(c, "A")
				}
				if err != nil {
					return nil, err
				}
				var sampled bool
				var Q *mat.Dense
				if err := c.Bind("Q", &Q, "sampled", &sampled); err != nil {
					return nil, err
				}
				return lsys.LyapunovEq(A, Q, sampled)
			},
		},
		{
			Name: "sylvester", Group: lang.GroupDesign,
			Returns: (*lsys.LyapunovSolution)(nil),
			Params: []lang.Param{
				{Name: "A", Doc: "a square matrix"},
				{Name: "B", Doc: "a square matrix"},
				{Name: "C", Doc: "a matrix with the rows of A and the columns of B"},
				{Name: "sampled", Default: false, Doc: "true: solve A X B - X = C"},
			},
			Help: "Solves the Sylvester equation A X + X B = C (sampled: A X B - X = C) and shows its residual.",
			Doc: "Bartels & Stewart (1972) on the real Schur forms of A and B. The solution is unique unless A and -B " +
				"share an eigenvalue (sampled: an eigenvalue of A is the reciprocal of one of B); the result then says so.",
			Examples: []string{"sylvester([[-1, 1], [0, -2]], [[-3]], [[1], [2]])"},
			Fn: func(c *lang.Call) (any, error) {
				var A, B, C *mat.Dense
				var sampled bool
				if err := c.Bind("A", &A, "B", &B, "C", &C, "sampled", &sampled); err != nil {
					return nil, err
				}
				return lsys.SylvesterEq(A, B, C, sampled)
			},
		},
		{
			Name: "riccati", Group: lang.GroupDesign,
			Returns: (*lsys.RiccatiSolution)(nil),
			Params: []lang.Param{
				{Name: "A", Doc: "a square matrix (n x n)"},
				{Name: "B", Doc: "the input matrix (n x m)"},
				{Name: "Q", Doc: "the state weight (n x n, symmetric, positive semidefinite); a number q means q times the identity"},
				{Name: "R", Doc: "the input weight (m x m, symmetric, positive definite); a number r means r times the identity"},
				{Name: "N", Optional: true, Doc: "the cross weight (n x m)"},
				{Name: "sampled", Default: false, Doc: "true: the sampled equation"},
			},
			Help: "Solves the algebraic Riccati equation for its stabilizing solution X, with the gain K, the residual and the closed-loop eigenvalues.",
			Doc: "Continuous: A'X + X A - (X B + N) R^-1 (B'X + N') + Q = 0, K = R^-1 (B'X + N'). Sampled: " +
				"A'X A - X - (A'X B + N)(R + B'X B)^-1 (B'X A + N') + Q = 0, K = (R + B'X B)^-1 (B'X A + N'). " +
				"The Schur method (Laub 1979): the Hamiltonian (sampled: symplectic) matrix is brought to an ordered " +
				"real Schur form with its stable eigenvalues first, and X = U2 U1^-1 from their invariant subspace; " +
				"the condition number of U1 is shown (large: X is sensitive). When A is nearly singular in the " +
				"sampled case (a delay), the structure-preserving doubling algorithm is used instead (Chu, Fan, Lin " +
				"& Wang 2004). When the residual is above 1e-14, Newton steps (Kleinman 1968; sampled: Hewer 1971), each a " +
				"Lyapunov equation, refine X while they halve it (at most 6; the method line says how many were kept). " +
				"The residual is the backward error of X; the closed-loop eigenvalues are those of A - B K. " +
				"There is no stabilizing solution when a mode on or beyond the stability boundary is not reachable, or " +
				"an axis mode is not weighted by Q; the error says so.",
			Examples: []string{"riccati([[0, 1], [0, 0]], [[0], [1]], identity(2), 1)"},
			Fn: func(c *lang.Call) (any, error) {
				A, err := dsSquare(c, "A")
				if err != nil {
					return nil, err
				}
				n, _ := A.Dims()
				B, err := c.Matrix("B")
				if err != nil {
					return nil, err
				}
				if r, _ := B.Dims(); r != n {
					return nil, c.Errorf("B", "", "riccati: B must have %d rows (one per row of A), not %d", n, r)
				}
				_, m := B.Dims()
				Q, err := dsWeight(c, "Q", n, "one row per state")
				if err != nil {
					return nil, err
				}
				R, err := dsWeight(c, "R", m, "one row per input")
				if err != nil {
					return nil, err
				}
				var N *mat.Dense
				var sampled bool
				if err := c.Bind("N", &N, "sampled", &sampled); err != nil {
					return nil, err
				}
				if sampled {
					return lsys.DARE(A, B, Q, R, N)
				}
				return lsys.CARE(A, B, Q, R, N)
			},
		},
		{
			Name: "gramians", Group: lang.GroupDesign,
			Returns: (*lsys.Gramians)(nil),
			Params:  []lang.Param{dsSystemParam},
			Help:    "The reachability and observability gramians of a stable system, their conditions and the Hankel singular values.",
			Doc: "P solves A P + P A' + B B' = 0 and Q solves A'Q + Q A + C'C = 0 (sampled: A P A' - P + B B' = 0 and " +
				"A'Q A - Q + C'C = 0), by Bartels & Stewart. P says how much input energy each direction of the state " +
				"needs (a small eigenvalue: hard to reach), Q how much output energy a state gives (small: hard to see). " +
				"The Hankel singular values are the square roots of the eigenvalues of P Q, computed as the singular " +
				"values of Lo'Lc with P = Lc Lc', Q = Lo Lo', the factors computed directly by Hammarling's (1982) method " +
				"so that small values keep their accuracy. An unstable system has no finite gramians: the error " +
				"names the modes.",
			Examples: []string{msd + "gramians(G)"},
			Fn: func(c *lang.Call) (any, error) {
				g, err := c.System("system")
				if err != nil {
					return nil, err
				}
				return lsys.GramiansOf(g)
			},
		},
		{
			Name: "hankel", Group: lang.GroupDesign,
			Returns: (*lsys.HankelValues)(nil),
			Params:  []lang.Param{dsSystemParam},
			Help:    "The Hankel singular values of a system's stable part, largest first, with a chart: how much each balanced state matters.",
			Doc: "The Hankel singular values measure how strongly each state of the balanced realization is both driven " +
				"by the inputs and seen at the outputs; states with small values can be removed (reduce). Unstable " +
				"modes have none (their energy is unbounded): they are split off (ordered Schur form and a Sylvester " +
				"equation) and counted separately. Values below n u times the largest are zero to working precision.",
			Examples: []string{chain + "hankel(G)"},
			Fn: func(c *lang.Call) (any, error) {
				g, err := c.System("system")
				if err != nil {
					return nil, err
				}
				return lsys.Hankel(g)
			},
		},
		{
			Name: "balanced", Group: lang.GroupDesign,
			Returns: (*lsys.Balanced)(nil),
			Params:  []lang.Param{dsSystemParam},
			Help:    "The balanced realization of a stable minimal system (equal, diagonal gramians) with its transformation T.",
			Doc: "The square-root method (Laub, Heath, Paige & Ward 1987): from the gramian factors, Lo'Lc = U S V', " +
				"T = S^(-1/2) U' Lo' and T^-1 = Lc V S^(-1/2); the new states are xb = T x and both gramians of the " +
				"balanced system equal diag(S). The condition of T and the achieved balance are shown. A nonminimal " +
				"system (a Hankel singular value zero to working precision) is refused: reduce removes those states.",
			Examples: []string{msd + "b = balanced(G)\nb.T"},
			Fn: func(c *lang.Call) (any, error) {
				g, err := c.System("system")
				if err != nil {
					return nil, err
				}
				return lsys.BalancedOf(g)
			},
		},
		{
			Name: "reduce", Group: lang.GroupDesign,
			Returns: (*lsys.Reduction)(nil),
			Params: []lang.Param{
				dsSystemParam,
				{Name: "order", Optional: true, Doc: "the number of states to keep (unstable modes included)"},
				{Name: "tol", Optional: true, Doc: "the largest gain error allowed: the smallest order whose error bound is at most tol"},
				{Name: "steady", Default: false, Doc: "true: keep the steady-state gain exactly (singular perturbation) instead of truncating"},
			},
			Help: "A reduced model by balanced truncation (or, with steady: true, singular perturbation), with the error bound, the true error and both frequency responses on one chart.",
			Doc: "The states of the balanced realization with the smallest Hankel singular values are removed " +
				"(Moore 1981, square-root form). Truncation is exact at high frequency; with steady: true the removed " +
				"states are set to their steady state instead (Liu & Anderson 1989), which keeps the gain at zero " +
				"frequency. Either way no frequency has a gain error above the bound 2 * (sum of the removed Hankel " +
				"singular values) (Enns 1984; Glover 1984). The result shows the Hankel singular values, the order " +
				"chosen and why, the bound, the true H-infinity error (Hamiltonian iteration) and the frequency " +
				"responses of the full and the reduced model. Unstable modes are split off first and kept whole; the " +
				"display says how many. r.reduced is the reduced system.",
			Examples: []string{chain + "reduce(G, order: 2)", chain + "r = reduce(G, tol: 0.01, steady: true)\nr.reduced"},
			Fn: func(c *lang.Call) (any, error) {
				g, err := c.System("system")
				if err != nil {
					return nil, err
				}
				var opt lsys.ReduceOptions
				if err := c.Bind("order", &opt.Order, "tol", &opt.Tol, "steady", &opt.KeepDC); err != nil {
					return nil, err
				}
				if c.Given("order") == c.Given("tol") {
					return nil, c.Errorf("", "Write reduce(G, order: 4) for a fixed order, or reduce(G, tol: 0.01) for the smallest order within that gain error.", "reduce: give either order or tol")
				}
				if c.Given("order") && opt.Order < 1 {
					return nil, c.Errorf("order", "", "reduce: the order must be at least 1, not %d", opt.Order)
				}
				if c.Given("tol") && !(opt.Tol > 0) {
					return nil, c.Errorf("tol", "", "reduce: tol must be a gain error > 0")
				}
				return lsys.Reduce(c.Context(), g, opt)
			},
		},
		{
			Name: "norm", Group: lang.GroupDesign,
			Returns: (*lsys.Norm)(nil),
			Params: []lang.Param{
				dsSystemParam,
				{Name: "kind", Default: 2.0, Doc: "2 for the H2 norm, inf for the H-infinity norm; of a matrix also 1 or \"fro\""},
			},
			Help: "The H2 norm (RMS output under unit white noise) or the H-infinity norm (the peak gain, with its frequency) of a system; of a matrix or vector, its 1, 2, inf or Frobenius norm.",
			Doc: "norm(G, 2) is sqrt(trace(C P C')) with P the reachability gramian (sampled: plus D D'); a continuous " +
				"system with feedthrough D has an infinite H2 norm, and the result says why. norm(G, inf) is the " +
				"largest singular value of G over all frequencies, by the Hamiltonian iteration of Boyd & Balakrishnan " +
				"(1990) and Bruinsma & Steinbuch (1990) to a relative accuracy of 1e-9, with the frequency of the peak; " +
				"sampled systems through the bilinear map, which keeps the norm. An unstable system has infinite norms, " +
				"with the modes named. n.value is the number. " +
				"Of a number, vector or matrix, norm(M, kind) is a matrix norm: 1 (largest column sum), 2 (largest singular value), inf (largest row sum) " +
				"or \"fro\" (Frobenius); of a vector, the vector norms (sum of moduli, Euclidean length, largest modulus).",
			Examples: []string{msd + "norm(G, inf)", msd + "norm(G, 2)", "norm([3, 4])\nnorm([[1, 2], [3, 4]], inf)\nnorm([[1, 2], [3, 4]], \"fro\")"},
			Fn: func(c *lang.Call) (any, error) {
				if v, ok, err := matrixNorm(c); ok {
					return v, err
				}
				g, err := c.System("system")
				if err != nil {
					return nil, err
				}
				k, err := c.Float("kind")
				if err != nil {
					return nil, err
				}
				switch {
				case k == 2:
					return lsys.H2Norm(g)
				case math.IsInf(k, 1):
					return lsys.HinfNorm(g)
				}
				return nil, c.Errorf("kind", "Write norm(G, 2) or norm(G, inf).", "norm: the kind must be 2 or inf, not %s", lang.FormatNumber(k))
			},
		},
		{
			Name: "regulator", Group: lang.GroupDesign,
			Returns: (*lsys.Regulator)(nil),
			Params: []lang.Param{
				dsSystemParam,
				{Name: "Q", Doc: "the state weight (n x n, symmetric, positive semidefinite); a number q means q times the identity"},
				{Name: "R", Doc: "the input weight (m x m, symmetric, positive definite); a number r means r times the identity"},
				{Name: "N", Optional: true, Doc: "the cross weight (n x m)"},
			},
			Help: "The linear-quadratic regulator u = -K x: the gain, the closed loop and its modes.",
			Doc: "K minimizes the integral (sampled: the sum) of x'Q x + u'R u + 2 x'N u, from the stabilizing " +
				"solution of the Riccati equation (see riccati). The display shows K, the residual of the Riccati " +
				"solution, and the modes of the closed loop x' = (A - B K) x. r.K is the gain, r.closed the closed-loop " +
				"system (input: a reference added to -K x), r.X the Riccati solution.",
			Examples: []string{dint + "regulator(G, identity(2), 1)", msd + "r = regulator(G, [[10, 0], [0, 1]], 0.1)\nr.K"},
			Fn: func(c *lang.Call) (any, error) {
				g, err := c.System("system")
				if err != nil {
					return nil, err
				}
				if g.N() == 0 || g.M() == 0 {
					return nil, c.Errorf("system", "", "regulator: the system needs states and inputs")
				}
				Q, err := dsWeight(c, "Q", g.N(), "one row per state")
				if err != nil {
					return nil, err
				}
				R, err := dsWeight(c, "R", g.M(), "one row per input")
				if err != nil {
					return nil, err
				}
				var N *mat.Dense
				if err := c.Bind("N", &N); err != nil {
					return nil, err
				}
				return lsys.LQ(g, Q, R, N)
			},
		},
		{
			Name: "estimator", Group: lang.GroupDesign,
			Returns: (*lsys.Estimator)(nil),
			Params: []lang.Param{
				dsSystemParam,
				{Name: "W", Doc: "the intensity of white noise on the inputs (m x m; a number w means w times the identity): the process noise enters where the inputs do"},
				{Name: "V", Doc: "the intensity of white measurement noise on the outputs (p x p; a number v means v times the identity)"},
			},
			Help: "The steady-state Kalman estimator: the gain L, the error covariance and the modes of the estimation error.",
			Doc: "For x' = A x + B (u + w), y = C x + D u + v with white noises of intensities W and V, the estimate " +
				"follows x^' = A x^ + B u + L (y - C x^ - D u) (sampled: the one-step predictor x^[k+1] = A x^[k] + " +
				"B u[k] + L (y[k] - C x^[k] - D u[k])); L comes from the dual Riccati equation (Kalman & Bucy 1961). " +
				"The error modes are the eigenvalues of A - L C. To put noise on states the inputs do not reach, " +
				"give the system an input for it. e.L is the gain, e.P the error covariance.",
			Examples: []string{msd + "estimator(G, 1, 0.01)"},
			Fn: func(c *lang.Call) (any, error) {
				g, err := c.System("system")
				if err != nil {
					return nil, err
				}
				if g.N() == 0 || g.P() == 0 || g.M() == 0 {
					return nil, c.Errorf("system", "", "estimator: the system needs states, inputs (where the noise enters) and outputs")
				}
				W, err := dsWeight(c, "W", g.M(), "one row per input")
				if err != nil {
					return nil, err
				}
				V, err := dsWeight(c, "V", g.P(), "one row per output")
				if err != nil {
					return nil, err
				}
				return lsys.Kalman(g, W, V)
			},
		},
		{
			Name: "assign", Group: lang.GroupDesign,
			Returns: (*lsys.Assignment)(nil),
			Params: []lang.Param{
				dsSystemParam,
				{Name: "poles", Doc: "the closed-loop poles, one per state; complex ones in conjugate pairs"},
				{Name: "observer", Default: false, Doc: "true: an observer gain L placing the eigenvalues of A - L C"},
			},
			Help: "State feedback u = -K x placing the closed-loop poles (or an observer gain L), with the conditioning of the result.",
			Doc: "With one input the gain is unique and exact. With several, the freedom left is used to make the " +
				"closed-loop eigenvectors as well conditioned as possible (Kautsky, Nichols & Van Dooren 1985), so the " +
				"poles move little when the model is a little wrong; the condition number of the eigenvectors is shown " +
				"(large: fragile), with the gain's size and the poles actually achieved. A mode the inputs cannot move " +
				"(the outputs cannot see, for an observer) is named in the error. A pole may repeat at most as many " +
				"times as there are inputs. a.K is the gain (a.L for an observer).",
			Examples: []string{msd + "assign(G, [-2 + 2j, -2 - 2j])", msd + "assign(G, [-10, -12], observer: true)"},
			Fn: func(c *lang.Call) (any, error) {
				g, err := c.System("system")
				if err != nil {
					return nil, err
				}
				poles, err := dsPoles(c, "poles")
				if err != nil {
					return nil, err
				}
				var obs bool
				if err := c.Bind("observer", &obs); err != nil {
					return nil, err
				}
				return lsys.Assign(g, poles, obs)
			},
		},
		{
			Name: "covariance", Group: lang.GroupDesign,
			Returns: (*lsys.Covariance)(nil),
			Params: []lang.Param{
				dsSystemParam,
				{Name: "intensity", Default: 1.0, Doc: "the intensity W of the white noise on the inputs (m x m; a number w means w times the identity)"},
			},
			Help: "The steady-state response to white noise on the inputs: covariances, the RMS of each output and the output spectral density.",
			Doc: "White noise w of intensity W (continuous: E[w(t) w(s)'] = W delta(t - s), a two-sided spectral " +
				"density W; sampled: E[w[k] w[k]'] = W) drives a stable system to the state covariance P, from " +
				"A P + P A' + B W B' = 0 (sampled: A P A' - P + B W B' = 0, Bartels & Stewart), and the output " +
				"covariance C P C' (sampled: + D W D'). The RMS of each output is the square root of its variance; a " +
				"continuous output that D feeds white noise directly has an infinite one (the display says why). The " +
				"chart shows each output's spectral density G W G^H against frequency; the variance is 1/(2 pi) times " +
				"its integral over all frequencies. For a shaped disturbance (a road, wind, a sensor's drift), put " +
				"the shaping filter in series in front: covariance(series(G, filter), w). c.rms lists the RMS values.",
			Examples: []string{msd + "covariance(G, 0.2)"},
			Fn: func(c *lang.Call) (any, error) {
				g, err := c.System("system")
				if err != nil {
					return nil, err
				}
				if g.M() == 0 {
					return nil, c.Errorf("system", "", "covariance: the system has no inputs for the noise to enter")
				}
				W, err := dsWeight(c, "intensity", g.M(), "one row per input")
				if err != nil {
					return nil, err
				}
				return lsys.NoiseResponse(c.Context(), g, W)
			},
		},
	}
}

func registerDesignTypes() {
	registerType((*lsys.LyapunovSolution)(nil), lang.TypeInfo{Name: "a matrix-equation solution", Fields: []lang.Field{
		lang.FieldOf("X", "the solution", func(s *lsys.LyapunovSolution) any { return s.X }),
		lang.FieldOf("residual", "the backward error of X: near 1e-16 is as good as the data allow", func(s *lsys.LyapunovSolution) any { return s.Residual }),
		lang.FieldOf("singular", "true when the equation is (nearly) singular and X is not to be trusted", func(s *lsys.LyapunovSolution) any { return s.Singular }),
	}})
	registerType((*lsys.RiccatiSolution)(nil), lang.TypeInfo{Name: "a Riccati solution", Fields: []lang.Field{
		lang.FieldOf("X", "the stabilizing solution", func(s *lsys.RiccatiSolution) any { return s.X }),
		lang.FieldOf("K", "the gain it gives, R^-1 (B' X + N')", func(s *lsys.RiccatiSolution) any { return s.K }),
		lang.FieldOf("residual", "the backward error of X", func(s *lsys.RiccatiSolution) any { return s.Residual }),
		lang.FieldOf("closed", "the closed-loop eigenvalues, of A - B K", func(s *lsys.RiccatiSolution) any { return dsComplexList(s.ClosedLoop) }),
		lang.FieldOf("stable", "whether they are all strictly stable", func(s *lsys.RiccatiSolution) any { return s.Stable }),
	}})
	registerType((*lsys.Gramians)(nil), lang.TypeInfo{Name: "gramians", Fields: []lang.Field{
		lang.FieldOf("P", "the controllability gramian", func(g *lsys.Gramians) any { return g.P }),
		lang.FieldOf("Q", "the observability gramian", func(g *lsys.Gramians) any { return g.Q }),
		lang.FieldOf("hsv", "the Hankel singular values, largest first", func(g *lsys.Gramians) any { return dsVector(g.HSV) }),
	}})
	registerType((*lsys.HankelValues)(nil), lang.TypeInfo{Name: "Hankel singular values", Fields: []lang.Field{
		lang.FieldOf("values", "the Hankel singular values of the stable part, largest first", func(h *lsys.HankelValues) any {
			if len(h.HSV) == 0 {
				return &lang.List{}
			}
			return dsVector(h.HSV)
		}),
		lang.FieldOf("unstable", "the number of unstable modes (they have none)", func(h *lsys.HankelValues) any { return float64(h.Unstable) }),
	}})
	registerType((*lsys.Balanced)(nil), lang.TypeInfo{Name: "a balanced realization", Fields: []lang.Field{
		lang.FieldOf("system", "the balanced system", func(b *lsys.Balanced) any { return b.System }),
		lang.FieldOf("T", "the transformation to balanced coordinates", func(b *lsys.Balanced) any { return b.T }),
		lang.FieldOf("Tinv", "its inverse", func(b *lsys.Balanced) any { return b.Tinv }),
		lang.FieldOf("hsv", "the Hankel singular values, largest first", func(b *lsys.Balanced) any { return dsVector(b.HSV) }),
	}})
	registerType((*lsys.Reduction)(nil), lang.TypeInfo{Name: "a model reduction", Fields: []lang.Field{
		lang.FieldOf("reduced", "the reduced system", func(r *lsys.Reduction) any { return r.Reduced }),
		lang.FieldOf("order", "its number of states", func(r *lsys.Reduction) any { return float64(r.Reduced.N()) }),
		lang.FieldOf("bound", "2 x the sum of the discarded Hankel singular values: no frequency has a larger gain error", func(r *lsys.Reduction) any { return r.Bound }),
		lang.FieldOf("error", "the H-infinity norm of the difference, the true largest gain error", func(r *lsys.Reduction) any { return r.Error }),
		lang.FieldOf("hsv", "the Hankel singular values of the stable part, largest first", func(r *lsys.Reduction) any { return dsVector(r.HSV) }),
	}})
	registerType((*lsys.Norm)(nil), lang.TypeInfo{Name: "a system norm", Fields: []lang.Field{
		lang.FieldOf("value", "the norm; inf when it is infinite", func(n *lsys.Norm) any { return n.Value }),
		lang.FieldOf("peak", "rad/s where the H-infinity norm is reached (norm(G, inf) only)", func(n *lsys.Norm) any {
			if n.Kind != "inf" {
				return nil
			}
			return n.Peak
		}),
	}})
	registerType((*lsys.Regulator)(nil), lang.TypeInfo{Name: "a regulator", Fields: []lang.Field{
		lang.FieldOf("K", "the state-feedback gain, u = -K x", func(r *lsys.Regulator) any { return r.K }),
		lang.FieldOf("X", "the Riccati solution", func(r *lsys.Regulator) any { return r.Riccati.X }),
		lang.FieldOf("closed", "the closed-loop system", func(r *lsys.Regulator) any { return r.ClosedLoop }),
		lang.FieldOf("modes", "the closed-loop modes", func(r *lsys.Regulator) any { return r.Modes }),
	}})
	registerType((*lsys.Estimator)(nil), lang.TypeInfo{Name: "an estimator", Fields: []lang.Field{
		lang.FieldOf("L", "the estimator gain", func(e *lsys.Estimator) any { return e.L }),
		lang.FieldOf("P", "the steady-state error covariance", func(e *lsys.Estimator) any { return e.P }),
		lang.FieldOf("modes", "the modes of the estimation error", func(e *lsys.Estimator) any { return e.Modes }),
	}})
	registerType((*lsys.Assignment)(nil), lang.TypeInfo{Name: "a pole assignment", Fields: []lang.Field{
		lang.FieldOf("K", "the state-feedback gain (not for an observer)", func(a *lsys.Assignment) any {
			if a.Observer {
				return nil
			}
			return a.Gain
		}),
		lang.FieldOf("L", "the observer gain (observers only)", func(a *lsys.Assignment) any {
			if !a.Observer {
				return nil
			}
			return a.Gain
		}),
		lang.FieldOf("poles", "the poles achieved, in the order requested", func(a *lsys.Assignment) any { return dsComplexList(a.Achieved) }),
		lang.FieldOf("cond", "the condition number of the closed-loop eigenvectors: small is robust", func(a *lsys.Assignment) any { return a.CondX }),
	}})
	rows := func(v [][]float64) any {
		if len(v) == 0 || len(v[0]) == 0 {
			return nil
		}
		m := mat.NewDense(len(v), len(v[0]), nil)
		for k, r := range v {
			m.SetRow(k, r)
		}
		return m
	}
	registerType((*lsys.Simulation)(nil), lang.TypeInfo{Name: "a simulation", Fields: []lang.Field{
		lang.FieldOf("t", "the output times in s", func(s *lsys.Simulation) any { return dsVector(s.T) }),
		lang.FieldOf("x", "the states, one row per time", func(s *lsys.Simulation) any { return rows(s.X) }),
		lang.FieldOf("y", "the outputs, one row per time", func(s *lsys.Simulation) any { return rows(s.Y) }),
		lang.FieldOf("linear", "the linear model's outputs on the same times (with linear: only)", func(s *lsys.Simulation) any {
			if s.Linear == nil {
				return nil
			}
			return rows(s.Linear)
		}),
	}})
	registerType((*lsys.Covariance)(nil), lang.TypeInfo{Name: "a noise response", Fields: []lang.Field{
		lang.FieldOf("rms", "the RMS value of each output, a record by output name", func(cv *lsys.Covariance) any { return numberRecord(cv.System.OutputNames, cv.RMS) }),
		lang.FieldOf("outputs", "the covariance of the outputs", func(cv *lsys.Covariance) any { return cv.Outputs }),
		lang.FieldOf("states", "the covariance of the states", func(cv *lsys.Covariance) any {
			if cv.States == nil {
				return &lang.List{}
			}
			return cv.States
		}),
	}})
}

func simulateBuiltin() *lang.Builtin {
	const pend = "pendulum = system {\n  states angle, rate\n  inputs torque\n  outputs tip\n  g = 9.81\n  angle' = rate\n  rate' = -g * sin(angle) - 0.2 * rate + torque\n  tip = 0.5 * sin(angle)\n}\n"
	return &lang.Builtin{
		Name: "simulate", Group: lang.GroupDesign,
		Returns: (*lsys.Simulation)(nil),
		Params: []lang.Param{
			{Name: "model", Doc: "a nonlinear model (an equation block), or a system built from one"},
			{Name: "until", Default: 10.0, Doc: "the end time in seconds"},
			{Name: "initial", Optional: true, Doc: "a record with the initial states, e.g. {angle: 2.5}; states left out start at 0"},
			{Name: "inputs", Optional: true, Doc: "a record with each input: a number (constant) or a function of time, e.g. {torque: f} with f(t) = ...; inputs left out are 0"},
			{Name: "controller", Optional: true, Doc: "a linear controller closing the loop: a continuous system (or a gain matrix) from the model's outputs to its inputs, added to the inputs given"},
			{Name: "linear", Optional: true, Doc: "a linear model with the same states, inputs and outputs (a linearization about 0), simulated alongside and drawn on the same chart"},
			{Name: "dt", Optional: true, Doc: "the spacing of the output times (default: until / 500)"},
			{Name: "rtol", Default: 1e-6, Doc: "relative error tolerance per step"},
			{Name: "atol", Default: 1e-9, Doc: "absolute error tolerance per step"},
		},
		Help: "The time response of a nonlinear model (open loop, or closed by a linear controller) by an adaptive integrator, optionally with a linear model on the same chart.",
		Doc: "Continuous models are integrated by the Dormand & Prince (1980) 5(4) pair with step-size control: each " +
			"step keeps the estimated local error within atol + rtol |x| per state (root mean square), and the states at " +
			"the output times come from the method's continuous extension, so the output grid does not limit accuracy. " +
			"The global error is typically a small multiple of the tolerances; tighten them to check a result. A sampled " +
			"model (next x = ...) is iterated sample by sample. With controller: K (a continuous linear system or a " +
			"gain matrix from the model's outputs to its inputs) the loop u = inputs(t) + K y is integrated as one system; " +
			"a model whose outputs depend directly on its inputs with a controller that has feedthrough would form an " +
			"algebraic loop and is refused. With linear: G the linear model (same states, inputs and outputs, taken about " +
			"zero: a linearization at the origin) runs from the same initial state with the same inputs and controller, " +
			"so the chart shows where the linear design stops describing the model. Long runs show their progress; an " +
			"interrupt stops the run. s.t, s.x, s.y hold the results.",
		Examples: []string{pend + "simulate(pendulum, until: 8, initial: {angle: 2.5})",
			pend + "G = linearize(pendulum, at: {angle: 0, rate: 0, torque: 0})\nsimulate(pendulum, until: 8, initial: {angle: 1.2}, linear: G)"},
		Fn: simulateFn,
	}
}

// dsRecordValues reads a record of numbers (or functions, when funcs) by
// name; names not in known are an error.
func dsRecordValues(c *lang.Call, name string, known []string, funcs bool) (map[string]any, error) {
	rec, ok := c.Value(name).(*lang.Record)
	if !ok {
		return nil, c.Errorf(name, "Write a record: {"+strings.Join(known, ": 0, ")+": 0}.", "simulate: %s must be a record of values by name", name)
	}
	out := map[string]any{}
	for i, n := range rec.Names {
		found := false
		for _, k := range known {
			found = found || k == n
		}
		if !found {
			return nil, c.Errorf(name, "The names are: "+strings.Join(known, ", ")+".", "simulate: '%s' in %s is not one of the model's names", n, name)
		}
		switch v := rec.Values[i].(type) {
		case float64:
			if math.IsNaN(v) || math.IsInf(v, 0) {
				return nil, c.Errorf(name, "", "simulate: the value of '%s' must be finite", n)
			}
			out[n] = v
		default:
			if !funcs {
				return nil, c.Errorf(name, "", "simulate: the value of '%s' must be a number", n)
			}
			out[n] = v
		}
	}
	return out, nil
}

func simulateFn(c *lang.Call) (any, error) {
	me, ok := c.Block(c.Value("model"))
	if !ok {
		return nil, c.Errorf("model", "Define the model with an equation block: name = system { states: ... }. For a system in matrix form use response().", "simulate: the model must be an equation block (a nonlinear model or a system built from one)")
	}
	until, dt, rtol, atol := 10.0, 0.0, 1e-6, 1e-9
	if err := c.Bind("until", &until, "dt", &dt, "rtol", &rtol, "atol", &atol); err != nil {
		return nil, err
	}
	if !(until > 0) || math.IsInf(until, 0) {
		return nil, c.Errorf("until", "", "simulate: until must be a time > 0 in seconds")
	}
	if !(rtol > 0 && rtol < 1) || !(atol > 0) {
		return nil, c.Errorf("rtol", "Typical values: rtol 1e-6, atol 1e-9.", "simulate: rtol must be between 0 and 1 and atol > 0")
	}
	n, m, p := len(me.States()), len(me.Inputs()), len(me.Outputs())
	x0 := make([]float64, n)
	if c.Has("initial") {
		vals, err := dsRecordValues(c, "initial", me.States(), false)
		if err != nil {
			return nil, err
		}
		for i, s := range me.States() {
			if v, ok := vals[s]; ok {
				x0[i] = v.(float64)
			}
		}
	}
	inputs := make([]any, m)
	if c.Has("inputs") {
		vals, err := dsRecordValues(c, "inputs", me.Inputs(), true)
		if err != nil {
			return nil, err
		}
		for j, s := range me.Inputs() {
			inputs[j] = vals[s]
		}
	}
	uAt := func(t float64, u []float64) error {
		for j, v := range inputs {
			switch f := v.(type) {
			case nil:
				u[j] = 0
			case float64:
				u[j] = f
			default:
				r, err := c.Apply(f, t)
				if err != nil {
					return err
				}
				x, ok := r.(float64)
				if !ok {
					return c.Errorf("inputs", "", "simulate: the input '%s' must give a real number at t = %s", me.Inputs()[j], lang.FormatNumber(t))
				}
				u[j] = x
			}
		}
		return nil
	}
	sampled := me.Every() > 0
	// The controller: a system from outputs to inputs.
	var K *lsys.System
	ctrlName := ""
	if c.Has("controller") {
		if M, ok := c.Value("controller").(*mat.Dense); ok {
			r, cc := M.Dims()
			if r != m || cc != p {
				return nil, c.Errorf("controller", "", "simulate: a gain controller must be %dx%d (inputs x outputs of the model), not %dx%d", m, p, r, cc)
			}
			g, err := lsys.NewSystem(0, p, m, nil, nil, nil, M, me.Every())
			if err != nil {
				return nil, err
			}
			K, ctrlName = g, "a static gain"
		} else {
			g, err := c.System("controller")
			if err != nil {
				return nil, err
			}
			if g.M() != p || g.P() != m {
				return nil, c.Errorf("controller", "", "simulate: the controller must take the model's %d outputs and give its %d inputs; it has %d inputs and %d outputs", p, m, g.M(), g.P())
			}
			if g.N() > 0 && g.Ts != me.Every() {
				return nil, c.Errorf("controller", "", "simulate: the controller and the model must both be continuous, or both sampled at the same rate")
			}
			K, ctrlName = g, fmt.Sprintf("a linear controller with %d states", g.N())
			if g.N() == 0 {
				ctrlName = "a static gain"
			}
		}
		if K.D != nil && maxAbsDense(K.D) != 0 {
			ft, err := me.Feedthrough(x0, make([]float64, m))
			if err != nil {
				return nil, err
			}
			if ft {
				return nil, c.Errorf("controller", "Give the model's outputs no direct dependence on its inputs, or the controller no feedthrough (a little filtering).", "simulate: the model's outputs depend directly on its inputs and the controller has feedthrough: the loop is algebraic")
			}
		}
	}
	var L *lsys.System
	if c.Has("linear") {
		g, err := c.System("linear")
		if err != nil {
			return nil, err
		}
		if g.N() != n || g.M() != m || g.P() != p || g.Ts != me.Every() {
			return nil, c.Errorf("linear", "Linearize the model: linearize(model, at: {...}).", "simulate: the linear model must have the model's %d states, %d inputs, %d outputs and sample time", n, m, p)
		}
		L = g
	}
	nk := 0
	if K != nil {
		nk = K.N()
	}
	// The augmented state: model, controller, linear model, its controller.
	nl := 0
	if L != nil {
		nl = n + nk
	}
	N := n + nk + nl
	// Outputs of a linear system with state x and input u.
	linOut := func(g *lsys.System, x, u []float64) []float64 {
		y := make([]float64, g.P())
		for i := range y {
			v := 0.0
			for j := 0; j < g.N(); j++ {
				v += g.C.At(i, j) * x[j]
			}
			for j := 0; j < g.M(); j++ {
				v += g.D.At(i, j) * u[j]
			}
			y[i] = v
		}
		return y
	}
	linDeriv := func(g *lsys.System, x, u, dx []float64) {
		for i := 0; i < g.N(); i++ {
			v := 0.0
			for j := 0; j < g.N(); j++ {
				v += g.A.At(i, j) * x[j]
			}
			for j := 0; j < g.M(); j++ {
				v += g.B.At(i, j) * u[j]
			}
			dx[i] = v
		}
	}
	// loop evaluates the model (or the linear model) with its controller.
	type parts struct{ dx, y []float64 }
	evalLoop := func(t float64, x, xk []float64, model func(x, u []float64) ([]float64, []float64, error)) (parts, []float64, error) {
		u := make([]float64, m)
		if err := uAt(t, u); err != nil {
			return parts{}, nil, err
		}
		var dxk []float64
		if K != nil {
			// y does not depend on u when the controller has feedthrough
			// (checked above), so evaluate y first with the given inputs.
			_, y, err := model(x, u)
			if err != nil {
				return parts{}, nil, err
			}
			uc := linOut(K, xk, y)
			for j := range u {
				u[j] += uc[j]
			}
			if nk > 0 {
				dxk = make([]float64, nk)
				linDeriv(K, xk, y, dxk)
			}
		}
		dx, y, err := model(x, u)
		if err != nil {
			return parts{}, nil, err
		}
		return parts{dx, y}, dxk, nil
	}
	linModel := func(x, u []float64) ([]float64, []float64, error) {
		dx := make([]float64, n)
		linDeriv(L, x, u, dx)
		return dx, linOut(L, x, u), nil
	}
	full := func(t float64, x, dx []float64) error {
		if err := c.Check(); err != nil {
			return err
		}
		pt, dxk, err := evalLoop(t, x[:n], x[n:n+nk], me.Eval)
		if err != nil {
			return err
		}
		copy(dx[:n], pt.dx)
		copy(dx[n:n+nk], dxk)
		if L != nil {
			pl, dlk, err := evalLoop(t, x[n+nk:2*n+nk], x[2*n+nk:], linModel)
			if err != nil {
				return err
			}
			copy(dx[n+nk:2*n+nk], pl.dx)
			copy(dx[2*n+nk:], dlk)
		}
		return nil
	}
	X0 := make([]float64, N)
	copy(X0, x0)
	if L != nil {
		copy(X0[n+nk:], x0)
	}
	var T []float64
	if sampled {
		for k := 0; float64(k)*me.Every() <= until*(1+1e-12); k++ {
			T = append(T, float64(k)*me.Every())
		}
	} else {
		if dt <= 0 {
			dt = until / 500
		}
		if until/dt > 1e6 {
			return nil, c.Errorf("dt", "", "simulate: more than a million output times; choose a larger dt")
		}
		for k := 0; ; k++ {
			t := float64(k) * dt
			if t > until*(1+1e-12) {
				break
			}
			T = append(T, math.Min(t, until))
		}
	}
	sim := &lsys.Simulation{T: T, States: me.States(), Outputs: me.Outputs(), Sampled: sampled, RelTol: rtol, AbsTol: atol, Controller: ctrlName}
	var Xs [][]float64
	if sampled {
		sim.Method = "iterated sample by sample"
		x := X0
		Xs = append(Xs, append([]float64(nil), x...))
		for k := 1; k < len(T); k++ {
			next := make([]float64, N)
			if err := full(T[k-1], x, next); err != nil {
				return nil, err
			}
			x = next
			Xs = append(Xs, append([]float64(nil), x...))
		}
	} else {
		sim.Method = "Dormand & Prince 5(4), adaptive steps, dense output"
		step, done := progress(c, "simulate")
		opt := lsys.ODEOptions{RelTol: rtol, AbsTol: atol, Progress: func(f float64) {
			// Only long runs show progress (decided by the work done,
			// so the same cell gives the same output).
			step(f)
		}}
		var st lsys.ODEStats
		var err error
		Xs, st, err = lsys.Integrate(c.Context(), full, X0, 0, T, opt)
		done()
		if err != nil {
			return nil, err
		}
		sim.Stats = st
	}
	// Outputs at the output times.
	for k, t := range T {
		x := Xs[k]
		pt, _, err := evalLoop(t, x[:n], x[n:n+nk], me.Eval)
		if err != nil {
			return nil, err
		}
		sim.X = append(sim.X, append([]float64(nil), x[:n]...))
		sim.Y = append(sim.Y, pt.y)
		if L != nil {
			pl, _, err := evalLoop(t, x[n+nk:2*n+nk], x[2*n+nk:], linModel)
			if err != nil {
				return nil, err
			}
			sim.Linear = append(sim.Linear, pl.y)
		}
	}
	if L != nil {
		sim.LinearName = "linear model"
	}
	return sim, nil
}

func maxAbsDense(a *mat.Dense) float64 {
	r, c := a.Dims()
	v := 0.0
	for i := 0; i < r; i++ {
		for j := 0; j < c; j++ {
			v = math.Max(v, math.Abs(a.At(i, j)))
		}
	}
	return v
}
