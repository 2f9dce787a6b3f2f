"""Structural steel grades: nominal yield and tensile strength by thickness, elastic constants.

Nominal values f_y (upper yield strength R_eH, minimum) and f_u (tensile strength R_m, lower end of
the range) by nominal thickness, as the product standards tabulate them:

* S235, S275, S355: EN 10025-2 (non-alloy structural steels), Table 7 rows;
* S420, S460: EN 10025-4 (thermomechanical rolled, grades M/ML), whose thickness bands reach
  120 mm; the normalised grades N/NL of EN 10025-3 differ from 63 mm up (S420N 370 / 360 against
  S420M 380 / 370 at 63-80 / 80-100 mm) and are not tabulated here: a grade named with an N or NL
  quality (S420N, S460NL, ...) is given the rows up to 63 mm, where the two standards agree, and is
  refused (OutOfScopeError) above, rather than given the higher M/ML strengths.

EVERY ROW WAS ENTERED FROM MEMORY, not copied from the standards: check the rows used against the
current editions (and the national annex to EN 1993-1-1 3.2.1, which may prescribe EN 1993-1-1
Table 3.1 instead) before design use.

The thickness that selects the band is the thickest plate of the section (the flange of a rolled I
section, the wall of a hollow section). E = 210000 MPa and G = 81000 MPa (EN 1993-1-1 3.2.6(1)).

Units: MPa (N/mm2), thickness in mm.
"""

from __future__ import annotations

import math
import numbers
from dataclasses import dataclass

from steelfire.codevalues import DEFAULTS
from steelfire.errors import InputError, OutOfScopeError

__all__ = [
    "ELASTIC_MODULUS_MPA",
    "SHEAR_MODULUS_MPA",
    "GRADES",
    "GRADE_SOURCES",
    "NORMALISED_LIMIT_MM",
    "SteelStrength",
    "grade_names",
    "steel_strength",
    "yield_strength_MPa",
]

#: Modulus of elasticity E [MPa], EN 1993-1-1 3.2.6(1).
ELASTIC_MODULUS_MPA = DEFAULTS["steel_elastic_modulus_MPa"]
#: Shear modulus G ~ E / (2 (1 + nu)) = 81000 MPa [MPa], EN 1993-1-1 3.2.6(1).
SHEAR_MODULUS_MPA = DEFAULTS["steel_shear_modulus_MPa"]

# Rows: (largest nominal thickness of the band [mm], f_y [MPa], f_u [MPa]); a thickness t falls in the
# first band with t <= its upper bound. f_u is the lower end of the tabulated range; EN 10025-2 gives
# one R_m for 3 <= t <= 100 mm and another for 100 < t <= 150 (f_u of sheet thinner than 3 mm is
# higher and not used here: taking the 3-100 mm value is conservative).
GRADES = {
    # EN 10025-2 Table 7 (from memory): R_eH for t <= 16, 16-40, 40-63, 63-80, 80-100, 100-150,
    # 150-200, 200-250 mm; R_m 360 / 410 / 470 (3-100 mm), 350 / 400 / 450 (100-150 mm),
    # 340 / 380 / 450 (150-250 mm).
    "S235": ((16.0, 235.0, 360.0), (40.0, 225.0, 360.0), (63.0, 215.0, 360.0), (80.0, 215.0, 360.0),
             (100.0, 215.0, 360.0), (150.0, 195.0, 350.0), (200.0, 185.0, 340.0),
             (250.0, 175.0, 340.0)),
    "S275": ((16.0, 275.0, 410.0), (40.0, 265.0, 410.0), (63.0, 255.0, 410.0), (80.0, 245.0, 410.0),
             (100.0, 235.0, 410.0), (150.0, 225.0, 400.0), (200.0, 215.0, 380.0),
             (250.0, 205.0, 380.0)),
    "S355": ((16.0, 355.0, 470.0), (40.0, 345.0, 470.0), (63.0, 335.0, 470.0), (80.0, 325.0, 470.0),
             (100.0, 315.0, 470.0), (150.0, 295.0, 450.0), (200.0, 285.0, 450.0),
             (250.0, 275.0, 450.0)),
    # EN 10025-4 (from memory): R_eH for t <= 16, 16-40, 40-63, 63-80, 80-100, 100-120 mm;
    # R_m 520 / 500 / 480 / 470 / 460 (S420M) and 540 / 530 / 510 / 500 / 490 (S460M) for t <= 40,
    # 40-63, 63-80, 80-100, 100-120 mm.
    "S420": ((16.0, 420.0, 520.0), (40.0, 400.0, 520.0), (63.0, 390.0, 500.0), (80.0, 380.0, 480.0),
             (100.0, 370.0, 470.0), (120.0, 365.0, 460.0)),
    "S460": ((16.0, 460.0, 540.0), (40.0, 440.0, 540.0), (63.0, 430.0, 530.0), (80.0, 410.0, 510.0),
             (100.0, 400.0, 500.0), (120.0, 385.0, 490.0)),
}

#: Grades whose normalised qualities N/NL (EN 10025-3) share the tabulated M/ML rows only up to this
#: thickness [mm] (from memory: S420N 370 / 360 MPa against S420M 380 / 370 at 63-80 / 80-100 mm).
NORMALISED_LIMIT_MM = {"S420": 63.0, "S460": 63.0}

#: Where each grade's rows come from (all entered from memory).
GRADE_SOURCES = {
    "S235": "EN 10025-2 Table 7 (from memory)",
    "S275": "EN 10025-2 Table 7 (from memory)",
    "S355": "EN 10025-2 Table 7 (from memory)",
    "S420": "EN 10025-4, grade S420M/ML (from memory)",
    "S460": "EN 10025-4, grade S460M/ML (from memory)",
}


@dataclass(frozen=True)
class SteelStrength:
    """Nominal strengths of one grade at one thickness.

    Attributes
    ----------
    grade : str
        ``"S355"``, ...
    thickness_mm : float
        The governing thickness the band was chosen by [mm].
    band_mm : tuple of float
        The thickness band (lower, upper] [mm].
    f_y_MPa, f_u_MPa : float
        Nominal yield and tensile strength [MPa].
    source : str
        Standard and table of the row.
    """

    grade: str
    thickness_mm: float
    band_mm: tuple
    f_y_MPa: float
    f_u_MPa: float
    source: str


def grade_names() -> tuple:
    """The grades known: ``("S235", "S275", "S355", "S420", "S460")``."""
    return tuple(GRADES)


def _grade_key(grade) -> str:
    return _grade_and_suffix(grade)[0]


def _grade_and_suffix(grade):
    """(grade name, quality suffix) of ``grade``, e.g. ("S420", "NL") for ``"s420nl"``."""
    if not isinstance(grade, str):
        raise InputError("steel_grade", grade, "one of " + ", ".join(GRADES))
    key = grade.strip().upper()
    # accept a quality suffix (S355J2, S355JR, S460M, S420NL): the strengths do not depend on it
    # here, except that S420/S460 N/NL (EN 10025-3) differ from M/ML above 63 mm (module docstring)
    for name in GRADES:
        suffix = key[len(name):]
        if key.startswith(name) and (suffix == "" or (suffix[0].isalpha() and suffix.isalnum())):
            return name, suffix
    raise InputError("steel_grade", grade, "one of " + ", ".join(GRADES)
                     + " (a quality suffix such as J2 or M may follow)")


def steel_strength(grade: str, thickness_mm: float) -> SteelStrength:
    """Nominal f_y and f_u [MPa] of ``grade`` for a plate of ``thickness_mm`` [mm].

    EN 10025-2 Table 7 (S235, S275, S355) and EN 10025-4 (S420, S460), from memory: f_y = R_eH of
    the band (lower, upper] containing the thickness, f_u = the minimum R_m of that band. Valid for
    0 < t <= 250 mm (S235-S355) and t <= 120 mm (S420, S460).

    Raises
    ------
    InputError
        Unknown grade (field ``steel_grade``) or a thickness that is not a positive number.
    OutOfScopeError
        A thickness above the thickest band of the grade; S420 or S460 of quality N/NL
        (EN 10025-3) thicker than 63 mm (not tabulated; the M/ML rows would overstate f_y).

    Examples
    --------
    >>> steel_strength("S355", 19.0).f_y_MPa        # HEB 300 flange, 16 < t <= 40 mm
    345.0
    >>> steel_strength("S275J2", 10.7).f_y_MPa      # IPE 300 flange
    275.0
    """
    name, suffix = _grade_and_suffix(grade)
    if isinstance(thickness_mm, bool) or not isinstance(thickness_mm, numbers.Real) \
            or not math.isfinite(thickness_mm) or thickness_mm <= 0.0:
        raise InputError("thickness_mm", thickness_mm, "a finite number > 0 [mm]")
    t = float(thickness_mm)
    if suffix.startswith("N") and name in NORMALISED_LIMIT_MM and t > NORMALISED_LIMIT_MM[name]:
        raise OutOfScopeError("thickness_mm", thickness_mm,
                              f"<= {NORMALISED_LIMIT_MM[name]:g} mm for {name}{suffix} (EN 10025-3 "
                              f"normalised rows not tabulated above; the {name}M rows would overstate f_y)")
    lower = 0.0
    for upper, fy, fu in GRADES[name]:
        if t <= upper:
            return SteelStrength(name, t, (lower, upper), fy, fu, GRADE_SOURCES[name])
        lower = upper
    raise OutOfScopeError("thickness_mm", thickness_mm,
                          f"<= {lower:g} mm for {name} ({GRADE_SOURCES[name]})")


def yield_strength_MPa(grade: str, thickness_mm: float) -> float:
    """Nominal yield strength f_y [MPa] of ``grade`` at ``thickness_mm``; see :func:`steel_strength`."""
    return steel_strength(grade, thickness_mm).f_y_MPa
