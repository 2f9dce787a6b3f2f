"""The case's design fire (through the fire-model registry) and the time grids the members are run on."""

from __future__ import annotations

import math

import numpy as np

from steelfire.models import fire as fire_models
from steelfire.models.fire import nominal
from steelfire.models.fire.compartment import fire_severity
from steelfire.models.fire.design import DesignFire, FireSetup


def severity(case) -> dict | None:
    """The compartment's fire-severity values (O, b, q_f,d, q_t,d, ...), or None without a compartment
    and a fire load."""
    if case.compartment is None or case.fire_load is None:
        return None
    return fire_severity(case.compartment, case.fire_load, case.code)


def design_fire(case) -> DesignFire:
    """The case's design fire: the model its ``[fire] curve`` names (:data:`steelfire.models.fire.MODELS`),
    with the compartment's severity values added where the case has them (time equivalence needs them
    whatever the curve)."""
    sev = severity(case)
    spec = case.fire
    setup = FireSetup(curve=spec.curve, duration_min=spec.duration_min, code=case.code,
                      convection_coefficient=spec.convection_coefficient,
                      allow_out_of_scope=case.analysis.allow_out_of_scope, compartment=case.compartment,
                      fire_load=case.fire_load, severity=sev, table=spec.table, options=spec.options,
                      heat_release=spec.heat_release, positions=tuple(m.position for m in case.members),
                      emissivity_resultant=case.code["configuration_factor"] * case.code["emissivity_steel"]
                      * case.code["emissivity_fire"])
    fire = fire_models.design_fire(setup)
    if sev is not None:
        from steelfire.models.fire.compartment import SEVERITY_QUANTITIES

        have = {q.key for q in fire.quantities}
        extra = tuple(q for q in SEVERITY_QUANTITIES if q.key not in have)
        fire.quantities = extra + tuple(fire.quantities)
        fire.values = {**{q.key: sev[q.key] for q in extra}, **fire.values}
        if sev["area_factor"] is not None and case.compartment.floor_area_m2 > 10000.0:
            fire.warnings.insert(0, f"Floor area {case.compartment.floor_area_m2:g} m2 is beyond the last row of "
                                 "EN 1991-1-2 Table E.1 (10 000 m2): delta_q1 is held at that row's value, which "
                                 "may be low.")
    return fire


def standard_fire(case, horizon_min: float):
    """(time grid [s], gas temperature [C]) of the ISO 834 standard fire (EN 1991-1-2 3.2.1) up to
    ``horizon_min`` at the case's time step."""
    t = time_grid(horizon_min * 60.0, case.analysis.time_step_s)
    return t, nominal.standard_fire(t)


def time_grid(duration_s: float, step_s: float, key_times_s=()) -> np.ndarray:
    """A grid 0, step, 2 step, ... up to ``duration_s``, with the key times (t_max, ...) put on it."""
    n = int(math.floor(duration_s / step_s + 1e-9))
    t = np.arange(n + 1) * step_s
    extra = [k for k in key_times_s if 0.0 < k < duration_s]
    t = np.unique(np.concatenate([t, np.array(extra, dtype=float), [duration_s]]))
    keep = np.concatenate([[True], np.diff(t) > 1e-6])
    return t[keep]
