package display

import (
	"fmt"
	"html"
	"strings"

	"lsys/lsys"
	"lsys/lsys/numfmt"
)

// A nonlinear model shows as text (its signals, parameters, equations and
// first nonlinear term, as the language has always printed it), as an
// HTML card with the same content in tables and the equations as code,
// and as JSON. All of it is carried by the model.
func init() {
	Register((*lsys.Model)(nil), func(v any, _ Options) Bundle {
		m := v.(*lsys.Model)
		b := NewBundle(modelText(m))
		b.Data[HTML] = modelHTML(m)
		params := map[string]any{}
		for i, p := range m.ParameterNames {
			params[p] = jsonNum(m.ParameterValues[i])
		}
		eqs := make([]any, len(m.Equations))
		for i, e := range m.Equations {
			eqs[i] = map[string]any{"kind": e.Kind, "name": e.Name, "rhs": e.Rhs}
		}
		b.Data[JSON] = map[string]any{
			"states": m.StateNames, "inputs": m.InputNames, "outputs": m.OutputNames,
			"parameters": params, "every": jsonNum(m.Ts), "equations": eqs,
			"first_nonlinear": map[string]any{"term": m.FirstNonlinear, "line": m.Line, "column": m.Column},
		}
		return b
	})
}

// modelHeadline is e.g. "nonlinear model: 2 states, 1 input, 1 output, continuous".
func modelHeadline(m *lsys.Model) string {
	kind := "continuous"
	if m.Sampled() {
		kind = "sampled every " + numfmt.Number(m.Ts) + " s"
	}
	return fmt.Sprintf("nonlinear model: %s, %s, %s, %s", count(len(m.StateNames), "state", "states"),
		count(len(m.InputNames), "input", "inputs"), count(len(m.OutputNames), "output", "outputs"), kind)
}

// modelEquation writes one equation as in the block.
func modelEquation(e lsys.ModelEquation) string {
	switch e.Kind {
	case "derivative":
		return e.Name + "' = " + e.Rhs
	case "next":
		return "next " + e.Name + " = " + e.Rhs
	}
	return e.Name + " = " + e.Rhs
}

func modelParameters(m *lsys.Model) string {
	ps := make([]string, len(m.ParameterNames))
	for i, p := range m.ParameterNames {
		ps[i] = p + " = " + numfmt.Number(m.ParameterValues[i])
	}
	return strings.Join(ps, ", ")
}

func modelNonlinearNote(m *lsys.Model) string {
	return fmt.Sprintf("first nonlinear term: %s (line %d, column %d); linearize it for linear analysis", m.FirstNonlinear, m.Line, m.Column)
}

func modelText(m *lsys.Model) string {
	var b strings.Builder
	b.WriteString(modelHeadline(m))
	fmt.Fprintf(&b, "\nstates:  %s", strings.Join(m.StateNames, ", "))
	if len(m.InputNames) > 0 {
		fmt.Fprintf(&b, "\ninputs:  %s", strings.Join(m.InputNames, ", "))
	}
	fmt.Fprintf(&b, "\noutputs: %s", strings.Join(m.OutputNames, ", "))
	if len(m.ParameterNames) > 0 {
		fmt.Fprintf(&b, "\nparameters: %s", modelParameters(m))
	}
	for _, e := range m.Equations {
		b.WriteString("\n  " + modelEquation(e))
	}
	b.WriteString("\n" + modelNonlinearNote(m))
	return b.String()
}

func modelHTML(m *lsys.Model) string {
	var h strings.Builder
	htmlCard(&h, "lsys-model", modelHeadline(m))
	var t strings.Builder // keyTable writes text too; the text form is built above
	rows := [][2]string{{"states", strings.Join(m.StateNames, ", ")}}
	if len(m.InputNames) > 0 {
		rows = append(rows, [2]string{"inputs", strings.Join(m.InputNames, ", ")})
	}
	rows = append(rows, [2]string{"outputs", strings.Join(m.OutputNames, ", ")})
	keyTable(&t, &h, rows)
	if len(m.ParameterNames) > 0 {
		htmlSection(&h, "parameters (the values the block holds)")
		prows := make([][]string, len(m.ParameterNames))
		for i, p := range m.ParameterNames {
			prows[i] = []string{p, numfmt.Number(m.ParameterValues[i])}
		}
		htmlGrid(&h, []string{"", "value"}, prows, 1)
	}
	htmlSection(&h, "equations")
	h.WriteString("<pre style=\"margin:2px 0;font-size:12px\">")
	for i, e := range m.Equations {
		if i > 0 {
			h.WriteByte('\n')
		}
		h.WriteString(html.EscapeString(modelEquation(e)))
	}
	h.WriteString("</pre>")
	htmlNote(&h, modelNonlinearNote(m))
	h.WriteString("</div>")
	return h.String()
}
