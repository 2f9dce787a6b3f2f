"""Fire severity as a distribution: many sampled Annex A fires through the members (``steelfire sample``).

The chain per chunk of fires (fires ``start`` to ``stop - 1`` of the run):

1. Samples: :func:`steelfire.models.variability.samples_range` (drawn in blocks of
   ``variability.BLOCK_SIZE``, each block from its own stream of the seed, so any chunking gives the
   same values bit for bit).
2. Annex A inputs per fire (:func:`steelfire.models.variability.annex_a_inputs`):
   O = opening fraction x the case's O (A_v scales, h_eq and A_t are kept); b sampled, else the case's
   (for layered surfaces, EN 1991-1-2 A.(8)-(9) at each fire's own t_max); q_f,d = q_f x m x delta_q1 x
   delta_q2 x delta_n, the sampled fire load density per floor area times the factors of EN 1991-1-2
   E.(1) that the case gives (where the case gives ``design_MJ_m2``, the sampled value is q_f,d itself);
   q_t,d = q_f,d A_f / A_t; t_lim from the sampled growth rate.
3. The fires (:func:`steelfire.models.fire.parametric.parametric_fires`) and their gas matrix (T, F) on
   one grid: the case's step over ``fire.duration_min``.
4. All members in all fires of the chunk in one call of the batch kernels
   (:func:`steelfire.models.heat.run`, rows = the members repeated per fire): peak steel temperatures,
   compared with the critical temperatures (:func:`steelfire.chain.verdicts.critical_temperatures`).
5. Time equivalence per member and fire: equal steel temperature (each member's standard-fire history,
   run once, read where its running maximum first reaches the sampled peak, linear within the step, as
   the kernels time a crossing), EN 1991-1-2 Annex F and CIB W14
   (:mod:`steelfire.models.equivalence_many`, the array form of :mod:`steelfire.models.equivalence`).
6. Reduced to integer counts and fixed-bin histograms (:class:`steelfire.models.variability.Tally`),
   which add exactly: no fires x members matrix is kept beyond one chunk.

The peak between grid points. Each fire's t_max (and burnout) falls anywhere; one grid cannot hold them
all, and the union of the key times would multiply the grid. The grid is the case's step everywhere:
the gas curve is then cut at its apex by up to (slope x step / 2), at most 0.65 C of gas at 5 s over
400 sampled fires (tests/test_sampling.py), and the steel peaks, which lag the gas, move far less:
at 5 s the largest difference from the single-fire check (t_max and burnout on the grid) measured
0.21 C for protected and 0.03 C for bare members over those fires, about a third of that at 2.5 s.
Every run measures it again on its first fires (:data:`GRID_CHECK_FIRES`, ``grid_check`` in the
output) and reports the largest difference.

The error band. A fire that passes by less than the numerical error of its peak is not shown safe.
Before the fires are counted, each member's error band [C] is measured on the first fires
(:func:`error_band`): the largest of its grid check difference and of 2 x its peak difference at half
the time step on the common grid (the deterministic check's estimate of a first-order step's error,
:mod:`steelfire.chain.steps`). Every chunk then counts the fires whose peak lies within the band of the
critical temperature (``near_critical_fires``) and those of them that pass; counted as exceeding, they
give ``exceedance_probability_with_band`` and its interval, which --size and the comparison with
``target_probability`` judge by (the safe side). The plain estimate is kept beside it.

Fires outside Annex A's range (per fire: O, b, q_t,d; :data:`steelfire.models.fire.parametric.
SCOPE_FINDINGS`) are counted and reported, never dropped or clipped, and enter the statistics computed
as published; each member's exceedances among them are reported beside. Fires Annex A cannot describe
(k <= 0 in eq (A.8)) have no gas temperature and count as exceeding for every member (they cannot be
shown safe). A compartment outside Annex A's limits (floor area, height, roof openings) is refused unless
``analysis.allow_out_of_scope``, as by the check.

Backends: in-process (the kernels' own threads), a local dask.distributed cluster of ``workers``
processes, or an existing cluster at ``scheduler``. The result depends on none of them, nor on the
chunk size: the samples are drawn by block, each fire's arithmetic does not depend on its neighbours,
and the statistics are integer sums (tests/test_sampling.py holds all of them to the same bits).
"""

from __future__ import annotations

import dataclasses
import math
import sys
import threading
import time
from dataclasses import dataclass, field
from typing import Mapping

import numpy as np

from steelfire.chain import fires as chain_fires
from steelfire.chain import steps, thermal, verdicts
from steelfire.errors import InputError, OutOfScopeError
from steelfire.models import equivalence_many
from steelfire.models import variability as V
from steelfire.models.fire import compartment as compartment_model
from steelfire.models.fire import fireload
from steelfire.models.fire import parametric as P
from steelfire.models.fire.design import FireSetup, convection

# ---- constants -------------------------------------------------------------------------------

#: Equivalent-time routes, in output order (names as in the check's equivalence entries).
ROUTES = ("annex_f", "cib_w14", "equal_temperature")
#: Fractiles of the peak steel temperature given per member (the case's target fractile is added).
REPORT_FRACTILES = (0.5, 0.8, 0.9, 0.95, 0.99)
#: Member-fire rows per kernel call: bounds a chunk's memory (about 0.5 kB per row with the gas
#: matrix and the results) while giving the kernel threads enough rows to share.
CHUNK_ROWS = 200_000
#: Most member-steps of one sampling run: about three minutes of kernel time on a 2-core machine (3.5 ns
#: per member-step measured by benchmarks/sample_bench.py); a cluster runs it faster, not larger. No
#: histories are kept, so memory does not grow with it. 100,000 fires x 100 members x 2,161 steps fit.
MAX_SAMPLE_MEMBER_STEPS = 5e10

#: How long to try to reach a dask scheduler given by --scheduler [s].
SCHEDULER_TIMEOUT_S = 20

#: Most fires per chunk (two sampling blocks).
CHUNK_FIRES_MAX = 2 * V.BLOCK_SIZE
#: Fires whose peaks are recomputed on their own grid (t_max and burnout on it) and at half the time
#: step in every run, to measure the error band of the sampled peaks (:func:`error_band`). The error
#: varies from fire to fire: on the bundled case the largest over the first 16 fires was 0.58-0.87 of the
#: largest over 2000 (seed 1), over the first 100 fires 0.91-0.93; 100 fires cost about 0.25 s
#: with 5 members, a few per cent of a 10,000-fire run.
GRID_CHECK_FIRES = 100
#: The error of a first-order result from its change at half the step, e(dt) = 2 |r(dt) - r(dt/2)|
#: (Richardson's extrapolation; the deterministic check's rule, :mod:`steelfire.chain.steps`).
RICHARDSON_FIRST_ORDER = steps.RICHARDSON_FIRST_ORDER
#: The hottest gas an Annex A fire reaches, 20 + 1325 C (eq (A.1) as t* grows): the bare-steel step
#: limit of the sampled fires is taken at it.
ANNEX_A_GAS_CEILING_C = 1345.0
#: Steel still heating at the end of the grid: last increment above this [C] (the check's own limit).
STILL_HEATING_C = verdicts.STILL_HEATING_C
#: Steel above the hottest gas so far by more than this [C] is counted (half the 0.01 C the outputs show).
ABOVE_GAS_C = 0.005
#: Band of (0.2e-3 q_t,d / O) / t_lim around 1 within which a fire is counted as near the regime boundary.
REGIME_BAND = P.REGIME_BAND


# ---- what a chunk needs --------------------------------------------------------------------------

@dataclass(frozen=True, eq=False)
class Setup:
    """Everything a chunk of fires needs, built once per run (plain values and arrays, picklable for
    dask workers). ``standard_*`` are None where the run needs no equivalence (sizing passes)."""

    spec: V.VariabilitySpec
    code: dict
    time_s: np.ndarray                 # the sampling grid [s]
    alpha_c: float                     # W/(m2 K), natural fire
    cols: thermal.MemberColumns
    critical_C: np.ndarray             # (M,)
    protected: np.ndarray              # (M,) bool
    thickness_mm: np.ndarray | None    # (M,) override of the members' thicknesses, NaN for bare
    severity: dict                     # the case's deterministic severity values (O with every opening open, ...)
    compartment: object
    fire_load: object
    area_factor: float | None          # delta_q1 used (None where the case gives q_f,d)
    standard_time_s: np.ndarray | None
    standard_history_C: np.ndarray | None   # (T_std, M)
    standard_running_max_C: np.ndarray | None
    compartment_out_of_scope: tuple = ()    # (field, value, allowed) of the compartment-level limits
    band_C: np.ndarray | None = None        # (M,) error band of the peaks (error_band); None: not counted

    @property
    def members(self) -> int:
        return len(self.critical_C)


def sample_spec(case, variability=None, fires=None, seed=None) -> V.VariabilitySpec:
    """The run's :class:`VariabilitySpec`: ``variability`` (a spec or a [variability] table) or the case's,
    with ``fires`` and ``seed`` overriding its own (the --fires and --seed options)."""
    spec = variability if variability is not None else getattr(case, "variability", None)
    if spec is None:
        raise InputError("variability", None, "is missing; steelfire sample needs a [variability] table")
    if isinstance(spec, Mapping):
        spec = V.parse_variability(spec)
    if not isinstance(spec, V.VariabilitySpec):
        raise InputError("variability", type(spec).__name__, "a [variability] table")
    if fires is not None:
        if isinstance(fires, bool) or not isinstance(fires, (int, np.integer)) or fires < 1:
            raise InputError("--fires", fires, "must be an integer >= 1")
        spec = dataclasses.replace(spec, fires=int(fires))
    if seed is not None:
        if isinstance(seed, bool) or not isinstance(seed, (int, np.integer)) or seed < 0:
            raise InputError("--seed", seed, "must be an integer >= 0")
        spec = dataclasses.replace(spec, seed=int(seed))
    return spec


def prepare(case, spec: V.VariabilitySpec, *, thickness_mm=None, standard: bool = True) -> Setup:
    """The :class:`Setup` of a case: checks (Annex A curve, thicknesses, step limits, compartment scope),
    the sampling grid, the members' columns, critical temperatures and standard-fire histories.

    ``thickness_mm``: per member (NaN for bare), instead of the members' own (sizing); then protected
    members need no thickness of their own. ``standard``: run the standard fire for the
    equal-temperature route (not needed to count exceedances).
    """
    if case.fire.curve != "parametric":
        raise InputError("fire.curve", case.fire.curve,
                         'steelfire sample draws EN 1991-1-2 Annex A fires: use curve = "parametric"')
    members = case.members
    if thickness_mm is None:
        for i, m in enumerate(members):
            if m.protection is not None and m.thickness_mm is None:
                raise InputError(f"{case.label(i)}.thickness_mm", None,
                                 "is missing; the sample needs it (steelfire sample --size computes it)")
    code = case.code
    sev = chain_fires.severity(case)
    comp, fl = case.compartment, case.fire_load
    # the compartment-level limits of Annex A (floor area, height, roof openings) hold for every fire;
    # the per-fire ones (O, b, q_t,d) are counted per fire
    oos = tuple(v for v in P.scope_violations(sev["opening_factor_m05"], sev["thermal_inertia"],
                                              sev["total_area_fire_load_MJ_m2"], comp.floor_area_m2, comp.height_m,
                                              comp.roof_opening_area_m2, code)
                if v[0].startswith("compartment."))
    if oos and not case.analysis.allow_out_of_scope:
        f, v, allowed = oos[0]
        raise OutOfScopeError(f, v, allowed + " (set analysis.allow_out_of_scope = true to compute anyway)")
    step = case.analysis.time_step_s
    t = chain_fires.time_grid(case.fire.duration_min * 60.0, step)
    setup_fire = FireSetup(curve="parametric", duration_min=case.fire.duration_min, code=code,
                           convection_coefficient=case.fire.convection_coefficient)
    alpha_c = convection(setup_fire, "alpha_c_natural")
    cols = thermal.MemberColumns(case)
    crit = verdicts.critical_temperatures(members)[0]
    thick = None if thickness_mm is None else np.asarray(thickness_mm, dtype=float).copy()
    ts = hist = runmax = None
    checks = [(t, np.full(2, ANNEX_A_GAS_CEILING_C), alpha_c, False,
               f"sampled fires (gas up to {ANNEX_A_GAS_CEILING_C:g} C, the Annex A ceiling)")]
    if standard:
        ts, gs = chain_fires.standard_fire(case, case.analysis.standard_horizon_min)
        checks.append((ts, gs, code["alpha_c_standard"], True, "standard fire of the equal-temperature equivalence"))
    thermal.check_bare_step(case, cols, checks)
    if standard:
        rows = cols.rows(alpha_c=code["alpha_c_standard"], nominal_fire=True, thickness_mm=thick)
        hist = thermal.run(code, ts, gs, rows, keep_history=True).history_C
        runmax = np.maximum.accumulate(hist, axis=0)
    dq1 = sev["area_factor"]
    return Setup(spec=spec, code=dict(code), time_s=t, alpha_c=float(alpha_c), cols=cols, critical_C=crit,
                 protected=~cols.bare, thickness_mm=thick, severity=dict(sev), compartment=comp, fire_load=fl,
                 area_factor=dq1, standard_time_s=ts, standard_history_C=hist, standard_running_max_C=runmax,
                 compartment_out_of_scope=oos)


def fire_load_basis(setup: Setup) -> tuple:
    """(factor, words): what turns the sampled fire load density q_f into the q_f,d of Annex A."""
    fl = setup.fire_load
    if fl.design_MJ_m2 is not None:
        return 1.0, ("the case gives the design fire load (fire_load.design_MJ_m2): the sampled fire load density "
                     "is taken as q_f,d itself")
    f = fireload.design_fire_load(1.0, fl.combustion_factor, setup.area_factor, fl.occupancy_factor, fl.measures_factor)
    return f, (f"q_f,d = q_f x m x delta_q1 x delta_q2 x delta_n = q_f x {fl.combustion_factor:g} x "
               f"{setup.area_factor:.4g} x {fl.occupancy_factor:g} x {fl.measures_factor:g} (EN 1991-1-2 E.(1), "
               "the case's factors): the delta factors are the partial factors of the deterministic method, so "
               "the sampled fires are design-level fires, not best estimates")


# ---- one chunk ---------------------------------------------------------------------------------

@dataclass(eq=False)
class FireSet:
    """The fires of a chunk: what was drawn, the Annex A inputs and fires, and the per-fire values the
    equivalence formulas need."""

    start: int
    drawn: dict
    fires: P.ParametricFires
    opening_fraction: np.ndarray
    fire_load_MJ_m2: np.ndarray         # q_f as sampled (or the case's q_f,k / q_f,d)
    design_fire_load_MJ_m2: np.ndarray  # q_f,d
    growth: np.ndarray                  # index into variability.GROWTH_RATES

    @property
    def count(self) -> int:
        return self.fires.count


def fire_set(setup: Setup, start: int, stop: int) -> FireSet:
    """Fires ``start`` to ``stop - 1`` of the run: samples, Annex A inputs (see the module docstring), fires."""
    spec, sev, fl, comp = setup.spec, setup.severity, setup.fire_load, setup.compartment
    n = stop - start
    drawn = V.samples_range(spec, start, stop)
    conv = dict(drawn)
    if "fire_load" in drawn and fl.design_MJ_m2 is None:
        # E.(1) in the deterministic order, so that a fixed q_f,k gives the check's q_f,d to the bit
        conv["fire_load"] = fireload.design_fire_load(drawn["fire_load"], fl.combustion_factor, setup.area_factor,
                                                      fl.occupancy_factor, fl.measures_factor)
    inputs = V.annex_a_inputs(conv, n, opening_factor_m05=sev["opening_factor_m05"],
                              thermal_inertia=sev["thermal_inertia"],
                              design_fire_load_MJ_m2=sev["design_fire_load_MJ_m2"], fire_load_factor=1.0,
                              floor_area_m2=comp.floor_area_m2, boundary_area_m2=comp.boundary_area_m2,
                              growth=fl.growth, code=setup.code)
    if comp.thermal_inertia is None and "thermal_inertia" not in drawn:
        # layered surfaces: b depends on t_max (A.(8)-(9)); each fire's own, as fire_severity does for the case
        o, q, tl = inputs["opening_factor_m05"], inputs["total_area_fire_load_MJ_m2"], inputs["t_lim_h"]
        t_max = np.maximum(0.2e-3 * q / o, tl)
        uniq, inv = np.unique(t_max, return_inverse=True)
        b = np.array([compartment_model.weighted_thermal_inertia(comp.surfaces, comp.boundary_area_m2,
                                                                 sev["vertical_opening_area_m2"], float(tm))
                      for tm in uniq])
        inputs["thermal_inertia"] = b[inv.reshape(-1)]
    pf = P.parametric_fires(**inputs, code=setup.code)
    ones = np.ones(n)
    frac = np.asarray(drawn["opening_fraction"], dtype=float) if "opening_fraction" in drawn else ones
    q_f = np.asarray(drawn["fire_load"], dtype=float) if "fire_load" in drawn else \
        (fl.characteristic_MJ_m2 if fl.design_MJ_m2 is None else fl.design_MJ_m2) * ones
    qfd = np.asarray(conv["fire_load"], dtype=float) if "fire_load" in drawn else sev["design_fire_load_MJ_m2"] * ones
    growth = np.full(n, V.GROWTH_RATES.index(fl.growth), dtype=np.int8)
    if "growth" in drawn:
        names = np.asarray(drawn["growth"])
        for k, g in enumerate(V.GROWTH_RATES):
            growth[names == g] = k
    return FireSet(start=start, drawn=drawn, fires=pf, opening_fraction=frac, fire_load_MJ_m2=q_f,
                   design_fire_load_MJ_m2=qfd, growth=growth)


def _take(pf: P.ParametricFires, idx) -> P.ParametricFires:
    return P.ParametricFires(**{f.name: getattr(pf, f.name)[idx] for f in dataclasses.fields(pf)})


@dataclass(eq=False)
class Evaluated:
    """Per fire and member of a chunk (F x M_sel arrays): peaks [C], last increment [C], excess over the
    hottest gas so far [C]; equivalent times [min] by route (None where not asked)."""

    fires: FireSet
    members: np.ndarray
    peak_C: np.ndarray
    last_increment_C: np.ndarray
    excess_C: np.ndarray
    equivalent_min: dict | None
    annex_f_protected_min: np.ndarray | None = None
    annex_f_bare_min: np.ndarray | None = None
    cib_w14_min: np.ndarray | None = None
    alpha_v_raw: np.ndarray | None = None


def evaluate(setup: Setup, start: int, stop: int, *, members=None, thickness_mm=None,
             equivalence: bool = True) -> Evaluated:
    """Fires ``start`` to ``stop - 1`` through the members ``members`` (indices; all if None), at the
    thicknesses ``thickness_mm`` (one per selected member) or the setup's: one kernel call for all pairs.
    With ``equivalence``, the three routes' equivalent times per pair."""
    fs = fire_set(setup, start, stop)
    pf = fs.fires
    sel = np.arange(setup.members) if members is None else np.asarray(members, dtype=np.int64)
    n, ms = pf.count, len(sel)
    if thickness_mm is None and setup.thickness_mm is not None:
        thickness_mm = setup.thickness_mm[sel]
    peak = np.full((n, ms), np.nan)
    last = np.zeros((n, ms))
    excess = np.zeros((n, ms))
    fd = np.flatnonzero(pf.defined)
    nd = len(fd)
    if nd and ms:
        r = _kernel_run(setup, setup.time_s, _take(pf, fd), sel, thickness_mm)
        peak[fd] = r.peak_C.reshape(nd, ms)
        last[fd] = r.last_increment_C.reshape(nd, ms)
        excess[fd] = r.excess_C.reshape(nd, ms)
    out = Evaluated(fires=fs, members=sel, peak_C=peak, last_increment_C=last, excess_C=excess, equivalent_min=None)
    if equivalence:
        _equivalence(setup, out)
    return out


def _kernel_run(setup: Setup, time_s, pf: P.ParametricFires, sel, thickness_mm):
    """The members ``sel`` (at ``thickness_mm``, one per member, or their own) in every fire of ``pf``
    (all defined) on the grid ``time_s``: one kernel call, rows fire-major (fire f, member j at f M + j)."""
    nd, ms = pf.count, len(sel)
    gas = pf.gas_temperature(time_s)
    rows = setup.cols.rows(alpha_c=setup.alpha_c, nominal_fire=False, select=np.tile(sel, nd),
                           fire=np.repeat(np.arange(nd), ms),
                           thickness_mm=None if thickness_mm is None else np.tile(thickness_mm, nd))
    return thermal.run(setup.code, time_s, gas, rows)


def equal_temperature_min(time_s, history_C, running_max_C, peak_C) -> np.ndarray:
    """Equal-steel-temperature times [min]: where each member's standard-fire history (columns of
    ``history_C``, its running maximum ``running_max_C``) first reaches each of its peaks (``peak_C``,
    fires x members), linear within the step as the kernels time a crossing (heat._finish); 0 for a
    peak at or below the start temperature, NaN beyond the history (the horizon) or for a NaN peak."""
    peak = np.asarray(peak_C, dtype=float)
    out = np.full(peak.shape, np.nan)
    t = np.asarray(time_s, dtype=float)
    n_t = len(t)
    for j in range(peak.shape[1]):
        p = peak[:, j]
        k = np.searchsorted(running_max_C[:, j], p, side="left")  # first k with running max >= p; NaN: n_t
        ok = (k > 0) & (k < n_t)
        kk = k[ok]
        x0, x1 = history_C[kk - 1, j], history_C[kk, j]
        out[ok, j] = (t[kk - 1] + (t[kk] - t[kk - 1]) * (p[ok] - x0) / (x1 - x0)) / 60.0
        out[(k == 0) & ~np.isnan(p), j] = t[0] / 60.0
    return out


def _equivalence(setup: Setup, ev: Evaluated) -> None:
    fs, sel = ev.fires, ev.members
    comp, sev, code = setup.compartment, setup.severity, setup.code
    pf = fs.fires
    a_v = fs.opening_fraction * sev["vertical_opening_area_m2"]
    common = dict(floor_area_m2=comp.floor_area_m2, height_m=comp.height_m,
                  roof_opening_area_m2=comp.roof_opening_area_m2, code=code)
    af_p, alpha_v = equivalence_many.annex_f_times_min(fs.design_fire_load_MJ_m2, a_v, pf.thermal_inertia,
                                                       pf.opening_factor_m05, protected=True, **common)
    af_b, _ = equivalence_many.annex_f_times_min(fs.design_fire_load_MJ_m2, a_v, pf.thermal_inertia,
                                                 pf.opening_factor_m05, protected=False, **common)
    cib = equivalence_many.cib_w14_times_min(fs.design_fire_load_MJ_m2, a_v, pf.thermal_inertia,
                                             floor_area_m2=comp.floor_area_m2, total_area_m2=comp.boundary_area_m2,
                                             opening_height_m=sev["opening_height_m"], code=code)
    prot = setup.protected[sel][None, :]
    eq = equal_temperature_min(setup.standard_time_s, setup.standard_history_C[:, sel],
                               setup.standard_running_max_C[:, sel], ev.peak_C)
    ev.equivalent_min = {
        "annex_f": np.where(prot, af_p[:, None], af_b[:, None]),
        "cib_w14": np.where(prot, cib[:, None], np.nan),  # derived for protected members only
        "equal_temperature": eq,
    }
    ev.annex_f_protected_min, ev.annex_f_bare_min, ev.cib_w14_min, ev.alpha_v_raw = af_p, af_b, cib, alpha_v


# ---- counts of a chunk ---------------------------------------------------------------------------

#: Per-fire columns kept for the samples table (small: a few numbers per fire, not per member).
FIRE_COLUMNS = ("opening_fraction", "fire_load_MJ_m2", "thermal_inertia", "growth", "opening_factor_m05",
                "design_fire_load_MJ_m2", "total_area_fire_load_MJ_m2", "t_lim_min", "fuel_controlled", "t_max_min",
                "peak_gas_temperature_C", "burnout_time_min", "scope", "annex_f_protected_min", "annex_f_bare_min",
                "cib_w14_min")


@dataclass(frozen=True, eq=False)
class ChunkTally:
    """What a chunk of fires leaves: the statistics' counts (:class:`steelfire.models.variability.Tally`),
    per-member counts of the cases the output names, and the per-fire inputs (for the samples table).
    Tallies of consecutive chunks merge exactly (integer sums; per-fire columns concatenated)."""

    tally: V.Tally
    exceed_out_of_scope: np.ndarray    # (M,) exceedances (or no fire) among fires outside Annex A's range
    still_heating: np.ndarray          # (M,) fires in which the steel still heats at the end of the grid
    above_gas: np.ndarray              # (M,) fires in which the steel passes the hottest gas so far
    beyond_horizon: np.ndarray         # (M,) fires whose peak the standard fire does not reach in the horizon
    fire_columns: dict                 # FIRE_COLUMNS -> (F,) arrays

    def merge(self, other: "ChunkTally") -> "ChunkTally":
        return ChunkTally(self.tally.merge(other.tally), self.exceed_out_of_scope + other.exceed_out_of_scope,
                          self.still_heating + other.still_heating, self.above_gas + other.above_gas,
                          self.beyond_horizon + other.beyond_horizon,
                          {k: np.concatenate([v, other.fire_columns[k]]) for k, v in self.fire_columns.items()})


class _Accumulator:
    """Chunk tallies merged as they arrive (counts summed; the per-fire columns kept in order and joined
    once at the end)."""

    def __init__(self):
        self.counts = None
        self.columns = []

    def add(self, chunk: ChunkTally) -> "_Accumulator":
        head = dataclasses.replace(chunk, fire_columns={k: v[:0] for k, v in chunk.fire_columns.items()})
        self.counts = head if self.counts is None else self.counts.merge(head)
        self.columns.append(chunk.fire_columns)
        return self

    def result(self) -> ChunkTally:
        cols = {k: np.concatenate([c[k] for c in self.columns]) for k in self.columns[0]}
        return dataclasses.replace(self.counts, fire_columns=cols)


def tally_chunk(setup: Setup, start: int, stop: int) -> ChunkTally:
    """The counts of fires ``start`` to ``stop - 1`` over all members (see :class:`ChunkTally`)."""
    ev = evaluate(setup, start, stop)
    pf = ev.fires.fires
    crit = setup.critical_C
    tl = V.tally(ev.peak_C, crit, ev.equivalent_min, band_C=setup.band_C)
    nan = np.isnan(ev.peak_C)
    with np.errstate(invalid="ignore"):
        fails = (ev.peak_C > crit[None, :]) | nan
    oos = pf.out_of_scope[:, None]
    defined = ~nan
    fc = ev.fires
    cols = {
        "opening_fraction": fc.opening_fraction, "fire_load_MJ_m2": fc.fire_load_MJ_m2,
        "thermal_inertia": pf.thermal_inertia, "growth": fc.growth, "opening_factor_m05": pf.opening_factor_m05,
        "design_fire_load_MJ_m2": fc.design_fire_load_MJ_m2,
        "total_area_fire_load_MJ_m2": pf.total_area_fire_load_MJ_m2, "t_lim_min": pf.t_lim_h * 60.0,
        "fuel_controlled": pf.fuel_controlled, "t_max_min": pf.t_max_h * 60.0,
        "peak_gas_temperature_C": pf.peak_gas_temperature_C, "burnout_time_min": pf.burnout_time_h * 60.0,
        "scope": pf.scope, "annex_f_protected_min": ev.annex_f_protected_min, "annex_f_bare_min": ev.annex_f_bare_min,
        "cib_w14_min": ev.cib_w14_min,
    }
    return ChunkTally(
        tally=tl,
        exceed_out_of_scope=np.count_nonzero(fails & oos, axis=0).astype(np.int64),
        still_heating=np.count_nonzero(defined & (ev.last_increment_C > STILL_HEATING_C), axis=0).astype(np.int64),
        above_gas=np.count_nonzero(defined & (ev.excess_C > ABOVE_GAS_C), axis=0).astype(np.int64),
        beyond_horizon=np.count_nonzero(defined & np.isnan(ev.equivalent_min["equal_temperature"]),
                                        axis=0).astype(np.int64),
        fire_columns={k: np.asarray(cols[k]) for k in FIRE_COLUMNS})


def exceedance_counts(setup: Setup, start: int, stop: int, members, thickness_mm, band_C=None) -> np.ndarray:
    """Per selected member: fires among ``start`` to ``stop - 1`` whose peak exceeds its critical
    temperature or that have no fire (NaN), at ``thickness_mm`` (one per member). With ``band_C`` (one
    per member [C]), a (2, members) array: those counts, and the counts with the fires within the band
    below the critical temperature counted as exceeding (peak >= critical - band, or NaN)."""
    ev = evaluate(setup, start, stop, members=members, thickness_mm=thickness_mm, equivalence=False)
    crit = setup.critical_C[np.asarray(members, dtype=np.int64)]
    nan = np.isnan(ev.peak_C)
    with np.errstate(invalid="ignore"):
        plain = np.count_nonzero((ev.peak_C > crit[None, :]) | nan, axis=0).astype(np.int64)
    if band_C is None:
        return plain
    passing = V.near_critical_counts(ev.peak_C, crit, band_C)[1]
    return np.stack([plain, plain + passing])


# ---- tasks and backends --------------------------------------------------------------------------

_KERNEL_LOCK = threading.Lock()


def _worker_threads() -> int:
    """Kernel threads for a task on a dask worker: the worker's thread count (one kernel call at a time
    per process, so its threads are the kernel's), at most numba's."""
    import numba

    n = 1
    try:
        from distributed import get_worker

        w = get_worker()
        n = int(getattr(getattr(w, "state", w), "nthreads", None) or getattr(w, "nthreads", 1) or 1)
    except (ImportError, ValueError):
        pass
    return max(1, min(n, numba.config.NUMBA_NUM_THREADS))


def _on_worker(fn, setup, start, stop, *args):
    """Run ``fn`` on a dask worker: one kernel call at a time in the process, the worker's threads."""
    import numba

    with _KERNEL_LOCK:
        before = numba.get_num_threads()
        numba.set_num_threads(_worker_threads())
        try:
            return fn(setup, start, stop, *args)
        finally:
            numba.set_num_threads(before)


class _Executor:
    """In-process (workers and scheduler None), a local dask cluster of ``workers`` single-threaded
    processes, or the dask cluster at ``scheduler``. ``map`` returns the results in range order."""

    def __init__(self, workers=None, scheduler=None):
        if workers is not None and scheduler is not None:
            raise InputError("--scheduler", scheduler, "give --workers or --scheduler, not both")
        if workers is not None and (isinstance(workers, bool) or not isinstance(workers, (int, np.integer))
                                    or workers < 1):
            raise InputError("--workers", workers, "must be an integer >= 1")
        self.workers, self.scheduler = workers, scheduler
        self.client = self.cluster = None
        self.description = "in-process"

    def __enter__(self):
        if self.workers is None and self.scheduler is None:
            return self
        import logging

        try:
            from distributed import Client, LocalCluster
        except ImportError:  # pragma: no cover - dask.distributed is a dependency of this command
            raise InputError("--workers" if self.workers else "--scheduler", self.workers or self.scheduler,
                             "needs dask.distributed installed") from None
        if self.scheduler is not None:
            try:
                self.client = Client(self.scheduler, timeout=SCHEDULER_TIMEOUT_S, set_as_default=False)
            except (OSError, TimeoutError, ValueError) as exc:
                raise InputError("--scheduler", self.scheduler, f"could not connect ({exc})") from None
            n = len(self.client.scheduler_info().get("workers", {}))
            self.description = f"dask cluster at {self.scheduler} ({n} workers)"
        else:
            self.cluster = LocalCluster(n_workers=int(self.workers), threads_per_worker=1, processes=True,
                                        dashboard_address=None, silence_logs=logging.ERROR)
            self.client = Client(self.cluster, set_as_default=False)
            self.description = f"local dask cluster of {int(self.workers)} worker processes"
        return self

    def __exit__(self, *exc):
        for obj in (self.client, self.cluster):
            if obj is not None:
                try:
                    obj.close()
                except Exception:  # noqa: BLE001 - closing must not hide the run's own error
                    pass
        return False

    @property
    def parallel(self) -> int:
        """Independent workers (for the chunk count)."""
        if self.client is None:
            return 1
        return max(1, len(self.client.scheduler_info().get("workers", {})))

    def reduce(self, fn, setup, ranges, args=(), bar=None, combine=None, total=None):
        """``fn(setup, start, stop, *args)`` over the ranges, combined in range order by ``combine(a, b)``
        into ``total`` as the results arrive (a chunk's counts are freed once merged). On dask, at most a
        few tasks per worker are in flight, so finished results do not pile up in the workers' memory."""

        def add(r):
            return combine(total, r)

        if self.client is None:
            for a, b in ranges:
                total = add(fn(setup, a, b, *args))
                if bar is not None:
                    bar.update(b - a)
            return total
        from collections import deque

        s = self.client.scatter(setup, broadcast=True, hash=False)
        window = 2 * self.parallel + 2
        todo = deque(ranges)
        running = deque()
        try:
            while todo or running:
                while todo and len(running) < window:
                    a, b = todo.popleft()
                    running.append((self.client.submit(_on_worker, fn, s, a, b, *args, pure=False), b - a))
                f, n = running.popleft()
                total = add(f.result())  # in range order; a task's error is raised here
                f.release()
                if bar is not None:
                    bar.update(n)
            return total
        finally:
            for f, _ in running:
                f.release()


def chunk_ranges(fires: int, members: int, chunk_fires=None, parallel: int = 1) -> list:
    """[(start, stop), ...] covering ``fires``: at most CHUNK_ROWS member-fire rows and CHUNK_FIRES_MAX fires
    per chunk, and at least four chunks per worker where there are that many fires; sizes that divide or are
    multiples of the sampling block where possible (no block drawn twice)."""
    if chunk_fires is None:
        c = max(1, min(CHUNK_FIRES_MAX, CHUNK_ROWS // max(members, 1)))
        if parallel > 1:
            c = max(1, min(c, math.ceil(fires / (4 * parallel))))
        bs = V.BLOCK_SIZE
        c = (c // bs) * bs if c >= bs else max(d for d in range(1, bs + 1) if bs % d == 0 and d <= c)
    else:
        if isinstance(chunk_fires, bool) or not isinstance(chunk_fires, (int, np.integer)) or chunk_fires < 1:
            raise InputError("chunk_fires", chunk_fires, "an integer >= 1")
        c = int(chunk_fires)
    return [(a, min(a + c, fires)) for a in range(0, fires, c)]


def _show_progress(progress) -> bool:
    if progress is None:
        try:
            return bool(sys.stderr.isatty())
        except (AttributeError, ValueError):
            return False
    return bool(progress)


def _bar(show, total, desc):
    """A tqdm bar on stderr, shown once the pass has taken a second (``delay``); None when not shown."""
    if not show:
        return None
    from tqdm import tqdm

    return tqdm(total=total, unit="fire", desc=desc, file=sys.stderr, delay=1.0, leave=False, dynamic_ncols=True)


def _reduced(ex, fn, setup, ranges, args, show, desc, combine, total):
    bar = _bar(show, ranges[-1][1] if ranges else 0, desc)
    try:
        return ex.reduce(fn, setup, ranges, args, bar, combine, total)
    finally:
        if bar is not None:
            bar.close()


# ---- the grid check ----------------------------------------------------------------------------

def grid_check(setup: Setup, fires: int = GRID_CHECK_FIRES) -> dict:
    """Peaks of the run's first ``fires`` fires on the common grid against the single-fire check (the
    fire's own grid with t_max and burnout on it, :func:`steelfire.chain.fires.time_grid`), all members.
    Returns the number of fires compared, the largest difference [C] (None if none compared) and,
    ``peak_difference_C``, each member's largest difference [C] ((M,), NaN if none compared)."""
    ev = evaluate(setup, 0, min(fires, setup.spec.fires), equivalence=False)
    d = _grid_differences(setup, ev, None)
    done = int(np.count_nonzero(ev.fires.fires.defined))
    return {"fires": done, "largest_peak_difference_C": float(np.max(d)) if done and len(d) else None,
            "peak_difference_C": d}


def _grid_differences(setup: Setup, ev: Evaluated, thickness_mm) -> np.ndarray:
    """Per member of ``ev``: the largest |peak on the common grid - peak on the fire's own grid| [C] over
    its defined fires (NaN where none)."""
    import numba

    pf = ev.fires.fires
    sel = ev.members
    worst = np.full(len(sel), np.nan)
    dur = float(setup.time_s[-1])
    step = float(setup.time_s[1] - setup.time_s[0]) if len(setup.time_s) > 1 else dur
    before = numba.get_num_threads()
    numba.set_num_threads(1)  # one small kernel call per fire: threads would cost more than they share
    try:
        for f in np.flatnonzero(pf.defined):
            one = P.parametric_fire(*(float(getattr(pf, k)[f]) for k in (
                "opening_factor_m05", "thermal_inertia", "total_area_fire_load_MJ_m2", "t_lim_h")))
            t = chain_fires.time_grid(dur, step, (one.t_max_s, one.burnout_time_s))
            rows = setup.cols.rows(alpha_c=setup.alpha_c, nominal_fire=False, select=sel,
                                   thickness_mm=thickness_mm if thickness_mm is not None else (
                                       None if setup.thickness_mm is None else setup.thickness_mm[sel]))
            peak = thermal.run(setup.code, t, one.gas_temperature(t), rows).peak_C
            worst = np.fmax(worst, np.abs(peak - ev.peak_C[f]))
    finally:
        numba.set_num_threads(before)
    return worst


@dataclass(frozen=True, eq=False)
class ErrorBand:
    """The error band of the sampled peaks, per member (arrays over the members measured), from the run's
    first fires (:func:`error_band`)."""

    fires: int                  # defined fires among the first, compared
    members: np.ndarray         # member indices
    grid_C: np.ndarray          # largest |common grid - own grid| peak difference [C]
    half_step_C: np.ndarray     # largest |peak(dt) - peak(dt/2)| on the common grid [C]
    band_C: np.ndarray          # max(grid_C, 2 half_step_C) [C]; 0 where no fire was compared
    grid_s: float               # time taken by the grid comparison [s]
    half_step_s: float          # time taken by the half-step run [s]


#: The rule of the error band, as the section states it.
ERROR_BAND_RULE = (
    "per member, the largest of (a) the grid check's difference (peak on the common grid against the "
    "single-fire check with t_max and burnout on its grid) and (b) 2 x the peak difference at half the time "
    "step on the common grid (Richardson's estimate of a first-order step's error, the deterministic check's "
    "rule), each the largest over the first fires; a fire whose peak lies within the band of the critical "
    "temperature is near_critical; exceedance_probability_with_band counts those below the critical "
    "temperature as exceeding")


def error_band(setup: Setup, fires: int = GRID_CHECK_FIRES, *, members=None, thickness_mm=None) -> ErrorBand:
    """The error band [C] of the sampled peaks of ``members`` (all if None; at ``thickness_mm``, one per
    member, or the setup's), measured on the run's first ``fires`` fires:

    band = max(max_f |T_common(dt) - T_own(dt)|, 2 max_f |T_common(dt) - T_common(dt/2)|)

    T_common(dt): peak on the run's common grid (step dt); T_own: the single-fire check's peak (t_max and
    burnout on its grid, :func:`grid_check`); T_common(dt/2): on the common grid with a point added in the
    middle of every step (:func:`steelfire.chain.steps.halved`), one kernel call for all fires. The factor 2
    is Richardson's estimate of a first-order explicit step's error from its change at half the step, e(dt)
    ~ 2 |r(dt) - r(dt/2)| (EN 1993-1-2 eq (4.25) and (4.27) stepped explicitly; the rule of
    :mod:`steelfire.chain.steps`). Fires without a gas temperature (k <= 0) are skipped; a member with no
    fire compared gets a band of 0 (``fires`` = 0 says so).
    """
    n = min(fires, setup.spec.fires)
    sel = np.arange(setup.members) if members is None else np.asarray(members, dtype=np.int64)
    if thickness_mm is not None:
        thickness_mm = np.asarray(thickness_mm, dtype=float)
    t0 = time.perf_counter()
    ev = evaluate(setup, 0, n, members=sel, thickness_mm=thickness_mm, equivalence=False)
    grid = _grid_differences(setup, ev, thickness_mm)
    t1 = time.perf_counter()
    pf = ev.fires.fires
    fd = np.flatnonzero(pf.defined)
    half = np.full(len(sel), np.nan)
    if len(fd) and len(sel):
        th = thickness_mm if thickness_mm is not None else (
            None if setup.thickness_mm is None else setup.thickness_mm[sel])
        r = _kernel_run(setup, steps.halved(setup.time_s), _take(pf, fd), sel, th)
        half = np.max(np.abs(r.peak_C.reshape(len(fd), len(sel)) - ev.peak_C[fd]), axis=0)
    t2 = time.perf_counter()
    band = np.fmax(grid, RICHARDSON_FIRST_ORDER * half)
    band = np.where(np.isnan(band), 0.0, band)
    return ErrorBand(fires=len(fd), members=sel, grid_C=grid, half_step_C=half, band_C=band,
                     grid_s=t1 - t0, half_step_s=t2 - t1)


def check_budget(case, spec, size: bool) -> None:
    """Refuse, before any work, a run past :data:`MAX_SAMPLE_MEMBER_STEPS`: fires x members x steps of the
    grid, and with ``size`` at most 2 + ceil(log2(supplied thicknesses)) passes of the protected members in
    addition."""
    from steelfire.errors import BudgetError

    n_grid = math.floor(case.fire.duration_min * 60.0 / case.analysis.time_step_s + 1e-9) + 1
    members = len(case.members)
    if size:
        for m in case.members:
            if m.protected:
                n_s = max(1, len(case.materials[m.protection].supplied_thicknesses_mm()))
                members += 2 + math.ceil(math.log2(n_s))
    steps = float(spec.fires) * members * n_grid
    if steps > MAX_SAMPLE_MEMBER_STEPS:
        raise BudgetError("--fires", spec.fires,
                          f"{steps:.3g} member-steps ({spec.fires} fires x {members} member passes x {n_grid} steps) "
                          f"exceed the limit of {MAX_SAMPLE_MEMBER_STEPS:.0e}: use fewer fires, a larger time step or a shorter "
                          "duration, or split the schedule")


# ---- sizing against a target probability ------------------------------------------------------------

def _supplied(case, i):
    """(supplied thicknesses [mm], note) of protected member ``i``: those the deterministic sizing may propose
    (:func:`steelfire.chain.sizing.supplied_m`: within the material's assessed range, eq (4.27) stable at the
    time step); empty where none is left."""
    from steelfire.chain.sizing import supplied_m

    s, note = supplied_m(case, case.members[i])
    return s * 1e3, note


#: The criterion of --size and of the target comparison, as the section states it.
TARGET_CRITERION = ("upper end of the 95 % interval with the error band (fires whose peak lies within the band "
                    "below the critical temperature counted as exceeding) below target_probability")


def size_members(case, spec, ex, ranges, show) -> list:
    """Per member: the least supplied thickness whose probability of exceeding the critical temperature
    is below ``target_probability``, judged by the upper end of its 95 % Clopper-Pearson interval with the
    error band counted (:func:`error_band` at that thickness; fires within the band below the critical
    temperature count as exceeding), so the plain estimate and its interval are below it too; bisection
    over the supplied thicknesses, every evaluation one pass over all fires with the members still open
    together. None for bare members."""
    target = spec.target_probability
    if target is None:
        raise InputError("variability.target_probability", None,
                         "is missing; --size needs it (a probability in (0, 1))")
    members = case.members
    n_f = spec.fires
    prot = np.array([i for i, m in enumerate(members) if m.protected], dtype=np.int64)
    out = [None] * len(members)
    if not len(prot):
        return out
    supply = [_supplied(case, int(i)) for i in prot]
    for i, (sp, why) in zip(prot, supply):
        if not len(sp):
            out[i] = {"criterion": TARGET_CRITERION,
                      "target_probability": target, "chosen_mm": None, "achievable": False,
                      "exceedance_probability": None, "exceedance_interval": None,
                      "exceedance_probability_with_band": None, "exceedance_interval_with_band": None,
                      "error_band_C": None, "near_critical_fires_below_critical": None, "next_thinner_mm": None,
                      "next_thinner_exceedance_probability": None,
                      "next_thinner_exceedance_probability_with_band": None, "supplied_range_mm": None,
                      "evaluations": 0,
                      "note": f"no supplied thickness of {members[i].protection} is left to propose "
                              f"({why})"}
    limits = {int(i): why for i, (sp, why) in zip(prot, supply) if len(sp)}
    prot = np.array([i for i, (sp, _) in zip(prot, supply) if len(sp)], dtype=np.int64)
    if not len(prot):
        return out
    supplied = [sp for sp, _ in supply if len(sp)]
    thick0 = np.full(len(members), np.nan)
    for i, s in zip(prot, supplied):
        thick0[i] = s[-1]
    setup = prepare(case, spec, thickness_mm=thick0, standard=False)
    counts = {}  # (member, index) -> exceedance count
    banded = {}  # (member, index) -> (count with the band, band [C], near-critical fires)

    def evaluate_at(js, ks):
        """Members prot[js] at supplied index ks: their error bands on the first fires, then one pass over
        all fires; the counts with the band (the criterion)."""
        idx = prot[js]
        d = np.array([supplied[j][k] for j, k in zip(js, ks)])
        band = error_band(setup, members=idx, thickness_mm=d).band_C
        got = _reduced(ex, exceedance_counts, setup, ranges, (idx, d, band), show, "sizing", np.add, 0)
        for n_, (j, k) in enumerate(zip(js, ks)):
            counts[(int(j), int(k))] = int(got[0][n_])
            banded[(int(j), int(k))] = (int(got[1][n_]), float(band[n_]))
        return got[1]

    def upper(c):
        return V.exceedance_probability(np.asarray(c, dtype=np.int64), n_f).upper

    n_s = np.array([len(s) for s in supplied])
    js = np.arange(len(prot))
    evaluations = np.zeros(len(prot), dtype=np.int64)
    ok_hi = upper(evaluate_at(js, n_s - 1)) < target
    evaluations += 1
    lo = np.full(len(prot), -1)
    hi = np.where(ok_hi, n_s - 1, -1)
    todo = np.flatnonzero(ok_hi & (n_s > 1))
    if len(todo):
        ok_lo = upper(evaluate_at(todo, np.zeros(len(todo), dtype=np.int64))) < target
        evaluations[todo] += 1
        hi[todo[ok_lo]] = 0
        lo[todo[~ok_lo]] = 0
    while True:
        open_ = np.flatnonzero((hi >= 0) & (lo >= 0) & (hi - lo > 1))
        if not len(open_):
            break
        mid = (lo[open_] + hi[open_]) // 2
        ok = upper(evaluate_at(open_, mid)) < target
        evaluations[open_] += 1
        hi[open_[ok]] = mid[ok]
        lo[open_[~ok]] = mid[~ok]
    k_zero_upper = float(upper(0))
    def with_band(j, k):
        c, band = banded[(j, k)]
        e = V.exceedance_probability(np.int64(c), n_f)
        return {"exceedance_probability_with_band": float(e.probability),
                "exceedance_interval_with_band": [float(e.lower), float(e.upper)], "error_band_C": band,
                "near_critical_fires_below_critical": c - counts[(j, k)]}

    for j, i in enumerate(prot):
        s = supplied[j]
        rng = [float(s[0]), float(s[-1])]
        if hi[j] < 0:
            c = counts[(j, n_s[j] - 1)]
            e = V.exceedance_probability(np.int64(c), n_f)
            eb = with_band(j, int(n_s[j] - 1))
            note = (f"not achievable within the supplied thicknesses: at {s[-1]:g} mm the exceedance probability is "
                    f"{float(e.probability):.3g}, with the error band {eb['exceedance_probability_with_band']:.3g} "
                    f"(95 % interval up to {eb['exceedance_interval_with_band'][1]:.3g})")
            if k_zero_upper >= target:
                # k = 0 gives the upper end 1 - (a/2)^(1/n): below the target once n > ln(a/2) / ln(1 - target)
                need = math.floor(math.log((1.0 - V.CONFIDENCE) / 2.0) / math.log1p(-target)) + 1
                note += (f"; {n_f} fires cannot show a probability below {target:g} at 95 % confidence even with no "
                         f"exceedance (upper end {k_zero_upper:.3g}): at least {need} fires are needed")
            out[i] = {"criterion": TARGET_CRITERION,
                      "target_probability": target, "chosen_mm": None, "achievable": False,
                      "exceedance_probability": float(e.probability),
                      "exceedance_interval": [float(e.lower), float(e.upper)], **eb, "next_thinner_mm": None,
                      "next_thinner_exceedance_probability": None,
                      "next_thinner_exceedance_probability_with_band": None, "supplied_range_mm": rng,
                      "evaluations": int(evaluations[j]), "note": note}
            continue
        k = int(hi[j])
        e = V.exceedance_probability(np.int64(counts[(j, k)]), n_f)
        thinner = counts.get((j, k - 1)) if k > 0 else None
        thinner_band = banded.get((j, k - 1)) if k > 0 else None
        out[i] = {"criterion": TARGET_CRITERION,
                  "target_probability": target, "chosen_mm": float(s[k]), "achievable": True,
                  "exceedance_probability": float(e.probability),
                  "exceedance_interval": [float(e.lower), float(e.upper)], **with_band(j, k),
                  "next_thinner_mm": float(s[k - 1]) if k > 0 else None,
                  "next_thinner_exceedance_probability": None if thinner is None else thinner / n_f,
                  "next_thinner_exceedance_probability_with_band": None if thinner_band is None
                  else thinner_band[0] / n_f,
                  "supplied_range_mm": rng, "evaluations": int(evaluations[j]),
                  "note": "; ".join(x for x in ("" if k > 0 else "the least supplied (stable) thickness already meets "
                                                "the target", limits[int(i)]) if x)}
    return out


# ---- the run -------------------------------------------------------------------------------------

def _keyed(q: float) -> str:
    return f"{q:g}"


#: Significant figures of the probabilities the section gives (as steelfire.results.sig).
PROBABILITY_DIGITS = 6


def _sig_outward(v, up: bool, digits: int = PROBABILITY_DIGITS):
    """``v`` to ``digits`` significant figures, rounded up (``up``) or down, never towards the inside of
    an interval: a rounded upper bound is never below the exact one (a target compared with the shown
    figure is then judged on the safe side). None for None and non-finite values."""
    if v is None or not math.isfinite(float(v)):
        return None
    v = float(v)
    if v == 0.0:
        return 0.0
    r = float(f"{v:.{digits - 1}e}")
    if (r < v) if up else (r > v):
        ulp = 10.0 ** (math.floor(math.log10(abs(v))) - (digits - 1))  # a unit of v's last figure
        r = float(f"{(r + ulp if up else r - ulp):.{digits - 1}e}")
    return r


def _interval(lo, hi) -> list:
    return [_sig_outward(lo, up=False), _sig_outward(hi, up=True)]


def _applies(route: str, protected: bool) -> bool:
    """Whether an equivalence route gives a time for the member (CIB W14: protected members only)."""
    return protected or route != "cib_w14"


def fractile_basis(q: float, n: int) -> dict:
    """How the q fractile of n fires is read: its rank k = ceil(q n), the fires above it, the rank of its
    one-sided 95 % upper confidence bound (None: too few fires) and the fewest fires that give one
    (:func:`steelfire.models.variability.fractile_upper_rank`)."""
    k = V._order_index(q, n)
    return {"rank": k, "fires_above": n - k, "upper_95_rank": V.fractile_upper_rank(q, n),
            "fires_for_upper_95": V.fires_for_upper_bound(q)}


@dataclass(eq=False)
class SampleRun:
    """The result of a sampling run: the merged counts, the per-fire table, and what the output says
    about the run. :meth:`to_dict` gives the ``variability`` section of the JSON document."""

    spec: V.VariabilitySpec
    names: list
    kinds: list
    protected: np.ndarray
    critical_C: np.ndarray
    required_minutes: list
    thickness_mm: list
    counts: ChunkTally
    fire_load_factor: float
    fire_load_basis: str
    compartment_out_of_scope: tuple
    grid: dict
    backend: str
    floor_area_m2: float
    sizing: list | None = None
    warnings: list = field(default_factory=list)
    timings_s: dict = field(default_factory=dict)
    error_band: ErrorBand | None = None

    def target_verdicts(self):
        """Per member (None without ``target_probability``): (exceeds the target judged by the shown upper
        end of the interval with the error band, the same without the band). Shown ends are rounded
        outward, as the terminal and the exit code read them."""
        target = self.spec.target_probability
        if target is None:
            return None
        plain, band = self.tally.exceedance(), self.tally.exceedance_with_band()
        return [(_sig_outward(band.upper[i], up=True) > target, _sig_outward(plain.upper[i], up=True) > target)
                for i in range(len(self.names))]

    @property
    def fires(self) -> int:
        return self.counts.tally.fires

    @property
    def tally(self) -> V.Tally:
        return self.counts.tally

    def fractiles(self) -> tuple:
        """The fractiles given for the peak steel temperature: REPORT_FRACTILES and the target fractile."""
        return tuple(sorted(set(REPORT_FRACTILES) | {self.spec.target_fractile}))

    def scope(self) -> dict:
        """Counts of fires by Annex A finding, fires with any finding, fires without a gas temperature."""
        s = self.counts.fire_columns["scope"]
        findings = {name: int(np.count_nonzero(s & P.SCOPE_BIT[name])) for name, _ in P.SCOPE_FINDINGS}
        any_ = int(np.count_nonzero(s)) if not self.compartment_out_of_scope else self.fires
        return {"findings": findings, "out_of_scope_fires": any_,
                "undefined_fires": int(np.count_nonzero(s & P.UNDEFINED_BITS))}

    def to_dict(self) -> dict:
        """The ``variability`` section (JSON-ready; numbers to the precision the outputs show)."""
        from steelfire.results import rounded, sig

        spec, tl = self.spec, self.tally
        ex = tl.exceedance()
        exb = tl.exceedance_with_band()
        eb = self.error_band
        verdicts_ = self.target_verdicts()
        q_t = spec.target_fractile
        fr = self.fractiles()
        peak_fr = {q: tl.peak_fractile(q) for q in fr}
        times = {r: self.route_fractiles(r, q_t) for r in ROUTES if r in tl.equivalent_time}
        bounds = {r: self.route_fractiles(r, q_t, upper=True) for r in ROUTES if r in tl.equivalent_time}
        scope = self.scope()
        n_out = scope["out_of_scope_fires"]
        n_in = self.fires - n_out
        in_scope = None
        if n_in > 0:
            in_scope = V.exceedance_probability(ex.count - self.counts.exceed_out_of_scope, n_in)
        annual = None
        if spec.ignition_rate_per_m2_year is not None:
            args = (self.floor_area_m2, spec.ignition_rate_per_m2_year, spec.suppression_failure_probability)
            annual = tuple(np.atleast_1d(V.annual_exceedance_probability(p, *args))
                           for p in (ex.probability, ex.lower, ex.upper))

        def num(v, digits=2):
            v = float(v)
            return None if not math.isfinite(v) else rounded(v, digits)

        members = []
        for i, name in enumerate(self.names):
            applies = {r: r in times and _applies(r, bool(self.protected[i])) for r in ROUTES}
            t_frac = {r: num(times[r][i]) if applies[r] else None for r in ROUTES}
            period = {r: (V.period_covering(times[r][i]) if applies[r] and math.isfinite(times[r][i]) else None)
                      for r in ROUTES}
            # a fractile no listed period covers (above R240, or beyond the times computed: +inf) is
            # said so, apart from a route that gives no time for this member (None)
            uncovered = {r: (period[r] is None) if applies[r] else None for r in ROUTES}
            t_up = {r: num(bounds[r][i]) if applies[r] else None for r in ROUTES}
            period_up = {r: (V.period_covering(bounds[r][i]) if applies[r] and math.isfinite(bounds[r][i])
                             else None) for r in ROUTES}
            req = self.required_minutes[i]
            covers = {r: (None if req is None or not applies[r] else bool(times[r][i] <= req + 1e-9))
                      for r in ROUTES}
            d = {"name": name, "exceedance_probability": sig(ex.probability[i]),
                 "exceedance_interval": _interval(ex.lower[i], ex.upper[i]),
                 "error_band_C": None if eb is None else _sig_outward(eb.band_C[i], up=True),
                 "error_band_parts_C": None if eb is None else {
                     "common_grid": _sig_outward(eb.grid_C[i], up=True),
                     "half_step": _sig_outward(RICHARDSON_FIRST_ORDER * eb.half_step_C[i], up=True)},
                 "near_critical_fires": int(tl.near_critical[i]),
                 "near_critical_fires_below_critical": int(tl.near_critical_passing[i]),
                 "exceedance_probability_with_band": sig(exb.probability[i]),
                 "exceedance_interval_with_band": _interval(exb.lower[i], exb.upper[i]),
                 "exceeds_target_probability": None if verdicts_ is None else bool(verdicts_[i][0]),
                 "exceeds_target_probability_without_band": None if verdicts_ is None else bool(verdicts_[i][1]),
                 "exceedance_probability_in_scope_fires": None if in_scope is None else sig(in_scope.probability[i]),
                 "exceedance_interval_in_scope_fires": None if in_scope is None else _interval(
                     in_scope.lower[i], in_scope.upper[i]),
                 "peak_steel_fractiles_C": {_keyed(q): num(peak_fr[q][i]) for q in fr},
                 "equivalent_time_at_fractile_min": t_frac,
                 "period_covering_fractile": period,
                 "no_period_covers_fractile": uncovered,
                 "equivalent_time_at_fractile_upper_95_min": t_up,
                 "period_covering_fractile_upper_95": period_up,
                 "kind": self.kinds[i], "critical_temperature_C": num(self.critical_C[i]),
                 "protection_thickness_mm": self.thickness_mm[i],
                 "required_minutes": req, "required_covers_fractile": covers,
                 "exceedances": int(ex.count[i]),
                 "exceedances_in_out_of_scope_fires": int(self.counts.exceed_out_of_scope[i]),
                 "no_fire_fires": int(tl.undefined[i]),
                 "still_heating_at_end_fires": int(self.counts.still_heating[i]),
                 "above_hottest_gas_fires": int(self.counts.above_gas[i]),
                 "equal_temperature_beyond_horizon_fires": int(self.counts.beyond_horizon[i]),
                 "annual_exceedance_probability": None if annual is None else sig(annual[0][i]),
                 "annual_exceedance_interval": None if annual is None else _interval(annual[1][i], annual[2][i])}
            if self.sizing is not None:
                s = self.sizing[i]
                d["sizing"] = None if s is None else {
                    k: (sig(v) if isinstance(v, float) else
                        _interval(*v) if k in ("exceedance_interval", "exceedance_interval_with_band")
                        and v is not None else
                        [sig(x) for x in v] if isinstance(v, list) else v) for k, v in s.items()}
            members.append(d)
        return {
            "fires": self.fires, "seed": spec.seed, "method": spec.method,
            "out_of_scope_fires": scope["out_of_scope_fires"],
            "members": members,
            "target_fractile": q_t, "target_probability": spec.target_probability,
            "target_criterion": None if spec.target_probability is None else TARGET_CRITERION,
            "error_band": None if eb is None else {
                "rule": ERROR_BAND_RULE, "fires": eb.fires, "time_step_s": self.grid["time_step_s"],
                "half_time_step_s": self.grid["time_step_s"] / 2.0,
                "largest_C": _sig_outward(float(np.max(eb.band_C)), up=True) if len(eb.band_C) else None,
                "near_critical_fires_total": int(np.sum(tl.near_critical))},
            "confidence": V.CONFIDENCE,
            "interval": "Clopper-Pearson (exact binomial), two-sided; the ends rounded outward",
            "probability_basis": {
                "denominator_fires": self.fires, "out_of_scope_fires": n_out, "in_scope_fires": n_in,
                "rule": f"exceedances / all {self.fires} sampled fires, the {n_out} outside Annex A's range included "
                        "(computed as published; a fire without an Annex A fire counted as exceeding); "
                        "exceedance_probability_in_scope_fires: the same over the fires within the range only"},
            "fractile_basis": {
                **{_keyed(q): fractile_basis(q, self.fires) for q in fr},
                "rule": "point estimate: the k-th smallest of n fires, k = ceil(q n) (period_covering_fractile); "
                        "upper_95: a distribution-free one-sided 95 % upper confidence bound on the fractile, the "
                        "upper_95_rank-th smallest (period_covering_fractile_upper_95, the safe side; null where "
                        "the fires are fewer than fires_for_upper_95)"},
            "given": "a fully developed fire (probabilities are conditional on flashover)",
            "sampled": describe(spec),
            "fire_load": {"factor": sig(self.fire_load_factor), "basis": self.fire_load_basis},
            "out_of_scope": {
                "in_statistics": True,
                "basis": "fires outside Annex A's range are computed as published and included; fires that Annex A "
                         "cannot describe (k <= 0) have no gas temperature and count as exceeding for every member",
                "findings": scope["findings"], "undefined_fires": scope["undefined_fires"],
                "compartment": [f"{f} = {v!r}: {a}" for f, v, a in self.compartment_out_of_scope]},
            "near_regime_boundary_fires": self._near_boundary(),
            "not_burnt_out_fires": int(np.count_nonzero(
                self.counts.fire_columns["burnout_time_min"] > self.grid["duration_min"] + 1e-9)),
            "grid": self.grid,
            "fractile_resolution": {"temperature_C": V.TEMPERATURE_BINS.width, "time_min": V.TIME_BINS.width,
                                    "rule": "upper edge of the bin holding the k-th smallest value, k = ceil(q n)"},
            "annual": None if annual is None else {
                "ignition_rate_per_m2_year": spec.ignition_rate_per_m2_year,
                "suppression_failure_probability": spec.suppression_failure_probability,
                "floor_area_m2": self.floor_area_m2,
                "formula": "1 - exp(-rate x A_f x P_fail x P(exceed | fire))"},
            "backend": self.backend,
            "warnings": list(self.warnings),
        }

    def route_fractiles(self, route: str, q: float, upper: bool = False) -> np.ndarray:
        """Per member: the q fractile of ``route``'s equivalent times [min] (``upper``: its one-sided 95 %
        upper confidence bound). A member for which the route gives a time but every fire has none
        (equal temperature beyond the standard-fire horizon in every fire) gets +inf, not NaN: its
        times lie beyond those computed. NaN only where the route gives no time for the member."""
        h = self.tally.equivalent_time[route]
        v = h.upper_bound(q) if upper else h.fractile(q)
        for i in range(len(v)):
            if math.isnan(v[i]) and _applies(route, bool(self.protected[i])) and h.undefined[i] > 0:
                v[i] = np.inf
        return v

    def _near_boundary(self) -> int:
        c = self.counts.fire_columns
        with np.errstate(invalid="ignore", divide="ignore"):
            ratio = (0.2e-3 * c["total_area_fire_load_MJ_m2"] / c["opening_factor_m05"]) / (c["t_lim_min"] / 60.0)
        return int(np.count_nonzero(np.abs(ratio - 1.0) <= REGIME_BAND))


def describe(spec: V.VariabilitySpec) -> dict:
    """The sampled variables as the case gives them (None: the case's deterministic value)."""
    out = {}
    for v in V.VARIABLES:
        d = spec.distribution(v.name)
        out[v.name] = None if d is None else {
            k: getattr(d, k) for k in ("kind", "mean", "sd", "cov", "low", "mode", "high", "value")
            if getattr(d, k) is not None}
    out["growth"] = None if spec.growth is None else {g: w for g, w in zip(V.GROWTH_RATES, spec.growth) if w > 0}
    return out


def _run_warnings(run: SampleRun, setup: Setup) -> list:
    w = []
    spec, n = run.spec, run.fires
    names = run.names
    scope = run.scope()
    fl = setup.fire_load
    if fl.design_MJ_m2 is None and spec.fire_load is not None and (
            setup.area_factor != 1.0 or fl.occupancy_factor != 1.0 or fl.measures_factor != 1.0):
        w.append("Sampled fire loads are multiplied by delta_q1 x delta_q2 x delta_n (EN 1991-1-2 E.(1)), partial "
                 "factors of the deterministic method: the sampled fires are design-level, the probabilities "
                 "conservative.")
    if spec.suppression_failure_probability is not None and fl.design_MJ_m2 is None and fl.measures_factor != 1.0:
        w.append(f"measures_factor = {fl.measures_factor:g} (delta_n) lowers the sampled fire loads and "
                 "suppression_failure_probability lowers the rate of fires: the credit for active measures may "
                 "be taken twice in the annual probability.")
    if scope["out_of_scope_fires"]:
        w.append(f"{scope['out_of_scope_fires']} of {n} fires ({scope['out_of_scope_fires'] / n:.1%}) lie outside "
                 "EN 1991-1-2 Annex A's range; they are computed as published and included in the statistics "
                 "(see each member's exceedances_in_out_of_scope_fires).")
    if scope["undefined_fires"]:
        w.append(f"{scope['undefined_fires']} fires have k <= 0 in eq (A.8) (no Annex A heating phase): no gas "
                 "temperature; counted as exceeding for every member.")
    near = run._near_boundary()
    if near:
        w.append(f"{near} of {n} fires lie within 10 % of Annex A's ventilation/fuel boundary ((0.2e-3 q_t,d / O) / "
                 "t_lim near 1), where the peak gas temperature jumps (Gamma_lim = Gamma/4 there), as published: "
                 "the distributions carry that jump.")
    for f, v, a in run.compartment_out_of_scope:
        w.append(f"OUT OF SCOPE of EN 1991-1-2 Annex A: {f} = {v!r}; {a} (every fire; allow_out_of_scope).")
    nb = int(np.count_nonzero(run.counts.fire_columns["burnout_time_min"] > run.grid["duration_min"] + 1e-9))
    if nb:
        w.append(f"{nb} of {n} fires have not burnt out at duration_min = {run.grid['duration_min']:g} min: their "
                 "cooling phase is cut short.")
    heating = [names[i] for i in np.flatnonzero(run.counts.still_heating)]
    if heating:
        w.append(f"Steel still heating at the end of the fire (duration_min = {run.grid['duration_min']:g}) in some "
                 f"fires for {verdicts.names_text(heating)}: those peaks come later; extend fire.duration_min.")
    above = [names[i] for i in np.flatnonzero(run.counts.above_gas)]
    if above:
        w.append(f"In some fires the steel passes the hottest gas reached so far for {verdicts.names_text(above)}: "
                 "the cooling-phase term of EN 1993-1-2 eq (4.27) with heavy protection, as published; check "
                 "those members with a more detailed model.")
    beyond = [names[i] for i in np.flatnonzero(run.counts.beyond_horizon)]
    if beyond:
        w.append(f"Equal-temperature equivalence beyond the standard-fire horizon in some fires for "
                 f"{verdicts.names_text(beyond)} (counted above every time; its fractile may then be null).")
    q_t = spec.target_fractile
    for q in run.fractiles():
        b = fractile_basis(q, n)
        if b["fires_above"] == 0:
            w.append(f"The {q:g} fractile of {n} fires is the largest sampled value (at least {math.ceil(1 / (1 - q))} "
                     "fires are needed to place it below the largest): it may lie well below the true fractile.")
        elif b["upper_95_rank"] is None and q == q_t:
            w.append(f"{n} fires give no 95 % upper confidence bound on the {q:g} fractile (at least "
                     f"{b['fires_for_upper_95']} fires are needed): the periods covering it are point estimates only.")
    uncovered = []
    for r in ROUTES:
        if r not in run.tally.equivalent_time:
            continue
        t = run.route_fractiles(r, q_t)
        uncovered += [f"{names[i]} ({r})" for i in range(len(names))
                      if _applies(r, bool(run.protected[i])) and V.period_covering(t[i]) is None]
    if uncovered:
        w.append(f"No standard period up to R240 covers the {q_t:g} fractile of the equivalent time (above 240 min "
                 f"or beyond the times computed) for {verdicts.names_text(uncovered)}.")
    a_v = run.counts.fire_columns
    if not np.all(run.protected):
        w.append("CIB W14 is derived for protected (insulated) members: null for the bare members.")
    lo = setup.code.get("annex_f_alpha_v_min", 0.025)
    hi = setup.code.get("annex_f_alpha_v_max", 0.25)
    alpha_v = a_v["opening_fraction"] * setup.severity["vertical_opening_area_m2"] / setup.compartment.floor_area_m2
    n_lo, n_hi = int(np.count_nonzero(alpha_v < lo)), int(np.count_nonzero(alpha_v > hi))
    if n_lo or n_hi:
        w.append(f"Annex F: alpha_v = A_v/A_f outside {lo:g}-{hi:g} in {n_lo + n_hi} fires ({n_lo} below, kept; "
                 f"{n_hi} above, {hi:g} used), as the check does.")
    eb = run.error_band
    if eb is not None and eb.fires == 0:
        w.append(f"None of the first {GRID_CHECK_FIRES} fires has an Annex A fire (k <= 0): the error band of the "
                 "peaks is not measured (0 C taken); near_critical_fires then counts only peaks equal to the "
                 "critical temperature.")
    verdicts_ = run.target_verdicts()
    if verdicts_ is not None:
        turned = [names[i] for i, (b, p) in enumerate(verdicts_) if b != p]
        if turned:
            w.append(f"Verdict against target_probability = {spec.target_probability:g} changed by the error band "
                     f"for {verdicts.names_text(turned)}: the upper end of the 95 % interval is below the target "
                     "only when the fires within the band below the critical temperature pass; judged with the "
                     "band (exceeds_target_probability), the safe side.")
    g = run.grid
    if g.get("largest_peak_difference_C") is not None and g["largest_peak_difference_C"] > 0.5:
        w.append(f"Common time grid: peaks differ by up to {g['largest_peak_difference_C']:.2f} C from the single-fire "
                 "check on the first fires; a smaller time step narrows it.")
    w.append("Annex A parametric fires: mainly cellulosic fire loads only (EN 1991-1-2 Annex A (2)); the "
             "probabilities are conditional on a fully developed fire.")
    return w


def run(case, fires=None, seed=None, workers=None, scheduler=None, size=False, progress=None, *,
        variability=None, chunk_fires=None) -> SampleRun:
    """Sample the case's fire severity and run every member in every sampled fire.

    Parameters
    ----------
    case : Case
        A case on the parametric curve, with its ``variability`` (the parsed ``[variability]`` table,
        :class:`steelfire.models.variability.VariabilitySpec`, or the raw table).
    fires, seed : int, optional
        Override ``variability.fires`` / ``variability.seed``.
    workers : int, optional
        Run on a local dask.distributed cluster of this many single-threaded worker processes.
    scheduler : str, optional
        Run on the existing dask cluster at this address (``tcp://host:8786``).
    size : bool
        First size each protected member against ``target_probability`` (:func:`size_members`), then
        give the statistics at the chosen thicknesses.
    progress : bool, optional
        A progress bar on stderr (shown once a pass has taken a second); None: when stderr is a terminal.
    variability : mapping or VariabilitySpec, optional
        Instead of ``case.variability``.
    chunk_fires : int, optional
        Fires per chunk (default: see :func:`chunk_ranges`); the result does not depend on it.

    Returns
    -------
    SampleRun
        ``to_dict()`` is the ``variability`` section of the JSON document.
    """
    spec = sample_spec(case, variability, fires, seed)
    check_budget(case, spec, size)
    show = _show_progress(progress)
    timings = {}
    t_start = time.perf_counter()
    with _Executor(workers, scheduler) as ex:
        ranges = chunk_ranges(spec.fires, len(case.members), chunk_fires, ex.parallel)
        sizing = None
        run_case = case
        if size:
            t0 = time.perf_counter()
            sizing = size_members(case, spec, ex, ranges, show)
            members = []
            for m, s in zip(case.members, sizing):
                if s is not None:
                    d = s["chosen_mm"] if s["chosen_mm"] is not None else (
                        m.thickness_mm if m.thickness_mm is not None else s["supplied_range_mm"][1])
                    m = dataclasses.replace(m, thickness_mm=d)
                members.append(m)
            run_case = dataclasses.replace(case, members=tuple(members))
            timings["sizing_s"] = time.perf_counter() - t0
        t0 = time.perf_counter()
        setup = prepare(run_case, spec)
        timings["prepare_s"] = time.perf_counter() - t0
        # the error band first (first fires only): every chunk then counts its near-critical fires exactly
        band = error_band(setup)
        setup = dataclasses.replace(setup, band_C=band.band_C)
        timings["grid_check_s"] = band.grid_s
        timings["half_step_s"] = band.half_step_s
        t0 = time.perf_counter()
        counts = _reduced(ex, tally_chunk, setup, ranges, (), show, "fires", _Accumulator.add,
                          _Accumulator()).result()
        timings["fires_s"] = time.perf_counter() - t0
        backend = ex.description
    factor, basis = fire_load_basis(setup)
    grid = {"time_step_s": run_case.analysis.time_step_s, "duration_min": run_case.fire.duration_min,
            "standard_horizon_min": run_case.analysis.standard_horizon_min,
            "t_max_between_grid_points": "the case's step everywhere; each fire's t_max is not on the grid "
                                         "(see grid_check: the largest peak difference from the single-fire "
                                         "check, t_max and burnout on its grid, over the first fires)",
            "grid_check_fires": band.fires,
            "largest_peak_difference_C": float(np.max(band.grid_C)) if band.fires and len(band.grid_C) else None}
    res = SampleRun(spec=spec, names=[m.name for m in run_case.members], kinds=[m.kind for m in run_case.members],
                    protected=setup.protected.copy(), critical_C=setup.critical_C.copy(),
                    required_minutes=[m.required_minutes for m in run_case.members],
                    thickness_mm=[m.thickness_mm for m in run_case.members], counts=counts,
                    fire_load_factor=factor, fire_load_basis=basis,
                    compartment_out_of_scope=setup.compartment_out_of_scope, grid=grid, backend=backend,
                    floor_area_m2=run_case.compartment.floor_area_m2, sizing=sizing, error_band=band)
    res.warnings = _run_warnings(res, setup)
    timings["total_s"] = time.perf_counter() - t_start
    res.timings_s = timings
    return res
