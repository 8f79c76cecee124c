"""lagaudit run/demo --survey: survey.csv keeps every reading; results and findings carry it."""

import json
from pathlib import Path

import pandas as pd
import pytest

from audit.cli import main


def test_demo_reconciles_its_survey_and_loses_no_reading(tmp_path):
    out = tmp_path / "demo"
    assert main(["demo", "--out", str(out), "--format", "csv", "-q"]) == 0
    readings = pd.read_csv(Path(__file__).parents[1] / "sample_data" / "demo_survey.csv")
    survey = pd.read_csv(out / "survey.csv", keep_default_na=False)
    assert list(survey["tag"]) == list(readings["tag"])
    status = dict(zip(survey["source"], survey["status"]))
    assert set(status.values()) == {"matched", "rejected", "unknown tag"}
    assert list(survey["status"]).count("unknown tag") == 1
    assert list(survey["status"]).count("rejected") == 1
    findings = pd.read_csv(out / "findings.csv", keep_default_na=False)
    measured = findings[findings["basis"] == "measured"]
    assert (measured["check"] == "survey-deviation").sum() >= 3
    # Measured beats assumed: the accessible line read hot fails the burn check on the hot
    # still day (tools/make_demo_survey.py), at the condition its reading measured.
    burn = measured[(measured["tag"] == "QP-10-CR-4017")
                    & (measured["check"] == "touch-temperature")]
    assert len(burn) == 1 and "as measured" in burn["message"].iloc[0]
    assert set(findings.loc[findings["check"].isin(["cui-window", "below-spec"]),
                            "basis"]) <= {"register"}
    results = pd.read_csv(out / "results.csv")
    hot = results[results["tag"] == "QP-20-HP-4004"].iloc[0]
    assert hot["measured_temp [degC]"] == 62.0 and hot["condition_factor [-]"] > 2
    assert hot["basis"] == "measured" and hot["missed_energy [MWh]"] > 0
    # A rejected row has no basis: nothing was audited.
    assert results.loc[results["status"] == "rejected", "basis"].isna().all()


def test_an_unreadable_survey_exits_2_naming_it(tmp_path, capsys):
    register = tmp_path / "reg.csv"
    register.write_text("tag,nps,length,temp,layers,jacket\nP-1,4,10,180,mineral-wool 50mm,"
                        "aluminium-oxidised\n", encoding="utf-8")
    survey = tmp_path / "ir.csv"
    survey.write_text("tag,temp\nP-1,40\n", encoding="utf-8")
    assert main(["run", str(register), "--survey", str(survey), "--out",
                 str(tmp_path / "o")]) == 2
    assert "ir.csv" in capsys.readouterr().err


REGISTER = ("tag,nps,length,temp,layers,jacket,location\n"
            "P-1,4,10,180,mineral-wool 50mm,aluminium-oxidised,outdoor\n")
READINGS = ("tag,surface_temp,ambient,wind,rh,emissivity,date\n"
            "P-1,45,20,1,50,0.9,2026-10-01\n"
            "P-1,185,20,1,50,0.9,2026-10-01\n"
            "P-7,40,20,1,50,0.9,2026-10-01\n")


def run_survey(tmp_path, *extra):
    (tmp_path / "reg.csv").write_text(REGISTER, encoding="utf-8")
    (tmp_path / "ir.csv").write_text(READINGS, encoding="utf-8")
    out = tmp_path / "o"
    assert main(["run", str(tmp_path / "reg.csv"), "--survey", str(tmp_path / "ir.csv"),
                 "--out", str(out), "-q", *extra]) == 0
    return out


def test_the_workbook_and_the_json_carry_every_reading(tmp_path):
    out = run_survey(tmp_path, "--format", "csv,json,xlsx")
    csv = pd.read_csv(out / "survey.csv", keep_default_na=False)
    sheet = pd.read_excel(out / "results.xlsx", sheet_name="survey", engine="openpyxl",
                          keep_default_na=False)
    records = json.loads((out / "results.json").read_text(encoding="utf-8"))["survey"]
    assert list(sheet.columns) == list(csv.columns) == list(records[0])
    for table in (sheet, pd.DataFrame(records)):
        assert list(table["status"]) == ["matched", "rejected", "unknown tag"]
        assert float(table["measured_temp [degC]"][0]) == 45.0
    assert records[2]["condition_factor [-]"] is None  # missing numbers are null


def test_us_units_convert_the_survey_columns_and_texts(tmp_path):
    out = run_survey(tmp_path, "--format", "csv,json", "--units", "us")
    csv = pd.read_csv(out / "survey.csv", keep_default_na=False)
    assert "measured_temp [degF]" in csv and "measured_heat_loss [Btu/h]" in csv
    # 45 degC = 113 degF, 20 degC = 68 degF (exact by the definition of the scales).
    assert float(csv.loc[0, "measured_temp [degF]"]) == pytest.approx(113.0)
    assert float(csv.loc[0, "air_temp [degF]"]) == pytest.approx(68.0)
    # 185 degC = 365 degF; 180 degC = 356 degF, in the rejected reading's reason.
    assert "365.0 degF" in csv.loc[1, "reason"] and "356.0 degF" in csv.loc[1, "reason"]
    findings = pd.read_csv(out / "findings.csv", keep_default_na=False)
    deviation = findings[findings["check"] == "survey-deviation"].iloc[0]
    assert "read 113 degF" in deviation["message"]
    assert deviation["air_temp [degF]"] == pytest.approx(68.0)  # the reading's own air
    # 1 m/s = 2.23694 mph (NIST SP 811: 1 mph = 0.44704 m/s exactly).
    assert deviation["wind [mph]"] == pytest.approx(1 / 0.44704, rel=1e-5)


def test_validate_lists_each_unusable_reading_by_file_row_and_column(tmp_path, capsys):
    (tmp_path / "reg.csv").write_text(REGISTER, encoding="utf-8")
    (tmp_path / "ir.csv").write_text(READINGS + "P-1,44,20,1,50,1.7,2026-10-01\n"
                                     "P-1,46,,,,0.9,2026-10-01\n", encoding="utf-8")
    assert main(["validate", str(tmp_path / "reg.csv"), "--survey",
                 str(tmp_path / "ir.csv")]) == 0
    out = capsys.readouterr().out
    assert "survey: 5 reading(s): 2 matched, 2 rejected, 1 with an unknown tag; 1 with " \
           "warnings" in out
    # CSV line numbers: the header is line 1, so the n-th reading is on line n + 1.
    assert "ir.csv::3 (tag P-1): surface_temp: 185.0 degC is beyond the process" in out
    assert 'ir.csv::4 (tag P-7): tag: "P-7" is not in the register' in out
    assert 'ir.csv::5 (tag P-1): emissivity: "1.7"' in out
    assert "ir.csv::6 (tag P-1): ambient/wind/rh: not recorded" in out
