"""Member schedules from CSV: one row per member, the columns are the keys of a [[member]] table.

Cells are converted by the column's type (numbers, true/false, text); an empty cell is an absent key.
A cell that does not convert is refused naming the file, the row and the column. The rows then go to
the one member validator (:mod:`steelfire.inputs.members`) like the [[member]] tables.
"""

from __future__ import annotations

import difflib
import math
from pathlib import Path

from steelfire.errors import InputError
from steelfire.inputs.csvrows import read_rows_split, shown_cell
from steelfire.inputs.members import ABSENT, MemberRows

#: Column -> type of the member keys a schedule may carry.
COLUMNS = {
    "name": str, "kind": str, "laterally_restrained": bool, "section_factor_per_m": float,
    "utilisation": float, "critical_temperature_C": float, "protection": str, "thickness_mm": float,
    "required_minutes": float, "shadow_factor": float, "section": str, "exposure": str, "encasement": str,
    "steel_grade": str, "axial_force_kN": float, "moment_y_kNm": float, "buckling_length_m": float,
    "buckling_length_y_m": float, "buckling_length_z_m": float, "lateral_restraint_length_m": float,
    "moment_factor_C1": float, "adaptation_factor_k1": float, "adaptation_factor_k2": float,
    "equivalent_moment_factor_y": float, "equivalent_moment_factor_LT": float,
    "position.distance_m": float, "position.height_m": float, "position.along_m": float,
}
MAX_ROWS = 200_000

#: Cell text (stripped, lower case) -> value of a true/false column.
BOOLEANS = {"true": True, "yes": True, "1": True, "false": False, "no": False, "0": False}


def read_schedule(path, field: str = "members_file") -> MemberRows:
    """The member rows of a schedule (CSV, or the first sheet of an .xlsx workbook), by column (see
    :class:`steelfire.inputs.members.MemberRows`)."""
    p = Path(path)
    if p.suffix.lower() == ".xlsx":
        return read_workbook(p, field)
    lines, rows = read_rows_split(p, field, "member rows under a header of member keys")
    if not rows:
        raise InputError(field, p.name, "is empty; needs a header row with at least name and a section factor")
    cols = check_header([c.strip() for c in rows[0]], f"{p.name} header")
    lines, rows = lines[1:], rows[1:]
    if not rows:
        raise InputError(field, p.name, "has a header but no member rows")
    if len(rows) > MAX_ROWS:
        raise InputError(field, p.name, f"at most {MAX_ROWS} members")
    width = len(cols)
    for line, row in zip(lines, rows):
        if len(row) > width:
            raise InputError(f"{p.name} row {line}", f"{len(row)} cells", f"has more cells than the header ({width})")
    columns = convert_columns(cols, [r + [""] * (width - len(r)) if len(r) < width else r for r in rows],
                              lambda i, col: f"{p.name} row {lines[i]} column {col}")
    return MemberRows(len(rows), nest_positions(columns), lambda i: f"{p.name} row {lines[i]}")


def nest_positions(columns):
    """The ``position.<key>`` columns as one ``position`` column of tables (ABSENT where a row gives none)."""
    keys = [c for c in columns if c.startswith("position.")]
    if not keys:
        return columns
    out = {c: v for c, v in columns.items() if c not in keys}
    n = len(columns[keys[0]])
    out["position"] = [{k.split(".", 1)[1]: columns[k][i] for k in keys if columns[k][i] is not ABSENT} or ABSENT
                       for i in range(n)]
    return out


def check_header(cols, where):
    """The header's member keys, checked: known, once each, with a name column."""
    for j, c in enumerate(cols, start=1):
        if c not in COLUMNS:
            close = difflib.get_close_matches(c, list(COLUMNS), n=2)
            hint = f"; did you mean {' or '.join(close)}?" if close else ""
            raise InputError(where, shown_cell(c), f"column {j} is not a member key" + hint)
    if len(set(cols)) != len(cols):
        raise InputError(where, next(c for c in cols if cols.count(c) > 1), "appears twice")
    if "name" not in cols:
        raise InputError(where, ",".join(cols), "needs a name column")
    return cols


def convert_columns(cols, rows, where):
    """The cells of ``rows`` by column, converted by :data:`COLUMNS` (text cells stripped; empty: ABSENT).

    Raises the error of the first cell (row by row, then column by column) that does not convert;
    ``where(i, col)`` names a cell."""
    columns = {}
    first_bad = None
    for j, (col, cells) in enumerate(zip(cols, zip(*rows))):
        kind = COLUMNS[col]
        vals = []
        for i, cell in enumerate(cells):
            v = _convert(cell, kind)
            if v is None:
                if first_bad is None or (i, j) < first_bad[:2]:
                    first_bad = (i, j, col, cell)
                break
            vals.append(v)
        columns[col] = vals
    if first_bad is not None:
        i, _, col, cell = first_bad
        text = str(cell).strip()
        kind = COLUMNS[col]
        allowed = ("must be a number (units are in the column name)" if kind is float else "must be true or false")
        if kind is float and _is_nonfinite(text):
            allowed = "must be a finite number"
        raise InputError(where(i, col), shown_cell(text), allowed)
    return columns


def _convert(cell, kind):
    """A cell (text, or a value a spreadsheet holds) as the column's type; ABSENT if empty; None if it
    does not convert."""
    if cell is None:
        return ABSENT
    if isinstance(cell, str):
        cell = cell.strip()
        if cell == "":
            return ABSENT
    if kind is float:
        if isinstance(cell, bool):
            return None
        try:
            v = float(cell)
        except (TypeError, ValueError):
            return None
        return v if math.isfinite(v) else None
    if kind is bool:
        if isinstance(cell, bool):
            return cell
        return BOOLEANS.get(str(cell).lower())
    if isinstance(cell, float) and cell.is_integer():
        cell = int(cell)
    return str(cell)


def _is_nonfinite(text):
    try:
        return not math.isfinite(float(text))
    except ValueError:
        return False


def read_workbook(path, field: str = "members_file") -> MemberRows:
    """The member rows of the first sheet of an .xlsx workbook (openpyxl, the ``xlsx`` extra): a header row
    of member keys, one member per row; blank rows skipped. Errors name the sheet, the row and the column."""
    p = Path(path)
    try:
        import openpyxl
    except ImportError:
        raise InputError(field, p.name, "an .xlsx schedule needs openpyxl: python -m pip install 'steelfire[xlsx]'") \
            from None
    if not p.is_file():
        raise InputError(field, str(path), "must name an existing schedule file (relative to the case file)")
    try:
        book = openpyxl.load_workbook(p, read_only=True, data_only=True)
    except Exception as exc:  # openpyxl raises many kinds for a damaged file
        raise InputError(field, p.name, f"must be a readable .xlsx workbook ({exc.__class__.__name__})") from None
    sheet = book.worksheets[0]
    where_sheet = f"{p.name} sheet {sheet.title!r}"
    lines, rows = [], []
    for r, values in enumerate(sheet.iter_rows(values_only=True), start=1):
        cells = list(values)
        while cells and (cells[-1] is None or (isinstance(cells[-1], str) and not cells[-1].strip())):
            cells.pop()
        if not cells or (isinstance(cells[0], str) and cells[0].lstrip().startswith("#")):
            continue
        lines.append(r)
        rows.append(cells)
        if len(rows) > MAX_ROWS + 1:
            raise InputError(field, p.name, f"at most {MAX_ROWS} members")
    book.close()
    if not rows:
        raise InputError(field, p.name, "is empty; needs a header row with at least name and a section factor")
    cols = check_header([str(c).strip() if c is not None else "" for c in rows[0]], f"{where_sheet} header")
    lines, rows = lines[1:], rows[1:]
    if not rows:
        raise InputError(field, p.name, "has a header but no member rows")
    width = len(cols)
    for line, row in zip(lines, rows):
        if len(row) > width:
            raise InputError(f"{where_sheet} row {line}", f"{len(row)} cells", f"has more cells than the header ({width})")
    columns = convert_columns(cols, [r + [None] * (width - len(r)) for r in rows],
                              lambda i, col: f"{where_sheet} row {lines[i]} column {col}")
    return MemberRows(len(rows), nest_positions(columns), lambda i: f"{where_sheet} row {lines[i]}")
