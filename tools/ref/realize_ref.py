#!/usr/bin/python3
"""Independent reference data for the realization of transfer functions.

Run with the system interpreter (numpy as a Debian package):

    /usr/bin/python3 tools/ref/realize_ref.py lsys/testdata/realize_ref.json

For a fixed set of badly scaled single-input single-output transfer
functions (denominator coefficients spreading over 1e5 to 1e32) it writes:
  - the coefficients of numerator and denominator in ascending powers, as
    the doubles numpy.poly produced from the roots below (written exactly,
    so lsys reads the very same polynomials),
  - the roots of the denominator by numpy.roots (eigenvalues of the
    companion matrix, computed independently of lsys),
  - the transfer function at a few frequencies by direct evaluation of the
    two polynomials (numpy.polyval at s = jw, or z = exp(jwT) when sampled),
  - the ratio of the largest to the smallest nonzero denominator coefficient.
The output is the same on every run (no randomness; floats printed by repr).
"""
import json
import sys

import numpy as np


def pair(wn, zeta):
    """A complex pair with natural frequency wn and damping ratio zeta."""
    re = -zeta * wn
    im = wn * np.sqrt(1 - zeta * zeta)
    return [complex(re, im), complex(re, -im)]


def butterworth(n, wc):
    """Poles of the order-n Butterworth filter with cutoff wc:
    wc * exp(j pi (2k + n - 1) / (2n)), k = 1..n (the textbook closed form)."""
    return [wc * np.exp(1j * np.pi * (2 * k + n - 1) / (2 * n)) for k in range(1, n + 1)]


CASES = [
    # name, gain, zeros, poles, sample time
    ("integrator and double pole at 1e5", 1e10, [], [0, -1e5, -1e5], 0),
    ("type-III compensator", 1000 * (6e5 / 15811.0) ** 2, [-15811.0, -15811.0], [0, -6e5, -6e5], 0),
    ("three decades apart", 1e9, [-30.0], [-1, -1e3, -1e6], 0),
    ("five real poles from 0.1 to 1e5, two zeros", 1e7, [-1, -1e4], [-0.1, -10, -1e3, -1e5, -3e5], 0),
    ("light pairs at 1 and 1e4 rad/s and a pole at 1e7", 1e15, [-100.0],
     pair(1, 0.01) + pair(1e4, 0.01) + [-1e7], 0),
    ("integrator, pairs at 10 and 3e5 rad/s, real pole at 2e7", 1e12, [-1e3, -5e4],
     [0] + pair(10, 0.2) + pair(3e5, 0.05) + [-2e7], 0),
    ("Butterworth order 8 at 1e4 rad/s", 1e32, [], butterworth(8, 1e4), 0),
    ("sampled: slow and fast poles in z", 0.02, [0.5], [0.999, 0.2, 0.6 + 0.3j, 0.6 - 0.3j], 1e-3),
]


def real_poly(roots):
    c = np.poly(np.array(roots, dtype=complex)) if roots else np.array([1.0])
    assert np.all(np.abs(np.imag(c)) <= 1e-9 * np.max(np.abs(c)))
    return np.real(c).astype(float)


def spread(c):
    a = np.abs(c[c != 0])
    return float(a.max() / a.min())


def main(path):
    out = []
    for name, k, zeros, poles, ts in CASES:
        num = k * real_poly(zeros)
        den = real_poly(poles)
        r = np.roots(den)
        r = sorted(r, key=lambda v: (abs(v), v.imag))
        mags = [abs(p) for p in poles if p != 0]
        if ts > 0:
            w = [0.1 / ts, 0.5 / ts, 2.0 / ts]
            x = [np.exp(1j * wk * ts) for wk in w]
        else:
            lo, hi = min(mags), max(mags)
            w = [lo / 10, np.sqrt(lo * hi), hi, hi * 10]
            for m in sorted(set(mags)):
                w.append(1.3 * m)
            w = sorted(set(float("%.6g" % v) for v in w))
            x = [1j * wk for wk in w]
        g = [complex(np.polyval(num, xk) / np.polyval(den, xk)) for xk in x]
        out.append({
            "name": name,
            "ts": ts,
            "num": [float(v) for v in num[::-1]],
            "den": [float(v) for v in den[::-1]],
            "spread": spread(den),
            "roots_re": [float(v.real) for v in r],
            "roots_im": [float(v.imag) for v in r],
            "w": [float(v) for v in w],
            "g_re": [float(v.real) for v in g],
            "g_im": [float(v.imag) for v in g],
        })
    with open(path, "w") as f:
        json.dump(out, f, indent=1)
        f.write("\n")


if __name__ == "__main__":
    main(sys.argv[1])
