"""cases.py — the example runs shared by golden.py, determinism.py and
scripts/regen-golden: every file in data/examples/ through `trope tropicalize`, as a
text report and as JSON. Paths are relative to the repository root (the tests run
there), so the reports' `input` lines are the same on every machine."""
import os
import subprocess

EXAMPLES = "data/examples"
GOLDEN = "tests/cli/golden"
FORMATS = (("text", "txt"), ("json", "json"))


def cases():
    """Yield (name, args) for each example: args go after `trope tropicalize`."""
    for base in sorted(os.listdir(EXAMPLES)):
        path = os.path.join(EXAMPLES, base)
        if not os.path.isfile(path):
            continue
        name = os.path.splitext(base)[0]
        if base.endswith(".csv"):
            yield name, ["--points", path]
        else:
            yield name, [path]


def run(trope, args, fmt, stdin=None):
    """Run trope tropicalize ARGS --format FMT; return (exit code, stdout bytes,
    stderr text)."""
    p = subprocess.run([trope, "tropicalize", *args, "--format", fmt],
                       input=stdin, capture_output=True, timeout=300)
    return p.returncode, p.stdout, p.stderr.decode("utf-8", "replace")
