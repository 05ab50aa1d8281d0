package lsys

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/mat"
)

// Controller building blocks with physical parameters, as transfer
// functions in s. Each has an equivalent equation block, written in the
// doc comment, that the tests hold to the rational form.

func positive(name string, v float64) error {
	if !(v > 0) || math.IsInf(v, 0) {
		return fmt.Errorf("%s must be a finite number > 0, got %v", name, v)
	}
	return nil
}

// ThreeTerm returns the proportional-integral-derivative controller with a
// filtered derivative, in the parallel form with times:
//
//	C(s) = kp (1 + 1/(ti s) + td s / (td/n s + 1))
//
// ti is the integral time (s; +Inf: no integral action), td the
// derivative time (s; 0: no derivative action) and n the ratio of td to
// the derivative filter's time constant (common practice: 5 to 20). The
// equivalent equation block, with tf = td/n:
//
//	integral' = e/ti
//	filtered' = (e - filtered)/tf
//	u = kp*(e + integral + td*(e - filtered)/tf)
func ThreeTerm(kp, ti, td, n float64) (*Rational, error) {
	if math.IsNaN(kp) || math.IsInf(kp, 0) {
		return nil, fmt.Errorf("the gain must be a finite number, got %v", kp)
	}
	if !(ti > 0) {
		return nil, fmt.Errorf("the integral time must be > 0 s (inf for no integral action), got %v", ti)
	}
	if !(td >= 0) || math.IsInf(td, 0) {
		return nil, fmt.Errorf("the derivative time must be a finite number >= 0 s (0 for no derivative action), got %v", td)
	}
	if err := positive("the derivative filter ratio", n); err != nil {
		return nil, err
	}
	c := Constant(1)
	var err error
	if !math.IsInf(ti, 1) {
		// 1/(ti s)
		if c, err = c.Add(&Rational{Num: Poly{1}, Den: Poly{0, ti}}); err != nil {
			return nil, err
		}
	}
	if td > 0 {
		// td s / (tf s + 1)
		if c, err = c.Add(&Rational{Num: Poly{0, td}, Den: Poly{1, td / n}}); err != nil {
			return nil, err
		}
	}
	return (&Rational{Num: c.Num.Scale(kp), Den: c.Den}).Normalize()
}

// LeadLag returns the first-order section that shifts the phase by phase
// degrees at w rad/s, the most it shifts anywhere, with gain |C(jw)| = k:
//
//	C(s) = k sqrt(a) (s/wz + 1)/(s/wp + 1),  a = (1 - sin phase)/(1 + sin phase),
//	wz = w sqrt(a),  wp = w/sqrt(a)
//
// (the zero and pole placed symmetrically about w on a log scale; common
// practice). A positive phase is a lead (wz < wp), a negative one a lag.
// The phase must lie strictly between -90 and 90 degrees. The equivalent
// equation block: x' = wp*(e - x); u = k*sqrt(a)*(wp/wz*e + (1 - wp/wz)*x).
func LeadLag(w, phase, k float64) (*Rational, error) {
	if err := positive("the frequency", w); err != nil {
		return nil, err
	}
	if !(phase > -90 && phase < 90) {
		return nil, fmt.Errorf("the phase shift must lie strictly between -90 and 90 degrees, got %v", phase)
	}
	if math.IsNaN(k) || math.IsInf(k, 0) {
		return nil, fmt.Errorf("the gain must be a finite number, got %v", k)
	}
	wz, wp, a := LeadLagCorners(w, phase)
	g := k * math.Sqrt(a)
	return (&Rational{Num: Poly{g, g / wz}, Den: Poly{1, 1 / wp}}).Normalize()
}

// LeadLagCorners returns the zero and pole frequencies (rad/s) and the
// ratio a = wz/wp of LeadLag(w, phase, k).
func LeadLagCorners(w, phase float64) (wz, wp, a float64) {
	sn := math.Sin(phase * math.Pi / 180)
	a = (1 - sn) / (1 + sn)
	return w * math.Sqrt(a), w / math.Sqrt(a), a
}

// Notch returns the second-order section that attenuates to depth (a
// ratio, 0 <= depth < 1) at w rad/s, with unit gain far from w:
//
//	C(s) = (s^2 + 2 zz w s + w^2)/(s^2 + 2 zp w s + w^2),  zp = width/2,  zz = depth zp
//
// width is the relative width of the notch: about (w2 - w1)/w between the
// frequencies where the attenuation is 3 dB, when width is small. At s =
// jw the ratio is exactly zz/zp = depth. The equivalent equation block:
// a' = b; b' = e - w^2*a - 2*zp*w*b; u = e + 2*(zz - zp)*w*b.
func Notch(w, depth, width float64) (*Rational, error) {
	if err := positive("the frequency", w); err != nil {
		return nil, err
	}
	if !(depth >= 0 && depth < 1) {
		return nil, fmt.Errorf("the depth is the gain at the notch, a ratio from 0 up to (not including) 1, got %v (-20 dB is 0.1)", depth)
	}
	if !(width > 0 && width <= 4) {
		return nil, fmt.Errorf("the width is relative to the frequency, a number > 0 and at most 4, got %v", width)
	}
	zp := width / 2
	zz := depth * zp
	return &Rational{Num: Poly{w * w, 2 * zz * w, 1}, Den: Poly{w * w, 2 * zp * w, 1}}, nil
}

// LowPass returns the low-pass section of unit steady-state gain with
// corner w rad/s: w/(s + w) for order 1, w^2/(s^2 + 2 z w s + w^2) for
// order 2 (z the damping ratio; 1/sqrt(2) is the maximally flat choice).
// Equivalent equation blocks: x' = w*(e - x), u = x; and a' = b,
// b' = w^2*(e - a) - 2*z*w*b, u = a.
func LowPass(w float64, order int, z float64) (*Rational, error) {
	if err := positive("the corner frequency", w); err != nil {
		return nil, err
	}
	switch order {
	case 1:
		return &Rational{Num: Poly{w}, Den: Poly{w, 1}}, nil
	case 2:
		if !(z > 0) || math.IsInf(z, 0) {
			return nil, fmt.Errorf("the damping ratio must be a finite number > 0, got %v", z)
		}
		return &Rational{Num: Poly{w * w}, Den: Poly{w * w, 2 * z * w, 1}}, nil
	}
	return nil, fmt.Errorf("the order must be 1 or 2, got %d (cascade sections for more)", order)
}

// The same blocks as state-space systems in the form of the equation
// blocks in the comments above: the states the firmware would keep
// (integral, filtered, ...), input "e" and output "u".

func blockSystem(A, B, C, D []float64, n int, states []string) (*System, error) {
	var a, b, c *mat.Dense
	if n > 0 {
		a, b, c = mat.NewDense(n, n, A), mat.NewDense(n, 1, B), mat.NewDense(1, n, C)
	}
	s, err := NewSystem(n, 1, 1, a, b, c, mat.NewDense(1, 1, D), 0)
	if err != nil {
		return nil, err
	}
	return s.WithNames(states, []string{"e"}, []string{"u"})
}

// ThreeTermBlock is ThreeTerm as its equation block: states integral
// (without integral action: none) and filtered (without derivative: none).
func ThreeTermBlock(kp, ti, td, n float64) (*System, error) {
	if _, err := ThreeTerm(kp, ti, td, n); err != nil {
		return nil, err
	}
	var A, B, C []float64
	var states []string
	integral, deriv := !math.IsInf(ti, 1), td > 0
	tf := td / n
	D := kp
	if deriv {
		D += kp * td / tf
	}
	k := 0
	if integral {
		k++
	}
	if deriv {
		k++
	}
	A = make([]float64, k*k)
	i := 0
	if integral {
		B, C, states = append(B, 1/ti), append(C, kp), append(states, "integral")
		i++
	}
	if deriv {
		A[i*k+i] = -1 / tf
		B, C, states = append(B, 1/tf), append(C, -kp*td/tf), append(states, "filtered")
	}
	return blockSystem(A, B, C, []float64{D}, k, states)
}

// LeadLagBlock is LeadLag as its equation block (state x).
func LeadLagBlock(w, phase, k float64) (*System, error) {
	if _, err := LeadLag(w, phase, k); err != nil {
		return nil, err
	}
	wz, wp, a := LeadLagCorners(w, phase)
	g := k * math.Sqrt(a)
	return blockSystem([]float64{-wp}, []float64{wp}, []float64{g * (1 - wp/wz)}, []float64{g * wp / wz}, 1, []string{"x"})
}

// NotchBlock is Notch as its equation block (states a, b).
func NotchBlock(w, depth, width float64) (*System, error) {
	if _, err := Notch(w, depth, width); err != nil {
		return nil, err
	}
	zp := width / 2
	zz := depth * zp
	return blockSystem([]float64{0, 1, -w * w, -2 * zp * w}, []float64{0, 1}, []float64{0, 2 * (zz - zp) * w}, []float64{1}, 2, []string{"a", "b"})
}

// LowPassBlock is LowPass as its equation block (state x; or a, b).
func LowPassBlock(w float64, order int, z float64) (*System, error) {
	if _, err := LowPass(w, order, z); err != nil {
		return nil, err
	}
	if order == 1 {
		return blockSystem([]float64{-w}, []float64{w}, []float64{1}, []float64{0}, 1, []string{"x"})
	}
	return blockSystem([]float64{0, 1, -w * w, -2 * z * w}, []float64{0, w * w}, []float64{1, 0}, []float64{0}, 2, []string{"a", "b"})
}
