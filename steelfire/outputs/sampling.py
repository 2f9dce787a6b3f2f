"""Outputs of ``steelfire sample``: the document's ``variability`` section, CSV tables and CDF figures.

:func:`section` is the ``variability`` object of the JSON document (``SampleRun.to_dict()``).
:func:`payloads` renders the files ``--out`` adds (names in :data:`FILES` and the figures), for the
caller's atomic writer (:func:`steelfire.outputs.files.write_outputs` commits payloads the same way);
:func:`write` writes them alone into a directory, by the same rules (checked, temporary names, renamed).

The CDFs are drawn from the run's histograms (peaks in 0.5 C bins, times in 0.1 min bins): the
fraction of fires at or below each bin's upper edge. No physics here: every number comes from the
:class:`steelfire.chain.sampling.SampleRun`.
"""

from __future__ import annotations

import csv
import html
import io
import math

import numpy as np

from steelfire.models import variability as V
from steelfire.models.fire import parametric as P

#: Files written by ``--out`` besides the figures.
SAMPLES_CSV = "variability_samples.csv"
MEMBERS_CSV = "variability_members.csv"
FILES = (SAMPLES_CSV, MEMBERS_CSV)
#: Figures (``fig_<name>.png`` / ``.svg``).
FIGURE_NAMES = ("variability_peaks", "variability_times")
#: Members drawn in a figure (the highest exceedance probabilities first).
PLOT_MEMBERS = 8
#: Route labels for tables and figures.
ROUTE_LABELS = {"annex_f": "Annex F", "cib_w14": "CIB W14", "equal_temperature": "equal steel temperature"}


def section(run) -> dict:
    """The ``variability`` section of the JSON document."""
    return run.to_dict()


# ---- CSV ---------------------------------------------------------------------------------------

def _cell(v):
    """A CSV cell: numbers as JSON writes them (a trailing .0 dropped), empty for None and NaN, text made
    safe for spreadsheets (:func:`steelfire.outputs.tables.safe_text`)."""
    if v is None:
        return ""
    if isinstance(v, bool):
        return "true" if v else "false"
    if isinstance(v, (float, np.floating)):
        v = float(v)
        if not math.isfinite(v):
            return ""
        s = repr(v)
        return s[:-2] if s.endswith(".0") else s
    if isinstance(v, (int, np.integer)):
        return str(int(v))
    from steelfire.outputs.tables import safe_text

    return safe_text(str(v))


def samples_csv(run) -> str:
    """One row per sampled fire: what was drawn, the Annex A fire (O, b, q_f,d, q_t,d, t_lim, regime,
    t_max, peak gas, burnout), its Annex A findings, and the Annex F / CIB W14 equivalent times."""
    c = run.counts.fire_columns
    n = run.fires
    head = ["fire", "opening_fraction", "fire_load_MJ_m2", "thermal_inertia", "growth", "opening_factor_m05",
            "design_fire_load_MJ_m2", "total_area_fire_load_MJ_m2", "t_lim_min", "regime", "t_max_min",
            "peak_gas_temperature_C", "burnout_time_min", "annex_a_findings", "annex_f_protected_min",
            "annex_f_bare_min", "cib_w14_min"]
    out = io.StringIO()
    w = csv.writer(out, lineterminator="\n")
    w.writerow(head)
    names = [name for name, _ in P.SCOPE_FINDINGS]
    scope = c["scope"].astype(np.int64)
    undefined = (scope & P.UNDEFINED_BITS) != 0
    cols = {k: c[k].tolist() for k in c}
    for i in range(n):
        s = int(scope[i])
        findings = ";".join(nm for nm in names if s & P.SCOPE_BIT[nm])
        regime = "" if undefined[i] else ("fuel" if cols["fuel_controlled"][i] else "ventilation")
        w.writerow([i] + [_cell(cols[k][i]) for k in ("opening_fraction", "fire_load_MJ_m2", "thermal_inertia")]
                   + [V.GROWTH_RATES[int(cols["growth"][i])]]
                   + [_cell(cols[k][i]) for k in ("opening_factor_m05", "design_fire_load_MJ_m2",
                                                   "total_area_fire_load_MJ_m2", "t_lim_min")]
                   + [regime] + [_cell(cols[k][i]) for k in ("t_max_min", "peak_gas_temperature_C", "burnout_time_min")]
                   + [findings] + [_cell(cols[k][i]) for k in ("annex_f_protected_min", "annex_f_bare_min",
                                                               "cib_w14_min")])
    return out.getvalue()


def members_csv(doc_section: dict) -> str:
    """One row per member: the section's per-member statistics, flattened (keys joined by ``.``)."""
    rows = []
    for m in doc_section["members"]:
        flat = {}

        def put(prefix, v):
            if isinstance(v, dict):
                for k, x in v.items():
                    put(f"{prefix}.{k}" if prefix else k, x)
            elif isinstance(v, list):
                flat[prefix] = ";".join(_cell(x) for x in v)
            else:
                flat[prefix] = v
        put("", m)
        rows.append(flat)
    head = []
    for r in rows:
        head += [k for k in r if k not in head]
    # a group that is null for some members (a bare member's sizing) and a table for others: its columns only
    head = [k for k in head if not any(h.startswith(k + ".") for h in head)]
    out = io.StringIO()
    w = csv.writer(out, lineterminator="\n")
    w.writerow(head)
    for r in rows:
        w.writerow([_cell(r.get(k)) for k in head])
    return out.getvalue()


# ---- CDF figures ------------------------------------------------------------------------------

def cdf(hist: V.Histograms, member: int):
    """(x, F): the upper bin edges and the share of all fires at or below each (values below the first
    edge counted at it; values above the bins and NaN never reached)."""
    n = int(hist.fires[member])
    if n == 0:
        return np.zeros(0), np.zeros(0)
    cum = hist.below[member] + np.cumsum(hist.counts[member])
    return hist.bins.edges[1:], cum / n


def _plot_order(run) -> list:
    ex = run.tally.exceedance()
    return [int(i) for i in np.argsort(-ex.probability, kind="stable")[:PLOT_MEMBERS]]


def _style():
    try:
        from steelfire.outputs.report import plots

        rc, colours = dict(getattr(plots, "_RC", {})), (plots.STEEL, plots.DESIGN_FIRE, plots.EQUAL_T, plots.CIB_W14,
                                                           plots.STANDARD, plots.CRITICAL, plots.INK)
    except (ImportError, AttributeError):  # pragma: no cover - the report's palette is optional here
        rc, colours = {}, ("#22507d", "#b0431c", "#dd9c2c", "#a9d2c9", "#56616d", "#c8850f", "#1c232b")
    return rc, colours


def _crop(x, y, lo=0.0005, hi=0.9995):
    """The part of a CDF between the shares lo and hi, or up to its last rise where it never reaches hi
    (fires above the bins or without a value), with a bin either side, for drawing."""
    if not len(x):
        return x, y
    rises = np.flatnonzero(np.diff(y) > 0)
    last = int(rises[-1]) + 1 if len(rises) else len(x) - 1
    a = max(int(np.searchsorted(y, lo, side="left")) - 1, 0)
    b = min(int(np.searchsorted(y, hi, side="left")) + 2, last + 2, len(x))
    return x[a:b], y[a:b]


def figures(run, doc_section: dict | None = None) -> list:
    """The CDF figures: peak steel temperature per member (critical temperature and target fractile
    marked), equivalent times by route (the members' required periods and the fractile marked)."""
    from matplotlib import rc_context
    from matplotlib.figure import Figure

    from steelfire.outputs.report.plots import RenderedFigure

    sec = doc_section or section(run)
    rc, (c_steel, c_fire, c_eq, c_cib, c_std, c_crit, ink) = _style()
    palette = (c_steel, c_fire, c_eq, c_std, c_cib, ink, c_crit, "#7a5195")
    order = _plot_order(run)
    q = run.spec.target_fractile
    out = []

    def save(fig, name, caption):
        png, svg = io.BytesIO(), io.StringIO()
        fig.savefig(png, format="png", metadata={"Software": None})
        fig.savefig(svg, format="svg", metadata={"Date": None, "Creator": None})
        out.append(RenderedFigure(name=name, caption=caption, png=png.getvalue(), svg=svg.getvalue()))

    styles = ("-", "--", "-.", ":")
    with rc_context(rc):
        fig = Figure(figsize=(7.0, 3.6), layout="constrained")
        ax = fig.add_subplot()
        for k, i in enumerate(order):
            x, y = _crop(*cdf(run.tally.peak_steel, i))
            col = palette[k % len(palette)]
            ax.plot(x, y, color=col, linestyle=styles[k % 4], label=str(run.names[i]).replace("$", r"\$"))
            ax.axvline(run.critical_C[i], color=col, linewidth=0.8, linestyle=":")
        ax.axhline(q, color=ink, linewidth=0.7)
        ax.text(ax.get_xlim()[0], q, f" fractile {q:g}", va="bottom", ha="left", fontsize=7)
        ax.set_xlabel("peak steel temperature [C]  (dotted: each member's critical temperature)")
        ax.set_ylabel("share of fires at or below")
        ax.set_ylim(0.0, 1.0)
        ax.legend(loc="lower right")
        save(fig, "variability_peaks",
             f"Distribution (CDF) of the peak steel temperature over {run.fires} sampled fires; dotted lines: the "
             f"members' critical temperatures; horizontal line: the {q:g} fractile.")

        routes = [r for r in ("annex_f", "cib_w14", "equal_temperature") if r in run.tally.equivalent_time]
        fig = Figure(figsize=(7.0, 2.6 * max(len(routes), 1)), layout="constrained")
        axes = fig.subplots(max(len(routes), 1), 1, squeeze=False)[:, 0]
        reqs = sorted({r for r in run.required_minutes if r is not None})
        for ax, r in zip(axes, routes):
            h = run.tally.equivalent_time[r]
            drawn_any = False
            seen = set()
            for k, i in enumerate(order):
                x, y = cdf(h, i)
                if not len(y) or y[-1] == 0:
                    continue
                key = (r != "equal_temperature", bool(run.protected[i]))  # Annex F / CIB: one curve per kind
                if r != "equal_temperature" and key in seen:
                    continue
                seen.add(key)
                x, y = _crop(x, y)
                label = run.names[i] if r == "equal_temperature" else ("protected" if run.protected[i] else "bare")
                ax.plot(x, y, color=palette[k % len(palette)], linestyle=styles[k % 4],
                        label=str(label).replace("$", r"\$"))
                drawn_any = True
            for req in reqs:
                ax.axvline(req, color=c_crit, linewidth=0.8, linestyle=":")
            ax.axhline(q, color=ink, linewidth=0.7)
            ax.set_ylim(0.0, 1.0)
            ax.set_title(ROUTE_LABELS[r])
            ax.set_ylabel("share of fires")
            if drawn_any:
                ax.legend(loc="lower right")
            else:
                ax.text(0.5, 0.5, "no times by this route", transform=ax.transAxes, ha="center")
        axes[-1].set_xlabel("equivalent time of standard fire exposure [min]  (dotted: required periods)")
        save(fig, "variability_times",
             f"Distribution (CDF) of the equivalent times over {run.fires} sampled fires by route; dotted lines: the "
             f"required periods; horizontal line: the {q:g} fractile.")
    return out


# ---- files and the report fragment ---------------------------------------------------------------

def payloads(run, doc_section: dict | None = None, with_figures: bool = True) -> dict:
    """File name -> bytes of what ``--out`` adds for a sampling run."""
    sec = doc_section or section(run)
    out = {SAMPLES_CSV: samples_csv(run).encode("utf-8"), MEMBERS_CSV: members_csv(sec).encode("utf-8")}
    if with_figures:
        for f in figures(run, sec):
            out[f"fig_{f.name}.png"] = f.png
            out[f"fig_{f.name}.svg"] = f.svg.encode("utf-8")
    return out


def targets() -> list:
    """Every file name :func:`write` may write."""
    return list(FILES) + [f"fig_{n}.{x}" for n in FIGURE_NAMES for x in ("png", "svg")]


def write(run, out_dir, with_figures: bool = True, inputs=()) -> list:
    """Write :func:`payloads` into ``out_dir`` by the rules of :mod:`steelfire.outputs.files`: the folder
    checked first (only regular files replaced, never one of ``inputs``), everything rendered, written to
    temporary names and renamed into place."""
    from pathlib import Path

    from steelfire.outputs import files

    out = Path(out_dir)
    names = targets()
    files._check_out_dir(out, names)
    files._guard_inputs(out, names, inputs)
    data = payloads(run, with_figures=with_figures)
    if out.is_dir():
        files.remove_stale_parts(out, names)
    return files._commit(out, data)
