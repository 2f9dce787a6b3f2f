"""Values taken from clauses of the Eurocodes, each overridable by a case's ``[code]`` table.

Annexes A, E and F of EN 1991-1-2 are informative, and many values in EN 1991-1-2 and EN 1993-1-2
are nationally determined parameters. Every such value steelfire uses is one named entry below with
the EN recommended value; a case may override any of them by name in ``[code]``, and every output
lists the values used (``code_values``).
"""

from __future__ import annotations

from dataclasses import dataclass
from types import MappingProxyType


@dataclass(frozen=True)
class CodeValue:
    value: float
    unit: str
    clause: str
    minimum: float = 0.0  # smallest admissible override (inclusive)
    maximum: float = float("inf")


_DEFS = {
    # EN 1991-1-2 Annex A: parametric fire
    "t_lim_slow_min": CodeValue(25.0, "min", "EN 1991-1-2 A.(10), slow fire growth rate", 1.0, 120.0),
    "t_lim_medium_min": CodeValue(20.0, "min", "EN 1991-1-2 A.(10), medium fire growth rate", 1.0, 120.0),
    "t_lim_fast_min": CodeValue(15.0, "min", "EN 1991-1-2 A.(10), fast fire growth rate", 1.0, 120.0),
    "annex_a_opening_factor_min": CodeValue(0.02, "m^0.5", "EN 1991-1-2 A.(2), lower limit of O", 0.0, 1.0),
    "annex_a_opening_factor_max": CodeValue(0.20, "m^0.5", "EN 1991-1-2 A.(2), upper limit of O", 0.0, 1.0),
    "annex_a_thermal_inertia_min": CodeValue(100.0, "J/(m2 s^0.5 K)", "EN 1991-1-2 A.(3), lower limit of b", 0.0, 1e5),
    "annex_a_thermal_inertia_max": CodeValue(2200.0, "J/(m2 s^0.5 K)", "EN 1991-1-2 A.(3), upper limit of b", 0.0, 1e5),
    "annex_a_fire_load_min_MJ_m2": CodeValue(50.0, "MJ/m2", "EN 1991-1-2 A.(7), lower limit of q_t,d", 0.0, 1e5),
    "annex_a_fire_load_max_MJ_m2": CodeValue(1000.0, "MJ/m2", "EN 1991-1-2 A.(7), upper limit of q_t,d", 0.0, 1e5),
    "annex_a_floor_area_max_m2": CodeValue(500.0, "m2", "EN 1991-1-2 A.(2), largest floor area", 0.0, 1e6),
    "annex_a_height_max_m": CodeValue(4.0, "m", "EN 1991-1-2 A.(2), largest compartment height", 0.0, 100.0),
    # EN 1991-1-2 Annex E: design fire load density, Table E.1 (delta_q1 by floor area)
    "delta_q1_25m2": CodeValue(1.10, "-", "EN 1991-1-2 Table E.1, A_f = 25 m2", 0.0, 10.0),
    "delta_q1_250m2": CodeValue(1.50, "-", "EN 1991-1-2 Table E.1, A_f = 250 m2", 0.0, 10.0),
    "delta_q1_2500m2": CodeValue(1.90, "-", "EN 1991-1-2 Table E.1, A_f = 2500 m2", 0.0, 10.0),
    "delta_q1_5000m2": CodeValue(2.00, "-", "EN 1991-1-2 Table E.1, A_f = 5000 m2", 0.0, 10.0),
    "delta_q1_10000m2": CodeValue(2.13, "-", "EN 1991-1-2 Table E.1, A_f = 10000 m2", 0.0, 10.0),
    # EN 1991-1-2 3.1, 3.2, 3.3: thermal actions
    "alpha_c_standard": CodeValue(25.0, "W/(m2 K)", "EN 1991-1-2 3.2.1(3), standard curve", 1.0, 500.0),
    "alpha_c_external": CodeValue(25.0, "W/(m2 K)", "EN 1991-1-2 3.2.2(2), external fire curve", 1.0, 500.0),
    "alpha_c_hydrocarbon": CodeValue(50.0, "W/(m2 K)", "EN 1991-1-2 3.2.3(2), hydrocarbon curve", 1.0, 500.0),
    "alpha_c_natural": CodeValue(35.0, "W/(m2 K)", "EN 1991-1-2 3.3.1.1(3) and Annex A, natural fire models", 1.0, 500.0),
    "emissivity_fire": CodeValue(1.0, "-", "EN 1991-1-2 3.1(6), emissivity of the fire", 0.01, 1.0),
    "emissivity_steel": CodeValue(0.7, "-", "EN 1993-1-2 2.2(2), surface emissivity of carbon steel", 0.01, 1.0),
    "configuration_factor": CodeValue(1.0, "-", "EN 1991-1-2 3.1(7), configuration factor", 0.01, 1.0),
    # EN 1993-1-2
    "steel_density_kg_m3": CodeValue(7850.0, "kg/m3", "EN 1993-1-2 3.2.2(1), unit mass of steel", 1000.0, 20000.0),
    "shadow_factor_i_nominal": CodeValue(0.9, "-", "EN 1993-1-2 4.2.5.1(2), eq (4.26a)", 0.0, 1.0),
    "section_factor_min_bare_per_m": CodeValue(10.0, "1/m", "EN 1993-1-2 4.2.5.1(1), Am/V not below 10 m-1", 0.0, 1000.0),
    "max_time_step_bare_s": CodeValue(5.0, "s", "EN 1993-1-2 4.2.5.1(4), time step not more than 5 s", 0.01, 60.0),
    "max_time_step_protected_s": CodeValue(30.0, "s", "EN 1993-1-2 4.2.5.2(3), time step not more than 30 s", 0.01, 300.0),
}


#: The definitions, read-only: name -> CodeValue(value, unit, clause, minimum, maximum).
DEFINITIONS = MappingProxyType(_DEFS)

def resolve(overrides=None, field_prefix: str = "code") -> dict:
    """Code values in force: the EN recommended values updated by ``overrides``.

    Unknown names and values outside the entry's admissible range raise InputError.
    """
    from steelfire.errors import InputError

    values = dict(DEFAULTS)
    for name, value in (overrides or {}).items():
        if name not in _DEFS:
            import difflib

            close = difflib.get_close_matches(name, list(_DEFS), n=3)
            hint = f"; did you mean {', '.join(close)}?" if close else ""
            raise InputError(f"{field_prefix}.{name}", value, "not a known code value name" + hint)
        d = _DEFS[name]
        if isinstance(value, bool) or not isinstance(value, (int, float)):
            raise InputError(f"{field_prefix}.{name}", value, f"must be a number [{d.unit}]")
        if not (d.minimum <= float(value) <= d.maximum):
            raise InputError(f"{field_prefix}.{name}", value,
                             f"must be between {d.minimum:g} and {d.maximum:g} [{d.unit}]")
        values[name] = float(value)
    return values


def _register_equivalence():
    # The time-equivalence module keeps its own table of clause values (Annex F, CIB W14);
    # they are registered here so that [code] can override them like any other.
    from steelfire.models.equivalence import CODE_VALUE_SOURCES, DEFAULT_CODE_VALUES

    for name, value in DEFAULT_CODE_VALUES.items():
        unit, clause = CODE_VALUE_SOURCES[name]
        _DEFS[name] = CodeValue(float(value), unit, clause, 0.0, 1e6)


_register_equivalence()
#: The EN recommended values, name -> value.
DEFAULTS = MappingProxyType({k: v.value for k, v in _DEFS.items()})
