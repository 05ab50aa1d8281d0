package kernel

import (
	"io"
	"log"
	"strings"
	"testing"

	"lsys/display"
)

type brokenDisplay struct{}

func init() {
	display.Register(brokenDisplay{}, func(any, display.Options) display.Bundle { panic("renderer bug") })
}

// A renderer that panics costs the cell only its picture, not its reply.
func TestRenderSurvivesPanic(t *testing.T) {
	k := &Kernel{log: log.New(io.Discard, "", 0)}
	b := k.render(brokenDisplay{})
	text, _ := b.Data[display.Text].(string)
	if !strings.Contains(text, "could not be displayed") {
		t.Fatalf("text/plain %q", text)
	}
}
