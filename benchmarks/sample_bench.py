"""Speed of ``steelfire sample``: prints figures measured in one run (no pass/fail).

    python benchmarks/sample_bench.py                 # 10,000 fires x 100 members; dask 100,000 x 100
    python benchmarks/sample_bench.py --quick         # dask comparison on 20,000 fires
    python benchmarks/sample_bench.py --no-dask       # in-process figures only
    python benchmarks/sample_bench.py --full-twin     # the numpy twin over all 10,000 fires (about 2 min)

Figures:

* The engine (:func:`steelfire.chain.sampling.run`, in-process, the kernels' threads) on 10,000 sampled
  Annex A fires x 100 members (20 bare, 50 behind a board of constant conductivity, 30 behind a coating
  with a conductivity table): sampling, fires, the direct check and the three equivalence routes for
  every pair; wall time and peak RSS of the process.
* Beside it, in the same process, a numpy-vectorised twin: the time loop in Python, arrays over fires x
  members, EN 1993-1-2 eq (4.25) and (4.27) written as an engineer would (np.where for c_a, np.exp,
  np.interp for the conductivity table), the equal-steel-temperature time from each member's standard-
  fire history; run over the first 1,000 fires (the same fires) and scaled by 10 (its cost is linear
  in the rows), unless --full-twin. Its peaks are compared with the engine's.
* Two local dask workers against one (single-threaded worker processes; cluster start included and
  shown apart) on 100,000 fires x 100 members (20,000 with --quick).

The case is invented (demonstration values), built in code.
"""

from __future__ import annotations

import argparse
import resource
import sys
import time
from pathlib import Path

import numpy as np

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(ROOT))

from steelfire.chain import sampling as S  # noqa: E402
from steelfire.inputs.case import case_from_dict  # noqa: E402
from steelfire.models import variability as V  # noqa: E402
from steelfire.models.fire import nominal  # noqa: E402

VARIABILITY = {  # the case contract's example
    "fires": 10_000, "seed": 1, "method": "latin-hypercube",
    "fire_load": {"distribution": "gumbel", "mean_MJ_m2": 420.0, "cov": 0.3},
    "opening_fraction": {"distribution": "uniform", "low": 0.5, "high": 1.0},
    "thermal_inertia": {"distribution": "uniform", "low": 700.0, "high": 1500.0},
    "growth": {"medium": 0.7, "fast": 0.3},
    "target_fractile": 0.9,
}


def bench_case(members=100, seed=0):
    """An invented office compartment with ``members`` members: 20 % bare, 50 % board, 30 % coating."""
    rng = np.random.default_rng(seed)
    ms = []
    n_bare, n_board = members // 5, members // 2
    for i in range(members):
        mu = round(float(rng.uniform(0.3, 0.7)), 3)
        if i < n_bare:
            ms.append({"name": f"bare-{i}", "kind": "tension",
                       "section_factor_per_m": round(float(rng.uniform(40, 200)), 1), "utilisation": mu})
        elif i < n_bare + n_board:
            ms.append({"name": f"board-{i}", "kind": "beam", "laterally_restrained": True,
                       "section_factor_per_m": round(float(rng.uniform(60, 300)), 1), "utilisation": mu,
                       "protection": "board", "thickness_mm": float(rng.choice([12.5, 15, 20, 25, 30, 40])),
                       "required_minutes": 60})
        else:
            ms.append({"name": f"coat-{i}", "kind": "beam", "laterally_restrained": True,
                       "section_factor_per_m": round(float(rng.uniform(60, 300)), 1), "utilisation": mu,
                       "protection": "coating", "thickness_mm": float(rng.choice([1.0, 1.5, 2.0, 3.0, 4.0, 5.0])),
                       "required_minutes": 60})
    return case_from_dict({
        "title": "sampling benchmark (invented)",
        "compartment": {"floor_area_m2": 240.0, "height_m": 3.2, "boundary_area_m2": 700.0, "thermal_inertia": 1200.0,
                        "opening": [{"width_m": 2.0, "height_m": 1.5, "count": 6}]},
        "fire_load": {"characteristic_MJ_m2": 511.0, "combustion_factor": 0.8, "occupancy_factor": 1.0,
                      "measures_factor": 1.0, "growth": "medium"},
        "fire": {"curve": "parametric", "duration_min": 180.0},
        "analysis": {"time_step_s": 5.0, "standard_horizon_min": 240.0},
        "materials": {"board": {"density": 800.0, "conductivity": 0.20, "specific_heat": 1700.0},
                      "coating": {"density": 1300.0, "specific_heat": 1200.0,
                                  "conductivity": [[20.0, 0.015], [300.0, 0.02], [500.0, 0.025], [700.0, 0.04]]}},
        "member": ms})


# ---- the numpy twin -----------------------------------------------------------------------------

def c_a(theta):
    """EN 1993-1-2 eq (3.2a)-(3.2d), vectorised with np.where (held at 20 C below)."""
    t = np.maximum(theta, 20.0)
    return np.where(theta < 600.0, 425.0 + 0.773 * t - 1.69e-3 * t ** 2 + 2.22e-6 * t ** 3,
                    np.where(theta < 735.0, 666.0 + 13002.0 / (738.0 - theta),
                             np.where(theta < 900.0, 545.0 + 17820.0 / (theta - 731.0), 650.0)))


def twin_peaks(time_s, gas, fire, bare, amv, d_p, rho_p, c_p, lam_tab, alpha_c, eps, rho_a=7850.0):
    """Peak steel temperatures of rows in fires (columns of gas), a Python time loop over numpy arrays.

    Bare rows by eq (4.25) with h_net of EN 1991-1-2 eq (3.1)-(3.3); protected rows by eq (4.27) with
    lambda_p from each row's material table (np.interp per material), the increment not negative while
    the gas heats. ``lam_tab``: per row a material index into a list of (T, lambda) tables."""
    sigma = 5.67e-8
    b = np.flatnonzero(bare)
    p = np.flatnonzero(~bare)
    fb, fp = fire[b], fire[p]
    kb = amv[b]
    apv, dp, rp, cp = amv[p], d_p[p], rho_p[p], c_p[p]
    mats, tables = lam_tab
    mat_p = mats[p]
    groups = [(np.flatnonzero(mat_p == k), tab) for k, tab in enumerate(tables)]
    tb = np.full(len(b), 20.0)
    tp = np.full(len(p), 20.0)
    pk_b, pk_p = tb.copy(), tp.copy()
    lam = np.empty(len(p))
    for i in range(len(time_s) - 1):
        dt = time_s[i + 1] - time_s[i]
        g0, g1 = gas[i], gas[i + 1]
        g = g0[fb]
        h = alpha_c * (g - tb) + eps * sigma * ((g + 273.0) ** 4 - (tb + 273.0) ** 4)
        tb = tb + kb / (c_a(tb) * rho_a) * h * dt
        np.maximum(pk_b, tb, out=pk_b)
        g = g0[fp]
        dg = g1[fp] - g
        for idx, (tk, vk) in groups:
            lam[idx] = np.interp(tp[idx], tk, vk)
        cr = c_a(tp) * rho_a
        phi = cp * rp * dp * apv / cr
        d = lam * apv * (g - tp) / (dp * cr * (1.0 + phi / 3.0)) * dt - (np.exp(phi / 10.0) - 1.0) * dg
        d = np.where((dg > 0.0) & (d < 0.0), 0.0, d)
        tp = tp + d
        np.maximum(pk_p, tp, out=pk_p)
    out = np.empty(len(fire))
    out[b], out[p] = pk_b, pk_p
    return out


def twin_run(case, spec, fires):
    """The twin over the first ``fires`` fires: samples and gas matrix as the engine draws them (the
    same functions), the thermal loop, the direct check and the equal-temperature times."""
    setup = S.prepare(case, spec, standard=False)
    cols = setup.cols
    fs = S.fire_set(setup, 0, fires)
    gas = fs.fires.gas_temperature(setup.time_s)
    m = len(cols)
    fire = np.repeat(np.arange(fires), m)
    sel = np.tile(np.arange(m), fires)
    bare = cols.bare[sel]
    names = sorted({mm.protection for mm in case.members if mm.protection})
    mats = [case.materials[n] for n in names]
    row_mat = np.array([names.index(mm.protection) if mm.protection else -1 for mm in case.members])[sel]
    tables = [(np.array([t for t, _ in mt.conductivity_table]), np.array([v for _, v in mt.conductivity_table]))
              for mt in mats]
    rho_p = np.array([mats[k].density if k >= 0 else 1.0 for k in row_mat])
    c_p = np.array([mats[k].specific_heat if k >= 0 else 1.0 for k in row_mat])
    d_p = np.where(bare, 1.0, cols.thickness_mm[sel] * 1e-3)
    amv = cols.section_factor_per_m[sel] * np.where(bare, cols.shadow_ratio[sel], 1.0)
    eps = case.code["configuration_factor"] * case.code["emissivity_steel"] * case.code["emissivity_fire"]
    peaks = twin_peaks(setup.time_s, gas, fire, bare, amv, d_p, rho_p, c_p, (row_mat, tables), setup.alpha_c, eps)
    peaks = peaks.reshape(fires, m)
    exceed = np.count_nonzero(peaks > setup.critical_C[None, :], axis=0)
    # standard-fire histories per member (the same loop, every member in the one standard fire), then
    # the first time each peak is reached, linear within the step
    ts = np.arange(0.0, case.analysis.standard_horizon_min * 60.0 + 1e-9, case.analysis.time_step_s)
    gs = nominal.standard_fire(ts)[:, None]
    cb = cols.bare
    prot_mat = np.array([names.index(mm.protection) if mm.protection else -1 for mm in case.members])
    hist_all = twin_history(
        ts, gs, np.zeros(m, dtype=int), cb, cols.section_factor_per_m * np.where(cb, cols.shadow_factor(True), 1.0),
        np.where(cb, 1.0, cols.thickness_mm * 1e-3),
        np.array([case.materials[mm.protection].density if mm.protection else 1.0 for mm in case.members]),
        np.array([case.materials[mm.protection].specific_heat if mm.protection else 1.0 for mm in case.members]),
        (prot_mat, tables), case.code["alpha_c_standard"], eps)
    runmax = np.maximum.accumulate(hist_all, axis=0)
    t_eq = np.full(peaks.shape, np.nan)
    for j in range(m):
        k = np.searchsorted(runmax[:, j], peaks[:, j])
        ok = (k > 0) & (k < len(ts))
        kk = k[ok]
        h0, h1 = hist_all[kk - 1, j], hist_all[kk, j]
        t_eq[ok, j] = (ts[kk - 1] + (ts[kk] - ts[kk - 1]) * (peaks[ok, j] - h0) / (h1 - h0)) / 60.0
    return peaks, exceed, t_eq


def twin_history(time_s, gas, fire, bare, amv, d_p, rho_p, c_p, lam_tab, alpha_c, eps, rho_a=7850.0):
    """As :func:`twin_peaks`, keeping every step (T x rows); small row counts (the standard fire)."""
    sigma = 5.67e-8
    n = len(fire)
    mats, tables = lam_tab
    th = np.full(n, 20.0)
    out = np.empty((len(time_s), n))
    out[0] = th
    lam = np.ones(n)
    for i in range(len(time_s) - 1):
        dt = time_s[i + 1] - time_s[i]
        g = gas[i][fire]
        dg = gas[i + 1][fire] - g
        for k, (tk, vk) in enumerate(tables):
            idx = np.flatnonzero(mats == k)
            lam[idx] = np.interp(th[idx], tk, vk)
        cr = c_a(th) * rho_a
        h = alpha_c * (g - th) + eps * sigma * ((g + 273.0) ** 4 - (th + 273.0) ** 4)
        d_bare = amv / cr * h * dt
        phi = c_p * rho_p * d_p * amv / cr
        d_prot = lam * amv * (g - th) / (d_p * cr * (1.0 + phi / 3.0)) * dt - (np.exp(phi / 10.0) - 1.0) * dg
        d_prot = np.where((dg > 0.0) & (d_prot < 0.0), 0.0, d_prot)
        th = th + np.where(bare, d_bare, d_prot)
        out[i + 1] = th
    return out


def rss_mb():
    return resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024.0


def main(argv=None):
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--quick", action="store_true", help="dask comparison on 20,000 fires")
    ap.add_argument("--no-dask", action="store_true", help="skip the dask comparison")
    ap.add_argument("--full-twin", action="store_true", help="run the numpy twin over all 10,000 fires")
    args = ap.parse_args(argv)

    case = bench_case(100)
    spec = V.parse_variability(VARIABILITY)
    S.run(case, variability=spec, fires=200, progress=False)  # warm: numba cache, scipy imports

    print(f"Engine, in-process: {spec.fires:,} fires x {len(case.members)} members "
          f"(5 s over 180 min; standard fire 240 min)")
    t0 = time.perf_counter()
    res = S.run(case, variability=spec, progress=False)
    wall = time.perf_counter() - t0
    pairs = spec.fires * len(case.members)
    steps = len(np.arange(0, 180 * 60 + 1, 5.0)) - 1
    print(f"  wall {wall:7.2f} s   ({wall / (pairs * steps) * 1e9:.2f} ns per member-step over {pairs:,} pairs x "
          f"{steps} steps)   stages: " + ", ".join(f"{k} {v:.2f}" for k, v in res.timings_s.items()))
    print(f"  peak RSS of the process so far: {rss_mb():.0f} MB")

    n_twin = spec.fires if args.full_twin else 1000
    t0 = time.perf_counter()
    peaks, exceed, t_eq = twin_run(case, spec, n_twin)
    t_twin = time.perf_counter() - t0
    scale = spec.fires / n_twin
    ev = S.evaluate(S.prepare(case, spec), 0, n_twin)
    diff = np.nanmax(np.abs(peaks - ev.peak_C))
    dteq = np.nanmax(np.abs(t_eq - ev.equivalent_min["equal_temperature"]))
    scaled = f", scaled to {spec.fires:,}: {t_twin * scale:7.2f} s" if scale != 1 else ""
    print(f"\nnumpy twin over {n_twin:,} fires: {t_twin:7.2f} s{scaled}")
    print(f"  engine {t_twin * scale / wall:5.1f}x faster (target >= 20x; under 10 s: "
          f"{'yes' if wall < 10 else 'no'}); twin vs engine on those fires: peaks within {diff:.2e} C, "
          f"equal-temperature times within {dteq:.2e} min")

    if args.no_dask:
        return
    n = 20_000 if args.quick else 100_000
    print(f"\nDask: {n:,} fires x {len(case.members)} members, local clusters of single-threaded workers")
    times = {}
    for k in (1, 2):
        t0 = time.perf_counter()
        r = S.run(case, variability=spec, fires=n, workers=k, progress=False)
        times[k] = (time.perf_counter() - t0, r.timings_s["fires_s"])
        print(f"  {k} worker{'s' if k > 1 else ' '}: wall {times[k][0]:7.2f} s (fires pass {times[k][1]:7.2f} s, "
              f"the rest is cluster start and the standard fire)")
        if k == 2:
            same = r.tally.exceedances.tolist() == res_k1.tally.exceedances.tolist() and \
                np.array_equal(r.tally.peak_steel.counts, res_k1.tally.peak_steel.counts)
        else:
            res_k1 = r
    print(f"  2 workers against 1: {times[1][0] / times[2][0]:.2f}x wall, {times[1][1] / times[2][1]:.2f}x the fires "
          f"pass (target 1.6x); identical counts: {same}")


if __name__ == "__main__":
    main()
