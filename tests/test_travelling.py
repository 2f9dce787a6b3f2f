"""Travelling fire (Stern-Gottfried and Rein 2012; Rackauskaite et al. 2015) and Alpert's ceiling jet."""

import math

import numpy as np
import pytest
from scipy.integrate import trapezoid

from steelfire.errors import InputError, OutOfScopeError
from steelfire.models.fire import ceilingjet
from steelfire.models.fire import travelling as tr

# An invented open-plan floor for the checks: 100 m x 20 m, 3.5 m to the ceiling, q_f,d 570 MJ/m2,
# RHR_f 500 kW/m2 (values of the order SG&R 2012 used for offices, from memory; demo values here)
FLOOR = dict(length_m=100.0, width_m=20.0, ceiling_height_m=3.5, design_fire_load_MJ_m2=570.0,
             heat_release_density_kW_m2=500.0)


def fire(**kw):
    args = dict(FLOOR, near_field_C=1200.0)
    args.update(kw)
    return tr.travelling_fire(**args)


def grid(f, positions=(), n=20_001):
    t = np.linspace(0.0, f.total_duration_s * 1.05, n)
    return np.unique(np.concatenate([t, f.key_times_s(positions)]))


# ---- Alpert's correlation ------------------------------------------------------------------------

def test_alpert_hand_values():
    # hand calculation, Q = 1000 kW, H = 3 m:
    # r = 3 m (r/H = 1 > 0.18): 20 + 5.38 x (1000/3)^(2/3) / 3 = 20 + 5.38 x 48.075 / 3 = 106.21 C
    assert float(ceilingjet.ceiling_jet_temperature_C(3.0, 1e6, 3.0)) == pytest.approx(106.21, abs=0.01)
    # r = 0.3 m (r/H = 0.1 <= 0.18): 20 + 16.9 x 1000^(2/3) / 3^(5/3) = 20 + 1690 / 6.24025 = 290.82 C
    assert float(ceilingjet.ceiling_jet_temperature_C(0.3, 1e6, 3.0)) == pytest.approx(290.82, abs=0.01)
    assert float(ceilingjet.ceiling_jet_temperature_C(5.0, 0.0, 3.0)) == 20.0   # no fire


def test_alpert_branches_meet_at_018():
    # hand calculation: 5.38 / 0.18^(2/3) = 5.38 / 0.318821 = 16.875, against 16.9: 0.15 % apart
    lo, hi = ceilingjet.ceiling_jet_temperature_C([0.18 * 4.0, 0.18 * 4.0 * (1 + 1e-12)], 2e6, 4.0) - 20.0
    assert hi == pytest.approx(lo, rel=2e-3)


# ---- model quantities ------------------------------------------------------------------------------

def test_burning_time_and_duration_hand_values():
    # hand calculation: t_b = 570e6 / 500e3 = 1140 s; 10 % fire: L_f = 10 m, s = 10 / 1140 m/s;
    # t_total = t_b + L / s = 1140 + 100 x 114 = 12 540 s (iTFM 2015: t_total = t_b + L/s, from memory)
    f = fire(share=0.10)
    assert f.burning_time_s == pytest.approx(1140.0, rel=1e-12)
    assert f.fire_length_m == pytest.approx(10.0, rel=1e-12)
    assert f.spread_rate_m_s == pytest.approx(10.0 / 1140.0, rel=1e-12)
    assert f.total_duration_s == pytest.approx(12540.0, rel=1e-12)
    # SG&R 2012's way of writing it (from memory): t_b (1 + 1 / share) = 1140 x 11 = 12 540 s
    assert f.total_duration_s == pytest.approx(1140.0 * (1 + 1 / 0.10), rel=1e-12)


def test_spread_rate_form():
    # iTFM 2015: L_f = s t_b; hand calculation: s = 5 mm/s -> L_f = 0.005 x 1140 = 5.7 m, share 5.7 %
    f = fire(spread_rate_m_s=0.005)
    assert f.fire_length_m == pytest.approx(5.7, rel=1e-12)
    assert f.share == pytest.approx(0.057, rel=1e-12)
    assert f.total_duration_s == pytest.approx(1140.0 + 100.0 / 0.005, rel=1e-12)  # hand: 21 140 s


@pytest.mark.parametrize("kw", [dict(share=0.01), dict(share=0.10), dict(share=0.5), dict(share=1.0),
                                dict(spread_rate_m_s=0.2), dict(spread_rate_m_s=math.inf)])
def test_energy_equals_fire_load_of_the_floor(kw):
    # every point burns t_b at RHR_f, so the energy is q_f,d L W = 570 MJ/m2 x 2000 m2 = 1.14e12 J (hand);
    # scipy.integrate.trapezoid on a grid holding the kinks, to 0.1 % (the brief's tolerance)
    f = fire(**kw)
    t = grid(f)
    if math.isinf(f.spread_rate_m_s):   # a step at t_b: integrate each side of it
        t = np.concatenate([t[t < f.burning_time_s], [f.burning_time_s * (1 - 1e-12)], t[t >= f.burning_time_s]])
    e = trapezoid(f.heat_release_W(t), t)
    assert e == pytest.approx(570e6 * 100.0 * 20.0, rel=1e-3)
    assert f.fire_load_J == pytest.approx(1.14e12, rel=1e-12)


@pytest.mark.parametrize("share", [0.025, 0.25, 1.0])
def test_every_point_sees_the_near_field_for_t_b(share):
    # SG&R 2012 / iTFM 2015: each point burns for t_b = 1140 s (hand value above)
    f = fire(share=share)
    x = np.array([0.0, 17.0, 50.0, 100.0])
    t = grid(f, x, n=200_001)
    g = f.gas_temperature_C(t, x)
    for j in range(x.size):
        near = t[g[:, j] == 1200.0]
        assert near[0] == pytest.approx(x[j] / f.spread_rate_m_s, abs=1e-6)
        assert near[-1] - near[0] == pytest.approx(1140.0, abs=t[1] - t[0] + 1e-6)


def test_far_field_is_alpert_from_the_band_centre():
    # hand calculation, 10 % fire at t = t_b = 1140 s: leading edge s t = 10 m, trailing edge 0, centre 5 m;
    # Q = 500 kW/m2 x 20 m x 10 m = 100 MW = 1e5 kW; member at x = 80 m: r = 75 m, H = 3.5 m (r/H > 0.18):
    # T = 20 + 5.38 x (1e5 / 75)^(2/3) / 3.5 = 20 + 5.38 x 121.141 / 3.5 = 206.21 C
    f = fire(share=0.10)
    assert float(f.heat_release_W(1140.0)) == pytest.approx(100e6, rel=1e-12)
    assert float(f.gas_temperature_C(1140.0, 80.0)) == pytest.approx(206.21, abs=0.01)


def test_member_away_from_the_fire_sees_only_far_field():
    """Until the fire reaches it, a member sees Alpert's far field of the band (below T_nf), rising as the
    band approaches at constant size; the reference restates the iTFM 2015 kinematics here."""
    f = fire(share=0.05)
    x = 100.0
    t = grid(f, [x])
    t = t[t < x / f.spread_rate_m_s]                  # before the fire reaches the far end
    g = f.gas_temperature_C(t, x)
    s, tb = f.spread_rate_m_s, 1140.0
    lead, trail = np.minimum(s * t, 100.0), np.clip(s * (t - tb), 0.0, 100.0)
    q = 500e3 * 20.0 * (lead - trail)
    ref = np.where(q > 0, np.minimum(ceilingjet.ceiling_jet_temperature_C(x - 0.5 * (lead + trail), q, 3.5), 1200.0),
                   20.0)
    np.testing.assert_allclose(g, ref, rtol=1e-12)
    assert g.max() < 1200.0
    steady = (t > tb) & (t < x / s)                   # the band travels at its full size
    assert np.all(np.diff(g[steady]) > 0)


def test_after_burnout_and_before_ignition_ambient():
    # both papers: no cooling phase; 20 C before the fire and after the whole floor has burnt
    f = fire(share=0.25)
    g = f.gas_temperature_C([0.0, f.total_duration_s, f.total_duration_s + 600.0], [0.0, 0.5, 50.0, 99.0])
    np.testing.assert_array_equal(g[1:], 20.0)
    # at t = 0 the point x = 0 ignites (x/s = 0); the band has no length yet, so no far field elsewhere
    np.testing.assert_array_equal(g[0], [1200.0, 20.0, 20.0, 20.0])


def test_infinite_spread_is_the_uniform_fire():
    # the limit s -> infinity: the whole floor burns at once for t_b (1140 s), Q = RHR_f L W = 1 GW (hand)
    f = fire(spread_rate_m_s=math.inf)
    assert f.share == 1.0 and f.total_duration_s == 1140.0
    t = np.array([0.0, 1.0, 600.0, 1139.9, 1140.0, 2000.0])
    g = f.gas_temperature_C(t, np.linspace(0.0, 100.0, 11))
    np.testing.assert_array_equal(g[:4], 1200.0)
    np.testing.assert_array_equal(g[4:], 20.0)
    np.testing.assert_allclose(f.heat_release_W(t), [1e9, 1e9, 1e9, 1e9, 0.0, 0.0])


def test_fire_as_large_as_the_floor():
    """The 100 % fire of this form sees every point burn for t_b like the uniform fire, shifted by x/s <= t_b;
    hand calculation: s = 100 / 1140 m/s, t_total = 1140 + 1140 = 2280 s."""
    f = fire(share=1.0)
    assert f.total_duration_s == pytest.approx(2280.0, rel=1e-12)
    u = fire(spread_rate_m_s=math.inf)
    x = np.array([0.0, 40.0, 100.0])
    t = grid(f, x, n=100_001)
    g, gu = f.gas_temperature_C(t, x), u.gas_temperature_C(t, x)
    for j in range(x.size):
        shift = x[j] / f.spread_rate_m_s
        near, near_u = t[g[:, j] == 1200.0], t[gu[:, j] == 1200.0]
        assert near[0] - shift == pytest.approx(near_u[0], abs=1e-6)
        assert near[-1] - near[0] == pytest.approx(near_u[-1] - near_u[0], abs=2 * (t[1] - t[0]))
    # and at x = 0 the two are the same in the near field
    assert np.all(g[t < 1140.0, 0] == 1200.0)


def test_far_field_capped_at_near_field_and_edge_origin_hotter():
    # both papers cap the far field at T_nf; the edge origin gives r no larger than the centre's (geometry)
    fc = fire(share=0.25, near_field_C=900.0)
    fe = fire(share=0.25, near_field_C=900.0, far_field_origin="edge")
    x = np.linspace(0.0, 100.0, 41)
    t = grid(fc, n=2001)
    gc, ge = fc.gas_temperature_C(t, x), fe.gas_temperature_C(t, x)
    assert gc.max() == 900.0 and ge.max() == 900.0
    assert np.all(ge >= gc - 1e-9)
    assert np.any(ge > gc + 1.0)


def test_family_matrix():
    # shape (T, S x P), column i * P + j = size i at position j
    x = [10.0, 60.0, 95.0]
    t = np.linspace(0.0, 20_000.0, 401)
    m = tr.family_gas_temperature_C(t, x, near_field_C=1000.0, **FLOOR)
    assert m.shape == (t.size, len(tr.FIRE_SIZES) * 3)
    # SG&R 2012 family (from memory): 1, 2.5, 5, 10, 25, 50, 75, 100 % of the floor
    assert tr.FIRE_SIZES == (0.01, 0.025, 0.05, 0.10, 0.25, 0.50, 0.75, 1.00)
    i, j = 4, 1
    single = tr.gas_temperature_C(t, x[j], near_field_C=1000.0, share=tr.FIRE_SIZES[i], **FLOOR)
    np.testing.assert_array_equal(m[:, i * 3 + j], single)
    by_rate = tr.family_gas_temperature_C(t, x, near_field_C=1000.0, spread_rates_m_s=[0.001, 0.01], **FLOOR)
    assert by_rate.shape == (t.size, 6)


# ---- bad input -------------------------------------------------------------------------------------

def test_position_outside_the_floor():
    with pytest.raises(InputError) as e:
        fire(share=0.1).gas_temperature_C([0.0, 60.0], 101.0)
    assert e.value.field == "position_m" and e.value.value == 101.0
    with pytest.raises(InputError) as e:
        fire(share=0.1).gas_temperature_C([0.0], [5.0, -1.0])
    assert e.value.field == "position_m"


def test_negative_time():
    with pytest.raises(InputError) as e:
        fire(share=0.1).gas_temperature_C([0.0, -1.0], 50.0)
    assert e.value.field == "time_s"


def test_near_field_outside_the_models_range():
    # iTFM 2015 (from memory): 800 to 1200 C
    with pytest.raises(OutOfScopeError) as e:
        fire(share=0.1, near_field_C=1300.0)
    assert e.value.field == "near_field_C"
    assert fire(share=0.1, near_field_C=1300.0, allow_out_of_scope=True).near_field_C == 1300.0
    with pytest.raises(InputError) as e:
        fire(share=0.1, near_field_C=15.0, allow_out_of_scope=True)
    assert e.value.field == "near_field_C"


@pytest.mark.parametrize("kw,field", [
    (dict(share=0.0), "share"), (dict(share=1.5), "share"), (dict(), "share"),
    (dict(share=0.1, spread_rate_m_s=0.01), "share"),
    (dict(spread_rate_m_s=-0.01), "spread_rate_m_s"),
    (dict(share=0.1, length_m=0.0), "length_m"),
    (dict(share=0.1, design_fire_load_MJ_m2=-5.0), "design_fire_load_MJ_m2"),
    (dict(share=0.1, far_field_origin="middle"), "far_field_origin"),
])
def test_bad_fire_input(kw, field):
    with pytest.raises(InputError) as e:
        fire(**kw)
    assert e.value.field == field
