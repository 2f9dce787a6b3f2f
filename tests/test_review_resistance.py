"""Checking review of member resistance in fire, classification and grades (EN 1993-1-2 4.2.2-4.2.4,
EN 1993-1-1 Table 5.2, EN 10025-2/-3/-4): one test per finding, and independent hand calculations of
the parts found correct."""

from __future__ import annotations

import math

import numpy as np
import pytest

from steelfire.errors import InputError, OutOfScopeError
from steelfire.models import classification as cl
from steelfire.models import grades
from steelfire.models import resistance as res
from steelfire.models.resistance import MemberDesign, critical_temperatures, resistances_at
from steelfire.models.sections import catalogue_section, chs_section, section_properties


def design(*members):
    return MemberDesign.from_members(list(members))


# ---------------------------------------------------------------------------------------------
# finding 1: kappa_1, kappa_2 below the clause values raised the resistance without limit
# ---------------------------------------------------------------------------------------------


@pytest.mark.parametrize("key,value", [("adaptation_factor_k1", 0.5), ("adaptation_factor_k1", 0.69),
                                       ("adaptation_factor_k2", 0.7), ("adaptation_factor_k2", 0.84)])
def test_adaptation_factors_below_the_clause_values_are_refused(key, value):
    # EN 1993-1-2 4.2.3.3(7): kappa_1 = 1.0 / 0.85 / 0.7; 4.2.3.3(8): kappa_2 = 1.0 / 0.85 (from
    # memory). M_fi,t,Rd = M_fi,theta,Rd / (kappa_1 kappa_2), so kappa_1 = 0.5 would give 1 / 0.5 = 2x
    # the uniform-temperature resistance (hand calculation) where the clause allows at most 1 / 0.7.
    m = {"kind": "beam", "steel_grade": "S275", "section": "IPE 300", "moment_y_kNm": 60.0,
         "laterally_restrained": True, key: value}
    with pytest.raises(InputError) as e:
        critical_temperatures(design(m))
    assert e.value.field == f"member[0].{key}"


def test_adaptation_factors_at_the_clause_values_are_accepted():
    # the least values of 4.2.3.3(7)-(8): kappa_1 kappa_2 = 0.7 * 0.85 = 0.595; IPE 300 S275
    # (t_f 10.7 -> f_y 275, EN 10025-2 from memory): W_pl f_y = 628.4e3 * 275 = 172.81 kNm (hand
    # calculation), M_fi,0 = 172.81 / 0.595 = 290.43 kNm
    m = {"kind": "beam", "steel_grade": "S275", "section": "IPE 300", "moment_y_kNm": 60.0,
         "laterally_restrained": True, "adaptation_factor_k1": 0.7, "adaptation_factor_k2": 0.85}
    r = critical_temperatures(design(m))
    assert r.moment_kNm[0] == pytest.approx(290.43, abs=0.05)


# ---------------------------------------------------------------------------------------------
# finding 2: mu_y of 4.2.3.5 (2005 text) gives a smaller k_y than the corrigendum for stocky members
# ---------------------------------------------------------------------------------------------


def test_mu_y_takes_the_safe_side_of_the_2005_text_and_the_corrigendum():
    # EN 1993-1-2 4.2.3.5 (from memory): 2005 text mu_y = (2 b - 5) lam + 0.44 b + 0.29 <= 0.8;
    # corrigendum AC:2009 mu_y = (1.2 b - 3) lam + 0.71 b - 0.29 <= 0.8; k_y = 1 - mu_y N / (chi_y N_pl).
    # HEB 300 S355 (t_f 19 -> f_y 345), L_cr = 1.2 m both axes, laterally restrained, N = 2000 kN,
    # M_y = 150 kNm, beta_M,y = 1.1. Hand calculation at 20 C:
    # A = 14907.8 mm2, N_pl = 5143.18 kN; W_pl,y = 1868.67e3 mm3, M_pl = 644.69 kNm, m = 0.232669
    # lambda_1 = pi sqrt(210000 / 345) = 77.5086; alpha = 0.65 sqrt(235/345) = 0.536460
    # lambda_y = 1200 / 129.927 / 77.5086 = 0.119161: phi = 0.539062, chi_y = 0.939153, n_y = 0.414058
    # lambda_z = 1200 / 75.788 / 77.5086 = 0.204282: phi = 0.575660, chi_z = 0.897783, n_z = 0.433138
    # 2005: mu_y = -2.8 * 0.119161 + 0.774 = 0.440350, k_y = 0.817670, (4.21a) = 0.433138 + 0.190247
    #   = 0.62338
    # AC:2009: mu_y = -1.68 * 0.119161 + 0.491 = 0.290810, k_y = 0.879588, (4.21a) = 0.63779
    # The corrigendum's is the larger (safe) one here; before the fix the module gave 0.62338.
    m = {"kind": "column", "steel_grade": "S355", "section": "HEB 300", "axial_force_kN": 2000.0,
         "moment_y_kNm": 150.0, "buckling_length_m": 1.2, "laterally_restrained": True}
    r = critical_temperatures(design(m))
    assert r.method[0] == "combined" and "(4.21a)" in r.clause[0]
    assert r.utilisation[0] == pytest.approx(0.63779, abs=2e-5)


def test_mu_y_2005_text_still_governs_for_slender_members():
    # Same member, L_cr = 4 m (hand calculation from tests/test_resistance.py's beam-column):
    # lambda_y = 0.3972, 2005: mu_y = -2.8 * 0.3972 + 0.774 = -0.33822, AC:2009: -1.68 * 0.3972 + 0.491
    # = -0.17630; the 2005 value is the smaller, k_y = 1 + 0.33822 * 1500 / 4134.3 = 1.12271,
    # (4.21a) = 0.44474 + 1.12271 * 100 / 644.69 = 0.61889 (N = 1500 kN, M = 100 kNm)
    m = {"kind": "column", "steel_grade": "S355", "section": "HEB 300", "axial_force_kN": 1500.0,
         "moment_y_kNm": 100.0, "buckling_length_m": 4.0, "laterally_restrained": True}
    assert critical_temperatures(design(m)).utilisation[0] == pytest.approx(0.61889, abs=1e-4)


# ---------------------------------------------------------------------------------------------
# finding 3: a class 4 member took 350 C even when its gross section fails at 20 C
# ---------------------------------------------------------------------------------------------


def test_class_4_member_whose_gross_section_fails_at_20C_fails():
    # IPE 300 S355 in compression is class 4 (web 35.0 > 42 eps = 29.05, hand calculation in
    # tests/test_resistance.py). Gross squash load A f_y = 5381.2 * 355 = 1910.3 kN (t_f 10.7 -> 355,
    # EN 10025-2 from memory); N = 2000 kN exceeds it, and A_eff <= A, so the member cannot carry N at
    # 20 C whatever its effective section: it must not get theta_a,cr = 350 C (4.2.3.6(2)).
    # Gross flexural buckling about z at 3 m, gamma_M,fi = 1 (hand calculation): lambda_1 = 76.41,
    # i_z = 33.5 mm -> lambda_z = 3000 / 33.5 / 76.41 = 1.172 so mu0 > 2000 / 1910.3 = 1.047.
    m = {"kind": "column", "steel_grade": "S355", "section": "IPE 300", "axial_force_kN": 2000.0,
         "buckling_length_m": 3.0}
    r = critical_temperatures(design(m))
    assert r.section_class[0] == 4 and r.method[0] == "class 4"
    assert r.fails_at_20C[0] and math.isnan(r.critical_temperature_C[0])
    assert r.utilisation[0] > 2000.0 / 1910.3
    d = r.member(0)
    assert d["critical_temperature_C"] is None and "gross section" in d["clause"]
    assert any("lower bound" in note for note in d["notes"])


def test_class_4_member_within_its_gross_resistance_keeps_350C():
    # the same member at N = 300 kN: gross utilisation < 1, so 4.2.3.6(2) gives 350 C (recommended)
    m = {"kind": "column", "steel_grade": "S355", "section": "IPE 300", "axial_force_kN": 300.0,
         "buckling_length_m": 3.0}
    r = critical_temperatures(design(m))
    assert not r.fails_at_20C[0] and r.critical_temperature_C[0] == 350.0
    assert r.member(0)["utilisation"] is None


# ---------------------------------------------------------------------------------------------
# finding 4: S420N/NL and S460N/NL took the EN 10025-4 (M/ML) strengths above 63 mm
# ---------------------------------------------------------------------------------------------


def test_normalised_s420_s460_above_63mm_are_refused():
    # EN 10025-3 (from memory): S420N f_y = 370 MPa at 63-80 mm, 360 at 80-100; EN 10025-4 S420M 380 /
    # 370. The table holds the M rows, so S420N at 70 mm would be given 380 > 370 MPa.
    with pytest.raises(OutOfScopeError) as e:
        grades.steel_strength("S420N", 70.0)
    assert e.value.field == "thickness_mm"
    for g in ("S420NL", "S460N", "s460nl"):
        with pytest.raises(OutOfScopeError):
            grades.steel_strength(g, 63.5)
    # up to 63 mm N and M agree (420 / 400 / 390 MPa for S420, from memory)
    assert grades.steel_strength("S420N", 63.0).f_y_MPa == 390.0
    assert grades.steel_strength("S420N", 16.0).f_y_MPa == 420.0
    # M/ML keep their rows: S420M 63-80 mm 380 MPa (EN 10025-4, from memory)
    assert grades.steel_strength("S420M", 70.0).f_y_MPa == 380.0
    assert grades.steel_strength("S420", 70.0).f_y_MPa == 380.0


def test_elastic_critical_moment_ipe_400_by_hand():
    # M_cr = C1 pi^2 E I_z / L^2 sqrt(I_w / I_z + L^2 G I_t / (pi^2 E I_z)) (doubly symmetric, load at
    # the shear centre, k = k_w = 1; textbook three-factor formula with C2 = C3 = 0). IPE 400, L = 4 m,
    # hand calculation: pi^2 * 210000 * 13.178e6 / 4000^2 = 1707.09 kN; I_w / I_z = 4.9005e11 /
    # 13.178e6 = 37186 mm2; L^2 G I_t / (pi^2 E I_z) = 1.6e7 * 81000 * 5.1075e5 / 2.73134e13 = 24235 mm2;
    # M_cr = 1707.09e3 * sqrt(61421) = 423.07 kNm (C1 = 1), 1.77 * 423.07 = 748.84 kNm (C1 = 1.77).
    # S355 (t_f 13.5 -> 355): lambda_LT = sqrt(1307.15e3 * 355 / 423.07e6) = 1.04729, with C1 = 1.77
    # sqrt(1307.15e3 * 355 / 748.84e6) = 0.78719
    p = section_properties(catalogue_section("IPE 400"))
    mcr = res.elastic_critical_moment_Nmm(4000.0, p.I_z_mm4, p.I_t_mm4, p.I_w_mm6)
    assert mcr / 1e6 == pytest.approx(423.07, abs=0.01)
    assert res.elastic_critical_moment_Nmm(4000.0, p.I_z_mm4, p.I_t_mm4, p.I_w_mm6, 1.77) / 1e6 \
        == pytest.approx(748.84, abs=0.01)
    base = {"kind": "beam", "steel_grade": "S355", "section": "IPE 400", "moment_y_kNm": 100.0,
            "lateral_restraint_length_m": 4.0}
    r = critical_temperatures(design(base, dict(base, moment_factor_C1=1.77)))
    assert r.slenderness_LT_20C == pytest.approx([1.04729, 0.78719], abs=1e-5)


# ---------------------------------------------------------------------------------------------
# checks of the parts found correct (independent hand calculations)
# ---------------------------------------------------------------------------------------------


def test_table_3_1_factors_between_rows():
    # EN 1993-1-2 Table 3.1 (from memory), linear between rows (hand calculation):
    # 450 C: k_y = (1.0 + 0.78) / 2 = 0.89, k_E = (0.7 + 0.6) / 2 = 0.65
    # 550 C: k_y = (0.78 + 0.47) / 2 = 0.625, k_E = (0.6 + 0.31) / 2 = 0.455
    # 750 C: k_y = (0.23 + 0.11) / 2 = 0.17, k_E = (0.13 + 0.09) / 2 = 0.11
    d = design({"kind": "tension", "steel_grade": "S355", "section": "HEB 300", "axial_force_kN": -100.0})
    for theta, ky, ke in ((450.0, 0.89, 0.65), (550.0, 0.625, 0.455), (750.0, 0.17, 0.11)):
        a = resistances_at(d, theta)
        assert a.k_y[0] == pytest.approx(ky, abs=1e-12) and a.k_E[0] == pytest.approx(ke, abs=1e-12)


def test_flexural_buckling_hea_200_at_600C_by_hand():
    # EN 1993-1-2 4.2.3.2 eq (4.5)-(4.7). HEA 200 S275 (t_f 10 -> f_y 275), L_cr = 3 m, hand calculation:
    # A = 5383.1 mm2, i_z = 49.809 mm, lambda_1 = pi sqrt(210000/275) = 86.8147,
    # lambda_z = 3000 / 49.809 / 86.8147 = 0.693780; at 600 C sqrt(k_y / k_E) = sqrt(0.47/0.31)
    # = 1.231312, lambda_theta = 0.854260; alpha = 0.65 sqrt(235/275) = 0.600871;
    # phi = (1 + 0.600871 * 0.854260 + 0.729760) / 2 = 1.121529; chi = 1 / (1.121529 +
    # sqrt(1.257827 - 0.729760)) = 0.541063; N_b,fi = 0.541063 * 0.47 * 5383.1 * 275 = 376.45 kN
    m = {"kind": "column", "steel_grade": "S275", "section": "HEA 200", "axial_force_kN": 100.0,
         "buckling_length_m": 3.0}
    a = resistances_at(design(m), 600.0)
    assert a.slenderness_z[0] == pytest.approx(0.854260, abs=2e-6)
    assert a.chi_z[0] == pytest.approx(0.541063, abs=2e-6)
    assert a.buckling_z_kN[0] == pytest.approx(376.45, abs=0.01)
    # gamma_M,fi = 1.1 (an override) divides it: 376.45 / 1.1 = 342.23 kN
    a2 = resistances_at(design(m), 600.0, {"gamma_M_fi": 1.1})
    assert a2.buckling_z_kN[0] == pytest.approx(342.23, abs=0.01)


def test_classification_hea_200_flange_in_fire():
    # EN 1993-1-2 4.2.2: eps = 0.85 sqrt(235 / f_y); EN 1993-1-1 Table 5.2 outstand 9 / 10 / 14 eps.
    # HEA 200 flange c/t = 78.75 / 10 = 7.875 (hand calculation).
    # S275: eps = 0.85 * 0.924416 = 0.785754, 10 eps = 7.8575 < 7.875 <= 14 eps = 11.0006 -> class 3 (class 2 at 20 C,
    #   where eps = 0.9244 and 10 eps = 9.24: the 0.85 of fire matters)
    # S235: eps = 0.85, 9 eps = 7.65 < 7.875 <= 10 eps = 8.5 -> class 2
    p = section_properties(catalogue_section("HEA 200"))
    c = cl.classify_section(p, 275.0, 0.0, 50.0)
    assert (c.section_class, c.part) == (3, "flange")
    assert c.c_over_t == pytest.approx(7.875) and c.limit == pytest.approx(11.0006, abs=1e-4)
    assert cl.classify_section(p, 235.0, 0.0, 50.0).section_class == 2
    # a class 3 beam uses W_el,y in 4.2.3.4: W_el f_y = 388.65e3 * 275 = 106.88 kNm
    r = critical_temperatures(design({"kind": "beam", "steel_grade": "S275", "section": "HEA 200",
                                      "moment_y_kNm": 50.0, "laterally_restrained": True}))
    assert r.section_class[0] == 3 and r.moment_kNm[0] == pytest.approx(106.88, abs=0.01)


def test_classification_ipe_400_web_under_compression_and_bending():
    # EN 1993-1-1 Table 5.2 sheet 1, web in bending and compression, S355 (t_f 13.5 -> 355),
    # N = 500 kN, M_y = 100 kNm, eps = 0.85 sqrt(235/355) = 0.691576. Hand calculation:
    # web c = 331.0, t_w = 8.6, c/t = 38.488
    # alpha = (1 + 500e3 / (331.0 * 8.6 * 355)) / 2 = (1 + 0.494782) / 2 = 0.747391
    # class 1: 396 eps / (13 alpha - 1) = 273.864 / 8.716083 = 31.421; class 2: 456 eps / 8.716083
    # = 36.182 < 38.488 -> not class 2
    # psi: sigma_N = 500e3 / 8446.36 = 59.197, sigma_M = 100e6 * 165.5 / 231.284e6 = 71.557,
    # psi = (59.197 - 71.557) / (59.197 + 71.557) = -0.09453;
    # class 3: 42 eps / (0.67 + 0.33 psi) = 29.0462 / 0.638805 = 45.470 >= 38.488 -> class 3
    p = section_properties(catalogue_section("IPE 400"))
    c = cl.classify_section(p, 355.0, 500.0, 100.0)
    assert (c.section_class, c.part) == (3, "web")
    assert c.alpha == pytest.approx(0.747391, abs=1e-6)
    assert c.psi == pytest.approx(-0.09453, abs=1e-5)
    assert c.limit == pytest.approx(45.470, abs=1e-3)


def test_classification_chs_limits_use_eps_squared():
    # EN 1993-1-1 Table 5.2 sheet 3, d/t <= 50 / 70 / 90 eps^2; fire eps^2 = 0.7225 * 235 / 355
    # = 0.478275 for S355 (hand calculation): 90 eps^2 = 43.045, 70 eps^2 = 33.479
    # CHS 219.1 x 6.3: d/t = 34.778 -> class 3; CHS 219.1 x 5.0: d/t = 43.82 -> class 4
    c3 = cl.classify_section(section_properties(chs_section(219.1, 6.3)), 355.0, 100.0, 0.0)
    c4 = cl.classify_section(section_properties(chs_section(219.1, 5.0)), 355.0, 100.0, 0.0)
    assert c3.section_class == 3 and c3.limit == pytest.approx(43.045, abs=1e-3)
    assert c4.section_class == 4


def test_grade_band_edges():
    # EN 10025-2 Table 7 (from memory): S355 R_eH 315 MPa for 80 < t <= 100, 295 for 100 < t <= 150;
    # R_m 470 (3-100 mm), 450 (100-150 mm); S235 R_m 340 for 150-250 mm
    assert (grades.steel_strength("S355", 100.0).f_y_MPa, grades.steel_strength("S355", 100.0).f_u_MPa) \
        == (315.0, 470.0)
    assert (grades.steel_strength("S355", 100.5).f_y_MPa, grades.steel_strength("S355", 100.5).f_u_MPa) \
        == (295.0, 450.0)
    assert grades.steel_strength("S235", 200.0).f_u_MPa == 340.0
    assert grades.steel_strength("S275", 80.0).f_y_MPa == 245.0


@pytest.mark.parametrize("mu0,theta", [
    # tension member: theta_a,cr where k_y,theta = mu0 (Table 3.1, linear; hand calculation)
    (0.01, 1100 + (0.02 - 0.01) / 0.02 * 100),    # 1150 C
    (0.001, 1100 + (0.02 - 0.001) / 0.02 * 100),  # 1195 C
    (0.999, 400 + (1.0 - 0.999) / 0.22 * 100),    # 400.45 C
])
def test_critical_temperature_near_the_ends_of_the_range(mu0, theta):
    p = section_properties(catalogue_section("HEB 300"))
    m = {"kind": "tension", "steel_grade": "S355", "section": "HEB 300",
         "axial_force_kN": -mu0 * p.area_mm2 * 345.0 / 1e3}
    r = critical_temperatures(design(m))
    assert theta - 0.1 <= r.critical_temperature_C[0] <= theta
    lo, hi = r.bracket_C[0]
    assert hi - lo <= 0.1


def test_critical_temperature_is_the_lowest_crossing_on_a_fine_scan():
    # The search scans 10 C and bisects; check against a 0.25 C scan of the utilisation of slender
    # and stocky columns and beams (k_y/k_E is not monotone: 400-500 C and 700-1100 C, Table 3.1)
    p = section_properties(catalogue_section("HEA 200"))
    npl = p.area_mm2 * 275e-3
    members = []
    for L, u in ((1.0, 0.3), (4.0, 0.15), (8.0, 0.1), (12.0, 0.05), (12.0, 0.08), (6.0, 0.02)):
        members.append({"kind": "column", "steel_grade": "S275", "section": "HEA 200",
                        "buckling_length_m": L, "axial_force_kN": u * npl})
    for L, M in ((10.0, 10.0), (3.0, 40.0), (10.0, 3.0)):
        members.append({"kind": "beam", "steel_grade": "S275", "section": "HEA 200",
                        "moment_y_kNm": M, "lateral_restraint_length_m": L})
    d = design(*members)
    r = critical_temperatures(d)
    grid = np.arange(20.0, 1200.0, 0.25)
    u = np.array([resistances_at(d, t).utilisation for t in grid])      # temperatures x members
    assert not np.any(r.fails_at_20C)
    # the members still hold at the returned temperatures
    assert np.all(resistances_at(d, r.critical_temperature_C).utilisation < 1.0)
    for i in range(len(members)):
        first = grid[np.argmax(u[:, i] >= 1.0)]
        assert first - 0.25 - 0.1 <= r.critical_temperature_C[i] <= first, i
