"""Input errors: one line naming the field, the value and what is allowed."""

from __future__ import annotations

import os

#: The longest quotation of a value or a field in an error line [characters]: a value of 100 KB, or a
#: file's contents, is never echoed whole.
QUOTE_MAX = 80


#: Fields whose value is a path: a long one is cut from its start, so that the file's name stays.
PATH_FIELDS = ("case file", "--csv", "--out", "members_file", "fire.file", "fire.heat_release_file")


def quote(value, most: int = QUOTE_MAX, from_end: bool = False) -> str:
    """``repr(value)`` on one line (control characters escaped, as repr does for strings), cut to ``most``
    characters with an ellipsis: at its end, or with ``from_end`` at its start (a path keeps its file name)."""
    if isinstance(value, os.PathLike):
        value, from_end = os.fspath(value), True
    text = repr(value)
    text = "".join(c if c.isprintable() else repr(c)[1:-1] for c in text)
    if len(text) <= most:
        return text
    return text[0] + "..." + text[-(most - 4):] if from_end else text[: most - 3] + "..."


class InputError(ValueError):
    """Bad input, reported to the user as one line and exit code 2.

    Parameters
    ----------
    field : str
        Where the value came from, as the user wrote it (``member[2].thickness_mm``).
    value : object
        The offending value (quoted with ``repr``, escaped and cut to :data:`QUOTE_MAX` characters).
    allowed : str
        What would have been accepted (``"a number > 0 [mm]"``).
    """

    def __init__(self, field: str, value, allowed: str):
        self.field = field
        self.value = value
        self.allowed = allowed
        shown = quote(field, 2 * QUOTE_MAX)[1:-1] if isinstance(field, str) else quote(field)
        path = isinstance(field, str) and field.endswith(PATH_FIELDS)
        super().__init__(f"{shown or repr('')} = {quote(value, from_end=path)}: {_one_line(allowed)}")


def _one_line(text) -> str:
    return "".join(c if c.isprintable() else " " for c in str(text))


class OutOfScopeError(InputError):
    """A value outside a method's validity range (refused unless allow_out_of_scope)."""


class BudgetError(InputError):
    """A run that would need more memory or time than the documented limits allow."""
