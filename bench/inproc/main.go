// Command inproc times lsys's numerics in-process on the models bench/run
// wrote, for the side-by-side comparison with numpy/scipy. It prints one
// JSON object per line: {"op", "n", "seconds": [one per repetition]}.
//
//	go run ./bench/inproc -dir DIR -n 50,200 -reps 5 [-ops modes,exp]
//	go run -tags lapack ./bench/inproc ...   (the LAPACK backend)
//
// The models come from bench/run.py; -cpuprofile profiles the timed work.
package main

import (
	"context"
	"encoding/binary"
	"encoding/json"
	"flag"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"runtime"
	"runtime/pprof"
	"strconv"
	"strings"
	"time"

	"gonum.org/v1/gonum/mat"

	"lsys/lsys"
)

func main() {
	dir := flag.String("dir", "", "folder with the models (A<n>.bin, B<n>.bin, C<n>.bin: float64, little-endian, row by row)")
	sizes := flag.String("n", "50,200", "model orders, comma-separated")
	reps := flag.String("reps", "5", "repetitions per order, comma-separated in the order of -n (or one for all)")
	ops := flag.String("ops", "", "operations to time (default: all)")
	prof := flag.String("cpuprofile", "", "write a CPU profile of the timed work to this file (go tool pprof)")
	flag.Parse()
	if *prof != "" {
		f, err := os.Create(*prof)
		if err != nil {
			fail(err)
		}
		if err := pprof.StartCPUProfile(f); err != nil {
			fail(err)
		}
		defer pprof.StopCPUProfile()
	}
	out := json.NewEncoder(os.Stdout)
	out.Encode(map[string]any{"backend": lsys.Backend, "go": runtime.Version(), "gomaxprocs": runtime.GOMAXPROCS(0)})
	want := map[string]bool{}
	for _, o := range strings.Split(*ops, ",") {
		if o != "" {
			want[o] = true
		}
	}
	repList := strings.Split(*reps, ",")
	for i, s := range strings.Split(*sizes, ",") {
		n, err := strconv.Atoi(s)
		if err != nil {
			fail(err)
		}
		r, err := strconv.Atoi(repList[min(i, len(repList)-1)])
		if err != nil {
			fail(err)
		}
		A, B, C := read(*dir, "A", n, n), read(*dir, "B", n, 1), read(*dir, "C", 1, n)
		G, err := lsys.FromMatrices(A, B, C, nil, 0)
		if err != nil {
			fail(err)
		}
		for _, c := range cases(A, B, G, n) {
			if len(want) > 0 && !want[c.op] {
				continue
			}
			var secs []float64
			for k := 0; k < r; k++ {
				t := time.Now()
				if err := c.run(); err != nil {
					fail(fmt.Errorf("%s at n = %d: %w", c.op, n, err))
				}
				secs = append(secs, time.Since(t).Seconds())
			}
			out.Encode(map[string]any{"op": c.op, "n": n, "seconds": secs})
		}
	}
}

type benchCase struct {
	op  string
	run func() error
}

// cases lists the timed computations; bench/run.py times the same ones in
// numpy/scipy under the same names.
func cases(A, B *mat.Dense, G *lsys.System, n int) []benchCase {
	ctx := context.Background()
	var BBt mat.Dense
	BBt.Mul(B, B.T())
	eye := mat.NewDiagDense(n, nil)
	for i := 0; i < n; i++ {
		eye.SetDiag(i, 1)
	}
	Q := mat.DenseCopyOf(eye)
	R := mat.NewDense(1, 1, []float64{1})
	grid := make([]float64, 1000)
	for i := range grid {
		grid[i] = math.Pow(10, -1+3*float64(i)/999)
	}
	return []benchCase{
		{"modes", func() error { _, err := lsys.Modes(G); return err }},
		{"eigen", func() error { _, err := lsys.Eigen(A); return err }},
		{"schur", func() error { _, err := lsys.Schur(A); return err }},
		{"exp", func() error { _, err := lsys.Expm(A); return err }},
		{"lyapunov", func() error { _, err := lsys.LyapunovEq(A, &BBt, false); return err }},
		{"riccati", func() error { _, err := lsys.CARE(A, B, Q, R, nil); return err }},
		{"zeros", func() error { _, err := lsys.Zeros(G, 0); return err }},
		{"step", func() error {
			_, err := lsys.Step(ctx, G, lsys.ResponseOptions{Until: 10, Step: 0.001})
			return err
		}},
		{"frequency", func() error {
			_, err := lsys.Frequency(ctx, G, lsys.FrequencyOptions{Grid: grid})
			return err
		}},
	}
}

func read(dir, name string, r, c int) *mat.Dense {
	b, err := os.ReadFile(filepath.Join(dir, fmt.Sprintf("%s%d.bin", name, max(r, c))))
	if err != nil {
		fail(err)
	}
	if len(b) != 8*r*c {
		fail(fmt.Errorf("%s%d.bin holds %d bytes, want %d", name, max(r, c), len(b), 8*r*c))
	}
	d := make([]float64, r*c)
	for i := range d {
		d[i] = math.Float64frombits(binary.LittleEndian.Uint64(b[8*i:]))
	}
	return mat.NewDense(r, c, d)
}

func fail(err error) {
	pprof.StopCPUProfile()
	fmt.Fprintln(os.Stderr, "inproc:", err)
	os.Exit(1)
}
