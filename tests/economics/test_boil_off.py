"""Boil-off and who pays for heat gain (audit/economics/energy.py, the fluid's heat_gain)."""

import numpy as np
import pytest

from audit.economics.energy import boil_off_kg_h
from audit.pipeline import audit_register

CoolProp = pytest.importorskip("CoolProp.CoolProp")  # test-only oracle

REGISTER = """tag,nps,length,temp,layers,jacket,fluid,area_code,hours
LNG-1,4,10,-162,polyisocyanurate 100,aluminium-oxidised,lng,U9,8000
LIN-1,2,5,-196,polyisocyanurate 75,aluminium-oxidised,liquid-nitrogen,U9,8000
NG-1,4,10,5,none,,natural-gas,U9,8000
CW-1,4,10,5,elastomeric-foam 25,aluminium-oxidised,water,U1,8000
ST-1,4,10,180,mineral-wool 50,aluminium-oxidised,steam,U1,8000
"""


@pytest.fixture(scope="module")
def audited(tmp_path_factory):
    path = tmp_path_factory.mktemp("boil") / "cold.csv"
    path.write_text(REGISTER, encoding="utf-8")
    audit = audit_register([path])
    assert (audit.results["status"] == "audited").all(), audit.results["reason"].tolist()
    return audit


def latent_heat(coolprop_name):
    """Latent heat of vaporisation at 1 atm from CoolProp [J/kg]."""
    return (CoolProp.PropsSI("H", "P", 101325.0, "Q", 1, coolprop_name)
            - CoolProp.PropsSI("H", "P", 101325.0, "Q", 0, coolprop_name))


@pytest.mark.parametrize("tag, coolprop", [("LNG-1", "Methane"), ("LIN-1", "Nitrogen")])
def test_boil_off_is_the_heat_gained_over_coolprops_latent_heat(audited, tag, coolprop):
    row = audited.results.set_index("tag").loc[tag]
    expected = -row["heat_loss [W]"] / latent_heat(coolprop) * 3600.0
    assert expected > 0
    # The rule file quotes the latent heat to 4 significant figures: 5e-4 relative.
    assert row["boil_off [kg/h]"] == pytest.approx(expected, rel=5e-4)


def test_boil_off_is_costed_at_the_products_price_and_co2(audited, rules):
    row = audited.results.set_index("tag").loc["LNG-1"]
    lng = rules.fluids["lng"]
    assert row["energy_bought"] == "boil-off" and row["annual_fuel [MWh]"] == 0
    assert row["annual_cost"] == pytest.approx(row["annual_boil_off [t]"] * 1000 * lng.price)
    assert row["annual_co2 [t]"] == pytest.approx(row["annual_boil_off [t]"] * lng.co2)


def test_a_gas_warmed_downstream_costs_nothing_and_chilled_water_buys_electricity(audited):
    rows = audited.results.set_index("tag")
    assert rows.loc["NG-1", "heat_loss [W]"] < 0 and rows.loc["NG-1", "energy_bought"] == "none"
    assert rows.loc["NG-1", "annual_cost"] == 0 and rows.loc["NG-1", "annual_co2 [t]"] == 0
    assert rows.loc["CW-1", "energy_bought"] == "electricity" and rows.loc["CW-1", "annual_cost"] > 0
    assert np.isnan(rows.loc["CW-1", "boil_off [kg/h]"])  # water is not a boiling liquid


def test_the_plant_totals_keep_heat_lost_and_gained_apart(audited):
    plant, rows = audited.economics.plant, audited.results
    lost = rows["energy_bought"] == "fuel"
    assert plant["energy_heat_lost [MWh]"] == pytest.approx(rows.loc[lost, "annual_energy [MWh]"].sum())
    assert plant["cost_heat_gained"] == pytest.approx(rows.loc[~lost, "annual_cost"].sum())
    assert plant["boil_off [kg/h]"] == pytest.approx(np.nansum(rows["boil_off [kg/h]"]))
    by_area = audited.economics.by_area.set_index("area_code")
    assert by_area.loc["U9", "energy_heat_lost [MWh]"] == 0
    assert by_area.loc["U1", "energy_heat_lost [MWh]"] > 0


def test_boil_off_is_zero_for_a_heat_loss_and_empty_without_a_latent_heat():
    got = boil_off_kg_h(np.array([-3600.0, 50.0, -10.0]), np.array([1e6, 1e6, np.nan]))
    assert got[0] == pytest.approx(3.6 * 3.6) and got[1] == 0 and np.isnan(got[2])
