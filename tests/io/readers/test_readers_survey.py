"""Survey readings: units at the edge, and a reason for every reading that cannot be used."""

import datetime as dt
import math

import openpyxl
import pytest

from audit.errors import RegisterError
from audit.io.readers.survey import read_survey

TODAY = dt.date(2026, 12, 4)


def readings(tmp_path, text, name="survey.csv"):
    path = tmp_path / name
    path.write_text(text, encoding="utf-8")
    return read_survey(path, today=TODAY)


def test_units_from_the_header_and_the_cell(tmp_path):
    got = readings(tmp_path, "Tag,Surface Temp [degF],ambient,wind [km/h],RH,emissivity,date\n"
                             "P-101,212,68 degF,36,50,0.9,2026-11-03\n"
                             "P-102,40 degC,20,1,50,0.95,2026-11-03 00:00:00\n")
    first, second = got.iloc[0], got.iloc[1]
    assert first["surface_temp_K"] == pytest.approx(373.15)   # 212 degF is boiling water
    assert first["ambient_K"] == pytest.approx(293.15)        # 68 degF = 20 degC exactly
    assert first["wind_m_s"] == pytest.approx(10.0)           # 36 km/h = 10 m/s exactly
    assert second["surface_temp_K"] == pytest.approx(313.15)  # the cell's unit wins
    assert second["date"] == "2026-11-03"                     # a workbook's time part dropped
    assert list(got["status"]) == ["ok", "ok"] and list(got["source"]) == [
        "survey.csv::2", "survey.csv::3"]


def test_every_bad_cell_is_a_reason_and_nothing_is_lost(tmp_path):
    got = readings(tmp_path, "tag,surface_temp,ambient,wind,rh,emissivity,date,note\n"
                             "P-1,120,20,1,50,1.4,2026-11-03,\n"
                             "P-2,120,20,1,50,0.9,2027-01-01,\n"
                             ",hot,20,1,50,0.9,3/11/2026,x\n"
                             "P-4,120,20,-3,50,0.9,2026-11-03,\n")
    assert len(got) == 4 and (got["status"] == "rejected").all()
    assert got.loc[0, "reason"].startswith('emissivity: "1.4" is out of range')
    assert "after the day of the audit" in got.loc[1, "reason"]
    assert "tag: empty" in got.loc[2, "reason"] and 'surface_temp: "hot"' in got.loc[2, "reason"]
    assert 'date: "3/11/2026" is not a date' in got.loc[2, "reason"]
    assert got.loc[3, "reason"].startswith('wind: "-3" is out of range')


def test_a_reading_without_conditions_is_kept_with_a_warning(tmp_path):
    got = readings(tmp_path, "tag,surface_temp,rh\nP-1,60,40\n")
    assert got.loc[0, "status"] == "ok" and math.isnan(got.loc[0, "ambient_K"])
    assert got.loc[0, "warnings"].startswith("ambient/wind: not recorded with the reading")


def test_xlsx_reads_like_csv(tmp_path):
    book = openpyxl.Workbook()
    sheet = book.active
    sheet.title = "IR"
    sheet.append(["tag", "surface_temp", "ambient", "wind", "rh", "emissivity", "date",
                  "position"])
    sheet.append(["V-201", 75, 15, 2, 60, 0.9, dt.datetime(2026, 10, 1), "top head"])
    book.save(tmp_path / "s.xlsx")
    got = read_survey(tmp_path / "s.xlsx", today=TODAY)
    assert got.loc[0, "source"] == "s.xlsx:IR:2"
    assert got.loc[0, "surface_temp_K"] == pytest.approx(348.15)
    assert got.loc[0, "date"] == "2026-10-01" and got.loc[0, "position"] == "top head"


def test_a_file_without_readings_is_refused_naming_it(tmp_path):
    path = tmp_path / "s.csv"
    path.write_text("tag,temp\nP-1,20\n", encoding="utf-8")
    with pytest.raises(RegisterError, match="no surface_temp column") as info:
        read_survey(path, today=TODAY)
    assert info.value.file == str(path)
