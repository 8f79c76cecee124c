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


def test_unknown_format_exits_2(register, tmp_path, capsys):
    assert main(["run", str(register), "--format", "csv,docx", "--out", str(tmp_path)]) == 2
    assert "unknown format 'docx'" in capsys.readouterr().err


def test_validate_prints_the_summary(register, capsys):
    assert main(["validate", str(register)]) == 0
    out = capsys.readouterr().out
    assert "line_list.csv" in out and "not a temperature" in out and "Rejected rows" in out


def test_fail_on_exits_1_when_a_finding_reaches_the_severity(register, tmp_path):
    # A bare accessible line at 200 degC fails touch-temperature, shipped as "high".
    hot = tmp_path / "hot.csv"
    hot.write_text("tag,nps,length,temp,layers,accessible\nH-1,2,5,200,none,yes\n", encoding="utf-8")
    out = str(tmp_path / "o")
    assert main(["run", str(hot), "--out", out, "--format", "csv", "--fail-on", "high"]) == 1
    assert main(["run", str(hot), "--out", out, "--format", "csv", "--fail-on", "critical"]) == 0
    assert main(["run", str(hot), "--out", out, "--format", "csv"]) == 0
    findings = pd.read_csv(tmp_path / "o" / "findings.csv")
    assert "touch-temperature" in set(findings["check"])


def test_rules_command_lists_definitions_with_sources(capsys):
    assert main(["rules"]) == 0
    out = capsys.readouterr().out
    for words in ("Materials", "mineral-wool", "Checks", "touch-temperature", "source:",
                  "Site conditions", "hot-still-day"):
        assert words in out


def test_an_invalid_check_parameter_stops_the_run_with_exit_2(register, tmp_path, capsys):
    rules = tmp_path / "rules"
    rules.mkdir()
    (rules / "plant.toml").write_text(
        '[check.touch-temperature]\nsite = "hot-still-day"\nseverity = "high"\nsource = "x"\n'
        'limit_metal = "hot"\nlimit_non_metal = 60\n', encoding="utf-8")
    assert main(["run", str(register), "--rules", str(rules), "--out", str(tmp_path / "o")]) == 2
    err = capsys.readouterr().err
    assert "plant.toml" in err and "limit_metal" in err


def test_demo_runs_on_the_shipped_demo_plant(tmp_path, capsys):
    out = tmp_path / "demo"
    assert main(["demo", "--out", str(out), "--format", "csv"]) == 0
    results = pd.read_csv(out / "results.csv", keep_default_na=False)
    assert len(results) == 365  # the demo plant: 310 lines, 40 equipment items, 15 cold-area rows
    assert "Caution" in capsys.readouterr().out


def test_quiet_prints_nothing(register, tmp_path, capsys):
    assert main(["run", str(register), "--out", str(tmp_path / "q"), "--format", "csv", "-q"]) == 0
    captured = capsys.readouterr()
    assert captured.out == "" and captured.err == ""


def test_help_of_every_command_shows_an_example_and_the_caution(capsys):
    for command in ("run", "demo", "calc", "validate", "rules"):
        with pytest.raises(SystemExit) as done:
            main([command, "--help"])
        assert done.value.code == 0
        text = capsys.readouterr().out
        assert "example" in text, command
    with pytest.raises(SystemExit):
        main(["--help"])
    assert "asbestos" in capsys.readouterr().out


def test_verbose_lists_rule_files_and_findings_by_check(register, tmp_path, capsys):
    assert main(["run", str(register), "--out", str(tmp_path / "v"), "--format", "csv", "-v"]) == 0
    out = capsys.readouterr().out
    assert "Rule files read:" in out and "materials.toml" in out
    assert "Findings by check:" in out and "Rows with warnings:" in out


def test_run_reads_the_surroundings_column(tmp_path):
    # The register's surroundings column reaches the engine in `run`: a bare line radiating
    # to colder surroundings loses more than the same line radiating to the air, and the
    # results say which surroundings were used.  The findings say which surroundings each
    # check judged under: the touch check's scenario (hot-still-day) has none of its own, so
    # its air temperature, unless the row gives its own (a row value wins).
    path = tmp_path / "sur.csv"
    path.write_text("tag,nps,length,temp,insulation,material,ambient,wind,accessible,surroundings\n"
                    "AIR,4,10,150,none,carbon-steel,20,0,yes,\n"
                    "COLD,4,10,150,none,carbon-steel,20,0,yes,-20\n", encoding="utf-8")
    out = tmp_path / "out"
    assert main(["run", str(path), "--out", str(out), "--format", "csv"]) == 0
    results = pd.read_csv(out / "results.csv", keep_default_na=False)
    assert list(results["surroundings_temp [degC]"]) == pytest.approx([20.0, -20.0])
    assert results["heat_loss [W]"][1] > results["heat_loss [W]"][0]
    findings = pd.read_csv(out / "findings.csv", keep_default_na=False)
    touch = findings[findings["check"] == "touch-temperature"].set_index("tag")
    assert touch.loc["COLD", "surroundings_temp [degC]"] == pytest.approx(-20.0)
    assert touch.loc["AIR", "surroundings_temp [degC]"] == pytest.approx(
        touch.loc["AIR", "air_temp [degC]"])


def test_workorder_pages_sets_the_cap_of_the_packs(register, tmp_path, capsys):
    out = tmp_path / "out"
    assert main(["run", str(register), "--out", str(out), "--format", "pdf",
                 "--workorder-pages", "0", "-q"]) == 0
    orders = pd.read_csv(out / "workorders.csv", keep_default_na=False)
    assert list(orders["tag"]) == ["L-4"]  # the bare line: the one item to repair
    assert list(orders["work_order_file"]) == [""]  # listed, not printed
    assert not list(out.glob("workorders/*.pdf"))
    assert main(["run", str(register), "--out", str(out), "--format", "pdf", "-q"]) == 0
    assert list(pd.read_csv(out / "workorders.csv")["work_order_file"]) == ["workorders/no-area.pdf"]
    for bad in ("-1", "two"):
        with pytest.raises(SystemExit) as stop:
            main(["run", str(register), "--out", str(out), "--workorder-pages", bad])
        assert stop.value.code == 2
    assert "--workorder-pages" in capsys.readouterr().err


def test_plant_without_history_is_a_usage_error(tmp_path, capsys):
    # --plant only names the plant an audit is recorded under: alone it would be dropped silently.
    code = main(["demo", "--plant", "North works", "--out", str(tmp_path / "out"), "--format", "csv"])
    assert code == 2
    assert "--history" in capsys.readouterr().err
    assert not (tmp_path / "out").exists()
