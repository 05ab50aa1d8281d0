#!/usr/bin/python3
"""scipy's side of bench/structures.sh: the lowest 20 modes of a spring
lattice (tools/ref/structures_ref.py builds it exactly as
lsys.SpringLattice does) by scipy.sparse.linalg.eigsh, shift-and-invert at
sigma = 0 (a general sparse LU, SuperLU). Prints seconds and the peak
resident memory of the process."""
import os
import resource
import sys
import time

import numpy as np
import scipy.sparse.linalg as sla

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "tools", "ref"))
from structures_ref import lattice  # noqa: E402

dims = [int(x) for x in sys.argv[1].split("x")]
K, M = lattice(dims, 1.0, 1.0)
t0 = time.perf_counter()
c0 = time.process_time()
vals = sla.eigsh(K, k=20, M=M, sigma=0, which="LM", v0=np.ones(K.shape[0]))
dt = time.perf_counter() - t0
cpu = time.process_time() - c0
rss = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024
print("scipy %s n=%d: %.2f s (CPU %.2f s), peak RSS %.0f MB, lowest w^2 %.10g" % (sys.argv[1], K.shape[0], dt, cpu, rss, min(vals[0])))
