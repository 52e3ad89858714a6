"""check_amoeba_roots.py — the univariate root finder behind `trope amoeba`, measured
against mpmath.

trope finds all roots of a complex polynomial by the Aberth-Ehrlich iteration with a
backward-error stopping test (O. Aberth, Math. Comp. 27 (1973); L. W. Ehrlich, Comm. ACM
10 (1967); D. A. Bini, Numer. Algorithms 13 (1996)). For a polynomial in one variable,
`trope amoeba --format json` prints the roots.

Reference: mpmath.polyroots at 40 digits on the same exact (decimal) coefficients.
Accuracy claim checked: a backward-stable method gives each root with relative forward
error at most about kappa * d * eps, kappa = sum |c_j| |r|^j / (|r| |p'(r)|) the
condition number of the root (common practice, no source); we allow 200 * d * eps * kappa
and report the largest error seen. Inputs: random complex coefficients (degrees 1-40),
polynomials expanded from given roots, roots of wildly different sizes (1e-30 .. 1e30,
expanded exactly from decimal roots, which are then the reference), sparse and Laurent
polynomials (a power of w factored out).
"""

import json
import sys

import mpmath

import tropecheck as tc

mpmath.mp.dps = 40
trope = tc.trope_path()
chk = tc.Checker("check_amoeba_roots")
rng, seed = tc.make_rng("amoeba-roots")
wd = tc.Workdir("amoeba-roots")
EPS = 2.0 ** -52


def dec(x):
    """A decimal literal with 12 significant digits (read exactly by trope)."""
    return f"{x:.11e}"


def cnum(re, im):
    return f"({dec(re)}{'+' if im >= 0 else '-'}{dec(abs(im))}i)"


def case(coeffs, shift=0):
    """coeffs[j] (complex Python numbers, rounded to 12 digits) of w^(j+shift)."""
    terms, exact = [], []
    for j, c in enumerate(coeffs):
        if c == 0:
            exact.append(mpmath.mpc(0))
            continue
        re, im = dec(c.real), dec(c.imag)
        exact.append(mpmath.mpc(mpmath.mpf(re), mpmath.mpf(im)))
        terms.append(f"{cnum(c.real, c.imag)}*w^{j + shift}")
    return " + ".join(terms), exact


def check(text, exact, what):
    path = wd.file(text + "\n")
    rc, out, err = tc.run(trope, ["amoeba", path, "--format", "json"])
    if not chk.ok(rc == 0, f"{what}: trope exited {rc}: {err.strip()[:300]}"):
        return None
    got = json.loads(out)["roots"]
    # strip zero trailing coefficients (roots at 0 are not counted by trope)
    while exact and exact[0] == 0:
        exact = exact[1:]
    d = len(exact) - 1
    if not chk.ok(len(got) == d, f"{what}: {len(got)} roots, expected {d}"):
        return None
    # enough digits that the smallest root is resolved next to the largest
    mags = [mpmath.log10(abs(c)) for c in exact if c != 0]
    mpmath.mp.dps = 40 + int(2 * (max(mags) - min(mags)))
    try:
        ref = mpmath.polyroots(list(reversed(exact)), maxsteps=200, extraprec=200)
    except mpmath.libmp.NoConvergence:
        chk.fail(f"{what}: the reference (mpmath) did not converge")
        return None
    if any(r == 0 for r in ref):
        chk.fail(f"{what}: mpmath returned a zero root for a nonzero constant term")
        return None
    worst_ratio, worst_rel = 0.0, 0.0
    used = set()
    for r in ref:
        # the nearest unused trope root, compared in log-modulus and argument so that
        # roots of any size are compared relatively
        best, bi = None, None
        for i, g in enumerate(got):
            if i in used:
                continue
            z = mpmath.exp(mpmath.mpf(g["log_modulus"])) * mpmath.expj(mpmath.mpf(g["arg"]))
            e = abs(z - r) / abs(r)
            if best is None or e < best:
                best, bi = e, i
        used.add(bi)
        absr = abs(r)
        s = sum(abs(c) * absr ** j for j, c in enumerate(exact))
        dp = sum(j * c * r ** (j - 1) for j, c in enumerate(exact) if j > 0)
        kappa = s / (absr * abs(dp)) if dp != 0 else mpmath.inf
        bound = 200 * d * EPS * kappa
        worst_rel = max(worst_rel, float(best))
        worst_ratio = max(worst_ratio, float(best / bound) if bound > 0 else 0.0)
        mpmath.mp.dps = 40
        chk.ok(best <= bound, lambda: f"{what}: root {mpmath.nstr(r, 12)} found with "
               f"relative error {mpmath.nstr(best, 3)} > bound {mpmath.nstr(bound, 3)}")
    return worst_rel, worst_ratio


def crand():
    return complex(rng.gauss(0, 1), rng.gauss(0, 1))


stats = []
# random coefficients
for it in range(30):
    d = rng.randint(1, 30)
    coeffs = [crand() for _ in range(d + 1)]
    text, exact = case(coeffs)
    stats.append(check(text, exact, f"random degree {d}"))
# expanded from roots on several circles
for it in range(20):
    d = rng.randint(2, 20)
    roots = [mpmath.mpc(rng.gauss(0, 1), rng.gauss(0, 1)) * 10 ** rng.uniform(-2, 2)
             for _ in range(d)]
    poly = [mpmath.mpc(1)]
    for r in roots:
        poly = [(poly[j - 1] if j > 0 else 0) - r * (poly[j] if j < len(poly) else 0)
                for j in range(len(poly) + 1)]
    coeffs = [complex(c) for c in poly]
    text, exact = case(coeffs)
    stats.append(check(text, exact, f"expanded degree {d}"))
# roots of very different sizes (1e-30 .. 1e30): expanded exactly from decimal roots,
# so the roots themselves are the reference (mpmath's iteration does not converge on
# such spreads within its step limit)
from fractions import Fraction


def fdec(f):
    """A Fraction whose denominator divides a power of 10, as an exact decimal."""
    sign = "-" if f < 0 else ""
    f = abs(f)
    k = 0
    while (f * 10 ** k).denominator != 1:
        k += 1
    n = (f * 10 ** k).numerator
    if k == 0:
        return sign + str(n)
    s_ = str(n).rjust(k + 1, "0")
    return sign + s_[:-k] + "." + s_[-k:]


def exact_case(roots):
    poly = [(Fraction(1), Fraction(0))]
    for (a, b) in roots:      # multiply by (w - (a + b i))
        new_ = []
        for j in range(len(poly) + 1):
            lo = poly[j - 1] if j > 0 else (Fraction(0), Fraction(0))
            hi = poly[j] if j < len(poly) else (Fraction(0), Fraction(0))
            # lo - r * hi
            new_.append((lo[0] - (a * hi[0] - b * hi[1]), lo[1] - (a * hi[1] + b * hi[0])))
        poly = new_
    terms = []
    for j, (re, im) in enumerate(poly):
        if re == 0 and im == 0:
            continue
        terms.append(f"({fdec(re)}{'+' if im >= 0 else '-'}{fdec(abs(im))}i)*w^{j}")
    return " + ".join(terms)


def check_known(roots, what):
    path = wd.file(exact_case(roots) + "\n")
    rc, out, err = tc.run(trope, ["amoeba", path, "--format", "json"])
    if not chk.ok(rc == 0, f"{what}: trope exited {rc}: {err.strip()[:300]}"):
        return None
    got = json.loads(out)["roots"]
    if not chk.ok(len(got) == len(roots), f"{what}: {len(got)} roots"):
        return None
    mpmath.mp.dps = 80
    rs = [mpmath.mpc(mpmath.mpf(a.numerator) / a.denominator,
                     mpmath.mpf(b.numerator) / b.denominator) for (a, b) in roots]
    worst = 0.0
    for r in rs:
        best = min(abs(mpmath.exp(mpmath.mpf(g["log_modulus"])) * mpmath.expj(mpmath.mpf(g["arg"]))
                       - r) / abs(r) for g in got)
        worst = max(worst, float(best))
        # well separated roots of different sizes: condition numbers are about 1 per
        # root group; 1e-12 relative is what a backward-stable solver delivers here
        chk.ok(best < 1e-12, lambda: f"{what}: root {mpmath.nstr(r, 8)} relative error "
               f"{mpmath.nstr(best, 3)}")
    mpmath.mp.dps = 40
    return worst, 0.0


for it in range(15):
    d = rng.randint(2, 10)
    roots = []
    for _ in range(d):
        e = rng.randint(-30, 30)
        a = Fraction(rng.randint(100, 999) * rng.choice((-1, 1)), 100) * Fraction(10) ** e
        b = Fraction(rng.randint(100, 999) * rng.choice((-1, 1)), 100) * Fraction(10) ** e
        roots.append((a, b))
    stats.append(check_known(roots, f"spread degree {d}"))
# sparse and Laurent
for it in range(15):
    d = rng.randint(3, 30)
    coeffs = [crand() if (j in (0, d) or rng.random() < 0.2) else 0 for j in range(d + 1)]
    shift = rng.randint(-5, 5)
    text, exact = case(coeffs, shift)
    stats.append(check(text, exact, f"sparse degree {d} shift {shift}"))

stats = [s for s in stats if s]
wd.cleanup()
worst_rel = max(s[0] for s in stats) if stats else float("nan")
worst_ratio = max(s[1] for s in stats) if stats else float("nan")
chk.finish(f"{len(stats)} polynomials; worst relative root error {worst_rel:.2e}, "
           f"worst error / (d eps kappa) {200 * worst_ratio:.1f}; seed {seed}")
