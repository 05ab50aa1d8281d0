package builtins_test

import (
	"context"
	"math"
	"testing"

	"lsys/lang"
	"lsys/lang/builtins"
	"lsys/lang/langtest"
)

// Closed forms by hand: [[1, 2], [3, 4]] has column sums 4, 6 and row sums
// 3, 7; A'A = [[10, 14], [14, 20]] has eigenvalues 15 +- sqrt(221), so the
// 2-norm is sqrt(15 + sqrt(221)); the Frobenius norm is sqrt(30).
func TestQuickChecks(t *testing.T) {
	cases := []struct {
		src  string
		want float64
	}{
		{"max([3, -1, 7], 2)", 7},
		{"min([[1, 2], [-3, 4]], 0)", -3},
		{"sum([1, 2, 3], [[1], [1]])", 8},
		{"sum(identity(3))", 3},
		{"norm([3, 4])", 5},
		{"norm([3, -4], 1)", 7},
		{"norm([[3], [-4]], inf)", 4},
		{"norm([[1, 2], [3, 4]], 1)", 6},
		{"norm([[1, 2], [3, 4]], inf)", 7},
		{`norm([[1, 2], [3, 4]], "fro")`, math.Sqrt(30)},
		{"norm([[1, 2], [3, 4]], 2)", math.Sqrt(15 + math.Sqrt(221))},
		{"norm([[1j, 0], [0, 2]], 2)", 2},
		{"norm([[1j, 1], [0, 0]], 2)", math.Sqrt(2)},
		{"norm(-3)", 3},
		{"norm([1e200, 1e200])", 1e200 * math.Sqrt2},
	}
	for _, tc := range cases {
		got := stRun(t, tc.src).(float64)
		if math.IsNaN(tc.want) != math.IsNaN(got) || math.Abs(got-tc.want) > 4e-16*math.Abs(tc.want) {
			t.Errorf("%s = %v, want %v", tc.src, got, tc.want)
		}
	}
	if v := stRun(t, "sum([1j, 2])").(complex128); v != complex(2, 1) {
		t.Errorf("complex sum %v", v)
	}
	stRunErr(t, "max([1j, 2])", "no order")
	stRunErr(t, `max("a")`, "not a number or a matrix")
	stRunErr(t, "norm([1, 2], 3)", "1, 2, inf")
	stRunErr(t, "max()", "no values")
}

// print of a matrix after a label: later rows start under the first one.
func TestPrintMatrixAligned(t *testing.T) {
	s := lang.NewSession(lang.Options{Builtins: builtins.Registry(), Dir: t.TempDir()})
	var rec langtest.Recorder
	if _, err := s.Run(context.Background(), `print("A =", [[1, -2.5], [30, 4]], "(N/m)")`, &rec); err != nil {
		t.Fatal(err)
	}
	want := "A =  1  -2.5\n    30     4 (N/m)\n"
	if got := rec.Out.String(); got != want {
		t.Errorf("got\n%s\nwant\n%s", got, want)
	}
}
