package kernel

import "testing"

func TestGlobMatch(t *testing.T) {
	// Expected values follow SQLite's GLOB, which IPython's history search
	// uses (from the SQLite documentation of GLOB, checked by hand).
	cases := []struct {
		pattern, s string
		want       bool
	}{
		{"*", "", true},
		{"*", "a/b\nc", true},
		{"*/*", "x = a/b", true}, // path.Match: false
		{"a/*", "a/b/c", true},   // path.Match: false
		{"*load(*", "sys = load(\"plants/arm.lsys\")", true},
		{"?", "é", true},
		{"??", "é", false},
		{"a?c", "a/c", true},
		{"[abc]x", "bx", true},
		{"[abc]x", "dx", false},
		{"[^abc]x", "dx", true},
		{"[^abc]x", "ax", false},
		{"[a-c]", "b", true},
		{"[a-c]", "d", false},
		{"[]]", "]", true},
		{"[^]]", "]", false},
		{"[a-]", "-", true},
		{"[", "[", true},
		{"a[", "a[", true},
		{"*.lsys", "model.lsys", true},
		{"*.lsys", "model.lsysx", false},
		{"A*", "a", false},
		{`\*`, `\x`, true}, // no escape character
		{"*a*a*a*a*a*b", "aaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaa", false},
	}
	for _, c := range cases {
		if got := globMatch(c.pattern, c.s); got != c.want {
			t.Errorf("globMatch(%q, %q) = %v; want %v", c.pattern, c.s, got, c.want)
		}
	}
}

func TestReplayGuardBounded(t *testing.T) {
	g := newReplayGuard(3)
	for _, s := range []string{"aa", "bb", "cc"} {
		if !g.first([]byte(s)) {
			t.Fatalf("%s reported as seen on first use", s)
		}
	}
	if g.first([]byte("aa")) || g.first([]byte("BB")) {
		t.Fatal("a signature seen before (in either case) was accepted again")
	}
	g.first([]byte("dd")) // forgets "aa", the oldest
	if !g.first([]byte("aa")) {
		t.Fatal("the oldest signature was not forgotten")
	}
	if len(g.seen) != 3 {
		t.Fatalf("guard holds %d signatures; want 3", len(g.seen))
	}
	if !g.first(nil) || !g.first(nil) {
		t.Fatal("unsigned messages must always pass")
	}
}
