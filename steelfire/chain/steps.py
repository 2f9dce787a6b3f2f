"""Is a verdict within the numerical error? Each member run again at half the time step.

The explicit steps of EN 1993-1-2 eq (4.25) and (4.27) are first order: a result at step dt has an error
e(dt) ~ C dt, so its change at dt/2 is about e(dt)/2, and 2 |r(dt) - r(dt/2)| estimates the error of the
result (Richardson's extrapolation for a first-order method). A member whose margin (critical temperature
minus peak) is smaller than that estimate, or whose time to critical under the standard fire is closer to
its required period than the estimate for that time, is marked ``marginal``: its verdict depends on the
time step.
Members whose verdict rests on the conduction model take that model's own refinement change instead
(its cells and substeps are refined until the steel temperature changes by less than 0.5 C).
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from steelfire.chain import fires, thermal
from steelfire.models.fire import nominal

#: The error estimate of a first-order result from its change at half the step: e(dt) = 2 (r(dt) - r(dt/2)).
RICHARDSON_FIRST_ORDER = 2.0
#: The standard-fire time to critical is checked at half the step where it lies within this of the
#: required period [min]; farther away no step could change that verdict.
TIME_CHECK_WITHIN_MIN = 10.0


@dataclass
class Sensitivity:
    """Per member: the error estimate of the peak [C] and of the time to critical [min] from half the step
    (NaN where not computed), whether the verdict is within it, and the warnings."""

    peak_C: np.ndarray
    time_min: np.ndarray
    marginal: list
    warnings: list = field(default_factory=list)


def halved(time_s):
    """The grid with a point added in the middle of every step (key times kept)."""
    t = np.asarray(time_s, dtype=float)
    return np.sort(np.concatenate([t, 0.5 * (t[1:] + t[:-1])]))


def sensitivity(case, fire, exposures, cols, crit, lumped_peak, peak, cross, two, judged_at, required_s):
    """:class:`Sensitivity` of every member (see the module notes)."""
    from steelfire.chain.verdicts import names_text

    code = case.code
    n = len(case.members)
    t2 = halved(exposures.time_s)
    if exposures.labels is not None:
        ex = fire.exposure(t2)
        ex2 = thermal.Exposures(t2, ex.gas_C, ex.member_columns, ex.column_labels)
    else:
        ex2 = thermal.Exposures.uniform(t2, fire.gas_temperature_C(t2), n)
    query = None
    if np.any(judged_at):
        query = np.unique(np.searchsorted(t2, required_s[judged_at] - 1e-6))
    r2, _ = ex2.run(code, cols, alpha_c=fire.alpha_c, nominal_fire=fire.nominal, query_idx=query)
    peak2 = r2.peak_C.copy()
    if query is not None:
        at = np.searchsorted(query, np.searchsorted(t2, required_s[judged_at] - 1e-6))
        peak2[judged_at] = r2.at_query_C[judged_at, at]
    change = RICHARDSON_FIRST_ORDER * np.abs(lumped_peak - peak2)
    governs = two.governs if two.governs is not None else np.zeros(n, dtype=bool)
    change = np.where(governs, two.refinement_change_C, change)

    # the standard-fire time to critical, where it is close to the required period
    time_change = np.full(n, np.nan)
    near = np.flatnonzero(~np.isnan(required_s) & ~np.isnan(cross)
                          & (np.abs(cross - required_s) < TIME_CHECK_WITHIN_MIN * 60.0))
    if len(near):
        ts2 = halved(fires.standard_fire(case, case.analysis.standard_horizon_min)[0])
        rows = cols.rows(alpha_c=code["alpha_c_standard"], nominal_fire=True, select=near, thresholds_C=crit[near])
        c2 = thermal.run(code, ts2, nominal.standard_fire(ts2), rows)
        time_change[near] = RICHARDSON_FIRST_ORDER * np.abs(cross[near] - c2.crossing_time_s) / 60.0
    margin = crit - peak
    marginal_peak = np.abs(margin) < change
    marginal_time = np.abs(cross - required_s) / 60.0 < time_change
    marginal = [bool(a or b) for a, b in zip(marginal_peak, marginal_time)]
    warnings = []
    names = [m.name for m, f in zip(case.members, marginal) if f]
    if names:
        warnings.append(
            f"Verdict within the numerical error for {names_text(names)}: the margin (or the standard-fire time to "
            "critical against the required period) is smaller than the error estimated from a run at half the time "
            "step (step_sensitivity_C, step_sensitivity_min). Run with a smaller time_step_s before relying on it.")
    return Sensitivity(change, time_change, marginal, warnings)
