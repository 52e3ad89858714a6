#!/usr/bin/python3
"""check_svg.py — `trope draw -o fig.svg` checked against the exact complex and against
the definition of a tropical curve.

Usage: /usr/bin/python3 tests/check/check_svg.py PATH_TO_TROPE   (from the repo root)

What is checked, and against what:
  * the SVG parses as XML (xml.etree, Python's standard library);
  * one path per top cell (bounded edge, ray or line), identified by data-id;
  * bounded edges start and end at the projection of the exact vertices from
    `trope tropicalize --format json` within half a pixel, rays start at their vertex,
    point along their exact direction and end (arrowhead tip) on the box boundary;
  * the midpoint of every drawn edge, mapped back to the plane, lies on the tropical
    curve by its definition: the minimum of val(c_a) + <a, w> over the terms is attained
    at least twice (Maclagan and Sturmfels, Introduction to Tropical Geometry, AMS GSM
    161, 2015, §3.1, from memory) — computed here from the JSON terms with fractions;
  * generic curves of degree d (heights i^2 + ij + j^2 plus small noise) show d^2 vertex
    dots, 3d(d-1)/2 bounded edges and 3d rays (Mikhalkin, "Enumerative tropical algebraic
    geometry in R^2", J. AMS 18 (2005), §2, from memory);
  * the trivial-valuation curve with full support of degree d has weight-d labels on its
    three rays (common practice, no source);
  * same input, byte-identical SVG.
The helpers at the top are shared with check_png.py and check_tikz.py.
"""
import json
import os
import random
import subprocess
import sys
import tempfile
import xml.etree.ElementTree as ET
from fractions import Fraction

SVGNS = "{http://www.w3.org/2000/svg}"


def run(trope, args, want=0):
    p = subprocess.run([trope] + args, capture_output=True)
    if p.returncode != want:
        raise AssertionError("trope %s: exit %d (wanted %d): %s" % (
            " ".join(args), p.returncode, want, p.stderr.decode(errors="replace")))
    return p.stdout


def tropicalize(trope, args):
    return json.loads(run(trope, ["tropicalize"] + args + ["--format", "json"]))


def frac(s):
    return Fraction(s) if isinstance(s, str) else Fraction(s)


def generic_curve(d, rng):
    """Heights (i^2 + ij + j^2) + noise/1000: a unimodular triangulation of dΔ."""
    terms = []
    for i in range(d + 1):
        for j in range(d + 1 - i):
            h = 1000 * (i * i + i * j + j * j) + rng.randint(0, 9)
            terms.append("t^(%d/1000)*x^%d*y^%d" % (h, i, j))
    return " + ".join(terms)


def term_heights(J):
    out = []
    for t in J["terms"]:
        h = t.get("valuation", t.get("height"))
        if h is None:
            continue
        out.append(([int(a) for a in t["exponent"]], frac(h)))
    return out


def on_curve(J, w, tol):
    """min over terms of h + <a, w> attained twice (within tol, floats in w)."""
    vals = sorted(float(h) + sum(a[k] * w[k] for k in range(len(w)))
                  for a, h in term_heights(J))
    return len(vals) >= 2 and vals[1] - vals[0] <= tol


class View:
    def __init__(self, scale, ox, oy, axes=(0, 1), box=None):
        self.s, self.ox, self.oy, self.axes, self.box = scale, ox, oy, axes, box

    def X(self, x):
        return self.ox + self.s * float(x)

    def Y(self, y):
        return self.oy - self.s * float(y)

    def P(self, v):
        return (self.X(v[self.axes[0]]), self.Y(v[self.axes[1]]))

    def inv(self, X, Y):
        return ((X - self.ox) / self.s, (self.oy - Y) / self.s)


def view_from_svg(root):
    s, ox, oy = (float(t) for t in root.get("data-view").split())
    axes = tuple(int(t) for t in root.get("data-axes", "0 1").split())
    box = root.get("data-box")
    return View(s, ox, oy, axes, tuple(float(t) for t in box.split()) if box else None)


def path_points(d):
    toks = d.replace("M", " ").replace("L", " ").replace("Z", " ").split()
    nums = [float(t) for t in toks]
    return [(nums[i], nums[i + 1]) for i in range(0, len(nums), 2)]


def top_cells(J):
    C = J["complex"]
    return [(k, c) for k, c in enumerate(C["cells"]) if c["dim"] == C["dim"]]


def lift(J, w2, axes):
    """A point of the drawing plane back in R^n (chart: the other coordinate is 0)."""
    n = J["complex"]["ambient_dim"]
    w = [0.0] * n
    w[axes[0]], w[axes[1]] = w2
    return w


def check_drawing(items, J, view, fails, what, half=0.5):
    """items: list of (role, id, points). Compare with the exact complex."""
    C = J["complex"]
    verts = [[frac(x) for x in v] for v in C["vertices"]]
    rays = C["rays"]
    by_id = {}
    for role, ident, pts in items:
        if role in ("edge", "ray", "line"):
            by_id.setdefault(ident, []).append((role, pts))
    arrows = {}
    for role, ident, pts in items:
        if role == "arrow":
            arrows.setdefault(ident, []).append(pts)
    nlin = len(C["lineality"])
    for k, c in top_cells(J):
        got = by_id.get(k, [])
        if len(got) != 1:
            fails.append("%s: cell %d drawn %d times (one path per edge/ray)" % (what, k, len(got)))
            continue
        role, pts = got[0]
        if len(c["vertices"]) == 2:
            want = [view.P(verts[c["vertices"][0]]), view.P(verts[c["vertices"][1]])]
            if role != "edge":
                fails.append("%s: cell %d should be an edge, is %s" % (what, k, role))
            for (a, b), (x, y) in zip(want, [pts[0], pts[-1]]):
                if abs(a - x) > half or abs(b - y) > half:
                    fails.append("%s: edge %d end (%.2f,%.2f) vs exact (%.2f,%.2f)" % (
                        what, k, x, y, a, b))
        elif len(c["rays"]) == 1:
            a, b = view.P(verts[c["vertices"][0]])
            x, y = pts[0]
            if abs(a - x) > half or abs(b - y) > half:
                fails.append("%s: ray %d starts at (%.2f,%.2f), vertex at (%.2f,%.2f)" % (
                    what, k, x, y, a, b))
            r = rays[c["rays"][0]]
            dx, dy = r[view.axes[0]], -r[view.axes[1]]
            ex, ey = pts[-1][0] - x, pts[-1][1] - y
            L = (ex * ex + ey * ey) ** 0.5
            if L > 1 and abs(dx * ey - dy * ex) / (dx * dx + dy * dy) ** 0.5 > half + 0.01 * L:
                fails.append("%s: ray %d is not along %s" % (what, k, r))
            if dx * ex + dy * ey < 0:
                fails.append("%s: ray %d points backwards" % (what, k))
            # the arrowhead's tip lies on the box boundary
            if view.box and k in arrows:
                tx, ty = arrows[k][0][0]
                wx, wy = view.inv(tx, ty)
                b = view.box
                tolw = half / view.s
                if min(abs(wx - b[0]), abs(wx - b[1]), abs(wy - b[2]), abs(wy - b[3])) > tolw:
                    fails.append("%s: ray %d's arrow tip is not on the box boundary" % (what, k))
        elif nlin == 1 and role != "line":
            fails.append("%s: cell %d should be a whole line" % (what, k))
        # the midpoint of the drawn piece is on the curve (definition of trop f)
        (x0, y0), (x1, y1) = pts[0], pts[-1]
        w = lift(J, view.inv((x0 + x1) / 2, (y0 + y1) / 2), view.axes)
        if not on_curve(J, w, tol=4 * half / view.s * max(1, max_exp(J))):
            fails.append("%s: the midpoint of cell %d's stroke is not on the curve" % (what, k))


def max_exp(J):
    return max(sum(abs(a) for a in t["exponent"]) for t in J["terms"])


def svg_items(root):
    items = []
    for el in root.iter():
        tag = el.tag.replace(SVGNS, "")
        cls = el.get("class")
        ident = int(el.get("data-id")) if el.get("data-id") is not None else -1
        if tag == "path":
            items.append((cls, ident, path_points(el.get("d"))))
        elif tag == "circle":
            items.append((cls, ident, [(float(el.get("cx")), float(el.get("cy")))]))
    return items


def texts(root, cls):
    return [el for el in root.iter() if el.tag == SVGNS + "text" and el.get("class") == cls
            and el.get("stroke") is None]


def draw_svg(trope, tmp, name, args):
    out = os.path.join(tmp, name + ".svg")
    run(trope, ["draw"] + args + ["-o", out])
    with open(out, "rb") as f:
        data = f.read()
    return ET.fromstring(data), data


def main():
    trope = os.path.abspath(sys.argv[1])
    fails = []
    nchecked = 0
    rng = random.Random(0x7470)
    with tempfile.TemporaryDirectory() as tmp:
        cases = []
        for name in ("orchard-cubic", "harbour-quartic", "ferry-cubic-homogeneous"):
            cases.append((name, ["data/examples/%s.trope" % name], None))
        cases.append(("market-bids", ["--points", "data/examples/market-bids.csv"], None))
        for d in (1, 2, 3, 4, 5):
            path = os.path.join(tmp, "generic%d.trope" % d)
            with open(path, "w") as f:
                f.write(generic_curve(d, rng) + "\n")
            cases.append(("generic%d" % d, [path, "--over", "t"], d))
        path = os.path.join(tmp, "full3.trope")
        with open(path, "w") as f:
            f.write(" + ".join("x^%d*y^%d" % (i, j) for i in range(4) for j in range(4 - i)) + "\n")
        cases.append(("full3", [path, "--over", "Q"], "full3"))
        path = os.path.join(tmp, "lines.trope")
        with open(path, "w") as f:
            f.write("x*y + 1 + t*x^2*y^2\n")
        cases.append(("lines", [path, "--over", "t"], None))
        for name, args, kind in cases:
            J = tropicalize(trope, args)
            for extra in ([], ["--grid"], ["--with-subdivision", "--size", "900x500"]):
                root, data = draw_svg(trope, tmp, name, args + extra)
                what = "%s %s" % (name, " ".join(extra))
                if root.tag != SVGNS + "svg" or root.get("version") != "1.1":
                    fails.append("%s: not an SVG 1.1 root" % what)
                view = view_from_svg(root)
                items = svg_items(root)
                check_drawing(items, J, view, fails, what)
                nchecked += 1
                if extra and extra[-1] == "900x500":
                    if root.get("width") != "900" or root.get("height") != "500":
                        fails.append("%s: size %sx%s" % (what, root.get("width"), root.get("height")))
                dots = [it for it in items if it[0] == "vertex"]
                if kind is not None and kind != "full3":
                    d = kind
                    nedge = sum(1 for it in items if it[0] == "edge")
                    nray = sum(1 for it in items if it[0] == "ray")
                    if (len(dots), nedge, nray) != (d * d, 3 * d * (d - 1) // 2, 3 * d):
                        fails.append("%s: %d vertices, %d edges, %d rays; Mikhalkin: %d, %d, %d" % (
                            what, len(dots), nedge, nray, d * d, 3 * d * (d - 1) // 2, 3 * d))
                # vertex dots sit on the exact vertices
                C = J["complex"]
                if not C["lineality"] or C["ambient_dim"] == 3:
                    for _, ident, pts in dots:
                        a, b = view.P([frac(x) for x in C["vertices"][ident]])
                        if abs(a - pts[0][0]) > 0.5 or abs(b - pts[0][1]) > 0.5:
                            fails.append("%s: vertex dot %d off its vertex" % (what, ident))
                # weight labels: one per visible top cell of weight > 1, with that text
                heavy = {k: c["weight"] for k, c in top_cells(J) if c["weight"] > 1}
                labels = {int(t.get("data-id")): t.text for t in texts(root, "weight")}
                if labels != {k: str(w) for k, w in heavy.items()}:
                    fails.append("%s: weight labels %s, expected %s" % (what, labels, heavy))
                if kind == "full3" and sorted(labels.values()) != ["3", "3", "3"]:
                    fails.append("%s: full support degree 3 needs three labels 3" % what)
                # determinism
                root2, data2 = draw_svg(trope, tmp, name, args + extra)
                if data != data2:
                    fails.append("%s: two runs differ" % what)
    for f in fails[:30]:
        print("FAIL", f)
    print("check_svg: %d drawings checked, %d failures" % (nchecked, len(fails)))
    return 1 if fails else 0


if __name__ == "__main__":
    sys.exit(main())
