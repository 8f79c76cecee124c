"""layer-too-cold (audit/checks/layer_too_cold.py): limits just either side."""

import pytest

from audit.checks.base import CheckContext
from audit.rules import load_rules
from support import check_findings, item_table, rules_with_material

C = 273.15
NAME = "layer-too-cold"


def test_inner_layer_at_process_temperature_either_side_of_min_temp(tmp_path):
    rules = load_rules()
    # -183 degC: ASTM C591 section 1.1 (-297 degF), the shipped min_temp of polyisocyanurate.
    limit = rules.materials["polyisocyanurate"].min_temp - C
    rows = (f"A,2,5,{limit + 0.5},polyisocyanurate 100mm,aluminium-oxidised,indoor\n"
            f"B,2,5,{limit - 0.5},polyisocyanurate 100mm,aluminium-oxidised,indoor\n")
    found = check_findings(tmp_path, rows, rules, NAME)
    assert list(found["tag"]) == ["B"]
    assert found["limit"].iloc[0] == pytest.approx(limit)
    assert found["value"].iloc[0] == pytest.approx(limit - 0.5)
    assert "polyisocyanurate cold face" in found["message"].iloc[0]
    assert "rated for the temperature" in found["remedy"].iloc[0]
    assert "materials.toml [material.polyisocyanurate]" in found["limit_source"].iloc[0]


def test_outer_layer_cold_face_from_the_engine(tmp_path):
    # The outer layer's inner face is an interface temperature the engine computes; a material
    # whose min_temp sits 1 K either side of it must be flagged exactly on one side.
    rules = load_rules()
    rows = "A,6,10,-160,cellular-glass 50mm + polyisocyanurate 50mm,aluminium-oxidised,indoor\n"
    table = item_table(tmp_path, "tag,nps,length,temp,layers,jacket,location\n" + rows, rules)
    states = CheckContext(table, rules).states(rules.checks[NAME].site)
    cold_face = states["interface_1_K"].iloc[0] - C
    assert -160 < cold_face < 20  # a real interface, between process and air
    for offset, flagged in ((-1.0, False), (+1.0, True)):
        layered = rules_with_material(tmp_path / f"rules{offset}", rules, "polyisocyanurate",
                                      min_temp=cold_face + offset)
        found = check_findings(tmp_path, rows, layered, NAME)
        assert (len(found) == 1) == flagged, offset


def test_a_material_without_min_temp_is_not_judged(tmp_path):
    rules = load_rules()
    assert rules.materials["aerogel-blanket"].min_temp != rules.materials["aerogel-blanket"].min_temp
    rows = "A,2,5,-190,aerogel-blanket 20mm,aluminium-oxidised,indoor\n"
    assert check_findings(tmp_path, rows, rules, NAME).empty


def test_missing_insulation_is_not_a_cold_layer(tmp_path):
    rows = "A,2,5,-196,polyisocyanurate 50mm,missing,indoor\n"
    found = check_findings(tmp_path, rows, load_rules(), NAME,
                           head="tag,nps,length,temp,layers,condition,location")
    assert found.empty
