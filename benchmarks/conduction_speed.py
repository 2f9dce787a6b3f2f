"""Speed of the conduction kernel (steelfire.models.conduction) beside eq (4.27) (steelfire.models.heat.batch).

    python benchmarks/conduction_speed.py            # kernel figures (about a minute)
    python benchmarks/conduction_speed.py --check    # and a 20,000-member check with both models (a few minutes)

Kernel figures: ns per member-step under the standard fire (240 min at 5 s) for the protected members
of ``benchmarks/run.py: members`` (a third each: constant conductivity, tabulated conductivity,
constant with 5 % moisture), eq (4.27) and the conduction kernel on the same members: at 8 cells and
1 substep (the resolution these members converge at), at 16 cells, and the whole refinement of
``run_converged`` (three runs and more, per member-step of the analysis grid); one and two threads,
calls interleaved, medians. Then the resolution ``run_converged`` chose.

``--check``: ``steelfire check --json`` of a 20,000-member schedule whose members are all protected
(the case of ``benchmarks/check_profile.py`` with its bare members given the board), run in this
process after a one-member run has paid the start-up: once as today (eq (4.27) alone) and once with
every call of ``heat.batch`` followed by the conduction kernel on the same protected members and fire
(what running both models costs the check; the chain's own bookkeeping for the second model not
included), alternately, medians; and the ratio with the measured start-up of a one-member command added.

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
    """The protected members of ``run.members`` as conduction inputs and eq (4.27) inputs, standard fire."""
    import run

    t = np.arange(0.0, 240 * 60.0 + 1.0, 5.0)
    g = nominal.standard_fire(t)
    bare, amv, d, rho, c, lam_T, lam_v, lam_n, delay = run.members(n, np.random.default_rng(seed), t)
    p = ~bare
    m = int(p.sum())
    # moisture back from the ECCS delay run.members gives (5 % on its wet members)
    moist = np.where(delay[p] > 0.0, delay[p] * 5.0 * lam_v[p, 0] / (60.0 * rho[p] * d[p] ** 2), 0.0)
    cin = conduction.ConductionInputs(t, g.reshape(-1, 1), np.zeros(m, dtype=np.int64), amv[p], d[p], rho[p], c[p],
                                      lam_T[p], lam_v[p], lam_n[p], moist, np.full(m, 550.0))
    lin = (t, g, bare[p], amv[p], 25.0, 0.7, 7850.0, d[p], rho[p], c[p], lam_T[p], lam_v[p], lam_n[p], delay[p],
           np.full(m, 550.0), np.zeros(0, dtype=np.int64), False)
    kind = np.where(lam_n[p] > 1, "table", np.where(moist > 0.0, "moisture", "constant"))
    return cin, lin, kind


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
        "eq (4.27), heat.batch": lambda: heat.batch(*lin),
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
            lsub = tuple(a[idx] if isinstance(a, np.ndarray) and a.shape[:1] == (m,) else a for a in lin)
            per_k = 1e9 / (idx.size * steps)
            heat.batch(*lsub)
            conduction.run(sub, 8, 1)
            kinds[k] = (statistics.median(timed(lambda: heat.batch(*lsub)) * per_k for _ in range(rounds)),
                        statistics.median(timed(lambda: conduction.run(sub, 8, 1)) * per_k for _ in range(rounds)))
    finally:
        numba.set_num_threads(old)
    med = {k: statistics.median(v) for k, v in figs.items()}
    print(f"kernels: {m} protected members (constant, tabulated conductivity, 5 % moisture), standard fire "
          f"240 min at 5 s ({steps} steps); ns per member-step, medians of {rounds} interleaved rounds")
    base = {th: med["eq (4.27), heat.batch", th] for th in threads}
    for name in jobs:
        cells = "   ".join(f"{th} thread{'s' if th > 1 else ' '} {med[name, th]:6.1f} "
                           f"({med[name, th] / base[th]:4.1f}x)" for th in threads)
        print(f"  {name:28s} {cells}")
    if len(threads) == 2:
        lumped2 = med["eq (4.27), heat.batch", 1] / med["eq (4.27), heat.batch", 2]
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

    def all_protected(n=1000, seed=3, thickness=False, as_dict=False):
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
    lumped = heat.batch
    spent = {"conduction": 0.0}

    def both(time_s, gas_C, bare, ksh_amv, alpha_c, eps_res, rho_a, d_p, rho_p, c_p, lam_T, lam_v, lam_n, delay_s,
             threshold_C, query_idx, keep_history):
        out = lumped(time_s, gas_C, bare, ksh_amv, alpha_c, eps_res, rho_a, d_p, rho_p, c_p, lam_T, lam_v, lam_n,
                     delay_s, threshold_C, query_idx, keep_history)
        t0 = time.perf_counter()
        p = ~np.asarray(bare, dtype=bool)
        if p.any():
            lam_n = np.asarray(lam_n)
            moist = np.where(delay_s[p] > 0.0, delay_s[p] * 5.0 * lam_v[p, 0] / (60.0 * rho_p[p] * d_p[p] ** 2), 0.0)
            m = int(p.sum())
            gas = np.asarray(gas_C, dtype=float).reshape(-1, 1)
            cin = conduction.ConductionInputs(np.asarray(time_s, dtype=float), gas, np.zeros(m, dtype=np.int64),
                                              ksh_amv[p], d_p[p], rho_p[p], c_p[p], lam_T[p], lam_v[p], lam_n[p],
                                              moist, np.asarray(threshold_C)[p], rho_a)
            conduction.run(cin, 8, 1)
        spent["conduction"] += time.perf_counter() - t0
        return out

    def one(path, with_conduction):
        heat.batch = both if with_conduction else lumped
        try:
            with open(os.devnull, "w") as sink, contextlib.redirect_stdout(sink):
                return timed(lambda: cli.main(["check", str(path), "--json"]))
        finally:
            heat.batch = lumped

    try:
        with tempfile.TemporaryDirectory(prefix="steelfire-conduction-check-") as tmp:
            small = check_profile.write_case(Path(tmp), 1)
            large = check_profile.write_case(Path(tmp), members)
            wall_small = check_profile.whole_command(small, 3)
            one(small, True)
            today, with_both, cond = [], [], []
            for _ in range(rounds):
                today.append(one(large, False))
                spent["conduction"] = 0.0
                with_both.append(one(large, True))
                cond.append(spent["conduction"])
    finally:
        run.sizing_case = original
    a, b, c = statistics.median(today), statistics.median(with_both), statistics.median(cond)
    print(f"check of {members:,} protected members (CSV schedule, parametric fire and standard fire 240 min at 5 s), "
          f"in one process after start-up; medians of {rounds} alternate runs, {numba.get_num_threads()} threads:")
    print(f"  today (eq (4.27) alone)        {a:6.2f} s")
    print(f"  with the conduction kernel too {b:6.2f} s  ({b / a:.2f}x; of which the conduction kernel {c:.2f} s)")
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
