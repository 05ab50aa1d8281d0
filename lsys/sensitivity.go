package lsys

import (
	"fmt"
	"math/cmplx"
	"sort"
	"strings"

	"gonum.org/v1/gonum/mat"
)

// Sensitivity holds first-order sensitivities of the eigenvalues of a
// state matrix A(p) to named parameters.
type Sensitivity struct {
	// Eigenvalues of A, one per mode: real ones and the member of each
	// complex-conjugate pair with positive imaginary part (the other
	// member's sensitivity is the conjugate), ordered by magnitude.
	Eigenvalues []complex128
	Parameters  []string
	Values      []float64 // the parameter values at which they are taken
	// D[k][j] = d Eigenvalues[k] / d Parameters[j].
	D [][]complex128
	// Cond[k] = 1/|w^H v| for unit left and right eigenvectors; +Inf for a
	// defective eigenvalue.
	Cond []float64
	// Multiplicity[k] is 1 for a simple eigenvalue. A repeated one (a
	// cluster found by Jordan, with its tolerances) is listed once, at the
	// mean of its computed members, with D NaN: it has no derivative
	// (defective, Defective[k] true) or one that depends on the direction
	// of the change (semisimple).
	Multiplicity []int
	Defective    []bool
	Ts           float64 // sample time of the model (0: continuous)
}

// EigenvalueSensitivity returns d lambda / d p_j for every simple eigenvalue
// lambda of A, given dA[j] = dA/dp_j:
//
//	d lambda / d p = w^H (dA/dp) v / (w^H v)
//
// with v and w the right and left eigenvectors (Wilkinson, The Algebraic
// Eigenvalue Problem, 1965, ch. 2; also Jacobi 1846). names and values
// label the parameters. Repeated eigenvalues, found as clusters of the
// Jordan structure, are listed once with an undefined (NaN) derivative.
func EigenvalueSensitivity(A *mat.Dense, dA []*mat.Dense, names []string, values []float64, ts float64) (*Sensitivity, error) {
	if A == nil {
		return nil, fmt.Errorf("the model has no states, so no eigenvalues")
	}
	n, c := A.Dims()
	if n != c {
		return nil, &ShapeError{What: "A must be square", Got: Shape(A), Other: fmt.Sprintf("%dx%d", n, n)}
	}
	if len(dA) != len(names) || len(values) != len(names) {
		return nil, fmt.Errorf("%d derivative matrices for %d parameter names and %d values", len(dA), len(names), len(values))
	}
	for j, d := range dA {
		if r, cc := d.Dims(); r != n || cc != n {
			return nil, &ShapeError{What: "dA/d" + names[j] + " must have the shape of A", Got: Shape(d), Other: Shape(A)}
		}
		if err := CheckFinite("dA/d"+names[j], d); err != nil {
			return nil, err
		}
	}
	es, us, err := decisionEigen(A)
	if err != nil {
		return nil, err
	}
	// Repeated eigenvalues: clusters of the Jordan structure (Golub &
	// Wilkinson 1976), with the default tolerances of Jordan.
	js, err := jordanFrom(us.A, es, 0, 0, 0)
	if err != nil {
		return nil, err
	}
	cluster := map[int]*JordanCluster{}
	for c := range js.Clusters {
		jc := &js.Clusters[c]
		if jc.Algebraic > 1 {
			for _, i := range jc.idx {
				cluster[i] = jc
			}
		}
	}
	var idx []int
	listed := map[*JordanCluster]bool{}
	for k, l := range es.Values {
		if jc := cluster[k]; jc != nil {
			if !listed[jc] {
				listed[jc] = true
				idx = append(idx, k)
			}
			continue
		}
		if imag(l) >= 0 {
			idx = append(idx, k)
		}
	}
	value := func(k int) complex128 {
		if jc := cluster[k]; jc != nil {
			return jc.Value
		}
		return es.Values[k]
	}
	sort.SliceStable(idx, func(a, b int) bool {
		la, lb := value(idx[a]), value(idx[b])
		if ma, mb := cmplx.Abs(la), cmplx.Abs(lb); ma != mb {
			return ma < mb
		}
		return real(la) < real(lb)
	})
	out := &Sensitivity{Parameters: append([]string(nil), names...), Values: append([]float64(nil), values...), Ts: ts}
	for _, k := range idx {
		if jc := cluster[k]; jc != nil {
			row := make([]complex128, len(dA))
			for j := range row {
				row[j] = cmplx.NaN()
			}
			out.Eigenvalues = append(out.Eigenvalues, jc.Value)
			out.D = append(out.D, row)
			out.Cond = append(out.Cond, jc.Cond)
			out.Multiplicity = append(out.Multiplicity, jc.Algebraic)
			out.Defective = append(out.Defective, jc.Defective())
			continue
		}
		v, w := es.Right[k], es.Left[k]
		whv := dotH(w, v)
		row := make([]complex128, len(dA))
		for j, d := range dA {
			if cmplx.Abs(whv) == 0 {
				row[j] = cmplx.NaN()
				continue
			}
			// d v
			dv := make([]complex128, n)
			for i := 0; i < n; i++ {
				var s complex128
				for l := 0; l < n; l++ {
					s += complex(d.At(i, l), 0) * v[l]
				}
				dv[i] = s
			}
			row[j] = dotH(w, dv) / whv
		}
		out.Eigenvalues = append(out.Eigenvalues, es.Values[k])
		out.D = append(out.D, row)
		out.Cond = append(out.Cond, es.Cond[k])
		out.Multiplicity = append(out.Multiplicity, 1)
		out.Defective = append(out.Defective, false)
	}
	return out, nil
}

// dotH is w^H v.
func dotH(w, v []complex128) complex128 {
	var s complex128
	for i := range w {
		s += cmplx.Conj(w[i]) * v[i]
	}
	return s
}

func fmtC(c complex128) string {
	if cmplx.IsNaN(c) {
		return "undefined"
	}
	r := real(c)
	if r == 0 {
		r = 0 // no "-0"
	}
	re := fmt.Sprintf("%.6g", r)
	if imag(c) == 0 {
		return re
	}
	sign := "+"
	im := imag(c)
	if im < 0 {
		sign, im = "-", -im
	}
	return fmt.Sprintf("%s %s %.6gj", re, sign, im)
}

// String is a text table: one row per mode, one column per parameter.
func (s *Sensitivity) String() string {
	var b strings.Builder
	b.WriteString("eigenvalue sensitivities d(eigenvalue)/d(parameter)")
	for j, p := range s.Parameters {
		fmt.Fprintf(&b, "\n  %s = %.6g", p, s.Values[j])
	}
	for k, l := range s.Eigenvalues {
		if k < len(s.Multiplicity) && s.Multiplicity[k] > 1 {
			kind := "semisimple: the derivative depends on the direction of the change"
			if s.Defective[k] {
				kind = "defective: no derivative"
			}
			fmt.Fprintf(&b, "\neigenvalue %s, repeated %d times (%s)", fmtC(l), s.Multiplicity[k], kind)
			continue
		}
		fmt.Fprintf(&b, "\neigenvalue %s (condition %.3g):", fmtC(l), s.Cond[k])
		for j, p := range s.Parameters {
			fmt.Fprintf(&b, "\n  d/d%s = %s", p, fmtC(s.D[k][j]))
		}
	}
	if len(s.Eigenvalues) > 0 && hasPair(s.Eigenvalues) {
		b.WriteString("\n(complex pairs: the conjugate eigenvalue moves by the conjugate amount)")
	}
	return b.String()
}

func hasPair(v []complex128) bool {
	for _, l := range v {
		if imag(l) != 0 {
			return true
		}
	}
	return false
}

// Relative returns p/|lambda| * d lambda/dp, the change of the eigenvalue,
// relative to its size, per relative change of the parameter (NaN at 0).
func (s *Sensitivity) Relative(k, j int) complex128 {
	l := cmplx.Abs(s.Eigenvalues[k])
	if l == 0 {
		return cmplx.NaN()
	}
	return s.D[k][j] * complex(s.Values[j]/l, 0)
}
