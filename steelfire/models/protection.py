"""Fire protection materials: thermal properties, supplied thicknesses, assessed range.

The thermal model is that of EN 1993-1-2 4.2.5.2 eq (4.27): density rho_p [kg/m3], specific heat
c_p [J/(kg K)], thermal conductivity lambda_p [W/(m K)] either constant or an effective value
tabulated by steel temperature (as product assessments by EN 13381-4/-8 give it), and free water
p [% of dry weight] whose evaporation holds the steel at 100 C for t_v = p rho_p d_p^2 / (5 lambda_p)
minutes (the ECCS method; :func:`moisture_delay_s`).

A material also says in which thicknesses it is supplied (a list, or a minimum, a maximum and a
step) and the range it was assessed for (thickness, section factor, steel temperature, and whether
for the standard fire only, as thin coatings usually are); :func:`assessment_warnings` names every
use outside that range.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from pathlib import Path

import numpy as np

#: Used where a material gives no supply information [mm]: 0.5 to 100 mm in 0.5 mm steps
#: (common practice, no source).
DEFAULT_MIN_THICKNESS_MM = 0.5
DEFAULT_MAX_THICKNESS_MM = 100.0
DEFAULT_THICKNESS_STEP_MM = 0.5

ASSESSED_FIRES = ("any", "standard")
#: Whether a material's moisture delay may be credited: only where its assessment (tests to EN 13381-4)
#: supports it, EN 1993-1-2 4.2.5.2(2).
MOISTURE_BASES = ("none", "tests")

GENERIC_FILE = Path(__file__).parents[1] / "data" / "materials_generic.toml"


@dataclass(frozen=True)
class Material:
    """A protection material (see the module docstring for the meaning and units of each field)."""

    name: str
    density: float
    conductivity: float | tuple
    specific_heat: float
    moisture_percent: float = 0.0
    moisture_delay_basis: str = "none"   # "tests": the delay of free water is credited (EN 1993-1-2 4.2.5.2(2))
    thicknesses_mm: tuple | None = None
    min_thickness_mm: float | None = None
    max_thickness_mm: float | None = None
    thickness_step_mm: float | None = None
    assessed_thickness_mm: tuple | None = None
    assessed_section_factor_per_m: tuple | None = None
    assessed_max_steel_temperature_C: float | None = None
    assessed_fire: str = "any"
    description: str = ""

    @property
    def conductivity_table(self) -> tuple:
        """((steel temperature [C], lambda_p [W/(m K)]), ...); one pair for a constant value."""
        if isinstance(self.conductivity, tuple):
            return self.conductivity
        return ((20.0, float(self.conductivity)),)

    @property
    def credited_moisture_percent(self) -> float:
        """The free water whose delay is credited: the moisture content where the delay comes from tests, else 0."""
        return self.moisture_percent if self.moisture_delay_basis == "tests" else 0.0

    @property
    def conductivity_at_20C(self) -> float:
        """lambda_p at ambient, used by the moisture delay (first point of a table, held)."""
        return self.conductivity_table[0][1]

    def thickness_range_mm(self) -> tuple:
        """(least, largest) thickness the material is supplied in [mm]."""
        s = self.supplied_thicknesses_mm()
        return float(s[0]), float(s[-1])

    def supplied_thicknesses_mm(self) -> np.ndarray:
        """Ascending thicknesses [mm] the material can be supplied in."""
        if self.thicknesses_mm:
            return np.array(sorted(self.thicknesses_mm), dtype=float)
        lo = self.min_thickness_mm if self.min_thickness_mm is not None else DEFAULT_MIN_THICKNESS_MM
        hi = self.max_thickness_mm if self.max_thickness_mm is not None else DEFAULT_MAX_THICKNESS_MM
        step = self.thickness_step_mm if self.thickness_step_mm is not None else DEFAULT_THICKNESS_STEP_MM
        n = int(math.floor((hi - lo) / step + 1e-9))
        return np.round(lo + step * np.arange(n + 1), 6)


def moisture_delay_s(moisture_percent, density, thickness_m, conductivity):
    """Delay t_v [s] during which free water in the protection holds the steel at 100 C.

    t_v = p rho_p d_p^2 / (5 lambda_p) [min], p the moisture content [% of dry weight], rho_p [kg/m3],
    d_p [m], lambda_p [W/(m K)] at 20 C: the ECCS method (ECCS TC3, Calculation of the fire resistance
    of load bearing elements and structures, 1985), from memory. EN 1993-1-2 4.2.5.2(2) asks for the
    delay from tests to EN 13381-4. Works on arrays; 0 where there is no moisture.

    >>> round(moisture_delay_s(20.0, 800.0, 0.02, 0.2) / 60.0, 2)
    6.4
    """
    p = np.asarray(moisture_percent, dtype=float)
    with np.errstate(divide="ignore", invalid="ignore"):
        t = np.where(p > 0.0, 60.0 * p * np.asarray(density) * np.asarray(thickness_m) ** 2
                     / (5.0 * np.asarray(conductivity)), 0.0)
    return t if t.ndim else float(t)


def assessment_warnings(material: Material, member: str, thickness_mm: float | None, section_factor_per_m: float,
                        peak_steel_C: float | None, fire_has_cooling: bool) -> list:
    """Warnings for a member that uses ``material`` outside its assessed range."""
    out = []
    m = material
    where = f"{member}: protection {m.name}"
    if m.assessed_thickness_mm and thickness_mm is not None:
        lo, hi = m.assessed_thickness_mm
        if not (lo - 1e-9 <= thickness_mm <= hi + 1e-9):
            out.append(f"{where} at {thickness_mm:g} mm is outside its assessed thickness range {lo:g}-{hi:g} mm.")
    if m.assessed_section_factor_per_m:
        lo, hi = m.assessed_section_factor_per_m
        if not (lo <= section_factor_per_m <= hi):
            out.append(f"{where} on a section factor of {section_factor_per_m:g} 1/m is outside its assessed range "
                       f"{lo:g}-{hi:g} 1/m.")
    if m.assessed_max_steel_temperature_C is not None and peak_steel_C is not None \
            and peak_steel_C > m.assessed_max_steel_temperature_C:
        out.append(f"{where}: steel reaches {peak_steel_C:.0f} C, above the {m.assessed_max_steel_temperature_C:g} C "
                   "its assessment covers.")
    if m.assessed_fire == "standard" and fire_has_cooling:
        out.append(f"{where} is assessed for the standard fire only; its behaviour in a fire with a cooling phase "
                   "(the design fire here) is not covered by that assessment.")
    return out
