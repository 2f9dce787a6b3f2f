"""The self-contained HTML report of a run: inline CSS and SVG, no external resources, prints to A4.

Every number is formatted from the result document (the dict written to results.json) by
:func:`steelfire.output.format_number`; each numeric cell carries the JSON path of its value::

    <td class="num" data-key="fire.opening_factor_m05">0.0412353</td>

so that a test (or a reviewer) can hold every number shown against results.json. A null shows as an
em dash; a time beyond the standard-fire horizon as ``> horizon`` (class ``num gt``, keyed to the
horizon). Text cells that repeat a document string carry ``class="txt"`` and its ``data-key``;
verdict words carry ``class="flag"``. All user text (title, member and material names, file names)
is escaped with :func:`html.escape`.
"""

from __future__ import annotations

from html import escape as _esc

from steelfire.outputs.tables import format_number

DASH = "\u2014"

_CURVE_SOURCE = {
    "parametric": "EN 1991-1-2 Annex A, parametric temperature-time curve, eq (A.1), cooling eq (A.11)",
    "standard": "EN 1991-1-2 3.2.1, standard temperature-time curve, eq (3.4)",
    "external": "EN 1991-1-2 3.2.2, external fire curve, eq (3.5)",
    "hydrocarbon": "EN 1991-1-2 3.2.3, hydrocarbon curve, eq (3.6)",
    "table": "tabulated gas temperatures (case file), linear between points",
}
_ALPHA_SOURCE = {
    "standard": "EN 1991-1-2 3.2.1(3)", "external": "EN 1991-1-2 3.2.2(2)",
    "hydrocarbon": "EN 1991-1-2 3.2.3(2)", "parametric": "EN 1991-1-2 3.3.1.1(3), natural fire",
    "table": "EN 1991-1-2 3.3.1.1(3), natural fire",
}
_ROUTE_LABEL = {"annex_f": "Annex F", "cib_w14": "CIB W14", "equal_temperature": "equal temperature"}


# ----------------------------------------------------------------------------------------------
# document access and cells


class _Missing(Exception):
    pass


def get(doc, key):
    """The value at a dotted JSON path (list indices as integers); None where a parent is null."""
    v = doc
    for part in key.split("."):
        if v is None:
            return None
        if isinstance(v, list):
            v = v[int(part)]
        elif isinstance(v, dict):
            if part not in v:
                raise _Missing(key)
            v = v[part]
        else:
            raise _Missing(key)
    return v


def _has(doc, key) -> bool:
    try:
        get(doc, key)
        return True
    except (_Missing, IndexError, ValueError):
        return False


class _Cells:
    """Table cells whose content is looked up in the document by key (never passed in as a value)."""

    def __init__(self, doc, base=""):
        self.doc = doc
        self.base = base

    def at(self, base):
        """Cells of a table row whose keys are written relative to ``base`` (the row's data-base)."""
        return _Cells(self.doc, base)

    def emit(self, key):
        """The data-key as written: relative to the row base (a leading '.') where it lies under it."""
        if self.base and key.startswith(self.base + "."):
            return key[len(self.base):]
        return key

    def v(self, key):
        return get(self.doc, key)

    def num(self, key, beyond_key=None):
        if not _has(self.doc, key):  # not in the document at all (e.g. a route that does not apply)
            return f'<td class="na">{DASH}</td>'
        v = self.v(key)
        if v is None and beyond_key is not None:
            b = self.v(beyond_key)
            return f'<td class="num gt" data-key="{_esc(self.emit(beyond_key))}">&gt; {format_number(b)}</td>'
        if v is None:
            return f'<td class="num null" data-key="{_esc(self.emit(key))}">{DASH}</td>'
        if isinstance(v, bool) or not isinstance(v, (int, float)):
            raise TypeError(f"{key}: not a number ({v!r})")
        return f'<td class="num" data-key="{_esc(self.emit(key))}">{format_number(v)}</td>'

    def txt(self, key, none=DASH, cls="txt"):
        if not _has(self.doc, key):
            return f'<td class="na">{_esc(none)}</td>'
        v = self.v(key)
        if v is None:
            return f'<td class="{cls} null" data-key="{_esc(self.emit(key))}">{_esc(none)}</td>'
        if isinstance(v, bool):
            return self.flag(key, yes="true", no="false", neutral=True)
        if isinstance(v, (int, float)):
            return self.num(key)
        return f'<td class="{cls}" data-key="{_esc(self.emit(key))}">{_esc(str(v))}</td>'

    def flag(self, key, yes="meets", no="SHORT", none=DASH, neutral=False):
        if not _has(self.doc, key):
            return f'<td class="na">{DASH}</td>'
        v = self.v(key)
        word = {True: yes, False: no, None: none}[v]
        cls = {True: "flag ok", False: "flag bad", None: "flag null"}[v] if not neutral else \
            ("flag null" if v is None else "flag")
        return (f'<td class="{cls}" data-key="{_esc(self.emit(key))}" data-true="{_esc(yes)}" '
                f'data-false="{_esc(no)}">{_esc(word)}</td>')


def _lbl(text):
    return f'<td class="lbl">{_esc(text)}</td>'


def _sym(markup):
    """A symbol cell; ``markup`` is static, trusted markup (sub/sup only)."""
    return f'<td class="sym">{markup}</td>'


def _unit(markup):
    return f'<td class="unit">{markup}</td>'


def _ref(text):
    return f'<td class="ref">{_esc(text)}</td>'


def _plain(text, cls="txt"):
    return f'<td class="{cls}">{_esc(text)}</td>'


class _Row(list):
    """Cells of one table row whose keys are relative to ``base`` (written as the row's data-base)."""

    def __init__(self, base, cells):
        super().__init__(cells)
        self.base = base


def _tr(r):
    if isinstance(r, _Row):
        return f'<tr data-base="{_esc(r.base)}">' + "".join(r) + "</tr>"
    return "<tr>" + "".join(r) + "</tr>"


def _table(head, rows, cls="calc", src=None, caption=None):
    out = [f'<table class="{cls}">']
    if caption:
        out.append(f"<caption>{caption}</caption>")
    out.append("<thead><tr>" + "".join(f"<th>{h}</th>" for h in head) + "</tr>")
    if src:
        out.append('<tr class="src">' + "".join(f"<th>{_esc(s)}</th>" for s in src) + "</tr>")
    out.append("</thead><tbody>")
    out += [_tr(r) for r in rows]
    out.append("</tbody></table>")
    return "\n".join(out)


# units and symbols (static markup)
U_M = "m"
U_M2 = "m²"
U_M05 = "m½"
U_B = "J/(m² s½ K)"
U_MJ = "MJ/m²"
U_MIN = "min"
U_C = "°C"
U_NONE = "–"
U_INV_M = "1/m"
U_MM = "mm"


# ----------------------------------------------------------------------------------------------
# sections


def _stamp(doc, c):
    r = doc["run"]
    rows = [[_lbl("calculation"), c.txt("run.command"), _lbl("steelfire version"), c.txt("run.steelfire_version")],
            [_lbl("run (UTC)"), c.txt("run.utc"), _lbl("input file"), c.txt("run.case_file", none="(case built in memory)")],
            [_lbl("input SHA-256"), c.txt("run.case_sha256", cls="txt hash").replace("<td ", '<td colspan="3" ', 1)]]
    if r.get("fire_table_file"):
        rows.append([_lbl("fire table"), c.txt("run.fire_table_file"), _lbl("its SHA-256"),
                     c.txt("run.fire_table_sha256", cls="txt hash")])
    return '<table class="stamp">' + "".join("<tr>" + "".join(x) + "</tr>" for x in rows) + "</table>"


def _pagehead(doc):
    r = doc["run"]
    h = (r["case_sha256"] or "")[:16]
    bits = [f"steelfire {r['steelfire_version']}", r["utc"]]
    if h:
        bits.append(f"input sha256 {h}…")
    return (f'<div class="pagehead"><span>{_esc(doc["title"])}</span>'
            f'<span>{_esc(" · ".join(bits))}</span></div>')


def _summary(doc, c, warn_no, caution_no):
    s = doc["summary"]
    rows = [[_lbl("members checked"), c.num("summary.members")],
            [_lbl("pass the design fire (peak steel temperature ≤ critical)"), c.num("summary.pass_design_fire")],
            [_lbl("fail the design fire"), c.num("summary.fail_design_fire")],
            [_lbl("with a required standard-fire period"), c.num("summary.with_required_period")],
            [_lbl("meet their required period under the standard fire"), c.num("summary.meet_required_period")],
            [_lbl("short of their required period"), c.num("summary.short_of_required_period")],
            [_lbl("pass the design fire and meet their period"), c.num("summary.ok")],
            [_lbl("with an unconservative equivalence route (> 10 % below the direct answer)"),
             c.num("summary.unconservative_equivalence")]]
    if s.get("sized"):
        rows += [[_lbl("sized"), c.num("summary.sized")],
                 [_lbl("sizing not achievable"), c.num("summary.sizing_not_achievable")]]
    rows.append([_lbl(f"warnings (section {warn_no})"), c.num("summary.warnings")])
    verdict = ("Every member passes the design fire and meets its required period." if s["all_ok"] else
               "Not every member passes the design fire and meets its required period: see section 3.")
    out = [f'<p class="verdict {"ok" if s["all_ok"] else "bad"}">{_esc(verdict)}</p>',
           _table(["", "members"], rows, cls="calc summary")]
    if doc["out_of_scope"]:
        items = "".join(f"<li>{_esc(x)}</li>" for x in doc["out_of_scope"])
        out.insert(0, '<div class="oos"><strong>Computed outside the scope of the method '
                      f'(analysis.allow_out_of_scope = true).</strong><ul>{items}</ul></div>')
    f = doc["fire"]
    crv = _esc(f["curve"])
    out.append(f'<p class="note">Design fire: <b>{crv}</b> ({_esc(_CURVE_SOURCE.get(f["curve"], ""))}). '
               f"Read the results with the warnings (section {warn_no}) and the cautions (section {caution_no}).</p>")
    return "\n".join(out)


def _fire_inputs(doc, c):
    inp = doc.get("inputs")
    out = []
    if not inp:
        return '<p class="note">The case inputs are not recorded (no case file was given).</p>'
    comp = inp.get("compartment")
    if comp:
        rows = [[_lbl("floor area"), _sym("A<sub>f</sub>"), c.num("inputs.compartment.floor_area_m2"), _unit(U_M2),
                 _ref("case [compartment]")],
                [_lbl("height, floor to ceiling"), _sym("H"), c.num("inputs.compartment.height_m"), _unit(U_M),
                 _ref("case [compartment]")],
                [_lbl("enclosure area, openings included"), _sym("A<sub>t</sub>"),
                 c.num("inputs.compartment.boundary_area_m2"), _unit(U_M2), _ref("EN 1991-1-2 Annex A (3)")],
                [_lbl("horizontal (roof) openings"), _sym("A<sub>h</sub>"), c.num("inputs.compartment.roof_opening_area_m2"),
                 _unit(U_M2), _ref("Annex F only; Annex A does not cover them")]]
        if comp.get("thermal_inertia") is not None:
            rows.append([_lbl("thermal inertia of the enclosure (given)"), _sym("b"),
                         c.num("inputs.compartment.thermal_inertia"), _unit(U_B),
                         _ref("EN 1991-1-2 Annex A (3), b = √(ρcλ)")])
        out.append("<h3>Compartment</h3>")
        out.append(_table(["quantity", "symbol", "value", "unit", "source"], rows))
        if comp["openings"]:
            rows = []
            for i, _ in enumerate(comp["openings"]):
                k = f"inputs.compartment.openings.{i}"
                rows.append([_plain(f"group {i + 1}", "lbl"), c.num(k + ".width_m"), c.num(k + ".height_m"),
                             c.num(k + ".count")])
            out.append("<h3>Vertical openings</h3>")
            out.append(_table(["group", "width [m]", "height h<sub>i</sub> [m]", "count"], rows))
        if comp["surfaces"]:
            rows = []
            for i, srf in enumerate(comp["surfaces"]):
                for j, _ in enumerate(srf["layers"]):
                    k = f"inputs.compartment.surfaces.{i}"
                    kl = f"{k}.layers.{j}"
                    rows.append([_plain(f"surface {i + 1}" if j == 0 else "", "lbl"),
                                 c.num(k + ".area_m2") if j == 0 else _plain(""),
                                 _plain(f"layer {j + 1}", "lbl"), c.num(kl + ".thickness_m"), c.num(kl + ".density"),
                                 c.num(kl + ".conductivity"), c.num(kl + ".specific_heat")])
            out.append("<h3>Enclosure surfaces (layers from the fire side)</h3>")
            out.append(_table(["surface", "area A<sub>j</sub> [m²]", "layer", "thickness s [m]", "density ρ [kg/m³]",
                               "conductivity λ [W/(m K)]", "specific heat c [J/(kg K)]"], rows,
                              src=["", "", "", "EN 1991-1-2 Annex A (8)-(9), b of each surface, eq (A.9) weighting",
                                   "", "", ""]))
    fl = inp.get("fire_load")
    if fl:
        rows = []
        if fl.get("characteristic_MJ_m2") is not None:
            rows.append([_lbl("characteristic fire load density"), _sym("q<sub>f,k</sub>"),
                         c.num("inputs.fire_load.characteristic_MJ_m2"), _unit(U_MJ),
                         _ref("EN 1991-1-2 Annex E, Table E.4 (by occupancy)")])
            rows.append([_lbl("combustion factor"), _sym("m"), c.num("inputs.fire_load.combustion_factor"), _unit(U_NONE),
                         _ref("EN 1991-1-2 Annex E, combustion behaviour")])
            if isinstance(fl.get("area_factor"), str):
                rows.append([_lbl("area factor (from Table E.1, value used in section 2.2)"), _sym("δ<sub>q1</sub>"),
                             c.txt("inputs.fire_load.area_factor"), _unit(U_NONE), _ref("EN 1991-1-2 Table E.1")])
            else:
                rows.append([_lbl("area factor (given)"), _sym("δ<sub>q1</sub>"), c.num("inputs.fire_load.area_factor"),
                             _unit(U_NONE), _ref("EN 1991-1-2 Table E.1")])
            rows.append([_lbl("occupancy factor"), _sym("δ<sub>q2</sub>"), c.num("inputs.fire_load.occupancy_factor"),
                         _unit(U_NONE), _ref("EN 1991-1-2 Table E.1")])
            rows.append([_lbl("active fire-fighting measures"), _sym("δ<sub>n</sub> = Π δ<sub>ni</sub>"),
                         c.num("inputs.fire_load.measures_factor"), _unit(U_NONE), _ref("EN 1991-1-2 Table E.2")])
        if fl.get("design_MJ_m2") is not None:
            rows.append([_lbl("design fire load density (given)"), _sym("q<sub>f,d</sub>"),
                         c.num("inputs.fire_load.design_MJ_m2"), _unit(U_MJ), _ref("case input")])
        rows.append([_lbl("fire growth rate"), _sym(""), c.txt("inputs.fire_load.growth"), _unit(""),
                     _ref("EN 1991-1-2 Table E.5, sets t_lim (Annex A (10))")])
        out.append("<h3>Fire load</h3>")
        out.append(_table(["quantity", "symbol", "value", "unit", "source"], rows))
    rows = [[_lbl("design fire curve"), c.txt("inputs.fire.curve"), _unit(""),
             _ref(_CURVE_SOURCE.get(inp["fire"]["curve"], ""))],
            [_lbl("duration of the design fire, cooling included"), c.num("inputs.fire.duration_min"), _unit(U_MIN),
             _ref("case [fire] duration_min")]]
    if inp["fire"].get("file"):
        rows.append([_lbl("gas temperature table"), c.txt("inputs.fire.file"), _unit(""), _ref("case [fire] file")])
    if inp["fire"].get("convection_coefficient") is not None:
        rows.append([_lbl("convective coefficient (given)"), c.num("inputs.fire.convection_coefficient"),
                     _unit("W/(m² K)"), _ref("case [fire] convection_coefficient")])
    out.append("<h3>Design fire settings</h3>")
    out.append(_table(["quantity", "value", "unit", "source"], rows))
    return "\n".join(out)


def _fire_values(doc, c):
    f = doc["fire"]
    inp = doc.get("inputs") or {}
    fl = inp.get("fire_load") or {}
    comp = inp.get("compartment") or {}
    rows = []

    def add(label, sym, key, unit, ref, kind="num"):
        if get(doc, key) is None:
            return
        cell = c.num(key) if kind == "num" else c.txt(key)
        rows.append([_lbl(label), _sym(sym), cell, _unit(unit), _ref(ref)])

    for r in doc.get("fire_rows", []):  # the fire model's own rows, in its order
        key = "fire." + r["key"]
        kind = "txt" if isinstance(f.get(r["key"]), str) else "num"
        add(r["label"], _esc(r["symbol"]), key, r["unit"], r["clause"], kind=kind)
    add("peak gas temperature", "θ<sub>g,max</sub>", "fire.peak_gas_temperature_C", U_C,
        "maximum on the time grid (t_max and t_lim are put on the grid)")
    add("time of the peak gas temperature", "", "fire.time_of_peak_gas_min", U_MIN, "")
    add("duration analysed", "", "fire.duration_min", U_MIN, "case [fire] duration_min")
    given_alpha = ((inp.get("fire") or {}).get("convection_coefficient") is not None)
    add("convective heat transfer coefficient", "α<sub>c</sub>", "fire.convection_coefficient", "W/(m² K)",
        "case input" if given_alpha else _ALPHA_SOURCE.get(f["curve"], ""))
    rows.insert(0, [_lbl("design fire curve"), _sym(""), c.txt("fire.curve"), _unit(""),
                    _ref(_CURVE_SOURCE.get(f["curve"], ""))])
    out = [_table(["quantity", "symbol", "value", "unit", "source"], rows)]
    if f["curve"] == "parametric":
        cv = "code_values."
        lim = [("opening factor O", "fire.opening_factor_m05", "annex_a_opening_factor_min",
                "annex_a_opening_factor_max", U_M05),
               ("thermal inertia b", "fire.thermal_inertia", "annex_a_thermal_inertia_min",
                "annex_a_thermal_inertia_max", U_B),
               ("fire load q_t,d", "fire.total_area_fire_load_MJ_m2", "annex_a_fire_load_min_MJ_m2",
                "annex_a_fire_load_max_MJ_m2", U_MJ)]
        rows = [[_lbl(a), c.num(k), c.num(cv + lo), c.num(cv + hi), _unit(u)] for a, k, lo, hi, u in lim
                if _has(doc, cv + lo) and _has(doc, cv + hi)]
        if comp:
            for a, k, hi, u in (("floor area A_f", "inputs.compartment.floor_area_m2", "annex_a_floor_area_max_m2", U_M2),
                                ("height H", "inputs.compartment.height_m", "annex_a_height_max_m", U_M)):
                if _has(doc, cv + hi):
                    rows.append([_lbl(a), c.num(k), _plain("", "txt"), c.num(cv + hi), _unit(u)])
        scope = ("Within the scope of Annex A." if not doc["out_of_scope"] else
                 "OUTSIDE the scope of Annex A: see the banner in section 1 and the warnings.")
        out.append("<h3>Scope of Annex A (EN 1991-1-2 Annex A (1)-(4))</h3>")
        out.append(_table(["quantity", "value", "lower limit", "upper limit", "unit"], rows))
        out.append(f'<p class="note">{_esc(scope)} Annex A holds for mainly cellulosic fire loads and compartments '
                   "without roof openings.</p>")
    return "\n".join(out)


def _members(doc, c0):
    c = c0
    ms = doc["members"]
    out = []
    rows = []
    for i, m in enumerate(ms):
        k = f"members.{i}."
        c = c0.at(f"members.{i}")
        rows.append(_Row(f"members.{i}", [
                     c.txt(k + "name", cls="txt name"), c.txt(k + "kind"), c.num(k + "section_factor_per_m"),
                     c.num(k + "shadow_factor"), c.txt(k + "protection", none="bare steel"), c.num(k + "thickness_mm"),
                     c.num(k + "utilisation"), c.num(k + "critical_temperature_C"),
                     c.txt(k + "critical_temperature_source", cls="txt ref"), c.num(k + "required_minutes")]))
    out.append("<h3>Members and their inputs</h3>")
    out.append(_table(["member", "kind", "A/V [1/m]", "k<sub>sh</sub> [–]", "protection", "d<sub>p</sub> [mm]",
                       "μ<sub>0</sub> [–]", "θ<sub>a,cr</sub> [°C]", "θ<sub>a,cr</sub> from", "t<sub>req</sub> [min]"],
                      rows, cls="calc members",
                      src=["", "", "A_m/V bare, A_p/V protected (EN 1993-1-2 4.2.5)", "EN 1993-1-2 eq (4.26)", "", "",
                           "EN 1993-1-2 4.2.4", "eq (4.22) or given", "", "standard fire"]))
    rows = []
    horizon = "analysis.standard_horizon_min"
    for i, m in enumerate(ms):
        k = f"members.{i}."
        c = c0.at(f"members.{i}")
        rows.append(_Row(f"members.{i}", [c.txt(k + "name", cls="txt name"), c.num(k + "peak_steel_temperature_C"),
                     c.num(k + "time_of_peak_steel_min"), c.num(k + "critical_temperature_C"), c.num(k + "margin_C"),
                     c.flag(k + "passes", yes="PASS", no="FAIL"),
                     c.num(k + "standard_fire_time_to_critical_min", beyond_key=horizon),
                     c.num(k + "required_minutes"), c.flag(k + "meets_required_period")]))
    out.append("<h3>Verdicts</h3>")
    out.append(_table(["member", "θ<sub>a,max</sub> [°C]", "at [min]", "θ<sub>a,cr</sub> [°C]", "margin [°C]",
                       "design fire", "t<sub>cr,std</sub> [min]", "t<sub>req</sub> [min]", "period"],
                      rows, cls="calc members",
                      src=["", "EN 1993-1-2 eq (4.25) bare, (4.27) protected", "", "", "θ_a,cr − θ_a,max",
                           "θ_a,max ≤ θ_a,cr", "standard fire, EN 1991-1-2 eq (3.4)", "", "t_cr,std ≥ t_req"]))
    out.append('<p class="note">Peak steel temperatures are taken over the whole design fire, cooling phase '
               "included; t<sub>cr,std</sub> is the time to the critical temperature under the standard fire "
               f"(&gt; horizon: not reached within analysis.standard_horizon_min).</p>")
    c = c0
    mats = (doc.get("inputs") or {}).get("materials") or []
    if mats:
        rows = []
        for j, mt in enumerate(mats):
            k = f"inputs.materials.{j}."
            rc = c.at(f"inputs.materials.{j}")
            if isinstance(mt["conductivity"], list):
                parts = []
                for n, _ in enumerate(mt["conductivity"]):
                    kk = f"{k}conductivity.{n}."
                    parts.append(f'<span class="num" data-key="{_esc(rc.emit(kk + "0"))}">'
                                 f'{format_number(get(doc, kk + "0"))}</span> °C: '
                                 f'<span class="num" data-key="{_esc(rc.emit(kk + "1"))}">'
                                 f'{format_number(get(doc, kk + "1"))}</span>')
                cond = '<td class="txt">' + "; ".join(parts) + "</td>"
            else:
                cond = rc.num(k + "conductivity")
            rows.append(_Row(f"inputs.materials.{j}", [rc.txt(k + "name", cls="txt name"), rc.num(k + "density"), cond,
                                                       rc.num(k + "specific_heat"), rc.num(k + "moisture_percent")]))
        out.append("<h3>Protection materials</h3>")
        out.append(_table(["material", "density ρ<sub>p</sub> [kg/m³]", "conductivity λ<sub>p</sub> [W/(m K)]",
                           "specific heat c<sub>p</sub> [J/(kg K)]", "moisture [%]"], rows,
                          src=["", "EN 1993-1-2 eq (4.27)", "constant, or by steel temperature", "",
                               "delay, EN 1993-1-2 4.2.5.2(2)"]))
        out.append('<p class="note">Use protection products only within their own assessed ranges; the values '
                   "here are those of the case.</p>")
    return "\n".join(out)


def _equivalence(doc, c0):
    c = c0
    ms = doc["members"]
    out = []
    rows = []
    horizon = "analysis.standard_horizon_min"
    for i, m in enumerate(ms):
        k = f"members.{i}."
        c = c0.at(f"members.{i}")
        e = m.get("equivalence") or {}
        unc = ", ".join(_ROUTE_LABEL.get(r, r) for r in e.get("unconservative") or []) or DASH
        ke = k + "equivalence."
        if not e:
            rows.append(_Row(f"members.{i}", [c.txt(k + "name", cls="txt name"), c.num(k + "required_minutes")] +
                             [_plain(DASH)] * 9))
            continue
        rows.append(_Row(f"members.{i}", [c.txt(k + "name", cls="txt name"), c.num(k + "required_minutes"),
                     c.num(k + "standard_fire_time_to_critical_min", beyond_key=horizon),
                     c.num(ke + "annex_f_min"), c.num(ke + "annex_f_small_compartment_min"), c.num(ke + "cib_w14_min"),
                     c.num(ke + "equal_temperature_min", beyond_key=horizon),
                     f'<td class="txt{" warn" if e.get("unconservative") else ""}">{_esc(unc)}</td>',
                     c.flag(ke + "meets_required.annex_f", yes="yes", no="no"),
                     c.flag(ke + "meets_required.cib_w14", yes="yes", no="no"),
                     c.flag(ke + "meets_required.equal_temperature", yes="yes", no="no")]))
    out.append("<h3>Equivalent times per member</h3>")
    out.append(_table(["member", "t<sub>req</sub> [min]", "t<sub>cr,std</sub> [min]", "Annex F t<sub>e,d</sub> [min]",
                       "(F.3) t<sub>e,d</sub> [min]", "CIB W14 t<sub>e</sub> [min]", "equal temp. t<sub>e</sub> [min]",
                       "unconservative", "F ≤ t<sub>req</sub>", "CIB ≤ t<sub>req</sub>", "equal ≤ t<sub>req</sub>"],
                      rows, cls="calc members",
                      src=["", "", "standard fire", "EN 1991-1-2 eq (F.1)", "eq (F.3), A_f < 100 m²", "CIB W14",
                           "direct route", "> 10 % below direct", "", "", ""]))
    out.append('<p class="note">The equal-temperature route is the direct one: the standard-fire time at which the '
               "member reaches the peak temperature it reaches in the design fire. A route more than 10 % below it "
               "is flagged unconservative. The last three columns say whether each equivalent time is within the "
               "required period (the design fire is then no more severe than the required standard-fire period by "
               "that route).</p>")
    c = c0
    fac = (doc["fire"].get("equivalence_factors") or {})
    cols = [(k, lab) for k, lab in (("annex_f_protected", "protected steel"), ("annex_f_bare", "bare steel"))
            if fac.get(k)]
    if cols:
        base = "fire.equivalence_factors."
        spec = [("design fire load density", "q<sub>f,d</sub>", "design_fire_load_MJ_m2", U_MJ, "EN 1991-1-2 eq (E.1)",
                 "num"),
                ("thermal inertia", "b", "thermal_inertia", U_B, "Annex A (3)", "num"),
                ("conversion factor", "k<sub>b</sub>", "k_b", "min m²/MJ", "EN 1991-1-2 Table F.1", "num"),
                ("band of b", "", "k_b_band", "", "EN 1991-1-2 Table F.1", "txt"),
                ("A_v / A_f as computed", "α<sub>v</sub>", "alpha_v_raw", U_NONE, "EN 1991-1-2 eq (F.2)", "num"),
                ("A_v / A_f as used (0.025 ≤ α_v ≤ 0.25)", "α<sub>v</sub>", "alpha_v", U_NONE, "EN 1991-1-2 eq (F.2)",
                 "num"),
                ("A_h / A_f", "α<sub>h</sub>", "alpha_h", U_NONE, "EN 1991-1-2 eq (F.2)", "num"),
                ("b_v as computed", "b<sub>v</sub> = 12.5(1 + 10α<sub>v</sub> − α<sub>v</sub>²)", "b_v_raw", U_NONE,
                 "EN 1991-1-2 eq (F.2)", "num"),
                ("b_v as used (≥ 10)", "b<sub>v</sub>", "b_v", U_NONE, "EN 1991-1-2 eq (F.2)", "num"),
                ("height factor", "(6.0/H)<sup>0.3</sup>", "height_factor", U_NONE, "EN 1991-1-2 eq (F.2)", "num"),
                ("ventilation factor as computed", "w<sub>f</sub>", "w_f_raw", U_NONE, "EN 1991-1-2 eq (F.2)", "num"),
                ("ventilation factor as used (≥ 0.5)", "w<sub>f</sub>", "w_f", U_NONE, "EN 1991-1-2 eq (F.2)", "num"),
                ("opening factor", "O", "opening_factor_m05", U_M05, "Annex A (3)", "num"),
                ("correction factor", "k<sub>c</sub>", "k_c", U_NONE, "EN 1991-1-2 Table F.2", "num"),
                ("basis of k_c", "", "k_c_basis", "", "EN 1991-1-2 Table F.2", "txt"),
                ("equivalent time", "t<sub>e,d</sub> = q<sub>f,d</sub> k<sub>b</sub> w<sub>f</sub> k<sub>c</sub>", "t_e_min",
                 U_MIN, "EN 1991-1-2 eq (F.1)", "num"),
                ("small compartment: ventilation factor", "w<sub>f</sub> = O<sup>−½</sup> A<sub>f</sub>/A<sub>t</sub>",
                 "small_compartment.w_f", U_NONE, "EN 1991-1-2 eq (F.3)", "num"),
                ("small compartment: equivalent time", "t<sub>e,d</sub>", "small_compartment.t_e_min", U_MIN,
                 "EN 1991-1-2 eq (F.1) with eq (F.3)", "num"),
                ("eq (F.3)", "", "small_compartment_note", "", "EN 1991-1-2 eq (F.3)", "txt")]
        rows = []
        for label, sym, key, unit, ref, kind in spec:
            cells = []
            for col, _ in cols:
                full = f"{base}{col}.{key}"
                cells.append((c.num(full) if kind == "num" else c.txt(full, cls="txt ref")) if _has(doc, full)
                             else _plain(DASH))
            rows.append([_lbl(label), _sym(sym)] + cells + [_unit(unit), _ref(ref)])
        out.append("<h3>EN 1991-1-2 Annex F factors</h3>")
        out.append(_table(["quantity", "symbol"] + [lab for _, lab in cols] + ["unit", "source"], rows))
    if fac.get("cib_w14"):
        base = "fire.equivalence_factors.cib_w14."
        rows = [[_lbl("design fire load density"), _sym("q<sub>f,d</sub>"), c.num(base + "design_fire_load_MJ_m2"),
                 _unit(U_MJ), _ref("EN 1991-1-2 eq (E.1)")],
                [_lbl("thermal inertia"), _sym("b"), c.num(base + "thermal_inertia"), _unit(U_B), _ref("Annex A (3)")],
                [_lbl("conversion factor"), _sym("k<sub>c</sub>"), c.num(base + "k_c"), _unit("min m<sup>2.25</sup>/MJ"),
                 _ref("CIB W14 design guide (1986), by band of b; values from memory, check against the source")],
                [_lbl("band of b"), _sym(""), c.txt(base + "k_c_band"), _unit(""), _ref("CIB W14")],
                [_lbl("ventilation factor"), _sym("w = A<sub>f</sub> / √(A<sub>v</sub> A<sub>t</sub> √h<sub>eq</sub>)"),
                 c.num(base + "w"), _unit("m<sup>−¼</sup>"), _ref("CIB W14 (equal to eq (F.3) of EN 1991-1-2)")],
                [_lbl("equivalent time, protected members"), _sym("t<sub>e</sub> = k<sub>c</sub> w q<sub>f,d</sub>"),
                 c.num(base + "t_e_min"), _unit(U_MIN), _ref("CIB W14")]]
        if get(doc, base + "not_applicable_reason") is not None:
            rows.append([_lbl("not applicable because"), _sym(""), c.txt(base + "not_applicable_reason"), _unit(""),
                         _ref("CIB W14")])
        out.append("<h3>CIB W14 factors</h3>")
        out.append(_table(["quantity", "symbol", "value", "unit", "source"], rows))
        out.append('<p class="note">CIB W14 is an empirical correlation for protected (insulated) members, not a '
                   "Eurocode method; its use rests with the approving authority. It is left blank for bare members.</p>")
    if not fac:
        out.append('<p class="note">Annex F and CIB W14 need [compartment] and [fire_load]; only the '
                   "equal-steel-temperature route is given for this case.</p>")
    return "\n".join(out)


def _value_cell(c, doc, key):
    """A cell for a document value of any type: number, flag, text, or a short list / dict of numbers."""
    v = get(doc, key)
    if isinstance(v, bool) or v is None:
        return c.flag(key, yes="yes", no="NO") if isinstance(v, bool) else c.num(key)
    if isinstance(v, (int, float)):
        return c.num(key)
    if isinstance(v, str):
        return c.txt(key)
    if isinstance(v, list) and all(isinstance(x, (int, float)) and not isinstance(x, bool) for x in v):
        parts = [f'<span class="num" data-key="{_esc(c.emit(key))}.{j}">{format_number(x)}</span>'
                 for j, x in enumerate(v)]
        return '<td class="txt">' + " – ".join(parts) + "</td>"
    if isinstance(v, dict) and all(isinstance(x, (int, float)) and not isinstance(x, bool) or x is None
                                   for x in v.values()):
        parts = [f'{_esc(k)} <span class="num" data-key="{_esc(c.emit(key))}.{_esc(k)}">'
                 f'{DASH if x is None else format_number(x)}</span>' for k, x in v.items()]
        return '<td class="txt">' + ", ".join(parts) + "</td>"
    return _plain(str(v))


def _sizing(doc, c0, sizing_keys):
    keys = [k for k in sizing_keys if k != "note"]
    rows, notes = [], []
    for i, m in enumerate(doc["members"]):
        if not isinstance(m.get("sizing"), dict):
            continue
        k = f"members.{i}."
        c = c0.at(f"members.{i}")
        cells = [c.txt(k + "name", cls="txt name"), c.num(k + "thickness_mm")]
        for key in keys:
            full = f"{k}sizing.{key}"
            cells.append(_value_cell(c, doc, full) if _has(doc, full) else f'<td class="na">{DASH}</td>')
        rows.append(_Row(f"members.{i}", cells))
        note = m["sizing"].get("note")
        if isinstance(note, str) and note:
            notes.append(f'<li><b>{_esc(m["name"])}</b>: '
                         f'<span class="txt" data-key="{_esc(k)}sizing.note">{_esc(note)}</span></li>')
    labels = {"standard_period_mm": "least d<sub>p</sub>, standard period [mm]",
              "burnout_mm": "least d<sub>p</sub>, design fire [mm]", "governing": "governs",
              "chosen_mm": "chosen d<sub>p</sub> [mm]", "achievable": "achievable",
              "supplied_range_mm": "supplied range [mm]", "iterations": "bisection steps"}
    head = ["member", "d<sub>p</sub> in the case [mm]"] + [labels.get(k, _esc(k)) for k in keys]
    out = [_table(head, rows, cls="calc members")]
    if notes:
        out.append('<ul class="notes">' + "".join(notes) + "</ul>")
    out.append('<p class="note">Least thickness by scanning upward and bisecting the first passing interval, '
               "rounded up to an available thickness and verified (EN 1993-1-2 eq (4.27)); under the design fire "
               "a thicker layer can give a hotter burnout peak.</p>")
    return "\n".join(out)


def _code_values(doc, c):
    src = doc.get("code_value_sources") or {}
    over = set(((doc.get("inputs") or {}).get("code_overrides") or {}).keys())
    rows = []
    for name in doc["code_values"]:
        k = "code_values." + name
        rows.append([_plain(name, "txt code"), c.num(k),
                     c.txt(f"code_value_sources.{name}.unit", cls="unit") if name in src else _plain(""),
                     c.txt(f"code_value_sources.{name}.clause", cls="ref") if name in src else _plain(""),
                     _plain("case [code]" if name in over else "EN recommended", "txt" + (" warn" if name in over else ""))])
    settings = [[_lbl("time step"), c.num("analysis.time_step_s"), _unit("s"),
                 _ref("EN 1993-1-2 4.2.5.1(4) ≤ 5 s bare, 4.2.5.2(3) ≤ 30 s protected")],
                [_lbl("standard-fire horizon"), c.num("analysis.standard_horizon_min"), _unit(U_MIN),
                 _ref("times to critical and equal-temperature equivalence are sought up to it")]]
    if _has(doc, "inputs.analysis.allow_out_of_scope"):
        settings.append([_lbl("compute outside a method's scope"),
                         c.flag("inputs.analysis.allow_out_of_scope", yes="yes", no="no", neutral=True),
                         _unit(""), _ref("case [analysis] allow_out_of_scope")])
    return "\n".join([
        "<h3>Analysis settings</h3>",
        _table(["setting", "value", "unit", "source"], settings),
        "<h3>Code values used</h3>",
        '<p class="note">Every value taken from a clause, as used in this run; national annexes may set other '
        "values (override by name in the case's [code] table).</p>",
        _table(["name", "value", "unit", "clause", "set by"], rows, cls="calc codes")])


# ----------------------------------------------------------------------------------------------
# page


CSS = """
:root { --ink: #1c232b; --mute: #505b66; --rule: #b9c1c9; --hair: #dde2e7; --band: #f3f5f7;
        --bad: #8c1d0e; --ok: #1f4d2b; --warn: #7a4b00; }
* { box-sizing: border-box; }
html { background: #fff; }
body { margin: 0 auto; max-width: 200mm; padding: 10mm 8mm 16mm; color: var(--ink);
       font: 10pt/1.42 "Liberation Sans", "Helvetica Neue", Arial, sans-serif; }
header.runhead { border-top: 2.5pt solid var(--ink); border-bottom: 0.75pt solid var(--ink); padding: 3mm 0 2mm;
                 margin-bottom: 5mm; }
.kind { font-size: 8.5pt; letter-spacing: 0.08em; text-transform: uppercase; color: var(--mute); }
h1 { font-size: 16pt; margin: 1mm 0 2mm; font-weight: 700; }
h2 { font-size: 12.5pt; margin: 7mm 0 2mm; padding-bottom: 1mm; border-bottom: 0.75pt solid var(--ink); }
h2 .no { display: inline-block; min-width: 8mm; }
h3 { font-size: 10.5pt; margin: 5mm 0 1.5mm; }
table { border-collapse: collapse; margin: 1mm 0 3mm; font-variant-numeric: tabular-nums; }
table.stamp td { padding: 0.4mm 4mm 0.4mm 0; font-size: 8.5pt; vertical-align: top; }
table.stamp td.lbl { color: var(--mute); white-space: nowrap; }
td.hash { font-family: "DejaVu Sans Mono", "Liberation Mono", Consolas, monospace; font-size: 8pt;
          word-break: break-all; }
table.calc { width: 100%; font-size: 9pt; }
table.calc th { text-align: left; font-weight: 600; border-bottom: 0.75pt solid var(--ink); padding: 1mm 1.5mm;
                vertical-align: bottom; }
table.calc tr.src th { font-weight: 400; font-size: 7.5pt; color: var(--mute); border-bottom: 0.5pt solid var(--rule);
                       padding-top: 0; }
table.calc td { border-bottom: 0.5pt solid var(--hair); padding: 0.8mm 1.5mm; vertical-align: top; }
table.calc tbody tr:nth-child(even) td { background: var(--band); }
table.summary { width: auto; min-width: 110mm; }
td.num { text-align: right; white-space: nowrap; }
td.num.null, td.flag.null, td.na { color: var(--mute); text-align: center; }
td.sym { white-space: nowrap; }
td.unit { color: var(--mute); white-space: nowrap; }
td.ref, td.txt.ref { color: var(--mute); font-size: 8pt; }
td.name { font-weight: 600; white-space: nowrap; }
td.code { font-family: "DejaVu Sans Mono", "Liberation Mono", Consolas, monospace; font-size: 8pt; }
td.flag { text-align: center; white-space: nowrap; }
td.flag.bad { color: var(--bad); font-weight: 700; }
td.flag.ok { color: var(--ok); }
td.warn { color: var(--warn); font-weight: 600; }
p.note { font-size: 8.5pt; color: var(--mute); margin: 1mm 0 3mm; }
p.verdict { font-weight: 700; padding: 2mm 3mm; border-left: 2.5pt solid var(--ok); background: var(--band); }
p.verdict.bad { border-left-color: var(--bad); }
div.oos { border: 1.25pt solid var(--bad); padding: 2mm 3mm; margin: 2mm 0 4mm; color: var(--bad); }
figure { margin: 3mm 0 5mm; }
figure svg { display: block; width: 100%; height: auto; }
figcaption { font-size: 8.5pt; color: var(--mute); margin-top: 1mm; }
figcaption b { color: var(--ink); }
ol.warnings li, ul.notes li { margin-bottom: 1.5mm; }
ul.notes { font-size: 8.5pt; }
div.cautions { border: 1pt solid var(--ink); padding: 2mm 4mm; }
div.cautions ul { margin: 1mm 0; padding-left: 5mm; }
div.pagehead { display: none; }
footer { margin-top: 8mm; border-top: 0.5pt solid var(--rule); padding-top: 1.5mm; font-size: 8pt; color: var(--mute); }
@page { size: A4 portrait; margin: 15mm 13mm 16mm 13mm; }
@media print {
  body { max-width: none; padding: 0; font-size: 9pt; }
  * { -webkit-print-color-adjust: exact; print-color-adjust: exact; }
  section.sheet { break-before: page; page-break-before: always; }
  section.sheet.first { break-before: auto; page-break-before: auto; }
  div.pagehead { display: flex; justify-content: space-between; gap: 4mm; font-size: 7.5pt; color: var(--mute);
                 border-bottom: 0.5pt solid var(--rule); padding-bottom: 1mm; margin-bottom: 3mm; }
  section.sheet.first div.pagehead { display: none; }
  h2 { margin-top: 0; break-after: avoid; page-break-after: avoid; }
  h3 { break-after: avoid; page-break-after: avoid; }
  table.calc { font-size: 7.8pt; }
  table.calc tr.src th { font-size: 6.8pt; }
  thead { display: table-header-group; }
  tr, figure, div.cautions, div.oos, p.verdict { break-inside: avoid; page-break-inside: avoid; }
  figure svg { max-height: 225mm; }
}
"""


def render_report(doc, figures) -> str:
    """The report page (a str of HTML) from the result document and the rendered figures."""
    from steelfire.outputs.report import plots
    from steelfire.outputs.tables import sizing_columns

    c = _Cells(doc)
    figs = {f.name: f for f in figures}
    fig_no = {}

    def figure(name):
        f = figs.get(name)
        if f is None:
            return ""
        n = len(fig_no) + 1
        fig_no[name] = n
        svg = plots.inline_svg(f.svg, f"fig{n}", label=f.caption)
        return (f'<figure id="figure-{n}">{svg}<figcaption><b>Figure {n}.</b> {_esc(f.caption)} '
                f'(also fig_{_esc(name)}.png, fig_{_esc(name)}.svg)</figcaption></figure>')

    title = _esc(doc["title"])
    cmd = _esc(doc["run"]["command"])
    sections = []
    ph = _pagehead(doc)

    def section(no, head, body, first=False):
        cls = "sheet first" if first else "sheet"
        sections.append(f'<section class="{cls}" id="s{no}">{ph}<h2><span class="no">{no}</span>{_esc(head)}</h2>\n'
                        f"{body}\n</section>")

    sz = sizing_columns(doc)
    warn_no = 7 if sz else 6
    section(1, "Summary", _summary(doc, c, warn_no, warn_no + 1), first=True)
    section(2, "Design fire",
            "<h3>2.1 Inputs</h3>\n" + _fire_inputs(doc, c) + "\n<h3>2.2 Intermediate values and the design fire</h3>\n" +
            _fire_values(doc, c) + "\n" + figure("design_fire"))
    hist_note = ""
    if doc["report"].get("histories_kept", 0) == 0:
        hist_note = ('<p class="note">Steel temperature histories were not kept for this run '
                     "(analyse(case, histories=False)): no history figure, and histories.csv holds the gas only.</p>")
    section(3, "Members: steel temperatures and verdicts",
            _members(doc, c) + "\n" + hist_note + figure("steel_temperatures"))
    section(4, "Time equivalence", _equivalence(doc, c) + "\n" + figure("time_equivalence"))
    no = 5
    if sz:
        section(no, "Protection sizing", _sizing(doc, c, sz) + "\n" + figure("thickness"))
        no += 1
    section(no, "Code values and settings", _code_values(doc, c))
    no += 1
    w = "".join(f"<li>{_esc(x)}</li>" for x in doc["warnings"]) or "<li>none</li>"
    section(no, "Warnings", f'<ol class="warnings">{w}</ol>')
    no += 1
    cau = "".join(f"<li>{_esc(x)}</li>" for x in doc["cautions"])
    section(no, "Cautions",
            f'<div class="cautions"><p><b>Limits of this calculation.</b></p><ul>{cau}</ul></div>'
            '<p class="note">The figures and tables are produced from results.json of the same run; '
            "members.csv and histories.csv hold the schedule and the temperature histories.</p>")
    page = "\n".join([
        "<!DOCTYPE html>",
        '<html lang="en">',
        "<head>",
        '<meta charset="utf-8">',
        '<meta name="viewport" content="width=device-width, initial-scale=1">',
        f"<title>{title} — steelfire {cmd}</title>",
        f"<style>{CSS}</style>",
        "</head>",
        "<body>",
        '<header class="runhead">',
        f'<div class="kind">Structural fire calculation · steelfire {cmd}</div>',
        f"<h1>{title}</h1>",
        _stamp(doc, c),
        "</header>",
        "\n".join(sections),
        f'<footer>steelfire {_esc(doc["run"]["steelfire_version"])} · {_esc(doc["run"]["utc"])} · '
        f'{_esc(doc["run"]["case_file"] or "case built in memory")}</footer>',
        "</body>",
        "</html>",
    ])
    return page + "\n"


__all__ = ["render_report", "get", "CSS"]
