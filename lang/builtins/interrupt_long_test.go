package builtins_test

import (
	"context"
	"flag"
	"strings"
	"testing"
	"time"

	"lsys/lang"
	"lsys/lang/builtins"
)

var longInterrupts = flag.Bool("long", false, "measure interrupt latency of long built-ins (tens of seconds)")

// TestInterruptLatencyLong measures, for long numerical built-ins on a dense
// 1000-state system, how soon after an interrupt the cell ends. Each runs
// for several seconds uninterrupted; the cell must end within 1 s of the
// interrupt (go test ./lang/builtins -run InterruptLatencyLong -long -v).
func TestInterruptLatencyLong(t *testing.T) {
	if !*longInterrupts {
		t.Skip("long: -long")
	}
	s := lang.NewSession(lang.Options{Builtins: builtins.Registry()})
	setup := `v = linear(0, 1, n: 1000)
M = v * transpose(v) + diagonal(linear(-1, -2, n: 1000))
G = system(M, v, transpose(v))`
	if _, err := s.Run(context.Background(), setup, nil); err != nil {
		t.Fatal(err)
	}
	for _, cell := range []string{"zeros(G)", "modes(G)", "poles(G)", "structure(G)", "exp(M)", "jordan(M)"} {
		ctx, cancel := context.WithCancel(context.Background())
		done := make(chan error, 1)
		start := time.Now()
		go func() { _, err := s.Run(ctx, cell, nil); done <- err }()
		time.Sleep(1500 * time.Millisecond)
		cancel()
		at := time.Now()
		select {
		case err := <-done:
			if err != nil && !strings.Contains(err.Error(), "interrupted") {
				t.Errorf("%s: %v", cell, err)
			}
			t.Logf("%-14s ended %v after the interrupt (ran %v before it)", cell, time.Since(at).Round(time.Millisecond), at.Sub(start).Round(time.Millisecond))
			if time.Since(at) > time.Second {
				t.Errorf("%s: ended %v after the interrupt, want within 1 s", cell, time.Since(at))
			}
		case <-time.After(10 * time.Second):
			t.Fatalf("%s: still running 10 s after the interrupt", cell)
		}
	}
}
