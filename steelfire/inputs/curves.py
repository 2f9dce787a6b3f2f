"""A gas temperature-time curve read from CSV (``[fire] curve = "table"``): columns time_min, temperature_C."""

from __future__ import annotations

import math
from pathlib import Path

import numpy as np

from steelfire.errors import InputError
from steelfire.inputs.csvrows import read_rows
from steelfire.models.fire.tabulated import TabulatedFire

COLUMNS = ("time_min", "temperature_C")


def read_curve_csv(path, field: str = "fire.file") -> TabulatedFire:
    """Read a CSV with a header ``time_min,temperature_C``; times strictly increasing from 0 min.

    Temperatures must lie between 0 and 1500 C. Errors name the file, the row and the column.
    """
    p = Path(path)
    numbered = read_rows(p, field, "two columns time_min,temperature_C")
    if not numbered:
        raise InputError(field, str(path), "is empty; needs a header time_min,temperature_C and rows")
    header = [c.strip() for c in numbered[0][1]]
    if header[:2] != list(COLUMNS):
        raise InputError(f"{p.name} header", ",".join(header), "must be time_min,temperature_C")
    times, temps = [], []
    for i, row in numbered[1:]:
        if len(row) < 2:
            raise InputError(f"{p.name} row {i}", ",".join(row), "needs two columns time_min,temperature_C")
        vals = []
        for col, cell in zip(COLUMNS, row[:2]):
            try:
                v = float(cell)
            except ValueError:
                raise InputError(f"{p.name} row {i} {col}", cell.strip(), "must be a number") from None
            if not math.isfinite(v):
                raise InputError(f"{p.name} row {i} {col}", cell.strip(), "must be a finite number")
            vals.append(v)
        t, theta = vals
        if times and t <= times[-1]:
            raise InputError(f"{p.name} row {i} time_min", t,
                             f"times must increase strictly (previous row {times[-1]:g} min)")
        if not times and t != 0.0:
            raise InputError(f"{p.name} row {i} time_min", t, "the first row must be at 0 min")
        if not (0.0 <= theta <= 1500.0):
            raise InputError(f"{p.name} row {i} temperature_C", theta, "must be between 0 and 1500 C")
        times.append(t)
        temps.append(theta)
    if len(times) < 2:
        raise InputError(field, str(path), "needs at least two data rows")
    return TabulatedFire(np.array(times) * 60.0, np.array(temps), p.name)
