"""Design fire load density, EN 1991-1-2 Annex E, and the fire growth rate of Annex A."""

from __future__ import annotations

import math
from dataclasses import dataclass

from steelfire.codevalues import DEFAULTS
from steelfire.errors import InputError

#: Floor areas [m2] of the rows of EN 1991-1-2 Table E.1 and the code-value names of delta_q1.
AREA_FACTOR_ROWS = (
    (25.0, "delta_q1_25m2"),
    (250.0, "delta_q1_250m2"),
    (2500.0, "delta_q1_2500m2"),
    (5000.0, "delta_q1_5000m2"),
    (10000.0, "delta_q1_10000m2"),
)

#: Occupancy presets: EN 1991-1-2 Table E.4 (characteristic fire load density, 80 % fractile [MJ/m2]), Table E.5
#: (fire growth rate, RHR_f [kW/m2]) and, where Table E.1's examples name the occupancy, delta_q2. Every value
#: from memory of EN 1991-1-2:2002.
OCCUPANCIES = {
    "dwelling": {"characteristic_MJ_m2": 948.0, "growth": "medium", "heat_release_density_kW_m2": 250.0,
                 "occupancy_factor": 1.0},
    "hospital_room": {"characteristic_MJ_m2": 280.0, "growth": "medium", "heat_release_density_kW_m2": 250.0},
    "hotel_room": {"characteristic_MJ_m2": 377.0, "growth": "medium", "heat_release_density_kW_m2": 250.0,
                   "occupancy_factor": 1.0},
    "library": {"characteristic_MJ_m2": 1824.0, "growth": "fast", "heat_release_density_kW_m2": 500.0},
    "office": {"characteristic_MJ_m2": 511.0, "growth": "medium", "heat_release_density_kW_m2": 250.0,
               "occupancy_factor": 1.0},
    "classroom": {"characteristic_MJ_m2": 347.0, "growth": "medium", "heat_release_density_kW_m2": 250.0},
    "shopping_centre": {"characteristic_MJ_m2": 730.0, "growth": "fast", "heat_release_density_kW_m2": 250.0},
    "theatre_cinema": {"characteristic_MJ_m2": 365.0, "growth": "fast", "heat_release_density_kW_m2": 500.0},
    "transport_public_space": {"characteristic_MJ_m2": 122.0, "growth": "slow", "heat_release_density_kW_m2": 250.0},
}

#: The fire-fighting measures of EN 1991-1-2 Table E.2 a case may state ([fire_load.measures]): key -> how its
#: value maps to a code-value name (None: the factor is 1).
MEASURES = {
    "sprinklers": lambda v: "delta_n1_sprinklers" if v else None,
    "independent_water_supplies": lambda v: {0: None, 1: "delta_n2_one_water_supply",
                                             2: "delta_n2_two_water_supplies"}[v],
    "heat_detection": lambda v: "delta_n3_heat_detection" if v else None,
    "smoke_detection": lambda v: "delta_n4_smoke_detection" if v else None,
    "alarm_transmission": lambda v: "delta_n5_alarm_transmission" if v else None,
    "work_fire_brigade": lambda v: "delta_n6_work_fire_brigade" if v else None,
    "offsite_fire_brigade": lambda v: "delta_n7_offsite_fire_brigade" if v else None,
    "safe_access_routes": lambda v: None if v else "delta_n8_no_safe_access",
    "fire_fighting_devices": lambda v: None if v else "delta_n9_no_fire_fighting_devices",
    "smoke_exhaust": lambda v: None if v else "delta_n10_no_smoke_exhaust",
}
#: The normal fire-fighting measures of Table E.2 (delta_n8-10), which a case must state when it lists its measures.
NORMAL_MEASURES = ("safe_access_routes", "fire_fighting_devices", "smoke_exhaust")


def measures_factor(measures: dict, code=DEFAULTS) -> float:
    """delta_n = product of the delta_n,i of the stated measures, EN 1991-1-2 E.(1) and Table E.2."""
    f = 1.0
    for key, value in measures.items():
        name = MEASURES[key](value)
        if name is not None:
            f *= code[name]
    return f


#: Growth rate -> code-value name of t_lim, EN 1991-1-2 Annex A (10) (slow 25, medium 20, fast 15 min).
GROWTH_TLIM = {"slow": "t_lim_slow_min", "medium": "t_lim_medium_min", "fast": "t_lim_fast_min"}


@dataclass(frozen=True)
class FireLoad:
    """The fire load of a compartment: the characteristic density q_f,k [MJ/m2 of floor] with the factors
    of EN 1991-1-2 E.(1) (combustion m, delta_q1 or "auto" for Table E.1, delta_q2, delta_n), or the
    design density q_f,d directly; and the fire growth rate (slow | medium | fast)."""

    characteristic_MJ_m2: float | None
    design_MJ_m2: float | None
    combustion_factor: float = 0.8
    area_factor: float | str = "auto"
    occupancy_factor: float = 1.0
    measures_factor: float = 1.0
    growth: str = "medium"
    heat_release_density_kW_m2: float | None = None   # RHR_f, EN 1991-1-2 Table E.5 (localised, travelling fires)
    fire_area_m2: float | None = None                 # A_fi, the area on fire (localised fire)
    occupancy: str | None = None                      # a preset of OCCUPANCIES
    measures: dict | None = None                      # the stated measures of Table E.2 (measures_factor their product)
    from_preset: tuple = ()                           # the keys taken from the occupancy preset


def design_density(fire_load: FireLoad, floor_area_m2, code=DEFAULTS):
    """(q_f,d [MJ/m2], delta_q1 or None) of ``fire_load``: given, or EN 1991-1-2 E.(1) with delta_q1 by
    Table E.1 for ``floor_area_m2`` (None: the fire load must give its area factor)."""
    fl = fire_load
    if fl.design_MJ_m2 is not None:
        return fl.design_MJ_m2, None
    if fl.area_factor == "auto":
        if floor_area_m2 is None:
            raise InputError("fire_load.area_factor", "auto",
                             "needs the compartment's floor area; give a number (EN 1991-1-2 Table E.1)")
        dq1 = area_factor(floor_area_m2, code)
    else:
        dq1 = fl.area_factor
    return design_fire_load(fl.characteristic_MJ_m2, fl.combustion_factor, dq1, fl.occupancy_factor,
                            fl.measures_factor), dq1


def area_factor(floor_area_m2: float, code=DEFAULTS) -> float:
    """delta_q1 [-], the fire activation risk due to the size of the compartment, EN 1991-1-2 Table E.1.

    Between the rows of the table, delta_q1 is interpolated linearly in log10(A_f) (the table gives
    no interpolation rule; log-linear suits rows spaced by factors of 2 to 10 in area and gives a
    higher, conservative, value than linear interpolation: common practice, no source); below 25 m2
    and above 10 000 m2 the end rows are held (above 10 000 m2 the analysis warns).
    """
    if not floor_area_m2 > 0:
        raise InputError("compartment.floor_area_m2", floor_area_m2, "must be > 0 [m2]")
    rows = [(a, float(code[name])) for a, name in AREA_FACTOR_ROWS]
    if floor_area_m2 <= rows[0][0]:
        return rows[0][1]
    if floor_area_m2 >= rows[-1][0]:
        return rows[-1][1]
    for (a0, d0), (a1, d1) in zip(rows, rows[1:]):
        if floor_area_m2 <= a1:
            r = (math.log10(floor_area_m2) - math.log10(a0)) / (math.log10(a1) - math.log10(a0))
            return d0 + r * (d1 - d0)
    raise AssertionError("unreachable")


def design_fire_load(characteristic_MJ_m2: float, combustion_factor: float, area_factor_: float,
                     occupancy_factor: float, measures_factor: float) -> float:
    """q_f,d = q_f,k m delta_q1 delta_q2 delta_n [MJ/m2 of floor], EN 1991-1-2 Annex E, eq (E.1)."""
    return characteristic_MJ_m2 * combustion_factor * area_factor_ * occupancy_factor * measures_factor


def fire_growth_t_lim_h(growth: str, code=DEFAULTS) -> float:
    """t_lim [h] for a fire growth rate, EN 1991-1-2 Annex A (10) with Table E.5 growth rates."""
    try:
        name = GROWTH_TLIM[growth]
    except KeyError:
        raise InputError("fire_load.growth", growth, "must be one of slow, medium, fast") from None
    return float(code[name]) / 60.0
