"""check_rootcount.py — property test: root counts always add up to the degree.

Random univariate polynomials (fixed seed; Laurent exponents, missing terms, the root 0,
coefficients with rational valuations and rational-function coefficients over t;
p-adic coefficients over several primes) go through `trope roots --format json`:

  * segment counts plus the multiplicity of the root 0 equal the degree (the span of the
    exponents for Laurent input), and so does the sum over reported roots of
    count * multiplicity (fundamental theorem of algebra over the algebraically closed
    field of Puiseux series / C_p; Newton polygon rule, Gouvêa "p-adic Numbers" §6.4,
    from memory);
  * the root valuations, with multiplicity, sum to v(c_low) - v(c_high) (the product of
    the roots is ±c_low/c_high; common practice, no source);
  * the reported segments are the lower hull of (i, v(c_i)), recomputed here exactly,
    sorted by decreasing valuation;
  * every reported root's valuation is one of the segment valuations, and per segment
    the roots account for exactly its count.
"""

from fractions import Fraction
import json

import jsonschema

import tropecheck as tc

trope = tc.trope_path()
chk = tc.Checker("check_rootcount")
rng, seed = tc.make_rng("rootcount")
# every output also validates against data/schema/trope.roots-1.schema.json (jsonschema,
# Debian python3-jsonschema)
with open("data/schema/trope.roots-1.schema.json", encoding="utf-8") as f:
    SCHEMA = jsonschema.Draft202012Validator(json.load(f))


def lower_hull(points):
    hull = []
    for pt in sorted(points):
        while len(hull) >= 2:
            (x0, y0), (x1, y1) = hull[-2], hull[-1]
            if (x1 - x0) * (pt[1] - y0) - (y1 - y0) * (pt[0] - x0) <= 0:
                hull.pop()
            else:
                break
        hull.append(pt)
    return hull


def frac(q):
    return tc.frac_text(q)


def random_tadic():
    lo = rng.randint(-3, 2)
    hi = lo + rng.randint(1, 8)
    terms, vals = [], {}
    for i in range(lo, hi + 1):
        if i not in (lo, hi) and rng.random() < 0.4:
            continue
        v = Fraction(rng.randint(-4, 8), rng.choice([1, 1, 2, 3]))
        c = rng.choice([1, -1, 2, -5, Fraction(3, 7)])
        coef = f"{frac(c)}*t^({frac(v)})"
        kind = rng.random()
        if kind < 0.25:
            coef = f"({coef} + {rng.randint(1, 4)}*t^({frac(v + rng.randint(1, 3))}))"
        elif kind < 0.4:
            # a rational function of valuation v: the denominator has valuation 0
            coef = f"({coef})/(1 - {rng.randint(1, 3)}*t)"
        vals[i] = v
        terms.append(f"{coef}*x^{i}")
    return " + ".join(terms), vals, lo, hi


def random_padic(p):
    lo = rng.randint(-2, 2)
    hi = lo + rng.randint(1, 9)
    terms, vals = [], {}
    for i in range(lo, hi + 1):
        if i not in (lo, hi) and rng.random() < 0.3:
            continue
        u = rng.choice([x for x in range(-50, 51) if x % p])
        w = rng.choice([x for x in range(1, 30) if x % p])
        e = rng.randint(-3, 5)
        c = Fraction(u, w) * Fraction(p) ** e
        vals[i] = tc.vp(c, p)
        terms.append(f"{frac(c)}*x^{i}")
    return " + ".join(terms), vals, lo, hi


def check(text, vals, lo, hi, over, k):
    rc, out, err = tc.run(trope, ["roots", text, "--over", over, "--terms", str(k), "--format", "json"])
    if not chk.ok(rc == 0, f"{text} over {over}: exit {rc}: {err.strip()}"):
        return
    js = json.loads(out)
    errs = list(SCHEMA.iter_errors(js))
    chk.ok(not errs, lambda: f"{text}: schema: {errs[0].message} at {list(errs[0].path)}")
    nz = lo if lo > 0 else 0
    deg = hi - lo + nz
    chk.ok(js["degree"] == deg and js["zero_roots"] == nz,
           f"{text}: degree {js['degree']} (zero roots {js['zero_roots']}), expected {deg} ({nz})")
    segsum = sum(s["count"] for s in js["segments"]) + js["zero_roots"]
    chk.ok(segsum == deg, f"{text} over {over}: segments count {segsum} != degree {deg}")
    rootsum = sum(r["count"] * r["multiplicity"] for r in js["roots"])
    chk.ok(rootsum == deg, f"{text} over {over}: roots count {rootsum} != degree {deg}")
    hull = lower_hull([(i - lo, v) for i, v in vals.items()])
    want = [(Fraction(v0 - v1) / (i1 - i0), i1 - i0) for (i0, v0), (i1, v1) in zip(hull, hull[1:])]
    got = [(Fraction(s["valuation"]), s["count"]) for s in js["segments"]]
    chk.ok(got == want, f"{text} over {over}: segments {got}, expected {want}")
    chk.ok(all(a[0] > b[0] for a, b in zip(got, got[1:])), f"{text}: segments not by decreasing valuation")
    total = sum(v * n for v, n in got)
    chk.ok(total == vals[lo] - vals[hi], f"{text}: valuations sum {total} != {vals[lo] - vals[hi]}")
    per = {}
    for r in js["roots"]:
        if r.get("zero"):
            continue
        v = Fraction(r["valuation"])
        per[v] = per.get(v, 0) + r["count"] * r["multiplicity"]
        if "terms" in r and r["terms"]:
            chk.ok(len(r["terms"]) <= k and Fraction(r["terms"][0]["exponent"]) == v,
                   f"{text}: root terms {r['terms'][:2]} vs valuation {v}")
    chk.ok(per == {v: n for v, n in got}, f"{text} over {over}: roots per valuation {per}, segments {got}")


n = 0
for _ in range(70):
    text, vals, lo, hi = random_tadic()
    check(text, vals, lo, hi, "t", rng.choice([0, 1, 2, 3]))
    n += 1
for _ in range(70):
    p = rng.choice([2, 3, 5, 7, 101, 1000003])
    text, vals, lo, hi = random_padic(p)
    check(text, vals, lo, hi, f"p={p}", rng.choice([0, 1, 4]))
    n += 1
# bad input: one line "file:line:col: ..." on stderr, exit status 2, nothing on stdout,
# no output file (common practice, DESIGN.md "Input language")
import os
import re
import tempfile

tmpd = tempfile.mkdtemp(prefix="trope-rootcount-")
multi = os.path.join(tmpd, "multi.txt")
with open(multi, "w", encoding="utf-8") as f:
    f.write("over: t\nx^2 - t\n;\nx*y + 1\n")
outp = os.path.join(tmpd, "out.json")
BAD = [
    (["roots", "x^2 + * 3", "--over", "t"], r"^<argument>:1:7: "),
    (["roots", "x*y + 1", "--over", "t"], r"^<argument>:1:1: .*one variable"),
    (["roots", "x^2 + 1", "--over", "Q"], r"^<argument>:1:1: .*valued field"),
    (["roots", "7/3 + t", "--over", "t"], r"^<argument>:1:1: .*constant"),
    (["roots", "x^2 + 1", "--over", "t", "--terms", "x"], r"^trope roots: --terms"),
    (["roots", multi, "--format", "json", "-o", outp], r"^" + re.escape(multi) + r":4:1: .*one variable"),
    (["roots", "x^2 - (1 + t", "--over", "t"], r"^<argument>:1:\d+: "),
    (["lift", multi, "--at", "1,2"], r"^" + re.escape(multi) + r":4:1: expected one polynomial"),
    (["lift", "-", "--at", "1,zz", "--over", "t"], r"^trope lift: --at"),
]
for args, pat in BAD:
    rc, out, err = tc.run(trope, args, stdin=b"x + y + 1\n")
    chk.ok(rc == 2 and out == "" and re.match(pat, err) and err.count("\n") == 1,
           f"trope {' '.join(args)}: expected exit 2 and one line matching {pat!r}, got {rc}: {err!r}")
chk.ok(not os.path.exists(outp), "a failed run left an output file")
rc, out, err = tc.run(trope, ["lift", "-", "--at", "1,1", "--over", "t"], stdin=b"x + y + t\n")
chk.ok(rc == 0 and "f(z) = 0 exactly" in out, f"lift from standard input: {rc} {err}")

chk.finish(f"{n} random polynomials, seed {seed}")
