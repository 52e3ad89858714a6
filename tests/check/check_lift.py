"""check_lift.py — `trope lift`: Kapranov witnesses, checked from outside.

Source of the statement: w lies on trop(f) iff w = val(z) for a zero z of f over
Puiseux series (Einsiedler, Kapranov, Lind, J. reine angew. Math. 601 (2006),
Thm 2.1.1, number from memory; CHECKS.md "Kapranov lifting"). What is checked:

  * trop(f)(w) = min_a val(c_a) + <a, w>, recomputed exactly here;
  * every witness coordinate has valuation w_i (its first exponent);
  * t-adic: the series are substituted into f with mpmath (Debian python3-mpmath,
    mp.dps = 200): |f(z(t))| shrinks like t^(residual valuation)
    (the slope of log|f| against log t between t = 1e-3 and 1e-6 is that valuation within
    0.1 below and 0.5 above, while |f| is above the noise floor of the 100 printed digits), which
    exceeds trop(f)(w); an exact witness gives |f(z(t))| < 1e-120;
  * the margin val f(z) - trop(f)(w) grows with the number of terms K;
  * p-adic: v_p(f(z)) recomputed exactly with fractions equals the reported value and
    is at least trop(f)(w) + K;
  * points off the hypersurface exit with status 2 and name the unique minimizing term;
  * the cell where the initial form does not involve the last variable (CHECKS.md
    caveat: 1 + x + t*y at w = (0, 5), in_w f = 1 + x) is lifted.
Points on trop(f) are made here: random rationals for all coordinates but one, then
every breakpoint of the piecewise-linear function of the last coordinate (exact).
"""

from fractions import Fraction
import json
import re

import mpmath
import sympy
from mpmath import mp, mpf, mpc

import jsonschema

import tropecheck as tc

trope = tc.trope_path()
chk = tc.Checker("check_lift")
rng, seed = tc.make_rng("lift")
wd = tc.Workdir("lift")
mp.dps = 200
# outputs validate against data/schema/trope.lift-1.schema.json (python3-jsonschema)
with open("data/schema/trope.lift-1.schema.json", encoding="utf-8") as f:
    SCHEMA = jsonschema.Draft202012Validator(json.load(f))
T = sympy.Symbol("t")

# polynomials over t: (text, variables)
POLYS = [
    ("x + y + 1", "x y"),
    ("t*x^2 + x*y + t^2*y^2 + x + t^3*y + 1", "x y"),
    ("x^3 + y^3 + t*x*y + t^2", "x y"),
    ("1 + x + t*y", "x y"),
    ("x*y - t*x^2 + (1 + t)*y^2 - 3*t^2 + 2*x", "x y"),
    ("x + y + z + t", "x y z"),
    ("x*y*z - t*x^2 + y^2*z + t^2 + x*z^2", "x y z"),
    ("t^(1/2)*x^2 - 2*y^2 + x*y + t", "x y"),
    ("x^2*y^-1 + t*y + 1 - x", "x y"),
]


def parse_terms(text, names):
    syms = sympy.symbols(names)
    expr = sympy.expand(sympy.sympify(text.replace("^", "**"), locals=dict(zip(names.split(), syms)) | {"t": T}))
    P = sympy.Poly(expr * sympy.prod([s ** 5 for s in syms]), *syms)  # clear Laurent
    out = []
    for mon, c in P.terms():
        a = tuple(e - 5 for e in mon)
        c = sympy.expand(c)
        # valuation in t: the lowest exponent
        v = min(Fraction(str(tm.as_coeff_exponent(T)[1])) for tm in sympy.Add.make_args(c))
        out.append((a, v, c))
    return out, syms


def trop_value(terms, w):
    return min(v + sum(Fraction(ai) * wi for ai, wi in zip(a, w)) for a, v, _ in terms)


def minimizers(terms, w):
    m = trop_value(terms, w)
    return [a for a, v, _ in terms if v + sum(Fraction(ai) * wi for ai, wi in zip(a, w)) == m]


def points_on(terms, n, count):
    """points of trop(f): random first coordinates, breakpoints in the last one"""
    out = []
    tries = 0
    while len(out) < count and tries < 200:
        tries += 1
        base = [Fraction(rng.randint(-6, 6), rng.choice([1, 1, 2, 3])) for _ in range(n - 1)]
        for i in range(len(terms)):
            for j in range(i + 1, len(terms)):
                (a, va, _), (b, vb, _) = terms[i], terms[j]
                if a[-1] == b[-1]:
                    continue
                # va + <a', base> + a_n w = vb + <b', base> + b_n w
                lhs = va - vb + sum(Fraction(x - y) * z for x, y, z in zip(a, b, base))
                w_last = lhs / (b[-1] - a[-1])
                w = base + [w_last]
                if len(minimizers(terms, w)) >= 2 and w not in out:
                    out.append(w)
    rng.shuffle(out)
    return out[:count]


def lift_json(path, w, k, over="t"):
    at = ",".join(tc.frac_text(x) for x in w)
    rc, out, err = tc.run(trope, ["lift", path, "--over", over, "--at", at, "--terms", str(k),
                                  "--format", "json"])
    return rc, out, err


def value(term):
    if "coefficient_digits" in term:
        re_, im_ = term["coefficient_digits"]
        return mpc(mpf(re_), mpf(im_))
    c = term["coefficient"]
    if isinstance(c, list):
        return mpc(c[0], c[1])
    q = Fraction(c)
    return mpf(q.numerator) / q.denominator


def zval(wit, t):
    s = mpc(0)
    for tm in wit["terms"]:
        e = Fraction(tm["exponent"])
        s += value(tm) * mpmath.power(t, mpf(e.numerator) / e.denominator)
    return s


def f_at(terms, syms, zs, t):
    total = mpc(0)
    for a, v, c in terms:
        cv = mpmath.mpmathify(sympy.lambdify(T, c, "mpmath")(t))
        m = mpc(1)
        for ai, z in zip(a, zs):
            m *= z ** ai
        total += cv * m
    return total


nlift = 0
for text, names in POLYS:
    terms, syms = parse_terms(text, names)
    n = len(syms)
    path = wd.file(f"vars: {names}\n{text}\n")
    pts = points_on(terms, n, 5)
    if text == "1 + x + t*y":
        pts = [[Fraction(0), Fraction(5)]] + pts
    for w in pts:
        margins = []
        for k in (2, 4, 6):
            rc, out, err = lift_json(path, w, k)
            if not chk.ok(rc == 0, f"{text} at {w} K={k}: exit {rc}: {err.strip()}"):
                break
            js = json.loads(out)
            errs = list(SCHEMA.iter_errors(js))
            chk.ok(not errs, lambda: f"{text} at {w}: schema: {errs[0].message}")
            nlift += 1
            chk.ok(Fraction(js["trop_value"]) == trop_value(terms, w),
                   f"{text} at {w}: trop value {js['trop_value']} != {trop_value(terms, w)}")
            wit = js["witness"]
            chk.ok([Fraction(x["terms"][0]["exponent"]) for x in wit] == list(w),
                   f"{text} at {w}: witness valuations {[x['terms'][0]['exponent'] for x in wit]}")
            chk.ok(all(abs(value(x["terms"][0])) > 0 for x in wit), f"{text} at {w}: zero leading coefficient")
            if js["residual_zero"]:
                margins.append(None)
                zs = [zval(x, mpf(10) ** -6) for x in wit]
                chk.ok(abs(f_at(terms, syms, zs, mpf(10) ** -6)) < mpf(10) ** -120,
                       f"{text} at {w}: claimed exact witness does not vanish")
                continue
            rv = Fraction(js["residual_valuation"])
            chk.ok(rv > Fraction(js["trop_value"]) and Fraction(js["margin"]) == rv - Fraction(js["trop_value"]),
                   f"{text} at {w}: residual valuation {rv} not above trop value {js['trop_value']}")
            margins.append(Fraction(js["margin"]))
            # the witness coefficients are printed to 100 digits: below
            # 1e-95 * (largest term of f at z) the numerical value is noise
            t1, t2 = mpf(10) ** -3, mpf(10) ** -6
            zs1 = [zval(x, t1) for x in wit]
            zs2 = [zval(x, t2) for x in wit]
            f1 = abs(f_at(terms, syms, zs1, t1))
            f2 = abs(f_at(terms, syms, zs2, t2))
            fl1 = mpf(10) ** -95 * mpmath.power(t1, float(Fraction(js["trop_value"]))) * 10 ** 3
            fl2 = mpf(10) ** -95 * mpmath.power(t2, float(Fraction(js["trop_value"]))) * 10 ** 3
            if f1 > fl1 and f2 > fl2:
                slope = (mpmath.log(f2) - mpmath.log(f1)) / (mpmath.log(t2) - mpmath.log(t1))
                chk.ok(slope >= float(rv) - 0.1,
                       f"{text} at {w} K={k}: |f(z(t))| ~ t^{mpmath.nstr(slope, 5)}, reported {rv}")
                chk.ok(abs(slope - float(rv)) < 0.5,
                       f"{text} at {w} K={k}: |f(z(t))| ~ t^{mpmath.nstr(slope, 5)}, reported {rv} "
                       f"(too pessimistic)")
            else:
                # below the noise floor: consistent with a residual valuation that large
                chk.ok(f2 <= fl2 * 10 ** 6 and mpf(10) ** 6 * mpmath.power(t2, float(rv)) <= 1e-80 + fl2 * 10 ** 6,
                       f"{text} at {w} K={k}: |f(z)| = {mpmath.nstr(f2, 3)} at t=1e-6 with "
                       f"residual valuation {rv}")
        ms = [m for m in margins if m is not None]
        if len(ms) == len(margins) and len(ms) >= 2:
            chk.ok(all(b > a for a, b in zip(ms, ms[1:])), f"{text} at {w}: margins {ms} do not grow with K")

# the solved variable comes from the initial form: on 1 + x + t*y at (0, 5) it is x
path = wd.file("vars: x y\n1 + x + t*y\n")
rc, out, err = lift_json(path, [0, 5], 3)
if chk.ok(rc == 0, f"1 + x + t*y at (0,5): exit {rc} {err}"):
    chk.ok(json.loads(out)["solved_variable"] == "x", "1 + x + t*y at (0,5): should solve for x")

# off the hypersurface: exit 2, file:line:col, the unique minimizing term named
for text, names in POLYS[:5]:
    terms, syms = parse_terms(text, names)
    path = wd.file(f"vars: {names}\n{text}\n")
    for _ in range(4):
        w = [Fraction(rng.randint(-9, 9), rng.choice([1, 2])) for _ in syms]
        mins = minimizers(terms, w)
        if len(mins) != 1:
            continue
        rc, out, err = lift_json(path, w, 3)
        chk.ok(rc == 2 and out == "" and re.match(r"^[^:]+:2:1: .*not on the tropical hypersurface", err)
               and err.count("\n") == 1,
               f"{text} at {w}: expected one error line and exit 2, got {rc}: {err!r}")

# p-adic witnesses, exactly
PAD = [("x^2 - 7*x*y + 3*y^2 + y + 49", "x y", 7),
       ("x + y + 5", "x y", 5),
       ("x^3 + 2*x*y + 4*y^2 + 8 + x*y^2", "x y", 2),
       ("x*y + 3*x + 9*y + 27*x^2*y^2 + 1", "x y", 3),
       ("x + y + z + 11*x*y*z - 121", "x y z", 11)]
npad = 0
for text, names, p in PAD:
    syms = sympy.symbols(names)
    poly = sympy.Poly(sympy.sympify(text.replace("^", "**"), locals=dict(zip(names.split(), syms))), *syms)
    terms = [(mon, tc.vp(Fraction(int(sympy.numer(c)), int(sympy.denom(c))), p),
              Fraction(int(sympy.numer(c)), int(sympy.denom(c)))) for mon, c in poly.terms()]
    path = wd.file(f"vars: {names}\n{text}\n")
    pts = [w for w in points_on([(a, v, None) for a, v, _ in terms], len(syms), 12)
           if all(x.denominator == 1 for x in w)]
    for w in pts[:6]:
        for k in (3, 6):
            rc, out, err = lift_json(path, w, k, over=f"p={p}")
            if rc == 2 and "simple root in the residue field" in err:
                continue  # no F_p point on the initial form: allowed, said clearly
            if not chk.ok(rc == 0, f"{text} p={p} at {w}: exit {rc}: {err.strip()}"):
                continue
            js = json.loads(out)
            errs = list(SCHEMA.iter_errors(js))
            chk.ok(not errs, lambda: f"{text} p={p} at {w}: schema: {errs[0].message}")
            npad += 1
            zs = []
            for x, wi in zip(js["witness"], w):
                if x["solved"]:
                    z = Fraction(p) ** int(wi) * int(x["approximation"])
                else:
                    z = Fraction(p) ** int(wi) * Fraction(x["terms"][0]["coefficient"])
                chk.ok(tc.vp(z, p) == wi, f"{text} p={p} at {w}: v_p(z) = {tc.vp(z, p)} != {wi}")
                zs.append(z)
            fz = sum(c * sympy.prod([z ** e for z, e in zip(zs, a)]) for a, v, c in terms)
            fz = Fraction(fz)
            tv = min(v + sum(ai * wi for ai, wi in zip(a, w)) for a, v, c in terms)
            chk.ok(Fraction(js["trop_value"]) == tv, f"{text} p={p} at {w}: trop value")
            if fz == 0:
                chk.ok(js["residual_zero"], f"{text} p={p} at {w}: f(z) = 0 not reported")
            else:
                chk.ok(not js["residual_zero"] and Fraction(js["residual_valuation"]) == tc.vp(fz, p)
                       and tc.vp(fz, p) >= tv + k,
                       f"{text} p={p} at {w} K={k}: v_p(f(z)) = {tc.vp(fz, p)}, reported "
                       f"{js.get('residual_valuation')}, trop {tv}")

wd.cleanup()
chk.finish(f"{nlift} t-adic and {npad} p-adic witnesses, seed {seed}")
