"""The command line (audit/cli.py), end to end on small registers."""

import json

import pandas as pd
import pytest

from audit.cli import main

REGISTER = ("tag,nps,length,temp,insulation,thickness,jacket,accessible,notes\n"
            "L-1,4,10,200,mineral-wool,50,aluminium-oxidised,yes,first\n"
            "L-2,2,5,TBA,mineral-wool,40,aluminium-oxidised,no,bad temp\n"
            "L-3,6,8,=1+1,mineral-wool,50,aluminium-oxidised,no,=HYPERLINK(\"http://example.invalid\")\n"
            "L-4,1-1/2,3,150,none,,,no,bare line\n")


@pytest.fixture
def register(tmp_path):
    path = tmp_path / "line_list.csv"
    path.write_text(REGISTER, encoding="utf-8")
    return path


def test_run_writes_one_row_per_input_row_in_order(register, tmp_path, capsys):
    out = tmp_path / "out"
    assert main(["run", str(register), "--out", str(out)]) == 0
    results = pd.read_csv(out / "results.csv", keep_default_na=False)
    assert list(results["tag"]) == ["L-1", "L-2", "L-3", "L-4"]
    assert list(results["status"]) == ["audited", "rejected", "rejected", "audited"]
    assert "TBA" in results["reason"][1]
    assert list(results.columns[:10]) == ["tag", "source", "status", "reason", "surface_temp [degC]",
                                          "heat_loss [W/m]", "heat_loss [W]", "heat_flux [W/m2]",
                                          "findings", "severity"]
    assert list(results["notes"])[:2] == ["first", "bad temp"]
    assert "Caution" in capsys.readouterr().out
    data = json.loads((out / "results.json").read_text(encoding="utf-8"))
    assert [r["tag"] for r in data["results"]] == ["L-1", "L-2", "L-3", "L-4"]
    xlsx = pd.read_excel(out / "results.xlsx", sheet_name="results", engine="openpyxl")
    assert len(xlsx) == 4
    # Bare metal at 150 C runs at process temperature; the insulated line far below it.
    assert float(results["surface_temp [degC]"][3]) == pytest.approx(150.0)
    assert float(results["surface_temp [degC]"][0]) < 80.0


def test_formula_looking_cells_are_neutralised_in_csv(register, tmp_path):
    out = tmp_path / "out"
    main(["run", str(register), "--out", str(out), "--format", "csv"])
    text = (out / "results.csv").read_text(encoding="utf-8")
    # OWASP "CSV Injection": text cells starting with = + - @ get a leading apostrophe.
    assert "'=HYPERLINK" in text and ",=HYPERLINK" not in text


def test_unreadable_register_exits_2_with_the_file_named(tmp_path, capsys):
    missing = tmp_path / "nope.csv"
    assert main(["run", str(missing), "--out", str(tmp_path)]) == 2
    assert "nope.csv" in capsys.readouterr().err


def test_invalid_rules_exit_2_naming_the_file(register, tmp_path, capsys):
    rules = tmp_path / "rules"
    rules.mkdir()
    (rules / "mine.toml").write_text("[material.x]\nk = [[50, 0.04]]\n", encoding="utf-8")
    assert main(["run", str(register), "--rules", str(rules), "--out", str(tmp_path / "o")]) == 2
    err = capsys.readouterr().err
    assert "mine.toml" in err and "source" in err


def test_unknown_or_unavailable_format_exits_2(register, tmp_path, capsys):
    assert main(["run", str(register), "--format", "csv,docx", "--out", str(tmp_path)]) == 2
    assert main(["run", str(register), "--format", "pdf", "--out", str(tmp_path)]) == 2
    assert "not available" in capsys.readouterr().err


def test_validate_prints_the_summary(register, capsys):
    assert main(["validate", str(register)]) == 0
    out = capsys.readouterr().out
    assert "line_list.csv" in out and "not a temperature" in out and "Rejected rows" in out
