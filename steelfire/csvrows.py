"""Reading the project's CSV inputs: one place for the file checks and the row numbering."""

from __future__ import annotations

import csv
from pathlib import Path

from .errors import InputError


def read_rows(path, field: str, what: str):
    """Non-blank rows of a UTF-8 CSV file that are not comments (first cell starting with '#'),
    as (line number, cells) pairs. ``what`` says what the file should hold, for the error line."""
    p = Path(path)
    if not p.is_file():
        raise InputError(field, str(path), "must name an existing CSV file (relative to the case file)")
    try:
        with p.open(newline="", encoding="utf-8-sig") as fh:
            rows = list(csv.reader(fh))
    except (OSError, UnicodeDecodeError) as exc:
        raise InputError(field, str(path), f"must be a readable UTF-8 CSV file ({exc.__class__.__name__})") from None
    except csv.Error as exc:
        raise InputError(field, str(path), f"must be a CSV file of {what} ({exc})") from None
    return [(i + 1, r) for i, r in enumerate(rows)
            if r and any(c.strip() for c in r) and not r[0].lstrip().startswith("#")]
