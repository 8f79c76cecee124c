"""Results as an XLSX workbook whose worksheet XML is written from whole columns.

One worksheet per table: header row frozen, filters on, units in the headers (the columns
already carry them, ``name [unit]``), numbers as numbers, missing numbers as empty cells, and
text that a spreadsheet would run as a formula neutralised (:mod:`audit.io.writers.safety`).
Text is only ever written as text (shared strings), never as a formula, number or link.

A per-cell writer spends about a minute on a 100,000-item register; here the cells of a run of
float columns are laid out as bytes by numpy (Python's shortest round-trip ``repr``, shared
with :mod:`audit.io.writers.csv_fast`), each distinct text, integer or other value is turned
into its cell's XML once, and only rows are joined in Python.  The package around the sheets
is :mod:`audit.io.writers.xlsx_package`; parts go into the zip a chunk of rows at a time.
"""

from __future__ import annotations

import math
import zipfile
from pathlib import Path

import numpy as np
import pandas as pd

from audit.io.writers import xlsx_package as package
from audit.io.writers.csv_fast import WIDTH, column_segments, float_into
from audit.io.writers.safety import neutralise_frame

#: Widest column set by the writer [characters]; longer text stays whole in the cell.
MAX_WIDTH = 60
#: XLSX's own limits of a worksheet (ECMA-376; Excel's "specifications and limits").
MAX_COLUMNS, MAX_ROWS = 16_384, 1_048_576
#: Columns repeated at the left of each further sheet of a table split by columns.
KEY_COLUMNS = ("tag", "source")
#: Rows turned into XML and compressed at once: bounds the memory of the cell texts.
CHUNK_ROWS = 20_000
#: zlib level of the parts: 1 writes several times faster than the default 6 for a file a
#: few tens of per cent larger (the sheets are repetitive XML).
COMPRESS_LEVEL = 1

_EMPTY = "<c/>"  # a cell without a value: keeps the next cells in their columns
_NUMBER_OPEN, _NUMBER_CLOSE = b"<c><v>", b"</v></c>"
_SLOT = len(_NUMBER_OPEN) + WIDTH + len(_NUMBER_CLOSE)


def write_xlsx(sheets: dict[str, pd.DataFrame], path: Path, *, notes: list | None = None) -> Path:
    """One worksheet per entry of ``sheets`` (name -> table), in order.

    A table beyond XLSX's limits of :data:`MAX_COLUMNS` columns or :data:`MAX_ROWS` rows (the
    header included) is split, never cut: further sheets ``name (2)``, ``name (3)``, ... take
    the next rows, or the next columns behind the table's :data:`KEY_COLUMNS` again; each split
    is described in ``notes`` (when given), for the command line to say.
    """
    taken: set[str] = set()
    strings = _SharedStrings()
    names, filters = [], []
    with zipfile.ZipFile(path, "w", zipfile.ZIP_DEFLATED, compresslevel=COMPRESS_LEVEL) as archive:
        for name, frame in sheets.items():
            parts = split_sheet(frame)
            part_names = [_unique(_sheet_name(name if k == 0 else f"{name} ({k + 1})"), taken)
                          for k in range(len(parts))]
            if len(parts) > 1 and notes is not None:
                notes.append(f"table {name!r} ({frame.shape[0]:,} rows x {frame.shape[1]:,} columns) "
                             f"is beyond XLSX's {MAX_ROWS:,} rows or {MAX_COLUMNS:,} columns per "
                             f"sheet: split over sheets {', '.join(part_names)}")
            for part_name, part in zip(part_names, parts):
                filters.append(_write_sheet(archive, len(names), neutralise_frame(part), strings))
                names.append(part_name)
        archive.writestr("xl/sharedStrings.xml", package.shared_strings(strings.texts))
        archive.writestr("xl/workbook.xml", package.workbook(names, filters))
        archive.writestr("xl/_rels/workbook.xml.rels", package.workbook_rels(len(names)))
        archive.writestr("xl/styles.xml", package.STYLES)
        archive.writestr("_rels/.rels", package.PACKAGE_RELS)
        archive.writestr("[Content_Types].xml", package.content_types(len(names)))
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


class _SharedStrings:
    """The workbook's shared string table: each distinct text once, by index."""

    def __init__(self):
        self.index: dict[str, int] = {}
        self.texts: list[str] = []

    def cell(self, text: str, style: str = "") -> str:
        k = self.index.get(text)
        if k is None:
            k = self.index[text] = len(self.texts)
            self.texts.append(text)
        return f'<c t="s"{style}><v>{k}</v></c>'


def _write_sheet(archive, number: int, frame: pd.DataFrame, strings: _SharedStrings) -> str | None:
    """Worksheet ``number`` (from 0) of the package; the range its filter covers (None
    without columns)."""
    columns = [str(c) for c in frame.columns]
    rows = len(frame)
    segments = _segments(frame, strings)
    widths = [_width(c, texts) for c, texts in zip(columns, _samples(frame))]
    filter_ref = package.cell_range(max(rows, 1) + 1, len(columns)) if columns else None
    with archive.open(f"xl/worksheets/sheet{number + 1}.xml", "w", force_zip64=True) as part:
        part.write(package.sheet_head(package.cell_range(rows + 1, len(columns)), widths,
                                      number == 0).encode())
        if columns:
            header = "".join(strings.cell(c, ' s="1"') for c in columns)
            part.write(f'<row r="1">{header}</row>'.encode())
        for start in range(0, rows if columns else 0, CHUNK_ROWS):
            stop = min(start + CHUNK_ROWS, rows)
            texts = [segment(start, stop) for segment in segments]
            lines = texts[0] if len(texts) == 1 else map("".join, zip(*texts))
            part.write("".join([f'<row r="{r}">{line}</row>'
                                for r, line in zip(range(start + 2, stop + 2), lines)]).encode())
        part.write(package.sheet_tail(filter_ref).encode())
    return filter_ref


def _segments(frame: pd.DataFrame, strings: _SharedStrings) -> list:
    """Functions ``(start, stop) -> list of texts``, one per run of number columns (the XML of
    several cells, joined) or per other column, in column order."""
    return column_segments(
        frame, lambda j, series: series.to_numpy(dtype=np.float64, na_value=np.nan)
        if _is_number(series) else None,
        _number_block, lambda j, series: _column_cells(series, strings))


def _is_number(series: pd.Series) -> bool:
    """Columns written through float64: floats and nullable numbers (not plain integers,
    whose own text is shorter, nor booleans)."""
    dtype = series.dtype
    if pd.api.types.is_bool_dtype(dtype) or not pd.api.types.is_numeric_dtype(dtype):
        return False
    return not (isinstance(dtype, np.dtype) and dtype.kind in "iu")


def _number_block(columns: list[np.ndarray]):
    """The cells of adjacent number columns, one text per row: each cell laid out in a
    fixed-width slot of bytes, NUL-padded (``<c><v>repr</v></c>``, or ``<c/>`` for a missing
    or infinite value), the NULs deleted at the end: no Python object per cell."""
    def texts(start, stop):
        rows = stop - start
        matrix = np.zeros((rows, len(columns), _SLOT + 1), np.uint8)
        for c, values in enumerate(columns):
            values = values[start:stop]
            finite = np.isfinite(values)
            slots = matrix[:, c]
            float_into(np.where(finite, values, np.nan), slots[:, len(_NUMBER_OPEN):-len(_NUMBER_CLOSE) - 1])
            slots[finite, :len(_NUMBER_OPEN)] = np.frombuffer(_NUMBER_OPEN, np.uint8)
            slots[finite, -len(_NUMBER_CLOSE) - 1:-1] = np.frombuffer(_NUMBER_CLOSE, np.uint8)
            slots[~finite, :len(_EMPTY)] = np.frombuffer(_EMPTY.encode(), np.uint8)
        matrix[:, -1, -1] = ord("\n")
        return matrix.tobytes().translate(None, b"\0").decode("ascii").split("\n")[:-1]
    return texts


def _column_cells(series: pd.Series, strings: _SharedStrings):
    """A function ``(start, stop) -> list of cell XML`` for a column of any other kind; each
    distinct value is made into XML once."""
    dtype = series.dtype
    if isinstance(dtype, np.dtype) and dtype.kind in "iu":
        codes, uniques = pd.factorize(series.to_numpy())
        cells = np.array([f"<c><v>{v}</v></c>" for v in uniques.tolist()], dtype=object)
        return lambda start, stop: cells[codes[start:stop]].tolist()
    if isinstance(dtype, np.dtype) and dtype == np.bool_:
        cells = np.array(['<c t="b"><v>0</v></c>', '<c t="b"><v>1</v></c>'], dtype=object)
        flags = series.to_numpy().astype(np.intp)
        return lambda start, stop: cells[flags[start:stop]].tolist()
    values = series.to_numpy(object)
    if pd.api.types.infer_dtype(values, skipna=True) in ("string", "empty"):
        # text or missing only: each distinct text through the table once (factorize would
        # merge True with 1 in a mixed column, hence only here)
        codes, uniques = pd.factorize(values)
        cells = np.array([strings.cell(u) for u in uniques.tolist()] + [_EMPTY], dtype=object)
        return lambda start, stop: cells[codes[start:stop]].tolist()  # code -1: the last
    known: dict = {}

    def xml(value):
        key = (type(value), value)
        cell = known.get(key)
        if cell is None:
            cell = known[key] = _value_xml(value, strings)
        return cell

    return lambda start, stop: [xml(_cell(v)) for v in values[start:stop]]


def _value_xml(value, strings: _SharedStrings) -> str:
    if value is None:
        return _EMPTY
    if isinstance(value, str):
        return strings.cell(value)
    if isinstance(value, bool):
        return f'<c t="b"><v>{int(value)}</v></c>'
    return f"<c><v>{value!r}</v></c>"


def _samples(frame: pd.DataFrame):
    """The texts of each column's first 500 cells (what sets its width)."""
    for j in range(frame.shape[1]):
        head = frame.iloc[:500, j].to_numpy(object)
        yield [c for c in map(_cell, head) if isinstance(c, str)]


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


def _width(header: str, texts: list[str]) -> float:
    return float(min(max([len(header) * 0.8, 8, *map(len, texts)]) + 2, MAX_WIDTH))


def _sheet_name(name: str) -> str:
    # Excel's rules: at most 31 characters, none of []:*?/\ .
    cleaned = "".join("_" if ch in "[]:*?/\\" else ch for ch in str(name))
    return cleaned[:31] or "sheet"
