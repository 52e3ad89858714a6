#!/usr/bin/python3
"""check_tikz.py — `trope draw -o fig.tex --standalone` compiled with pdflatex and its
coordinates checked against the exact vertices.

Usage: /usr/bin/python3 tests/check/check_tikz.py PATH_TO_TROPE   (from the repo root)

  * every example in data/examples (the demo set), with and without --grid and
    --with-subdivision where they apply, gives a --standalone document that pdflatex
    (Debian texlive-latex-base + texlive-pictures, installed by scripts/build) compiles
    without error into a one-page PDF;
  * curves: every drawing command is tagged "% role id"; bounded edges start and end at
    the projection of the exact vertices of `trope tropicalize --format json` within half
    a unit, rays start at their vertex and follow their exact direction, and every drawn
    midpoint lies on the tropical curve by its definition (the minimum of
    val(c_a) + <a, w> is attained twice; Maclagan and Sturmfels, Introduction to Tropical
    Geometry, AMS GSM 161, 2015, §3.1, from memory) — the same checks as check_svg.py;
  * one variable: each root dot sits at the projection of its exact valuation and carries
    the multiplicity label; the multiplicities add up to the degree spread
    max exponent - min exponent (the Newton polygon's length: Koblitz, p-adic Numbers,
    p-adic Analysis, and Zeta-Functions, GTM 58, ch. IV §3).
"""
import glob
import os
import re
import shutil
import subprocess
import sys
import tempfile

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
from check_svg import View, check_drawing, frac, run, tropicalize  # noqa: E402

COORD = re.compile(r"\((-?[0-9.]+),(-?[0-9.]+)\)")
TAG = re.compile(r";\s*%\s*([a-z-]+)(?:\s+(\d+))?\s*$")


def parse_tikz(text):
    view = None
    items = []
    for line in text.splitlines():
        m = re.match(r"% view: (\S+) (\S+) (\S+) axes: (\d+) (\d+) box: (\S+) (\S+) (\S+) (\S+)", line)
        if m:
            g = m.groups()
            view = View(float(g[0]), float(g[1]), float(g[2]), (int(g[3]), int(g[4])),
                        tuple(float(x) for x in g[5:9]))
            continue
        m = TAG.search(line)
        if not m or not line.startswith("\\"):
            continue
        role, ident = m.group(1), int(m.group(2)) if m.group(2) else -1
        pts = [(float(a), float(b)) for a, b in COORD.findall(line.split("%")[0])]
        text_m = re.search(r"\{([^{}]*)\};\s*%", line)
        items.append((role, ident, pts, text_m.group(1) if text_m else None))
    return view, items


def pdflatex(tex, fails, what):
    d = os.path.dirname(tex)
    p = subprocess.run(["pdflatex", "-interaction=nonstopmode", "-halt-on-error",
                        "-output-directory", d, tex], capture_output=True, cwd=d)
    pdf = tex[:-4] + ".pdf"
    if p.returncode != 0 or not os.path.exists(pdf):
        tail = p.stdout.decode(errors="replace").splitlines()[-15:]
        fails.append("%s: pdflatex failed:\n    %s" % (what, "\n    ".join(tail)))
        return
    with open(tex[:-4] + ".log", errors="replace") as f:
        log = f.read()
    pages = re.search(r"Output written on .*\((\d+) page", log)
    if not pages or pages.group(1) != "1":
        fails.append("%s: expected a one-page PDF" % what)


def main():
    trope = os.path.abspath(sys.argv[1])
    if not shutil.which("pdflatex"):
        print("check_tikz: FAIL: pdflatex not found (scripts/build installs texlive-latex-base "
              "and texlive-pictures)")
        return 1
    fails = []
    n = 0
    with tempfile.TemporaryDirectory() as tmp:
        for path in sorted(glob.glob("data/examples/*")):
            name = os.path.splitext(os.path.basename(path))[0]
            args = ["--points", path] if path.endswith(".csv") else [path]
            J = tropicalize(trope, args)
            C = J["complex"]
            n_amb, nlin = C["ambient_dim"], len(C["lineality"])
            curve = n_amb == 2 or (n_amb == 3 and nlin == 1)
            variants = [[], ["--grid"]] + ([["--with-subdivision", "--heights"]] if curve else [])
            for k, extra in enumerate(variants):
                what = "%s %s" % (name, " ".join(extra))
                tex = os.path.join(tmp, "%s-%d.tex" % (name, k))
                run(trope, ["draw"] + args + extra + ["--standalone", "-o", tex])
                with open(tex) as f:
                    text = f.read()
                n += 1
                pdflatex(tex, fails, what)
                view, items = parse_tikz(text)
                if curve:
                    if view is None:
                        fails.append("%s: no view comment" % what)
                        continue
                    check_drawing([(r, i, p) for r, i, p, _ in items], J, view, fails, what)
                elif n_amb == 1:
                    if view is None:
                        fails.append("%s: no view comment" % what)
                        continue
                    roots = [it for it in items if it[0] == "root"]
                    mults = {it[1]: it[3] for it in items if it[0] == "mult"}
                    total = 0
                    for _, ident, pts, _ in roots:
                        cell = C["cells"][ident]
                        v = frac(C["vertices"][cell["vertices"][0]][0])
                        if abs(view.X(v) - pts[0][0]) > 0.5:
                            fails.append("%s: root %d drawn at %.2f, exact %.2f" % (
                                what, ident, pts[0][0], view.X(v)))
                        want = "$\\times$%d" % cell["weight"]
                        if mults.get(ident) != want:
                            fails.append("%s: root %d label %r, expected %r" % (
                                what, ident, mults.get(ident), want))
                        total += cell["weight"]
                    ex = [t["exponent"][0] for t in J["terms"]]
                    if total != max(ex) - min(ex):
                        fails.append("%s: multiplicities add to %d, Newton polygon length %d" % (
                            what, total, max(ex) - min(ex)))
    for f in fails[:30]:
        print("FAIL", f)
    print("check_tikz: %d documents compiled and checked, %d failures" % (n, len(fails)))
    return 1 if fails else 0


if __name__ == "__main__":
    sys.exit(main())
