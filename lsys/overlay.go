package lsys

import (
	"errors"
	"fmt"
)

// Overlay is results of one kind, computed for several systems, to be
// drawn on one chart: full against reduced, before against after a
// design. Exactly one of the slices is filled, in the order given.
type Overlay struct {
	Names       []string // one per result: the legend
	Responses   []*Response
	Frequencies []*FrequencyResponse
	Polars      []*PolarChart
	PoleZeros   []*PoleZeroMap
}

// Len is the number of results.
func (o *Overlay) Len() int { return len(o.Names) }

// NewOverlay checks that the results are of one kind with the same
// outputs and inputs (responses also the same kind and channels), so that
// each panel of the chart compares like with like.
func NewOverlay(names []string, items []any) (*Overlay, error) {
	if len(items) < 1 || len(names) != len(items) {
		return nil, errors.New("nothing to overlay: give two or more results")
	}
	o := &Overlay{Names: names}
	shape := func(k int, outs, ins []string, o0, i0 []string, what string) error {
		if len(outs) != len(o0) || len(ins) != len(i0) {
			return fmt.Errorf("%s %q has %d outputs and %d %s, %q has %d and %d: overlay results of systems with the same outputs and inputs (pick one channel with G.out.in)",
				what, names[k], len(outs), len(ins), map[bool]string{true: "channels", false: "inputs"}[what == "response"], names[0], len(o0), len(i0))
		}
		return nil
	}
	for k, it := range items {
		switch v := it.(type) {
		case *Response:
			if len(o.Frequencies)+len(o.Polars)+len(o.PoleZeros) > 0 {
				return nil, mixed(names, k)
			}
			if k > 0 {
				r0 := o.Responses[0]
				if v.Kind != r0.Kind {
					return nil, fmt.Errorf("%q is a %s response and %q a %s response: overlay responses of one kind", names[k], v.Kind, names[0], r0.Kind)
				}
				if err := shape(k, v.Outputs, v.Channels, r0.Outputs, r0.Channels, "response"); err != nil {
					return nil, err
				}
			}
			o.Responses = append(o.Responses, v)
		case *FrequencyResponse:
			if len(o.Responses)+len(o.Polars)+len(o.PoleZeros) > 0 {
				return nil, mixed(names, k)
			}
			if k > 0 {
				f0 := o.Frequencies[0]
				if err := shape(k, v.Outputs, v.Inputs, f0.Outputs, f0.Inputs, "frequency response"); err != nil {
					return nil, err
				}
			}
			o.Frequencies = append(o.Frequencies, v)
		case *PolarChart:
			if len(o.Responses)+len(o.Frequencies)+len(o.PoleZeros) > 0 {
				return nil, mixed(names, k)
			}
			if k > 0 {
				f0 := o.Polars[0].Frequency
				if err := shape(k, v.Frequency.Outputs, v.Frequency.Inputs, f0.Outputs, f0.Inputs, "polar chart"); err != nil {
					return nil, err
				}
			}
			o.Polars = append(o.Polars, v)
		case *PoleZeroMap:
			if len(o.Responses)+len(o.Frequencies)+len(o.Polars) > 0 {
				return nil, mixed(names, k)
			}
			if k > 0 && v.System.Sampled() != o.PoleZeros[0].System.Sampled() {
				return nil, fmt.Errorf("%q and %q are in different planes (one sampled, one continuous): overlay maps of one kind", names[k], names[0])
			}
			o.PoleZeros = append(o.PoleZeros, v)
		default:
			return nil, fmt.Errorf("%q is not a response, frequency response, polar chart or pole-zero map", names[k])
		}
	}
	return o, nil
}

func mixed(names []string, k int) error {
	return fmt.Errorf("%q is of another kind than %q: overlay results of one kind (all responses, all frequency responses, ...)", names[k], names[0])
}
