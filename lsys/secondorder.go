package lsys

import (
	"errors"
	"fmt"
	"math"

	"gonum.org/v1/gonum/mat"
)

// Output kinds of a second-order model: what an output row measures.
const (
	MeasureDisplacement = "displacement"
	MeasureVelocity     = "velocity"
	MeasureAcceleration = "acceleration"
)

// Damping kinds of a second-order model: how D was made.
const (
	DampingNone     = "none"
	DampingMatrix   = "matrix"
	DampingModal    = "modal"
	DampingRayleigh = "Rayleigh"
)

// DampingSpec records how the damping matrix of a second-order model was
// made, so displays and mode tables can say so.
type DampingSpec struct {
	Kind string // DampingNone, DampingMatrix, DampingModal or DampingRayleigh
	// Modal: the ratio of each mode (one entry applies to all).
	Ratios []float64
	// Rayleigh: D = Alpha M + Beta K, fitted to ratios Z1, Z2 at the
	// circular frequencies W1, W2 (rad/s).
	Alpha, Beta    float64
	W1, W2, Z1, Z2 float64
}

// SecondOrder is a structural model M q” + D q' + K q = F u with outputs
// y = Cq q + Cv q' + Ca q” (each output row measures one kind), kept in its
// second-order form. M must be symmetric positive definite, K symmetric
// (positive semi-definite for a structure; rigid-body modes are its null
// space), D symmetric. System converts it to first order when a first-order
// analysis needs it.
type SecondOrder struct {
	M, D, K *mat.Dense // n x n
	F       *mat.Dense // n x m: the generalized force of each input at each DOF
	Out     *mat.Dense // p x n: the DOF combination each output measures
	Measure []string   // len p: MeasureDisplacement, ...Velocity or ...Acceleration

	DOFNames, InputNames, OutputNames []string
	Damping                           DampingSpec
}

// SymmetryTol is the relative asymmetry accepted in M, K and D: |A - A^T|
// at most 1e-10 times the largest entry of A (rounding of exported
// finite-element matrices is far below; a real asymmetry far above).
const SymmetryTol = 1e-10

func checkSymmetric(name string, a *mat.Dense) error {
	n, c := a.Dims()
	if n != c {
		return &ShapeError{What: name + " must be square", Got: Shape(a), Other: fmt.Sprintf("%dx%d", n, n)}
	}
	if err := CheckFinite(name, a); err != nil {
		return err
	}
	big := 0.0
	for i := 0; i < n; i++ {
		for j := 0; j < n; j++ {
			big = math.Max(big, math.Abs(a.At(i, j)))
		}
	}
	for i := 0; i < n; i++ {
		for j := i + 1; j < n; j++ {
			if d := math.Abs(a.At(i, j) - a.At(j, i)); d > SymmetryTol*big {
				return fmt.Errorf("%s is not symmetric: %s[%d, %d] = %g but %s[%d, %d] = %g (tolerance %g of the largest entry); structural matrices are symmetric, check the export", name, name, i+1, j+1, a.At(i, j), name, j+1, i+1, a.At(j, i), SymmetryTol)
			}
		}
	}
	return nil
}

// NewSecondOrder checks and copies a second-order model. D may be nil (no
// damping; set it later with WithModalDamping or WithRayleigh). F is n x m,
// out is p x n and measure has one kind per output row (one entry applies to
// all rows). Names may be nil: q1..qn, u1..um, y1..yp.
func NewSecondOrder(M, D, K, F, out *mat.Dense, measure []string) (*SecondOrder, error) {
	if M == nil || K == nil {
		return nil, errors.New("M and K are required")
	}
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
	s := &SecondOrder{M: mat.DenseCopyOf(M), K: mat.DenseCopyOf(K), Damping: DampingSpec{Kind: DampingNone}}
	if D != nil {
		if err := checkSymmetric("D", D); err != nil {
			return nil, err
		}
		if r, _ := D.Dims(); r != n {
			return nil, &ShapeError{What: "D must be the size of M", Got: Shape(D), Other: Shape(M)}
		}
		s.D = mat.DenseCopyOf(D)
		s.Damping.Kind = DampingMatrix
	} else {
		s.D = mat.NewDense(n, n, nil)
	}
	var chol mat.Cholesky
	if !chol.Factorize(symOf(s.M)) {
		return nil, errors.New("M is not positive definite: every degree of freedom needs mass (condense massless ones out first, e.g. by static condensation)")
	}
	if F == nil {
		return nil, errors.New("the input map F is required (n rows, one column per force input)")
	}
	if r, _ := F.Dims(); r != n {
		return nil, &ShapeError{What: "F must have one row per degree of freedom (the size of M)", Got: Shape(F), Other: Shape(M)}
	}
	if err := CheckFinite("F", F); err != nil {
		return nil, err
	}
	s.F = mat.DenseCopyOf(F)
	if out == nil {
		out = identity(n)
	}
	if _, c := out.Dims(); c != n {
		return nil, &ShapeError{What: "the output map must have one column per degree of freedom", Got: Shape(out), Other: Shape(M)}
	}
	if err := CheckFinite("output map", out); err != nil {
		return nil, err
	}
	s.Out = mat.DenseCopyOf(out)
	p, _ := out.Dims()
	if len(measure) == 0 {
		measure = []string{MeasureDisplacement}
	}
	if len(measure) != 1 && len(measure) != p {
		return nil, fmt.Errorf("give one measured quantity for all outputs or one per output row (%d), not %d", p, len(measure))
	}
	s.Measure = make([]string, p)
	for i := range s.Measure {
		k := measure[0]
		if len(measure) == p {
			k = measure[i]
		}
		switch k {
		case MeasureDisplacement, MeasureVelocity, MeasureAcceleration:
		default:
			return nil, fmt.Errorf("an output measures %q, %q or %q, not %q", MeasureDisplacement, MeasureVelocity, MeasureAcceleration, k)
		}
		s.Measure[i] = k
	}
	_, m := F.Dims()
	s.DOFNames = defaultNames("q", n)
	s.InputNames = defaultNames("u", m)
	s.OutputNames = defaultNames("y", p)
	return s, nil
}

// symOf is the symmetric part (A + A^T)/2 of a square matrix, which
// checkSymmetric has found symmetric to rounding.
func symOf(a *mat.Dense) *mat.SymDense {
	n, _ := a.Dims()
	s := mat.NewSymDense(n, nil)
	for i := 0; i < n; i++ {
		for j := i; j < n; j++ {
			s.SetSym(i, j, (a.At(i, j)+a.At(j, i))/2)
		}
	}
	return s
}

// N, Inputs and Outputs are the numbers of degrees of freedom, inputs and
// outputs.
func (s *SecondOrder) N() int       { n, _ := s.M.Dims(); return n }
func (s *SecondOrder) Inputs() int  { _, m := s.F.Dims(); return m }
func (s *SecondOrder) Outputs() int { p, _ := s.Out.Dims(); return p }

// WithNames returns a copy with the given names (nil keeps a list).
func (s *SecondOrder) WithNames(dofs, inputs, outputs []string) (*SecondOrder, error) {
	c := *s
	for _, l := range []struct {
		what  string
		names []string
		dst   *[]string
		want  int
	}{{"degrees of freedom", dofs, &c.DOFNames, s.N()}, {"inputs", inputs, &c.InputNames, s.Inputs()}, {"outputs", outputs, &c.OutputNames, s.Outputs()}} {
		if l.names == nil {
			continue
		}
		if len(l.names) != l.want {
			return nil, fmt.Errorf("%d names given for %d %s", len(l.names), l.want, l.what)
		}
		*l.dst = append([]string(nil), l.names...)
	}
	return &c, nil
}

// System is the first-order form with states x = [q; q'] (named q and q'):
//
//	A = [0 I; -M^-1 K  -M^-1 D],  B = [0; M^-1 F],
//	C = [Cq - Ca M^-1 K,  Cv - Ca M^-1 D],  D = Ca M^-1 F,
//
// M^-1 applied through its Cholesky factor (never formed).
func (s *SecondOrder) System() (*System, error) {
	n, m, p := s.N(), s.Inputs(), s.Outputs()
	var chol mat.Cholesky
	if !chol.Factorize(symOf(s.M)) {
		return nil, errors.New("M is not positive definite")
	}
	var mk, md, mf mat.Dense
	if err := chol.SolveTo(&mk, s.K); err != nil {
		return nil, err
	}
	if err := chol.SolveTo(&md, s.D); err != nil {
		return nil, err
	}
	if err := chol.SolveTo(&mf, s.F); err != nil {
		return nil, err
	}
	A := mat.NewDense(2*n, 2*n, nil)
	B := mat.NewDense(2*n, m, nil)
	C := mat.NewDense(p, 2*n, nil)
	D := mat.NewDense(p, m, nil)
	for i := 0; i < n; i++ {
		A.Set(i, n+i, 1)
		for j := 0; j < n; j++ {
			A.Set(n+i, j, -mk.At(i, j))
			A.Set(n+i, n+j, -md.At(i, j))
		}
		for j := 0; j < m; j++ {
			B.Set(n+i, j, mf.At(i, j))
		}
	}
	for r := 0; r < p; r++ {
		for i := 0; i < n; i++ {
			w := s.Out.At(r, i)
			if w == 0 {
				continue
			}
			switch s.Measure[r] {
			case MeasureDisplacement:
				C.Set(r, i, C.At(r, i)+w)
			case MeasureVelocity:
				C.Set(r, n+i, C.At(r, n+i)+w)
			case MeasureAcceleration:
				for j := 0; j < n; j++ {
					C.Set(r, j, C.At(r, j)-w*mk.At(i, j))
					C.Set(r, n+j, C.At(r, n+j)-w*md.At(i, j))
				}
				for j := 0; j < m; j++ {
					D.Set(r, j, D.At(r, j)+w*mf.At(i, j))
				}
			}
		}
	}
	g, err := NewSystem(2*n, m, p, A, B, C, D, 0)
	if err != nil {
		return nil, err
	}
	states := make([]string, 2*n)
	for i, q := range s.DOFNames {
		states[i] = q
		states[n+i] = q + "'"
	}
	return g.WithNames(states, s.InputNames, s.OutputNames)
}

// WithModalDamping returns a copy damped mode by mode: with the undamped
// mass-normalized shapes Phi (Phi^T M Phi = I) and frequencies w_j,
//
//	D = M Phi diag(2 zeta_j w_j) Phi^T M,
//
// so that Phi^T D Phi = diag(2 zeta_j w_j) exactly (classical damping).
// ratios has one entry per mode, or one for all. Rigid-body modes get no
// damping (their w_j is 0).
func (s *SecondOrder) WithModalDamping(ratios []float64) (*SecondOrder, error) {
	n := s.N()
	if len(ratios) != 1 && len(ratios) != n {
		return nil, fmt.Errorf("give one damping ratio for all modes or one per mode (%d), not %d", n, len(ratios))
	}
	for _, z := range ratios {
		if math.IsNaN(z) || z < 0 || math.IsInf(z, 0) {
			return nil, fmt.Errorf("damping ratios must be finite and >= 0, not %g", z)
		}
	}
	md, err := UndampedModes(s.M, s.K)
	if err != nil {
		return nil, err
	}
	mphi := mat.NewDense(n, n, nil)
	mphi.Mul(s.M, md.Shapes)
	scaled := mat.DenseCopyOf(mphi)
	for j := 0; j < n; j++ {
		z := ratios[0]
		if len(ratios) == n {
			z = ratios[j]
		}
		c := 2 * z * md.Omega[j]
		for i := 0; i < n; i++ {
			scaled.Set(i, j, scaled.At(i, j)*c)
		}
	}
	D := mat.NewDense(n, n, nil)
	D.Mul(scaled, mphi.T())
	c := *s
	c.D = mat.DenseCopyOf(symOf(D))
	c.Damping = DampingSpec{Kind: DampingModal, Ratios: append([]float64(nil), ratios...)}
	return &c, nil
}

// RayleighFit returns alpha and beta of D = alpha M + beta K that give the
// damping ratios z1 at w1 and z2 at w2 (rad/s): a mode at w has the ratio
// zeta(w) = alpha/(2w) + beta w/2 under classical damping, two linear
// equations in alpha and beta.
func RayleighFit(w1, z1, w2, z2 float64) (alpha, beta float64, err error) {
	for _, v := range []float64{w1, w2} {
		if !(v > 0) || math.IsInf(v, 0) {
			return 0, 0, fmt.Errorf("the two fitting frequencies must be finite and > 0, not %g", v)
		}
	}
	for _, z := range []float64{z1, z2} {
		if math.IsNaN(z) || z < 0 || math.IsInf(z, 0) {
			return 0, 0, fmt.Errorf("damping ratios must be finite and >= 0, not %g", z)
		}
	}
	if math.Abs(w1-w2) <= 1e-9*math.Max(w1, w2) {
		return 0, 0, errors.New("the two fitting frequencies must differ")
	}
	// [1/(2w1) w1/2; 1/(2w2) w2/2] [alpha; beta] = [z1; z2]
	det := w2/(4*w1) - w1/(4*w2)
	alpha = (z1*w2/2 - z2*w1/2) / det
	beta = (z2/(2*w1) - z1/(2*w2)) / det
	return alpha, beta, nil
}

// WithRayleigh returns a copy with D = alpha M + beta K fitted by
// RayleighFit to ratio z1 at w1 and z2 at w2 (rad/s). A negative alpha or
// beta (ratios falling with frequency too fast) is refused: it would make
// some modes unstable.
func (s *SecondOrder) WithRayleigh(w1, z1, w2, z2 float64) (*SecondOrder, error) {
	alpha, beta, err := RayleighFit(w1, z1, w2, z2)
	if err != nil {
		return nil, err
	}
	if alpha < 0 || beta < 0 {
		return nil, fmt.Errorf("the fit gives alpha = %g, beta = %g; a negative coefficient damps some modes negatively: choose ratios that do not fall faster than 1/w or rise faster than w between the two frequencies", alpha, beta)
	}
	n := s.N()
	D := mat.NewDense(n, n, nil)
	D.Scale(alpha, s.M)
	var bk mat.Dense
	bk.Scale(beta, s.K)
	D.Add(D, &bk)
	c := *s
	c.D = D
	c.Damping = DampingSpec{Kind: DampingRayleigh, Alpha: alpha, Beta: beta, W1: w1, W2: w2, Z1: z1, Z2: z2}
	return &c, nil
}

// FirstOrder is a model kept in another form that converts to a
// first-order system where a first-order analysis needs one.
type FirstOrder interface {
	System() (*System, error)
}

// System is the modal model's first-order system.
func (m *ModalModel) System() (*System, error) { return m.Sys, nil }
