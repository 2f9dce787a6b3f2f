"""Calls of the package's kernels (steelfire.models.heat.run) in the shapes the tests need.

Nothing here computes physics: it builds :class:`heat.Rows` / :class:`heat.Fires` from plain values and
reads the histories back, so that a test can hold the kernels to the plain-Python twins (tests/twins.py)
or to a scipy reference.
"""

from __future__ import annotations

import numpy as np

from steelfire.models import heat

EPS_RES = 0.7      # Phi eps_m eps_f = 1.0 x 0.7 x 1.0: EN 1993-1-2 2.2(2), EN 1991-1-2 3.1(6)-(7)
RHO_A = 7850.0     # EN 1993-1-2 3.2.2(1)


def member(*, bare, section_factor_per_m, fire=0, alpha_c=35.0, thickness_m=1.0, density=1.0, specific_heat=1.0,
           conductivity=1.0, moisture_delay_s=0.0, threshold_C=np.inf):
    """One member row as a dict; ``conductivity`` a number or a table [(steel C, W/(m K)), ...]."""
    table = ((20.0, float(conductivity)),) if np.isscalar(conductivity) else tuple(conductivity)
    return dict(fire=fire, bare=bare, section_factor_per_m=section_factor_per_m, alpha_c=alpha_c,
                thickness_m=thickness_m, density=density, specific_heat=specific_heat, table=table,
                moisture_delay_s=moisture_delay_s, threshold_C=threshold_C)


def rows(members) -> heat.Rows:
    """:class:`heat.Rows` of member dicts (:func:`member`), conductivity tables padded to the longest."""
    n = len(members)
    k = max(len(m["table"]) for m in members)
    lam_T, lam_v = np.zeros((n, k)), np.ones((n, k))
    for i, m in enumerate(members):
        for j, (th, lam) in enumerate(m["table"]):
            lam_T[i, j], lam_v[i, j] = th, lam

    def col(key, dtype=float):
        return np.array([m[key] for m in members], dtype=dtype)

    return heat.Rows(fire=col("fire", np.int64), bare=col("bare", bool), section_factor_per_m=col("section_factor_per_m"),
                     alpha_c=col("alpha_c"), thickness_m=col("thickness_m"), density=col("density"),
                     specific_heat=col("specific_heat"), conductivity_C=lam_T, conductivity=lam_v,
                     conductivity_n=np.array([len(m["table"]) for m in members], dtype=np.int64),
                     moisture_delay_s=col("moisture_delay_s"), threshold_C=col("threshold_C"))


def run(time_s, gas_C, members, radiation_C=None, eps_res=EPS_RES, rho_a=RHO_A, query_idx=None,
        keep_history=True) -> heat.ThermalRun:
    """:func:`heat.run` of member dicts in the fires ``gas_C`` (T, or T x F)."""
    t = np.asarray(time_s, dtype=float)
    g = np.asarray(gas_C, dtype=float).reshape(len(t), -1)
    r = None if radiation_C is None else np.asarray(radiation_C, dtype=float).reshape(g.shape)
    return heat.run(heat.Fires(t, g, r), rows(members), emissivity_resultant=eps_res, steel_density_kg_m3=rho_a,
                    query_idx=query_idx, keep_history=keep_history)


def bare_history(time_s, gas_C, ksh_amv, alpha_c=35.0, eps_res=EPS_RES, rho_a=RHO_A, radiation_C=None):
    """Steel temperatures [C] of one bare member (EN 1993-1-2 eq (4.25)) on the grid ``time_s``."""
    m = member(bare=True, section_factor_per_m=ksh_amv, alpha_c=alpha_c)
    return run(time_s, gas_C, [m], radiation_C=radiation_C, eps_res=eps_res, rho_a=rho_a).history_C[:, 0]


def protected_history(time_s, gas_C, ap_v, d_p, rho_p, c_p, conductivity, delay_s=0.0, rho_a=RHO_A):
    """Steel temperatures [C] of one protected member (EN 1993-1-2 eq (4.27)) on the grid ``time_s``."""
    m = member(bare=False, section_factor_per_m=ap_v, thickness_m=d_p, density=rho_p, specific_heat=c_p,
               conductivity=conductivity, moisture_delay_s=delay_s)
    return run(time_s, gas_C, [m], rho_a=rho_a).history_C[:, 0]


def protected_histories(time_s, gas_C, ap_v, d_p, rho_p=800.0, c_p=1700.0, conductivity=0.2):
    """Histories (T x N) of N protected members in one call (arrays broadcast), constant conductivity."""
    ap_v, d_p = np.broadcast_arrays(np.asarray(ap_v, float), np.asarray(d_p, float))
    ms = [member(bare=False, section_factor_per_m=a, thickness_m=d, density=rho_p, specific_heat=c_p,
                 conductivity=conductivity) for a, d in zip(ap_v.ravel(), d_p.ravel())]
    return run(time_s, gas_C, ms).history_C


def bare_histories(time_s, gas_C, ksh_amv, alpha_c=35.0):
    """Histories (T x N) of N bare members in one call."""
    ms = [member(bare=True, section_factor_per_m=a, alpha_c=alpha_c) for a in np.ravel(ksh_amv)]
    return run(time_s, gas_C, ms).history_C
