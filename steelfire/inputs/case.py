"""Case files (TOML) -> a validated case model.

Every value is checked once, here, at the boundary; a bad value raises :class:`InputError` naming
the field, the value and what is allowed. The keys are those of the case-file contract in the
project's design notes; units are in the key names (SI, temperatures in C).
"""

from __future__ import annotations

import contextlib
import gc
import itertools
import math
import sys
from dataclasses import dataclass, field
from pathlib import Path

from steelfire import codevalues
from steelfire.errors import InputError
from steelfire.models.fire.compartment import Layer, Opening, Surface
from steelfire.models.protection import ASSESSED_FIRES, GENERIC_FILE, Material
from steelfire.inputs.schedule import ABSENT

if sys.version_info >= (3, 11):
    import tomllib
else:  # pragma: no cover - exercised on Python 3.10 only
    import tomli as tomllib

CURVES = ("parametric", "standard", "hydrocarbon", "external", "table")
KINDS = ("beam", "column", "tension", "brace", "other")
GROWTHS = ("slow", "medium", "fast")

# Bounds that catch absurd input (a typo, a wrong unit), beyond which no fire engineer would go.
MAX_DURATION_MIN = 1440.0        # 24 h
MAX_GRID_POINTS = 2_000_000
MAX_MEMBERS = 200_000
# TOML integers are 64-bit (TOML 1.0); larger ones are refused, not converted.
INT64_MIN, INT64_MAX = -(2 ** 63), 2 ** 63 - 1

# The keys each table may hold. A key outside its list is refused before anything else is read, so
# that a typo (``thicknes_mm``) is reported as itself, not as the required key it hides.
TOP_KEYS = ("title", "code", "fire", "analysis", "compartment", "fire_load", "materials", "member", "members_file")
FIRE_KEYS = ("curve", "duration_min", "file", "convection_coefficient")
ANALYSIS_KEYS = ("time_step_s", "standard_horizon_min", "allow_out_of_scope")
COMPARTMENT_KEYS = ("floor_area_m2", "height_m", "boundary_area_m2", "thermal_inertia", "roof_opening_area_m2",
                    "opening", "surface")
OPENING_KEYS = ("width_m", "height_m", "count")
SURFACE_KEYS = ("area_m2", "layers")
LAYER_KEYS = ("thickness_m", "density", "conductivity", "specific_heat")
FIRE_LOAD_KEYS = ("characteristic_MJ_m2", "design_MJ_m2", "combustion_factor", "area_factor", "occupancy_factor",
                  "measures_factor", "growth")
MATERIAL_KEYS = ("density", "conductivity", "specific_heat", "moisture_percent", "description", "thicknesses_mm",
                 "min_thickness_mm", "max_thickness_mm", "thickness_step_mm", "assessed_thickness_mm",
                 "assessed_section_factor_per_m", "assessed_max_steel_temperature_C", "assessed_fire")
MEMBER_KEYS = ("name", "kind", "laterally_restrained", "section_factor_per_m", "utilisation",
               "critical_temperature_C", "protection", "thickness_mm", "required_minutes", "shadow_factor",
               "section", "exposure", "encasement")

# The ranges of the [[member]] numbers, key -> (unit, lo, hi), each lo < value <= hi. The one place
# they are written: the row reader (_read_member) and the column-wise fast path (_members_of) both
# take them from here. All bounds are finite, so a value inside a range is finite.
MEMBER_NUMBERS = {
    "critical_temperature_C": ("C", 20.0, 1200.0),
    "thickness_mm": ("mm", 0.0, 300.0),
    "shadow_factor": ("-", 0.0, 1.0),
    "section_factor_per_m": ("1/m", 0.0, 1000.0),
    "required_minutes": ("min", 0.0, MAX_DURATION_MIN),
}
UTILISATION_RANGE = (0.013, 1.0)          # lo <= mu0 < hi, EN 1993-1-2 eq (4.22)
MIN_SECTION_FACTOR_PROTECTED_PER_M = 1.0  # Ap/V; bare steel takes code["section_factor_min_bare_per_m"]


# ----------------------------------------------------------------------------------------------
# the case model


@dataclass(frozen=True)
class Compartment:
    floor_area_m2: float
    height_m: float
    boundary_area_m2: float
    openings: tuple
    thermal_inertia: float | None = None
    surfaces: tuple = ()
    roof_opening_area_m2: float = 0.0


@dataclass(frozen=True)
class FireLoad:
    characteristic_MJ_m2: float | None
    design_MJ_m2: float | None
    combustion_factor: float = 0.8
    area_factor: float | str = "auto"
    occupancy_factor: float = 1.0
    measures_factor: float = 1.0
    growth: str = "medium"


@dataclass(frozen=True)
class FireSpec:
    curve: str
    duration_min: float
    file: Path | None = None
    convection_coefficient: float | None = None


@dataclass(frozen=True)
class AnalysisSettings:
    time_step_s: float = 5.0
    standard_horizon_min: float = 240.0
    allow_out_of_scope: bool = False


@dataclass(frozen=True)
class Member:
    name: str
    kind: str
    section_factor_per_m: float
    utilisation: float | None = None
    critical_temperature_C: float | None = None
    protection: str | None = None
    thickness_mm: float | None = None
    required_minutes: float | None = None
    shadow_factor: float | None = None
    laterally_restrained: bool | None = None
    section: str | None = None
    exposure: str | None = None
    encasement: str | None = None
    shadow_factor_nominal: float = 1.0   # k_sh used under nominal fires (eq (4.26a) for I-sections)
    shadow_factor_natural: float = 1.0   # k_sh used under natural fires (eq (4.26b))

    @property
    def protected(self) -> bool:
        return self.protection is not None


@dataclass(frozen=True)
class MemberPlaces:
    """Where each member of a case was given, for error messages: ``"schedule.csv row 7"`` for a
    schedule row, ``"member[3]"`` for a [[member]] table (each block of rows names its own rows).

    ``names`` are the members' names in case order; a member whose name is not the one at its index
    (a case whose members were replaced or reordered since loading) is labelled by its index alone.
    """

    names: tuple
    blocks: tuple  # per block of rows: (count, where), where(k) naming its k-th row

    def where(self, i: int) -> str:
        """The name of the i-th member row of the case (counting through the blocks)."""
        for n, where in self.blocks:
            if i < n:
                return where(i)
            i -= n
        raise IndexError(i)

    def label(self, i: int, member) -> str:
        ok = i < len(self.names) and self.names[i] == member.name
        return _member_where(self.where(i) if ok else f"member[{i + 1}]", member.name)


def member_label(places: MemberPlaces | None, i: int, member) -> str:
    """The error-message name of member ``i`` of a case: its place (see :class:`MemberPlaces`) and name."""
    return places.label(i, member) if places is not None else _member_where(f"member[{i + 1}]", member.name)


@dataclass(frozen=True)
class Case:
    title: str
    fire: FireSpec
    analysis: AnalysisSettings
    members: tuple
    materials: dict
    code: dict
    compartment: Compartment | None = None
    fire_load: FireLoad | None = None
    source: Path | None = None
    code_overrides: dict = field(default_factory=dict)
    inputs: tuple = ()  # the files read: case file, members_file, fire table
    member_places: MemberPlaces | None = field(default=None, compare=False, repr=False)


# ----------------------------------------------------------------------------------------------
# reading


class _Table:
    """Reads one TOML table, checking types and ranges, and refuses keys nobody read.

    With ``keys``, keys outside that list are refused at once, before any value is read.
    """

    def __init__(self, data, where: str, keys=None):
        if not isinstance(data, dict):
            raise InputError(where, data, "must be a table")
        self.data = data
        self.where = where
        self.seen = set()
        if keys is not None:
            self.done(allowed=keys)

    def _f(self, key):
        return f"{self.where}.{key}" if self.where else key

    def has(self, key):
        return key in self.data

    def raw(self, key, default=None):
        self.seen.add(key)
        return self.data.get(key, default)

    def number(self, key, unit, *, required=True, default=None, lo=None, hi=None, lo_open=False,
               integer=False):
        self.seen.add(key)
        if key not in self.data:
            if required:
                raise InputError(self._f(key), None, f"is missing; give a number [{unit}]")
            return default
        v = self.data[key]
        if isinstance(v, bool) or not isinstance(v, (int, float)):
            raise InputError(self._f(key), v, f"must be a number [{unit}] (units are in the key name)")
        if not math.isfinite(v):
            raise InputError(self._f(key), v, f"must be a finite number [{unit}]")
        if integer and v != int(v):
            raise InputError(self._f(key), v, "must be a whole number")
        lo_ok = lo is None or (v > lo if lo_open else v >= lo)
        hi_ok = hi is None or v <= hi
        if not (lo_ok and hi_ok):
            raise InputError(self._f(key), v, _range_text(lo, hi, lo_open, unit))
        return float(v) if not integer else int(v)

    def string(self, key, *, required=True, default=None, choices=None):
        self.seen.add(key)
        if key not in self.data:
            if required:
                raise InputError(self._f(key), None, "is missing" + (f"; one of {', '.join(choices)}" if choices else ""))
            return default
        v = self.data[key]
        if not isinstance(v, str):
            raise InputError(self._f(key), v, "must be a string" + (f": one of {', '.join(choices)}" if choices else ""))
        if choices is not None and v not in choices:
            raise InputError(self._f(key), v, f"must be one of {', '.join(choices)}")
        return v

    def boolean(self, key, *, default=None):
        self.seen.add(key)
        if key not in self.data:
            return default
        v = self.data[key]
        if not isinstance(v, bool):
            raise InputError(self._f(key), v, "must be true or false")
        return v

    def done(self, allowed=None):
        unknown = [k for k in self.data if k not in self.seen and (allowed is None or k not in allowed)]
        if unknown:
            k = unknown[0]
            import difflib

            close = difflib.get_close_matches(k, sorted(self.seen | set(allowed or ())), n=2)
            hint = f"; did you mean {' or '.join(close)}?" if close else ""
            raise InputError(self._f(k), self.data[k], "is not a known key" + hint)


def _range_text(lo, hi, lo_open, unit):
    if lo is not None and hi is not None:
        return f"must be {'>' if lo_open else '>='} {lo:g} and <= {hi:g} [{unit}]"
    if lo is not None:
        return f"must be {'>' if lo_open else '>='} {lo:g} [{unit}]"
    return f"must be <= {hi:g} [{unit}]"


def load_case(path) -> Case:
    """Read and validate a case file (TOML). Raises InputError on any bad value."""
    p = Path(path)
    if not p.is_file():
        raise InputError("case file", str(path), "must be an existing TOML file")
    try:
        with p.open("rb") as fh:
            data = tomllib.load(fh)
    except tomllib.TOMLDecodeError as exc:
        raise InputError("case file", p.name, f"is not valid TOML ({exc})") from None
    except UnicodeDecodeError as exc:
        raise InputError("case file", p.name, f"is not valid TOML: not UTF-8 text (byte {exc.start})") from None
    except OSError as exc:
        raise InputError("case file", p.name, f"cannot be read ({exc.strerror})") from None
    return case_from_dict(data, base_dir=p.parent, source=p)


def case_from_dict(data: dict, base_dir=".", source=None) -> Case:
    """Validate a case given as a dict of the TOML contract (paths relative to ``base_dir``)."""
    _check_integers(data, "")
    top = _Table(data, "", keys=TOP_KEYS)
    title = top.string("title", required=False, default="untitled case")
    code_data = top.raw("code", {})
    if not isinstance(code_data, dict):
        raise InputError("code", code_data, "must be a table of code value names and numbers")
    code = codevalues.resolve(code_data)

    fire = _read_fire(_Table(top.raw("fire"), "fire", keys=FIRE_KEYS) if top.has("fire") else None, Path(base_dir))
    analysis = _read_analysis(top.raw("analysis", {}))
    compartment = _read_compartment(top.raw("compartment")) if top.has("compartment") else None
    fire_load = _read_fire_load(top.raw("fire_load")) if top.has("fire_load") else None
    if fire.curve == "parametric":
        if compartment is None:
            raise InputError("compartment", None, "is missing; the parametric curve needs the compartment")
        if fire_load is None:
            raise InputError("fire_load", None, "is missing; the parametric curve needs the fire load")
        if compartment.thermal_inertia is None and not compartment.surfaces:
            raise InputError("compartment.thermal_inertia", None,
                             "is missing; give thermal_inertia or [[compartment.surface]] tables")
    materials = _read_materials(top.raw("materials", {}))
    members_raw = top.raw("member", [])
    if not isinstance(members_raw, list):
        raise InputError("member", members_raw, "must be an array of [[member]] tables")
    inputs = [Path(source)] if source else []
    if fire.file is not None:
        inputs.append(fire.file)
    with collector_paused():
        blocks = [_InlineRows(members_raw)]
        if top.has("members_file"):
            from steelfire.inputs.schedule import read_schedule_columns

            sched = top.string("members_file")
            blocks.append(read_schedule_columns(Path(base_dir) / sched))
            inputs.append(Path(base_dir) / sched)
        count = sum(b.n for b in blocks)
        if not count:
            raise InputError("member", None, "needs at least one [[member]] table or a members_file")
        if count > MAX_MEMBERS:
            raise InputError("member", count, f"at most {MAX_MEMBERS} members per case")
        members = tuple(m for b in blocks for m in _members_of(b, materials, code))
    names = tuple(m.name for m in members)
    places = MemberPlaces(names=names, blocks=tuple((b.n, b.where) for b in blocks))
    if len(set(names)) != len(names):
        _refuse_repeated_name(places, members)
    top.done()

    limit, clause = time_step_limit(members, code)
    check_time_step(analysis.time_step_s, limit, clause, fire.duration_min, analysis.standard_horizon_min)
    check_protection_step(members, materials, code, analysis.time_step_s, places=places)
    horizon = analysis.standard_horizon_min
    for k, m in enumerate(members):
        if m.required_minutes is not None and m.required_minutes > horizon:
            raise InputError(f"{places.label(k, m)}.required_minutes", m.required_minutes,
                             f"must be <= analysis.standard_horizon_min = {horizon:g} min")
    return Case(title=title, fire=fire, analysis=analysis, members=members, materials=materials, code=code,
                compartment=compartment, fire_load=fire_load, source=Path(source) if source else None,
                code_overrides={k: float(v) for k, v in code_data.items()}, inputs=tuple(inputs),
                member_places=places)


@contextlib.contextmanager
def collector_paused():
    """Pause Python's cyclic garbage collector (resumed after, also on error): while member rows are
    read here, and for a whole command in the CLI.

    Reading a long schedule allocates tens of thousands of objects (CSV rows, Members) that form no
    reference cycles. Left running, the collector walks the young objects every 700 allocations and,
    as they pile up, the whole heap: a third of the time of reading 20,000 members. Paused, it walks
    them once when resumed. Reference counting frees memory as always; only cycle detection waits.
    """
    was_enabled = gc.isenabled()
    gc.disable()
    try:
        yield
    finally:
        if was_enabled:
            gc.enable()


def _refuse_repeated_name(places, members):
    """Raise for the first member whose name an earlier member already has."""
    names = {}
    for k, m in enumerate(members):
        where = places.where(k)
        if m.name in names:
            raise InputError(f"{_member_where(where, m.name)}.name", m.name, f"must be unique (also {names[m.name]})")
        names[m.name] = where


def _check_integers(v, where):
    """Refuse integers outside 64 bits anywhere in the data (TOML 1.0 integers are 64-bit)."""
    if type(v) is list and _flat_tables_fit(v):
        return  # nothing to find below: skip the walk (a long [[member]] array)
    items = v.items() if isinstance(v, dict) else enumerate(v, start=1)
    for k, x in items:
        t = type(x)
        if t is int and not (INT64_MIN <= x <= INT64_MAX):
            at = (f"{where}.{k}" if where else str(k)) if isinstance(v, dict) else f"{where}[{k}]"
            raise InputError(at, x, "integers must fit in 64 bits (TOML 1.0); give a number in the key's unit")
        if t is dict or t is list:
            _check_integers(x, (f"{where}.{k}" if where else str(k)) if isinstance(v, dict) else f"{where}[{k}]")


def _flat_tables_fit(items) -> bool:
    """True if ``items`` is a list of tables holding no table or array, whose integers all fit in 64
    bits: then :func:`_check_integers` has nothing to find in it. Checked in whole-list passes, so that
    a long [[member]] array costs little; False (walk it) for anything else."""
    if not all(type(x) is dict for x in items):
        return False
    values = list(itertools.chain.from_iterable(map(dict.values, items)))
    types = set(map(type, values))
    if dict in types or list in types:
        return False
    if int in types:
        ints = [x for x in values if type(x) is int]
        return INT64_MIN <= min(ints) and max(ints) <= INT64_MAX
    return True


def time_step_limit(members, code):
    """Largest time step [s] the clauses allow for these members, and the clause that sets it."""
    if any(not m.protected for m in members):
        return code["max_time_step_bare_s"], "EN 1993-1-2 4.2.5.1(4), bare steel"
    return code["max_time_step_protected_s"], "EN 1993-1-2 4.2.5.2(3), protected steel"


def with_time_step(case: Case, time_step_s, field="--time-step-s") -> Case:
    """The case with another time step, checked like the case file's own."""
    import dataclasses

    limit, clause = time_step_limit(case.members, case.code)
    check_time_step(time_step_s, limit, clause, case.fire.duration_min, case.analysis.standard_horizon_min, field)
    check_protection_step(case.members, case.materials, case.code, time_step_s, field, case.member_places)
    return dataclasses.replace(case, analysis=dataclasses.replace(case.analysis, time_step_s=float(time_step_s)))


def check_time_step(time_step_s, limit_s, clause, duration_min, horizon_min, field="analysis.time_step_s"):
    """The time step must be > 0, within the clause limit, and not make an absurd grid."""
    if not (isinstance(time_step_s, (int, float)) and not isinstance(time_step_s, bool)
            and math.isfinite(time_step_s) and 0 < time_step_s <= limit_s):
        raise InputError(field, time_step_s, f"must be > 0 and <= {limit_s:g} s ({clause})")
    points = max(duration_min, horizon_min) * 60.0 / time_step_s
    if points > MAX_GRID_POINTS:
        raise InputError(field, time_step_s,
                         f"gives {points:.3g} steps; at most {MAX_GRID_POINTS:.0e} (use a larger step)")


def check_protection_step(members, materials, code, time_step_s, field="analysis.time_step_s", places=None):
    """Refuse protection so thin that eq (4.27), stepped explicitly, overshoots the gas in one step
    (:func:`steelfire.heat.stable_min_thickness_m`, with the material's largest conductivity).

    The least thicknesses of all protected members are computed in one array call; the members it
    finds too thin (or within 1e-9 of it, so that rounding cannot hide one) are then checked one by
    one, in order, by :func:`_protection_step_error`, which decides and words the error."""
    import numpy as np

    from steelfire.models.heat import stable_min_thickness_m

    at = [i for i, m in enumerate(members) if m.protection is not None and m.thickness_mm is not None]
    if not at:
        return
    names = [members[i].protection for i in at]
    used = {name: j for j, name in enumerate(dict.fromkeys(names))}  # material name -> its row in props
    props = []  # (largest conductivity, specific heat, density) of each material used; NaN for a name
    for name in used:  # not in ``materials``: its members become candidates, for _protection_step_error
        mat = materials.get(name)
        props.append((max(v for _, v in mat.conductivity_table), mat.specific_heat, mat.density)
                     if mat is not None else (math.nan,) * 3)
    lam, c_p, rho_p = np.array(props, dtype=float)[[used[name] for name in names]].T
    am_v = np.array([members[i].section_factor_per_m for i in at], dtype=float)
    d_mm = np.array([members[i].thickness_mm for i in at], dtype=float)
    d_min_mm = 1e3 * stable_min_thickness_m(lam, c_p, rho_p, am_v, time_step_s, code["steel_density_kg_m3"])
    for j in np.flatnonzero(~(d_mm >= d_min_mm * (1.0 + 1e-9))):
        err = _protection_step_error(at[j], members[at[j]], materials, code, time_step_s, field, places)
        if err is not None:
            raise err


def _protection_step_error(i, m, materials, code, time_step_s, field, places=None):
    """The InputError for member ``i`` (``m``) if its protection is too thin for the time step, else None."""
    from steelfire.models.heat import stable_min_thickness_m

    if not m.protected or m.thickness_mm is None:
        return None
    mat = materials[m.protection]
    lam = max(v for _, v in mat.conductivity_table)
    d_min_mm = 1e3 * float(stable_min_thickness_m(lam, mat.specific_heat, mat.density, m.section_factor_per_m,
                                                  time_step_s, code["steel_density_kg_m3"]))
    if m.thickness_mm < d_min_mm:
        return InputError(
            f"{member_label(places, i, m)}.thickness_mm", m.thickness_mm,
            f"too thin for the time step {time_step_s:g} s ({field}): eq (4.27) of EN 1993-1-2, stepped "
            f"explicitly, needs d_p >= {d_min_mm:.3g} mm here (lambda_p = {lam:g} W/(m K), "
            f"Ap/V = {m.section_factor_per_m:g} 1/m); give a thicker protection or a smaller time step")
    return None


def _read_fire(t: _Table | None, base_dir: Path) -> FireSpec:
    if t is None:
        raise InputError("fire", None, "is missing; needs at least curve and duration_min")
    curve = t.string("curve", choices=CURVES)
    duration = t.number("duration_min", "min", lo=0.0, lo_open=True, hi=MAX_DURATION_MIN)
    hc = t.number("convection_coefficient", "W/(m2 K)", required=False, lo=1.0, hi=500.0)
    file = None
    if curve == "table":
        name = t.string("file")
        file = (base_dir / name)
    elif t.has("file"):
        raise InputError("fire.file", t.raw("file"), 'is only used with curve = "table"')
    t.done()
    return FireSpec(curve=curve, duration_min=duration, file=file, convection_coefficient=hc)


def _read_analysis(data) -> AnalysisSettings:
    t = _Table(data, "analysis", keys=ANALYSIS_KEYS)
    step = t.number("time_step_s", "s", required=False, default=5.0, lo=0.0, lo_open=True, hi=300.0)
    horizon = t.number("standard_horizon_min", "min", required=False, default=240.0, lo=1.0, hi=MAX_DURATION_MIN)
    allow = t.boolean("allow_out_of_scope", default=False)
    t.done()
    return AnalysisSettings(time_step_s=step, standard_horizon_min=horizon, allow_out_of_scope=allow)


def _read_compartment(data) -> Compartment:
    t = _Table(data, "compartment", keys=COMPARTMENT_KEYS)
    af = t.number("floor_area_m2", "m2", lo=0.0, lo_open=True, hi=1e5)
    h = t.number("height_m", "m", lo=0.0, lo_open=True, hi=100.0)
    at = t.number("boundary_area_m2", "m2", lo=0.0, lo_open=True, hi=1e6)
    b = t.number("thermal_inertia", "J/(m2 s^0.5 K)", required=False, lo=0.0, lo_open=True, hi=1e5)
    ah = t.number("roof_opening_area_m2", "m2", required=False, default=0.0, lo=0.0, hi=1e6)
    openings_raw = t.raw("opening", [])
    surfaces_raw = t.raw("surface", [])
    t.done()
    if not isinstance(openings_raw, list) or not openings_raw:
        raise InputError("compartment.opening", openings_raw or None, "needs at least one [[compartment.opening]]")
    openings = []
    for i, o in enumerate(openings_raw):
        ot = _Table(o, f"compartment.opening[{i + 1}]", keys=OPENING_KEYS)
        w = ot.number("width_m", "m", lo=0.0, lo_open=True, hi=1000.0)
        oh = ot.number("height_m", "m", lo=0.0, lo_open=True, hi=100.0)
        n = ot.number("count", "-", required=False, default=1, lo=1, hi=10000, integer=True)
        ot.done()
        if oh > h:
            raise InputError(f"compartment.opening[{i + 1}].height_m", oh,
                             f"must not exceed the compartment height {h:g} m")
        openings.append(Opening(w, oh, n))
    if not isinstance(surfaces_raw, list):
        raise InputError("compartment.surface", surfaces_raw, "must be an array of tables [[compartment.surface]]")
    if b is not None and surfaces_raw:
        raise InputError("compartment.thermal_inertia", b,
                         "give thermal_inertia or [[compartment.surface]] tables, not both")
    surfaces = []
    for i, s in enumerate(surfaces_raw):
        where = f"compartment.surface[{i + 1}]"
        st = _Table(s, where, keys=SURFACE_KEYS)
        area = st.number("area_m2", "m2", lo=0.0, lo_open=True, hi=1e6)
        layers_raw = st.raw("layers")
        st.done()
        if not isinstance(layers_raw, list) or not layers_raw:
            raise InputError(f"{where}.layers", layers_raw, "needs at least one layer table")
        layers = []
        for j, lr in enumerate(layers_raw):
            lt = _Table(lr, f"{where}.layers[{j + 1}]", keys=LAYER_KEYS)
            layers.append(Layer(
                thickness_m=lt.number("thickness_m", "m", lo=0.0, lo_open=True, hi=10.0),
                density=lt.number("density", "kg/m3", lo=0.0, lo_open=True, hi=20000.0),
                conductivity=lt.number("conductivity", "W/(m K)", lo=0.0, lo_open=True, hi=500.0),
                specific_heat=lt.number("specific_heat", "J/(kg K)", lo=0.0, lo_open=True, hi=20000.0)))
            lt.done()
        surfaces.append(Surface(area, tuple(layers)))
    area_openings = sum(o.area_m2 for o in openings)
    if at < 2 * af + area_openings:
        raise InputError("compartment.boundary_area_m2", at,
                         f"must be at least floor + ceiling + vertical openings = 2 x floor_area_m2 + A_v = "
                         f"2 x {af:g} + {area_openings:g} = {2 * af + area_openings:g} m2 (A_t includes the openings)")
    return Compartment(floor_area_m2=af, height_m=h, boundary_area_m2=at, openings=tuple(openings),
                       thermal_inertia=b, surfaces=tuple(surfaces), roof_opening_area_m2=ah)


def _read_fire_load(data) -> FireLoad:
    t = _Table(data, "fire_load", keys=FIRE_LOAD_KEYS)
    qk = t.number("characteristic_MJ_m2", "MJ/m2", required=False, lo=0.0, lo_open=True, hi=20000.0)
    qd = t.number("design_MJ_m2", "MJ/m2", required=False, lo=0.0, lo_open=True, hi=20000.0)
    if (qk is None) == (qd is None):
        raise InputError("fire_load.characteristic_MJ_m2", qk,
                         "give characteristic_MJ_m2 or design_MJ_m2, exactly one of the two")
    m = t.number("combustion_factor", "-", required=False, default=0.8, lo=0.0, lo_open=True, hi=1.0)
    af_raw = t.raw("area_factor", "auto")
    if isinstance(af_raw, str):
        if af_raw != "auto":
            raise InputError("fire_load.area_factor", af_raw, 'must be "auto" (EN 1991-1-2 Table E.1) or a number')
        area_factor = "auto"
    else:
        area_factor = t.number("area_factor", "-", lo=0.0, lo_open=True, hi=5.0)
    d2 = t.number("occupancy_factor", "-", required=False, default=1.0, lo=0.0, lo_open=True, hi=5.0)
    dn = t.number("measures_factor", "-", required=False, default=1.0, lo=0.0, lo_open=True, hi=5.0)
    growth = t.string("growth", required=False, default="medium", choices=GROWTHS)
    t.done()
    if qd is not None:
        for key in ("combustion_factor", "area_factor", "occupancy_factor", "measures_factor"):
            if key in data:
                raise InputError(f"fire_load.{key}", data[key],
                                 "is not used with design_MJ_m2 (already a design value); remove it")
    return FireLoad(characteristic_MJ_m2=qk, design_MJ_m2=qd, combustion_factor=m, area_factor=area_factor,
                    occupancy_factor=d2, measures_factor=dn, growth=growth)


def _read_materials(data) -> dict:
    """The case's [materials] tables, and the bundled generic ones under their own names."""
    if not isinstance(data, dict):
        raise InputError("materials", data, "must be a table of named material tables")
    out = dict(generic_materials())
    for name, md in data.items():
        out[name] = read_material_table(name, md, where=f"materials.{name}")
    return out


def _pair(t, key, unit, lo, hi):
    v = t.raw(key)
    if v is None:
        return None
    if (not isinstance(v, list) or len(v) != 2
            or any(isinstance(x, bool) or not isinstance(x, (int, float)) for x in v)
            or not (lo <= v[0] <= v[1] <= hi)):
        raise InputError(t._f(key), v, f"must be [least, largest] with {lo:g} <= least <= largest <= {hi:g} [{unit}]")
    return (float(v[0]), float(v[1]))


def read_material_table(name, md, where) -> Material:
    """One protection material table (see steelfire.protection.Material for the keys)."""
    t = _Table(md, where, keys=MATERIAL_KEYS)
    rho = t.number("density", "kg/m3", lo=1.0, hi=5000.0)
    cp = t.number("specific_heat", "J/(kg K)", lo=100.0, hi=10000.0)
    moist = t.number("moisture_percent", "% of dry weight", required=False, default=0.0, lo=0.0, hi=50.0)
    lam = _read_conductivity(t.raw("conductivity"), where)
    desc = t.string("description", required=False, default="")
    supplied = t.raw("thicknesses_mm")
    if supplied is not None:
        if (not isinstance(supplied, list) or not supplied
                or any(isinstance(x, bool) or not isinstance(x, (int, float)) or not (0 < x <= 300) for x in supplied)):
            raise InputError(f"{where}.thicknesses_mm", supplied, "must be a list of thicknesses > 0 and <= 300 [mm]")
        supplied = tuple(sorted(float(x) for x in supplied))
    d_lo = t.number("min_thickness_mm", "mm", required=False, lo=0.0, lo_open=True, hi=300.0)
    d_hi = t.number("max_thickness_mm", "mm", required=False, lo=0.0, lo_open=True, hi=300.0)
    step = t.number("thickness_step_mm", "mm", required=False, lo=0.01, hi=100.0)
    if supplied is not None and (d_lo is not None or d_hi is not None or step is not None):
        raise InputError(f"{where}.thicknesses_mm", list(supplied),
                         "give thicknesses_mm or min/max_thickness_mm and thickness_step_mm, not both")
    if d_lo is not None and d_hi is not None and d_hi < d_lo:
        raise InputError(f"{where}.max_thickness_mm", d_hi, f"must be >= min_thickness_mm = {d_lo:g} mm")
    a_d = _pair(t, "assessed_thickness_mm", "mm", 0.0, 300.0)
    a_s = _pair(t, "assessed_section_factor_per_m", "1/m", 0.0, 1000.0)
    a_t = t.number("assessed_max_steel_temperature_C", "C", required=False, lo=20.0, hi=1200.0)
    a_f = t.string("assessed_fire", required=False, default="any", choices=ASSESSED_FIRES)
    t.done()
    return Material(name=name, density=rho, conductivity=lam, specific_heat=cp, moisture_percent=moist,
                    thicknesses_mm=supplied, min_thickness_mm=d_lo, max_thickness_mm=d_hi, thickness_step_mm=step,
                    assessed_thickness_mm=a_d, assessed_section_factor_per_m=a_s,
                    assessed_max_steel_temperature_C=a_t, assessed_fire=a_f, description=desc)


_GENERIC = None


def generic_materials() -> dict:
    """The bundled generic, illustrative materials (steelfire/data/materials_generic.toml), by name."""
    global _GENERIC
    if _GENERIC is None:
        with GENERIC_FILE.open("rb") as fh:
            data = tomllib.load(fh)
        _GENERIC = {n: read_material_table(n, d, where=f"{GENERIC_FILE.name}: {n}") for n, d in data.items()}
    return _GENERIC


def _read_conductivity(v, where):
    field_ = f"{where}.conductivity"
    allowed = "a number > 0 and <= 10 [W/(m K)], or a table [[steel temperature C, W/(m K)], ...]"
    if v is None:
        raise InputError(field_, None, "is missing; " + allowed)
    if isinstance(v, bool):
        raise InputError(field_, v, allowed)
    if isinstance(v, (int, float)):
        if not (math.isfinite(v) and 0 < v <= 10.0):
            raise InputError(field_, v, allowed)
        return float(v)
    if not isinstance(v, list) or not v:
        raise InputError(field_, v, allowed)
    pairs = []
    for i, pt in enumerate(v):
        if (not isinstance(pt, list) or len(pt) != 2
                or any(isinstance(x, bool) or not isinstance(x, (int, float)) for x in pt)):
            raise InputError(f"{field_}[{i + 1}]", pt, "must be a pair [steel temperature C, conductivity W/(m K)]")
        th, lam = float(pt[0]), float(pt[1])
        if not (0.0 <= th <= 1200.0):
            raise InputError(f"{field_}[{i + 1}]", pt, "steel temperature must be between 0 and 1200 C")
        if not (0.0 < lam <= 10.0):
            raise InputError(f"{field_}[{i + 1}]", pt, "conductivity must be > 0 and <= 10 W/(m K)")
        if pairs and th <= pairs[-1][0]:
            raise InputError(f"{field_}[{i + 1}]", pt, "steel temperatures must increase strictly")
        pairs.append((th, lam))
    if len(pairs) > 64:
        raise InputError(field_, f"{len(pairs)} points", "at most 64 points")
    return tuple(pairs)


def _member_where(where, name):
    return where + (f" ({name})" if isinstance(name, str) and name else "")


_MEMBER_KEY_SET = frozenset(MEMBER_KEYS)
_NUMBER_TYPES = (int, float)  # by exact type: a bool is no number here, nor is a subclass (left to _read_member)
#: The [[member]] keys _members_of reads itself; a row giving any other key goes to _read_member.
_FAST_KEYS = frozenset({"name", "kind", "laterally_restrained", "section_factor_per_m", "utilisation",
                        "critical_temperature_C", "protection", "thickness_mm", "required_minutes",
                        "shadow_factor"})


class _InlineRows:
    """The [[member]] tables of the case file, held by column like a :class:`steelfire.schedule.Schedule`.

    ``columns`` maps each member key some table gives to its values, one per table, ``ABSENT`` where
    a table does not give it. ``suspect`` holds the tables the columns cannot stand for (not a
    table, or with a key outside MEMBER_KEYS); :func:`_members_of` sends them to the row reader.
    """

    def __init__(self, tables: list):
        self.tables = tables
        self.n = len(tables)
        self.columns = {}
        if not all(type(t) is dict for t in tables):
            self.suspect = range(self.n)
            return
        keys = set().union(*tables)
        self.suspect = ()
        if not keys <= _MEMBER_KEY_SET:
            self.suspect = [i for i, t in enumerate(tables) if not t.keys() <= _MEMBER_KEY_SET]
        self.columns = {k: [t.get(k, ABSENT) for t in tables] for k in MEMBER_KEYS if k in keys}

    def where(self, i: int) -> str:
        return f"member[{i + 1}]"

    def row(self, i: int):
        return self.tables[i]


def _checked_member(fields: dict) -> Member:
    """``Member(**fields)`` for a complete set of fields, all checked by :func:`_members_of`.

    Built without the generated ``__init__``: its fifteen frozen-dataclass ``object.__setattr__``
    calls were the larger part of reading a long schedule, and a Member holding its fields in a
    plain dict of numbers and strings costs the garbage collector one visit instead of fifteen.
    Member has no ``__post_init__`` and no default factory, so the result equals ``Member(**fields)``
    in every respect (==, hash, repr, fields); tests/test_case_fast.py holds it to that.
    """
    m = object.__new__(Member)
    object.__setattr__(m, "__dict__", fields)
    return m


def _members_of(rows, materials, code) -> list:
    """The Members of a block of member rows (an :class:`_InlineRows` or a Schedule), in order:
    equal to ``[_read_member(rows.row(i), rows.where(i), materials, code) for i in range(rows.n)]``,
    raising the same first error.

    Why: on a schedule of thousands of members the row reader's per-key bookkeeping costs as much as
    the heat transfer itself. How: the rules of :func:`_read_member` are checked a column at a time,
    each pass only collecting the rows it cannot vouch for (``bad``). A row that no pass collects is
    one _read_member accepts, so its Member is built here directly. Every other row goes through
    _read_member, in order, which builds it or raises; as all rows before it are good, its error is
    the first of the block. Nothing is refused here: _read_member stays the only source of error
    messages. A row giving a key outside _FAST_KEYS (a catalogue ``section``, ``exposure``,
    ``encasement``) always takes _read_member. Ranges come from MEMBER_NUMBERS and
    UTILISATION_RANGE, as in _read_member.
    """
    n = rows.n
    cols = rows.columns
    absent = [ABSENT] * n
    name, kind, restrained, am_v, mu, tcr, prot, thick, req, ksh = (cols.get(k, absent) for k in (
        "name", "kind", "laterally_restrained", "section_factor_per_m", "utilisation", "critical_temperature_C",
        "protection", "thickness_mm", "required_minutes", "shadow_factor"))
    (_, t_lo, t_hi), (_, d_lo, d_hi), (_, k_lo, k_hi), (_, a_lo, a_hi), (_, r_lo, r_hi) = (MEMBER_NUMBERS[k] for k in (
        "critical_temperature_C", "thickness_mm", "shadow_factor", "section_factor_per_m", "required_minutes"))
    mu_lo, mu_hi = UTILISATION_RANGE
    a_lo_bare, a_lo_protected = code["section_factor_min_bare_per_m"], MIN_SECTION_FACTOR_PROTECTED_PER_M
    num = _NUMBER_TYPES

    bad = set(rows.suspect)
    for key, values in cols.items():
        if key not in _FAST_KEYS:  # section, exposure, encasement (catalogue look-ups), and any new key
            bad.update(i for i, v in enumerate(values) if v is not ABSENT)
    bad.update(i for i, v in enumerate(name) if not (type(v) is str and v.strip()))
    bad.update(i for i, (k, r) in enumerate(zip(kind, restrained))
               if not (k is ABSENT or (type(k) is str and k in KINDS))
               or not (r is ABSENT or (type(r) is bool and (k is ABSENT or k == "beam"))))
    bad.update(i for i, (u, t) in enumerate(zip(mu, tcr))  # exactly one of the two, in its range
               if not (u is ABSENT and type(t) in num and t_lo < t <= t_hi
                       or t is ABSENT and type(u) in num and mu_lo <= u < mu_hi))
    if "protection" in cols:
        bad.update(i for i, p in enumerate(prot) if not (p is ABSENT or (type(p) is str and p in materials)))
    if "thickness_mm" in cols:  # only with protection
        bad.update(i for i, (d, p) in enumerate(zip(thick, prot))
                   if d is not ABSENT and not (p is not ABSENT and type(d) in num and d_lo < d <= d_hi))
    if "shadow_factor" in cols:  # bare steel only
        bad.update(i for i, (k, p) in enumerate(zip(ksh, prot))
                   if k is not ABSENT and not (p is ABSENT and type(k) in num and k_lo < k <= k_hi))
    bad.update(i for i, (a, p) in enumerate(zip(am_v, prot))
               if not (type(a) in num and a_lo < a <= a_hi and a >= (a_lo_bare if p is ABSENT else a_lo_protected)))
    if "required_minutes" in cols:
        bad.update(i for i, v in enumerate(req) if v is not ABSENT and not (type(v) in num and r_lo < v <= r_hi))

    out = []
    for i, (nm, k, r, a, u, t, p, d, rq, sh) in enumerate(zip(name, kind, restrained, am_v, mu, tcr, prot, thick,
                                                               req, ksh)):
        if i in bad:
            out.append(_read_member(rows.row(i), rows.where(i), materials, code))
            continue
        sh = None if sh is ABSENT else float(sh)
        k_sh = 1.0 if sh is None else sh
        out.append(_checked_member({
            "name": nm, "kind": "beam" if k is ABSENT else k, "section_factor_per_m": float(a),
            "utilisation": None if u is ABSENT else float(u),
            "critical_temperature_C": None if t is ABSENT else float(t),
            "protection": None if p is ABSENT else p, "thickness_mm": None if d is ABSENT else float(d),
            "required_minutes": None if rq is ABSENT else float(rq), "shadow_factor": sh,
            "laterally_restrained": None if r is ABSENT else r, "section": None, "exposure": None,
            "encasement": None, "shadow_factor_nominal": k_sh, "shadow_factor_natural": k_sh}))
    return out


def _read_member(data, where0, materials, code) -> Member:
    name_guess = data.get("name") if isinstance(data, dict) else None
    where = _member_where(where0, name_guess)
    t = _Table(data, where, keys=MEMBER_KEYS)
    name = t.string("name")
    if not name.strip():
        raise InputError(f"{where}.name", name, "must not be empty")
    kind = t.string("kind", required=False, default="beam", choices=KINDS)
    restrained = t.boolean("laterally_restrained", default=None)
    if restrained is not None and kind != "beam":
        raise InputError(f"{where}.laterally_restrained", restrained, "applies to beams only (kind = \"beam\")")
    mu = t.number("utilisation", "-", required=False)
    mu_lo, mu_hi = UTILISATION_RANGE
    if mu is not None and not (mu_lo <= mu < mu_hi):
        raise InputError(f"{where}.utilisation", mu, f"must be >= {mu_lo:g} and < {mu_hi:g} (EN 1993-1-2 eq (4.22))")
    tcr = _member_number(t, "critical_temperature_C")
    if (mu is None) == (tcr is None):
        raise InputError(f"{where}.utilisation", mu, "give utilisation or critical_temperature_C, exactly one")
    protection = t.string("protection", required=False)
    thickness = _member_number(t, "thickness_mm")
    if protection is not None:
        if protection not in materials:
            known = ", ".join(sorted(materials)) or "none defined"
            raise InputError(f"{where}.protection", protection, f"must name a [materials] table ({known})")
    elif thickness is not None:
        raise InputError(f"{where}.thickness_mm", thickness, "needs protection = a [materials] name")
    sf_lo = code["section_factor_min_bare_per_m"] if protection is None else MIN_SECTION_FACTOR_PROTECTED_PER_M
    clause = " (EN 1993-1-2 4.2.5.1(1) for bare steel)" if protection is None else ""
    section = t.string("section", required=False)
    exposure = t.string("exposure", required=False)
    encasement = t.string("encasement", required=False)
    ksh = _member_number(t, "shadow_factor")
    if ksh is not None and protection is not None:
        raise InputError(f"{where}.shadow_factor", ksh, "applies to bare steel only (EN 1993-1-2 4.2.5.1)")
    k_nom = k_nat = ksh if ksh is not None else 1.0
    if section is not None:
        from steelfire.models import sections as sec

        if t.has("section_factor_per_m"):
            raise InputError(f"{where}.section_factor_per_m", t.raw("section_factor_per_m"),
                             "give section_factor_per_m or section, not both")
        exposure_ = exposure or "4-sided"
        encasement_ = encasement or "profile"
        if protection is None and encasement_ != "profile":
            raise InputError(f"{where}.encasement", encasement_, "a bare member is heated on its profile (\"profile\")")
        geom = _field(where, "section", lambda: sec.catalogue_section(section))
        am_v = _field(where, "exposure", lambda: sec.section_factor_per_m(geom, exposure_, encasement_))
        if protection is None and ksh is None:
            k_nom = sec.shadow_factor(geom, exposure_, True)
            k_nat = sec.shadow_factor(geom, exposure_, False)
        t.seen.add("section_factor_per_m")
    else:
        for key, v in (("exposure", exposure), ("encasement", encasement)):
            if v is not None:
                raise InputError(f"{where}.{key}", v, "needs section = a catalogue profile (e.g. \"IPE 300\")")
        am_v = _member_number(t, "section_factor_per_m", required=True)
    if am_v < sf_lo:
        raise InputError(f"{where}.section_factor_per_m", round(am_v, 3), f"must be >= {sf_lo:g} 1/m{clause}")
    req = _member_number(t, "required_minutes")
    t.done()
    return Member(name=name, kind=kind, section_factor_per_m=am_v, utilisation=mu, critical_temperature_C=tcr,
                  protection=protection, thickness_mm=thickness, required_minutes=req, shadow_factor=ksh,
                  laterally_restrained=restrained, section=section, exposure=exposure, encasement=encasement,
                  shadow_factor_nominal=k_nom, shadow_factor_natural=k_nat)


def _member_number(t: _Table, key, required=False):
    """A [[member]] number, in its range from MEMBER_NUMBERS."""
    unit, lo, hi = MEMBER_NUMBERS[key]
    return t.number(key, unit, required=required, lo=lo, lo_open=True, hi=hi)


def _field(where, key, fn):
    """Run ``fn``; re-raise its InputError under the member's field name."""
    try:
        return fn()
    except InputError as exc:
        raise InputError(f"{where}.{key}", exc.value, exc.allowed) from None
