"""check_amoeba_ronkin.py — the Ronkin function N_f(x) = (2 pi)^-2 int log|f(e^(x+i theta))|
d theta of `trope amoeba --ronkin x1,x2`, against a direct two-dimensional quadrature of
the definition with numpy.

Reference: the periodic trapezoid rule on an n x n grid of angles. Off the amoeba,
log|f| is real-analytic and periodic on the torus, so the rule converges geometrically
(common practice, no source; the CHECKS.md note on Passare-Rullgard 2004); we use
n = 256 and check that n = 512 agrees to 1e-12 before trusting it. On the amoeba, f
vanishes at points of the torus and log|f| has logarithmic singularities there; the rule
converges only algebraically and erratically (the error depends on where the grid falls
relative to the zeros). There the reference integrates over theta_1 exactly by Jensen's
formula in z (numpy eigenvalues of companion matrices give the z-roots) and over
theta_2 by the trapezoid rule with 2^17 and 2^18 points (a kink at each crossing |z| =
e^x1 leaves an O(h^2) error, about 1e-10 here); trope itself applies Jensen in w and
integrates over theta_1, so the two computations share no step.

Claim checked: |error| <= 1e-9 * max(1, |N|) off and on the amoeba (or within the
reference's own error estimate, when that is larger). Also N_f is affine on each complement
component with gradient the order (Passare, Rullgard, Duke Math. J. 121 (2004), sections
2-3, from memory): finite differences of the reference at the points trope reports.

Points: lopsided points (certainly outside: Purbhoo 2008 / the triangle inequality),
the component points of trope's report, and points of the amoeba made independently:
(x1, log|w|) for a root w of f(e^(x1 + i t), w) = 0 found by numpy.roots.
"""

import json
import math

import numpy as np

import tropecheck as tc

trope = tc.trope_path()
chk = tc.Checker("check_amoeba_ronkin")
rng, seed = tc.make_rng("amoeba-ronkin")
wd = tc.Workdir("amoeba-ronkin")


def dec(x):
    return f"{x:.9e}"


def make_poly(terms):
    """terms: list of ((i, j), complex). Returns the input text."""
    out = []
    for (i, j), c in terms:
        out.append(f"({dec(c.real)}{'+' if c.imag >= 0 else '-'}{dec(abs(c.imag))}i)*z^{i}*w^{j}")
    return " + ".join(out)


def exact_coeff(c):
    return complex(float(dec(c.real)), float(dec(c.imag)))


def ronkin_ref(terms, x, n):
    """trapezoid rule with n x n points (rows in chunks to bound memory)"""
    th = 2 * np.pi * np.arange(n) / n
    total = 0.0
    chunk = max(1, 262144 // n)
    for r0 in range(0, n, chunk):
        t1 = th[r0:r0 + chunk][:, None]
        t2 = th[None, :]
        f = np.zeros((len(th[r0:r0 + chunk]), n), dtype=complex)
        for (i, j), c in terms:
            f += c * np.exp(i * (x[0] + 1j * t1) + j * (x[1] + 1j * t2))
        with np.errstate(divide="ignore"):
            total += np.sum(np.log(np.abs(f)))
    return total / (n * n)


def ronkin_ref_z(terms, x, n):
    """Jensen's formula in z, trapezoid rule over theta_2 with n points"""
    imin = min(i for (i, j), c in terms)
    D = max(i for (i, j), c in terms) - imin
    th = 2 * np.pi * np.arange(n) / n
    w = np.exp(x[1] + 1j * th)
    a = np.zeros((D + 1, n), dtype=complex)
    for (i, j), c in terms:
        a[i - imin] += c * w ** j
    lead = a[D]
    with np.errstate(divide="ignore"):
        val = np.log(np.abs(lead)) + imin * x[0]
    if D == 1:
        roots = (-a[0] / a[1])[:, None]
    else:
        comp = np.zeros((n, D, D), dtype=complex)
        comp[:, 1:, :-1] = np.eye(D - 1)
        comp[:, :, -1] = -(a[:D] / lead).T
        roots = np.linalg.eigvals(comp)
    with np.errstate(divide="ignore"):
        lr = np.log(np.abs(roots))
    val = val + np.sum(np.maximum(lr, x[0]), axis=1)
    return float(np.mean(val))


def lopsided(terms, x):
    mods = sorted(abs(c) * math.exp(i * x[0] + j * x[1]) for (i, j), c in terms)
    return mods[-1] > 1.0001 * sum(mods[:-1])


def trope_ronkin(path, x):
    rc, out, err = tc.run(trope, ["amoeba", path, "--ronkin", f"{x[0]!r},{x[1]!r}",
                                  "--format", "json"])
    if rc != 0:
        return None, err
    return json.loads(out), ""


def amoeba_point(terms, rng_):
    """(x1, log|w|) for a root w of f(z, w) with z = e^(x1 + i t): on the amoeba."""
    dw = max(j for (i, j), c in terms)
    jmin = min(j for (i, j), c in terms)
    x1 = rng_.uniform(-2, 2)
    t = rng_.uniform(0, 2 * math.pi)
    z = complex(math.exp(x1) * math.cos(t), math.exp(x1) * math.sin(t))
    b = [0j] * (dw - jmin + 1)
    for (i, j), c in terms:
        b[j - jmin] += c * z ** i
    r = np.roots(list(reversed(b)))
    r = [w for w in r if abs(w) > 0 and np.isfinite(abs(w))]
    if not r:
        return None
    return (x1, math.log(abs(r[rng_.randrange(len(r))])))


polys = []
# random complex curves of degree 1..3 with coefficients of assorted sizes
for it in range(8):
    d = rng.randint(1, 3)
    terms = []
    for i in range(d + 1):
        for j in range(d + 1 - i):
            if (i, j) in ((0, 0), (d, 0), (0, d)) or rng.random() < 0.7:
                c = complex(rng.gauss(0, 1), rng.gauss(0, 1)) * math.exp(rng.uniform(-2, 2))
                terms.append(((i, j), c))
    polys.append(terms)
# a curve with a bounded complement component: a big middle coefficient
polys.append([((0, 0), 1 + 0j), ((2, 1), 1 + 0j), ((1, 2), 1 + 0j), ((1, 1), -6 + 1j)])
# a Laurent polynomial
polys.append([((-1, 0), 2 + 1j), ((1, 0), 1 + 0j), ((0, 1), -1j), ((0, -1), 0.5 + 0j),
              ((1, 1), 0.3 + 0j)])

worst_out, worst_in, npts = 0.0, 0.0, 0
for pi_, terms in enumerate(polys):
    terms = [(e, exact_coeff(c)) for e, c in terms]
    path = wd.file(make_poly(terms) + "\n")
    # points off the amoeba: lopsided ones and trope's component points
    pts = []
    tries = 0
    while len(pts) < 4 and tries < 400:
        tries += 1
        x = (rng.uniform(-6, 6), rng.uniform(-6, 6))
        if lopsided(terms, x):
            pts.append(x)
    rc, out, err = tc.run(trope, ["amoeba", path, "--format", "json", "--area-tol", "1e-3"])
    comps = []
    if chk.ok(rc == 0, f"poly {pi_}: trope amoeba exited {rc}: {err.strip()[:300]}"):
        comps = json.loads(out)["components"]
        pts += [tuple(c["point"]) for c in comps]
    for x in pts:
        got, e = trope_ronkin(path, x)
        if not chk.ok(got is not None, f"poly {pi_} at {x}: {e.strip()[:300]}"):
            continue
        r256, r512 = ronkin_ref(terms, x, 256), ronkin_ref(terms, x, 512)
        if abs(r256 - r512) > 1e-12 * max(1, abs(r512)):
            # close to the amoeba: the one-dimensional reference
            ra, rb = ronkin_ref_z(terms, x, 2 ** 17), ronkin_ref_z(terms, x, 2 ** 18)
            ref, rerr = rb, abs(rb - ra)
        else:
            ref, rerr = r512, abs(r256 - r512)
        N = got["ronkin"]["value"]
        tol = max(1e-9 * max(1, abs(N)), 2 * rerr)
        worst_out = max(worst_out, abs(N - ref) / max(1, abs(N)))
        npts += 1
        chk.ok(abs(N - ref) <= tol, f"poly {pi_} off the amoeba at {x}: trope {N!r}, "
               f"trapezoid {ref!r} (reference error {rerr:.1e})")
    # gradient = order at the component points (finite differences of the reference)
    for c in comps:
        x = tuple(c["point"])
        h = 1e-3
        g = []
        for k in range(2):
            xp = list(x)
            xm = list(x)
            xp[k] += h
            xm[k] -= h
            g.append((ronkin_ref(terms, xp, 256) - ronkin_ref(terms, xm, 256)) / (2 * h))
        chk.ok(abs(g[0] - c["order"][0]) < 1e-4 and abs(g[1] - c["order"][1]) < 1e-4,
               f"poly {pi_}: gradient of N_f at {x} is {g}, order {c['order']}")
    # points on the amoeba
    for k in range(3):
        x = amoeba_point(terms, rng)
        if x is None:
            continue
        got, e = trope_ronkin(path, x)
        if not chk.ok(got is not None, f"poly {pi_} at {x}: {e.strip()[:300]}"):
            continue
        ra, rb = ronkin_ref_z(terms, x, 2 ** 17), ronkin_ref_z(terms, x, 2 ** 18)
        rerr = abs(rb - ra)
        N = got["ronkin"]["value"]
        worst_in = max(worst_in, abs(N - rb) / max(1, abs(N)))
        npts += 1
        chk.ok(abs(N - rb) <= max(4 * rerr, 1e-9 * max(1, abs(N))),
               f"poly {pi_} on the amoeba at {x}: trope {N!r}, Jensen-in-z reference {rb!r} "
               f"(reference error {rerr:.1e})")
        chk.ok(got["order"] is None, f"poly {pi_}: trope gives an order at an amoeba point {x}")

wd.cleanup()
chk.finish(f"{npts} points on {len(polys)} polynomials; worst relative error off the "
           f"amoeba {worst_out:.1e}, on it {worst_in:.1e}; seed {seed}")
