"""Result objects of an analysis and their JSON / CSV forms.

Numbers are kept at full precision here; the JSON carries them rounded to what a report shows
(0.01 C, 0.01 min, 6 significant figures for factors), so that the report and the JSON agree.
"""

from __future__ import annotations

import json
import math
from collections.abc import Sequence
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
    a = _float_column(values)
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


def _float_column(values) -> np.ndarray:
    """``values`` as a float array, NaN for None (a float array is taken as it is)."""
    if isinstance(values, np.ndarray) and values.dtype == np.float64:
        return values
    return np.array([np.nan if v is None else v for v in values], dtype=float)


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
    a = _float_column(values)
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
    for i in np.flatnonzero(~exact & ~np.isnan(a)):  # NaN (None given) stays NaN: null
        v = _sig(float(a[i]), n)
        r[i] = np.nan if v is None else v
    return r if as_array else none_for_nan(r)


def _column(rows, key):
    return [None if r is None else r[key] for r in rows]


def _member_columns(ms) -> dict:
    """The rounded columns of the member entries of MemberResult objects ``ms``: float arrays (NaN
    for null) for the numbers, lists of Python values for the rest (:func:`_rounded_columns`)."""
    eqs = [m.equivalence for m in ms]
    raw = {k: [getattr(m, k) for m in ms] for k in _RAW_KEYS}
    raw["margin_C"] = [m.critical_temperature_C - m.peak_steel_temperature_C for m in ms]
    for k in _EQ_NUMBER_KEYS:
        raw["eq." + k] = _column(eqs, k)
    c = _rounded_columns(raw)
    c["equivalence"] = eqs
    return c


#: The member values the document's entries are made from (attributes of MemberResult and of
#: MemberTable alike); margin_C and the equivalence numbers come besides.
_RAW_KEYS = ("name", "kind", "peak_steel_temperature_C", "time_of_peak_steel_min", "critical_temperature_C",
             "standard_fire_time_to_critical_min", "section_factor_per_m", "protection", "thickness_mm",
             "shadow_factor", "utilisation", "critical_temperature_source", "required_minutes")
#: The number keys of a member's equivalence entry, in document order.
_EQ_NUMBER_KEYS = ("annex_f_min", "cib_w14_min", "equal_temperature_min", "annex_f_k_c",
                   "annex_f_small_compartment_min")


def _rounded_columns(raw) -> dict:
    """The member entries' columns rounded as the document carries them (0.01, or six significant
    figures for the keys of _SIG6_KEYS), with the verdicts derived from the rounded numbers
    (``passes``, ``meets_required_period``), as :attr:`MemberResult.passes` and
    :attr:`MemberResult.meets_required_period` derive them. ``raw``: key -> the unrounded values
    (lists, None for null, or float arrays, NaN for null), equivalence numbers as ``eq.<key>``."""
    c = {k: raw[k] for k in _TEXT_KEYS}
    for k, v in raw.items():
        if k not in _TEXT_KEYS:
            c[k] = sig_column(v, as_array=True) if k in _SIG6_KEYS else round_column(v, as_array=True)
    req_raw = raw["required_minutes"]
    req = _float_column(req_raw)
    t_std = c["standard_fire_time_to_critical_min"]
    meets = (np.isnan(t_std) | (t_std >= req)).tolist()  # NaN t_std: not reached within the horizon
    c["passes"] = (c["peak_steel_temperature_C"] <= c["critical_temperature_C"]).tolist()
    c["meets_required_period"] = [None if q != q else v for v, q in zip(meets, req.tolist())]  # NaN: no period
    return c


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


#: String columns of a member entry, and the types their values may have.
_TEXT_KEYS = ("name", "kind", "protection", "critical_temperature_source")
_TEXT_TYPES = frozenset({str, type(None)})


def members_json_compact(members) -> str:
    """``json.dumps(member_dicts(members), separators=(",", ":"), allow_nan=False)``, without the dicts.

    The member entries of a large schedule written straight from the rounded columns by
    :func:`steelfire.jsontext.objects_json` (a numba kernel writes keys and numbers; strings go
    through the json module's own escaper, the small dicts of equivalence verdicts through
    ``json.dumps``, memoised by value), so the text is the one ``json.dumps`` writes, character for
    character (tests/test_jsontext.py). Members with a sizing entry, and any value the kernel cannot
    vouch for, go through ``json.dumps``.
    """
    ms = list(members)
    if not ms or any(m.sizing is not None for m in ms):
        return json.dumps(member_dicts(ms), **_COMPACT)
    c = _member_columns(ms)
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
            t = _verdict_json(uncons, resists, meets)
            if plain:
                verdicts[key] = t
        return t

    text = _columns_json_compact(c, has_eq, [verdict_text(eqs[i]) for i in has_eq])
    return json.dumps(member_dicts(ms), **_COMPACT) if text is None else text


_COMPACT = {"separators": (",", ":"), "allow_nan": False}


def _verdict_json(uncons, resists, meets) -> str:
    """The text of an equivalence entry from its "unconservative" key's value to the end of its
    "meets_required" value: ``[...],"resists":{...},"meets_required":...``."""
    part = {"unconservative": list(uncons), "resists": dict(resists),
            "meets_required": None if meets is None else dict(meets)}
    return json.dumps(part, **_COMPACT)[len('{"unconservative":'):-1]


def _columns_json_compact(c, has_eq, verdict_texts):
    """The compact JSON list of member entries from their rounded columns ``c``
    (:func:`_rounded_columns`); ``has_eq``: the members with an equivalence entry, ``verdict_texts``
    their verdicts' text (:func:`_verdict_json`). None where a value is one the writer does not vouch
    for (the caller then uses json.dumps)."""
    from steelfire.outputs.jsontext import Numbers, objects_json

    n = len(c["name"])
    esc = json.encoder.encode_basestring_ascii
    cols = {}
    for k in _MEMBER_KEYS:
        col = c[k]
        if k in _TEXT_KEYS:
            if not set(map(type, col)) <= _TEXT_TYPES:
                return None
            if k == "name":
                cols[k] = ["null" if v is None else esc(v) for v in col]
            else:  # few distinct values: each escaped once
                text = {v: "null" if v is None else esc(v) for v in set(col)}
                cols[k] = [text[v] for v in col]
        elif k in ("passes", "meets_required_period"):
            cols[k] = ["null" if v is None else ("true" if v else "false") for v in col]
        else:
            cols[k] = Numbers(col, sig=6 if k in _SIG6_KEYS else 0)
    every = len(has_eq) == n

    def eq_numbers(k, sig=0):
        col = c["eq." + k]
        return Numbers(col if every else col[has_eq], sig=sig)

    eq_cols = {k: eq_numbers(k) for k in ("annex_f_min", "cib_w14_min", "equal_temperature_min")}
    # the value of "unconservative" carries "resists" and "meets_required" after it, keys included
    eq_cols["unconservative"] = verdict_texts
    eq_cols["annex_f_k_c"] = eq_numbers("annex_f_k_c", sig=6)
    eq_cols["annex_f_small_compartment_min"] = eq_numbers("annex_f_small_compartment_min")
    eq_text = objects_json(eq_cols, row_separator="\n") if has_eq else ""
    if eq_text is None:
        return None
    eq_rows = eq_text.split("\n") if has_eq else []
    if every:
        cols["equivalence"] = eq_rows
    else:
        cols["equivalence"] = ["null"] * n
        for i, t in zip(has_eq, eq_rows):
            cols["equivalence"][i] = t
    text = objects_json(cols)
    return None if text is None else "[" + text + "]"


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


#: The verdict bits of one member's equivalence entry (EquivalenceColumns.code), lowest first.
_VERDICT_BITS = ("has_annex_f", "has_cib_w14", "has_equal_temperature", "uncons_annex_f", "uncons_cib_w14",
                 "has_required", "meets_annex_f", "meets_cib_w14", "meets_equal_temperature",
                 "meets_equal_temperature_given", "resists_annex_f", "resists_cib_w14", "resists_equal_temperature")


@dataclass(eq=False)
class EquivalenceColumns:
    """The members' equivalence entries by column: the routes' times as float arrays (NaN for null)
    and, per member, a small integer ``code`` naming its verdicts (which routes are unconservative,
    which stay within the required period, which the member resists; bits :data:`_VERDICT_BITS`);
    ``verdicts[code]`` spells one out as (unconservative routes, resists pairs, meets_required
    pairs or None).

    A schedule has few distinct verdicts however many members it holds, so the verdicts are worded
    (and written to JSON) once per distinct code, not once per member.
    """

    annex_f_min: np.ndarray
    cib_w14_min: np.ndarray
    equal_temperature_min: np.ndarray
    annex_f_k_c: np.ndarray
    annex_f_small_compartment_min: np.ndarray
    code: np.ndarray
    verdicts: list

    def __len__(self):
        return len(self.code)

    def unconservative_any(self) -> np.ndarray:
        """Per member: is any route flagged unconservative."""
        flagged = np.array([bool(v[0]) for v in self.verdicts], dtype=bool)
        return flagged[self.code] if len(self.code) else np.zeros(0, dtype=bool)

    def entries(self) -> list:
        """One dict per member, the form of ``MemberResult.equivalence``."""
        a_l, w_l, d_l, kc_l, small_l = (none_for_nan(v) for v in (
            self.annex_f_min, self.cib_w14_min, self.equal_temperature_min, self.annex_f_k_c,
            self.annex_f_small_compartment_min))
        verdicts = self.verdicts
        out = []
        for ai, wi, di, kci, si, c in zip(a_l, w_l, d_l, kc_l, small_l, self.code.tolist()):
            uncons, resists, meets = verdicts[c]
            out.append({"annex_f_min": ai, "cib_w14_min": wi, "equal_temperature_min": di,
                        "unconservative": list(uncons), "resists": dict(resists),
                        "annex_f_small_compartment_min": si, "meets_required": None if meets is None else dict(meets),
                        "annex_f_k_c": kci, "equal_temperature_beyond_horizon": di is None})
        return out


class MemberTable:
    """The members' verdicts of one run by column, as :func:`steelfire.analysis.analyse` computes
    them: the source of the MemberResult objects (:meth:`members`) and of the document's member
    entries (:meth:`columns`), so that a long schedule needs neither an object nor a dict per member
    to be judged and written.

    Lists hold the members' own values (None where absent); arrays the computed ones:
    ``critical_temperature_C``, ``peak_steel_temperature_C``, ``time_of_peak_steel_min``,
    ``standard_fire_time_to_critical_min`` (NaN: not reached within the horizon); ``histories`` the
    design-fire steel temperatures (time x member) or None; ``equivalence`` an
    :class:`EquivalenceColumns`.
    """

    def __init__(self, *, name, kind, section_factor_per_m, protection, thickness_mm, critical_temperature_C,
                 critical_temperature_source, peak_steel_temperature_C, time_of_peak_steel_min,
                 standard_fire_time_to_critical_min, required_minutes, shadow_factor, utilisation, histories,
                 equivalence):
        self.name = name
        self.kind = kind
        self.section_factor_per_m = section_factor_per_m
        self.protection = protection
        self.thickness_mm = thickness_mm
        self.critical_temperature_C = np.asarray(critical_temperature_C, dtype=float)
        self.critical_temperature_source = critical_temperature_source
        self.peak_steel_temperature_C = np.asarray(peak_steel_temperature_C, dtype=float)
        self.time_of_peak_steel_min = np.asarray(time_of_peak_steel_min, dtype=float)
        self.standard_fire_time_to_critical_min = np.asarray(standard_fire_time_to_critical_min, dtype=float)
        self.required_minutes = required_minutes
        self.shadow_factor = shadow_factor
        self.utilisation = utilisation
        self.histories = histories
        self.equivalence = equivalence
        self._columns = None  # the rounded columns, made once

    def __len__(self):
        return len(self.name)

    def members(self) -> list:
        """One :class:`MemberResult` per member (histories copied out of the table)."""
        n = len(self)
        eqs = self.equivalence.entries() if self.equivalence is not None else [None] * n
        hist = self.histories
        return [
            MemberResult(name=nm, kind=k, section_factor_per_m=sf, protection=p, thickness_mm=d,
                         critical_temperature_C=cr, critical_temperature_source=src, peak_steel_temperature_C=pk,
                         time_of_peak_steel_min=pt, standard_fire_time_to_critical_min=tc, required_minutes=rq,
                         shadow_factor=ksh, utilisation=mu,
                         steel_temperature_C=None if hist is None else hist[:, i].copy(), equivalence=e)
            for i, (nm, k, sf, p, d, cr, src, pk, pt, tc, rq, ksh, mu, e) in enumerate(zip(
                self.name, self.kind, self.section_factor_per_m, self.protection, self.thickness_mm,
                self.critical_temperature_C.tolist(), self.critical_temperature_source,
                self.peak_steel_temperature_C.tolist(), self.time_of_peak_steel_min.tolist(),
                none_for_nan(self.standard_fire_time_to_critical_min), self.required_minutes, self.shadow_factor,
                self.utilisation, eqs))]

    def columns(self) -> dict:
        """The rounded columns of the member entries (equal to those of :meth:`members`' objects)."""
        if self._columns is None:
            self._columns = self._rounded()
        return self._columns

    def _rounded(self) -> dict:
        raw = {k: getattr(self, k) for k in _RAW_KEYS}
        raw["margin_C"] = self.critical_temperature_C - self.peak_steel_temperature_C
        e = self.equivalence
        for k in _EQ_NUMBER_KEYS:
            raw["eq." + k] = getattr(e, k) if e is not None else np.full(len(self), np.nan)
        return _rounded_columns(raw)

    def ok(self) -> np.ndarray:
        """Per member: passes the design fire and meets its required period (MemberResult.ok)."""
        c = self.columns()
        short = np.array([q is False for q in c["meets_required_period"]], dtype=bool)
        return np.array(c["passes"], dtype=bool) & ~short

    def json_compact(self) -> str:
        """The compact JSON list of the member entries (as :func:`members_json_compact` of :meth:`members`)."""
        c = self.columns()
        e = self.equivalence
        if e is None:
            text = _columns_json_compact(c, [], [])
        else:
            texts = [_verdict_json(*v) for v in e.verdicts]
            text = _columns_json_compact(c, range(len(self)), [texts[k] for k in e.code.tolist()])
        return json.dumps(member_dicts(self.members()), **_COMPACT) if text is None else text


class MemberResults(Sequence):
    """The member results of a run: a sequence of :class:`MemberResult`, made from the run's
    :class:`MemberTable` when first asked for.

    Until then :attr:`table` is that table, and the result document is written from its columns;
    once the objects exist they are the results (a change made to one shows in the document) and
    :attr:`table` is None.
    """

    def __init__(self, table: MemberTable):
        self._table = table
        self._items = None

    @property
    def table(self):
        return self._table if self._items is None else None

    def _list(self) -> list:
        if self._items is None:
            self._items = self._table.members()
        return self._items

    def __len__(self):
        return len(self._table) if self._items is None else len(self._items)

    def __getitem__(self, i):
        return self._list()[i]

    def __iter__(self):
        return iter(self._list())

    def __eq__(self, other):
        if isinstance(other, MemberResults):
            other = other._list()
        return isinstance(other, (list, tuple)) and self._list() == list(other)

    def __repr__(self):
        return f"MemberResults({self._list()!r})"


def _table_of(members):
    """The MemberTable the document can be written from, or None (objects given or made)."""
    return members.table if isinstance(members, MemberResults) else None


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
        t = _table_of(self.members)
        return bool(np.all(t.ok())) if t is not None else all(m.ok for m in self.members)

    def to_dict(self) -> dict:
        return self._document(member_dicts(self.members))

    def to_json_compact(self) -> str:
        """``json.dumps(self.to_dict(), separators=(",", ":"), allow_nan=False)``, members written by column.

        The member entries come from :func:`members_json_compact` (no dict per member); the rest of
        the document goes through ``json.dumps``. Same text, character for character.
        """
        t = _table_of(self.members)
        parts = []
        for key, value in self._document(None).items():
            if key == "members":
                text = t.json_compact() if t is not None else members_json_compact(self.members)
            else:
                text = json.dumps(value, **_COMPACT)
            parts.append(json.dumps(key) + ":" + text)
        return "{" + ",".join(parts) + "}"

    def _document(self, members) -> dict:
        from steelfire import __version__

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
