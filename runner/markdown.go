package runner

import (
	"html"
	"regexp"
	"strings"
	"unicode"

	"lsys/lang"
	"lsys/lang/builtins"
	"lsys/lang/syntax"
)

// markdown renders the Markdown that notebook prose uses: headings,
// paragraphs, bullet and numbered lists, block quotes, fenced code, rules,
// and inline code, bold, italics and links. It is small on purpose: a
// report must not depend on a converter elsewhere. Raw HTML is shown as
// text.
func markdown(src string) string {
	var b strings.Builder
	lines := strings.Split(strings.ReplaceAll(src, "\r\n", "\n"), "\n")
	var para []string
	var list string // "ul" or "ol" while a list is open
	flushPara := func() {
		if len(para) > 0 {
			b.WriteString("<p>" + inline(strings.Join(para, "\n")) + "</p>\n")
			para = nil
		}
	}
	closeList := func() {
		if list != "" {
			b.WriteString("</li></" + list + ">\n")
			list = ""
		}
	}
	for i := 0; i < len(lines); i++ {
		line := lines[i]
		trim := strings.TrimSpace(line)
		switch {
		case strings.HasPrefix(trim, "```"):
			flushPara()
			closeList()
			var code []string
			for i++; i < len(lines) && !strings.HasPrefix(strings.TrimSpace(lines[i]), "```"); i++ {
				code = append(code, lines[i])
			}
			b.WriteString("<pre class=\"code\">" + highlight(strings.Join(code, "\n")) + "</pre>\n")
		case trim == "":
			flushPara()
			// a blank line inside a list keeps it open only if an item follows
			if list != "" && (i+1 >= len(lines) || listItem(lines[i+1]) == "") {
				closeList()
			}
		case headingRE.MatchString(trim):
			flushPara()
			closeList()
			m := headingRE.FindStringSubmatch(trim)
			n := string(rune('0' + len(m[1])))
			b.WriteString("<h" + n + ">" + inline(m[2]) + "</h" + n + ">\n")
		case trim == "---" || trim == "***" || trim == "___":
			flushPara()
			closeList()
			b.WriteString("<hr>\n")
		case strings.HasPrefix(trim, ">"):
			flushPara()
			closeList()
			var q []string
			for ; i < len(lines) && strings.HasPrefix(strings.TrimSpace(lines[i]), ">"); i++ {
				q = append(q, strings.TrimPrefix(strings.TrimPrefix(strings.TrimSpace(lines[i]), ">"), " "))
			}
			i--
			b.WriteString("<blockquote>" + markdown(strings.Join(q, "\n")) + "</blockquote>\n")
		case listItem(line) != "":
			flushPara()
			kind := listItem(line)
			if list != kind {
				closeList()
				b.WriteString("<" + kind + ">\n<li>")
				list = kind
			} else {
				b.WriteString("</li>\n<li>")
			}
			b.WriteString(inline(listRE.ReplaceAllString(line, "")))
		case list != "" && (strings.HasPrefix(line, " ") || strings.HasPrefix(line, "\t")):
			b.WriteString("\n" + inline(trim)) // continuation of an item
		default:
			closeList()
			para = append(para, trim)
		}
	}
	flushPara()
	closeList()
	return b.String()
}

var (
	headingRE = regexp.MustCompile(`^(#{1,6})\s+(.*?)\s*#*$`)
	listRE    = regexp.MustCompile(`^\s*([-*+]|\d+[.)])\s+`)
	codeRE    = regexp.MustCompile("`([^`]+)`")
	boldRE    = regexp.MustCompile(`\*\*([^*]+)\*\*|__([^_]+)__`)
	italRE    = regexp.MustCompile(`\*([^*\s][^*]*)\*|\b_([^_\s][^_]*)_\b`)
	linkRE    = regexp.MustCompile(`\[([^\]]+)\]\(([^)\s]+)\)`)
)

func listItem(line string) string {
	m := listRE.FindStringSubmatch(line)
	if m == nil {
		return ""
	}
	if unicode.IsDigit(rune(m[1][0])) {
		return "ol"
	}
	return "ul"
}

// inline renders code spans, bold, italics and links in escaped text. Code
// spans are cut out first so that nothing inside them is interpreted.
func inline(s string) string {
	var spans []string
	s = codeRE.ReplaceAllStringFunc(s, func(m string) string {
		spans = append(spans, "<code>"+html.EscapeString(m[1:len(m)-1])+"</code>")
		return "\x00" + string(rune('a'+len(spans)-1)) + "\x00"
	})
	s = html.EscapeString(s)
	s = linkRE.ReplaceAllString(s, `<a href="$2">$1</a>`)
	s = boldRE.ReplaceAllString(s, "<b>$1$2</b>")
	s = italRE.ReplaceAllString(s, "<i>$1$2</i>")
	for i, sp := range spans {
		s = strings.Replace(s, "\x00"+string(rune('a'+i))+"\x00", sp, 1)
	}
	return s
}

// highlight marks keywords, built-in names, numbers, strings and comments
// of lsys code with classes the report's style colours.
func highlight(src string) string {
	var b strings.Builder
	rs := []rune(src)
	for i := 0; i < len(rs); {
		r := rs[i]
		switch {
		case r == '#':
			j := i
			for j < len(rs) && rs[j] != '\n' {
				j++
			}
			span(&b, lang.TokComment, string(rs[i:j]))
			i = j
		case r == '"':
			j := i + 1
			for j < len(rs) && rs[j] != '"' && rs[j] != '\n' {
				if rs[j] == '\\' {
					j++
				}
				j++
			}
			j = min(j+1, len(rs))
			span(&b, lang.TokString, string(rs[i:j]))
			i = j
		case unicode.IsDigit(r) || (r == '.' && i+1 < len(rs) && unicode.IsDigit(rs[i+1])):
			j := i
			for j < len(rs) && (unicode.IsDigit(rs[j]) || rs[j] == '.' || rs[j] == '_' || rs[j] == 'e' || rs[j] == 'E' ||
				((rs[j] == '-' || rs[j] == '+') && (rs[j-1] == 'e' || rs[j-1] == 'E'))) {
				j++
			}
			if j < len(rs) && rs[j] == 'j' {
				j++
			}
			span(&b, lang.TokNumber, string(rs[i:j]))
			i = j
		case unicode.IsLetter(r) || r == '_':
			j := i
			for j < len(rs) && (unicode.IsLetter(rs[j]) || unicode.IsDigit(rs[j]) || rs[j] == '_') {
				j++
			}
			word := string(rs[i:j])
			_, builtin := builtins.Registry().Lookup(word)
			switch {
			case syntax.IsKeyword(word):
				span(&b, lang.TokKeyword, word)
			case builtin && j < len(rs) && rs[j] == '(':
				span(&b, lang.TokBuiltin, word)
			default:
				b.WriteString(html.EscapeString(word))
			}
			i = j
		default:
			b.WriteString(html.EscapeString(string(r)))
			i++
		}
	}
	return b.String()
}

func span(b *strings.Builder, class, text string) {
	b.WriteString(`<span class="cm-` + class + `">` + html.EscapeString(text) + `</span>`)
}
