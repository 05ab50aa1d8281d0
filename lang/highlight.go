package lang

import (
	"sort"

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
