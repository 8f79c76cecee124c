"""Reading XLSX registers, and refusing hostile workbooks before they are opened.

Read with python-calamine (the reader behind pandas' ``calamine`` engine, called directly so
the merged-cell ranges come from the same pass; openpyxl is not needed).  Cached values only: no
formula is evaluated, no macro run, no external link followed.  Every sheet is read (or the
sheets named); a sheet without a header row naming a tag column is skipped with a note.
Merged cells are filled with the value they show; a cell merged across columns just above the
header row is a group label (``Insulation`` over ``Material`` and ``Thk``).

Checks before the workbook is opened (each refusal is a :class:`RegisterError` naming the file):
the OLE signature of an encrypted (password-protected) workbook or a legacy .xls; a zip that is
not a workbook; the declared uncompressed total above ``MAX_UNCOMPRESSED_BYTES``; a part larger
than 1 MiB expanding more than ``MAX_COMPRESSION_RATIO`` times (a zip bomb); a worksheet whose
declared dimension passes ``MAX_ROWS`` rows.  Then every part is decompressed in bounded chunks,
so its true size and CRC must match what the zip declares.  The worksheets and the shared
strings are scanned as a stream before the reader sees them (:mod:`audit.io.readers.xlsx_scan`:
the rectangle of cells with a value, shared-string indices and their expanded text, merged
ranges); the reader then builds only the rectangle of cells with a value, not the sheet from A1,
and the rows keep their sheet row numbers.  Merged ranges are filled once each; overlapping
ranges (which no spreadsheet program writes) are refused.
"""

from __future__ import annotations

import re
import zipfile
from pathlib import Path

import numpy as np
import pandas as pd
import python_calamine

from audit.io.readers import xlsx_scan
from audit.io.readers.headers import Lookup
from audit.io.readers.sheet import (HEADER_SEARCH_ROWS, MAX_ROWS, RawSheet, find_header,
                                    finish, recode, refuse)

MAX_UNCOMPRESSED_BYTES = 1 << 30
MAX_COMPRESSION_RATIO = 200  # real registers measured ~10x; Apache POI refuses above 100x
ZIP_MAGIC = b"PK\x03\x04"
OLE_MAGIC = b"\xd0\xcf\x11\xe0"
_DIMENSION = re.compile(rb"<(?:\w+:)?dimension\s+ref=\"[A-Z]+\d+(?::[A-Z]+(\d+))?\"")
_CHUNK = 1 << 20


def _check_zip(path: Path) -> None:
    with path.open("rb") as handle:
        magic = handle.read(4)
    if magic == OLE_MAGIC:
        raise refuse(path, "the workbook is password-protected (encrypted) or a legacy .xls "
                     "file", "an unprotected .xlsx: open it in a spreadsheet program, remove "
                     "the password and save as .xlsx")
    if magic != ZIP_MAGIC:
        raise refuse(path, "not an XLSX workbook (no zip signature)",
                     "an .xlsx workbook, or a .csv text file with a .csv extension")
    try:
        with zipfile.ZipFile(path) as archive:
            infos = archive.infolist()
            names = {info.filename for info in infos}
            if "xl/workbook.xml" not in names:
                raise refuse(path, "a zip file but not an Excel workbook (no xl/workbook.xml)",
                             "an .xlsx workbook")
            total = sum(info.file_size for info in infos)
            if total > MAX_UNCOMPRESSED_BYTES:
                raise refuse(path, f"the workbook declares {total} bytes uncompressed, above "
                             f"the limit of {MAX_UNCOMPRESSED_BYTES} (possible zip bomb)",
                             "a smaller workbook; split the register into several files")
            for info in infos:
                if info.flag_bits & 0x1:
                    raise refuse(path, "the workbook has encrypted parts",
                                 "an unprotected .xlsx")
                ratio = info.file_size / max(info.compress_size, 1)
                if info.file_size > _CHUNK and ratio > MAX_COMPRESSION_RATIO:
                    raise refuse(path, f"part {info.filename} expands {ratio:.0f} times, above "
                                 f"the limit of {MAX_COMPRESSION_RATIO} (possible zip bomb)",
                                 "a workbook saved normally by a spreadsheet program")
            for info in infos:
                _check_part(path, archive, info)
            _scan_sheets(path, archive, [info.filename for info in infos])
    except zipfile.BadZipFile as exc:
        raise refuse(path, f"corrupt workbook ({exc})",
                     "an .xlsx that opens in a spreadsheet program; save it again") from exc


def _scan_sheets(path: Path, archive: zipfile.ZipFile, names: list[str]) -> None:
    """Refuse the workbook when a worksheet passes a limit of :mod:`xlsx_scan`."""
    part = "xl/_rels/workbook.xml.rels"
    try:
        part, sheets = xlsx_scan.parts_to_scan(archive, names)
        lengths = xlsx_scan.shared_string_lengths(archive, part) if part else \
            xlsx_scan.array("q")
        expanded = [0]
        for part in sheets:
            xlsx_scan.sheet_extent(archive, part, lengths, expanded)
    except xlsx_scan.WorkbookProblem as exc:
        raise refuse(path, f"part {part}: {exc.problem}", exc.expected) from exc


def _check_part(path: Path, archive: zipfile.ZipFile, info: zipfile.ZipInfo) -> None:
    """Decompress one part in bounded chunks: CRC and true size must match the declared size."""
    with archive.open(info) as part:
        first = part.read(_CHUNK)
        if info.filename.startswith("xl/worksheets/"):
            match = _DIMENSION.search(first[:16384])
            if match and match.group(1) and int(match.group(1)) > MAX_ROWS:
                raise refuse(path, f"worksheet part {info.filename} declares "
                             f"{int(match.group(1))} rows, above the limit of {MAX_ROWS}",
                             "a register split into files of at most that many rows")
        if not xlsx_scan.scanned(info.filename):  # the scan reads those to their end
            while part.read(_CHUNK):
                pass


def _cell_text(value) -> str:
    if isinstance(value, str):
        return value
    if isinstance(value, bool):
        return "TRUE" if value else "FALSE"
    if isinstance(value, float):
        return str(int(value)) if value.is_integer() and abs(value) < 1e15 else f"{value:.15g}"
    if value is None:
        return ""
    if hasattr(value, "isoformat"):
        return value.isoformat()
    return str(value)


def _text_frame(rows: list[list]) -> tuple[pd.DataFrame, list]:
    """Cells to text, converting each distinct value once per column.

    Returns the text frame and, per column, the codes and stripped distinct texts.
    """
    frame = pd.DataFrame(rows, dtype=object)
    columns, stripped = {}, []
    for position in frame.columns:
        codes, uniques = pd.factorize(frame[position].to_numpy(), use_na_sentinel=False)
        texts = np.array([_cell_text(v) for v in uniques], dtype=object)
        columns[position] = texts[codes]
        stripped.append(recode(codes, np.array([t.strip() for t in texts], dtype=object)))
    return pd.DataFrame(columns, dtype=object), stripped


def read_xlsx(path: Path, sheets, lookup: Lookup) -> tuple[list[RawSheet], list[str]]:
    _check_zip(path)
    try:
        workbook = python_calamine.CalamineWorkbook.from_path(str(path))
    except python_calamine.PasswordError as exc:
        raise refuse(path, "the workbook is password-protected",
                     "an unprotected .xlsx") from exc
    except Exception as exc:  # the reader's own error types vary by version
        raise refuse(path, f"corrupt workbook ({exc})",
                     "an .xlsx that opens in a spreadsheet program; save it again") from exc
    names = list(workbook.sheet_names)
    if sheets:
        missing = [s for s in sheets if s not in names]
        if missing:
            raise refuse(path, f"no sheet named {', '.join(map(repr, missing))}",
                         f"one of the workbook's sheets: {', '.join(names)}")
    wanted = list(sheets) if sheets else names
    out: list[RawSheet] = []
    notes: list[str] = []
    for sheet_name in wanted:
        try:
            sheet = workbook.get_sheet_by_name(sheet_name)
            grid = sheet.to_python(skip_empty_area=True)
            first_row, first_column = sheet.start or (0, 0)
            merged = _merged_ranges(path, sheet_name, sheet.merged_cell_ranges or [],
                                    first_row, first_column, grid)
        except Exception as exc:  # the reader's own error types vary by version
            raise refuse(path, f"corrupt worksheet ({exc})", "an .xlsx that opens in a "
                         "spreadsheet program; save it again", sheet=sheet_name) from exc
        if len(grid) > MAX_ROWS:
            raise refuse(path, f"{len(grid)} rows, above the limit of {MAX_ROWS}",
                         "a register split into files of at most that many rows",
                         sheet=sheet_name)
        _fill_merged(grid, merged)
        head = [[_cell_text(v).strip() for v in row] for row in grid[:HEADER_SEARCH_ROWS]]
        index, row_score = find_header(head, lookup)
        has_tag = index >= 0 and any(
            (hit := lookup.column_of(c)) is not None and hit[0] == "tag" for c in head[index])
        if not has_tag:
            problem = ("no header row with a tag column" if index >= 0 else
                       f"no header row found in the first {HEADER_SEARCH_ROWS} rows")
            if sheets:
                raise refuse(path, problem, "a header row with a tag column (tag, line no, "
                             "equipment tag, ...; see rules/aliases.toml)", sheet=sheet_name)
            notes.append(f"{path.name}:{sheet_name}: skipped, {problem}")
            continue
        groups = _groups(head, merged, index)
        data, stripped = _text_frame(grid[index + 1:])
        out.append(finish(path, sheet_name, head[index], groups, data,
                           first_row + index + 1, False, stripped))
    if not out:
        raise refuse(path, "no sheet has a header row with a tag column",
                     "a header row with a tag column (tag, line no, equipment tag, ...)")
    return out, notes


def _merged_ranges(path: Path, sheet_name: str, merged, first_row: int, first_column: int,
                   grid: list[list]) -> list:
    """The distinct merged ranges, moved to the grid's origin and cut to it.  Ranges that
    overlap (no spreadsheet program writes them) could make filling cost more than the grid
    holds: refused."""
    height, width = len(grid), max((len(row) for row in grid), default=0)
    ranges = []
    for (r0, c0), (r1, c1) in dict.fromkeys(tuple(map(tuple, m)) for m in merged):
        r0, r1 = max(r0 - first_row, 0), min(r1 - first_row, height - 1)
        c0, c1 = max(c0 - first_column, 0), min(c1 - first_column, width - 1)
        if r0 <= r1 and c0 <= c1:
            ranges.append(((r0, c0), (r1, c1)))
    covered = sum((r1 - r0 + 1) * (c1 - c0 + 1) for (r0, c0), (r1, c1) in ranges)
    if covered > height * width:
        raise refuse(path, f"{len(ranges)} merged ranges overlap (they cover {covered:,} cells "
                     f"of a {height * width:,}-cell sheet)", "a sheet whose merged cells do not "
                     "overlap; unmerge them and save it again", sheet=sheet_name)
    return ranges


def _fill_merged(grid: list[list], merged) -> None:
    """Give every cell of a merged range the value shown in it (its top-left cell)."""
    for (r0, c0), (r1, c1) in merged:
        if r0 >= len(grid) or c0 >= len(grid[r0]):
            continue
        value = grid[r0][c0]
        for r in range(r0, min(r1, len(grid) - 1) + 1):
            for c in range(c0, min(c1, len(grid[r]) - 1) + 1):
                grid[r][c] = value


def _groups(head: list[list[str]], merged, header_index: int) -> list[str] | None:
    """Group labels of cells merged across columns just above the header row."""
    if header_index == 0:
        return None
    groups = [""] * len(head[header_index])
    for (r0, c0), (r1, c1) in merged:
        if r1 == header_index - 1 and c1 > c0:
            for c in range(c0, min(c1, len(groups) - 1) + 1):
                groups[c] = head[r0][c0]
    return groups if any(groups) else None


