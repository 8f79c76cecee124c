"""Remedy thickness (audit/checks/remedy.py), verified by re-running the engine and the checks."""

import numpy as np
import pytest

from audit.checks import check_kinds, validate_checks
from audit.checks.base import CheckContext
from audit.pipeline import audit_register

REGISTER = """tag,nps,length,temp,layers,jacket,location,accessible,condition,damaged,service,valves,flanges
HOT-1,4,10,250,mineral-wool 25mm,aluminium-oxidised,outdoor-annual-mean,yes,intact,,heat-conservation,0,0
HOT-2,6,10,180,none,,outdoor-annual-mean,yes,missing,,,0,0
HOT-3,3,10,200,mineral-wool 50mm,aluminium-oxidised,indoor,yes,damaged,20,personnel,1,2
COLD-1,2,10,5,elastomeric-foam 9mm,pvc,indoor,no,intact,,cold,0,0
OK-1,4,10,150,mineral-wool 100mm,aluminium-oxidised,indoor,no,intact,,heat-conservation,0,0
"""


@pytest.fixture(scope="module")
def audit(tmp_path_factory):
    path = tmp_path_factory.mktemp("reg") / "reg.csv"
    path.write_text(REGISTER, encoding="utf-8")
    return audit_register([path])


def failed_checks(table, rules, row, material, thickness, names):
    """Which of ``names`` (and the must-pass checks) still fail on ``row`` re-insulated with
    one intact layer of ``thickness`` of ``material``, fittings covered."""
    trial = table.iloc[[row]].reset_index(drop=True).copy()
    trial["layer_materials"] = [(material,)]
    trial["layer_thicknesses_m"] = [(thickness,)]
    trial["condition"] = "intact"
    trial["damaged_pct"] = np.nan
    trial["valves"] = 0
    trial["flanges"] = 0
    kinds, params = check_kinds(), validate_checks(rules)
    context = CheckContext(trial, rules)
    failed = []
    for check in rules.checks.values():
        kind = kinds[check.kind]
        if check.enabled and (check.name in names or kind.remedy_must_pass):
            failed += list(kind.findings(context, check, params[check.name])["check"])
    return failed


def test_every_remedy_thickness_clears_its_check_and_is_the_smallest(audit):
    rules = audit.rules
    remedied = audit.findings.dropna(subset=["remedy_thickness [mm]"])
    assert len(remedied) >= 3
    standard = list(rules.thicknesses)
    for _, finding in remedied.iterrows():
        t = finding["remedy_thickness [mm]"] / 1000.0
        row, material, check = int(finding["row"]), finding["remedy_material"], finding["check"]
        assert failed_checks(audit.table, rules, row, material, t, {check}) == [], finding["tag"]
        k = standard.index(min(standard, key=lambda s: abs(s - t)))
        installed = sum(audit.table["layer_thicknesses_m"][row] or ())
        # One standard step thinner fails the check, or is below the floor: thinner than
        # installed, or than the specification accepts (below-spec fails there).
        if k > 0 and standard[k - 1] >= installed:
            assert failed_checks(audit.table, rules, row, material, standard[k - 1],
                                 {check, "below-spec"}), finding["tag"]


def test_items_without_fixable_findings_get_no_thickness(audit):
    ok = audit.findings[audit.findings["tag"] == "OK-1"]
    assert ok["remedy_thickness [mm]"].isna().all()
    named = audit.findings[~audit.findings["fixable_by_insulation"].astype(bool)]
    assert named["remedy_thickness [mm]"].isna().all()
    assert (named["remedy"].str.len() > 0).all()


def test_results_carry_findings_and_worst_severity(audit):
    results = audit.results.set_index("tag")
    hot = audit.findings[audit.findings["tag"] == "HOT-2"]
    assert set(results.loc["HOT-2", "findings"].split(";")) == set(hot["check"])
    assert results.loc["HOT-2", "severity"] == "high"  # touch-temperature, shipped as high
    assert results.loc["OK-1", "findings"] == "" or "touch" not in results.loc["OK-1", "findings"]


def test_no_check_findings_on_rejected_rows(tmp_path):
    path = tmp_path / "reg.csv"
    path.write_text("tag,nps,length,temp,layers\nBAD,4,10,TBA,none\n", encoding="utf-8")
    audit = audit_register([path])
    assert audit.results["status"][0] == "rejected" and audit.findings.empty


def test_every_verdict_is_worded_row_for_row(rules):
    # Checks decide (a Verdict: rows, values, limits), then word: on the demo plant, every
    # check's wording gives each failing row a message and a remedy of its own, and the
    # findings hold exactly the verdict's rows and figures.
    from audit.io.readers import read_register
    from audit.shipped import shipped_dir
    from audit.thermal import resolve_names

    folder = shipped_dir("sample_data")
    table = resolve_names(read_register([folder / "demo_line_list.xlsx",
                                         folder / "demo_equipment.xlsx"], aliases=rules.aliases), rules)
    kinds, params = check_kinds(), validate_checks(rules)
    context = CheckContext(table, rules)
    compared = 0
    for check in rules.checks.values():
        if not check.enabled:
            continue
        kind = kinds[check.kind]
        verdict = kind.evaluate(context, check, params[check.name])
        found = kind.findings(context, check, params[check.name])
        assert list(found["row"]) == list(verdict.rows), check.name
        np.testing.assert_array_equal(found["value"].to_numpy(float),
                                      np.broadcast_to(verdict.value, len(found)), err_msg=check.name)
        assert (found["message"].str.len() > 0).all() and (found["remedy"].str.len() > 0).all()
        assert found["unit"].notna().all() and (found["unit"] != "").all(), check.name
        compared += len(found)
    assert compared > 0
