// Package builtins is the library of the lsys language: every built-in
// function and constant, and the result types they hand out, in one
// registry (Registry) that the front ends pass to lang.NewSession.
//
// It uses only the public API of package lang (Call, Block, the value
// types) and lsys; the compiler keeps it from the evaluator's internals.
//
// # Adding built-ins from your own file
//
// Engineers who own a part of the library add their built-ins in a file of
// their own in this package, e.g. lang/builtins/structure.go, without
// touching any other file:
//
//	package builtins
//
//	func init() {
//		register(&lang.Builtin{
//			Name:  "poles",
//			Group: lang.GroupAnalysis,
//			Params: []lang.Param{
//				{Name: "system", Doc: "a system, transfer function or linear equation block"},
//			},
//			Help:     "The poles of a system (eigenvalues of A).",
//			Doc:      "Longer explanation, the method and its paper, tolerances...",
//			Examples: []string{"G = system([[0, 1], [-2, -3]], [0, 1], [1, 0])\npoles(G)"},
//			Fn: func(c *lang.Call) (any, error) {
//				var g *lsys.System
//				if err := c.Bind("system", &g); err != nil {
//					return nil, err
//				}
//				return lsys.Poles(g)
//			},
//		})
//	}
//
// Rules:
//   - Names are plain English words of the trade, lower case.
//   - Every example must run (TestRegistryExamples runs them all) and every
//     built-in needs at least one test of its own.
//   - Read arguments in one step with c.Bind("system", &g, "tol", &tol):
//     the variable's type says what the argument must be, and an optional
//     argument that was not written leaves its variable (the default) as it
//     was. One argument may also be read with its typed getter (c.System).
//   - Fn must not panic on user input (a panic is still caught and reported
//     as an error at the call, but that is a bug). Return errors: Bind, the
//     Call helpers (c.Float, c.System, c.Errorf, c.ErrorAt, ...) return
//     errors that point at the offending argument; any other error is
//     reported at the call, prefixed with the built-in's name (so lsys's
//     errors carry none).
//   - Long loops call c.Check() (cancellation, step budget) and may show
//     progress with c.Progress.
//   - Go types handed out that the language should know by name (for
//     messages) or whose fields r.name reads are described with
//     registerType, also from an init function in your file. Its field
//     table serves evaluation, completion, inspection, the "did you mean"
//     of errors and the docs alike.
//   - Hand out lsys's own result types; numerics (Newton, rank decisions)
//     belong in lsys, their rendering in display.
//   - Equation blocks: c.Block(v) gives the block behind a model or a
//     system built from one (signals, parameters, exact Jacobians).
//   - Named arguments beyond the parameters (locus(f, k: ...)): set AnyNamed
//     and read c.Extra. Variadic last parameters: c.Rest. Files beside the
//     notebook: c.Dir(). Calling a user function: c.Apply(f, args...).
//   - Renaming a built-in or an argument: list the old name in Formerly
//     (Builtin.Formerly, Param.Formerly), so that using it is an error
//     naming the new one. An argument whose value means nothing without
//     its name (closeloop's through:) is NamedOnly.
//   - After adding or changing a built-in, regenerate the reference in the
//     README: go test ./lang/builtins -run Reference -update.
package builtins

import (
	"lsys/lang"
)

// library is the one registry; the init functions of this package's files
// fill it, and nothing changes it after that.
var library = lang.NewRegistry()

// Registry returns the registry of every built-in of lsys, for
// lang.Options.Builtins. It must not be changed.
func Registry() *lang.Registry { return library }

// register adds built-ins to the library; call it from an init function.
func register(bs ...*lang.Builtin) { library.Add(bs...) }

// registerType describes a result type; call it from an init function.
func registerType(sample any, info lang.TypeInfo) { library.AddType(sample, info) }
