#!/usr/bin/python3
"""determinism.py — the same input must give byte-identical output (text and JSON):
each example is run twice from its file, once more from standard input, and once
with -o into a file; all four must agree (apart from the report's `input` line, which
names the source). A design rule of trope (DESIGN.md: deterministic output); common
practice, no source. Usage: /usr/bin/python3 tests/cli/determinism.py PATH_TO_TROPE"""
import os
import subprocess
import sys
import tempfile

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
import cases  # noqa: E402


def strip_input_line(b):
    return b"\n".join(l for l in b.split(b"\n") if not l.startswith(b"input "))


def main():
    trope = sys.argv[1]
    passed = failed = 0
    with tempfile.TemporaryDirectory() as tmp:
        for name, args in cases.cases():
            path = args[-1]
            stdin_args = args[:-1] + ["-"]
            with open(path, "rb") as f:
                data = f.read()
            for fmt, ext in cases.FORMATS:
                label = f"{name}.{ext}"
                r1 = cases.run(trope, args, fmt)
                r2 = cases.run(trope, args, fmt)
                r3 = cases.run(trope, stdin_args, fmt, stdin=data)
                outp = os.path.join(tmp, label)
                p = subprocess.run([trope, "tropicalize", *args, "--format", fmt,
                                    "-o", outp], capture_output=True, timeout=300)
                problems = []
                if r1[0] != 0 or r2[0] != 0 or r3[0] != 0 or p.returncode != 0:
                    problems.append(f"exit codes {r1[0]}, {r2[0]}, {r3[0]}, {p.returncode}: "
                                    f"{r1[2].strip() or r3[2].strip()}")
                else:
                    with open(outp, "rb") as f:
                        r4 = f.read()
                    if r1[1] != r2[1]:
                        problems.append("two runs on the same file differ")
                    if strip_input_line(r1[1]) != strip_input_line(r3[1]):
                        problems.append("the file and standard input give different output")
                    if r1[1] != r4:
                        problems.append("-o FILE differs from standard output")
                    if not r1[1]:
                        problems.append("empty output")
                if problems:
                    print(f"FAIL {label}: " + "; ".join(problems))
                    failed += 1
                else:
                    passed += 1
    print(f"determinism: {passed} passed, {failed} failed")
    return 1 if failed or passed == 0 else 0


if __name__ == "__main__":
    sys.exit(main())
