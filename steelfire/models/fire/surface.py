"""Incident heat flux <-> temperature conversions for the steel temperature kernels.

A localised fire (EN 1991-1-2 Annex C) gives, once its flame touches the ceiling, an incident heat
flux h [W/m2] on the member rather than a gas temperature. The net flux then reaches the member as
in EN 1991-1-2 eq (C.9):

    h_net = h - alpha_c (theta_m - 20) - Phi eps_m eps_f sigma ((theta_m + 273)^4 - 293^4)

The kernels of :mod:`steelfire.models.heat` take one gas temperature theta_g for both terms of
eq (3.1)-(3.3). Two temperatures turn h into a form they (or a kernel with a separate convective
temperature) reproduce *exactly*, for every member temperature theta_m:

* the adiabatic surface temperature T_ast, the temperature of a perfectly insulated surface under h:
  ``h - alpha_c (T_ast - 20) - eps sigma ((T_ast + 273)^4 - 293^4) = 0``. Subtracting this from
  (C.9) gives ``h_net = alpha_c (T_ast - theta_m) + eps sigma ((T_ast + 273)^4 - (theta_m + 273)^4)``,
  which is eq (3.1)-(3.3) with theta_g = T_ast. The concept is Wickstrom's (U. Wickstrom, "The
  adiabatic surface temperature and the plate thermometer", Fire Safety Science 10, 2011; from
  memory); the identity above is exact when the kernel uses the same alpha_c and eps.
* the radiation temperature T_r with (T_r + 273)^4 = 293^4 + h / (eps sigma): with convection at
  20 C and radiation at T_r, ``alpha_c (20 - theta_m) + eps sigma ((T_r + 273)^4 - (theta_m + 273)^4)``
  is (C.9) term by term (hand algebra, no source needed).

``emissivity`` is the resultant Phi eps_m eps_f of (C.9) throughout (EN 1991-1-2 3.1(6), (7):
Phi = 1, eps_f = 1, eps_m = 0.7 for carbon steel by EN 1993-1-2 2.2(2), so 0.7 by default).
"""

from __future__ import annotations

import numpy as np

from steelfire.errors import InputError

#: Stefan-Boltzmann constant [W/(m2 K4)], EN 1991-1-2 3.1(6) (the value of steelfire.models.heat).
STEFAN_BOLTZMANN = 5.67e-8
#: Absolute zero offset of EN 1991-1-2 eq (3.3) and (C.9) [K].
KELVIN = 273.0
#: Ambient temperature of eq (C.9) [C].
AMBIENT_C = 20.0
#: Convective coefficient of natural fire models [W/(m2 K)], EN 1991-1-2 3.3.1.1(3) (from memory).
ALPHA_C_NATURAL = 35.0
#: Resultant emissivity Phi eps_m eps_f for carbon steel in a fire [-]: 1 x 0.7 x 1 (EN 1991-1-2 3.1(6),
#: (7); EN 1993-1-2 2.2(2)).
EMISSIVITY_STEEL = 0.7

#: Newton's method stops when every step is below this [K] (well under the kernels' rounding).
TEMPERATURE_TOLERANCE_K = 1e-9
#: Newton iterations allowed; from the upper start below it took 3-5 for 1 W/m2 to 300 kW/m2 with
#: alpha_c = 35, eps = 0.7 (measured once), 1 with alpha_c = 0 (the start is then the root).
MAX_ITERATIONS = 60


def _flux_array(flux_W_m2, field):
    h = np.asarray(flux_W_m2, dtype=float)
    bad = ~np.isfinite(h) | (h < 0.0)
    if np.any(bad):
        raise InputError(field, h[bad].flat[0].item(), "must be a finite heat flux >= 0 [W/m2]")
    return h


def _check_coefficients(alpha_c, emissivity):
    if not (np.isfinite(alpha_c) and alpha_c >= 0.0):
        raise InputError("alpha_c", alpha_c, "must be a finite number >= 0 [W/(m2 K)]")
    if not (0.0 < emissivity <= 1.0):
        raise InputError("emissivity", emissivity, "must be in (0, 1] (resultant Phi eps_m eps_f)")


def surface_flux_W_m2(surface_temperature_C, alpha_c=ALPHA_C_NATURAL, emissivity=EMISSIVITY_STEEL):
    """Flux [W/m2] a surface at ``surface_temperature_C`` [C] loses to 20 C surroundings.

    The two loss terms of EN 1991-1-2 eq (C.9): alpha_c (T - 20) + eps sigma ((T + 273)^4 - 293^4).
    It is also the incident flux whose adiabatic surface temperature is T: the flux equivalent of a
    gas temperature T (a member in gas at T receives the same net flux as under this incident flux).

    >>> round(float(surface_flux_W_m2(20.0)), 9)
    0.0
    """
    t = np.asarray(surface_temperature_C, dtype=float)
    return alpha_c * (t - AMBIENT_C) + emissivity * STEFAN_BOLTZMANN * (
        (t + KELVIN) ** 4 - (AMBIENT_C + KELVIN) ** 4)


def net_flux_W_m2(flux_W_m2, member_temperature_C, alpha_c=ALPHA_C_NATURAL, emissivity=EMISSIVITY_STEEL):
    """Net heat flux [W/m2] into a member at ``member_temperature_C`` [C] under an incident flux.

    EN 1991-1-2 Annex C, eq (C.9): h_net = h - alpha_c (theta_m - 20) - Phi eps_m eps_f sigma
    ((theta_m + 273)^4 - 293^4), ``emissivity`` = Phi eps_m eps_f. Arrays broadcast.
    """
    return np.asarray(flux_W_m2, dtype=float) - surface_flux_W_m2(member_temperature_C, alpha_c, emissivity)


def adiabatic_surface_temperature_C(flux_W_m2, alpha_c=ALPHA_C_NATURAL, emissivity=EMISSIVITY_STEEL):
    """Adiabatic surface temperature T_ast [C] under an incident heat flux ``flux_W_m2`` [W/m2].

    The root of h - alpha_c (T - 20) - eps sigma ((T + 273)^4 - 293^4) = 0 (the net flux of
    EN 1991-1-2 eq (C.9) on a perfectly insulated surface; Wickstrom's adiabatic surface temperature,
    from memory). Used as the gas temperature of the kernels of EN 1993-1-2 4.2.5.1 with the same
    alpha_c and eps, it reproduces (C.9) exactly for every steel temperature (see the module notes).

    Method: Newton's method on f(T) = loss(T) - h, vectorised. f is increasing and convex for
    T > -273 C, so Newton started above the root descends to it monotonically; the start
    min(20 + h / alpha_c, radiation temperature) is above the root, as each loss term alone reaches
    h at its own temperature. Stops when every step is below 1e-9 K; raises RuntimeError otherwise
    (never returns an unconverged value).

    Parameters
    ----------
    flux_W_m2 : array_like
        Incident heat flux h >= 0 [W/m2].
    alpha_c : float
        Convective coefficient [W/(m2 K)] (35 for natural fires, EN 1991-1-2 3.3.1.1(3)).
    emissivity : float
        Resultant emissivity Phi eps_m eps_f [-] (0.7 for carbon steel).

    Returns
    -------
    numpy.ndarray
        T_ast [C], the shape of ``flux_W_m2``; 20 C where h = 0.

    Examples
    --------
    A surface that loses heat by radiation only (alpha_c = 0) sits at the radiation temperature;
    hand calculation: 293^4 + 1e5 / (1.0 x 5.67e-8) = 7.370e9 + 1.7637e12 = 1.7711e12, fourth root
    1153.6 K = 880.6 C.

    >>> round(float(adiabatic_surface_temperature_C(1e5, alpha_c=0.0, emissivity=1.0)), 1)
    880.6
    """
    h = _flux_array(flux_W_m2, "flux_W_m2")
    _check_coefficients(alpha_c, emissivity)
    t = radiation_temperature_C(h, emissivity)
    if alpha_c > 0.0:
        t = np.minimum(t, AMBIENT_C + h / alpha_c)
    es = emissivity * STEFAN_BOLTZMANN
    for _ in range(MAX_ITERATIONS):
        tk = t + KELVIN
        f = alpha_c * (t - AMBIENT_C) + es * (tk ** 4 - (AMBIENT_C + KELVIN) ** 4) - h
        step = f / (alpha_c + 4.0 * es * tk ** 3)
        t = t - step
        if np.all(np.abs(step) <= TEMPERATURE_TOLERANCE_K):
            return t
    raise RuntimeError(f"adiabatic surface temperature: Newton's method did not converge in {MAX_ITERATIONS} "
                       f"iterations (largest step {np.max(np.abs(step)):.3g} K)")


def radiation_temperature_C(flux_W_m2, emissivity=EMISSIVITY_STEEL):
    """Radiation temperature T_r [C] of an incident flux: (T_r + 273)^4 = 293^4 + h / (eps sigma).

    With convection at 20 C and radiation exchanged with T_r, a member at theta_m receives
    alpha_c (20 - theta_m) + eps sigma ((T_r + 273)^4 - (theta_m + 273)^4), which is EN 1991-1-2
    eq (C.9) term by term (hand algebra). ``emissivity`` = Phi eps_m eps_f [-]; h >= 0 [W/m2].

    Examples
    --------
    Hand calculation: 293^4 + 5e4 / (0.7 x 5.67e-8) = 7.370e9 + 1.2598e12 = 1.2672e12, fourth root
    1061.0 K = 788.0 C.

    >>> round(float(radiation_temperature_C(5e4, 0.7)), 1)
    788.0
    """
    h = _flux_array(flux_W_m2, "flux_W_m2")
    if not (0.0 < emissivity <= 1.0):
        raise InputError("emissivity", emissivity, "must be in (0, 1] (resultant Phi eps_m eps_f)")
    return ((AMBIENT_C + KELVIN) ** 4 + h / (emissivity * STEFAN_BOLTZMANN)) ** 0.25 - KELVIN
