package lsys

import (
	"context"
	"testing"
	"time"
)

// The lattices of the side-by-side comparison (bench/structures.sh runs
// scipy on the same matrices): identical masses and springs, one face
// grounded, lowest 20 modes. The 10^5-DOF cases run only with
// -bench 'Lattice/.*e5' named explicitly; see the README.
func BenchmarkLattice(b *testing.B) {
	for _, c := range []struct {
		name string
		dims []int
	}{{"2d-1e4", []int{100, 100}}, {"3d-1e4", []int{22, 22, 22}}, {"2d-1e5", []int{316, 316}}, {"3d-1e5", []int{47, 47, 47}}} {
		b.Run(c.name, func(b *testing.B) {
			K, M, err := SpringLattice(c.dims, 1, 1, true)
			if err != nil {
				b.Fatal(err)
			}
			b.ResetTimer()
			var sm *StructuralModes
			for i := 0; i < b.N; i++ {
				t0 := time.Now()
				sm, err = SparseModes(context.Background(), K, M, SparseModeOptions{Count: 20})
				if err != nil {
					b.Fatal(err)
				}
				if i == 0 {
					st := sm.Sparse
					b.Logf("%s n=%d: %.2f s, L nnz %d, memory %.0f MB (factor %.0f MB), restarts %d, solves %d, residual %.1e", c.name, st.N, time.Since(t0).Seconds(), st.FactorNNZ, float64(st.Memory)/1e6, float64(st.FactorMem)/1e6, st.Restarts, st.Solves, st.Residual)
				}
			}
			b.ReportMetric(float64(sm.Sparse.Memory)/1e6, "MB")
		})
	}
}
