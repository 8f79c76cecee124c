"""What the checks share (audit/checks/base.py): facts of the item table."""

import numpy as np
from audit.checks.base import has_layers


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

