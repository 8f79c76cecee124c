"""Where the data that ships with lagaudit lives: the rule files and the demo plant.

A wheel carries them inside the package (``audit/_shipped/<name>``, see pyproject.toml); a
source checkout has them at the top of the repository.
"""

from __future__ import annotations

from pathlib import Path

from audit.errors import LagauditError

_PACKAGE = Path(__file__).resolve().parent


def shipped_dir(name: str) -> Path:
    """The shipped folder ``name`` (``rules`` or ``sample_data``)."""
    for candidate in (_PACKAGE / "_shipped" / name, _PACKAGE.parent / name):
        if candidate.is_dir():
            return candidate
    raise LagauditError(f"the shipped {name!r} folder is missing from this installation",
                        expected=f"a {name!r} folder beside the 'audit' package; reinstall lagaudit")
