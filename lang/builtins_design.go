package lang

// Built-ins of design and reduction: Lyapunov, Sylvester and Riccati
// equations, gramians, Hankel singular values, balancing and reduction,
// system norms, the LQ regulator, the Kalman estimator, pole assignment
// and the response to white noise. The numerics live in package lsys;
// each built-in binds its arguments through the public call API and hands
// out lsys's own result types, which package display renders.

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/mat"

	"lsys/lsys"
)

// GroupDesign orders these built-ins in the language reference.
const GroupDesign = "Design and reduction"

func init() {
	for _, b := range designBuiltins() {
		Register(b)
	}
	registerDesignTypes()
}

// dsSystemParam is the system argument of every design built-in.
var dsSystemParam = Param{Name: "system", Doc: "a system, transfer function or linear equation block"}

// dsWeight reads a weighting or intensity matrix: a number w means w
// times the identity of size n; a matrix must be n x n.
func dsWeight(c *Call, name string, n int, what string) (*mat.Dense, error) {
	switch v := c.Value(name).(type) {
	case float64:
		if !(v >= 0) || math.IsInf(v, 0) {
			return nil, c.Errorf(name, "", "%s: %s must be a number >= 0 or a matrix, not %s", c.Builtin.Name, name, FormatNumber(v))
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
func dsPoles(c *Call, name string) ([]complex128, error) {
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
	case *List:
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
		return &List{}
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

func dsSquare(c *Call, name string) (*mat.Dense, error) {
	M, err := c.Matrix(name)
	if err != nil {
		return nil, err
	}
	if r, cc := M.Dims(); r != cc {
		return nil, c.Errorf(name, "", "%s: %s must be square, not %dx%d", c.Builtin.Name, name, r, cc)
	}
	return M, nil
}

func designBuiltins() []*Builtin {
	const msd = "G = system([[0, 1], [-4, -0.8]], [0, 0.5], [1, 0], states: [\"position\", \"velocity\"], inputs: [\"force\"], outputs: [\"position\"])\n"
	const chain = "G = system([[-1, 1, 0, 0], [0, -2, 1, 0], [0, 0, -5, 1], [0, 0, 0, -20]], [0, 0, 0, 20], [1, 0, 0, 0])\n"
	const dint = "G = system([[0, 1], [0, 0]], [0, 1], [1, 0], states: [\"position\", \"velocity\"], inputs: [\"force\"], outputs: [\"position\"])\n"
	return []*Builtin{
		{
			Name: "lyapunov", Group: GroupDesign,
			Params: []Param{
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
			Fn: func(c *Call) (any, error) {
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
			Name: "sylvester", Group: GroupDesign,
			Params: []Param{
				{Name: "A", Doc: "a square matrix"},
				{Name: "B", Doc: "a square matrix"},
				{Name: "C", Doc: "a matrix with the rows of A and the columns of B"},
				{Name: "sampled", Default: false, Doc: "true: solve A X B - X = C"},
			},
			Help: "Solves the Sylvester equation A X + X B = C (sampled: A X B - X = C) and shows its residual.",
			Doc: "Bartels & Stewart (1972) on the real Schur forms of A and B. The solution is unique unless A and -B " +
				"share an eigenvalue (sampled: an eigenvalue of A is the reciprocal of one of B); the result then says so.",
			Examples: []string{"sylvester([[-1, 1], [0, -2]], [[-3]], [[1], [2]])"},
			Fn: func(c *Call) (any, error) {
				var A, B, C *mat.Dense
				var sampled bool
				if err := c.Bind("A", &A, "B", &B, "C", &C, "sampled", &sampled); err != nil {
					return nil, err
				}
				return lsys.SylvesterEq(A, B, C, sampled)
			},
		},
		{
			Name: "riccati", Group: GroupDesign,
			Params: []Param{
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
				"& Wang 2004). The residual is the backward error of X; the closed-loop eigenvalues are those of A - B K. " +
				"There is no stabilizing solution when a mode on or beyond the stability boundary is not reachable, or " +
				"an axis mode is not weighted by Q; the error says so.",
			Examples: []string{"riccati([[0, 1], [0, 0]], [[0], [1]], identity(2), 1)"},
			Fn: func(c *Call) (any, error) {
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
			Name: "gramians", Group: GroupDesign,
			Params: []Param{dsSystemParam},
			Help:   "The reachability and observability gramians of a stable system, their conditions and the Hankel singular values.",
			Doc: "P solves A P + P A' + B B' = 0 and Q solves A'Q + Q A + C'C = 0 (sampled: A P A' - P + B B' = 0 and " +
				"A'Q A - Q + C'C = 0), by Bartels & Stewart. P says how much input energy each direction of the state " +
				"needs (a small eigenvalue: hard to reach), Q how much output energy a state gives (small: hard to see). " +
				"The Hankel singular values are the square roots of the eigenvalues of P Q, computed as the singular " +
				"values of Lo'Lc with P = Lc Lc', Q = Lo Lo'. An unstable system has no finite gramians: the error " +
				"names the modes.",
			Examples: []string{msd + "gramians(G)"},
			Fn: func(c *Call) (any, error) {
				g, err := c.System("system")
				if err != nil {
					return nil, err
				}
				return lsys.GramiansOf(g)
			},
		},
		{
			Name: "hankel", Group: GroupDesign,
			Params: []Param{dsSystemParam},
			Help:   "The Hankel singular values of a system's stable part, largest first, with a chart: how much each balanced state matters.",
			Doc: "The Hankel singular values measure how strongly each state of the balanced realization is both driven " +
				"by the inputs and seen at the outputs; states with small values can be removed (reduce). Unstable " +
				"modes have none (their energy is unbounded): they are split off (ordered Schur form and a Sylvester " +
				"equation) and counted separately. Values below n u times the largest are zero to working precision.",
			Examples: []string{chain + "hankel(G)"},
			Fn: func(c *Call) (any, error) {
				g, err := c.System("system")
				if err != nil {
					return nil, err
				}
				return lsys.Hankel(g)
			},
		},
		{
			Name: "balanced", Group: GroupDesign,
			Params: []Param{dsSystemParam},
			Help:   "The balanced realization of a stable minimal system (equal, diagonal gramians) with its transformation T.",
			Doc: "The square-root method (Laub, Heath, Paige & Ward 1987): from the gramian factors, Lo'Lc = U S V', " +
				"T = S^(-1/2) U' Lo' and T^-1 = Lc V S^(-1/2); the new states are xb = T x and both gramians of the " +
				"balanced system equal diag(S). The condition of T and the achieved balance are shown. A nonminimal " +
				"system (a Hankel singular value zero to working precision) is refused: reduce removes those states.",
			Examples: []string{msd + "b = balanced(G)\nb.T"},
			Fn: func(c *Call) (any, error) {
				g, err := c.System("system")
				if err != nil {
					return nil, err
				}
				return lsys.BalancedOf(g)
			},
		},
		{
			Name: "reduce", Group: GroupDesign,
			Params: []Param{
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
			Fn: func(c *Call) (any, error) {
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
			Name: "norm", Group: GroupDesign,
			Params: []Param{
				dsSystemParam,
				{Name: "kind", Default: 2.0, Doc: "2 for the H2 norm, inf for the H-infinity norm"},
			},
			Help: "The H2 norm (RMS output under unit white noise) or the H-infinity norm (the peak gain, with its frequency) of a system.",
			Doc: "norm(G, 2) is sqrt(trace(C P C')) with P the reachability gramian (sampled: plus D D'); a continuous " +
				"system with feedthrough D has an infinite H2 norm, and the result says why. norm(G, inf) is the " +
				"largest singular value of G over all frequencies, by the Hamiltonian iteration of Boyd & Balakrishnan " +
				"(1990) and Bruinsma & Steinbuch (1990) to a relative accuracy of 1e-9, with the frequency of the peak; " +
				"sampled systems through the bilinear map, which keeps the norm. An unstable system has infinite norms, " +
				"with the modes named. n.value is the number.",
			Examples: []string{msd + "norm(G, inf)", msd + "norm(G, 2)"},
			Fn: func(c *Call) (any, error) {
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
				return nil, c.Errorf("kind", "Write norm(G, 2) or norm(G, inf).", "norm: the kind must be 2 or inf, not %s", FormatNumber(k))
			},
		},
		{
			Name: "regulator", Group: GroupDesign,
			Params: []Param{
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
			Fn: func(c *Call) (any, error) {
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
			Name: "estimator", Group: GroupDesign,
			Params: []Param{
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
			Fn: func(c *Call) (any, error) {
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
			Name: "assign", Group: GroupDesign,
			Params: []Param{
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
			Fn: func(c *Call) (any, error) {
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
			Name: "covariance", Group: GroupDesign,
			Params: []Param{
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
			Fn: func(c *Call) (any, error) {
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
	RegisterType((*lsys.LyapunovSolution)(nil), TypeInfo{Name: "a matrix-equation solution", Fields: []string{"X", "residual", "singular"},
		Field: func(v any, name string) (any, bool) {
			s := v.(*lsys.LyapunovSolution)
			switch name {
			case "X":
				return s.X, true
			case "residual":
				return s.Residual, true
			case "singular":
				return s.Singular, true
			}
			return nil, false
		}})
	RegisterType((*lsys.RiccatiSolution)(nil), TypeInfo{Name: "a Riccati solution", Fields: []string{"X", "K", "residual", "closed", "stable"},
		Field: func(v any, name string) (any, bool) {
			s := v.(*lsys.RiccatiSolution)
			switch name {
			case "X":
				return s.X, true
			case "K":
				return s.K, true
			case "residual":
				return s.Residual, true
			case "closed":
				return dsComplexList(s.ClosedLoop), true
			case "stable":
				return s.Stable, true
			}
			return nil, false
		}})
	RegisterType((*lsys.Gramians)(nil), TypeInfo{Name: "gramians", Fields: []string{"P", "Q", "hsv"},
		Field: func(v any, name string) (any, bool) {
			g := v.(*lsys.Gramians)
			switch name {
			case "P":
				return g.P, true
			case "Q":
				return g.Q, true
			case "hsv":
				return dsVector(g.HSV), true
			}
			return nil, false
		}})
	RegisterType((*lsys.HankelValues)(nil), TypeInfo{Name: "Hankel singular values", Fields: []string{"values", "unstable"},
		Field: func(v any, name string) (any, bool) {
			h := v.(*lsys.HankelValues)
			switch name {
			case "values":
				if len(h.HSV) == 0 {
					return &List{}, true
				}
				return dsVector(h.HSV), true
			case "unstable":
				return float64(h.Unstable), true
			}
			return nil, false
		}})
	RegisterType((*lsys.Balanced)(nil), TypeInfo{Name: "a balanced realization", Fields: []string{"system", "T", "Tinv", "hsv"},
		Field: func(v any, name string) (any, bool) {
			b := v.(*lsys.Balanced)
			switch name {
			case "system":
				return b.System, true
			case "T":
				return b.T, true
			case "Tinv":
				return b.Tinv, true
			case "hsv":
				return dsVector(b.HSV), true
			}
			return nil, false
		}})
	RegisterType((*lsys.Reduction)(nil), TypeInfo{Name: "a model reduction", Fields: []string{"reduced", "order", "bound", "error", "hsv"},
		Field: func(v any, name string) (any, bool) {
			r := v.(*lsys.Reduction)
			switch name {
			case "reduced":
				return r.Reduced, true
			case "order":
				return float64(r.Reduced.N()), true
			case "bound":
				return r.Bound, true
			case "error":
				return r.Error, true
			case "hsv":
				return dsVector(r.HSV), true
			}
			return nil, false
		}})
	RegisterType((*lsys.Norm)(nil), TypeInfo{Name: "a system norm", Fields: []string{"value", "peak"},
		Field: func(v any, name string) (any, bool) {
			n := v.(*lsys.Norm)
			switch name {
			case "value":
				return n.Value, true
			case "peak":
				if n.Kind != "inf" {
					return nil, false
				}
				return n.Peak, true
			}
			return nil, false
		}})
	RegisterType((*lsys.Regulator)(nil), TypeInfo{Name: "a regulator", Fields: []string{"K", "X", "closed", "modes"},
		Field: func(v any, name string) (any, bool) {
			r := v.(*lsys.Regulator)
			switch name {
			case "K":
				return r.K, true
			case "X":
				return r.Riccati.X, true
			case "closed":
				return r.ClosedLoop, true
			case "modes":
				return r.Modes, true
			}
			return nil, false
		}})
	RegisterType((*lsys.Estimator)(nil), TypeInfo{Name: "an estimator", Fields: []string{"L", "P", "modes"},
		Field: func(v any, name string) (any, bool) {
			e := v.(*lsys.Estimator)
			switch name {
			case "L":
				return e.L, true
			case "P":
				return e.P, true
			case "modes":
				return e.Modes, true
			}
			return nil, false
		}})
	RegisterType((*lsys.Assignment)(nil), TypeInfo{Name: "a pole assignment", Fields: []string{"K", "L", "poles", "cond"},
		FieldNames: func(v any) []string {
			if v.(*lsys.Assignment).Observer {
				return []string{"L", "poles", "cond"}
			}
			return []string{"K", "poles", "cond"}
		},
		Field: func(v any, name string) (any, bool) {
			a := v.(*lsys.Assignment)
			switch name {
			case "K":
				if a.Observer {
					return nil, false
				}
				return a.Gain, true
			case "L":
				if !a.Observer {
					return nil, false
				}
				return a.Gain, true
			case "poles":
				return dsComplexList(a.Achieved), true
			case "cond":
				return a.CondX, true
			}
			return nil, false
		}})
	RegisterType((*lsys.Covariance)(nil), TypeInfo{Name: "a noise response", Fields: []string{"rms", "outputs", "states"},
		Field: func(v any, name string) (any, bool) {
			cv := v.(*lsys.Covariance)
			switch name {
			case "rms":
				return numberRecord(cv.System.OutputNames, cv.RMS), true
			case "outputs":
				return cv.Outputs, true
			case "states":
				if cv.States == nil {
					return &List{}, true
				}
				return cv.States, true
			}
			return nil, false
		}})
}
