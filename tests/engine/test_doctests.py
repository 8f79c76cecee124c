"""The examples in the engine's docstrings run and print what they say (as pvlib's and fluids' do)."""

import doctest
import importlib

import numpy as np
import pytest

# Modules whose public model functions carry an Examples section; add yours here.
MODULES = ["audit.engine.conduction", "audit.engine.geometry", "audit.engine.psychrometrics"]


@pytest.mark.parametrize("name", MODULES)
def test_docstring_examples_hold(name):
    module = importlib.import_module(name)
    # numpy prints arrays as NumPy 2 does whatever version runs the tests.
    with np.printoptions(legacy=False):
        failed, attempted = doctest.testmod(module, optionflags=doctest.NORMALIZE_WHITESPACE)
    assert attempted > 0, f"{name} has no docstring examples"
    assert failed == 0
