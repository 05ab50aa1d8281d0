package lsys

import "errors"

// Mode is one mode of a system: a real eigenvalue, or a complex-conjugate
// pair counted once (Eigenvalue then has the positive imaginary part).
// Continuous-time figures are reported for sampled systems too, through
// s = log(z)/Ts.
type Mode struct {
	Eigenvalue   complex128 // of A (z-plane for sampled systems)
	Pair         bool       // a complex-conjugate pair
	NaturalFreq  float64    // rad/s, |s|
	Damping      float64    // -Re(s)/|s|; 1 for a real stable pole at the origin by convention? see Modes
	TimeConstant float64    // s, -1/Re(s); +Inf when Re(s) == 0; negative for growing modes
}

// ModeTable is the result of Modes: one row per mode, ordered by natural
// frequency then damping.
type ModeTable struct {
	System *System
	Modes  []Mode
}

// Modes computes the mode table of s.
//
// Placeholder contract: the structure work fills this in (balancing +
// Hessenberg QR, left/right vectors, conditions, PBH, shapes).
func Modes(s *System) (*ModeTable, error) {
	return nil, errors.New("modes: not implemented yet")
}
