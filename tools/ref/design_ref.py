#!/usr/bin/python3
"""Independent reference data for the design numerics of lsys.

Run with the system interpreter (numpy and scipy as Debian packages):

    /usr/bin/python3 tools/ref/design_ref.py lsys/testdata/design_ref.json

For fixed problems (fixed seeds, matrices rounded to 6 decimals so they pass
through JSON exactly) it writes:
  - Lyapunov solutions: A X + X A^T + Q = 0 by
    scipy.linalg.solve_continuous_lyapunov(A, -Q) and A X A^T - X + Q = 0 by
    scipy.linalg.solve_discrete_lyapunov(A, Q),
  - Sylvester solutions A X + X B = C by scipy.linalg.solve_sylvester,
  - stabilizing Riccati solutions by scipy.linalg.solve_continuous_are and
    solve_discrete_are, some with a cross term S (our N), one sampled case
    with a singular A (a delay chain),
  - H2 norms sqrt(trace(C P C^T)) and Hankel singular values
    sqrt(eig(P Q)) from those Lyapunov solutions (numpy.linalg.eigvals),
  - nonlinear simulations by scipy.integrate.solve_ivp (DOP853, rtol 1e-12,
    atol 1e-12) at fixed times.
Numbers are written with 12 significant digits so the file is the same on
every run.
"""
import json
import sys

import numpy as np
import scipy.integrate as si
import scipy.linalg as sl

DIGITS = 12


def num(x):
    return float("%.*e" % (DIGITS - 1, x))


def mat(a):
    return [[num(v) for v in row] for row in np.atleast_2d(a)]


def exact(a):
    return [[float(v) for v in row] for row in np.atleast_2d(a)]


def rounded(a):
    return np.round(np.asarray(a, dtype=float), 6)


def stable(seed, n, sampled):
    rng = np.random.RandomState(seed)
    A = rng.standard_normal((n, n)) / np.sqrt(n)
    if sampled:
        return rounded(0.45 * A)
    return rounded(A - 1.5 * np.eye(n))


def lyapunov_cases():
    out = []
    for seed, n in ((1, 3), (2, 8), (3, 20)):
        for sampled in (False, True):
            A = stable(seed, n, sampled)
            rng = np.random.RandomState(seed + 100)
            B = rounded(rng.standard_normal((n, 2)))
            Q = B @ B.T
            if sampled:
                X = sl.solve_discrete_lyapunov(A, Q)
            else:
                X = sl.solve_continuous_lyapunov(A, -Q)
            out.append({"name": "lyap_%d_%s" % (n, "d" if sampled else "c"), "sampled": sampled,
                        "A": exact(A), "B": exact(B), "X": mat(X)})
    return out


def sylvester_cases():
    out = []
    for seed, p, q in ((4, 3, 2), (5, 9, 5)):
        A = stable(seed, p, False)
        B = stable(seed + 1, q, False)
        rng = np.random.RandomState(seed + 200)
        C = rounded(rng.standard_normal((p, q)))
        out.append({"name": "sylv_%dx%d" % (p, q), "A": exact(A), "B": exact(B), "C": exact(C),
                    "X": mat(sl.solve_sylvester(A, B, C))})
    return out


def riccati_cases():
    out = []
    for seed, n, m, cross in ((6, 3, 1, False), (7, 8, 2, True), (8, 20, 3, False)):
        for sampled in (False, True):
            rng = np.random.RandomState(seed)
            A = rng.standard_normal((n, n)) / np.sqrt(n)
            A = rounded(0.9 * A if sampled else A - 0.2 * np.eye(n))
            B = rounded(rng.standard_normal((n, m)))
            C = rounded(rng.standard_normal((2, n)))
            Q = C.T @ C + 0.1 * np.eye(n)
            R = np.eye(m) * 0.5
            S = rounded(0.05 * rng.standard_normal((n, m))) if cross else None
            if sampled:
                X = sl.solve_discrete_are(A, B, Q, R, s=S)
            else:
                X = sl.solve_continuous_are(A, B, Q, R, s=S)
            case = {"name": "are_%d_%s%s" % (n, "d" if sampled else "c", "_cross" if cross else ""),
                    "sampled": sampled, "A": exact(A), "B": exact(B), "C": exact(C), "r": 0.5, "q": 0.1,
                    "X": mat(X)}
            if cross:
                case["N"] = exact(S)
            out.append(case)
    # A sampled delay chain: A nilpotent (singular), so the symplectic
    # matrix does not exist and lsys uses doubling.
    n = 4
    A = np.diag(np.ones(n - 1), 1)
    A[n - 1, 0] = 0.0
    B = np.zeros((n, 1))
    B[n - 1, 0] = 1.0
    C = np.zeros((2, n))
    C[0, 0] = 1.0
    C[1, 2] = 0.5
    Q = C.T @ C + 0.1 * np.eye(n)
    X = sl.solve_discrete_are(A, B, Q, 0.5 * np.eye(1))
    out.append({"name": "are_delay_chain_d", "sampled": True, "A": exact(A), "B": exact(B), "C": exact(C),
                "r": 0.5, "q": 0.1, "X": mat(X)})
    return out


def norm_cases():
    out = []
    for seed, n, sampled in ((9, 5, False), (10, 12, False), (11, 7, True)):
        A = stable(seed, n, sampled)
        rng = np.random.RandomState(seed + 300)
        B = rounded(rng.standard_normal((n, 2)))
        C = rounded(rng.standard_normal((2, n)))
        if sampled:
            P = sl.solve_discrete_lyapunov(A, B @ B.T)
            Qo = sl.solve_discrete_lyapunov(A.T, C.T @ C)
        else:
            P = sl.solve_continuous_lyapunov(A, -B @ B.T)
            Qo = sl.solve_continuous_lyapunov(A.T, -C.T @ C)
        hsv = np.sqrt(np.abs(np.linalg.eigvals(P @ Qo).real))
        out.append({"name": "norm_%d_%s" % (n, "d" if sampled else "c"), "sampled": sampled,
                    "A": exact(A), "B": exact(B), "C": exact(C),
                    "h2": num(np.sqrt(np.trace(C @ P @ C.T))), "hsv": [num(v) for v in sorted(hsv, reverse=True)]})
    return out


def ivp_cases():
    out = []
    # Pendulum theta'' = -(g/l) sin(theta) - c theta', from 2.5 rad at rest.
    def pendulum(t, x, w2=9.81, c=0.1):
        return [x[1], -w2 * np.sin(x[0]) - c * x[1]]
    ts = [0.5, 1.0, 2.0, 5.0, 10.0]
    sol = si.solve_ivp(pendulum, (0, 10), [2.5, 0.0], method="DOP853", rtol=1e-12, atol=1e-12, t_eval=ts)
    out.append({"name": "pendulum", "t": ts, "x": [[num(v) for v in sol.y[:, k]] for k in range(len(ts))]})
    # Van der Pol, mu = 2, from (2, 0).
    def vdp(t, x, mu=2.0):
        return [x[1], mu * (1 - x[0] ** 2) * x[1] - x[0]]
    sol = si.solve_ivp(vdp, (0, 10), [2.0, 0.0], method="DOP853", rtol=1e-12, atol=1e-12, t_eval=ts)
    out.append({"name": "van_der_pol", "t": ts, "x": [[num(v) for v in sol.y[:, k]] for k in range(len(ts))]})
    return out


def main():
    data = {"lyapunov": lyapunov_cases(), "sylvester": sylvester_cases(), "riccati": riccati_cases(),
            "norms": norm_cases(), "ivp": ivp_cases()}
    with open(sys.argv[1], "w") as f:
        json.dump(data, f, indent=1, sort_keys=True)
        f.write("\n")


if __name__ == "__main__":
    main()
