"""Totals and ranking (audit/economics/totals.py) on a hand-made per-row table."""

import numpy as np
import pandas as pd
import pytest

from audit.economics.totals import SUMMED, by_area, by_check, plant, top_repairs


def per_row(n=25):
    rng = np.random.default_rng(7)
    frame = pd.DataFrame({c: rng.uniform(1, 100, n) for c in SUMMED})
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
