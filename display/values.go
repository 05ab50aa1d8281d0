package display

import (
	"fmt"
	"html"
	"strconv"
	"strings"

	"gonum.org/v1/gonum/mat"

	"lsys/lsys"
	"lsys/lsys/numfmt"
)

// Plain values: numbers, booleans, strings, real and complex matrices. The
// text form shows up to 10 significant digits (as the language's print
// does); the HTML and LaTeX forms show 6, for reading; JSON keeps full
// precision.
func init() {
	Register(float64(0), func(v any, _ Options) Bundle {
		x := v.(float64)
		b := NewBundle(numfmt.Digits(x, 10))
		b.Data[JSON] = map[string]any{"value": jsonNum(x)}
		return b
	})
	Register(complex128(0), func(v any, _ Options) Bundle {
		z := v.(complex128)
		b := NewBundle(numfmt.ComplexDigits(z, 10))
		b.Data[JSON] = map[string]any{"re": jsonNum(real(z)), "im": jsonNum(imag(z))}
		return b
	})
	Register(false, func(v any, _ Options) Bundle { return NewBundle(strconv.FormatBool(v.(bool))) })
	Register("", func(v any, _ Options) Bundle { return NewBundle(v.(string)) })
	Register((*mat.Dense)(nil), func(v any, _ Options) Bundle {
		a := v.(*mat.Dense)
		r, c := a.Dims()
		return matrixBundle(r, c, func(i, j int) complex128 { return complex(a.At(i, j), 0) }, false)
	})
	Register((*mat.CDense)(nil), func(v any, _ Options) Bundle {
		a := v.(*mat.CDense)
		r, c := a.Dims()
		return matrixBundle(r, c, a.At, true)
	})
}

func matrixBundle(r, c int, at func(i, j int) complex128, isComplex bool) Bundle {
	kind := "matrix"
	switch {
	case c == 1:
		kind = "column vector"
	case r == 1:
		kind = "row vector"
	}
	if isComplex {
		kind = "complex " + kind
	}
	title := fmt.Sprintf("%dx%d %s", r, c, kind)
	if r > MaxListed || c > MaxListed {
		return largeMatrixBundle(r, c, at, isComplex, title)
	}

	// text/plain: right-aligned columns.
	cells := make([][]string, r)
	for i := range cells {
		cells[i] = make([]string, c)
		for j := range cells[i] {
			cells[i][j] = numfmt.ComplexDigits(at(i, j), 10)
		}
	}
	var t strings.Builder
	t.WriteString(title + "\n")
	writeColumns(&t, cells, "  ", 0)

	// text/html: our matrix table, rows and columns numbered.
	var h strings.Builder
	htmlMatrix(&h, kind, fmt.Sprintf("%dx%d", r, c), numbered(r), numbered(c), func(i, j int) (string, bool) {
		z := at(i, j)
		return numfmt.ComplexDigits(z, 6), z == 0
	})

	// text/latex: a bracketed matrix, exponents written as powers of ten.
	var l strings.Builder
	l.WriteString(`$$\begin{bmatrix}`)
	for i := 0; i < r; i++ {
		if i > 0 {
			l.WriteString(` \\ `)
		}
		for j := 0; j < c; j++ {
			if j > 0 {
				l.WriteString(` & `)
			}
			l.WriteString(valLatex(numfmt.ComplexDigits(at(i, j), 6)))
		}
	}
	l.WriteString(`\end{bmatrix}$$`)

	// application/json: rows of numbers ([re, im] pairs when complex).
	rows := make([]any, r)
	for i := range rows {
		row := make([]any, c)
		for j := range row {
			z := at(i, j)
			if isComplex {
				row[j] = []any{jsonNum(real(z)), jsonNum(imag(z))}
			} else {
				row[j] = jsonNum(real(z))
			}
		}
		rows[i] = row
	}
	b := NewBundle(strings.TrimSuffix(t.String(), "\n"))
	b.Data[HTML] = h.String()
	b.Data[LaTeX] = l.String()
	b.Data[JSON] = map[string]any{"rows": r, "cols": c, "complex": isComplex, "data": rows}
	return b
}

// valLatex turns 1.5e-07 into 1.5\cdot 10^{-7} and j into \mathrm{j}.
func valLatex(s string) string {
	var out []string
	for _, part := range strings.Fields(s) {
		if strings.HasSuffix(part, "j") {
			part = latexNum(strings.TrimSuffix(part, "j")) + `\,\mathrm{j}`
		} else if part != "+" && part != "-" {
			part = latexNum(part)
		}
		out = append(out, part)
	}
	return strings.Join(out, " ")
}

// MaxListed is the most rows or columns a matrix shows entry by entry;
// beyond it (a 1000 x 1000 identity would be about 100 MB of HTML) the
// display gives its size, a summary and its four corners.
const MaxListed = 50

// cornerSize is the side of each corner block shown of a large matrix.
const cornerSize = 4

func largeMatrixBundle(r, c int, at func(i, j int) complex128, isComplex bool, title string) Bundle {
	s := lsys.Summarize(r, c, at)
	facts := []string{
		fmt.Sprintf("%d of %d entries nonzero", s.Nonzeros, r*c),
		"Frobenius norm " + fmtNum(s.Norm),
		fmt.Sprintf("largest entry %s at [%d, %d]", fmtNum(s.Largest), s.LargestRow+1, s.LargestCol+1),
	}
	if s.Symmetric {
		facts = append(facts, map[bool]string{true: "Hermitian", false: "symmetric"}[isComplex])
	}
	if s.HasRank {
		facts = append(facts, fmt.Sprintf("rank %d (singular values above %s)", s.Rank, fmtNum(s.RankTol)), "condition number "+fmtNum(s.Cond))
	} else {
		facts = append(facts, fmt.Sprintf("rank and condition not computed above %d on the shorter side", lsys.SummaryRankLimit))
	}
	ask := "too large to list; ask for a part by slicing, e.g. M[1:10, 1:10]"
	// The corners: rows and columns 1..k and the last k.
	idx := func(n int) []int {
		if n <= 2*cornerSize {
			out := make([]int, n)
			for i := range out {
				out[i] = i
			}
			return out
		}
		out := []int{}
		for i := 0; i < cornerSize; i++ {
			out = append(out, i)
		}
		out = append(out, -1) // the gap
		for i := n - cornerSize; i < n; i++ {
			out = append(out, i)
		}
		return out
	}
	ri, ci := idx(r), idx(c)
	cells := make([][]string, 0, len(ri)+1)
	head := []string{""}
	for _, j := range ci {
		if j < 0 {
			head = append(head, "...")
		} else {
			head = append(head, strconv.Itoa(j+1))
		}
	}
	cells = append(cells, head)
	for _, i := range ri {
		row := []string{"..."}
		if i >= 0 {
			row[0] = strconv.Itoa(i + 1)
		}
		for _, j := range ci {
			switch {
			case i < 0 || j < 0:
				row = append(row, "...")
			default:
				row = append(row, numfmt.ComplexDigits(at(i, j), 6))
			}
		}
		cells = append(cells, row)
	}
	var t strings.Builder
	t.WriteString(title + ": " + ask + "\n  " + strings.Join(facts, "; ") + "\n")
	writeColumns(&t, cells, "  ", 0)
	var h strings.Builder
	fmt.Fprintf(&h, "<div class=\"lsys-matrix-summary\"><div><b>%s</b>: %s</div><div style=\"color:#555\">%s</div><table style=\"border-collapse:collapse;font-family:monospace\">",
		html.EscapeString(title), html.EscapeString(ask), html.EscapeString(strings.Join(facts, "; ")))
	for k, row := range cells {
		h.WriteString("<tr>")
		for j, cell := range row {
			style := "padding:1px 6px;text-align:right"
			if k == 0 || j == 0 {
				style += ";color:#777"
			}
			fmt.Fprintf(&h, "<td style=\"%s\">%s</td>", style, html.EscapeString(cell))
		}
		h.WriteString("</tr>")
	}
	h.WriteString("</table></div>")
	summary := map[string]any{
		"nonzeros": s.Nonzeros, "norm": jsonNum(s.Norm), "largest": jsonNum(s.Largest),
		"largest_at": []any{s.LargestRow + 1, s.LargestCol + 1}, "symmetric": s.Symmetric,
	}
	if s.HasRank {
		summary["rank"], summary["cond"], summary["rank_tol"] = s.Rank, jsonNum(s.Cond), jsonNum(s.RankTol)
	}
	b := NewBundle(strings.TrimSuffix(t.String(), "\n"))
	b.Data[HTML] = h.String()
	b.Data[JSON] = map[string]any{"rows": r, "cols": c, "complex": isComplex, "summary": summary, "listed": false}
	return b
}
