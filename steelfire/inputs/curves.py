"""A gas temperature-time curve read from CSV (``[fire] curve = "table"``): columns time_min, temperature_C."""

from __future__ import annotations

import math
from pathlib import Path

import numpy as np

from steelfire.errors import InputError
from steelfire.inputs.csvrows import read_rows, shown_cell
from steelfire.models.fire.heatrelease import TabulatedHeatRelease
from steelfire.models.fire.tabulated import TabulatedFire

COLUMNS = ("time_min", "temperature_C")
#: The most rows of a fire table, and its latest time [min] (ten days: far beyond any design fire).
MAX_TABLE_ROWS = 100_000
MAX_TABLE_TIME_MIN = 14_400.0


def read_curve_csv(path, field: str = "fire.file") -> TabulatedFire:
    """Read a CSV with a header ``time_min,temperature_C``; times strictly increasing from 0 min.

    Temperatures must lie between 0 and 1500 C. Errors name the file, the row and the column.
    """
    p = Path(path)
    numbered = read_rows(p, field, "two columns time_min,temperature_C", max_rows=MAX_TABLE_ROWS)
    if not numbered:
        raise InputError(field, str(path), "is empty; needs a header time_min,temperature_C and rows")
    header = [c.strip() for c in numbered[0][1]]
    if header[:2] != list(COLUMNS):
        raise InputError(f"{p.name} header", shown_cell(",".join(header)), "must be time_min,temperature_C")
    times, temps = [], []
    for i, row in numbered[1:]:
        if len(row) < 2:
            raise InputError(f"{p.name} row {i}", shown_cell(",".join(row)), "needs two columns time_min,temperature_C")
        vals = []
        for col, cell in zip(COLUMNS, row[:2]):
            try:
                v = float(cell)
            except ValueError:
                raise InputError(f"{p.name} row {i} {col}", shown_cell(cell), "must be a number") from None
            if not math.isfinite(v):
                raise InputError(f"{p.name} row {i} {col}", shown_cell(cell), "must be a finite number")
            vals.append(v)
        t, theta = vals
        if times and t <= times[-1]:
            raise InputError(f"{p.name} row {i} time_min", t,
                             f"times must increase strictly (previous row {times[-1]:g} min)")
        if t > MAX_TABLE_TIME_MIN:
            raise InputError(f"{p.name} row {i} time_min", t, f"must be <= {MAX_TABLE_TIME_MIN:g} min")
        if not times and t != 0.0:
            raise InputError(f"{p.name} row {i} time_min", t, "the first row must be at 0 min")
        if not (0.0 <= theta <= 1500.0):
            raise InputError(f"{p.name} row {i} temperature_C", theta, "must be between 0 and 1500 C")
        times.append(t)
        temps.append(theta)
    if len(times) < 2:
        raise InputError(field, str(path), "needs at least two data rows")
    return TabulatedFire(np.array(times) * 60.0, np.array(temps), p.name)


HEAT_RELEASE_COLUMNS = ("time_min", "heat_release_MW")


def read_heat_release_csv(path, field: str = "fire.heat_release_file") -> TabulatedHeatRelease:
    """Read a CSV with a header ``time_min,heat_release_MW``; rows as :func:`tabulated_heat_release` wants.

    Errors name the file, the row and the column.
    """
    p = Path(path)
    numbered = read_rows(p, field, "two columns time_min,heat_release_MW", max_rows=MAX_TABLE_ROWS)
    if not numbered:
        raise InputError(field, str(path), "is empty; needs a header time_min,heat_release_MW and rows")
    header = [c.strip() for c in numbered[0][1]]
    if header[:2] != list(HEAT_RELEASE_COLUMNS):
        raise InputError(f"{p.name} header", shown_cell(",".join(header)), "must be time_min,heat_release_MW")
    times, values = [], []
    for line, row in numbered[1:]:
        if len(row) < 2:
            raise InputError(f"{p.name} row {line}", shown_cell(",".join(row)), "needs two columns time_min,heat_release_MW")
        vals = []
        for col, cell in zip(HEAT_RELEASE_COLUMNS, row[:2]):
            try:
                vals.append(float(cell))
            except ValueError:
                raise InputError(f"{p.name} row {line} {col}", shown_cell(cell), "must be a number") from None
        t, q = vals
        if not math.isfinite(t) or (not times and t != 0.0) or (times and t <= times[-1]) or t > MAX_TABLE_TIME_MIN:
            raise InputError(f"{p.name} row {line} time_min", t, "times must start at 0 and increase strictly [min]")
        if not (math.isfinite(q) and 0.0 <= q <= 1e4):
            raise InputError(f"{p.name} row {line} heat_release_MW", q, "must be a number >= 0 and <= 10000 [MW]")
        times.append(t)
        values.append(q)
    if len(times) < 2:
        raise InputError(field, str(path), "needs at least two data rows")
    return TabulatedHeatRelease(np.array(times) * 60.0, np.array(values) * 1e6, p.name)
