"""The members' thermal inputs as columns, and runs of the heat-transfer kernels over them.

Materials are few and members many: each material's properties are set out once and spread over the
members by index. :meth:`MemberColumns.rows` gives the kernel rows (:class:`steelfire.models.heat.Rows`)
of any selection of members, at a thickness scale, in a fire of a call.
"""

from __future__ import annotations

import numpy as np

from steelfire.errors import InputError
from steelfire.models import heat, stability
from steelfire.models.protection import moisture_delay_s


def emissivity_resultant(code) -> float:
    """Phi eps_m eps_f of EN 1991-1-2 eq (3.3) from the code values."""
    return code["configuration_factor"] * code["emissivity_steel"] * code["emissivity_fire"]


class MemberColumns:
    """The members' fire-independent kernel inputs as arrays, built once per run."""

    def __init__(self, case, members=None):
        members = case.members if members is None else members
        n = len(members)
        names = sorted({m.protection for m in members if m.protection is not None})
        mats = [case.materials[nm] for nm in names]
        k = max([len(mt.conductivity_table) for mt in mats] + [1])
        n_mat = len(mats) + 1  # last row: a placeholder for bare members
        m_rho, m_cp, m_lam20, m_moist = np.ones(n_mat), np.ones(n_mat), np.ones(n_mat), np.zeros(n_mat)
        m_T, m_V, m_N = np.zeros((n_mat, k)), np.ones((n_mat, k)), np.ones(n_mat, dtype=np.int64)
        for r, mt in enumerate(mats):
            m_rho[r], m_cp[r], m_moist[r], m_lam20[r] = (mt.density, mt.specific_heat, mt.credited_moisture_percent,
                                                         mt.conductivity_at_20C)
            tab = mt.conductivity_table
            m_N[r] = len(tab)
            for j, (th, lam) in enumerate(tab):
                m_T[r, j], m_V[r, j] = th, lam
        row = {nm: r for r, nm in enumerate(names)}
        row[None] = n_mat - 1
        self.code = case.code
        self.material_row = np.fromiter((row[m.protection] for m in members), dtype=np.int64, count=n)
        self.bare = self.material_row == n_mat - 1
        self.section_factor_per_m = np.fromiter((m.section_factor_per_m for m in members), dtype=float, count=n)
        self.shadow_ratio = np.fromiter((m.shadow_ratio for m in members), dtype=float, count=n)
        self.i_section = np.fromiter((m.i_section for m in members), dtype=bool, count=n)
        self.thickness_mm = np.fromiter((np.nan if m.thickness_mm is None else m.thickness_mm for m in members),
                                        dtype=float, count=n)
        self.materials = (m_rho, m_cp, m_moist, m_lam20, m_T, m_V, m_N)
        self.lam_max = m_V.max(axis=1)

    def __len__(self):
        return len(self.bare)

    def shadow_factor(self, nominal_fire: bool, select=None) -> np.ndarray:
        """k_sh per member (EN 1993-1-2 eq (4.26a) under nominal fires for I-sections, else (4.26b))."""
        sel = slice(None) if select is None else select
        ratio = self.shadow_ratio[sel]
        if nominal_fire:
            return np.where(self.i_section[sel], self.code["shadow_factor_i_nominal"] * ratio, ratio)
        return ratio

    def rows(self, *, alpha_c, nominal_fire=False, thresholds_C=np.inf, select=None, thickness_mm=None,
             fire=0) -> heat.Rows:
        """Kernel rows of the members ``select`` (indices or a mask; all if None) in fire column ``fire``
        (a number or one per row), at their thicknesses or ``thickness_mm`` (one per row)."""
        sel = np.arange(len(self)) if select is None else np.asarray(select)
        if sel.dtype == bool:
            sel = np.flatnonzero(sel)
        n = len(sel)
        idx, bare = self.material_row[sel], self.bare[sel]
        m_rho, m_cp, m_moist, m_lam20, m_T, m_V, m_N = self.materials
        d_mm = self.thickness_mm[sel] if thickness_mm is None else np.broadcast_to(thickness_mm, (n,))
        d_p = np.where(bare, 1.0, d_mm * 1e-3)
        rho_p, c_p, lam20 = m_rho[idx], m_cp[idx], m_lam20[idx]
        amv = np.where(bare, self.shadow_factor(nominal_fire, sel) * self.section_factor_per_m[sel],
                       self.section_factor_per_m[sel])
        delay = np.where(bare, 0.0, moisture_delay_s(m_moist[idx], rho_p, d_p, lam20))
        return heat.Rows(fire=np.ascontiguousarray(np.broadcast_to(fire, (n,)), dtype=np.int64),
                         bare=np.ascontiguousarray(bare), section_factor_per_m=np.ascontiguousarray(amv),
                         alpha_c=np.ascontiguousarray(np.broadcast_to(alpha_c, (n,)), dtype=float),
                         thickness_m=np.ascontiguousarray(d_p), density=rho_p, specific_heat=c_p,
                         conductivity_C=m_T[idx], conductivity=m_V[idx], conductivity_n=m_N[idx],
                         moisture_delay_s=np.ascontiguousarray(delay),
                         threshold_C=np.ascontiguousarray(np.broadcast_to(thresholds_C, (n,)), dtype=float))


def run(code, time_s, gas_C, rows: heat.Rows, query_idx=None, keep_history=False) -> heat.ThermalRun:
    """The kernels over ``rows`` in the fires ``gas_C`` (T, or T x F) on ``time_s``, with the code's
    emissivities and steel density."""
    return heat.run(heat.Fires(time_s, np.asarray(gas_C, dtype=float).reshape(len(time_s), -1)), rows,
                    emissivity_resultant=emissivity_resultant(code), steel_density_kg_m3=code["steel_density_kg_m3"],
                    query_idx=query_idx, keep_history=keep_history)


def check_bare_step(case, cols: MemberColumns, fires):
    """Refuse bare members for which eq (4.25), stepped explicitly, overshoots the gas in one step.

    ``fires``: (time_s, gas_C, alpha_c, nominal_fire, label) of each fire the members run in; ``label``
    names the fire in the message (:func:`steelfire.models.stability.bare_step_limit_per_m`).
    """
    code = case.code
    if not np.any(cols.bare):
        return
    for time_s, gas_C, alpha_c, nominal_fire, label in fires:
        limit = stability.bare_step_limit_per_m(time_s, gas_C, alpha_c, emissivity_resultant(code),
                                                code["steel_density_kg_m3"])
        ksh_amv = cols.shadow_factor(nominal_fire) * cols.section_factor_per_m
        over = np.flatnonzero(cols.bare & (ksh_amv >= limit))
        if len(over):
            i = int(over[0])
            m = case.members[i]
            k_sh = ksh_amv[i] / m.section_factor_per_m
            raise InputError(
                f"{case.label(i)}.section_factor_per_m", m.section_factor_per_m,
                f"too large for the time step {float(np.max(np.diff(time_s))):g} s: in the {label}, eq (4.25) of "
                f"EN 1993-1-2 stepped explicitly passes the gas temperature in one step unless k_sh Am/V < "
                f"{limit:.4g} 1/m (here k_sh = {k_sh:.3g}; alpha_c = {alpha_c:g} W/(m2 K), "
                f"code.steel_density_kg_m3 = {code['steel_density_kg_m3']:g}, gas up to "
                f"{float(np.max(gas_C)):.0f} C); give a smaller time step, or check the [code] values")


class Exposures:
    """The design fire as the members see it: gas temperatures on the grid, one column per exposure
    (T x F), and the columns each member is checked against (the worst governs)."""

    def __init__(self, time_s, gas_C, member_columns, labels=None):
        self.time_s = time_s
        self.gas_C = np.asarray(gas_C, dtype=float).reshape(len(time_s), -1)
        self.member_columns = [np.asarray(c, dtype=np.int64) for c in member_columns]
        self.labels = labels

    @classmethod
    def uniform(cls, time_s, gas_C, n_members):
        return cls(time_s, gas_C, [[0]] * n_members)

    def rows(self, cols: MemberColumns, select, **kw):
        """(kernel rows of the members ``select`` in every column they see, the member index of each row)."""
        select = np.asarray(select, dtype=np.int64)
        counts = np.array([len(self.member_columns[i]) for i in select], dtype=np.int64)
        which = np.repeat(np.arange(len(select)), counts)
        fire = np.concatenate([self.member_columns[i] for i in select]) if len(select) else np.zeros(0, np.int64)
        thickness = kw.pop("thickness_mm", None)
        thresholds = kw.pop("thresholds_C", np.inf)
        return cols.rows(select=select[which], fire=fire,
                         thickness_mm=None if thickness is None else np.asarray(thickness)[which],
                         thresholds_C=np.broadcast_to(thresholds, (len(select),))[which] if np.ndim(thresholds)
                         else thresholds, **kw), which, counts

    def run_conduction(self, code, cols, select, converged=False, keep_history=False, thickness_mm=None,
                           thresholds_C=np.inf):
        """:func:`conduction_run` of the members ``select`` in every column they see, reduced to the worst per member:
        (peak, peak time, crossing time, last increment, history or None, largest refinement change or NaN,
        the governing column of each member)."""
        select = np.asarray(select, dtype=np.int64)
        counts = np.array([len(self.member_columns[i]) for i in select], dtype=np.int64)
        which = np.repeat(np.arange(len(select)), counts)
        fire = np.concatenate([self.member_columns[i] for i in select]) if len(select) else np.zeros(0, np.int64)
        d = None if thickness_mm is None else np.asarray(thickness_mm)[which]
        thr = np.broadcast_to(thresholds_C, (len(select),))[which] if np.ndim(thresholds_C) else thresholds_C
        r = conduction_run(code, self.time_s, self.gas_C, cols, select[which], fire, d, thr, converged, keep_history)
        order = np.lexsort((-r.peak_C, which))
        gov = order[np.searchsorted(which[order], np.arange(len(select)))]
        change = np.fmax(r.cells_change_C, r.substeps_change_C)[gov]
        return (r.peak_C[gov], r.peak_time_s[gov], r.crossing_time_s[gov], r.last_increment_C[gov],
                r.history_C[:, gov] if keep_history else None, change, fire[gov])

    def run(self, code, cols: MemberColumns, select=None, keep_history=False, query_idx=None, **kw):
        """The members ``select`` (all if None) through the kernels in every column they see, reduced to one
        result per member: the row with the highest peak governs (its peak, time, last step, history)."""
        select = np.arange(len(cols)) if select is None else np.asarray(select, dtype=np.int64)
        rows, which, counts = self.rows(cols, select, **kw)
        r = run(code, self.time_s, self.gas_C, rows, keep_history=keep_history, query_idx=query_idx)
        if np.all(counts == 1):
            return r, rows.fire
        starts = np.concatenate([[0], np.cumsum(counts)[:-1]])
        order = np.lexsort((-r.peak_C, which))          # by member, highest peak first
        gov = order[np.searchsorted(which[order], np.arange(len(select)))]
        assert np.all(which[gov] == np.arange(len(select))) and len(starts) == len(select)
        hist = r.history_C[:, gov] if keep_history else r.history_C
        out = heat.ThermalRun(r.peak_C[gov], r.peak_time_s[gov], r.crossing_time_s[gov], r.at_query_C[gov],
                              r.last_increment_C[gov], np.maximum.reduceat(r.excess_C, starts), hist)
        return out, rows.fire[gov]


def conduction_run(code, time_s, gas_C, cols: MemberColumns, select, fire=0, thickness_mm=None, thresholds_C=np.inf,
                   converged=False, keep_history=False):
    """The 1-D conduction model (:mod:`steelfire.models.conduction`) for the protected members ``select``, each
    in its fire column ``fire`` of ``gas_C`` (T x F); ``converged``: refined to 0.5 C per member, else at the
    model's least resolution (8 cells)."""
    from steelfire.models import conduction

    select = np.asarray(select, dtype=np.int64)
    rows = cols.rows(alpha_c=0.0, select=select, fire=fire, thickness_mm=thickness_mm, thresholds_C=thresholds_C)
    moist = cols.materials[2][cols.material_row[select]]
    gas = np.ascontiguousarray(np.asarray(gas_C, dtype=float).reshape(len(time_s), -1))
    inputs = conduction.ConductionInputs(
        np.asarray(time_s, dtype=float), gas, rows.fire, rows.section_factor_per_m, rows.thickness_m, rows.density,
        rows.specific_heat, np.ascontiguousarray(rows.conductivity_C), np.ascontiguousarray(rows.conductivity),
        rows.conductivity_n, np.ascontiguousarray(moist, dtype=float), rows.threshold_C, float(code["steel_density_kg_m3"]))
    if converged:
        return conduction.run_converged(inputs, keep_history=keep_history)
    return conduction.run(inputs, keep_history=keep_history)
