"""The report as a calculation record (steelfire.outputs.report): title block, running header and page
numbers, numbers rounded for reading yet traceable to results.json, the data-driven design-fire
section, per-member traceability, the sizing comparison, grouped warnings, escaping, and office_bay
printed by headless Chromium to at most 8 A4 pages.

Each numeric element of the page carries the JSON path of its exact value (``data-key``); the tests
hold the shown number against that value within the precision shown. Check values are the tool's own
document values and the layout rules of the report (common practice, no source) unless a line says
otherwise.
"""

import copy
import json
import re
import shutil
import subprocess
import sys
from html import escape, unescape
from html.parser import HTMLParser
from pathlib import Path

import pytest

import steelfire
from steelfire.outputs import document, present
from steelfire.outputs.files import write_outputs
from steelfire.outputs.report import html as report_html
from steelfire.outputs.report import plots

ROOT = Path(__file__).resolve().parents[1]
CASES = ROOT / "cases"
DASH = "\u2014"


def full_doc(stem, size=False, path=None):
    """results.json of a bundled case (without figures): document.full of an in-process run."""
    path = path or CASES / f"{stem}.toml"
    case = steelfire.load_case(path)
    result = steelfire.size(case, histories=False) if size else steelfire.analyse(case, histories=False)
    return document.full(result, case=case, case_path=path, command="size" if size else "check")


@pytest.fixture(scope="module")
def office_bay_out(tmp_path_factory):
    """office_bay sized and written (results.json, figures, report.html), as the CLI's size --out does."""
    out = tmp_path_factory.mktemp("office_bay") / "out"
    path = CASES / "office_bay.toml"
    case = steelfire.load_case(path)
    result = steelfire.size(case)
    write_outputs(result, out, path, command="size", case=case)
    return {"out": out, "doc": json.loads((out / "results.json").read_text("utf-8")),
            "html": (out / "report.html").read_text("utf-8")}


@pytest.fixture(scope="module")
def sized_doc():
    return full_doc("office_bay", size=True)


class Page(HTMLParser):
    """Keyed elements (td/span with data-key), list items, style text and plain text of a report page."""

    def __init__(self):
        super().__init__(convert_charrefs=True)
        self.keyed, self.items, self.style, self.text, self.tags = [], [], [], [], []
        self._open = []  # [tag, attrs, text parts]
        self._li = None
        self._in_style = False

    def handle_starttag(self, tag, attrs):
        a = dict(attrs)
        self.tags.append(tag)
        if tag == "style":
            self._in_style = True
        if tag in ("td", "span") and "data-key" in a:
            self._open.append([tag, a, []])
        if tag == "li":
            self._li = []

    def handle_endtag(self, tag):
        if tag == "style":
            self._in_style = False
        if self._open and tag == self._open[-1][0]:
            t, a, parts = self._open.pop()
            self.keyed.append({"tag": t, "key": a["data-key"], "cls": (a.get("class") or "").split(),
                               "text": "".join(parts).strip()})
        if tag == "li" and self._li is not None:
            self.items.append(" ".join("".join(self._li).split()))
            self._li = None

    def handle_data(self, data):
        if self._in_style:
            self.style.append(data)
            return
        self.text.append(data)
        for o in self._open:
            o[2].append(data)
        if self._li is not None:
            self._li.append(data)


def parse(page):
    p = Page()
    p.feed(page)
    p.close()
    return p


def lookup(doc, key):
    v = doc
    for part in key.split("."):
        v = v[int(part)] if isinstance(v, list) else v[part]
    return v


def check_numbers(page, doc):
    """Every keyed number shows the value at its key, rounded as the report rounds (within the shown
    precision; a needed thickness rounded up, never below its value); temperatures, times and member
    thicknesses to 0.1; derived factors to at most 4 significant figures. Returns the keyed elements."""
    p = parse(page)
    nums = [k for k in p.keyed if "num" in k["cls"]]
    for k in nums:
        v = lookup(doc, k["key"])
        text = k["text"].rstrip("*")
        if "gt" in k["cls"]:
            assert text == "> " + present.fmt(v, "input"), k
            continue
        if v is None:
            assert text in (DASH, "n/a", "none meets", "none", "not given"), k
            continue
        assert not isinstance(v, bool), k
        if isinstance(v, int):
            assert text == str(v), k
            continue
        shown = float(text)
        if k["key"].endswith(("sizing.standard_period_mm", "sizing.burnout_mm")):
            assert v - 1e-9 <= shown <= v + 0.1 + 1e-9, k
            continue
        assert abs(shown - v) <= present.precision(text, "factor") + 1e-12 * abs(v), (k, v)
        kind = present.kind_of(k["key"])
        leaf = k["key"].rsplit(".", 1)[-1]
        derived = k["key"].startswith("members.") or k["key"].startswith("fire.")
        if derived and kind in ("temperature", "time") and leaf not in ("duration_min",):
            assert re.fullmatch(r"-?\d+\.\d", text), k
        elif k["key"].startswith("fire.") and kind == "factor":
            digits = text.lstrip("-").replace(".", "").lstrip("0")
            assert len(digits) <= 4 or float(text) == int(float(text)), k
    return p, nums


# ----------------------------------------------------------------------------------------------
# the record


def test_title_block_running_header_and_page_numbers(office_bay_out):
    page, doc = office_bay_out["html"], office_bay_out["doc"]
    p = parse(page)
    style = "".join(p.style)
    assert "@page" in style and "size: A4" in style
    assert 'counter(page)' in style and 'counter(pages)' in style
    assert re.search(r"@top-left\s*\{\s*content:\s*\"", style)
    run = doc["run"]
    for value in (run["steelfire_version"], run["utc"], run["case_file"], run["case_sha256"]):
        assert value in page
    assert "Structural fire calculation record" in page
    for label in ("project", "job number", "revision", "date", "prepared by", "checked by"):
        assert f'<span class="cap">{label}</span>' in page
    assert "signature and date" in page
    assert "<h1>Office bay 3F-East, glazed open plan (demo)</h1>" in page


def test_record_fields_shown_and_header_strings_escaped(tmp_path):
    text = (CASES / "office_bay.toml").read_text("utf-8")
    title = 'Bay "7" </style><script>alert(1)</script> \\ & <b>x</b>'
    rec = ('[record]\nproject = "P <i>1</i>"\njob_number = "J-42 </style>"\nrevision = "C\\u00e9"\n'
           'prepared_by = "A. N. Engineer"\nchecked_by = "O\'Checker & Co"\ndate = "2026-12-01"\n'
           'notes = "Line one\\nline two <u>"\n')
    text = re.sub(r'^title = ".*"$', lambda m: "title = " + json.dumps(title) + "\n" + rec, text, count=1, flags=re.M)
    text = text.replace('name = "B3-01"', 'name = "B3<01> & \\"q\\""')
    path = tmp_path / "hostile.toml"
    path.write_text(text, encoding="utf-8")
    doc = full_doc(None, size=False, path=path)
    page = report_html.render_report(doc)
    p = parse(page)
    assert "script" not in p.tags and "<b>x</b>" not in page and "<i>1</i>" not in page and "<u>" not in page
    assert "<B01>" not in page and "B3<01>" not in page and "<script>" not in page
    text = unescape(page)  # every case text is there, escaped
    for v in (title, 'B3<01> & "q"', "A. N. Engineer", "O'Checker & Co", "2026-12-01", "C\u00e9", "P <i>1</i>",
              "Line one\nline two <u>"):
        assert v in text, v
    assert "<h1>" + escape(title, quote=False) in page.replace("&#34;", '"').replace("&quot;", '"')
    # the style element is closed once only, and the header strings hold no raw quote or angle bracket
    assert page.count("</style") == 1
    style = "".join(p.style)
    for box in ("top-left", "top-right", "bottom-left"):
        m = re.search(rf"@{box}\s*\{{\s*content:\s*(\"[^\"]*\");", style)
        assert m, box
        assert re.fullmatch(r'"(?:[A-Za-z0-9.,:;\-_/()+#=\[\]]|\\[0-9a-f]{6})*"', m.group(1)), m.group(1)
    assert report_html.css_string('a "</style>') == '"a\\000020\\000022\\00003c/style\\00003e"'
    assert "job\\000020J-42" in style


def test_every_number_traceable_and_rounded(office_bay_out):
    page, doc = office_bay_out["html"], office_bay_out["doc"]
    p, nums = check_numbers(page, doc)
    assert len(nums) > 150  # the report is mostly numbers: the check must not be vacuous
    # the document holds 0.0870253 (O) and 1429.17 (b): shown as 0.08703 and 1429 (hand calculation:
    # 4 significant figures); the exact values stay in results.json only
    assert doc["fire"]["opening_factor_m05"] == 0.0870253 and doc["fire"]["thermal_inertia"] == 1429.17
    visible = "".join(p.text)
    assert "0.0870253" not in visible and "1429.17" not in visible
    assert any(k["key"] == "fire.opening_factor_m05" and k["text"] == "0.08703" for k in nums)
    assert any(k["key"] == "fire.thermal_inertia" and k["text"] == "1429" for k in nums)
    # every factor of the equivalence routes is shown, whatever its key (the conversion factor of CIB W14)
    for route in ("annex_f_protected", "cib_w14"):
        obj = doc["fire"]["equivalence_factors"][route]
        keys = {k["key"] for k in p.keyed}
        for key, v in obj.items():
            if isinstance(v, (int, float)) and not isinstance(v, bool) and not key.endswith("_raw"):
                assert f"fire.equivalence_factors.{route}.{key}" in keys, (route, key)


@pytest.mark.parametrize("stem", ["archive_room", "plant_room", "retail_measured", "warehouse_standard",
                                  "atrium_localised", "open_office_travelling"])
def test_other_cases_render_with_traceable_numbers(stem):
    doc = full_doc(stem)
    page = report_html.render_report(doc)
    check_numbers(page, doc)
    assert f"<h2><span class=\"no\">2</span>Design fire: {doc['fire']['curve']}</h2>" in page


# ----------------------------------------------------------------------------------------------
# the design fire, driven by the document


def test_design_fire_section_shows_the_fire_rows_of_any_model(sized_doc):
    doc = copy.deepcopy(sized_doc)
    keys = {k["key"] for k in parse(report_html.render_report(doc)).keyed}
    for r in doc["fire_rows"]:
        if doc["fire"].get(r["key"]) is not None:
            assert "fire." + r["key"] in keys, r["key"]
    # a model the report has never seen: its rows show with their label, symbol, unit and clause
    doc["fire"]["curve"] = "imaginary"
    doc["fire"]["plume_reach_m"] = 3.14159
    doc["fire"]["ember_temperature_C"] = 812.345
    doc["fire_rows"] = [
        {"key": "plume_reach_m", "label": "reach of the imaginary plume", "symbol": "L_pl", "unit": "m",
         "clause": "Imaginary Code eq (9.9)"},
        {"key": "ember_temperature_C", "label": "ember temperature", "symbol": "theta_e", "unit": "C",
         "clause": "Imaginary Code 9.10"}]
    page = report_html.render_report(doc)
    for s in ("reach of the imaginary plume", "L<sub>pl</sub>", "Imaginary Code eq (9.9)", "ember temperature",
              "\u03b8<sub>e</sub>", "Design fire: imaginary"):
        assert s in page, s
    nums = {k["key"]: k["text"] for k in parse(page).keyed}
    assert nums["fire.plume_reach_m"] == "3.142"       # hand calculation: 4 significant figures
    assert nums["fire.ember_temperature_C"] == "812.3"  # temperatures to 0.1 C
    assert "Annex A scope" not in page and "Scope of Annex A" not in page


# ----------------------------------------------------------------------------------------------
# members: traceability, materials


def test_traceability_rendered_where_present(sized_doc):
    doc = copy.deepcopy(sized_doc)
    ms = doc["members"]
    ms[0]["conduction_peak_C"] = 262.48
    ms[0]["model_difference_C"] = 4.74
    ms[0]["lumped_valid"] = True
    ms[0]["step_sensitivity_C"] = 0.31
    ms[0]["marginal"] = False
    ms[1]["details"] = {"phi": 0.316, "moisture_delay_min": 1.234, "shadow_factor": 0.8123,
                        "shadow_factor_formula": "eq (4.26b)", "specific_heat_at_peak_J_kgK": 528.0,
                        "conductivity_W_mK": 0.01813, "notes": ["a note <on> the member"]}
    ms[1]["section"], ms[1]["exposure"], ms[1]["encasement"] = None, None, None
    page = report_html.render_report(doc)
    p, nums = check_numbers(page, doc)
    keys = {k["key"]: k["text"] for k in p.keyed}
    assert keys["members.0.conduction_peak_C"] == "262.5" and keys["members.0.model_difference_C"] == "4.7"
    assert keys["members.0.lumped_valid"] == "yes" and keys["members.0.marginal"] == "no"
    assert keys["members.1.details.moisture_delay_min"] == "1.2"
    assert keys["members.1.details.shadow_factor"] == "0.8123"
    assert "eq (4.26b)" in page and "a note <on> the member" in unescape(page) and "<on>" not in page
    assert keys["members.2.section"] == "HEB 260" and keys["members.2.exposure"] == "4-sided"
    assert keys["members.1.section"] == DASH
    for label in ("conduction model check", "peak steel by the conduction model", "member resistance in fire",
                  "non-dimensional slenderness at the critical temperature", "steel grade"):
        assert label in page, label
    assert keys["members.2.resistance.steel_grade"] == "S355"
    # the utilisation curve (two lists of numbers) is not a table row
    assert not any("utilisation_curve" in k for k in keys)


def test_no_traceability_section_without_the_keys(sized_doc):
    doc = copy.deepcopy(sized_doc)
    for m in doc["members"]:
        for k in ("section", "exposure", "encasement", "details", "resistance", "conduction_peak_C",
                  "model_difference_C", "lumped_valid", "verdict_model", "step_sensitivity_C", "step_sensitivity_min",
                  "marginal"):
            m.pop(k, None)
    page = report_html.render_report(doc)
    assert "Per member: intermediate values" not in page
    assert "<th>section</th>" not in page and "<th>exposure</th>" not in page
    check_numbers(page, doc)


def test_only_the_materials_the_case_uses(sized_doc):
    page = report_html.render_report(sized_doc)
    names = [m["name"] for m in sized_doc["inputs"]["materials"]]
    used = sorted({m["protection"] for m in sized_doc["members"] if m["protection"]})
    assert sorted(names) == used
    shown = sorted(k["text"] for k in parse(page).keyed if re.fullmatch(r"inputs\.materials\.\d+\.name", k["key"]))
    assert shown == used


# ----------------------------------------------------------------------------------------------
# sizing


def test_sizing_section_specified_against_proposed(sized_doc):
    page = report_html.render_report(sized_doc)
    for s in ("Protection sizing", "specified [mm]", "needed, standard period [mm]", "needed, design fire [mm]",
              "chosen [mm]", "change [mm]", "specified design", "proposed design", "Specified design",
              "Proposed design"):
        assert s in page, s
    assert "iterations" not in page and "bisection steps" not in page  # no developer columns
    doc = copy.deepcopy(sized_doc)
    s = doc["members"][0]["sizing"]
    # the specified design as the document would hold it at 10 mm: below the thickness the standard
    # period needs, so the check at the specified thickness fails
    assert s["standard_period_mm"] > 10.0
    s[("specified_mm" if "specified_mm" in s else "given_mm")] = 10.0
    s["specified_ok"] = False
    page = report_html.render_report(doc)
    assert "3 of 4 members pass the design fire and meet their required period at the specified thicknesses" in page
    p = parse(page)
    short = [i for i in p.items if i.startswith("B3-01:")]
    need = present.ceiling(s["standard_period_mm"])  # rounded up to 0.1 mm
    assert short and f"specified 10 mm is below the {need} mm needed for the standard period" in short[0]
    assert '<td class="flag bad">SHORT</td>' in page
    assert f"{s['chosen_mm'] - 10.0:+.1f}" in page  # hand calculation: chosen - 10 mm


# ----------------------------------------------------------------------------------------------
# warnings and cautions


def test_warnings_grouped_and_deduplicated():
    doc = full_doc("office_floor")
    per_member = [w for w in doc["warnings"] if "is assessed for the standard fire only" in w]
    assert len(per_member) >= 5
    doc["warnings"].append(doc["warnings"][0])  # an exact repeat
    page = report_html.render_report(doc)
    items = parse(page).items
    grouped = [i for i in items if "is assessed for the standard fire only" in i]
    assert len(grouped) == 1
    for w in per_member:
        assert w.split(":", 1)[0] in grouped[0]
    assert f"({len(per_member)} warnings of this kind)" in grouped[0]
    assert sum(1 for i in items if i == " ".join(doc["warnings"][0].split())) == 1
    for c in doc["cautions"]:
        assert c in unescape(page)


def test_unconservative_said_only_where_it_changes_a_conclusion():
    doc = full_doc("office_bay")
    assert all(m["equivalence"]["unconservative"] for m in doc["members"])
    page = report_html.render_report(doc)
    cells = [k for k in parse(page).keyed if ".equivalence." in k["key"] and k["text"].endswith("*")]
    assert not cells and "no verdict changes" in page
    doc = full_doc("archive_room")
    page = report_html.render_report(doc)
    marked = {k["key"] for k in parse(page).keyed if k["text"].endswith("*")}
    # archive_room: Annex F 102.68 min within R120 while the equal-temperature times exceed 120 min
    assert {f"members.{i}.equivalence.annex_f_min" for i in range(4)} <= marked
    assert "Equivalence routes that would accept what the direct check rejects" in page


# ----------------------------------------------------------------------------------------------
# the time-equivalence figure


def figure_svg(fig_cap):
    fig, _ = fig_cap
    return plots._save(fig, "time_equivalence", "").svg


def legend_texts(svg):
    return [" ".join(t.split()) for t in re.findall(r"<text[^>]*>([^<]*)</text>", svg)]


def test_time_equivalence_figure_shows_every_route_and_na():
    import matplotlib

    doc = full_doc("office_floor")  # protected and bare members: CIB W14 is n/a for the bare ones
    idx, note = plots.select_members(doc)
    assert any(doc["members"][i]["protection"] is None for i in idx)
    with matplotlib.rc_context(plots._RC):
        svg = figure_svg(plots.time_equivalence_figure(doc, idx, note))
    texts = " | ".join(legend_texts(svg))
    for label in ("EN 1991-1-2 Annex F, eq (F.1)", "CIB W14", "equal steel temperature (direct)", "required period",
                  "route not applicable to the member"):
        assert label in texts, label
    doc = full_doc("plant_room")  # 24 m2: Annex F's eq (F.3) small-compartment route applies
    idx, note = plots.select_members(doc)
    with matplotlib.rc_context(plots._RC):
        fig_cap = plots.time_equivalence_figure(doc, idx, note)
        svg = figure_svg(fig_cap)
    texts = " | ".join(legend_texts(svg))
    assert "Annex F, small compartment eq (F.3)" in texts and "unconservative here" in texts
    assert "CIB W14" not in texts  # every member bare: the route is absent, not drawn as n/a bars
    assert "Annex F, small compartment eq (F.3)" in fig_cap[1]


# ----------------------------------------------------------------------------------------------
# lazy imports


def test_jinja2_only_when_a_report_is_written():
    code = ("import sys, io, contextlib, steelfire, steelfire.outputs.report.html, steelfire.outputs.terminal\n"
            "from steelfire.cli import main\n"
            "raw = io.BytesIO(); out = io.TextIOWrapper(raw)\n"
            "with contextlib.redirect_stdout(out):\n"
            "    main(['check', 'cases/warehouse_standard.toml', '--json'])\n"
            "assert 'jinja2' not in sys.modules, 'jinja2 imported'\n")
    r = subprocess.run([sys.executable, "-c", code], cwd=ROOT, capture_output=True, text=True)
    assert r.returncode == 0, r.stderr


# ----------------------------------------------------------------------------------------------
# printed: headless Chromium


def chromium():
    return shutil.which("chromium") or shutil.which("chromium-browser")


@pytest.mark.skipif(not chromium() or not shutil.which("pdfinfo") or not shutil.which("pdftotext"),
                    reason="needs the Debian chromium and poppler-utils packages")
def test_office_bay_prints_to_at_most_8_numbered_pages(office_bay_out, tmp_path):
    pdf = tmp_path / "report.pdf"
    cmd = [chromium(), "--headless", "--no-sandbox", "--disable-gpu", "--no-first-run",
           "--disable-background-networking", "--disable-component-update", "--disable-sync",
           f"--user-data-dir={tmp_path / 'profile'}", "--no-pdf-header-footer", f"--print-to-pdf={pdf}",
           (office_bay_out["out"] / "report.html").as_uri()]
    subprocess.run(cmd, capture_output=True, timeout=180, check=False)
    assert pdf.is_file() and pdf.stat().st_size > 10_000
    info = subprocess.run(["pdfinfo", str(pdf)], capture_output=True, text=True).stdout
    pages = int(re.search(r"^Pages:\s+(\d+)", info, re.M).group(1))
    assert 1 <= pages <= 8  # the acceptance limit for office_bay
    texts = []
    for n in range(1, pages + 1):
        t = subprocess.run(["pdftotext", "-f", str(n), "-l", str(n), "-layout", str(pdf), "-"],
                           capture_output=True, text=True).stdout
        texts.append(t)
        assert f"page {n} of {pages}" in t, n               # the page number box on every page
        assert "Office bay 3F-East" in t, n                 # the running header on every page
        assert "SHA-256 " + office_bay_out["doc"]["run"]["case_sha256"][:12] in t, n
    assert "STRUCTURALFIRECALCULATIONRECORD" in texts[0].upper().replace(" ", "")  # letter-spaced
    # the cautions share their page with the warnings and more: never alone on a near-empty page
    last = next(t for t in texts if "Limits of this calculation" in t)
    assert "Warnings and cautions" in last
    assert len([x for x in last.splitlines() if x.strip()]) >= 15
    for t in texts:
        assert len([x for x in t.splitlines() if x.strip()]) >= 8  # no near-empty page
