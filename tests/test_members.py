"""Member rows: the one column-wise validator (steelfire.inputs.members) for [[member]] tables and CSV
schedules, its messages, and what the loader does with a member's values (the deliberate changes of
the restructuring included: Am/V of bare steel below 10 1/m taken as 10 with a note; ``shadow_factor``
the ratio [Am/V]b/[Am/V], with the 0.9 of eq (4.26a) applied by the tool to I-sections under nominal fires).
"""

from __future__ import annotations

import copy

import pytest

import steelfire
from steelfire.codevalues import DEFAULTS
from steelfire.errors import InputError
from steelfire.inputs import schedule
from steelfire.inputs.case import Member, case_from_dict, check_protection_step
from steelfire.inputs.materials import read_materials

STANDARD = {"fire": {"curve": "standard", "duration_min": 30.0}, "analysis": {"standard_horizon_min": 60.0}}


def case(*members, **extra):
    return case_from_dict({**copy.deepcopy(STANDARD), "member": list(members), **extra})


# ---- schedules ----------------------------------------------------------------------------------

def test_schedule_rows_blanks_comments_and_short_rows(tmp_path):
    """Short rows (missing cells are empty), blank and comment rows, whitespace around cells and keys."""
    p = tmp_path / "s.csv"
    p.write_text("name, section_factor_per_m ,utilisation,laterally_restrained\n"
                 "# comment\n\n A ,150, 0.5 ,YES\n,,,\nB,120\n", encoding="utf-8")
    s = schedule.read_schedule(p)
    assert [s.where(i) for i in range(s.n)] == ["s.csv row 4", "s.csv row 6"]
    assert s.columns["name"] == ["A", "B"] and s.columns["section_factor_per_m"] == [150.0, 120.0]
    assert s.columns["laterally_restrained"][0] is True


@pytest.mark.parametrize("text, message", [
    # a file's own text is not quoted, its size is
    ("name,section_factor_per_m\nA,150\nB,150,7\n", "s.csv row 3 = '3 cells': has more cells than the header (2)"),
    ("name,section_factor_per_m\nA,nan\nB,x\n",
     "s.csv row 2 column section_factor_per_m = 'nan': must be a finite number"),
    ("name,laterally_restrained\nA,maybe\n", "s.csv row 2 column laterally_restrained = 'maybe': must be true or false"),
    ("name,section_factor_per_m\n# only a comment\n", "members_file = 's.csv': has a header but no member rows"),
])
def test_schedule_cell_errors(tmp_path, text, message):
    p = tmp_path / "s.csv"
    p.write_text(text, encoding="utf-8")
    with pytest.raises(InputError) as e:
        schedule.read_schedule(p)
    assert str(e.value) == message


def test_first_error_wins_across_inline_tables_and_schedule(tmp_path):
    """An error in a [[member]] table comes before one in a later schedule row; a bad schedule cell
    comes before both (the file is read before any member is checked); a repeated name names both."""
    (tmp_path / "s.csv").write_text("name,kind,section_factor_per_m,utilisation\nS1,tension,150,0.5\n"
                                    "S2,tension,-3,0.5\n")
    data = {**copy.deepcopy(STANDARD), "members_file": "s.csv",
            "member": [{"name": "T1", "kind": "tension", "section_factor_per_m": 150.0, "utilisation": 0.5},
                       {"name": "T2", "kind": "tension", "section_factor_per_m": 150.0, "utilisation": 2.0}]}
    with pytest.raises(InputError, match=r"^member\[2\] \(T2\)\.utilisation = 2\.0"):
        case_from_dict(data, base_dir=tmp_path)
    data["member"][1]["utilisation"] = 0.5
    with pytest.raises(InputError, match=r"^s\.csv row 3 \(S2\)\.section_factor_per_m = -3\.0"):
        case_from_dict(data, base_dir=tmp_path)
    (tmp_path / "s.csv").write_text("name,kind,section_factor_per_m,utilisation\nT1,tension,150,0.5\n")
    with pytest.raises(InputError) as e:
        case_from_dict(data, base_dir=tmp_path)
    assert str(e.value) == "s.csv row 2 (T1).name = 'T1': must be unique (also member[1])"
    (tmp_path / "s.csv").write_text("name,kind,section_factor_per_m,utilisation\nS1,tension,abc,0.5\n")
    data["member"][1]["utilisation"] = 2.0
    with pytest.raises(InputError, match=r"^s\.csv row 2 column section_factor_per_m = 'abc'"):
        case_from_dict(data, base_dir=tmp_path)
    (tmp_path / "s.csv").write_text("name,kind,section_factor_per_m,utilisation,required_minutes\n"
                                    "S1,tension,150,0.5,60\nS2,tension,150,0.5,300\n")
    data["member"][1]["utilisation"] = 0.5
    with pytest.raises(InputError) as e:
        case_from_dict(data, base_dir=tmp_path)
    assert str(e.value) == "s.csv row 3 (S2).required_minutes = 300.0: must be <= analysis.standard_horizon_min = 60 min"


def test_protection_step_names_the_first_thin_member():
    mats = read_materials({"board": {"density": 800.0, "conductivity": 0.2, "specific_heat": 1700.0}})
    ok = Member(name="ok", kind="beam", section_factor_per_m=200.0, protection="board", thickness_mm=20.0)
    thin = [Member(name=f"thin{i}", kind="beam", section_factor_per_m=200.0, protection="board",
                   thickness_mm=0.01 * (i + 1)) for i in range(2)]
    with pytest.raises(InputError) as e:
        check_protection_step([ok, thin[1], ok, thin[0]], mats, DEFAULTS, 30.0, "--time-step-s")
    assert e.value.field == "member[2] (thin1).thickness_mm"
    assert "(--time-step-s)" in e.value.allowed
    check_protection_step([ok, ok], mats, DEFAULTS, 30.0)  # nothing thin: no error


# ---- what the loader does with a member's values ------------------------------------------------

def test_bare_section_factor_below_10_is_taken_as_10_with_a_note():
    # EN 1993-1-2 4.2.5.1(1): Am/V not below 10 1/m (code value section_factor_min_bare_per_m)
    c = case({"name": "S", "kind": "tension", "section_factor_per_m": 5.0, "critical_temperature_C": 600.0})
    m = c.members[0]
    assert m.section_factor_per_m == 10.0
    assert m.notes == ("Am/V = 5 1/m taken as 10 1/m (EN 1993-1-2 4.2.5.1(1))",)
    doc = steelfire.document(steelfire.analyse(c, histories=False))
    assert doc["members"][0]["section_factor_per_m"] == 10.0
    assert doc["members"][0]["details"]["notes"] == list(m.notes)
    # a national value is taken the same way
    c = case({"name": "S", "kind": "tension", "section_factor_per_m": 5.0, "critical_temperature_C": 600.0},
             code={"section_factor_min_bare_per_m": 20.0})
    assert c.members[0].section_factor_per_m == 20.0 and "taken as 20 1/m" in c.members[0].notes[0]
    # at or above the limit nothing is noted
    assert case({"name": "S", "kind": "tension", "section_factor_per_m": 10.0,
                 "critical_temperature_C": 600.0}).members[0].notes == ()


def test_protected_section_factor_below_1_still_refused():
    with pytest.raises(InputError) as e:
        case({"name": "P", "kind": "tension", "section_factor_per_m": 0.5, "critical_temperature_C": 600.0,
              "protection": "board", "thickness_mm": 20.0},
             materials={"board": {"density": 800.0, "conductivity": 0.2, "specific_heat": 1700.0}})
    assert str(e.value) == "member[1] (P).section_factor_per_m = 0.5: must be >= 1 1/m"


def _k_sh(curve, member, folder=None):
    """(k_sh, its formula) of ``member`` in the design fire: the standard curve, or a tabulated curve."""
    c = case(member) if curve == "standard" else case_from_dict(
        {**copy.deepcopy(STANDARD), "fire": {"curve": "table", "file": "x.csv", "duration_min": 30.0},
         "member": [member]}, base_dir=folder)
    doc = steelfire.document(steelfire.analyse(c, histories=False))
    return doc["members"][0]["shadow_factor"], doc["members"][0]["details"]["shadow_factor_formula"]


def test_shadow_factor_is_the_ratio_and_eq_4_26a_is_applied_to_i_sections(tmp_path):
    """EN 1993-1-2 4.2.5.1(2): k_sh = 0.9 [Am/V]b/[Am/V] (4.26a) for I-sections under nominal fires, else
    k_sh = [Am/V]b/[Am/V] (4.26b). ``shadow_factor`` gives the ratio; a catalogue I-section's ratio comes
    from its dimensions: IPE 300 box/profile = 2 (0.300 + 0.150) / 1.16 = 0.7759 (perimeter 1.16 m2/m,
    handbook value from memory)."""
    (tmp_path / "x.csv").write_text("time_min,temperature_C\n0,20\n30,800\n", encoding="utf-8")
    ratio_only = {"name": "K", "kind": "tension", "section_factor_per_m": 150.0, "shadow_factor": 0.8,
                  "critical_temperature_C": 600.0}
    ipe = {"name": "I", "kind": "beam", "laterally_restrained": True, "section": "IPE 300",
           "critical_temperature_C": 600.0}
    # a member given only Am/V and a ratio: eq (4.26b) whatever the fire
    assert _k_sh("standard", ratio_only) == (0.8, "eq (4.26b): k_sh = [Am/V]b/[Am/V] = 0.8 (ratio given)")
    assert _k_sh("table", ratio_only, tmp_path)[0] == 0.8
    # a catalogue I-section: 0.9 x its ratio under the standard fire, the ratio in a tabulated (natural) fire
    k, formula = _k_sh("standard", ipe)
    assert k == pytest.approx(0.9 * 0.9 / 1.16, rel=0.01) and formula.startswith("eq (4.26a)")
    k, formula = _k_sh("table", ipe, tmp_path)
    assert k == pytest.approx(0.9 / 1.16, rel=0.01) and formula.startswith("eq (4.26b)")
    # a catalogue I-section with a given ratio: 0.9 x the given ratio under the standard fire
    assert _k_sh("standard", dict(ipe, shadow_factor=0.7))[0] == pytest.approx(0.63, rel=1e-9)
    # and the code value of eq (4.26a) is the one applied
    c = case(ipe, code={"shadow_factor_i_nominal": 0.8})
    doc = steelfire.document(steelfire.analyse(c, histories=False))
    assert doc["members"][0]["shadow_factor"] == pytest.approx(0.8 * 0.9 / 1.16, rel=0.01)
