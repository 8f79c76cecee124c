"""Output safety of ``lagaudit run`` (audit/io/writers): hostile register text comes out inert.

Spreadsheet formula injection (OWASP, "CSV Injection"): a text cell starting with = + - @ (or a
tab or carriage return) is prefixed with an apostrophe in CSV and XLSX; numbers, negative ones
included, stay numbers.  JSON is not read by spreadsheets and keeps the text exactly.  Output
file names are fixed (results.csv, findings.csv, results.json, results.xlsx): no name is built
from pathlib import Path
from a tag, so a tag cannot steer a file out of the output folder.  HTML escaping and the PDF
renderer belong to the report and are tested with it.
"""

import contextlib
import csv
import io
import json
from pathlib import Path

import openpyxl
import pytest

from audit.cli import main

REGISTERS = Path(__file__).parents[1] / "data" / "bad" / "registers"

TRIGGERS = ("=", "+", "-", "@", "\t", "\r")
OUTPUTS = ["findings.csv", "report.html", "report.pdf", "results.csv", "results.json",
           "results.xlsx", "workorders", "workorders.csv"]

HOSTILE = (
    "tag,nps,length,temp,layers,remarks\n"
    '=cmd|\' /C calc\'!A0,2,10,150,mineral-wool 40mm,"=HYPERLINK(""http://example.invalid"")"\n'
    'BS-2,2,10,150,mineral-wool 40mm,"\t=2+2"\n'
    'BS-3,2,10,150,mineral-wool 40mm,"@SUM(A1)"\n'
    "BS-4,2,10,-40,cellular-glass 50mm,cold line: heat gain\n"   # negative heat loss
    "BS-5,2,10,150,none,-5 is a number as text\n"
    "+BS-6,2,10,150,none,\n"
)


@pytest.fixture(scope="module")
def hostile_run(tmp_path_factory):
    """One run for the module (its tests only read the outputs)."""
    folder = tmp_path_factory.mktemp("hostile")
    register = folder / "hostile.csv"
    register.write_text(HOSTILE, encoding="utf-8", newline="")
    out = folder / "out"
    with contextlib.redirect_stdout(io.StringIO()), contextlib.redirect_stderr(io.StringIO()):
        assert main(["run", str(register), "--out", str(out)]) == 0
    return out


def _is_number(text):
    try:
        float(text)
    except ValueError:
        return False
    return True


@pytest.mark.parametrize("name", ["results.csv", "findings.csv"])
def test_csv_text_that_a_spreadsheet_would_run_is_prefixed(hostile_run, name):
    with open(hostile_run / name, encoding="utf-8", newline="") as handle:
        header, *rows = list(csv.reader(handle))
    assert rows
    for row in rows:
        for field in row:
            assert not field.startswith(TRIGGERS) or _is_number(field), field


def test_csv_cells_keep_their_text_behind_the_apostrophe(hostile_run):
    with open(hostile_run / "results.csv", encoding="utf-8", newline="") as handle:
        rows = list(csv.DictReader(handle))
    assert [r["tag"] for r in rows] == ["'=cmd|' /C calc'!A0", "BS-2", "BS-3", "BS-4", "BS-5",
                                        "'+BS-6"]
    assert [r["remarks"] for r in rows][:3] == ["'=HYPERLINK(\"http://example.invalid\")",
                                                "'\t=2+2", "'@SUM(A1)"]
    assert rows[4]["remarks"] == "'-5 is a number as text"
    # a heat gain is a negative number, written as a number
    assert rows[3]["status"] == "audited" and rows[3]["heat_loss [W]"].startswith("-")
    assert float(rows[3]["heat_loss [W]"]) < 0


def test_xlsx_holds_no_formula_and_numbers_stay_numbers(hostile_run):
    book = openpyxl.load_workbook(hostile_run / "results.xlsx")
    assert book.sheetnames[:3] == ["results", "findings", "rejected"]
    for sheet in book.worksheets:
        for row in sheet.iter_rows():
            for cell in row:
                assert cell.data_type != "f", (sheet.title, cell.coordinate, cell.value)
                if cell.data_type == "s" and cell.row > 1:
                    assert not cell.value.startswith(TRIGGERS), (sheet.title, cell.value)
    results = book["results"]
    header = [c.value for c in results[1]]
    tags = [c.value for c in results["A"]][1:]
    assert tags == ["'=cmd|' /C calc'!A0", "BS-2", "BS-3", "BS-4", "BS-5", "'+BS-6"]
    heat = results.cell(row=5, column=header.index("heat_loss [W]") + 1)  # BS-4, cold
    assert heat.data_type == "n" and heat.value < 0


def test_json_keeps_the_text_exactly(hostile_run):
    records = json.loads((hostile_run / "results.json").read_text(encoding="utf-8"))["results"]
    assert [r["tag"] for r in records] == ["=cmd|' /C calc'!A0", "BS-2", "BS-3", "BS-4", "BS-5",
                                           "+BS-6"]
    assert records[1]["remarks"] == "\t=2+2" and records[3]["heat_loss [W]"] < 0


def test_csv_headers_taken_from_the_register_are_prefixed_too(lagaudit, tmp_path):
    register = tmp_path / "headers.csv"
    register.write_text('tag,nps,length,temp,layers,"=HYPERLINK(""http://example.invalid"";'
                        '""x"")",@SUM(1+1)\nBH-1,2,10,150,none,a,b\n', encoding="utf-8")
    out = tmp_path / "out"
    assert lagaudit("run", register, "--out", out, "--format", "csv")[0] == 0
    with open(out / "results.csv", encoding="utf-8", newline="") as handle:
        header = next(csv.reader(handle))
    assert header[-2:] == ["'=HYPERLINK(\"http://example.invalid\";\"x\")", "'@SUM(1+1)"]


def test_file_names_never_come_from_tags(lagaudit, tmp_path):
    register = tmp_path / "names.csv"
    register.write_text("tag,nps,length,temp,layers\n../../escape,2,10,150,none\n"
                        f"{tmp_path / 'absolute'},2,10,150,none\nCON,2,10,150,none\n"
                        "NUL.txt,2,10,150,none\n", encoding="utf-8")
    out = tmp_path / "out"
    assert lagaudit("run", register, "--out", out)[0] == 0
    assert sorted(p.name for p in out.iterdir()) == OUTPUTS
    # Work-order packs are named by area code, here none: one pack, a fixed name.
    assert sorted(p.name for p in (out / "workorders").iterdir()) == ["no-area.pdf"]
    assert sorted(p.name for p in tmp_path.iterdir()) == ["names.csv", "out"]


def test_the_markup_corpus_comes_out_as_text(lagaudit, tmp_path):
    out = tmp_path / "out"
    assert lagaudit("run", REGISTERS / "markup_cells.csv", "--out", out)[0] == 0
    records = json.loads((out / "results.json").read_text(encoding="utf-8"))["results"]
    assert records[0]["tag"] == "<script>alert(1)</script>"
    book = openpyxl.load_workbook(out / "results.xlsx")
    assert book["results"]["A2"].value == "<script>alert(1)</script>"
