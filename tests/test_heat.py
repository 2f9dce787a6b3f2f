"""Steel heat transfer, EN 1993-1-2 4.2.5: the kernels against independent references.

References: an adaptive scipy.integrate.solve_ivp solution of the same heat balance (the ODE that
eq (4.25) and eq (4.27) discretise, with eq (4.27)'s non-negative rule), and the plain-Python twins
in tests/twins.py.
"""

import math

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from scipy.integrate import solve_ivp

import twins
from steelfire.models import heat
from steelfire.chain.analysis import time_grid
from steelfire.models.fire import nominal, parametric

RHO_A = 7850.0
EPS = 0.7  # eps_m eps_f = 0.7 x 1.0, EN 1993-1-2 2.2(2) and EN 1991-1-2 3.1(6)


def vent_fire():
    # invented compartment: O = 0.06, b = 1000, q_t,d = 200 MJ/m2 -> ventilation-controlled, t_max 40 min
    return parametric.parametric_fire(0.06, 1000.0, 200.0, 20.0 / 60.0)


def gas_rate(pf, t_s):
    """d theta_g / dt [C/s] of an Annex A fire, differentiated by hand from eq (A.1) and (A.11)."""
    t_h = t_s / 3600.0
    if pf.gas_temperature(t_s) <= 20.0 + 1e-12:
        return 0.0
    if t_h <= pf.t_max_h:
        g = pf.gamma if pf.regime == "ventilation" else pf.gamma_lim
        ts = t_h * g
        return 1325.0 * g * (0.324 * 0.2 * math.exp(-0.2 * ts) + 0.204 * 1.7 * math.exp(-1.7 * ts)
                             + 0.472 * 19.0 * math.exp(-19.0 * ts)) / 3600.0
    return -pf.cooling_rate_C_h * pf.gamma / 3600.0


def ivp_peak(rhs, t_end_s, breaks):
    """Peak of the ODE solution, integrated segment by segment between the fire's kinks."""
    edges = [0.0] + [b for b in breaks if 0 < b < t_end_s] + [t_end_s]
    y0 = [20.0]
    peak = 20.0
    for a, b in zip(edges, edges[1:]):
        sol = solve_ivp(rhs, (a, b), y0, method="RK45", rtol=1e-9, atol=1e-9, max_step=20.0, dense_output=True)
        assert sol.success
        ts = np.linspace(a, b, int((b - a) / 0.5) + 2)
        peak = max(peak, float(np.max(sol.sol(ts)[0])))
        y0 = [sol.y[0, -1]]
    return peak


def kernel_peak_bare(pf, ksh_amv, step, t_end):
    t = time_grid(t_end, step, [pf.t_max_s, pf.burnout_time_s])
    h = heat.bare_history(t, pf.gas_temperature(t), ksh_amv, 35.0, EPS, RHO_A)
    return float(h.max())


def kernel_peak_protected(pf, ap_v, d_p, rho_p, c_p, lam, step, t_end):
    t = time_grid(t_end, step, [pf.t_max_s, pf.burnout_time_s])
    h = heat.protected_history(t, pf.gas_temperature(t), ap_v, d_p, rho_p, c_p,
                               np.array([20.0]), np.array([lam]), 1, 0.0, RHO_A)
    return float(h.max())


@pytest.mark.parametrize("amv", [50.0, 150.0, 300.0])
def test_bare_kernel_matches_adaptive_ivp(amv):
    pf = vent_fire()

    def rhs(t, y):
        th, g = y[0], float(pf.gas_temperature(t))
        hnet = 35.0 * (g - th) + EPS * 5.67e-8 * ((g + 273.0) ** 4 - (th + 273.0) ** 4)
        return [amv * hnet / (twins.c_a(th) * RHO_A)]

    ref = ivp_peak(rhs, 7200.0, [pf.t_max_s])
    got = kernel_peak_bare(pf, amv, 5.0, 7200.0)
    assert abs(got - ref) <= 2.0, (got, ref)  # issue requirement: peak within 2 C of solve_ivp


def protected_rhs(pf, ap_v, d_p, rho_p, c_p, lam):
    def rhs(t, y):
        th, g, dg = y[0], float(pf.gas_temperature(t)), gas_rate(pf, t)
        cr = twins.c_a(th) * RHO_A
        phi = c_p * rho_p * d_p * ap_v / cr
        d = lam * ap_v * (g - th) / (d_p * cr * (1 + phi / 3)) - (math.exp(phi / 10) - 1) * dg
        if dg > 0 and d < 0:  # eq (4.27): no drop while the gas heats
            d = 0.0
        return [d]
    return rhs


@pytest.mark.parametrize("ap_v,d_mm", [(100.0, 10.0), (200.0, 20.0), (300.0, 40.0)])
def test_protected_kernel_matches_adaptive_ivp(ap_v, d_mm):
    pf = vent_fire()
    args = (ap_v, d_mm * 1e-3, 800.0, 1700.0, 0.2)  # generic board, illustrative values
    ref = ivp_peak(protected_rhs(pf, *args), 4 * 3600.0, [pf.t_max_s])
    got = kernel_peak_protected(pf, *args, 5.0, 4 * 3600.0)
    assert abs(got - ref) <= 2.0, (got, ref)


@pytest.mark.parametrize("kind", ["bare", "protected"])
def test_peak_converges_as_step_halves(kind):
    pf = vent_fire()
    if kind == "bare":
        peaks = [kernel_peak_bare(pf, 200.0, s, 7200.0) for s in (4.0, 2.0, 1.0, 0.5)]
    else:
        peaks = [kernel_peak_protected(pf, 200.0, 0.015, 800.0, 1700.0, 0.2, s, 4 * 3600.0)
                 for s in (20.0, 10.0, 5.0, 2.5)]
    diffs = [abs(a - b) for a, b in zip(peaks, peaks[1:])]
    # explicit Euler is first order: each halving roughly halves the change (common practice, no source)
    assert diffs[2] < diffs[1] < diffs[0]
    assert 1.4 < diffs[0] / diffs[1] < 3.0 and 1.4 < diffs[1] / diffs[2] < 3.0
    assert diffs[2] < 0.5


def _grid_gas(curve_minutes=120.0, step=5.0):
    t = np.arange(0.0, curve_minutes * 60.0 + step / 2, step)
    pf = vent_fire()
    return t, pf.gas_temperature(t)


def test_numba_bare_matches_plain_python_twin():
    t, g = _grid_gas(step=5.0)
    got = heat.bare_history(t, g, 180.0, 35.0, EPS, RHO_A)
    ref = twins.bare_history(list(t), list(g), 180.0)
    np.testing.assert_allclose(got, ref, rtol=1e-9)


def test_numba_protected_matches_plain_python_twin_with_table_and_moisture():
    t, g = _grid_gas(curve_minutes=240.0, step=10.0)
    table = [(20.0, 0.1), (300.0, 0.14), (600.0, 0.2)]
    delay = heat.moisture_delay_s(5.0, 600.0, 0.02, 0.1)
    got = heat.protected_history(t, g, 220.0, 0.02, 600.0, 1100.0, np.array([p[0] for p in table]),
                                 np.array([p[1] for p in table]), 3, delay, RHO_A)
    ref = twins.protected_history(list(t), list(g), 220.0, 0.02, 600.0, 1100.0, table, delay)
    np.testing.assert_allclose(got, ref, rtol=1e-9)


def test_batch_matches_scalar_kernels():
    t, g = _grid_gas(curve_minutes=200.0, step=5.0)
    n = 5
    bare = np.array([True, False, True, False, False])
    amv = np.array([150.0, 200.0, 60.0, 90.0, 300.0])
    d_p = np.array([1.0, 0.015, 1.0, 0.03, 0.05])
    rho_p = np.array([1.0, 800.0, 1.0, 300.0, 800.0])
    c_p = np.array([1.0, 1700.0, 1.0, 1200.0, 1700.0])
    lam_T = np.array([[20.0, 0.0], [20.0, 0.0], [20.0, 0.0], [20.0, 500.0], [20.0, 0.0]])
    lam_v = np.array([[1.0, 1.0], [0.2, 0.2], [1.0, 1.0], [0.1, 0.2], [0.2, 0.2]])
    lam_n = np.array([1, 1, 1, 2, 1])
    delay = np.array([0.0, 0.0, 0.0, 120.0, 0.0])
    thr = np.array([500.0, 400.0, 550.0, 300.0, 9999.0])
    q = np.array([0, 720, 1440], dtype=np.int64)
    peak, peak_t, cross, at_q, last, hist = heat.batch(t, g, bare, amv, 35.0, EPS, RHO_A, d_p, rho_p, c_p,
                                                       lam_T, lam_v, lam_n, delay, thr, q, True)
    for m in range(n):
        if bare[m]:
            h = heat.bare_history(t, g, amv[m], 35.0, EPS, RHO_A)
        else:
            h = heat.protected_history(t, g, amv[m], d_p[m], rho_p[m], c_p[m], lam_T[m], lam_v[m], lam_n[m],
                                       delay[m], RHO_A)
        np.testing.assert_allclose(hist[:, m], h, rtol=1e-12)
        assert peak[m] == pytest.approx(h.max(), rel=1e-12)
        assert peak_t[m] == t[int(np.argmax(h))]
        np.testing.assert_allclose(at_q[m], h[q], rtol=1e-12)
        assert last[m] == pytest.approx(h[-1] - h[-2], abs=1e-12)
        above = np.nonzero(h >= thr[m])[0]
        if len(above) == 0:
            assert np.isnan(cross[m])
        else:
            j = above[0]
            expect = t[j - 1] + (t[j] - t[j - 1]) * (thr[m] - h[j - 1]) / (h[j] - h[j - 1])
            assert cross[m] == pytest.approx(expect, rel=1e-12)


def test_moisture_delay_holds_steel_at_100C():
    t = np.arange(0.0, 7200.0 + 1, 5.0)
    g = nominal.standard_fire(t)
    args = (150.0, 0.02, 500.0, 1000.0, np.array([20.0]), np.array([0.15]), 1)
    dry = heat.protected_history(t, g, *args, 0.0, RHO_A)
    delay = heat.moisture_delay_s(10.0, 500.0, 0.02, 0.15)
    # ECCS formula t_v = p rho d^2 / (5 lambda) [min] (from memory): 10 x 500 x 0.0004 / 0.75 = 2.667 min
    assert delay == pytest.approx(2.6667 * 60.0, rel=1e-3)
    wet = heat.protected_history(t, g, *args, delay, RHO_A)
    at100 = np.sum(np.isclose(wet, 100.0))
    assert at100 * 5.0 == pytest.approx(delay, abs=10.0)
    assert np.all(wet <= dry + 1e-9)


# ---- properties (hypothesis) ------------------------------------------------------------------

STD_T = np.arange(0.0, 120 * 60.0 + 1, 5.0)
STD_G = nominal.standard_fire(STD_T)


@settings(max_examples=40, deadline=None)
@given(amv=st.floats(10.0, 500.0))
def test_bare_under_standard_fire_bounded(amv):
    h = heat.bare_history(STD_T, STD_G, amv, 25.0, EPS, RHO_A)
    assert np.all(h >= 20.0 - 1e-9)
    assert np.all(h <= np.maximum.accumulate(STD_G) + 1e-9)  # never hotter than the hottest gas so far


def _prot(t, g, ap_v, d, lam=0.2, rho=800.0, c=1700.0):
    return heat.protected_history(t, g, ap_v, d, rho, c, np.array([20.0]), np.array([lam]), 1, 0.0, RHO_A)


@settings(max_examples=40, deadline=None)
@given(ap_v=st.floats(20.0, 400.0), d=st.floats(0.005, 0.08), extra=st.floats(0.0005, 0.02))
def test_protected_under_standard_fire_thicker_never_hotter(ap_v, d, extra):
    thin = _prot(STD_T, STD_G, ap_v, d)
    thick = _prot(STD_T, STD_G, ap_v, d + extra)
    assert np.all(thin >= 20.0 - 1e-9)
    assert np.all(thin <= np.maximum.accumulate(STD_G) + 1e-9)
    assert np.all(thick <= thin + 1e-9)


@settings(max_examples=40, deadline=None)
@given(amv=st.floats(10.0, 400.0), more=st.floats(1.0, 100.0))
def test_bare_larger_section_factor_never_cooler(amv, more):
    b1 = heat.bare_history(STD_T, STD_G, amv, 25.0, EPS, RHO_A)
    b2 = heat.bare_history(STD_T, STD_G, amv + more, 25.0, EPS, RHO_A)
    assert np.all(b2 >= b1 - 1e-9)


def _phi20(ap_v, d, rho=800.0, c=1700.0):
    return c * rho * d * ap_v / (twins.c_a(20.0) * RHO_A)


@settings(max_examples=40, deadline=None)
@given(ap_v=st.floats(20.0, 400.0), more=st.floats(1.0, 100.0), frac=st.floats(0.0, 1.0))
def test_protected_larger_section_factor_never_cooler_for_light_protection(ap_v, more, frac):
    # Eq (4.27) keeps this property only while phi (at 20 C) is about 1 or less, and even there its
    # (e^(phi/10) - 1) d theta_g term, larger for the larger Ap/V, holds the steel at 20 C a little
    # longer in the first minutes: a few tenths of a degree at most (found by a scan of this domain).
    # The thickness is drawn between 5 mm and the one that makes phi = 1 for the larger Ap/V.
    d_phi1 = 0.005 / _phi20(ap_v + more, 0.005)
    if d_phi1 <= 0.005:
        return
    d = 0.005 + frac * (d_phi1 - 0.005)
    assert _phi20(ap_v + more, d) <= 1.0 + 1e-12
    assert np.all(_prot(STD_T, STD_G, ap_v + more, d) >= _prot(STD_T, STD_G, ap_v, d) - 0.25)


def test_protected_heavy_protection_larger_section_factor_can_be_cooler():
    """For heavy protection (phi well above 2) eq (4.27) gives a LOWER steel temperature for a
    larger section factor: the protection's heat capacity term dominates. A property of the
    published equation, recorded here so that nobody 'fixes' the kernel to hide it."""
    a, b = _prot(STD_T, STD_G, 400.0, 0.05), _prot(STD_T, STD_G, 500.0, 0.05)
    assert _phi20(500.0, 0.05) > 5.0
    assert np.min(b - a) < -10.0


@settings(max_examples=30, deadline=None)
@given(o=st.floats(0.02, 0.2), b=st.floats(400.0, 2200.0), q=st.floats(80.0, 900.0),
       ap_v=st.floats(30.0, 300.0), d=st.floats(0.005, 0.05), extra=st.floats(0.001, 0.02))
def test_parametric_heating_phase_properties(o, b, q, ap_v, d, extra):
    pf = parametric.parametric_fire(o, b, q, 20.0 / 60.0)
    t = time_grid(pf.t_max_s, 5.0)
    g = pf.gas_temperature(t)
    thin = _prot(t, g, ap_v, d)
    assert np.all(thin <= np.maximum.accumulate(g) + 1e-9)
    assert np.all(_prot(t, g, ap_v, d + extra) <= thin + 1e-9)
    bare = heat.bare_history(t, g, ap_v, 35.0, EPS, RHO_A)
    assert np.all(bare <= np.maximum.accumulate(g) + 1e-9) and np.all(bare >= 20.0 - 1e-9)


def test_heavy_protection_burnout_peak_rises_with_thickness():
    """Eq (4.27) in the cooling phase: with phi of about 2 and more, the (e^(phi/10) - 1) d theta_g
    term adds heat as the gas drops, and the burnout peak rises with thickness (a property of the
    published equation, reproduced here; DESIGN.md pitfalls)."""
    pf = parametric.parametric_fire(0.04, 1500.0, 370.0, 25.0 / 60.0)
    t = time_grid(6 * 3600.0, 5.0, [pf.t_max_s, pf.burnout_time_s])
    g = pf.gas_temperature(t)
    ap_v = 260.0
    phi = 1700.0 * 800.0 * 0.06 * ap_v / (600.0 * RHO_A)
    assert phi > 2.0
    p60 = _prot(t, g, ap_v, 0.060).max()
    p66 = _prot(t, g, ap_v, 0.066).max()
    assert p66 > p60 + 1.0
    # while under the standard fire the same thickening cools the member at every time
    assert np.all(_prot(STD_T, STD_G, ap_v, 0.066) <= _prot(STD_T, STD_G, ap_v, 0.060) + 1e-9)


def test_expm1_scaled_matches_math_expm1():
    # the kernels' polynomial e^y - 1 against the C library's expm1 (general-purpose reference)
    ys = np.concatenate([np.linspace(0.0, 3.0, 3001), np.geomspace(1e-8, 1e-2, 50)])
    for y in ys:
        ref = math.expm1(y)
        got = heat.expm1_scaled(float(y), heat.EXPM1_TERMS)
        assert got == pytest.approx(ref, rel=1e-12, abs=1e-300)
    for y in np.linspace(3.0, 10.0, 71):
        assert heat.expm1_scaled(float(y), heat.EXPM1_TERMS) == pytest.approx(math.expm1(y), rel=1e-9)


def test_heat_capacity_fraction_is_eq_3_2_times_density():
    # the batch kernels' c_a rho_a = num / den against EN 1993-1-2 eq (3.2a)-(3.2d) (steelfire.steel,
    # written out from the clause), across the branches and at their ends, 20 C clamp included
    from steelfire.models import steel

    xs = np.concatenate([np.linspace(-50.0, 1300.0, 2701), [20.0, 599.999999, 600.0, 734.999999, 735.0, 737.9,
                                                            731.1, 899.999999, 900.0, 1200.0]])
    for x in xs:
        num, den = heat.heat_capacity_fraction(float(x), RHO_A, heat.SPECIFIC_HEAT_TERMS)
        want = steel.specific_heat(min(x, 1200.0)) * RHO_A
        assert num / den == pytest.approx(want, rel=1e-13), x
        assert den == 1.0 or 600.0 <= x < 900.0


def test_bare_step_limit_hand_calculation():
    # gas held at 1000 C, alpha_c = 25, Phi eps_m eps_f = 0.7, rho_a = 7850, dt = 5 s. Worst at
    # theta_a = theta_g = 1000 C (T = 1273 K, the 273 of EN 1991-1-2 eq (3.3)): 4 x 0.7 x 5.67e-8 x 1273^3 = 327.5,
    # + 25 = 352.5 W/(m2 K); c_a = 650 (EN 1993-1-2 eq (3.2d)); k_sh Am/V = 7850 x 650 / (5 x 352.5)
    # = 2895 1/m. (At 20 C: (25 + 0.7 x 5.67e-8 x 1566 x 1706378) / 439.8 = 0.298 < 352.5 / 650 = 0.542.)
    from steelfire.chain.analysis import bare_step_limit_per_m

    t = np.arange(0.0, 601.0, 5.0)
    g = np.full_like(t, 1000.0)
    assert bare_step_limit_per_m(t, g, 25.0, EPS, RHO_A) == pytest.approx(2895.0, rel=2e-3)


@pytest.mark.parametrize("alpha_c, rho_a, dt", [(25.0, 7850.0, 5.0), (500.0, 1000.0, 5.0), (35.0, 7850.0, 60.0)])
def test_bare_step_limit_separates_monotone_from_overshooting_histories(alpha_c, rho_a, dt):
    """Below the limit the explicit eq (4.25) never passes the gas (it approaches 1000 C from below);
    at three times it, the first steps already jump past the gas."""
    from steelfire.chain.analysis import bare_step_limit_per_m

    t = np.arange(0.0, 3600.0 + dt / 2, dt)
    g = np.full_like(t, 1000.0)
    g[0] = 20.0
    limit = bare_step_limit_per_m(t, g, alpha_c, EPS, rho_a)
    below = heat.bare_history(t, g, 0.999 * limit, alpha_c, EPS, rho_a)
    assert np.all(np.diff(below) >= -1e-9) and below.max() <= 1000.0 + 1e-9
    above = heat.bare_history(t, g, 3.0 * limit, alpha_c, EPS, rho_a)
    assert np.nanmax(above[:10]) > 1000.0 + 1.0  # (and then diverges)


def test_every_kernel_can_be_cached(tmp_path):
    """numba caches each kernel on disk (cache=True), so that a second process starts warm; a kernel
    that reads a dynamic global (numba.get_num_threads() inside it, say) silently cannot be cached
    (it warns once, then recompiles in every process). Compiled in a fresh cache folder, no kernel may
    warn, and every batch kernel leaves its index file."""
    import os
    import subprocess
    import sys

    code = (
        "import warnings, numpy as np\n"
        "warnings.simplefilter('error')\n"
        "from steelfire.models import heat\nfrom steelfire.outputs import jsontext\n"
        "t = np.arange(0.0, 601.0, 5.0); g = np.linspace(20.0, 800.0, t.size)\n"
        "n = 3; one = np.ones(n)\n"
        "heat.batch(t, g, np.array([True, False, False]), one * 150.0, 25.0, 0.7, 7850.0, one * 0.02, one * 800.0,\n"
        "           one * 1700.0, np.array([[20.0, 500.0]] * n), np.array([[0.2, 0.3]] * n), np.array([1, 1, 2]),\n"
        "           np.zeros(n), one * 500.0, np.zeros(0, dtype=np.int64), False)\n"
        "jsontext.objects_json({'a': jsontext.Numbers([1.5]), 'b': ['true']})\n"
    )
    env = dict(os.environ, NUMBA_CACHE_DIR=str(tmp_path))
    r = subprocess.run([sys.executable, "-c", code], env=env, capture_output=True, text=True, timeout=600)
    assert r.returncode == 0, r.stderr[-2000:]
    index = {p.name.split("-")[0] for p in tmp_path.rglob("*.nbi")}
    for kernel in ("heat._protected_chunks", "heat._bare_chunks", "jsontext._write_objects"):
        assert kernel in index, (kernel, sorted(index))


# ---- the batch kernels' bookkeeping: chunks handed out as threads finish, first crossing ----------

def _batch_all(t, g, n, rng, thr=None):
    """Every kind of member the batch kernels take (bare, protected with constant and tabulated
    conductivity, moisture), ``n`` of them, against one fire; returns the six outputs with histories."""
    kind = np.arange(n) % 4
    bare = kind == 0
    amv = rng.uniform(40.0, 300.0, n)
    d_p = np.where(bare, 1.0, rng.uniform(0.01, 0.04, n))
    rho_p = np.where(kind == 2, 1300.0, 800.0)
    c_p = np.where(kind == 2, 1200.0, 1700.0)
    lam_T = np.tile([20.0, 300.0, 600.0], (n, 1))
    lam_v = np.where((kind == 2)[:, None], np.tile([0.1, 0.14, 0.2], (n, 1)), 0.2)
    lam_n = np.where(kind == 2, 3, 1)
    delay = np.where(kind == 3, 300.0, 0.0)
    thr = rng.uniform(300.0, 700.0, n) if thr is None else thr
    q = np.array([1, len(t) // 2, len(t) - 1], dtype=np.int64)
    return heat.batch(t, g, bare, amv, 25.0, EPS, RHO_A, d_p, rho_p, c_p, lam_T, lam_v, lam_n, delay, thr, q,
                      True)


@pytest.mark.parametrize("n", [1, 3, heat.CHUNK - 1, heat.CHUNK + 1, 5 * heat.CHUNK + 17])
def test_batch_same_on_one_and_two_threads(n):
    """Chunks are handed out as threads finish (an atomic counter): whichever thread takes which
    chunk, every member is stepped exactly once and the outputs are those of one thread, bit for bit
    (an unvisited chunk would leave the outputs' uninitialised memory, a doubled one is harmless but
    is caught by the equal histories). More threads than chunks (n = 1, 3) included."""
    import numba

    t = time_grid(90 * 60.0, 5.0)
    g = nominal.standard_fire(t)
    before = numba.get_num_threads()
    outs = []
    try:
        for threads in sorted({1, min(2, numba.config.NUMBA_NUM_THREADS)}):
            numba.set_num_threads(threads)
            outs.append(_batch_all(t, g, n, np.random.default_rng(n)))
    finally:
        numba.set_num_threads(before)
    for a, b in zip(outs[0], outs[-1]):
        np.testing.assert_array_equal(a, b)
    peak, _, _, _, _, hist = outs[0]
    assert np.all(np.isfinite(hist)) and np.array_equal(peak, hist.max(axis=0))


@pytest.mark.parametrize("threads,n_m", [(1, 1), (1, 300), (2, 1), (2, 129), (2, 4000), (3, 1000)])
def test_chunking_covers_every_member(threads, n_m):
    """The chunks of _chunking cover members 0..n-1 once, none wider than CHUNK, and their count is
    a multiple of the threads when there are enough members (equal shares for equal cores)."""
    n_chunks, width = heat._chunking(n_m, threads)
    covered = np.concatenate([np.arange(c * width, min((c + 1) * width, n_m)) for c in range(n_chunks)])
    assert np.array_equal(covered, np.arange(n_m))
    assert width <= heat.CHUNK and all(c * width < n_m for c in range(n_chunks))
    if n_m >= threads * heat.CHUNK:
        assert n_chunks % threads == 0


def test_first_crossing_after_a_dip():
    """A fire that heats, cools and heats again (a tabulated curve can): a threshold above the first
    peak is first reached in the second rise, after the steel has cooled; one below it in the first
    rise, and never again counted. The crossing time is the first step's linear interpolation, read
    off the kernels' own histories (the definition in heat.batch), also where that step starts
    below the earlier peak (a threshold just above it)."""
    t = time_grid(210 * 60.0, 5.0)
    knots_min = [0.0, 20.0, 90.0, 150.0, 210.0]
    knots_C = [20.0, 800.0, 20.0, 1000.0, 1000.0]      # invented curve: a fire, burnout, a second fire
    g = np.interp(t / 60.0, knots_min, knots_C)
    n = 8
    hist = _batch_all(t, g, n, np.random.default_rng(11), thr=np.full(n, 1.0))[5]
    at_100 = int(np.searchsorted(t, 100 * 60.0))
    first_peak = hist[:at_100].max(axis=0)
    assert np.sum(hist[at_100] < first_peak - 20.0) >= 3   # the steel cooled between the two fires
    second_rise = straddle = 0
    for offset in (5.0, 0.01, -50.0):
        thr = first_peak + offset
        cross = _batch_all(t, g, n, np.random.default_rng(11), thr=thr)[2]
        for m in range(n):
            h = hist[:, m]
            above = np.nonzero(h >= thr[m])[0]
            if len(above) == 0:
                assert np.isnan(cross[m])
                continue
            j = above[0]
            expect = t[j - 1] + (t[j] - t[j - 1]) * (thr[m] - h[j - 1]) / (h[j] - h[j - 1])
            assert cross[m] == pytest.approx(expect, rel=1e-12)
            second_rise += offset > 0 and t[j] > 100 * 60.0
            straddle += bool(h[j - 1] < first_peak[m] <= thr[m] <= h[j])
    assert second_rise == 2 * n   # every member reaches the higher thresholds in the second fire
    # and some step into the crossing starts below the earlier peak (not at the running maximum)
    assert straddle >= 2
