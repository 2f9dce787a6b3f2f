"""Tests of steelfire.sections: geometry, section factors, shadow factor, catalogue."""

from __future__ import annotations

import dataclasses
import math

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from steelfire.models import sections as sec
from steelfire.errors import InputError
from steelfire.models.sections import (
    CircularHollowSection,
    ISection,
    RectangularHollowSection,
    box_section_factor_per_m,
    catalogue_names,
    catalogue_section,
    chs_section,
    heated_perimeter_m,
    rhs_corner_radii_mm,
    rhs_section,
    rolled_i_section,
    section_factor_per_m,
    shadow_factor,
    welded_i_section,
)

# ---------------------------------------------------------------------------------------------
# catalogue: every row consistent with its own dimensions
# ---------------------------------------------------------------------------------------------

NAMES = catalogue_names()


@pytest.mark.parametrize("name", NAMES)
def test_catalogue_area_from_dimensions_matches_tabulated_area(name):
    # EN 10365, from memory: the tabulated area is the nominal area with the root fillets,
    # A = 2 b tf + (h - 2 tf) tw + (4 - pi) r^2; it must agree within 1 %.
    s = catalogue_section(name)
    computed_cm2 = s.area_mm2 / 100.0
    assert computed_cm2 == pytest.approx(s.tabulated_area_cm2, rel=0.01)


@pytest.mark.parametrize("name", NAMES)
def test_catalogue_mass_is_area_times_steel_density(name):
    # hand calculation: mass per metre = A x 7850 kg/m3 (EN 10365 convention, from memory);
    # the tabulated mass is rounded to 3-4 significant figures, hence 1 %.
    s = catalogue_section(name)
    assert s.mass_kg_m == pytest.approx(s.tabulated_area_cm2 * 1e-4 * 7850.0, rel=0.01)


@pytest.mark.parametrize("name", NAMES)
def test_catalogue_perimeter_from_dimensions_matches_tabulated_perimeter(name):
    # EN 10365, from memory: surface area per metre = 4 b + 2 h - 2 tw + (2 pi - 8) r.
    s = catalogue_section(name)
    if s.tabulated_perimeter_m2_m is None:
        pytest.skip("no tabulated perimeter in the data file")
    assert s.perimeter_m == pytest.approx(s.tabulated_perimeter_m2_m, rel=0.01)


def test_catalogue_families_and_ranges():
    # EN 10365, from memory: IPE 80..600, HEA and HEB 100..1000 (sizes in the standard series)
    ipe = [80, 100, 120, 140, 160, 180, 200, 220, 240, 270, 300, 330, 360, 400, 450, 500, 550, 600]
    he = [100, 120, 140, 160, 180, 200, 220, 240, 260, 280, 300, 320, 340, 360, 400, 450, 500,
          550, 600, 650, 700, 800, 900, 1000]
    expected = ([f"IPE {n}" for n in ipe] + [f"HEA {n}" for n in he] + [f"HEB {n}" for n in he])
    assert list(NAMES) == expected
    assert len(set(NAMES)) == len(NAMES)


def test_catalogue_sections_are_frozen_rolled_i_sections():
    s = catalogue_section("HEB 300")
    assert isinstance(s, ISection)
    assert s.fabrication == "rolled"
    with pytest.raises(dataclasses.FrozenInstanceError):
        s.h_mm = 310.0


def test_data_file_header_states_source_and_caveat():
    # common practice, no source: the data file says where its numbers come from
    from importlib import resources
    text = (resources.files("steelfire") / "data" / sec.CATALOGUE_FILE).read_text(encoding="utf-8")
    header = []
    for line in text.splitlines():
        if not line.startswith("#"):
            break
        header.append(line)
    joined = " ".join(header)
    assert header, "the file opens with comment lines"
    assert "EN 10365" in joined
    assert "from memory" in joined
    assert "before design use" in joined


@pytest.mark.parametrize("spelling", ["IPE 300", "IPE300", "ipe 300", " Ipe-300 ", "ipe_300"])
def test_catalogue_name_normalisation(spelling):
    assert catalogue_section(spelling).name == "IPE 300"


@pytest.mark.parametrize("spelling, canonical", [
    ("HEB 300", "HEB 300"), ("heb300", "HEB 300"), ("HE 300 B", "HEB 300"), ("HE300B", "HEB 300"),
    ("he 240 a", "HEA 240"), ("HEA1000", "HEA 1000"),
])
def test_catalogue_he_name_forms(spelling, canonical):
    assert catalogue_section(spelling).name == canonical


# ---------------------------------------------------------------------------------------------
# spot checks against handbook values
# ---------------------------------------------------------------------------------------------

# (name, area cm2, perimeter m2/m), handbook values, from memory; tolerance = half a unit of the
# last printed digit.
HANDBOOK = [
    ("IPE 300", 53.8, 0.05, 1.16, 0.005),   # handbook value, from memory
    ("IPE 200", 28.5, 0.05, 0.768, 0.0005),  # handbook value, from memory
    ("HEA 300", 112.5, 0.05, 1.717, 0.0005),  # handbook value, from memory
    ("HEB 300", 149.1, 0.05, 1.732, 0.0005),  # handbook value, from memory
    ("HEB 200", 78.1, 0.05, 1.151, 0.0005),  # handbook value, from memory
]


@pytest.mark.parametrize("name, area_cm2, da, perimeter_m, dp", HANDBOOK, ids=[h[0] for h in HANDBOOK])
def test_handbook_spot_checks(name, area_cm2, da, perimeter_m, dp):
    s = catalogue_section(name)
    assert s.area_mm2 / 100.0 == pytest.approx(area_cm2, abs=da)
    assert heated_perimeter_m(s) == pytest.approx(perimeter_m, abs=dp)


def test_ipe300_section_factors():
    s = catalogue_section("IPE 300")
    # handbook value, from memory: IPE 300 bare, 4 sides, Am/V ~ 216 1/m
    assert section_factor_per_m(s) == pytest.approx(216.0, abs=1.0)
    # hand calculation: box 2 (300 + 150) = 900 mm; 0.900 m / 53.81e-4 m2 = 167.3 1/m
    assert box_section_factor_per_m(s) == pytest.approx(167.25, abs=0.05)
    # hand calculation: 3 sides, profile (1160.0 - 150) mm / 5381.2 mm2 = 187.7 1/m
    assert section_factor_per_m(s, "3-sided", "profile") == pytest.approx(187.69, abs=0.05)
    # hand calculation: 3 sides, box (2 x 300 + 150) mm / 5381.2 mm2 = 139.4 1/m
    assert section_factor_per_m(s, "3-sided", "box") == pytest.approx(139.37, abs=0.05)


def test_heb300_section_factor():
    # handbook value, from memory: HEB 300 bare, 4 sides, Am/V ~ 116 1/m
    assert section_factor_per_m(catalogue_section("HEB 300")) == pytest.approx(116.0, abs=1.0)


# ---------------------------------------------------------------------------------------------
# hand calculations
# ---------------------------------------------------------------------------------------------

def test_rolled_i_section_fillet_terms():
    # hand calculation: h = 300, b = 150, tw = 7.1, tf = 10.7, r = 15 (IPE 300 dimensions)
    # A = 2 x 150 x 10.7 + 278.6 x 7.1 + (4 - pi) x 225 = 3210 + 1978.06 + 193.14 = 5381.20 mm2
    # P = 600 + 600 - 14.2 + (2 pi - 8) x 15 = 1185.8 - 25.75 = 1160.05 mm
    s = rolled_i_section(300, 150, 7.1, 10.7, 15)
    assert s.area_mm2 == pytest.approx(5381.20, abs=0.01)
    assert s.perimeter_mm == pytest.approx(1160.05, abs=0.01)
    assert s.area_m2 == pytest.approx(5381.20e-6, abs=1e-8)
    assert s.perimeter_m == pytest.approx(1.16005, abs=1e-5)


def test_fillet_perimeter_and_area_terms_by_quarter_circle_geometry():
    # hand calculation: one fillet = square r x r minus a quarter disc; its free edge is the quarter
    # arc pi r / 2 replacing two legs of length r.
    r = 10.0
    with_fillets = rolled_i_section(200, 100, 8, 10, r)
    without = rolled_i_section(200, 100, 8, 10, 0)
    assert with_fillets.area_mm2 - without.area_mm2 == pytest.approx(4 * (r * r - math.pi * r * r / 4))
    assert with_fillets.perimeter_mm - without.perimeter_mm == pytest.approx(4 * (math.pi * r / 2 - 2 * r))


# invented welded I: h = 400, b = 200, tw = 10, tf = 20 (throat 5 mm, ignored)
# hand calculation: A = 2 x 200 x 20 + 360 x 10 = 11600 mm2; P = 800 + 800 - 20 = 1580 mm
WELDED_CASES = [
    ("4-sided", "profile", 1580 / 11.6),  # hand calculation: 1580 mm / 11600 mm2 = 136.207 1/m
    ("3-sided", "profile", 1380 / 11.6),  # hand calculation: (1580 - 200) / 11600 = 118.966 1/m
    ("4-sided", "box", 1200 / 11.6),      # hand calculation: 2 (400 + 200) / 11600 = 103.448 1/m
    ("3-sided", "box", 1000 / 11.6),      # hand calculation: (800 + 200) / 11600 = 86.207 1/m
]


@pytest.mark.parametrize("exposure, encasement, expected", WELDED_CASES)
def test_welded_i_section_factor(exposure, encasement, expected):
    s = welded_i_section(400, 200, 10, 20, weld_throat_mm=5.0)
    assert s.area_mm2 == pytest.approx(11600.0)
    assert s.perimeter_mm == pytest.approx(1580.0)
    assert section_factor_per_m(s, exposure, encasement) == pytest.approx(expected, rel=1e-12)


def test_welded_weld_throat_is_ignored():
    # hand calculation: the weld metal is not in the geometry
    a = welded_i_section(400, 200, 10, 20, weld_throat_mm=0.0)
    b = welded_i_section(400, 200, 10, 20, weld_throat_mm=7.0)
    assert a.area_mm2 == b.area_mm2 and a.perimeter_mm == b.perimeter_mm
    assert b.r_mm == 0.0 and b.fabrication == "welded"


# RHS 200 x 100 x 10, hot finished: r_o = 1.5 t = 15, r_i = t = 10
# hand calculation: A = (20000 - (4 - pi) 225) - (180 x 80 - (4 - pi) 100)
#                     = 19806.86 - 14314.16 = 5492.70 mm2
#                   P = 600 + (2 pi - 8) 15 = 574.25 mm
RHS_CASES = [
    ("4-sided", "profile", 104.547),  # hand calculation: 574.248 / 5492.699 = 104.547 1/m
    ("3-sided", "profile", 91.803),   # hand calculation: (574.248 - (100 - 30)) / 5492.699 = 91.803
    ("4-sided", "box", 109.236),      # hand calculation: 600 / 5492.699 = 109.236 1/m
    ("3-sided", "box", 91.030),       # hand calculation: (400 + 100) / 5492.699 = 91.030 1/m
]


@pytest.mark.parametrize("exposure, encasement, expected", RHS_CASES)
def test_rhs_section_factor(exposure, encasement, expected):
    s = rhs_section(200, 100, 10)
    assert (s.outer_radius_mm, s.inner_radius_mm) == (15.0, 10.0)
    assert s.area_mm2 == pytest.approx(5492.70, abs=0.01)
    assert s.perimeter_mm == pytest.approx(574.25, abs=0.01)
    assert section_factor_per_m(s, exposure, encasement) == pytest.approx(expected, abs=5e-4)


def test_rhs_area_handbook():
    # handbook value, from memory: hot-finished RHS 200 x 100 x 10, A ~ 54.9 cm2, 43.1 kg/m
    s = rhs_section(200, 100, 10)
    assert s.area_mm2 / 100.0 == pytest.approx(54.9, abs=0.05)
    assert s.area_m2 * 7850.0 == pytest.approx(43.1, abs=0.05)


def test_rhs_sharp_corners():
    # hand calculation: 200 x 100 x 10, square corners: A = 20000 - 14400 = 5600 mm2, P = 600 mm;
    # 4 sides 600 mm / 5600 mm2 = 107.143 1/m; 3 sides (600 - 100) / 5600 = 89.286 1/m (profile = box)
    s = RectangularHollowSection(200, 100, 10, 0.0, 0.0)
    assert s.area_mm2 == pytest.approx(5600.0)
    for enc in ("profile", "box"):
        assert section_factor_per_m(s, "4-sided", enc) == pytest.approx(600 / 5.6, rel=1e-12)
        assert section_factor_per_m(s, "3-sided", enc) == pytest.approx(500 / 5.6, rel=1e-12)


@pytest.mark.parametrize("forming, t, radii", [
    ("hot-finished", 8.0, (12.0, 8.0)),  # EN 10210-2 rule, from memory: r_o = 1.5 t, r_i = t
    ("cold-formed", 5.0, (10.0, 5.0)),   # EN 10219-2 rule, from memory: t <= 6: 2.0 t, 1.0 t
    ("cold-formed", 6.0, (12.0, 6.0)),   # EN 10219-2 rule, from memory: boundary t = 6 in first band
    ("cold-formed", 8.0, (20.0, 12.0)),  # EN 10219-2 rule, from memory: 6 < t <= 10: 2.5 t, 1.5 t
    ("cold-formed", 12.0, (36.0, 24.0)), # EN 10219-2 rule, from memory: t > 10: 3.0 t, 2.0 t
])
def test_rhs_corner_radius_rules(forming, t, radii):
    assert rhs_corner_radii_mm(t, forming) == radii
    s = rhs_section(300, 200, t, forming=forming)
    assert (s.outer_radius_mm, s.inner_radius_mm) == radii


def test_rhs_radius_override():
    s = rhs_section(200, 100, 10, outer_radius_mm=20.0)
    assert (s.outer_radius_mm, s.inner_radius_mm) == (20.0, 10.0)


# CHS 219.1 x 8
# hand calculation: A = pi x 8 x 211.1 = 5305.52 mm2; P = pi x 219.1 = 688.32 mm
CHS_CASES = [
    ("4-sided", "profile", 129.737),  # hand calculation: 219.1 / (8 x 211.1) x 1000 = 129.737 1/m
    ("4-sided", "box", 165.186),      # hand calculation: 4 x 219.1 / 5305.52 = 165.186 1/m
    ("3-sided", "box", 123.890),      # hand calculation: 3 x 219.1 / 5305.52 = 123.890 1/m
]


@pytest.mark.parametrize("exposure, encasement, expected", CHS_CASES)
def test_chs_section_factor(exposure, encasement, expected):
    s = chs_section(219.1, 8.0)
    assert s.area_mm2 == pytest.approx(5305.52, abs=0.01)
    assert s.perimeter_mm == pytest.approx(688.32, abs=0.01)
    assert section_factor_per_m(s, exposure, encasement) == pytest.approx(expected, abs=5e-4)


def test_chs_area_handbook():
    # handbook value, from memory: CHS 219.1 x 8, A ~ 53.1 cm2, 41.6 kg/m
    s = chs_section(219.1, 8.0)
    assert s.area_mm2 / 100.0 == pytest.approx(53.1, abs=0.05)
    assert s.area_m2 * 7850.0 == pytest.approx(41.6, abs=0.05)


def test_thin_hollow_section_factor_close_to_one_over_t():
    # EN 1993-1-2 Table 4.2: hollow section exposed all round, Am/V ~ 1/t for t << b
    assert section_factor_per_m(chs_section(1000.0, 2.0)) == pytest.approx(1 / 0.002, rel=0.005)
    assert section_factor_per_m(rhs_section(1000.0, 1000.0, 2.0)) == pytest.approx(1 / 0.002, rel=0.005)


# ---------------------------------------------------------------------------------------------
# shadow factor
# ---------------------------------------------------------------------------------------------

def test_shadow_factor_welded_i():
    s = welded_i_section(400, 200, 10, 20)
    # hand calculation, eq (4.26a): 0.9 x 1200 / 1580 = 0.683544
    assert shadow_factor(s, "4-sided", nominal_fire=True) == pytest.approx(0.683544, abs=1e-6)
    # hand calculation, eq (4.26b): 1200 / 1580 = 0.759494
    assert shadow_factor(s, "4-sided", nominal_fire=False) == pytest.approx(0.759494, abs=1e-6)
    # hand calculation, 3 sides, eq (4.26b): 1000 / 1380 = 0.724638; (4.26a): 0.9 x that = 0.652174
    assert shadow_factor(s, "3-sided", nominal_fire=False) == pytest.approx(0.724638, abs=1e-6)
    assert shadow_factor(s, "3-sided", nominal_fire=True) == pytest.approx(0.652174, abs=1e-6)


def test_shadow_factor_ipe300():
    s = catalogue_section("IPE 300")
    # hand calculation, eq (4.26b): [Am/V]b / [Am/V] = 900 / 1160.048 = 0.775830
    assert shadow_factor(s, "4-sided", False) == pytest.approx(0.775830, abs=1e-6)
    # hand calculation, eq (4.26a): 0.9 x 0.775830 = 0.698247
    assert shadow_factor(s, "4-sided", True) == pytest.approx(0.698247, abs=1e-6)
    # EN 1993-1-2 eq (4.26b) written out with the section factors
    assert shadow_factor(s, "4-sided", False) == pytest.approx(
        box_section_factor_per_m(s) / section_factor_per_m(s), rel=1e-12)


@pytest.mark.parametrize("section", [rhs_section(200, 100, 10), chs_section(219.1, 8.0),
                                     RectangularHollowSection(150, 150, 6, 0.0, 0.0)])
@pytest.mark.parametrize("nominal", [True, False])
def test_shadow_factor_is_one_for_hollow_sections(section, nominal):
    # EN 1993-1-2 4.2.5.1(2): convex sections, k_sh = 1
    assert shadow_factor(section, "4-sided", nominal) == 1.0


def test_shadow_factor_rhs_three_sided_is_one():
    # EN 1993-1-2 4.2.5.1(2): convex section, k_sh = 1
    assert shadow_factor(rhs_section(200, 100, 10), "3-sided", True) == 1.0


@st.composite
def plausible_i_sections(draw):
    h = draw(st.floats(80.0, 1200.0))
    b = draw(st.floats(40.0, 500.0))
    tf = draw(st.floats(0.02, 0.2)) * h          # 2 tf <= 0.4 h
    tw = draw(st.floats(0.01, 0.3)) * b          # tw <= 0.3 b
    r_max = min((b - tw) / 2.0, (h - 2.0 * tf) / 2.0)
    r = draw(st.floats(0.0, 1.0)) * min(r_max, 3.0 * tw)
    return rolled_i_section(h, b, tw, tf, r)


@settings(max_examples=300, deadline=None)
@given(plausible_i_sections(), st.sampled_from(sec.EXPOSURES), st.booleans())
def test_shadow_factor_in_unit_interval(s, exposure, nominal):
    # EN 1993-1-2 4.2.5.1(2): the box perimeter never exceeds the contour, so 0 < k_sh <= 1
    k = shadow_factor(s, exposure, nominal)
    assert 0.0 < k <= 1.0
    assert box_section_factor_per_m(s, exposure) <= section_factor_per_m(s, exposure)


@settings(max_examples=200, deadline=None)
@given(plausible_i_sections(), st.sampled_from(sec.EXPOSURES))
def test_shadow_factor_nominal_is_nine_tenths_of_natural(s, exposure):
    # EN 1993-1-2 eq (4.26a) vs (4.26b)
    assert shadow_factor(s, exposure, True) == pytest.approx(0.9 * shadow_factor(s, exposure, False),
                                                             rel=1e-12)


@settings(max_examples=200, deadline=None)
@given(plausible_i_sections())
def test_three_sided_below_four_sided(s):
    # hand calculation: removing a heated face lowers the section factor
    for enc in sec.ENCASEMENTS:
        assert section_factor_per_m(s, "3-sided", enc) < section_factor_per_m(s, "4-sided", enc)


# ---------------------------------------------------------------------------------------------
# bad input
# ---------------------------------------------------------------------------------------------

def _one_line(exc: InputError) -> str:
    text = str(exc)
    assert "\n" not in text
    return text


def test_unknown_section_name_lists_close_matches():
    with pytest.raises(InputError) as info:
        catalogue_section("IPE 310")
    assert info.value.field == "section"
    text = _one_line(info.value)
    assert text.startswith("section = 'IPE 310': ")
    assert "IPE 300" in text or "IPE 330" in text


def test_unknown_section_far_from_anything():
    with pytest.raises(InputError) as info:
        catalogue_section("W14x90")
    assert info.value.field == "section"
    assert "IPE" in str(info.value)


def test_section_name_not_a_string():
    with pytest.raises(InputError) as info:
        catalogue_section(300)
    assert info.value.field == "section"


@pytest.mark.parametrize("bad", ["2-sided", "4 sided", "four", "", None, 4])
def test_unknown_exposure(bad):
    s = catalogue_section("IPE 300")
    for call in (lambda: section_factor_per_m(s, bad), lambda: heated_perimeter_m(s, bad),
                 lambda: shadow_factor(s, bad, True)):
        with pytest.raises(InputError) as info:
            call()
        assert info.value.field == "exposure"
        assert "'4-sided'" in _one_line(info.value) and "'3-sided'" in str(info.value)


@pytest.mark.parametrize("bad", ["contour", "Box", "", None])
def test_unknown_encasement(bad):
    with pytest.raises(InputError) as info:
        section_factor_per_m(catalogue_section("IPE 300"), "4-sided", bad)
    assert info.value.field == "encasement"
    assert "'profile'" in _one_line(info.value) and "'box'" in str(info.value)


@pytest.mark.parametrize("field, kwargs", [
    ("h_mm", dict(h_mm=-300.0)),
    ("b_mm", dict(b_mm=0.0)),
    ("tw_mm", dict(tw_mm=-7.1)),
    ("tf_mm", dict(tf_mm=float("nan"))),
    ("r_mm", dict(r_mm=-1.0)),
    ("h_mm", dict(h_mm="300")),
    ("b_mm", dict(b_mm=True)),
    ("tf_mm", dict(tf_mm=160.0)),   # flanges overlap
    ("tw_mm", dict(tw_mm=150.0)),   # web as wide as the flanges
    ("r_mm", dict(r_mm=80.0)),      # fillets do not fit
])
def test_bad_i_dimensions_name_the_field(field, kwargs):
    dims = dict(h_mm=300.0, b_mm=150.0, tw_mm=7.1, tf_mm=10.7, r_mm=15.0)
    dims.update(kwargs)
    with pytest.raises(InputError) as info:
        ISection(**dims)
    assert info.value.field == field
    assert _one_line(info.value).startswith(f"{field} = ")


def test_welded_section_rejects_root_radius_and_negative_throat():
    with pytest.raises(InputError) as info:
        ISection(400, 200, 10, 20, 5.0, fabrication="welded")
    assert info.value.field == "r_mm"
    with pytest.raises(InputError) as info:
        welded_i_section(400, 200, 10, 20, weld_throat_mm=-1.0)
    assert info.value.field == "weld_throat_mm"


@pytest.mark.parametrize("field, call", [
    ("t_mm", lambda: rhs_section(200, 100, -10)),
    ("h_mm", lambda: rhs_section(-200, 100, 10)),
    ("t_mm", lambda: rhs_section(200, 100, 50)),
    ("outer_radius_mm", lambda: rhs_section(200, 100, 10, outer_radius_mm=-1)),
    ("outer_radius_mm", lambda: rhs_section(200, 100, 10, outer_radius_mm=60)),
    ("inner_radius_mm", lambda: rhs_section(200, 100, 10, inner_radius_mm=45)),
    ("forming", lambda: rhs_section(200, 100, 10, forming="welded")),
    ("d_mm", lambda: chs_section(-219.1, 8)),
    ("t_mm", lambda: chs_section(219.1, 0)),
    ("t_mm", lambda: chs_section(219.1, 120)),
])
def test_bad_hollow_dimensions_name_the_field(field, call):
    with pytest.raises(InputError) as info:
        call()
    assert info.value.field == field
    _one_line(info.value)


def test_chs_three_sided_profile_is_refused():
    with pytest.raises(InputError) as info:
        section_factor_per_m(chs_section(219.1, 8.0), "3-sided", "profile")
    assert info.value.field == "exposure"


def test_shadow_factor_requires_a_bool_and_a_section():
    with pytest.raises(InputError) as info:
        shadow_factor(catalogue_section("IPE 300"), "4-sided", "yes")
    assert info.value.field == "nominal_fire"
    with pytest.raises(InputError) as info:
        shadow_factor("IPE 300", "4-sided", True)
    assert info.value.field == "section"


def test_bad_catalogue_row_names_row_and_column():
    text = ("# comment\n"
            "name,h_mm,b_mm,tw_mm,tf_mm,r_mm,area_cm2,mass_kg_m,perimeter_m2_m\n"
            "XX 1,100,50,-4,5,5,7.0,5.5,\n")
    with pytest.raises(InputError) as info:
        sec._parse_catalogue(text, "test.csv")
    assert info.value.field == "test.csv row 1 ('XX 1').tw_mm"
    text_dup = ("name,h_mm,b_mm,tw_mm,tf_mm,r_mm,area_cm2,mass_kg_m,perimeter_m2_m\n"
                "IPE 80,80,46,3.8,5.2,5,7.64,6.0,\n"
                "ipe80,80,46,3.8,5.2,5,7.64,6.0,\n")
    with pytest.raises(InputError) as info:
        sec._parse_catalogue(text_dup, "test.csv")
    assert info.value.field.endswith(".name")


def test_numpy_scalars_are_accepted():
    import numpy as np
    s = rolled_i_section(np.float64(300), np.int64(150), 7.1, 10.7, 15)
    assert isinstance(s.b_mm, float) and s.b_mm == 150.0
    assert isinstance(CircularHollowSection(np.float32(219.1), 8).d_mm, float)
