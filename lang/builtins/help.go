package builtins

import (
	"strings"

	"lsys/lang"
)

func init() {
	register(&lang.Builtin{
		Name: "help", Group: lang.GroupOutput,
		Params: []lang.Param{{Name: "topic", Optional: true, Doc: "a built-in (help(modes)) or a bound value; leave out for the list of built-ins"}},
		Help:   "Help on a built-in or a value, in the pager where the front end has one.",
		Doc: "The same text as inspection (shift-tab on a name) gives: signature, arguments, " +
			"explanation and examples. Without an argument, the built-ins by group.",
		Examples: []string{"help(modes)", "help()"},
		Fn: func(c *lang.Call) (any, error) {
			var text string
			switch v := c.Value("topic").(type) {
			case nil:
				text = helpIndex(c.Registry())
			case *lang.Builtin:
				text = c.Registry().HelpText(v)
			default:
				text = c.TypeName(v) + "\n\n" + c.Format(v)
			}
			out := c.Out()
			if p, ok := out.(lang.Pager); ok {
				p.Page(text)
			} else if out != nil {
				out.Stdout(text + "\n")
			}
			return nil, nil
		},
	})
}

// helpIndex lists the built-ins by group, in the reference's group order,
// each with its one-line help.
func helpIndex(r *lang.Registry) string {
	groups, members := r.ByGroup()
	var sb strings.Builder
	sb.WriteString("Built-ins of the lsys language (help(name) for one of them):\n")
	for _, g := range groups {
		sb.WriteString("\n" + g + "\n")
		for _, b := range members[g] {
			sb.WriteString("  " + b.Signature() + "\n      " + b.Help + "\n")
		}
	}
	return sb.String()
}
