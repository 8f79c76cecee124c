"""Hostile input, second round: registers and rule files built here, each run through
``lagaudit run`` (or the reader) with its exact expected behaviour.

The promise: no hang, no abort, no traceback, no row lost.  A cell the tool cannot read rejects
its row with a reason (column, value, what was expected); a file it will not read stops the run
with exit 2 and one message naming the file and what to do.  Expected texts are the tool's own
wording (audit/units.py, audit/io/readers/cells.py, files.py, workbook.py, xlsx_scan.py,
audit/rules/files.py, selector.py): these tests pin behaviour, not a physical value.

| kind                                                  | behaviour                          |
|-------------------------------------------------------|------------------------------------|
| long runs of spaces in number and unit cells (also    | read as if one space; linear time  |
| in a decimal-comma file)                              |                                    |
| a power tower in a cell, a header unit, a rule value  | row rejected / exit 2, never run   |
| a huge layer count (``N x thickness``), many layers   | row rejected: at most 10 layers    |
| a header-like row below data naming more columns      | every row kept, that row rejected  |
| a blank line right after the header                   | a blank (rejected) row, no trace   |
| a quote left open in a carried column                 | exit 2, its line named             |
| many identical merged ranges / too many ranges        | read once each / exit 2            |
| one shared string repeated past the text limit        | exit 2                             |
| one cell at XFD1048576, alone or with a register      | exit 2, no abort                   |
| shared-string index negative, text or past the table  | exit 2, the cell named             |
| rule file that is a FIFO, a link to a device or FIFO, | exit 2, the file named             |
| or larger than the limit                              |                                    |
| selectors nested or chained thousands deep            | exit 2, file and key named         |
| two registers with one name in different folders      | sources unique                     |
| the same --sheet twice, the same file twice           | read once                          |
"""

import io
import os
import subprocess
import sys
import zipfile
from pathlib import Path

import pandas as pd
import pytest

import audit
from audit.io.readers import read_register, xlsx_scan
from audit.io.readers.cells import MAX_LAYERS
from audit.rules.files import MAX_RULE_FILE_BYTES
from audit.rules.selector import MAX_COMPARISONS, MAX_DEPTH

HEADER = "tag,nps,length,temp,layers,remarks\n"
ROW = "HX-{i},2,10,150,mineral-wool 40mm,\n"
GOOD_RULE = '[site.plant-yard]\nambient = 20\nwind = 2\nrh = 70\nsource = "invented"\n'
TEMP_EXPECTED = ("expected a number with an optional unit (degC if none), AMB, or normal/max")
SPACES = 30_000  # a cell of about 30,000 characters: under the 32,767 a spreadsheet cell holds


def write(tmp_path, name, text):
    path = tmp_path / name
    path.parent.mkdir(parents=True, exist_ok=True)
    path.write_text(text, encoding="utf-8", newline="")
    return path


def reasons(results):
    return dict(zip(results["tag"], results["reason"]))


# --- long runs of spaces ---------------------------------------------------------------------

def test_long_space_runs_in_number_and_unit_cells(results_of, tmp_path):
    gap, third = " " * SPACES, " " * (SPACES // 3)
    path = write(tmp_path, "spaces.csv", HEADER
                 + f"HS-1,2,10,150{gap}degC,mineral-wool 40mm,\n"
                 + f"HS-2,2,10{gap}m,{gap}300 F,mineral-wool{third}40{third}mm,\n"
                 + f"HS-3,2,10,150{gap}x,mineral-wool 40mm,\n"
                 + f"HS-4,2{gap}in,10,{'1' * SPACES}x,2{third}x{third}40 mineral-wool,\n")
    r = results_of(path)
    assert list(r["status"]) == ["audited", "audited", "rejected", "rejected"]
    assert float(r.loc[0, "process_temp [degC]"]) == 150.0
    assert float(r.loc[1, "process_temp [degC]"]) == pytest.approx((300 - 32) / 1.8)
    table = read_register(path)
    assert table.loc[1, "length_m"] == 10.0
    assert table.loc[1, "layer_thicknesses_m"] == (0.04,)
    assert reasons(r)["HS-3"] == f'temp: "150{" " * 57}…" is not a temperature; {TEMP_EXPECTED}'
    assert reasons(r)["HS-4"].startswith(f'temp: "{"1" * 60}…" is not a temperature')


def test_long_space_runs_in_a_decimal_comma_file(results_of, tmp_path):
    gap, third = " " * SPACES, " " * (SPACES // 3)
    path = write(tmp_path, "comma.csv", "tag;nps;length;temp;layers\n"
                 f"HC-1;2;10,5{gap}m;150,5;mineral-wool 40mm\n"
                 f"HC-2;2;10;150{gap};{third}mineral-wool{third}2,5{third}in\n"
                 f"HC-3;2;10;1{gap},5;none\n")
    r = results_of(path)
    assert list(r["status"]) == ["audited", "audited", "rejected"]
    assert float(r.loc[0, "process_temp [degC]"]) == 150.5
    table = read_register(path)
    assert table.loc[0, "length_m"] == 10.5
    assert table.loc[1, "layer_thicknesses_m"] == pytest.approx((2.5 * 0.0254,))
    assert reasons(r)["HC-3"].startswith('temp: "1')


# --- expressions are never evaluated ---------------------------------------------------------

@pytest.mark.parametrize("cell", ["2**9**9**9", "1 m**9**9**9", "1 (m**2)**3", "1 m^9^9^9",
                                  "9**9**9 degC", "(((((((((1)))))))))"])
def test_a_power_tower_in_a_cell_is_rejected_not_computed(results_of, tmp_path, cell):
    path = write(tmp_path, "tower.csv", HEADER + f"HT-1,2,10,150,mineral-wool 40mm,\n"
                 f'HT-2,2,{cell},150,mineral-wool 40mm,\n')
    r = results_of(path)
    assert list(r["status"]) == ["audited", "rejected"]
    assert r.loc[1, "reason"] == (f'length: "{cell}" is not a length; expected a number with an '
                                  "optional unit (m if none)")


def test_a_power_tower_in_a_header_unit_stops_the_run(refused, tmp_path):
    path = write(tmp_path, "tower_header.csv",
                 "tag,nps,length [m**9**9**9],temp,layers\nHT-1,2,10,150,none\n")
    err = refused(path)
    assert "header 'length [m**9**9**9]': 'm**9**9**9' is not a unit of length" in err


def test_a_header_unit_with_a_compound_expression_still_works(results_of, tmp_path):
    path = write(tmp_path, "compound.csv",
                 "tag,nps,length [ft],temp [degF],layers,emissivity [dimensionless]\n"
                 "HU-1,2,10,300,mineral-wool 2in,0.9\n")
    r = results_of(path)
    assert list(r["status"]) == ["audited"]
    assert float(r.loc[0, "process_temp [degC]"]) == pytest.approx((300 - 32) / 1.8)
    assert read_register(path).loc[0, "length_m"] == pytest.approx(3.048)  # 10 ft, exact


@pytest.mark.parametrize("value", ['"0.04 W/(m*K)**9**9**9"', '"1 degC**9**9**9"'])
def test_a_power_tower_in_a_rule_value_stops_the_run(lagaudit, tmp_path, value):
    folder = tmp_path / "plant-rules"
    write(folder, "plant.toml", "[material.plant-foam]\n"
          f"k = [[50, {value if 'W' in value else 0.04}]]\n"
          f"max_temp = {value if 'degC' in value else 100}\n"
          'source = "invented"\n')
    register = write(tmp_path, "r.csv", HEADER + ROW.format(i=1))
    code, _, err = lagaudit("run", register, "--rules", folder, "--out", tmp_path / "out")
    assert code == 2 and str(folder / "plant.toml") in err
    key = "k" if "W" in value else "max_temp"
    assert f"column 'material.plant-foam.{key}'" in err and "invalid value" in err


def test_a_compound_unit_in_a_rule_value_still_works(tmp_path):
    from audit.rules import load_rules
    folder = tmp_path / "plant-rules"
    write(folder, "plant.toml", "[material.plant-foam]\n"
          'k = [[50, "0.30 Btu*in/(h*ft**2*degF)"]]\nmax_temp = "1200 degF"\n'
          'source = "invented"\n')
    foam = load_rules([folder]).materials["plant-foam"]
    # 1 Btu*in/(h*ft2*degF) = 0.1442279 W/(m*K) (IT Btu; NIST SP 811 conversion factors)
    assert foam.k[0][1] == pytest.approx(0.30 * 0.1442279, rel=1e-6)
    assert foam.max_temp == pytest.approx((1200 - 32) / 1.8 + 273.15)


# --- layer counts ----------------------------------------------------------------------------

def test_huge_layer_counts_reject_their_row(results_of, tmp_path):
    eleven = "+".join(["20"] * (MAX_LAYERS + 1))
    path = write(tmp_path, "layers.csv", "tag,nps,length,temp,layers,insulation,thickness\n"
                 "HL-1,2,10,150,mineral-wool 2x40,,\n"
                 "HL-2,2,10,150,,mineral-wool,100000000x50\n"
                 f"HL-3,2,10,150,,mineral-wool,{'9' * 5000}x50\n"
                 f"HL-4,2,10,150,mineral-wool 11x20,,\n"
                 f"HL-5,2,10,150,,mineral-wool,{eleven}\n")
    r = results_of(path)
    assert list(r["status"]) == ["audited"] + ["rejected"] * 4
    limit = f"expected at most {MAX_LAYERS} insulation layers per item"
    assert reasons(r) == {
        "HL-1": "",
        "HL-2": f'thickness: "100000000x50" has 100000000 layers; {limit}',
        # A reason quotes at most 60 characters of a raw cell, as for every column.
        "HL-3": f'thickness: "{"9" * 60}…" has more than {MAX_LAYERS} layers; {limit}',
        "HL-4": f'layers: "mineral-wool 11x20" has 11 layers; {limit}',
        "HL-5": f'thickness: "{eleven}" has 11 layers; {limit}',
    }


# --- the header, blank lines and quotes ------------------------------------------------------

def test_a_header_like_row_below_the_data_never_becomes_the_header(results_of, tmp_path):
    path = write(tmp_path, "second_header.csv", HEADER + ROW.format(i=1) + ROW.format(i=2)
                 + "tag,nps,length,temp,layers,remarks,jacket,location,condition\n"
                 + ROW.format(i=3))
    r = results_of(path)
    assert list(r["tag"]) == ["HX-1", "HX-2", "tag", "HX-3"]
    assert list(r["status"]) == ["audited", "audited", "rejected", "audited"]
    assert list(r["source"]) == [f"second_header.csv::{n}" for n in (2, 3, 4, 5)]


def test_a_blank_line_right_after_the_header(results_of, tmp_path):
    path = write(tmp_path, "blank.csv", HEADER + "\n" + ROW.format(i=1) + "\r\n" + ROW.format(i=2))
    r = results_of(path)
    assert list(r["status"]) == ["rejected", "audited", "rejected", "audited"]
    assert list(r["reason"])[0] == "row is blank"
    assert list(r["source"]) == [f"blank.csv::{n}" for n in (2, 3, 4, 5)]


def test_a_quote_left_open_in_a_carried_column_to_the_end(refused, tmp_path):
    path = write(tmp_path, "open_end.csv", HEADER + ROW.format(i=1)
                 + 'HX-2,2,10,150,none,"never closed\n' + ROW.format(i=3) + ROW.format(i=4))
    err = refused(path)
    assert ("line 3: a quote opened in column 'remarks' is not closed before the end of the "
            "file; expected balanced double quotes") in err


def test_a_quote_left_open_in_a_carried_column_closed_rows_later(refused, tmp_path):
    path = write(tmp_path, "open_mid.csv", HEADER + ROW.format(i=1)
                 + 'HX-2,2,10,150,none,"opened\n' + ROW.format(i=3)
                 + 'HX-4,2,10,150,none,closed"\n' + ROW.format(i=5))
    err = refused(path)
    assert ("line 3: a quote opened in column 'remarks' is not closed before the next line"
            in err)


def test_a_line_break_in_a_quoted_remark_is_still_read(results_of, tmp_path):
    path = write(tmp_path, "remark.csv", HEADER + 'HX-1,2,10,150,none,"first line\nsecond, '
                 'line"\n' + ROW.format(i=2))
    r = results_of(path)
    assert list(r["status"]) == ["audited", "audited"]
    assert r.loc[0, "remarks"] == "first line\nsecond, line"


# --- workbooks -------------------------------------------------------------------------------

SHEET_START = ('<?xml version="1.0" encoding="UTF-8" standalone="yes"?>\n<worksheet xmlns='
               '"http://schemas.openxmlformats.org/spreadsheetml/2006/main"><sheetData>')


def workbook(path, rows_xml, *, strings=(), after="", stored=False):
    """A minimal workbook, its one sheet 'Lines' written as given (``rows_xml``: the
    sheetData rows; ``after``: what follows sheetData, e.g. mergeCells)."""
    shared = "".join(f"<si><t>{s}</t></si>" for s in strings)
    parts = {
        "[Content_Types].xml": '<?xml version="1.0"?><Types xmlns="http://schemas.openxml'
        'formats.org/package/2006/content-types"><Default Extension="rels" ContentType='
        '"application/vnd.openxmlformats-package.relationships+xml"/><Default Extension="xml" '
        'ContentType="application/xml"/><Override PartName="/xl/workbook.xml" ContentType='
        '"application/vnd.openxmlformats-officedocument.spreadsheetml.sheet.main+xml"/>'
        '<Override PartName="/xl/worksheets/sheet1.xml" ContentType="application/vnd.openxml'
        'formats-officedocument.spreadsheetml.worksheet+xml"/><Override PartName='
        '"/xl/sharedStrings.xml" ContentType="application/vnd.openxmlformats-officedocument.'
        'spreadsheetml.sharedStrings+xml"/></Types>',
        "_rels/.rels": '<?xml version="1.0"?><Relationships xmlns="http://schemas.openxml'
        'formats.org/package/2006/relationships"><Relationship Id="rId1" Type="http://schemas.'
        'openxmlformats.org/officeDocument/2006/relationships/officeDocument" Target='
        '"xl/workbook.xml"/></Relationships>',
        "xl/workbook.xml": '<?xml version="1.0"?><workbook xmlns="http://schemas.openxml'
        'formats.org/spreadsheetml/2006/main" xmlns:r="http://schemas.openxmlformats.org/'
        'officeDocument/2006/relationships"><sheets><sheet name="Lines" sheetId="1" r:id='
        '"rId1"/></sheets></workbook>',
        "xl/_rels/workbook.xml.rels": '<?xml version="1.0"?><Relationships xmlns="http://'
        'schemas.openxmlformats.org/package/2006/relationships"><Relationship Id="rId1" Type='
        '"http://schemas.openxmlformats.org/officeDocument/2006/relationships/worksheet" '
        'Target="worksheets/sheet1.xml"/><Relationship Id="rId2" Type="http://schemas.openxml'
        'formats.org/officeDocument/2006/relationships/sharedStrings" Target='
        '"sharedStrings.xml"/></Relationships>',
        "xl/sharedStrings.xml": '<?xml version="1.0"?><sst xmlns="http://schemas.openxml'
        f'formats.org/spreadsheetml/2006/main">{shared}</sst>',
        "xl/worksheets/sheet1.xml": SHEET_START + rows_xml + "</sheetData>" + after
        + "</worksheet>",
    }
    method = zipfile.ZIP_STORED if stored else zipfile.ZIP_DEFLATED
    with zipfile.ZipFile(path, "w", method) as book:
        for name, text in parts.items():
            book.writestr(name, text)
    return path


def register_rows(first_row=1, first_column="A", extra=""):
    """A header and one good row as inline-string and number cells, from ``first_row``."""
    columns = [chr(ord(first_column) + k) for k in range(5)]
    header = "".join(f'<c r="{c}{first_row}" t="inlineStr"><is><t>{h}</t></is></c>'
                     for c, h in zip(columns, ["tag", "nps", "length", "temp", "layers"]))
    values = ['<is><t>HW-1</t></is>', "<v>2</v>", "<v>10</v>", "<v>150</v>",
              "<is><t>mineral-wool 40mm</t></is>"]
    data = "".join(f'<c r="{c}{first_row + 1}"{"" if v.startswith("<v") else " t=" + chr(34) + "inlineStr" + chr(34)}>{v}</c>'
                   for c, v in zip(columns, values))
    return f'<row r="{first_row}">{header}</row><row r="{first_row + 1}">{data}</row>{extra}'


def test_a_register_away_from_a1_keeps_its_row_numbers(tmp_path):
    path = workbook(tmp_path / "offset.xlsx", register_rows(first_row=40, first_column="C"))
    table = read_register(path)
    assert list(table["tag"]) == ["HW-1"] and list(table["status"]) == ["ok"]
    assert list(table["source"]) == ["offset.xlsx:Lines:41"]


def run_isolated(*args, timeout=120):
    """``lagaudit`` in a process of its own: an abort in a native reader cannot take the test
    session down, and shows as a signal instead of exit 2."""
    env = {**os.environ, "PYTHONPATH": str(Path(audit.__file__).parents[1])}
    return subprocess.run([sys.executable, "-m", "audit", *map(str, args)], capture_output=True,
                          text=True, env=env, timeout=timeout)


def test_a_lone_cell_at_the_last_column_and_row(tmp_path):
    path = workbook(tmp_path / "corner.xlsx",
                    '<row r="1048576"><c r="XFD1048576" t="inlineStr"><is><t>tag</t></is></c>'
                    "</row>")
    done = run_isolated("run", path, "--out", tmp_path / "out")
    assert done.returncode == 2, done.stderr
    assert done.stderr == (f"lagaudit: error: {path}: a header row but no data rows; expected "
                           "at least one item row below the header\n")


def test_a_register_with_a_stray_cell_at_the_last_column_and_row(tmp_path):
    stray = '<row r="1048576"><c r="XFD1048576"><v>1</v></c></row>'
    path = workbook(tmp_path / "stray.xlsx", register_rows(extra=stray))
    done = run_isolated("run", path, "--out", tmp_path / "out")
    assert done.returncode == 2, done.stderr
    assert ("part xl/worksheets/sheet1.xml: its cells with a value span A1:XFD1048576 "
            "(17,179,869,184 cells) for 11 values, above the limit of 1,048,576 cells; expected "
            "a sheet whose values sit together") in done.stderr
    assert "Traceback" not in done.stderr and not (tmp_path / "out").exists()


def test_empty_styled_cells_far_away_do_not_count(tmp_path):
    styled = '<row r="900000"><c r="XFD900000" s="1"/></row>'
    table = read_register(workbook(tmp_path / "styled.xlsx", register_rows(extra=styled)))
    assert list(table["tag"]) == ["HW-1"] and list(table["status"]) == ["ok"]


@pytest.mark.parametrize("index, shown", [("-1", "'-1'"), ("x1", "'x1'"), ("7", "'7'"),
                                          ("99999999999999", "'99999999999999'")])
def test_a_shared_string_index_that_is_not_one(refused, tmp_path, index, shown):
    bad = f'<row r="3"><c r="A3" t="s"><v>{index}</v></c><c r="D3"><v>1</v></c></row>'
    path = workbook(tmp_path / "index.xlsx", register_rows(extra=bad), strings=["HW-3"])
    err = refused(path)
    assert (f"part xl/worksheets/sheet1.xml: cell A3: shared-string index {shown} is not one of "
            "the workbook's 1 shared strings; expected an .xlsx saved by a spreadsheet program"
            in err)


def test_a_long_shared_string_repeated_past_the_text_limit(refused, tmp_path):
    cells = 1 + xlsx_scan.MAX_EXPANDED_CHARS // 32_000
    rows = "".join(f'<row r="{r}"><c r="F{r}" t="s"><v>0</v></c></row>'
                   for r in range(3, 3 + cells))
    path = workbook(tmp_path / "amplified.xlsx", register_rows(extra=rows),
                    strings=["y" * 32_000])
    err = refused(path)
    assert (f"its shared-string cells expand to more than {xlsx_scan.MAX_EXPANDED_CHARS:,} "
            "characters of text" in err)


def test_many_identical_merged_ranges_are_filled_once(tmp_path):
    # 2,000 rows under one merged remark, the range written 30,000 times (a part under 1 MiB,
    # below the compression-ratio check): filled once, not 30,000 times.
    rows = "".join(f'<row r="{r}"><c r="A{r}" t="inlineStr"><is><t>HW-{r}</t></is></c>'
                   f'<c r="B{r}"><v>2</v></c><c r="C{r}"><v>10</v></c><c r="D{r}"><v>150</v>'
                   f'</c><c r="E{r}" t="inlineStr"><is><t>none</t></is></c></row>'
                   for r in range(3, 2003))
    rows = rows.replace('<row r="3">', '<row r="3"><c r="F3" t="inlineStr"><is><t>see note'
                        '</t></is></c>', 1)
    merges = '<mergeCells>' + '<mergeCell ref="F3:F2002"/>' * 30_000 + "</mergeCells>"
    table = read_register(workbook(tmp_path / "merged.xlsx", register_rows(extra=rows),
                                   after=merges))
    assert len(table) == 2001 and set(table["status"]) == {"ok"}
    assert set(table.loc[1:, "column 6"]) == {"see note"}


def test_too_many_merged_ranges_stop_the_run(refused, tmp_path):
    merges = ('<mergeCells>' + '<mergeCell ref="F1:F2"/>' * (xlsx_scan.MAX_MERGED_RANGES + 1)
              + "</mergeCells>")
    err = refused(workbook(tmp_path / "merged.xlsx", register_rows(), after=merges, stored=True))
    assert f"more than {xlsx_scan.MAX_MERGED_RANGES} merged ranges" in err


def test_overlapping_merged_ranges_stop_the_run(refused, tmp_path):
    merges = ("<mergeCells>" + "".join(f'<mergeCell ref="A1:E{r}"/>' for r in range(2, 40))
              + "</mergeCells>")
    err = refused(workbook(tmp_path / "overlap.xlsx", register_rows(), after=merges))
    assert "merged ranges overlap" in err


def test_the_exact_scan_agrees_with_the_fast_one(tmp_path):
    # The same cells written in another attribute order go to the exact (expat) path.
    rows = register_rows(extra='<row r="9"><c r="B9" t="s"><v>0</v></c></row>')
    plain = workbook(tmp_path / "plain.xlsx", rows, strings=["x" * 30])
    other = workbook(tmp_path / "other.xlsx", rows.replace('<c r="B9" t="s">', '<c t="s" r="B9">'),
                     strings=["x" * 30])
    extents = []
    for path in (plain, other):
        with zipfile.ZipFile(path) as archive:
            lengths = xlsx_scan.shared_string_lengths(archive, "xl/sharedStrings.xml")
            expanded = [0]
            extents.append((xlsx_scan.sheet_extent(archive, "xl/worksheets/sheet1.xml",
                                                   lengths, expanded), expanded[0]))
    assert extents[0] == extents[1]
    assert extents[0][0].area == 9 * 5 and extents[0][1] == 30


# --- rule files that are not files -----------------------------------------------------------

@pytest.fixture
def rules_folder(tmp_path):
    folder = tmp_path / "plant-rules"
    write(folder, "a-site.toml", GOOD_RULE)
    return folder


def refused_rules(lagaudit, tmp_path, folder):
    register = write(tmp_path, "r.csv", HEADER + ROW.format(i=1))
    code, _, err = lagaudit("run", register, "--rules", folder, "--out", tmp_path / "out")
    assert code == 2 and err.startswith("lagaudit: error: ") and "; expected " in err
    assert not (tmp_path / "out").exists()
    return err


@pytest.mark.skipif(not hasattr(os, "mkfifo"), reason="named pipes are POSIX")
def test_a_rule_file_that_is_a_fifo(lagaudit, tmp_path, rules_folder):
    os.mkfifo(rules_folder / "b-pipe.toml")
    err = refused_rules(lagaudit, tmp_path, rules_folder)
    assert (f"{rules_folder / 'b-pipe.toml'}: the rule file is a named pipe (FIFO), not a "
            "regular file; expected a rule file that is a regular text file") in err


@pytest.mark.skipif(not hasattr(os, "mkfifo"), reason="named pipes are POSIX")
def test_an_economics_rule_file_that_is_a_link_to_a_fifo(lagaudit, tmp_path, rules_folder):
    os.mkfifo(tmp_path / "pipe")
    (rules_folder / "economics").mkdir()
    (rules_folder / "economics" / "economics.toml").symlink_to(tmp_path / "pipe")
    err = refused_rules(lagaudit, tmp_path, rules_folder)
    assert "economics.toml: the rule file is a named pipe (FIFO), not a regular file" in err


@pytest.mark.skipif(not Path("/dev/zero").exists(), reason="needs /dev/zero")
def test_a_rule_file_linked_to_an_endless_device(lagaudit, tmp_path, rules_folder):
    (rules_folder / "b-zero.toml").symlink_to("/dev/zero")
    err = refused_rules(lagaudit, tmp_path, rules_folder)
    assert "b-zero.toml: the rule file is a device, not a regular file" in err


def test_a_rule_file_above_the_size_limit(lagaudit, tmp_path, rules_folder):
    write(rules_folder, "b-big.toml", "# padding\n" * (MAX_RULE_FILE_BYTES // 10 + 1))
    err = refused_rules(lagaudit, tmp_path, rules_folder)
    assert (f"b-big.toml: the rule file is larger than the limit of {MAX_RULE_FILE_BYTES} bytes"
            in err)


# --- selectors -------------------------------------------------------------------------------

@pytest.mark.parametrize("selector, problem", [
    ("(" * 5000 + "temp > 60" + ")" * 5000, f"nested more than {MAX_DEPTH} deep"),
    ("not " * 5000 + "temp > 60", f"nested more than {MAX_DEPTH} deep"),
    (" and ".join(["temp > 60"] * 5000), f"more than {MAX_COMPARISONS} comparisons"),
    (" or ".join(["(temp > 60 and accessible == yes)"] * 3000),
     f"more than {MAX_COMPARISONS} comparisons"),
])
def test_selectors_nested_or_chained_thousands_deep(lagaudit, tmp_path, rules_folder, selector,
                                                   problem):
    write(rules_folder, "b-check.toml", '[check.touch-temperature]\nseverity = "high"\n'
          f'applies_to = "{selector}"\nlimit_metal = 60\nlimit_non_metal = 60\n'
          'site = "hot-still-day"\nsource = "invented"\n')
    err = refused_rules(lagaudit, tmp_path, rules_folder)
    assert str(rules_folder / "b-check.toml") in err
    assert "column 'check.touch-temperature.applies_to'" in err and problem in err


# --- sources, sheets and files named twice ---------------------------------------------------

def test_two_registers_with_one_name_in_different_folders(lagaudit, tmp_path):
    a = write(tmp_path, "area-1/lines.csv", HEADER + ROW.format(i=1))
    b = write(tmp_path, "area-2/lines.csv", HEADER + ROW.format(i=2))
    other = write(tmp_path, "area-2/vessels.csv", HEADER + ROW.format(i=3))
    code, _, err = lagaudit("run", a, b, other, "--out", tmp_path / "out", "--format", "csv")
    assert code == 0, err
    r = pd.read_csv(tmp_path / "out" / "results.csv", keep_default_na=False, dtype=str)
    assert list(r["source"]) == ["area-1/lines.csv::2", "area-2/lines.csv::2", "vessels.csv::2"]


def test_a_sheet_or_a_file_named_twice_is_read_once(tmp_path):
    path = workbook(tmp_path / "twice.xlsx", register_rows())
    table = read_register([path, path], sheets=["Lines", "Lines"])
    assert list(table["source"]) == ["twice.xlsx:Lines:2"]


def test_a_worksheet_stored_outside_the_worksheets_folder_is_scanned_too(tmp_path):
    # The reader follows the workbook's relationships: a sheet part may be stored anywhere.
    stray = '<row r="1048576"><c r="XFD1048576"><v>1</v></c></row>'
    moved = tmp_path / "moved.xlsx"
    with zipfile.ZipFile(workbook(tmp_path / "plain.xlsx", register_rows(extra=stray))) as old, \
            zipfile.ZipFile(moved, "w", zipfile.ZIP_DEFLATED) as new:
        for info in old.infolist():
            data = old.read(info)
            if info.filename == "xl/_rels/workbook.xml.rels":
                data = data.replace(b"worksheets/sheet1.xml", b"elsewhere/data.xml")
            name = "xl/elsewhere/data.xml" if info.filename == "xl/worksheets/sheet1.xml" \
                else info.filename
            new.writestr(name, data)
    done = run_isolated("run", moved, "--out", tmp_path / "out")
    assert done.returncode == 2, done.stderr
    assert "part xl/elsewhere/data.xml: its cells with a value span A1:XFD1048576" in done.stderr


def test_a_shared_string_cell_with_a_second_value(refused, tmp_path):
    # The reader takes a cell's last value: a bad index hidden behind a good one is refused too.
    bad = '<row r="3"><c r="A3" t="s"><v>0</v><v>-1</v></c><c r="D3"><v>1</v></c></row>'
    err = refused(workbook(tmp_path / "two.xlsx", register_rows(extra=bad), strings=["HW-3"]))
    assert "cell A3: shared-string index '-1' is not one of the workbook's 1 shared strings" in err
