package main

import (
	"context"
	"strings"
	"testing"

	"gonum.org/v1/gonum/mat"

	"lsys/display"
	"lsys/lang"
	"lsys/lang/builtins"
	"lsys/lsys"
)

// quiet is an Output that drops what a cell prints.
type quiet struct{}

func (quiet) Stdout(string)             {}
func (quiet) Stderr(string)             {}
func (quiet) Display(any, string)       {}
func (quiet) UpdateDisplay(any, string) {}
func (quiet) ClearOutput(bool)          {}

func runCell(t *testing.T, s *lang.Session, src string) any {
	t.Helper()
	v, err := s.Run(context.Background(), src, quiet{})
	if err != nil {
		t.Fatalf("%s:\n%v", src, err)
	}
	return v
}

// TestSystemTextRebuildsTheSystem: the text form of a system is lsys
// source; pasted into a cell it gives back the same system, matrices equal
// to the last bit (numbers are written in their shortest exact form),
// same names and sample time. Cases cover the equation block (continuous,
// sampled, every state an output, a static gain, awkward numbers) and the
// table form (long equations, names that are not names of the language).
func TestSystemTextRebuildsTheSystem(t *testing.T) {
	cells := []string{
		"system([[0, 1], [-2, -3]], [0, 1], [1, 0], 0)",
		"system([[0.1, 1/3], [-2e-17, -3.5e300]], [[1e-7, 0], [0, -1]], [[1, 0.30000000000000004]], [[0, 2/7]], inputs: [\"torque\", \"load\"], outputs: [\"angle\"])",
		"system([[0.9]], [0.1], every: 0.01, states: [\"level\"], inputs: [\"inflow\"], outputs: [\"level_out\"])",
		"system { states a, b\n inputs u\n a' = -a + b\n b' = -2*b + 0.5*u }",
		"system(D: [[1, -1]], inputs: [\"ref\", \"v_out\"], outputs: [\"error\"])",
		"system([[0, 1], [-2, -3]], [0, 1], [1, 0], every: 1/3)",
		"system([[-1, 2, 3], [4, -5, 6], [7, 8, -9]], [[1, 2, 3, 4, 5, 6], [1, 1, 1, 1, 1, 1], [-1, -2, -3, -4, -5, -6.25]], [[1, 2, 3]])",
		"system([[-1]], [1], [1], states: [\"x 1\"], inputs: [\"u\\\"q\"], outputs: [\"if\"])",
		"2/(s^2 + 0.3*s + 7) * system((s + 1)/(s + 4))",
	}
	for _, cell := range cells {
		s := lang.NewSession(lang.Options{Builtins: builtins.Registry(), Dir: t.TempDir()})
		v := runCell(t, s, "G = "+cell+"\nG")
		g, ok := v.(*lsys.System)
		if !ok {
			t.Fatalf("%s: got %T", cell, v)
		}
		text, _ := display.TextOf(g)
		if strings.Contains(text, "no source form") {
			t.Errorf("%s: no source form:\n%s", cell, text)
			continue
		}
		back, ok := runCell(t, s, text).(*lsys.System)
		if !ok {
			t.Errorf("%s: the text does not give a system:\n%s", cell, text)
			continue
		}
		same := back.Ts == g.Ts && strings.Join(back.StateNames, ",") == strings.Join(g.StateNames, ",") &&
			strings.Join(back.InputNames, ",") == strings.Join(g.InputNames, ",") &&
			strings.Join(back.OutputNames, ",") == strings.Join(g.OutputNames, ",")
		for _, p := range [][2]*mat.Dense{{g.A, back.A}, {g.B, back.B}, {g.C, back.C}, {g.D, back.D}} {
			same = same && (p[0] == nil) == (p[1] == nil) && (p[0] == nil || mat.Equal(p[0], p[1]))
		}
		if !same {
			bt, _ := display.TextOf(back)
			t.Errorf("%s: read back differs:\n%s\nread back as:\n%s", cell, text, bt)
		}
	}
}
