"""check_bruteforce.py — the tropical hypersurface against its definition, exactly.

trop(f)(w) = min over terms of val(c_a) + <a, w> (min convention; with --max:
max of -val(c_a) + <a, w>). A point w lies on the hypersurface iff the extremum is
attained at least twice, and the terms attaining it there form the subdivision cell
dual to the complex cell containing w in its relative interior (common practice, no
source: this is the definition of the tropical hypersurface and of its dual
subdivision). Valuations are recomputed here in fractions.Fraction from the text we
wrote (p-adic: v_p; Puiseux: lowest exponent of numerator minus denominator; trivial: 0)
and compared with the JSON "terms".

For each random polynomial (p-adic, t-adic with rational exponents and quotients,
another parameter name, trivial, homogeneous in 3 variables (lineality), 3 and 4
variables, Laurent exponents, --max; the hull engines auto, cdd and fast in turn):
  * every cell: its relative-interior point (mean of its vertices plus the sum of its
    rays, plus a random vector of the lineality space) attains the extremum on exactly
    the dual cell's terms; its dimension is rank(vertices, rays) + dim L and the dual
    cell has the complementary dimension;
  * every vertex is a cell of its own whose dual is a maximal cell; for plane curves,
    every edge of its dual polygon (computed here) is dual to a listed edge;
  * top cells: weight = lattice length of the dual edge (DESIGN.md convention);
  * random rational w: the extremum is attained once (w off the complex);
  * random segments: at every point where the extremum changes, the terms attaining it
    are the dual of a listed top cell (the complex is complete).
"""

from fractions import Fraction

import tropecheck as tc

trope = tc.trope_path()
chk = tc.Checker("check_bruteforce")
rng, seed = tc.make_rng("bruteforce")
wd = tc.Workdir("brute")

NAMES = ["x", "y", "z", "u"]


def rand_unit(r, p=None):
    """A random nonzero rational, coprime to p when p is given."""
    while True:
        a = r.randint(-30, 30)
        b = r.randint(1, 12)
        if a == 0:
            continue
        if p and (a % p == 0 or b % p == 0):
            continue
        return Fraction(a, b)


def padic_coeff(r, p):
    k = r.randint(-3, 4)
    c = rand_unit(r, p) * Fraction(p) ** k
    return tc.frac_text(c), Fraction(k)


def puiseux_poly(r, param):
    """A Puiseux polynomial text with distinct exponents; returns (text, lowest exp)."""
    k = r.randint(1, 3)
    exps = set()
    while len(exps) < k:
        exps.add(Fraction(r.randint(-6, 12), r.choice([1, 1, 2, 3])))
    parts = []
    for e in sorted(exps):
        c = rand_unit(r)
        parts.append(f"{tc.frac_text(c)}*{param}^({tc.frac_text(e)})")
    return " + ".join(parts), min(exps)


def puiseux_coeff(r, param):
    num, vn = puiseux_poly(r, param)
    if r.random() < 0.3:
        den, vd = puiseux_poly(r, param)
        return f"({num})/({den})", vn - vd
    return num, vn


def trivial_coeff(r):
    return tc.frac_text(rand_unit(r)), Fraction(0)


def make_poly(r, kind):
    """Returns (text, over, {exponent: valuation}, nvars)."""
    if kind == "padic2":
        n, p = 2, r.choice([2, 3, 5, 7])
    elif kind == "padic3":
        n, p = 3, r.choice([2, 3, 5])
    elif kind == "padic4":
        n, p = 4, r.choice([3, 5])
    else:
        n, p = (3 if kind == "homog" else r.choice([1, 2, 2, 3])), r.choice([2, 3, 5])
    if kind == "homog":
        d = r.randint(1, 4)
        allexp = [(i, j, d - i - j) for i in range(d + 1) for j in range(d + 1 - i)]
        k = r.randint(2, len(allexp))
        exps = r.sample(allexp, k)
        if not any(True for _ in exps[1:]):
            exps = allexp[:2]
    else:
        lo, hi = (-2, 2) if kind in ("laurent", "padic4", "max") else (0, 4)
        k = r.randint(2, {1: 6, 2: 12, 3: 12, 4: 10}[n])
        exps = tc.random_distinct_exponents(r, n, k, lo, hi)
    if kind in ("puiseux", "param"):
        param = "t" if kind == "puiseux" else "s"
        over = param
        coeffs = [puiseux_coeff(r, param) for _ in exps]
    elif kind == "trivial":
        over = "Q"
        coeffs = [trivial_coeff(r) for _ in exps]
    else:
        over = f"p={p}"
        coeffs = [padic_coeff(r, p) for _ in exps]
    names = NAMES[:n]
    text = f"vars: {' '.join(names)}\n" + tc.poly_text(
        [(c[0], e) for c, e in zip(coeffs, exps)], names) + "\n"
    vals = {tuple(e): c[1] for c, e in zip(coeffs, exps)}
    return text, over, vals, n


def rand_w(r, n, scale=8):
    return [Fraction(r.randint(-scale * 997, scale * 997), 997) for _ in range(n)]


def check_case(case):
    kind, text, over, vals, n, maximum, subseed, engine = case
    r = tc.random.Random(subseed)
    path = wd.file(text)
    tag = f"{path} [{kind}, --over {over}{', --max' if maximum else ''}, --engine {engine}]"
    errs = []
    try:
        js = tc.tropicalize(trope, path, over=over, maximum=maximum,
                            extra=["--engine", engine])
    except tc.TropeError as e:
        return [f"{tag}: {e}"]
    try:
        R = tc.Result(js)
        if R.n != n:
            return [f"{tag}: {R.n} variables in JSON, expected {n}"]
        conv = js.get("convention")
        if conv != ("max" if maximum else "min"):
            errs.append(f"{tag}: convention {conv!r}")
        # terms and valuations, recomputed from our own text
        got = {}
        for t, e in zip(R.terms, R.exps):
            got[e] = tc.Q(t["valuation"])
        if got != vals:
            errs.append(f"{tag}: terms/valuations differ: trope {sorted(got.items())}, "
                        f"expected {sorted(vals.items())}")
            return errs
        exps = R.exps
        hv = [vals[e] for e in exps]
        nlin = len(R.lineality)

        def extremal(w):
            """Indices attaining the extremum at w in the output's convention."""
            if maximum:
                best = max(-h + tc.dot(a, w) for a, h in zip(exps, hv))
                return sorted(i for i, (a, h) in enumerate(zip(exps, hv))
                              if -h + tc.dot(a, w) == best)
            return sorted(tc.argmin_terms(exps, hv, w)[0])

        def lin_shift(w):
            for L in R.lineality:
                c = Fraction(r.randint(-50, 50), 7)
                w = [x + c * y for x, y in zip(w, L)]
            return w

        # lineality: the Newton polytope's span is orthogonal to it
        lin_rank = tc.rank(R.lineality) if R.lineality else 0
        span = tc.rank([[x - y for x, y in zip(a, exps[0])] for a in exps[1:]]) if len(exps) > 1 else 0
        if lin_rank != nlin or span + nlin != n:
            errs.append(f"{tag}: lineality {R.lineality} (rank {lin_rank}) but the "
                        f"Newton polytope has dimension {span} in {n} variables")
        for L in R.lineality:
            if any(tc.dot([x - y for x, y in zip(a, exps[0])], L) != 0 for a in exps):
                errs.append(f"{tag}: lineality vector {L} is not orthogonal to the polytope")
        top_duals = set()
        single_vertex_cells = {}
        for ci, cell in enumerate(R.cells):
            D = R.dual_points(cell)
            w = R.interior_point(cell)
            if w is None:
                errs.append(f"{tag}: cell {ci} has no vertex")
                continue
            w = lin_shift(w)
            arg = extremal(w)
            if arg != D:
                errs.append(f"{tag}: cell {ci} (dim {cell['dim']}) interior point "
                            f"{[tc.frac_text(x) for x in w]}: extremum on terms {arg}, "
                            f"dual cell says {D}")
            if cell.get("interior") is not None:
                wi = lin_shift(list(tc.vecQ(cell["interior"])))
                arg = extremal(wi)
                if arg != D:
                    errs.append(f"{tag}: cell {ci}: its JSON interior point "
                                f"{cell['interior']} has the extremum on {arg}, dual {D}")
            gens = [R.vertices[i] for i in cell["vertices"]]
            rows = [[x - y for x, y in zip(v, gens[0])] for v in gens[1:]]
            rows += [list(R.rays[i]) for i in cell["rays"]]
            rows += [list(L) for L in R.lineality]
            cdim = tc.rank(rows) if rows else 0
            ddim = tc.rank([[x - y for x, y in zip(exps[i], exps[D[0]])] for i in D[1:]]) \
                if len(D) > 1 else 0
            if cdim != cell["dim"] or ddim != n - cell["dim"]:
                errs.append(f"{tag}: cell {ci}: dim {cell['dim']}, spanned dimension {cdim}, "
                            f"dual dimension {ddim}")
            if cell["dim"] == n - 1:
                top_duals.add(tuple(D))
                ll = tc.lattice_length([exps[i] for i in D])
                if cell.get("weight") != ll:
                    errs.append(f"{tag}: cell {ci}: weight {cell.get('weight')}, lattice "
                                f"length of the dual edge {ll}")
            if len(cell["vertices"]) == 1 and not cell["rays"]:
                single_vertex_cells[cell["vertices"][0]] = D
        for vi, v in enumerate(R.vertices):
            D = single_vertex_cells.get(vi)
            if D is None:
                errs.append(f"{tag}: vertex {vi} is not a cell of its own")
                continue
            arg = extremal(list(v))
            ddim = tc.rank([[x - y for x, y in zip(exps[i], exps[arg[0]])] for i in arg[1:]])
            if arg != D or ddim != n - nlin:
                errs.append(f"{tag}: vertex {vi} {[tc.frac_text(x) for x in v]}: extremum "
                            f"on {arg} (dim {ddim}), its cell's dual {D}")
            elif n == 2 and nlin == 0:
                # plane curves: every edge of the dual polygon is dual to a listed edge
                # of the curve at this vertex (local completeness, exact)
                poly = tc.hull2d([exps[i] for i in arg])
                for k in range(len(poly)):
                    a, b = poly[k], poly[(k + 1) % len(poly)]
                    E = tuple(i for i in arg if tc.on_segment(exps[i], a, b))
                    if E not in top_duals:
                        errs.append(f"{tag}: vertex {vi}: the dual polygon's edge {E} is "
                                    f"not dual to any listed edge")
        if R.inv.get("balanced") is not True:
            errs.append(f"{tag}: invariants.balanced is {R.inv.get('balanced')!r}")
        # random points off the complex
        for _ in range(6):
            w = rand_w(r, n)
            arg = extremal(w)
            if len(arg) != 1:
                errs.append(f"{tag}: random w {w} attains the extremum {len(arg)} times")
        # random segments: every crossing is the dual of a top cell
        sgn = -1 if maximum else 1
        for _ in range(12):
            w1, w2 = rand_w(r, n), rand_w(r, n)
            d = [b - a for a, b in zip(w1, w2)]
            # in min convention on u = sgn*w: value_i(s) = h_i + <a_i, sgn*(w1 + s d)>
            al = [h + sgn * tc.dot(a, w1) for a, h in zip(exps, hv)]
            be = [sgn * tc.dot(a, d) for a in exps]
            s = Fraction(0)
            cur = min(range(len(exps)), key=lambda i: (al[i], be[i]))
            for _step in range(10 * len(exps)):
                nxt = None
                for j in range(len(exps)):
                    if be[j] < be[cur]:
                        sj = (al[j] - al[cur]) / (be[cur] - be[j])
                        if sj > s and (nxt is None or sj < nxt):
                            nxt = sj
                if nxt is None or nxt > 1:
                    break
                s = nxt
                w = [a + s * b for a, b in zip(w1, d)]
                arg = extremal(w)
                if tuple(arg) not in top_duals:
                    errs.append(f"{tag}: segment point {[tc.frac_text(x) for x in w]} has "
                                f"extremum on {arg}, not the dual of any top cell")
                cur = min(arg, key=lambda i: be[i])
    except (KeyError, ValueError, TypeError, IndexError) as e:
        errs.append(f"{tag}: malformed JSON: {type(e).__name__}: {e}")
    return errs


KINDS = [("padic2", 60), ("padic3", 40), ("padic4", 20), ("puiseux", 50), ("param", 10),
         ("trivial", 30), ("homog", 30), ("laurent", 30), ("max", 30)]
cases = []
for kind, count in KINDS:
    for i in range(count):
        text, over, vals, n = make_poly(rng, kind)
        maximum = kind == "max" or (i % 5 == 4)
        engine = ("auto", "cdd", "fast")[i % 3]
        cases.append((kind, text, over, vals, n, maximum, rng.getrandbits(64), engine))

for errs in tc.parallel(check_case, cases):
    chk.ok(not errs, lambda errs=errs: f"seed {seed}: " + "; ".join(errs[:3]))
if chk.failures == 0:
    wd.cleanup()
chk.finish(f"{len(cases)} random polynomials checked against min/max of val + <a,w>")
