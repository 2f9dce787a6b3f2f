"""The calculation record (report.html) read as the checking engineer who signs it: verdicts shown the
same way everywhere, numbers traced to the clause they come from, rounding that never contradicts a
verdict, figures numbered as they are read, the caution on every printed page, and no reference to a
value or file the record does not hold.

The pages are rendered from the bundled cases (cases/). Check values are the tool's own document values
and the layout rules of the report (common practice, no source) unless a line names another source.
"""

import copy
import json
import re
from html.parser import HTMLParser
from pathlib import Path

import pytest

import steelfire
from steelfire.outputs import document
from steelfire.outputs.files import write_outputs
from steelfire.outputs.report import html as report_html

ROOT = Path(__file__).resolve().parents[1]
CASES = ROOT / "cases"


def full_doc(stem, size=False):
    """results.json of a bundled case (without figures), as an in-process run writes it."""
    path = CASES / f"{stem}.toml"
    case = steelfire.load_case(path)
    result = steelfire.size(case, histories=False) if size else steelfire.analyse(case, histories=False)
    return document.full(result, case=case, case_path=path, command="size" if size else "check")


class Page(HTMLParser):
    """Cells keyed by data-key (text, class), table rows as lists of cell texts, figure captions, text."""

    def __init__(self):
        super().__init__(convert_charrefs=True)
        self.keyed, self.rows, self.captions, self.text = {}, [], [], []
        self._cell = None   # [attrs, parts]
        self._row = None
        self._cap = None

    def handle_starttag(self, tag, attrs):
        a = dict(attrs)
        if tag == "tr":
            self._row = []
        if tag in ("td", "th"):
            self._cell = [a, []]
        if tag == "figcaption":
            self._cap = []

    def handle_endtag(self, tag):
        if tag in ("td", "th") and self._cell is not None:
            a, parts = self._cell
            text = " ".join("".join(parts).split())
            if "data-key" in a:
                self.keyed[a["data-key"]] = {"text": text, "cls": a.get("class", "")}
            if self._row is not None:
                self._row.append(text)
            self._cell = None
        if tag == "tr" and self._row is not None:
            self.rows.append(self._row)
            self._row = None
        if tag == "figcaption" and self._cap is not None:
            self.captions.append(" ".join("".join(self._cap).split()))
            self._cap = None

    def handle_data(self, data):
        if self._cell is not None:
            self._cell[1].append(data)
        if self._cap is not None:
            self._cap.append(data)
        self.text.append(data)

    def plain(self):
        return " ".join(" ".join(self.text).split())


def parse(html):
    p = Page()
    p.feed(html)
    return p


@pytest.fixture(scope="module")
def plant_doc():
    return full_doc("plant_room")


@pytest.fixture(scope="module")
def plant_out(tmp_path_factory):
    """plant_room checked and written with its figures, as `steelfire check --out` does."""
    out = tmp_path_factory.mktemp("plant") / "out"
    path = CASES / "plant_room.toml"
    case = steelfire.load_case(path)
    write_outputs(steelfire.analyse(case), out, path, command="check", case=case)
    return {"out": out, "html": (out / "report.html").read_text("utf-8"),
            "doc": json.loads((out / "results.json").read_text("utf-8"))}


def test_annex_f_factors_cite_the_tables_the_code_values_cite(plant_doc):
    # EN 1991-1-2 Annex F (from memory): Table F.1 is the correction factor k_c (protected steel 1.0,
    # unprotected steel 13.7 O), Table F.2 the conversion factor k_b by band of b (0.04 / 0.055 / 0.07).
    # The code-value list of the same page says so (annex_f_kb_* Table F.2, annex_f_kc_* Table F.1).
    ctx = report_html.context(plant_doc)
    src = {r["symbol"]: r["source"] for r in ctx["equivalence"]["annex_f"]["rows"]}
    assert src[report_html.symbol_html("k_b")] == "Table F.2"
    assert src[report_html.symbol_html("k_c")] == "Table F.1"
    clauses = {r["name"]: r["clause"] for r in ctx["codes"]["rows"]}
    assert "Table F.2" in clauses["annex_f_kb_low_inertia"] and "Table F.1" in clauses["annex_f_kc_protected_steel"]


def test_model_difference_row_says_which_peak_is_subtracted():
    # office_bay B3-01: verdict on eq (4.27) (verdict_model lumped); the row's value is lumped - conduction
    # (steelfire.chain.protected: model_difference_C = lumped_peak - conduction); hand calculation:
    # 248.7 - 219.4 = +29.3 C, so the label must name eq (4.27) first and the conduction peak second.
    doc = full_doc("office_bay")
    i = next(j for j, m in enumerate(doc["members"]) if m["name"] == "B3-01")
    m = doc["members"][i]
    assert m["verdict_model"] == "lumped"
    assert m["model_difference_C"] == pytest.approx(m["peak_steel_temperature_C"] - m["conduction_peak_C"], abs=0.02)
    page = parse(report_html.render_report(doc))
    row = next(r for r in page.rows if r and r[0].split(" minus ")[0:1] and "minus" in r[0] and "peak" in r[0])
    first, second = row[0].split(" minus ", 1)
    assert "4.27" in first and "conduction" in second, row[0]
    # and the verdict's model is named beside the two peaks
    assert page.keyed[f"members.{i}.verdict_model"]["text"] == "eq (4.27)"


def test_marginal_flag_is_never_shown_in_the_pass_colour(plant_doc):
    # plant_room RB-01: margin 0.2 C below the half-step error 0.3 C: marginal (EN 1993-1-2 verdict not
    # established); RB-02 and RC-01 are not marginal.
    page = parse(report_html.render_report(plant_doc))
    names = [m["name"] for m in plant_doc["members"]]
    rb01 = page.keyed[f"members.{names.index('RB-01')}.marginal"]
    assert rb01["text"] == "MARGINAL" and "bad" in rb01["cls"].split() and "ok" not in rb01["cls"].split()
    rc01 = page.keyed[f"members.{names.index('RC-01')}.marginal"]
    assert rc01["text"] == "no" and "bad" not in rc01["cls"].split()
    assert page.keyed[f"members.{names.index('RB-01')}.passes"]["text"] == "marginal"


def test_figures_are_numbered_in_the_order_they_are_read(plant_out):
    nums = [int(n) for n in re.findall(r'<figure id="figure-(\d+)"', plant_out["html"])]
    assert len(nums) >= 4
    assert nums == list(range(1, len(nums) + 1)), nums
    capnums = [int(n) for n in re.findall(r"Figure (\d+)\.", " ".join(parse(plant_out["html"]).captions))]
    assert capnums == nums


def _number(text):
    return float(text.replace("\u2212", "-"))


@pytest.mark.parametrize("delta, passes", [(-0.04, True), (+0.04, False)])
def test_rounding_never_shows_a_peak_equal_to_its_critical_beside_a_verdict(plant_doc, delta, passes):
    # RC-01 of plant_room moved to 0.04 C below (pass) or above (fail) its critical temperature, with a
    # half-step error smaller than that (not marginal): hand calculation, 549.96 rounds to 550.0 at one decimal.
    doc = copy.deepcopy(plant_doc)
    i = next(j for j, m in enumerate(doc["members"]) if m["name"] == "RC-01")
    m = doc["members"][i]
    crit = m["critical_temperature_C"]
    m.update(peak_steel_temperature_C=round(crit + delta, 6), margin_C=round(-delta, 6), passes=passes,
             marginal=False, step_sensitivity_C=0.01)
    page = parse(report_html.render_report(doc))
    peak = _number(page.keyed[f"members.{i}.peak_steel_temperature_C"]["text"])
    shown_crit = _number(page.keyed[f"members.{i}.critical_temperature_C"]["text"])
    margin = page.keyed[f"members.{i}.margin_C"]["text"]
    verdict = page.keyed[f"members.{i}.passes"]["text"]
    assert verdict == ("pass" if passes else "FAIL")
    assert (peak < shown_crit) if passes else (peak > shown_crit), (peak, shown_crit, verdict)
    assert _number(margin) != 0.0 and (_number(margin) > 0) == passes, margin


def test_rounding_never_shows_a_time_equal_to_its_period_beside_short(plant_doc):
    # RC-01 required 15 min; its standard-fire time moved to 14.96 min (short): hand calculation, 14.96
    # rounds to 15.0 at one decimal, which beside "15 ... SHORT" contradicts the verdict.
    doc = copy.deepcopy(plant_doc)
    i = next(j for j, m in enumerate(doc["members"]) if m["name"] == "RC-01")
    m = doc["members"][i]
    m.update(standard_fire_time_to_critical_min=m["required_minutes"] - 0.04, meets_required_period=False,
             marginal=False, step_sensitivity_min=0.01)
    page = parse(report_html.render_report(doc))
    assert page.keyed[f"members.{i}.meets_required_period"]["text"] == "SHORT"
    shown = [r for r in page.rows if r and r[0] == "RC-01"]   # verdict table and time-equivalence table
    times = [_number(x) for r in shown for x in r if re.fullmatch(r"14\.9\d*|15\.0*", x)]
    assert len(times) == 2 and all(t < m["required_minutes"] for t in times), shown


def test_every_printed_page_carries_the_caution(plant_out):
    # the page footer (@page @bottom-left) holds the caution, so a page read alone still carries it
    css = re.search(r"@bottom-left \{ content: (\"[^\"]*\");", plant_out["html"]).group(1)
    text = re.sub(r"\\([0-9a-f]{6})", lambda g: chr(int(g.group(1), 16)), css)
    assert "competent fire engineer" in text and "local codes prevail" in text


def test_files_the_record_names_are_written_and_hold_what_it_says(tmp_path):
    # plant_room written without steel histories (--no-histories): histories.csv then holds the gas only
    path = CASES / "plant_room.toml"
    case = steelfire.load_case(path)
    out = tmp_path / "out"
    write_outputs(steelfire.analyse(case, histories=False), out, path, command="check", case=case)
    html = (out / "report.html").read_text("utf-8")
    plain = parse(html).plain()
    for name in set(re.findall(r"\b([a-z_]+\.(?:csv|json|xlsx|png|svg))\b", plain)):
        assert (out / name).exists(), name
    header = (out / "histories.csv").read_text("utf-8").splitlines()[0]
    assert header == "time_min,gas_C"
    assert "temperature histories" not in plain or "gas temperature only" in plain
    assert "analyse(case" not in plain   # a CLI user is told the option, not a Python call


def test_sizing_table_uses_the_members_verdict_words():
    # archive_room size: T1-HANGER cannot be sized (the design-fire peak exceeds its critical at any thickness)
    # and meets its period: its proposed design fails the design fire, as the verdict table says (FAIL), it is
    # not short of its period.
    doc = full_doc("archive_room", size=True)
    i = next(j for j, m in enumerate(doc["members"]) if m["name"] == "T1-HANGER")
    m = doc["members"][i]
    assert m["passes"] is False and m["meets_required_period"] is True
    page = parse(report_html.render_report(doc))
    assert page.keyed[f"members.{i}.passes"]["text"] == "FAIL"
    row = next(r for r in page.rows if r[:3] == ["T1-HANGER", "board-a", "60"])   # the sizing table's row
    assert row[-1] == "FAIL", row


@pytest.fixture(scope="module")
def sample_out(tmp_path_factory):
    from steelfire.cli import main

    out = tmp_path_factory.mktemp("sample") / "out"
    code = main(["sample", str(CASES / "office_variability.toml"), "--fires", "40", "--out", str(out)])
    assert code in (0, 1)
    return out


def test_sample_record_says_what_it_holds(sample_out):
    # the record of `steelfire sample` shows the nominal check; it must say so and where the sampled
    # statistics are (the files written beside it), or show them
    html = (sample_out / "report.html").read_text("utf-8")
    plain = parse(html).plain()
    assert "nominal" in plain and "sampl" in plain.lower()
    shown = "Sampled fire severity" in plain
    if not shown:
        assert "variability_members.csv" in plain
    for name in re.findall(r"\b(variability_[a-z]+\.csv)\b", plain):
        assert (sample_out / name).exists(), name


def test_sampled_statistics_are_shown_where_the_document_holds_them(plant_doc):
    # office_variability sampled (40 fires): with the document's variability section the record shows each
    # member's exceedance probability keyed to it
    from steelfire.chain import sampling

    case = steelfire.load_case(CASES / "office_variability.toml")
    doc = full_doc("office_variability")
    doc["run"]["command"] = "sample"
    doc["variability"] = sampling.run(case, fires=40, seed=1, progress=False).to_dict()
    page = parse(report_html.render_report(doc))
    assert "Sampled fire severity" in page.plain()
    for i, m in enumerate(doc["variability"]["members"]):
        c = page.keyed[f"variability.members.{i}.exceedance_probability"]
        assert float(c["text"]) == pytest.approx(m["exceedance_probability"], rel=1e-3, abs=1e-4)


# ---- the same rules in the terminal summary and the sample record ----------------------------------

@pytest.mark.parametrize("delta, passes", [(-0.04, True), (+0.04, False)])
def test_terminal_never_shows_a_peak_equal_to_its_critical_beside_a_verdict(plant_doc, delta, passes):
    # as the report test above, for the terminal's member table and its list of members that fail
    # (hand calculation: 549.96 and 550.04 both round to 550.0 at one decimal)
    from steelfire.outputs import terminal

    doc = copy.deepcopy(plant_doc)
    m = next(m for m in doc["members"] if m["name"] == "RC-01")
    crit = m["critical_temperature_C"]
    m.update(peak_steel_temperature_C=round(crit + delta, 6), margin_C=round(-delta, 6), passes=passes,
             marginal=False, step_sensitivity_C=0.01)
    text = terminal.render(doc, wide=True)
    row = next(line.split() for line in text.splitlines() if line.startswith("RC-01"))
    nums = [x for x in row if re.fullmatch(r"[+-]?\d+\.\d+", x)]
    shown_crit, peak, margin = float(nums[-4]), float(nums[-3]), float(nums[-1])
    assert (peak < shown_crit) if passes else (peak > shown_crit), row
    assert margin != 0.0 and (margin > 0) == passes, row
    if not passes:   # the reason the summary gives (terminal and report)
        from steelfire.outputs import present

        why = " ".join(w for name, ws in present.shortfalls(doc) if name == "RC-01" for w in ws)
        a, b = re.search(r"peak steel ([\d.]+) C exceeds the critical ([\d.]+) C", why).groups()
        assert float(a) > float(b), why


def test_terminal_sizing_table_uses_the_members_verdict_words():
    # archive_room size, T1-HANGER (see the report test above): the terminal's proposed design says FAIL, and
    # a design fire no supplied thickness meets is "none meets", not "n/a"
    from steelfire.outputs import terminal

    doc = full_doc("archive_room", size=True)
    text = terminal.render(doc, sizing=True, wide=True)
    rows = [line.split() for line in text.splitlines() if line.startswith("T1-HANGER")]
    sizing_row = next(r for r in rows if "none" in r or "meets" in r or "FAIL" in r[-1:])
    assert sizing_row[-1] == "FAIL", sizing_row
    assert "n/a" not in sizing_row


def test_sample_record_holds_the_sampled_statistics(sample_out):
    # `steelfire sample --out`: results.json carries the variability section and the record shows it, each
    # interval with its ends rounded outward (never inside the exact Clopper-Pearson interval)
    doc = json.loads((sample_out / "results.json").read_text("utf-8"))
    v = doc["variability"]
    page = parse((sample_out / "report.html").read_text("utf-8"))
    assert "Sampled fire severity" in page.plain()
    for i, m in enumerate(v["members"]):
        lo, hi = m["exceedance_interval"]
        a, b = (float(x) for x in page.keyed[f"variability.members.{i}.exceedance_interval"]["text"].split(" - "))
        assert a <= lo and b >= hi, (a, b, lo, hi)


def test_sample_terminal_summary_shows_the_warnings_and_uncovered_fractiles(capsys):
    # a sample run's terminal summary ends with the section's warnings, and marks a route no period covers
    from steelfire.outputs.terminal import sample_summary

    section = {"fires": 50, "method": "random", "seed": 1, "out_of_scope_fires": 0, "target_fractile": 0.9,
               "warnings": ["The 0.99 fractile of 50 fires is the largest sampled value."],
               "members": [{"name": "B1", "exceedance_interval": [0.0123456, 0.0333331],
                            "exceedance_probability": 0.02,
                            "period_covering_fractile": {"annex_f": "R60", "cib_w14": None, "equal_temperature": None},
                            "no_period_covers_fractile": {"annex_f": False, "cib_w14": None,
                                                          "equal_temperature": True}}]}
    text = sample_summary(section)
    assert "equal_temperature: none up to R240" in text and "cib_w14: -" in text
    assert "[0.0123, 0.0334]" in text          # outward: 0.0123456 down, 0.0333331 up (hand calculation)
    assert text.splitlines()[-1] == "warning: The 0.99 fractile of 50 fires is the largest sampled value."


def test_sample_record_shows_the_error_band_and_the_probability_with_it(sample_out):
    # the sampled peaks' numerical error per member, the fires within it of the critical temperature and the
    # probability with them counted as exceeding, each keyed to the document; interval ends rounded outward
    doc = json.loads((sample_out / "results.json").read_text("utf-8"))
    page = parse((sample_out / "report.html").read_text("utf-8"))
    for i, m in enumerate(doc["variability"]["members"]):
        k = f"variability.members.{i}."
        assert float(page.keyed[k + "error_band_C"]["text"]) == pytest.approx(m["error_band_C"], abs=0.05)
        assert int(page.keyed[k + "near_critical_fires"]["text"]) == m["near_critical_fires"]
        lo, hi = m["exceedance_interval_with_band"]
        a, b = (float(x) for x in page.keyed[k + "exceedance_interval_with_band"]["text"].split(" - "))
        assert a <= lo and b >= hi
        assert page.keyed[k + "exceeds_target_probability"]["text"] == ("ABOVE" if m["exceeds_target_probability"]
                                                                        else "below")


def test_sample_terminal_names_its_tables_and_the_sampled_sizing(tmp_path, capsys):
    # `sample --size`: the heading names the command and says the deterministic tables hold the proposed
    # thicknesses; the least thickness for target_probability (or why none) is printed per member, not only in
    # the JSON (newcomer's read of README "sample"); every line within the 100 columns the README promises
    from steelfire.cli import main

    code = main(["sample", str(CASES / "office_variability.toml"), "--fires", "60", "--size"])
    out = capsys.readouterr().out
    assert code in (0, 1)
    assert out.startswith("steelfire sample: ")
    assert "deterministic sizing of the case" in out and "Members at the chosen (proposed) thicknesses" in out
    block = out[out.index("Least supplied thickness for target_probability"):]
    for name in ("B3-01", "B3-02", "C3-A1", "B3-07 edge"):
        assert any(line.strip().startswith(name) for line in block.splitlines()), name
    assert max(len(line) for line in out.splitlines()) <= 100
