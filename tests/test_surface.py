"""Incident flux <-> temperature: adiabatic surface temperature, radiation temperature, eq (C.9)."""

import math

import numpy as np
import pytest
from scipy.integrate import solve_ivp
from scipy.optimize import brentq

from steelfire.errors import InputError
import runs
from steelfire.models import heat
from steelfire.models.fire import surface
from twins import c_a

SIGMA = 5.67e-8  # EN 1991-1-2 3.1(6)


def loss(t, alpha_c, eps):
    """The loss terms of EN 1991-1-2 eq (C.9) for a surface at t [C], restated here."""
    return alpha_c * (t - 20.0) + eps * SIGMA * ((t + 273.0) ** 4 - 293.0 ** 4)


def test_constants_match_the_kernels():
    # one sigma and one Kelvin offset for the conversions and the kernels (EN 1991-1-2 3.1(6), eq (3.3))
    assert surface.STEFAN_BOLTZMANN == heat.STEFAN_BOLTZMANN
    assert surface.KELVIN == heat.KELVIN


@pytest.mark.parametrize("alpha_c", [0.0, 25.0, 35.0, 50.0])   # EN 1991-1-2 3.2, 3.3 values
@pytest.mark.parametrize("eps", [0.3, 0.7, 1.0])
def test_adiabatic_surface_temperature_against_brentq(alpha_c, eps):
    # reference: scipy.optimize.brentq on the same balance, bracket [20, 3000] C, xtol 1e-12
    h = np.array([0.0, 1.0, 1e3, 15e3, 49578.47, 75.8e3, 100e3, 250e3])
    got = surface.adiabatic_surface_temperature_C(h, alpha_c, eps)
    ref = [20.0 if x == 0 else brentq(lambda t: loss(t, alpha_c, eps) - x, 20.0, 3000.0, xtol=1e-12) for x in h]
    np.testing.assert_allclose(got, ref, rtol=0, atol=1e-8)


def test_adiabatic_surface_temperature_hand_value():
    # hand calculation, h = 100 kW/m2, alpha_c 35, eps 0.7: try T = 880 C:
    # 35 x 860 = 30 100; 0.7 x 5.67e-8 x (1153^4 - 293^4) = 3.969e-8 x (1.7673e12 - 7.370e9) = 69 852;
    # sum 99 952, 48 W/m2 short of 1e5; slope 35 + 4 x 3.969e-8 x 1153^3 = 278.4 W/(m2 K) -> T = 880.17 C
    t = float(surface.adiabatic_surface_temperature_C(1e5, 35.0, 0.7))
    assert t == pytest.approx(880.17, abs=0.01)
    assert loss(t, 35.0, 0.7) == pytest.approx(1e5, rel=1e-12)


def test_radiation_temperature_hand_value():
    # hand calculation: 293^4 + 5e4 / (0.7 x 5.67e-8) = 7.3700e9 + 1.25976e12 = 1.26713e12, fourth root
    # 1060.97 K = 787.97 C
    assert float(surface.radiation_temperature_C(5e4, 0.7)) == pytest.approx(787.97, abs=0.01)
    assert float(surface.radiation_temperature_C(0.0, 0.7)) == pytest.approx(20.0, abs=1e-9)


@pytest.mark.parametrize("h", [5e3, 15e3, 60e3, 100e3])
def test_both_temperatures_reproduce_annex_c_net_flux(h):
    """EN 1991-1-2 eq (C.9) for a member at theta_m, written three ways (hand algebra in surface.py)."""
    alpha_c, eps = 35.0, 0.7
    t_ast = float(surface.adiabatic_surface_temperature_C(h, alpha_c, eps))
    t_r = float(surface.radiation_temperature_C(h, eps))
    for theta_m in (20.0, 150.0, 400.0, 700.0, 1000.0):
        annex = h - loss(theta_m, alpha_c, eps)                                       # eq (C.9)
        # eq (3.1)-(3.3) with gas = T_ast
        gas_form = alpha_c * (t_ast - theta_m) + eps * SIGMA * ((t_ast + 273) ** 4 - (theta_m + 273) ** 4)
        # convection at 20 C, radiation at T_r
        rad_form = alpha_c * (20.0 - theta_m) + eps * SIGMA * ((t_r + 273) ** 4 - (theta_m + 273) ** 4)
        assert gas_form == pytest.approx(annex, rel=1e-9, abs=1e-6)
        assert rad_form == pytest.approx(annex, rel=1e-9, abs=1e-6)
        assert float(surface.net_flux_W_m2(h, theta_m, alpha_c, eps)) == pytest.approx(annex, rel=1e-12, abs=1e-9)


def test_ast_below_both_single_mode_temperatures():
    # both loss terms are >= 0 above 20 C, so T_ast lies below 20 + h/alpha_c and below T_r (hand reasoning)
    h = np.linspace(1e3, 2e5, 50)
    t = surface.adiabatic_surface_temperature_C(h, 35.0, 0.7)
    assert np.all(t < 20.0 + h / 35.0) and np.all(t < surface.radiation_temperature_C(h, 0.7))


def test_bare_member_under_constant_flux_reaches_ast():
    """A bare member under a constant flux settles where eq (C.9) vanishes, i.e. at T_ast.

    Four integrations of EN 1993-1-2 eq (4.25) over 3 h, Am/V 200 1/m, h = 60 kW/m2 (invented demo
    values): the kernels with gas = T_ast (step 2 s), the kernels with gas 20 C and radiation
    temperature T_r (the other form of eq (C.9)), a plain-Python loop of eq (C.9) directly, and
    scipy.integrate.solve_ivp of eq (C.9) (rtol 1e-10).
    """
    h, alpha_c, eps, amv, rho = 60e3, 35.0, 0.7, 200.0, 7850.0
    t_ast = float(surface.adiabatic_surface_temperature_C(h, alpha_c, eps))
    time = np.arange(0.0, 3 * 3600.0 + 1.0, 2.0)
    kernel = runs.bare_history(time, np.full(time.size, t_ast), amv, alpha_c, eps, rho)
    t_r = float(surface.radiation_temperature_C(h, eps))
    by_radiation = runs.bare_history(time, np.full(time.size, 20.0), amv, alpha_c, eps, rho,
                                     radiation_C=np.full(time.size, t_r))
    theta = 20.0
    for _ in range(time.size - 1):
        theta += amv / (c_a(theta) * rho) * (h - loss(theta, alpha_c, eps)) * 2.0
    sol = solve_ivp(lambda _t, y: [amv / (c_a(y[0]) * rho) * (h - loss(y[0], alpha_c, eps))],
                    (0.0, time[-1]), [20.0], rtol=1e-10, atol=1e-8, method="LSODA")
    # settled: within 0.01 C of T_ast after 3 h (the time constant at 800 C is c_a rho / (Am/V x slope)
    # = 800 x 7850 / (200 x 240) = 131 s; hand calculation, so 3 h is about 80 of them)
    assert kernel[-1] == pytest.approx(t_ast, abs=0.01)
    assert theta == pytest.approx(t_ast, abs=0.01)
    assert sol.y[0, -1] == pytest.approx(t_ast, abs=0.01)
    # the kernel with gas = T_ast and the direct eq (C.9) loop are the same recurrence (to rounding)
    assert kernel[-1] == pytest.approx(theta, rel=1e-9)
    np.testing.assert_allclose(by_radiation, kernel, rtol=1e-9)


def test_bad_input():
    with pytest.raises(InputError) as e:
        surface.adiabatic_surface_temperature_C([1e3, -5.0])
    assert e.value.field == "flux_W_m2" and e.value.value == -5.0
    with pytest.raises(InputError) as e:
        surface.radiation_temperature_C(math.nan)
    assert e.value.field == "flux_W_m2"
    with pytest.raises(InputError) as e:
        surface.adiabatic_surface_temperature_C(1e3, 35.0, 0.0)
    assert e.value.field == "emissivity"
    with pytest.raises(InputError) as e:
        surface.adiabatic_surface_temperature_C(1e3, -1.0, 0.7)
    assert e.value.field == "alpha_c"
