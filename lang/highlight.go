package lang

import (
	"sort"
	"strings"

	"lsys/lang/syntax"
)

// Token classes of lsys cells, shared by every highlighter: the notebook's
// editor mode (kernel.js in the kernelspec folder, a CodeMirror mode) and
// the reports of lsys run. They are CodeMirror's token style names, so the
// editor's theme colours them and a report's stylesheet styles the same
// names (class "cm-" + name in both).
const (
	TokKeyword = "keyword"
	TokBuiltin = "builtin" // a built-in's name where it is called: name(
	TokString  = "string"
	TokNumber  = "number"
	TokComment = "comment"
)

// TokenStyles are the colours of the token classes, the same in the
// notebook (kernel.css in the kernelspec folder) and in lsys run's
// reports, so a cell reads alike in both.
var TokenStyles = [][2]string{
	{TokKeyword, "color: #7a1f6b; font-weight: bold"},
	{TokBuiltin, "color: #0b4f8a"},
	{TokString, "color: #2d6a12"},
	{TokNumber, "color: #8a4b00"},
	{TokComment, "color: #6b6b6b; font-style: italic"},
}

// TokenCSS is a style sheet for the token classes: one rule per class,
// each selector prefix + ".cm-" + class.
func TokenCSS(prefix string) string {
	var b strings.Builder
	for _, t := range TokenStyles {
		b.WriteString(prefix + ".cm-" + t[0] + " { " + t[1] + "; }\n")
	}
	return b.String()
}

// KeywordNames lists the reserved words, sorted. (The built-ins' names
// come from the registry a front end uses: Registry.Names.)
func KeywordNames() []string {
	var out []string
	for k := range syntax.Keywords {
		out = append(out, k)
	}
	sort.Strings(out)
	return out
}
