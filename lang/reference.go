package lang

import (
	"fmt"
	"strings"
)

// Reference returns the language reference in Markdown, generated from the
// registry: one section per group, one entry per built-in with its
// signature, help, arguments, doc, the fields of its result and examples. The README carries it
// between the markers <!-- reference:start --> and <!-- reference:end -->.
func (r *Registry) Reference() string {
	var b strings.Builder
	groups, byGroup := r.ByGroup()
	b.WriteString("Built-ins by topic:\n")
	for _, g := range groups {
		list := byGroup[g]
		if len(list) == 0 {
			continue
		}
		var names []string
		for _, bi := range list {
			names = append(names, "`"+bi.Name+"`")
		}
		fmt.Fprintf(&b, "\n- %s: %s", g, strings.Join(names, ", "))
	}
	b.WriteString("\n")
	for _, g := range groups {
		list := byGroup[g]
		if len(list) == 0 {
			continue
		}
		fmt.Fprintf(&b, "\n### %s\n", g)
		for _, bi := range list {
			fmt.Fprintf(&b, "\n#### `%s`\n\n%s\n", bi.Signature(), bi.Help)
			if bi.Fn != nil && len(bi.Params) > 0 {
				b.WriteString("\n| argument | meaning |\n|---|---|\n")
				for _, p := range bi.Params {
					name := "`" + p.Name + "`"
					doc := p.Doc
					switch {
					case p.Variadic:
						name = "`" + p.Name + "...`"
					case p.Default != nil:
						doc += fmt.Sprintf(" (default `%s`)", inlineString(p.Default, nil))
					case p.Optional:
						doc += " (optional)"
					}
					fmt.Fprintf(&b, "| %s | %s |\n", name, strings.ReplaceAll(doc, "|", "\\|"))
				}
				if bi.AnyNamed {
					b.WriteString("| `name: values` | further named arguments, see below |\n")
				}
			}
			if bi.Doc != "" {
				fmt.Fprintf(&b, "\n%s\n", bi.Doc)
			}
			if fs := r.fieldsDoc(bi.Returns); len(fs) > 0 {
				b.WriteString("\n| field of the result | meaning |\n|---|---|\n")
				for _, f := range fs {
					fmt.Fprintf(&b, "| `.%s` | %s |\n", f.Name, strings.ReplaceAll(f.Doc, "|", "\\|"))
				}
			}
			for _, ex := range bi.Examples {
				fmt.Fprintf(&b, "\n```\n%s\n```\n", strings.TrimRight(ex, "\n"))
			}
		}
	}
	return b.String()
}
