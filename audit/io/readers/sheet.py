"""A register sheet as text: what the CSV and XLSX readers both hand to the table builder."""

from __future__ import annotations

from dataclasses import dataclass, field
from pathlib import Path

import numpy as np
import pandas as pd

from audit.errors import RegisterError
from audit.io.readers.headers import Lookup, score

MAX_ROWS = 1_048_576  # rows per sheet or CSV file: Excel's own sheet limit
MAX_COLUMNS = 16_384  # columns per sheet: Excel's own sheet limit
MAX_CELL_CHARS = 32_767  # characters per cell: Excel's own cell limit
HEADER_SEARCH_ROWS = 30


@dataclass
class RawSheet:
    """One sheet (or CSV file) as text: the header row and the data rows below it."""

    file: str
    sheet: str
    header: list[str]
    groups: list[str] | None
    data: pd.DataFrame            # positional columns 0..k-1, every cell a str
    row_numbers: np.ndarray       # 1-based line/row number of each data row
    header_row: int               # 1-based
    decimal_comma: bool = False
    blank: np.ndarray = field(default_factory=lambda: np.zeros(0, dtype=bool))
    stripped: list = field(default_factory=list)  # per column: (codes, stripped uniques)
    path: str = ""                # the path as given, for error messages
    notes: list[str] = field(default_factory=list)  # how the file was read


def refuse(path: Path, problem: str, expected: str, **where) -> RegisterError:
    """A whole-file error naming the file, the problem and what to do."""
    return RegisterError(problem, file=str(path), expected=expected, **where)


def find_header(rows: list[list[str]], lookup: Lookup) -> tuple[int, int]:
    """(index of the header row among the first rows, its score); the first best wins.

    Title and group rows above the header score less than it; the search ends at the first
    non-blank row after a candidate that scores below it (a data row), so a header-like row
    further down, even one naming more columns, never takes over and drops the rows above it.
    """
    best, best_score = -1, 0
    for index, cells in enumerate(rows[:HEADER_SEARCH_ROWS]):
        stripped = [c.strip() for c in cells]
        row_score = score(stripped, lookup)
        if row_score > best_score:
            best, best_score = index, row_score
        elif best >= 0 and row_score < best_score and any(stripped):
            break
    return best, best_score


def factorize_stripped(values: pd.Series) -> tuple[np.ndarray, np.ndarray]:
    """``(codes, uniques)`` of the stripped texts, stripping each distinct text once."""
    codes, uniques = pd.factorize(values, use_na_sentinel=False)
    return recode(codes, np.array([str(u).strip() for u in np.asarray(uniques, dtype=object)],
                                  dtype=object))


def recode(codes: np.ndarray, texts: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """``(codes, uniques)`` once the distinct values behind ``codes`` have become ``texts``:
    values that became equal (`` 1.5`` and ``1.5 ``, ``1,5`` and ``1.5``) merge."""
    new_codes, uniques = pd.factorize(texts, use_na_sentinel=False)
    return new_codes[codes] if len(codes) else codes, np.asarray(uniques, dtype=object)


def finish(path: Path, sheet: str, header: list[str], groups, data: pd.DataFrame,
           header_row: int, decimal_comma: bool, stripped: list | None = None) -> RawSheet:
    """Align header and data widths, drop blank rows at the end, number the rows."""
    width = max(len(header), data.shape[1])
    if width > MAX_COLUMNS:
        raise refuse(path, f"{width} columns, above the limit of {MAX_COLUMNS}",
                     "a register of at most that many columns", sheet=sheet or None)
    header = header + [""] * (width - len(header))
    if groups is not None:
        groups = groups + [""] * (width - len(groups))
    if stripped is None or data.shape[1] < width:
        data = data.reindex(columns=range(width), fill_value="")
        stripped = [factorize_stripped(data[column]) for column in data.columns]
    filled = np.zeros(len(data), dtype=bool)
    for codes, uniques in stripped:
        filled |= (uniques != "")[codes] if len(codes) else filled
    last = int(np.flatnonzero(filled)[-1]) + 1 if filled.any() else 0
    data = data.iloc[:last].reset_index(drop=True)
    stripped = [(codes[:last], uniques) for codes, uniques in stripped]
    blank = ~filled[:last]
    if len(data) > MAX_ROWS:
        raise refuse(path, f"{len(data)} rows, above the limit of {MAX_ROWS}",
                     "a register split into files of at most that many rows",
                     sheet=sheet or None)
    row_numbers = np.arange(header_row + 1, header_row + 1 + len(data))
    return RawSheet(path.name, sheet, header, groups, data, row_numbers, header_row,
                    decimal_comma, blank, stripped, str(path))
