"""audit/io/writers/xlsx.py, read back with openpyxl (an independent reader)."""

import math

import numpy as np
import openpyxl
import pandas as pd
from python_calamine import CalamineWorkbook

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


def _calamine(path):
    book = CalamineWorkbook.from_path(str(path))
    return {name: book.get_sheet_by_name(name).to_python(skip_empty_area=False)
            for name in book.sheet_names}


def awkward():
    """Values whose XML or number text is easy to get wrong."""
    return pd.DataFrame({
        "tag": ["a<b>&\"c'", "  lead", "x\ry", "\r=1", "_x0041_", "ctrl\x01z", "\uff1dSUM()"],
        "q [W/m]": [0.1, 1e-5, 1e16, -0.0, 123456789.12345678, np.inf, 5e-324],
        "n": [-(2**40), 0, 1, 2, 3, 4, 5],
        "mixed": ["text", 2.5, True, None, 7, "-5", ("p", "q")],
    })


def test_openpyxl_and_calamine_read_the_same_cells(tmp_path):
    path = write_xlsx({"results": frame(), "odd": awkward()}, tmp_path / "r.xlsx")
    # calamine (a Rust reader) is independent of openpyxl: both must see every cell alike.
    calamine = _calamine(path)
    book = openpyxl.load_workbook(path)
    assert list(calamine) == book.sheetnames == ["results", "odd"]
    for name in book.sheetnames:
        # calamine reads an empty cell as "", as it reads an empty text
        mine = [[None if c == "" else c for c in r] for r in book[name].iter_rows(values_only=True)]
        theirs = [[None if c == "" else c for c in r] for r in calamine[name]]
        if name == "odd":  # openpyxl leaves Excel's _xHHHH_ escape of a control character as is
            assert (mine[6][0], theirs[6][0]) == ("ctrl_x0001_z", "ctrl\x01z")
            mine[6][0] = theirs[6][0]
        assert mine == theirs, name
    odd = [r for r in book["odd"].iter_rows(min_row=2, values_only=True)]
    assert [r[0] for r in odd] == ["a<b>&\"c'", "  lead", "x\ry", "'\r=1", "_x0041_", "ctrl_x0001_z",
                                   "'\uff1dSUM()"]
    # Numbers round-trip exactly (shortest repr); infinity has no cell value in XLSX: empty.
    assert [r[1] for r in odd] == [0.1, 1e-5, 1e16, -0.0, 123456789.12345678, None, 5e-324]
    assert [r[2] for r in odd] == [-(2**40), 0, 1, 2, 3, 4, 5]
    assert [r[3] for r in odd] == ["text", 2.5, True, None, 7, "-5", "p; q"]
    assert book["odd"].cell(row=5, column=1).data_type == "s"


def test_big_tables_keep_types_and_values(tmp_path):
    rng = np.random.default_rng(5)
    n = 45_000  # more than two chunks of rows
    values = rng.normal(0, 1e3, n) * 10.0 ** rng.integers(-8, 8, n)
    values[::7] = np.nan
    table = pd.DataFrame({"tag": [f"=T{i % 97}" if i % 5 == 0 else f"T{i}" for i in range(n)],
                          "x": values, "y": values[::-1].copy(), "k": np.arange(n),
                          "ok": np.arange(n) % 3 == 0})
    path = write_xlsx({"results": table}, tmp_path / "big.xlsx")
    rows = _calamine(path)["results"]
    assert rows[0] == ["tag", "x", "y", "k", "ok"] and len(rows) == n + 1
    got = np.array([np.nan if r[1] == "" else r[1] for r in rows[1:]])
    assert np.array_equal(got, values, equal_nan=True)  # exact: shortest round-trip text
    assert [r[3] for r in rows[1:]] == list(range(n))
    assert [r[4] for r in rows[1:]] == [bool(k % 3 == 0) for k in range(n)]
    assert all(r[0].startswith("'=") == (i % 5 == 0) for i, r in enumerate(rows[1:]))


def test_a_table_beyond_16384_columns_is_split_over_sheets(tmp_path):
    """The real XLSX limit (ECMA-376; Excel's "specifications and limits"), not a lowered one."""
    wide = pd.DataFrame(np.arange(3 * 16_500, dtype=float).reshape(3, 16_500),
                        columns=[f"c{k}" for k in range(16_500)])
    wide.insert(0, "tag", ["a", "b", "=c"])
    notes = []
    path = write_xlsx({"results": wide}, tmp_path / "wide.xlsx", notes=notes)
    assert "split over sheets results, results (2)" in notes[0]
    sheets = _calamine(path)
    first, second = sheets["results"], sheets["results (2)"]
    assert len(first[0]) == 16_384 and first[0][:2] == ["tag", "c0"]
    assert second[0] == ["tag"] + [f"c{k}" for k in range(16_383, 16_500)]
    assert [r[0] for r in second[1:]] == ["a", "b", "'=c"]
    assert second[1][1:] == [float(k) for k in range(16_383, 16_500)]
