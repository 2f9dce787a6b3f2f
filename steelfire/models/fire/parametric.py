"""Parametric temperature-time curve of a compartment fire, EN 1991-1-2 Annex A.

Times are in hours inside the formulas, as in the standard, and in seconds at the interface.
Paragraph and equation numbers of Annex A are quoted from memory of EN 1991-1-2:2002.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from steelfire.codevalues import DEFAULTS
from steelfire.errors import InputError, OutOfScopeError
from steelfire.models.fire.compartment import SEVERITY_QUANTITIES
from steelfire.models.fire.design import DesignFire, FireSetup, Quantity, convection

#: Reference ratio O/b of eq (A.2b) that gives Gamma = 1: 0.04 / 1160.
GAMMA_REFERENCE = 0.04 / 1160.0


@dataclass(frozen=True)
class ParametricFire:
    """An Annex A design fire with its intermediate values (all as the standard names them)."""

    opening_factor_m05: float        # O [m^0.5]
    thermal_inertia: float           # b [J/(m2 s^0.5 K)]
    total_area_fire_load_MJ_m2: float  # q_t,d [MJ/m2 of A_t]
    t_lim_h: float                   # t_lim [h]
    gamma: float                     # Gamma [-], eq (A.2b)
    gamma_lim: float | None          # Gamma_lim [-] (times k), eq (A.6), fuel-controlled fires only
    k_factor: float | None           # k [-], eq (A.8), where it applies
    regime: str                      # "ventilation" | "fuel"
    t_max_h: float                   # t_max [h], eq (A.4)
    t_star_max_h: float              # t*_max of the cooling phase [h]: (0.2e-3 q_t,d / O) Gamma
    x_factor: float                  # x [-] of the cooling phase
    peak_gas_temperature_C: float    # theta_max [C]
    cooling_rate_C_h: float          # d theta / d t* in the cooling phase [C per hour of t*]
    burnout_time_h: float            # time the gas is back at 20 C [h]

    @property
    def t_max_s(self) -> float:
        return self.t_max_h * 3600.0

    @property
    def burnout_time_s(self) -> float:
        return self.burnout_time_h * 3600.0

    @property
    def regime_ratio(self) -> float:
        """(0.2e-3 q_t,d / O) / t_lim: below 1 fuel-controlled, above 1 ventilation-controlled."""
        return (0.2e-3 * self.total_area_fire_load_MJ_m2 / self.opening_factor_m05) / self.t_lim_h

    def gas_temperature(self, time_s):
        """Gas temperature [C] at ``time_s`` [s]: heating eq (A.1), cooling eq (A.11); never below 20 C."""
        t_h = np.asarray(time_s, dtype=float) / 3600.0
        heating_gamma = self.gamma if self.regime == "ventilation" else self.gamma_lim
        heat = heating_curve(np.maximum(t_h, 0.0) * heating_gamma)
        cool = self.peak_gas_temperature_C - self.cooling_rate_C_h * (
            self.gamma * t_h - self.t_star_max_h * self.x_factor)
        out = np.where(t_h <= self.t_max_h, heat, cool)
        return np.maximum(out, 20.0)


def heating_curve(t_star_h):
    """theta_g = 20 + 1325 (1 - 0.324 e^(-0.2 t*) - 0.204 e^(-1.7 t*) - 0.472 e^(-19 t*)) [C], eq (A.1).

    ``t_star_h`` is the fictitious time t* = t Gamma [h] (eq (A.2a)), or t Gamma_lim (eq (A.5)).
    """
    ts = np.asarray(t_star_h, dtype=float)
    return 20.0 + 1325.0 * (1.0 - 0.324 * np.exp(-0.2 * ts) - 0.204 * np.exp(-1.7 * ts)
                            - 0.472 * np.exp(-19.0 * ts))


def gamma_factor(opening_factor_m05: float, thermal_inertia: float) -> float:
    """Gamma = (O/b)^2 / (0.04/1160)^2 [-], EN 1991-1-2 eq (A.2b)."""
    return (opening_factor_m05 / thermal_inertia) ** 2 / GAMMA_REFERENCE ** 2


def k_factor(opening_factor_m05: float, total_area_fire_load_MJ_m2: float, thermal_inertia: float) -> float | None:
    """k = 1 + ((O - 0.04)/0.04)((q_t,d - 75)/75)((1160 - b)/1160) [-], EN 1991-1-2 eq (A.8).

    Applies only where O > 0.04, q_t,d < 75 and b < 1160; None elsewhere.
    """
    o, q, b = opening_factor_m05, total_area_fire_load_MJ_m2, thermal_inertia
    if o > 0.04 and q < 75.0 and b < 1160.0:
        return 1.0 + ((o - 0.04) / 0.04) * ((q - 75.0) / 75.0) * ((1160.0 - b) / 1160.0)
    return None


def cooling_rate(t_star_max_h: float) -> float:
    """Rate of the cooling phase [C per hour of t*], EN 1991-1-2 eq (A.11a)-(A.11c).

    625 for t*_max <= 0.5; 250 (3 - t*_max) for 0.5 < t*_max < 2; 250 for t*_max >= 2.
    """
    if t_star_max_h <= 0.5:
        return 625.0
    if t_star_max_h < 2.0:
        return 250.0 * (3.0 - t_star_max_h)
    return 250.0


def scope_violations(opening_factor_m05, thermal_inertia, total_area_fire_load_MJ_m2, floor_area_m2,
                     height_m, roof_opening_area_m2, code=DEFAULTS):
    """The limits of EN 1991-1-2 Annex A (1)-(3), (4) a case breaks, as (field, value, allowed) triples.

    Scope: 0.02 <= O <= 0.20, 100 <= b <= 2200, 50 <= q_t,d <= 1000 MJ/m2, A_f <= 500 m2, H <= 4 m,
    no openings in the roof; mainly cellulosic fire load (stated in the outputs, not checkable).
    """
    c = code
    out = []

    def between(field, value, digits, lo, hi, unit):
        if not (lo <= value <= hi):  # the raw value is compared; the rounded one is only shown
            out.append((field, round(value, digits), f"Annex A covers {lo:g} to {hi:g} {unit}"))

    between("opening factor O", opening_factor_m05, 6, c["annex_a_opening_factor_min"],
            c["annex_a_opening_factor_max"], "m^0.5")
    between("thermal inertia b", thermal_inertia, 2, c["annex_a_thermal_inertia_min"],
            c["annex_a_thermal_inertia_max"], "J/(m2 s^0.5 K)")
    between("fire load q_t,d", total_area_fire_load_MJ_m2, 3, c["annex_a_fire_load_min_MJ_m2"],
            c["annex_a_fire_load_max_MJ_m2"], "MJ/m2")
    if floor_area_m2 is not None and floor_area_m2 > c["annex_a_floor_area_max_m2"]:
        out.append(("compartment.floor_area_m2", floor_area_m2,
                    f"Annex A covers floor areas up to {c['annex_a_floor_area_max_m2']:g} m2"))
    if height_m is not None and height_m > c["annex_a_height_max_m"]:
        out.append(("compartment.height_m", height_m,
                    f"Annex A covers heights up to {c['annex_a_height_max_m']:g} m"))
    if roof_opening_area_m2:
        out.append(("compartment.roof_opening_area_m2", roof_opening_area_m2,
                    "Annex A covers compartments without openings in the roof (0 m2)"))
    return out


def parametric_fire(opening_factor_m05: float, thermal_inertia: float, total_area_fire_load_MJ_m2: float,
                    t_lim_h: float) -> ParametricFire:
    """The Annex A fire of a compartment, heating and cooling, both regimes.

    EN 1991-1-2 Annex A: Gamma eq (A.2b); t_max = max(0.2e-3 q_t,d / O, t_lim) eq (A.4); where
    t_max = t_lim the fire is fuel-controlled and heats with t* = t Gamma_lim (eq (A.5)-(A.7),
    O_lim = 0.1e-3 q_t,d / t_lim), Gamma_lim times k where eq (A.8) applies; the cooling phase
    (A.11) always uses t* = t Gamma, t*_max = (0.2e-3 q_t,d / O) Gamma and x = 1 (t_max > t_lim)
    or x = t_lim Gamma / t*_max (t_max = t_lim).

    Scope is checked by :func:`scope_violations`; a k factor <= 0 (near the corner of the scope:
    high O, low q_t,d, low b) is always refused, as the heating phase would not exist.
    """
    o, b, q = opening_factor_m05, thermal_inertia, total_area_fire_load_MJ_m2
    for field, v in (("opening factor O", o), ("thermal inertia b", b), ("fire load q_t,d", q), ("t_lim", t_lim_h)):
        if isinstance(v, bool) or not (isinstance(v, (int, float)) and math.isfinite(v) and v > 0):
            raise InputError(field, v, "must be a finite number > 0")
    gamma = gamma_factor(o, b)
    t_vent_h = 0.2e-3 * q / o
    k = None
    gamma_lim = None
    if t_vent_h > t_lim_h:
        regime = "ventilation"
        t_max_h = t_vent_h
        x = 1.0
        theta_max = float(heating_curve(t_max_h * gamma))
    else:
        regime = "fuel"
        t_max_h = t_lim_h
        o_lim = 0.1e-3 * q / t_lim_h
        gamma_lim = gamma_factor(o_lim, b)
        k = k_factor(o, q, b)
        if k is not None:
            if k <= 0.0:
                raise InputError("k factor of EN 1991-1-2 eq (A.8)", round(k, 4),
                                 "must be > 0; this O, q_t,d and b lie outside what Annex A can describe")
            gamma_lim *= k
        x = t_lim_h * gamma / (t_vent_h * gamma)
        theta_max = float(heating_curve(t_lim_h * gamma_lim))
    t_star_max = t_vent_h * gamma
    rate = cooling_rate(t_star_max)
    burnout_h = (t_star_max * x + (theta_max - 20.0) / rate) / gamma
    return ParametricFire(
        opening_factor_m05=o, thermal_inertia=b, total_area_fire_load_MJ_m2=q, t_lim_h=t_lim_h,
        gamma=gamma, gamma_lim=gamma_lim, k_factor=k, regime=regime, t_max_h=t_max_h,
        t_star_max_h=t_star_max, x_factor=x, peak_gas_temperature_C=theta_max, cooling_rate_C_h=rate,
        burnout_time_h=burnout_h)


# ---- many fires at once (sampling) ------------------------------------------------------------

#: Scope findings of :func:`parametric_fires`, one bit each in ``ParametricFires.scope`` (several may
#: be set for one fire). The limits are Annex A (2)-(7) as in :func:`scope_violations`, read from the
#: code values; the compartment-level limits (floor area, height, roof openings) do not vary between
#: sampled fires and are left to :func:`scope_violations`.
SCOPE_FINDINGS = (
    ("opening_factor_below", "opening factor O below the Annex A range"),
    ("opening_factor_above", "opening factor O above the Annex A range"),
    ("thermal_inertia_below", "thermal inertia b below the Annex A range"),
    ("thermal_inertia_above", "thermal inertia b above the Annex A range"),
    ("fire_load_below", "fire load q_t,d below the Annex A range"),
    ("fire_load_above", "fire load q_t,d above the Annex A range"),
    ("k_factor_not_positive", "k factor of eq (A.8) <= 0: Annex A gives no heating phase"),
    ("input_not_positive", "O, b, q_t,d or t_lim not a finite number > 0: no Annex A fire"),
)
SCOPE_BIT = {name: 1 << i for i, (name, _) in enumerate(SCOPE_FINDINGS)}
#: Findings that leave a fire without a gas temperature (its column is NaN).
UNDEFINED_BITS = SCOPE_BIT["k_factor_not_positive"] | SCOPE_BIT["input_not_positive"]

#: Fires per pass of :meth:`ParametricFires.gas_temperature`: the temporaries of a pass (T x 128
#: doubles, 2.2 MB on a 5 s grid over 3 h) stay in cache; each value is computed on its own, so the
#: result does not depend on it (64 to 512 measured within the noise here, 2048 about 1.5x slower).
GAS_MATRIX_CHUNK = 128


@dataclass(frozen=True, eq=False)
class ParametricFires:
    """F Annex A fires held as arrays of length F, the same quantities as :class:`ParametricFire`.

    ``gamma_lim`` and ``k_factor`` are NaN where they do not apply (ventilation-controlled fires; k
    outside O > 0.04, q_t,d < 75, b < 1160). A fire with a finding in ``UNDEFINED_BITS`` has NaN in
    every derived array and a NaN gas column; every other fire is computed as published, in scope or
    not, and its findings are in ``scope`` (0 = within Annex A's range).
    """

    opening_factor_m05: np.ndarray
    thermal_inertia: np.ndarray
    total_area_fire_load_MJ_m2: np.ndarray
    t_lim_h: np.ndarray
    gamma: np.ndarray
    gamma_lim: np.ndarray
    k_factor: np.ndarray
    fuel_controlled: np.ndarray      # bool; False = ventilation-controlled (and for undefined fires)
    t_max_h: np.ndarray
    t_star_max_h: np.ndarray
    x_factor: np.ndarray
    peak_gas_temperature_C: np.ndarray
    cooling_rate_C_h: np.ndarray
    burnout_time_h: np.ndarray
    scope: np.ndarray                # uint16 bit set of SCOPE_FINDINGS

    @property
    def count(self) -> int:
        return int(self.scope.shape[0])

    @property
    def t_max_s(self) -> np.ndarray:
        return self.t_max_h * 3600.0

    @property
    def burnout_time_s(self) -> np.ndarray:
        return self.burnout_time_h * 3600.0

    @property
    def defined(self) -> np.ndarray:
        """True where the fire has a gas temperature."""
        return (self.scope & UNDEFINED_BITS) == 0

    @property
    def out_of_scope(self) -> np.ndarray:
        """True where the fire breaks any limit of Annex A (undefined fires included)."""
        return self.scope != 0

    @property
    def regime_ratio(self) -> np.ndarray:
        """(0.2e-3 q_t,d / O) / t_lim per fire (below 1 fuel-controlled)."""
        return (0.2e-3 * self.total_area_fire_load_MJ_m2 / self.opening_factor_m05) / self.t_lim_h

    def scope_counts(self) -> dict:
        """Number of fires with each finding of ``SCOPE_FINDINGS`` (a fire may count under several)."""
        return {name: int(np.count_nonzero(self.scope & SCOPE_BIT[name])) for name, _ in SCOPE_FINDINGS}

    def gas_temperature(self, time_s) -> np.ndarray:
        """Gas temperatures [C] of all fires on the grid ``time_s`` [s], a (T, F) array.

        Heating eq (A.1) with t* = t Gamma (ventilation) or t Gamma_lim (fuel, k included); cooling
        eq (A.11) with t* = t Gamma; never below 20 C. The same operations, element by element, as
        :meth:`ParametricFire.gas_temperature`. Undefined fires give NaN columns.
        """
        t = np.asarray(time_s, dtype=float)
        if t.ndim != 1 or not np.all(np.isfinite(t)):
            raise InputError("time_s", "array of shape " + str(t.shape), "a 1-D array of finite times [s]")
        t_h = t / 3600.0
        t_pos = np.maximum(t_h, 0.0)[:, None]
        heating_gamma = np.where(self.fuel_controlled, self.gamma_lim, self.gamma)
        tsx = self.t_star_max_h * self.x_factor
        out = np.empty((t.shape[0], self.count))
        # eq (A.1) (three exponentials, most of the cost) is evaluated only where t <= t_max; every
        # value is computed by the same operations as in ParametricFire.gas_temperature.
        with np.errstate(invalid="ignore"):  # NaN columns of undefined fires
            for a in range(0, self.count, GAS_MATRIX_CHUNK):
                s = slice(a, a + GAS_MATRIX_CHUNK)
                block = self.peak_gas_temperature_C[s] - self.cooling_rate_C_h[s] * (
                    self.gamma[s] * t_h[:, None] - tsx[s])
                heating = t_h[:, None] <= self.t_max_h[s]
                block[heating] = heating_curve((t_pos * heating_gamma[s])[heating])
                np.maximum(block, 20.0, out=out[:, s])
        # np.maximum(NaN, 20) is NaN: undefined fires stay NaN
        return out


def parametric_fires(opening_factor_m05, thermal_inertia, total_area_fire_load_MJ_m2, t_lim_h,
                     code=DEFAULTS) -> ParametricFires:
    """F Annex A fires at once, vectorised over fires (EN 1991-1-2 Annex A, as :func:`parametric_fire`).

    Parameters
    ----------
    opening_factor_m05 : array_like
        O [m^0.5] per fire.
    thermal_inertia : array_like
        b [J/(m2 s^0.5 K)] per fire.
    total_area_fire_load_MJ_m2 : array_like
        q_t,d [MJ/m2 of A_t] per fire.
    t_lim_h : array_like
        t_lim [h] per fire (0.25, 1/3 or 5/12 for fast, medium, slow growth by EN values).
    code : mapping
        Code values (the Annex A scope limits).

    The four inputs are broadcast against each other to one dimension (a scalar holds for all
    fires). Gamma eq (A.2b); t_max = max(0.2e-3 q_t,d / O, t_lim) eq (A.4); fuel-controlled where
    0.2e-3 q_t,d / O <= t_lim, heating with Gamma_lim (eq (A.5)-(A.7)) times k (eq (A.8)) where k
    applies; cooling eq (A.11). Fires outside Annex A's range are computed as published and flagged
    in ``scope``; fires that Annex A cannot describe (k <= 0, an input not > 0) are flagged and left
    NaN. None is dropped or clipped.

    Examples
    --------
    >>> f = parametric_fires([0.04, 0.04], 1160.0, [1000.0, 60.0], 20 / 60)
    >>> f.fuel_controlled.tolist(), round(float(f.gamma[0]), 12)
    ([False, True], 1.0)
    >>> bool(f.scope[0] == 0), f.scope_counts()["fire_load_below"]
    (True, 0)
    """
    try:
        o, b, q, tl = np.broadcast_arrays(*(np.atleast_1d(np.asarray(v, dtype=float)) for v in (
            opening_factor_m05, thermal_inertia, total_area_fire_load_MJ_m2, t_lim_h)))
    except (TypeError, ValueError) as exc:
        raise InputError("parametric fire inputs", str(exc), "numbers or 1-D arrays of one length") from None
    if o.ndim != 1:
        raise InputError("parametric fire inputs", "shape " + str(o.shape), "numbers or 1-D arrays of one length")
    o, b, q, tl = (np.array(v) for v in (o, b, q, tl))  # own, writable copies
    c = code
    scope = np.zeros(o.shape, dtype=np.uint16)

    def flag(name, mask):
        scope[mask] |= SCOPE_BIT[name]

    with np.errstate(invalid="ignore"):
        flag("opening_factor_below", o < c["annex_a_opening_factor_min"])
        flag("opening_factor_above", o > c["annex_a_opening_factor_max"])
        flag("thermal_inertia_below", b < c["annex_a_thermal_inertia_min"])
        flag("thermal_inertia_above", b > c["annex_a_thermal_inertia_max"])
        flag("fire_load_below", q < c["annex_a_fire_load_min_MJ_m2"])
        flag("fire_load_above", q > c["annex_a_fire_load_max_MJ_m2"])
        bad_input = ~((o > 0) & (b > 0) & (q > 0) & (tl > 0) & np.isfinite(o) & np.isfinite(b)
                      & np.isfinite(q) & np.isfinite(tl))
    flag("input_not_positive", bad_input)
    # the arithmetic below runs on harmless stand-ins for undefined fires; they are set NaN after
    so, sb, sq, st = (np.where(bad_input, 1.0, v) for v in (o, b, q, tl))
    # k <= 0 fires run to inf or NaN below (a negative Gamma_lim in eq (A.1)); they are set NaN after
    with np.errstate(over="ignore", invalid="ignore"):
        gamma = (so / sb) ** 2 / GAMMA_REFERENCE ** 2  # eq (A.2b)
        t_vent = 0.2e-3 * sq / so  # eq (A.4)
        vent = t_vent > st
        fuel = ~vent
        t_max = np.where(vent, t_vent, st)
        o_lim = 0.1e-3 * sq / st  # eq (A.6)
        gamma_lim = (o_lim / sb) ** 2 / GAMMA_REFERENCE ** 2  # eq (A.5)
        k_applies = fuel & (so > 0.04) & (sq < 75.0) & (sb < 1160.0)
        k = 1.0 + ((so - 0.04) / 0.04) * ((sq - 75.0) / 75.0) * ((1160.0 - sb) / 1160.0)  # eq (A.8)
        flag("k_factor_not_positive", k_applies & (k <= 0.0) & ~bad_input)
        gamma_lim = np.where(k_applies, gamma_lim * k, gamma_lim)
        x = np.where(vent, 1.0, st * gamma / (t_vent * gamma))
        theta_max = np.where(vent, heating_curve(t_max * gamma), heating_curve(st * gamma_lim))
        t_star_max = t_vent * gamma
        rate = np.where(t_star_max <= 0.5, 625.0,
                        np.where(t_star_max < 2.0, 250.0 * (3.0 - t_star_max), 250.0))  # eq (A.11a)-(A.11c)
        burnout = (t_star_max * x + (theta_max - 20.0) / rate) / gamma

    undefined = (scope & UNDEFINED_BITS) != 0
    nan = np.nan

    def clean(v):
        return np.where(undefined, nan, v)

    return ParametricFires(
        opening_factor_m05=o, thermal_inertia=b, total_area_fire_load_MJ_m2=q, t_lim_h=tl,
        gamma=clean(gamma), gamma_lim=np.where(fuel & ~undefined, gamma_lim, nan),
        k_factor=np.where(k_applies & ~undefined, k, nan), fuel_controlled=fuel & ~undefined,
        t_max_h=clean(t_max), t_star_max_h=clean(t_star_max), x_factor=clean(x),
        peak_gas_temperature_C=clean(theta_max), cooling_rate_C_h=clean(rate), burnout_time_h=clean(burnout),
        scope=scope)


def parametric_gas_matrix(time_s, opening_factor_m05, thermal_inertia, total_area_fire_load_MJ_m2, t_lim_h):
    """Gas temperatures [C] of F Annex A fires on one time grid [s], a (T, F) array.

    EN 1991-1-2 Annex A eq (A.1)-(A.11), as :func:`parametric_fire` fire by fire; a short form of
    ``parametric_fires(...).gas_temperature(time_s)``, which also gives each fire's t_max, peak and
    scope findings (call it where those are needed: a fast fire's peak falls between grid points).

    Examples
    --------
    With O = 0.04 and b = 1160, Gamma = 1 and, at 30 min, t* = 0.5 h (hand calculation:
    20 + 1325 (1 - 0.324 e^-0.1 - 0.204 e^-0.85 - 0.472 e^-9.5) = 840.98 C):

    >>> g = parametric_gas_matrix([0.0, 1800.0], [0.04, 0.08], 1160.0, 1000.0, 20 / 60)
    >>> g.shape, round(float(g[1, 0]), 2)
    ((2, 2), 840.98)
    """
    return parametric_fires(opening_factor_m05, thermal_inertia, total_area_fire_load_MJ_m2,
                            t_lim_h).gas_temperature(time_s)


#: Band of (0.2e-3 q_t,d / O) / t_lim around 1 in which a warning names the regime jump.
REGIME_BAND = 0.1

#: What the outputs show of an Annex A fire: the compartment's severity values, then the fire's own.
#: Equation numbers as this module cites them throughout (from memory of the printed standard).
QUANTITIES = SEVERITY_QUANTITIES + (
    Quantity("gamma", "time factor", "Gamma", "-", "EN 1991-1-2 eq (A.2b): (O/b)^2 / (0.04/1160)^2"),
    Quantity("gamma_lim", "time factor, fuel-controlled (times k)", "Gamma_lim", "-",
             "EN 1991-1-2 eq (A.5)-(A.7), times k of eq (A.8)"),
    Quantity("k_factor", "k factor", "k", "-", "EN 1991-1-2 eq (A.8)"),
    Quantity("t_lim_min", "fire growth time (Table E.5 growth rate)", "t_lim", "min", "EN 1991-1-2 A.(10)"),
    Quantity("regime", "fire regime", "", "", "EN 1991-1-2 eq (A.4): fuel-controlled where t_max = t_lim"),
    Quantity("t_max_min", "time of the peak gas temperature", "t_max", "min", "EN 1991-1-2 eq (A.4)", digits=2),
    Quantity("x_factor", "cooling-phase factor", "x", "-", "EN 1991-1-2 eq (A.11)"),
    Quantity("cooling_rate_C_h", "cooling rate (per hour of t*)", "", "C/h", "EN 1991-1-2 eq (A.11a)-(A.11c)"),
    Quantity("burnout_time_min", "time the gas is back at 20 C", "", "min", "EN 1991-1-2 eq (A.11)", digits=2),
)


def design_fire(setup: FireSetup) -> DesignFire:
    """The Annex A fire of the case's compartment (``setup.severity``) as a design fire: scope checked
    (refused outside it unless ``allow_out_of_scope``, then every output is stamped), t_max and burnout
    on the grid, alpha_c of a natural fire (EN 1991-1-2 3.3.1.1(3)), and the warnings of the annex's
    pitfalls (regime boundary, fire not burnt out within the duration, cellulosic fire loads only)."""
    sev, c, code = setup.severity, setup.compartment, setup.code
    oos = []
    for field, value, allowed in scope_violations(sev["opening_factor_m05"], sev["thermal_inertia"],
                                                  sev["total_area_fire_load_MJ_m2"], c.floor_area_m2, c.height_m,
                                                  c.roof_opening_area_m2, code):
        if not setup.allow_out_of_scope:
            raise OutOfScopeError(field, value, allowed + " (set analysis.allow_out_of_scope = true to compute anyway)")
        oos.append(f"OUT OF SCOPE of EN 1991-1-2 Annex A: {field} = {value!r}; {allowed}")
    pf = parametric_fire(sev["opening_factor_m05"], sev["thermal_inertia"], sev["total_area_fire_load_MJ_m2"],
                         sev["t_lim_h"])
    warnings = []
    if abs(pf.regime_ratio - 1.0) <= REGIME_BAND:
        warnings.append(
            f"Annex A regime boundary: (0.2e-3 q_t,d / O) / t_lim = {pf.regime_ratio:.3f} is within 10 % of 1; "
            f"the fire is {pf.regime}-controlled, and across the boundary the peak gas temperature jumps "
            "(O_lim = O/2 there, so Gamma_lim = Gamma/4), as published. Check the sensitivity to q_t,d and O.")
    if pf.burnout_time_s > setup.duration_min * 60.0:
        warnings.append(
            f"The parametric fire has not burnt out at duration_min = {setup.duration_min:g} min "
            f"(gas back at 20 C at {pf.burnout_time_h * 60:.1f} min): the cooling phase is cut short.")
    warnings.append("Annex A parametric fire: mainly cellulosic fire loads only (EN 1991-1-2 Annex A (2)).")
    values = {k: sev[k] for k in (q.key for q in SEVERITY_QUANTITIES)}
    values.update(gamma=pf.gamma, gamma_lim=pf.gamma_lim, k_factor=pf.k_factor, t_lim_min=pf.t_lim_h * 60.0,
                  regime=pf.regime, t_max_min=pf.t_max_h * 60.0, x_factor=pf.x_factor,
                  cooling_rate_C_h=pf.cooling_rate_C_h, burnout_time_min=pf.burnout_time_h * 60.0)
    return DesignFire(curve="parametric", gas_temperature_C=pf.gas_temperature,
                      alpha_c=convection(setup, "alpha_c_natural"), cools=True,
                      key_times_s=(pf.t_max_s, pf.burnout_time_s), values=values, quantities=QUANTITIES,
                      warnings=warnings, out_of_scope=oos)


#: What the Annex A fire needs from the case.
NEEDS = ("compartment", "fire_load")