package builtins

import (
	"math"
	"math/cmplx"
	"strings"

	"gonum.org/v1/gonum/mat"

	"lsys/lang"
	"lsys/lsys"
)

// Quick checks on numbers, vectors and matrices (issue 15): max, min, sum,
// and the matrix and vector norms behind norm(M, kind).

func init() {
	quick := func(name, help, example string) *lang.Builtin {
		return &lang.Builtin{
			Name: name, Group: lang.GroupMatrices,
			Params: []lang.Param{{Name: "values", Variadic: true, Doc: "numbers, vectors, matrices or lists of them"}},
			Help:   help,
			Doc: "Every entry of every argument counts: max([1, 5], 3) is 5. A nan among them makes the answer nan " +
				"(a quick check should not hide one).",
			Examples: []string{example},
			Fn: func(c *lang.Call) (any, error) {
				var re []float64
				var all []complex128
				complexSeen := false
				for i, v := range c.Rest {
					n := len(all)
					if !flatten(v, &all) {
						return nil, c.ErrorAt(c.RestPos[i], "Give numbers, vectors or matrices.", "%s: argument %d is %s, not a number or a matrix", name, i+1, c.TypeName(v))
					}
					for _, x := range all[n:] {
						if imag(x) != 0 {
							complexSeen = true
						}
					}
				}
				if len(all) == 0 {
					return nil, c.Errorf("", "Give at least one number: "+name+"([3, 1, 2]).", "%s: no values given", name)
				}
				if name == "sum" {
					var s complex128
					for _, x := range all {
						s += x
					}
					if imag(s) == 0 && !complexSeen {
						return real(s), nil
					}
					return s, nil
				}
				if complexSeen {
					return nil, c.Errorf("", "Compare moduli or real parts: "+name+"(abs(v)) or "+name+"(real(v)).",
						"%s: complex numbers have no order", name)
				}
				for _, x := range all {
					re = append(re, real(x))
				}
				best := re[0]
				for _, x := range re {
					switch {
					case math.IsNaN(x):
						return math.NaN(), nil
					case name == "max" && x > best, name == "min" && x < best:
						best = x
					}
				}
				return best, nil
			},
		}
	}
	register(
		quick("max", "The largest entry of the numbers, vectors and matrices given.", "max([3, -1, 7], 2)\nmax(real(poles(1/(s^2 + 0.4*s + 4))))"),
		quick("min", "The smallest entry of the numbers, vectors and matrices given.", "min([[1, 2], [-3, 4]])"),
		quick("sum", "The sum of every entry of the numbers, vectors and matrices given.", "sum([1, 2, 3])\nsum(identity(3))"),
	)
}

// flatten appends the entries of v (row by row) to out; false if v holds
// something that is not a number.
func flatten(v any, out *[]complex128) bool {
	switch x := v.(type) {
	case float64:
		*out = append(*out, complex(x, 0))
	case complex128:
		*out = append(*out, x)
	case *mat.Dense:
		r, c := x.Dims()
		for i := 0; i < r; i++ {
			for j := 0; j < c; j++ {
				*out = append(*out, complex(x.At(i, j), 0))
			}
		}
	case *mat.CDense:
		r, c := x.Dims()
		for i := 0; i < r; i++ {
			for j := 0; j < c; j++ {
				*out = append(*out, x.At(i, j))
			}
		}
	case *lang.List:
		for _, it := range x.Items {
			if !flatten(it, out) {
				return false
			}
		}
	default:
		return false
	}
	return true
}

// matrixNorm is norm(M, kind) of a number, vector or matrix: ok is false
// when the first argument is not one (then norm is a system norm).
func matrixNorm(c *lang.Call) (any, bool, error) {
	var r, cc int
	var at func(i, j int) complex128
	switch m := c.Value("system").(type) {
	case float64:
		r, cc, at = 1, 1, func(int, int) complex128 { return complex(m, 0) }
	case complex128:
		r, cc, at = 1, 1, func(int, int) complex128 { return m }
	case *mat.Dense:
		r, cc = m.Dims()
		at = func(i, j int) complex128 { return complex(m.At(i, j), 0) }
	case *mat.CDense:
		r, cc = m.Dims()
		at = m.At
	default:
		return nil, false, nil
	}
	kind := ""
	switch k := c.Value("kind").(type) {
	case float64:
		switch {
		case k == 1 || k == 2:
			kind = lang.FormatNumber(k)
		case math.IsInf(k, 1):
			kind = "inf"
		}
	case string:
		if strings.ToLower(k) == "fro" {
			kind = "fro"
		}
	}
	if kind == "" {
		return nil, true, c.Errorf("kind", `Write norm(M, 1), norm(M, 2), norm(M, inf) or norm(M, "fro").`, "norm: the kind of a matrix norm must be 1, 2, inf or \"fro\", not %s", c.Format(c.Value("kind")))
	}
	v, err := lsys.MatrixNorm(r, cc, at, kind)
	if err != nil {
		return nil, true, err
	}
	if cmplx.IsNaN(complex(v, 0)) {
		return math.NaN(), true, nil
	}
	return v, true, nil
}
