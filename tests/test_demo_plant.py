"""The demo plant (sample_data/, written by tools/make_demo_plant.py): read in both formats,
audited, and every shipped check finds something in it."""

import importlib.util
from pathlib import Path

import openpyxl
import pandas as pd
import pytest

from audit.pipeline import audit_register

ROOT = Path(__file__).resolve().parent.parent
DATA = ROOT / "sample_data"
FILES = {fmt: [DATA / f"demo_line_list.{fmt}", DATA / f"demo_equipment.{fmt}",
               DATA / f"demo_cold_area.{fmt}"] for fmt in ("csv", "xlsx")}
#: The shipped checks that are enabled (rules/checks-*.toml, rules/spec-demo.toml).
CHECKS = ["touch-temperature", "condensation", "layer-overheat", "heat-loss-limit", "below-spec",
          "cui-window", "condition", "uninsulated-fittings", "cold-touch", "layer-too-cold",
          "tracing-shortfall", "freeze-risk", "temperature-drop"]
#: The bad rows written on purpose (tools/make_demo_plant.py, BAD_ROWS and EQUIPMENT): the
#: column each reason names.
BAD_COLUMNS = ["length", "temp", "nps", "layers", "damaged", "accessible", "layers", "jacket",
               "od", "fluid", "flow"]


def _generator():
    spec = importlib.util.spec_from_file_location("make_demo_plant",
                                                  ROOT / "tools" / "make_demo_plant.py")
    module = importlib.util.module_from_spec(spec)
    spec.loader.exec_module(module)
    return module


@pytest.fixture(scope="module", params=["csv", "xlsx"])
def audit(request):
    return request.param, audit_register(FILES[request.param])


@pytest.fixture(scope="module")
def both():
    return {fmt: audit_register(paths) for fmt, paths in FILES.items()}


def test_sizes(audit):
    fmt, a = audit
    sources = a.results["source"].str.split(":").str[0]
    assert (sources == f"demo_line_list.{fmt}").sum() == 310  # 300, and 10 cold-weather lines
    assert (sources == f"demo_equipment.{fmt}").sum() == 40
    assert (sources == f"demo_cold_area.{fmt}").sum() == 15


@pytest.mark.parametrize("check", CHECKS)
def test_every_check_finds_something(audit, check):
    _, a = audit
    assert (a.findings["check"] == check).any(), f"no {check} finding in the demo plant"


def test_bad_rows_rejected_each_for_its_own_mistake(audit):
    _, a = audit
    rejected = a.results.loc[a.results["status"] == "rejected"]
    columns = [reason.split(":")[0] for reason in rejected["reason"]]
    assert columns == BAD_COLUMNS
    assert rejected["reason"].is_unique


def test_duplicate_tag_warned_not_rejected(audit):
    _, a = audit
    dup = a.results["warnings"].str.contains("is duplicated")
    assert dup.sum() == 2
    assert (a.results.loc[dup, "status"] == "audited").all()


def test_extra_columns_carried_through(audit):
    _, a = audit
    for column in ("P&ID", "Stream", "Remarks", "Description", "Drawing"):
        assert column in a.results.columns


def test_csv_and_xlsx_give_the_same_audit(both):
    csv, xlsx = both["csv"], both["xlsx"]
    keep = [c for c in csv.results.columns if c not in ("source", "warnings")]  # name the file
    pd.testing.assert_frame_equal(csv.results[keep], xlsx.results[keep])
    cols = ["row", "tag", "check", "severity", "value", "limit", "remedy"]
    pd.testing.assert_frame_equal(csv.findings[cols], xlsx.findings[cols])


def test_xlsx_has_a_title_block_above_the_header():
    book = openpyxl.load_workbook(FILES["xlsx"][0], read_only=True)
    rows = list(book["Line list"].iter_rows(min_row=1, max_row=4, values_only=True))
    assert "Quarvel Point Works" in rows[0][0]
    assert rows[3][0] == "Line No" and "Op Temp [degC]" in rows[3]
    assert "Notes" in book.sheetnames


def _cells(path):
    book = openpyxl.load_workbook(path, read_only=True)
    return {name: list(book[name].iter_rows(values_only=True)) for name in book.sheetnames}


def test_generator_reproduces_the_files(tmp_path):
    # CSV byte for byte; XLSX cell for cell (the zip bytes depend on the xlsxwriter version).
    for path in _generator().main(tmp_path):
        shipped = DATA / path.name
        if path.suffix == ".csv":
            assert path.read_bytes() == shipped.read_bytes(), path.name
        else:
            assert _cells(path) == _cells(shipped), path.name


def test_cold_weather_lines_show_both_sides_of_each_check(audit):
    # tools/make_demo_plant.py, COLD_WEATHER_LINES: each check has an item that passes beside
    # one that fails, and the heated pump house's branch never freezes (indoor cold case).
    a = audit[1]
    flagged = {c: set(a.findings.loc[a.findings["check"] == c, "tag"])
               for c in ("tracing-shortfall", "freeze-risk", "temperature-drop")}
    assert {"QP-50-FO-2951", "QP-50-FO-2952"} <= flagged["tracing-shortfall"]
    assert not {"QP-50-FO-2950", "QP-50-BI-2953"} & flagged["tracing-shortfall"]
    assert "QP-50-FW-2961" in flagged["freeze-risk"]
    assert not {"QP-50-FW-2960", "QP-50-FW-2962"} & flagged["freeze-risk"]
    assert "QP-50-FO-2970" in flagged["temperature-drop"]
    assert "QP-50-FO-2971" not in flagged["temperature-drop"]
    hours = a.results.set_index("tag")["time_to_freeze [h]"]
    assert hours["QP-50-FW-2960"] > 8 and pd.isna(hours["QP-50-FW-2962"])


def test_the_cold_area_shows_boil_off_and_keeps_heat_lost_and_gained_apart(audit):
    _, a = audit
    results = a.results.set_index("tag")
    # LNG and liquid nitrogen boil off what they gain; send-out gas and glycol hold no boiling
    # liquid. Boil-off = heat gained / latent heat (tests/economics check the arithmetic).
    boil = results["boil_off [kg/h]"]
    assert (boil[["QP-70-LNG-7001", "QP-70-T-7010", "QP-70-D-7022", "QP-80-NH-8002"]] > 0).all()
    assert boil[["QP-70-NG-7003", "QP-80-GL-8003"]].isna().all()
    bought = results["energy_bought"]
    assert bought["QP-70-LNG-7001"] == "boil-off" and bought["QP-70-NG-7003"] == "none"
    assert bought["QP-80-NH-8002"] == "electricity"
    plant = a.economics.plant
    assert plant["energy_heat_lost [MWh]"] > 0 and plant["energy_heat_gained [MWh]"] > 0
    assert plant["boil_off [kg/h]"] == pytest.approx(boil.sum(skipna=True), rel=1e-9)


def test_the_cold_area_flags_the_wrong_materials_and_the_bare_cold_metal(audit):
    _, a = audit
    found = a.findings.groupby("check")["tag"].apply(set)
    # PIR (ASTM C591: to -183 degC) on liquid nitrogen; mineral wool (C547: to 0 degF) on
    # ammonia at -40 degC; calcium silicate (C533: from 80 degF) on chilled water.
    assert found["layer-too-cold"] == {"QP-70-LN-7020", "QP-80-NH-8002", "QP-80-CW-8004"}
    assert {"QP-70-LNG-7004", "QP-80-NH-8005"} <= found["cold-touch"]
    ice = a.findings[(a.findings["check"] == "condensation")
                     & a.findings["tag"].isin(["QP-70-LNG-7004", "QP-80-NH-8005"])]
    assert len(ice) == 2 and ice["message"].str.contains("ice").all()
