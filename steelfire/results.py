"""Result objects of an analysis and their JSON / CSV forms.

Numbers are kept at full precision here; the JSON carries them rounded to what a report shows
(0.01 C, 0.01 min, 6 significant figures for factors), so that the report and the JSON agree.
"""

from __future__ import annotations

import json
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


def round_column(values, nd=2, as_array=False):
    """``[_r(v, nd) for v in values]`` for a whole column at once (None and NaN become None).

    ``as_array``: the same values as a float array, NaN for None.

    numpy rounds as rint(v 10^nd) / 10^nd, which is the double nearest the decimal that Python's
    ``round`` gives, except where v 10^nd lies within rounding error of a half or is too large to
    be exact (2**52 and beyond): those few values are rounded by ``round`` itself, so the column
    equals the per-value form exactly.
    """
    a = np.array([np.nan if v is None else v for v in values], dtype=float)
    scale = 10.0 ** nd
    with np.errstate(invalid="ignore", over="ignore"):
        y = a * scale
        r = np.rint(y) / scale
        near_half = np.abs(y - np.floor(y) - 0.5) < 1e-6
        # from 2**52 on every double is a whole number: v 10^nd is no longer exact there
        beyond = np.isfinite(a) & ~(np.abs(y) < 2.0 ** 52)
    for i in np.flatnonzero(near_half | beyond):
        r[i] = round(float(a[i]), nd)
    return r if as_array else none_for_nan(r)


def none_for_nan(a) -> list:
    """A float array as a list of Python floats, None for NaN (JSON's null)."""
    out = a.tolist()
    for i in np.flatnonzero(np.isnan(a)):
        out[i] = None
    return out


def sig_column(values, n=6, as_array=False):
    """``[_sig(v, n) for v in values]`` for a whole column at once (n significant figures).

    ``as_array``: the same values as a float array, NaN for None.

    Rounded by numpy at the decimal place each value's magnitude gives; values near a half at that
    place, near a power of ten, zero or not finite go through :func:`_sig` itself, so the column
    equals the per-value form exactly.
    """
    values = list(values)
    a = np.array([np.nan if v is None else v for v in values], dtype=float)
    if not len(a):
        return a if as_array else []
    with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
        mag = np.abs(a)
        e = np.floor(np.log10(mag))
        e = np.where(np.isfinite(e), e, 0.0)
        nd = (n - 1) - e                       # decimal places that keep n significant figures
        pos = nd >= 0
        f_pos = 10.0 ** np.clip(nd, 0, 22)     # exact powers of ten
        f_neg = 10.0 ** np.clip(-nd, 0, 22)
        y = np.where(pos, a * f_pos, a / f_neg)
        k = np.rint(y)
        r = np.where(pos, k / f_pos, k * f_neg)
        ya = np.abs(y)
        exact = (np.isfinite(y) & (mag > 0) & (np.abs(nd) <= 22)
                 & (ya >= 10.0 ** (n - 1)) & (ya < 10.0 ** n - 0.5 - 1e-6)
                 & (np.abs(ya - np.floor(ya) - 0.5) >= 1e-6))
    for i in np.flatnonzero(~exact):
        v = _sig(values[i], n)  # None and NaN become None here
        r[i] = np.nan if v is None else v
    return r if as_array else none_for_nan(r)


def _column(rows, key):
    return [None if r is None else r[key] for r in rows]


def _member_columns(ms) -> dict:
    """The rounded columns of the member entries: float arrays (NaN for null) for the numbers,
    lists of Python values for the rest."""
    peak = round_column([m.peak_steel_temperature_C for m in ms], as_array=True)
    crit = round_column([m.critical_temperature_C for m in ms], as_array=True)
    t_std = round_column([m.standard_fire_time_to_critical_min for m in ms], as_array=True)
    req_raw = [m.required_minutes for m in ms]
    has_req = np.fromiter((q is not None for q in req_raw), dtype=bool, count=len(ms))
    req = np.array([np.nan if q is None else q for q in req_raw], dtype=float)
    meets = (np.isnan(t_std) | (t_std >= req)).tolist()  # NaN t_std: not reached within the horizon
    eqs = [m.equivalence for m in ms]
    return {
        "name": [m.name for m in ms],
        "kind": [m.kind for m in ms],
        "peak_steel_temperature_C": peak,
        "time_of_peak_steel_min": round_column([m.time_of_peak_steel_min for m in ms], as_array=True),
        "critical_temperature_C": crit,
        "passes": (peak <= crit).tolist(),
        "margin_C": round_column([m.critical_temperature_C - m.peak_steel_temperature_C for m in ms],
                                 as_array=True),
        "standard_fire_time_to_critical_min": t_std,
        "meets_required_period": [v if h else None for v, h in zip(meets, has_req.tolist())],
        # additions to the contract
        "section_factor_per_m": sig_column([m.section_factor_per_m for m in ms], as_array=True),
        "protection": [m.protection for m in ms],
        "thickness_mm": sig_column([m.thickness_mm for m in ms], as_array=True),
        "shadow_factor": sig_column([m.shadow_factor for m in ms], as_array=True),
        "utilisation": sig_column([m.utilisation for m in ms], as_array=True),
        "critical_temperature_source": [m.critical_temperature_source for m in ms],
        "required_minutes": sig_column(req_raw, as_array=True),
        "equivalence": eqs,
        "eq.annex_f_min": round_column(_column(eqs, "annex_f_min"), as_array=True),
        "eq.cib_w14_min": round_column(_column(eqs, "cib_w14_min"), as_array=True),
        "eq.equal_temperature_min": round_column(_column(eqs, "equal_temperature_min"), as_array=True),
        "eq.annex_f_k_c": sig_column(_column(eqs, "annex_f_k_c"), as_array=True),
        "eq.annex_f_small_compartment_min": round_column(_column(eqs, "annex_f_small_compartment_min"),
                                                         as_array=True),
    }


#: Keys of a member entry, in document order, up to its equivalence entry.
_MEMBER_KEYS = ("name", "kind", "peak_steel_temperature_C", "time_of_peak_steel_min", "critical_temperature_C",
                "passes", "margin_C", "standard_fire_time_to_critical_min", "meets_required_period",
                "section_factor_per_m", "protection", "thickness_mm", "shadow_factor", "utilisation",
                "critical_temperature_source", "required_minutes")


def member_dicts(members) -> list:
    """The JSON form of ``members`` (MemberResult objects), built a column at a time.

    One place for the member entries of the result document: :meth:`MemberResult.to_dict` calls it
    with one member. Columns are rounded with numpy (:func:`round_column`, :func:`sig_column`), so a
    schedule of many thousand members costs little beside its heat-transfer kernels.
    :func:`members_json_compact` writes the same entries straight to JSON text.
    """
    ms = list(members)
    if not ms:
        return []
    c = {k: none_for_nan(v) if isinstance(v, np.ndarray) else v for k, v in _member_columns(ms).items()}
    cols = [c[k] for k in _MEMBER_KEYS]
    eq_a, eq_w, eq_d = c["eq.annex_f_min"], c["eq.cib_w14_min"], c["eq.equal_temperature_min"]
    eq_kc, eq_small = c["eq.annex_f_k_c"], c["eq.annex_f_small_compartment_min"]
    out = []
    for i, (m, e) in enumerate(zip(ms, c["equivalence"])):
        d = {k: col[i] for k, col in zip(_MEMBER_KEYS, cols)}
        d["equivalence"] = None if e is None else {
            "annex_f_min": eq_a[i], "cib_w14_min": eq_w[i], "equal_temperature_min": eq_d[i],
            "unconservative": list(e["unconservative"]), "resists": dict(e["resists"]),
            "meets_required": None if e["meets_required"] is None else dict(e["meets_required"]),
            "annex_f_k_c": eq_kc[i], "annex_f_small_compartment_min": eq_small[i]}
        if m.sizing is not None:
            d["sizing"] = _sizing_dict(m.sizing)
        out.append(d)
    return out


#: Number columns of a member entry rounded to six significant figures (the others to 0.01).
_SIG6_KEYS = ("section_factor_per_m", "thickness_mm", "shadow_factor", "utilisation", "required_minutes",
              "eq.annex_f_k_c")


#: String columns of a member entry.
_TEXT_KEYS = ("name", "kind", "protection", "critical_temperature_source")


def members_json_compact(members) -> str:
    """``json.dumps(member_dicts(members), separators=(",", ":"), allow_nan=False)``, without the dicts.

    The member entries of a large schedule written straight from the rounded columns by
    :func:`steelfire.jsontext.objects_json` (a numba kernel writes keys and numbers; strings go
    through the json module's own escaper, the small dicts of equivalence verdicts through
    ``json.dumps``, memoised by value), so the text is the one ``json.dumps`` writes, character for
    character (tests/test_jsontext.py). Members with a sizing entry, and any value the kernel cannot
    vouch for, go through ``json.dumps``.
    """
    from .jsontext import Numbers, objects_json

    ms = list(members)
    compact = {"separators": (",", ":"), "allow_nan": False}
    if not ms or any(m.sizing is not None for m in ms):
        return json.dumps(member_dicts(ms), **compact)
    c = _member_columns(ms)
    esc = json.encoder.encode_basestring_ascii
    cols = {}
    for k in _MEMBER_KEYS:
        col = c[k]
        if k in _TEXT_KEYS:
            if not all(v is None or type(v) is str for v in col):
                return json.dumps(member_dicts(ms), **compact)
            cols[k] = ["null" if v is None else esc(v) for v in col]
        elif k in ("passes", "meets_required_period"):
            cols[k] = ["null" if v is None else ("true" if v else "false") for v in col]
        else:
            cols[k] = Numbers(col, sig=6 if k in _SIG6_KEYS else 0)
    eqs = c["equivalence"]
    has_eq = [i for i, e in enumerate(eqs) if e is not None]
    verdicts = {}  # the unconservative/resists/meets_required part of an entry, by value

    def verdict_text(e):
        uncons, resists, meets = e["unconservative"], e["resists"], e["meets_required"]
        # memoised only for plain str routes and bool verdicts: 1 == True == numpy.True_ as keys,
        # but json.dumps writes them differently (found by review)
        plain = (all(type(r) is str for r in uncons) and all(type(v) is bool for v in resists.values())
                 and (meets is None or all(type(v) is bool for v in meets.values())))
        key = (tuple(uncons), tuple(resists.items()), None if meets is None else tuple(meets.items()))
        t = verdicts.get(key) if plain else None
        if t is None:
            part = {"unconservative": list(uncons), "resists": dict(resists),
                    "meets_required": None if meets is None else dict(meets)}
            t = json.dumps(part, **compact)[1:-1]
            if plain:
                verdicts[key] = t
        return t

    eq_cols = {k: Numbers(c["eq." + k][has_eq]) for k in ("annex_f_min", "cib_w14_min", "equal_temperature_min")}
    # the value of "unconservative" carries "resists" and "meets_required" after it, keys included
    eq_cols["unconservative"] = [verdict_text(eqs[i])[len('"unconservative":'):] for i in has_eq]
    eq_cols["annex_f_k_c"] = Numbers(c["eq.annex_f_k_c"][has_eq], sig=6)
    eq_cols["annex_f_small_compartment_min"] = Numbers(c["eq.annex_f_small_compartment_min"][has_eq])
    eq_text = objects_json(eq_cols, row_separator="\n") if has_eq else ""
    if eq_text is None:
        return json.dumps(member_dicts(ms), **compact)
    cols["equivalence"] = ["null"] * len(ms)
    for i, t in zip(has_eq, eq_text.split("\n")):
        cols["equivalence"][i] = t
    text = objects_json(cols)
    if text is None:
        return json.dumps(member_dicts(ms), **compact)
    return "[" + text + "]"


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


@dataclass(slots=True)
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
        return member_dicts([self])[0]


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
        return self._document(member_dicts(self.members))

    def to_json_compact(self) -> str:
        """``json.dumps(self.to_dict(), separators=(",", ":"), allow_nan=False)``, members written by column.

        The member entries come from :func:`members_json_compact` (no dict per member); the rest of
        the document goes through ``json.dumps``. Same text, character for character.
        """
        compact = {"separators": (",", ":"), "allow_nan": False}
        parts = []
        for key, value in self._document(None).items():
            text = members_json_compact(self.members) if key == "members" else json.dumps(value, **compact)
            parts.append(json.dumps(key) + ":" + text)
        return "{" + ",".join(parts) + "}"

    def _document(self, members) -> dict:
        from . import __version__

        return {
            "title": self.title,
            "fire": self.fire.to_dict(),
            "members": members,
            "code_values": dict(self.code_values),
            "warnings": list(self.warnings),
            # additions to the contract
            "out_of_scope": list(self.out_of_scope),
            "analysis": {"time_step_s": self.time_step_s, "standard_horizon_min": self.standard_horizon_min},
            "cautions": list(self.cautions),
            "steelfire_version": __version__,
        }
