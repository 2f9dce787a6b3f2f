"""The terminal summary of a run, from the ``--json`` document (:func:`steelfire.outputs.document.build`).

Plain-word headers with units, 100 columns by default: the design fire in two or three lines, one row
per member (verdicts, then the standard fire and the time equivalence, then the sizing in a sizing
run), the verdict, the members that fail or fall short with the reason, the warnings grouped by kind,
the cautions in short form and, when files were written, where. Numbers are rounded for reading
(:mod:`steelfire.outputs.present`); the exact values are in the JSON document.
"""

from __future__ import annotations

import textwrap
from dataclasses import dataclass

from steelfire.outputs import present as P

#: Width of the summary unless ``wide``.
WIDTH = 100
#: Narrowest a name column is cut to (in the middle) when the table does not fit.
NAME_MIN = 10
#: Design-fire value lines shown (more in wide mode).
FIRE_LINES = 2
FIRE_LINES_WIDE = 6
#: Member names listed in one warning line (wide: all).
NAMES_IN_WARNING = 12
GAP = "  "


@dataclass
class Col:
    """A table column: header lines, alignment, whether it may be dropped (higher ``drop`` goes first)
    or cut (names) to fit."""

    head: tuple
    right: bool = False
    drop: int = 0
    cut: bool = False


def _table(cols, rows, width) -> list:
    """Lines of a text table fitted to ``width`` (None: no limit): optional columns dropped first, then
    the cuttable ones (names) cut in the middle."""
    cols = list(cols)
    rows = [list(r) for r in rows]
    keep = list(range(len(cols)))

    def natural(j):
        return max([len(h) for h in cols[j].head] + [len(r[j]) for r in rows])

    def total(ix, w):
        return sum(w[j] for j in ix) + len(GAP) * (len(ix) - 1)

    widths = {j: natural(j) for j in keep}
    if width is not None:
        for level in sorted({c.drop for c in cols if c.drop > 0}, reverse=True):
            if total(keep, widths) <= width:
                break
            keep = [j for j in keep if cols[j].drop != level]
        over = total(keep, widths) - width
        cuts = [j for j in keep if cols[j].cut]
        while over > 0 and cuts:
            j = max(cuts, key=lambda k: widths[k])
            floor = max(NAME_MIN, max(len(h) for h in cols[j].head))
            if widths[j] <= floor:
                cuts.remove(j)
                continue
            step = min(over, widths[j] - floor)
            widths[j] -= step
            over -= step
    nhead = max(len(cols[j].head) for j in keep)

    def cell(j, text):
        text = P.clip_name(text, widths[j]) if cols[j].cut else text
        return text.rjust(widths[j]) if cols[j].right else text.ljust(widths[j])

    out = []
    for k in range(nhead):
        parts = []
        for j in keep:
            h = cols[j].head
            line = h[k - (nhead - len(h))] if k >= nhead - len(h) else ""
            parts.append(cell(j, line) if not cols[j].cut else line.ljust(widths[j]))
        out.append(GAP.join(parts).rstrip())
    out.append(GAP.join("-" * widths[j] for j in keep))
    for r in rows:
        out.append(GAP.join(cell(j, r[j]) for j in keep).rstrip())
    return out


def _wrap(text, width, indent="", first=""):
    if width is None:
        return [first + text]
    return textwrap.wrap(text, width=width, initial_indent=first, subsequent_indent=indent,
                         break_long_words=True, break_on_hyphens=False) or [first]


# ----------------------------------------------------------------------------------------------
# sections


_CONTRACT_ROWS = (  # (key, symbol, unit) of the contract keys, for a document without fire_rows
    ("opening_factor_m05", "O", "m^0.5"), ("opening_height_m", "h_eq", "m"),
    ("thermal_inertia", "b", "J/(m2 s^0.5 K)"), ("design_fire_load_MJ_m2", "q_f,d", "MJ/m2"),
    ("total_area_fire_load_MJ_m2", "q_t,d", "MJ/m2"), ("gamma", "Gamma", "-"), ("gamma_lim", "Gamma_lim", "-"),
    ("k_factor", "k", "-"), ("t_lim_min", "t_lim", "min"))


def _fire_lines(doc, width, wide) -> list:
    f = doc["fire"]
    head = (f"Design fire: {f['curve']}, peak gas {P.fixed(f['peak_gas_temperature_C'])} C at "
            f"{P.fixed(f['time_of_peak_gas_min'])} min")
    if P.is_number(f.get("duration_min")):
        head += f", duration {P.fmt(f['duration_min'], 'input')} min"
    if f.get("regime"):
        head += f", {f['regime']}-controlled"
    lines = _wrap(head, width, indent="  ")
    rows = doc.get("fire_rows")
    if rows is None:
        rows = [{"key": k, "symbol": s, "unit": u, "label": k} for k, s, u in _CONTRACT_ROWS]
    bits = []
    for r in rows:
        v = f.get(r["key"])
        if v is None or r["key"] == "regime" or isinstance(v, (dict, list)):
            continue
        name = r.get("symbol") or r.get("label") or r["key"]
        unit = r.get("unit") or ""
        unit = "" if unit in ("-", "") else " " + unit
        val = P.fmt(v, P.kind_of(r["key"], r.get("unit")))
        bits.append(f"{name} = {val}{unit}" if not isinstance(v, str) else f"{name}: {val}")
    if not bits:
        return lines
    most = FIRE_LINES_WIDE if wide else FIRE_LINES
    nbsp = "\u00a0"  # keeps each 'symbol = value unit' on one line when wrapped
    body = [b.replace(nbsp, " ") for b in _wrap(", ".join(x.replace(" ", nbsp) for x in bits),
                                                 None if width is None else width - 2)]
    if len(body) > most:
        body = body[:most]
        tail = ", ... (all in the JSON document)"
        if width is not None and len(body[-1]) + len(tail) > width - 2:
            cut = body[-1][: width - 2 - len(tail)]
            body[-1] = cut[: cut.rfind(",")] if "," in cut else cut
        body[-1] += tail
    return lines + ["  " + b for b in body]


def _member_table(doc, width) -> list:
    cols = [Col(("member",), cut=True), Col(("kind",), drop=2), Col(("protection",), cut=True),
            Col(("thickness", "[mm]"), right=True), Col(("critical", "[C]"), right=True),
            Col(("peak steel", "[C]"), right=True), Col(("at", "[min]"), right=True, drop=1),
            Col(("margin", "[C]"), right=True), Col(("design", "fire"))]
    rows = []
    for m in doc["members"]:
        crit, peak, margin = m.get("critical_temperature_C"), m.get("peak_steel_temperature_C"), m.get("margin_C")
        crit_t = P.fmt(crit, "temperature", "-")
        peak_t = P.fmt(peak, "temperature", "-")
        margin_t = "-" if margin is None else f"{margin:+.1f}"
        if P.is_number(crit) and P.is_number(peak):   # never shown equal (or the margin 0.0) beside a verdict
            d = P.decimals_apart(peak, crit)
            peak_t, crit_t = P.fixed(peak, d), P.fixed(crit, d)
            if P.is_number(margin):
                margin_t = f"{margin:+.{max(d, P.decimals_apart(margin, 0.0))}f}"
        rows.append([m["name"], m.get("kind") or "", m.get("protection") or "bare",
                     P.fmt(m.get("thickness_mm"), "input", none="-"), crit_t, peak_t,
                     P.fmt(m.get("time_of_peak_steel_min"), "time", "-"), margin_t,
                     P.design_fire_verdict(m) or "-"])
    return _table(cols, rows, width)


def _equivalence_table(doc, width):
    """The standard-fire and time-equivalence table and its notes (routes that would accept what the
    direct check rejects, marked '*')."""
    ms = doc["members"]
    present = {r: any(P.is_number((m.get("equivalence") or {}).get(k)) for m in ms) for r, k in P.ROUTE_KEYS.items()}
    cols = [Col(("member",), cut=True), Col(("required", "[min]"), right=True),
            Col(("standard fire", "to critical [min]"), right=True)]
    routes = [r for r in ("annex_f", "annex_f_small_compartment", "cib_w14") if present[r]]
    heads = {"annex_f": ("Annex F", "[min]"), "annex_f_small_compartment": ("Annex F", "(F.3) [min]"),
             "cib_w14": ("CIB W14", "[min]")}
    cols += [Col(heads[r], right=True) for r in routes]
    cols += [Col(("equal steel", "temp. [min]"), right=True), Col(("period",))]
    rows, notes = [], []
    for m in ms:
        e = m.get("equivalence") or {}
        marks = {c["route"]: c for c in P.route_conflicts(doc, m)}
        row = [m["name"], P.fmt(m.get("required_minutes"), "input", "-"), P.std_time_apart(doc, m)]
        for r in routes:
            v = e.get(P.ROUTE_KEYS[r])
            text = "n/a" if v is None else P.fixed(v)
            row.append(text + ("*" if r in marks else ""))
        row.append(P.std_time_text(doc, e.get("equal_temperature_min")) if e else "-")
        row.append(P.period_verdict(m) or "-")
        rows.append(row)
        for c in marks.values():
            notes.append(f"{m['name']}: {c['text']}.")
    lines = _table(cols, rows, width)
    if notes:
        lines += _wrap("* unconservative here: the route would accept what the direct check (equal steel "
                       "temperature, the member's own times) rejects:", width, indent="  ")
        for n in notes:
            lines += _wrap(n, width, indent="    ", first="  ")
    return lines


def _sizing_table(doc, width) -> list:
    rows_ = P.sizing_rows(doc)
    if not rows_:
        return []
    cols = [Col(("member",), cut=True), Col(("specified", "[mm]"), right=True),
            Col(("needed for", "period [mm]"), right=True), Col(("needed for", "design fire [mm]"), right=True),
            Col(("chosen", "[mm]"), right=True), Col(("change", "[mm]"), right=True),
            Col(("specified", "design")), Col(("proposed", "design"))]
    rows, notes = [], []
    members = {m["name"]: m for m in doc["members"]}
    for r in rows_:
        bare = r.protection is None
        rows.append([r.name, "bare" if bare else P.fmt(r.given_mm, "input", "-"),
                     "-" if bare else P.fmt(r.standard_period_mm, "required_thickness", "-"),
                     "-" if bare else P.fmt(r.burnout_mm, "required_thickness", "none meets"),
                     "-" if bare else P.fmt(r.chosen_mm, "input", "none"),
                     "-" if bare else P.change_text(r), P.specified_word(members[r.name], r.specified_ok) or "-",
                     P.proposed_word(members[r.name], r.proposed_ok) or "-"])
        if r.note:
            notes.append(f"{r.name}: {r.note}")
    lines = _table(cols, rows, width)
    for n in notes:
        lines += _wrap(n, width, indent="    ", first="  ")
    return lines


def _warning_lines(doc, width, wide) -> list:
    lines = []
    for text, count in P.warning_lines(doc, most=None if wide else NAMES_IN_WARNING):
        if count > 1:
            text += f" [{count} warnings]"
        lines += _wrap(text, width, indent="    ", first="  - ")
    return ["Warnings:"] + lines if lines else []


def render(doc, *, sizing: bool = False, wide: bool = False, out_dir=None, command: str | None = None) -> str:
    """The terminal summary of a run.

    Parameters
    ----------
    doc : dict
        The ``--json`` document (:func:`steelfire.outputs.document.build`); results.json
        (:func:`~steelfire.outputs.document.full`) also serves, and its ``fire_rows`` and
        ``report.files`` are used where present.
    sizing : bool
        Show the sizing table (members carry ``sizing``) and the specified and proposed verdicts.
    wide : bool
        Do not fit the lines to :data:`WIDTH` columns (names uncut, every warning name listed).
    out_dir : str or Path, optional
        The output directory written; adds the line ``Wrote DIR: results.json, report.html, ...``.
    command : str, optional
        The command the heading names (default: size or check); ``"sample"`` says what the tables hold.

    Returns
    -------
    str
        The summary, lines of at most :data:`WIDTH` characters unless ``wide``.
    """
    width = None if wide else WIDTH
    cmd = command or ("size" if sizing else "check")
    out = _wrap(f"steelfire {cmd}: {doc.get('title', '')}", width, indent="  ") + [""]
    if cmd == "sample":
        out += _wrap("The deterministic " + ("sizing of the case (its proposed thicknesses below)" if sizing else
                                             "check of the case") + "; the statistics over the sampled fires follow.",
                     width, indent="  ") + [""]
    if doc.get("out_of_scope"):
        out += _wrap("*** COMPUTED OUTSIDE THE SCOPE OF THE METHOD (analysis.allow_out_of_scope = true): " +
                     "; ".join(doc["out_of_scope"]), width, indent="    ") + [""]
    out += _fire_lines(doc, width, wide) + [""]
    if sizing:
        out += ["Members at the chosen (proposed) thicknesses:"]
    out += _member_table(doc, width) + [""]
    out += ["Standard fire and time equivalence (minutes of standard fire):"]
    out += _equivalence_table(doc, width) + [""]
    if sizing:
        tab = _sizing_table(doc, width)
        if tab:
            out += _wrap("Protection sizing: specified thickness, least thickness for each criterion (rounded up), "
                         "the supplied thickness chosen:", width, indent="  ")
            out += tab + [""]
    for v in P.verdict_lines(doc, sizing):
        out += _wrap(v, width, indent="  ")
    short = P.shortfalls(doc)
    if short:
        out += ["", "Members that fail or fall short:"]
        for name, why in short:
            out += _wrap(f"{name}: " + "; ".join(why) + ".", width, indent="      ", first="  - ")
    w = _warning_lines(doc, width, wide)
    if w:
        out += [""] + w
    cau = P.short_cautions(doc)
    if cau:
        out += [""] + _wrap("Cautions: " + "; ".join(cau) + ".", width, indent="  ")
    if out_dir is not None:
        files = ((doc.get("report") or {}).get("files")) or _files_in(out_dir)
        first = [n for n in ("results.json", "report.html") if n in files]
        files = first + [n for n in files if n not in first]
        out += [""] + _wrap(f"Wrote {out_dir}: " + ", ".join(files) if files else f"Wrote {out_dir}.", width,
                            indent="  ")
    return "\n".join(out) + "\n"


def _files_in(out_dir) -> list:
    """The output files present in ``out_dir`` (when the document does not list them)."""
    from pathlib import Path

    from steelfire.outputs.files import output_targets

    d = Path(out_dir)
    return [n for n in output_targets() if (d / n).is_file()]


__all__ = ["render", "WIDTH"]


def sample_summary(section, *, wide: bool = False) -> str:
    """The ``variability`` section of a ``sample`` run in a few lines per member, then the sampled sizing and
    the section's warnings. Interval ends are shown rounded outward (a shown upper end is never below the
    computed one)."""
    width = None if wide else WIDTH
    out = P.outward
    lines = [f"Sampled fires: {section['fires']} ({section['method']}, seed {section['seed']}); "
             f"outside Annex A's scope: {section['out_of_scope_fires']}."]
    lines.append(f"{'member':<20} {'P(exceed)':>9} {'95 % interval':>17} {'band C':>6} {'near':>5} "
                 f"{'with band':>9} {'95 % interval':>17}")
    for m in section["members"]:
        lo, hi = m["exceedance_interval"]
        blo, bhi = m.get("exceedance_interval_with_band") or (None, None)
        band = m.get("error_band_C")
        lines.append(f"{m['name'][:20]:<20} {m['exceedance_probability']:>9.4f} "
                     f"{f'[{out(lo, False, 4)}, {out(hi, True, 4)}]':>17} "
                     f"{'-' if band is None else out(band, True, 2):>6} {m.get('near_critical_fires', '-'):>5} "
                     f"{m.get('exceedance_probability_with_band', float('nan')):>9.4f} "
                     f"{f'[{out(blo, False, 4)}, {out(bhi, True, 4)}]':>17}")
    eb = section.get("error_band") or {}
    lines += _wrap(f"band: the numerical error of the sampled peaks, per member, measured on the first "
                   f"{eb.get('fires', '-')} fires (the common grid; 2 x the change at half the time step); near: "
                   "fires whose peak lies within it of the critical temperature; with band: those below it counted "
                   "as exceeding" + ("; the target probability is judged with the band."
                                     if section.get("target_probability") is not None else "."), width)
    frac = section.get("target_fractile")
    if frac:
        lines.append(f"Standard period covering the {frac:g} fractile of the equivalent time, by route:")
        for m in section["members"]:
            none = m.get("no_period_covers_fractile") or {}
            periods = ", ".join(f"{r}: {p or ('none up to R240' if none.get(r) else '-')}"
                                for r, p in (m.get("period_covering_fractile") or {}).items())
            lines += _wrap(periods, width, indent=" " * 23, first=f"  {m['name'][:20]:<20} ")
        if any("none up to R240" in line for line in lines):
            lines += _wrap("none up to R240: the fractile's equivalent time is above 240 min or beyond the times "
                           "computed; -: the route gives no time for the member", width)
    sized = [(m["name"], m["sizing"]) for m in section["members"] if isinstance(m.get("sizing"), dict)
             and m["sizing"].get("achievable") is not None]
    if sized:
        lines += _wrap(f"Least supplied thickness for target_probability {section.get('target_probability'):g} "
                       f"({sized[0][1].get('criterion')}):", width)
        for name, sz in sized:
            what = (f"{sz['chosen_mm']:g} mm, P with the band {sz.get('exceedance_probability_with_band'):.4g}"
                    if sz.get("achievable") else (sz.get("note") or "not achievable"))
            lines += _wrap(what, width, indent=" " * 23, first=f"  {name[:20]:<20} ")
    for w in section.get("warnings", []):
        lines += _wrap(w, width, indent="  ", first="warning: ")
    return "\n".join(lines)
