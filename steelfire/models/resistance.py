"""Member resistance in fire and the critical temperature from it, EN 1993-1-2 4.2.3.

A member at a uniform steel temperature theta keeps the 20 C formulas of EN 1993-1-1 with the
yield strength reduced by k_y,theta and, in the buckling checks, the slenderness raised by
sqrt(k_y,theta / k_E,theta) (EN 1993-1-2 Table 3.1 factors, :mod:`steelfire.models.steel`):

* tension, 4.2.3.1 eq (4.3): N_fi,theta,Rd = k_y,theta A f_y / gamma_M,fi;
* flexural buckling, 4.2.3.2 eq (4.5)-(4.7), each axis: N_b,fi,t,Rd = chi_fi A k_y,theta f_y / gamma_M,fi,
  chi_fi = 1 / (phi + sqrt(phi^2 - lambda_theta^2)), phi = (1 + alpha lambda_theta + lambda_theta^2) / 2,
  alpha = 0.65 sqrt(235 / f_y), lambda_theta = lambda sqrt(k_y,theta / k_E,theta),
  lambda = L_cr / (i lambda_1), lambda_1 = pi sqrt(E / f_y) (EN 1993-1-1 6.3.1.3);
* bending, 4.2.3.3 eq (4.8)/(4.10) (class 1, 2: W_pl,y) and 4.2.3.4 eq (4.14)/(4.16) (class 3: W_el,y):
  M_fi,t,Rd = k_y,theta W_y f_y / (gamma_M,fi kappa_1 kappa_2);
* lateral-torsional buckling, 4.2.3.3(4)-(5) eq (4.12), (4.13) and 4.2.3.4(2) eq (4.15):
  M_b,fi,t,Rd = chi_LT,fi W_y k_y,theta f_y / gamma_M,fi, chi_LT,fi as chi_fi with
  lambda_LT,theta = lambda_LT sqrt(k_y,theta / k_E,theta), lambda_LT = sqrt(W_y f_y / M_cr), and
  M_cr = C1 pi^2 E I_z / L^2 sqrt(I_w / I_z + L^2 G I_t / (pi^2 E I_z)) (doubly symmetric I section,
  load at the shear centre, end restraint factors k = k_w = 1; hollow sections are taken as not
  susceptible, chi_LT = 1);
* axial compression with bending, 4.2.3.5 eq (4.21a)-(4.21d) (class 1, 2 with W_pl,y; class 3 with W_el,y),
  M_z = 0:
  (4.21a) N / (chi_min,fi N_pl,theta) + k_y M_y / M_theta <= 1,
  (4.21b) N / (chi_z,fi N_pl,theta) + k_LT M_y / (chi_LT,fi M_theta) <= 1  (members that can buckle
  laterally), with N_pl,theta = A k_y,theta f_y / gamma_M,fi, M_theta = W_y k_y,theta f_y / gamma_M,fi,
  k_y = 1 - mu_y N / (chi_y,fi N_pl,theta) <= 3,
  mu_y = the smaller of (2 beta_M,y - 5) lambda_y,theta + 0.44 beta_M,y + 0.29 (EN 1993-1-2:2005, for
  lambda_y,20C <= 1.1) and (1.2 beta_M,y - 3) lambda_y,theta + 0.71 beta_M,y - 0.29 (the form of the
  corrigendum EN 1993-1-2:2005/AC:2009), each <= 0.8: the smaller mu_y gives the larger k_y, so the
  check is on the safe side of either text (the 2005 form alone gives the smaller k_y for
  lambda_y,theta below about 0.25 at beta_M,y = 1.1);
  k_LT = 1 - mu_LT N / (chi_z,fi N_pl,theta) <= 1, mu_LT = 0.15 lambda_z,theta beta_M,LT - 0.15 <= 0.9;
  beta_M,y = beta_M,LT = 1.1 (uniform moment, Figure 4.2; the least value, so the safe side) unless
  the member gives them;
* tension with bending: EN 1993-1-2 gives no interaction; the linear sum
  N / N_fi,theta,Rd + M_y / M_fi,t,Rd <= 1 of EN 1993-1-1 6.2.1(7) is used (safe side), beside
  lateral-torsional buckling without the help of the tension;
* class 4 sections: theta_a,cr = 350 C (4.2.3.6(2), recommended value). The effective section is
  not modelled, but a member whose design effect the GROSS section (the class 3 checks with W_el,y)
  cannot carry at 20 C fails at 20 C: the effective section is never stronger than the gross one.

The kappa factors of 4.2.3.3(7)-(8) enter the cross-section bending check only: eq (4.12)/(4.15)
and (4.21a)-(4.21d) do not carry them. The clause gives kappa_1 = 1.0, 0.85 or 0.7 and kappa_2 = 1.0
or 0.85; values below 0.7 and 0.85 (which would raise the resistance further) are refused.

The critical temperature of a member is the lowest uniform steel temperature at which its design
effect reaches its resistance (for combined loading: the interaction reaches 1). It is found for all
members at once: the utilisation is scanned on a 10 C grid from 20 C to 1200 C (the resistance need
not fall monotonically: k_y/k_E dips between 400 and 500 C and falls above 700 C), then the first
grid interval where it reaches 1 is bisected to 0.1 C; the lower end of the final interval is
returned (the member still holds there, so the value is at most 0.1 C on the safe side).

Equation numbers are quoted from memory of EN 1993-1-2:2005 (the clause numbers are the reference),
and so are both forms of mu_y in 4.2.3.5 (the 2005 text with (2 beta_M,y - 5) and + 0.29, and its
condition lambda_y,20C <= 1.1, which is kept; the corrigendum's (1.2 beta_M,y - 3) and + 0.71 beta_M,y
- 0.29).

Units: forces kN, moments kNm, lengths m at the interface; N, N mm, mm and MPa inside.
"""

from __future__ import annotations

import math
import numbers
from dataclasses import dataclass, field
from functools import lru_cache
from types import MappingProxyType
from typing import Any, Mapping, Optional, Sequence

import numpy as np

from steelfire import codevalues
from steelfire.errors import InputError, OutOfScopeError
from steelfire.models import classification, grades
from steelfire.models import sections as sec
from steelfire.models import steel

__all__ = [
    "ADAPTATION_FACTOR_K1_MIN",
    "ADAPTATION_FACTOR_K2_MIN",
    "CODE_VALUES",
    "KINDS",
    "METHODS",
    "MEMBER_KEYS",
    "MemberDesign",
    "ResistanceResult",
    "resolve_code",
    "ResistanceAt",
    "buckling_phi",
    "buckling_reduction_factor",
    "elastic_critical_moment_Nmm",
    "critical_temperatures",
    "resistances_at",
]

#: The clause values this module reads, defined in the one registry (:mod:`steelfire.codevalues`):
#: name -> (EN value, unit, clause, (lo, hi) admissible range).
CODE_VALUE_NAMES = ("gamma_M_fi", "class4_critical_temperature_C", "fire_imperfection_coefficient",
                    "fire_epsilon_coefficient", "steel_elastic_modulus_MPa", "steel_shear_modulus_MPa",
                    "equivalent_moment_factor_uniform", "combined_slenderness_y_max")
CODE_VALUES = MappingProxyType({n: (d.value, d.unit, d.clause, (d.minimum, d.maximum))
                                for n, d in codevalues.DEFINITIONS.items() if n in CODE_VALUE_NAMES})

#: Member kinds of the case-file contract.
KINDS = ("beam", "column", "tension", "brace", "other")
#: The method that governs a member's critical temperature.
METHODS = ("tension", "flexural buckling", "lateral-torsional buckling", "bending", "combined",
           "class 4")
#: Per-member keys read by :meth:`MemberDesign.from_members` (the case-file contract) and ``section``.
MEMBER_KEYS = ("kind", "steel_grade", "axial_force_kN", "moment_y_kNm", "buckling_length_m",
               "buckling_length_y_m", "buckling_length_z_m", "lateral_restraint_length_m",
               "moment_factor_C1", "laterally_restrained", "adaptation_factor_k1",
               "adaptation_factor_k2", "equivalent_moment_factor_y", "equivalent_moment_factor_LT",
               "section")

#: Least kappa_1 of EN 1993-1-2 4.2.3.3(7): 0.7 (unprotected beam exposed on three sides with a concrete
#: slab on the fourth); 0.85 protected, 1.0 uniform temperature.
ADAPTATION_FACTOR_K1_MIN = 0.7
#: Least kappa_2 of EN 1993-1-2 4.2.3.3(8): 0.85 at the supports of a statically indeterminate beam.
ADAPTATION_FACTOR_K2_MIN = 0.85

# scan grid and bisection tolerance of the critical-temperature search [C]
_GRID_C = np.arange(20.0, 1200.0 + 1e-9, 10.0)   # holds every row of Table 3.1 (100, 200, ...)
_TOLERANCE_C = 0.1
_THETA_MAX_C = 1200.0                            # k_y,theta = 0 from here (Table 3.1)
# k_y / k_E between 1100 and 1200 C, where both fall linearly to 0 (Table 3.1: 0.02 / 0.0225)
_RATIO_ABOVE_1100 = 0.02 / 0.0225


def resolve_code(code: Optional[Mapping[str, Any]] = None) -> dict:
    """The code values in force: the EN values of :data:`CODE_VALUES` updated by ``code``.

    Names of other modules in ``code`` are ignored (the whole ``[code]`` table may be passed); a
    known name with a value outside its admissible range raises InputError (field ``code.NAME``).
    """
    out = {name: float(v[0]) for name, v in CODE_VALUES.items()}
    for name, value in (code or {}).items():
        if name not in CODE_VALUES:
            continue
        _, unit, _, (lo, hi) = CODE_VALUES[name]
        if isinstance(value, bool) or not isinstance(value, numbers.Real) \
                or not math.isfinite(value) or not (lo <= value <= hi):
            raise InputError(f"code.{name}", value, f"a number between {lo:g} and {hi:g} [{unit}]")
        out[name] = float(value)
    return out


# ---------------------------------------------------------------------------------------------
# formulas
# ---------------------------------------------------------------------------------------------


def buckling_phi(slenderness, imperfection):
    """phi = (1 + alpha lambda + lambda^2) / 2 [-] of EN 1993-1-2 4.2.3.2 eq (4.6) (and 4.2.3.3 eq (4.13)).

    ``slenderness`` is lambda_theta (or lambda_LT,theta,com), ``imperfection`` alpha = 0.65 sqrt(235 / f_y).

    Examples
    --------
    >>> buckling_phi(1.0, 0.65)     # (1 + 0.65 + 1) / 2
    1.325
    """
    lam = np.asarray(slenderness, dtype=float)
    phi = 0.5 * (1.0 + imperfection * lam + lam * lam)
    return phi if phi.ndim else float(phi)


def buckling_reduction_factor(slenderness, imperfection):
    """chi_fi [-] of EN 1993-1-2 4.2.3.2 eq (4.6) (and chi_LT,fi of 4.2.3.3 eq (4.13)).

    chi = 1 / (phi + sqrt(phi^2 - lambda^2)), phi = (1 + alpha lambda + lambda^2) / 2, where lambda is
    the non-dimensional slenderness at the temperature (lambda_theta) and alpha the imperfection
    factor 0.65 sqrt(235 / f_y). Valid for lambda >= 0; chi = 1 at lambda = 0 and falls below 1 for
    any lambda > 0 (there is no plateau in the fire curve).

    Examples
    --------
    S235 (alpha = 0.65), lambda_theta = 1: phi = (1 + 0.65 + 1) / 2 = 1.325,
    chi = 1 / (1.325 + sqrt(1.755625 - 1)) = 1 / 2.19426 = 0.4557.

    >>> round(buckling_reduction_factor(1.0, 0.65), 4)
    0.4557
    """
    lam = np.asarray(slenderness, dtype=float)
    phi = buckling_phi(lam, imperfection)
    chi = 1.0 / (phi + np.sqrt(phi * phi - lam * lam))
    return chi if chi.ndim else float(chi)


def elastic_critical_moment_Nmm(length_mm, I_z_mm4, I_t_mm4, I_w_mm6, moment_factor_C1=1.0,
                                elastic_modulus_MPa=grades.ELASTIC_MODULUS_MPA,
                                shear_modulus_MPa=grades.SHEAR_MODULUS_MPA):
    """Elastic critical moment for lateral-torsional buckling M_cr [N mm].

    M_cr = C1 pi^2 E I_z / L^2 sqrt(I_w / I_z + L^2 G I_t / (pi^2 E I_z)): doubly symmetric section,
    load at the shear centre, effective length factors k = k_w = 1 (ends free to rotate about z and
    to warp), C1 for the moment diagram (1.0 uniform moment, the least value). Textbook formula
    (the three-factor formula with C2 = C3 = 0); EN 1993-1-1 gives no formula for M_cr.

    Examples
    --------
    IPE 300, L = 5 m, C1 = 1 (hand calculation): pi^2 E I_z / L^2 = 9.8696 * 210000 * 6.038e6 / 2.5e7
    = 500.6 kN; I_w / I_z = 1.259e11 / 6.038e6 = 20851 mm2; L^2 G I_t / (pi^2 E I_z)
    = 2.5e7 * 81000 * 2.012e5 / 1.2514e13 = 32557 mm2; M_cr = 500.6e3 * sqrt(53408) = 115.7 kNm.

    >>> from steelfire.models.sections import catalogue_section, section_properties
    >>> p = section_properties(catalogue_section("IPE 300"))
    >>> round(elastic_critical_moment_Nmm(5000.0, p.I_z_mm4, p.I_t_mm4, p.I_w_mm6) / 1e6, 1)
    115.7
    """
    L = np.asarray(length_mm, dtype=float)
    euler = math.pi ** 2 * elastic_modulus_MPa * np.asarray(I_z_mm4, dtype=float) / (L * L)
    m = moment_factor_C1 * euler * np.sqrt(np.asarray(I_w_mm6) / I_z_mm4
                                           + L * L * shear_modulus_MPa * I_t_mm4
                                           / (math.pi ** 2 * elastic_modulus_MPa * I_z_mm4))
    return m if m.ndim else float(m)


# ---------------------------------------------------------------------------------------------
# members
# ---------------------------------------------------------------------------------------------


def _floats(values, n):
    a = np.asarray(values, dtype=float) if values is not None else np.full(n, np.nan)
    if a.ndim == 0:
        a = np.full(n, float(a))
    return a


@dataclass(frozen=True)
class MemberDesign:
    """Inputs of the member checks, one entry per member (columns).

    Parameters
    ----------
    section : sequence of ISection, RectangularHollowSection or CircularHollowSection
    kind : sequence of str
        ``beam``, ``column``, ``tension``, ``brace`` or ``other`` (:meth:`from_members`: ``beam`` when
        not given, as in the case file).
    steel_grade : sequence of str
        ``S235`` ... ``S460`` (a quality suffix such as ``J2`` may follow).
    axial_force_kN : array
        N_fi,Ed [kN], compression positive, tension negative.
    moment_y_kNm : array
        M_y,fi,Ed [kNm], the largest moment about the y-y axis along the member.
    buckling_length_y_m, buckling_length_z_m : array
        Buckling lengths L_cr for flexural buckling about y-y and z-z [m]; nan where not given
        (needed for members in compression and for columns and braces).
    lateral_restraint_length_m : array
        Length between lateral restraints for lateral-torsional buckling [m]; nan where not given
        (needed for I sections with a moment that are not laterally restrained).
    laterally_restrained : array of bool
        True: the compression flange is held along its length (no lateral-torsional buckling).
    moment_factor_C1 : array
        C1 of M_cr [-], 1.0 (uniform moment) by default.
    adaptation_factor_k1, adaptation_factor_k2 : array
        kappa_1, kappa_2 of EN 1993-1-2 4.2.3.3(7)-(8) [-], 1.0 by default; kappa_1 from 0.7 and
        kappa_2 from 0.85 to 1 (the clause's values).
    equivalent_moment_factor_y, equivalent_moment_factor_LT : array
        beta_M,y and beta_M,LT of EN 1993-1-2 Figure 4.2 [-]; nan: the code value
        ``equivalent_moment_factor_uniform`` (1.1).
    label : sequence of str
        How error messages name each member (default ``member[i]``).
    """

    section: tuple
    kind: tuple
    steel_grade: tuple
    axial_force_kN: np.ndarray
    moment_y_kNm: np.ndarray
    buckling_length_y_m: np.ndarray = None
    buckling_length_z_m: np.ndarray = None
    lateral_restraint_length_m: np.ndarray = None
    laterally_restrained: np.ndarray = None
    moment_factor_C1: np.ndarray = None
    adaptation_factor_k1: np.ndarray = None
    adaptation_factor_k2: np.ndarray = None
    equivalent_moment_factor_y: np.ndarray = None
    equivalent_moment_factor_LT: np.ndarray = None
    label: tuple = None

    def __post_init__(self) -> None:
        n = len(self.section)
        put = lambda k, v: object.__setattr__(self, k, v)  # noqa: E731
        put("section", tuple(self.section))
        put("kind", tuple(self.kind))
        put("steel_grade", tuple(self.steel_grade))
        put("label", tuple(f"member[{i}]" for i in range(n)) if self.label is None else tuple(self.label))
        defaults = {"moment_factor_C1": 1.0, "adaptation_factor_k1": 1.0, "adaptation_factor_k2": 1.0}
        for name in ("axial_force_kN", "moment_y_kNm", "buckling_length_y_m", "buckling_length_z_m",
                     "lateral_restraint_length_m", "moment_factor_C1", "adaptation_factor_k1",
                     "adaptation_factor_k2", "equivalent_moment_factor_y",
                     "equivalent_moment_factor_LT"):
            value = getattr(self, name)
            if value is None and name in defaults:
                value = defaults[name]
            try:
                put(name, _floats(value, n))
            except (TypeError, ValueError):
                raise InputError(name, value, "numbers, one per member") from None
        flags = self.laterally_restrained
        put("laterally_restrained",
            np.zeros(n, dtype=bool) if flags is None else np.asarray(flags, dtype=bool).reshape(-1)
            if np.ndim(flags) else np.full(n, bool(flags)))
        for name in ("kind", "steel_grade", "label", "axial_force_kN", "moment_y_kNm",
                     "buckling_length_y_m", "buckling_length_z_m", "lateral_restraint_length_m",
                     "laterally_restrained", "moment_factor_C1", "adaptation_factor_k1",
                     "adaptation_factor_k2", "equivalent_moment_factor_y",
                     "equivalent_moment_factor_LT"):
            if len(getattr(self, name)) != n:
                raise InputError(name, f"{len(getattr(self, name))} values",
                                 f"one per member ({n}, as many as sections)")

    def __len__(self) -> int:
        return len(self.section)

    @classmethod
    def from_members(cls, members: Sequence[Mapping[str, Any]],
                     labels: Optional[Sequence[str]] = None) -> "MemberDesign":
        """Columns from one mapping per member, keyed as in the case file (:data:`MEMBER_KEYS`).

        ``section`` is a section object or a catalogue name (``"IPE 300"``). ``buckling_length_m``
        sets both axes; ``buckling_length_y_m`` / ``buckling_length_z_m`` set one each (not together
        with ``buckling_length_m``). Other keys of the mapping are ignored. Type errors raise
        InputError naming ``label.key``; the rules between values are checked by
        :func:`critical_temperatures`.
        """
        n = len(members)
        labels = tuple(f"member[{i}]" for i in range(n)) if labels is None else tuple(labels)
        if len(labels) != n:
            raise InputError("labels", len(labels), f"one label per member ({n})")
        cols: dict = {k: [] for k in ("section", "kind", "steel_grade", "axial_force_kN",
                                      "moment_y_kNm", "buckling_length_y_m", "buckling_length_z_m",
                                      "lateral_restraint_length_m", "laterally_restrained",
                                      "moment_factor_C1", "adaptation_factor_k1",
                                      "adaptation_factor_k2", "equivalent_moment_factor_y",
                                      "equivalent_moment_factor_LT")}
        for where, m in zip(labels, members):
            def num(key, default=math.nan):
                v = m.get(key)
                if v is None:
                    return default
                if isinstance(v, bool) or not isinstance(v, numbers.Real) or not math.isfinite(v):
                    raise InputError(f"{where}.{key}", v, "a finite number")
                return float(v)

            section = m.get("section")
            if isinstance(section, str):
                try:
                    section = sec.catalogue_section(section)
                except InputError as exc:
                    raise InputError(f"{where}.section", exc.value, exc.allowed) from None
            cols["section"].append(section)
            for key in ("kind", "steel_grade"):
                v = m.get(key, "beam" if key == "kind" else None)
                if not isinstance(v, str):
                    raise InputError(f"{where}.{key}", v,
                                     "one of " + ", ".join(KINDS) if key == "kind"
                                     else "a steel grade name such as 'S355'")
                cols[key].append(v)
            cols["axial_force_kN"].append(num("axial_force_kN", 0.0))
            cols["moment_y_kNm"].append(num("moment_y_kNm", 0.0))
            both = num("buckling_length_m")
            ly, lz = num("buckling_length_y_m"), num("buckling_length_z_m")
            if not math.isnan(both) and not (math.isnan(ly) and math.isnan(lz)):
                key = "buckling_length_y_m" if not math.isnan(ly) else "buckling_length_z_m"
                raise InputError(f"{where}.{key}", m.get(key),
                                 "not together with buckling_length_m (that sets both axes)")
            cols["buckling_length_y_m"].append(both if math.isnan(ly) else ly)
            cols["buckling_length_z_m"].append(both if math.isnan(lz) else lz)
            cols["lateral_restraint_length_m"].append(num("lateral_restraint_length_m"))
            restrained = m.get("laterally_restrained", False)
            restrained = False if restrained is None else restrained
            if not isinstance(restrained, (bool, np.bool_)):
                raise InputError(f"{where}.laterally_restrained", restrained, "true or false")
            cols["laterally_restrained"].append(bool(restrained))
            cols["moment_factor_C1"].append(num("moment_factor_C1", 1.0))
            cols["adaptation_factor_k1"].append(num("adaptation_factor_k1", 1.0))
            cols["adaptation_factor_k2"].append(num("adaptation_factor_k2", 1.0))
            cols["equivalent_moment_factor_y"].append(num("equivalent_moment_factor_y"))
            cols["equivalent_moment_factor_LT"].append(num("equivalent_moment_factor_LT"))
        return cls(label=labels, **cols)


# per-member modes of loading (which checks apply)
_TENSION, _TENSION_BENDING, _BENDING, _COMPRESSION, _COMBINED, _CLASS4 = range(6)

# the checks, by index (see _MODE_CHECKS)
_CHECKS = ("tension", "tension with bending", "bending", "lateral-torsional buckling",
           "flexural buckling y", "flexural buckling z", "(4.21a)", "(4.21b)")


@lru_cache(maxsize=4096)
def _strength(grade: str, thickness_mm: float) -> grades.SteelStrength:
    return grades.steel_strength(grade, thickness_mm)


def _bad(design: MemberDesign, mask, field_name, allowed, values=None):
    """Raise InputError for the first member where ``mask`` holds."""
    idx = np.flatnonzero(mask)
    if idx.size:
        i = int(idx[0])
        value = (getattr(design, field_name) if values is None else values)[i]
        value = value.item() if isinstance(value, np.generic) else value
        raise InputError(f"{design.label[i]}.{field_name}", value, allowed)


@dataclass(frozen=True)
class _Prepared:
    """Per-member numbers of the checks (arrays, N / N mm / MPa)."""

    mode: np.ndarray
    N: np.ndarray            # N_fi,Ed [N], compression positive
    M: np.ndarray            # |M_y,fi,Ed| [N mm]
    npl: np.ndarray          # A f_y / gamma_M,fi [N]
    mpl: np.ndarray          # W_y f_y / gamma_M,fi [N mm] (W_pl or W_el by class)
    kappa: np.ndarray        # kappa_1 kappa_2
    lam_y: np.ndarray        # lambda at 20 C (nan where not applicable)
    lam_z: np.ndarray
    lam_lt: np.ndarray
    imperfection: np.ndarray
    beta_y: np.ndarray
    beta_lt: np.ndarray
    has_ltb: np.ndarray
    groups: tuple            # (mode, member indices) of each mode of loading present, class 4 apart
    gross_groups: tuple      # the same for class 4 members by their loading (gross-section checks)


def _prepare(design: MemberDesign, code: dict, allow_out_of_scope: bool):
    n = len(design)
    for i, s in enumerate(design.section):
        if not isinstance(s, (sec.ISection, sec.RectangularHollowSection, sec.CircularHollowSection)):
            raise InputError(f"{design.label[i]}.section", s,
                             "a catalogue section name (e.g. 'IPE 300') or a section from "
                             "steelfire.models.sections (ISection, RectangularHollowSection, "
                             "CircularHollowSection)")
    for i, g in enumerate(design.steel_grade):
        if not isinstance(g, str):
            raise InputError(f"{design.label[i]}.steel_grade", g, "a steel grade name such as 'S355'")
    kinds = np.array(design.kind, dtype=object)
    _bad(design, ~np.isin(kinds, KINDS), "kind", "one of " + ", ".join(KINDS))
    N_kN, M_kNm = design.axial_force_kN, design.moment_y_kNm
    _bad(design, ~np.isfinite(N_kN), "axial_force_kN", "a finite number [kN], compression positive")
    _bad(design, ~np.isfinite(M_kNm), "moment_y_kNm", "a finite number [kNm]")
    _bad(design, (N_kN == 0.0) & (M_kNm == 0.0), "axial_force_kN",
         "a design effect: axial_force_kN or moment_y_kNm not 0")
    _bad(design, (kinds == "tension") & (N_kN >= 0.0), "axial_force_kN",
         "< 0 for a tension member (tension negative, compression positive)")
    for name in ("buckling_length_y_m", "buckling_length_z_m", "lateral_restraint_length_m"):
        v = getattr(design, name)
        _bad(design, ~np.isnan(v) & ~(np.isfinite(v) & (v > 0.0)), name, "a finite number > 0 [m]")
    needs_lengths = (N_kN > 0.0) | np.isin(kinds, ("column", "brace"))
    for name in ("buckling_length_y_m", "buckling_length_z_m"):
        _bad(design, needs_lengths & np.isnan(getattr(design, name)), name,
             "a buckling length > 0 [m] for a member in compression and for every column and brace "
             "(buckling_length_m for both axes, or buckling_length_y_m and buckling_length_z_m)")
    _bad(design, ~np.isfinite(design.moment_factor_C1) | (design.moment_factor_C1 < 1.0)
         | (design.moment_factor_C1 > 3.0), "moment_factor_C1",
         "a number from 1.0 (uniform moment) to 3.0")
    for name, least, clause in (("adaptation_factor_k1", ADAPTATION_FACTOR_K1_MIN, "4.2.3.3(7)"),
                                ("adaptation_factor_k2", ADAPTATION_FACTOR_K2_MIN, "4.2.3.3(8)")):
        v = getattr(design, name)
        _bad(design, ~(np.isfinite(v) & (v >= least) & (v <= 1.0)), name,
             f"a number from {least:g} to 1 (EN 1993-1-2 {clause})")
    for name in ("equivalent_moment_factor_y", "equivalent_moment_factor_LT"):
        v = getattr(design, name)
        _bad(design, ~np.isnan(v) & ~((v >= 1.1) & (v <= 2.5)), name,
             "a number from 1.1 to 2.5 (EN 1993-1-2 Figure 4.2)")

    # properties once per distinct section, then gathered per member
    index: dict = {}
    inv = np.array([index.setdefault(s, len(index)) for s in design.section], dtype=int)
    unique = [sec.section_properties(s) for s in index]
    props = [unique[k] for k in inv]

    def column(attr):
        return np.array([getattr(p, attr) for p in unique], dtype=float)[inv]

    strengths = []
    for i, (g, p) in enumerate(zip(design.steel_grade, props)):
        try:
            strengths.append(_strength(g, p.governing_thickness_mm))
        except InputError as exc:
            field_name = "steel_grade" if exc.field == "steel_grade" else "section"
            raise type(exc)(f"{design.label[i]}.{field_name}", exc.value, exc.allowed) from None
    f_y = np.array([s.f_y_MPa for s in strengths])
    is_i = np.array([p.shape == "I" for p in unique], dtype=bool)[inv]
    moment = M_kNm != 0.0
    needs_lt = moment & is_i & ~design.laterally_restrained
    _bad(design, needs_lt & np.isnan(design.lateral_restraint_length_m), "lateral_restraint_length_m",
         "a length > 0 [m] between lateral restraints for an I section with a moment, or "
         "laterally_restrained = true")

    classes = classification.classify_columns(props, f_y, N_kN, M_kNm, code)
    cls = classes.section_class

    g = code["gamma_M_fi"]
    E, G = code["steel_elastic_modulus_MPa"], code["steel_shear_modulus_MPa"]
    area = column("area_mm2")
    w = np.where(cls <= 2, column("W_pl_y_mm3"), column("W_el_y_mm3"))
    i_y, i_z = column("i_y_mm"), column("i_z_mm")
    lam1 = math.pi * np.sqrt(E / f_y)
    lam_y = design.buckling_length_y_m * 1e3 / i_y / lam1
    lam_z = design.buckling_length_z_m * 1e3 / i_z / lam1
    L = np.where(needs_lt, design.lateral_restraint_length_m, 1.0) * 1e3
    mcr = elastic_critical_moment_Nmm(
        L, column("I_z_mm4"), column("I_t_mm4"), column("I_w_mm6"), design.moment_factor_C1, E, G)
    lam_lt = np.where(needs_lt, np.sqrt(w * f_y / mcr), np.nan)

    load_mode = np.select(
        [(N_kN < 0.0) & ~moment, N_kN < 0.0, N_kN == 0.0, ~moment],
        [_TENSION, _TENSION_BENDING, _BENDING, _COMPRESSION], _COMBINED)
    mode = np.where(cls == 4, _CLASS4, load_mode)
    beta_default = code["equivalent_moment_factor_uniform"]
    beta_y = np.where(np.isnan(design.equivalent_moment_factor_y), beta_default,
                      design.equivalent_moment_factor_y)
    beta_lt = np.where(np.isnan(design.equivalent_moment_factor_LT), beta_default,
                       design.equivalent_moment_factor_LT)

    notes = [[] for _ in range(n)]
    out_of_scope = (mode == _COMBINED) & (lam_y > code["combined_slenderness_y_max"])
    for i in np.flatnonzero(out_of_scope):
        allowed = (f"<= {code['combined_slenderness_y_max']:g} for mu_y of EN 1993-1-2 4.2.3.5 "
                   "(axial compression with bending)")
        if not allow_out_of_scope:
            raise OutOfScopeError(f"{design.label[i]}.lambda_y_20C", round(float(lam_y[i]), 3), allowed)
        notes[i].append(f"out of scope: lambda_y,20C = {lam_y[i]:.3f} > "
                        f"{code['combined_slenderness_y_max']:g} (mu_y of EN 1993-1-2 4.2.3.5)")
    for i in np.flatnonzero(mode == _CLASS4):
        notes[i].append("class 4: effective section not modelled; its resistance at 20 C is to be "
                        "checked separately (EN 1993-1-1, EN 1993-1-5)")
    class4 = mode == _CLASS4

    prepared = _Prepared(
        mode=mode, N=N_kN * 1e3, M=np.abs(M_kNm) * 1e6, npl=area * f_y / g, mpl=w * f_y / g,
        kappa=design.adaptation_factor_k1 * design.adaptation_factor_k2,
        lam_y=np.where(needs_lengths, lam_y, np.nan), lam_z=np.where(needs_lengths, lam_z, np.nan),
        lam_lt=lam_lt,
        imperfection=code["fire_imperfection_coefficient"]
        * np.sqrt(classification.REFERENCE_YIELD_STRENGTH_MPA / f_y),
        beta_y=beta_y, beta_lt=beta_lt, has_ltb=needs_lt,
        groups=tuple((m, np.flatnonzero(mode == m)) for m in _MODE_CHECKS if np.any(mode == m)),
        gross_groups=tuple((m, np.flatnonzero(class4 & (load_mode == m))) for m in _MODE_CHECKS
                           if np.any(class4 & (load_mode == m))))
    return prepared, classes, strengths, f_y, notes


def _reduction(theta):
    """k_y,theta and sqrt(k_y,theta / k_E,theta) (Table 3.1), the ratio held at its 1100-1200 C value."""
    ky = np.asarray(steel.yield_strength_factor(theta))
    ke = np.asarray(steel.elastic_modulus_factor(theta))
    ratio = np.divide(ky, ke, out=np.full(ky.shape, _RATIO_ABOVE_1100), where=ke > 0.0)
    return ky, np.sqrt(ratio)


def _factors(P: _Prepared, theta):
    """(chi_y, chi_z, chi_LT, lambda_y, lambda_z, lambda_LT) at one temperature per member."""
    _, r = _reduction(theta)
    lam_y, lam_z, lam_lt = P.lam_y * r, P.lam_z * r, P.lam_lt * r
    a = P.imperfection
    chi_lt = np.where(P.has_ltb, buckling_reduction_factor(lam_lt, a), 1.0)
    return (buckling_reduction_factor(lam_y, a), buckling_reduction_factor(lam_z, a), chi_lt,
            lam_y, lam_z, lam_lt)


# checks that each mode of loading runs (indices into _CHECKS)
_MODE_CHECKS = {
    _TENSION: (0,),
    _TENSION_BENDING: (1, 3),
    _BENDING: (2, 3),
    _COMPRESSION: (4, 5),
    _COMBINED: (6, 7),
}


def _group(P: _Prepared, mode: int, idx, theta, grid: bool):
    """Utilisation of the checks of one mode of loading, for the members ``idx``.

    Returns a stack (len(_MODE_CHECKS[mode]) x members [x temperatures]); a check that does not
    apply to a member (no lateral-torsional buckling) is -inf; where k_y,theta = 0, +inf.
    """
    if grid:
        ky, r = _reduction(theta)
        g = lambda x: x[idx][:, None]  # noqa: E731
    else:
        ky, r = _reduction(theta[idx])
        g = lambda x: x[idx]  # noqa: E731
    N, M, a = g(P.N), g(P.M), g(P.imperfection)
    with np.errstate(divide="ignore", invalid="ignore"):
        npl, mth = ky * g(P.npl), ky * g(P.mpl)
        if mode in (_TENSION, _TENSION_BENDING):
            n_ratio = -N / npl                                   # |N| / N_fi,theta,Rd
        if mode in (_TENSION_BENDING, _BENDING, _COMBINED):
            m_ratio = M / mth                                    # M / M_theta (no kappa)
            has_ltb = g(P.has_ltb)
            chi_lt = np.where(has_ltb, buckling_reduction_factor(g(P.lam_lt) * r, a), 1.0)
        if mode in (_COMPRESSION, _COMBINED):
            lam_y, lam_z = g(P.lam_y) * r, g(P.lam_z) * r
            ny = N / (buckling_reduction_factor(lam_y, a) * npl)   # N / N_b,fi,y
            nz = N / (buckling_reduction_factor(lam_z, a) * npl)   # N / N_b,fi,z
        if mode == _TENSION:
            checks = (n_ratio,)
        elif mode == _TENSION_BENDING:
            checks = (n_ratio + g(P.kappa) * m_ratio, np.where(has_ltb, m_ratio / chi_lt, -np.inf))
        elif mode == _BENDING:
            checks = (g(P.kappa) * m_ratio, np.where(has_ltb, m_ratio / chi_lt, -np.inf))
        elif mode == _COMPRESSION:
            checks = (ny, nz)
        else:
            n_min = np.maximum(ny, nz)                           # N / (chi_min N_pl,theta)
            beta_y = g(P.beta_y)
            # both texts of mu_y, the smaller taken (larger k_y, safe side; module notes)
            mu_y = np.minimum(np.minimum((2.0 * beta_y - 5.0) * lam_y + 0.44 * beta_y + 0.29,
                                         (1.2 * beta_y - 3.0) * lam_y + 0.71 * beta_y - 0.29), 0.8)
            k_y = np.minimum(1.0 - mu_y * ny, 3.0)
            mu_lt = np.minimum(0.15 * lam_z * g(P.beta_lt) - 0.15, 0.9)
            k_lt = np.minimum(1.0 - mu_lt * nz, 1.0)
            m_lt = m_ratio / chi_lt
            # the interaction is read only up to where one term alone reaches 1 (beyond, k_y may
            # turn negative and the sum fall back below 1): each is at least its two terms
            eq_a = np.maximum(n_min + k_y * m_ratio, np.maximum(n_min, m_ratio))
            eq_b = np.maximum(nz + k_lt * m_lt, np.maximum(nz, m_lt))
            checks = (eq_a, np.where(has_ltb, eq_b, -np.inf))
        stack = np.stack(np.broadcast_arrays(*checks))
        return np.where((ky <= 0.0) & (stack > -np.inf), np.inf, stack)


def _utilisation(P: _Prepared, theta, grid: bool = False):
    """Utilisation of the governing check and its index in _CHECKS, per member [x temperature].

    Class 4 members (not searched) get 0.
    """
    n = len(P.N)
    shape = (n, len(theta)) if grid else (n,)
    u = np.zeros(shape)
    check = np.zeros(shape, dtype=int)
    for mode, idx in P.groups:
        stack = _group(P, mode, idx, theta, grid)
        j = stack.argmax(axis=0)
        u[idx] = np.take_along_axis(stack, j[None], axis=0)[0]
        check[idx] = np.asarray(_MODE_CHECKS[mode])[j]
    return u, check


def _check_values(P: _Prepared, theta, groups=None):
    """Every check's utilisation at one temperature per member: (len(_CHECKS), members), -inf
    where a check does not apply (``groups``: P.groups by default; P.gross_groups for the gross
    sections of class 4 members)."""
    out = np.full((len(_CHECKS), len(P.N)), -np.inf)
    for mode, idx in (P.groups if groups is None else groups):
        out[np.ix_(_MODE_CHECKS[mode], idx)] = _group(P, mode, idx, theta, False)
    return out


# ---------------------------------------------------------------------------------------------
# result
# ---------------------------------------------------------------------------------------------


def _none(x):
    return None if x is None or (isinstance(x, float) and math.isnan(x)) else x


@dataclass(frozen=True)
class ResistanceResult:
    """Critical temperatures and the checks behind them, one entry per member (columns).

    Attributes
    ----------
    method : object array of str
        One of :data:`METHODS`.
    clause : object array of str
        E.g. ``"EN 1993-1-2 4.2.3.2 flexural buckling, z-z"``.
    section_class : int array
    class_part, class_c_over_t, class_limit : arrays
        The part that decides the class, its c/t and the Table 5.2 limit.
    steel_grade : object array of str
    f_y_MPa : float array
        Nominal yield strength used (band of the thickest plate).
    slenderness_20C, slenderness_at_critical, reduction_factor_at_critical : float arrays
        lambda and chi of the governing buckling mode (nan where no buckling mode governs).
    slenderness_y_20C, slenderness_z_20C, slenderness_LT_20C : float arrays
        Non-dimensional slenderness at 20 C of each mode (nan where not applicable).
    axial_force_kN, moment_y_kNm : float arrays
        Design effects in fire.
    axial_kN, buckling_y_kN, buckling_z_kN, moment_kNm, ltb_moment_kNm : float arrays
        Resistances at 20 C (gamma_M,fi; the moment with kappa_1 kappa_2): axial_kN (A f_y, the
        squash or tension resistance) always, the buckling resistances where buckling lengths apply,
        the moments where the member has a moment (lateral-torsional buckling where it applies);
        nan otherwise and for class 4 sections.
    utilisation : float array
        mu0 = E_fi,d / R_fi,d,0, the governing check at 20 C (nan for class 4, except where the gross
        section fails at 20 C: then the gross section's, a lower bound).
    critical_temperature_C : float array
        theta_a,cr [C]; nan where the member fails at 20 C.
    fails_at_20C : bool array
        True where mu0 >= 1: the member cannot carry its load even at 20 C (class 4: where its
        gross section cannot).
    bracket_C : float array (n, 2)
        Final bisection interval [lo, hi] [C] (nan for class 4 and members failing at 20 C).
    iterations : int
        Bisection steps after the scan.
    notes : tuple of tuple of str
    code_values : dict
        The code values used.
    """

    method: np.ndarray
    clause: np.ndarray
    section_class: np.ndarray
    class_part: np.ndarray
    class_c_over_t: np.ndarray
    class_limit: np.ndarray
    steel_grade: np.ndarray
    f_y_MPa: np.ndarray
    slenderness_20C: np.ndarray
    slenderness_at_critical: np.ndarray
    reduction_factor_at_critical: np.ndarray
    slenderness_y_20C: np.ndarray
    slenderness_z_20C: np.ndarray
    slenderness_LT_20C: np.ndarray
    axial_force_kN: np.ndarray
    moment_y_kNm: np.ndarray
    axial_kN: np.ndarray
    buckling_y_kN: np.ndarray
    buckling_z_kN: np.ndarray
    moment_kNm: np.ndarray
    ltb_moment_kNm: np.ndarray
    utilisation: np.ndarray
    critical_temperature_C: np.ndarray
    fails_at_20C: np.ndarray
    bracket_C: np.ndarray
    iterations: int
    notes: tuple
    code_values: dict = field(default_factory=dict)

    def __len__(self) -> int:
        return len(self.method)

    def member(self, i: int) -> dict:
        """Member ``i`` as plain values (None where not applicable), for JSON and reports."""
        f = lambda a: _none(float(a[i]))  # noqa: E731
        failed = bool(self.fails_at_20C[i])
        return {
            "method": str(self.method[i]),
            "clause": str(self.clause[i]),
            "section_class": int(self.section_class[i]),
            "class_part": {"part": str(self.class_part[i]), "c_over_t": f(self.class_c_over_t),
                           "limit": None if math.isinf(self.class_limit[i]) else f(self.class_limit)},
            "steel_grade": str(self.steel_grade[i]),
            "f_y_MPa": f(self.f_y_MPa),
            "slenderness_20C": f(self.slenderness_20C),
            "slenderness_at_critical": f(self.slenderness_at_critical),
            "reduction_factor_at_critical": f(self.reduction_factor_at_critical),
            "design_effect": {"axial_force_kN": f(self.axial_force_kN),
                              "moment_y_kNm": f(self.moment_y_kNm)},
            "resistance_20C": {"axial_kN": f(self.axial_kN), "buckling_y_kN": f(self.buckling_y_kN),
                               "buckling_z_kN": f(self.buckling_z_kN),
                               "moment_kNm": f(self.moment_kNm),
                               "ltb_moment_kNm": f(self.ltb_moment_kNm)},
            "utilisation": f(self.utilisation),
            "critical_temperature_C": None if failed else f(self.critical_temperature_C),
            "fails_at_20C": failed,
            "notes": list(self.notes[i]),
        }


def _clauses(check, cls, axis_min, class4_C):
    """Method and clause text of each member's governing check."""
    w = np.where(cls <= 2, "class 1/2, W_pl,y", "class 3, W_el,y")
    method = np.array([None] * len(check), dtype=object)
    clause = np.array([None] * len(check), dtype=object)
    for i, (c, k, wi, ax) in enumerate(zip(check, cls, w, axis_min)):
        if k == 4:
            method[i], clause[i] = "class 4", (f"EN 1993-1-2 4.2.3.6(2) class 4 section: "
                                               f"theta_a,cr = {class4_C:g} C")
        elif c == 0:
            method[i], clause[i] = "tension", "EN 1993-1-2 4.2.3.1 tension"
        elif c == 1:
            method[i], clause[i] = "combined", (
                f"EN 1993-1-1 6.2.1(7) linear interaction of EN 1993-1-2 4.2.3.1 tension and "
                f"{'4.2.3.3' if k <= 2 else '4.2.3.4'} bending ({wi})")
        elif c == 2:
            method[i], clause[i] = "bending", (
                f"EN 1993-1-2 {'4.2.3.3' if k <= 2 else '4.2.3.4'} bending resistance, {wi}, "
                "kappa_1 kappa_2")
        elif c == 3:
            method[i], clause[i] = "lateral-torsional buckling", (
                f"EN 1993-1-2 {'4.2.3.3(4)-(5)' if k <= 2 else '4.2.3.4(2)'} lateral-torsional "
                f"buckling, {wi}")
        elif c in (4, 5):
            method[i] = "flexural buckling"
            clause[i] = f"EN 1993-1-2 4.2.3.2 flexural buckling, {'y-y' if c == 4 else 'z-z'}"
        else:
            eq = ("(4.21a)" if c == 6 else "(4.21b)") if k <= 2 else ("(4.21c)" if c == 6 else "(4.21d)")
            what = (f"flexural buckling {ax}-{ax} with bending" if c == 6
                    else "lateral-torsional buckling with axial compression")
            method[i], clause[i] = "combined", f"EN 1993-1-2 4.2.3.5 eq {eq}, {what}, {wi}"
    return method, clause


def critical_temperatures(design: MemberDesign, code: Optional[Mapping[str, Any]] = None, *,
                          allow_out_of_scope: bool = False) -> ResistanceResult:
    """Critical temperature of every member from its resistance in fire, EN 1993-1-2 4.2.3.

    The checks that apply to each member follow from its loads and section (module notes):
    tension (N < 0), tension with bending, bending with lateral-torsional buckling (N = 0),
    flexural buckling about both axes (N > 0, M_y = 0), (4.21a)/(4.21b) (N > 0 and M_y), and 350 C
    for class 4 sections (which fail at 20 C where their gross section cannot carry the effect).
    theta_a,cr is the lowest uniform steel temperature at which the governing check reaches 1: 10 C scan
    from 20 to 1200 C, then bisection to 0.1 C (the lower end of the final interval is returned). Valid
    for uniform temperature over the section and along the member; class 1-3 sections for the resistance
    formulas; members with lambda_y,20C <= 1.1 under axial compression with bending.

    Parameters
    ----------
    design : MemberDesign
        The members (columns); :meth:`MemberDesign.from_members` builds it from case-file mappings.
    code : mapping, optional
        Code values by name (:data:`CODE_VALUES`); names of other modules are ignored.
    allow_out_of_scope : bool
        False: a member outside a method's validity range raises OutOfScopeError; True: it is
        computed and stamped in ``notes``.

    Returns
    -------
    ResistanceResult

    Raises
    ------
    InputError
        A value that breaks the rules, named ``label.field`` (e.g. a column without a buckling
        length, an unknown grade, a negative length).
    OutOfScopeError
        Outside a validity range (a plate thicker than the grade's bands; lambda_y,20C > 1.1 under
        axial compression with bending) unless ``allow_out_of_scope``.

    Examples
    --------
    A tension member at mu0 = 0.5: k_y,theta = 0.5 at 500 + (0.78 - 0.5) / (0.78 - 0.47) * 100 = 590.3 C
    (Table 3.1, linear between rows; eq (4.22), fitted to the same table, gives 585 C):

    >>> from steelfire.models.sections import catalogue_section
    >>> d = MemberDesign.from_members([{"kind": "tension", "steel_grade": "S355",
    ...     "section": "HEB 300", "axial_force_kN": -0.5 * 14908.3 * 345.0 / 1e3}])
    >>> r = critical_temperatures(d)
    >>> r.method[0], round(float(r.utilisation[0]), 3), round(float(r.critical_temperature_C[0]))
    ('tension', 0.5, 590)
    """
    if not isinstance(design, MemberDesign):
        raise InputError("design", type(design).__name__, "a MemberDesign (MemberDesign.from_members)")
    if not isinstance(allow_out_of_scope, bool):
        raise InputError("allow_out_of_scope", allow_out_of_scope, "true or false")
    codev = resolve_code(code)
    P, classes, strengths, f_y, notes = _prepare(design, codev, allow_out_of_scope)
    n = len(design)
    cls = classes.section_class
    searched = P.mode != _CLASS4

    # 20 C: every check (mu0 is the governing one's)
    twenty = np.full(n, 20.0)
    values20 = _check_values(P, twenty)
    u20 = values20.max(axis=0)
    # class 4: the gross section (class 3 checks, W_el,y) bounds the effective section's resistance
    # from above, so a gross utilisation >= 1 at 20 C means the member fails at 20 C
    gross20 = _check_values(P, twenty, P.gross_groups)
    u20_gross = gross20.max(axis=0)
    fails4 = ~searched & (u20_gross >= 1.0)
    fails = (searched & (u20 >= 1.0)) | fails4

    # scan the grid (members x temperatures)
    u_grid, _ = _utilisation(P, _GRID_C, grid=True)
    reached = u_grid >= 1.0
    reached[:, -1] = True                                  # k_y = 0 at 1200 C
    first = np.argmax(reached, axis=1)
    lo = _GRID_C[np.maximum(first - 1, 0)].copy()
    hi = _GRID_C[first].copy()
    # bisection on each member's first interval
    active = searched & ~fails
    iterations = 0
    while np.any(active & (hi - lo > _TOLERANCE_C)):
        mid = 0.5 * (lo + hi)
        up = _utilisation(P, mid)[0] >= 1.0
        hi = np.where(up, mid, hi)
        lo = np.where(up, lo, mid)
        iterations += 1

    theta_cr = np.where(searched, lo, codev["class4_critical_temperature_C"])
    theta_cr = np.where(fails, np.nan, theta_cr)
    # governing check: the one that fails at the top of the final interval (at 20 C if it fails there)
    _, check_hi = _utilisation(P, np.where(fails | ~searched, 20.0, hi))
    check = np.where(fails, values20.argmax(axis=0), check_hi)
    mu0 = np.where(searched, np.take_along_axis(values20, check[None, :], axis=0)[0], np.nan)
    chi_y0, chi_z0, chi_lt0, *_ = _factors(P, twenty)
    chi_y, chi_z, chi_lt, lam_y, lam_z, lam_lt = _factors(P, np.where(np.isnan(theta_cr), 20.0, theta_cr))
    axis_min = np.where(chi_y < chi_z, "y", "z")
    method, clause = _clauses(check, cls, axis_min, codev["class4_critical_temperature_C"])
    mu0 = np.where(fails4, u20_gross, mu0)
    for i in np.flatnonzero(fails4):
        what = _CHECKS[int(gross20[:, i].argmax())]
        clause[i] = (f"EN 1993-1-2 4.2.3.6 class 4 section: the gross section fails {what} at 20 C "
                     "(class 3 rules, W_el,y; the effective section is weaker)")
        notes[i].append(f"class 4: gross-section utilisation at 20 C = {u20_gross[i]:.3g} >= 1, a lower "
                        "bound of the effective section's: fails at 20 C")

    # governing slenderness and chi (flexural: its axis; LTB and (4.21b): LT; (4.21a): chi_min)
    use_y = (check == 4) | ((check == 6) & (axis_min == "y"))
    use_z = (check == 5) | ((check == 6) & (axis_min == "z"))
    use_lt = (check == 3) | (check == 7)
    pick = lambda y, z, lt: np.where(use_y, y, np.where(use_z, z, np.where(use_lt, lt, np.nan)))  # noqa: E731
    slender20 = np.where(searched, pick(P.lam_y, P.lam_z, P.lam_lt), np.nan)
    slender_cr = np.where(searched & ~fails, pick(lam_y, lam_z, lam_lt), np.nan)
    chi_cr = np.where(searched & ~fails, pick(chi_y, chi_z, chi_lt), np.nan)

    ok = searched  # resistances at 20 C, none for class 4
    kN = 1e-3
    res = dict(
        axial_kN=np.where(ok, P.npl * kN, np.nan),
        buckling_y_kN=np.where(ok & ~np.isnan(P.lam_y), chi_y0 * P.npl * kN, np.nan),
        buckling_z_kN=np.where(ok & ~np.isnan(P.lam_z), chi_z0 * P.npl * kN, np.nan),
        moment_kNm=np.where(ok & (P.M > 0.0), P.mpl / P.kappa * 1e-6, np.nan),
        ltb_moment_kNm=np.where(ok & P.has_ltb, chi_lt0 * P.mpl * 1e-6, np.nan),
    )
    bracket = np.where((searched & ~fails)[:, None], np.stack([lo, hi], axis=1), np.nan)
    return ResistanceResult(
        method=method, clause=clause, section_class=cls, class_part=classes.part,
        class_c_over_t=classes.c_over_t, class_limit=classes.limit,
        steel_grade=np.array([s.grade for s in strengths], dtype=object), f_y_MPa=f_y,
        slenderness_20C=slender20, slenderness_at_critical=slender_cr,
        reduction_factor_at_critical=chi_cr,
        slenderness_y_20C=P.lam_y.copy(), slenderness_z_20C=P.lam_z.copy(),
        slenderness_LT_20C=P.lam_lt.copy(),
        axial_force_kN=design.axial_force_kN.copy(), moment_y_kNm=design.moment_y_kNm.copy(),
        utilisation=mu0, critical_temperature_C=theta_cr, fails_at_20C=fails, bracket_C=bracket,
        iterations=iterations, notes=tuple(tuple(x) for x in notes), code_values=codev, **res)


@dataclass(frozen=True)
class ResistanceAt:
    """Resistances of every member at given uniform steel temperatures (arrays, one per member).

    Attributes
    ----------
    steel_temperature_C, k_y, k_E : float arrays
        theta and the Table 3.1 factors there.
    slenderness_y, slenderness_z, slenderness_LT : float arrays
        lambda_theta of each mode (nan where not applicable).
    chi_y, chi_z, chi_LT : float arrays
        Reduction factors at theta (chi_LT = 1 where lateral-torsional buckling does not apply).
    axial_kN, buckling_y_kN, buckling_z_kN, moment_kNm, ltb_moment_kNm : float arrays
        N_fi,theta,Rd, N_b,fi,theta,Rd about y and z, M_fi,theta,Rd (with kappa_1 kappa_2) and
        M_b,fi,theta,Rd; nan where not applicable and for class 4 sections.
    utilisation : float array
        The governing check at theta (nan for class 4).
    """

    steel_temperature_C: np.ndarray
    k_y: np.ndarray
    k_E: np.ndarray
    slenderness_y: np.ndarray
    slenderness_z: np.ndarray
    slenderness_LT: np.ndarray
    chi_y: np.ndarray
    chi_z: np.ndarray
    chi_LT: np.ndarray
    axial_kN: np.ndarray
    buckling_y_kN: np.ndarray
    buckling_z_kN: np.ndarray
    moment_kNm: np.ndarray
    ltb_moment_kNm: np.ndarray
    utilisation: np.ndarray


def resistances_at(design: MemberDesign, steel_temperature_C, code: Optional[Mapping[str, Any]] = None,
                   *, allow_out_of_scope: bool = False) -> ResistanceAt:
    """Resistance of every member at a uniform steel temperature, EN 1993-1-2 4.2.3 (module notes).

    Parameters
    ----------
    design : MemberDesign
    steel_temperature_C : float or array
        theta [C], one for all members or one per member; 20 <= theta <= 1200.
    code : mapping, optional
    allow_out_of_scope : bool
        As for :func:`critical_temperatures`.

    Returns
    -------
    ResistanceAt
    """
    if not isinstance(design, MemberDesign):
        raise InputError("design", type(design).__name__, "a MemberDesign (MemberDesign.from_members)")
    n = len(design)
    theta = np.asarray(steel_temperature_C, dtype=float)
    if theta.ndim == 0:
        theta = np.full(n, float(theta))
    if theta.shape != (n,) or not np.all(np.isfinite(theta)) or np.any(theta < 20.0) \
            or np.any(theta > _THETA_MAX_C):
        raise InputError("steel_temperature_C", steel_temperature_C,
                         f"numbers from 20 to 1200 [C], one or one per member ({n})")
    codev = resolve_code(code)
    P, *_ = _prepare(design, codev, allow_out_of_scope)
    ok = P.mode != _CLASS4
    chi_y, chi_z, chi_lt, lam_y, lam_z, lam_lt = _factors(P, theta)
    ky = np.asarray(steel.yield_strength_factor(theta))
    ke = np.asarray(steel.elastic_modulus_factor(theta))
    npl = ky * P.npl * 1e-3
    return ResistanceAt(
        steel_temperature_C=theta, k_y=ky, k_E=ke,
        slenderness_y=lam_y, slenderness_z=lam_z, slenderness_LT=lam_lt,
        chi_y=chi_y, chi_z=chi_z, chi_LT=chi_lt,
        axial_kN=np.where(ok, npl, np.nan),
        buckling_y_kN=np.where(ok & ~np.isnan(P.lam_y), chi_y * npl, np.nan),
        buckling_z_kN=np.where(ok & ~np.isnan(P.lam_z), chi_z * npl, np.nan),
        moment_kNm=np.where(ok & (P.M > 0.0), ky * P.mpl / P.kappa * 1e-6, np.nan),
        ltb_moment_kNm=np.where(ok & P.has_ltb, chi_lt * ky * P.mpl * 1e-6, np.nan),
        utilisation=np.where(ok, _utilisation(P, theta)[0], np.nan))
