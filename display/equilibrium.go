package display

import (
	"fmt"
	"strings"

	"lsys/lsys"
	"lsys/lsys/numfmt"
)

// An equilibrium shows as text (the states and inputs as the language
// writes records, then the verdict on uniqueness) and as an HTML card with
// the same content in tables. Everything shown is carried by the result;
// nothing is recomputed here.
func init() {
	Register((*lsys.Equilibrium)(nil), func(v any, _ Options) Bundle {
		e := v.(*lsys.Equilibrium)
		b := NewBundle(equilibriumText(e))
		b.Data[HTML] = equilibriumHTML(e)
		b.Data[JSON] = map[string]any{
			"states": namedNumbers(e.StateNames, e.X), "inputs": namedNumbers(e.InputNames, e.U),
			"residual": jsonNum(e.Residual), "iterations": e.Iterations, "rank": e.Rank, "unique": e.Free == nil,
		}
		return b
	})
}

// numberRecord writes {a: 1, b: 2} with the language's number form, so the
// text matches what print gives for e.states.
func numberRecord(names []string, vals []float64) string {
	parts := make([]string, len(names))
	for i, n := range names {
		parts[i] = n + ": " + numfmt.Number(vals[i])
	}
	return "{" + strings.Join(parts, ", ") + "}"
}

func namedNumbers(names []string, vals []float64) map[string]any {
	m := map[string]any{}
	for i, n := range names {
		m[n] = jsonNum(vals[i])
	}
	return m
}

func freeColumn(e *lsys.Equilibrium, j int) []float64 {
	n, _ := e.Free.Dims()
	col := make([]float64, n)
	for i := range col {
		col[i] = e.Free.At(i, j)
	}
	return col
}

// familyNote is the verdict on a Jacobian of deficient rank.
func familyNote(e *lsys.Equilibrium) string {
	n, k := e.Free.Dims()
	smax := 0.0
	if len(e.Singular) > 0 {
		smax = e.Singular[0]
	}
	return fmt.Sprintf("not unique: the Jacobian df/dx here has rank %d of %d (singular values at or below %.3g x the largest, %.3g, count as zero), "+
		"so this is one member of a family of steady states; to first order the states can move along %s and stay at rest:",
		e.Rank, n, lsys.FamilyTol, smax, count(k, "direction", "directions"))
}

func memberNote(e *lsys.Equilibrium) string {
	if e.MinNorm {
		return "Of the family, the state of least norm is given."
	}
	return "The guess decides which member Newton returns."
}

func equilibriumText(e *lsys.Equilibrium) string {
	s := fmt.Sprintf("equilibrium after %d Newton steps, residual %.3g\nstates: %s\ninputs: %s",
		e.Iterations, e.Residual, numberRecord(e.StateNames, e.X), numberRecord(e.InputNames, e.U))
	if e.Free == nil {
		return s
	}
	s += "\n" + familyNote(e)
	_, k := e.Free.Dims()
	for j := 0; j < k; j++ {
		s += fmt.Sprintf("\n  free direction %d: %s", j+1, numberRecord(e.StateNames, freeColumn(e, j)))
	}
	return s + "\n" + memberNote(e)
}

func equilibriumHTML(e *lsys.Equilibrium) string {
	var h strings.Builder
	verdict := "unique (the Jacobian df/dx has full rank)"
	if e.Free != nil {
		verdict = fmt.Sprintf("one of a family (the Jacobian df/dx has rank %d of %d)", e.Rank, len(e.X))
	}
	htmlCard(&h, "lsys-equilibrium", "equilibrium: "+verdict)
	var t strings.Builder // keyTable writes text too; the text form is built above
	keyTable(&t, &h, [][2]string{{"Newton steps", fmt.Sprint(e.Iterations)}, {"residual", fmt.Sprintf("%.3g", e.Residual)}})
	head := []string{"", "value"}
	var rows [][]string
	for i, n := range e.StateNames {
		rows = append(rows, []string{n, numfmt.Number(e.X[i])})
	}
	if e.Free != nil {
		_, k := e.Free.Dims()
		for j := 0; j < k; j++ {
			head = append(head, fmt.Sprintf("free direction %d", j+1))
			for i, v := range freeColumn(e, j) {
				rows[i] = append(rows[i], numfmt.Number(v))
			}
		}
	}
	htmlSection(&h, "states")
	htmlGrid(&h, head, rows, 1)
	if len(e.InputNames) > 0 {
		var in [][]string
		for j, n := range e.InputNames {
			in = append(in, []string{n, numfmt.Number(e.U[j])})
		}
		htmlSection(&h, "inputs (held)")
		htmlGrid(&h, []string{"", "value"}, in, 1)
	}
	if e.Free != nil {
		htmlNote(&h, familyNote(e)+" the columns 'free direction' above. "+memberNote(e))
	}
	h.WriteString("</div>")
	return h.String()
}
