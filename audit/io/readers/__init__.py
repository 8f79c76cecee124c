"""Register import: CSV and XLSX registers -> the item table of DEVELOPERS.md.

``read_register(paths)`` reads every file (every sheet of a workbook that has a header row with
a tag column, or the sheets named), finds the header row, matches headers against the column
names and the alias table (``rules/aliases.toml``), parses every cell once per distinct text and
returns one row per input row, in input order, with ``status`` ``ok`` or ``rejected``.
``read_rows(header, rows)`` does the same for rows held in memory (``lagaudit calc``).

``source`` is ``file:sheet:row``; ``file`` is the file's name, or, when two registers share a
name in different folders, its path relative to the folder that holds them all, so that every
``source`` is unique.  A file or a sheet named twice is read once.

A row equal to an earlier row in every recognised cell is rejected (``is a duplicate of row
<source>``); a tag on several differing rows is not: each such row gets a ``warnings`` entry
``tag: "P-101" is duplicated (N rows; first at <source>)``.  ``warnings`` also says when a unit
was assumed for a bare number in a column whose other cells carry units, and when a
temperature was given as normal/max.  What applies to a whole column (its default unit) is in
the summary of :mod:`audit.io.readers.validate`, and in ``table.attrs["register"]``.  Every
row problem is also data: :func:`audit.problems.problems_of` (row, column, code, value,
expected, severity).
"""

from __future__ import annotations

from collections.abc import Iterable, Mapping, Sequence
from dataclasses import asdict
import os
from pathlib import Path

import numpy as np
import pandas as pd

from audit.errors import RegisterError
from audit.io.readers.files import read_raw
from audit.io.readers import repeated
from audit.io.readers.headers import Lookup, load_aliases, merge_aliases
from audit.io.readers.sheet import RawSheet, finish
from audit.io.readers.table import build_sheet
from audit.io.readers.plant import PlantRules
from audit.problems import Problems
from audit.schema import ITEM_COLUMNS

__all__ = ["read_register", "read_rows", "load_aliases", "merge_aliases", "PlantRules",
           "reader_options"]


def reader_options(rules) -> dict:
    """What the reader takes from the rules, as keyword arguments of :func:`read_register`
    and :func:`read_rows`: the alias table, and the plant's words and choices."""
    return {"aliases": rules.aliases or None, "plant": PlantRules.from_rules(rules)}


def read_register(paths, *, sheets: Iterable[str] | None = None,
                  aliases: Mapping[str, list[str]] | None = None,
                  plant: PlantRules | None = None) -> pd.DataFrame:
    """Read register files into one item table.

    Parameters
    ----------
    paths : str, Path or iterable of them
        CSV or XLSX registers; their rows are concatenated in the order given.
    sheets : iterable of str, optional
        Worksheets to read in every workbook; by default every sheet with a header row that
        has a tag column.
    aliases : mapping of column -> list of str, optional
        Alias headers per register column (see :func:`load_aliases`); the shipped
        ``rules/aliases.toml`` if omitted.
    plant : PlantRules, optional
        The plant's words, the names defined and its choices (:func:`reader_options`
        builds it from the rules); without it, names are read as written.

    Returns
    -------
    pandas.DataFrame
        The item table (columns of DEVELOPERS.md, then ``raw:<column>`` for every recognised
        column, then extra columns under their own header).  ``table.attrs["register"]``
        holds what was read per file and sheet, for :func:`audit.io.readers.validate.summarise`.

    Raises
    ------
    RegisterError
        For a file that cannot be read as a register at all (the message names the file).
    """
    if isinstance(paths, (str, Path)):
        paths = [paths]
    paths = list(dict.fromkeys(Path(p) for p in paths))
    if not paths:
        raise RegisterError("no register file given", expected="one or more .csv or .xlsx files")
    aliases = dict(load_aliases() if aliases is None else aliases)
    lookup = Lookup.from_aliases(aliases)
    sheet_list = list(dict.fromkeys(sheets)) if sheets else None
    built, skipped = [], []
    for path, label in zip(paths, source_labels(paths)):
        raws, notes = read_raw(path, sheet_list, lookup)
        for raw in raws:
            raw.file = label
        skipped.extend(notes)
        built.extend(_built(raws, lookup, aliases, path, plant))
    return _item_table(built, skipped)


def read_rows(header: Sequence[str], rows: Iterable[Sequence[str]], *, name: str = "rows",
              aliases: Mapping[str, list[str]] | None = None,
              plant: PlantRules | None = None) -> pd.DataFrame:
    """Read register rows held in memory into the item table, as a register file is read.

    The header is matched against the column names and aliases, and the cells parsed, by the
    same code as a file's (:func:`audit.io.readers.table.build_sheet`), so a cell means
    exactly what it means in a register file; nothing is written to disk.

    Parameters
    ----------
    header : sequence of str
        The header row (column names or aliases, a unit may follow: ``temp [F]``).
    rows : iterable of sequence of str
        The data rows, cells as text ("" for an empty cell).
    name : str
        Stands for the file name in ``source`` (``name:row``) and in error messages.
    aliases : mapping of column -> list of str, optional
        As for :func:`read_register`.
    plant : PlantRules, optional
        As for :func:`read_register`.

    Returns
    -------
    pandas.DataFrame
        The item table, as :func:`read_register` returns it.

    Raises
    ------
    RegisterError
        When the header has no tag column or there is no data row.
    """
    aliases = dict(load_aliases() if aliases is None else aliases)
    lookup = Lookup.from_aliases(aliases)
    header = [str(h).strip() for h in header]
    data = pd.DataFrame([[str(cell) for cell in row] for row in rows], dtype=object)
    path = Path(name)
    raw = finish(path, "", header, None, data, 1, False)
    return _item_table(_built([raw], lookup, aliases, path, plant), [])


def _built(raws: list[RawSheet], lookup: Lookup, aliases: Mapping[str, list[str]],
           path: Path, plant: PlantRules | None) -> list:
    """``build_sheet`` of each sheet of one register; a register without data rows refused."""
    built = [build_sheet(raw, lookup, aliases.get("tag", []), plant) for raw in raws]
    if sum(len(t) for t, _, _ in built) == 0:
        raise RegisterError("a header row but no data rows", file=str(path),
                            expected="at least one item row below the header")
    return built


def _item_table(built: list, skipped: list[str]) -> pd.DataFrame:
    """The sheets' tables as one item table: extra columns filled, repeated rows and tags
    flagged, what was read in ``attrs["register"]``, the row problems in ``attrs["problems"]``."""
    tables = [t for t, _, _ in built]
    table = pd.concat(tables, ignore_index=True) if len(tables) > 1 else tables[0]
    for column in table.columns[len(ITEM_COLUMNS):]:
        if table[column].isna().any():
            table[column] = table[column].fillna("")
    found, offset = [], 0
    for sheet_table, _, sheet_found in built:
        found.append(sheet_found.assign(row=sheet_found["row"] + offset))
        offset += len(sheet_table)
    problems = Problems().plus(pd.concat(found, ignore_index=True))
    problems = problems.plus(repeated.flag(table))
    table.attrs["register"] = {"sheets": [asdict(i) for _, i, _ in built], "skipped": skipped}
    table.attrs["problems"] = problems
    return table


def source_labels(paths: list[Path]) -> list[str]:
    """The ``file`` part of ``source`` for each register: its name, or, for names that two
    registers share, its path relative to the folder common to those registers."""
    names = [p.name for p in paths]
    shared = {n for n in names if names.count(n) > 1}
    if not shared:
        return names
    absolute = [Path(os.path.abspath(p)) for p in paths]
    common = Path(os.path.commonpath([a.parent for a, n in zip(absolute, names) if n in shared]))
    return [a.relative_to(common).as_posix() if n in shared else n
            for a, n in zip(absolute, names)]
