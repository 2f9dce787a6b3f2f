"""Localised fire, EN 1991-1-2 Annex C: Heskestad flame and plume, Hasemi ceiling flux, member exposure."""

import math

import numpy as np
import pytest

from steelfire.errors import InputError, OutOfScopeError
from steelfire.models.fire import ceilingjet, heatrelease, localised as lo, surface


# ---- Heskestad: flame length, virtual origin, plume -----------------------------------------------

def test_flame_length_hand_values():
    # hand calculation, eq (C.1): Q = 5 MW, D = 2 m: Q^(2/5) = exp(0.4 x 15.424948) = exp(6.169979) = 478.176;
    # L_f = -1.02 x 2 + 0.0148 x 478.176 = -2.04 + 7.07700 = 5.03700 m
    assert float(lo.flame_length_m(5e6, 2.0)) == pytest.approx(5.03700, abs=1e-5)
    # Q = 1 MW, D = 1 m: (1e6)^(2/5) = 10^2.4 = 251.19; L_f = -1.02 + 0.0148 x 251.19 = 2.6976 m
    assert float(lo.flame_length_m(1e6, 1.0)) == pytest.approx(2.6976, abs=1e-4)


def test_flame_length_is_heskestad_in_kW():
    # Heskestad's form with Q in kW, L = 0.235 Q_kW^(2/5) - 1.02 D (from memory): the annex's 0.0148 is
    # 0.235 / 1000^(2/5) = 0.235 / 15.8489 = 0.014827 (hand calculation), so the Q terms agree to 0.2 %
    for q, d in [(1e6, 1.0), (5e6, 2.0), (40e6, 8.0)]:
        hesk_q_term = 0.235 * (q / 1e3) ** 0.4
        assert float(lo.flame_length_m(q, d)) + 1.02 * d == pytest.approx(hesk_q_term, rel=2e-3)


def test_virtual_origin_hand_value():
    # hand calculation, eq (C.3): -1.02 x 2 + 0.00524 x 478.176 = -2.04 + 2.505644 = 0.465644 m
    assert float(lo.virtual_origin_m(5e6, 2.0)) == pytest.approx(0.465644, abs=1e-6)


def test_plume_temperature_hand_value():
    # hand calculation, eq (C.2): Q = 5 MW, D = 2 m, z = 6 m; Q_c = 0.8 x 5e6 = 4e6 W,
    # Q_c^(2/3) = 4^(2/3) x 1e4 = 25 198.42; z - z_0 = 6 - 0.465644 = 5.534356;
    # 5.534356^(-5/3) = exp(-5/3 x 1.710975) = exp(-2.851625) = 0.0577504;
    # theta = 20 + 0.25 x 25 198.42 x 0.0577504 = 20 + 363.80 = 383.80 C
    assert float(lo.plume_temperature_C(6.0, 5e6, 2.0)) == pytest.approx(383.80, abs=0.01)


def test_plume_temperature_capped_at_900():
    # EN 1991-1-2 eq (C.2): theta(z) <= 900 C; at z = z_0 + 0.5 m the formula gives
    # 20 + 0.25 x 25 198.4 x 0.5^(-5/3) = 20 + 6299.6 x 3.1748 = 20020 C (hand calculation) -> 900
    z0 = float(lo.virtual_origin_m(5e6, 2.0))
    assert float(lo.plume_temperature_C(z0 + 0.5, 5e6, 2.0)) == 900.0
    assert float(lo.plume_temperature_C(max(z0 - 0.1, 0.0), 5e6, 2.0)) == 900.0   # at/below z_0: in the flame
    assert float(lo.plume_temperature_C(3.0, 0.0, 2.0)) == 20.0                     # no fire: ambient


def test_plume_falls_with_height():
    # eq (C.2): (z - z_0)^(-5/3) decreases with z; held at 900 C low down
    t = lo.plume_temperature_C(np.linspace(0.0, 20.0, 201), 5e6, 2.0)
    assert t[0] == 900.0 and np.all(np.diff(t) <= 0) and np.all(np.diff(t[t < 900.0]) < 0)


# ---- Hasemi: ceiling flux ---------------------------------------------------------------------------

@pytest.mark.parametrize("y,flux", [
    (0.0, 100e3), (0.2, 100e3), (0.30, 100e3),      # eq (C.4), first branch: 100 kW/m2
    (0.5, 75.8e3),                                   # hand calculation: 136 300 - 121 000 x 0.5 = 75 800
    (0.9, 27.4e3),                                   # hand calculation: 136 300 - 108 900 = 27 400
    (1.0, 15e3),                                     # third branch at y = 1: 15 000 x 1
    (2.0, 1154.2),                                   # hand calculation: 15 000 x 2^-3.7 = 15 000 x 0.076947
])
def test_hasemi_branches(y, flux):
    assert float(lo.ceiling_flux_from_y_W_m2(y)) == pytest.approx(flux, abs=0.1)


def test_hasemi_joints():
    e = 1e-9
    # y = 0.30: the first two branches meet (hand calculation: 136 300 - 121 000 x 0.3 = 100 000)
    below, above = lo.ceiling_flux_from_y_W_m2([0.30, 0.30 + e])
    assert above == pytest.approx(below, abs=1e-3)
    # y = 1.0: as published the branches differ by 300 W/m2 (136 300 - 121 000 = 15 300 from below,
    # 15 000 x 1^-3.7 = 15 000 from above; hand calculation); kept as published, a 2 % step
    below, above = lo.ceiling_flux_from_y_W_m2([1.0 - e, 1.0])
    assert below == pytest.approx(15300.0, abs=1e-3)
    assert above == pytest.approx(15000.0, abs=1e-9)
    # between the joints the flux never rises with y
    assert np.all(np.diff(lo.ceiling_flux_from_y_W_m2(np.linspace(0.0, 5.0, 5001))) <= 0.0)


def test_ceiling_flux_chain_hand_value():
    # hand calculation, Q = 20 MW, D = 3 m, H = 4 m, r = 3 m:
    # eq (C.6) Q_H* = 20e6 / (1.11e6 x 4^2.5) = 20e6 / 35.52e6 = 0.563063; 0.563063^0.33 = 0.827340;
    # eq (C.5) L_h = 2.9 x 4 x 0.827340 - 4 = 5.59714 m;
    # eq (C.8) Q_D* = 20e6 / (1.11e6 x 3^2.5) = 20e6 / 17.3032e6 = 1.155856 >= 1;
    # eq (C.7) z' = 2.4 x 3 x (1 - 1.155856^0.4) = 7.2 x (1 - 1.059648) = -0.42946 m;
    # y = (3 + 4 - 0.42946) / (5.59714 + 4 - 0.42946) = 6.57054 / 9.16768 = 0.716707;
    # eq (C.4) h = 136 300 - 121 000 x 0.716707 = 49 578.5 W/m2
    assert float(lo.horizontal_flame_length_m(20e6, 4.0)) == pytest.approx(5.59714, abs=1e-5)
    assert float(lo.virtual_source_height_m(20e6, 3.0)) == pytest.approx(-0.42946, abs=1e-5)
    assert float(lo.ceiling_y(3.0, 20e6, 3.0, 4.0)) == pytest.approx(0.716707, abs=1e-6)
    assert float(lo.ceiling_flux_W_m2(3.0, 20e6, 3.0, 4.0)) == pytest.approx(49578.5, abs=0.1)
    # the flame reaches the ceiling here (eq (C.1): -3.06 + 0.0148 x 832.553 = 9.26 m >= 4 m)
    assert float(lo.flame_length_m(20e6, 3.0)) == pytest.approx(9.2618, abs=1e-4)


def test_virtual_source_low_branch_and_joint():
    # hand calculation, eq (C.7) with Q_D* < 1: Q = 5 MW, D = 4 m, Q_D* = 5e6 / (1.11e6 x 32) = 0.140766;
    # 0.140766^0.4 = 0.456456, 0.140766^(2/3) = 0.270602; z' = 2.4 x 4 x 0.185854 = 1.78420 m
    assert float(lo.virtual_source_height_m(5e6, 4.0)) == pytest.approx(1.78420, abs=1e-5)
    # at Q_D* = 1 both branches give 0 (1 - 1 = 0; hand calculation)
    d = 3.0
    q1 = 1.11e6 * d ** 2.5
    np.testing.assert_allclose(lo.virtual_source_height_m([q1 * (1 - 1e-12), q1], d), [0.0, 0.0], atol=1e-9)


def test_several_fires_add_up_to_100kW():
    # EN 1991-1-2 eq (C.10): h_tot = h_1 + h_2 + ... <= 100 kW/m2
    assert float(lo.total_flux_W_m2([30e3, 40e3])) == pytest.approx(70e3)   # hand: 30 + 40 = 70
    assert float(lo.total_flux_W_m2([60e3, 50e3])) == 100e3                 # hand: 110 -> capped at 100
    both = lo.total_flux_W_m2(np.array([[30e3, 80e3], [20e3, 40e3]]), axis=0)
    np.testing.assert_allclose(both, [50e3, 100e3])


def test_equivalent_diameter():
    # geometry: a 10 m2 circle has D = sqrt(40 / pi) = 3.5682 m
    assert lo.equivalent_diameter_m(10.0) == pytest.approx(3.5682, abs=1e-4)


# ---- member exposure -----------------------------------------------------------------------------

def ramp(q_end=30e6, n=301):
    """Q rising linearly from 0 to q_end over 50 min (invented demo values)."""
    t = np.linspace(0.0, 3000.0, n)
    return t, q_end * t / t[-1]


def test_exposure_above_the_fire_is_the_plume_axis():
    # r <= D/2 with the flame below the ceiling: eq (C.2) at the member's height (the stated rule)
    t, q = ramp(5e6)
    e = lo.member_exposure(t, q, 2.0, 8.0, 0.5, 6.0)
    assert not e.impacts_ceiling.any()        # eq (C.1): L_f at 5 MW, D = 2 is 5.04 m < 8 m
    np.testing.assert_allclose(e.gas_temperature_C, lo.plume_temperature_C(6.0, q, 2.0))
    assert e.gas_temperature_C[-1] == pytest.approx(383.80, abs=0.01)   # hand value above
    assert np.all(e.governing == lo.PLUME)
    assert np.isnan(e.flux_W_m2).all()
    np.testing.assert_array_equal(e.effective_gas_temperature_C, e.gas_temperature_C)


def test_exposure_off_axis_is_the_capped_ceiling_jet():
    # r > D/2 with the flame below the ceiling: Alpert's jet at r (the stated rule), capped at theta(H)
    t, q = ramp(5e6)
    e = lo.member_exposure(t, q, 2.0, 8.0, 6.0, 3.0)
    jet = ceilingjet.ceiling_jet_temperature_C(6.0, q, 8.0)
    np.testing.assert_allclose(e.gas_temperature_C, np.minimum(jet, lo.plume_temperature_C(8.0, q, 2.0)))
    # hand calculation at 5 MW = 5000 kW, H = 8 m, r = 6 m (r/H = 0.75 > 0.18):
    # 20 + 5.38 x (5000 / 6)^(2/3) / 8 = 20 + 5.38 x 88.55 / 8 = 79.55 C
    assert e.gas_temperature_C[-1] == pytest.approx(79.55, abs=0.02)


def test_exposure_with_flame_at_the_ceiling_is_a_flux():
    """Q = 20 MW, D = 3 m, H = 4 m, r = 3 m: eq (C.4) gives 49 578.5 W/m2 (hand value above) and governs.

    The bound, by hand: Alpert at r/H = 0.75: 20 + 5.38 x (20 000 / 3)^(2/3) / 4 = 20 + 5.38 x 354.22 / 4
    = 496.4 C (below theta(H) = 900 C, eq (C.2) capped); its flux equivalent 35 x 476.4 + 0.7 x 5.67e-8 x
    (769.4^4 - 293^4) = 16 675 + 13 617 = 30 292 W/m2 < 49 578.5.
    """
    t = np.array([0.0, 60.0])
    q = np.array([20e6, 20e6])
    e = lo.member_exposure(t, q, 3.0, 4.0, 3.0, 4.0)
    assert e.impacts_ceiling.all()
    np.testing.assert_allclose(e.flux_W_m2, 49578.5, atol=0.1)
    assert np.all(e.governing == lo.CEILING_FLUX)
    assert np.isnan(e.gas_temperature_C).all()
    assert e.incident_flux_W_m2[0] == e.flux_W_m2[0]


def test_exposure_never_falls_as_the_fire_grows():
    """With Q rising, the member's exposure rises too, through L_f = H (the reason for the bound)."""
    t, q = ramp(30e6, 3001)
    for r, z in [(0.0, 4.0), (0.0, 2.0), (1.5, 4.0), (5.0, 4.0), (12.0, 3.0)]:
        e = lo.member_exposure(t, q, 3.0, 4.0, r, z)
        assert e.impacts_ceiling.any() and not e.impacts_ceiling.all()
        assert np.all(np.diff(e.effective_gas_temperature_C) >= -1e-9)
        assert np.all(np.diff(e.incident_flux_W_m2) >= -1e-6)


def test_annex_flux_alone_would_fall_at_the_threshold():
    """What the bound is for: a small fire under a high ceiling, on its axis, as the flame reaches it.

    Just below L_f = H the plume at the ceiling is at 520 C whatever Q and D (eq (C.2) at z = L_f;
    hand calculation: L_f - z_0 = (0.0148 - 0.00524) Q^(2/5), so theta - 20 = 0.25 x 0.8^(2/3) x
    0.00956^(-5/3) = 0.25 x 0.86177 x 2322.2 = 500.3 C). Just above it, with H = 10 m and D = 0.5 m
    (Q = ((10 + 0.51) / 0.0148)^2.5 = 13.4386 MW, hand algebra on eq (C.1)), eq (C.4) gives, by hand:
    Q_H* = 13.4386e6 / (1.11e6 x 316.228) = 0.038285, ^0.33 = 0.340722, L_h = 29 x 0.340722 - 10 = -0.1191 m;
    Q_D* = 13.4386e6 / (1.11e6 x 0.176777) = 68.486, ^0.4 = 5.42303, z' = 1.2 x (1 - 5.42303) = -5.30763 m;
    y = (10 - 5.30763) / (-0.1191 + 10 - 5.30763) = 4.69237 / 4.57330 = 1.02604;
    h = 15 000 x 1.02604^-3.7 = 13 639 W/m2. A surface at 300 C already loses more than that
    (35 x 280 + 0.7 x 5.67e-8 x (573^4 - 293^4) = 9800 + 3986 = 13 786 W/m2), so its T_ast < 300 C.
    """
    d, h = 0.5, 10.0
    q_star = ((h + 1.02 * d) / 0.0148) ** 2.5
    assert q_star == pytest.approx(13.44e6, rel=1e-3)
    below = float(lo.plume_temperature_C(h, q_star * (1 - 1e-9), d))
    flux = float(lo.ceiling_flux_W_m2(0.0, q_star * (1 + 1e-9), d, h))
    assert below == pytest.approx(520.3, abs=0.1)
    assert flux == pytest.approx(13639.0, abs=1.0)
    assert float(surface.adiabatic_surface_temperature_C(flux)) < 300.0
    e = lo.member_exposure(np.array([0.0, 1.0]), np.array([q_star * (1 - 1e-9), q_star * (1 + 1e-9)]), d, h, 0.0, h)
    assert not e.impacts_ceiling[0] and e.impacts_ceiling[1]
    assert e.governing[1] == lo.BOUND
    assert e.effective_gas_temperature_C[1] == pytest.approx(below, abs=1e-3)


def test_effective_gas_temperature_reproduces_eq_c9():
    # EN 1991-1-2 eq (C.9) with the member at theta_m equals eq (3.1)-(3.3) with gas = T_ast (surface.py)
    t, q = ramp(40e6, 41)
    e = lo.member_exposure(t, q, 4.0, 5.0, 2.0, 5.0)
    m = e.impacts_ceiling
    g = e.effective_gas_temperature_C[m]
    for theta_m in (20.0, 300.0, 600.0):
        kernel = 35.0 * (g - theta_m) + 0.7 * 5.67e-8 * ((g + 273) ** 4 - (theta_m + 273) ** 4)
        np.testing.assert_allclose(kernel, surface.net_flux_W_m2(e.flux_W_m2[m], theta_m), rtol=1e-9, atol=1e-6)


def test_exposure_with_annex_e_heat_release():
    # the chain the analysis will run: E.4 curve -> exposure; shopping centre row of Table E.5 (from memory)
    occ = heatrelease.occupancy("shopping_centre")
    fire = heatrelease.annex_e_fire(730.0, 10.0, occ.heat_release_density_kW_m2, occ.growth_time_s)
    t = np.arange(0.0, fire.burnout_s + 600.0, 5.0)
    e = lo.member_exposure(t, fire.heat_release_W(t), lo.equivalent_diameter_m(10.0), 3.0, 0.0, 3.0)
    g = e.effective_gas_temperature_C
    assert g[0] == 20.0 and g[-1] == 20.0                       # no fire before and after
    assert np.argmax(g) * 5.0 <= fire.decay_start_s + 5.0       # hottest during the plateau


# ---- scope and bad input ----------------------------------------------------------------------------

def test_scope_violations():
    # EN 1991-1-2 Annex C(10) (from memory): D <= 10 m, Q <= 50 MW
    assert lo.scope_violations(10.0, 50e6) == []
    v = lo.scope_violations(12.0, 60e6)
    assert [f for f, _, _ in v] == ["fire.localised.diameter_m", "heat release Q [MW]"]
    assert v[1][1] == 60.0
    assert lo.scope_violations(12.0, 1e6, code={"annex_c_diameter_max_m": 15.0}) == []


def test_out_of_scope_refused_unless_allowed():
    t = np.array([0.0, 60.0])
    with pytest.raises(OutOfScopeError) as e:
        lo.member_exposure(t, np.array([0.0, 1e6]), 11.0, 5.0, 0.0, 5.0)
    assert e.value.field == "fire.localised.diameter_m"
    with pytest.raises(OutOfScopeError) as e:
        lo.member_exposure(t, np.array([0.0, 51e6]), 5.0, 5.0, 0.0, 5.0)
    assert e.value.field == "heat release Q [MW]"
    lo.member_exposure(t, np.array([0.0, 51e6]), 11.0, 5.0, 0.0, 5.0, allow_out_of_scope=True)


@pytest.mark.parametrize("kwargs,field", [
    (dict(time_s=[0.0, -60.0]), "time_s"),
    (dict(heat_release_W=[0.0, -1.0]), "heat_release_W"),
    (dict(heat_release_W=[0.0]), "heat_release_W"),
    (dict(diameter_m=0.0), "diameter_m"),
    (dict(ceiling_height_m=math.nan), "ceiling_height_m"),
    (dict(distance_m=-1.0), "distance_m"),
    (dict(height_m=6.0), "height_m"),          # above the 5 m ceiling
    (dict(height_m=-0.5), "height_m"),         # below the fire source
    (dict(emissivity=1.5), "emissivity"),
])
def test_bad_input_names_the_field(kwargs, field):
    args = dict(time_s=[0.0, 60.0], heat_release_W=[0.0, 1e6], diameter_m=2.0, ceiling_height_m=5.0,
                distance_m=0.0, height_m=5.0)
    args.update(kwargs)
    with pytest.raises(InputError) as e:
        lo.member_exposure(**args)
    assert e.value.field == field
