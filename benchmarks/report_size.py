"""Output size and time for a long schedule: a 500-member case through analyse and write_outputs.

    python benchmarks/report_size.py            # 500 members
    python benchmarks/report_size.py --members 2000

Builds the case in memory (steelfire.case.case_from_dict, the archive-room compartment of
cases/archive_room.toml with an invented schedule whose section factor and thickness vary), runs
``analyse(case, histories=True)`` and ``write_outputs`` into a temporary directory, and prints the
wall times (analysis, figures, HTML, writing) and the size of each file. Figures, not pass/fail.
"""

from __future__ import annotations

import argparse
import sys
import tempfile
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(ROOT))

import steelfire  # noqa: E402
from steelfire.inputs.case import case_from_dict  # noqa: E402
from steelfire.outputs.files import write_outputs  # noqa: E402


def schedule_case(n: int) -> dict:
    """A case dict like cases/archive_room.toml with ``n`` members (invented values, not a project)."""
    kinds = ("beam", "beam", "column", "tension")
    members = []
    for i in range(n):
        kind = kinds[i % len(kinds)]
        m = {"name": f"M{i + 1:04d}-{kind[:1].upper()}", "kind": kind,
             "section_factor_per_m": 70.0 + (i * 37) % 230,       # 70 .. 299 1/m
             "protection": "spray-b" if i % 3 else "board-a",
             "thickness_mm": 15.0 + (i * 11) % 45,                # 15 .. 59 mm
             "required_minutes": (60, 90, 120)[i % 3]}
        if kind == "beam":
            m["laterally_restrained"] = True
        if kind == "column":
            m["critical_temperature_C"] = 500.0 + (i % 5) * 20.0
        else:
            m["utilisation"] = 0.3 + (i % 7) * 0.05
        members.append(m)
    return {
        "title": f"Long schedule benchmark, {n} members (invented)",
        "compartment": {"floor_area_m2": 120.0, "height_m": 3.0, "boundary_area_m2": 372.0,
                        "thermal_inertia": 1500.0,
                        "opening": [{"width_m": 1.2, "height_m": 2.1, "count": 2},
                                    {"width_m": 1.5, "height_m": 1.2, "count": 4}]},
        "fire_load": {"characteristic_MJ_m2": 1824.0, "combustion_factor": 0.8, "area_factor": "auto",
                      "occupancy_factor": 1.0, "measures_factor": 0.5694, "growth": "slow"},
        "fire": {"curve": "parametric", "duration_min": 330.0},
        "analysis": {"time_step_s": 5.0, "standard_horizon_min": 240.0},
        "materials": {"spray-b": {"density": 300.0, "conductivity": 0.12, "specific_heat": 1200.0,
                                  "moisture_percent": 1.0},
                      "board-a": {"density": 800.0, "conductivity": 0.20, "specific_heat": 1700.0}},
        "member": members,
    }


def kib(n_bytes: int) -> str:
    return f"{n_bytes / 1024:,.0f} KiB"


def main(argv=None) -> int:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--members", type=int, default=500)
    args = ap.parse_args(argv)

    # warm the numba kernels on a bundled case so that the analysis time is not compile time
    steelfire.analyse(steelfire.load_case(ROOT / "cases" / "archive_room.toml"), histories=True)

    case = case_from_dict(schedule_case(args.members), base_dir=ROOT / "cases")
    t0 = time.perf_counter()
    result = steelfire.analyse(case, histories=True)
    t_analysis = time.perf_counter() - t0
    with tempfile.TemporaryDirectory(prefix="steelfire-report-") as d:
        out = Path(d) / "out"
        t0 = time.perf_counter()
        w = write_outputs(result, out, None, case=case)
        t_write_all = time.perf_counter() - t0
        sizes = {p.name: p.stat().st_size for p in sorted(out.iterdir())}
    tm = w.timings_s
    print(f"members: {args.members}, design-fire grid: {len(result.fire.time_s)} points")
    print(f"analysis (analyse, histories=True): {t_analysis:8.2f} s")
    print(f"document + CSV text:                {tm['document_s']:8.2f} s")
    print(f"figures (PNG + SVG):                {tm['plots_s']:8.2f} s")
    print(f"HTML report:                        {tm['html_s']:8.2f} s")
    print(f"writing the files:                  {tm['write_s']:8.2f} s")
    print(f"write_outputs in all:               {t_write_all:8.2f} s")
    print("files:")
    for name, size in sizes.items():
        print(f"  {name:28s} {kib(size):>12s}")
    print(f"report.html: {kib(sizes['report.html'])}, results.json: {kib(sizes['results.json'])}")
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
