"""Speed of the conduction kernel (steelfire.models.conduction) beside eq (4.27) (steelfire.models.heat.run).

    python benchmarks/conduction_speed.py            # kernel figures (about a minute)
    python benchmarks/conduction_speed.py --check    # and a 20,000-member check with both models (a few minutes)

Kernel figures: ns per member-step under the standard fire (240 min at 5 s) for the protected members
of ``benchmarks/run.py: members`` (a third each: constant conductivity, tabulated conductivity,
constant with 5 % moisture), eq (4.27) and the conduction kernel on the same members: at 8 cells and
1 substep (the resolution these members converge at), at 16 cells, and the whole refinement of
``run_converged`` (three runs and more, per member-step of the analysis grid); one and two threads,
calls interleaved, medians. Then the resolution ``run_converged`` chose.

``--check``: ``steelfire check --json`` of a 20,000-member schedule whose members are all protected
(the case of ``benchmarks/check_profile.py`` with its bare members given the board), in this process after
a one-member run has paid the start-up: as the chain runs it now (eq (4.27), the conduction model beside it
in the cooling fire, the half-step convergence runs) against eq (4.27) alone (the chain's conduction and
convergence steps switched off), alternately, medians; and the ratio with the start-up of a one-member
command added.

Figures are printed, never asserted.
"""

from __future__ import annotations

import argparse
import contextlib
import os
import statistics
import sys
import tempfile
import time
from pathlib import Path

import numpy as np

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(ROOT))
sys.path.insert(0, str(ROOT / "benchmarks"))

import numba  # noqa: E402

from steelfire.models import conduction, heat  # noqa: E402
from steelfire.models.fire import nominal  # noqa: E402


def protected_members(n, seed=7):
    """The protected rows of ``run.member_rows`` as conduction inputs and eq (4.27) rows, standard fire."""
    import run

    t = np.arange(0.0, 240 * 60.0 + 1.0, 5.0)
    g = nominal.standard_fire(t)
    rows = run.member_rows(n, np.random.default_rng(seed))
    p = ~rows.bare
    r = rows.take(p)
    m = int(p.sum())
    # moisture back from the ECCS delay the rows carry (5 % on their wet members)
    moist = np.where(r.moisture_delay_s > 0.0,
                     r.moisture_delay_s * 5.0 * r.conductivity[:, 0] / (60.0 * r.density * r.thickness_m ** 2), 0.0)
    cin = conduction.ConductionInputs(t, g.reshape(-1, 1), np.zeros(m, dtype=np.int64), r.section_factor_per_m,
                                      r.thickness_m, r.density, r.specific_heat, r.conductivity_C, r.conductivity,
                                      r.conductivity_n, moist, np.full(m, 550.0))
    lin = (heat.Fires(t, g[:, None]), r)
    kind = np.where(r.conductivity_n > 1, "table", np.where(moist > 0.0, "moisture", "constant"))
    return cin, lin, kind


def lumped(lin):
    return heat.run(*lin, emissivity_resultant=0.7, steel_density_kg_m3=7850.0)


def timed(fn):
    t0 = time.perf_counter()
    fn()
    return time.perf_counter() - t0


def kernel_figures(rounds):
    cin, lin, kind = protected_members(4000)
    m = cin.fire_index.shape[0]
    steps = cin.time_s.shape[0] - 1
    per = 1e9 / (m * steps)
    conv = conduction.run_converged(cin)
    jobs = {
        "eq (4.27), heat.run": lambda: lumped(lin),
        "conduction, 8 cells": lambda: conduction.run(cin, 8, 1),
        "conduction, 16 cells": lambda: conduction.run(cin, 16, 1),
        "conduction, run_converged": lambda: conduction.run_converged(cin),
    }
    for fn in jobs.values():
        fn()
    threads = sorted({1, min(2, numba.config.NUMBA_NUM_THREADS)})
    figs = {(name, th): [] for name in jobs for th in threads}
    old = numba.get_num_threads()
    try:
        for _ in range(rounds):
            for th in threads:
                numba.set_num_threads(th)
                for name, fn in jobs.items():
                    figs[name, th].append(timed(fn) * per)
        # by kind, one thread
        numba.set_num_threads(1)
        kinds = {}
        for k in ("constant", "table", "moisture"):
            idx = np.nonzero(kind == k)[0]
            sub = conduction._subset(cin, idx)
            lsub = (lin[0], lin[1].take(idx))
            per_k = 1e9 / (idx.size * steps)
            lumped(lsub)
            conduction.run(sub, 8, 1)
            kinds[k] = (statistics.median(timed(lambda: lumped(lsub)) * per_k for _ in range(rounds)),
                        statistics.median(timed(lambda: conduction.run(sub, 8, 1)) * per_k for _ in range(rounds)))
    finally:
        numba.set_num_threads(old)
    med = {k: statistics.median(v) for k, v in figs.items()}
    print(f"kernels: {m} protected members (constant, tabulated conductivity, 5 % moisture), standard fire "
          f"240 min at 5 s ({steps} steps); ns per member-step, medians of {rounds} interleaved rounds")
    base = {th: med["eq (4.27), heat.run", th] for th in threads}
    for name in jobs:
        cells = "   ".join(f"{th} thread{'s' if th > 1 else ' '} {med[name, th]:6.1f} "
                           f"({med[name, th] / base[th]:4.1f}x)" for th in threads)
        print(f"  {name:28s} {cells}")
    if len(threads) == 2:
        lumped2 = med["eq (4.27), heat.run", 1] / med["eq (4.27), heat.run", 2]
        print(f"  two threads / one: eq (4.27) {lumped2:.2f}x,"
              f" conduction 8 cells {med['conduction, 8 cells', 1] / med['conduction, 8 cells', 2]:.2f}x")
    print("  by kind, one thread (eq (4.27) / conduction 8 cells, ns per member-step):")
    for k, (a, b) in kinds.items():
        print(f"    {k:9s} {a:6.1f} / {b:6.1f}  ({b / a:4.1f}x)")
    res = sorted({(int(a), int(b)) for a, b in zip(conv.cells, conv.substeps)})
    counts = {r: int(np.sum((conv.cells == r[0]) & (conv.substeps == r[1]))) for r in res}
    print("  run_converged (peak and 550 C crossing to 0.5 C): " + ", ".join(
        f"{c} at {a} cells x {b} substep{'s' if b > 1 else ''}" for (a, b), c in counts.items())
        + f"; all converged: {bool(conv.converged.all())}")


def check_figures(members, rounds):
    import check_profile
    import run

    from steelfire import cli
    from steelfire.chain import analysis, protected, steps

    def all_protected(n=1000, seed=3, thickness=False, as_dict=False, resistance=False):
        d = original(n=n, seed=seed, thickness=thickness, as_dict=True)
        rng = np.random.default_rng(seed + 1)
        for m in d["member"]:
            if "protection" not in m:
                m["protection"] = "board"
                m["thickness_mm"] = float(rng.uniform(10.0, 40.0))
                m["required_minutes"] = 60.0
        return d

    original = run.sizing_case
    run.sizing_case = all_protected
    both_models, convergence = protected.run_both, steps.sensitivity

    def lumped_only(case, fire, exposures, cols, crit, design, peak, *rest):
        n = len(case.members)
        nan = np.full(n, np.nan)
        return protected.TwoModels(nan, nan.copy(), [None] * n, ["lumped"] * n, nan.copy(), np.zeros(n, bool)), []

    def no_convergence(case, fire, exposures, cols, crit, lumped_peak, peak, cross, two, judged_at, required_s):
        n = len(case.members)
        return steps.Sensitivity(np.full(n, np.nan), np.full(n, np.nan), [False] * n)

    def one(path, full):
        protected.run_both = both_models if full else lumped_only
        steps.sensitivity = convergence if full else no_convergence
        try:
            with open(os.devnull, "w") as sink, contextlib.redirect_stdout(sink):
                return timed(lambda: cli.main(["check", str(path), "--json"]))
        finally:
            protected.run_both, steps.sensitivity = both_models, convergence

    try:
        with tempfile.TemporaryDirectory(prefix="steelfire-conduction-check-") as tmp:
            small = check_profile.write_case(Path(tmp), 1)
            large = check_profile.write_case(Path(tmp), members)
            wall_small = check_profile.whole_command(small, 3)
            one(small, True)
            today, full = [], []
            for _ in range(rounds):
                today.append(one(large, False))
                full.append(one(large, True))
    finally:
        run.sizing_case = original
    a, b = statistics.median(today), statistics.median(full)
    print(f"check of {members:,} protected members (CSV schedule, parametric fire and standard fire 240 min at 5 s), "
          f"in one process after start-up; medians of {rounds} alternate runs, {numba.get_num_threads()} threads:")
    print(f"  eq (4.27) alone                                   {a:6.2f} s")
    print(f"  with the conduction model and half-step convergence {b:6.2f} s  ({b / a:.2f}x)")
    print(f"  with the start-up of a one-member command ({wall_small:.2f} s) added: "
          f"{(wall_small + b) / (wall_small + a):.2f}x")


def main(argv=None):
    ap = argparse.ArgumentParser(description=__doc__.split("\n")[0])
    ap.add_argument("--rounds", type=int, default=5)
    ap.add_argument("--check", action="store_true", help="also the 20,000-member check with both models")
    ap.add_argument("--members", type=int, default=20000)
    a = ap.parse_args(argv)
    kernel_figures(a.rounds)
    if a.check:
        check_figures(a.members, max(3, a.rounds // 2))


if __name__ == "__main__":
    main()
