"""Report figures of the fires that differ from member to member (localised, travelling).

The bundled atrium (localised fire, EN 1991-1-2 Annex C with the heat release of Annex E.4) and open
office (travelling fire family) are run and written as the CLI's ``--out`` does; a variant of the atrium
with its roof lowered to 4.0 m puts the flame at the ceiling. Checked: the new figures are planned,
written (PNG, SVG), and shown in the report with their captions; each member's steel-temperature panel
draws that member's own exposure (against the exposure the chain used and against the fire model called
directly); the height profile draws eq (C.2) as worked by hand; the plan view puts each member at its
along_m; long names are cut to fit; Annex A cases keep their figures.
"""

from __future__ import annotations

import copy
import math
import re
from pathlib import Path

import matplotlib
import numpy as np
import pytest
from matplotlib.backends.backend_agg import FigureCanvasAgg
from matplotlib.text import Annotation, Text

import steelfire
from steelfire.models.fire import fireload, heatrelease, localised, travelling
from steelfire.outputs import document
from steelfire.outputs.files import write_outputs
from steelfire.outputs.report import plots

CASES = Path(__file__).resolve().parents[1] / "cases"


def _run(path, out):
    case = steelfire.load_case(path)
    result = steelfire.analyse(case)
    written = write_outputs(result, out, path, command="check", case=case)
    return {"case": case, "result": result, "doc": written.document, "out": out,
            "html": (out / "report.html").read_text(encoding="utf-8")}


@pytest.fixture(scope="module")
def atrium(tmp_path_factory):
    return _run(CASES / "atrium_localised.toml", tmp_path_factory.mktemp("atrium") / "out")


@pytest.fixture(scope="module")
def atrium_low(tmp_path_factory):
    """The atrium with the roof 4.0 m above the stall (members at the roof moved down with it)."""
    text = (CASES / "atrium_localised.toml").read_text(encoding="utf-8")
    text = text.replace("ceiling_height_m = 7.5 ", "ceiling_height_m = 4.0 ")
    text = text.replace("height_m = 7.5 }", "height_m = 4.0 }")
    assert text.count("4.0 }") == 2 and "ceiling_height_m = 4.0" in text
    d = tmp_path_factory.mktemp("atrium_low")
    path = d / "atrium_low.toml"
    path.write_text(text, encoding="utf-8")
    return _run(path, d / "out")


@pytest.fixture(scope="module")
def office(tmp_path_factory):
    return _run(CASES / "open_office_travelling.toml", tmp_path_factory.mktemp("office") / "out")


def _draw(fig):
    fig.draw(FigureCanvasAgg(fig).get_renderer())
    return fig


def _figure(run, name):
    """(figure, caption) of ``name`` for a run, drawn inside the report's rc settings."""
    doc, result = run["doc"], run["result"]
    rep = doc["report"]
    with matplotlib.rc_context(plots._RC):
        if name == "steel_temperatures":
            fig, cap = plots.steel_temperatures_figure(doc, result, rep["history_plot_member_indices"],
                                                       rep["selection"])
        elif name == "height_profile":
            fig, cap = plots.height_profile_figure(doc, result, rep["plotted_member_indices"], rep["selection"])
        elif name == "plan_view":
            fig, cap = plots.plan_view_figure(doc, result, rep["plotted_member_indices"], rep["selection"])
        else:
            fig, cap = plots.heat_release_figure(doc, result)
        return _draw(fig), cap


def _line(ax, label=None, gid=None):
    hits = [ln for ln in ax.get_lines() if (label is None or ln.get_label() == label)
            and (gid is None or ln.get_gid() == gid)]
    assert len(hits) == 1, [ln.get_label() for ln in ax.get_lines()]
    return hits[0]


# ----------------------------------------------------------------------------------------------
# the figures are planned, written and shown


@pytest.mark.parametrize("which, geometry", [("atrium", "height_profile"), ("office", "plan_view")])
def test_new_figures_are_planned_written_and_shown(which, geometry, request):
    run = request.getfixturevalue(which)
    doc, out, page = run["doc"], run["out"], run["html"]
    figs = doc["report"]["figures"]
    # the heat release takes the design-fire figure's place (its gas curve is only the hottest exposure)
    assert figs[:3] == ["heat_release", geometry, "steel_temperatures"], figs
    assert "design_fire" not in figs
    assert set(figs) <= set(plots.FIGURE_NAMES)
    for name in ("heat_release", geometry):
        png = (out / f"fig_{name}.png").read_bytes()
        svg = (out / f"fig_{name}.svg").read_text(encoding="utf-8")
        assert png.startswith(b"\x89PNG\r\n\x1a\n") and len(png) > 20_000
        assert "<svg" in svg and "</svg>" in svg
        assert f"fig_{name}.png" in doc["report"]["files"] and f"fig_{name}.svg" in doc["report"]["files"]
        # in the report, inside the design-fire section, numbered in plan order, with its caption
        no = figs.index(name) + 1
        fire_section = page.split('<section id="fire">', 1)[1].split("</section>", 1)[0]
        m = re.search(rf'<figure id="figure-{no}">.*?<figcaption><b>Figure {no}\.</b> (.*?) <span class="aside">'
                      rf'\(fig_{name}\.png, \.svg\)</span></figcaption></figure>', fire_section, re.S)
        assert m, name
    assert ("by EN 1991-1-2 eq (C.2)" if which == "atrium" else "starts at x = 0, arrow") in page
    other = {"height_profile": "plan_view", "plan_view": "height_profile"}[geometry]
    assert other not in figs and not (out / f"fig_{other}.png").exists()


def test_annex_a_and_nominal_cases_keep_their_figures():
    # office_bay (Annex A parametric fire) and warehouse_standard (standard fire): same plan as before
    for stem in ("office_bay", "warehouse_standard"):
        result = steelfire.analyse(steelfire.load_case(CASES / f"{stem}.toml"), histories=False)
        doc = document.build(result)
        figs = plots.plan(doc, [m["name"] for m in doc["members"]])["figures"]
        assert figs[:2] == ["design_fire", "steel_temperatures"], (stem, figs)
        assert not {"heat_release", "plan_view", "height_profile"} & set(figs), (stem, figs)


# ----------------------------------------------------------------------------------------------
# each member's own exposure in its steel-temperature panel


def _localised_exposure(case, t, i):
    """Member i's exposure computed directly from EN 1991-1-2 Annex C and E.4 (localised.member_exposure)."""
    fl = case.fire_load
    # hand calculation, eq (E.1): q_f,d = q_f,k m delta_q1 delta_q2 delta_n = 730 x 0.8 x 1 x 1 x 1 = 584 MJ/m2
    q_fd = 730.0 * 0.8
    assert fireload.design_density(fl, None, case.code)[0] == pytest.approx(q_fd, rel=1e-12)
    # E.4: RHR_f = 500 kW/m2 over A_fi = 25 m2, fast growth t_alpha = 150 s (Table E.5, from memory)
    hr = heatrelease.annex_e_fire(q_fd, 25.0, 500.0, 150.0)
    d = math.sqrt(4.0 * 25.0 / math.pi)   # hand calculation: circle of 25 m2, D = 5.6419 m
    h = case.fire.options["ceiling_height_m"]
    pos = case.members[i].position
    # alpha_c = 35 W/(m2 K) for natural fires (EN 1991-1-2 3.3.1.1(3), from memory); resultant emissivity
    # Phi eps_m eps_f = 1.0 x 0.7 x 1.0 (EN 1993-1-2 2.2(2), EN 1991-1-2 3.1(6), from memory)
    return localised.member_exposure(t, hr.heat_release_W(t), d, h, pos["distance_m"], pos["height_m"],
                                     alpha_c=35.0, emissivity=0.7).effective_gas_temperature_C


def _travelling_exposure(case, doc, t, i):
    """Member i's exposure in the fire size its document entry names, from the travelling-fire model."""
    label = doc["members"][i]["governing_exposure"]
    share = {travelling.fire_label(share=a): a for a in (0.10, 0.25, 0.50, 1.0)}[label.split(" at x = ")[0]]
    x = case.members[i].position["along_m"]
    assert label == travelling.exposure_label(travelling.fire_label(share=share), x)
    q_fd = fireload.design_density(case.fire_load, 72.0 * 27.0, case.code)[0]
    assert q_fd == pytest.approx(doc["fire"]["design_fire_load_MJ_m2"], rel=1e-5)
    # the case: L = 72 m, W = 27 m, H = 3.6 m, RHR_f = 250 kW/m2, T_nf = 1200 C
    fire = travelling.travelling_fire(72.0, 27.0, 3.6, q_fd, 250.0, 1200.0, share=share)
    return fire.gas_temperature_C(t, x), share


@pytest.mark.parametrize("which", ["atrium", "atrium_low", "office"])
def test_steel_panels_draw_each_members_own_exposure(which, request):
    run = request.getfixturevalue(which)
    doc, result, case = run["doc"], run["result"], run["case"]
    fig, cap = _figure(run, "steel_temperatures")
    idx = doc["report"]["history_plot_member_indices"]
    assert len(idx) == len(case.members) == 4
    t = np.asarray(result.fire.time_s)
    chain = plots.member_exposures(result)
    assert chain is not None and chain.shape == (len(t), 4)
    gas_label = "gas at the member, governing fire" if which == "office" else "exposure at the member"
    panels = [ax for ax in fig.axes if ax.get_visible() and ax.get_lines()]
    differ = 0
    for ax, i in zip(panels, idx):
        x, y = (np.asarray(v, dtype=float) for v in _line(ax, gas_label).get_data())
        k = np.searchsorted(t / 60.0, x)
        assert np.array_equal(t[k] / 60.0, x)          # the drawn points lie on the run's grid
        assert len(k) > 300 and k[0] == 0 and k[-1] == len(t) - 1
        # the exposure the chain ran the member in
        np.testing.assert_allclose(y, chain[k, i], rtol=1e-9, atol=0.0)
        # the same, from the fire model called directly for the member's position
        if which == "office":
            direct, share = _travelling_exposure(case, doc, t, i)
            assert ax.get_title(loc="left").splitlines()[2] == f"{share * 100:g} % fire governs"
        else:
            direct = _localised_exposure(case, t, i)
        np.testing.assert_allclose(y, direct[k], rtol=1e-9, atol=0.0)
        differ += float(np.max(np.abs(direct - np.asarray(result.fire.gas_temperature_C)))) > 50.0
        # and its peak is drawn (kept by the thinning)
        assert float(y.max()) == pytest.approx(float(direct.max()), rel=1e-12)
    assert differ >= 2   # the members' exposures are not the one envelope curve drawn before
    assert "own exposure" in cap


def test_flux_exposure_is_drawn_as_its_adiabatic_surface_temperature(atrium_low):
    # with H = 4.0 m the flame reaches the ceiling (hand calculation below: L_f = 4.455 m >= 4.0 m); the
    # roof beam AR-1 (r = 0.5 m, z = 4.0 m) then sees the flux of eq (C.4), drawn as the temperature that
    # gives the same net flux by eq (C.9) with alpha_c = 35 and emissivity 0.7
    case, result = atrium_low["case"], atrium_low["result"]
    t = np.asarray(result.fire.time_s)
    i = [m.name for m in case.members].index("AR-1 roof beam over the stall")
    e = localised.member_exposure(t, atrium_low["result"].fire.series["heat_release_MW"] * 1e6,
                                  math.sqrt(100.0 / math.pi), 4.0, 0.5, 4.0, 35.0, 0.7)
    assert e.impacts_ceiling.any()
    drawn = plots.member_exposures(result)[:, i]
    j = np.flatnonzero(e.impacts_ceiling)
    # EN 1991-1-2 eq (C.9): h_net = h - alpha_c (T - 20) - Phi eps sigma ((T + 273)^4 - 293^4) = 0 at T = T_AST
    sigma = 5.67e-8   # Stefan-Boltzmann constant [W/(m2 K4)], EN 1991-1-2 3.1(6)
    h_net = e.flux_W_m2[j] - 35.0 * (drawn[j] - 20.0) - 0.7 * sigma * ((drawn[j] + 273.0) ** 4 - 293.0 ** 4)
    assert np.max(np.abs(h_net)) < 1e-6 * np.max(e.flux_W_m2[j])


# ----------------------------------------------------------------------------------------------
# the heat release figure


def test_heat_release_of_the_localised_fire_against_annex_e(atrium):
    fig, cap = _figure(atrium, "heat_release")
    ax_q, ax_l = [ax for ax in fig.axes if ax.get_lines()]
    tq, q = (np.asarray(v, dtype=float) for v in _line(ax_q, "heat release rate Q").get_data())
    # hand calculation, E.4(1): Q = 1 MW (t / t_alpha)^2 with t_alpha = 150 s: at t = 5 min, (300/150)^2 = 4 MW
    k = int(np.argmin(np.abs(tq - 5.0)))
    assert tq[k] == pytest.approx(5.0, abs=1e-9) and q[k] == pytest.approx(4.0, rel=1e-9)
    # hand calculation, E.4(3): plateau RHR_f A_fi = 500 kW/m2 x 25 m2 = 12.5 MW, reached at
    # t_1 = t_alpha sqrt(Q_max / 1 MW) = 150 sqrt(12.5) = 530.33 s = 8.839 min
    assert q.max() == pytest.approx(12.5, rel=1e-12)
    assert tq[np.argmax(q)] == pytest.approx(530.33 / 60.0, abs=5.0 / 60.0)
    tl, lf = (np.asarray(v, dtype=float) for v in _line(ax_l, r"flame length $L_\mathrm{f}$, eq (C.1)").get_data())
    # hand calculation, eq (C.1) at the plateau: D = sqrt(4 x 25 / pi) = 5.64190 m;
    # Q^(2/5) = exp(0.4 ln 12.5e6) = exp(0.4 x 16.34124) = 689.865;
    # L_f = -1.02 x 5.64190 + 0.0148 x 689.865 = -5.75474 + 10.21000 = 4.4553 m
    assert lf.max() == pytest.approx(4.4553, abs=1e-3)
    assert lf.min() == 0.0   # (C.1) is negative for a small fire: drawn as 0
    assert "E.4" in cap and "eq (C.1)" in cap and "stays below the ceiling" in cap


def test_heat_release_of_the_travelling_family(office):
    fig, cap = _figure(office, "heat_release")
    ax = [a for a in fig.axes if a.get_lines()][0]
    lines = {ln.get_label().split(" (")[0]: ln for ln in ax.get_lines()}
    assert set(lines) == {"10 % fire", "25 % fire", "50 % fire", "100 % fire"}
    _, q10 = lines["10 % fire"].get_data()
    _, q100 = lines["100 % fire"].get_data()
    # hand calculation: Q = RHR_f W L_f; 10 % fire: L_f = 0.1 x 72 = 7.2 m, Q = 250e3 x 27 x 7.2 = 48.6 MW;
    # 100 % fire: the whole floor at its peak, 250e3 x 27 x 72 = 486 MW
    assert max(q10) == pytest.approx(48.6, rel=1e-9)
    assert max(q100) == pytest.approx(486.0, rel=1e-3)   # its peak instant t_b lies on the grid within 10 s
    assert "(governs 4 members)" in lines["10 % fire"].get_label()   # all four: see the document entries
    assert all(m["governing_exposure"].startswith("0.1 of the floor") for m in office["doc"]["members"])
    assert "Table E.5" in cap


# ----------------------------------------------------------------------------------------------
# the height profile of the localised fire


def test_height_profile_draws_eq_c2_and_the_members(atrium):
    fig, cap = _figure(atrium, "height_profile")
    ax_t, ax_g = fig.axes[:2]
    theta, z = (np.asarray(v, dtype=float) for v in _line(ax_t, gid="plume").get_data())
    assert z[0] == 0.0 and z[-1] == 7.5   # from the fire source up to the ceiling
    # hand calculation, EN 1991-1-2 eq (C.2) and (C.3) at the ceiling, z = 7.5 m, Q = 12.5 MW (the plateau,
    # E.4(3): 500 kW/m2 x 25 m2), D = 5.64190 m:
    #   Q^(2/5) = 689.865; z_0 = -1.02 x 5.64190 + 0.00524 x 689.865 = -5.75474 + 3.61489 = -2.13984 m
    #   Q_c = 0.8 x 12.5e6 = 1.0e7 W, Q_c^(2/3) = 46 415.9
    #   z - z_0 = 9.63984 m, 9.63984^(-5/3) = exp(-5/3 x 2.26590) = exp(-3.77651) = 0.0229025
    #   theta = 20 + 0.25 x 46 415.9 x 0.0229025 = 20 + 265.76 = 285.76 C
    assert theta[-1] == pytest.approx(285.76, abs=0.01)
    # hand calculation: below z_900 = z_0 + (0.25 Q_c^(2/3) / 880)^(3/5) = -2.13984 + 13.18633^0.6
    # = -2.13984 + 4.69974 = 2.5599 m eq (C.2) is held at its 900 C limit
    assert np.all(theta[z <= 2.5599 - 1e-3] == 900.0) and np.all(theta[z >= 2.5599 + 1e-3] < 900.0)
    assert float(localised.plume_limit_height_m(12.5e6, math.sqrt(100.0 / math.pi))) == pytest.approx(2.5599, abs=1e-4)
    # the flame tip at L_f = 4.4553 m (hand calculation in the heat-release test)
    tips = [ln for ln in ax_t.get_lines() if ln.get_gid() != "plume" and len(set(ln.get_ydata())) == 1
            and abs(ln.get_ydata()[0] - 4.4553) < 1e-3]
    assert tips
    # every member at its (distance, height) of the case, marked by its verdict
    doc, case = atrium["doc"], atrium["case"]
    for i, m in enumerate(case.members):
        mark = _line(ax_g, gid=f"member-{i}")
        assert (mark.get_xdata()[0], mark.get_ydata()[0]) == (m.position["distance_m"], m.position["height_m"])
        assert mark.get_marker() == ("o" if doc["members"][i]["passes"] else "X")
    assert [d["passes"] for d in doc["members"]] == [False, True, True, True]   # AC-1 fails (its verdict table)
    assert "eq (C.2)" in cap and "The flame reaches the ceiling" not in cap


def test_height_profile_says_when_the_flame_reaches_the_ceiling(atrium_low):
    fig, cap = _figure(atrium_low, "height_profile")
    # L_f = 4.4553 m >= H = 4.0 m (hand calculation in the heat-release test): the flux of eq (C.4) governs
    assert "The flame reaches the ceiling (L_f = 4.455 m >= H = 4 m)" in cap
    assert "eq (C.4)" in cap
    theta, z = _line(fig.axes[0], gid="plume").get_data()
    assert z[-1] == 4.0 and _line(fig.axes[0], gid="plume").get_linestyle() != "-"   # drawn for reference
    _, hcap = _figure(atrium_low, "heat_release")
    assert "shaded where the flame reaches the ceiling" in hcap


# ----------------------------------------------------------------------------------------------
# the plan view of the travelling fire


def test_plan_view_places_each_member_at_its_along_m(office):
    fig, cap = _figure(office, "plan_view")
    ax = fig.axes[0]
    along = {"B5-01 primary beam, near end": 6.0, "B5-12 primary beam, middle": 36.0,
             "B5-24 primary beam, far end": 68.0, "C5-07 column, middle": 36.0}   # the case file's position
    doc = office["doc"]
    labels = [a for a in ax.texts if isinstance(a, Annotation) and "fire, " in a.get_text()]
    for i, m in enumerate(doc["members"]):
        mark = _line(ax, gid=f"member-{i}")
        assert mark.get_xdata()[0] == along[m["name"]]
        assert mark.get_marker() == "o" and m["passes"]
        lab = [a for a in labels if a.get_text().startswith(m["name"])]
        assert len(lab) == 1 and lab[0].get_text() == f"{m['name']}: 10 % fire, pass"
        assert lab[0].xy[0] == along[m["name"]]
    # the floor 72 m x 27 m and the direction of travel from x = 0
    assert ax.get_xlim()[0] < 0.0 < 72.0 < ax.get_xlim()[1]
    arrows = [a for a in ax.texts if isinstance(a, Annotation) and a.arrow_patch is not None]
    assert len(arrows) == 1 and arrows[0].xyann[0] == 0.0 and arrows[0].xy[0] > 0.0
    assert "72 m along the direction of travel by 27 m across" in cap


def test_plan_view_marks_a_failing_member(office):
    doc = copy.deepcopy(office["doc"])
    doc["members"][2]["passes"] = False
    with matplotlib.rc_context(plots._RC):
        fig, _ = plots.plan_view_figure(doc, office["result"], [0, 1, 2, 3], None)
    ax = fig.axes[0]
    assert _line(ax, gid="member-2").get_marker() == "X"
    assert [_line(ax, gid=f"member-{i}").get_marker() for i in (0, 1, 3)] == ["o", "o", "o"]
    lab = [a for a in ax.texts if a.get_text().startswith("B5-24")][0]
    assert lab.get_text().endswith("FAIL") and lab.get_fontweight() == "bold"


# ----------------------------------------------------------------------------------------------
# long names are cut to fit


def _named_texts(fig):
    _draw(fig)
    return [t for t in fig.findobj(Text) if "WWW" in t.get_text() and t.get_visible()]


@pytest.mark.parametrize("which, name", [("office", "plan_view"), ("atrium", "height_profile"),
                                         ("office", "steel_temperatures")])
def test_long_member_names_are_cut_and_do_not_overlap(which, name, request):
    run = dict(request.getfixturevalue(which))
    doc = copy.deepcopy(run["doc"])
    for k, m in enumerate(doc["members"]):
        m["name"] = f"{k + 1:02d}-" + "W" * 37   # 40 characters
    run["doc"] = doc
    fig, _ = _figure(run, name)
    texts = _named_texts(fig)
    assert len(texts) >= 4
    renderer = FigureCanvasAgg(fig).get_renderer()
    boxes = [t.get_window_extent(renderer) for t in texts]
    frame = fig.bbox
    for k, a in enumerate(boxes):
        assert a.x0 >= frame.x0 - 1 and a.x1 <= frame.x1 + 1, f"label {k} leaves the figure"
        for b in boxes[k + 1:]:
            assert not a.overlaps(b), "two labels overlap"
    # cut where they need to be: the panel titles and the key always, the plan's labels where there is no room
    cut = [t for t in texts if "…" in t.get_text()]
    assert len(cut) == len(texts) if name != "plan_view" else len(cut) >= 2


# ----------------------------------------------------------------------------------------------
# the small model functions the figures use


def test_fire_and_exposure_labels_keep_the_documents_wording(office):
    # the exposure labels in the golden documents read "0.1 of the floor (10 %) at x = 6 m"
    assert travelling.fire_label(share=0.1) == "0.1 of the floor (10 %)"
    assert travelling.fire_label(share=0.025, short=True) == "2.5 % fire"
    assert travelling.fire_label(spread_rate_mm_s=12.5) == "spread 12.5 mm/s"
    assert travelling.exposure_label("0.1 of the floor (10 %)", 6.0) == "0.1 of the floor (10 %) at x = 6 m"
    assert office["doc"]["members"][0]["governing_exposure"] == "0.1 of the floor (10 %) at x = 6 m"
    with pytest.raises(steelfire.InputError):
        travelling.fire_label()


def test_plume_limit_height_by_hand():
    # hand calculation, Q = 5 MW, D = 2 m: Q^(2/5) = 478.17, z_0 = -2.04 + 0.00524 x 478.17 = 0.46564 m (C.3);
    # Q_c^(2/3) = (4e6)^(2/3) = 25 198.4; 0.25 x 25 198.4 / 880 = 7.15864; 7.15864^0.6 = 3.25760;
    # z_900 = 0.46564 + 3.25760 = 3.7232 m
    z = float(localised.plume_limit_height_m(5e6, 2.0))
    assert z == pytest.approx(3.7232, abs=1e-4)
    # eq (C.2) reaches its 900 C limit there, and is below it just above
    assert float(localised.plume_temperature_C(z, 5e6, 2.0)) == pytest.approx(900.0, abs=1e-9)
    assert float(localised.plume_temperature_C(z + 0.01, 5e6, 2.0)) < 900.0
    assert float(localised.plume_temperature_C(z - 0.01, 5e6, 2.0)) == 900.0


@pytest.mark.parametrize("family, shorts", [
    ("fire_sizes = [0.10, 0.25, 0.50, 1.0]", ["10 % fire", "25 % fire", "50 % fire", "100 % fire"]),
    ("spread_rate_mm_s = [2.0, 5.0, 12.5]", ["spread 2 mm/s", "spread 5 mm/s", "spread 12.5 mm/s"])])
def test_travelling_series_names_every_fire_even_when_some_outlast_the_run(family, shorts, tmp_path):
    from steelfire.chain import fires

    text = (CASES / "open_office_travelling.toml").read_text(encoding="utf-8")
    text = text.replace("duration_min = 360.0", "duration_min = 120.0")   # the small fires outlast it
    text = text.replace("fire_sizes = [0.10, 0.25, 0.50, 1.0]", family)
    text = text.replace("[analysis]", "[analysis]\nallow_out_of_scope = true", 1)   # refused otherwise
    path = tmp_path / "case.toml"
    path.write_text(text, encoding="utf-8")
    case = steelfire.load_case(path)
    fire = fires.design_fire(case)
    assert any("not burnt out" in w for w in fire.warnings)
    t = np.array([0.0, 600.0, 1800.0])
    s = fire.series(t)
    assert s["fire_short_labels"] == shorts
    assert s["heat_release_MW"].shape == (3, len(shorts))
    assert s["member_along_m"].tolist() == [6.0, 36.0, 68.0, 36.0]   # the case file's positions
    # hand calculation, a spread rate s fills the band at s t while t < t_b: Q = RHR_f W s t;
    # 5 mm/s at t = 600 s: 250e3 x 27 x 0.005 x 600 = 20.25 MW (t_b = q_f,d / RHR_f > 1800 s here)
    if "spread" in family:
        assert s["heat_release_MW"][1, 1] == pytest.approx(20.25, rel=1e-12)


def test_without_histories_the_fire_figures_are_still_written(tmp_path):
    # --no-histories: no steel panels (no histories kept), but the heat release and the plan view
    # need only the fire and the positions
    path = CASES / "open_office_travelling.toml"
    case = steelfire.load_case(path)
    result = steelfire.analyse(case, histories=False)
    assert plots.member_exposures(result) is None
    written = write_outputs(result, tmp_path / "out", path, command="check", case=case)
    figs = written.document["report"]["figures"]
    assert figs[:2] == ["heat_release", "plan_view"] and "steel_temperatures" not in figs
    assert (tmp_path / "out" / "fig_plan_view.png").is_file()


def test_histories_csv_holds_each_members_exposure(atrium):
    # histories.csv of a localised fire: gas_C is the hottest exposure (the envelope) and each member's own
    # exposure follows its steel column as "exposure_C <name>"; values as the chain used them (2 decimals).
    import csv

    with open(atrium["out"] / "histories.csv", newline="", encoding="utf-8") as fh:
        rows = list(csv.reader(fh))
    names = [m["name"] for m in atrium["doc"]["members"]]
    assert rows[0] == ["time_min", "gas_C"] + names + [f"exposure_C {n}" for n in names]
    data = np.array(rows[1:], dtype=float)
    exposure = np.asarray(atrium["result"].fire.exposure_C, dtype=float)
    n = len(names)
    np.testing.assert_allclose(data[:, 2 + n:], exposure, atol=0.006)
    np.testing.assert_allclose(data[:, 1], exposure.max(axis=1), atol=0.006)



def test_travelling_fire_that_outlasts_the_run_is_refused(tmp_path):
    # a member the fire has not reached by the end of the run stays at 20 C and would pass: the run must cover the
    # family's longest fire (t_b + L / s; the case's own family: its longest lasts 339.5 min by the check of the
    # case as bundled, > 120)
    from steelfire.errors import OutOfScopeError

    text = (CASES / "open_office_travelling.toml").read_text(encoding="utf-8").replace(
        "duration_min = 360.0", "duration_min = 120.0")
    path = tmp_path / "case.toml"
    path.write_text(text, encoding="utf-8")
    with pytest.raises(OutOfScopeError) as e:
        steelfire.analyse(steelfire.load_case(path), histories=False)
    assert e.value.field == "fire.duration_min" and e.value.value == 120.0
    assert e.value.allowed.startswith("at least ") and "not burnt out" in e.value.allowed
