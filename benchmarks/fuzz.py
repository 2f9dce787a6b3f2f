"""A long fuzz of the command line: ``python benchmarks/fuzz.py --mutations 5000 [--seed S]``.

The mutations of ``tests/fuzzing.py`` (bundled cases cut to a few members and 30-60 min fires; keys dropped,
repeated, of the wrong type, extreme and non-finite numbers, long and control-character strings, deep
nesting, ``[code]`` values at and beyond their ranges; schedules and fire tables with bad cells, huge values,
many columns, formula-like names; paths absolute, through ``..``, missing, folders, FIFOs, symlink loops,
very long), each run in-process in a fresh folder. Mutation ``i`` uses the seed ``S + i``, so any one is
rebuilt with ``--seed S+i --mutations 1``.

Prints: runs, exit codes by value, tracebacks, exit codes outside 0/1/2, exit-2 runs whose standard error
is not one line, files written outside --out, inputs replaced, leaks of the outside file's text,
time-outs, and the first failing mutations with their seeds.
"""

from __future__ import annotations

import argparse
import collections
import os
import sys
import tempfile
import time
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parents[1] / "tests"))

import fuzzing  # noqa: E402


def main(argv=None) -> int:
    p = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    p.add_argument("--mutations", type=int, default=5000)
    p.add_argument("--seed", type=int, default=20261203)
    p.add_argument("--show", type=int, default=10, help="how many failing mutations to print")
    p.add_argument("--timeout-s", type=float, default=fuzzing.RUN_TIMEOUT_S)
    p.add_argument("--progress", type=int, default=500, help="print a progress line every N runs (0: never)")
    args = p.parse_args(argv)

    os.environ.setdefault("MPLBACKEND", "Agg")
    work = Path(tempfile.mkdtemp(prefix="steelfire-fuzz-"))
    # an internal error writes its traceback to the temporary folder: keep those files in ours
    tempfile.tempdir = str(work)
    fuzzing.warm_up(work / "warm")
    codes = collections.Counter()
    counts = collections.Counter()
    failures = []
    slow = []
    refusals = collections.Counter()   # exit-2 lines by the field they name: what the mutations reach
    t0 = time.perf_counter()
    for i in range(args.mutations):
        seed = args.seed + i
        m, o = fuzzing.run_mutation(fuzzing.RandomChooser(seed), work / "run", args.timeout_s)
        codes[o.code] += 1
        problems = o.problems()
        counts["tracebacks"] += any(x == "traceback" or x.startswith("exception") for x in problems)
        counts["exit codes outside 0/1/2"] += o.code not in (0, 1, 2)
        counts["exit 2 without one stderr line"] += any(x.startswith("exit 2 with") for x in problems)
        counts["runs writing outside --out"] += bool(o.outside)
        counts["inputs replaced"] += bool(o.inputs_changed)
        counts["leaks of the outside file"] += o.leaked()
        counts["time-outs"] += o.code == "timeout"
        counts["steel above the hottest gas (uniform fires, --json runs)"] += any(x.startswith("steel above") for x in problems)
        if o.leaked():
            problems.append("outside file's text printed")
        if problems:
            failures.append((seed, m, o, problems))
        slow.append((o.seconds, seed, str(m)))
        if o.code == 2:
            line = o.stderr.strip().split("\n")[-1].removeprefix("steelfire: error: ")
            refusals[line.split(" = ")[0][:40]] += 1
        if args.progress and (i + 1) % args.progress == 0:
            print(f"  {i + 1} runs, {len(failures)} failing, {time.perf_counter() - t0:.0f} s", flush=True)
    wall = time.perf_counter() - t0
    traceback_files = sorted(work.glob("steelfire-error-*.txt"))

    print(f"runs: {args.mutations} (seeds {args.seed}..{args.seed + args.mutations - 1}), {wall:.0f} s, "
          f"{wall / max(1, args.mutations) * 1000:.0f} ms per run")
    print("exit codes: " + ", ".join(f"{k}: {v}" for k, v in sorted(codes.items(), key=lambda kv: str(kv[0]))))
    for name in ("tracebacks", "exit codes outside 0/1/2", "exit 2 without one stderr line",
                 "runs writing outside --out", "inputs replaced", "leaks of the outside file", "time-outs",
                 "steel above the hottest gas (uniform fires, --json runs)"):
        print(f"{name}: {counts[name]}")
    print(f"traceback files of internal errors: {len(traceback_files)} (in {work})")
    print(f"failing mutations: {len(failures)}")
    for seed, m, o, problems in failures[:args.show]:
        print(f"- seed {seed}: {'; '.join(problems)}")
        print(f"    mutation: {m}")
        tail = (o.stderr.strip().splitlines() or [""])[-1]
        print(f"    exit {o.code}, stderr: {tail[:300]}")
    print("exit-2 refusals by field (top 15): " + ", ".join(f"{k}: {v}" for k, v in refusals.most_common(15)))
    print(f"distinct fields refused: {len(refusals)}")
    slow.sort(reverse=True)
    print("slowest runs: " + ", ".join(f"seed {s} {t:.1f} s" for t, s, _ in slow[:5]))
    for f in traceback_files[:3]:
        print(f"--- {f.name}\n" + f.read_text(encoding="utf-8")[-1500:])
    return 1 if failures else 0


if __name__ == "__main__":
    sys.exit(main())
