"""Work-order planning: access and asbestos thresholds, labour and cost arithmetic, the key.

The hour and cost tables here are small hand-made tables (invented test data, not published
values); each expected total is worked by hand in the comment beside it.
"""

import math

import numpy as np
import pytest

from audit.economics.rules import Repair
from audit.errors import RuleError
from audit.planning import (HourTable, PlanningRules, labour_and_materials, needs_scaffold,
                            plan_order, planning_rules, presumed_asbestos, work_order_key)
from audit.rules import load_rules

NPS4_OD = 0.1143  # m, ASME B36.10M outside diameter of NPS 4

REPAIR = Repair(sizes=(2, 4), thicknesses=(0.025, 0.050), pipe_per_m=((20, 30), (40, 50)),
                surface_per_m2=(60, 80), cover_per_fitting=(100, 200), source="test")
PLAN = PlanningRules(
    scaffold_above=2.0, access_source="test", presumed_before=1990, asbestos_source="test",
    caution="survey first", hours=HourTable(sizes=(2, 4), thicknesses=(0.025, 0.050),
                                            pipe_per_m=((0.2, 0.3), (0.4, 0.5)),
                                            surface_per_m2=(0.4, 0.6), cover_per_fitting=(1.0, 1.5)),
    guard_hours={"m": 0.3, "m²": 0.4, "pcs": 0.5}, scaffold_hours=10, rate=50, scaffold_hire=300,
    labour_source="test", guard_cost={"m": 40, "m²": 50, "pcs": 80}, guard_source="test")


def _q(work, quantity, unit, od=NPS4_OD, thickness_mm=0.0, material="", thickness=""):
    return {"work": work, "quantity": quantity, "unit": unit, "od_m": od, "size": "NPS 4",
            "thickness_mm": thickness_mm, "material": material, "thickness": thickness,
            "text": str(quantity)}


PIPE = [_q("insulate to the remedy thickness (whole item)", 10.0, "m", thickness_mm=50.0,
           material="mineral-wool", thickness="50"),
        _q("removable insulation cover, valve", 2, "pcs"),
        _q("personnel guard (alternative to insulation), fittings", 3, "pcs")]
VESSEL = [_q("reinstate damaged share as installed", 12.0, "m²", od=2.0)]


def test_labour_and_materials_of_a_pipe_against_hand_totals():
    hours, cost = labour_and_materials(PIPE, 0.05, REPAIR, PLAN)
    # hours: 10 m x 0.5 h/m + 2 covers x 1.5 h + 3 guards x 0.5 h = 5 + 3 + 1.5 = 9.5 h
    assert hours == pytest.approx(9.5, rel=1e-12)  # exact sums of table entries
    # cost: 10 m x 50 + 2 x 200 + 3 x 80 = 500 + 400 + 240 = 1140
    assert cost == pytest.approx(1140.0, rel=1e-12)


def test_reinstatement_is_priced_at_the_installed_thickness_interpolated():
    hours, cost = labour_and_materials(VESSEL, 0.0375, REPAIR, PLAN)
    # 37.5 mm is halfway between 25 and 50 mm: 0.5 h/m2 and 70 /m2; 12 m2 -> 6 h, 840
    assert hours == pytest.approx(6.0, rel=1e-12)
    assert cost == pytest.approx(840.0, rel=1e-12)


def test_outside_the_tables_has_no_cost_rather_than_the_nearest():
    hours, cost = labour_and_materials(VESSEL, 0.100, REPAIR, PLAN)  # 100 mm beyond 50 mm
    assert math.isnan(hours) and math.isnan(cost)


def _part(quantities, installed_m, elevation, year, iced=False):
    return {"quantities": quantities, "installed_m": installed_m, "elevation_m": elevation,
            "install_year": year, "iced": iced}


def test_an_order_sums_its_rows_and_adds_scaffold_against_hand_totals():
    order = {"tag": "QP-1", "findings": [{"check": "touch-temperature"}, {"check": "cui-window"}],
             "quantities": PIPE}
    plan = plan_order(order, [_part(PIPE, 0.05, 1.0, 2005), _part(VESSEL, 0.0375, 2.5, 2005)],
                      REPAIR, PLAN)
    assert plan["scaffold"] == "yes" and plan["asbestos_survey"] == "no"
    # hours: 9.5 + 6 + 10 scaffold = 25.5 h; labour 25.5 x 50 = 1275
    assert plan["labour_h"] == pytest.approx(25.5, rel=1e-12)
    assert plan["labour_cost"] == pytest.approx(1275.0, rel=1e-12)
    # repair cost: materials 1140 + 840 = 1980, + labour 1275, + scaffold hire 300 = 3555
    assert plan["materials_cost"] == pytest.approx(1980.0, rel=1e-12)
    assert plan["repair_cost"] == pytest.approx(3555.0, rel=1e-12)
    assert "mineral-wool 50 mm: 10.0 m" in plan["materials"]
    assert any("CUI inspection" in s for s in plan["sequence"])
    assert not any("asbestos" in s for s in plan["sequence"])


def test_sequence_puts_survey_before_removal_and_cui_before_reinstatement():
    order = {"tag": "QP-2", "findings": [{"check": "cui-window"}, {"check": "condensation"}],
             "quantities": VESSEL}
    plan = plan_order(order, [_part(VESSEL, 0.0375, 5.0, 1975, iced=True)], REPAIR, PLAN)
    steps = plan["sequence"]
    assert plan["asbestos_survey"] == "yes" and plan["caution"] == "survey first"
    assert [i for i, s in enumerate(steps) if "scaffold" in s] == [0]
    survey = next(i for i, s in enumerate(steps) if "asbestos survey" in s)
    deice = next(i for i, s in enumerate(steps) if "de-ice" in s)
    cui = next(i for i, s in enumerate(steps) if "CUI inspection" in s)
    assert survey < deice < cui < len(steps) - 1


def test_a_guard_alone_disturbs_no_insulation_and_needs_no_survey():
    order = {"tag": "QP-3", "findings": [{"check": "touch-temperature"}], "quantities": PIPE[2:]}
    plan = plan_order(order, [_part(PIPE[2:], 0.05, 1.0, 1970)], REPAIR, PLAN)
    assert plan["asbestos_survey"] == "no"


def test_access_height_just_inside_and_outside_the_limit():
    # at the limit no scaffold; a centimetre above, scaffold; no elevation: not assessed
    assert list(needs_scaffold([1.99, 2.0, 2.01, np.nan], 2.0)) == [False, False, True, None]


def test_asbestos_presumption_just_inside_and_outside_the_year():
    # installed the year before the presumption year: presumed; that year and later: not;
    # unknown year: presumed (its age is unknown)
    assert list(presumed_asbestos([1989, 1990, 1991, np.nan], 1990)) == [True, False, False, True]


def test_shipped_planning_rules_load_with_their_marks():
    plan = planning_rules(load_rules())
    assert plan.scaffold_above == pytest.approx(2.0)
    assert "common practice" in plan.access_source.lower()
    assert "from memory" in plan.asbestos_source.lower()
    assert "local law" in plan.caution.lower()
    assert "invented" in plan.labour_source.lower() and "invented" in plan.guard_source.lower()


def test_a_planning_rule_missing_a_key_names_file_and_key(tmp_path):
    (tmp_path / "plan.toml").write_text("[planning.access]\nscaffold_above = \"3 ft\"\n")
    with pytest.raises(RuleError) as caught:
        planning_rules(load_rules([tmp_path]))
    text = str(caught.value) + " ".join(str(p) for p in caught.value.problems)
    assert "plan.toml" in text and "source" in text


def test_a_later_access_table_replaces_the_shipped_one_in_its_units(tmp_path):
    (tmp_path / "plan.toml").write_text(
        "[planning.access]\nscaffold_above = \"10 ft\"\nsource = \"plant rule\"\n")
    assert planning_rules(load_rules([tmp_path])).scaffold_above == pytest.approx(3.048)  # 10 ft


def test_the_key_is_stable_and_changes_with_tag_or_findings():
    key = work_order_key("QP-1", ["cui-window", "touch-temperature"])
    assert key == work_order_key(" QP-1", ["touch-temperature", "cui-window", "cui-window"])
    assert key != work_order_key("QP-1", ["cui-window"])
    assert key != work_order_key("QP-11", ["cui-window", "touch-temperature"])


def test_workorders_csv_and_pack_carry_the_planning(tmp_path):
    """End to end: a hot bare line high up and installed in 1975 gets scaffold, a survey, the
    sequence and the cost split in workorders.csv and on its page of the pack."""
    import csv
    import subprocess
    import sys

    import pypdf

    register = tmp_path / "reg.csv"
    register.write_text("tag,nps,length,temp,layers,condition,accessible,elevation,install_year,area_code\n"
                        "HI-1,4,10,250,mineral-wool 50,missing,yes,6 m,1975,U1\n"
                        "LO-1,4,10,250,mineral-wool 50,missing,yes,2 m,1990,U1\n")
    out = tmp_path / "out"
    done = subprocess.run([sys.executable, "-m", "audit", "run", str(register), "--out", str(out),
                           "--format", "pdf"], capture_output=True, text=True)
    assert done.returncode == 0, done.stderr
    with open(out / "workorders.csv", newline="", encoding="utf-8-sig") as f:
        rows = {r["tag"]: r for r in csv.DictReader(f)}
    high, low = rows["HI-1"], rows["LO-1"]
    assert (high["scaffold"], high["asbestos_survey"]) == ("yes", "yes")
    assert (low["scaffold"], low["asbestos_survey"]) == ("no", "no")  # at the limits: neither
    for row in (high, low):
        total = float(row["materials_cost"]) + float(row["labour_cost"]) + float(row["scaffold_cost"])
        assert float(row["repair_cost"]) == pytest.approx(total, rel=1e-9)  # csv rounding only
        assert row["work_order_key"].startswith("WO-") and row["materials"]
    # the same items cost the same but for the scaffold: its hours at the rate, and its hire
    plan = planning_rules(load_rules())
    assert float(high["labour [h]"]) - float(low["labour [h]"]) == pytest.approx(plan.scaffold_hours)
    assert float(high["repair_cost"]) - float(low["repair_cost"]) == pytest.approx(
        plan.scaffold_hours * plan.rate + plan.scaffold_hire)
    assert "asbestos survey" in high["sequence"] and "asbestos" not in low["sequence"]
    text = " ".join(p.extract_text() for p in pypdf.PdfReader(out / "workorders" / "U1.pdf").pages)
    assert "Planning" in text and high["work_order_key"] in text and "local law" in text.lower()
