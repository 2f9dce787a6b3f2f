"""Gas temperature of the ceiling jet of a fire plume: Alpert's correlation.

R. L. Alpert, "Calculation of response time of ceiling-mounted fire detectors", Fire Technology 8
(1972) 181-195 (coefficients and ranges from memory):

    T - T_inf = 16.9 Q^(2/3) / H^(5/3)      for r / H <= 0.18  (the plume's turning region)
    T - T_inf = 5.38 (Q / r)^(2/3) / H      for r / H >  0.18

Q the total (not convective) heat release rate [kW], H the height of the ceiling above the fuel [m],
r the horizontal distance from the plume axis [m], T the largest temperature across the jet's depth.
Derived for steady fires under a smooth, unconfined, flat ceiling with no hot layer below it and
flames below the ceiling. The two branches meet to 0.1 % at r / H = 0.18 (5.38 / 0.18^(2/3) = 16.88).
Used by the travelling fire (far field) and, as a stated bound, by the localised fire off its axis.
"""

from __future__ import annotations

import numpy as np

#: Coefficient of the turning region [K m^(5/3) kW^(-2/3)], Alpert 1972 (from memory).
TURNING_COEFFICIENT = 16.9
#: Coefficient of the jet beyond it [K m^(5/3) kW^(-2/3)], Alpert 1972 (from memory).
JET_COEFFICIENT = 5.38
#: r / H at which the branches change, Alpert 1972 (from memory).
TURNING_RADIUS_RATIO = 0.18


def ceiling_jet_temperature_C(distance_m, heat_release_W, ceiling_height_m, ambient_C=20.0):
    """Largest gas temperature [C] of the ceiling jet at ``distance_m`` from the plume axis (Alpert 1972).

    T = T_inf + 16.9 Q^(2/3) / H^(5/3) for r/H <= 0.18, T_inf + 5.38 (Q/r)^(2/3) / H beyond, Q in kW
    (the argument is in W and is divided by 1000 here). Arrays broadcast. Q = 0 gives the ambient.
    Inputs are assumed checked by the caller (r >= 0, Q >= 0, H > 0).

    Examples
    --------
    Hand calculation, Q = 1 MW = 1000 kW, H = 3 m, r = 3 m (r/H = 1 > 0.18):
    5.38 x (1000 / 3)^(2/3) / 3 = 5.38 x 48.075 / 3 = 86.21 K, so 106.2 C at 20 C ambient.

    >>> round(float(ceiling_jet_temperature_C(3.0, 1e6, 3.0)), 1)
    106.2
    """
    r = np.asarray(distance_m, dtype=float)
    q_kw = np.asarray(heat_release_W, dtype=float) / 1e3
    h = np.asarray(ceiling_height_m, dtype=float)
    turning = TURNING_COEFFICIENT * q_kw ** (2.0 / 3.0) / h ** (5.0 / 3.0)
    with np.errstate(divide="ignore", invalid="ignore"):
        jet = JET_COEFFICIENT * (q_kw / r) ** (2.0 / 3.0) / h
    return ambient_C + np.where(r <= TURNING_RADIUS_RATIO * h, turning, jet)
