package lsys_test

import (
	"fmt"

	"gonum.org/v1/gonum/mat"

	"lsys/lsys"
)

// A mass-spring-damper, m = 2 kg, c = 1.6 N s/m, k = 8 N/m: one oscillatory
// mode with wn = sqrt(k/m) = 2 rad/s and zeta = c/(2 sqrt(k m)) = 0.2.
func ExampleModes() {
	A := mat.NewDense(2, 2, []float64{0, 1, -4, -0.8})
	B := mat.NewDense(2, 1, []float64{0, 0.5})
	C := mat.NewDense(1, 2, []float64{1, 0})
	g, _ := lsys.FromMatrices(A, B, C, nil, 0)
	mt, _ := lsys.Modes(g)
	for _, m := range mt.Modes {
		fmt.Printf("%.4g rad/s, damping %.3g, reachable %v, observable %v\n", m.NaturalFreq, m.Damping, m.Reachable, m.Observable)
	}
	// Output:
	// 2 rad/s, damping 0.2, reachable true, observable true
}

// (s + 2)/(s^2 + 4 s + 3) in controllable canonical form has one zero, -2.
func ExampleZeros() {
	A := mat.NewDense(2, 2, []float64{0, 1, -3, -4})
	B := mat.NewDense(2, 1, []float64{0, 1})
	C := mat.NewDense(1, 2, []float64{2, 1})
	g, _ := lsys.FromMatrices(A, B, C, nil, 0)
	z, _ := lsys.Zeros(g, 0)
	fmt.Printf("%.6g\n", real(z.Invariant[0]))
	// Output:
	// -2
}

// Two lags, only the first driven: the second mode cannot be reached but
// decays, so the system is stabilizable.
func ExampleStructureOf() {
	A := mat.NewDense(2, 2, []float64{-1, 0, 0, -2})
	B := mat.NewDense(2, 1, []float64{1, 0})
	C := mat.NewDense(1, 2, []float64{1, 1})
	g, _ := lsys.FromMatrices(A, B, C, nil, 0)
	st, _ := lsys.StructureOf(g, 0)
	fmt.Println(st.Controllable, st.Stabilizable, st.UncontrollableModes)
	// Output:
	// false true [(-2+0i)]
}

// Two identical lags in cascade form one Jordan block of size 2.
func ExampleJordan() {
	js, _ := lsys.Jordan(mat.NewDense(2, 2, []float64{-2, 0, 2, -2}), 0, 0)
	c := js.Clusters[0]
	fmt.Println(real(c.Value), c.Algebraic, c.Geometric, c.Blocks)
	// Output:
	// -2 2 1 [2]
}
