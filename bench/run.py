"""Side-by-side timings of lsys and numpy/scipy (see bench/run --help).

One run times, on the same random lightly damped models, each computation
in lsys in-process (bench/inproc, pure Go and, when it builds, the LAPACK
backend), in lsys through its Jupyter kernel, and in numpy/scipy; then the
kernel's start-up and a trivial cell against Debian's Python kernel. Each
figure is the median of several repetitions; ratios are lsys / reference
(below 1: lsys is faster). Run with Debian's /usr/bin/python3.
"""

import argparse
import json
import os
import platform
import shutil
import statistics
import subprocess
import sys
import tempfile
import time

import numpy as np
import scipy
import scipy.linalg as sla

TOP = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))
OPS = ["modes", "eigen", "schur", "exp", "lyapunov", "riccati", "zeros", "step", "frequency"]
WHAT = {
    "modes": ("`modes` (mode table)", "numpy eig"),
    "eigen": ("`eigen` (values, left and right vectors)", "scipy eig, left and right"),
    "schur": ("real Schur form", "scipy schur"),
    "exp": ("`exp` of A", "scipy expm"),
    "lyapunov": ("`lyapunov` A X + X A' + B B' = 0", "scipy solve_continuous_lyapunov"),
    "riccati": ("`riccati`, Q = I, R = 1", "scipy solve_continuous_are"),
    "zeros": ("`zeros`", "scipy QZ of the system pencil"),
    "step": ("step response, 10,000 samples", "numpy ZOH loop"),
    "frequency": ("frequency response, 1000 frequencies", "numpy dense solve per frequency"),
}
# The largest order each computation is timed at (the rest is too slow
# for a benchmark run on a shared 2-core machine).
CAP = {"lyapunov": 500, "riccati": 500, "zeros": 500}
# The environment variables that pin OpenBLAS to another processor's
# kernel: unset for the benchmark commands alone, never for tests.
PIN = ("OPENBLAS_CORETYPE", "OPENBLAS_L2_SIZE")


def model(n, seed=17):
    """A random lightly damped SISO model of order n: modes at 0.5 to 50
    rad/s with damping ratios 0.5% to 5% (a real pole when n is odd),
    in coordinates mixed by a well-conditioned random transformation."""
    rng = np.random.default_rng(seed + n)
    M = np.zeros((n, n))
    wn = np.geomspace(0.5, 50, n // 2) if n >= 2 else []
    zeta = rng.uniform(0.005, 0.05, len(wn))
    for k, (w, z) in enumerate(zip(wn, zeta)):
        i = 2 * k
        M[i, i + 1] = 1
        M[i + 1, i] = -w * w
        M[i + 1, i + 1] = -2 * z * w
    if n % 2:
        M[n - 1, n - 1] = -1
    T = np.eye(n) + 0.3 * rng.standard_normal((n, n)) / np.sqrt(n)
    A = T @ M @ np.linalg.inv(T)
    B = rng.standard_normal((n, 1))
    C = rng.standard_normal((1, n))
    return A, B, C


def grid():
    return np.logspace(-1, 2, 1000)


def numpy_cases(A, B, C):
    n = A.shape[0]
    I = np.eye(n)

    def step():
        h, N = 0.001, 10000
        M = np.zeros((n + 1, n + 1))
        M[:n, :n], M[:n, n:] = A * h, B * h
        E = sla.expm(M)
        Phi, Gam = E[:n, :n], E[:n, n]
        x, y = np.zeros(n), np.empty(N + 1)
        for k in range(N + 1):
            y[k] = C[0] @ x
            x = Phi @ x + Gam
        return y

    def freq():
        return [C @ np.linalg.solve(1j * w * I - A, B) for w in grid()]

    def zeros():
        P = np.block([[A, B], [C, np.zeros((1, 1))]])
        Q = np.zeros_like(P)
        Q[:n, :n] = I
        v = sla.eigvals(P, Q)
        return v[np.isfinite(v)]

    return {
        "modes": lambda: np.linalg.eig(A),
        "eigen": lambda: sla.eig(A, left=True, right=True),
        "schur": lambda: sla.schur(A),
        "exp": lambda: sla.expm(A),
        "lyapunov": lambda: sla.solve_continuous_lyapunov(A, -B @ B.T),
        "riccati": lambda: sla.solve_continuous_are(A, B, I, np.eye(1)),
        "zeros": zeros,
        "step": step,
        "frequency": freq,
    }


def numpy_worker(d, sizes, reps, ops):
    """Runs in a child with OPENBLAS_* unset; prints JSON lines as inproc does."""
    try:
        import threadpoolctl
        info = [(i.get("internal_api"), i.get("version"), i.get("architecture"), i.get("num_threads"))
                for i in threadpoolctl.threadpool_info()]
    except ImportError:
        info = "threadpoolctl not installed"
    print(json.dumps({"backend": "numpy %s, scipy %s" % (np.__version__, scipy.__version__), "blas": info}), flush=True)
    for n, r in zip(sizes, reps):
        A = np.fromfile(os.path.join(d, "A%d.bin" % n)).reshape(n, n)
        B = np.fromfile(os.path.join(d, "B%d.bin" % n)).reshape(n, 1)
        C = np.fromfile(os.path.join(d, "C%d.bin" % n)).reshape(1, n)
        for op, f in numpy_cases(A, B, C).items():
            if op not in ops or n > CAP.get(op, n):
                continue
            secs = []
            for _ in range(r):
                t = time.perf_counter()
                f()
                secs.append(time.perf_counter() - t)
            print(json.dumps({"op": op, "n": n, "seconds": secs}), flush=True)


def unpinned():
    env = dict(os.environ)
    for k in PIN:
        env.pop(k, None)
    return env


def lines(cmd, env=None):
    out = subprocess.run(cmd, env=env, check=True, stdout=subprocess.PIPE, cwd=TOP).stdout.decode()
    return [json.loads(l) for l in out.splitlines() if l.strip()]


def collect(rows, into, who):
    head = rows[0]
    for r in rows[1:]:
        into[(who, r["op"], r["n"])] = statistics.median(r["seconds"])
    return head


# --- the kernel ------------------------------------------------------------

def kernel_times(tmp, sizes, quick, results, log):
    from jupyter_client import KernelManager

    lsysbin = os.path.join(tmp, "lsys")
    subprocess.run(["go", "build", "-o", lsysbin, "."], cwd=TOP, check=True)
    subprocess.run([lsysbin, "kernelspec", "--prefix", os.path.join(tmp, "p")], check=True, stdout=subprocess.DEVNULL)
    os.environ["JUPYTER_PATH"] = os.path.join(tmp, "p", "share", "jupyter")
    os.environ["PYDEVD_DISABLE_FILE_VALIDATION"] = "1"

    def start(name):
        t = time.perf_counter()
        km = KernelManager(kernel_name=name)
        km.start_kernel()
        kc = km.client()
        kc.start_channels()
        msg = kc.kernel_info()
        while True:
            reply = kc.get_shell_msg(timeout=60)
            if reply["parent_header"].get("msg_id") == msg:
                break
        dt = time.perf_counter() - t
        # Not timed: until iopub's subscription is through, a cell's
        # output and idle status can be lost (ZeroMQ's slow joiner).
        kc.wait_for_ready(timeout=60)
        return dt, km, kc

    def run(kc, code, timeout=600):
        t = time.perf_counter()
        reply = kc.execute_interactive(code, timeout=timeout, output_hook=lambda m: None)
        dt = time.perf_counter() - t
        if reply["content"]["status"] != "ok":
            raise RuntimeError("cell failed: %s: %s" % (code[:60], reply["content"].get("evalue")))
        return dt

    def stop(km, kc):
        kc.stop_channels()
        km.shutdown_kernel(now=True)

    starts = {"lsys": [], "python3": []}
    trivial = {"lsys": [], "python3": []}
    for _ in range(3 if quick else 7):
        for name in ("lsys", "python3"):
            dt, km, kc = start(name)
            starts[name].append(dt)
            run(kc, "1", 60)  # the first cell pays for lazy set-up; not counted
            trivial[name] += [run(kc, "1", 60) for _ in range(5)]
            stop(km, kc)
    for name in starts:
        results[("kernel", "start-up", name)] = statistics.median(starts[name])
        results[("kernel", "trivial cell", name)] = statistics.median(trivial[name])
    log("kernel start-up and trivial cell timed")

    # Cells through the lsys kernel, less a trivial cell's round trip:
    # what a notebook user waits for, rendering included.
    _, km, kc = start("lsys")
    try:
        base = results[("kernel", "trivial cell", "lsys")]
        cells = {"modes": "modes(G)", "exp": "exp(A)", "step": "response(G, step, until: 10, dt: 0.001)",
                 "frequency": "frequency(G)"}  # its own grid, refined at resonances
        for n in sizes:
            if n > 500:
                continue
            A, B, C = (np.fromfile(os.path.join(tmp, "%s%d.bin" % (x, n))) for x in "ABC")
            A = A.reshape(n, n)

            def lit(M):
                return "[" + ", ".join("[" + ", ".join(repr(float(v)) for v in row) + "]" for row in M) + "]"

            vec = lambda v: "[" + ", ".join(repr(float(x)) for x in v) + "]"
            run(kc, "A = %s\nG = system(A, %s, %s)\n1" % (lit(A), vec(B), vec(C)))
            for op, code in cells.items():
                r = 1 if n >= 500 or quick else 3
                secs = [run(kc, code) - base for _ in range(r)]
                results[("kernel", op, n)] = statistics.median(secs)
            log("kernel cells at n = %d timed" % n)
    finally:
        stop(km, kc)


# --- report -----------------------------------------------------------------

def fmt(t):
    if t is None:
        return "-"
    if t >= 1:
        return "%.2f s" % t
    if t >= 1e-3:
        return "%.3g ms" % (t * 1e3)
    return "%.3g us" % (t * 1e6)


def ratio(a, b):
    if a is None or b is None or b == 0:
        return "-"
    return "%.2g x" % (a / b)


def machine(heads):
    cpu = "unknown processor"
    try:
        for l in open("/proc/cpuinfo"):
            if l.startswith("model name"):
                cpu = l.split(":", 1)[1].strip()
                break
    except OSError:
        pass
    mem = ""
    try:
        kb = int(open("/proc/meminfo").readline().split()[1])
        mem = ", %.0f GB memory" % (kb / 2**20)
    except (OSError, ValueError, IndexError):
        pass
    return "%s, %d cores%s, Linux %s; %s" % (cpu, os.cpu_count(), mem, platform.release(), "; ".join(heads))


def table(results, sizes, who, md):
    rows = []
    head = ["work"] + ["n = %d" % n for n in sizes]
    rows.append(head)
    for op in OPS:
        what, ref = WHAT[op]
        for label, w in who:
            cells = []
            for n in sizes:
                a, b = results.get((w, op, n)), results.get(("numpy", op, n))
                cells.append("-" if a is None else "%s / %s = %s" % (fmt(a), fmt(b), ratio(a, b)))
            if all(c == "-" for c in cells):
                continue
            rows.append(["%s vs %s%s" % (what, ref, label)] + cells)
    k = results
    for label, key in (("start-up to the first kernel_info_reply", "start-up"), ("trivial cell round trip", "trivial cell")):
        a, b = k.get(("kernel", key, "lsys")), k.get(("kernel", key, "python3"))
        if a is not None:
            rows.append(["kernel %s vs the Python kernel" % label, "%s / %s = %s" % (fmt(a), fmt(b), ratio(a, b))] + [""] * (len(sizes) - 1))
    if md:
        out = ["| " + " | ".join(rows[0]) + " |", "|" + "---|" * len(rows[0])]
        out += ["| " + " | ".join(r) + " |" for r in rows[1:]]
        return "\n".join(out)
    w = [max(len(r[i]) for r in rows) for i in range(len(rows[0]))]
    return "\n".join("  ".join(c.ljust(w[i]) for i, c in enumerate(r)).rstrip() for r in rows)


def main():
    ap = argparse.ArgumentParser(prog="bench/run", description=__doc__, formatter_class=argparse.RawDescriptionHelpFormatter)
    ap.add_argument("--quick", action="store_true", help="n = 50 and 200, fewer repetitions (CI)")
    ap.add_argument("--sizes", default="50,200,500,1000", help="model orders (default 50,200,500,1000)")
    ap.add_argument("--ops", default=",".join(OPS), help="computations to time (default: all)")
    ap.add_argument("--no-kernel", action="store_true", help="skip the kernel timings")
    ap.add_argument("--no-lapack", action="store_true", help="skip lsys's LAPACK backend")
    ap.add_argument("--readme", action="store_true", help="write the table into README.md's Performance section")
    ap.add_argument("--note", default="", help="a remark on the machine for the README (e.g. shared with other work)")
    ap.add_argument("--models", help="only write the models into this folder (for bench/inproc -cpuprofile)")
    ap.add_argument("--numpy-worker", nargs=4, help=argparse.SUPPRESS)
    a = ap.parse_args()
    if a.numpy_worker:
        d, s, r, o = a.numpy_worker
        numpy_worker(d, [int(x) for x in s.split(",")], [int(x) for x in r.split(",")], o.split(","))
        return
    sizes = [50, 200] if a.quick else [int(x) for x in a.sizes.split(",")]
    if a.models:
        os.makedirs(a.models, exist_ok=True)
        for n in sizes:
            for name, M in zip("ABC", model(n)):
                np.ascontiguousarray(M, dtype="<f8").tofile(os.path.join(a.models, "%s%d.bin" % (name, n)))
        return
    reps = [{50: 7, 200: 5, 500: 3}.get(n, 1) for n in sizes]
    if a.quick:
        reps = [3, 2][: len(sizes)]
    ops = a.ops.split(",")
    t0 = time.perf_counter()
    log = lambda m: print("bench: %s (%.0f s)" % (m, time.perf_counter() - t0), file=sys.stderr, flush=True)

    tmp = tempfile.mkdtemp(prefix="lsys-bench-")
    try:
        for n in sizes:
            for name, M in zip("ABC", model(n)):
                np.ascontiguousarray(M, dtype="<f8").tofile(os.path.join(tmp, "%s%d.bin" % (name, n)))
        pure = os.path.join(tmp, "inproc")
        subprocess.run(["go", "build", "-o", pure, "./bench/inproc"], cwd=TOP, check=True)
        fast = None
        if not a.no_lapack:
            fast = os.path.join(tmp, "inproc-lapack")
            b = subprocess.run(["go", "build", "-tags", "lapack", "-o", fast, "./bench/inproc"], cwd=TOP,
                               stdout=subprocess.PIPE, stderr=subprocess.STDOUT)
            if b.returncode != 0:
                log("the LAPACK backend does not build here (needs liblapacke-dev, libopenblas-dev): skipped")
                fast = None
        results, heads = {}, {}
        # Back to back, one order at a time, so that load from others on
        # the machine falls on both sides alike.
        for n, r in zip(sizes, reps):
            args = ["-dir", tmp, "-n", str(n), "-reps", str(r), "-ops", ",".join(o for o in ops if n <= CAP.get(o, n))]
            heads["lsys"] = collect(lines([pure] + args), results, "lsys")
            if fast:
                heads["lsys+lapack"] = collect(lines([fast] + args, env=unpinned()), results, "lsys+lapack")
            heads["numpy"] = collect(lines([sys.executable, os.path.abspath(__file__), "--numpy-worker", tmp, str(n), str(r),
                                            ",".join(ops)], env=unpinned()), results, "numpy")
            log("n = %d timed" % n)
        if not a.no_kernel:
            kernel_times(tmp, sizes, a.quick, results, log)
    finally:
        shutil.rmtree(tmp, ignore_errors=True)

    desc = ["lsys %s, %s" % (heads["lsys"]["go"], heads["lsys"]["backend"])]
    if "lsys+lapack" in heads:
        desc.append("lsys with -tags lapack: %s" % heads["lsys+lapack"]["backend"])
    nb = heads["numpy"]
    blas = nb["blas"] if isinstance(nb["blas"], str) else ", ".join(
        "%s %s kernel %s, %s threads" % tuple(b) for b in nb["blas"])
    desc.append("%s on %s" % (nb["backend"], blas))
    desc.append("OPENBLAS_CORETYPE and OPENBLAS_L2_SIZE unset for the numpy and LAPACK-backend commands")
    who = [(" (pure Go)", "lsys")]
    if "lsys+lapack" in heads:
        who.append((" (LAPACK backend)", "lsys+lapack"))
    if not a.no_kernel:
        who.append((" (through the kernel, pure Go, rendering included)", "kernel"))
    print("Machine: " + machine(desc))
    print("Figures: lsys / reference = ratio (median of repetitions; below 1 lsys is faster)\n")
    print(table(results, sizes, who, False))
    if a.readme:
        write_readme(table(results, sizes, who, True), machine(desc), a.note)
        log("README.md updated")


def write_readme(tab, mach, note):
    p = os.path.join(TOP, "README.md")
    s = open(p).read()
    start, end = "<!-- bench:start -->", "<!-- bench:end -->"
    i, j = s.find(start), s.find(end)
    if i < 0 or j < 0:
        sys.exit("bench: README.md has no %s ... %s section" % (start, end))
    body = "\n".join([start, "Generated by `bench/run --readme` on: %s.%s" % (mach, (" " + note) if note else ""),
                      "Each entry is lsys's time / the reference's = the ratio (medians of repetitions).", "", tab, ""])
    open(p, "w").write(s[:i] + body + s[j:])


if __name__ == "__main__":
    main()
