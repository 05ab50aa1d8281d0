// Package display turns values into MIME bundles for Jupyter front ends and
// reports: text/plain always, HTML tables, LaTeX, SVG/PNG plots and
// application/json where they help. It renders lsys's own types and plain Go
// values; it knows no syntax and no protocol.
//
// Every renderer must be deterministic: the same value gives the same bytes
// (no timestamps, random ids or map-order effects).
package display

import (
	"encoding/base64"
	"encoding/json"
	"fmt"
	"html"
	"reflect"
	"runtime/debug"
	"sort"
	"strings"
	"sync"

	"lsys/lsys"
)

// Bundle is a MIME bundle: data keyed by MIME type, plus per-type metadata.
// Text values are strings; application/json values are any JSON-encodable
// value. encoding/json writes map keys sorted, so bundles serialise stably.
type Bundle struct {
	Data     map[string]any
	Metadata map[string]any
}

// MIME types used by the renderers.
const (
	Text  = "text/plain"
	HTML  = "text/html"
	LaTeX = "text/latex"
	SVG   = "image/svg+xml"
	PNG   = "image/png"
	JSON  = "application/json"
)

// NewBundle returns a bundle holding the text form only.
func NewBundle(text string) Bundle {
	return Bundle{Data: map[string]any{Text: text}, Metadata: map[string]any{}}
}

// Renderer renders one Go type. Register them with Register from an init
// function in the file that owns the type's displays.
type Renderer func(v any, opt Options) Bundle

// Options tune rendering; the zero value is the default.
type Options struct {
	PNG bool // add a PNG beside SVG plots

	chart *lsys.Chart // chart options of a chart(...) value, applied by rpBundle
}

var (
	mu        sync.RWMutex
	renderers = map[reflect.Type]Renderer{}
)

// Register installs the renderer for values of the same dynamic type as
// sample (pass a typed nil pointer such as (*lsys.System)(nil)).
func Register(sample any, r Renderer) {
	mu.Lock()
	defer mu.Unlock()
	t := reflect.TypeOf(sample)
	if _, dup := renderers[t]; dup {
		panic("display: two renderers for " + t.String())
	}
	renderers[t] = r
}

// Registered lists the type names that have renderers, sorted (for docs/tests).
func Registered() []string {
	mu.RLock()
	defer mu.RUnlock()
	var out []string
	for t := range renderers {
		out = append(out, t.String())
	}
	sort.Strings(out)
	return out
}

// Render renders v. Types without a renderer fall back to fmt.Stringer or
// %v in text/plain, so every value can be shown.
func Render(v any, opt Options) Bundle {
	if v == nil {
		return NewBundle("")
	}
	mu.RLock()
	r, ok := renderers[reflect.TypeOf(v)]
	mu.RUnlock()
	if ok {
		b := r(v, opt)
		if b.Metadata == nil {
			b.Metadata = map[string]any{}
		}
		embedChart(&b)
		capBundle(&b)
		return b
	}
	if m, ok := v.(members); ok {
		return renderMembers(m, opt)
	}
	if tw, ok := v.(textWither); ok {
		return NewBundle(tw.TextWith(TextOf))
	}
	if s, ok := v.(fmt.Stringer); ok {
		return NewBundle(s.String())
	}
	return NewBundle(fmt.Sprintf("%v", v))
}

// RenderSafe renders v like Render, but a renderer that panics costs only
// the picture: the bundle becomes a text note and err carries the panic and
// its stack for the front end's log.
func RenderSafe(v any, opt Options) (b Bundle, err error) {
	defer func() {
		if p := recover(); p != nil {
			err = fmt.Errorf("rendering %T panicked: %v\n%s", v, p, debug.Stack())
			b = NewBundle(fmt.Sprintf("(the result was computed but could not be displayed: %v; please report this cell)", p))
		}
	}()
	return Render(v, opt), nil
}

// textWither is a composite value (a list or record of a language) whose
// text form shows its members with a text formatter it is given, so that
// members this package renders show their own text.
type textWither interface {
	TextWith(text func(any) (string, bool)) string
}

// TextOf is the text/plain rendering of v. Front ends pass it to the
// language as its text option, so print and inspect show analysis results
// as a notebook does.
func TextOf(v any) (string, bool) {
	s, ok := Render(v, Options{}).Data[Text].(string)
	return s, ok
}

// embedChart puts a bundle's SVG chart into its HTML part as an image.
// Front ends show one representation of a bundle, and they prefer HTML to
// SVG: without this a result with a table and a chart would show the table
// only, and report converters that sanitise inline SVG would show an empty
// frame. The image/svg+xml part stays for reuse downstream.
func embedChart(b *Bundle) {
	svg, ok := b.Data[SVG].(string)
	if !ok || svg == "" {
		return
	}
	if h, _ := b.Data[HTML].(string); strings.HasPrefix(h, `<div class="lsys-chart">`) {
		return // embedded already (a chart(...) renders its value through Render)
	}
	alt, _ := b.Data[Text].(string)
	if i := strings.IndexByte(alt, '\n'); i >= 0 {
		alt = alt[:i]
	}
	img := `<div class="lsys-chart"><img style="max-width:100%" alt="` + html.EscapeString(alt) +
		`" src="data:image/svg+xml;base64,` + base64.StdEncoding.EncodeToString([]byte(svg)) + `"></div>`
	if h, ok := b.Data[HTML].(string); ok && h != "" {
		b.Data[HTML] = img + h
	} else {
		b.Data[HTML] = img
	}
}

// MaxBundle is the most bytes one value's display may send: a notebook
// front end holds every output in the page and the notebook file, and past a
// few megabytes both become slow to open (common practice; no source).
const MaxBundle = 2 << 20

// capBundle keeps a bundle under MaxBundle: the richest forms go first
// (PNG, SVG, HTML, LaTeX, JSON), then the text is cut, and the text says
// what was held back.
func capBundle(b *Bundle) {
	size := func(v any) int {
		switch x := v.(type) {
		case string:
			return len(x)
		default:
			j, err := json.Marshal(x)
			if err != nil {
				return 0
			}
			return len(j)
		}
	}
	total := 0
	sizes := map[string]int{}
	for k, v := range b.Data {
		sizes[k] = size(v)
		total += sizes[k]
	}
	if total <= MaxBundle {
		return
	}
	var dropped []string
	for _, k := range []string{PNG, SVG, HTML, LaTeX, JSON} {
		if total <= MaxBundle {
			break
		}
		if _, ok := b.Data[k]; ok {
			total -= sizes[k]
			delete(b.Data, k)
			delete(b.Metadata, k)
			dropped = append(dropped, k)
		}
	}
	text, _ := b.Data[Text].(string)
	if len(text) > MaxBundle/2 {
		cut := strings.LastIndex(text[:MaxBundle/2], "\n")
		if cut < 0 {
			cut = MaxBundle / 2
		}
		text = text[:cut] + "\n..."
		dropped = append(dropped, "the rest of the text")
	}
	b.Data[Text] = text + fmt.Sprintf("\n(output held back: %s, to keep the display under %d MB; show a part of the value instead)", strings.Join(dropped, ", "), MaxBundle>>20)
}
