package lsys

import (
	"context"
	"errors"
	"fmt"
	"math"
	"math/cmplx"

	"gonum.org/v1/gonum/mat"
)

// ModalModel is a second-order model truncated to its first r undamped
// modes: states eta_j (modal displacements, shapes mass-normalized) and
// their rates, each mode damped by its own ratio (the diagonal of
// Phi^T D Phi; Modes.Coupling says what the diagonal leaves out).
type ModalModel struct {
	Sys   *System
	Modes *StructuralModes // all modes of the full model
	Kept  int
	// Static: the residual flexibility of the truncated elastic modes,
	// sum_{j>r} phi_j phi_j^T / w_j^2, is added to the displacement
	// outputs as a feedthrough (the static correction; Craig & Kurdila,
	// Fundamentals of Structural Dynamics, 2006, section 13.4). It is
	// exact at zero frequency and leaves velocity and acceleration outputs
	// unchanged.
	Static bool
	Check  *ModalCheck // nil when the full model is too large to compare
}

// ModalCheck compares the modal model with the full one over frequency on
// the channel where they differ most.
type ModalCheck struct {
	W               []float64 // rad/s, log-spaced
	Full, Reduced   []float64 // |G| of the channel
	Error           []float64 // |G_full - G_reduced|
	Output, Input   int       // the channel (0-based)
	Band            float64   // rad/s: the highest kept mode; errors are judged below it
	MaxRelErr       float64   // max over the band of |G_full - G_r| / max |G_full|, worst channel
	OutName, InName string
}

// ModalCheckMaxDOF is the largest full model compared over frequency: the
// full first-order model (2n states) is reduced to Hessenberg form once,
// about (20/3) (2n)^3 flops, a few seconds at this size.
const ModalCheckMaxDOF = 300

// NewModalModel keeps the first r modes of s (rigid-body modes included:
// none may be truncated) with the static correction when static is set.
func NewModalModel(ctx context.Context, s *SecondOrder, r int, static bool) (*ModalModel, error) {
	n := s.N()
	if r < 1 || r > n {
		return nil, fmt.Errorf("keep between 1 and %d modes, not %d", n, r)
	}
	sm, err := StructuralModesOf(s, nil, nil)
	if err != nil {
		return nil, err
	}
	for j := r; j < n; j++ {
		if sm.Rigid[j] {
			return nil, fmt.Errorf("mode %d is a rigid-body mode and would be truncated; keep at least %d modes", j+1, j+1)
		}
	}
	m, p := s.Inputs(), s.Outputs()
	phi := sm.Shapes.Slice(0, n, 0, r).(*mat.Dense)
	var dp, g mat.Dense
	dp.Mul(s.D, phi)
	g.Mul(phi.T(), &dp) // modal damping
	dj := make([]float64, r)
	for j := range dj {
		dj[j] = g.At(j, j)
	}
	var corr *mat.Dense
	if static && r < n {
		// R F with R = sum over truncated modes of phi phi^T / w^2.
		rest := sm.Shapes.Slice(0, n, r, n).(*mat.Dense)
		var rf mat.Dense
		rf.Mul(rest.T(), s.F) // (n-r) x m
		for j := 0; j < n-r; j++ {
			inv := 1 / sm.Lambda[r+j]
			for k := 0; k < m; k++ {
				rf.Set(j, k, rf.At(j, k)*inv)
			}
		}
		var orr mat.Dense
		orr.Mul(s.Out, rest)
		corr = mat.NewDense(p, m, nil)
		corr.Mul(&orr, &rf)
	}
	sys, err := assembleModal(sm, r, dj, s.F, s.Out, s.Measure, corr, s.InputNames, s.OutputNames)
	if err != nil {
		return nil, err
	}
	mm := &ModalModel{Sys: sys, Modes: sm, Kept: r, Static: static}
	if n <= ModalCheckMaxDOF && m > 0 && p > 0 {
		full, err := s.System()
		if err != nil {
			return nil, err
		}
		if mm.Check, err = compareModal(ctx, full, sys, sm, r); err != nil {
			return nil, err
		}
	}
	return mm, nil
}

func boolf(b bool) float64 {
	if b {
		return 1
	}
	return 0
}

// compareModal evaluates both models on a log grid from a tenth of the
// lowest elastic frequency to three times the highest kept one.
func compareModal(ctx context.Context, full, red *System, sm *StructuralModes, r int) (*ModalCheck, error) {
	lo, hi := 0.0, 0.0
	for j, w := range sm.Omega {
		if !sm.Rigid[j] && w > 0 {
			if lo == 0 {
				lo = w
			}
			if j < r {
				hi = w
			}
		}
	}
	if lo == 0 {
		return nil, nil
	}
	band := hi
	if hi == 0 {
		hi = lo
		band = lo / 10
	}
	wlo, whi := lo/10, 3*hi
	const npts = 400
	ef, er := newFreqEval(full), newFreqEval(red)
	p, m := full.P(), full.M()
	gf := make([][]complex128, npts)
	gr := make([][]complex128, npts)
	w := make([]float64, npts)
	for i := 0; i < npts; i++ {
		if err := ctx.Err(); err != nil {
			return nil, err
		}
		w[i] = wlo * math.Pow(whi/wlo, float64(i)/float64(npts-1))
		var err error
		if gf[i], err = ef.at(w[i]); err != nil {
			return nil, fmt.Errorf("the full model at %g rad/s: %w", w[i], err)
		}
		if gr[i], err = er.at(w[i]); err != nil {
			return nil, fmt.Errorf("the modal model at %g rad/s: %w", w[i], err)
		}
	}
	ck := &ModalCheck{Band: band, MaxRelErr: -1}
	for o := 0; o < p; o++ {
		for in := 0; in < m; in++ {
			k := o*m + in
			peak, e := 0.0, 0.0
			for i := range w {
				if w[i] <= band*(1+1e-12) {
					peak = math.Max(peak, cmplx.Abs(gf[i][k]))
					e = math.Max(e, cmplx.Abs(gf[i][k]-gr[i][k]))
				}
			}
			rel := 0.0
			if peak > 0 {
				rel = e / peak
			} else if e > 0 {
				rel = math.Inf(1)
			}
			if rel > ck.MaxRelErr {
				ck.MaxRelErr, ck.Output, ck.Input = rel, o, in
			}
		}
	}
	k := ck.Output*m + ck.Input
	for i := range w {
		ck.W = append(ck.W, w[i])
		ck.Full = append(ck.Full, cmplx.Abs(gf[i][k]))
		ck.Reduced = append(ck.Reduced, cmplx.Abs(gr[i][k]))
		ck.Error = append(ck.Error, cmplx.Abs(gf[i][k]-gr[i][k]))
	}
	ck.OutName, ck.InName = full.OutputNames[ck.Output], full.InputNames[ck.Input]
	return ck, nil
}

// assembleModal builds the modal state-space model of the first r modes
// of sm: states eta_j and eta_j', eta_j” = -w_j^2 eta_j - d_j eta_j' +
// phi_j^T F u, outputs by kind (an acceleration output gets the modal
// accelerations, with their feedthrough), and corr (p x m, nil for none)
// added to the displacement outputs as the static correction.
func assembleModal(sm *StructuralModes, r int, d []float64, F, out *mat.Dense, measure []string, corr *mat.Dense, inputs, outputs []string) (*System, error) {
	n, _ := sm.Shapes.Dims()
	_, m := F.Dims()
	p, _ := out.Dims()
	phi := sm.Shapes.Slice(0, n, 0, r).(*mat.Dense)
	var pf, op mat.Dense
	pf.Mul(phi.T(), F) // r x m
	op.Mul(out, phi)   // p x r
	A := mat.NewDense(2*r, 2*r, nil)
	B := mat.NewDense(2*r, m, nil)
	C := mat.NewDense(p, 2*r, nil)
	D := mat.NewDense(p, m, nil)
	for j := 0; j < r; j++ {
		A.Set(j, r+j, 1)
		A.Set(r+j, j, -sm.Lambda[j]*boolf(!sm.Rigid[j]))
		A.Set(r+j, r+j, -d[j])
		for k := 0; k < m; k++ {
			B.Set(r+j, k, pf.At(j, k))
		}
	}
	for i := 0; i < p; i++ {
		for j := 0; j < r; j++ {
			c := op.At(i, j)
			switch measure[i] {
			case MeasureDisplacement:
				C.Set(i, j, c)
			case MeasureVelocity:
				C.Set(i, r+j, c)
			case MeasureAcceleration:
				C.Set(i, j, c*A.At(r+j, j))
				C.Set(i, r+j, c*A.At(r+j, r+j))
				for k := 0; k < m; k++ {
					D.Set(i, k, D.At(i, k)+c*pf.At(j, k))
				}
			}
		}
		if corr != nil && measure[i] == MeasureDisplacement {
			for k := 0; k < m; k++ {
				D.Set(i, k, D.At(i, k)+corr.At(i, k))
			}
		}
	}
	sys, err := NewSystem(2*r, m, p, A, B, C, D, 0)
	if err != nil {
		return nil, err
	}
	states := make([]string, 2*r)
	for j := 0; j < r; j++ {
		states[j] = fmt.Sprintf("mode%d", j+1)
		states[r+j] = fmt.Sprintf("mode%d'", j+1)
	}
	if inputs == nil {
		inputs = defaultNames("u", m)
	}
	if outputs == nil {
		outputs = defaultNames("y", p)
	}
	return sys.WithNames(states, inputs, outputs)
}

// SparseModalSpec is what a modal model of a large sparse model needs
// besides K and M: the force map, the sensors and what they measure, the
// modal damping ratios (one for all, or one per kept mode) and the names.
type SparseModalSpec struct {
	F, Out          *mat.Dense
	Measure         []string
	Ratios          []float64
	Inputs, Outputs []string
	DOFNames        []string
}

// NewSparseModalModel keeps the lowest r modes of a large sparse model
// (SparseModes) with modal damping ratios. The static correction is
// K^-1 F minus the kept modes' part Phi_r Omega_r^-2 Phi_r^T F (the same
// residual flexibility as the dense form, without all modes), K^-1 F by the
// sparse factorization of K; it needs K nonsingular, so a model with
// rigid-body modes is refused with static set. Up to ModalCheckMaxDOF DOF,
// with one damping ratio for all modes, the model is compared with the
// full one over frequency as NewModalModel does.
func NewSparseModalModel(ctx context.Context, K, M *SparseSym, r int, static bool, spec SparseModalSpec, progress func(string, float64, int)) (*ModalModel, error) {
	n := K.N
	if r < 1 || r > n {
		return nil, fmt.Errorf("keep between 1 and %d modes, not %d", n, r)
	}
	if spec.F == nil {
		return nil, errors.New("the force map F is required (one row per degree of freedom)")
	}
	if fr, _ := spec.F.Dims(); fr != n {
		return nil, &ShapeError{What: "F must have one row per degree of freedom", Got: Shape(spec.F), Other: fmt.Sprintf("%d rows", n)}
	}
	out := spec.Out
	if out == nil {
		out = identity(n)
	}
	if _, c := out.Dims(); c != n {
		return nil, &ShapeError{What: "the output map must have one column per degree of freedom", Got: Shape(out), Other: fmt.Sprintf("%d columns", n)}
	}
	p, _ := out.Dims()
	measure := make([]string, p)
	ms := spec.Measure
	if len(ms) == 0 {
		ms = []string{MeasureDisplacement}
	}
	if len(ms) != 1 && len(ms) != p {
		return nil, fmt.Errorf("give one measured quantity for all outputs or one per output row (%d), not %d", p, len(ms))
	}
	for i := range measure {
		measure[i] = ms[0]
		if len(ms) == p {
			measure[i] = ms[i]
		}
		switch measure[i] {
		case MeasureDisplacement, MeasureVelocity, MeasureAcceleration:
		default:
			return nil, fmt.Errorf("an output measures %q, %q or %q, not %q", MeasureDisplacement, MeasureVelocity, MeasureAcceleration, measure[i])
		}
	}
	ratios := spec.Ratios
	if len(ratios) == 0 {
		ratios = []float64{0}
	}
	if len(ratios) != 1 && len(ratios) != r {
		return nil, fmt.Errorf("give one damping ratio for all kept modes or one per kept mode (%d), not %d", r, len(ratios))
	}
	for _, z := range ratios {
		if math.IsNaN(z) || z < 0 || math.IsInf(z, 0) {
			return nil, fmt.Errorf("damping ratios must be finite and >= 0, not %g", z)
		}
	}
	sm, err := SparseModes(ctx, K, M, SparseModeOptions{Count: r, DOFNames: spec.DOFNames, Progress: progress})
	if err != nil {
		return nil, err
	}
	d := make([]float64, r)
	for j := range d {
		z := ratios[0]
		if len(ratios) == r {
			z = ratios[j]
		}
		d[j] = 2 * z * sm.Omega[j]
		sm.Damping[j] = z
		if sm.Rigid[j] {
			sm.Damping[j] = math.NaN()
		}
	}
	var corr *mat.Dense
	if static {
		for j, rg := range sm.Rigid {
			if rg {
				return nil, fmt.Errorf("mode %d is a rigid-body mode: K is singular and has no static flexibility to correct with; use static: false", j+1)
			}
		}
		perm := NestedDissection(K)
		var f ldlFactor
		if denseFronts(K, perm) {
			f, err = FactorSupernodal(ctx, K, perm, nil)
		} else {
			f, err = FactorLDL(ctx, K, perm, nil)
		}
		if err != nil {
			return nil, fmt.Errorf("the static correction needs K^-1: %w", err)
		}
		_, m := spec.F.Dims()
		X := mat.NewDense(n, m, nil)
		col := make([]float64, n)
		tmp := make([]float64, n)
		for k := 0; k < m; k++ {
			mat.Col(col, k, spec.F)
			f.Solve(col, tmp)
			X.SetCol(k, col)
		}
		// Subtract the kept modes' static part Phi_r Omega_r^-2 Phi_r^T F.
		var pf mat.Dense
		pf.Mul(sm.Shapes.T(), spec.F)
		for j := 0; j < r; j++ {
			for k := 0; k < m; k++ {
				pf.Set(j, k, pf.At(j, k)/sm.Lambda[j])
			}
		}
		var kept mat.Dense
		kept.Mul(sm.Shapes, &pf)
		X.Sub(X, &kept)
		corr = mat.NewDense(p, m, nil)
		corr.Mul(out, X)
	}
	sys, err := assembleModal(sm, r, d, spec.F, out, measure, corr, spec.Inputs, spec.Outputs)
	if err != nil {
		return nil, err
	}
	mm := &ModalModel{Sys: sys, Modes: sm, Kept: r, Static: static}
	// A small model with one ratio for every mode is compared with its full
	// form (dense, the same ratio in all modes), as the dense path does.
	if _, m := spec.F.Dims(); n <= ModalCheckMaxDOF && len(ratios) == 1 && m > 0 && p > 0 {
		full, err := NewSecondOrder(sparseDense(M), nil, sparseDense(K), spec.F, out, measure)
		if err != nil {
			return nil, err
		}
		if full, err = full.WithModalDamping(ratios); err != nil {
			return nil, err
		}
		all, err := StructuralModesOf(full, nil, nil)
		if err != nil {
			return nil, err
		}
		g, err := full.System()
		if err != nil {
			return nil, err
		}
		if mm.Check, err = compareModal(ctx, g, sys, all, r); err != nil {
			return nil, err
		}
	}
	return mm, nil
}

// sparseDense is a as a dense matrix (small models only).
func sparseDense(a *SparseSym) *mat.Dense {
	d := mat.NewDense(a.N, a.N, nil)
	for j := 0; j < a.N; j++ {
		for p := a.ColPtr[j]; p < a.ColPtr[j+1]; p++ {
			d.Set(int(a.RowIdx[p]), j, a.Val[p])
		}
	}
	return d
}
