"""The examples of README.md, DEVELOPERS.md and docs/*.md, tried as a newcomer types them.

The check values here come from the documents' own text (file and the words quoted beside each), from a
hand calculation written out, or from scipy. The last three hold places where the outputs disagreed with
what the documents and the other outputs say (the report's peak at the fractile, the specified design's
verdict word, the least thickness for the period above a chosen one that meets it).
"""

from __future__ import annotations

import argparse
import csv
import json
import re
import types
from pathlib import Path

import numpy as np
import pytest
from scipy import stats

import cli_run
import steelfire
from steelfire import cli
from steelfire.models import variability as V

ROOT = Path(__file__).resolve().parents[1]
DOCS = (ROOT / "README.md", ROOT / "DEVELOPERS.md", ROOT / "docs" / "sampling.md", ROOT / "docs" / "conduction.md")
CASES = ROOT / "cases"


def _options(command: str) -> set:
    """The option strings the CLI's parser accepts for ``command``."""
    parser = cli._parser()
    sub = next(a for a in parser._actions if isinstance(a, argparse._SubParsersAction))
    return {o for a in sub.choices[command]._actions for o in a.option_strings}


def _fenced_lines(doc: Path):
    """(line number, text) of every line inside a fenced code block of ``doc`` (nested blocks included)."""
    inside = False
    for n, line in enumerate(doc.read_text(encoding="utf-8").splitlines(), 1):
        if line.strip().startswith("```"):
            inside = not inside
            continue
        if inside:
            yield n, line.strip()


def _steelfire_lines():
    for doc in DOCS:
        for n, text in _fenced_lines(doc):
            if text.startswith("steelfire ") and text.split()[1] in ("check", "size", "sample"):
                yield pytest.param(doc.name, n, text.split("#")[0], id=f"{doc.name}:{n}")


@pytest.mark.parametrize("doc, line, text", list(_steelfire_lines()))
def test_every_command_line_shown_uses_options_the_cli_has(doc, line, text):
    # source: the command lines of the documents themselves (usage lines and examples)
    command = text.split()[1]
    unknown = sorted(set(re.findall(r"--[a-z][a-z0-9-]*", text)) - _options(command))
    assert not unknown, f"{doc} line {line}: {command} has no option {unknown}"


def test_sampling_doc_usage_line_names_every_option():
    # source: docs/sampling.md's usage line "steelfire sample CASE.toml [...]" (and its continuation line)
    lines = [t for _, t in _fenced_lines(ROOT / "docs" / "sampling.md")]
    i = next(k for k, t in enumerate(lines) if t.startswith("steelfire sample CASE.toml"))
    shown = set(re.findall(r"--[a-z][a-z0-9-]*", lines[i] + " " + lines[i + 1]))
    assert shown == _options("sample") - {"--help", "-h"}


def test_readme_python_example_runs(tmp_path, monkeypatch):
    # source: README.md "## Python", run as written (case paths made absolute, run in an empty folder);
    # steelfire.dataframe needs pandas, which no extra installs: where it is missing the line is left out
    # and the error it gives instead must name the install command
    text = (ROOT / "README.md").read_text(encoding="utf-8")
    code = re.search(r"## Python\s+```python\n(.*?)```", text, re.S).group(1)
    code = code.replace('"cases/', f'"{CASES.as_posix()}/')
    try:
        import pandas  # noqa: F401
    except ImportError:
        with pytest.raises(ImportError, match="pip install pandas"):
            steelfire.dataframe(None)
        code = "\n".join(line for line in code.splitlines() if "steelfire.dataframe(" not in line)
    monkeypatch.chdir(tmp_path)
    scope: dict = {}
    exec(compile(code, "README.md", "exec"), scope)   # noqa: S102
    result = scope["result"]
    # README: "result.fire.time_s, result.fire.gas_temperature_C, result.members[0].steel_temperature_C   # numpy arrays"
    arrays = result.fire.time_s, result.fire.gas_temperature_C, result.members[0].steel_temperature_C
    assert all(isinstance(a, np.ndarray) and a.shape == arrays[0].shape for a in arrays)
    # README: steelfire.write_outputs(..., "out", case=thicker) writes into "out"; README "Commands": --out writes
    # results.json, members.csv, histories.csv and report.html
    written = {p.name for p in (tmp_path / "out").iterdir()}
    assert {"results.json", "members.csv", "histories.csv", "report.html"} <= written
    thicker = scope["thicker"]
    # README: case.with_member("B1-ARC-02", thickness_mm=45.0)
    assert [m for m in thicker.members if m.name == "B1-ARC-02"][0].thickness_mm == 45.0


FLAT_GAS_C = 800.0   # the toy curve of DEVELOPERS.md "Adding a fire model" (a constant 800 C curve)


def _flat_model():
    """A toy constant-gas curve as DEVELOPERS.md describes a fire model: a module with design_fire(setup)."""
    from steelfire.models.fire.design import DesignFire, convection

    def gas(time_s):
        t = np.asarray(time_s, dtype=float)
        return np.where(t > 0.0, FLAT_GAS_C, 20.0)

    def design_fire(setup):
        return DesignFire(curve=setup.curve, gas_temperature_C=gas, alpha_c=convection(setup, "alpha_c_standard"),
                          cools=False, nominal=True)

    module = types.ModuleType("flat_demo")
    module.design_fire = design_fire
    return module


def test_a_new_fire_model_needs_one_module_and_one_registry_line(tmp_path, monkeypatch):
    # source: DEVELOPERS.md "Adding a fire model": "One module and one registry line ... The JSON, the terminal,
    # the report and the plots follow without edits". The registry line is monkeypatched here; the loader's
    # list of curve names is made from the registry when steelfire.inputs.case is imported, so it follows too.
    from steelfire.inputs import case as case_module
    from steelfire.models import fire as fire_models

    monkeypatch.setitem(fire_models.MODELS, "flat_demo", _flat_model())
    monkeypatch.setattr(case_module, "CURVES", tuple(fire_models.MODELS))
    text = (CASES / "warehouse_standard.toml").read_text(encoding="utf-8")
    assert 'curve = "standard"' in text
    case = tmp_path / "flat.toml"
    case.write_text(text.replace('curve = "standard"', 'curve = "flat_demo"'), encoding="utf-8")

    r = cli_run.main("check", case, "--json")
    assert r.returncode in (0, 1), r.stderr
    doc = json.loads(r.stdout)
    # hand calculation: the curve is 800 C at every time after 0, so its peak is 800 C
    assert doc["fire"]["curve"] == "flat_demo"
    assert doc["fire"]["peak_gas_temperature_C"] == FLAT_GAS_C
    for m in doc["members"]:
        # hand reasoning: eq (4.25)/(4.27) carry heat from the gas to the steel only while the steel is cooler,
        # so no steel temperature passes the gas's 800 C
        assert 20.0 < m["peak_steel_temperature_C"] < FLAT_GAS_C

    r = cli_run.main("check", case, "--out", tmp_path / "out")
    assert r.returncode in (0, 1), r.stderr
    assert "flat_demo" in r.stdout                     # the terminal names the curve
    out = tmp_path / "out"
    assert {"report.html", "results.json", "histories.csv", "fig_design_fire.png", "fig_steel_temperatures.png"} <= {
        p.name for p in out.iterdir()}
    assert "flat_demo" in (out / "report.html").read_text(encoding="utf-8")
    with open(out / "histories.csv", newline="", encoding="utf-8") as f:
        rows = list(csv.DictReader(f))
    gas = np.array([float(row["gas_C"]) for row in rows if float(row["time_min"]) > 0.0])
    assert np.all(gas == FLAT_GAS_C)                  # hand calculation: the constant curve

    r = cli_run.main("size", case, "--json")
    assert r.returncode in (0, 1), r.stderr
    assert json.loads(r.stdout)["fire"]["curve"] == "flat_demo"


def test_sampling_doc_figures_of_what_n_fires_can_show():
    # source: docs/sampling.md "so 10,000 fires can show at best about 3.7e-4, and 368 fires are the fewest
    # that can show 0.01"; reference: scipy.stats.beta, the Clopper-Pearson upper end with no exceedance,
    # Beta^-1(0.975; 1, n) = 1 - 0.025^(1/n) (hand calculation: 1 - 0.025^(1e-4) = 3.689e-4)
    text = (ROOT / "docs" / "sampling.md").read_text(encoding="utf-8")
    assert "about 3.7e-4" in text and "368 fires" in text
    upper = stats.beta.ppf(0.975, 1, 10_000)
    assert round(upper, 5) == 3.7e-4
    assert float(V.exceedance_probability(0, 10_000).upper) == pytest.approx(upper, rel=1e-9)
    fewest = next(n for n in range(1, 1000) if stats.beta.ppf(0.975, 1, n) < 0.01)
    assert fewest == 368


def test_conduction_doc_quotes_the_office_bay_gas_peak():
    # source: docs/conduction.md "the same member in the office-bay Annex A fire ends at 690.8 C against a gas
    # peak of 642.1 C"; README "Bundled invented scenarios": office_bay is the bundled case of that fire
    assert "gas peak of\n642.1 C" in (ROOT / "docs" / "conduction.md").read_text(encoding="utf-8")
    r = cli_run.main("check", CASES / "office_bay.toml", "--json")
    assert r.returncode == 0, r.stderr
    assert round(json.loads(r.stdout)["fire"]["peak_gas_temperature_C"], 1) == 642.1


def test_developers_layout_names_files_that_exist():
    # source: DEVELOPERS.md "## Layout": every module and folder it names
    block = re.search(r"## Layout.*?```\n(.*?)```", (ROOT / "DEVELOPERS.md").read_text(encoding="utf-8"), re.S).group(1)
    names = set(re.findall(r"[A-Za-z_0-9.]+\.(?:py|j2|css|toml|csv|md)\b", block))
    files = {p.name for top in ("steelfire", "tests", "benchmarks", "docs") for p in (ROOT / top).rglob("*")}
    assert names and not sorted(names - files)


def test_report_shows_the_peak_at_the_target_fractile():
    # source: README "sample": "the fractiles of its peak"; the report's column "theta_a,max at the 0.9 fractile"
    from steelfire.outputs.report import html

    doc = {"variability": {"target_fractile": 0.9, "fires": 200, "method": "random", "seed": 1, "confidence": 0.95,
                           "members": [{"name": "B1", "exceedance_probability": 0.1, "exceedance_interval": [0.05, 0.15],
                                        "peak_steel_fractiles_C": {"0.9": 654.5}, "critical_temperature_C": 600.0,
                                        "equivalent_time_at_fractile_min": {}, "period_covering_fractile": {},
                                        "required_minutes": 60}]}}
    row = html._variability(doc, "sample")["rows"][0]
    assert "654" in row[3]["text"]   # the value put in above


def test_size_table_names_a_failing_specified_design_fail():
    # source: `steelfire check cases/office_variability.toml` (the specified design) gives B3-07 edge FAIL in the
    # design fire (peak 603.4 C > critical 601.4 C) and "meets" for its period; README "size": "the verdicts of the
    # specified and the proposed designs", in the verdict tables' words
    check = json.loads(cli_run.main("check", CASES / "office_variability.toml", "--json").stdout)
    b307 = [m for m in check["members"] if m["name"] == "B3-07 edge"][0]
    assert b307["passes"] is False and b307["meets_required_period"] is True
    r = cli_run.main("size", CASES / "office_variability.toml")
    table = r.stdout[r.stdout.index("Protection sizing"):]
    row = next(line for line in table.splitlines() if line.startswith("B3-07 edge"))
    assert row.split()[-2] == "FAIL"   # the specified design's word; the last is the proposed design's


def test_least_thickness_for_the_period_is_not_above_the_chosen_one():
    # source: README "size": "the least thickness per protected member for its standard period ... the least
    # supplied thickness that passes both": a chosen thickness that meets the period bounds the least one
    doc = json.loads(cli_run.main("size", CASES / "office_floor.toml", "--json").stdout)
    over = [(m["name"], m["sizing"]["standard_period_mm"], m["sizing"]["chosen_mm"]) for m in doc["members"]
            if m["sizing"] and m["sizing"]["achievable"] and m["sizing"]["standard_period_mm"] is not None
            and m["meets_required_period"] and m["sizing"]["standard_period_mm"] > m["sizing"]["chosen_mm"] + 1e-9]
    assert not over, over
