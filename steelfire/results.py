"""Result objects of an analysis and their JSON / CSV forms.

Numbers are kept at full precision here; the JSON carries them rounded to what a report shows
(0.01 C, 0.01 min, 6 significant figures for factors), so that the report and the JSON agree.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np


def _r(v, nd=2):
    """Round for output; None stays None; NaN becomes None."""
    if v is None:
        return None
    v = float(v)
    if math.isnan(v):
        return None
    return round(v, nd)


def _sig(v, n=6):
    if v is None:
        return None
    v = float(v)
    if v == 0 or not math.isfinite(v):
        return v if math.isfinite(v) else None
    return float(f"{v:.{n}g}")


def _round_tree(v):
    """Factors for output: floats to 6 significant figures, containers walked."""
    if isinstance(v, dict):
        return {k: _round_tree(x) for k, x in v.items()}
    if isinstance(v, (list, tuple)):
        return [_round_tree(x) for x in v]
    if isinstance(v, float):
        return _sig(v)
    return v


def _equivalence_dict(e):
    if e is None:
        return None
    return {"annex_f_min": _r(e["annex_f_min"]), "cib_w14_min": _r(e["cib_w14_min"]),
            "equal_temperature_min": _r(e["equal_temperature_min"]),
            "unconservative": list(e["unconservative"]),
            "resists": dict(e["resists"]),
            "meets_required": None if e["meets_required"] is None else dict(e["meets_required"]),
            "annex_f_k_c": _sig(e["annex_f_k_c"]),
            "annex_f_small_compartment_min": _r(e["annex_f_small_compartment_min"])}


def _sizing_dict(s):
    return {"standard_period_mm": _r(s["standard_period_mm"]), "burnout_mm": _r(s["burnout_mm"]),
            "governing": s["governing"], "chosen_mm": _r(s["chosen_mm"]), "achievable": bool(s["achievable"]),
            "note": s["note"], "supplied_range_mm": s["supplied_range_mm"], "iterations": s["iterations"],
            "given_mm": _r(s.get("given_mm"))}


@dataclass
class FireResult:
    """The design fire with the intermediate values of EN 1991-1-2 Annex A and Annex E."""

    curve: str
    duration_min: float
    convection_coefficient: float
    time_s: np.ndarray
    gas_temperature_C: np.ndarray
    peak_gas_temperature_C: float
    time_of_peak_gas_min: float
    opening_factor_m05: float | None = None
    opening_height_m: float | None = None
    vertical_opening_area_m2: float | None = None
    thermal_inertia: float | None = None
    area_factor: float | None = None
    design_fire_load_MJ_m2: float | None = None
    total_area_fire_load_MJ_m2: float | None = None
    gamma: float | None = None
    gamma_lim: float | None = None
    k_factor: float | None = None
    t_lim_min: float | None = None
    t_max_min: float | None = None
    regime: str | None = None
    x_factor: float | None = None
    cooling_rate_C_h: float | None = None
    burnout_time_min: float | None = None
    source_file: str | None = None
    equivalence_factors: dict | None = None

    def to_dict(self) -> dict:
        return {
            "curve": self.curve,
            "opening_factor_m05": _sig(self.opening_factor_m05),
            "opening_height_m": _sig(self.opening_height_m),
            "thermal_inertia": _sig(self.thermal_inertia),
            "design_fire_load_MJ_m2": _sig(self.design_fire_load_MJ_m2),
            "total_area_fire_load_MJ_m2": _sig(self.total_area_fire_load_MJ_m2),
            "gamma": _sig(self.gamma),
            "gamma_lim": _sig(self.gamma_lim),
            "k_factor": _sig(self.k_factor),
            "t_lim_min": _sig(self.t_lim_min),
            "regime": self.regime,
            "peak_gas_temperature_C": _r(self.peak_gas_temperature_C),
            "time_of_peak_gas_min": _r(self.time_of_peak_gas_min),
            # additions to the contract
            "duration_min": _r(self.duration_min),
            "convection_coefficient": _sig(self.convection_coefficient),
            "vertical_opening_area_m2": _sig(self.vertical_opening_area_m2),
            "area_factor": _sig(self.area_factor),
            "t_max_min": _r(self.t_max_min),
            "x_factor": _sig(self.x_factor),
            "cooling_rate_C_h": _sig(self.cooling_rate_C_h),
            "burnout_time_min": _r(self.burnout_time_min),
            "source_file": self.source_file,
            "equivalence_factors": _round_tree(self.equivalence_factors),
        }


@dataclass
class MemberResult:
    """Verdict of one member: design fire (cooling included) and the standard fire."""

    name: str
    kind: str
    section_factor_per_m: float
    protection: str | None
    thickness_mm: float | None
    critical_temperature_C: float
    critical_temperature_source: str
    peak_steel_temperature_C: float
    time_of_peak_steel_min: float
    standard_fire_time_to_critical_min: float | None
    required_minutes: float | None
    shadow_factor: float | None = None
    utilisation: float | None = None
    steel_temperature_C: np.ndarray | None = field(default=None, repr=False)
    equivalence: dict | None = None
    sizing: dict | None = None

    @property
    def margin_C(self) -> float:
        return self.critical_temperature_C - self.peak_steel_temperature_C

    @property
    def passes(self) -> bool:
        return round(self.peak_steel_temperature_C, 2) <= round(self.critical_temperature_C, 2)

    @property
    def meets_required_period(self) -> bool | None:
        if self.required_minutes is None:
            return None
        t = self.standard_fire_time_to_critical_min
        return t is None or round(t, 2) >= self.required_minutes

    @property
    def ok(self) -> bool:
        return self.passes and self.meets_required_period is not False

    def to_dict(self) -> dict:
        return {
            "name": self.name,
            "kind": self.kind,
            "peak_steel_temperature_C": _r(self.peak_steel_temperature_C),
            "time_of_peak_steel_min": _r(self.time_of_peak_steel_min),
            "critical_temperature_C": _r(self.critical_temperature_C),
            "passes": self.passes,
            "margin_C": _r(self.margin_C),
            "standard_fire_time_to_critical_min": _r(self.standard_fire_time_to_critical_min),
            "meets_required_period": self.meets_required_period,
            # additions to the contract
            "section_factor_per_m": _sig(self.section_factor_per_m),
            "protection": self.protection,
            "thickness_mm": _sig(self.thickness_mm),
            "shadow_factor": _sig(self.shadow_factor),
            "utilisation": _sig(self.utilisation),
            "critical_temperature_source": self.critical_temperature_source,
            "required_minutes": _sig(self.required_minutes),
            "equivalence": _equivalence_dict(self.equivalence),
            **({"sizing": _sizing_dict(self.sizing)} if self.sizing is not None else {}),
        }


@dataclass
class AnalysisResult:
    """Everything one run of a case produced."""

    title: str
    fire: FireResult
    members: list
    code_values: dict
    warnings: list
    out_of_scope: list
    time_step_s: float
    standard_horizon_min: float
    cautions: tuple

    @property
    def all_ok(self) -> bool:
        return all(m.ok for m in self.members)

    def to_dict(self) -> dict:
        from . import __version__

        return {
            "title": self.title,
            "fire": self.fire.to_dict(),
            "members": [m.to_dict() for m in self.members],
            "code_values": dict(self.code_values),
            "warnings": list(self.warnings),
            # additions to the contract
            "out_of_scope": list(self.out_of_scope),
            "analysis": {"time_step_s": self.time_step_s, "standard_horizon_min": self.standard_horizon_min},
            "cautions": list(self.cautions),
            "steelfire_version": __version__,
        }
