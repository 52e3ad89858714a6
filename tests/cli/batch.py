#!/usr/bin/python3
"""batch.py — `trope batch`: order, shards, bad lines, threads.

Usage: /usr/bin/python3 tests/cli/batch.py PATH_TO_TROPE

Checks (the jobs are our own random polynomials and point sets, fixed seeds):
- one result line per non-blank job line, in input order: result k equals, as JSON,
  what `trope tropicalize --format json` prints for job k alone;
- a bad line in the middle gives an error object naming its line and column, and the
  jobs after it still run (exit status 2, the output file is complete);
- --shard K/N for N = 1..4: every job appears in exactly one shard, with the same bytes
  as in the unsharded run;
- --jobs 1, 2 and 4 give byte-identical output;
- usage errors exit 2 with one line on stderr and leave no output file.
"""
import json
import os
import random
import subprocess
import sys
import tempfile

TROPE = sys.argv[1] if len(sys.argv) > 1 else "build/src/cli/trope"
failures = []


def run(args, stdin=None):
    return subprocess.run([TROPE] + args, input=stdin, capture_output=True, text=True)


def check(ok, msg):
    if not ok:
        failures.append(msg)


def make_jobs(rng, k):
    jobs = []
    for i in range(k):
        kind = i % 3
        if kind == 0:
            terms = [f"{rng.choice([1, 3, 9, 27, 2, 6])}*x^{rng.randint(0, 4)}*y^{rng.randint(0, 4)}"
                     for _ in range(rng.randint(3, 8))]
            jobs.append({"poly": " + ".join(terms) + " + 1", "over": "p=3"})
        elif kind == 1:
            terms = [f"t^{rng.randint(0, 5)}*x^{rng.randint(-2, 3)}" for _ in range(rng.randint(2, 6))]
            jobs.append({"poly": " + ".join(terms) + " + y", "over": "t", "max": bool(rng.randint(0, 1))})
        else:
            pts, seen = [], set()
            while len(pts) < rng.randint(4, 12):
                a = (rng.randint(0, 4), rng.randint(0, 4), rng.randint(0, 2))
                if a in seen:
                    continue
                seen.add(a)
                pts.append([a[0], a[1], a[2], f"{rng.randint(-9, 9)}/{rng.randint(1, 4)}"])
            jobs.append({"points": pts})
    return jobs


def single(tmp, job):
    """The same job through `trope tropicalize`."""
    if "points" in job:
        path = os.path.join(tmp, "one.csv")
        with open(path, "w") as f:
            for p in job["points"]:
                f.write(",".join(str(x) for x in p) + "\n")
        args = ["tropicalize", "--points", path, "--format", "json"]
    else:
        args = ["tropicalize", "-", "--format", "json", "--over", job["over"]]
    if job.get("max"):
        args.append("--max")
    r = run(args, stdin=None if "points" in job else job["poly"] + "\n")
    return json.loads(r.stdout) if r.returncode == 0 else None


def main():
    rng = random.Random(0x7470)
    jobs = make_jobs(rng, 30)
    with tempfile.TemporaryDirectory() as tmp:
        src = os.path.join(tmp, "jobs.jsonl")
        lines = [json.dumps(j) for j in jobs]
        lines.insert(7, "")                               # blank: not a job
        lines.insert(12, '{"poly": "x^2 + * y", "over": "p=3"}')   # bad line in the middle
        with open(src, "w") as f:
            f.write("\n".join(lines) + "\n")

        # order, and agreement with tropicalize
        out = os.path.join(tmp, "out.jsonl")
        r = run(["batch", src, "-o", out])
        check(r.returncode == 2, f"a bad line should give exit 2, got {r.returncode}")
        with open(out) as f:
            res = f.read().splitlines()
        check(len(res) == len(jobs) + 1, f"expected {len(jobs) + 1} result lines, got {len(res)}")
        bad = json.loads(res[11])                      # line 13 of the file, 12th job
        check("error" in bad and bad["error"]["line"] == 13 and bad["error"]["col"] == 17,
              f"bad line: expected an error at line 13 col 17, got {res[11][:120]}")
        good = res[:11] + res[12:]
        for k, (job, line) in enumerate(zip(jobs, good)):
            ref = single(tmp, job)
            check(ref is not None and json.loads(line) == ref,
                  f"job {k}: batch result differs from tropicalize --format json")

        # threads
        base = run(["batch", src, "--jobs", "1"]).stdout
        for n in (2, 4):
            check(run(["batch", src, "--jobs", str(n)]).stdout == base,
                  f"--jobs {n} output differs from --jobs 1")

        # shards: each job exactly once, same bytes
        base_lines = base.splitlines()
        nonblank = [i for i, l in enumerate(lines) if l.strip()]
        for N in range(1, 5):
            seen = {}
            for K in range(1, N + 1):
                part = run(["batch", src, "--shard", f"{K}/{N}", "--jobs", "2"]).stdout.splitlines()
                mine = [i for i in nonblank if i % N == K - 1]
                check(len(part) == len(mine), f"shard {K}/{N}: {len(part)} lines for {len(mine)} jobs")
                for i, line in zip(mine, part):
                    check(i not in seen, f"shard {K}/{N}: line {i + 1} appears twice")
                    seen[i] = line
            check(sorted(seen) == nonblank, f"shards of {N}: lines missing")
            check([seen[i] for i in nonblank] == base_lines,
                  f"shards of {N}: results differ from the unsharded run")

        # usage errors
        for args in (["--shard", "0/2"], ["--shard", "3/2"], ["--shard", "x"], ["--jobs", "0"],
                     ["--bogus"], ["--format", "text"]):
            dest = os.path.join(tmp, "never.jsonl")
            r = run(["batch", src, "-o", dest] + args)
            check(r.returncode == 2 and len(r.stderr.strip().splitlines()) == 1 and
                  not os.path.exists(dest),
                  f"batch {' '.join(args)}: expected exit 2, one line, no file; got "
                  f"{r.returncode} {r.stderr.strip()!r}")
        r = run(["batch", os.path.join(tmp, "missing.jsonl")])
        check(r.returncode != 0 and "missing.jsonl" in r.stderr, "missing file not reported")

    for f in failures[:20]:
        print("FAIL:", f)
    print(f"batch: {len(jobs)} jobs, {len(failures)} failures")
    return 1 if failures else 0


if __name__ == "__main__":
    sys.exit(main())
