"""Every clause value of the registry (steelfire.codevalues.DEFINITIONS) is read by the tool.

For each entry, some admissible ``[code]`` override (just inside a band or scope limit, the range ends,
2x, 0.5x) must change the --json document (its ``code_values`` echo and version aside) or the
exit code of at least one case: the bundled cases, and the small cases in tests/cases/ written to reach
values no bundled case reaches (other Table E.1 rows, the hydrocarbon and external curves, Annex F roof
openings and small compartments, b bands, an unassessed b, ...). A value no override can reach is dead:
its override would be echoed in ``code_values`` while changing nothing, which an engineer would take for
a national choice applied. The entries are read when the tests are collected, so values registered later
(the resistance values, say) are covered too.

Runs in-process (``steelfire.analyse`` on ``case_from_dict``, the exit code as the CLI gives it: 0 all
pass, 1 some member fails, 2 refused); the cases are short and coarse enough to keep this fast.
"""

from __future__ import annotations

import copy
import functools
import math
try:
    import tomllib
except ImportError:  # pragma: no cover - Python 3.10
    import tomli as tomllib
from pathlib import Path

import pytest

import steelfire
from steelfire import codevalues
from steelfire.errors import InputError
from steelfire.inputs.case import case_from_dict

ROOT = Path(__file__).resolve().parents[1]
#: The small test cases first (a few hundredths of a second each), then the bundled ones.
CASE_FILES = sorted((ROOT / "tests" / "cases").glob("*.toml")) + sorted((ROOT / "cases").glob("*.toml"))
NAMES = sorted(codevalues.DEFINITIONS)


@functools.lru_cache(maxsize=None)
def case_data(path: Path) -> dict:
    with path.open("rb") as fh:
        return tomllib.load(fh)


def outcome(path: Path, overrides: dict):
    """(exit code, document without code_values and version) of ``path`` with ``[code]`` overrides added;
    None if the overrides themselves are refused (not admissible)."""
    data = copy.deepcopy(case_data(path))
    data["code"] = {**data.get("code", {}), **overrides}
    try:
        case = case_from_dict(data, base_dir=path.parent, source=None)
        result = steelfire.analyse(case, histories=False)
    except InputError as exc:
        if exc.field.startswith("code."):
            return None
        return 2, str(exc)
    doc = steelfire.document(result)
    for k in ("code_values", "steelfire_version"):
        doc.pop(k, None)
    return (0 if result.all_ok else 1), doc


@functools.lru_cache(maxsize=None)
def baseline(path: Path):
    return outcome(path, {})


def candidates(name: str) -> list:
    """Admissible-looking overrides of ``name``, the likeliest to change an output first: just inside the
    value it is ordered against (a band or scope limit), the range ends, 2x and 0.5x."""
    d = codevalues.DEFINITIONS[name]
    v, lo, hi = d.value, d.minimum, d.maximum
    out = [hi, lo, 2.0 * v, 0.5 * v]
    for low, high in codevalues.ORDERED_PAIRS:
        if name == low:
            out.insert(0, codevalues.DEFAULTS[high] * (1.0 - 1e-3))
        if name == high:
            out.insert(0, codevalues.DEFAULTS[low] * (1.0 + 1e-3))
    seen = []
    for x in out:
        if lo <= x <= hi and x != v and math.isfinite(x) and x not in seen:
            seen.append(x)
    return seen


#: Values that only a compartment with its fire load can reach: Annex A (the parametric fire), Table E.1
#: and the growth rates of Annex E, Annex F and CIB W14 (DESIGN.md: [compartment] and [fire_load] are
#: needed for the parametric curve and for time equivalence). Cases without both are not tried for them.
NEEDS_COMPARTMENT = ("annex_a_", "delta_q1_", "t_lim_", "annex_f_", "cib_w14_")


def relevant(name: str, path: Path) -> bool:
    data = case_data(path)
    return not name.startswith(NEEDS_COMPARTMENT) or ("compartment" in data and "fire_load" in data)


def changes(name: str):
    """The first (override, case) that changes the outcome, else None."""
    paths = [p for p in CASE_FILES if relevant(name, p)]
    for value in candidates(name):
        for path in paths:
            got = outcome(path, {name: value})
            if got is not None and got != baseline(path):
                return value, path
    return None


#: Values found dead when this test was written, reported to the lead (strict: reaching one shows as XPASS).
DEAD = {
    "annex_f_kc_reinforced_concrete": "no case reaches it: the chain checks steel members only (k_c of Table F.1 "
                                      "for reinforced concrete is never asked for)",
    "annex_f_kb_general": "no case reaches it: a compartment needs thermal_inertia or surfaces (refused as "
                          "'compartment.thermal_inertia = None: is missing ...'), so b is always assessed; the "
                          "value serves the library function equivalence.annex_f_conversion_factor(thermal_inertia=None)",
    "cib_w14_c_general": "no case reaches it: b is always assessed (see annex_f_kb_general)",
}


def test_dead_list_names_registry_entries():
    """A renamed entry must not leave its old name here (the xfail would then mark nothing)."""
    assert set(DEAD) <= set(NAMES), sorted(set(DEAD) - set(NAMES))


def _param(name):
    marks = [pytest.mark.xfail(strict=True, reason="reported: " + DEAD[name])] if name in DEAD else []
    return pytest.param(name, marks=marks, id=name)


@pytest.mark.parametrize("name", [_param(n) for n in NAMES])
def test_every_code_value_reaches_an_output(name):
    found = changes(name)
    assert found is not None, (f"code value {name!r} ({codevalues.DEFINITIONS[name].clause}): no admissible "
                               f"override {candidates(name)} changes the output of any of "
                               f"{[p.name for p in CASE_FILES]}")
