package lang

import (
	"sort"
	"strings"
)

// Pager is an optional interface of Output: a front end with a pager (the
// Jupyter page payload) shows long help there instead of in the cell's output.
type Pager interface {
	Page(text string)
}

func init() {
	Register(&Builtin{
		Name: "help", Group: GroupOutput,
		Params: []Param{{Name: "topic", Optional: true, Doc: "a built-in (help(modes)) or a bound value; leave out for the list of built-ins"}},
		Help:   "Help on a built-in or a value, in the pager where the front end has one.",
		Doc: "The same text as inspection (shift-tab on a name) gives: signature, arguments, " +
			"explanation and examples. Without an argument, the built-ins by group.",
		Examples: []string{"help(modes)", "help()"},
		Fn: func(c *Call) (any, error) {
			var text string
			switch v := c.Value("topic").(type) {
			case nil:
				text = helpIndex()
			case *Builtin:
				text = builtinHelp(v)
			default:
				text = typeName(v) + "\n\n" + c.Format(v)
			}
			out := c.Out()
			if p, ok := out.(Pager); ok {
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
func helpIndex() string {
	groups := map[string][]*Builtin{}
	for _, b := range Builtins() {
		groups[b.Group] = append(groups[b.Group], b)
	}
	order := append([]string(nil), groupOrder...)
	var extra []string
	for g := range groups {
		if !contains(groupOrder, g) {
			extra = append(extra, g)
		}
	}
	sort.Strings(extra)
	var sb strings.Builder
	sb.WriteString("Built-ins of the lsys language (help(name) for one of them):\n")
	for _, g := range append(order, extra...) {
		if len(groups[g]) == 0 {
			continue
		}
		sb.WriteString("\n" + g + "\n")
		for _, b := range groups[g] {
			sb.WriteString("  " + b.Signature() + "\n      " + b.Help + "\n")
		}
	}
	return sb.String()
}
