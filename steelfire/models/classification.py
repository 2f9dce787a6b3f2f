"""Cross-section classification in fire, EN 1993-1-2 4.2.2 with EN 1993-1-1 5.5.2 and Table 5.2.

Each compression part of a section is given a class from its width-to-thickness ratio c/t and the
stress distribution over it; the section takes the highest (worst) class of its parts
(EN 1993-1-1 5.5.2(6)). In the fire situation the limits use

    epsilon = 0.85 sqrt(235 / f_y)                          EN 1993-1-2 4.2.2(1), eq (4.2)

with f_y the nominal yield strength at 20 C [MPa]. Parts and limits (EN 1993-1-1 Table 5.2, entered
from memory):

* outstand flange of an I section, uniform compression: 9 epsilon / 10 epsilon / 14 epsilon
  (class 1 / 2 / 3);
* internal part (web of an I section, walls of an RHS), with alpha the compressed fraction of c at
  the plastic limit and psi the end-stress ratio of the elastic distribution:
  class 1: 396 eps / (13 alpha - 1) for alpha > 0.5, 36 eps / alpha for alpha <= 0.5;
  class 2: 456 eps / (13 alpha - 1) for alpha > 0.5, 41.5 eps / alpha for alpha <= 0.5;
  class 3: 42 eps / (0.67 + 0.33 psi) for psi > -1, 62 eps (1 - psi) sqrt(-psi) for psi <= -1;
  (pure compression alpha = psi = 1: 33 / 38 / 42 eps; pure bending alpha = 0.5, psi = -1:
  72 / 83 / 124 eps);
* CHS in bending and/or compression, d / t: 50 eps^2 / 70 eps^2 / 90 eps^2.

Stress distributions under an axial force N (compression positive) and a moment M_y:

* N > 0, M_y = 0 (pure compression): every part uniformly compressed (alpha = psi = 1);
* N = 0 (pure bending): the compression flange uniformly compressed, webs alpha = 0.5, psi = -1;
* N and M_y: the plastic neutral axis from N, alpha = (1 + N / (c t_w,tot f_y)) / 2 limited to
  [0, 1] (t_w,tot = t_w of an I section, 2 t of an RHS); psi = sigma_2 / sigma_1 with
  sigma = N / A -+ |M_y| (c / 2) / I_y at the ends of the web's width c;
* a part with no compression (a tension member; alpha <= 0; sigma_1 <= 0) is not susceptible to
  local buckling (no limit).

The classification is made once, with the fire design actions and the 20 C yield strength, as
EN 1993-1-2 4.2.2(1) says ("as for normal temperature design"); the shift of the plastic neutral axis
as k_y,theta falls is not followed.

Units: N in kN, M_y in kNm, f_y in MPa, geometry in mm.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Mapping, Optional, Sequence

import numpy as np

from steelfire.codevalues import DEFAULTS
from steelfire.errors import InputError
from steelfire.models.sections import SectionProperties

__all__ = [
    "FIRE_EPSILON_COEFFICIENT",
    "REFERENCE_YIELD_STRENGTH_MPA",
    "OUTSTAND_LIMITS",
    "INTERNAL_COMPRESSION_LIMITS",
    "TUBE_LIMITS",
    "SectionClass",
    "ClassColumns",
    "fire_epsilon",
    "classify_columns",
    "classify_section",
]

#: epsilon = 0.85 sqrt(235 / f_y) in fire, EN 1993-1-2 4.2.2(1); code value ``fire_epsilon_coefficient``.
FIRE_EPSILON_COEFFICIENT = DEFAULTS["fire_epsilon_coefficient"]
#: The 235 MPa of epsilon, EN 1993-1-1 Table 5.2 (and EN 1993-1-2 4.2.2(1)).
REFERENCE_YIELD_STRENGTH_MPA = 235.0

#: EN 1993-1-1 Table 5.2 sheet 2, outstand flange in compression: c/t limits / epsilon, class 1, 2, 3.
OUTSTAND_LIMITS = (9.0, 10.0, 14.0)
#: EN 1993-1-1 Table 5.2 sheet 1, internal part in compression: c/t limits / epsilon, class 1, 2, 3.
INTERNAL_COMPRESSION_LIMITS = (33.0, 38.0, 42.0)
#: EN 1993-1-1 Table 5.2 sheet 3, tubular section: d/t limits / epsilon^2, class 1, 2, 3.
TUBE_LIMITS = (50.0, 70.0, 90.0)

# EN 1993-1-1 Table 5.2 sheet 1, internal part in bending and compression (coefficients x epsilon):
_C1_HIGH, _C1_LOW = 396.0, 36.0        # class 1: 396/(13 alpha - 1) for alpha > 0.5, 36/alpha otherwise
_C2_HIGH, _C2_LOW = 456.0, 41.5        # class 2: 456/(13 alpha - 1), 41.5/alpha
_C3_A, _C3_B, _C3_C = 42.0, 0.67, 0.33  # class 3, psi > -1: 42 / (0.67 + 0.33 psi)
_C3_NEG = 62.0                         # class 3, psi <= -1: 62 (1 - psi) sqrt(-psi)

_SHAPES = ("I", "RHS", "CHS")


def _coefficient(code: Optional[Mapping[str, float]]) -> float:
    value = FIRE_EPSILON_COEFFICIENT if code is None else code.get("fire_epsilon_coefficient",
                                                                      FIRE_EPSILON_COEFFICIENT)
    if isinstance(value, bool) or not isinstance(value, (int, float)) or not (0.5 <= value <= 1.0):
        raise InputError("code.fire_epsilon_coefficient", value, "a number between 0.5 and 1")
    return float(value)


def fire_epsilon(f_y_MPa, code: Optional[Mapping[str, float]] = None):
    """epsilon = 0.85 sqrt(235 / f_y) [-], EN 1993-1-2 4.2.2(1) eq (4.2).

    Parameters
    ----------
    f_y_MPa : float or array
        Nominal yield strength at 20 C [MPa].
    code : mapping, optional
        ``fire_epsilon_coefficient`` overrides the 0.85.

    Examples
    --------
    >>> round(fire_epsilon(355.0), 4)     # 0.85 * sqrt(235/355) = 0.85 * 0.8136
    0.6916
    """
    k = _coefficient(code)
    eps = k * np.sqrt(REFERENCE_YIELD_STRENGTH_MPA / np.asarray(f_y_MPa, dtype=float))
    return eps if eps.ndim else float(eps)


def _internal_limits(eps, alpha, psi):
    """Class 1, 2, 3 limits of an internal part (arrays), inf where the part has no compression."""
    with np.errstate(divide="ignore", invalid="ignore"):
        high = alpha > 0.5
        l1 = np.where(high, _C1_HIGH * eps / (13.0 * alpha - 1.0), _C1_LOW * eps / alpha)
        l2 = np.where(high, _C2_HIGH * eps / (13.0 * alpha - 1.0), _C2_LOW * eps / alpha)
        l3 = np.where(psi > -1.0, _C3_A * eps / (_C3_B + _C3_C * psi),
                      _C3_NEG * eps * (1.0 - psi) * np.sqrt(np.maximum(-psi, 0.0)))
    l1 = np.where(alpha > 0.0, l1, np.inf)
    l2 = np.where(alpha > 0.0, l2, np.inf)
    l3 = np.where(np.isnan(psi), np.inf, l3)
    return l1, l2, l3


def _class_of(ct, l1, l2, l3):
    return np.where(ct <= l1, 1, np.where(ct <= l2, 2, np.where(ct <= l3, 3, 4)))


def _limit_of(cls, l1, l2, l3):
    """The limit that decided the class: its own class's limit, the class 3 limit for class 4."""
    return np.choose(np.minimum(cls, 3) - 1, (l1, l2, l3))


@dataclass(frozen=True)
class ClassColumns:
    """Classification of many members (numpy arrays, one entry per member).

    Attributes
    ----------
    section_class : int array
        1, 2, 3 or 4.
    part : object array of str
        The governing part: ``"flange"``, ``"web"`` or ``"wall"``.
    c_over_t : float array
        c / t of the governing part (d / t of a CHS).
    limit : float array
        The Table 5.2 limit that decided the class (for class 4: the class 3 limit exceeded);
        inf where no part is in compression.
    epsilon : float array
        0.85 sqrt(235 / f_y).
    alpha, psi : float array
        The web's alpha and psi (nan for a CHS; alpha = psi = 1 in pure compression).
    """

    section_class: np.ndarray
    part: np.ndarray
    c_over_t: np.ndarray
    limit: np.ndarray
    epsilon: np.ndarray
    alpha: np.ndarray
    psi: np.ndarray


def classify_columns(properties: Sequence[SectionProperties], f_y_MPa, axial_force_kN,
                     moment_y_kNm, code: Optional[Mapping[str, float]] = None) -> ClassColumns:
    """Classify many members at once, EN 1993-1-2 4.2.2 and EN 1993-1-1 Table 5.2.

    Parameters
    ----------
    properties : sequence of SectionProperties
        From :func:`steelfire.models.sections.section_properties`, one per member.
    f_y_MPa : array
        Nominal yield strength at 20 C [MPa].
    axial_force_kN : array
        N_fi,Ed [kN], compression positive.
    moment_y_kNm : array
        M_y,fi,Ed [kNm] (its sign does not matter).
    code : mapping, optional
        ``fire_epsilon_coefficient`` (default 0.85).

    Returns
    -------
    ClassColumns
    """
    n = len(properties)
    f_y = np.broadcast_to(np.asarray(f_y_MPa, dtype=float), (n,))
    N = np.broadcast_to(np.asarray(axial_force_kN, dtype=float), (n,)) * 1e3      # N
    M = np.abs(np.broadcast_to(np.asarray(moment_y_kNm, dtype=float), (n,))) * 1e6  # N mm
    eps = fire_epsilon(f_y, code) * np.ones(n)

    # gather the parts: flange (outstand of I, internal of RHS), web, CHS wall
    shape = np.array([_SHAPES.index(p.shape) for p in properties], dtype=int)
    first, second = zip(*[(p.parts[0], p.parts[-1]) for p in properties]) if n else ((), ())
    ct_a = np.array([q.slenderness for q in first], dtype=float)      # flange or CHS wall
    ct_w = np.array([q.slenderness for q in second], dtype=float)     # web (CHS: the wall again)
    c_w = np.array([q.c_mm for q in second], dtype=float)
    t_w_tot = np.array([q.t_mm * q.count for q in second], dtype=float)
    area = np.array([p.area_mm2 for p in properties], dtype=float)
    i_y = np.array([p.I_y_mm4 for p in properties], dtype=float)

    compressed = (N > 0.0) | (M > 0.0)
    is_i, is_rhs, is_chs = shape == 0, shape == 1, shape == 2

    # web stress distribution
    with np.errstate(divide="ignore", invalid="ignore"):
        alpha_nm = 0.5 * (1.0 + N / (c_w * t_w_tot * f_y))
        s_n = N / area
        s_m = M * (c_w / 2.0) / i_y
        sigma1, sigma2 = s_n + s_m, s_n - s_m
        psi_nm = np.where(sigma1 > 0.0, sigma2 / sigma1, np.nan)
    pure_compression = (M == 0.0) & (N > 0.0)
    alpha = np.where(pure_compression, 1.0, np.where(M > 0.0, np.minimum(alpha_nm, 1.0), 0.0))
    psi = np.where(pure_compression, 1.0, np.where(M > 0.0, psi_nm, np.nan))
    lw1, lw2, lw3 = _internal_limits(eps, alpha, psi)

    # flange (or CHS wall) limits: uniform compression whenever anything is compressed
    inf = np.full(n, np.inf)
    out = [np.where(compressed, k * eps, inf) for k in OUTSTAND_LIMITS]
    internal = [np.where(compressed, k * eps, inf) for k in INTERNAL_COMPRESSION_LIMITS]
    tube = [np.where(compressed, k * eps ** 2, inf) for k in TUBE_LIMITS]
    la = [np.where(is_i, o, np.where(is_rhs, i, t)) for o, i, t in zip(out, internal, tube)]

    cls_a = _class_of(ct_a, *la)
    cls_w = np.where(is_chs, 1, _class_of(ct_w, lw1, lw2, lw3))
    lim_a = _limit_of(cls_a, *la)
    lim_w = _limit_of(cls_w, lw1, lw2, lw3)
    # governing part: the higher class; on a tie the larger c/t over the deciding limit
    with np.errstate(divide="ignore", invalid="ignore"):
        web_worse = (cls_w > cls_a) | ((cls_w == cls_a) & (ct_w / lim_w > ct_a / lim_a))
    web_worse &= ~is_chs
    part_a = np.where(is_chs, "wall", "flange").astype(object)
    return ClassColumns(
        section_class=np.where(web_worse, cls_w, cls_a).astype(int),
        part=np.where(web_worse, "web", part_a).astype(object),
        c_over_t=np.where(web_worse, ct_w, ct_a),
        limit=np.where(web_worse, lim_w, lim_a),
        epsilon=eps,
        alpha=np.where(is_chs, np.nan, alpha),
        psi=np.where(is_chs, np.nan, psi),
    )


@dataclass(frozen=True)
class SectionClass:
    """Class of one section and the part that decides it.

    Attributes
    ----------
    section_class : int
        1, 2, 3 or 4.
    part : str
        ``"flange"``, ``"web"`` or ``"wall"``.
    c_over_t : float
        c / t of that part (d / t of a CHS).
    limit : float
        The Table 5.2 limit that decided it (class 4: the class 3 limit it exceeds; inf when nothing
        is in compression).
    epsilon : float
        0.85 sqrt(235 / f_y).
    alpha, psi : float
        The web's alpha and psi (nan for a CHS).
    """

    section_class: int
    part: str
    c_over_t: float
    limit: float
    epsilon: float
    alpha: float
    psi: float


def classify_section(properties: SectionProperties, f_y_MPa: float, axial_force_kN: float = 0.0,
                     moment_y_kNm: float = 0.0,
                     code: Optional[Mapping[str, float]] = None) -> SectionClass:
    """Class of one section in fire, EN 1993-1-2 4.2.2, EN 1993-1-1 Table 5.2 (see the module notes).

    Parameters
    ----------
    properties : SectionProperties
    f_y_MPa : float
        Nominal yield strength at 20 C [MPa].
    axial_force_kN : float
        N_fi,Ed [kN], compression positive.
    moment_y_kNm : float
        M_y,fi,Ed [kNm].
    code : mapping, optional
        ``fire_epsilon_coefficient``.

    Examples
    --------
    IPE 300 in S355 in pure compression: web c/t = 248.6 / 7.1 = 35.0 > 42 epsilon = 29.05, class 4.

    >>> from steelfire.models.sections import catalogue_section, section_properties
    >>> c = classify_section(section_properties(catalogue_section("IPE 300")), 355.0, 100.0, 0.0)
    >>> c.section_class, c.part, round(c.c_over_t, 2), round(c.limit, 2)
    (4, 'web', 35.01, 29.05)
    """
    for name, value in (("f_y_MPa", f_y_MPa), ("axial_force_kN", axial_force_kN),
                        ("moment_y_kNm", moment_y_kNm)):
        if isinstance(value, bool) or not isinstance(value, (int, float)) or not math.isfinite(value):
            raise InputError(name, value, "a finite number")
    if f_y_MPa <= 0.0:
        raise InputError("f_y_MPa", f_y_MPa, "a number > 0 [MPa]")
    if not isinstance(properties, SectionProperties):
        raise InputError("properties", properties, "a SectionProperties (sections.section_properties)")
    c = classify_columns([properties], [f_y_MPa], [axial_force_kN], [moment_y_kNm], code)
    return SectionClass(int(c.section_class[0]), str(c.part[0]), float(c.c_over_t[0]),
                        float(c.limit[0]), float(c.epsilon[0]), float(c.alpha[0]), float(c.psi[0]))
