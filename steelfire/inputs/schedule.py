"""Member schedules from CSV: one row per member, the columns are the keys of a [[member]] table.

Cells are read by the column's type (numbers, true/false, text); an empty cell is an absent key.
Errors name the file, the row and the column. The rows are then validated like [[member]] tables.

Two readers give the same rows: :func:`read_schedule`, row by row into one dict per row (the
reference, and the source of every error message), and :func:`read_schedule_columns`, column by
column for long schedules. The column reader only ever *accepts*: whenever a cell is not plainly
good it hands the whole file to the row reader, which then reports the first error.
"""

from __future__ import annotations

import math
from pathlib import Path

from steelfire.inputs.csvrows import read_rows_split
from steelfire.errors import InputError

#: Column -> type of the [[member]] keys a schedule may carry.
COLUMNS = {
    "name": str, "kind": str, "laterally_restrained": bool, "section_factor_per_m": float,
    "utilisation": float, "critical_temperature_C": float, "protection": str, "thickness_mm": float,
    "required_minutes": float, "shadow_factor": float, "section": str, "exposure": str, "encasement": str,
}
MAX_ROWS = 200_000

#: Cell text (stripped, lower case) -> value of a true/false column.
BOOLEANS = {"true": True, "yes": True, "1": True, "false": False, "no": False, "0": False}


class _Absent:
    """The marker of an absent key (an empty cell) in a column of member values."""

    def __repr__(self):
        return "ABSENT"


#: Stands in a column of :class:`Schedule` (and of inline member tables in :mod:`steelfire.case`)
#: where a row does not give the key.
ABSENT = _Absent()


class Schedule:
    """The member rows of a schedule, held by column.

    ``columns`` maps each column of the header to its values, one per row, converted as the row
    reader converts them, :data:`ABSENT` where the cell is empty. :meth:`row` gives a row as the
    dict :func:`read_schedule` gives, :meth:`where` its name in error messages.
    """

    def __init__(self, fname: str, lines: list, columns: dict):
        self.fname = fname
        self.lines = lines
        self.columns = columns
        self.n = len(lines)
        self.suspect = ()  # rows the columns cannot stand for (none: the header holds member keys only)

    def where(self, i: int) -> str:
        return f"{self.fname} row {self.lines[i]}"

    def row(self, i: int) -> dict:
        return {c: vals[i] for c, vals in self.columns.items() if vals[i] is not ABSENT}


def read_schedule(path, field: str = "members_file"):
    """Rows of a schedule CSV as (where, dict) pairs, ``where`` naming the file and row for errors."""
    p = Path(path)
    lines, rows, cols = _read_header(p, field)
    return _row_dicts(p, field, cols, lines, rows)


def read_schedule_columns(path, field: str = "members_file") -> Schedule:
    """The rows of a schedule CSV as a :class:`Schedule`, read column by column.

    Accepts, with the values :func:`read_schedule` would give, a file whose rows have no more cells
    than the header (missing trailing cells are empty), at most ``MAX_ROWS`` of them, and whose
    cells all convert; anything else (and any doubt) goes to :func:`read_schedule`'s row reader,
    which raises the error it finds first.
    """
    p = Path(path)
    lines, rows, cols = _read_header(p, field)
    columns = _columns(cols, rows) if 0 < len(rows) <= MAX_ROWS else None
    if columns is None:
        pairs = _row_dicts(p, field, cols, lines, rows)  # raises the first error
        # (not expected: the row reader refuses all the column reader declines; if not, its rows stand)
        columns = {c: [d.get(c, ABSENT) for _, d in pairs] for c in cols}
    return Schedule(p.name, lines, columns)


def _read_header(p: Path, field: str):
    """The data rows' line numbers and cells, and the checked header."""
    lines, rows = read_rows_split(p, field, "member rows under a header of member keys")
    if not rows:
        raise InputError(field, p.name, "is empty; needs a header row with at least name and a section factor")
    cols = [c.strip() for c in rows[0]]
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
    return lines[1:], rows[1:], cols


def _row_dicts(p: Path, field: str, cols, lines, rows):
    """The row reader: each row into a dict of its non-empty cells, checked in file order."""
    out = []
    for line, row in zip(lines, rows):
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
        v = BOOLEANS.get(cell.lower())
        if v is None:
            raise InputError(where, cell, "must be true or false")
        return v
    return cell


def _columns(cols, rows):
    """The cells by column, converted as :func:`_cell` converts them, or None if any row has more
    cells than the header or any non-empty cell does not convert (the row reader then says which)."""
    width = len(cols)
    if any(len(r) != width for r in rows):
        if any(len(r) > width for r in rows):
            return None
        rows = [r + [""] * (width - len(r)) for r in rows]  # a missing trailing cell is an empty one
    columns = {}
    for col, cells in zip(cols, zip(*rows)):
        cells = [c.strip() for c in cells]
        kind = COLUMNS[col]
        if kind is float:
            try:
                if "" in cells:
                    vals = [float(c) if c else ABSENT for c in cells]
                    present = [v for v in vals if v is not ABSENT]
                else:
                    vals = present = list(map(float, cells))
            except ValueError:
                return None
            if not all(map(math.isfinite, present)):
                return None
        elif kind is bool:
            vals = [BOOLEANS.get(c.lower()) if c else ABSENT for c in cells]
            if None in vals:
                return None
        else:
            vals = [c if c else ABSENT for c in cells]
        columns[col] = vals
    return columns
