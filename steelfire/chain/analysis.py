"""The analysis chain: case model -> design fire -> steel temperatures -> member verdicts.

No physics lives here: it calls the fire, steel and heat modules and gathers their results.
"""

from __future__ import annotations

import dataclasses
import math

import numpy as np

from steelfire.models import heat, steel
from steelfire.inputs.case import Case, member_label
from steelfire.errors import InputError, OutOfScopeError
from steelfire.models.fire import compartment as comp
from steelfire.models.fire import fireload, nominal, parametric, tabulated
from steelfire.results import _VERDICT_BITS, AnalysisResult, EquivalenceColumns, FireResult, MemberResults, MemberTable

CAUTIONS = (
    "Simplified code methods (EN 1991-1-2, EN 1993-1-2) with validity limits; Annexes A, E and F are informative.",
    "Results must be verified by a competent fire engineer before use.",
    "National annexes, local codes and the approving authority prevail over the values used here.",
    "Protection products must be used within their own assessed ranges (thickness, section factor, temperature, fire exposure).",
)
CAUTIONS_LINE = ("CAUTION: simplified code methods within their validity limits; verify by a competent fire "
                 "engineer; national annexes, local codes and the approving authority prevail; use protection "
                 "products only within their assessed ranges.")

#: Band of (0.2e-3 q_t,d / O) / t_lim around 1 in which a warning names the regime jump.
REGIME_BAND = 0.1
#: Relative thickness increase used to detect a burnout peak that rises with thickness.
THICKNESS_PROBE = 0.10


def _names(names, most=8):
    names = list(names)
    if len(names) <= most:
        return ", ".join(names)
    return ", ".join(names[:most]) + f" and {len(names) - most} more"


class _Fire:
    """A design fire as a function of time, plus its intermediate values."""

    def __init__(self, curve, gas, key_times_s, result_fields, warnings, out_of_scope, alpha_c, cools):
        self.curve = curve
        self.gas = gas
        self.key_times_s = key_times_s
        self.fields = result_fields
        self.warnings = warnings
        self.out_of_scope = out_of_scope
        self.alpha_c = alpha_c
        self.cools = cools


def compartment_values(case: Case) -> dict:
    """O, h_eq, A_v, q_f,d, q_t,d, t_lim and b of the case's compartment (EN 1991-1-2 Annex A, E)."""
    c, fl, code = case.compartment, case.fire_load, case.code
    av = comp.vertical_opening_area(c.openings)
    heq = comp.opening_height(c.openings)
    o = comp.opening_factor(av, heq, c.boundary_area_m2)
    if fl.design_MJ_m2 is not None:
        dq1 = None
        qfd = fl.design_MJ_m2
    else:
        dq1 = fireload.area_factor(c.floor_area_m2, code) if fl.area_factor == "auto" else fl.area_factor
        qfd = fireload.design_fire_load(fl.characteristic_MJ_m2, fl.combustion_factor, dq1,
                                        fl.occupancy_factor, fl.measures_factor)
    qtd = comp.total_area_fire_load(qfd, c.floor_area_m2, c.boundary_area_m2)
    t_lim_h = fireload.fire_growth_t_lim_h(fl.growth, code)
    t_max_h = max(0.2e-3 * qtd / o, t_lim_h)
    if c.thermal_inertia is not None:
        b = c.thermal_inertia
    else:
        b = comp.weighted_thermal_inertia(c.surfaces, c.boundary_area_m2, av, t_max_h)
    return {"vertical_opening_area_m2": av, "opening_height_m": heq, "opening_factor_m05": o,
            "area_factor": dq1, "design_fire_load_MJ_m2": qfd, "total_area_fire_load_MJ_m2": qtd,
            "t_lim_h": t_lim_h, "thermal_inertia": b}


def design_fire(case: Case) -> _Fire:
    """The case's design fire: nominal curve (EN 1991-1-2 3.2), Annex A parametric fire, or a table."""
    code, spec = case.code, case.fire
    warnings, oos = [], []
    fields = {}
    if case.compartment is not None and case.fire_load is not None:
        cv = compartment_values(case)
        fields.update({k: cv[k] for k in ("vertical_opening_area_m2", "opening_height_m", "opening_factor_m05",
                                          "area_factor", "design_fire_load_MJ_m2", "total_area_fire_load_MJ_m2",
                                          "thermal_inertia")})
    key_times = []
    cools = False
    if case.compartment is not None and case.fire_load is not None and cv["area_factor"] is not None \
            and case.compartment.floor_area_m2 > 10000.0:
        warnings.append(f"Floor area {case.compartment.floor_area_m2:g} m2 is beyond the last row of EN 1991-1-2 "
                        "Table E.1 (10 000 m2): delta_q1 is held at that row's value, which may be low.")
    if spec.curve == "parametric":
        c = case.compartment
        violations = parametric.scope_violations(
            cv["opening_factor_m05"], cv["thermal_inertia"], cv["total_area_fire_load_MJ_m2"],
            c.floor_area_m2, c.height_m, c.roof_opening_area_m2, code)
        for f, v, allowed in violations:
            if not case.analysis.allow_out_of_scope:
                raise OutOfScopeError(f, v, allowed + " (set analysis.allow_out_of_scope = true to compute anyway)")
            oos.append(f"OUT OF SCOPE of EN 1991-1-2 Annex A: {f} = {v!r}; {allowed}")
        pf = parametric.parametric_fire(cv["opening_factor_m05"], cv["thermal_inertia"],
                                        cv["total_area_fire_load_MJ_m2"], cv["t_lim_h"])
        gas = pf.gas_temperature
        key_times = [pf.t_max_s, pf.burnout_time_s]
        cools = True
        fields.update(gamma=pf.gamma, gamma_lim=pf.gamma_lim, k_factor=pf.k_factor, t_lim_min=pf.t_lim_h * 60.0,
                      t_max_min=pf.t_max_h * 60.0, regime=pf.regime, x_factor=pf.x_factor,
                      cooling_rate_C_h=pf.cooling_rate_C_h, burnout_time_min=pf.burnout_time_h * 60.0)
        ratio = pf.regime_ratio
        if abs(ratio - 1.0) <= REGIME_BAND:
            warnings.append(
                f"Annex A regime boundary: (0.2e-3 q_t,d / O) / t_lim = {ratio:.3f} is within 10 % of 1; "
                f"the fire is {pf.regime}-controlled, and across the boundary the peak gas temperature jumps "
                "(O_lim = O/2 there, so Gamma_lim = Gamma/4), as published. Check the sensitivity to q_t,d and O.")
        if pf.burnout_time_s > spec.duration_min * 60.0:
            warnings.append(
                f"The parametric fire has not burnt out at duration_min = {spec.duration_min:g} min "
                f"(gas back at 20 C at {pf.burnout_time_h * 60:.1f} min): the cooling phase is cut short.")
        alpha_c = code["alpha_c_natural"]
        warnings.append("Annex A parametric fire: mainly cellulosic fire loads only (EN 1991-1-2 Annex A (2)).")
    elif spec.curve == "table":
        tf = tabulated.read_curve_csv(spec.file)
        if spec.duration_min * 60.0 > tf.time_s[-1] + 1e-9:
            raise InputError("fire.duration_min", spec.duration_min,
                             f"must not exceed the last time of {tf.source} ({tf.time_s[-1] / 60:g} min)")
        gas = tf.gas_temperature
        key_times = list(tf.time_s)
        cools = bool(np.any(np.diff(tf.temperature_C) < 0))
        fields["source_file"] = tf.source
        alpha_c = code["alpha_c_natural"]
    else:
        gas = nominal.NOMINAL_CURVES[spec.curve]
        alpha_c = code[f"alpha_c_{spec.curve}"]
    if spec.convection_coefficient is not None:
        alpha_c = spec.convection_coefficient
    return _Fire(spec.curve, gas, key_times, fields, warnings, oos, alpha_c, cools)


def time_grid(duration_s: float, step_s: float, key_times_s=()) -> np.ndarray:
    """A grid 0, step, 2 step, ... up to ``duration_s``, with the key times (t_max, ...) put on it."""
    n = int(math.floor(duration_s / step_s + 1e-9))
    t = np.arange(n + 1) * step_s
    extra = [k for k in key_times_s if 0.0 < k < duration_s]
    t = np.unique(np.concatenate([t, np.array(extra, dtype=float), [duration_s]]))
    keep = np.concatenate([[True], np.diff(t) > 1e-6])
    return t[keep]


def _critical_all(members):
    """(theta_a,cr [C], source) per member; eq (4.22) evaluated once per distinct utilisation."""
    by_mu = {}
    out = []
    for m in members:
        if m.critical_temperature_C is not None:
            out.append((m.critical_temperature_C, "given"))
        else:
            mu = m.utilisation
            if mu not in by_mu:
                by_mu[mu] = (steel.critical_temperature(mu), "EN 1993-1-2 eq (4.22)")
            out.append(by_mu[mu])
    return out


NOMINAL_CURVES = ("standard", "external", "hydrocarbon")


class MemberColumns:
    """The members' kernel inputs that do not depend on the fire, as arrays, built once per run.

    Materials are few and members many: each material's properties are set out once (one row per
    material, a last row standing in for bare members) and spread over the members by index.
    """

    def __init__(self, case: Case, members):
        n = len(members)
        names = sorted({m.protection for m in members if m.protection is not None})
        mats = [case.materials[nm] for nm in names]
        k = max([len(mt.conductivity_table) for mt in mats] + [1])
        n_mat = len(mats) + 1  # last row: a placeholder for bare members
        m_rho, m_cp, m_lam20 = np.ones(n_mat), np.ones(n_mat), np.ones(n_mat)
        m_moist = np.zeros(n_mat)
        m_T, m_V, m_N = np.zeros((n_mat, k)), np.ones((n_mat, k)), np.ones(n_mat, dtype=np.int64)
        for r, mt in enumerate(mats):
            m_rho[r], m_cp[r], m_moist[r], m_lam20[r] = mt.density, mt.specific_heat, mt.moisture_percent, \
                mt.conductivity_at_20C
            tab = mt.conductivity_table
            m_N[r] = len(tab)
            for j, (th, lam) in enumerate(tab):
                m_T[r, j], m_V[r, j] = th, lam
        row = {nm: r for r, nm in enumerate(names)}
        row[None] = n_mat - 1
        self.material_row = np.fromiter((row[m.protection] for m in members), dtype=np.int64, count=n)
        self.bare = self.material_row == n_mat - 1
        self.section_factor_per_m = np.fromiter((m.section_factor_per_m for m in members), dtype=float, count=n)
        self.shadow_factor_nominal = np.fromiter((m.shadow_factor_nominal for m in members), dtype=float, count=n)
        self.shadow_factor_natural = np.fromiter((m.shadow_factor_natural for m in members), dtype=float, count=n)
        self.thickness_mm = np.fromiter((1.0 if m.thickness_mm is None else m.thickness_mm for m in members),
                                        dtype=float, count=n)
        self._materials = (m_rho, m_cp, m_moist, m_lam20, m_T, m_V, m_N)

    def arrays(self, thickness_scale=1.0, nominal_fire=False, select=None):
        """Kernel input arrays (see :func:`steelfire.heat.batch`) for the members ``select`` (a
        boolean mask or indices; all if None); ``nominal_fire`` selects the shadow factor of
        EN 1993-1-2 eq (4.26a) (nominal fires) or (4.26b)."""
        sel = slice(None) if select is None else select
        idx, bare, sf = self.material_row[sel], self.bare[sel], self.section_factor_per_m[sel]
        ksh = (self.shadow_factor_nominal if nominal_fire else self.shadow_factor_natural)[sel]
        m_rho, m_cp, m_moist, m_lam20, m_T, m_V, m_N = self._materials
        d_p = np.where(bare, 1.0, self.thickness_mm[sel] * 1e-3 * thickness_scale)
        amv = np.where(bare, ksh * sf, sf)
        rho_p, c_p = m_rho[idx], m_cp[idx]
        moist, lam20 = m_moist[idx], m_lam20[idx]
        # moisture delay t_v = p rho_p d_p^2 / (5 lambda_p) [min] (steelfire.heat.moisture_delay_s)
        delay = np.where(moist > 0.0, 60.0 * moist * rho_p * d_p ** 2 / (5.0 * lam20), 0.0)
        return bare, amv, d_p, rho_p, c_p, m_T[idx], m_V[idx], m_N[idx], delay


def thermal_arrays(case: Case, members, thickness_scale=1.0, nominal_fire=False):
    """Kernel input arrays for ``members`` (see :func:`steelfire.heat.batch` and
    :meth:`MemberColumns.arrays`)."""
    return MemberColumns(case, members).arrays(thickness_scale, nominal_fire)


def bare_step_limit_per_m(time_s, gas_C, alpha_c, eps_res, rho_a) -> float:
    """Largest k_sh Am/V [1/m] for which eq (4.25) of EN 1993-1-2, stepped explicitly on ``time_s``,
    cannot carry bare steel past the gas temperature in one step.

    One step moves the steel by a (theta_g - theta_a) with
    a = k_sh (Am/V) dt (alpha_c + Phi eps sigma (T_g + T_a)(T_g^2 + T_a^2)) / (c_a(theta_a) rho_a)
    (h_net,d of EN 1991-1-2 eq (3.1)-(3.3) divided by theta_g - theta_a; T in K). With both
    temperatures within [20 C, the fire's hottest gas] a is largest at the hottest gas; the limit is
    the k_sh Am/V that makes its largest value 1 at the largest step (beyond 1 the history
    overshoots the gas, beyond 2 it diverges). c_a by EN 1993-1-2 eq (3.2), on a 1 C grid with the
    branch ends.
    """
    top = max(float(np.max(gas_C)), 20.0)
    theta = np.unique(np.concatenate([np.arange(20.0, top, 1.0), [600.0, 735.0, 900.0, top]]))
    theta = theta[theta <= top]
    t_a, t_g = theta + heat.KELVIN, top + heat.KELVIN
    h = alpha_c + eps_res * heat.STEFAN_BOLTZMANN * (t_g + t_a) * (t_g ** 2 + t_a ** 2)
    worst = float(np.max(h / (steel.specific_heat(theta) * rho_a)))
    dt = float(np.max(np.diff(time_s))) if len(time_s) > 1 else 0.0
    return math.inf if dt <= 0.0 else 1.0 / (dt * worst)


def check_bare_step(case, members, fires):
    """Refuse bare members for which eq (4.25), stepped explicitly, overshoots the gas in one step.

    ``fires``: (time_s, gas_C, alpha_c, kernel arrays, label) of each fire the members run in (the
    arrays of :meth:`MemberColumns.arrays` give which members are bare and their k_sh Am/V);
    ``label`` names the fire in the message. The limit (:func:`bare_step_limit_per_m`) is far beyond
    real sections at the clause's 5 s step; code values ([code]) and longer steps bring it within reach.
    """
    code = case.code
    eps_res = code["configuration_factor"] * code["emissivity_steel"] * code["emissivity_fire"]
    rho_a = code["steel_density_kg_m3"]
    for time_s, gas_C, alpha_c, arrays, label in fires:
        bare, amv = arrays[:2]
        if not np.any(bare):
            continue
        limit = bare_step_limit_per_m(time_s, gas_C, alpha_c, eps_res, rho_a)
        over = np.flatnonzero(bare & (amv >= limit))
        if len(over):
            i = int(over[0])
            m = members[i]
            k_sh = amv[i] / m.section_factor_per_m
            raise InputError(
                f"{member_label(case.member_places, i, m)}.section_factor_per_m", m.section_factor_per_m,
                f"too large for the time step {float(np.max(np.diff(time_s))):g} s: in the {label}, eq (4.25) of "
                f"EN 1993-1-2 stepped explicitly passes the gas temperature in one step unless k_sh Am/V < "
                f"{limit:.4g} 1/m (here k_sh = {k_sh:.3g}; alpha_c = {alpha_c:g} W/(m2 K), "
                f"code.steel_density_kg_m3 = {rho_a:g}, gas up to {float(np.max(gas_C)):.0f} C); give a smaller "
                "time step, or check the [code] values")


def run_members(case, members, time_s, gas_C, alpha_c, thresholds, query_idx=None, keep_history=False,
                thickness_scale=1.0, nominal_fire=False, arrays=None):
    """Batch kernel over ``members`` on one fire (or over prepared ``arrays``); returns the kernel's tuple."""
    code = case.code
    eps_res = code["configuration_factor"] * code["emissivity_steel"] * code["emissivity_fire"]
    if arrays is None:
        arrays = thermal_arrays(case, members, thickness_scale, nominal_fire)
    q = np.zeros(0, dtype=np.int64) if query_idx is None else np.asarray(query_idx, dtype=np.int64)
    return heat.batch(time_s, gas_C, arrays[0], arrays[1], float(alpha_c), float(eps_res),
                      float(code["steel_density_kg_m3"]), *arrays[2:], np.asarray(thresholds, dtype=float),
                      q, keep_history)


def analyse(case: Case, histories: bool = True) -> AnalysisResult:
    """Run a case: design fire, steel temperatures, verdicts, warnings.

    ``histories`` keeps each member's steel temperature on the design-fire grid
    (``MemberResult.steel_temperature_C``); turn it off for very large schedules.
    """
    code = case.code
    fire = design_fire(case)
    warnings = list(fire.warnings)
    step = case.analysis.time_step_s
    t = time_grid(case.fire.duration_min * 60.0, step, fire.key_times_s)
    g = np.asarray(fire.gas(t), dtype=float)
    i_peak = int(np.argmax(g))
    fr = FireResult(curve=case.fire.curve, duration_min=case.fire.duration_min, convection_coefficient=fire.alpha_c,
                    time_s=t, gas_temperature_C=g, peak_gas_temperature_C=float(g[i_peak]),
                    time_of_peak_gas_min=float(t[i_peak] / 60.0), **fire.fields)

    members = case.members
    for i, m in enumerate(members):
        if m.protection is not None and m.thickness_mm is None:
            raise InputError(f"{member_label(case.member_places, i, m)}.thickness_mm", None,
                             "is missing; the check needs it (steelfire size computes it)")
    crit = _critical_all(members)
    thresholds = np.array([c[0] for c in crit])
    nominal_design = case.fire.curve in NOMINAL_CURVES
    cols = MemberColumns(case, members)
    design_arrays = cols.arrays(nominal_fire=nominal_design)
    standard_arrays = cols.arrays(nominal_fire=True)
    ts = time_grid(case.analysis.standard_horizon_min * 60.0, step)
    gs = nominal.standard_fire(ts)
    check_bare_step(case, members, [(t, g, fire.alpha_c, design_arrays, "design fire"),
                                    (ts, gs, code["alpha_c_standard"], standard_arrays,
                                     "standard fire of the times to critical")])
    peak, peak_t, _, _, last, hist = run_members(case, None, t, g, fire.alpha_c, thresholds,
                                                 keep_history=histories, arrays=design_arrays)
    # the standard fire, for times to critical (EN 1991-1-2 3.2.1, alpha_c of 3.2.1(3))
    # and for the equal-steel-temperature equivalence: when the same member reaches its design-fire
    # peak under the standard fire (the members run twice in one batch, one threshold each)
    n = len(members)
    std_arrays = tuple(np.concatenate([a, a]) for a in standard_arrays)
    _, _, cross2, _, _, _ = run_members(case, None, ts, gs, code["alpha_c_standard"],
                                        np.concatenate([thresholds, peak]), arrays=std_arrays)
    cross, equal_t = cross2[:n], cross2[n:]
    factors, equiv = _equivalence(case, fire, members, equal_t, warnings, cross)

    # the members' verdicts by column; their MemberResult objects are made when first asked for
    table = MemberTable(
        name=[m.name for m in members], kind=[m.kind for m in members],
        section_factor_per_m=[m.section_factor_per_m for m in members],
        protection=[m.protection for m in members], thickness_mm=[m.thickness_mm for m in members],
        critical_temperature_C=thresholds, critical_temperature_source=[c[1] for c in crit],
        peak_steel_temperature_C=peak, time_of_peak_steel_min=peak_t / 60.0,
        standard_fire_time_to_critical_min=cross / 60.0,  # NaN: not within the horizon
        required_minutes=[m.required_minutes for m in members],
        shadow_factor=[None if m.protection is not None else (
            m.shadow_factor_nominal if nominal_design else m.shadow_factor_natural) for m in members],
        utilisation=[m.utilisation for m in members], histories=hist if histories else None, equivalence=equiv)

    warnings += _member_warnings(case, members, fire, t, g, peak, last, cols)
    fr.equivalence_factors = factors
    return AnalysisResult(title=case.title, fire=fr, members=MemberResults(table), code_values=dict(code),
                          warnings=fire.out_of_scope + warnings, out_of_scope=list(fire.out_of_scope),
                          time_step_s=step, standard_horizon_min=case.analysis.standard_horizon_min,
                          cautions=CAUTIONS)


#: A route is flagged unconservative when its equivalent time is more than this fraction below the direct one.
UNCONSERVATIVE_FRACTION = 0.10


def equivalence_routes(case, fire, members, equal_time_s, warnings, critical_time_s=None):
    """Time equivalence by EN 1991-1-2 Annex F, the CIB W14 formula and equal steel temperature.

    Returns {"factors": {...} | None, "members": [per-member dict]}. Annex F and CIB W14 need the
    compartment and the fire load; without them they are null with the reason in ``warnings``.
    The direct route is the time at which the member, under the standard fire, reaches the peak it
    reaches in the design fire (null if not within standard_horizon_min).
    """
    factors, columns = _equivalence(case, fire, members, equal_time_s, warnings, critical_time_s)
    return {"factors": factors, "members": columns.entries()}


def _equivalence(case, fire, members, equal_time_s, warnings, critical_time_s=None):
    """:func:`equivalence_routes` with the members' entries by column: (factors, EquivalenceColumns)."""
    from steelfire.models import equivalence as eq

    horizon = case.analysis.standard_horizon_min
    annex_f = {}
    cib = None
    factors = None
    if case.compartment is not None and case.fire_load is not None:
        c, f = case.compartment, fire.fields
        common = dict(design_fire_load_MJ_m2=f["design_fire_load_MJ_m2"], floor_area_m2=c.floor_area_m2,
                      vertical_opening_area_m2=f["vertical_opening_area_m2"], thermal_inertia=f["thermal_inertia"],
                      code=case.code)
        kinds = sorted({m.protection is not None for m in members}, reverse=True)
        for prot in kinds:
            annex_f[prot] = eq.annex_f_time_equivalence(
                height_m=c.height_m, roof_opening_area_m2=c.roof_opening_area_m2, protected=prot,
                opening_factor_m05=f["opening_factor_m05"], total_area_m2=c.boundary_area_m2,
                opening_height_m=f["opening_height_m"], **common)
        cib = eq.cib_w14_time_equivalence(total_area_m2=c.boundary_area_m2, opening_height_m=f["opening_height_m"],
                                          protected=True, roof_opening_area_m2=c.roof_opening_area_m2,
                                          height_m=c.height_m, **common)
        seen = set()
        for res in list(annex_f.values()) + [cib]:
            for w in res.warnings:
                if w not in seen:
                    seen.add(w)
                    warnings.append(w)
        if c.roof_opening_area_m2 > 0 and case.fire.curve == "parametric":
            warnings.append("The Annex A parametric fire does not cover horizontal (roof) openings; Annex F does "
                            f"(alpha_h = {c.roof_opening_area_m2 / c.floor_area_m2:.4g}).")

        def strip(d):
            d = dict(d)
            d.pop("code_values", None)
            d.pop("warnings", None)
            return d

        factors = {"annex_f_protected": strip(annex_f[True].to_dict()) if True in annex_f else None,
                   "annex_f_bare": strip(annex_f[False].to_dict()) if False in annex_f else None,
                   "cib_w14": strip(cib.to_dict())}
    else:
        warnings.append("Time equivalence by Annex F and CIB W14 needs [compartment] and [fire_load]; "
                        "only the equal-steel-temperature route is given.")
    if cib is not None and any(m.protection is None for m in members):
        warnings.append("CIB W14 is derived for protected (insulated) members: null for the bare members.")
    out = _equivalence_columns(members, annex_f, cib, equal_time_s, critical_time_s, horizon)
    flagged = [members[i].name for i in np.flatnonzero(out.unconservative_any())]
    if flagged:
        warnings.append(
            f"Time equivalence more than {UNCONSERVATIVE_FRACTION:.0%} below the direct (equal steel temperature) "
            f"answer, i.e. unconservative, for {_names(flagged)}: see each member's 'unconservative' routes.")
    beyond = [members[i].name for i in np.flatnonzero(np.isnan(out.equal_temperature_min))]
    if beyond:
        warnings.append(
            f"Equal-temperature equivalence beyond the standard-fire horizon ({horizon:g} min) for {_names(beyond)}: "
            "the design-fire peak is not reached within it (null; compared as at least the horizon).")
    return factors, out


def _member_equivalence(members, annex_f, cib, equal_time_s, critical_time_s, horizon):
    """Each member's equivalence entry (a dict per member): :func:`_equivalence_columns`, one
    member at a time."""
    return _equivalence_columns(members, annex_f, cib, equal_time_s, critical_time_s, horizon).entries()


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


def _equivalence_columns(members, annex_f, cib, equal_time_s, critical_time_s, horizon) -> EquivalenceColumns:
    """The members' equivalence entries: the routes' times, which are unconservative, whether each
    stays within the required period (``meets_required``) and whether the member's own standard-fire
    time to critical reaches it (``resists``, the check t_fi,d >= t_e,d).

    Annex F and CIB W14 give one time per group (protected, bare); the comparisons are made for all
    members at once with numpy (NaN stands for null and compares false), and each member's verdicts
    are packed into one integer code (bits :data:`_VERDICT_BITS`).
    """
    n = len(members)
    prot = np.fromiter((m.protection is not None for m in members), dtype=bool, count=n)
    nan = float("nan")

    def group(value_of):  # a per-group value as a column (NaN where null)
        v_p, v_b = value_of(True), value_of(False)
        return np.where(prot, nan if v_p is None else v_p, nan if v_b is None else v_b)

    a = group(lambda p: annex_f[p].t_e_min if p in annex_f else None)
    w = group(lambda p: cib.t_e_min if (cib is not None and p) else None)
    kc = group(lambda p: annex_f[p].k_c if p in annex_f else None)
    small = group(lambda p: annex_f[p].small_compartment.t_e_min
                  if p in annex_f and annex_f[p].small_compartment is not None else None)
    d = np.asarray(equal_time_s, dtype=float) / 60.0
    t_fi = (np.full(n, np.nan) if critical_time_s is None else np.asarray(critical_time_s, dtype=float)) / 60.0
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
    for k, name in enumerate(_VERDICT_BITS):
        packed |= bits[name].astype(np.int64) << k
    distinct, code = np.unique(packed, return_inverse=True)
    verdicts = [_verdict_of({name: bool((int(v) >> k) & 1) for k, name in enumerate(_VERDICT_BITS)})
                for v in distinct.tolist()]
    return EquivalenceColumns(a, w, d, kc, small, code.reshape(-1).astype(np.int64), verdicts)


def _member_warnings(case, members, fire, t, g, peak, last, cols):
    out = []
    from steelfire.models.protection import assessment_warnings

    # only materials that state an assessed range (or a standard-fire-only assessment) can warn
    assessed = {name for name, mt in case.materials.items()
                if mt.assessed_thickness_mm or mt.assessed_section_factor_per_m
                or mt.assessed_max_steel_temperature_C is not None or mt.assessed_fire == "standard"}
    for i, m in enumerate(members):
        if m.protection in assessed:
            out += assessment_warnings(case.materials[m.protection], m.name, m.thickness_mm, m.section_factor_per_m,
                                       float(peak[i]), fire.cools)
    mixed = [m.name for m in members if m.protection is None and m.shadow_factor is None
             and m.shadow_factor_nominal != m.shadow_factor_natural]
    if mixed and case.fire.curve not in NOMINAL_CURVES:
        out.append(f"Shadow factor for {_names(mixed)}: eq (4.26b) in the design fire, eq (4.26a) (0.9 times) "
                   "under the standard fire (EN 1993-1-2 4.2.5.1(2)); the standard-fire times, and the "
                   "equal-temperature equivalence, carry that difference.")
    unstable = [m.name for m in members if m.utilisation is not None and (
        m.kind in ("column", "brace", "other") or (m.kind == "beam" and m.laterally_restrained is not True))]
    if unstable:
        out.append(
            "EN 1993-1-2 eq (4.22) holds for members without instability (tension members, laterally restrained "
            f"beams) with class 1-3 sections; it is used here for {_names(unstable)}: check buckling or lateral-"
            "torsional buckling by EN 1993-1-2 4.2.3 (class 4 sections: 350 C, 4.2.3.6).")
    if fire.cools:
        heating = [m.name for m, d in zip(members, last) if d > 1e-9]
        if heating:
            out.append(
                f"Steel still heating at the end of the design fire (duration_min = {case.fire.duration_min:g}) "
                f"for {_names(heating)}: the true peak comes later; extend fire.duration_min.")
        prot = np.flatnonzero(~cols.bare)
        if len(prot):
            thr = np.full(len(prot), np.inf)
            probe = cols.arrays(thickness_scale=1.0 + THICKNESS_PROBE, select=prot)
            thick_peak = run_members(case, None, t, g, fire.alpha_c, thr, arrays=probe)[0]
            rising = [members[i].name for i in prot[thick_peak > peak[prot] + 0.01]]
            if rising:
                out.append(
                    f"Burnout peak rises with thickness for {_names(rising)}: 10 % more protection gives a hotter "
                    "peak in the cooling phase under EN 1993-1-2 eq (4.27) (its (e^(phi/10) - 1) term adds heat "
                    "as the gas cools). A property of the published equation; check such members with a more "
                    "detailed model and do not rely on 'thicker is cooler' here.")
    return out


# ----------------------------------------------------------------------------------------------
# sizing: the least protection thickness per member (steelfire.sizing), then the check at it


def _sizing_fires(case):
    """The standard fire up to the longest required period and the design fire, as sizing.Fire."""
    from steelfire.chain import sizing

    code = case.code
    step = case.analysis.time_step_s
    fire = design_fire(case)
    t = time_grid(case.fire.duration_min * 60.0, step, fire.key_times_s)
    design = sizing.Fire(t, np.asarray(fire.gas(t), dtype=float), float(fire.alpha_c))
    req = [m.required_minutes for m in case.members if m.required_minutes is not None]
    horizon = max(req) * 60.0 if req else step
    ts = time_grid(horizon, step)
    standard = sizing.Fire(ts, nominal.standard_fire(ts), float(code["alpha_c_standard"]))
    return standard, design


def size_members(case: Case):
    """Least thickness per protected member for its standard period and for burnout, the governing
    one, and the least supplied thickness that passes both (checked, since the burnout peak need not
    fall with thickness). Returns a list of sizing dicts, one per member, in schedule order."""
    from steelfire.chain import sizing

    code = case.code
    members = case.members
    standard, design = _sizing_fires(case)
    prot = [i for i, m in enumerate(members) if m.protected]
    out = [None] * len(members)
    if prot:
        sub = [members[i] for i in prot]
        arrays = thermal_arrays(case, [dataclasses.replace(m, thickness_mm=1.0) for m in sub])
        mats = [case.materials[m.protection] for m in sub]
        ts = sizing.ThermalSet(ap_v=arrays[1], rho_p=arrays[3], c_p=arrays[4], lam_T=arrays[5], lam_v=arrays[6],
                               lam_n=arrays[7], moisture_percent=np.array([m.moisture_percent for m in mats]),
                               lam20=np.array([m.conductivity_at_20C for m in mats]))
        crit = np.array([c[0] for c in _critical_all(sub)])
        req = np.array([np.nan if m.required_minutes is None else m.required_minutes * 60.0 for m in sub])
        eps_res = code["configuration_factor"] * code["emissivity_steel"] * code["emissivity_fire"]
        p = sizing.Problem(ts, crit, req, standard, design, eps_res, code["steel_density_kg_m3"])
        supplied = [mat.supplied_thicknesses_mm() * 1e-3 for mat in mats]
        # trial thicknesses start where the explicit eq (4.27) is stable at this time step
        lam_max = np.array([max(v for _, v in mat.conductivity_table) for mat in mats])
        stable = heat.stable_min_thickness_m(lam_max, ts.c_p, ts.rho_p, ts.ap_v, case.analysis.time_step_s,
                                             code["steel_density_kg_m3"])
        supplied = [sp[sp >= st] if np.any(sp >= st) else sp[-1:] for sp, st in zip(supplied, stable)]
        d_min = np.array([s[0] for s in supplied])
        d_max = np.array([s[-1] for s in supplied])
        a = sizing.size_standard_period(p, d_min, d_max)
        b = sizing.size_burnout(p, [sizing.scan_grid(sp) for sp in supplied])
        a_mm = np.where(np.isnan(a.thickness_m), np.nan, a.thickness_m * 1e3)
        b_mm = b.thickness_m * 1e3
        failing = np.fmax(a.failing_m, b.failing_m)  # NaN only where both pass at the least thickness
        possible = a.achievable & b.achievable
        chosen, ok = sizing.round_up_and_verify(p, failing, possible, supplied)
        for j, i in enumerate(prot):
            has_std = not np.isnan(req[j])
            std_v = float(a_mm[j]) if has_std and a.achievable[j] else None
            burn_v = float(b_mm[j]) if b.achievable[j] else None
            if ok[j]:
                governing = "standard_period" if (std_v is not None and (burn_v is None or std_v >= burn_v)) \
                    else "burnout"
                note = ""
            else:
                governing = None
                why = []
                if has_std and not a.achievable[j]:
                    why.append(f"the standard period ({sub[j].required_minutes:g} min)")
                if not b.achievable[j]:
                    why.append("burnout of the design fire")
                if why:
                    note = (f"not achievable within the material's largest thickness "
                            f"({supplied[j][-1] * 1e3:g} mm) for {' and '.join(why)}")
                else:
                    note = ("not achievable: each criterion alone is met (standard period from "
                            f"{a_mm[j]:.1f} mm, burnout from {b_mm[j]:.1f} mm) but no supplied thickness "
                            "meets both (the burnout peak rises again with thickness)")
            out[i] = {"standard_period_mm": std_v, "burnout_mm": burn_v, "governing": governing,
                      "chosen_mm": float(chosen[j] * 1e3) if ok[j] else None, "achievable": bool(ok[j]),
                      "note": note, "supplied_range_mm": [float(supplied[j][0] * 1e3), float(supplied[j][-1] * 1e3)],
                      "iterations": {"standard_period": a.iterations, "burnout": b.iterations}}
        out_calls = p.kernel_calls
    else:
        out_calls = 0
    for i, m in enumerate(members):
        if out[i] is None:  # bare: needs none where it passes; sizing needs a material otherwise
            out[i] = {"standard_period_mm": None, "burnout_mm": None, "governing": None, "chosen_mm": None,
                      "achievable": None, "note": "", "supplied_range_mm": None, "iterations": None}
    return out, out_calls


def size(case: Case, histories: bool = True) -> AnalysisResult:
    """Size every protected member (:func:`size_members`), then check the schedule at the chosen
    thicknesses (a member that cannot be sized is checked at its given thickness, or at the
    material's largest one). Each MemberResult carries ``sizing``."""
    sized, _ = size_members(case)
    members = []
    for m, s in zip(case.members, sized):
        if m.protected:
            if s["chosen_mm"] is not None:
                d = s["chosen_mm"]
            elif m.thickness_mm is not None:
                d = m.thickness_mm
            else:
                d = s["supplied_range_mm"][1]
            members.append(dataclasses.replace(m, thickness_mm=d))
        else:
            members.append(m)
    result = analyse(dataclasses.replace(case, members=tuple(members)), histories=histories)
    for r, s, m in zip(result.members, sized, case.members):
        s["given_mm"] = m.thickness_mm
        if s["achievable"] is None:  # bare member
            ok = r.ok
            s.update(achievable=ok, chosen_mm=0.0 if ok else None,
                     note="bare steel passes: no protection needed" if ok else
                     "bare steel fails; name a protection material (protection = ...) to size it")
        r.sizing = s
    not_ok = [r.name for r in result.members if not r.sizing["achievable"]]
    if not_ok:
        result.warnings.append(f"Sizing: not achievable for {_names(not_ok)} (see each member's sizing note).")
    return result
