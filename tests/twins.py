"""Plain-Python twins of the numba kernels behind steelfire.models.heat.run (plain floats, no numpy).

They restate EN 1993-1-2 eq (3.2a)-(3.2d), (4.25) and (4.27) independently of the package, one member
in one fire at a time, so that :func:`steelfire.models.heat.run` (many members, each in its own fire
column, arithmetic rearranged to one division and a polynomial e^y - 1) can be held to them (1e-9
relative), and they serve as the reference loop in the benchmarks.

Conventions shared with the kernels: steel and gas start at 20 C; explicit steps on the given grid
(not necessarily uniform) with the gas and c_a taken at the start of each step; eq (4.27)'s increment
not negative while the gas heats; free water holds the steel at 100 C for ``delay_s`` (ECCS, see
steelfire.models.protection.moisture_delay_s).
"""

import math

SIGMA = 5.67e-8


def c_a(theta):
    """EN 1993-1-2 eq (3.2a)-(3.2d), ends held."""
    if theta < 600.0:
        t = max(theta, 20.0)
        return 425.0 + 0.773 * t - 1.69e-3 * t ** 2 + 2.22e-6 * t ** 3
    if theta < 735.0:
        return 666.0 + 13002.0 / (738.0 - theta)
    if theta < 900.0:
        return 545.0 + 17820.0 / (theta - 731.0)
    return 650.0


def interp_held(x, table):
    """Linear interpolation in [(x, y), ...], the end values held outside."""
    if x <= table[0][0]:
        return table[0][1]
    for (x0, y0), (x1, y1) in zip(table, table[1:]):
        if x <= x1:
            return y0 + (y1 - y0) * (x - x0) / (x1 - x0)
    return table[-1][1]


def bare_history(time_s, gas_C, ksh_amv, alpha_c=35.0, eps_res=0.7, rho_a=7850.0, radiation_C=None):
    """EN 1993-1-2 eq (4.25) with h_net of EN 1991-1-2 eq (3.1)-(3.3): convection to the gas,
    radiation from ``radiation_C`` (the gas where None)."""
    theta = 20.0
    out = [theta]
    for i in range(len(time_s) - 1):
        dt = time_s[i + 1] - time_s[i]
        g = gas_C[i]
        r = g if radiation_C is None else radiation_C[i]
        h = alpha_c * (g - theta) + eps_res * SIGMA * ((r + 273.0) ** 4 - (theta + 273.0) ** 4)
        theta = theta + ksh_amv / (c_a(theta) * rho_a) * h * dt
        out.append(theta)
    return out


def protected_history(time_s, gas_C, ap_v, d_p, rho_p, c_p, lam_table, delay_s=0.0, rho_a=7850.0):
    """EN 1993-1-2 eq (4.27), lambda_p from ``lam_table`` [(steel C, W/(m K)), ...] (ends held)."""
    theta = 20.0
    held = 0.0
    out = [theta]
    for i in range(len(time_s) - 1):
        dt = time_s[i + 1] - time_s[i]
        g, dg = gas_C[i], gas_C[i + 1] - gas_C[i]
        lam = interp_held(theta, lam_table)
        cr = c_a(theta) * rho_a
        phi = c_p * rho_p * d_p * ap_v / cr
        d = lam * ap_v * (g - theta) / (d_p * cr * (1.0 + phi / 3.0)) * dt - (math.exp(phi / 10.0) - 1.0) * dg
        if dg > 0.0 and d < 0.0:
            d = 0.0
        if delay_s > 0.0 and held < delay_s and theta + d >= 100.0 and d > 0.0:
            if theta < 100.0:
                theta = 100.0
            else:
                held += dt
        else:
            theta = theta + d
        out.append(theta)
    return out
