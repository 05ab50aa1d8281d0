package lsys

import (
	"context"
	"strings"
	"testing"
)

// Issue 15, friction 5: an explicit horizon of 1e6 s for a 2 rad/s pair
// steps by 100 s (10,000 steps) and must say the pair is not resolved;
// a horizon of 20 s resolves it and says nothing.
func TestExplicitHorizonWarnsUnresolved(t *testing.T) {
	G := siso(t, []float64{4}, []float64{4, 0.4, 1})
	r, err := Step(context.Background(), G, ResponseOptions{Until: 1e6})
	if err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(r.Rule, "warning: 1 mode faster than") || !strings.Contains(r.Rule, "dt: of at most 0.157 s") {
		t.Errorf("rule %q", r.Rule)
	}
	r, err = Step(context.Background(), G, ResponseOptions{Until: 20})
	if err != nil {
		t.Fatal(err)
	}
	if strings.Contains(r.Rule, "warning") {
		t.Errorf("rule %q", r.Rule)
	}
	// a step given is the user's choice: no warning
	r, err = Step(context.Background(), G, ResponseOptions{Until: 20, Step: 1})
	if err != nil {
		t.Fatal(err)
	}
	if strings.Contains(r.Rule, "warning") {
		t.Errorf("a step given: rule %q", r.Rule)
	}
}
