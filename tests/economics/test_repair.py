"""Repairs (audit/economics/repair.py): cost tables worked by hand, what a repair is, payback."""

import numpy as np
import pytest

from audit.checks.repairs import plan_repairs
from audit.economics.repair import cover_cost, insulation_cost, payback_years
from audit.economics.rules import load_economic_rules
from audit.io.readers import read_register
from audit.rules import load_rules
from audit.thermal import prepare_items, resolve_names, thermal_states

# The shipped table (rules/economics/economics.toml, INVENTED demo values) is the input here;
# the expected values are worked by hand from its rows, so the test checks the lookup and
# the interpolation, not the prices.
REPAIR = load_economic_rules().repair


def test_pipe_cost_interpolates_between_thickness_columns():
    # NPS 4 row: [28, 34, 45, 60, 77, 115] at [10, 25, 50, 75, 100, 150] mm. At 60 mm:
    # 45 + (60 - 50) / 25 * (60 - 45) = 51 per metre; 10 m -> 510.
    got = insulation_cost(REPAIR, np.array(["pipe"]), [0.1143], [10.0], [np.nan], 0.060)
    assert got[0] == pytest.approx(510.0, rel=1e-12)   # round-off only


def test_pipe_between_size_rows_takes_the_next_larger():
    # NPS 3 (88.9 mm) belongs to the NPS 4 row; at a listed column (50 mm): 45 per metre.
    got = insulation_cost(REPAIR, np.array(["pipe"]), [0.0889], [2.0], [np.nan], 0.050)
    assert got[0] == pytest.approx(90.0, rel=1e-12)


def test_vessels_and_large_pipes_cost_per_square_metre():
    # 20 m2 at 75 mm: 88 per m2 -> 1760. A pipe beyond NPS 48 (1.6 m), 10 m at 50 mm: 70 per m2
    # of the insulation's outer surface, pi (1.6 + 0.1) 10 m2.
    got = insulation_cost(REPAIR, np.array(["vertical-vessel", "pipe"]), [2.0, 1.6], [5.0, 10.0],
                          [20.0, np.nan], np.array([0.075, 0.050]))
    np.testing.assert_allclose(got, [1760.0, 70.0 * np.pi * 1.7 * 10.0], rtol=1e-12)


def test_thickness_outside_the_table_has_no_cost():
    got = insulation_cost(REPAIR, np.array(["pipe", "pipe"]), [0.1143, 0.1143], [1.0, 1.0],
                          [np.nan, np.nan], np.array([0.005, 0.200]))
    assert np.isnan(got).all()


def test_fitting_covers():
    # NPS 4 row: 290 per cover; beyond the last size (NPS 48): no cost; no fitting: 0.
    got = cover_cost(REPAIR, [0.1143, 1.6, 0.1143], [3, 1, 0])
    assert got[0] == pytest.approx(870.0) and np.isnan(got[1]) and got[2] == 0.0


def test_payback():
    got = payback_years([1000.0, 1000.0, 0.0, 500.0], [250.0, 0.0, 10.0, -5.0], [True, True, False, True])
    assert got[0] == pytest.approx(4.0)
    assert np.isnan(got[1:]).all()   # saves nothing; nothing to repair; costs money


REGISTER = """tag,nps,length,temp,layers,jacket,condition,damaged,service,valves,flanges
AT-SPEC,4,10,250,mineral-wool 80mm,aluminium-oxidised,intact,,heat-conservation,0,0
DAMAGED,4,10,250,mineral-wool 80mm,aluminium-oxidised,damaged,20,heat-conservation,0,0
WET,4,10,250,mineral-wool 100mm,aluminium-oxidised,wet,,heat-conservation,0,0
THIN,4,10,250,mineral-wool 25mm,aluminium-oxidised,intact,,heat-conservation,0,0
MISSING,4,10,250,none,,missing,,heat-conservation,0,0
NO-SPEC,4,10,250,none,,intact,,frost,0,0
FITTINGS,4,10,250,mineral-wool 80mm,aluminium-oxidised,intact,,heat-conservation,2,1
"""


@pytest.fixture(scope="module")
def planned(tmp_path_factory):
    rules = load_rules()
    path = tmp_path_factory.mktemp("reg") / "reg.csv"
    path.write_text(REGISTER, encoding="utf-8")
    table = resolve_names(read_register(path, aliases=rules.aliases), rules)
    assert (table["status"] == "ok").all(), list(table["reason"])
    return rules, table, plan_repairs(table, rules, thermal_states(table, rules))


def test_what_each_row_repairs(planned):
    # Demo specification (rules/spec-demo.toml, invented): heat-conservation, NPS 4 (in the
    # "up to NPS 6" row), 200-300 degC band: 65 mm of mineral-wool, tolerance 3 mm.
    _, table, plan = planned
    by_tag = dict(zip(table["tag"], range(len(table))))
    assert plan.needed.tolist() == [False, True, True, True, True, False, True]
    assert plan.share[by_tag["DAMAGED"]] == pytest.approx(0.20)
    assert plan.share[by_tag["WET"]] == 1.0 and not plan.to_spec[by_tag["WET"]]
    assert plan.thickness_m[by_tag["WET"]] == pytest.approx(0.100)     # restored as installed
    for tag in ("THIN", "MISSING"):
        assert plan.to_spec[by_tag[tag]] and plan.thickness_m[by_tag[tag]] == pytest.approx(0.065)
    assert plan.covers[by_tag["FITTINGS"]] == 3 and not plan.insulate[by_tag["FITTINGS"]]
    assert list(plan.scope()[[by_tag["AT-SPEC"], by_tag["THIN"], by_tag["FITTINGS"]]]) == [
        "", "insulate to specification", "fit removable covers"]


def test_repaired_items_and_their_table(planned):
    rules, table, plan = planned
    repaired = prepare_items(table, rules).repaired(plan.insulate, plan.to_spec, plan.spec_material,
                                                    plan.thickness_m, plan.covers > 0)
    copy = repaired.table()
    assert copy["status"].tolist() == ["rejected", "ok", "ok", "ok", "ok", "rejected", "ok"]
    assert copy["layer_materials"][4] == ("mineral-wool",)
    assert copy["layer_thicknesses_m"][3] == pytest.approx((0.065,))
    assert copy["layer_thicknesses_m"][2] == (0.1,)
    assert (copy["condition"][1:5] == "intact").all()
    assert copy["valves"][6] == 0 and copy["flanges"][6] == 0
    assert table["valves"][6] == 2                          # the original is untouched
