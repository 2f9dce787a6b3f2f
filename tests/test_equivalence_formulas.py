"""Time equivalence formulas: EN 1991-1-2 Annex F and CIB W14 (steelfire.models.equivalence).

Every expected value carries its source. "Hand calculation" values were worked out from the formulas
as written in the comment (a calculator on the printed formula, not this module); they are asserted
as literals so that a wrong formula in the module makes the test fail.
No published worked example is reproduced: none is remembered well enough to quote.
"""

from __future__ import annotations

import json
import math

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from steelfire.codevalues import DEFAULTS, DEFINITIONS
from steelfire.models.equivalence import (
    annex_f_conversion_factor,
    annex_f_correction_factor,
    annex_f_time_equivalence,
    annex_f_ventilation_factor,
    cib_w14_conversion_factor,
    cib_w14_time_equivalence,
    cib_w14_ventilation_factor,
)
from steelfire.errors import InputError

REL = 1e-9

# ---------------------------------------------------------------------------------------------------
# Two invented compartments
# ---------------------------------------------------------------------------------------------------
# Compartment A: office room 10 m x 6 m x 3.0 m, protected steel.
#   A_f = 60 m2, H = 3.0 m, A_v = 9.0 m2, h_eq = 1.5 m, A_h = 0,
#   A_t = 2*60 + 2*(10+6)*3.0 = 120 + 96 = 216 m2, b = 1500, q_f,d = 600 MJ/m2.
COMPARTMENT_A = dict(
    design_fire_load_MJ_m2=600.0,
    floor_area_m2=60.0,
    height_m=3.0,
    vertical_opening_area_m2=9.0,
    total_area_m2=216.0,
    opening_height_m=1.5,
    thermal_inertia=1500.0,
)

# Compartment B: open-plan floor 20 m x 20 m x 4.5 m with roof vents, bare steel.
#   A_f = 400 m2, H = 4.5 m, A_v = 40 m2, h_eq = 2.0 m, A_h = 8 m2,
#   A_t = 2*400 + 4*20*4.5 = 800 + 360 = 1160 m2, b = 400, q_f,d = 500 MJ/m2.
COMPARTMENT_B = dict(
    design_fire_load_MJ_m2=500.0,
    floor_area_m2=400.0,
    height_m=4.5,
    vertical_opening_area_m2=40.0,
    roof_opening_area_m2=8.0,
    total_area_m2=1160.0,
    opening_height_m=2.0,
    thermal_inertia=400.0,
)


def test_annex_f_compartment_a_protected_every_factor():
    r = annex_f_time_equivalence(**COMPARTMENT_A, protected=True)
    # hand calculation per EN 1991-1-2 Table F.2: 720 <= b = 1500 <= 2500 -> k_b = 0.055
    assert r.k_b == pytest.approx(0.055, rel=REL)
    assert r.k_b_band == "720 <= b <= 2500"
    # hand calculation: alpha_v = 9/60 = 0.15 (inside 0.025..0.25), alpha_h = 0/60 = 0
    assert r.alpha_v_raw == pytest.approx(0.15, rel=REL)
    assert r.alpha_v == pytest.approx(0.15, rel=REL)
    assert r.alpha_h == 0.0
    # hand calculation per eq (F.2): b_v = 12.5 (1 + 10*0.15 - 0.15^2) = 12.5 * 2.4775 = 30.96875 (>= 10)
    assert r.b_v_raw == pytest.approx(30.96875, rel=REL)
    assert r.b_v == pytest.approx(30.96875, rel=REL)
    # hand calculation per eq (F.2): (6.0/3.0)^0.3 = 2^0.3 = 1.2311444133
    assert r.height_factor == pytest.approx(1.2311444133449163, rel=REL)
    # hand calculation per eq (F.2): 90 (0.4-0.15)^4 = 90 * 0.00390625 = 0.3515625; / (1 + b_v*0) = 0.3515625
    #   w_f = 1.2311444133 * (0.62 + 0.3515625) = 1.2311444133 * 0.9715625 = 1.1961337441 (>= 0.5)
    assert r.w_f_raw == pytest.approx(1.1961337440904203, rel=REL)
    assert r.w_f == pytest.approx(1.1961337440904203, rel=REL)
    # hand calculation per EN 1991-1-2 Table F.1: protected steel -> k_c = 1.0
    assert r.k_c == 1.0
    # hand calculation per eq (F.1): t_e,d = 600 * 0.055 * 1.1961337441 * 1.0 = 33 * 1.1961337441 = 39.4724136 min
    assert r.t_e_min == pytest.approx(39.472413554983866, rel=REL)
    # hand calculation (Annex A definition): O = A_v sqrt(h_eq)/A_t = 9 * 1.2247448714 / 216 = 0.0510310363
    assert r.opening_factor_m05 == pytest.approx(0.05103103630798288, rel=REL)
    # hand calculation per eq (F.3): A_f = 60 < 100 and no roof openings -> offered;
    #   w_f = O^-0.5 A_f/A_t = (0.0510310363)^-0.5 * 60/216 = 4.4267276788 * 0.2777777778 = 1.2296465774
    #   t_e = 600 * 0.055 * 1.2296465774 * 1.0 = 40.5783371 min
    assert r.small_compartment is not None
    assert r.small_compartment.w_f == pytest.approx(1.2296465774448018, rel=REL)
    assert r.small_compartment.t_e_min == pytest.approx(40.57833705567846, rel=REL)
    # the main (F.2) result is not replaced by the (F.3) alternative
    assert r.w_f != pytest.approx(r.small_compartment.w_f, rel=1e-3)
    # no validity warning for alpha_v inside its range; the three scope notes are always there
    assert not any("alpha_v" in w for w in r.warnings)
    assert any("informative" in w for w in r.warnings)
    assert any("cellulosic" in w for w in r.warnings)
    assert any("composite" in w and "timber" in w for w in r.warnings)


def test_annex_f_compartment_b_bare_steel_every_factor():
    r = annex_f_time_equivalence(**COMPARTMENT_B, protected=False)
    # hand calculation per Table F.2: b = 400 < 720 -> k_b = 0.07
    assert r.k_b == pytest.approx(0.07, rel=REL)
    assert r.k_b_band == "b < 720"
    # hand calculation: alpha_v = 40/400 = 0.1, alpha_h = 8/400 = 0.02
    assert r.alpha_v_raw == pytest.approx(0.1, rel=REL)
    assert r.alpha_v == pytest.approx(0.1, rel=REL)
    assert r.alpha_h == pytest.approx(0.02, rel=REL)
    # hand calculation per eq (F.2): b_v = 12.5 (1 + 1.0 - 0.01) = 12.5 * 1.99 = 24.875
    assert r.b_v_raw == pytest.approx(24.875, rel=REL)
    assert r.b_v == pytest.approx(24.875, rel=REL)
    # hand calculation per eq (F.2): (6.0/4.5)^0.3 = 1.3333333^0.3 = 1.0901383576
    assert r.height_factor == pytest.approx(1.090138357569351, rel=REL)
    # hand calculation per eq (F.2): 90 * 0.3^4 = 90 * 0.0081 = 0.729; 1 + 24.875*0.02 = 1.4975;
    #   0.729 / 1.4975 = 0.4868113523; w_f = 1.0901383576 * (0.62 + 0.4868113523) = 1.0901383576 * 1.1068113523
    #   = 1.2065775097
    assert r.w_f_raw == pytest.approx(1.2065775096850222, rel=REL)
    assert r.w_f == pytest.approx(1.2065775096850222, rel=REL)
    # hand calculation: O = 40 * sqrt(2) / 1160 = 56.5685425 / 1160 = 0.0487659849 m^0.5
    assert r.opening_factor_m05 == pytest.approx(0.048765984909417075, rel=REL)
    # hand calculation per Table F.1: unprotected steel k_c = 13.7 O = 13.7 * 0.0487659849 = 0.6680939933
    assert r.k_c == pytest.approx(0.6680939932590139, rel=REL)
    assert "13.7" in r.k_c_basis
    # hand calculation per eq (F.1): t_e,d = 500 * 0.07 * 1.2065775097 * 0.6680939933
    #   = 42.2302128 * 0.6680939933 = 28.2137515 min
    assert r.t_e_min == pytest.approx(28.2137515317694, rel=REL)
    # eq (F.3) not applicable: A_f = 400 m2 is not below 100 m2
    assert r.small_compartment is None
    assert "not applicable" in r.small_compartment_note
    assert "400" in r.small_compartment_note


def test_cib_w14_compartment_a_protected():
    r = cib_w14_time_equivalence(**COMPARTMENT_A, protected=True)
    # hand calculation: w = A_f / sqrt(A_v A_t sqrt(h_eq)) = 60 / sqrt(9 * 216 * 1.2247448714)
    #   = 60 / sqrt(2380.9040) = 60 / 48.794508 = 1.2296465774 m^-0.25
    assert r.w == pytest.approx(1.2296465774448018, rel=REL)
    # from memory (CIB W14 1986 design guide, textbook reproduction): 720 <= b <= 2500 -> c = 0.07
    assert r.c == pytest.approx(0.07, rel=REL)
    # hand calculation: t_e = 0.07 * 1.2296465774 * 600 = 51.6451563 min
    assert r.t_e_min == pytest.approx(51.64515625268167, rel=REL)
    assert r.not_applicable_reason is None


def test_cib_w14_compartment_b_protected_and_bare():
    r = cib_w14_time_equivalence(**COMPARTMENT_B, protected=True)
    # hand calculation: w = 400 / sqrt(40 * 1160 * sqrt(2)) = 400 / sqrt(65619.5093) = 400 / 256.16305
    #   = 1.5615054420 m^-0.25
    assert r.w == pytest.approx(1.5615054420240915, rel=REL)
    # from memory (CIB W14 1986): b = 400 < 720 -> c = 0.09 min m^2.25/MJ
    assert r.c == pytest.approx(0.09, rel=REL)
    # hand calculation: t_e = 0.09 * 1.5615054420 * 500 = 70.2677449 min
    assert r.t_e_min == pytest.approx(70.26774489108412, rel=REL)
    # the formula has no roof-opening term: the 8 m2 of roof vents are ignored, with a warning
    assert any("roof" in w for w in r.warnings)

    bare = cib_w14_time_equivalence(**COMPARTMENT_B, protected=False)
    # DESIGN.md / CIB W14: derived for protected members only -> null with a reason
    assert bare.t_e_min is None
    assert "protected" in bare.not_applicable_reason
    assert bare.w == pytest.approx(1.5615054420240915, rel=REL)  # same hand calculation as above
    assert bare.to_dict()["t_e_min"] is None


def test_annex_f_small_compartment_w_f_equals_cib_w():
    # hand calculation: O^-1/2 A_f/A_t = sqrt(A_t/(A_v sqrt h)) A_f/A_t = A_f / sqrt(A_v A_t sqrt h) = CIB w
    f = annex_f_time_equivalence(**COMPARTMENT_A)
    c = cib_w14_ventilation_factor(floor_area_m2=60.0, vertical_opening_area_m2=9.0, total_area_m2=216.0,
                                   opening_height_m=1.5)
    assert f.small_compartment.w_f == pytest.approx(c, rel=1e-12)


# ---------------------------------------------------------------------------------------------------
# Table steps, bounds and validity limits
# ---------------------------------------------------------------------------------------------------
@pytest.mark.parametrize(
    "b, expected",
    [
        (719.9, 0.07),    # EN 1991-1-2 Table F.2 (from memory of the table): b < 720 -> 0.07
        (720.0, 0.055),   # Table F.2: 720 <= b, boundary in the middle row -> 0.055
        (1500.0, 0.055),  # Table F.2: middle row
        (2500.0, 0.055),  # Table F.2: b <= 2500, boundary in the middle row -> 0.055
        (2500.1, 0.04),   # Table F.2: b > 2500 -> 0.04
        (None, 0.07),     # Annex F general value where b is not assessed: 0.07 (from memory)
    ],
)
def test_annex_f_kb_steps(b, expected):
    assert annex_f_conversion_factor(b) == pytest.approx(expected, rel=REL)
    r = annex_f_time_equivalence(**{**COMPARTMENT_A, "thermal_inertia": b})
    assert r.k_b == pytest.approx(expected, rel=REL)
    # hand calculation per eq (F.1): t_e = 600 * k_b * 1.1961337441 (w_f of compartment A)
    assert r.t_e_min == pytest.approx(600.0 * expected * 1.1961337440904203, rel=REL)


def test_annex_f_kb_unknown_b_is_flagged():
    r = annex_f_time_equivalence(**{**COMPARTMENT_A, "thermal_inertia": None})
    assert r.thermal_inertia is None
    assert any("general value" in w for w in r.warnings)


@pytest.mark.parametrize(
    "b, expected",
    [
        (719.9, 0.09),    # from memory (CIB W14 1986): b < 720 -> 0.09
        (720.0, 0.07),    # from memory: 720..2500 -> 0.07; boundary side assumed as in EN Table F.2
        (2500.0, 0.07),   # from memory: boundary side assumed as in EN Table F.2
        (2500.1, 0.05),   # from memory: b > 2500 -> 0.05
        (None, 0.1),      # from memory: general value 0.1 when b is unknown
    ],
)
def test_cib_w14_kc_steps(b, expected):
    assert cib_w14_conversion_factor(b) == pytest.approx(expected, rel=REL)


def test_annex_f_w_f_lower_bound():
    # hand calculation per eq (F.2), H = 20 m, alpha_v = 25/100 = 0.25, alpha_h = 0:
    #   (6/20)^0.3 = 0.3^0.3 = 0.6968453019; 90 * 0.15^4 = 0.0455625;
    #   w_f_raw = 0.6968453019 * (0.62 + 0.0455625) = 0.6968453019 * 0.6655625 = 0.4637941013 < 0.5 -> w_f = 0.5
    wf = annex_f_ventilation_factor(floor_area_m2=100.0, height_m=20.0, vertical_opening_area_m2=25.0)
    assert wf.w_f_raw == pytest.approx(0.46379410126974496, rel=REL)
    assert wf.w_f == 0.5
    r = annex_f_time_equivalence(design_fire_load_MJ_m2=800.0, floor_area_m2=100.0, height_m=20.0,
                                 vertical_opening_area_m2=25.0, thermal_inertia=3000.0)
    # hand calculation per eq (F.1): 800 * 0.04 * 0.5 * 1.0 = 16.0 min (w_f held at its bound)
    assert r.t_e_min == pytest.approx(16.0, rel=REL)
    assert r.w_f_raw == pytest.approx(0.46379410126974496, rel=REL)


def test_annex_f_b_v_lower_bound():
    # With EN constants b_v >= 12.5 for 0 <= alpha_v <= 0.25, so the bound is shown with an override
    # (a hypothetical national annex): b_v coefficient 5 instead of 12.5.
    # hand calculation: alpha_v = 10/100 = 0.1, alpha_h = 5/100 = 0.05;
    #   b_v_raw = 5 (1 + 1.0 - 0.01) = 9.95 < 10 -> b_v = 10;
    #   w_f = 2^0.3 (0.62 + 0.729 / (1 + 10*0.05)) = 1.2311444133 * (0.62 + 0.486) = 1.3616457212
    #   (with b_v = 9.95 it would be 1.2311444133 * (0.62 + 0.729/1.4975) = 1.3626446130)
    wf = annex_f_ventilation_factor(floor_area_m2=100.0, height_m=3.0, vertical_opening_area_m2=10.0,
                                    roof_opening_area_m2=5.0, code={"annex_f_bv_coefficient": 5.0})
    assert wf.b_v_raw == pytest.approx(9.95, rel=REL)
    assert wf.b_v == 10.0
    assert wf.w_f == pytest.approx(1.3616457211594772, rel=REL)


def test_annex_f_alpha_v_below_range_keeps_raw_value():
    # alpha_v = 1/100 = 0.01 < 0.025
    r = annex_f_time_equivalence(design_fire_load_MJ_m2=500.0, floor_area_m2=100.0, height_m=3.0,
                                 vertical_opening_area_m2=1.0, thermal_inertia=1000.0)
    assert r.alpha_v_raw == pytest.approx(0.01, rel=REL)
    assert r.alpha_v == pytest.approx(0.01, rel=REL)
    assert any("below" in w and "alpha_v" in w for w in r.warnings)
    # hand calculation per eq (F.2) with alpha_v = 0.01: b_v = 12.5 (1 + 0.1 - 0.0001) = 13.74875;
    #   w_f = 2^0.3 (0.62 + 90 * 0.39^4) = 1.2311444133 * (0.62 + 2.0820969) = 3.3266715028
    assert r.b_v == pytest.approx(13.748750000000001, rel=REL)
    assert r.w_f == pytest.approx(3.3266715027516174, rel=REL)
    # hand calculation with alpha_v clamped to 0.025 would give w_f = 2^0.3 (0.62 + 90 * 0.375^4) = 2.9544820883:
    # keeping the raw value is the conservative (higher) side
    assert r.w_f > 2.9544820883452445


def test_annex_f_alpha_v_above_range_clamped_conservatively():
    # alpha_v = 40/100 = 0.4 > 0.25
    r = annex_f_time_equivalence(design_fire_load_MJ_m2=500.0, floor_area_m2=100.0, height_m=3.0,
                                 vertical_opening_area_m2=40.0, thermal_inertia=1000.0)
    assert r.alpha_v_raw == pytest.approx(0.4, rel=REL)
    assert r.alpha_v == pytest.approx(0.25, rel=REL)
    assert any("above" in w and "alpha_v" in w for w in r.warnings)
    # hand calculation per eq (F.2) with alpha_v = 0.25: b_v = 12.5 (1 + 2.5 - 0.0625) = 42.96875;
    #   w_f = 2^0.3 (0.62 + 90 * 0.15^4) = 1.2311444133 * 0.6655625 = 0.8194035536
    assert r.b_v == pytest.approx(42.96875, rel=REL)
    assert r.w_f == pytest.approx(0.8194035536068759, rel=REL)
    # hand calculation with the raw alpha_v = 0.4: w_f = 2^0.3 * 0.62 = 0.7633095363; the clamp raised w_f
    assert r.w_f > 0.7633095362738481
    # hand calculation per eq (F.1): 500 * 0.055 * 0.8194035536 = 22.5335977 min
    assert r.t_e_min == pytest.approx(22.533597724189087, rel=REL)


@pytest.mark.parametrize("a_v", [2.5, 25.0])  # alpha_v = 0.025 and 0.25 exactly (A_f = 100)
def test_annex_f_alpha_v_on_the_limits_no_warning(a_v):
    r = annex_f_time_equivalence(design_fire_load_MJ_m2=500.0, floor_area_m2=100.0, height_m=3.0,
                                 vertical_opening_area_m2=a_v)
    assert r.alpha_v == r.alpha_v_raw
    assert not any("alpha_v" in w for w in r.warnings)


def test_annex_f_small_compartment_applicability():
    # eq (F.3) is for A_f < 100 m2 without roof openings (EN 1991-1-2 Annex F, from memory)
    with_roof = annex_f_time_equivalence(**{**COMPARTMENT_A, "roof_opening_area_m2": 2.0})
    assert with_roof.small_compartment is None
    assert "roof" in with_roof.small_compartment_note

    no_at = annex_f_time_equivalence(**{**COMPARTMENT_A, "total_area_m2": None})
    assert no_at.small_compartment is None
    assert "total_area_m2" in no_at.small_compartment_note

    # 100 m2 is not below 100 m2; 99.9 m2 is (common practice, no source: "<" read literally)
    geometry = dict(design_fire_load_MJ_m2=600.0, height_m=3.0, vertical_opening_area_m2=10.0,
                    total_area_m2=400.0, opening_height_m=1.5)
    assert annex_f_time_equivalence(floor_area_m2=100.0, **geometry).small_compartment is None
    small = annex_f_time_equivalence(floor_area_m2=99.9, **geometry).small_compartment
    assert small is not None
    # hand calculation: O = 10 * sqrt(1.5) / 400 = 0.0306186218; O^-0.5 = 5.7148809;
    #   w_f = 5.7148809 * 99.9 / 400 = 1.4272915
    assert small.w_f == pytest.approx(1.4272915, rel=1e-6)


def test_annex_f_bare_steel_kc_is_13_7_O():
    # hand calculation per Table F.1: k_c = 13.7 * 0.04 = 0.548
    assert annex_f_correction_factor(protected=False, opening_factor_m05=0.04) == pytest.approx(0.548, rel=REL)
    # Table F.1: protected steel and reinforced concrete -> 1.0
    assert annex_f_correction_factor(protected=True) == 1.0
    assert annex_f_correction_factor(construction="reinforced_concrete", protected=False) == 1.0
    r = annex_f_time_equivalence(**{**COMPARTMENT_A, "opening_factor_m05": 0.05103103630798288},
                                 protected=False)
    # hand calculation: k_c = 13.7 * 0.0510310363 = 0.6991251974; t_e = 39.4724136 * 0.6991251974 = 27.5961589 min
    assert r.k_c == pytest.approx(0.6991251974193655, rel=REL)
    assert r.t_e_min == pytest.approx(27.5961589, rel=1e-8)


def test_annex_f_bare_steel_needs_the_opening_factor():
    with pytest.raises(InputError) as e:
        annex_f_time_equivalence(design_fire_load_MJ_m2=600.0, floor_area_m2=60.0, height_m=3.0,
                                 vertical_opening_area_m2=9.0, protected=False)
    assert e.value.field == "opening_factor_m05"


@pytest.mark.parametrize("construction", ["composite", "timber"])
def test_annex_f_refuses_composite_and_timber(construction):
    with pytest.raises(InputError) as e:
        annex_f_time_equivalence(**COMPARTMENT_A, construction=construction)
    assert e.value.field == "construction"
    assert "not cover" in str(e.value)


def test_opening_factor_inconsistent_with_geometry_warns():
    # hand calculation: geometry gives O = 0.0510; 0.08 differs by more than 1 %
    r = annex_f_time_equivalence(**{**COMPARTMENT_A, "opening_factor_m05": 0.08})
    assert r.opening_factor_m05 == 0.08
    assert any("differs" in w for w in r.warnings)


# ---------------------------------------------------------------------------------------------------
# Overridable code values
# ---------------------------------------------------------------------------------------------------
def test_code_values_defaults_echoed_and_documented():
    r = annex_f_time_equivalence(**COMPARTMENT_A)
    # EN 1991-1-2 recommended values (Table F.2, eq F.2, Table F.1, from memory)
    assert r.code_values["annex_f_kb_medium_inertia"] == 0.055
    assert r.code_values["annex_f_wf_min"] == 0.5
    assert r.code_values["annex_f_bv_min"] == 10.0
    assert r.code_values["annex_f_alpha_v_min"] == 0.025
    assert r.code_values["annex_f_alpha_v_max"] == 0.25
    assert r.code_values["annex_f_kc_bare_steel_per_o"] == 13.7
    assert all(k.startswith("annex_f_") for k in r.code_values)
    c = cib_w14_time_equivalence(**COMPARTMENT_A)
    assert set(c.code_values) == {k for k in DEFAULTS if k.startswith("cib_w14_")}
    # every value echoed is a registry entry naming its clause
    for k in [*r.code_values, *c.code_values]:
        assert DEFINITIONS[k].clause and DEFINITIONS[k].value == DEFAULTS[k]


def test_code_override_changes_result_and_is_echoed():
    # a hypothetical national annex: k_b = 0.06 for the middle band
    code = {"annex_f_kb_medium_inertia": 0.06, "t_lim_fast_min": 15.0}  # second key: another module's
    r = annex_f_time_equivalence(**COMPARTMENT_A, code=code)
    # hand calculation: 600 * 0.06 * 1.1961337441 = 43.0608148 min
    assert r.t_e_min == pytest.approx(43.06081478725513, rel=REL)
    assert r.code_values["annex_f_kb_medium_inertia"] == 0.06
    assert "t_lim_fast_min" not in r.code_values
    c = cib_w14_time_equivalence(**COMPARTMENT_A, code={"cib_w14_c_medium_inertia": 0.08})
    # hand calculation: 0.08 * 1.2296465774 * 600 = 59.0230357 min
    assert c.t_e_min == pytest.approx(59.02303571735049, rel=REL)


def test_code_override_unknown_name_in_namespace_raises():
    with pytest.raises(InputError) as e:
        annex_f_time_equivalence(**COMPARTMENT_A, code={"annex_f_kb_medum_inertia": 0.06})
    assert e.value.field == "code.annex_f_kb_medum_inertia"


@pytest.mark.parametrize("value", [-0.1, 0.0, float("nan"), "0.05", True])
def test_code_override_bad_value_raises(value):
    with pytest.raises(InputError) as e:
        cib_w14_time_equivalence(**COMPARTMENT_A, code={"cib_w14_c_general": value})
    assert e.value.field == "code.cib_w14_c_general"


def test_to_dict_is_json_ready():
    for r in (annex_f_time_equivalence(**COMPARTMENT_A), annex_f_time_equivalence(**COMPARTMENT_B, protected=False),
              cib_w14_time_equivalence(**COMPARTMENT_B, protected=False)):
        d = r.to_dict()
        assert json.loads(json.dumps(d, allow_nan=False)) == d
        assert isinstance(d["warnings"], list)
    d = annex_f_time_equivalence(**COMPARTMENT_B, protected=False).to_dict()
    assert d["small_compartment"] is None
    for key in ("t_e_min", "k_b", "w_f", "w_f_raw", "alpha_v", "alpha_v_raw", "alpha_h", "b_v", "b_v_raw", "k_c"):
        assert type(d[key]) is float


# ---------------------------------------------------------------------------------------------------
# Input validation
# ---------------------------------------------------------------------------------------------------
@pytest.mark.parametrize(
    "field, value",
    [
        ("design_fire_load_MJ_m2", 0.0),
        ("design_fire_load_MJ_m2", -100.0),
        ("floor_area_m2", 0.0),
        ("floor_area_m2", -60.0),
        ("height_m", 0.0),
        ("height_m", -3.0),
        ("vertical_opening_area_m2", 0.0),
        ("vertical_opening_area_m2", -9.0),
        ("roof_opening_area_m2", -1.0),
        ("thermal_inertia", 0.0),
        ("thermal_inertia", -1500.0),
        ("opening_factor_m05", -0.04),
        ("total_area_m2", -216.0),
        ("total_area_m2", 100.0),        # below 2 * 60 + 9 = 129: cannot hold floor, ceiling and openings
        ("opening_height_m", 0.0),
        ("opening_height_m", 3.5),       # taller than the 3.0 m compartment
        ("floor_area_m2", float("nan")),
        ("height_m", float("inf")),
        ("design_fire_load_MJ_m2", "600"),
        ("protected", "yes"),
    ],
)
def test_annex_f_bad_input_names_the_field(field, value):
    with pytest.raises(InputError) as e:
        annex_f_time_equivalence(**{**COMPARTMENT_A, field: value})
    assert e.value.field == field
    assert str(e.value).startswith(f"{field} = ")


@pytest.mark.parametrize(
    "field, value",
    [
        ("design_fire_load_MJ_m2", 0.0),
        ("floor_area_m2", -1.0),
        ("vertical_opening_area_m2", 0.0),
        ("total_area_m2", 0.0),
        ("opening_height_m", -1.5),
        ("thermal_inertia", -1.0),
        ("roof_opening_area_m2", -2.0),
        ("total_area_m2", 128.0),        # below 2 * 60 + 9 = 129
        ("opening_height_m", 3.5),       # taller than the 3.0 m compartment (height_m given)
        ("height_m", -3.0),
        ("protected", 1),
    ],
)
def test_cib_w14_bad_input_names_the_field(field, value):
    with pytest.raises(InputError) as e:
        cib_w14_time_equivalence(**{**COMPARTMENT_A, "height_m": 3.0, field: value})
    assert e.value.field == field


# ---------------------------------------------------------------------------------------------------
# Properties
# ---------------------------------------------------------------------------------------------------
_area = st.floats(min_value=5.0, max_value=5000.0, allow_nan=False)
_fire_load = st.floats(min_value=1.0, max_value=3000.0, allow_nan=False)
_inertia = st.one_of(st.none(), st.floats(min_value=50.0, max_value=5000.0))


@st.composite
def _compartments(draw):
    a_f = draw(_area)
    h = draw(st.floats(min_value=2.0, max_value=25.0))
    a_v = draw(st.floats(min_value=1e-3, max_value=1.0)) * a_f
    a_h = draw(st.sampled_from([0.0, 0.0, 0.05, 0.3])) * a_f
    h_eq = draw(st.floats(min_value=0.1, max_value=1.0)) * h
    a_t = 2.0 * a_f + a_v + draw(st.floats(min_value=0.0, max_value=4.0)) * a_f
    return dict(floor_area_m2=a_f, height_m=h, vertical_opening_area_m2=a_v, roof_opening_area_m2=a_h,
                total_area_m2=a_t, opening_height_m=h_eq, thermal_inertia=draw(_inertia))


@settings(max_examples=300, deadline=None)
@given(geometry=_compartments(), q1=_fire_load, q2=_fire_load, protected=st.booleans())
def test_more_fire_load_never_lowers_either_time(geometry, q1, q2, protected):
    # common practice, no source: t_e grows with the fire load in both methods
    lo, hi = sorted((q1, q2))
    f_lo = annex_f_time_equivalence(design_fire_load_MJ_m2=lo, protected=protected, **geometry)
    f_hi = annex_f_time_equivalence(design_fire_load_MJ_m2=hi, protected=protected, **geometry)
    assert f_hi.t_e_min >= f_lo.t_e_min
    c_geometry = {k: v for k, v in geometry.items() if k != "height_m"}
    c_lo = cib_w14_time_equivalence(design_fire_load_MJ_m2=lo, **c_geometry)
    c_hi = cib_w14_time_equivalence(design_fire_load_MJ_m2=hi, **c_geometry)
    assert c_hi.t_e_min >= c_lo.t_e_min


@settings(max_examples=300, deadline=None)
@given(
    a_f=_area,
    h=st.floats(min_value=1.5, max_value=30.0),
    r1=st.floats(min_value=1e-4, max_value=2.0),
    r2=st.floats(min_value=1e-4, max_value=2.0),
    roof=st.floats(min_value=0.0, max_value=1.0),
    q=_fire_load,
    b=_inertia,
)
def test_more_vertical_openings_never_raise_annex_f_time(a_f, h, r1, r2, roof, q, b):
    # common practice, no source: with k_c = 1 (protected steel) more ventilation never makes Annex F
    # more severe -- holds for eq (F.2) because alpha_v is clamped at 0.25 < 0.4
    lo, hi = sorted((r1, r2))
    common = dict(design_fire_load_MJ_m2=q, floor_area_m2=a_f, height_m=h, roof_opening_area_m2=roof * a_f,
                  thermal_inertia=b, protected=True)
    t_small = annex_f_time_equivalence(vertical_opening_area_m2=lo * a_f, **common)
    t_large = annex_f_time_equivalence(vertical_opening_area_m2=hi * a_f, **common)
    assert t_small.k_c == 1.0
    assert t_large.t_e_min <= t_small.t_e_min * (1.0 + 1e-12)


@settings(max_examples=200, deadline=None)
@given(geometry=_compartments())
def test_bounded_factors_respect_their_bounds(geometry):
    # EN 1991-1-2 eq (F.2): w_f >= 0.5, b_v >= 10, used alpha_v <= 0.25 and never above the raw value
    wf = annex_f_ventilation_factor(**{k: geometry[k] for k in ("floor_area_m2", "height_m",
                                                                 "vertical_opening_area_m2",
                                                                 "roof_opening_area_m2")})
    assert wf.w_f >= 0.5 and wf.w_f >= wf.w_f_raw
    assert wf.b_v >= 10.0 and wf.b_v >= wf.b_v_raw
    assert wf.alpha_v <= 0.25 and wf.alpha_v <= wf.alpha_v_raw
    assert math.isfinite(wf.w_f)
