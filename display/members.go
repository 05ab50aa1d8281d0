package display

import (
	"html"
	"strconv"
	"strings"
)

// members is a list or record of a language (package lang's List and
// Record): display renders each member with its own renderer, so a record
// of results shows every table and chart, not only their text.
type members interface {
	textWither
	// Members returns the field names (nil for a list) and the values.
	Members() (names []string, values []any)
}

// renderMembers gives a list or record its text form and, when any member
// has a rich display, an HTML part that stacks the members' own HTML under
// their names (records) or positions (lists). Plain lists and records of
// numbers stay text only, as before.
func renderMembers(m members, opt Options) Bundle {
	b := NewBundle(m.TextWith(TextOf))
	names, values := m.Members()
	parts := make([]Bundle, len(values))
	rich := false
	for i, v := range values {
		parts[i] = Render(v, opt)
		if _, ok := parts[i].Data[HTML]; ok {
			rich = true
		}
	}
	if !rich {
		return b
	}
	var h strings.Builder
	h.WriteString(`<div class="lsys-members" style="font-family:sans-serif;font-size:13px">`)
	for i, p := range parts {
		label := "[" + strconv.Itoa(i+1) + "]"
		if names != nil {
			label = names[i]
		}
		h.WriteString(`<div style="margin:6px 0"><div style="font-weight:bold;margin-bottom:2px">` + html.EscapeString(label) + `</div>`)
		if s, ok := p.Data[HTML].(string); ok {
			h.WriteString(s)
		} else {
			text, _ := p.Data[Text].(string)
			h.WriteString(`<pre style="margin:0">` + html.EscapeString(text) + `</pre>`)
		}
		h.WriteString(`</div>`)
	}
	h.WriteString(`</div>`)
	b.Data[HTML] = h.String()
	return b
}
