"""The analysis chain: case -> design fire -> thermal runs -> member verdicts (and, in sizing, thicknesses).

No physics lives here: it calls the fire, heat and verdict modules and gathers their results by column.
"""

from __future__ import annotations

import numpy as np

from steelfire.chain import fires, protected, steps, thermal, verdicts
from steelfire.errors import InputError, OutOfScopeError
from steelfire.results import AnalysisResult, FireResult, MemberResults, MemberTable

CAUTIONS = (
    "Simplified code methods (EN 1991-1-2, EN 1993-1-2) with validity limits; Annexes A, E and F are informative.",
    "Results must be verified by a competent fire engineer before use.",
    "National annexes, local codes and the approving authority prevail over the values used here.",
    "Protection products must be used within their own assessed ranges (thickness, section factor, temperature, fire exposure).",
)
CAUTIONS_LINE = ("CAUTION: simplified code methods within their validity limits; verify by a competent fire "
                 "engineer; national annexes, local codes and the approving authority prevail; use protection "
                 "products only within their assessed ranges.")

#: Relative thickness increase used to detect a burnout peak that rises with thickness.
THICKNESS_PROBE = 0.10
#: Budgets checked before any work: member-steps of one run (about a minute of kernel time on a 2-core
#: machine), and values of the steel-temperature histories kept for --out (the history array and
#: histories.csv: some hundreds of MB).
MAX_MEMBER_STEPS = 1e10
MAX_HISTORY_VALUES = 2e7


def check_budget(case, n_grid, n_rows, n_std, histories):
    """Refuse a run that would exceed the budgets above, with the figure and the ways out."""
    from steelfire.errors import BudgetError

    steps = float(n_grid) * n_rows * 2 + float(n_std) * 2 * len(case.members)
    if steps > MAX_MEMBER_STEPS:
        raise BudgetError("analysis.time_step_s", case.analysis.time_step_s,
                          f"{steps:.3g} member-steps exceed the limit of {MAX_MEMBER_STEPS:.0e}: use a larger time step, "
                          "a shorter duration or standard horizon, or split the schedule")
    if histories and float(n_grid) * n_rows > MAX_HISTORY_VALUES:
        raise BudgetError("--out", f"{len(case.members)} members x {n_grid} steps",
                          f"{float(n_grid) * n_rows:.3g} history values exceed the limit of {MAX_HISTORY_VALUES:.0e}: use "
                          "--no-histories, a larger time step, or split the schedule")


def analyse(case, histories: bool = True) -> AnalysisResult:
    """Run a case: design fire, steel temperatures, verdicts, warnings.

    ``histories`` keeps each member's steel temperature on the design-fire grid
    (``MemberResult.steel_temperature_C``); turn it off for very large schedules.
    """
    code = case.code
    members = case.members
    for i, m in enumerate(members):
        if m.protection is not None and m.thickness_mm is None:
            raise InputError(f"{case.label(i)}.thickness_mm", None,
                             "is missing; the check needs it (steelfire size computes it)")
    fire = fires.design_fire(case)
    sev = fires.severity(case)
    warnings = list(fire.warnings)
    required_s = np.array([np.nan if m.required_minutes is None else m.required_minutes * 60.0 for m in members])
    judged_at = ~np.isnan(required_s) if fire.nominal else np.zeros(len(members), dtype=bool)
    duration_s = case.fire.duration_min * 60.0
    if np.any(judged_at):   # a nominal fire: each member is judged at its own required period
        duration_s = max(duration_s, float(np.nanmax(required_s)))
    t = fires.time_grid(duration_s, case.analysis.time_step_s,
                        tuple(fire.key_times_s) + tuple(required_s[judged_at]))
    if fire.exposure is not None:   # a fire that differs from member to member
        ex = fire.exposure(t)
        exposures = thermal.Exposures(t, ex.gas_C, ex.member_columns, ex.column_labels)
        g = exposures.gas_C.max(axis=1)
    else:
        g = np.asarray(fire.gas_temperature_C(t), dtype=float)
        exposures = thermal.Exposures.uniform(t, g, len(members))
    i_peak = int(np.argmax(g))
    ts_n = int(case.analysis.standard_horizon_min * 60.0 / case.analysis.time_step_s) + 1
    check_budget(case, len(t), sum(len(c) for c in exposures.member_columns), ts_n, histories)
    crit, source, resistance = verdicts.critical_temperatures(members, code, case.analysis.allow_out_of_scope,
                                                              case.label)

    cols = thermal.MemberColumns(case)
    ts, gs = fires.standard_fire(case, case.analysis.standard_horizon_min)
    alpha_std = code["alpha_c_standard"]
    thermal.check_bare_step(case, cols, [(t, g, fire.alpha_c, fire.nominal, "design fire"),
                                         (ts, gs, alpha_std, True, "standard fire of the times to critical")])
    query = np.unique(np.searchsorted(t, required_s[judged_at] - 1e-6)) if np.any(judged_at) else None
    design, governing = exposures.run(code, cols, keep_history=histories, alpha_c=fire.alpha_c,
                                      nominal_fire=fire.nominal, query_idx=query)
    peak = design.peak_C.copy()
    peak_time_s = design.peak_time_s.copy()
    last = design.last_increment_C.copy()
    history = design.history_C.copy() if histories else None
    if query is not None:   # the steel temperature at the required period (heating only: the largest so far)
        at = np.searchsorted(query, np.searchsorted(t, required_s[judged_at] - 1e-6))
        peak[judged_at] = design.at_query_C[judged_at, at]
        peak_time_s[judged_at] = t[query[at]]
    lumped_peak = peak.copy()
    governing = np.array(governing, dtype=np.int64)
    # protected members by the conduction model beside eq (4.27); it governs where eq (4.27) breaks the
    # second law or where the case asks for it (chain.protected)
    two, notes = protected.run_both(case, fire, exposures, cols, crit, design, peak, peak_time_s, last, history,
                                    judged_at, query, governing)
    warnings += notes
    # the standard fire (EN 1991-1-2 3.2.1) for times to critical and for the equal-steel-temperature
    # equivalence: when the same member reaches its design-fire peak (each member twice, one threshold each)
    n = len(members)
    std_rows = cols.rows(alpha_c=alpha_std, nominal_fire=True, select=np.concatenate([np.arange(n)] * 2),
                         thresholds_C=np.concatenate([crit, peak]))
    std_run = thermal.run(code, ts, gs, std_rows)
    cross2 = std_run.crossing_time_s
    cross, equal_t = cross2[:n], cross2[n:]
    for what, values in (("design fire", peak), ("standard fire", std_run.peak_C)):
        bad = np.flatnonzero(~np.isfinite(values) | (values > 1e4))
        if len(bad):
            i = int(bad[0]) % n
            raise InputError(f"{case.label(i)}.section_factor_per_m", members[i].section_factor_per_m,
                             f"gives a steel temperature that diverges in the {what} (not finite or above 10 000 C): "
                             "check the [code] values and the time step")
    factors, equiv = verdicts.equivalence(case, fire, sev, members, equal_t, cross, warnings)

    rising = []
    if fire.cools and np.any(~cols.bare):
        prot = np.flatnonzero(~cols.bare)
        thick, _ = exposures.run(code, cols, select=prot, alpha_c=fire.alpha_c, nominal_fire=fire.nominal,
                                 thickness_mm=cols.thickness_mm[prot] * (1.0 + THICKNESS_PROBE))
        rising = [members[i].name for i in prot[thick.peak_C > lumped_peak[prot] + 0.01]]
    warnings += verdicts.member_warnings(case, fire, cols, peak, last, rising)
    oos = list(fire.out_of_scope)
    # a resistance computed outside its method's range (allow_out_of_scope): stamped as the fire's findings are
    oos += [f"OUT OF SCOPE: {m.name}: resistance {note[len('out of scope: '):]}" for m, entry in zip(members, resistance)
            if entry for note in entry.get("notes") or [] if note.startswith("out of scope: ")]
    if fire.cools:   # a pass whose steel still heats at the end of the run is not established: its peak comes later
        open_ = [m.name for m, d, p_, c in zip(members, last, peak, crit) if d > verdicts.STILL_HEATING_C and p_ <= c]
        if open_:
            allowed = (f"long enough for every member's peak: the steel of {verdicts.names_text(open_)} still heats at "
                       "the end and passes so far (its true peak comes later); give a longer duration")
            if not case.analysis.allow_out_of_scope:
                raise OutOfScopeError("fire.duration_min", case.fire.duration_min,
                                      allowed + " (set analysis.allow_out_of_scope = true to compute anyway)")
            oos.append(f"OUT OF SCOPE: fire.duration_min = {case.fire.duration_min:g}; {allowed}")
    sens = steps.sensitivity(case, fire, exposures, cols, crit, lumped_peak, peak, cross, two, judged_at, required_s)
    warnings += sens.warnings

    nominal = fire.nominal
    details = member_details(case, cols, peak, nominal)
    resistance_curves(case, resistance, crit - peak)
    table = MemberTable(
        {"name": [m.name for m in members], "kind": [m.kind for m in members],
         "section_factor_per_m": cols.section_factor_per_m, "protection": [m.protection for m in members],
         "thickness_mm": [m.thickness_mm for m in members], "critical_temperature_C": crit,
         "critical_temperature_source": source, "peak_steel_temperature_C": peak,
         "time_of_peak_steel_min": peak_time_s / 60.0,
         "standard_fire_time_to_critical_min": cross / 60.0,  # NaN: not within the horizon
         "required_minutes": [m.required_minutes for m in members],
         "shadow_factor": [None if m.protection is not None else float(k)
                           for m, k in zip(members, cols.shadow_factor(nominal))],
         "utilisation": [m.utilisation for m in members],
         "section": [m.section for m in members], "exposure": [m.exposure for m in members],
         "encasement": [m.encasement for m in members], "resistance": resistance, "details": details,
         "governing_exposure": None if exposures.labels is None else [exposures.labels[k] for k in governing]},
        histories=history, equivalence=equiv,
        extras={"conduction_peak_C": two.conduction_peak_C, "model_difference_C": two.model_difference_C,
                "lumped_valid": two.lumped_valid, "verdict_model": two.verdict_model,
                "step_sensitivity_C": sens.peak_C, "step_sensitivity_min": sens.time_min, "marginal": sens.marginal})
    fr = FireResult(curve=case.fire.curve, duration_min=case.fire.duration_min, convection_coefficient=fire.alpha_c,
                    time_s=t, gas_temperature_C=g, peak_gas_temperature_C=float(g[i_peak]),
                    time_of_peak_gas_min=float(t[i_peak] / 60.0), values=dict(fire.values),
                    quantities=tuple(fire.quantities), equivalence_factors=factors, nominal=fire.nominal,
                    cools=fire.cools)
    fr.series = fire.series(t) if fire.series is not None else {}
    table.model_histories = two.histories
    fr.exposure_C = exposures.gas_C[:, governing] if (histories and exposures.labels is not None) else None
    return AnalysisResult(title=case.title, fire=fr, members=MemberResults(table), code_values=dict(code),
                          warnings=oos + warnings, out_of_scope=oos,
                          time_step_s=case.analysis.time_step_s,
                          standard_horizon_min=case.analysis.standard_horizon_min, cautions=CAUTIONS)


def member_details(case, cols, peak_C, nominal_fire):
    """Per member, the intermediate values a checker traces: for protected members phi of EN 1993-1-2
    eq (4.27) and lambda_p at the peak steel temperature, the moisture delay t_v; for bare members k_sh
    with the formula it came from; c_a at the peak (eq (3.2)); the loader's notes."""
    from steelfire.models import steel
    from steelfire.models.protection import moisture_delay_s

    code = case.code
    members = case.members
    c_a = steel.specific_heat(np.minimum(peak_C, 1200.0))
    m_rho, m_cp, m_moist, m_lam20, m_T, m_V, m_N = cols.materials
    k_sh = cols.shadow_factor(nominal_fire)
    # protected members, as columns: phi of eq (4.27), lambda_p at the peak (per material table), t_v
    prot = np.array([m.protected for m in members], dtype=bool)
    r_of = np.asarray(cols.material_row)
    phi = np.full(len(members), np.nan)
    lam = np.full(len(members), np.nan)
    delay_min = np.full(len(members), np.nan)
    if prot.any():
        ip = np.flatnonzero(prot)
        rp = r_of[ip]
        d_p = np.array([members[i].thickness_mm for i in ip]) * 1e-3
        am_v = np.array([members[i].section_factor_per_m for i in ip])
        phi[ip] = m_cp[rp] * m_rho[rp] * d_p * am_v / (c_a[ip] * code["steel_density_kg_m3"])
        delay_min[ip] = moisture_delay_s(m_moist[rp], m_rho[rp], d_p, m_lam20[rp]) / 60.0
        for r in np.unique(rp):
            at = ip[rp == r]
            n_k = m_N[r]
            lam[at] = np.interp(np.minimum(peak_C[at], 1200.0), m_T[r, :n_k], m_V[r, :n_k])
    out = []
    for i, m in enumerate(members):
        d = {"specific_heat_at_peak_J_kgK": float(c_a[i])}
        if m.protected:
            d["phi"] = float(phi[i])
            d["conductivity_W_mK"] = float(lam[i])
            d["moisture_delay_min"] = float(delay_min[i])
        else:
            d["shadow_factor"] = float(k_sh[i])
            if m.i_section and nominal_fire:
                formula = (f"eq (4.26a): k_sh = {code['shadow_factor_i_nominal']:g} [Am/V]b/[Am/V] = "
                           f"{code['shadow_factor_i_nominal']:g} x {m.shadow_ratio:.4g}")
            elif m.shadow_factor is not None or m.section is not None:
                formula = f"eq (4.26b): k_sh = [Am/V]b/[Am/V] = {m.shadow_ratio:.4g}"
            else:
                formula = "k_sh = 1 (no shadow effect taken; conservative)"
            d["shadow_factor_formula"] = formula + (" (ratio given)" if m.shadow_factor is not None else "")
        if m.notes:
            d["notes"] = list(m.notes)
        out.append(d)
    return out


#: How many members checked by resistance get their utilisation against temperature in the document
#: (those with the smallest margins), for the report's figure.
CURVE_MEMBERS = 6


def resistance_curves(case, resistance, margin_C):
    """Add to the resistance entries of the governing members (smallest margin) their utilisation
    E_fi,d / R_fi,d,theta against a uniform steel temperature 20-1200 C (EN 1993-1-2 4.2.3), in place."""
    from steelfire.models import resistance as res

    idx = [i for i, r in enumerate(resistance) if r is not None and not r["fails_at_20C"]]
    if not idx:
        return
    idx = sorted(idx, key=lambda i: margin_C[i])[:CURVE_MEMBERS]
    grid = np.arange(20.0, 1200.0 + 1e-9, 20.0)
    rows = [{**case.members[i].design, "section": case.members[i].geometry} for i in idx for _ in grid]
    util = res.resistances_at(res.MemberDesign.from_members(rows), np.tile(grid, len(idx)), case.code,
                              allow_out_of_scope=case.analysis.allow_out_of_scope).utilisation.reshape(len(idx), -1)
    for j, i in enumerate(idx):
        resistance[i]["utilisation_curve"] = {"temperature_C": grid.tolist(), "utilisation": util[j].tolist()}
