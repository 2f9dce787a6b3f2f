"""Member verdicts: critical temperatures, time equivalence beside the direct check, and the warnings.

No physics lives here: the formulas are in the model modules; this module applies them to the schedule
by column and words what a checking engineer needs to know.
"""

from __future__ import annotations

import numpy as np

from steelfire.models import equivalence as eq
from steelfire.models import steel
from steelfire.results import VERDICT_BITS, EquivalenceColumns

#: A route is flagged unconservative when its equivalent time is more than this fraction below the direct one.
UNCONSERVATIVE_FRACTION = 0.10


def names_text(names, most=8):
    """Member names for a warning: the first ``most``, then how many more."""
    names = list(names)
    if len(names) <= most:
        return ", ".join(names)
    return ", ".join(names[:most]) + f" and {len(names) - most} more"


def critical_temperatures(members, code=None, allow_out_of_scope=False, labels=None):
    """Critical temperatures theta_a,cr [C] of ``members``: (array, source per member, resistance entry per
    member or None).

    Given by the user (``critical_temperature_C``, source "given"); EN 1993-1-2 eq (4.22) from the degree of
    utilisation (members without instability); or from the member's resistance in fire, EN 1993-1-2 4.2.3
    (:func:`steelfire.models.resistance.critical_temperatures`, all such members at once). A member that
    cannot carry its design effect even at 20 C (mu0 >= 1) takes 20 C: it fails whatever the fire.
    """
    from steelfire.codevalues import DEFAULTS

    code = DEFAULTS if code is None else code
    n = len(members)
    crit = np.empty(n)
    source = [None] * n
    resistance = [None] * n
    by_mu = {}
    design_idx = []
    for i, m in enumerate(members):
        if m.critical_temperature_C is not None:
            crit[i], source[i] = m.critical_temperature_C, "given"
        elif m.design is not None:
            design_idx.append(i)
        else:
            mu = m.utilisation
            if mu not in by_mu:
                by_mu[mu] = steel.critical_temperature(mu)
            crit[i], source[i] = by_mu[mu], "EN 1993-1-2 eq (4.22)"
    if design_idx:
        from steelfire.models import resistance as res

        sub = [members[i] for i in design_idx]
        rows = [{**m.design, "section": m.geometry} for m in sub]
        where = [labels(i) if labels is not None else f"member[{i + 1}] ({members[i].name})" for i in design_idx]
        r = res.critical_temperatures(res.MemberDesign.from_members(rows, where), code,
                                      allow_out_of_scope=allow_out_of_scope)
        for j, i in enumerate(design_idx):
            entry = r.member(j)
            resistance[i] = entry
            if entry["fails_at_20C"]:
                crit[i] = 20.0
                source[i] = (f"fails at 20 C: mu0 = {entry['utilisation']:.3g} >= 1 by {entry['clause']}")
            else:
                crit[i] = entry["critical_temperature_C"]
                source[i] = entry["clause"]
    return crit, source, resistance


def equivalence(case, fire, severity, members, equal_time_s, critical_time_s, warnings):
    """Time equivalence by EN 1991-1-2 Annex F, the CIB W14 formula and equal steel temperature.

    Returns (factors dict or None, :class:`EquivalenceColumns`). Annex F and CIB W14 need the compartment
    and the fire load (``severity``) and a fire they may be set beside (``fire.equivalence`` None);
    otherwise they are null with the reason in ``warnings``. The direct route is the time at which the
    member, under the standard fire, reaches the peak it reaches in the design fire (``equal_time_s``,
    NaN if not within the standard horizon).
    """
    horizon = case.analysis.standard_horizon_min
    annex_f, cib, factors = {}, None, None
    if severity is not None and fire.equivalence is None:
        c = case.compartment
        common = dict(design_fire_load_MJ_m2=severity["design_fire_load_MJ_m2"], floor_area_m2=c.floor_area_m2,
                      vertical_opening_area_m2=severity["vertical_opening_area_m2"],
                      thermal_inertia=severity["thermal_inertia"], code=case.code)
        for prot in sorted({m.protection is not None for m in members}, reverse=True):
            annex_f[prot] = eq.annex_f_time_equivalence(
                height_m=c.height_m, roof_opening_area_m2=c.roof_opening_area_m2, protected=prot,
                opening_factor_m05=severity["opening_factor_m05"], total_area_m2=c.boundary_area_m2,
                opening_height_m=severity["opening_height_m"], **common)
        cib = eq.cib_w14_time_equivalence(total_area_m2=c.boundary_area_m2,
                                          opening_height_m=severity["opening_height_m"], protected=True,
                                          roof_opening_area_m2=c.roof_opening_area_m2, height_m=c.height_m, **common)
        for w in dict.fromkeys(w for res in [*annex_f.values(), cib] for w in res.warnings):
            warnings.append(w)
        if c.roof_opening_area_m2 > 0 and case.fire.curve == "parametric":
            warnings.append("The Annex A parametric fire does not cover horizontal (roof) openings; Annex F does "
                            f"(alpha_h = {c.roof_opening_area_m2 / c.floor_area_m2:.4g}).")

        def strip(d):
            return {k: v for k, v in d.items() if k not in ("code_values", "warnings")}

        factors = {"annex_f_protected": strip(annex_f[True].to_dict()) if True in annex_f else None,
                   "annex_f_bare": strip(annex_f[False].to_dict()) if False in annex_f else None,
                   "cib_w14": strip(cib.to_dict())}
    elif fire.equivalence is not None:
        warnings.append(f"Time equivalence by Annex F and CIB W14 is not applicable: {fire.equivalence} "
                        "Only the equal-steel-temperature route is given.")
    else:
        warnings.append("Time equivalence by Annex F and CIB W14 needs [compartment] and [fire_load]; "
                        "only the equal-steel-temperature route is given.")
    if cib is not None and any(m.protection is None for m in members):
        warnings.append("CIB W14 is derived for protected (insulated) members: null for the bare members.")
    out = _columns(members, annex_f, cib, equal_time_s, critical_time_s, horizon)
    flagged = [members[i].name for i in np.flatnonzero(out.unconservative_any())]
    if flagged:
        warnings.append(
            f"Time equivalence more than {UNCONSERVATIVE_FRACTION:.0%} below the direct (equal steel temperature) "
            f"answer, i.e. unconservative, for {names_text(flagged)}: see each member's 'unconservative' routes.")
    beyond = [members[i].name for i in np.flatnonzero(np.isnan(out.equal_temperature_min))]
    if beyond:
        warnings.append(
            f"Equal-temperature equivalence beyond the standard-fire horizon ({horizon:g} min) for {names_text(beyond)}: "
            "the design-fire peak is not reached within it (null; compared as at least the horizon).")
    return factors, out


def _verdict_of(bits: dict):
    """(unconservative routes, resists pairs, meets_required pairs or None) of one verdict code's bits."""
    routes = [r for r in ("annex_f", "cib_w14", "equal_temperature") if bits["has_" + r]]
    uncons = tuple(r for r in ("annex_f", "cib_w14") if bits["uncons_" + r])
    resists = tuple((r, bits["resists_" + r]) for r in routes)
    meets = None
    if bits["has_required"]:
        meets = [(r, bits["meets_" + r]) for r in routes]
        if not bits["has_equal_temperature"] and bits["meets_equal_temperature_given"]:
            meets.append(("equal_temperature", False))
        meets = tuple(meets)
    return uncons, resists, meets


def _columns(members, annex_f, cib, equal_time_s, critical_time_s, horizon) -> EquivalenceColumns:
    """The members' equivalence entries by column: the routes' times, which are unconservative, whether
    each stays within the required period (``meets_required``) and whether the member's own standard-fire
    time to critical reaches it (``resists``, the check t_fi,d >= t_e,d). NaN stands for null and
    compares false; each member's verdicts are packed into one code (bits :data:`VERDICT_BITS`)."""
    n = len(members)
    prot = np.fromiter((m.protection is not None for m in members), dtype=bool, count=n)
    nan = float("nan")

    def group(value_of):  # a per-group value (protected, bare) as a column, NaN where null
        v_p, v_b = value_of(True), value_of(False)
        return np.where(prot, nan if v_p is None else v_p, nan if v_b is None else v_b)

    a = group(lambda p: annex_f[p].t_e_min if p in annex_f else None)
    w = group(lambda p: cib.t_e_min if (cib is not None and p) else None)
    kc = group(lambda p: annex_f[p].k_c if p in annex_f else None)
    small = group(lambda p: annex_f[p].small_compartment.t_e_min
                  if p in annex_f and annex_f[p].small_compartment is not None else None)
    d = np.asarray(equal_time_s, dtype=float) / 60.0
    t_fi = np.asarray(critical_time_s, dtype=float) / 60.0
    req = np.fromiter((nan if m.required_minutes is None else m.required_minutes for m in members),
                      dtype=float, count=n)
    direct = np.where(np.isnan(d), horizon, d)  # null: beyond the horizon, so at least the horizon
    limit = (1.0 - UNCONSERVATIVE_FRACTION) * direct
    no_t_fi = np.isnan(t_fi)
    bits = {
        "has_annex_f": ~np.isnan(a), "has_cib_w14": ~np.isnan(w), "has_equal_temperature": ~np.isnan(d),
        "uncons_annex_f": a < limit, "uncons_cib_w14": w < limit,
        "has_required": ~np.isnan(req),
        "meets_annex_f": a <= req + 1e-9, "meets_cib_w14": w <= req + 1e-9, "meets_equal_temperature": d <= req + 1e-9,
        # beyond the horizon, the equal-temperature time exceeds any period within it
        "meets_equal_temperature_given": req <= horizon,
        "resists_annex_f": no_t_fi | (t_fi >= a - 1e-9), "resists_cib_w14": no_t_fi | (t_fi >= w - 1e-9),
        "resists_equal_temperature": no_t_fi | (t_fi >= d - 1e-9),
    }
    packed = np.zeros(n, dtype=np.int64)
    for k, name in enumerate(VERDICT_BITS):
        packed |= bits[name].astype(np.int64) << k
    distinct, code = np.unique(packed, return_inverse=True)
    verdicts = [_verdict_of({name: bool((int(v) >> k) & 1) for k, name in enumerate(VERDICT_BITS)})
                for v in distinct.tolist()]
    return EquivalenceColumns(a, w, d, kc, small, code.reshape(-1).astype(np.int64), verdicts)


#: The steel is taken as still heating at the end of the run where its last step raised it by more than this [C].
STILL_HEATING_C = 1e-9


def member_warnings(case, fire, cols, peak, last, rising):
    """Warnings about the members: assessed ranges of their protection, shadow factors that differ
    between the design and the standard fire, eq (4.22) used where it does not hold, steel still heating
    at the end of the fire, a burnout peak that rises with thickness (``rising``: those members' names)."""
    from steelfire.models.protection import assessment_warnings

    members = case.members
    out = []
    assessed = {name for name, mt in case.materials.items()
                if mt.assessed_thickness_mm or mt.assessed_section_factor_per_m
                or mt.assessed_max_steel_temperature_C is not None or mt.assessed_fire == "standard"}
    for i, m in enumerate(members):
        if m.protection in assessed:
            out += assessment_warnings(case.materials[m.protection], m.name, m.thickness_mm, m.section_factor_per_m,
                                       float(peak[i]), fire.cools)
    # property tables and formulas used beyond their ends
    beyond = {}
    for i, m in enumerate(members):
        if m.protection is None:
            continue
        tab = case.materials[m.protection].conductivity_table
        if len(tab) > 1 and float(peak[i]) > tab[-1][0] + 1.0:
            beyond.setdefault(m.protection, []).append((m.name, float(peak[i]), tab[-1][0]))
    for mat, rows in beyond.items():
        top = max(r[1] for r in rows)
        out.append(f"Conductivity table of {mat} ends at {rows[0][2]:g} C; its last value is held up to {top:.0f} C "
                   f"for {names_text(r[0] for r in rows)} (steel beyond the table).")
    hot = [m.name for m, p in zip(members, peak) if p > 1200.0]
    if hot:
        out.append(f"Steel above 1200 C for {names_text(hot)}: EN 1993-1-2 eq (3.2) stops there; c_a is held at 650 "
                   "J/(kg K) beyond (results beyond the clause's range).")
    uncredited = sorted({m.protection for m in members if m.protection is not None
                         and case.materials[m.protection].moisture_percent > 0
                         and case.materials[m.protection].moisture_delay_basis != "tests"})
    if uncredited:
        out.append(f"Moisture delay not credited for {', '.join(uncredited)}: EN 1993-1-2 4.2.5.2(2) takes it from tests "
                   "to EN 13381-4; set moisture_delay_basis = \"tests\" for a material whose assessment gives it.")
    mixed = [m.name for m in members if m.protection is None and m.i_section]
    if mixed and not fire.nominal:
        out.append(f"Shadow factor for {names_text(mixed)}: eq (4.26b) in the design fire, eq (4.26a) (0.9 times) "
                   "under the standard fire (EN 1993-1-2 4.2.5.1(2)); the standard-fire times, and the "
                   "equal-temperature equivalence, carry that difference.")
    given = [m.name for m in members if m.critical_temperature_C is not None and m.unstable]
    if given:
        out.append(f"Critical temperature given by the user (not checked by steelfire) for {names_text(given)}: "
                   "it must come from the member's buckling resistance (EN 1993-1-2 4.2.3).")
    if fire.cools:
        heating = [m.name for m, d in zip(members, last) if d > STILL_HEATING_C]
        if heating:
            out.append(
                f"Steel still heating at the end of the design fire (duration_min = {case.fire.duration_min:g}) "
                f"for {names_text(heating)}: the true peak comes later; extend fire.duration_min.")
        if rising:
            out.append(
                f"Burnout peak rises with thickness for {names_text(rising)}: 10 % more protection gives a hotter "
                "peak in the cooling phase under EN 1993-1-2 eq (4.27) (its (e^(phi/10) - 1) term adds heat "
                "as the gas cools). A property of the published equation; check such members with a more "
                "detailed model and do not rely on 'thicker is cooler' here.")
    return out
