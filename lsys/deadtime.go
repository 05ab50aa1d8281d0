package lsys

import (
	"fmt"
	"math"
	"math/cmplx"

	"gonum.org/v1/gonum/mat"
)

// withDeadTime returns L in series with a Padé model of the dead time T,
// for the questions that need a finite state model (the closed-loop poles
// of a loop with a delay are infinitely many). The order is the lowest,
// 1 to 8, whose phase is within 1 degree of -wT up to 1.5 times the
// fastest gain crossover, where the loop still has gain enough for the
// approximation to decide stability (the Padé approximant is all-pass, so
// only its phase error matters). The note says which order was used and
// whether it falls short. A sampled loop takes a dead time of k whole
// sample periods as z^-k exactly (and refuses a fraction of one). T == 0
// returns L itself and no note.
func withDeadTime(L *System, T float64, crossovers []float64) (*System, string, error) {
	if T == 0 {
		return L, "", nil
	}
	wc := 0.0
	for _, w := range crossovers {
		wc = math.Max(wc, w)
	}
	if wc == 0 {
		wc = 1 / T
	}
	wc *= 1.5
	n, short := 1, true
	for ; n <= 8; n++ {
		if padePhaseError(T, n, wc) <= 1 {
			short = false
			break
		}
	}
	if n > 8 {
		n = 8
	}
	if L.Sampled() {
		// a whole number of samples is z^-k exactly: k states of shift
		k := math.Round(T / L.Ts)
		if k < 1 || math.Abs(T/L.Ts-k) > 1e-9*k || k > 1000 {
			return nil, fmt.Sprintf("dead time: closed-loop stability not judged, since %.4g s is not a whole number of sample periods (%.4g s); margins and charts use e^(-jwT) exactly", T, L.Ts), fmt.Errorf("sampled loop with a fractional dead time")
		}
		m := int(k)
		A := mat.NewDense(m, m, nil)
		for i := 1; i < m; i++ {
			A.Set(i, i-1, 1)
		}
		B, C := mat.NewDense(m, 1, nil), mat.NewDense(1, m, nil)
		B.Set(0, 0, 1)
		C.Set(0, m-1, 1)
		z, err := NewSystem(m, 1, 1, A, B, C, mat.NewDense(1, 1, nil), L.Ts)
		if err != nil {
			return nil, "", err
		}
		Ld, err := Series(L, z)
		if err != nil {
			return nil, "", err
		}
		return Ld, fmt.Sprintf("dead time: %d sample periods, z^-%d exactly, in the closed-loop stability verdict", m, m), nil
	}
	d, err := Delay(T, n)
	if err != nil {
		return nil, "", err
	}
	Ld, err := Series(L, d)
	if err != nil {
		return nil, "", err
	}
	note := fmt.Sprintf("dead time: closed-loop stability judged on the loop with a Padé [%d/%d] model of the dead time (phase within 1 degree of e^(-jwT) up to %.4g rad/s); margins and charts use e^(-jwT) exactly", n, n, wc)
	if short {
		note = fmt.Sprintf("dead time: closed-loop stability judged on the loop with a Padé [8/8] model of the dead time, whose phase is off by %.2g degrees at %.4g rad/s: the verdict is uncertain; margins and charts use e^(-jwT) exactly", padePhaseError(T, 8, wc), wc)
	}
	return Ld, note, nil
}

// padePhaseError is the largest |phase(Pade(T, n)(jw)) + wT| in degrees
// for w up to wmax (the error grows with w).
func padePhaseError(T float64, n int, wmax float64) float64 {
	r, err := Pade(T, n)
	if err != nil {
		return math.Inf(1)
	}
	worst := 0.0
	for k := 1; k <= 64; k++ {
		w := wmax * float64(k) / 64
		e := cmplx.Phase(r.Eval(complex(0, w))*cmplx.Exp(complex(0, w*T))) * 180 / math.Pi
		worst = math.Max(worst, math.Abs(e))
	}
	return worst
}
