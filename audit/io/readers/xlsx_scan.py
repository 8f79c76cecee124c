"""A streaming look at a workbook's XML before the workbook reader is given it.

The reader (python-calamine) builds each sheet as a dense rectangle spanning its cells with a
value, and reads shared strings by index.  A tiny hostile workbook can make that rectangle
billions of cells (one value at A1, one at XFD1048576: the reader aborts the process), repeat a
32,000-character shared string in hundreds of thousands of cells, give a shared-string index
that is negative, text or past the table (the reader takes string 0), or hold millions of merged
ranges.  So every worksheet part is first parsed here as a stream (expat, no document type
declaration allowed, memory bounded by the chunk size) and the workbook is refused when:

* its cells with a value span more than ``max(MIN_AREA, AREA_PER_CELL x cells)`` cells;
* a shared-string index is not a whole number below the table's length;
* the text its shared-string cells expand to passes ``MAX_EXPANDED_CHARS`` characters;
* a sheet has more than ``MAX_MERGED_RANGES`` merged ranges.

Two ways to the same answer: the fast one reads a part with anchored, bounded byte patterns in
the exact form spreadsheet programs write (``<c r="B7" t="s"><v>12</v>``) and numpy, and is
used only when it accounts for every cell start tag (and every shared-string cell) of the part;
any other part (another attribute order, cells without a reference, a rectangle over the limit
counting empty styled cells) is read again by expat, element by element, which counts only
cells holding a value.
"""

from __future__ import annotations

import posixpath
import re
import zipfile
from operator import itemgetter
from array import array
from dataclasses import dataclass
from xml.parsers import expat

import numpy as np

MIN_AREA = 1 << 20               # cells: any sheet up to this rectangle is fine, however sparse
AREA_PER_CELL = 16               # a larger rectangle must be at least 1/16 filled
MAX_EXPANDED_CHARS = 1 << 29     # characters of text in shared-string cells, expanded
MAX_MERGED_RANGES = 100_000      # merged ranges per sheet
_CHUNK = 1 << 20
_FAST_CHUNK = 16 << 20     # bytes of a part read at a time by the fast path
_FAST_CARRY = 64 << 20     # a row longer than this sends the part to the exact path
_REFERENCE = re.compile(r"([A-Z]{1,3})([0-9]{1,7})")
# A cell start tag: in the canonical form (reference first, then for a shared-string cell its
# style, type and index, the cell's one value), or any other form, which sends the part to the
# exact path (so does a shared-string cell with a second value: the reader takes the last).
_CELL = re.compile(rb'<c(?: r="([A-Z]{1,3})([0-9]{1,7})"(?:(?: s="[0-9]{1,6}")? t="s"'
                   rb'(?: s="[0-9]{1,6}")?><v>([0-9]{1,10})</v></c>)?|[\s/>])')
_SIMPLE_SI = re.compile(rb'<si><t(?: xml:space="preserve")?>([^<]*)</t></si>')
_ENDS = (b" ", b"\t", b"\n", b"\r", b">", b"/")


def _prefixed(piece: bytes, name: bytes) -> bool:
    """Whether ``piece`` may hold a start tag ``<prefix:name``."""
    return b":" + name in piece and any(piece.count(b":" + name + end) for end in _ENDS)


class _NotSimple(Exception):
    """The fast path cannot account for this part; read it with expat."""


class WorkbookProblem(ValueError):
    """What is wrong with a part, and what to do instead."""

    def __init__(self, problem: str, expected: str):
        super().__init__(problem)
        self.problem, self.expected = problem, expected


@dataclass
class SheetExtent:
    """The cells with a value of one worksheet part (0-based rows and columns)."""

    cells: int = 0
    first_row: int = -1
    last_row: int = -1
    first_column: int = -1
    last_column: int = -1
    merged: int = 0

    @property
    def area(self) -> int:
        if not self.cells:
            return 0
        return (self.last_row - self.first_row + 1) * (self.last_column - self.first_column + 1)


def scanned(part: str) -> bool:
    """Whether the part is one this module reads to its end: a worksheet or the shared
    strings (which the zip's CRC check then covers too)."""
    lower = part.lower()
    return lower.endswith(".xml") and (
        part.startswith("xl/worksheets/") and "/_rels/" not in part
        or lower.startswith("xl/") and lower.rsplit("/", 1)[-1].startswith("sharedstrings"))


_RELATIONSHIPS = "xl/_rels/workbook.xml.rels"


def parts_to_scan(archive: zipfile.ZipFile, names: list[str]) -> tuple[str | None, list[str]]:
    """``(shared strings part or None, worksheet parts)``: the parts under ``xl/worksheets/``
    and those the workbook's relationships name as worksheets or shared strings, wherever they
    are (the reader follows the relationships)."""
    sheets = [n for n in names if scanned(n) and n.startswith("xl/worksheets/")]
    shared = [n for n in names if scanned(n) and not n.startswith("xl/worksheets/")]
    if _RELATIONSHIPS in names:
        found = []

        def start(tag, attributes):
            if _local(tag) == "Relationship":
                found.append((attributes.get("Type", ""), attributes.get("Target", "")))
        with archive.open(_RELATIONSHIPS) as part:
            _feed(_parser(start), part)
        for kind, target in found:
            target = target[1:] if target.startswith("/") else posixpath.normpath("xl/" + target)
            if target not in names:
                continue
            if kind.endswith("/worksheet") and target not in sheets:
                sheets.append(target)
            elif kind.endswith("/sharedStrings"):
                shared.insert(0, target)
    return (shared[0] if shared else None), sheets


def _local(name: str) -> str:
    return name[name.find(":") + 1:]


def _column_number(letters: str) -> int:
    number = 0
    for letter in letters:
        number = number * 26 + ord(letter) - 64
    return number - 1


def cell_name(row: int, column: int) -> str:
    """``XFD1048576`` for 0-based (1048575, 16383)."""
    letters, column = "", column + 1
    while column:
        column, rest = divmod(column - 1, 26)
        letters = chr(65 + rest) + letters
    return f"{letters}{row + 1}"


def _parser(start, end=None, text=None) -> expat.XMLParserType:
    parser = expat.ParserCreate()
    parser.SetParamEntityParsing(expat.XML_PARAM_ENTITY_PARSING_NEVER)
    parser.buffer_text = True

    def no_doctype(*_):
        raise WorkbookProblem("the part declares a document type (DTD), which a workbook never "
                              "does", "a workbook saved by a spreadsheet program")
    parser.StartDoctypeDeclHandler = no_doctype
    parser.StartElementHandler = start
    if end is not None:
        parser.EndElementHandler = end
    if text is not None:
        parser.CharacterDataHandler = text
    return parser


def _feed(parser, part) -> None:
    try:
        while chunk := part.read(_CHUNK):
            parser.Parse(chunk, False)
        parser.Parse(b"", True)
    except expat.ExpatError as exc:
        raise WorkbookProblem(f"the part is not well-formed XML ({exc})",
                              "an .xlsx that opens in a spreadsheet program; save it again") from exc


def _pieces(part, end_tag: bytes):
    """The part's bytes in pieces of about ``_FAST_CHUNK``, each cut just after the last
    ``end_tag``, so no element of interest is cut in two."""
    carry = b""
    while chunk := part.read(_FAST_CHUNK):
        buffer = carry + chunk
        at = buffer.rfind(end_tag)
        if at < 0:
            if len(buffer) > _FAST_CARRY:
                raise _NotSimple
            carry = buffer
            continue
        yield buffer[:at + len(end_tag)]
        carry = buffer[at + len(end_tag):]
    if carry:
        yield carry


def shared_string_lengths(archive: zipfile.ZipFile, name: str) -> array:
    """The length of each shared string (``<si>``) of the part ``name``: its stored bytes on
    the fast path (never fewer than its characters), its characters on the exact one."""
    try:
        lengths = array("q")
        with archive.open(name) as part:
            for piece in _pieces(part, b"</si>"):
                simple = [len(t) for t in _SIMPLE_SI.findall(piece)]
                if _prefixed(piece, b"si") or len(simple) != sum(
                        piece.count(b"<si" + end) for end in _ENDS):
                    raise _NotSimple
                lengths.extend(simple)
        return lengths
    except _NotSimple:
        return _exact_shared_string_lengths(archive, name)


def _exact_shared_string_lengths(archive: zipfile.ZipFile, name: str) -> array:
    lengths = array("q")
    inside = [False]

    def start(tag, _attributes):
        tag = _local(tag)
        if tag == "si":
            lengths.append(0)
        inside[0] = tag == "t" and bool(lengths)

    def end(_tag):
        inside[0] = False

    def text(data):
        if inside[0]:
            lengths[-1] += len(data)

    with archive.open(name) as part:
        _feed(_parser(start, end, text), part)
    return lengths


def sheet_extent(archive: zipfile.ZipFile, name: str, lengths: array,
                 expanded: list[int]) -> SheetExtent:
    """Scan one worksheet part; ``expanded[0]`` accumulates the shared-string characters its
    cells expand to (across the workbook).

    Raises
    ------
    WorkbookProblem
        For a shared-string index that is not one, or a limit of this module passed.
    """
    before = expanded[0]
    try:
        extent = _fast_extent(archive, name, np.frombuffer(lengths, dtype=np.int64), expanded)
        if extent.area <= _area_limit(extent):
            return extent
    except _NotSimple:
        pass
    expanded[0] = before
    extent = _exact_extent(archive, name, lengths, expanded)
    if extent.area > _area_limit(extent):
        first = cell_name(extent.first_row, extent.first_column)
        last = cell_name(extent.last_row, extent.last_column)
        raise WorkbookProblem(
            f"its cells with a value span {first}:{last} ({extent.area:,} cells) for "
            f"{extent.cells:,} values, above the limit of {_area_limit(extent):,} cells",
            "a sheet whose values sit together: delete the stray cells far from the register "
            "and save it again")
    return extent


def _fast_extent(archive, name, lengths: np.ndarray, expanded: list[int]) -> SheetExtent:
    """The fast path: every cell start tag in the canonical form, with its reference first,
    and every shared-string cell as ``<c r=".." [s=".."] t="s" [s=".."]><v>index</v>``.
    Counts every cell written (empty styled ones too); the exact path refines an area over
    the limit."""
    extent = SheetExtent()
    with archive.open(name) as part:
        for piece in _pieces(part, b"</row>"):
            cells = _CELL.findall(piece)
            if _prefixed(piece, b"c"):
                raise _NotSimple
            indices = list(filter(None, map(itemgetter(2), cells)))
            # every attribute valued s, however written, must be the t="s" of a cell read here
            if len(indices) != piece.count(b'"s"') + piece.count(b"'s'"):
                raise _NotSimple
            extent.merged += piece.count(b"mergeCell")
            if extent.merged > MAX_MERGED_RANGES:
                raise WorkbookProblem(f"more than {MAX_MERGED_RANGES} merged ranges",
                                      "a sheet with fewer merged cells; unmerge them")
            if cells:
                letters = set(map(itemgetter(0), cells))
                if b"" in letters:  # a cell start tag in another form
                    raise _NotSimple
                rows = np.array(list(map(itemgetter(1), cells)), dtype="S7").astype(np.int64) - 1
                numbers = [_column_number(x.decode()) for x in letters]
                _extend_many(extent, np.array([rows.min(), rows.max()]),
                             np.array([min(numbers), max(numbers)]), len(cells))
            if indices:
                _count_shared_many(indices, lengths, expanded)
    return extent


def _extend_many(extent: SheetExtent, rows: np.ndarray, columns: np.ndarray, cells: int) -> None:
    """Widen ``extent`` to the rows and columns given (their extremes suffice)."""
    if extent.cells:
        rows = np.append(rows, [extent.first_row, extent.last_row])
        columns = np.append(columns, [extent.first_column, extent.last_column])
    extent.first_row, extent.last_row = int(rows.min()), int(rows.max())
    extent.first_column, extent.last_column = int(columns.min()), int(columns.max())
    extent.cells += cells


def _count_shared_many(indices: list[bytes], lengths: np.ndarray, expanded: list[int]) -> None:
    """Add the text the shared-string cells expand to: bounded by the longest string first,
    summed exactly only when that bound passes the limit.  An index past the table sends the
    part to the exact path, which names the cell."""
    longest = int(lengths.max()) if len(lengths) else 0
    if expanded[0] + len(indices) * longest <= MAX_EXPANDED_CHARS:
        if max(map(len, indices)) < len(str(len(lengths))):
            expanded[0] += len(indices) * longest
            return
    numbers = np.array(indices, dtype="S10").astype(np.int64)
    if len(numbers) and int(numbers.max()) >= len(lengths):
        raise _NotSimple
    expanded[0] += int(lengths[numbers].sum())
    if expanded[0] > MAX_EXPANDED_CHARS:
        raise WorkbookProblem(f"its shared-string cells expand to more than "
                              f"{MAX_EXPANDED_CHARS:,} characters of text",
                              "a smaller register (or fewer repeated long texts)")


def _area_limit(extent: SheetExtent) -> int:
    return max(MIN_AREA, AREA_PER_CELL * extent.cells)


def _exact_extent(archive, name, lengths: array, expanded: list[int]) -> SheetExtent:
    """The exact path: expat, element by element; only cells holding a value count."""
    extent = SheetExtent()
    state = {"row": -1, "column": -1, "shared": False, "value": False, "index": None}

    def start(tag, attributes):
        tag = _local(tag)
        if tag == "c":
            reference = attributes.get("r")
            match = _REFERENCE.fullmatch(reference) if reference else None
            if match:
                state["column"] = _column_number(match.group(1))
                state["row"] = int(match.group(2)) - 1
            else:
                state["column"] += 1
            state["shared"] = attributes.get("t") == "s"
            state["value"], state["index"] = False, None
        elif tag in ("v", "is", "f"):
            state["value"] = True
            if tag == "v" and state["shared"]:
                state["index"] = []
        elif tag == "row":
            number = attributes.get("r")
            state["row"] = int(number) - 1 if number and number.isdigit() and len(number) < 8 \
                else state["row"] + 1
            state["column"] = -1
        elif tag == "mergeCell":
            extent.merged += 1
            if extent.merged > MAX_MERGED_RANGES:
                raise WorkbookProblem(f"more than {MAX_MERGED_RANGES} merged ranges",
                                      "a sheet with fewer merged cells; unmerge them")

    def text(data):
        if state["index"] is not None:
            state["index"].append(data)

    def end(tag):
        tag = _local(tag)
        if tag == "v" and state["index"] is not None:
            _count_shared(state, "".join(state["index"]), lengths, expanded)
            state["index"] = None
        elif tag == "c" and state["value"]:
            _extend(extent, state["row"], state["column"])

    with archive.open(name) as part:
        _feed(_parser(start, end, text), part)
    return extent


def _count_shared(state, index_text: str, lengths: array, expanded: list[int]) -> None:
    index_text = index_text.strip()
    if not (index_text.isdigit() and index_text.isascii() and len(index_text) <= 10
            and int(index_text) < len(lengths)):
        where = cell_name(max(state["row"], 0), max(state["column"], 0))
        shown = index_text if len(index_text) <= 20 else index_text[:20] + "…"
        raise WorkbookProblem(f"cell {where}: shared-string index {shown!r} is not one of the "
                              f"workbook's {len(lengths)} shared strings",
                              "an .xlsx saved by a spreadsheet program; save it again")
    expanded[0] += lengths[int(index_text)]
    if expanded[0] > MAX_EXPANDED_CHARS:
        raise WorkbookProblem(f"its shared-string cells expand to more than "
                              f"{MAX_EXPANDED_CHARS:,} characters of text",
                              "a smaller register (or fewer repeated long texts)")


def _extend(extent: SheetExtent, row: int, column: int) -> None:
    row, column = max(row, 0), max(column, 0)
    if not extent.cells:
        extent.first_row = extent.last_row = row
        extent.first_column = extent.last_column = column
    else:
        extent.first_row = min(extent.first_row, row)
        extent.last_row = max(extent.last_row, row)
        extent.first_column = min(extent.first_column, column)
        extent.last_column = max(extent.last_column, column)
    extent.cells += 1
