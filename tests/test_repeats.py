"""Work done once per distinct value (audit/repeats.py)."""

import numpy as np
import pandas as pd
from hypothesis import given, settings
from hypothesis import strategies as st

from audit.repeats import per_distinct, tuples_of


@settings(max_examples=60, deadline=None)
@given(st.lists(st.tuples(st.sampled_from(["a", "b", "", None]),
                          st.sampled_from([0.0, 1.5, float("nan"), -2.0]),
                          st.sampled_from([("x",), ("x", "y"), (), None])), max_size=40))
def test_equals_calling_the_function_on_every_row(rows):
    # The oracle is the plain loop: one call per row.
    calls = []

    def missing_as_none(x):
        return None if x is None or x != x else x

    def word(text, number, layers):
        calls.append(1)
        return tuple(missing_as_none(x) for x in (text, number, layers))

    columns = [np.array([r[k] for r in rows] + [None], dtype=object)[:-1] for k in range(3)]
    got = per_distinct(word, *columns)
    assert len(got) == len(rows)
    for value, row in zip(got, rows):
        assert value == tuple(missing_as_none(x) for x in row)
    # ... but once per distinct combination only (missing cells are one value).
    distinct = {tuple(missing_as_none(x) for x in row) for row in rows}
    assert len(calls) == len(distinct)


def test_one_column_with_missing_cells():
    # The one-column path: missing cells (None and NaN alike) reach the function as NaN.
    column = np.array(["a", None, "b", np.nan, "a"], dtype=object)
    got = per_distinct(lambda v: "missing" if v != v else v.upper(), column)
    assert list(got) == ["A", "missing", "B", "missing", "A"]


def test_tuple_results_stay_one_object_per_row():
    got = per_distinct(lambda a: (a, a * 2), np.array([1, 2, 1]))
    assert list(got) == [(1, 2), (2, 4), (1, 2)]


def test_tuples_of_builds_one_tuple_per_row():
    got = tuples_of(np.array(["a", "b", "a"], dtype=object))
    assert list(got) == [("a",), ("b",), ("a",)]
    assert list(tuples_of(pd.Series([0.05, 0.05]).to_numpy())) == [(0.05,), (0.05,)]
