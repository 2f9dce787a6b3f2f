"""Review of ``steelfire sample``: what it prints as a probability, an interval, a fractile or a covering
period, each against a reference outside the code under test.

References: scipy.stats (binomtest's exact Clopper-Pearson interval, binom, poisson, gumbel_r, lognorm,
triang, kstest, spearmanr); EN 1991-1-2 Annex A eq (A.1), (A.2a), (A.5) written out here; the order-statistic
bound on a fractile (Wilks 1941, 59 runs for 95 % / 95 %; from memory); hand calculations in the comments.
"""

from __future__ import annotations

import math
import sys
from pathlib import Path

import numpy as np
import pytest
from scipy import stats

from steelfire.chain import sampling as S
from steelfire.inputs.case import case_from_dict
from steelfire.models import variability as V

sys.path.insert(0, str(Path(__file__).resolve().parent))
from test_sampling import CASE, GUMBEL_OFFICE, load  # noqa: E402

try:
    import tomllib
except ImportError:  # pragma: no cover - Python 3.10
    import tomli as tomllib


def case_with(**analysis):
    """The bundled case through the loader, with [analysis] keys changed (so the loader's checks hold)."""
    data = tomllib.loads(CASE.read_text(encoding="utf-8"))
    data.pop("variability")
    data["analysis"].update(analysis)
    return case_from_dict(data, base_dir=CASE.parent)


def exact_ci(k: int, n: int):
    """Clopper-Pearson 95 % interval by scipy.stats.binomtest (the reference, not the code under test)."""
    ci = stats.binomtest(int(k), int(n)).proportion_ci(confidence_level=0.95, method="exact")
    return ci.low, ci.high


# ---- findings: tests that failed on the code as reviewed --------------------------------------

def test_a_fractile_beyond_the_standard_fire_horizon_is_not_covered():
    """Finding: with every fire's peak beyond the standard-fire horizon (60 min here), the equal-temperature
    fractile has no value; the section gave required_covers_fractile = null, the same as for a route that
    does not apply, instead of false. Hand reasoning: an equivalent time beyond a 60 min horizon exceeds
    required_minutes = 60 (and 30), so the required period cannot cover it."""
    case = case_with(standard_horizon_min=60.0)
    res = S.run(case, variability={"fires": 20, "seed": 1,
                                   "fire_load": {"distribution": "fixed", "value_MJ_m2": 900.0}}, progress=False)
    sec = res.to_dict()
    checked = 0
    for m in sec["members"]:
        assert m["equal_temperature_beyond_horizon_fires"] == 20
        assert m["no_period_covers_fractile"]["equal_temperature"] is True
        if m["required_minutes"] is not None:
            assert m["required_covers_fractile"]["equal_temperature"] is False, m["name"]
            checked += 1
    assert checked == 4
    tie = sec["members"][res.names.index("T3-01 tie")]
    assert tie["no_period_covers_fractile"]["cib_w14"] is None  # CIB W14 does not apply to bare steel
    assert any("No standard period up to R240 covers" in w for w in sec["warnings"])


def test_a_fractile_reaching_the_fires_beyond_the_horizon_is_not_covered():
    """The same with only some fires beyond the 60 min horizon (the contract's distributions): where the
    fractile reaches them it is +inf, so 'covers' must be false (hand reasoning as above)."""
    case, var = load()
    res = S.run(case_with(standard_horizon_min=60.0), variability=dict(var, fires=50), progress=False)
    sec = res.to_dict()
    t = res.route_fractiles("equal_temperature", 0.9)
    seen = 0
    for i, m in enumerate(sec["members"]):
        if math.isinf(t[i]) and m["required_minutes"] is not None:
            assert m["required_covers_fractile"]["equal_temperature"] is False
            assert m["period_covering_fractile"]["equal_temperature"] is None
            assert m["no_period_covers_fractile"]["equal_temperature"] is True
            seen += 1
    assert seen >= 1


def test_interval_ends_are_rounded_outward():
    """Finding: the interval ends were rounded to nearest (6 figures), so a shown upper end could lie
    below the exact one, and the exit code compares the shown upper end with target_probability. Every
    shown end must lie outside the exact Clopper-Pearson interval of scipy.stats.binomtest."""
    case, var = load()
    res = S.run(case, variability=dict(var, fires=50), progress=False)
    sec = res.to_dict()
    for m in sec["members"]:
        lo, hi = exact_ci(m["exceedances"], 50)
        assert m["exceedance_interval"][0] <= lo and m["exceedance_interval"][1] >= hi, (m["name"], lo, hi)
        assert m["exceedance_interval"][1] - hi <= 10.0 ** (math.floor(math.log10(hi)) - 5)  # a 6th-figure unit
        # the annual interval: 1 - exp(-rate) is monotone, so its ends come from the ends above
        rate = 1e-5 * 180.0 * 0.1  # the case's ignition rate x A_f x suppression failure [1/year]
        assert m["annual_exceedance_interval"][1] >= -math.expm1(-rate * hi)
        assert m["annual_exceedance_interval"][0] <= -math.expm1(-rate * lo)
    # the rounding itself: hand-picked values either side
    assert S._sig_outward(0.1234564, up=True) == 0.123457 and S._sig_outward(0.1234566, up=False) == 0.123456
    assert S._sig_outward(0.0999999996, up=False) == 0.0999999 and S._sig_outward(0.0999999996, up=True) == 0.1
    assert S._sig_outward(0.25, up=True) == 0.25 and S._sig_outward(0.0, up=False) == 0.0


def test_fractiles_resting_on_too_few_fires_are_flagged():
    """Finding: with 50 fires the 0.99 fractile is the largest sampled value (k = ceil(0.99 x 50) = 50),
    shown like any other; it now carries its rank and a warning. Hand calculation: a value below the
    largest needs n > 1 / (1 - 0.99) = 100; a 95 % upper bound on the 0.99 fractile needs
    n >= ln 0.05 / ln 0.99 = 298.07, so 299 fires."""
    case, var = load()
    res = S.run(case, variability=dict(var, fires=50), progress=False)
    sec = res.to_dict()
    b = sec["fractile_basis"]["0.99"]
    assert (b["rank"], b["fires_above"], b["upper_95_rank"], b["fires_for_upper_95"]) == (50, 0, None, 299)
    assert any("0.99 fractile of 50 fires is the largest sampled value" in w for w in sec["warnings"])
    # the target fractile 0.9: rank 45; its 95 % upper bound is the least r with P(Bin(50, 0.9) <= r - 1)
    # >= 0.95 (scipy.stats.binom scanned here)
    r_ref = next(r for r in range(1, 51) if stats.binom.cdf(r - 1, 50, 0.9) >= 0.95)
    assert sec["fractile_basis"]["0.9"]["rank"] == 45 and sec["fractile_basis"]["0.9"]["upper_95_rank"] == r_ref
    for m in sec["members"]:
        for r in S.ROUTES:
            t, u = m["equivalent_time_at_fractile_min"][r], m["equivalent_time_at_fractile_upper_95_min"][r]
            if t is not None and u is not None:
                assert u >= t


def test_probability_denominator_is_stated_and_the_in_scope_estimate_given():
    """The probability is exceedances / all fires, out-of-scope fires included (the denominator is now
    stated), and the in-scope-only estimate is given beside it; its interval against scipy.stats.binomtest.
    Openings from 10 % open put O below Annex A's 0.02 in some fires."""
    case, _ = load()
    res = S.run(case, variability={"fires": 200, "seed": 5,
                                   "opening_fraction": {"distribution": "uniform", "low": 0.1, "high": 1.0}},
                progress=False)
    sec = res.to_dict()
    pb = sec["probability_basis"]
    n_out = sec["out_of_scope_fires"]
    assert n_out > 0 and (pb["denominator_fires"], pb["out_of_scope_fires"], pb["in_scope_fires"]) == (200, n_out,
                                                                                                        200 - n_out)
    for m in sec["members"]:
        assert m["exceedance_probability"] == pytest.approx(m["exceedances"] / 200, rel=1e-6)
        k_in = m["exceedances"] - m["exceedances_in_out_of_scope_fires"]
        assert m["exceedance_probability_in_scope_fires"] == pytest.approx(k_in / (200 - n_out), rel=1e-6)
        lo, hi = exact_ci(k_in, 200 - n_out)
        assert m["exceedance_interval_in_scope_fires"][0] <= lo and m["exceedance_interval_in_scope_fires"][1] >= hi


# ---- independent checks of what was found right --------------------------------------------------

@pytest.mark.parametrize("q,n", [(0.9, 29), (0.9, 28), (0.95, 59), (0.95, 58), (0.9, 50), (0.9, 10000),
                                 (0.99, 10000), (0.5, 7)])
def test_fractile_upper_rank_against_the_binomial(q, n):
    """The order-statistic bound: rank r is the least with P(Bin(n, q) <= r - 1) >= 0.95 (scipy.stats.binom
    scanned); none for n below ln 0.05 / ln q (29 for 0.9 and 59 for 0.95: Wilks 1941, from memory)."""
    ref = next((r for r in range(1, n + 1) if stats.binom.cdf(r - 1, n, q) >= 0.95), None)
    assert V.fractile_upper_rank(q, n) == ref
    if (q, n) in ((0.9, 28), (0.95, 58)):
        assert ref is None
    assert V.fires_for_upper_bound(0.95) == 59 and V.fires_for_upper_bound(0.9) == 29


def test_fractile_upper_bound_covers_by_simulation():
    """Monte Carlo: 20,000 samples of 100 uniforms; the upper_95 rank's order statistic lies at or above
    the true 0.9 fractile (0.9) in at least 95 % of them (less 3 standard errors, 0.0046)."""
    r = V.fractile_upper_rank(0.9, 100)
    u = np.sort(np.random.default_rng(3).random((20000, 100)), axis=1)
    share = float(np.mean(u[:, r - 1] >= 0.9))
    assert share >= 0.95 - 0.0046
    # and the point estimate (k = 90) does not: about half (hand reasoning: the median of Bin(100, 0.9) is 90)
    assert float(np.mean(u[:, 89] >= 0.9)) < 0.7


@pytest.mark.parametrize("k,n", [(0, 1), (1, 1), (0, 2), (2, 2), (0, 10), (10, 10), (1, 7), (0, 10000), (37, 10000)])
def test_clopper_pearson_against_scipy_at_the_ends_and_tiny_n(k, n):
    """p = 0, p = 1 and tiny n: the interval equals scipy.stats.binomtest's exact one to 1e-12."""
    e = V.exceedance_probability(k, n)
    lo, hi = exact_ci(k, n)
    assert float(e.lower) == pytest.approx(lo, abs=1e-12) and float(e.upper) == pytest.approx(hi, abs=1e-12)
    assert float(e.probability) == k / n


def test_distributions_of_a_latin_hypercube_block_against_scipy():
    """One full block of 1000 Latin-hypercube points has one point in each 1/1000 stratum per column, so
    its empirical CDF lies within 1/1000 of the distribution's CDF at every sample (hand reasoning). The
    references are written from the definitions: Gumbel by its moments (scale = sqrt(6) sd / pi, loc =
    mean - 0.5772157 scale, from memory), lognormal with median mean / sqrt(1 + V^2) and
    sigma^2 = ln(1 + V^2), scipy.stats.triang."""
    ref = {
        "fire_load": stats.gumbel_r(loc=420.0 - 0.5772157 * math.sqrt(6) * 126.0 / math.pi,
                                    scale=math.sqrt(6) * 126.0 / math.pi),
        "thermal_inertia": stats.lognorm(s=math.sqrt(math.log(1.09)), scale=1100.0 / math.sqrt(1.09)),
        "opening_fraction": stats.triang(c=0.5, loc=0.4, scale=0.6),
    }
    spec = V.parse_variability({"fires": 2000, "seed": 4, "fire_load": GUMBEL_OFFICE,
                                "thermal_inertia": {"distribution": "lognormal", "mean": 1100.0, "cov": 0.3},
                                "opening_fraction": {"distribution": "triangular", "low": 0.4, "mode": 0.7,
                                                     "high": 1.0}})
    drawn = V.samples(spec)
    for name, d in ref.items():
        for block in (slice(0, 1000), slice(1000, 2000)):
            x = np.sort(drawn[name][block])
            f = d.cdf(x)
            i = np.arange(1, 1001)
            assert np.max(np.maximum(np.abs(i / 1000 - f), np.abs((i - 1) / 1000 - f))) <= 1e-3 + 1e-9, name
    rnd = V.samples(V.parse_variability({"fires": 2000, "seed": 4, "method": "random", "fire_load": GUMBEL_OFFICE}))
    assert stats.kstest(rnd["fire_load"], ref["fire_load"].cdf).pvalue > 1e-3


def test_latin_hypercube_columns_are_independent():
    """Within each block the columns are permuted independently: Spearman's rho between any two columns
    lies within 4 / sqrt(999) = 0.127 of 0 (4 standard errors under independence, hand calculation), and
    the pairing of the strata differs from block to block."""
    blocks = [V.unit_block("latin-hypercube", 7, i) for i in range(3)]
    for u in blocks:
        for a in range(V.DIMENSIONS):
            for b in range(a + 1, V.DIMENSIONS):
                assert abs(stats.spearmanr(u[:, a], u[:, b]).statistic) < 4 / math.sqrt(999)
    ranks = [np.argsort(np.argsort(u[:, 0])) for u in blocks]
    assert not np.array_equal(ranks[0], ranks[1]) and not np.array_equal(ranks[1], ranks[2])


def test_annual_probability_is_the_poisson_probability_of_one_or_more():
    """rate [1/year] = ignition [1/(m2 year)] x A_f [m2] x P(suppression fails) x P(exceed | fire); the
    annual probability of at least one such fire is scipy.stats.poisson.sf(0, rate)."""
    for p, a_f, lam, ps in ((0.02, 180.0, 1e-5, 0.1), (1.0, 2000.0, 5e-4, 1.0), (0.0, 50.0, 1e-6, 0.5)):
        rate = lam * a_f * ps * p
        assert V.annual_exceedance_probability(p, a_f, lam, ps) == pytest.approx(stats.poisson.sf(0, rate),
                                                                                 rel=1e-12, abs=1e-300)


def test_out_of_scope_fires_are_computed_as_published_not_clipped():
    """Fires with O below Annex A's 0.02 keep their own O (fraction x the case's O, not 0.02), and a
    ventilation-controlled one's peak gas temperature is eq (A.1) at t* = Gamma t_max with
    Gamma = ((O/b)/(0.04/1160))^2 (A.2a) and t_max = 0.2e-3 q_t,d / O (A.5), written out here."""
    case, _ = load()
    res = S.run(case, variability={"fires": 200, "seed": 5,
                                   "opening_fraction": {"distribution": "uniform", "low": 0.1, "high": 1.0}},
                progress=False)
    c = res.counts.fire_columns
    o_case = S.chain_fires.severity(case)["opening_factor_m05"]
    np.testing.assert_allclose(c["opening_factor_m05"], o_case * c["opening_fraction"], rtol=1e-15)
    low = (c["opening_factor_m05"] < 0.02) & ~c["fuel_controlled"]
    assert np.count_nonzero(low) >= 5
    o, b, q = c["opening_factor_m05"][low], c["thermal_inertia"][low], c["total_area_fire_load_MJ_m2"][low]
    t_max = 0.2e-3 * q / o
    ts = ((o / b) / (0.04 / 1160.0)) ** 2 * t_max
    theta = 20 + 1325 * (1 - 0.324 * np.exp(-0.2 * ts) - 0.204 * np.exp(-1.7 * ts) - 0.472 * np.exp(-19 * ts))
    np.testing.assert_allclose(c["peak_gas_temperature_C"][low], theta, rtol=1e-9)
    np.testing.assert_allclose(c["t_max_min"][low], 60 * t_max, rtol=1e-12)


def test_sized_thickness_is_judged_on_the_upper_end_with_the_same_fires():
    """--size: the section says the criterion is the upper end of the 95 % interval (the safe one: the point
    estimate can be below the target while the fires do not show it); at the chosen thickness the final
    statistics (the same fires, the same seed) give the sizing's count, and the exact upper end
    (scipy.stats.binomtest) is below the target; the next thinner one's is not."""
    case, var = load()
    res = S.run(case, variability=dict(var, fires=300, target_probability=0.05), size=True, progress=False)
    sec = res.to_dict()
    n = 300
    seen_point_below = False
    for i, m in enumerate(sec["members"]):
        s = m["sizing"]
        if s is None or not s["achievable"]:
            continue
        assert s["criterion"].startswith("upper end of the 95 % interval")
        assert m["protection_thickness_mm"] == s["chosen_mm"]
        assert m["exceedance_probability"] == s["exceedance_probability"]
        assert exact_ci(m["exceedances"], n)[1] < 0.05
        if s["next_thinner_mm"] is not None:
            k = round(s["next_thinner_exceedance_probability"] * n)
            assert exact_ci(k, n)[1] >= 0.05
            seen_point_below |= k / n < 0.05
    assert seen_point_below  # a thinner board whose point estimate alone would have passed was refused
