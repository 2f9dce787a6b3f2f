"""Rate of heat release of a design fire, EN 1991-1-2 Annex E.4, or read from a table.

Annex E.4 (paragraph numbers from memory of EN 1991-1-2:2002):

* E.4(1): growth phase Q = 1e6 (t / t_alpha)^2 [W], t [s], t_alpha [s] the time to reach 1 MW;
* E.4(2): t_alpha and RHR_f by occupancy, Table E.5;
* E.4(3): a plateau (steady state) at Q_max = RHR_f A_fi, A_fi the fire area [m2], RHR_f the largest
  heat release per unit area of a fuel-controlled fire [kW/m2];
* E.4(4), (5): the decay starts when 70 % of the fire load q_f,d A_fi has burnt and is linear down to
  zero when all of it has burnt;
* E.4(6), (7) (ventilation-controlled fires: a lower plateau, a longer fire): the curve here is the
  fuel-controlled one, as the localised and travelling fires that use it assume. The plateau the
  openings allow, Q_max = 0.10 m H_u A_v sqrt(h_eq) [MW] (:func:`ventilation_controlled_heat_release_W`),
  is given so that a model can refuse a fire the openings cannot feed; the reduced, extended curve
  itself is not implemented.

A small fire load can be 70 % consumed before the growth reaches Q_max (``fuel_limited``): the decay
then starts at that moment from the Q the growth has reached, and still releases the last 30 %.
Everything in SI at the interface: time [s], Q [W], energy [J]; the annex's kW/m2 and MJ/m2 are in the
argument names where they are the inputs.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from types import MappingProxyType

import numpy as np

from steelfire.errors import InputError

#: Heat release at t = t_alpha in the growth phase [W], EN 1991-1-2 E.4(1): Q = 1e6 (t / t_alpha)^2.
REFERENCE_HEAT_RELEASE_W = 1.0e6
#: Share of the fire load burnt when the decay starts [-], EN 1991-1-2 E.4(4) (from memory).
DECAY_START_FRACTION = 0.7

#: Coefficient of the ventilation-controlled plateau [kg/(s m^(5/2))], EN 1991-1-2 E.4(7) (from memory):
#: Q_max = 0.10 m H_u A_v sqrt(h_eq) [MW].
VENTILATION_COEFFICIENT = 0.10
#: Net calorific value of wood H_u [MJ/kg], EN 1991-1-2 E.4(7) (from memory).
WOOD_CALORIFIC_VALUE_MJ_KG = 17.5
#: Combustion factor m [-] of E.4(7), 0.8 by EN 1991-1-2 E.3(2) (from memory).
COMBUSTION_FACTOR = 0.8

#: Growth rate -> t_alpha [s], the time to reach 1 MW. Slow 600, medium 300, fast 150 s: EN 1991-1-2
#: Table E.5 (from memory). Ultra-fast 75 s: the fourth class of the same t-squared family in common
#: practice; not an occupancy of Table E.5 as remembered (from memory).
GROWTH_TIME_S = MappingProxyType({"slow": 600.0, "medium": 300.0, "fast": 150.0, "ultra-fast": 75.0})


@dataclass(frozen=True)
class Occupancy:
    """A row of EN 1991-1-2 Table E.5: fire growth rate and RHR_f of an occupancy."""

    name: str
    growth: str                          # slow | medium | fast
    growth_time_s: float                 # t_alpha [s]
    heat_release_density_kW_m2: float    # RHR_f [kW/m2]


def _occupancy(name, growth, rhr):
    return Occupancy(name, growth, GROWTH_TIME_S[growth], rhr)


#: EN 1991-1-2 Table E.5, "fire growth rate and RHR_f for different occupancies" (every row from memory
#: of EN 1991-1-2:2002). Keys are ours; ``name`` is the table's wording.
OCCUPANCIES = MappingProxyType({
    "dwelling": _occupancy("Dwelling", "medium", 250.0),
    "hospital_room": _occupancy("Hospital (room)", "medium", 250.0),
    "hotel_room": _occupancy("Hotel (room)", "medium", 250.0),
    "library": _occupancy("Library", "fast", 500.0),
    "office": _occupancy("Office", "medium", 250.0),
    "classroom": _occupancy("Classroom of a school", "medium", 250.0),
    "shopping_centre": _occupancy("Shopping centre", "fast", 250.0),
    "theatre_cinema": _occupancy("Theatre (cinema)", "fast", 500.0),
    "transport_public_space": _occupancy("Transport (public space)", "slow", 250.0),
})


def growth_time_s(growth: str) -> float:
    """t_alpha [s] of a fire growth rate (slow 600, medium 300, fast 150, ultra-fast 75 s).

    EN 1991-1-2 E.4(1), Table E.5 (from memory; ultra-fast: common practice).

    >>> growth_time_s("medium")
    300.0
    """
    try:
        return GROWTH_TIME_S[growth]
    except (KeyError, TypeError):
        raise InputError("fire_load.growth", growth, "must be one of " + ", ".join(GROWTH_TIME_S)) from None


def occupancy(name: str) -> Occupancy:
    """The Table E.5 row of an occupancy key (``office``, ``library``, ...); see :data:`OCCUPANCIES`.

    >>> occupancy("library").heat_release_density_kW_m2
    500.0
    """
    try:
        return OCCUPANCIES[name]
    except (KeyError, TypeError):
        raise InputError("occupancy", name, "must be one of " + ", ".join(OCCUPANCIES)) from None


def as_times_s(time_s, field="time_s"):
    """``time_s`` [s] as a float array, every value finite and >= 0, or InputError naming the first bad one.

    The time check the fire models share (heat release, localised and travelling fires).
    """
    t = np.asarray(time_s, dtype=float)
    bad = ~np.isfinite(t) | (t < 0.0)
    if np.any(bad):
        raise InputError(field, t[bad].flat[0].item(), "must be finite and >= 0 [s]")
    return t


def _positive(field, value, unit):
    if isinstance(value, bool) or not isinstance(value, (int, float, np.floating)) \
            or not math.isfinite(value) or value <= 0:
        raise InputError(field, value, f"must be a finite number > 0 [{unit}]")
    return float(value)


def t_squared_heat_release_W(time_s, growth_time_s):
    """Q = 1e6 (t / t_alpha)^2 [W] of the growth phase, EN 1991-1-2 E.4(1); t [s], t_alpha [s].

    Hand calculation: t = 600 s, t_alpha = 300 s -> 1e6 x 2^2 = 4 MW.

    >>> float(t_squared_heat_release_W(600.0, 300.0))
    4000000.0
    """
    t = as_times_s(time_s)
    ta = _positive("growth_time_s", growth_time_s, "s")
    return REFERENCE_HEAT_RELEASE_W * (t / ta) ** 2


def ventilation_controlled_heat_release_W(opening_area_m2, opening_height_m, combustion_factor=COMBUSTION_FACTOR):
    """Largest heat release [W] the openings can feed, EN 1991-1-2 E.4(7) (from memory).

    Q_max = 0.10 m H_u A_v sqrt(h_eq) [MW], H_u = 17.5 MJ/kg (wood), m the combustion factor (0.8),
    A_v the vertical opening area [m2], h_eq their weighted height [m] (EN 1991-1-2 A.(3)). A fuel-
    controlled plateau RHR_f A_fi above it means the fire is ventilation-controlled (E.4(6)).

    Examples
    --------
    Hand calculation, A_v = 4 m2, h_eq = 2 m: 0.10 x 0.8 x 17.5 x 4 x 1.414214 = 7.9196 MW.

    >>> round(ventilation_controlled_heat_release_W(4.0, 2.0) / 1e6, 4)
    7.9196
    """
    if isinstance(opening_area_m2, bool) or not isinstance(opening_area_m2, (int, float, np.floating)) \
            or not math.isfinite(opening_area_m2) or opening_area_m2 < 0:
        raise InputError("opening_area_m2", opening_area_m2, "must be a finite number >= 0 [m2]")
    h = _positive("opening_height_m", opening_height_m, "m")
    m = _positive("combustion_factor", combustion_factor, "-")
    return VENTILATION_COEFFICIENT * m * WOOD_CALORIFIC_VALUE_MJ_KG * float(opening_area_m2) * math.sqrt(h) * 1e6


@dataclass(frozen=True)
class AnnexEFire:
    """An EN 1991-1-2 E.4 heat release curve with its phase times.

    Growth to ``growth_end_s``, plateau at ``peak_heat_release_W`` to ``decay_start_s``, linear decay to
    zero at ``burnout_s``. When ``fuel_limited``, the decay starts at the end of the growth (the
    plateau is never reached) and ``peak_heat_release_W`` < ``plateau_heat_release_W``.
    """

    growth_time_s: float            # t_alpha [s]
    plateau_heat_release_W: float   # RHR_f A_fi [W]
    peak_heat_release_W: float      # the largest Q of this fire [W]
    fire_load_J: float              # q_f,d A_fi [J]
    growth_end_s: float             # end of the growth [s]
    decay_start_s: float            # 70 % of the fire load burnt [s]
    burnout_s: float                # all burnt, Q = 0 from here [s]
    fuel_limited: bool              # 70 % burnt during the growth

    @property
    def key_times_s(self):
        """The times where Q has a kink, to put on a time grid."""
        return (self.growth_end_s, self.decay_start_s, self.burnout_s)

    def heat_release_W(self, time_s):
        """Q [W] at ``time_s`` [s] (>= 0): growth E.4(1), plateau E.4(3), linear decay E.4(5), then 0."""
        t = as_times_s(time_s)
        q_peak = self.peak_heat_release_W
        grow = REFERENCE_HEAT_RELEASE_W * (t / self.growth_time_s) ** 2
        decay_len = self.burnout_s - self.decay_start_s
        decay = q_peak * (1.0 - (t - self.decay_start_s) / decay_len)
        return np.where(t <= self.growth_end_s, grow,
                        np.where(t <= self.decay_start_s, q_peak,
                                 np.where(t < self.burnout_s, decay, 0.0)))

    def energy_J(self, time_s):
        """Energy released from 0 to ``time_s`` [J], the exact integral of :meth:`heat_release_W`."""
        t = as_times_s(time_s)
        ta, q_peak = self.growth_time_s, self.peak_heat_release_W
        t1, t2, t3 = self.growth_end_s, self.decay_start_s, self.burnout_s
        tg = np.minimum(t, t1)               # time spent in each phase so far
        tp = np.clip(t, t1, t2) - t1
        td = np.clip(t, t2, t3) - t2
        return (REFERENCE_HEAT_RELEASE_W * tg ** 3 / (3.0 * ta ** 2)
                + q_peak * tp
                + q_peak * (td - 0.5 * td ** 2 / (t3 - t2)))


def annex_e_fire(design_fire_load_MJ_m2, fire_area_m2, heat_release_density_kW_m2, growth_time_s,
                 decay_start_fraction=DECAY_START_FRACTION) -> AnnexEFire:
    """The heat release curve of EN 1991-1-2 E.4 for a fuel-controlled fire.

    With E = q_f,d A_fi [J], Q_max = RHR_f A_fi [W], t_alpha [s] and f = 0.7 (E.4(4)):

    * growth E.4(1): Q = 1e6 (t / t_alpha)^2 until t_1 = t_alpha sqrt(Q_max / 1e6), having released
      E_1 = Q_max t_1 / 3;
    * plateau E.4(3): Q = Q_max until t_2 = t_1 + (f E - E_1) / Q_max;
    * decay E.4(5): linear from Q_max at t_2 to 0 at t_3 = t_2 + 2 (1 - f) E / Q_max.

    Fuel-limited (f E <= E_1): the growth stops at t_2 = (3 f E t_alpha^2 / 1e6)^(1/3), where f E has
    burnt; Q_peak = 1e6 (t_2 / t_alpha)^2 < Q_max; decay to t_3 = t_2 + 2 (1 - f) E / Q_peak. In both
    cases the whole fire load E is released (the decay's triangle holds (1 - f) E).

    Parameters
    ----------
    design_fire_load_MJ_m2 : float
        q_f,d [MJ/m2] of the fire area (EN 1991-1-2 eq (E.1)).
    fire_area_m2 : float
        A_fi [m2], the area on fire (the compartment's floor for a fire spread over it).
    heat_release_density_kW_m2 : float
        RHR_f [kW/m2] (Table E.5; :data:`OCCUPANCIES`).
    growth_time_s : float
        t_alpha [s] (:func:`growth_time_s`).
    decay_start_fraction : float
        Share of the fire load burnt when the decay starts [-]; 0.7 by E.4(4).

    Examples
    --------
    An office (Table E.5: medium, RHR_f 250 kW/m2) of 100 m2 with 600 MJ/m2; hand calculation:
    Q_max = 25 MW, t_1 = 300 sqrt(25) = 1500 s, E_1 = 25e6 x 1500 / 3 = 12.5 GJ, 0.7 E = 42 GJ,
    t_2 = 1500 + 29.5e9 / 25e6 = 2680 s, t_3 = 2680 + 2 x 18e9 / 25e6 = 4120 s.

    >>> f = annex_e_fire(600.0, 100.0, 250.0, 300.0)
    >>> f.growth_end_s, round(f.decay_start_s, 6), round(f.burnout_s, 6)
    (1500.0, 2680.0, 4120.0)
    """
    q = _positive("design_fire_load_MJ_m2", design_fire_load_MJ_m2, "MJ/m2")
    a = _positive("fire_area_m2", fire_area_m2, "m2")
    rhr = _positive("heat_release_density_kW_m2", heat_release_density_kW_m2, "kW/m2")
    ta = _positive("growth_time_s", growth_time_s, "s")
    f = decay_start_fraction
    if not (isinstance(f, (int, float)) and 0.0 < f < 1.0):
        raise InputError("decay_start_fraction", f, "must be a number between 0 and 1 (0.7 by EN 1991-1-2 E.4(4))")
    energy = q * a * 1e6
    q_max = rhr * a * 1e3
    t1 = ta * math.sqrt(q_max / REFERENCE_HEAT_RELEASE_W)
    e1 = q_max * t1 / 3.0
    if f * energy <= e1:
        t2 = (3.0 * f * energy * ta ** 2 / REFERENCE_HEAT_RELEASE_W) ** (1.0 / 3.0)
        t1 = t2
        q_peak = REFERENCE_HEAT_RELEASE_W * (t2 / ta) ** 2
        limited = True
    else:
        t2 = t1 + (f * energy - e1) / q_max
        q_peak = q_max
        limited = False
    t3 = t2 + 2.0 * (1.0 - f) * energy / q_peak
    return AnnexEFire(growth_time_s=ta, plateau_heat_release_W=q_max, peak_heat_release_W=q_peak,
                      fire_load_J=energy, growth_end_s=t1, decay_start_s=t2, burnout_s=t3,
                      fuel_limited=limited)


@dataclass(frozen=True)
class TabulatedHeatRelease:
    """A heat release history given as a table, linear between its points, held at its last value after."""

    table_time_s: np.ndarray             # [s], strictly increasing from 0
    table_heat_release_W: np.ndarray     # [W], >= 0
    source: str

    @property
    def key_times_s(self):
        return tuple(float(x) for x in self.table_time_s[1:])

    @property
    def peak_heat_release_W(self) -> float:
        return float(np.max(self.table_heat_release_W))

    def heat_release_W(self, time_s):
        """Q [W] at ``time_s`` [s], linear between the table's points, the last value held past its end."""
        return np.interp(as_times_s(time_s), self.table_time_s, self.table_heat_release_W)

    def energy_J(self, time_s):
        """Energy released from 0 to ``time_s`` [J], the exact integral of the linear interpolation."""
        t = as_times_s(time_s)
        ts, qs = self.table_time_s, self.table_heat_release_W
        cum = np.concatenate([[0.0], np.cumsum(0.5 * (qs[1:] + qs[:-1]) * np.diff(ts))])
        i = np.clip(np.searchsorted(ts, t, side="right") - 1, 0, len(ts) - 1)
        dt = t - ts[i]
        slope = np.zeros_like(qs)
        slope[:-1] = np.diff(qs) / np.diff(ts)
        return cum[i] + qs[i] * dt + 0.5 * slope[i] * dt ** 2


def tabulated_heat_release(time_min, heat_release_MW, source: str = "table") -> TabulatedHeatRelease:
    """A heat release history from a table of (time_min, heat_release_MW) rows.

    Times strictly increasing from 0 min; heat release finite and >= 0 MW; at least two rows.
    """
    t = np.asarray(time_min, dtype=float).ravel()
    q = np.asarray(heat_release_MW, dtype=float).ravel()
    if t.size != q.size:
        raise InputError("heat_release_MW", q.size, f"needs one value per time ({t.size} times)")
    if t.size < 2:
        raise InputError("time_min", t.size, "needs at least two rows")
    for i, (ti, qi) in enumerate(zip(t, q)):
        if not math.isfinite(ti) or (i == 0 and ti != 0.0) or (i > 0 and ti <= t[i - 1]):
            raise InputError(f"{source} row {i + 1} time_min", float(ti),
                             "times must start at 0 and increase strictly [min]")
        if not (math.isfinite(qi) and qi >= 0.0):
            raise InputError(f"{source} row {i + 1} heat_release_MW", float(qi), "must be a finite number >= 0 [MW]")
    return TabulatedHeatRelease(t * 60.0, q * 1e6, source)
