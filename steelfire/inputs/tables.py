"""Reading one TOML table of a case file: types and ranges checked, unknown keys refused."""

from __future__ import annotations

import difflib
import math

from steelfire.errors import InputError


class TableReader:
    """Reads one TOML table, checking types and ranges, and refuses keys nobody read.

    With ``keys``, keys outside that list are refused at once, before any value is read.
    """

    def __init__(self, data, where: str, keys=None):
        if not isinstance(data, dict):
            raise InputError(where, data, "must be a table")
        self.data = data
        self.where = where
        self.seen = set()
        if keys is not None:
            self.done(allowed=keys)

    def _f(self, key):
        return f"{self.where}.{key}" if self.where else key

    def has(self, key):
        return key in self.data

    def raw(self, key, default=None):
        self.seen.add(key)
        return self.data.get(key, default)

    def number(self, key, unit, *, required=True, default=None, lo=None, hi=None, lo_open=False,
               integer=False):
        self.seen.add(key)
        if key not in self.data:
            if required:
                raise InputError(self._f(key), None, f"is missing; give a number [{unit}]")
            return default
        v = self.data[key]
        if isinstance(v, bool) or not isinstance(v, (int, float)):
            raise InputError(self._f(key), v, f"must be a number [{unit}] (units are in the key name)")
        if not math.isfinite(v):
            raise InputError(self._f(key), v, f"must be a finite number [{unit}]")
        if integer and v != int(v):
            raise InputError(self._f(key), v, "must be a whole number")
        lo_ok = lo is None or (v > lo if lo_open else v >= lo)
        hi_ok = hi is None or v <= hi
        if not (lo_ok and hi_ok):
            raise InputError(self._f(key), v, range_text(lo, hi, lo_open, unit))
        return float(v) if not integer else int(v)

    def string(self, key, *, required=True, default=None, choices=None):
        self.seen.add(key)
        if key not in self.data:
            if required:
                raise InputError(self._f(key), None, "is missing" + (f"; one of {', '.join(choices)}" if choices else ""))
            return default
        v = self.data[key]
        if not isinstance(v, str):
            raise InputError(self._f(key), v, "must be a string" + (f": one of {', '.join(choices)}" if choices else ""))
        if choices is not None and v not in choices:
            raise InputError(self._f(key), v, f"must be one of {', '.join(choices)}")
        return v

    def boolean(self, key, *, default=None):
        self.seen.add(key)
        if key not in self.data:
            return default
        v = self.data[key]
        if not isinstance(v, bool):
            raise InputError(self._f(key), v, "must be true or false")
        return v

    def done(self, allowed=None):
        unknown = [k for k in self.data if k not in self.seen and (allowed is None or k not in allowed)]
        if unknown:
            k = unknown[0]
            close = difflib.get_close_matches(k, sorted(self.seen | set(allowed or ())), n=2)
            hint = f"; did you mean {' or '.join(close)}?" if close else ""
            raise InputError(self._f(k), self.data[k], "is not a known key" + hint)


def range_text(lo, hi, lo_open, unit):
    if lo is not None and hi is not None:
        return f"must be {'>' if lo_open else '>='} {lo:g} and <= {hi:g} [{unit}]"
    if lo is not None:
        return f"must be {'>' if lo_open else '>='} {lo:g} [{unit}]"
    return f"must be <= {hi:g} [{unit}]"
