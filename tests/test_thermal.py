"""From the item table to engine states (audit/thermal.py): names, conditions, defaults."""

import numpy as np
import pandas as pd
import pytest
from support import item_table

from audit.engine import solve_item
from audit.rules import load_rules
from audit.thermal import site_batch, thermal_states

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
    # A location without a case of its own takes the plant-wide case; one with its own
    # (the shipped indoor gives a hot still day of its own) takes that.
    t = table_from(tmp_path, "tag,nps,length,temp,insulation,thickness,jacket,location\n"
                             "A,4,10,200,mineral-wool,50,aluminium-oxidised,outdoor\n"
                             "B,4,10,200,mineral-wool,50,aluminium-oxidised,indoor\n", rules)
    hot, indoor_hot = rules.sites["hot-still-day"], rules.sites["indoor"].design["hot-still-day"]
    states = thermal_states(t, rules, site="hot-still-day")
    assert states["air_temp_K"].tolist() == pytest.approx([hot.ambient, indoor_hot.ambient])
    assert list(states["conditions_from"]) == ["plant", "indoor"]


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


def _insulated_copy(table, rows, material, thickness):
    """Independent oracle: rows ``rows`` of ``table`` re-insulated by editing the table."""
    trial = table.iloc[rows].reset_index(drop=True)
    trial["layer_materials"] = [(m,) for m in material]
    trial["layer_thicknesses_m"] = [(float(x),) for x in thickness]
    trial["condition"] = "intact"
    trial["damaged_pct"] = np.nan
    trial["valves"] = 0
    trial["flanges"] = 0
    return trial


def _repaired_copy(table, insulate, to_spec, material, thickness, covers):
    """Independent oracle: ``table`` repaired by editing the table; the rest rejected."""
    out = table.copy()
    out["layer_materials"] = [(m,) if s else x for s, m, x in zip(to_spec, material, out["layer_materials"])]
    out["layer_thicknesses_m"] = [(float(t),) if s else x
                                  for s, t, x in zip(to_spec, thickness, out["layer_thicknesses_m"])]
    out.loc[insulate, "condition"] = "intact"
    out.loc[insulate, "damaged_pct"] = np.nan
    out.loc[covers, ["valves", "flanges"]] = 0
    out.loc[~(insulate | covers), "status"] = "rejected"
    return out


def _same_engine_inputs(got, want, rules):
    for site in (None, "hot-still-day"):
        got_batch, got_conditions = site_batch(got, rules, site)
        want_batch, want_conditions = site_batch(want, rules, site)
        for name, value in vars(want_batch).items():
            np.testing.assert_array_equal(getattr(got_batch, name), value, err_msg=name)
        for name, value in want_conditions.items():
            np.testing.assert_array_equal(got_conditions[name], value, err_msg=name)


TRIAL_REGISTER = ("tag,nps,length,temp,insulation,thickness,jacket,location,condition,"
                  "damaged,valves,emissivity,ambient\n"
                  "A,4,10,200,mineral-wool,50,aluminium-oxidised,indoor,wet,,,,\n"
                  "B,2,5,-20,cellular-glass,40,stainless-steel,,damaged,30,2,,\n"
                  "C,8,3,350,unobtainium,50,aluminium-oxidised,indoor,,,,,\n"
                  "D,6,7,150,,,,outdoor-annual-mean,missing,,1,0.8,25\n"
                  "E,3,4,180,mineral-wool,2x30,aluminium-oxidised,,missing,,,,\n"
                  "F,4,6,120,mineral-wool,25,aluminium-oxidised,indoor,wet,,3,,\n")


def test_reinsulated_trials_equal_a_fresh_look_up_of_the_reinsulated_copy(tmp_path, rules):
    # The remedy and economic-thickness searches derive their trial items from the audit's
    # prepared rows instead of reading a re-insulated table copy again; the trial's own table
    # must read back to the same engine inputs, and so must a copy edited by hand.
    from audit.thermal import conductivity_tables, prepare_items

    t = table_from(tmp_path, TRIAL_REGISTER, rules)
    assert list(t["status"]) == ["ok", "ok", "rejected", "ok", "ok", "ok"]
    tables = conductivity_tables(rules)
    rows = np.array([3, 0, 1])
    materials = np.array(["calcium-silicate", "mineral-wool", "cellular-glass"], dtype=object)
    thickness = np.array([0.08, 0.025, 0.1])
    derived = prepare_items(t, rules, tables[1]).take(rows).reinsulated(materials, thickness)
    by_index = prepare_items(t, rules, tables[1]).take(rows).reinsulated(
        np.array([tables[1][m] for m in materials]), thickness)
    np.testing.assert_array_equal(by_index.fixed["layer_table"], derived.fixed["layer_table"])
    copy = _insulated_copy(t, rows, materials, thickness)
    own = derived.table()
    assert list(own["tag"]) == ["D", "A", "B"]
    assert list(own["layer_materials"]) == [(m,) for m in materials]
    assert list(own["condition"]) == ["intact"] * 3 and list(own["valves"]) == [0, 0, 0]
    assert not any(str(c).startswith("raw:") for c in own.columns)
    for table in (copy, own):
        _same_engine_inputs(derived, prepare_items(table, rules, tables[1]), rules)
    a = thermal_states(copy, rules, tables=tables, prepared=derived)
    b = thermal_states(copy, rules, tables=tables)
    pd.testing.assert_frame_equal(a, b)
    # Only the specification's layer replaces the insulation; fittings stay uninsulated.
    kept = prepare_items(t, rules, tables[1]).take(rows).reinsulated(materials, thickness,
                                                                     cover_fittings=False)
    assert list(kept.table()["valves"]) == list(t["valves"][rows])
    _same_engine_inputs(kept, prepare_items(kept.table(), rules, tables[1]), rules)


def test_repaired_trials_equal_a_fresh_look_up_of_the_repaired_copy(tmp_path, rules):
    # Economics solves the repaired register from the prepared rows: to the specification
    # (A, D), restored as listed (E: missing, two layers), fittings covered only (F: still wet),
    # nothing to repair (B: drops out), rejected (C: stays out).
    from audit.thermal import conductivity_tables, prepare_items

    t = table_from(tmp_path, TRIAL_REGISTER, rules)
    # The readers list no layers where the insulation is missing; a table may (its layers
    # are what a repair restores).
    t.at[4, "layer_materials"] = ("mineral-wool", "mineral-wool")
    t.at[4, "layer_thicknesses_m"] = (0.03, 0.03)
    tables = conductivity_tables(rules)
    insulate = np.array([True, False, False, True, True, False])
    to_spec = np.array([True, False, False, True, False, False])
    material = np.array(["mineral-wool", "", "", "calcium-silicate", "", ""], dtype=object)
    thickness = np.array([0.065, np.nan, np.nan, 0.05, np.nan, np.nan])
    covers = np.array([False, False, False, True, False, True])
    repaired = prepare_items(t, rules, tables[1]).repaired(insulate, to_spec, material, thickness,
                                                           covers)
    assert list(repaired.accepted) == [True, False, False, True, True, True]
    copy = _repaired_copy(t, insulate, to_spec, material, thickness, covers)
    assert list(repaired.table()["status"]) == list(copy["status"])
    assert repaired.table()["layer_materials"][4] == ("mineral-wool", "mineral-wool")
    assert repaired.table()["condition"][5] == "wet"
    for table in (copy, repaired.table()):
        _same_engine_inputs(repaired, prepare_items(table, rules, tables[1]), rules)
    a = thermal_states(copy, rules, tables=tables, prepared=repaired)
    b = thermal_states(copy, rules, tables=tables)
    pd.testing.assert_frame_equal(a, b)
    assert a["computed"].tolist() == [True, False, False, True, True, True]
    with pytest.raises(ValueError, match="only accepted rows"):
        prepare_items(t, rules, tables[1]).take(np.array([2]))


def test_surroundings_column_sets_what_the_item_radiates_to(tmp_path, rules):
    # A bare NPS 4 line at 150 C, indoors (air 20 C): its surroundings given on the row, colder
    # and warmer than the air, change the radiation by eps sigma (Ts^4 - Tsur^4) and nothing
    # else (the engine called directly, with the same surroundings, is the reference).
    t = table_from(tmp_path, "tag,nps,length,temp,insulation,material,location,surroundings\n"
                             "COLD,4,10,150,none,carbon-steel,indoor,-10\n"
                             "WARM,4,10,150,none,carbon-steel,indoor,50 degC\n"
                             "SITE,4,10,150,none,carbon-steel,indoor,\n", rules)
    states = thermal_states(t, rules)
    site = rules.sites["indoor"]
    eps = rules.metals["carbon-steel"].emissivity
    for row, sur in enumerate([C - 10, C + 50, site.surroundings]):
        assert states["surroundings_temp_K"][row] == pytest.approx(sur)
        direct = solve_item(temp=C + 150, ambient=site.ambient, od=0.1143, length=10.0,
                            layers=[], wind=site.wind, surroundings=sur, bare_emissivity=eps)
        assert states["heat_loss_W"][row] == pytest.approx(direct.heat_loss, rel=1e-9)
    assert states["heat_loss_W"][0] > states["heat_loss_W"][2] > states["heat_loss_W"][1]


def test_surroundings_follow_the_rows_own_air_unless_given(tmp_path, rules):
    # A site with surroundings apart from its air (a room with a cold wall, invented for the
    # test); a row that gives its own ambient radiates to that air unless it gives
    # surroundings too, and says so in its warnings.
    (tmp_path / "rules").mkdir()
    (tmp_path / "rules" / "room.toml").write_text(
        '[site.cold-wall-room]\nambient = 20\nwind = 0\nrh = 50\nsurroundings = 5\n'
        'source = "invented for this test"\n', encoding="utf-8")
    with_room = load_rules([tmp_path / "rules"])
    t = table_from(tmp_path, "tag,nps,length,temp,insulation,material,location,ambient,surroundings\n"
                             "SITE,4,10,150,none,carbon-steel,cold-wall-room,,\n"
                             "OWN-AIR,4,10,150,none,carbon-steel,cold-wall-room,30,\n"
                             "BOTH,4,10,150,none,carbon-steel,cold-wall-room,30,0\n", with_room)
    states = thermal_states(t, with_room)
    assert list(states["surroundings_temp_K"]) == pytest.approx([C + 5, C + 30, C + 0])
    assert "surroundings: empty; the row's own ambient" in t["warnings"][1]
    assert "surroundings" not in t["warnings"][0] and "surroundings" not in t["warnings"][2]
    # A check's scenario keeps the row's own surroundings, as every row value.
    hot = thermal_states(t, with_room, site="hot-still-day")
    assert hot["surroundings_temp_K"][2] == pytest.approx(C + 0)


def test_table_and_engine_agree_on_covers_and_bare_metal(tmp_path, rules):
    # One rule (audit.engine.batch.surfaces) read from the table for names and defaults and
    # from the engine's arrays for validation: they must agree on every row.
    from audit.checks.base import bare_parts
    from audit.engine.batch import item_surfaces
    from audit.thermal import prepare_items, table_surfaces

    t = table_from(tmp_path, "tag,shape,nps,od,length,heads,temp,insulation,thickness,jacket,"
                             "condition,damaged,valves,flanges\n"
                             "A,pipe,4,,10,,200,mineral-wool,50,aluminium-oxidised,wet,,,\n"
                             "B,pipe,2,,5,,-20,cellular-glass,40,stainless-steel,damaged,30,,\n"
                             "C,pipe,6,,7,,150,none,,,,,,\n"
                             "D,pipe,6,,7,,150,mineral-wool,50,aluminium-oxidised,missing,,,\n"
                             "E,pipe,3,,4,,180,mineral-wool,50,aluminium-oxidised,,,,1\n"
                             "F,vertical-vessel,,1500 mm,4,flat,150,mineral-wool,50,aluminium-oxidised,,,2,\n"
                             "G,pipe,4,,4,,150,mineral-wool,50,aluminium-oxidised,damaged,0,,\n"
                             "H,pipe,4,,4,,150,mineral-wool,50,aluminium-oxidised,damaged,100,,\n", rules)
    assert (t["status"] == "ok").all(), list(t["reason"])
    batch, _ = site_batch(prepare_items(t, rules), rules, None)
    for got, want in zip(table_surfaces(t), item_surfaces(batch)):
        np.testing.assert_array_equal(got, want)
    cover, bare = table_surfaces(t)
    assert list(bare_parts(t) != "") == list(bare)  # the checks' words follow the rule
    assert list(cover) == [True, True, False, False, True, True, True, False]
    # The vessel's valves are not counted (a warning says so); 0 % damage bares nothing.
    assert list(bare) == [False, True, True, True, True, False, False, True]
