package display

import (
	"encoding/base64"
	"strings"
	"testing"
)

type chartOnly struct{}
type chartAndTable struct{}

func init() {
	Register(chartOnly{}, func(any, Options) Bundle {
		b := NewBundle("a chart\nsecond line")
		b.Data[SVG] = `<svg xmlns="http://www.w3.org/2000/svg"/>`
		return b
	})
	Register(chartAndTable{}, func(any, Options) Bundle {
		b := NewBundle("a table")
		b.Data[SVG] = `<svg xmlns="http://www.w3.org/2000/svg"/>`
		b.Data[HTML] = "<table></table>"
		return b
	})
}

// A chart reaches front ends that prefer HTML, ahead of any table.
func TestChartEmbeddedInHTML(t *testing.T) {
	want := "data:image/svg+xml;base64," + base64.StdEncoding.EncodeToString([]byte(`<svg xmlns="http://www.w3.org/2000/svg"/>`))
	b := Render(chartOnly{}, Options{})
	h, _ := b.Data[HTML].(string)
	if !strings.Contains(h, want) || !strings.Contains(h, `alt="a chart"`) {
		t.Errorf("html %q", h)
	}
	if _, ok := b.Data[SVG]; !ok {
		t.Error("the SVG part was dropped")
	}
	b = Render(chartAndTable{}, Options{})
	h, _ = b.Data[HTML].(string)
	if !strings.HasPrefix(h, `<div class="lsys-chart">`) || !strings.HasSuffix(h, "<table></table>") {
		t.Errorf("html %q", h)
	}
}
