"""Least protection thickness (steelfire.chain.sizing) on the members' kernel columns."""

import numpy as np
import pytest

import twins
from steelfire.chain import sizing, thermal
from steelfire.chain.fires import time_grid
from steelfire.inputs.case import case_from_dict
from steelfire.models.fire import nominal, parametric


def columns(ap_v, rho=800.0, c=1700.0, lam=0.2, moisture=0.0):
    """The kernel columns (chain.thermal.MemberColumns) of protected members of Ap/V ``ap_v`` in one
    material (a generic board: illustrative values), and the EN code values."""
    data = {"fire": {"curve": "standard", "duration_min": 60.0},
            "materials": {"m": {"density": rho, "conductivity": lam, "specific_heat": c, "moisture_percent": moisture}},
            "member": [{"name": f"M{i}", "kind": "tension", "section_factor_per_m": float(a),
                        "critical_temperature_C": 550.0, "protection": "m", "thickness_mm": 10.0}
                       for i, a in enumerate(ap_v)]}
    case = case_from_dict(data)
    return thermal.MemberColumns(case), case.code


def fires(q=370.0, o=0.04, b=1500.0, hours=6.0):
    ts = time_grid(240 * 60.0, 5.0)
    std = sizing.Fire(ts, nominal.standard_fire(ts), 25.0, nominal=True)
    pf = parametric.parametric_fire(o, b, q, 25 / 60)
    td = time_grid(hours * 3600.0, 5.0, [pf.t_max_s, pf.burnout_time_s])
    return std, sizing.Fire(td, pf.gas_temperature(td), 35.0)


def make_problem(ap_v, crit, required_s, standard, design, **kw):
    cols, code = columns(ap_v, **kw)
    return sizing.Problem(cols, np.arange(len(ap_v)), crit, required_s, standard, design, code)


def grid(lo_m, hi_m, step_m=0.5e-3):
    """The burnout scan over a material supplied from lo to hi in 0.5 mm steps."""
    return sizing.scan_grid(np.arange(lo_m, hi_m + 1e-12, step_m))


def problem(ap_v, crit, req_min, design=True, **kw):
    std, des = fires()
    return make_problem(ap_v, crit, np.asarray(req_min, float) * 60.0, std, des if design else None, **kw)


def test_standard_period_sized_passes_and_0p2mm_less_fails():
    ap_v = [80.0, 150.0, 220.0, 300.0]
    p = problem(ap_v, [550.0, 585.0, 620.0, 500.0], [60, 90, 120, 30], design=False)
    r = sizing.size_standard_period(p, np.full(4, 5e-3), np.full(4, 0.1))
    assert r.achievable.all()
    idx = np.arange(4)
    assert p.standard_passes(idx, r.thickness_m).all()
    assert not p.standard_passes(idx, r.thickness_m - 0.2e-3).any()
    assert (r.bracket_m <= 1e-4 + 1e-12).all()


def test_standard_period_against_independent_search():
    """Independent search: the plain-Python twin of eq (4.27), stepped over a 0.05 mm scan
    (tests/twins.py); the sized thickness must agree within 0.3 mm (issue requirement)."""
    ap_v, crit, req = 180.0, 560.0, 60.0
    p = problem([ap_v], [crit], [req], design=False)
    r = sizing.size_standard_period(p, np.array([5e-3]), np.array([0.08]))
    t = list(np.arange(0.0, req * 60.0 + 1, 5.0))
    g = list(nominal.standard_fire(np.array(t)))
    d = 5e-3
    while twins.protected_history(t, g, ap_v, d, 800.0, 1700.0, [(20.0, 0.2)])[-1] > crit:
        d += 0.05e-3
    assert r.thickness_m[0] == pytest.approx(d, abs=0.3e-3)


def test_burnout_sized_passes_and_0p2mm_less_fails():
    ap_v = [100.0, 160.0, 240.0]
    p = problem(ap_v, [560.0, 600.0, 620.0], [np.nan] * 3)
    r = sizing.size_burnout(p, [grid(5e-3, 0.08)] * 3)
    assert r.achievable.all()
    idx = np.arange(3)
    assert p.burnout_passes(idx, r.thickness_m).all()
    assert not p.burnout_passes(idx, r.thickness_m - 0.2e-3).any()


def test_burnout_non_monotone_heavy_protection():
    """Ap/V 200, heavy board, long ventilation-controlled fire: the burnout peak falls, then RISES
    with thickness (eq (4.27)'s cooling term). Sizing must return the least passing thickness, and
    thicknesses well above it fail again: found by an independent fine scan with the twin."""
    ap_v, crit = 200.0, 600.0
    std, des = fires()
    p = make_problem([ap_v], [crit], [np.nan], std, des)
    ds = np.arange(5e-3, 0.1, 1e-3)
    peaks = np.array([max(twins.protected_history(list(des.time_s), list(des.gas_C), ap_v, d, 800.0, 1700.0,
                                                  [(20.0, 0.2)])) for d in ds[::5]])
    assert np.argmin(peaks) not in (0, len(peaks) - 1)   # a real minimum inside the range: not monotone
    r = sizing.size_burnout(p, [grid(5e-3, 0.1)])
    assert r.achievable[0]
    d = r.thickness_m[0]
    assert p.burnout_passes(np.array([0]), np.array([d]))[0]
    assert not p.burnout_passes(np.array([0]), np.array([d - 0.2e-3]))[0]
    # independent fine scan (0.1 mm) from below: first passing thickness
    fine = np.arange(5e-3, 0.1, 0.1e-3)
    peak_fine = p._run(des, np.zeros(len(fine), np.int64), fine, np.full(len(fine), np.inf))[0]
    first = fine[np.argmax(peak_fine <= crit)]
    assert d == pytest.approx(first, abs=0.3e-3)
    assert peak_fine[-1] > crit  # and the thickest fails again


def test_not_achievable_reported():
    p = problem([300.0], [350.0], [240], design=False)
    r = sizing.size_standard_period(p, np.array([5e-3]), np.array([0.01]))
    assert not r.achievable[0] and np.isnan(r.thickness_m[0])


def test_round_up_and_verify_skips_failing_supplied_thickness():
    ap_v, crit = 200.0, 600.0
    std, des = fires()
    p = make_problem([ap_v], [crit], [np.nan], std, des)
    r = sizing.size_burnout(p, [grid(5e-3, 0.1)])
    d = r.thickness_m[0]
    # the first candidate above the failing end fails (too thin), the next passes: it is taken
    supplied = [np.array([d - 5e-3, d + 1e-4, 0.2])]
    chosen, ok = sizing.round_up_and_verify(p, np.array([5e-3]), r.achievable, supplied)
    assert ok[0] and chosen[0] == supplied[0][1]
    # a supplied thickness between the failing end and the bisection's passing end is not skipped
    between = r.failing_m[0] + 0.5 * (d - r.failing_m[0])
    if p.burnout_passes(np.array([0]), np.array([between]))[0]:
        chosen, ok = sizing.round_up_and_verify(p, r.failing_m, r.achievable, [np.array([between, d])])
        assert chosen[0] == between
    # a list whose only thickness above the need fails (too thick: the burnout peak rose again)
    chosen, ok = sizing.round_up_and_verify(p, r.failing_m, r.achievable, [np.array([0.099])])
    assert not ok[0] and np.isnan(chosen[0])


def test_scan_grid_uses_supplied_thicknesses_or_a_log_spread():
    few = np.array([12.5e-3, 15e-3, 20e-3])
    assert np.array_equal(sizing.scan_grid(few), few)
    many = np.arange(0.5e-3, 100e-3 + 1e-12, 0.5e-3)
    g = sizing.scan_grid(many)
    assert len(g) == sizing.SCAN_POINTS and g[0] == many[0] and g[-1] == many[-1]
    assert np.all(np.diff(np.log(g)) < 0.09)  # about 7 % apart
