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


#: Members advanced side by side in one time loop: independent chains the CPU can overlap.
CHUNK = 32


@nb.njit(cache=True, parallel=True)
def batch(time_s, gas_C, bare, ksh_amv, alpha_c, eps_res, rho_a,
          d_p, rho_p, c_p, lam_T, lam_v, lam_n, delay_s,
          threshold_C, query_idx, keep_history):
    """N members (bare or protected) against one fire; chunks of members spread over the cores.

    Returns (peak_C, peak_time_s, crossing_time_s, at_query_C, last_increment_C, history_C):
    peak over the grid and its first time; first time the steel reaches ``threshold_C[m]``, linear
    between steps (NaN if never); steel temperature at the grid indices ``query_idx`` (ascending;
    N x Q); the last step's increment; the full history (T x N) if ``keep_history`` else 0 x 0.
    For bare members ``ksh_amv`` is k_sh Am/V; for protected ones it is Ap/V.

    Within a chunk the time loop is outside and the member loop inside, so that the steps of
    different members (independent recurrences) overlap in the processor; the arithmetic per
    member-step is that of :func:`bare_increment` / :func:`protected_increment`.
    """
    n_t = time_s.shape[0]
    n_m = ksh_amv.shape[0]
    n_q = query_idx.shape[0]
    peak = np.empty(n_m)
    peak_t = np.empty(n_m)
    cross = np.full(n_m, np.nan)
    at_q = np.full((n_m, n_q), np.nan)
    last = np.zeros(n_m)
    hist = np.empty((n_t, n_m)) if keep_history else np.empty((0, 0))
    n_chunks = (n_m + CHUNK - 1) // CHUNK
    for c in nb.prange(n_chunks):
        lo = c * CHUNK
        w = min(lo + CHUNK, n_m) - lo
        th = np.full(w, 20.0)
        held = np.zeros(w)
        pk = np.full(w, 20.0)
        pkt = np.full(w, time_s[0])
        dlast = np.zeros(w)
        for j in range(w):
            m = lo + j
            if 20.0 >= threshold_C[m]:
                cross[m] = time_s[0]
            if keep_history:
                hist[0, m] = 20.0
        q = 0
        while q < n_q and query_idx[q] == 0:
            for j in range(w):
                at_q[lo + j, q] = 20.0
            q += 1
        for i in range(n_t - 1):
            t0 = time_s[i]
            dt = time_s[i + 1] - t0
            g = gas_C[i]
            dg = gas_C[i + 1] - g
            for j in range(w):
                m = lo + j
                x = th[j]
                if bare[m]:
                    d = bare_increment(x, g, dt, ksh_amv[m], alpha_c, eps_res, rho_a)
                    new = x + d
                else:
                    lam = lam_v[m, 0] if lam_n[m] == 1 else table_value(x, lam_T[m], lam_v[m], lam_n[m])
                    d = protected_increment(x, g, dg, dt, ksh_amv[m], d_p[m], rho_p[m], c_p[m], lam, rho_a)
                    new = x + d
                    if delay_s[m] > 0.0 and held[j] < delay_s[m] and new >= MOISTURE_PLATEAU_C and d > 0.0:
                        if x < MOISTURE_PLATEAU_C:
                            new = MOISTURE_PLATEAU_C
                        else:
                            held[j] += dt
                            new = x
                if new >= threshold_C[m] and np.isnan(cross[m]):
                    cross[m] = t0 + dt * (threshold_C[m] - x) / (new - x)
                dlast[j] = new - x
                th[j] = new
                if new > pk[j]:
                    pk[j] = new
                    pkt[j] = time_s[i + 1]
                if keep_history:
                    hist[i + 1, m] = new
            while q < n_q and query_idx[q] == i + 1:
                for j in range(w):
                    at_q[lo + j, q] = th[j]
                q += 1
        for j in range(w):
            peak[lo + j] = pk[j]
            peak_t[lo + j] = pkt[j]
            last[lo + j] = dlast[j]
    return peak, peak_t, cross, at_q, last, hist


def moisture_delay_s(moisture_percent: float, density: float, thickness_m: float, conductivity: float) -> float:
    """Delay t_v [s] during which free water in the protection holds the steel at 100 C.

    t_v = p rho_p d_p^2 / (5 lambda_p) [min], p the moisture content in % of dry weight, rho_p
    [kg/m3], d_p [m], lambda_p [W/(m K)] at 20 C: the ECCS method (ECCS TC3, Calculation of the fire
    resistance of load bearing elements and structures, 1985), from memory.
    """
    if moisture_percent <= 0.0:
        return 0.0
    return 60.0 * moisture_percent * density * thickness_m ** 2 / (5.0 * conductivity)
