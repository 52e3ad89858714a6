"""check_qhull.py — trope's lower hull against Qhull (scipy.spatial.ConvexHull).

Hundreds of random lifted point sets in n = 2 and 3 with generic integer heights are fed
to `trope tropicalize --points FILE.csv --format json`, once with each hull engine
(--engine cdd and --engine fast). The reference lower cells come
from Qhull (Debian python3-scipy, scipy.spatial.ConvexHull, default options — reliable
for integer heights below 10^6, see CHECKS.md): every hull facet whose outward normal
points down is a lower facet (an apex far above the centroid is added, as CHECKS.md
suggests, so that simplices are full-dimensional). Each Qhull facet is then made exact: the affine function
through its vertices is solved in fractions, and the cell is the set of ALL points on it
(so the comparison is exact even when Qhull's triangulated output splits a cell).
Some sets repeat an exponent with a larger height: that point must come out unused.

Checked per point set: the maximal subdivision cells (point-index sets) equal Qhull's
lower cells; the unused points agree; each maximal cell's normal w satisfies
h_i + <a_i, w> = c on the cell and > c at every other point (exact); with --max the
heights are negated (max convention), so the cells are Qhull's upper cells.
"""

from fractions import Fraction

import numpy as np
from scipy.spatial import ConvexHull

import tropecheck as tc

trope = tc.trope_path()
chk = tc.Checker("check_qhull")
rng, seed = tc.make_rng("qhull")
wd = tc.Workdir("qhull")
ENGINES = ["cdd", "fast"]   # every exact hull engine (fast falls back to cdd if it must)


def qhull_lower_cells(exps, heights):
    """Lower cells from Qhull, exact: {frozenset(points)} plus each cell's normal w."""
    n = len(exps[0])
    # an apex above the centroid makes the lifted set full-dimensional (CHECKS.md)
    apex = [sum(a[k] for a in exps) / len(exps) for k in range(n)]
    apex.append(float(max(heights)) + 10.0 ** 5)
    pts = np.array([list(a) + [float(h)] for a, h in zip(exps, heights)] + [apex],
                   dtype=float)
    hull = ConvexHull(pts)
    cells = {}
    for simplex, eq in zip(hull.simplices, hull.equations):
        if eq[n] >= -1e-9 or len(exps) in simplex:   # upper, vertical, or at the apex
            continue
        idx = list(simplex)
        # exact affine function h = c + <g, a> through the simplex's n+1 points
        A = [[1] + list(exps[i]) for i in idx]
        b = [heights[i] for i in idx]
        sol = tc.solve(A, b)
        if sol is None:
            chk.fail(f"seed {seed}: Qhull lower facet {idx} is vertical in exact arithmetic")
            continue
        c, g = sol[0], sol[1:]
        on = []
        below = False
        for i, (a, h) in enumerate(zip(exps, heights)):
            val = Fraction(h) - c - tc.dot(a, g)
            if val == 0:
                on.append(i)
            elif val < 0:
                below = True
        if below:
            chk.fail(f"seed {seed}: Qhull facet {idx} is not a lower facet in exact arithmetic")
            continue
        cells[frozenset(on)] = tuple(-x for x in g)
    return cells


def one_case(case):
    n, exps, heights, maximum, engine = case
    path = wd.file(tc.csv_text(exps, heights), suffix=".csv")
    try:
        js = tc.tropicalize(trope, path, points=True, maximum=maximum,
                            extra=["--engine", engine])
    except tc.TropeError as e:
        return [f"{path}: {e}"]
    except Exception as e:  # noqa: BLE001 — report anything, keep going
        return [f"{path}: {type(e).__name__}: {e}"]
    lifted = [-h for h in heights] if maximum else list(heights)
    try:
        ref = qhull_lower_cells(exps, lifted)
    except Exception as e:  # noqa: BLE001 — a Qhull failure is a reference failure
        return [f"{path}: reference (Qhull) failed: {type(e).__name__}: {e}"]
    errs = []
    try:
        R = tc.Result(js)
        got = {}
        for cell in R.sub_cells:
            if cell["dim"] == n:
                got[frozenset(cell["points"])] = cell
        if set(got) != set(ref):
            only_t = sorted(sorted(s) for s in set(got) - set(ref))
            only_q = sorted(sorted(s) for s in set(ref) - set(got))
            errs.append(f"{path} (max={maximum}, --engine {engine}): maximal cells differ: trope only {only_t}, "
                        f"Qhull only {only_q}")
        used_ref = set().union(*ref.keys()) if ref else set()
        unused_ref = sorted(set(range(len(exps))) - used_ref)
        if R.unused is None:
            errs.append(f"{path}: JSON subdivision has no 'unused' list")
        elif sorted(R.unused) != unused_ref:
            errs.append(f"{path}: unused points: trope {sorted(R.unused)}, Qhull {unused_ref}")
        # the normals, exactly, in trope's own convention (max: w -> -w)
        sign = -1 if maximum else 1
        for pts, cell in got.items():
            if "normal" not in cell:
                errs.append(f"{path}: maximal cell {sorted(pts)} has no normal")
                continue
            w = [sign * x for x in tc.vecQ(cell["normal"])]
            arg, _ = tc.argmin_terms(exps, lifted, w)
            if set(arg) != set(pts):
                errs.append(f"{path}: normal {cell['normal']} of cell {sorted(pts)} attains "
                            f"the minimum on {arg}")
    except (KeyError, ValueError, TypeError, IndexError) as e:
        errs.append(f"{path}: malformed JSON: {type(e).__name__}: {e}")
    return errs


def make_cases():
    cases = []
    for n, count in ((2, 260), (3, 160)):
        made = 0
        while made < count:
            k = rng.randint(n + 1, 14 if n == 2 else 12)
            exps = tc.random_distinct_exponents(rng, n, k, -4, 4)
            if not tc.full_dimensional(exps):
                continue
            heights = [rng.randint(-1000, 100000) for _ in exps]
            if made % 9 == 4:   # a repeated exponent: only its lowest height may be used
                j = rng.randrange(len(exps))
                exps.append(exps[j])
                heights.append(heights[j] + rng.randint(1, 5000))
            maximum = (made % 7 == 3)
            for engine in ENGINES:
                cases.append((n, exps, heights, maximum, engine))
            made += 1
    return cases


cases = make_cases()
for errs in tc.parallel(one_case, cases):
    chk.ok(not errs, lambda errs=errs: f"seed {seed}: " + "; ".join(errs))
if chk.failures == 0:
    wd.cleanup()
chk.finish(f"{len(cases) // len(ENGINES)} random point sets in n = 2, 3, engines "
           f"{' and '.join(ENGINES)}, against Qhull")
