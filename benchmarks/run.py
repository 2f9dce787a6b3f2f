"""steelfire benchmarks: prints figures and ratios measured in one run (no pass/fail).

    python benchmarks/run.py            # all figures
    python benchmarks/run.py --quick    # fewer repeats

Figures: ns per member-step of a tight plain-Python twin of eq (4.27), the scalar numba kernel and
the batch kernel (1 and 2 threads); time to size a 1,000-member schedule on both criteria; where a
20,000-member `steelfire check` spends its time (benchmarks/check_profile.py); wall time of
`steelfire check` on the largest bundled case with a warm and a cold numba cache.
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


def best_of(fn, repeats):
    times = []
    for _ in range(repeats):
        t0 = time.perf_counter()
        fn()
        times.append(time.perf_counter() - t0)
    return min(times), statistics.median(times)


def members(n, rng, grid):
    """Members across the kernel's input space: bare, protected constant / tabulated lambda, moisture."""
    kind = rng.integers(0, 4, n)          # 0 bare, 1 constant, 2 tabulated, 3 constant + moisture
    bare = kind == 0
    amv = rng.uniform(50.0, 300.0, n)
    d = rng.uniform(0.008, 0.05, n)
    rho = np.where(kind == 2, 1300.0, 800.0)
    c = np.where(kind == 2, 1200.0, 1700.0)
    lam_T = np.tile([20.0, 300.0, 500.0, 700.0], (n, 1))
    lam_v = np.where((kind == 2)[:, None], np.tile([0.1, 0.12, 0.16, 0.22], (n, 1)), 0.2)
    lam_n = np.where(kind == 2, 4, 1).astype(np.int64)
    delay = np.where(kind == 3, heat.moisture_delay_s(5.0, 800.0, 1.0, 0.2) * d ** 2, 0.0)
    return bare, amv, d, rho, c, lam_T, lam_v, lam_n, delay


def kernel_figures(repeats):
    """Interleaved rounds (twin, scalar, batch on 1 thread, batch on 2 threads), so that a machine
    whose speed drifts during the run affects every figure alike; medians over the rounds."""
    t = np.arange(0.0, 240 * 60.0 + 1, 5.0)
    g = nominal.standard_fire(t)
    steps = len(t) - 1
    rng = np.random.default_rng(7)
    tl, gl = list(map(float, t)), list(map(float, g))
    n_py, n_sc, n = 6, 300, 4000
    lam_T, lam_v = np.array([20.0]), np.array([0.2])

    def one(ap):
        return heat.protected_history(t, g, ap, 0.02, 800.0, 1700.0, lam_T, lam_v, 1, 0.0, 7850.0)

    ref = tight_twin(tl, gl, 150.0, 0.02, 800.0, 1700.0, 0.2)
    assert abs(one(150.0).max() - ref) <= 1e-9 * abs(ref), "scalar kernel and twin disagree"
    arr = members(n, rng, t)
    thr = np.full(n, 550.0)
    q = np.zeros(0, dtype=np.int64)

    def batch():
        heat.batch(t, g, arr[0], arr[1], 25.0, 0.7, 7850.0, *arr[2:], thr, q, False)

    # the twin is eq (4.27) alone; the same members without the bare ones (a quarter, and cheaper)
    prot = ~arr[0]
    arr_p = [a[prot] for a in arr]
    n_p = int(prot.sum())

    def batch_protected():
        heat.batch(t, g, arr_p[0], arr_p[1], 25.0, 0.7, 7850.0, *arr_p[2:], thr[:n_p], q, False)

    batch()
    batch_protected()
    threads = sorted({1, min(2, numba.config.NUMBA_NUM_THREADS)})
    figs = {"twin": [], "scalar": [], 1: [], 2: [], "protected": [], "pair": []}
    best = {}  # fastest single call per thread count
    threads0 = numba.get_num_threads()
    for _ in range(max(3, repeats)):
        t0 = time.perf_counter()
        for i in range(n_py):
            tight_twin(tl, gl, 100.0 + 20 * i, 0.02, 800.0, 1700.0, 0.2)
        figs["twin"].append((time.perf_counter() - t0) / (n_py * steps) * 1e9)
        t0 = time.perf_counter()
        for i in range(n_sc):
            one(50.0 + 0.5 * i)
        figs["scalar"].append((time.perf_counter() - t0) / (n_sc * steps) * 1e9)
        # one and two threads call for call: the speed of this virtual machine's cores drifts by up
        # to 1.4x over a few hundred ms (measured here), so each two-thread call is set beside the
        # one-thread call just before it; the idle second core is first woken by a short parallel
        # loop (untimed; after a one-thread call it takes a few ms to come up to speed)
        rounds = {th: [] for th in threads}
        for _ in range(3):
            for th in threads:
                numba.set_num_threads(th)
                if th > 1:
                    wake_cores()
                t0 = time.perf_counter()
                batch()
                rounds[th].append((time.perf_counter() - t0) / (n * steps) * 1e9)
        for th in threads:
            figs[th].append(statistics.median(rounds[th]))
            best[th] = min(best.get(th, math.inf), min(rounds[th]))
        if 2 in rounds:
            figs["pair"] += [a / b for a, b in zip(rounds[1], rounds[2])]
        numba.set_num_threads(1)
        t0 = time.perf_counter()
        batch_protected()
        figs["protected"].append((time.perf_counter() - t0) / (n_p * steps) * 1e9)
    numba.set_num_threads(threads0)
    med = {k: statistics.median(v) for k, v in figs.items() if v}
    ns_py, ns_sc = med["twin"], med["scalar"]
    print(f"kernel: eq (4.27)/(4.25), standard fire 240 min at 5 s ({steps} steps); medians of "
          f"{len(figs['twin'])} interleaved rounds")
    print(f"  plain-Python tight twin     {ns_py:8.1f} ns/member-step   (1.0x)")
    print(f"  scalar numba kernel         {ns_sc:8.1f} ns/member-step   ({ns_py / ns_sc:5.1f}x twin)")
    for th in threads:
        print(f"  batch kernel, {th} thread{'s' if th > 1 else ' '}      {med[th]:8.1f} ns/member-step   "
              f"({ns_py / med[th]:5.1f}x twin; range {min(figs[th]):.1f}-{max(figs[th]):.1f})")
    print(f"  batch, protected only, 1 th {med['protected']:8.1f} ns/member-step   "
          f"({ns_py / med['protected']:5.1f}x twin: eq (4.27) alone, as the twin)")
    if 2 in med:
        print(f"  two threads / one thread    {med['pair']:8.2f}x   (median of {len(figs['pair'])} adjacent "
              f"pairs of calls; ratio of the medians {med[1] / med[2]:.2f}x; of the fastest calls "
              f"{best[1]:.2f} / {best[2]:.2f} ns: {best[1] / best[2]:.2f}x)")
    rates = machine_rates()
    floor = hardware_floor_ns(rates)
    print(f"  estimated floor, one core   {floor:8.2f} ns/member-step   ({MIX_OPS:.0f} vector operations and "
          f"{DIVISIONS} division per member-step at this core's measured {rates[0]:.0f} multiply-add lane-ops "
          f"and {rates[1]:.1f} divisions per ns; batch 1 thread is {med[1] / floor:.1f}x it)")
    print(f"  estimated one-chain latency {latency_chain_ns():8.1f} ns/member-step   (what the scalar kernel "
          f"can reach; it is at {ns_sc / latency_chain_ns():.1f}x)")
    return med


#: Vector arithmetic per member-step of the batch kernels (adds, multiplies, compares, selects, max,
#: min, and/or; a fused multiply-add counted as two; divisions apart), counted in the compiled member
#: loops of the time loop on an AVX2 core (ymm instructions per 4 members, numba's inspect_asm with
#: an empty cache): bare steel 49; protected steel 98 (c_a and the division 38, e^(phi/10) - 1 33,
#: the increment, its rules, the moisture plateau, peak and crossing 27); a conductivity table adds
#: 4 for its first knot and 5 for each knot after it. Loads, stores, moves and loop control apart.
BARE_OPS, PROTECTED_OPS, TABLE_OPS, KNOT_OPS, DIVISIONS = 49, 98, 4, 5, 1
#: The benchmark's members (``members``): a quarter each bare, constant, tabulated (4 knots),
#: constant with moisture.
MIX_OPS = (BARE_OPS + PROTECTED_OPS + (PROTECTED_OPS + TABLE_OPS + 3 * KNOT_OPS) + PROTECTED_OPS) / 4.0


@numba.njit(parallel=True)
def _spin(a):
    for i in numba.prange(a.shape[0]):
        x = a[i]
        for _ in range(200_000):
            x = x * 0.9999999 + 1e-7
        a[i] = x
    return a


def wake_cores():
    """A few ms of arithmetic on every thread: an idle virtual core takes that long to come up to
    speed (seen here: the first 10-15 ms of two-thread work after a one-thread spell run slower)."""
    a = np.ones(numba.get_num_threads())
    for _ in range(20):
        _spin(a)


#: Doubles the rate loops work on: a compile-time width, so that the compiler keeps them in registers.
RATE_WIDTH = 128


@numba.njit(error_model="numpy")
def _mul_add_loop(a, reps):
    for _ in range(reps):
        for i in range(RATE_WIDTH):
            a[i] = a[i] * 0.9999999 + 1e-7
    return a


@numba.njit(error_model="numpy")
def _divide_loop(a, reps):
    for _ in range(reps):
        for i in range(RATE_WIDTH):
            a[i] = 1.0000001 / a[i]
    return a


def machine_rates(reps=200_000):
    """What one core does per ns, measured: (multiply-add lane-ops, divisions).

    Small numba loops over 128 doubles (held in vector registers), 128 independent chains,
    vectorised as the batch kernels are (no fast-math): ``a = a * c + d`` counts two operations per
    element, ``a = c / a`` one division. Best of five, one thread: the arithmetic peak of the core,
    not counting the loads and stores a real kernel also makes.
    """
    threads0 = numba.get_num_threads()
    numba.set_num_threads(1)
    out = []
    for fn, ops in ((_mul_add_loop, 2), (_divide_loop, 1)):
        a = np.linspace(1.0, 2.0, RATE_WIDTH)
        fn(a, 10)
        best = math.inf
        for _ in range(5):
            t0 = time.perf_counter()
            fn(a, reps)
            best = min(best, time.perf_counter() - t0)
        out.append(ops * RATE_WIDTH * reps / best / 1e9)
    numba.set_num_threads(threads0)
    return tuple(out)


def hardware_floor_ns(rates=None, ops=None):
    """Throughput floor of one member-step on one core [ns]: its vector arithmetic at the measured
    multiply-add rate plus its division at the measured division rate (see ``machine_rates``)."""
    mul_add, div = machine_rates() if rates is None else rates
    return (MIX_OPS if ops is None else ops) / mul_add + DIVISIONS / div


def latency_chain_ns(ghz=None):
    """One member alone (the scalar kernel): the step is a dependent chain of about 70 cycles
    (c_a 13-16, a division 13, libm exp about 20, multiplies and adds 4 each)."""
    if ghz is None:
        ghz = cpu_ghz()
    return 70.0 / ghz


def cpu_ghz():
    try:
        with open("/proc/cpuinfo") as fh:
            mhz = [float(line.split(":")[1]) for line in fh if line.lower().startswith("cpu mhz")]
        if mhz:
            return max(mhz) / 1000.0
    except OSError:
        pass
    return 2.5


def sizing_case(n=1000, seed=3, thickness=False, as_dict=False):
    """1,000 members across the kernel's input space on the parametric fire of cases/archive_room.toml,
    run for 240 min at 5 s: bare, protected with constant and tabulated conductivity, with moisture."""
    import sys as _sys

    if _sys.version_info >= (3, 11):
        import tomllib
    else:  # pragma: no cover
        import tomli as tomllib
    from steelfire.inputs.case import case_from_dict

    base = tomllib.loads((ROOT / "cases" / "archive_room.toml").read_text())
    base["fire"]["duration_min"] = 240.0
    base["analysis"] = {"time_step_s": 5.0, "standard_horizon_min": 240.0}
    base["materials"] = {
        "board": {"density": 800.0, "conductivity": 0.2, "specific_heat": 1700.0, "min_thickness_mm": 5.0,
                  "max_thickness_mm": 100.0, "thickness_step_mm": 0.5},
        "wet": {"density": 600.0, "conductivity": 0.15, "specific_heat": 1200.0, "moisture_percent": 3.0,
                "min_thickness_mm": 5.0, "max_thickness_mm": 100.0, "thickness_step_mm": 0.5},
        "table": {"density": 1300.0, "conductivity": [[20.0, 0.10], [300.0, 0.12], [500.0, 0.16], [700.0, 0.22]],
                  "specific_heat": 1200.0, "min_thickness_mm": 5.0, "max_thickness_mm": 100.0,
                  "thickness_step_mm": 0.5},
    }
    rng = np.random.default_rng(seed)
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
        else:
            m["required_minutes"] = 15.0
        members.append(m)
    base["member"] = members
    return base if as_dict else case_from_dict(base, base_dir=ROOT / "cases")


def sizing_figures(repeats):
    from steelfire.chain.analysis import size, size_members

    case = sizing_case()
    size_members(case)  # warm
    b, med = best_of(lambda: size_members(case), max(2, repeats // 2))
    calls = size_members(case)[1]
    b2, med2 = best_of(lambda: size(case, histories=False), max(2, repeats // 2))
    print(f"sizing 1,000 members (both criteria, archive_room fire 240 min at 5 s): "
          f"{med:.2f} s median (best {b:.2f}, {calls} kernel calls); with the check at the chosen "
          f"thicknesses {med2:.2f} s median")
    return med, med2


def overhead_figures(members=20000):
    """A 20,000-member check through the CLI (benchmarks/check_profile.py): the whole command, its
    start-up, and the run after start-up split into kernels and the per-member work around them."""
    import check_profile

    f = check_profile.measure(members)
    check_profile.report(f)
    return f


def largest_case():
    """The bundled case with the most members (the schedule of a members_file counted)."""
    from steelfire import load_case

    cases = sorted((ROOT / "cases").glob("*.toml"))
    return max(cases, key=lambda p: len(load_case(p).members))


#: Runs ``python -m steelfire ARGS`` as if scipy were not installed (``pip install .`` does not
#: install it; only the tests need it): an import of it fails at once, as it does there.
WITHOUT_SCIPY = ("import runpy, sys; sys.modules['scipy'] = None; sys.argv = ['steelfire'] + sys.argv[1:]; "
                 "runpy.run_module('steelfire', run_name='__main__', alter_sys=True)")


def check_wall_times(repeats):
    """Wall time of ``steelfire check`` on the largest bundled case in a new process: cold numba
    cache, then warm, the latter both as installed for use (no scipy) and, where scipy is
    importable here, as in the test environment (numba then imports scipy.linalg on its first
    kernel load to look for BLAS). The two warm forms alternate, so that drift affects both alike."""
    import importlib.util

    largest = largest_case()
    args = ["check", str(largest), "--json"]
    cmd = [sys.executable, "-m", "steelfire", *args]
    plain = [sys.executable, "-c", WITHOUT_SCIPY, *args]
    # warm means every cache warm: numba's and Python's bytecode (an installed package has its .pyc)
    env = {k: v for k, v in os.environ.items() if k != "PYTHONDONTWRITEBYTECODE"}
    cold = []
    for _ in range(max(1, repeats // 3)):
        cache = tempfile.mkdtemp(prefix="steelfire-numba-cache-")
        env_cold = dict(env, NUMBA_CACHE_DIR=cache)
        t0 = time.perf_counter()
        subprocess.run(plain, env=env_cold, capture_output=True, cwd=ROOT)
        cold.append(time.perf_counter() - t0)
        shutil.rmtree(cache, ignore_errors=True)
    with_scipy = importlib.util.find_spec("scipy") is not None
    forms = {"plain": plain, "scipy": cmd} if with_scipy else {"plain": plain}
    for c in forms.values():
        subprocess.run(c, env=env, capture_output=True, cwd=ROOT)
    warm = {k: [] for k in forms}
    for _ in range(repeats):
        for k, c in forms.items():
            t0 = time.perf_counter()
            subprocess.run(c, env=env, capture_output=True, cwd=ROOT)
            warm[k].append(time.perf_counter() - t0)
    med = {k: statistics.median(v) for k, v in warm.items()}
    print(f"steelfire check {largest.name}: warm cache median {med['plain']:.2f} s (best {min(warm['plain']):.2f}) "
          f"as installed for use (no scipy); cold cache median {statistics.median(cold):.2f} s")
    if with_scipy:
        print(f"  with scipy importable (the test environment): warm median {med['scipy']:.2f} s "
              f"(best {min(warm['scipy']):.2f}): numba imports scipy.linalg on its first kernel load")
    return med["plain"], statistics.median(cold)


def main(argv=None):
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--quick", action="store_true")
    args = ap.parse_args(argv)
    repeats = 3 if args.quick else 7
    print(f"machine: {os.cpu_count()} logical CPUs, ~{cpu_ghz():.2f} GHz; numba {numba.__version__}, "
          f"threads {numba.config.NUMBA_NUM_THREADS}")
    kernel_figures(repeats)
    sizing_figures(repeats)
    overhead_figures()
    check_wall_times(repeats)


if __name__ == "__main__":
    main()
