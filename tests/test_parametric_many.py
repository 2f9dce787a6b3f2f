"""Many Annex A fires at once (parametric.parametric_fires / parametric_gas_matrix).

References: hand calculations of EN 1991-1-2 Annex A eq (A.1)-(A.11) written out below, and the
one-fire function parametric.parametric_fire, which the vectorised form must equal fire by fire.
"""

import math

import numpy as np
import pytest

from steelfire.chain.fires import time_grid
from steelfire.errors import InputError
from steelfire.models.fire import parametric as P

GRID = np.arange(0.0, 180 * 60 + 1, 5.0)  # 5 s over 180 min


def random_fires(n, seed):
    """Fires spread over and a little beyond Annex A's box: O 0.015-0.25, b 80-2400, q_t,d 20-1100,
    t_lim of slow, medium and fast growth; a third of them in the corner where k applies."""
    rng = np.random.default_rng(seed)
    o = rng.uniform(0.015, 0.25, n)
    b = rng.uniform(80.0, 2400.0, n)
    q = rng.uniform(20.0, 1100.0, n)
    corner = rng.random(n) < 1 / 3
    o[corner] = rng.uniform(0.041, 0.2, corner.sum())
    b[corner] = rng.uniform(100.0, 1159.0, corner.sum())
    q[corner] = rng.uniform(20.0, 74.9, corner.sum())
    t_lim = rng.choice([25 / 60, 20 / 60, 15 / 60], n)
    return o, b, q, t_lim


def scalar_or_none(o, b, q, tl):
    try:
        return P.parametric_fire(float(o), float(b), float(q), float(tl))
    except InputError:
        return None


def test_matrix_equals_one_fire_at_a_time():
    """Each column equals parametric_fire(...).gas_temperature to 1e-9 relative (the brief's bound),
    over random fires that cover both regimes, the k factor, all three cooling rates and fires
    outside the Annex A range; t_max and the fire's own quantities agree too."""
    o, b, q, tl = random_fires(1500, seed=7)
    fires = P.parametric_fires(o, b, q, tl)
    t = time_grid(180 * 60.0, 30.0, [])
    gas = fires.gas_temperature(t)
    assert gas.shape == (t.size, o.size)
    seen = {"ventilation": 0, "fuel": 0, "k": 0, "rate625": 0, "rate_mid": 0, "rate250": 0, "undefined": 0,
            "out_of_scope": 0}
    for i in range(o.size):
        pf = scalar_or_none(o[i], b[i], q[i], tl[i])
        if pf is None:  # k <= 0: the one-fire function refuses; the many-fire one flags and leaves NaN
            seen["undefined"] += 1
            assert fires.scope[i] & P.SCOPE_BIT["k_factor_not_positive"]
            assert np.all(np.isnan(gas[:, i])) and math.isnan(fires.t_max_h[i])
            continue
        np.testing.assert_allclose(gas[:, i], pf.gas_temperature(t), rtol=1e-9, atol=0)
        assert fires.t_max_h[i] == pytest.approx(pf.t_max_h, rel=1e-12)
        assert fires.peak_gas_temperature_C[i] == pytest.approx(pf.peak_gas_temperature_C, rel=1e-12)
        assert fires.burnout_time_h[i] == pytest.approx(pf.burnout_time_h, rel=1e-12)
        assert fires.cooling_rate_C_h[i] == pytest.approx(pf.cooling_rate_C_h, rel=1e-12)
        assert bool(fires.fuel_controlled[i]) == (pf.regime == "fuel")
        if pf.k_factor is None:
            assert math.isnan(fires.k_factor[i])
        else:
            assert fires.k_factor[i] == pytest.approx(pf.k_factor, rel=1e-12)
            seen["k"] += 1
        seen[pf.regime] += 1
        r = pf.cooling_rate_C_h
        seen["rate625" if r == 625.0 else "rate250" if r == 250.0 else "rate_mid"] += 1
        seen["out_of_scope"] += bool(fires.scope[i])
    # the random set must reach every branch, or the comparison above proves little
    assert all(v >= 10 for v in seen.values()), seen


def test_scope_bits_match_scope_violations():
    """The findings per fire are the O, b and q_t,d limits that parametric.scope_violations names."""
    o, b, q, tl = random_fires(600, seed=11)
    fires = P.parametric_fires(o, b, q, tl)
    bit_field = {"opening_factor": "opening factor O", "thermal_inertia": "thermal inertia b",
                 "fire_load": "fire load q_t,d"}
    for i in range(o.size):
        named = {v[0] for v in P.scope_violations(o[i], b[i], q[i], None, None, 0.0)}
        from_bits = {f for key, f in bit_field.items()
                     if fires.scope[i] & (P.SCOPE_BIT[key + "_below"] | P.SCOPE_BIT[key + "_above"])}
        assert named == from_bits
    counts = fires.scope_counts()
    assert counts["fire_load_below"] == int(np.count_nonzero(q < 50.0))      # EN 1991-1-2 Annex A (7): 50 MJ/m2
    assert counts["opening_factor_above"] == int(np.count_nonzero(o > 0.20))  # Annex A (2): 0.20 m^0.5
    assert fires.out_of_scope.sum() == np.count_nonzero(fires.scope)


def test_ventilation_controlled_hand_calculation():
    """O = 0.04, b = 1160, q_t,d = 200, t_lim = 20 min. Hand calculation, EN 1991-1-2 Annex A:
    Gamma = 1 (eq (A.2b)); 0.2e-3 x 200 / 0.04 = 1.0 h > t_lim: ventilation-controlled, t_max = 1 h;
    theta_max = 20 + 1325 (1 - 0.324 e^-0.2 - 0.204 e^-1.7 - 0.472 e^-19)
              = 20 + 1325 (1 - 0.265269 - 0.037267 - 0.000000) = 944.14 C (eq (A.1));
    t*_max = 1.0 -> cooling 250 (3 - 1) = 500 C/h (eq (A.11b)); at 90 min 944.14 - 500 x 0.5 = 694.14 C;
    back at 20 C at 1 + 924.14 / 500 = 2.848 h."""
    fires = P.parametric_fires([0.04], [1160.0], [200.0], [20 / 60])
    assert fires.peak_gas_temperature_C[0] == pytest.approx(944.14, abs=0.01)
    assert fires.cooling_rate_C_h[0] == pytest.approx(500.0, rel=1e-12)
    assert fires.burnout_time_h[0] == pytest.approx(2.848, abs=0.001)
    g = fires.gas_temperature([3600.0, 5400.0, 4 * 3600.0])[:, 0]
    assert g == pytest.approx([944.14, 694.14, 20.0], abs=0.01)


def test_fuel_controlled_with_k_hand_calculation():
    """O = 0.1, b = 800, q_t,d = 60, t_lim = 20 min. Hand calculation, EN 1991-1-2 Annex A:
    0.2e-3 x 60 / 0.1 = 0.12 h < 1/3 h: fuel-controlled (eq (A.4)); O_lim = 0.1e-3 x 60 x 3 = 0.018
    (eq (A.6)); Gamma_lim = (0.018/800)^2 / (0.04/1160)^2 = 0.42576 (eq (A.5));
    k = 1 + (0.06/0.04)((60 - 75)/75)((1160 - 800)/1160) = 1 - 0.093103 = 0.906897 (eq (A.8));
    t* = (1/3)(0.42576)(0.906897) = 0.128706 h; theta_max = 20 + 1325 (1 - 0.324 e^-0.025741
    - 0.204 e^-0.218800 - 0.472 e^-2.445407) = 20 + 1325 x 0.479416 = 655.21 C.
    Cooling: Gamma = (0.1/800)^2/(0.04/1160)^2 = 13.1406, t*_max = 0.12 x 13.1406 = 1.57688,
    rate 250 (3 - 1.57688) = 355.78 C/h, x = (1/3)/0.12 = 2.7778; 20 C when 13.1406 t = 1.57688 x 2.7778
    + 635.21 / 355.78 = 6.16562, t = 0.46920 h."""
    fires = P.parametric_fires(0.1, 800.0, 60.0, 20 / 60)
    assert bool(fires.fuel_controlled[0]) and fires.scope[0] == 0
    assert fires.k_factor[0] == pytest.approx(0.906897, abs=1e-6)
    assert fires.gamma_lim[0] == pytest.approx(0.42576 * 0.906897, rel=1e-5)
    assert fires.peak_gas_temperature_C[0] == pytest.approx(655.21, abs=0.01)
    assert fires.cooling_rate_C_h[0] == pytest.approx(355.78, abs=0.01)
    assert fires.burnout_time_h[0] == pytest.approx(0.46920, abs=1e-5)


def test_undefined_fires_are_flagged_not_dropped():
    """k <= 0 (O = 0.2, q_t,d = 20, b = 500: k = 1 + 4 (-0.7333)(0.5690) = -0.669, hand calculation of
    eq (A.8)) and non-positive inputs give NaN columns and a finding; the other fires are untouched."""
    o = np.array([0.2, 0.05, -0.01, 0.05, 0.05])
    b = np.array([500.0, 1200.0, 1200.0, 1200.0, np.nan])
    q = np.array([20.0, 300.0, 300.0, 0.0, 300.0])
    with pytest.raises(InputError):
        P.parametric_fire(0.2, 500.0, 20.0, 20 / 60)
    fires = P.parametric_fires(o, b, q, 20 / 60)
    gas = fires.gas_temperature(GRID)
    assert fires.count == 5 and gas.shape == (GRID.size, 5)
    assert fires.defined.tolist() == [False, True, False, False, False]
    assert fires.scope_counts()["k_factor_not_positive"] == 1
    assert fires.scope_counts()["input_not_positive"] == 3
    assert np.isnan(gas[:, [0, 2, 3, 4]]).all() and not np.isnan(gas[:, 1]).any()
    np.testing.assert_array_equal(gas[:, 1], P.parametric_fire(0.05, 1200.0, 300.0, 20 / 60).gas_temperature(GRID))


def test_columns_do_not_depend_on_the_other_fires():
    """A fire's column is the same, bit for bit, whether it is computed alone, in a small split or in
    one call of several passes (more fires than GAS_MATRIX_CHUNK)."""
    o, b, q, tl = random_fires(P.GAS_MATRIX_CHUNK * 2 + 37, seed=3)
    whole = P.parametric_gas_matrix(GRID, o, b, q, tl)
    cuts = [0, 1, 200, 513, 900, o.size]
    parts = [P.parametric_gas_matrix(GRID, o[a:z], b[a:z], q[a:z], tl[a:z]) for a, z in zip(cuts, cuts[1:])]
    np.testing.assert_array_equal(np.concatenate(parts, axis=1), whole)


def test_broadcasting_and_bad_shapes():
    fires = P.parametric_fires([0.03, 0.05, 0.08], 1200.0, 400.0, 20 / 60)
    assert fires.count == 3 and fires.thermal_inertia.tolist() == [1200.0] * 3
    with pytest.raises(InputError):
        P.parametric_fires([0.03, 0.05], [1000.0, 1200.0, 1400.0], 400.0, 20 / 60)
    with pytest.raises(InputError):
        P.parametric_fires(np.ones((2, 2)) * 0.05, 1200.0, 400.0, 20 / 60)
    with pytest.raises(InputError):
        fires.gas_temperature(np.ones((3, 3)))
