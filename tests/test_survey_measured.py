"""Measured beats assumed: an item a field survey measured is audited at the condition its
readings show (audit.pipeline.measured_context, audit.survey.item_factors).

The references here are the audit itself run without the survey, and the engine's own round
trip (a reading the engine makes at a factor gives that factor back): what these tests hold is
that a reading changes the other checks and the money exactly as a change of the layers'
conductivity would, and in no other way.
"""

from dataclasses import replace

import numpy as np
import pandas as pd
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from audit.io.readers import read_rows
from audit.pipeline import audit_table
from audit.survey import item_factors, reconcile
from audit.thermal import conductivity_tables, prepare_items, resolve_names, site_batch
from support import readings

HEADER = ["tag", "shape", "nps", "length", "temp", "layers", "jacket", "location", "accessible"]


def table_of(rules, *rows):
    table = resolve_names(read_rows(HEADER, rows, name="reg.csv", aliases=rules.aliases), rules)
    assert (table["status"] == "ok").all(), table["reason"].tolist()
    return table


def with_margin(rules, margin):
    """The shipped rules with the survey-deviation margin set to ``margin`` [K]."""
    check = rules.checks["survey-deviation"]
    return replace(rules, checks={**rules.checks, "survey-deviation": replace(
        check, params={**check.params, "margin": margin})})


def predicted(rules, table, tag, air, wind, eps):
    """The surface temperature [degC] the engine predicts for ``tag`` as registered at the
    reading's conditions (a reading of it gives factor 1)."""
    got = reconcile(readings((tag, 30.0, air, wind, eps)), table, rules)
    return got.loc[0, "predicted_temp_K"] - 273.15


def pairs(findings):
    return sorted(zip(findings["tag"], findings["check"], findings["severity"]))


def test_factors_combine_as_the_readme_says():
    # Item 0: three readings; item 1: cooler than predicted only; item 2: no factor
    # (hotter than bare metal); a reading of an unknown tag counts for nothing.
    survey = pd.DataFrame({
        "status": ["matched", "matched", "matched", "matched", "matched", "unknown tag"],
        "item_row": [0, 0, 0, 1, 2, -1],
        "condition_factor": [2.0, 5.0, 0.5, 0.7, np.nan, 9.0]})
    local, whole = item_factors(survey, pd.RangeIndex(4))
    # Spot checks: the largest factor; a cooler reading never relaxes them.
    np.testing.assert_array_equal(local, [5.0, np.nan, np.nan, np.nan])
    # The whole item: the mean of its readings' factors.
    np.testing.assert_allclose(whole, [2.5, 0.7, np.nan, np.nan])


@settings(max_examples=15, deadline=None)
@given(temp=st.floats(120, 400), nps=st.sampled_from(["2", "4", "8"]),
       thickness=st.sampled_from([25, 40, 50, 80]), accessible=st.booleans(),
       air=st.floats(0, 30), wind=st.floats(0.5, 6))
def test_an_item_surveyed_at_factor_one_audits_as_unsurveyed(rules, temp, nps, thickness,
                                                               accessible, air, wind):
    # Margin 0, so that the reading is taken as the item's condition (a reading within the
    # margin leaves the item as registered anyway); a reading 1 mK above the prediction
    # gives a factor within about 1e-4 of 1.
    rules = with_margin(rules, 0)
    table = table_of(rules, ["P-1", "pipe", nps, "20", f"{temp}", f"mineral-wool {thickness}mm",
                             "aluminium-oxidised", "outdoor", "yes" if accessible else "no"])
    plain = audit_table(table, rules)
    reading = predicted(rules, table, "P-1", air, wind, 0.9) + 0.001
    surveyed = audit_table(table, rules, readings=readings(("P-1", reading, air, wind, 0.9)))
    assert surveyed.results.loc[0, "basis"] == "measured"
    assert surveyed.results.loc[0, "condition_factor [-]"] == pytest.approx(1.0, abs=1e-3)
    others = surveyed.findings[surveyed.findings["check"] != "survey-deviation"]
    assert pairs(others) == pairs(plain.findings)
    # rel 1e-3: the factor is 1 within about 1e-4, and a value moves less than its factor.
    np.testing.assert_allclose(others["value"].to_numpy(float),
                               plain.findings["value"].to_numpy(float), rtol=1e-3)
    for column in ("surface_temp [degC]", "heat_loss [W]", "annual_energy [MWh]",
                   "surface_temp@hot-still-day [degC]"):
        assert surveyed.results.loc[0, column] == pytest.approx(plain.results.loc[0, column],
                                                                rel=1e-3), column


@settings(max_examples=15, deadline=None)
@given(temp=st.floats(150, 400), nps=st.sampled_from(["2", "4", "8"]),
       thickness=st.sampled_from([40, 50, 80]), air=st.floats(0, 30), wind=st.floats(0.5, 6),
       hotter=st.floats(8, 40))
def test_a_degraded_item_loses_more_and_runs_hotter(rules, temp, nps, thickness, air, wind,
                                                      hotter):
    table = table_of(rules, ["P-1", "pipe", nps, "20", f"{temp}", f"mineral-wool {thickness}mm",
                             "aluminium-oxidised", "outdoor", "yes"])
    plain = audit_table(table, rules)
    reading = predicted(rules, table, "P-1", air, wind, 0.9) + hotter
    surveyed = audit_table(table, rules, readings=readings(("P-1", reading, air, wind, 0.9)))
    got, was = surveyed.results.loc[0], plain.results.loc[0]
    assert got["condition_factor [-]"] > 1 and got["basis"] == "measured"
    for column in ("surface_temp [degC]", "surface_temp@hot-still-day [degC]", "heat_loss [W]",
                   "annual_energy [MWh]", "annual_cost"):
        assert got[column] > was[column], column
    assert got["missed_energy [MWh]"] == pytest.approx(
        got["annual_energy [MWh]"] - was["annual_energy [MWh]"], rel=1e-9)
    measured = surveyed.findings[surveyed.findings["basis"] == "measured"]
    assert "survey-deviation" in set(measured["check"])


def test_the_repair_of_a_degraded_item_saves_what_the_survey_found(rules):
    # 100 mm: at or above the shipped specification, so nothing is repaired as registered.
    table = table_of(rules, ["P-1", "pipe", "4", "20", "250", "mineral-wool 100mm",
                             "aluminium-oxidised", "outdoor", "no"])
    plain = audit_table(table, rules)
    assert plain.results.loc[0, "repair"] == ""
    reading = predicted(rules, table, "P-1", 15.0, 2.0, 0.9) + 15.0
    got = audit_table(table, rules, readings=readings(("P-1", reading, 15.0, 2.0, 0.9)))
    row = got.results.loc[0]
    assert row["repair"] == "restore insulation as installed"
    # Restored as registered, the item buys what the unsurveyed audit says it buys.
    assert row["saving_if_repaired [MWh]"] == pytest.approx(
        row["annual_fuel [MWh]"] - plain.results.loc[0, "annual_fuel [MWh]"], rel=1e-9)


def test_a_cold_item_read_colder_gains_more_heat(rules):
    table = table_of(rules, ["C-1", "pipe", "4", "20", "-30", "elastomeric-foam 25mm",
                             "pvc", "outdoor", "no"])
    plain = audit_table(table, rules)
    reading = predicted(rules, table, "C-1", 20.0, 1.0, 0.9) - 8.0
    surveyed = audit_table(table, rules, readings=readings(("C-1", reading, 20.0, 1.0, 0.9)))
    got, was = surveyed.results.loc[0], plain.results.loc[0]
    assert got["condition_factor [-]"] > 1
    assert got["heat_loss [W]"] < was["heat_loss [W]"] < 0      # a larger gain
    assert got["surface_temp [degC]"] < was["surface_temp [degC]"]
    assert got["annual_energy [MWh]"] > was["annual_energy [MWh]"]


def test_spot_checks_read_the_hottest_reading_and_the_money_the_mean(rules):
    table = table_of(rules, ["P-1", "pipe", "4", "20", "250", "mineral-wool 50mm",
                             "aluminium-oxidised", "outdoor", "yes"])
    base = predicted(rules, table, "P-1", 15.0, 2.0, 0.9)
    hot, mild = ("P-1", base + 25.0, 15.0, 2.0, 0.9), ("P-1", base + 8.0, 15.0, 2.0, 0.9)
    both = audit_table(table, rules, readings=readings(hot, mild)).results.loc[0]
    hot_only = audit_table(table, rules, readings=readings(hot)).results.loc[0]
    mild_only = audit_table(table, rules, readings=readings(mild)).results.loc[0]
    # The burn check's case follows the hottest reading, whatever else was read.
    assert both["surface_temp@hot-still-day [degC]"] == pytest.approx(
        hot_only["surface_temp@hot-still-day [degC]"], rel=1e-9)
    # The energy follows the mean factor: between the two readings' own.
    assert mild_only["annual_energy [MWh]"] < both["annual_energy [MWh]"] \
        < hot_only["annual_energy [MWh]"]


def test_a_reading_within_the_margin_leaves_the_item_as_registered(rules):
    table = table_of(rules, ["P-1", "pipe", "4", "20", "250", "mineral-wool 50mm",
                             "aluminium-oxidised", "outdoor", "yes"])
    plain = audit_table(table, rules)
    # 3 K above the prediction, inside the shipped 5 K margin (rules/checks-survey.toml).
    reading = predicted(rules, table, "P-1", 15.0, 2.0, 0.9) + 3.0
    surveyed = audit_table(table, rules, readings=readings(("P-1", reading, 15.0, 2.0, 0.9)))
    assert surveyed.results.loc[0, "condition_factor [-]"] > 1
    assert surveyed.results.loc[0, "basis"] == "register"
    assert surveyed.results.loc[0, "annual_energy [MWh]"] == plain.results.loc[0,
                                                                           "annual_energy [MWh]"]
    assert (surveyed.findings["basis"] == "register").all()


def test_a_survey_finding_shows_the_reading_conditions(rules):
    table = table_of(rules, ["P-1", "pipe", "4", "20", "250", "mineral-wool 50mm",
                             "aluminium-oxidised", "outdoor", "yes"])
    reading = predicted(rules, table, "P-1", 7.0, 4.5, 0.9) + 20.0
    found = audit_table(table, rules, readings=readings(("P-1", reading, 7.0, 4.5, 0.9))).findings
    row = found[found["check"] == "survey-deviation"].iloc[0]
    assert row["conditions_from"] == "reading"
    assert row["air_temp [degC]"] == pytest.approx(7.0)
    assert row["wind [m/s]"] == pytest.approx(4.5)
    assert row["rh [%]"] == pytest.approx(50.0)


def test_a_reading_without_conditions_of_its_own_says_whose_stood_in(rules):
    # A reading that recorded no air, wind or humidity is judged at the item's own conditions,
    # and its finding says whose they were (the item's site), not "reading".
    table = table_of(rules, ["P-1", "pipe", "4", "20", "250", "mineral-wool 50mm",
                             "aluminium-oxidised", "outdoor", "yes"])
    given = readings(("P-1", 0.0, np.nan, np.nan, 0.9)).assign(rh_pct=np.nan)
    plain = reconcile(given.assign(surface_temp_K=300.0), table, rules)
    hot_reading = plain.loc[0, "predicted_temp_K"] + 20.0
    found = audit_table(table, rules, readings=given.assign(surface_temp_K=hot_reading)).findings
    row = found[found["check"] == "survey-deviation"].iloc[0]
    _, own = site_batch(prepare_items(table, rules, conductivity_tables(rules)[1]), rules, None)
    assert row["conditions_from"] == own["conditions_from"][0] != "reading"
    assert row["air_temp [degC]"] == pytest.approx(own["air_temp_K"][0] - 273.15)


def test_the_outlet_temperature_follows_the_mean_condition_not_the_worst_spot(rules):
    # The drop along a run sums the loss of every metre, so a line read at a hot spot and a
    # mild one is judged at the mean of their factors: its outlet lies between the outlets
    # each reading alone would give (and is not the hot spot's, as a spot check would be).
    header = HEADER + ["fluid", "flow"]
    table = resolve_names(read_rows(header, [[
        "F-1", "pipe", "6", "600", "80", "mineral-wool 40mm", "aluminium-oxidised", "outdoor",
        "yes", "water", "5"]], name="reg.csv", aliases=rules.aliases), rules)
    assert (table["status"] == "ok").all(), table["reason"].tolist()
    base = predicted(rules, table, "F-1", 10.0, 3.0, 0.9)
    hot, mild = ("F-1", base + 12.0, 10.0, 3.0, 0.9), ("F-1", base + 4.0, 10.0, 3.0, 0.9)
    rules = with_margin(rules, 0)
    outlet = {name: audit_table(table, rules, readings=readings(*given)).results.loc[
        0, "outlet_temp [degC]"] for name, given in (
        ("both", (hot, mild)), ("hot", (hot,)), ("mild", (mild,)))}
    plain = audit_table(table, rules).results.loc[0, "outlet_temp [degC]"]
    assert outlet["hot"] < outlet["both"] < outlet["mild"] < plain
