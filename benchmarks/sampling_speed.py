"""Speed of the sampling layer: prints figures measured in one run (no pass/fail).

    python benchmarks/sampling_speed.py            # best of 3
    python benchmarks/sampling_speed.py --quick    # one repeat

Figures: time to draw 100,000 fires' samples of the case contract's [variability] example (Latin
hypercube and random); time to build 10,000 Annex A fires (parametric_fires) and their (T, F) gas
matrix on a 5 s grid over 180 min (T = 2161), with the plain loop of parametric_fire(...)
.gas_temperature over the same fires as the reference; time to tally 10,000 fires x 100 members
into per-member histograms.
"""

from __future__ import annotations

import argparse
import sys
import time
from pathlib import Path

import numpy as np

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(ROOT))

from steelfire.models import variability as V  # noqa: E402
from steelfire.models.fire import parametric as P  # noqa: E402

CONTRACT = {  # the [variability] example of the case contract
    "fires": 100_000, "seed": 1, "method": "latin-hypercube",
    "fire_load": {"distribution": "gumbel", "mean_MJ_m2": 420.0, "cov": 0.3},
    "opening_fraction": {"distribution": "uniform", "low": 0.5, "high": 1.0},
    "thermal_inertia": {"distribution": "uniform", "low": 700.0, "high": 1500.0},
    "growth": {"medium": 0.7, "fast": 0.3},
}
# invented compartment (demo values): O with every opening open, A_f, A_t, combustion factor
COMPARTMENT = dict(opening_factor_m05=0.05, thermal_inertia=1200.0, design_fire_load_MJ_m2=400.0,
                   fire_load_factor=0.8, floor_area_m2=240.0, boundary_area_m2=700.0, growth="medium")


def best(fn, repeats):
    times = []
    out = None
    for _ in range(repeats):
        t0 = time.perf_counter()
        out = fn()
        times.append(time.perf_counter() - t0)
    return min(times), out


def main(argv=None):
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--quick", action="store_true", help="one repeat instead of three")
    args = ap.parse_args(argv)
    repeats = 1 if args.quick else 3

    print("Sampling (100,000 fires, 4 columns: Gumbel fire load, uniform opening fraction and b, growth)")
    for method in V.METHODS:
        spec = V.parse_variability(dict(CONTRACT, method=method))
        t, drawn = best(lambda: V.samples(spec), repeats)
        print(f"  {method:16s} {t * 1e3:8.1f} ms   {t / spec.fires * 1e9:6.0f} ns per fire   "
              f"({spec.fires // V.BLOCK_SIZE} blocks of {V.BLOCK_SIZE})")

    spec = V.parse_variability(dict(CONTRACT, fires=10_000))
    drawn = V.samples(spec)
    inputs = V.annex_a_inputs(drawn, spec.fires, **COMPARTMENT)
    grid = np.arange(0.0, 180 * 60 + 1, 5.0)
    print(f"\nGas matrix: {spec.fires:,} fires x {grid.size} times (5 s over 180 min)")
    t_fires, fires = best(lambda: P.parametric_fires(**inputs), repeats)
    t_gas, gas = best(lambda: fires.gas_temperature(grid), repeats)
    cells = gas.size
    print(f"  parametric_fires  {t_fires * 1e3:8.1f} ms")
    print(f"  gas_temperature   {t_gas * 1e3:8.1f} ms   {t_gas / cells * 1e9:6.2f} ns per value   "
          f"({gas.nbytes / 1e6:.0f} MB)")
    sub = 300  # the one-fire loop on a subset, scaled up
    t0 = time.perf_counter()
    for i in range(sub):
        P.parametric_fire(*(float(inputs[k][i]) for k in ("opening_factor_m05", "thermal_inertia",
                                                          "total_area_fire_load_MJ_m2", "t_lim_h"))
                          ).gas_temperature(grid)
    t_loop = (time.perf_counter() - t0) / sub * spec.fires
    print(f"  loop of parametric_fire, scaled from {sub} fires: {t_loop * 1e3:8.1f} ms   "
          f"(matrix {t_loop / (t_fires + t_gas):.1f}x faster)")
    print(f"  out of Annex A's range: {int(fires.out_of_scope.sum())} fires {fires.scope_counts()}")

    members = 100
    rng = np.random.default_rng(0)
    peaks = np.minimum(fires.peak_gas_temperature_C[:, None] * rng.uniform(0.5, 0.95, members)[None, :], 1400.0)
    crit = rng.uniform(450.0, 700.0, members)
    times = {"annex_f": rng.uniform(10.0, 150.0, (spec.fires, members))}
    t_tally, tl = best(lambda: V.tally(peaks, crit, times), repeats)
    print(f"\nTally: {spec.fires:,} fires x {members} members (peaks and one equivalent-time route)")
    print(f"  tally            {t_tally * 1e3:8.1f} ms   {t_tally / (spec.fires * members) * 1e9:6.1f} ns per "
          f"member-fire")


if __name__ == "__main__":
    main()
