package builtins

import (
	"gonum.org/v1/gonum/mat"

	"lsys/lang"
	"lsys/lsys"
)

func init() {
	registerType((*lsys.JordanForm)(nil), lang.TypeInfo{Name: "a Jordan form", Fields: []lang.Field{
		lang.FieldOf("J", "the Jordan matrix: eigenvalues on the diagonal, 1 above it within a block", func(f *lsys.JordanForm) any { return formMatrix(f, f.J.At) }),
		lang.FieldOf("T", "the transformation, A = T J T^-1; its columns are the Jordan chains, eigenvector first", func(f *lsys.JordanForm) any { return formMatrix(f, f.T.At) }),
		lang.FieldOf("cond", "the condition number of T: computing with T loses about log10(cond) digits", func(f *lsys.JordanForm) any { return f.Cond }),
		lang.FieldOf("residual", "||A T - T J||/(||A|| ||T||)", func(f *lsys.JordanForm) any { return f.Residual }),
		lang.FieldOf("structure", "the Jordan structure with its tolerances (as jordan gives it)", func(f *lsys.JordanForm) any { return f.Structure }),
	}})
	register(&lang.Builtin{
		Name: "jordanform", Group: lang.GroupAnalysis,
		Returns: (*lsys.JordanForm)(nil),
		Params: []lang.Param{
			{Name: "M", Doc: "a square matrix, or a system (its A)"},
			{Name: "cluster", Optional: true, Doc: "also treat eigenvalues closer than this (absolute) as one"},
			stTolParam,
		},
		Help: "The Jordan form itself: J and the transformation T with A = T J T^-1, the condition number of T and a warning when it is large.",
		Doc: "The block sizes are those of jordan(M) (same tolerances); the chains v, (A - lambda I) v, ... are built from the null spaces of the powers of " +
			"(A - lambda I) with the dimensions those sizes imply (Golub & Wilkinson 1976). J and T are complex when an eigenvalue is. " +
			"The Jordan form is not continuous in A: a defective eigenvalue's blocks are a numerical judgement and its T is ill conditioned by nature, " +
			"so use it to understand a model, and modes or the modal form to compute with it. At most 200 states.",
		Examples: []string{"jordanform([[-1, 1, 0], [0, -1, 0], [0, 0, -2]])", "F = jordanform([[2, 1], [-1, 4]])\nF.T * F.J * inverse(F.T)"},
		Fn: func(c *lang.Call) (any, error) {
			A, abs, tol, err := jordanArgs(c)
			if err != nil {
				return nil, err
			}
			return lsys.JordanFormOf(A, abs, tol)
		},
	})
}

// formMatrix hands out J or T: real when every eigenvalue is real.
func formMatrix(f *lsys.JordanForm, at func(i, j int) complex128) any {
	n, _ := f.J.Dims()
	if f.Real {
		m := make([]float64, n*n)
		for i := 0; i < n; i++ {
			for j := 0; j < n; j++ {
				m[i*n+j] = real(at(i, j))
			}
		}
		return mat.NewDense(n, n, m)
	}
	out := mat.NewCDense(n, n, nil)
	for i := 0; i < n; i++ {
		for j := 0; j < n; j++ {
			out.Set(i, j, at(i, j))
		}
	}
	return out
}
