"""Spreadsheet formula injection: text that a spreadsheet would run as a formula.

A text cell beginning with ``=``, ``+``, ``-``, ``@`` (or a tab or carriage return, which some
programs strip before looking) is prefixed with an apostrophe, the common practice that keeps
it visible as text (OWASP, "CSV Injection").  Numbers are never touched: they stay numbers.
"""

from __future__ import annotations

import pandas as pd

_TRIGGERS = ("=", "+", "-", "@", "\t", "\r")


def neutralise_text(value):
    """``value`` made inert if it is text a spreadsheet would evaluate; anything else as is."""
    if isinstance(value, str) and value.startswith(_TRIGGERS):
        return "'" + value
    return value


def neutralise_frame(frame: pd.DataFrame) -> pd.DataFrame:
    """A copy of ``frame`` with every text cell of every object column neutralised, and the
    column labels too (a register's unknown columns arrive under their own headers)."""
    out = frame.copy()
    out.columns = [neutralise_text(str(c)) for c in out.columns]
    for column in out.columns:
        series = out[column]
        if series.dtype == object or pd.api.types.is_string_dtype(series):
            is_text = series.map(type).eq(str).to_numpy() if series.dtype == object else \
                series.notna().to_numpy()
            starts = series.astype(str).str.startswith(_TRIGGERS).to_numpy(bool) & is_text
            if starts.any():
                values = series.to_numpy(object).copy()
                values[starts] = ["'" + v for v in values[starts]]
                out[column] = values
    return out
