package lang

import (
	"fmt"
	"strings"

	"lsys/lsys"
)

// Field is one field of a result type (r.name): its name, one line for the
// docs, and its getter. A type's one table of fields (TypeInfo.Fields)
// serves evaluation, completion after '.', the "did you mean" of errors,
// help() and the language reference alike.
type Field struct {
	Name string
	Doc  string // one line: what the field holds, with its unit
	// Get reads the field of v; nil when this value has none (the inputs
	// of a response to an initial condition).
	Get func(v any) any
}

// FieldOf is a Field whose getter takes the type's own value.
func FieldOf[T any](name, doc string, get func(T) any) Field {
	return Field{Name: name, Doc: doc, Get: func(v any) any { return get(v.(T)) }}
}

// TypeInfo describes a Go type that built-ins hand out, so the language can
// name it in messages and read its fields with r.name.
type TypeInfo struct {
	Name   string  // for messages: "a step response"
	Fields []Field // in the order completion and the docs list them
	// ByName, when set, gives the further fields one value has by name
	// (an equilibrium's states and inputs), after Fields: their names, and
	// a reader that reports false for any other name.
	ByName func(v any) (names []string, get func(name string) (any, bool))
}

// fieldTable is the language's own table for v's type: nonlinear models.
func fieldTable(v any) ([]Field, bool) {
	if _, ok := v.(*lsys.Model); ok {
		return modelFields, true
	}
	return nil, false
}

// tableReader reads fields from a table (and a type's fields by name).
func tableReader(v any, fields []Field, byName func(any) ([]string, func(string) (any, bool))) fieldReader {
	return fieldReader{
		names: func() []string {
			names := make([]string, 0, len(fields))
			for _, f := range fields {
				names = append(names, f.Name)
			}
			if byName != nil {
				more, _ := byName(v)
				names = append(names, more...)
			}
			return names
		},
		get: func(n string) (out any, found bool, err error) {
			err = guard(func() error {
				for _, f := range fields {
					if f.Name == n {
						out = f.Get(v)
						found = out != nil
						return nil
					}
				}
				if byName != nil {
					_, get := byName(v)
					out, found = get(n)
				}
				return nil
			})
			return out, found, err
		},
	}
}

// fieldsDoc lists the fields of the values of sample's type, for help():
// "Fields of the result:" and one line per field; "" when the type has no
// table.
func (r *Registry) fieldsDoc(sample any) []Field {
	if sample == nil {
		return nil
	}
	if t, ok := fieldTable(sample); ok {
		return t
	}
	if ti, ok := r.typeInfo(sample); ok {
		return ti.Fields
	}
	return nil
}

// HelpText is a built-in's help as inspection and help() show it:
// signature, help, arguments, doc, the fields of its result and examples.
func (r *Registry) HelpText(b *Builtin) string {
	var sb strings.Builder
	sb.WriteString(b.Signature())
	sb.WriteString("\n\n")
	sb.WriteString(b.Help)
	if len(b.Params) > 0 {
		sb.WriteString("\n\nArguments:")
		for _, p := range b.Params {
			fmt.Fprintf(&sb, "\n  %s", p.Name)
			if p.Default != nil {
				fmt.Fprintf(&sb, " (default %s)", inlineString(p.Default, nil))
			} else if p.Optional {
				sb.WriteString(" (optional)")
			}
			if p.Doc != "" {
				sb.WriteString(": " + p.Doc)
			}
		}
	}
	if b.Doc != "" {
		sb.WriteString("\n\n")
		sb.WriteString(b.Doc)
	}
	if fs := r.fieldsDoc(b.Returns); len(fs) > 0 {
		sb.WriteString("\n\nFields of the result:")
		for _, f := range fs {
			fmt.Fprintf(&sb, "\n  %s: %s", f.Name, f.Doc)
		}
	}
	for i, ex := range b.Examples {
		if i == 0 {
			sb.WriteString("\n\nExample:")
		}
		sb.WriteString("\n  " + strings.ReplaceAll(ex, "\n", "\n  "))
		if i < len(b.Examples)-1 {
			sb.WriteString("\n")
		}
	}
	return sb.String()
}
