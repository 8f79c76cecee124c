"""Hostile and odd workbooks (audit/io/readers/workbook.py): every refusal is a RegisterError
naming the file.  Hostile workbooks are built here, in a temporary folder, from a small valid one.
"""

import struct
import zipfile
from pathlib import Path

import pytest
from support import refused_register as _raises
import openpyxl

from audit.io.readers import read_register

CORPUS = Path(__file__).parents[2] / "data" / "registers"


@pytest.fixture
def workbook(tmp_path):
    path = tmp_path / "good.xlsx"
    book = openpyxl.Workbook()
    sheet = book.active
    sheet.title = "Lines"
    sheet.append(["tag", "nps", "length", "temp", "layers"])
    sheet.append(["G-1", 2, 5, 100, "none"])
    book.save(path)
    return path


def _rewrite(source, target, change):
    """Copy a zip, passing each part's bytes through ``change(name, data)``."""
    with zipfile.ZipFile(source) as old, zipfile.ZipFile(target, "w", zipfile.ZIP_DEFLATED) as new:
        for info in old.infolist():
            new.writestr(info.filename, change(info.filename, old.read(info)))


def test_good_workbook_reads(workbook):
    table = read_register(workbook)
    assert list(table["tag"]) == ["G-1"] and list(table["status"]) == ["ok"]


def test_corrupt_zip(tmp_path, workbook):
    path = tmp_path / "corrupt.xlsx"
    path.write_bytes(workbook.read_bytes()[:300])
    _raises(path, "corrupt workbook")


def test_zip_bomb_declared_size(tmp_path, workbook):
    # Patch the central directory's uncompressed size of one part to 4 GB: the declared total
    # is refused before any part is decompressed.
    data = bytearray(workbook.read_bytes())
    start = data.rfind(b"PK\x01\x02")
    struct.pack_into("<I", data, start + 24, 0xFFFF0000)
    path = tmp_path / "bomb.xlsx"
    path.write_bytes(bytes(data))
    _raises(path, "declares 42949.* bytes uncompressed, above the limit .*possible zip bomb")


def test_zip_bomb_compression_ratio(tmp_path, workbook):
    path = tmp_path / "ratio.xlsx"
    _rewrite(workbook, path, lambda name, data: data + (b" " * (8 << 20) if
                                                       name == "xl/styles.xml" else b""))
    _raises(path, "expands .* times, above the limit of 200 .*possible zip bomb")


def test_declared_size_that_lies_is_caught(tmp_path, workbook):
    # Declare a part smaller than it is: the bounded decompression stops at the declared size
    # and the CRC no longer matches.
    data = bytearray(workbook.read_bytes())
    start = data.rfind(b"PK\x01\x02")
    declared = struct.unpack_from("<I", data, start + 24)[0]
    struct.pack_into("<I", data, start + 24, max(declared // 2, 1))
    path = tmp_path / "liar.xlsx"
    path.write_bytes(bytes(data))
    _raises(path, "corrupt workbook")


def test_row_count_above_limit_is_refused_before_reading(tmp_path, workbook):
    path = tmp_path / "tall.xlsx"
    def taller(name, data):
        if not name.startswith("xl/worksheets/"):
            return data
        assert b'<dimension ref="A1:E2"' in data  # the part this test rewrites
        return data.replace(b'<dimension ref="A1:E2"', b'<dimension ref="A1:E2000000"')
    _rewrite(workbook, path, taller)
    _raises(path, "declares 2000000 rows, above the limit of 1048576")


def test_password_protected_workbook(tmp_path):
    # An encrypted OOXML workbook is an OLE compound file (MS-OFFCRYPTO 2.3.4): it starts with
    # the OLE signature D0 CF 11 E0 A1 B1 1A E1 instead of a zip header.
    path = tmp_path / "locked.xlsx"
    path.write_bytes(bytes.fromhex("D0CF11E0A1B11AE1") + b"\0" * 504)
    _raises(path, "password-protected")


def test_named_sheets(workbook):
    assert len(read_register(workbook, sheets=["Lines"])) == 1
    _raises(workbook, "no sheet named 'Vessels'", sheets=["Vessels"])
    error = _raises(CORPUS / "multi_sheet.xlsx", "no header row", sheets=["Notes"])
    assert error.sheet == "Notes"


def test_zip_that_is_not_a_workbook(tmp_path):
    path = tmp_path / "archive.xlsx"
    with zipfile.ZipFile(path, "w") as archive:
        archive.writestr("readme.txt", "hello")
    _raises(path, "not an Excel workbook")
