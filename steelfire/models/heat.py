"""Steel temperature by the lumped-capacitance method of EN 1993-1-2 4.2.5.

Two recurrences, stepped explicitly on a time grid (which need not be uniform, so that t_max of a
parametric fire can sit on it):

* bare steel, 4.2.5.1 eq (4.25):
  d theta_a = k_sh (Am/V) / (c_a rho_a) h_net,d dt, with the net heat flux of EN 1991-1-2 eq (3.1)-(3.3)
  h_net = alpha_c (theta_g - theta_a) + Phi eps_m eps_f sigma ((theta_g + 273)^4 - (theta_a + 273)^4);
* protected steel, 4.2.5.2 eq (4.27):
  d theta_a = lambda_p (Ap/V) (theta_g - theta_a) / (d_p c_a rho_a (1 + phi/3)) dt - (e^(phi/10) - 1) d theta_g,
  phi = c_p rho_p d_p (Ap/V) / (c_a rho_a), with d theta_a >= 0 while the gas is heating (d theta_g > 0).

c_a is taken at the steel temperature at the start of each step (EN 1993-1-2 3.4.1.2), lambda_p
from the member's table at the steel temperature (held at the table's ends). Free water in the
protection holds the steel at 100 C for a delay t_v (see :func:`moisture_delay_s`).

The kernels are numba functions (``cache=True``); every public kernel has a plain-Python twin in
``tests/twins.py`` that it matches to 1e-9 relative. Inputs are assumed clean: validation happens
in the case loader and in the public wrappers below.
"""

from __future__ import annotations

import math

import numba as nb
import numpy as np
from numba.core import cgutils
from numba.extending import intrinsic

#: Stefan-Boltzmann constant [W/(m2 K4)], EN 1991-1-2 3.1(6).
STEFAN_BOLTZMANN = 5.67e-8
#: Absolute zero offset used by EN 1991-1-2 eq (3.3) [K].
KELVIN = 273.0
#: Temperature at which the moisture delay holds the steel [C] (common practice, no source).
MOISTURE_PLATEAU_C = 100.0


@nb.njit(cache=True, inline="always")
def specific_heat_steel(theta):
    """c_a [J/(kg K)], EN 1993-1-2 eq (3.2a)-(3.2d); held below 20 C and above 1200 C."""
    if theta < 600.0:
        t = theta if theta > 20.0 else 20.0
        return 425.0 + 0.773 * t - 1.69e-3 * t * t + 2.22e-6 * t * t * t
    if theta < 735.0:
        return 666.0 + 13002.0 / (738.0 - theta)
    if theta < 900.0:
        return 545.0 + 17820.0 / (theta - 731.0)
    return 650.0


@nb.njit(cache=True, inline="always")
def table_value(x, xs, ys, n):
    """Linear interpolation in the first ``n`` points of (xs, ys), ends held."""
    if n == 1 or x <= xs[0]:
        return ys[0]
    if x >= xs[n - 1]:
        return ys[n - 1]
    i = 1
    while xs[i] < x:
        i += 1
    return ys[i - 1] + (ys[i] - ys[i - 1]) * (x - xs[i - 1]) / (xs[i] - xs[i - 1])


@nb.njit(cache=True, inline="always")
def bare_increment(theta_a, theta_g, dt, ksh_amv, alpha_c, eps_res, rho_a):
    """One step of EN 1993-1-2 eq (4.25) [C]; ``ksh_amv`` = k_sh Am/V [1/m], eps_res = Phi eps_m eps_f."""
    tg = theta_g + KELVIN
    ta = theta_a + KELVIN
    h_net = alpha_c * (theta_g - theta_a) + eps_res * STEFAN_BOLTZMANN * (tg * tg * tg * tg - ta * ta * ta * ta)
    return ksh_amv / (specific_heat_steel(theta_a) * rho_a) * h_net * dt


@nb.njit(cache=True, inline="always")
def protected_increment(theta_a, theta_g, d_theta_g, dt, ap_v, d_p, rho_p, c_p, lam_p, rho_a):
    """One step of EN 1993-1-2 eq (4.27) [C], with its rule d theta_a >= 0 while d theta_g > 0."""
    ca_rho = specific_heat_steel(theta_a) * rho_a
    phi = c_p * rho_p * d_p * ap_v / ca_rho
    d = lam_p * ap_v * (theta_g - theta_a) / (d_p * ca_rho * (1.0 + phi / 3.0)) * dt \
        - (math.exp(phi / 10.0) - 1.0) * d_theta_g
    if d_theta_g > 0.0 and d < 0.0:
        d = 0.0
    return d


@nb.njit(cache=True)
def bare_history(time_s, gas_C, ksh_amv, alpha_c, eps_res, rho_a):
    """Steel temperature history [C] of one bare member on the grid ``time_s`` [s]; starts at 20 C."""
    n = time_s.shape[0]
    out = np.empty(n)
    theta = 20.0
    out[0] = theta
    for i in range(n - 1):
        theta += bare_increment(theta, gas_C[i], time_s[i + 1] - time_s[i], ksh_amv, alpha_c, eps_res, rho_a)
        out[i + 1] = theta
    return out


@nb.njit(cache=True)
def protected_history(time_s, gas_C, ap_v, d_p, rho_p, c_p, lam_T, lam_v, lam_n, delay_s, rho_a):
    """Steel temperature history [C] of one protected member on the grid ``time_s`` [s]; starts at 20 C.

    ``lam_T``/``lam_v``: the conductivity table (steel temperature [C], lambda_p [W/(m K)]), first
    ``lam_n`` points used; ``delay_s``: moisture delay at 100 C [s].
    """
    n = time_s.shape[0]
    out = np.empty(n)
    theta = 20.0
    held = 0.0
    out[0] = theta
    for i in range(n - 1):
        dt = time_s[i + 1] - time_s[i]
        lam = table_value(theta, lam_T, lam_v, lam_n)
        d = protected_increment(theta, gas_C[i], gas_C[i + 1] - gas_C[i], dt, ap_v, d_p, rho_p, c_p, lam, rho_a)
        if delay_s > 0.0 and held < delay_s and theta + d >= MOISTURE_PLATEAU_C and d > 0.0:
            if theta < MOISTURE_PLATEAU_C:
                theta = MOISTURE_PLATEAU_C
            else:
                held += dt
        else:
            theta += d
        out[i + 1] = theta
    return out


#: Members advanced side by side in one time loop: independent chains that the processor overlaps
#: and vectorises (the member loop inside the time loop has no branches, only selects). 128 keeps a
#: chunk's working arrays (about 20 of them) in a 32 KiB L1 data cache, and gives the threads enough
#: chunks to share out as they go (see :func:`_take_ticket`); measured on an AVX2 core against 64 and
#: 256: as fast on one thread, and the two-thread ratio highest.
CHUNK = 128
#: Floating-point liberty of the batch kernels: "contract" alone, so that the compiler may fuse a
#: multiply and the add that follows into one fused multiply-add (rounded once instead of twice).
#: Results move by an ulp or so (the twins agree to 1e-12); no other IEEE rule is relaxed (NaN, inf,
#: signed zeros and the order of operations are kept). Measured on an AVX2 core (no AVX-512): 5-8 %
#: fewer ns per member-step.
BATCH_MATH = {"contract"}


#: The numbers of :func:`expm1_scaled`, in the order it reads them: 1/16, then the Taylor
#: coefficients 1/2!, 1/3!, ..., 1/11! of e^z - 1 after the leading 1, then 2 (of the squarings)
#: and that leading 1.
EXPM1_TERMS = np.array([1.0 / 16.0] + [1.0 / math.factorial(k) for k in range(2, 12)] + [2.0, 1.0])
#: The numbers of EN 1993-1-2 eq (3.2a)-(3.2d) in the order :func:`heat_capacity_fraction` reads
#: them: 20 C and the cubic's 425, 0.773, -1.69e-3, 2.22e-6 (3.2a, 20-600 C); 735 C, 738, 666,
#: 13002 (3.2b, 600-735 C); 731, 545, 17820 (3.2c, 735-900 C); 600 C, 900 C, 650 (3.2d, 900-1200 C).
SPECIFIC_HEAT_TERMS = np.array([20.0, 425.0, 0.773, -1.69e-3, 2.22e-6, 735.0, 738.0, 666.0, 13002.0, 731.0, 545.0,
                                17820.0, 600.0, 900.0, 650.0])
# Why the batch kernels take these numbers as arguments and not as literals: a literal becomes a
# constant in memory that the compiled loop loads afresh in every iteration once the 16 vector
# registers of an AVX2 core are full (two instructions each, as numba's code model addresses
# constants); a number passed in is loaded from the stack by the arithmetic instruction itself.
# Measured on an AVX2 core: pass 1 of eq (4.27) 71 -> 50 instructions per 4 members, e^y - 1
# 61 -> 32; 9-13 % fewer ns per member-step. The values are those of the clause either way
# (tests/test_heat.py holds both functions to eq (3.2) and to math.expm1).


@nb.njit(cache=True, inline="always", error_model="numpy", fastmath=BATCH_MATH)
def expm1_scaled(y, k):
    """e^y - 1 by a degree-11 Taylor polynomial of e^(y/16) - 1 and four squarings ((1+p)^2 - 1 = p (2 + p));
    ``k`` is :data:`EXPM1_TERMS`.

    A vectorisable stand-in for math.expm1 on 0 <= y <= 3 (phi <= 30 in eq (4.27)): relative error
    below 1e-12 there (tests/test_heat.py checks it against math.expm1), below 1e-10 up to y = 10.
    The polynomial is evaluated in Estrin's form (pairs of terms, then powers z^2, z^4, z^8), so
    its chain of dependent operations is short: the batch kernels are bound by such chains.
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

    den is 1 outside 600-900 C and (738 - x) or (x - 731) inside, so that a kernel can fold c_a's
    division into its own single one.
    """
    t20 = max(x, k[0])                                                  # held at 20 C below
    cubic = k[1] + t20 * (k[2] + t20 * (k[3] + t20 * k[4]))             # (3.2a)
    below = x < k[5]                                                    # 735 C
    den_f = (k[6] - x) if below else (x - k[9])                         # 738 - x | x - 731
    num_f = (k[7] * den_f + k[8]) if below else (k[10] * den_f + k[11])  # (3.2b) | (3.2c), times den
    inside = x >= k[12] and x < k[13]                                   # 600-900 C
    num = rho_a * (num_f if inside else (cubic if x < k[12] else k[14]))  # (3.2d): 650
    return num, (den_f if inside else 1.0)


@nb.njit(cache=True, inline="always")
def _chunking(n_m, nt):
    """(number of chunks, members per chunk): chunks of at most CHUNK members, as many as a multiple
    of the ``nt`` threads and all of about one size, so that threads of equal speed finish together
    (two threads: 1.72x one thread with a short last chunk, 1.91x with equal ones, measured here).
    The thread count comes in as an argument: read inside a kernel it stops numba caching it."""
    nt = max(nt, 1)
    n_chunks = (n_m + CHUNK - 1) // CHUNK
    n_chunks = ((n_chunks + nt - 1) // nt) * nt
    width = max((n_m + n_chunks - 1) // n_chunks, 1)
    return (n_m + width - 1) // width, width


@intrinsic
def _take_ticket(typingctx, counter):
    """Atomically add 1 to ``counter[0]`` (a 1-element int64 array) and return its value before.

    LLVM's ``atomicrmw add`` (monotonic order: a counter, nothing else is published through it).
    The chunk kernels hand out their chunks with it: each thread takes the next chunk when it has
    finished one, so that a core that runs slower for a while (a virtual machine's core shared with
    another guest, a core clocked lower) does fewer chunks instead of holding the other one up.
    """
    sig = nb.types.int64(counter)

    def codegen(context, builder, signature, args):
        ary_t = signature.args[0]
        ary = context.make_array(ary_t)(context, builder, args[0])
        ptr = cgutils.get_item_pointer(context, builder, ary_t, ary, [context.get_constant(nb.types.intp, 0)])
        return builder.atomic_rmw("add", ptr, context.get_constant(nb.types.int64, 1), "monotonic")

    return sig, codegen


@nb.njit(cache=True, inline="always")
def _outputs(n_m, n_q, n_t, keep_history):
    """The batch outputs: peak, its time, crossing time (NaN: never), queried temperatures, last step, history."""
    hist = np.empty((n_t, n_m)) if keep_history else np.empty((0, 0))
    return (np.empty(n_m), np.empty(n_m), np.full(n_m, np.nan), np.full((n_m, n_q), np.nan), np.zeros(n_m), hist)


@nb.njit(cache=True, inline="always")
def _chunk_state(w):
    """Per-member state of a chunk: temperature (20 C), peak, its step, the step of the first crossing
    of the threshold and the temperatures either side of it (+inf: none yet; see :func:`_track`),
    the last increment."""
    return (np.full(w, 20.0), np.full(w, 20.0), np.zeros(w, dtype=np.int64), np.full(w, np.inf),
            np.full(w, np.inf), np.full(w, np.inf), np.zeros(w))


@nb.njit(cache=True, inline="always")
def _track(i, i_f, before, new, thr, pk, pki, ci, cx, cn):
    """After step ``i`` (``i_f`` = float(i)) took a member from ``before`` to ``new`` [C]: its peak
    ``pk`` and the step ``pki`` that first reached it, and the first crossing of the threshold
    ``thr`` (step ``ci``, temperatures ``cx``, ``cn`` either side; +inf: none yet). Returns the
    five updated.

    The crossing is kept as minima: ``first`` (the step ends at or above the threshold while the
    peak before it was below) is true in at most one step of a member, so the minimum of (step,
    temperatures either side) over the steps where it is true, +inf elsewhere, is that step's.
    Written as minima of selects, the pass stores whole vectors where "update only where" compiles
    to masked stores (on an AVX2 core: one masked store left instead of three, and 5-10 % fewer ns
    per protected member-step in interleaved timings)."""
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


@nb.njit(cache=True, parallel=True, error_model="numpy", fastmath=BATCH_MATH)
def _protected_chunks(time_s, gas_C, ap_v, d_p, rho_p, c_p, lam_T, lam_v, lam_n, delay_s, rho_a,
                      threshold_C, query_idx, keep_history, n_threads, ca_k, ex_k):
    n_t = time_s.shape[0]
    n_m = ap_v.shape[0]
    n_q = query_idx.shape[0]
    n_k = lam_T.shape[1]
    peak, peak_t, cross, at_q, last, hist = _outputs(n_m, n_q, n_t, keep_history)
    n_chunks, width = _chunking(n_m, n_threads)
    tickets = np.zeros(1, dtype=np.int64)
    for _worker in nb.prange(min(n_threads, n_chunks)):
        c = _take_ticket(tickets)
        while c < n_chunks:
            lo = c * width
            w = min(lo + width, n_m) - lo
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
                nk = lam_n[m]
                for k in range(n_k):
                    if k < nk:
                        tk[k, j] = lam_T[m, k]
                        vk[k, j] = lam_v[m, k]
                        sk[k, j] = (lam_v[m, k + 1] - lam_v[m, k]) / (lam_T[m, k + 1] - lam_T[m, k]) if k + 1 < nk else 0.0
                    else:
                        tk[k, j] = np.inf
                        vk[k, j] = 0.0
                        sk[k, j] = 0.0
                lamj[j] = lam_v[m, 0]
            q = _record(th, lo, w, 0, 0, query_idx, at_q, hist, keep_history)
            for i in range(n_t - 1):
                t0 = time_s[i]
                dt = time_s[i + 1] - t0
                g = gas_C[i]
                dg = gas_C[i + 1] - g
                d_min = 0.0 if dg > 0.0 else -np.inf      # eq (4.27)'s rule, as a lower bound
                # lambda_p at the steel temperature: the segment whose knot is the last one below it
                # (separate passes over the chunk, so that each innermost loop runs over members);
                # a group of constant conductivities (one knot each) keeps the value set above
                if n_k > 1:
                    for j in range(w):
                        lamj[j] = vk[0, j] + sk[0, j] * (max(th[j], tk[0, j]) - tk[0, j])
                    for k in range(1, n_k):
                        for j in range(w):
                            x = th[j]
                            cand = vk[k, j] + sk[k, j] * (x - tk[k, j])
                            lamj[j] = cand if x > tk[k, j] else lamj[j]
                # eq (4.27) in three passes over the chunk (c_a and the step's one division; e^(phi/10) - 1;
                # the increment, its rules, the moisture plateau, peak and crossing): each pass is a short
                # chain per member, so the processor keeps many members in flight (one long pass is bound
                # by its chain's latency). With c_a rho_a = num / den: phi = c_p rho_p d_p (Ap/V) den / num
                # and 1 / (c_a rho_a (1 + phi/3)) = den / (num + den c_p rho_p d_p (Ap/V) / 3): one
                # division r = 1 / (num (num + den cap/3)) gives both.
                for j in range(w):
                    x = th[j]
                    num, den = heat_capacity_fraction(x, rho_a, ca_k)
                    s = num + cap3[j] * den
                    r = 1.0 / (num * s)
                    phi10[j] = 0.1 * cap[j] * den * s * r
                    flow[j] = lamj[j] * k_[j] * (g - x) * dt * den * num * r
                for j in range(w):
                    ex[j] = expm1_scaled(phi10[j], ex_k)
                i_f = float(i)
                for j in range(w):
                    x = th[j]
                    d = max(flow[j] - ex[j] * dg, d_min)   # not negative while the gas heats
                    new = x + d
                    # moisture: hold at 100 C until the delay is used up
                    hold = (held[j] < dly[j]) & (new >= MOISTURE_PLATEAU_C) & (d > 0.0)
                    at = x >= MOISTURE_PLATEAU_C
                    held[j] = held[j] + dt if (hold & at) else held[j]
                    new = (x if at else MOISTURE_PLATEAU_C) if hold else new
                    dl[j] = new - x
                    th[j] = new
                    pki[j], pk[j], ci[j], cx[j], cn[j] = _track(i, i_f, x, new, thr[j], pk[j], pki[j], ci[j], cx[j],
                                                                cn[j])
                q = _record(th, lo, w, i + 1, q, query_idx, at_q, hist, keep_history)
            _finish(time_s, lo, w, pk, pki, dl, ci, cx, cn, thr, peak, peak_t, last, cross)
            c = _take_ticket(tickets)
    return peak, peak_t, cross, at_q, last, hist


@nb.njit(cache=True, parallel=True, error_model="numpy", fastmath=BATCH_MATH)
def _bare_chunks(time_s, gas_C, ksh_amv, alpha_c, eps_res, rho_a, threshold_C, query_idx, keep_history,
                 n_threads, ca_k):
    n_t = time_s.shape[0]
    n_m = ksh_amv.shape[0]
    n_q = query_idx.shape[0]
    peak, peak_t, cross, at_q, last, hist = _outputs(n_m, n_q, n_t, keep_history)
    er = eps_res * STEFAN_BOLTZMANN
    n_chunks, width = _chunking(n_m, n_threads)
    tickets = np.zeros(1, dtype=np.int64)
    for _worker in nb.prange(min(n_threads, n_chunks)):
        c = _take_ticket(tickets)
        while c < n_chunks:
            lo = c * width
            w = min(lo + width, n_m) - lo
            th, pk, pki, ci, cx, cn, dl = _chunk_state(w)
            kk = np.empty(w)
            thr = np.empty(w)
            for j in range(w):
                kk[j] = ksh_amv[lo + j]
                thr[j] = threshold_C[lo + j]
            q = _record(th, lo, w, 0, 0, query_idx, at_q, hist, keep_history)
            for i in range(n_t - 1):
                dt = time_s[i + 1] - time_s[i]
                g = gas_C[i]
                tg = g + KELVIN
                tg4 = tg * tg * tg * tg
                i_f = float(i)
                for j in range(w):
                    x = th[j]
                    ta = x + KELVIN
                    ta2 = ta * ta
                    h_net = alpha_c * (g - x) + er * (tg4 - ta2 * ta2)
                    num, den = heat_capacity_fraction(x, rho_a, ca_k)  # c_a rho_a = num / den: one division
                    new = x + kk[j] * h_net * dt * den / num
                    pki[j], pk[j], ci[j], cx[j], cn[j] = _track(i, i_f, x, new, thr[j], pk[j], pki[j], ci[j], cx[j],
                                                                cn[j])
                    dl[j] = new - x
                    th[j] = new
                q = _record(th, lo, w, i + 1, q, query_idx, at_q, hist, keep_history)
            _finish(time_s, lo, w, pk, pki, dl, ci, cx, cn, thr, peak, peak_t, last, cross)
            c = _take_ticket(tickets)
    return peak, peak_t, cross, at_q, last, hist


def batch(time_s, gas_C, bare, ksh_amv, alpha_c, eps_res, rho_a,
          d_p, rho_p, c_p, lam_T, lam_v, lam_n, delay_s,
          threshold_C, query_idx, keep_history):
    """N members (bare or protected) against one fire.

    Returns (peak_C, peak_time_s, crossing_time_s, at_query_C, last_increment_C, history_C):
    peak over the grid and its first time; first time the steel reaches ``threshold_C[m]``, linear
    between steps (NaN if never); steel temperature at the grid indices ``query_idx`` (ascending;
    N x Q); the last step's increment; the full history (T x N) if ``keep_history`` else 0 x 0.
    For bare members ``ksh_amv`` is k_sh Am/V; for protected ones it is Ap/V.

    Members are grouped (bare; protected with one conductivity value; protected with a table) and
    each group runs in a compiled kernel that advances chunks of members side by side, chunks spread
    over the cores. The arithmetic per member-step is that of :func:`bare_increment` and
    :func:`protected_increment`, rearranged to one division for eq (4.27) and with
    :func:`expm1_scaled` for e^(phi/10) - 1; the results match the plain-Python twins to 1e-9.
    """
    bare = np.asarray(bare, dtype=np.bool_)
    n = bare.shape[0]
    q = np.ascontiguousarray(query_idx, dtype=np.int64)
    n_t = time_s.shape[0]
    peak = np.empty(n)
    peak_t = np.empty(n)
    cross = np.empty(n)
    at_q = np.empty((n, q.shape[0]))
    last = np.empty(n)
    hist = np.empty((n_t, n)) if keep_history else np.empty((0, 0))
    thr = np.asarray(threshold_C, dtype=float)
    lam_n = np.asarray(lam_n, dtype=np.int64)
    groups = [np.nonzero(bare)[0], np.nonzero(~bare & (lam_n == 1))[0], np.nonzero(~bare & (lam_n > 1))[0]]
    n_threads = int(nb.get_num_threads())
    for gi, idx in enumerate(groups):
        if len(idx) == 0:
            continue
        if gi == 0:
            out = _bare_chunks(time_s, gas_C, np.ascontiguousarray(ksh_amv[idx]), float(alpha_c), float(eps_res),
                               float(rho_a), thr[idx], q, keep_history, n_threads,
                               SPECIFIC_HEAT_TERMS)
        else:
            k = 1 if gi == 1 else int(lam_n[idx].max())
            out = _protected_chunks(time_s, gas_C, np.ascontiguousarray(ksh_amv[idx]), d_p[idx], rho_p[idx],
                                    c_p[idx], np.ascontiguousarray(lam_T[idx, :k]),
                                    np.ascontiguousarray(lam_v[idx, :k]), lam_n[idx], delay_s[idx], float(rho_a),
                                    thr[idx], q, keep_history, n_threads, SPECIFIC_HEAT_TERMS,
                                    EXPM1_TERMS)
        peak[idx], peak_t[idx], cross[idx], at_q[idx], last[idx] = out[0], out[1], out[2], out[3], out[4]
        if keep_history:
            hist[:, idx] = out[5]
    return peak, peak_t, cross, at_q, last, hist


#: Smallest specific heat of carbon steel [J/(kg K)]: EN 1993-1-2 eq (3.2a) at 20 C (it rises from there).
STEEL_SPECIFIC_HEAT_MIN = 425.0 + 0.773 * 20.0 - 1.69e-3 * 20.0 ** 2 + 2.22e-6 * 20.0 ** 3


def stable_min_thickness_m(conductivity, specific_heat, density, section_factor_per_m, time_step_s, rho_a=7850.0):
    """Least protection thickness [m] for which eq (4.27), stepped explicitly, cannot carry the steel
    past the gas temperature in one step.

    Eq (4.27) moves the steel by a (theta_g - theta_a) per step with
    a = lambda_p (Ap/V) dt / (d_p c_a rho_a (1 + phi/3)), phi = c_p rho_p d_p (Ap/V) / (c_a rho_a).
    Above a = 1 the history oscillates and grows without bound. With the largest conductivity and
    the smallest c_a, a = 1 gives d_min = 2 L / (B + sqrt(B^2 + 4 A L)), where
    A = c_p rho_p (Ap/V) / 3, B = c_a rho_a and L = lambda_p (Ap/V) dt. Works on arrays.
    """
    ca_rho = STEEL_SPECIFIC_HEAT_MIN * rho_a
    quad = np.asarray(specific_heat) * np.asarray(density) * np.asarray(section_factor_per_m) / 3.0
    load = np.asarray(conductivity) * np.asarray(section_factor_per_m) * time_step_s
    return 2.0 * load / (ca_rho + np.sqrt(ca_rho ** 2 + 4.0 * quad * load))


def moisture_delay_s(moisture_percent: float, density: float, thickness_m: float, conductivity: float) -> float:
    """Delay t_v [s] during which free water in the protection holds the steel at 100 C.

    t_v = p rho_p d_p^2 / (5 lambda_p) [min], p the moisture content in % of dry weight, rho_p
    [kg/m3], d_p [m], lambda_p [W/(m K)] at 20 C: the ECCS method (ECCS TC3, Calculation of the fire
    resistance of load bearing elements and structures, 1985), from memory.
    """
    if moisture_percent <= 0.0:
        return 0.0
    return 60.0 * moisture_percent * density * thickness_m ** 2 / (5.0 * conductivity)
