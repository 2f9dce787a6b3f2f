"""Carbon steel at elevated temperature, EN 1993-1-2 section 3 and 4.2.4."""

from __future__ import annotations

import math

import numpy as np

from steelfire.errors import InputError

#: Unit mass of steel [kg/m3], EN 1993-1-2 3.2.2(1).
STEEL_DENSITY_KG_M3 = 7850.0

#: EN 1993-1-2 Table 3.1: steel temperature [C], k_y,theta, k_p,theta, k_E,theta.
REDUCTION_FACTORS = np.array([
    [20.0, 1.000, 1.000, 1.000],
    [100.0, 1.000, 1.000, 1.000],
    [200.0, 1.000, 0.807, 0.900],
    [300.0, 1.000, 0.613, 0.800],
    [400.0, 1.000, 0.420, 0.700],
    [500.0, 0.780, 0.360, 0.600],
    [600.0, 0.470, 0.180, 0.310],
    [700.0, 0.230, 0.075, 0.130],
    [800.0, 0.110, 0.050, 0.090],
    [900.0, 0.060, 0.0375, 0.0675],
    [1000.0, 0.040, 0.0250, 0.0450],
    [1100.0, 0.020, 0.0125, 0.0225],
    [1200.0, 0.000, 0.0000, 0.0000],
])

#: Degree of utilisation below which eq (4.22) is not to be used, EN 1993-1-2 4.2.4(3).
UTILISATION_MIN = 0.013


#: EN 1993-1-2 3.4.1.2, eq (3.2a)-(3.2d): the one definition of c_a in steelfire [J/(kg K)].
#: (3.2a) 20 <= theta < 600: a0 + a1 theta + a2 theta^2 + a3 theta^3
SPECIFIC_HEAT_CUBIC = (425.0, 7.73e-1, -1.69e-3, 2.22e-6)
#: (3.2b) 600 <= theta < 735: 666 + 13002 / (738 - theta)
SPECIFIC_HEAT_B = (666.0, 13002.0, 738.0)
#: (3.2c) 735 <= theta < 900: 545 + 17820 / (theta - 731)
SPECIFIC_HEAT_C = (545.0, 17820.0, 731.0)
#: (3.2d) 900 <= theta <= 1200: 650
SPECIFIC_HEAT_D = 650.0
#: The branch limits [C]: 20, 600, 735, 900, 1200.
SPECIFIC_HEAT_LIMITS_C = (20.0, 600.0, 735.0, 900.0, 1200.0)
#: The same numbers in the order the batch kernels read them (steelfire.models.heat.heat_capacity_fraction).
SPECIFIC_HEAT_KERNEL_TERMS = (SPECIFIC_HEAT_LIMITS_C[0], *SPECIFIC_HEAT_CUBIC, SPECIFIC_HEAT_LIMITS_C[2],
                              SPECIFIC_HEAT_B[2], SPECIFIC_HEAT_B[0], SPECIFIC_HEAT_B[1], SPECIFIC_HEAT_C[2],
                              SPECIFIC_HEAT_C[0], SPECIFIC_HEAT_C[1], SPECIFIC_HEAT_LIMITS_C[1],
                              SPECIFIC_HEAT_LIMITS_C[3], SPECIFIC_HEAT_D)


def specific_heat(steel_temperature_C):
    """Specific heat of carbon steel c_a [J/(kg K)], EN 1993-1-2 3.4.1.2, eq (3.2a)-(3.2d).

    20 <= theta < 600: 425 + 0.773 theta - 1.69e-3 theta^2 + 2.22e-6 theta^3;
    600 <= theta < 735: 666 + 13002 / (738 - theta); 735 <= theta < 900: 545 + 17820 / (theta - 731);
    900 <= theta <= 1200: 650. Below 20 C the 20 C value and above 1200 C 650 are held (the clause
    stops there; callers warn where steel passes 1200 C).

    >>> round(specific_heat(20.0), 1), round(specific_heat(735.0), 0), specific_heat(1000.0)
    (439.8, 5000.0, 650.0)
    """
    th = np.asarray(steel_temperature_C, dtype=float)
    lim = SPECIFIC_HEAT_LIMITS_C
    t = np.clip(th, lim[0], lim[4])
    a0, a1, a2, a3 = SPECIFIC_HEAT_CUBIC
    with np.errstate(divide="ignore", invalid="ignore"):
        c = np.where(
            t < lim[1], a0 + a1 * t + a2 * t ** 2 + a3 * t ** 3,
            np.where(t < lim[2], SPECIFIC_HEAT_B[0] + SPECIFIC_HEAT_B[1] / (SPECIFIC_HEAT_B[2] - t),
                     np.where(t < lim[3], SPECIFIC_HEAT_C[0] + SPECIFIC_HEAT_C[1] / (t - SPECIFIC_HEAT_C[2]),
                              SPECIFIC_HEAT_D)))
    return c if c.ndim else float(c)


#: Smallest specific heat of carbon steel [J/(kg K)]: eq (3.2a) at 20 C (c_a rises from there).
SPECIFIC_HEAT_MIN = specific_heat(20.0)


def _table(col: int, steel_temperature_C):
    th = np.asarray(steel_temperature_C, dtype=float)
    out = np.interp(th, REDUCTION_FACTORS[:, 0], REDUCTION_FACTORS[:, col])
    return out if out.ndim else float(out)


def yield_strength_factor(steel_temperature_C):
    """k_y,theta [-], effective yield strength / f_y, EN 1993-1-2 Table 3.1, linear between rows."""
    return _table(1, steel_temperature_C)


def proportional_limit_factor(steel_temperature_C):
    """k_p,theta [-], proportional limit / f_y, EN 1993-1-2 Table 3.1, linear between rows."""
    return _table(2, steel_temperature_C)


def elastic_modulus_factor(steel_temperature_C):
    """k_E,theta [-], slope of the linear elastic range / E_a, EN 1993-1-2 Table 3.1, linear between rows."""
    return _table(3, steel_temperature_C)


def critical_temperature(utilisation: float, field: str = "utilisation") -> float:
    """Critical steel temperature theta_a,cr [C] from the degree of utilisation mu0 [-].

    EN 1993-1-2 4.2.4, eq (4.22): theta_a,cr = 39.19 ln(1 / (0.9674 mu0^3.833) - 1) + 482.
    Valid for 0.013 <= mu0 < 1 (at mu0 = 1 the member has no reserve at 20 C); members without
    instability (tension members, laterally restrained beams) and class 1-3 sections.
    """
    mu = utilisation
    if isinstance(mu, bool) or not isinstance(mu, (int, float)) or not math.isfinite(mu):
        raise InputError(field, mu, "must be a number, the degree of utilisation mu0 [-]")
    if not (UTILISATION_MIN <= mu < 1.0):
        raise InputError(field, mu, f"eq (4.22) of EN 1993-1-2 holds for {UTILISATION_MIN} <= mu0 < 1")
    return 39.19 * math.log(1.0 / (0.9674 * mu ** 3.833) - 1.0) + 482.0


def utilisation_for_critical_temperature(critical_temperature_C: float) -> float:
    """Inverse of eq (4.22): mu0 [-] whose critical temperature is ``critical_temperature_C``."""
    e = math.exp((critical_temperature_C - 482.0) / 39.19)
    return (1.0 / (0.9674 * (e + 1.0))) ** (1.0 / 3.833)
