"""The command line on every bundled case and the JSON contract (DESIGN.md), in-process through
``steelfire.cli.main`` (tests/cli_run.py); a handful of tests at the end start a real process."""

import functools
import json
import math
import os
import shutil
import subprocess
import sys
import sysconfig
from pathlib import Path

import numpy as np
import pytest
from scipy.integrate import solve_ivp

import cli_run
import steelfire
import twins

ROOT = Path(__file__).resolve().parents[1]
CASES = sorted((ROOT / "cases").glob("*.toml"))

#: The ``fire`` keys of the JSON contract (DESIGN.md), present in every document, null where unset.
CONTRACT_FIRE_KEYS = ("curve", "opening_factor_m05", "opening_height_m", "thermal_inertia", "design_fire_load_MJ_m2",
                      "total_area_fire_load_MJ_m2", "gamma", "gamma_lim", "k_factor", "t_lim_min", "regime",
                      "peak_gas_temperature_C", "time_of_peak_gas_min")


@functools.lru_cache(maxsize=None)
def check_json(case):
    """``steelfire check CASE --json`` in-process, run once per case for the tests of this module:
    (exit code, stderr, document)."""
    r = cli_run.main("check", case, "--json")
    return r.returncode, r.stderr, json.loads(r.stdout) if r.stdout else None


def test_there_are_bundled_cases():
    assert len(CASES) >= 3


@pytest.mark.parametrize("case", CASES, ids=lambda p: p.stem)
def test_check_table(case):
    r = cli_run.main("check", case)
    assert r.returncode in (0, 1), r.stderr
    out = r.stdout
    code, _, doc = check_json(case)
    assert r.returncode == code
    for head in ("critical", "peak steel", "margin", "Annex F", "CIB W14", "equal steel"):
        assert head in out, head
    for m in doc["members"][:3]:
        assert m["name"][:10] in out
    assert "Cautions:" in out and "competent fire" in out


@pytest.mark.parametrize("case", CASES, ids=lambda p: p.stem)
def test_check_json_contract(case):
    code, err, doc = check_json(case)
    assert code in (0, 1) and err == "", err
    assert isinstance(doc["title"], str)
    fire = doc["fire"]
    assert list(fire)[:len(CONTRACT_FIRE_KEYS)] == list(CONTRACT_FIRE_KEYS)
    assert fire["regime"] in ("ventilation", "fuel", None)
    assert isinstance(fire["peak_gas_temperature_C"], float)
    for m in doc["members"]:
        for key, types in (("name", str), ("kind", str), ("peak_steel_temperature_C", float),
                           ("time_of_peak_steel_min", float), ("critical_temperature_C", float),
                           ("passes", bool), ("margin_C", float)):
            assert isinstance(m[key], types), key
        assert m["standard_fire_time_to_critical_min"] is None or isinstance(m["standard_fire_time_to_critical_min"], float)
        assert m["meets_required_period"] in (True, False, None)
        assert m["passes"] == (m["peak_steel_temperature_C"] <= m["critical_temperature_C"])
        assert m["margin_C"] == pytest.approx(m["critical_temperature_C"] - m["peak_steel_temperature_C"], abs=0.011)
        # no output shows steel hotter than the hottest gas reached (DESIGN.md invariant)
        assert m["peak_steel_temperature_C"] <= fire["peak_gas_temperature_C"] + 1e-9
    # EN 1991-1-2 3.3.1.1(3) and Annex A: alpha_c = 35 for natural fires (DESIGN.md pitfalls)
    assert isinstance(doc["code_values"], dict) and doc["code_values"]["alpha_c_natural"] == 35.0
    assert isinstance(doc["warnings"], list)
    ok = all(m["passes"] and m["meets_required_period"] is not False for m in doc["members"])
    assert code == (0 if ok else 1)


def _fire_of(case):
    return check_json(ROOT / "cases" / case)[2]["fire"]


def test_fire_object_carries_only_its_own_models_keys():
    """The contract keys stay in every document (null where the model does not set them); keys of other
    fire models are not written (no ``source_file`` for an Annex A fire; no Annex A values for a nominal
    fire)."""
    nominal = _fire_of("warehouse_standard.toml")
    assert nominal["curve"] == "standard"
    for k in CONTRACT_FIRE_KEYS[1:-2]:
        assert nominal[k] is None, k
    for k in ("source_file", "t_max_min", "x_factor", "cooling_rate_C_h", "burnout_time_min"):
        assert k not in nominal, k
    parametric = _fire_of("office_bay.toml")
    assert parametric["gamma"] is not None and parametric["t_max_min"] is not None
    assert "source_file" not in parametric
    table = _fire_of("retail_measured.toml")
    assert table["curve"] == "table" and table["gamma"] is None and "t_max_min" not in table


def test_both_regimes_and_member_kinds_are_covered_by_the_bundled_cases():
    regimes, bare, protected, kinds = set(), 0, 0, set()
    for case in CASES:
        doc = check_json(case)[2]
        regimes.add(doc["fire"]["regime"])
        for m in doc["members"]:
            kinds.add(m["kind"])
            bare += m["protection"] is None
            protected += m["protection"] is not None
    assert {"ventilation", "fuel"} <= regimes
    assert {"beam", "column"} <= kinds and bare and protected


def test_time_step_option_changes_the_grid():
    case = ROOT / "cases" / "office_bay.toml"
    a = check_json(case)[2]
    b = json.loads(cli_run.main("check", case, "--json", "--time-step-s", "2.5").stdout)
    assert b["analysis"]["time_step_s"] == 2.5
    for ma, mb in zip(a["members"], b["members"]):
        # explicit steps converge as they halve: 5 s and 2.5 s within 2 C (common practice, no source)
        assert abs(ma["peak_steel_temperature_C"] - mb["peak_steel_temperature_C"]) < 2.0


def test_python_api_matches_cli():
    case = ROOT / "cases" / "archive_room.toml"
    res = steelfire.analyse(steelfire.load_case(case))
    doc = check_json(case)[2]
    assert steelfire.document(res)["members"] == doc["members"]
    assert res.members[0].steel_temperature_C.shape == res.fire.time_s.shape


def test_code_override_is_used_and_echoed(tmp_path):
    text = (ROOT / "cases" / "office_bay.toml").read_text()
    p = tmp_path / "c.toml"
    p.write_text(text + "\n[code]\nt_lim_medium_min = 25.0\n")
    doc = json.loads(cli_run.main("check", p, "--json").stdout)
    assert doc["code_values"]["t_lim_medium_min"] == 25.0
    assert doc["fire"]["t_lim_min"] == 25.0


def test_help_version_and_usage_errors():
    r = cli_run.main("--version")
    assert r.returncode == 0 and r.stdout == f"steelfire {steelfire.__version__}\n"
    r = cli_run.main("--help")
    assert r.returncode == 0 and "check" in r.stdout and "size" in r.stdout and "competent fire engineer" in r.stdout
    for argv in ((), ("frobnicate",), ("check",), ("check", "a.toml", "--bogus")):
        r = cli_run.main(*argv)
        assert r.returncode == 2 and r.stdout == "", argv
        assert r.stderr.startswith("steelfire: error: ") and r.stderr.count("\n") == 1, (argv, r.stderr)


def test_internal_error_exit_3_with_traceback_file(monkeypatch, tmp_path):
    """An unexpected exception is never reported as a verdict: exit 3, one line naming the traceback file."""
    from steelfire.chain import analysis

    def boom(*a, **k):
        raise ZeroDivisionError("planted")

    monkeypatch.setattr(analysis, "analyse", boom)
    monkeypatch.setenv("TMPDIR", str(tmp_path))
    import tempfile
    monkeypatch.setattr(tempfile, "tempdir", None)
    r = cli_run.main("check", ROOT / "cases" / "warehouse_standard.toml", "--json")
    assert r.returncode == 3 and r.stdout == ""
    assert r.stderr.startswith("steelfire: internal error (ZeroDivisionError); traceback written to ")
    assert r.stderr.count("\n") == 1
    written = Path(r.stderr.split("traceback written to ", 1)[1].split(";")[0])
    assert written.parent == tmp_path and "planted" in written.read_text()


def test_interrupted_exit_130(monkeypatch):
    from steelfire.chain import analysis

    def interrupt(*a, **k):
        raise KeyboardInterrupt

    monkeypatch.setattr(analysis, "analyse", interrupt)
    r = cli_run.main("check", ROOT / "cases" / "warehouse_standard.toml")
    assert r.returncode == 130 and r.stdout == ""
    assert r.stderr == "steelfire: interrupted; outputs left as they were before the run\n"


def test_cli_keeps_the_garbage_collector_on():
    """The CLI leaves the interpreter's cyclic collector as it found it (it is a library call too)."""
    import gc

    assert gc.isenabled()
    r = cli_run.main("check", ROOT / "cases" / "warehouse_standard.toml", "--json")
    assert r.returncode in (0, 1) and json.loads(r.stdout)["members"]
    assert gc.isenabled()
    assert cli_run.main("check", ROOT / "cases" / "no_such_case.toml").returncode == 2
    assert gc.isenabled()


# ---- an independent calculation of a whole bundled case ----------------------------------------

def test_plant_room_against_independent_calculation():
    """Gas by a hand restatement of EN 1991-1-2 Annex A, steel by solve_ivp of eq (4.25)'s ODE;
    the tool's JSON must agree within 1 C (gas) and 2 C (peak steel)."""
    doc = check_json(ROOT / "cases" / "plant_room.toml")[2]
    # compartment of cases/plant_room.toml, restated by hand
    af, at, b = 30.0, 137.0, 700.0
    av, heq = 1.8 * 2.2, 2.2
    o = av * math.sqrt(heq) / at
    dq1 = 1.10 + (1.50 - 1.10) * math.log10(af / 25.0)           # Table E.1, log-linear
    qfd = 250.0 * 0.8 * dq1 * 1.22 * 1.0                          # eq (E.1)
    qtd = qfd * af / at
    tlim = 20 / 60
    assert 0.2e-3 * qtd / o < tlim                                # fuel-controlled
    olim = 0.1e-3 * qtd / tlim
    k = 1 + ((o - 0.04) / 0.04) * ((qtd - 75) / 75) * ((1160 - b) / 1160)
    glim = (olim / b) ** 2 / (0.04 / 1160) ** 2 * k
    gam = (o / b) ** 2 / (0.04 / 1160) ** 2

    def heat_curve(ts):
        return 20 + 1325 * (1 - 0.324 * math.exp(-0.2 * ts) - 0.204 * math.exp(-1.7 * ts) - 0.472 * math.exp(-19 * ts))

    tmax_star = 0.2e-3 * qtd / o * gam
    x = tlim * gam / tmax_star
    rate = 625 if tmax_star <= 0.5 else (250 * (3 - tmax_star) if tmax_star < 2 else 250)
    th_max = heat_curve(tlim * glim)

    def gas(t_s):
        th = t_s / 3600
        if th <= tlim:
            return heat_curve(th * glim)
        return max(20.0, th_max - rate * (gam * th - tmax_star * x))

    assert doc["fire"]["peak_gas_temperature_C"] == pytest.approx(th_max, abs=1.0)
    assert doc["fire"]["k_factor"] == pytest.approx(k, rel=1e-5)
    # the two bare beams of the case: Am/V and the shadow-factor ratio, EN 1993-1-2 eq (4.26b) in a natural fire
    members = {"RB-01": (145.0, 0.78), "RB-02": (210.0, 0.72)}
    checked = 0
    for m in doc["members"]:
        if m["name"] not in members:
            continue
        amv, ksh = members[m["name"]]
        assert m["section_factor_per_m"] == amv and m["shadow_factor"] == ksh

        def rhs(t, y):
            g, s = gas(t), y[0]
            h = 35 * (g - s) + 0.7 * 5.67e-8 * ((g + 273) ** 4 - (s + 273) ** 4)
            return [ksh * amv * h / (twins.c_a(s) * 7850)]

        peak, y0 = 20.0, [20.0]
        for a, b_ in ((0.0, tlim * 3600), (tlim * 3600, 7200.0)):
            sol = solve_ivp(rhs, (a, b_), y0, rtol=1e-9, atol=1e-9, max_step=10.0, dense_output=True)
            peak = max(peak, float(np.max(sol.sol(np.linspace(a, b_, 4000))[0])))
            y0 = [sol.y[0, -1]]
        assert m["peak_steel_temperature_C"] == pytest.approx(peak, abs=2.0), m["name"]
        checked += 1
    assert checked == 2


# ---- a real process: what in-process runs cannot show ---------------------------------------------

def process(*args, cwd=ROOT):
    return subprocess.run([sys.executable, "-m", "steelfire", *map(str, args)], capture_output=True, text=True,
                          cwd=cwd, timeout=600)


def test_process_check_json_exit_code_and_document():
    """``python -m steelfire check --json``: a parseable document on stdout, nothing on stderr, the exit
    code of the verdicts, and the same document as the in-process run (the version key aside)."""
    case = ROOT / "cases" / "warehouse_standard.toml"
    r = process("check", case, "--json")
    assert r.stderr == "" and r.returncode in (0, 1)
    doc = json.loads(r.stdout)
    inproc = json.loads(cli_run.main("check", case, "--json").stdout)
    assert doc == inproc
    ok = all(m["passes"] and m["meets_required_period"] is not False for m in doc["members"])
    assert r.returncode == (0 if ok else 1)


def test_process_bad_input_one_line_exit_2(tmp_path):
    p = tmp_path / "bad.toml"
    p.write_text('[fire]\ncurve = "standard"\nduration_min = -5.0\n')
    r = process("check", p, "--json")
    assert r.returncode == 2 and r.stdout == ""
    assert r.stderr == "steelfire: error: fire.duration_min = -5.0: must be >= 1 and <= 1440 [min]\n"


def test_process_out_writes_the_files(tmp_path):
    out = tmp_path / "a" / "out"   # a folder that does not exist yet: created
    r = process("check", ROOT / "cases" / "warehouse_standard.toml", "--out", out)
    assert r.returncode in (0, 1), r.stderr
    for name in ("results.json", "members.csv", "histories.csv", "report.html"):
        assert (out / name).is_file() and (out / name).stat().st_size > 0, name
    doc = json.loads((out / "results.json").read_text("utf-8"))
    assert doc["run"]["command"] == "check" and doc["run"]["case_file"] == "warehouse_standard.toml"
    assert not list(out.glob("*.part")) and not list(out.glob(".*part"))


def test_console_script_is_installed():
    """The ``steelfire`` command of [project.scripts] is on the path of this interpreter's environment."""
    exe = shutil.which("steelfire", path=os.pathsep.join([sysconfig.get_path("scripts"), os.environ.get("PATH", "")]))
    assert exe, "console script 'steelfire' not installed"
    r = subprocess.run([exe, "--version"], capture_output=True, text=True, timeout=600)
    assert r.returncode == 0 and r.stdout == f"steelfire {steelfire.__version__}\n"
