"""audit/io/writers/xlsx.py, read back with openpyxl (an independent reader)."""

import math

import numpy as np
import openpyxl
import pandas as pd

from audit.io.writers import summary_sheet, write_xlsx


def frame():
    return pd.DataFrame({
        "tag": ["=1+1", "+SUM(A1)", "-2+3", "@cmd", "\tTAB", "plain", "L-1"],
        "surface_temp [degC]": [60.5, -40.0, np.nan, 1e6, 0.0, -0.5, 25.0],
        "valves": [0, 1, 2, 3, 4, 5, 6],
        "accessible": [True, False, True, False, True, False, True],
        "layers": [("mineral-wool",), (), ("a", "b"), None, np.nan, "x", "y"],
    })


def test_text_is_neutralised_and_numbers_stay_numbers(tmp_path):
    path = write_xlsx({"results": frame()}, tmp_path / "r.xlsx")
    sheet = openpyxl.load_workbook(path)["results"]
    rows = list(sheet.iter_rows(values_only=True))
    assert rows[0] == ("tag", "surface_temp [degC]", "valves", "accessible", "layers")
    tags = [r[0] for r in rows[1:]]
    # OWASP "CSV Injection": a leading apostrophe keeps formula-looking text as text.
    assert tags == ["'=1+1", "'+SUM(A1)", "'-2+3", "'@cmd", "'\tTAB", "plain", "L-1"]
    assert all(sheet.cell(row=i, column=1).data_type == "s" for i in range(2, 9))  # never "f"
    temps = [r[1] for r in rows[1:]]
    assert temps[:2] == [60.5, -40.0] and temps[2] is None and temps[3] == 1e6
    assert all(isinstance(t, (int, float)) for t in temps if t is not None)
    assert [r[2] for r in rows[1:]] == [0, 1, 2, 3, 4, 5, 6]
    assert [r[3] for r in rows[1:]] == [True, False, True, False, True, False, True]
    assert [r[4] for r in rows[1:]] == ["mineral-wool", "", "a; b", None, None, "x", "y"]


def test_header_frozen_filters_on_sheet_per_table(tmp_path):
    path = write_xlsx({"results": frame(), "findings": frame().head(2),
                       "rejected": pd.DataFrame(columns=["tag", "source", "reason"])}, tmp_path / "r.xlsx")
    book = openpyxl.load_workbook(path)
    assert book.sheetnames == ["results", "findings", "rejected"]
    for name in book.sheetnames:
        sheet = book[name]
        assert sheet.freeze_panes == "A2"
        assert sheet.auto_filter.ref is not None and sheet.auto_filter.ref.startswith("A1:")
    assert book["results"].auto_filter.ref == "A1:E8"


def test_summary_counts_match_the_tables():
    results = pd.DataFrame({"status": ["audited", "audited", "rejected"], "tag": ["a", "b", "c"]})
    findings = pd.DataFrame({"row": [0, 0, 1], "check": ["touch", "condition", "touch"],
                             "severity": ["high", "low", "high"]})
    summary = dict(summary_sheet(results, findings).itertuples(index=False))
    assert summary["rows read"] == 3 and summary["audited"] == 2 and summary["rejected"] == 1
    assert summary["findings"] == 3 and summary["items with findings"] == 2
    assert summary["findings: touch (high)"] == 2 and summary["findings: condition (low)"] == 1


def test_summary_sheet_round_trips_as_numbers(tmp_path):
    results = pd.DataFrame({"status": ["audited"], "tag": ["a"]})
    findings = pd.DataFrame({"row": [], "check": [], "severity": []})
    path = write_xlsx({"summary": summary_sheet(results, findings)}, tmp_path / "s.xlsx")
    values = [r[1] for r in openpyxl.load_workbook(path)["summary"].iter_rows(min_row=2, values_only=True)]
    assert values == [1, 1, 0, 0, 0] and all(not isinstance(v, str) for v in values)
    assert not any(isinstance(v, float) and math.isnan(v) for v in values)


def test_nullable_columns_leave_empty_cells(tmp_path):
    table = pd.DataFrame({"n": pd.array([1, None, 3], dtype="Int64"),
                          "b": pd.array([True, None, False], dtype="boolean"),
                          "s": pd.array(["x", None, "=y"], dtype="string")})
    path = write_xlsx({"s": table}, tmp_path / "n.xlsx")
    rows = list(openpyxl.load_workbook(path)["s"].iter_rows(min_row=2, values_only=True))
    assert rows == [(1, True, "x"), (None, None, None), (3, False, "'=y")]
