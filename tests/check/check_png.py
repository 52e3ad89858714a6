#!/usr/bin/python3
"""check_png.py — `trope draw -o fig.png` decoded with Pillow (python3-pil) and checked
against the exact geometry.

Usage: /usr/bin/python3 tests/check/check_png.py PATH_TO_TROPE   (from the repo root)

  * the PNG decodes (Pillow) and has the size asked for (--size), or 720 pixels on its
    long side by default;
  * every pixel on the projection of every bounded edge and of every ray (inside the box)
    is ink: not background. Edges and rays come from the exact vertices and directions of
    `trope tropicalize --format json`, projected with the view the SVG of the same figure
    declares (same layout: the drawing description is shared);
  * every pixel farther than 26 pixels from the curve (its vertices, edges and rays) is
    exactly the background: white, or fully transparent with --transparent. The labels,
    dots and arrowheads all sit within that distance; the grid that a lone vertex gets
    automatically (its lines and tick labels, as the SVG lists them) is allowed too.
  * generic curves of degree d (heights i^2 + ij + j^2 plus noise) are drawn with d^2
    vertex dots (Mikhalkin, J. AMS 18 (2005), §2, from memory): the pixel at each exact
    vertex has the dot's fill, not the edge colour;
  * same input, byte-identical PNG.
"""
import os
import random
import sys
import tempfile
import xml.etree.ElementTree as ET

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
from check_svg import (SVGNS, frac, generic_curve, path_points, run, top_cells,  # noqa: E402
                       tropicalize, view_from_svg)

from PIL import Image  # noqa: E402


def segments(J, view):
    """The curve as figure-space segments (rays clipped to the view's box)."""
    C = J["complex"]
    verts = [[frac(x) for x in v] for v in C["vertices"]]
    ax = view.axes
    b = view.box
    segs = []
    for k, c in top_cells(J):
        p = [float(verts[c["vertices"][0]][ax[0]]), float(verts[c["vertices"][0]][ax[1]])]
        if len(c["vertices"]) == 2:
            q = [float(verts[c["vertices"][1]][ax[0]]), float(verts[c["vertices"][1]][ax[1]])]
            segs.append((k, "edge", p, q))
            continue
        if len(c["rays"]) == 1:
            r = C["rays"][c["rays"][0]]
            d, lo = [r[ax[0]], r[ax[1]]], 0.0
        else:
            d, lo = [C["lineality"][0][0], C["lineality"][0][1]], -1e300
        hi = 1e300
        for i in range(2):
            if d[i] != 0:
                t1, t2 = (b[2 * i] - p[i]) / d[i], (b[2 * i + 1] - p[i]) / d[i]
                lo, hi = max(lo, min(t1, t2)), min(hi, max(t1, t2))
        segs.append((k, "ray", [p[0] + lo * d[0], p[1] + lo * d[1]],
                     [p[0] + hi * d[0], p[1] + hi * d[1]]))
    return [(k, role, (view.X(p[0]), view.Y(p[1])), (view.X(q[0]), view.Y(q[1])))
            for k, role, p, q in segs]


def dist_seg(px, py, a, b):
    dx, dy = b[0] - a[0], b[1] - a[1]
    l2 = dx * dx + dy * dy
    t = 0 if l2 == 0 else max(0.0, min(1.0, ((px - a[0]) * dx + (py - a[1]) * dy) / l2))
    return ((a[0] + t * dx - px) ** 2 + (a[1] + t * dy - py) ** 2) ** 0.5


def is_ink(px):
    r, g, b, a = px
    return a > 128 and min(r, g, b) < 200


def check(trope, tmp, name, args, fails, size=None, transparent=False, degree=None):
    J = tropicalize(trope, args)
    extra = (["--size", "%dx%d" % size] if size else []) + (["--transparent"] if transparent else [])
    svg = os.path.join(tmp, name + ".svg")
    png = os.path.join(tmp, name + ".png")
    run(trope, ["draw"] + args + extra + ["-o", svg])
    run(trope, ["draw"] + args + extra + ["-o", png])
    root = ET.parse(svg).getroot()
    view = view_from_svg(root)
    # a lone vertex or parallel lines get a grid automatically: its lines and tick labels
    # are allowed away from the curve
    grid = []
    for el in root.iter(SVGNS + "path"):
        if el.get("class") in ("grid", "frame"):
            pts = path_points(el.get("d"))
            closed = el.get("d").rstrip().endswith("Z")
            grid += [(pts[i], pts[(i + 1) % len(pts)])
                     for i in range(len(pts) if closed else len(pts) - 1)]
    ticks = [(float(el.get("x")), float(el.get("y"))) for el in root.iter(SVGNS + "text")
             if el.get("class") == "tick"]
    img = Image.open(png)
    img.load()
    what = "%s %s" % (name, " ".join(extra))
    if img.format != "PNG":
        fails.append("%s: not decoded as PNG" % what)
    W, H = img.size
    if size and (W, H) != size:
        fails.append("%s: size %dx%d, asked %dx%d" % (what, W, H, size[0], size[1]))
    if not size and max(W, H) != 720:
        fails.append("%s: default size %dx%d, expected 720 on the long side" % (what, W, H))
    im = img.convert("RGBA")
    pix = im.load()
    segs = segments(J, view)
    # ink along every edge and ray (away from the ends: arrowheads, dots and clipping)
    for k, role, a, b in segs:
        L = ((b[0] - a[0]) ** 2 + (b[1] - a[1]) ** 2) ** 0.5
        steps = max(2, int(L / 3))
        bad = 0
        for s in range(steps + 1):
            t = s / steps
            x, y = a[0] + t * (b[0] - a[0]), a[1] + t * (b[1] - a[1])
            if role == "ray" and L * (1 - t) < 3:
                continue
            xi, yi = int(x), int(y)
            if 0 <= xi < W and 0 <= yi < H and not is_ink(pix[xi, yi]):
                bad += 1
        if bad:
            fails.append("%s: %d background pixels on the %s of cell %d" % (what, bad, role, k))
    # far from the curve: background
    verts = [view.P([frac(x) for x in v]) for v in J["complex"]["vertices"]]
    bg = (0, 0, 0, 0) if transparent else (255, 255, 255, 255)
    nfar = nbad = 0
    for y in range(1, H, 4):
        for x in range(1, W, 4):
            cx, cy = x + 0.5, y + 0.5
            d = min([dist_seg(cx, cy, a, b) for _, _, a, b in segs] +
                    [((cx - vx) ** 2 + (cy - vy) ** 2) ** 0.5 for vx, vy in verts])
            if d > 26:
                if any(dist_seg(cx, cy, g[0], g[1]) < 3 for g in grid) or \
                        any(abs(cx - tx) < 30 and abs(cy - ty) < 20 for tx, ty in ticks):
                    continue
                nfar += 1
                p = pix[x, y]
                if (p if not transparent else (0, 0, 0, p[3])) != bg:
                    nbad += 1
    if nbad:
        fails.append("%s: %d of %d far pixels are not background" % (what, nbad, nfar))
    if nfar < 100:
        fails.append("%s: only %d far pixels tested" % (what, nfar))
    if degree:
        for vx, vy in verts:
            p = pix[int(vx), int(vy)]
            if not (p[0] > 200 and p[2] < 120):   # the amber fill of the vertex dots
                fails.append("%s: no vertex dot at (%.1f, %.1f): %s" % (what, vx, vy, p))
    with open(png, "rb") as f:
        first = f.read()
    run(trope, ["draw"] + args + extra + ["-o", png])
    with open(png, "rb") as f:
        if f.read() != first:
            fails.append("%s: two runs differ" % what)


def main():
    trope = os.path.abspath(sys.argv[1])
    fails = []
    n = 0
    rng = random.Random(0x7470)
    with tempfile.TemporaryDirectory() as tmp:
        cases = [(nm, ["data/examples/%s.trope" % nm], None)
                 for nm in ("orchard-cubic", "harbour-quartic", "ferry-cubic-homogeneous")]
        cases.append(("market", ["--points", "data/examples/market-bids.csv"], None))
        for d in (2, 3, 4):
            path = os.path.join(tmp, "g%d.trope" % d)
            with open(path, "w") as f:
                f.write(generic_curve(d, rng) + "\n")
            cases.append(("g%d" % d, [path, "--over", "t"], d))
        path = os.path.join(tmp, "w2.trope")
        with open(path, "w") as f:
            f.write("1 + x^2 + y^2 + t*x*y + t^3*x + t^3*y\n")
        cases.append(("w2", [path, "--over", "t"], None))
        for name, args, d in cases:
            for size, transp in ((None, False), ((640, 400), False), ((300, 500), True)):
                check(trope, tmp, name, args, fails, size, transp, d)
                n += 1
    for f in fails[:30]:
        print("FAIL", f)
    print("check_png: %d images checked, %d failures" % (n, len(fails)))
    return 1 if fails else 0


if __name__ == "__main__":
    sys.exit(main())
