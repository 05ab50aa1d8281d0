package lsys

import (
	"fmt"
	"math"
	"math/cmplx"
)

// unresolvedNote says which modes a continuous response with the given
// step does not resolve (fewer than 20 samples per period 2 pi/|s|), for
// a horizon given without a step (the step is then ours): the automatic
// choice says it in its rule, and an explicit until: of 1e6 s must not
// silently step over a 2 rad/s resonance. Empty when every mode is
// resolved.
func unresolvedNote(g *System, step float64) string {
	if g.Sampled() || !(step > 0) {
		return ""
	}
	limit := 2 * math.Pi / (20 * step)
	fastest, count := 0.0, 0
	for _, s := range continuousPoles(g) {
		w := cmplx.Abs(s)
		if w > limit && !math.IsInf(w, 0) {
			if imag(s) >= 0 { // a conjugate pair is one mode
				count++
			}
			fastest = math.Max(fastest, w)
		}
	}
	if count == 0 {
		return ""
	}
	per := 2 * math.Pi / fastest / step
	what := fmt.Sprintf("%d modes (a conjugate pair counted once) faster than %.3g rad/s are", count, limit)
	if count == 1 {
		what = fmt.Sprintf("1 mode faster than %.3g rad/s is", limit)
	}
	return fmt.Sprintf("%s not resolved by the step of %.3g s (the fastest, %.3g rad/s, gets %.2g samples per period, so its peaks and oscillations are missed): give a shorter until: or a step dt: of at most %.3g s",
		what, step, fastest, per, 2*math.Pi/fastest/20)
}

// ResolutionWarning is the note of unresolvedNote for a continuous
// response with a horizon given and the step left to us (empty
// otherwise), so that a front end can show it where it will be read: a
// chart shows no rule.
func ResolutionWarning(g *System, opt ResponseOptions) string {
	if g == nil || g.Sampled() || opt.Until == 0 || opt.Step != 0 {
		return ""
	}
	_, step, _, err := opt.grid(g)
	if err != nil {
		return ""
	}
	return unresolvedNote(g, step)
}
