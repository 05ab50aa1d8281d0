package kernel

import (
	"strings"
	"sync"
)

// replayMemory is how many signatures the kernel remembers, as many as
// Jupyter's own session keeps (2^16): about 6 MB at most.
const replayMemory = 1 << 16

// replayGuard remembers the signatures of the latest messages acted on, so
// that a captured signed request sent again is refused. The oldest is
// forgotten first; memory stays bounded whatever arrives.
type replayGuard struct {
	mu   sync.Mutex
	seen map[string]struct{}
	ring []string
	next int
}

func newReplayGuard(n int) *replayGuard {
	return &replayGuard{seen: make(map[string]struct{}, n), ring: make([]string, n)}
}

// first records sig and reports whether it was new. Unsigned sessions (no
// key) have nothing to remember and every message is new.
func (g *replayGuard) first(sig []byte) bool {
	if len(sig) == 0 {
		return true
	}
	// A verified signature is the hex of the MAC; upper and lower case
	// spell the same MAC, so both count as the same signature.
	key := strings.ToLower(string(sig))
	g.mu.Lock()
	defer g.mu.Unlock()
	if _, ok := g.seen[key]; ok {
		return false
	}
	if old := g.ring[g.next]; old != "" {
		delete(g.seen, old)
	}
	g.ring[g.next] = key
	g.next = (g.next + 1) % len(g.ring)
	g.seen[key] = struct{}{}
	return true
}
