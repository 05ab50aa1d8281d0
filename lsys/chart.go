package lsys

import (
	"fmt"
	"math"
	"strings"

	"gonum.org/v1/gonum/mat"
)

// Chart is a result with options for its chart: a title, axis ranges,
// a linear or logarithmic x axis, the outputs to show and a size. The
// value keeps its tables and text; only the drawing changes.
type Chart struct {
	Value any
	Title string
	// XMin, XMax, YMin, YMax are in the units the chart's axes show
	// (frequencies in Hz when the response was asked for in Hz); NaN leaves
	// an end automatic.
	XMin, XMax, YMin, YMax float64
	XScale                 string  // "", "log" or "linear"
	YScale                 string  // "" (the chart's own) or "log"
	Width, Height          float64 // cm; 0 leaves the size automatic
}

// NewChart returns a chart of v with every option automatic.
func NewChart(v any) *Chart {
	nan := math.NaN()
	return &Chart{Value: v, XMin: nan, XMax: nan, YMin: nan, YMax: nan}
}

// SelectOutputs returns a copy of a time or frequency response (or polar
// chart) with only the named outputs, in the order given. It shares the
// data of the outputs kept; nothing is recomputed.
func SelectOutputs(v any, names []string) (any, error) {
	pick := func(have []string) ([]int, error) {
		idx := map[string]int{}
		for i, n := range have {
			idx[n] = i
		}
		var out []int
		for _, n := range names {
			i, ok := idx[n]
			if !ok {
				return nil, fmt.Errorf("there is no output %q; the outputs are %s", n, strings.Join(have, ", "))
			}
			out = append(out, i)
		}
		return out, nil
	}
	switch r := v.(type) {
	case *Response:
		idx, err := pick(r.Outputs)
		if err != nil {
			return nil, err
		}
		c := *r
		c.Outputs, c.Y = nil, nil
		for _, i := range idx {
			c.Outputs = append(c.Outputs, r.Outputs[i])
			c.Y = append(c.Y, r.Y[i])
		}
		if r.Final != nil {
			// the settled values of the outputs kept (a display reads them)
			_, m := r.Final.Dims()
			fin := make([]float64, 0, len(idx)*m)
			for _, i := range idx {
				for j := 0; j < m; j++ {
					fin = append(fin, r.Final.At(i, j))
				}
			}
			c.Final = mat.NewDense(len(idx), m, fin)
		}
		return &c, nil
	case *FrequencyResponse:
		idx, err := pick(r.Outputs)
		if err != nil {
			return nil, err
		}
		m := len(r.Inputs)
		c := *r
		c.Outputs = nil
		for _, i := range idx {
			c.Outputs = append(c.Outputs, r.Outputs[i])
		}
		c.G = make([][]complex128, len(r.G))
		for k, g := range r.G {
			row := make([]complex128, 0, len(idx)*m)
			for _, i := range idx {
				row = append(row, g[i*m:(i+1)*m]...)
			}
			c.G[k] = row
		}
		return &c, nil
	case *PolarChart:
		f, err := SelectOutputs(r.Frequency, names)
		if err != nil {
			return nil, err
		}
		return &PolarChart{Frequency: f.(*FrequencyResponse)}, nil
	}
	return nil, fmt.Errorf("outputs can be chosen on time responses, frequency responses and polar charts, not on this result")
}
