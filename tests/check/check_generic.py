"""check_generic.py — plane tropical curves against the published counts.

1. Generic curves of degree d = 1..8: lifted points = all lattice points (i, j) of the
   triangle dΔ with heights i^2 + ij + j^2 plus small random noise (fed with --points).
   The quadratic form makes the standard unimodular triangulation (each flip margin is
   1, the noise stays below 1/4), so the curve is smooth of degree d:
   d^2 vertices, 3d(d-1)/2 bounded edges, 3d rays of weight 1, genus (d-1)(d-2)/2,
   balanced at every vertex, every vertex of multiplicity 1.
   Source: Mikhalkin, "Enumerative tropical algebraic geometry in R^2", J. Amer. Math.
   Soc. 18 (2005), §2 (from memory); Euler's formula (V - E_bounded = 1 - g) and Pick's
   theorem (interior lattice points of dΔ = (d-1)(d-2)/2): common practice, no source.
2. Trivial valuation, full support of degree d (polynomial input, --over Q): one vertex
   at the origin and rays (1,0), (0,1), (-1,-1), each of weight d (weight = lattice
   length of the dual edge; common practice, no source); its multiplicity is d^2.
3. Vertex multiplicity = 2 * area of the dual polygon (Mikhalkin 2005, Def. 2.16, from
   memory), on random plane curves, against a shoelace area computed here; and the
   balancing condition sum w_i u_i = 0 at every vertex (Mikhalkin 2005 §2, from memory),
   recomputed here from the vertices, rays and weights.
"""

from fractions import Fraction

import tropecheck as tc

trope = tc.trope_path()
chk = tc.Checker("check_generic")
rng, seed = tc.make_rng("generic")
wd = tc.Workdir("generic")


def twice_area(points):
    h = tc.hull2d(points)
    s = 0
    for k in range(len(h)):
        x1, y1 = h[k]
        x2, y2 = h[(k + 1) % len(h)]
        s += x1 * y2 - x2 * y1
    return abs(s)


def edge_graph(R):
    """For a plane curve: vertices, bounded edges (i, j, weight), rays (i, dir, weight)."""
    bounded, unbounded = [], []
    for cell in R.cells:
        if cell["dim"] != 1:
            continue
        if len(cell["vertices"]) == 2 and not cell["rays"]:
            bounded.append((cell["vertices"][0], cell["vertices"][1], cell["weight"]))
        elif len(cell["vertices"]) == 1 and len(cell["rays"]) == 1:
            unbounded.append((cell["vertices"][0], R.rays[cell["rays"][0]], cell["weight"]))
        else:
            unbounded.append((None, None, None))
    return bounded, unbounded


def balancing_errors(R):
    bounded, unbounded = edge_graph(R)
    acc = {i: [Fraction(0), Fraction(0)] for i in range(len(R.vertices))}
    for i, j, wt in bounded:
        d = [b - a for a, b in zip(R.vertices[i], R.vertices[j])]
        # primitive integer direction of the edge
        den = 1
        for x in d:
            den = den * x.denominator // tc.gcd(den, x.denominator)
        u = tc.primitive([x * den for x in d])
        acc[i] = [a + wt * b for a, b in zip(acc[i], u)]
        acc[j] = [a - wt * b for a, b in zip(acc[j], u)]
    for i, r, wt in unbounded:
        if i is None:
            return ["a 1-cell that is neither a segment nor a ray"]
        acc[i] = [a + wt * b for a, b in zip(acc[i], r)]
    return [f"vertex {i} {[tc.frac_text(x) for x in R.vertices[i]]}: sum of w*u = "
            f"{[tc.frac_text(x) for x in s]}" for i, s in acc.items() if any(s)]


def check_generic_degree(d, variant):
    exps, heights = [], []
    for i in range(d + 1):
        for j in range(d + 1 - i):
            exps.append((i, j))
            q = i * i + i * j + j * j
            if variant == 0:   # fractional noise below 1/4
                heights.append(q + Fraction(rng.randint(-240, 240), 1000))
            else:               # integer heights, scaled
                heights.append(1000 * q + rng.randint(-240, 240))
    path = wd.file(tc.csv_text(exps, heights, header=["i", "j", "h"]), suffix=".csv")
    tag = f"{path} (degree {d})"
    try:
        R = tc.Result(tc.tropicalize(trope, path, points=True))
    except tc.TropeError as e:
        chk.fail(f"{tag}: {e}")
        return
    try:
        bounded, unbounded = edge_graph(R)
        g = (d - 1) * (d - 2) // 2
        V = len(R.vertices)
        chk.ok(V == d * d, f"{tag}: {V} vertices, expected d^2 = {d * d}")
        chk.ok(len(bounded) == 3 * d * (d - 1) // 2,
               f"{tag}: {len(bounded)} bounded edges, expected {3 * d * (d - 1) // 2}")
        chk.ok(len(unbounded) == 3 * d and all(w == 1 for _, _, w in unbounded),
               f"{tag}: rays {[(tuple(r) if r else r, w) for _, r, w in unbounded]}, "
               f"expected {3 * d} of weight 1")
        dirs = sorted(tuple(r) for _, r, _ in unbounded if r is not None)
        want = sorted([(0, 1)] * d + [(1, 0)] * d + [(-1, -1)] * d)
        chk.ok(dirs == want, f"{tag}: ray directions {dirs}")
        chk.ok(V - len(bounded) == 1 - g,
               f"{tag}: V - E_bounded = {V - len(bounded)}, expected 1 - g = {1 - g}")
        chk.ok(R.inv.get("genus") == g, f"{tag}: genus {R.inv.get('genus')}, expected {g}")
        chk.ok(R.inv.get("smooth") is True, f"{tag}: smooth {R.inv.get('smooth')!r}")
        chk.ok(R.inv.get("balanced") is True, f"{tag}: balanced {R.inv.get('balanced')!r}")
        chk.ok(R.inv.get("bounded_edges") == 3 * d * (d - 1) // 2,
               f"{tag}: invariants.bounded_edges {R.inv.get('bounded_edges')}")
        inv_rays = sorted((tuple(x["direction"]), x["weight"]) for x in R.inv.get("rays", []))
        chk.ok(inv_rays == [((-1, -1), d), ((0, 1), d), ((1, 0), d)],
               f"{tag}: invariants.rays {inv_rays}")
        be = balancing_errors(R)
        chk.ok(not be, f"{tag}: not balanced: {be[:3]}")
        mults = [c.get("multiplicity") for c in R.cells if c["dim"] == 0]
        chk.ok(mults == [1] * (d * d), f"{tag}: vertex multiplicities {mults}")
        unused = R.unused
        chk.ok(unused == [], f"{tag}: unused points {unused}, expected none")
    except (KeyError, ValueError, TypeError, IndexError) as e:
        chk.fail(f"{tag}: malformed JSON: {type(e).__name__}: {e}")


def check_trivial_full(d):
    terms = []
    for i in range(d + 1):
        for j in range(d + 1 - i):
            c = Fraction(rng.choice([-1, 1]) * rng.randint(1, 40), rng.randint(1, 9))
            terms.append((tc.frac_text(c), (i, j)))
    path = wd.file("vars: x y\n" + tc.poly_text(terms, ["x", "y"]) + "\n")
    tag = f"{path} (trivial valuation, full degree {d})"
    try:
        R = tc.Result(tc.tropicalize(trope, path, over="Q"))
    except tc.TropeError as e:
        chk.fail(f"{tag}: {e}")
        return
    try:
        chk.ok(R.vertices == [(0, 0)], f"{tag}: vertices {R.vertices}, expected the origin")
        bounded, unbounded = edge_graph(R)
        got = sorted((tuple(r), w) for _, r, w in unbounded)
        chk.ok(not bounded and got == [((-1, -1), d), ((0, 1), d), ((1, 0), d)],
               f"{tag}: bounded {bounded}, rays {got}")
        mults = [c.get("multiplicity") for c in R.cells if c["dim"] == 0]
        chk.ok(mults == [d * d], f"{tag}: vertex multiplicity {mults}, expected {d * d}")
        chk.ok(R.inv.get("genus") == 0, f"{tag}: genus {R.inv.get('genus')}, expected 0")
    except (KeyError, ValueError, TypeError, IndexError) as e:
        chk.fail(f"{tag}: malformed JSON: {type(e).__name__}: {e}")


def check_random_multiplicities(k):
    n_pts = rng.randint(4, 16)
    exps = tc.random_distinct_exponents(rng, 2, n_pts, -3, 4)
    if not tc.full_dimensional(exps):
        return
    heights = [rng.choice([rng.randint(0, 6), rng.randint(-500, 500)]) for _ in exps]
    path = wd.file(tc.csv_text(exps, heights), suffix=".csv")
    tag = f"{path} (random curve {k})"
    try:
        R = tc.Result(tc.tropicalize(trope, path, points=True))
    except tc.TropeError as e:
        chk.fail(f"{tag}: {e}")
        return
    try:
        for cell in R.cells:
            if cell["dim"] != 0:
                continue
            D = R.dual_points(cell)
            want = twice_area([exps[i] for i in D])
            chk.ok(cell.get("multiplicity") == want,
                   f"{tag}: vertex {cell['vertices']} dual {D}: multiplicity "
                   f"{cell.get('multiplicity')}, 2*area {want}")
        be = balancing_errors(R)
        chk.ok(not be, f"{tag}: not balanced: {be[:3]}")
        # genus of the curve graph = number of bounded regions = first Betti number
        bounded, _ = edge_graph(R)
        V = len(R.vertices)
        comps = V  # union-find for the number of connected components
        parent = list(range(V))

        def find(a):
            while parent[a] != a:
                parent[a] = parent[parent[a]]
                a = parent[a]
            return a
        for i, j, _ in bounded:
            a, b = find(i), find(j)
            if a != b:
                parent[a] = b
                comps -= 1
        betti = len(bounded) - V + comps
        chk.ok(R.inv.get("genus") == betti,
               f"{tag}: genus {R.inv.get('genus')}, first Betti number {betti}")
    except (KeyError, ValueError, TypeError, IndexError) as e:
        chk.fail(f"{tag}: malformed JSON: {type(e).__name__}: {e}")


for d in range(1, 9):
    for variant in (0, 1):
        check_generic_degree(d, variant)
for d in range(1, 7):
    check_trivial_full(d)
for k in range(120):
    check_random_multiplicities(k)
if chk.failures == 0:
    wd.cleanup()
chk.finish("generic curves d = 1..8, trivial full support, multiplicities = 2*area")
