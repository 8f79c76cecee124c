"""Headers that could mean two columns, decided by what the cells hold, and said aloud.

``Area`` is a plant area (``area_code``: ``U-100``, ``Tank farm``) or a surface area (``area``:
``12.5``, ``40 ft2``).  A header that is exactly such a name, with no unit and not claimed by
an alias, is read as ``area`` when every cell is a number (with or without an area unit) and
as ``area_code`` when none is; a column holding both is an error naming the header and asking
for an alias.  The decision goes into the sheet's summary (``lagaudit validate``).

A design temperature (a ``temp`` header that says "design") read because the register has no
operating temperature is decided here too: the summary says so, and the table builder warns
on every row it feeds, or rejects them when the rules say ``[defaults] design_temp = "refuse"``.
"""

from __future__ import annotations

from audit.errors import RegisterError
from audit.io.readers import cells
from audit.io.readers.headers import HeaderMap, Lookup, normalise_name, split_unit
from audit.io.readers.sheet import RawSheet

#: an ambiguous header name -> (column when its cells are numbers, column when they are codes)
AMBIGUOUS = {"area": ("area", "area_code")}
EXAMPLES = 3  # cells quoted in a decision or an error


def decide_ambiguous(raw: RawSheet, header_map: HeaderMap, lookup: Lookup) -> list[str]:
    """Move each ambiguous header to the column its cells say; the decisions, as text.

    Raises
    ------
    RegisterError
        For a column whose cells hold both numbers and codes, naming the header.
    """
    decisions = []
    for numbers_column, codes_column in AMBIGUOUS.values():
        position = header_map.columns.get(numbers_column)
        label = header_map.headers.get(numbers_column, "")
        name, unit = split_unit(label)
        hit = lookup.column_of(label)
        if position is None or unit is not None or hit is None or hit[1] != 0 \
                or normalise_name(name) not in AMBIGUOUS:
            continue
        numbers, codes = _kinds(raw.stripped[position][1], raw.decimal_comma)
        if numbers and codes:
            raise RegisterError(
                f"header {label!r} could mean {numbers_column} (a surface area) or "
                f"{codes_column} (a plant area), and its cells hold both numbers "
                f"({_quoted(numbers)}) and codes ({_quoted(codes)})",
                file=raw.path, sheet=raw.sheet or None, column=label,
                expected=f"a header that says which (\"{codes_column}\" or \"surface area "
                         f"[m2]\"), or an alias in a rule file of your --rules folder: "
                         f"[alias] {codes_column} = [\"{label}\"] or {numbers_column} = "
                         f"[\"{label}\"]")
        if codes and codes_column in header_map.columns:
            raise RegisterError(
                f"header {label!r} holds codes ({_quoted(codes)}) but "
                f"{header_map.headers[codes_column]!r} is already the {codes_column} column",
                file=raw.path, sheet=raw.sheet or None, column=label,
                expected=f"rename one header, or an alias: [alias] {codes_column} = [\"{label}\"]")
        if codes:
            _move(header_map, numbers_column, codes_column)
            decisions.append(f"header {label!r} read as {codes_column} (plant area): its cells "
                             f"are codes ({_quoted(codes)})")
        else:
            decisions.append(f"header {label!r} read as {numbers_column} (surface area): its "
                             "cells are numbers" + (f" ({_quoted(numbers)})" if numbers else
                                                    " (none given)"))
    return decisions


def design_temperature(header_map: HeaderMap) -> str | None:
    """The ``temp`` header when it names a design temperature (no operating one exists, or
    it would have been taken instead), else None."""
    label = header_map.headers.get("temp")
    if label is None:
        return None
    return label if "design" in normalise_name(split_unit(label)[0]) else None


def _kinds(uniques, decimal_comma: bool) -> tuple[list[str], list[str]]:
    """The distinct non-empty cells that are numbers (an area unit allowed), and the others."""
    numbers, codes = [], []
    for text in uniques:
        if text == "":
            continue
        read = text.replace(",", ".") if decimal_comma else text
        is_number = cells.quantity(read, "m**2", "m**2", "an area")[1] is None
        (numbers if is_number else codes).append(text)
    return numbers, codes


def _quoted(texts: list[str]) -> str:
    shown = ", ".join(repr(text) for text in texts[:EXAMPLES])
    return shown + (", ..." if len(texts) > EXAMPLES else "")


def _move(header_map: HeaderMap, old: str, new: str) -> None:
    header_map.columns[new] = header_map.columns.pop(old)
    header_map.headers[new] = header_map.headers.pop(old)
    header_map.units[new] = header_map.units.pop(old)
