"""Sampled fire severity (steelfire.models.variability): the [variability] table, the distributions,
reproducible sampling and the statistics of many fires.

References: EN 1991-1-2 Table E.4 (mean and 80 % fractile fire load densities, Gumbel, from memory),
the Gumbel, lognormal and triangular moment relations (hand calculations written out below),
scipy.stats.binom (the defining equations of the Clopper-Pearson interval), numpy.quantile
(``inverted_cdf``), scipy.optimize.brentq (threshold fire loads for an exact probability).
"""

import dataclasses
import math
from concurrent.futures import ThreadPoolExecutor

import numpy as np
import pytest
from scipy import stats
from scipy.optimize import brentq

from steelfire.errors import InputError
from steelfire.models import variability as V
from steelfire.models.fire import parametric as P

CONTRACT = {  # the [variability] example of the case contract
    "fires": 10000, "seed": 1, "method": "latin-hypercube",
    "fire_load": {"distribution": "gumbel", "mean_MJ_m2": 420.0, "cov": 0.3},
    "opening_fraction": {"distribution": "uniform", "low": 0.5, "high": 1.0},
    "thermal_inertia": {"distribution": "uniform", "low": 700.0, "high": 1500.0},
    "growth": {"medium": 0.7, "fast": 0.3},
    "target_fractile": 0.9, "target_probability": 0.01,
    "ignition_rate_per_m2_year": 1e-6, "suppression_failure_probability": 0.02,
}


def with_(**changes):
    d = dict(CONTRACT)
    for k, v in changes.items():
        if v is None:
            d.pop(k, None)
        else:
            d[k] = v
    return d


# ---- the [variability] table ------------------------------------------------------------------

def test_contract_example_parses():
    s = V.parse_variability(CONTRACT)
    assert (s.fires, s.seed, s.method) == (10000, 1, "latin-hypercube")
    assert s.fire_load.kind == "gumbel" and s.fire_load.sd == pytest.approx(126.0, rel=1e-12)  # 0.3 x 420
    assert s.opening_fraction.low == 0.5 and s.thermal_inertia.high == 1500.0
    assert s.growth == (0.0, 0.7, 0.3)
    assert (s.target_fractile, s.target_probability) == (0.9, 0.01)
    with pytest.raises(dataclasses.FrozenInstanceError):
        s.fires = 5


@pytest.mark.parametrize("table,field,words", [
    (with_(fire_load={"distribution": "gumbel", "mean_MJ_m2": 420.0, "cov": -0.3}), "variability.fire_load.cov", "> 0"),
    (with_(fire_load={"distribution": "weibull", "mean_MJ_m2": 420.0}), "variability.fire_load.distribution",
     "gumbel, normal, lognormal, triangular, uniform, fixed"),
    (with_(growth={"medium": 0.7, "fast": 0.4}), "variability.growth", "add up to 1"),
    (with_(growth={"medium": 0.7, "fast": 0.300001}), "variability.growth", "add up to 1"),
    (with_(growth={"medium": 1.1, "fast": -0.1}), "variability.growth.fast", ">= 0"),
    (with_(growth={"rapid": 1.0}), "variability.growth.rapid", "slow, medium, fast"),
    (with_(fires=0), "variability.fires", ">= 1"),
    (with_(fires=100.0), "variability.fires", "integer"),
    (with_(fires=None), "variability.fires", "missing"),
    (with_(seed=1.5), "variability.seed", "integer"),
    (with_(seed=True), "variability.seed", "integer"),
    (with_(seed=-1), "variability.seed", ">= 0"),
    (with_(target_fractile=1.0), "variability.target_fractile", "between 0 and 1"),
    (with_(target_fractile=0.0), "variability.target_fractile", "between 0 and 1"),
    (with_(target_probability=1.5), "variability.target_probability", "between 0 and 1"),
    (with_(method="sobol"), "variability.method", "latin-hypercube, random"),
    (with_(fires_count=3), "variability.fires_count", "not a known key"),
    (with_(fire_load={"distribution": "gumbel", "mean": 420.0, "cov": 0.3}), "variability.fire_load.mean",
     "mean_MJ_m2"),
    (with_(fire_load={"distribution": "normal", "mean_MJ_m2": 420.0, "cov": 0.1, "sd_MJ_m2": 42.0}),
     "variability.fire_load.cov", "either"),
    # normal, V = 0.3: P(q <= 0) = Phi(-1/0.3) = 4.3e-4 > 1e-6 (hand calculation)
    (with_(fire_load={"distribution": "normal", "mean_MJ_m2": 420.0, "cov": 0.3}), "variability.fire_load.cov",
     "probability 0.00043"),
    (with_(opening_fraction={"distribution": "normal", "mean": 0.8, "cov": 0.1}),
     "variability.opening_fraction.distribution", "uniform, triangular or fixed"),
    (with_(opening_fraction={"distribution": "uniform", "low": 0.5, "high": 1.2}), "variability.opening_fraction.high",
     "<= 1"),
    (with_(thermal_inertia={"distribution": "uniform", "low": 1500.0, "high": 700.0}),
     "variability.thermal_inertia.high", "> low"),
    (with_(thermal_inertia={"distribution": "triangular", "low": 700.0, "mode": 1600.0, "high": 1500.0}),
     "variability.thermal_inertia.mode", "between"),
    (with_(thermal_inertia={"distribution": "fixed", "value": 0.0}), "variability.thermal_inertia.value", "> 0"),
    (with_(suppression_failure_probability=None), "variability.suppression_failure_probability", "missing"),
    (with_(suppression_failure_probability=1.5), "variability.suppression_failure_probability", "between 0 and 1"),
])
def test_bad_tables_name_the_field(table, field, words):
    with pytest.raises(InputError) as e:
        V.parse_variability(table)
    assert e.value.field == field
    assert words in str(e.value)
    assert "\n" not in str(e.value)


def test_optional_keys_and_defaults():
    s = V.parse_variability({"fires": 50, "seed": 0})
    assert s.method == "latin-hypercube" and s.target_fractile == 0.9  # defaults, common practice, no source
    assert s.fire_load is None and s.growth is None and s.target_probability is None
    # weights that add up to 1 only to rounding are accepted (0.1 + 0.2 + 0.7 = 1.0000000000000002 in doubles)
    assert V.parse_variability({"fires": 1, "seed": 0, "growth": {"slow": 0.1, "medium": 0.2, "fast": 0.7}}).growth
    s = V.parse_variability({"fires": 1, "seed": 0, "fire_load": {"distribution": "normal", "mean_MJ_m2": 420.0,
                                                                  "sd_MJ_m2": 60.0}})
    assert s.fire_load.sd == 60.0 and s.fire_load.cov is None


# ---- distributions ----------------------------------------------------------------------------

@pytest.mark.parametrize("mean,fractile_80", [
    # EN 1991-1-2 Table E.4 (from memory): mean and 80 % fractile [MJ/m2], Gumbel, V = 0.3 implied
    (780.0, 948.0),   # dwelling
    (230.0, 280.0),   # hospital (room)
    (1500.0, 1824.0),  # library
    (420.0, 511.0),   # office
    (600.0, 730.0),   # shopping centre
    (100.0, 122.0),   # transport (public space)
])
def test_gumbel_80_percent_fractile_matches_table_e4(mean, fractile_80):
    d = V.Distribution("fire_load", "gumbel", mean=mean, sd=0.3 * mean, cov=0.3).frozen()
    assert round(float(d.ppf(0.8))) == fractile_80
    # hand calculation: k = -(sqrt 6 / pi)(0.5772 + ln(-ln 0.8)) = -0.77970 (0.57722 - 1.49994) = 0.71946;
    # q_80 = mean (1 + 0.71946 x 0.3); the brief's rounder "1 + 0.7 V" is 0.5 % lower
    assert float(d.ppf(0.8)) == pytest.approx(mean * (1 + 0.71946 * 0.3), rel=1e-5)


def test_gumbel_is_the_maximum_value_form_with_the_given_moments():
    d = V.parse_variability(CONTRACT).fire_load.frozen()
    assert d.mean() == pytest.approx(420.0, rel=1e-12) and d.std() == pytest.approx(126.0, rel=1e-12)
    # maximum-value Gumbel: F(mean) = exp(-exp(-0.577216)) = exp(-0.561459) = 0.570376 whatever loc and
    # scale (hand calculation); the minimum-value form would give 1 - 0.570376 = 0.429624
    assert float(d.cdf(420.0)) == pytest.approx(0.570376, abs=1e-6)


def test_other_distributions_have_the_stated_parameters():
    ln = V.Distribution("fire_load", "lognormal", mean=420.0, sd=126.0, cov=0.3).frozen()
    assert ln.mean() == pytest.approx(420.0, rel=1e-12) and ln.std() == pytest.approx(126.0, rel=1e-12)
    # hand calculation: median = mean / sqrt(1 + V^2) = 420 / sqrt(1.09) = 402.29
    assert float(ln.ppf(0.5)) == pytest.approx(402.29, abs=0.01)
    tri = V.Distribution("thermal_inertia", "triangular", low=700.0, mode=1000.0, high=1500.0).frozen()
    assert tri.mean() == pytest.approx((700 + 1000 + 1500) / 3, rel=1e-12)  # hand calculation: (a + c + b) / 3
    assert float(tri.cdf(1000.0)) == pytest.approx(300 / 800, rel=1e-12)  # hand calculation: (c - a)/(b - a)
    no = V.Distribution("fire_load", "normal", mean=420.0, sd=42.0).frozen()
    assert float(no.ppf(0.975)) == pytest.approx(420 + 1.959964 * 42.0, rel=1e-7)  # z_0.975 = 1.959964, from memory
    fx = V.Distribution("opening_fraction", "fixed", value=0.8).frozen()
    assert fx.ppf(np.array([0.01, 0.99])).tolist() == [0.8, 0.8]


# ---- sampling ---------------------------------------------------------------------------------

def test_block_streams_are_spawned_children():
    """block_seed(seed, i) is SeedSequence(seed).spawn(i + 1)[i] (numpy's own spawn as reference)."""
    children = np.random.SeedSequence(1).spawn(5)
    for i, c in enumerate(children):
        assert np.array_equal(V.block_seed(1, i).generate_state(8), c.generate_state(8))


@pytest.mark.parametrize("method", V.METHODS)
def test_same_seed_same_samples_for_any_split(method):
    spec = V.parse_variability(with_(method=method))
    whole = V.samples(spec, 7500)
    assert set(whole) == {"fire_load", "opening_fraction", "thermal_inertia", "growth"}
    assert all(len(v) == 7500 for v in whole.values())
    for cuts in ([0, 7500], [0, 1, 999, 1000, 1001, 4321, 7500], [0, 2500, 5000, 7500], list(range(0, 7501, 750))):
        parts = [V.samples_range(spec, a, z) for a, z in zip(cuts, cuts[1:])]
        for k in whole:
            assert np.array_equal(np.concatenate([p[k] for p in parts]), whole[k])
    # a longer run starts with the same fires; workers in threads give the same fires
    longer = V.samples(spec, 10000)
    assert all(np.array_equal(longer[k][:7500], whole[k]) for k in whole)
    with ThreadPoolExecutor(2) as pool:
        parts = list(pool.map(lambda a: V.samples_range(spec, a, min(a + 1300, 7500)), range(0, 7500, 1300)))
    assert all(np.array_equal(np.concatenate([p[k] for p in parts]), whole[k]) for k in whole)
    other = V.samples(spec, 7500, seed=2)
    assert not np.array_equal(other["fire_load"], whole["fire_load"])


def test_same_samples_through_dask():
    dask = pytest.importorskip("dask")
    spec = V.parse_variability(CONTRACT)
    whole = V.samples(spec, 5000)
    tasks = [dask.delayed(V.samples_range)(spec, a, a + 700) for a in range(0, 4900, 700)]
    tasks.append(dask.delayed(V.samples_range)(spec, 4900, 5000))
    parts = dask.compute(*tasks, scheduler="threads")
    assert all(np.array_equal(np.concatenate([p[k] for p in parts]), whole[k]) for k in whole)


def test_latin_hypercube_is_stratified_within_each_block():
    """Each column of a block has exactly one point in each of the BLOCK_SIZE strata."""
    for i in (0, 3):
        u = V.unit_block("latin-hypercube", 1, i)
        assert u.shape == (V.BLOCK_SIZE, V.DIMENSIONS)
        for j in range(V.DIMENSIONS):
            assert np.array_equal(np.sort(np.floor(u[:, j] * V.BLOCK_SIZE)), np.arange(V.BLOCK_SIZE))
    r = V.unit_block("random", 1, 0)
    assert not all(np.array_equal(np.sort(np.floor(r[:, j] * V.BLOCK_SIZE)), np.arange(V.BLOCK_SIZE))
                   for j in range(V.DIMENSIONS))


def test_growth_shares_follow_the_weights():
    # Latin hypercube: 1000 strata per block, the medium/fast boundary at 0.7 is a stratum edge:
    # 700 and 300 per block exactly, up to the one stratum the rounding of 0.7 might move (hand reasoning)
    spec = V.parse_variability(CONTRACT)
    g = V.samples(spec, 3000)["growth"]
    assert abs(int(np.count_nonzero(g == "fast")) - 900) <= 3 and "slow" not in g
    # random: the count of fast fires is binomial(3000, 0.3); the seed gives one draw, inside its 99.9 %
    # range 900 +- 3.29 x sqrt(3000 x 0.3 x 0.7) = 900 +- 83 (hand calculation)
    g = V.samples(V.parse_variability(with_(method="random")), 3000)["growth"]
    assert abs(int(np.count_nonzero(g == "fast")) - 900) <= 83
    # a rate of weight 0 never comes up, however many fires
    g = V.samples(V.parse_variability(with_(growth={"slow": 0.0, "medium": 1.0})), 2000)["growth"]
    assert set(g.tolist()) == {"medium"}


def test_unlisted_variables_keep_the_case_values():
    spec = V.parse_variability({"fires": 10, "seed": 3, "fire_load": CONTRACT["fire_load"]})
    drawn = V.samples(spec)
    assert set(drawn) == {"fire_load"}
    inputs = V.annex_a_inputs(drawn, 10, opening_factor_m05=0.05, thermal_inertia=1200.0,
                              design_fire_load_MJ_m2=500.0, fire_load_factor=0.8, floor_area_m2=240.0,
                              boundary_area_m2=700.0, growth="medium")
    assert inputs["opening_factor_m05"].tolist() == [0.05] * 10 and inputs["thermal_inertia"].tolist() == [1200.0] * 10
    assert inputs["t_lim_h"] == pytest.approx([20 / 60] * 10)  # EN 1991-1-2 A.(10): medium, 20 min
    # hand calculation, Annex A (4): q_t,d = 0.8 q_f x 240 / 700
    assert inputs["total_area_fire_load_MJ_m2"] == pytest.approx(0.8 * drawn["fire_load"] * 240 / 700, rel=1e-12)
    spec = V.parse_variability(CONTRACT)
    drawn = V.samples(spec, 20)
    inputs = V.annex_a_inputs(drawn, 20, opening_factor_m05=0.05, thermal_inertia=1200.0,
                              design_fire_load_MJ_m2=500.0, fire_load_factor=0.8, floor_area_m2=240.0,
                              boundary_area_m2=700.0, growth="medium")
    assert inputs["opening_factor_m05"] == pytest.approx(0.05 * drawn["opening_fraction"], rel=1e-15)
    fast = drawn["growth"] == "fast"
    assert inputs["t_lim_h"][fast] == pytest.approx([0.25] * int(fast.sum()))  # A.(10): fast, 15 min


# ---- an exact probability ---------------------------------------------------------------------

O_FULL, B, AF, AT, M = 0.05, 1200.0, 240.0, 700.0, 0.8  # invented compartment, demo values


def peak_gas(q_f):
    """theta_max [C] of the Annex A fire of the compartment above for a fire load density q_f."""
    return P.parametric_fire(O_FULL, B, M * q_f * AF / AT, 20 / 60).peak_gas_temperature_C


@pytest.mark.parametrize("threshold_C", [950.0, 700.0])
def test_exceedance_probability_equals_the_gumbel_tail(threshold_C):
    """Only the fire load random (Gumbel, mean 420, V 0.3). theta_max rises with q_f (jumping up where
    the fire turns ventilation-controlled, 639 C fuel side -> about 860 C), so theta_max > threshold
    exactly when q_f > q*, q* found by brentq; the exact probability is the Gumbel tail
    1 - exp(-exp(-(q* - loc)/scale)), loc and scale by the moments (hand formula). 700 C lies in the
    jump: q* is the regime boundary, 0.2e-3 q_t,d / O = t_lim, q_f = (1/3)(0.05)/0.2e-3 x 700/(0.8 x 240)
    = 303.8 MJ/m2 (hand calculation)."""
    q_star = brentq(lambda q: peak_gas(q) - threshold_C, 50.0, 3000.0, xtol=1e-9)
    if threshold_C == 700.0:
        assert q_star == pytest.approx((1 / 3) * 0.05 / 0.2e-3 * 700 / (0.8 * 240), rel=1e-6)
    scale = math.sqrt(6.0) * 126.0 / math.pi
    loc = 420.0 - 0.5772156649 * scale
    p_exact = 1.0 - math.exp(-math.exp(-(q_star - loc) / scale))
    n = 10000
    estimates = {}
    for method in V.METHODS:
        spec = V.parse_variability({"fires": n, "seed": 1, "method": method, "fire_load": CONTRACT["fire_load"]})
        drawn = V.samples(spec)
        inputs = V.annex_a_inputs(drawn, n, opening_factor_m05=O_FULL, thermal_inertia=B, design_fire_load_MJ_m2=0.0,
                                  fire_load_factor=M, floor_area_m2=AF, boundary_area_m2=AT, growth="medium")
        fires = P.parametric_fires(**inputs)
        count = int(np.count_nonzero(fires.peak_gas_temperature_C > threshold_C))
        e = V.exceedance_probability(count, n)
        assert e.lower <= p_exact <= e.upper, (method, count, p_exact)
        estimates[method] = e
        if method == "latin-hypercube":
            # stratification: per block of 1000 the count above a level is within 1 of 1000 p
            # (hand reasoning: every stratum wholly above holds one point, the one split stratum 0 or 1)
            assert abs(count - n * p_exact) <= n // V.BLOCK_SIZE
    lhs, rnd = estimates["latin-hypercube"], estimates["random"]
    assert lhs.lower <= rnd.upper and rnd.lower <= lhs.upper  # the two intervals overlap
    assert rnd.lower <= lhs.probability <= rnd.upper


# ---- statistics -------------------------------------------------------------------------------

def test_clopper_pearson_interval():
    # k = 0: upper = 1 - 0.025^(1/n); k = n: lower = 0.025^(1/n) (hand calculation from the definition)
    e = V.exceedance_probability(np.array([0, 50]), 50)
    assert e.upper[0] == pytest.approx(1 - 0.025 ** (1 / 50), rel=1e-9) and e.lower[0] == 0.0
    assert e.lower[1] == pytest.approx(0.025 ** (1 / 50), rel=1e-9) and e.upper[1] == 1.0
    # defining equations (Clopper and Pearson 1934, from memory): P(X >= k | lower) = 0.025 and
    # P(X <= k | upper) = 0.025 for X binomial(n, p) (scipy.stats.binom as reference)
    for k, n in ((1, 10), (7, 40), (37, 10000), (9000, 10000)):
        e = V.exceedance_probability(k, n)
        assert stats.binom.sf(k - 1, n, float(e.lower)) == pytest.approx(0.025, rel=1e-7)
        assert stats.binom.cdf(k, n, float(e.upper)) == pytest.approx(0.025, rel=1e-7)
        assert e.lower < k / n < e.upper and e.probability == k / n
    with pytest.raises(InputError):
        V.exceedance_probability(11, 10)
    with pytest.raises(InputError):
        V.exceedance_probability(1.5, 10)


def test_sample_fractile_is_the_inverse_empirical_cdf():
    rng = np.random.default_rng(5)
    x = rng.normal(600.0, 80.0, 997)
    for q in (0.05, 0.5, 0.9, 0.95, 0.999):
        assert V.sample_fractile(x, q) == np.quantile(x, q, method="inverted_cdf")  # numpy as reference
    # q n an integer with rounding: 0.1 x 30 = 3.0000000000000004 -> the 3rd value (hand)
    assert V.sample_fractile(np.arange(1.0, 31.0), 0.1) == 3.0
    assert V.sample_fractile([1.0, np.nan, 2.0, 3.0], 0.75) == 3.0
    assert V.sample_fractile([1.0, np.nan, 2.0, 3.0], 0.9) == math.inf  # reaches the NaN (worst) value
    assert math.isnan(V.sample_fractile([np.nan, np.nan], 0.5))


def test_histogram_fractile_within_one_bin_of_the_sample():
    rng = np.random.default_rng(8)
    peaks = rng.uniform(300.0, 900.0, (4000, 3))
    h = V.histograms(peaks, V.TEMPERATURE_BINS)
    assert h.fires.tolist() == [4000] * 3
    for q in (0.01, 0.5, 0.9, 0.99):
        exact = V.sample_fractile(peaks, q)
        read = h.fractile(q)
        assert np.all(read >= exact) and np.all(read - exact < 0.5 + 1e-9)  # bin width 0.5 C
    times = np.array([[14.0], [15.0], [29.95], [30.0], [59.9], [61.0], [700.0], [np.nan], [-1.0], [0.0]])
    ht = V.histograms(times, V.TIME_BINS)
    assert (int(ht.below[0]), int(ht.above[0]), int(ht.undefined[0])) == (2, 1, 1)  # -1 and 0; 700; NaN
    assert ht.fractile(0.1)[0] == 0.0 and ht.fractile(0.3)[0] == 14.0
    # sorted: -1, 0, 14, 15, 29.95, 30, 59.9, 61, 700, NaN; the k-th value's bin (right-closed) upper edge
    assert ht.fractile(0.5)[0] == 30.0 and ht.fractile(0.7)[0] == 59.9 and ht.fractile(0.8)[0] == 61.0
    assert ht.fractile(0.9)[0] == math.inf and ht.fractile(0.95)[0] == math.inf  # above the bins; NaN
    assert math.isnan(V.histograms(np.full((3, 1), np.nan), V.TIME_BINS).fractile(0.5)[0])


def test_tallies_merge_exactly_across_chunks():
    rng = np.random.default_rng(2)
    f, m = 3001, 4
    peak = rng.uniform(400.0, 800.0, (f, m))
    peak[rng.random((f, m)) < 0.01] = np.nan
    crit = np.array([500.0, 600.0, 650.0, 700.0])
    te = {"annex_f": rng.uniform(10.0, 130.0, (f, m))}
    whole = V.tally(peak, crit, te)
    merged = None
    for a, z in zip([0, 1, 1000, 1777, 3000], [1, 1000, 1777, 3000, 3001]):
        t = V.tally(peak[a:z], crit, {"annex_f": te["annex_f"][a:z]})
        merged = t if merged is None else merged.merge(t)
    assert merged.fires == whole.fires == f
    for name in ("exceedances", "undefined"):
        assert np.array_equal(getattr(merged, name), getattr(whole, name))
    for h0, h1 in ((merged.peak_steel, whole.peak_steel),
                   (merged.equivalent_time["annex_f"], whole.equivalent_time["annex_f"])):
        for name in ("counts", "below", "above", "undefined"):
            assert np.array_equal(getattr(h0, name), getattr(h1, name))
    # counts against a direct count; a NaN peak counts as exceeding in the probability
    assert whole.exceedances.tolist() == [int(np.sum(peak[:, j] > crit[j])) for j in range(m)]
    e = whole.exceedance()
    assert e.count.tolist() == [int(np.sum((peak[:, j] > crit[j]) | np.isnan(peak[:, j]))) for j in range(m)]
    assert np.all(whole.equivalent_time_fractile("annex_f", 0.9) - V.sample_fractile(te["annex_f"], 0.9) < 0.1 + 1e-9)


@pytest.mark.parametrize("t,period", [
    # EN 13501-2 classification periods R 15 ... 240 (from memory); the shortest period >= t
    (0.0, "R15"), (15.0, "R15"), (15.01, "R20"), (29.9, "R30"), (30.0, "R30"), (44.0, "R45"), (60.0, "R60"),
    (60.01, "R90"), (119.0, "R120"), (150.0, "R180"), (240.0, "R240"), (240.01, None), (math.inf, None),
    (math.nan, None),
])
def test_period_covering(t, period):
    assert V.period_covering(t) == period


def test_annual_probability():
    # hand calculation: rate = 1e-6 x 240 x 0.02 x 0.05 = 2.4e-7 per year; 1 - exp(-2.4e-7)
    assert V.annual_exceedance_probability(0.05, 240.0, 1e-6, 0.02) == pytest.approx(2.4e-7, rel=1e-6)
    # a large rate shows the Poisson form: 1 - exp(-0.5) = 0.393469 (hand calculation)
    assert V.annual_exceedance_probability(1.0, 500.0, 1e-3, 1.0) == pytest.approx(0.393469, abs=1e-6)
    with pytest.raises(InputError):
        V.annual_exceedance_probability(1.2, 500.0, 1e-3, 1.0)
