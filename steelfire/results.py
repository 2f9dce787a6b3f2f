"""Results of a run, held as columns: one :class:`MemberTable` per run; a member object is a view of a row.

Numbers are kept at full precision; the outputs round them to what a report shows (0.01 C, 0.01 min,
six significant figures for factors) through :func:`round_column` and :func:`sig_column`, so that the
report, the CSV files and the JSON agree, and the verdicts are those of the rounded numbers.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass, field

import numpy as np


def round_column(values, nd=2) -> np.ndarray:
    """Values rounded to ``nd`` decimals as Python's ``round`` does, as a float array (NaN for None).

    numpy's rint(v 10^nd) / 10^nd is the double nearest Python's decimal result except where v 10^nd
    lies within rounding error of a half or beyond 2**52; those few go through ``round`` itself.
    """
    a = float_column(values)
    scale = 10.0 ** nd
    with np.errstate(invalid="ignore", over="ignore"):
        y = a * scale
        r = np.rint(y) / scale
        doubtful = (np.abs(y - np.floor(y) - 0.5) < 1e-6) | (np.isfinite(a) & ~(np.abs(y) < 2.0 ** 52))
    for i in np.flatnonzero(doubtful):
        r[i] = round(float(a[i]), nd)
    return r


def sig(v, n=6):
    """``v`` to ``n`` significant figures (None and non-finite values: None)."""
    if v is None:
        return None
    v = float(v)
    if not math.isfinite(v):
        return None
    return v if v == 0 else float(f"{v:.{n}g}")


def sig_column(values, n=6) -> np.ndarray:
    """:func:`sig` of each value, as a float array (NaN for None)."""
    a = float_column(values)
    return np.array([np.nan if (s := sig(v, n)) is None else s for v in a.tolist()], dtype=float)


def float_column(values) -> np.ndarray:
    """``values`` as a float array, NaN for None (a float array is taken as it is)."""
    if isinstance(values, np.ndarray) and values.dtype == np.float64:
        return values
    return np.array([np.nan if v is None else v for v in values], dtype=float)


def none_for_nan(a) -> list:
    """A float array as a list of Python floats, None for NaN (JSON's null)."""
    out = np.asarray(a, dtype=float).tolist()
    for i in np.flatnonzero(np.isnan(a)):
        out[i] = None
    return out


def rounded(v, nd=2):
    """``v`` rounded to ``nd`` decimals; None and NaN give None."""
    if v is None:
        return None
    v = float(v)
    return None if math.isnan(v) else round(v, nd)


@dataclass
class FireResult:
    """The design fire of a run: the model's name, the gas temperature on the run's grid, its peak, and
    the model's intermediate values (``values``, shown in the order of ``quantities``)."""

    curve: str
    duration_min: float
    convection_coefficient: float
    time_s: np.ndarray
    gas_temperature_C: np.ndarray
    peak_gas_temperature_C: float
    time_of_peak_gas_min: float
    values: dict = field(default_factory=dict)
    quantities: tuple = ()
    equivalence_factors: dict | None = None
    nominal: bool = False
    cools: bool = False

    def __getattr__(self, name):  # the model's values as attributes (result.fire.gamma)
        values = self.__dict__.get("values", {})
        if name in values:
            return values[name]
        if name in _CONTRACT_FIRE_KEYS:
            return None
        raise AttributeError(name)


#: Keys of the ``fire`` object every document has (null where a model does not set them).
_CONTRACT_FIRE_KEYS = ("opening_factor_m05", "opening_height_m", "thermal_inertia", "design_fire_load_MJ_m2",
                       "total_area_fire_load_MJ_m2", "gamma", "gamma_lim", "k_factor", "t_lim_min", "regime")


#: The verdict bits of one member's equivalence entry (EquivalenceColumns.code), lowest first.
VERDICT_BITS = ("has_annex_f", "has_cib_w14", "has_equal_temperature", "uncons_annex_f", "uncons_cib_w14",
                "has_required", "meets_annex_f", "meets_cib_w14", "meets_equal_temperature",
                "meets_equal_temperature_given", "resists_annex_f", "resists_cib_w14", "resists_equal_temperature")


@dataclass(eq=False)
class EquivalenceColumns:
    """The members' equivalence entries by column: the routes' times as float arrays (NaN for null) and,
    per member, a small integer ``code`` naming its verdicts; ``verdicts[code]`` spells one out as
    (unconservative routes, resists pairs, meets_required pairs or None). A schedule has few distinct
    verdicts, so each is worded once."""

    annex_f_min: np.ndarray
    cib_w14_min: np.ndarray
    equal_temperature_min: np.ndarray
    annex_f_k_c: np.ndarray
    annex_f_small_compartment_min: np.ndarray
    code: np.ndarray
    verdicts: list

    def unconservative_any(self) -> np.ndarray:
        """Per member: is any route flagged unconservative."""
        flagged = np.array([bool(v[0]) for v in self.verdicts], dtype=bool)
        return flagged[self.code] if len(self.code) else np.zeros(0, dtype=bool)

    def entry(self, i: int) -> dict:
        """Member ``i``'s equivalence entry as a dict (unrounded)."""
        uncons, resists, meets = self.verdicts[int(self.code[i])]
        val = {k: (None if np.isnan(x) else float(x)) for k, x in (
            ("annex_f_min", self.annex_f_min[i]), ("cib_w14_min", self.cib_w14_min[i]),
            ("equal_temperature_min", self.equal_temperature_min[i]), ("annex_f_k_c", self.annex_f_k_c[i]),
            ("annex_f_small_compartment_min", self.annex_f_small_compartment_min[i]))}
        return {"annex_f_min": val["annex_f_min"], "cib_w14_min": val["cib_w14_min"],
                "equal_temperature_min": val["equal_temperature_min"], "unconservative": list(uncons),
                "resists": dict(resists), "meets_required": None if meets is None else dict(meets),
                "annex_f_k_c": val["annex_f_k_c"], "annex_f_small_compartment_min": val["annex_f_small_compartment_min"]}


class MemberTable:
    """The members' results of one run, by column.

    ``text`` columns (lists): the members' own values (None where absent); ``number`` columns (float
    arrays, NaN for none): computed values; ``histories``: design-fire steel temperatures (time x member)
    or None; ``equivalence``: an :class:`EquivalenceColumns` or None; ``sizing``: a list of dicts or None.
    A column is read as an attribute (``table.peak_steel_temperature_C``); :meth:`member` gives a row.
    """

    def __init__(self, columns: dict, histories=None, equivalence=None, sizing=None, extras=None):
        self.columns = columns
        self.histories = histories
        self.equivalence = equivalence
        self.sizing = sizing
        self.extras = extras or {}
        self.n = len(columns["name"])

    def __len__(self):
        return self.n

    def __getattr__(self, name):
        cols = self.__dict__.get("columns", {})
        if name in cols:
            return cols[name]
        raise AttributeError(name)

    def member(self, i: int) -> "MemberResult":
        return MemberResult(self, i)

    def rounded(self) -> dict:
        """The columns the outputs show, rounded (see the module docstring), with the verdicts of the
        rounded numbers: ``passes`` (peak <= critical), ``margin_C``, ``meets_required_period``."""
        c = self.columns
        peak = round_column(c["peak_steel_temperature_C"])
        crit = round_column(c["critical_temperature_C"])
        t_std = round_column(c["standard_fire_time_to_critical_min"])
        req = float_column(c["required_minutes"])
        meets = np.isnan(t_std) | (t_std >= req)   # NaN: not reached within the horizon
        return {
            "peak_steel_temperature_C": peak, "critical_temperature_C": crit,
            "time_of_peak_steel_min": round_column(c["time_of_peak_steel_min"]),
            "margin_C": round_column(np.asarray(c["critical_temperature_C"]) - np.asarray(c["peak_steel_temperature_C"])),
            "standard_fire_time_to_critical_min": t_std,
            "passes": peak <= crit,
            "meets_required_period": [None if math.isnan(q) else bool(v) for v, q in zip(meets, req.tolist())],
        }

    def ok(self) -> np.ndarray:
        """Per member: passes the design fire and meets its required period, by a margin larger than the
        numerical error (a verdict within it, ``marginal``, is not one to sign)."""
        r = self.rounded()
        short = np.array([q is False for q in r["meets_required_period"]], dtype=bool)
        marginal = np.asarray(self.extras.get("marginal", np.zeros(self.n, dtype=bool)), dtype=bool)
        return r["passes"] & ~short & ~marginal


class MemberResult:
    """One member's results: a view of row ``i`` of a :class:`MemberTable` (columns as attributes)."""

    __slots__ = ("_t", "_i")

    def __init__(self, table: MemberTable, i: int):
        self._t = table
        self._i = i

    def __getattr__(self, name):
        t, i = self._t, self._i
        cols = t.columns
        if name in cols:
            v = cols[name][i]
            if isinstance(v, (np.floating, float)):
                v = float(v)
                return None if math.isnan(v) and name in _NULLABLE else v
            return v.item() if isinstance(v, np.generic) else v
        if name in t.extras:
            v = t.extras[name][i]
            return v.item() if isinstance(v, np.generic) else v
        raise AttributeError(name)

    @property
    def steel_temperature_C(self):
        h = self._t.histories
        return None if h is None else h[:, self._i]

    @property
    def equivalence(self):
        e = self._t.equivalence
        return None if e is None else e.entry(self._i)

    @property
    def sizing(self):
        s = self._t.sizing
        return None if s is None else s[self._i]

    @property
    def margin_C(self) -> float:
        return self.critical_temperature_C - self.peak_steel_temperature_C

    @property
    def passes(self) -> bool:
        return round(self.peak_steel_temperature_C, 2) <= round(self.critical_temperature_C, 2)

    @property
    def meets_required_period(self):
        if self.required_minutes is None:
            return None
        t = self.standard_fire_time_to_critical_min
        return t is None or round(t, 2) >= self.required_minutes

    @property
    def ok(self) -> bool:
        marginal = self._t.extras.get("marginal")
        return (self.passes and self.meets_required_period is not False
                and not (marginal is not None and marginal[self._i]))

    def __repr__(self):
        return f"MemberResult({self.name!r}, peak {self.peak_steel_temperature_C:.1f} C)"


#: Columns whose NaN means "none" (null).
_NULLABLE = frozenset({"standard_fire_time_to_critical_min", "required_minutes", "thickness_mm", "utilisation",
                       "shadow_factor"})


class MemberResults(Sequence):
    """The member results of a run as a sequence of :class:`MemberResult` views of one table."""

    def __init__(self, table: MemberTable):
        self.table = table

    def __len__(self):
        return len(self.table)

    def __getitem__(self, i):
        if isinstance(i, slice):
            return [self.table.member(k) for k in range(len(self.table))[i]]
        if i < 0:
            i += len(self.table)
        if not 0 <= i < len(self.table):
            raise IndexError(i)
        return self.table.member(i)


@dataclass
class AnalysisResult:
    """Everything one run of a case produced; :mod:`steelfire.outputs.document` writes it out."""

    title: str
    fire: FireResult
    members: MemberResults
    code_values: dict
    warnings: list
    out_of_scope: list
    time_step_s: float
    standard_horizon_min: float
    cautions: tuple
    command: str = "check"

    @property
    def table(self) -> MemberTable:
        return self.members.table

    @property
    def all_ok(self) -> bool:
        return bool(np.all(self.table.ok()))
