"""Plain-Python twin of the conduction kernel in steelfire.models.conduction (plain floats and lists).

It restates the scheme independently of the package: a plane protection layer of n cells (cell
centres, conductivity of each cell at its own temperature, harmonic mean between cells), the outer
face at the gas temperature (or behind a surface coefficient), the steel lumped at the inner face
with c_a of EN 1993-1-2 eq (3.2) at its temperature at the start of the substep, backward Euler in
time with one tridiagonal (Thomas) solve per substep, and free water as latent heat at 100 C by the
enthalpy update described in the module. The compiled kernel must match it to 1e-9 relative.

Besides the steel history it returns the bookkeeping the energy tests need (heat in through the face,
heat kept by the protection as sensible and latent heat, by the steel) and the final profile.
"""

import math

from twins import c_a, interp_held

SIGMA = 5.67e-8               # EN 1991-1-2 3.1(6)
KELVIN = 273.0                # EN 1991-1-2 eq (3.3)
LATENT_J_KG = 2.257e6         # water at 100 C (steam tables, from memory)
BOIL_C = 100.0
# the scheme's own parameters (must equal those of the module)
HOLD_PER_C = 1000.0
SAFE_SPAN_MIN_C = 1.0e-9


def thomas(sub, diag, sup, rhs):
    """Solve a tridiagonal system; sub[0] and sup[-1] are not used."""
    n = len(diag)
    d = [0.0] * n
    r = [0.0] * n
    d[0] = diag[0]
    r[0] = rhs[0]
    for i in range(1, n):
        m = sub[i] / d[i - 1]
        d[i] = diag[i] - m * sup[i - 1]
        r[i] = rhs[i] - m * r[i - 1]
    x = [0.0] * n
    x[n - 1] = r[n - 1] / d[n - 1]
    for i in range(n - 2, -1, -1):
        x[i] = (r[i] - sup[i] * x[i + 1]) / d[i]
    return x


def member_history(time_s, gas_C, section_factor_per_m, thickness_m, density, specific_heat, lam_table,
                   moisture_percent=0.0, cells=8, substeps=1, rho_a=7850.0, surface=None):
    """One member: steel temperature at the grid times [C] and the energy bookkeeping [J/m2 of face].

    ``lam_table``: ((cell temperature [C], lambda [W/(m K)]), ...), ends held.
    ``surface``: None (face at the gas temperature) or (alpha_c [W/(m2 K)], resultant emissivity [-]).
    """
    n = cells
    h = thickness_m / n
    cd = density * specific_heat * h                         # dry heat capacity of a cell [J/(m2 K)]
    w0 = moisture_percent / 100.0 * density * h * LATENT_J_KG  # latent heat of a cell's water [J/m2]
    steel_per_area = rho_a / section_factor_per_m             # rho_a V/A_p [kg/m2]
    T = [20.0] * n
    W = [w0] * n
    ts = 20.0
    t_surf = 20.0
    m_run = 20.0
    steel = [20.0]
    heat_in = 0.0
    steel_heat = 0.0
    safe_steps = 0
    for i in range(len(time_s) - 1):
        dt = (time_s[i + 1] - time_s[i]) / substeps
        for k in range(1, substeps + 1):
            tg = gas_C[i] + (gas_C[i + 1] - gas_C[i]) * (k / substeps)
            m_run = max(m_run, tg)
            lam = [interp_held(x, lam_table) for x in T]
            g_in = [2.0 * lam[j] * lam[j + 1] / (h * (lam[j] + lam[j + 1])) for j in range(n - 1)]
            g_half0 = 2.0 * lam[0] / h
            if surface is None:
                h_eff = math.inf
                g_face = g_half0
            else:
                alpha, eps = surface
                a, b = tg + KELVIN, t_surf + KELVIN
                h_eff = alpha + eps * SIGMA * (a * a + b * b) * (a + b)
                g_face = h_eff * g_half0 / (h_eff + g_half0)
            g_steel = 2.0 * lam[n - 1] / h
            left = [g_face] + g_in           # conductance to the left of each cell (gas side)
            right = g_in + [g_steel]         # and to the right (steel side)
            cs = c_a(ts) * steel_per_area
            plateau = [W[j] > 0.0 and T[j] >= BOIL_C for j in range(n)]

            def solve(cap):
                sub = [0.0] + [-dt * left[j] for j in range(1, n)] + [-dt * g_steel]
                diag = [cap[j] + dt * (left[j] + right[j]) for j in range(n)] + [cs + dt * g_steel]
                sup = [-dt * right[j] for j in range(n)] + [0.0]
                rhs = [cap[j] * T[j] for j in range(n)] + [cs * ts]
                rhs[0] += dt * g_face * tg
                return thomas(sub, diag, sup, rhs)

            def update(cap, x):
                t_new, w_new, bad = list(T), list(W), False
                for j in range(n):
                    if W[j] > 0.0:
                        q = (cap[j] if plateau[j] else cd) * (x[j] - BOIL_C)
                        evap = min(max(q, 0.0), W[j])
                        w_new[j] = W[j] - evap
                        t_new[j] = BOIL_C + (q - evap) / cd if (evap > 0.0 or plateau[j]) else x[j]
                        if plateau[j]:
                            lo = tg if j == 0 else x[j - 1]
                            hi = x[j + 1]
                            bad = bad or t_new[j] > max(T[j], lo, x[j], hi)
                    else:
                        t_new[j] = x[j]
                return t_new, w_new, bad

            cap = [cd + (W[j] * HOLD_PER_C if plateau[j] else 0.0) for j in range(n)]
            x = solve(cap)
            t_new, w_new, bad = update(cap, x)
            if bad:
                safe_steps += 1
                cap = []
                for j in range(n):
                    if plateau[j]:
                        gsum = dt * (left[j] + right[j])
                        span = max(gsum / (cd + gsum) * (m_run - BOIL_C), SAFE_SPAN_MIN_C)
                        cap.append(cd + W[j] / span)
                    else:
                        cap.append(cd)
                x = solve(cap)
                t_new, w_new, _ = update(cap, x)
            heat_in += dt * g_face * (tg - x[0])
            steel_heat += cs * (x[n] - ts)
            if surface is not None:
                t_surf = (h_eff * tg + g_half0 * x[0]) / (h_eff + g_half0)
            T, W, ts = t_new, w_new, x[n]
        steel.append(ts)
    return {
        "steel": steel,
        "heat_in": heat_in,                                     # through the face [J/m2]
        "protection_sensible": sum(cd * (x - 20.0) for x in T),  # [J/m2]
        "latent": sum(w0 - w for w in W),                       # [J/m2]
        "steel_heat": steel_heat,                               # sum of c_a(theta_old) rho_a V/A_p d theta
        "profile": T,
        "water_left": W,
        "safe_steps": safe_steps,
        "steel_per_area": steel_per_area,
    }
