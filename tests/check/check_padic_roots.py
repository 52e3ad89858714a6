"""check_padic_roots.py — `trope roots --over p=P`: Newton polygons, residual
polynomials over F_p and Hensel digits, checked exactly.

Sources:
  * The Newton polygon rule: a lower-hull segment of (i, v_p(c_i)) of slope s and
    horizontal length l gives exactly l roots of valuation -s. Gouvêa, "p-adic Numbers",
    Springer, §6.4; Koblitz, "p-adic Numbers, p-adic Analysis, and Zeta-Functions",
    GTM 58, ch. IV §3 (both from memory). Ground truth independent of any polygon:
    products of binomials a*x^n - b (expanded with sympy) have all roots of a factor at
    valuation (v(b) - v(a))/n (CHECKS.md).
  * Worked textbook example (from memory: Koblitz GTM 58 ch. IV §3 and Gouvêa §6.4 both
    use Eisenstein polynomials this way): the cyclotomic polynomial Phi_p(x + 1) is
    Eisenstein, so its p - 1 roots zeta - 1 all have valuation 1/(p - 1) (one segment,
    ramification p - 1); and every Eisenstein polynomial of degree n has n roots of
    valuation 1/n.
  * CHECKS.md example: p = 5, (x-1)(x-2)(x-25)(x-50): valuations {0,0,2,2}; the residual
    polynomial of the segment of valuation 2 has the roots {1, 2} in F_5.
  * Residual polynomials and their factorisation and roots over F_p against sympy
    (Debian python3-sympy: Poly(..., modulus=p).factor_list()).
  * Hensel digits verified by exact evaluation: for a root reported in Q_p with K digits
    and valuation v on a segment whose points have value mu = v_p(c_i) + i*v,
    v_p(f(p^v * u)) >= mu + K, where u = sum d_k p^k (Hensel's lemma, Gouvêa §3.4 /
    Koblitz ch. I §5, from memory); the digits are the base-p digits of u.
"""

from fractions import Fraction
import json

import sympy

import tropecheck as tc

trope = tc.trope_path()
chk = tc.Checker("check_padic_roots")
rng, seed = tc.make_rng("padic-roots")
X = sympy.Symbol("x")
K = 7


def roots_json(text, p, k=K):
    rc, out, err = tc.run(trope, ["roots", text, "--over", f"p={p}", "--terms", str(k),
                                  "--format", "json"])
    if rc != 0:
        raise tc.TropeError(f"trope roots {text!r} --over p={p} exited {rc}: {err.strip()}")
    return json.loads(out)


def coeffs_of(expr):
    """{i: Fraction c_i} of a univariate sympy polynomial"""
    P = sympy.Poly(sympy.expand(expr), X)
    out = {}
    for (i,), c in P.terms():
        out[i] = Fraction(int(sympy.numer(c)), int(sympy.denom(c)))
    return out


def text_of(expr):
    return str(sympy.expand(expr)).replace("**", "^")


def lower_hull(points):
    pts = sorted(points)
    hull = []
    for pt in pts:
        while len(hull) >= 2:
            (x0, y0), (x1, y1) = hull[-2], hull[-1]
            if (x1 - x0) * (pt[1] - y0) - (y1 - y0) * (pt[0] - x0) <= 0:
                hull.pop()
            else:
                break
        hull.append(pt)
    return hull


def check_poly(expr, p, expected_vals=None, label=None):
    label = label or f"{text_of(expr)} (p={p})"
    cs = coeffs_of(expr)
    try:
        js = roots_json(text_of(expr), p)
    except (tc.TropeError, json.JSONDecodeError) as e:
        chk.fail(str(e))
        return None
    low = min(cs)
    deg = max(cs)
    chk.ok(js["degree"] == deg and js["zero_roots"] == low,
           f"{label}: degree {js['degree']}, zero roots {js['zero_roots']}")
    # polygon, independently
    pts = [(i, tc.vp(c, p)) for i, c in cs.items()]
    hull = lower_hull(pts)
    segs = []
    for (i0, v0), (i1, v1) in zip(hull, hull[1:]):
        segs.append((Fraction(v0 - v1, i1 - i0), i1 - i0, i0, i1))
    got = [(Fraction(s["valuation"]), s["count"], s["start"], s["end"]) for s in js["segments"]]
    chk.ok(got == segs, f"{label}: segments {got}, expected {segs}")
    vals = sorted(v for v, n, _, _ in segs for _ in range(n))
    if expected_vals is not None:
        chk.ok(vals == sorted(expected_vals), f"{label}: valuations {vals}, expected {sorted(expected_vals)}")
    # sum of root valuations = v(c_low) - v(c_deg) (product of the roots)
    chk.ok(sum(vals) == tc.vp(cs[low], p) - tc.vp(cs[deg], p), f"{label}: sum of valuations")
    for s, (v, n, i0, i1) in zip(js["segments"], segs):
        # residual polynomial: res(c_i) x^(i - i0) over F_p for the points on the segment
        res = [0] * (n + 1)
        for i, c in cs.items():
            if i0 <= i <= i1 and tc.vp(c, p) == pts[[q[0] for q in pts].index(i)][1] \
                    and Fraction(tc.vp(c, p)) == Fraction(tc.vp(cs[i0], p)) - v * (i - i0):
                u = c / Fraction(p) ** tc.vp(c, p)
                res[i - i0] = (u.numerator * pow(u.denominator, -1, p)) % p
        chk.ok([int(Fraction(r)) for r in s["residual_coefficients"]] == res,
               f"{label}: residual {s['residual_coefficients']} expected {res}")
        R = sympy.Poly(list(reversed(res)), X, modulus=p)
        lc, facs = R.factor_list()
        want = sorted((tuple(int(c) % p for c in f.monic().all_coeffs()), m) for f, m in facs)
        have = []
        for fa in s["factors"]:
            F = sympy.Poly(sympy.sympify(fa["factor"].replace("^", "**"), locals={"x": X}), X, modulus=p)
            have.append((tuple(int(c) % p for c in F.all_coeffs()), fa["multiplicity"]))
            chk.ok(F.is_irreducible, f"{label}: factor {fa['factor']} is reducible mod {p}")
        chk.ok(sorted(have) == want, f"{label}: factors {sorted(have)}, sympy {want}")
        # roots in F_p by brute force (small p) or from sympy's linear factors
        rts = sorted((int((-f[1]) % p), m) for f, m in want if len(f) == 2)
        chk.ok(sorted((r["root"], r["multiplicity"]) for r in s["residual_roots"]) == rts,
               f"{label}: residual roots {s['residual_roots']}, expected {rts}")
    # roots: Hensel digits, verified exactly
    total = 0
    for r in js["roots"]:
        total += r["count"] * r["multiplicity"]
        if r.get("zero") or not r.get("in_Qp"):
            continue
        v = Fraction(r["valuation"])
        digits = r["digits"]
        u = int(r["approximation"])
        chk.ok(len(digits) == K and all(0 <= d < p for d in digits) and
               sum(d * p ** k for k, d in enumerate(digits)) == u,
               f"{label}: digits {digits} do not spell {u}")
        z = Fraction(p) ** int(v) * u
        fz = sum(c * z ** i for i, c in cs.items())
        mu = min(tc.vp(c, p) + i * v for i, c in cs.items())
        chk.ok(fz == 0 or tc.vp(fz, p) >= mu + K,
               f"{label}: f(z) has valuation {tc.vp(fz, p) if fz else 'inf'} < {mu} + {K}")
        chk.ok(digits[0] % p != 0, f"{label}: a root of valuation {v} must have a unit digit")
    chk.ok(total == deg, f"{label}: roots count {total}, degree {deg}")
    return js


# CHECKS.md example
js = check_poly((X - 1) * (X - 2) * (X - 25) * (X - 50), 5, [0, 0, 2, 2])
if js:
    seg2 = [s for s in js["segments"] if s["valuation"] == "2"]
    chk.ok(len(seg2) == 1 and [r["root"] for r in seg2[0]["residual_roots"]] == [1, 2],
           "p=5 example: residual roots of the valuation-2 segment should be {1, 2}")
    qp = sorted(int(r["approximation"]) * 5 ** int(r["valuation"]) for r in js["roots"] if r["in_Qp"])
    chk.ok(qp == [1, 2, 25, 50], f"p=5 example: Q_p roots {qp} (the roots are rational)")

# squares in Q_2 and Q_p whose residual root is repeated: x^2 - a with a = 1 mod 8
# (p = 2), repeated factors, and x^2 - 2 (a square mod 7, so in Q_7) against x^2 - 3
# (not a square mod 7); digits verified exactly above
for expr, p, nq in (((X ** 2 - 17), 2, 2), ((X ** 2 - 41), 2, 2), ((X ** 2 + 1), 2, 0),
                    ((X - 1) ** 3 * (X - 26), 5, 4), ((X ** 2 - 2) * (X - 7) ** 2, 7, 4), ((X ** 2 - 3) * (X - 7) ** 2, 7, 2),
                    ((X - 3) ** 2 * (X - 3 - 2 ** 5) * (X + 5), 2, 4)):
    js = check_poly(expr, p, None, f"{text_of(expr)} (p={p})")
    if js:
        got = sum(r["count"] * r["multiplicity"] for r in js["roots"] if r.get("in_Qp"))
        chk.ok(got == nq, f"{text_of(expr)} (p={p}): {got} roots with digits, expected {nq}")

# cyclotomic Phi_p(x + 1) (Eisenstein): p - 1 roots of valuation 1/(p - 1)
for p in (2, 3, 5, 7, 11):
    phi = sympy.expand(((X + 1) ** p - 1) / X)
    phi = sympy.Poly(sympy.cancel(phi), X).as_expr()
    js = check_poly(phi, p, [Fraction(1, p - 1)] * (p - 1), f"Phi_{p}(x+1)")
    if js:
        chk.ok(len(js["segments"]) == 1 and js["segments"][0]["ramification"] == p - 1,
               f"Phi_{p}(x+1): one segment with ramification {p - 1}")

# random Eisenstein polynomials
for _ in range(12):
    p = rng.choice([2, 3, 5, 7, 13])
    n = rng.randint(2, 7)
    cs = [p * rng.choice([1, -1]) * rng.choice([x for x in range(1, 40) if x % p])]
    cs += [p * rng.randint(-20, 20) for _ in range(n - 1)]
    expr = X ** n * rng.choice([x for x in range(1, 9) if x % p]) + sum(c * X ** i for i, c in enumerate(cs))
    check_poly(expr, p, [Fraction(1, n)] * n, f"Eisenstein {text_of(expr)} (p={p})")

# products of binomials a*x^n - b: valuations (v(b) - v(a))/n, whatever the polygon
for _ in range(40):
    p = rng.choice([2, 3, 5, 7])
    expr = sympy.Integer(1)
    vals = []
    for _ in range(rng.randint(1, 4)):
        n = rng.randint(1, 3)
        a = rng.choice([x for x in range(1, 12) if x % p]) * p ** rng.randint(0, 2)
        b = rng.choice([x for x in range(-12, 13) if x % p]) * p ** rng.randint(0, 4)
        if rng.random() < 0.2:
            b = Fraction(b, p ** rng.randint(1, 2))
        b = sympy.Rational(Fraction(b).numerator, Fraction(b).denominator)
        expr = expr * (a * X ** n - b)
        vals += [Fraction(tc.vp(Fraction(int(b.p), int(b.q)), p) - tc.vp(a, p), n)] * n
    if rng.random() < 0.2:
        expr = expr * X ** rng.randint(1, 2)
    check_poly(expr, p, vals + [], None) if not expr.has(sympy.Pow(X, -1)) else None

# products of linear factors x - r with rational r: every root lies in Q_p and Hensel
# must recover it digit by digit (when its residual root is simple)
for _ in range(25):
    p = rng.choice([3, 5, 7, 11])
    rts = []
    while len(rts) < rng.randint(2, 5):
        r = rng.choice([x for x in range(-30, 31) if x]) * p ** rng.randint(-1, 3)
        if r not in rts:
            rts.append(r)
    expr = sympy.Integer(1)
    for r in rts:
        expr = expr * (X - sympy.Rational(Fraction(r).numerator, Fraction(r).denominator))
    js = check_poly(expr, p, [tc.vp(r, p) for r in rts])
    if js:
        # distinct rational roots all lie in Q_p: every one gets digits, after refining
        # repeated residual roots (Newton polygon of f(A + p^e y) again)
        nq = sum(r["count"] * r["multiplicity"] for r in js["roots"] if r.get("in_Qp"))
        chk.ok(nq == len(rts), f"roots {rts} (p={p}): only {nq} reported in Q_p")
        for r in js["roots"]:
            if r.get("in_Qp"):
                v = int(r["valuation"])
                u = int(r["approximation"])
                # some true root agrees with p^v * u modulo p^(v + K)
                M = p ** K
                ok = any(tc.vp(r0, p) == v and (Fraction(r0) / Fraction(p) ** v).denominator % p != 0 and
                         ((Fraction(r0) / Fraction(p) ** v).numerator * pow((Fraction(r0) / Fraction(p) ** v).denominator, -1, M) - u) % M == 0
                         for r0 in rts)
                chk.ok(ok, f"roots {rts} (p={p}): digits of {u}*p^{v} match no root")

chk.finish(f"p in 2..13, K = {K}, seed {seed}")
