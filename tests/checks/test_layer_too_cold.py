"""layer-too-cold (audit/checks/layer_too_cold.py): limits just either side."""

import pytest

from audit.checks import run_checks
from audit.checks.base import CheckContext
from audit.io.readers import read_register
from audit.rules import load_rules
from audit.thermal import resolve_names

C = 273.15


def context_for(tmp_path, rows, rules):
    path = tmp_path / "reg.csv"
    path.write_text("tag,nps,length,temp,layers,jacket,location\n" + rows, encoding="utf-8")
    table = resolve_names(read_register(path, aliases=rules.aliases), rules)
    return CheckContext(table, rules)


def too_cold(context):
    found = run_checks(context)
    return found[found["check"] == "layer-too-cold"]


def test_inner_layer_at_process_temperature_either_side_of_min_temp(tmp_path):
    rules = load_rules()
    # -183 degC: ASTM C591 section 1.1 (-297 degF), the shipped min_temp of polyisocyanurate.
    limit = rules.materials["polyisocyanurate"].min_temp - C
    rows = (f"A,2,5,{limit + 0.5},polyisocyanurate 100mm,aluminium-oxidised,indoor\n"
            f"B,2,5,{limit - 0.5},polyisocyanurate 100mm,aluminium-oxidised,indoor\n")
    found = too_cold(context_for(tmp_path, rows, rules))
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
    context = context_for(tmp_path, rows, rules)
    cold_face = context.states(rules.checks["layer-too-cold"].site)["interface_1_K"].iloc[0] - C
    assert -160 < cold_face < 20  # a real interface, between process and air
    for offset, flagged in ((-1.0, False), (+1.0, True)):
        user = tmp_path / f"rules{offset}"
        user.mkdir()
        pir = rules.materials["polyisocyanurate"]
        k_rows = ", ".join(f"[{t - C:.6f}, {k}]" for t, k in pir.k)
        (user / "pir.toml").write_text(
            f'[material.polyisocyanurate]\nk = [{k_rows}]\nmax_temp = 149\n'
            f'min_temp = {cold_face + offset}\nsource = "test"\n', encoding="utf-8")
        found = too_cold(context_for(tmp_path, rows, load_rules([user])))
        assert (len(found) == 1) == flagged, offset


def test_a_material_without_min_temp_is_not_judged(tmp_path):
    rules = load_rules()
    assert rules.materials["aerogel-blanket"].min_temp != rules.materials["aerogel-blanket"].min_temp
    rows = "A,2,5,-190,aerogel-blanket 20mm,aluminium-oxidised,indoor\n"
    assert too_cold(context_for(tmp_path, rows, rules)).empty


def test_missing_insulation_is_not_a_cold_layer(tmp_path):
    rules = load_rules()
    path = tmp_path / "reg.csv"
    path.write_text("tag,nps,length,temp,layers,condition,location\n"
                    "A,2,5,-196,polyisocyanurate 50mm,missing,indoor\n", encoding="utf-8")
    context = CheckContext(resolve_names(read_register(path), rules), rules)
    assert too_cold(context).empty
