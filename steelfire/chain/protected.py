"""Protected members by two models: eq (4.27) of EN 1993-1-2 and 1-D conduction through the protection.

Eq (4.27) is the code's method and the default (``[analysis] protection_model = "lumped"``). Its term
(e^(phi/10) - 1) d theta_g is clipped while the gas heats but not while it cools, so in a fire with a
cooling phase (or a jagged measured curve) it can heat the steel above the hottest gas it has seen. The
conduction model (:mod:`steelfire.models.conduction`) obeys the second law by construction. Here both are
run for the protected members of a fire that cools or is tabulated; where eq (4.27) breaks the second
law, or where the case asks for the conduction model, the member's verdict, time of peak, history and
sizing rest on the conduction model, and the outputs say so.
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

#: Eq (4.27) is taken as breaking the second law where its steel is more than this above the hottest gas
#: reached so far [C] (a margin for rounding on the grid).
SECOND_LAW_TOLERANCE_C = 0.5
#: Members whose peak (by either model) comes within this of the critical temperature get the conduction
#: model refined to 0.5 C; the others keep its least resolution (8 cells), which the model's tests show
#: within about 1 C for dry members [C].
REFINE_WITHIN_C = 50.0
#: A difference between the models larger than this is reported [C].
DIFFERENCE_REPORTED_C = 10.0


@dataclass
class TwoModels:
    """Per member: the conduction model's peak [C] (NaN where not run), the difference eq (4.27) minus
    conduction, whether eq (4.27) kept to the second law (None for bare or not checked), which model
    the verdict rests on, and the conduction model's own refinement change [C]."""

    conduction_peak_C: np.ndarray
    model_difference_C: np.ndarray
    lumped_valid: list
    verdict_model: list
    refinement_change_C: np.ndarray
    governs: np.ndarray = field(default=None)
    histories: dict = field(default_factory=dict)   # "lumped", "conduction": (T x N) where kept, NaN elsewhere


def applies(case, fire) -> bool:
    """Whether the second model runs: a fire that cools or is tabulated, or the conduction model asked for."""
    return fire.cools or case.fire.curve == "table" or case.analysis.protection_model == "conduction"


def run_both(case, fire, exposures, cols, crit, design, peak, peak_time_s, last, history, judged_at, query,
             governing):
    """Run the conduction model beside eq (4.27) for the protected members (in place: ``peak``,
    ``peak_time_s``, ``last``, ``history`` and ``governing``, the exposure column of each member, take the
    conduction model's values where it governs: a member that sees several columns may be governed by
    another column under that model). Returns :class:`TwoModels` and the warnings."""
    n = len(case.members)
    code = case.code
    out = TwoModels(np.full(n, np.nan), np.full(n, np.nan), [None] * n,
                    ["lumped" if not b else None for b in cols.bare], np.full(n, np.nan), np.zeros(n, dtype=bool))
    prot = np.flatnonzero(~cols.bare)
    if not len(prot) or not applies(case, fire):
        return out, []
    model = case.analysis.protection_model
    keep = history is not None or bool(np.any(judged_at[prot]))
    p8, t8, _, l8, h8, _, g8 = exposures.run_conduction(code, cols, prot, keep_history=keep)
    lumped_peak = peak[prot].copy()
    valid = design.excess_C[prot] <= SECOND_LAW_TOLERANCE_C   # over the whole run (heat.run)
    refine = (~valid) | (model == "conduction") | (np.minimum(np.abs(p8 - crit[prot]),
                                                              np.abs(lumped_peak - crit[prot])) < REFINE_WITHIN_C)
    cp, ct, cl, cg, change = p8.copy(), t8.copy(), l8.copy(), g8.copy(), np.full(len(prot), np.nan)
    ch = h8
    if np.any(refine):
        sel = prot[refine]
        rp, rt, _, rl, rh, rc, rg = exposures.run_conduction(code, cols, sel, converged=True, keep_history=keep)
        cp[refine], ct[refine], cl[refine], cg[refine], change[refine] = rp, rt, rl, rg, rc
        if keep:
            ch = h8.copy()
            ch[:, refine] = rh
    if query is not None:   # nominal fire: the members judged at their required period
        t = exposures.time_s
        for j, i in enumerate(prot):
            if judged_at[i]:
                k = int(np.searchsorted(t, t[query][np.searchsorted(t[query], peak_time_s[i] - 1e-6)] - 1e-6))
                cp[j], ct[j] = ch[k, j], t[k]
    governs = (~valid) | (model == "conduction")
    out.conduction_peak_C[prot] = cp
    out.model_difference_C[prot] = lumped_peak - cp
    out.refinement_change_C[prot] = change
    for j, i in enumerate(prot):
        out.lumped_valid[i] = bool(valid[j])
        out.verdict_model[i] = "conduction" if governs[j] else "lumped"
    out.governs[prot] = governs
    g = prot[governs]
    peak[g], peak_time_s[g], last[g], governing[g] = cp[governs], ct[governs], cl[governs], cg[governs]
    if history is not None:
        out.histories["lumped"] = history.copy()
        cond = np.full_like(history, np.nan)
        cond[:, prot] = ch
        out.histories["conduction"] = cond
        if len(g):
            history[:, g] = ch[:, governs]

    warnings = []
    names = [case.members[i].name for i in prot]
    from steelfire.chain.verdicts import names_text

    bad = [nm for nm, v in zip(names, valid) if not v]
    if bad:
        warnings.append(
            f"EN 1993-1-2 eq (4.27) puts the steel above the hottest gas reached so far for {names_text(bad)} (its "
            "(e^(phi/10) - 1) term adds heat as the gas cools or dips): a result no steel can reach. Their verdict, "
            "time of peak, history and sizing rest on the conduction model.")
    reversed_ = [nm for nm, gv, lp, c, cr in zip(names, governs, lumped_peak, cp, crit[prot])
                 if not gv and lp <= cr < c]
    if reversed_:
        warnings.append(
            f"For {names_text(reversed_)} the verdict rests on eq (4.27), which passes, while the conduction model's "
            "peak exceeds the critical temperature: the pass depends on the model. Eq (4.27) is the route product "
            "data are assessed by (EN 13381); where this protection's data were not, or phi is large (heavy "
            "protection), run with protection_model = \"conduction\" before relying on the pass.")
    margin = crit[prot] - np.where(governs, cp, lumped_peak)
    differ = [nm for nm, d, m in zip(names, np.abs(lumped_peak - cp), np.abs(margin))
              if d > DIFFERENCE_REPORTED_C or d > m]
    if differ:
        warnings.append(
            f"Eq (4.27) and the conduction model differ by more than {DIFFERENCE_REPORTED_C:g} C or by more than the "
            f"margin for {names_text(differ)}: see conduction_peak_C and model_difference_C; the report shows both "
            "histories.")
    tables = sorted({case.members[i].protection for i in prot
                     if len(case.materials[case.members[i].protection].conductivity_table) > 1})
    if tables:
        warnings.append(
            f"The conduction model reads the conductivity tables of {', '.join(tables)} at each cell's temperature; "
            "product tables (EN 13381) are effective values fitted through eq (4.27) by steel temperature, so this "
            "is a different reading of them, not a more exact one.")
    return out, warnings
