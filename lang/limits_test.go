package lang_test

import (
	"context"
	"strings"
	"testing"
	"time"

	"lsys/lang"
)

// busyOutput records what reaches the front end.
type busyOutput struct{ text strings.Builder }

func (o *busyOutput) Stdout(t string)           { o.text.WriteString(t) }
func (o *busyOutput) Stderr(t string)           { o.text.WriteString(t) }
func (o *busyOutput) Display(any, string)       {}
func (o *busyOutput) UpdateDisplay(any, string) {}
func (o *busyOutput) ClearOutput(bool)          {}

// TestInterruptInsideBuiltin: a built-in busy in a routine that never looks
// at the interrupt (as a dense eigen-solver between its checks) no longer
// holds the cell: the interrupt ends it within 1 s, bindings are kept, and
// what the abandoned built-in prints later does not reach the next cell.
func TestInterruptInsideBuiltin(t *testing.T) {
	release := make(chan struct{})
	reg := lang.NewRegistry()
	reg.Add(&lang.Builtin{Name: "busy", Help: "spins", Doc: "test", Examples: []string{"busy()"}, Fn: func(c *lang.Call) (any, error) {
		<-release // never checks the context
		c.Out().Stdout("late output\n")
		return 1.0, nil
	}})
	s := lang.NewSession(lang.Options{Builtins: reg})
	out := &busyOutput{}
	if _, err := s.Run(context.Background(), "a = 2", out); err != nil {
		t.Fatal(err)
	}
	ctx, cancel := context.WithCancel(context.Background())
	done := make(chan error, 1)
	go func() { _, err := s.Run(ctx, "b = busy()", out); done <- err }()
	time.Sleep(100 * time.Millisecond)
	cancel()
	select {
	case err := <-done:
		if err == nil || !strings.Contains(err.Error(), "interrupted") {
			t.Fatalf("err = %v, want interrupted", err)
		}
	case <-time.After(time.Second):
		t.Fatal("the cell did not end within 1 s of the interrupt")
	}
	close(release)
	time.Sleep(50 * time.Millisecond)
	v, err := s.Run(context.Background(), "a", out)
	if err != nil || v != 2.0 {
		t.Fatalf("binding a after the interrupt: %v, %v", v, err)
	}
	if strings.Contains(out.text.String(), "late output") {
		t.Fatal("output of the abandoned built-in reached a later cell")
	}
}

// TestMemoryBudget: values over the budget are refused before the bytes
// are asked for, with the size and the budget named; the session lives on.
func TestMemoryBudget(t *testing.T) {
	s := lang.NewSession(lang.Options{Limits: lang.Limits{Memory: 1 << 20}})
	_, err := s.Run(context.Background(), `f(x, k) = if k == 0 then x else f(x + x, k - 1)
t = f("ab", 30)`, nil)
	if err == nil || !strings.Contains(err.Error(), "over the memory budget of 1 MiB") {
		t.Fatalf("err = %v, want the budget named", err)
	}
	if v, err := s.Run(context.Background(), `"still " + "here"`, nil); err != nil || v != "still here" {
		t.Fatalf("after the refusal: %v, %v", v, err)
	}
	for in, want := range map[string]int64{"4G": 4 << 30, "512M": 512 << 20, "1.5GiB": 3 << 29, "1000": 1000} {
		if got, err := lang.ParseMemory(in); err != nil || got != want {
			t.Errorf("ParseMemory(%q) = %d, %v; want %d", in, got, err, want)
		}
	}
	if _, err := lang.ParseMemory("lots"); err == nil {
		t.Error("ParseMemory(\"lots\") accepted")
	}
}
