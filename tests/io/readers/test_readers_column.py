"""Per-distinct-text parsing and per-row problems (audit/io/readers/column.py)."""

import numpy as np
import pandas as pd
import pytest

from audit.io.readers.column import Column, RowNotes
from audit.io.readers.sheet import factorize_stripped
from audit.problems import Problem


def test_column_parses_each_distinct_text_once_and_spreads_back():
    texts = pd.Series([" 2 ", "2", "x", "", "x", "2"], dtype=object)
    column = Column("nps", factorize_stripped(texts), len(texts), None)
    calls = []

    def parser(text):
        calls.append(text)
        return (float(text), None) if text != "x" else (np.nan, NOT_A_NUMBER)

    answers = column.parse(parser, empty=(0.0, None))
    assert sorted(calls) == ["2", "x"]  # " 2 " and "2" are one text once stripped
    values = column.spread(answers, 0, dtype=float)
    assert values[[0, 1, 3, 5]].tolist() == [2.0, 2.0, 0.0, 2.0] and np.isnan(values[2])
    assert column.given.tolist() == [True, True, True, False, True, True]
    notes = RowNotes(len(texts))
    notes.cells("reject", np.ones(len(texts), bool), column, [a[1] for a in answers])
    found = notes.records()
    assert found[["row", "column", "code", "value", "expected"]].values.tolist() == [
        [2, "nps", "not-a-number", "x", "a number"], [4, "nps", "not-a-number", "x", "a number"]]
    assert notes.texts(found)[0].tolist() == [
        "", "", 'nps: "x" is not a number; expected a number', "",
        'nps: "x" is not a number; expected a number', ""]


NOT_A_NUMBER = Problem("not-a-number", "is not a number", "a number")


def test_decimal_comma_merges_texts():
    texts = pd.Series(["1,5", "1.5"], dtype=object)
    column = Column("nps", factorize_stripped(texts), 2, None, decimal_comma=True)
    assert column.uniques.tolist() == ["1.5"] and column.codes.tolist() == [0, 0]


def test_row_notes_join_in_order_and_skip_rows_without_a_problem():
    notes = RowNotes(3)
    first = Problem("empty", "empty", "something")
    notes.reject(np.array([True, False, True]), "a", first)
    notes.reject(np.array([True, True, True]), np.array(["a", "a", "b"], dtype=object),
                 np.array([NOT_A_NUMBER, None, NOT_A_NUMBER], dtype=object),
                 value=np.array(["p", "q", "r"], dtype=object))
    notes.warn(np.array([False, True, False]), "c", Problem("ignored", "warned"))
    reason, warning = notes.texts(notes.records())
    assert reason.tolist() == ['a: empty; expected something; a: "p" is not a number; expected '
                               'a number', "", 'a: empty; expected something; b: "r" is not a '
                               'number; expected a number']
    assert warning.tolist() == ["", "c: warned", ""]


def test_blank_rows_keep_one_problem():
    notes = RowNotes(2)
    notes.reject(np.array([True, True]), "tag", Problem("empty", "empty", "a tag"))
    notes.blank(np.array([False, True]))
    found = notes.records()
    assert found[["row", "code"]].values.tolist() == [[0, "empty"], [1, "blank-row"]]
    assert notes.texts(found)[0].tolist() == ["tag: empty; expected a tag", "row is blank"]


def test_an_unknown_code_is_refused():
    with pytest.raises(ValueError, match="unknown problem code"):
        Problem("no-such-code", "said")
