"""Files of one run in an output directory: results.json, members.csv, histories.csv, plots, report.html.

:func:`write_outputs` is the one entry point (the CLI's ``--out DIR`` calls it). Everything is
rendered in memory first (the result document, the CSV files, the figures, the HTML report), then
written to temporary names inside DIR and renamed into place only when every file is complete; on
any failure the temporary files are removed, so no half-written file is ever left in DIR. Nothing
outside DIR is written, and the case file is only read (for its SHA-256 in the run stamp).

The report and the CSV files are formatted from the *document* (``result.to_dict()`` plus a run
stamp, the case inputs and a summary), round-tripped through JSON, so that every number the report
shows is the number in results.json, character for character up to a trailing ``.0``.

No physics here: the numbers come from the result objects; this module only arranges and writes them.
"""

from __future__ import annotations

import csv
import datetime as _dt
import hashlib
import io
import json
import os
import secrets
import time
from dataclasses import dataclass, field
from pathlib import Path

from steelfire.errors import InputError

#: Names of the files a run writes (figures add ``fig_<name>.png`` / ``.svg``).
RESULTS_JSON = "results.json"
MEMBERS_CSV = "members.csv"
HISTORIES_CSV = "histories.csv"
REPORT_HTML = "report.html"

#: Suffix of the temporary files (hidden names, removed on failure).
_TMP_SUFFIX = ".part"


@dataclass
class WrittenOutputs:
    """What :func:`write_outputs` wrote: the directory, the file names, wall times [s] per stage."""

    out_dir: Path
    files: list
    timings_s: dict = field(default_factory=dict)
    document: dict = field(default=None, repr=False)


# ----------------------------------------------------------------------------------------------
# the document (results.json)


def _sig(v, n=6):
    from steelfire.results import _sig as sig

    return sig(v, n)


def _num(v):
    """An input number for the document: 6 significant figures, ints kept, None kept."""
    if v is None or isinstance(v, bool):
        return v
    if isinstance(v, int):
        return v
    return _sig(float(v))


def _round_tree(v):
    from steelfire.results import _round_tree as rt

    if hasattr(v, "to_dict") and callable(v.to_dict):
        v = v.to_dict()
    return rt(_plain(v))


def _plain(v):
    """numpy scalars / tuples -> plain Python, so that the tree is JSON-serialisable."""
    if isinstance(v, dict):
        return {str(k): _plain(x) for k, x in v.items()}
    if isinstance(v, (list, tuple)):
        return [_plain(x) for x in v]
    if hasattr(v, "item") and callable(v.item) and not isinstance(v, (str, bytes)):
        try:
            return v.item()
        except (TypeError, ValueError):
            return v
    if isinstance(v, Path):
        return str(v)
    return v


def file_sha256(path) -> str:
    """SHA-256 (hex) of a file's bytes."""
    h = hashlib.sha256()
    with open(path, "rb") as fh:
        for chunk in iter(lambda: fh.read(1 << 16), b""):
            h.update(chunk)
    return h.hexdigest()


def case_inputs(case) -> dict:
    """The case's inputs the report lists (compartment, openings, surfaces, fire load, fire, materials).

    Numbers to 6 significant figures, as the rest of the document; materials as a list (names may
    hold any character, so they are never used as JSON keys).
    """
    out = {"title": case.title}
    f = case.fire
    out["fire"] = {"curve": f.curve, "duration_min": _num(f.duration_min),
                   "file": Path(f.file).name if f.file is not None else None,
                   "convection_coefficient": _num(f.convection_coefficient)}
    a = case.analysis
    out["analysis"] = {"time_step_s": _num(a.time_step_s), "standard_horizon_min": _num(a.standard_horizon_min),
                       "allow_out_of_scope": bool(a.allow_out_of_scope)}
    c = case.compartment
    if c is not None:
        out["compartment"] = {
            "floor_area_m2": _num(c.floor_area_m2), "height_m": _num(c.height_m),
            "boundary_area_m2": _num(c.boundary_area_m2), "roof_opening_area_m2": _num(c.roof_opening_area_m2),
            "thermal_inertia": _num(c.thermal_inertia),
            "openings": [{"width_m": _num(o.width_m), "height_m": _num(o.height_m), "count": int(o.count)}
                         for o in c.openings],
            "surfaces": [{"area_m2": _num(s.area_m2),
                          "layers": [{"thickness_m": _num(L.thickness_m), "density": _num(L.density),
                                      "conductivity": _num(L.conductivity), "specific_heat": _num(L.specific_heat)}
                                     for L in s.layers]}
                         for s in c.surfaces]}
    else:
        out["compartment"] = None
    fl = case.fire_load
    if fl is not None:
        out["fire_load"] = {
            "characteristic_MJ_m2": _num(fl.characteristic_MJ_m2), "design_MJ_m2": _num(fl.design_MJ_m2),
            "combustion_factor": _num(fl.combustion_factor),
            "area_factor": fl.area_factor if isinstance(fl.area_factor, str) else _num(fl.area_factor),
            "occupancy_factor": _num(fl.occupancy_factor), "measures_factor": _num(fl.measures_factor),
            "growth": fl.growth}
    else:
        out["fire_load"] = None
    mats = []
    for name, m in sorted(case.materials.items()):
        cond = m.conductivity
        cond = [[_num(t), _num(v)] for t, v in cond] if isinstance(cond, tuple) else _num(cond)
        mats.append({"name": name, "density": _num(m.density), "conductivity": cond,
                     "specific_heat": _num(m.specific_heat), "moisture_percent": _num(m.moisture_percent)})
    out["materials"] = mats
    out["code_overrides"] = {k: _num(v) for k, v in sorted(case.code_overrides.items())}
    return out


def _member_sizing(member, d):
    """The member's sizing entry as a rounded dict, from to_dict() or a ``sizing`` attribute."""
    if "sizing" in d:
        return d["sizing"]
    s = getattr(member, "sizing", None)
    if s is None:
        return None
    s = _round_tree(s)
    return s if isinstance(s, dict) else {"value": s}


def build_document(result, case_path=None, *, case=None, command: str = "check", now=None) -> dict:
    """The result document of results.json: ``result.to_dict()`` plus ``run``, ``inputs``, ``summary``.

    ``run`` is the stamp the report prints: steelfire version, UTC date-time, the case file's name and
    SHA-256, the command. ``inputs`` holds the case values the report lists (None if no case is known),
    ``code_value_sources`` the unit and clause of each code value, ``summary`` the verdict counts.
    The document is round-tripped through JSON, so it holds exactly what results.json holds.
    """
    from steelfire import __version__
    from steelfire.codevalues import DEFINITIONS

    doc = result.to_dict()
    for m, d in zip(result.members, doc["members"]):
        s = _member_sizing(m, d)
        if s is not None:
            d["sizing"] = s
    now = now or _dt.datetime.now(_dt.timezone.utc)
    stamp = {"steelfire_version": __version__, "command": command,
             "utc": now.astimezone(_dt.timezone.utc).strftime("%Y-%m-%dT%H:%M:%SZ"),
             "case_file": None, "case_sha256": None, "fire_table_file": None, "fire_table_sha256": None}
    if case_path is not None:
        stamp["case_file"] = Path(case_path).name
        stamp["case_sha256"] = file_sha256(case_path)
    if case is None and case_path is not None:
        from steelfire.inputs.case import load_case

        case = load_case(case_path)
    if case is not None and case.fire.file is not None and Path(case.fire.file).is_file():
        stamp["fire_table_file"] = Path(case.fire.file).name
        stamp["fire_table_sha256"] = file_sha256(case.fire.file)
    doc["run"] = stamp
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
    return json.loads(json.dumps(_plain(doc), allow_nan=False))


# ----------------------------------------------------------------------------------------------
# CSV files


_MEMBER_COLUMNS = ("name", "kind", "section_factor_per_m", "shadow_factor", "protection", "thickness_mm",
                   "utilisation", "critical_temperature_C", "critical_temperature_source",
                   "peak_steel_temperature_C", "time_of_peak_steel_min", "margin_C", "passes",
                   "standard_fire_time_to_critical_min", "required_minutes", "meets_required_period")
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
    if isinstance(v, (list, tuple)):
        return ";".join(_csv_value(x) for x in v)
    if isinstance(v, dict):
        return json.dumps(v, sort_keys=True)
    return str(v)


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

    Member columns are named by member name (CSV-quoted where needed). Members without a kept
    history (``analyse(case, histories=False)``) are left out; returns (text, names written).
    """
    import numpy as np

    f = result.fire
    cols = [np.asarray(f.time_s, dtype=float) / 60.0, np.asarray(f.gas_temperature_C, dtype=float)]
    names = []
    for m in result.members:
        if m.steel_temperature_C is not None:
            cols.append(np.asarray(m.steel_temperature_C, dtype=float))
            names.append(m.name)
    buf = io.StringIO()
    csv.writer(buf, lineterminator="\n").writerow(["time_min", "gas_C"] + names)
    arr = np.column_stack(cols)
    np.savetxt(buf, arr, fmt=["%.6g"] + ["%.2f"] * (arr.shape[1] - 1), delimiter=",", newline="\n")
    return buf.getvalue(), names


# ----------------------------------------------------------------------------------------------
# the directory


def output_targets() -> list:
    """Every file name a run may write into its output directory."""
    from steelfire.outputs.report.plots import FIGURE_NAMES

    return [RESULTS_JSON, MEMBERS_CSV, HISTORIES_CSV, REPORT_HTML] + \
        [f"fig_{n}.{x}" for n in FIGURE_NAMES for x in ("png", "svg")]


def check_out_dir(out_dir) -> Path:
    """Refuse an output directory that cannot receive the files, writing nothing.

    Raises ``InputError("--out", str(out_dir), ...)`` for an existing regular file, a directory that is
    not writable, a path under a regular file, or a directory holding a sub-directory where an output
    file is to go. A missing directory is fine (:func:`write_outputs` creates it). The CLI may call
    this before the analysis so that a bad ``--out`` fails fast; :func:`write_outputs` calls it again.
    """
    out = Path(out_dir)
    _check_out_dir(out, output_targets())
    return out


def _check_out_dir(out: Path, targets) -> None:
    field_name = "--out"
    if out.exists() or out.is_symlink():
        if not out.is_dir():
            raise InputError(field_name, str(out), "is an existing file, not a directory; name a directory")
        if not os.access(out, os.W_OK | os.X_OK):
            raise InputError(field_name, str(out), "is a directory that is not writable")
        for name in targets:
            p = out / name
            if p.is_dir() and not p.is_symlink():
                raise InputError(field_name, str(out), f"holds a directory named {name!r} where a file is to go")
        return
    parent = out.parent
    while not parent.exists():
        if parent == parent.parent:
            break
        parent = parent.parent
    if not parent.is_dir():
        raise InputError(field_name, str(out), f"cannot be created: {str(parent)!r} is not a directory")
    if not os.access(parent, os.W_OK | os.X_OK):
        raise InputError(field_name, str(out), f"cannot be created: {str(parent)!r} is not writable")


def _guard_inputs(out: Path, targets, case_path, case) -> None:
    """Refuse to write over the case file or the tabulated fire it reads."""
    inputs = []
    if case_path is not None:
        inputs.append(Path(case_path))
    if case is not None and getattr(case.fire, "file", None) is not None:
        inputs.append(Path(case.fire.file))
    try:
        protected = {p.resolve() for p in inputs if p.exists()}
        for name in targets:
            if (out / name).resolve() in protected:
                raise InputError("--out", str(out),
                                 f"would overwrite the input file {name!r}; choose another directory")
    except OSError:
        pass


def _write_temp(out: Path, name: str, data: bytes) -> Path:
    """Write ``data`` to a new hidden temporary file in ``out``; returns its path."""
    tmp = out / f".{name}.{secrets.token_hex(6)}{_TMP_SUFFIX}"
    fd = os.open(tmp, os.O_WRONLY | os.O_CREAT | os.O_EXCL | getattr(os, "O_BINARY", 0), 0o666)
    try:
        with os.fdopen(fd, "wb") as fh:
            fh.write(data)
            fh.flush()
            os.fsync(fh.fileno())
    except BaseException:
        try:
            os.unlink(tmp)
        except OSError:
            pass
        raise
    return tmp


def _commit(out: Path, payloads: dict) -> list:
    """All payloads to temporary names first, then renamed into place; temporaries removed on failure."""
    created = []
    p = out
    while not p.exists():
        created.append(p)
        p = p.parent
    out.mkdir(parents=True, exist_ok=True)
    temps = []
    renamed = set()
    try:
        for name, data in payloads.items():
            temps.append((_write_temp(out, name, data), name))
        for tmp, name in temps:
            os.replace(tmp, out / name)
            renamed.add(tmp)
    except BaseException:
        for tmp, _ in temps:
            if tmp not in renamed:
                try:
                    os.unlink(tmp)
                except OSError:
                    pass
        if not renamed:
            for d in created:  # leaf first; only directories this run made, and only if empty
                try:
                    d.rmdir()
                except OSError:
                    break
        raise
    return [name for _, name in temps]


def write_outputs(result, out_dir, case_path=None, command: str = "check", *, case=None, now=None) -> WrittenOutputs:
    """Write the files of a run into ``out_dir`` (created if missing).

    Files: results.json (the document: ``result.to_dict()`` plus the run stamp, the case inputs, the
    summary; every number the report shows), members.csv, histories.csv (needs
    ``analyse(case, histories=True)``; without histories only time and gas are written), the figures
    as PNG and SVG (``fig_*.png``, ``fig_*.svg``) and report.html (self-contained, prints to A4).

    Parameters
    ----------
    result : AnalysisResult
        From :func:`steelfire.analyse`.
    out_dir : str or Path
        The output directory. An existing regular file, or a directory that cannot be written,
        raises :class:`InputError` (``"--out"``) before anything is written.
    case_path : str or Path, optional
        The case file: only read, for its SHA-256 in the run stamp (and its inputs, unless ``case``
        is given). None for a case built in memory.
    command : str
        The command the run stamp names ("check", "size").
    case : Case, optional
        The case model the result came from, for the input tables (loaded from ``case_path`` if omitted).
    now : datetime, optional
        The time of the run stamp (default: now, UTC).

    Files of an earlier run that this run does not write (a thickness figure of an earlier sizing run)
    are left alone; ``results.json["report"]["files"]`` lists the files of this run.

    Returns :class:`WrittenOutputs` (directory, file names, wall times per stage [s]).
    """
    from steelfire.outputs.report import html as report_html
    from steelfire.outputs.report import plots

    out = check_out_dir(out_dir)
    base_targets = output_targets()
    if case is None and case_path is not None:
        from steelfire.inputs.case import load_case

        case = load_case(case_path)
    _guard_inputs(out, base_targets, case_path, case)

    timings = {}
    t0 = time.perf_counter()
    doc = build_document(result, case_path, case=case, command=command, now=now)
    hist_text, hist_names = histories_csv(result)
    doc["report"] = plots.plan(doc, hist_names)
    doc["report"]["files"] = [RESULTS_JSON, MEMBERS_CSV, HISTORIES_CSV] + \
        [f"fig_{n}.{x}" for n in doc["report"]["figures"] for x in ("png", "svg")] + [REPORT_HTML]
    doc = json.loads(json.dumps(doc, allow_nan=False))
    timings["document_s"] = time.perf_counter() - t0

    t0 = time.perf_counter()
    figures = plots.render_figures(doc, result)
    timings["plots_s"] = time.perf_counter() - t0

    t0 = time.perf_counter()
    page = report_html.render_report(doc, figures)
    timings["html_s"] = time.perf_counter() - t0

    payloads = {RESULTS_JSON: (json.dumps(doc, indent=2, allow_nan=False, ensure_ascii=False) + "\n").encode("utf-8"),
                MEMBERS_CSV: members_csv(doc).encode("utf-8"),
                HISTORIES_CSV: hist_text.encode("utf-8")}
    for fig in figures:
        payloads[f"fig_{fig.name}.png"] = fig.png
        payloads[f"fig_{fig.name}.svg"] = fig.svg.encode("utf-8")
    payloads[REPORT_HTML] = page.encode("utf-8")

    t0 = time.perf_counter()
    files = _commit(out, payloads)
    timings["write_s"] = time.perf_counter() - t0
    return WrittenOutputs(out_dir=out, files=files, timings_s=timings, document=doc)

