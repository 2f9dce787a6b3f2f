"""Results held by column (steelfire.results.MemberTable) agree with the member objects made from them.

analyse() keeps the members' verdicts as columns and makes the MemberResult objects only when they
are asked for; the compact JSON and ``all_ok`` of an untouched result come from the columns. Both
forms must give the same document, character for character, and the same verdicts; once an object
has been handed out, a change to it must show in the document. The per-member references here are
the objects themselves and the plain per-member twins of tests/test_columns.py.
"""

import dataclasses
import json
import random
from pathlib import Path

import numpy as np
import pytest

import steelfire
from steelfire.chain import analysis
from steelfire import results
from steelfire.results import MemberResults

from test_columns import equivalence_twin, member_dict_twin, routes_of  # noqa: E402  (tests/ is on the path)

ROOT = Path(__file__).resolve().parents[1]
CASES = sorted((ROOT / "cases").glob("*.toml"))
COMPACT = {"separators": (",", ":"), "allow_nan": False}


def _fresh(case, histories=False):
    return steelfire.analyse(case, histories=histories)


@pytest.mark.parametrize("case", CASES, ids=lambda p: p.stem)
def test_columns_equal_the_objects_columns(case):
    res = _fresh(steelfire.load_case(case))
    table = res.members.table
    assert table is not None  # nothing asked for yet
    cols = table.columns()
    objs = table.members()
    ref = results._member_columns(objs)
    for k, v in cols.items():
        if isinstance(v, np.ndarray):
            np.testing.assert_array_equal(v, ref[k], err_msg=k)  # NaN where null, on both sides
        else:
            assert v == ref[k], k
    # the verdicts: all_ok from the columns, then from the objects
    assert res.all_ok == all(m.ok for m in objs)
    np.testing.assert_array_equal(table.ok(), [m.ok for m in objs])


@pytest.mark.parametrize("case", CASES, ids=lambda p: p.stem)
def test_compact_text_from_columns_equals_objects_and_twin(case):
    c = steelfire.load_case(case)
    res = _fresh(c)
    from_columns = res.to_json_compact()
    assert res.members.table is not None  # written without making the objects
    ms = list(res.members)  # now the objects stand
    assert res.members.table is None
    assert from_columns == res.to_json_compact() == json.dumps(res.to_dict(), **COMPACT)
    # and against the contract's per-member form
    assert json.loads(from_columns)["members"] == [member_dict_twin(m) for m in ms]


def test_large_schedule_columns_equal_objects():
    """Some hundreds of members with every combination the bundled cases have, shuffled."""
    base = steelfire.load_case(ROOT / "cases" / "office_floor.toml")
    members = list(base.members) * 5
    random.Random(3).shuffle(members)
    members = [dataclasses.replace(m, name=f"{m.name}#{i} \u00e9\"") for i, m in enumerate(members)]
    res = _fresh(dataclasses.replace(base, members=tuple(members)), histories=True)
    text = res.to_json_compact()
    assert text == json.dumps(res.to_dict(), **COMPACT)
    # histories are copied out of the table per member
    t = res.fire.time_s
    for j in (0, 7, len(members) - 1):
        h = res.members[j].steel_temperature_C
        # steel starts at 20 C (EN 1993-1-2 4.2.5 with the ambient 20 C of EN 1991-1-2 3.2.1: common practice)
        assert h.shape == t.shape and h[0] == 20.0
        assert max(h) == pytest.approx(res.members[j].peak_steel_temperature_C, abs=1e-9)


def test_a_change_to_a_member_object_shows_in_the_document():
    res = _fresh(steelfire.load_case(ROOT / "cases" / "office_bay.toml"))
    before = res.to_json_compact()
    res.members[0].peak_steel_temperature_C += 100.0
    after = res.to_json_compact()
    assert after != before
    assert after == json.dumps(res.to_dict(), **COMPACT)
    assert json.loads(after)["members"][0]["peak_steel_temperature_C"] == round(
        res.members[0].peak_steel_temperature_C, 2)
    assert res.all_ok == all(m.ok for m in res.members)


def test_member_results_behave_as_a_sequence():
    res = _fresh(steelfire.load_case(ROOT / "cases" / "office_bay.toml"))
    n = len(res.members)  # the length does not make the objects
    assert res.members.table is not None
    ms = list(res.members)
    assert len(ms) == n and res.members[0] is ms[0] and res.members[-1] is ms[-1]
    assert res.members == ms and res.members[1:] == ms[1:]
    assert isinstance(res.members, MemberResults) and ms[0] in res.members


def test_distinct_verdicts_are_few_and_each_entry_is_the_twins():
    """The equivalence verdicts are packed in one code per member: a schedule of hundreds of members
    has a handful of distinct codes, and the entries they give equal the per-member twin."""
    base = steelfire.load_case(ROOT / "cases" / "office_floor.toml")
    members = list(base.members) * 4
    c = dataclasses.replace(base, members=tuple(dataclasses.replace(m, name=f"{m.name}-{i}")
                                                for i, m in enumerate(members)))
    fire = analysis.design_fire(c)
    rng = np.random.default_rng(2)
    n = len(members)
    equal_t = rng.uniform(10.0, 300.0, n) * 60.0
    equal_t[::5] = np.nan
    cross = rng.uniform(10.0, 300.0, n) * 60.0
    cross[2::7] = np.nan
    factors, cols = analysis._equivalence(c, fire, c.members, equal_t, [], cross)
    assert len(cols.verdicts) <= 2 ** len(results._VERDICT_BITS)
    assert len(set(cols.code.tolist())) == len(cols.verdicts) < n // 4
    entries = cols.entries()
    assert entries == analysis.equivalence_routes(c, fire, c.members, equal_t, [], cross)["members"]
    annex_f, cib = routes_of(c.members, entries)
    assert annex_f  # office_floor has a compartment: the twin sees the routes' times
    assert entries == equivalence_twin(c.members, annex_f, cib, equal_t, cross, c.analysis.standard_horizon_min)


def test_round_and_sig_columns_take_arrays_as_lists():
    rng = np.random.default_rng(4)
    a = np.concatenate([rng.uniform(-1e4, 1e4, 500), [np.nan, 0.125, 2.675, 1e-7, 1e22, np.inf]])
    as_list = [None if v != v else float(v) for v in a]
    assert results.round_column(a) == results.round_column(as_list)
    assert results.sig_column(a) == results.sig_column(as_list)
