"""The reference of every case-file key and every code value, generated from the key tables and the registry.

``python -m steelfire.reference > docs/reference.md`` writes docs/reference.md; a test holds the file to
this output, and a key without a description here fails it, so the reference cannot drift from the code.
"""

from __future__ import annotations

import sys

from steelfire import codevalues
from steelfire.inputs import case, materials, members
from steelfire.models import fire as fire_models
from steelfire.models.fire import fireload

#: What each key means; units are in the key names (SI; temperatures in C).
DESCRIPTIONS = {
    "": {
        "title": "free text, shown on every output",
        "record": "table: who made the calculation and for which project (title block of the report)",
        "code": "table: overrides of code values by name (see the code values below)",
        "fire": "table: the design fire",
        "analysis": "table: time step, standard-fire horizon, out-of-scope policy",
        "compartment": "table: the fire compartment (parametric fire, time equivalence)",
        "fire_load": "table: the fire load (parametric, localised and travelling fires, time equivalence)",
        "materials": "tables [materials.NAME]: protection materials of the case",
        "member": "array of tables [[member]]: the members",
        "members_file": "a member schedule (CSV, or .xlsx with the xlsx extra), relative to the case file; "
                        "columns are the member keys",
        "variability": "table: sampled fire severity for `steelfire sample`",
    },
    "record": {k: "free text" for k in case.RECORD_KEYS},
    "fire": {
        "curve": "the design-fire model: " + ", ".join(fire_models.MODELS),
        "duration_min": "how long the design fire is run, cooling included (nominal fires: each member is "
                        "judged at its own required_minutes)",
        "file": 'curve = "table": a CSV of time_min, temperature_C',
        "convection_coefficient": "alpha_c [W/(m2 K)]; default by curve (code values alpha_c_*)",
        "heat_release_file": 'curve = "localised": a CSV of time_min, heat_release_MW instead of EN 1991-1-2 E.4',
        "smoothing_s": 'curve = "table": width [s] of a centred moving average applied to the table before use '
                       "(for jagged measured curves; the filtered curve is what is reported)",
    },
    "analysis": {
        "time_step_s": "time step (bare steel <= 5 s, protected <= 30 s, EN 1993-1-2 4.2.5); default 5",
        "standard_horizon_min": "how long the standard fire is run for times to critical; default 240",
        "allow_out_of_scope": "true: compute outside a method's validity range, every output stamped",
        "protection_model": '"lumped" (default: EN 1993-1-2 eq (4.27), the conduction model beside it where the '
                            'fire cools or is tabulated) or "conduction" (the design-fire verdicts, histories and '
                            "sizing of protected members rest on the 1-D conduction model through the protection; "
                            "the standard-fire time to critical, the required period and the equal-temperature "
                            "equivalence stay on eq (4.27), the route product data of EN 13381 are assessed by)",
    },
    "compartment": {
        "floor_area_m2": "A_f", "height_m": "H, floor to ceiling",
        "boundary_area_m2": "A_t: walls, floor and ceiling, openings included",
        "thermal_inertia": "b [J/(m2 s^0.5 K)]; or [[compartment.surface]] tables, not both",
        "roof_opening_area_m2": "A_h, horizontal openings (Annex F; Annex A does not cover them)",
        "opening": "array of tables [[compartment.opening]]: vertical openings",
        "surface": "array of tables [[compartment.surface]]: layered linings, b weighted by area",
    },
    "compartment.opening": {"width_m": "width", "height_m": "height", "count": "how many such openings; default 1"},
    "compartment.surface": {"area_m2": "area of the surface", "layers": "array of layer tables, fire side first"},
    "compartment.surface.layers": {"thickness_m": "thickness", "density": "[kg/m3]",
                                   "conductivity": "[W/(m K)]", "specific_heat": "[J/(kg K)]"},
    "fire_load": {
        "characteristic_MJ_m2": "q_f,k per floor area (or design_MJ_m2)",
        "design_MJ_m2": "q_f,d per floor area, a design value (no factors then)",
        "combustion_factor": "m; default 0.8",
        "area_factor": 'delta_q1: "auto" = EN 1991-1-2 Table E.1 for the floor area, or a number',
        "occupancy_factor": "delta_q2 of Table E.1; required (or from an occupancy preset that Table E.1 names)",
        "measures_factor": "delta_n, product of Table E.2 factors; or the measures one by one in "
                           "[fire_load.measures]; one of the two is required",
        "measures": "table [fire_load.measures]: the fire-fighting measures of Table E.2",
        "growth": "slow | medium | fast (Table E.5); required (or from an occupancy preset)",
        "heat_release_density_kW_m2": "RHR_f of Table E.5 (localised and travelling fires)",
        "fire_area_m2": "A_fi, the area on fire (localised fire)",
        "occupancy": "a preset of EN 1991-1-2 Tables E.1/E.4/E.5: " + ", ".join(fireload.OCCUPANCIES),
    },
    "fire_load.measures": {
        "sprinklers": "automatic water extinguishing system (delta_n1)",
        "independent_water_supplies": "0, 1 or 2 (delta_n2)",
        "heat_detection": "automatic fire detection by heat (delta_n3)",
        "smoke_detection": "automatic fire detection by smoke (delta_n4)",
        "alarm_transmission": "automatic alarm transmission to the fire brigade (delta_n5)",
        "work_fire_brigade": "work fire brigade (delta_n6)",
        "offsite_fire_brigade": "off-site fire brigade (delta_n7)",
        "safe_access_routes": "required: true or false (false: delta_n8)",
        "fire_fighting_devices": "required: true or false (false: delta_n9)",
        "smoke_exhaust": "required: true or false (false: delta_n10)",
    },
    "member": {
        "name": "unique name",
        "kind": "beam | column | tension | brace | other; default beam",
        "laterally_restrained": "true: the compression flange is held (beams, beam-columns)",
        "section_factor_per_m": "Am/V (bare) or Ap/V (protected) [1/m]; or give section",
        "section": "a catalogue profile (IPE, HEA, HEB) or a table { shape = rolled-I | welded-I | RHS | CHS, "
                   "dimensions in mm }",
        "exposure": "4-sided | 3-sided (with section)",
        "encasement": "profile | box (with section; bare members: profile)",
        "shadow_factor": "bare members: the ratio [Am/V]b / [Am/V] (the 0.9 of eq (4.26a) is applied by "
                         "steelfire under nominal fires to I-sections)",
        "utilisation": "mu0 -> eq (4.22) critical temperature; members without instability only",
        "critical_temperature_C": "given by the user instead (marked as such)",
        "protection": "a material name ([materials.NAME] or a generic one); omit for bare steel",
        "thickness_mm": "protection thickness",
        "required_minutes": "standard-fire period the member must reach",
        "steel_grade": "S235 | S275 | S355 | S420 | S460 (members checked by resistance)",
        "axial_force_kN": "N_fi,Ed, compression positive",
        "moment_y_kNm": "M_y,fi,Ed, the largest moment about y-y",
        "buckling_length_m": "buckling length for both axes (or _y_m and _z_m)",
        "buckling_length_y_m": "buckling length about y-y", "buckling_length_z_m": "buckling length about z-z",
        "lateral_restraint_length_m": "length between lateral restraints (lateral-torsional buckling)",
        "moment_factor_C1": "C1 of M_cr; default 1.0 (uniform moment, the conservative case)",
        "adaptation_factor_k1": "kappa_1 of EN 1993-1-2 4.2.3.3(7) (1.0, 0.85 or 0.7); from 0.7 to 1, default 1.0",
        "adaptation_factor_k2": "kappa_2 of EN 1993-1-2 4.2.3.3(8) (1.0 or 0.85); from 0.85 to 1, default 1.0",
        "equivalent_moment_factor_y": "beta_M,y of EN 1993-1-2 Figure 4.2; default 1.1 (uniform moment)",
        "equivalent_moment_factor_LT": "beta_M,LT; default 1.1",
        "position": "localised fire: { distance_m, height_m } from the fire axis and source; travelling fire: "
                    "{ along_m }; as schedule columns position.distance_m, ...",
    },
    "materials.NAME": {
        "density": "[kg/m3]", "specific_heat": "[J/(kg K)]",
        "conductivity": "[W/(m K)], or a table [[steel temperature C, W/(m K)], ...]",
        "moisture_percent": "free water, % of dry weight",
        "moisture_delay_basis": 'none (default: no delay credited) | tests (EN 13381-4 tests give the delay)',
        "description": "free text (the protection schedule's material column)",
        "thicknesses_mm": "the thicknesses supplied; or min/max_thickness_mm with thickness_step_mm",
        "min_thickness_mm": "least supplied thickness", "max_thickness_mm": "largest supplied thickness",
        "thickness_step_mm": "supply step",
        "assessed_thickness_mm": "[least, largest] of the product assessment",
        "assessed_section_factor_per_m": "[least, largest] of the product assessment",
        "assessed_max_steel_temperature_C": "highest steel temperature of the assessment",
        "assessed_fire": "any | standard (assessed for the standard fire only)",
    },
    "variability": {
        "fires": "number of sampled fires", "seed": "same seed, same answer whatever the workers",
        "method": "latin-hypercube | random", "fire_load": "distribution of q_f per floor area",
        "opening_fraction": "distribution of the share of the openings open",
        "thermal_inertia": "distribution of b", "growth": "weights of slow, medium, fast",
        "target_fractile": "fractile the covering period is read at; default 0.9",
        "target_probability": "exceedance probability for `sample --size` and the exit code",
        "ignition_rate_per_m2_year": "with suppression_failure_probability: an annual probability",
        "suppression_failure_probability": "probability that the suppression fails",
    },
}


def _table_keys() -> dict:
    """The case tables and their keys, as the loader knows them."""
    out = {
        "": case.TOP_KEYS, "record": case.RECORD_KEYS, "fire": tuple(k for k in case.FIRE_KEYS
                                                                      if k not in fire_models.MODELS),
        "analysis": case.ANALYSIS_KEYS, "compartment": case.COMPARTMENT_KEYS,
        "compartment.opening": case.OPENING_KEYS, "compartment.surface": case.SURFACE_KEYS,
        "compartment.surface.layers": case.LAYER_KEYS, "fire_load": case.FIRE_LOAD_KEYS,
        "fire_load.measures": tuple(fireload.MEASURES), "member": members.MEMBER_KEYS,
        "materials.NAME": materials.MATERIAL_KEYS, "variability": tuple(DESCRIPTIONS["variability"]),
    }
    return out


def markdown() -> str:
    """The reference as Markdown."""
    lines = ["# steelfire reference: case-file keys and code values", "",
             "Generated by `python -m steelfire.reference` from the key tables of the case loader and the code-value "
             "registry; do not edit by hand. Units are in the key names (SI; temperatures in C).", ""]
    for table, keys in _table_keys().items():
        lines += [f"## [{table}]" if table else "## top level", "", "| key | meaning |", "|---|---|"]
        for k in keys:
            lines.append(f"| `{k}` | {DESCRIPTIONS[table][k]} |")
        lines.append("")
    for curve in fire_models.MODELS:
        opts = fire_models.options(curve)
        if opts:
            lines += [f"## [fire.{curve}]", "", "| key | unit | range | meaning |", "|---|---|---|---|"]
            for o in opts:
                rng = f"{'>' if o.lo_open else '>='} {o.lo:g}, <= {o.hi:g}" + ("" if o.required else
                                                                              f"; default {o.default}")
                lines.append(f"| `{o.key}` | {o.unit} | {rng} | {o.help} |")
            lines.append("")
    lines += ["## [code]: code values", "", "Every value steelfire takes from a clause; override by name in `[code]` "
              "within the range.", "", "| name | EN value | unit | range | clause |", "|---|---|---|---|---|"]
    for name, d in codevalues.DEFINITIONS.items():
        lines.append(f"| `{name}` | {d.value:g} | {d.unit} | {d.minimum:g} to {d.maximum:g} | {d.clause} |")
    return "\n".join(lines) + "\n"


if __name__ == "__main__":
    sys.stdout.write(markdown())
