"""Valid cases made by mutating the bundled ones within their allowed ranges (for tests/test_pass_invariants.py).

Unlike ``tests/fuzzing.py`` (which breaks the inputs), every case made here is meant to be accepted: the
fire curve and its inputs, the time step, the members' kinds, section factors, protections and thicknesses,
utilisations or resistance inputs, required periods, positions of localised and travelling fires,
``protection_model`` and ``allow_out_of_scope`` are drawn from ranges the loader accepts. A case may still
be refused for a reason a valid-looking input can have (a parametric fire outside Annex A's scope without
``allow_out_of_scope``, a fire too short for the steel's peak); the test counts those refusals.

One case is made from one seed (``random.Random(seed)``), so a failing case is rebuilt from its seed.
"""

from __future__ import annotations

import copy
import csv
import math
import random
try:
    import tomllib
except ImportError:  # pragma: no cover - Python 3.10
    import tomli as tomllib
from pathlib import Path

import fuzzing  # noqa: E402  (tests/fuzzing.py: the TOML value writer)

ROOT = Path(__file__).resolve().parents[1]
CASES_DIR = ROOT / "cases"

#: Bundled cases the mutations start from (office_variability is the office bay again, for `sample`).
BASES = ("warehouse_standard", "plant_room", "retail_measured", "office_floor", "office_bay", "archive_room",
         "atrium_localised", "open_office_travelling")

#: The bundled generic materials (steelfire/data/materials_generic.toml) a member may be switched to.
GENERIC = ("generic-board-gypsum", "generic-board-fibre-silicate", "generic-spray-mineral-fibre",
           "generic-coating-thin")

#: Supplied thicknesses [mm] of the generic materials (from steelfire/data/materials_generic.toml).
GENERIC_SUPPLY = {
    "generic-board-gypsum": [12.5, 15.0, 20.0, 25.0, 30.0, 40.0, 50.0, 60.0],
    "generic-board-fibre-silicate": [15.0, 20.0, 25.0, 30.0, 35.0, 40.0, 45.0, 50.0, 60.0],
    "generic-spray-mineral-fibre": [float(x) for x in range(10, 81)],
    "generic-coating-thin": [round(0.5 + 0.1 * k, 1) for k in range(56)],
}

#: Required periods drawn [min] (R15 ... R120; EN 13501-2 classes, common practice).
PERIODS = (15, 30, 45, 60, 90, 120)
#: Nominal curves a compartment case may be switched to (EN 1991-1-2 3.2).
NOMINAL = ("standard", "external", "hydrocarbon")


def _toml_value(v) -> str:
    """One TOML value on one line (the bundled fuzz's writer, :func:`fuzzing.toml_value`); non-finite refused."""
    if isinstance(v, float) and not math.isfinite(v):
        raise ValueError(v)
    return fuzzing.toml_value(v)


def toml_text(data: dict) -> str:
    """A case dict as TOML: top-level keys, then [tables] (one level of sub-tables) and [[arrays]]."""
    out = []
    scalars = {k: v for k, v in data.items() if not isinstance(v, dict)
               and not (isinstance(v, list) and v and isinstance(v[0], dict))}
    for k, v in scalars.items():
        out.append(f'"{k}" = {_toml_value(v)}')
    for k, v in data.items():
        if isinstance(v, dict):
            out.append(f'\n["{k}"]')
            subs = {}
            arrays = {}
            for kk, vv in v.items():
                if isinstance(vv, dict) and k != "code":
                    subs[kk] = vv
                elif isinstance(vv, list) and vv and isinstance(vv[0], dict):
                    arrays[kk] = vv
                else:
                    out.append(f'"{kk}" = {_toml_value(vv)}')
            for kk, vv in subs.items():
                out.append(f'\n["{k}"."{kk}"]')
                out += [f'"{a}" = {_toml_value(b)}' for a, b in vv.items()]
            for kk, rows in arrays.items():
                for row in rows:
                    out.append(f'\n[["{k}"."{kk}"]]')
                    out += [f'"{a}" = {_toml_value(b)}' for a, b in row.items()]
        elif isinstance(v, list) and v and isinstance(v[0], dict):
            for row in v:
                out.append(f'\n[["{k}"]]')
                out += [f'"{a}" = {_toml_value(b)}' for a, b in row.items()]
    return "\n".join(out) + "\n"


def _schedule_members(data: dict) -> list:
    """The rows of a bundled schedule CSV as [[member]] dicts (blank cells left out)."""
    lines = [ln for ln in (CASES_DIR / data["members_file"]).read_text(encoding="utf-8").splitlines()
             if not ln.startswith("#")]
    members = []
    for row in csv.DictReader(lines):
        m = {}
        for k, v in row.items():
            if v is None or v.strip() == "":
                continue
            if k in ("utilisation", "critical_temperature_C", "thickness_mm", "section_factor_per_m"):
                m[k] = float(v)
            elif k == "required_minutes":
                m[k] = int(float(v))
            elif k == "laterally_restrained":
                m[k] = v.strip().lower() == "true"
            else:
                m[k] = v
        members.append(m)
    return members


def _supply(data: dict, material: str) -> list:
    """Supplied thicknesses [mm] of a material of the case (or a generic one); None where not stated."""
    if material in GENERIC_SUPPLY:
        return GENERIC_SUPPLY[material]
    mt = (data.get("materials") or {}).get(material) or {}
    if "thicknesses_mm" in mt:
        return [float(x) for x in mt["thicknesses_mm"]]
    if "min_thickness_mm" in mt:
        lo, hi, st = mt["min_thickness_mm"], mt["max_thickness_mm"], mt["thickness_step_mm"]
        return [round(lo + k * st, 6) for k in range(int(round((hi - lo) / st)) + 1)]
    return None


def _thickness(rng, data, material) -> float:
    s = _supply(data, material)
    if s:
        return float(rng.choice(s))
    if material == "coating-c":
        return round(rng.uniform(1.0, 6.0), 2)
    return round(rng.uniform(10.0, 60.0), 1)


class Made:
    """A made case: its dict, the extra files it needs, and what was mutated (for a failure's message)."""

    def __init__(self, seed, base, data, files, notes):
        self.seed, self.base, self.data, self.files, self.notes = seed, base, data, files, notes

    def write(self, folder: Path) -> Path:
        folder.mkdir(parents=True, exist_ok=True)
        for name, text in self.files.items():
            (folder / name).write_text(text, encoding="utf-8")
        p = folder / "case.toml"
        p.write_text(toml_text(self.data), encoding="utf-8")
        return p

    def __str__(self):
        return f"seed {self.seed} from {self.base}: " + "; ".join(self.notes)


def make(seed: int, max_members: int = 4) -> Made:
    """One valid case from ``seed``: a bundled case with its inputs drawn within their ranges."""
    rng = random.Random(seed)
    base = BASES[seed % len(BASES)] if rng.random() < 0.5 else rng.choice(BASES)
    data = tomllib.loads((CASES_DIR / f"{base}.toml").read_text(encoding="utf-8"))
    data = copy.deepcopy(data)
    notes = []
    files = {}
    if "members_file" in data:
        data["member"] = _schedule_members(data)
        del data["members_file"]
    fire = data.setdefault("fire", {})
    analysis = data.setdefault("analysis", {})
    if "file" in fire:
        files[fire["file"]] = (CASES_DIR / fire["file"]).read_text(encoding="utf-8")
        if rng.random() < 0.4:
            fire["smoothing_s"] = float(rng.choice((10, 30, 60, 120)))
            notes.append(f"smoothing_s {fire['smoothing_s']:g}")

    # the fire curve: a compartment case may be switched to a nominal curve, a nominal one to another
    curve = fire.get("curve")
    if curve in ("parametric",) + NOMINAL and rng.random() < 0.35:
        curve = rng.choice(NOMINAL)
        fire["curve"] = curve
        notes.append(f"curve {curve}")
    # members: a few of them, mutated
    members = data.get("member", [])
    rng.shuffle(members)
    members = members[: rng.randint(1, min(max_members, len(members)))]
    materials = sorted((data.get("materials") or {}).keys())
    any_bare = False
    for k, m in enumerate(members):
        m["name"] = f"{m['name']}"[:30]
        design = "steel_grade" in m
        if not design and "critical_temperature_C" not in m and rng.random() < 0.3:
            m["kind"] = rng.choice(("beam", "tension"))
            if m["kind"] == "beam":
                m["laterally_restrained"] = True
            else:
                m.pop("laterally_restrained", None)
        if "utilisation" in m:
            m["utilisation"] = round(rng.uniform(0.15, 0.85), 3)
        elif "critical_temperature_C" in m:
            m["critical_temperature_C"] = float(rng.choice((450, 500, 540, 550, 600, 620, 650, 700)))
        elif design:
            for key in ("axial_force_kN", "moment_y_kNm"):
                if key in m:
                    m[key] = round(m[key] * rng.uniform(0.3, 1.5), 1)
            for key in ("buckling_length_m", "lateral_restraint_length_m"):
                if key in m:
                    m[key] = round(m[key] * rng.uniform(0.6, 1.6), 2)
            if rng.random() < 0.3:
                m["steel_grade"] = rng.choice(("S235", "S275", "S355"))
            if m.get("kind") == "column" and rng.random() < 0.3:
                # axial force with bending, some beyond lambda_y,20C = 1.1 (EN 1993-1-2 4.2.3.5 scope)
                m["moment_y_kNm"] = float(rng.choice((10, 30, 60)))
                m["buckling_length_m"] = float(rng.choice((4.0, 8.0, 11.0, 14.0)))
                m["lateral_restraint_length_m"] = m["buckling_length_m"]
                m["axial_force_kN"] = round(m.get("axial_force_kN", 500.0) * 0.3, 1)
        if "section_factor_per_m" in m and "section" not in m:
            m["section_factor_per_m"] = float(rng.choice((60, 80, 100, 120, 150, 180, 200, 230, 260, 290)))
        # protection: keep, swap, or bare
        r = rng.random()
        if r < 0.15 or ("protection" not in m and r < 0.5):
            m.pop("protection", None)
            m.pop("thickness_mm", None)
            if "section" not in m and "shadow_factor" not in m and rng.random() < 0.5:
                m["shadow_factor"] = round(rng.uniform(0.6, 1.0), 2)
        elif r < 0.55 or "protection" not in m:
            m["protection"] = rng.choice(list(GENERIC) + materials)
            m.pop("shadow_factor", None)
        if "protection" in m:
            m.pop("shadow_factor", None)
            m["thickness_mm"] = _thickness(rng, data, m["protection"])
        else:
            any_bare = True
        if rng.random() < 0.85:
            m["required_minutes"] = int(rng.choice(PERIODS))
        else:
            m.pop("required_minutes", None)
        if curve == "localised":
            h = data["fire"]["localised"]["ceiling_height_m"]
            m["position"] = {"distance_m": round(rng.uniform(0.0, 12.0), 2),
                             "height_m": round(rng.uniform(0.5, h), 2)}
        elif curve == "travelling":
            m["position"] = {"along_m": round(rng.uniform(0.0, data["fire"]["travelling"]["length_m"]), 1)}
        else:
            m.pop("position", None)
        if "encasement" in m and "protection" not in m:
            m["encasement"] = "profile"
    data["member"] = members
    notes.append(f"{len(members)} members ({sum('protection' not in m for m in members)} bare)")

    # compartment and fire load inside and just outside Annex A's ranges
    if "compartment" in data and "fire_load" in data and rng.random() < 0.6:
        f = rng.choice((0.4, 0.7, 1.0, 1.3, 1.8))
        fl = data["fire_load"]
        if "characteristic_MJ_m2" in fl:
            fl["characteristic_MJ_m2"] = round(fl["characteristic_MJ_m2"] * f, 1)
            notes.append(f"fire load x{f:g}")
        for o in ([] if data["compartment"].get("surface") else data["compartment"].get("opening", [])):
            o["count"] = max(1, int(round(o.get("count", 1) * rng.choice((0.5, 1.0, 1.5)))))
    if curve == "travelling" and rng.random() < 0.3:
        data["fire"]["travelling"]["near_field_C"] = float(rng.choice((800, 1000, 1200, 1300)))
        notes.append(f"near_field_C {data['fire']['travelling']['near_field_C']:g}")
    # duration: the bundled one or shorter (a cooling fire cut short may be refused or stamped out of scope)
    if curve in NOMINAL:
        fire["duration_min"] = float(rng.choice((30, 60, 90, 120)))
    elif curve == "parametric":
        fire["duration_min"] = float(rng.choice((90, 120, 180, 240)))
    elif curve == "localised":
        fire["duration_min"] = float(rng.choice((30, 60, 90)))
    elif curve == "travelling":
        fire["duration_min"] = float(rng.choice((240, 360)))
    need = max([60] + [m.get("required_minutes", 0) for m in members])
    analysis["standard_horizon_min"] = float(max(need, rng.choice((60, 120, 180))))
    # the time step: bare steel <= 5 s (EN 1993-1-2 4.2.5.1(4)), protected <= 30 s (4.2.5.2(3))
    analysis["time_step_s"] = float(rng.choice((2, 3, 5) if any_bare else (5, 10, 15, 20, 30)))
    analysis["protection_model"] = rng.choice(("lumped", "lumped", "conduction"))
    analysis["allow_out_of_scope"] = rng.random() < 0.4
    notes.append(f"curve {curve}, {fire.get('duration_min'):g} min, step {analysis['time_step_s']:g} s, "
                 f"{analysis['protection_model']}, allow_out_of_scope {analysis['allow_out_of_scope']}")
    return Made(seed, base, data, files, notes)
