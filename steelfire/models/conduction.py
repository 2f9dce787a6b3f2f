"""Protected steel by 1-D transient conduction through the protection layer.

A second model beside the lumped eq (4.27) of EN 1993-1-2 4.2.5.2 (:mod:`steelfire.models.heat`).
Eq (4.27) is a closed-form approximation of the same physics; its term (e^(phi/10) - 1) d theta_g
and its rule "d theta_a >= 0 while the gas heats" add heat that no conduction supplies when the gas
temperature falls or jitters, so with heavy protection the steel can end hotter than any gas it has
seen. This model solves the heat equation in the layer itself and cannot do that: the steel stays
at or below the running maximum of the gas temperature (the discrete maximum principle, below).

The model, per unit area of protection (the inner face area A_p):

* a plane layer of thickness d_p cut into n cells of width h = d_p / n (finite volumes, one
  temperature at each cell centre); density rho_p and specific heat c_p constant, conductivity
  lambda_p constant or tabulated by temperature and taken at each cell's own temperature (held at
  the table's ends); between two cells the conductance is the harmonic mean
  2 lambda_i lambda_(i+1) / (h (lambda_i + lambda_(i+1))), from a cell centre to a face 2 lambda_i / h;
* outer face at the gas temperature (the assumption of eq (4.27)), or, as an option, behind a surface
  coefficient alpha_c + eps sigma (T_g^2 + T_s^2)(T_g + T_s) (EN 1991-1-2 3.1, eq (3.1)-(3.3) with
  Phi = 1; T in K with 273, the radiative part linearised about the surface temperature of the
  previous substep);
* inner face in perfect contact with the steel, lumped: heat capacity per unit area
  rho_a c_a(theta_a) V/A_p (V/A_p = 1 / section factor), c_a by EN 1993-1-2 eq (3.2a)-(3.2d) at
  the steel temperature at the start of the substep;
* free water p [% of dry weight] evaporates at 100 C, absorbing L = 2.257 MJ/kg (latent heat of
  vaporisation of water at 100 C and 1 atm, steam tables, from memory); its sensible heat and the
  vapour's migration are neglected, and evaporation is irreversible (a cell that cools below 100 C
  keeps the water it has left and does not take back the vapour).

Time integration is backward Euler with one tridiagonal (Thomas) solve per member per substep;
the conductivities, c_a and the surface coefficient are lagged (taken at the start of the
substep, not iterated). Free water is handled by the enthalpy method: each cell carries its
temperature and the latent heat left in it; the solve gives a cell on the 100 C plateau the
apparent heat capacity c_dry + (latent heat left) x ``HOLD_PER_C`` (it is held near 100 C),
then the energy the solve gave each cell, C (T* - T), is booked first to evaporation and the rest to
sensible heat, and the temperature recovered from it (the temperature-correction scheme of
Q.T. Pham, Int. J. Heat Mass Transfer 28 (1985) 2079-2084, from memory). Every joule that enters
through the face is in the protection, the water or the steel (to rounding).

Scope: a plane layer, as eq (4.27) assumes (the protection thin beside the section; board or sprayed
contour and box protection); any grid step (backward Euler has no stability limit; accuracy by the
cells and substeps, which :func:`run_converged` checks); c_a held at 650 J/(kg K) above 1200 C as
eq (3.2d) and heat.py do.

Maximum principle. With positive capacities and conductances the backward-Euler matrix is an
M-matrix: each solved temperature is a weighted mean of the temperatures at the start of the
substep and of the gas at its end, so none exceeds the running maximum M of the gas (and 20 C).
The enthalpy update cannot raise a cell above its solved temperature except where a cell on the
plateau runs out of water; if that would lift it above its own old temperature and its neighbours'
new ones, the member's substep is solved again with the plateau capacity
c_dry + W / max(a (M - 100), 1e-9), a = dt G / (c_dry + dt G) (G the cell's two conductances): a is
the bound on how far the cell can rise in that solve, so the update then leaves every cell at or
below its solved temperature, hence at or below M (proof in docs/conduction.md). The steel has no
update step (its lagged capacity is used as is).

The batch kernels run many members against many fires, chunks of members side by side (the member
loops innermost, branch-free), one compiled call per chunk, the chunks spread over the cores by a pool
of threads (the kernels release the GIL); a run compiles only the kernels its members need.
Dry members with a constant conductivity and the face at the gas temperature take a fast path: their
matrix changes only in the steel's row, so the elimination factors of the layer are computed when
the step length changes and each substep costs two passes over the cells (three multiplies or
multiply-adds per cell) and one division. Its plain-Python twin is ``tests/twins_conduction.py`` (1e-9 relative).
"""

from __future__ import annotations

import itertools
import math
from typing import NamedTuple

import numba as nb
import numpy as np

from steelfire.errors import InputError
from steelfire.models.heat import (BATCH_MATH, KELVIN, SPECIFIC_HEAT_TERMS, STEFAN_BOLTZMANN, _announce_compile,
                                   _finish, _knots, _on_threads, _track, heat_capacity_fraction)
from steelfire.models.steel import STEEL_DENSITY_KG_M3

#: Latent heat of vaporisation of water at 100 C, 1 atm [J/kg] (steam tables, from memory: 2256.5 kJ/kg).
LATENT_HEAT_WATER_J_KG = 2.257e6
#: Temperature at which the free water evaporates [C] (boiling point at 1 atm).
EVAPORATION_C = 100.0
#: Least number of cells across the layer.
MIN_CELLS = 8
#: Apparent heat capacity of a cell on the 100 C plateau in the solve: c_dry + W x this [1/C], W the
#: latent heat left in it (the latent heat spread over 1/1000 C): large, so that the cell is held near
#: 100 C in the solve; the enthalpy update books the energy exactly whatever its value (scheme parameter).
HOLD_PER_C = 1000.0
#: Least span [C] of the safe re-solve (keeps the plateau capacity finite where M is 100 C).
SAFE_SPAN_MIN_C = 1.0e-9
#: Members advanced side by side in one chunk (fast path; other members), see the kernel.
CHUNK_FAST = 128
CHUNK_GENERAL = 128
#: Convergence tolerance of :func:`run_converged` on the steel temperature [C].
CONVERGENCE_TOLERANCE_C = 0.5


class ConductionInputs(NamedTuple):
    """Members and fires of one kernel call (SI units; temperatures in C).

    Attributes
    ----------
    time_s : (T,) float
        Analysis grid [s], increasing, starting where steel and protection are at 20 C.
    gas_C : (T, F) float, C-contiguous
        Gas temperature of F fires on the grid [C].
    fire_index : (N,) int64
        The gas column each member sees.
    section_factor_per_m : (N,)
        A_p/V [1/m].
    thickness_m : (N,)
        Protection thickness d_p [m].
    density : (N,)
        rho_p [kg/m3].
    specific_heat : (N,)
        c_p [J/(kg K)].
    conductivity_C : (N, K)
        Temperatures of the conductivity table [C], increasing; first ``conductivity_n`` used.
    conductivity : (N, K)
        lambda_p at those temperatures [W/(m K)].
    conductivity_n : (N,) int64
        Knots used per member (1: constant conductivity).
    moisture_percent : (N,)
        Free water p [% of dry weight].
    threshold_C : (N,)
        Steel temperature whose first crossing is reported [C] (e.g. the critical temperature).
    steel_density_kg_m3 : float
        rho_a [kg/m3], EN 1993-1-2 3.2.2: 7850.
    """

    time_s: np.ndarray
    gas_C: np.ndarray
    fire_index: np.ndarray
    section_factor_per_m: np.ndarray
    thickness_m: np.ndarray
    density: np.ndarray
    specific_heat: np.ndarray
    conductivity_C: np.ndarray
    conductivity: np.ndarray
    conductivity_n: np.ndarray
    moisture_percent: np.ndarray
    threshold_C: np.ndarray
    steel_density_kg_m3: float = STEEL_DENSITY_KG_M3


class SurfaceBoundary(NamedTuple):
    """Heat transfer from the gas to the protection's face, EN 1991-1-2 3.1 (Phi = 1).

    convection_coefficient : alpha_c [W/(m2 K)] (25 standard curve, 35 natural fires, 50 hydrocarbon).
    emissivity : resultant emissivity eps_m eps_f [-] of the protection's surface and the fire.
    """

    convection_coefficient: float
    emissivity: float


class ConductionResult(NamedTuple):
    """Per member (N,): the outputs of a run.

    peak_C, peak_time_s : peak steel temperature on the grid [C] and the first grid time it is reached [s].
    crossing_time_s : first time the steel reaches ``threshold_C``, linear in the step [s]; NaN if never.
    last_increment_C : steel temperature change over the last grid step [C].
    history_C : (T, N) steel temperature on the grid [C] if asked for, else (0, 0).
    cells, substeps : resolution used (cells across the layer, backward-Euler substeps per grid step).
    converged : the peak moved by less than the tolerance at twice the cells and at twice the substeps
        (:func:`run_converged`); True where a fixed resolution was asked for (not checked).
    cells_change_C, substeps_change_C : those two changes of the peak [C] (NaN if not checked).
    profile_C : (max cells, N) temperatures of the cells at the last grid time [C], from the face
        inwards, cell c centred at (c + 1/2) d_p / cells; NaN below a member's own cell count.
    """

    peak_C: np.ndarray
    peak_time_s: np.ndarray
    crossing_time_s: np.ndarray
    last_increment_C: np.ndarray
    history_C: np.ndarray
    cells: np.ndarray
    substeps: np.ndarray
    converged: np.ndarray
    cells_change_C: np.ndarray
    substeps_change_C: np.ndarray
    profile_C: np.ndarray


# ---------------------------------------------------------------------------------------------
# kernel
#
# Tridiagonal solves in the normalised Thomas form: with cell c coupled to its left by a_c = dt G_left
# and to its right by b_c = dt G_right, pivot p_c = C_c + a_c + b_c - a_c c'_(c-1), c'_c = b_c / p_c,
# d'_c = (C_c T_c + a_c d'_(c-1)) / p_c (the gas a_0 theta_g in the first row); the steel row then
# gives theta_a and the cells follow back from x_c = d'_c + c'_c x_(c+1). All coefficients are
# positive and every pivot exceeds its row's coupling, so no pivoting is needed.


def _chunking(n_m, nt, most):
    """(number of chunks, members per chunk): at most ``most`` members a chunk, a multiple of 4 (the
    lanes of an AVX2 vector), as many chunks as a multiple of the ``nt`` threads where that keeps them
    full (as heat._chunking)."""
    nt = max(nt, 1)
    n_chunks = (n_m + most - 1) // most
    n_chunks = ((n_chunks + nt - 1) // nt) * nt
    width = max((n_m + n_chunks - 1) // n_chunks, 1)
    width = ((width + 3) // 4) * 4
    return (n_m + width - 1) // width, width


@nb.njit(cache=True, inline="always")
def _lambda_table(th, tk, vk, sk, n_k, lam, n, w):
    """lambda at each cell's temperature ``th`` (n x w) into ``lam``: linear in the knot segment, ends held.
    ``tk``/``vk``/``sk``: knot temperature (+inf past the member's last), value, slope after it (0 past
    the last)."""
    for c in range(n):
        for j in range(w):
            lam[c, j] = vk[0, j] + sk[0, j] * (max(th[c, j], tk[0, j]) - tk[0, j])
        for k in range(1, n_k):
            for j in range(w):
                x = th[c, j]
                cand = vk[k, j] + sk[k, j] * (x - tk[k, j])
                lam[c, j] = cand if x > tk[k, j] else lam[c, j]


@nb.njit(cache=True, inline="always")
def _member_state(w, threshold_C, apv, lo):
    """Per member of a chunk: steel (20 C), peak, its step, crossing (see heat._track), last increment,
    threshold, A_p/V, steel at the start of the grid step, gas at both ends of the grid step, gas now."""
    thr = np.empty(w)
    ap = np.empty(w)
    for j in range(w):
        thr[j] = threshold_C[lo + j]
        ap[j] = apv[lo + j]
    return (np.full(w, 20.0), np.full(w, 20.0), np.zeros(w, dtype=np.int64), np.full(w, np.inf),
            np.full(w, np.inf), np.full(w, np.inf), np.zeros(w), thr, ap, np.empty(w), np.empty(w),
            np.empty(w), np.empty(w))


@nb.njit(cache=True, inline="always")
def _grid_step_start(i, gas_C, fire_index, lo, w, ts, ts_prev, g0, g1):
    for j in range(w):
        f = fire_index[lo + j]
        g0[j] = gas_C[i, f]
        g1[j] = gas_C[i + 1, f]
        ts_prev[j] = ts[j]


@nb.njit(cache=True, inline="always")
def _grid_step_end(i, lo, w, ts, ts_prev, thr, pk, pki, ci, cx, cn, dl, hist, keep_history):
    i_f = float(i)
    for j in range(w):
        new = ts[j]
        dl[j] = new - ts_prev[j]
        pki[j], pk[j], ci[j], cx[j], cn[j] = _track(i, i_f, ts_prev[j], new, thr[j], pk[j], pki[j], ci[j], cx[j],
                                                    cn[j])
    if keep_history:
        for j in range(w):
            hist[i + 1, lo + j] = ts[j]


@nb.njit(cache=True, nogil=True, error_model="numpy", fastmath=BATCH_MATH)
def _fast_chunk(time_s, gas_C, fire_index, apv, d_p, rho_p, c_p, lam_v, threshold_C, rho_a, n, substeps, lo, w,
                keep_history, ca_k, peak, peak_t, cross, last, hist, prof):
    """Members lo .. lo + w - 1: dry, constant conductivity, face at the gas temperature.

    Every conductance is G = lambda / h inside the layer and 2 G from a cell centre to a face, the
    cells' capacities C = rho_p c_p h: with a = dt G, the pivots and c' of the layer depend on dt only
    and are computed when it changes. With q_c = a / p_c: d'_0 = q_0 (mu T_0 + 2 theta_g),
    d'_c = q_c (mu T_c + d'_(c-1)), mu = C / a; c'_c = q_c, and 2 q_(n-1) for the last cell (coupled to
    the steel by 2 a); theta_a = (C_a theta_a + 2 a d'_(n-1)) / (C_a + 2 a (1 - 2 q_(n-1))).
    """
    n_t = time_s.shape[0]
    ts, pk, pki, ci, cx, cn, dl, thr, ap, ts_prev, g0, g1, tg = _member_state(w, threshold_C, apv, lo)
    th = np.full((n, w), 20.0)
    dd = np.empty((n, w))
    q = np.empty((n, w))
    mu = np.empty(w)
    a2 = np.empty(w)          # 2 a: coupling of the face and of the steel
    es = np.empty(w)          # 2 a (1 - 2 q_(n-1))
    if keep_history:
        for j in range(w):
            hist[0, lo + j] = 20.0
    dt_fact = -1.0
    for i in range(n_t - 1):
        _grid_step_start(i, gas_C, fire_index, lo, w, ts, ts_prev, g0, g1)
        dt = (time_s[i + 1] - time_s[i]) / substeps
        if dt != dt_fact:
            for j in range(w):
                m = lo + j
                h = d_p[m] / n
                a = dt * lam_v[m, 0] / h
                cd = rho_p[m] * c_p[m] * h
                p = cd + 3.0 * a
                q[0, j] = a / p
                for c in range(1, n):
                    b = 2.0 * a if c == n - 1 else a
                    p = cd + a + b - a * q[c - 1, j]
                    q[c, j] = a / p
                mu[j] = cd / a
                a2[j] = 2.0 * a
                es[j] = 2.0 * a * (1.0 - 2.0 * q[n - 1, j])
            dt_fact = dt
        for k in range(1, substeps + 1):
            frac = k / substeps
            for j in range(w):
                tg[j] = g0[j] + (g1[j] - g0[j]) * frac
            for j in range(w):
                dd[0, j] = q[0, j] * (mu[j] * th[0, j] + 2.0 * tg[j])
            for c in range(1, n):
                for j in range(w):
                    dd[c, j] = q[c, j] * (mu[j] * th[c, j] + dd[c - 1, j])
            for j in range(w):
                x = ts[j]
                num, den = heat_capacity_fraction(x, rho_a, ca_k)    # c_a rho_a = num / den
                f = den * ap[j]                                      # steel row times den A_p/V
                ts[j] = (num * x + f * a2[j] * dd[n - 1, j]) / (num + f * es[j])
            for j in range(w):
                th[n - 1, j] = dd[n - 1, j] + 2.0 * q[n - 1, j] * ts[j]
            for c in range(n - 2, -1, -1):
                for j in range(w):
                    th[c, j] = dd[c, j] + q[c, j] * th[c + 1, j]
        _grid_step_end(i, lo, w, ts, ts_prev, thr, pk, pki, ci, cx, cn, dl, hist, keep_history)
    _finish(time_s, lo, w, pk, pki, dl, ci, cx, cn, thr, peak, peak_t, last, cross)
    for c in range(n):
        for j in range(w):
            prof[c, lo + j] = th[c, j]


@nb.njit(cache=True, inline="always", error_model="numpy", fastmath=BATCH_MATH)
def _general_solve(th, ts, cap, g, tg, dt, ap, rho_a, ca_k, cp, dp, x, n, w):
    """One backward-Euler solve of the layer and the steel, all members of the chunk.

    Cell c has conductance g[c] to its left (g[0]: the face) and g[c + 1] to its right (g[n]: the
    steel), heat capacity cap[c] [J/(m2 K)]; ``tg`` the gas at the end of the substep. Solution
    into ``x`` (n + 1 rows, the last the steel)."""
    for j in range(w):
        a = dt * g[0, j]
        b = dt * g[1, j]
        ip = 1.0 / (cap[0, j] + a + b)
        cp[0, j] = b * ip
        dp[0, j] = (cap[0, j] * th[0, j] + a * tg[j]) * ip
    for c in range(1, n):
        for j in range(w):
            a = dt * g[c, j]
            b = dt * g[c + 1, j]
            ip = 1.0 / (cap[c, j] + a + b - a * cp[c - 1, j])
            cp[c, j] = b * ip
            dp[c, j] = (cap[c, j] * th[c, j] + a * dp[c - 1, j]) * ip
    for j in range(w):
        a = dt * g[n, j]
        num, den = heat_capacity_fraction(ts[j], rho_a, ca_k)   # c_a rho_a = num / den
        f = den * ap[j]                                         # steel row times den A_p/V
        x[n, j] = (num * ts[j] + f * a * dp[n - 1, j]) / (num + f * a * (1.0 - cp[n - 1, j]))
    for c in range(n - 1, -1, -1):
        for j in range(w):
            x[c, j] = dp[c, j] + cp[c, j] * x[c + 1, j]


@nb.njit(cache=True, inline="always", error_model="numpy", fastmath=BATCH_MATH)
def _water_update(th, wl, cap, x, tg, plat, cd, icd, tn, wn, bad, n, w):
    """Enthalpy update of wet cells: the energy above the dry state at 100 C goes first to evaporation,
    the rest to sensible heat. Cells on the plateau (``plat``, at 100 C) have cap (x - 100) above it,
    the others c_dry (x - 100). ``bad[j]``: a plateau cell ended above its own old temperature and the
    solved temperatures of itself and both neighbours."""
    for j in range(w):
        bad[j] = False
    for c in range(n):
        for j in range(w):
            wj = wl[c, j]
            on = plat[c, j]
            xc = x[c, j]
            q = (cap[c, j] if on else cd[j]) * (xc - EVAPORATION_C)
            ev = min(max(q, 0.0), wj)
            wn[c, j] = wj - ev
            conv = EVAPORATION_C + (q - ev) * icd[j]
            tn[c, j] = conv if ((wj > 0.0) & ((ev > 0.0) | on)) else xc
            left = tg[j] if c == 0 else x[c - 1, j]
            hi = max(max(th[c, j], left), max(xc, x[c + 1, j]))
            bad[j] = bad[j] | (on & (tn[c, j] > hi))


@nb.njit(cache=True, nogil=True, error_model="numpy", fastmath=BATCH_MATH)
def _general_chunk(time_s, gas_C, fire_index, apv, d_p, rho_p, c_p, lam_T, lam_v, lam_n, latent_m3, threshold_C,
                   rho_a, n, substeps, wet, surface, alpha_c, eps_res, lo, w, keep_history, ca_k,
                   peak, peak_t, cross, last, hist, prof):
    """Members lo .. lo + w - 1, any kind: conductivities by table, surface boundary, free water."""
    n_t = time_s.shape[0]
    n_k = lam_T.shape[1]
    er = eps_res * STEFAN_BOLTZMANN
    ts, pk, pki, ci, cx, cn, dl, thr, ap, ts_prev, g0, g1, tg = _member_state(w, threshold_C, apv, lo)
    hh = np.empty(w)                 # cell width [m]
    cd = np.empty(w)                 # dry heat capacity of a cell [J/(m2 K)]
    icd = np.empty(w)                # its reciprocal (wet members: cd > 0)
    mrun = np.full(w, 20.0)          # running maximum of the gas (and of the start, 20 C) [C]
    tsurf = np.full(w, 20.0)         # face temperature (surface boundary) [C]
    heff = np.empty(w)               # surface coefficient alpha_c + h_r [W/(m2 K)]
    bad = np.zeros(w, dtype=np.bool_)
    th = np.full((n + 1, w), 20.0)   # cells (row n unused): swapped with x or tn after each substep
    x = np.empty((n + 1, w))
    cp = np.empty((n, w))
    dp = np.empty((n, w))
    lam = np.empty((n, w))
    g = np.empty((n + 1, w))         # conductance left of cell c [W/(m2 K)]; g[n]: last cell to the steel
    cap = np.empty((n, w))
    nw = n if wet else 0
    wl = np.zeros((nw, w))           # latent heat left in a cell [J/m2]
    plat = np.zeros((nw, w), dtype=np.bool_)
    tn = np.empty((nw + 1 if wet else 0, w))
    wn = np.empty((nw, w))
    tk = np.empty((n_k, w))
    vk = np.empty((n_k, w))
    sk = np.empty((n_k, w))
    for j in range(w):
        m = lo + j
        hh[j] = d_p[m] / n
        cd[j] = rho_p[m] * c_p[m] * hh[j]
        icd[j] = 1.0 / cd[j] if cd[j] > 0.0 else 0.0
        _knots(lam_T, lam_v, lam_n[m], m, j, tk, vk, sk)
        for c in range(n):
            lam[c, j] = lam_v[m, 0]
            cap[c, j] = cd[j]
            if wet:
                wl[c, j] = latent_m3[m] * hh[j]
        gi = lam_v[m, 0] / hh[j]
        g[0, j] = 2.0 * gi
        g[n, j] = 2.0 * gi
        for c in range(1, n):
            g[c, j] = gi
    if keep_history:
        for j in range(w):
            hist[0, lo + j] = 20.0
    water = wet                      # some water left in the chunk
    for i in range(n_t - 1):
        _grid_step_start(i, gas_C, fire_index, lo, w, ts, ts_prev, g0, g1)
        dt = (time_s[i + 1] - time_s[i]) / substeps
        for k in range(1, substeps + 1):
            frac = k / substeps
            for j in range(w):
                tg[j] = g0[j] + (g1[j] - g0[j]) * frac
            if water:
                for j in range(w):
                    mrun[j] = max(mrun[j], tg[j])
            # properties at the start of the substep (lagged)
            if n_k > 1:
                _lambda_table(th, tk, vk, sk, n_k, lam, n, w)
                for j in range(w):
                    h2 = 2.0 / hh[j]
                    g[0, j] = h2 * lam[0, j]
                    g[n, j] = h2 * lam[n - 1, j]
                for c in range(1, n):
                    for j in range(w):
                        la = lam[c - 1, j]
                        lb = lam[c, j]
                        g[c, j] = 2.0 * la * lb / (hh[j] * (la + lb))
            if surface:
                for j in range(w):
                    gh = 2.0 * lam[0, j] / hh[j]
                    a_ = tg[j] + KELVIN
                    b_ = tsurf[j] + KELVIN
                    he = alpha_c + er * (a_ * a_ + b_ * b_) * (a_ + b_)
                    heff[j] = he
                    g[0, j] = he * gh / (he + gh)
            if water:
                for c in range(n):
                    for j in range(w):
                        on = (wl[c, j] > 0.0) & (th[c, j] >= EVAPORATION_C)
                        plat[c, j] = on
                        cap[c, j] = cd[j] + wl[c, j] * HOLD_PER_C if on else cd[j]
                _general_solve(th, ts, cap, g, tg, dt, ap, rho_a, ca_k, cp, dp, x, n, w)
                _water_update(th, wl, cap, x, tg, plat, cd, icd, tn, wn, bad, n, w)
                any_bad = False
                for j in range(w):
                    any_bad = any_bad | bad[j]
                if any_bad:
                    # again with the plateau capacity from the bound a (M - 100) on the cell's rise;
                    # taken by the members that need it
                    capb = np.empty((n, w))
                    for c in range(n):
                        for j in range(w):
                            gs = dt * (g[c, j] + g[c + 1, j])
                            span = max(gs / (cd[j] + gs) * (mrun[j] - EVAPORATION_C), SAFE_SPAN_MIN_C)
                            capb[c, j] = cd[j] + wl[c, j] / span if plat[c, j] else cd[j]
                    x2 = np.empty((n + 1, w))
                    tn2 = np.empty((n, w))
                    wn2 = np.empty((n, w))
                    bad2 = np.zeros(w, dtype=np.bool_)
                    _general_solve(th, ts, capb, g, tg, dt, ap, rho_a, ca_k, cp, dp, x2, n, w)
                    _water_update(th, wl, capb, x2, tg, plat, cd, icd, tn2, wn2, bad2, n, w)
                    for j in range(w):
                        if bad[j]:
                            for c in range(n + 1):
                                x[c, j] = x2[c, j]
                            for c in range(n):
                                tn[c, j] = tn2[c, j]
                                wn[c, j] = wn2[c, j]
            else:
                _general_solve(th, ts, cap, g, tg, dt, ap, rho_a, ca_k, cp, dp, x, n, w)
            if surface:
                # face temperature from the solved first cell (flux continuity), for the next substep
                for j in range(w):
                    gh = 2.0 * lam[0, j] / hh[j]
                    tsurf[j] = (heff[j] * tg[j] + gh * x[0, j]) / (heff[j] + gh)
            for j in range(w):
                ts[j] = x[n, j]
            if water:
                th, tn = tn, th
                wl, wn = wn, wl
                left = False
                for c in range(n):
                    for j in range(w):
                        left = left | (wl[c, j] > 0.0)
                if not left:
                    # all the chunk's water is gone: on as dry members
                    water = False
                    for c in range(n):
                        for j in range(w):
                            cap[c, j] = cd[j]
            else:
                th, x = x, th
        _grid_step_end(i, lo, w, ts, ts_prev, thr, pk, pki, ci, cx, cn, dl, hist, keep_history)
    _finish(time_s, lo, w, pk, pki, dl, ci, cx, cn, thr, peak, peak_t, last, cross)
    for c in range(n):
        for j in range(w):
            prof[c, lo + j] = th[c, j]


def _conduction_chunks(time_s, gas_C, fire_index, apv, d_p, rho_p, c_p, lam_T, lam_v, lam_n, latent_m3,
                       threshold_C, rho_a, n, substeps, fast, wet, surface, alpha_c, eps_res, keep_history,
                       n_threads, chunk, ca_k):
    """All members of one kind and resolution: chunks of members side by side, taken by ``n_threads``
    threads as they finish one (:func:`steelfire.models.heat._on_threads`). Returns peak, its time,
    crossing time, last increment, history (T x N or 0 x 0), cells' temperatures at the end (n x N).

    Each chunk is one call of a compiled kernel that releases the GIL (:func:`_fast_chunk` for dry members
    with a constant conductivity and the face at the gas, :func:`_general_chunk` for the others), so a run
    compiles only the kernel its members need."""
    n_t = time_s.shape[0]
    n_m = apv.shape[0]
    peak = np.empty(n_m)
    peak_t = np.empty(n_m)
    cross = np.full(n_m, np.nan)
    last = np.zeros(n_m)
    hist = np.empty((n_t, n_m)) if keep_history else np.empty((0, 0))
    prof = np.empty((n, n_m))
    n_chunks, width = _chunking(n_m, n_threads, chunk)
    # the kernels' arguments before and after the chunk's (lo, w)
    if fast:
        kernel = _fast_chunk
        before = (time_s, gas_C, fire_index, apv, d_p, rho_p, c_p, lam_v, threshold_C, rho_a, n, substeps)
    else:
        kernel = _general_chunk
        before = (time_s, gas_C, fire_index, apv, d_p, rho_p, c_p, lam_T, lam_v, lam_n, latent_m3, threshold_C,
                  rho_a, n, substeps, wet, surface, alpha_c, eps_res)
    after = (keep_history, ca_k, peak, peak_t, cross, last, hist, prof)
    _announce_compile(kernel, before + (0, 1) + after)

    tickets = itertools.count()   # next() on it is atomic: each chunk goes to one thread

    def work():
        c = next(tickets)
        while c < n_chunks:
            lo = c * width
            kernel(*before, lo, min(lo + width, n_m) - lo, *after)
            c = next(tickets)

    _on_threads(work, min(n_threads, n_chunks))
    return peak, peak_t, cross, last, hist, prof


# ---------------------------------------------------------------------------------------------
# Python interface


def _field_check(name, arr, ok, allowed):
    bad = np.nonzero(~ok)[0]
    if bad.size:
        i = int(bad[0])
        raise InputError(f"{name}[{i}]", arr[i].item(), allowed)


def validate(inputs: ConductionInputs) -> ConductionInputs:
    """Check shapes and values once, at the boundary; returns the inputs as the kernel wants them
    (float64, int64, C-contiguous). Raises :class:`steelfire.errors.InputError` naming the field."""
    t = np.ascontiguousarray(inputs.time_s, dtype=float)
    if t.ndim != 1 or t.shape[0] < 2 or not np.all(np.isfinite(t)) or not np.all(np.diff(t) > 0.0):
        raise InputError("time_s", t.shape if t.ndim != 1 else "not increasing or not finite",
                         "a 1-D grid of at least 2 finite, increasing times [s]")
    gas = np.ascontiguousarray(inputs.gas_C, dtype=float)
    if gas.ndim == 1:
        gas = gas.reshape(-1, 1)
    if gas.ndim != 2 or gas.shape[0] != t.shape[0]:
        raise InputError("gas_C", gas.shape, f"an array of shape (T, F) with T = {t.shape[0]} (the grid)")
    if not np.all(np.isfinite(gas) & (gas > -KELVIN)):
        raise InputError("gas_C", "not finite or below -273 C", "finite gas temperatures above -273 C")
    n_f = gas.shape[1]
    fi = np.asarray(inputs.fire_index)
    n = fi.shape[0] if fi.ndim == 1 else -1
    if n < 1 or not np.issubdtype(fi.dtype, np.integer):
        raise InputError("fire_index", fi.shape, "a 1-D integer array, one gas column per member")
    fi = np.ascontiguousarray(fi, dtype=np.int64)
    _field_check("fire_index", fi, (fi >= 0) & (fi < n_f), f"a column of gas_C: 0 to {n_f - 1}")

    def col(name, value, ok_fn, allowed, finite=True):
        a = np.ascontiguousarray(np.broadcast_to(np.asarray(value, dtype=float), (n,)), dtype=float)
        _field_check(name, a, (np.isfinite(a) if finite else ~np.isnan(a)) & ok_fn(a), allowed)
        return a

    apv = col("section_factor_per_m", inputs.section_factor_per_m, lambda a: a > 0.0, "a number > 0 [1/m]")
    d_p = col("thickness_m", inputs.thickness_m, lambda a: a > 0.0, "a number > 0 [m]")
    rho = col("density", inputs.density, lambda a: a >= 0.0, "a number >= 0 [kg/m3]")
    cp = col("specific_heat", inputs.specific_heat, lambda a: a >= 0.0, "a number >= 0 [J/(kg K)]")
    moist = col("moisture_percent", inputs.moisture_percent, lambda a: a >= 0.0, "a number >= 0 [% of dry weight]")
    _field_check("moisture_percent", moist, (moist == 0.0) | ((rho > 0.0) & (cp > 0.0)),
                 "0 where density or specific_heat is 0 (no heat capacity to hold the water at 100 C)")
    thr = col("threshold_C", inputs.threshold_C, lambda a: np.ones(a.shape, dtype=bool),
              "a temperature [C] (+inf: none)", finite=False)
    lam_n = np.ascontiguousarray(np.broadcast_to(np.asarray(inputs.conductivity_n), (n,)), dtype=np.int64)
    lam_T = np.ascontiguousarray(np.asarray(inputs.conductivity_C, dtype=float).reshape(n, -1))
    lam_v = np.ascontiguousarray(np.asarray(inputs.conductivity, dtype=float).reshape(n, -1))
    if lam_T.shape != lam_v.shape:
        raise InputError("conductivity", lam_v.shape, f"the shape of conductivity_C, {lam_T.shape}")
    k = lam_T.shape[1]
    _field_check("conductivity_n", lam_n, (lam_n >= 1) & (lam_n <= k), f"1 to {k} knots")
    used = np.arange(k)[None, :] < lam_n[:, None]
    with np.errstate(invalid="ignore"):
        bad_t = (np.any(used & ~np.isfinite(lam_T), axis=1)
                 | np.any(used[:, 1:] & ~(np.diff(lam_T, axis=1) > 0.0), axis=1))
        bad_v = np.any(used & ~(np.isfinite(lam_v) & (lam_v > 0.0)), axis=1)
    for name, arr, bad, allowed in (("conductivity_C", lam_T, bad_t, "finite, increasing temperatures [C]"),
                                    ("conductivity", lam_v, bad_v, "conductivities > 0 [W/(m K)]")):
        if bad.any():
            m = int(np.nonzero(bad)[0][0])
            raise InputError(f"{name}[{m}]", arr[m, :lam_n[m]].tolist(), allowed)
    rho_a = inputs.steel_density_kg_m3
    if not (isinstance(rho_a, (int, float)) and math.isfinite(rho_a) and rho_a > 0.0):
        raise InputError("steel_density_kg_m3", rho_a, "a number > 0 [kg/m3]")
    return ConductionInputs(t, gas, fi, apv, d_p, rho, cp, lam_T, lam_v, lam_n, moist, thr, float(rho_a))


def _resolution(value, n, name, least):
    a = np.ascontiguousarray(np.broadcast_to(np.asarray(value), (n,)))
    if not np.issubdtype(a.dtype, np.integer):
        raise InputError(name, value, f"a whole number >= {least}")
    a = a.astype(np.int64)
    _field_check(name, a, a >= least, f"a whole number >= {least}")
    return a


def _check_surface(surface):
    if surface is None:
        return None
    a, e = surface
    if not (isinstance(a, (int, float)) and math.isfinite(a) and a >= 0.0):
        raise InputError("surface.convection_coefficient", a, "a number >= 0 [W/(m2 K)]")
    if not (isinstance(e, (int, float)) and 0.0 <= e <= 1.0):
        raise InputError("surface.emissivity", e, "a number from 0 to 1")
    if a == 0.0 and e == 0.0:
        raise InputError("surface", surface, "a convection coefficient or an emissivity > 0")
    return SurfaceBoundary(float(a), float(e))


def run(inputs: ConductionInputs, cells=MIN_CELLS, substeps=1, surface: SurfaceBoundary | None = None,
        keep_history: bool = False, checked: bool = False) -> ConductionResult:
    """Steel temperatures of N protected members by 1-D conduction through the protection, at a fixed
    resolution.

    Solves rho_p c_p dT/dt = d/dx (lambda_p(T) dT/dx) across the layer (0 < x < d_p) with
    T(0, t) = theta_g(t) (or the surface flux of EN 1991-1-2 eq (3.1)-(3.3)) and, at x = d_p,
    rho_a c_a(theta_a) (V/A_p) d theta_a/dt = -lambda_p dT/dx, T(d_p, t) = theta_a: the heat balance
    that EN 1993-1-2 4.2.5.2 eq (4.27) approximates in closed form. Free water evaporates at 100 C.
    Scheme, scope and the maximum principle: module docstring. Any grid step; starts at 20 C.

    Parameters
    ----------
    inputs : ConductionInputs
        Members and fires (see the class).
    cells : int or (N,) int
        Cells across the layer (at least :data:`MIN_CELLS`).
    substeps : int or (N,) int
        Backward-Euler substeps per grid step (the gas linear between grid points).
    surface : SurfaceBoundary, optional
        Heat transfer to the face by EN 1991-1-2 3.1; None: face at the gas temperature (as eq (4.27)).
    keep_history : bool
        Return the steel temperature at every grid time (T, N).
    checked : bool
        The inputs come from :func:`validate` already.

    Returns
    -------
    ConductionResult
        ``converged`` True and the changes NaN: a fixed resolution is not checked here (see
        :func:`run_converged`).

    Notes
    -----
    Members are grouped by resolution and kind (dry with a constant conductivity and the face at the
    gas temperature: the fast path; other dry members; wet members) and each group runs in chunks
    through its compiled kernel. The model and its scheme are described in the module docstring; the
    kernel matches ``tests/twins_conduction.py`` to 1e-9 relative.
    """
    inp = inputs if checked else validate(inputs)
    surf = _check_surface(surface)
    n_m = inp.fire_index.shape[0]
    n_t = inp.time_s.shape[0]
    cells_a = _resolution(cells, n_m, "cells", MIN_CELLS)
    sub_a = _resolution(substeps, n_m, "substeps", 1)
    peak = np.empty(n_m)
    peak_t = np.empty(n_m)
    cross = np.empty(n_m)
    last = np.empty(n_m)
    hist = np.empty((n_t, n_m)) if keep_history else np.empty((0, 0))
    prof = np.full((int(cells_a.max()), n_m), np.nan)
    wet = inp.moisture_percent > 0.0
    table = inp.conductivity_n > 1
    kind = np.where(wet, 2, np.where(table | (surf is not None), 1, 0))
    latent_m3 = inp.moisture_percent / 100.0 * inp.density * LATENT_HEAT_WATER_J_KG
    key = np.stack([cells_a, sub_a, kind, table.astype(np.int64)], axis=1)
    n_threads = int(nb.get_num_threads())
    alpha_c, eps = (surf.convection_coefficient, surf.emissivity) if surf is not None else (0.0, 0.0)
    for u in np.unique(key, axis=0):
        idx = np.nonzero(np.all(key == u, axis=1))[0]
        nc, ns, kd, tb = (int(v) for v in u)
        k = int(inp.conductivity_n[idx].max()) if tb else 1
        args = (inp.time_s, inp.gas_C, inp.fire_index[idx], inp.section_factor_per_m[idx], inp.thickness_m[idx],
                inp.density[idx], inp.specific_heat[idx], np.ascontiguousarray(inp.conductivity_C[idx, :k]),
                np.ascontiguousarray(inp.conductivity[idx, :k]), inp.conductivity_n[idx], latent_m3[idx],
                inp.threshold_C[idx], inp.steel_density_kg_m3, nc, ns, kd == 0, kd == 2, surf is not None,
                alpha_c, eps, keep_history, n_threads, CHUNK_FAST if kd == 0 else CHUNK_GENERAL, SPECIFIC_HEAT_TERMS)
        out = _conduction_chunks(*args)
        peak[idx], peak_t[idx], cross[idx], last[idx] = out[0], out[1], out[2], out[3]
        if keep_history:
            hist[:, idx] = out[4]
        prof[:nc, idx] = out[5]
    nan = np.full(n_m, np.nan)
    return ConductionResult(peak, peak_t, cross, last, hist, cells_a, sub_a, np.ones(n_m, dtype=bool), nan,
                            nan.copy(), prof)


def _subset(inp: ConductionInputs, idx) -> ConductionInputs:
    return ConductionInputs(inp.time_s, inp.gas_C, inp.fire_index[idx], inp.section_factor_per_m[idx],
                            inp.thickness_m[idx], inp.density[idx], inp.specific_heat[idx],
                            inp.conductivity_C[idx], inp.conductivity[idx], inp.conductivity_n[idx],
                            inp.moisture_percent[idx], inp.threshold_C[idx], inp.steel_density_kg_m3)


#: Members refined together by :func:`run_converged` (three histories of this many members are held).
CONVERGENCE_BLOCK = 512


def _at_time(time_s, hist, t):
    """Each column of ``hist`` (T x N) at its own time t[j] (linear on the grid; NaN where t is NaN)."""
    out = np.full(t.shape, np.nan)
    ok = ~np.isnan(t)
    k = np.clip(np.searchsorted(time_s, t[ok]), 1, time_s.shape[0] - 1)
    cols = np.nonzero(ok)[0]
    t0, t1 = time_s[k - 1], time_s[k]
    f = (t[ok] - t0) / (t1 - t0)
    out[ok] = hist[k - 1, cols] + f * (hist[k, cols] - hist[k - 1, cols])
    return out


def _change(time_s, hist, peak, cross, res, threshold_C, measure):
    """Largest change of the steel temperature [C] between a base run (its history, peak, crossing
    time) and ``res``: over the whole history, or at the peak and at either run's threshold crossing."""
    if measure == "history":
        return np.max(np.abs(res.history_C - hist), axis=0)
    d = np.abs(res.peak_C - peak)
    a = np.abs(_at_time(time_s, res.history_C, cross) - threshold_C)      # the other run where this one crosses
    b = np.abs(_at_time(time_s, hist, res.crossing_time_s) - threshold_C)
    return np.fmax(d, np.fmax(np.nan_to_num(a, nan=0.0), np.nan_to_num(b, nan=0.0)))


def run_converged(inputs: ConductionInputs, tolerance_C: float = CONVERGENCE_TOLERANCE_C, cells=MIN_CELLS,
                  substeps=1, max_cells: int = 256, max_substeps: int = 64,
                  surface: SurfaceBoundary | None = None, keep_history: bool = False,
                  measure: str = "outputs") -> ConductionResult:
    """As :func:`run`, with the resolution of each member refined until its steel temperature has
    converged.

    Each round runs the members not yet accepted at (n, s), (2n, s) and (n, 2s) (cells, substeps)
    and measures, between the (n, s) run and each finer one, the change of the steel temperature:

    * ``measure="outputs"``: the larger of the change of the peak and the change at the threshold
      crossing (the other run's steel temperature at the time one run reaches ``threshold_C``,
      minus the threshold; both ways);
    * ``measure="history"``: the largest change at any grid time.

    A member is accepted where both changes are below ``tolerance_C``; otherwise the cells are
    doubled where the cells' change is not below it and the substeps where the substeps' change is
    not (the finer run becomes the next round's base where only one was doubled). The result of an
    accepted member is its (n, s) run; ``cells``, ``substeps`` and the two changes say which.
    Backward Euler is first order in time and the cells second order in space, so the error of an
    accepted run is about the substeps' change plus a third of the cells' change (below 0.67 C at
    the default tolerance). A member that reaches ``max_cells`` or ``max_substeps`` unaccepted keeps
    its last base run with ``converged`` False.

    With free water the history converges slowly around 100 C (the cells evaporate one after
    another, a small staircase in the steel's heating: 1-4 C between 8 and 16 cells, measured,
    docs/conduction.md) while the peak and the crossing of a critical temperature converge at 8
    cells; hence the default measure.
    """
    inp = validate(inputs)
    if not (isinstance(tolerance_C, (int, float)) and math.isfinite(tolerance_C) and tolerance_C > 0.0):
        raise InputError("tolerance_C", tolerance_C, "a number > 0 [C]")
    if measure not in ("outputs", "history"):
        raise InputError("measure", measure, '"outputs" or "history"')
    surf = _check_surface(surface)
    n_m = inp.fire_index.shape[0]
    n_t = inp.time_s.shape[0]
    n_all = _resolution(cells, n_m, "cells", MIN_CELLS).copy()
    s_all = _resolution(substeps, n_m, "substeps", 1).copy()
    peak, peak_t, cross, last, dn_all, ds_all = (np.full(n_m, np.nan) for _ in range(6))
    hist = np.empty((n_t, n_m)) if keep_history else np.empty((0, 0))
    converged = np.zeros(n_m, dtype=bool)
    profiles = [None] * n_m
    for b0 in range(0, n_m, CONVERGENCE_BLOCK):
        blk = np.arange(b0, min(b0 + CONVERGENCE_BLOCK, n_m))
        sub = _subset(inp, blk)
        n = n_all[blk]
        s = s_all[blk]
        base = run(sub, n, s, surf, True, True)
        b_peak, b_pt, b_cross, b_last = (base.peak_C.copy(), base.peak_time_s.copy(), base.crossing_time_s.copy(),
                                         base.last_increment_C.copy())
        b_hist = base.history_C.copy()
        b_prof = [base.profile_C[:n[j], j].copy() for j in range(blk.size)]
        done = np.zeros(blk.size, dtype=bool)

        def take(cols, res, rcols):
            b_peak[cols], b_pt[cols], b_cross[cols], b_last[cols] = (
                res.peak_C[rcols], res.peak_time_s[rcols], res.crossing_time_s[rcols], res.last_increment_C[rcols])
            b_hist[:, cols] = res.history_C[:, rcols]
            for c, rc in zip(cols, rcols):
                b_prof[c] = res.profile_C[:, rc][~np.isnan(res.profile_C[:, rc])].copy()

        while not done.all():
            act = np.nonzero(~done)[0]
            sa = _subset(sub, act)
            rn = run(sa, 2 * n[act], s[act], surf, True, True)
            rs = run(sa, n[act], 2 * s[act], surf, True, True)
            dn = _change(inp.time_s, b_hist[:, act], b_peak[act], b_cross[act], rn, sa.threshold_C, measure)
            ds = _change(inp.time_s, b_hist[:, act], b_peak[act], b_cross[act], rs, sa.threshold_C, measure)
            dn_all[blk[act]], ds_all[blk[act]] = dn, ds
            ok = (dn < tolerance_C) & (ds < tolerance_C)
            converged[blk[act[ok]]] = True
            ref_n = ~ok & (dn >= tolerance_C)
            ref_s = ~ok & (ds >= tolerance_C)
            stop = (ref_n & (2 * n[act] > max_cells)) | (ref_s & (2 * s[act] > max_substeps))
            done[act[ok | stop]] = True
            go = ~ok & ~stop
            only_n = np.nonzero(go & ref_n & ~ref_s)[0]
            only_s = np.nonzero(go & ref_s & ~ref_n)[0]
            both = np.nonzero(go & ref_n & ref_s)[0]
            take(act[only_n], rn, only_n)
            take(act[only_s], rs, only_s)
            n[act[only_n]] *= 2
            s[act[only_s]] *= 2
            if both.size:
                cols = act[both]
                n[cols] *= 2
                s[cols] *= 2
                take(cols, run(_subset(sub, cols), n[cols], s[cols], surf, True, True), np.arange(cols.size))
        peak[blk], peak_t[blk], cross[blk], last[blk] = b_peak, b_pt, b_cross, b_last
        n_all[blk], s_all[blk] = n, s
        if keep_history:
            hist[:, blk] = b_hist
        for j, m in enumerate(blk):
            profiles[m] = b_prof[j]
    profile = np.full((int(n_all.max()), n_m), np.nan)
    for m, p in enumerate(profiles):
        profile[:p.shape[0], m] = p
    return ConductionResult(peak, peak_t, cross, last, hist, n_all, s_all, converged, dn_all, ds_all, profile)


def protected_steel_temperature(time_s, gas_temperature_C, section_factor_per_m: float, thickness_m: float,
                                density: float, specific_heat: float, conductivity,
                                moisture_percent: float = 0.0, cells: int = MIN_CELLS, substeps: int = 1,
                                surface: SurfaceBoundary | None = None,
                                steel_density_kg_m3: float = STEEL_DENSITY_KG_M3) -> np.ndarray:
    """Steel temperature history [C] of one protected member by 1-D conduction through its protection.

    The model of this module (see its docstring) for one member on one fire: plane layer of thickness
    ``thickness_m`` [m], rho_p ``density`` [kg/m3], c_p ``specific_heat`` [J/(kg K)], lambda_p
    ``conductivity`` [W/(m K)] (a number, or ((temperature [C], lambda), ...) taken at each cell's
    temperature), free water ``moisture_percent`` [% of dry weight] evaporating at 100 C; steel
    lumped at the inner face, A_p/V ``section_factor_per_m`` [1/m], c_a by EN 1993-1-2 eq (3.2).
    Steel and protection start at 20 C; the gas ``gas_temperature_C`` [C] is given on the grid
    ``time_s`` [s] and taken as linear between its points. Valid for any grid step (backward Euler,
    no stability limit); the accuracy is that of ``cells`` and ``substeps`` (:func:`run_converged`
    checks it).

    Examples
    --------
    Steady state (hand calculation: with the gas held at 500 C long enough, steel and layer end at
    500 C; the time constant here is about an hour, (7850 x 667 / 200 + 800 x 1700 x 0.02 / 3) /
    (0.2 / 0.02) = 3500 s):

    >>> import numpy as np
    >>> t = np.arange(0.0, 24 * 3600.0 + 1.0, 60.0)
    >>> round(float(protected_steel_temperature(t, np.full(t.shape, 500.0), 200.0, 0.02, 800.0, 1700.0,
    ...                                         0.2)[-1]), 6)
    500.0
    """
    if isinstance(conductivity, (int, float)):
        table = ((20.0, float(conductivity)),)
    else:
        table = tuple((float(a), float(b)) for a, b in conductivity)
    lt = np.array([[a for a, _ in table]])
    lv = np.array([[b for _, b in table]])
    inp = ConductionInputs(np.asarray(time_s, dtype=float), np.asarray(gas_temperature_C, dtype=float).reshape(-1, 1),
                           np.zeros(1, dtype=np.int64), section_factor_per_m, thickness_m, density, specific_heat,
                           lt, lv, np.array([len(table)]), moisture_percent, np.array([np.inf]),
                           steel_density_kg_m3)
    return run(inp, cells, substeps, surface, keep_history=True).history_C[:, 0]
