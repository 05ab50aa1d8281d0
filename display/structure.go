package display

import (
	"fmt"
	"html"
	"math"
	"math/cmplx"
	"strconv"
	"strings"

	"gonum.org/v1/gonum/mat"

	"lsys/lsys"
)

func init() {
	Register((*lsys.ZeroSet)(nil), renderZeros)
	Register((*lsys.ModalForm)(nil), renderModal)
	Register((*lsys.JordanStructure)(nil), renderJordan)
	Register((*lsys.Structure)(nil), renderStructure)
	Register((*lsys.Decomposition)(nil), renderDecomposition)
	Register((*lsys.Subspace)(nil), renderSubspace)
	Register((*lsys.InvariantCheck)(nil), renderInvariant)
	Register((*lsys.EigenStructure)(nil), renderEigen)
}

// sxValues writes eigenvalues or zeros; a conjugate pair is written once as
// "a ± bj", and a value repeated exactly (a multiple zero, listed by its
// cluster's mean) once with its multiplicity, "-500 (×2)". An empty list is
// "none".
func sxValues(vals []complex128) string { return sxValuesMulti(vals, nil) }

// sxValuesMulti is sxValues with the spread of each multiple value that
// multi lists: "0 (×2, spread 8.1e-09)".
func sxValuesMulti(vals []complex128, multi []lsys.MultipleValue) string {
	if len(vals) == 0 {
		return "none"
	}
	used := make([]bool, len(vals))
	var parts []string
	for i, v := range vals {
		if used[i] {
			continue
		}
		used[i] = true
		mult := 1
		for j := i + 1; j < len(vals); j++ {
			if !used[j] && vals[j] == v {
				used[j] = true
				mult++
			}
		}
		paired := 0
		if imag(v) != 0 {
			for j := i + 1; j < len(vals) && paired < mult; j++ {
				if !used[j] && vals[j] == cmplx.Conj(v) {
					used[j] = true
					paired++
				}
			}
		}
		var part string
		if paired > 0 {
			part = fmtComplex(complex(real(v), math.Abs(imag(v))), true)
		} else {
			part = fmtComplex(v, false)
		}
		if mult > 1 {
			spread := ""
			for _, mv := range multi {
				if (mv.Value == v || mv.Value == cmplx.Conj(v)) && mv.Spread > 0 {
					spread = ", spread " + fmtNum(mv.Spread)
				}
			}
			part += fmt.Sprintf(" (×%d%s)", mult, spread)
		}
		parts = append(parts, part)
	}
	return strings.Join(parts, ", ")
}

func sxValuesJSON(vals []complex128) []any {
	out := make([]any, len(vals))
	for i, v := range vals {
		out[i] = jsonComplex(v)
	}
	return out
}

func sxKind(s *lsys.System) string {
	if s == nil {
		return "system"
	}
	if s.Sampled() {
		return "sampled system (every " + fmtNum(s.Ts) + " s)"
	}
	return "continuous-time system"
}

func sxYesNo(b bool) string {
	if b {
		return "yes"
	}
	return "NO"
}

func sxInts(v []int) string {
	if len(v) == 0 {
		return "-"
	}
	parts := make([]string, len(v))
	for i, k := range v {
		parts[i] = strconv.Itoa(k)
	}
	return strings.Join(parts, ", ")
}

func renderZeros(v any, _ Options) Bundle {
	z := v.(*lsys.ZeroSet)
	title := "zeros"
	if z.System != nil {
		title = fmt.Sprintf("zeros of a %s with %s, %s, %s", sxKind(z.System), count(z.System.N(), "state", "states"),
			count(z.System.M(), "input", "inputs"), count(z.System.P(), "output", "outputs"))
	}
	c := newCard("lsys-zeros", title)
	t, h := &c.t, &c.h
	keyTable(t, h, [][2]string{
		{"invariant zeros", sxValuesMulti(z.Invariant, z.InvariantMultiple)},
		{"transmission zeros", sxValuesMulti(z.Transmission, z.TransmissionMultiple)},
		{"input-decoupling (not reached)", sxValues(z.InputDecoupling)},
		{"output-decoupling (not seen)", sxValues(z.OutputDecoupling)},
	})
	note(t, h, fmt.Sprintf("System pencil reduced by orthogonal compressions, then QZ; rank decisions at %s (= %s x the norm of [[A, B], [C, D]] after scaling states, inputs and outputs to comparable size, so units do not matter); zeros closer than %s of the larger of their size and the system's (%s) are one multiple zero, shown once with its multiplicity and the spread of the computed values; parts below %s are rounding and shown as 0; regular pencil of order %d.",
		fmtNum(z.Tol), fmtNum(z.RelTol), fmtNum(z.MergeTol), fmtNum(z.Scale), fmtNum(z.ZeroTol), z.ReducedOrder))
	b := c.bundle()
	b.Data[JSON] = map[string]any{
		"kind": "zeros", "invariant": sxValuesJSON(z.Invariant), "transmission": sxValuesJSON(z.Transmission),
		"input_decoupling": sxValuesJSON(z.InputDecoupling), "output_decoupling": sxValuesJSON(z.OutputDecoupling),
		"tol": z.Tol, "rel_tol": z.RelTol, "merge_tol": z.MergeTol, "scale": z.Scale, "zero_tol": z.ZeroTol,
		"multiple": sxMultipleJSON(z.InvariantMultiple), "multiple_transmission": sxMultipleJSON(z.TransmissionMultiple),
	}
	return b
}

// sxEmbedSystem appends the text and HTML of a system card.
func sxEmbedSystem(t, h *strings.Builder, s *lsys.System) {
	sb := renderSystem(s, Options{})
	t.WriteString("\n" + sb.Data[Text].(string))
	h.WriteString("<div style=\"margin-top:6px\">" + sb.Data[HTML].(string) + "</div>")
}

func sxEmbedMatrix(t, h *strings.Builder, name string, a *mat.Dense, rows, cols []string) {
	t.WriteString("\n")
	sxMatrixText(t, name, a, rows, cols)
	h.WriteString("<div>")
	sxMatrixHTML(h, name, a, rows, cols)
	h.WriteString("</div>")
}

func renderModal(v any, _ Options) Bundle {
	mf := v.(*lsys.ModalForm)
	title := "real modal form"
	if mf.BlockDiagonal {
		title = "block-diagonal modal form"
	}
	c := newCard("lsys-modal", title)
	t, h := &c.t, &c.h
	note(t, h, mf.Note)
	rows := [][]string{}
	for i, b := range mf.Blocks {
		rows = append(rows, []string{strconv.Itoa(i + 1), b.Kind, fmt.Sprintf("%d-%d", b.Start+1, b.Start+b.Size), sxValues(b.Values)})
	}
	t.WriteString("\n")
	gridTable(t, h, []string{"block", "kind", "states", "eigenvalues"}, rows, 0)
	if mf.System != nil {
		sxEmbedSystem(t, h, mf.System)
		if mf.T != nil && mf.System.N() <= 12 {
			// Caller's state names are those of the original system; the
			// modal ones index the rows.
			orig := sxOrigNames(mf.From, mf.System.N())
			sxEmbedMatrix(t, h, "T (modal coordinates q = T x)", mf.T, mf.System.StateNames, orig)
		}
	}
	return c.bundle()
}

func renderJordan(v any, _ Options) Bundle {
	js := v.(*lsys.JordanStructure)
	title := fmt.Sprintf("Jordan structure of a %dx%d matrix: %s", js.N, js.N, count(len(js.Clusters), "distinct eigenvalue", "distinct eigenvalues"))
	c := newCard("lsys-jordan", title)
	t, h := &c.t, &c.h
	rows := [][]string{}
	defective := 0
	var close []string
	for _, c := range js.Clusters {
		pair := imag(c.Value) > 0
		verdict := "simple"
		if c.Algebraic > 1 {
			verdict = "semisimple"
			if c.Defective() {
				verdict = "DEFECTIVE"
				defective++
			}
		}
		if c.IsClose() {
			verdict += " (close)"
		}
		if c.Close > 0 {
			close = append(close, fmt.Sprintf("%s (distance %s x the tolerance)", fmtComplex(c.Value, pair), fmtNum(c.Close)))
		}
		if c.Entered != "" {
			close = append(close, fmt.Sprintf("%s (at the scale of A as entered, rounding could make it %s)", fmtComplex(c.Value, pair), c.Entered))
		}
		if c.Coupled > 0 {
			close = append(close, fmt.Sprintf("%s (defective only through a one-way coupling between parts whose eigenvalues differ by %s: in units that shrink the coupling to that size it would be semisimple; if the parts are meant to be equal, the difference is rounding and the verdict stands)", fmtComplex(c.Value, pair), fmtNum(c.Coupled)))
		}
		ranks := "-"
		if len(c.Ranks) > 0 {
			ranks = sxInts(c.Ranks)
		}
		rows = append(rows, []string{fmtComplex(c.Value, pair), strconv.Itoa(c.Algebraic), strconv.Itoa(c.Geometric), sxInts(c.Blocks), verdict, ranks, fmtNum(c.Spread), fmtNum(c.Tol), fmtNum(c.Cond)})
	}
	gridTable(t, h, []string{"eigenvalue", "alg.", "geom.", "blocks", "verdict", "ranks of powers", "spread", "cluster tol", "cond"}, rows, 0)
	note(t, h, fmt.Sprintf("Decided on A balanced by powers of two (the same in any units). Eigenvalues i, j are one cluster when |l_i - l_j| <= %s u ||A|| max(cond_i, cond_j), cond_i taken in the eigenvalue's own irreducible block of A (at most %s%s); block sizes from the ranks of (A - l I)^k, singular values below %s max(||A - l I||, ||A|| + |l|)^k, or below (2 x spread)^k, counted as zero; real parts within %s of zero shown as 0. %d defective.%s",
		fmtNum(js.ClusterFactor), fmtNum(js.CapTol), map[bool]string{true: ", or closer than " + fmtNum(js.AbsTol), false: ""}[js.AbsTol > 0], fmtNum(js.RankTol), fmtNum(js.ZeroTol), defective, closeNote(close)))
	return c.bundle()
}

func renderStructure(v any, _ Options) Bundle {
	st := v.(*lsys.Structure)
	title := "structure of a " + sxKind(st.System)
	c := newCard("lsys-structure", title)
	t, h := &c.t, &c.h
	n := st.System.N()
	margin := func(s *lsys.Staircase) string {
		kept := make([]string, len(s.StepKept))
		for i, v := range s.StepKept {
			kept[i] = fmtNum(v)
		}
		if s.Direct {
			return fmt.Sprintf("the part the inputs leave alone of each mode the PBH test finds unreached, from its left invariant subspace; rank tolerance %s", fmtNum(s.Tol))
		}
		closeCall := ""
		if r := s.Close(); r > 0 {
			closeCall = fmt.Sprintf("; a close call: a step's singular value is %s x the rank tolerance, so another realization may find another dimension", fmtNum(r))
		}
		return fmt.Sprintf("staircase steps %s, smallest kept singular value per step [%s]; rank tolerance %s, largest dropped %s%s", sxInts(s.Steps), strings.Join(kept, ", "), fmtNum(s.Tol), fmtNum(s.Dropped), closeCall)
	}
	keyTable(t, h, [][2]string{
		{"controllable", fmt.Sprintf("%s: %d of %d states reachable (%s)", sxYesNo(st.Controllable), st.Reach.Dim, n, margin(st.Reach))},
		{"observable", fmt.Sprintf("%s: %d of %d states observable (%s)", sxYesNo(st.Observable), st.Observe.Dim, n, margin(st.Observe))},
		{"stabilizable", fmt.Sprintf("%s: modes not reached: %s", sxYesNo(st.Stabilizable), sxValues(st.UncontrollableModes))},
		{"detectable", fmt.Sprintf("%s: modes not seen: %s", sxYesNo(st.Detectable), sxValues(st.UnobservableModes))},
	})
	t.WriteString("\nKalman parts\n")
	htmlSection(h, "Kalman parts")
	rows := [][]string{}
	for _, p := range st.Parts {
		rows = append(rows, []string{p.Name, strconv.Itoa(p.Dim), sxValues(p.Modes)})
	}
	gridTable(t, h, []string{"part", "states", "modes"}, rows, 0)
	note(t, h, fmt.Sprintf("Orthogonal staircase forms decide every rank, reachability on (A, B) alone and observability on (A, C) alone, each pair balanced on its own (states, and inputs or outputs, scaled by powers of two, so a tolerance means the same in any units), at %s x the norm of [[A, B]] (or [[A], [C]]); a small kept value marks a weakly reached or seen direction (the mode table's PBH margins measure each mode); the Krylov matrix is not used. Reachable and unobservable subspaces intersected at principal-angle tolerance %s%s; Kalman transformation condition number %s.",
		fmtNum(st.RelTol), fmtNum(st.AngleTol), angleCloseNote(st.AngleClose), fmtNum(st.Cond)))
	b := c.bundle()
	parts := make([]any, 4)
	for i, p := range st.Parts {
		parts[i] = map[string]any{"name": p.Name, "states": p.Dim, "modes": sxValuesJSON(p.Modes)}
	}
	b.Data[JSON] = map[string]any{"kind": "structure", "controllable": st.Controllable, "observable": st.Observable,
		"stabilizable": st.Stabilizable, "detectable": st.Detectable, "parts": parts, "rel_tol": st.RelTol}
	return b
}

func renderDecomposition(v any, _ Options) Bundle {
	d := v.(*lsys.Decomposition)
	title := fmt.Sprintf("Kalman decomposition: %d reachable and observable, %d reachable only, %d observable only, %d neither", d.Sizes[0], d.Sizes[1], d.Sizes[2], d.Sizes[3])
	c := newCard("lsys-decomposition", title)
	t, h := &c.t, &c.h
	note(t, h, fmt.Sprintf("States ro* reachable and observable, rn* reachable not observable, uo* observable not reachable, un* neither; z = T x with condition number of T %s.", fmtNum(d.Cond)))
	sxEmbedSystem(t, h, d.System)
	if d.System.N() <= 12 {
		orig := sxOrigNames(d.From, d.System.N())
		sxEmbedMatrix(t, h, "T (z = T x)", d.T, d.System.StateNames, orig)
	}
	return c.bundle()
}

func renderSubspace(v any, _ Options) Bundle {
	s := v.(*lsys.Subspace)
	title := fmt.Sprintf("%s: dimension %d of %d", s.What, s.Dim, s.N)
	c := newCard("lsys-subspace", title)
	t, h := &c.t, &c.h
	rows := [][2]string{}
	if s.Dim > 0 {
		inv := "yes"
		if !s.Invariant {
			inv = "NO"
		}
		rows = append(rows,
			[2]string{"A-invariant", fmt.Sprintf("%s: relative residual %s (tolerance %s)", inv, fmtNum(s.Residual), fmtNum(s.Tol))},
			[2]string{"eigenvalues in it", map[bool]string{true: sxValues(s.Values), false: "none (not invariant)"}[s.Invariant]})
	}
	if len(rows) > 0 {
		keyTable(t, h, rows)
	}
	note(t, h, s.Note)
	if s.Basis != nil && s.N <= 24 {
		cols := make([]string, s.Dim)
		for i := range cols {
			cols[i] = "v" + strconv.Itoa(i+1)
		}
		names := s.StateNames
		if len(names) != s.N {
			names = make([]string, s.N)
			for i := range names {
				names[i] = "x" + strconv.Itoa(i+1)
			}
		}
		sxEmbedMatrix(t, h, "orthonormal basis", s.Basis, names, cols)
	}
	return c.bundle()
}

func renderInvariant(v any, _ Options) Bundle {
	ic := v.(*lsys.InvariantCheck)
	sb := renderSubspace(ic.Subspace, Options{})
	verdict := "span(V) is A-invariant"
	if !ic.Subspace.Invariant {
		verdict = "span(V) is NOT A-invariant"
	}
	head := fmt.Sprintf("%s: relative residual %s against tolerance %s (V has rank %d)\n", verdict, fmtNum(ic.Subspace.Residual), fmtNum(ic.Tol), ic.Rank)
	b := NewBundle(head + sb.Data[Text].(string))
	b.Data[HTML] = "<div><div style=\"font-weight:bold\">" + html.EscapeString(strings.TrimSpace(head)) + "</div>" + sb.Data[HTML].(string) + "</div>"
	return b
}

func renderEigen(v any, _ Options) Bundle {
	es := v.(*lsys.EigenStructure)
	n := len(es.Values)
	title := fmt.Sprintf("eigen-structure of a %dx%d matrix", n, n)
	c := newCard("lsys-eigen", title)
	t, h := &c.t, &c.h
	rows := [][]string{}
	for k, lam := range es.Values {
		rows = append(rows, []string{strconv.Itoa(k + 1), fmtComplex(lam, false), fmtNum(es.Cond[k])})
	}
	gridTable(t, h, []string{"#", "eigenvalue", "condition"}, rows, 0)
	if n <= 12 {
		for _, which := range []struct {
			name string
			vec  [][]complex128
		}{{"right eigenvectors (columns, unit norm)", es.Right}, {"left eigenvectors (columns, unit norm)", es.Left}} {
			t.WriteString("\n" + which.name + "\n")
			htmlSection(h, which.name)
			head := []string{"row"}
			for k := range es.Values {
				head = append(head, "v"+strconv.Itoa(k+1))
			}
			var rr [][]string
			for i := 0; i < n; i++ {
				row := []string{strconv.Itoa(i + 1)}
				for k := range es.Values {
					row = append(row, fmtComplex(which.vec[k][i], false))
				}
				rr = append(rr, row)
			}
			gridTable(t, h, head, rr, 0)
		}
	}
	note(t, h, "Condition 1/|w^H v| from unit left and right eigenvectors: a change of A of relative size e moves the eigenvalue by about e ||A|| times it.")
	return c.bundle()
}

// sxOrigNames are the state names of the original system (x1.. if unknown).
func sxOrigNames(s *lsys.System, n int) []string {
	if s != nil && len(s.StateNames) == n {
		return s.StateNames
	}
	out := make([]string, n)
	for i := range out {
		out[i] = "x" + strconv.Itoa(i+1)
	}
	return out
}

func sxMultipleJSON(m []lsys.MultipleValue) []any {
	out := make([]any, len(m))
	for i, v := range m {
		out[i] = map[string]any{"value": jsonComplex(v.Value), "count": v.Count, "spread": v.Spread}
	}
	return out
}

// closeNote names the clusters whose call was within a factor 10 of the
// clustering threshold.
// angleCloseNote says when the size of the intersection is a close call.
func angleCloseNote(r float64) string {
	if r == 0 {
		return ""
	}
	return fmt.Sprintf(" (a close call: a singular value of [R N] is %s x the tolerance, so another realization may split the parts otherwise)", fmtNum(r))
}

func closeNote(close []string) string {
	if len(close) == 0 {
		return ""
	}
	return " Close calls, which another realization of the same model (other units or coordinates) may decide the other way: " + strings.Join(close, ", ") + "."
}
