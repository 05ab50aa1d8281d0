package builtins_test

import (
	"fmt"
	"math"
	"math/cmplx"
	"strings"
	"testing"

	"gonum.org/v1/gonum/mat"

	"lsys/lang"
)

// Each building block as a rational function and as the equation block
// its doc gives must agree: |C_rational(jw) - C_block(jw)| <= 1e-12 |C|
// at frequencies around the corners (both evaluated exactly; the
// tolerance is rounding).
func TestBuildingBlocksAgreeWithBlocks(t *testing.T) {
	cases := []struct{ name, rational, block string }{
		{"threeterm", "threeterm(kp, integral: ti, derivative: td, filter: n)",
			`system {
  states integral, filtered
  inputs e
  outputs u
  integral' = e/ti
  filtered' = (e - filtered)/tf
  u = kp*(e + integral + td*(e - filtered)/tf)
}`},
		{"leadlag", "leadlag(w, ph, gain: k)",
			`system {
  states x
  inputs e
  outputs u
  x' = wp*(e - x)
  u = k*sqrt(a)*(wp/wz*e + (1 - wp/wz)*x)
}`},
		{"lag", "leadlag(w, -ph, gain: k)",
			`system {
  states x
  inputs e
  outputs u
  x' = wz*(e - x)
  u = k/sqrt(a)*(wz/wp*e + (1 - wz/wp)*x)
}`},
		{"notch", "notch(w, depth: d, width: wd)",
			`system {
  states a, b
  inputs e
  outputs u
  a' = b
  b' = e - w^2*a - 2*zp*w*b
  u = e + 2*(zz - zp)*w*b
}`},
		{"lowpass1", "lowpass(w)", "system {\n states x\n inputs e\n outputs u\n x' = w*(e - x)\n u = x\n}"},
		{"lowpass2", "lowpass(w, order: 2, damping: z)",
			"system {\n states a, b\n inputs e\n outputs u\n a' = b\n b' = w^2*(e - a) - 2*z*w*b\n u = a\n}"},
	}
	// invented parameters; a and the corners from LeadLag's closed form
	params := "kp = 2.5\nti = 0.4\ntd = 0.05\nn = 8\ntf = td/n\nw = 30\nph = 55\nk = 4\n" +
		"a = (1 - sin(ph*pi/180))/(1 + sin(ph*pi/180))\nwz = w*sqrt(a)\nwp = w/sqrt(a)\n" +
		"d = 0.05\nwd = 0.3\nzp = wd/2\nzz = d*zp\nz = 0.3\n"
	for _, c := range cases {
		for _, w := range []float64{0.1, 3, 30, 100, 1e4} {
			blockForm := strings.TrimSuffix(c.rational, ")") + `, form: "block")`
			src := fmt.Sprintf("%sR = %s\nB = %s\nF = %s\n[R(%gj), gain(B, at: %g), gain(F, at: %g)]", params, c.rational, c.block, blockForm, w, w, w)
			got := stRun(t, src)
			items := listItems(t, got)
			r, b, f := asComplex(items[0]), asComplex(items[1]), asComplex(items[2])
			if cmplx.Abs(r-b) > 1e-12*cmplx.Abs(r) || cmplx.Abs(f-b) > 1e-12*cmplx.Abs(r) {
				t.Errorf("%s at %g rad/s: rational %v, equation block %v, form: \"block\" %v", c.name, w, r, b, f)
			}
		}
		// form: "block" is the equation block's realization: the same
		// matrices (to rounding of the coefficients' arithmetic)
		if c.name == "lag" {
			continue // the lag's block is written with the corners swapped
		}
		blockForm := strings.TrimSuffix(c.rational, ")") + `, form: "block")`
		for _, m := range []string{"A", "B", "C", "D"} {
			got := stRun(t, fmt.Sprintf("%sB = %s\nF = %s\nnorm(F.%s - B.%s, 1)/max(1, norm(B.%s, 1))", params, c.block, blockForm, m, m, m)).(float64)
			if got > 1e-15 {
				t.Errorf("%s: %s differs from the equation block's by %g (relative)", c.name, m, got)
			}
		}
	}
}

// Closed forms of each block's defining property (from the formulas in
// lsys/controllers.go, derived by hand).
func TestBuildingBlockProperties(t *testing.T) {
	// leadlag: phase ph at w, the maximum, with |C(jw)| = gain
	for _, ph := range []float64{-60, -10, 20, 75} {
		src := fmt.Sprintf("C = leadlag(7, %g, gain: 3)\n[C(7j), C(7.7j), C(6.3j)]", ph)
		it := listItems(t, stRun(t, src))
		c0 := asComplex(it[0])
		if math.Abs(cmplx.Abs(c0)-3) > 1e-13 || math.Abs(cmplx.Phase(c0)*180/math.Pi-ph) > 1e-11 {
			t.Errorf("leadlag %g: C(jw) = %v", ph, c0)
		}
		for _, c := range it[1:] {
			if math.Abs(cmplx.Phase(asComplex(c))) > math.Abs(cmplx.Phase(c0)) {
				t.Errorf("leadlag %g: the phase is larger away from w", ph)
			}
		}
	}
	// notch: exactly depth at w; a decade away 1 + O(width/10) (here 0.002)
	it := listItems(t, stRun(t, "N = notch(50, depth: 0.02, width: 0.2)\n[N(50j), N(0.5j), N(5000j)]"))
	if v := asComplex(it[0]); cmplx.Abs(v-0.02) > 1e-15 {
		t.Errorf("notch at w = %v", v)
	}
	for _, v := range it[1:] {
		if cmplx.Abs(asComplex(v)-1) > 3e-3 {
			t.Errorf("notch far away = %v", v)
		}
	}
	// lowpass: -3 dB at w (order 1), 1/(2 z) at w (order 2)
	if v := asComplex(stRun(t, "lowpass(20)(20j)")); math.Abs(cmplx.Abs(v)-1/math.Sqrt2) > 1e-15 {
		t.Errorf("lowpass 1 at w = %v", v)
	}
	if v := asComplex(stRun(t, "lowpass(20, order: 2, damping: 0.25)(20j)")); cmplx.Abs(v-complex(0, -2)) > 1e-14 {
		t.Errorf("lowpass 2 at w = %v", v)
	}
	// threeterm: gain kp (1 + n) at high frequency, integrator below
	if v := asComplex(stRun(t, "threeterm(2, integral: 1, derivative: 0.1, filter: 5)(1e7j)")); cmplx.Abs(v-12) > 1e-4 {
		t.Errorf("threeterm high-frequency gain %v, want kp (1 + n) = 12", v)
	}
	if v := stRun(t, "threeterm(2)"); fmt.Sprint(v) != "2" {
		t.Errorf("threeterm(2) = %v, want the constant 2", v)
	}
	stRunErr(t, "leadlag(1, 90)", "strictly between -90 and 90")
	stRunErr(t, "notch(1, depth: 1.5)", "depth")
	stRunErr(t, "lowpass(1, order: 3)", "1 or 2")
	stRunErr(t, "threeterm(1, integral: 0)", "integral time")
}

func listItems(t *testing.T, v any) []any {
	t.Helper()
	switch x := v.(type) {
	case *lang.List:
		return x.Items
	case *mat.CDense:
		var out []any
		r, c := x.Dims()
		for i := 0; i < r; i++ {
			for j := 0; j < c; j++ {
				out = append(out, x.At(i, j))
			}
		}
		return out
	}
	t.Fatalf("want a list, got %T", v)
	return nil
}

func asComplex(v any) complex128 {
	switch x := v.(type) {
	case complex128:
		return x
	case float64:
		return complex(x, 0)
	}
	return cmplx.NaN()
}
