#!/usr/bin/python3
"""bench.py — trope's lower-hull engine against exact cddlib and Qhull on the same
lifted point sets. A benchmark, not a test: it prints a table and never fails on time.

Usage: /usr/bin/python3 tests/bench/bench.py PATH_TO_TROPE [--quick] [--no-cdd]
       (scripts/bench builds a release binary and runs this)

For every point set (written once as CSV, our own random data with fixed seeds):
  trope   `trope tropicalize --points F.csv --format json -o F.json --timings`
          (engine auto = the fast exact engine): the hull phase's CPU time from
          --timings, the whole run's wall and CPU time and peak memory (wait4 rusage);
  cddlib  the same command with --engine cdd, where it is expected to finish within
          120 s (otherwise "skip"), killed at 120 s;
  Qhull   scipy.spatial.ConvexHull, default options, on the lifted points plus one
          apex above the centroid (the vertical direction); its lower triangles are
          merged exactly (integer determinants) to count facets.
Times are the best of REPEAT runs. The ratio compares CPU times (trope's hull phase
from --timings, Qhull's call from time.process_time), which a busy shared machine
disturbs far less than wall-clock times; page faults count as system CPU time.
The growth exponent is the slope of log(time) against log(points) within a family.
"""
import math
import os
import re
import signal
import subprocess
import sys
import tempfile
import time

import numpy as np
from scipy.sparse import coo_matrix
from scipy.sparse.csgraph import connected_components
from scipy.spatial import ConvexHull

TROPE = sys.argv[1] if len(sys.argv) > 1 else "build-bench/src/cli/trope"
QUICK = "--quick" in sys.argv
NO_CDD = "--no-cdd" in sys.argv
REPEAT = 1 if QUICK else 3
CDD_LIMIT = 120.0


# ---- point sets ------------------------------------------------------------------------

def simplex_lattice(n, d):
    if n == 2:
        i, j = np.meshgrid(np.arange(d + 1), np.arange(d + 1), indexing="ij")
        keep = i + j <= d
        return np.column_stack([i[keep], j[keep]]).astype(np.int64)
    i, j, k = np.meshgrid(np.arange(d + 1), np.arange(d + 1), np.arange(d + 1), indexing="ij")
    keep = i + j + k <= d
    return np.column_stack([i[keep], j[keep], k[keep]]).astype(np.int64)


def families(quick):
    rng = np.random.default_rng(0x7470)
    sets = []
    for d in ((80, 160) if quick else (80, 320, 640)):
        A = simplex_lattice(2, d)
        sets.append(("plane random", d, A, rng.integers(0, 10**6, len(A))))
    for d in ((80, 160) if quick else (80, 320, 640)):
        A = simplex_lattice(2, d)
        sets.append(("plane fine", d, A, 4 * (A[:, 0] ** 2 + A[:, 1] ** 2) + rng.integers(0, 3, len(A))))
    for d in ((40, 160) if quick else (160, 640)):
        A = simplex_lattice(2, d)
        sets.append(("plane flat", d, A, np.zeros(len(A), dtype=np.int64)))
    for d in ((8, 16) if quick else (16, 32)):
        A = simplex_lattice(3, d)
        sets.append(("3 vars random", d, A, rng.integers(0, 10**6, len(A))))
    m = 10**4 if quick else 10**5
    flat = rng.choice(1001 * 1001, size=m, replace=False)
    A = np.column_stack([flat // 1001, flat % 1001]).astype(np.int64)
    sets.append(("sparse", m, A, rng.integers(0, 10**6, m)))
    return sets


# ---- runners ---------------------------------------------------------------------------

def run_trope(csv, out, engine, n, timeout=None):
    """Returns (hull_s, total_wall_s, cpu_s, maxrss_kib, facets) or None on timeout
    (cpu_s: the sum of the phases --timings reports: parse, hull, subdivision, complex,
    write).
    Memory and CPU come from /usr/bin/time around trope alone (a forked Python child's
    ru_maxrss would include the Python image from before exec)."""
    tfile = out + ".time"
    args = ["/usr/bin/time", "-f", "%M %e %U %S", "-o", tfile,
            TROPE, "tropicalize", "--points", csv, "--format", "json", "-o", out,
            "--timings", "--engine", engine]
    if engine == "cdd":   # the timeout below bounds it, not the work limit
        args += ["--max-cdd-points", "100000000"]
    p = subprocess.Popen(args, stdout=subprocess.DEVNULL, stderr=subprocess.PIPE,
                         start_new_session=True)
    try:
        _, err = p.communicate(timeout=timeout)
    except subprocess.TimeoutExpired:
        os.killpg(p.pid, signal.SIGKILL)
        p.communicate()
        return None
    err = err.decode()
    if p.returncode != 0:
        raise RuntimeError(f"trope failed on {csv}: {err.strip()}")
    m = re.search(r"hull ([0-9.]+) ms", err)
    hull = float(m.group(1)) / 1e3 if m else float("nan")
    # the whole run's CPU time: the phases from --timings (microsecond resolution;
    # /usr/bin/time only gives hundredths of a second)
    phases = re.findall(r"(parse|hull|subdivision|complex|write) ([0-9.]+) ms", err)
    cpu = sum(float(v) for _, v in phases) / 1e3 if phases else None
    with open(tfile) as f:
        rss, wall, user, sys_ = f.read().split()[-4:]
    os.remove(tfile)
    with open(out, "rb") as f:
        facets = f.read().count(b'"dim": %d, "normal": [' % n)   # top cells
    os.remove(out)
    if cpu is None:
        cpu = float(user) + float(sys_)
    return hull, float(wall), cpu, int(rss), facets


def det3(M):
    return (M[:, 0, 0] * (M[:, 1, 1] * M[:, 2, 2] - M[:, 1, 2] * M[:, 2, 1])
            - M[:, 0, 1] * (M[:, 1, 0] * M[:, 2, 2] - M[:, 1, 2] * M[:, 2, 0])
            + M[:, 0, 2] * (M[:, 1, 0] * M[:, 2, 1] - M[:, 1, 1] * M[:, 2, 0]))


def det4(M):
    s = 0
    for c in range(4):
        minor = np.delete(M[:, 1:, :], c, axis=2)
        s = s + (-1) ** c * M[:, 0, c] * det3(minor)
    return s


def run_qhull(A, h):
    """Returns (seconds, merged lower facet count)."""
    P = np.column_stack([A, h]).astype(np.int64)
    m, dim = P.shape
    apex = np.concatenate([A.mean(axis=0), [h.max() + 1000 * (h.max() - h.min() + 1)]])
    X = np.vstack([P.astype(float), apex])
    t0 = time.process_time()
    hull = ConvexHull(X)
    t = time.process_time() - t0
    S = hull.simplices
    low = np.all(S < m, axis=1)
    E = P[np.clip(S, 0, m - 1)]
    D = E[:, 1:, :-1] - E[:, :1, :-1]
    vol = det3(D) if dim == 4 else D[:, 0, 0] * D[:, 1, 1] - D[:, 0, 1] * D[:, 1, 0]
    low &= vol != 0                       # drop vertical facets (exact)
    idx = np.nonzero(low)[0]
    rows, cols = [], []
    N = hull.neighbors
    for j in range(dim):
        u = N[idx, j]
        ok = low[u] & (u > idx)
        t_, u_ = idx[ok], u[ok]
        if len(t_) == 0:
            continue
        # the neighbour's vertex that is not on the shared face
        Su, St = S[u_], S[t_]
        shared = (Su[:, :, None] == St[:, None, :]).any(axis=2)
        far = Su[~shared]
        M = np.concatenate([P[S[t_]], P[far][:, None, :]], axis=1)
        Dm = M[:, 1:, :] - M[:, :1, :]
        z = (det4(Dm) if dim == 4 else det3(Dm)) == 0
        rows.append(t_[z])
        cols.append(u_[z])
    pos = -np.ones(len(S), dtype=np.int64)
    pos[idx] = np.arange(len(idx))
    r = pos[np.concatenate(rows)] if rows else np.zeros(0, dtype=np.int64)
    c = pos[np.concatenate(cols)] if cols else np.zeros(0, dtype=np.int64)
    G = coo_matrix((np.ones(len(r)), (r, c)), shape=(len(idx), len(idx)))
    ncomp, _ = connected_components(G, directed=False)
    return t, ncomp


def slope(xs, ys):
    xs, ys = [math.log(x) for x in xs], [math.log(max(y, 1e-6)) for y in ys]
    mx, my = sum(xs) / len(xs), sum(ys) / len(ys)
    den = sum((x - mx) ** 2 for x in xs)
    return sum((x - mx) * (y - my) for x, y in zip(xs, ys)) / den if den else float("nan")


def main():
    print(f"trope: {TROPE}; load average {os.getloadavg()[0]:.1f} on {os.cpu_count()} cores; "
          f"best of {REPEAT}")
    hdr = (f"{'family':<14}{'size':>7}{'points':>9} | {'hull':>8}{'run':>8}{'cpu':>8}"
           f"{'KiB/pt':>8} | {'cddlib':>8} | {'Qhull':>8}{'ratio':>7}{'run/Q':>7} | "
           f"facets trope/cdd/Qhull")
    print(hdr)
    print("-" * len(hdr))
    growth = {}
    with tempfile.TemporaryDirectory() as tmp:
        for name, d, A, h in families(QUICK):
            csv = os.path.join(tmp, "pts.csv")
            np.savetxt(csv, np.column_stack([A, h]), fmt="%d", delimiter=",")
            out = os.path.join(tmp, "out.json")
            best = None
            for _ in range(REPEAT):
                r = run_trope(csv, out, "auto", A.shape[1])
                best = r if best is None else tuple(min(a, b) for a, b in zip(best, r))
            hull, wall, cpu, rss, facets = best
            cdd_t, cdd_f = "skip", "-"
            expected_ok = len(A) <= 4000 and not (name == "plane fine" and d > 40)
            if not NO_CDD and (expected_ok or (name == "3 vars random" and d <= 32)):
                rc = run_trope(csv, out, "cdd", A.shape[1], timeout=CDD_LIMIT)
                if rc is None:
                    cdd_t = ">120"
                else:   # CPU time of the whole cddlib run, as the "cpu" column
                    cdd_t, cdd_f = f"{rc[2]:8.2f}", str(rc[4])
            qt = min(run_qhull(A, h)[0] for _ in range(REPEAT - 1)) if REPEAT > 1 else None
            qt1, qf = run_qhull(A, h)
            qt = qt1 if qt is None else min(qt, qt1)
            ratio = hull / qt if qt > 0 else float("nan")
            runq = cpu / qt if qt > 0 else float("nan")
            print(f"{name:<14}{d:>7}{len(A):>9} | {hull:8.3f}{wall:8.3f}{cpu:8.3f}"
                  f"{rss / len(A):8.2f} | {cdd_t:>8} | {qt:8.3f}{ratio:7.2f}{runq:7.2f} | "
                  f"{facets}/{cdd_f}/{qf}", flush=True)
            growth.setdefault(name, []).append((len(A), hull, cpu, qt))
    print()
    print("growth exponents (slope of log time against log points):")
    for name, g in growth.items():
        if len(g) < 2:
            continue
        xs = [p for p, *_ in g]
        print(f"  {name:<14} trope hull {slope(xs, [x[1] for x in g]):5.2f}   whole run (cpu) "
              f"{slope(xs, [x[2] for x in g]):5.2f}   Qhull {slope(xs, [x[3] for x in g]):5.2f}")
    print()
    print("hull: CPU time of the hull phase (--timings); run: wall time of the whole command,\n"
          "JSON written; cpu: the CPU time of its phases, reading the CSV to writing every\n"
          "term, cell and ray (--timings); KiB/pt: its peak resident memory per input point;\n"
          "Qhull: CPU time of ConvexHull; ratio: hull / Qhull; run/Q: cpu / Qhull.")
    return 0


if __name__ == "__main__":
    sys.exit(main())
