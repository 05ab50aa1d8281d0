// Package lsys is the linear-systems library behind the lsys kernel: state-space
// models, their modes and structure, responses in time and frequency, and the
// transformations engineers apply to them. It knows nothing of syntax, MIME or
// Jupyter, so it can be used from Go on its own.
package lsys

import (
	"errors"
	"fmt"
	"math"
	"sync"

	"gonum.org/v1/gonum/mat"
)

// System is a linear time-invariant state-space model
//
//	x' = A x + B u,  y = C x + D u        (Ts == 0, continuous time)
//	x[k+1] = A x[k] + B u[k], y = ...     (Ts > 0, sampled every Ts seconds)
//
// with n states, m inputs and p outputs. gonum cannot hold a matrix with a zero
// dimension, so a matrix whose shape would have one is nil: A is nil when n == 0
// (a static gain), B when n == 0 or m == 0, C when n == 0 or p == 0, D when m == 0
// or p == 0. Use the accessors N, M, P rather than reading shapes off matrices.
// A System is treated as immutable once built: operations return new systems.
type System struct {
	A, B, C, D *mat.Dense
	Ts         float64 // sample time in seconds; 0 for continuous time

	StateNames  []string // len n
	InputNames  []string // len m
	OutputNames []string // len p

	n, m, p int

	// verdict caches Stability, so that a display reads the verdict
	// instead of computing it. Shallow copies (WithNames) keep A and share
	// it; Copy gives the copy its own, since a deep copy may be changed.
	verdict *stabilityCache
}

type stabilityCache struct {
	once sync.Once
	st   Stability
	err  error
}

// Stability is StabilityOf(s), computed once per system (systems are not
// changed after they are built) and then carried with it.
func (s *System) Stability() (Stability, error) {
	if s.verdict == nil {
		return StabilityOf(s)
	}
	s.verdict.once.Do(func() { s.verdict.st, s.verdict.err = StabilityOf(s) })
	return s.verdict.st, s.verdict.err
}

// ShapeError reports matrices whose shapes do not fit together. Its message
// names both shapes, so the person can see which one to fix.
type ShapeError struct {
	What       string // e.g. "B must have as many rows as A"
	Got, Other string // the shapes, e.g. "3x2", "4x4"
}

func (e *ShapeError) Error() string {
	return fmt.Sprintf("%s: got %s against %s", e.What, e.Got, e.Other)
}

// Shape formats a matrix shape as "rxc"; a nil matrix is "0x0".
func Shape(a mat.Matrix) string {
	if a == nil || isNilDense(a) {
		return "0x0"
	}
	r, c := a.Dims()
	return fmt.Sprintf("%dx%d", r, c)
}

func isNilDense(a mat.Matrix) bool {
	d, ok := a.(*mat.Dense)
	return ok && d == nil
}

// NewSystem builds and validates a system with n states, m inputs and p
// outputs. Any of A, B, C, D may be nil where the corresponding dimension is
// zero; D may also be nil to mean zeros. Names may be nil: default names x1..xn,
// u1..um, y1..yp are given. Matrices are copied. Entries must be finite.
func NewSystem(n, m, p int, A, B, C, D *mat.Dense, ts float64) (*System, error) {
	if n < 0 || m < 0 || p < 0 {
		return nil, fmt.Errorf("negative dimension n=%d m=%d p=%d", n, m, p)
	}
	if math.IsNaN(ts) || math.IsInf(ts, 0) || ts < 0 {
		return nil, fmt.Errorf("sample time must be a finite number >= 0 (0 means continuous), got %v", ts)
	}
	check := func(name string, a *mat.Dense, r, c int) (*mat.Dense, error) {
		if r == 0 || c == 0 {
			if a != nil {
				if ar, ac := a.Dims(); ar != r || ac != c {
					return nil, &ShapeError{What: name + " has the wrong shape", Got: Shape(a), Other: fmt.Sprintf("%dx%d expected", r, c)}
				}
			}
			return nil, nil
		}
		if a == nil {
			if name == "D" {
				return mat.NewDense(r, c, nil), nil
			}
			return nil, fmt.Errorf("%s is missing; it must be %dx%d", name, r, c)
		}
		if ar, ac := a.Dims(); ar != r || ac != c {
			return nil, &ShapeError{What: name + " has the wrong shape", Got: Shape(a), Other: fmt.Sprintf("%dx%d expected", r, c)}
		}
		if err := CheckFinite(name, a); err != nil {
			return nil, err
		}
		return mat.DenseCopyOf(a), nil
	}
	s := &System{Ts: ts, n: n, m: m, p: p, verdict: &stabilityCache{}}
	var err error
	if s.A, err = check("A", A, n, n); err != nil {
		return nil, err
	}
	if s.B, err = check("B", B, n, m); err != nil {
		return nil, err
	}
	if s.C, err = check("C", C, p, n); err != nil {
		return nil, err
	}
	if s.D, err = check("D", D, p, m); err != nil {
		return nil, err
	}
	s.StateNames = defaultNames("x", n)
	s.InputNames = defaultNames("u", m)
	s.OutputNames = defaultNames("y", p)
	return s, nil
}

// FromMatrices builds a system from A, B, C, D, reading the dimensions off
// their shapes. C may be nil (identity: every state is an output) and D may be
// nil (zeros). B may be nil for a system with no inputs.
func FromMatrices(A, B, C, D *mat.Dense, ts float64) (*System, error) {
	if A == nil {
		return nil, errors.New("A is required")
	}
	n, nc := A.Dims()
	if n != nc {
		return nil, &ShapeError{What: "A must be square", Got: Shape(A), Other: fmt.Sprintf("%dx%d", n, n)}
	}
	m := 0
	if B != nil {
		var br int
		br, m = B.Dims()
		if br != n {
			return nil, &ShapeError{What: "B must have as many rows as A", Got: Shape(B), Other: Shape(A)}
		}
	}
	if C == nil {
		C = identity(n)
	}
	p, cc := C.Dims()
	if cc != n {
		return nil, &ShapeError{What: "C must have as many columns as A", Got: Shape(C), Other: Shape(A)}
	}
	if D != nil {
		dr, dc := D.Dims()
		if dr != p || dc != m {
			return nil, &ShapeError{What: "D must be (rows of C)x(columns of B)", Got: Shape(D), Other: fmt.Sprintf("%dx%d", p, m)}
		}
	}
	return NewSystem(n, m, p, A, B, C, D, ts)
}

// N, M and P are the numbers of states, inputs and outputs.
func (s *System) N() int { return s.n }
func (s *System) M() int { return s.m }
func (s *System) P() int { return s.p }

// Sampled reports whether the system is discrete time.
func (s *System) Sampled() bool { return s.Ts > 0 }

// WithNames returns a copy with the given signal names; a nil slice keeps
// the current names. Lengths must match the dimensions.
func (s *System) WithNames(states, inputs, outputs []string) (*System, error) {
	c := s.Copy()
	set := func(dst *[]string, src []string, n int, what string) error {
		if src == nil {
			return nil
		}
		if len(src) != n {
			return fmt.Errorf("%d %s names given for %d %s", len(src), what, n, what)
		}
		*dst = append([]string(nil), src...)
		return nil
	}
	if err := set(&c.StateNames, states, s.n, "state"); err != nil {
		return nil, err
	}
	if err := set(&c.InputNames, inputs, s.m, "input"); err != nil {
		return nil, err
	}
	if err := set(&c.OutputNames, outputs, s.p, "output"); err != nil {
		return nil, err
	}
	return c, nil
}

// Copy returns a deep copy.
func (s *System) Copy() *System {
	c := *s
	cp := func(a *mat.Dense) *mat.Dense {
		if a == nil {
			return nil
		}
		return mat.DenseCopyOf(a)
	}
	c.A, c.B, c.C, c.D = cp(s.A), cp(s.B), cp(s.C), cp(s.D)
	c.verdict = &stabilityCache{}
	c.StateNames = append([]string(nil), s.StateNames...)
	c.InputNames = append([]string(nil), s.InputNames...)
	c.OutputNames = append([]string(nil), s.OutputNames...)
	return &c
}

// CheckFinite refuses NaN and infinite entries, naming the first one found
// (1-based, as people count).
func CheckFinite(name string, a mat.Matrix) error {
	r, c := a.Dims()
	for i := 0; i < r; i++ {
		for j := 0; j < c; j++ {
			if v := a.At(i, j); math.IsNaN(v) || math.IsInf(v, 0) {
				return fmt.Errorf("%s[%d, %d] is %v; every entry must be a finite number", name, i+1, j+1, v)
			}
		}
	}
	return nil
}

func defaultNames(prefix string, k int) []string {
	out := make([]string, k)
	for i := range out {
		out[i] = fmt.Sprintf("%s%d", prefix, i+1)
	}
	return out
}

func identity(n int) *mat.Dense {
	if n == 0 {
		return nil
	}
	d := mat.NewDense(n, n, nil)
	for i := 0; i < n; i++ {
		d.Set(i, i, 1)
	}
	return d
}
