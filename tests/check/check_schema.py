"""check_schema.py — every JSON output validates against the published schema.

The reference validator is python3-jsonschema (Debian), run on
data/schema/trope.complex-1.schema.json, which states the interchange format of
DESIGN.md "JSON". Inputs: every file in data/examples/ (CSV files through --points), in
min and max convention, and a few hundred random inputs: p-adic, Puiseux, trivial and
complex fields, 1 to 4 variables, Laurent and homogeneous polynomials, monomials (the
empty complex), several polynomials in one file (a JSON array), and --points CSV files
with and without a header line.
"""

import glob
import json
import os
from fractions import Fraction

import jsonschema

import tropecheck as tc

trope = tc.trope_path()
chk = tc.Checker("check_schema")
rng, seed = tc.make_rng("schema")
wd = tc.Workdir("schema")
SCHEMA = "data/schema/trope.complex-1.schema.json"

if not os.path.isfile(SCHEMA):
    chk.fail(f"{SCHEMA} is missing")
    chk.finish()
try:
    with open(SCHEMA, encoding="utf-8") as f:
        schema = json.load(f)
    cls = jsonschema.validators.validator_for(schema)
    cls.check_schema(schema)
    validator = cls(schema)
except (json.JSONDecodeError, jsonschema.exceptions.SchemaError) as e:
    chk.fail(f"{SCHEMA} is not a valid JSON Schema: {str(e)[:300]}")
    chk.finish()


def objects(js):
    return js if isinstance(js, list) else [js]


def validate(args, tag):
    rc, out, err = tc.run(trope, ["tropicalize"] + args + ["--format", "json"])
    if rc != 0:
        return [f"{tag}: trope exited {rc}: {err.strip()[:300]}"]
    try:
        js = json.loads(out)
    except json.JSONDecodeError as e:
        return [f"{tag}: not JSON: {e}"]
    errs = []
    for e in sorted(validator.iter_errors(js), key=lambda e: list(e.absolute_path))[:3]:
        errs.append(f"{tag}: schema: at {'/'.join(map(str, e.absolute_path))}: {e.message[:200]}")
    for o in objects(js):
        if not isinstance(o, dict) or o.get("format") != "trope.complex/1":
            errs.append(f"{tag}: object without \"format\": \"trope.complex/1\"")
    return errs


def rand_q(r, p=None):
    while True:
        a, b = r.randint(-40, 40), r.randint(1, 9)
        if a:
            q = Fraction(a, b)
            if p:
                q *= Fraction(p) ** r.randint(-2, 3)
            return tc.frac_text(q)


def rand_poly(r):
    kind = r.choice(["padic", "puiseux", "trivial", "complex", "homog", "monomial"])
    n = r.randint(1, 4)
    names = ["x", "y", "z", "w"][:n]
    if kind == "homog":
        n, names = 3, ["x", "y", "z"]
        d = r.randint(1, 3)
        pool = [(i, j, d - i - j) for i in range(d + 1) for j in range(d + 1 - i)]
        exps = r.sample(pool, r.randint(2, len(pool)))
    elif kind == "monomial":
        exps = tc.random_distinct_exponents(r, n, 1, -3, 3)
    else:
        exps = tc.random_distinct_exponents(r, n, r.randint(2, 10), -2, 3)
    p = r.choice([2, 3, 5, 7])
    if kind in ("padic", "homog", "monomial"):
        over = f"p={p}"
        coeffs = [rand_q(r, p) for _ in exps]
    elif kind == "puiseux":
        over = "t"
        coeffs = [f"{rand_q(r)}*t^({r.randint(-3, 5)}/{r.choice([1, 2, 3])}) + {rand_q(r)}"
                  for _ in exps]
    elif kind == "complex":
        over = "C"
        coeffs = [f"{rand_q(r)} + {rand_q(r)}i" for _ in exps]
    else:
        over = "Q"
        coeffs = [rand_q(r) for _ in exps]
    return f"vars: {' '.join(names)}\n" + tc.poly_text(list(zip(coeffs, exps)), names), over


def make_cases():
    cases = []
    for path in sorted(glob.glob("data/examples/*")):
        if os.path.isdir(path) or path.endswith(".md"):
            continue
        base = ["--points", path] if path.endswith(".csv") else [path]
        cases.append((base, f"example {path}"))
        cases.append((base + ["--max"], f"example {path} --max"))
    for k in range(240):
        if k % 6 == 5:      # --points CSV
            n = rng.randint(1, 3)
            exps = tc.random_distinct_exponents(rng, n, rng.randint(1, 12), -3, 3)
            hs = [Fraction(rng.randint(-50, 50), rng.choice([1, 2, 7])) for _ in exps]
            header = [f"e{i}" for i in range(n)] + ["h"] if k % 12 == 5 else None
            path = wd.file(tc.csv_text(exps, hs, header), suffix=".csv")
            cases.append((["--points", path] + (["--max"] if k % 4 == 1 else []),
                          f"random CSV {k} ({path})"))
        elif k % 6 == 4:    # several polynomials in one file
            polys = [rand_poly(rng) for _ in range(rng.randint(2, 4))]
            over = polys[0][1]
            texts = []
            for text, o in polys:
                if o == over:
                    texts.append(text.split("\n", 1)[1])
            body = f"vars: {' '.join(['x', 'y', 'z', 'w'])}\n" + ";\n".join(texts) + "\n"
            path = wd.file(body)
            cases.append(([path, "--over", over], f"random multi-polynomial {k} ({path})"))
        else:
            text, over = rand_poly(rng)
            path = wd.file(text + "\n")
            cases.append(([path, "--over", over] + (["--max"] if k % 5 == 2 else []),
                          f"random polynomial {k} ({path}, --over {over})"))
    return cases


cases = make_cases()
for errs in tc.parallel(lambda c: validate(*c), cases):
    chk.ok(not errs, lambda errs=errs: f"seed {seed}: " + "; ".join(errs))
if chk.failures == 0:
    wd.cleanup()
chk.finish(f"{len(cases)} outputs validated against {SCHEMA}")
