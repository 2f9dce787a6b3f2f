"""Time ``resistance.critical_temperatures`` for a schedule of mixed members (no pass/fail).

    python benchmarks/resistance_speed.py            # 1,000 members, 20 repeats
    python benchmarks/resistance_speed.py --members 10000 --repeats 5

The schedule is invented (demo data): beams with and without lateral restraint, columns, beam-columns,
tension members and braces over the catalogue sections and four grades, loads drawn so that the
utilisation at 20 C spreads widely (some members fail at 20 C). Prints the median wall time of building the columns
from mappings (``MemberDesign.from_members``) and of the critical-temperature search, in ms.
"""

from __future__ import annotations

import argparse
import statistics
import sys
import time
from pathlib import Path

import numpy as np

sys.path.insert(0, str(Path(__file__).resolve().parents[1]))

from steelfire.models import resistance as res  # noqa: E402
from steelfire.models import sections as sec  # noqa: E402


def schedule(n: int, seed: int = 1) -> list:
    """``n`` invented members of mixed kinds (a demonstration schedule, not a project)."""
    rng = np.random.default_rng(seed)
    names = sec.catalogue_names()
    grades = ("S235", "S275", "S355", "S460")
    out = []
    for i in range(n):
        s = sec.catalogue_section(names[rng.integers(len(names))])
        p = sec.section_properties(s)
        fy = 300.0
        npl = p.area_mm2 * fy / 1e3          # kN, rough
        mpl = p.W_pl_y_mm3 * fy / 1e6        # kNm, rough
        kind = ("beam", "beam", "column", "column", "tension", "brace")[i % 6]
        m = {"kind": kind, "steel_grade": grades[rng.integers(4)], "section": s}
        u = rng.uniform(0.1, 0.7)
        if kind == "beam":
            m["moment_y_kNm"] = u * mpl
            if i % 12 == 0:
                m["laterally_restrained"] = True
            else:
                m["lateral_restraint_length_m"] = rng.uniform(1.0, 8.0)
                m["moment_factor_C1"] = rng.choice([1.0, 1.13, 1.35])
        elif kind == "column":
            m["axial_force_kN"] = u * 0.4 * npl
            m["buckling_length_m"] = rng.uniform(2.5, 6.0)
            if i % 4 == 2:
                m["moment_y_kNm"] = 0.2 * u * mpl
                m["lateral_restraint_length_m"] = m["buckling_length_m"]
        elif kind == "tension":
            m["axial_force_kN"] = -u * npl
        else:
            m["axial_force_kN"] = u * 0.2 * npl
            m["buckling_length_y_m"] = rng.uniform(3.0, 8.0)
            m["buckling_length_z_m"] = rng.uniform(3.0, 8.0)
        out.append(m)
    return out


def main(argv=None) -> None:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--members", type=int, default=1000)
    ap.add_argument("--repeats", type=int, default=20)
    a = ap.parse_args(argv)
    members = schedule(a.members)
    t_build, t_search = [], []
    for _ in range(a.repeats):
        t0 = time.perf_counter()
        design = res.MemberDesign.from_members(members)
        t1 = time.perf_counter()
        result = res.critical_temperatures(design, allow_out_of_scope=True)
        t2 = time.perf_counter()
        t_build.append(t1 - t0)
        t_search.append(t2 - t1)
    methods = {m: int(np.sum(result.method == m)) for m in res.METHODS}
    print(f"{a.members} members, {a.repeats} repeats (median):")
    print(f"  MemberDesign.from_members   {1e3 * statistics.median(t_build):8.2f} ms")
    print(f"  critical_temperatures       {1e3 * statistics.median(t_search):8.2f} ms"
          f"  ({result.iterations} bisection steps after the 10 C scan)")
    print(f"  methods: {methods}; failing at 20 C: {int(result.fails_at_20C.sum())}")


if __name__ == "__main__":
    main()
