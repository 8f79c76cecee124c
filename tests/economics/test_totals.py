"""Totals and ranking (audit/economics/totals.py) on a hand-made per-row table."""

import numpy as np
import pandas as pd
import pytest

from audit.economics.totals import SPLIT, SUMMED, by_area, by_check, plant, top_repairs


def per_row(n=25):
    rng = np.random.default_rng(7)
    frame = pd.DataFrame({c: rng.uniform(1, 100, n) for c in SUMMED if c not in SPLIT})
    frame["energy_bought"] = (["fuel", "electricity", "boil-off", "none", "fuel"] * n)[:n]
    frame["payback [yr]"] = rng.uniform(0.1, 30, n)
    frame["repair"] = "fit removable covers"
    frame.loc[3, ["annual_energy [MWh]", "payback [yr]"]] = np.nan     # a row without a result
    frame.loc[4, ["payback [yr]"]] = np.nan
    frame.loc[4, "repair"] = ""
    return frame


def table(n=25):
    return pd.DataFrame({"tag": [f"T{i}" for i in range(n)], "source": "x.csv::1",
                         "area_code": ["U1", "U2", ""] * 8 + ["U1"]})


def test_by_area_and_plant_sum_the_rows():
    rows, items = per_row(), table()
    got = by_area(rows, items["area_code"]).set_index("area_code")
    for area in ("U1", "U2", ""):
        mask = (items["area_code"] == area).to_numpy()
        assert got.loc[area, "annual_cost"] == pytest.approx(rows["annual_cost"][mask].sum())
        assert got.loc[area, "items"] == np.isfinite(rows["annual_energy [MWh]"][mask]).sum()
    total = plant(rows)
    assert total["annual_energy [MWh]"] == pytest.approx(np.nansum(rows["annual_energy [MWh]"]))
    assert total["items"] == 24 and total["items_to_repair"] == 24


def test_heat_lost_and_heat_gained_are_summed_apart_never_netted():
    rows, items = per_row(), table()
    lost = (rows["energy_bought"] == "fuel").to_numpy()
    total = plant(rows)
    for side, mask in (("heat_lost", lost), ("heat_gained", ~lost)):
        for what, column in (("energy", "annual_energy [MWh]"), ("cost", "annual_cost"),
                             ("co2", "annual_co2 [t]")):
            name = next(c for c in SPLIT if c.startswith(f"{what}_{side}"))
            assert total[name] == pytest.approx(np.nansum(rows[column][mask]))
    assert total["energy_heat_lost [MWh]"] + total["energy_heat_gained [MWh]"] == pytest.approx(
        total["annual_energy [MWh]"])  # magnitudes add; a gain never cancels a loss
    got = by_area(rows, items["area_code"]).set_index("area_code")
    mask = (items["area_code"] == "U1").to_numpy() & ~lost
    assert got.loc["U1", "cost_heat_gained"] == pytest.approx(rows["annual_cost"][mask].sum())


def test_by_check_counts_an_item_under_each_of_its_checks():
    rows = per_row()
    findings = pd.DataFrame({"row": [0, 0, 1, 0], "check": ["a", "b", "a", "a"]})
    got = by_check(rows, findings).set_index("check")
    assert got.loc["a", "repair_cost"] == pytest.approx(rows["repair_cost"][[0, 1]].sum())
    assert got.loc["b", "repair_cost"] == pytest.approx(rows["repair_cost"][0])
    assert by_check(rows, findings.iloc[:0]).empty


def test_top_repairs_are_the_twenty_shortest_paybacks():
    rows, items = per_row(), table()
    got = top_repairs(rows, items)
    assert len(got) == 20
    expected = rows["payback [yr]"].dropna().sort_values().head(20)
    assert got["row"].tolist() == expected.index.tolist()
    assert got["tag"].tolist() == [f"T{i}" for i in expected.index]


def test_equal_paybacks_rank_the_larger_saving_first():
    rows = per_row().iloc[:3].copy()
    rows["payback [yr]"] = 2.0
    rows["annual_saving"] = [10.0, 30.0, 20.0]
    assert top_repairs(rows, table().iloc[:3])["row"].tolist() == [1, 2, 0]
