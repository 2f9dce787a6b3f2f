"""Figures keep their layout with long member names (hardening issue: a 40-character name broke it).

Every figure of the report is drawn with 40-character member names on the bundled office bay (its four
members in one figure row of bars, panels of steel temperatures, thicknesses); no two texts of a figure
that name members may overlap, and none may leave the figure.
"""

import re
from pathlib import Path

import matplotlib
import pytest
from matplotlib.backends.backend_agg import FigureCanvasAgg
from matplotlib.text import Text

import steelfire
from steelfire.outputs import document
from steelfire.outputs.report import plots

CASES = Path(__file__).resolve().parents[1] / "cases"


@pytest.fixture(scope="module")
def long_named(tmp_path_factory):
    text = (CASES / "office_bay.toml").read_text(encoding="utf-8")  # no files of its own beside it
    count = iter(range(1, 100))
    text = re.sub(r'^name = "[^"]*"', lambda m: f'name = "{next(count):02d}-{"W" * 37}"', text, flags=re.M)
    path = tmp_path_factory.mktemp("layout") / "case.toml"
    path.write_text(text, encoding="utf-8")
    result = steelfire.size(steelfire.load_case(path))
    doc = document.build(result)
    doc["report"] = plots.plan(doc, [m["name"] for m in doc["members"]])
    return doc, result


def _naming(fig):
    """The texts of a figure that carry a member name (panel titles, bar labels)."""
    fig.draw(FigureCanvasAgg(fig).get_renderer())  # tick labels exist once drawn
    return [t for t in fig.findobj(Text) if "WWW" in t.get_text()]


def _boxes(fig, texts):
    renderer = FigureCanvasAgg(fig).get_renderer()
    fig.draw(renderer)
    return [t.get_window_extent(renderer) for t in texts if t.get_visible() and t.get_text()], fig.bbox


def _assert_apart(boxes, frame, what):
    for k, a in enumerate(boxes):
        assert a.x0 >= frame.x0 - 1 and a.x1 <= frame.x1 + 1, f"{what} {k} leaves the figure"
        for b in boxes[k + 1:]:
            assert not a.overlaps(b), f"{what}: two labels overlap ({a} and {b})"


def test_long_names_in_bar_labels_and_panel_titles_do_not_overlap(long_named):
    doc, result = long_named
    rep = doc["report"]
    assert {"steel_temperatures", "time_equivalence", "thickness"} <= set(rep["figures"]), rep["figures"]
    with matplotlib.rc_context(plots._RC):
        fig, _ = plots.steel_temperatures_figure(doc, result, rep["history_plot_member_indices"], rep["selection"])
        boxes, frame = _boxes(fig, _naming(fig))
        assert len(boxes) == len(rep["history_plot_member_indices"]) >= 2
        _assert_apart(boxes, frame, "panel title")
        for fig, _ in (plots.time_equivalence_figure(doc, rep["plotted_member_indices"], rep["selection"]),
                       plots.thickness_figure(doc, rep["sizing_plot_member_indices"], rep["sizing_selection"])):
            ticks = _naming(fig)
            boxes, frame = _boxes(fig, ticks)
            assert len(boxes) >= 2
            assert all(len(t.get_text()) < 40 for t in ticks)  # cut, with an ellipsis
            _assert_apart(boxes, frame, "bar label")
