"""Bad input through the command line.

Every refused case must give exactly one line on stderr,
``steelfire: error: <field> = <value>: <what is allowed>``, exit code 2, nothing on stdout and no
traceback, in each of the three ways of running a check: plain, ``--json`` and ``--time-step-s S``.
The command runs in-process (``steelfire.cli.main``, tests/cli_run.py): an uncaught exception would be
exit code 3 there; tests/test_cli.py runs a few refusals in a real process.

Cases are built in ``tmp_path`` from small valid base cases (a nominal-fire case, a parametric-fire
case, a tabulated-curve case), each changed in one place. The base cases themselves are run first
(``test_base_cases_run``): a test here can only pass because of the change it makes.
"""

from __future__ import annotations

import copy
import json
import math
import re
from pathlib import Path

import pytest

import cli_run

ROOT = Path(__file__).resolve().parents[1]

#: The one line of a refusal: field, value, what is allowed.
ERROR_LINE = re.compile(r"^steelfire: error: (?P<field>.+?) = (?P<rest>.+): (?P<allowed>.+)$")

#: The ways of running a check; the extra arguments of a test come after these (the last
#: ``--time-step-s`` given wins, so a test of that option still tests its own value).
MODES = {"plain": (), "json": ("--json",), "time-step": ("--time-step-s", "1")}

DELETE = object()


# ----------------------------------------------------------------------------------------------
# a small TOML writer (the stdlib reads TOML but does not write it)

_BARE_KEY = re.compile(r"^[A-Za-z0-9_-]+$")


def _key(k):
    return k if _BARE_KEY.match(k) else json.dumps(k)


def _value(v):
    if isinstance(v, bool):
        return "true" if v else "false"
    if isinstance(v, int):
        return str(v)
    if isinstance(v, float):
        if math.isnan(v):
            return "nan"
        if math.isinf(v):
            return "inf" if v > 0 else "-inf"
        return repr(v)
    if isinstance(v, str):
        return json.dumps(v)  # a JSON string is a valid TOML basic string
    if isinstance(v, (list, tuple)):
        return "[" + ", ".join(_value(x) for x in v) + "]"
    if isinstance(v, dict):
        return "{ " + ", ".join(f"{_key(k)} = {_value(x)}" for k, x in v.items()) + " }"
    raise TypeError(f"no TOML form for {v!r}")


def _is_array_of_tables(v):
    return isinstance(v, list) and bool(v) and all(isinstance(x, dict) for x in v)


def to_toml(data: dict, prefix: str = "") -> str:
    """TOML text of a dict: plain keys first, then [tables] and [[arrays of tables]]."""
    lines = [f"{_key(k)} = {_value(v)}" for k, v in data.items()
             if not isinstance(v, dict) and not _is_array_of_tables(v)]
    for k, v in data.items():
        name = prefix + _key(k)
        if isinstance(v, dict):
            lines += ["", f"[{name}]", to_toml(v, name + ".")]
        elif _is_array_of_tables(v):
            for item in v:
                lines += ["", f"[[{name}]]", to_toml(item, name + ".")]
    return "\n".join(lines) + "\n"


def test_toml_writer_round_trips():
    try:
        import tomllib
    except ImportError:  # pragma: no cover - Python 3.10
        import tomli as tomllib

    for base in BASES.values():
        data = base()
        assert tomllib.loads(to_toml(data)) == data


# ----------------------------------------------------------------------------------------------
# valid base cases


def _members():
    return [
        {"name": "B1", "kind": "beam", "laterally_restrained": True, "section_factor_per_m": 150.0,
         "utilisation": 0.5, "protection": "board", "thickness_mm": 15.0, "required_minutes": 30.0},
        {"name": "T1", "kind": "tension", "section_factor_per_m": 120.0, "utilisation": 0.4},
    ]


def _materials():
    return {"board": {"density": 800.0, "conductivity": 0.2, "specific_heat": 1700.0, "moisture_percent": 0.0}}


def nominal_case():
    """Standard fire, one protected beam and one bare tension member."""
    return {
        "title": "bad-input base: standard fire",
        "fire": {"curve": "standard", "duration_min": 60.0},
        "analysis": {"time_step_s": 5.0, "standard_horizon_min": 120.0},
        "materials": _materials(),
        "member": _members(),
    }


def protected_case():
    """Standard fire, the protected beam only (time step limit 30 s)."""
    c = nominal_case()
    c["member"] = c["member"][:1]
    c["analysis"]["time_step_s"] = 30.0
    return c


def parametric_case():
    """Annex A fire well inside its scope: O = 0.046 m^0.5, b = 1000, q_t,d = 134 MJ/m2."""
    return {
        "title": "bad-input base: parametric fire",
        "compartment": {"floor_area_m2": 100.0, "height_m": 3.0, "boundary_area_m2": 320.0,
                        "thermal_inertia": 1000.0, "roof_opening_area_m2": 0.0,
                        "opening": [{"width_m": 2.0, "height_m": 1.5, "count": 4}]},
        "fire_load": {"characteristic_MJ_m2": 400.0, "combustion_factor": 0.8, "area_factor": "auto",
                      "occupancy_factor": 1.0, "measures_factor": 1.0, "growth": "medium"},
        "fire": {"curve": "parametric", "duration_min": 120.0},
        "analysis": {"time_step_s": 5.0, "standard_horizon_min": 120.0, "allow_out_of_scope": False},
        "materials": _materials(),
        "member": _members(),
    }


def layered_case():
    """The parametric case with b from [[compartment.surface]] layers instead of a number."""
    c = parametric_case()
    del c["compartment"]["thermal_inertia"]
    concrete = {"thickness_m": 0.15, "density": 2300.0, "conductivity": 1.6, "specific_heat": 1000.0}
    c["compartment"]["surface"] = [
        {"area_m2": 200.0, "layers": [dict(concrete)]},
        {"area_m2": 108.0, "layers": [{"thickness_m": 0.1, "density": 1200.0, "conductivity": 0.4,
                                       "specific_heat": 1000.0}]},
    ]
    return c


TABLE_CSV = "time_min,temperature_C\n0,20\n10,600\n30,850\n60,700\n90,300\n"


def table_case():
    """A tabulated gas curve read from x.csv (written next to the case by :func:`write_case`)."""
    c = nominal_case()
    c["title"] = "bad-input base: tabulated fire"
    c["fire"] = {"curve": "table", "file": "x.csv", "duration_min": 90.0}
    return c


BASES = {"nominal": nominal_case, "protected": protected_case, "parametric": parametric_case,
         "layered": layered_case, "table": table_case}


# ----------------------------------------------------------------------------------------------
# helpers


def edited(base: str, *changes):
    """The base case with ``(path, value)`` changes; a path is a tuple of keys and list indices,
    ``DELETE`` removes the key."""
    data = copy.deepcopy(BASES[base]())
    for path, value in changes:
        node = data
        for step in path[:-1]:
            node = node[step]
        if value is DELETE:
            del node[path[-1]]
        else:
            node[path[-1]] = value
    return data


def write_case(tmp_path: Path, data: dict | None = None, *, text: str | bytes | None = None,
               csv: str | None = TABLE_CSV, name: str = "case.toml") -> Path:
    p = tmp_path / name
    if text is None:
        text = to_toml(data)
    if isinstance(text, bytes):
        p.write_bytes(text)
    else:
        p.write_text(text, encoding="utf-8")
    if csv is not None:
        (tmp_path / "x.csv").write_text(csv, encoding="utf-8")
    return p


def run_modes(case_path, *extra, modes=MODES):
    """Run ``steelfire check`` in each mode, in-process (steelfire.cli.main); {mode: CompletedProcess}."""
    return {mode: cli_run.main("check", case_path, *flags, *extra) for mode, flags in modes.items()}


def assert_refused(case_path, field, value, allowed=None, extra=(), modes=MODES):
    """Exit 2, empty stdout, one error line naming ``field`` and ``value`` (and ``allowed``).

    ``field``: the line's field must end with it. ``value``: a string the value part must contain,
    or a float the value must equal (to 1e-3 relative). ``allowed``: a string (or a tuple of strings)
    the rest of the line must contain.
    """
    for mode, r in run_modes(case_path, *extra, modes=modes).items():
        where = f"[{mode}] exit {r.returncode}, stderr {r.stderr!r}, stdout {r.stdout[:200]!r}"
        assert "Traceback" not in r.stderr, where
        assert r.returncode == 2, where
        assert r.stdout == "", where
        assert r.stderr.endswith("\n") and r.stderr.count("\n") == 1, where
        m = ERROR_LINE.match(r.stderr.rstrip("\n"))
        assert m, where
        assert m["field"].endswith(field), where
        rest = r.stderr.rstrip("\n").split(f"{m['field']} = ", 1)[1]
        if isinstance(value, float):
            number = re.match(r"[-+0-9.eE]+", rest)
            assert number and math.isclose(float(number.group()), value, rel_tol=1e-3, abs_tol=1e-4), where
        else:
            assert value in rest, where
        for text in (allowed,) if isinstance(allowed, str) else allowed or ():
            assert text in rest, where


def refuse(tmp_path, base, changes, field, value, allowed=None, **kw):
    assert_refused(write_case(tmp_path, edited(base, *changes)), field, value, allowed, **kw)


def P(base, changes, field, value, allowed=None, *, id, marks=()):
    """One parametrised refusal: base case, changes, expected field, value and allowed text."""
    return pytest.param(base, changes, field, value, allowed, id=id, marks=marks)


CASE_ARGS = "base, changes, field, value, allowed"

M0 = ("member", 0)      # the protected beam B1
M1 = ("member", 1)      # the bare tension member T1
OPEN = ("compartment", "opening", 0)


# ----------------------------------------------------------------------------------------------
# the base cases are valid in every mode


@pytest.mark.parametrize("base", sorted(BASES))
def test_base_cases_run(tmp_path, base):
    for mode, r in run_modes(write_case(tmp_path, BASES[base]())).items():
        where = f"[{mode}] {r.stderr!r}"
        assert r.returncode in (0, 1), where
        assert r.stderr == "", where
        assert r.stdout
        if mode == "json":
            doc = json.loads(r.stdout)
            assert doc["out_of_scope"] == []
            assert [m["name"] for m in doc["members"]] == [m["name"] for m in BASES[base]()["member"]]


# ----------------------------------------------------------------------------------------------
# missing required values

MISSING = [
    P("nominal", [(M0 + ("section_factor_per_m",), DELETE)], "B1).section_factor_per_m", "None", "missing",
      id="member-section-factor"),
    P("nominal", [(M0 + ("name",), DELETE)], "member[1].name", "None", "missing", id="member-name"),
    P("nominal", [(M0 + ("utilisation",), DELETE)], "B1).utilisation", "None", "critical_temperature_C",
      id="member-utilisation-and-critical-temperature"),
    P("nominal", [(M0 + ("thickness_mm",), DELETE)], "B1).thickness_mm", "None", "missing",
      id="member-thickness-of-protected"),
    P("nominal", [(("fire", "duration_min"), DELETE)], "fire.duration_min", "None", "missing", id="fire-duration"),
    P("nominal", [(("fire", "curve"), DELETE)], "fire.curve", "None", "missing", id="fire-curve"),
    P("nominal", [(("fire",), DELETE)], "fire", "None", "missing", id="fire-table"),
    P("nominal", [(("materials", "board", "density"), DELETE)], "materials.board.density", "None", "missing",
      id="material-density"),
    P("nominal", [(("materials", "board", "conductivity"), DELETE)], "materials.board.conductivity", "None",
      "missing", id="material-conductivity"),
    P("nominal", [(("member",), DELETE)], "member", "None", "at least one [[member]]", id="no-member-at-all"),
    P("parametric", [(("compartment", "floor_area_m2"), DELETE)], "compartment.floor_area_m2", "None", "missing",
      id="parametric-floor-area"),
    P("parametric", [(("compartment", "height_m"), DELETE)], "compartment.height_m", "None", "missing",
      id="parametric-height"),
    P("parametric", [(("compartment", "boundary_area_m2"), DELETE)], "compartment.boundary_area_m2", "None",
      "missing", id="parametric-boundary-area"),
    P("parametric", [(("compartment", "thermal_inertia"), DELETE)], "compartment.thermal_inertia", "None",
      "[[compartment.surface]]", id="parametric-thermal-inertia"),
    P("parametric", [(("compartment", "opening"), DELETE)], "compartment.opening", "None", "at least one",
      id="parametric-openings"),
    P("parametric", [(OPEN + ("width_m",), DELETE)], "compartment.opening[1].width_m", "None", "missing",
      id="opening-width"),
    P("parametric", [(("compartment",), DELETE)], "compartment", "None", "parametric", id="parametric-compartment"),
    P("parametric", [(("fire_load",), DELETE)], "fire_load", "None", "parametric", id="parametric-fire-load"),
    P("parametric", [(("fire_load", "characteristic_MJ_m2"), DELETE)], "fire_load.characteristic_MJ_m2", "None",
      "design_MJ_m2", id="parametric-fire-load-value"),
    P("layered", [(("compartment", "surface", 0, "layers"), DELETE)], "compartment.surface[1].layers", "None",
      "at least one layer", id="surface-layers"),
    P("layered", [(("compartment", "surface", 0, "layers", 0, "conductivity"), DELETE)],
      "compartment.surface[1].layers[1].conductivity", "None", "missing", id="layer-conductivity"),
]


@pytest.mark.parametrize(CASE_ARGS, MISSING)
def test_missing_value(tmp_path, base, changes, field, value, allowed):
    refuse(tmp_path, base, changes, field, value, allowed)


# ----------------------------------------------------------------------------------------------
# negative and zero where a positive value is required

NONPOSITIVE = []
for _v in (0.0, -5.0):
    _s = "zero" if _v == 0 else "negative"
    NONPOSITIVE += [
        P("nominal", [(M0 + ("thickness_mm",), _v)], "B1).thickness_mm", repr(_v), "> 0", id=f"thickness-{_s}"),
        P("nominal", [(M0 + ("section_factor_per_m",), _v)], "B1).section_factor_per_m", repr(_v), "> 0",
          id=f"section-factor-{_s}"),
        P("nominal", [(("fire", "duration_min"), _v)], "fire.duration_min", repr(_v), ">= 1 and <= 1440 [min]",
          id=f"duration-{_s}"),
        P("nominal", [(("materials", "board", "density"), _v * 160)], "materials.board.density", repr(_v * 160),
          ">= 1", id=f"material-density-{_s}"),
        P("nominal", [(("materials", "board", "conductivity"), _v / 25)], "materials.board.conductivity",
          repr(_v / 25), "> 0", id=f"material-conductivity-{_s}"),
        P("parametric", [(("compartment", "floor_area_m2"), _v * 20)], "compartment.floor_area_m2",
          repr(_v * 20), "> 0", id=f"floor-area-{_s}"),
        P("parametric", [(OPEN + ("width_m",), _v / 2)], "compartment.opening[1].width_m", repr(_v / 2), "> 0",
          id=f"opening-width-{_s}"),
        P("parametric", [(("compartment", "thermal_inertia"), _v * 200)], "compartment.thermal_inertia",
          repr(_v * 200), "> 0", id=f"thermal-inertia-{_s}"),
        P("layered", [(("compartment", "surface", 0, "layers", 0, "density"), _v * 460)],
          "compartment.surface[1].layers[1].density", repr(_v * 460), "> 0", id=f"layer-density-{_s}"),
    ]
NONPOSITIVE += [
    P("nominal", [(M1 + ("shadow_factor",), 0.0)], "T1).shadow_factor", "0.0", "> 0", id="shadow-factor-zero"),
    P("nominal", [(M0 + ("required_minutes",), -30.0)], "B1).required_minutes", "-30.0", ">= 1 and <= 1440 [min]",
      id="required-minutes-negative"),
    P("nominal", [(M0 + ("utilisation",), DELETE), (M0 + ("critical_temperature_C",), -100.0)],
      "B1).critical_temperature_C", "-100.0", "> 20", id="critical-temperature-negative"),
    P("nominal", [(("materials", "board", "specific_heat"), 0.0)], "materials.board.specific_heat", "0.0",
      ">= 100", id="material-specific-heat-zero"),
    P("nominal", [(("materials", "board", "moisture_percent"), -1.0)], "materials.board.moisture_percent",
      "-1.0", ">= 0", id="material-moisture-negative"),
    P("nominal", [(("fire", "convection_coefficient"), 0.0)], "fire.convection_coefficient", "0.0", ">= 1",
      id="convection-coefficient-zero"),
    P("nominal", [(("analysis", "standard_horizon_min"), 0.0)], "analysis.standard_horizon_min", "0.0", ">= 1",
      id="standard-horizon-zero"),
    P("parametric", [(("compartment", "height_m"), -3.0)], "compartment.height_m", "-3.0", "> 0",
      id="height-negative"),
    P("parametric", [(("compartment", "boundary_area_m2"), 0.0)], "compartment.boundary_area_m2", "0.0", "> 0",
      id="boundary-area-zero"),
    P("parametric", [(OPEN + ("height_m",), -1.5)], "compartment.opening[1].height_m", "-1.5", "> 0",
      id="opening-height-negative"),
    P("parametric", [(OPEN + ("count",), 0)], "compartment.opening[1].count", "0", ">= 1", id="opening-count-zero"),
    P("parametric", [(("fire_load", "characteristic_MJ_m2"), -511.0)], "fire_load.characteristic_MJ_m2",
      "-511.0", "> 0", id="fire-load-negative"),
    P("parametric", [(("fire_load", "combustion_factor"), 0.0)], "fire_load.combustion_factor", "0.0", "> 0",
      id="combustion-factor-zero"),
    P("parametric", [(("fire_load", "occupancy_factor"), -1.0)], "fire_load.occupancy_factor", "-1.0", "> 0",
      id="occupancy-factor-negative"),
    P("parametric", [(("compartment", "roof_opening_area_m2"), -1.0)], "compartment.roof_opening_area_m2",
      "-1.0", ">= 0", id="roof-openings-negative"),
    P("layered", [(("compartment", "surface", 1, "area_m2"), 0.0)], "compartment.surface[2].area_m2", "0.0",
      "> 0", id="surface-area-zero"),
    P("layered", [(("compartment", "surface", 0, "layers", 0, "thickness_m"), 0.0)],
      "compartment.surface[1].layers[1].thickness_m", "0.0", "> 0", id="layer-thickness-zero"),
]


@pytest.mark.parametrize(CASE_ARGS, NONPOSITIVE)
def test_not_positive(tmp_path, base, changes, field, value, allowed):
    refuse(tmp_path, base, changes, field, value, allowed)


# ----------------------------------------------------------------------------------------------
# wrong type, wrong unit

WRONG_TYPE = [
    P("nominal", [(M0 + ("thickness_mm",), "15 mm")], "B1).thickness_mm", "'15 mm'", "must be a number [mm]",
      id="thickness-string-with-unit"),
    P("nominal", [(M0 + ("thickness_mm",), True)], "B1).thickness_mm", "True", "must be a number",
      id="thickness-boolean"),
    P("nominal", [(M0 + ("thickness_mm",), [15.0])], "B1).thickness_mm", "[15.0]", "must be a number",
      id="thickness-list"),
    P("nominal", [(M0 + ("thickness_mm",), {"value": 15.0, "unit": "mm"})], "B1).thickness_mm", "'unit': 'mm'",
      "must be a number", id="thickness-inline-table"),
    P("nominal", [(M0 + ("utilisation",), "55 %")], "B1).utilisation", "'55 %'", "must be a number",
      id="utilisation-percent-string"),
    P("nominal", [(("fire", "duration_min"), "2 h")], "fire.duration_min", "'2 h'", "must be a number [min]",
      id="duration-string-with-unit"),
    P("nominal", [(("fire", "curve"), 5)], "fire.curve", "5", "must be a string", id="curve-number"),
    P("nominal", [(("analysis", "time_step_s"), "5 s")], "analysis.time_step_s", "'5 s'", "must be a number",
      id="time-step-string"),
    P("nominal", [(("analysis", "allow_out_of_scope"), "yes")], "analysis.allow_out_of_scope", "'yes'",
      "true or false", id="allow-out-of-scope-string"),
    P("nominal", [(M0 + ("laterally_restrained",), 1)], "B1).laterally_restrained", "1", "true or false",
      id="laterally-restrained-number"),
    P("nominal", [(M0 + ("name",), 12)], "member[1].name", "12", "must be a string", id="member-name-number"),
    P("nominal", [(("materials", "board", "conductivity"), "0.2 W/mK")], "materials.board.conductivity",
      "'0.2 W/mK'", "W/(m K)", id="conductivity-string"),
    P("nominal", [(("materials", "board", "conductivity"), [[20.0, 0.1], [400.0]])],
      "materials.board.conductivity[2]", "[400.0]", "pair", id="conductivity-table-short-pair"),
    P("nominal", [(("materials", "board", "conductivity"), [[20.0, 0.1], [10.0, 0.2]])],
      "materials.board.conductivity[2]", "[10.0, 0.2]", "increase", id="conductivity-table-decreasing"),
    P("nominal", [(("materials", "board"), 800.0)], "materials.board", "800.0", "table", id="material-not-a-table"),
    P("nominal", [(("title",), 5)], "title", "5", "must be a string", id="title-number"),
    P("nominal", [(("fire",), "standard")], "fire", "'standard'", "table", id="fire-not-a-table"),
    P("nominal", [(("member",), "B1")], "member", "'B1'", "[[member]]", id="member-not-an-array"),
    P("nominal", [(("code",), {"max_time_step_bare_s": "5"})], "code.max_time_step_bare_s", "'5'",
      "must be a number", id="code-value-string"),
    P("parametric", [(("compartment", "floor_area_m2"), "180 m2")], "compartment.floor_area_m2", "'180 m2'",
      "must be a number [m2]", id="floor-area-string-with-unit"),
    P("parametric", [(OPEN + ("count",), 2.5)], "compartment.opening[1].count", "2.5", "whole number",
      id="opening-count-fraction"),
    P("parametric", [(("fire_load", "area_factor"), "table")], "fire_load.area_factor", "'table'", '"auto"',
      id="area-factor-word"),
    P("parametric", [(("fire_load", "growth"), 2)], "fire_load.growth", "2", "slow, medium, fast",
      id="growth-number"),
    P("layered", [(("compartment", "surface", 0, "layers"), 0.15)], "compartment.surface[1].layers", "0.15",
      "layer", id="layers-number"),
]


@pytest.mark.parametrize(CASE_ARGS, WRONG_TYPE)
def test_wrong_type_or_unit(tmp_path, base, changes, field, value, allowed):
    refuse(tmp_path, base, changes, field, value, allowed)


# ----------------------------------------------------------------------------------------------
# unknown keys (typos), reported as themselves, with the key meant


def _renamed(base, path, new_key):
    """Changes that rename the last key of ``path`` to ``new_key``, keeping its value."""
    node = BASES[base]()
    for step in path:
        node = node[step]
    return [(path, DELETE), (path[:-1] + (new_key,), node)]


UNKNOWN_KEY = [
    P("nominal", _renamed("nominal", M0 + ("thickness_mm",), "thicknes_mm"), "B1).thicknes_mm", "15.0",
      "did you mean thickness_mm", id="member-thicknes_mm"),
    P("nominal", [(M1 + ("shadowfactor",), 0.8)], "T1).shadowfactor", "0.8", "shadow_factor",
      id="member-shadowfactor"),
    P("nominal", _renamed("nominal", M0 + ("name",), "nmae"), "member[1].nmae", "'B1'", "name", id="member-nmae"),
    P("nominal", _renamed("nominal", ("title",), "titel"), "titel", "'bad-input base", "title", id="top-titel"),
    P("nominal", _renamed("nominal", ("member",), "members"), "members", "'name': 'B1'", "member",
      id="top-members"),
    P("nominal", _renamed("nominal", ("analysis",), "analyis"), "analyis", "time_step_s", "analysis",
      id="top-analyis"),
    P("nominal", _renamed("nominal", ("analysis", "time_step_s"), "time_step"), "analysis.time_step", "5.0",
      "time_step_s", id="analysis-time_step"),
    P("nominal", [(("analysis", "allow_outside_scope"), True)], "analysis.allow_outside_scope", "True",
      "allow_out_of_scope", id="analysis-allow_outside_scope"),
    P("nominal", _renamed("nominal", ("fire", "duration_min"), "duration"), "fire.duration", "60.0",
      "duration_min", id="fire-duration"),
    P("nominal", _renamed("nominal", ("materials", "board", "density"), "densty"), "materials.board.densty",
      "800.0", "density", id="material-densty"),
    P("parametric", _renamed("parametric", ("compartment", "floor_area_m2"), "floor_area"),
      "compartment.floor_area", "100.0", "floor_area_m2", id="compartment-floor_area"),
    P("parametric", _renamed("parametric", OPEN + ("width_m",), "widht_m"), "compartment.opening[1].widht_m",
      "2.0", "width_m", id="opening-widht_m"),
    P("parametric", _renamed("parametric", ("fire_load", "characteristic_MJ_m2"), "characteristic_MJ"),
      "fire_load.characteristic_MJ", "400.0", "characteristic_MJ_m2", id="fire-load-characteristic_MJ"),
    P("layered", _renamed("layered", ("compartment", "surface", 0, "layers", 0, "thickness_m"), "thickness_mm"),
      "compartment.surface[1].layers[1].thickness_mm", "0.15", "thickness_m", id="layer-thickness_mm-wrong-unit"),
]


@pytest.mark.parametrize(CASE_ARGS, UNKNOWN_KEY)
def test_unknown_key(tmp_path, base, changes, field, value, allowed):
    refuse(tmp_path, base, changes, field, value, ("is not a known key", allowed))


# ----------------------------------------------------------------------------------------------
# two keys that exclude each other, keys that do not apply

EXCLUSIVE = [
    P("layered", [(("compartment", "thermal_inertia"), 1200.0)], "compartment.thermal_inertia", "1200.0",
      "not both", id="thermal-inertia-and-surfaces"),
    P("nominal", [(M0 + ("critical_temperature_C",), 550.0)], "B1).utilisation", "0.5",
      "critical_temperature_C, exactly one", id="utilisation-and-critical-temperature"),
    P("parametric", [(("fire_load", "design_MJ_m2"), 300.0)], "fire_load.characteristic_MJ_m2", "400.0",
      "exactly one", id="characteristic-and-design-fire-load"),
    P("parametric", [(("fire_load", "characteristic_MJ_m2"), DELETE), (("fire_load", "design_MJ_m2"), 300.0)],
      "fire_load.combustion_factor", "0.8", "design_MJ_m2", id="design-fire-load-with-factors"),
    P("nominal", [(M1 + ("thickness_mm",), 10.0)], "T1).thickness_mm", "10.0", "protection",
      id="thickness-on-bare-member"),
    P("nominal", [(M0 + ("shadow_factor",), 0.8)], "B1).shadow_factor", "0.8", "bare steel only",
      id="shadow-factor-on-protected-member"),
    P("nominal", [(M1 + ("kind",), "column"), (M1 + ("laterally_restrained",), True),
                  (M1 + ("utilisation",), DELETE), (M1 + ("critical_temperature_C",), 500.0)],
      "T1).laterally_restrained", "True", "beams only", id="laterally-restrained-on-column"),
    P("nominal", [(("fire", "file"), "x.csv")], "fire.file", "'x.csv'", 'curve = "table"',
      id="file-with-standard-curve"),
]


@pytest.mark.parametrize(CASE_ARGS, EXCLUSIVE)
def test_exclusive_or_inapplicable_keys(tmp_path, base, changes, field, value, allowed):
    refuse(tmp_path, base, changes, field, value, allowed)


# ----------------------------------------------------------------------------------------------
# names that are not known

UNKNOWN_NAME = [
    P("nominal", [(M0 + ("protection",), "board-b")], "B1).protection", "'board-b'", "board",
      id="unknown-material"),
    P("nominal", [(("fire", "curve"), "iso834")], "fire.curve", "'iso834'", "standard", id="unknown-curve"),
    P("nominal", [(("fire", "curve"), "Standard")], "fire.curve", "'Standard'", "standard",
      id="curve-wrong-case"),
    P("nominal", [(("code",), {"max_time_step_bar_s": 5.0})], "code.max_time_step_bar_s", "5.0",
      "max_time_step_bare_s", id="unknown-code-name"),
    P("nominal", [(("code",), {"max_time_step_bare_s": 1e6})], "code.max_time_step_bare_s", "1000000.0",
      "between", id="code-value-out-of-range"),
    P("nominal", [(M0 + ("kind",), "girder")], "B1).kind", "'girder'", "beam", id="unknown-member-kind"),
    P("parametric", [(("fire_load", "growth"), "very fast")], "fire_load.growth", "'very fast'", "fast",
      id="unknown-growth"),
]


@pytest.mark.parametrize(CASE_ARGS, UNKNOWN_NAME)
def test_unknown_name(tmp_path, base, changes, field, value, allowed):
    refuse(tmp_path, base, changes, field, value, allowed)


# ----------------------------------------------------------------------------------------------
# EN 1991-1-2 Annex A scope: refused unless analysis.allow_out_of_scope = true


def _opening_factor(openings, at):
    av = sum(o["width_m"] * o["height_m"] * o["count"] for o in openings)
    heq = sum(o["width_m"] * o["height_m"] ** 2 * o["count"] for o in openings) / av
    return av * math.sqrt(heq) / at


SCOPE = [
    # (id, changes, field, value)
    ("opening-factor-too-small", [(OPEN, {"width_m": 0.5, "height_m": 0.5, "count": 1})], "opening factor O",
     _opening_factor([{"width_m": 0.5, "height_m": 0.5, "count": 1}], 320.0)),
    ("opening-factor-too-large", [(OPEN, {"width_m": 20.0, "height_m": 2.5, "count": 4}),
                                  (("compartment", "boundary_area_m2"), 420.0)], "opening factor O",
     _opening_factor([{"width_m": 20.0, "height_m": 2.5, "count": 4}], 420.0)),
    ("thermal-inertia-below-100", [(("compartment", "thermal_inertia"), 80.0)], "thermal inertia b", 80.0),
    ("thermal-inertia-above-2200", [(("compartment", "thermal_inertia"), 2500.0)], "thermal inertia b", 2500.0),
    # q_t,d = q_f,d A_f / A_t with A_f = 100 m2 and A_t = 320 m2
    ("fire-load-below-50", [(("fire_load",), {"design_MJ_m2": 120.0, "growth": "medium"})], "fire load q_t,d",
     120.0 * 100 / 320),
    ("fire-load-above-1000", [(("fire_load",), {"design_MJ_m2": 4000.0, "growth": "medium"})], "fire load q_t,d",
     4000.0 * 100 / 320),
    ("floor-area-above-500", [(("compartment", "floor_area_m2"), 600.0), (("compartment", "boundary_area_m2"), 1500.0),
                              (OPEN, {"width_m": 4.0, "height_m": 1.5, "count": 12})],
     "compartment.floor_area_m2", 600.0),
    ("height-above-4m", [(("compartment", "height_m"), 4.5)], "compartment.height_m", 4.5),
    ("roof-openings", [(("compartment", "roof_opening_area_m2"), 2.0)], "compartment.roof_opening_area_m2", 2.0),
]


@pytest.mark.parametrize("changes, field, value", [pytest.param(*s[1:], id=s[0]) for s in SCOPE])
def test_outside_annex_a_scope_refused(tmp_path, changes, field, value):
    refuse(tmp_path, "parametric", changes, field, value, "allow_out_of_scope")


@pytest.mark.parametrize("changes, field, value", [pytest.param(*s[1:], id=s[0]) for s in SCOPE])
def test_outside_annex_a_scope_computed_when_allowed(tmp_path, changes, field, value):
    data = edited("parametric", *changes, (("analysis", "allow_out_of_scope"), True))
    runs = run_modes(write_case(tmp_path, data), modes={"plain": (), "json": ("--json",)})
    for mode, r in runs.items():
        assert "Traceback" not in r.stderr, (mode, r.stderr)
        assert r.returncode in (0, 1), (mode, r.returncode, r.stderr)
    assert "OUTSIDE THE SCOPE" in runs["plain"].stdout
    doc = json.loads(runs["json"].stdout)
    assert doc["out_of_scope"], doc["warnings"]
    assert any(field in s for s in doc["out_of_scope"]), doc["out_of_scope"]
    stamped = [w for w in doc["warnings"] if w.startswith("OUT OF SCOPE")]
    assert stamped and any(field in w for w in stamped), doc["warnings"]
    assert all(math.isfinite(m["peak_steel_temperature_C"]) for m in doc["members"])


# ----------------------------------------------------------------------------------------------
# the k factor of EN 1991-1-2 eq (A.8) <= 0: inside the scope box, refused always


def _k(o, q, b):
    return 1.0 + ((o - 0.04) / 0.04) * ((q - 75.0) / 75.0) * ((1160.0 - b) / 1160.0)


def _k_case(o_width_m, design_MJ_m2, b, allow):
    """A_f = 100 m2, A_t = 300 m2, openings 1 m high (sqrt(h_eq) = 1): O = 3 w / 300, q_t,d = q_f,d / 3."""
    return edited("parametric",
                  (("compartment",), {"floor_area_m2": 100.0, "height_m": 3.0, "boundary_area_m2": 300.0,
                                      "thermal_inertia": b,
                                      "opening": [{"width_m": o_width_m, "height_m": 1.0, "count": 3}]}),
                  (("fire_load",), {"design_MJ_m2": design_MJ_m2, "growth": "medium"}),
                  (("analysis", "allow_out_of_scope"), allow))


K_POINTS = [
    # id, opening width, q_f,d, b -> O, q_t,d
    pytest.param(19.0, 151.5, 110.0, id="O0.19-q50.5-b110"),
    pytest.param(20.0, 150.0, 100.0, id="corner-O0.20-q50-b100"),
    pytest.param(20.0, 150.0, 150.0, id="O0.20-q50-b150"),
]


@pytest.mark.parametrize("allow", [False, True], ids=["scope-enforced", "allow-out-of-scope"])
@pytest.mark.parametrize("width, qfd, b", K_POINTS)
def test_k_factor_not_positive_refused(tmp_path, width, qfd, b, allow):
    o, q = 3 * width / 300.0, qfd / 3.0
    # inside the Annex A box, fuel-controlled (0.2e-3 q / O < t_lim = 20 min), where eq (A.8) applies
    assert 0.02 <= o <= 0.20 and 100 <= b <= 2200 and 50 <= q <= 1000
    assert 0.2e-3 * q / o < 20 / 60 and o > 0.04 and q < 75 and b < 1160
    k = _k(o, q, b)
    assert k < 0
    assert_refused(write_case(tmp_path, _k_case(width, qfd, b, allow)), "k factor of EN 1991-1-2 eq (A.8)", k,
                   "must be > 0")


def test_k_factor_positive_near_the_corner_runs(tmp_path):
    # same compartment as the first k point, a little more fire load: k > 0, computed, no refusal
    width, qfd, b = 19.0, 180.0, 110.0
    assert _k(3 * width / 300.0, qfd / 3.0, b) > 0
    r = run_modes(write_case(tmp_path, _k_case(width, qfd, b, False)), modes={"json": ("--json",)})["json"]
    assert r.returncode in (0, 1), r.stderr
    doc = json.loads(r.stdout)
    assert doc["fire"]["k_factor"] == pytest.approx(_k(3 * width / 300.0, qfd / 3.0, b), rel=1e-5)
    assert doc["out_of_scope"] == []


# ----------------------------------------------------------------------------------------------
# tabulated curve (curve = "table", file = "x.csv")

CSV_CASES = [
    pytest.param("time_min,temperature_C\n0,20\n30,800\n20,900\n90,300\n", {}, "x.csv row 4 time_min", "20.0",
                 "increase", id="time-decreasing"),
    pytest.param("time_min,temperature_C\n0,20\n30,800\n30,900\n90,300\n", {}, "x.csv row 4 time_min", "30.0",
                 "increase", id="time-repeated"),
    pytest.param("time_min,temperature_C\n5,20\n30,800\n90,300\n", {}, "x.csv row 2 time_min", "5.0", "0 min",
                 id="first-time-not-zero"),
    pytest.param("time_min,temperature_C\n0,20\n30,hot\n90,300\n", {}, "x.csv row 3 temperature_C", "'hot'",
                 "number", id="non-numeric-cell"),
    pytest.param("time_min,temperature_C\n0,20\n30,\n90,300\n", {}, "x.csv row 3 temperature_C", "''",
                 "number", id="empty-cell"),
    pytest.param("time_min,temperature_C\n0,20\n30,nan\n90,300\n", {}, "x.csv row 3 temperature_C", "'nan'",
                 "finite", id="nan-cell"),
    pytest.param("time_min,temperature_C\n0,20\n30,2000\n90,300\n", {}, "x.csv row 3 temperature_C", "2000.0",
                 "1500", id="temperature-too-high"),
    pytest.param("time_min,temperature_C\n0,20\n30\n90,300\n", {}, "x.csv row 3", "'30'", "two columns",
                 id="row-one-column"),
    # a file's own text is never quoted (its length is): the error line cannot carry a file's contents
    pytest.param("time_s,temperature_C\n0,20\n1800,800\n5400,300\n", {}, "x.csv header",
                 "'<20 characters, not shown>'", "must be time_min,temperature_C", id="wrong-header"),
    pytest.param("0,20\n30,800\n90,300\n", {}, "x.csv header", "'<4 characters, not shown>'",
                 "must be time_min,temperature_C", id="no-header"),
    pytest.param("", {}, "fire.file", "x.csv", "empty", id="empty-file"),
    pytest.param("time_min,temperature_C\n0,20\n", {}, "fire.file", "x.csv", "two data rows",
                 id="one-data-row"),
    pytest.param(None, {}, "fire.file", "x.csv", "existing", id="missing-file"),
    pytest.param("time_min,temperature_C\n0,20\n30," + "8" * 200_000 + "\n", {}, "x.csv row 3 temperature_C",
                 "'<200000 characters, not shown>'", "must be a finite number", id="cell-beyond-csv-field-limit"),
    pytest.param(TABLE_CSV, {"duration_min": 120.0}, "fire.duration_min", "120.0", "90 min",
                 id="duration-longer-than-table"),
    pytest.param(TABLE_CSV, {"file": "missing.csv"}, "fire.file", "missing.csv", "existing",
                 id="file-named-wrong"),
    pytest.param(TABLE_CSV, {"file": 5}, "fire.file", "5", "string", id="file-not-a-string"),
]


@pytest.mark.parametrize("csv, fire_changes, field, value, allowed", CSV_CASES)
def test_tabulated_curve_csv(tmp_path, csv, fire_changes, field, value, allowed):
    data = edited("table", *((("fire", k), v) for k, v in fire_changes.items()))
    assert_refused(write_case(tmp_path, data, csv=csv), field, value, allowed)


# ----------------------------------------------------------------------------------------------
# time step beyond the clause limit, zero, negative, not a number


def test_time_step_at_the_limits_runs(tmp_path):
    # the edges are allowed: 5 s with bare steel, 30 s with protected steel only
    for base, step in (("nominal", 5.0), ("protected", 30.0)):
        path = write_case(tmp_path, edited(base, (("analysis", "time_step_s"), step)), name=f"{base}.toml")
        for mode, r in run_modes(path, "--time-step-s", step).items():
            assert r.returncode in (0, 1), (base, mode, r.stderr)
            assert r.stderr == ""


TIME_STEP = [
    # base, time_step_s in the case file, --time-step-s, field, value, allowed
    pytest.param("nominal", 6.0, None, "analysis.time_step_s", "6.0", "5 s", id="file-bare-6s"),
    pytest.param("protected", 31.0, None, "analysis.time_step_s", "31.0", "30 s", id="file-protected-31s"),
    pytest.param("nominal", 0.0, None, "analysis.time_step_s", "0.0", "> 0", id="file-zero"),
    pytest.param("nominal", -5.0, None, "analysis.time_step_s", "-5.0", "> 0", id="file-negative"),
    pytest.param("nominal", 5.0, "6", "--time-step-s", "6.0", "5 s", id="option-bare-6s"),
    pytest.param("protected", 30.0, "31", "--time-step-s", "31.0", "30 s", id="option-protected-31s"),
    pytest.param("nominal", 5.0, "0", "--time-step-s", "0.0", "> 0", id="option-zero"),
    pytest.param("nominal", 5.0, "-1", "--time-step-s", "-1.0", "> 0", id="option-negative"),
    pytest.param("nominal", 5.0, "nan", "--time-step-s", "nan", "> 0", id="option-nan"),
    pytest.param("nominal", 5.0, "inf", "--time-step-s", "inf", "> 0", id="option-inf"),
    pytest.param("nominal", 5.0, "five", "--time-step-s", "'five'", "number", id="option-not-a-number"),
    pytest.param("nominal", 5.0, "1e-9", "--time-step-s", "1e-09", "steps", id="option-absurdly-small"),
]


@pytest.mark.parametrize("base, file_step, option, field, value, allowed", TIME_STEP)
def test_time_step(tmp_path, base, file_step, option, field, value, allowed):
    path = write_case(tmp_path, edited(base, (("analysis", "time_step_s"), file_step)))
    extra = () if option is None else ("--time-step-s", option)
    assert_refused(path, field, value, allowed, extra=extra)


BARE_STEP = [
    # code values within their own ranges that make explicit eq (4.25) overshoot the gas in one step
    # (before this refusal: a bare member at 57,537 C); the same member at the EN values runs
    P("nominal", [(("code",), {"steel_density_kg_m3": 1000.0, "alpha_c_standard": 500.0}),
                  (M1 + ("section_factor_per_m",), 1000.0)], "T1).section_factor_per_m", 1000.0,
      ("too large for the time step", "k_sh Am/V <"), id="light-steel-strong-convection"),
    P("nominal", [(("code",), {"max_time_step_bare_s": 60.0}), (("analysis", "time_step_s"), 60.0),
                  (M1 + ("section_factor_per_m",), 900.0)], "T1).section_factor_per_m", 900.0,
      ("too large for the time step 60 s", "smaller time step"), id="long-step"),
]


@pytest.mark.parametrize(CASE_ARGS, BARE_STEP)
def test_bare_steel_step_that_overshoots_the_gas(tmp_path, base, changes, field, value, allowed):
    modes = MODES if changes[0][1].get("max_time_step_bare_s") is None else {"plain": (), "json": ("--json",)}
    refuse(tmp_path, base, changes, field, value, allowed, modes=modes)


# ----------------------------------------------------------------------------------------------
# absurd sizes

ABSURD = [
    P("nominal", [(("fire", "duration_min"), 525600.0)], "fire.duration_min", "525600.0", "<= 1440",
      id="duration-a-year"),
    P("nominal", [(("analysis", "standard_horizon_min"), 1e9)], "analysis.standard_horizon_min", "1000000000.0",
      "<= 1440", id="standard-horizon-huge"),
    P("nominal", [(M0 + ("required_minutes",), 180.0)], "B1).required_minutes", "180.0", "standard_horizon_min",
      id="required-minutes-beyond-horizon"),
    P("nominal", [(M0 + ("required_minutes",), 525600.0)], "B1).required_minutes", "525600.0", "<= 1440",
      id="required-minutes-a-year"),
    P("nominal", [(("analysis", "time_step_s"), 1e-4)], "analysis.time_step_s", "0.0001", "steps",
      id="time-step-tiny"),
    P("nominal", [(M0 + ("thickness_mm",), 15000.0)], "B1).thickness_mm", "15000.0", "<= 300",
      id="thickness-in-micrometres"),
    P("nominal", [(M0 + ("section_factor_per_m",), 1.5e5)], "B1).section_factor_per_m", "150000.0", "<= 1000",
      id="section-factor-huge"),
    P("nominal", [(M0 + ("thickness_mm",), 10 ** 30)], "thickness_mm", str(10 ** 30), None,
      id="thickness-huge-integer"),
    # quoted short: the first 77 digits and "..."
    P("nominal", [(M0 + ("thickness_mm",), 10 ** 400)], "thickness_mm", "1" + "0" * 76 + "...: ", "64 bits",
      id="thickness-integer-beyond-64-bits"),
    P("nominal", [(("code",), {"max_time_step_bare_s": 10 ** 400})], "code.max_time_step_bare_s",
      "1" + "0" * 76 + "...: ", "64 bits", id="code-integer-beyond-64-bits"),
    P("nominal", [(M0 + ("thickness_mm",), 1e-6)], "B1).thickness_mm", "1e-06", "too thin for the time step",
      id="thickness-a-nanometre"),
    P("nominal", [(M0 + ("thickness_mm",), float("inf"))], "B1).thickness_mm", "inf", "finite",
      id="thickness-infinite"),
    P("nominal", [(M0 + ("thickness_mm",), float("nan"))], "B1).thickness_mm", "nan", "finite",
      id="thickness-nan"),
    P("parametric", [(("compartment", "floor_area_m2"), 1e7), (("compartment", "boundary_area_m2"), 3e7)],
      "compartment.floor_area_m2", "10000000.0", "<= 100000", id="floor-area-in-cm2"),
    P("parametric", [(OPEN + ("count",), 10 ** 6)], "compartment.opening[1].count", "1000000", "<= 10000",
      id="opening-count-a-million"),
]


@pytest.mark.parametrize(CASE_ARGS, ABSURD)
def test_absurd_size(tmp_path, base, changes, field, value, allowed):
    refuse(tmp_path, base, changes, field, value, allowed)


def test_protection_too_thin_for_the_time_step(tmp_path):
    # eq (4.27) stepped explicitly passes the gas within one step below
    # d_min = 2 L / (B + sqrt(B^2 + 4 A L)); here (board, Ap/V = 150): 0.043 mm at 5 s, 0.26 mm at 30 s
    ca_rho = (425.0 + 0.773 * 20 - 1.69e-3 * 20 ** 2 + 2.22e-6 * 20 ** 3) * 7850.0

    def d_min_mm(step):
        a, load = 1700.0 * 800.0 * 150.0 / 3, 0.2 * 150.0 * step
        return 1e3 * 2 * load / (ca_rho + math.sqrt(ca_rho ** 2 + 4 * a * load))

    assert d_min_mm(5.0) < 0.1 < d_min_mm(30.0)
    thin = (M0 + ("thickness_mm",), 0.1)
    # in the case file's own step
    assert_refused(write_case(tmp_path, edited("protected", thin), name="step30.toml"), "B1).thickness_mm", "0.1",
                   ("too thin for the time step 30 s (analysis.time_step_s)", f"{d_min_mm(30.0):.3g} mm"),
                   modes={"plain": (), "json": ("--json",)})
    # in the step given on the command line
    path = write_case(tmp_path, edited("protected", thin, (("analysis", "time_step_s"), 5.0)), name="step5.toml")
    assert_refused(path, "B1).thickness_mm", "0.1", "too thin for the time step 30 s (--time-step-s)",
                   extra=("--time-step-s", "30"))
    # and at 5 s the same member runs
    r = run_modes(path, modes={"json": ("--json",)})["json"]
    assert r.returncode in (0, 1), r.stderr
    assert 20.0 < json.loads(r.stdout)["members"][0]["peak_steel_temperature_C"] < 1200.0


# ----------------------------------------------------------------------------------------------
# inconsistent geometry

INCONSISTENT = [
    P("parametric", [(("compartment", "boundary_area_m2"), 150.0)], "compartment.boundary_area_m2", "150.0",
      "2 x floor_area_m2", id="boundary-area-below-floor-and-ceiling"),
    P("parametric", [(OPEN, {"width_m": 30.0, "height_m": 3.0, "count": 4})], "compartment.boundary_area_m2",
      "320.0", "vertical openings", id="openings-larger-than-boundary"),
    P("parametric", [(OPEN, {"width_m": 13.0, "height_m": 2.0, "count": 5})], "compartment.boundary_area_m2",
      "320.0", "= 330 m2", id="walls-smaller-than-openings"),
    P("parametric", [(OPEN + ("height_m",), 3.5)], "compartment.opening[1].height_m", "3.5",
      "compartment height", id="opening-taller-than-compartment"),
    P("layered", [(("compartment", "surface", 1, "area_m2"), 50.0)], "compartment.surface", "250.0",
      "A_t - A_v", id="surfaces-do-not-cover-enclosure"),
]


@pytest.mark.parametrize(CASE_ARGS, INCONSISTENT)
def test_inconsistent_geometry(tmp_path, base, changes, field, value, allowed):
    refuse(tmp_path, base, changes, field, value, allowed)


# ----------------------------------------------------------------------------------------------
# the case file itself, members, utilisation

GOOD_TEXT = to_toml(nominal_case())

BAD_FILES = [
    pytest.param('title = "no closing quote\n' + GOOD_TEXT.split("\n", 1)[1], "not valid TOML",
                 id="unterminated-string"),
    pytest.param(GOOD_TEXT.replace("[fire]", "[fire", 1), "not valid TOML", id="unclosed-table-header"),
    pytest.param(GOOD_TEXT.replace('curve = "standard"', 'curve = "standard"\ncurve = "hydrocarbon"', 1),
                 "not valid TOML", id="duplicate-key"),
    pytest.param(GOOD_TEXT.replace("duration_min = 60.0", "duration_min = 60,0", 1), "not valid TOML",
                 id="decimal-comma"),
    pytest.param(GOOD_TEXT.replace("bad-input base", "bad-input base \u00e9").encode("latin-1"), "UTF-8",
                 id="not-utf8"),
    pytest.param(b"\x00\x01\x02\x03", "not valid TOML", id="binary-garbage"),
]


@pytest.mark.parametrize("text, allowed", BAD_FILES)
def test_malformed_toml(tmp_path, text, allowed):
    assert_refused(write_case(tmp_path, text=text, name="broken.toml"), "case file", "'broken.toml'", allowed)


def test_case_file_does_not_exist(tmp_path, monkeypatch):
    monkeypatch.chdir(tmp_path)
    assert_refused("nowhere.toml", "case file", "'nowhere.toml'", "must be an existing TOML file")


def test_case_file_is_a_directory(tmp_path, monkeypatch):
    monkeypatch.chdir(tmp_path)
    (tmp_path / "dir.toml").mkdir()
    assert_refused("dir.toml", "case file", "'dir.toml'", "must be an existing TOML file")


def test_case_file_named_in_a_long_path(tmp_path):
    deep = tmp_path / ("project-folder-" * 6) / "calculations"
    deep.mkdir(parents=True)
    assert_refused(deep / "nowhere.toml", "case file", "nowhere.toml", "must be an existing TOML file")


def test_duplicate_member_names(tmp_path):
    data = edited("nominal", (M1 + ("name",), "B1"))
    assert_refused(write_case(tmp_path, data), "member[2] (B1).name", "'B1'", "unique (also member[1])")


def test_blank_member_name(tmp_path):
    refuse(tmp_path, "nominal", [(M0 + ("name",), "   ")], ".name", "'   '", "empty")


@pytest.mark.parametrize("mu", [1.0, 1.2, 0.0125, 0.0, -0.5], ids=lambda mu: f"utilisation-{mu:g}")
def test_utilisation_outside_eq_4_22(tmp_path, mu):
    refuse(tmp_path, "nominal", [(M0 + ("utilisation",), mu)], "B1).utilisation", repr(mu), ">= 0.013 and < 1")


@pytest.mark.parametrize("mu", [0.013, 0.99])
def test_utilisation_at_the_edges_runs(tmp_path, mu):
    r = run_modes(write_case(tmp_path, edited("nominal", (M0 + ("utilisation",), mu))),
                  modes={"json": ("--json",)})["json"]
    assert r.returncode in (0, 1), r.stderr
    assert json.loads(r.stdout)["members"][0]["critical_temperature_C"] > 0


def test_errors_after_loading_name_the_schedule_row(tmp_path):
    """Refusals found after the rows are read (protection too thin for the time step, a bare step
    that overshoots the gas) name a CSV member by its file and row, as the loader's own errors do."""
    data = edited("nominal", (("member",), DELETE))
    data["members_file"] = "sched.csv"
    (tmp_path / "sched.csv").write_text(
        "name,kind,section_factor_per_m,utilisation,protection,thickness_mm\n"
        "P1,tension,150,0.5,board,15\n"
        "P2,tension,150,0.5,board,0.001\n", encoding="utf-8")
    assert_refused(write_case(tmp_path, data), "sched.csv row 3 (P2).thickness_mm", "0.001",
                   "too thin for the time step")
    (tmp_path / "sched.csv").write_text(
        "name,kind,section_factor_per_m,utilisation\n"
        "T1,tension,100,0.5\n"
        "T2,tension,1000,0.5\n", encoding="utf-8")
    data["code"] = {"steel_density_kg_m3": 1000.0, "alpha_c_standard": 500.0}
    assert_refused(write_case(tmp_path, data), "sched.csv row 3 (T2).section_factor_per_m", 1000.0,
                   "too large for the time step")


def test_member_labels_follow_the_members_not_their_index(tmp_path):
    import dataclasses

    from steelfire.inputs.case import load_case, member_label

    case = load_case(write_case(tmp_path, nominal_case()))
    b1, t1 = case.members
    assert member_label(case.member_places, 0, b1) == "member[1] (B1)"
    assert member_label(case.member_places, 1, t1) == "member[2] (T1)"
    swapped = dataclasses.replace(case, members=(t1, b1))
    # a reordered case: the places no longer match, so the index is all that is said
    assert member_label(swapped.member_places, 0, t1) == "member[1] (T1)"
