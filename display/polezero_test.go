package display

import (
	"bytes"
	"math"
	"math/cmplx"
	"strings"
	"testing"

	"lsys/lsys"
)

// A far point is marked where the ray from the origin towards it leaves
// the frame: on the frame's edge exactly, in the point's direction
// (common practice for off-scale marks).
func TestPoleZeroFarMarksOnFrameEdge(t *testing.T) {
	fr, _ := pzFrame([]complex128{-5404, complex(-28889, 41817), complex(-28889, -41817), -15811}, false).aspect(1.6)
	for _, p := range []complex128{-4.269e5, -1.99e6, complex(-3e5, 2e5), complex(-1e4, -9e5), complex(2e6, 1e6), complex(0, 5e6)} {
		e := fr.edge(p)
		onX := real(e) == fr.x0 || real(e) == fr.x1
		onY := imag(e) == fr.y0 || imag(e) == fr.y1
		if !onX && !onY {
			t.Errorf("far point %v marked at %v, not on the frame %+v", p, e, fr)
		}
		if real(e) < fr.x0 || real(e) > fr.x1 || imag(e) < fr.y0 || imag(e) > fr.y1 {
			t.Errorf("far point %v marked at %v, outside the frame %+v", p, e, fr)
		}
		if d := cmplx.Phase(e) - cmplx.Phase(p); math.Abs(d) > 1e-12 {
			t.Errorf("far point %v marked at %v, off its direction by %g rad", p, e, d)
		}
	}
	// labels of several far points on one spot do not overlap: a line
	// (6 % of the frame's height) apart, all inside the frame; nor do
	// those of points on nearby spots of the right edge
	var placed []rpText
	var ys []float64
	for k, p := range []complex128{-4.269e5, -7.214e5, -1.99e6} {
		l := fr.farLabel(fr.edge(p), rpFarLabel(p), placed)
		placed = append(placed, l)
		ys = append(ys, l.Y)
		if l.Y < fr.y0 || l.Y > fr.y1 || l.X < fr.x0 || l.X > fr.x1 {
			t.Errorf("label %d at (%g, %g) outside the frame %+v", k, l.X, l.Y, fr)
		}
	}
	for k := 1; k < len(ys); k++ {
		if math.Abs(ys[k]-ys[k-1]) < 0.05*(fr.y1-fr.y0) {
			t.Errorf("labels %d and %d only %g apart", k-1, k, ys[k]-ys[k-1])
		}
	}
	a := fr.farLabel(fr.edge(complex(3e5, 4e5)), "3e+05 + 4e+05j (off chart)", nil)
	b := fr.farLabel(fr.edge(complex(3e5, -4e5)), "3e+05 - 4e+05j (off chart)", []rpText{a})
	if math.Abs(a.Y-b.Y) < 0.05*(fr.y1-fr.y0) {
		t.Errorf("labels at (%g, %g) and (%g, %g) overlap", a.X, a.Y, b.X, b.Y)
	}
	// the frame holds the near points and is not more than a margin wider
	// than they are: -28889 ... 0 with 8 % margins, not -130000 ... 60000
	if fr.x0 > -28889 || fr.x0 < -28889*1.2 || fr.x1 < 0 || fr.x1 > 0.2*28889 {
		t.Errorf("frame %+v not fitted to the points' real parts", fr)
	}
}

// Equal scales are kept when they waste at most half the width; a
// square cloud of points keeps them (common practice).
func TestPoleZeroFrameAspect(t *testing.T) {
	fr, equal := pzFrame([]complex128{complex(-4.5, 2), complex(-4.5, -2), -1}, false).aspect(1.6)
	if !equal {
		t.Fatalf("frame %+v: equal scales dropped", fr)
	}
	if r := (fr.x1 - fr.x0) / (fr.y1 - fr.y0); math.Abs(r-1.6) > 1e-12 {
		t.Errorf("equal-scale frame has aspect %g, want 1.6", r)
	}
	if _, equal := pzFrame([]complex128{complex(-1, 60), complex(-1, -60)}, false).aspect(1.6); equal {
		t.Error("a tall narrow cloud keeps equal scales (would waste most of the width)")
	}
}

// Tick labels: a range across zero labels 0, every label of an axis has
// the same number of decimals, and no label reads "-0".
func TestLinTicksSymmetric(t *testing.T) {
	for _, r := range [][2]float64{{-75, 75}, {-130000, 60000}, {-0.75, 0.75}, {-2.2e6, 0.3e6}, {-4.1, 0.4}} {
		ticks := rpLinTicks{}.Ticks(r[0], r[1])
		zero, dec := false, -1
		for _, tk := range ticks {
			if tk.Label == "0" && tk.Value == 0 {
				zero = true
				continue
			}
			if strings.HasPrefix(tk.Label, "-0") && !strings.HasPrefix(tk.Label, "-0.") {
				t.Errorf("%v: label %q", r, tk.Label)
			}
			d := 0
			if i := strings.IndexByte(tk.Label, '.'); i >= 0 {
				d = len(tk.Label) - i - 1
			}
			if dec >= 0 && d != dec {
				t.Errorf("%v: labels with %d and %d decimals (%q)", r, dec, d, tk.Label)
			}
			dec = d
		}
		if !zero {
			t.Errorf("%v: no 0 label in %v", r, ticks)
		}
		if len(ticks) < 3 || len(ticks) > 8 {
			t.Errorf("%v: %d ticks", r, len(ticks))
		}
	}
}

// Same map, same bytes (SVG and PNG), far points and all.
func TestPoleZeroChartDeterministic(t *testing.T) {
	g, err := lsys.Realize([][]*lsys.Rational{{{Num: lsys.Poly{1e6, 1}, Den: lsys.Poly{13, 17, 5, 1}}}}, 0)
	if err != nil {
		t.Fatal(err)
	}
	pz, _ := lsys.PoleZero(g, []complex128{-1e6}, true)
	a := Render(pz, Options{PNG: true})
	b := Render(pz, Options{PNG: true})
	for _, k := range []string{SVG, PNG} {
		x, _ := a.Data[k].(string)
		y, _ := b.Data[k].(string)
		if x == "" || !bytes.Equal([]byte(x), []byte(y)) {
			t.Errorf("%s differs between two renderings (or is empty)", k)
		}
	}
}
