package display

import (
	"encoding/json"
	"strings"
	"testing"

	"lsys/lsys"
)

// The pendulum of the language's examples, as its equation block makes it.
var pendulumModel = &lsys.Model{
	StateNames: []string{"angle", "rate"}, InputNames: []string{"torque"}, OutputNames: []string{"tip"},
	ParameterNames: []string{"g", "len", "damping"}, ParameterValues: []float64{9.81, 0.5, 0.2},
	Equations: []lsys.ModelEquation{
		{Kind: "derivative", Name: "angle", Rhs: "rate"},
		{Kind: "derivative", Name: "rate", Rhs: "-g/len*sin(angle) - damping*rate + torque"},
		{Kind: "plain", Name: "tip", Rhs: "len*sin(angle)"},
	},
	FirstNonlinear: "sin(angle)", Line: 6, Column: 19,
}

func TestModelDisplay(t *testing.T) {
	b := Render(pendulumModel, Options{})
	// The text form the language has always printed for a model.
	want := "nonlinear model: 2 states, 1 input, 1 output, continuous\n" +
		"states:  angle, rate\n" +
		"inputs:  torque\n" +
		"outputs: tip\n" +
		"parameters: g = 9.81, len = 0.5, damping = 0.2\n" +
		"  angle' = rate\n" +
		"  rate' = -g/len*sin(angle) - damping*rate + torque\n" +
		"  tip = len*sin(angle)\n" +
		"first nonlinear term: sin(angle) (line 6, column 19); linearize it for linear analysis"
	if got := b.Data[Text]; got != want {
		t.Errorf("text:\n%s\nwant:\n%s", got, want)
	}
	h, _ := b.Data[HTML].(string)
	for _, frag := range []string{"lsys-model", "nonlinear model: 2 states", "<td style=\"padding:1px 10px 1px 0;color:#555;vertical-align:top\">inputs</td>",
		"rate&#39; = -g/len*sin(angle) - damping*rate + torque", "first nonlinear term: sin(angle)"} {
		if !strings.Contains(h, frag) {
			t.Errorf("HTML lacks %q:\n%s", frag, h)
		}
	}
	js, err := json.Marshal(b.Data[JSON])
	if err != nil {
		t.Fatal(err)
	}
	for _, frag := range []string{`"states":["angle","rate"]`, `"parameters":{"damping":0.2,"g":9.81,"len":0.5}`, `"first_nonlinear":{"column":19,"line":6,"term":"sin(angle)"}`, `"kind":"plain"`} {
		if !strings.Contains(string(js), frag) {
			t.Errorf("JSON lacks %s: %s", frag, js)
		}
	}
	// Sampled, without inputs or parameters.
	s := Render(&lsys.Model{StateNames: []string{"x"}, OutputNames: []string{"x"}, Ts: 1,
		Equations: []lsys.ModelEquation{{Kind: "next", Name: "x", Rhs: "x*x"}}, FirstNonlinear: "x*x", Line: 3, Column: 10}, Options{})
	if got := s.Data[Text].(string); !strings.HasPrefix(got, "nonlinear model: 1 state, 0 inputs, 1 output, sampled every 1 s\nstates:  x\noutputs: x\n  next x = x*x\n") {
		t.Errorf("sampled text:\n%s", got)
	}
}
