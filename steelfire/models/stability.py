"""Limits of the explicit steps of EN 1993-1-2 eq (4.25) and (4.27).

Both equations are stepped explicitly: one step moves the steel by a (theta_g - theta_a). Above
a = 1 the steel passes the gas temperature in one step (the history overshoots; above 2 it diverges).
The clauses' own step limits (5 s bare, 30 s protected) keep real members well inside, but thin
protection, code values ([code]) and long steps can break it; these functions give the bounds, and the
case loader, the analysis and the sizing all call them.
"""

from __future__ import annotations

import math

import numpy as np

from steelfire.models import steel

#: Stefan-Boltzmann constant [W/(m2 K4)] and the Kelvin offset of EN 1991-1-2 eq (3.3).
STEFAN_BOLTZMANN = 5.67e-8
KELVIN = 273.0


def stable_min_thickness_m(conductivity, specific_heat, density, section_factor_per_m, time_step_s,
                           steel_density_kg_m3=7850.0):
    """Least protection thickness d_p [m] for which eq (4.27), stepped explicitly, cannot carry the steel
    past the gas temperature in one step of ``time_step_s`` [s].

    Eq (4.27) moves the steel by a (theta_g - theta_a) per step with
    a = lambda_p (Ap/V) dt / (d_p c_a rho_a (1 + phi/3)), phi = c_p rho_p d_p (Ap/V) / (c_a rho_a).
    With the largest conductivity lambda_p [W/(m K)] and the smallest c_a (eq (3.2a) at 20 C), a = 1
    gives d_min = 2 L / (B + sqrt(B^2 + 4 A L)), A = c_p rho_p (Ap/V) / 3, B = c_a rho_a,
    L = lambda_p (Ap/V) dt. Works on arrays.

    >>> round(float(stable_min_thickness_m(0.2, 1700.0, 800.0, 200.0, 30.0)) * 1e3, 3)
    0.347
    """
    ca_rho = steel.SPECIFIC_HEAT_MIN * steel_density_kg_m3
    quad = np.asarray(specific_heat) * np.asarray(density) * np.asarray(section_factor_per_m) / 3.0
    load = np.asarray(conductivity) * np.asarray(section_factor_per_m) * time_step_s
    return 2.0 * load / (ca_rho + np.sqrt(ca_rho ** 2 + 4.0 * quad * load))


def bare_step_limit_per_m(time_s, gas_C, alpha_c, emissivity_resultant, steel_density_kg_m3) -> float:
    """Largest k_sh Am/V [1/m] for which eq (4.25), stepped explicitly on ``time_s`` [s], cannot carry bare
    steel past the gas temperature in one step.

    One step moves the steel by a (theta_g - theta_a) with
    a = k_sh (Am/V) dt (alpha_c + Phi eps sigma (T_g + T_a)(T_g^2 + T_a^2)) / (c_a(theta_a) rho_a)
    (h_net,d of EN 1991-1-2 eq (3.1)-(3.3) over theta_g - theta_a; T in K). With both temperatures
    within [20 C, the hottest gas] a is largest at the hottest gas; the limit makes its largest value
    1 at the largest step. c_a by eq (3.2) on a 1 C grid with the branch ends.
    """
    top = max(float(np.max(gas_C)), 20.0)
    lim = steel.SPECIFIC_HEAT_LIMITS_C
    theta = np.unique(np.concatenate([np.arange(20.0, top, 1.0), [lim[1], lim[2], lim[3], top]]))
    theta = theta[theta <= top]
    t_a, t_g = theta + KELVIN, top + KELVIN
    h = alpha_c + emissivity_resultant * STEFAN_BOLTZMANN * (t_g + t_a) * (t_g ** 2 + t_a ** 2)
    worst = float(np.max(h / (steel.specific_heat(theta) * steel_density_kg_m3)))
    dt = float(np.max(np.diff(time_s))) if len(time_s) > 1 else 0.0
    return math.inf if dt <= 0.0 else 1.0 / (dt * worst)
