"""Invariants of the whole audit on generated registers with good and bad cells (hypothesis).

Each generated register is written as a CSV and audited by audit.pipeline.audit_register, or by
``lagaudit run`` for the conservation across output formats.  Invariants: one result row per
input row, in input order; audited + rejected = total; every rejected row has a reason naming
the column of each bad cell it holds; every row of good cells only is audited; audited rows have
finite surface temperature, heat loss and heat flux.  Examples are derandomised (the same in
every CI run) and few, to keep the whole run short.
"""

import csv
import json
import math
import tempfile
from pathlib import Path

import numpy as np
import openpyxl
import pandas as pd
import pytest
from hypothesis import HealthCheck, given, settings, strategies as st

from audit.cli import main
from audit.pipeline import audit_register

# column -> (good cells, bad cells).  Good cells are valid for a pipe whatever the other good
# cells of the row are; each bad cell is wrong on its own (a value, a type, a unit or a name).
# Temperatures stay inside the engine's range: a register whose every row the engine rejects
# is a known bug (tests/bad/test_bad_registers.py::test_a_register_whose_every_row_the_engine_
# rejects), so the first row of every register is all good.
CELLS = {
    "nps": (["2", "4", "1-1/2", "DN100", '6"'], ["", "big", "7", "0", "-2"]),
    "length": (["10", "3.5", "30 ft", "12 m"], ["", "ten", "-5", "0", "5 degC", "1e400"]),
    "temp": (["150", "65 degC", "300 degF", "-20", "400 K"],
             ["", "TBA", "2 m", "-300", "nan", "=1+1", "<b>150</b>", "1e400"]),
    "layers": (["mineral-wool 50mm", "calcium-silicate 40mm + mineral-wool 2in", "none",
                "cellular-glass 2x40"],
               ["", "moon-dust 50mm", "mineral-wool -50", "mineral-wool forty",
                "mineral-wool 0"]),
    "jacket": (["", "aluminium-oxidised", "stainless-steel", "0.9"],
               ["gold-leaf", "1.5", "-0.1", "0"]),
    "accessible": (["", "yes", "no", "x"], ["maybe", "2"]),
    "valves": (["", "0", "2"], ["two", "1.5", "-1"]),
}
COLUMNS = ["tag", *CELLS, "remarks"]
REMARKS = st.one_of(
    st.sampled_from(["", "=HYPERLINK(\"http://example.invalid\")", "+1", "-1", "@A1",
                     "<script>alert(1)</script>", "a, \"quoted\" remark", "line\nbreak"]),
    st.text(st.characters(blacklist_categories=("Cs", "Cc")), max_size=12))


@st.composite
def rows(draw, all_good=False):
    row, bad = {}, set()
    for column, (good, wrong) in CELLS.items():
        if not all_good and draw(st.booleans()) and draw(st.booleans()):  # 1 cell in 4 bad
            row[column] = draw(st.sampled_from(wrong))
            bad.add(column)
        else:
            row[column] = draw(st.sampled_from(good))
    row["remarks"] = draw(REMARKS)
    return row, bad


@st.composite
def registers(draw, max_rows=8):
    body = [draw(rows(all_good=True))] + draw(st.lists(rows(), max_size=max_rows - 1))
    out = []
    for i, (row, bad) in enumerate(body):
        tag = draw(st.sampled_from([f"PT-{i}", f"PT-{i}", "", "=X", "PT-0"])) if i else "PT-0"
        if tag == "":
            bad = bad | {"tag"}
        out.append(({"tag": tag, **row}, bad))
    return out


def write(path: Path, register) -> Path:
    with open(path, "w", encoding="utf-8", newline="") as handle:
        writer = csv.DictWriter(handle, COLUMNS)
        writer.writeheader()
        writer.writerows(row for row, _ in register)
    return path


SETTINGS = dict(deadline=None, derandomize=True, suppress_health_check=[HealthCheck.too_slow])
COMPUTED = ["surface_temp [degC]", "heat_loss [W]", "heat_flux [W/m2]"]


@settings(max_examples=15, **SETTINGS)
@given(registers())
def test_every_row_comes_out_once_with_a_status_and_finite_results(register):
    with tempfile.TemporaryDirectory() as folder:
        results = audit_register([write(Path(folder) / "reg.csv", register)]).results
    n = len(register)
    assert len(results) == n
    assert list(results["source"]) == [f"reg.csv::{i + 2}" for i in range(n)]
    assert list(results["tag"]) == [row["tag"] for row, _ in register]
    status = results["status"]
    assert set(status) <= {"audited", "rejected"}
    assert (status == "audited").sum() + (status == "rejected").sum() == n
    rejected = status == "rejected"
    assert (results.loc[rejected, "reason"].str.strip() != "").all()
    audited = results.loc[~rejected, COMPUTED].to_numpy(float)
    assert np.isfinite(audited).all()
    # Unknown columns come through unchanged, whatever they hold.
    assert list(results["remarks"]) == [row["remarks"] for row, _ in register]
    for i, (row, bad) in enumerate(register):
        reason = results.loc[i, "reason"]
        if bad:
            assert status[i] == "rejected", (row, bad)
            for column in bad:
                assert f"{column}:" in reason, (column, row, reason)
        else:
            assert status[i] == "audited", (row, reason)


def write_xlsx(path: Path, register) -> Path:
    """The same register as a workbook; every cell a text cell, as typed (none a formula)."""
    book = openpyxl.Workbook()
    sheet = book.active
    sheet.title = "Lines"
    for r, values in enumerate([COLUMNS] + [[row[c] for c in COLUMNS] for row, _ in register]):
        for c, value in enumerate(values):
            cell = sheet.cell(row=r + 1, column=c + 1, value=value or None)
            cell.data_type = "s"  # openpyxl would otherwise store "=1+1" as a formula
    book.save(path)
    return path


@settings(max_examples=5, **SETTINGS)
@given(registers(max_rows=6))
def test_a_register_as_csv_or_as_xlsx_audits_the_same(register):
    with tempfile.TemporaryDirectory() as folder:
        from_csv = audit_register([write(Path(folder) / "reg.csv", register)]).results
        from_xlsx = audit_register([write_xlsx(Path(folder) / "reg.xlsx", register)]).results
    assert list(from_xlsx["source"]) == [f"reg.xlsx:Lines:{i + 2}" for i in range(len(register))]
    for column in ("tag", "status", "reason", *COMPUTED):
        assert from_xlsx[column].equals(from_csv[column]), column


def _xlsx_results(path):
    sheet = openpyxl.load_workbook(path, read_only=True)["results"]
    header, *body = [list(r) for r in sheet.iter_rows(values_only=True)]
    return header, body


@settings(max_examples=5, **SETTINGS)
@given(registers(max_rows=6))
def test_csv_xlsx_and_json_agree_on_rows_and_totals(register):
    with tempfile.TemporaryDirectory() as folder:
        out = Path(folder) / "out"
        source = write(Path(folder) / "reg.csv", register)
        assert main(["run", str(source), "--out", str(out)]) == 0
        from_csv = pd.read_csv(out / "results.csv", keep_default_na=False, dtype=str)
        header, body = _xlsx_results(out / "results.xlsx")
        records = json.loads((out / "results.json").read_text(encoding="utf-8"))["results"]
        rejected_sheet = openpyxl.load_workbook(out / "results.xlsx", read_only=True)["rejected"]
        rejected_rows = sum(1 for _ in rejected_sheet.iter_rows()) - 1
    n = len(register)
    assert len(from_csv) == len(body) == len(records) == n
    status_xlsx = [r[header.index("status")] for r in body]
    assert list(from_csv["status"]) == status_xlsx == [r["status"] for r in records]
    assert rejected_rows == status_xlsx.count("rejected")

    column = "heat_loss [W]"
    csv_values = [float(v) if v else math.nan for v in from_csv[column]]
    xlsx_values = [math.nan if r[header.index(column)] is None else r[header.index(column)]
                   for r in body]
    json_values = [math.nan if r[column] is None else r[column] for r in records]
    audited = [s == "audited" for s in status_xlsx]
    # CSV writes shortest round-trip reprs and JSON stores the doubles: equal to the bit.
    assert [v for v, a in zip(csv_values, audited) if a] == \
        [v for v, a in zip(json_values, audited) if a]
    # openpyxl writes numbers as "%.16g" (openpyxl/compat/strings.py), so an XLSX value may
    # differ from the double in the 17th significant digit: half a unit of the 16th digit
    # (5e-16 relative) plus reading it back to a double (1.1e-16) stays below 1e-15.
    for v_xlsx, v_csv, a in zip(xlsx_values, csv_values, audited):
        assert (v_xlsx == pytest.approx(v_csv, rel=1e-15, abs=0)) if a else math.isnan(v_xlsx)
    total_csv = math.fsum(v for v, a in zip(csv_values, audited) if a)
    total_json = math.fsum(v for v, a in zip(json_values, audited) if a)
    total_xlsx = math.fsum(v for v, a in zip(xlsx_values, audited) if a)
    scale = math.fsum(abs(v) for v, a in zip(csv_values, audited) if a)
    assert total_csv == total_json
    assert abs(total_xlsx - total_csv) <= 1e-15 * scale  # the same bound, row by row
    assert all(math.isfinite(v) for v, a in zip(csv_values, audited) if a)
