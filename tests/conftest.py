"""Fixtures shared by the test modules."""

import pytest

from audit.rules import load_rules


@pytest.fixture(scope="session")
def rules():
    """The shipped rules, read once (tests must not change them)."""
    return load_rules()
