"""The one registry of values taken from clauses of the Eurocodes; a case's ``[code]`` table overrides them.

Annexes A, C, E and F of EN 1991-1-2 are informative and many values of EN 1991-1-2 and EN 1993-1-2
are nationally determined parameters. Every such value steelfire uses is one entry here: its name
(the ``[code]`` key), the EN recommended value, the unit, the clause, and the range an override must
stay in (a sane range: wide enough for any national annex, narrow enough to refuse a typo or a value
that would make a formula overflow). The formulas read the values from the mapping :func:`resolve`
returns (``code[name]``); every output lists the values used.
"""

from __future__ import annotations

import difflib
import math
from dataclasses import dataclass
from types import MappingProxyType

from steelfire.errors import InputError


@dataclass(frozen=True)
class CodeValue:
    """One clause value: EN recommended ``value`` [``unit``] from ``clause``; overrides within
    ``minimum`` <= v <= ``maximum``."""

    value: float
    unit: str
    clause: str
    minimum: float
    maximum: float


def _v(value, unit, clause, minimum, maximum):
    return CodeValue(float(value), unit, clause, float(minimum), float(maximum))


_DEFS = {
    # EN 1991-1-2 Annex A: parametric fire
    "t_lim_slow_min": _v(25, "min", "EN 1991-1-2 A.(10), slow fire growth rate", 1, 120),
    "t_lim_medium_min": _v(20, "min", "EN 1991-1-2 A.(10), medium fire growth rate", 1, 120),
    "t_lim_fast_min": _v(15, "min", "EN 1991-1-2 A.(10), fast fire growth rate", 1, 120),
    "annex_a_opening_factor_min": _v(0.02, "m^0.5", "EN 1991-1-2 A.(2), lower limit of O", 0, 1),
    "annex_a_opening_factor_max": _v(0.20, "m^0.5", "EN 1991-1-2 A.(2), upper limit of O", 0, 1),
    "annex_a_thermal_inertia_min": _v(100, "J/(m2 s^0.5 K)", "EN 1991-1-2 A.(3), lower limit of b", 0, 1e5),
    "annex_a_thermal_inertia_max": _v(2200, "J/(m2 s^0.5 K)", "EN 1991-1-2 A.(3), upper limit of b", 0, 1e5),
    "annex_a_fire_load_min_MJ_m2": _v(50, "MJ/m2", "EN 1991-1-2 A.(7), lower limit of q_t,d", 0, 1e5),
    "annex_a_fire_load_max_MJ_m2": _v(1000, "MJ/m2", "EN 1991-1-2 A.(7), upper limit of q_t,d", 0, 1e5),
    "annex_a_floor_area_max_m2": _v(500, "m2", "EN 1991-1-2 A.(2), largest floor area", 0, 1e6),
    "annex_a_height_max_m": _v(4, "m", "EN 1991-1-2 A.(2), largest compartment height", 0, 100),
    # EN 1991-1-2 Annex E: design fire load density, Table E.1 (delta_q1 by floor area)
    "delta_q1_25m2": _v(1.10, "-", "EN 1991-1-2 Table E.1, A_f = 25 m2", 0.1, 10),
    "delta_q1_250m2": _v(1.50, "-", "EN 1991-1-2 Table E.1, A_f = 250 m2", 0.1, 10),
    "delta_q1_2500m2": _v(1.90, "-", "EN 1991-1-2 Table E.1, A_f = 2500 m2", 0.1, 10),
    "delta_q1_5000m2": _v(2.00, "-", "EN 1991-1-2 Table E.1, A_f = 5000 m2", 0.1, 10),
    "delta_q1_10000m2": _v(2.13, "-", "EN 1991-1-2 Table E.1, A_f = 10000 m2", 0.1, 10),
    # EN 1991-1-2 Table E.2: factors delta_n,i of the fire-fighting measures (from memory)
    "delta_n1_sprinklers": _v(0.61, "-", "EN 1991-1-2 Table E.2, delta_n1 automatic water extinguishing system", 0.1, 1.5),
    "delta_n2_one_water_supply": _v(0.87, "-", "EN 1991-1-2 Table E.2, delta_n2 one independent water supply", 0.1, 1.5),
    "delta_n2_two_water_supplies": _v(0.7, "-", "EN 1991-1-2 Table E.2, delta_n2 two independent water supplies",
                                      0.1, 1.5),
    "delta_n3_heat_detection": _v(0.87, "-", "EN 1991-1-2 Table E.2, delta_n3 automatic fire detection by heat",
                                  0.1, 1.5),
    "delta_n4_smoke_detection": _v(0.73, "-", "EN 1991-1-2 Table E.2, delta_n4 automatic fire detection by smoke",
                                   0.1, 1.5),
    "delta_n5_alarm_transmission": _v(0.87, "-", "EN 1991-1-2 Table E.2, delta_n5 automatic alarm transmission "
                                      "to the fire brigade", 0.1, 1.5),
    "delta_n6_work_fire_brigade": _v(0.61, "-", "EN 1991-1-2 Table E.2, delta_n6 work fire brigade", 0.1, 1.5),
    "delta_n7_offsite_fire_brigade": _v(0.78, "-", "EN 1991-1-2 Table E.2, delta_n7 off-site fire brigade", 0.1, 1.5),
    "delta_n8_no_safe_access": _v(1.5, "-", "EN 1991-1-2 Table E.2, delta_n8 without safe access routes", 1.0, 3.0),
    "delta_n9_no_fire_fighting_devices": _v(1.5, "-", "EN 1991-1-2 Table E.2, delta_n9 without fire fighting devices",
                                            1.0, 3.0),
    "delta_n10_no_smoke_exhaust": _v(1.5, "-", "EN 1991-1-2 Table E.2, delta_n10 without a smoke exhaust system "
                                     "in staircases", 1.0, 3.0),
    # EN 1991-1-2 3.1, 3.2, 3.3: thermal actions
    "alpha_c_standard": _v(25, "W/(m2 K)", "EN 1991-1-2 3.2.1(3), standard curve", 1, 500),
    "alpha_c_external": _v(25, "W/(m2 K)", "EN 1991-1-2 3.2.2(2), external fire curve", 1, 500),
    "alpha_c_hydrocarbon": _v(50, "W/(m2 K)", "EN 1991-1-2 3.2.3(2), hydrocarbon curve", 1, 500),
    "alpha_c_natural": _v(35, "W/(m2 K)", "EN 1991-1-2 3.3.1.1(3) and Annex A, natural fire models", 1, 500),
    "emissivity_fire": _v(1.0, "-", "EN 1991-1-2 3.1(6), emissivity of the fire", 0.01, 1),
    "emissivity_steel": _v(0.7, "-", "EN 1993-1-2 2.2(2), surface emissivity of carbon steel", 0.01, 1),
    "configuration_factor": _v(1.0, "-", "EN 1991-1-2 3.1(7), configuration factor", 0.01, 1),
    # EN 1993-1-2
    "steel_density_kg_m3": _v(7850, "kg/m3", "EN 1993-1-2 3.2.2(1), unit mass of steel", 1000, 20000),
    "shadow_factor_i_nominal": _v(0.9, "-", "EN 1993-1-2 4.2.5.1(2), eq (4.26a): k_sh = 0.9 [Am/V]b/[Am/V]",
                                  0.01, 1),
    "section_factor_min_bare_per_m": _v(10, "1/m", "EN 1993-1-2 4.2.5.1(1), Am/V not below 10 m-1", 0, 1000),
    "max_time_step_bare_s": _v(5, "s", "EN 1993-1-2 4.2.5.1(4), time step not more than 5 s", 0.01, 60),
    "max_time_step_protected_s": _v(30, "s", "EN 1993-1-2 4.2.5.2(3), time step not more than 30 s", 0.01, 300),
    # EN 1993-1-2 4.2.2, 4.2.3: resistance in fire (steelfire.models.resistance, classification, grades)
    "gamma_M_fi": _v(1.0, "-", "EN 1993-1-2 2.3(1), partial factor for the fire situation (recommended)", 1, 2),
    "class4_critical_temperature_C": _v(350, "C", "EN 1993-1-2 4.2.3.6(2), critical temperature of class 4 "
                                        "sections (recommended)", 100, 700),
    "fire_imperfection_coefficient": _v(0.65, "-", "EN 1993-1-2 4.2.3.2(2) eq (4.7), alpha = 0.65 sqrt(235 / f_y)",
                                        0.1, 2),
    "fire_epsilon_coefficient": _v(0.85, "-", "EN 1993-1-2 4.2.2(1) eq (4.2), epsilon = 0.85 sqrt(235 / f_y)",
                                   0.5, 1),
    "steel_elastic_modulus_MPa": _v(210000, "MPa", "EN 1993-1-1 3.2.6(1), E", 150000, 250000),
    "steel_shear_modulus_MPa": _v(81000, "MPa", "EN 1993-1-1 3.2.6(1), G", 50000, 100000),
    "equivalent_moment_factor_uniform": _v(1.1, "-", "EN 1993-1-2 Figure 4.2, beta_M,psi = 1.8 - 0.7 psi at "
                                           "psi = 1 (uniform moment)", 1.1, 2.5),
    "combined_slenderness_y_max": _v(1.1, "-", "EN 1993-1-2 4.2.3.5(1), mu_y for lambda_y,20C <= 1.1", 0, 10),
    # EN 1991-1-2 Annex F (informative): time equivalence
    "annex_f_kb_high_inertia": _v(0.04, "min m2/MJ", "EN 1991-1-2 Table F.2, b > 2500", 0.001, 1),
    "annex_f_kb_medium_inertia": _v(0.055, "min m2/MJ", "EN 1991-1-2 Table F.2, 720 <= b <= 2500", 0.001, 1),
    "annex_f_kb_low_inertia": _v(0.07, "min m2/MJ", "EN 1991-1-2 Table F.2, b < 720", 0.001, 1),
    "annex_f_kb_general": _v(0.07, "min m2/MJ", "EN 1991-1-2 F.(3), k_b where b is not assessed", 0.001, 1),
    "annex_f_inertia_lower_limit": _v(720, "J/(m2 s^0.5 K)", "EN 1991-1-2 Table F.2, band limit 720", 1, 1e5),
    "annex_f_inertia_upper_limit": _v(2500, "J/(m2 s^0.5 K)", "EN 1991-1-2 Table F.2, band limit 2500", 1, 1e5),
    "annex_f_wf_reference_height_m": _v(6.0, "m", "EN 1991-1-2 eq (F.2), (6.0/H)^0.3", 0.1, 100),
    "annex_f_wf_height_exponent": _v(0.3, "-", "EN 1991-1-2 eq (F.2), (6.0/H)^0.3", 0.01, 2),
    "annex_f_wf_base": _v(0.62, "-", "EN 1991-1-2 eq (F.2), 0.62", 0.01, 10),
    "annex_f_wf_coefficient": _v(90, "-", "EN 1991-1-2 eq (F.2), 90 (0.4 - alpha_v)^4", 0.1, 1000),
    "annex_f_wf_alpha_v_reference": _v(0.4, "-", "EN 1991-1-2 eq (F.2), (0.4 - alpha_v)^4", 0.26, 1),
    "annex_f_wf_min": _v(0.5, "-", "EN 1991-1-2 eq (F.2), w_f >= 0.5", 0.01, 10),
    "annex_f_bv_coefficient": _v(12.5, "-", "EN 1991-1-2 eq (F.2), b_v = 12.5 (1 + 10 alpha_v - alpha_v^2)", 0.1, 100),
    "annex_f_bv_linear": _v(10, "-", "EN 1991-1-2 eq (F.2), b_v = 12.5 (1 + 10 alpha_v - alpha_v^2)", 0.1, 100),
    "annex_f_bv_min": _v(10, "-", "EN 1991-1-2 eq (F.2), b_v >= 10.0", 0.1, 100),
    "annex_f_alpha_v_min": _v(0.025, "-", "EN 1991-1-2 eq (F.2), validity 0.025 <= alpha_v", 0.001, 1),
    "annex_f_alpha_v_max": _v(0.25, "-", "EN 1991-1-2 eq (F.2), validity alpha_v <= 0.25", 0.001, 1),
    "annex_f_small_compartment_max_floor_area_m2": _v(100, "m2", "EN 1991-1-2 eq (F.3), A_f < 100 m2", 1, 1e4),
    "annex_f_kc_protected_steel": _v(1.0, "-", "EN 1991-1-2 Table F.1, protected steel", 0.1, 10),
    "annex_f_kc_reinforced_concrete": _v(1.0, "-", "EN 1991-1-2 Table F.1, reinforced concrete", 0.1, 10),
    "annex_f_kc_bare_steel_per_o": _v(13.7, "m^-0.5", "EN 1991-1-2 Table F.1, unprotected steel k_c = 13.7 O",
                                      0.1, 100),
    # CIB W14 time equivalence (not a Eurocode): values from memory of textbook reproductions
    "cib_w14_c_high_inertia": _v(0.05, "min m^2.25/MJ", "CIB W14 design guide (1986), b > 2500 (from memory)",
                                  0.001, 1),
    "cib_w14_c_medium_inertia": _v(0.07, "min m^2.25/MJ",
                                    "CIB W14 design guide (1986), 720 <= b <= 2500 (from memory)", 0.001, 1),
    "cib_w14_c_low_inertia": _v(0.09, "min m^2.25/MJ", "CIB W14 design guide (1986), b < 720 (from memory)",
                                 0.001, 1),
    "cib_w14_c_general": _v(0.1, "min m^2.25/MJ", "CIB W14 design guide (1986), b unknown (from memory)", 0.001, 1),
    "cib_w14_inertia_lower_limit": _v(720, "J/(m2 s^0.5 K)", "CIB W14 band limit 720 (assumed as Table F.2)", 1, 1e5),
    "cib_w14_inertia_upper_limit": _v(2500, "J/(m2 s^0.5 K)", "CIB W14 band limit 2500 (assumed as Table F.2)",
                                      1, 1e5),
}

#: Pairs of values that must stay ordered (lower < upper) after overrides.
ORDERED_PAIRS = (
    ("annex_a_opening_factor_min", "annex_a_opening_factor_max"),
    ("annex_a_thermal_inertia_min", "annex_a_thermal_inertia_max"),
    ("annex_a_fire_load_min_MJ_m2", "annex_a_fire_load_max_MJ_m2"),
    ("annex_f_inertia_lower_limit", "annex_f_inertia_upper_limit"),
    ("annex_f_alpha_v_min", "annex_f_alpha_v_max"),
    ("cib_w14_inertia_lower_limit", "cib_w14_inertia_upper_limit"),
)


#: The definitions, read-only: name -> CodeValue.
DEFINITIONS = MappingProxyType(_DEFS)
#: The EN recommended values, read-only: name -> value.
DEFAULTS = MappingProxyType({k: v.value for k, v in _DEFS.items()})


def resolve(overrides=None, field_prefix: str = "code") -> dict:
    """Code values in force: the EN recommended values updated by ``overrides`` (name -> number).

    Unknown names, values that are not numbers, values outside an entry's range and ordered pairs
    turned round raise InputError naming ``code.<name>``.
    """
    values = dict(DEFAULTS)
    for name, value in (overrides or {}).items():
        field = f"{field_prefix}.{name}"
        if not isinstance(name, str) or name not in _DEFS:
            close = difflib.get_close_matches(str(name), list(_DEFS), n=3)
            hint = f"; did you mean {', '.join(close)}?" if close else ""
            raise InputError(field, value, "not a known code value name" + hint)
        d = _DEFS[name]
        if isinstance(value, bool) or not isinstance(value, (int, float)) or not math.isfinite(value):
            raise InputError(field, value, f"must be a number [{d.unit}]")
        if not (d.minimum <= float(value) <= d.maximum):
            raise InputError(field, value, f"must be between {d.minimum:g} and {d.maximum:g} [{d.unit}]")
        values[name] = float(value)
    for low, high in ORDERED_PAIRS:
        if not values[low] < values[high]:
            raise InputError(f"{field_prefix}.{low}", values[low], f"must be below {field_prefix}.{high} = {values[high]:g}")
    return values
