"""Figures of the report: design fire, steel temperatures, equivalent times, protection thickness.

matplotlib is imported inside the functions only (Agg canvas, no pyplot, no change of the user's
backend or rcParams: every figure is drawn inside ``matplotlib.rc_context``), so ``import steelfire``
and the check command never load it.

Numbers drawn come from the result document (the rounded values of results.json) where the document
has them, and from the result objects for the time histories (numpy arrays, not in the JSON).
"""

from __future__ import annotations

import io
import math
import re
from dataclasses import dataclass

#: Figures the report may hold, in report order (file names ``fig_<name>.png`` / ``.svg``).
FIGURE_NAMES = ("design_fire", "steel_temperatures", "time_equivalence", "thickness", "resistance")

#: Schedules up to this many members are plotted whole; above it a selection is plotted.
PLOT_ALL_MAX = 12
#: Size of the selection for longer schedules (the smallest margins).
PLOT_SELECTION = 8
#: Most points per plotted curve (histories are thinned for drawing; the CSV keeps them all).
MAX_CURVE_POINTS = 700

# Our own palette: distinct in lightness as well as hue, so that the figures read in grey print and
# for the common colour-vision deficiencies; bars carry hatching as a second cue.
INK = "#1c232b"
GRID = "#d6dbe1"
DESIGN_FIRE = "#b0431c"   # burnt orange-red, solid
STANDARD = "#56616d"      # slate, dashed
GAS_TINT = "#e4bcab"      # pale design-fire tint behind steel curves
STEEL = "#22507d"         # deep blue
CRITICAL = "#c8850f"      # ochre, dashed
ANNEX_F = "#22507d"       # deep blue
CIB_W14 = "#a9d2c9"       # pale sea green, hatched
EQUAL_T = "#dd9c2c"       # amber
SMALL_COMPARTMENT = "#7d9fc0"  # light steel blue, dotted
SECOND_MODEL = "#5b8a3c"  # moss green, dashed: the other protected-steel model
MARKER = INK

FIG_WIDTH_IN = 7.0

_RC = {
    "font.family": "sans-serif",
    "font.sans-serif": ["DejaVu Sans", "Liberation Sans", "Arial", "Helvetica"],
    "font.size": 9, "axes.titlesize": 9, "axes.labelsize": 9, "xtick.labelsize": 8, "ytick.labelsize": 8,
    "legend.fontsize": 8, "axes.edgecolor": INK, "axes.labelcolor": INK, "xtick.color": INK,
    "ytick.color": INK, "text.color": INK, "axes.linewidth": 0.7, "axes.grid": True, "grid.color": GRID,
    "grid.linewidth": 0.5, "axes.axisbelow": True, "axes.spines.top": False, "axes.spines.right": False,
    "legend.frameon": False, "lines.linewidth": 1.4, "hatch.linewidth": 0.6, "hatch.color": INK,
    "svg.fonttype": "none", "svg.hashsalt": "steelfire", "path.simplify": True, "savefig.dpi": 200,
    "figure.dpi": 100, "axes.titlelocation": "left", "axes.titleweight": "bold",
}


@dataclass
class RenderedFigure:
    """One figure: file stem, caption (plain text), PNG bytes, SVG text (standalone file)."""

    name: str
    caption: str
    png: bytes
    svg: str


# ----------------------------------------------------------------------------------------------
# what to plot


def select_members(doc) -> tuple:
    """Indices of the members to plot, and the selection note (None when all are plotted).

    Schedules of more than PLOT_ALL_MAX members: the PLOT_SELECTION smallest margins (worst first).
    """
    ms = doc["members"]
    n = len(ms)
    if n <= PLOT_ALL_MAX:
        return list(range(n)), None
    key = [(m["margin_C"] if m["margin_C"] is not None else math.inf, i) for i, m in enumerate(ms)]
    idx = [i for _, i in sorted(key)[:PLOT_SELECTION]]
    note = (f"the {PLOT_SELECTION} members with the smallest margins theta_cr - theta_peak, of {n}, worst first")
    return idx, note


def _has_equivalence(doc, idx) -> bool:
    """Any selected member with an equivalence entry (a null equal-temperature time is drawn at the horizon)."""
    return any(doc["members"][i].get("equivalence") for i in idx)


def _sizing_selection(doc) -> tuple:
    ms = doc["members"]
    sized = [i for i, m in enumerate(ms) if isinstance(m.get("sizing"), dict)]
    if len(sized) <= PLOT_ALL_MAX:
        return sized, None

    def need(i):
        s = ms[i]["sizing"]
        vals = [s.get(k) for k in ("chosen_mm", "standard_period_mm", "burnout_mm")]
        vals = [v for v in vals if isinstance(v, (int, float)) and not isinstance(v, bool)]
        return (s.get("achievable") is not False, -(max(vals) if vals else 0.0), i)

    idx = sorted(sized, key=need)[:PLOT_SELECTION]
    note = (f"the {PLOT_SELECTION} members needing the most protection (not achievable first), of {len(sized)} sized")
    return idx, note


def plan(doc, history_names) -> dict:
    """Which figures the report holds and which members they show (goes into results.json "report")."""
    idx, note = select_members(doc)
    have_hist = set(history_names)
    hist_idx = [i for i in idx if doc["members"][i]["name"] in have_hist]
    figs = ["design_fire"]
    if hist_idx:
        figs.append("steel_temperatures")
    if idx and _has_equivalence(doc, idx):
        figs.append("time_equivalence")
    s_idx, s_note = _sizing_selection(doc)
    if s_idx:
        figs.append("thickness")
    r_idx = [i for i, m in enumerate(doc["members"]) if (m.get("resistance") or {}).get("utilisation_curve")]
    if r_idx:
        figs.append("resistance")
    return {"figures": figs,
            "plotted_members": [doc["members"][i]["name"] for i in idx],
            "plotted_member_indices": idx,
            "selection": note,
            "histories_kept": len(have_hist),
            "history_plot_member_indices": hist_idx,
            "sizing_plot_member_indices": s_idx,
            "sizing_selection": s_note,
            "resistance_plot_member_indices": r_idx}


# ----------------------------------------------------------------------------------------------
# helpers


def _mpl_text(s: str) -> str:
    """User text for matplotlib: no mathtext interpretation of '$'."""
    return str(s).replace("$", r"\$")


def _short(name: str, most: int) -> str:
    """A member name cut to ``most`` characters for a panel title (the tables carry it whole)."""
    name = str(name)
    return name if len(name) <= most else name[: most - 1] + "…"


def _text_width_in(text: str, size_pt: float) -> float:
    """Width [in] of ``text`` set in the figures' font at ``size_pt``."""
    from matplotlib.textpath import TextPath

    return TextPath((0, 0), _mpl_text(text), size=size_pt).get_extents().width / 72.0 if text else 0.0


def _fit(name, width_in: float, size_pt: float = 8.0) -> str:
    """A member name cut (with an ellipsis) to the width it has in a figure: a long name must not run
    into its neighbour's (the tables carry it whole). Returned escaped for matplotlib."""
    name = str(name)
    if _text_width_in(name, size_pt) <= width_in:
        return _mpl_text(name)
    lo, hi = 0, len(name) - 1  # the longest prefix that fits with its ellipsis
    while lo < hi:
        mid = (lo + hi + 1) // 2
        if _text_width_in(name[:mid] + "…", size_pt) <= width_in:
            lo = mid
        else:
            hi = mid - 1
    return _mpl_text(name[:lo] + "…")


def _tick_names(names) -> list:
    """Member names as bar labels: side by side they share the axes' width (about FIG_WIDTH_IN - 0.9 in);
    more than four are set at 30 degrees, each at most 1.6 in long."""
    n = max(len(names), 1)
    width = 1.6 if n > 4 else (FIG_WIDTH_IN - 0.9) / n - 0.15
    return [_fit(m, width) for m in names]


def _thin(t, y, keep=(), most=MAX_CURVE_POINTS):
    """At most ``most`` points of a curve for drawing, always keeping the indices in ``keep`` and the ends."""
    import numpy as np

    n = len(t)
    if n <= most:
        return t, y
    idx = np.unique(np.concatenate([np.linspace(0, n - 1, most).round().astype(int),
                                    np.asarray([k for k in keep if 0 <= k < n], dtype=int)]))
    return t[idx], y[idx]


def _figure(height_in):
    from matplotlib.figure import Figure

    return Figure(figsize=(FIG_WIDTH_IN, height_in), layout="constrained")


def _save(fig, name, caption) -> RenderedFigure:
    png = io.BytesIO()
    fig.savefig(png, format="png", metadata={"Software": None})
    svg = io.StringIO()
    fig.savefig(svg, format="svg", metadata={"Date": None, "Creator": None})
    return RenderedFigure(name=name, caption=caption, png=png.getvalue(), svg=svg.getvalue())


def _num(v):
    return isinstance(v, (int, float)) and not isinstance(v, bool)


def _fmt(v, kind="factor") -> str:
    """A number as the report shows it (temperatures and times to 0.1, factors to 4 significant figures)."""
    from steelfire.outputs.present import fmt

    return fmt(v, kind)


def _fire_row(doc, key):
    """The design fire's report row for ``key`` (label, symbol, unit, clause), or None."""
    for r in doc.get("fire_rows") or []:
        if r.get("key") == key:
            return r
    return None


# ----------------------------------------------------------------------------------------------
# (a) the design fire against the standard curve


def design_fire_figure(doc, result):
    """The design fire's gas temperature against the standard curve (EN 1991-1-2 eq (3.4)), t_max marked."""
    import numpy as np

    from steelfire.models.fire import nominal

    f = doc["fire"]
    t_s = np.asarray(result.fire.time_s, dtype=float)
    g = np.asarray(result.fire.gas_temperature_C, dtype=float)
    t = t_s / 60.0
    ipk = int(np.argmax(g))
    fig = _figure(3.4)
    ax = fig.add_subplot()
    curve = f["curve"]
    label = f"design fire: {_mpl_text(curve)}"
    keep = [ipk]
    if _num(f.get("t_max_min")):
        keep.append(int(np.argmin(abs(t - f["t_max_min"]))))
    tt, gg = _thin(t, g, keep)
    ax.plot(tt, gg, color=DESIGN_FIRE, lw=1.7, label=label, zorder=3)
    if curve != "standard":
        ts = np.linspace(0.0, t_s[-1], 400)
        ax.plot(ts / 60.0, nominal.standard_fire(ts), color=STANDARD, lw=1.1, ls=(0, (5, 3)),
                label="standard fire (ISO 834), EN 1991-1-2 eq (3.4)", zorder=2)
    ax.plot([f["time_of_peak_gas_min"]], [f["peak_gas_temperature_C"]], marker="v", ms=6, color=INK, ls="none",
            clip_on=False,
            label=f"peak {_fmt(f['peak_gas_temperature_C'], 'temperature')} °C at "
                  f"{_fmt(f['time_of_peak_gas_min'], 'time')} min", zorder=4)
    t_max_row = _fire_row(doc, "t_max_min")
    if _num(f.get("t_max_min")):
        ax.axvline(f["t_max_min"], color=INK, lw=0.9, ls=(0, (1, 2)), zorder=1)
        where = ""
        if t_max_row and t_max_row.get("clause"):
            m = re.search(r"eq \([^)]*\)", t_max_row["clause"])
            where = f", {m.group(0)}" if m else ""
        ax.annotate(f"$t_\\mathrm{{max}}$ = {_fmt(f['t_max_min'], 'time')} min{where}", xy=(f["t_max_min"], 0.97),
                    xycoords=("data", "axes fraction"), xytext=(4, 0), textcoords="offset points", fontsize=8,
                    ha="left", va="top")
    if _num(f.get("burnout_time_min")) and f["burnout_time_min"] <= t[-1]:
        ax.axvline(f["burnout_time_min"], color=STANDARD, lw=0.7, ls=(0, (1, 3)), zorder=1)
        ax.annotate("burnout", xy=(f["burnout_time_min"], 0.04), xycoords=("data", "axes fraction"),
                    xytext=(-4, 0), textcoords="offset points", fontsize=8, ha="right", va="bottom")
    ax.set_xlim(0, t[-1])
    top = float(g.max())
    if curve != "standard":
        top = max(top, float(nominal.standard_fire(np.array([t_s[-1]]))[0]))
    ax.set_ylim(0, top * 1.15)
    ax.set_xlabel("time t [min]")
    ax.set_ylabel(r"gas temperature $\theta_\mathrm{g}$ [°C]")
    fig.legend(*ax.get_legend_handles_labels(), loc="outside upper center", ncols=2)
    cap = "Design fire (gas temperature) over duration_min"
    if curve != "standard":
        cap += ", with the standard fire for reference"
    if _num(f.get("t_max_min")):
        what = (t_max_row or {}).get("label") or "t_max"
        cap += f"; the dotted line marks t_max ({what}, {(t_max_row or {}).get('clause') or 'the fire model'})"
    cap += "."
    return fig, cap


# ----------------------------------------------------------------------------------------------
# (b) steel temperature of each member


def steel_temperatures_figure(doc, result, idx, note):
    """Small multiples: each member's steel temperature with its critical temperature and the time of its peak."""
    import numpy as np

    t = np.asarray(result.fire.time_s, dtype=float) / 60.0
    g = np.asarray(result.fire.gas_temperature_C, dtype=float)
    n = len(idx)
    ncols = n if n <= 3 else (2 if n == 4 else 3)
    nrows = math.ceil(n / ncols)
    fig = _figure(3.0 if n == 1 else 0.7 + 1.75 * nrows)
    axes = fig.subplots(nrows, ncols, sharex=True, sharey=True, squeeze=False)
    tg, gg = _thin(t, g, [int(np.argmax(g))])
    ymax = max(float(g.max()), max(doc["members"][i]["critical_temperature_C"] for i in idx)) * 1.08
    for k, ax in enumerate(axes.flat):
        if k >= n:
            ax.set_visible(False)
            continue
        i = idx[k]
        d = doc["members"][i]
        h = np.asarray(result.members[i].steel_temperature_C, dtype=float)
        ipk = int(np.argmax(h))
        ts, hs = _thin(t, h, [ipk])
        ax.plot(tg, gg, color=GAS_TINT, lw=1.0, label="gas (design fire)")
        ax.plot(ts, hs, color=STEEL, lw=1.5, label=r"steel $\theta_\mathrm{a}$ (verdict)")
        models = getattr(result.table, "model_histories", None) or {}
        differ = d.get("lumped_valid") is False or abs(d.get("model_difference_C") or 0.0) > 10.0
        if differ and "conduction" in models and "lumped" in models:
            other = "lumped" if d.get("verdict_model") == "conduction" else "conduction"
            ho = np.asarray(models[other][:, i], dtype=float)
            if np.all(np.isfinite(ho)):
                to, yo = _thin(t, ho, [int(np.argmax(ho))])
                ax.plot(to, yo, color=SECOND_MODEL, lw=1.1, ls=(0, (5, 2)),
                        label="steel, eq (4.27)" if other == "lumped" else "steel, conduction model")
        ax.axhline(d["critical_temperature_C"], color=CRITICAL, lw=1.2, ls=(0, (4, 2)),
                   label=r"critical $\theta_\mathrm{a,cr}$")
        ax.axvline(d["time_of_peak_steel_min"], color=INK, lw=0.7, ls=(0, (1, 2)))
        ax.plot([d["time_of_peak_steel_min"]], [d["peak_steel_temperature_C"]], marker="v", ms=5, color=INK,
                ls="none", label="peak steel", clip_on=False, zorder=5)
        verdict = "pass" if d["passes"] else "FAIL"
        ax.set_title(f"{_fit(d['name'], (FIG_WIDTH_IN - 0.6) / ncols - 0.2)}\n"
                     f"margin {_fmt(d['margin_C'], 'temperature')} °C, {verdict}", fontsize=8, linespacing=1.3)
        ax.set_xlim(0, t[-1])
        ax.set_ylim(0, ymax)
    for col in range(ncols):  # the lowest visible panel of each column carries the time axis
        rows_used = [r for r in range(nrows) if r * ncols + col < n]
        if rows_used:
            ax = axes[rows_used[-1], col]
            ax.xaxis.set_tick_params(labelbottom=True)
            ax.set_xlabel("time t [min]")
    for ax in axes[:, 0]:
        ax.set_ylabel("temperature [°C]")
    h_, l_ = axes.flat[0].get_legend_handles_labels()
    fig.legend(h_, l_, loc="outside upper center", ncols=4)
    cap = ("Steel temperature of each member in the design fire (EN 1993-1-2 4.2.5), its critical temperature "
           "(dashed) and the time of its peak (dotted)")
    cap += f"; shown: {note}. Every member's history is in histories.csv." if note else "."
    return fig, cap


# ----------------------------------------------------------------------------------------------
# (c) equivalent times per member


def time_equivalence_figure(doc, idx, note):
    """Grouped bars per member, one per route present in the run (Annex F eq (F.1), its small-compartment
    eq (F.3), CIB W14, equal steel temperature); the required period as a marker; 'n/a' where a route
    present in the run does not apply to a member, '*' where a route would accept what the direct
    check rejects (:func:`steelfire.outputs.present.route_conflicts`); every mark in the legend."""
    import numpy as np
    from steelfire.outputs.present import route_conflicts

    horizon = doc["analysis"]["standard_horizon_min"]
    members = doc["members"]
    names = _tick_names([members[i]["name"] for i in idx])
    x = np.arange(len(idx), dtype=float)
    catalogue = (("annex_f", "annex_f_min", "EN 1991-1-2 Annex F, eq (F.1)", ANNEX_F, None),
                 ("annex_f_small_compartment", "annex_f_small_compartment_min", "Annex F, small compartment eq (F.3)",
                  SMALL_COMPARTMENT, "...."),
                 ("cib_w14", "cib_w14_min", "CIB W14", CIB_W14, "////"),
                 ("equal_temperature", "equal_temperature_min", "equal steel temperature (direct)", EQUAL_T, None))
    has_entry = [bool(members[i].get("equivalence")) for i in idx]
    routes = [r for r in catalogue
              if (r[0] == "equal_temperature" and any(has_entry))
              or any(_num((m.get("equivalence") or {}).get(r[1])) for m in members)]
    n = max(len(routes), 1)
    w = 0.8 / n
    fig = _figure(3.6)
    ax = fig.add_subplot()
    beyond_drawn = na_drawn = star_drawn = False
    conflicts = {k: {c["route"] for c in route_conflicts(doc, members[i])} for k, i in enumerate(idx)}
    for j, (route, key, label, colour, hatch) in enumerate(routes):
        off = (j - (n - 1) / 2) * w
        vals, xs, beyond = [], [], []
        for k, i in enumerate(idx):
            e = members[i].get("equivalence") or {}
            v = e.get(key)
            if not e:
                continue
            if v is None and route == "equal_temperature":
                beyond.append(x[k] + off)
            elif _num(v):
                vals.append(v)
                xs.append(x[k] + off)
                if route in conflicts[k]:
                    ax.annotate("*", xy=(x[k] + off, v), xytext=(0, 1), textcoords="offset points", ha="center",
                                va="bottom", fontsize=11, fontweight="bold", color=INK)
                    star_drawn = True
            else:
                ax.annotate("n/a", xy=(x[k] + off, 0), xytext=(0, 3), textcoords="offset points", ha="center",
                            va="bottom", fontsize=7, color=STANDARD, rotation=90 if n > 3 else 0)
                na_drawn = True
        if xs:
            ax.bar(xs, vals, width=w, color=colour, edgecolor=INK, linewidth=0.5, hatch=hatch, label=label)
        if beyond:
            ax.bar(beyond, [horizon] * len(beyond), width=w, color="white", edgecolor=EQUAL_T, linewidth=1.0,
                   hatch="xx", label=f"equal temperature beyond the horizon (> {_fmt(horizon, 'input')} min)")
            beyond_drawn = True
    req = [(x[k], members[i]["required_minutes"]) for k, i in enumerate(idx)
           if _num(members[i].get("required_minutes"))]
    if req:
        ax.scatter([r[0] for r in req], [r[1] for r in req], marker="D", s=30, color=MARKER, zorder=5,
                   label="required period")
        for xr, v in req:
            ax.plot([xr - 0.45, xr + 0.45], [v, v], color=MARKER, lw=1.0, zorder=4)
    if na_drawn:
        ax.plot([], [], ls="none", marker=r"$\mathrm{n/a}$", markersize=14, color=STANDARD,
                label="route not applicable to the member")
    if star_drawn:
        ax.plot([], [], ls="none", marker=r"$\ast$", markersize=9, color=INK,
                label="unconservative here: would accept what the direct check rejects")
    ax.set_xticks(x)
    ax.set_xticklabels(names, rotation=30 if len(idx) > 4 else 0, ha="right" if len(idx) > 4 else "center")
    ax.set_xlim(-0.6, len(idx) - 0.4)
    ax.set_ylim(bottom=0, top=ax.get_ylim()[1] * 1.06)
    ax.set_ylabel(r"equivalent time $t_\mathrm{e}$ [min]")
    ax.grid(axis="x", visible=False)
    handles, labels = ax.get_legend_handles_labels()
    rank = {lab: j for j, (_, _, lab, _, _) in enumerate(routes)}
    order = sorted(range(len(labels)), key=lambda j: rank.get(labels[j], 10 + j))
    fig.legend([handles[j] for j in order], [labels[j] for j in order], loc="outside upper center",
               ncols=2 if (len(labels) > 4 or beyond_drawn or star_drawn) else len(labels))
    shown = "; ".join(lab for _, _, lab, _, _ in routes)
    cap = (f"Equivalent time of standard fire exposure per member: {shown} (the standard-fire time at which "
           "the member reaches its design-fire peak); diamonds: the required period")
    cap += f"; shown: {note}." if note else "."
    return fig, cap


# ----------------------------------------------------------------------------------------------
# (d) protection thickness for sizing runs


def _specified(s):
    """The specified thickness of a sizing entry [mm] (``specified_mm``; ``given_mm`` in earlier documents)."""
    return s.get("specified_mm", s.get("given_mm"))


def thickness_figure(doc, idx, note):
    """Per member: least thickness for the standard period and for burnout, the chosen thickness, the case's."""
    import numpy as np

    fig = _figure(3.4)
    ax = fig.add_subplot()
    x = np.arange(len(idx), dtype=float)
    w = 0.34
    names = _tick_names([doc["members"][i]["name"] for i in idx])
    bars = (("standard_period_mm", "least for the standard period", ANNEX_F, None),
            ("burnout_mm", "least for the design fire (burnout)", EQUAL_T, "////"))
    for j, (key, label, colour, hatch) in enumerate(bars):
        xs, vs = [], []
        for k, i in enumerate(idx):
            v = doc["members"][i]["sizing"].get(key)
            if _num(v):
                xs.append(x[k] + (j - 0.5) * w)
                vs.append(v)
        if xs:
            ax.bar(xs, vs, width=w, color=colour, edgecolor=INK, linewidth=0.5, hatch=hatch, label=label)
    ch = [(x[k], doc["members"][i]["sizing"].get("chosen_mm")) for k, i in enumerate(idx)]
    ch = [c for c in ch if _num(c[1])]
    if ch:
        ax.scatter([c[0] for c in ch], [c[1] for c in ch], marker="D", s=30, color=MARKER, zorder=5, label="chosen")
    cur = [(x[k], _specified(doc["members"][i]["sizing"])) for k, i in enumerate(idx)]
    cur = [c for c in cur if _num(c[1])]
    if cur:
        ax.scatter([c[0] for c in cur], [c[1] for c in cur], marker="_", s=260, linewidths=1.6, color=STANDARD,
                   zorder=4, label="specified thickness (case)")
    for k, i in enumerate(idx):
        s = doc["members"][i]["sizing"]
        if s.get("achievable") is False:
            top = [v for v in (s.get("standard_period_mm"), s.get("burnout_mm"), s.get("chosen_mm"),
                               _specified(s)) if _num(v)]
            ax.annotate("not achievable", xy=(x[k], max(top) if top else 0.0), xytext=(0, 5),
                        textcoords="offset points", ha="center", va="bottom", fontsize=7.5, fontweight="bold",
                        rotation=90)
    ax.set_xticks(x)
    ax.set_xticklabels(names, rotation=30 if len(idx) > 4 else 0, ha="right" if len(idx) > 4 else "center")
    ax.set_xlim(-0.6, len(idx) - 0.4)
    ax.set_ylim(bottom=0)
    ax.set_ylabel(r"protection thickness $d_\mathrm{p}$ [mm]")
    ax.set_ylim(top=ax.get_ylim()[1] * 1.08)
    ax.grid(axis="x", visible=False)
    handles, labels = ax.get_legend_handles_labels()
    rank = {"least for the standard period": 0, "least for the design fire (burnout)": 1, "chosen": 2}
    order = sorted(range(len(labels)), key=lambda j: rank.get(labels[j], 3))
    fig.legend([handles[j] for j in order], [labels[j] for j in order], loc="outside upper center", ncols=2)
    cap = "Protection thickness per member: the least thickness for each criterion and the thickness chosen"
    cap += f"; shown: {note}." if note else "."
    return fig, cap


# ----------------------------------------------------------------------------------------------


def resistance_figure(doc, idx):
    """Design effect over resistance (the utilisation of the governing check, EN 1993-1-2 4.2.3) against a
    uniform steel temperature, for the members with the smallest margins: it reaches 1 at the critical
    temperature; the member's peak steel temperature marked."""
    fig = _figure(3.2)
    ax = fig.subplots()
    colours = [STEEL, DESIGN_FIRE, EQUAL_T, STANDARD, SMALL_COMPARTMENT, SECOND_MODEL]
    for k, i in enumerate(idx):
        m = doc["members"][i]
        c = m["resistance"]["utilisation_curve"]
        col = colours[k % len(colours)]
        ax.plot(c["temperature_C"], c["utilisation"], color=col, lw=1.4, label=_mpl_text(_short(m["name"], 30)))
        ax.plot([m["critical_temperature_C"]], [1.0], marker="o", ms=4, color=col, ls="none")
        ax.axvline(m["peak_steel_temperature_C"], color=col, lw=0.8, ls=(0, (1, 2)))
    ax.axhline(1.0, color=INK, lw=0.8)
    ax.set_xlim(20, 1200)
    ax.set_ylim(0, 1.6)
    ax.set_xlabel(r"uniform steel temperature $\theta_\mathrm{a}$ [°C]")
    ax.set_ylabel(r"$E_\mathrm{fi,d}$ / $R_\mathrm{fi,d,\theta}$ [-]")
    ax.legend(loc="upper left", fontsize=7)
    cap = ("Design effect over resistance in fire (the governing check of EN 1993-1-2 4.2.3) against a uniform "
           "steel temperature, for the members checked by resistance with the smallest margins: it reaches 1 at the "
           "critical temperature (dot); the dotted line is the member's peak steel temperature in the design fire.")
    return fig, cap


def render_figures(doc, result) -> list:
    """Every figure the plan in ``doc["report"]`` names, as :class:`RenderedFigure` (PNG + SVG)."""
    import matplotlib

    rep = doc["report"]
    out = []
    with matplotlib.rc_context(_RC):
        for name in rep["figures"]:
            if name == "design_fire":
                fig, cap = design_fire_figure(doc, result)
            elif name == "steel_temperatures":
                fig, cap = steel_temperatures_figure(doc, result, rep["history_plot_member_indices"],
                                                     rep["selection"])
            elif name == "time_equivalence":
                fig, cap = time_equivalence_figure(doc, rep["plotted_member_indices"], rep["selection"])
            elif name == "thickness":
                fig, cap = thickness_figure(doc, rep["sizing_plot_member_indices"], rep["sizing_selection"])
            elif name == "resistance":
                fig, cap = resistance_figure(doc, rep["resistance_plot_member_indices"])
            else:  # pragma: no cover - plan() names only the above
                raise ValueError(name)
            out.append(_save(fig, name, cap))
    return out


# ----------------------------------------------------------------------------------------------
# SVG for inlining in the HTML report

_ID = re.compile(r'\bid="([^"]+)"')
_HREF = re.compile(r'((?:xlink:)?href)="#([^"]+)"')
_URL = re.compile(r"url\(#([^)]+)\)")


def inline_svg(svg: str, prefix: str, label: str = "") -> str:
    """A standalone SVG made fit to sit inside HTML: no XML prolog, DOCTYPE, metadata or namespace
    declarations (the HTML parser puts <svg> in its namespace), ids and references prefixed with
    ``prefix`` so that several figures never share an id, the stylesheet scoped to this figure, and
    the fixed width/height replaced by CSS sizing (the viewBox is kept)."""
    import html as _html

    s = re.sub(r"<\?xml[^>]*\?>\s*", "", svg)
    s = re.sub(r"<!DOCTYPE[^>]*>\s*", "", s)
    s = re.sub(r"<metadata>.*?</metadata>\s*", "", s, flags=re.S)
    s = re.sub(r'\s+xmlns(?::\w+)?="[^"]*"', "", s)
    s = _ID.sub(lambda m: f'id="{prefix}-{m.group(1)}"', s)
    s = _HREF.sub(lambda m: f'{m.group(1)}="#{prefix}-{m.group(2)}"', s)
    s = _URL.sub(lambda m: f"url(#{prefix}-{m.group(1)})", s)
    s = s.replace("*{stroke-linejoin", f"#{prefix} *{{stroke-linejoin")
    lab = _html.escape(label, quote=True)

    def root(m):
        attrs = re.sub(r'\s(?:width|height)="[^"]*"', "", m.group(1))
        return f'<svg id="{prefix}" class="figure-svg" role="img" aria-label="{lab}"{attrs}>'

    s = re.sub(r"<svg\b([^>]*)>", root, s, count=1)
    return s.strip()
