"""Provenance: every finding's ``limit_source`` names the rule file and table that governed
its limit (audit/checks/base.py ``rule_source``), a plant's own file where it governed."""

import pytest

from audit.pipeline import audit_register
from audit.rules import load_rules
from audit.shipped import shipped_dir

# Invented plant: a specification of its own, thicker than the shipped demo one.
PLANT_SPEC = """# Invented plant's own heat-conservation specification (test data).
[spec.heat-conservation]
material = "mineral-wool"
bands = [[50, 500]]
sizes = [48]
thickness = [[100]]
flat = [100]
tolerance = 3
source = "invented plant's own specification (test data)"
"""
REGISTER = """tag,nps,length,temp,layers,jacket,location,accessible,service
HC-1,4,10,180,mineral-wool 50mm,aluminium-oxidised,outdoor,no,heat-conservation
HOT-FOAM,4,10,180,elastomeric-foam 50mm,aluminium-oxidised,outdoor,no,heat-conservation
"""


@pytest.fixture(scope="module")
def plant_audit(tmp_path_factory):
    folder = tmp_path_factory.mktemp("plant")
    rules_dir = folder / "plant-rules"
    rules_dir.mkdir()
    (rules_dir / "spec-plant.toml").write_text(PLANT_SPEC, encoding="utf-8")
    register = folder / "register.csv"
    register.write_text(REGISTER, encoding="utf-8")
    return audit_register([register], rules=load_rules([rules_dir]))


def test_below_spec_names_the_plants_own_specification(plant_audit):
    found = plant_audit.findings
    spec = found[(found["check"] == "below-spec") & (found["tag"] == "HC-1")]
    assert len(spec) == 1 and spec["limit"].iloc[0] == 100.0
    source = spec["limit_source"].iloc[0]
    assert source.startswith("plant-rules/spec-plant.toml [spec.heat-conservation]: invented plant")
    assert "spec-demo" not in source


def test_layer_overheat_names_the_materials_table(plant_audit):
    found = plant_audit.findings
    hot = found[(found["check"] == "layer-overheat") & (found["tag"] == "HOT-FOAM")]
    assert len(hot) == 1
    assert hot["limit_source"].iloc[0].startswith("rules/materials.toml [material.elastomeric-foam]: ")


def test_every_demo_finding_names_a_rule_file_and_table():
    folder = shipped_dir("sample_data")
    demo = audit_register([folder / "demo_line_list.xlsx", folder / "demo_equipment.xlsx"])
    sources = demo.findings["limit_source"]
    assert len(sources) > 100
    assert sources.str.match(r"^rules/[\w-]+\.toml \[(check|spec|material)\.[\w-]+\]: .+").all()
    by_check = demo.findings.groupby("check")["limit_source"].first()
    assert by_check["touch-temperature"].startswith("rules/checks-touch.toml [check.touch-temperature]")
