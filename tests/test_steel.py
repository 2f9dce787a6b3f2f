"""Carbon steel properties and critical temperature, EN 1993-1-2 3.2, 3.4.1.2, 4.2.4."""

import numpy as np
import pytest

from steelfire.models import steel
from steelfire.errors import InputError

# EN 1993-1-2 Table 4.1 (critical temperature by degree of utilisation), entered from memory at
# the rows we are sure of; the table lists mu0 = 0.22, 0.24, ... 0.90, rounded to whole degrees.
TABLE_4_1 = {0.22: 711, 0.30: 664, 0.40: 620, 0.50: 585, 0.60: 554, 0.70: 526, 0.80: 496, 0.90: 458}


@pytest.mark.parametrize("mu,expected", sorted(TABLE_4_1.items()))
def test_eq_4_22_reproduces_table_4_1(mu, expected):
    assert steel.critical_temperature(mu) == pytest.approx(expected, abs=0.5)


def test_eq_4_22_decreases_with_utilisation():
    mus = np.arange(0.22, 0.901, 0.02)  # the Table 4.1 rows
    t = [steel.critical_temperature(float(m)) for m in mus]
    assert all(a > b for a, b in zip(t, t[1:]))
    assert t[0] == pytest.approx(711, abs=0.5) and t[-1] == pytest.approx(458, abs=0.5)  # EN 1993-1-2 Table 4.1


def test_eq_4_22_inverse():
    for mu in (0.1, 0.35, 0.7):
        assert steel.utilisation_for_critical_temperature(steel.critical_temperature(mu)) == pytest.approx(mu)


@pytest.mark.parametrize("mu", [0.0, 0.01, 1.0, 1.2, -0.5, float("nan"), "0.5", True])
def test_eq_4_22_validity(mu):
    with pytest.raises(InputError):
        steel.critical_temperature(mu)


def test_specific_heat_points():
    # EN 1993-1-2 eq (3.2a) at 20 C: 425 + 15.46 - 0.676 + 0.0178 = 439.8 J/(kg K) (hand calculation)
    assert steel.specific_heat(20.0) == pytest.approx(439.8, abs=0.05)
    # the peak at 735 C: 666 + 13002/3 = 5000 J/(kg K) (EN 1993-1-2 Figure 3.4, eq (3.2b)/(3.2c))
    assert steel.specific_heat(735.0) == pytest.approx(5000.0, abs=1e-6)
    assert steel.specific_heat(734.999) == pytest.approx(5000.0, rel=1e-3)
    # plateau 650 J/(kg K) from 900 C (eq (3.2d))
    assert steel.specific_heat(1000.0) == 650.0
    # eq (3.2a) at 600 C: 425 + 463.8 - 608.4 + 479.52 = 759.9; eq (3.2b) at 600 C: 666 + 13002/138 = 760.2
    assert steel.specific_heat(599.999) == pytest.approx(759.92, abs=0.05)
    assert steel.specific_heat(600.0) == pytest.approx(760.22, abs=0.05)


def test_specific_heat_array_matches_twin_and_kernel_terms():
    # EN 1993-1-2 eq (3.2a)-(3.2d) on arrays against the plain restatement in tests/twins.py, and the
    # kernels' c_a rho_a = num / den (steelfire.models.heat) read from the same one definition
    import twins
    from steelfire.models import heat

    th = np.linspace(0.0, 1200.0, 2401)
    np.testing.assert_allclose(steel.specific_heat(th), [twins.c_a(float(x)) for x in th], rtol=1e-12)
    for x in th[::7]:
        num, den = heat.heat_capacity_fraction(float(x), 1.0, heat.SPECIFIC_HEAT_TERMS)
        assert num / den == pytest.approx(steel.specific_heat(float(x)), rel=1e-12)


@pytest.mark.parametrize("theta,ky,kp,ke", [
    (20, 1.0, 1.0, 1.0), (400, 1.0, 0.42, 0.70), (500, 0.78, 0.36, 0.60),  # EN 1993-1-2 Table 3.1, from memory
    (600, 0.47, 0.18, 0.31), (700, 0.23, 0.075, 0.13), (1200, 0.0, 0.0, 0.0),
    (550, 0.625, 0.27, 0.455),  # linear between rows, EN 1993-1-2 3.2.1(3) note
])
def test_reduction_factors(theta, ky, kp, ke):
    assert steel.yield_strength_factor(theta) == pytest.approx(ky)
    assert steel.proportional_limit_factor(theta) == pytest.approx(kp)
    assert steel.elastic_modulus_factor(theta) == pytest.approx(ke)
