#!/usr/bin/python3
"""golden.py — trope tropicalize on every data/examples/* file must give exactly the
bytes kept in tests/cli/golden/ (text and JSON), and the JSON must validate against
data/schema/trope.complex-1.schema.json (checked with the jsonschema library, Debian's
python3-jsonschema: a reference validator outside the project). It also checks the
claims the examples' header comments make (genus, vertex and edge counts, root
valuations) against the published facts and reference computations named beside them.

The expected files are only ever rewritten by scripts/regen-golden, after a person has
read the new output. Usage: /usr/bin/python3 tests/cli/golden.py PATH_TO_TROPE
(from the repository root)."""
import difflib
import json
import os
import sys

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
import cases  # noqa: E402

import jsonschema  # noqa: E402


def padic_val(q, p):
    """v_p of a nonzero rational (sympy Rational)."""
    import sympy
    q = sympy.Rational(q)
    v = 0
    num, den = int(q.p), int(q.q)
    while num % p == 0:
        num //= p
        v += 1
    while den % p == 0:
        den //= p
        v -= 1
    return v


def check_claims(trope):
    """The examples' header comments make claims; check them against their sources."""
    import sympy
    passed = failed = 0

    def claim(ok, what):
        nonlocal passed, failed
        if ok:
            passed += 1
        else:
            failed += 1
            print(f"FAIL claim: {what}")

    def doc(name, *extra):
        path = os.path.join(cases.EXAMPLES, name)
        args = ["--points", path] if name.endswith(".csv") else [path]
        rc, out, err = cases.run(trope, args + list(extra), "json")
        return json.loads(out) if rc == 0 else None

    # Smooth plane curves of degree d (unimodular triangulation of d*simplex): d^2
    # vertices, 3d(d-1)/2 bounded edges, 3d rays of weight 1 (d per direction),
    # genus (d-1)(d-2)/2. Mikhalkin, "Enumerative tropical algebraic geometry in R^2",
    # J. AMS 18 (2005), section 2 (from memory); Euler's formula and Pick's theorem.
    for name, d in (("harbour-quartic.trope", 4), ("orchard-cubic.trope", 3),
                    ("ferry-cubic-homogeneous.trope", 3)):
        j = doc(name)
        if j is None:
            claim(False, f"{name} runs")
            continue
        inv = j["invariants"]
        nv = sum(1 for c in j["complex"]["cells"] if c.get("multiplicity") is not None)
        claim(inv["genus"] == (d - 1) * (d - 2) // 2, f"{name}: genus (d-1)(d-2)/2")
        claim(inv["smooth"] is True, f"{name}: smooth")
        claim(nv == d * d, f"{name}: d^2 vertices, found {nv}")
        claim(inv["bounded_edges"] == 3 * d * (d - 1) // 2, f"{name}: 3d(d-1)/2 bounded edges")
        claim(sorted(r["weight"] for r in inv["rays"]) == [d, d, d],
              f"{name}: three ray directions of total weight d")
        claim(inv["balanced"], f"{name}: balanced")
    # Homogeneous in x, y, z: lineality spanned by (1, 1, 1) (common practice, no source).
    j = doc("ferry-cubic-homogeneous.trope")
    claim(j is not None and j["complex"]["lineality"] == [[1, 1, 1]],
          "ferry cubic: lineality (1, 1, 1)")

    # Univariate p-adic Newton polygon: a segment of horizontal length l and slope s
    # carries l roots of valuation -s (Neukirch, Algebraic Number Theory, ch. II sec. 6,
    # from memory; Koblitz, GTM 58, ch. IV sec. 3). Ground truth: sympy's exact roots.
    j = doc("tide-roots.trope")
    x = sympy.symbols("x")
    with open(os.path.join(cases.EXAMPLES, "tide-roots.trope")) as f:
        body = "".join(l for l in f if not l.startswith("#") and ":" not in l)
    roots = sympy.roots(sympy.Poly(sympy.sympify(body.replace("^", "**")), x))
    want = sorted((padic_val(r, 3), m) for r, m in roots.items())
    merged = {}
    for v, m in want:
        merged[v] = merged.get(v, 0) + m
    got = {}
    if j is not None:
        for c in j["complex"]["cells"]:
            v = sympy.Rational(j["complex"]["vertices"][c["vertices"][0]][0])
            got[v] = got.get(v, 0) + c["weight"]
    claim(got == merged, f"tide roots: valuations with multiplicity {got} == {merged}")
    # --max negates every coordinate (DESIGN.md conventions; common practice).
    jm = doc("tide-roots.trope", "--max")
    claim(jm is not None and sorted(sympy.Rational(v[0]) for v in jm["complex"]["vertices"])
          == sorted(-v for v in merged), "tide roots: --max negates the vertices")

    # The repeated bid (1,1) with the higher price is unused (points.h: the lowest
    # height of an exponent wins); the polygon has 3 interior lattice points, so the
    # smooth curve has genus 3 (Pick's theorem; common practice).
    j = doc("market-bids.csv")
    claim(j is not None and j["subdivision"]["unused"] == [11], "market bids: row 11 unused")
    claim(j is not None and j["invariants"]["genus"] == 3, "market bids: genus 3")
    return passed, failed


def main():
    trope = sys.argv[1]
    with open("data/schema/trope.complex-1.schema.json") as f:
        schema = json.load(f)
    jsonschema.Draft202012Validator.check_schema(schema)
    validator = jsonschema.Draft202012Validator(schema)
    passed = failed = 0
    for name, args in cases.cases():
        for fmt, ext in cases.FORMATS:
            label = f"{name}.{ext}"
            rc, out, err = cases.run(trope, args, fmt)
            if rc != 0:
                print(f"FAIL {label}: exit {rc}: {err.strip()}")
                failed += 1
                continue
            if fmt == "json":
                try:
                    doc = json.loads(out)
                    errors = sorted(validator.iter_errors(doc), key=lambda e: list(e.path))
                except ValueError as e:
                    errors = [f"not JSON: {e}"]
                if errors:
                    print(f"FAIL {label}: does not follow the schema: "
                          f"{getattr(errors[0], 'message', errors[0])}")
                    failed += 1
                    continue
            gpath = os.path.join(cases.GOLDEN, label)
            if not os.path.exists(gpath):
                print(f"FAIL {label}: no expected file {gpath} (run scripts/regen-golden "
                      "and read what it wrote)")
                failed += 1
                continue
            with open(gpath, "rb") as f:
                want = f.read()
            if out != want:
                diff = difflib.unified_diff(
                    want.decode("utf-8", "replace").splitlines(),
                    out.decode("utf-8", "replace").splitlines(),
                    gpath, "trope output", lineterm="", n=2)
                print(f"FAIL {label}: differs from {gpath}:")
                for k, line in enumerate(diff):
                    if k >= 60:
                        print("  ...")
                        break
                    print("  " + line)
                failed += 1
                continue
            passed += 1
    p, f = check_claims(trope)
    passed += p
    failed += f
    print(f"golden: {passed} passed, {failed} failed")
    return 1 if failed or passed == 0 else 0


if __name__ == "__main__":
    sys.exit(main())
