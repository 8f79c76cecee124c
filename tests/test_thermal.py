"""From the item table to engine states (audit/thermal.py): names, conditions, defaults."""

import numpy as np
import pytest
from support import item_table

from audit.engine import solve_item
from audit.thermal import thermal_states

C = 273.15


def table_from(tmp_path, text, rules):
    return item_table(tmp_path, text, rules)


def test_unknown_names_reject_the_row_with_a_reason(tmp_path, rules):
    t = table_from(tmp_path, "tag,nps,length,temp,insulation,thickness,jacket,location\n"
                             "A,4,10,200,unobtainium,50,aluminium-oxidised,indoor\n"
                             "B,4,10,200,mineral-wool,50,gold-leaf,indoor\n"
                             "C,4,10,200,mineral-wool,50,aluminium-oxidised,mars\n"
                             "D,4,10,200,mineral-wool,50,aluminium-oxidised,indoor\n", rules)
    assert list(t["status"]) == ["rejected", "rejected", "rejected", "ok"]
    assert '"unobtainium" is not in the rules' in t["reason"][0]
    assert '"gold-leaf"' in t["reason"][1]
    assert '"mars"' in t["reason"][2]


def test_states_match_the_engine_called_directly(tmp_path, rules):
    t = table_from(tmp_path, "tag,nps,length,temp,insulation,thickness,jacket,location\n"
                             "A,4,10,200,mineral-wool,50,aluminium-oxidised,indoor\n", rules)
    states = thermal_states(t, rules)
    wool = rules.materials["mineral-wool"]
    site = rules.sites["indoor"]
    direct = solve_item(temp=C + 200, ambient=site.ambient, od=0.1143, length=10.0,
                        layers=[(list(wool.k), 0.05)], wind=site.wind,
                        surroundings=site.surroundings if np.isfinite(site.surroundings) else None,
                        emissivity=rules.jackets["aluminium-oxidised"].emissivity)
    assert states["heat_loss_W"][0] == pytest.approx(direct.heat_loss, rel=1e-9)
    assert states["surface_temp_K"][0] == pytest.approx(direct.surface_temp, rel=1e-12)


def test_row_values_win_over_the_site_condition(tmp_path, rules):
    t = table_from(tmp_path, "tag,nps,length,temp,insulation,thickness,jacket,location,ambient,wind\n"
                             "A,4,10,200,mineral-wool,50,aluminium-oxidised,indoor,35,7\n", rules)
    states = thermal_states(t, rules, site="hot-still-day")
    assert states["air_temp_K"][0] == pytest.approx(C + 35)
    assert states["wind_m_s"][0] == 7.0


def test_scenario_site_replaces_the_location(tmp_path, rules):
    t = table_from(tmp_path, "tag,nps,length,temp,insulation,thickness,jacket,location\n"
                             "A,4,10,200,mineral-wool,50,aluminium-oxidised,indoor\n", rules)
    hot = rules.sites["hot-still-day"]
    states = thermal_states(t, rules, site="hot-still-day")
    assert states["air_temp_K"][0] == pytest.approx(hot.ambient)


def test_wet_insulation_uses_the_material_factor(tmp_path, rules):
    text = ("tag,nps,length,temp,insulation,thickness,jacket,location,condition\n"
            "A,4,10,200,mineral-wool,50,aluminium-oxidised,indoor,intact\n"
            "B,4,10,200,mineral-wool,50,aluminium-oxidised,indoor,wet\n")
    states = thermal_states(table_from(tmp_path, text, rules), rules)
    assert rules.materials["mineral-wool"].wet_factor > 1
    assert states["heat_loss_W"][1] > states["heat_loss_W"][0]


def test_defaults_are_never_silent(tmp_path, rules):
    t = table_from(tmp_path, "tag,nps,length,temp,insulation,thickness\nA,4,10,200,mineral-wool,50\n", rules)
    assert t["status"][0] == "ok"
    assert "jacket: empty" in t["warnings"][0] and "assumed" in t["warnings"][0]
    assert "location: empty" in t["warnings"][0]


def test_damaged_without_a_share_is_rejected(tmp_path, rules):
    t = table_from(tmp_path, "tag,nps,length,temp,insulation,thickness,condition\n"
                             "A,4,10,200,mineral-wool,50,damaged\n", rules)
    assert t["status"][0] == "rejected" and "damaged" in t["reason"][0]


def test_ambient_item_has_no_heat_flow(tmp_path, rules):
    t = table_from(tmp_path, "tag,nps,length,temp,insulation,thickness\nA,4,10,AMB,mineral-wool,50\n", rules)
    states = thermal_states(t, rules)
    assert states["heat_loss_W"][0] == 0.0
