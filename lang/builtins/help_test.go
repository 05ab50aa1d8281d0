package builtins_test

import (
	"context"
	"strings"
	"testing"

	"lsys/lang"
	"lsys/lang/builtins"
)

type pagerOut struct {
	discardOut
	paged string
}

func (p *pagerOut) Page(text string) { p.paged += text }

type discardOut struct{ stdout string }

func (d *discardOut) Stdout(s string)         { d.stdout += s }
func (*discardOut) Stderr(string)             {}
func (*discardOut) Display(any, string)       {}
func (*discardOut) UpdateDisplay(any, string) {}
func (*discardOut) ClearOutput(bool)          {}

func TestHelpPagesOrPrints(t *testing.T) {
	s := lang.NewSession(lang.Options{Builtins: builtins.Registry(), Dir: t.TempDir()})
	p := &pagerOut{}
	if _, err := s.Run(context.Background(), "help(modes)", p); err != nil {
		t.Fatal(err)
	}
	if !strings.HasPrefix(p.paged, "modes(system, tol?)") || !strings.Contains(p.paged, "Example:") {
		t.Errorf("paged help %q", p.paged)
	}
	d := &discardOut{}
	if _, err := s.Run(context.Background(), "help()", d); err != nil {
		t.Fatal(err)
	}
	for _, want := range []string{"Describing systems", "system(A?, B?, C?, D?", "Modes and structure"} {
		if !strings.Contains(d.stdout, want) {
			t.Errorf("help() lacks %q:\n%s", want, d.stdout)
		}
	}
	if strings.Index(d.stdout, "Describing systems") > strings.Index(d.stdout, "Modes and structure") {
		t.Error("help() groups are not in the reference's order")
	}
}
