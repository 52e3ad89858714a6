"""check_amoeba_spine.py — complement components, their orders and Ronkin coefficients,
the spine, the Archimedean tropical curve and lopsidedness, from `trope amoeba`.

Sources (beside each check below):
  [FPT] Forsberg, Passare, Tsikh, "Laurent determinants and arrangements of hyperplane
        amoebas", Adv. Math. 151 (2000): orders lie in Delta cap Z^2, distinct components
        have distinct orders, every vertex of Delta occurs; a component is bounded iff its
        order is interior (recession cone = normal cone of Delta at the order) (numbers
        from memory).
  [PR]  Passare, Rullgard, Duke Math. J. 121 (2004): N_f affine on each component; for a
        vertex order the constant is log|c_alpha|; the spine is the corner locus of
        max (c_alpha + <alpha, x>) and lies inside the amoeba (sections 2-3, from memory).
  [AKNR] Avendano, Kogan, Nisse, Rojas, J. Complexity 46 (2018): every point of the amoeba
        is within Euclidean distance log(N-1) of the Archimedean tropical curve (N terms;
        constant from memory); sharp for 1 + z + w at z = w = -1/2.
  [P]   Purbhoo, Duke Math. J. 141 (2008) / the triangle inequality: a lopsided point is
        outside the amoeba, in the component whose order is the dominant exponent.
Independent data: amoeba points and slices are made with numpy (roots of the fibre
polynomials via companion-matrix eigenvalues), Newton polygons with scipy's Qhull, JSON
validated with jsonschema against data/schema/trope.complex-1.schema.json.
"""

import json
import math
import os

import jsonschema
import numpy as np
from scipy.spatial import ConvexHull

import tropecheck as tc

trope = tc.trope_path()
chk = tc.Checker("check_amoeba_spine")
rng, seed = tc.make_rng("amoeba-spine")
wd = tc.Workdir("amoeba-spine")
SCHEMA = "data/schema/trope.complex-1.schema.json"
validator = None
if os.path.isfile(SCHEMA):
    with open(SCHEMA, encoding="utf-8") as f:
        schema = json.load(f)
    validator = jsonschema.validators.validator_for(schema)(schema)


def dec(x):
    return f"{x:.9e}"


def text_of(terms):
    return " + ".join(f"({dec(c.real)}{'+' if c.imag >= 0 else '-'}{dec(abs(c.imag))}i)*z^{i}*w^{j}"
                      for (i, j), c in terms)


def rounded(terms):
    return [(e, complex(float(dec(c.real)), float(dec(c.imag)))) for e, c in terms]


def amoeba_json(terms, extra=()):
    path = wd.file(text_of(terms) + "\n")
    rc, out, err = tc.run(trope, ["amoeba", path, "--format", "json", "--area-tol", "1e-3"]
                          + list(extra), timeout=600)
    if rc != 0:
        return None, path, err
    return json.loads(out), path, ""


def query(path, what, x):
    arg = ",".join(repr(float(v)) for v in x) if isinstance(x, (tuple, list)) else repr(float(x))
    rc, out, err = tc.run(trope, ["amoeba", path, f"--{what}", arg, "--format", "json"])
    return json.loads(out) if rc == 0 else None


def fibre_roots(terms, x1, thetas):
    """log|w| of the roots of f(e^(x1 + i t), w), one row per t (numpy)."""
    jmin = min(j for (i, j), c in terms)
    D = max(j for (i, j), c in terms) - jmin
    z = np.exp(x1 + 1j * np.asarray(thetas))
    a = np.zeros((D + 1, len(z)), dtype=complex)
    for (i, j), c in terms:
        a[j - jmin] += c * z ** i
    if D == 1:
        r = (-a[0] / a[1])[:, None]
    else:
        comp = np.zeros((len(z), D, D), dtype=complex)
        comp[:, 1:, :-1] = np.eye(D - 1)
        comp[:, :, -1] = -(a[:D] / a[D]).T
        r = np.linalg.eigvals(comp)
    with np.errstate(divide="ignore"):
        return np.sort(np.log(np.abs(r)), axis=1)


def sampled_slice(terms, x1, n=20000):
    """[min, max] of each sorted log|w_k| over n angles: a subset of the true slice"""
    R = fibre_roots(terms, x1, 2 * np.pi * np.arange(n) / n)
    return list(zip(R.min(axis=0), R.max(axis=0)))


def hull_info(terms):
    pts = np.array([e for e, c in terms], dtype=float)
    H = ConvexHull(pts)
    verts = {tuple(int(v) for v in pts[k]) for k in H.vertices}
    return H, verts


def in_hull(H, p, strict):
    vals = [np.dot(eq[:2], p) + eq[2] for eq in H.equations]   # <= 0 inside
    return all(v < -1e-9 for v in vals) if strict else all(v <= 1e-9 for v in vals)


def complex_cells(J):
    """segments and rays (as float data) of a trope.complex/1 object"""
    C = J["complex"]
    V = [tuple(float(tc.Q(v)) for v in vv) for vv in C["vertices"]]
    R = [tuple(float(r) for r in rr) for rr in C["rays"]]
    segs, rays = [], []
    for cell in C["cells"]:
        if cell["dim"] != 1:
            continue
        if len(cell["vertices"]) == 2:
            segs.append((V[cell["vertices"][0]], V[cell["vertices"][1]]))
        elif len(cell["vertices"]) == 1 and len(cell["rays"]) == 1:
            rays.append((V[cell["vertices"][0]], R[cell["rays"][0]]))
    return V, R, segs, rays


def dist_to_curve(p, segs, rays):
    best = math.inf
    p = np.array(p)
    for a, b in segs:
        a, b = np.array(a), np.array(b)
        t = np.clip(np.dot(p - a, b - a) / max(np.dot(b - a, b - a), 1e-300), 0, 1)
        best = min(best, np.linalg.norm(p - (a + t * (b - a))))
    for a, r in rays:
        a, r = np.array(a), np.array(r)
        t = max(0.0, np.dot(p - a, r) / np.dot(r, r))
        best = min(best, np.linalg.norm(p - (a + t * r)))
    return best


def lopsided(terms, x):
    mods = [abs(c) * math.exp(i * x[0] + j * x[1]) for (i, j), c in terms]
    k = max(range(len(mods)), key=lambda t: mods[t])
    return mods[k] > sum(mods) - mods[k], terms[k][0]


# ---- 1 + z + w: the spine is the tropical line with vertex at the origin [PR] -------
J, path, err = amoeba_json([((0, 0), 1), ((1, 0), 1), ((0, 1), 1)])
if chk.ok(J is not None, f"1+z+w: {err.strip()[:300]}"):
    sp = J["spine"]
    chk.ok(sp["format"] == "trope.complex/1" and sp["convention"] == "max" and
           sp.get("role") == "amoeba spine", "1+z+w: the spine object's header")
    if validator:
        for key in ("spine", "archimedean"):
            errs = list(validator.iter_errors(J[key]))
            chk.ok(not errs, f"1+z+w: {key} does not validate: {errs[:1]}")
    V, R, segs, rays = complex_cells(sp)
    chk.ok(len(V) == 1 and max(abs(v) for v in V[0]) < 1e-9, f"1+z+w: spine vertices {V}")
    chk.ok(sorted(R) == [(-1.0, 0.0), (0.0, -1.0), (1.0, 1.0)], f"1+z+w: spine rays {R}")
    # sharpness of [AKNR]: the amoeba point (-log 2, -log 2) (z = w = -1/2) is exactly
    # log 2 from the Archimedean curve
    _, _, asegs, arays = complex_cells(J["archimedean"])
    d = dist_to_curve((-math.log(2), -math.log(2)), asegs, arays)
    chk.ok(abs(d - math.log(2)) < 1e-12, f"1+z+w: distance {d} != log 2")

# ---- 1 + 2z + 3w: orders and the vertex (-log 2, -log 3) [FPT], [PR] ----------------
J, path, err = amoeba_json([((0, 0), 1), ((1, 0), 2), ((0, 1), 3)])
if chk.ok(J is not None, f"1+2z+3w: {err.strip()[:300]}"):
    orders = sorted(tuple(c["order"]) for c in J["components"])
    chk.ok(orders == [(0, 0), (0, 1), (1, 0)], f"1+2z+3w: orders {orders}")
    V, R, segs, rays = complex_cells(J["spine"])
    chk.ok(len(V) == 1 and abs(V[0][0] + math.log(2)) < 1e-8 and abs(V[0][1] + math.log(3)) < 1e-8,
           f"1+2z+3w: spine vertex {V}")
    for x, order, N in (((-4, -4), [0, 0], 0.0), ((4, -4), [1, 0], math.log(2) + 4),
                        ((-4, 4), [0, 1], math.log(3) + 4)):
        q = query(path, "ronkin", x)
        chk.ok(q is not None and q["order"] == order and abs(q["ronkin"]["value"] - N) < 1e-9,
               f"1+2z+3w at {x}: {q}")

# ---- random curves, coefficients c -> |c| e^(i phi) ---------------------------------
aknr_worst, n_amoeba_pts, n_lop = 0.0, 0, 0
cases = []
for it in range(8):
    d = rng.randint(1, 3)
    terms = []
    for i in range(d + 1):
        for j in range(d + 1 - i):
            if (i, j) in ((0, 0), (d, 0), (0, d)) or rng.random() < 0.75:
                mod = math.exp(rng.uniform(-2.5, 2.5))
                terms.append(((i, j), mod * complex(math.cos(rng.uniform(0, 6.3)),
                                                    math.sin(rng.uniform(0, 6.3)))))
    cases.append(rounded(terms))
# a bounded component: a dominant middle coefficient
cases.append(rounded([((0, 0), 1), ((2, 1), 1j), ((1, 2), -1), ((1, 1), 5 + 2j)]))
cases.append(rounded([((0, 0), 1), ((3, 0), 1), ((0, 3), 1), ((1, 1), -7), ((2, 1), 0.5),
                      ((1, 2), 0.5j)]))

for ci, terms in enumerate(cases):
    J, path, err = amoeba_json(terms)
    if not chk.ok(J is not None, f"case {ci}: {err.strip()[:300]}"):
        continue
    H, hverts = hull_info(terms)
    comps = J["components"]
    orders = [tuple(c["order"]) for c in comps]
    # [FPT] distinct orders in Delta, all vertices present, bounded iff interior
    chk.ok(len(set(orders)) == len(orders), f"case {ci}: repeated orders {orders}")
    for c in comps:
        o = tuple(c["order"])
        chk.ok(in_hull(H, o, False), f"case {ci}: order {o} outside the Newton polygon")
        chk.ok(c["bounded"] == in_hull(H, o, True), f"case {ci}: order {o} bounded flag")
        chk.ok(c["vertex"] == (o in hverts), f"case {ci}: order {o} vertex flag")
        # [PR] vertex components: c_alpha = log|c_alpha|
        if o in hverts:
            cz = [cc for e, cc in terms if e == o][0]
            chk.ok(abs(c["ronkin"] - math.log(abs(cz))) < 1e-8, f"case {ci}: order {o}: "
                   f"c_alpha {c['ronkin']} vs log|c| {math.log(abs(cz))}")
        # the point is off the amoeba: not on the numpy-sampled slice
        sl = sampled_slice(terms, c["point"][0], 4000)
        chk.ok(all(not (lo - 1e-9 <= c["point"][1] <= hi + 1e-9) for lo, hi in sl),
               f"case {ci}: component point {c['point']} on the sampled amoeba")
    chk.ok(hverts <= set(orders), f"case {ci}: vertices {sorted(hverts)} but orders {orders}")
    # lopsided points of the polygon's interior lattice points must be found
    for _ in range(200):
        x = (rng.uniform(-8, 8), rng.uniform(-8, 8))
        lop, dom = lopsided(terms, x)
        if lop:
            chk.ok(tuple(dom) in set(orders), f"case {ci}: lopsided point {x} of order {dom} "
                   f"but no such component in {orders}")
    # [PR] the spine lies in the amoeba: its vertices are on the (sampled) amoeba
    V, R, segs, rays = complex_cells(J["spine"])
    for v in V:
        sl = sampled_slice(terms, v[0], 20000)
        near = min(0 if lo <= v[1] <= hi else min(abs(v[1] - lo), abs(v[1] - hi))
                   for lo, hi in sl)
        chk.ok(near < 1e-3, f"case {ci}: spine vertex {v} is {near:.2e} from the sampled amoeba")
    # the spine is the corner locus of max(c_alpha + <alpha, x>): >= 3 terms tie at vertices
    for v in V:
        vals = sorted((c["ronkin"] + c["order"][0] * v[0] + c["order"][1] * v[1] for c in comps),
                      reverse=True)
        chk.ok(len(vals) >= 3 and vals[0] - vals[2] < 1e-7, f"case {ci}: spine vertex {v}: "
               f"top values {vals[:3]}")
    # [AKNR] amoeba points (numpy) within log(N-1) of the Archimedean curve (Euclidean)
    _, _, asegs, arays = complex_cells(J["archimedean"])
    N = len(terms)
    for _ in range(30):
        x1 = rng.uniform(-6, 6)
        R_ = fibre_roots(terms, x1, [rng.uniform(0, 2 * math.pi)])[0]
        for r in R_:
            if not np.isfinite(r):
                continue
            dd = dist_to_curve((x1, r), asegs, arays)
            aknr_worst = max(aknr_worst, dd / math.log(N - 1))
            n_amoeba_pts += 1
            chk.ok(dd <= math.log(N - 1) + 1e-9, f"case {ci}: amoeba point {(x1, r)} at "
                   f"distance {dd} > log(N-1) = {math.log(N - 1)}")
    # [P] lopsidedness query: trope agrees with the definition, and lopsided points are off
    # the sampled amoeba
    for _ in range(6):
        x = (rng.uniform(-5, 5), rng.uniform(-5, 5))
        lop, dom = lopsided(terms, x)
        q = query(path, "lopsided", x)
        if not chk.ok(q is not None, f"case {ci}: --lopsided failed at {x}"):
            continue
        mods = sorted(abs(c) * math.exp(i * x[0] + j * x[1]) for (i, j), c in terms)
        clear = abs(mods[-1] - sum(mods[:-1])) > 1e-9 * sum(mods)
        if clear:
            chk.ok(q["lopsided"] == lop, f"case {ci} at {x}: lopsided {q['lopsided']} vs {lop}")
            if lop:
                chk.ok(q["dominant"]["exponent"] == list(dom), f"case {ci} at {x}: dominant")
                sl = sampled_slice(terms, x[0], 4000)
                chk.ok(all(not (lo <= x[1] <= hi) for lo, hi in sl),
                       f"case {ci}: lopsided point {x} on the sampled amoeba")
                n_lop += 1

# the bounded component of the last two cases
for ci in (len(cases) - 2, len(cases) - 1):
    J, path, err = amoeba_json(cases[ci])
    if J:
        chk.ok(any(c["order"] == [1, 1] and c["bounded"] for c in J["components"]),
               f"case {ci}: no bounded component of order (1,1): {J['components']}")

wd.cleanup()
chk.finish(f"{len(cases)} random curves; {n_amoeba_pts} amoeba points, farthest at "
           f"{aknr_worst:.3f} log(N-1) from the Archimedean curve; {n_lop} lopsided points; "
           f"seed {seed}")
