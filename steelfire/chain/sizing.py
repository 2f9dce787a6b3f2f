"""Least protection thickness for a member schedule, by vectorised scan and bisection.

Two criteria per member (EN 1993-1-2 4.2.5.2 steel temperatures, 4.2.4 critical temperature):

* standard period: under the standard fire (EN 1991-1-2 3.2.1) the steel temperature at
  ``required_minutes`` is at most the critical temperature. Under the standard fire eq (4.27)
  heats the steel monotonically and a thicker layer is never hotter, so plain bisection applies:
  the member passes exactly when it reaches the critical temperature no earlier than required.
* burnout (the design fire): the peak over the whole design fire, cooling phase included, is at most
  the critical temperature. Eq (4.27)'s cooling-phase term can make that peak rise with thickness for
  heavy protection (phi of about 2 and more), so the passing thicknesses need not form a half-line:
  the thickness range is scanned upward and the first passing interval is bisected. Under a nominal
  design fire a member with a required period is judged, as the check judges it, by its temperature in
  that fire at the required period (the hydrocarbon or external curve is not the standard fire).

Each criterion uses the model of the check's verdict: the standard period by eq (4.27) (the check's
time to critical), the design fire by eq (4.27) or the conduction model where it governs
(chain.protected), on the check's own time grid. Only thicknesses the material is supplied in, within
its assessed range, and stable at the time step are proposed; :func:`size` then checks the schedule at
the proposed thicknesses and proposes no thickness the check does not pass by more than the numerical
error.

All members advance together: every scan point and every bisection step is one call of the batch
kernels (:func:`steelfire.models.heat.run`) over the whole schedule (not one root-find per member).
Results say how they ended (achievable, iterations, final bracket width).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from steelfire.chain import thermal
from steelfire.chain.protected import SECOND_LAW_TOLERANCE_C

#: Bisection stops when the bracket is this narrow [m] (0.1 mm).
TOLERANCE_M = 1e-4
#: A proposed thickness the check does not pass (or passes within the numerical error) is raised to the
#: next supplied thickness at most this many times; then the member is reported not achievable.
MAX_RAISES = 3
#: At most this many thicknesses per member in the burnout scan: the supplied thicknesses
#: themselves where there are no more, else this many spaced evenly in log(thickness) over the
#: supplied range (about 7 % apart over 0.5-100 mm). A passing window narrower than that spacing,
#: between two scan points that both fail, can be missed: the member is then reported not achievable.
SCAN_POINTS = 64


@dataclass
class Fire:
    """A gas curve on its grid with the convective coefficient that goes with it."""

    time_s: np.ndarray
    gas_C: np.ndarray
    alpha_c: float
    nominal: bool = False
    exposures: object = None   # chain.thermal.Exposures of a fire that differs from member to member


@dataclass
class Criterion:
    """Per-member outcome of one criterion: least thickness [m] (NaN where none), and how it ended."""

    thickness_m: np.ndarray
    achievable: np.ndarray
    iterations: int
    bracket_m: np.ndarray
    failing_m: np.ndarray = None  # the failing end of the final bracket (NaN: passes at the least thickness)


class Problem:
    """The schedule's sizing problem: the protected members (rows ``members`` of the run's
    :class:`~steelfire.chain.thermal.MemberColumns`), their critical temperatures and required periods,
    the two fires and the code values."""

    def __init__(self, cols, members, critical_C, required_s, standard: Fire, design: Fire | None, code,
                 protection_model="lumped"):
        self.cols = cols
        self.conduction_only = protection_model == "conduction"
        self.members = np.asarray(members, dtype=np.int64)
        self.critical_C = np.asarray(critical_C, dtype=float)
        self.required_s = np.asarray(required_s, dtype=float)  # NaN: no standard period asked
        self.standard = standard
        self.design = design
        self.code = code
        self.kernel_calls = 0
        # under a nominal design fire a member with a required period is judged at that period (its design-fire
        # temperature there at most critical), as the check judges it; the others by their peak over the fire
        self.at_required = np.zeros(len(self.members), dtype=bool) if not (design is not None and design.nominal) \
            else ~np.isnan(self.required_s)

    def __len__(self):
        return len(self.members)

    def _run(self, fire: Fire, idx, d_m, threshold, lumped_only=False):
        """(peak, crossing time) of the members ``idx`` at thicknesses ``d_m`` in ``fire``: eq (4.27), or the
        conduction model (refined as the check refines it) where the case asks for it or where eq (4.27) puts
        the steel above the hottest gas so far (chain.protected); ``lumped_only``: eq (4.27) alone, as the
        check's standard-fire time to critical."""
        self.kernel_calls += 1
        idx = np.asarray(idx)
        d_mm = np.asarray(d_m, dtype=float) * 1e3
        ex = fire.exposures if fire.exposures is not None else thermal.Exposures.uniform(fire.time_s, fire.gas_C,
                                                                                         len(self.cols))
        select = self.members[idx]
        r, _ = ex.run(self.code, self.cols, select=select, alpha_c=fire.alpha_c, nominal_fire=fire.nominal,
                      thickness_mm=d_mm, thresholds_C=threshold)
        peak, cross = r.peak_C.copy(), r.crossing_time_s.copy()
        use = np.ones(len(idx), dtype=bool) if self.conduction_only else r.excess_C > SECOND_LAW_TOLERANCE_C
        if lumped_only:
            use[:] = False
        if use.any():
            thr = np.broadcast_to(threshold, (len(idx),))[use]
            p, _, c, *_ = ex.run_conduction(self.code, self.cols, select[use], converged=True, thickness_mm=d_mm[use],
                                            thresholds_C=thr)
            peak[use], cross[use] = p, c
        return peak, cross

    def standard_passes(self, idx, d_m):
        """Reaches the critical temperature no earlier than required (standard fire, eq (4.27): the model of the
        check's time to critical whatever the protection model)."""
        peak, cross = self._run(self.standard, idx, d_m, self.critical_C[idx], lumped_only=True)
        return np.isfinite(peak) & (np.isnan(cross) | (cross >= self.required_s[idx] - 1e-9))

    def burnout_passes(self, idx, d_m):
        """Peak over the whole design fire at most the critical temperature; under a nominal design fire, a
        member with a required period: the design fire's steel temperature at that period at most critical
        (the nominal curves only heat, so: the critical temperature not reached before the period)."""
        idx = np.asarray(idx)
        d_m = np.asarray(d_m, dtype=float)
        ok = np.ones(len(idx), dtype=bool)
        if not len(idx):
            return ok
        at = self.at_required[idx]
        peak, cross = self._run(self.design, idx, d_m, np.where(at, self.critical_C[idx], np.inf))
        ok[~at] = np.isfinite(peak[~at]) & (peak[~at] <= self.critical_C[idx[~at]])
        ok[at] = np.isfinite(peak[at]) & (np.isnan(cross[at]) | (cross[at] >= self.required_s[idx[at]] - 1e-9))
        return ok

    def passes(self, idx, d_m):
        """Both criteria that apply, at thicknesses ``d_m`` of the members ``idx``."""
        idx = np.asarray(idx)
        ok = np.ones(len(idx), dtype=bool)
        has_std = ~np.isnan(self.required_s[idx])
        if has_std.any():
            sub = idx[has_std]
            ok[has_std] &= self.standard_passes(sub, np.asarray(d_m)[has_std])
        if self.design is not None:
            ok &= self.burnout_passes(idx, np.asarray(d_m))
        return ok


def _bisect(test, idx, lo, hi, tol):
    """Vectorised bisection: ``test`` fails at ``lo`` and passes at ``hi`` for every member; returns
    the passing end of a bracket no wider than ``tol`` and the number of rounds."""
    lo, hi = lo.copy(), hi.copy()
    rounds = 0
    while True:
        open_ = (hi - lo) > tol
        if not open_.any():
            return hi, rounds, hi - lo
        sel = np.nonzero(open_)[0]
        mid = 0.5 * (lo[sel] + hi[sel])
        ok = test(idx[sel], mid)
        hi[sel[ok]] = mid[ok]
        lo[sel[~ok]] = mid[~ok]
        rounds += 1


def size_standard_period(p: Problem, d_min_m, d_max_m, tol_m=TOLERANCE_M) -> Criterion:
    """Least thickness meeting the standard period, members with a required period (others NaN)."""
    n = len(p)
    out = np.full(n, np.nan)
    failing = np.full(n, np.nan)
    achievable = np.ones(n, dtype=bool)
    bracket = np.zeros(n)
    idx = np.nonzero(~np.isnan(p.required_s))[0]
    if len(idx) == 0:
        return Criterion(out, achievable, 0, bracket, failing)
    lo, hi = np.asarray(d_min_m, float)[idx], np.asarray(d_max_m, float)[idx]
    ok_hi = p.standard_passes(idx, hi)
    ok_lo = p.standard_passes(idx, lo)
    achievable[idx[~ok_hi]] = False
    out[idx[ok_lo]] = lo[ok_lo]
    todo = ok_hi & ~ok_lo
    rounds = 0
    if todo.any():
        d, rounds, br = _bisect(p.standard_passes, idx[todo], lo[todo], hi[todo], tol_m)
        out[idx[todo]] = d
        bracket[idx[todo]] = br
        failing[idx[todo]] = d - br
    return Criterion(out, achievable, rounds, bracket, failing)


def scan_grid(supplied_m, points=SCAN_POINTS):
    """The burnout scan for one member: its supplied thicknesses, or ``points`` of them spread evenly
    in log(thickness) over the supplied range (both ends included)."""
    s = np.asarray(supplied_m, dtype=float)
    if len(s) <= points:
        return s
    g = np.exp(np.linspace(np.log(s[0]), np.log(s[-1]), points))
    g[0], g[-1] = s[0], s[-1]
    return g


def size_burnout(p: Problem, grids, tol_m=TOLERANCE_M) -> Criterion:
    """Least thickness whose design-fire peak (cooling included) is at most critical: the scan
    ``grids`` (one ascending array per member, :func:`scan_grid`) are tried upward in one batch,
    then the first passing interval is bisected."""
    n = len(p)
    out = np.full(n, np.nan)
    failing = np.full(n, np.nan)
    bracket = np.zeros(n)
    if p.design is None:
        return Criterion(out, np.ones(n, dtype=bool), 0, bracket, failing)
    k = max(len(g) for g in grids)
    grid = np.array([np.concatenate([g, np.full(k - len(g), g[-1])]) for g in grids])  # n x K, ends repeated
    idx_all = np.repeat(np.arange(n), k)
    ok = p.burnout_passes(idx_all, grid.ravel()).reshape(n, k)
    first = np.where(ok.any(axis=1), ok.argmax(axis=1), -1)
    achievable = first >= 0
    at_min = first == 0
    out[at_min] = grid[at_min, 0]
    todo = np.nonzero(first > 0)[0]
    rounds = 0
    if len(todo):
        lo = grid[todo, first[todo] - 1]
        hi = grid[todo, first[todo]]
        d, rounds, br = _bisect(p.burnout_passes, todo, lo, hi, tol_m)
        out[todo] = d
        bracket[todo] = br
        failing[todo] = d - br
    return Criterion(out, achievable, rounds, bracket, failing)


def round_up_and_verify(p: Problem, failing_m, achievable, supplied_m):
    """The least supplied thickness that passes BOTH criteria.

    ``failing_m`` is, per member, the largest thickness known to fail a criterion (the failing ends
    of the bisection brackets; NaN or below the supply where the least thickness passes), so the
    candidates are the supplied thicknesses above it, tried upward. ``supplied_m`` is a list (per
    member) of ascending supplied thicknesses [m]. Because the burnout peak need not fall with
    thickness, each candidate is checked with the kernel; members whose candidates all fail are not
    achievable. Returns (chosen_m with NaN where none, achievable).
    """
    n = len(failing_m)
    chosen = np.full(n, np.nan)
    ok_out = np.asarray(achievable, dtype=bool).copy()
    pos = np.zeros(n, dtype=np.int64)
    for i in range(n):
        if ok_out[i]:
            s = supplied_m[i]
            f = failing_m[i]
            pos[i] = 0 if np.isnan(f) else int(np.searchsorted(s, f, side="right"))
            if pos[i] >= len(s):
                ok_out[i] = False
    active = np.nonzero(ok_out)[0]
    while len(active):
        cand = np.array([supplied_m[i][pos[i]] for i in active])
        good = p.passes(active, cand)
        chosen[active[good]] = cand[good]
        nxt = []
        for i in active[~good]:
            pos[i] += 1
            if pos[i] >= len(supplied_m[i]):
                ok_out[i] = False
            else:
                nxt.append(i)
        active = np.array(nxt, dtype=np.int64)
    return chosen, ok_out


# ----------------------------------------------------------------------------------------------
# the schedule: least thickness per member, then the check at the chosen thicknesses


def _sizing_fires(case):
    """The standard fire up to the longest required period and the design fire, as :class:`Fire`; the design
    fire on the check's grid (chain.analysis.analyse): under a nominal fire it runs to the longest required
    period if that is longer than ``duration_min``, with the required periods on the grid."""
    from steelfire.chain import fires

    step = case.analysis.time_step_s
    fire = fires.design_fire(case)
    duration_s, keys = case.fire.duration_min * 60.0, tuple(fire.key_times_s)
    periods = [m.required_minutes * 60.0 for m in case.members if m.required_minutes is not None]
    if fire.nominal and periods:
        duration_s, keys = max(duration_s, max(periods)), keys + tuple(periods)
    t = fires.time_grid(duration_s, step, keys)
    if fire.exposure is not None:
        ex = fire.exposure(t)
        exposures = thermal.Exposures(t, ex.gas_C, ex.member_columns, ex.column_labels)
        design = Fire(t, exposures.gas_C.max(axis=1), float(fire.alpha_c), fire.nominal, exposures)
    else:
        design = Fire(t, np.asarray(fire.gas_temperature_C(t), dtype=float), float(fire.alpha_c), fire.nominal)
    req = [m.required_minutes for m in case.members if m.required_minutes is not None]
    ts, gs = fires.standard_fire(case, max(req) if req else step / 60.0)
    standard = Fire(ts, gs, float(case.code["alpha_c_standard"]), True)
    return standard, design


def _empty(note=""):
    return {"standard_period_mm": None, "burnout_mm": None, "governing": None, "chosen_mm": None,
            "achievable": None, "note": note, "supplied_range_mm": None, "iterations": None}


def supplied_m(case, member):
    """The thicknesses [m] a protected ``member`` may be proposed in, ascending, and why some were left out:
    its material's supplied thicknesses within the material's assessed thickness range (a product is used
    within its assessment) and no thinner than eq (4.27) is stable at the time step
    (:func:`steelfire.models.stability.stable_min_thickness_m`, which the check refuses below). Returns
    (thicknesses, note); an empty array where none is left."""
    from steelfire.models import stability

    mat = case.materials[member.protection]
    s = mat.supplied_thicknesses_mm() * 1e-3
    notes = []
    if mat.assessed_thickness_mm:
        lo, hi = mat.assessed_thickness_mm
        keep = (s >= lo * 1e-3 - 1e-12) & (s <= hi * 1e-3 + 1e-12)
        if not keep.all():
            notes.append(f"supplied thicknesses limited to the assessed range {lo:g}-{hi:g} mm")
        s = s[keep]
    stable = float(stability.stable_min_thickness_m(
        max(v for _, v in mat.conductivity_table), mat.specific_heat, mat.density, member.section_factor_per_m,
        case.analysis.time_step_s, case.code["steel_density_kg_m3"]))
    if np.any(s < stable):
        notes.append(f"thicknesses below {stable * 1e3:.3g} mm left out (eq (4.27) unstable at the time step)")
    return s[s >= stable], "; ".join(notes)


def size_members(case):
    """Least thickness per protected member for its standard period and for burnout, the governing one,
    and the least supplied thickness that passes both (checked, since the burnout peak need not fall
    with thickness). Returns (a sizing dict per member in schedule order, kernel calls)."""
    from steelfire.chain import verdicts

    code = case.code
    members = case.members
    out = [None] * len(members)
    prot = np.array([i for i, m in enumerate(members) if m.protected], dtype=np.int64)
    calls = 0
    if len(prot):
        cols = thermal.MemberColumns(case)
        standard, design = _sizing_fires(case)
        sub = [members[i] for i in prot]
        crit = verdicts.critical_temperatures(sub, code, case.analysis.allow_out_of_scope)[0]
        req = np.array([np.nan if m.required_minutes is None else m.required_minutes * 60.0 for m in sub])
        p = Problem(cols, prot, crit, req, standard, design, code, case.analysis.protection_model)
        supply = [supplied_m(case, m) for m in sub]
        none = np.array([len(sp) == 0 for sp, _ in supply])
        # a member left with no thickness is sized over a placeholder (the largest supplied) and reported not achievable
        supplied = [sp if len(sp) else case.materials[m.protection].supplied_thicknesses_mm()[-1:] * 1e-3
                    for (sp, _), m in zip(supply, sub)]
        d_min = np.array([s[0] for s in supplied])
        d_max = np.array([s[-1] for s in supplied])
        a = size_standard_period(p, d_min, d_max)
        b = size_burnout(p, [scan_grid(sp) for sp in supplied])
        a_mm = np.where(np.isnan(a.thickness_m), np.nan, a.thickness_m * 1e3)
        b_mm = b.thickness_m * 1e3
        failing = np.fmax(a.failing_m, b.failing_m)  # NaN only where both pass at the least thickness
        chosen, ok = round_up_and_verify(p, failing, a.achievable & b.achievable & ~none, supplied)
        # where the design fire is the standard fire itself and eq (4.27) the model, a member judged at its required
        # period has one criterion, given once (as the standard period)
        same = case.fire.curve == "standard" and not p.conduction_only
        for j, i in enumerate(prot):
            has_std = not np.isnan(req[j])
            std_v = float(a_mm[j]) if has_std and a.achievable[j] else None
            burn_v = float(b_mm[j]) if (b.achievable[j] and not (same and p.at_required[j])) else None
            limits = supply[j][1]
            if none[j]:
                governing, note = None, (f"no supplied thickness of {sub[j].protection} is left to "
                                         f"propose ({limits})")
            elif ok[j]:
                governing = "standard_period" if (std_v is not None and (burn_v is None or std_v >= burn_v)) \
                    else "burnout"
                note = limits
            else:
                governing = None
                why = []
                if has_std and not a.achievable[j]:
                    why.append(f"the standard period ({sub[j].required_minutes:g} min)")
                if not b.achievable[j]:
                    why.append("the design fire at the required period" if p.at_required[j] else
                               "burnout of the design fire")
                if crit[j] <= 20.0:   # chain.verdicts: the resistance is below the design effect before any heating
                    note = ("not achievable: the member fails at 20 C (its resistance is below the design effect "
                            "before any heating; see critical_temperature_source): no protection helps, the member "
                            "itself must be changed")
                elif why:
                    note = (f"not achievable within the material's largest thickness "
                            f"({supplied[j][-1] * 1e3:g} mm) for {' and '.join(why)}")
                else:
                    note = ("not achievable: each criterion alone is met (standard period from "
                            f"{a_mm[j]:.1f} mm, burnout from {b_mm[j]:.1f} mm) but no supplied thickness "
                            "meets both (the burnout peak rises again with thickness)")
                if limits:
                    note += f" ({limits})"
            out[i] = {"standard_period_mm": std_v, "burnout_mm": burn_v, "governing": governing,
                      "chosen_mm": float(chosen[j] * 1e3) if ok[j] else None, "achievable": bool(ok[j]),
                      "note": note, "supplied_range_mm": None if none[j] else [float(supplied[j][0] * 1e3),
                                                                          float(supplied[j][-1] * 1e3)],
                      "iterations": {"standard_period": a.iterations, "burnout": b.iterations}}
        calls = p.kernel_calls
    return [s if s is not None else _empty() for s in out], calls


def size(case, histories: bool = True):
    """Size every protected member (:func:`size_members`), then check the schedule at the chosen
    thicknesses (a member that cannot be sized is checked at its given thickness, or at the material's
    largest one). The result's members carry ``sizing``."""
    import dataclasses

    from steelfire.chain.analysis import analyse
    from steelfire.chain.verdicts import names_text

    sized, _ = size_members(case)

    def fallback_mm(i, m):   # where a member cannot be sized: its given thickness, or the largest supplied
        return m.thickness_mm if m.thickness_mm is not None else \
            float(case.materials[m.protection].supplied_thicknesses_mm()[-1])

    members = [dataclasses.replace(m, thickness_mm=s["chosen_mm"] if s["chosen_mm"] is not None else fallback_mm(i, m))
               if m.protected else m for i, (m, s) in enumerate(zip(case.members, sized))]
    result = analyse(dataclasses.replace(case, members=tuple(members)), histories=histories)
    # the check at the proposed thicknesses decides. A member it does not pass, or passes only within the
    # numerical error (table.ok), takes the next thickness it may be proposed in, checked again (the burnout
    # peak need not fall with thickness), at most MAX_RAISES times; then it is reported not achievable.
    supply = {i: supplied_m(case, m)[0] * 1e3 for i, m in enumerate(case.members) if m.protected}
    for round_ in range(MAX_RAISES + 1):
        ok = result.table.ok()
        bad = [i for i, m in enumerate(case.members) if m.protected and sized[i]["chosen_mm"] is not None and not ok[i]]
        if not bad:
            break
        for i in bad:
            s, d = sized[i], sized[i]["chosen_mm"]
            within = bool(result.members[i].passes and result.members[i].meets_required_period is not False)
            up = supply[i][supply[i] > d + 1e-9]
            if round_ < MAX_RAISES and len(up):
                why = "the verdict was within the numerical error" if within else f"the check fails at {d:g} mm"
                s["chosen_mm"] = float(up[0])
                s["note"] = (s["note"] + "; " if s["note"] else "") + f"raised to the next supplied thickness: {why}"
                members[i] = dataclasses.replace(members[i], thickness_mm=float(up[0]))
            else:
                why = "passes only within the numerical error" if within else "fails"
                more = "no thicker supplied thickness is left" if not len(up) else \
                    f"{MAX_RAISES} raises to the next supplied thickness did not help"
                s.update(achievable=False, chosen_mm=None, governing=None,
                         note=f"not achievable: the check at {d:g} mm {why} and {more}")
                members[i] = dataclasses.replace(members[i], thickness_mm=fallback_mm(i, case.members[i]))
        result = analyse(dataclasses.replace(case, members=tuple(members)), histories=histories)
    specified = spec_run = None
    if all(m.thickness_mm is not None for m in case.members if m.protected):
        spec_run = analyse(case, histories=False)   # the design as specified, for comparison
        specified = spec_run.table.ok()
    for j, (r, s, m) in enumerate(zip(result.members, sized, case.members)):
        s["specified_mm"] = m.thickness_mm
        s["specified_ok"] = None if specified is None else bool(specified[j])
        # why the specified design does or does not pass: the check's verdicts at the specified thicknesses
        sm = None if spec_run is None else spec_run.members[j]
        s["specified_passes"] = None if sm is None or sm.passes is None else bool(sm.passes)
        s["specified_meets_required_period"] = (None if sm is None or sm.meets_required_period is None
                                                else bool(sm.meets_required_period))
        marg = None if spec_run is None else spec_run.table.extras.get("marginal")
        s["specified_marginal"] = None if sm is None else bool(marg is not None and marg[j])
        s.pop("iterations", None)
        d = s["chosen_mm"]
        if s["achievable"] and d is not None and d > 0.0:
            # the bisection brackets each least thickness to its tolerance from above; a chosen thickness the
            # check verifies for a criterion bounds that criterion's least thickness
            if s["standard_period_mm"] is not None and r.meets_required_period and s["standard_period_mm"] > d:
                s["standard_period_mm"] = d
            if s["burnout_mm"] is not None and r.passes and s["burnout_mm"] > d:
                s["burnout_mm"] = d
        if s["achievable"] is None:  # bare member
            ok = r.ok
            within = bool(r.passes and r.meets_required_period is not False)   # not ok: marginal
            s.update(achievable=ok, chosen_mm=0.0 if ok else None,
                     note="bare steel passes: no protection needed" if ok else
                     "bare steel passes only within the numerical error (not established): run with a smaller time "
                     "step, or name a protection material (protection = ...) to size it" if within else
                     "bare steel fails; name a protection material (protection = ...) to size it")
        d0, d1 = s["specified_mm"], s["chosen_mm"]
        s["change"] = (None if d0 is None or d1 is None else
                       "increase" if d1 > d0 + 1e-9 else "saving" if d1 < d0 - 1e-9 else "none")
    result.table.sizing = sized
    result.command = "size"
    not_ok = [r.name for r, s in zip(result.members, sized) if not s["achievable"]]
    if not_ok:
        result.warnings.append(f"Sizing: not achievable for {names_text(not_ok)} (see each member's sizing note).")
    return result
