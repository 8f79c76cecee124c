"""The data-quality summary (audit/io/readers/validate.py)."""

from pathlib import Path

from audit.io.readers import read_register
from audit.io.readers.validate import reason_kind, summarise, summary

CORPUS = Path(__file__).parents[2] / "data" / "registers"


def test_reason_kind_drops_raw_value_and_expectation():
    assert reason_kind('temp: "TBA" is not a temperature; expected a number') == \
        'temp: "…" is not a temperature'
    assert reason_kind('nps: "1-1/2"" is not a standard pipe size; expected ...') == \
        'nps: "…" is not a standard pipe size'
    assert reason_kind('tag: "D-1" is duplicated (3 rows; first at f::2)') == \
        'tag: "…" is duplicated'


def test_summary_counts():
    table = read_register([CORPUS / "temperatures.csv", CORPUS / "multi_sheet.xlsx"])
    s = summary(table)
    assert (s.rows, s.ok, s.rejected) == (16, 12, 4)
    assert [(x["file"], x["sheet"], x["rows"]) for x in s.sheets] == [
        ("temperatures.csv", "", 9), ("multi_sheet.xlsx", "Lines", 3),
        ("multi_sheet.xlsx", "Vessels", 4)]
    assert s.reasons['temp: "…" is not a temperature'][0] == 1
    assert s.reasons["temp: empty"] == (1, ["temperatures.csv::9"])


def test_summary_text():
    table = read_register([CORPUS / "duplicates_extras.csv", CORPUS / "mixed_units.csv",
                           CORPUS / "multi_sheet.xlsx"])
    text = summarise(table)
    assert text.startswith("Rows read: 17 (17 ok, 0 rejected, ")
    assert ("  duplicates_extras.csv: 5 rows below the header in row 1; read as UTF-8 text, "
            "separator ',', decimal point") in text
    assert "  multi_sheet.xlsx:Vessels: 4 rows below the header in row 1" in text
    assert "multi_sheet.xlsx:Notes: skipped, no header row found" in text
    assert "tag <- 'Line No', nps <- 'Size'" in text
    assert "carried through, not used: Design Temp, P&ID, extra:Status, column 9" in text
    assert "'Design Temp' also names temp; 'Op Temp' was used" in text
    assert "units assumed by default: temp in degC (5 cells without a unit)" in text
    assert '     3  tag: "…" is duplicated  (e.g. duplicates_extras.csv::2, ' in text
    assert "Rejected rows by reason:\n  none" in text
