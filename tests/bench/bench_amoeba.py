"""bench_amoeba.py — timings of `trope amoeba` (a benchmark, not a test: it asserts
nothing about speed).

Usage: /usr/bin/python3 tests/bench/bench_amoeba.py PATH_TO_TROPE [--quick]

For curves of degree 3, 6, 12 and 24 (all monomials of the degree-d triangle, random
complex coefficients with moduli e^U(-1,1), fixed seed) it reports, from the stage
timings that `trope amoeba --timings` prints:
  draw    the 1000x1000 PNG of the amoeba with its spine (`-o f.png --size 1000x1000`,
          the "figure" stage: slices for every pixel column, the layout, the PNG
          encoding; the components and spine it shows are timed under "spine");
  area    the area to 1e-3 relative error (`--area-tol 1e-3`);
  spine   the complement components (sweep, orders, Ronkin coefficients) and the spine
          through the exact pipeline;
and each as a ratio to the same stage for the reference curve 1 + z + w, run in the same
script (so the ratios do not depend on the machine's speed).
"""

import math
import os
import random
import re
import subprocess
import sys
import tempfile
import time


def run(trope, args):
    t0 = time.perf_counter()
    p = subprocess.run([trope] + args, capture_output=True, text=True, timeout=3600)
    wall = time.perf_counter() - t0
    if p.returncode != 0:
        sys.exit(f"bench_amoeba: trope {' '.join(args)} failed: {p.stderr.strip()[:300]}")
    m = re.search(r"area ([0-9.]+) ms, components ([0-9.]+) ms, spine ([0-9.]+) ms, "
                  r"figure ([0-9.]+) ms", p.stderr)
    if not m:
        sys.exit(f"bench_amoeba: no timings in: {p.stderr.strip()[:300]}")
    area, comp, spine, fig = (float(v) / 1000 for v in m.groups())
    return {"area": area, "comp": comp, "spine": spine, "fig": fig, "wall": wall}


def curve(d, rng):
    terms = []
    for i in range(d + 1):
        for j in range(d + 1 - i):
            mod = math.exp(rng.uniform(-1, 1))
            ph = rng.uniform(0, 2 * math.pi)
            terms.append(f"({mod * math.cos(ph):.6f}{'+' if math.sin(ph) >= 0 else '-'}"
                         f"{abs(mod * math.sin(ph)):.6f}i)*z^{i}*w^{j}")
    return "vars: z w\n" + " + ".join(terms) + "\n"


def measure(trope, path, tmp):
    png = os.path.join(tmp, "a.png")
    draw = run(trope, ["amoeba", path, "-o", png, "--size", "1000x1000", "--timings"])
    rep = run(trope, ["amoeba", path, "--area-tol", "1e-3", "--timings", "-o",
                      os.path.join(tmp, "a.txt")])
    return {"draw": draw["fig"], "area": rep["area"], "spine": rep["comp"] + rep["spine"]}


def main():
    if len(sys.argv) < 2:
        sys.exit("usage: bench_amoeba.py PATH_TO_TROPE [--quick]")
    trope = os.path.abspath(sys.argv[1])
    degrees = [3, 6] if "--quick" in sys.argv else [3, 6, 12, 24]
    rng = random.Random(2718)
    with tempfile.TemporaryDirectory(prefix="trope-bench-amoeba-") as tmp:
        ref_path = os.path.join(tmp, "ref.txt")
        with open(ref_path, "w") as f:
            f.write("vars: z w\n1 + z + w\n")
        ref = measure(trope, ref_path, tmp)
        print("bench_amoeba: seconds (ratio to the reference curve 1 + z + w in this run)")
        print(f"  {'curve':<12} {'draw 1000x1000':>22} {'area to 1e-3':>22} {'components+spine':>22}")
        print(f"  {'1+z+w':<12} {ref['draw']:>12.3f} {'(1.0)':>9} {ref['area']:>12.3f} {'(1.0)':>9}"
              f" {ref['spine']:>12.3f} {'(1.0)':>9}")
        for d in degrees:
            path = os.path.join(tmp, f"d{d}.txt")
            with open(path, "w") as f:
                f.write(curve(d, rng))
            t = measure(trope, path, tmp)
            row = f"  {'degree ' + str(d):<12}"
            for k in ("draw", "area", "spine"):
                ratio = t[k] / ref[k] if ref[k] > 0 else float("inf")
                row += f" {t[k]:>12.3f} {'(' + format(ratio, '.1f') + ')':>9}"
            print(row, flush=True)


main()
