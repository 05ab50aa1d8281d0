// Package langtest helps the tests of the language and of its built-ins:
// an Output that records what a cell produces, and tables of cells with
// their expected value or error.
package langtest

import (
	"context"
	"errors"
	"strings"
	"testing"

	"lsys/lang"
	"lsys/lang/builtins"
	"lsys/lang/syntax"
)

// NewSession is a session with every built-in, reading files from a
// temporary folder of the test.
func NewSession(t testing.TB) *lang.Session {
	return lang.NewSession(lang.Options{Builtins: builtins.Registry(), Dir: t.TempDir()})
}

// Recorder is an Output that keeps everything a cell produces.
type Recorder struct {
	Out, Err strings.Builder
	Displays []any
	Updates  []any
	IDs      []string
}

func (r *Recorder) Stdout(s string) { r.Out.WriteString(s) }
func (r *Recorder) Stderr(s string) { r.Err.WriteString(s) }
func (r *Recorder) Display(v any, id string) {
	r.Displays = append(r.Displays, v)
	r.IDs = append(r.IDs, id)
}
func (r *Recorder) UpdateDisplay(v any, id string) { r.Updates = append(r.Updates, v) }
func (r *Recorder) ClearOutput(bool)               {}

// Cell is one row of a table: a cell's source and either its expected
// value (as FormatValue prints it) or its expected error (a fragment of
// the message, with line and column).
type Cell struct {
	Src  string
	Want string // expected FormatValue of the result; "" with Err set
	Err  string // fragment of the expected error message
	Line int
	Col  int
}

// RunCells runs each cell in a fresh session and checks its value, or its
// error: the fragment, a hint, and the position when Line is set.
func RunCells(t *testing.T, cells []Cell) {
	t.Helper()
	for _, c := range cells {
		s := NewSession(t)
		v, err := s.Run(context.Background(), c.Src, &Recorder{})
		if c.Err != "" {
			if err == nil {
				t.Errorf("%q: want error %q, got value %s", c.Src, c.Err, lang.FormatValue(v))
				continue
			}
			if !strings.Contains(err.Error(), c.Err) {
				t.Errorf("%q: error\n%s\ndoes not contain %q", c.Src, err, c.Err)
			}
			if h := Hint(err); h == "" {
				t.Errorf("%q: the error says nothing about what to do:\n%v", c.Src, err)
			}
			pos, ok := syntax.Position(err)
			if !ok {
				t.Errorf("%q: error without a position: %v", c.Src, err)
				continue
			}
			if c.Line != 0 && (pos.Line != c.Line || pos.Column != c.Col) {
				t.Errorf("%q: error at %d:%d, want %d:%d\n%s", c.Src, pos.Line, pos.Column, c.Line, c.Col, err)
			}
			continue
		}
		if err != nil {
			t.Errorf("%q: unexpected error:\n%v", c.Src, err)
			continue
		}
		if got := lang.FormatValue(v); got != c.Want {
			t.Errorf("%q:\n got %s\nwant %s", c.Src, got, c.Want)
		}
	}
}

// Hint returns the "what to do" line of the first error.
func Hint(err error) string {
	var l syntax.ErrorList
	if errors.As(err, &l) && len(l) > 0 {
		return l[0].Hint
	}
	var e *syntax.Error
	if errors.As(err, &e) {
		return e.Hint
	}
	return ""
}

// HasInOrder reports whether want appears in got as a subsequence.
func HasInOrder(got, want []string) bool {
	i := 0
	for _, g := range got {
		if i < len(want) && g == want[i] {
			i++
		}
	}
	return i == len(want)
}

// Run runs src in s and fails the test on an error.
func Run(t testing.TB, s *lang.Session, src string) any {
	t.Helper()
	v, err := s.Run(context.Background(), src, &Recorder{})
	if err != nil {
		t.Fatalf("%s\n%v", src, err)
	}
	return v
}

// Gimbal is a cell that defines the two-inertia gimbal drive as an
// equation block (motor and payload coupled by a spring and a damper).
const Gimbal = `Jm = 2e-4; Jl = 6e-4; k = 3.1; b = 0.004
gimbal = system {
  states  motor_angle, motor_rate, payload_angle, payload_rate
  inputs  torque
  outputs speed
  motor_angle'   = motor_rate
  motor_rate'    = (torque - k*(motor_angle - payload_angle) - b*(motor_rate - payload_rate)) / Jm
  payload_angle' = payload_rate
  payload_rate'  = (k*(motor_angle - payload_angle) + b*(motor_rate - payload_rate)) / Jl
  speed = payload_rate
}
gimbal`

// Pendulum is a cell that defines a nonlinear pendulum with a torque
// input as an equation block.
const Pendulum = `g = 9.81; len = 0.5; damping = 0.2
pendulum = system {
  states angle, rate
  inputs torque
  outputs tip
  angle' = rate
  rate' = -g/len*sin(angle) - damping*rate + torque
  tip = len*sin(angle)
}
`
