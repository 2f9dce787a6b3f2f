"""The fast paths of case loading against the row-by-row readers they stand in for.

``steelfire.case._members_of`` checks [[member]] rows a column at a time and builds the Members of
clean rows itself; ``steelfire.schedule.read_schedule_columns`` reads a schedule CSV a column at a
time; ``steelfire.case.check_protection_step`` computes the least thicknesses in one array call. Each
only *accepts*: anything it cannot vouch for goes to the row reader (``_read_member``,
``read_schedule``, ``_protection_step_error``), the one source of error messages. These tests hold
each fast path to its row reader over many mutated rows, schedules and cases: both raise the same
InputError message, or both give equal Members (also equal in repr, so 15 and 15.0 differ).
The expected values are the row readers' own results (no other source).
"""

from __future__ import annotations

import csv
import dataclasses
import gc
import io
import math
import pickle
import tempfile
from pathlib import Path
from unittest import mock

import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from steelfire.inputs import case as case_mod
from steelfire import codevalues
from steelfire.inputs import schedule as schedule_mod
from steelfire.inputs.case import Member, case_from_dict
from steelfire.errors import InputError

MATERIALS = {
    "board": {"density": 800.0, "conductivity": 0.2, "specific_heat": 1700.0},
    "table": {"density": 1300.0, "conductivity": [[20.0, 0.1], [300.0, 0.12], [700.0, 0.22]],
              "specific_heat": 1200.0, "moisture_percent": 3.0},
}
MATS = case_mod._read_materials(MATERIALS)
CODE = codevalues.resolve({})


def outcome(fn):
    """("ok", value) or ("error", message) of ``fn()``; any other exception propagates."""
    try:
        return ("ok", fn())
    except InputError as exc:
        return ("error", str(exc))


def assert_same_members(fast, slow):
    """Equal outcomes; for Members also equal reprs (the types of the numbers, too)."""
    assert fast[0] == slow[0], (fast, slow)
    if fast[0] == "error":
        assert fast[1] == slow[1]
    else:
        assert list(fast[1]) == list(slow[1])
        assert [repr(m) for m in fast[1]] == [repr(m) for m in slow[1]]


# ----------------------------------------------------------------------------------------------
# member rows: valid ones, then mutated


class _Str(str):
    """A str subclass: the row reader takes it, the fast path leaves it to the row reader."""


def _numbers(lo, hi, **kw):
    return st.one_of(st.floats(lo, hi, allow_nan=False, **kw), st.sampled_from([lo, hi]),
                     st.integers(math.ceil(lo), math.floor(hi)))


GOOD = {
    "name": st.sampled_from(["A", "B", "C", "D", " E ", "Ü-1"]),
    "kind": st.sampled_from(case_mod.KINDS),
    "laterally_restrained": st.booleans(),
    "section_factor_per_m": _numbers(1.0, 1000.0),
    "utilisation": st.floats(0.013, 1.0, exclude_max=True),
    "critical_temperature_C": st.floats(20.0, 1200.0, exclude_min=True),
    "protection": st.sampled_from(["board", "table", "generic-board-gypsum"]),
    "thickness_mm": st.one_of(st.floats(0.0, 300.0, exclude_min=True), st.sampled_from([0.01, 0.5, 300.0])),
    "required_minutes": st.sampled_from([15.0, 30, 60.0, 120.0, 240.0, 300.0, 1440.0]),
    "shadow_factor": st.floats(0.0, 1.0, exclude_min=True),
    "section": st.sampled_from(["IPE 300", "HEA 200", "ipe300", "XYZ 1"]),
    "exposure": st.sampled_from(["4-sided", "3-sided", "2-sided"]),
    "encasement": st.sampled_from(["profile", "box", "tube"]),
}

#: Values of no key: wrong types, and things no number should be.
EVIL_VALUES = [
    None, True, False, 0, -1, 2 ** 62, -0.0, math.nan, math.inf, -math.inf, "", " ", "abc", "1.5", "beam",
    "board", [], [1.0], {}, {"a": 1.0}, _Str("beam"), _Str("A"), (1.0,),
]
EVIL = st.sampled_from(EVIL_VALUES)

_up, _down = (lambda x: math.nextafter(x, math.inf)), (lambda x: math.nextafter(x, -math.inf))

#: Per key: values at and just past the edges of what it takes (the ranges of the error messages,
#: written out here rather than read from steelfire.case), and near misses.
EDGES = {
    "name": ["", " ", "\t", "\u3000", "A", " A", _Str("B")],
    "kind": ["beam", "Beam", "", "column", "tension ", "other", _Str("brace")],
    "laterally_restrained": [True, False, 0, 1, "true", None],
    "section_factor_per_m": [0.0, 5e-324, 0.5, 1.0, _down(1.0), 1, True, _down(10.0), 10.0, 10, 1000.0,
                             _up(1000.0), 1000, 1001, -1.0],
    "utilisation": [0.013, _down(0.013), _up(0.013), 1.0, _down(1.0), 1, 0, 0.5, True],
    "critical_temperature_C": [20.0, _up(20.0), 20, 21, 1200.0, _up(1200.0), 1200, 1201, True],
    "protection": ["board", "Board", "", "nothing", "generic-board-gypsum", "table ", _Str("board")],
    "thickness_mm": [0.0, 5e-324, 300.0, _up(300.0), 300, 301, 1, True, -1.0],
    "required_minutes": [0.0, 5e-324, 1440.0, _up(1440.0), 1440, 1441, 60, True],
    "shadow_factor": [0.0, 5e-324, 1.0, _up(1.0), 1, 0, True],
    "section": ["IPE 300", "", "XYZ 1", 300],
    "exposure": ["4-sided", "2-sided", "", 4],
    "encasement": ["profile", "box", "", None],
}


@st.composite
def member_rows(draw, changes=st.integers(0, 3)):
    """A valid [[member]] table, then up to three mutations of it."""
    row = {"name": draw(GOOD["name"]), "kind": draw(GOOD["kind"])}
    if draw(st.booleans()):
        row["utilisation"] = draw(GOOD["utilisation"])
    else:
        row["critical_temperature_C"] = draw(GOOD["critical_temperature_C"])
    protected = draw(st.booleans())
    if protected:
        row["protection"] = draw(GOOD["protection"])
        if draw(st.booleans()):
            row["thickness_mm"] = draw(GOOD["thickness_mm"])
    elif draw(st.booleans()):
        row["shadow_factor"] = draw(GOOD["shadow_factor"])
    if draw(st.integers(0, 5)) == 0:
        row["section"] = draw(GOOD["section"])
        for key in ("exposure", "encasement"):
            if draw(st.booleans()):
                row[key] = draw(GOOD[key])
    else:
        row["section_factor_per_m"] = draw(GOOD["section_factor_per_m"])
    if row["kind"] == "beam" and draw(st.booleans()):
        row["laterally_restrained"] = draw(GOOD["laterally_restrained"])
    if draw(st.booleans()):
        row["required_minutes"] = draw(GOOD["required_minutes"])
    for _ in range(draw(changes)):
        how = draw(st.integers(0, 11))
        key = draw(st.sampled_from(case_mod.MEMBER_KEYS))
        if how <= 4:
            row[key] = draw(st.sampled_from(EDGES[key]))
        elif how <= 6:
            row[key] = draw(EVIL)
        elif how == 7:
            row[key] = draw(GOOD[draw(st.sampled_from(sorted(GOOD)))])  # a good value of another key
        elif how == 8:
            row.pop(key, None)
        elif how == 9:
            row[draw(st.sampled_from(["thicknes_mm", "foo", "Name"]))] = 1.0
        elif how == 10:
            row = dict(reversed(list(row.items())))  # key order
        else:
            return draw(st.sampled_from([[], "member", None, 3.0, [row]]))  # not a table
    return row


def _per_row(rows):
    """The row reader over every row: the reference for _members_of."""
    return [case_mod._read_member(rows.row(i), rows.where(i), MATS, CODE) for i in range(rows.n)]


@settings(max_examples=600, deadline=None)
@given(st.lists(member_rows(), min_size=1, max_size=6))
def test_fast_members_match_the_row_reader_on_inline_tables(tables):
    rows = case_mod._InlineRows(tables)
    assert_same_members(outcome(lambda: case_mod._members_of(rows, MATS, CODE)), outcome(lambda: _per_row(rows)))


DELETE = object()

#: Valid rows of each shape the fast path builds, and one it leaves to the row reader (section).
BASE_ROWS = [
    {"name": "A", "section_factor_per_m": 150.0, "utilisation": 0.5},
    {"name": "A", "kind": "column", "section_factor_per_m": 150, "critical_temperature_C": 550.0,
     "shadow_factor": 0.8, "required_minutes": 60.0},
    {"name": "A", "kind": "beam", "laterally_restrained": True, "section_factor_per_m": 150.0,
     "critical_temperature_C": 550, "protection": "board", "thickness_mm": 20.0},
    {"name": "A", "kind": "tension", "section_factor_per_m": 5.0, "utilisation": 0.5, "protection": "table"},
    {"name": "A", "section": "IPE 300", "exposure": "3-sided", "utilisation": 0.5, "protection": "board",
     "encasement": "box"},
]


def test_every_single_change_of_a_valid_row():
    """Each key of each base row set to each edge and wrong value, or removed, or added: the fast
    path and the row reader agree on every one (a row alone, and after a good row)."""
    tried = {"ok": 0, "error": 0}
    for base in BASE_ROWS:
        for key in case_mod.MEMBER_KEYS:
            for value in EDGES[key] + EVIL_VALUES + [DELETE]:
                row = dict(base)
                if value is DELETE:
                    row.pop(key, None)
                else:
                    row[key] = value
                for tables in ([row], [dict(BASE_ROWS[0], name="first"), row]):
                    rows = case_mod._InlineRows(tables)
                    fast = outcome(lambda: case_mod._members_of(rows, MATS, CODE))
                    assert_same_members(fast, outcome(lambda: _per_row(rows)))
                    tried[fast[0]] += 1
    assert min(tried.values()) > 100, tried


def test_mutations_reach_both_outcomes():
    """The strategy above is no use unless it gives both good and refused rows (and Members built
    by the fast path as well as by the row reader)."""
    seen = set()
    built_fast = []
    real = case_mod._read_member

    def counting(*args):
        built_fast.append(False)
        return real(*args)

    @settings(max_examples=200, deadline=None, database=None)
    @given(member_rows())
    def probe(row):
        with mock.patch.object(case_mod, "_read_member", counting):
            result = outcome(lambda: case_mod._members_of(case_mod._InlineRows([row]), MATS, CODE))
        seen.add(result[0])
        if result[0] == "ok" and not built_fast:
            seen.add("fast")
        built_fast.clear()

    probe()
    assert seen == {"ok", "error", "fast"}


# ----------------------------------------------------------------------------------------------
# schedules: cells as text


CELLS = st.one_of(
    st.sampled_from(["12", " 12.5 ", "150", "1e2", "1_000", "0", "-5", "0.013", "0.5", "1", "1200", "550",
                     "300", "300.0001", "1000", "nan", "NaN", "inf", "-inf", "1e400", "", " ", "  ", "abc",
                     "0x10", "\u0661\u0662", "\u00a012\u00a0", "\u300030", "12\x1c", "true", "YES", " no ",
                     "False", "maybe", "board", " table ", "generic-board-gypsum", "nothing", "beam",
                     " tension ", "column", "IPE 300", "4-sided", "box", "A", "B", " C ", "#x", "a,b", 'q"q']),
    st.floats(allow_nan=True, allow_infinity=True).map(repr),
    st.text(max_size=4),
)


def _cell_text(v):
    return "" if v is None else ("true" if v is True else "false" if v is False else str(v))


@st.composite
def schedules(draw):
    """Text of a schedule CSV: a header of member keys (sometimes a bad one) and rows, most of them
    valid member rows written out, some of cells of any kind, some blank or comments."""
    keys = [k for k in schedule_mod.COLUMNS if k not in ("name", "section_factor_per_m")]
    cols = ["name", "section_factor_per_m"] + draw(st.lists(st.sampled_from(keys), unique=True, max_size=7))
    cols = draw(st.permutations(cols))
    if draw(st.integers(0, 15)) == 0:  # a bad header, or a header the rows must match after stripping
        cols = cols + [draw(st.sampled_from(["name", "thicknes_mm", " kind ", "utilisation"]))]
        if draw(st.booleans()):
            cols.remove("name")
    width = len(cols)
    out = io.StringIO()
    w = csv.writer(out, lineterminator="\n")
    w.writerow(cols)
    for _ in range(draw(st.integers(0, 6))):
        what = draw(st.integers(0, 12))
        if what == 0:
            out.write(draw(st.sampled_from(["\n", "# a comment\n", " # indented comment,1\n", ",,\n", " , \n"])))
            continue
        if what >= 4:  # a valid member's values (where the header has its keys), maybe a cell changed
            member = draw(member_rows(changes=st.just(0)))
            row = [_cell_text(member.get(c.strip())) for c in cols]
            if what >= 10:
                row[draw(st.integers(0, width - 1))] = draw(CELLS)
            w.writerow(row)
            continue
        n = width + (draw(st.sampled_from([-1, 1])) if what == 1 else 0)
        row = [draw(CELLS) for _ in range(max(n, 0))]
        if "name" in cols and cols.index("name") < len(row) and what != 2:
            row[cols.index("name")] = draw(GOOD["name"])
        w.writerow(row)
    return out.getvalue()


def _schedule_file(tmp: str, text: str) -> Path:
    p = Path(tmp) / "s.csv"
    p.write_text(text, encoding="utf-8")
    return p


@settings(max_examples=600, deadline=None)
@given(schedules())
def test_column_reader_matches_the_row_reader(text):
    with tempfile.TemporaryDirectory() as tmp:
        p = _schedule_file(tmp, text)
        slow = outcome(lambda: schedule_mod.read_schedule(p))
        fast = outcome(lambda: schedule_mod.read_schedule_columns(p))
    assert fast[0] == slow[0], (fast, slow)
    if fast[0] == "error":
        assert fast[1] == slow[1]
        return
    s = fast[1]
    pairs = [(s.where(i), s.row(i)) for i in range(s.n)]
    assert pairs == slow[1]
    assert [[(k, type(v)) for k, v in d.items()] for _, d in pairs] == [[(k, type(v)) for k, v in d.items()]
                                                                        for _, d in slow[1]]
    rows = _PairRows(slow[1])
    assert_same_members(outcome(lambda: case_mod._members_of(s, MATS, CODE)), outcome(lambda: _per_row(rows)))


class _PairRows:
    """(where, dict) pairs as a block of member rows that the fast path cannot read (no columns)."""

    def __init__(self, pairs):
        self.pairs = pairs
        self.n = len(pairs)
        self.columns = {}
        self.suspect = range(self.n)

    def where(self, i):
        return self.pairs[i][0]

    def row(self, i):
        return self.pairs[i][1]


def test_column_reader_edges(tmp_path):
    """Short rows (missing cells are empty), blank and comment rows, whitespace, and the errors."""
    p = tmp_path / "s.csv"
    p.write_text("name, section_factor_per_m ,utilisation,laterally_restrained\n"
                 "# comment\n\n A ,150, 0.5 ,YES\n,,,\nB,120\n", encoding="utf-8")
    s = schedule_mod.read_schedule_columns(p)
    assert [(s.where(i), s.row(i)) for i in range(s.n)] == [
        ("s.csv row 4", {"name": "A", "section_factor_per_m": 150.0, "utilisation": 0.5, "laterally_restrained": True}),
        ("s.csv row 6", {"name": "B", "section_factor_per_m": 120.0})]
    for text, message in [
        ("name,section_factor_per_m\nA,150\nB,150,7\n", "s.csv row 3 = 'B,150,7': has 3 cells; the header has 2"),
        ("name,section_factor_per_m\nA,nan\nB,x\n", "s.csv row 2 column section_factor_per_m = 'nan': must be a "
                                                    "finite number"),
        ("name,laterally_restrained\nA,maybe\n", "s.csv row 2 column laterally_restrained = 'maybe': must be true "
                                                  "or false"),
        ("name,section_factor_per_m\n# only a comment\n", "members_file = 's.csv': has a header but no member rows"),
    ]:
        p.write_text(text, encoding="utf-8")
        with pytest.raises(InputError) as fast:
            schedule_mod.read_schedule_columns(p)
        with pytest.raises(InputError) as slow:
            schedule_mod.read_schedule(p)
        assert str(fast.value) == str(slow.value) == message


# ----------------------------------------------------------------------------------------------
# whole cases: the fast load against the same load with every fast path replaced by its row reader


def _reference_check_protection_step(members, materials, code, time_step_s, field="analysis.time_step_s",
                                     places=None):
    for i, m in enumerate(members):
        err = case_mod._protection_step_error(i, m, materials, code, time_step_s, field, places)
        if err is not None:
            raise err


def _row_reader_load(data, base_dir):
    with mock.patch.object(case_mod, "_members_of", lambda rows, materials, code: [
            case_mod._read_member(rows.row(i), rows.where(i), materials, code) for i in range(rows.n)]), \
         mock.patch.object(schedule_mod, "read_schedule_columns", lambda path: _PairRows(
             schedule_mod.read_schedule(path))), \
         mock.patch.object(case_mod, "check_protection_step", _reference_check_protection_step):
        return case_from_dict(data, base_dir=base_dir)


@st.composite
def cases(draw):
    """A standard-fire case with inline members and (or) a schedule, at a drawn time step."""
    data = {
        "title": "fast path",
        "fire": {"curve": "standard", "duration_min": 60.0},
        "analysis": {"time_step_s": draw(st.sampled_from([0.5, 5.0, 5.0, 30.0])),
                     "standard_horizon_min": draw(st.sampled_from([60.0, 240.0, 240.0]))},
        "materials": MATERIALS,
        "member": draw(st.lists(member_rows(changes=st.sampled_from([0, 0, 0, 1, 2])), max_size=4)),
    }
    text = None
    if draw(st.booleans()):
        data["members_file"] = "s.csv"
        text = draw(schedules())
    return data, text


@settings(max_examples=400, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(cases())
def test_case_loads_match_the_row_readers(drawn):
    data, text = drawn
    with tempfile.TemporaryDirectory() as tmp:
        if text is not None:
            _schedule_file(tmp, text)
        fast = outcome(lambda: case_from_dict(data, base_dir=tmp))
        slow = outcome(lambda: _row_reader_load(data, tmp))
    assert fast[0] == slow[0], (fast, slow)
    if fast[0] == "error":
        assert fast[1] == slow[1]
    else:
        assert_same_members(("ok", fast[1].members), ("ok", slow[1].members))
        assert fast[1] == slow[1]


def test_long_schedule_takes_the_fast_path_and_matches(tmp_path):
    """2,000 clean rows: no row goes to the row reader, and the Members equal the row reader's."""
    text = ["name,kind,section_factor_per_m,critical_temperature_C,utilisation,required_minutes,protection,"
            "thickness_mm,shadow_factor,laterally_restrained"]
    for i in range(2000):
        if i % 3 == 0:
            text.append(f"M{i},column,{50 + i % 200},,0.{i % 9 + 1},30,,,0.{i % 9 + 1},")
        elif i % 3 == 1:
            text.append(f"M{i},beam,{100 + i % 50}.5,{500 + i % 100},,60,board,{10 + i % 20},,"
                        f"{('true', 'YES', ' no ', 'False', '1', '0')[i % 6]}")
        else:
            text.append(f"M{i},,{100 + i % 50},{550 + i % 100},,,table,,,")
    p = tmp_path / "s.csv"
    p.write_text("\n".join(text) + "\n", encoding="utf-8")
    with mock.patch.object(schedule_mod, "_row_dicts", side_effect=AssertionError("row reader called")):
        s = schedule_mod.read_schedule_columns(p)
    with mock.patch.object(case_mod, "_read_member", side_effect=AssertionError("row reader called")):
        fast = case_mod._members_of(s, MATS, CODE)
    slow = _per_row(_PairRows(schedule_mod.read_schedule(p)))
    assert_same_members(("ok", fast), ("ok", slow))
    inline = case_mod._InlineRows([s.row(i) for i in range(s.n)])
    with mock.patch.object(case_mod, "_read_member", side_effect=AssertionError("row reader called")):
        assert case_mod._members_of(inline, MATS, CODE) == slow


def test_first_error_wins_across_inline_tables_and_schedule(tmp_path):
    """An error in a [[member]] table comes before one in a later schedule row; a bad schedule cell
    comes before both (the file is read before any member is checked); a repeated name names both."""
    (tmp_path / "s.csv").write_text("name,section_factor_per_m,utilisation\nS1,150,0.5\nS2,-3,0.5\n")
    data = {"fire": {"curve": "standard", "duration_min": 60.0}, "members_file": "s.csv",
            "member": [{"name": "T1", "section_factor_per_m": 150.0, "utilisation": 0.5},
                       {"name": "T2", "section_factor_per_m": 150.0, "utilisation": 2.0}]}
    with pytest.raises(InputError, match=r"^member\[2\] \(T2\)\.utilisation = 2\.0"):
        case_from_dict(data, base_dir=tmp_path)
    data["member"][1]["utilisation"] = 0.5
    with pytest.raises(InputError, match=r"^s\.csv row 3 \(S2\)\.section_factor_per_m = -3\.0"):
        case_from_dict(data, base_dir=tmp_path)
    (tmp_path / "s.csv").write_text("name,section_factor_per_m,utilisation\nT1,150,0.5\n")
    with pytest.raises(InputError, match=r"^s\.csv row 2 \(T1\)\.name = 'T1': must be unique \(also member\[1\]\)$"):
        case_from_dict(data, base_dir=tmp_path)
    (tmp_path / "s.csv").write_text("name,section_factor_per_m,utilisation\nS1,abc,0.5\n")
    data["member"][1]["utilisation"] = 2.0
    with pytest.raises(InputError, match=r"^s\.csv row 2 column section_factor_per_m = 'abc'"):
        case_from_dict(data, base_dir=tmp_path)
    (tmp_path / "s.csv").write_text("name,section_factor_per_m,utilisation,required_minutes\n"
                                    "S1,150,0.5,60\nS2,150,0.5,300\n")
    data["member"][1]["utilisation"] = 0.5
    with pytest.raises(InputError) as info:
        case_from_dict(data, base_dir=tmp_path)
    assert str(info.value) == ("s.csv row 3 (S2).required_minutes = 300.0: "
                               "must be <= analysis.standard_horizon_min = 240 min")


# ----------------------------------------------------------------------------------------------
# the time-step check on protection thickness


@settings(max_examples=300, deadline=None)
@given(st.lists(st.tuples(st.sampled_from(["board", "table", "generic-coating-thin", "generic-board-gypsum"]),
                          st.floats(1.0, 1000.0), st.sampled_from(["at", "above", "below", "scaled"]),
                          st.floats(0.5, 1.5)),
                min_size=1, max_size=8),
       st.sampled_from([1.0, 5.0, 30.0, 60.0]))
def test_protection_step_matches_the_member_by_member_check(specs, dt):
    """Thicknesses at each member's least thickness, one float above or below it, or scaled."""
    members = [Member(name="bare", kind="beam", section_factor_per_m=100.0, utilisation=0.5)]
    for i, (mat, am_v, where, scale) in enumerate(specs):
        d_min = _least_thickness_mm(mat, am_v, dt)
        d = {"at": d_min, "above": _up(d_min), "below": _down(d_min), "scaled": d_min * scale}[where]
        members.append(Member(name=f"P{i}", kind="beam", section_factor_per_m=am_v, protection=mat, thickness_mm=d))
    fast = outcome(lambda: case_mod.check_protection_step(members, MATS, CODE, dt))
    slow = outcome(lambda: _reference_check_protection_step(members, MATS, CODE, dt))
    assert fast == slow


def _least_thickness_mm(mat, am_v, dt):
    """The least thickness exactly as the member-by-member check computes it."""
    from steelfire.models.heat import stable_min_thickness_m

    m = MATS[mat]
    lam = max(v for _, v in m.conductivity_table)
    return 1e3 * float(stable_min_thickness_m(lam, m.specific_heat, m.density, am_v, dt, CODE["steel_density_kg_m3"]))


def test_protection_step_names_the_first_thin_member():
    ok = Member(name="ok", kind="beam", section_factor_per_m=200.0, protection="board", thickness_mm=20.0)
    thin = [Member(name=f"thin{i}", kind="beam", section_factor_per_m=200.0, protection="board",
                   thickness_mm=0.01 * (i + 1)) for i in range(2)]
    with pytest.raises(InputError) as info:
        case_mod.check_protection_step([ok, thin[1], ok, thin[0]], MATS, CODE, 30.0, "--time-step-s")
    assert info.value.field == "member[2] (thin1).thickness_mm"
    assert "(--time-step-s)" in info.value.allowed
    case_mod.check_protection_step([ok, ok], MATS, CODE, 30.0)  # nothing thin: no error
    unknown = dataclasses.replace(ok, protection="unknown")
    with pytest.raises(InputError, match="thin1"):  # an earlier thin member before the unknown material
        case_mod.check_protection_step([thin[1], unknown], MATS, CODE, 30.0)
    with pytest.raises(KeyError):  # as the member-by-member check: a material missing from the case
        case_mod.check_protection_step([ok, unknown, thin[1]], MATS, CODE, 30.0)


# ----------------------------------------------------------------------------------------------
# pieces


@settings(max_examples=200, deadline=None)
@given(st.lists(member_rows(), min_size=1, max_size=4))
def test_members_built_directly_equal_members_built_by_init(tables):
    """_checked_member(fields) is Member(**fields) in ==, hash, repr, fields, replace and pickle."""
    rows = case_mod._InlineRows(tables)
    try:
        members = case_mod._members_of(rows, MATS, CODE)
    except InputError:
        return
    for m in members:
        ref = Member(**{f.name: getattr(m, f.name) for f in dataclasses.fields(Member)})
        assert m == ref and ref == m and hash(m) == hash(ref) and repr(m) == repr(ref)
        assert dataclasses.asdict(m) == dataclasses.asdict(ref)
        assert pickle.loads(pickle.dumps(m)) == ref
        assert dataclasses.replace(m, name="other") == dataclasses.replace(ref, name="other")
        with pytest.raises(dataclasses.FrozenInstanceError):
            m.name = "changed"


def test_checked_member_assumptions():
    """_checked_member skips Member.__init__: only sound while Member has no __post_init__ and no
    default factory, and while the fast path gives every field."""
    assert not hasattr(Member, "__post_init__")
    assert all(f.default_factory is dataclasses.MISSING for f in dataclasses.fields(Member))
    fast = case_mod._members_of(case_mod._InlineRows([{"name": "A", "section_factor_per_m": 50, "utilisation": 0.5}]),
                                MATS, CODE)[0]
    assert set(vars(fast)) == {f.name for f in dataclasses.fields(Member)}
    assert fast == Member(name="A", kind="beam", section_factor_per_m=50.0, utilisation=0.5)
    assert type(fast.section_factor_per_m) is float


VALUES = st.one_of(st.sampled_from([2 ** 63, 2 ** 63 - 1, -(2 ** 63), -(2 ** 63) - 1, 0, 7]),
                   st.integers(-(2 ** 64), 2 ** 64), st.floats(), st.text(max_size=2), st.booleans())


@settings(max_examples=300, deadline=None)
@given(st.lists(st.one_of(st.dictionaries(st.sampled_from(["a", "b", "c"]),
                                          st.one_of(VALUES, st.lists(VALUES, max_size=2),
                                                    st.dictionaries(st.just("x"), VALUES))),
                          VALUES), max_size=5))
def test_integer_check_shortcut_matches_the_walk(items):
    """The whole-list test that lets _check_integers skip a [[member]] array never hides an error."""
    fast = outcome(lambda: case_mod._check_integers({"member": items}, ""))
    with mock.patch.object(case_mod, "_flat_tables_fit", lambda items: False):
        slow = outcome(lambda: case_mod._check_integers({"member": items}, ""))
    assert fast == slow


def test_collector_resumed_after_loading():
    """The cyclic garbage collector, paused while members are read, runs again after, also after an
    error; a collector the caller had switched off stays off."""
    data = {"fire": {"curve": "standard", "duration_min": 60.0},
            "member": [{"name": "A", "section_factor_per_m": 150.0, "utilisation": 0.5}]}
    assert gc.isenabled()
    case_from_dict(data)
    assert gc.isenabled()
    data["member"][0]["utilisation"] = 5.0
    with pytest.raises(InputError):
        case_from_dict(data)
    assert gc.isenabled()
    gc.disable()
    try:
        with pytest.raises(InputError):
            case_from_dict(data)
        assert not gc.isenabled()
    finally:
        gc.enable()


@settings(max_examples=300, deadline=None)
@given(st.lists(st.lists(st.sampled_from(["", " ", "#", " #x", "a", "\u3000", "\t1", "x#", "\x1c"]),
                         max_size=3), max_size=6))
def test_row_filter_quick_test_agrees_with_the_rule(rows):
    """csvrows keeps a row by a quick test on its first character, else by the full rule."""
    text = io.StringIO()
    csv.writer(text, lineterminator="\n").writerows(rows)
    with tempfile.TemporaryDirectory() as tmp:
        p = Path(tmp) / "r.csv"
        p.write_text(text.getvalue(), encoding="utf-8")
        from steelfire.inputs.csvrows import _holds_data, read_rows

        got = read_rows(p, "f", "rows")
        with p.open(newline="", encoding="utf-8-sig") as fh:
            every = list(csv.reader(fh))
    assert got == [(i + 1, r) for i, r in enumerate(every) if _holds_data(r)]
