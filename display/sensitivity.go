package display

// Displays of eigenvalue sensitivities: one row per mode with the
// eigenvalue, its condition number, d(eigenvalue)/d(parameter) for each
// parameter, and the relative sensitivity (p/|λ|) dλ/dp, which has no
// units and so ranks parameters against each other.

import (
	"fmt"
	"math"
	"math/cmplx"
	"strings"

	"lsys/lsys"
)

func init() {
	Register((*lsys.Sensitivity)(nil), renderSensitivity)
}

// snComplex formats a sensitivity; NaN (a defective eigenvalue) is
// "undefined".
func snComplex(z complex128) string {
	if cmplx.IsNaN(z) {
		return "undefined"
	}
	return lcComplex(z)
}

// lcComplex is a complex number as the tables show it: a part below
// 1e-13 of the modulus is rounding and shown as 0, and a purely imaginary
// number without its zero real part ("0.2245j", not "0 + 0.2245j").
func lcComplex(z complex128) string {
	if a := cmplx.Abs(z); !math.IsInf(a, 0) {
		if math.Abs(real(z)) <= 1e-13*a {
			z = complex(0, imag(z))
		}
		if math.Abs(imag(z)) <= 1e-13*a {
			z = complex(real(z), 0)
		}
	}
	if real(z) == 0 && imag(z) != 0 {
		return fmtNum(imag(z)) + "j"
	}
	return fmtComplex(z, false)
}

// snRank names the parameter with the largest relative sensitivity of
// mode k, with its magnitude.
func snRank(s *lsys.Sensitivity, k int) string {
	best, bestV := -1, -1.0
	for j := range s.Parameters {
		v := cmplx.Abs(s.Relative(k, j))
		if !math.IsNaN(v) && v > bestV {
			best, bestV = j, v
		}
	}
	if best < 0 {
		return "n/a"
	}
	return fmt.Sprintf("%s (%s)", s.Parameters[best], fmtNum(bestV))
}

func snTable(s *lsys.Sensitivity) (title string, head []string, rows [][]string, notes []string) {
	var at []string
	for j, p := range s.Parameters {
		at = append(at, p+" = "+fmtNum(s.Values[j]))
	}
	title = "eigenvalue sensitivities at " + strings.Join(at, ", ")
	if s.Ts > 0 {
		title += " (sampled every " + fmtNum(s.Ts) + " s)"
	}
	head = []string{"eigenvalue", "condition"}
	for _, p := range s.Parameters {
		head = append(head, "dλ/d"+p)
	}
	for _, p := range s.Parameters {
		head = append(head, p+"/|λ| · dλ/d"+p)
	}
	head = append(head, "largest |relative|")
	for k, l := range s.Eigenvalues {
		ev := fmtComplex(l, imag(l) != 0)
		if snMult(s, k) > 1 {
			ev += fmt.Sprintf(" (×%d)", snMult(s, k))
		}
		row := []string{ev, fmtNum(s.Cond[k])}
		for j := range s.Parameters {
			row = append(row, snComplex(s.D[k][j]))
		}
		for j := range s.Parameters {
			if l == 0 {
				row = append(row, "n/a (λ = 0)")
			} else {
				row = append(row, snComplex(s.Relative(k, j)))
			}
		}
		rows = append(rows, append(row, snRank(s, k)))
	}
	notes = append(notes, "dλ/dp = wᴴ (dA/dp) v / (wᴴ v) with v, w the right and left eigenvectors; condition = 1/|wᴴ v| for unit vectors (1 is the best)")
	notes = append(notes, "relative: the change of the eigenvalue relative to its size per relative change of the parameter; it ranks parameters whatever their units")
	if hasComplex(s.Eigenvalues) {
		notes = append(notes, "a ± pair: the listed derivatives are those of the + member; the − member moves by the conjugate amount")
	}
	var defective, semisimple bool
	for k := range s.Eigenvalues {
		if snMult(s, k) > 1 || math.IsInf(s.Cond[k], 1) {
			if math.IsInf(s.Cond[k], 1) || (k < len(s.Defective) && s.Defective[k]) {
				defective = true
			} else {
				semisimple = true
			}
		}
	}
	if defective {
		notes = append(notes, "undefined for a defective eigenvalue (repeated, with fewer eigenvectors than its multiplicity): it has no derivative; it moves like the root of the change")
	}
	if semisimple {
		notes = append(notes, "undefined for a repeated eigenvalue with a full set of eigenvectors: it splits, and each part's derivative depends on the direction of the change")
	}
	return title, head, rows, notes
}

func snMult(s *lsys.Sensitivity, k int) int {
	if k < len(s.Multiplicity) {
		return s.Multiplicity[k]
	}
	return 1
}

func hasComplex(v []complex128) bool {
	for _, z := range v {
		if imag(z) != 0 {
			return true
		}
	}
	return false
}

func renderSensitivity(v any, _ Options) Bundle {
	s := v.(*lsys.Sensitivity)
	if len(s.Eigenvalues) == 0 {
		return NewBundle("eigenvalue sensitivities: no eigenvalues")
	}
	title, head, rows, notes := snTable(s)
	b := NewBundle(textTable(title, head, rows) + "\n" + strings.Join(notes, "\n"))
	b.Data[HTML] = htmlTableCard("lsys-sensitivity", title, head, rows, 2, strings.Join(notes, ". ")+".")
	cj := func(z complex128) any {
		if cmplx.IsNaN(z) {
			return "undefined"
		}
		return [2]float64{real(z), imag(z)}
	}
	var modes []map[string]any
	for k, l := range s.Eigenvalues {
		d := map[string]any{}
		r := map[string]any{}
		for j, p := range s.Parameters {
			d[p] = cj(s.D[k][j])
			r[p] = cj(s.Relative(k, j))
		}
		modes = append(modes, map[string]any{"eigenvalue": cj(l), "condition": jsonNum(s.Cond[k]), "derivative": d, "relative": r, "multiplicity": snMult(s, k)})
	}
	vals := map[string]any{}
	for j, p := range s.Parameters {
		vals[p] = jsonNum(s.Values[j])
	}
	b.Data[JSON] = map[string]any{"parameters": s.Parameters, "values": vals, "modes": modes, "sample_time": s.Ts}
	return b
}
