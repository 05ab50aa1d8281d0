#!/usr/bin/python3
"""Independent reference data for the response numerics of lsys.

Run with the system interpreter (numpy and scipy as Debian packages):

    /usr/bin/python3 tools/ref/response_ref.py lsys/testdata/response_ref.json

For a fixed set of random stable systems (fixed seeds, entries rounded to 6
decimals so they pass through JSON exactly) it writes:
  - exp(A t) for t = 0.7 (scipy.linalg.expm),
  - the zero-order-hold, first-order-hold and bilinear (Tustin) sampled
    systems for a period T (scipy.signal.cont2discrete with methods 'zoh',
    'foh' and 'bilinear'),
  - the frequency response G(jw) = C (jwI - A)^-1 B + D on a log grid, by a
    dense complex solve per frequency (numpy.linalg.solve), and the response
    of the ZOH-sampled system at z = exp(jwT),
  - the step response at a few times from the closed form
    y(t) = C A^-1 (exp(A t) - I) B + D (A is invertible: the systems are
    stable), independent of any time stepping.
Numbers are written with 12 significant digits so the file is the same on
every run.
"""
import json
import sys

import numpy as np
import scipy.linalg as sl
import scipy.signal as ss

DIGITS = 12


def num(x):
    return float("%.*e" % (DIGITS - 1, x))


def mat(a):
    return [[num(v) for v in row] for row in np.atleast_2d(a)]


def exact(a):
    return [[float(v) for v in row] for row in np.atleast_2d(a)]


def rounded(a):
    return np.round(np.asarray(a, dtype=float), 6)


def random_stable(seed, n, m, p):
    rng = np.random.default_rng(seed)
    A = rng.standard_normal((n, n)) / np.sqrt(n)
    # shift so the slowest eigenvalue has real part -0.3
    A = A - (max(np.linalg.eigvals(A).real) + 0.3) * np.eye(n)
    B = rng.standard_normal((n, m))
    C = rng.standard_normal((p, n))
    D = rng.standard_normal((p, m)) * 0.1
    A = rounded(A)
    # rounding may move eigenvalues a little; they stay well left of 0
    assert max(np.linalg.eigvals(A).real) < -0.2
    return A, rounded(B), rounded(C), rounded(D)


def freq(A, B, C, D, w):
    n = A.shape[0]
    re, im = [], []
    for wk in w:
        G = C @ np.linalg.solve(1j * wk * np.eye(n) - A, B) + D
        re.append([num(v) for v in G.real.ravel()])
        im.append([num(v) for v in G.imag.ravel()])
    return re, im


def dfreq(A, B, C, D, w, T):
    n = A.shape[0]
    re, im = [], []
    for wk in w:
        z = np.exp(1j * wk * T)
        G = C @ np.linalg.solve(z * np.eye(n) - A, B) + D
        re.append([num(v) for v in G.real.ravel()])
        im.append([num(v) for v in G.imag.ravel()])
    return re, im


def main(path):
    cases = [
        ("first", 1, 1, 1, 1, 0.1),
        ("pair", 2, 2, 1, 1, 0.05),
        ("four", 3, 4, 1, 2, 0.2),
        ("six", 4, 6, 2, 2, 0.1),
        ("ten", 5, 10, 2, 1, 0.05),
        ("twenty", 6, 20, 1, 1, 0.02),
    ]
    out = {"systems": []}
    w = np.logspace(-2, 2, 25)
    tstep = [0.25, 1.0, 3.0, 10.0]
    for name, seed, n, m, p, T in cases:
        A, B, C, D = random_stable(seed, n, m, p)
        sysd = {}
        for method in ("zoh", "foh", "bilinear"):
            Ad, Bd, Cd, Dd, _ = ss.cont2discrete((A, B, C, D), T, method=method)
            sysd[method] = {"A": mat(Ad), "B": mat(Bd), "C": mat(Cd), "D": mat(Dd)}
        re, im = freq(A, B, C, D, w)
        Ad, Bd, _, _, _ = ss.cont2discrete((A, B, C, D), T, method="zoh")
        wd = [wk for wk in w if wk < np.pi / T]
        dre, dim = dfreq(Ad, Bd, C, D, wd, T)
        Ainv = np.linalg.inv(A)
        steps = []
        for t in tstep:
            y = C @ Ainv @ (sl.expm(A * t) - np.eye(n)) @ B + D
            steps.append([num(v) for v in y.ravel()])
        out["systems"].append({
            "name": name, "seed": seed, "T": T,
            "A": exact(A), "B": exact(B), "C": exact(C), "D": exact(D),
            "expm_t": 0.7, "expm": mat(sl.expm(A * 0.7)),
            "zoh": sysd["zoh"], "foh": sysd["foh"], "tustin": sysd["bilinear"],
            "w": [num(v) for v in w], "freq_re": re, "freq_im": im,
            "wd": [num(v) for v in wd], "dfreq_re": dre, "dfreq_im": dim,
            "step_t": tstep, "step": steps,
        })
    with open(path, "w") as f:
        json.dump(out, f, indent=1)
        f.write("\n")


if __name__ == "__main__":
    main(sys.argv[1] if len(sys.argv) > 1 else "lsys/testdata/response_ref.json")
