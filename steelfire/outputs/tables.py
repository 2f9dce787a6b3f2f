"""Tables of a run as CSV: members.csv, histories.csv and the protection schedule of ``size --csv``.

Every number is formatted from the result document, so that the CSV files and results.json agree.
"""

from __future__ import annotations

import csv
import io
import json

import numpy as np

from steelfire.outputs.document import histories_array

#: Characters that make a spreadsheet read a cell as a formula (CSV and xlsx formula injection); text that
#: starts with one is written with a leading apostrophe, which spreadsheets show as text and never evaluate.
FORMULA_STARTS = ("=", "+", "-", "@", "\t", "\r")


def safe_text(text) -> str:
    """A text cell for a file a spreadsheet may open: a leading apostrophe where it would start a formula."""
    text = str(text)
    return "'" + text if text.startswith(FORMULA_STARTS) else text

_MEMBER_COLUMNS = ("name", "kind", "section_factor_per_m", "shadow_factor", "protection", "thickness_mm",
                   "utilisation", "critical_temperature_C", "critical_temperature_source",
                   "peak_steel_temperature_C", "time_of_peak_steel_min", "margin_C", "passes",
                   "standard_fire_time_to_critical_min", "required_minutes", "meets_required_period", "marginal")
_EQUIV_COLUMNS = ("annex_f_min", "annex_f_small_compartment_min", "annex_f_k_c", "cib_w14_min",
                  "equal_temperature_min")
_MEETS_ROUTES = ("annex_f", "cib_w14", "equal_temperature")
#: Sizing keys in their column order (others a sizing dict carries follow, sorted).
SIZING_KEYS = ("standard_period_mm", "burnout_mm", "governing", "chosen_mm", "achievable", "supplied_range_mm",
               "iterations", "note")


def _csv_value(v):
    if v is None:
        return ""
    if isinstance(v, bool):
        return "true" if v else "false"
    if isinstance(v, float):
        return format_number(v)
    if isinstance(v, int):
        return str(v)
    if isinstance(v, (list, tuple)):
        return safe_text(";".join(_csv_value(x) for x in v))
    if isinstance(v, dict):
        return safe_text(json.dumps(v, sort_keys=True))
    return safe_text(v)


def format_number(v) -> str:
    """A number as the report and the CSV files show it: JSON's repr, a trailing ``.0`` dropped."""
    if isinstance(v, bool) or v is None:
        raise TypeError(f"not a number: {v!r}")
    if isinstance(v, int):
        return str(v)
    s = repr(float(v))
    return s[:-2] if s.endswith(".0") else s


def sizing_columns(doc) -> list:
    """Sizing keys present in any member of the document, in column order."""
    keys = []
    for d in doc["members"]:
        s = d.get("sizing")
        if isinstance(s, dict):
            keys += [k for k in s if k not in keys]
    return [k for k in SIZING_KEYS if k in keys] + sorted(k for k in keys if k not in SIZING_KEYS)


def _flat(prefix, v, out):
    """Nested sizing entries as flat CSV columns (``sizing_iterations_burnout``)."""
    if isinstance(v, dict):
        for k, x in v.items():
            _flat(f"{prefix}_{k}", x, out)
    else:
        out[prefix] = v
    return out


def members_csv(doc) -> str:
    """members.csv: one row per member, the verdict columns, the equivalence columns, sizing when present.

    Sizing columns are ``sizing_<key>`` (nested entries flattened, ``sizing_iterations_burnout``;
    lists joined with ``;``); a member without sizing leaves them empty.
    """
    sized = []
    for d in doc["members"]:
        s = d.get("sizing") if isinstance(d.get("sizing"), dict) else {}
        flat = {}
        for k in sizing_columns(doc):
            if k in s:
                _flat(f"sizing_{k}", s[k], flat)
        sized.append(flat)
    sz = []
    for k in sizing_columns(doc):  # column order: the keys' order, nested entries in first-seen order
        for flat in sized:
            sz += [c for c in flat if (c == f"sizing_{k}" or c.startswith(f"sizing_{k}_")) and c not in sz]
    head = list(_MEMBER_COLUMNS) + list(_EQUIV_COLUMNS) + ["unconservative"] + \
        [f"meets_required_{r}" for r in _MEETS_ROUTES] + sz
    buf = io.StringIO()
    w = csv.writer(buf, lineterminator="\n")
    w.writerow(head)
    for d, flat in zip(doc["members"], sized):
        e = d.get("equivalence") or {}
        meets = e.get("meets_required") or {}
        row = [d.get(k) for k in _MEMBER_COLUMNS] + [e.get(k) for k in _EQUIV_COLUMNS] + \
            [e.get("unconservative") or []] + [meets.get(r) for r in _MEETS_ROUTES] + [flat.get(c) for c in sz]
        w.writerow([_csv_value(v) for v in row])
    return buf.getvalue()


def histories_csv(result) -> tuple:
    """histories.csv text: time_min, gas_C and each member's steel temperature on the design-fire grid.

    Member columns are named by member name (CSV-quoted where needed); without kept histories
    (``analyse(case, histories=False)``) only time and gas are written. For a fire that differs from
    member to member (localised, travelling) gas_C is the hottest of the members' exposures, and each
    member's own exposure follows as a column ``exposure_C <name>`` (the gas temperature its kernel was
    given, in the fire that governs it). Returns (text, names written).
    """
    arr = histories_array(result)
    names = list(result.table.name) if result.table.histories is not None else []
    head = ["time_min", "gas_C"] + [safe_text(n) for n in names]
    exposure = getattr(result.fire, "exposure_C", None)
    if names and exposure is not None:
        exposure = np.asarray(exposure, dtype=float)
        arr = np.hstack([arr, exposure[: arr.shape[0]]])
        head += [safe_text(f"exposure_C {n}") for n in names]
    buf = io.StringIO()
    csv.writer(buf, lineterminator="\n").writerow(head)
    np.savetxt(buf, arr, fmt=["%.6g"] + ["%.2f"] * (arr.shape[1] - 1), delimiter=",", newline="\n")
    return buf.getvalue(), names


#: Columns of the protection schedule (``steelfire size --csv``).
SCHEDULE_COLUMNS = ("member", "kind", "section", "section_factor_per_m", "protection", "material", "chosen_mm",
                    "governing", "standard_period_mm", "burnout_mm", "required_minutes", "critical_temperature_C",
                    "peak_steel_temperature_C", "achievable", "note")


def _fmt(v, spec, none="-"):
    return none if v is None else format(v, spec)


def schedule_csv(doc, case) -> str:
    """The protection schedule a contractor can price, one row per member, from the sizing document."""
    buf = io.StringIO()
    w = csv.writer(buf, lineterminator="\n")
    w.writerow(SCHEDULE_COLUMNS)
    for d, m in zip(doc["members"], case.members):
        s = d["sizing"]
        mat = case.materials.get(d["protection"]) if d["protection"] else None
        w.writerow([safe_text(d["name"]), d["kind"], safe_text(m.section or ""), f"{m.section_factor_per_m:g}",
                    safe_text(d["protection"] or "bare"), safe_text(mat.description if mat else ""),
                    _fmt(s["chosen_mm"], "g", ""), s["governing"] or "", _fmt(s["standard_period_mm"], "g", ""),
                    _fmt(s["burnout_mm"], "g", ""), _fmt(d["required_minutes"], "g", ""),
                    f"{d['critical_temperature_C']:g}", f"{d['peak_steel_temperature_C']:g}",
                    "yes" if s["achievable"] else "no", safe_text(s["note"])])
    return buf.getvalue()


def members_xlsx(doc) -> bytes | None:
    """members.csv as an .xlsx workbook (bytes), or None where openpyxl is not installed. Text cells are
    stored as text, never as formulas."""
    try:
        import openpyxl
    except ImportError:
        return None
    import csv as _csv

    book = openpyxl.Workbook()
    sheet = book.active
    sheet.title = "members"
    for row in _csv.reader(io.StringIO(members_csv(doc))):
        out = []
        for cell in row:
            try:
                out.append(float(cell) if cell not in ("", "nan") and not cell.startswith("'") else cell)
            except ValueError:
                out.append(cell)
        out = [None if v == "" else v for v in out]
        sheet.append(out)
    for row in sheet.iter_rows():
        for c in row:
            if isinstance(c.value, str):
                c.data_type = "s"
    buf = io.BytesIO()
    book.save(buf)
    return buf.getvalue()
