"""Figures of the report: design fire (or, for a localised or travelling fire, its heat release and a figure of
where the members stand), steel temperatures, equivalent times, protection thickness.

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
FIGURE_NAMES = ("design_fire", "heat_release", "plan_view", "height_profile", "steel_temperatures",
                "time_equivalence", "thickness", "resistance")
#: Fires whose members each see their own exposure: the figure of their geometry. For these the heat
#: release figure takes the place of the design-fire figure (whose gas temperature is only the hottest
#: of the members' exposures).
GEOMETRY_FIGURE = {"localised": "height_profile", "travelling": "plan_view"}

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
#: Verdict marks of members drawn at their positions: shape and colour both tell pass from FAIL and from a
#: pass within the numerical error (marginal).
PASS_MARK = {"marker": "o", "color": STEEL, "ms": 6.5}
FAIL_MARK = {"marker": "X", "color": DESIGN_FIRE, "ms": 8.5}
MARGINAL_MARK = {"marker": "D", "color": EQUAL_T, "ms": 6.5}
#: Colours and dashes of the fires of a travelling family (one line each), distinct in grey print too.
FAMILY_STYLES = ((DESIGN_FIRE, "-"), (STEEL, (0, (5, 2))), (EQUAL_T, (0, (1, 1.5))), (SECOND_MODEL, "-."),
                 (STANDARD, (0, (8, 2, 1, 2))), (SMALL_COMPARTMENT, "-"))

FIG_WIDTH_IN = 7.0
#: Width [in] of one column of a two-column key of members below a figure, its mark and spacing excluded.
KEY_COLUMN_IN = (FIG_WIDTH_IN - 0.3) / 2.0 - 0.35

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
    curve = (doc.get("fire") or {}).get("curve")
    figs = ["heat_release", GEOMETRY_FIGURE[curve]] if curve in GEOMETRY_FIGURE else ["design_fire"]
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


def _text_width_in(text: str, size_pt: float, weight: str = "normal") -> float:
    """Width [in] of ``text`` set in the figures' font at ``size_pt`` (and ``weight``: bold is wider)."""
    from matplotlib.font_manager import FontProperties
    from matplotlib.textpath import TextPath

    if not text:
        return 0.0
    path = TextPath((0, 0), _mpl_text(text), size=size_pt, prop=FontProperties(weight=weight))
    return path.get_extents().width / 72.0


#: Share of the width a fitted name may take: the outline width measured here and the width the text
#: renderer draws differ by a few per cent between matplotlib versions (3.10 drew 2 % wider than 3.11).
FIT_MARGIN = 0.95


def _fit(name, width_in: float, size_pt: float = 8.0, weight: str = "normal") -> str:
    """A member name cut (with an ellipsis) to the width it has in a figure: a long name must not run
    into its neighbour's (the tables carry it whole). Returned escaped for matplotlib."""
    name = str(name)
    width_in *= FIT_MARGIN
    if _text_width_in(name, size_pt, weight) <= width_in:
        return _mpl_text(name)
    lo, hi = 0, len(name) - 1  # the longest prefix that fits with its ellipsis
    while lo < hi:
        mid = (lo + hi + 1) // 2
        if _text_width_in(name[:mid] + "…", size_pt, weight) <= width_in:
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


def _margin_text(m) -> str:
    """The margin as the verdict table shows it: more decimals where one would show 0.0 beside a verdict."""
    from steelfire.outputs import present as P
    from steelfire.outputs.report.html import decimals_apart

    peak, crit, margin = m.get("peak_steel_temperature_C"), m.get("critical_temperature_C"), m.get("margin_C")
    if not (_num(peak) and _num(crit) and _num(margin)):
        return _fmt(margin, "temperature")
    return P.fixed(margin, max(decimals_apart(peak, crit), decimals_apart(margin, 0.0)))


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
# (a') localised and travelling fires: heat release, and where the members stand


def _verdict(m) -> str:
    """A member's design-fire verdict word (:func:`steelfire.outputs.present.design_fire_verdict`)."""
    from steelfire.outputs import present

    return present.design_fire_verdict(m) or "-"


def _verdict_mark(word) -> dict:
    return dict({"pass": PASS_MARK, "marginal": MARGINAL_MARK}.get(word, FAIL_MARK))


def _verdict_handles(words):
    """Legend handles of the verdict marks present (a list of (handle, label))."""
    from matplotlib.lines import Line2D

    out = []
    for word in ("pass", "marginal", "FAIL"):
        if word in words:
            mk = _verdict_mark(word)
            out.append((Line2D([], [], ls="none", marker=mk["marker"], color=mk["color"], ms=mk["ms"],
                               markeredgecolor=INK, markeredgewidth=0.5), f"member, {word}"))
    return out


def heat_release_figure(doc, result):
    """The heat release rate Q [MW] against time: for a localised fire (EN 1991-1-2 Annex E.4, or the case's
    table) with its flame length L_f of eq (C.1) and the ceiling height; for a travelling fire one line per
    fire of the family (Q = RHR_f W times the burning band's length)."""
    import numpy as np

    f = doc["fire"]
    s = _series(result)
    t = np.asarray(result.fire.time_s, dtype=float) / 60.0
    q = np.asarray(s["heat_release_MW"], dtype=float)
    if f["curve"] == "localised":
        h = f["ceiling_height_m"]
        lf = np.asarray(s["flame_length_m"], dtype=float)
        fig = _figure(4.4)
        ax_q, ax_l = fig.subplots(2, 1, sharex=True)
        tq, qq = _thin(t, q, [int(np.argmax(q))])
        ax_q.plot(tq, qq, color=DESIGN_FIRE, lw=1.7, label="heat release rate Q")
        if _num(f.get("peak_heat_release_MW")) and _num(f.get("time_of_peak_heat_release_min")):
            ax_q.plot([f["time_of_peak_heat_release_min"]], [f["peak_heat_release_MW"]], marker="v", ms=6, color=INK,
                      ls="none", clip_on=False, zorder=4,
                      label=f"largest {_fmt(f['peak_heat_release_MW'])} MW, from "
                            f"{_fmt(f['time_of_peak_heat_release_min'], 'time')} min")
        ax_q.set_ylim(0, max(float(q.max()), 1e-9) * 1.15)
        ax_q.set_ylabel("heat release Q [MW]")
        shown = np.maximum(lf, 0.0)   # (C.1) is negative for a fire too small to stand a flame
        tl, ll = _thin(t, shown, [int(np.argmax(shown))])
        ax_l.plot(tl, ll, color=STEEL, lw=1.5, label=r"flame length $L_\mathrm{f}$, eq (C.1)")
        ax_l.axhline(h, color=INK, lw=1.4, label=f"ceiling, H = {_fmt(h, 'input')} m")
        reach = lf >= h
        if np.any(reach):
            ax_l.fill_between(t, 0, 1, where=reach, transform=ax_l.get_xaxis_transform(), color=GAS_TINT,
                              alpha=0.6, lw=0, label="flame reaches the ceiling: eq (C.4) flux")
        ax_l.set_ylim(0, max(h, float(shown.max())) * 1.12)
        ax_l.set_ylabel(r"flame length $L_\mathrm{f}$ [m]")
        ax_l.set_xlabel("time t [min]")
        ax_l.set_xlim(0, t[-1])
        hq, lq = ax_q.get_legend_handles_labels()
        hl, ll_ = ax_l.get_legend_handles_labels()
        fig.legend(hq + hl, lq + ll_, loc="outside upper center", ncols=2)
        src = ("the case's table" if f.get("heat_release_source") == "table" else
               "EN 1991-1-2 E.4: growth Q = 1 MW (t/t_alpha)^2, plateau RHR_f A_fi, linear decay once 70 % of the "
               "fire load has burnt")
        cap = (f"Heat release rate of the localised fire ({src}) and its flame length L_f by EN 1991-1-2 eq (C.1) "
               f"against time (values of (C.1) below zero drawn as 0), with the ceiling H = {_fmt(h, 'input')} m "
               "above the fire source")
        cap += ("; shaded where the flame reaches the ceiling (L_f >= H: the heat flux of eq (C.4) then "
                "governs the members near the ceiling)." if np.any(reach) else
                "; the flame stays below the ceiling throughout (L_f < H).")
        return fig, cap
    labels = s.get("fire_short_labels") or [f"fire {k + 1}" for k in range(q.shape[1])]
    gov = _governing_fires(doc, s)
    fig = _figure(3.4)
    ax = fig.add_subplot()
    q2 = q.reshape(len(t), -1)
    for k in range(q2.shape[1]):
        colour, dash = FAMILY_STYLES[k % len(FAMILY_STYLES)]
        tk, qk = _thin(t, q2[:, k], [int(np.argmax(q2[:, k]))])
        count = sum(1 for g in gov if g == k)
        ax.plot(tk, qk, color=colour, ls=dash, lw=1.5,
                label=_mpl_text(labels[k]) + (f" (governs {count} member{'s' if count != 1 else ''})" if count else ""))
    ax.set_xlim(0, t[-1])
    ax.set_ylim(0, float(np.max(q2)) * 1.12 if np.max(q2) > 0 else 1.0)
    ax.set_xlabel("time t [min]")
    ax.set_ylabel("heat release Q [MW]")
    fig.legend(*ax.get_legend_handles_labels(), loc="outside upper center", ncols=2)
    cap = ("Heat release rate of each travelling fire of the family against time: Q = RHR_f W (leading edge - "
           f"trailing edge), with RHR_f = {_fmt(f.get('heat_release_density_kW_m2'), 'input')} kW/m2 (EN 1991-1-2 "
           f"Table E.5) over the floor's width W = {_fmt(f.get('width_m'), 'input')} m; the fire grows over its "
           "burning time t_b = q_f,d / RHR_f, travels at constant size, and shrinks at the far end (Stern-Gottfried "
           "and Rein 2012, Rackauskaite et al. 2015). The legend counts the members each fire governs.")
    return fig, cap


def plan_view_figure(doc, result, idx, note):
    """Plan of the floor of a travelling fire: length (direction of travel) by width, the direction of travel,
    each member at its position along the floor (``position.along_m``) marked by its verdict and labelled
    with the fire size that governs it. Members are set one to a row across the width for legibility (the
    model places them only along the floor)."""
    import numpy as np
    from matplotlib.patches import Rectangle

    f = doc["fire"]
    s = _series(result)
    length, width = float(f["length_m"]), float(f["width_m"])
    xs = np.asarray(s["member_along_m"], dtype=float)
    gov = _governing_fires(doc, s)
    short = s.get("fire_short_labels") or []
    ms = doc["members"]
    order = sorted(idx, key=lambda i: (xs[i], i))
    n = len(order)
    fig = _figure(max(2.9, 1.5 + 0.26 * n))
    ax = fig.add_subplot()
    ax.add_patch(Rectangle((0.0, 0.0), length, n, facecolor=GRID, alpha=0.35, edgecolor=INK, lw=1.0, zorder=1))
    axes_in = FIG_WIDTH_IN - 0.55   # the axes' width: no y tick labels, a narrow margin each side
    for row, i in enumerate(order):
        m = ms[i]
        x, y = xs[i], row + 0.5
        ax.plot([x, x], [0.0, n], color=STANDARD, lw=0.6, ls=(0, (1, 2)), zorder=2)
        mk = _verdict_mark(_verdict(m))
        ax.plot([x], [y], ls="none", marker=mk["marker"], color=mk["color"], ms=mk["ms"], markeredgecolor=INK,
                markeredgewidth=0.5, zorder=4, clip_on=False, gid=f"member-{i}")
        k = gov[i]
        size = short[k] if k is not None and k < len(short) else "governing fire not named"
        tail = f": {size}, {_verdict(m)}"
        right = x <= 0.5 * length
        room = ((length - x) if right else x) / length * axes_in - 0.2
        name = _fit(m["name"], max(room - _text_width_in(tail, 7.5), 0.3), 7.5)
        ax.annotate(name + _mpl_text(tail), xy=(x, y), xytext=(7 if right else -7, 0), textcoords="offset points",
                    ha="left" if right else "right", va="center", fontsize=7.5, zorder=5,
                    fontweight="normal" if _verdict(m) == "pass" else "bold")
    others = [i for i in range(len(ms)) if i not in set(idx)]
    if others:
        ax.plot(xs[others], np.full(len(others), -0.3), ls="none", marker="|", ms=8, color=STANDARD, clip_on=False,
                label="other members (not labelled)")
    y_arrow = n + 0.55
    ax.annotate("", xy=(0.3 * length, y_arrow), xytext=(0.0, y_arrow),
                arrowprops={"arrowstyle": "-|>", "color": DESIGN_FIRE, "lw": 1.6, "shrinkA": 0, "shrinkB": 0})
    ax.annotate("direction of travel: the fire starts at x = 0", xy=(0.3 * length, y_arrow), xytext=(5, 0),
                textcoords="offset points", ha="left", va="center", fontsize=8, color=INK)
    ax.annotate(f"W = {_fmt(width, 'input')} m", xy=(0.0, n / 2.0), xytext=(-4, 0), textcoords="offset points",
                rotation=90, ha="right", va="center", fontsize=8)
    ax.set_xlim(-0.02 * length, 1.02 * length)
    ax.set_ylim(-0.7, n + 1.1)
    ax.set_yticks([])
    ax.grid(axis="y", visible=False)
    ax.spines["left"].set_visible(False)
    ax.set_xlabel(f"position along the floor x [m] (length L = {_fmt(length, 'input')} m)")
    handles = _verdict_handles({_verdict(m) for m in (ms[i] for i in order)})
    handles += list(zip(*ax.get_legend_handles_labels())) if others else []
    if handles:
        fig.legend([h for h, _ in handles], [lab for _, lab in handles], loc="outside upper center",
                   ncols=len(handles))
    cap = (f"Plan of the floor, {_fmt(length, 'input')} m along the direction of travel by {_fmt(width, 'input')} m "
           "across (the travelling fire spans the width and starts at x = 0, arrow): each member at its position "
           "along the floor (position.along_m; dotted: the model gives it the same exposure across the width), "
           "marked by its verdict and labelled with the fire size that governs it, the worst of the family "
           "(Stern-Gottfried and Rein 2012, Rackauskaite et al. 2015). Members are set one to a row for legibility; "
           "the rows have no meaning")
    cap += f"; labelled: {note}." if note else "."
    return fig, cap


def height_profile_figure(doc, result, idx, note):
    """A localised fire at its largest heat release: the plume temperature on the fire axis against height
    (EN 1991-1-2 eq (C.2), virtual origin eq (C.3)) up to the ceiling with the flame tip L_f (eq (C.1));
    beside it an elevation with the members at their (distance from the axis, height), marked by verdict."""
    import numpy as np
    from matplotlib.lines import Line2D
    from matplotlib.patches import Polygon, Rectangle

    from steelfire.models.fire import localised as lc

    f = doc["fire"]
    s = _series(result)
    d, h = float(f["diameter_m"]), float(f["ceiling_height_m"])
    q_w = float(f["peak_heat_release_MW"]) * 1e6
    lf = float(lc.flame_length_m(q_w, d))
    reaches = lf >= h
    z_cap = float(lc.plume_limit_height_m(q_w, d))
    z = np.unique(np.concatenate([np.linspace(0.0, h, 241), [v for v in (lf, z_cap) if 0.0 < v < h]]))
    theta = lc.plume_temperature_C(z, q_w, d)
    rs = np.asarray(s["member_distance_m"], dtype=float)
    zs = np.asarray(s["member_height_m"], dtype=float)
    ms = doc["members"]
    shown = list(idx)
    top = max(h, lf if reaches else 0.0) * 1.1

    fig = _figure(4.6)
    grid = fig.add_gridspec(1, 2, width_ratios=(1.0, 1.7))
    ax_t = fig.add_subplot(grid[0])
    ax_g = fig.add_subplot(grid[1], sharey=ax_t)
    ax_t.plot(theta, z, color=DESIGN_FIRE, lw=1.7, ls=(0, (5, 2)) if reaches else "-", gid="plume",
              label="plume axis, eq (C.2)" + (" (not valid: flame at the ceiling)" if reaches else ""))
    for ax in (ax_t, ax_g):
        ax.axhline(h, color=INK, lw=2.0, zorder=3)
        if lf > 0.0:
            ax.axhline(lf, color=CRITICAL, lw=1.1, ls=(0, (4, 2)), zorder=2)
    ax_t.set_xlim(0.0, lc.PLUME_MAX_C * 1.1)
    ax_t.set_ylim(0.0, top)
    ax_t.set_xlabel("gas temperature on the axis [°C]")
    ax_t.set_ylabel("height above the fire source z [m]")

    r_max = max([d / 2.0 * 1.6] + [float(rs[i]) for i in range(len(ms))]) * 1.12
    ax_g.add_patch(Rectangle((0.0, -0.012 * top), d / 2.0, 0.024 * top, color=DESIGN_FIRE, lw=0, zorder=3,
                             clip_on=False))
    if lf > 0.0:
        ax_g.add_patch(Polygon([(0.0, 0.0), (d / 2.0, 0.0), (0.0, min(lf, h))], closed=True, color=GAS_TINT,
                               lw=0, zorder=1))
    if reaches:
        lh = float(lc.horizontal_flame_length_m(q_w, h))
        if lh > 0.0:
            ax_g.add_patch(Rectangle((0.0, h - 0.035 * top), lh, 0.035 * top, color=GAS_TINT, lw=0, zorder=1))
    ax_g.axvline(0.0, color=STANDARD, lw=0.9, ls=(0, (6, 2, 1, 2)), zorder=2)
    ax_g.axvline(d / 2.0, color=STANDARD, lw=0.7, ls=(0, (1, 2)), zorder=2)
    ax_g.annotate("D/2", xy=(d / 2.0, 0.02), xycoords=("data", "axes fraction"), xytext=(3, 0),
                  textcoords="offset points", fontsize=7.5, ha="left", va="bottom", color=STANDARD)
    keyed, marks, on_axis = [], {}, {}
    for no, i in enumerate(shown, start=1):
        m = ms[i]
        mk = _verdict_mark(_verdict(m))
        ax_g.plot([rs[i]], [zs[i]], ls="none", marker=mk["marker"], color=mk["color"], ms=mk["ms"],
                  markeredgecolor=INK, markeredgewidth=0.5, zorder=5, clip_on=False, gid=f"member-{i}")
        marks.setdefault((float(rs[i]), float(zs[i])), []).append(no)
        if rs[i] <= d / 2.0:   # on the plume axis: the member sees eq (C.2) at its height
            th = float(lc.plume_temperature_C(zs[i], q_w, d))
            ax_t.plot([th], [zs[i]], ls="none", marker=mk["marker"], color=mk["color"], ms=mk["ms"] * 0.8,
                      markeredgecolor=INK, markeredgewidth=0.5, zorder=5, clip_on=False)
            on_axis.setdefault((th, float(zs[i])), []).append(no)
        head = f"{no}  "
        tail = f": r {_fmt(rs[i], 'input')} m, z {_fmt(zs[i], 'input')} m, {_verdict(m)}"
        room = KEY_COLUMN_IN - _text_width_in(head + tail, 7.5)
        keyed.append((Line2D([], [], ls="none", marker=mk["marker"], color=mk["color"], ms=mk["ms"] * 0.9,
                             markeredgecolor=INK, markeredgewidth=0.5),
                      head + _fit(m["name"], max(room, 0.4), 7.5) + _mpl_text(tail)))
    for ax, points in ((ax_g, marks), (ax_t, on_axis)):
        for (x, zz), nos in points.items():
            ax.annotate(", ".join(str(k) for k in nos), xy=(x, zz), xytext=(5, 4), textcoords="offset points",
                        fontsize=7.5, fontweight="bold", ha="left", va="bottom", zorder=6)
    others = [i for i in range(len(ms)) if i not in set(shown)]
    if others:
        ax_g.plot(rs[others], zs[others], ls="none", marker=".", ms=4, color=STANDARD, zorder=4, clip_on=False)
        keyed.append((Line2D([], [], ls="none", marker=".", ms=4, color=STANDARD), "other members (not numbered)"))
    ax_g.set_xlim(0.0, r_max)
    ax_g.set_xlabel("distance from the fire axis r [m]")
    ax_g.yaxis.set_tick_params(labelleft=False)
    lines = [(Line2D([], [], color=DESIGN_FIRE, lw=1.7, ls=(0, (5, 2)) if reaches else "-"),
              "plume axis, eq (C.2)" + (", not valid here" if reaches else "")),
             (Line2D([], [], color=CRITICAL, lw=1.1, ls=(0, (4, 2))),
              r"flame tip $L_\mathrm{f}$" + f" = {_fmt(lf)} m, eq (C.1)" + (" (unconfined)" if reaches else "")),
             (Line2D([], [], color=INK, lw=2.0), f"ceiling, H = {_fmt(h, 'input')} m"),
             (Rectangle((0, 0), 1, 1, color=GAS_TINT),
              "flame" + (r", $L_\mathrm{h}$ along the ceiling, eq (C.5)" if reaches else "")),
             (Line2D([], [], color=STANDARD, lw=0.9, ls=(0, (6, 2, 1, 2))), "fire axis")]
    fig.legend([a for a, _ in lines], [b for _, b in lines], loc="outside upper center", ncols=3, fontsize=7.5)
    fig.legend([a for a, _ in keyed], [b for _, b in keyed], loc="outside lower center", ncols=2, fontsize=7.5,
               handletextpad=0.3, columnspacing=1.2)
    tpk = f.get("time_of_peak_heat_release_min")
    cap = (f"Localised fire at its largest heat release, Q = {_fmt(f['peak_heat_release_MW'])} MW"
           + (f" (from {_fmt(tpk, 'time')} min)" if _num(tpk) else "") + f", fire diameter D = {_fmt(d)} m. Left: "
           "the gas temperature on the fire axis against height by EN 1991-1-2 eq (C.2) (Q_c = 0.8 Q, virtual origin "
           f"z_0 of eq (C.3), at most 900 °C) up to the ceiling H = {_fmt(h, 'input')} m, with the flame tip "
           f"L_f = {_fmt(lf)} m of eq (C.1). Right: the members at their distance r from the fire axis and height z "
           "above the fire source, marked by verdict and numbered as in the key; within D/2 of the axis a member "
           "sees the plume at its height (also marked on the left), further out the larger of the ceiling jet and the "
           "plume spreading beside the fire at its height (steelfire's rule)")
    if reaches:
        cap += (f". The flame reaches the ceiling (L_f = {_fmt(lf)} m >= H = {_fmt(h, 'input')} m): eq (C.2) does "
                "not apply there (dashed, for reference only); the heat flux at the ceiling of eq (C.4)-(C.8) governs "
                "the members' exposure (the larger of it and the plume or jet bound), and the flame spreads under the "
                "ceiling over L_h of eq (C.5)")
    cap += f"; numbered: {note}." if note else "."
    return fig, cap


# ----------------------------------------------------------------------------------------------
# (b) steel temperature of each member


def member_exposures(result):
    """Each member's own exposure on the run's grid [C] (T x N) for a fire that differs from member to
    member: the gas temperature its kernel was given (for a heat flux, the adiabatic surface temperature
    that stands for it), in the fire of the family that governs it; None for a fire all members see
    alike, or where the run kept no histories."""
    import numpy as np

    e = getattr(result.fire, "exposure_C", None)
    return None if e is None else np.asarray(e, dtype=float)


def _series(result) -> dict:
    """The design fire's series (heat release, flame length, member positions), or an empty dict."""
    try:
        return result.fire.series or {}
    except AttributeError:
        return {}


def _governing_fires(doc, series) -> list:
    """Per member, the index of the fire of a travelling family that governs it (its column label in
    the document, :func:`steelfire.models.fire.travelling.exposure_label`), None where none matches."""
    from steelfire.models.fire.travelling import exposure_label

    labels = series.get("fire_labels") or []
    xs = series.get("member_along_m")
    out = []
    for i, m in enumerate(doc["members"]):
        g = m.get("governing_exposure")
        hit = [k for k, lab in enumerate(labels) if xs is not None and i < len(xs) and exposure_label(lab, xs[i]) == g]
        out.append(hit[0] if hit else None)
    return out


def steel_temperatures_figure(doc, result, idx, note):
    """Small multiples: each member's steel temperature with its critical temperature and the time of its peak,
    behind it the gas temperature it was exposed to: the design fire, or for a fire that differs from member
    to member (localised, travelling) the member's own exposure (:func:`member_exposures`); for a travelling
    fire the panel names the fire size that governs the member."""
    import numpy as np

    t = np.asarray(result.fire.time_s, dtype=float) / 60.0
    g = np.asarray(result.fire.gas_temperature_C, dtype=float)
    own = member_exposures(result)
    curve = doc["fire"].get("curve")
    series = _series(result)
    gov = _governing_fires(doc, series) if curve == "travelling" and own is not None else None
    short = series.get("fire_short_labels") or []
    n = len(idx)
    ncols = n if n <= 3 else (2 if n == 4 else 3)
    nrows = math.ceil(n / ncols)
    extra = 0.15 * nrows if gov is not None else 0.0   # a third title line: the governing fire size
    fig = _figure((3.0 if n == 1 else 0.7 + 1.75 * nrows) + extra)
    axes = fig.subplots(nrows, ncols, sharex=True, sharey=True, squeeze=False)
    if own is None:
        tg, gg = _thin(t, g, [int(np.argmax(g))])
        hottest = float(g.max())
        gas_label = "gas (design fire)"
    else:
        hottest = max(float(np.nanmax(own[:, i])) for i in idx)
        gas_label = ("gas at the member, governing fire" if curve == "travelling" else
                     "exposure at the member" if curve == "localised" else "gas at the member")
    ymax = max(hottest, max(doc["members"][i]["critical_temperature_C"] for i in idx)) * 1.08
    title_in = (FIG_WIDTH_IN - 0.6) / ncols - 0.2
    title_weight = "bold" if own is not None else "normal"   # the titles are bold: measured so where it matters
    for k, ax in enumerate(axes.flat):
        if k >= n:
            ax.set_visible(False)
            continue
        i = idx[k]
        d = doc["members"][i]
        h = np.asarray(result.members[i].steel_temperature_C, dtype=float)
        ipk = int(np.argmax(h))
        ts, hs = _thin(t, h, [ipk])
        if own is not None:
            tg, gg = _thin(t, own[:, i], [int(np.argmax(own[:, i]))])
        ax.plot(tg, gg, color=GAS_TINT, lw=1.0, label=gas_label)
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
        verdict = _verdict(d)
        title = (f"{_fit(d['name'], title_in, 8.0, title_weight)}\n"
                 f"margin {_margin_text(d)} °C, {verdict}")
        if gov is not None:
            size = short[gov[i]] if gov[i] is not None and gov[i] < len(short) else "governing fire not named"
            title += "\n" + _fit(f"{size} governs", title_in, 8.0, title_weight)
        ax.set_title(title, fontsize=8, linespacing=1.3)
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
    if own is None:
        cap = ("Steel temperature of each member in the design fire (EN 1993-1-2 4.2.5), its critical temperature "
               "(dashed) and the time of its peak (dotted)")
    elif curve == "localised":
        cap = ("Steel temperature of each member in its own exposure (EN 1993-1-2 4.2.5), its critical temperature "
               "(dashed) and the time of its peak (dotted). Pale: the gas temperature the member's calculation was "
               "given at its position by steelfire's rule for EN 1991-1-2 Annex C (on the plume axis, eq (C.2), "
               "within D/2 of the fire axis; beyond, the larger of the ceiling jet and the plume spreading beside the "
               "fire; where the flame reaches the ceiling, the "
               "adiabatic surface temperature of the heat flux of eq (C.4), which gives the net flux of eq (C.9))")
    elif curve == "travelling":
        cap = ("Steel temperature of each member in its own exposure (EN 1993-1-2 4.2.5), its critical temperature "
               "(dashed) and the time of its peak (dotted). Pale: the gas temperature at the member's position in "
               "the fire size that governs it (named under the margin; the worst of the family, near field over the "
               "burning band, ceiling jet beyond)")
    else:
        cap = ("Steel temperature of each member in its own exposure (EN 1993-1-2 4.2.5), its critical temperature "
               "(dashed) and the time of its peak (dotted); pale: the gas temperature at the member")
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
            elif name == "heat_release":
                fig, cap = heat_release_figure(doc, result)
            elif name == "plan_view":
                fig, cap = plan_view_figure(doc, result, rep["plotted_member_indices"], rep["selection"])
            elif name == "height_profile":
                fig, cap = height_profile_figure(doc, result, rep["plotted_member_indices"], rep["selection"])
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
