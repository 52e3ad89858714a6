#!/usr/bin/python3
"""check_obj.py — `trope tropicalize --format obj` (surfaces clipped to a box) parsed and
checked with numpy.

Usage: /usr/bin/python3 tests/check/check_obj.py PATH_TO_TROPE   (from the repo root)

  * vertex count = the sum of the face sizes (vertices are written per face), one object
    and one face per 2-cell that meets the box; with the automatic box (every vertex
    inside, with a margin) that is every 2-cell of `trope tropicalize --format json`;
    object names carry the cell index and its weight as in the JSON;
  * every face is planar (smallest singular value of its centred vertices, numpy.linalg.svd)
    and convex, with at least 3 vertices, and lies inside the box;
  * every vertex of the face of cell C lies on C by the definition of the tropical
    hypersurface: the minimum of h_a + <a, w> over the terms is attained exactly on C's
    dual points (Maclagan and Sturmfels, Introduction to Tropical Geometry, AMS GSM 161,
    2015, §3.1, from memory), up to 1e-7;
  * the tropical plane x + y + z + 1 over Q has six 2-cells, the cones spanned by pairs of
    e1, e2, e3, -(e1+e2+e3) (common practice, no source);
  * a generic quadric (heights i^2+j^2+k^2+ij+jk+ik plus noise: a unimodular triangulation
    of 2Δ3) has 2^3 = 8 vertices, its normalized volume (common practice, no source), and
    all its 2-cells appear;
  * bad --box values and non-surfaces exit with status 2 and leave no output file.
"""
import os
import random
import subprocess
import sys
import tempfile

import numpy as np

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
from check_svg import run, term_heights, tropicalize  # noqa: E402


def parse_obj(text):
    verts, faces, names, box = [], [], [], None
    for line in text.splitlines():
        if line.startswith("# box "):
            box = [float(x) for x in line.split()[2:]]
        elif line.startswith("v "):
            verts.append([float(x) for x in line.split()[1:]])
        elif line.startswith("f "):
            faces.append([int(x) for x in line.split()[1:]])
        elif line.startswith("o "):
            names.append(line[2:].strip())
    return np.array(verts), faces, names, box


def check(trope, args, fails, what, box=None, expect_cells=None, expect_vertices=None):
    J = tropicalize(trope, args)
    extra = ["--box", ",".join(str(x) for x in box)] if box else []
    text = run(trope, ["tropicalize"] + args + ["--format", "obj"] + extra).decode()
    V, F, names, obox = parse_obj(text)
    C = J["complex"]
    cells2 = [k for k, c in enumerate(C["cells"]) if c["dim"] == 2]
    if box and obox != [float(x) for x in box]:
        fails.append("%s: box comment %s, asked %s" % (what, obox, box))
    if len(V) != sum(len(f) for f in F):
        fails.append("%s: %d vertices for faces of total size %d" % (what, len(V), sum(map(len, F))))
    if len(F) != len(names):
        fails.append("%s: %d faces, %d objects" % (what, len(F), len(names)))
    if not box and len(F) != len(cells2):
        fails.append("%s: %d faces, %d 2-cells in the JSON" % (what, len(F), len(cells2)))
    if expect_cells is not None and len(F) != expect_cells:
        fails.append("%s: %d faces, expected %d" % (what, len(F), expect_cells))
    if expect_vertices is not None and len(C["vertices"]) != expect_vertices:
        fails.append("%s: %d vertices in the complex, expected %d" % (
            what, len(C["vertices"]), expect_vertices))
    terms = term_heights(J)
    lo = np.array(obox[0::2])
    hi = np.array(obox[1::2])
    scale = float(max(hi - lo))
    for face, name in zip(F, names):
        try:
            k = int(name.split("_")[0][4:])
            w = int(name.split("weight")[1])
        except (ValueError, IndexError):
            fails.append("%s: object name %r" % (what, name))
            continue
        cell = C["cells"][k]
        if cell["dim"] != 2 or cell["weight"] != w:
            fails.append("%s: %s does not match cell %d (dim %d, weight %d)" % (
                what, name, k, cell["dim"], cell["weight"]))
        P = V[[i - 1 for i in face]]
        if len(P) < 3:
            fails.append("%s: %s has %d vertices" % (what, name, len(P)))
            continue
        if (P < lo - 1e-9).any() or (P > hi + 1e-9).any():
            fails.append("%s: %s leaves the box" % (what, name))
        s = np.linalg.svd(P - P.mean(axis=0), compute_uv=False)
        if s[-1] > 1e-9 * max(1.0, s[0]):
            fails.append("%s: %s is not planar (singular values %s)" % (what, name, s))
        nrm = np.cross(P[1] - P[0], P[2] - P[0])
        signs = [np.dot(np.cross(P[(i + 1) % len(P)] - P[i], P[(i + 2) % len(P)] - P[(i + 1) % len(P)]), nrm)
                 for i in range(len(P))]
        if min(signs) < -1e-9 * scale ** 2 and max(signs) > 1e-9 * scale ** 2:
            fails.append("%s: %s is not convex" % (what, name))
        dual = set(cell["dual"])
        for p in P:
            vals = [float(h) + sum(a[j] * p[j] for j in range(3)) for a, h in terms]
            m = min(vals)
            on = {i for i, v in enumerate(vals) if v - m <= 1e-7 * max(1.0, scale)}
            if not dual <= on:
                fails.append("%s: a vertex of %s is off its cell" % (what, name))
                break


def main():
    trope = os.path.abspath(sys.argv[1])
    fails = []
    n = 0
    rng = random.Random(0x7470)
    with tempfile.TemporaryDirectory() as tmp:
        check(trope, ["data/examples/warehouse-surface.trope"], fails, "warehouse")
        check(trope, ["data/examples/warehouse-surface.trope"], fails, "warehouse box",
              box=[-1.5, 0.25, -2, 1, -3, 0.5])
        plane = os.path.join(tmp, "plane.trope")
        with open(plane, "w") as f:
            f.write("x + y + z + 1\n")
        check(trope, [plane, "--over", "Q"], fails, "plane", expect_cells=6)
        check(trope, [plane, "--over", "Q"], fails, "plane box", box=[-2, 3, -1, 1, -4, 2],
              expect_cells=6)
        n += 4
        for it in range(4):
            terms = []
            for i in range(3):
                for j in range(3 - i):
                    for k in range(3 - i - j):
                        h = 1000 * (i * i + j * j + k * k + i * j + j * k + i * k) + rng.randint(0, 9)
                        terms.append("t^(%d/1000)*x^%d*y^%d*z^%d" % (h, i, j, k))
            path = os.path.join(tmp, "q%d.trope" % it)
            with open(path, "w") as f:
                f.write(" + ".join(terms) + "\n")
            check(trope, [path, "--over", "t"], fails, "quadric %d" % it, expect_vertices=8)
            n += 1
        # bad input: exit 2, nothing written
        out = os.path.join(tmp, "bad.obj")
        for args in ([plane, "--over", "Q", "--box", "1,2,3,4"],
                     [plane, "--over", "Q", "--box", "3,2,0,1,0,1"],
                     ["data/examples/orchard-cubic.trope"]):
            p = subprocess.run([trope, "tropicalize"] + args + ["--format", "obj", "-o", out],
                               capture_output=True)
            if p.returncode != 2 or os.path.exists(out):
                fails.append("bad input %s: exit %d, output %s" % (
                    args, p.returncode, "left behind" if os.path.exists(out) else "absent"))
            n += 1
    for f in fails[:30]:
        print("FAIL", f)
    print("check_obj: %d meshes and refusals checked, %d failures" % (n, len(fails)))
    return 1 if fails else 0


if __name__ == "__main__":
    sys.exit(main())
