"""Spreadsheet formula injection: text that a spreadsheet would run as a formula.

A text cell is made inert with a leading apostrophe, the common practice that keeps it visible
as text (OWASP, "CSV Injection"), when it begins with

- ``=``, ``+``, ``-`` or ``@``, or their full-width forms U+FF1D, U+FF0B, U+FF0D, U+FF20
  (some spreadsheets fold them to the ASCII characters), also behind leading white space
  (spaces, no-break spaces, ...), which some programs strip before they look;
- a tab, carriage return or line feed.

A plain number written as text (``-5``, ``+1.5e3``) is left alone: a spreadsheet reads it as the
number it is, which runs nothing.  Number cells are never touched: they stay numbers.
"""

from __future__ import annotations

import numpy as np
import pandas as pd

#: First characters (after any leading white space) that start a formula.
TRIGGERS = ("=", "+", "-", "@", "\uff1d", "\uff0b", "\uff0d", "\uff20")
#: Leading characters that are neutralised whatever follows them.
_LEADING = ("\t", "\r", "\n")
_DIGITS = frozenset("0123456789")


def needs_prefix(text: str) -> bool:
    """Whether a spreadsheet could run ``text`` as a formula (see the module's rules)."""
    if text.startswith(_LEADING):
        return True
    body = text.lstrip()
    return body.startswith(TRIGGERS) and not is_plain_number(text)


def is_plain_number(text: str) -> bool:
    """``text`` is an ASCII decimal number, nothing else: sign, digits, one point, exponent.

    Written without a regular expression, so it is linear in the text's length.
    """
    mantissa, has_exponent, exponent = text.lower().partition("e")
    if has_exponent and not _unsigned_digits(exponent[1:] if exponent[:1] in "+-" else exponent):
        return False
    whole, _, fraction = (mantissa[1:] if mantissa[:1] in ("+", "-") else mantissa).partition(".")
    return bool(whole or fraction) and set(whole) <= _DIGITS and set(fraction) <= _DIGITS


def as_number(text):
    """A register's number written as text (``-170``, ``1.5e3``) as the float it is, for a
    spreadsheet's number cell; any other text (``007``, whose zeros are part of it, ``1,5``,
    ``TBA``) as it is."""
    if not isinstance(text, str):
        return text
    body = text.strip()
    digits = body.lstrip("+-")
    if not is_plain_number(body) or (len(digits) > 1 and digits[0] == "0" and digits[1] != "."):
        return text
    return float(body)


def _unsigned_digits(text: str) -> bool:
    return bool(text) and set(text) <= _DIGITS


def neutralise_text(value):
    """``value`` made inert if it is text a spreadsheet would evaluate; anything else as is."""
    if isinstance(value, str) and needs_prefix(value):
        return "'" + value
    return value


def neutralise_frame(frame: pd.DataFrame) -> pd.DataFrame:
    """A copy of ``frame`` with every text cell of every object column neutralised, and the
    column labels too (a register's unknown columns arrive under their own headers).

    Registers repeat their texts heavily, so each distinct text is tested once
    (:func:`pandas.factorize`), not each cell.  Only cells whose type is exactly ``str`` count
    as text in an object column; in a string column every non-missing cell does.
    """
    out = frame.copy(deep=False)
    out.columns = [neutralise_text(str(c)) for c in out.columns]
    for position in range(out.shape[1]):
        series = out.iloc[:, position]
        if series.dtype == object:
            starts = _object_triggers(series.to_numpy(object))
        elif pd.api.types.is_string_dtype(series):
            starts = _text_triggers(series)
        else:
            continue
        if starts.any():
            values = series.to_numpy(object).copy()
            values[starts] = ["'" + v for v in values[starts]]
            out.isetitem(position, values)
    return out


def _text_triggers(texts) -> np.ndarray:
    """Which cells of ``texts`` (str or missing) need the prefix; each distinct text is tested
    once."""
    codes, uniques = pd.factorize(texts)
    if not len(uniques):
        return np.zeros(len(codes), bool)
    uniques = np.asarray(uniques, dtype=object).tolist()  # iterating an Index is slower
    hits = np.fromiter(map(needs_prefix, uniques), bool, len(uniques))
    return hits[codes] & (codes >= 0)  # code -1 is a missing cell


def _object_triggers(values: np.ndarray) -> np.ndarray:
    """Which cells of an object array are ``str`` needing the prefix."""
    is_text = np.fromiter((type(v) is str for v in values), bool, len(values))
    starts = np.zeros(len(values), bool)
    if is_text.any():
        starts[is_text] = _text_triggers(values[is_text])
    return starts
