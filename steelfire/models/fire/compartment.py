"""Compartment quantities of EN 1991-1-2 Annex A: opening factor, thermal inertia, total fire load.

Paragraph and equation numbers of Annex A are quoted from memory of EN 1991-1-2:2002.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Sequence

from steelfire.errors import InputError
from steelfire.models.fire.design import Quantity


@dataclass(frozen=True)
class Opening:
    """A group of equal vertical openings: ``count`` openings of ``width_m`` x ``height_m``."""

    width_m: float
    height_m: float
    count: int = 1

    @property
    def area_m2(self) -> float:
        return self.width_m * self.height_m * self.count


@dataclass(frozen=True)
class Layer:
    """One layer of an enclosure surface, from the fire side.

    thickness_m [m], density [kg/m3], conductivity [W/(m K)], specific_heat [J/(kg K)], taken at
    ambient temperature (EN 1991-1-2 Annex A (3) allows it).
    """

    thickness_m: float
    density: float
    conductivity: float
    specific_heat: float

    @property
    def thermal_inertia(self) -> float:
        """b = sqrt(rho c lambda) [J/(m2 s^0.5 K)], EN 1991-1-2 Annex A (3)."""
        return math.sqrt(self.density * self.specific_heat * self.conductivity)


@dataclass(frozen=True)
class Surface:
    """An enclosure surface (wall, floor or ceiling) of ``area_m2`` [m2], openings excluded."""

    area_m2: float
    layers: tuple


def vertical_opening_area(openings: Sequence[Opening]) -> float:
    """A_v [m2]: total area of vertical openings on all walls, EN 1991-1-2 Annex A (3)."""
    return float(sum(o.area_m2 for o in openings))


def opening_height(openings: Sequence[Opening]) -> float:
    """h_eq [m]: area-weighted average height of the vertical openings, EN 1991-1-2 Annex A (3).

    h_eq = sum(A_i h_i) / A_v.
    """
    av = vertical_opening_area(openings)
    if av <= 0.0:
        raise InputError("compartment.opening", list(openings), "at least one opening with area > 0")
    return float(sum(o.area_m2 * o.height_m for o in openings) / av)


def opening_factor(vertical_opening_area_m2: float, opening_height_m: float, boundary_area_m2: float) -> float:
    """Opening factor O = A_v sqrt(h_eq) / A_t [m^0.5], EN 1991-1-2 Annex A (3), legend of eq (A.2b)."""
    if vertical_opening_area_m2 <= 0:
        raise InputError("compartment.opening", vertical_opening_area_m2, "total opening area must be > 0 m2")
    if boundary_area_m2 <= 0:
        raise InputError("compartment.boundary_area_m2", boundary_area_m2, "must be > 0 [m2]")
    return vertical_opening_area_m2 * math.sqrt(opening_height_m) / boundary_area_m2


def layered_thermal_inertia(layers: Sequence[Layer], t_max_h: float) -> float:
    """Thermal inertia b [J/(m2 s^0.5 K)] of a surface made of layers, EN 1991-1-2 Annex A (8)-(9).

    Layer 1 is on the fire side. If b1 < b2, b = b1. If b1 > b2, the limit thickness
    s_lim = sqrt(3600 t_max lambda1 / (c1 rho1)) [m] (t_max in hours, eq (A.10), with t_max of eq (A.4)) decides: s1 > s_lim
    gives b = b1, otherwise b = (s1/s_lim) b1 + (1 - s1/s_lim) b2. The standard states the rule for
    two layers; for more, steelfire applies it recursively, b2 being the inertia of the layers behind
    layer 1 found the same way.
    """
    if not layers:
        raise InputError("compartment.surface.layers", [], "at least one layer")
    b1 = layers[0].thermal_inertia
    if len(layers) == 1:
        return b1
    b2 = layered_thermal_inertia(layers[1:], t_max_h)
    if b1 < b2:
        return b1
    l1 = layers[0]
    s_lim = math.sqrt(3600.0 * t_max_h * l1.conductivity / (l1.specific_heat * l1.density))
    if l1.thickness_m > s_lim:
        return b1
    r = l1.thickness_m / s_lim
    return r * b1 + (1.0 - r) * b2


def weighted_thermal_inertia(surfaces: Sequence[Surface], boundary_area_m2: float,
                             vertical_opening_area_m2: float, t_max_h: float) -> float:
    """b = sum(b_j A_j) / (A_t - A_v) [J/(m2 s^0.5 K)], EN 1991-1-2 Annex A (9), eq (A.9).

    The surfaces must cover the enclosure less its openings: sum A_j within 2 % of A_t - A_v. Where
    they add up to more, the divisor is sum A_j, so b stays the area-weighted mean (dividing by
    A_t - A_v would raise b above it: a higher b is a milder fire); where less, A_t - A_v stands.
    """
    net = boundary_area_m2 - vertical_opening_area_m2
    total = sum(s.area_m2 for s in surfaces)
    if net <= 0:
        raise InputError("compartment.boundary_area_m2", boundary_area_m2,
                         f"must exceed the opening area A_v = {vertical_opening_area_m2:g} m2")
    if abs(total - net) > 0.02 * net:
        raise InputError("compartment.surface", round(total, 3),
                         f"surface areas must add up to A_t - A_v = {net:.3f} m2 (within 2 %)")
    # over-covered beyond rounding: divide by the surfaces' own area (their mean), else by A_t - A_v
    divisor = total if total > net * (1.0 + 1e-9) else net
    return float(sum(layered_thermal_inertia(s.layers, t_max_h) * s.area_m2 for s in surfaces) / divisor)


def total_area_fire_load(design_fire_load_MJ_m2: float, floor_area_m2: float, boundary_area_m2: float) -> float:
    """q_t,d = q_f,d A_f / A_t [MJ/m2]: design fire load per total enclosure area, EN 1991-1-2 Annex A (4), legend of eq (A.4)."""
    return design_fire_load_MJ_m2 * floor_area_m2 / boundary_area_m2


@dataclass(frozen=True)
class Compartment:
    """A fire compartment: floor area A_f [m2], height H [m], enclosure area A_t [m2] (walls, floor and
    ceiling, openings included), vertical openings, and either the thermal inertia b [J/(m2 s^0.5 K)]
    or the layered surfaces it is weighted from; horizontal (roof) openings A_h [m2]."""

    floor_area_m2: float
    height_m: float
    boundary_area_m2: float
    openings: tuple
    thermal_inertia: float | None = None
    surfaces: tuple = ()
    roof_opening_area_m2: float = 0.0


#: The fire-severity values of a compartment, as the outputs show them.
SEVERITY_QUANTITIES = (
    Quantity("opening_factor_m05", "opening factor", "O", "m^0.5", "EN 1991-1-2 A.(3): A_v sqrt(h_eq) / A_t"),
    Quantity("opening_height_m", "weighted opening height", "h_eq", "m", "EN 1991-1-2 A.(3)"),
    Quantity("thermal_inertia", "thermal inertia of the enclosure", "b", "J/(m2 s^0.5 K)",
             "EN 1991-1-2 A.(3), (8)-(9)"),
    Quantity("design_fire_load_MJ_m2", "design fire load density (floor)", "q_f,d", "MJ/m2",
             "EN 1991-1-2 E.(1): q_f,k m delta_q1 delta_q2 delta_n"),
    Quantity("total_area_fire_load_MJ_m2", "design fire load density (enclosure)", "q_t,d", "MJ/m2",
             "EN 1991-1-2 A.(4): q_f,d A_f / A_t"),
    Quantity("vertical_opening_area_m2", "vertical opening area", "A_v", "m2", "EN 1991-1-2 A.(3)"),
    Quantity("area_factor", "fire activation risk (compartment size)", "delta_q1", "-",
             "EN 1991-1-2 Table E.1"),
)


def fire_severity(compartment: Compartment, fire_load, code) -> dict:
    """O, h_eq, A_v, delta_q1, q_f,d, q_t,d, t_lim and b of a compartment with its fire load (EN 1991-1-2
    Annex A (3)-(10) and Annex E); keys as :data:`SEVERITY_QUANTITIES` names them, t_lim as ``t_lim_h``.

    b of layered surfaces needs t_max of eq (A.4), max(0.2e-3 q_t,d / O, t_lim).
    """
    from steelfire.models.fire import fireload

    c, fl = compartment, fire_load
    av = vertical_opening_area(c.openings)
    heq = opening_height(c.openings)
    o = opening_factor(av, heq, c.boundary_area_m2)
    if fl.design_MJ_m2 is not None:
        dq1 = None
        qfd = fl.design_MJ_m2
    else:
        dq1 = fireload.area_factor(c.floor_area_m2, code) if fl.area_factor == "auto" else fl.area_factor
        qfd = fireload.design_fire_load(fl.characteristic_MJ_m2, fl.combustion_factor, dq1,
                                        fl.occupancy_factor, fl.measures_factor)
    qtd = total_area_fire_load(qfd, c.floor_area_m2, c.boundary_area_m2)
    t_lim_h = fireload.fire_growth_t_lim_h(fl.growth, code)
    t_max_h = max(0.2e-3 * qtd / o, t_lim_h)
    b = c.thermal_inertia if c.thermal_inertia is not None else \
        weighted_thermal_inertia(c.surfaces, c.boundary_area_m2, av, t_max_h)
    return {"opening_factor_m05": o, "opening_height_m": heq, "thermal_inertia": b,
            "design_fire_load_MJ_m2": qfd, "total_area_fire_load_MJ_m2": qtd, "vertical_opening_area_m2": av,
            "area_factor": dq1, "t_lim_h": t_lim_h}


