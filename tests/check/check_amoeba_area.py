"""check_amoeba_area.py — the area of the amoeba from `trope amoeba --format json`.

Sources:
  * area(A(f)) <= pi^2 area(Delta) (Passare, Rullgard, "Amoebas, Monge-Ampere measures,
    and triangulations of the Newton polytope", Duke Math. J. 121 (2004)); equality
    exactly for simple Harnack curves (Mikhalkin, Rullgard, "Amoebas of maximal area",
    IMRN 2001). Lines: pi^2/2 = 4.934802200544679 whatever the coefficients.
  * Higher degree, real, Harnack: f = prod_k (z + a_k) + w prod_k (z - b_k), a_k, b_k > 0.
    f is linear in w, so the slice over x1 is the range of log|A/B| on |z| = e^x1
    (exact reduction, CHECKS.md); here the maximum is at z = e^x1 and the minimum at
    z = -e^x1, the slice length is sum over all a_k, b_k of log((r + c)/|r - c|), r = e^x1,
    and each term integrates over x1 to int_0^oo log|(1+u)/(1-u)| du/u = pi^2/2 (common
    practice: 2 sum 1/(2n+1)^2 twice). So the area is (m + n) pi^2 / 2 = pi^2 area(Delta),
    Delta = conv{(0,0), (m,0), (0,1), (n,1)}: maximal, as Mikhalkin-Rullgard predict.
  * The unimodular substitution z -> z w maps the amoeba by a linear map of determinant 1
    (area kept) and makes f nonlinear in w: same expected area.
  * Other curves (random complex coefficients, degree 2-3) lie strictly below the bound.
  * The "maximum" field pi^2 area(Delta) is compared with scipy's Qhull volume of the
    exponents (Debian python3-scipy).
Claims: the reported error estimate covers the true error where the area is known, and
the area is within 1e-6 relative of it at --area-tol 1e-7.
"""

import json
import math

from scipy.spatial import ConvexHull

import tropecheck as tc

trope = tc.trope_path()
chk = tc.Checker("check_amoeba_area")
rng, seed = tc.make_rng("amoeba-area")
wd = tc.Workdir("amoeba-area")
PI2 = math.pi ** 2


def dec(x):
    return f"{x:.6e}"


def cnum(c):
    return f"({dec(c.real)}{'+' if c.imag >= 0 else '-'}{dec(abs(c.imag))}i)"


def text_of(terms):
    return " + ".join(f"{cnum(c)}*z^{i}*w^{j}" for (i, j), c in terms)


def polymul(p, q):
    """polynomials in z as coefficient lists"""
    r = [0.0] * (len(p) + len(q) - 1)
    for i, a in enumerate(p):
        for j, b in enumerate(q):
            r[i + j] += a * b
    return r


def run(terms, what, tol="1e-7"):
    path = wd.file(text_of(terms) + "\n")
    rc, out, err = tc.run(trope, ["amoeba", path, "--format", "json", "--area-tol", tol],
                          timeout=600)
    if not chk.ok(rc == 0, f"{what}: trope exited {rc}: {err.strip()[:300]}"):
        return None
    J = json.loads(out)
    pts = [e for e, c in terms]
    delta = ConvexHull(pts).volume
    chk.ok(abs(J["area"]["maximum"] - PI2 * delta) < 1e-9 * PI2 * delta,
           f"{what}: maximum {J['area']['maximum']} vs pi^2 * {delta} (Qhull)")
    return J["area"]["value"], J["area"]["error"], PI2 * delta


report = []


def exact_case(terms, exact, what):
    r = run(terms, what)
    if not r:
        return
    a, e, mx = r
    report.append(abs(a - exact) / exact)
    chk.ok(abs(a - exact) <= 1e-6 * exact, f"{what}: area {a!r}, expected {exact!r} "
           f"(error {abs(a - exact):.2e})")
    chk.ok(abs(a - exact) <= e + 1e-12, f"{what}: true error {abs(a - exact):.2e} above the "
           f"estimate {e:.2e}")


# lines
for it in range(4):
    cs = [complex(rng.gauss(0, 1), rng.gauss(0, 1)) * math.exp(rng.uniform(-3, 3))
          for _ in range(3)]
    exact_case([((0, 0), cs[0]), ((1, 0), cs[1]), ((0, 1), cs[2])], PI2 / 2, f"line {it}")

# real Harnack curves linear in w, and their images under z -> z w
for it, (m, n) in enumerate([(1, 1), (2, 1), (3, 2)]):
    a = [round(math.exp(rng.uniform(-1.5, 1.5)), 3) for _ in range(m)]
    b = [round(math.exp(rng.uniform(-1.5, 1.5)), 3) for _ in range(n)]
    A, B = [1.0], [1.0]
    for ak in a:
        A = polymul(A, [ak, 1.0])
    for bk in b:
        B = polymul(B, [-bk, 1.0])
    terms = [((i, 0), complex(c)) for i, c in enumerate(A)] + \
            [((i, 1), complex(c)) for i, c in enumerate(B)]
    exact = (m + n) * PI2 / 2
    exact_case(terms, exact, f"Harnack m={m} n={n} (a={a}, b={b})")
    sheared = [((i, i + j), c) for (i, j), c in terms]
    exact_case(sheared, exact, f"Harnack m={m} n={n} after z -> z w")

# other curves: strictly below the bound
below = []
for it in range(5):
    d = rng.randint(2, 3)
    terms = []
    for i in range(d + 1):
        for j in range(d + 1 - i):
            c = complex(rng.gauss(0, 1), rng.gauss(0, 1)) * math.exp(rng.uniform(-1, 1))
            terms.append(((i, j), c))
    r = run(terms, f"random degree {d}", tol="1e-5")
    if not r:
        continue
    a, e, mx = r
    below.append(a / mx)
    chk.ok(a + e < mx, f"random degree {d}: area {a} +- {e} not below pi^2 area(Delta) = {mx}")
    chk.ok(a > 0, f"random degree {d}: area {a}")

wd.cleanup()
chk.finish(f"worst relative error on known areas {max(report) if report else float('nan'):.1e}; "
           f"random curves at {', '.join(f'{x:.3f}' for x in below)} of the maximum; seed {seed}")
