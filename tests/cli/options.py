#!/usr/bin/python3
"""options.py — the command line's contract (src/cli/main.c, common.c): help and
version, usage errors as one line with exit 2, input errors as one line
`file:line:col: message` with exit 2, atomic output (-o never leaves a partial or
temporary file, never overwrites an input). These are the project's own rules
(DESIGN.md "Command line", the user's rules on bad input); common practice for Unix
tools, no source. Usage: /usr/bin/python3 tests/cli/options.py PATH_TO_TROPE"""
import json
import os
import re
import shutil
import stat
import subprocess
import sys
import tempfile

trope = sys.argv[1]
passed = failed = 0


def run(*args, stdin=None):
    p = subprocess.run([trope, *args], input=stdin, capture_output=True, timeout=120)
    return p.returncode, p.stdout.decode("utf-8", "replace"), p.stderr.decode(
        "utf-8", "replace")


def check(ok, what, detail=""):
    global passed, failed
    if ok:
        passed += 1
    else:
        failed += 1
        print(f"FAIL {what}" + (f": {detail}" if detail else ""))


def one_line(err):
    return err.endswith("\n") and err.count("\n") == 1


rc, out, err = run("--help")
check(rc == 0 and "tropicalize" in out and err == "", "trope --help", f"{rc} {err!r}")
rc, out, err = run("--version")
check(rc == 0 and re.match(r"^trope \d+\.\d+", out), "trope --version", out)
rc, out, err = run()
check(rc == 2 and "usage" in err, "trope with no command exits 2", f"{rc}")
rc, out, err = run("frobnicate")
check(rc == 2 and one_line(err) and "frobnicate" in err and out == "",
      "unknown command: one line, exit 2", f"{rc} {err!r}")
rc, out, err = run("help", "tropicalize")
check(rc == 0 and "--over" in out and "--points" in out, "trope help tropicalize", f"{rc}")
rc, out, err = run("help", "frobnicate")
check(rc == 2 and one_line(err), "trope help of an unknown command", f"{rc} {err!r}")

good = b"over: p=5\nx^2 + 5*x*y + 25*y^2 + 1\n"
for args, needle in ((["--over", "p=4"], "p=4"), (["--engine", "warp"], "warp"),
                     (["--format", "yaml"], "yaml"), (["--max-terms", "many"], "many"),
                     (["--bogus"], "--bogus"), (["--over"], "--over"),
                     (["a.trope", "b.trope"], "b.trope")):
    rc, out, err = run("tropicalize", *args, "-" if len(args) != 2 or
                       not args[0].endswith(".trope") else "--max", stdin=good)
    check(rc == 2 and one_line(err) and needle in err and out == "",
          f"usage error for {' '.join(args)}", f"exit {rc}, stderr {err!r}")

rc, out, err = run("tropicalize", "--points", "-", "--over", "t", stdin=b"0,0,1\n1,0,0\n")
check(rc == 2 and one_line(err), "--over with --points is refused", f"{rc} {err!r}")

# Input errors name <stdin>:line:col and exit 2.
rc, out, err = run("tropicalize", "-", stdin=b"# a comment\nx^2 + * y\n")
check(rc == 2 and one_line(err) and re.match(r"^<stdin>:2:\d+: \S", err) and out == "",
      "syntax error: one line <stdin>:2:col, exit 2", f"exit {rc}, stderr {err!r}")

# Several polynomials in one input: text sections in turn, JSON an array in order
# (the schema's oneOf; data/schema/trope.complex-1.schema.json).
two = b"over: p=3\nx^2 + 3*x*y + 9*y^2 + 1;\n x + y + 27\n"
rc, out, err = run("tropicalize", "-", stdin=two)
check(rc == 0 and "=== polynomial 1 of 2 (line 2) ===" in out
      and "=== polynomial 2 of 2 (line 3) ===" in out, "two polynomials: two text sections",
      f"{rc} {err!r}")
rc, out, err = run("tropicalize", "-", "--format", "json", stdin=two)
try:
    doc = json.loads(out)
    ok = (isinstance(doc, list) and len(doc) == 2
          and doc[1]["terms"][2]["valuation"] == "3")
except ValueError:
    ok = False
check(rc == 0 and ok, "two polynomials: a JSON array of two objects in order", out[:200])

# JSON strings are escaped (RFC 8259 section 7): a quote in a CSV column name and a
# byte that is not UTF-8 still give a document Python's json module reads back.
rc, out, err = run("tropicalize", "--points", "-", "--format", "json",
                   stdin=b'a"b,\xc3\xa9t\xe9,h\n0,0,1\n1,0,0\n0,1,0\n')
try:
    ok = json.loads(out)["variables"] == ['a"b', "\u00e9t\ufffd"]
except ValueError:
    ok = False
check(rc == 0 and ok, "JSON escapes quotes and invalid UTF-8", out[:200])

tmp = tempfile.mkdtemp(prefix="trope-options-")
try:
    src = os.path.join(tmp, "in.trope")
    with open(src, "wb") as f:
        f.write(good)
    rc, out, err = run("tropicalize", os.path.join(tmp, "missing.trope"))
    check(rc != 0 and one_line(err) and "missing.trope" in err,
          "a missing input file: one line naming it", f"{rc} {err!r}")

    rc, out, err = run("tropicalize", src, "-o", src)
    with open(src, "rb") as f:
        check(rc != 0 and f.read() == good and one_line(err),
              "-o refuses to overwrite the input", f"{rc} {err!r}")

    dst = os.path.join(tmp, "out.txt")
    rc, out, err = run("tropicalize", src, "-o", dst)
    check(rc == 0 and out == "" and os.path.getsize(dst) > 0, "-o writes the file",
          f"{rc} {err!r}")
    rc2, out2, _ = run("tropicalize", src)
    with open(dst) as f:
        check(f.read() == out2, "-o and standard output agree")

    with open(dst, "w") as f:
        f.write("keep me\n")
    bad = os.path.join(tmp, "bad.trope")
    with open(bad, "wb") as f:
        f.write(b"x^2 + (y\n")
    rc, out, err = run("tropicalize", bad, "-o", dst)
    with open(dst) as f:
        kept = f.read()
    check(rc == 2 and kept == "keep me\n" and re.match(re.escape(bad) + r":\d+:\d+: ", err),
          "bad input leaves an existing -o file alone", f"{rc} {err!r} {kept!r}")
    fresh = os.path.join(tmp, "fresh.json")
    rc, out, err = run("tropicalize", bad, "--format", "json", "-o", fresh)
    check(rc == 2 and not os.path.exists(fresh), "bad input creates no -o file")
    leftovers = [n for n in os.listdir(tmp) if ".tmp" in n]
    check(leftovers == [], "no temporary file is left behind", str(leftovers))

    # -o onto a pipe (or a device such as /dev/null) writes into it: renaming a
    # temporary file over it would replace the pipe or device itself.
    fifo = os.path.join(tmp, "pipe")
    os.mkfifo(fifo)
    reader = subprocess.Popen(["cat", fifo], stdout=subprocess.PIPE)
    rc, out, err = run("tropicalize", src, "-o", fifo)
    piped = reader.communicate(timeout=60)[0].decode()
    check(rc == 0 and stat.S_ISFIFO(os.stat(fifo).st_mode) and piped == out2,
          "-o onto a pipe writes into it and leaves it a pipe", f"{rc} {err!r}")
    os.unlink(fifo)

    rc, out, err = run("tropicalize", src, "-o", os.path.join(tmp, "no-such-dir", "x.txt"))
    check(rc == 1 and one_line(err), "unwritable -o: one line, exit 1", f"{rc} {err!r}")
finally:
    shutil.rmtree(tmp)

print(f"cli-options: {passed} passed, {failed} failed")
sys.exit(1 if failed else 0)
