package lsys

import (
	"context"
	"encoding/json"
	"math"
	"os"
	"testing"
)

// The loop shapes and margins of fixed loops with and without a dead time
// against tools/ref/loops_ref.py (scipy.signal.freqs for the frequency
// responses, e^(-jwT) for the delay, scipy.optimize for peaks and roots).
// Tolerances: 1e-9 relative on the peaks (a flat maximum: the value is far
// better determined than its frequency, compared at 1e-5), 1e-9 on the
// crossover frequencies and margins (roots of smooth functions).
func TestLoopShapesAgainstReference(t *testing.T) {
	b, err := os.ReadFile("testdata/loops_ref.json")
	if err != nil {
		t.Fatal(err)
	}
	var ref struct {
		Cases []struct {
			Name           string    `json:"name"`
			PlantNum       []float64 `json:"plant_num"`
			PlantDen       []float64 `json:"plant_den"`
			CtrlNum        []float64 `json:"ctrl_num"`
			CtrlDen        []float64 `json:"ctrl_den"`
			Delay          float64   `json:"delay"`
			Peaks          []float64 `json:"peaks"`
			PeakW          []float64 `json:"peak_w"`
			Interior       []bool    `json:"interior"`
			GainCrossover  float64   `json:"gain_crossover"`
			PhaseMargin    float64   `json:"phase_margin"`
			PhaseCrossover float64   `json:"phase_crossover"`
			GainMargin     float64   `json:"gain_margin"`
		}
	}
	if err := json.Unmarshal(b, &ref); err != nil {
		t.Fatal(err)
	}
	if len(ref.Cases) == 0 {
		t.Fatal("no cases")
	}
	for _, c := range ref.Cases {
		P := siso(t, c.PlantNum, c.PlantDen)
		C := siso(t, c.CtrlNum, c.CtrlDen)
		ls, err := LoopShapes(context.Background(), P, C, FrequencyOptions{Delay: c.Delay})
		if err != nil {
			t.Fatal(err)
		}
		for i := range c.Peaks {
			if !c.Interior[i] {
				continue // a limit at an end of the range, not a peak
			}
			if math.Abs(ls.Peak[i]-c.Peaks[i]) > 1e-9*c.Peaks[i] || math.Abs(ls.PeakW[i]-c.PeakW[i]) > 1e-5*c.PeakW[i] {
				t.Errorf("%s: peak of %s %.12g at %.8g, reference %.12g at %.8g", c.Name, ls.Names[i], ls.Peak[i], ls.PeakW[i], c.Peaks[i], c.PeakW[i])
			}
		}
		if !ls.ClosedStable {
			t.Errorf("%s: closed loop judged unstable", c.Name)
		}
		L, err := Series(P, C)
		if err != nil {
			t.Fatal(err)
		}
		mg, err := LoopMargins(context.Background(), L, FrequencyOptions{Delay: c.Delay})
		if err != nil {
			t.Fatal(err)
		}
		if len(mg.GainCrossovers) == 0 || len(mg.PhaseCrossovers) == 0 {
			t.Fatalf("%s: crossovers %v %v", c.Name, mg.GainCrossovers, mg.PhaseCrossovers)
		}
		if w := mg.GainCrossovers[0]; math.Abs(w-c.GainCrossover) > 1e-9*w || math.Abs(mg.PhaseMargins[0]-c.PhaseMargin) > 1e-7 {
			t.Errorf("%s: gain crossover %.12g (PM %.10g), reference %.12g (PM %.10g)", c.Name, w, mg.PhaseMargins[0], c.GainCrossover, c.PhaseMargin)
		}
		if w := mg.PhaseCrossovers[0]; math.Abs(w-c.PhaseCrossover) > 1e-9*w || math.Abs(mg.GainMarginsDB[0]+20*math.Log10(1/c.GainMargin)) > 1e-8 {
			t.Errorf("%s: phase crossover %.12g (GM %.10g dB), reference %.12g (GM %.10g)", c.Name, w, mg.GainMarginsDB[0], c.PhaseCrossover, c.GainMargin)
		}
	}
}

func TestLoopsReferenceFresh(t *testing.T) { checkRefFresh(t, "loops_ref.py", "loops_ref.json") }
