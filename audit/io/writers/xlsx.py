"""Results as an XLSX workbook, written by xlsxwriter (a streaming writer, fast on large tables).

One worksheet per table: header row frozen, filters on, units in the headers (the columns
already carry them, ``name [unit]``), numbers as numbers, missing numbers as empty cells, and
text that a spreadsheet would run as a formula neutralised (:mod:`audit.io.writers.safety`).
xlsxwriter is also told never to turn text into formulas, numbers or links of its own accord.
"""

from __future__ import annotations

import math
from pathlib import Path

import numpy as np
import pandas as pd
import xlsxwriter

from audit.io.writers.safety import neutralise_frame

#: Widest column set by the writer [characters]; longer text stays whole in the cell.
MAX_WIDTH = 60
#: XLSX's own limits of a worksheet (ECMA-376; Excel's "specifications and limits").
MAX_COLUMNS, MAX_ROWS = 16_384, 1_048_576
#: Columns repeated at the left of each further sheet of a table split by columns.
KEY_COLUMNS = ("tag", "source")

_OPTIONS = {"strings_to_formulas": False, "strings_to_numbers": False, "strings_to_urls": False,
            "nan_inf_to_errors": False, "constant_memory": True}


def write_xlsx(sheets: dict[str, pd.DataFrame], path: Path, *, notes: list | None = None) -> Path:
    """One worksheet per entry of ``sheets`` (name -> table), in order.

    A table beyond XLSX's limits of :data:`MAX_COLUMNS` columns or :data:`MAX_ROWS` rows (the
    header included) is split, never cut: further sheets ``name (2)``, ``name (3)``, ... take
    the next rows, or the next columns behind the table's :data:`KEY_COLUMNS` again; each split
    is described in ``notes`` (when given), for the command line to say.
    """
    workbook = xlsxwriter.Workbook(str(path), _OPTIONS)
    header = workbook.add_format({"bold": True, "bottom": 1, "text_wrap": True, "valign": "top"})
    taken: set[str] = set()
    try:
        for name, frame in sheets.items():
            parts = split_sheet(frame)
            names = [_unique(_sheet_name(name if k == 0 else f"{name} ({k + 1})"), taken)
                     for k in range(len(parts))]
            if len(parts) > 1 and notes is not None:
                notes.append(f"table {name!r} ({frame.shape[0]:,} rows x {frame.shape[1]:,} columns) "
                             f"is beyond XLSX's {MAX_ROWS:,} rows or {MAX_COLUMNS:,} columns per "
                             f"sheet: split over sheets {', '.join(names)}")
            for part_name, part in zip(names, parts):
                _write_sheet(workbook, part_name, neutralise_frame(part), header)
    finally:
        workbook.close()
    return Path(path)


def split_sheet(frame: pd.DataFrame) -> list[pd.DataFrame]:
    """``frame`` in parts that each fit one worksheet: rows first, then columns (the further
    column parts start with the :data:`KEY_COLUMNS` the table has)."""
    keys = [c for c in KEY_COLUMNS if c in frame.columns][:1 + (frame.shape[1] > MAX_COLUMNS)]
    column_parts = [frame.iloc[:, :MAX_COLUMNS]]
    if frame.shape[1] > MAX_COLUMNS:
        rest = frame.iloc[:, MAX_COLUMNS:]
        step = MAX_COLUMNS - len(keys)
        column_parts += [pd.concat([frame[keys], rest.iloc[:, k:k + step]], axis=1)
                         for k in range(0, rest.shape[1], step)]
    rows = MAX_ROWS - 1  # the header takes a row
    return [part.iloc[start:start + rows] for part in column_parts
            for start in range(0, max(len(frame), 1), rows)]


def _unique(name: str, taken: set[str]) -> str:
    candidate, n = name, 1
    while candidate.lower() in taken:  # Excel compares sheet names case-insensitively
        n += 1
        suffix = f" ~{n}"
        candidate = name[:31 - len(suffix)] + suffix
    taken.add(candidate.lower())
    return candidate


def summary_sheet(results: pd.DataFrame, findings: pd.DataFrame) -> pd.DataFrame:
    """A ``summary`` table (measure, value): rows read, audited and rejected, findings by check
    and severity, and items with findings by area when the results carry ``area_code``."""
    status = results["status"].astype(str)
    rows = [("rows read", len(results)), ("audited", int((status == "audited").sum())),
            ("rejected", int((status == "rejected").sum())), ("findings", len(findings)),
            ("items with findings", int(findings["row"].nunique()) if "row" in findings else
             int(findings[["tag", "source"]].drop_duplicates().shape[0]) if len(findings) else 0)]
    if len(findings):
        counts = findings.groupby(["check", "severity"], sort=True).size()
        rows += [(f"findings: {check} ({severity})", int(n)) for (check, severity), n in counts.items()]
    return pd.DataFrame(rows, columns=["measure", "value"])


def _write_sheet(workbook, name: str, frame: pd.DataFrame, header_format) -> None:
    sheet = workbook.add_worksheet(name)
    columns = [str(c) for c in frame.columns]
    sheet.write_row(0, 0, columns, header_format)
    sheet.freeze_panes(1, 0)
    cells = [_cells(frame[c]) for c in frame.columns] if len(frame.columns) else []
    for k, column in enumerate(columns):
        sheet.set_column(k, k, _width(column, cells[k]))
    for i, row in enumerate(zip(*cells), start=1):
        for k, value in enumerate(row):
            if value is None:
                continue
            if isinstance(value, str):
                sheet.write_string(i, k, value)
            elif isinstance(value, bool):
                sheet.write_boolean(i, k, value)
            else:
                sheet.write_number(i, k, value)
    if columns:
        sheet.autofilter(0, 0, max(len(frame), 1), len(columns) - 1)


def _cells(series: pd.Series) -> list:
    """Python values for one column: float/int/bool/str, None where the cell stays empty."""
    if pd.api.types.is_bool_dtype(series):
        return [_cell(v) for v in series.to_numpy(object)]  # nullable booleans keep their gaps
    if pd.api.types.is_numeric_dtype(series):
        values = series.to_numpy(dtype=float, na_value=np.nan)
        return [None if not math.isfinite(v) else v for v in values.tolist()]
    return [_cell(v) for v in series.to_numpy(object)]


def _cell(value):
    if value is None or value is pd.NA or value is pd.NaT:
        return None
    if isinstance(value, (bool, np.bool_)):
        return bool(value)
    if isinstance(value, (int, float, np.integer, np.floating)):
        value = float(value)
        return value if math.isfinite(value) else None
    if isinstance(value, (tuple, list)):
        return "; ".join(str(v) for v in value)
    return str(value)


def _width(header: str, cells: list) -> float:
    sample = [len(c) for c in cells[:500] if isinstance(c, str)]
    return float(min(max([len(header) * 0.8, 8, *sample]) + 2, MAX_WIDTH))


def _sheet_name(name: str) -> str:
    # Excel's rules: at most 31 characters, none of []:*?/\ .
    cleaned = "".join("_" if ch in "[]:*?/\\" else ch for ch in str(name))
    return cleaned[:31] or "sheet"
