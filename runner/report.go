package runner

import (
	"crypto/sha256"
	"encoding/base64"
	"encoding/hex"
	"fmt"
	"html"
	"regexp"
	"strings"

	"lsys/lang"
)

// ReportInfo is what a report's header states besides the notebook.
type ReportInfo struct {
	Title   string // shown when the notebook has no heading; usually the file name
	Version string // the lsys version that ran it
	Digest  string // of the inputs (see Digest)
}

// Digest is a digest of a run's inputs: every cell's kind and text, and
// the --set overrides, so two reports with the same digest were made from
// the same inputs. It contains no date: same inputs, same bytes.
func Digest(nb *Notebook, set []string) string {
	h := sha256.New()
	for _, c := range nb.Cells() {
		if c.HasTag(InjectedTag) {
			continue // its text is the --set values, counted below
		}
		fmt.Fprintf(h, "%s %d\n%s\n", c.Type(), len(c.Source()), c.Source())
	}
	for _, s := range set {
		fmt.Fprintf(h, "set %d\n%s\n", len(s), s)
	}
	return "sha256:" + hex.EncodeToString(h.Sum(nil))
}

// Report writes a standalone HTML page of a run notebook: styles inline,
// charts embedded as data, no external asset, code highlighted, equations
// as readable text, laid out to print on A4 and Letter.
func Report(nb *Notebook, res *Result, info ReportInfo) []byte {
	var b strings.Builder
	title := info.Title
	for _, c := range nb.Cells() {
		if c.Type() == "markdown" {
			if m := h1RE.FindStringSubmatch(c.Source()); m != nil {
				title = strings.TrimSpace(m[1])
				break
			}
		}
	}
	b.WriteString("<!DOCTYPE html>\n<html lang=\"en\">\n<head>\n<meta charset=\"utf-8\">\n")
	b.WriteString("<meta name=\"viewport\" content=\"width=device-width, initial-scale=1\">\n")
	fmt.Fprintf(&b, "<meta name=\"generator\" content=\"lsys %s\">\n", html.EscapeString(info.Version))
	fmt.Fprintf(&b, "<title>%s</title>\n<style>%s%s</style>\n</head>\n<body>\n", html.EscapeString(title), reportCSS, lang.TokenCSS(""))
	b.WriteString("<header class=\"run\">\n")
	fmt.Fprintf(&b, "<div>Report by <b>lsys %s</b> (lsys run) &middot; inputs %s</div>\n", html.EscapeString(info.Version), html.EscapeString(info.Digest))
	if res != nil && len(res.Params) > 0 {
		b.WriteString("<table class=\"params\"><caption>Parameters used</caption>\n")
		for _, p := range res.Params {
			note := "as in the notebook"
			if p.Set {
				note = "set on the command line"
			}
			fmt.Fprintf(&b, "<tr><th>%s</th><td><code>%s</code></td><td class=\"note\">%s</td></tr>\n",
				html.EscapeString(p.Name), html.EscapeString(p.Value), note)
		}
		b.WriteString("</table>\n")
	}
	if res != nil && len(res.Failures) > 0 {
		b.WriteString("<div class=\"failed\"><b>This run failed.</b><ul>\n")
		for _, f := range res.Failures {
			fmt.Fprintf(&b, "<li><a href=\"#cell-%d\">%s</a></li>\n", f.Cell+1, html.EscapeString(f.String()))
		}
		b.WriteString("</ul></div>\n")
	}
	b.WriteString("</header>\n<main>\n")
	for i, c := range nb.Cells() {
		switch c.Type() {
		case "markdown":
			fmt.Fprintf(&b, "<section class=\"md\" id=\"cell-%d\">\n%s</section>\n", i+1, markdown(c.Source()))
		case "code":
			fmt.Fprintf(&b, "<section class=\"cell\" id=\"cell-%d\">\n", i+1)
			label := "&nbsp;"
			if n := c.ExecutionCount(); n > 0 {
				label = fmt.Sprintf("[%d]", n)
			}
			if c.HasTag(InjectedTag) {
				label += "<br><small>set</small>"
			}
			fmt.Fprintf(&b, "<div class=\"in\"><div class=\"n\">%s</div><pre class=\"code\">%s</pre></div>\n", label, highlight(c.Source()))
			if res != nil && res.NotRun[i] {
				b.WriteString("<div class=\"out notrun\">not run: an earlier cell failed</div>\n")
			}
			for _, o := range c.Outputs() {
				b.WriteString(renderOutput(o))
			}
			b.WriteString("</section>\n")
		default:
			fmt.Fprintf(&b, "<section class=\"raw\" id=\"cell-%d\"><pre>%s</pre></section>\n", i+1, html.EscapeString(c.Source()))
		}
	}
	b.WriteString("</main>\n<footer>Results describe models. Validate them against tests of the real system; where people or property are at stake, design and approval follow local codes and licensed engineering practice.</footer>\n</body>\n</html>\n")
	return []byte(b.String())
}

var h1RE = regexp.MustCompile(`(?m)^#\s+(.+)$`)

// renderOutput picks the richest representation a report can show without
// a script or a network: HTML, then SVG, then PNG, then text; LaTeX only
// when nothing else exists, as its source text.
func renderOutput(o map[string]any) string {
	switch o["output_type"] {
	case "stream":
		name, _ := o["name"].(string)
		text, _ := o["text"].(string)
		return fmt.Sprintf("<pre class=\"out %s\">%s</pre>\n", html.EscapeString(name), html.EscapeString(text))
	case "error":
		var lines []string
		if tb, ok := o["traceback"].([]any); ok {
			for _, l := range tb {
				s, _ := l.(string)
				lines = append(lines, s)
			}
		}
		return fmt.Sprintf("<pre class=\"out error\">%s</pre>\n", html.EscapeString(strings.Join(lines, "\n")))
	case "execute_result", "display_data":
		data, _ := o["data"].(map[string]any)
		if s, ok := data["text/html"].(string); ok {
			return "<div class=\"out html\">" + plainMath(s) + "</div>\n"
		}
		if s, ok := data["image/svg+xml"].(string); ok {
			return "<div class=\"out\"><img alt=\"chart\" src=\"data:image/svg+xml;base64," + base64.StdEncoding.EncodeToString([]byte(s)) + "\"></div>\n"
		}
		if s, ok := data["image/png"].(string); ok {
			return "<div class=\"out\"><img alt=\"chart\" src=\"data:image/png;base64," + strings.TrimSpace(s) + "\"></div>\n"
		}
		if s, ok := data["text/plain"].(string); ok {
			return "<pre class=\"out\">" + html.EscapeString(s) + "</pre>\n"
		}
		if s, ok := data["text/latex"].(string); ok {
			return "<pre class=\"out tex\">" + html.EscapeString(s) + "</pre>\n"
		}
	}
	return ""
}

var displayMathRE = regexp.MustCompile(`(?s)\$\$(.+?)\$\$`)

// plainMath shows the display equations inside HTML outputs (which a
// notebook typesets with a script) as their source in a quiet box: the
// report runs no script, and the tables beside them carry the numbers.
func plainMath(s string) string {
	return displayMathRE.ReplaceAllString(s, `<code class="tex" title="equation, in LaTeX notation">$1</code>`)
}

const reportCSS = `
:root { --ink: #1a1a1a; --muted: #5a5a5a; --rule: #d0d0d0; --code-bg: #f6f6f4; }
html { font-family: "DejaVu Sans", "Helvetica Neue", Arial, sans-serif; font-size: 14px; color: var(--ink); }
body { max-width: 1040px; margin: 0 auto; padding: 1rem 1.5rem 3rem; line-height: 1.45; }
section.md { max-width: 60rem; } /* prose at a reading width; outputs get the 960 px charts and diagrams are drawn for */
header.run { border-bottom: 2px solid var(--ink); padding-bottom: .5rem; margin-bottom: 1rem; font-size: 12px; color: var(--muted); }
header.run b { color: var(--ink); }
table.params { border-collapse: collapse; margin: .5rem 0; font-size: 13px; color: var(--ink); }
table.params caption { text-align: left; font-weight: bold; }
table.params th, table.params td { padding: 1px 10px 1px 0; text-align: left; vertical-align: top; }
table.params td.note { color: var(--muted); }
.failed { border: 2px solid #b00020; padding: .3rem .8rem; margin: .5rem 0; color: #b00020; }
h1 { font-size: 1.7rem; margin: .6rem 0; } h2 { font-size: 1.3rem; margin: 1.2rem 0 .4rem; } h3 { font-size: 1.1rem; }
section.cell { margin: .8rem 0; }
.in { display: flex; gap: .5rem; }
.in .n { flex: 0 0 2.6rem; text-align: right; color: var(--muted); font: 12px/1.6 "DejaVu Sans Mono", Menlo, Consolas, monospace; }
pre { font: 12px/1.4 "DejaVu Sans Mono", Menlo, Consolas, monospace; white-space: pre-wrap; overflow-wrap: anywhere; margin: 0; }
pre.code { flex: 1; background: var(--code-bg); border-left: 3px solid var(--rule); padding: .35rem .6rem; }
.out { margin: .35rem 0 .35rem 3.1rem; max-width: calc(100% - 3.1rem); overflow-x: auto; }
.out img { max-width: 100%; height: auto; }
pre.out.stderr { color: #8a4b00; }
pre.out.error { color: #b00020; border-left: 3px solid #b00020; padding-left: .5rem; }
.notrun { color: var(--muted); font-style: italic; }
code { font-family: "DejaVu Sans Mono", Menlo, Consolas, monospace; font-size: 92%; background: var(--code-bg); padding: 0 2px; }
code.tex { display: block; white-space: pre-wrap; font-size: 11px; color: var(--muted); padding: .3rem; }
footer { margin-top: 2rem; border-top: 1px solid var(--rule); padding-top: .5rem; font-size: 11px; color: var(--muted); }
@page { margin: 16mm 14mm; }
@media print {
  html { font-size: 10.5pt; }
  body { max-width: none; padding: 0; }
  pre { font-size: 8.5pt; }
  pre.code { background: none; border-left: 1.5pt solid #999; }
  section.cell, .out, table, img { break-inside: avoid; page-break-inside: avoid; }
  h1, h2, h3 { break-after: avoid; page-break-after: avoid; }
  .out { overflow: visible; }
  a { color: inherit; text-decoration: none; }
}
`

// Transcript is the plain-text form of a run notebook's code cells and
// outputs, for a terminal or a CI log.
func Transcript(nb *Notebook) string {
	var b strings.Builder
	for _, c := range nb.Cells() {
		if c.Type() != "code" || strings.TrimSpace(c.Source()) == "" {
			continue
		}
		fmt.Fprintf(&b, "[%d]: %s\n", c.ExecutionCount(), strings.ReplaceAll(strings.TrimRight(c.Source(), "\n"), "\n", "\n     "))
		for _, o := range c.Outputs() {
			switch o["output_type"] {
			case "stream":
				s, _ := o["text"].(string)
				b.WriteString(s)
			case "error":
				tb, _ := o["traceback"].([]any)
				for _, l := range tb {
					fmt.Fprintln(&b, l)
				}
			default:
				data, _ := o["data"].(map[string]any)
				s, _ := data["text/plain"].(string)
				b.WriteString(s + "\n")
			}
		}
		b.WriteString("\n")
	}
	return b.String()
}
