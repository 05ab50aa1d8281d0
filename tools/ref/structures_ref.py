#!/usr/bin/python3
"""Independent reference data for the structural numerics of lsys.

Run with the system interpreter (numpy and scipy as Debian packages):

    /usr/bin/python3 tools/ref/structures_ref.py lsys/testdata/structures_ref.json

It writes:
  - dense cases: the generalized eigenvalues w^2 of K phi = w^2 M phi by
    scipy.linalg.eigh(K, M) for small models given in full (matrices with
    few digits, so they pass through JSON exactly);
  - sparse cases: the lowest eigenvalues of spring lattices (identical masses
    m and springs k along each axis, the face x = 0 tied to the ground, one
    DOF per node, node i + nx (j + ny l)), by scipy.sparse.linalg.eigsh with
    shift-and-invert at sigma = 0, a fixed start vector and tol = 0 (machine
    precision); the Go test builds the same lattice with lsys.SpringLattice;
  - the modal assurance criterion of two small sets of shapes.
Numbers are written with 12 significant digits.
"""
import json
import sys

import numpy as np
import scipy.linalg as sl
import scipy.sparse as sp
import scipy.sparse.linalg as sla

DIGITS = 12


def num(x):
    return float("%.*e" % (DIGITS - 1, x))


def lattice(dims, k, m):
    d = list(dims) + [1] * (3 - len(dims))
    nx, ny, nz = d
    n = nx * ny * nz
    rows, cols, vals = [], [], []
    diag = np.zeros(n)

    def idx(i, j, l):
        return i + nx * (j + ny * l)

    for l in range(nz):
        for j in range(ny):
            for i in range(nx):
                a = idx(i, j, l)
                if i == 0:
                    diag[a] += k
                for (ii, jj, ll) in ((i + 1, j, l), (i, j + 1, l), (i, j, l + 1)):
                    if ii >= nx or jj >= ny or ll >= nz:
                        continue
                    b = idx(ii, jj, ll)
                    diag[a] += k
                    diag[b] += k
                    rows += [a, b]
                    cols += [b, a]
                    vals += [-k, -k]
    K = sp.coo_matrix((vals, (rows, cols)), shape=(n, n)).tocsc() + sp.diags(diag).tocsc()
    M = sp.identity(n, format="csc") * m
    return K.tocsc(), M.tocsc()


def dense_cases():
    out = []
    # A three-storey frame (invented numbers).
    M = [[2000, 0, 0], [0, 2000, 0], [0, 0, 1500]]
    K = [[6e6, -3e6, 0], [-3e6, 5e6, -2e6], [0, -2e6, 2e6]]
    out.append(("frame", M, K))
    # A consistent (non-diagonal) mass: two bar elements, fixed at one end.
    M = [[4, 1], [1, 2]]
    K = [[2e3, -1e3], [-1e3, 1e3]]
    out.append(("bar2", M, K))
    # A fixed-free chain of 7 masses 1.5 and springs 400.
    n = 7
    K = np.zeros((n, n))
    for i in range(n):
        if i > 0:
            K[i, i] += 400
            K[i - 1, i - 1] += 400
            K[i, i - 1] = K[i - 1, i] = -400
    K[0, 0] += 400
    out.append(("chain7", (1.5 * np.eye(n)).tolist(), K.tolist()))
    cases = []
    for name, M, K in out:
        w2 = sl.eigh(np.array(K, float), np.array(M, float), eigvals_only=True)
        cases.append({"name": name, "M": M, "K": K, "lambda": [num(x) for x in w2]})
    return cases


def sparse_cases():
    cases = []
    for name, dims, k, m, count in (
        ("chain300", [300], 2e3, 0.7, 6),
        ("plate30x20", [30, 20], 1e4, 0.2, 12),
        ("solid8x7x6", [8, 7, 6], 5e3, 1.3, 10),
    ):
        K, M = lattice(dims, k, m)
        n = K.shape[0]
        vals = sla.eigsh(K, k=count, M=M, sigma=0, which="LM", v0=np.ones(n), tol=0, return_eigenvectors=False)
        cases.append({"name": name, "dims": dims, "k": k, "m": m, "count": count, "lambda": [num(x) for x in sorted(vals)]})
    return cases


def mac_case():
    A = np.array([[1, 0.5], [2, -1], [3, 0.25]])
    B = np.array([[1.1, 0.4, 0], [1.9, -1.2, 1], [3.2, 0.1, 0]])
    mac = np.zeros((2, 3))
    for i in range(2):
        for j in range(3):
            mac[i, j] = (A[:, i] @ B[:, j]) ** 2 / ((A[:, i] @ A[:, i]) * (B[:, j] @ B[:, j]))
    return {"A": A.tolist(), "B": B.tolist(), "mac": [[num(x) for x in r] for r in mac]}


def main():
    data = {"dense": dense_cases(), "sparse": sparse_cases(), "mac": mac_case()}
    with open(sys.argv[1], "w") as f:
        json.dump(data, f, indent=1, sort_keys=True)
        f.write("\n")


if __name__ == "__main__":
    main()
