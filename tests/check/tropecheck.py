"""tropecheck.py — shared helper for trope's Python cross-checks (tests/check/*.py).

Runs the trope program, reads its JSON (format "trope.complex/1", see DESIGN.md
"JSON"), and offers exact rational helpers (fractions.Fraction) and a failure
reporter. Every script is run as `/usr/bin/python3 tests/check/X.py PATH_TO_TROPE`
from the repository root, prints one summary line and exits 1 on any failure.
"""

import json
import os
import random
import shutil
import subprocess
import sys
import tempfile
from concurrent.futures import ThreadPoolExecutor
from fractions import Fraction
from math import gcd

JOBS = 2  # the target machine has 2 cores


class Checker:
    """Collects failures; prints the first few in full and a one-line summary."""

    def __init__(self, name, max_shown=15):
        self.name = name
        self.checks = 0
        self.failures = 0
        self.max_shown = max_shown
        self.notes = []

    def ok(self, cond, msg):
        """Records one check; msg (a string or a zero-argument callable) is shown on
        failure. Returns cond."""
        self.checks += 1
        if not cond:
            self.failures += 1
            if self.failures <= self.max_shown:
                text = msg() if callable(msg) else msg
                print(f"{self.name}: FAIL: {text}", file=sys.stderr)
        return cond

    def fail(self, msg):
        return self.ok(False, msg)

    def finish(self, extra=""):
        status = "ok" if self.failures == 0 else "FAILED"
        tail = f"; {extra}" if extra else ""
        print(f"{self.name}: {status}: {self.checks - self.failures}/{self.checks} "
              f"checks passed{tail}")
        sys.exit(1 if self.failures else 0)


def trope_path():
    if len(sys.argv) < 2:
        print("usage: script.py PATH_TO_TROPE", file=sys.stderr)
        sys.exit(2)
    p = sys.argv[1]
    if not os.path.isfile(p) or not os.access(p, os.X_OK):
        print(f"{os.path.basename(sys.argv[0])}: FAILED: no trope program at {p}")
        sys.exit(1)
    return os.path.abspath(p)


class Workdir:
    """A private temporary folder, removed at exit."""

    def __init__(self, tag):
        self.path = tempfile.mkdtemp(prefix=f"trope-{tag}-")
        self.count = 0

    def file(self, text, suffix=".txt", binary=False):
        self.count += 1
        name = os.path.join(self.path, f"in{self.count}{suffix}")
        with open(name, "wb" if binary else "w", encoding=None if binary else "utf-8") as f:
            f.write(text)
        return name

    def cleanup(self):
        shutil.rmtree(self.path, ignore_errors=True)


def run(trope, args, timeout=120, stdin=None):
    """Runs trope with args; returns (returncode, stdout, stderr) as text."""
    p = subprocess.run([trope] + list(args), input=stdin, capture_output=True,
                       timeout=timeout)
    return p.returncode, p.stdout.decode("utf-8", "replace"), \
        p.stderr.decode("utf-8", "replace")


class TropeError(Exception):
    pass


def tropicalize(trope, path, over=None, points=False, maximum=False, extra=()):
    """`trope tropicalize` on a file with --format json; returns the parsed JSON.
    Raises TropeError (with the stderr text) when trope fails or prints bad JSON."""
    args = ["tropicalize"]
    if points:
        args += ["--points", path]
    else:
        args += [path]
    if over is not None:
        args += ["--over", over]
    if maximum:
        args += ["--max"]
    args += ["--format", "json"] + list(extra)
    rc, out, err = run(trope, args)
    if rc != 0:
        raise TropeError(f"trope {' '.join(args)} exited {rc}: {err.strip()[:400]}")
    if "runtime error:" in err or "Sanitizer" in err:   # UBSan does not change the status
        raise TropeError(f"trope {' '.join(args)}: sanitizer report: {err.strip()[:400]}")
    try:
        return json.loads(out)
    except json.JSONDecodeError as e:
        raise TropeError(f"trope {' '.join(args)}: output is not JSON ({e}): {out[:200]!r}")


def parallel(fn, items, jobs=JOBS):
    """Maps fn over items on `jobs` threads (trope runs as subprocesses); keeps order."""
    with ThreadPoolExecutor(max_workers=jobs) as ex:
        return list(ex.map(fn, items))


# ---------------------------------------------------------------- exact numbers

def Q(x):
    """A JSON rational (a string "p/q" or "p", or a JSON integer) as a Fraction."""
    if isinstance(x, bool):
        raise ValueError(f"not a rational: {x!r}")
    if isinstance(x, int):
        return Fraction(x)
    if isinstance(x, str):
        return Fraction(x)
    raise ValueError(f"not an exact rational: {x!r}")


def vecQ(v):
    return tuple(Q(x) for x in v)


def vecZ(v):
    out = []
    for x in v:
        if isinstance(x, bool) or not isinstance(x, int):
            raise ValueError(f"not a JSON integer: {x!r}")
        out.append(x)
    return tuple(out)


def vp(x, p):
    """p-adic valuation of a nonzero rational."""
    x = Fraction(x)
    if x == 0:
        raise ValueError("valuation of 0")
    v = 0
    n, d = x.numerator, x.denominator
    while n % p == 0:
        n //= p
        v += 1
    while d % p == 0:
        d //= p
        v -= 1
    return v


def dot(a, w):
    return sum((Fraction(x) * y for x, y in zip(a, w)), Fraction(0))


def argmin_terms(exps, vals, w):
    """The indices where val_i + <a_i, w> is minimal, and the minimum."""
    best = None
    arg = []
    for i, (a, v) in enumerate(zip(exps, vals)):
        s = v + dot(a, w)
        if best is None or s < best:
            best = s
            arg = [i]
        elif s == best:
            arg.append(i)
    return arg, best


def primitive(v):
    g = 0
    for x in v:
        g = gcd(g, int(x))
    if g == 0:
        return tuple(int(x) for x in v)
    return tuple(int(x) // g for x in v)


def lattice_length(points):
    """Lattice length of the segment spanned by collinear integer points."""
    pts = sorted(tuple(p) for p in points)
    a, b = pts[0], pts[-1]
    g = 0
    for x, y in zip(a, b):
        g = gcd(g, y - x)
    return abs(g)


def hull2d(points):
    """Convex hull (counter-clockwise, no collinear points) of integer points in Z^2."""
    pts = sorted(set(tuple(p) for p in points))
    if len(pts) <= 2:
        return pts

    def cross(o, a, b):
        return (a[0] - o[0]) * (b[1] - o[1]) - (a[1] - o[1]) * (b[0] - o[0])
    lower, upper = [], []
    for p in pts:
        while len(lower) >= 2 and cross(lower[-2], lower[-1], p) <= 0:
            lower.pop()
        lower.append(p)
    for p in reversed(pts):
        while len(upper) >= 2 and cross(upper[-2], upper[-1], p) <= 0:
            upper.pop()
        upper.append(p)
    return lower[:-1] + upper[:-1]


def on_segment(p, a, b):
    """Whether integer point p lies on the closed segment [a, b] in Z^2."""
    if (b[0] - a[0]) * (p[1] - a[1]) - (b[1] - a[1]) * (p[0] - a[0]) != 0:
        return False
    return min(a[0], b[0]) <= p[0] <= max(a[0], b[0]) and \
        min(a[1], b[1]) <= p[1] <= max(a[1], b[1])


def rank(rows):
    """Rank of a list of rational vectors (exact Gaussian elimination)."""
    m = [[Fraction(x) for x in r] for r in rows]
    if not m:
        return 0
    ncols = len(m[0])
    r = 0
    for c in range(ncols):
        piv = None
        for i in range(r, len(m)):
            if m[i][c] != 0:
                piv = i
                break
        if piv is None:
            continue
        m[r], m[piv] = m[piv], m[r]
        for i in range(len(m)):
            if i != r and m[i][c] != 0:
                f = m[i][c] / m[r][c]
                m[i] = [x - f * y for x, y in zip(m[i], m[r])]
        r += 1
        if r == len(m):
            break
    return r


def solve(A, b):
    """Solves the square system A x = b exactly; None if singular."""
    n = len(A)
    m = [[Fraction(x) for x in row] + [Fraction(y)] for row, y in zip(A, b)]
    for c in range(n):
        piv = next((i for i in range(c, n) if m[i][c] != 0), None)
        if piv is None:
            return None
        m[c], m[piv] = m[piv], m[c]
        for i in range(n):
            if i != c and m[i][c] != 0:
                f = m[i][c] / m[c][c]
                m[i] = [x - f * y for x, y in zip(m[i], m[c])]
    return [m[i][n] / m[i][i] for i in range(n)]


def frac_text(q):
    q = Fraction(q)
    return str(q.numerator) if q.denominator == 1 else f"{q.numerator}/{q.denominator}"


# ---------------------------------------------------------------- reading the JSON

class Result:
    """The parts of one trope.complex/1 object that the checks use."""

    def __init__(self, js):
        self.js = js
        self.variables = js["variables"]
        self.n = len(self.variables)
        self.terms = js["terms"]
        self.exps = [vecZ(t["exponent"]) for t in self.terms]
        self.sub_cells = js["subdivision"]["cells"]
        self.unused = js["subdivision"].get("unused")
        cx = js["complex"]
        self.cx = cx
        self.lineality = [vecZ(v) for v in cx["lineality"]]
        self.vertices = [vecQ(v) for v in cx["vertices"]]
        self.rays = [vecZ(r) for r in cx["rays"]]
        self.cells = cx["cells"]
        self.inv = js.get("invariants", {})

    def dual_points(self, cell):
        """The subdivision points dual to a complex cell: the JSON "dual" field is
        either the point list itself or an index into subdivision.cells."""
        d = cell["dual"]
        if isinstance(d, list):
            return sorted(d)
        return sorted(self.sub_cells[d]["points"])

    def interior_point(self, cell):
        """A relative interior point: mean of the vertices plus the sum of the rays."""
        vs = [self.vertices[i] for i in cell["vertices"]]
        rs = [self.rays[i] for i in cell["rays"]]
        if not vs:
            return None
        w = [sum((v[k] for v in vs), Fraction(0)) / len(vs) for k in range(self.n)]
        for r in rs:
            w = [x + y for x, y in zip(w, r)]
        return w

    def heights(self):
        """Heights of the points: "valuation" for polynomial input, "height" for
        --points input."""
        out = []
        for t in self.terms:
            if "valuation" in t:
                out.append(Q(t["valuation"]))
            else:
                out.append(Q(t["height"]))
        return out


def poly_text(terms, names):
    """Polynomial text from [(coefficient text, exponent tuple)], e.g.
    '(3/4)*x^2*y^-1 + (t^(1/2) - 2)*y'."""
    parts = []
    for coef, exp in terms:
        mon = [f"{v}^{e}" if e != 1 else v for v, e in zip(names, exp) if e != 0]
        parts.append("*".join([f"({coef})"] + mon))
    return " + ".join(parts)


def random_distinct_exponents(rng, n, count, lo, hi):
    seen = set()
    out = []
    tries = 0
    while len(out) < count and tries < 100000:
        tries += 1
        e = tuple(rng.randint(lo, hi) for _ in range(n))
        if e not in seen:
            seen.add(e)
            out.append(e)
    return out


def full_dimensional(exps):
    if len(exps) < 2:
        return False
    a0 = exps[0]
    return rank([[x - y for x, y in zip(a, a0)] for a in exps[1:]]) == len(a0)


def csv_text(exps, heights, header=None):
    lines = []
    if header:
        lines.append(",".join(header))
    for a, h in zip(exps, heights):
        lines.append(",".join([str(x) for x in a] + [frac_text(h)]))
    return "\n".join(lines) + "\n"


def make_rng(tag):
    """Fixed seeds (override with TROPE_TEST_SEED); the seed is printed on failure."""
    seed = int(os.environ.get("TROPE_TEST_SEED", "29808"))
    return random.Random(f"{tag}:{seed}"), seed
