"""What the checks share (audit/checks/base.py): the per-distinct-combination helper."""

import numpy as np
from hypothesis import given, settings
from hypothesis import strategies as st

from audit.checks.base import has_layers, per_distinct


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


def test_tuple_results_stay_one_object_per_row():
    got = per_distinct(lambda a: (a, a * 2), np.array([1, 2, 1]))
    assert list(got) == [(1, 2), (2, 4), (1, 2)]


def test_has_layers():
    table = {"layer_materials": np.array([("a",), (), None, ("a", "b")], dtype=object)}
    assert list(has_layers(_Frame(table))) == [True, False, False, True]


class _Frame(dict):
    """Just enough of a DataFrame: ``frame[column].to_numpy(dtype)``."""

    def __getitem__(self, key):
        values = dict.__getitem__(self, key)

        class Column:
            def to_numpy(self, dtype=None):
                return values
        return Column()
