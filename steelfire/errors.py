"""Input errors: one line naming the field, the value and what is allowed."""

from __future__ import annotations


class InputError(ValueError):
    """Bad input, reported to the user as one line and exit code 2.

    Parameters
    ----------
    field : str
        Where the value came from, as the user wrote it (``member[2].thickness_mm``).
    value : object
        The offending value (quoted with ``repr``).
    allowed : str
        What would have been accepted (``"a number > 0 [mm]"``).
    """

    def __init__(self, field: str, value, allowed: str):
        self.field = field
        self.value = value
        self.allowed = allowed
        super().__init__(f"{field} = {value!r}: {allowed}")


class OutOfScopeError(InputError):
    """A value outside a method's validity range (refused unless allow_out_of_scope)."""
