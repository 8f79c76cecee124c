"""The data-quality summary (audit/io/readers/validate.py): problems grouped by column and code."""

from pathlib import Path

from audit.io.readers import read_register
from audit.io.readers.validate import summarise, summary
from audit.problems import problems_of

CORPUS = Path(__file__).parents[2] / "data" / "registers"


def test_summary_counts_by_code():
    table = read_register([CORPUS / "temperatures.csv", CORPUS / "multi_sheet.xlsx"])
    s = summary(table)
    assert (s.rows, s.ok, s.rejected) == (16, 12, 4)
    assert [(x["file"], x["sheet"], x["rows"]) for x in s.sheets] == [
        ("temperatures.csv", "", 9), ("multi_sheet.xlsx", "Lines", 3),
        ("multi_sheet.xlsx", "Vessels", 4)]
    assert s.reasons["temp: not-a-temperature"] == (1, ["temperatures.csv::2"])
    assert s.reasons["temp: empty"] == (1, ["temperatures.csv::9"])
    # Every rejected row has at least one reject-severity problem recorded, and no ok row has.
    found = problems_of(table).frame
    rejected_rows = set(found.loc[found["severity"] == "reject", "row"])
    assert rejected_rows == set(table.index[table["status"] == "rejected"])


def test_groups_are_codes_not_texts():
    # Three different raw values, one problem kind: one group of three.
    table = read_register([CORPUS / "duplicates_extras.csv", CORPUS / "mixed_units.csv",
                           CORPUS / "multi_sheet.xlsx"])
    s = summary(table)
    assert s.warnings["tag: duplicate-tag"][0] == 2
    assert s.reasons["tag: duplicate-row"] == (1, ["duplicates_extras.csv::6"])


def test_summary_text():
    table = read_register([CORPUS / "duplicates_extras.csv", CORPUS / "mixed_units.csv",
                           CORPUS / "multi_sheet.xlsx"])
    text = summarise(table)
    assert text.startswith("Rows read: 17 (16 ok, 1 rejected, ")
    assert ("  duplicates_extras.csv: 5 rows below the header in row 1; read as UTF-8 text, "
            "separator ',', decimal point") in text
    assert "  multi_sheet.xlsx:Vessels: 4 rows below the header in row 1" in text
    assert "multi_sheet.xlsx:Notes: skipped, no header row found" in text
    assert "tag <- 'Line No', nps <- 'Size'" in text
    assert "carried through, not used: Design Temp, P&ID, extra:Status, column 9" in text
    assert "'Design Temp' also names temp; 'Op Temp' was used" in text
    assert "units assumed by default: temp in degC (5 cells without a unit)" in text
    assert ("     2  tag: duplicate-tag: a tag on several differing rows  "
            "(e.g. duplicates_extras.csv::2, duplicates_extras.csv::4)") in text
    assert ("     1  tag: duplicate-row: a row equal to an earlier row in every recognised "
            "cell  (e.g. duplicates_extras.csv::6)") in text
