"""Steel temperatures by the lumped-capacitance method of EN 1993-1-2 4.2.5, many members in many fires.

Two recurrences, stepped explicitly on a time grid (not necessarily uniform, so that key times such as
t_max of a parametric fire sit on it):

* bare steel, 4.2.5.1 eq (4.25):
  d theta_a = k_sh (Am/V) / (c_a rho_a) h_net,d dt, with the net heat flux of EN 1991-1-2 eq (3.1)-(3.3)
  h_net = alpha_c (theta_g - theta_a) + Phi eps_m eps_f sigma ((theta_r + 273)^4 - (theta_a + 273)^4),
  theta_r the radiation temperature (the gas temperature, or the one a heat-flux fire gives);
* protected steel, 4.2.5.2 eq (4.27):
  d theta_a = lambda_p (Ap/V) (theta_g - theta_a) / (d_p c_a rho_a (1 + phi/3)) dt - (e^(phi/10) - 1) d theta_g,
  phi = c_p rho_p d_p (Ap/V) / (c_a rho_a), with d theta_a >= 0 while the gas is heating (d theta_g > 0).

c_a (EN 1993-1-2 eq (3.2), :func:`steelfire.models.steel.specific_heat`) is taken at the steel
temperature at the start of each step, lambda_p from the member's table at the steel temperature (held
at the table's ends). Free water in the protection holds the steel at 100 C for a delay t_v
(:func:`steelfire.models.protection.moisture_delay_s`).

One call of :func:`run` advances many member rows, each in its own fire: the fires are the columns of a
gas-temperature matrix (time x fires) and each row names its column. The kernels are numba functions
(``cache=True``) with a plain-Python twin in ``tests/twins.py`` that they match to 1e-9 relative. Inputs
are assumed clean: validation happens in the case loader and the analysis chain.
"""

from __future__ import annotations

import math
import os
from typing import NamedTuple

import numba as nb
import numpy as np
from numba.core import cgutils
from numba.extending import intrinsic

from steelfire.models import steel

#: Stefan-Boltzmann constant [W/(m2 K4)], EN 1991-1-2 3.1(6).
STEFAN_BOLTZMANN = 5.67e-8
#: Absolute zero offset used by EN 1991-1-2 eq (3.3) [K].
KELVIN = 273.0
#: Temperature at which the moisture delay holds the steel [C] (common practice, no source).
MOISTURE_PLATEAU_C = 100.0

#: Members advanced side by side in one time loop (a chunk): 128 keeps a chunk's working arrays in a
#: 32 KiB L1 data cache and gives two threads enough chunks to share (benchmarks/README.md).
CHUNK = 128
#: Floating-point liberty of the kernels: a multiply and the add after it may fuse into one
#: multiply-add (rounded once). No other IEEE rule is relaxed.
BATCH_MATH = {"contract"}

#: The numbers of :func:`expm1_scaled` in the order it reads them: 1/16, the Taylor coefficients
#: 1/2!, ..., 1/11! of e^z - 1 after the leading 1, then 2 (of the squarings) and that leading 1.
EXPM1_TERMS = tuple([1.0 / 16.0] + [1.0 / math.factorial(k) for k in range(2, 12)] + [2.0, 1.0])
#: EN 1993-1-2 eq (3.2a)-(3.2d) in the order :func:`heat_capacity_fraction` reads them, taken from the
#: one definition in :mod:`steelfire.models.steel`: 20 C and the cubic (3.2a); 735 C, 738, 666, 13002
#: (3.2b); 731, 545, 17820 (3.2c); 600 C, 900 C, 650 (3.2d).
SPECIFIC_HEAT_TERMS = tuple(float(v) for v in steel.SPECIFIC_HEAT_KERNEL_TERMS)
# The kernels take these numbers as a tuple argument: not literals (on AVX2 cores a literal is reloaded
# from memory in every iteration once the vector registers are full) and not an array (the compiler
# cannot tell that the kernel's own stores leave an array's elements alone, and did not vectorise).


class Fires(NamedTuple):
    """The fires a call runs: gas temperatures [C] on one time grid [s], one column per fire."""

    time_s: np.ndarray                    # (T,)
    gas_C: np.ndarray                     # (T, F)
    radiation_C: np.ndarray | None = None  # (T, F) radiation temperature of a heat-flux fire; None: the gas


class Rows(NamedTuple):
    """The member rows of a call, each in the fire ``fire`` (a column of :attr:`Fires.gas_C`).

    ``section_factor_per_m`` is k_sh Am/V for a bare row and Ap/V for a protected one; ``alpha_c``
    [W/(m2 K)] is read for bare rows; the protection properties (thickness [m], density [kg/m3],
    specific heat [J/(kg K)], conductivity table (knot temperatures [C], values [W/(m K)], knots used),
    moisture delay [s]) for protected rows. ``threshold_C``: the temperature whose first crossing is
    timed (+inf: none).
    """

    fire: np.ndarray
    bare: np.ndarray
    section_factor_per_m: np.ndarray
    alpha_c: np.ndarray
    thickness_m: np.ndarray
    density: np.ndarray
    specific_heat: np.ndarray
    conductivity_C: np.ndarray
    conductivity: np.ndarray
    conductivity_n: np.ndarray
    moisture_delay_s: np.ndarray
    threshold_C: np.ndarray

    def take(self, idx) -> "Rows":
        """The rows ``idx`` (indices or a mask), as a new Rows."""
        return Rows(*(np.ascontiguousarray(a[idx]) for a in self))


class ThermalRun(NamedTuple):
    """What a call returns, per row: the peak steel temperature [C] and its first time [s]; the first
    time the steel reaches the row's threshold, linear within the step [s] (NaN: never); the steel
    temperature at the queried grid indices (N x Q); the last step's increment [C]; the excess of the
    steel over the hottest gas reached so far or 20 C [C] (the largest at any step of the run, 0 where never
    above; above 0 the result breaks the second law, see eq (4.27)'s cooling-phase term); the history
    (T x N) when kept, else 0 x 0."""

    peak_C: np.ndarray
    peak_time_s: np.ndarray
    crossing_time_s: np.ndarray
    at_query_C: np.ndarray
    last_increment_C: np.ndarray
    excess_C: np.ndarray
    history_C: np.ndarray


@nb.njit(cache=True, inline="always", error_model="numpy", fastmath=BATCH_MATH)
def expm1_scaled(y, k):
    """e^y - 1 by a degree-11 Taylor polynomial of e^(y/16) - 1 and four squarings ((1+p)^2 - 1 = p (2 + p));
    ``k`` is :data:`EXPM1_TERMS`.

    A vectorisable stand-in for math.expm1 on 0 <= y <= 3 (phi <= 30 in eq (4.27)): relative error below
    1e-12 there, below 1e-10 up to y = 10 (tests/test_heat.py). Estrin's form keeps the chain of
    dependent operations short.
    """
    z = y * k[0]                                   # y / 16
    z2 = z * z
    z4 = z2 * z2
    z8 = z4 * z4
    a0 = k[12] + k[1] * z                          # 1 + z/2!
    a1 = k[2] + k[3] * z                           # 1/3! + z/4!
    a2 = k[4] + k[5] * z                           # 1/5! + z/6!
    a3 = k[6] + k[7] * z                           # 1/7! + z/8!
    a4 = k[8] + k[9] * z + k[10] * z2              # 1/9! + z/10! + z^2/11!
    p = z * ((a0 + a1 * z2) + (a2 + a3 * z2) * z4 + a4 * z8)
    for _ in range(4):
        p = p * (k[11] + p)                        # (1 + p)^2 - 1
    return p


@nb.njit(cache=True, inline="always", error_model="numpy", fastmath=BATCH_MATH)
def heat_capacity_fraction(x, rho_a, k):
    """c_a rho_a of EN 1993-1-2 eq (3.2a)-(3.2d) at ``x`` [C] as a fraction num / den [J/(m3 K)], selects
    only; ``k`` is :data:`SPECIFIC_HEAT_TERMS`.

    den is 1 outside 600-900 C and (738 - x) or (x - 731) inside, so that a kernel folds c_a's division
    into its own single one. Held at the 20 C value below 20 C and at 650 above 1200 C.
    """
    t20 = max(x, k[0])                                                  # held at 20 C below
    cubic = k[1] + t20 * (k[2] + t20 * (k[3] + t20 * k[4]))             # (3.2a)
    below = x < k[5]                                                    # 735 C
    den_f = (k[6] - x) if below else (x - k[9])                         # 738 - x | x - 731
    num_f = (k[7] * den_f + k[8]) if below else (k[10] * den_f + k[11])  # (3.2b) | (3.2c), times den
    inside = x >= k[12] and x < k[13]                                   # 600-900 C
    num = rho_a * (num_f if inside else (cubic if x < k[12] else k[14]))  # (3.2d): 650
    return num, (den_f if inside else 1.0)


def _chunking(n_m, nt):
    """(number of chunks, members per chunk): chunks of at most CHUNK members, as many as a multiple of
    the ``nt`` threads and all of about one size."""
    nt = max(nt, 1)
    n_chunks = (n_m + CHUNK - 1) // CHUNK
    n_chunks = ((n_chunks + nt - 1) // nt) * nt
    width = max((n_m + n_chunks - 1) // n_chunks, 1)
    return (n_m + width - 1) // width, width


def plan_chunks(fire_sorted, n_threads):
    """(chunk starts (n_chunks + 1,), fire of each chunk) for rows sorted by fire: every chunk holds rows
    of one fire, so that the kernel reads that fire's gas as one number per step. Rows of a single fire
    are cut into chunks of about one size, as many as a multiple of the threads (:func:`_chunking`);
    the rows of several fires into chunks of at most CHUNK per fire."""
    f = np.asarray(fire_sorted, dtype=np.int64)
    n = len(f)
    runs = np.flatnonzero(np.concatenate([[True], f[1:] != f[:-1]])) if n else np.zeros(0, dtype=np.int64)
    ends = np.concatenate([runs[1:], [n]])
    starts, fires = [], []
    for a, b in zip(runs.tolist(), ends.tolist()):
        length = b - a
        k, width = _chunking(length, n_threads) if len(runs) == 1 else (-(-length // CHUNK), -(-length // -(-length // CHUNK)))
        for j in range(k):
            lo = a + j * width
            if lo < b:
                starts.append(lo)
                fires.append(f[a])
    return np.array(starts + [n], dtype=np.int64), np.array(fires, dtype=np.int64)


@intrinsic
def _take_ticket(typingctx, counter):
    """Atomically add 1 to ``counter[0]`` (a 1-element int64 array) and return its value before.

    The kernels hand out chunks with it: each thread takes the next chunk when it has finished one,
    so that a core that runs slower for a while does fewer chunks instead of holding the other up.
    """
    sig = nb.types.int64(counter)

    def codegen(context, builder, signature, args):
        ary_t = signature.args[0]
        ary = context.make_array(ary_t)(context, builder, args[0])
        ptr = cgutils.get_item_pointer(context, builder, ary_t, ary, [context.get_constant(nb.types.intp, 0)])
        return builder.atomic_rmw("add", ptr, context.get_constant(nb.types.int64, 1), "monotonic")

    return sig, codegen


@nb.njit(cache=True, inline="always")
def _chunk_state(w):
    """Per-member state of a chunk: temperature (20 C), peak, its step, the step of the first crossing
    of the threshold and the temperatures either side of it (+inf: none yet), the last increment."""
    return (np.full(w, 20.0), np.full(w, 20.0), np.zeros(w, dtype=np.int64), np.full(w, np.inf),
            np.full(w, np.inf), np.full(w, np.inf), np.zeros(w))


@nb.njit(cache=True, inline="always")
def _track(i, i_f, before, new, thr, pk, pki, ci, cx, cn):
    """After step ``i`` (``i_f`` = float(i)) took a member from ``before`` to ``new`` [C]: its peak ``pk``,
    the step ``pki`` that first reached it, and the first crossing of the threshold ``thr`` (step ``ci``,
    temperatures ``cx``, ``cn`` either side; +inf: none yet). Returns the five updated.

    ``first`` (the step ends at or above the threshold while the peak before it was below) holds in at
    most one step of a member, so the crossing is the minimum over the steps where it holds: whole
    selects and minima, which vectorise (an "update only where" does not)."""
    first = (new >= thr) & (pk < thr)
    inf = np.inf
    ci = min(ci, i_f if first else inf)
    cx = min(cx, before if first else inf)
    cn = min(cn, new if first else inf)
    return i + 1 if new > pk else pki, max(pk, new), ci, cx, cn


@nb.njit(cache=True, inline="always")
def _record(th, lo, w, step, q, query_idx, at_q, hist, keep_history):
    """After time step ``step``: the chunk's temperatures into the history and the queried columns."""
    if keep_history:
        for j in range(w):
            hist[step, lo + j] = th[j]
    while q < query_idx.shape[0] and query_idx[q] == step:
        for j in range(w):
            at_q[lo + j, q] = th[j]
        q += 1
    return q


@nb.njit(cache=True, inline="always")
def _knots(lam_T, lam_v, nk, m, j, tk, vk, sk):
    """Column ``j`` of a chunk's conductivity table from row ``m`` of the material tables (``nk`` knots):
    knot temperatures, values and the slope after each knot; past the last knot +inf, 0 and 0, so that
    the end value is held."""
    for k in range(tk.shape[0]):
        if k < nk:
            tk[k, j] = lam_T[m, k]
            vk[k, j] = lam_v[m, k]
            sk[k, j] = (lam_v[m, k + 1] - lam_v[m, k]) / (lam_T[m, k + 1] - lam_T[m, k]) if k + 1 < nk else 0.0
        else:
            tk[k, j] = np.inf
            vk[k, j] = 0.0
            sk[k, j] = 0.0


@nb.njit(cache=True, inline="always")
def _finish(time_s, lo, w, pk, pki, dl, ci, cx, cn, thr, peak, peak_t, last, cross):
    """Per member of the chunk: peak and its time, last increment, threshold crossing (linear in the step)."""
    for j in range(w):
        m = lo + j
        peak[m] = pk[j]
        peak_t[m] = time_s[pki[j]]
        last[m] = dl[j]
        if thr[j] <= 20.0:
            cross[m] = time_s[0]
        elif ci[j] < np.inf:
            k = int(ci[j])
            cross[m] = time_s[k] + (time_s[k + 1] - time_s[k]) * (thr[j] - cx[j]) / (cn[j] - cx[j])


@nb.njit(cache=True, nogil=True, error_model="numpy", fastmath=BATCH_MATH)
def _protected_chunks(time_s, gas_FT, chunk_start, chunk_fire, ap_v, d_p, rho_p, c_p, lam_T, lam_v, lam_n, delay_s,
                      rho_a, threshold_C, query_idx, keep_history, ca_k, ex_k, track_excess, tickets, peak, peak_t,
                      cross, at_q, last, hist, excess):
    """Eq (4.27) for the chunks this thread takes from ``tickets`` (:func:`_on_threads`), into the outputs."""
    n_t = time_s.shape[0]
    n_k = lam_T.shape[1]
    n_chunks = chunk_fire.shape[0]
    if n_chunks > 0:
        c = _take_ticket(tickets)
        while c < n_chunks:
            lo = chunk_start[c]
            w = chunk_start[c + 1] - lo
            gas = gas_FT[chunk_fire[c]]   # the chunk's fire: one gas temperature per step
            th, pk, pki, ci, cx, cn, dl = _chunk_state(w)
            held = np.zeros(w)
            cap = np.empty(w)
            cap3 = np.empty(w)
            k_ = np.empty(w)
            thr = np.empty(w)
            dly = np.empty(w)
            lamj = np.empty(w)
            phi10 = np.empty(w)         # phi / 10 of eq (4.27)
            flow = np.empty(w)          # the conduction term of eq (4.27) [C]
            ex = np.empty(w)            # e^(phi/10) - 1
            tk = np.empty((n_k, w))      # conductivity table: knot temperatures (+inf past the last knot)
            vk = np.empty((n_k, w))      # value at the knot
            sk = np.empty((n_k, w))      # slope after the knot (0 past the last knot: end value held)
            for j in range(w):
                m = lo + j
                cap[j] = c_p[m] * rho_p[m] * d_p[m] * ap_v[m]
                cap3[j] = cap[j] / 3.0
                k_[j] = ap_v[m] / d_p[m]
                thr[j] = threshold_C[m]
                dly[j] = delay_s[m]
                _knots(lam_T, lam_v, lam_n[m], m, j, tk, vk, sk)
                lamj[j] = lam_v[m, 0]
            q = _record(th, lo, w, 0, 0, query_idx, at_q, hist, keep_history)
            gm = max(gas[0], 20.0)      # hottest gas so far (or the steel's start, 20 C)
            exc = np.zeros(w)           # most the steel has been above it (track_excess)
            for i in range(n_t - 1):
                dt = time_s[i + 1] - time_s[i]
                g0 = gas[i]       # read once a step: a store into the chunk's arrays could not change it
                g1 = gas[i + 1]
                gm = max(gm, g1)
                # lambda_p at the steel temperature: the segment whose knot is the last one below it;
                # constant conductivities (one knot) keep the value set before the time loop
                if n_k > 1:
                    for j in range(w):
                        lamj[j] = vk[0, j] + sk[0, j] * (max(th[j], tk[0, j]) - tk[0, j])
                    for k in range(1, n_k):
                        for j in range(w):
                            x = th[j]
                            cand = vk[k, j] + sk[k, j] * (x - tk[k, j])
                            lamj[j] = cand if x > tk[k, j] else lamj[j]
                # three short passes over the chunk. With c_a rho_a = num / den, phi = cap den / num and
                # 1 / (c_a rho_a (1 + phi/3)) = den / (num + den cap/3): one division r = 1 / (num (num + den cap/3))
                # gives both.
                for j in range(w):
                    x = th[j]
                    num, den = heat_capacity_fraction(x, rho_a, ca_k)
                    s = num + cap3[j] * den
                    r = 1.0 / (num * s)
                    phi10[j] = 0.1 * cap[j] * den * s * r
                    flow[j] = lamj[j] * k_[j] * (g0 - x) * dt * den * num * r
                for j in range(w):
                    ex[j] = expm1_scaled(phi10[j], ex_k)
                i_f = float(i)
                for j in range(w):
                    x = th[j]
                    dgjj = g1 - g0
                    d_min = 0.0 if dgjj > 0.0 else -np.inf
                    d = max(flow[j] - ex[j] * dgjj, d_min)   # not negative while the gas heats
                    new = x + d
                    # moisture: hold at 100 C until the delay is used up
                    hold = (held[j] < dly[j]) & (new >= MOISTURE_PLATEAU_C) & (d > 0.0)
                    at = x >= MOISTURE_PLATEAU_C
                    held[j] = held[j] + dt if (hold & at) else held[j]
                    new = (x if at else MOISTURE_PLATEAU_C) if hold else new
                    dl[j] = new - x
                    th[j] = new
                    pki[j], pk[j], ci[j], cx[j], cn[j] = _track(i, i_f, x, new, thr[j], pk[j], pki[j], ci[j], cx[j], cn[j])
                if track_excess:
                    for j in range(w):
                        exc[j] = max(exc[j], th[j] - gm)
                q = _record(th, lo, w, i + 1, q, query_idx, at_q, hist, keep_history)
            _finish(time_s, lo, w, pk, pki, dl, ci, cx, cn, thr, peak, peak_t, last, cross)
            for j in range(w):
                excess[lo + j] = exc[j]
            c = _take_ticket(tickets)


@nb.njit(cache=True, nogil=True, error_model="numpy", fastmath=BATCH_MATH)
def _bare_chunks(time_s, gas_FT, rad4_FT, chunk_start, chunk_fire, ksh_amv, alpha_c, eps_res, rho_a, threshold_C,
                 query_idx, keep_history, ca_k, track_excess, tickets, peak, peak_t, cross, at_q, last, hist, excess):
    """Eq (4.25) for the chunks this thread takes from ``tickets`` (:func:`_on_threads`), into the outputs."""
    n_t = time_s.shape[0]
    er = eps_res * STEFAN_BOLTZMANN
    n_chunks = chunk_fire.shape[0]
    if n_chunks > 0:
        c = _take_ticket(tickets)
        while c < n_chunks:
            lo = chunk_start[c]
            w = chunk_start[c + 1] - lo
            gas = gas_FT[chunk_fire[c]]   # the chunk's fire
            rad4 = rad4_FT[chunk_fire[c]]
            th, pk, pki, ci, cx, cn, dl = _chunk_state(w)
            kk = np.empty(w)
            ac = np.empty(w)
            thr = np.empty(w)
            for j in range(w):
                kk[j] = ksh_amv[lo + j]
                ac[j] = alpha_c[lo + j]
                thr[j] = threshold_C[lo + j]
            q = _record(th, lo, w, 0, 0, query_idx, at_q, hist, keep_history)
            gm = max(gas[0], 20.0)      # hottest gas so far (or the steel's start, 20 C)
            exc = np.zeros(w)           # most the steel has been above it (track_excess)
            for i in range(n_t - 1):
                dt = time_s[i + 1] - time_s[i]
                i_f = float(i)
                g0 = gas[i]       # read once a step: a store into the chunk's arrays could not change it
                r0 = rad4[i]
                gm = max(gm, gas[i + 1])
                for j in range(w):
                    x = th[j]
                    ta = x + KELVIN
                    ta2 = ta * ta
                    h_net = ac[j] * (g0 - x) + er * (r0 - ta2 * ta2)
                    num, den = heat_capacity_fraction(x, rho_a, ca_k)  # c_a rho_a = num / den: one division
                    new = x + kk[j] * h_net * dt * den / num
                    pki[j], pk[j], ci[j], cx[j], cn[j] = _track(i, i_f, x, new, thr[j], pk[j], pki[j], ci[j], cx[j], cn[j])
                    dl[j] = new - x
                    th[j] = new
                if track_excess:
                    for j in range(w):
                        exc[j] = max(exc[j], th[j] - gm)
                q = _record(th, lo, w, i + 1, q, query_idx, at_q, hist, keep_history)
            _finish(time_s, lo, w, pk, pki, dl, ci, cx, cn, thr, peak, peak_t, last, cross)
            for j in range(w):
                excess[lo + j] = exc[j]
            c = _take_ticket(tickets)


def _outputs(n_m, n_q, n_t, keep_history):
    """The outputs: peak, its time, crossing time (NaN: never), queried temperatures, last step, history,
    excess over the hottest gas so far."""
    hist = np.empty((n_t, n_m)) if keep_history else np.empty((0, 0))
    return (np.empty(n_m), np.empty(n_m), np.full(n_m, np.nan), np.full((n_m, n_q), np.nan), np.zeros(n_m), hist,
            np.empty(n_m))


#: Threads that run kernels beside the caller's (:func:`_on_threads`); made on first use, kept.
_POOL = None
_POOL_SIZE = 0


def _forget_pool():
    global _POOL, _POOL_SIZE
    _POOL, _POOL_SIZE = None, 0


os.register_at_fork(after_in_child=_forget_pool)   # a forked child has none of the parent's threads


def _on_threads(work, n_threads):
    """Call ``work()`` from ``n_threads`` threads at once, this one included, and return when all have
    returned (raising what any raised). The kernels' ``work`` releases the GIL and takes chunks from one
    counter until none is left, so a thread that starts late or runs slower does fewer of them.

    Plain threads around a compiled loop, not a compiled parallel loop: numba compiles and optimises a
    parallel loop's body a second time, which made the first run after installing about 10 s longer
    per kernel (benchmarks/README.md). The threads are kept between calls: a new thread per call made
    a two-thread call of a few tens of ms about 20 % slower."""
    global _POOL, _POOL_SIZE
    if n_threads <= 1:
        work()
        return
    if _POOL_SIZE < n_threads - 1:
        from concurrent.futures import ThreadPoolExecutor

        if _POOL is not None:
            _POOL.shutdown(wait=False)
        _POOL, _POOL_SIZE = ThreadPoolExecutor(n_threads - 1, thread_name_prefix="steelfire-kernel"), n_threads - 1
    others = [_POOL.submit(work) for _ in range(n_threads - 1)]
    try:
        work()
    finally:
        for f in others:
            f.result()


#: Said once on standard error when a kernel is about to be compiled (numba keeps the result on disk).
COMPILE_NOTICE = ("steelfire: preparing the heat-transfer kernels for this machine, once after installing "
                  "(5 to 25 s on a 2-core machine) ...")
_ANNOUNCED = set()


def announce():
    """Say :data:`COMPILE_NOTICE` on standard error, once per process. Returns whether it was said now."""
    if _ANNOUNCED:
        return False
    import sys

    _ANNOUNCED.add("notice")
    sys.stderr.write(COMPILE_NOTICE + "\n")
    sys.stderr.flush()
    return True


def _announce_compile(kernel, args):
    """Tell the user (:func:`announce`) when a kernel has to be compiled: no cached machine code for these
    argument types; the first run after installing pauses for many seconds otherwise. Returns whether
    the notice was said now."""
    if kernel.signatures or _ANNOUNCED:
        return False
    try:
        from numba import typeof

        types_ = tuple(typeof(a) for a in args)
        index = kernel._cache._cache_file._load_index()   # numba's on-disk index: (types, target) -> file
        if any(key[0] == types_ for key in index):
            return False
    except Exception:  # the cache layout is numba's own: say nothing rather than fail
        return False
    return announce()


def run(fires: Fires, rows: Rows, *, emissivity_resultant: float, steel_density_kg_m3: float,
        query_idx=None, keep_history: bool = False) -> ThermalRun:
    """Steel temperatures of ``rows`` (bare by EN 1993-1-2 eq (4.25), protected by eq (4.27)), each in
    its fire of ``fires``; see :class:`ThermalRun` for what comes back.

    ``emissivity_resultant`` is Phi eps_m eps_f (EN 1991-1-2 eq (3.3)); ``query_idx``: ascending grid
    indices at which the steel temperatures are wanted. Rows are grouped (bare; protected with one
    conductivity; protected with a table) and each group is advanced in chunks of members side by side
    over the cores, rows of one fire together. The arithmetic per member-step is that of the twins in
    tests/twins.py, rearranged to one division for eq (4.27) and with :func:`expm1_scaled` for
    e^(phi/10) - 1; the results match them to 1e-9. ``excess_C`` is the most each row's steel rises above
    the hottest gas of its fire reached so far (or 20 C, the steel's start), at any step of the run, kept or
    not: tracked by the kernels where a fire dips and heats again, from the peak where every fire is single-
    peaked (:func:`excess_from_peak`).
    """
    time_s = np.ascontiguousarray(fires.time_s, dtype=float)
    n_t = len(time_s)
    gas = np.ascontiguousarray(np.asarray(fires.gas_C, dtype=float).reshape(n_t, -1))
    rad = gas if fires.radiation_C is None else np.asarray(fires.radiation_C, dtype=float).reshape(gas.shape)
    n = len(rows.fire)
    q = np.zeros(0, dtype=np.int64) if query_idx is None else np.ascontiguousarray(query_idx, dtype=np.int64)
    out = [np.empty(n), np.empty(n), np.empty(n), np.empty((n, len(q))), np.empty(n),
           np.empty((n_t, n)) if keep_history else np.empty((0, 0)), np.empty(n)]
    bare = np.asarray(rows.bare, dtype=bool)
    lam_n = np.asarray(rows.conductivity_n, dtype=np.int64)
    groups = (np.flatnonzero(bare), np.flatnonzero(~bare & (lam_n == 1)), np.flatnonzero(~bare & (lam_n > 1)))
    n_threads = int(nb.get_num_threads())
    rho_a = float(steel_density_kg_m3)
    gas_FT = np.ascontiguousarray(gas.T)   # one row per fire: a chunk reads its fire's row
    # the excess over the hottest gas so far: tracked step by step unless every fire rises to its peak and then
    # only falls (nominal and Annex A fires), where it is the peak's own excess (see excess_from_peak)
    used = np.unique(np.asarray(rows.fire, dtype=np.int64))
    track = bool(fires.radiation_C is not None or not np.all(single_peaked(gas[:, used])))
    rad4_FT = None
    for gi, idx in enumerate(groups):
        if len(idx) == 0:
            continue
        idx = idx[np.argsort(rows.fire[idx], kind="stable")]  # rows of one fire together
        r = rows.take(idx)
        chunk_start, chunk_fire = plan_chunks(r.fire, n_threads)
        thr = r.threshold_C.astype(float)
        if gi == 0:
            if rad4_FT is None:
                t4 = rad.T + KELVIN
                rad4_FT = np.ascontiguousarray(t4 * t4 * t4 * t4)
            kernel = _bare_chunks
            args = (time_s, gas_FT, rad4_FT, chunk_start, chunk_fire, r.section_factor_per_m, r.alpha_c.astype(float),
                    float(emissivity_resultant), rho_a, thr, q, keep_history, SPECIFIC_HEAT_TERMS, track)
        else:
            k = 1 if gi == 1 else int(lam_n[idx].max())
            args = (time_s, gas_FT, chunk_start, chunk_fire, r.section_factor_per_m, r.thickness_m, r.density,
                    r.specific_heat, np.ascontiguousarray(r.conductivity_C[:, :k]),
                    np.ascontiguousarray(r.conductivity[:, :k]), r.conductivity_n.astype(np.int64), r.moisture_delay_s,
                    rho_a, thr, q, keep_history, SPECIFIC_HEAT_TERMS, EXPM1_TERMS, track)
            kernel = _protected_chunks
        res = _outputs(len(idx), len(q), n_t, keep_history)
        args = args + (np.zeros(1, dtype=np.int64),) + res
        _announce_compile(kernel, args)
        _on_threads(lambda: kernel(*args), min(n_threads, len(chunk_fire)))
        for a_, b_ in zip(out[:5] + out[6:], res[:5] + res[6:]):
            a_[idx] = b_
        if keep_history:
            out[5][:, idx] = res[5]
    if not track:
        out[6] = excess_from_peak(time_s, gas, np.asarray(rows.fire, dtype=np.int64), out[0], out[1])
    return ThermalRun(out[0], out[1], out[2], out[3], out[4], out[6], out[5])


def single_peaked(gas_C) -> np.ndarray:
    """Per column of ``gas_C`` (T x F): whether the gas never falls before its (first) maximum and never
    rises after it."""
    g = np.asarray(gas_C, dtype=float)
    if g.shape[0] < 2:
        return np.ones(g.shape[1], dtype=bool)
    k = np.argmax(g, axis=0)
    d = np.diff(g, axis=0)
    before = np.arange(d.shape[0])[:, None] < k[None, :]
    return np.all(np.where(before, d >= 0.0, d <= 0.0), axis=0)


def excess_from_peak(time_s, gas_C, fire, peak_C, peak_time_s) -> np.ndarray:
    """The most each row's steel rises above max(hottest gas so far, 20 C) [C], from its peak alone: exact
    for single-peaked fires (:func:`single_peaked`) stepped within the stability limit
    (:mod:`steelfire.models.stability`). Before the gas peak a stable step cannot carry the steel above the
    gas; after it the reference is constant, so the largest excess there is the steel's own peak's, where
    the peak comes after the gas peak, and none (0) otherwise."""
    ref = np.maximum.accumulate(np.maximum(np.asarray(gas_C, dtype=float), 20.0), axis=0)
    k = np.minimum(np.searchsorted(time_s, peak_time_s), len(time_s) - 1)
    return np.maximum(peak_C - ref[k, fire], 0.0)


def uniform_rows(n, *, bare, section_factor_per_m, alpha_c=35.0, thickness_m=1.0, density=1.0, specific_heat=1.0,
                 conductivity=1.0, moisture_delay_s=0.0, threshold_C=np.inf, fire=0) -> Rows:
    """Rows of ``n`` members from scalars or arrays (constant conductivities), for scripts and tests."""
    def col(v, dtype=float):
        return np.ascontiguousarray(np.broadcast_to(np.asarray(v, dtype=dtype), (n,)))
    lam = col(conductivity)
    return Rows(fire=col(fire, np.int64), bare=col(bare, bool), section_factor_per_m=col(section_factor_per_m),
                alpha_c=col(alpha_c), thickness_m=col(thickness_m), density=col(density),
                specific_heat=col(specific_heat), conductivity_C=np.zeros((n, 1)), conductivity=lam[:, None].copy(),
                conductivity_n=np.ones(n, dtype=np.int64), moisture_delay_s=col(moisture_delay_s),
                threshold_C=col(threshold_C))
