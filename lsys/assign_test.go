package lsys

import (
	"math"
	"math/cmplx"
	"strings"
	"testing"
)

func TestAssignCompanion(t *testing.T) {
	// Companion form with characteristic polynomial s^3 + a2 s^2 + a1 s + a0
	// and B = e3: A - B K has the last row [-a0-k1, -a1-k2, -a2-k3], so the
	// gain for s^3 + d2 s^2 + d1 s + d0 is K = [d0-a0, d1-a1, d2-a2]
	// (closed form). Poles -1, -2 ± 1j: (s+1)(s^2+4s+5) = s^3+5s^2+9s+5.
	a0, a1, a2 := 2.0, -1.0, 0.5
	g := sys(t, []float64{0, 1, 0, 0, 0, 1, -a0, -a1, -a2}, []float64{0, 0, 1}, []float64{1, 0, 0}, nil, 3, 1, 1, 0)
	as, err := Assign(g, []complex128{-1, complex(-2, 1), complex(-2, -1)}, false)
	if err != nil {
		t.Fatal(err)
	}
	want := []float64{5 - a0, 9 - a1, 5 - a2}
	for j, w := range want {
		if math.Abs(as.Gain.At(0, j)-w) > 1e-13 {
			t.Fatalf("K = %v, want %v", as.Gain.RawMatrix().Data, want)
		}
	}
	if as.MaxError > 1e-13 {
		t.Fatalf("pole error %g", as.MaxError)
	}
	// Observer by duality: eig(A - L C) at the same places.
	ob, err := Assign(g, []complex128{-3, -4, -5}, true)
	if err != nil || ob.MaxError > 1e-12 {
		t.Fatalf("observer: %v %v", ob, err)
	}
}

func TestAssignSeveralInputs(t *testing.T) {
	for _, n := range []int{4, 10, 30} {
		A := designStable(n, uint64(n+7), false)
		// Many poles moved far by few inputs is ill-conditioned by nature
		// (the condition shows it); a third as many inputs as states is not.
		m := max(3, n/3)
		g, _ := NewSystem(n, m, 1, A, designMat(n, m, 9), designMat(1, n, 10), nil, 0)
		poles := make([]complex128, n)
		for i := 0; i < n; i += 2 {
			poles[i] = complex(-1-float64(i)/4, 0.5+float64(i)/10)
			if i+1 < n {
				poles[i+1] = cmplx.Conj(poles[i])
			} else {
				poles[i] = complex(real(poles[i]), 0)
			}
		}
		as, err := Assign(g, poles, false)
		if err != nil {
			t.Fatal(err)
		}
		if as.MaxError > 1e-8 {
			t.Errorf("n=%d: pole error %g (cond X %g)", n, as.MaxError, as.CondX)
		}
		t.Logf("n=%d: max pole error %.2g, cond X %.3g, sweeps %d", n, as.MaxError, as.CondX, as.Sweeps)
	}
}

func TestAssignUnreachable(t *testing.T) {
	// The second state is not driven: its mode -3 cannot move.
	g := sys(t, []float64{-1, 0, 0, -3}, []float64{1, 0}, []float64{1, 1}, nil, 2, 1, 1, 0)
	_, err := Assign(g, []complex128{-5, -6}, false)
	if err == nil || !strings.Contains(err.Error(), "-3") || !strings.Contains(err.Error(), "not reachable") {
		t.Fatalf("err = %v", err)
	}
}
