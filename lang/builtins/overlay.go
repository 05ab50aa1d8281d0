package builtins

import (
	"fmt"

	"lsys/lang"
	"lsys/lsys"
)

// The overlay built-in: several results of one kind on one chart. Written
// against the public Call API only.

func init() {
	register(&lang.Builtin{
		Name: "overlay", Group: lang.GroupResponse,
		Returns: (*lsys.Overlay)(nil),
		Params: []lang.Param{{Name: "results", Variadic: true,
			Doc: "responses, frequency responses, polar charts or pole-zero maps (one kind), or a list or record of them"}},
		AnyNamed: true,
		Help:     "Several results of one kind on one chart, each in its own colour and line style, named in the legend.",
		Doc: "Compare a full model with its reduction, or a loop before and after a design: " +
			"overlay(full: response(G, step), reduced: response(Gr, step)). Named arguments (or the fields of a record) " +
			"name the curves in the legend; unnamed ones (and the items of a list) are numbered in order. Responses must be of one kind with the same " +
			"outputs and channels, frequency responses and polar charts of systems with the same outputs and inputs " +
			"(pick a channel with G.out.in), pole-zero maps all continuous or all sampled. Each result keeps its own " +
			"colour (Okabe & Ito) and line style (or marker shape on pole-zero maps), so the chart reads in grey print too.",
		Examples: []string{
			"G = system([[0, 1], [-4, -0.8]], [0, 4], [1, 0])\nfaster = system([[0, 1], [-9, -3]], [0, 9], [1, 0])\noverlay(before: response(G, step, until: 10), after: response(faster, step, until: 10))",
			"G = 4/(s^2 + 0.8*s + 4)\noverlay(open: polezero(G), closed: polezero(closeloop(G)))",
		},
		Fn: func(c *lang.Call) (any, error) {
			var names []string
			var items []any
			add := func(name string, v any) {
				names, items = append(names, name), append(items, v)
			}
			for _, v := range c.Rest {
				if r, ok := v.(*lang.Record); ok {
					for k, n := range r.Names {
						add(n, r.Values[k])
					}
					continue
				}
				if l, ok := v.(*lang.List); ok {
					for _, it := range l.Items {
						add(fmt.Sprintf("%d", len(items)+1), it)
					}
					continue
				}
				add(fmt.Sprintf("%d", len(items)+1), v)
			}
			for _, nv := range c.Extra {
				add(nv.Name, nv.Value)
			}
			if len(items) < 2 {
				return nil, c.Errorf("results", "Give two or more, e.g. overlay(full: response(G, step), reduced: response(Gr, step)).",
					"overlay needs two or more results to compare, got %d", len(items))
			}
			return lsys.NewOverlay(names, items)
		},
	})
	registerType((*lsys.Overlay)(nil), lang.TypeInfo{Name: "an overlay", Fields: []lang.Field{
		lang.FieldOf("names", "the results' names, as in the legend", func(o *lsys.Overlay) any { return o.Names }),
	}})
}
