package lsys

import "errors"

// PoleZeroMap is what a pole-zero chart shows: the poles, the zeros when
// they are known, and whether the system is sampled (then the chart is in
// the z-plane with the unit circle).
type PoleZeroMap struct {
	System     *System
	Poles      []complex128
	Zeros      []complex128
	ZerosKnown bool   // false: zeros were not computed (see Note)
	Note       string // what the map leaves out, if anything
	// Within, when positive, is the radius the chart shows (1/s, or in the
	// z-plane); points beyond it are marked at the edge with their value.
	// Zero: chosen from the points (see the chart).
	Within float64
}

// PoleZero collects the poles of g (the eigenvalues of A, see Poles) and
// the given zeros. Pass zeros == nil with known == false when they could
// not be computed; the map then says so.
func PoleZero(g *System, zeros []complex128, known bool) (*PoleZeroMap, error) {
	if g == nil {
		return nil, errors.New("the system is missing")
	}
	poles, err := Poles(g)
	if err != nil {
		return nil, err
	}
	pz := &PoleZeroMap{System: g, Poles: poles, Zeros: zeros, ZerosKnown: known}
	if !known {
		pz.Note = "zeros not shown: they could not be computed"
	}
	return pz, nil
}

// PolarChart asks for the polar (Nyquist) chart of a frequency response.
type PolarChart struct {
	Frequency *FrequencyResponse
}
