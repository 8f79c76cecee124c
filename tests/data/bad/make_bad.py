"""Write the binary and generated files of the bad-input corpus (run from anywhere).

The plain-text files beside them (registers/*.csv, rules/*/*.toml) are written by hand; this
script writes what cannot be typed: other encodings, NUL bytes, very long cells and lines,
broken and hostile workbooks, and two rule files.  Each file's kind and expected behaviour is in
the table at the top of tests/bad/test_bad_registers.py and tests/bad/test_bad_rules.py.
Invented content in an invented plant (Larkmoor Chemical Works).
"""

from __future__ import annotations

import datetime
import io
import struct
import zipfile
from pathlib import Path

import xlsxwriter

HERE = Path(__file__).parent
REGISTERS = HERE / "registers"
RULES = HERE / "rules"
HEADER = ["tag", "nps", "length", "temp", "layers"]
GOOD_ROW = ["BX-1", 2, 10, 150, "mineral-wool 40mm"]
FIXED_TIME = datetime.datetime(2026, 1, 1)

LINE = "tag,nps,length,temp,layers\nBE-1,2,10,150,mineral-wool 40mm\n"
WIDE_COLUMNS = 20_000
LONG_CELL = 40_000        # above the 32,767 characters a spreadsheet cell holds
HUGE_CELL = 200_000       # above the 131,072-character field limit of Python's csv module


def workbook_bytes(rows, *, formulas=()) -> bytes:
    """A small workbook (one sheet 'Lines'); ``formulas``: (row, col, formula, cached value)."""
    buffer = io.BytesIO()
    book = xlsxwriter.Workbook(buffer, {"in_memory": True})
    book.set_properties({"created": FIXED_TIME})
    sheet = book.add_worksheet("Lines")
    for r, row in enumerate(rows):
        for c, value in enumerate(row):
            sheet.write(r, c, value)
    for r, c, formula, value in formulas:
        sheet.write_formula(r, c, formula, None, value)
    book.close()
    return buffer.getvalue()


def rezip(data: bytes, change, stored=()) -> bytes:
    """Copy a zip, passing each part through ``change(name, bytes)``; parts in ``stored`` are
    written uncompressed (so a flipped byte reaches the CRC check, not the inflater)."""
    out = io.BytesIO()
    with zipfile.ZipFile(io.BytesIO(data)) as old, zipfile.ZipFile(out, "w") as new:
        for info in old.infolist():
            method = zipfile.ZIP_STORED if info.filename in stored else zipfile.ZIP_DEFLATED
            new.writestr(zipfile.ZipInfo(info.filename, date_time=(2026, 1, 1, 0, 0, 0)),
                         change(info.filename, old.read(info)), compress_type=method)
    return out.getvalue()


def corrupt_crc(data: bytes) -> bytes:
    """Store the sheet uncompressed, then change one byte of its XML inside the zip."""
    stored = rezip(data, lambda name, part: part, stored={"xl/worksheets/sheet1.xml"})
    at = stored.index(b"<v>150</v>")
    return stored[:at] + b"<v>151</v>" + stored[at + 10:]


def declared_bomb(data: bytes) -> bytes:
    """Declare 4 GB uncompressed for one part in the central directory (a zip bomb's shape)."""
    patched = bytearray(data)
    start = patched.rfind(b"PK\x01\x02")
    struct.pack_into("<I", patched, start + 24, 0xFFFF0000)
    return bytes(patched)


def ratio_bomb(data: bytes) -> bytes:
    """Pad the styles part with 8 MiB of spaces: it expands thousands of times."""
    return rezip(data, lambda name, part: part + b" " * (8 << 20) if name == "xl/styles.xml"
                 else part)


def main() -> None:
    REGISTERS.mkdir(exist_ok=True)
    text = {
        # UTF-16 without a byte-order mark: every other byte is NUL
        "utf16_no_bom.csv": LINE.encode("utf-16-le"),
        # UTF-32 with its byte-order mark
        "utf32.csv": LINE.encode("utf-32"),
        # Shift-JIS remarks (a contractor's export): not UTF-8, read as Windows-1252
        "shift_jis.csv": (LINE.replace("layers", "layers,remarks")
                          .replace("40mm\n", "40mm,\u914d\u7ba1\u30e9\u30a4\u30f3\n")
                          .encode("shift_jis")),
        # a NUL byte in the middle of a UTF-8 text file
        "nul_byte.csv": LINE.encode() + b"BE-2,2,10,1\x0050,none\n",
        # a 200,000-character cell in the first lines (where the header is looked for)
        "huge_cell_head.csv": ("tag,nps,length,temp,layers\n"
                               f"BH-1,2,10,{'9' * HUGE_CELL},mineral-wool 40mm\n").encode(),
        # 40 good rows, then 40,000-character cells in a parsed and a carried column
        "long_cell.csv": ("tag,nps,length,temp,layers,remarks\n"
                          + "".join(f"BL-{i},2,10,150,mineral-wool 40mm,\n" for i in range(40))
                          + f"BL-40,2,10,{'9' * LONG_CELL},mineral-wool 40mm,\n"
                          + f"BL-41,2,10,150,mineral-wool 40mm,{'y' * LONG_CELL}\n").encode(),
        # a carriage return inside a quoted cell (RFC 4180 allows line breaks inside quotes)
        "carriage_return_in_cell.csv": (b'tag,nps,length,temp,layers,remarks\r\n'
                                        b'BC-1,2,10,150,none,"first\rsecond"\r\n'),
        # 20,000 columns (Excel stops at 16,384)
        "wide.csv": (",".join(HEADER + [f"extra {i}" for i in range(WIDE_COLUMNS)]) + "\n"
                     + ",".join(str(v) for v in GOOD_ROW) + "," * WIDE_COLUMNS + "\n").encode(),
    }
    good = workbook_bytes([HEADER, GOOD_ROW])
    books = {
        "truncated.xlsx": good[: len(good) // 2],
        "corrupt_crc.xlsx": corrupt_crc(good),
        "zip_bomb_declared.xlsx": declared_bomb(good),
        "zip_bomb_ratio.xlsx": ratio_bomb(good),
        # an encrypted OOXML workbook is an OLE compound file (MS-OFFCRYPTO 2.3.4)
        "password_protected.xlsx": bytes.fromhex("D0CF11E0A1B11AE1") + b"\0" * 504,
        "empty_sheet.xlsx": workbook_bytes([]),
        "header_only.xlsx": workbook_bytes([HEADER]),
        # formulas: one with a cached value that disagrees with the formula (the cached value
        # is what the file shows; nothing is evaluated), one without a cached value, and a
        # formula in the tag column
        "formulas.xlsx": workbook_bytes(
            [HEADER, ["BF-1", 2, 10, None, "mineral-wool 40mm"],
             ["BF-2", 2, 10, None, "mineral-wool 40mm"], [None, 2, 10, 150, "none"]],
            formulas=[(1, 3, "=1+1", 150), (2, 3, "=A1*2", ""),
                      (3, 0, '=HYPERLINK("http://example.invalid","BF-3")', "BF-3")]),
    }
    for name, data in {**text, **books}.items():
        (REGISTERS / name).write_bytes(data)
    rule_files = {
        # a rule file saved as Windows-1252 (degree sign as one byte 0xB0)
        "not_utf8/plant.toml": ('# plant rules, 20 \u00b0C\n[site.plant-yard]\nambient = 20\n'
                                'wind = 2\nrh = 70\nsource = "invented"\n').encode("cp1252"),
        # a k table nested 1000 deep: TOML's parser recurses once per level
        "deep_nesting/plant.toml": ('[material.plant-foam]\nk = ' + "[" * 1000 + "]" * 1000
                                    + '\nmax_temp = 100\nsource = "invented"\n').encode(),
    }
    for name, data in rule_files.items():
        path = RULES / name
        path.parent.mkdir(parents=True, exist_ok=True)
        path.write_bytes(data)


if __name__ == "__main__":
    main()
