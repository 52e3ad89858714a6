"""bad_inputs.py — trope on the bad-input catalogue in data/bad/.

Usage:
  /usr/bin/python3 tests/cli/bad_inputs.py PATH_TO_TROPE      run the catalogue
  /usr/bin/python3 tests/cli/bad_inputs.py --write-catalogue  (re)write data/bad/*
                                                               and data/bad/README.md

The CATALOGUE list below is the one source of the catalogue: each file's exact bytes,
the options to run it with, the expected position and a fragment of the message.
Every bad input must give (DESIGN.md "Input language", the project's error rules):
  * exit status 2, no signal, no sanitizer report;
  * exactly one line on stderr: `FILE:LINE:COL: message` with the expected position
    and message fragment (`trope...: message` for bad command-line options);
  * nothing on stdout, and with `-o DIR/tmp-bad.json` no output file and no temporary
    file left in DIR.
One entry must succeed exactly: a coefficient of 100 000 digits.
"""

import json
import os
import re
import shutil
import subprocess
import sys

BAD = "data/bad"
if hasattr(sys, "set_int_max_str_digits"):
    sys.set_int_max_str_digits(0)   # the 100 000-digit coefficient

# 5^143067 has exactly 100 000 decimal digits.
BIG_K = 143067


def big_coefficient():
    digits = str(5 ** BIG_K)
    assert len(digits) == 100000
    return (digits + "*x + 1\n").encode()


def binary_garbage():
    # A PNG signature, then bytes 0..255 in a fixed scrambled order (NULs included).
    body = bytes((i * 167 + 13) % 256 for i in range(512))
    return b"\x89PNG\r\n\x1a\n" + body


def deep_parens():
    return b"(" * 100000 + b"x" + b")" * 100000 + b"\n"


BIG = big_coefficient()
# (file, bytes, options, expected position "LINE:COL" | "cli" | "ok", fragment, what)
CATALOGUE = [
    ("dangling-plus.trope", b"x + y + )\n", [], "1:9", "after '+', found ')'",
     "a ')' where a term must follow '+'"),
    ("double-caret.trope", b"x^^2 + 1\n", [], "1:3", "exponent", "`x^^2`"),
    ("missing-star.trope", b"3x + 1\n", [], "1:2", "'*'", "`3x`: a factor without '*'"),
    ("unbalanced-open.trope", b"(x + y*(2 - x)\n", [], "2:1", "opened at 1:1",
     "an unclosed '(' (reported at the end, naming where it opened)"),
    ("unbalanced-close.trope", b"x + y) * 2\n", [], "1:6", "')'", "a ')' with no '('"),
    ("unknown-header.trope", b"colour: red\nx + 1\n", [], "1:7", "':'",
     "an unknown header field `colour:`"),
    ("over-header-p4.trope", b"over: p=4\nx + 1\n", [], "1:9", "prime",
     "`over: p=4` in the file: the position is in the file"),
    ("over-header-unknown.trope", b"over: 7-adic\nx + 1\n", [], "1:7", "expected",
     "an unreadable field in the `over:` header"),
    ("simple-line.trope", b"x + y + 1\n", ["--over", "p=1"], "cli", "prime",
     "`--over p=1`: 1 is not a prime"),
    ("simple-line.trope", b"x + y + 1\n", ["--over", "p=4"], "cli", "prime",
     "`--over p=4`: 4 is not a prime"),
    ("simple-line.trope", b"x + y + 1\n", ["--over", "p=seven"], "cli", "--over",
     "`--over p=seven`: not a number"),
    ("simple-line.trope", b"x + y + 1\n", ["--format", "yaml"], "cli", "yaml",
     "an unknown output format"),
    ("div-zero.trope", b"x/0 + 1\n", [], "1:2", "division by zero", "`x/0`"),
    ("div-zero-expr.trope", b"x/(2 - 2) + 1\n", [], "1:2", "division by zero",
     "division by an expression equal to zero"),
    ("zero-poly.trope", b"x - x\n", [], "1:1", "zero", "`x - x`: the zero polynomial"),
    ("zero-poly-expanded.trope", b"(x + 1)^2 - x^2 - 2*x - 1\n", [], "1:1", "zero",
     "a sum that expands to zero"),
    ("exp-overflow.trope", b"x^9223372036854775807*x\n", [], "1:22", "64",
     "a product of powers that leaves int64"),
    ("exp-huge.trope", b"x^99999999999999999999 + 1\n", [], "1:2", "64",
     "the exponent 99999999999999999999"),
    ("exp-power-overflow.trope", b"(x^5000000000000000000)^2 + 1\n", [], "1:24", "64",
     "a power of a power that leaves int64"),
    ("cdd-work-limit.trope", b"(x + y + z + w + 1)^25\n", [], "1:1", "--max-cdd-points",
     "23751 points in 4 variables: refused up front with a work estimate, not a long run"),
    ("simplex-24-vars.trope", (" + ".join("v%d" % i for i in range(24)) + " + 1\n").encode(),
     [], "1:1", "--max-cells",
     "a simplex in 24 variables has 2^25 - 1 faces: refused with a limit, not an hour's run"),
    ("caret-space-sign.trope", b"x^ + 1\n", [], "1:4", "right after '^'",
     "`x^ + 1` must not read as x^(+1)"),
    ("frac-exp-var.trope", b"x^(1/2) + 1\n", [], "1:2", "fractional exponent",
     "a rational exponent on a variable"),
    ("empty.trope", b"", [], "1:1", "empty input", "an empty file"),
    ("comment-only.trope", b"# nothing here\n\n", [], "3:1", "empty input",
     "comments and blank lines only"),
    ("semicolons-only.trope", b";;\n", [], "2:1", "empty input",
     "separators but no polynomial"),
    ("binary-garbage.bin", binary_garbage(), [], "1:1", "unexpected character",
     "binary data (a PNG signature and bytes 0..255)"),
    ("nul-byte.trope", b"x + \x00y + 1\n", [], "1:5", "unexpected character",
     "a NUL byte in the middle of a line"),
    ("invalid-utf8.trope", b"x + \xc3\x28 + 1\n", [], "1:5", "unexpected character",
     "an invalid UTF-8 sequence"),
    ("huge-coefficient.trope", BIG, ["--over", "p=5"], "ok",
     f"valuation {BIG_K}",
     f"SUCCEEDS: 5^{BIG_K} (100000 digits) * x + 1, exact valuation {BIG_K}"),
    ("huge-coefficient.trope", BIG, ["--over", "p=5", "--max-digits", "1000"],
     "1:1", "--max-digits", "a number longer than --max-digits"),
    ("deep-parens.trope", deep_parens(), [], "1:201", "--max-depth",
     "100000 nested parentheses: refused at the limit (200)"),
    ("power-of-sum.trope", b"(x + y + z + 1)^100000\n", [], "1:16", "--max-terms",
     "a power of a sum with too many terms: refused before expanding"),
    ("csv-ragged.csv", b"0,0,1\n1,0,2\n0,1,3,4\n", [], "3:7", "expected 3 fields",
     "CSV: a row with one field too many"),
    ("csv-nonint-exponent.csv", b"0,0,1\n1.5,0,2\n", [], "2:1", "integer",
     "CSV: a non-integer exponent"),
    ("csv-empty.csv", b"", [], "1:1", "expected",
     "CSV: an empty file"),
    ("csv-bad-height.csv", b"0,0,1\n1,2,abc\n", [], "2:5", "height",
     "CSV: a height that is not a number"),
    ("csv-height-div-zero.csv", b"0,0,1\n1,0,1/0\n", [], "2:5", "division by zero",
     "CSV: a height 1/0"),
    ("csv-binary.csv", binary_garbage(), [], "1:5", "at least 2 fields",
     "CSV: binary data"),
    ("csv-nul-byte.csv", b"0,0,1\n1,\x00,2\n", [], "2:3", "expected",
     "CSV: a NUL byte in a field"),
    ("csv-exp-overflow.csv", b"0,1\n99999999999999999999,2\n", [], "2:1", "64",
     "CSV: an exponent past int64"),
    ("unknown-var.trope", b"vars: x y\nx + z\n", [], "2:5", "unknown variable",
     "a variable not listed in `vars:`"),
    ("t-exp-div-zero.trope", b"t^(1/0)*x + 1\n", ["--over", "t"], "1:6", "division by zero",
     "`t^(1/0)`"),
    ("div-by-poly.trope", b"1/(x + y) + 1\n", [], "1:2", "divide by a polynomial",
     "division by a polynomial in the variables"),
    ("complex-j.trope", b"(2-3j)*x + 1\n", ["--over", "C"], "1:5", "expected",
     "`--over C` with `2-3j` (the suffix is i)"),
    ("bad-decimal.trope", b"1.2.3*x + 1\n", [], "1:4", "expected", "`1.2.3`"),
    ("leading-star.trope", b"*x + 1\n", [], "1:1", "expected a number, a variable",
     "an operator where a term must start"),
    ("caret-missing-exp.trope", b"x^*2 + 1\n", [], "1:3", "exponent",
     "`^` followed by an operator"),
    ("param-as-exponent.trope", b"x^t + 1\n", ["--over", "t"], "1:3", "exponent",
     "the parameter as an exponent"),
    ("vars-duplicate.trope", b"vars: x x\nx + 1\n", [], "1:9", "x",
     "a variable listed twice in `vars:`"),
    ("stray-comma.trope", b"x, y\n", [], "1:2", "expected", "a comma between terms"),
    ("imag-not-complex.trope", b"2i*x + 1\n", ["--over", "p=5"], "1:1", "--over C",
     "an imaginary number outside --over C"),
]


def write_catalogue():
    os.makedirs(BAD, exist_ok=True)
    written = set()
    for name, data, *_ in CATALOGUE:
        if name in written:
            continue
        written.add(name)
        with open(os.path.join(BAD, name), "wb") as f:
            f.write(data)
    rows = ["# The bad-input catalogue",
            "",
            "Each file here is exactly one hostile input (no comment lines: the bytes are",
            "the test). `tests/cli/bad_inputs.py` runs `trope tropicalize FILE --format json",
            "OPTIONS -o DIR/tmp-bad.json` on each row (CSV files through",
            "`--points FILE`) and expects exit status 2, exactly one line on stderr",
            "starting `FILE:LINE:COL: ` at the position below and containing the",
            "fragment (command-line errors: `trope...: `), nothing on stdout and no",
            "output or temporary file left behind. The one row marked `ok` must succeed.",
            "",
            "This list and the files are generated from the CATALOGUE list in",
            "`tests/cli/bad_inputs.py` (`/usr/bin/python3 tests/cli/bad_inputs.py",
            "--write-catalogue`); edit it there.",
            "",
            "| file | options | position | message fragment | what it is |",
            "|---|---|---|---|---|"]
    for name, data, opts, pos, frag, what in CATALOGUE:
        o = " ".join(opts)
        rows.append(f"| `{name}` | {('`' + o + '`') if o else ''} | {pos} | "
                    f"`{frag}` | {what} |")
    rows.append("")
    with open(os.path.join(BAD, "README.md"), "w", encoding="utf-8") as f:
        f.write("\n".join(rows))
    print(f"wrote {len(written)} files and {BAD}/README.md")


def main():
    if len(sys.argv) == 2 and sys.argv[1] == "--write-catalogue":
        write_catalogue()
        return 0
    if len(sys.argv) < 2:
        print("usage: bad_inputs.py PATH_TO_TROPE | --write-catalogue", file=sys.stderr)
        return 2
    trope = os.path.abspath(sys.argv[1])
    outdir = os.path.join("out", f"bad-inputs-{os.getpid()}")
    os.makedirs(outdir, exist_ok=True)
    failures = []
    for name, data, opts, pos, frag, what in CATALOGUE:
        path = os.path.join(BAD, name)
        label = f"{path} {' '.join(opts)}".strip()
        if not os.path.isfile(path):
            failures.append(f"{label}: missing (run bad_inputs.py --write-catalogue)")
            continue
        with open(path, "rb") as f:
            if f.read() != data:
                failures.append(f"{label}: differs from the CATALOGUE list")
                continue
        src = ["--points", path] if name.endswith(".csv") else [path]
        dest = os.path.join(outdir, "tmp-bad.json")
        for to_file in (True, False):
            cmd = [trope, "tropicalize"] + src + ["--format", "json"] + opts
            if to_file:
                cmd += ["-o", dest]
            try:
                p = subprocess.run(cmd, capture_output=True, timeout=60)
            except subprocess.TimeoutExpired:
                failures.append(f"{label}: no answer within 60 s")
                break
            err = p.stderr.decode("utf-8", "replace")
            out = p.stdout
            where = "with -o" if to_file else "to stdout"
            if p.returncode < 0:
                failures.append(f"{label} ({where}): killed by signal {-p.returncode}")
                break
            if "Sanitizer" in err or "runtime error:" in err:
                failures.append(f"{label} ({where}): sanitizer report: {err[:300]}")
                break
            left = sorted(os.listdir(outdir))
            if pos == "ok":
                if p.returncode != 0:
                    failures.append(f"{label} ({where}): exit {p.returncode}: {err.strip()[:300]}")
                    break
                try:
                    text = open(dest, encoding="utf-8").read() if to_file else out.decode()
                    js = json.loads(text)
                    vals = sorted(t["valuation"] for t in js["terms"])
                    want = frag.split()[-1]
                    if want not in vals:
                        failures.append(f"{label}: valuations {vals}, expected {want} among them")
                except (OSError, ValueError, KeyError, TypeError) as e:
                    failures.append(f"{label} ({where}): unreadable output: {e}")
                for f in left:
                    os.remove(os.path.join(outdir, f))
                continue
            lines = err.split("\n")
            if lines and lines[-1] == "":
                lines.pop()
            if p.returncode != 2:
                failures.append(f"{label} ({where}): exit status {p.returncode}, expected 2; "
                                f"stderr {err.strip()[:200]!r}")
            if len(lines) != 1:
                failures.append(f"{label} ({where}): {len(lines)} lines on stderr, expected 1: "
                                f"{err[:300]!r}")
            elif pos == "cli":
                if not re.match(r"^trope( [a-z]+)?: ", lines[0]) or frag not in lines[0]:
                    failures.append(f"{label}: stderr {lines[0]!r}, expected 'trope...: ' "
                                    f"and {frag!r}")
            else:
                prefix = f"{path}:{pos}: "
                if not lines[0].startswith(prefix) or frag not in lines[0][len(prefix):]:
                    failures.append(f"{label}: stderr {lines[0]!r}, expected {prefix!r} "
                                    f"and {frag!r} ({what})")
            if out:
                failures.append(f"{label} ({where}): {len(out)} bytes on stdout, expected none")
            if left:
                failures.append(f"{label} ({where}): left behind in {outdir}: {left}")
                for f in left:
                    os.remove(os.path.join(outdir, f))
    shutil.rmtree(outdir, ignore_errors=True)
    for f in failures[:40]:
        print(f"bad_inputs: FAIL: {f}", file=sys.stderr)
    n = len(CATALOGUE)
    if failures:
        print(f"bad_inputs: FAILED: {len(failures)} problems over {n} catalogue entries")
        return 1
    print(f"bad_inputs: ok: {n} catalogue entries refused cleanly (1 large input accepted)")
    return 0


if __name__ == "__main__":
    sys.exit(main())
