"""Steel grades (EN 10025-2/-4) and cross-section classification in fire (EN 1993-1-1 Table 5.2)."""

from __future__ import annotations

import math

import numpy as np
import pytest

from steelfire.errors import InputError, OutOfScopeError
from steelfire.models import classification as cl
from steelfire.models import grades
from steelfire.models.sections import (
    catalogue_section,
    chs_section,
    rhs_section,
    section_properties,
    welded_i_section,
)

# ---------------------------------------------------------------------------------------------
# grades
# ---------------------------------------------------------------------------------------------


@pytest.mark.parametrize("grade,t,fy,fu", [
    # EN 10025-2 Table 7, from memory
    ("S235", 10.0, 235, 360), ("S235", 16.0, 235, 360), ("S235", 16.1, 225, 360), ("S235", 50, 215, 360),
    ("S275", 12.0, 275, 410), ("S275", 30.0, 265, 410), ("S275", 63.0, 255, 410), ("S275", 90, 235, 410),
    ("S355", 10.7, 355, 470), ("S355", 19.0, 345, 470), ("S355", 40.0, 345, 470), ("S355", 45.0, 335, 470),
    ("S355", 120.0, 295, 450),
    # EN 10025-4 (M/ML), from memory
    ("S420", 16.0, 420, 520), ("S420", 25.0, 400, 520), ("S420", 50.0, 390, 500),
    ("S460", 12.0, 460, 540), ("S460", 36.0, 440, 540), ("S460", 70.0, 410, 510),
])
def test_nominal_strengths_by_thickness_band(grade, t, fy, fu):
    s = grades.steel_strength(grade, t)
    assert (s.f_y_MPa, s.f_u_MPa) == (fy, fu)
    assert s.band_mm[0] < t <= s.band_mm[1]
    assert "from memory" in s.source


def test_yield_strength_falls_with_thickness_and_grades_are_ordered():
    # EN 10025-2/-4 (from memory): f_y never rises with thickness; a higher grade is never weaker
    for g in grades.grade_names():
        fys = [grades.yield_strength_MPa(g, t) for t in np.linspace(1, 120, 240)]
        assert all(a >= b for a, b in zip(fys, fys[1:]))
    for t in (10, 30, 50, 90):
        fys = [grades.yield_strength_MPa(g, t) for g in grades.grade_names()]
        assert fys == sorted(fys)


def test_elastic_constants():
    # EN 1993-1-1 3.2.6(1): E = 210000 MPa, G ~ E / (2 (1 + 0.3)) = 80769 -> 81000 MPa
    assert grades.ELASTIC_MODULUS_MPA == 210000.0
    assert grades.SHEAR_MODULUS_MPA == 81000.0


def test_grade_names_with_quality_suffix():
    assert grades.steel_strength("S355J2", 10).grade == "S355"
    assert grades.steel_strength("s275jr", 10).grade == "S275"
    assert grades.steel_strength("S460M", 10).grade == "S460"
    for bad in ("S3550", "S360", "355", "", None, 355):
        with pytest.raises(InputError) as e:
            grades.steel_strength(bad, 10)
        assert e.value.field == "steel_grade"


def test_thickness_outside_the_bands():
    with pytest.raises(OutOfScopeError):
        grades.steel_strength("S460", 130.0)  # EN 10025-4 bands end at 120 mm (from memory)
    with pytest.raises(OutOfScopeError):
        grades.steel_strength("S355", 260.0)  # EN 10025-2 bands end at 250 mm (from memory)
    for bad in (0.0, -3.0, math.nan, "10", True):
        with pytest.raises(InputError):
            grades.steel_strength("S355", bad)


# ---------------------------------------------------------------------------------------------
# classification
# ---------------------------------------------------------------------------------------------


def test_fire_epsilon():
    # EN 1993-1-2 4.2.2(1): epsilon = 0.85 sqrt(235 / f_y); hand: S235 0.85, S355 0.85 * 0.81362 = 0.69158
    assert cl.fire_epsilon(235.0) == pytest.approx(0.85)
    assert cl.fire_epsilon(355.0) == pytest.approx(0.69158, abs=1e-5)
    assert cl.fire_epsilon(355.0, {"fire_epsilon_coefficient": 1.0}) == pytest.approx(0.81362, abs=1e-5)
    with pytest.raises(InputError):
        cl.fire_epsilon(355.0, {"fire_epsilon_coefficient": 1.5})


def test_table_5_2_limits_in_pure_compression_and_bending():
    # EN 1993-1-1 Table 5.2 (from memory), hand calculation with epsilon = 0.85 (S235 in fire):
    # internal part in compression 33/38/42 eps = 28.05/32.3/35.7; in bending 72/83/124 eps =
    # 61.2/70.55/105.4; outstand 9/10/14 eps = 7.65/8.5/11.9; CHS 50/70/90 eps^2 = 36.1/50.6/65.0.
    # Welded I 1000 x 400 x t_w x 40 (no weld; flanges class 1): web c = 920 mm; t_w puts c/t on
    # each side of the limits.
    eps = 0.85
    cases = [  # (t_w, N, M, expected class) for c/t = 920/t_w
        (920 / 28.0, 100.0, 0.0, 1), (920 / 28.1, 100.0, 0.0, 2), (920 / 32.2, 100.0, 0.0, 2),
        (920 / 32.4, 100.0, 0.0, 3), (920 / 35.6, 100.0, 0.0, 3), (920 / 35.8, 100.0, 0.0, 4),
        (920 / 61.1, 0.0, 100.0, 1), (920 / 61.3, 0.0, 100.0, 2), (920 / 70.6, 0.0, 100.0, 3),
        (920 / 105.3, 0.0, 100.0, 3), (920 / 105.5, 0.0, 100.0, 4),
    ]
    for tw, n, m, expected in cases:
        p = section_properties(welded_i_section(1000, 400, tw, 40))
        c = cl.classify_section(p, 235.0, n, m)
        assert (c.section_class, c.part) == (expected, "web"), (tw, n, m)
    # limits themselves
    p = section_properties(welded_i_section(1000, 400, 10, 40))
    assert cl.classify_section(p, 235.0, 100.0, 0.0).limit == pytest.approx(42 * eps)   # 92 > 42 eps: class 4
    assert cl.classify_section(p, 235.0, 0.0, 100.0).limit == pytest.approx(124 * eps)  # 92 <= 105.4: class 3
    # outstand flange of a welded I 2000 x 400 x 40 x t_f (web c/t < 50, class 1 in bending):
    # c = (400 - 40) / 2 = 180; c/t = 180 / t_f
    for tf, expected in ((180 / 7.6, 1), (180 / 7.7, 2), (180 / 8.6, 3), (180 / 11.8, 3), (180 / 12.0, 4)):
        p = section_properties(welded_i_section(2000, 400, 40, tf))
        c = cl.classify_section(p, 235.0, 0.0, 100.0)
        assert (c.section_class, c.part) == (expected, "flange"), tf


def test_ipe_300_classes():
    p = section_properties(catalogue_section("IPE 300"))
    # hand calculation: S235 in fire, eps = 0.85; web c/t = 35.01 > 38 eps = 32.3, <= 42 eps = 35.7:
    # class 3 in compression; in bending 35.01 <= 72 eps = 61.2: class 1; flange 5.28 <= 9 eps = 7.65
    assert cl.classify_section(p, 235.0, 100.0, 0.0).section_class == 3
    assert cl.classify_section(p, 235.0, 0.0, 100.0).section_class == 1
    # S355: eps = 0.69158, 42 eps = 29.05 < 35.01: class 4 in compression (web)
    c = cl.classify_section(p, 355.0, 100.0, 0.0)
    assert (c.section_class, c.part) == (4, "web")
    assert c.c_over_t == pytest.approx(35.01, abs=0.01) and c.limit == pytest.approx(29.046, abs=1e-3)


def test_combined_uses_plastic_neutral_axis_and_stress_ratio():
    # IPE 300, S235 (eps = 0.85), N = 300 kN, M_y = 50 kNm. Hand calculation:
    # alpha = (1 + N / (c t_w f_y)) / 2 = (1 + 300e3 / (248.6 * 7.1 * 235)) / 2 = (1 + 300e3 / 414789) / 2
    # = (1 + 0.72326) / 2 = 0.86163; class 1 limit 396 eps / (13 alpha - 1) = 336.6 / 10.2012 = 32.996
    # < 35.01; class 2 limit 456 eps / (13 alpha - 1) = 387.6 / 10.2012 = 37.996 >= 35.01 -> class 2 (web)
    p = section_properties(catalogue_section("IPE 300"))
    c = cl.classify_section(p, 235.0, 300.0, 50.0)
    assert c.alpha == pytest.approx(0.86163, abs=1e-5)
    assert (c.section_class, c.part) == (2, "web")
    assert c.limit == pytest.approx(37.996, abs=1e-3)
    # psi (elastic): sigma = N / A -+ M (c/2) / I_y = 55.753 -+ 74.38 -> psi = -18.63 / 130.13 = -0.1431
    # (A = 5381 mm2, I_y = 8.356e7 mm4, c/2 = 124.3 mm; hand calculation)
    assert c.psi == pytest.approx(-0.1431, abs=2e-4)
    # heavier axial force: the web is class 3 by 42 eps / (0.67 + 0.33 psi) (hand: N = 1000 kN, M = 10:
    # sigma = 185.84 -+ 14.88, psi = 170.96 / 200.72 = 0.85174, limit 35.7 / 0.95107 = 37.537)
    c = cl.classify_section(p, 235.0, 1000.0, 10.0)
    assert c.alpha == 1.0 and c.psi == pytest.approx(0.85174, abs=2e-4)
    assert (c.section_class, c.limit) == (3, pytest.approx(37.537, abs=2e-3))


def test_tension_parts_are_not_classified():
    p = section_properties(welded_i_section(1000, 400, 4, 8))  # slender plates
    c = cl.classify_section(p, 355.0, -500.0, 0.0)
    assert c.section_class == 1 and math.isinf(c.limit)
    # with a moment the compression flange counts: c/t = 198 / 8 = 24.75 > 14 eps: class 4
    assert cl.classify_section(p, 355.0, -500.0, 10.0).section_class == 4


def test_hollow_sections():
    # CHS d/t: 50/70/90 eps^2 (Table 5.2 sheet 3, from memory); S355: eps^2 = 0.47828 ->
    # 23.91 / 33.48 / 43.05 (hand calculation)
    for d, t, expected in ((168.3, 8.0, 1), (168.3, 5.6, 2), (323.9, 8.0, 3), (323.9, 6.3, 4)):
        c = cl.classify_section(section_properties(chs_section(d, t)), 355.0, 100.0, 0.0)
        assert (c.section_class, c.part) == (expected, "wall"), (d, t)
    # RHS 200 x 200 x 6 hot-finished, S355: c = 200 - 18 = 182, c/t = 30.33 > 42 eps = 29.05: class 4
    c = cl.classify_section(section_properties(rhs_section(200, 200, 6)), 355.0, 100.0, 0.0)
    assert c.section_class == 4 and c.c_over_t == pytest.approx(30.333, abs=1e-3)
    # RHS 300 x 100 x 6 in bending: flange c/t = (100 - 18) / 6 = 13.7 (compression, class 1);
    # webs c/t = 282 / 6 = 47 <= 72 eps = 49.79: class 1 (hand calculation, S355)
    c = cl.classify_section(section_properties(rhs_section(300, 100, 6)), 355.0, 0.0, 50.0)
    assert c.section_class == 1 and c.part == "web"
    # with N the two webs share it: alpha = (1 + N / (2 c t f_y)) / 2 (hand: N = 300 kN ->
    # (1 + 300e3 / (2 * 282 * 6 * 355)) / 2 = (1 + 0.24973) / 2 = 0.62487)
    c = cl.classify_section(section_properties(rhs_section(300, 100, 6)), 355.0, 300.0, 50.0)
    assert c.alpha == pytest.approx(0.62487, abs=1e-5)


def test_columns_match_single_calls():
    props = [section_properties(s) for s in (catalogue_section("IPE 300"), rhs_section(200, 100, 5),
                                             chs_section(219.1, 4.0))]
    cols = cl.classify_columns(props, [355.0, 275.0, 235.0], [100.0, 0.0, 50.0], [20.0, 30.0, 0.0])
    for i, p in enumerate(props):
        one = cl.classify_section(p, [355.0, 275.0, 235.0][i], [100.0, 0.0, 50.0][i], [20.0, 30.0, 0.0][i])
        assert cols.section_class[i] == one.section_class and cols.part[i] == one.part
        assert cols.c_over_t[i] == one.c_over_t


def test_bad_input():
    p = section_properties(catalogue_section("IPE 300"))
    with pytest.raises(InputError):
        cl.classify_section(p, -355.0)
    with pytest.raises(InputError):
        cl.classify_section(p, 355.0, math.nan)
    with pytest.raises(InputError):
        cl.classify_section(catalogue_section("IPE 300"), 355.0)
