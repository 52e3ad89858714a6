#!/usr/bin/python3
"""valgrind.py — run trope under valgrind (memcheck) on the demo examples and on the
bad-input catalogue: no invalid access, no use of uninitialised values, no memory
definitely lost. cddlib keeps about 1 KB of GMP temporaries reachable until exit
(STYLE.md §4); "still reachable" is therefore not counted.

Usage: valgrind.py PATH_TO_TROPE
"""
import glob
import os
import shutil
import subprocess
import sys
import tempfile

trope = os.path.abspath(sys.argv[1])
if not shutil.which("valgrind"):
    print("valgrind: not installed")
    sys.exit(1)

tmp = tempfile.mkdtemp(prefix="trope-vg-")
runs = []
for ex in sorted(glob.glob("data/examples/*")):
    if ex.endswith(".csv"):
        runs.append(["tropicalize", "--points", ex, "--format", "json"])
        continue
    if ex.endswith(".jsonl"):
        continue
    runs.append(["tropicalize", ex])
    runs.append(["tropicalize", ex, "--format", "json", "--max"])
for ex in ["data/examples/orchard-cubic.trope", "data/examples/harbour-quartic.trope"]:
    if os.path.exists(ex):
        runs.append(["draw", ex, "--size", "300x300", "-o", os.path.join(tmp, "f.png")])
        runs.append(["draw", ex, "--with-subdivision", "-o", os.path.join(tmp, "f.svg")])
bad = sorted(p for p in glob.glob("data/bad/*") if not p.endswith(".md"))
for b in bad[:40]:
    if b.endswith(".csv"):
        runs.append(["tropicalize", "--points", b])
    else:
        runs.append(["tropicalize", b, "--over", "p=5"])

failures = 0
for args in runs:
    cmd = ["valgrind", "--quiet", "--error-exitcode=99", "--leak-check=full",
           "--errors-for-leak-kinds=definite", "--show-leak-kinds=definite", trope] + args
    r = subprocess.run(cmd, capture_output=True, text=True, errors="replace", timeout=600)
    if r.returncode == 99 or "Invalid" in r.stderr or "definitely lost" in r.stderr:
        failures += 1
        print("FAIL:", " ".join(args))
        print("\n".join(r.stderr.splitlines()[:30]))
shutil.rmtree(tmp, ignore_errors=True)
print(f"valgrind: {len(runs)} runs, {failures} with memory errors")
sys.exit(1 if failures else 0)
