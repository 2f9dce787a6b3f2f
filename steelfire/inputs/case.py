"""Case files (TOML) -> a validated case model.

Every value is checked once, here, at the boundary; a bad value raises :class:`InputError` naming the
field, the value and what is allowed. The keys are those of the case-file contract (units in the key
names, SI, temperatures in C). Members are validated by :mod:`steelfire.inputs.members`.
"""

from __future__ import annotations

import dataclasses
import math
import sys
from dataclasses import dataclass, field
from pathlib import Path

import numpy as np

from steelfire import codevalues
from steelfire.errors import InputError
from steelfire.inputs import members as member_rows
from steelfire.inputs.curves import read_curve_csv
from steelfire.inputs.materials import read_materials
from steelfire.inputs.schedule import read_schedule
from steelfire.inputs.tables import TableReader
from steelfire.models import fire as fire_models
from steelfire.models import stability
from steelfire.models.fire.compartment import Compartment, Layer, Opening, Surface
from steelfire.models.fire.fireload import FireLoad
from steelfire.inputs.members import Member  # noqa: F401  (the case model's member)

if sys.version_info >= (3, 11):
    import tomllib
else:  # pragma: no cover - exercised on Python 3.10 only
    import tomli as tomllib

CURVES = tuple(fire_models.MODELS)
GROWTHS = ("slow", "medium", "fast")

# Bounds that catch absurd input (a typo, a wrong unit), beyond which no fire engineer would go.
MAX_DURATION_MIN = 1440.0        # 24 h
MAX_GRID_POINTS = 2_000_000
MAX_MEMBERS = 200_000
# TOML integers are 64-bit (TOML 1.0); larger ones are refused, not converted.
INT64_MIN, INT64_MAX = -(2 ** 63), 2 ** 63 - 1

# The keys each table may hold. A key outside its list is refused before anything else is read, so that
# a typo (``thicknes_mm``) is reported as itself, not as the required key it hides.
TOP_KEYS = ("title", "code", "fire", "analysis", "compartment", "fire_load", "materials", "member", "members_file",
            "record", "variability")
RECORD_KEYS = ("project", "job_number", "revision", "prepared_by", "checked_by", "date", "notes")
FIRE_KEYS = ("curve", "duration_min", "file", "convection_coefficient", "heat_release_file", "smoothing_s") + tuple(
    c for c in fire_models.MODELS if fire_models.options(c))
ANALYSIS_KEYS = ("time_step_s", "standard_horizon_min", "allow_out_of_scope", "protection_model")
PROTECTION_MODELS = ("lumped", "conduction")
COMPARTMENT_KEYS = ("floor_area_m2", "height_m", "boundary_area_m2", "thermal_inertia", "roof_opening_area_m2",
                    "opening", "surface")
OPENING_KEYS = ("width_m", "height_m", "count")
SURFACE_KEYS = ("area_m2", "layers")
LAYER_KEYS = ("thickness_m", "density", "conductivity", "specific_heat")
FIRE_LOAD_KEYS = ("characteristic_MJ_m2", "design_MJ_m2", "combustion_factor", "area_factor", "occupancy_factor",
                  "measures_factor", "growth", "heat_release_density_kW_m2", "fire_area_m2", "occupancy", "measures")


@dataclass(frozen=True)
class FireSpec:
    """The case's ``[fire]`` table; ``table`` holds a tabulated curve read from ``file``."""

    curve: str
    duration_min: float
    file: Path | None = None
    convection_coefficient: float | None = None
    table: object = field(default=None, compare=False, repr=False)
    options: dict = field(default_factory=dict)
    heat_release_file: Path | None = None
    heat_release: object = field(default=None, compare=False, repr=False)


@dataclass(frozen=True)
class AnalysisSettings:
    time_step_s: float = 5.0
    standard_horizon_min: float = 240.0
    allow_out_of_scope: bool = False
    protection_model: str = "lumped"   # eq (4.27), or 1-D conduction through the protection


@dataclass(frozen=True)
class MemberPlaces:
    """Where each member of a case was given, for error messages: blocks of rows, each (count, where),
    ``where(k)`` naming its k-th row (``sched.csv row 7``, ``member[3]``); ``names`` in case order."""

    names: tuple
    blocks: tuple

    def where(self, i: int) -> str:
        for n, where in self.blocks:
            if i < n:
                return where(i)
            i -= n
        raise IndexError(i)

    def label(self, i: int, member) -> str:
        ok = i < len(self.names) and self.names[i] == member.name
        return member_rows._label(self.where(i) if ok else f"member[{i + 1}]", member.name)


def member_label(places: MemberPlaces | None, i: int, member) -> str:
    """The error-message name of member ``i`` of a case: its place (see :class:`MemberPlaces`) and name."""
    return places.label(i, member) if places is not None else member_rows._label(f"member[{i + 1}]", member.name)


@dataclass(frozen=True)
class Case:
    """A validated case: its tables as dataclasses, the members, the materials (the case's and the
    generic ones), the code values in force (and the overrides the case gave), the files it read."""

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
    inputs: tuple = ()
    member_places: MemberPlaces | None = field(default=None, compare=False, repr=False)
    record: dict = field(default_factory=dict)
    variability: object = None   # the parsed [variability] table (steelfire.models.variability), for `sample`

    def label(self, i: int) -> str:
        """The error-message name of member ``i``."""
        return member_label(self.member_places, i, self.members[i])

    def with_member(self, name: str, **changes) -> "Case":
        """The case with member ``name`` changed (``thickness_mm=45``, ``protection="board-b"``, ...), checked
        as the loader checks a member; a key set to None is removed. For what-if studies in scripts.

        >>> case2 = case.with_member("B3-01", thickness_mm=25.0)     # doctest: +SKIP
        """
        index = {m.name: i for i, m in enumerate(self.members)}
        if name not in index:
            raise InputError("member", name, "must name a member of the case")
        i = index[name]
        row = {k: v for k, v in {**self.members[i].row, **changes}.items() if v is not None}
        new = member_rows.read_members([member_rows.inline_rows([row])], self.materials, self.code)[0]
        places = MemberPlaces(names=(new.name,), blocks=((1, lambda k: f"member {name!r}"),))
        _check_positions(self.fire, [new], places)
        check_protection_step([new], self.materials, self.code, self.analysis.time_step_s, places=places)
        if new.required_minutes is not None and new.required_minutes > self.analysis.standard_horizon_min:
            raise InputError(f"{places.label(0, new)}.required_minutes", new.required_minutes,
                             f"must be <= analysis.standard_horizon_min = {self.analysis.standard_horizon_min:g} min")
        members = list(self.members)
        members[i] = new
        if new.name != name and new.name in index:
            raise InputError(f"{places.label(0, new)}.name", new.name, "must be unique")
        return dataclasses.replace(self, members=tuple(members),
                                   member_places=MemberPlaces(tuple(m.name for m in members),
                                                              self.member_places.blocks if self.member_places else ()))


def input_path(base_dir, name, field, allow_outside=False) -> Path:
    """The file ``name`` a case names, resolved relative to the case's folder ``base_dir``.

    Refused: an empty or over-long name; an absolute path or one leading out of the case's folder (unless
    ``allow_outside``: a case from someone else must not make steelfire read, and quote, files elsewhere);
    anything but an existing regular file (a folder, a device, a pipe)."""
    import os
    import stat

    if not isinstance(name, str) or not name.strip():
        raise InputError(field, name, "must name a file (relative to the case file)")
    if len(name) > 1024 or any(len(part.encode()) > 255 for part in Path(name).parts):
        raise InputError(field, name, "is too long for a file name")
    base = Path(base_dir)
    p = base / name
    try:
        resolved = p.resolve()
        inside = resolved.is_relative_to(base.resolve())
        st = os.stat(resolved)
    except FileNotFoundError:
        raise InputError(field, name, "must name an existing file (relative to the case file)") from None
    except (OSError, RuntimeError) as exc:  # a symlink loop, a folder that cannot be searched, ...
        raise InputError(field, name, f"cannot be read ({getattr(exc, 'strerror', None) or type(exc).__name__})") \
            from None
    if not inside and not allow_outside:
        raise InputError(field, name, "must be a file in the case's folder or below (steelfire --allow-outside "
                         "reads files elsewhere)")
    if not stat.S_ISREG(st.st_mode):
        raise InputError(field, name, "must be a regular file (not a folder, device or pipe)")
    if not os.access(resolved, os.R_OK):
        raise InputError(field, name, "cannot be read (permission denied)")
    return p


def load_case(path, allow_outside: bool = False) -> Case:
    """Read and validate a case file (TOML). Raises InputError on any bad value. ``allow_outside``: the case
    may read schedules and tables outside its own folder (absolute paths, ``..``)."""
    p = Path(path)
    try:
        if len(str(path)) > 4096 or any(len(part.encode()) > 255 for part in p.parts):
            raise InputError("case file", str(path), "is too long for a file name")
        regular = p.is_file()
    except OSError as exc:
        raise InputError("case file", str(path), f"cannot be read ({exc.strerror})") from None
    if not regular:
        raise InputError("case file", str(path), "must be an existing TOML file")
    try:
        with p.open("rb") as fh:
            data = tomllib.load(fh)
    except tomllib.TOMLDecodeError as exc:
        raise InputError("case file", p.name, f"is not valid TOML ({exc})") from None
    except UnicodeDecodeError as exc:
        raise InputError("case file", p.name, f"is not valid TOML: not UTF-8 text (byte {exc.start})") from None
    except RecursionError:
        raise InputError("case file", p.name, "is nested too deeply to be a case file") from None
    except OSError as exc:
        raise InputError("case file", p.name, f"cannot be read ({exc.strerror})") from None
    return case_from_dict(data, base_dir=p.parent, source=p, allow_outside=allow_outside)


def case_from_dict(data: dict, base_dir=".", source=None, allow_outside: bool = False) -> Case:
    """Validate a case given as a dict of the TOML contract (paths relative to ``base_dir``; see
    :func:`input_path` for ``allow_outside``)."""
    _check_tree(data)
    top = TableReader(data, "", keys=TOP_KEYS)
    title = top.string("title", required=False, default="untitled case")
    code_data = top.raw("code", {})
    if not isinstance(code_data, dict):
        raise InputError("code", code_data, "must be a table of code value names and numbers")
    code = codevalues.resolve(code_data)
    base = Path(base_dir)
    fire = _read_fire(TableReader(top.raw("fire"), "fire", keys=FIRE_KEYS) if top.has("fire") else None, base,
                      allow_outside)
    analysis = _read_analysis(top.raw("analysis", {}))
    record = _read_record(top.raw("record", {}))
    variability = None
    if top.has("variability"):
        from steelfire.models.variability import parse_variability  # scipy.stats: only for cases that sample

        variability = parse_variability(top.raw("variability"))
    compartment = _read_compartment(top.raw("compartment")) if top.has("compartment") else None
    fire_load = _read_fire_load(top.raw("fire_load"), code) if top.has("fire_load") else None
    for need in fire_models.needs(fire.curve):
        if need == "compartment" and compartment is None:
            raise InputError("compartment", None, f"is missing; the {fire.curve} curve needs the compartment")
        if need == "fire_load" and fire_load is None:
            raise InputError("fire_load", None, f"is missing; the {fire.curve} curve needs the fire load")
        if need == "fire_load_or_heat_release" and fire.heat_release is None:
            if fire_load is None:
                raise InputError("fire_load", None, f"is missing; the {fire.curve} curve needs the fire load (for the "
                                 "heat release of EN 1991-1-2 E.4) or fire.heat_release_file")
            for key in ("fire_area_m2", "heat_release_density_kW_m2"):
                if getattr(fire_load, key) is None:
                    raise InputError(f"fire_load.{key}", None, f"is missing; the heat release of EN 1991-1-2 E.4 "
                                     f"needs it (or give fire.heat_release_file)")
    if "compartment" in fire_models.needs(fire.curve) and compartment.thermal_inertia is None \
            and not compartment.surfaces:
        raise InputError("compartment.thermal_inertia", None,
                         "is missing; give thermal_inertia or [[compartment.surface]] tables")
    materials = read_materials(top.raw("materials", {}))
    members_raw = top.raw("member", [])
    if not isinstance(members_raw, list):
        raise InputError("member", members_raw, "must be an array of [[member]] tables")
    inputs = [Path(source)] if source else []
    if fire.file is not None:
        inputs.append(fire.file)
    if fire.heat_release_file is not None:
        inputs.append(fire.heat_release_file)
    blocks = [member_rows.inline_rows(members_raw)]
    if top.has("members_file"):
        sched = input_path(base, top.string("members_file"), "members_file", allow_outside)
        blocks.append(read_schedule(sched))
        inputs.append(sched)
    count = sum(b.n for b in blocks)
    if not count:
        raise InputError("member", None, "needs at least one [[member]] table or a members_file")
    if count > MAX_MEMBERS:
        raise InputError("member", count, f"at most {MAX_MEMBERS} members per case")
    members = member_rows.read_members(blocks, materials, code)
    names = tuple(m.name for m in members)
    places = MemberPlaces(names=names, blocks=tuple((b.n, b.where) for b in blocks))
    _check_positions(fire, members, places)
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
                member_places=places, record=record, variability=variability)


def _check_positions(fire, members, places):
    """Every member has the ``position`` keys its fire model reads, inside the fire's space; no member
    gives one that the fire does not read."""
    keys = fire_models.position_keys(fire.curve)
    for k, m in enumerate(members):
        p = m.position
        if not keys:
            if p is not None:
                raise InputError(f"{places.label(k, m)}.position", p, "is only used with curve = \"localised\" or "
                                 "\"travelling\"")
            continue
        want = "{ " + ", ".join(f"{x} = ..." for x in keys) + " }"
        if p is None:
            raise InputError(f"{places.label(k, m)}.position", None, f"is missing; the {fire.curve} fire needs {want} [m]")
        for x in keys:
            if x not in p:
                raise InputError(f"{places.label(k, m)}.position.{x}", None, f"is missing; the {fire.curve} fire needs {want} [m]")
        extra = [x for x in p if x not in keys]
        if extra:
            raise InputError(f"{places.label(k, m)}.position.{extra[0]}", p[extra[0]],
                             f"is not used by the {fire.curve} fire (it reads {', '.join(keys)})")
        o = fire.options
        if "height_m" in p and p["height_m"] > o["ceiling_height_m"]:
            raise InputError(f"{places.label(k, m)}.position.height_m", p["height_m"],
                             f"must be <= fire.{fire.curve}.ceiling_height_m = {o['ceiling_height_m']:g} m")
        if "along_m" in p and p["along_m"] > o["length_m"]:
            raise InputError(f"{places.label(k, m)}.position.along_m", p["along_m"],
                             f"must lie on the floor, 0 to fire.{fire.curve}.length_m = {o['length_m']:g} m")


def _refuse_repeated_name(places, members):
    """Raise for the first member whose name an earlier member already has."""
    seen = {}
    for k, m in enumerate(members):
        where = places.where(k)
        if m.name in seen:
            raise InputError(f"{member_rows._label(where, m.name)}.name", m.name, f"must be unique (also {seen[m.name]})")
        seen[m.name] = where


#: Characters refused in any key or text of a case: the C0 and C1 controls and the Unicode line and
#: paragraph separators (a newline in a name would forge a second error line; ESC reaches the terminal).
_CONTROL = frozenset([chr(c) for c in range(32)] + [chr(127)] + [chr(c) for c in range(0x80, 0xA0)]
                     + ["\u2028", "\u2029"]
                     # Unicode direction marks, embeddings, overrides and isolates: they reorder the text that
                     # follows them on a terminal or in the report (a title that reads other than it is)
                     + ["\u061c", "\u200e", "\u200f"] + [chr(c) for c in range(0x202A, 0x202F)]
                     + [chr(c) for c in range(0x2066, 0x206A)])
#: Longest texts [characters]: the title and the [record] lines are one line of a title block.
_TEXT_LIMITS = {"title": 200, "record.notes": 4000}
_RECORD_LINE = 200
_TEXT_DEFAULT = 4096
#: Texts where a line break (and a tab) is allowed.
_MULTILINE = ("record.notes", "title")


def _check_tree(data):
    """Walk the whole case (without recursion, so deep nesting cannot exhaust the stack): refuse integers
    outside 64 bits (TOML 1.0 integers are 64-bit), empty keys, and control characters in keys and texts."""
    stack = [(data, "")]
    while stack:
        v, where = stack.pop()
        items = v.items() if isinstance(v, dict) else enumerate(v, start=1)
        for k, x in items:
            if isinstance(v, dict):
                if k == "":
                    raise InputError(f"{where}.\"\"" if where else '""', x, "empty keys are not allowed")
                if any(c in _CONTROL for c in k):
                    raise InputError(f"{where}.{k}" if where else k, x, "keys must not contain control characters")
                at = f"{where}.{k}" if where else str(k)
            else:
                at = f"{where}[{k}]"
            t = type(x)
            if t is int and not (INT64_MIN <= x <= INT64_MAX):
                raise InputError(at, x, "integers must fit in 64 bits (TOML 1.0); give a number in the key's unit")
            if t is str:
                bad = [c for c in x if c in _CONTROL and not (at in _MULTILINE and c in "\n\t")]
                if bad:
                    raise InputError(at, x, "must not contain control characters (line breaks, escape codes, "
                                            "direction overrides)")
                limit = _TEXT_LIMITS.get(at, _RECORD_LINE if at.startswith("record.") else _TEXT_DEFAULT)
                if len(x) > limit and not at.startswith("member["):  # members: their own validator's words
                    raise InputError(at, f"{len(x)} characters", f"must be at most {limit} characters")
            elif t is dict or t is list:
                stack.append((x, at))


def time_step_limit(members, code):
    """Largest time step [s] the clauses allow for these members, and the clause that sets it."""
    if any(not m.protected for m in members):
        return code["max_time_step_bare_s"], "EN 1993-1-2 4.2.5.1(4), bare steel"
    return code["max_time_step_protected_s"], "EN 1993-1-2 4.2.5.2(3), protected steel"


def with_time_step(case: Case, time_step_s, field="--time-step-s") -> Case:
    """The case with another time step, checked like the case file's own."""
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
    (:func:`steelfire.models.stability.stable_min_thickness_m`, with the material's largest conductivity);
    the first such member (in case order) is named."""
    at = [i for i, m in enumerate(members) if m.protection is not None and m.thickness_mm is not None]
    if not at:
        return
    props = {name: (max(v for _, v in mat.conductivity_table), mat.specific_heat, mat.density)
             for name, mat in materials.items()}
    lam, c_p, rho_p = np.array([props[members[i].protection] for i in at], dtype=float).T
    am_v = np.array([members[i].section_factor_per_m for i in at], dtype=float)
    d_mm = np.array([members[i].thickness_mm for i in at], dtype=float)
    d_min_mm = 1e3 * stability.stable_min_thickness_m(lam, c_p, rho_p, am_v, time_step_s, code["steel_density_kg_m3"])
    bad = np.flatnonzero(d_mm < d_min_mm)
    if len(bad):
        j = int(bad[0])
        i, m = at[j], members[at[j]]
        raise InputError(
            f"{member_label(places, i, m)}.thickness_mm", m.thickness_mm,
            f"too thin for the time step {time_step_s:g} s ({field}): eq (4.27) of EN 1993-1-2, stepped "
            f"explicitly, needs d_p >= {d_min_mm[j]:.3g} mm here (lambda_p = {lam[j]:g} W/(m K), "
            f"Ap/V = {m.section_factor_per_m:g} 1/m); give a thicker protection or a smaller time step")


def _read_fire(t: TableReader | None, base_dir: Path, allow_outside=False) -> FireSpec:
    if t is None:
        raise InputError("fire", None, "is missing; needs at least curve and duration_min")
    curve = t.string("curve", choices=CURVES)
    duration = t.number("duration_min", "min", lo=1.0, hi=MAX_DURATION_MIN)
    hc = t.number("convection_coefficient", "W/(m2 K)", required=False, lo=1.0, hi=500.0)
    file = table = None
    if curve == "table":
        file = input_path(base_dir, t.string("file"), "fire.file", allow_outside)
        table = read_curve_csv(file)
        if duration * 60.0 > table.time_s[-1] + 1e-9:
            raise InputError("fire.duration_min", duration,
                             f"must not exceed the last time of {table.source} ({table.time_s[-1] / 60:g} min)")
    elif t.has("file"):
        raise InputError("fire.file", t.raw("file"), 'is only used with curve = "table"')
    smoothing = t.number("smoothing_s", "s", required=False, lo=0.0, hi=3600.0)
    if smoothing is not None and curve != "table":
        raise InputError("fire.smoothing_s", smoothing, 'is only used with curve = "table"')
    hr_file = hr = None
    if t.has("heat_release_file"):
        if curve != "localised":
            raise InputError("fire.heat_release_file", t.raw("heat_release_file"), 'is only used with curve = "localised"')
        hr_file = input_path(base_dir, t.string("heat_release_file"), "fire.heat_release_file", allow_outside)
        from steelfire.inputs.curves import read_heat_release_csv

        hr = read_heat_release_csv(hr_file)
    options = {}
    for other in fire_models.MODELS:
        if other != curve and t.has(other) and fire_models.options(other):
            raise InputError(f"fire.{other}", "{...}", f'is only used with curve = "{other}"')
    if fire_models.options(curve):
        sub = TableReader(t.raw(curve, {}), f"fire.{curve}", keys=tuple(o.key for o in fire_models.options(curve)))
        for o in fire_models.options(curve):
            if o.many and isinstance(sub.raw(o.key), list):
                vals = sub.raw(o.key)
                if not vals:
                    raise InputError(f"fire.{curve}.{o.key}", vals, "must hold at least one value")
                for j, v in enumerate(vals):
                    TableReader({o.key: v}, f"fire.{curve}").number(o.key, o.unit, lo=o.lo, hi=o.hi, lo_open=o.lo_open)
                options[o.key] = [float(v) for v in vals]
            else:
                v = sub.number(o.key, o.unit, required=o.required, default=o.default, lo=o.lo, hi=o.hi,
                               lo_open=o.lo_open)
                options[o.key] = [v] if (o.many and v is not None) else v
        sub.done()
    t.done()
    if smoothing is not None:
        options["smoothing_s"] = smoothing
    return FireSpec(curve=curve, duration_min=duration, file=file, convection_coefficient=hc, table=table,
                    options=options, heat_release_file=hr_file, heat_release=hr)


def _read_record(data) -> dict:
    """The ``[record]`` table: who made the calculation and for which project (free text, for the title
    block of the report)."""
    t = TableReader(data, "record", keys=RECORD_KEYS)
    out = {k: t.string(k, required=False) for k in RECORD_KEYS}
    t.done()
    return {k: v for k, v in out.items() if v is not None}


def _read_analysis(data) -> AnalysisSettings:
    t = TableReader(data, "analysis", keys=ANALYSIS_KEYS)
    step = t.number("time_step_s", "s", required=False, default=5.0, lo=0.0, lo_open=True, hi=300.0)
    horizon = t.number("standard_horizon_min", "min", required=False, default=240.0, lo=1.0, hi=MAX_DURATION_MIN)
    allow = t.boolean("allow_out_of_scope", default=False)
    model = t.string("protection_model", required=False, default="lumped", choices=PROTECTION_MODELS)
    t.done()
    return AnalysisSettings(time_step_s=step, standard_horizon_min=horizon, allow_out_of_scope=allow,
                            protection_model=model)


def _read_compartment(data) -> Compartment:
    t = TableReader(data, "compartment", keys=COMPARTMENT_KEYS)
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
        ot = TableReader(o, f"compartment.opening[{i + 1}]", keys=OPENING_KEYS)
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
    if b is None and not surfaces_raw:
        raise InputError("compartment.thermal_inertia", None,
                         "is missing; give b [J/(m2 s^0.5 K)] or [[compartment.surface]] tables of the linings")
    surfaces = []
    for i, s in enumerate(surfaces_raw):
        where = f"compartment.surface[{i + 1}]"
        st = TableReader(s, where, keys=SURFACE_KEYS)
        area = st.number("area_m2", "m2", lo=0.0, lo_open=True, hi=1e6)
        layers_raw = st.raw("layers")
        st.done()
        if not isinstance(layers_raw, list) or not layers_raw:
            raise InputError(f"{where}.layers", layers_raw, "needs at least one layer table")
        layers = []
        for j, lr in enumerate(layers_raw):
            lt = TableReader(lr, f"{where}.layers[{j + 1}]", keys=LAYER_KEYS)
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


def _read_fire_load(data, code) -> FireLoad:
    """The ``[fire_load]`` table. Nothing that changes the design fire load is assumed: the growth rate, the
    occupancy factor delta_q2 and the fire-fighting measures (delta_n, as their product ``measures_factor``
    or as the individual measures of Table E.2 in ``[fire_load.measures]``) must be given, or come from an
    ``occupancy`` preset (EN 1991-1-2 Tables E.1, E.4, E.5) which the outputs show as such."""
    from steelfire.models.fire.fireload import MEASURES, NORMAL_MEASURES, OCCUPANCIES, measures_factor

    t = TableReader(data, "fire_load", keys=FIRE_LOAD_KEYS)
    occupancy = t.string("occupancy", required=False, choices=tuple(OCCUPANCIES))
    preset = OCCUPANCIES.get(occupancy, {})
    from_preset = []
    qk = t.number("characteristic_MJ_m2", "MJ/m2", required=False, lo=0.0, lo_open=True, hi=20000.0)
    qd = t.number("design_MJ_m2", "MJ/m2", required=False, lo=0.0, lo_open=True, hi=20000.0)
    if qk is None and qd is None and "characteristic_MJ_m2" in preset:
        qk = preset["characteristic_MJ_m2"]
        from_preset.append("characteristic_MJ_m2")
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
    d2 = t.number("occupancy_factor", "-", required=False, lo=0.0, lo_open=True, hi=5.0)
    if d2 is None and "occupancy_factor" in preset and qd is None:
        d2 = preset["occupancy_factor"]
        from_preset.append("occupancy_factor")
    dn = t.number("measures_factor", "-", required=False, lo=0.0, lo_open=True, hi=5.0)
    measures = t.raw("measures")
    growth = t.string("growth", required=False, choices=GROWTHS)
    if growth is None and "growth" in preset:
        growth = preset["growth"]
        from_preset.append("growth")
    if growth is None:
        raise InputError("fire_load.growth", None, "is missing; one of slow, medium, fast (EN 1991-1-2 Table E.5; "
                         "library, shopping centre, theatre: fast), or give occupancy = " + " | ".join(OCCUPANCIES))
    rhr = t.number("heat_release_density_kW_m2", "kW/m2", required=False, lo=0.0, lo_open=True, hi=10000.0)
    if rhr is None and "heat_release_density_kW_m2" in preset:
        rhr = preset["heat_release_density_kW_m2"]
        from_preset.append("heat_release_density_kW_m2")
    a_fi = t.number("fire_area_m2", "m2", required=False, lo=0.0, lo_open=True, hi=1e6)
    t.done()
    if qd is not None:
        for key in ("combustion_factor", "area_factor", "occupancy_factor", "measures_factor", "measures"):
            if key in data:
                raise InputError(f"fire_load.{key}", data[key],
                                 "is not used with design_MJ_m2 (already a design value); remove it")
    else:
        if d2 is None:
            raise InputError("fire_load.occupancy_factor", None,
                             "is missing; delta_q2 of EN 1991-1-2 Table E.1 (offices 1.0), or an occupancy preset "
                             "that Table E.1 names (dwelling, hotel_room, office)")
        if measures is not None and dn is not None:
            raise InputError("fire_load.measures_factor", dn, "give measures_factor or [fire_load.measures], not both")
        if measures is None and dn is None:
            raise InputError("fire_load.measures_factor", None,
                             "is missing; the product delta_n of EN 1991-1-2 Table E.2 (1.0 where no measure is "
                             "credited), or the measures one by one in [fire_load.measures]")
        if measures is not None:
            mt = TableReader(measures, "fire_load.measures", keys=tuple(MEASURES))
            stated = {}
            for key in MEASURES:
                if key == "independent_water_supplies":
                    v = mt.number(key, "-", required=False, default=0, lo=0, hi=2, integer=True)
                else:
                    v = mt.boolean(key, default=None if key in NORMAL_MEASURES else False)
                    if v is None:
                        raise InputError(f"fire_load.measures.{key}", None, "is missing; true or false (the normal "
                                         "fire-fighting measures of EN 1991-1-2 Table E.2 are stated, not assumed)")
                stated[key] = v
            mt.done()
            measures = stated
            dn = measures_factor(stated, code)
    return FireLoad(characteristic_MJ_m2=qk, design_MJ_m2=qd, combustion_factor=m, area_factor=area_factor,
                    occupancy_factor=1.0 if d2 is None else d2, measures_factor=1.0 if dn is None else dn,
                    growth=growth, heat_release_density_kW_m2=rhr, fire_area_m2=a_fi, occupancy=occupancy,
                    measures=measures, from_preset=tuple(from_preset))