"""Distinct rows of a numeric key table, so that each distinct problem is solved once.

A register repeats itself: the same pipe size at the same temperature with the same
insulation appears hundreds of times, and a pipe's per-metre problem does not depend on its
length.  Wall elements whose solver inputs are equal give equal answers, so the engine
solves one representative of each group and copies the answer to the rest.

Grouping is exact: rows are grouped by a 64-bit hash of their bits, then every row is
compared bit for bit with its group's representative, and a row that differs (a hash
collision) becomes a group of its own.  Comparing bits, a -0.0 and a 0.0 land in separate
groups: only ever too cautious.
"""

from __future__ import annotations

import numpy as np
import pandas as pd

_MULTIPLIER = np.uint64(0x9E3779B97F4A7C15)  # 2**64 / golden ratio, a common hash multiplier
_SHIFT = np.uint64(31)

#: Equal items or elements are solved once when they leave at most this share distinct;
#: above it, gathering the distinct ones costs more than solving the repeats.
WORTH_SHARING = 0.8


def distinct_rows(columns) -> tuple[np.ndarray, np.ndarray]:
    """Representatives and group of each row of a key table.

    Parameters
    ----------
    columns : sequence of numpy.ndarray, each shape (m,), or numpy.ndarray, shape (c, m)
        The key, column by column, each of an 8-byte dtype (float64, int64, uint64).

    Returns
    -------
    first : numpy.ndarray of int, shape (g,)
        Position of one representative row per group.
    group : numpy.ndarray of int, shape (m,)
        Group of each row: every column at ``first[group]`` equals the column, bit for bit.
    """
    bits = _bits(columns)
    m = bits[0].size
    if m == 0:
        return np.empty(0, int), np.empty(0, int)
    # Columns that hold one value throughout (a scenario's air, unused layer slots) cannot
    # tell rows apart: leave them out of the hash and the comparison.
    varying = [b for b in bits if not (b == b[0]).all()]
    h = _hash(varying, m)
    group, uniques = pd.factorize(h)
    if uniques.size == m:
        return np.arange(m), np.arange(m)  # all apart: nothing to verify
    first = np.full(uniques.size, m)
    np.minimum.at(first, group, np.arange(m))
    representative = first[group]
    same = np.ones(m, bool)
    for column in varying:
        same &= column[representative] == column
    if not same.all():
        # Hash collisions: each differing row becomes its own group.
        lone = np.flatnonzero(~same)
        group = group.copy()
        group[lone] = uniques.size + np.arange(lone.size)
        first = np.concatenate([first, lone])
    return first, group


def distinct_count(columns) -> int:
    """How many distinct rows ``columns`` hold (as for :func:`distinct_rows`), counted by
    hash alone: rows whose hashes collide count once, so the count is never above the truth,
    and a count above a threshold proves that the rows are at least that varied."""
    bits = _bits(columns)
    return pd.unique(_hash(bits, bits[0].size)).size


def _bits(columns) -> list[np.ndarray]:
    """The columns as unsigned 64-bit views, checked."""
    bits = []
    for column in columns:
        column = np.ascontiguousarray(column)
        if column.dtype.itemsize != 8 or column.ndim != 1:
            raise TypeError(f"distinct_rows needs 1-d columns of an 8-byte dtype, not "
                            f"{column.dtype} of shape {column.shape}")
        bits.append(column.view(np.uint64))
    if not bits or any(b.size != bits[0].size for b in bits):
        raise ValueError("distinct_rows needs one or more columns of one length")
    return bits


def _hash(bits: list[np.ndarray], m: int) -> np.ndarray:
    """A 64-bit hash of each of the m rows of the columns ``bits``."""
    h = np.full(m, np.uint64(0xCBF29CE484222325))  # any non-zero start
    with np.errstate(over="ignore"):
        for column in bits:
            h ^= column
            h *= _MULTIPLIER
            h ^= h >> _SHIFT
    return h


def may_repeat(columns) -> bool:
    """Whether rows keyed on ``columns`` among others can leave few enough distinct to share:
    a whole key has at least as many distinct rows as a few of its columns, and counting
    those is cheap next to hashing them all (a register of random values stops here)."""
    return distinct_count(columns) <= WORTH_SHARING * len(columns[0])
