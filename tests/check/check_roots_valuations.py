"""check_roots_valuations.py — one variable: the tropical hypersurface is the set of
root valuations, each with its multiplicity (the weight), against outside references.

For n = 1, trop(f) is a finite set of points w (the vertices), with weight = the length
of the dual Newton-polygon segment, and -slope of that segment = w.

Puiseux series (parameter t), numerically:
  * random polynomials with coefficients in Q[t^(1/2), t^-1] and products of binomials;
    substitute t = 10^-30 and t = 10^-40, find the roots with mpmath.polyroots
    (Debian python3-mpmath, mp.dps = 120 plus the
    magnitude range of the coefficients), and estimate each root's valuation as
    (log|r(t1)| - log|r(t2)|) / (log t1 - log t2) (≈ log|r|/log t, CHECKS.md);
    the multiset must match trope's vertices repeated by weight (Newton–Puiseux:
    Neukirch ch. II §6 and Gouvêa §6.4 state the polygon rule, from memory);
  * the leading coefficient r / t^v of every root is a root of the initial form of the
    vertex at v (CHECKS.md, Newton–Puiseux), checked with mpmath;
  * worked examples of CHECKS.md: x^3 - t^2 (three roots of valuation 2/3, c^3 = 1),
    (x - t)^2 - t^3 (a double root of valuation 1).
p-adic, exactly (Gouvêa, "p-adic Numbers", Springer, §6.4; Koblitz, "p-adic Numbers,
p-adic Analysis, and Zeta-Functions", GTM 58, ch. IV §3 — both from memory):
  * products of binomials a*x^n - b expanded with sympy: every root of a factor has
    valuation (v(b) - v(a))/n, whatever the polygon looks like;
  * Eisenstein polynomials of degree n: n roots of valuation 1/n;
  * the sum of the root valuations is v(c_0) - v(c_n) (product of the roots);
  * p = 5, (x-1)(x-2)(x-25)(x-50): valuations {0,0,2,2}; the residual polynomial of
    the slope -2 segment (trope's initial form at w = 2) has roots {1, 2} in F_5.
"""

from fractions import Fraction

import mpmath
import sympy
from mpmath import mp, mpf

import tropecheck as tc

trope = tc.trope_path()
chk = tc.Checker("check_roots_valuations")
rng, seed = tc.make_rng("roots")
wd = tc.Workdir("roots")
mp.dps = 120
X = sympy.Symbol("x")


def trope_root_vals(path, over):
    """trope's vertices repeated by weight (sorted), and {vertex value: cell}."""
    R = tc.Result(tc.tropicalize(trope, path, over=over))
    vals = []
    cells = {}
    for cell in R.cells:
        if cell["dim"] != 0:
            continue
        (vi,) = cell["vertices"]
        v = R.vertices[vi][0]
        w = cell["weight"]
        if not isinstance(w, int) or w <= 0:
            raise tc.TropeError(f"vertex {v}: weight {w!r}")
        vals += [v] * w
        cells[v] = cell
    return sorted(vals), cells, R


# ------------------------------------------------------------ univariate Puiseux algebra
# a polynomial in x with Puiseux coefficients: {i: {exponent of t: rational}}

def pmul(f, g):
    out = {}
    for i, ci in f.items():
        for j, cj in g.items():
            acc = out.setdefault(i + j, {})
            for e1, a in ci.items():
                for e2, b in cj.items():
                    acc[e1 + e2] = acc.get(e1 + e2, Fraction(0)) + a * b
    return {i: {e: c for e, c in ce.items() if c != 0} for i, ce in out.items()
            if any(c != 0 for c in ce.values())}


def ptext(f):
    terms = []
    for i in sorted(f):
        coef = " + ".join(f"{tc.frac_text(c)}*t^({tc.frac_text(e)})"
                          for e, c in sorted(f[i].items()))
        terms.append((coef, (i,)))
    return "vars: x\n" + tc.poly_text(terms, ["x"]) + "\n"


def numeric_roots(f, tval):
    deg = max(f)
    coeffs = []
    for i in range(deg, -1, -1):
        c = f.get(i, {})
        coeffs.append(sum((mpf(a.numerator) / a.denominator
                           * mpmath.power(tval, mpf(e.numerator) / e.denominator)
                           for e, a in c.items()), mpf(0)))
    low = min(f)
    coeffs = coeffs[:len(coeffs) - low] if low else coeffs   # drop the root x = 0
    for extraprec, steps in ((80, 300), (800, 2000), (4000, 6000)):
        try:
            return mpmath.polyroots(coeffs, maxsteps=steps, extraprec=extraprec)
        except mpmath.libmp.libhyper.NoConvergence:
            continue
    raise RuntimeError("mpmath.polyroots did not converge")


def lowest(c):
    return min(c)


def initial_roots(cell):
    """Numeric roots (nonzero) of a vertex's initial form, parsed with sympy."""
    text = cell.get("initial_form")
    if not text:
        raise ValueError("no initial_form")
    expr = sympy.sympify(text.replace("^", "**"), locals={"x": X})
    P = sympy.Poly(expr * X ** 64, X)    # clears Laurent powers
    coeffs = P.all_coeffs()
    while coeffs and coeffs[-1] == 0:
        coeffs.pop()
    return [mpmath.mpc(r) for r in mpmath.polyroots([mpf(sympy.Rational(c).p) / sympy.Rational(c).q
                                                      for c in coeffs], maxsteps=400,
                                                     extraprec=200)]


def check_puiseux(f, label, expect=None):
    path = wd.file(ptext(f))
    tag = f"{path} ({label})"
    try:
        tvals, cells, _ = trope_root_vals(path, "t")
    except (tc.TropeError, KeyError, ValueError, TypeError) as e:
        chk.fail(f"{tag}: {e}")
        return
    deg, low = max(f), min(f)
    chk.ok(len(tvals) == deg - low, f"{tag}: total weight {len(tvals)}, expected {deg - low}")
    # sum of valuations = val(c_low) - val(c_deg)
    want_sum = lowest(f[low]) - lowest(f[deg])
    chk.ok(sum(tvals) == want_sum, f"{tag}: sum of root valuations {sum(tvals)}, "
           f"expected val(c_0) - val(c_n) = {want_sum}")
    if expect is not None:
        chk.ok(tvals == sorted(expect), f"{tag}: valuations {list(map(str, tvals))}, "
               f"expected {list(map(str, sorted(expect)))}")
    # precision: 120 digits beyond the range of magnitudes of the coefficients at t2
    allexp = [e for c in f.values() for e in c]
    mp.dps = 120 + int(42 * (max(allexp) - min(allexp)))
    t1, t2 = mpf(10) ** -30, mpf(10) ** -40
    try:
        r1 = sorted(numeric_roots(f, t1), key=abs)
        r2 = sorted(numeric_roots(f, t2), key=abs)
    except RuntimeError as e:
        chk.fail(f"{tag}: reference failed: {e}")
        return
    est = sorted(float((mpmath.log(abs(a)) - mpmath.log(abs(b))) / (mpmath.log(t1) - mpmath.log(t2)))
                 for a, b in zip(r1, r2))
    close = len(est) == len(tvals) and all(abs(e - float(v)) < 2e-3 for e, v in zip(est, sorted(tvals)))
    chk.ok(close, f"{tag}: mpmath valuations {[round(e, 4) for e in est]}, "
           f"trope {list(map(str, tvals))}")
    crude = sorted(float(mpmath.log(abs(b)) / mpmath.log(t2)) for b in r2)
    chk.ok(all(abs(e - float(v)) < 0.1 for e, v in zip(crude, sorted(tvals))),
           f"{tag}: log|r|/log t = {[round(e, 3) for e in crude]}")
    if not close:
        return
    # leading coefficients r / t^v solve the initial form of the vertex v
    for b in r2:
        e = float(mpmath.log(abs(b)) / mpmath.log(t2))
        v = min(cells, key=lambda q: abs(float(q) - e))
        lead = b / mpmath.power(t2, mpf(v.numerator) / v.denominator)
        try:
            roots = initial_roots(cells[v])
        except (ValueError, TypeError, sympy.SympifyError) as ex:
            chk.fail(f"{tag}: vertex {v}: unreadable initial form "
                     f"{cells[v].get('initial_form')!r}: {ex}")
            return
        dist = min(abs(lead - c) / max(1, abs(c)) for c in roots)
        chk.ok(dist < 1e-3, f"{tag}: root {mpmath.nstr(b, 8)} has leading coefficient "
               f"{mpmath.nstr(lead, 8)}, not a root of the initial form "
               f"{cells[v].get('initial_form')!r} at {v}")


def rand_coeff(r, allow_half=True):
    c = {}
    for _ in range(r.randint(1, 2)):
        e = Fraction(r.randint(-2, 4), r.choice([1, 1, 2]) if allow_half else 1)
        a = Fraction(r.choice([-1, 1]) * r.randint(1, 9), r.randint(1, 4))
        c[e] = c.get(e, 0) + a
    return {e: a for e, a in c.items() if a != 0} or {Fraction(0): Fraction(1)}


# random Puiseux polynomials
for k in range(18):
    deg = rng.randint(2, 6)
    f = {}
    for i in range(deg + 1):
        if i in (0, deg) or rng.random() < 0.7:
            f[i] = rand_coeff(rng)
    check_puiseux(f, f"random Puiseux polynomial {k}")

# products of binomials a x^n - b t^e: n roots of valuation e/n each
for k in range(10):
    f = {0: {Fraction(0): Fraction(1)}}
    expect = []
    for _ in range(rng.randint(1, 3)):
        n = rng.randint(1, 3)
        e = Fraction(rng.randint(-3, 6), rng.choice([1, 2]))
        a = Fraction(rng.randint(1, 5))
        b = Fraction(rng.choice([-1, 1]) * rng.randint(1, 7), rng.randint(1, 3))
        f = pmul(f, {n: {Fraction(0): a}, 0: {e: -b}})
        expect += [e / n] * n
    check_puiseux(f, f"binomial product {k}", expect)

# CHECKS.md examples
check_puiseux({3: {Fraction(0): Fraction(1)}, 0: {Fraction(2): Fraction(-1)}}, "x^3 - t^2",
              [Fraction(2, 3)] * 3)
check_puiseux(pmul({1: {Fraction(0): Fraction(1)}, 0: {Fraction(1): Fraction(-1)}},
                   {1: {Fraction(0): Fraction(1)}, 0: {Fraction(1): Fraction(-1)}}),
              "(x - t)^2", [Fraction(1)] * 2)
sq = pmul({1: {Fraction(0): Fraction(1)}, 0: {Fraction(1): Fraction(-1)}},
          {1: {Fraction(0): Fraction(1)}, 0: {Fraction(1): Fraction(-1)}})
sq[0] = dict(sq[0])
sq[0][Fraction(3)] = sq[0].get(Fraction(3), Fraction(0)) - 1
check_puiseux(sq, "(x - t)^2 - t^3", [Fraction(1)] * 2)


# ------------------------------------------------------------ p-adic, exact references

def padic_file(expr):
    P = sympy.Poly(sympy.expand(expr), X)
    terms = []
    for (i,), c in P.terms():
        terms.append((str(sympy.Rational(c)), (i,)))
    return wd.file("vars: x\n" + tc.poly_text(terms, ["x"]) + "\n"), P


def check_padic(expr, p, expect, label):
    path, P = padic_file(expr)
    tag = f"{path} ({label}, p = {p})"
    try:
        tvals, cells, R = trope_root_vals(path, f"p={p}")
    except (tc.TropeError, KeyError, ValueError, TypeError) as e:
        chk.fail(f"{tag}: {e}")
        return None
    coeffs = dict(((i,), c) for (i,), c in P.terms())
    deg, low = P.degree(), min(i for (i,) in coeffs)
    vsum = tc.vp(Fraction(str(coeffs[(low,)])), p) - tc.vp(Fraction(str(coeffs[(deg,)])), p)
    chk.ok(sum(tvals) == vsum, f"{tag}: sum of root valuations {sum(tvals)}, expected "
           f"v(c_0) - v(c_n) = {vsum}")
    if expect is not None:
        chk.ok(tvals == sorted(expect), f"{tag}: valuations {list(map(str, tvals))}, "
               f"expected {list(map(str, sorted(expect)))}")
    return cells


for k in range(40):
    p = rng.choice([2, 3, 5, 7])
    expr = sympy.Integer(1)
    expect = []
    for _ in range(rng.randint(1, 4)):
        n = rng.randint(1, 3)
        va, vb = rng.randint(0, 3), rng.randint(0, 6)
        a = rng.choice([1, 2, 3, 4, 6]) * p ** va
        while a % p ** (va + 1) == 0:
            a //= p
        b = rng.choice([-1, 1]) * rng.randint(1, 40)
        while b % p == 0:
            b += 1
        b *= p ** vb
        expr *= a * X ** n - b
        expect += [Fraction(tc.vp(b, p) - tc.vp(a, p), n)] * n
    check_padic(expr, p, expect, f"binomial product {k}")

for k in range(20):
    p = rng.choice([2, 3, 5, 7, 11])
    n = rng.randint(1, 7)
    expr = X ** n
    for i in range(n):
        c = p * rng.randint(-20, 20)
        if i == 0:
            c = p * rng.choice([x for x in range(1, 30) if x % p])
        expr += c * X ** i
    check_padic(expr, p, [Fraction(1, n)] * n, f"Eisenstein {k}")

for k in range(20):     # random: only the sum rule
    p = rng.choice([2, 3, 5])
    n = rng.randint(1, 7)
    expr = sympy.Integer(0)
    for i in range(n + 1):
        if i in (0, n) or rng.random() < 0.6:
            c = sympy.Rational(rng.choice([-1, 1]) * rng.randint(1, 50), rng.randint(1, 20)) \
                * sympy.Integer(p) ** rng.randint(-2, 4)
            expr += c * X ** i
    check_padic(expr, p, None, f"random {k}")

# the worked example of CHECKS.md
cells = check_padic((X - 1) * (X - 2) * (X - 25) * (X - 50), 5,
                    [0, 0, 2, 2], "CHECKS.md worked example")
if cells is not None:
    cell = cells.get(Fraction(2))
    text = cell.get("initial_form") if cell else None
    try:
        expr = sympy.sympify(text.replace("^", "**"), locals={"x": X})
        roots = sorted(r for r in range(5) if sympy.Poly(expr, X).eval(r) % 5 == 0)
        chk.ok(roots == [1, 2], f"initial form {text!r} at w = 2 has roots {roots} in F_5, "
               "expected [1, 2]")
    except (AttributeError, TypeError, ValueError, sympy.SympifyError) as e:
        chk.fail(f"worked example: unreadable initial form {text!r} at w = 2: {e}")

if chk.failures == 0:
    wd.cleanup()
chk.finish("root valuations vs mpmath.polyroots, sympy binomial products, Eisenstein, "
           "sum rule")
