"""The check command end to end on every bundled case, and the JSON contract."""

import json
import math
import subprocess
import sys
from pathlib import Path

import numpy as np
import pytest
from scipy.integrate import solve_ivp

import steelfire
import twins

ROOT = Path(__file__).resolve().parents[1]
CASES = sorted((ROOT / "cases").glob("*.toml"))


def run(*args):
    return subprocess.run([sys.executable, "-m", "steelfire", *args], capture_output=True, text=True, cwd=ROOT)


def test_there_are_bundled_cases():
    assert len(CASES) >= 3


@pytest.mark.parametrize("case", CASES, ids=lambda p: p.stem)
def test_check_table(case):
    r = run("check", str(case))
    assert r.returncode in (0, 1), r.stderr
    out = r.stdout
    for head in ("section factor [1/m]", "theta_cr [C]", "peak steel [C]", "margin [C]", "R std [min]",
                 "Annex F [min]", "CIB W14 [min]", "equal temp. [min]"):
        assert head in out
    assert out.rstrip().splitlines()[-1].startswith("CAUTION:")
    assert "competent fire engineer" in out


@pytest.mark.parametrize("case", CASES, ids=lambda p: p.stem)
def test_check_json_contract(case):
    r = run("check", str(case), "--json")
    assert r.returncode in (0, 1), r.stderr
    doc = json.loads(r.stdout)
    assert isinstance(doc["title"], str)
    fire = doc["fire"]
    for key in ("curve", "opening_factor_m05", "opening_height_m", "thermal_inertia", "design_fire_load_MJ_m2",
                "total_area_fire_load_MJ_m2", "gamma", "gamma_lim", "k_factor", "t_lim_min", "regime",
                "peak_gas_temperature_C", "time_of_peak_gas_min"):
        assert key in fire
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
    assert isinstance(doc["code_values"], dict) and doc["code_values"]["alpha_c_natural"] == 35.0
    assert isinstance(doc["warnings"], list)
    ok = all(m["passes"] and m["meets_required_period"] is not False for m in doc["members"])
    assert r.returncode == (0 if ok else 1)


def test_both_regimes_and_member_kinds_are_covered_by_the_bundled_cases():
    regimes, bare, protected, kinds = set(), 0, 0, set()
    for case in CASES:
        doc = json.loads(run("check", str(case), "--json").stdout)
        regimes.add(doc["fire"]["regime"])
        for m in doc["members"]:
            kinds.add(m["kind"])
            bare += m["protection"] is None
            protected += m["protection"] is not None
    assert {"ventilation", "fuel"} <= regimes
    assert {"beam", "column"} <= kinds and bare and protected


def test_time_step_option_changes_the_grid():
    case = ROOT / "cases" / "office_bay.toml"
    a = json.loads(run("check", str(case), "--json").stdout)
    b = json.loads(run("check", str(case), "--json", "--time-step-s", "2.5").stdout)
    assert b["analysis"]["time_step_s"] == 2.5
    for ma, mb in zip(a["members"], b["members"]):
        assert abs(ma["peak_steel_temperature_C"] - mb["peak_steel_temperature_C"]) < 2.0


def test_python_api_matches_cli():
    case = ROOT / "cases" / "archive_room.toml"
    res = steelfire.analyse(steelfire.load_case(case))
    doc = json.loads(run("check", str(case), "--json").stdout)
    assert res.to_dict()["members"] == doc["members"]
    assert res.members[0].steel_temperature_C.shape == res.fire.time_s.shape


def test_code_override_is_used_and_echoed(tmp_path):
    text = (ROOT / "cases" / "office_bay.toml").read_text()
    p = tmp_path / "c.toml"
    p.write_text(text + "\n[code]\nt_lim_medium_min = 25.0\n")
    doc = json.loads(run("check", str(p), "--json").stdout)
    assert doc["code_values"]["t_lim_medium_min"] == 25.0
    assert doc["fire"]["t_lim_min"] == 25.0


# ---- an independent calculation of a whole bundled case ----------------------------------------

def test_plant_room_against_independent_calculation():
    """Gas by a hand restatement of EN 1991-1-2 Annex A, steel by solve_ivp of eq (4.25)'s ODE;
    the tool's JSON must agree within 1 C (gas) and 2 C (peak steel)."""
    doc = json.loads(run("check", str(ROOT / "cases" / "plant_room.toml"), "--json").stdout)
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
    members = {"RB-01": (145.0, 0.78), "RB-02": (210.0, 0.72), "RC-01": (110.0, 0.65)}
    for m in doc["members"]:
        amv, ksh = members[m["name"]]

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


def test_cli_restores_the_garbage_collector(capsys):
    """The CLI runs with the cyclic collector off (steelfire.cli.main) and turns it back on."""
    import gc

    from steelfire import cli

    assert gc.isenabled()
    code = cli.main(["check", str(ROOT / "cases" / "warehouse_standard.toml"), "--json"])
    assert code in (0, 1)
    assert json.loads(capsys.readouterr().out)["members"]
    assert gc.isenabled()
    assert cli.main(["check", str(ROOT / "cases" / "no_such_case.toml")]) == 2
    assert gc.isenabled()
