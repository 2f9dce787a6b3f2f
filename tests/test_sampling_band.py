"""steelfire sample: the error band of the sampled peaks, the fires near the critical temperature and the
exceedance probability with them counted (steelfire.chain.sampling.error_band, Tally.near_critical).

References: the deterministic check of the same case (steelfire.chain.analysis.analyse: its peaks, held to
EN 1991-1-2 Annex A and EN 1993-1-2 4.2.5 in its own tests, and its step_sensitivity_C, 2 |r(dt) - r(dt/2)|);
the same kernels at a sixteenth of the step with t_max and burnout on the grid (self-convergence: the
reference for the time-step error); scipy.optimize.brentq for the threshold fire loads; scipy.stats.binomtest
for the exact Clopper-Pearson interval; hand calculations in the comments.
"""

from __future__ import annotations

import dataclasses
import functools
import sys
from pathlib import Path

import numpy as np
import pytest
from scipy import stats
from scipy.optimize import brentq

from steelfire.chain import fires as chain_fires
from steelfire.chain import sampling as S
from steelfire.chain import thermal
from steelfire.chain.analysis import analyse
from steelfire.errors import InputError
from steelfire.inputs.case import case_from_dict
from steelfire.models import variability as V
from steelfire.models.fire import parametric as P

sys.path.insert(0, str(Path(__file__).resolve().parent))
from test_sampling import CASE, GUMBEL_OFFICE, assert_same_counts, comparable, load, table  # noqa: E402

try:
    import tomllib
except ImportError:  # pragma: no cover - Python 3.10
    import tomli as tomllib

#: The common grid moves a sampled peak from the single-fire check's by at most this [C] (the bound the
#: module states, 0.21 C measured over 400 fires; tests/test_sampling.py::test_common_grid_error).
GRID_BOUND_C = 0.25

#: Fire loads spread wide, as tests/test_sampling.py::test_common_grid_error.
WIDE = dict(fire_load=GUMBEL_OFFICE, opening_fraction={"distribution": "uniform", "low": 0.3, "high": 1.0},
            thermal_inertia={"distribution": "uniform", "low": 400.0, "high": 2000.0},
            growth={"medium": 0.5, "fast": 0.5})


def exact_ci(k: int, n: int):
    """Clopper-Pearson 95 % interval by scipy.stats.binomtest (the reference, not the code under test)."""
    ci = stats.binomtest(int(k), int(n)).proportion_ci(confidence_level=0.95, method="exact")
    return ci.low, ci.high


def case_with_critical(critical_C: dict):
    """The bundled case with the named members' critical temperatures given [C]."""
    data = tomllib.loads(CASE.read_text(encoding="utf-8"))
    data.pop("variability")
    for m in data["member"]:
        if m["name"] in critical_C:
            m.pop("utilisation", None)
            m["critical_temperature_C"] = float(critical_C[m["name"]])
    return case_from_dict(data, base_dir=CASE.parent)


# ---- the band ------------------------------------------------------------------------------------

def test_band_is_at_least_the_grid_check_difference_and_covers_the_step_error():
    """Per member the band is >= the grid check's difference for that member (grid_check, kept per member)
    and >= 2 x the half-step difference, the larger of the two. The reference for the time-step error: the
    same first fires run alone at a sixteenth of the step with t_max and burnout on the grid (a first-order
    result at dt/16 is within 1/16 of the dt error of the limit: self-convergence); every member's largest
    difference from it lies within the band measured on those fires."""
    case, _ = load()
    spec = V.parse_variability(table(fires=40, seed=3, **WIDE))
    setup = S.prepare(case, spec)
    g = S.grid_check(setup, fires=40)
    band = S.error_band(setup, fires=40)
    assert g["fires"] == band.fires == 40
    assert np.all(band.band_C >= g["peak_difference_C"])
    assert g["largest_peak_difference_C"] == pytest.approx(float(np.max(g["peak_difference_C"])), abs=0)
    np.testing.assert_array_equal(band.grid_C, g["peak_difference_C"])
    assert np.all(band.band_C == np.maximum(band.grid_C, 2.0 * band.half_step_C))
    assert np.all(band.half_step_C > 0.0)
    ev = S.evaluate(setup, 0, 40, equivalence=False)
    pf = ev.fires.fires
    err = np.zeros(setup.members)
    for f in range(40):
        one = P.parametric_fire(*(float(getattr(pf, k)[f]) for k in (
            "opening_factor_m05", "thermal_inertia", "total_area_fire_load_MJ_m2", "t_lim_h")))
        t = chain_fires.time_grid(case.fire.duration_min * 60.0, case.analysis.time_step_s / 16.0,
                                  (one.t_max_s, one.burnout_time_s))
        fine = thermal.run(case.code, t, one.gas_temperature(t),
                           setup.cols.rows(alpha_c=setup.alpha_c, nominal_fire=False)).peak_C
        err = np.maximum(err, np.abs(ev.peak_C[f] - fine))
    assert np.all(err <= band.band_C), (err, band.band_C)  # measured: 0.68 <= 0.72 C at worst (B3-01)
    # without the Richardson factor the half-step difference alone would not cover it
    assert np.any(err > band.half_step_C)


def test_band_of_the_check_fire_agrees_with_the_check_step_sensitivity():
    """Zero variance (every fire the check's fire): the band's half-step part is the check's own estimate
    step_sensitivity_C = 2 |r(dt) - r(dt/2)| (steelfire.chain.steps), up to the common grid. Hand bound:
    the runs at dt and dt/2 each differ from the check's (t_max on its grid) by the grid difference g(dt)
    and g(dt/2) <= g(dt) (the apex cut shrinks with the step), so |2 dc - 2 do| <= 4 g(dt), g(dt) the
    band's own grid part for this fire (measured: within 0.0011 C)."""
    case, _ = load()
    spec = V.parse_variability(table(fires=5, fire_load={"distribution": "fixed", "value_MJ_m2": 511.0},
                                     opening_fraction={"distribution": "fixed", "value": 1.0}))
    check = analyse(case, histories=False)
    band = S.error_band(S.prepare(case, spec))
    sens = np.array([m.step_sensitivity_C for m in check.members])
    assert np.all(np.abs(2.0 * band.half_step_C - sens) <= 4.0 * band.grid_C + 1e-9), (band.half_step_C, sens)
    assert np.all(band.band_C > 0.1)


# ---- near-critical fires -----------------------------------------------------------------------------

def test_a_critical_temperature_among_the_peaks_has_near_critical_fires_and_a_far_one_none():
    """Fire load 500-520 MJ/m2, everything else the case's: the peaks of a member spread over a few degrees.
    B3-01's critical temperature is set to its deterministic peak at 510 MJ/m2 (analyse), the middle of that
    spread: fires lie within the band of it. C3-A1's is set 100 C above its peak at 520 MJ/m2 (the hottest
    fire, peaks monotone in q): no fire lies within a band of about 0.5 C of it."""
    case, _ = load()

    def peaks_at(q):
        c = dataclasses.replace(case, fire_load=dataclasses.replace(case.fire_load, characteristic_MJ_m2=q))
        return {m.name: m.peak_steel_temperature_C for m in analyse(c, histories=False).members}

    mid, top = peaks_at(510.0), peaks_at(520.0)
    low = peaks_at(500.0)
    assert top["B3-01"] - low["B3-01"] > 2.0  # the spread is wider than the band: the test means something
    near_case = case_with_critical({"B3-01": mid["B3-01"], "C3-A1": top["C3-A1"] + 100.0})
    spec = table(fires=200, fire_load={"distribution": "uniform", "low_MJ_m2": 500.0, "high_MJ_m2": 520.0})
    res = S.run(near_case, variability=spec, progress=False)
    sec = res.to_dict()
    b = sec["members"][res.names.index("B3-01")]
    c = sec["members"][res.names.index("C3-A1")]
    # hand estimate: 200 fires over ~(top - low) C, a band of +-0.5 C: about 200 x 1 / spread fires
    assert b["near_critical_fires"] >= 3 and b["near_critical_fires_below_critical"] >= 1
    assert 0.0 < b["error_band_C"] < 2.0
    assert c["near_critical_fires"] == 0 and c["near_critical_fires_below_critical"] == 0
    assert c["exceedance_probability_with_band"] == c["exceedance_probability"] == 0.0
    assert sec["error_band"]["near_critical_fires_total"] == sum(m["near_critical_fires"] for m in sec["members"])


def test_with_the_band_the_probability_is_at_least_the_plain_one():
    """Every member: the count with the band = exceedances + fires without a peak + near-critical fires below
    the critical temperature (the rule); its interval is scipy's exact one (rounded outward) and neither end
    is below the plain interval's."""
    case, var = load()
    res = S.run(case, variability=dict(var, fires=500), progress=False)
    sec = res.to_dict()
    n = 500
    seen = 0
    for m in sec["members"]:
        k = m["exceedances"] + m["no_fire_fires"] + m["near_critical_fires_below_critical"]
        assert m["exceedance_probability_with_band"] == pytest.approx(k / n, rel=1e-6)
        assert m["exceedance_probability_with_band"] >= m["exceedance_probability"]
        lo, hi = exact_ci(k, n)
        assert m["exceedance_interval_with_band"][0] <= lo and m["exceedance_interval_with_band"][1] >= hi
        assert m["exceedance_interval_with_band"][0] >= m["exceedance_interval"][0]
        assert m["exceedance_interval_with_band"][1] >= m["exceedance_interval"][1]
        assert m["near_critical_fires_below_critical"] <= m["near_critical_fires"]
        seen += m["near_critical_fires_below_critical"] > 0
    assert seen >= 1  # at least one member's estimate moves (measured: B3-01, C3-A1, B3-07 edge)


def test_near_critical_fires_are_those_with_the_fire_load_near_the_threshold():
    """Only the fire load random (Gumbel office): peaks rise with q_f, so a member's peak lies within a band
    d of its critical temperature exactly when q_f lies between q(crit - d) and q(crit + d), the fire loads
    at which the deterministic check's peak equals those temperatures (brentq on analyse). The sampled
    peaks differ from the check's by the common grid, at most 0.25 C: fires with q_f inside the interval
    narrowed by that must all be counted, none outside the interval widened by it. Done with the run's own
    band and, to count many fires, with a band of 5 C given to the chunk tally."""
    case, _ = load()
    fl = case.fire_load
    names = [m.name for m in case.members]

    @functools.lru_cache(maxsize=None)
    def peaks(q):
        c = dataclasses.replace(case, fire_load=dataclasses.replace(fl, characteristic_MJ_m2=float(q)))
        return np.array([m.peak_steel_temperature_C for m in analyse(c, histories=False).members])

    lo_q, hi_q = 150.0, 1300.0  # the range of tests/test_sampling.py (q_t,d within Annex A)
    n = 2000
    spec = V.parse_variability(table(fires=n, seed=11, fire_load=GUMBEL_OFFICE))
    res = S.run(case, variability=spec, progress=False)
    q = res.counts.fire_columns["fire_load_MJ_m2"]
    crit = res.critical_C

    def q_at(i, temp):
        if temp <= peaks(lo_q)[i]:
            return -np.inf
        if temp >= peaks(hi_q)[i]:
            return np.inf
        return brentq(lambda x: peaks(x)[i] - temp, lo_q, hi_q, xtol=1e-6)

    def within(a, b):
        return int(np.count_nonzero((q >= a) & (q <= b)))

    def check(i, band, near, passing):
        g = GRID_BOUND_C
        c = crit[i]
        inner = within(q_at(i, c - band + g), q_at(i, c + band - g)) if band > g else 0
        outer = within(q_at(i, c - band - g), q_at(i, c + band + g))
        assert inner <= near <= outer, (names[i], band, inner, near, outer)
        inner_p = within(q_at(i, c - band + g), q_at(i, c - g)) if band > 2 * g else 0
        outer_p = within(q_at(i, c - band - g), q_at(i, c + g))
        assert inner_p <= passing <= outer_p, (names[i], band, inner_p, passing, outer_p)
        return outer

    checked = 0
    for i in range(len(names)):
        if not peaks(lo_q)[i] + 10.0 < crit[i] < peaks(hi_q)[i] - 10.0:
            continue
        check(i, float(res.error_band.band_C[i]), int(res.tally.near_critical[i]),
              int(res.tally.near_critical_passing[i]))
        checked += 1
    assert checked >= 3
    # a 5 C band through the chunk tally (the same fires): many fires, still exactly those
    setup = dataclasses.replace(S.prepare(case, spec), band_C=np.full(len(names), 5.0))
    tl = S.tally_chunk(setup, 0, n).tally
    total = 0
    for i in range(len(names)):
        if peaks(lo_q)[i] + 10.0 < crit[i] < peaks(hi_q)[i] - 10.0:
            check(i, 5.0, int(tl.near_critical[i]), int(tl.near_critical_passing[i]))
            total += int(tl.near_critical[i])
    assert total >= 30  # measured: many more than the run's own band gives


# ---- exact sums over chunks and backends -----------------------------------------------------------

def test_near_critical_counts_the_same_for_any_chunk_size_and_on_one_dask_worker():
    """The counts are integer sums per chunk, the band measured before the chunks in the main process:
    chunk sizes 7, 40 and the default, in-process and on a local dask cluster of one worker, give the same
    near-critical counts and the same section (backend apart)."""
    case, var = load()
    spec = dict(var, fires=240)
    base = S.run(case, variability=spec, chunk_fires=40, progress=False)
    assert int(np.sum(base.tally.near_critical)) > 0  # something to compare
    others = [S.run(case, variability=spec, chunk_fires=c, progress=False) for c in (7, None)]
    others.append(S.run(case, variability=spec, chunk_fires=40, workers=1, progress=False))
    assert "1 worker" in others[-1].backend
    for r in others:
        assert_same_counts(base.counts, r.counts)
        np.testing.assert_array_equal(base.tally.near_critical, r.tally.near_critical)
        np.testing.assert_array_equal(base.tally.near_critical_passing, r.tally.near_critical_passing)
        assert comparable(base) == comparable(r)


# ---- the target: judged with the band -------------------------------------------------------------

def test_a_verdict_the_band_changes_is_warned_and_judged_with_the_band():
    """A target between a member's plain upper end and its upper end with the band (the same seed, so the
    same fires): that member exceeds the target with the band, not without; the warning names it and the
    section states the criterion. A target above both ends changes nothing."""
    case, var = load()
    spec = dict(var, fires=300)
    first = S.run(case, variability=spec, progress=False).to_dict()
    m = next(m for m in first["members"] if m["near_critical_fires_below_critical"] > 0)
    lo_end, hi_end = m["exceedance_interval"][1], m["exceedance_interval_with_band"][1]
    assert hi_end > lo_end
    target = 0.5 * (lo_end + hi_end)
    sec = S.run(case, variability=dict(spec, target_probability=target), progress=False).to_dict()
    assert sec["target_criterion"] == S.TARGET_CRITERION and "with the error band" in sec["target_criterion"]
    d = sec["members"][[x["name"] for x in sec["members"]].index(m["name"])]
    assert d["exceeds_target_probability"] is True and d["exceeds_target_probability_without_band"] is False
    warned = [w for w in sec["warnings"] if "changed by the error band" in w]
    assert len(warned) == 1 and m["name"] in warned[0]
    top = max(x["exceedance_interval_with_band"][1] for x in first["members"])
    assert top < 0.98
    sec = S.run(case, variability=dict(spec, target_probability=top * 1.01), progress=False).to_dict()
    assert not any("changed by the error band" in w for w in sec["warnings"])
    assert all(x["exceeds_target_probability"] is False for x in sec["members"])


def test_size_judges_by_the_interval_with_the_band():
    """--size: at the chosen thickness the count with the band (exceedances + near-critical fires below the
    critical temperature, from the final statistics on the same fires) has an exact upper end (scipy
    binomtest) below the target; the next thinner board's count with the band does not."""
    case, var = load()
    n = 300
    res = S.run(case, variability=dict(var, fires=n, target_probability=0.05), size=True, progress=False)
    sec = res.to_dict()
    sized = 0
    for m in sec["members"]:
        s = m["sizing"]
        if s is None or not s["achievable"]:
            continue
        assert s["criterion"] == S.TARGET_CRITERION
        k = m["exceedances"] + m["no_fire_fires"] + m["near_critical_fires_below_critical"]
        assert s["exceedance_probability_with_band"] == pytest.approx(k / n, rel=1e-6)
        assert exact_ci(k, n)[1] < 0.05
        assert m["exceeds_target_probability"] is False
        if s["next_thinner_mm"] is not None:
            assert exact_ci(round(s["next_thinner_exceedance_probability_with_band"] * n), n)[1] >= 0.05
        sized += 1
    assert sized >= 1


def test_timings_name_the_half_step_run():
    case, var = load()
    res = S.run(case, variability=dict(var, fires=50), progress=False)
    assert {"grid_check_s", "half_step_s", "fires_s"} <= set(res.timings_s)
    assert res.to_dict()["error_band"]["fires"] == 50  # fewer fires than GRID_CHECK_FIRES: all of them


def test_near_critical_counts_by_hand():
    """near_critical_counts on five peaks around 500 C with a 0.5 C band (hand count: 499.8, 500.0, 500.3
    within; 499.8 and 500.0 at or below critical; a NaN peak in neither)."""
    near, passing = V.near_critical_counts([[499.0], [499.8], [500.0], [500.3], [501.0], [np.nan]], [500.0], [0.5])
    assert (near.tolist(), passing.tolist()) == ([3], [2])
    with pytest.raises(InputError):
        V.near_critical_counts([[500.0]], [500.0], [-0.1])


def _passing_case_text(target: float, fires: int) -> str:
    """office_variability without the two members its deterministic check fails (B3-07 edge, T3-01 tie), so
    that the exit code of `sample` turns on the target probability alone; ``fires`` and ``target``."""
    text = CASE.read_text(encoding="utf-8")
    head, *members = text.split("[[member]]")
    keep = [m for m in members if 'name = "B3-07 edge"' not in m and 'name = "T3-01 tie"' not in m]
    head = head.replace("fires = 10000", f"fires = {fires}")
    head = "\n".join(f"target_probability = {target!r}" if line.startswith("target_probability") else line
                     for line in head.splitlines()) + "\n"
    return head + "".join("[[member]]" + m for m in keep)


def test_exit_code_judges_the_target_with_the_band(tmp_path):
    """`steelfire sample` exits 1 where a member's upper end WITH the band is above target_probability though
    its plain upper end is below (the same fires, the same seed), and 0 with a target above both: the exit
    code judges as --size does, on the safe side (test above for the section's own verdicts)."""
    from steelfire.cli import main

    n = 400   # seed 1: B3-01 has fires within its band below its critical temperature at this count
    probe = tmp_path / "probe.toml"
    probe.write_text(_passing_case_text(0.99, n), encoding="utf-8")
    case, var = load(probe)
    sec = S.run(case, variability=var, progress=False).to_dict()
    m = next(m for m in sec["members"] if m["near_critical_fires_below_critical"] > 0)
    plain_hi, band_hi = m["exceedance_interval"][1], m["exceedance_interval_with_band"][1]
    assert plain_hi < band_hi
    others_hi = max(x["exceedance_interval_with_band"][1] for x in sec["members"])
    between = tmp_path / "between.toml"
    between.write_text(_passing_case_text(0.5 * (plain_hi + band_hi), n), encoding="utf-8")
    above = tmp_path / "above.toml"
    above.write_text(_passing_case_text(min(0.999, others_hi * 1.01), n), encoding="utf-8")
    assert main(["check", str(above), "--json"]) == 0          # the deterministic check passes
    assert main(["sample", str(between), "--json"]) == 1
    assert main(["sample", str(above), "--json"]) == 0
