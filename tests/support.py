"""Helpers shared by the test modules (tests/ is on the import path: see pyproject.toml)."""

from audit.io.readers import read_register
from audit.thermal import resolve_names


def item_table(tmp_path, text, rules, *, name="reg.csv"):
    """The resolved item table of a register given as CSV text."""
    path = tmp_path / name
    path.write_text(text, encoding="utf-8")
    return resolve_names(read_register(path, aliases=rules.aliases), rules)
