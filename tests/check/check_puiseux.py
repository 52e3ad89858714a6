"""check_puiseux.py — `trope roots --over t --terms K`: Newton–Puiseux expansions
against numerical roots from mpmath.

Source of the reference values: mpmath.polyroots (Debian python3-mpmath) at mp.dps = 160
on the polynomial with t replaced by 10^-4 ... 10^-8. Every root trope reports (with its
multiplicity) must be matched by that many numerical roots r with

    |r - S_K(t)| <= 10 * (1 + |c_{K+1}|) * t^{e_{K+1}}

where S_K is the series truncated to K terms and c_{K+1} t^{e_{K+1}} its next term (from
a run with K+1 terms); a series trope marks as exact must match to 1e-60. This is the
statement that the truncation error is O(t^{next exponent}) (Newton–Puiseux; the polygon
rule is in Gouvêa, "p-adic Numbers", §6.4 and Neukirch, "Algebraic Number Theory",
ch. II §6 — both from memory; CHECKS.md "t-adic (Newton–Puiseux)").

Cases: ramified (x^3 - t^2), unramified infinite series (x^2 - 1 - t), irrational
coefficients (x^2 - 2t - t^2), repeated residual roots that split at the second step
((x - t)^2 - t^3, roots t ± t^(3/2) — CHECKS.md example; (x^2 - t)^2 - t^5), an exact
multiple root of the polynomial ((x - 1)^2 (x + t)), roots of negative valuation, a
repeated irrational residual root, and random polynomials with coefficients in
Q[t, t^(1/2)] (fixed seed).
"""

from fractions import Fraction
import json

import mpmath
import sympy
from mpmath import mp, mpf, mpc

import tropecheck as tc

trope = tc.trope_path()
chk = tc.Checker("check_puiseux")
rng, seed = tc.make_rng("puiseux")
mp.dps = 160
X, T = sympy.symbols("x t")
K = 4
TS = [mpf(10) ** -k for k in (4, 5, 6, 7, 8)]

CASES = [
    "x^3 - t^2",
    "(x - t)^2 - t^3",
    "x^2 - 1 - t",
    "x^2 - 2*t - t^2",
    "(x^2 - t)^2 - t^5",
    "x^3 + t*x + t^3",
    "(x - 1)^2*(x + t)",
    "t*x^4 - x^3 + (1 + t)*x - t^2",
    "(x^2 - 2*t)^2 - t^3*x",
    "x^5 - t*x^2 + t^3 - 3*t^4",
    "(1 + t)*x^2 + (2 - t^2)*x/3 + t^(1/2)",
    "x^2 + 3*t*x + 2*t^2 - t^5",
    "(x - t)*(x - 2*t)*(x - 3*t)*(x + t^2) + t^7",
    "(x^2 - t - t^2)^2*(x - 1)",
    "(x - 1/(1 - t))^2*(x + 1)",
]


def random_case():
    deg = rng.randint(2, 6)
    parts = []
    for i in range(deg + 1):
        if i not in (0, deg) and rng.random() < 0.3:
            continue
        c = rng.choice([1, -1, 2, -3, 5, 1, -1])
        e = rng.choice([0, 0, 1, 2, 3, Fraction(1, 2), Fraction(3, 2)])
        c2 = rng.choice([0, 0, 1, -2])
        term = f"({c}*t^({e})" + (f" + {c2}*t^({e + rng.randint(1, 3)})" if c2 else "") + ")"
        parts.append(f"{term}*x^{i}")
    return " + ".join(parts)


def coeff_funcs(text):
    expr = sympy.sympify(text.replace("^", "**"), locals={"x": X, "t": T})
    expr = sympy.expand(expr)
    P = sympy.Poly(expr, X)
    cs = P.all_coeffs()  # highest first
    return [sympy.lambdify(T, c, "mpmath") for c in cs]


def numeric_roots(funcs, t):
    cs = [mpmath.mpmathify(f(t)) for f in funcs]
    while cs and cs[0] == 0:
        cs.pop(0)
    zeros = 0
    while cs and cs[-1] == 0:
        cs.pop()
        zeros += 1
    rts = list(mpmath.polyroots(cs, maxsteps=4000, extraprec=800, error=False)) if len(cs) > 1 else []
    return rts + [mpc(0)] * zeros


def coef(c):
    if isinstance(c, list):
        return mpc(c[0], c[1])
    return mpf(Fraction(c).numerator) / Fraction(c).denominator


def hcoef(term):
    """The coefficient at full precision: exact, or the 100-digit strings."""
    if "coefficient_digits" in term:
        re, im = term["coefficient_digits"]
        return mpc(mpf(re), mpf(im))
    return coef(term["coefficient"])


def series_value(terms, t, k):
    s = mpc(0)
    for term in terms[:k]:
        s += hcoef(term) * mpmath.power(t, mpf(Fraction(term["exponent"]).numerator) / Fraction(term["exponent"]).denominator)
    return s


def rounding(terms, t, k):
    """error allowed by the 100 printed digits of numeric coefficients"""
    return sum((abs(hcoef(tm)) * mpf(10) ** -95 * mpmath.power(t, mpf(Fraction(tm["exponent"]).numerator) / Fraction(tm["exponent"]).denominator)
                for tm in terms[:k] if "coefficient_digits" in tm), mpf(0))


def run_json(text, k):
    rc, out, err = tc.run(trope, ["roots", text, "--over", "t", "--terms", str(k), "--format", "json"])
    if rc != 0:
        raise tc.TropeError(f"trope roots {text!r} exited {rc}: {err.strip()}")
    return json.loads(out)


def check_case(text):
    try:
        js = run_json(text, K + 1)
    except (tc.TropeError, json.JSONDecodeError) as e:
        chk.fail(str(e))
        return
    deg = js["degree"]
    total = sum(r["count"] * r["multiplicity"] for r in js["roots"])
    chk.ok(total == deg, f"{text}: roots count {total}, degree {deg}")
    # leading coefficients are shown exactly when rational: on every segment, the exact
    # leading coefficients (with multiplicity) are the rational roots of the residual
    # polynomial (sympy.roots over Q, Debian python3-sympy)
    for si, seg in enumerate(js["segments"]):
        res = sympy.Poly(list(reversed([sympy.Rational(c) for c in seg["residual_coefficients"]])), X)
        want = sorted((Fraction(str(r)), m) for r, m in sympy.roots(res, filter="Q").items())
        have = {}
        for r in js["roots"]:
            if r.get("segment") == si and r.get("terms") and isinstance(r["terms"][0]["coefficient"], str):
                c = Fraction(r["terms"][0]["coefficient"])
                have[c] = have.get(c, 0) + r["count"] * r["multiplicity"]
        chk.ok(sorted(have.items()) == want,
               f"{text}: segment {si}: exact leading coefficients {sorted(have.items())}, "
               f"rational residual roots {want}")
    funcs = coeff_funcs(text)
    # expected roots: (terms, tolerance function, how many numeric roots)
    expect = []
    for r in js["roots"]:
        if r.get("zero"):
            expect.append(("zero", None, r["multiplicity"]))
            continue
        chk.ok(r["count"] == 1 and not r["unresolved"], f"{text}: unresolved root group {r}")
        terms = r["terms"]
        if r["terminates"]:
            expect.append((terms, lambda t: mpf(10) ** -60, r["multiplicity"]))
            continue
        if len(terms) > K:
            e = Fraction(terms[K]["exponent"])
            c = abs(coef(terms[K]["coefficient"]))
        else:
            chk.ok("next_exponent" in r, f"{text}: a truncated root without next_exponent")
            e = Fraction(r.get("next_exponent", "1000"))
            c = mpf(1)
        expect.append((terms, (lambda e, c: lambda t: 10 * (1 + c) * mpmath.power(t, mpf(e.numerator) / e.denominator))(e, c), r["multiplicity"]))
        # valuations are the first exponent; exponents increase
        for tm in terms:
            if "coefficient_digits" in tm:
                # the two floats carry the same number (at least 12 correct digits)
                chk.ok(abs(coef(tm["coefficient"]) - hcoef(tm)) <= mpf(10) ** -12 * abs(hcoef(tm)),
                       f"{text}: float coefficient {tm['coefficient']} != {tm['coefficient_digits']}")
        ex = [Fraction(tm["exponent"]) for tm in terms]
        chk.ok(ex == sorted(set(ex)) and ex[0] == Fraction(r["valuation"]),
               f"{text}: exponents {ex} not increasing from the valuation {r['valuation']}")
    for t in TS:
        num = numeric_roots(funcs, t)
        used = [False] * len(num)
        for terms, tol, m in expect:
            target = mpc(0) if terms == "zero" else series_value(terms, t, K)
            bound = mpf(10) ** -60 if terms == "zero" else tol(t) + rounding(terms, t, K)
            for _ in range(m):
                best, bi = None, -1
                for i, z in enumerate(num):
                    if not used[i]:
                        d = abs(z - target)
                        if best is None or d < best:
                            best, bi = d, i
                if bi < 0:
                    chk.fail(f"{text}: fewer numerical roots than reported")
                    break
                used[bi] = True
                chk.ok(best <= bound,
                       lambda: f"{text} at t={mpmath.nstr(t, 3)}: series {mpmath.nstr(target, 12)} "
                               f"misses the nearest root {mpmath.nstr(num[bi], 12)} by "
                               f"{mpmath.nstr(best, 3)} > {mpmath.nstr(bound, 3)}")
        chk.ok(all(used), f"{text} at t={mpmath.nstr(t, 3)}: numerical roots left unmatched")


cases = CASES + [random_case() for _ in range(14)]
for c in cases:
    check_case(c)

# exactness: coefficients are exact rationals while they are rational (CHECKS.md
# example (x - t)^2 - t^3: roots t ± t^(3/2), both finite, so exact and terminating)
js = run_json("(x - t)^2 - t^3", 3)
got = sorted(tuple((tm["exponent"], tm["coefficient"]) for tm in r["terms"]) for r in js["roots"])
chk.ok(got == [(("1", "1"), ("3/2", "-1")), (("1", "1"), ("3/2", "1"))],
       f"(x - t)^2 - t^3: expected t ± t^(3/2) exactly, got {got}")
chk.ok(all(r["terminates"] for r in js["roots"]), "(x - t)^2 - t^3: roots should terminate")
# x^3 - t^2: three roots of valuation 2/3 with c^3 = 1 (CHECKS.md)
js = run_json("x^3 - t^2", 1)
cs = [coef(r["terms"][0]["coefficient"]) for r in js["roots"]]
chk.ok(len(cs) == 3 and all(abs(c ** 3 - 1) < mpf(10) ** -15 for c in cs) and
       all(r["valuation"] == "2/3" for r in js["roots"]), f"x^3 - t^2: {js['roots']}")
# a multiple root of the polynomial is reported with its multiplicity
js = run_json("(x - 1)^2*(x + t)", 3)
mults = sorted((r["multiplicity"], r["multiplicity_proved"]) for r in js["roots"])
chk.ok(mults == [(1, True), (2, True)], f"(x-1)^2(x+t): multiplicities {mults}")

# multiple roots whose series never terminate: the multiplicity comes from the
# square-free decomposition over Q(t), and is proved
for text, want in (("(x^2 - t - t^2)^2*(x - 1)", [(1, True), (2, True), (2, True)]),
                   ("(x - 1/(1 - t))^2*(x + 1)", [(1, True), (2, True)]),
                   ("(x^3 - t)^3*(x - t)^2", [(2, True), (3, True), (3, True), (3, True)])):
    js = run_json(text, 3)
    mults = sorted((r["multiplicity"], r["multiplicity_proved"]) for r in js["roots"])
    chk.ok(mults == want and all(r["count"] == 1 for r in js["roots"]),
           f"{text}: multiplicities {mults}, expected {want}")

chk.finish(f"{len(cases)} polynomials, t = 1e-4 .. 1e-8, K = {K}, seed {seed}")
