"""Time equivalence beside the direct check, member by member (analysis chain and CLI)."""

import copy
import json
import math
from pathlib import Path

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

import cli_run
import steelfire
from steelfire.inputs.case import case_from_dict

ROOT = Path(__file__).resolve().parents[1]
CASES = sorted((ROOT / "cases").glob("*.toml"))

BASE = {
    "title": "equivalence test compartment (invented)",
    "compartment": {"floor_area_m2": 200.0, "height_m": 3.0, "boundary_area_m2": 640.0, "thermal_inertia": 1200.0,
                    "opening": [{"width_m": 2.0, "height_m": 1.5, "count": 6}]},
    "fire_load": {"characteristic_MJ_m2": 600.0, "occupancy_factor": 1.0, "measures_factor": 1.0, "growth": "medium"},
    "fire": {"curve": "parametric", "duration_min": 240.0},
    "analysis": {"time_step_s": 5.0, "standard_horizon_min": 240.0},
    "materials": {"board": {"density": 800.0, "conductivity": 0.2, "specific_heat": 1700.0}},
    "member": [
        {"name": "P1", "kind": "beam", "laterally_restrained": True, "section_factor_per_m": 200.0,
         "utilisation": 0.5, "protection": "board", "thickness_mm": 20.0, "required_minutes": 60},
        {"name": "B1", "kind": "tension", "section_factor_per_m": 120.0, "utilisation": 0.5, "required_minutes": 15},
    ],
}


def analyse(d):
    return steelfire.analyse(case_from_dict(d), histories=False)


def test_identity_standard_fire_equal_temperature_is_duration():
    # design fire = the standard fire itself for 75 min: a protected member reaches its peak at 75 min,
    # so the standard fire reaches the same temperature at 75 min (identity; within one 5 s step)
    d = copy.deepcopy(BASE)
    d["fire"] = {"curve": "standard", "duration_min": 75.0}
    del d["member"][0]["required_minutes"]
    res = analyse(d)
    p1 = res.members[0]
    assert p1.equivalence["equal_temperature_min"] == pytest.approx(75.0, abs=5.0 / 60.0)
    # a member with a required period is judged under a nominal fire at that period: its peak is the one
    # at 60 min, reached by the standard fire at 60 min
    d["member"][0]["required_minutes"] = 60
    p1 = analyse(d).members[0]
    assert p1.equivalence["equal_temperature_min"] == pytest.approx(60.0, abs=5.0 / 60.0)


def test_annex_f_and_cib_per_member_kind():
    res = analyse(BASE)
    p1, b1 = res.members
    fire = res.fire
    # EN 1991-1-2 Table F.1 (k_c, from memory): 1.0 protected, 13.7 O bare; hand: O = 18 sqrt(1.5) / 640 = 0.034446
    o = 18 * math.sqrt(1.5) / 640
    assert fire.opening_factor_m05 == pytest.approx(o)
    assert p1.equivalence["annex_f_k_c"] == 1.0
    assert b1.equivalence["annex_f_k_c"] == pytest.approx(13.7 * o)
    assert b1.equivalence["annex_f_min"] == pytest.approx(p1.equivalence["annex_f_min"] * 13.7 * o)
    # CIB W14 only for protected members, null for bare with the reason in the warnings
    assert p1.equivalence["cib_w14_min"] is not None and b1.equivalence["cib_w14_min"] is None
    assert any("CIB W14" in w and "bare" in w for w in res.warnings)
    # Annex F scope messages
    assert any("composite" in w and "timber" in w for w in res.warnings)
    assert any("cellulosic" in w for w in res.warnings)


def test_annex_f_hand_calculation_in_the_chain():
    res = analyse(BASE)
    f = res.fire.equivalence_factors["annex_f_protected"]
    # hand calculation, EN 1991-1-2 Annex E and F for BASE:
    # delta_q1 (200 m2) = 1.10 + 0.40 log10(200/25) = 1.461236; q_f,d = 600 x 0.8 x 1.461236 = 701.39 MJ/m2
    qfd = 600 * 0.8 * (1.10 + 0.40 * math.log10(8.0))
    assert f["design_fire_load_MJ_m2"] == pytest.approx(qfd, rel=1e-5)
    # alpha_v = 18/200 = 0.09; b_v = 12.5 (1 + 0.9 - 0.0081) = 23.649; alpha_h = 0
    # w_f = (6/3)^0.3 (0.62 + 90 (0.31)^4 / 1) = 1.231144 x (0.62 + 0.831168) = 1.786565
    wf = 2 ** 0.3 * (0.62 + 90 * 0.31 ** 4)
    assert f["w_f"] == pytest.approx(wf, rel=1e-5)
    # k_b = 0.055 (720 <= b = 1200 <= 2500, EN 1991-1-2 Table F.2, from memory); t_e = 701.39 x 0.055 x 1.786565 = 68.92 min
    assert res.members[0].equivalence["annex_f_min"] == pytest.approx(qfd * 0.055 * wf, abs=0.01)


def test_unconservative_routes_and_meets_required():
    res = analyse(BASE)
    for m in res.members:
        e = m.equivalence
        direct = e["equal_temperature_min"] if e["equal_temperature_min"] is not None else 240.0
        for route in ("annex_f", "cib_w14"):
            v = e[f"{route}_min"]
            assert (route in e["unconservative"]) == (v is not None and v < 0.9 * direct)
        for route, ok in e["meets_required"].items():
            v = e[f"{route}_min"]
            assert ok == (v <= m.required_minutes)


@pytest.mark.parametrize("case", CASES, ids=lambda p: p.stem)
def test_json_equivalence_keys_on_bundled_cases(case):
    r = cli_run.main("check", case, "--json")
    doc = json.loads(r.stdout)
    for m in doc["members"]:
        e = m["equivalence"]
        assert set(e) >= {"annex_f_min", "cib_w14_min", "equal_temperature_min", "unconservative", "meets_required"}
        assert isinstance(e["unconservative"], list)
        if m["required_minutes"] is None:
            assert e["meets_required"] is None
        else:
            assert isinstance(e["meets_required"], dict)
        if m["protection"] is None:
            assert e["cib_w14_min"] is None
    if doc["fire"]["opening_factor_m05"] is not None:
        assert doc["fire"]["equivalence_factors"]["cib_w14"]["w"] > 0


@settings(max_examples=12, deadline=None)
@given(q=st.floats(250.0, 900.0), more=st.floats(20.0, 300.0))
def test_more_fire_load_never_lowers_any_equivalent_time(q, more):
    a, b = copy.deepcopy(BASE), copy.deepcopy(BASE)
    a["fire_load"]["characteristic_MJ_m2"] = q
    b["fire_load"]["characteristic_MJ_m2"] = q + more
    ra, rb = analyse(a), analyse(b)
    for ma, mb in zip(ra.members, rb.members):
        for key in ("annex_f_min", "cib_w14_min", "equal_temperature_min"):
            va, vb = ma.equivalence[key], mb.equivalence[key]
            if va is None:
                continue
            # None for the direct route means beyond the horizon: later than any finite value
            assert vb is None or vb >= va - 1e-9, key


@settings(max_examples=12, deadline=None)
@given(count=st.integers(3, 12), extra=st.integers(1, 6))
def test_more_opening_never_raises_annex_f_for_protected(count, extra):
    a, b = copy.deepcopy(BASE), copy.deepcopy(BASE)
    a["compartment"]["opening"][0]["count"] = count
    b["compartment"]["opening"][0]["count"] = count + extra
    a["analysis"]["allow_out_of_scope"] = b["analysis"]["allow_out_of_scope"] = True
    assert analyse(b).members[0].equivalence["annex_f_min"] <= analyse(a).members[0].equivalence["annex_f_min"] + 1e-9


def test_resists_compares_the_members_own_standard_fire_time():
    # Annex F verification: t_fi,d (the member's time to critical under the standard fire) >= t_e,d
    res = analyse(BASE)
    p1 = res.members[0]
    t_fi = p1.standard_fire_time_to_critical_min
    assert t_fi is not None
    for route, ok in p1.equivalence["resists"].items():
        assert ok == (t_fi >= p1.equivalence[f"{route}_min"])
    assert set(p1.equivalence["resists"]) == {"annex_f", "cib_w14", "equal_temperature"}


def test_required_equal_to_horizon_still_judged():
    # peak not reached within the horizon, required period = horizon: the equal-temperature route
    # exceeds the requirement, so it does not meet it (False, not missing)
    d = copy.deepcopy(BASE)
    d["analysis"]["standard_horizon_min"] = 30.0
    d["member"] = [dict(BASE["member"][0], required_minutes=30, thickness_mm=10.0, section_factor_per_m=300.0)]
    e = analyse(d).members[0].equivalence
    assert e["equal_temperature_min"] is None
    assert e["meets_required"]["equal_temperature"] is False
