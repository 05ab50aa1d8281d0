package lsys

import (
	"errors"
	"fmt"
	"math"
	"sort"

	"gonum.org/v1/gonum/mat"
)

// RigidTolRel decides rigid-body modes: a mode is rigid when its w^2 is at
// most RigidTolRel times the scale of the problem (the largest eigenvalue
// for the dense solver, ||K||_1/||M||_1 for the sparse one). The rounding
// error of a computed w^2 is about machine epsilon times that scale, so
// 1e-9 leaves seven orders of margin either way: a true elastic mode is
// called rigid only when the model's stiffness spans more than nine decades.
const RigidTolRel = 1e-9

// StructuralModes are the undamped modes of a structure, K phi = w^2 M phi,
// with mass-normalized real shapes (Phi^T M Phi = I), in ascending order.
type StructuralModes struct {
	Lambda []float64 // w^2 as computed (a rigid mode's may be a rounding-sized negative)
	Omega  []float64 // rad/s; 0 for rigid-body modes
	Freq   []float64 // Hz
	// Damping is each mode's ratio phi^T D phi / (2 w) (NaN for rigid-body
	// modes and undamped models: no ratio to give). Exact for classical
	// damping; Coupling says how far D is from it.
	Damping  []float64
	Rigid    []bool
	RigidTol float64 // the absolute threshold on w^2 used
	Shapes   *mat.Dense
	// ModalMass is phi^T M phi with each shape scaled to a largest entry
	// of 1, the figure engineers compare between models.
	ModalMass []float64
	DOFNames  []string

	// Per excitation direction r (a unit rigid displacement pattern):
	// participation Gamma_j = phi_j^T M r, effective mass Gamma_j^2, the
	// total r^T M r and the cumulative fraction of it over modes 1..j.
	Directions    []string
	Participation [][]float64 // [direction][mode]
	EffectiveMass [][]float64
	TotalMass     []float64
	Cumulative    [][]float64

	// Coupling is the largest |phi_i^T D phi_j| / sqrt(d_ii d_jj) over
	// i != j among the modes found: 0 for classical damping; NaN without
	// damping. Above about 0.1 the modal damping ratios are rough.
	Coupling float64
	// Orthogonality is max |Phi^T M Phi - I| over the modes found.
	Orthogonality float64
	// MassCond is the 1-norm condition estimate of M (dense path).
	MassCond    float64
	DampingSpec DampingSpec // how the model's D was made (StructuralModesOf)
	Complete    bool        // all n modes were computed
	Method      string      // how they were computed, with its reference
	Sparse      *SparseStats
}

// UndampedModes solves K phi = w^2 M phi for dense symmetric M (positive
// definite) and K by the standard reduction: M = L L^T (Cholesky),
// C = L^-1 K L^-T, C = V Lambda V^T (symmetric QR), Phi = L^-T V; see
// Golub & Van Loan, Matrix Computations, 4th ed. 2013, section 8.7.2. The
// shapes come out M-orthonormal; each is signed so its largest entry is
// positive (same input, same output).
func UndampedModes(M, K *mat.Dense) (*StructuralModes, error) {
	if err := checkSymmetric("M", M); err != nil {
		return nil, err
	}
	if err := checkSymmetric("K", K); err != nil {
		return nil, err
	}
	n, _ := M.Dims()
	if r, _ := K.Dims(); r != n {
		return nil, &ShapeError{What: "K must be the size of M", Got: Shape(K), Other: Shape(M)}
	}
	var chol mat.Cholesky
	if !chol.Factorize(symOf(M)) {
		return nil, errors.New("M is not positive definite: every degree of freedom needs mass")
	}
	var L mat.TriDense
	chol.LTo(&L)
	// C = L^-1 K L^-T through two triangular solves.
	var X mat.Dense
	if err := X.Solve(&L, K); err != nil {
		return nil, err
	}
	var C mat.Dense
	if err := C.Solve(&L, X.T()); err != nil {
		return nil, err
	}
	var es mat.EigenSym
	if !es.Factorize(symOf(&C), true) {
		return nil, errors.New("the symmetric eigenvalue iteration did not converge")
	}
	lam := es.Values(nil)
	var V mat.Dense
	es.VectorsTo(&V)
	phi := mat.NewDense(n, n, nil)
	if err := phi.Solve(L.T(), &V); err != nil {
		return nil, err
	}
	scale := 0.0
	for _, l := range lam {
		scale = math.Max(scale, math.Abs(l))
	}
	sm := finishModes(lam, phi, RigidTolRel*scale)
	sm.MassCond = chol.Cond()
	sm.Complete = true
	sm.Method = "dense symmetric-definite: Cholesky of M, symmetric QR (Golub & Van Loan 2013, 8.7.2)"
	sm.Orthogonality = mOrthogonality(M, sm.Shapes)
	return sm, nil
}

// finishModes sorts, signs and fills the frequency columns.
func finishModes(lam []float64, phi *mat.Dense, rigidTol float64) *StructuralModes {
	n, r := phi.Dims()
	idx := make([]int, r)
	for i := range idx {
		idx[i] = i
	}
	sort.SliceStable(idx, func(a, b int) bool { return lam[idx[a]] < lam[idx[b]] })
	sm := &StructuralModes{RigidTol: rigidTol, Shapes: mat.NewDense(n, r, nil), Coupling: math.NaN()}
	for j, k := range idx {
		l := lam[k]
		col := make([]float64, n)
		big, at := 0.0, 0
		for i := 0; i < n; i++ {
			col[i] = phi.At(i, k)
			if a := math.Abs(col[i]); a > big*(1+1e-12) {
				big, at = a, i
			}
		}
		if col[at] < 0 {
			for i := range col {
				col[i] = -col[i]
			}
		}
		sm.Shapes.SetCol(j, col)
		rigid := math.Abs(l) <= rigidTol
		w := 0.0
		if !rigid && l > 0 {
			w = math.Sqrt(l)
		}
		sm.Lambda = append(sm.Lambda, l)
		sm.Omega = append(sm.Omega, w)
		sm.Freq = append(sm.Freq, w/(2*math.Pi))
		sm.Rigid = append(sm.Rigid, rigid)
		sm.Damping = append(sm.Damping, math.NaN())
		// phi^T M phi = 1; scaled to a largest entry of 1 it is 1/big^2.
		sm.ModalMass = append(sm.ModalMass, 1/(big*big))
	}
	return sm
}

func mOrthogonality(M mat.Matrix, phi *mat.Dense) float64 {
	var mp, g mat.Dense
	mp.Mul(M, phi)
	g.Mul(phi.T(), &mp)
	r, _ := g.Dims()
	e := 0.0
	for i := 0; i < r; i++ {
		for j := 0; j < r; j++ {
			want := 0.0
			if i == j {
				want = 1
			}
			e = math.Max(e, math.Abs(g.At(i, j)-want))
		}
	}
	return e
}

// StructuralModesOf computes the undamped modes of a second-order model
// (dense), their damping ratios from its D, and participation for the
// excitation directions R (n x d, one column per direction, e.g. a unit
// rigid translation; nil for none) named dirs.
func StructuralModesOf(s *SecondOrder, R *mat.Dense, dirs []string) (*StructuralModes, error) {
	sm, err := UndampedModes(s.M, s.K)
	if err != nil {
		return nil, err
	}
	sm.DOFNames = append([]string(nil), s.DOFNames...)
	sm.DampingSpec = s.Damping
	if s.Damping.Kind != DampingNone {
		sm.modalDamping(s.D)
	}
	if err := sm.participation(denseMul(s.M), R, dirs); err != nil {
		return nil, err
	}
	return sm, nil
}

// modalDamping fills Damping and Coupling from Phi^T D Phi.
func (sm *StructuralModes) modalDamping(D mat.Matrix) {
	var dp, g mat.Dense
	dp.Mul(D, sm.Shapes)
	g.Mul(sm.Shapes.T(), &dp)
	r, _ := g.Dims()
	sm.Coupling = 0
	for i := 0; i < r; i++ {
		if !sm.Rigid[i] && sm.Omega[i] > 0 {
			sm.Damping[i] = g.At(i, i) / (2 * sm.Omega[i])
		}
		for j := 0; j < r; j++ {
			if i == j {
				continue
			}
			d := math.Sqrt(math.Abs(g.At(i, i) * g.At(j, j)))
			if d > 0 {
				sm.Coupling = math.Max(sm.Coupling, math.Abs(g.At(i, j))/d)
			} else if g.At(i, j) != 0 {
				sm.Coupling = math.Inf(1)
			}
		}
	}
}

// participation fills the per-direction columns; mul sets dst = M x.
func (sm *StructuralModes) participation(mul func(dst, x []float64), R *mat.Dense, dirs []string) error {
	if R == nil {
		return nil
	}
	n, d := R.Dims()
	if nn, _ := sm.Shapes.Dims(); nn != n {
		return &ShapeError{What: "the excitation directions must have one row per degree of freedom", Got: Shape(R), Other: fmt.Sprintf("%d rows", nn)}
	}
	if err := CheckFinite("directions", R); err != nil {
		return err
	}
	if dirs == nil {
		dirs = defaultNames("r", d)
	}
	if len(dirs) != d {
		return fmt.Errorf("%d direction names for %d directions", len(dirs), d)
	}
	_, r := sm.Shapes.Dims()
	sm.Directions = append([]string(nil), dirs...)
	sm.Participation = make([][]float64, d)
	sm.EffectiveMass = make([][]float64, d)
	sm.Cumulative = make([][]float64, d)
	sm.TotalMass = make([]float64, d)
	rk := make([]float64, n)
	mr := make([]float64, n)
	for k := 0; k < d; k++ {
		mat.Col(rk, k, R)
		mul(mr, rk)
		sm.TotalMass[k] = dot(rk, mr)
		if !(sm.TotalMass[k] > 0) {
			return fmt.Errorf("direction %s carries no mass (r^T M r = %g): give a rigid displacement pattern such as a unit translation", dirs[k], sm.TotalMass[k])
		}
		sum := 0.0
		for j := 0; j < r; j++ {
			g := 0.0
			for i := 0; i < n; i++ {
				g += sm.Shapes.At(i, j) * mr[i]
			}
			sm.Participation[k] = append(sm.Participation[k], g)
			sm.EffectiveMass[k] = append(sm.EffectiveMass[k], g*g)
			sum += g * g
			sm.Cumulative[k] = append(sm.Cumulative[k], sum/sm.TotalMass[k])
		}
	}
	return nil
}

func dot(a, b []float64) float64 {
	s := 0.0
	for i, v := range a {
		s += v * b[i]
	}
	return s
}

func denseMul(M *mat.Dense) func(dst, x []float64) {
	return func(dst, x []float64) {
		n, _ := M.Dims()
		for i := 0; i < n; i++ {
			dst[i] = dot(M.RawRowView(i), x)
		}
	}
}

// MACMatrix is the modal assurance criterion between two sets of shapes:
// MAC_ij = (a_i^T b_j)^2 / ((a_i^T a_i)(b_j^T b_j)), 1 for parallel shapes
// and 0 for orthogonal ones (Allemang & Brown, "A correlation coefficient
// for modal vector analysis", 1982). It is not mass-weighted: measured
// shapes come without a mass matrix.
type MACMatrix struct {
	Values         *mat.Dense // ra x rb
	Rows, Cols     []string   // mode labels (with frequencies when known)
	RowSet, ColSet string     // names of the two sets
}

// MAC computes the modal assurance criterion between the columns of A and
// B (same number of rows). A zero column is an error: it has no direction.
func MAC(A, B *mat.Dense) (*mat.Dense, error) {
	n, ra := A.Dims()
	nb, rb := B.Dims()
	if n != nb {
		return nil, &ShapeError{What: "the two sets of shapes must have the same number of rows (degrees of freedom)", Got: Shape(A), Other: Shape(B)}
	}
	if err := CheckFinite("first shapes", A); err != nil {
		return nil, err
	}
	if err := CheckFinite("second shapes", B); err != nil {
		return nil, err
	}
	na := make([]float64, ra)
	nbv := make([]float64, rb)
	for j := 0; j < ra; j++ {
		na[j] = mat.Dot(A.ColView(j), A.ColView(j))
		if na[j] == 0 {
			return nil, fmt.Errorf("shape %d of the first set is zero", j+1)
		}
	}
	for j := 0; j < rb; j++ {
		nbv[j] = mat.Dot(B.ColView(j), B.ColView(j))
		if nbv[j] == 0 {
			return nil, fmt.Errorf("shape %d of the second set is zero", j+1)
		}
	}
	out := mat.NewDense(ra, rb, nil)
	for i := 0; i < ra; i++ {
		for j := 0; j < rb; j++ {
			d := mat.Dot(A.ColView(i), B.ColView(j))
			out.Set(i, j, d*d/(na[i]*nbv[j]))
		}
	}
	return out, nil
}

// ShapePlot asks for charts of mode shapes: each chosen mode's deflection
// over the undeformed structure, for a line-like structure (one
// deflection per node along a line) or a grid-like one (Grid = nx, ny
// nodes, node i + nx j, one out-of-plane deflection each).
type ShapePlot struct {
	Modes *StructuralModes
	Which []int     // modes (0-based)
	DOFs  []int     // the DOFs drawn, in node order (0-based); nil: all
	X     []float64 // line-like: node positions (nil: 1, 2, ...)
	Grid  [2]int    // grid-like: nodes along x and y; 0, 0 for line-like
}

// NewShapePlot checks the request against the modes.
func NewShapePlot(sm *StructuralModes, which, dofs []int, x []float64, grid [2]int) (*ShapePlot, error) {
	n, r := sm.Shapes.Dims()
	if len(which) == 0 {
		for j := 0; j < r && j < 4; j++ {
			which = append(which, j)
		}
	}
	for _, j := range which {
		if j < 0 || j >= r {
			return nil, fmt.Errorf("mode %d is not among the %d modes computed", j+1, r)
		}
	}
	if dofs == nil {
		dofs = make([]int, n)
		for i := range dofs {
			dofs[i] = i
		}
	}
	for _, d := range dofs {
		if d < 0 || d >= n {
			return nil, fmt.Errorf("degree of freedom %d is outside 1..%d", d+1, n)
		}
	}
	if grid != [2]int{} {
		if grid[0] < 2 || grid[1] < 2 || grid[0]*grid[1] != len(dofs) {
			return nil, fmt.Errorf("a grid of %d x %d nodes needs %d degrees of freedom drawn, not %d (give dofs: the one deflection of each node)", grid[0], grid[1], grid[0]*grid[1], len(dofs))
		}
		if x != nil {
			return nil, errors.New("node positions are for line-like structures; a grid is drawn on its own spacing")
		}
	} else if x != nil && len(x) != len(dofs) {
		return nil, fmt.Errorf("%d positions for %d nodes drawn", len(x), len(dofs))
	}
	return &ShapePlot{Modes: sm, Which: which, DOFs: dofs, X: x, Grid: grid}, nil
}
