"""Distinct rows of a key table (audit/engine/distinct.py): exact grouping, never merging."""

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from hypothesis.extra import numpy as hnp

from audit.engine import distinct


def check_grouping(columns):
    first, group = distinct.distinct_rows(columns)
    bits = np.ascontiguousarray(columns).view(np.uint64)
    # Every row equals its representative bit for bit ...
    assert (bits[:, first[group]] == bits).all()
    # ... and each representative stands for its own group.
    assert (group[first] == np.arange(first.size)).all()
    return first, group


@settings(max_examples=60, deadline=None)
@given(hnp.arrays(np.float64, st.tuples(st.integers(1, 4), st.integers(0, 60)),
                  elements=st.sampled_from([0.0, 1.0, -2.5, np.nan, np.inf, 1e300])))
def test_rows_group_exactly_by_value(columns):
    first, group = check_grouping(columns)
    # Distinct bit patterns are distinct groups: as many groups as distinct rows.
    rows = {tuple(r) for r in np.ascontiguousarray(columns.T).view(np.uint64)} if columns.size else set()
    assert first.size == len(rows)


def test_repeated_rows_share_a_group_and_keep_first_occurrence():
    columns = np.array([[1.0, 2.0, 1.0, np.nan, np.nan], [5.0, 5.0, 5.0, 0.0, 0.0]])
    first, group = check_grouping(columns)
    assert list(first) == [0, 1, 3]
    assert list(group) == [0, 1, 0, 2, 2]


def test_hash_collisions_never_merge_rows(monkeypatch):
    # Force every row onto one hash: the bit comparison must still keep them apart.
    real = distinct.pd.factorize
    monkeypatch.setattr(distinct.pd, "factorize", lambda h: real(np.zeros_like(h)))
    columns = np.array([[1.0, 2.0, 1.0, 3.0]])
    first, group = check_grouping(columns)
    # Rows 0 and 2 agree and stay together; rows 1 and 3 become groups of their own.
    assert first.size == 3
    assert group[0] == group[2] and len({group[0], group[1], group[3]}) == 3


def test_integer_keys_and_empty_tables():
    first, group = check_grouping(np.array([[3, 3, 4]], dtype=np.int64))
    assert list(group) == [0, 0, 1]
    first, group = distinct.distinct_rows(np.empty((2, 0)))
    assert first.size == 0 and group.size == 0
    first, group = distinct.distinct_rows([np.array([1.0, 1.0]), np.array([2, 2])])
    assert list(first) == [0] and list(group) == [0, 0]
    with pytest.raises(TypeError, match="8-byte"):
        distinct.distinct_rows([np.array([1, 2], dtype=np.int32)])
    with pytest.raises(ValueError, match="one length"):
        distinct.distinct_rows([np.ones(2), np.ones(3)])


def test_distinct_count_never_exceeds_the_true_count():
    rng = np.random.default_rng(5)
    a = rng.choice([0.0, 1.0, 2.0], 500)
    b = rng.choice([10.0, np.nan], 500)
    true = len({(x, "nan" if y != y else y) for x, y in zip(a, b)})
    assert distinct.distinct_count([a, b]) == true  # no collisions at this size
    # Forced collisions can only lower the count.
    assert distinct.distinct_count([a]) <= true
