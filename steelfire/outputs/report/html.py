"""The report page of a run: the context of the template ``report.html.j2`` from the result document.

The page is self-contained (``report.css`` and the figures' SVG inline, no external resource) and
prints to A4 with a running header, page numbers and a title block for the record. jinja2 is
imported only when a page is rendered, with autoescaping on: every name and text from the case is
escaped. The report reads only the document (results.json, with ``report`` from
:func:`steelfire.outputs.report.plots.plan`) and never recomputes physics.

Numbers are rounded for reading (:mod:`steelfire.outputs.present`: temperatures and times to 0.1,
factors to 4 significant figures, inputs as given); each numeric cell carries the JSON path of its
exact value::

    <td class="num" data-key="fire.gamma">3.118</td>

A null shows as an em dash; a standard-fire time beyond the horizon as ``> horizon`` (class
``num gt``, keyed to the horizon).
"""

from __future__ import annotations

import re
from pathlib import Path

from steelfire.outputs import present as P

HERE = Path(__file__).resolve().parent
TEMPLATE = "report.html.j2"
STYLESHEET = "report.css"
DASH = P.DASH

#: Longest title in the running header of a printed page (the title block holds it whole).
HEADER_TITLE_MAX = 70
#: The caution printed at the foot of every page (a page read alone still carries it).
PAGE_CAUTION = ("Simplified code methods within their validity limits; verify by a competent fire engineer; "
                "local codes prevail.")
#: Member names listed in one warning of the report.
NAMES_IN_WARNING = 40
#: Figures in the order report.html.j2 places them (figures are numbered in this order).
FIGURE_ORDER = ("design_fire", "heat_release", "height_profile", "plan_view", "steel_temperatures", "resistance",
                "time_equivalence", "thickness")


# ----------------------------------------------------------------------------------------------
# document access


def get(doc, key):
    """The value at a dotted JSON path (list indices as integers); None where it or a parent is missing."""
    v = doc
    for part in key.split("."):
        if v is None:
            return None
        if isinstance(v, list):
            try:
                v = v[int(part)]
            except (ValueError, IndexError):
                return None
        elif isinstance(v, dict):
            v = v.get(part)
        else:
            return None
    return v


def cell(doc, key, kind=None, none=DASH, cls="num"):
    """A table cell for the value at ``key``: its display text, its key, its classes."""
    v = get(doc, key)
    if kind is None:
        kind = P.kind_of(key)
    if v is None:
        return {"text": none, "key": key, "cls": f"{cls} null"}
    if isinstance(v, bool):
        return {"text": "yes" if v else "no", "key": key, "cls": "flag"}
    if isinstance(v, str):
        return {"text": v, "key": key, "cls": "txt"}
    if isinstance(v, (list, dict)):
        return {"text": P.fmt(v, kind), "key": key, "cls": "txt"}
    return {"text": P.fmt(v, kind), "key": key, "cls": cls}


def std_cell(doc, key):
    """A standard-fire time [min]: null means beyond the horizon (shown '> horizon', keyed to it)."""
    v = get(doc, key)
    if v is None:
        h = "analysis.standard_horizon_min"
        return {"text": f"> {P.fmt(get(doc, h), 'input')}", "key": h, "cls": "num gt"}
    return cell(doc, key, "time")


def _span(c):
    """A cell as an inline element (same classes and key), for values set in running text."""
    from markupsafe import Markup

    key = f' data-key="{_esc(c["key"])}"' if c.get("key") else ""
    return Markup(f'<span class="{_esc(c["cls"])}"{key}>{_esc(c["text"])}</span>')


#: Most decimals a temperature or time is shown with where one decimal would hide its order against its limit.
MOST_DECIMALS = P.MOST_DECIMALS
decimals_apart = P.decimals_apart


def _refine(c, v, d):
    """Cell ``c`` with its number ``v`` shown to ``d`` decimals (where more than the usual one are needed)."""
    if d == P.FIXED_DECIMALS or not P.is_number(v):
        return c
    return {**c, "text": P.fixed(v, d)}


def text_cell(text, cls="txt"):
    return {"text": text, "key": None, "cls": cls}


def verdict_cell(doc, key, word):
    """A verdict cell: ``word`` from :func:`present.design_fire_verdict` / :func:`present.period_verdict`;
    only pass and meets are shown as good (a marginal verdict is not one to sign)."""
    cls = {"pass": "flag ok", "meets": "flag ok", None: "flag null"}.get(word, "flag bad")
    return {"text": DASH if word is None else word, "key": key, "cls": cls}


def flag_cell(doc, key, yes, no, none=DASH, invert=False):
    """A yes/no cell; ``invert``: the value True is the bad one (``yes`` then names the False word)."""
    v = get(doc, key)
    if invert and isinstance(v, bool):
        v = not v
    word = {True: yes, False: no}.get(v, none)
    cls = {True: "flag ok", False: "flag bad"}.get(v, "flag null")
    return {"text": word, "key": key, "cls": cls}


# ----------------------------------------------------------------------------------------------
# symbols and units as markup (the text is escaped first)

_GREEK = {"alpha": "\u03b1", "beta": "\u03b2", "gamma": "\u03b3", "Gamma": "\u0393", "delta": "\u03b4",
          "Delta": "\u0394", "epsilon": "\u03b5", "eta": "\u03b7", "theta": "\u03b8", "lambda": "\u03bb",
          "mu": "\u03bc", "rho": "\u03c1", "phi": "\u03c6", "chi": "\u03c7", "psi": "\u03c8", "kappa": "\u03ba",
          "sigma": "\u03c3", "tau": "\u03c4", "omega": "\u03c9", "Omega": "\u03a9", "Phi": "\u03a6"}
_UNIT_TOKENS = {"m2": "m\u00b2", "m3": "m\u00b3", "C": "\u00b0C", "-": "\u2013", "degC": "\u00b0C"}


def _esc(s) -> str:
    from markupsafe import escape

    return str(escape(s))


def symbol_html(s):
    """A plain-text symbol as markup: 'q_f,d' -> q<sub>f,d</sub>, 'Gamma_lim' -> Γ<sub>lim</sub>."""
    from markupsafe import Markup

    if not s:
        return Markup("")
    base, _, sub = str(s).partition("_")
    base = _GREEK.get(base, base)
    sub = _GREEK.get(sub, sub)
    out = _esc(base) + (f"<sub>{_esc(sub)}</sub>" if sub else "")
    return Markup(out)


def unit_html(u):
    """A plain-text unit as markup: 'J/(m2 s^0.5 K)' -> J/(m² s<sup>0.5</sup> K), 'C' -> °C, '-' -> –."""
    from markupsafe import Markup

    if not u:
        return Markup("")
    u = str(u)
    if u in _UNIT_TOKENS:
        return Markup(_esc(_UNIT_TOKENS[u]))
    parts = re.split(r"([A-Za-z]+[0-9]*(?:\^[0-9.\-]+)?)", u)
    out = []
    for p in parts:
        m = re.fullmatch(r"([A-Za-z]+)([0-9]*)(?:\^([0-9.\-]+))?", p)
        if not m:
            out.append(_esc(p))
            continue
        word, digits, power = m.groups()
        if word == "C" and not digits and not power:
            out.append("\u00b0C")
            continue
        tok = _UNIT_TOKENS.get(word + digits, word + ({"2": "\u00b2", "3": "\u00b3"}.get(digits, digits)))
        out.append(_esc(tok) + (f"<sup>{_esc(power)}</sup>" if power else ""))
    return Markup("".join(out))


def css_string(text) -> str:
    """``text`` as a quoted CSS string, every character outside a plain set written as a six-digit hex
    escape (so that no case text can end the string, the rule or the style element). Spaces are escaped
    too: a space after a hex escape would be taken as the escape's end and dropped."""
    out = []
    for ch in str(text):
        if ch.isascii() and (ch.isalnum() or ch in ".,:;-_/()+#=[]"):
            out.append(ch)
        else:
            out.append(f"\\{ord(ch):06x}")
    return '"' + "".join(out) + '"'


# ----------------------------------------------------------------------------------------------
# sections


_RECORD_FIELDS = (("project", "project"), ("job_number", "job number"), ("revision", "revision"),
                  ("date", "date"), ("prepared_by", "prepared by"), ("checked_by", "checked by"))


def _record(doc):
    rec = doc.get("record") or {}
    fields = [{"label": lab, "value": (str(rec[k]) if rec.get(k) not in (None, "") else None), "key": f"record.{k}"}
              for k, lab in _RECORD_FIELDS]
    notes = rec.get("notes")
    run = doc.get("run") or {}
    stamp = [("calculation", f"steelfire {run.get('command') or ''}".strip()),
             ("steelfire version", run.get("steelfire_version") or doc.get("steelfire_version")),
             ("run (UTC)", run.get("utc")),
             ("case file", run.get("case_file") or "case built in memory")]
    if run.get("fire_table_file"):
        stamp.append(("fire table", run["fire_table_file"]))
    hashes = [("case file SHA-256", run.get("case_sha256"))]
    if run.get("fire_table_file"):
        hashes.append(("fire table SHA-256", run.get("fire_table_sha256")))
    return {"fields": fields, "notes": None if notes in (None, "") else str(notes),
            "stamp": [(a, b) for a, b in stamp if b], "hashes": [(a, b) for a, b in hashes if b]}


def _page_marks(doc):
    """The running header and footer of printed pages, as CSS strings."""
    rec = doc.get("record") or {}
    run = doc.get("run") or {}
    title = P.clip_name(doc.get("title") or "", HEADER_TITLE_MAX)
    right = []
    if rec.get("job_number"):
        right.append(f"job {rec['job_number']}")
    if rec.get("revision"):
        right.append(f"rev {rec['revision']}")
    if not right:
        right.append(f"steelfire {run.get('command') or ''}".strip())
    foot = [f"steelfire {run.get('steelfire_version') or doc.get('steelfire_version') or ''}".strip()]
    if run.get("utc"):
        foot.append(run["utc"])
    if run.get("case_file"):
        foot.append(P.clip_name(run["case_file"], 40))
    if run.get("case_sha256"):
        foot.append("SHA-256 " + run["case_sha256"][:12])
    from markupsafe import Markup

    return {"top_left": Markup(css_string(title)), "top_right": Markup(css_string(" \u00b7 ".join(right))),
            "bottom_left": Markup(css_string(" \u00b7 ".join(foot) + "\n" + PAGE_CAUTION))}


def _summary(doc, sizing):
    c = P.counts(doc)
    rows = P.sizing_rows(doc) if sizing else []
    verdicts = []
    if rows:
        spec_ok = all(r.specified_ok is True for r in rows)
        prop_ok = all(r.proposed_ok for r in rows)
        lines = P.verdict_lines(doc, True)
        verdicts.append({"label": "Specified design", "ok": spec_ok, "text": lines[0].split(": ", 1)[1]})
        verdicts.append({"label": "Proposed design", "ok": prop_ok, "text": lines[1].split(": ", 1)[1]})
    else:
        ok = c["ok"] == c["members"]
        verdicts.append({"label": "Verdict", "ok": ok, "text": P.verdict_lines(doc, False)[0]})
    counts = [("members checked", c["members"]),
              ("pass the design fire (peak steel temperature \u2264 critical)", c["pass"]),
              ("fail the design fire", c["fail"]),
              ("with a required standard-fire period", c["with_period"]),
              ("short of their required period under the standard fire", c["short"])]
    if c["marginal"]:
        counts.insert(2, ("within the numerical error: not established (marginal)", c["marginal"]))
    if rows:
        counts.append(("sizing not achievable", sum(1 for r in rows if r.achievable is False)))
    conflicts = [{"name": m["name"], "text": x["text"]} for m in doc["members"] for x in P.route_conflicts(doc, m)]
    return {"verdicts": verdicts, "counts": counts, "shortfalls": P.shortfalls(doc), "conflicts": conflicts,
            "out_of_scope": list(doc.get("out_of_scope") or []), "cautions": P.short_cautions(doc)}


def _row(doc, label, key, unit="", source="", kind=None, symbol=""):
    return {"label": label, "symbol": symbol_html(symbol), "value": cell(doc, key, kind), "unit": unit_html(unit),
            "source": source}


def _fire_inputs(doc):
    inp = doc.get("inputs")
    if not inp:
        return None
    out = {"compartment": [], "openings": [], "surfaces": [], "fire_load": []}
    comp = inp.get("compartment")
    if comp:
        k = "inputs.compartment."
        out["compartment"] = [
            _row(doc, "floor area", k + "floor_area_m2", "m2", "", "input", "A_f"),
            _row(doc, "height, floor to ceiling", k + "height_m", "m", "", "input", "H"),
            _row(doc, "enclosure area, openings included", k + "boundary_area_m2", "m2", "", "input", "A_t"),
            _row(doc, "horizontal (roof) openings", k + "roof_opening_area_m2", "m2", "", "input", "A_h")]
        if comp.get("thermal_inertia") is not None:
            out["compartment"].append(_row(doc, "thermal inertia (given)", k + "thermal_inertia", "J/(m2 s^0.5 K)",
                                           "", "input", "b"))
        for i, _ in enumerate(comp.get("openings") or []):
            b = f"{k}openings.{i}."
            out["openings"].append([text_cell(f"{i + 1}", "lbl"), cell(doc, b + "width_m", "input"),
                                    cell(doc, b + "height_m", "input"), cell(doc, b + "count", "count")])
        for i, s in enumerate(comp.get("surfaces") or []):
            for j, _ in enumerate(s.get("layers") or []):
                b = f"{k}surfaces.{i}.layers.{j}."
                out["surfaces"].append([text_cell(f"{i + 1}" if j == 0 else "", "lbl"),
                                        cell(doc, f"{k}surfaces.{i}.area_m2", "input") if j == 0 else text_cell(""),
                                        text_cell(f"{j + 1}", "lbl"), cell(doc, b + "thickness_m", "input"),
                                        cell(doc, b + "density", "input"), cell(doc, b + "conductivity", "input"),
                                        cell(doc, b + "specific_heat", "input")])
    fl = inp.get("fire_load")
    if fl:
        k = "inputs.fire_load."
        rows = []
        if fl.get("characteristic_MJ_m2") is not None:
            rows += [_row(doc, "characteristic fire load density", k + "characteristic_MJ_m2", "MJ/m2",
                          "Table E.4", "input", "q_f,k"),
                     _row(doc, "combustion factor", k + "combustion_factor", "-", "E.3", "input", "m"),
                     _row(doc, "fire activation risk, compartment size" +
                          (" (by Table E.1)" if isinstance(fl.get("area_factor"), str) else ""),
                          k + "area_factor", "-", "Table E.1", "input", "delta_q1"),
                     _row(doc, "fire activation risk, occupancy", k + "occupancy_factor", "-", "Table E.1", "input",
                          "delta_q2"),
                     _row(doc, "active fire-fighting measures", k + "measures_factor", "-", "Table E.2", "input",
                          "delta_n")]
        if fl.get("design_MJ_m2") is not None:
            rows.append(_row(doc, "design fire load density (given)", k + "design_MJ_m2", "MJ/m2", "", "input",
                             "q_f,d"))
        if fl.get("growth") is not None:
            rows.append(_row(doc, "fire growth rate", k + "growth", "", "Table E.5"))
        out["fire_load"] = rows
    if not any(out.values()):
        return None
    return out


def _fire_values(doc):
    """The design fire's intermediate values: the fire model's own rows (``fire_rows``), then the peak."""
    rows = []
    shown = set()
    for r in doc.get("fire_rows") or []:
        key = "fire." + r["key"]
        if get(doc, key) is None:
            continue
        shown.add(r["key"])
        rows.append({"label": r.get("label") or r["key"], "symbol": symbol_html(r.get("symbol")),
                     "value": cell(doc, key, P.kind_of(r["key"], r.get("unit"))), "unit": unit_html(r.get("unit")),
                     "source": r.get("clause") or ""})
    tail = [("peak gas temperature", "theta_g,max", "peak_gas_temperature_C", "C", "maximum on the time grid"),
            ("time of the peak gas temperature", "", "time_of_peak_gas_min", "min", ""),
            ("duration analysed", "", "duration_min", "min", "case [fire] duration_min"),
            ("convective heat transfer coefficient", "alpha_c", "convection_coefficient", "W/(m2 K)",
             "case [fire] convection_coefficient"
             if get(doc, "inputs.fire.convection_coefficient") is not None else
             "code value for the curve (alpha_c_*, section of code values)")]
    if get(doc, "inputs.fire.file") and not any(get(doc, "fire." + r["key"]) == get(doc, "inputs.fire.file")
                                                for r in doc.get("fire_rows") or []):
        rows.append(_row(doc, "gas temperature table", "inputs.fire.file", "", "case [fire] file"))
    for label, sym, k, unit, src in tail:
        if k in shown or get(doc, "fire." + k) is None:
            continue
        kind = "input" if k in ("duration_min", "convection_coefficient") else None
        rows.append(_row(doc, label, "fire." + k, unit, src, kind, sym))
    return rows


def _members(doc):
    ms = doc["members"]

    def any_of(key):
        return any(m.get(key) is not None for m in ms)

    opt = [k for k in ("section", "exposure", "encasement") if any_of(k)]
    show_ksh, show_mu = any_of("shadow_factor"), any_of("utilisation")
    head = ["member", "kind"] + opt + ["A/V [1/m]"] + (["k<sub>sh</sub> [\u2013]"] if show_ksh else []) + \
        ["protection", "d<sub>p</sub> [mm]"] + (["\u03bc<sub>0</sub> [\u2013]"] if show_mu else []) + \
        ["\u03b8<sub>a,cr</sub> [\u00b0C]", "\u03b8<sub>a,cr</sub> from", "t<sub>req</sub> [min]"]
    inputs, verdicts = [], []
    for i, m in enumerate(ms):
        k = f"members.{i}."
        row = [{**cell(doc, k + "name"), "cls": "txt name"}, cell(doc, k + "kind")]
        row += [cell(doc, k + o) for o in opt]
        row.append(cell(doc, k + "section_factor_per_m"))
        if show_ksh:
            row.append(cell(doc, k + "shadow_factor"))
        row.append(cell(doc, k + "protection", none="bare steel") if m.get("protection") is not None
                   else text_cell("bare steel"))
        row.append(cell(doc, k + "thickness_mm", "input"))
        if show_mu:
            row.append(cell(doc, k + "utilisation"))
        row += [cell(doc, k + "critical_temperature_C", "temperature"),
                {**cell(doc, k + "critical_temperature_source"), "cls": "txt ref"},
                cell(doc, k + "required_minutes", "input")]
        inputs.append(row)
        # a peak and its critical temperature (a time and its period) are shown with the decimals that keep
        # their order visible: a rounded peak equal to the critical beside FAIL (or PASS) would contradict it
        peak, crit = m.get("peak_steel_temperature_C"), m.get("critical_temperature_C")
        d = decimals_apart(peak, crit) if P.is_number(peak) and P.is_number(crit) else P.FIXED_DECIMALS
        if P.is_number(m.get("margin_C")):   # nor a margin of 0.0 beside a fail (or -0.0 beside a pass)
            d = max(d, decimals_apart(m["margin_C"], 0.0))
        t_std, t_req = m.get("standard_fire_time_to_critical_min"), m.get("required_minutes")
        dt = decimals_apart(t_std, t_req) if P.is_number(t_std) and P.is_number(t_req) else P.FIXED_DECIMALS
        verdicts.append([{**cell(doc, k + "name"), "cls": "txt name"},
                         _refine(cell(doc, k + "peak_steel_temperature_C", "temperature"), peak, d),
                         cell(doc, k + "time_of_peak_steel_min", "time"),
                         _refine(cell(doc, k + "critical_temperature_C", "temperature"), crit, d),
                         _refine(cell(doc, k + "margin_C", "temperature"), m.get("margin_C"), d),
                         verdict_cell(doc, k + "passes", P.design_fire_verdict(m)),
                         _refine(std_cell(doc, k + "standard_fire_time_to_critical_min"), t_std, dt),
                         cell(doc, k + "required_minutes", "input"),
                         verdict_cell(doc, k + "meets_required_period", P.period_verdict(m))])
    from markupsafe import Markup

    return {"input_head": [Markup(h) for h in head], "inputs": inputs, "verdicts": verdicts, "details": _details(doc),
            "materials": _materials(doc)}


#: Per-member traceability rows: document path under the member -> (label, symbol, unit, source).
#: Keys not listed show under their own name, with the unit their suffix names.
TRACE_LABELS = {
    "details.specific_heat_at_peak_J_kgK": ("steel specific heat at the peak", "c_a", "J/(kg K)",
                                            "EN 1993-1-2 eq (3.2)"),
    "details.phi": ("heat capacity ratio of the protection", "phi", "-", "EN 1993-1-2 eq (4.27)"),
    "details.conductivity_W_mK": ("protection conductivity at the peak", "lambda_p", "W/(m K)", "case material"),
    "details.moisture_delay_min": ("moisture delay", "t_v", "min", "EN 1993-1-2 4.2.5.2(2)"),
    "details.shadow_factor": ("shadow factor", "k_sh", "-", "EN 1993-1-2 eq (4.26)"),
    "details.shadow_factor_formula": ("shadow factor by", "", "", "EN 1993-1-2 4.2.5.1(2)"),
    "resistance.method": ("resistance: method", "", "", "EN 1993-1-2 4.2.3"),
    "resistance.section_class": ("cross-section class in fire", "", "", "EN 1993-1-2 4.2.2"),
    "resistance.class_part.part": ("class governed by", "", "", ""),
    "resistance.class_part.c_over_t": ("its width-to-thickness ratio", "c/t", "-", "EN 1993-1-1 Table 5.2"),
    "resistance.class_part.limit": ("its limit (with epsilon in fire)", "", "-", "EN 1993-1-2 4.2.2"),
    "resistance.steel_grade": ("steel grade", "", "", "EN 10025-2"),
    "resistance.f_y_MPa": ("yield strength (thickness band)", "f_y", "MPa", "EN 10025-2"),
    "resistance.slenderness_20C": ("non-dimensional slenderness, 20 C", "lambda", "-", "EN 1993-1-1 6.3"),
    "resistance.slenderness_at_critical": ("non-dimensional slenderness at the critical temperature", "lambda_theta",
                                           "-", "EN 1993-1-2 eq (4.7)"),
    "resistance.reduction_factor_at_critical": ("reduction factor at the critical temperature", "chi_fi", "-",
                                                "EN 1993-1-2 eq (4.6)"),
    "resistance.utilisation": ("degree of utilisation", "mu_0", "-", "EN 1993-1-2 4.2.4(3)"),
    "resistance.critical_temperature_C": ("critical temperature from the resistance", "theta_a,cr", "C",
                                          "EN 1993-1-2 4.2.3"),
    "resistance.fails_at_20C": ("fails already at 20 C", "", "", ""),
    "resistance.clause": ("resistance: clause", "", "", ""),
    "conduction_peak_C": ("peak steel by the conduction model", "", "C",
                          "1-D conduction through the protection (finite volumes)"),
    "model_difference_C": ("eq (4.27) peak minus conduction peak", "", "C", "lumped minus conduction"),
    "verdict_model": ("verdict rests on", "", "", "EN 1993-1-2 eq (4.27), or conduction where (4.27) leaves its ground"),
    "lumped_valid": ("lumped model valid", "", "", ""),
    "step_sensitivity_C": ("peak change when the time step halves", "", "C", ""),
    "marginal": ("marginal", "", "", ""),
}
#: Headings of the traceability groups, by the member key they come from.
TRACE_GROUPS = {"details": "intermediate values of the steel temperature",
                "resistance": "member resistance in fire (EN 1993-1-2 4.2.3)",
                "conduction": "conduction model check"}
_CONDUCTION_KEYS = ("verdict_model", "conduction_peak_C", "model_difference_C", "lumped_valid", "step_sensitivity_C",
                    "marginal")
#: Members per traceability table (columns).
TRACE_COLUMNS = 5

_SUFFIX_UNITS = (("_J_kgK", "J/(kg K)"), ("_W_mK", "W/(m K)"), ("_kNm", "kN m"), ("_kN", "kN"), ("_MPa", "MPa"),
                 ("_C", "C"), ("_min", "min"), ("_mm", "mm"), ("_m", "m"), ("_s", "s"))


def _label_of(path):
    """(label, symbol, unit, source) of a traceability path; from its key where it is not listed."""
    if path in TRACE_LABELS:
        return TRACE_LABELS[path]
    parts = path.split(".")
    key = parts[-1]
    unit = ""
    for suf, u in _SUFFIX_UNITS:
        if key.endswith(suf):
            key, unit = key[: -len(suf)], u
            break
    words = [w.replace("_", " ") for w in parts[1:-1]] + [key.replace("_", " ")]
    return (": ".join(words), "", unit, "")


def _flatten(obj, prefix, out, notes):
    """(path, value) pairs of a member's traceability object; text lists go to ``notes``; series
    (lists of numbers, objects of lists) are left to results.json and the figures."""
    for k, v in obj.items():
        path = f"{prefix}.{k}"
        if isinstance(v, dict):
            if any(isinstance(x, list) for x in v.values()):
                continue
            _flatten(v, path, out, notes)
        elif isinstance(v, list):
            if all(isinstance(x, str) for x in v):
                notes += v
            elif len(v) <= 4 and all(P.is_number(x) for x in v):
                out.append((path, v))
        elif k == "notes" and isinstance(v, str):
            if v:
                notes.append(v)
        else:
            out.append((path, v))


def _details(doc):
    """Per-member traceability: intermediate values, member resistance and the conduction check,
    where the document has them, as tables of quantities by member (``TRACE_COLUMNS`` members each)."""
    per, groups = [], {}
    for i, m in enumerate(doc["members"]):
        pairs, notes = [], []
        for g in ("details", "resistance"):
            if isinstance(m.get(g), dict) and m[g]:
                _flatten(m[g], g, pairs, notes)
        pairs += [(k, m[k]) for k in _CONDUCTION_KEYS if k in m]
        if pairs or notes:
            per.append((i, dict(pairs), notes))
        for path, _ in pairs:
            g = path.split(".")[0] if "." in path else "conduction"
            groups.setdefault(g, [])
            if path not in groups[g]:
                groups[g].append(path)
    if not per:
        return None
    order = list(TRACE_LABELS)
    for g in groups:
        groups[g].sort(key=lambda p: (order.index(p) if p in order else len(order)))
    tables = []
    for c0 in range(0, len(per), TRACE_COLUMNS):
        chunk = per[c0:c0 + TRACE_COLUMNS]
        body = []
        for g in ("details", "resistance", "conduction"):
            paths = groups.get(g) or []
            if not paths:
                continue
            body.append({"group": TRACE_GROUPS[g]})
            for path in paths:
                label, sym, unit, src = _label_of(path)
                cells = []
                for i, vals, _ in chunk:
                    key = f"members.{i}.{path}"
                    if path not in vals:
                        cells.append(text_cell(DASH, "na"))
                    elif path == "marginal":   # a marginal verdict is not one to sign: shown as bad
                        cells.append(flag_cell(doc, key, "no", "MARGINAL", invert=True))
                    elif path == "verdict_model":
                        v = get(doc, key)
                        cells.append({"text": {"lumped": "eq (4.27)", "conduction": "conduction"}.get(v, v or DASH),
                                      "key": key, "cls": "txt" if v else "txt null"})
                    elif path == "lumped_valid":
                        cells.append(flag_cell(doc, key, "yes", "NO"))
                    else:
                        kind = P.kind_of(path, unit)
                        if path.endswith("_kN") or path.endswith("_kNm") or path.endswith("_MPa"):
                            kind = "factor"
                        cells.append(cell(doc, key, kind))
                body.append({"label": label, "symbol": symbol_html(sym), "unit": unit_html(unit), "source": src,
                             "cells": cells})
        tables.append({"members": [doc["members"][i]["name"] for i, _, _ in chunk], "rows": body})
    notes = [{"name": doc["members"][i]["name"], "text": n} for i, _, ns in per for n in ns]
    return {"tables": tables, "notes": notes}


def _materials(doc):
    mats = (doc.get("inputs") or {}).get("materials") or []
    rows = []
    for j, mt in enumerate(mats):
        k = f"inputs.materials.{j}."
        if isinstance(mt.get("conductivity"), list):
            parts = [f"{P.fmt(t, 'input')} \u00b0C: {P.fmt(v, 'input')}" for t, v in mt["conductivity"]]
            cond = {"text": "; ".join(parts), "key": k + "conductivity", "cls": "txt"}
        else:
            cond = cell(doc, k + "conductivity", "input")
        rows.append([{**cell(doc, k + "name"), "cls": "txt name"}, cell(doc, k + "density", "input"), cond,
                     cell(doc, k + "specific_heat", "input"), cell(doc, k + "moisture_percent", "input"),
                     cell(doc, k + "description", none="")])
    return rows


def _equivalence(doc):
    ms = doc["members"]
    routes = [r for r in ("annex_f", "annex_f_small_compartment", "cib_w14")
              if any(P.is_number((m.get("equivalence") or {}).get(P.ROUTE_KEYS[r])) for m in ms)]
    heads = {"annex_f": "Annex F t<sub>e,d</sub> [min]", "annex_f_small_compartment": "eq (F.3) t<sub>e,d</sub> [min]",
             "cib_w14": "CIB W14 t<sub>e</sub> [min]"}
    rows = []
    for i, m in enumerate(ms):
        k = f"members.{i}."
        e = m.get("equivalence") or {}
        conf = P.route_conflicts(doc, m)
        t_std, t_req = m.get("standard_fire_time_to_critical_min"), m.get("required_minutes")
        dt = decimals_apart(t_std, t_req) if P.is_number(t_std) and P.is_number(t_req) else P.FIXED_DECIMALS
        row = [{**cell(doc, k + "name"), "cls": "txt name"}, cell(doc, k + "required_minutes", "input"),
               _refine(std_cell(doc, k + "standard_fire_time_to_critical_min"), t_std, dt)]
        for r in routes:
            c = cell(doc, k + "equivalence." + P.ROUTE_KEYS[r], "time", none="n/a")
            if any(x["route"] == r for x in conf):
                c["cls"] += " warn"
                c["text"] += "*"
            row.append(c)
        row.append(std_cell(doc, k + "equivalence.equal_temperature_min") if e else text_cell(DASH, "na"))
        row.append(text_cell(", ".join(x["label"] for x in conf) or DASH, "txt warn" if conf else "txt null"))
        rows.append(row)
    head = ["member", "t<sub>req</sub> [min]", "t<sub>fi,std</sub> [min]"] + [heads[r] for r in routes] + \
        ["equal temp. t<sub>e</sub> [min]", "unconservative here"]
    conflicts = [{"name": m["name"], "text": x["text"]} for m in ms for x in P.route_conflicts(doc, m)]
    from markupsafe import Markup

    return {"head": [Markup(h) for h in head], "rows": rows, "conflicts": conflicts, "annex_f": _annex_f(doc),
            "cib": _cib(doc)}


#: Annex F factor rows: (label, symbol, key, unit, source); "_raw" keys are shown beside the used value.
ANNEX_F_ROWS = (
    ("design fire load density", "q_f,d", "design_fire_load_MJ_m2", "MJ/m2", "EN 1991-1-2 eq (E.1)"),
    ("thermal inertia", "b", "thermal_inertia", "J/(m2 s^0.5 K)", "Annex A (3)"),
    ("conversion factor", "k_b", "k_b", "min m2/MJ", "Table F.2"),
    ("band of b", "", "k_b_band", "", "Table F.2"),
    ("vertical openings / floor area", "alpha_v", "alpha_v", "-", "eq (F.2), held to 0.025..0.25"),
    ("horizontal openings / floor area", "alpha_h", "alpha_h", "-", "eq (F.2)"),
    ("", "b_v", "b_v", "-", "eq (F.2): 12.5(1 + 10 alpha_v - alpha_v^2) >= 10"),
    ("height factor (6.0/H)^0.3", "", "height_factor", "-", "eq (F.2)"),
    ("ventilation factor", "w_f", "w_f", "-", "eq (F.2), at least 0.5"),
    ("opening factor", "O", "opening_factor_m05", "m^0.5", "Annex A (3)"),
    ("correction factor", "k_c", "k_c", "-", "Table F.1"),
    ("basis of k_c", "", "k_c_basis", "", "Table F.1"),
    ("equivalent time q_f,d k_b w_f k_c", "t_e,d", "t_e_min", "min", "eq (F.1)"),
    ("small compartment: ventilation factor O^-1/2 A_f/A_t", "w_f", "small_compartment.w_f", "-", "eq (F.3)"),
    ("small compartment: equivalent time", "t_e,d", "small_compartment.t_e_min", "min", "eq (F.1) with (F.3)"),
    ("eq (F.3)", "", "small_compartment_note", "", ""),
)


#: Keys of an equivalence-factor object that are not shown as rows (the method's name, flags, raw values).
_FACTOR_SKIP = ("method", "protected")


def _annex_f(doc):
    fac = (doc.get("fire") or {}).get("equivalence_factors") or {}
    cols = [(k, lab) for k, lab in (("annex_f_protected", "protected steel"), ("annex_f_bare", "bare steel"))
            if fac.get(k)]
    if not cols:
        return None
    spec = list(ANNEX_F_ROWS)
    known = {key.split(".")[0] for _, _, key, _, _ in spec}
    for col, _ in cols:  # keys the report has no label for show under their own name
        for key, v in fac[col].items():
            if key in known or key in _FACTOR_SKIP or key.endswith("_raw") or isinstance(v, (dict, list)):
                continue
            known.add(key)
            label, sym, unit, _ = _label_of("x." + key)
            spec.append((label, sym, key, unit, ""))
    rows = []
    for label, sym, key, unit, src in spec:
        cells = []
        for col, _ in cols:
            full = f"fire.equivalence_factors.{col}.{key}"
            v = get(doc, full)
            c = cell(doc, full, "time" if key.endswith("t_e_min") else "factor")
            raw = get(doc, full + "_raw") if not key.startswith("small") else None
            if P.is_number(v) and P.is_number(raw) and P.fmt(raw) != P.fmt(v):
                c = {**c, "note": f"computed {P.fmt(raw)}"}
            cells.append(c)
        if all(get(doc, f"fire.equivalence_factors.{col}.{key}") is None for col, _ in cols):
            continue
        rows.append({"label": label, "symbol": symbol_html(sym), "cells": cells, "unit": unit_html(unit),
                     "source": src})
    return {"cols": [lab for _, lab in cols], "rows": rows}


#: CIB W14 factor rows: (label, symbol, keys (the first present is shown), unit, source).
CIB_ROWS = (
    ("design fire load density", "q_f,d", ("design_fire_load_MJ_m2",), "MJ/m2", "EN 1991-1-2 eq (E.1)"),
    ("thermal inertia", "b", ("thermal_inertia",), "J/(m2 s^0.5 K)", "Annex A (3)"),
    ("conversion factor, by band of b", "c", ("c", "k_c"), "min m^2.25/MJ",
     "CIB W14 (1986); values from memory, check against the source"),
    ("band of b", "", ("c_band", "k_c_band"), "", ""),
    ("ventilation factor A_f / (A_v A_t h_eq^1/2)^1/2", "w", ("w",), "m^-0.25", "CIB W14"),
    ("equivalent time c w q_f,d", "t_e", ("t_e_min",), "min", "CIB W14"),
    ("not applicable because", "", ("not_applicable_reason",), "", ""),
)


def _cib(doc):
    obj = get(doc, "fire.equivalence_factors.cib_w14")
    if not obj:
        return None
    base = "fire.equivalence_factors.cib_w14."
    rows, shown = [], set(_FACTOR_SKIP)
    for lab, sym, keys, unit, src in CIB_ROWS:
        shown.update(keys)
        key = next((k for k in keys if obj.get(k) is not None), None)
        if key is not None:
            rows.append(_row(doc, lab, base + key, unit, src, "time" if key == "t_e_min" else None, sym))
    for key, v in obj.items():  # keys the report has no label for show under their own name
        if key in shown or v is None or isinstance(v, (dict, list)):
            continue
        label, sym, unit, _ = _label_of("x." + key)
        rows.append(_row(doc, label, base + key, unit, "", None, sym))
    return rows


def _sizing(doc):
    rows_ = P.sizing_rows(doc)
    if not rows_:
        return None
    idx = {m["name"]: i for i, m in enumerate(doc["members"])}
    rows, notes = [], []
    word = {True: ("meets", "flag ok"), False: ("SHORT", "flag bad"), None: ("not given", "flag null")}
    for r in rows_:
        k = f"members.{idx[r.name]}.sizing."
        bare = r.protection is None
        spec_w, spec_c = word[r.specified_ok]
        if r.specified_ok is False:   # the check's verdict word at the specified thicknesses
            spec_w = P.specified_word(doc["members"][idx[r.name]], False)
        prop_w, prop_c = word[r.proposed_ok]
        if r.proposed_ok is False:   # the member's own verdict word, as the verdict table shows it
            prop_w = P.proposed_word(doc["members"][idx[r.name]], False)
        ch = P.change_text(r)
        rows.append([{**cell(doc, f"members.{idx[r.name]}.name"), "cls": "txt name"},
                     text_cell("bare steel") if bare else cell(doc, f"members.{idx[r.name]}.protection"),
                     text_cell(DASH, "na") if bare else cell(doc, k + ("specified_mm" if "specified_mm" in
                                                                            get(doc, k[:-1]) else "given_mm"),
                                                               "input", none="not given"),
                     text_cell(DASH, "na") if bare else cell(doc, k + "standard_period_mm", "required_thickness"),
                     text_cell(DASH, "na") if bare else cell(doc, k + "burnout_mm", "required_thickness",
                                                               none="none meets"),
                     text_cell(DASH, "na") if bare else cell(doc, k + "chosen_mm", "input", none="none"),
                     text_cell(ch if ch not in ("bare",) else DASH,
                               "txt" + (" warn" if r.change == "increase" or r.change == "not achievable" else "")),
                     {"text": spec_w, "key": None, "cls": spec_c}, {"text": prop_w, "key": None, "cls": prop_c}])
        if r.note or r.specified_reason:
            parts = [x for x in (r.specified_reason, r.note) if x]
            if len(parts) == 2 and parts[1].startswith(parts[0]):   # the note already says it (bare steel fails; ...)
                parts = parts[1:]
            notes.append({"name": r.name, "text": "; ".join(parts)})
    lines = P.verdict_lines(doc, True)
    return {"rows": rows, "notes": notes, "verdicts": lines}


def _code_values(doc):
    src = doc.get("code_value_sources") or {}
    over = set(((doc.get("inputs") or {}).get("code_overrides") or {}).keys())
    rows = []
    for name in doc.get("code_values") or {}:
        s = src.get(name) or {}
        c = cell(doc, "code_values." + name, "input")
        unit = s.get("unit")
        rows.append({"name": name, "value": c, "value_html": _span(c),
                     "unit": unit_html(None if unit in ("-", "") else unit),
                     "clause": s.get("clause") or "", "set": "case [code]" if name in over else ""})
    settings = [_row(doc, "time step", "analysis.time_step_s", "s",
                     "EN 1993-1-2 4.2.5.1(4) bare \u2264 5 s, 4.2.5.2(3) protected \u2264 30 s", "input"),
                _row(doc, "standard-fire horizon", "analysis.standard_horizon_min", "min",
                     "times to critical and equal-temperature times are sought up to it", "input")]
    if get(doc, "inputs.analysis.allow_out_of_scope") is not None:
        settings.append(_row(doc, "compute outside a method's scope", "inputs.analysis.allow_out_of_scope", "",
                             "case [analysis] allow_out_of_scope"))
    return {"rows": rows, "settings": settings, "overridden": len(over)}


#: Files ``steelfire sample --out`` writes beside the report (steelfire.outputs.sampling).
SAMPLE_FILES = ("variability_members.csv", "variability_samples.csv", "fig_variability_peaks.png, .svg",
                "fig_variability_times.png, .svg")
_ROUTES = (("annex_f", "Annex F"), ("cib_w14", "CIB W14"), ("equal_temperature", "equal steel temp."))


def _variability(doc, command):
    """The sampled fire severity: None for a check or size run; for a sampling run, what the record holds (the
    document's ``variability`` section where it has one, as rows keyed to it) and the files it does not."""
    v = doc.get("variability")
    if command != "sample" and not v:
        return None
    out = {"files": list(SAMPLE_FILES), "rows": [], "basis": None, "fractile": None, "warnings": []}
    if not isinstance(v, dict):
        return out
    q = v.get("target_fractile")
    qk = f"{q:g}" if P.is_number(q) else ""
    out["fractile"] = qk
    out["basis"] = (f"{v.get('fires')} fires ({v.get('method')}, seed {v.get('seed')}); probabilities given "
                    f"{v.get('given')}; {P.fmt(v.get('confidence'))} intervals: {v.get('interval')}; "
                    f"{v.get('out_of_scope_fires')} fires outside EN 1991-1-2 Annex A's range, included as published")
    for i, m in enumerate(v.get("members") or []):
        k = f"variability.members.{i}."
        lo, hi = m.get("exceedance_interval") or (None, None)
        row = [{**cell(doc, k + "name"), "cls": "txt name"}, cell(doc, k + "exceedance_probability", "factor"),
               {**cell(doc, k + "exceedance_interval", "factor"),   # ends rounded outward, as the terminal shows them
                "text": f"{P.outward(lo, False, 4)} - {P.outward(hi, True, 4)}"},
               {**cell(doc, k + "peak_steel_fractiles_C", "temperature"),   # keyed by the fractile ("0.9": no path)
                "text": P.fmt((m.get("peak_steel_fractiles_C") or {}).get(qk), "temperature", DASH)},
               cell(doc, k + "critical_temperature_C", "temperature")]
        for r, _ in _ROUTES:
            c = cell(doc, k + "equivalent_time_at_fractile_min." + r, "time", none="n/a")
            per = get(doc, k + "period_covering_fractile." + r)
            if not per and (m.get("no_period_covers_fractile") or {}).get(r):
                per = "none up to R240"
            row.append({**c, "note": per} if per else c)
        row.append(cell(doc, k + "required_minutes", "input"))
        out["rows"].append(row)
    target = v.get("target_probability")
    out["target"] = None if target is None else P.fmt(target)
    eb = v.get("error_band") or {}
    out["band_rule"] = eb.get("rule")
    out["band_rows"] = []
    for i, m in enumerate(v.get("members") or []):
        k = f"variability.members.{i}."
        lo, hi = m.get("exceedance_interval_with_band") or (None, None)
        row = [{**cell(doc, k + "name"), "cls": "txt name"}, cell(doc, k + "error_band_C", "temperature"),
               cell(doc, k + "near_critical_fires", "input"),
               cell(doc, k + "exceedance_probability_with_band", "factor"),
               {**cell(doc, k + "exceedance_interval_with_band", "factor"),
                "text": f"{P.outward(lo, False, 4)} - {P.outward(hi, True, 4)}"}]
        if target is not None:
            ex = m.get("exceeds_target_probability")
            row.append({**cell(doc, k + "exceeds_target_probability"), "text": "ABOVE" if ex else "below",
                        "cls": "flag bad" if ex else "flag ok"})
        out["band_rows"].append(row)
    out["warnings"] = [str(w) for w in v.get("warnings") or []]
    return out


def _files(doc, histories_kept):
    """The files of the run the page names (``report.files``), histories.csv described by what it holds."""
    files = list((doc.get("report") or {}).get("files") or [])
    out = []
    for f in files:
        if f == "report.html" or f.startswith("fig_"):
            continue
        what = {"results.json": "every value exact", "members.csv": "the member schedule and verdicts",
                "members.xlsx": "the same as a spreadsheet",
                "histories.csv": ("gas and steel temperature histories" if histories_kept else
                                  "the gas temperature only (steel histories not kept)")}.get(f)
        out.append(f"{f} ({what})" if what else f)
    return out


def _warnings(doc):
    return [{"text": text, "count": count} for text, count in P.warning_lines(doc, most=NAMES_IN_WARNING)]


def context(doc, figures=()) -> dict:
    """Everything the template shows, prepared from the document (and the rendered figures)."""
    from markupsafe import Markup

    from steelfire.outputs.report import plots

    rep = doc.get("report") or {}
    figs = {}
    # numbered in the order the page shows them (the template's order), not the order they were drawn
    place = {name: i for i, name in enumerate(FIGURE_ORDER)}
    figures = sorted(figures, key=lambda f: place.get(f.name, len(place)))
    for n, f in enumerate(figures, start=1):
        figs[f.name] = {"no": n, "name": f.name, "caption": f.caption,
                        "svg": Markup(plots.inline_svg(f.svg, f"fig{n}", label=f.caption))}
    sizing = any(isinstance(m.get("sizing"), dict) for m in doc["members"])
    run = doc.get("run") or {}
    return {
        "title": doc.get("title") or "",
        "command": run.get("command") or ("size" if sizing else "check"),
        "version": run.get("steelfire_version") or doc.get("steelfire_version") or "",
        "record": _record(doc),
        "marks": _page_marks(doc),
        "summary": _summary(doc, sizing),
        "fire": {"curve": doc["fire"].get("curve"), "inputs": _fire_inputs(doc), "values": _fire_values(doc)},
        "members": _members(doc),
        "histories_kept": rep.get("histories_kept", 1) != 0,
        "variability": _variability(doc, run.get("command")),
        "written": _files(doc, rep.get("histories_kept", 1) != 0),
        "selection": rep.get("selection"),
        "equivalence": _equivalence(doc),
        "sizing": _sizing(doc) if sizing else None,
        "codes": _code_values(doc),
        "warnings": _warnings(doc),
        "cautions": list(doc.get("cautions") or []),
        "figures": figs,
        "files": rep.get("files") or [],
    }


def render_report(doc, figures=()) -> str:
    """The report page (a str of HTML) from the result document and the rendered figures."""
    import jinja2

    env = jinja2.Environment(loader=jinja2.FileSystemLoader(str(HERE)), autoescape=True,
                             undefined=jinja2.StrictUndefined, trim_blocks=True, lstrip_blocks=True,
                             keep_trailing_newline=True)
    css = (HERE / STYLESHEET).read_text(encoding="utf-8")
    if "</" in css:  # the stylesheet is ours; it must not be able to close the style element
        raise ValueError(f"{STYLESHEET} holds '</'")
    from markupsafe import Markup

    return env.get_template(TEMPLATE).render(css=Markup(css), **context(doc, figures))


__all__ = ["render_report", "context", "get", "css_string", "symbol_html", "unit_html"]
