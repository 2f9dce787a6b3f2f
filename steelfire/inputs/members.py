"""Member rows -> validated members: one validator, a column at a time, for [[member]] tables and schedules.

Member rows come as blocks (the case file's [[member]] tables, a schedule file), each held by column
(:class:`MemberRows`: key -> one raw value per row, :data:`ABSENT` where a row does not give the key).
The rules below are checked a column at a time; each finds the first row that breaks it, and the error
raised is that of the earliest row (ties: the earlier rule), worded with the row's place in its file
(``member[3] (B3-01).thickness_mm`` or ``sched.csv row 7 (P2).thickness_mm``), the value and what is
allowed.
"""

from __future__ import annotations

import difflib
import math
from dataclasses import dataclass, field

from steelfire.errors import InputError
from steelfire.models import sections as sec

KINDS = ("beam", "column", "tension", "brace", "other")

#: Every key a member row may give (a [[member]] table or a schedule column); the contract of the case file.
MEMBER_KEYS = ("name", "kind", "laterally_restrained", "section_factor_per_m", "utilisation",
               "critical_temperature_C", "protection", "thickness_mm", "required_minutes", "shadow_factor",
               "section", "exposure", "encasement", "steel_grade", "axial_force_kN", "moment_y_kNm",
               "buckling_length_m", "buckling_length_y_m", "buckling_length_z_m", "lateral_restraint_length_m",
               "moment_factor_C1", "adaptation_factor_k1", "adaptation_factor_k2", "equivalent_moment_factor_y",
               "equivalent_moment_factor_LT", "position")

#: The keys of a member's ``position`` table (which a fire model reads: localised r and z, travelling x).
POSITION_NUMBERS = {"distance_m": ("m", 0.0, 10000.0), "height_m": ("m", 0.0, 1000.0), "along_m": ("m", 0.0, 10000.0)}

#: The keys of a member checked by its resistance (EN 1993-1-2 4.2.3), key -> (unit, lo, hi, lo_open).
DESIGN_NUMBERS = {
    "axial_force_kN": ("kN", -1e6, 1e6, False),
    "moment_y_kNm": ("kNm", 0.0, 1e5, False),
    "buckling_length_m": ("m", 0.0, 200.0, True),
    "buckling_length_y_m": ("m", 0.0, 200.0, True),
    "buckling_length_z_m": ("m", 0.0, 200.0, True),
    "lateral_restraint_length_m": ("m", 0.0, 200.0, True),
    "moment_factor_C1": ("-", 1.0, 3.0, False),
    "adaptation_factor_k1": ("-", 0.7, 1.0, False),   # EN 1993-1-2 4.2.3.3(7): 1.0, 0.85 or 0.7
    "adaptation_factor_k2": ("-", 0.85, 1.0, False),  # EN 1993-1-2 4.2.3.3(8): 1.0 or 0.85
    "equivalent_moment_factor_y": ("-", 1.1, 2.5, False),
    "equivalent_moment_factor_LT": ("-", 1.1, 2.5, False),
}
DESIGN_KEYS = ("steel_grade",) + tuple(DESIGN_NUMBERS)

#: User section geometry (a [[member]] ``section`` table): shape -> (keys, constructor of steelfire.models.sections).
SECTION_SHAPES = {
    "rolled-I": ("h_mm", "b_mm", "tw_mm", "tf_mm", "r_mm"),
    "welded-I": ("h_mm", "b_mm", "tw_mm", "tf_mm"),
    "RHS": ("h_mm", "b_mm", "t_mm"),
    "CHS": ("d_mm", "t_mm"),
}

#: Key -> (unit, lo, hi) of the member numbers, each lo < value <= hi (all bounds finite).
MEMBER_NUMBERS = {
    "critical_temperature_C": ("C", 20.0, 1200.0),
    "thickness_mm": ("mm", 0.0, 300.0),
    "shadow_factor": ("-", 0.0, 1.0),
    "section_factor_per_m": ("1/m", 0.0, 1000.0),
    "required_minutes": ("min", 1.0, 1440.0),
}
UTILISATION_RANGE = (0.013, 1.0)          # lo <= mu0 < hi, EN 1993-1-2 4.2.4(3), eq (4.22)
MIN_SECTION_FACTOR_PROTECTED_PER_M = 1.0  # Ap/V; bare steel takes code["section_factor_min_bare_per_m"]


#: How a refusal names a member that can lose stability, by kind.
_UNSTABLE_NAMES = {"beam": "laterally unrestrained beam", "other": 'member of kind "other"'}


class _Absent:
    """The marker of a key a member row does not give (an absent key, an empty schedule cell)."""

    __slots__ = ()

    def __repr__(self):
        return "ABSENT"


ABSENT = _Absent()


@dataclass(frozen=True)
class Member:
    """One member of the schedule, validated.

    ``section_factor_per_m`` is Am/V (bare) or Ap/V (protected) [1/m], from the case or the section;
    ``shadow_ratio`` is [Am/V]b / [Am/V] of a bare member (1 where not given), ``i_section`` whether
    eq (4.26a) applies to it under nominal fires (a catalogue I/H section); ``notes`` what the loader
    did with the member's values that an engineer should know.
    """

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
    shadow_ratio: float = 1.0
    i_section: bool = False
    notes: tuple = field(default=(), compare=False)
    design: dict | None = None
    geometry: object = field(default=None, compare=False, repr=False)
    position: dict | None = None
    row: dict = field(default=None, compare=False, repr=False)   # the keys as given, for Case.with_member

    @property
    def by_resistance(self) -> bool:
        """Whether the critical temperature comes from the member's resistance (EN 1993-1-2 4.2.3)."""
        return self.design is not None

    @property
    def unstable(self) -> bool:
        """A member that can buckle: a column, a brace, an 'other' or a beam not held laterally."""
        return self.kind in ("column", "brace", "other") or (self.kind == "beam" and self.laterally_restrained is not True)

    @property
    def protected(self) -> bool:
        return self.protection is not None

    def shadow_factor_in(self, nominal_fire: bool, code) -> float:
        """k_sh of EN 1993-1-2 4.2.5.1(2): eq (4.26a) (code value times the ratio) for an I-section under a
        nominal fire, eq (4.26b) (the ratio) otherwise."""
        if nominal_fire and self.i_section:
            return code["shadow_factor_i_nominal"] * self.shadow_ratio
        return self.shadow_ratio


@dataclass
class MemberRows:
    """A block of member rows by column: ``columns`` key -> raw values (ABSENT where not given),
    ``where(i)`` the row's place (``member[3]``, ``sched.csv row 7``), ``bad_rows`` structural problems
    found while reading (row, key, value, allowed)."""

    n: int
    columns: dict
    where: object
    bad_rows: list = field(default_factory=list)


def inline_rows(tables: list) -> MemberRows:
    """The case file's [[member]] tables as a :class:`MemberRows` block."""
    cols = {}
    bad = []
    keys = set()
    for i, t in enumerate(tables):
        if type(t) is not dict:
            bad.append((i, None, t, "must be a table"))
            continue
        keys.update(t)
        for k in t:
            if k not in MEMBER_KEYS:
                close = difflib.get_close_matches(k, MEMBER_KEYS, n=2)
                hint = f"; did you mean {' or '.join(close)}?" if close else ""
                bad.append((i, k, t[k], "is not a known key" + hint))
                break
    for k in MEMBER_KEYS:
        if k in keys:
            cols[k] = [t.get(k, ABSENT) if type(t) is dict else ABSENT for t in tables]
    return MemberRows(len(tables), cols, lambda i: f"member[{i + 1}]", bad)


def _label(where, name):
    return where + (f" ({name})" if isinstance(name, str) and name else "")


def _range_text(lo, hi, lo_open, unit):
    if lo is not None and hi is not None:
        return f"must be {'>' if lo_open else '>='} {lo:g} and <= {hi:g} [{unit}]"
    if lo is not None:
        return f"must be {'>' if lo_open else '>='} {lo:g} [{unit}]"
    return f"must be <= {hi:g} [{unit}]"


def _is_num(v):
    return type(v) in (int, float) or (isinstance(v, (int, float)) and not isinstance(v, bool))


def _number_problem(v, unit, lo, hi, lo_open=True, required=False):
    """Why ``v`` is not an acceptable member number (None if it is)."""
    if v is ABSENT:
        return f"is missing; give a number [{unit}]" if required else None
    if not _is_num(v):
        return f"must be a number [{unit}] (units are in the key name)"
    if not math.isfinite(v):
        return f"must be a finite number [{unit}]"
    if not ((v > lo if lo_open else v >= lo) and v <= hi):
        return _range_text(lo, hi, lo_open, unit)
    return None


def _text_problem(v, choices=None, required=False):
    if v is ABSENT:
        return ("is missing" + (f"; one of {', '.join(choices)}" if choices else "")) if required else None
    if not isinstance(v, str):
        return "must be a string" + (f": one of {', '.join(choices)}" if choices else "")
    if any(not c.isprintable() for c in v):
        return "must not contain control characters (line breaks, escape codes)"
    if choices is not None and v not in choices:
        return f"must be one of {', '.join(choices)}"
    return None


def _first(rows, key, problem):
    """(row, key, value, allowed) of the first value of column ``key`` with a problem, else None."""
    for i, v in enumerate(rows.columns.get(key, (ABSENT,) * rows.n)):
        p = problem(v)
        if p is not None:
            return i, key, v, p
    return None


def _first_where(rows, pred, key, message, value_key=None):
    """(row, key, value, allowed) of the first row for which ``pred(i)`` holds, else None."""
    col = rows.columns.get(value_key or key)
    for i in range(rows.n):
        if pred(i):
            return i, key, (col[i] if col is not None else None), message(i) if callable(message) else message
    return None


class _Sections:
    """Catalogue look-ups and section factors, one per distinct (section, exposure, encasement)."""

    def __init__(self):
        self.cache = {}

    def get(self, name, exposure, encasement):
        key = (_hashable(name), exposure, encasement)
        if key not in self.cache:
            try:
                geom = sec.catalogue_section(name) if isinstance(name, str) else user_section(name)
            except InputError as exc:
                self.cache[key] = ("section", exc)
                return self.cache[key]
            try:
                am_v = sec.section_factor_per_m(geom, exposure, encasement)
                ratio = sec.shadow_ratio(geom, exposure)
            except InputError as exc:
                self.cache[key] = ("exposure", exc)
                return self.cache[key]
            self.cache[key] = (geom, am_v, ratio)
        return self.cache[key]


def _hashable(v):
    return tuple(sorted(v.items())) if isinstance(v, dict) else v


def user_section(table):
    """A section from its geometry, a [[member]] ``section`` table: ``shape`` (rolled-I, welded-I, RHS,
    CHS) and its dimensions in mm (:data:`SECTION_SHAPES`)."""
    shapes = ", ".join(SECTION_SHAPES)
    if not isinstance(table, dict):
        raise InputError("section", table, "a catalogue name such as 'IPE 300' or a table with shape = one of " + shapes)
    shape = table.get("shape")
    if shape not in SECTION_SHAPES:
        raise InputError("section", shape, f"shape must be one of {shapes}")
    keys = SECTION_SHAPES[shape]
    extra = [k for k in table if k not in keys and k != "shape"]
    if extra:
        raise InputError("section", extra[0], f"is not a dimension of a {shape} section ({', '.join(keys)})")
    dims = []
    for k in keys:
        v = table.get(k)
        if not _is_num(v) or not math.isfinite(v) or not 0 < v <= 5000:
            raise InputError("section", v, f"{k} of a {shape} section: a number > 0 and <= 5000 [mm]")
        dims.append(float(v))
    label = f"{shape} " + "x".join(f"{d:g}" for d in dims)
    if shape == "rolled-I":
        return sec.rolled_i_section(*dims, name=label)
    if shape == "welded-I":
        return sec.welded_i_section(*dims, name=label)
    if shape == "RHS":
        return sec.rhs_section(*dims, name=label)
    return sec.chs_section(*dims, name=label)


def read_members(blocks, materials, code) -> tuple:
    """The validated :class:`Member` objects of ``blocks`` (each a :class:`MemberRows`), in order.

    Raises the InputError of the first bad row of the first block that has one.
    """
    out = []
    for rows in blocks:
        out.extend(_block(rows, materials, code))
    return tuple(out)


def _block(rows: MemberRows, materials, code):
    n = rows.n
    c = rows.columns
    absent = [ABSENT] * n

    def col(k):
        return c.get(k, absent)

    name, kind, restrained, am_v, mu, tcr, prot, thick, req, ksh, section, exposure, encasement = (
        col(k) for k in ("name", "kind", "laterally_restrained", "section_factor_per_m", "utilisation",
                         "critical_temperature_C", "protection", "thickness_mm", "required_minutes",
                         "shadow_factor", "section", "exposure", "encasement"))
    mu_lo, mu_hi = UTILISATION_RANGE
    known = ", ".join(sorted(materials)) or "none defined"
    sections = _Sections()
    kind_of = [("beam" if k is ABSENT else k) for k in kind]
    problems = []

    def rule(found):
        if found is not None:
            problems.append((found[0], len(problems), found))

    for i, key, v, allowed in rows.bad_rows:
        problems.append((i, -1, (i, key, v, allowed)))
    # in the order of the keys as a member is read: each rule finds its first bad row
    rule(_first(rows, "name", lambda v: _text_problem(v, required=True)))
    rule(_first(rows, "name", lambda v: "must not be empty" if isinstance(v, str) and not v.strip() else None))
    rule(_first(rows, "kind", lambda v: _text_problem(v, KINDS)))
    rule(_first(rows, "laterally_restrained",
                lambda v: None if v is ABSENT or type(v) is bool else "must be true or false"))
    rule(_first_where(rows, lambda i: restrained[i] is not ABSENT and kind_of[i] != "beam",
                      "laterally_restrained", "applies to beams only (lateral-torsional buckling, EN 1993-1-2 4.2.3.3)",
                      value_key="laterally_restrained"))
    rule(_first(rows, "utilisation", lambda v: _number_problem(v, "-", -math.inf, math.inf) or (
        None if v is ABSENT or mu_lo <= v < mu_hi else f"must be >= {mu_lo:g} and < {mu_hi:g} (EN 1993-1-2 eq (4.22))")))
    unit, lo, hi = MEMBER_NUMBERS["critical_temperature_C"]
    rule(_first(rows, "critical_temperature_C", lambda v: _number_problem(v, unit, lo, hi)))
    rule(_first_where(rows, lambda i: mu[i] is ABSENT and tcr[i] is ABSENT and col("axial_force_kN")[i] is ABSENT
                      and col("moment_y_kNm")[i] is ABSENT, "utilisation",
                      "give utilisation or critical_temperature_C (or the design effects axial_force_kN, "
                      "moment_y_kNm for a check by resistance), exactly one"))
    rule(_first_where(rows, lambda i: mu[i] is not ABSENT and tcr[i] is not ABSENT, "utilisation",
                      "give utilisation or critical_temperature_C, exactly one"))
    rule(_first(rows, "protection", lambda v: _text_problem(v) or (
        None if v is ABSENT or v in materials else f"must name a [materials] table ({known})")))
    unit, lo, hi = MEMBER_NUMBERS["thickness_mm"]
    rule(_first(rows, "thickness_mm", lambda v: _number_problem(v, unit, lo, hi)))
    rule(_first_where(rows, lambda i: thick[i] is not ABSENT and prot[i] is ABSENT, "thickness_mm",
                      "needs protection = a [materials] name"))
    rule(_first(rows, "section", lambda v: None if isinstance(v, dict) else _text_problem(v)))
    for k in ("exposure", "encasement"):
        rule(_first(rows, k, _text_problem))
    unit, lo, hi = MEMBER_NUMBERS["shadow_factor"]
    rule(_first(rows, "shadow_factor", lambda v: _number_problem(v, unit, lo, hi)))
    rule(_first_where(rows, lambda i: ksh[i] is not ABSENT and prot[i] is not ABSENT, "shadow_factor",
                      "applies to bare steel only (EN 1993-1-2 4.2.5.1)"))
    rule(_first_where(rows, lambda i: section[i] is not ABSENT and am_v[i] is not ABSENT, "section_factor_per_m",
                      "give section_factor_per_m or section, not both"))
    rule(_first_where(rows, lambda i: section[i] is not ABSENT and prot[i] is ABSENT
                      and encasement[i] not in (ABSENT, "profile"), "encasement",
                      'a bare member is heated on its profile ("profile")'))
    if "section" in c:
        def section_problem(i):
            if section[i] is ABSENT or not isinstance(section[i], (str, dict)):
                return None
            if any(not (v is ABSENT or isinstance(v, str)) for v in (exposure[i], encasement[i])):
                return None  # refused above as "must be a string
            got = sections.get(section[i], _or(exposure[i], "4-sided"), _or(encasement[i], "profile"))
            return got if isinstance(got[1], InputError) else None

        for i in range(n):
            p = section_problem(i)
            if p is not None:
                where_key, exc = p
                rule((i, where_key, exc.value, exc.allowed))
                break
    for k in ("exposure", "encasement"):
        rule(_first_where(rows, lambda i, k=k: col(k)[i] is not ABSENT and section[i] is ABSENT, k,
                          'needs section = a catalogue profile (e.g. "IPE 300")'))
    unit, lo, hi = MEMBER_NUMBERS["section_factor_per_m"]
    rule(_first_where(rows, lambda i: section[i] is ABSENT and am_v[i] is ABSENT, "section_factor_per_m",
                      f"is missing; give a number [{unit}]"))
    rule(_first(rows, "section_factor_per_m", lambda v: _number_problem(v, unit, lo, hi)))
    rule(_first_where(rows, lambda i: prot[i] is not ABSENT and _is_num(am_v[i])
                      and am_v[i] < MIN_SECTION_FACTOR_PROTECTED_PER_M, "section_factor_per_m",
                      f"must be >= {MIN_SECTION_FACTOR_PROTECTED_PER_M:g} 1/m"))
    unit, lo, hi = MEMBER_NUMBERS["required_minutes"]
    rule(_first(rows, "required_minutes", lambda v: _number_problem(v, unit, lo, hi, lo_open=False)))
    rule(_first(rows, "position", _position_problem))
    # members checked by their resistance (EN 1993-1-2 4.2.3)
    rule(_first(rows, "steel_grade", _text_problem))
    for k, (unit, lo, hi, lo_open) in DESIGN_NUMBERS.items():
        rule(_first(rows, k, lambda v, u=unit, a=lo, b=hi, o=lo_open: _number_problem(v, u, a, b, lo_open=o)))
    axial, moment, grade = col("axial_force_kN"), col("moment_y_kNm"), col("steel_grade")
    effects = [axial[i] is not ABSENT or moment[i] is not ABSENT for i in range(n)]
    rule(_first_where(rows, lambda i: effects[i] and (mu[i] is not ABSENT or tcr[i] is not ABSENT),
                      "axial_force_kN" if "axial_force_kN" in c else "moment_y_kNm",
                      "give the design effects (axial_force_kN, moment_y_kNm) or utilisation or "
                      "critical_temperature_C, one way only", value_key=None))
    for k in DESIGN_KEYS:
        if k in c:
            rule(_first_where(rows, lambda i, k=k: col(k)[i] is not ABSENT and not effects[i], k,
                              "needs the design effects in fire (axial_force_kN and/or moment_y_kNm)"))
    rule(_first_where(rows, lambda i: effects[i] and section[i] is ABSENT, "section",
                      "is missing; a member checked by its resistance needs its section (a catalogue name or "
                      "a table with shape and dimensions)"))
    rule(_first_where(rows, lambda i: effects[i] and grade[i] is ABSENT, "steel_grade",
                      "is missing; one of S235, S275, S355, S420, S460 (EN 10025)"))
    for k in ("buckling_length_y_m", "buckling_length_z_m"):
        rule(_first_where(rows, lambda i, k=k: col(k)[i] is not ABSENT and col("buckling_length_m")[i] is not ABSENT,
                          k, "not together with buckling_length_m (that sets both axes)"))
    lengths = [col("buckling_length_m")[i] is not ABSENT or (col("buckling_length_y_m")[i] is not ABSENT
                                                           and col("buckling_length_z_m")[i] is not ABSENT)
               for i in range(n)]
    rule(_first_where(rows, lambda i: effects[i] and not lengths[i] and (
        kind_of[i] in ("column", "brace") or (_is_num(axial[i]) and axial[i] > 0)), "buckling_length_m",
        "is missing; a member in compression (and every column and brace) needs buckling_length_m (both axes) "
        "or buckling_length_y_m and buckling_length_z_m"))
    rule(_first_where(rows, lambda i: effects[i] and _is_num(moment[i]) and moment[i] > 0 and restrained[i] is not True
                      and col("lateral_restraint_length_m")[i] is ABSENT
                      and (isinstance(section[i], dict) and section[i].get("shape", "").endswith("-I")
                           or isinstance(section[i], str) and not section[i].upper().startswith(("RHS", "SHS", "CHS"))),
                      "lateral_restraint_length_m",
                      "is missing; an I-section with a moment needs the length between lateral restraints "
                      "(or laterally_restrained = true)"))
    unstable = [kind_of[i] in ("column", "brace", "other")
                or (kind_of[i] == "beam" and restrained[i] is not True) for i in range(n)]
    rule(_first_where(rows, lambda i: unstable[i] and mu[i] is not ABSENT and not effects[i], "utilisation",
                      lambda i: (f"EN 1993-1-2 eq (4.22) holds only for members without instability; a "
                                 f"{_UNSTABLE_NAMES.get(kind_of[i], kind_of[i])} needs its "
                                 "resistance: give axial_force_kN and/or moment_y_kNm with section, steel_grade and "
                                 + ("lateral_restraint_length_m (or laterally_restrained = true)" if kind_of[i] == "beam"
                                    else "buckling_length_m") + ", or give critical_temperature_C")))

    if problems:
        i, _, (row, key, value, allowed) = min(problems, key=lambda p: (p[0], p[1]))
        where = _label(rows.where(row), name[row] if row < n else None)
        raise InputError(f"{where}.{key}" if key else where, None if value is ABSENT else value, allowed)

    bare_min = code["section_factor_min_bare_per_m"]
    out = []
    for i in range(n):
        notes = []
        s = section[i]
        i_sec = False
        geom = None
        if s is not ABSENT:
            geom, sf, ratio = sections.get(s, _or(exposure[i], "4-sided"), _or(encasement[i], "profile"))
            i_sec = isinstance(geom, sec.ISection)
        else:
            sf, ratio = float(am_v[i]), 1.0
        design = None
        if axial[i] is not ABSENT or moment[i] is not ABSENT:
            design = {k: col(k)[i] for k in DESIGN_KEYS if col(k)[i] is not ABSENT}
            design.update(kind=kind_of[i], laterally_restrained=restrained[i] is True)
        p = None if prot[i] is ABSENT else prot[i]
        if p is None and ksh[i] is not ABSENT:
            ratio = float(ksh[i])
        if p is None and sf < bare_min:
            notes.append(f"Am/V = {sf:.4g} 1/m taken as {bare_min:g} 1/m (EN 1993-1-2 4.2.5.1(1))")
            sf = bare_min
        out.append(Member(
            name=name[i], kind=kind_of[i], section_factor_per_m=sf,
            utilisation=None if mu[i] is ABSENT else float(mu[i]),
            critical_temperature_C=None if tcr[i] is ABSENT else float(tcr[i]), protection=p,
            thickness_mm=None if thick[i] is ABSENT else float(thick[i]),
            required_minutes=None if req[i] is ABSENT else float(req[i]),
            shadow_factor=None if ksh[i] is ABSENT else float(ksh[i]),
            laterally_restrained=None if restrained[i] is ABSENT else restrained[i],
            section=None if s is ABSENT else (s if isinstance(s, str) else geom.name),
            exposure=None if exposure[i] is ABSENT else exposure[i],
            encasement=None if encasement[i] is ABSENT else encasement[i],
            shadow_ratio=ratio if p is None else 1.0, i_section=i_sec, notes=tuple(notes), design=design,
            geometry=geom, position=None if col("position")[i] is ABSENT
            else {k: float(x) for k, x in col("position")[i].items()},
            row={k: v[i] for k, v in c.items() if v[i] is not ABSENT}))
    return out


def _position_problem(v):
    """Why ``v`` is not a position table (None if it is)."""
    if v is ABSENT:
        return None
    keys = ", ".join(POSITION_NUMBERS)
    if not isinstance(v, dict) or not v:
        return f"must be a table of {keys} [m] (e.g. {{ distance_m = 3.0, height_m = 5.0 }})"
    for k, x in v.items():
        if k not in POSITION_NUMBERS:
            return f"holds {k!r}; its keys are {keys}"
        unit, lo, hi = POSITION_NUMBERS[k]
        p = _number_problem(x, unit, lo, hi, lo_open=False)
        if p is not None:
            return f"{k} {p}"
    return None


def _or(v, default):
    return default if v is ABSENT else v
