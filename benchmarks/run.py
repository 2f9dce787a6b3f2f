"""steelfire benchmarks: figures and ratios measured in one run (printed, never asserted).

    python benchmarks/run.py            # all figures
    python benchmarks/run.py --quick    # fewer repeats

* the batch kernels (EN 1993-1-2 eq (4.25), (4.27)): ns per member-step beside a tight plain-Python
  twin of eq (4.27), on one and two threads; the same rows as one fire and spread over several fires
  (the gas matrix);
* sizing a 1,000-member schedule on both criteria;
* a 1,000-member schedule checked and sized with critical temperatures from resistance (EN 1993-1-2
  4.2.3) against the same schedule with the critical temperatures given;
* where a 20,000-member `steelfire check` spends its time (benchmarks/check_profile.py);
* the wall time of `steelfire check` on the bundled case with the most members, cold and warm cache.

Times are thread CPU time where one thread runs (steadier on a shared machine) and wall time otherwise.
The conduction model and the sampling have their own scripts (conduction_speed.py, sample_bench.py).
"""

from __future__ import annotations

import argparse
import math
import os
import shutil
import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path

import numpy as np

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(ROOT))
sys.path.insert(0, str(ROOT / "benchmarks"))

import numba  # noqa: E402

from steelfire.models import heat  # noqa: E402
from steelfire.models.fire import nominal  # noqa: E402


def tight_twin(time_s, gas_C, ap_v, d_p, rho_p, c_p, lam, rho_a=7850.0):
    """Eq (4.27) with constant lambda_p, plain floats, everything inlined; returns the peak."""
    theta = 20.0
    peak = theta
    cap = c_p * rho_p * d_p * ap_v
    k = lam * ap_v / d_p
    exp = math.exp
    for i in range(len(time_s) - 1):
        dt = time_s[i + 1] - time_s[i]
        g = gas_C[i]
        dg = gas_C[i + 1] - g
        x = theta
        if x < 600.0:
            t = x if x > 20.0 else 20.0
            ca = 425.0 + 0.773 * t - 1.69e-3 * t * t + 2.22e-6 * t * t * t
        elif x < 735.0:
            ca = 666.0 + 13002.0 / (738.0 - x)
        elif x < 900.0:
            ca = 545.0 + 17820.0 / (x - 731.0)
        else:
            ca = 650.0
        cr = ca * rho_a
        phi = cap / cr
        d = k * (g - x) / (cr * (1.0 + phi / 3.0)) * dt - (exp(phi / 10.0) - 1.0) * dg
        if dg > 0.0 and d < 0.0:
            d = 0.0
        theta = x + d
        if theta > peak:
            peak = theta
    return peak


def timed(fn, repeats, clock=time.perf_counter):
    """(best, median) of ``repeats`` calls [s]."""
    times = []
    for _ in range(repeats):
        t0 = clock()
        fn()
        times.append(clock() - t0)
    return min(times), statistics.median(times)


def member_rows(n, rng, fires=1):
    """Rows across the kernels' input space: bare, protected with constant / tabulated lambda, moisture."""
    kind = rng.integers(0, 4, n)
    d = rng.uniform(0.008, 0.05, n)
    lam_v = np.where((kind == 2)[:, None], np.tile([0.1, 0.12, 0.16, 0.22], (n, 1)), 0.2)
    return heat.Rows(
        fire=(np.arange(n) % fires).astype(np.int64), bare=kind == 0,
        section_factor_per_m=rng.uniform(50.0, 300.0, n), alpha_c=np.full(n, 25.0), thickness_m=d,
        density=np.where(kind == 2, 1300.0, 800.0), specific_heat=np.where(kind == 2, 1200.0, 1700.0),
        conductivity_C=np.tile([20.0, 300.0, 500.0, 700.0], (n, 1)), conductivity=lam_v,
        conductivity_n=np.where(kind == 2, 4, 1).astype(np.int64),
        moisture_delay_s=np.where(kind == 3, 60.0 * 5.0 * 800.0 * d ** 2 / (5 * 0.2), 0.0),
        threshold_C=np.full(n, 550.0))


def kernel_figures(repeats):
    """ns per member-step: the twin, the kernels on 1 and 2 threads, one fire and eight fires."""
    t = np.arange(0.0, 240 * 60.0 + 1, 5.0)
    g = nominal.standard_fire(t)
    steps = len(t) - 1
    rng = np.random.default_rng(7)
    n = 4000
    one = member_rows(n, rng)
    eight = one._replace(fire=(np.arange(n) % 8).astype(np.int64))
    g8 = np.column_stack([g * (0.9 + 0.025 * k) for k in range(8)])
    prot = one.take(~one.bare)
    run = dict(emissivity_resultant=0.7, steel_density_kg_m3=7850.0)
    tl, gl = list(map(float, t)), list(map(float, g))
    ref = tight_twin(tl, gl, 150.0, 0.02, 800.0, 1700.0, 0.2)
    twin_b, twin_m = timed(lambda: tight_twin(tl, gl, 150.0, 0.02, 800.0, 1700.0, 0.2), repeats)
    single = heat.uniform_rows(1, bare=False, section_factor_per_m=150.0, thickness_m=0.02, density=800.0,
                               specific_heat=1700.0, conductivity=0.2)
    got = heat.run(heat.Fires(t, g[:, None]), single, **run).peak_C[0]
    assert abs(got - ref) <= 1e-9 * ref, "kernel and twin disagree"
    print(f"kernels (standard fire 240 min at 5 s, {n} members):")
    print(f"  plain-Python twin of eq (4.27)     {twin_m / steps * 1e9:8.1f} ns/member-step")
    out = {}
    for th in sorted({1, min(2, numba.config.NUMBA_NUM_THREADS)}):
        numba.set_num_threads(th)
        clock = time.thread_time if th == 1 else time.perf_counter
        for label, rows, gas in (("all kinds, one fire", one, g[:, None]), ("protected, one fire", prot, g[:, None]),
                                 ("all kinds, 8 fires", eight, g8)):
            heat.run(heat.Fires(t, gas), rows, **run)
            b, m = timed(lambda: heat.run(heat.Fires(t, gas), rows, **run), repeats, clock)
            per = m / (steps * len(rows.fire)) * 1e9
            out[(th, label)] = per
            print(f"  batch, {th} thread{'s' if th > 1 else ' '}, {label:22s} {per:6.2f} ns/member-step "
                  f"(best {b / (steps * len(rows.fire)) * 1e9:.2f}); twin / batch {twin_m / steps * 1e9 / per:5.0f}x")
    numba.set_num_threads(numba.config.NUMBA_NUM_THREADS)
    return out


def sizing_case(n=1000, seed=3, thickness=False, as_dict=False, resistance=False):
    """``n`` invented members on the parametric fire of cases/archive_room.toml, run for 240 min at 5 s:
    bare, protected with constant and tabulated conductivity, with moisture; with ``resistance`` the
    protected ones are columns and beams checked by their resistance (catalogue sections)."""
    if sys.version_info >= (3, 11):
        import tomllib
    else:  # pragma: no cover
        import tomli as tomllib
    from steelfire.inputs.case import case_from_dict

    base = tomllib.loads((ROOT / "cases" / "archive_room.toml").read_text())
    base["fire"]["duration_min"] = 240.0
    # 240 min cuts the fire's cooling short (it burns out at 298 min) and some members still heat at the end, which
    # a check refuses; the figures keep the 240 min grid of the releases they are compared with
    base["analysis"] = {"time_step_s": 5.0, "standard_horizon_min": 240.0, "allow_out_of_scope": True}
    supply = {"min_thickness_mm": 5.0, "max_thickness_mm": 100.0, "thickness_step_mm": 0.5}
    base["materials"] = {
        "board": {"density": 800.0, "conductivity": 0.2, "specific_heat": 1700.0, **supply},
        "wet": {"density": 600.0, "conductivity": 0.15, "specific_heat": 1200.0, "moisture_percent": 3.0,
                "moisture_delay_basis": "tests", **supply},
        "table": {"density": 1300.0, "conductivity": [[20.0, 0.10], [300.0, 0.12], [500.0, 0.16], [700.0, 0.22]],
                  "specific_heat": 1200.0, **supply},
    }
    rng = np.random.default_rng(seed)
    sections = ["HEB 200", "HEB 260", "HEB 300", "HEA 300", "IPE 400", "IPE 500"]
    members = []
    for i in range(n):
        kind = i % 4
        m = {"name": f"M{i:04d}", "kind": "tension", "section_factor_per_m": float(rng.uniform(50.0, 300.0)),
             "critical_temperature_C": float(rng.uniform(500.0, 700.0)),
             "required_minutes": float(rng.choice([30.0, 60.0, 90.0, 120.0]))}
        if kind:
            m["protection"] = ("board", "table", "wet")[kind - 1]
            if thickness:
                m["thickness_mm"] = float(rng.uniform(10.0, 40.0))
            if resistance:
                sec = sections[i % len(sections)]
                del m["section_factor_per_m"], m["critical_temperature_C"]
                m.update(section=sec, encasement="box", steel_grade="S355")
                if sec.startswith("IPE"):
                    m.update(kind="beam", laterally_restrained=True, moment_y_kNm=float(rng.uniform(60.0, 200.0)))
                else:
                    m.update(kind="column", axial_force_kN=float(rng.uniform(300.0, 1500.0)),
                             buckling_length_m=float(rng.uniform(3.0, 4.5)))
        else:
            m["required_minutes"] = 15.0
        members.append(m)
    base["member"] = members
    return base if as_dict else case_from_dict(base, base_dir=ROOT / "cases")


def sizing_figures(repeats):
    from steelfire.chain.sizing import size, size_members

    case = sizing_case()
    size_members(case)
    b, med = timed(lambda: size_members(case), max(2, repeats // 2))
    calls = size_members(case)[1]
    b2, med2 = timed(lambda: size(case, histories=False), max(2, repeats // 2))
    print(f"sizing 1,000 members (both criteria, archive_room fire 240 min at 5 s): {med:.2f} s median "
          f"(best {b:.2f}, {calls} kernel calls); with the checks at the chosen and the specified thicknesses "
          f"{med2:.2f} s median")
    return med, med2


def resistance_figures(repeats):
    """check and size of 1,000 members with critical temperatures from resistance, against the same
    members with critical temperatures given (the cost of EN 1993-1-2 4.2.3 over the schedule)."""
    from steelfire.chain.analysis import analyse
    from steelfire.chain.sizing import size

    given = sizing_case(thickness=True)
    by_res = sizing_case(thickness=True, resistance=True)
    out = {}
    for label, fn in (("check", lambda c: analyse(c, histories=False)), ("size", lambda c: size(c, histories=False))):
        fn(given), fn(by_res)
        a, b = [], []
        for _ in range(max(2, repeats // 2)):
            t0 = time.perf_counter(); fn(given); a.append(time.perf_counter() - t0)
            t0 = time.perf_counter(); fn(by_res); b.append(time.perf_counter() - t0)
        out[label] = statistics.median(b) / statistics.median(a)
        print(f"{label} of 1,000 members: critical temperatures given {statistics.median(a):.2f} s, from resistance "
              f"{statistics.median(b):.2f} s (ratio {out[label]:.2f})")
    return out


def overhead_figures(members=20000):
    import check_profile

    f = check_profile.measure(members)
    check_profile.report(f)
    return f


def largest_case():
    from steelfire import load_case

    cases = sorted((ROOT / "cases").glob("*.toml"))
    return max(cases, key=lambda p: len(load_case(p).members))


def check_wall_times(repeats):
    """Wall time of ``steelfire check`` on the largest bundled case in a new process, cold and warm cache."""
    largest = largest_case()
    cmd = [sys.executable, "-m", "steelfire", "check", str(largest), "--json"]
    env = {k: v for k, v in os.environ.items() if k != "PYTHONDONTWRITEBYTECODE"}
    cold = []
    for _ in range(max(1, repeats // 3)):
        cache = tempfile.mkdtemp(prefix="steelfire-numba-cache-")
        t0 = time.perf_counter()
        subprocess.run(cmd, env=dict(env, NUMBA_CACHE_DIR=cache), capture_output=True, cwd=ROOT)
        cold.append(time.perf_counter() - t0)
        shutil.rmtree(cache, ignore_errors=True)
    subprocess.run(cmd, env=env, capture_output=True, cwd=ROOT)
    warm = []
    for _ in range(repeats):
        t0 = time.perf_counter()
        subprocess.run(cmd, env=env, capture_output=True, cwd=ROOT)
        warm.append(time.perf_counter() - t0)
    print(f"steelfire check {largest.name}: warm cache median {statistics.median(warm):.2f} s "
          f"(best {min(warm):.2f}); cold cache (kernels compiled) median {statistics.median(cold):.2f} s")
    return statistics.median(warm), statistics.median(cold)


def main(argv=None):
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--quick", action="store_true")
    args = ap.parse_args(argv)
    repeats = 3 if args.quick else 7
    print(f"machine: {os.cpu_count()} logical CPUs; numba {numba.__version__}, threads {numba.config.NUMBA_NUM_THREADS}")
    kernel_figures(repeats)
    sizing_figures(repeats)
    resistance_figures(repeats)
    overhead_figures()
    check_wall_times(repeats)


if __name__ == "__main__":
    main()
