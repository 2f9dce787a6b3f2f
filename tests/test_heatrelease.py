"""Heat release rate: EN 1991-1-2 Annex E.4 curve, Table E.5 presets, tabulated heat release."""

import math

import numpy as np
import pytest
from scipy.integrate import cumulative_trapezoid, trapezoid

from steelfire.inputs.curves import read_heat_release_csv
from steelfire.errors import InputError
from steelfire.models.fire import heatrelease as hr


# ---- growth phase and presets -----------------------------------------------------------------

@pytest.mark.parametrize("growth,t_alpha", [
    ("slow", 600.0), ("medium", 300.0), ("fast", 150.0),  # EN 1991-1-2 Table E.5 (from memory)
    ("ultra-fast", 75.0),                                   # common practice, t-squared family (from memory)
])
def test_growth_reaches_1MW_at_t_alpha(growth, t_alpha):
    # EN 1991-1-2 E.4(1): Q = 1e6 (t / t_alpha)^2 is 1 MW at t = t_alpha
    ta = hr.growth_time_s(growth)
    assert ta == t_alpha
    assert hr.t_squared_heat_release_W(ta, ta) == pytest.approx(1e6, rel=1e-12)


def test_growth_is_t_squared():
    # hand calculation: t = 600 s, t_alpha = 150 s -> 1e6 x 4^2 = 16 MW; t = 75 s -> 1e6 x 0.5^2 = 0.25 MW
    q = hr.t_squared_heat_release_W([600.0, 75.0], 150.0)
    np.testing.assert_allclose(q, [16e6, 0.25e6], rtol=1e-12)


@pytest.mark.parametrize("key,growth,rhr", [
    # EN 1991-1-2 Table E.5, every row from memory
    ("dwelling", "medium", 250.0), ("hospital_room", "medium", 250.0), ("hotel_room", "medium", 250.0),
    ("library", "fast", 500.0), ("office", "medium", 250.0), ("classroom", "medium", 250.0),
    ("shopping_centre", "fast", 250.0), ("theatre_cinema", "fast", 500.0),
    ("transport_public_space", "slow", 250.0),
])
def test_table_e5_presets(key, growth, rhr):
    occ = hr.occupancy(key)
    assert (occ.growth, occ.heat_release_density_kW_m2) == (growth, rhr)
    assert occ.growth_time_s == hr.growth_time_s(growth)


def test_table_e5_has_nine_occupancies():
    assert len(hr.OCCUPANCIES) == 9  # EN 1991-1-2 Table E.5 lists nine occupancies (from memory)


# ---- the E.4 curve: growth, plateau, decay -----------------------------------------------------

def office_fire():
    # 100 m2 office, q_f,d 600 MJ/m2, RHR_f 250 kW/m2, medium growth (Table E.5 office row, from memory)
    return hr.annex_e_fire(600.0, 100.0, 250.0, 300.0)


def test_phase_times_hand_calculation():
    # hand calculation: Q_max = 250 kW/m2 x 100 m2 = 25 MW; t_1 = 300 sqrt(25) = 1500 s;
    # E_1 = 25e6 x 1500 / 3 = 12.5 GJ; E = 600 MJ/m2 x 100 m2 = 60 GJ; 0.7 E = 42 GJ;
    # t_2 = 1500 + (42 - 12.5) GJ / 25 MW = 2680 s; t_3 = 2680 + 2 x 18 GJ / 25 MW = 4120 s
    f = office_fire()
    assert not f.fuel_limited
    assert f.growth_end_s == pytest.approx(1500.0, rel=1e-12)
    assert f.decay_start_s == pytest.approx(2680.0, rel=1e-12)
    assert f.burnout_s == pytest.approx(4120.0, rel=1e-12)
    assert f.peak_heat_release_W == pytest.approx(25e6, rel=1e-12)
    assert f.fire_load_J == pytest.approx(60e9, rel=1e-12)


def test_curve_values_in_each_phase():
    f = office_fire()
    q = f.heat_release_W([600.0, 1500.0, 2000.0, 2680.0, 3400.0, 4120.0, 5000.0])
    # hand calculation: growth 1e6 (600/300)^2 = 4 MW; 1e6 x 5^2 = 25 MW at t_1; plateau 25 MW;
    # decay 25 MW x (1 - 720/1440) = 12.5 MW at 3400 s; 0 at and after t_3
    np.testing.assert_allclose(q, [4e6, 25e6, 25e6, 25e6, 12.5e6, 0.0, 0.0], rtol=1e-12, atol=1e-6)


def fine_grid(f, n=200_001):
    return np.unique(np.concatenate([np.linspace(0.0, f.burnout_s * 1.1, n), f.key_times_s]))


@pytest.mark.parametrize("fire", [
    hr.annex_e_fire(600.0, 100.0, 250.0, 300.0),    # reaches the plateau
    hr.annex_e_fire(100.0, 100.0, 250.0, 300.0),    # fuel-limited: 70 % burnt during the growth
    hr.annex_e_fire(1200.0, 40.0, 500.0, 75.0),     # ultra-fast, library-like RHR_f
], ids=["plateau", "fuel-limited", "ultra-fast"])
def test_energy_equals_fire_load(fire):
    # EN 1991-1-2 E.4(5): the decay ends when the whole fire load q_f,d A_fi has burnt;
    # scipy.integrate.trapezoid on a fine grid, to 0.1 % (the brief's tolerance)
    t = fine_grid(fire)
    e = trapezoid(fire.heat_release_W(t), t)
    assert e == pytest.approx(fire.fire_load_J, rel=1e-3)
    assert fire.energy_J(t[-1]) == pytest.approx(fire.fire_load_J, rel=1e-12)  # the closed form, exactly


@pytest.mark.parametrize("fire", [hr.annex_e_fire(600.0, 100.0, 250.0, 300.0),
                                  hr.annex_e_fire(100.0, 100.0, 250.0, 300.0)], ids=["plateau", "fuel-limited"])
def test_decay_starts_at_70_percent_burnt(fire):
    # EN 1991-1-2 E.4(4) (from memory): the decay starts when 70 % of the fire load has burnt
    t = fine_grid(fire)
    t = t[t <= fire.decay_start_s]
    assert trapezoid(fire.heat_release_W(t), t) == pytest.approx(0.7 * fire.fire_load_J, rel=1e-3)
    assert fire.energy_J(fire.decay_start_s) == pytest.approx(0.7 * fire.fire_load_J, rel=1e-12)


def test_energy_closed_form_matches_cumulative_integral():
    # reference: scipy.integrate.cumulative_trapezoid of the curve on a fine grid
    for f in (hr.annex_e_fire(600.0, 100.0, 250.0, 300.0), hr.annex_e_fire(100.0, 100.0, 250.0, 300.0)):
        t = fine_grid(f)
        ref = cumulative_trapezoid(f.heat_release_W(t), t, initial=0.0)
        np.testing.assert_allclose(f.energy_J(t), ref, rtol=1e-6, atol=1e-6 * f.fire_load_J)


def test_fuel_limited_fire():
    # hand calculation: A 100 m2, q 100 MJ/m2 -> E = 10 GJ, 0.7 E = 7 GJ < E_1 = 12.5 GJ (growth to 25 MW);
    # growth energy 1e6 t^3 / (3 x 300^2) = 7e9 -> t^3 = 7e9 x 2.7e5 / 1e6 = 1.89e9 -> t_2 = 1236.4 s;
    # Q_peak = 1e6 (1236.4 / 300)^2 = 16.985 MW; decay 2 x 3e9 / 16.985e6 = 353.25 s
    f = hr.annex_e_fire(100.0, 100.0, 250.0, 300.0)
    assert f.fuel_limited
    assert f.growth_end_s == f.decay_start_s == pytest.approx(1.89e9 ** (1 / 3), rel=1e-12)
    assert f.decay_start_s == pytest.approx(1236.4, abs=0.05)
    assert f.peak_heat_release_W == pytest.approx(16.985e6, rel=1e-4)
    assert f.peak_heat_release_W < f.plateau_heat_release_W
    assert f.burnout_s - f.decay_start_s == pytest.approx(353.25, abs=0.01)
    # the curve is continuous at the peak: growth and decay both give Q_peak there
    eps = 1e-6
    q = f.heat_release_W([f.decay_start_s - eps, f.decay_start_s + eps])
    np.testing.assert_allclose(q, f.peak_heat_release_W, rtol=1e-8)


def test_fuel_limited_boundary_is_continuous():
    # at 0.7 E = E_1 both branches give the same fire (hand calculation: E_1 = Q_max t_1 / 3 = 12.5 GJ,
    # so E = 12.5 / 0.7 GJ = 178.571 MJ/m2 over 100 m2)
    q_b = 12.5e9 / 0.7 / 100.0 / 1e6
    lo = hr.annex_e_fire(q_b * (1 - 1e-9), 100.0, 250.0, 300.0)
    hi = hr.annex_e_fire(q_b * (1 + 1e-9), 100.0, 250.0, 300.0)
    assert lo.fuel_limited and not hi.fuel_limited
    assert lo.peak_heat_release_W == pytest.approx(hi.peak_heat_release_W, rel=1e-6)
    assert lo.burnout_s == pytest.approx(hi.burnout_s, rel=1e-6)


# ---- tabulated heat release --------------------------------------------------------------------

def test_table_interpolation_and_energy():
    # a triangle: 0 MW at 0, 5 MW at 10 min, 0 at 20 min; hand calculation: E = 0.5 x 1200 s x 5 MW = 3 GJ
    tab = hr.tabulated_heat_release([0.0, 10.0, 20.0], [0.0, 5.0, 0.0])
    assert tab.heat_release_W(300.0) == pytest.approx(2.5e6, rel=1e-12)  # linear: half way up
    assert tab.energy_J(1200.0) == pytest.approx(3e9, rel=1e-12)
    assert tab.energy_J(300.0) == pytest.approx(0.5 * 300.0 * 2.5e6, rel=1e-12)  # hand: triangle 0.375 GJ
    t = np.linspace(0.0, 1500.0, 30_001)
    np.testing.assert_allclose(tab.energy_J(t), cumulative_trapezoid(tab.heat_release_W(t), t, initial=0.0),
                               rtol=1e-6, atol=1e3)
    assert tab.peak_heat_release_W == 5e6


def test_table_held_at_last_value():
    # common practice, no source: a table is held at its last value past its end, as steelfire's gas tables
    tab = hr.tabulated_heat_release([0.0, 5.0], [0.0, 2.0])
    assert tab.heat_release_W(3600.0) == 2e6
    assert tab.energy_J(600.0) == pytest.approx(0.5 * 300 * 2e6 + 300 * 2e6, rel=1e-12)  # hand calculation


def test_read_csv(tmp_path):
    p = tmp_path / "hrr.csv"
    p.write_text("time_min,heat_release_MW\n# measured\n0,0\n10,5\n20,0\n")
    tab = read_heat_release_csv(p)
    assert tab.energy_J(1200.0) == pytest.approx(3e9, rel=1e-12)  # hand calculation as above
    assert tab.source == "hrr.csv"


@pytest.mark.parametrize("text,field", [
    ("time_min,temperature_C\n0,0\n1,1\n", "hrr.csv header"),
    ("time_min,heat_release_MW\n0,0\n5,-1\n", "hrr.csv row 3 heat_release_MW"),
    ("time_min,heat_release_MW\n0,0\n0,1\n", "hrr.csv row 3 time_min"),
    ("time_min,heat_release_MW\n1,0\n2,1\n", "hrr.csv row 2 time_min"),
    ("time_min,heat_release_MW\n0,0\n2,x\n", "hrr.csv row 3 heat_release_MW"),
])
def test_read_csv_errors_name_the_row(tmp_path, text, field):
    p = tmp_path / "hrr.csv"
    p.write_text(text)
    with pytest.raises(InputError) as e:
        read_heat_release_csv(p)
    assert e.value.field == field


# ---- bad input ----------------------------------------------------------------------------------

def test_negative_time_refused():
    with pytest.raises(InputError) as e:
        office_fire().heat_release_W([0.0, -1.0])
    assert e.value.field == "time_s" and e.value.value == -1.0
    with pytest.raises(InputError):
        hr.t_squared_heat_release_W(math.nan, 300.0)


@pytest.mark.parametrize("args,field", [
    ((0.0, 100.0, 250.0, 300.0), "design_fire_load_MJ_m2"),
    ((600.0, -1.0, 250.0, 300.0), "fire_area_m2"),
    ((600.0, 100.0, math.inf, 300.0), "heat_release_density_kW_m2"),
    ((600.0, 100.0, 250.0, 0.0), "growth_time_s"),
])
def test_bad_curve_input(args, field):
    with pytest.raises(InputError) as e:
        hr.annex_e_fire(*args)
    assert e.value.field == field


def test_unknown_growth_and_occupancy():
    with pytest.raises(InputError) as e:
        hr.growth_time_s("very fast")
    assert e.value.field == "fire_load.growth"
    with pytest.raises(InputError) as e:
        hr.occupancy("warehouse")
    assert e.value.field == "occupancy"
