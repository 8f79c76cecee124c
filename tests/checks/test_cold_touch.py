"""cold-touch (audit/checks/cold_touch.py) and ice on cold surfaces (condensation, work orders)."""

import pytest

from audit.checks.condensation import ICE
from audit.pipeline import audit_register
from audit.report.workorders import DE_ICE, build_orders

REGISTER = """tag,nps,length,temp,layers,jacket,fluid,accessible,location
LIN-BARE,2,5,-196,none,,liquid-nitrogen,yes,outdoor
LIN-HIGH,2,5,-196,none,,liquid-nitrogen,no,outdoor
LNG-INS,4,10,-162,polyisocyanurate 150,aluminium-oxidised,lng,yes,outdoor
CW-BARE,4,10,5,none,,water,yes,outdoor
GLY-BARE,4,10,-10,none,,ethylene-glycol-30,yes,outdoor
"""


@pytest.fixture(scope="module")
def audited(tmp_path_factory):
    path = tmp_path_factory.mktemp("cold") / "cold.csv"
    path.write_text(REGISTER, encoding="utf-8")
    audit = audit_register([path])
    assert (audit.results["status"] == "audited").all(), audit.results["reason"].tolist()
    return audit


def flagged(audit, check):
    return set(audit.findings.loc[audit.findings["check"] == check, "tag"])


def test_cold_touch_is_shipped_enabled(rules):
    check = rules.checks["cold-touch"]
    assert check.enabled and check.kind == "cold-touch"
    assert "ISO 13732-3" in check.source and "NOT at hand" in check.source


def test_accessible_surfaces_below_the_limit_are_flagged_and_others_not(audited):
    # Limit 0 degC (the rule file): bare metal at -196 and -10 degC fails; bare metal at
    # 5 degC, an out-of-reach item and a well-insulated LNG line do not.
    assert flagged(audited, "cold-touch") == {"LIN-BARE", "GLY-BARE"}


def test_the_finding_names_the_part_value_and_limit_and_offers_cover_or_guard(audited):
    found = audited.findings.set_index(["tag", "check"]).loc[("LIN-BARE", "cold-touch")]
    assert found["value"] == pytest.approx(-196.0, abs=0.5)  # bare metal sits at the fluid's
    assert found["limit"] == 0
    assert "frostbite" in found["message"] and "bare" in found["message"]
    assert "cover" in found["remedy"] and "guard" in found["remedy"]


def test_a_surface_below_freezing_and_the_dew_point_is_said_to_grow_ice(audited):
    found = audited.findings.set_index(["tag", "check"])
    assert ICE in found.loc[("LIN-BARE", "condensation"), "message"]
    # Bare metal at 5 degC sweats but stays above 0 degC: no ice.
    assert ICE not in found.loc[("CW-BARE", "condensation"), "message"]


def test_the_work_order_of_an_iced_item_says_de_ice_first(audited):
    orders = {o["tag"]: o for o in build_orders(audited)}
    assert orders["LIN-BARE"]["remedies"][0] == DE_ICE
    assert DE_ICE not in orders["CW-BARE"]["remedies"]
