package display

import (
	"fmt"
	"strings"

	"lsys/lsys"
	"lsys/lsys/numfmt"
)

func init() {
	Register((*lsys.JordanForm)(nil), renderJordanForm)
}

// renderJordanForm shows J and T (real when every eigenvalue is), the
// blocks, T's condition number, the residual and the warning.
func renderJordanForm(v any, opt Options) Bundle {
	jf := v.(*lsys.JordanForm)
	n, _ := jf.J.Dims()
	var blocks []string
	for i, b := range jf.BlockSizes {
		blocks = append(blocks, fmt.Sprintf("%d at %s", b, numfmt.ComplexDigits(jf.BlockValues[i], 6)))
	}
	head := fmt.Sprintf("Jordan form A = T J T^-1 (%d states): blocks %s", n, strings.Join(blocks, ", "))
	facts := fmt.Sprintf("condition number of T %s; residual ||A T - T J||/(||A|| ||T||) %s", fmtNum(jf.Cond), fmtNum(jf.Residual))
	matrix := func(m func(i, j int) complex128) Bundle { return matrixBundle(n, n, m, !jf.Real) }
	re := func(at func(i, j int) complex128) func(i, j int) complex128 {
		if !jf.Real {
			return at
		}
		return func(i, j int) complex128 { return complex(real(at(i, j)), 0) }
	}
	J, T := matrix(re(jf.J.At)), matrix(re(jf.T.At))
	text := head + "\nJ: " + J.Data[Text].(string) + "\nT: " + T.Data[Text].(string) + "\n" + facts
	if jf.Warning != "" {
		text += "\nwarning: " + jf.Warning
	}
	var h strings.Builder
	htmlCard(&h, "lsys-structure", "Jordan form A = T J T⁻¹")
	htmlNote(&h, "blocks "+strings.Join(blocks, ", "))
	htmlSection(&h, "J")
	h.WriteString(J.Data[HTML].(string))
	htmlSection(&h, "T (columns: the Jordan chains, eigenvector first)")
	h.WriteString(T.Data[HTML].(string))
	htmlNote(&h, facts)
	if jf.Warning != "" {
		htmlNote(&h, "warning: "+jf.Warning)
	}
	h.WriteString("</div>")
	b := NewBundle(text)
	b.Data[HTML] = h.String()
	b.Data[JSON] = map[string]any{"J": J.Data[JSON], "T": T.Data[JSON], "cond_T": jsonNum(jf.Cond), "residual": jsonNum(jf.Residual), "warning": jf.Warning, "block_sizes": jf.BlockSizes}
	return b
}
