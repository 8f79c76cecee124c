"""Work-order planning: access and asbestos thresholds, hours and cost arithmetic, the one
repair cost shared by results, payback and work orders, and the key.

The hour and cost tables here are small hand-made tables (invented test data, not published
values); each expected total is worked by hand in the comment beside it.
"""

import math

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from audit.economics.rules import Repair
from audit.errors import RuleError
from audit.planning import (GUARD, INSULATE, NO_ELEVATION, NO_YEAR, UNKNOWN, HourTable,
                            PlanningRules, needs_scaffold, plan_order, planning_rules,
                            presumed_asbestos, quantity_costs, quantity_frame,
                            work_order_key)
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


def _q(work, quantity, unit, od=NPS4_OD, thickness_mm=np.nan, material=""):
    return {"work": work, "quantity": quantity, "unit": unit, "od_m": od, "size": "NPS 4",
            "thickness_mm": thickness_mm, "material": material}


def costs(rows, installed_m):
    """quantity_costs of rows given as lists of quantities, one list per row."""
    table = quantity_frame((r, q) for r, quantities in enumerate(rows) for q in quantities)
    return quantity_costs(table, len(rows), installed_m, REPAIR, PLAN)


PIPE = [_q(INSULATE, 10.0, "m", thickness_mm=50.0, material="mineral-wool"),
        _q("removable insulation cover, valve", 2, "pcs"),
        _q(GUARD + ", fittings", 3, "pcs")]
VESSEL = [_q("reinstate damaged share as installed", 12.0, "m²", od=2.0)]


def test_hours_installed_and_guard_cost_of_a_pipe_against_hand_totals():
    hours, installed, guard_hours, guards = costs([PIPE], [0.05])
    # hours: 10 m x 0.5 h/m + 2 covers x 1.5 h = 5 + 3 = 8 h; guards 3 x 0.5 h = 1.5 h
    assert hours[0] == pytest.approx(8.0, rel=1e-12)  # exact sums of table entries
    assert guard_hours[0] == pytest.approx(1.5, rel=1e-12)
    # installed rates (labour included, not added again): 10 m x 50 + 2 x 200 = 900
    assert installed[0] == pytest.approx(900.0, rel=1e-12)
    # guards are not in the installed tables: 3 x (80 material + 0.5 h x 50) = 3 x 105 = 315
    assert guards[0] == pytest.approx(315.0, rel=1e-12)


def test_reinstatement_is_priced_at_the_installed_thickness_interpolated():
    hours, installed, _, guards = costs([[], VESSEL], [0.0, 0.0375])
    # 37.5 mm is halfway between 25 and 50 mm: 0.5 h/m2 and 70 /m2; 12 m2 -> 6 h, 840
    assert hours[1] == pytest.approx(6.0, rel=1e-12)
    assert installed[1] == pytest.approx(840.0, rel=1e-12)
    assert (hours[0], installed[0], guards[0], guards[1]) == (0.0, 0.0, 0.0, 0.0)  # nothing to do


def test_outside_the_tables_has_no_cost_rather_than_the_nearest():
    hours, installed, _, _ = costs([VESSEL], [0.100])  # 100 mm beyond 50 mm
    assert math.isnan(hours[0]) and math.isnan(installed[0])


def _part(scaffold="no", asbestos="no", hours=0.0, installed=0.0, guard=0.0, note="", iced=False,
          alternative=np.nan):
    scaffold_cost = PLAN.scaffold_hire + PLAN.scaffold_hours * PLAN.rate if scaffold == "yes" else 0.0
    return {"scaffold": scaffold, "asbestos_survey": asbestos, "labour [h]": hours,
            "installed_cost": installed, "guard_cost": guard, "scaffold_cost": scaffold_cost,
            "repair_cost": installed + guard + scaffold_cost, "planning_note": note, "iced": iced,
            "guard_alternative_cost": alternative}


def test_an_order_is_the_sum_of_its_rows_against_hand_totals():
    order = {"tag": "QP-1", "findings": [{"check": "touch-temperature"}, {"check": "cui-window"}]}
    parts = [_part(hours=9.5, installed=900.0, guard=315.0),
             _part(scaffold="yes", hours=6.0 + 10, installed=840.0, alternative=100.0)]
    plan = plan_order(order, parts, PLAN)
    assert plan["scaffold"] == "yes" and plan["asbestos_survey"] == "no"
    # hours: 9.5 + 6 + 10 scaffold = 25.5 h
    assert plan["labour_h"] == pytest.approx(25.5, rel=1e-12)
    # scaffold: hire 300 + 10 h x 50 = 800; repair: installed 900 + 840, guards 315, + 800 = 2855
    assert plan["scaffold_cost"] == pytest.approx(800.0, rel=1e-12)
    assert plan["installed_cost"] == pytest.approx(1740.0, rel=1e-12)
    assert plan["repair_cost"] == pytest.approx(2855.0, rel=1e-12)
    assert plan["guard_alternative_cost"] == 100.0  # the one row's alternative, not in the total
    assert math.isnan(plan_order(order, [_part(installed=np.nan), _part(installed=5.0)],
                                 PLAN)["repair_cost"])  # a row outside the tables: no total
    assert any("CUI inspection" in s for s in plan["sequence"])
    assert not any("asbestos" in s for s in plan["sequence"])


def test_sequence_puts_survey_before_removal_and_cui_before_reinstatement():
    order = {"tag": "QP-2", "findings": [{"check": "cui-window"}, {"check": "condensation"}]}
    plan = plan_order(order, [_part(scaffold="yes", asbestos="yes", iced=True)], PLAN)
    steps = plan["sequence"]
    assert plan["asbestos_survey"] == "yes" and plan["caution"] == "survey first"
    assert [i for i, s in enumerate(steps) if "scaffold" in s] == [0]
    survey = next(i for i, s in enumerate(steps) if "asbestos survey" in s)
    deice = next(i for i, s in enumerate(steps) if "de-ice" in s)
    cui = next(i for i, s in enumerate(steps) if "CUI inspection" in s)
    assert survey < deice < cui < len(steps) - 1


def test_an_order_with_a_row_of_unknown_height_says_so():
    order = {"tag": "QP-3", "findings": [{"check": "touch-temperature"}]}
    plan = plan_order(order, [_part(), _part(scaffold=UNKNOWN, note=NO_ELEVATION)], PLAN)
    assert plan["scaffold"] == UNKNOWN and plan["notes"] == [NO_ELEVATION]
    assert "confirm access" in plan["sequence"][0]
    # a row that needs scaffolding outweighs one of unknown height
    assert plan_order(order, [_part(scaffold="yes"), _part(scaffold=UNKNOWN)], PLAN)["scaffold"] == "yes"


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


def test_one_repair_cost_in_results_payback_workorders_and_pack(tmp_path):
    """End to end: the same repair cost per item in results.csv (where the payback divides it)
    and workorders.csv; scaffold, survey and the unknowns worded in both and in the pack."""
    import csv
    import subprocess
    import sys

    import pypdf

    register = tmp_path / "reg.csv"
    register.write_text("tag,nps,length,temp,layers,condition,accessible,elevation,install_year,area_code\n"
                        "HI-1,4,10,250,mineral-wool 50,missing,yes,6 m,1975,U1\n"
                        "LO-1,4,10,250,mineral-wool 50,missing,yes,2 m,1990,U1\n"
                        "NA-1,4,10,250,mineral-wool 50,missing,yes,,,U1\n"
                        "CU-1,4,10,90,mineral-wool 50,intact,no,5,2010,U1\n")
    out = tmp_path / "out"
    done = subprocess.run([sys.executable, "-m", "audit", "run", str(register), "--out", str(out),
                           "--format", "csv,pdf"], capture_output=True, text=True)
    assert done.returncode == 0, done.stderr

    def rows_of(name):
        with open(out / name, newline="", encoding="utf-8-sig") as f:
            return {r["tag"]: r for r in csv.DictReader(f)}

    orders, results = rows_of("workorders.csv"), rows_of("results.csv")
    # priority: all three are "high"; then the shortest payback first (the scaffold makes HI-1's
    # longest), then the tag
    assert list(orders) == ["LO-1", "NA-1", "HI-1", "CU-1"]
    assert [o["priority"] for o in orders.values()] == ["high"] * 3 + ["low"]
    high, low, unknown = orders["HI-1"], orders["LO-1"], orders["NA-1"]
    assert (high["scaffold"], high["asbestos_survey"]) == ("yes", "yes")
    assert (low["scaffold"], low["asbestos_survey"]) == ("no", "no")  # at the limits: neither
    # no elevation: not an empty cell but "unknown", with the reason; no install year: the
    # insulation is presumed to contain asbestos, and the note says why
    assert (unknown["scaffold"], unknown["asbestos_survey"]) == (UNKNOWN, "yes")
    assert NO_ELEVATION in unknown["planning_note"] and NO_YEAR in unknown["planning_note"]
    assert "confirm access" in unknown["sequence"]
    for tag, order in orders.items():
        item = results[tag]
        for column in ("scaffold", "asbestos_survey", "labour [h]", "installed_cost",
                       "guard_cost", "scaffold_cost", "repair_cost", "guard_alternative_cost",
                       "planning_note"):
            assert item[column] == order[column], (tag, column)  # one number, written alike
        total = sum(float(order[c]) for c in ("installed_cost", "guard_cost", "scaffold_cost"))
        assert float(order["repair_cost"]) == pytest.approx(total, rel=1e-9)  # csv rounding only
        # the payback divides that same cost by the money saved a year
        if tag != "CU-1":
            assert float(item["payback [yr]"]) == pytest.approx(
                float(item["repair_cost"]) / float(item["annual_saving"]), rel=1e-5)  # csv digits
        assert order["work_order_key"].startswith("WO-")
        assert bool(order["materials"]) == (tag != "CU-1")  # an inspection buys nothing
    # the same items cost the same but for the scaffold: its hours at the rate, and its hire;
    # the insulators' hours are in the installed rates, so they add nothing to the cost
    plan = planning_rules(load_rules())
    assert float(high["labour [h]"]) - float(low["labour [h]"]) == pytest.approx(plan.scaffold_hours)
    assert float(high["repair_cost"]) - float(low["repair_cost"]) == pytest.approx(
        plan.scaffold_hours * plan.rate + plan.scaffold_hire)
    assert float(low["repair_cost"]) == pytest.approx(float(low["installed_cost"]))
    # the guard the touch check offers instead of insulation is priced but not added: 10 m of
    # guard at the shipped per-metre material cost and hours x rate (hand total of the rules)
    assert float(low["guard [m]"]) == 10.0 and float(low["guard_cost"]) == 0.0
    assert float(low["guard_alternative_cost"]) == pytest.approx(
        10 * (plan.guard_cost["m"] + plan.guard_hours["m"] * plan.rate))
    assert float(unknown["scaffold_cost"]) == 0.0
    # a CUI window alone: an inspection from a scaffold, costed, saving nothing, no payback
    cui, cui_item = orders["CU-1"], results["CU-1"]
    assert (cui["checks"], cui["scaffold"], cui["asbestos_survey"]) == ("cui-window", "yes", "no")
    assert float(cui["repair_cost"]) == pytest.approx(plan.scaffold_hire + plan.scaffold_hours * plan.rate)
    assert cui_item["payback [yr]"] == "" and "no payback: the planned work" in cui_item["economics_note"]
    assert "CUI inspection: its hours" in cui["planning_note"]
    assert "asbestos survey" in high["sequence"] and "asbestos" not in low["sequence"]
    text = " ".join(p.extract_text() for p in pypdf.PdfReader(out / "workorders" / "U1.pdf").pages)
    text = " ".join(text.split())
    assert "Planning" in text and high["work_order_key"] in text and "local law" in text.lower()
    assert "elevation not given" in text and "installed (material and insulators' labour)" in text


_QUANTITY = st.one_of(
    st.builds(lambda mm, length: _q(INSULATE, length, "m", thickness_mm=mm),
              st.floats(25.0, 50.0), st.floats(0.0, 500.0)),
    st.builds(lambda area: _q("reinstate damaged share as installed", area, "m²", od=2.0),
              st.floats(0.0, 500.0)),
    st.builds(lambda n: _q("removable insulation cover, flange", n, "pcs"), st.integers(0, 20)),
    st.builds(lambda n: _q(GUARD, n, "m"), st.floats(0.0, 100.0)))


@settings(max_examples=60, deadline=None)
@given(st.lists(st.lists(_QUANTITY, max_size=4), min_size=1, max_size=6))
def test_rows_are_priced_apart_and_in_proportion_to_their_quantities(rows):
    """Invariants: pricing many rows at once gives each row what it gets alone (the vectorised
    sums never mix rows), and doubling every quantity doubles every hour and cost."""
    installed = [0.0375] * len(rows)
    together = np.array(costs(rows, installed))
    alone = np.array([[x[0] for x in costs([r], [0.0375])] for r in rows]).T
    np.testing.assert_allclose(together, alone, rtol=1e-12, atol=1e-9)  # summation order only
    doubled = [[{**q, "quantity": 2 * q["quantity"]} for q in r] for r in rows]
    np.testing.assert_allclose(np.array(costs(doubled, installed)),
                               2 * together, rtol=1e-12, atol=1e-9)  # linear in the quantity
