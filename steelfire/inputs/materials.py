"""Protection materials of a case: its ``[materials.NAME]`` tables and the bundled generic set."""

from __future__ import annotations

import math
import sys

from steelfire.errors import InputError
from steelfire.inputs.tables import TableReader
from steelfire.models.protection import ASSESSED_FIRES, GENERIC_FILE, MOISTURE_BASES, Material

if sys.version_info >= (3, 11):
    import tomllib
else:  # pragma: no cover - exercised on Python 3.10 only
    import tomli as tomllib

MATERIAL_KEYS = ("density", "conductivity", "specific_heat", "moisture_percent", "moisture_delay_basis", "description",
                 "thicknesses_mm",
                 "min_thickness_mm", "max_thickness_mm", "thickness_step_mm", "assessed_thickness_mm",
                 "assessed_section_factor_per_m", "assessed_max_steel_temperature_C", "assessed_fire")


def read_materials(data) -> dict:
    """The case's [materials] tables, and the bundled generic ones under their own names."""
    if not isinstance(data, dict):
        raise InputError("materials", data, "must be a table of named material tables")
    out = dict(generic_materials())
    for name, md in data.items():
        out[name] = read_material_table(name, md, where=f"materials.{name}")
    return out


def _pair(t, key, unit, lo, hi):
    v = t.raw(key)
    if v is None:
        return None
    if (not isinstance(v, list) or len(v) != 2
            or any(isinstance(x, bool) or not isinstance(x, (int, float)) for x in v)
            or not (lo <= v[0] <= v[1] <= hi)):
        raise InputError(t._f(key), v, f"must be [least, largest] with {lo:g} <= least <= largest <= {hi:g} [{unit}]")
    return (float(v[0]), float(v[1]))


def read_material_table(name, md, where) -> Material:
    """One protection material table (see steelfire.protection.Material for the keys)."""
    t = TableReader(md, where, keys=MATERIAL_KEYS)
    rho = t.number("density", "kg/m3", lo=1.0, hi=5000.0)
    cp = t.number("specific_heat", "J/(kg K)", lo=100.0, hi=10000.0)
    moist = t.number("moisture_percent", "% of dry weight", required=False, default=0.0, lo=0.0, hi=50.0)
    basis = t.string("moisture_delay_basis", required=False, default="none", choices=MOISTURE_BASES)
    lam = _read_conductivity(t.raw("conductivity"), where)
    desc = t.string("description", required=False, default="")
    supplied = t.raw("thicknesses_mm")
    if supplied is not None:
        if (not isinstance(supplied, list) or not supplied
                or any(isinstance(x, bool) or not isinstance(x, (int, float)) or not (0 < x <= 300) for x in supplied)):
            raise InputError(f"{where}.thicknesses_mm", supplied, "must be a list of thicknesses > 0 and <= 300 [mm]")
        supplied = tuple(sorted(float(x) for x in supplied))
    d_lo = t.number("min_thickness_mm", "mm", required=False, lo=0.0, lo_open=True, hi=300.0)
    d_hi = t.number("max_thickness_mm", "mm", required=False, lo=0.0, lo_open=True, hi=300.0)
    step = t.number("thickness_step_mm", "mm", required=False, lo=0.01, hi=100.0)
    if supplied is not None and (d_lo is not None or d_hi is not None or step is not None):
        raise InputError(f"{where}.thicknesses_mm", list(supplied),
                         "give thicknesses_mm or min/max_thickness_mm and thickness_step_mm, not both")
    if d_lo is not None and d_hi is not None and d_hi < d_lo:
        raise InputError(f"{where}.max_thickness_mm", d_hi, f"must be >= min_thickness_mm = {d_lo:g} mm")
    a_d = _pair(t, "assessed_thickness_mm", "mm", 0.0, 300.0)
    a_s = _pair(t, "assessed_section_factor_per_m", "1/m", 0.0, 1000.0)
    a_t = t.number("assessed_max_steel_temperature_C", "C", required=False, lo=20.0, hi=1200.0)
    a_f = t.string("assessed_fire", required=False, default="any", choices=ASSESSED_FIRES)
    t.done()
    return Material(name=name, density=rho, conductivity=lam, specific_heat=cp, moisture_percent=moist,
                    moisture_delay_basis=basis,
                    thicknesses_mm=supplied, min_thickness_mm=d_lo, max_thickness_mm=d_hi, thickness_step_mm=step,
                    assessed_thickness_mm=a_d, assessed_section_factor_per_m=a_s,
                    assessed_max_steel_temperature_C=a_t, assessed_fire=a_f, description=desc)


_GENERIC = None


def generic_materials() -> dict:
    """The bundled generic, illustrative materials (steelfire/data/materials_generic.toml), by name."""
    global _GENERIC
    if _GENERIC is None:
        with GENERIC_FILE.open("rb") as fh:
            data = tomllib.load(fh)
        _GENERIC = {n: read_material_table(n, d, where=f"{GENERIC_FILE.name}: {n}") for n, d in data.items()}
    return _GENERIC


def _read_conductivity(v, where):
    field_ = f"{where}.conductivity"
    allowed = "a number > 0 and <= 10 [W/(m K)], or a table [[steel temperature C, W/(m K)], ...]"
    if v is None:
        raise InputError(field_, None, "is missing; " + allowed)
    if isinstance(v, bool):
        raise InputError(field_, v, allowed)
    if isinstance(v, (int, float)):
        if not (math.isfinite(v) and 0 < v <= 10.0):
            raise InputError(field_, v, allowed)
        return float(v)
    if not isinstance(v, list) or not v:
        raise InputError(field_, v, allowed)
    pairs = []
    for i, pt in enumerate(v):
        if (not isinstance(pt, list) or len(pt) != 2
                or any(isinstance(x, bool) or not isinstance(x, (int, float)) for x in pt)):
            raise InputError(f"{field_}[{i + 1}]", pt, "must be a pair [steel temperature C, conductivity W/(m K)]")
        th, lam = float(pt[0]), float(pt[1])
        if not (0.0 <= th <= 1200.0):
            raise InputError(f"{field_}[{i + 1}]", pt, "steel temperature must be between 0 and 1200 C")
        if not (0.0 < lam <= 10.0):
            raise InputError(f"{field_}[{i + 1}]", pt, "conductivity must be > 0 and <= 10 W/(m K)")
        if pairs and th <= pairs[-1][0]:
            raise InputError(f"{field_}[{i + 1}]", pt, "steel temperatures must increase strictly")
        pairs.append((th, lam))
    if len(pairs) > 64:
        raise InputError(field_, f"{len(pairs)} points", "at most 64 points")
    return tuple(pairs)
