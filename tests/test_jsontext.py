"""The column-wise JSON writer (steelfire.jsontext) writes what ``json.dumps`` writes.

The reference is the standard library's ``json.dumps`` (its C encoder, ``float.__repr__`` for
numbers): the writer must give the same text character for character, or decline (None) so that
the caller falls back to ``json.dumps``. It must never give a different text.
"""

import dataclasses
import json
import math
import random
from pathlib import Path

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

import steelfire
from steelfire import cli, results
from steelfire.outputs.jsontext import Numbers, objects_json

ROOT = Path(__file__).resolve().parents[1]
CASES = sorted((ROOT / "cases").glob("*.toml"))
COMPACT = {"separators": (",", ":")}


def reference(columns):
    """json.dumps of the rows, brackets dropped: the text objects_json must equal."""
    keys = list(columns)
    n = len(columns[keys[0]].values if isinstance(columns[keys[0]], Numbers) else columns[keys[0]])
    rows = []
    for i in range(n):
        row = {}
        for k in keys:
            c = columns[k]
            if isinstance(c, Numbers):
                v = c.values[i]
                row[k] = None if v is None or v != v else float(v)
            else:
                row[k] = json.loads(c[i])
        rows.append(row)
    return json.dumps(rows, **COMPACT)[1:-1]


# values where repr changes form or the grid check matters: zeros of both signs, the switch to
# exponent notation at 1e16 and below 1e-4, the largest integers a double holds exactly, tiny and
# huge values, values one ulp off the grid
EDGES = [0.0, -0.0, 1e16, 9999999999999998.0, 1e15, 999999999999999.9, 1e-4, 1e-5, 0.0001234, 0.00009999,
         123456789012345.67, 0.1, 0.01, -0.01, 1.0, 100.0, 5e-324, 1.7976931348623157e308, 281.51, -272.77,
         143.203, 2.5, 0.6, 1234567.0, 12345600000.0, 0.30000000000000004, 599.9999999999999, 1e22, 1e-22,
         1e23, math.nextafter(281.51, 1e9), math.nextafter(0.01, 0.0), 2.0 ** 53, 2.0 ** 52 + 0.5, None,
         float("nan")]


@pytest.mark.parametrize("grid", [{"places": 2}, {"places": 0}, {"places": 4}, {"sig": 6}, {"sig": 15}],
                         ids=str)
def test_edge_numbers_equal_json_dumps_or_decline(grid):
    for v in EDGES:
        cols = {"v": Numbers([v], **grid)}
        got = objects_json(cols)
        assert got is None or got == reference(cols), (v, grid, got)
    # on-grid values in the plain-notation range are always written (never declined)
    for v in (0.0, -0.0, 281.51, -272.77, 0.01, 1e12, 123456789012.34):
        assert objects_json({"v": Numbers([round(v, 2)])}) == reference({"v": Numbers([round(v, 2)])}), v


def test_infinity_is_declined():
    assert objects_json({"v": Numbers([1.0, float("inf")])}) is None
    assert objects_json({"v": Numbers([-float("inf")])}) is None


finite = st.floats(allow_nan=False, allow_infinity=False)
scaled = st.builds(lambda m, e: m * 10.0 ** e, st.floats(-10, 10, allow_nan=False), st.integers(-8, 17))


@settings(max_examples=300, deadline=None)
@given(st.lists(st.one_of(finite, scaled, st.none()), min_size=1, max_size=30), st.integers(0, 4))
def test_rounded_columns_equal_json_dumps(vals, nd):
    """Columns as the result document rounds them (round_column, sig_column) are written exactly;
    on the grid and in repr's plain-notation range they are never declined."""
    # plain: repr has no exponent (1e-4 <= |v| < 1e16) and the grid's integer m is below 1e15
    for col, grid, plain in (
            (results.round_column(vals, nd), {"places": nd}, lambda v: 1e-4 <= abs(v) and abs(v) * 10 ** nd < 1e15),
            (results.sig_column(vals), {"sig": 6}, lambda v: 1e-4 <= abs(v) < 1e16)):
        cols = {"v": Numbers(col, **grid), "k": ["true"] * len(col)}
        got = objects_json(cols)
        plain = all(v is None or v == 0 or plain(v) for v in col)
        if plain:
            assert got == reference(cols)
        else:
            assert got is None or got == reference(cols)


@settings(max_examples=200, deadline=None)
@given(st.lists(finite, min_size=1, max_size=30), st.integers(0, 6), st.integers(0, 8))
def test_any_floats_are_written_exactly_or_declined(vals, nd, sig):
    """Off-grid values: never a wrong text."""
    cols = {"v": Numbers(vals, places=nd, sig=sig)}
    got = objects_json(cols)
    assert got is None or got == reference(cols)


def test_fragments_keys_and_row_separator():
    esc = json.encoder.encode_basestring_ascii
    names = ["B1", 'quote " and \\ backslash', "é and 日本", "", "line\nbreak"]
    cols = {"name": [esc(s) for s in names], "t": Numbers([1.5, None, -0.0, 20.25, 0.07]),
            "ok": ["true", "false", "null", "true", "false"], "nested": ['{"a":[1,2]}', "null", "[]", "{}", '"x"']}
    assert objects_json(cols) == reference(cols)
    assert objects_json(cols, row_separator="\n").split("\n") == [
        json.dumps(r, **COMPACT) for r in json.loads("[" + reference(cols) + "]")]
    # fragments are ASCII (ensure_ascii); anything else is declined rather than mis-measured
    assert objects_json({"name": ['"é"']}) is None
    with pytest.raises(ValueError, match="rows"):
        objects_json({"a": Numbers([1.0, 2.0]), "b": ["1"]})


# ------------------------------------------------------------------------------------------------
# the result document


def compact_reference(result):
    return json.dumps(result.to_dict(), separators=(",", ":"), allow_nan=False)


@pytest.mark.parametrize("case", CASES, ids=lambda p: p.stem)
def test_document_text_equals_json_dumps(case):
    res = steelfire.analyse(steelfire.load_case(case), histories=False)
    assert res.to_json_compact() == compact_reference(res)


def test_large_shuffled_schedule_equals_json_dumps():
    base = steelfire.load_case(ROOT / "cases" / "office_floor.toml")
    members = list(base.members) * 8
    random.Random(11).shuffle(members)
    members = [dataclasses.replace(m, name=f"{m.name}/{i} é") for i, m in enumerate(members)]
    res = steelfire.analyse(dataclasses.replace(base, members=tuple(members)), histories=False)
    assert res.to_json_compact() == compact_reference(res)
    # values the kernel declines (an exponent-notation number) send the whole list through json.dumps
    res.members[3].section_factor_per_m = 1e-5
    assert res.to_json_compact() == compact_reference(res)
    assert '"section_factor_per_m":1e-05' in res.to_json_compact()


def test_sized_members_go_through_json_dumps():
    from steelfire.chain.analysis import size

    res = size(steelfire.load_case(ROOT / "cases" / "archive_room.toml"))
    assert any(m.sizing is not None for m in res.members)
    assert res.to_json_compact() == compact_reference(res)


def test_cli_compact_document_equals_json_dumps(monkeypatch, capsys):
    """Above COMPACT_JSON_MEMBERS members the CLI prints the compact text; the same document."""
    case = ROOT / "cases" / "office_floor.toml"
    cli.main(["check", str(case), "--json"])
    indented = capsys.readouterr().out
    monkeypatch.setattr(cli, "COMPACT_JSON_MEMBERS", 0)
    cli.main(["check", str(case), "--json"])
    compact = capsys.readouterr().out
    assert compact != indented and "\n" not in compact.rstrip("\n")
    assert json.loads(compact) == json.loads(indented)
    assert compact.rstrip("\n") == json.dumps(json.loads(indented), separators=(",", ":"))


def test_verdicts_that_compare_equal_but_write_differently():
    """1 == True == numpy.True_ as dict keys, but json.dumps writes 1 and true, and refuses numpy's
    bool: the writer must not reuse one member's verdict text for another's (found by review)."""
    res = steelfire.analyse(steelfire.load_case(ROOT / "cases" / "office_floor.toml"), histories=False)
    with_eq = [m for m in res.members if m.equivalence is not None and m.equivalence["resists"]]
    assert len(with_eq) >= 3
    # two members whose verdict keys compare equal: ((), (("annex_f", True),), None) == (..., 1 ...)
    for m, v in ((with_eq[1], True), (with_eq[2], 1)):
        m.equivalence = dict(m.equivalence, unconservative=[], resists={"annex_f": v}, meets_required=None)
    assert res.to_json_compact() == compact_reference(res)
    assert '"resists":{"annex_f":1}' in res.to_json_compact()
    with_eq[2].equivalence = dict(with_eq[2].equivalence, resists={"annex_f": np.True_})
    with pytest.raises(TypeError):
        compact_reference(res)
    with pytest.raises(TypeError):
        res.to_json_compact()
