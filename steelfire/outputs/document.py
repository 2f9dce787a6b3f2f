"""The result document: what ``--json`` prints and results.json holds, serialised by orjson.

:func:`build` gives the document of the JSON contract (title, fire, members, code values, warnings, ...)
from a run's :class:`~steelfire.results.AnalysisResult`; :func:`full` adds what results.json carries
for the report (run stamp, case inputs, the sources of the code values, the fire's report rows, a
summary). Numbers are rounded here, by column, to what the report shows.
"""

from __future__ import annotations

import datetime as _dt
import hashlib
from pathlib import Path

import numpy as np
import orjson

from steelfire.results import none_for_nan, round_column, rounded, sig, sig_column

#: Keys of the ``fire`` object every document has, in order (null where the fire model does not set them).
CONTRACT_FIRE_KEYS = ("curve", "opening_factor_m05", "opening_height_m", "thermal_inertia", "design_fire_load_MJ_m2",
                      "total_area_fire_load_MJ_m2", "gamma", "gamma_lim", "k_factor", "t_lim_min", "regime",
                      "peak_gas_temperature_C", "time_of_peak_gas_min")

#: Member keys in document order up to the equivalence entry; those of SIG6_KEYS to six significant
#: figures, the other numbers to 0.01.
MEMBER_KEYS = ("name", "kind", "peak_steel_temperature_C", "time_of_peak_steel_min", "critical_temperature_C",
               "passes", "margin_C", "standard_fire_time_to_critical_min", "meets_required_period",
               "section_factor_per_m", "protection", "thickness_mm", "shadow_factor", "utilisation",
               "critical_temperature_source", "required_minutes")
SIG6_KEYS = ("section_factor_per_m", "thickness_mm", "shadow_factor", "utilisation", "required_minutes")


def dumps(doc, indent: bool = True) -> bytes:
    """The document as JSON bytes (UTF-8; NaN is never written: the document holds null for it)."""
    return orjson.dumps(doc, option=orjson.OPT_INDENT_2 if indent else 0)


def _value(q, v):
    """A fire quantity's value as the document carries it (``q.digits`` decimals, else 6 significant)."""
    if v is None or isinstance(v, (str, bool)):
        return v
    return rounded(v, q.digits) if q.digits is not None else sig(v)


def fire_entry(fire) -> dict:
    """The ``fire`` object: the contract keys, then duration and alpha_c, then the model's other values."""
    by_key = {q.key: q for q in fire.quantities}
    out = {}
    for k in CONTRACT_FIRE_KEYS:
        if k == "curve":
            out[k] = fire.curve
        elif k == "peak_gas_temperature_C":
            out[k] = rounded(fire.peak_gas_temperature_C)
        elif k == "time_of_peak_gas_min":
            out[k] = rounded(fire.time_of_peak_gas_min)
        else:
            q = by_key.get(k)
            out[k] = _value(q, fire.values.get(k)) if q is not None else None
    out["duration_min"] = rounded(fire.duration_min)
    out["convection_coefficient"] = sig(fire.convection_coefficient)
    for q in fire.quantities:
        if q.key not in out:
            out[q.key] = _value(q, fire.values.get(q.key))
    out["equivalence_factors"] = _sig_tree(fire.equivalence_factors)
    return out


def _sig_tree(v):
    """Factors for output: floats to 6 significant figures, containers walked."""
    if isinstance(v, dict):
        return {k: _sig_tree(x) for k, x in v.items()}
    if isinstance(v, (list, tuple)):
        return [_sig_tree(x) for x in v]
    if isinstance(v, float):
        return sig(v)
    return v


#: The clause of each design-fire model's curve and of its convective coefficient.
CURVE_CLAUSES = {
    "standard": ("EN 1991-1-2 3.2.1 eq (3.4), ISO 834", "EN 1991-1-2 3.2.1(3)"),
    "external": ("EN 1991-1-2 3.2.2 eq (3.5)", "EN 1991-1-2 3.2.2(2)"),
    "hydrocarbon": ("EN 1991-1-2 3.2.3 eq (3.6)", "EN 1991-1-2 3.2.3(2)"),
    "parametric": ("EN 1991-1-2 Annex A eq (A.1), (A.11)", "EN 1991-1-2 3.3.1.1(3)"),
    "table": ("the case's table (time_min, temperature_C)", "EN 1991-1-2 3.3.1.1(3)"),
    "localised": ("EN 1991-1-2 Annex C, heat release Annex E.4", "EN 1991-1-2 C.(10)"),
    "travelling": ("Stern-Gottfried and Rein 2012; Rackauskaite et al. 2015", "EN 1991-1-2 3.3.1.1(3)"),
}


def fire_rows(fire) -> list:
    """The design fire's report rows: the curve and alpha_c with their clauses, then the model's own values
    (label, symbol, key in the ``fire`` object, unit, clause)."""
    curve_clause, alpha_clause = CURVE_CLAUSES.get(fire.curve, ("", ""))
    rows = [{"key": "curve", "label": "design fire", "symbol": "", "unit": "", "clause": curve_clause},
            {"key": "convection_coefficient", "label": "convective heat transfer coefficient", "symbol": "alpha_c",
             "unit": "W/(m2 K)", "clause": alpha_clause}]
    return rows + [{"key": q.key, "label": q.label, "symbol": q.symbol, "unit": q.unit, "clause": q.clause}
                   for q in fire.quantities]


def _sizing_entry(s):
    return {"standard_period_mm": rounded(s["standard_period_mm"]), "burnout_mm": rounded(s["burnout_mm"]),
            "governing": s["governing"], "chosen_mm": rounded(s["chosen_mm"]), "achievable": bool(s["achievable"]),
            "note": s["note"], "supplied_range_mm": s["supplied_range_mm"],
            "specified_mm": rounded(s.get("specified_mm")), "specified_ok": s.get("specified_ok"),
            "specified_passes": s.get("specified_passes"),
            "specified_meets_required_period": s.get("specified_meets_required_period"),
            "specified_marginal": s.get("specified_marginal"), "change": s.get("change")}


def member_entries(table) -> list:
    """One dict per member, rounded by column."""
    c = table.columns
    r = table.rounded()
    cols = {
        "name": c["name"], "kind": c["kind"],
        "peak_steel_temperature_C": none_for_nan(r["peak_steel_temperature_C"]),
        "time_of_peak_steel_min": none_for_nan(r["time_of_peak_steel_min"]),
        "critical_temperature_C": none_for_nan(r["critical_temperature_C"]),
        "passes": r["passes"].tolist(), "margin_C": none_for_nan(r["margin_C"]),
        "standard_fire_time_to_critical_min": none_for_nan(r["standard_fire_time_to_critical_min"]),
        "meets_required_period": r["meets_required_period"],
        "protection": c["protection"], "critical_temperature_source": c["critical_temperature_source"],
    }
    for k in SIG6_KEYS:
        cols[k] = none_for_nan(sig_column(c[k]))
    e = table.equivalence
    if e is not None:
        eq_cols = {k: none_for_nan(round_column(getattr(e, k)))
                   for k in ("annex_f_min", "cib_w14_min", "equal_temperature_min", "annex_f_small_compartment_min")}
        eq_cols["annex_f_k_c"] = none_for_nan(sig_column(e.annex_f_k_c))
        codes = e.code.tolist()
    out = []
    for i in range(len(table)):
        d = {k: cols[k][i] for k in MEMBER_KEYS}
        if e is not None:
            uncons, resists, meets = e.verdicts[codes[i]]
            d["equivalence"] = {
                "annex_f_min": eq_cols["annex_f_min"][i], "cib_w14_min": eq_cols["cib_w14_min"][i],
                "equal_temperature_min": eq_cols["equal_temperature_min"][i], "unconservative": list(uncons),
                "resists": dict(resists), "meets_required": None if meets is None else dict(meets),
                "annex_f_k_c": eq_cols["annex_f_k_c"][i],
                "annex_f_small_compartment_min": eq_cols["annex_f_small_compartment_min"][i]}
        else:
            d["equivalence"] = None
        for k in ("section", "exposure", "encasement"):
            d[k] = c[k][i] if k in c else None
        x = table.extras
        if "conduction_peak_C" in x:
            d["conduction_peak_C"] = rounded(x["conduction_peak_C"][i])
            d["model_difference_C"] = rounded(x["model_difference_C"][i])
            d["lumped_valid"] = x["lumped_valid"][i]
            d["verdict_model"] = x["verdict_model"][i]
            d["step_sensitivity_C"] = rounded(x["step_sensitivity_C"][i])
            d["step_sensitivity_min"] = rounded(x["step_sensitivity_min"][i])
            d["marginal"] = bool(x["marginal"][i])
        if c.get("governing_exposure") is not None:
            d["governing_exposure"] = c["governing_exposure"][i]
        if "resistance" in c:
            d["resistance"] = _sig_tree(c["resistance"][i])
        if "details" in c:
            d["details"] = _sig_tree(c["details"][i])
        if table.sizing is not None:
            d["sizing"] = _sizing_entry(table.sizing[i])
        out.append(d)
    return out


def build(result) -> dict:
    """The document of the JSON contract for ``result`` (what ``--json`` prints)."""
    from steelfire._version import __version__

    return {
        "title": result.title,
        "fire": fire_entry(result.fire),
        "fire_rows": fire_rows(result.fire),
        "members": member_entries(result.table),
        "code_values": dict(result.code_values),
        "warnings": list(result.warnings),
        "out_of_scope": list(result.out_of_scope),
        "analysis": {"time_step_s": result.time_step_s, "standard_horizon_min": result.standard_horizon_min},
        "cautions": list(result.cautions),
        "steelfire_version": __version__,
    }


def file_sha256(path) -> str:
    """SHA-256 (hex) of a file's bytes."""
    h = hashlib.sha256()
    with open(path, "rb") as fh:
        for chunk in iter(lambda: fh.read(1 << 16), b""):
            h.update(chunk)
    return h.hexdigest()


def _num(v):
    """An input number for the document: 6 significant figures, ints kept, None kept."""
    if v is None or isinstance(v, (bool, int)):
        return v
    return sig(float(v))


def case_inputs(case) -> dict:
    """The case's inputs the report lists (fire, analysis, compartment, fire load, materials used)."""
    out = {"title": case.title}
    f = case.fire
    out["fire"] = {"curve": f.curve, "duration_min": _num(f.duration_min),
                   "file": Path(f.file).name if f.file is not None else None,
                   "convection_coefficient": _num(f.convection_coefficient)}
    a = case.analysis
    out["analysis"] = {"time_step_s": _num(a.time_step_s), "standard_horizon_min": _num(a.standard_horizon_min),
                       "allow_out_of_scope": bool(a.allow_out_of_scope)}
    c = case.compartment
    out["compartment"] = None if c is None else {
        "floor_area_m2": _num(c.floor_area_m2), "height_m": _num(c.height_m),
        "boundary_area_m2": _num(c.boundary_area_m2), "roof_opening_area_m2": _num(c.roof_opening_area_m2),
        "thermal_inertia": _num(c.thermal_inertia),
        "openings": [{"width_m": _num(o.width_m), "height_m": _num(o.height_m), "count": int(o.count)}
                     for o in c.openings],
        "surfaces": [{"area_m2": _num(s.area_m2),
                      "layers": [{"thickness_m": _num(L.thickness_m), "density": _num(L.density),
                                  "conductivity": _num(L.conductivity), "specific_heat": _num(L.specific_heat)}
                                 for L in s.layers]} for s in c.surfaces]}
    fl = case.fire_load
    out["fire_load"] = None if fl is None else {
        "characteristic_MJ_m2": _num(fl.characteristic_MJ_m2), "design_MJ_m2": _num(fl.design_MJ_m2),
        "combustion_factor": _num(fl.combustion_factor),
        "area_factor": fl.area_factor if isinstance(fl.area_factor, str) else _num(fl.area_factor),
        "occupancy_factor": _num(fl.occupancy_factor), "measures_factor": _num(fl.measures_factor),
        "growth": fl.growth}
    used = {m.protection for m in case.members if m.protection is not None}
    mats = []
    for name, m in sorted(case.materials.items()):
        if name not in used:
            continue
        cond = m.conductivity
        cond = [[_num(t), _num(v)] for t, v in cond] if isinstance(cond, tuple) else _num(cond)
        mats.append({"name": name, "density": _num(m.density), "conductivity": cond,
                     "specific_heat": _num(m.specific_heat), "moisture_percent": _num(m.moisture_percent),
                     "moisture_delay_basis": m.moisture_delay_basis,
                     "description": m.description})
    out["materials"] = mats
    out["code_overrides"] = {k: _num(v) for k, v in sorted(case.code_overrides.items())}
    return out


def full(result, case=None, case_path=None, command: str = "check", now=None) -> dict:
    """The document of results.json: :func:`build` plus ``run`` (the stamp: version, UTC time, command,
    case file and fire table with their SHA-256), ``inputs`` (the case values the report lists),
    ``code_value_sources`` (unit and clause of each code value), ``fire_rows`` (the design fire's
    intermediate values as report rows) and ``summary`` (verdict counts)."""
    from steelfire._version import __version__
    from steelfire.codevalues import DEFINITIONS

    doc = build(result)
    now = now or _dt.datetime.now(_dt.timezone.utc)
    stamp = {"steelfire_version": __version__, "command": command,
             "utc": now.astimezone(_dt.timezone.utc).strftime("%Y-%m-%dT%H:%M:%SZ"),
             "case_file": None, "case_sha256": None, "fire_table_file": None, "fire_table_sha256": None}
    if case_path is not None:
        stamp["case_file"] = Path(case_path).name
        stamp["case_sha256"] = file_sha256(case_path)
    if case is not None and case.fire.file is not None and Path(case.fire.file).is_file():
        stamp["fire_table_file"] = Path(case.fire.file).name
        stamp["fire_table_sha256"] = file_sha256(case.fire.file)
    doc["run"] = stamp
    doc["record"] = dict(case.record) if case is not None else {}
    doc["inputs"] = case_inputs(case) if case is not None else None
    doc["code_value_sources"] = {k: {"unit": DEFINITIONS[k].unit, "clause": DEFINITIONS[k].clause}
                                 for k in doc["code_values"] if k in DEFINITIONS}
    ms = doc["members"]
    sized = [d["sizing"] for d in ms if isinstance(d.get("sizing"), dict)]
    doc["summary"] = {
        "members": len(ms),
        "pass_design_fire": sum(1 for d in ms if d["passes"]),
        "fail_design_fire": sum(1 for d in ms if not d["passes"]),
        "with_required_period": sum(1 for d in ms if d["meets_required_period"] is not None),
        "meet_required_period": sum(1 for d in ms if d["meets_required_period"] is True),
        "short_of_required_period": sum(1 for d in ms if d["meets_required_period"] is False),
        "ok": sum(1 for d in ms if d["passes"] and d["meets_required_period"] is not False),
        "all_ok": all(d["passes"] and d["meets_required_period"] is not False for d in ms),
        "unconservative_equivalence": sum(1 for d in ms if (d.get("equivalence") or {}).get("unconservative")),
        "sized": len(sized),
        "sizing_not_achievable": sum(1 for s in sized if s.get("achievable") is False),
        "warnings": len(doc["warnings"]),
    }
    return orjson.loads(dumps(doc, indent=False))


def histories_array(result) -> np.ndarray:
    """time [min], gas [C] and each member's design-fire steel temperature [C] as columns (T x (2 + N))."""
    f = result.fire
    h = result.table.histories
    cols = [np.asarray(f.time_s, dtype=float) / 60.0, np.asarray(f.gas_temperature_C, dtype=float)]
    return np.column_stack(cols + ([] if h is None else [h]))
