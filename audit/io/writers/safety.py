"""Spreadsheet formula injection: text that a spreadsheet would run as a formula.

A text cell beginning with ``=``, ``+``, ``-``, ``@`` (or a tab or carriage return, which some
programs strip before looking) is prefixed with an apostrophe, the common practice that keeps
it visible as text (OWASP, "CSV Injection").  Numbers are never touched: they stay numbers.
"""

from __future__ import annotations

import numpy as np
import pandas as pd

_TRIGGERS = ("=", "+", "-", "@", "\t", "\r")


def neutralise_text(value):
    """``value`` made inert if it is text a spreadsheet would evaluate; anything else as is."""
    if isinstance(value, str) and value.startswith(_TRIGGERS):
        return "'" + value
    return value


def neutralise_frame(frame: pd.DataFrame) -> pd.DataFrame:
    """A copy of ``frame`` with every text cell of every object column neutralised, and the
    column labels too (a register's unknown columns arrive under their own headers).

    Registers repeat their texts heavily, so each distinct text is tested once
    (:func:`pandas.factorize`), not each cell.  Only cells whose type is exactly ``str`` count
    as text in an object column; in a string column every non-missing cell does.
    """
    out = frame.copy()
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
    """Which cells of ``texts`` (str or missing) start with a trigger; each distinct text is
    tested once."""
    codes, uniques = pd.factorize(texts)
    if not len(uniques):
        return np.zeros(len(codes), bool)
    uniques = np.asarray(uniques, dtype=object).tolist()  # iterating an Index is slower
    hits = np.fromiter((u.startswith(_TRIGGERS) for u in uniques), bool, len(uniques))
    return hits[codes] & (codes >= 0)  # code -1 is a missing cell


def _object_triggers(values: np.ndarray) -> np.ndarray:
    """Which cells of an object array are ``str`` starting with a trigger."""
    is_text = np.fromiter((type(v) is str for v in values), bool, len(values))
    starts = np.zeros(len(values), bool)
    if is_text.any():
        starts[is_text] = _text_triggers(values[is_text])
    return starts
