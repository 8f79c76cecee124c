"""Header matching: register column names, the alias table and units in headers.

A header is matched case-insensitively, ignoring spaces, underscores, hyphens and dots, after
taking off a trailing unit: ``temp [degF]`` or ``Op Temp (°F)``.  Text in round brackets that
is not a unit (``Temp (normal/max)``) is a note and is ignored for matching.
"""

from __future__ import annotations

import re
from dataclasses import dataclass, field
from functools import lru_cache
from pathlib import Path

import pint

from audit.errors import LagauditError, RuleError
from audit.rules.files import read_toml
from audit.schema import REGISTER_COLUMNS
from audit.shipped import shipped_dir
from audit.units import _normalise, _unit

COLUMNS = REGISTER_COLUMNS  # the register columns, declared in audit/schema.py
DN_UNIT = "DN"  # nominal diameter: not a pint unit, a size designation

_IGNORED = re.compile(r"[\s_\-.]+")


def normalise_name(name: str) -> str:
    """Lower case without spaces, underscores, hyphens and dots: ``"Line No."`` -> ``"lineno"``."""
    return _IGNORED.sub("", name.lower())


@lru_cache(maxsize=1024)
def split_unit(header: str) -> tuple[str, str | None]:
    """Split ``"temp [degF]"`` into ``("temp", "degF")``; ``("temp", None)`` without a unit.

    A square-bracket unit is always taken as the unit (and checked later against the column's
    dimension).  Round brackets hold a unit only when pint reads them as one, else a note.
    """
    text = str(header).strip()
    split = _last_group(text, "[", "]")
    if split:
        return split[0], _clean_unit(split[1])
    split = _last_group(text, "(", ")")
    if split:
        unit = _clean_unit(split[1])
        return split[0], unit if unit and _is_unit(unit) else None
    return text, None


def _last_group(text: str, opening: str, closing: str) -> tuple[str, str] | None:
    """``("temp", "degF")`` for ``"temp [degF]"``: the text before the last bracketed group
    that ends the header, and the group's content (no brackets inside); None without one.
    Found with ``rfind``, not a pattern, so a long header costs its length once."""
    if not text.endswith(closing):
        return None
    start = text.rfind(opening, 0, len(text) - 1)
    inner = text[start + 1:-1]
    if start < 0 or closing in inner:
        return None
    return text[:start].rstrip(), inner


def _clean_unit(unit: str) -> str | None:
    unit = _normalise(unit).strip()
    if unit.upper() == DN_UNIT:
        return DN_UNIT
    return unit or None


def _is_unit(unit: str) -> bool:
    if unit == DN_UNIT:
        return True
    try:
        _unit(unit)
    except (pint.errors.PintError, ValueError, TypeError, AttributeError, AssertionError,
            KeyError, SyntaxError, ZeroDivisionError, OverflowError):
        return False
    return True


def shipped_aliases_path() -> Path:
    """The shipped ``aliases.toml``: inside the wheel first, else the repository's ``rules/``."""
    try:
        path = shipped_dir("rules") / "aliases.toml"
    except LagauditError:
        path = None
    if path is not None and path.is_file():
        return path
    raise RuleError("the shipped column-alias table is missing", file="rules/aliases.toml",
                    expected="a lagaudit installation with its rules/ folder")


def load_aliases(path=None) -> dict[str, list[str]]:
    """Read the ``[alias]`` table of an alias file: column -> list of alias headers.

    Parameters
    ----------
    path : str or Path, optional
        A TOML file with an ``[alias]`` table; the shipped ``rules/aliases.toml`` if omitted.

    Raises
    ------
    RuleError
        When the file is not TOML, names an unknown column or lists something other than text.
    """
    path = Path(path) if path is not None else shipped_aliases_path()
    data = read_toml(path, "a UTF-8 TOML file with an [alias] table")
    table = data.get("alias", {})
    if not isinstance(table, dict):
        raise RuleError("[alias] is not a table", file=str(path), column="alias",
                        expected="column = [\"alias\", ...] entries")
    aliases: dict[str, list[str]] = {}
    for column, names in table.items():
        if column not in COLUMNS:
            raise RuleError(f"unknown register column {column!r}", file=str(path),
                            column=f"alias.{column}", expected=", ".join(COLUMNS))
        if not isinstance(names, list) or not all(isinstance(n, str) for n in names):
            raise RuleError("aliases must be a list of strings", file=str(path),
                            column=f"alias.{column}", value=names,
                            expected="[\"alias header\", ...]")
        aliases[column] = list(names)
    return aliases


def merge_aliases(*tables: dict[str, list[str]]) -> dict[str, list[str]]:
    """Layer alias tables (shipped first, then each ``--rules`` folder's): lists are extended.

    A later table adds aliases after the earlier ones, so it never takes a header away.
    """
    merged: dict[str, list[str]] = {}
    for table in tables:
        for column, names in table.items():
            known = merged.setdefault(column, [])
            known.extend(n for n in names if n not in known)
    return merged


@dataclass(frozen=True)
class Lookup:
    """Normalised header name -> (column, priority, unit implied by the alias)."""

    names: dict[str, tuple[str, int, str | None]]

    @classmethod
    def from_aliases(cls, aliases: dict[str, list[str]]) -> "Lookup":
        names: dict[str, tuple[str, int, str | None]] = {}
        for column in COLUMNS:
            names[normalise_name(column)] = (column, 0, None)
        own = set(names)
        for column, alias_list in aliases.items():
            for priority, alias in enumerate(alias_list, start=1):
                name, unit = split_unit(alias)
                key = normalise_name(name)
                if key in own:
                    # An alias that is a column's own name ("Area" for area_code, or for area)
                    # says which column the plant means by it: no guessing from the cells.
                    names[key] = (column, priority, unit)
                    own.discard(key)
                else:
                    names.setdefault(key, (column, priority, unit))
        return cls(names)

    def column_of(self, header: str) -> tuple[str, int, str | None] | None:
        """``(column, priority, unit)`` for a header cell, or None if it is not recognised."""
        name, unit = split_unit(header)
        hit = self.names.get(normalise_name(name))
        if hit is None:
            return None
        return hit[0], hit[1], unit or hit[2]


@dataclass
class HeaderMap:
    """Where each recognised column is, and what is carried through or left unused."""

    columns: dict[str, int] = field(default_factory=dict)        # column -> position
    headers: dict[str, str] = field(default_factory=dict)        # column -> header text
    units: dict[str, str | None] = field(default_factory=dict)   # column -> unit from header
    extras: list[tuple[int, str]] = field(default_factory=list)  # (position, header text)
    shadowed: list[tuple[str, str]] = field(default_factory=list)  # (header, column it lost)


def score(cells: list[str], lookup: Lookup) -> int:
    """How many cells of a row are recognised headers (to find the header row)."""
    return len({hit[0] for c in cells if c and (hit := lookup.column_of(c)) is not None})


def match_headers(cells: list[str], lookup: Lookup, groups: list[str] | None = None) -> HeaderMap:
    """Map a header row to register columns.

    Parameters
    ----------
    cells : list of str
        The header row, one text per column (empty for a blank header).
    lookup : Lookup
        Column names and aliases.
    groups : list of str, optional
        For a two-level header: the merged group cell above each column (``"Insulation"``
        over ``"Material"``).  ``"<group> <header>"`` is tried before the header alone.
    """
    found: dict[str, tuple[int, int, str, str | None]] = {}
    unmatched: list[tuple[int, str]] = []
    for position, text in enumerate(cells):
        hit = None
        group = groups[position] if groups else ""
        if group and text and group != text:
            hit = lookup.column_of(f"{group} {text}")
            label = f"{group} {text}"
        if hit is None:
            hit = lookup.column_of(text) if text else None
            label = text
        if hit is None:
            unmatched.append((position, label if text else ""))
            continue
        column, priority, unit = hit
        if column in found and found[column][1] <= priority:
            unmatched.append((position, label))
            continue
        if column in found:
            unmatched.append((found[column][0], found[column][2]))
        found[column] = (position, priority, label, unit)
    header_map = HeaderMap()
    for column, (position, _, label, unit) in sorted(found.items(), key=lambda kv: kv[1][0]):
        header_map.columns[column] = position
        header_map.headers[column] = label
        header_map.units[column] = unit
    for position, label in sorted(unmatched):
        hit = lookup.column_of(label) if label else None
        if hit is not None:
            header_map.shadowed.append((label, hit[0]))
        header_map.extras.append((position, label))
    return header_map
