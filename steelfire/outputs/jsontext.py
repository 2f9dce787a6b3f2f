"""JSON text of a list of flat objects held by column, as ``json.dumps`` writes it.

The member entries of a large result document are about twenty keys each, fifteen of them numbers
already rounded to a decimal grid (0.01 for temperatures and times, six significant figures for
factors; see :mod:`steelfire.results`). Written by ``json.dumps`` from one dict per member, or by
Python string formatting, that costs more per member than the member's heat-transfer kernels. Here a
small numba kernel writes the whole list from the columns: the keys, the numbers (from integer
arithmetic) and, for every other value, a JSON fragment the caller has encoded (strings, booleans,
nested objects).

Why the integer text is the repr: if v is the double nearest to m 10^q with m an integer below
10^15, then v is the only double any decimal of 15 or fewer significant digits near it rounds to
(decimals that short are spaced more widely than doubles), so the shortest decimal that reads back
as v, which ``repr`` writes, is m 10^q with the trailing zeros of m dropped. The kernel checks that
v is that nearest double (one correctly rounded multiplication or division by an exact power of
ten) and leaves every value it cannot vouch for, or that ``repr`` would write with an exponent
(below 1e-4 or from 1e16 on), to ``json.dumps`` (the whole list is then written by the caller's
slower path). Not a clause of any standard: output
formatting only, held to ``json.dumps`` character for character in tests/test_jsontext.py.
"""

from __future__ import annotations

import json
import math
from dataclasses import dataclass

import numba as nb
import numpy as np

#: 10^0 ... 10^22, every one exact in binary64.
_POW10 = np.array([10.0 ** k for k in range(23)])
#: Bytes a value's text can take, separator included ("-", 16 digits, "0." and three zeros, "\n").
_MAX_TEXT = 26
_MINUS, _DOT, _ZERO = 45, 46, 48
_TEN = np.uint64(10)




@nb.njit(cache=True, inline="always")
def _put_number(x, places, sig, out, pos, digits):  # pragma: no cover - compiled
    """Write ``x`` as ``float.__repr__`` does at ``out[pos:]``; return the next position, -1 if the
    value is not one the kernel can vouch for (see the module notes). NaN is written ``null``.

    The decimal grid: ``sig`` > 0 significant figures, else ``places`` decimal places.
    """
    if x != x:
        out[pos] = 110  # n
        out[pos + 1] = 117  # u
        out[pos + 2] = 108  # l
        out[pos + 3] = 108  # l
        return pos + 4
    a = abs(x)
    if not a < 1.0e300:
        return -1
    m = np.uint64(0)
    q = 0
    if a > 0.0:
        q = -places
        if sig > 0:
            q = int(math.floor(math.log10(a))) - (sig - 1)
        if q < -22 or q > 22:
            return -1
        if q < 0:
            y = math.floor(a * _POW10[-q] + 0.5)
            if not (y < 1.0e15 and y / _POW10[-q] == a):
                return -1
        else:
            y = math.floor(a / _POW10[q] + 0.5)
            if not (y < 1.0e15 and y * _POW10[q] == a):
                return -1
        m = np.uint64(y)  # unsigned: division by the constant 10 compiles to a multiplication
        while m % _TEN == 0:
            m //= _TEN
            q += 1
    nd = 0
    r = np.uint64(m)
    while True:
        digits[nd] = _ZERO + r % _TEN  # least significant first
        nd += 1
        r //= _TEN
        if r == 0:
            break
    if m == 0:
        q = 0
    decpt = nd + q  # digits before the decimal point
    if decpt <= -4 or decpt > 16:
        return -1  # repr writes these with an exponent
    if math.copysign(1.0, x) < 0.0:
        out[pos] = _MINUS
        pos += 1
    if decpt <= 0:
        out[pos] = _ZERO
        out[pos + 1] = _DOT
        pos += 2
        for _ in range(-decpt):
            out[pos] = _ZERO
            pos += 1
        for k in range(nd - 1, -1, -1):
            out[pos] = digits[k]
            pos += 1
    elif decpt >= nd:
        for k in range(nd - 1, -1, -1):
            out[pos] = digits[k]
            pos += 1
        for _ in range(decpt - nd):
            out[pos] = _ZERO
            pos += 1
        out[pos] = _DOT
        out[pos + 1] = _ZERO
        pos += 2
    else:
        for k in range(nd - 1, -1, -1):
            if k == nd - 1 - decpt:
                out[pos] = _DOT
                pos += 1
            out[pos] = digits[k]
            pos += 1
    return pos


@nb.njit(cache=True)
def _write_objects(n, is_number, column, literals, literal_at, numbers, places, sig, pool, pool_at, row_sep,
                   out):  # pragma: no cover - compiled; held to json.dumps in tests
    """Write ``n`` objects to ``out``, ``row_sep`` between them; return the bytes used, -1 if a number
    could not be written.

    Field j of a row: the literal ``literals[literal_at[j]:literal_at[j + 1]]`` (its key), then
    ``numbers[column[j], i]`` if ``is_number[j]`` else the fragment
    ``pool[pool_at[column[j], i]:pool_at[column[j], i + 1]]``; the last literal closes the object.
    """
    nf = is_number.size
    digits = np.empty(20, np.uint8)
    pos = 0
    for i in range(n):
        if i > 0:
            out[pos] = row_sep
            pos += 1
        for j in range(nf + 1):
            a, b = literal_at[j], literal_at[j + 1]
            out[pos:pos + b - a] = literals[a:b]
            pos += b - a
            if j == nf:
                break
            c = column[j]
            if is_number[j]:
                pos = _put_number(numbers[c, i], places[c], sig[c], out, pos, digits)
                if pos < 0:
                    return -1
            else:
                a, b = pool_at[c, i], pool_at[c, i + 1]
                out[pos:pos + b - a] = pool[a:b]
                pos += b - a
    return pos


@dataclass(frozen=True)
class Numbers:
    """A column of floats for :func:`objects_json`: None or NaN is written ``null``.

    The values are expected on a decimal grid, ``places`` decimal places or, when ``sig`` > 0,
    ``sig`` significant figures (what :func:`steelfire.results.round_column` and ``sig_column``
    give); a value off the grid makes :func:`objects_json` return None.
    """

    values: object
    places: int = 2
    sig: int = 0


def objects_json(columns: dict, row_separator: str = ",") -> str | None:
    """``json.dumps`` of the list of objects whose keys and values are ``columns``, without brackets.

    ``columns`` maps each key, in order, to a :class:`Numbers` column or to a list of JSON fragments
    (text ``json.dumps`` would write for the value: ``json.encoder.encode_basestring_ascii`` for a
    string, ``true``, ``null``, a nested object). The text equals
    ``json.dumps(rows, separators=(",", ":"))[1:-1]`` (``row_separator`` between the objects), or
    None if a number is off its grid or one ``float.__repr__`` writes with an exponent, or not
    finite: the caller then writes the list by ``json.dumps`` (which refuses infinities).
    """
    keys = list(columns)
    if not keys:
        return None
    number_cols, fragment_cols, is_number, column = [], [], [], []
    for key in keys:
        col = columns[key]
        if isinstance(col, Numbers):
            is_number.append(True)
            column.append(len(number_cols))
            number_cols.append(col)
        else:
            is_number.append(False)
            column.append(len(fragment_cols))
            fragment_cols.append(col)
    n = len(number_cols[0].values) if number_cols else len(fragment_cols[0])
    numbers = np.empty((max(len(number_cols), 1), n), dtype=np.float64)
    for c, col in enumerate(number_cols):
        v = col.values
        if isinstance(v, np.ndarray):
            numbers[c] = v
        else:
            numbers[c] = [math.nan if x is None else x for x in v]
    places = np.array([c.places for c in number_cols] or [0], dtype=np.int64)
    sig = np.array([c.sig for c in number_cols] or [0], dtype=np.int64)
    pool_at = np.zeros((max(len(fragment_cols), 1), n + 1), dtype=np.int64)
    base = 0
    for c, col in enumerate(fragment_cols):
        if len(col) != n:
            raise ValueError(f"column {keys[column.index(c)]!r} has {len(col)} rows, not {n}")
        pool_at[c, 1:] = np.cumsum(np.fromiter(map(len, col), dtype=np.int64, count=n))
        pool_at[c] += base
        base = int(pool_at[c, n])
    text = "".join("".join(col) for col in fragment_cols)
    if not text.isascii():
        return None  # offsets above count characters; the fragments are ASCII (ensure_ascii)
    # writable arrays throughout, so that the kernel has one signature (read-only arrays are a type of their own)
    pool = np.frombuffer(bytearray(text.encode("ascii") or b" "), dtype=np.uint8)
    pieces = ['{"' if i == 0 else ',"' for i in range(len(keys))]
    literal_text = [p + k + '":' for p, k in zip(pieces, (json.encoder.encode_basestring_ascii(k)[1:-1]
                                                          for k in keys))] + ["}"]
    literals = np.frombuffer(bytearray("".join(literal_text).encode("ascii")), dtype=np.uint8)
    literal_at = np.concatenate([[0], np.cumsum([len(t) for t in literal_text])]).astype(np.int64)
    size = n * (int(literal_at[-1]) + 1 + _MAX_TEXT * len(number_cols)) + base + 1
    out = np.empty(size, dtype=np.uint8)
    used = _write_objects(n, np.array(is_number, dtype=np.bool_), np.array(column, dtype=np.int64), literals,
                          literal_at, numbers, places, sig, pool, pool_at, ord(row_separator), out)
    if used < 0:
        return None
    return str(memoryview(out)[:used], "ascii")
