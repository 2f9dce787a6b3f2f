"""Member resistance in fire and critical temperatures, EN 1993-1-2 4.2.3 (steelfire.models.resistance)."""

from __future__ import annotations

import json
import math

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from scipy.optimize import brentq

from steelfire.errors import InputError, OutOfScopeError
from steelfire.models import classification, steel
from steelfire.models import resistance as res
from steelfire.models.resistance import MemberDesign, critical_temperatures, resistances_at
from steelfire.models.sections import (
    catalogue_section,
    chs_section,
    rhs_section,
    section_properties,
)

# ---------------------------------------------------------------------------------------------
# plain-Python twin of the checks, written from the clauses (scalars, math only)
# ---------------------------------------------------------------------------------------------

# EN 1993-1-2 Table 3.1 (from memory): theta [C], k_y,theta, k_E,theta
TABLE_3_1 = [(20, 1.0, 1.0), (100, 1.0, 1.0), (200, 1.0, 0.9), (300, 1.0, 0.8), (400, 1.0, 0.7),
             (500, 0.78, 0.6), (600, 0.47, 0.31), (700, 0.23, 0.13), (800, 0.11, 0.09),
             (900, 0.06, 0.0675), (1000, 0.04, 0.045), (1100, 0.02, 0.0225), (1200, 0.0, 0.0)]
E, G = 210000.0, 81000.0  # EN 1993-1-1 3.2.6(1)


def k_factors(theta):
    for (t0, y0, e0), (t1, y1, e1) in zip(TABLE_3_1, TABLE_3_1[1:]):
        if t0 <= theta <= t1:
            w = (theta - t0) / (t1 - t0)
            return y0 + w * (y1 - y0), e0 + w * (e1 - e0)
    raise ValueError(theta)


def chi_fire(lam, fy):
    """EN 1993-1-2 eq (4.6)-(4.7)."""
    a = 0.65 * math.sqrt(235.0 / fy)
    phi = 0.5 * (1 + a * lam + lam ** 2)
    return 1.0 / (phi + math.sqrt(phi ** 2 - lam ** 2))


def section_class(m, fy):
    p = section_properties(m["section"])
    return classification.classify_section(p, fy, m.get("axial_force_kN", 0.0),
                                           m.get("moment_y_kNm", 0.0)).section_class


def twin_utilisation(m, fy, theta, cls=None):
    """Governing utilisation of one member at theta, EN 1993-1-2 4.2.3 written out."""
    s = m["section"]
    p = section_properties(s)
    N = m.get("axial_force_kN", 0.0) * 1e3
    M = abs(m.get("moment_y_kNm", 0.0)) * 1e6
    cls = section_class(m, fy) if cls is None else cls
    assert cls <= 3
    ky, kE = k_factors(theta)
    if ky <= 0.0:
        return math.inf
    r = math.sqrt(ky / kE)
    W = p.W_pl_y_mm3 if cls <= 2 else p.W_el_y_mm3
    npl = ky * p.area_mm2 * fy          # gamma_M,fi = 1
    mth = ky * W * fy
    kappa = m.get("adaptation_factor_k1", 1.0) * m.get("adaptation_factor_k2", 1.0)
    ltb = p.shape == "I" and M > 0 and not m.get("laterally_restrained", False)
    if ltb:
        L = m["lateral_restraint_length_m"] * 1e3
        c1 = m.get("moment_factor_C1", 1.0)
        mcr = c1 * math.pi ** 2 * E * p.I_z_mm4 / L ** 2 * math.sqrt(
            p.I_w_mm6 / p.I_z_mm4 + L ** 2 * G * p.I_t_mm4 / (math.pi ** 2 * E * p.I_z_mm4))
        chi_lt = chi_fire(math.sqrt(W * fy / mcr) * r, fy)
    if N < 0:
        u = -N / npl + kappa * M / mth
        return max(u, M / (chi_lt * mth)) if ltb else u
    if N == 0:
        u = kappa * M / mth
        return max(u, M / (chi_lt * mth)) if ltb else u
    lam1 = math.pi * math.sqrt(E / fy)
    ly = m.get("buckling_length_y_m", m.get("buckling_length_m"))
    lz = m.get("buckling_length_z_m", m.get("buckling_length_m"))
    lam_y = ly * 1e3 / p.i_y_mm / lam1 * r
    lam_z = lz * 1e3 / p.i_z_mm / lam1 * r
    chi_y, chi_z = chi_fire(lam_y, fy), chi_fire(lam_z, fy)
    if M == 0:
        return N / (min(chi_y, chi_z) * npl)
    beta = 1.1
    # EN 1993-1-2 4.2.3.5: the smaller of the 2005 text and the AC:2009 form (both from memory), <= 0.8
    mu_y = min((2 * beta - 5) * lam_y + 0.44 * beta + 0.29, (1.2 * beta - 3) * lam_y + 0.71 * beta - 0.29, 0.8)
    k_y = min(1 - mu_y * N / (chi_y * npl), 3.0)
    u = N / (min(chi_y, chi_z) * npl) + k_y * M / mth                  # (4.21a)/(4.21c)
    if ltb:
        mu_lt = min(0.15 * lam_z * beta - 0.15, 0.9)
        k_lt = min(1 - mu_lt * N / (chi_z * npl), 1.0)
        u = max(u, N / (chi_z * npl) + k_lt * M / (chi_lt * mth))       # (4.21b)/(4.21d)
    return u


def twin_critical_temperature(m, fy):
    """First root of u(theta) = 1: 1 C scan, then scipy.optimize.brentq to 1e-6 C."""
    cls = section_class(m, fy)
    f = lambda t: twin_utilisation(m, fy, t, cls) - 1.0  # noqa: E731
    if f(20.0) >= 0:
        return None
    t = 20.0
    while t < 1199.0:
        if f(t + 1.0) >= 0:
            return brentq(f, t, t + 1.0, xtol=1e-6)
        t += 1.0
    return brentq(f, t, 1199.999, xtol=1e-6)


def design(*members, **kw):
    return MemberDesign.from_members(list(members), **kw)


# ---------------------------------------------------------------------------------------------
# tension: eq (4.22) and Table 3.1
# ---------------------------------------------------------------------------------------------


def tension_member(mu0, section="HEB 300", grade="S355", fy=345.0):
    p = section_properties(catalogue_section(section))
    return {"kind": "tension", "steel_grade": grade, "section": section,
            "axial_force_kN": -mu0 * p.area_mm2 * fy / 1e3}


@pytest.mark.parametrize("mu0,theta", [
    # hand calculation, Table 3.1 linear between rows: k_y,theta = mu0
    (0.5, 500 + (0.78 - 0.5) / 0.31 * 100),   # 590.32 C
    (0.7, 500 + (0.78 - 0.7) / 0.31 * 100),   # 525.81 C
    (0.2, 700 + (0.23 - 0.2) / 0.12 * 100),   # 725.00 C
    (0.9, 400 + (1.0 - 0.9) / 0.22 * 100),    # 445.45 C
])
def test_tension_member_critical_temperature_is_where_k_y_equals_mu0(mu0, theta):
    r = critical_temperatures(design(tension_member(mu0)))
    assert r.method[0] == "tension" and r.clause[0] == "EN 1993-1-2 4.2.3.1 tension"
    assert r.utilisation[0] == pytest.approx(mu0, rel=1e-12)
    assert theta - 0.1 <= r.critical_temperature_C[0] <= theta


def test_tension_member_against_eq_4_22():
    # The brief asks for agreement with eq (4.22) within 5 C. Measured: eq (4.22) (a smooth fit) and
    # Table 3.1 interpolated linearly (which the resistance uses) differ by up to 13 C over Table
    # 4.1's range mu0 = 0.22 ... 0.90 (+9.4 C at 0.40, -13.0 C at 0.90), and by < 5 C only near
    # mu0 = 0.2, 0.55-0.75. Tested: within 5 C at those, within 14 C over Table 4.1's range.
    mus = np.round(np.arange(0.22, 0.901, 0.02), 2)               # EN 1993-1-2 Table 4.1 rows
    r = critical_temperatures(design(*[tension_member(float(m)) for m in mus]))
    eq = np.array([steel.critical_temperature(float(m)) for m in mus])
    diff = r.critical_temperature_C - eq
    assert np.max(np.abs(diff)) < 14.0
    near = np.isin(mus, [0.56, 0.6, 0.64, 0.7, 0.74])
    assert np.all(np.abs(diff[near]) < 5.0)
    r2 = critical_temperatures(design(tension_member(0.2)))
    assert abs(r2.critical_temperature_C[0] - steel.critical_temperature(0.2)) < 5.0


# ---------------------------------------------------------------------------------------------
# worked examples (hand calculations)
# ---------------------------------------------------------------------------------------------


def test_column_worked_by_hand():
    # HEB 300, S355: t_f = 19 mm -> f_y = 345 MPa (EN 10025-2, 16 < t <= 40, from memory);
    # L_cr,y = L_cr,z = 4.0 m; N_fi,Ed = 1500 kN. Hand calculation:
    # A = 2*300*19 + 262*11 + (4 - pi)*27^2 = 14907.8 mm2, N_pl = A f_y = 5143.2 kN
    # i_z = sqrt(8562.8e4 / 14907.8) = 75.79 mm, lambda_1 = pi sqrt(210000/345) = 77.51
    # lambda_z = 4000 / 75.79 / 77.51 = 0.6809; alpha = 0.65 sqrt(235/345) = 0.53646
    # 20 C: phi = (1 + 0.53646*0.6809 + 0.6809^2)/2 = 0.91446, chi = 1/(0.91446 + sqrt(0.83624 -
    #   0.46363)) = 0.65579, N_b,z = 3372.9 kN, mu0 = 1500 / 3372.9 = 0.4447
    # 500 C: k_y = 0.78, k_E = 0.60, lambda_theta = 0.6809 sqrt(1.3) = 0.77637, phi = 1.00962,
    #   chi = 0.60421, N_b = 0.60421 * 0.78 * 5143.2 = 2423.9 kN > 1500
    # 600 C: k_y = 0.47, k_E = 0.31, lambda_theta = 0.6809 * 1.23131 = 0.83841, phi = 1.07635,
    #   chi = 0.57099, N_b = 0.57099 * 0.47 * 5143.2 = 1380.3 kN < 1500
    # root: secant 500 + 923.9/1043.6*100 = 588.5 C gives N_b = 1501.7 kN (k_y = 0.50565,
    #   k_E = 0.34335, lambda = 0.82631, chi = 0.57743); one more step: 588.7 C
    m = {"kind": "column", "steel_grade": "S355", "section": "HEB 300", "axial_force_kN": 1500.0,
         "buckling_length_m": 4.0}
    d = design(m)
    a20, a500, a600 = (resistances_at(d, t) for t in (20.0, 500.0, 600.0))
    alpha = 0.65 * math.sqrt(235.0 / 345.0)
    assert a20.slenderness_z[0] == pytest.approx(0.6809, abs=1e-4)
    assert res.buckling_phi(a20.slenderness_z[0], alpha) == pytest.approx(0.91446, abs=5e-5)
    assert a20.chi_z[0] == pytest.approx(0.65579, abs=5e-5)
    assert a20.buckling_z_kN[0] == pytest.approx(3372.9, abs=0.3)
    assert a500.slenderness_z[0] == pytest.approx(0.77637, abs=5e-5)
    assert res.buckling_phi(a500.slenderness_z[0], alpha) == pytest.approx(1.00962, abs=5e-5)
    assert a500.chi_z[0] == pytest.approx(0.60421, abs=5e-5)
    assert a500.buckling_z_kN[0] == pytest.approx(2423.9, abs=0.3)
    assert a600.slenderness_z[0] == pytest.approx(0.83841, abs=5e-5)
    assert res.buckling_phi(a600.slenderness_z[0], alpha) == pytest.approx(1.07635, abs=5e-5)
    assert a600.chi_z[0] == pytest.approx(0.57099, abs=5e-5)
    assert a600.buckling_z_kN[0] == pytest.approx(1380.3, abs=0.3)
    r = critical_temperatures(d)
    assert r.method[0] == "flexural buckling"
    assert r.clause[0] == "EN 1993-1-2 4.2.3.2 flexural buckling, z-z"
    assert r.f_y_MPa[0] == 345.0 and r.section_class[0] == 1
    assert r.utilisation[0] == pytest.approx(0.4447, abs=1e-4)
    assert r.critical_temperature_C[0] == pytest.approx(588.7, abs=0.15)
    assert r.slenderness_20C[0] == pytest.approx(0.6809, abs=1e-4)
    # at the root: N_b,fi = N_fi,Ed, so chi = 1500 / (k_y N_pl)
    ky = steel.yield_strength_factor(r.critical_temperature_C[0])
    assert r.reduction_factor_at_critical[0] == pytest.approx(1500.0 / (ky * 5143.2), rel=1e-3)
    assert r.member(0)["resistance_20C"]["axial_kN"] == pytest.approx(5143.2, abs=0.3)


def test_unrestrained_beam_worked_by_hand():
    # IPE 300, S275 (t_f = 10.7 -> f_y = 275 MPa), L between lateral restraints 5.0 m, C1 = 1.0,
    # M_y,fi,Ed = 40 kNm, load at the shear centre. Hand calculation:
    # class 1 (flange 5.28 <= 9 eps = 7.07, web 35.0 <= 72 eps = 56.6; eps = 0.85 sqrt(235/275) = 0.78576)
    # M_cr = pi^2 E I_z / L^2 sqrt(I_w/I_z + L^2 G I_t / (pi^2 E I_z)) = 500.55 kN * sqrt(20857 + 32557)
    #      = 500.55e3 * 231.12 = 115.69 kNm
    # lambda_LT = sqrt(W_pl f_y / M_cr) = sqrt(628.4e3 * 275 / 115.69e6) = 1.2222; alpha = 0.60087
    # 20 C: phi = 1.61408, chi_LT = 0.37476, M_b = 0.37476 * 172.81 = 64.76 kNm, mu0 = 0.6177
    # 500 C: lambda = 1.2222 * 1.140175 = 1.39352, phi = 1.88961, chi = 0.31587,
    #   M_b = 0.31587 * 0.78 * 172.81 = 42.58 kNm > 40
    # 600 C: lambda = 1.2222 * 1.23131 = 1.50491, phi = 2.08451, chi = 0.28354,
    #   M_b = 0.28354 * 0.47 * 172.81 = 23.03 kNm < 40
    # root: 500 + (42.58 - 40) / (42.58 - 23.03) * 100 = 513.2 C (nearly linear there)
    m = {"kind": "beam", "steel_grade": "S275", "section": "IPE 300", "moment_y_kNm": 40.0,
         "lateral_restraint_length_m": 5.0}
    d = design(m)
    p = section_properties(catalogue_section("IPE 300"))
    mcr = res.elastic_critical_moment_Nmm(5000.0, p.I_z_mm4, p.I_t_mm4, p.I_w_mm6)
    assert mcr / 1e6 == pytest.approx(115.69, abs=0.02)
    alpha = 0.65 * math.sqrt(235.0 / 275.0)
    a20, a500, a600 = (resistances_at(d, t) for t in (20.0, 500.0, 600.0))
    assert a20.slenderness_LT[0] == pytest.approx(1.2222, abs=1e-4)
    assert res.buckling_phi(a20.slenderness_LT[0], alpha) == pytest.approx(1.61408, abs=2e-4)
    assert a20.chi_LT[0] == pytest.approx(0.37476, abs=5e-5)
    assert a20.ltb_moment_kNm[0] == pytest.approx(64.76, abs=0.01)
    assert a20.moment_kNm[0] == pytest.approx(172.81, abs=0.02)   # W_pl f_y = 628.4e3 * 275
    assert a500.slenderness_LT[0] == pytest.approx(1.39352, abs=1e-4)
    assert res.buckling_phi(a500.slenderness_LT[0], alpha) == pytest.approx(1.88961, abs=2e-4)
    assert a500.chi_LT[0] == pytest.approx(0.31587, abs=5e-5)
    assert a500.ltb_moment_kNm[0] == pytest.approx(42.58, abs=0.01)
    assert a600.slenderness_LT[0] == pytest.approx(1.50491, abs=1e-4)
    assert res.buckling_phi(a600.slenderness_LT[0], alpha) == pytest.approx(2.08451, abs=2e-4)
    assert a600.chi_LT[0] == pytest.approx(0.28354, abs=5e-5)
    assert a600.ltb_moment_kNm[0] == pytest.approx(23.03, abs=0.01)
    r = critical_temperatures(d)
    assert r.method[0] == "lateral-torsional buckling"
    assert r.clause[0] == "EN 1993-1-2 4.2.3.3(4)-(5) lateral-torsional buckling, class 1/2, W_pl,y"
    assert r.utilisation[0] == pytest.approx(0.6177, abs=1e-4)
    assert r.critical_temperature_C[0] == pytest.approx(513.2, abs=0.2)
    assert r.slenderness_20C[0] == pytest.approx(1.2222, abs=1e-4)


def test_beam_column_worked_by_hand():
    # HEB 300, S355 (f_y 345), L = 4 m both axes, N = 1500 kN, M_y = 100 kNm, laterally restrained:
    # eq (4.21a) at 20 C (hand calculation): lambda_y = 4000 / 129.93 / 77.51 = 0.3972,
    # chi_y = 0.80378 (phi = 0.68550), N_b,y = 4134.3 kN; chi_min = chi_z = 0.65579 (N_b,z = 3372.9);
    # mu_y = (2*1.1 - 5) * 0.3972 + 0.44*1.1 + 0.29 = -0.33822, k_y = 1 + 0.33822 * 1500/4134.3 = 1.12271;
    # M_pl = 1868.7e3 * 345 = 644.69 kNm; (4.21a) = 0.44474 + 1.12271 * 100/644.69 = 0.61889
    m = {"kind": "column", "steel_grade": "S355", "section": "HEB 300", "axial_force_kN": 1500.0,
         "moment_y_kNm": 100.0, "buckling_length_m": 4.0, "laterally_restrained": True}
    r = critical_temperatures(design(m))
    assert r.method[0] == "combined"
    assert r.clause[0].startswith("EN 1993-1-2 4.2.3.5 eq (4.21a), flexural buckling z-z")
    assert r.utilisation[0] == pytest.approx(0.61889, abs=1e-4)
    assert r.buckling_y_kN[0] == pytest.approx(4134.3, abs=0.5)
    assert r.moment_kNm[0] == pytest.approx(644.69, abs=0.05)
    # the same member free to buckle laterally over 4 m is governed by (4.21b) and is weaker
    m2 = dict(m, laterally_restrained=False, lateral_restraint_length_m=4.0)
    r2 = critical_temperatures(design(m2))
    assert "(4.21b)" in r2.clause[0]
    assert r2.critical_temperature_C[0] < r.critical_temperature_C[0]


def test_orientation_values_for_s355_columns_at_mu0_half():
    # independent check quoted by the issue: class 1-3 S355 column at mu0 = 0.5 has theta_a,cr about
    # 578 / 567 / 558 / 547 C at lambda = 0.5 / 0.77 / 1.0 / 1.5 (eq (4.22): 585 C). HEB 300 (f_y 345),
    # L chosen for lambda_z, N = 0.5 chi_fi(lambda, 20 C) N_pl.
    p = section_properties(catalogue_section("HEB 300"))
    lam1 = math.pi * math.sqrt(E / 345.0)
    members = []
    for lam in (0.5, 0.77, 1.0, 1.5):
        L = lam * p.i_z_mm * lam1 / 1e3
        members.append({"kind": "column", "steel_grade": "S355", "section": "HEB 300",
                        "buckling_length_m": L,
                        "axial_force_kN": 0.5 * chi_fire(lam, 345.0) * p.area_mm2 * 345.0 / 1e3})
    r = critical_temperatures(design(*members))
    assert np.allclose(r.utilisation, 0.5, atol=1e-9)
    assert r.critical_temperature_C == pytest.approx([578, 567, 558, 547], abs=1.0)


# ---------------------------------------------------------------------------------------------
# limits and monotonicity
# ---------------------------------------------------------------------------------------------


def test_column_tends_to_squash_answer_as_slenderness_vanishes():
    # chi_fi -> 1 as lambda -> 0 (eq (4.6)): the column's theta_a,cr -> where k_y,theta = N / N_pl
    # (hand calculation at N / N_pl = 0.5: 590.32 C, as the tension member)
    p = section_properties(catalogue_section("HEB 300"))
    npl = p.area_mm2 * 345.0 / 1e3
    temps = []
    for L in (1.0, 0.1, 0.01, 0.001):
        r = critical_temperatures(design({"kind": "column", "steel_grade": "S355", "section": "HEB 300",
                                          "axial_force_kN": 0.5 * npl, "buckling_length_m": L}))
        temps.append(r.critical_temperature_C[0])
    assert temps == sorted(temps)
    assert temps[-1] == pytest.approx(590.32, abs=0.2)
    assert r.member(0)["resistance_20C"]["axial_kN"] == pytest.approx(npl, rel=1e-12)


SECTIONS = ["IPE 200", "IPE 400", "HEA 200", "HEA 300", "HEB 200", "HEB 300", "HEB 500"]


@settings(max_examples=40, deadline=None)
@given(name=st.sampled_from(SECTIONS), grade=st.sampled_from(["S235", "S275", "S355"]),
       load=st.floats(0.05, 0.6), l1=st.floats(0.5, 12.0), dl=st.floats(0.01, 6.0))
def test_critical_temperature_falls_with_slenderness(name, grade, load, l1, dl):
    # physics (common practice, no source): a longer column at the same load is not stronger
    npl = section_properties(catalogue_section(name)).area_mm2 * 235.0 / 1e3
    ms = [{"kind": "column", "steel_grade": grade, "section": name, "axial_force_kN": load * npl,
           "buckling_length_m": L} for L in (l1, l1 + dl)]
    r = critical_temperatures(design(*ms))
    t = np.where(r.fails_at_20C, -np.inf, r.critical_temperature_C)
    assert t[1] <= t[0] + 0.1


@settings(max_examples=40, deadline=None)
@given(name=st.sampled_from(SECTIONS), grade=st.sampled_from(["S235", "S275", "S355"]),
       load=st.floats(0.02, 0.8), dload=st.floats(0.001, 0.5), length=st.floats(1.0, 10.0),
       kind=st.sampled_from(["column", "beam", "tension"]))
def test_critical_temperature_falls_with_load(name, grade, load, dload, length, kind):
    # physics (common practice, no source): more load, no higher critical temperature
    p = section_properties(catalogue_section(name))
    npl, mpl = p.area_mm2 * 235.0 / 1e3, p.W_pl_y_mm3 * 235.0 / 1e6
    ms = []
    for u in (load, load + dload):
        if kind == "column":
            ms.append({"kind": "column", "steel_grade": grade, "section": name,
                       "axial_force_kN": u * npl, "buckling_length_m": length})
        elif kind == "beam":
            ms.append({"kind": "beam", "steel_grade": grade, "section": name,
                       "moment_y_kNm": u * mpl, "lateral_restraint_length_m": length})
        else:
            ms.append({"kind": "tension", "steel_grade": grade, "section": name,
                       "axial_force_kN": -u * npl})
    r = critical_temperatures(design(*ms))
    t = np.where(r.fails_at_20C, -np.inf, r.critical_temperature_C)
    assert t[1] <= t[0] + 0.1


# ---------------------------------------------------------------------------------------------
# root finder against scipy.optimize.brentq and the twin
# ---------------------------------------------------------------------------------------------


def random_members(seed, n):
    """Mixed invented members (test data): every mode of loading, I and hollow sections."""
    rng = np.random.default_rng(seed)
    sections = [catalogue_section(x) for x in ("IPE 200", "IPE 400", "HEA 200", "HEA 400", "HEB 300",
                                               "HEB 600")]
    sections += [rhs_section(200, 200, 10), rhs_section(300, 200, 12.5), chs_section(219.1, 10),
                 chs_section(168.3, 8)]
    out = []
    while len(out) < n:
        s = sections[rng.integers(len(sections))]
        p = section_properties(s)
        npl, mpl = p.area_mm2 * 235e-3, p.W_pl_y_mm3 * 235e-6
        mode = rng.integers(5)
        m = {"section": s, "steel_grade": ["S235", "S275", "S355", "S460"][rng.integers(4)]}
        if mode == 0:
            m.update(kind="tension", axial_force_kN=-rng.uniform(0.05, 0.9) * npl)
        elif mode == 1:
            m.update(kind="tension", axial_force_kN=-rng.uniform(0.05, 0.5) * npl,
                     moment_y_kNm=rng.uniform(0.05, 0.4) * mpl,
                     lateral_restraint_length_m=rng.uniform(1, 6))
        elif mode == 2:
            m.update(kind="beam", moment_y_kNm=rng.uniform(0.05, 0.8) * mpl,
                     lateral_restraint_length_m=rng.uniform(1, 8),
                     moment_factor_C1=float(rng.choice([1.0, 1.13, 1.77])),
                     adaptation_factor_k1=float(rng.choice([1.0, 0.85, 0.7])))
        elif mode == 3:
            m.update(kind="column", axial_force_kN=rng.uniform(0.05, 0.6) * npl,
                     buckling_length_y_m=rng.uniform(1, 8), buckling_length_z_m=rng.uniform(1, 5))
        else:
            L = rng.uniform(1, 4)
            m.update(kind="column", axial_force_kN=rng.uniform(0.05, 0.4) * npl,
                     moment_y_kNm=rng.uniform(0.05, 0.3) * mpl, buckling_length_m=L,
                     lateral_restraint_length_m=L, laterally_restrained=bool(rng.integers(2)))
        out.append(m)
    return out


def test_root_finder_against_brentq_on_random_members():
    members = random_members(7, 80)
    r = critical_temperatures(design(*members), allow_out_of_scope=True)
    checked = 0
    for i, m in enumerate(members):
        if r.method[i] == "class 4":
            # EN 1993-1-2 4.2.3.6(2); or failing at 20 C where even the gross section cannot carry the effect
            assert r.critical_temperature_C[i] == 350.0 or (r.fails_at_20C[i] and r.utilisation[i] >= 1.0)
            continue
        fy = r.f_y_MPa[i]
        # mu0: the vectorised checks equal the twin to 1e-9 relative
        assert r.utilisation[i] == pytest.approx(twin_utilisation(m, fy, 20.0), rel=1e-9)
        root = twin_critical_temperature(m, fy)
        if root is None:
            assert r.fails_at_20C[i] and math.isnan(r.critical_temperature_C[i])
            continue
        # the lower end of the final interval: at most 0.1 C below the root, never above it
        assert root - 0.1 - 1e-6 <= r.critical_temperature_C[i] <= root + 1e-6, (i, m, root)
        lo, hi = r.bracket_C[i]
        assert hi - lo <= 0.1 and lo <= root <= hi + 1e-6
        checked += 1
    assert checked >= 40
    assert set(r.method) >= {"tension", "combined", "bending", "lateral-torsional buckling",
                             "flexural buckling"}


def test_resistances_at_equal_twin_at_random_temperatures():
    members = random_members(11, 40)
    rng = np.random.default_rng(3)
    theta = rng.uniform(20.0, 1150.0, len(members))
    d = design(*members)
    a = resistances_at(d, theta, allow_out_of_scope=True)
    r = critical_temperatures(d, allow_out_of_scope=True)
    for i, m in enumerate(members):
        if r.method[i] == "class 4":
            assert math.isnan(a.utilisation[i])
            continue
        assert a.utilisation[i] == pytest.approx(twin_utilisation(m, r.f_y_MPa[i], theta[i]), rel=1e-9)


# ---------------------------------------------------------------------------------------------
# class 4, kappa, hollow sections, failing at 20 C, result form
# ---------------------------------------------------------------------------------------------


def test_class_4_section_takes_350_C():
    # IPE 300 in S355 in compression: web c/t 35.0 > 42 eps = 29.05 (hand calculation) -> class 4,
    # theta_a,cr = 350 C (EN 1993-1-2 4.2.3.6(2), recommended value)
    m = {"kind": "column", "steel_grade": "S355", "section": "IPE 300", "axial_force_kN": 300.0,
         "buckling_length_m": 3.0}
    r = critical_temperatures(design(m))
    assert r.section_class[0] == 4 and r.method[0] == "class 4"
    assert r.critical_temperature_C[0] == 350.0
    assert r.class_part[0] == "web" and r.class_limit[0] == pytest.approx(29.05, abs=0.01)
    d = r.member(0)
    assert d["utilisation"] is None and d["resistance_20C"]["axial_kN"] is None
    assert any("class 4" in note for note in d["notes"])
    # the code value reaches the answer
    r2 = critical_temperatures(design(m), {"class4_critical_temperature_C": 400.0})
    assert r2.critical_temperature_C[0] == 400.0 and "400 C" in r2.clause[0]
    # the same section in S235 is class 3 (35.0 <= 35.7) and is searched
    r3 = critical_temperatures(design(dict(m, steel_grade="S235")))
    assert r3.section_class[0] == 3 and r3.method[0] == "flexural buckling"


def test_class_3_uses_elastic_modulus():
    # Welded I 1000 x 300 x 10 x 20 in S235, pure bending, restrained. Hand calculation:
    # t_f = 20 mm -> f_y = 225 MPa (EN 10025-2, 16 < t <= 40, from memory), eps = 0.85 sqrt(235/225)
    # = 0.86867; web c/t = 960 / 10 = 96.0 > 83 eps = 72.10 and <= 124 eps = 107.7 -> class 3;
    # flange c/t = 145 / 20 = 7.25 <= 9 eps = 7.82 (class 1). So M_fi,0 = W_el,y f_y (4.2.3.4).
    from steelfire.models.sections import welded_i_section

    s = welded_i_section(1000, 300, 10, 20)
    p = section_properties(s)
    m = {"kind": "beam", "steel_grade": "S235", "section": s, "moment_y_kNm": 500.0,
         "laterally_restrained": True}
    r = critical_temperatures(design(m))
    assert r.f_y_MPa[0] == 225.0
    assert r.section_class[0] == 3 and r.method[0] == "bending" and r.class_part[0] == "web"
    assert "4.2.3.4" in r.clause[0] and "W_el,y" in r.clause[0]
    assert r.moment_kNm[0] == pytest.approx(p.W_el_y_mm3 * 225.0 / 1e6, rel=1e-12)


def test_adaptation_factors_divide_the_moment_resistance():
    # EN 1993-1-2 4.2.3.3(7)-(8): M_fi,t,Rd = k_y W_pl f_y / (gamma_M,fi kappa_1 kappa_2).
    # IPE 300 S275 restrained, M = 60 kNm, kappa_1 = 0.7, kappa_2 = 0.85 (hand calculation):
    # M_fi,0 = 172.81 / 0.595 = 290.43 kNm, mu0 = 60 / 290.43 = 0.20659; k_y = 0.20659 at
    # 700 + (0.23 - 0.20659)/0.12 * 100 = 719.5 C
    m = {"kind": "beam", "steel_grade": "S275", "section": "IPE 300", "moment_y_kNm": 60.0,
         "laterally_restrained": True, "adaptation_factor_k1": 0.7, "adaptation_factor_k2": 0.85}
    r = critical_temperatures(design(m))
    assert r.moment_kNm[0] == pytest.approx(290.43, abs=0.05)
    assert r.utilisation[0] == pytest.approx(0.20659, abs=1e-4)
    assert r.critical_temperature_C[0] == pytest.approx(719.5, abs=0.15)


def test_hollow_sections_do_not_buckle_laterally():
    m = {"kind": "beam", "steel_grade": "S355", "section": rhs_section(300, 200, 10),
         "moment_y_kNm": 100.0}                        # no lateral_restraint_length_m needed
    r = critical_temperatures(design(m))
    assert r.method[0] == "bending" and math.isnan(r.ltb_moment_kNm[0])


def test_member_that_fails_at_20C_has_no_critical_temperature():
    m = {"kind": "column", "steel_grade": "S355", "section": "HEB 300", "axial_force_kN": 8000.0,
         "buckling_length_m": 4.0}
    r = critical_temperatures(design(m))
    assert r.fails_at_20C[0] and math.isnan(r.critical_temperature_C[0])
    assert r.utilisation[0] == pytest.approx(8000.0 / 3372.8, rel=1e-4)  # N_b,z,20 from the column above
    d = r.member(0)
    assert d["critical_temperature_C"] is None and d["fails_at_20C"] is True


def test_member_dict_is_json_and_complete():
    members = random_members(5, 30)
    r = critical_temperatures(design(*members), allow_out_of_scope=True)
    keys = {"method", "clause", "section_class", "class_part", "steel_grade", "f_y_MPa",
            "slenderness_20C", "slenderness_at_critical", "reduction_factor_at_critical",
            "design_effect", "resistance_20C", "utilisation", "critical_temperature_C",
            "fails_at_20C", "notes"}
    for i in range(len(r)):
        d = r.member(i)
        assert set(d) == keys
        assert set(d["resistance_20C"]) == {"axial_kN", "buckling_y_kN", "buckling_z_kN", "moment_kNm",
                                            "ltb_moment_kNm"}
        assert set(d["design_effect"]) == {"axial_force_kN", "moment_y_kNm"}
        assert d["method"] in res.METHODS
        json.dumps(d, allow_nan=False)


# ---------------------------------------------------------------------------------------------
# code values and input validation
# ---------------------------------------------------------------------------------------------


def test_code_values_table_and_overrides():
    for name, (value, unit, clause, (lo, hi)) in res.CODE_VALUES.items():
        assert lo <= value <= hi and clause.startswith("EN 199") and unit
    assert res.CODE_VALUES["gamma_M_fi"][0] == 1.0                      # EN 1993-1-2 2.3(1)
    assert res.CODE_VALUES["class4_critical_temperature_C"][0] == 350.0  # EN 1993-1-2 4.2.3.6(2)
    assert res.CODE_VALUES["fire_imperfection_coefficient"][0] == 0.65  # EN 1993-1-2 4.2.3.2(2)
    assert res.CODE_VALUES["fire_epsilon_coefficient"][0] == 0.85       # EN 1993-1-2 4.2.2(1)
    # gamma_M,fi = 1.25 scales every resistance: mu0 of a tension member x 1.25 (hand calculation)
    r = critical_temperatures(design(tension_member(0.4)), {"gamma_M_fi": 1.25, "unrelated_key": 3})
    assert r.utilisation[0] == pytest.approx(0.5, rel=1e-12)
    assert r.code_values["gamma_M_fi"] == 1.25
    with pytest.raises(InputError) as e:
        critical_temperatures(design(tension_member(0.4)), {"gamma_M_fi": 0.8})
    assert e.value.field == "code.gamma_M_fi"


@pytest.mark.parametrize("member,field", [
    ({"kind": "column", "axial_force_kN": 100.0}, "member[0].buckling_length_y_m"),
    ({"kind": "beam", "moment_y_kNm": 50.0}, "member[0].lateral_restraint_length_m"),
    ({"kind": "beam", "moment_y_kNm": 50.0, "lateral_restraint_length_m": -2.0},
     "member[0].lateral_restraint_length_m"),
    ({"kind": "column", "axial_force_kN": 100.0, "buckling_length_m": 0.0}, "member[0].buckling_length_y_m"),
    ({"kind": "tension", "axial_force_kN": 100.0}, "member[0].axial_force_kN"),
    ({"kind": "beam"}, "member[0].axial_force_kN"),
    ({"kind": "girder", "moment_y_kNm": 5.0, "laterally_restrained": True}, "member[0].kind"),
    ({"kind": "beam", "steel_grade": "S999", "moment_y_kNm": 5.0, "laterally_restrained": True},
     "member[0].steel_grade"),
    ({"kind": "beam", "moment_y_kNm": 5.0, "laterally_restrained": True, "moment_factor_C1": 0.5},
     "member[0].moment_factor_C1"),
    ({"kind": "beam", "moment_y_kNm": 5.0, "laterally_restrained": True, "adaptation_factor_k1": 1.2},
     "member[0].adaptation_factor_k1"),
    ({"kind": "beam", "moment_y_kNm": 5.0, "laterally_restrained": True,
      "equivalent_moment_factor_y": 0.9}, "member[0].equivalent_moment_factor_y"),
    ({"kind": "beam", "moment_y_kNm": "5"}, "member[0].moment_y_kNm"),
    ({"kind": "column", "axial_force_kN": 1.0, "buckling_length_m": 3.0, "buckling_length_z_m": 2.0},
     "member[0].buckling_length_z_m"),
    ({"kind": "beam", "moment_y_kNm": 5.0, "laterally_restrained": "yes"}, "member[0].laterally_restrained"),
    ({"kind": "beam", "moment_y_kNm": 5.0, "laterally_restrained": True, "section": "IPE 301"},
     "member[0].section"),
    ({"kind": "beam", "moment_y_kNm": 5.0, "laterally_restrained": True, "section": 42},
     "member[0].section"),
])
def test_bad_input_names_the_field(member, field):
    m = {"steel_grade": "S355", "section": "IPE 300"}
    m.update(member)
    with pytest.raises(InputError) as e:
        critical_temperatures(design(m))
    assert e.value.field == field
    assert not isinstance(e.value, OutOfScopeError)


def test_labels_name_members_in_errors():
    ms = [tension_member(0.5), {"kind": "column", "steel_grade": "S355", "section": "HEB 300",
                                "axial_force_kN": 10.0}]
    with pytest.raises(InputError) as e:
        critical_temperatures(design(*ms, labels=["T1", "C7"]))
    assert e.value.field == "C7.buckling_length_y_m"


def test_out_of_scope_slender_beam_column():
    # EN 1993-1-2 4.2.3.5 (from memory): mu_y holds for lambda_y,20C <= 1.1. HEA 200 about y over 12 m:
    # lambda_y = 12000 / 82.8 / 77.51 = 1.87 (hand, f_y 345... S355 t_f = 10 -> 355: lambda_1 = 76.41,
    # lambda_y = 1.897)
    m = {"kind": "column", "steel_grade": "S355", "section": "HEA 200", "axial_force_kN": 50.0,
         "moment_y_kNm": 5.0, "buckling_length_m": 12.0, "laterally_restrained": True}
    with pytest.raises(OutOfScopeError) as e:
        critical_temperatures(design(m))
    assert e.value.field == "member[0].lambda_y_20C"
    r = critical_temperatures(design(m), allow_out_of_scope=True)
    assert any("out of scope" in n for n in r.notes[0])
    assert r.slenderness_y_20C[0] == pytest.approx(12000 / 82.8 / (math.pi * math.sqrt(E / 355)), rel=2e-3)


def test_empty_schedule():
    r = critical_temperatures(MemberDesign.from_members([]))
    assert len(r) == 0 and r.critical_temperature_C.shape == (0,)
