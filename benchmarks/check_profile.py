"""Where a large `steelfire check` spends its time: start-up, loading, kernels, the rest.

    python benchmarks/check_profile.py                  # 20,000 members
    python benchmarks/check_profile.py --members 5000

Writes an invented schedule case into a temporary folder (the compartment and fire of
``benchmarks/run.py: sizing_case``, a CSV member schedule of ``--members`` rows: bare members and
protected ones with constant and tabulated conductivity and with moisture), then measures

* the whole command, ``python -m steelfire check CASE --json`` in a new process (warm numba
  cache, scipy not importable, as ``pip install .`` installs the package), and the same command
  on a one-member case of the same fire: the fixed start-up (interpreter, imports, numba loading
  its cached kernels);
* inside one process, after a one-member run has paid the start-up: ``steelfire.cli.main`` on the
  large case, split into loading and validation, the heat-transfer kernels (every call of
  ``steelfire.models.heat.run``), the rest of the analysis, and building and encoding the JSON.

Figures are printed, never asserted. ``--child`` is the in-process part, run by the parent.
"""

from __future__ import annotations

import argparse
import contextlib
import csv
import json
import os
import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(ROOT))
sys.path.insert(0, str(ROOT / "benchmarks"))

COLUMNS = ("name", "kind", "section_factor_per_m", "critical_temperature_C", "required_minutes", "protection",
           "thickness_mm")


def _toml_value(v):
    if isinstance(v, bool):
        return "true" if v else "false"
    if isinstance(v, str):
        return json.dumps(v)
    if isinstance(v, (list, tuple)):
        return "[" + ", ".join(_toml_value(x) for x in v) + "]"
    if isinstance(v, dict):
        return "{ " + ", ".join(f"{k} = {_toml_value(x)}" for k, x in v.items()) + " }"
    return repr(float(v)) if isinstance(v, float) else repr(v)


def write_case(folder: Path, n: int) -> Path:
    """A case file and its CSV schedule of ``n`` members in ``folder`` (invented data)."""
    from run import sizing_case

    d = sizing_case(n=n, seed=5, thickness=True, as_dict=True)
    with open(folder / f"schedule_{n}.csv", "w", newline="", encoding="utf-8") as fh:
        w = csv.writer(fh)
        w.writerow(COLUMNS)
        for m in d["member"]:
            w.writerow(["" if m.get(c) is None else m[c] for c in COLUMNS])
    c = d["compartment"]
    lines = [f'title = "Schedule benchmark, {n} members (invented)"', f'members_file = "schedule_{n}.csv"', "",
             "[compartment]"]
    lines += [f"{k} = {_toml_value(v)}" for k, v in c.items() if k not in ("opening", "surface")]
    for o in c["opening"]:
        lines += ["[[compartment.opening]]"] + [f"{k} = {_toml_value(v)}" for k, v in o.items()]
    for table in ("fire_load", "fire", "analysis"):
        lines += [f"[{table}]"] + [f"{k} = {_toml_value(v)}" for k, v in d[table].items()]
    for name, mat in d["materials"].items():
        lines += [f"[materials.{name}]"] + [f"{k} = {_toml_value(v)}" for k, v in mat.items()]
    path = folder / f"case_{n}.toml"
    path.write_text("\n".join(lines) + "\n", encoding="utf-8")
    return path


def child(small: str, large: str) -> dict:
    """In-process split of ``cli.main(["check", large, "--json"])`` after a run of ``small``."""
    t0 = time.perf_counter()
    import steelfire.inputs.case as case_mod
    from steelfire import cli
    from steelfire.chain import analysis
    from steelfire.models import conduction, heat
    from steelfire.outputs import document

    t_import = time.perf_counter() - t0
    spent = {}

    def timed(name, fn):
        def wrapper(*a, **k):
            t = time.perf_counter()
            try:
                return fn(*a, **k)
            finally:
                spent[name] = spent.get(name, 0.0) + time.perf_counter() - t
        return wrapper

    # the CLI reaches these through their modules at call time
    heat.run = timed("kernels", heat.run)
    conduction.run = timed("conduction", conduction.run)  # the second protected-steel model (issue 15)
    case_mod.load_case = timed("load", case_mod.load_case)
    analysis.analyse = timed("analysis", analysis.analyse)
    document.dumps = timed("json_encode", document.dumps)

    def run(path):
        spent.clear()
        with open(os.devnull, "w") as sink, contextlib.redirect_stdout(sink):
            t = time.perf_counter()
            cli.main(["check", path, "--json"])
            total = time.perf_counter() - t
        return dict({"conduction": 0.0}, **spent, total=total)

    first = run(small)
    large_runs = [run(large) for _ in range(3)]
    med = {k: statistics.median(r[k] for r in large_runs) for k in large_runs[0]}
    return {"import": t_import, "first_small": first, "large": med}


#: The commands' environment: warm numba and bytecode caches (an installed package has its .pyc).
_WARM_ENV = {k: v for k, v in os.environ.items() if k != "PYTHONDONTWRITEBYTECODE"}


def whole_command(case: Path, repeats: int) -> float:
    """Median wall time of ``steelfire check CASE --json`` in a new process."""
    cmd = [sys.executable, "-m", "steelfire", "check", str(case), "--json"]
    walls = []
    for _ in range(repeats):
        t = time.perf_counter()
        subprocess.run(cmd, stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL, cwd=ROOT, check=False, env=_WARM_ENV)
        walls.append(time.perf_counter() - t)
    return statistics.median(walls)


def measure(members: int, repeats: int = 3) -> dict:
    """All figures for a schedule of ``members`` rows; returns them (and prints nothing)."""
    with tempfile.TemporaryDirectory(prefix="steelfire-check-profile-") as tmp:
        folder = Path(tmp)
        small, large = write_case(folder, 1), write_case(folder, members)
        whole_command(small, 1)  # numba cache warm, files in the page cache
        wall_small = whole_command(small, repeats)
        wall_large = whole_command(large, repeats)
        out = subprocess.run([sys.executable, str(Path(__file__).resolve()), "--child", str(small), str(large)],
                             capture_output=True, text=True, cwd=ROOT, check=True)
    inner = json.loads(out.stdout)
    big = inner["large"]
    rest_analysis = big["analysis"] - big["kernels"] - big["conduction"]
    document = big["total"] - big["load"] - big["analysis"]  # to_dict and the JSON text
    return {"members": members, "wall_small_s": wall_small, "wall_large_s": wall_large, "run_s": big["total"],
            "kernels_s": big["kernels"], "conduction_s": big["conduction"], "load_s": big["load"], "analysis_rest_s": rest_analysis,
            "document_s": document, "json_encode_s": big["json_encode"],
            "kernel_share": big["kernels"] / big["total"],
            "kernel_share_of_command": big["kernels"] / wall_large}


def report(f: dict) -> None:
    n = f["members"]
    print(f"check of {n:,} members (CSV schedule; parametric fire 240 min at 5 s; warm numba cache):")
    print(f"  whole command {f['wall_large_s']:.2f} s wall; the same case with 1 member {f['wall_small_s']:.2f} s "
          "(start-up: interpreter, imports, numba loading the cached kernels)")
    print(f"  the {n:,}-member run after start-up {f['run_s']:.2f} s: kernels {f['kernels_s']:.2f} s "
          f"({f['kernel_share']:.0%}), the conduction model of the protected members {f['conduction_s']:.2f} s, "
          f"loading and validation {f['load_s']:.2f} s, analysis outside both "
          f"{f['analysis_rest_s']:.2f} s, result document and JSON {f['document_s']:.2f} s "
          f"(of which the JSON text {f['json_encode_s']:.2f} s)")
    print(f"  per member outside the two models {1e6 * (f['run_s'] - f['kernels_s'] - f['conduction_s']) / n:.1f} us,"
          f" in the lumped kernels "
          f"{1e6 * f['kernels_s'] / n:.1f} us; kernels {f['kernel_share_of_command']:.0%} of the whole command")


def main(argv=None):
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--members", type=int, default=20000)
    ap.add_argument("--child", nargs=2, metavar=("SMALL", "LARGE"), help=argparse.SUPPRESS)
    args = ap.parse_args(argv)
    if args.child:
        print(json.dumps(child(*args.child)))
        return 0
    report(measure(args.members))
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
