package display

import (
	"strings"
	"testing"
)

// fakeRecord stands for a language's record (display cannot import the
// language): names and values, and a text form built with a formatter.
type fakeRecord struct {
	names  []string
	values []any
}

func (r fakeRecord) Members() ([]string, []any) { return r.names, r.values }
func (r fakeRecord) TextWith(text func(any) (string, bool)) string {
	var parts []string
	for i, n := range r.names {
		s, _ := text(r.values[i])
		parts = append(parts, n+": "+s)
	}
	return "{" + strings.Join(parts, ", ") + "}"
}

type richThing struct{}

func init() {
	Register(richThing{}, func(any, Options) Bundle {
		b := NewBundle("rich text")
		b.Data[HTML] = "<table><tr><td>rich</td></tr></table>"
		return b
	})
}

// A record of results shows each member's own HTML under its name; a record
// of plain values stays text only.
func TestMembersRenderRich(t *testing.T) {
	b := Render(fakeRecord{[]string{"a", "b"}, []any{richThing{}, "plain <x>"}}, Options{})
	if got := b.Data[Text]; got != "{a: rich text, b: plain <x>}" {
		t.Errorf("text %q", got)
	}
	h, _ := b.Data[HTML].(string)
	for _, want := range []string{">a</div><table><tr><td>rich</td></tr></table>", ">b</div><pre style=\"margin:0\">plain &lt;x&gt;</pre>"} {
		if !strings.Contains(h, want) {
			t.Errorf("HTML lacks %q:\n%s", want, h)
		}
	}
	plain := Render(fakeRecord{[]string{"x"}, []any{"1"}}, Options{})
	if _, ok := plain.Data[HTML]; ok {
		t.Error("a record of plain values has an HTML part")
	}
	if Render(fakeRecord{[]string{"a"}, []any{richThing{}}}, Options{}).Data[HTML] != b2(t) {
		t.Error("same record, different bytes")
	}
}

func b2(t *testing.T) any {
	return Render(fakeRecord{[]string{"a"}, []any{richThing{}}}, Options{}).Data[HTML]
}
