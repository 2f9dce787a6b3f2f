"""Cross-section geometry and section factors of steel members in fire.

The section factor is the heated perimeter per unit length over the cross-section area, in 1/m:

* ``Am/V`` of an unprotected member, EN 1993-1-2 4.2.5.1 and Table 4.2;
* ``Ap/V`` of a protected member, EN 1993-1-2 4.2.5.2 and Table 4.3, where ``Ap`` is the inner
  surface of the protection per unit length: the steel contour for a contour (profile) encasement,
  the enclosing box for a box (hollow) encasement.

Both are the same geometric ratio here; which one it is depends on how the caller uses it (a bare
member takes ``encasement="profile"``, with the shadow factor of :func:`shadow_factor`; a protected
member takes the encasement of its protection).

Units: dimensions are stored in millimetres (``*_mm``, as in the section tables); areas and
perimeters are returned in mm2 / mm or m2 / m according to the suffix; section factors in 1/m.

Shapes
------
:class:`ISection`
    Doubly symmetric rolled I/H section with root radius ``r_mm`` between web and flanges, or a
    welded I section (``r_mm = 0``; a weld throat is recorded but ignored in the geometry).
:class:`RectangularHollowSection`
    RHS / SHS with rounded corners (outer and inner corner radii; rules in :func:`rhs_section`).
:class:`CircularHollowSection`
    CHS.

Standard rolled profiles (IPE, HEA, HEB; EN 10365) come from :func:`catalogue_section`. The
catalogue values were entered from memory and must be checked against the standard before design
use (see the header of ``data/sections_en10365.csv``).
"""

from __future__ import annotations

import csv
import difflib
import io
import math
import numbers
import re
from dataclasses import dataclass, field
from functools import lru_cache
from importlib import resources
from typing import Optional, Union

from steelfire.errors import InputError

__all__ = [
    "EXPOSURES",
    "ENCASEMENTS",
    "CATALOGUE_FILE",
    "ISection",
    "RectangularHollowSection",
    "CircularHollowSection",
    "Section",
    "rolled_i_section",
    "welded_i_section",
    "rhs_section",
    "rhs_corner_radii_mm",
    "chs_section",
    "catalogue_section",
    "catalogue_names",
    "heated_perimeter_m",
    "section_factor_per_m",
    "box_section_factor_per_m",
    "shadow_factor",
    "shadow_ratio",
    "PlatePart",
    "SectionProperties",
    "section_properties",
]

EXPOSURES = ("4-sided", "3-sided")
"""Fire exposure: all round, or three sides with the top face against a slab (EN 1993-1-2 Tables 4.2, 4.3)."""

ENCASEMENTS = ("profile", "box")
"""Heated boundary: the steel contour (profile), or the enclosing box (EN 1993-1-2 Tables 4.2, 4.3)."""

CATALOGUE_FILE = "sections_en10365.csv"
"""Data file under ``steelfire/data``: IPE, HEA, HEB dimensions after EN 10365 (entered from memory)."""

_FILLET_AREA_FACTOR = 4.0 - math.pi
"""Area of the four root fillets of an I section over r^2: 4 (r^2 - pi r^2 / 4) = (4 - pi) r^2."""

_FILLET_PERIMETER_FACTOR = 2.0 * math.pi - 8.0
"""Change of contour by the four fillets over r: 4 (pi r / 2 - 2 r) = (2 pi - 8) r."""


# --------------------------------------------------------------------------------------------
# validation helpers (used once, at construction)
# --------------------------------------------------------------------------------------------


def _number(field_name: str, value, *, positive: bool = True) -> float:
    """Return ``value`` as a finite float, > 0 (or >= 0 when ``positive`` is False)."""
    allowed = "a finite number > 0 [mm]" if positive else "a finite number >= 0 [mm]"
    if isinstance(value, bool) or not isinstance(value, numbers.Real):
        raise InputError(field_name, value, allowed)
    x = float(value)
    if not math.isfinite(x) or (x <= 0.0 if positive else x < 0.0):
        raise InputError(field_name, value, allowed)
    return x


def _choice(field_name: str, value, allowed: tuple[str, ...]) -> str:
    if not isinstance(value, str) or value not in allowed:
        raise InputError(field_name, value, "one of " + ", ".join(repr(a) for a in allowed))
    return value


def _name(value) -> str:
    if not isinstance(value, str):
        raise InputError("name", value, "a string")
    return value


def _optional_positive(field_name: str, value) -> Optional[float]:
    if value is None:
        return None
    if isinstance(value, bool) or not isinstance(value, numbers.Real):
        raise InputError(field_name, value, "a finite number > 0, or None")
    x = float(value)
    if not math.isfinite(x) or x <= 0.0:
        raise InputError(field_name, value, "a finite number > 0, or None")
    return x


# --------------------------------------------------------------------------------------------
# shapes
# --------------------------------------------------------------------------------------------


class _SI:
    """SI views of the millimetre geometry, shared by the shapes."""

    __slots__ = ()

    @property
    def area_m2(self) -> float:
        """Cross-section area [m2]."""
        return self.area_mm2 * 1e-6

    @property
    def perimeter_m(self) -> float:
        """Steel (outer) contour per unit length [m = m2/m]."""
        return self.perimeter_mm * 1e-3


@dataclass(frozen=True)
class ISection(_SI):
    """Doubly symmetric I or H section, rolled (root radius) or welded (no root radius).

    Parameters
    ----------
    h_mm : float
        Overall depth h [mm].
    b_mm : float
        Flange width b [mm].
    tw_mm : float
        Web thickness tw [mm].
    tf_mm : float
        Flange thickness tf [mm].
    r_mm : float
        Root radius r between web and flanges [mm]; 0 for a welded section. The four fillets add
        (4 - pi) r^2 to the area and change the contour by (2 pi - 8) r.
    name : str
        Label, e.g. ``"HEB 300"``; empty for a user-defined section.
    fabrication : str
        ``"rolled"`` or ``"welded"``.
    weld_throat_mm : float
        Throat of the web-to-flange fillet welds of a welded section [mm]; recorded only, the weld
        metal is ignored in the area and the perimeter.
    tabulated_area_cm2, mass_kg_m, tabulated_perimeter_m2_m : float or None
        Catalogue values, kept for reference; the geometry functions always compute from the
        dimensions.

    Raises
    ------
    InputError
        A dimension that is not a finite positive number, or dimensions that do not form an I
        section (flanges overlapping, web wider than the flanges, fillets that do not fit).
    """

    h_mm: float
    b_mm: float
    tw_mm: float
    tf_mm: float
    r_mm: float = 0.0
    name: str = ""
    fabrication: str = "rolled"
    weld_throat_mm: float = 0.0
    tabulated_area_cm2: Optional[float] = field(default=None, compare=False)
    mass_kg_m: Optional[float] = field(default=None, compare=False)
    tabulated_perimeter_m2_m: Optional[float] = field(default=None, compare=False)

    #: an I section is not convex: the shadow effect applies (EN 1993-1-2 4.2.5.1(2))
    convex = False

    def __post_init__(self) -> None:
        h = _number("h_mm", self.h_mm)
        b = _number("b_mm", self.b_mm)
        tw = _number("tw_mm", self.tw_mm)
        tf = _number("tf_mm", self.tf_mm)
        r = _number("r_mm", self.r_mm, positive=False)
        throat = _number("weld_throat_mm", self.weld_throat_mm, positive=False)
        _name(self.name)
        _choice("fabrication", self.fabrication, ("rolled", "welded"))
        if 2.0 * tf >= h:
            raise InputError("tf_mm", self.tf_mm, f"< h_mm / 2 = {h / 2:g} (the flanges overlap)")
        if tw >= b:
            raise InputError("tw_mm", self.tw_mm, f"< b_mm = {b:g} (web wider than the flanges)")
        r_max = min((b - tw) / 2.0, (h - 2.0 * tf) / 2.0)
        if r > r_max:
            raise InputError(
                "r_mm", self.r_mm,
                f"<= min((b_mm - tw_mm) / 2, (h_mm - 2 tf_mm) / 2) = {r_max:g} (fillets must fit)")
        if self.fabrication == "welded" and r > 0.0:
            raise InputError("r_mm", self.r_mm, "0 for a welded section (no root radius)")
        for name, value in (("h_mm", h), ("b_mm", b), ("tw_mm", tw), ("tf_mm", tf),
                            ("r_mm", r), ("weld_throat_mm", throat)):
            object.__setattr__(self, name, value)
        for name in ("tabulated_area_cm2", "mass_kg_m", "tabulated_perimeter_m2_m"):
            object.__setattr__(self, name, _optional_positive(name, getattr(self, name)))

    @property
    def area_mm2(self) -> float:
        """Cross-section area [mm2]: A = 2 b tf + (h - 2 tf) tw + (4 - pi) r^2."""
        return (2.0 * self.b_mm * self.tf_mm + (self.h_mm - 2.0 * self.tf_mm) * self.tw_mm
                + _FILLET_AREA_FACTOR * self.r_mm ** 2)

    @property
    def perimeter_mm(self) -> float:
        """Steel contour [mm]: P = 4 b + 2 h - 2 tw + (2 pi - 8) r.

        Without fillets the contour is 2 b (outer flange faces) + 4 tf (flange tips)
        + 2 (b - tw) (inner flange faces) + 2 (h - 2 tf) (web faces) = 4 b + 2 h - 2 tw; each fillet
        replaces two straight legs of length r by a quarter arc pi r / 2.
        """
        return (4.0 * self.b_mm + 2.0 * self.h_mm - 2.0 * self.tw_mm
                + _FILLET_PERIMETER_FACTOR * self.r_mm)

    def _heated_perimeter_mm(self, exposure: str, encasement: str) -> float:
        if encasement == "profile":
            # 3-sided: the top face of the top flange (width b) lies against the slab.
            return self.perimeter_mm - (self.b_mm if exposure == "3-sided" else 0.0)
        # box: 2 (b + h) all round, 2 h + b with the top against the slab
        return 2.0 * self.h_mm + (2.0 if exposure == "4-sided" else 1.0) * self.b_mm


@dataclass(frozen=True)
class RectangularHollowSection(_SI):
    """Rectangular (or square) hollow section with rounded corners.

    Parameters
    ----------
    h_mm : float
        Overall depth h [mm] (the faces of width b are top and bottom).
    b_mm : float
        Overall width b [mm]; with 3-sided exposure the top face of width b lies against the slab.
    t_mm : float
        Wall thickness t [mm].
    outer_radius_mm, inner_radius_mm : float
        Corner radii r_o and r_i [mm]; :func:`rhs_section` sets them from the forming rule.
    name : str
        Label.

    Raises
    ------
    InputError
        A dimension that is not a finite positive number (radii may be 0), a wall too thick for the
        section, or radii that do not fit.
    """

    h_mm: float
    b_mm: float
    t_mm: float
    outer_radius_mm: float
    inner_radius_mm: float
    name: str = ""

    #: convex: no shadow effect, k_sh = 1 (EN 1993-1-2 4.2.5.1(2))
    convex = True

    def __post_init__(self) -> None:
        h = _number("h_mm", self.h_mm)
        b = _number("b_mm", self.b_mm)
        t = _number("t_mm", self.t_mm)
        ro = _number("outer_radius_mm", self.outer_radius_mm, positive=False)
        ri = _number("inner_radius_mm", self.inner_radius_mm, positive=False)
        _name(self.name)
        side = min(h, b)
        if 2.0 * t >= side:
            raise InputError("t_mm", self.t_mm, f"< min(h_mm, b_mm) / 2 = {side / 2:g} (no void left)")
        if ro > side / 2.0:
            raise InputError("outer_radius_mm", self.outer_radius_mm,
                             f"<= min(h_mm, b_mm) / 2 = {side / 2:g}")
        if ri > side / 2.0 - t:
            raise InputError("inner_radius_mm", self.inner_radius_mm,
                             f"<= min(h_mm, b_mm) / 2 - t_mm = {side / 2 - t:g}")
        for name, value in (("h_mm", h), ("b_mm", b), ("t_mm", t),
                            ("outer_radius_mm", ro), ("inner_radius_mm", ri)):
            object.__setattr__(self, name, value)

    @property
    def area_mm2(self) -> float:
        """Area [mm2]: [h b - (4 - pi) r_o^2] - [(h - 2t)(b - 2t) - (4 - pi) r_i^2]."""
        hi, bi = self.h_mm - 2.0 * self.t_mm, self.b_mm - 2.0 * self.t_mm
        outer = self.h_mm * self.b_mm - _FILLET_AREA_FACTOR * self.outer_radius_mm ** 2
        inner = hi * bi - _FILLET_AREA_FACTOR * self.inner_radius_mm ** 2
        return outer - inner

    @property
    def perimeter_mm(self) -> float:
        """Outer contour [mm]: 2 (h + b) + (2 pi - 8) r_o."""
        return 2.0 * (self.h_mm + self.b_mm) + _FILLET_PERIMETER_FACTOR * self.outer_radius_mm

    def _heated_perimeter_mm(self, exposure: str, encasement: str) -> float:
        if encasement == "profile":
            # 3-sided: only the flat part (b - 2 r_o) of the top face touches the slab; the corner
            # arcs stay heated (the larger, conservative section factor).
            if exposure == "3-sided":
                return self.perimeter_mm - (self.b_mm - 2.0 * self.outer_radius_mm)
            return self.perimeter_mm
        return 2.0 * self.h_mm + (2.0 if exposure == "4-sided" else 1.0) * self.b_mm


@dataclass(frozen=True)
class CircularHollowSection(_SI):
    """Circular hollow section.

    Parameters
    ----------
    d_mm : float
        Outside diameter d [mm].
    t_mm : float
        Wall thickness t [mm], t < d / 2.
    name : str
        Label.
    """

    d_mm: float
    t_mm: float
    name: str = ""

    #: convex: no shadow effect, k_sh = 1 (EN 1993-1-2 4.2.5.1(2))
    convex = True

    def __post_init__(self) -> None:
        d = _number("d_mm", self.d_mm)
        t = _number("t_mm", self.t_mm)
        _name(self.name)
        if 2.0 * t >= d:
            raise InputError("t_mm", self.t_mm, f"< d_mm / 2 = {d / 2:g} (no void left)")
        object.__setattr__(self, "d_mm", d)
        object.__setattr__(self, "t_mm", t)

    @property
    def area_mm2(self) -> float:
        """Area [mm2]: pi t (d - t)."""
        return math.pi * self.t_mm * (self.d_mm - self.t_mm)

    @property
    def perimeter_mm(self) -> float:
        """Outer contour [mm]: pi d."""
        return math.pi * self.d_mm

    def _heated_perimeter_mm(self, exposure: str, encasement: str) -> float:
        if encasement == "profile":
            if exposure == "3-sided":
                raise InputError(
                    "exposure", exposure,
                    "'4-sided' for a circular hollow section with encasement='profile' "
                    "(a tube does not lie face-on against a slab)")
            return self.perimeter_mm
        # square box of side d around the tube: 4 d, or 3 d with the top against the slab
        return (4.0 if exposure == "4-sided" else 3.0) * self.d_mm


Section = Union[ISection, RectangularHollowSection, CircularHollowSection]

# --------------------------------------------------------------------------------------------
# constructors
# --------------------------------------------------------------------------------------------


def rolled_i_section(h_mm, b_mm, tw_mm, tf_mm, r_mm, *, name: str = "") -> ISection:
    """Rolled I or H section from its dimensions [mm], root radius included."""
    return ISection(h_mm, b_mm, tw_mm, tf_mm, r_mm, name=name, fabrication="rolled")


def welded_i_section(h_mm, b_mm, tw_mm, tf_mm, *, weld_throat_mm=0.0, name: str = "") -> ISection:
    """Welded I section from plates [mm]: no root radius; the weld throat is recorded, not modelled."""
    return ISection(h_mm, b_mm, tw_mm, tf_mm, 0.0, name=name, fabrication="welded",
                    weld_throat_mm=weld_throat_mm)


_RHS_FORMING = ("hot-finished", "cold-formed")


def rhs_corner_radii_mm(t_mm, forming: str = "hot-finished") -> tuple[float, float]:
    """Outer and inner corner radii (r_o, r_i) [mm] of an RHS for section-property calculations.

    Rule (from memory of the product standards; check before design use):

    * ``"hot-finished"`` (EN 10210-2): r_o = 1.5 t, r_i = 1.0 t;
    * ``"cold-formed"`` (EN 10219-2): r_o = 2.0 t, r_i = 1.0 t for t <= 6 mm;
      r_o = 2.5 t, r_i = 1.5 t for 6 < t <= 10 mm; r_o = 3.0 t, r_i = 2.0 t for t > 10 mm.
    """
    t = _number("t_mm", t_mm)
    _choice("forming", forming, _RHS_FORMING)
    if forming == "hot-finished":
        return 1.5 * t, 1.0 * t
    if t <= 6.0:
        return 2.0 * t, 1.0 * t
    if t <= 10.0:
        return 2.5 * t, 1.5 * t
    return 3.0 * t, 2.0 * t


def rhs_section(h_mm, b_mm, t_mm, *, forming: str = "hot-finished", outer_radius_mm=None,
                inner_radius_mm=None, name: str = "") -> RectangularHollowSection:
    """Rectangular hollow section [mm] with corner radii from ``forming`` unless given.

    The default corner radii follow :func:`rhs_corner_radii_mm`; ``outer_radius_mm`` and
    ``inner_radius_mm`` override them one by one (0 gives sharp corners).
    """
    ro, ri = rhs_corner_radii_mm(t_mm, forming)
    return RectangularHollowSection(
        h_mm, b_mm, t_mm,
        ro if outer_radius_mm is None else outer_radius_mm,
        ri if inner_radius_mm is None else inner_radius_mm,
        name=name)


def chs_section(d_mm, t_mm, *, name: str = "") -> CircularHollowSection:
    """Circular hollow section from outside diameter and wall thickness [mm]."""
    return CircularHollowSection(d_mm, t_mm, name=name)


# --------------------------------------------------------------------------------------------
# section factors
# --------------------------------------------------------------------------------------------


def _check_section(section) -> None:
    if not isinstance(section, (ISection, RectangularHollowSection, CircularHollowSection)):
        raise InputError("section", section,
                         "an ISection, RectangularHollowSection or CircularHollowSection "
                         "(see catalogue_section, welded_i_section, rhs_section, chs_section)")


def heated_perimeter_m(section: Section, exposure: str = "4-sided",
                       encasement: str = "profile") -> float:
    """Heated perimeter per unit length [m = m2/m] (Am of Table 4.2, Ap of Table 4.3, EN 1993-1-2).

    ========================  ===========================  =====================================
    section                   ``profile``                  ``box``
    ========================  ===========================  =====================================
    I, 4-sided                P = 4b + 2h - 2tw + (2pi-8)r 2 (b + h)
    I, 3-sided (top on slab)  P - b                        2 h + b
    RHS, 4-sided              2 (b + h) + (2pi-8) r_o      2 (b + h)
    RHS, 3-sided (b on slab)  P - (b - 2 r_o)              2 h + b
    CHS, 4-sided              pi d                         4 d
    CHS, 3-sided              not defined (InputError)     3 d
    ========================  ===========================  =====================================

    Parameters
    ----------
    section : ISection, RectangularHollowSection or CircularHollowSection
    exposure : {"4-sided", "3-sided"}
        Fire all round, or on three sides with the top face against a slab.
    encasement : {"profile", "box"}
        Heated boundary along the steel contour (bare steel, or contour protection), or along the
        enclosing box (the box value [Am/V]b, or box/hollow protection; Table 4.3 asks for
        clearances of at most h/4 for the box rows).
    """
    _check_section(section)
    exposure = _choice("exposure", exposure, EXPOSURES)
    encasement = _choice("encasement", encasement, ENCASEMENTS)
    return section._heated_perimeter_mm(exposure, encasement) * 1e-3


def section_factor_per_m(section: Section, exposure: str = "4-sided",
                         encasement: str = "profile") -> float:
    """Section factor [1/m]: heated perimeter / cross-section area.

    EN 1993-1-2 Table 4.2 (Am/V of unprotected members) and Table 4.3 (Ap/V of protected
    members). The exact geometric ratio is returned; Table 4.2's shortcut Am/V ~ 1/t for thin
    hollow sections is not used. Rows of Table 4.2 for single-flange, angle and flat-bar exposure
    are not covered. EN 1993-1-2 4.2.5.1 bounds Am/V of bare steel below by 10 1/m; that bound is
    the heat-transfer model's, not checked here. See :func:`heated_perimeter_m` for the perimeter of
    each case and the meaning of ``exposure`` and ``encasement``.

    Returns
    -------
    float
        Section factor [1/m].
    """
    return heated_perimeter_m(section, exposure, encasement) / section.area_m2


def box_section_factor_per_m(section: Section, exposure: str = "4-sided") -> float:
    """Box value [Am/V]b [1/m] of EN 1993-1-2 4.2.5.1(2) and Table 4.2: box perimeter / area."""
    return section_factor_per_m(section, exposure, "box")


def shadow_ratio(section: Section, exposure: str) -> float:
    """[Am/V]b / [Am/V] [-]: the box value over the contour value of the section factor, for the same
    ``exposure`` (EN 1993-1-2 4.2.5.1(2)); 1 for convex sections (hollow sections)."""
    _check_section(section)
    exposure = _choice("exposure", exposure, EXPOSURES)
    if section.convex:
        return 1.0
    return section._heated_perimeter_mm(exposure, "box") / section._heated_perimeter_mm(exposure, "profile")


def shadow_factor(section: Section, exposure: str, nominal_fire: bool, code=None) -> float:
    """Correction factor for the shadow effect k_sh [-] of an unprotected member.

    EN 1993-1-2 4.2.5.1(2):

    * I sections under nominal fire actions, eq (4.26a): k_sh = 0.9 [Am/V]b / [Am/V] (the 0.9 is the
      code value ``shadow_factor_i_nominal``);
    * other cases, eq (4.26b): k_sh = [Am/V]b / [Am/V];
    * convex sections (rectangular and circular hollow sections) fully embedded in the fire:
      k_sh = 1.

    [Am/V]b is the box value and [Am/V] the contour value for the same ``exposure``
    (:func:`shadow_ratio`). Taking k_sh = 1 (ignoring the shadow effect) is conservative.

    Parameters
    ----------
    section : ISection, RectangularHollowSection or CircularHollowSection
    exposure : {"4-sided", "3-sided"}
    nominal_fire : bool
        True for a nominal fire (standard, hydrocarbon, external curve), False for a natural fire
        (parametric or tabulated).
    code : mapping, optional
        Code values (``shadow_factor_i_nominal``); the EN recommended ones by default.

    Returns
    -------
    float
        k_sh, with 0 < k_sh <= 1.
    """
    ratio = shadow_ratio(section, exposure)
    if not isinstance(nominal_fire, bool):
        raise InputError("nominal_fire", nominal_fire, "True or False")
    if section.convex or not nominal_fire:
        return ratio
    from steelfire.codevalues import DEFAULTS

    return (code if code is not None else DEFAULTS)["shadow_factor_i_nominal"] * ratio


# --------------------------------------------------------------------------------------------
# section properties (resistance, classification)
# --------------------------------------------------------------------------------------------

# The region between two straight legs of length r meeting at a right angle and the quarter arc of
# radius r that joins their ends (a root fillet of an I section, or the corner lost to a rounded
# corner of an RHS): square r x r minus a quarter disc. Exact values, by integration:
#   area                          (1 - pi/4) r^2                          = 0.2146 r^2
#   centroid from each leg        (10 - 3 pi) / (12 - 3 pi) r             = 0.2234 r
#   second moment about a leg     (1 - 5 pi/16) r^4                       = 0.01825 r^4
#   own second moment (centroid)  (1 - 5 pi/16) r^4 - area * centroid^2   = 0.007545 r^4
# The usual handbook formulas for rolled I sections carry the same numbers (0.2146 r^2, 0.4468 r =
# 2 * 0.2234 r, 0.03 r^4 ~ 4 * 0.007545 r^4).
_SPANDREL_AREA = 1.0 - math.pi / 4.0
_SPANDREL_CENTROID = (10.0 - 3.0 * math.pi) / (12.0 - 3.0 * math.pi)
_SPANDREL_OWN_I = (1.0 - 5.0 * math.pi / 16.0) - _SPANDREL_AREA * _SPANDREL_CENTROID ** 2


def _spandrels(r: float, lever: float) -> tuple[float, float, float]:
    """Four spandrels of radius r whose centroids lie at ``lever`` from an axis.

    Returns (area, second moment about the axis, first moment of area about it taken positive on
    both sides, i.e. the four spandrels' share of a plastic modulus).
    """
    a = _SPANDREL_AREA * r * r
    return 4.0 * a, 4.0 * (_SPANDREL_OWN_I * r ** 4 + a * lever ** 2), 4.0 * a * lever


@dataclass(frozen=True)
class PlatePart:
    """One compression part of a cross-section for EN 1993-1-1 Table 5.2.

    Parameters
    ----------
    name : str
        ``"flange"``, ``"web"`` or ``"wall"`` (CHS).
    support : str
        ``"outstand"`` (supported on one edge: flange of an I section), ``"internal"`` (supported on
        both edges: web of an I section, walls of an RHS) or ``"tube"`` (CHS; c is then the
        diameter d).
    c_mm : float
        Width c [mm] of the flat part as Table 5.2 defines it (d for a CHS).
    t_mm : float
        Its thickness [mm].
    count : int
        How many such parts the section has (2 webs of an RHS, 4 flange outstands of an I section).
    """

    name: str
    support: str
    c_mm: float
    t_mm: float
    count: int = 1

    @property
    def slenderness(self) -> float:
        """c / t [-]."""
        return self.c_mm / self.t_mm


@dataclass(frozen=True)
class SectionProperties:
    """Geometric properties of a cross-section about its principal axes, millimetre units.

    The y-y axis is parallel to the flanges of an I section and to the faces of width b of an RHS
    (bending about y-y stresses the depth h); z-z is the other principal axis. Root fillets and
    rounded corners are included in every property.

    Attributes
    ----------
    shape : str
        ``"I"``, ``"RHS"`` or ``"CHS"``.
    area_mm2 : float
        A [mm2].
    I_y_mm4, I_z_mm4 : float
        Second moments of area [mm4].
    i_y_mm, i_z_mm : float
        Radii of gyration sqrt(I / A) [mm].
    W_el_y_mm3, W_el_z_mm3 : float
        Elastic section moduli I / (extreme fibre distance) [mm3].
    W_pl_y_mm3, W_pl_z_mm3 : float
        Plastic section moduli (twice the first moment of the half section) [mm3].
    I_t_mm4 : float
        St Venant torsion constant [mm4].
    I_w_mm6 : float
        Warping constant [mm6]; 0 for hollow sections (their warping stiffness is negligible).
    governing_thickness_mm : float
        Thickest plate [mm], which selects the steel grade's thickness band.
    parts : tuple of PlatePart
        The parts that Table 5.2 classifies: (flange, web) of an I section or an RHS, (wall,) of a
        CHS.
    """

    shape: str
    area_mm2: float
    I_y_mm4: float
    I_z_mm4: float
    i_y_mm: float
    i_z_mm: float
    W_el_y_mm3: float
    W_el_z_mm3: float
    W_pl_y_mm3: float
    W_pl_z_mm3: float
    I_t_mm4: float
    I_w_mm6: float
    governing_thickness_mm: float
    parts: tuple

    def part(self, name: str) -> PlatePart:
        """The part called ``name`` (``"flange"``, ``"web"``, ``"wall"``)."""
        for p in self.parts:
            if p.name == name:
                return p
        raise KeyError(name)


def _i_section_properties(s: ISection) -> SectionProperties:
    h, b, tw, tf, r = s.h_mm, s.b_mm, s.tw_mm, s.tf_mm, s.r_mm
    hw = h - 2.0 * tf                     # web depth between the flanges
    e = _SPANDREL_CENTROID * r            # fillet centroid from the web face and the flange face
    # fillets: centroids at h/2 - tf - e from y-y, at tw/2 + e from z-z
    a_f, i_fy, s_fy = _spandrels(r, hw / 2.0 - e)
    _, i_fz, s_fz = _spandrels(r, tw / 2.0 + e)
    area = 2.0 * b * tf + hw * tw + a_f
    i_y = (b * h ** 3 - (b - tw) * hw ** 3) / 12.0 + i_fy
    i_z = (2.0 * tf * b ** 3 + hw * tw ** 3) / 12.0 + i_fz
    w_pl_y = b * tf * (h - tf) + tw * hw ** 2 / 4.0 + s_fy
    w_pl_z = tf * b ** 2 / 2.0 + hw * tw ** 2 / 4.0 + s_fz
    # St Venant torsion of a rolled I section: the flanges and the web as thin rectangles (the
    # flanges with the 0.63 tf end correction) plus the two web-flange junctions with their fillets
    # (the usual handbook formula):
    #   I_t = 2/3 (b - 0.63 tf) tf^3 + 1/3 (h - 2 tf) tw^3 + 2 alpha1 D1^4,
    #   alpha1 = (tw / tf)(0.145 + 0.1 r / tf),
    #   D1 = ((tf + r)^2 + (r + tw/2)^2 - r^2) / (2 r + tf)   (diameter of the largest inscribed circle).
    # A welded section (r = 0) keeps the junction term with r = 0.
    alpha1 = (tw / tf) * (0.145 + 0.1 * r / tf)
    d1 = ((tf + r) ** 2 + (r + tw / 2.0) ** 2 - r ** 2) / (2.0 * r + tf)
    i_t = 2.0 / 3.0 * (b - 0.63 * tf) * tf ** 3 + hw * tw ** 3 / 3.0 + 2.0 * alpha1 * d1 ** 4
    # warping of a doubly symmetric I section: the flanges' I_z times (distance between flange
    # centres)^2 / 2 each, I_w = tf b^3 (h - tf)^2 / 24 (the web and the fillets neglected).
    i_w = tf * b ** 3 * (h - tf) ** 2 / 24.0
    # Table 5.2 widths: rolled, c of the web between the fillets and of the flange outstand from the
    # fillet toe; welded, from the weld toe (leg length sqrt(2) a of an equal-leg fillet weld).
    leg = r if s.fabrication == "rolled" else math.sqrt(2.0) * s.weld_throat_mm
    flange = PlatePart("flange", "outstand", (b - tw - 2.0 * leg) / 2.0, tf, count=4)
    web = PlatePart("web", "internal", hw - 2.0 * leg, tw, count=1)
    return SectionProperties(
        "I", area, i_y, i_z, math.sqrt(i_y / area), math.sqrt(i_z / area),
        2.0 * i_y / h, 2.0 * i_z / b, w_pl_y, w_pl_z, i_t, i_w, max(tf, tw), (flange, web))


def _rhs_properties(s: RectangularHollowSection) -> SectionProperties:
    h, b, t, ro, ri = s.h_mm, s.b_mm, s.t_mm, s.outer_radius_mm, s.inner_radius_mm
    hi, bi = h - 2.0 * t, b - 2.0 * t
    eo, ei = _SPANDREL_CENTROID * ro, _SPANDREL_CENTROID * ri

    def solid(depth, width, r, e):
        """A, I and W_pl of a rectangle depth x width with four rounded corners, about the axis
        parallel to ``width``."""
        a_c, i_c, s_c = _spandrels(r, depth / 2.0 - e)
        return (depth * width - a_c, width * depth ** 3 / 12.0 - i_c,
                width * depth ** 2 / 4.0 - s_c)

    a_o, iy_o, wy_o = solid(h, b, ro, eo)
    a_i, iy_i, wy_i = solid(hi, bi, ri, ei)
    _, iz_o, wz_o = solid(b, h, ro, eo)
    _, iz_i, wz_i = solid(bi, hi, ri, ei)
    area = a_o - a_i
    i_y, i_z = iy_o - iy_i, iz_o - iz_i
    # St Venant torsion of a closed thin-walled section with rounded corners (the usual handbook
    # formula for hollow sections): R_c = (r_o + r_i)/2 the mean corner radius,
    #   h_p = 2 ((b - t) + (h - t)) - 2 R_c (4 - pi)   mid-line perimeter,
    #   A_h = (b - t)(h - t) - R_c^2 (4 - pi)           area inside the mid-line,
    #   K = 2 A_h t / h_p,   I_t = t^3 h_p / 3 + 2 K A_h.
    rc = (ro + ri) / 2.0
    h_p = 2.0 * ((b - t) + (h - t)) - 2.0 * rc * (4.0 - math.pi)
    a_h = (b - t) * (h - t) - rc ** 2 * (4.0 - math.pi)
    k = 2.0 * a_h * t / h_p
    i_t = t ** 3 * h_p / 3.0 + 2.0 * k * a_h
    # Table 5.2 widths: the flat part, c = h - 3 t as Table 5.2 allows for RHS (it is the flat width
    # when r_o = 1.5 t), or the flat width h - 2 r_o when the corners are sharper than that.
    cut = 2.0 * min(ro, 1.5 * t)
    flange = PlatePart("flange", "internal", b - cut, t, count=2)   # faces of width b
    web = PlatePart("web", "internal", h - cut, t, count=2)         # faces of depth h
    return SectionProperties(
        "RHS", area, i_y, i_z, math.sqrt(i_y / area), math.sqrt(i_z / area),
        2.0 * i_y / h, 2.0 * i_z / b, wy_o - wy_i, wz_o - wz_i, i_t, 0.0, t, (flange, web))


def _chs_properties(s: CircularHollowSection) -> SectionProperties:
    d, t = s.d_mm, s.t_mm
    di = d - 2.0 * t
    area = s.area_mm2
    i = math.pi / 64.0 * (d ** 4 - di ** 4)
    w_el = 2.0 * i / d
    w_pl = (d ** 3 - di ** 3) / 6.0
    i_t = 2.0 * i        # polar second moment of a circular tube
    wall = PlatePart("wall", "tube", d, t, count=1)
    return SectionProperties("CHS", area, i, i, math.sqrt(i / area), math.sqrt(i / area),
                             w_el, w_el, w_pl, w_pl, i_t, 0.0, t, (wall,))


@lru_cache(maxsize=4096)
def _properties_cached(section: Section) -> SectionProperties:
    if isinstance(section, ISection):
        return _i_section_properties(section)
    if isinstance(section, RectangularHollowSection):
        return _rhs_properties(section)
    return _chs_properties(section)


def section_properties(section: Section) -> SectionProperties:
    """Area, second moments, radii of gyration, elastic and plastic moduli, torsion and warping
    constants, and the Table 5.2 part widths of a section [mm units].

    Formulas (dimensions as in the shape classes; fillets and corners by the exact spandrel
    integrals, which the handbook coefficients 0.2146, 0.2234, 0.03 round):

    * I section: A = 2 b tf + (h - 2tf) tw + (4 - pi) r^2;
      I_y = [b h^3 - (b - tw)(h - 2tf)^3] / 12 + 0.03 r^4 + 0.2146 r^2 (h - 2tf - 0.4468 r)^2;
      I_z = [2 tf b^3 + (h - 2tf) tw^3] / 12 + 0.03 r^4 + 0.2146 r^2 (tw + 0.4468 r)^2;
      W_pl,y = b tf (h - tf) + tw (h - 2tf)^2 / 4 + (4 - pi)/2 r^2 (h - 2tf) + (3 pi - 10)/3 r^3;
      W_pl,z = tf b^2 / 2 + (h - 2tf) tw^2 / 4 + (4 - pi)/2 r^2 tw + (10 - 3 pi)/3 r^3;
      I_t = 2/3 (b - 0.63 tf) tf^3 + 1/3 (h - 2tf) tw^3 + 2 (tw/tf)(0.145 + 0.1 r/tf) D1^4 with
      D1 = ((tf + r)^2 + (r + tw/2)^2 - r^2) / (2r + tf); I_w = tf b^3 (h - tf)^2 / 24.
    * RHS: outer rectangle with corners r_o minus the inner one with corners r_i;
      I_t = t^3 h_p / 3 + 2 K A_h (closed thin-walled section, mean corner radius); I_w = 0.
    * CHS: A = pi t (d - t), I = pi (d^4 - d_i^4) / 64, W_pl = (d^3 - d_i^3) / 6, I_t = 2 I, I_w = 0.

    Table 5.2 widths c: I-section web h - 2tf - 2r and flange outstand (b - tw - 2r) / 2 (welded: the
    weld leg sqrt(2) a instead of r); RHS walls h - 3t and b - 3t (the flat width h - 2 r_o when
    r_o < 1.5 t); CHS d.

    Parameters
    ----------
    section : ISection, RectangularHollowSection or CircularHollowSection

    Returns
    -------
    SectionProperties

    Examples
    --------
    IPE 300 (handbook: A = 53.81 cm2, I_y = 8356 cm4, W_pl,y = 628.4 cm3, I_t = 20.12 cm4):

    >>> p = section_properties(catalogue_section("IPE 300"))
    >>> round(p.area_mm2 / 1e2, 2), round(p.I_y_mm4 / 1e4), round(p.W_pl_y_mm3 / 1e3, 1)
    (53.81, 8356, 628.4)
    >>> round(p.I_t_mm4 / 1e4, 2)
    20.12
    """
    _check_section(section)
    return _properties_cached(section)


# --------------------------------------------------------------------------------------------
# catalogue
# --------------------------------------------------------------------------------------------

_CATALOGUE_COLUMNS = ("name", "h_mm", "b_mm", "tw_mm", "tf_mm", "r_mm", "area_cm2", "mass_kg_m",
                      "perimeter_m2_m")


def _catalogue_key(name: str) -> str:
    """Compact, case-free key: 'IPE 300', 'ipe300', 'IPE-300' -> 'IPE300'; 'HE 300 A' -> 'HEA300'."""
    key = re.sub(r"[\s\-_]+", "", name.upper())
    m = re.fullmatch(r"HE(\d+)([AB])", key)
    if m:
        key = f"HE{m.group(2)}{m.group(1)}"
    return key


def _parse_catalogue(text: str, source: str) -> dict[str, ISection]:
    lines = [line for line in text.splitlines() if line.strip() and not line.lstrip().startswith("#")]
    reader = csv.DictReader(io.StringIO("\n".join(lines)))
    missing = [c for c in _CATALOGUE_COLUMNS[:-1] if c not in (reader.fieldnames or ())]
    if missing:
        raise InputError(source, reader.fieldnames, "columns " + ", ".join(_CATALOGUE_COLUMNS))
    rows: dict[str, ISection] = {}
    for i, row in enumerate(reader, start=1):
        where = f"{source} row {i} ({row.get('name')!r})"

        def num(col, optional=False):
            raw = (row.get(col) or "").strip()
            if optional and raw == "":
                return None
            try:
                return float(raw)
            except ValueError:
                raise InputError(f"{where}.{col}", raw, "a number") from None

        name = (row.get("name") or "").strip()
        if not name:
            raise InputError(f"{where}.name", name, "a section name")
        try:
            section = ISection(
                num("h_mm"), num("b_mm"), num("tw_mm"), num("tf_mm"), num("r_mm"),
                name=name, fabrication="rolled",
                tabulated_area_cm2=num("area_cm2"), mass_kg_m=num("mass_kg_m"),
                tabulated_perimeter_m2_m=num("perimeter_m2_m", optional=True))
        except InputError as exc:
            if exc.field.startswith(where):
                raise
            raise InputError(f"{where}.{exc.field}", exc.value, exc.allowed) from None
        key = _catalogue_key(name)
        if key in rows:
            raise InputError(f"{where}.name", name, "a name not already in the catalogue")
        rows[key] = section
    return rows


@lru_cache(maxsize=1)
def _catalogue() -> dict[str, ISection]:
    text = (resources.files("steelfire") / "data" / CATALOGUE_FILE).read_text(encoding="utf-8")
    return _parse_catalogue(text, CATALOGUE_FILE)


def _families(table: dict[str, ISection]) -> dict[str, tuple[str, str]]:
    """First and last size of each family in file order: {'IPE': ('80', '600'), ...}."""
    out: dict[str, list[str]] = {}
    for s in table.values():
        fam, _, size = s.name.partition(" ")
        out.setdefault(fam, []).append(size)
    return {fam: (sizes[0], sizes[-1]) for fam, sizes in out.items()}


def catalogue_names() -> tuple[str, ...]:
    """Names of the catalogue sections, in file order (``"IPE 80"``, ..., ``"HEB 1000"``)."""
    return tuple(s.name for s in _catalogue().values())


def catalogue_section(name: str) -> ISection:
    """Standard rolled section (IPE, HEA, HEB) by name, as a frozen :class:`ISection`.

    Dimensions after EN 10365, entered from memory: check against the standard before design use.
    Names are matched without regard to case, spaces or hyphens: ``"IPE 300"``, ``"IPE300"``,
    ``"ipe 300"``, ``"HE 300 B"`` and ``"HE300B"`` all work.

    Raises
    ------
    InputError
        Unknown name (field ``section``), with a few close matches.
    """
    if not isinstance(name, str):
        raise InputError("section", name, "a catalogue section name such as 'IPE 300'")
    table = _catalogue()
    key = _catalogue_key(name)
    if key in table:
        return table[key]
    close = difflib.get_close_matches(key, list(table), n=4, cutoff=0.6)
    if close:
        hint = "close matches: " + ", ".join(table[k].name for k in close)
    else:
        hint = "catalogue families " + ", ".join(
            f"{fam} {lo}..{hi}" for fam, (lo, hi) in _families(table).items())
    raise InputError("section", name, f"a catalogue section name; {hint}")
