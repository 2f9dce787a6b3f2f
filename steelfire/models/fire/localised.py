"""Localised fire, EN 1991-1-2 Annex C: flame length, plume temperature, ceiling heat flux.

Every coefficient below is quoted from memory of EN 1991-1-2:2002 Annex C and checked against the
correlations the annex rests on (Heskestad's flame length and plume, Hasemi's ceiling flux), whose
SI forms with Q in kW convert to the annex's Q in W as follows (hand calculation):

* (C.1) flame length L_f = -1.02 D + 0.0148 Q^(2/5): Heskestad's 0.235 Q_kW^(2/5) = 0.235 / 1000^(2/5)
  Q^(2/5) = 0.235 / 15.85 Q^(2/5) = 0.01483 Q^(2/5);
* (C.3) virtual origin z_0 = -1.02 D + 0.00524 Q^(2/5): Heskestad's 0.083 Q_kW^(2/5) = 0.083 / 15.85
  = 0.00524;
* (C.2) plume axis theta(z) = 20 + 0.25 Q_c^(2/3) (z - z_0)^(-5/3) <= 900 C, Q_c = 0.8 Q: Heskestad's
  25 Q_c,kW^(2/3) = 25 / 1000^(2/3) = 0.25 Q_c^(2/3) (for ambient air at 20 C);
* (C.4)-(C.8) Hasemi's flux at the ceiling once the flame reaches it (L_f >= H), and the net flux
  (C.9) with alpha_c = 35 W/(m2 K) (EN 1991-1-2 3.3.1.1(3)); several fires (C.10): fluxes add, the
  sum taken as at most 100 kW/m2;
* scope, C(10) as remembered: D <= 10 m and Q <= 50 MW. The annex states it beside the ceiling-flux
  rules; this module applies it to the plume too (the same correlations' test range).
* beside the fire (r > D/2), outside the annex: Heskestad's radial profile of the plume (from memory,
  his plume chapter of the SFPE Handbook): the temperature rise falls to half its axis value at
  b = 0.12 (T_0 / T_inf)^(1/2) (z - z_0), Gaussian in r; measured here from the fire's edge.

Symbols: Q heat release [W] (E.4 or a table), D fire diameter [m], H height of the ceiling above the
fire source [m], z height above the fire source [m], r horizontal distance from the fire axis [m].
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from steelfire.errors import InputError, OutOfScopeError
from steelfire.models.fire import ceilingjet, heatrelease, surface
from steelfire.models.fire.heatrelease import as_times_s

#: Flame length, eq (C.1): L_f = FLAME_DIAMETER_FACTOR D + FLAME_LENGTH_COEFFICIENT Q^(2/5) [m], Q [W].
FLAME_DIAMETER_FACTOR = -1.02
FLAME_LENGTH_COEFFICIENT = 0.0148
#: Virtual origin, eq (C.3): z_0 = -1.02 D + 0.00524 Q^(2/5) [m], Q [W].
VIRTUAL_ORIGIN_COEFFICIENT = 0.00524
#: Plume axis temperature, eq (C.2): 20 + 0.25 Q_c^(2/3) (z - z_0)^(-5/3) [C], Q_c [W].
PLUME_COEFFICIENT = 0.25
#: Upper limit of eq (C.2) [C].
PLUME_MAX_C = 900.0
#: Convective part of the heat release, Q_c = 0.8 Q by default, Annex C(3).
CONVECTIVE_FRACTION = 0.8
#: Reference of the dimensionless heat releases Q_H* and Q_D*, eq (C.6) and (C.8) [W m^(-5/2)].
DIMENSIONLESS_REFERENCE = 1.11e6
#: Horizontal flame length, eq (C.5): L_h = 2.9 H (Q_H*)^0.33 - H [m].
HORIZONTAL_FLAME_COEFFICIENT = 2.9
HORIZONTAL_FLAME_EXPONENT = 0.33
#: Virtual heat source, eq (C.7): z' = 2.4 D (Q_D*^(2/5) - Q_D*^(2/3)) for Q_D* < 1, 2.4 D (1 - Q_D*^(2/5)) else.
VIRTUAL_SOURCE_COEFFICIENT = 2.4
#: Ceiling flux branches of eq (C.4) [W/m2]: 100 000 (y <= 0.30); 136 300 - 121 000 y (0.30 < y < 1.0);
#: 15 000 y^(-3.7) (y >= 1.0).
FLUX_MAX_W_M2 = 100e3
FLUX_LINEAR_W_M2 = (136.3e3, 121e3)
FLUX_POWER_W_M2, FLUX_POWER_EXPONENT = 15e3, -3.7
Y_FLAME, Y_TIP = 0.30, 1.0
#: Upper limit of the summed flux of several fires, eq (C.10) [W/m2].
TOTAL_FLUX_MAX_W_M2 = 100e3
#: Scope of Annex C, C(10) (from memory): fire diameter and heat release.
DIAMETER_MAX_M = 10.0
HEAT_RELEASE_MAX_W = 50e6
#: Plume half-temperature radius b = 0.12 (T_0 / T_inf)^(1/2) (z - z_0) [m], Heskestad (from memory).
PLUME_RADIUS_COEFFICIENT = 0.12
#: Ambient of the plume correlations [K] (20 C, as eq (C.2)).
PLUME_AMBIENT_K = 293.0

#: What set a member's exposure at each time step (``LocalisedExposure.governing``).
GOVERNING = ("plume axis, eq (C.2)", "ceiling jet, Alpert 1972 (bound off the axis)",
             "ceiling flux, eq (C.4)", "plume or jet bound on the ceiling flux",
             "plume beside the fire, Heskestad's radial profile from the fire's edge")
PLUME, JET, CEILING_FLUX, BOUND, PLUME_SIDE = range(5)


def flame_length_m(heat_release_W, diameter_m):
    """Flame length L_f = -1.02 D + 0.0148 Q^(2/5) [m], EN 1991-1-2 eq (C.1) (Heskestad), Q [W], D [m].

    Negative for fires too weak to stand a flame above their base. Valid for D <= 10 m, Q <= 50 MW.

    Examples
    --------
    Hand calculation, Q = 5 MW, D = 2 m: Q^(2/5) = exp(0.4 ln 5e6) = exp(6.16998) = 478.17;
    L_f = -2.04 + 0.0148 x 478.17 = 5.037 m.

    >>> round(float(flame_length_m(5e6, 2.0)), 3)
    5.037
    """
    q = np.asarray(heat_release_W, dtype=float)
    return FLAME_DIAMETER_FACTOR * diameter_m + FLAME_LENGTH_COEFFICIENT * q ** 0.4


def virtual_origin_m(heat_release_W, diameter_m):
    """Height of the virtual origin z_0 = -1.02 D + 0.00524 Q^(2/5) [m], EN 1991-1-2 eq (C.3), Q [W], D [m].

    >>> round(float(virtual_origin_m(5e6, 2.0)), 4)  # -2.04 + 0.00524 x 478.17 (hand calculation)
    0.4656
    """
    q = np.asarray(heat_release_W, dtype=float)
    return FLAME_DIAMETER_FACTOR * diameter_m + VIRTUAL_ORIGIN_COEFFICIENT * q ** 0.4


def plume_temperature_C(height_m, heat_release_W, diameter_m, convective_fraction=CONVECTIVE_FRACTION):
    """Gas temperature [C] on the plume axis at ``height_m`` above the fire source, EN 1991-1-2 eq (C.2).

    theta(z) = 20 + 0.25 Q_c^(2/3) (z - z_0)^(-5/3) <= 900 C, Q_c = 0.8 Q [W] (C(3)), z_0 by eq (C.3).
    The annex gives it for a flame that does not reach the ceiling (L_f < H) or a fire in open air,
    D <= 10 m, Q <= 50 MW. At or below the virtual origin (z <= z_0) the point is in the flame's base
    and takes the 900 C limit. Arrays broadcast.

    Examples
    --------
    Hand calculation, Q = 5 MW, D = 2 m, z = 6 m: Q_c^(2/3) = (4e6)^(2/3) = 25 198.4;
    z - z_0 = 6 - 0.4656 = 5.5344, 5.5344^(-5/3) = exp(-5/3 x 1.71098) = 0.057748;
    theta = 20 + 0.25 x 25 198.4 x 0.057748 = 383.8 C.

    >>> round(float(plume_temperature_C(6.0, 5e6, 2.0)), 1)
    383.8
    """
    z = np.asarray(height_m, dtype=float)
    q = np.asarray(heat_release_W, dtype=float)
    dz = z - virtual_origin_m(q, diameter_m)
    with np.errstate(divide="ignore", invalid="ignore"):
        rise = PLUME_COEFFICIENT * (convective_fraction * q) ** (2.0 / 3.0) * dz ** (-5.0 / 3.0)
    rise = np.where(dz > 0.0, rise, np.inf)
    return np.where(q > 0.0, np.minimum(20.0 + rise, PLUME_MAX_C), 20.0)


def plume_limit_height_m(heat_release_W, diameter_m, convective_fraction=CONVECTIVE_FRACTION):
    """Height [m] above the fire source up to which eq (C.2) of EN 1991-1-2 gives its 900 C limit.

    Setting 20 + 0.25 Q_c^(2/3) (z - z_0)^(-5/3) = 900 C gives
    z_900 = z_0 + (0.25 Q_c^(2/3) / 880)^(3/5), Q_c = 0.8 Q [W] (C(3)), z_0 by eq (C.3). Below it the
    plume axis is at 900 C; above it eq (C.2) falls with height. The profile of eq (C.2) has its kink
    there, so a plotted profile holds this height. Same validity as eq (C.2): D <= 10 m, Q <= 50 MW.

    Examples
    --------
    Hand calculation, Q = 5 MW, D = 2 m: Q_c^(2/3) = (4e6)^(2/3) = 25 198.4;
    0.25 x 25 198.4 / 880 = 7.15864; 7.15864^0.6 = exp(0.6 x 1.96832) = 3.25760;
    z_900 = 0.46564 + 3.25760 = 3.7232 m.

    >>> round(float(plume_limit_height_m(5e6, 2.0)), 4)
    3.7232
    >>> round(float(plume_temperature_C(plume_limit_height_m(5e6, 2.0), 5e6, 2.0)), 9)
    900.0
    """
    q = np.asarray(heat_release_W, dtype=float)
    rise = PLUME_COEFFICIENT * (convective_fraction * q) ** (2.0 / 3.0) / (PLUME_MAX_C - 20.0)
    return virtual_origin_m(q, diameter_m) + rise ** 0.6


def plume_beside_temperature_C(distance_m, height_m, heat_release_W, diameter_m,
                               convective_fraction=CONVECTIVE_FRACTION):
    """Gas temperature [C] of the plume beside the fire, at ``distance_m`` > D/2 from its axis.

    Not in Annex C, which gives the plume on its axis only (eq (C.2)). Heskestad's radial profile (from
    memory): the rise over ambient falls as a Gaussian with half its axis value at the radius
    b = 0.12 (T_0 / T_inf)^(1/2) (z - z_0) [m], T_0 the axis temperature [K] at z (eq (C.2), capped at
    900 C), T_inf = 293 K, z_0 by eq (C.3). The profile is measured from the fire's edge, not its axis:
    theta = 20 + (theta(z) - 20) 2^(-(rho / b)^2), rho = max(r - D/2, 0), so it joins the axis value
    used above the fire (r <= D/2) and is hotter than the axis-centred profile for every r. At or below
    the virtual origin (z <= z_0) the plume has no width there: 20 C. Same validity as eq (C.2).

    Examples
    --------
    Hand calculation, Q = 2 MW, D = 1 m, z = 4 m, r = 0.6 m: Q^(2/5) = 331.445, z_0 = -1.02 + 0.00524 x
    331.445 = 0.71677, z - z_0 = 3.28323; eq (C.2): 0.25 x (1.6e6)^(2/3) x 3.28323^(-5/3) = 0.25 x
    13 679.8 x 0.137879 = 471.54 K; b = 0.12 x (764.54 / 293)^(1/2) x 3.28323 = 0.12 x 1.61535 x 3.28323
    = 0.63643 m; rho = 0.1 m, 2^(-(0.1 / 0.63643)^2) = 2^(-0.024689) = 0.98303; 20 + 471.54 x 0.98303 =
    483.5 C.

    >>> round(float(plume_beside_temperature_C(0.6, 4.0, 2e6, 1.0)), 1)
    483.5
    """
    r = np.asarray(distance_m, dtype=float)
    axis = plume_temperature_C(height_m, heat_release_W, diameter_m, convective_fraction)
    dz = np.asarray(height_m, dtype=float) - virtual_origin_m(heat_release_W, diameter_m)
    b = PLUME_RADIUS_COEFFICIENT * np.sqrt((axis + 273.0) / PLUME_AMBIENT_K) * dz
    rho = np.maximum(r - 0.5 * diameter_m, 0.0)
    with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
        share = np.where(dz > 0.0, np.exp2(-(rho / np.where(dz > 0.0, b, 1.0)) ** 2), 0.0)
    return 20.0 + (axis - 20.0) * np.where(rho > 0.0, share, 1.0)


def horizontal_flame_length_m(heat_release_W, ceiling_height_m):
    """Horizontal flame length L_h = 2.9 H (Q_H*)^0.33 - H [m], EN 1991-1-2 eq (C.5), (C.6).

    Q_H* = Q / (1.11e6 H^2.5) [-], Q [W], H the height of the ceiling above the fire source [m].

    Hand calculation, Q = 20 MW, H = 4 m: Q_H* = 20e6 / (1.11e6 x 32) = 0.563063;
    0.563063^0.33 = exp(0.33 x -0.574367) = 0.827337; L_h = 2.9 x 4 x 0.827337 - 4 = 5.597 m.

    >>> round(float(horizontal_flame_length_m(20e6, 4.0)), 3)
    5.597
    """
    q_h = np.asarray(heat_release_W, dtype=float) / (DIMENSIONLESS_REFERENCE * ceiling_height_m ** 2.5)
    return HORIZONTAL_FLAME_COEFFICIENT * ceiling_height_m * q_h ** HORIZONTAL_FLAME_EXPONENT - ceiling_height_m


def virtual_source_height_m(heat_release_W, diameter_m):
    """Vertical position z' of the virtual heat source [m], EN 1991-1-2 eq (C.7), (C.8).

    Q_D* = Q / (1.11e6 D^2.5); z' = 2.4 D (Q_D*^(2/5) - Q_D*^(2/3)) for Q_D* < 1, 2.4 D (1 - Q_D*^(2/5))
    for Q_D* >= 1. The branches meet at Q_D* = 1 (both 0).

    Hand calculation, Q = 20 MW, D = 3 m: Q_D* = 20e6 / (1.11e6 x 15.58846) = 1.155856 >= 1;
    1.155856^0.4 = exp(0.4 x 0.144841) = 1.059648; z' = 7.2 x (1 - 1.059648) = -0.4295 m.

    >>> round(float(virtual_source_height_m(20e6, 3.0)), 4)
    -0.4295
    """
    q_d = np.asarray(heat_release_W, dtype=float) / (DIMENSIONLESS_REFERENCE * diameter_m ** 2.5)
    low = q_d ** 0.4 - q_d ** (2.0 / 3.0)
    high = 1.0 - q_d ** 0.4
    return VIRTUAL_SOURCE_COEFFICIENT * diameter_m * np.where(q_d < 1.0, low, high)


def ceiling_flux_from_y_W_m2(y):
    """Heat flux [W/m2] at the ceiling from the parameter y [-], EN 1991-1-2 eq (C.4) (Hasemi).

    100 000 for y <= 0.30; 136 300 - 121 000 y for 0.30 < y < 1.0; 15 000 y^(-3.7) for y >= 1.0.
    The first two branches meet at y = 0.30 (136 300 - 36 300 = 100 000); at y = 1.0 the published
    branches differ by 300 W/m2 (15 300 from below, 15 000 from above) and are kept as published.

    >>> [round(float(ceiling_flux_from_y_W_m2(y)), 1) for y in (0.2, 0.5, 2.0)]
    [100000.0, 75800.0, 1154.2]
    """
    y = np.asarray(y, dtype=float)
    a, b = FLUX_LINEAR_W_M2
    with np.errstate(divide="ignore", invalid="ignore"):
        tail = FLUX_POWER_W_M2 * np.maximum(y, Y_TIP) ** FLUX_POWER_EXPONENT
    return np.where(y <= Y_FLAME, FLUX_MAX_W_M2, np.where(y < Y_TIP, a - b * y, tail))


def ceiling_y(distance_m, heat_release_W, diameter_m, ceiling_height_m):
    """y = (r + H + z') / (L_h + H + z') [-], EN 1991-1-2 C(5), with L_h by (C.5) and z' by (C.7).

    Where L_h + H + z' <= 0 (a small, very intense fire: z' far below the source) the flame reaches
    beyond any r and y is taken as 0 (the annex's largest flux); the annex does not cover this case.
    """
    r = np.asarray(distance_m, dtype=float)
    lh = horizontal_flame_length_m(heat_release_W, ceiling_height_m)
    zp = virtual_source_height_m(heat_release_W, diameter_m)
    den = lh + ceiling_height_m + zp
    with np.errstate(divide="ignore", invalid="ignore"):
        y = (r + ceiling_height_m + zp) / den
    return np.where(den > 0.0, y, 0.0)


def ceiling_flux_W_m2(distance_m, heat_release_W, diameter_m, ceiling_height_m):
    """Heat flux [W/m2] received at the ceiling at ``distance_m`` from the fire axis, EN 1991-1-2 C(5)-(8).

    Eq (C.4) at y of :func:`ceiling_y`. For a flame that reaches the ceiling (L_f >= H), D <= 10 m and
    Q <= 50 MW. Arrays broadcast.
    """
    return ceiling_flux_from_y_W_m2(ceiling_y(distance_m, heat_release_W, diameter_m, ceiling_height_m))


def total_flux_W_m2(fluxes_W_m2, axis=0):
    """Flux of several localised fires [W/m2]: h_tot = h_1 + h_2 + ... <= 100 kW/m2, EN 1991-1-2 eq (C.10).

    ``fluxes_W_m2`` holds the fires along ``axis`` (each by eq (C.4)).

    >>> float(total_flux_W_m2([60e3, 50e3]))
    100000.0
    """
    return np.minimum(np.sum(np.asarray(fluxes_W_m2, dtype=float), axis=axis), TOTAL_FLUX_MAX_W_M2)


def equivalent_diameter_m(fire_area_m2):
    """Diameter [m] of the circle of area ``fire_area_m2`` [m2]: D = sqrt(4 A / pi) (geometry).

    >>> round(equivalent_diameter_m(math.pi), 12)
    2.0
    """
    if not (isinstance(fire_area_m2, (int, float)) and math.isfinite(fire_area_m2) and fire_area_m2 > 0):
        raise InputError("fire_area_m2", fire_area_m2, "must be a finite number > 0 [m2]")
    return math.sqrt(4.0 * fire_area_m2 / math.pi)


def scope_violations(diameter_m, peak_heat_release_W, code=None):
    """The limits of EN 1991-1-2 Annex C(10) a fire breaks, as (field, value, allowed) triples.

    Scope (from memory): D <= 10 m, Q <= 50 MW. ``code`` may override the limits by the names
    ``annex_c_diameter_max_m`` and ``annex_c_heat_release_max_MW`` (EN values by default).
    """
    code = code or {}
    d_max = float(code.get("annex_c_diameter_max_m", DIAMETER_MAX_M))
    q_max_mw = float(code.get("annex_c_heat_release_max_MW", HEAT_RELEASE_MAX_W / 1e6))
    out = []
    if diameter_m > d_max:
        out.append(("fire.localised.diameter_m", diameter_m, f"Annex C covers fire diameters up to {d_max:g} m"))
    if peak_heat_release_W > q_max_mw * 1e6:
        out.append(("heat release Q [MW]", round(peak_heat_release_W / 1e6, 3),
                    f"Annex C covers heat releases up to {q_max_mw:g} MW"))
    return out


@dataclass(frozen=True)
class LocalisedExposure:
    """What one member sees of a localised fire, per time step.

    Where the flame is below the ceiling (``impacts_ceiling`` False) the exposure is a gas temperature
    (``gas_temperature_C``; ``flux_W_m2`` NaN there); where it reaches the ceiling, an incident heat
    flux (``flux_W_m2``; ``gas_temperature_C`` NaN there). ``governing`` indexes :data:`GOVERNING`.
    ``alpha_c`` and ``emissivity`` (resultant Phi eps_m eps_f) are those the flux was compared with
    and the ones a kernel must use for :attr:`effective_gas_temperature_C` to reproduce eq (C.9).
    """

    time_s: np.ndarray
    heat_release_W: np.ndarray
    flame_length_m: np.ndarray
    impacts_ceiling: np.ndarray
    gas_temperature_C: np.ndarray
    flux_W_m2: np.ndarray
    governing: np.ndarray
    alpha_c: float
    emissivity: float

    @property
    def effective_gas_temperature_C(self):
        """One gas temperature per step for the kernels [C]: the gas temperature where there is one,
        the adiabatic surface temperature of the flux elsewhere (exact for eq (C.9); see surface.py)."""
        out = self.gas_temperature_C.copy()
        m = self.impacts_ceiling
        out[m] = surface.adiabatic_surface_temperature_C(self.flux_W_m2[m], self.alpha_c, self.emissivity)
        return out

    @property
    def incident_flux_W_m2(self):
        """One incident flux per step [W/m2]: the flux where there is one, the flux equivalent of the
        gas temperature elsewhere (:func:`surface.surface_flux_W_m2`)."""
        out = self.flux_W_m2.copy()
        m = ~self.impacts_ceiling
        out[m] = surface.surface_flux_W_m2(self.gas_temperature_C[m], self.alpha_c, self.emissivity)
        return out


def _finite(field, value, lo, lo_open, unit, hi=None):
    ok = isinstance(value, (int, float, np.floating)) and not isinstance(value, bool) and math.isfinite(value)
    ok = ok and (value > lo if lo_open else value >= lo) and (hi is None or value <= hi)
    if not ok:
        rng = f"{'>' if lo_open else '>='} {lo:g}" + ("" if hi is None else f" and <= {hi:g}")
        raise InputError(field, value, f"must be a finite number {rng} [{unit}]")
    return float(value)


def member_exposure(time_s, heat_release_W, diameter_m, ceiling_height_m, distance_m, height_m,
                    alpha_c=surface.ALPHA_C_NATURAL, emissivity=surface.EMISSIVITY_STEEL,
                    convective_fraction=CONVECTIVE_FRACTION, allow_out_of_scope=False, code=None):
    """Exposure of a member at ``distance_m`` from the fire axis and ``height_m`` above the fire source.

    Annex C gives the plume on its axis (C.2) and the flux at the ceiling (C.4); a member elsewhere
    needs a rule of our own. The rule, chosen to be conservative, per time step with Q(t):

    Flame below the ceiling (L_f < H, eq (C.1)) -> a gas temperature:

    * r <= D/2 (above the fire): theta(z) of eq (C.2) at the member's height (the axis value, the
      hottest of the plume at that height, for the whole footprint of the fire);
    * r > D/2: the larger of Alpert's ceiling-jet temperature at r (:mod:`ceilingjet`, total Q, H),
      whatever the member's height, capped at theta(H) of eq (C.2) (the plume that feeds the jet), and
      the plume beside the fire at the member's height (:func:`plume_beside_temperature_C`, Heskestad's
      radial profile from the fire's edge). The plume widens with height, so a member just beside a
      small fire is inside it; the jet alone (a ceiling-level value) understated that by hundreds of
      degrees. Outside the plume the jet under the ceiling is the hottest gas before a smoke layer
      forms; taking it at every height overstates it for members lower down.

    Flame reaching the ceiling (L_f >= H) -> an incident heat flux, the larger of:

    * h(r) of eq (C.4)-(C.8), taken at every height (a member under the ceiling as if at it);
    * the flux equivalent (:func:`surface.surface_flux_W_m2`, with ``alpha_c`` and ``emissivity``) of
      the gas temperature the rule above gives for this Q. Reason: (C.4) does not join (C.2) at
      L_f = H. For a small fire under a high ceiling (D/H below about 0.3) L_h is near 0 and y near 1
      as the flame first reaches the ceiling, and the axis flux (H = 10 m, D = 0.5 m: 13.6 kW/m2,
      T_ast below 300 C) is less than the plume gave a moment before (520 C at z = L_f, whatever Q);
      far from the axis the y^-3.7 tail of (C.4) falls below the ceiling jet. The larger of the two
      keeps the exposure from falling as the fire grows through L_f = H; off the axis it is more
      severe than (C.4) alone.

    Not covered (the engineer checks them separately): a hot smoke layer (EN 1991-1-2 3.3.2: a
    localised fire is combined with a zone model where a layer forms), radiation from the flame to a
    member beside it, members below the fire source. Several fires: add the eq (C.4) fluxes with
    :func:`total_flux_W_m2`.

    Parameters
    ----------
    time_s : array_like, shape (T,)
        Times [s], >= 0.
    heat_release_W : array_like, shape (T,)
        Q(t) [W], >= 0 (heatrelease.AnnexEFire.heat_release_W or a table).
    diameter_m : float
        D [m] (:func:`equivalent_diameter_m` of the fire area).
    ceiling_height_m : float
        H, height of the ceiling above the fire source [m].
    distance_m : float
        r, horizontal distance of the member from the fire axis [m], >= 0.
    height_m : float
        z, height of the member above the fire source [m], 0 <= z <= H.
    alpha_c, emissivity : float
        Convective coefficient [W/(m2 K)] and resultant emissivity Phi eps_m eps_f [-] of eq (C.9).
    convective_fraction : float
        Q_c / Q (0.8 by Annex C(3)).
    allow_out_of_scope : bool
        Compute outside D <= 10 m, Q <= 50 MW; otherwise OutOfScopeError.
    """
    t = as_times_s(time_s)
    q = np.asarray(heat_release_W, dtype=float)
    if t.ndim != 1 or q.shape != t.shape:
        raise InputError("heat_release_W", q.shape, f"must hold one value per time, shape {t.shape}")
    bad = ~np.isfinite(q) | (q < 0.0)
    if np.any(bad):
        raise InputError("heat_release_W", q[bad][0].item(), "must be finite and >= 0 [W]")
    d = _finite("diameter_m", diameter_m, 0.0, True, "m")
    h = _finite("ceiling_height_m", ceiling_height_m, 0.0, True, "m")
    r = _finite("distance_m", distance_m, 0.0, False, "m")
    z = _finite("height_m", height_m, 0.0, False, "m", hi=h)
    _finite("alpha_c", alpha_c, 0.0, False, "W/(m2 K)")
    _finite("emissivity", emissivity, 0.0, True, "-", hi=1.0)
    _finite("convective_fraction", convective_fraction, 0.0, True, "-", hi=1.0)
    if not allow_out_of_scope:
        for field, value, allowed in scope_violations(d, float(q.max(initial=0.0)), code):
            raise OutOfScopeError(field, value, allowed)

    lf = flame_length_m(q, d)
    impacts = lf >= h
    if r <= d / 2.0:
        gas = plume_temperature_C(z, q, d, convective_fraction)
        gas_rule = PLUME
    else:
        jet = np.minimum(ceilingjet.ceiling_jet_temperature_C(r, q, h),
                         plume_temperature_C(h, q, d, convective_fraction))
        side = plume_beside_temperature_C(r, z, q, d, convective_fraction)
        gas = np.maximum(jet, side)
        gas_rule = np.where(side > jet, PLUME_SIDE, JET)
    annex_flux = ceiling_flux_W_m2(r, q, d, h)
    bound_flux = surface.surface_flux_W_m2(gas, alpha_c, emissivity)
    flux = np.maximum(annex_flux, bound_flux)
    governing = np.where(impacts, np.where(annex_flux >= bound_flux, CEILING_FLUX, BOUND), gas_rule)
    return LocalisedExposure(
        time_s=t, heat_release_W=q, flame_length_m=lf, impacts_ceiling=impacts,
        gas_temperature_C=np.where(impacts, np.nan, gas), flux_W_m2=np.where(impacts, flux, np.nan),
        governing=governing.astype(np.int8), alpha_c=float(alpha_c), emissivity=float(emissivity))


# ---------------------------------------------------------------------------------------------------
# the localised fire as a design fire (the registry's "localised" curve)

from steelfire.models.fire.design import DesignFire, FireSetup, Option, Quantity, Exposure, convection  # noqa: E402

#: What the localised fire needs from the case, and its ``[fire.localised]`` keys.
NEEDS = ("fire_load_or_heat_release", "positions")
OPTIONS = (
    Option("diameter_m", "m", 0.0, 100.0, required=False,
           help="D of the fire; default: the equivalent diameter of fire_load.fire_area_m2"),
    Option("ceiling_height_m", "m", 0.0, 200.0, help="H, from the fire source to the ceiling"),
)
#: The keys of a member's ``position`` table under a localised fire.
POSITION_KEYS = ("distance_m", "height_m")

QUANTITIES = (
    Quantity("diameter_m", "fire diameter", "D", "m", "EN 1991-1-2 C.(1)"),
    Quantity("ceiling_height_m", "ceiling height above the fire source", "H", "m", "EN 1991-1-2 C.(2)"),
    Quantity("peak_heat_release_MW", "largest rate of heat release", "Q", "MW", "EN 1991-1-2 E.4"),
    Quantity("time_of_peak_heat_release_min", "time of the largest heat release", "", "min", "EN 1991-1-2 E.4",
             digits=2),
    Quantity("largest_flame_length_m", "largest flame length", "L_f", "m", "EN 1991-1-2 eq (C.1)"),
    Quantity("flame_reaches_ceiling", "flame reaches the ceiling", "L_f >= H", "", "EN 1991-1-2 C.(3), C.(4)"),
    Quantity("heat_release_source", "heat release", "", "", "EN 1991-1-2 E.4, or the case's table"),
)

EQUIVALENCE_NOTE = ("a localised fire is not a fully developed compartment fire, which the formulas of EN 1991-1-2 "
                    "Annex F and CIB W14 were derived for.")


def ventilation_violation(peak_heat_release_W, severity, fire_load=None):
    """(field, value, allowed) where the compartment's openings cannot feed the fire, else None.

    EN 1991-1-2 E.4(6), (7) (from memory): a heat release above Q_max = 0.10 m H_u A_v sqrt(h_eq)
    (:func:`heatrelease.ventilation_controlled_heat_release_W`) is ventilation-controlled; its plateau is
    lower and the fire longer, and a fire the openings limit is a compartment fire, not a localised one
    (EN 1991-1-2 3.3.1: a localised fire where flashover is unlikely). Without a compartment
    (``severity`` None, or no openings given) nothing is checked. m is the fire load's combustion
    factor (0.8 by default).
    """
    if not severity or severity.get("vertical_opening_area_m2") is None or not severity.get("opening_height_m"):
        return None
    m = getattr(fire_load, "combustion_factor", None) or heatrelease.COMBUSTION_FACTOR
    q_vent = heatrelease.ventilation_controlled_heat_release_W(float(severity["vertical_opening_area_m2"]),
                                                               float(severity["opening_height_m"]), m)
    if peak_heat_release_W <= q_vent:
        return None
    return ("heat release Q [MW]", round(peak_heat_release_W / 1e6, 3),
            f"the compartment's openings feed at most {q_vent / 1e6:.3g} MW (EN 1991-1-2 E.4(7): 0.10 m H_u A_v "
            "sqrt(h_eq)); a ventilation-controlled fire is a compartment fire, not a localised one")


def design_fire(setup: FireSetup) -> DesignFire:
    """A localised fire of EN 1991-1-2 Annex C as a design fire: the heat release of Annex E.4 (or the case's
    table), each member's exposure at its position by :func:`member_exposure` (its gas temperature, or the
    adiabatic surface temperature of its heat flux), alpha_c = 35 W/(m2 K) (C.(10)) and the code's
    emissivities; the annex's scope (D, Q) and, where the case gives a compartment, the ventilation limit
    of E.4(7) (:func:`ventilation_violation`) enforced unless allow_out_of_scope.

    Its ``series(time_s)`` holds, for the report's figures, the heat release Q [MW] and the flame length
    L_f of eq (C.1) [m] on the run's grid, and each member's position (``member_distance_m`` r,
    ``member_height_m`` z, in schedule order)."""
    opts = setup.options
    hr = setup.heat_release
    fl = setup.fire_load
    d = opts.get("diameter_m")
    if d is None:
        if fl is None or fl.fire_area_m2 is None:
            raise InputError("fire.localised.diameter_m", None,
                             "is missing; give it, or fire_load.fire_area_m2 (D of a circle of that area)")
        d = equivalent_diameter_m(fl.fire_area_m2)
    h = opts["ceiling_height_m"]
    alpha_c = convection(setup, "alpha_c_natural")
    eps = setup.emissivity_resultant
    source = "table" if hr is not None else "EN 1991-1-2 E.4"
    if hr is None:
        from steelfire.models.fire import fireload

        area = setup.compartment.floor_area_m2 if setup.compartment is not None else None
        qfd, _ = fireload.design_density(fl, area, setup.code)
        hr = heatrelease.annex_e_fire(qfd, fl.fire_area_m2, fl.heat_release_density_kW_m2,
                                      heatrelease.growth_time_s(fl.growth))
    oos = []
    q_peak = float(hr.peak_heat_release_W)
    for field, value, allowed in scope_violations(d, q_peak, setup.code):
        if not setup.allow_out_of_scope:
            raise OutOfScopeError(field, value, allowed + " (set analysis.allow_out_of_scope = true to compute anyway)")
        oos.append(f"OUT OF SCOPE of EN 1991-1-2 Annex C: {field} = {value!r}; {allowed}")
    violation = ventilation_violation(q_peak, setup.severity, fl)
    if violation is not None:
        field, value, allowed = violation
        if not setup.allow_out_of_scope:
            raise OutOfScopeError(field, value, allowed + " (set analysis.allow_out_of_scope = true to compute anyway)")
        oos.append(f"OUT OF SCOPE of a localised fire: {field} = {value!r}; {allowed}")
    positions = [(p["distance_m"], p["height_m"]) for p in setup.positions]
    for i, (r, z) in enumerate(positions):
        if z > h:
            raise InputError(f"member[{i + 1}].position.height_m", z,
                             f"must be <= the ceiling height above the fire source, {h:g} m")
    distinct = sorted(set(positions))
    column_of = {p: k for k, p in enumerate(distinct)}

    def exposure(time_s):
        q = hr.heat_release_W(time_s)
        cols = [member_exposure(time_s, q, d, h, r, z, alpha_c, eps, allow_out_of_scope=True,
                                code=setup.code).effective_gas_temperature_C for r, z in distinct]
        return Exposure(gas_C=np.column_stack(cols), member_columns=[[column_of[p]] for p in positions],
                        column_labels=[f"r = {r:g} m, z = {z:g} m" for r, z in distinct])

    def gas(time_s):
        return exposure(np.asarray(time_s, dtype=float)).gas_C.max(axis=1)

    def series(time_s):
        q = hr.heat_release_W(time_s)
        return {"heat_release_MW": q / 1e6, "flame_length_m": flame_length_m(q, d),
                "member_distance_m": np.array([r for r, _ in positions], dtype=float),
                "member_height_m": np.array([z for _, z in positions], dtype=float)}

    t_probe = np.linspace(0.0, setup.duration_min * 60.0, 2001)
    q_probe = hr.heat_release_W(t_probe)
    lf = float(np.max(flame_length_m(q_probe, d)))
    values = {"diameter_m": d, "ceiling_height_m": h, "peak_heat_release_MW": q_peak / 1e6,
              "time_of_peak_heat_release_min": float(t_probe[int(np.argmax(q_probe))] / 60.0),
              "largest_flame_length_m": lf, "flame_reaches_ceiling": "yes" if lf >= h else "no",
              "heat_release_source": source}
    warnings = ["Localised fire (EN 1991-1-2 Annex C): each member's exposure follows steelfire's rule for its "
                "position (plume axis within D/2; beyond, the larger of the ceiling jet and the plume spreading "
                "beside the fire; the larger of the annex's flux and that bound where the flame reaches the "
                "ceiling); a hot smoke layer and flame radiation to a member beside the fire are not included: "
                "check them separately (EN 1991-1-2 3.3.2)."]
    return DesignFire(curve="localised", gas_temperature_C=gas, alpha_c=alpha_c, cools=True,
                      key_times_s=tuple(hr.key_times_s), values=values, quantities=QUANTITIES, warnings=warnings,
                      out_of_scope=oos, equivalence=EQUIVALENCE_NOTE, exposure=exposure, series=series)
