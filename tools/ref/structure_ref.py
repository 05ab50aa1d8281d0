#!/usr/bin/python3
"""Independent reference data for the structure numerics of lsys.

Run with the system interpreter (numpy and scipy as Debian packages):

    /usr/bin/python3 tools/ref/structure_ref.py lsys/testdata/structure_ref.json

For a fixed set of systems (fixed seeds, matrices rounded to 6 decimals so
they pass through JSON exactly) it writes:
  - eigenvalues of A (numpy.linalg.eigvals),
  - the eigenvalues of the diagonal blocks of the real Schur form
    (scipy.linalg.schur) and the orthogonal projector onto the invariant
    subspace of the stable eigenvalues (ordered Schur form, sort='lhp' or
    'iuc'), which is unique even though Schur vectors are not,
  - invariant zeros of square systems: the finite generalized eigenvalues of
    the Rosenbrock pencil ([[A, B], [C, D]], [[I, 0], [0, 0]]) by
    scipy.linalg.eig,
  - the eigenvalues at which [A - lI, B] or [A - lI; C] loses rank
    (smallest singular value below 1e-8 of the norm, with the columns of B
    and rows of C scaled to the size of A), by numpy's SVD,
  - exp(A t) for t = 0.5 (scipy.linalg.expm).
Numbers are written with 12 significant digits so the file is the same on
every run; lists of eigenvalues are sorted by real part, then imaginary part.
"""
import json
import sys

import numpy as np
import scipy.linalg as sl

DIGITS = 12


def num(x):
    return float("%.*e" % (DIGITS - 1, x))


def cnum(z):
    z = complex(z)
    return [num(z.real), num(z.imag)]


def csorted(vals):
    vals = [complex(v) for v in vals]
    # Round before sorting so that rounding noise cannot change the order.
    return sorted(vals, key=lambda z: (round(z.real, 8), round(z.imag, 8)))


def mat(a):
    return [[num(v) for v in row] for row in np.atleast_2d(a)]


def exact(a):
    """System matrices with every digit (shortest round-trip form), so the
    Go side reads exactly the matrices the reference used."""
    return [[float(v) for v in row] for row in np.atleast_2d(a)]


def rounded(a):
    return np.round(np.asarray(a, dtype=float), 6)


def orthogonal(rng, n):
    q, r = np.linalg.qr(rng.standard_normal((n, n)))
    return q * np.sign(np.diag(r))


def kalman_planted(seed, k, eig, m, p):
    """Kalman canonical form with parts of sizes k and real eigenvalues eig,
    hidden by an orthogonal similarity (Kalman 1963)."""
    rng = np.random.RandomState(seed)
    n = sum(k)
    off = np.cumsum([0] + list(k))
    allowed = {(0, 0), (0, 2), (1, 0), (1, 1), (1, 2), (1, 3), (2, 2), (3, 2), (3, 3)}
    A = np.zeros((n, n))
    for bi in range(4):
        for bj in range(4):
            if (bi, bj) not in allowed:
                continue
            blk = rng.standard_normal((k[bi], k[bj]))
            if bi == bj:
                blk = np.triu(blk, 1) + np.diag(eig[bi])
            A[off[bi]:off[bi + 1], off[bj]:off[bj + 1]] = blk
    B = np.zeros((n, m))
    B[: off[2], :] = rng.standard_normal((off[2], m))
    C = np.zeros((p, n))
    C[:, off[0]:off[1]] = rng.standard_normal((p, k[0]))
    C[:, off[2]:off[3]] = rng.standard_normal((p, k[2]))
    Q = orthogonal(rng, n)
    # Not rounded: rounding the hidden matrices would destroy the planted
    # structure. They are written with all their digits instead.
    return Q @ A @ Q.T, Q @ B, C @ Q.T, np.zeros((p, m))


def random_system(seed, n, m, p, shift, with_d):
    rng = np.random.RandomState(seed)
    A = rng.standard_normal((n, n)) - shift * np.eye(n)
    B = rng.standard_normal((n, m))
    C = rng.standard_normal((p, n))
    D = rng.standard_normal((p, m)) if with_d else np.zeros((p, m))
    return rounded(A), rounded(B), rounded(C), rounded(D)


def systems():
    out = []
    # A mass-spring-damper, m = 2, c = 1.6, k = 8.
    out.append(("mass_spring_damper", np.array([[0, 1], [-4, -0.8]]), np.array([[0], [0.5]]),
                np.array([[1, 0]]), np.zeros((1, 1)), 0.0))
    # The two-mass gimbal of the language notes: a rigid-body double
    # eigenvalue at 0 and one flexible pair.
    Jm, Jl, k, b = 2e-4, 6e-4, 3.1, 0.004
    A = np.array([[0, 1, 0, 0],
                  [-k / Jm, -b / Jm, k / Jm, b / Jm],
                  [0, 0, 0, 1],
                  [k / Jl, b / Jl, -k / Jl, -b / Jl]])
    out.append(("gimbal", rounded(A), np.array([[0], [1 / Jm], [0], [0]]), np.array([[0, 0, 0, 1]]),
                np.zeros((1, 1)), 0.0))
    out.append(("random_6x2x2", *random_system(1, 6, 2, 2, 2.0, False), 0.0))
    out.append(("random_10x3x3_d", *random_system(2, 10, 3, 3, 1.0, True), 0.0))
    out.append(("siso_4_d", *random_system(3, 4, 1, 1, 1.5, True), 0.0))
    out.append(("planted_8", *kalman_planted(4, (3, 2, 2, 1), ([-1, -2, -5], [-3, 2], [-0.5, -6], [-4]), 2, 2), 0.0))
    out.append(("planted_6_siso", *kalman_planted(5, (2, 1, 2, 1), ([-1, -3], [-2], [-4, 0.5], [-7]), 1, 1), 0.0))
    A, B, C, D = random_system(6, 5, 1, 1, 0.0, False)
    out.append(("sampled_5", rounded(A / 4), B, C, D, 0.1))
    out.append(("random_30x2x2", *random_system(7, 30, 2, 2, 3.0, False), 0.0))
    # A three-storey shear frame in SI units (kg, N, m): floors 20000 kg,
    # roof 10000 kg, storey stiffness 2e7 N/m, stiffness-proportional
    # damping 0.002 s; the floor-2 displacement seen from a shaker force on
    # the roof, and the same with the force in units 1e4 times smaller
    # (B x 1e4). Zeros must not depend on the units.
    m, mr, k, beta = 20000.0, 10000.0, 2e7, 0.002
    K = k * np.array([[2, -1, 0], [-1, 2, -1], [0, -1, 1]])
    Minv = np.diag([1 / m, 1 / m, 1 / mr])
    A = np.block([[np.zeros((3, 3)), np.eye(3)], [-Minv @ K, -beta * Minv @ K]])
    B = np.array([[0], [0], [0], [0], [0], [1 / mr]])
    C = np.array([[0, 1, 0, 0, 0, 0]])
    out.append(("frame_si_floor2_shaker", A, B, C, np.zeros((1, 1)), 0.0))
    out.append(("frame_si_floor2_shaker_x1e4", A, B * 1e4, C, np.zeros((1, 1)), 0.0))
    return out


def schur_block_values(T):
    n = T.shape[0]
    vals = []
    i = 0
    while i < n:
        if i + 1 < n and abs(T[i + 1, i]) > 0:
            vals.extend(np.linalg.eigvals(T[i:i + 2, i:i + 2]))
            i += 2
        else:
            vals.append(T[i, i])
            i += 1
    return vals


def rank_loss(A, X, side, tol_rel=1e-8):
    """Eigenvalues l where [A - l I, X] (side 'input') or [A - l I; X]
    ('output') has smallest singular value below tol_rel * norm."""
    n = A.shape[0]
    # Scale each input column (output row) to the root-mean-square column
    # norm of A: whether a mode is reached does not depend on the units of
    # the inputs and outputs, but a threshold relative to ||[A, X]|| does.
    ref_size = np.linalg.norm(A) / np.sqrt(n) or 1.0
    X = np.array(X, dtype=float)
    if side == "input":
        norms = np.linalg.norm(X, axis=0)
        X = X * np.where(norms > 0, ref_size / np.where(norms > 0, norms, 1), 1)
    else:
        norms = np.linalg.norm(X, axis=1)
        X = X * np.where(norms > 0, ref_size / np.where(norms > 0, norms, 1), 1)[:, None]
    lost = []
    for l in np.linalg.eigvals(A):
        if side == "input":
            M = np.hstack([A - l * np.eye(n), X])
            ref = np.linalg.norm(np.hstack([A, X]))
        else:
            M = np.vstack([A - l * np.eye(n), X])
            ref = np.linalg.norm(np.vstack([A, X]))
        s = np.linalg.svd(M, compute_uv=False)
        if s[n - 1] < tol_rel * ref:
            lost.append(l)
    return lost


def main(path):
    data = {"digits": DIGITS, "systems": []}
    for name, A, B, C, D, ts in systems():
        A, B, C, D = (np.asarray(x, dtype=float) for x in (A, B, C, D))
        n, m, p = A.shape[0], B.shape[1], C.shape[0]
        rec = {"name": name, "ts": ts, "A": exact(A), "B": exact(B), "C": exact(C), "D": exact(D)}
        rec["eigenvalues"] = [cnum(v) for v in csorted(np.linalg.eigvals(A))]
        T, Z = sl.schur(A, output="real")
        rec["schur_values"] = [cnum(v) for v in csorted(schur_block_values(T))]
        sort = "iuc" if ts > 0 else "lhp"
        Ts, Zs, k = sl.schur(A, output="real", sort=sort)
        rec["stable_dim"] = int(k)
        P = Zs[:, :k] @ Zs[:, :k].T if k > 0 else np.zeros((n, n))
        rec["stable_projector"] = mat(P)
        if m == p:
            PA = np.block([[A, B], [C, D]])
            PE = np.block([[np.eye(n), np.zeros((n, m))], [np.zeros((p, n)), np.zeros((p, m))]])
            w, = (sl.eig(PA, PE, right=False, homogeneous_eigvals=True),)
            alpha, beta = w[0], w[1]
            fin = [a / b for a, b in zip(alpha, beta) if abs(b) > 1e-9 * max(1.0, abs(a))]
            rec["zeros"] = [cnum(v) for v in csorted(fin)]
        rec["uncontrollable"] = [cnum(v) for v in csorted(rank_loss(A, B, "input"))]
        rec["unobservable"] = [cnum(v) for v in csorted(rank_loss(A, C, "output"))]
        rec["expm_t"] = 0.5
        rec["expm"] = mat(sl.expm(A * 0.5))
        data["systems"].append(rec)
    text = json.dumps(data, indent=1, sort_keys=True)
    with open(path, "w") as f:
        f.write(text + "\n")


if __name__ == "__main__":
    if len(sys.argv) != 2:
        sys.exit("usage: structure_ref.py OUTPUT.json")
    main(sys.argv[1])
