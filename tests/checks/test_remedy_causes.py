"""Remedies fix the cause and never thin the insulation (audit/checks/remedy.py), and the
work-order quantities follow them (audit/report/workorders.py).

A register of an invented plant with the real traps; each remedy is asserted against a hand
statement of the fix.  The statements are common practice in insulation maintenance (not a
published table): fix the cause (a bare flange gets a cover, a damaged share is reinstated
like for like); add or replace insulation only where the installed build-up itself fails, and
then never thinner than what is installed nor than the plant specification; a cover on a cold
line is vapour-sealed.
"""

import numpy as np
import pytest

from audit.checks import check_kinds, validate_checks
from audit.checks.base import CheckContext
from audit.checks.below_spec import installed_thickness, requirement
from audit.pipeline import audit_register
from audit.report.workorders import GUARD, INSULATE, build_orders
from audit.shipped import shipped_dir

# Thicknesses of the shipped demo specification (rules/spec-demo.toml, invented) that the
# statements below rely on: heat-conservation, NPS 2 and NPS 4/6 rows; cold, NPS 2 row.
REGISTER = """tag,nps,length,temp,layers,jacket,location,accessible,condition,damaged,service,valves,flanges
ST-FLANGED,4,20,180,calcium-silicate 50mm,aluminium-oxidised,outdoor,yes,intact,,heat-conservation,0,2
ST-DAMAGED,6,30,150,mineral-wool 65mm,aluminium-oxidised,outdoor,yes,damaged,20,heat-conservation,0,0
HW-THIN,2,15,250,mineral-wool 25mm,aluminium-oxidised,outdoor,no,intact,,heat-conservation,0,0
HO-ASBUILT,3,12,350,mineral-wool 80mm,aluminium-bright,outdoor,yes,intact,,heat-conservation,0,0
CW-FLANGED,2,25,5,elastomeric-foam 50mm,pvc,indoor,no,intact,,cold,0,2
"""


@pytest.fixture(scope="module")
def trap(tmp_path_factory):
    path = tmp_path_factory.mktemp("trap") / "trap.csv"
    path.write_text(REGISTER, encoding="utf-8")
    audit = audit_register([path])
    assert (audit.results["status"] == "audited").all()
    return audit


@pytest.fixture(scope="module")
def demo_audit():
    """The registers ``lagaudit demo`` audits."""
    folder = shipped_dir("sample_data")
    return audit_register([folder / "demo_line_list.xlsx", folder / "demo_equipment.xlsx"])


def findings_of(audit, tag):
    found = audit.findings[audit.findings["tag"] == tag]
    return {c: f for c, f in zip(found["check"], found.to_dict(orient="records"))}


def quantities_of(audit, tag):
    order = next(o for o in build_orders(audit) if o["tag"] == tag)
    return {q["work"]: q for q in order["quantities"]}


def test_bare_flanges_on_an_insulated_steam_line_get_covers(trap):
    # Hand statement: 50 mm of calcium silicate meets the 50 mm specification; the burn risk
    # is the two bare flanges at 180 degC.  Fix: covers on the 2 flanges, the insulation
    # stays; a guard may be offered (guard_allowed in the shipped touch check).
    found = findings_of(trap, "ST-FLANGED")
    touch = found["touch-temperature"]
    assert touch["remedy_action"] == "covers;guard"
    assert np.isnan(touch["remedy_thickness [mm]"]) and touch["remedy_material"] == ""
    assert "covers to the bare fittings (2 flanges)" in touch["remedy"] and "guard" in touch["remedy"]
    assert "replac" not in touch["remedy"]
    bill = quantities_of(trap, "ST-FLANGED")
    assert bill["removable insulation cover, flange"]["quantity"] == 2
    assert INSULATE not in bill
    assert bill[GUARD + ", fittings"]["quantity"] == 2 and bill[GUARD + ", fittings"]["unit"] == "pcs"


def test_a_damaged_share_is_reinstated_to_the_installed_build_up(trap):
    # Hand statement: 65 mm of mineral wool (specification 50 mm) with 20 % of 30 m bare.
    # Fix: reinstate 6 m with mineral wool 65 mm; nothing thinner, nothing else.
    found = findings_of(trap, "ST-DAMAGED")
    for check in ("touch-temperature", "heat-loss-limit"):
        assert found[check]["remedy_action"].split(";")[0] == "reinstate-damaged", check
        assert np.isnan(found[check]["remedy_thickness [mm]"])
        assert "installed build-up (mineral-wool 65 mm)" in found[check]["remedy"]
    bill = quantities_of(trap, "ST-DAMAGED")
    reinstate = bill["reinstate damaged share as installed"]
    assert reinstate["quantity"] == pytest.approx(6.0) and reinstate["unit"] == "m"
    assert reinstate["material"] == "mineral-wool 65 mm"
    assert INSULATE not in bill


def test_below_specification_is_insulated_to_the_specification(trap):
    # Hand statement: NPS 2 at 250 degC asks 50 mm of mineral wool; 25 mm is installed.
    # Fix: insulate the whole 15 m to the specification, 50 mm.
    found = findings_of(trap, "HW-THIN")
    spec = found["below-spec"]
    assert spec["remedy_action"] == "insulate"
    assert spec["remedy_thickness [mm]"] == pytest.approx(50.0)
    assert spec["remedy_material"] == "mineral-wool"
    insulate = quantities_of(trap, "HW-THIN")[INSULATE]
    assert insulate["thickness_mm"] == pytest.approx(50.0) and insulate["quantity"] == 15.0


def test_a_build_up_that_fails_as_installed_is_thickened_never_thinned(trap):
    # Hand statement: 80 mm meets the specification (80 mm) but its bright jacket still runs
    # above the 60 degC burn limit on the hot still day.  Fix: thicker insulation, the
    # smallest standard thickness above 80 mm that clears the burn limit; never below 80 mm.
    rules = trap.rules
    touch = findings_of(trap, "HO-ASBUILT")["touch-temperature"]
    assert touch["remedy_action"] == "insulate;guard"
    mm = touch["remedy_thickness [mm]"]
    assert mm >= 80.0
    row = int(touch["row"])
    standard = [t * 1000 for t in rules.thicknesses]
    thinner = [t for t in standard if 80.0 <= t < mm]
    kinds, params = check_kinds(), validate_checks(rules)
    check = rules.checks["touch-temperature"]

    def burns(thickness_mm):
        trial = trap.table.iloc[[row]].reset_index(drop=True).copy()
        trial["layer_materials"] = [("mineral-wool",)]
        trial["layer_thicknesses_m"] = [(thickness_mm / 1000,)]
        verdict = kinds[check.kind].evaluate(CheckContext(trial, rules), check, params[check.name])
        return verdict.rows.size > 0

    assert not burns(mm)
    assert all(burns(t) for t in thinner)  # the engine confirms each thinner standard fails
    bill = quantities_of(trap, "HO-ASBUILT")
    assert bill[INSULATE]["thickness_mm"] == mm and bill[GUARD]["quantity"] == 12.0


def test_bare_flanges_on_a_cold_line_get_vapour_sealed_covers(trap):
    # Hand statement: 50 mm of elastomeric foam keeps the line's surface above the dew point;
    # the two bare flanges sweat.  Fix: vapour-sealed covers on the flanges, no thickness.
    found = findings_of(trap, "CW-FLANGED")
    assert found["condensation"]["remedy_action"] == "covers"
    assert "vapour-sealed" in found["condensation"]["remedy"]
    assert "vapour-sealed" in found["uninsulated-fittings"]["remedy"]
    bill = quantities_of(trap, "CW-FLANGED")
    assert bill["vapour-sealed removable cover, flange"]["quantity"] == 2 and INSULATE not in bill


def test_one_checks_impossibility_does_not_spill_into_another(demo_audit):
    # On the demo some cold items cannot be kept above the dew point by any standard
    # thickness, yet are below specification: the below-spec remedy still names a thickness.
    findings = demo_audit.findings
    engineered = findings[findings["remedy_action"].str.contains("engineer", na=False)]
    rows = set(engineered["row"])
    solved_elsewhere = findings[findings["row"].isin(rows)
                                & findings["remedy_thickness [mm]"].notna()]
    assert len(solved_elsewhere) > 0
    assert (solved_elsewhere["remedy_action"].str.startswith("insulate")).all()
    assert "engineer" not in " ".join(solved_elsewhere["remedy"])


def test_no_remedy_on_the_demo_is_thinner_than_installed_or_than_the_spec(demo_audit):
    audit = demo_audit
    table, rules = audit.table, audit.rules
    spec_site = rules.checks["below-spec"].site
    context = CheckContext(table, rules)
    states = context.states(spec_site)
    need = requirement(table, rules, states["process_temp_K"].to_numpy(float),
                       states["air_temp_K"].to_numpy(float))
    listed = np.array([sum(t) if isinstance(t, tuple) else 0.0
                       for t in table["layer_thicknesses_m"]])
    assert (installed_thickness(table) <= listed).all()
    remedied = audit.findings.dropna(subset=["remedy_thickness [mm]"])
    assert len(remedied) > 20
    rows = remedied["row"].to_numpy(int)
    mm = remedied["remedy_thickness [mm]"].to_numpy(float)
    assert (mm >= listed[rows] * 1000 - 1e-6).all()
    assert (mm >= (need.thickness_m - need.tolerance_m)[rows] * 1000 - 1e-6).all()
    # and the bill of quantities orders no thinner insulation than installed
    for order in build_orders(audit):
        for part in order["parts"]:
            for q in part["quantities"]:
                if q["work"] == INSULATE:
                    assert q["thickness_mm"] >= listed[part["row"]] * 1000 - 1e-6, order["tag"]


def test_repair_actions_follow_the_kind_flag_not_its_name(trap):
    # Bookkeeping, no physics: the condition findings get their repair actions because their
    # kind says remedied_by_repair; with the flag off the same findings get none.
    from dataclasses import replace

    from audit.checks.remedy import _condition_actions
    kinds, params = check_kinds(), validate_checks(trap.rules)
    blank = trap.findings.assign(remedy_action="")
    condition = (blank["kind"] == "condition").to_numpy()
    assert kinds["condition"].remedied_by_repair and condition.any()
    acted = _condition_actions(trap.table, blank, kinds, params)["remedy_action"].to_numpy()
    assert (acted[condition] != "").any() and (acted[~condition] == "").all()
    off = {**kinds, "condition": replace(kinds["condition"], remedied_by_repair=False)}
    assert (_condition_actions(trap.table, blank, off, params)["remedy_action"] == "").all()
