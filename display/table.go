package display

// The shared pieces every renderer builds on: number formatting, text
// tables, HTML cards and tables in our style, JSON-safe numbers. One set,
// so that a mode table, a system card and a margins table read alike.

import (
	"fmt"
	"html"
	"math"
	"strconv"
	"strings"

	"lsys/lsys/numfmt"
)

// fmtNum formats a real number for tables: four significant digits, plain
// notation for moderate magnitudes, exponent notation otherwise, no "-0".
func fmtNum(v float64) string {
	if math.IsNaN(v) {
		return "n/a"
	}
	return numfmt.Short(v)
}

// fmtComplex formats an eigenvalue or zero in table style; pair == true
// writes the conjugate pair as "a ± bj".
func fmtComplex(z complex128, pair bool) string {
	re, im := real(z), imag(z)
	if pair {
		return fmtNum(re) + " ± " + fmtNum(math.Abs(im)) + "j"
	}
	if im == 0 {
		return fmtNum(re)
	}
	sign := " + "
	if im < 0 {
		sign = " - "
	}
	return fmtNum(re) + sign + fmtNum(math.Abs(im)) + "j"
}

// latexNum turns a formatted number such as 1.5e-07 into 1.5\cdot 10^{-7}.
func latexNum(s string) string {
	if i := strings.IndexByte(s, 'e'); i >= 0 {
		if exp, err := strconv.Atoi(s[i+1:]); err == nil {
			return s[:i] + `\cdot 10^{` + strconv.Itoa(exp) + `}`
		}
	}
	return s
}

// jsonNum keeps JSON valid: NaN and infinities, which JSON cannot carry,
// become the strings "nan", "inf" and "-inf".
func jsonNum(v float64) any {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return numfmt.Digits(v, 1)
	}
	return v
}

func jsonNums(v []float64) []any {
	out := make([]any, len(v))
	for i, x := range v {
		out[i] = jsonNum(x)
	}
	return out
}

// jsonComplex is [re, im].
func jsonComplex(z complex128) []any {
	return []any{jsonNum(real(z)), jsonNum(imag(z))}
}

func plural(n int, one, many string) string {
	if n == 1 {
		return one
	}
	return many
}

// count is e.g. "1 state" or "3 states".
func count(n int, one, many string) string {
	return fmt.Sprintf("%d %s", n, plural(n, one, many))
}

func choose(ok bool, yes, no string) string {
	if ok {
		return yes
	}
	return no
}

// writeColumns lays out a grid of cells as text: columns before rightFrom
// are left-aligned, the others right-aligned; columns are two spaces
// apart, every line starts with indent and ends in a newline, trailing
// blanks trimmed.
func writeColumns(b *strings.Builder, cells [][]string, indent string, rightFrom int) {
	b.WriteString(numfmt.Columns(cells, indent, rightFrom))
}

// textTable is a titled text table with a header row, all columns
// left-aligned, without a final newline.
func textTable(title string, head []string, rows [][]string) string {
	var b strings.Builder
	b.WriteString(title + "\n")
	writeColumns(&b, append([][]string{head}, rows...), "", len(head))
	return strings.TrimRight(b.String(), "\n")
}

// Our HTML look: a card with a thin frame and a bold title line; tables
// inside it with grey labels and monospace numbers.
const (
	cardStyle   = `style="border:1px solid #bbb;border-radius:4px;padding:6px 10px;margin:2px 0;font-family:sans-serif;font-size:13px;display:inline-block"`
	matrixStyle = `style="border-collapse:collapse;margin:4px 12px 4px 0;display:inline-table;vertical-align:top"`
	thStyle     = `style="padding:2px 6px;border-bottom:1px solid #999;text-align:right;font-weight:normal;color:#333"`
	thLeftStyle = `style="padding:2px 6px;border-bottom:1px solid #999;text-align:left;font-weight:normal;color:#333"`
	tdNumStyle  = "padding:2px 6px;text-align:right;font-family:monospace"
	tdTextStyle = "padding:2px 6px;text-align:left"
)

// htmlCard opens a card (close it with "</div>").
func htmlCard(h *strings.Builder, class, title string) {
	fmt.Fprintf(h, "<div class=\"%s\" %s>", class, cardStyle)
	fmt.Fprintf(h, "<div style=\"font-weight:bold;margin-bottom:4px\">%s</div>", html.EscapeString(title))
}

// htmlSection is a small bold heading inside a card.
func htmlSection(h *strings.Builder, title string) {
	fmt.Fprintf(h, "<div style=\"font-weight:bold;margin:6px 0 2px 0\">%s</div>", html.EscapeString(title))
}

// note writes a remark under a table, as text and HTML.
func note(t, h *strings.Builder, s string) {
	if s == "" {
		return
	}
	fmt.Fprintf(t, "  %s\n", s)
	htmlNote(h, s)
}

func htmlNote(h *strings.Builder, s string) {
	fmt.Fprintf(h, "<div style=\"color:#555;margin-top:4px;max-width:60em\">%s</div>", html.EscapeString(s))
}

// keyTable renders rows of (key, value) as an indented text block and an
// HTML table.
func keyTable(t, h *strings.Builder, rows [][2]string) {
	cells := make([][]string, len(rows))
	for i, r := range rows {
		cells[i] = []string{r[0], r[1]}
	}
	writeColumns(t, cells, "  ", 2)
	h.WriteString("<table style=\"border-collapse:collapse\">")
	for _, r := range rows {
		fmt.Fprintf(h, "<tr><td style=\"padding:1px 10px 1px 0;color:#555;vertical-align:top\">%s</td><td style=\"padding:1px 0;font-family:monospace\">%s</td></tr>", html.EscapeString(r[0]), html.EscapeString(r[1]))
	}
	h.WriteString("</table>")
}

// gridTable renders a header and rows as indented text columns and an
// HTML table: the first left columns (names) left-aligned, the rest
// (numbers) right-aligned in monospace.
func gridTable(t, h *strings.Builder, head []string, rows [][]string, left int) {
	writeColumns(t, append([][]string{head}, rows...), "  ", max(left, 1))
	htmlGrid(h, head, rows, left)
}

// htmlGrid is the HTML half of gridTable.
func htmlGrid(h *strings.Builder, head []string, rows [][]string, left int) {
	h.WriteString("<table style=\"border-collapse:collapse\"><tr>")
	for j, c := range head {
		h.WriteString("<th " + choose(j < left, thLeftStyle, thStyle) + ">" + html.EscapeString(c) + "</th>")
	}
	h.WriteString("</tr>")
	for _, r := range rows {
		h.WriteString("<tr>")
		for j, c := range r {
			fmt.Fprintf(h, "<td style=\"%s\">%s</td>", choose(j < left, tdTextStyle, tdNumStyle), html.EscapeString(c))
		}
		h.WriteString("</tr>")
	}
	h.WriteString("</table>")
}

// htmlTableCard is a card holding one grid table and its notes.
func htmlTableCard(class, title string, head []string, rows [][]string, left int, notes ...string) string {
	var h strings.Builder
	htmlCard(&h, class, title)
	htmlGrid(&h, head, rows, left)
	for _, n := range notes {
		if n != "" {
			htmlNote(&h, n)
		}
	}
	h.WriteString("</div>")
	return h.String()
}

// card builds a display as text and as an HTML card side by side: helpers
// write to both through t and h; bundle closes the card.
type card struct{ t, h strings.Builder }

func newCard(class, title string) *card {
	c := &card{}
	c.t.WriteString(title + "\n")
	htmlCard(&c.h, class, title)
	return c
}

func (c *card) bundle() Bundle {
	c.h.WriteString("</div>")
	b := NewBundle(c.t.String())
	b.Data[HTML] = c.h.String()
	return b
}

// joinList writes a list as "a, b, c", or "none" when it is empty.
func joinList[T any](v []T, f func(T) string) string {
	if len(v) == 0 {
		return "none"
	}
	parts := make([]string, len(v))
	for i, x := range v {
		parts[i] = f(x)
	}
	return strings.Join(parts, ", ")
}

// htmlMatrix writes a matrix as an HTML table: a bold name and its size in
// grey as the caption, row and column labels in grey, numbers right-aligned
// in monospace, exact zeros lighter. at gives the text of an entry and
// whether it is zero.
func htmlMatrix(b *strings.Builder, name, size string, rows, cols []string, at func(i, j int) (string, bool)) {
	fmt.Fprintf(b, "<table %s><caption style=\"text-align:left;font-weight:bold\">%s <span style=\"font-weight:normal;color:#555\">%s</span></caption>", matrixStyle, html.EscapeString(name), html.EscapeString(size))
	if len(rows) == 0 || len(cols) == 0 {
		b.WriteString("<tr><td style=\"color:#555\">(empty)</td></tr></table>")
		return
	}
	b.WriteString("<tr><th></th>")
	for _, c := range cols {
		fmt.Fprintf(b, "<th style=\"padding:1px 6px;color:#555;font-weight:normal;text-align:right\">%s</th>", html.EscapeString(c))
	}
	b.WriteString("</tr>")
	for i, r := range rows {
		fmt.Fprintf(b, "<tr><th style=\"padding:1px 6px;color:#555;font-weight:normal;text-align:left\">%s</th>", html.EscapeString(r))
		for j := range cols {
			s, zero := at(i, j)
			color := ""
			if zero {
				color = "color:#aaa;"
			}
			fmt.Fprintf(b, "<td style=\"padding:1px 6px;text-align:right;font-family:monospace;%s\">%s</td>", color, html.EscapeString(s))
		}
		b.WriteString("</tr>")
	}
	b.WriteString("</table>")
}

// numbered is "1", "2", ... "n": labels for plain matrices.
func numbered(n int) []string {
	out := make([]string, n)
	for i := range out {
		out[i] = strconv.Itoa(i + 1)
	}
	return out
}
