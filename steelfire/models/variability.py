"""Sampled fire severity: the ``[variability]`` table, its distributions, reproducible sampling and
the statistics of many fires (exceedance probabilities, fractiles, standard periods).

The compartment's uncertain quantities (fire load density, the share of the openings that are open,
the thermal inertia of the linings, the growth rate) are drawn from the distributions of the case's
``[variability]`` table; each sampled fire is an EN 1991-1-2 Annex A fire
(:func:`steelfire.models.fire.parametric.parametric_fires`). A variable the table does not list keeps
its deterministic case value.

Reproducibility: fires are drawn in blocks of ``BLOCK_SIZE``; block i is drawn from its own stream,
``numpy.random.SeedSequence(seed).spawn(...)[i]``, whatever the number of fires or how the work is
split, so the same seed gives bit-identical samples for any chunking of the evaluation. A Latin
hypercube is stratified within each block (BLOCK_SIZE strata per variable), not over the whole run.

Statistics are reduced chunk by chunk into integer counts (exceedances per member, fixed-bin
histograms) that add exactly, so no fires x members matrix is kept and the result does not depend
on the chunking either.

This module imports scipy (scipy.stats distributions, scipy.stats.qmc); scipy must be installed to
use it.
"""

from __future__ import annotations

import functools
import math
from dataclasses import dataclass, field
from typing import Mapping

import numpy as np
from scipy import stats
from scipy.stats import qmc

from steelfire.codevalues import DEFAULTS
from steelfire.errors import InputError
from steelfire.models.fire import compartment, fireload

# ---- constants -------------------------------------------------------------------------------

#: Fires per sampling block (each block has its own random stream; see the module docstring).
BLOCK_SIZE = 1000

#: Sampling methods of ``[variability] method``.
METHODS = ("latin-hypercube", "random")

#: Distribution names and their parameters (``cov`` is dimensionless; the others carry the
#: variable's unit suffix in the key, e.g. ``mean_MJ_m2`` for the fire load).
DISTRIBUTIONS = {
    "gumbel": ("mean", "cov"),
    "normal": ("mean", "cov|sd"),
    "lognormal": ("mean", "cov"),
    "triangular": ("low", "mode", "high"),
    "uniform": ("low", "high"),
    "fixed": ("value",),
}


@dataclass(frozen=True)
class Variable:
    """A sampled quantity: key suffix of its dimensioned parameters, unit, admissible range."""

    name: str
    suffix: str          # appended to mean, sd, low, mode, high, value in the case file
    unit: str
    upper: float | None  # largest admissible value (None: unbounded); the lower end is 0
    bounded_only: bool   # only distributions with a bounded support (uniform, triangular, fixed)


#: Sampled variables in the order of the unit hypercube's columns (growth is the fourth column).
#: fire_load: q_f, fire load density per floor area [MJ/m2]; opening_fraction: share of the vertical
#: openings that are open [-] (O scales with it: A_v shrinks, h_eq is kept); thermal_inertia: b.
VARIABLES = (
    Variable("fire_load", "_MJ_m2", "MJ/m2", None, False),
    Variable("opening_fraction", "", "-", 1.0, True),
    Variable("thermal_inertia", "", "J/(m2 s^0.5 K)", None, False),
)
VARIABLE = {v.name: v for v in VARIABLES}

#: Growth rates in the order their weights are accumulated (independent of the case's key order).
GROWTH_RATES = ("slow", "medium", "fast")

#: Columns of the unit hypercube: the three variables, then the growth rate.
DIMENSIONS = len(VARIABLES) + 1

#: Tolerance on the sum of the growth weights.
WEIGHT_SUM_TOLERANCE = 1e-9

#: Largest probability of a value <= 0 accepted from a normal or Gumbel distribution of a quantity
#: that must be positive (common practice, no source: at 1e-6, a normal COV up to 0.21 and a
#: Gumbel COV up to 0.40 pass). Lognormal, uniform and triangular distributions have no such mass.
NONPOSITIVE_PROBABILITY_MAX = 1e-6

#: Euler-Mascheroni constant 0.5772..., the mean of the standard maximum-value Gumbel distribution.
EULER_GAMMA = float(np.euler_gamma)

#: Standard fire-resistance periods [min] for load-bearing capacity R, EN 13501-2 classification
#: periods (from memory; the standard also lists R 360, beyond steelfire's 240 min standard fire).
STANDARD_PERIODS_MIN = (15, 20, 30, 45, 60, 90, 120, 180, 240)

#: Two-sided confidence of the exceedance intervals.
CONFIDENCE = 0.95

_KNOWN_KEYS = ("fires", "seed", "method", "fire_load", "opening_fraction", "thermal_inertia", "growth",
               "target_fractile", "target_probability", "ignition_rate_per_m2_year",
               "suppression_failure_probability")


# ---- the [variability] table -----------------------------------------------------------------

@dataclass(frozen=True)
class Distribution:
    """One variable's distribution as the case states it, parameters in the variable's unit.

    ``sd`` is set for gumbel, normal and lognormal (from ``cov`` x ``mean`` where the case gives a
    COV); ``cov`` is kept as given (None where the case gave ``sd``).
    """

    variable: str
    kind: str
    mean: float | None = None
    sd: float | None = None
    cov: float | None = None
    low: float | None = None
    mode: float | None = None
    high: float | None = None
    value: float | None = None

    def frozen(self):
        """The frozen scipy.stats distribution (``fixed``: a one-point distribution with ppf/cdf).

        gumbel: maximum-value Gumbel (``scipy.stats.gumbel_r``) with scale = sqrt(6) sd / pi and
        loc = mean - 0.5772 scale (the method of moments: mean = loc + gamma_E scale, sd = pi scale /
        sqrt(6); Gumbel's own relations, from memory). Its 80 % fractile is mean (1 + k V) with
        k = -(sqrt(6)/pi)(gamma_E + ln(-ln 0.8)) = 0.7195, the fractile EN 1991-1-2 Annex E (E.2 and
        Table E.4) takes as the characteristic fire load density (Table E.4: mean 420, 80 % fractile
        511 MJ/m2 for offices, V = 0.3; from memory).
        normal: ``scipy.stats.norm(mean, sd)``. lognormal: ln X normal with sigma = sqrt(ln(1 + V^2))
        and mu = ln(mean) - sigma^2 / 2 (so that X has the given mean and COV), ``scipy.stats.lognorm``.
        triangular: ``scipy.stats.triang`` on [low, high] with its mode. uniform: on [low, high].
        """
        k = self.kind
        if k == "gumbel":
            scale = math.sqrt(6.0) * self.sd / math.pi
            return stats.gumbel_r(loc=self.mean - EULER_GAMMA * scale, scale=scale)
        if k == "normal":
            return stats.norm(loc=self.mean, scale=self.sd)
        if k == "lognormal":
            v = self.sd / self.mean
            sigma = math.sqrt(math.log1p(v * v))
            return stats.lognorm(s=sigma, scale=math.exp(math.log(self.mean) - 0.5 * sigma * sigma))
        if k == "triangular":
            width = self.high - self.low
            return stats.triang(c=(self.mode - self.low) / width, loc=self.low, scale=width)
        if k == "uniform":
            return stats.uniform(loc=self.low, scale=self.high - self.low)
        return PointDistribution(self.value)


class PointDistribution:
    """All probability at ``value`` (the ``fixed`` distribution): ppf, cdf, mean, std, support."""

    def __init__(self, value: float):
        self.value = float(value)

    def ppf(self, u):
        return np.full(np.shape(u), self.value)

    def cdf(self, x):
        return np.where(np.asarray(x, dtype=float) >= self.value, 1.0, 0.0)

    def mean(self):
        return self.value

    def std(self):
        return 0.0

    def support(self):
        return self.value, self.value


@dataclass(frozen=True)
class VariabilitySpec:
    """The validated ``[variability]`` table.

    ``growth`` holds the weights of ``GROWTH_RATES`` in that order, or None (the case's growth rate).
    A distribution left None keeps the case's deterministic value.
    """

    fires: int
    seed: int
    method: str = "latin-hypercube"
    fire_load: Distribution | None = None
    opening_fraction: Distribution | None = None
    thermal_inertia: Distribution | None = None
    growth: tuple | None = None
    target_fractile: float = 0.9
    target_probability: float | None = None
    ignition_rate_per_m2_year: float | None = None
    suppression_failure_probability: float | None = None

    def distribution(self, name: str) -> Distribution | None:
        return getattr(self, name)


def _number(table, key, where, *, unit="", required=True):
    full = f"{where}.{key}"
    if key not in table:
        if required:
            raise InputError(full, None, f"is missing; give a number{f' [{unit}]' if unit else ''}")
        return None
    v = table[key]
    if isinstance(v, bool) or not isinstance(v, (int, float)):
        raise InputError(full, v, f"must be a number{f' [{unit}]' if unit else ''}")
    if not math.isfinite(v):
        raise InputError(full, v, "must be a finite number")
    return float(v)


def _integer(table, key, where, lo):
    full = f"{where}.{key}"
    if key not in table:
        raise InputError(full, None, f"is missing; give an integer >= {lo}")
    v = table[key]
    if isinstance(v, bool) or not isinstance(v, int):
        raise InputError(full, v, f"must be an integer >= {lo}")
    if v < lo:
        raise InputError(full, v, f"must be an integer >= {lo}")
    return int(v)


def _open_unit(table, key, where, default):
    v = _number(table, key, where, required=False)
    if v is None:
        return default
    if not 0.0 < v < 1.0:
        raise InputError(f"{where}.{key}", table[key], "must lie strictly between 0 and 1")
    return v


def parse_distribution(name: str, table, where: str) -> Distribution:
    """One variable's distribution table, e.g. ``{distribution = "gumbel", mean_MJ_m2 = 420.0, cov = 0.3}``.

    Parameters: gumbel (mean, cov), normal (mean and cov or sd), lognormal (mean, cov), triangular
    (low, mode, high), uniform (low, high), fixed (value); the dimensioned ones carry the variable's
    unit suffix. Every variable is positive: a mean or a value > 0, low >= 0, and for normal and
    Gumbel at most ``NONPOSITIVE_PROBABILITY_MAX`` probability of a value <= 0. The opening fraction
    lies in (0, 1] and takes only bounded distributions (uniform, triangular, fixed).
    """
    var = VARIABLE[name]
    sfx, unit = var.suffix, var.unit
    if not isinstance(table, Mapping):
        raise InputError(where, table, 'must be a table such as { distribution = "uniform", low'
                         + sfx + ' = ..., high' + sfx + ' = ... }')
    kind = table.get("distribution")
    if kind is None:
        raise InputError(f"{where}.distribution", None, "is missing; one of " + ", ".join(DISTRIBUTIONS))
    if kind not in DISTRIBUTIONS:
        raise InputError(f"{where}.distribution", kind, "must be one of " + ", ".join(DISTRIBUTIONS))
    if var.bounded_only and kind not in ("uniform", "triangular", "fixed"):
        raise InputError(f"{where}.distribution", kind,
                         f"{name} lies between 0 and {var.upper:g}: uniform, triangular or fixed")
    params = DISTRIBUTIONS[kind]
    keys = set()
    for p in params:
        for alt in p.split("|"):
            keys.add(alt if alt == "cov" else alt + sfx)
    for k in table:
        if k != "distribution" and k not in keys:
            raise InputError(f"{where}.{k}", table[k],
                             f"is not a parameter of {kind}; give " + ", ".join(sorted(keys)))

    def num(key, required=True):
        return _number(table, key, where, unit="-" if key == "cov" else unit, required=required)

    def positive(key, v):
        if not v > 0:
            raise InputError(f"{where}.{key}", table[key], f"must be > 0 [{unit}]")

    lo_admissible = 0.0
    hi_admissible = var.upper
    if kind in ("gumbel", "normal", "lognormal"):
        mean = num("mean" + sfx)
        positive("mean" + sfx, mean)
        cov = num("cov", required=False)
        sd = num("sd" + sfx, required=False) if kind == "normal" else None
        if kind == "normal" and (cov is None) == (sd is None):
            raise InputError(f"{where}.cov", table.get("cov"), f"give either cov or sd{sfx} (one of them)")
        if cov is not None and not cov > 0:
            raise InputError(f"{where}.cov", table["cov"],
                             'must be > 0 (use distribution = "fixed" for a certain value)')
        if sd is not None and not sd > 0:
            raise InputError(f"{where}.sd{sfx}", table["sd" + sfx],
                             f'must be > 0 [{unit}] (use distribution = "fixed" for a certain value)')
        d = Distribution(name, kind, mean=mean, sd=sd if sd is not None else cov * mean, cov=cov)
        if kind in ("gumbel", "normal"):
            p0 = float(d.frozen().cdf(lo_admissible))
            if p0 > NONPOSITIVE_PROBABILITY_MAX:
                key = "cov" if cov is not None else "sd" + sfx
                raise InputError(f"{where}.{key}", table[key],
                                 f"gives {name} <= 0 with probability {p0:.2g}; at most "
                                 f"{NONPOSITIVE_PROBABILITY_MAX:g} allowed (a smaller spread, or lognormal)")
        return d
    if kind == "fixed":
        value = num("value" + sfx)
        positive("value" + sfx, value)
        if hi_admissible is not None and value > hi_admissible:
            raise InputError(f"{where}.value{sfx}", table["value" + sfx], f"must be <= {hi_admissible:g}")
        return Distribution(name, kind, value=value)
    low = num("low" + sfx)
    high = num("high" + sfx)
    mode = num("mode" + sfx) if kind == "triangular" else None
    if low < lo_admissible:
        raise InputError(f"{where}.low{sfx}", table["low" + sfx], f"must be >= 0 [{unit}]")
    if hi_admissible is not None and high > hi_admissible:
        raise InputError(f"{where}.high{sfx}", table["high" + sfx], f"must be <= {hi_admissible:g}")
    if not high > low:
        raise InputError(f"{where}.high{sfx}", table["high" + sfx], f"must be > low{sfx} = {low:g}")
    if mode is not None and not low <= mode <= high:
        raise InputError(f"{where}.mode{sfx}", table["mode" + sfx],
                         f"must lie between low{sfx} = {low:g} and high{sfx} = {high:g}")
    return Distribution(name, kind, low=low, mode=mode, high=high)


def parse_growth(table, where: str) -> tuple:
    """Weights of the growth rates, e.g. ``{medium = 0.7, fast = 0.3}``: >= 0, adding up to 1 within 1e-9.

    Returns the weights of ``GROWTH_RATES`` in that order (0 for a rate not listed).
    """
    if not isinstance(table, Mapping) or not table:
        raise InputError(where, table, "must be a table of weights such as { medium = 0.7, fast = 0.3 }")
    for k in table:
        if k not in GROWTH_RATES:
            raise InputError(f"{where}.{k}", table[k], "is not a growth rate; one of " + ", ".join(GROWTH_RATES))
    weights = []
    for g in GROWTH_RATES:
        w = _number(table, g, where, required=False)
        if w is not None and w < 0:
            raise InputError(f"{where}.{g}", table[g], "must be a weight >= 0")
        weights.append(0.0 if w is None else w)
    total = math.fsum(weights)
    if abs(total - 1.0) > WEIGHT_SUM_TOLERANCE:
        raise InputError(where, dict(table), f"weights must add up to 1 (within {WEIGHT_SUM_TOLERANCE:g}); "
                         f"they add up to {total!r}")
    return tuple(weights)


def parse_variability(table, where: str = "variability") -> VariabilitySpec:
    """The ``[variability]`` table (a dict, as read from TOML) as a :class:`VariabilitySpec`.

    Required: ``fires`` (integer >= 1), ``seed`` (integer >= 0). Optional: ``method``
    (latin-hypercube, the default, or random), the distributions ``fire_load``,
    ``opening_fraction``, ``thermal_inertia`` (:func:`parse_distribution`), ``growth`` weights
    (:func:`parse_growth`), ``target_fractile`` (default 0.9) and ``target_probability`` in (0, 1),
    and ``ignition_rate_per_m2_year`` (> 0, per m2 of floor and year) with
    ``suppression_failure_probability`` (in [0, 1]), both or neither.

    >>> s = parse_variability({"fires": 100, "seed": 1, "growth": {"medium": 0.7, "fast": 0.3}})
    >>> s.method, s.growth, s.target_fractile
    ('latin-hypercube', (0.0, 0.7, 0.3), 0.9)
    """
    if not isinstance(table, Mapping):
        raise InputError(where, table, "must be a table")
    for k in table:
        if k not in _KNOWN_KEYS:
            raise InputError(f"{where}.{k}", table[k], "is not a known key; known: " + ", ".join(_KNOWN_KEYS))
    fires = _integer(table, "fires", where, 1)
    seed = _integer(table, "seed", where, 0)
    method = table.get("method", "latin-hypercube")
    if method not in METHODS:
        raise InputError(f"{where}.method", method, "must be one of " + ", ".join(METHODS))
    dists = {v.name: (parse_distribution(v.name, table[v.name], f"{where}.{v.name}") if v.name in table else None)
             for v in VARIABLES}
    growth = parse_growth(table["growth"], f"{where}.growth") if "growth" in table else None
    fractile = _open_unit(table, "target_fractile", where, 0.9)
    probability = _open_unit(table, "target_probability", where, None)
    rate = _number(table, "ignition_rate_per_m2_year", where, unit="1/(m2 year)", required=False)
    failure = _number(table, "suppression_failure_probability", where, required=False)
    if (rate is None) != (failure is None):
        missing = "suppression_failure_probability" if failure is None else "ignition_rate_per_m2_year"
        raise InputError(f"{where}.{missing}", None,
                         "is missing; the annual probability needs both ignition_rate_per_m2_year and "
                         "suppression_failure_probability")
    if rate is not None and not rate > 0:
        raise InputError(f"{where}.ignition_rate_per_m2_year", table["ignition_rate_per_m2_year"],
                         "must be > 0 [1/(m2 year)]")
    if failure is not None and not 0.0 <= failure <= 1.0:
        raise InputError(f"{where}.suppression_failure_probability", table["suppression_failure_probability"],
                         "must lie between 0 and 1")
    return VariabilitySpec(fires=fires, seed=seed, method=method, growth=growth, target_fractile=fractile,
                           target_probability=probability, ignition_rate_per_m2_year=rate,
                           suppression_failure_probability=failure, **dists)


# ---- sampling --------------------------------------------------------------------------------

def block_seed(seed: int, block_index: int) -> np.random.SeedSequence:
    """The stream of block ``block_index``: ``SeedSequence(seed).spawn(block_index + 1)[block_index]``,
    built directly (a spawned child is the parent's entropy with spawn_key (block_index,))."""
    return np.random.SeedSequence(seed, spawn_key=(block_index,))


def unit_block(method: str, seed: int, block_index: int) -> np.ndarray:
    """``BLOCK_SIZE`` points of the unit hypercube [0, 1)^DIMENSIONS for one block.

    latin-hypercube: ``scipy.stats.qmc.LatinHypercube`` (scrambled: a random point in each stratum),
    BLOCK_SIZE strata per column within the block; random: independent uniforms. An exact 0 (a
    2^-53 event) is moved to the smallest positive double so that unbounded inverse CDFs stay finite.
    """
    if method not in METHODS:
        raise InputError("variability.method", method, "must be one of " + ", ".join(METHODS))
    if isinstance(block_index, bool) or not isinstance(block_index, (int, np.integer)) or block_index < 0:
        raise InputError("block_index", block_index, "an integer >= 0")
    rng = np.random.Generator(np.random.PCG64(block_seed(seed, int(block_index))))
    if method == "latin-hypercube":
        try:
            engine = qmc.LatinHypercube(d=DIMENSIONS, rng=rng)
        except TypeError:  # scipy < 1.15 names the argument seed
            engine = qmc.LatinHypercube(d=DIMENSIONS, seed=rng)
        u = engine.random(BLOCK_SIZE)
    else:
        u = rng.random((BLOCK_SIZE, DIMENSIONS))
    return np.where(u > 0.0, u, np.nextafter(0.0, 1.0))


@functools.lru_cache(maxsize=64)
def _frozen(d: Distribution):
    """``d.frozen()`` made once per distribution (freezing a scipy distribution costs about 1 ms)."""
    return d.frozen()


def samples_block(spec: VariabilitySpec, block_index: int, seed: int | None = None) -> dict:
    """The sampled values of block ``block_index`` (fires block_index * BLOCK_SIZE onwards), a dict of
    arrays of length BLOCK_SIZE: one per distribution the spec lists (in its unit), and ``growth``
    (names from GROWTH_RATES) if the spec weights the growth rates.

    The growth rate is the first rate whose cumulative weight (in GROWTH_RATES order) exceeds the
    fourth uniform of the fire; a rate of weight 0 is never drawn.
    """
    u = unit_block(spec.method, spec.seed if seed is None else seed, block_index)
    out = {}
    for j, var in enumerate(VARIABLES):
        d = spec.distribution(var.name)
        if d is not None:
            out[var.name] = np.asarray(_frozen(d).ppf(u[:, j]), dtype=float)
    if spec.growth is not None:
        cum = np.cumsum(spec.growth) / math.fsum(spec.growth)
        idx = np.minimum(np.searchsorted(cum, u[:, len(VARIABLES)], side="right"), len(GROWTH_RATES) - 1)
        out["growth"] = np.asarray(GROWTH_RATES)[idx]
    return out


def samples_range(spec: VariabilitySpec, start: int, stop: int, seed: int | None = None) -> dict:
    """Fires ``start`` to ``stop - 1`` of the run: the same values, bit for bit, as the same rows of
    :func:`samples` over any larger range (every block is drawn whole, then sliced)."""
    if isinstance(start, bool) or isinstance(stop, bool) or not (0 <= int(start) <= int(stop)):
        raise InputError("fire range", (start, stop), "0 <= start <= stop")
    start, stop = int(start), int(stop)
    first, last = start // BLOCK_SIZE, (stop - 1) // BLOCK_SIZE if stop > 0 else -1
    parts = [samples_block(spec, i, seed) for i in range(first, last + 1)]
    if not parts:
        empty = samples_block(spec, 0, seed)
        return {k: v[:0] for k, v in empty.items()}
    lo = start - first * BLOCK_SIZE
    return {k: np.concatenate([p[k] for p in parts])[lo:lo + stop - start] for k in parts[0]}


def samples(spec: VariabilitySpec, n: int | None = None, seed: int | None = None) -> dict:
    """The first ``n`` fires (default ``spec.fires``) of the run with ``seed`` (default ``spec.seed``).

    A dict of arrays of length n (see :func:`samples_block`). When n is not a multiple of BLOCK_SIZE
    the last block is cut short: its points are still uniform each, but that block's strata are
    not all filled.
    """
    n = spec.fires if n is None else n
    if isinstance(n, bool) or not isinstance(n, (int, np.integer)) or n < 1:
        raise InputError("variability.fires", n, "must be an integer >= 1")
    return samples_range(spec, 0, int(n), seed)


def annex_a_inputs(drawn: Mapping, fires: int, *, opening_factor_m05: float, thermal_inertia: float,
                   design_fire_load_MJ_m2: float, fire_load_factor: float, floor_area_m2: float,
                   boundary_area_m2: float, growth: str, code=DEFAULTS) -> dict:
    """The Annex A inputs of each sampled fire, arrays of length ``fires`` (the keyword names of
    :func:`steelfire.models.fire.parametric.parametric_fires`).

    O = opening_fraction x ``opening_factor_m05`` (the case's O with every opening open: a share f
    of each opening group open gives f A_v with h_eq unchanged, EN 1991-1-2 Annex A (3));
    b = thermal_inertia, or the case's; q_f,d = ``fire_load_factor`` x fire_load where the fire load
    is sampled, else ``design_fire_load_MJ_m2``; q_t,d = q_f,d A_f / A_t (Annex A (4)); t_lim from
    the growth rate (Annex A (10), code values). ``fire_load_factor`` is the caller's choice of what
    turns a sampled fire load density into the q_f,d of Annex A (the combustion factor m alone for a
    best-estimate sample; the delta factors of Annex E are the deterministic method's safety factors).
    """
    if isinstance(fires, bool) or not isinstance(fires, (int, np.integer)) or fires < 1:
        raise InputError("fires", fires, "an integer >= 1")
    for key, v in drawn.items():
        if len(v) != fires:
            raise InputError(f"samples.{key}", f"{len(v)} values", f"{fires} values (one per fire)")
    ones = np.ones(fires)
    o = opening_factor_m05 * np.asarray(drawn["opening_fraction"], dtype=float) if "opening_fraction" in drawn \
        else opening_factor_m05 * ones
    b = np.asarray(drawn["thermal_inertia"], dtype=float) if "thermal_inertia" in drawn else thermal_inertia * ones
    qfd = fire_load_factor * np.asarray(drawn["fire_load"], dtype=float) if "fire_load" in drawn \
        else design_fire_load_MJ_m2 * ones
    qtd = compartment.total_area_fire_load(qfd, floor_area_m2, boundary_area_m2)
    if "growth" in drawn:
        names = np.asarray(drawn["growth"])
        t_lim = np.full(fires, np.nan)
        for g in GROWTH_RATES:
            t_lim[names == g] = fireload.fire_growth_t_lim_h(g, code)
        if np.isnan(t_lim).any():
            bad = names[np.isnan(t_lim)][0]
            raise InputError("samples.growth", str(bad), "one of " + ", ".join(GROWTH_RATES))
    else:
        t_lim = fireload.fire_growth_t_lim_h(growth, code) * ones
    return {"opening_factor_m05": o, "thermal_inertia": b, "total_area_fire_load_MJ_m2": qtd, "t_lim_h": t_lim}


# ---- statistics ------------------------------------------------------------------------------

@dataclass(frozen=True, eq=False)
class Exceedance:
    """Estimated probability (count / fires) with its two-sided Clopper-Pearson interval (arrays or floats)."""

    count: np.ndarray
    fires: int
    probability: np.ndarray
    lower: np.ndarray
    upper: np.ndarray
    confidence: float


def exceedance_probability(count, fires: int, confidence: float = CONFIDENCE) -> Exceedance:
    """p = count / fires with the exact (Clopper-Pearson) two-sided interval at ``confidence``.

    lower = Beta^-1(a/2; k, n - k + 1) (0 for k = 0), upper = Beta^-1(1 - a/2; k + 1, n - k) (1 for
    k = n), a = 1 - confidence (Clopper and Pearson 1934; the beta form, from memory). Chosen over
    Wilson's interval because its coverage is never below the nominal level (Wilson's dips below it
    for some p at small n p, which for a rare failure is the unsafe side), and it stays meaningful at
    k = 0 (upper 1 - (a/2)^(1/n), about 3.7 / n). For Latin hypercube samples the binomial
    interval is wide enough where the response is monotone in each input (the variance of a Latin
    hypercube mean is then at most that of random sampling, McKay, Beckman and Conover 1979) and
    at most about n/(n - 1) too narrow in general (Owen 1997); both from memory.

    >>> e = exceedance_probability(0, 1000)
    >>> round(float(e.upper), 6)  # hand calculation: 1 - 0.025^(1/1000)
    0.003682
    """
    if isinstance(fires, bool) or not isinstance(fires, (int, np.integer)) or fires < 1:
        raise InputError("fires", fires, "an integer >= 1")
    if not 0.0 < confidence < 1.0:
        raise InputError("confidence", confidence, "strictly between 0 and 1")
    k = np.asarray(count)
    if not np.issubdtype(k.dtype, np.integer) or np.any(k < 0) or np.any(k > fires):
        raise InputError("exceedance count", count, f"integers between 0 and fires = {fires}")
    a = 1.0 - confidence
    kf = k.astype(float)
    with np.errstate(invalid="ignore", divide="ignore"):
        lower = np.where(k == 0, 0.0, stats.beta.ppf(a / 2.0, kf, fires - kf + 1.0))
        upper = np.where(k == fires, 1.0, stats.beta.ppf(1.0 - a / 2.0, kf + 1.0, fires - kf))
    return Exceedance(count=k, fires=int(fires), probability=kf / fires, lower=lower, upper=upper,
                      confidence=confidence)


def _order_index(q: float, n: int) -> int:
    """k = ceil(q n), 1 <= k <= n: the order statistic that is the q fractile (smallest x with
    F_n(x) >= q). 1e-7 absorbs the rounding of q n (0.1 x 30 = 3.0000000000000004)."""
    if not 0.0 < q < 1.0:
        raise InputError("fractile", q, "strictly between 0 and 1")
    return min(max(math.ceil(q * n - 1e-7), 1), n)


def fractile_upper_rank(q: float, n: int, confidence: float = CONFIDENCE) -> int | None:
    """The rank r of the order statistic that is a one-sided upper confidence bound, at ``confidence``,
    on the q fractile of a continuous distribution from n samples: the least r <= n with
    P(Binomial(n, q) <= r - 1) >= confidence (the r-th smallest of n values lies at or above the q
    fractile exactly when fewer than r values lie below it). None where no r <= n will do:
    n < ln(1 - confidence) / ln(q) (:func:`fires_for_upper_bound`). Distribution-free order-statistic
    bound (Wilks 1941; the binomial form, from memory).

    >>> fractile_upper_rank(0.95, 59), fractile_upper_rank(0.95, 58)  # 0.95^59 = 0.0485 <= 0.05 < 0.95^58
    (59, None)
    """
    k0 = _order_index(q, n)  # also checks q
    if not 0.0 < confidence < 1.0:
        raise InputError("confidence", confidence, "strictly between 0 and 1")
    m = int(stats.binom.ppf(confidence, n, q))  # least m with P(B <= m) >= confidence (scipy's discrete ppf)
    while m > 0 and stats.binom.cdf(m - 1, n, q) >= confidence:  # guard the ppf's floating point either way
        m -= 1
    while stats.binom.cdf(m, n, q) < confidence:
        m += 1
    r = max(m + 1, k0)
    return r if r <= n else None


def fires_for_upper_bound(q: float, confidence: float = CONFIDENCE) -> int:
    """The fewest samples whose largest value is a one-sided upper bound at ``confidence`` on the q
    fractile: the least n with q^n <= 1 - confidence, n = ceil(ln(1 - confidence) / ln q) (hand
    derivation: P(all n below the fractile) = q^n). 59 for q = 0.95 at 95 % (Wilks 1941, from memory).

    >>> fires_for_upper_bound(0.95), fires_for_upper_bound(0.9), fires_for_upper_bound(0.99)
    (59, 29, 299)
    """
    if not 0.0 < q < 1.0:
        raise InputError("fractile", q, "strictly between 0 and 1")
    n = max(1, math.ceil(math.log(1.0 - confidence) / math.log(q) - 1e-9))
    while q ** n > 1.0 - confidence:
        n += 1
    while n > 1 and q ** (n - 1) <= 1.0 - confidence:
        n -= 1
    return n


def sample_fractile(values, q: float, axis: int = 0):
    """The q fractile of a sample: its k-th smallest value, k = ceil(q n) (the inverse of the
    empirical CDF; numpy's ``inverted_cdf``). NaN values (no result) rank above every number, so a
    fractile that reaches them is +inf; NaN if every value is NaN.

    At most a share 1 - q of the sample lies above it: a member whose critical temperature is at
    least the (1 - p) fractile of its peaks has an estimated exceedance probability <= p.

    >>> sample_fractile([3.0, 1.0, 2.0, 4.0], 0.5), sample_fractile([3.0, 1.0, 2.0, 4.0], 0.51)
    (2.0, 3.0)
    """
    v = np.asarray(values, dtype=float)
    n = v.shape[axis]
    if n == 0:
        raise InputError("values", "an empty sample", "at least one value")
    k = _order_index(q, n)
    s = np.sort(v, axis=axis)  # NaN sorts last
    out = np.take(s, k - 1, axis=axis)
    all_nan = np.all(np.isnan(v), axis=axis)
    out = np.where(np.isnan(out), np.inf, out)
    out = np.where(all_nan, np.nan, out)
    return float(out) if out.ndim == 0 else out


@dataclass(frozen=True)
class Bins:
    """Fixed histogram bins: ``count`` bins of width 1 / ``per_unit`` from ``start``, closed on the right.

    Bin j holds edges[j] < x <= edges[j + 1], edges[j] = start + j / per_unit (a division, so that
    whole-unit edges such as 60 min are exact); x <= start is counted below, x > the last edge above.
    """

    start: float
    per_unit: int
    count: int

    @property
    def width(self) -> float:
        return 1.0 / self.per_unit

    @property
    def edges(self) -> np.ndarray:
        return self.start + np.arange(self.count + 1) / self.per_unit


#: Peak temperatures: 0.5 C bins from 0 to 1500 C (the Annex A gas peak stays below 1345 C, eq (A.1)).
TEMPERATURE_BINS = Bins(0.0, 2, 3000)
#: Times: 0.1 min bins from 0 to 600 min.
TIME_BINS = Bins(0.0, 10, 6000)


@dataclass(frozen=True, eq=False)
class Histograms:
    """One fixed-bin histogram per member, integer counts that add exactly across chunks of fires.

    ``counts`` (M, bins.count); ``below``, ``above``, ``undefined`` (M,): values <= the first edge,
    above the last edge, and NaN (no result). Memory: 8 M (bins.count + 3) bytes.
    """

    bins: Bins
    counts: np.ndarray
    below: np.ndarray
    above: np.ndarray
    undefined: np.ndarray

    @property
    def members(self) -> int:
        return int(self.counts.shape[0])

    @property
    def fires(self) -> np.ndarray:
        """Values counted per member (fires seen)."""
        return self.counts.sum(axis=1) + self.below + self.above + self.undefined

    def merge(self, other: "Histograms") -> "Histograms":
        """The histograms of both sets of fires (a sum of integers: exact, in any order)."""
        if other.bins != self.bins or other.members != self.members:
            raise InputError("histograms", (other.bins, other.members),
                             f"the same bins and member count as {(self.bins, self.members)}")
        return Histograms(self.bins, self.counts + other.counts, self.below + other.below,
                          self.above + other.above, self.undefined + other.undefined)

    def fractile(self, q: float) -> np.ndarray:
        """The q fractile per member read to the bin width: the upper edge of the bin that holds the
        k-th smallest value (k = ceil(q n), as :func:`sample_fractile`), so within one bin width
        above the sample's own fractile. ``bins.start`` if it falls below the bins, +inf above them
        or among the NaN values (ranked last), NaN for a member with no numeric value or no fires.
        """
        return self._order_values(lambda n: _order_index(q, n))

    def upper_bound(self, q: float, confidence: float = CONFIDENCE) -> np.ndarray:
        """Per member: a one-sided upper confidence bound at ``confidence`` on the q fractile, the
        :func:`fractile_upper_rank`-th smallest value read to the bin's upper edge; +inf where the
        fires are too few for one (fewer than :func:`fires_for_upper_bound`) or it reaches the values
        above the bins or the NaN values; NaN as :meth:`fractile`."""
        return self._order_values(lambda n: fractile_upper_rank(q, n, confidence) or n + 1)

    def _order_values(self, rank) -> np.ndarray:
        """The rank(n)-th smallest value per member (n its values), read to the upper bin edge; a rank
        above n gives +inf."""
        table = np.concatenate([self.below[:, None], self.counts, self.above[:, None], self.undefined[:, None]],
                               axis=1)
        cum = np.cumsum(table, axis=1)
        n = cum[:, -1]
        edges = self.bins.edges
        value_at = np.concatenate([[edges[0]], edges[1:], [np.inf, np.inf]])
        out = np.full(self.members, np.nan)
        for m in range(self.members):  # one searchsorted per member: M is small beside the fires
            if n[m] == 0 or self.undefined[m] == n[m]:
                continue
            k = rank(int(n[m]))
            out[m] = np.inf if k > n[m] else value_at[np.searchsorted(cum[m], k, side="left")]
        return out


def histograms(values, bins: Bins) -> Histograms:
    """Per-member histograms of ``values`` (F fires x M members, or F values of one member).

    >>> h = histograms([[59.95], [60.0], [60.01]], TIME_BINS)
    >>> h.fractile(0.5).tolist(), h.fractile(0.9).tolist()  # bins (59.9, 60.0] and (60.0, 60.1]
    ([60.0], [60.1])
    """
    v = np.asarray(values, dtype=float)
    if v.ndim == 1:
        v = v[:, None]
    if v.ndim != 2:
        raise InputError("values", "shape " + str(v.shape), "a (fires, members) array")
    f, m = v.shape
    nb = bins.count
    idx = np.searchsorted(bins.edges, v, side="left")  # 0 below, 1..nb the bins, nb + 1 above
    idx[np.isnan(v)] = nb + 2
    flat = idx + (np.arange(m) * (nb + 3))[None, :]
    table = np.bincount(flat.ravel(), minlength=m * (nb + 3)).reshape(m, nb + 3).astype(np.int64)
    return Histograms(bins, table[:, 1:nb + 1].copy(), table[:, 0].copy(), table[:, nb + 1].copy(),
                      table[:, nb + 2].copy())


def empty_histograms(members: int, bins: Bins) -> Histograms:
    z = np.zeros(members, dtype=np.int64)
    return Histograms(bins, np.zeros((members, bins.count), dtype=np.int64), z, z.copy(), z.copy())


@dataclass(frozen=True, eq=False)
class Tally:
    """Integer counts over a set of fires, per member: what a sampling run keeps instead of the
    fires x members results. Tallies of disjoint sets of fires merge exactly (:meth:`merge`).

    ``exceedances``: fires with peak > critical (a member passes at peak <= critical);
    ``undefined``: fires without a peak (NaN); ``peak_steel``: histograms of the peaks
    (TEMPERATURE_BINS); ``equivalent_time``: route -> histograms of the equivalent times (TIME_BINS);
    ``near_critical``: fires whose peak lies within the member's error band of its critical
    temperature, |peak - critical| <= band; ``near_critical_passing``: those of them that pass
    (critical - band <= peak <= critical), the fires the band turns into exceedances (zeros where the
    tally was made without a band: only a peak equal to the critical temperature is then near).
    """

    fires: int
    exceedances: np.ndarray
    undefined: np.ndarray
    peak_steel: Histograms
    equivalent_time: dict = field(default_factory=dict)
    near_critical: np.ndarray | None = None
    near_critical_passing: np.ndarray | None = None

    def __post_init__(self):
        z = np.zeros_like(np.asarray(self.exceedances, dtype=np.int64))
        if self.near_critical is None:
            object.__setattr__(self, "near_critical", z)
        if self.near_critical_passing is None:
            object.__setattr__(self, "near_critical_passing", z.copy())

    def merge(self, other: "Tally") -> "Tally":
        if set(other.equivalent_time) != set(self.equivalent_time):
            raise InputError("tally routes", sorted(other.equivalent_time),
                             f"the routes {sorted(self.equivalent_time)}")
        return Tally(self.fires + other.fires, self.exceedances + other.exceedances, self.undefined + other.undefined,
                     self.peak_steel.merge(other.peak_steel),
                     {r: h.merge(other.equivalent_time[r]) for r, h in self.equivalent_time.items()},
                     self.near_critical + other.near_critical,
                     self.near_critical_passing + other.near_critical_passing)

    def exceedance(self, confidence: float = CONFIDENCE) -> Exceedance:
        """Per member: P(peak > critical) over the fires, a fire without a peak counted as exceeding
        (it cannot be shown safe), with its Clopper-Pearson interval."""
        return exceedance_probability(self.exceedances + self.undefined, self.fires, confidence)

    def exceedance_with_band(self, confidence: float = CONFIDENCE) -> Exceedance:
        """Per member: P(peak > critical - band), the fires within the error band below the critical
        temperature counted as exceeding (their pass is within the numerical error of the peak), a fire
        without a peak counted as exceeding, with the Clopper-Pearson interval. Never below
        :meth:`exceedance` (the count only grows)."""
        return exceedance_probability(self.exceedances + self.undefined + self.near_critical_passing, self.fires,
                                      confidence)

    def peak_fractile(self, q: float) -> np.ndarray:
        """Per member: the q fractile of the peak steel temperature [C], to 0.5 C (upper bin edge)."""
        return self.peak_steel.fractile(q)

    def equivalent_time_fractile(self, route: str, q: float) -> np.ndarray:
        """Per member: the q fractile of the equivalent time [min] of ``route``, to 0.1 min (upper edge)."""
        return self.equivalent_time[route].fractile(q)

    def equivalent_time_upper_bound(self, route: str, q: float, confidence: float = CONFIDENCE) -> np.ndarray:
        """Per member: the one-sided upper confidence bound on that fractile (:meth:`Histograms.upper_bound`)."""
        return self.equivalent_time[route].upper_bound(q, confidence)


def near_critical_counts(peak_steel_C, critical_temperature_C, band_C):
    """Per member: (fires with |peak - critical| <= band, those of them with peak <= critical), for
    ``peak_steel_C`` (F, M) [C], ``critical_temperature_C`` (M,) [C], ``band_C`` (M,) [C] >= 0. NaN
    peaks are in neither (they count as exceeding on their own). Integer counts: they add exactly over
    chunks of fires.

    >>> near_critical_counts([[499.0], [499.8], [500.0], [500.3], [501.0]], [500.0], [0.5])
    (array([3]), array([2]))
    """
    peak = np.asarray(peak_steel_C, dtype=float)
    crit = np.asarray(critical_temperature_C, dtype=float)[None, :]
    band = np.asarray(band_C, dtype=float)
    if band.shape != crit.shape[1:] or not np.all(band >= 0.0):
        raise InputError("band_C", band_C, f"one value >= 0 [C] per member ({crit.shape[1]},)")
    band = band[None, :]
    with np.errstate(invalid="ignore"):
        low = peak >= crit - band       # False for NaN
        near = low & (peak <= crit + band)
        passing = low & (peak <= crit)
    return (np.count_nonzero(near, axis=0).astype(np.int64), np.count_nonzero(passing, axis=0).astype(np.int64))


def tally(peak_steel_C, critical_temperature_C, equivalent_time_min: Mapping | None = None,
          temperature_bins: Bins = TEMPERATURE_BINS, time_bins: Bins = TIME_BINS, band_C=None) -> Tally:
    """The counts of one chunk of fires: ``peak_steel_C`` (F, M) [C], ``critical_temperature_C`` (M,)
    [C], ``equivalent_time_min`` route -> (F, M) [min] (NaN where a route gives no time), ``band_C``
    (M,) [C] the error band of the peaks (:func:`near_critical_counts`; None: no band, 0)."""
    peak = np.asarray(peak_steel_C, dtype=float)
    if peak.ndim != 2:
        raise InputError("peak_steel_C", "shape " + str(peak.shape), "a (fires, members) array")
    crit = np.asarray(critical_temperature_C, dtype=float)
    if crit.shape != (peak.shape[1],):
        raise InputError("critical_temperature_C", "shape " + str(crit.shape), f"one per member ({peak.shape[1]},)")
    nan = np.isnan(peak)
    with np.errstate(invalid="ignore"):
        exceed = np.count_nonzero((peak > crit[None, :]) & ~nan, axis=0).astype(np.int64)
    near, passing = near_critical_counts(peak, crit, np.zeros(len(crit)) if band_C is None else band_C)
    times = {}
    for route, t in (equivalent_time_min or {}).items():
        t = np.asarray(t, dtype=float)
        if t.shape != peak.shape:
            raise InputError(f"equivalent_time_min[{route}]", "shape " + str(t.shape), f"shape {peak.shape}")
        times[route] = histograms(t, time_bins)
    return Tally(int(peak.shape[0]), exceed, np.count_nonzero(nan, axis=0).astype(np.int64),
                 histograms(peak, temperature_bins), times, near, passing)


def period_covering(time_min) -> str | None:
    """The shortest standard period of ``STANDARD_PERIODS_MIN`` that is >= ``time_min`` [min], as
    "R60"; None where no listed period covers it (above 240 min, +inf) or there is no time (NaN).

    >>> period_covering(59.99), period_covering(60.0), period_covering(60.01), period_covering(240.5)
    ('R60', 'R60', 'R90', None)
    """
    t = float(time_min)
    if math.isnan(t):
        return None
    if t < 0:
        raise InputError("time_min", time_min, "a time >= 0 [min]")
    for p in STANDARD_PERIODS_MIN:
        if t <= p:
            return f"R{p}"
    return None


def annual_exceedance_probability(conditional_probability, floor_area_m2: float, ignition_rate_per_m2_year: float,
                                  suppression_failure_probability: float):
    """Annual probability that a fire exceeds, from the probability given a fully developed fire.

    rate = ignition_rate_per_m2_year x A_f x suppression_failure_probability x P(exceed | fire)
    [1/year], fires arriving as a Poisson process: P_year = 1 - exp(-rate) (about the rate when it
    is small). Common practice, no source; the Poisson step is a hand derivation.

    Hand calculation: rate = 1e-6 x 240 x 0.02 x 0.1 = 4.8e-7; 1 - exp(-4.8e-7) = 4.8e-7 - (4.8e-7)^2 / 2
    = 4.79999885e-7:

    >>> f"{annual_exceedance_probability(0.1, 240.0, 1e-6, 0.02):.8e}"
    '4.79999885e-07'

    """
    p = np.asarray(conditional_probability, dtype=float)
    if np.any(~((p >= 0) & (p <= 1))):
        raise InputError("conditional probability", conditional_probability, "between 0 and 1")
    if not floor_area_m2 > 0:
        raise InputError("compartment.floor_area_m2", floor_area_m2, "must be > 0 [m2]")
    if not ignition_rate_per_m2_year > 0:
        raise InputError("variability.ignition_rate_per_m2_year", ignition_rate_per_m2_year, "must be > 0")
    if not 0.0 <= suppression_failure_probability <= 1.0:
        raise InputError("variability.suppression_failure_probability", suppression_failure_probability,
                         "must lie between 0 and 1")
    rate = ignition_rate_per_m2_year * floor_area_m2 * suppression_failure_probability * p
    out = -np.expm1(-rate)
    return float(out) if out.ndim == 0 else out
