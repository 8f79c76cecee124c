"""Bad registers (tests/data/bad/registers), each run through ``lagaudit run`` as a user would.

Two outcomes only: the row is rejected with a reason that names the column, quotes the cell and
says what was expected (exit 0, every other row audited), or the run stops with exit 2 and one
message naming the file and the fix, writing nothing.  Never a traceback, never a silent default.
Expected texts are the reader's own wording (audit/io/readers/cells.py, table.py, files.py,
workbook.py; audit/thermal.py for names): these tests pin the behaviour, not a physical value.

| kind                                  | file                        | behaviour                  |
|---------------------------------------|-----------------------------|----------------------------|
| missing required column (tag)         | no_tag_column.csv           | exit 2                     |
| missing required column (temp)        | no_temp_column.csv          | every row rejected         |
| wrong types (text in number columns)  | wrong_types.csv             | rows rejected, reasons     |
| impossible values                     | impossible_values.csv       | rows rejected, reasons     |
| non-finite numbers (nan, inf, 1e400)  | non_finite.csv              | rows rejected, reasons     |
| unit that does not fit the column     | unit_mismatch.csv           | rows rejected, reasons     |
| unknown material, jacket, site, metal | unknown_names.csv           | rows rejected, reasons     |
| duplicated tags                       | duplicate_tags.csv          | audited, each copy warned  |
| empty file                            | empty.csv                   | exit 2                     |
| header-only CSV / XLSX                | header_only.csv / .xlsx     | exit 2                     |
| workbook with an empty sheet          | empty_sheet.xlsx            | exit 2                     |
| UTF-16 without BOM                    | utf16_no_bom.csv            | exit 2                     |
| UTF-32                                | utf32.csv                   | exit 2, encoding named     |
| Shift-JIS (not UTF-8)                 | shift_jis.csv               | read as Windows-1252, noted|
| NUL byte in text                      | nul_byte.csv                | exit 2                     |
| truncated XLSX                        | truncated.xlsx              | exit 2                     |
| corrupt XLSX (CRC)                    | corrupt_crc.xlsx            | exit 2                     |
| XLSX zip bomb, declared size          | zip_bomb_declared.xlsx      | exit 2                     |
| XLSX zip bomb, compression ratio      | zip_bomb_ratio.xlsx         | exit 2                     |
| password-protected workbook           | password_protected.xlsx     | exit 2                     |
| sheet named that does not exist       | formulas.xlsx --sheet       | exit 2                     |
| XLSX formulas (cached, uncached)      | formulas.xlsx               | cached value used, none run|
| formula-looking CSV cells             | formula_cells.csv           | carried as text; see safety|
| markup in cells                       | markup_cells.csv            | carried verbatim / rejected|
| temperature beyond the engine's range | temp_beyond_engine.csv      | row rejected by the engine |
| every row beyond the engine's range   | only_engine_rejects.csv     | row rejected by the engine |
| unclosed quote                        | unclosed_quote.csv          | exit 2, the line named     |
| carriage return inside a quoted cell  | carriage_return_in_cell.csv | read as written            |
| huge cell in the first lines          | huge_cell_head.csv          | row rejected (cell limit)  |
| cell longer than a spreadsheet cell   | long_cell.csv               | row rejected (cell limit)  |
| 20,000 columns                        | wide.csv                    | exit 2 (column limit)      |
| one bad file among good ones          | duplicate_tags.csv + empty  | exit 2, nothing written    |
"""

import os
import subprocess
import sys
from pathlib import Path

import pytest

import audit
from audit.io.readers import files

REGISTERS = Path(__file__).parents[1] / "data" / "bad" / "registers"
EXPECTED_NUMBER = "expected a number with an optional unit"
TEMP_EXPECTED = f"{EXPECTED_NUMBER} (degC if none), AMB, or normal/max"


def reasons(results):
    return dict(zip(results["tag"], results["reason"]))


# --- missing required columns ----------------------------------------------------------------

def test_no_tag_column_stops_the_run(refused):
    err = refused(REGISTERS / "no_tag_column.csv")
    assert "row 1: missing the required tag column; expected a column named tag or line no" in err


def test_no_temp_column_rejects_every_row(results_of):
    r = results_of(REGISTERS / "no_temp_column.csv")
    assert list(r["tag"]) == ["BD-101", "BD-102"]
    assert list(r["status"]) == ["rejected"] * 2
    assert set(r["reason"]) == {"temp: empty; expected the operating temperature (degC if no "
                                "unit), AMB or normal/max"}


# --- wrong types, impossible values, units ---------------------------------------------------

def test_wrong_types_reject_their_rows(results_of):
    r = results_of(REGISTERS / "wrong_types.csv")
    assert set(r["status"]) == {"rejected"} and len(r) == 7
    assert reasons(r) == {
        "BD-201": f'length: "ten" is not a length; {EXPECTED_NUMBER} (m if none)',
        "BD-202": 'nps: "big" is not a standard pipe size; expected an NPS of ASME B36.10M '
                  '(1/8 to 48, e.g. 4, 1-1/2") or a DN (DN6 to DN1200)',
        "BD-203": 'accessible: "maybe" is not yes or no; expected yes, no, y, n, true, false, '
                  '1, 0 or x',
        "BD-204": 'valves: "two" is not a count; expected a whole number, 0 or more',
        "BD-205": 'valves: "1.5" is not a count; expected a whole number, 0 or more',
        "BD-206": 'layers: "mineral-wool forty" is not a list of layers; expected '
                  "'<material> <thickness>' joined by '+', innermost first, e.g. "
                  "calcium-silicate 50mm + mineral-wool 2in, or none",
        "BD-207": f'hours: "always" is not hours per year; {EXPECTED_NUMBER} (h if none)',
    }


IMPOSSIBLE = {
    "BD-301": 'thickness: "-50" is not a thickness; expected a length per layer (mm if none), '
              'e.g. 50, 2 in, 1-1/2 in, 2x50 or 50+40',
    "BD-302": 'od: "0" is out of range; expected a diameter above 0 m',
    "BD-303": 'temp: "-300" is below absolute zero; expected a temperature above -273.15 degC',
    "BD-304": 'emissivity: "1.5" is out of range; expected an emissivity above 0 and at most 1',
    "BD-305": 'emissivity: "0" is out of range; expected an emissivity above 0 and at most 1',
    "BD-306": 'length: "-5" is out of range; expected a length above 0 m',
    "BD-307": 'rh: "120" is out of range; expected a relative humidity at least 0 and at most '
              '100 percent',
    "BD-309": 'hours: "9000" is out of range; expected hours per year at least 0 and at most '
              '8784 h',
    "BD-310": 'thickness: "0" is not a thickness; expected a length per layer (mm if none), '
              'e.g. 50, 2 in, 1-1/2 in, 2x50 or 50+40',
}


def test_impossible_values_reject_their_rows(results_of):
    r = results_of(REGISTERS / "impossible_values.csv")
    assert set(r["status"]) == {"rejected"} and len(r) == 10
    got = reasons(r)
    for tag, reason in IMPOSSIBLE.items():
        assert got[tag] == reason, tag
    assert got["BD-308"].startswith('damaged: "150" is out of range; expected a share of the '
                                    'length at least 0 and at most 100 percent')


def test_a_bad_damaged_share_is_not_also_called_empty(results_of):
    r = results_of(REGISTERS / "impossible_values.csv")
    assert "empty" not in reasons(r)["BD-308"]


def test_non_finite_numbers_reject_their_rows(results_of):
    r = results_of(REGISTERS / "non_finite.csv")
    assert reasons(r) == {
        "BD-351": f'temp: "nan" is not a temperature; {TEMP_EXPECTED}',
        "BD-352": f'temp: "inf" is not a temperature; {TEMP_EXPECTED}',
        "BD-353": f'length: "1e400" is not a length; {EXPECTED_NUMBER} (m if none)',
        "BD-354": f'length: "-inf" is not a length; {EXPECTED_NUMBER} (m if none)',
    }
    assert set(r["status"]) == {"rejected"}


def test_units_that_do_not_fit_the_column(results_of):
    r = results_of(REGISTERS / "unit_mismatch.csv")
    assert reasons(r) == {
        "BD-401": f'temp: "2 m" is not a temperature; {TEMP_EXPECTED}',
        "BD-402": f'length: "5 degC" is not a length; {EXPECTED_NUMBER} (m if none)',
        "BD-403": f'od: "3 kg" is not a diameter; {EXPECTED_NUMBER} (mm if none)',
        # a temperature unit where a thickness belongs: said so (issue 15)
        "BD-404": 'layers: "mineral-wool 50 K" is not a thickness (not a length unit); '
                  "expected a length per layer (mm if none), e.g. 50, 2 in, 1-1/2 in, 2x50 "
                  "or 50+40",
    }
    assert set(r["status"]) == {"rejected"}


def test_unknown_material_jacket_site_and_metal(results_of):
    r = results_of(REGISTERS / "unknown_names.csv")
    got = reasons(r)
    assert set(r["status"]) == {"rejected"}
    assert got["BD-501"].startswith('layers: material "moon-dust" is not in the rules; '
                                    'expected one of aerogel-blanket, calcium-silicate')
    assert got["BD-501"].endswith("(or add it to a rule file)")
    assert got["BD-502"].startswith('jacket: "gold-leaf" is not in the rules; expected one of '
                                    'aluminium-bright, aluminium-oxidised')
    assert got["BD-502"].endswith("or give an emissivity (0-1)")
    assert got["BD-503"].startswith('location: "north-pole" is not a site condition in the '
                                    'rules; expected one of ')
    assert "outdoor" in got["BD-503"]
    assert got["BD-504"].startswith('material: metal "unobtainium" is not in the rules; '
                                    'expected one of ')
    assert "carbon-steel" in got["BD-504"]


def test_duplicated_tags_are_audited_and_each_copy_is_warned(results_of):
    r = results_of(REGISTERS / "duplicate_tags.csv")
    assert list(r["tag"]) == ["BD-601", "BD-602", "BD-601"]
    assert list(r["status"]) == ["audited"] * 3
    dup = 'tag: "BD-601" is duplicated (2 rows; first at duplicate_tags.csv::2)'
    assert [dup in w for w in r["warnings"]] == [True, False, True]
    assert list(r["source"]) == [f"duplicate_tags.csv::{n}" for n in (2, 3, 4)]


# --- whole files that cannot be read ---------------------------------------------------------

@pytest.mark.parametrize("name, message", [
    ("empty.csv", "the file is empty; expected a header row and at least one data row"),
    ("header_only.csv", "a header row but no data rows; expected at least one item row below "
                        "the header"),
    ("header_only.xlsx", "a header row but no data rows; expected at least one item row below "
                         "the header"),
    ("empty_sheet.xlsx", "no sheet has a header row with a tag column; expected a header row "
                         "with a tag column"),
    ("utf16_no_bom.csv", "UTF-16 or UTF-32 text without a byte-order mark, or binary data; not CSV text as read here; expected a CSV saved as UTF-8 (or UTF-16 with a byte-order mark)"),
    ("nul_byte.csv", "UTF-16 or UTF-32 text without a byte-order mark, or binary data; not CSV text as read here; expected a CSV saved as UTF-8 (or UTF-16 with a byte-order mark)"),
    ("truncated.xlsx", "corrupt workbook (File is not a zip file); expected an .xlsx that opens "
                       "in a spreadsheet program; save it again"),
    ("corrupt_crc.xlsx", "corrupt workbook (Bad CRC-32 for file 'xl/worksheets/sheet1.xml'); "
                         "expected an .xlsx that opens in a spreadsheet program"),
    ("zip_bomb_declared.xlsx", "bytes uncompressed, above the limit of 1073741824 (possible zip "
                               "bomb); expected a smaller workbook"),
    ("zip_bomb_ratio.xlsx", "part xl/styles.xml expands"),
    ("password_protected.xlsx", "password-protected (encrypted) or a legacy .xls file; expected "
                                "an unprotected .xlsx"),
])
def test_unreadable_files_stop_the_run(refused, name, message):
    assert message in refused(REGISTERS / name)


def test_zip_bomb_ratio_names_the_limit(refused):
    err = refused(REGISTERS / "zip_bomb_ratio.xlsx")
    assert "times, above the limit of 200 (possible zip bomb)" in err


def test_utf32_stops_the_run(refused):
    refused(REGISTERS / "utf32.csv")


@pytest.mark.parametrize("name", ["utf32.csv", "utf16_no_bom.csv"])
def test_an_unsupported_encoding_is_named(refused, name):
    err = refused(REGISTERS / name)
    assert "UTF-8" in err and ("UTF-32" in err or "UTF-16" in err)


def test_a_named_sheet_that_does_not_exist(refused):
    err = refused(REGISTERS / "formulas.xlsx", "--sheet", "Vessels")
    assert "no sheet named 'Vessels'; expected one of the workbook's sheets: Lines" in err


def test_the_installed_command_exits_2_with_one_line_and_no_traceback(tmp_path):
    # The same refusal through a real process: the exit status and stderr a shell script sees.
    env = {**os.environ, "PYTHONPATH": str(Path(audit.__file__).parents[1])}
    done = subprocess.run([sys.executable, "-m", "audit", "run", str(REGISTERS / "empty.csv"),
                           "--out", str(tmp_path / "out")], capture_output=True, text=True,
                          env=env, timeout=120)
    assert done.returncode == 2
    assert done.stderr == (f"lagaudit: error: {REGISTERS / 'empty.csv'}: the file is empty; "
                           "expected a header row and at least one data row\n")
    assert not (tmp_path / "out").exists()


def test_one_bad_file_among_good_ones_stops_the_run_before_writing(lagaudit, tmp_path):
    out = tmp_path / "out"
    code, _, err = lagaudit("run", REGISTERS / "duplicate_tags.csv", REGISTERS / "empty.csv",
                            "--out", out)
    assert code == 2 and "empty.csv: the file is empty" in err
    assert not out.exists()


def test_shift_jis_is_read_as_windows_1252_and_says_so(lagaudit, results_of):
    raw = (REGISTERS / "shift_jis.csv").read_bytes()
    r = results_of(REGISTERS / "shift_jis.csv")
    assert list(r["status"]) == ["audited"]
    # The remark is the Windows-1252 reading of the Shift-JIS bytes, undefined bytes as U+FFFD:
    # visibly garbled, never dropped.
    remark = raw.decode("cp1252", errors="replace").splitlines()[1].split(",")[-1]
    assert r.loc[0, "remarks"] == remark
    code, out, _ = lagaudit("validate", REGISTERS / "shift_jis.csv")
    assert code == 0 and "read as Windows-1252 text" in out


# --- formulas and markup ---------------------------------------------------------------------

def test_xlsx_formulas_are_never_evaluated(results_of):
    r = results_of(REGISTERS / "formulas.xlsx")
    assert list(r["tag"]) == ["BF-1", "BF-2", "BF-3"]
    # BF-1: formula =1+1 with the cached value 150: the cached value is read, nothing computed
    assert r.loc[0, "status"] == "audited" and float(r.loc[0, "process_temp [degC]"]) == 150.0
    # BF-2: a formula saved without a value reads as an empty cell
    assert r.loc[1, "reason"] == ("temp: empty; expected the operating temperature (degC if no "
                                  "unit), AMB or normal/max")
    # BF-3: the tag is a HYPERLINK formula: its cached text is the tag, no link is followed
    assert r.loc[2, "status"] == "audited"


def test_formula_looking_csv_cells_are_data(results_of):
    r = results_of(REGISTERS / "formula_cells.csv")
    # carried as text (the writers neutralise them: tests/bad/test_bad_output_safety.py)
    assert list(r["tag"])[0] == "'=cmd|' /C calc'!A0"
    assert list(r["remarks"])[1:5] == ["'=HYPERLINK(\"http://example.invalid/x\",\"open\")",
                                      "'+1+1", "'-2+3", "'@SUM(A1:A2)"]
    assert list(r["status"]) == ["audited"] * 5 + ["rejected"]
    assert r.loc[5, "reason"] == f'temp: "=1+1" is not a temperature; {TEMP_EXPECTED}'


def test_markup_in_cells_is_carried_verbatim_or_rejected(results_of):
    r = results_of(REGISTERS / "markup_cells.csv")
    assert list(r["tag"]) == ["<script>alert(1)</script>", "BD-902", "BD-903", "BD-904"]
    assert list(r["remarks"])[:3] == ["plain", '<img src=x onerror="alert(2)">',
                                      "<a href='javascript:alert(3)'>see</a> &amp; &lt;b&gt;"]
    assert list(r["status"]) == ["audited"] * 3 + ["rejected"]
    assert r.loc[3, "reason"] == f'temp: "<b>150</b>" is not a temperature; {TEMP_EXPECTED}'


# --- the engine's own limits -----------------------------------------------------------------

def test_a_temperature_beyond_the_engine_range_is_rejected_by_the_engine(results_of):
    r = results_of(REGISTERS / "temp_beyond_engine.csv")
    assert list(r["status"]) == ["audited", "rejected"]
    assert r.loc[1, "reason"].startswith("process temperature must be above absolute zero and "
                                         "below 5000 K")


def test_a_register_whose_every_row_the_engine_rejects(results_of):
    r = results_of(REGISTERS / "only_engine_rejects.csv")
    assert list(r["status"]) == ["rejected"]
    assert r.loc[0, "reason"].startswith("process temperature must be above absolute zero")


# --- text-format hazards ---------------------------------------------------------------------

def test_an_unclosed_quote_does_not_swallow_rows(refused):
    err = refused(REGISTERS / "unclosed_quote.csv")
    assert "line 3" in err and "quote" in err


def test_a_carriage_return_inside_a_quoted_cell(results_of):
    r = results_of(REGISTERS / "carriage_return_in_cell.csv")
    assert list(r["status"]) == ["audited"] and r.loc[0, "remarks"] == "first\rsecond"


# --- resource bounds -------------------------------------------------------------------------

MAX_CELL_CHARS = 32_767  # characters in one cell: Excel specifications and limits (Microsoft)
MAX_COLUMNS = 16_384     # columns in a sheet: same source


def test_a_huge_cell_in_the_header_search_lines(results_of):
    r = results_of(REGISTERS / "huge_cell_head.csv")
    assert list(r["status"]) == ["rejected"]
    assert r.loc[0, "reason"].startswith(f"temp: cell of 200000 characters, above the limit of "
                                         f"{MAX_CELL_CHARS}")


def test_cells_longer_than_a_spreadsheet_cell_reject_their_row(results_of):
    assert hasattr(files, "MAX_CELL_CHARS") and "MAX_CELL_CHARS" in files.__doc__
    r = results_of(REGISTERS / "long_cell.csv")
    assert list(r["status"]) == ["audited"] * 40 + ["rejected"] * 2
    limit = f"cell of 40000 characters, above the limit of {MAX_CELL_CHARS}"
    assert r.loc[40, "reason"].startswith(f"temp: {limit}")
    assert r.loc[41, "reason"].startswith(f"remarks: {limit}")
    assert max(len(x) for x in r["reason"]) < 1000


def test_more_columns_than_a_spreadsheet_holds_stop_the_run(refused):
    # Checked first so that this test fails fast while the limit is missing.
    assert hasattr(files, "MAX_COLUMNS") and "MAX_COLUMNS" in files.__doc__
    err = refused(REGISTERS / "wide.csv")
    assert f"20005 columns, above the limit of {MAX_COLUMNS}" in err


def test_documented_limits_are_the_ones_enforced():
    # Excel's sheet height (Microsoft, "Excel specifications and limits"): 1,048,576 rows.
    assert files.MAX_ROWS == 1_048_576
    assert files.MAX_FILE_BYTES == 1 << 30 and files.MAX_UNCOMPRESSED_BYTES == 1 << 30
    assert files.MAX_COMPRESSION_RATIO == 200
