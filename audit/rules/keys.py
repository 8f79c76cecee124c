"""The one validator and the one layering rule of every rule-file section.

A section's schema is ``{key: (converter, required)}`` (converters in
:mod:`audit.rules.converters`).  :func:`convert_keys` checks a table against it: materials,
jackets and the other named sections (``audit.rules.loader``), each check's own parameters
(``audit.checks.base``) and the economic rules (``audit.economics.rules``) all go through it,
so an unknown key, a bad value and a missing key read alike wherever they are.

Layering, the one rule for every section: a later file's table replaces the earlier table of
its name whole (``[material.NAME]``, ``[check.NAME]``, ``[thicknesses]``,
``[economics.heat]``); a key directly under ``[defaults]`` or ``[economics]`` replaces the
earlier key; ``[alias]`` lists add up; ``[words.COLUMN]`` words add up, a later file's word
replacing the earlier one.
"""

from __future__ import annotations

from collections.abc import Callable

from audit.errors import Problem
from audit.units import UnitParseError


def convert_keys(entry: dict, keys: dict, *, where: str, origin, problems: list[Problem],
                 known: tuple = (), unknown_note: str = "", missing_file: str | None = None,
                 expected_missing: Callable[[str], str] = lambda key: f"{key} = ...") -> dict:
    """Each key of ``entry`` converted by its converter in ``keys``.

    Parameters
    ----------
    entry : dict
        The table as read (key -> raw value).
    keys : dict
        The schema: key -> (converter, required).
    where : str
        The table's dotted name (``material.mineral-wool``), for the problems' column.
    origin : str or dict
        The file the table came from, or key -> file when its keys were layered from several.
    problems : list of Problem
        Appended to: one per unknown key, invalid value and missing required key.
    known : tuple of str
        Keys the caller reads itself: neither converted nor unknown, and listed as expected.
    unknown_note : str
        Added to the "unknown key" text (e.g. which kind of check).
    missing_file : str, optional
        File named for a missing key (default: ``origin`` when it is one file).
    expected_missing : callable
        What a missing key's problem says is expected.

    Returns
    -------
    dict
        The converted values of the keys given and known to the schema.
    """
    def file_of(key):
        return origin.get(key) if isinstance(origin, dict) else origin

    values = {}
    for key, raw in entry.items():
        if key in known:
            continue
        if key not in keys:
            problems.append(Problem(f"unknown key {key!r}{unknown_note}", file=file_of(key),
                                    column=f"{where}.{key}",
                                    expected="one of " + ", ".join([*known, *keys])))
            continue
        try:
            values[key] = keys[key][0](raw)
        except (ValueError, UnitParseError) as exc:
            problems.append(Problem(f"invalid value: {exc}", file=file_of(key),
                                    column=f"{where}.{key}", value=raw))
    for key, (_, required) in keys.items():
        if required and key not in entry:
            problems.append(Problem(f"missing key {key!r}",
                                    file=missing_file if missing_file is not None else file_of(key),
                                    column=where, expected=expected_missing(key)))
    return values
