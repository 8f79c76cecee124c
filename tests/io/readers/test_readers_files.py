"""Whole-file problems of audit/io/readers/files.py (file types, CSV text): every one is a
RegisterError naming the file and saying what to do."""

from pathlib import Path

import pytest
from support import refused_register as _raises

from audit.io.readers import files, read_register

CORPUS = Path(__file__).parents[2] / "data" / "registers"


@pytest.mark.parametrize("name, content, pattern", [
    ("register.pdf", b"%PDF-1.7", "unsupported file type '.pdf'"),
    ("register.ods", b"PK\x03\x04", "unsupported file type '.ods'"),
    ("register.xlsx", b"tag,nps\nA,2\n", "not an XLSX workbook"),
    ("register.csv", b"PK\x03\x04rest", "zip container"),
    ("register.csv", b"\x00\x01\x02binary\x00", "binary data"),
    ("register.csv", b"", "the file is empty"),
    ("register.csv", b" \r\n \n", "the file is empty"),
    ("register.csv", b"a,b,c\n1,2,3\n", "no header row found"),
    ("register", b"tag\nA\n", "unsupported file type '\\(no extension\\)'"),
])
def test_wrong_type_or_empty(tmp_path, name, content, pattern):
    path = tmp_path / name
    path.write_bytes(content)
    _raises(path, pattern)


def test_missing_file(tmp_path):
    _raises(tmp_path / "nowhere.csv", "file not found")


def test_header_only_and_no_tag_column():
    _raises(CORPUS / "header_only.csv", "a header row but no data rows")
    _raises(CORPUS / "no_tag_column.csv", "missing the required tag column")


def test_header_unit_of_the_wrong_kind(tmp_path):
    path = tmp_path / "units.csv"
    path.write_text("tag,temp [mm],nps\nA,100,2\n")
    _raises(path, "header 'temp \\[mm\\]': 'mm' is not a unit of temperature")
    path.write_text("tag,temp,nps [ft]\nA,100,2\n")
    _raises(path, "not a nominal-size unit")


def test_limits_are_documented():
    for name in ("MAX_FILE_BYTES", "MAX_UNCOMPRESSED_BYTES", "MAX_COMPRESSION_RATIO", "MAX_ROWS"):
        assert name in files.__doc__


def test_csv_with_more_fields_than_header(tmp_path):
    path = tmp_path / "ragged.csv"
    path.write_text("tag,nps,length,temp,layers\nR-1,2,5,100,none\nR-2,2,5,100,none,spare,x\n")
    table = read_register(path)
    assert list(table["status"]) == ["ok", "ok"]
    assert list(table["column 6"]) == ["", "spare"] and list(table["column 7"]) == ["", "x"]


def test_utf16_csv(tmp_path):
    path = tmp_path / "unicode.csv"
    path.write_bytes("tag\tnps\tlength\ttemp\tlayers\nU-1\t2\t5\t65 °C\tnone\n".encode("utf-16"))
    table = read_register(path)
    assert table.loc[0, "temp_K"] == pytest.approx(338.15)  # 65 + 273.15, NIST SP 811 4.2.1.1


def test_unquoted_inch_marks_in_csv(tmp_path):
    # Hand-typed registers write 1-1/2" without quoting the field.
    path = tmp_path / "inches.csv"
    path.write_text('tag,nps,length,temp,layers\nQ-1,1-1/2",5,100,none\n'
                    'Q-2,2",5,100,mineral-wool 2"\n')
    table = read_register(path)
    assert list(table["nps"]) == ["1-1/2", "2"] and list(table["raw:nps"]) == ['1-1/2"', '2"']
    assert table.loc[1, "layer_thicknesses_m"] == (pytest.approx(0.0508, rel=1e-12),)  # 2 in
