"""Per-distinct-text parsing and per-row notes (audit/io/readers/column.py)."""

import numpy as np
import pandas as pd

from audit.io.readers.column import Column, RowNotes
from audit.io.readers.sheet import factorize_stripped


def test_column_parses_each_distinct_text_once_and_spreads_back():
    texts = pd.Series([" 2 ", "2", "x", "", "x", "2"], dtype=object)
    column = Column("nps", factorize_stripped(texts), len(texts), None)
    calls = []

    def parser(text):
        calls.append(text)
        return (float(text), None) if text != "x" else (np.nan, "is not a number")

    answers = column.parse(parser, empty=(0.0, None))
    assert sorted(calls) == ["2", "x"]  # " 2 " and "2" are one text once stripped
    values = column.spread(answers, 0, dtype=float)
    assert values[[0, 1, 3, 5]].tolist() == [2.0, 2.0, 0.0, 2.0] and np.isnan(values[2])
    assert column.given.tolist() == [True, True, True, False, True, True]
    assert column.messages([a[1] for a in answers]).tolist() == [
        "", "", 'nps: "x" is not a number', "", 'nps: "x" is not a number', ""]


def test_decimal_comma_merges_texts():
    texts = pd.Series(["1,5", "1.5"], dtype=object)
    column = Column("nps", factorize_stripped(texts), 2, None, decimal_comma=True)
    assert column.uniques.tolist() == ["1.5"] and column.codes.tolist() == [0, 0]


def test_row_notes_join_in_order_and_skip_empty_texts():
    notes = RowNotes(3)
    notes.reject(np.array([True, False, True]), "a: first")
    notes.reject(np.array([True, True, True]), np.array(["a: second", "", "b: x"], dtype=object))
    notes.warn(np.array([False, True, False]), "c: warned")
    assert notes.reason.tolist() == ["a: first; a: second", "", "a: first; b: x"]
    assert notes.warning.tolist() == ["", "c: warned", ""]
