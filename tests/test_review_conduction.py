"""Review of the 1-D conduction model of protected steel and of how its verdict combines with eq (4.27).

Outside references, named beside each check:
* scipy.integrate.solve_ivp (BDF) on the method-of-lines form of the same 1-D problem, written here
  independently of the package (``mol_history``): a plane layer of cells, conductivity at each cell's
  temperature, the face at the gas temperature or behind the EN 1991-1-2 eq (3.1)-(3.3) surface flux,
  the steel lumped at the inner face with c_a of EN 1993-1-2 eq (3.2a)-(3.2d) (``c_a`` below);
* hand energy balances of the backward-Euler scheme on the compiled kernel's own outputs (the profile
  at each grid time from runs cut at that time: a run's state at time t does not depend on the gas after t);
* the steady state and the limit of a very large surface coefficient (hand reasoning);
* the ECCS moisture delay t_v = p rho_p d_p^2 / (5 lambda_p) [min] (EN 1993-1-2 eq (4.28) as
  steelfire applies it; ECCS, from memory), as an order of magnitude only;
* the second law (the steel never above the hottest gas so far; no rise while everything around it
  is cooler), by reasoning written beside the checks.

Materials and fires are invented for the checks (generic classes, not products).
"""

import math
import sys
from pathlib import Path

import numpy as np
import pytest
from scipy.integrate import quad, solve_ivp
from scipy.optimize import brentq
from scipy.sparse import diags

import steelfire
from steelfire.inputs.case import case_from_dict
from steelfire.models import conduction as C

sys.path.insert(0, str(Path(__file__).resolve().parent))
from twins import c_a  # noqa: E402  (EN 1993-1-2 eq (3.2a)-(3.2d), the tests' plain-Python twin)

RHO_A = 7850.0                          # EN 1993-1-2 3.2.2(1)
SIGMA = 5.67e-8                         # EN 1991-1-2 3.1(6)
BOARD = (800.0, 1700.0, 0.2)            # illustrative gypsum-like board (rho_p, c_p, lambda_p)
HEAVY = (1200.0, 2200.0, 0.2)           # illustrative heavy protection


def iso834(t_s):
    """EN 1991-1-2 eq (3.4): 20 + 345 log10(8 t + 1), t in min."""
    return 20.0 + 345.0 * np.log10(8.0 * np.asarray(t_s) / 60.0 + 1.0)


def heat_and_cool(t_s):
    """Invented fire: 20 -> 900 C over 30 min, held to 50 min, back to 20 C at 110 min (linear)."""
    return np.interp(t_s, [0.0, 1800.0, 3000.0, 6600.0], [20.0, 900.0, 900.0, 20.0])


def lam_of(table, T):
    """Conductivity at T [C] from ((T, lambda), ...), linear, held at the ends."""
    ts = [a for a, _ in table]
    vs = [b for _, b in table]
    return np.interp(T, ts, vs)


def inputs(t, g, members, threshold_C=np.inf):
    """members: (A_p/V, d_p, rho_p, c_p, lambda or ((T, lambda), ...), moisture %)."""
    g = np.asarray(g, dtype=float).reshape(len(t), -1)
    tables = [((20.0, m[4]),) if isinstance(m[4], float) else m[4] for m in members]
    k = max(len(tb) for tb in tables)
    lt = np.zeros((len(members), k))
    lv = np.zeros((len(members), k))
    for i, tb in enumerate(tables):
        for j, (a, b) in enumerate(tb):
            lt[i, j], lv[i, j] = a, b
    col = lambda i: np.array([float(m[i]) for m in members])  # noqa: E731
    return C.ConductionInputs(np.asarray(t, dtype=float), g, np.zeros(len(members), dtype=np.int64), col(0), col(1),
                              col(2), col(3), lt, lv, np.array([len(tb) for tb in tables]), col(5),
                              np.full(len(members), float(threshold_C)))


def mol_history(t_eval, gas_of_t, apv, d_p, rho_p, c_p, table, cells=100, surface=None):
    """Reference: the method-of-lines ODE of the dry layer and the lumped steel, solve_ivp BDF (rtol 1e-7).

    Cell i (width h): rho_p c_p h dT_i/dt = q_(i-1/2) - q_(i+1/2), q between cells through the two half cells
    in series, h/(2 lam_i) + h/(2 lam_(i+1)); the face flux from the gas through the first half cell (and,
    with ``surface`` (alpha_c, eps), through alpha_c (T_g - T_s) + eps sigma ((T_g + 273)^4 - (T_s + 273)^4),
    EN 1991-1-2 eq (3.1)-(3.3), T_s found by brentq); the steel: rho_a c_a (1 / apv) dT_a/dt = the flux
    through the last half cell."""
    n = cells
    h = d_p / n
    cap = rho_p * c_p * h

    def face_flux(tg, t0, lam0):
        g_half = 2.0 * lam0 / h
        if surface is None:
            return g_half * (tg - t0)
        ac, eps = surface

        def bal(ts):
            return ac * (tg - ts) + eps * SIGMA * ((tg + 273.0) ** 4 - (ts + 273.0) ** 4) - g_half * (ts - t0)
        lo, hi = min(tg, t0) - 1e-9, max(tg, t0) + 1e-9
        ts = brentq(bal, lo, hi, xtol=1e-12) if hi - lo > 2e-9 else tg
        return g_half * (ts - t0)

    def rhs(t, y):
        T = y[:n]
        ta = y[n]
        lam = lam_of(table, T)
        g_int = 2.0 / (h / lam[:-1] + h / lam[1:])          # series of the two half cells
        q = np.empty(n + 1)
        q[0] = face_flux(float(gas_of_t(t)), T[0], lam[0])
        q[1:n] = g_int * (T[:-1] - T[1:])
        q[n] = 2.0 * lam[-1] / h * (T[-1] - ta)
        dy = np.empty(n + 1)
        dy[:n] = (q[:-1] - q[1:]) / cap
        dy[n] = q[n] / (RHO_A * c_a(ta) / apv)
        return dy

    sparsity = diags([1.0, 1.0, 1.0], [-1, 0, 1], shape=(n + 1, n + 1))
    sol = solve_ivp(rhs, (t_eval[0], t_eval[-1]), np.full(n + 1, 20.0), method="BDF", t_eval=t_eval,
                    rtol=1e-7, atol=1e-6, jac_sparsity=sparsity, max_step=60.0)
    assert sol.success
    return sol.y[n]


def cut_runs(t, g, member, cells=8, substeps=1, surface=None):
    """The compiled kernel's steel temperature and cell profile at every grid time (runs cut at each time)."""
    steel = np.empty(len(t))
    prof = np.empty((len(t), cells))
    steel[0], prof[0] = 20.0, 20.0
    for k in range(1, len(t)):
        r = C.run(inputs(t[:k + 1], g[:k + 1], [member]), cells, substeps, surface, keep_history=True)
        steel[k] = r.history_C[-1, 0]
        prof[k] = r.profile_C[:cells, 0]
    return steel, prof


# ---------------------------------------------------------------------------------------------
# the conduction model against solve_ivp


def test_heavy_protection_under_iso_834_matches_solve_ivp_and_is_hotter_than_eq_4_27():
    # Heavy protection (rho_p 1200, c_p 2200, lambda 0.2, 40 mm) on A_p/V 300, phi = 1200 x 2200 x 0.04 x 300 /
    # (600 x 7850) = 6.7 (hand calculation), 180 min of ISO 834. Reference: mol_history, 100 cells (solve_ivp BDF).
    # run_converged (history measure) must be within 1 C of it at every grid time.
    t = np.arange(0.0, 180.0 * 60.0 + 1.0, 10.0)
    g = iso834(t)
    m = (300.0, 0.04, *HEAVY, 0.0)
    res = C.run_converged(inputs(t, g, [m]), keep_history=True, measure="history")
    assert res.converged[0]
    ref = mol_history(t, iso834, 300.0, 0.04, *HEAVY[:2], ((20.0, 0.2),))
    assert np.max(np.abs(res.history_C[:, 0] - ref)) < 1.0
    # measured 507.8 C at 180 min in the chain (tests below); eq (4.27) gives 440.4 C for the same member
    assert ref[-1] == pytest.approx(res.peak_C[0], abs=1.0) and 495.0 < ref[-1] < 520.0


def test_table_conductivity_and_surface_boundary_in_a_cooling_fire_match_solve_ivp():
    # A rising conductivity table (0.10 -> 0.25 W/(m K), held at its ends), the face behind alpha_c = 35,
    # eps = 0.7 (EN 1991-1-2 3.1, natural fire), an invented heating-cooling fire; 160 min at 10 s.
    # Reference: mol_history with the same surface flux, 100 cells. Within 1 C at every grid time.
    table = ((100.0, 0.10), (400.0, 0.15), (800.0, 0.25))
    t = np.arange(0.0, 160.0 * 60.0 + 1.0, 10.0)
    g = heat_and_cool(t)
    m = (200.0, 0.015, *BOARD[:2], table, 0.0)
    surf = C.SurfaceBoundary(35.0, 0.7)
    res = C.run_converged(inputs(t, g, [m]), keep_history=True, measure="history", surface=surf)
    assert res.converged[0]
    ref = mol_history(t, heat_and_cool, 200.0, 0.015, *BOARD[:2], table, surface=(35.0, 0.7))
    assert np.max(np.abs(res.history_C[:, 0] - ref)) < 1.0
    assert res.peak_C[0] < 900.0


def test_convergence_with_cells_and_substeps_is_first_and_second_order():
    # Backward Euler is first order in dt, the cells second order in h (hand reasoning, module docstring):
    # the change of the peak from s to 2s substeps halves as s doubles, from n to 2n cells quarters (to 1.5-2.7
    # and 3-5.5: the refinement ratios of the asymptotic range, common practice, no source).
    t = np.arange(0.0, 160.0 * 60.0 + 1.0, 30.0)
    g = heat_and_cool(t)
    inp = inputs(t, g, [(200.0, 0.02, *HEAVY, 0.0)])
    ps = [C.run(inp, 8, s).peak_C[0] for s in (1, 2, 4, 8)]
    ds = np.abs(np.diff(ps))
    assert 1.5 < ds[0] / ds[1] < 2.7 and 1.5 < ds[1] / ds[2] < 2.7
    pc = [C.run(inp, n, 64).peak_C[0] for n in (8, 16, 32)]
    dc = np.abs(np.diff(pc))
    assert 3.0 < dc[0] / dc[1] < 5.5


# ---------------------------------------------------------------------------------------------
# energy, water, face, table ends (the compiled kernel's own outputs)


@pytest.mark.parametrize("table, p, rel", [(((20.0, 0.2),), 0.0, 1e-9), (((20.0, 0.15), (500.0, 0.25)), 0.0, 1e-9),
                                           (((20.0, 0.2),), 10.0, 3e-3)])
def test_energy_balance_of_the_compiled_kernel(table, p, rel):
    # Hand energy balance of backward Euler (one substep): the heat in through the face over step k is
    # dt (2 lambda(T_0,k) / h) (theta_g,k+1 - T_0,k+1) (the conductivity lagged at the step's start, the face
    # at the gas); it must equal the protection's sensible heat rho_p c_p h sum (T_c - 20) + the latent heat of
    # all the water p/100 rho_p d_p L (every cell above 100 C at the end) + the steel's heat
    # sum_k rho_a c_a(theta_a,k) / (A_p/V) (theta_a,k+1 - theta_a,k), c_a by eq (3.2) at the step's start.
    # Dry: exact for the scheme, 1e-9 relative (measured 1e-14). Wet: the step in which the face cell's water
    # runs out takes its flux at the solved temperature, before the enthalpy update moves the cell, which the
    # outputs do not show; the balance from the outputs is then within 3e-3 (measured -2.3e-3; the kernel's own
    # bookkeeping, tests/twins_conduction.py, closes to 1e-6). The steel's heat against the enthalpy integral of
    # eq (3.2) (scipy quad): O(dt), within 2e-3 relative at 10 s.
    apv, d, rho, cp = 200.0, 0.02, BOARD[0], BOARD[1]
    t = np.arange(0.0, 60.0 * 60.0 + 1.0, 10.0)
    g = iso834(t)
    n = 8
    h = d / n
    steel, prof = cut_runs(t, g, (apv, d, rho, cp, table, p), n)
    heat_in = sum(10.0 * 2.0 * lam_of(table, prof[k, 0]) / h * (g[k + 1] - prof[k + 1, 0]) for k in range(len(t) - 1))
    assert np.all(prof[-1] > 100.0)
    sensible = rho * cp * h * float(np.sum(prof[-1] - 20.0))
    latent = p / 100.0 * rho * d * C.LATENT_HEAT_WATER_J_KG
    steel_heat = sum(RHO_A * c_a(steel[k]) / apv * (steel[k + 1] - steel[k]) for k in range(len(t) - 1))
    assert heat_in == pytest.approx(sensible + latent + steel_heat, rel=rel)
    enthalpy = RHO_A / apv * quad(c_a, 20.0, steel[-1], points=[600.0, 735.0])[0]
    assert steel_heat == pytest.approx(enthalpy, rel=2e-3)


def test_free_water_delay_is_of_the_order_of_the_eccs_delay():
    # EN 1993-1-2 eq (4.28) / ECCS: the water holds the steel at 100 C for t_v = p rho_p d_p^2 / (5 lambda_p) [min]
    # (from memory). Board 20 mm, A_p/V 200, p = 10 and 20 %: t_v = 3.2 and 6.4 min (hand calculation:
    # 10 x 800 x 0.02^2 / (5 x 0.2) = 3.2). Two measures:
    # * the delay of the 400 C crossing, wet minus dry: measured 3.34 and 6.74 min (1.04-1.05 t_v); 0.5-2 t_v;
    # * the extra time the steel spends between 90 and 130 C: measured 0.58 and 1.67 min (0.18-0.26 t_v): the
    #   model evaporates the water where it is and holds the heat back on its way through the layer, so the
    #   steel slows near 100 C rather than being held there for t_v (docs/conduction.md says so). Order of
    #   magnitude only: 0.1-3 t_v.
    t = np.arange(0.0, 120.0 * 60.0 + 1.0, 5.0)
    g = iso834(t)
    res = C.run_converged(inputs(t, g, [(200.0, 0.02, *BOARD, p) for p in (0.0, 10.0, 20.0)], 400.0),
                          keep_history=True)
    assert res.converged.all()
    h = res.history_C
    band = [np.count_nonzero((h[:, i] >= 90.0) & (h[:, i] <= 130.0)) * 5.0 / 60.0 for i in range(3)]
    delay = (res.crossing_time_s - res.crossing_time_s[0]) / 60.0
    for i, tv_min in ((1, 3.2), (2, 6.4)):
        assert 0.5 * tv_min < delay[i] < 2.0 * tv_min
        assert 0.1 * tv_min < band[i] - band[0] < 3.0 * tv_min
    assert band[0] < band[1] < band[2]


def test_very_large_surface_coefficient_gives_the_face_at_the_gas():
    # Hand reasoning: alpha_c -> infinity puts the face at the gas; with alpha_c = 1e7 W/(m2 K) the film's
    # resistance is 1e-7 against the half cell's h / (2 lambda) = 1.25e-2 m2K/W (5e-6 of it): the steel within 0.01 C.
    t = np.arange(0.0, 160.0 * 60.0 + 1.0, 10.0)
    g = heat_and_cool(t)
    inp = inputs(t, g, [(200.0, 0.02, *BOARD, 0.0), (200.0, 0.02, *BOARD, 10.0)])
    a = C.run(inp, 8, 2, keep_history=True).history_C
    b = C.run(inp, 8, 2, surface=C.SurfaceBoundary(1e7, 0.0), keep_history=True).history_C
    assert np.max(np.abs(a - b)) < 0.01


def test_surface_boundary_steady_state_is_the_gas():
    # Hand reasoning: gas held at 600 C with the face behind a surface coefficient: layer and steel end at 600 C.
    t = np.arange(0.0, 48 * 3600.0 + 1.0, 60.0)
    r = C.run(inputs(t, np.full(t.shape, 600.0), [(200.0, 0.02, *BOARD, 5.0)]), 8, 1,
              surface=C.SurfaceBoundary(25.0, 0.7))
    assert r.peak_C[0] == pytest.approx(600.0, abs=1e-6)
    np.testing.assert_allclose(r.profile_C[:8, 0], 600.0, atol=1e-6)


def test_conductivity_table_is_held_at_its_ends():
    # A table from 300 to 600 C is held at 0.2 below 300 C and 0.3 above 600 C (module docstring): the same as
    # the table with explicit end knots at 20 and 1200 C, to rounding; and not the extrapolation (a table whose
    # line continues: (20, 0.2 - 280 x 0.1/300), (1200, 0.3 + 600 x 0.1/300), hand calculation) which differs.
    t = np.arange(0.0, 120.0 * 60.0 + 1.0, 10.0)
    g = iso834(t)
    held = ((300.0, 0.2), (600.0, 0.3))
    explicit = ((20.0, 0.2), (300.0, 0.2), (600.0, 0.3), (1200.0, 0.3))
    extrap = ((20.0, 0.2 - 280.0 * 0.1 / 300.0), (1200.0, 0.3 + 600.0 * 0.1 / 300.0))
    ms = [(200.0, 0.02, *BOARD[:2], tb, 0.0) for tb in (held, explicit, extrap)]
    r = C.run(inputs(t, g, ms), 8, 1, keep_history=True).history_C
    assert np.max(np.abs(r[:, 0] - r[:, 1])) < 1e-9
    assert np.max(np.abs(r[:, 0] - r[:, 2])) > 5.0


# ---------------------------------------------------------------------------------------------
# the cooling phase: second law


@pytest.mark.parametrize("member", [(340.0, 0.04, *HEAVY, 0.0), (200.0, 0.02, *BOARD, 15.0),
                                    (240.0, 0.005, 1300.0, 1200.0, ((20.0, 0.05), (700.0, 0.2)), 0.0)])
def test_steel_does_not_rise_while_everything_around_it_is_cooler(member):
    # Second law: where the gas at both ends of a step and every cell of the layer are below the steel at the
    # step's start, the steel cannot gain heat over the step (its only neighbour is the last cell, which is
    # cooler; in the backward-Euler row theta_a,new = (C_a theta_a + a T_n-1,new) / (C_a + a) with T_n-1,new
    # <= max(old layer, gas) < theta_a). Also: never above the hottest gas so far (maximum principle).
    t = np.arange(0.0, 160.0 * 60.0 + 1.0, 30.0)
    g = heat_and_cool(t)
    steel, prof = cut_runs(t, g, member, 8, 2)
    run_max = np.maximum.accumulate(np.maximum(g, 20.0))
    assert np.all(steel <= run_max + 1e-9)
    cooler = [k for k in range(len(t) - 1) if max(prof[k].max(), g[k], g[k + 1]) < steel[k]]
    assert len(cooler) > 10                      # the check bites: such steps exist in the cooling phase
    assert all(steel[k + 1] <= steel[k] + 1e-9 for k in cooler)


# ---------------------------------------------------------------------------------------------
# the chain: which model decides the verdict


def _table_case(tmp_path, temps, material, apv, d_mm, critical_C, duration_min, out_of_scope=False,
                model="lumped"):
    t = np.arange(0.0, duration_min * 60.0 + 1.0, 5.0)
    with open(tmp_path / "curve.csv", "w") as fh:
        fh.write("time_min,temperature_C\n")
        for a, b in zip(t, temps(t)):
            fh.write(f"{a / 60.0:.6f},{b:.4f}\n")
    return case_from_dict({
        "title": "review", "fire": {"curve": "table", "file": "curve.csv", "duration_min": duration_min},
        "analysis": {"time_step_s": 5.0, "protection_model": model, "allow_out_of_scope": out_of_scope},
        "materials": {"p": material},
        "member": [{"name": "P1", "kind": "beam", "laterally_restrained": True, "section_factor_per_m": apv,
                    "critical_temperature_C": critical_C, "protection": "p", "thickness_mm": d_mm}]},
        base_dir=tmp_path)


def _dip_and_rise(t):
    # invented tabulated fire: 600 C from 5 to 60 min, a drop to 20 C in 5 s (an opened door, a log gap), 20 C to
    # 90 min, up to 1000 C at 120 min, held to 150 min, back to 20 C at 210 min
    return np.interp(t, [0, 300, 3600, 3605, 5400, 7200, 9000, 12600, 18000],
                     [20, 600, 600, 20, 20, 1000, 1000, 20, 20])


def test_second_law_check_of_eq_4_27_does_not_depend_on_whether_histories_are_kept(tmp_path):
    # Eq (4.27)'s (e^(phi/10) - 1) d theta_g term adds heat when the gas drops: heavy protection (phi = 1200 x 2200
    # x 0.03 x 300 / (600 x 7850) = 5.0, hand calculation) puts the steel about 90 C above the hottest gas so far
    # right after the drop at 60 min (measured 89.6 C), i.e. eq (4.27) breaks the second law during the run,
    # although at its later peak (878.8 C) the gas has been hotter (1000 C). The documented rule (README, "Where
    # eq (4.27) puts the steel above the hottest gas reached so far ... the verdict ... rest[s] on the conduction
    # model") must give the same model and verdict whether or not the histories are kept: before the fix,
    # histories=False compared the peak only and gave 'lumped', FAIL (878.8 C); histories=True 'conduction', PASS.
    case = _table_case(tmp_path, _dip_and_rise, {"density": 1200.0, "conductivity": 0.2, "specific_heat": 2200.0},
                       300.0, 30.0, 700.0, 300.0)
    a = steelfire.analyse(case, histories=False).members[0]
    b = steelfire.analyse(case, histories=True).members[0]
    assert (a.lumped_valid, a.verdict_model, a.passes) == (b.lumped_valid, b.verdict_model, b.passes)
    assert a.lumped_valid is False and a.verdict_model == "conduction"
    assert a.peak_steel_temperature_C == pytest.approx(b.peak_steel_temperature_C, abs=1e-9)
    # the conduction peak against solve_ivp (mol_history, 100 cells): within 1 C
    t = np.arange(0.0, 300.0 * 60.0 + 1.0, 5.0)
    ref = mol_history(t, _dip_and_rise, 300.0, 0.03, 1200.0, 2200.0, ((20.0, 0.2),))
    assert a.peak_steel_temperature_C == pytest.approx(ref.max(), abs=1.0)


def test_valid_eq_4_27_governs_even_where_the_conduction_model_is_hotter_and_the_outputs_say_so(tmp_path):
    # The documented rule (README, docs/reference.md protection_model): with protection_model = "lumped" eq (4.27)
    # decides wherever it keeps to the second law, even where the conduction model is the hotter one (heavy
    # protection under a rising fire, docs/conduction.md: eq (4.27) not conservative from phi of about 4).
    # ISO 834 as a table, heavy 40 mm on A_p/V 300 (phi 6.7): eq (4.27) 440.4 C, conduction 507.8 C (solve_ivp
    # agrees, test above); critical 480 C: eq (4.27) passes, conduction fails. Not the hotter model; the engineer
    # is told through the warning naming the member and the two peaks in the outputs.
    case = _table_case(tmp_path, iso834, {"density": 1200.0, "conductivity": 0.2, "specific_heat": 2200.0},
                       300.0, 40.0, 480.0, 180.0, out_of_scope=True)
    r = steelfire.analyse(case, histories=False)
    m = r.members[0]
    assert m.lumped_valid is True and m.verdict_model == "lumped"
    assert m.conduction_peak_C == pytest.approx(507.8, abs=1.5)
    assert m.peak_steel_temperature_C < 480.0 < m.conduction_peak_C
    assert m.model_difference_C < -50.0
    assert any("conduction model differ" in w and "P1" in w for w in r.warnings)
    # and a warning of its own says the pass depends on the model (eq (4.27) passes, the conduction model fails)
    assert any("P1" in w and "the pass depends on the model" in w for w in r.warnings)


def test_several_exposures_take_the_hottest_column_by_the_conduction_model():
    # A member seeing several exposures (a travelling fire: B5-01 sees four) is judged in the worst one (the
    # highest conduction peak): reference, the conduction model run here column by column (run_converged) on
    # the exposures the design fire gives. Within 0.5 C (the refinement tolerance).
    from steelfire.chain import fires
    from steelfire.inputs.case import load_case

    root = Path(__file__).resolve().parents[1]
    case = load_case(root / "cases" / "open_office_travelling.toml")
    case = case.__class__(**{**case.__dict__, "analysis": case.analysis.__class__(
        **{**case.analysis.__dict__, "protection_model": "conduction"})})
    r = steelfire.analyse(case, histories=True)
    fire = fires.design_fire(case)
    t = r.fire.time_s
    ex = fire.exposure(t)
    checked = 0
    for i, m in enumerate(r.members):
        if m.protection is None or len(ex.member_columns[i]) < 2:
            continue
        mat = case.materials[m.protection]
        table = tuple(tuple(x) for x in mat.conductivity_table)
        cols = list(ex.member_columns[i])
        ms = [(m.section_factor_per_m, m.thickness_mm / 1000.0, mat.density, mat.specific_heat, table,
               mat.moisture_percent) for _ in cols]
        inp = inputs(t, ex.gas_C[:, cols], ms)
        inp = inp._replace(fire_index=np.arange(len(cols), dtype=np.int64))
        per_col = C.run_converged(inp).peak_C
        assert m.conduction_peak_C == pytest.approx(per_col.max(), abs=0.5)
        assert m.peak_steel_temperature_C == pytest.approx(per_col.max(), abs=0.5)
        checked += 1
    assert checked >= 1


def test_nominal_fire_judges_the_conduction_model_at_the_required_period():
    # Under the standard fire (no cooling) a member with a required period is judged at that period; with
    # protection_model = "conduction" the peak reported is the conduction model's steel temperature at 60 min.
    # Reference: the conduction model run here on ISO 834 (EN 1991-1-2 eq (3.4), iso834 above) for the case's
    # two protected members (warehouse_standard: 300/1200/0.12, 20 mm, A_p/V 200; 800/1700/0.2, 25 mm, A_p/V 140),
    # refined to 0.5 C: within 0.5 C. The spray's 1 % water is not credited (its moisture_delay_basis is not
    # "tests", README), so the reference is dry too: with the water the steel at 60 min is 1.1 C cooler
    # (measured 472.4 against 473.5 C), the chain's choice is the safe side. The value after 60 min is hotter
    # (heating only), so the period, not the end of the run, is what is judged.
    from steelfire.inputs.case import load_case

    root = Path(__file__).resolve().parents[1]
    case = load_case(root / "cases" / "warehouse_standard.toml")
    case = case.__class__(**{**case.__dict__, "analysis": case.analysis.__class__(
        **{**case.analysis.__dict__, "protection_model": "conduction"})})
    r = steelfire.analyse(case, histories=False)
    t = np.arange(0.0, 90.0 * 60.0 + 1.0, 5.0)
    ms = [(200.0, 0.02, 300.0, 1200.0, 0.12, 0.0), (140.0, 0.025, 800.0, 1700.0, 0.2, 0.0)]
    ref = C.run_converged(inputs(t, iso834(t), ms), keep_history=True)
    at60 = ref.history_C[np.searchsorted(t, 3600.0)]
    prot = [m for m in r.members if m.protection is not None]
    assert [m.name for m in prot] == ["M1-B01", "M1-C01"]
    for j, m in enumerate(prot):
        assert m.verdict_model == "conduction" and m.required_minutes == 60.0
        assert m.time_of_peak_steel_min == pytest.approx(60.0)
        assert m.peak_steel_temperature_C == pytest.approx(at60[j], abs=0.5)
        assert ref.peak_C[j] > at60[j] + 50.0
