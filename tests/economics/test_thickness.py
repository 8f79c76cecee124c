"""Economic thickness (audit/economics/thickness.py): the annuity factor against its closed
form and a compound-interest table, the choice against a closed-form optimum on a fine grid,
and the whole-register computation against a brute-force search item by item."""

import numpy as np
import pandas as pd
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from audit.checks.base import CheckContext
from audit.economics.energy import yearly
from audit.economics.rules import load_economic_rules
from audit.economics.thickness import annuity_factor, cheapest, economic_thickness, last_known
from audit.io.readers import read_register
from audit.rules import load_rules
from audit.thermal import resolve_names, thermal_states


def test_annuity_factor_textbook_value():
    # Capital recovery factor (A/P, 10 %, 10 years) = 0.16275, as printed (5 decimals) in the
    # compound-interest tables of engineering-economy texts (from memory).
    assert annuity_factor(0.10, 10) == pytest.approx(0.16275, abs=5e-6)


@settings(max_examples=60, deadline=None)
@given(st.floats(0.0, 0.5), st.integers(1, 60))
def test_annuity_repays_the_capital(interest, years):
    # Independent form: the present value of n yearly payments of a is 1 (sum of discounted
    # payments). Tolerance: round-off of the sum.
    a = annuity_factor(interest, years)
    present = sum(a / (1 + interest) ** k for k in range(1, years + 1))
    assert present == pytest.approx(1.0, rel=1e-9)


def test_annuity_closed_form_arrays_and_zero_interest():
    i = np.array([0.0, 0.05, 0.08])
    n = np.array([20.0, 20.0, 15.0])
    expected = np.where(i > 0, i * (1 + i) ** n / np.where(i > 0, (1 + i) ** n - 1, 1), 1 / n)
    np.testing.assert_allclose(annuity_factor(i, n), expected, rtol=1e-14)   # same formula
    np.testing.assert_allclose(annuity_factor(pd.Series(i), 20.0)[0], 0.05)  # 1/n at i = 0
    with pytest.raises(ValueError):
        annuity_factor(0.05, 0)


def test_cheapest_matches_the_closed_form_optimum_of_a_plane_wall():
    """A plane wall with constant k and surface coefficient h: yearly cost per m2
    C(t) = a (c0 + c1 t) + P dT / (t/k + 1/h), where P is the price of heat per W per year.
    Setting dC/dt = 0 gives t* = k (sqrt(P dT / (k a c1)) - 1/h) (derived here: the classic
    economic-thickness balance of the VDI 2055 cost sum). A 0.1 mm grid must pick t* to within
    one step."""
    k, h, dT = 0.045, 10.0, 180.0                 # W/(m K), W/(m2 K), K: typical hot surface
    price = 40.0 / 0.8 * 8000 / 1e6               # 40 per MWh of fuel, 80 %, 8000 h: per W.yr
    c0, c1 = 30.0, 900.0                          # per m2, per m2 and metre of thickness
    a = float(annuity_factor(0.08, 15))
    grid = np.arange(0.005, 0.400, 0.0001)
    heat = price * dT / (grid / k + 1 / h)
    chosen, total = cheapest(grid, heat[None, :], (c0 + c1 * grid)[None, :], a)
    optimum = k * (np.sqrt(price * dT / (k * a * c1)) - 1 / h)
    assert 0.05 < optimum < 0.35
    assert abs(chosen[0] - optimum) <= 1e-4
    assert total[0] == pytest.approx(a * (c0 + c1 * optimum) + price * dT / (optimum / k + 1 / h), rel=1e-6)


def test_cheapest_skips_unknown_candidates_and_rows():
    grid = np.array([0.01, 0.02, 0.03])
    heat = np.array([[5.0, 3.0, 1.0], [np.nan, np.nan, np.nan]])
    invest = np.array([[1.0, 2.0, np.nan], [1.0, 1.0, 1.0]])
    chosen, _ = cheapest(grid, heat, invest, 1.0)
    assert chosen[0] == 0.02 and np.isnan(chosen[1])


GRID_MM = list(range(10, 151, 5))
REGISTER = """tag,shape,nps,od,length,temp,layers,jacket,condition,service,hours,location
P1,pipe,4,,30,250,mineral-wool 50mm,aluminium-oxidised,intact,heat-conservation,8000,
P2,pipe,1,,12,120,mineral-wool 25mm,aluminium-oxidised,intact,heat-conservation,,
V1,vertical-vessel,,2000,6,180,mineral-wool 80mm,aluminium-oxidised,intact,heat-conservation,8760,
C1,pipe,6,,20,-30,elastomeric-foam 25mm,pvc,intact,cold,8000,indoor
A1,pipe,2,,20,AMB,mineral-wool 25mm,aluminium-oxidised,intact,,8000,
P3,pipe,4,,7,250,mineral-wool 50mm,aluminium-oxidised,intact,heat-conservation,8000,
V2,vertical-vessel,,2000,6,180,mineral-wool 80mm,aluminium-oxidised,intact,heat-conservation,2000,
"""
# P3 and V2 repeat P1 and V1 but for length and hours: solved once, scaled per item.


@pytest.fixture(scope="module")
def fine(tmp_path_factory):
    folder = tmp_path_factory.mktemp("rules")
    (folder / "grid.toml").write_text(f"[thicknesses]\nstandard = {GRID_MM}\nsource = \"test grid\"\n")
    rules = load_rules([folder])
    path = folder / "reg.csv"
    path.write_text(REGISTER, encoding="utf-8")
    table = resolve_names(read_register(path, aliases=rules.aliases), rules)
    assert (table["status"] == "ok").all(), list(table["reason"])
    return rules, table


def test_register_at_once_equals_brute_force_item_by_item(fine):
    rules, table = fine
    econ = load_economic_rules()
    site = "outdoor-annual-mean"
    hours = np.where(np.isfinite(table["hours_h"]), table["hours_h"], econ.hours)
    material = np.array(["mineral-wool"] * 3 + ["elastomeric-foam"] + ["mineral-wool"] * 3, dtype=object)
    got = economic_thickness(CheckContext(table, rules), econ, site=site, hours_h=hours, material=material)

    a = float(annuity_factor(econ.interest, econ.life))
    cols = np.array(econ.repair.thicknesses)
    # Size rows of the shipped cost table (sizes 1, 2, 4, 6, ...): NPS 4 -> 2, 1 -> 0, 6 -> 3.
    pipe_rows = {"P1": 2, "P2": 0, "C1": 3, "P3": 2}
    for i in (0, 1, 2, 3, 5, 6):                  # A1 (4) runs at ambient: no economic thickness
        best, best_cost = None, np.inf
        for t_mm in GRID_MM:
            one = table.iloc[[i]].reset_index(drop=True).copy()
            one["layer_materials"] = [(material[i],)]
            one["layer_thicknesses_m"] = [(t_mm / 1000,)]
            state = thermal_states(one, rules, site=site)
            heat_cost = yearly(state["heat_loss_W"].to_numpy(), hours[i], econ)["cost"][0]
            if table["shape"][i] == "pipe":
                per_m = np.interp(t_mm / 1000, cols, econ.repair.pipe_per_m[pipe_rows[table["tag"][i]]])
                invest = per_m * table["length_m"][i]
            else:
                invest = np.interp(t_mm / 1000, cols, econ.repair.surface_per_m2) * state["outer_area_m2"][0]
            total = a * invest + heat_cost
            if total < best_cost:
                best, best_cost = t_mm / 1000, total
        assert got[i] == pytest.approx(best, abs=1e-12), table["tag"][i]
    assert np.isnan(got[4])
    # The fine grid finds an interior optimum for some items, not only its ends.
    assert any(0.010 < g < 0.150 for g in got[:4])
    assert got[6] < got[2]                        # fewer hours, less heat to save


def test_last_known_is_the_thickest_costed_candidate():
    total = np.array([[3.0, 2.0, 1.0], [3.0, 1.0, np.nan], [np.nan, np.nan, np.nan]])
    assert list(last_known(total)) == [2, 1, -1]


def test_an_optimum_at_the_edge_of_the_costed_candidates_is_flagged(fine):
    # A cost table that stops at 50 mm (its columns end there) cuts the candidates short: an
    # item whose optimum lies beyond sits on the 50 mm edge and is flagged; one with an
    # interior optimum is not.
    from dataclasses import replace
    rules, table = fine
    econ = load_economic_rules()
    cols = list(econ.repair.thicknesses)
    keep = [k for k, t in enumerate(cols) if t <= 0.050 + 1e-12]
    short = replace(econ, repair=replace(
        econ.repair, thicknesses=tuple(cols[k] for k in keep),
        pipe_per_m=tuple(tuple(row[k] for k in keep) for row in econ.repair.pipe_per_m),
        surface_per_m2=tuple(econ.repair.surface_per_m2[k] for k in keep)))
    hours = np.where(np.isfinite(table["hours_h"]), table["hours_h"], econ.hours)
    material = np.array(["mineral-wool"] * 3 + ["elastomeric-foam"] + ["mineral-wool"] * 3, dtype=object)
    context = CheckContext(table, rules)
    full, full_edge = economic_thickness(context, econ, site="outdoor-annual-mean", hours_h=hours,
                                         material=material, edge=True)
    cut, cut_edge = economic_thickness(context, short, site="outdoor-annual-mean", hours_h=hours,
                                       material=material, edge=True)
    beyond = np.isfinite(full) & (full > 0.050)
    assert beyond.any()
    assert (cut[beyond] == pytest.approx(0.050)) and cut_edge[beyond].all()
    inside = np.isfinite(full) & (full < 0.050)
    assert not cut_edge[inside].any()
    assert list(full_edge) == list(np.isfinite(full) & (full >= 0.150 - 1e-12))
