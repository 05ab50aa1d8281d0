#!/usr/bin/python3
"""Independent reference data for the loop-shape and dead-time numerics of lsys.

Run with the system interpreter (numpy and scipy as Debian packages):

    /usr/bin/python3 tools/ref/loops_ref.py lsys/testdata/loops_ref.json

For fixed loops (plant P and controller C as polynomials, ascending powers of
s, and a dead time T in the plant) it writes, with L = P C e^(-sT) evaluated
by scipy.signal.freqs:
  - the peaks of |S| = |1/(1 + L)|, |T| = |L/(1 + L)|, |P S| and |C S| and
    their frequencies: the largest value on a grid of 40,000 points per
    decade, refined by scipy.optimize.minimize_scalar (bounded) between the
    grid neighbours ("interior" false when it lies at an end of the grid: a
    limit, not a peak);
  - the gain crossover (|L| = 1) and the phase margin there, the first phase
    crossover (L negative real) and the gain margin there, each root by
    scipy.optimize.brentq (xtol 1e-14 relative).
Numbers are written with 12 significant digits so the file is the same on
every run.
"""
import json
import sys

import numpy as np
import scipy.optimize as so
import scipy.signal as ss

DIGITS = 12


def num(x):
    return float("%.*e" % (DIGITS - 1, x))


CASES = [
    # name, P num, P den, C num, C den, delay, decades (lo, hi)
    ("integrator and two lags, lead", [1.0], [0.0, 1.0, 1.1, 0.1], [3.0, 0.34], [1.0, 0.0425], 0.0, (-2, 3)),
    ("resonant plant, PI, delay", [4.0], [4.0, 0.4, 1.0], [0.05, 0.02], [0.0, 0.5], 0.1, (-3, 2)),
    ("lag plant, PID filtered, delay", [3.0], [1.0, 1.2, 0.2], [2.0, 2.35, 0.185], [0.0, 1.0, 0.025], 0.05, (-3, 3)),
]


def funcs(pn, pd, cn, cd, T):
    # scipy wants descending powers
    P = lambda w: ss.freqs(pn[::-1], pd[::-1], worN=np.atleast_1d(w))[1] * np.exp(-1j * np.atleast_1d(w) * T)
    C = lambda w: ss.freqs(cn[::-1], cd[::-1], worN=np.atleast_1d(w))[1]

    def four(w):
        p, c = P(w), C(w)
        l = p * c
        d = 1 + l
        return [1 / d, l / d, p / d, c / d]
    return P, C, four


def peak(f, w):
    m = np.abs(f(w))
    k = int(np.argmax(m))
    if 0 < k < len(w) - 1:
        r = so.minimize_scalar(lambda x: -np.abs(f(np.exp(x)))[0], bounds=(np.log(w[k - 1]), np.log(w[k + 1])),
                               method="bounded", options={"xatol": 1e-13})
        if -r.fun > m[k]:
            # The location of a smooth maximum is set only to about sqrt(u)
            # relative (the peak value to u): rounded to 7 digits, so a rerun
            # gives the same file (the Go test compares it to 1e-5).
            return -r.fun, float('%.7g' % np.exp(r.x)), True
        return m[k], w[k], True
    return m[k], w[k], False


def case(name, pn, pd, cn, cd, T, dec):
    P, C, four = funcs(pn, pd, cn, cd, T)
    w = np.logspace(dec[0], dec[1], 40000 * (dec[1] - dec[0]) + 1)
    peaks, at, interior = [], [], []
    for i in range(4):
        v, x, inside = peak(lambda ww, i=i: four(ww)[i], w)
        peaks.append(num(v))
        at.append(num(x))
        interior.append(inside)
    L = lambda ww: (P(ww) * C(ww))[0]
    lm = np.abs(P(w) * C(w))
    k = int(np.nonzero(np.diff(np.sign(np.log(lm))))[0][0])
    wgc = so.brentq(lambda x: np.log(np.abs(L(x))), w[k], w[k + 1], xtol=1e-14 * w[k], rtol=1e-15)
    pm = 180 + np.angle(L(wgc), deg=True)
    if pm > 180:
        pm -= 360
    lv = P(w) * C(w)
    idx = np.nonzero((np.diff(np.sign(lv.imag)) != 0) & (lv.real[:-1] < 0))[0]
    j = int(idx[0])
    wpc = so.brentq(lambda x: L(x).imag, w[j], w[j + 1], xtol=1e-14 * w[j], rtol=1e-15)
    gm = 1 / np.abs(L(wpc))
    return {"name": name, "plant_num": pn, "plant_den": pd, "ctrl_num": cn, "ctrl_den": cd, "delay": T,
            "peaks": peaks, "peak_w": at, "interior": interior, "gain_crossover": num(wgc), "phase_margin": num(pm),
            "phase_crossover": num(wpc), "gain_margin": num(gm)}


def main():
    out = {"cases": [case(*c) for c in CASES]}
    with open(sys.argv[1], "w") as f:
        json.dump(out, f, indent=1, sort_keys=True)
        f.write("\n")


if __name__ == "__main__":
    main()
