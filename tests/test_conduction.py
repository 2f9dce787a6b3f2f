"""1-D conduction model of protected steel (steelfire.models.conduction) against independent references.

References: the plain-Python twin (tests/twins_conduction.py); eq (4.27) of EN 1993-1-2 with a
massless layer (steelfire.models.heat, phi = 0); the erfc solution of a semi-infinite solid under a
step surface temperature (Carslaw and Jaeger, Conduction of Heat in Solids, 2nd ed. 1959, 2.4,
from memory); scipy.integrate.solve_ivp (BDF) on a fine method-of-lines grid; the ECCS moisture
delay t_v = p rho_p d_p^2 / (5 lambda_p) [min] (steelfire.models.protection.moisture_delay_s, from memory);
hand reasoning (maximum and comparison principles, energy conservation) written out beside each check.

Materials are illustrative (generic classes, not products); fires are EN 1991-1-2 curves.
"""

import doctest
import math

import numba
import numpy as np
import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st
from scipy.integrate import quad, solve_ivp
from scipy.sparse import diags
from scipy.special import erfc

import twins
import twins_conduction as tc
from steelfire.chain.fires import time_grid
from steelfire.errors import InputError
from steelfire.models import conduction as C
from steelfire.models import heat
from steelfire.models.fire import nominal, parametric
from steelfire.models.protection import moisture_delay_s


def lumped_history(t, g, ap_v, d_p, rho_p, c_p, lam, delay_s=0.0, rho_a=7850.0):
    """Eq (4.27) by the batch kernels (steelfire.models.heat.run), one member, its history on the grid."""
    rows = heat.uniform_rows(1, bare=False, section_factor_per_m=ap_v, thickness_m=d_p, density=rho_p,
                             specific_heat=c_p, conductivity=lam, moisture_delay_s=delay_s)
    return heat.run(heat.Fires(t, np.asarray(g, dtype=float)[:, None]), rows, emissivity_resultant=0.7,
                    steel_density_kg_m3=rho_a, keep_history=True).history_C[:, 0]

RHO_A = 7850.0  # EN 1993-1-2 3.2.2(1)
#: Illustrative protection classes (density [kg/m3], specific heat [J/(kg K)], conductivity [W/(m K)]):
BOARD = (800.0, 1700.0, 0.2)      # gypsum-based board, as steelfire/data/materials_generic.toml
SPRAY = (300.0, 1200.0, 0.12)     # sprayed mineral fibre, idem
HEAVY = (1200.0, 2200.0, 0.2)     # the heavy protection of the eq (4.27) report (rho_p 1200, c_p 2200)
COATING_TABLE = ((20.0, 0.015), (300.0, 0.02), (500.0, 0.025), (700.0, 0.04))  # cases/office_bay.toml coating-c


def vent_fire():
    # invented compartment (as tests/test_heat.py): O = 0.06, b = 1000, q_t,d = 200 MJ/m2 -> ventilation-
    # controlled Annex A fire, t_max 40 min, cooling to 20 C
    return parametric.parametric_fire(0.06, 1000.0, 200.0, 20.0 / 60.0)


def office_bay_fire():
    # cases/office_bay.toml as steelfire analyses it: O = 0.08703 m^0.5, b = 1429.17, q_t,d = 98.724 MJ/m2,
    # t_lim 20 min: fuel-controlled, peak 642.1 C at 20 min, burnout at 40.9 min
    return parametric.parametric_fire(0.08702534831350535, 1429.1716216924262, 98.72368184563005, 20.0 / 60.0)


def fire_grid(pf, minutes, step):
    t = time_grid(minutes * 60.0, step, [pf.t_max_s, pf.burnout_time_s])
    return t, pf.gas_temperature(t)


def iso(minutes, step):
    t = np.arange(0.0, minutes * 60.0 + 0.5 * step, step)
    return t, nominal.standard_fire(t)


def inputs(time_s, gas, members, threshold_C=np.inf, fire_index=None):
    """members: tuples (A_p/V, d_p, rho_p, c_p, conductivity or table, moisture %)."""
    gas = np.asarray(gas, dtype=float)
    gas = gas.reshape(gas.shape[0], -1)
    n = len(members)
    tables = [((20.0, m[4]),) if isinstance(m[4], float) else m[4] for m in members]
    k = max(len(tb) for tb in tables)
    lt = np.zeros((n, k))
    lv = np.zeros((n, k))
    for i, tb in enumerate(tables):
        for j, (a, b) in enumerate(tb):
            lt[i, j], lv[i, j] = a, b
    col = lambda i: np.array([float(m[i]) for m in members])  # noqa: E731
    fi = np.zeros(n, dtype=np.int64) if fire_index is None else np.asarray(fire_index, dtype=np.int64)
    return C.ConductionInputs(np.asarray(time_s, dtype=float), gas, fi, col(0), col(1), col(2), col(3), lt, lv,
                              np.array([len(tb) for tb in tables]), col(5),
                              np.broadcast_to(np.asarray(threshold_C, dtype=float), (n,)).copy())


def table_of(m):
    return ((20.0, m[4]),) if isinstance(m[4], float) else m[4]


# ---------------------------------------------------------------------------------------------
# the compiled kernel and its plain-Python twin


TWIN_CASES = {
    # name: (fire, members [(A_p/V, d_p, rho_p, c_p, lambda, p %)], cells, substeps, surface)
    "dry constant lambda (fast path)": ("iso", [(200.0, 0.02, *BOARD, 0.0), (340.0, 0.04, *HEAVY, 0.0),
                                                (100.0, 0.01, *SPRAY, 0.0)], 8, 1, None),
    "dry, 12 cells, 3 substeps, parametric with cooling": ("vent", [(200.0, 0.02, *BOARD, 0.0),
                                                                    (300.0, 0.005, *BOARD, 0.0)], 12, 3, None),
    "conductivity table": ("iso", [(240.0, 0.0035, 1300.0, 1200.0, COATING_TABLE, 0.0),
                                   (150.0, 0.015, 600.0, 1200.0, ((20.0, 0.12), (600.0, 0.2)), 0.0)], 8, 2, None),
    "free water, ISO 834": ("iso", [(200.0, 0.02, *BOARD, 20.0), (150.0, 0.015, 600.0, 1200.0, 0.15, 3.0)], 8, 1,
                            None),
    "free water, parametric with cooling": ("vent", [(200.0, 0.02, *BOARD, 20.0), (100.0, 0.03, *BOARD, 10.0)],
                                            10, 2, None),
    "free water, 32 cells (re-solves)": ("iso", [(200.0, 0.02, *BOARD, 20.0)], 32, 1, None),
    "surface boundary": ("iso", [(200.0, 0.02, *BOARD, 0.0), (240.0, 0.0035, 1300.0, 1200.0, COATING_TABLE, 0.0),
                                 (200.0, 0.02, *BOARD, 20.0)], 8, 1, (25.0, 0.7)),
}


def twin_fire(kind):
    if kind == "iso":
        return iso(120.0, 10.0)
    return fire_grid(vent_fire(), 150.0, 10.0)


@pytest.mark.parametrize("name", list(TWIN_CASES))
def test_kernel_matches_twin(name):
    kind, members, cells, subs, surface = TWIN_CASES[name]
    t, g = twin_fire(kind)
    inp = inputs(t, g, members, threshold_C=400.0)
    res = C.run(inp, cells, subs, C.SurfaceBoundary(*surface) if surface else None, keep_history=True)
    safe = 0
    for i, m in enumerate(members):
        tw = tc.member_history(list(t), list(g), m[0], m[1], m[2], m[3], table_of(m), m[5], cells, subs,
                               surface=surface)
        safe += tw["safe_steps"]
        h = np.array(tw["steel"])
        # plain-Python twin: 1e-9 relative (STYLE.md, DEVELOPERS.md)
        np.testing.assert_allclose(res.history_C[:, i], h, rtol=1e-9, atol=1e-9)
        assert res.peak_C[i] == pytest.approx(h.max(), rel=1e-9)
        assert res.peak_time_s[i] == t[int(np.argmax(h))]
        np.testing.assert_allclose(res.profile_C[:cells, i], tw["profile"], rtol=1e-9, atol=1e-9)
        assert res.last_increment_C[i] == pytest.approx(h[-1] - h[-2], rel=1e-6, abs=1e-9)
        k = int(np.argmax(h >= 400.0))
        if h.max() >= 400.0:
            t_cross = t[k - 1] + (t[k] - t[k - 1]) * (400.0 - h[k - 1]) / (h[k] - h[k - 1])  # linear in the step
            assert res.crossing_time_s[i] == pytest.approx(t_cross, rel=1e-9)
        else:
            assert np.isnan(res.crossing_time_s[i])
    if "re-solves" in name:
        assert safe > 0  # this case takes the safe re-solve path (a plateau cell running out of water)


def test_threads_give_the_same_bits():
    t, g = iso(240.0, 5.0)
    rng = np.random.default_rng(3)
    members = [(float(rng.uniform(50, 300)), float(rng.uniform(0.005, 0.05)), *BOARD, float(rng.choice([0.0, 10.0])))
               for _ in range(300)]
    inp = inputs(t, g, members, 550.0)
    old = numba.get_num_threads()
    try:
        numba.set_num_threads(1)
        one = C.run(inp, 8, 1)
        numba.set_num_threads(min(2, numba.config.NUMBA_NUM_THREADS))
        two = C.run(inp, 8, 1)
    finally:
        numba.set_num_threads(old)
    assert np.array_equal(one.peak_C, two.peak_C)
    assert np.array_equal(one.crossing_time_s, two.crossing_time_s, equal_nan=True)


def test_fire_index_selects_the_gas_column():
    t, g_iso = iso(120.0, 5.0)
    g_vent = vent_fire().gas_temperature(t)
    m = (200.0, 0.02, *BOARD, 0.0)
    both = C.run(inputs(t, np.stack([g_iso, g_vent], axis=1), [m, m, m], fire_index=[1, 0, 1]), keep_history=True)
    alone = C.run(inputs(t, g_vent, [m]), keep_history=True)
    np.testing.assert_array_equal(both.history_C[:, 0], alone.history_C[:, 0])
    np.testing.assert_array_equal(both.history_C[:, 2], alone.history_C[:, 0])
    np.testing.assert_array_equal(both.history_C[:, 1], C.run(inputs(t, g_iso, [m]), keep_history=True).history_C[:, 0])


# ---------------------------------------------------------------------------------------------
# limits with known answers


def test_massless_layer_tends_to_eq_4_27_with_phi_0():
    # With c_p = 0 the layer stores nothing and conducts lambda/d_p: C_a d theta_a/dt = (lambda/d_p)(theta_g - theta_a),
    # which is eq (4.27) with phi = 0 (EN 1993-1-2 4.2.5.2). The two schemes of that ODE (explicit Euler in
    # steelfire.models.heat, backward Euler here) differ by O(dt): the difference halves with the step.
    diffs = []
    for dt in (2.0, 1.0, 0.5):
        t, g = iso(120.0, dt)
        cond = C.run(inputs(t, g, [(200.0, 0.02, 800.0, 0.0, 0.1, 0.0)]), keep_history=True).history_C[:, 0]
        lumped = lumped_history(t, g, 200.0, 0.02, 0.0, 1700.0, 0.1, 0.0, RHO_A)
        diffs.append(float(np.max(np.abs(cond - lumped))))
    # hand calculation: first order, so each halving of dt halves the difference (measured 0.272, 0.136, 0.068 C)
    assert 1.8 < diffs[0] / diffs[1] < 2.2 and 1.8 < diffs[1] / diffs[2] < 2.2
    assert diffs[2] < 0.1


def test_semi_infinite_slab_gives_the_erfc_profile():
    # Carslaw and Jaeger 2.4 (from memory): a semi-infinite solid at T0 whose surface is held at Ts from t = 0:
    # T(x, t) = T0 + (Ts - T0) erfc(x / (2 sqrt(alpha t))), alpha = lambda / (rho c).
    # A 200 mm board layer after 30 min is semi-infinite in practice: sqrt(alpha t) = 16 mm << 200 mm.
    rho, cp, lam, d = BOARD[0], BOARD[1], BOARD[2], 0.2
    t = np.arange(0.0, 1800.0 + 1.0, 5.0)
    g = np.full(t.shape, 1020.0)                      # the step: gas at 1020 C from t = 0+
    res = C.run(inputs(t, g, [(100.0, d, rho, cp, lam, 0.0)]), 400, 5)
    x = (np.arange(400) + 0.5) * d / 400               # cell centres [m]
    exact = 20.0 + 1000.0 * erfc(x / (2.0 * math.sqrt(lam / (rho * cp) * 1800.0)))
    near = x < 0.06
    # discretisation error measured 0.11 C (h = 0.5 mm, dt = 1 s); 0.2 C is 0.02 % of the step
    assert np.max(np.abs(res.profile_C[:400, 0][near] - exact[near])) < 0.2
    assert res.peak_C[0] < 20.0 + 1e-6                 # the steel 200 mm in has not seen the heat


def test_steady_state_is_the_gas_temperature():
    # hand calculation: with the gas held constant, layer and steel end at the gas temperature (the doctest, too)
    failures, _ = doctest.testmod(C, verbose=False)
    assert failures == 0
    t = np.arange(0.0, 48 * 3600.0 + 1.0, 30.0)
    res = C.run(inputs(t, np.full(t.shape, 700.0), [(200.0, 0.02, *BOARD, 10.0)]), 8, 1)
    assert res.peak_C[0] == pytest.approx(700.0, abs=1e-6)
    np.testing.assert_allclose(res.profile_C[:8, 0], 700.0, atol=1e-6)


# ---------------------------------------------------------------------------------------------
# energy


ENERGY_CASES = {
    "dry, ISO 834": ("iso", (200.0, 0.02, *BOARD, 0.0), 8, 1, None),
    "free water 20 %, parametric with cooling": ("vent", (200.0, 0.02, *BOARD, 20.0), 8, 2, None),
    "free water, 32 cells (re-solves)": ("iso", (200.0, 0.02, *BOARD, 20.0), 32, 1, None),
    "table and surface boundary": ("iso", (240.0, 0.0035, 1300.0, 1200.0, COATING_TABLE, 0.0), 8, 1, (25.0, 0.7)),
}


@pytest.mark.parametrize("name", list(ENERGY_CASES))
def test_energy_balance_over_the_fire(name):
    # Conservation: the heat that enters through the face [J/m2] is in the protection (sensible, rho_p c_p
    # over its cells), in its water (latent heat of what evaporated) and in the steel (the scheme's
    # c_a(theta_a,old) rho_a V/A_p d theta_a per substep). Summed over the whole fire: 1e-6 relative.
    kind, m, cells, subs, surface = ENERGY_CASES[name]
    t, g = twin_fire(kind)
    tw = tc.member_history(list(t), list(g), m[0], m[1], m[2], m[3], table_of(m), m[5], cells, subs, surface=surface)
    stored = tw["protection_sensible"] + tw["latent"] + tw["steel_heat"]
    assert tw["heat_in"] > 0.0
    assert abs(tw["heat_in"] - stored) <= 1e-6 * tw["heat_in"]
    if m[5] > 0.0 and kind == "iso":
        # all the water is gone after 120 min of the standard fire: latent heat = p rho_p d_p L (hand calculation)
        assert tw["latent"] == pytest.approx(m[5] / 100.0 * m[2] * m[1] * C.LATENT_HEAT_WATER_J_KG, rel=1e-9)


def test_steel_heat_converges_to_the_enthalpy_of_eq_3_2():
    # c_a is lagged (taken at the start of each substep): the steel's heat sum_k c_a(theta_k) d theta differs
    # from the enthalpy integral of EN 1993-1-2 eq (3.2), int_20^theta c_a d theta (scipy.integrate.quad), by
    # O(dt); measured -7.2e-4, -3.6e-4, -1.8e-4 relative at 10 s and 2 and 4 substeps.
    t, g = iso(120.0, 10.0)
    errs = []
    for s in (1, 2, 4):
        tw = tc.member_history(list(t), list(g), 200.0, 0.02, BOARD[0], BOARD[1], ((20.0, BOARD[2]),), 0.0, 8, s)
        enthalpy = quad(twins.c_a, 20.0, tw["steel"][-1], points=[600.0, 735.0, 900.0], limit=200)[0]  # J/kg
        exact = enthalpy * tw["steel_per_area"]
        errs.append(abs(tw["steel_heat"] - exact) / exact)
    assert errs[0] < 1e-3
    assert 1.8 < errs[0] / errs[1] < 2.2 and 1.8 < errs[1] / errs[2] < 2.2


# ---------------------------------------------------------------------------------------------
# against solve_ivp (BDF) on a fine method-of-lines grid


def mol_history(gas_fn, t_eval, breaks, apv, d, rho, cp, table, n=100, surface=None):
    """Steel temperature on ``t_eval`` by the method of lines: n cells (cell centres, harmonic-mean
    conductances, conductivity at the cell temperatures), continuous in time, c_a of eq (3.2) at the
    current steel temperature (twins.c_a); solve_ivp BDF with rtol 1e-8 between the fire's kinks."""
    h = d / n
    cd = rho * cp * h

    def lam(temp):
        return np.interp(temp, [a for a, _ in table], [b for _, b in table])

    def rhs(t, y):
        T, ts, tg = y[:n], y[n], gas_fn(t)
        lm = lam(T)
        g_in = 2.0 * lm[:-1] * lm[1:] / (h * (lm[:-1] + lm[1:]))
        g0 = 2.0 * lm[0] / h
        if surface is None:
            q0 = g0 * (tg - T[0])
        else:  # face temperature from flux continuity: h_s (T_g - T_f) = g0 (T_f - T_0), h_s by EN 1991-1-2 (3.1)
            a, e = surface

            def qs(tf):
                return a * (tg - tf) + e * 5.67e-8 * ((tg + 273.0) ** 4 - (tf + 273.0) ** 4)
            lo, hi = min(tg, T[0]), max(tg, T[0])
            for _ in range(60):  # bisection on the face temperature
                mid = 0.5 * (lo + hi)
                if qs(mid) > g0 * (mid - T[0]):
                    lo = mid
                else:
                    hi = mid
            q0 = qs(0.5 * (lo + hi))
        flow = np.empty(n + 1)
        flow[0] = q0
        flow[1:n] = g_in * (T[:-1] - T[1:])
        flow[n] = 2.0 * lm[-1] / h * (T[-1] - ts)
        out = np.empty(n + 1)
        out[:n] = (flow[:n] - flow[1:]) / cd
        out[n] = flow[n] / (twins.c_a(ts) * RHO_A / apv)
        return out

    sparsity = diags([1.0, 1.0, 1.0], [-1, 0, 1], shape=(n + 1, n + 1))
    y0 = np.full(n + 1, 20.0)
    edges = [t_eval[0]] + [b for b in breaks if t_eval[0] < b < t_eval[-1]] + [t_eval[-1]]
    out = np.empty(t_eval.shape)
    for a, b in zip(edges, edges[1:]):
        k = (t_eval >= a) & (t_eval <= b)
        sol = solve_ivp(rhs, (a, b), y0, method="BDF", rtol=1e-8, atol=1e-6, jac_sparsity=sparsity,
                        t_eval=t_eval[k], max_step=60.0)
        assert sol.success
        out[k] = sol.y[n]
        y0 = sol.y[:, -1]
    return out


IVP_MEMBERS = {
    "light": (200.0, 0.01, *SPRAY, 0.0),         # phi = 0.15 at c_a = 600
    "heavy": (340.0, 0.04, *HEAVY, 0.0),         # phi = 7.6
    "table": (240.0, 0.0035, 1300.0, 1200.0, COATING_TABLE, 0.0),
}


@pytest.mark.parametrize("fire", ["ISO 834", "Annex A with cooling"])
@pytest.mark.parametrize("member", list(IVP_MEMBERS))
def test_converged_run_matches_solve_ivp(fire, member):
    m = IVP_MEMBERS[member]
    if fire == "ISO 834":
        t, g = iso(240.0, 5.0)
        fn, breaks = (lambda s: float(nominal.standard_fire(s))), []
    else:
        pf = vent_fire()
        t, g = fire_grid(pf, 240.0, 5.0)
        fn, breaks = (lambda s: float(pf.gas_temperature(s))), [pf.t_max_s, pf.burnout_time_s]
    ref = mol_history(fn, t, breaks, m[0], m[1], m[2], m[3], table_of(m))
    inp = inputs(t, g, [m], 500.0)
    # every grid time within 1 C (issue requirement), the history converged to 0.5 C
    hist = C.run_converged(inp, measure="history", keep_history=True)
    assert hist.converged[0]
    assert np.max(np.abs(hist.history_C[:, 0] - ref)) < 1.0
    # the default measure (peak and crossing of 500 C converged to 0.5 C): those within 1 C
    out = C.run_converged(inp, keep_history=True)
    assert abs(out.peak_C[0] - ref.max()) < 1.0
    if ref.max() > 500.0:
        assert abs(np.interp(out.crossing_time_s[0], t, ref) - 500.0) < 1.0


def test_surface_boundary_matches_solve_ivp():
    # EN 1991-1-2 3.1: net flux alpha_c (theta_g - theta_s) + Phi eps sigma ((theta_g + 273)^4 - (theta_s + 273)^4),
    # alpha_c = 25 W/(m2 K) (standard curve), eps = 0.7, Phi = 1
    t, g = iso(120.0, 5.0)
    m = (200.0, 0.01, *SPRAY, 0.0)
    ref = mol_history(lambda s: float(nominal.standard_fire(s)), t, [], m[0], m[1], m[2], m[3], table_of(m),
                      surface=(25.0, 0.7))
    res = C.run_converged(inputs(t, g, [m]), surface=C.SurfaceBoundary(25.0, 0.7), measure="history",
                          keep_history=True)
    assert np.max(np.abs(res.history_C[:, 0] - ref)) < 1.0
    # the resistance of the surface delays the steel against the face at the gas temperature
    fixed = C.run(inputs(t, g, [m]), keep_history=True).history_C[:, 0]
    assert np.all(res.history_C[:, 0] <= fixed + 1e-9)


# ---------------------------------------------------------------------------------------------
# beside eq (4.27)


LIGHT = [(apv, d, *mat, 0.0) for mat in (BOARD, SPRAY, (600.0, 1200.0, 0.15), (2300.0, 1000.0, 1.6))
         for apv in (50.0, 100.0, 200.0, 300.0) for d in (0.005, 0.01, 0.02, 0.04, 0.06)]


def phi(m, ca=600.0):
    return m[3] * m[2] * m[1] * m[0] / (ca * RHO_A)   # EN 1993-1-2 eq (4.27), c_a at about 500 C


def test_light_protection_agrees_with_eq_4_27_under_the_standard_fire():
    # Eq (4.27) was fitted for light protection. Stated tolerance (common practice, no source): for phi < 0.5,
    # over 240 min of ISO 834, the times to 400, 550 and 700 C within 10 % and, above 300 C, the steel
    # temperatures within 15 % of the rise above 20 C. Measured on these members: 7.4 % and 11.7 % at most
    # (thick, light boards on stocky members, where the conduction model is the cooler); docs/conduction.md.
    members = [m for m in LIGHT if phi(m) < 0.5]
    assert len(members) >= 40
    t, g = iso(240.0, 5.0)
    res = C.run_converged(inputs(t, g, members), keep_history=True)
    assert res.converged.all()
    for i, m in enumerate(members):
        lumped = lumped_history(t, g, m[0], m[1], m[2], m[3], m[4], 0.0, RHO_A)
        cond = res.history_C[:, i]
        hot = lumped > 300.0
        if hot.any():
            assert np.max(np.abs(cond - lumped)[hot] / (lumped[hot] - 20.0)) < 0.15, m
        for thr in (400.0, 550.0, 700.0):
            if lumped.max() >= thr and cond.max() >= thr:
                tl, tcd = t[np.argmax(lumped >= thr)], t[np.argmax(cond >= thr)]
                assert abs(tcd - tl) <= 0.10 * tl, (m, thr)


def test_jittered_fire_does_not_pump_heat_in():
    # The flat 800 C fire and the same with +-10 C alternating every 5 s. Eq (4.27) (steelfire.models.heat)
    # gives, for the heavy member, 617.7 C flat and 21,346 C jittered (its d theta_a >= 0 rule clips the
    # e^(phi/10) term on the way up only). Conduction: maximum principle, and by the comparison principle
    # (the scheme is monotone; hand reasoning) the jitter moves the steel by at most 10 C; measured 0.06 C.
    t = np.arange(0.0, 240 * 60.0 + 1.0, 5.0)
    flat = np.full(t.shape, 800.0)
    flat[0] = 20.0
    jit = flat + 10.0 * np.where(np.arange(t.shape[0]) % 2 == 0, 1.0, -1.0)
    jit[0] = 20.0
    members = [(200.0, 0.02, *BOARD, 0.0), (100.0, 0.01, *SPRAY, 0.0), (340.0, 0.04, *HEAVY, 0.0),
               (300.0, 0.005, *BOARD, 0.0), (200.0, 0.02, *BOARD, 20.0)]
    a = C.run(inputs(t, flat, members), keep_history=True).history_C
    b = C.run(inputs(t, jit, members), keep_history=True).history_C
    run_max = np.maximum.accumulate(jit)[:, None]
    assert np.all(b <= run_max + 1e-9)
    assert np.max(np.abs(b - a)) <= 10.0


def test_heavy_protection_in_a_parametric_fire_stays_below_the_gas():
    # The eq (4.27) report: rho_p 1200, c_p 2200, 40 mm, A_p/V 340 in the office bay fire, 150 min at 5 s:
    # eq (4.27) 690.8 C against a gas peak of 642.1 C (steelfire.models.heat, lambda_p 0.2).
    pf = office_bay_fire()
    t, g = fire_grid(pf, 150.0, 5.0)
    assert g.max() == pytest.approx(642.14, abs=0.01)  # EN 1991-1-2 Annex A for this compartment
    res = C.run_converged(inputs(t, g, [(340.0, 0.04, *HEAVY, 0.0)]), keep_history=True)
    assert np.all(res.history_C[:, 0] <= np.maximum.accumulate(g) + 1e-9)
    # 40 mm of a board with diffusivity 7.6e-8 m2/s needs d^2/alpha = 5.8 h to be crossed (hand calculation):
    # a 41-minute fire leaves the steel far below its gas
    assert res.peak_C[0] < 150.0


def _gas_strategy():
    return st.lists(st.floats(20.0, 1300.0), min_size=2, max_size=12)


@settings(max_examples=25, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(knots=_gas_strategy(), step=st.sampled_from([1.0, 5.0, 12.0, 30.0]), seed=st.integers(0, 2 ** 31),
       cells=st.integers(8, 20), subs=st.integers(1, 3), surface=st.booleans())
def test_steel_never_exceeds_the_hottest_gas_so_far(knots, step, seed, cells, subs, surface):
    # Maximum principle of the scheme (module docstring, docs/conduction.md): every temperature of the
    # layer and the steel stays at or below the running maximum of the gas (and the initial 20 C).
    rng = np.random.default_rng(seed)
    n_t = 1 + int(round(3600.0 / step))
    t = np.arange(n_t) * step
    gas = np.interp(t, np.linspace(0.0, t[-1], len(knots)), knots) + rng.normal(0.0, 15.0, n_t)
    gas = np.maximum(gas, 0.0)
    n_m = 8
    members = []
    for _ in range(n_m):
        table = float(rng.uniform(0.02, 2.0)) if rng.random() < 0.6 else tuple(
            zip(np.sort(rng.uniform(0.0, 1000.0, 3)).tolist(), rng.uniform(0.02, 1.0, 3).tolist()))
        members.append((float(rng.uniform(10.0, 500.0)), float(rng.uniform(0.001, 0.08)), float(rng.uniform(100, 2500)),
                        float(rng.uniform(500.0, 3000.0)), table, float(rng.choice([0.0, 0.0, 5.0, 30.0]))))
    surf = C.SurfaceBoundary(35.0, 0.8) if surface else None
    res = C.run(inputs(t, gas, members), cells, subs, surf, keep_history=True)
    bound = np.maximum(np.maximum.accumulate(gas), 20.0)
    assert np.all(res.history_C <= bound[:, None] + 1e-9)
    assert np.all(res.profile_C[:cells] <= bound[-1] + 1e-9)


@settings(max_examples=25, deadline=None)
@given(apv=st.floats(10.0, 500.0), d=st.floats(0.001, 0.08), more=st.floats(0.01, 1.0), rho=st.floats(100.0, 2500.0),
       cp=st.floats(500.0, 3000.0), lam=st.floats(0.02, 2.0), moist=st.sampled_from([0.0, 5.0, 20.0]),
       cells=st.integers(8, 16))
def test_thicker_is_cooler_under_the_standard_fire(apv, d, more, rho, cp, lam, moist, cells):
    # Comparison principle (hand reasoning): under a heating-only fire more thickness of the same material
    # (more resistance, more heat capacity, more water) cannot make the steel hotter at any time.
    # Dry: held at every grid time to rounding (measured worst 1.4e-14 C).
    # Wet: when the last water near the steel is gone, the steel leaves its plateau at about 100 C steeply
    # (up to 80 C/min measured); the cells evaporate one at a time, so the end of the plateau is placed to
    # within a cell's evaporation or a step, and two thicknesses can cross there (found: 9 C at 12 cells and
    # 10 s, 0 at 12 cells with 8 substeps; always below 150 C in 400 random pairs). Held where the thinner
    # member's steel is at or above 150 C, i.e. at every temperature a design check uses.
    t, g = iso(240.0, 10.0)
    members = [(apv, d, rho, cp, lam, moist), (apv, d * (1.0 + more), rho, cp, lam, moist)]
    h = C.run(inputs(t, g, members), cells, 1, keep_history=True).history_C
    where = np.ones(h.shape[0], dtype=bool) if moist == 0.0 else h[:, 0] >= 150.0
    assert np.all(h[where, 1] <= h[where, 0] + 1e-9)


# ---------------------------------------------------------------------------------------------
# free water


def test_moisture_plateau_grows_with_water_and_compares_with_eccs():
    # The water evaporates at 100 C (latent heat 2.257 MJ/kg, steam tables, from memory): the steel slows down
    # around 100 C and reaches every higher temperature later. Plateau: the time the steel takes from 60 to
    # 150 C (measured 8.7, 9.3, 10.3, 12.5 min and 21.1, 21.7, 22.3, 24.2 min for p = 0, 5, 10, 20 %).
    # ECCS delay t_v = p rho_p d_p^2 / (5 lambda_p) [min] (steelfire.models.protection.moisture_delay_s, from memory)
    # holds the steel at 100 C for t_v. Only the order of magnitude is checked: the ECCS formula is an
    # empirical simplification (no heat flow into the evaporating zone, lambda at 20 C), and this model
    # evaporates the water where it is (no migration to the cold side), delaying the heat on its way through
    # the layer more than holding the steel at 100 C. Measured ratios of the delay at 400 C to t_v:
    # 1.03-1.05 (board, 20 mm, A_p/V 200) and 0.89-0.91 (30 mm, A_p/V 100), p = 2-20 %; docs/conduction.md.
    t, g = iso(240.0, 5.0)
    ps = [0.0, 5.0, 10.0, 20.0]
    for apv, d, mat in ((200.0, 0.02, BOARD), (100.0, 0.03, (600.0, 1200.0, 0.15))):
        res = C.run_converged(inputs(t, g, [(apv, d, *mat, p) for p in ps], 400.0), keep_history=True)
        assert res.converged.all()
        h = res.history_C
        length = [t[np.argmax(h[:, i] >= 150.0)] - t[np.argmax(h[:, i] >= 60.0)] for i in range(4)]
        delay = res.crossing_time_s - res.crossing_time_s[0]
        assert length[0] < length[1] < length[2] < length[3]      # the plateau lengthens with the water
        assert 0.0 < delay[1] < delay[2] < delay[3]               # higher temperatures come later
        for i in (1, 2, 3):
            tv = moisture_delay_s(ps[i], mat[0], d, mat[2])
            assert 0.3 < delay[i] / tv < 3.0                      # order of magnitude (see above)


# ---------------------------------------------------------------------------------------------
# resolution


def test_converged_run_is_within_tolerance_of_its_refinements():
    # A 30 s grid and a thin light layer on a thin member (time constant of about a minute) need substeps.
    pf = vent_fire()
    t, g = fire_grid(pf, 120.0, 30.0)
    members = [(300.0, 0.003, *BOARD, 0.0), (200.0, 0.02, *BOARD, 0.0), (340.0, 0.06, *HEAVY, 0.0)]
    inp = inputs(t, g, members, 500.0)
    res = C.run_converged(inp, measure="history", keep_history=True)
    assert res.converged.all()
    assert res.substeps[0] > 1                              # refined
    for i in range(3):
        n, s = int(res.cells[i]), int(res.substeps[i])
        sub = inputs(t, g, [members[i]], 500.0)
        base = C.run(sub, n, s, keep_history=True).history_C[:, 0]
        np.testing.assert_array_equal(base, res.history_C[:, i])
        for n2, s2 in ((2 * n, s), (n, 2 * s)):
            fine = C.run(sub, n2, s2, keep_history=True).history_C[:, 0]
            assert np.max(np.abs(fine - base)) < C.CONVERGENCE_TOLERANCE_C
    capped = C.run_converged(inp, measure="history", max_substeps=1)
    assert not capped.converged[0] and capped.substeps[0] == 1


# ---------------------------------------------------------------------------------------------
# input checks


def _good():
    t, g = iso(10.0, 5.0)
    return inputs(t, g, [(200.0, 0.02, *BOARD, 0.0), (200.0, 0.02, *BOARD, 5.0)])


@pytest.mark.parametrize("field,value,match", [
    ("thickness_m", np.array([0.02, -0.01]), r"thickness_m\[1\]"),
    ("section_factor_per_m", np.array([0.0, 200.0]), r"section_factor_per_m\[0\]"),
    ("fire_index", np.array([0, 1], dtype=np.int64), r"fire_index\[1\]"),
    ("moisture_percent", np.array([0.0, -1.0]), r"moisture_percent\[1\]"),
    ("density", np.array([800.0, 0.0]), r"moisture_percent\[1\]"),   # water needs a heat capacity to sit in
    ("conductivity", np.array([[0.2], [0.0]]), r"conductivity\[1\]"),
    ("time_s", np.array([0.0, 5.0, 5.0]), r"time_s"),
])
def test_bad_input_names_the_field(field, value, match):
    with pytest.raises(InputError, match=match):
        C.run(_good()._replace(**{field: value}))


def test_bad_resolution_and_surface():
    with pytest.raises(InputError, match="cells"):
        C.run(_good(), cells=4)
    with pytest.raises(InputError, match="substeps"):
        C.run(_good(), substeps=0)
    with pytest.raises(InputError, match="emissivity"):
        C.run(_good(), surface=C.SurfaceBoundary(25.0, 1.5))
    with pytest.raises(InputError, match="tolerance_C"):
        C.run_converged(_good(), tolerance_C=0.0)
