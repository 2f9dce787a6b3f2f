"""Reading the project's CSV inputs: one place for the file checks and the row numbering."""

from __future__ import annotations

import csv
from pathlib import Path

from steelfire.errors import InputError


#: The most rows read from any CSV input (a schedule has at most 200,000 members): a larger file is refused
#: as soon as the reader passes this count, without reading the rest.
MAX_CSV_ROWS = 200_100


def read_rows(path, field: str, what: str, max_rows: int = MAX_CSV_ROWS):
    """Non-blank rows of a UTF-8 CSV file that are not comments (first cell starting with '#'),
    as (line number, cells) pairs. ``what`` says what the file should hold, for the error line."""
    lines, rows = read_rows_split(path, field, what, max_rows)
    return list(zip(lines, rows))


def read_rows_split(path, field: str, what: str, max_rows: int = MAX_CSV_ROWS):
    """:func:`read_rows` as two parallel lists, (line numbers, rows of cells): a long schedule then
    costs no pair per row. More than ``max_rows`` rows: refused once read that far."""
    p = Path(path)
    if not p.is_file():
        raise InputError(field, str(path), "must name an existing CSV file (relative to the case file)")
    csv.field_size_limit(1 << 20)
    try:
        with p.open(newline="", encoding="utf-8-sig") as fh:
            rows = []
            for r in csv.reader(fh):
                rows.append(r)
                if len(rows) > max_rows:
                    raise InputError(field, p.name, f"has more than {max_rows} rows; at most {max_rows}")
    except (OSError, UnicodeDecodeError) as exc:
        raise InputError(field, str(path), f"must be a readable UTF-8 CSV file ({exc.__class__.__name__})") from None
    except csv.Error as exc:
        raise InputError(field, str(path), f"must be a CSV file of {what} ({exc})") from None
    # The first test is a quick sufficient one for _holds_data (the first cell starts with a character
    # that is neither blank nor '#'); only rows that fail it are looked at in full.
    lines = [i for i, r in enumerate(rows, 1)
             if (r and (c := r[0][:1]) and c != "#" and not c.isspace()) or _holds_data(r)]
    if len(lines) == len(rows):
        return lines, rows
    return lines, [rows[i - 1] for i in lines]


def _holds_data(row) -> bool:
    """The rule: a row counts unless it is empty, all blank, or a comment (first cell starting with '#')."""
    return bool(row) and any(c.strip() for c in row) and not row[0].lstrip().startswith("#")


_PLAIN = frozenset("abcdefghijklmnopqrstuvwxyzABCDEFGHIJKLMNOPQRSTUVWXYZ0123456789_.+- ")


def shown_cell(text, most: int = 24) -> str:
    """A cell of an input file as an error message may quote it: short plain text (a number, a key, a
    name) as it is; anything else is not echoed, so an error never shows a file's contents."""
    text = str(text).strip()
    if len(text) <= most and all(c in _PLAIN for c in text):
        return text
    return f"<{len(text)} characters, not shown>"
