"""layer-overheat (audit/checks/layer_overheat.py): limits just either side."""

import pytest

from audit.checks import run_checks
from audit.checks.base import CheckContext
from audit.io.readers import read_register
from audit.rules import load_rules
from audit.thermal import resolve_names
from support import rules_with_material

C = 273.15


def context_for(tmp_path, rows, rules):
    path = tmp_path / "reg.csv"
    path.write_text("tag,nps,length,temp,layers,jacket,location\n" + rows, encoding="utf-8")
    table = resolve_names(read_register(path, aliases=rules.aliases), rules)
    return CheckContext(table, rules)


def overheat(context):
    found = run_checks(context)
    return found[found["check"] == "layer-overheat"]


def test_inner_layer_at_process_temperature_either_side_of_max_temp(tmp_path):
    rules = load_rules()
    limit = rules.materials["elastomeric-foam"].max_temp - C  # 104 degC (ASTM C534 Grade 1)
    rows = (f"A,2,5,{limit - 0.5},elastomeric-foam 25mm,pvc,indoor\n"
            f"B,2,5,{limit + 0.5},elastomeric-foam 25mm,pvc,indoor\n")
    found = overheat(context_for(tmp_path, rows, rules))
    assert list(found["tag"]) == ["B"]
    assert found["limit"].iloc[0] == pytest.approx(limit)
    assert found["value"].iloc[0] == pytest.approx(limit + 0.5)


def test_outer_layer_hot_face_from_the_engine(tmp_path):
    # The outer layer's hot face is an interface temperature the engine computes; a material
    # whose max_temp sits 1 K either side of it must be flagged exactly on one side.
    rules = load_rules()
    rows = "A,6,10,400,calcium-silicate 50mm + mineral-wool 50mm,aluminium-oxidised,indoor\n"
    context = context_for(tmp_path, rows, rules)
    site = rules.checks["layer-overheat"].site
    hot_face = context.states(site)["interface_1_K"].iloc[0] - C
    for offset, flagged in ((+1.0, False), (-1.0, True)):
        layered = rules_with_material(tmp_path / f"rules{offset}", rules, "mineral-wool",
                                      max_temp=hot_face + offset)
        found = overheat(context_for(tmp_path, rows, layered))
        assert (len(found) == 1) == flagged, offset


def test_missing_insulation_is_not_an_overheated_layer(tmp_path):
    rules = load_rules()
    path = tmp_path / "reg.csv"
    path.write_text("tag,nps,length,temp,layers,condition,location\nA,2,5,300,elastomeric-foam 25mm,missing,indoor\n",
                    encoding="utf-8")
    context = CheckContext(resolve_names(read_register(path), rules), rules)
    assert overheat(context).empty
