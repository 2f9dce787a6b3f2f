"""Member schedules from CSV: one row per member, the columns are the keys of a [[member]] table.

Cells are read by the column's type (numbers, true/false, text); an empty cell is an absent key.
Errors name the file, the row and the column. The rows are then validated like [[member]] tables.
"""

from __future__ import annotations

import math
from pathlib import Path

from .csvrows import read_rows
from .errors import InputError

#: Column -> type of the [[member]] keys a schedule may carry.
COLUMNS = {
    "name": str, "kind": str, "laterally_restrained": bool, "section_factor_per_m": float,
    "utilisation": float, "critical_temperature_C": float, "protection": str, "thickness_mm": float,
    "required_minutes": float, "shadow_factor": float, "section": str, "exposure": str, "encasement": str,
}
MAX_ROWS = 200_000


def read_schedule(path, field: str = "members_file"):
    """Rows of a schedule CSV as (where, dict) pairs, ``where`` naming the file and row for errors."""
    p = Path(path)
    numbered = read_rows(p, field, "member rows under a header of member keys")
    if not numbered:
        raise InputError(field, p.name, "is empty; needs a header row with at least name and a section factor")
    header_row, header = numbered[0]
    cols = [c.strip() for c in header]
    for c in cols:
        if c not in COLUMNS:
            import difflib

            close = difflib.get_close_matches(c, list(COLUMNS), n=2)
            hint = f"; did you mean {' or '.join(close)}?" if close else ""
            raise InputError(f"{p.name} header", c, "is not a member key" + hint)
    if len(set(cols)) != len(cols):
        dup = next(c for c in cols if cols.count(c) > 1)
        raise InputError(f"{p.name} header", dup, "appears twice")
    if "name" not in cols:
        raise InputError(f"{p.name} header", ",".join(cols), "needs a name column")
    out = []
    for line, row in numbered[1:]:
        if len(row) > len(cols):
            raise InputError(f"{p.name} row {line}", ",".join(row), f"has {len(row)} cells; the header has {len(cols)}")
        d = {}
        for col, cell in zip(cols, row):
            cell = cell.strip()
            if cell == "":
                continue
            d[col] = _cell(p.name, line, col, cell)
        out.append((f"{p.name} row {line}", d))
        if len(out) > MAX_ROWS:
            raise InputError(field, p.name, f"at most {MAX_ROWS} members")
    if not out:
        raise InputError(field, p.name, "has a header but no member rows")
    return out


def _cell(fname, line, col, cell):
    kind = COLUMNS[col]
    where = f"{fname} row {line} column {col}"
    if kind is float:
        try:
            v = float(cell)
        except ValueError:
            raise InputError(where, cell, "must be a number (units are in the column name)") from None
        if not math.isfinite(v):
            raise InputError(where, cell, "must be a finite number")
        return v
    if kind is bool:
        low = cell.lower()
        if low in ("true", "yes", "1"):
            return True
        if low in ("false", "no", "0"):
            return False
        raise InputError(where, cell, "must be true or false")
    return cell
