package lang

import (
	"bufio"
	"fmt"
	"os"
	"strconv"
	"strings"

	"gonum.org/v1/gonum/mat"

	"lsys/lang/syntax"
	"lsys/lsys"
)

// DefaultMemory is the memory budget when none is given: a quarter of the
// machine's memory (MemTotal in /proc/meminfo), at least 256 MiB, 4 GiB when
// the machine does not say. A quarter leaves room for the values a cell
// holds while it makes a new one, for the front end and for other kernels
// (common practice; no source).
func DefaultMemory() int64 {
	if total := machineMemory(); total > 0 {
		return max(total/4, 256<<20)
	}
	return 4 << 30
}

// machineMemory is MemTotal of /proc/meminfo in bytes, 0 if unknown.
func machineMemory() int64 {
	f, err := os.Open("/proc/meminfo")
	if err != nil {
		return 0
	}
	defer f.Close()
	sc := bufio.NewScanner(f)
	for sc.Scan() {
		fields := strings.Fields(sc.Text())
		if len(fields) >= 2 && fields[0] == "MemTotal:" {
			kb, err := strconv.ParseInt(fields[1], 10, 64)
			if err == nil {
				return kb << 10
			}
		}
	}
	return 0
}

// ParseMemory reads a size such as "4G", "512M", "2000000000" (bytes) or
// "1.5GiB", as LSYS_MEMORY and --memory take it.
func ParseMemory(s string) (int64, error) {
	t := strings.TrimSpace(strings.ToUpper(s))
	t = strings.TrimSuffix(strings.TrimSuffix(t, "IB"), "B")
	mult := 1.0
	switch {
	case strings.HasSuffix(t, "K"):
		mult, t = 1<<10, strings.TrimSuffix(t, "K")
	case strings.HasSuffix(t, "M"):
		mult, t = 1<<20, strings.TrimSuffix(t, "M")
	case strings.HasSuffix(t, "G"):
		mult, t = 1<<30, strings.TrimSuffix(t, "G")
	case strings.HasSuffix(t, "T"):
		mult, t = 1<<40, strings.TrimSuffix(t, "T")
	}
	v, err := strconv.ParseFloat(t, 64)
	if err != nil || !(v > 0) {
		return 0, fmt.Errorf("memory size %q: want a positive number of bytes, optionally with K, M, G or T (e.g. 4G)", s)
	}
	return int64(v * mult), nil
}

// SizeOf estimates the bytes a value holds: its numbers and text, not the
// small headers around them. It is what the budget compares.
func SizeOf(v any) int64 {
	switch x := v.(type) {
	case nil, float64, bool, complex128:
		return 16
	case string:
		return int64(len(x))
	case *mat.Dense:
		r, c := x.Dims()
		return 8 * int64(r) * int64(c)
	case *mat.CDense:
		r, c := x.Dims()
		return 16 * int64(r) * int64(c)
	case *lsys.System:
		n, m, p := int64(x.N()), int64(x.M()), int64(x.P())
		return 8 * (n*n + n*m + p*n + p*m)
	case *lsys.Response:
		var s int64
		for _, y := range x.Y {
			for _, yy := range y {
				s += 8 * int64(len(yy))
			}
		}
		return s + 8*int64(len(x.T))
	case *lsys.FrequencyResponse:
		var s int64
		for _, g := range x.G {
			s += 16 * int64(len(g))
		}
		return s + 8*int64(len(x.W))
	case []any:
		s := int64(24 * len(x))
		for _, e := range x {
			s += SizeOf(e)
		}
		return s
	case *List:
		s := int64(24 * len(x.Items))
		for _, e := range x.Items {
			s += SizeOf(e)
		}
		return s
	}
	return 64
}

// fmtBytes writes a size for people: 1.5 GiB, 300 MiB, 12 KiB.
func fmtBytes(b int64) string {
	switch {
	case b >= 1<<30:
		return fmt.Sprintf("%.3g GiB", float64(b)/(1<<30))
	case b >= 1<<20:
		return fmt.Sprintf("%.3g MiB", float64(b)/(1<<20))
	case b >= 1<<10:
		return fmt.Sprintf("%.3g KiB", float64(b)/(1<<10))
	}
	return fmt.Sprintf("%d bytes", b)
}

// overBudget is the error for a value of size bytes that would exceed the
// memory budget; what names what would make it.
func (ev *evaluator) overBudget(pos syntax.Pos, what string, size int64) error {
	return ev.errorAt(pos, fmt.Sprintf("%s would take about %s, over the memory budget of %s per value", what, fmtBytes(size), fmtBytes(ev.s.limits.Memory)),
		"Work on a smaller part, or give the kernel a larger budget (the LSYS_MEMORY setting, e.g. LSYS_MEMORY=8G). The session and its bindings are kept.")
}

// checkBudget refuses a value over the memory budget, and a state-space
// system larger than the matrix limit (a system doubled by stack or series
// grows its A fourfold each time; refused here before the next doubling
// could ask for gigabytes).
func (ev *evaluator) checkBudget(v any, pos syntax.Pos, what string) error {
	if s, ok := v.(*lsys.System); ok && int64(s.N())*int64(s.N()) > MaxEntries {
		return ev.errorAt(pos, fmt.Sprintf("%s made a system of %d states, whose A matrix is larger than the limit of %d entries", what, s.N(), MaxEntries),
			"Dense state-space work stops at 1,000 states; reduce the model first (minimal, reduce) or split it.")
	}
	if size := SizeOf(v); size > ev.s.limits.Memory {
		return ev.overBudget(pos, what+"'s result", size)
	}
	return nil
}
