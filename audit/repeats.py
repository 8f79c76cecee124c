"""Work done once per distinct value: a register repeats itself.

A 100,000-row register holds a few hundred distinct layer builds, jackets, conditions and
sites.  Looking names up, summing thicknesses or wording a message once per distinct value,
then spreading the answers over the rows, is what keeps the readers, the checks and the
economics fast.  Rows are grouped exactly (:func:`pandas.factorize`, then
:func:`audit.engine.distinct.distinct_rows` for several columns), never by similarity.
"""

from __future__ import annotations

from collections.abc import Callable

import numpy as np
import pandas as pd

from audit.engine.distinct import distinct_rows


def per_distinct(function: Callable, *columns) -> np.ndarray:
    """``function(*cells)`` of every row's cells in ``columns``, called once per distinct
    combination: an object array, one value per row.

    Cells compare by value; missing cells (None, NaN) are one value and reach ``function``
    as NaN.  ``columns`` are equally long 1-d numpy arrays (object arrays may hold tuples).
    """
    factorized = [pd.factorize(np.asarray(c), use_na_sentinel=False) for c in columns]
    if len(factorized) == 1:  # the codes are the groups; each group's first row
        group = factorized[0][0]
        first = np.full(len(factorized[0][1]), group.size)
        np.minimum.at(first, group, np.arange(group.size))
    else:
        first, group = distinct_rows([codes.astype(np.int64) for codes, _ in factorized])
    values = np.empty(first.size, dtype=object)
    for k, i in enumerate(first):  # one by one: a tuple result stays one object
        values[k] = function(*(uniques[codes[i]] for codes, uniques in factorized))
    return values[group]


def map_values(names, mapping: dict, default=np.nan, dtype=float) -> np.ndarray:
    """``mapping[name]`` for each of ``names`` (``default`` where absent), one lookup per
    distinct name."""
    return per_distinct(lambda name: mapping.get(name, default),
                        np.asarray(names, dtype=object)).astype(dtype)


def tuples_of(values) -> np.ndarray:
    """An object array of 1-tuples ``(v,)``, one built per distinct value."""
    return per_distinct(lambda v: (v,), np.asarray(values, dtype=object))
