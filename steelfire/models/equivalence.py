"""Time equivalence: the standard-fire duration said to be as severe as a compartment fire.

Two closed-form methods, as pure functions (numbers in, frozen dataclass results out):

* EN 1991-1-2 Annex F (informative): ``t_e,d = (q_f,d * k_b * w_f) * k_c``  eq (F.1)
  -> :func:`annex_f_time_equivalence`, built from :func:`annex_f_conversion_factor` (k_b, Table F.2),
  :func:`annex_f_ventilation_factor` (w_f, eq F.2) and :func:`annex_f_correction_factor`
  (k_c, Table F.1); the small-compartment alternative eq (F.3) is reported beside the main result.
* CIB W14: ``t_e = c * w * q_f,d`` (c the conversion factor of the CIB W14 design guide)  -> :func:`cib_w14_time_equivalence`.

Every coefficient taken from a clause is an entry of the code-value registry (:mod:`steelfire.codevalues`)
and can be overridden through a ``code`` mapping of registry names; each result echoes the values it used
in ``code_values``. Unknown names in the ``annex_f_`` / ``cib_w14_`` namespaces raise
:class:`~steelfire.errors.InputError` (a typo must not pass silently); names of other namespaces are
ignored, so the case file's whole ``[code]`` table may be passed in.

Units: areas [m2], heights [m], fire load density per floor area [MJ/m2], thermal inertia
b = sqrt(rho c lambda) [J/(m2 s^0.5 K)], opening factor O = A_v sqrt(h_eq) / A_t [m^0.5], times [min].
"""

from __future__ import annotations

import math
import numbers
from dataclasses import dataclass, field
from types import MappingProxyType
from typing import Any, Mapping, Optional

from steelfire import codevalues
from steelfire.errors import InputError

__all__ = [
    "ANNEX_F_SCOPE_NOTES",
    "CIB_W14_SCOPE_NOTES",
    "AnnexFVentilationFactor",
    "AnnexFSmallCompartment",
    "AnnexFResult",
    "CibW14Result",
    "annex_f_conversion_factor",
    "annex_f_ventilation_factor",
    "annex_f_correction_factor",
    "annex_f_time_equivalence",
    "cib_w14_conversion_factor",
    "cib_w14_ventilation_factor",
    "cib_w14_time_equivalence",
]

# The clause values (k_b, w_f, b_v, k_c, the CIB W14 factors, band limits) are defined once, in the
# code-value registry (steelfire.codevalues), under the names this module reads.
_ANNEX_F_PREFIX = "annex_f_"
_CIB_W14_PREFIX = "cib_w14_"

ANNEX_F_SCOPE_NOTES = (
    "EN 1991-1-2 Annex F is informative: a national annex may forbid or alter its use.",
    "EN 1991-1-2 Annex F applies to mainly cellulosic fire loads only.",
    "EN 1991-1-2 Annex F does not cover composite steel-concrete or timber construction.",
)

CIB_W14_SCOPE_NOTES = (
    "CIB W14 time equivalence is an empirical correlation derived for protected (insulated) members; "
    "it is not a Eurocode method: its use rests with the approving authority.",
    "CIB W14 conversion factor c (min m^2.25/MJ by thermal-inertia band): CIB W14 design guide on structural "
    "fire safety (1986), values as reproduced in fire-engineering textbooks; verify them against the guide.",
)

_COVERED_CONSTRUCTIONS = ("steel", "reinforced_concrete")
_NOT_COVERED_CONSTRUCTIONS = ("composite", "composite_steel_concrete", "timber")


# ---------------------------------------------------------------------------------------------------
# Input checks (boundary only)
# ---------------------------------------------------------------------------------------------------
def _real(name: str, value: Any, allowed: str) -> float:
    if isinstance(value, bool) or not isinstance(value, numbers.Real):
        raise InputError(name, value, allowed)
    x = float(value)
    if not math.isfinite(x):
        raise InputError(name, value, allowed)
    return x


def _positive(name: str, value: Any) -> float:
    x = _real(name, value, "a positive finite number")
    if x <= 0.0:
        raise InputError(name, value, "a positive finite number")
    return x


def _non_negative(name: str, value: Any) -> float:
    x = _real(name, value, "a finite number >= 0")
    if x < 0.0:
        raise InputError(name, value, "a finite number >= 0")
    return x


def _optional_positive(name: str, value: Any) -> Optional[float]:
    return None if value is None else _positive(name, value)


def _flag(name: str, value: Any) -> bool:
    if not isinstance(value, bool):
        raise InputError(name, value, "True or False")
    return value


def _code_values(code: Optional[Mapping[str, Any]], prefix: str) -> Mapping[str, float]:
    """Values of one namespace (``prefix``): the registry's recommended values overridden by ``code``
    (checked by :func:`steelfire.codevalues.resolve`; names of other namespaces are ignored)."""
    if code is not None and not isinstance(code, Mapping):
        raise InputError("code", code, "a mapping of [code] names to numbers")
    mine = {k: v for k, v in (code or {}).items() if isinstance(k, str) and k.startswith(prefix)}
    if any(not isinstance(k, str) for k in (code or {})):
        raise InputError("code", next(k for k in code if not isinstance(k, str)), "[code] names are strings")
    values = codevalues.resolve({k: v for k, v in mine.items() if codevalues.DEFAULTS.get(k) != v})
    return MappingProxyType({k: v for k, v in values.items() if k.startswith(prefix)})


def _check_geometry(
    floor_area_m2: float, vertical_opening_area_m2: float, total_area_m2: Optional[float]
) -> None:
    if total_area_m2 is not None:
        minimum = 2.0 * floor_area_m2 + vertical_opening_area_m2
        if total_area_m2 < minimum:
            raise InputError(
                "total_area_m2",
                total_area_m2,
                "A_t (floor + ceiling + walls, openings included) must be at least "
                f"2 * floor_area_m2 + vertical_opening_area_m2 = {minimum!r}",
            )


def _check_opening_height(opening_height_m: Optional[float], height_m: Optional[float]) -> None:
    if opening_height_m is not None and height_m is not None and opening_height_m > height_m:
        raise InputError(
            "opening_height_m", opening_height_m, f"must not exceed the compartment height_m = {height_m!r}"
        )


def _to_json(value: Any) -> Any:
    if value is None or isinstance(value, (bool, str)):
        return value
    if isinstance(value, numbers.Real):
        return float(value)
    if isinstance(value, Mapping):
        return {str(k): _to_json(v) for k, v in value.items()}
    if isinstance(value, (tuple, list)):
        return [_to_json(v) for v in value]
    if hasattr(value, "to_dict"):
        return value.to_dict()
    raise TypeError(f"not JSON-ready: {value!r}")


def _band(b: Optional[float], lower: float, upper: float) -> str:
    if b is None:
        return "unknown"
    if b > upper:
        return "high"
    if b >= lower:
        return "medium"
    return "low"


_BAND_LABELS = {
    "high": "b > {upper:g}",
    "medium": "{lower:g} <= b <= {upper:g}",
    "low": "b < {lower:g}",
    "unknown": "b not given: general value",
}


# ---------------------------------------------------------------------------------------------------
# Results
# ---------------------------------------------------------------------------------------------------
@dataclass(frozen=True)
class AnnexFVentilationFactor:
    """Ventilation factor w_f of EN 1991-1-2 eq (F.2), with each bounded factor raw and as used."""

    w_f: float            # used: max(w_f_raw, 0.5) [-]
    w_f_raw: float        # eq (F.2) before the lower bound [-]
    alpha_v: float        # used in eq (F.2) [-]
    alpha_v_raw: float    # A_v / A_f [-]
    alpha_h: float        # A_h / A_f [-]
    b_v: float            # used: max(b_v_raw, 10) [-]
    b_v_raw: float        # 12.5 (1 + 10 alpha_v - alpha_v^2), alpha_v as used [-]
    height_factor: float  # (6.0 / H)^0.3 [-]
    warnings: tuple[str, ...] = ()

    def to_dict(self) -> dict:
        return {k: _to_json(getattr(self, k)) for k in self.__dataclass_fields__}


@dataclass(frozen=True)
class AnnexFSmallCompartment:
    """EN 1991-1-2 eq (F.3) alternative: w_f = O^-1/2 A_f / A_t, and the t_e,d it gives."""

    w_f: float                # eq (F.3) [-]; no lower bound is stated for (F.3) and none is applied
    t_e_min: float            # q_f,d k_b w_f k_c with this w_f [min]
    opening_factor_m05: float  # O [m^0.5]
    total_area_m2: float      # A_t [m2]

    def to_dict(self) -> dict:
        return {k: _to_json(getattr(self, k)) for k in self.__dataclass_fields__}


@dataclass(frozen=True)
class AnnexFResult:
    """EN 1991-1-2 Annex F time equivalence t_e,d = (q_f,d k_b w_f) k_c [min], eq (F.1)."""

    t_e_min: float                      # eq (F.1) with w_f from eq (F.2) [min]
    design_fire_load_MJ_m2: float       # q_f,d per floor area [MJ/m2]
    k_b: float                          # Table F.2 [min m2/MJ]
    k_b_band: str                       # which Table F.2 row, e.g. "720 <= b <= 2500"
    thermal_inertia: Optional[float]    # b [J/(m2 s^0.5 K)], None if not given
    w_f: float                          # used [-]
    w_f_raw: float                      # before w_f >= 0.5 [-]
    alpha_v: float                      # used [-]
    alpha_v_raw: float                  # A_v / A_f [-]
    alpha_h: float                      # A_h / A_f [-]
    b_v: float                          # used [-]
    b_v_raw: float                      # before b_v >= 10 [-]
    height_factor: float                # (6.0 / H)^0.3 [-]
    k_c: float                          # Table F.1 [-]
    k_c_basis: str                      # e.g. "protected steel", "unprotected steel: k_c = 13.7 O"
    opening_factor_m05: Optional[float]  # O [m^0.5] used or derived, None if neither given nor derivable
    small_compartment: Optional[AnnexFSmallCompartment]  # eq (F.3) alternative; None if not applicable
    small_compartment_note: str         # why (F.3) is or is not offered
    warnings: tuple[str, ...]
    code_values: Mapping[str, float] = field(hash=False)
    method: str = "EN 1991-1-2 Annex F"

    def to_dict(self) -> dict:
        return {k: _to_json(getattr(self, k)) for k in self.__dataclass_fields__}


@dataclass(frozen=True)
class CibW14Result:
    """CIB W14 time equivalence t_e = c w q_f,d [min]; t_e_min None where the method does not apply."""

    t_e_min: Optional[float]            # [min]; None for bare steel
    not_applicable_reason: Optional[str]  # why t_e_min is None; None when it is given
    design_fire_load_MJ_m2: float       # q_f,d per floor area [MJ/m2]
    w: float                            # A_f / sqrt(A_v A_t sqrt(h_eq)) [m^-0.25]
    c: float                            # conversion factor c [min m^2.25/MJ] (CIB W14)
    c_band: str                       # thermal-inertia band used
    thermal_inertia: Optional[float]    # b [J/(m2 s^0.5 K)], None if not given
    protected: bool
    warnings: tuple[str, ...]
    code_values: Mapping[str, float] = field(hash=False)
    method: str = "CIB W14"

    def to_dict(self) -> dict:
        return {k: _to_json(getattr(self, k)) for k in self.__dataclass_fields__}


# ---------------------------------------------------------------------------------------------------
# EN 1991-1-2 Annex F
# ---------------------------------------------------------------------------------------------------
def annex_f_conversion_factor(
    thermal_inertia: Optional[float] = None, *, code: Optional[Mapping[str, Any]] = None
) -> float:
    """Conversion factor k_b [min m2/MJ] from the enclosure's thermal inertia b [J/(m2 s^0.5 K)].

    EN 1991-1-2 Annex F, Table F.2 (recommended values)::

        b > 2500            k_b = 0.04
        720 <= b <= 2500    k_b = 0.055
        b < 720             k_b = 0.07
        b not assessed      k_b = 0.07   (general value, note to Table F.2)

    Step boundaries: both 720 and 2500 belong to the middle row (0.055), i.e. the low row is
    ``b < 720`` and the high row ``b > 2500`` -- as recalled from the table; stated here so that a
    reviewer can hold it against the printed standard. ``thermal_inertia=None`` means "not assessed".
    Overridable names: ``annex_f_kb_high_inertia``, ``annex_f_kb_medium_inertia``,
    ``annex_f_kb_low_inertia``, ``annex_f_kb_general``, ``annex_f_inertia_lower_limit``,
    ``annex_f_inertia_upper_limit``.
    """
    b = _optional_positive("thermal_inertia", thermal_inertia)
    values = _code_values(code, _ANNEX_F_PREFIX)
    return _annex_f_kb(b, values)[0]


#: Suffix of the code-value name of each thermal-inertia band (``<factor>_<suffix>``).
_BAND_SUFFIX = {"high": "high_inertia", "medium": "medium_inertia", "low": "low_inertia", "unknown": "general"}


def _by_inertia(b: Optional[float], values: Mapping[str, float], method: str, factor: str) -> tuple[float, str]:
    """The factor of the thermal-inertia band of ``b`` (Table F.2 and its CIB W14 counterpart) and the band's
    label: ``<method>_inertia_lower_limit`` / ``_upper_limit`` bound the bands, ``<factor>_<band>`` is the value."""
    lower, upper = values[f"{method}_inertia_lower_limit"], values[f"{method}_inertia_upper_limit"]
    band = _band(b, lower, upper)
    return values[f"{factor}_{_BAND_SUFFIX[band]}"], _BAND_LABELS[band].format(lower=lower, upper=upper)


def _annex_f_kb(b: Optional[float], values: Mapping[str, float]) -> tuple[float, str]:
    return _by_inertia(b, values, "annex_f", "annex_f_kb")


def annex_f_ventilation_factor(
    *,
    floor_area_m2: float,
    height_m: float,
    vertical_opening_area_m2: float,
    roof_opening_area_m2: float = 0.0,
    code: Optional[Mapping[str, Any]] = None,
) -> AnnexFVentilationFactor:
    """Ventilation factor w_f [-], EN 1991-1-2 Annex F eq (F.2)::

        w_f = (6.0 / H)^0.3 * [0.62 + 90 (0.4 - alpha_v)^4 / (1 + b_v alpha_h)]  >= 0.5
        alpha_v = A_v / A_f      validity 0.025 <= alpha_v <= 0.25
        alpha_h = A_h / A_f
        b_v = 12.5 (1 + 10 alpha_v - alpha_v^2)  >= 10.0

    A_f floor area [m2], H compartment height [m], A_v vertical openings [m2], A_h roof (horizontal)
    openings [m2].

    The alpha_v range is a validity limit, handled without ever moving a value the unconservative way
    (w_f falls as alpha_v rises across the range):

    * alpha_v > 0.25: a warning, and alpha_v = 0.25 is used (a lower alpha_v raises w_f: conservative);
    * alpha_v < 0.025: a warning, and the raw alpha_v is kept (raising it to 0.025 would lower w_f).

    With the EN constants and 0 <= alpha_v <= 0.25, b_v >= 12.5, so the ``b_v >= 10`` bound only binds
    with overridden constants; it is applied and reported all the same (``b_v_raw`` / ``b_v``).
    """
    a_f = _positive("floor_area_m2", floor_area_m2)
    h = _positive("height_m", height_m)
    a_v = _positive("vertical_opening_area_m2", vertical_opening_area_m2)
    a_h = _non_negative("roof_opening_area_m2", roof_opening_area_m2)
    values = _code_values(code, _ANNEX_F_PREFIX)
    return _annex_f_wf(a_f, h, a_v, a_h, values)


def _annex_f_wf(
    a_f: float, h: float, a_v: float, a_h: float, values: Mapping[str, float]
) -> AnnexFVentilationFactor:
    lo, hi = values["annex_f_alpha_v_min"], values["annex_f_alpha_v_max"]
    warnings = []
    alpha_v_raw = a_v / a_f
    alpha_h = a_h / a_f
    if alpha_v_raw > hi:
        alpha_v = hi
        warnings.append(
            f"Annex F: alpha_v = A_v/A_f = {alpha_v_raw:.4g} is above the validity limit {hi:g} of "
            f"eq (F.2); alpha_v = {hi:g} used (conservative: a lower alpha_v gives a higher w_f)."
        )
    elif alpha_v_raw < lo:
        alpha_v = alpha_v_raw
        warnings.append(
            f"Annex F: alpha_v = A_v/A_f = {alpha_v_raw:.4g} is below the validity limit {lo:g} of "
            f"eq (F.2), outside the method's range; the raw value is kept (raising it to {lo:g} "
            "would lower w_f, unconservative)."
        )
    else:
        alpha_v = alpha_v_raw

    b_v_raw = values["annex_f_bv_coefficient"] * (1.0 + values["annex_f_bv_linear"] * alpha_v - alpha_v**2)
    b_v = max(b_v_raw, values["annex_f_bv_min"])
    height_factor = (values["annex_f_wf_reference_height_m"] / h) ** values["annex_f_wf_height_exponent"]
    w_f_raw = height_factor * (
        values["annex_f_wf_base"]
        + values["annex_f_wf_coefficient"]
        * (values["annex_f_wf_alpha_v_reference"] - alpha_v) ** 4
        / (1.0 + b_v * alpha_h)
    )
    w_f = max(w_f_raw, values["annex_f_wf_min"])
    return AnnexFVentilationFactor(
        w_f=w_f,
        w_f_raw=w_f_raw,
        alpha_v=alpha_v,
        alpha_v_raw=alpha_v_raw,
        alpha_h=alpha_h,
        b_v=b_v,
        b_v_raw=b_v_raw,
        height_factor=height_factor,
        warnings=tuple(warnings),
    )


def annex_f_correction_factor(
    *,
    protected: bool = True,
    construction: str = "steel",
    opening_factor_m05: Optional[float] = None,
    code: Optional[Mapping[str, Any]] = None,
) -> float:
    """Correction factor k_c [-], EN 1991-1-2 Annex F Table F.1::

        protected steel       k_c = 1.0
        reinforced concrete   k_c = 1.0
        unprotected steel     k_c = 13.7 O      (O opening factor [m^0.5], as in Annex A)

    ``construction`` is ``"steel"`` (then ``protected`` chooses the row) or ``"reinforced_concrete"``.
    Composite steel-concrete (``"composite"``) and timber (``"timber"``) are not covered by Annex F and
    raise :class:`InputError` naming ``construction``. Unprotected steel needs ``opening_factor_m05``.
    """
    values = _code_values(code, _ANNEX_F_PREFIX)
    prot = _flag("protected", protected)
    o = _optional_positive("opening_factor_m05", opening_factor_m05)
    return _annex_f_kc(prot, construction, o, values)[0]


def _annex_f_kc(
    protected: bool, construction: Any, o: Optional[float], values: Mapping[str, float]
) -> tuple[float, str]:
    if construction in _NOT_COVERED_CONSTRUCTIONS:
        raise InputError(
            "construction",
            construction,
            "EN 1991-1-2 Annex F does not cover composite steel-concrete or timber construction; "
            f"allowed: {', '.join(_COVERED_CONSTRUCTIONS)}",
        )
    if construction not in _COVERED_CONSTRUCTIONS:
        raise InputError("construction", construction, f"one of {', '.join(_COVERED_CONSTRUCTIONS)}")
    if construction == "reinforced_concrete":
        return values["annex_f_kc_reinforced_concrete"], "reinforced concrete"
    if protected:
        return values["annex_f_kc_protected_steel"], "protected steel"
    if o is None:
        raise InputError(
            "opening_factor_m05",
            None,
            "needed for unprotected steel, k_c = 13.7 O (Table F.1): give opening_factor_m05, "
            "or total_area_m2 and opening_height_m",
        )
    c = values["annex_f_kc_bare_steel_per_o"]
    return c * o, f"unprotected steel: k_c = {c:g} O"


def _resolve_opening_factor(
    o_given: Optional[float], a_v: float, a_t: Optional[float], h_eq: Optional[float], warnings: list
) -> Optional[float]:
    """O = A_v sqrt(h_eq) / A_t [m^0.5] (EN 1991-1-2 Annex A) when not given; cross-check when given."""
    o_geom = a_v * math.sqrt(h_eq) / a_t if (a_t is not None and h_eq is not None) else None
    if o_given is None:
        return o_geom
    if o_geom is not None and abs(o_given - o_geom) > 0.01 * o_geom:
        warnings.append(
            f"opening_factor_m05 = {o_given:.4g} differs by more than 1 % from A_v sqrt(h_eq)/A_t = "
            f"{o_geom:.4g}; the given value is used."
        )
    return o_given


def annex_f_time_equivalence(
    *,
    design_fire_load_MJ_m2: float,
    floor_area_m2: float,
    height_m: float,
    vertical_opening_area_m2: float,
    roof_opening_area_m2: float = 0.0,
    thermal_inertia: Optional[float] = None,
    protected: bool = True,
    construction: str = "steel",
    opening_factor_m05: Optional[float] = None,
    total_area_m2: Optional[float] = None,
    opening_height_m: Optional[float] = None,
    code: Optional[Mapping[str, Any]] = None,
) -> AnnexFResult:
    """Equivalent time of standard fire exposure t_e,d [min], EN 1991-1-2 Annex F eq (F.1)::

        t_e,d = (q_f,d * k_b * w_f) * k_c

    q_f,d design fire load density per floor area [MJ/m2] (Annex E); k_b [min m2/MJ] by Table F.2
    (:func:`annex_f_conversion_factor`); w_f [-] by eq (F.2) (:func:`annex_f_ventilation_factor`);
    k_c [-] by Table F.1 (:func:`annex_f_correction_factor`).

    Small-compartment alternative, eq (F.3), for A_f < 100 m2 without roof openings::

        w_f = O^-1/2 * A_f / A_t

    It is reported as ``small_compartment`` beside the main (F.2) result, never in its place; it is
    None, with the reason in ``small_compartment_note``, where it does not apply or O / A_t are not
    known. (Eq F.3 is algebraically the CIB W14 ventilation term w = A_f / sqrt(A_v A_t sqrt(h_eq)).)

    The opening factor O [m^0.5] is needed for unprotected steel (k_c = 13.7 O) and for eq (F.3):
    give ``opening_factor_m05``, or ``total_area_m2`` (A_t, openings included) and
    ``opening_height_m`` (h_eq) to derive O = A_v sqrt(h_eq) / A_t as in Annex A.

    Validity: 0.025 <= alpha_v <= 0.25 (see :func:`annex_f_ventilation_factor` for the handling
    outside it); mainly cellulosic fire loads; not for composite steel-concrete or timber construction
    (raises); Annex F is informative. The scope notes are always included in ``warnings``.
    """
    q = _positive("design_fire_load_MJ_m2", design_fire_load_MJ_m2)
    a_f = _positive("floor_area_m2", floor_area_m2)
    h = _positive("height_m", height_m)
    a_v = _positive("vertical_opening_area_m2", vertical_opening_area_m2)
    a_h = _non_negative("roof_opening_area_m2", roof_opening_area_m2)
    b = _optional_positive("thermal_inertia", thermal_inertia)
    prot = _flag("protected", protected)
    o_given = _optional_positive("opening_factor_m05", opening_factor_m05)
    a_t = _optional_positive("total_area_m2", total_area_m2)
    h_eq = _optional_positive("opening_height_m", opening_height_m)
    _check_geometry(a_f, a_v, a_t)
    _check_opening_height(h_eq, h)
    values = _code_values(code, _ANNEX_F_PREFIX)

    warnings: list[str] = list(ANNEX_F_SCOPE_NOTES)
    o = _resolve_opening_factor(o_given, a_v, a_t, h_eq, warnings)

    k_b, k_b_band = _annex_f_kb(b, values)
    if b is None:
        warnings.append(f"Annex F: thermal inertia not given; general value k_b = {k_b:g} min m2/MJ used.")
    wf = _annex_f_wf(a_f, h, a_v, a_h, values)
    warnings.extend(wf.warnings)
    k_c, k_c_basis = _annex_f_kc(prot, construction, o, values)
    t_e = q * k_b * wf.w_f * k_c

    limit = values["annex_f_small_compartment_max_floor_area_m2"]
    small = None
    if a_f >= limit:
        note = f"eq (F.3) not applicable: floor area {a_f:g} m2 is not below {limit:g} m2."
    elif a_h > 0.0:
        note = "eq (F.3) not applicable: the compartment has roof openings."
    elif o is None or a_t is None:
        note = (
            "eq (F.3) not evaluated: it needs total_area_m2 and the opening factor "
            "(opening_factor_m05, or opening_height_m with total_area_m2)."
        )
    else:
        w_f_small = o**-0.5 * a_f / a_t
        small = AnnexFSmallCompartment(
            w_f=w_f_small, t_e_min=q * k_b * w_f_small * k_c, opening_factor_m05=o, total_area_m2=a_t
        )
        note = (
            f"eq (F.3) alternative for small compartments (A_f < {limit:g} m2, no roof openings), "
            "offered beside the eq (F.2) result, which it does not replace; no lower bound applied to it."
        )

    return AnnexFResult(
        t_e_min=t_e,
        design_fire_load_MJ_m2=q,
        k_b=k_b,
        k_b_band=k_b_band,
        thermal_inertia=b,
        w_f=wf.w_f,
        w_f_raw=wf.w_f_raw,
        alpha_v=wf.alpha_v,
        alpha_v_raw=wf.alpha_v_raw,
        alpha_h=wf.alpha_h,
        b_v=wf.b_v,
        b_v_raw=wf.b_v_raw,
        height_factor=wf.height_factor,
        k_c=k_c,
        k_c_basis=k_c_basis,
        opening_factor_m05=o,
        small_compartment=small,
        small_compartment_note=note,
        warnings=tuple(warnings),
        code_values=values,
    )


# ---------------------------------------------------------------------------------------------------
# CIB W14
# ---------------------------------------------------------------------------------------------------
def cib_w14_conversion_factor(
    thermal_inertia: Optional[float] = None, *, code: Optional[Mapping[str, Any]] = None
) -> float:
    """CIB W14 factor c [min m^2.25/MJ] from the enclosure's thermal inertia b [J/(m2 s^0.5 K)]::

        b > 2500            c = 0.05
        720 <= b <= 2500    c = 0.07
        b < 720             c = 0.09
        b not known         c = 0.1    (general value)

    Table from the CIB W14 design guide on structural fire safety (1986), as reproduced in
    fire-engineering textbooks; values FROM MEMORY. The band limits are taken to be those of
    EN 1991-1-2 Table F.2 (720 and 2500 both in the middle band), an assumption.
    Overridable names: ``cib_w14_c_high_inertia``, ``cib_w14_c_medium_inertia``,
    ``cib_w14_c_low_inertia``, ``cib_w14_c_general``, ``cib_w14_inertia_lower_limit``,
    ``cib_w14_inertia_upper_limit``.
    """
    b = _optional_positive("thermal_inertia", thermal_inertia)
    values = _code_values(code, _CIB_W14_PREFIX)
    return _cib_c(b, values)[0]


def _cib_c(b: Optional[float], values: Mapping[str, float]) -> tuple[float, str]:
    return _by_inertia(b, values, "cib_w14", "cib_w14_c")


def cib_w14_ventilation_factor(
    *,
    floor_area_m2: float,
    vertical_opening_area_m2: float,
    total_area_m2: float,
    opening_height_m: float,
) -> float:
    """CIB W14 ventilation factor w [m^-0.25]::

        w = A_f / sqrt(A_v * A_t * sqrt(h_eq))

    A_f floor area [m2], A_v vertical openings [m2], A_t total boundary area, openings included [m2],
    h_eq area-weighted opening height [m]. Equal to O^-1/2 A_f / A_t, eq (F.3) of EN 1991-1-2.
    """
    a_f = _positive("floor_area_m2", floor_area_m2)
    a_v = _positive("vertical_opening_area_m2", vertical_opening_area_m2)
    a_t = _positive("total_area_m2", total_area_m2)
    h_eq = _positive("opening_height_m", opening_height_m)
    _check_geometry(a_f, a_v, a_t)
    return a_f / math.sqrt(a_v * a_t * math.sqrt(h_eq))


def cib_w14_time_equivalence(
    *,
    design_fire_load_MJ_m2: float,
    floor_area_m2: float,
    vertical_opening_area_m2: float,
    total_area_m2: float,
    opening_height_m: float,
    thermal_inertia: Optional[float] = None,
    protected: bool = True,
    roof_opening_area_m2: float = 0.0,
    height_m: Optional[float] = None,
    code: Optional[Mapping[str, Any]] = None,
) -> CibW14Result:
    """CIB W14 equivalent time of standard fire exposure t_e [min]::

        t_e = c * w * q_f,d
        w   = A_f / sqrt(A_v * A_t * sqrt(h_eq))     [m^-0.25]

    q_f,d design fire load density per floor area [MJ/m2]; c [min m^2.25/MJ] by thermal-inertia band
    (:func:`cib_w14_conversion_factor`; CIB W14 design guide on structural fire safety (1986), as
    reproduced in textbooks, values from memory); geometry as in :func:`cib_w14_ventilation_factor`.

    Derived for protected (insulated) members only: with ``protected=False`` the factors are still
    reported but ``t_e_min`` is None and ``not_applicable_reason`` says why. The formula has no term
    for roof openings: any ``roof_opening_area_m2`` is ignored with a warning (conservative, since
    openings reduce fire severity in the Annex F trend). ``height_m`` (H [m]) is optional and only
    checks that h_eq <= H; the formula itself has no height term.
    """
    q = _positive("design_fire_load_MJ_m2", design_fire_load_MJ_m2)
    b = _optional_positive("thermal_inertia", thermal_inertia)
    prot = _flag("protected", protected)
    a_h = _non_negative("roof_opening_area_m2", roof_opening_area_m2)
    h = _optional_positive("height_m", height_m)
    if h is not None:
        _check_opening_height(_positive("opening_height_m", opening_height_m), h)
    w = cib_w14_ventilation_factor(
        floor_area_m2=floor_area_m2,
        vertical_opening_area_m2=vertical_opening_area_m2,
        total_area_m2=total_area_m2,
        opening_height_m=opening_height_m,
    )
    values = _code_values(code, _CIB_W14_PREFIX)

    warnings: list[str] = list(CIB_W14_SCOPE_NOTES)
    c, band = _cib_c(b, values)
    if b is None:
        warnings.append(f"CIB W14: thermal inertia not given; general value c = {c:g} min m^2.25/MJ used.")
    if a_h > 0.0:
        warnings.append(
            "CIB W14: the formula has no term for roof openings; roof_opening_area_m2 ignored (conservative)."
        )
    if prot:
        t_e: Optional[float] = c * w * q
        reason = None
    else:
        t_e = None
        reason = "CIB W14 time equivalence is derived for protected (insulated) members; not given for bare steel."
    return CibW14Result(
        t_e_min=t_e,
        not_applicable_reason=reason,
        design_fire_load_MJ_m2=q,
        w=w,
        c=c,
        c_band=band,
        thermal_inertia=b,
        protected=prot,
        warnings=tuple(warnings),
        code_values=values,
    )
