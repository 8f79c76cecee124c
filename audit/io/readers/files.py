"""Reading register files: the file-type dispatch, and CSV.

CSV: comma, semicolon, tab or bar separated (detected from the header row), decimal comma
detected (from the cells, by an anchored pattern), UTF-8 with or without BOM, UTF-16 with BOM,
else Windows-1252.  Title rows above the header are skipped: the header is the first of the
first 30 lines that names the most columns, searched only down to the first data row.  Blank
lines below the header are rows (rejected as blank).  A quote left open is refused, naming its
line: in a recognised column any line break inside a cell; in a carried column a line break
followed by a whole row's worth of separators, or a quote still open at the end of the file.
XLSX: see :mod:`audit.io.readers.workbook`.

Limits (a register past them is refused with a :class:`RegisterError`, never half read):
``MAX_FILE_BYTES`` on disk for every file; ``MAX_ROWS`` rows and ``MAX_COLUMNS`` columns per
sheet or CSV file (Excel's own sheet limits); for XLSX also the zip limits of
:mod:`audit.io.readers.workbook` (``MAX_UNCOMPRESSED_BYTES``, ``MAX_COMPRESSION_RATIO``).  A
cell longer than ``MAX_CELL_CHARS`` (Excel's cell limit) rejects its row with a reason, and a
raw value quoted in any reason is cut to 60 characters.
"""

from __future__ import annotations

import csv
import io
import re
from pathlib import Path

import numpy as np
import pandas as pd

from audit.io.readers.headers import Lookup, match_headers
from audit.io.readers.sheet import (HEADER_SEARCH_ROWS, MAX_CELL_CHARS, MAX_COLUMNS, MAX_ROWS,
                                    RawSheet, find_header, finish, refuse)
from audit.io.readers.workbook import (MAX_COMPRESSION_RATIO, MAX_UNCOMPRESSED_BYTES,
                                       OLE_MAGIC, ZIP_MAGIC, read_xlsx)

__all__ = ["read_raw", "MAX_FILE_BYTES", "MAX_ROWS", "MAX_COLUMNS", "MAX_CELL_CHARS",
           "MAX_UNCOMPRESSED_BYTES", "MAX_COMPRESSION_RATIO"]

MAX_FILE_BYTES = 1 << 30
CSV_SUFFIXES = frozenset({".csv", ".txt", ".tsv"})
XLSX_SUFFIXES = frozenset({".xlsx", ".xlsm"})

_DELIMITERS = (",", ";", "\t", "|")
_DECIMAL_COMMA = re.compile(r"[-+]?\d+,\d+\s*[a-z°\"]*", re.IGNORECASE)  # fullmatch, stripped
_DECIMAL_COMMA_SAMPLE = 1000  # distinct texts per column looked at
# encoding name -> (codec, bytes of byte-order mark); the body of such a file is handed to the
# CSV parser as bytes (its text would take up to four bytes a character in a text buffer)
_CODECS = {"UTF-8": ("utf-8", 0), "UTF-8 with BOM": ("utf-8", 3), "Windows-1252": ("cp1252", 0)}


def read_raw(path, sheets, lookup: Lookup) -> tuple[list[RawSheet], list[str]]:
    """Read one register file into raw sheets.

    Parameters
    ----------
    path : str or Path
        A ``.csv``/``.txt``/``.tsv`` or ``.xlsx``/``.xlsm`` file.
    sheets : list of str or None
        Worksheets to read; every sheet that has a header row with a tag column if None.
    lookup : Lookup
        Header names and aliases, to find the header row.

    Returns
    -------
    (sheets, notes)
        The sheets read, and notes on sheets skipped.

    Raises
    ------
    RegisterError
        For a file that cannot be read at all; the message names the file and what to do.
    """
    path = Path(path)
    if not path.is_file():
        raise refuse(path, "file not found or not a file", "a readable .csv or .xlsx file")
    size = path.stat().st_size
    if size == 0:
        raise refuse(path, "the file is empty", "a header row and at least one data row")
    if size > MAX_FILE_BYTES:
        raise refuse(path, f"the file is {size} bytes, above the limit of {MAX_FILE_BYTES}",
                     "a smaller register; split it into several files")
    suffix = path.suffix.lower()
    if suffix in XLSX_SUFFIXES:
        return read_xlsx(path, sheets, lookup)
    if suffix in CSV_SUFFIXES:
        return [_read_csv(path, lookup)], []
    raise refuse(path, f"unsupported file type {suffix or '(no extension)'!r}",
                 "a .csv, .txt, .tsv, .xlsx or .xlsm register")


def _decode(path: Path, raw: bytes) -> tuple[str, str]:
    """``(text, encoding name)``; the name is a key of ``_CODECS``."""
    if raw.startswith(ZIP_MAGIC):
        raise refuse(path, "this is a zip container (a workbook?), not a CSV text file",
                     "a .csv text file, or the workbook renamed to .xlsx")
    if raw.startswith(OLE_MAGIC):
        raise refuse(path, "this is an Office binary file (legacy .xls or an encrypted "
                     "workbook), not CSV text", "a .csv text file or an unprotected .xlsx")
    if raw.startswith((b"\xff\xfe\x00\x00", b"\x00\x00\xfe\xff")):
        raise refuse(path, "UTF-32 text, which is not read", "a CSV saved as UTF-8 (or UTF-16 "
                     "with a byte-order mark)")
    if raw.startswith((b"\xff\xfe", b"\xfe\xff")):
        try:
            return raw.decode("utf-16"), "UTF-16"
        except UnicodeDecodeError as exc:
            raise refuse(path, "broken UTF-16 text", "a CSV saved as UTF-8") from exc
    if b"\x00" in raw[:65536]:
        raise refuse(path, "UTF-16 or UTF-32 text without a byte-order mark, or binary data; "
                     "not CSV text as read here", "a CSV saved as UTF-8 (or UTF-16 with a "
                     "byte-order mark)")
    try:
        if raw.startswith(b"\xef\xbb\xbf"):
            return raw[3:].decode("utf-8"), "UTF-8 with BOM"
        return raw.decode("utf-8"), "UTF-8"
    except UnicodeDecodeError:
        # Windows-1252 leaves five bytes undefined; they become U+FFFD, visible in raw: columns
        return raw.decode("cp1252", errors="replace"), "Windows-1252"


def _read_csv(path: Path, lookup: Lookup) -> RawSheet:
    raw = path.read_bytes()
    text, encoding = _decode(path, raw)
    if not text.strip():
        raise refuse(path, "the file is empty", "a header row and at least one data row")
    # For finding the header only: a lone carriage return inside a quoted cell (valid CSV)
    # would stop the line-by-line reader, and cells may exceed its default field size.
    head_lines = [line.rstrip("\r").replace("\r", " ")
                  for line in text[:_head_end(text)].split("\n")]
    best = (0, 0, -1, ",")  # (score, field count, -index, delimiter)
    for delimiter in _DELIMITERS:
        rows = _csv_rows(head_lines, delimiter)
        index, row_score = find_header(rows, lookup)
        candidate = (row_score, len(rows[index]) if index >= 0 else 0, -index, delimiter)
        if candidate > best:
            best = candidate
    row_score, _, minus_index, delimiter = best
    header_index = -minus_index
    if row_score == 0:
        raise refuse(path, f"no header row found in the first {HEADER_SEARCH_ROWS} lines",
                     "a header row naming the columns (tag, nps, temp, ...; "
                     "see rules/aliases.toml)")
    header = [h.strip() for h in _csv_rows([head_lines[header_index]], delimiter)[0]]
    body_start = _line_start(text, header_index + 1)
    blank_lines = 0  # empty lines just below the header: rows, rejected as blank later
    while text.startswith("\n", body_start) or text.startswith("\r\n", body_start):
        body_start = text.index("\n", body_start) + 1
        blank_lines += 1
    if encoding in _CODECS:
        codec, mark = _CODECS[encoding]
        body = raw[mark + len(text[:body_start].encode(codec, errors="replace")):]
    else:
        codec, body = None, text[body_start:]
    del text, raw
    first_line = header_index + 2 + blank_lines  # 1-based line number of the body's first line
    data = _csv_body(path, body, codec, delimiter, header, first_line)
    if ('"' if codec is None else b'"') in body:  # without a quote no cell can hold a line break
        _refuse_unclosed_quotes(path, data, header, lookup, delimiter, first_line)
    del body
    if blank_lines and data.shape[1]:
        data = pd.concat([pd.DataFrame("", index=range(blank_lines), columns=data.columns),
                          data], ignore_index=True)
    sheet = finish(path, "", header, None, data, header_index + 1, False)
    sheet.decimal_comma = delimiter != "," and _decimal_comma(sheet.stripped)
    sheet.notes.append(f"read as {encoding} text, separator {delimiter!r}, decimal "
                       f"{'comma' if sheet.decimal_comma else 'point'}")
    return sheet


def _decimal_comma(stripped: list) -> bool:
    """Whether a column holds a number written with a decimal comma (``1,5``, ``2,5 in``),
    among the first distinct texts of each column."""
    return any(_DECIMAL_COMMA.fullmatch(text)
               for _, uniques in stripped for text in uniques[:_DECIMAL_COMMA_SAMPLE])


def _refuse_unclosed_quotes(path: Path, data: pd.DataFrame, header: list[str], lookup: Lookup,
                            delimiter: str, first_line: int) -> None:
    """A quote left open swallows the lines below it into one cell, so the file is refused,
    naming the line.  A line break inside a cell of a recognised column is always one; in a
    carried column (where a remark may hold a line break) it is one when a line inside the
    cell holds a whole row's worth of separators."""
    recognised = set(match_headers(header, lookup).columns.values())
    separators = max(1, len(header) - 1)
    for position in range(data.shape[1]):
        cells = data[position].astype(str)
        broken = cells.str.contains("\n", regex=False).to_numpy().copy()
        if not broken.any():
            continue
        if position not in recognised:
            broken[broken] = [any(line.count(delimiter) >= separators
                                  for line in cell.split("\n")[1:])
                              for cell in cells[broken]]
        if broken.any():
            raise _open_quote(path, data, header, position, first_line,
                              int(np.flatnonzero(broken)[0]), "before the next line")


def _open_quote(path: Path, data: pd.DataFrame, header: list[str], position: int,
                first_line: int, row: int, where: str):
    """The refusal of a quote left open in ``data[position]`` at data row ``row``."""
    line = first_line + row + sum(
        str(cell).count("\n") for cell in data.iloc[:row].to_numpy().ravel() if "\n" in str(cell))
    column = header[position] if position < len(header) and header[position] else \
        f"column {position + 1}"
    return refuse(path, f"line {line}: a quote opened in column {column!r} is not closed {where}",
                  "balanced double quotes")


def _csv_rows(lines: list[str], delimiter: str) -> list[list[str]]:
    """Lines split into cells; a line the csv module cannot split counts as one cell."""
    limit = csv.field_size_limit()
    csv.field_size_limit(max(limit, 1 << 30))  # the cell limit is enforced per row, later
    try:
        rows = []
        for line in lines:
            try:
                rows.extend(csv.reader([line], delimiter=delimiter))
            except csv.Error:
                rows.append([line])
        return rows
    finally:
        csv.field_size_limit(limit)


def _line_start(text: str, line: int) -> int:
    """Offset of the start of 0-based line ``line`` (lines end in \\n or \\r\\n)."""
    offset = 0
    for _ in range(line):
        found = text.find("\n", offset)
        if found < 0:
            return len(text)
        offset = found + 1
    return offset


def _head_end(text: str) -> int:
    return _line_start(text, HEADER_SEARCH_ROWS)


def _csv_body(path: Path, body, codec: str | None, delimiter: str, header: list[str],
              first_line: int) -> pd.DataFrame:
    """The data rows: ``body`` is bytes in ``codec``, or text when ``codec`` is None."""
    if not body.strip():
        return pd.DataFrame(dtype=object)
    options = dict(sep=delimiter, header=None, dtype=object, keep_default_na=False,
                   na_filter=False, skip_blank_lines=False, quotechar='"')
    source = io.StringIO(body) if codec is None else io.BytesIO(body)
    if codec is not None:
        options.update(encoding=codec, encoding_errors="replace")
    try:
        return pd.read_csv(source, engine="c", **options)
    except pd.errors.ParserError as exc:
        text = body if codec is None else body.decode(codec, errors="replace")
        rows = list(csv.reader(io.StringIO(text), delimiter=delimiter))
        width = max((len(r) for r in rows), default=0)
        data = pd.DataFrame([r + [""] * (width - len(r)) for r in rows], dtype=object)
        if "EOF inside string" in str(exc):  # the last record holds the rest of the file
            raise _open_quote(path, data, header, len(rows[-1]) - 1, first_line,
                              len(rows) - 1, "before the end of the file") from exc
        return data
