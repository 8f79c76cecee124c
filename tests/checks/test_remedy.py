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


def fixable_rows(table, rules, row, material, thickness):
    """Fixable findings left on ``row`` re-insulated with ``thickness`` of ``material``."""
    trial = table.iloc[[row]].reset_index(drop=True).copy()
    trial["layer_materials"] = [(material,)]
    trial["layer_thicknesses_m"] = [(thickness,)]
    trial["condition"] = "intact"
    trial["damaged_pct"] = np.nan
    trial["valves"] = 0
    trial["flanges"] = 0
    kinds, params = check_kinds(), validate_checks(rules)
    context = CheckContext(trial, rules)
    names = []
    for check in rules.checks.values():
        if check.enabled and (kinds[check.kind].fixable_by_insulation or check.kind == "layer-overheat"):
            names += list(kinds[check.kind].evaluate(context, check, params[check.name])["check"])
    return names


def test_every_remedy_thickness_clears_and_is_the_smallest(audit):
    rules = audit.rules
    remedied = audit.findings.dropna(subset=["remedy_thickness [mm]"]).drop_duplicates("row")
    assert len(remedied) >= 3
    standard = list(rules.thicknesses)
    for _, finding in remedied.iterrows():
        t = finding["remedy_thickness [mm]"] / 1000.0
        material = finding["remedy_material"]
        assert fixable_rows(audit.table, rules, int(finding["row"]), material, t) == [], finding["tag"]
        k = standard.index(min(standard, key=lambda s: abs(s - t)))
        if k > 0:  # one standard step thinner must still fail something
            assert fixable_rows(audit.table, rules, int(finding["row"]), material, standard[k - 1]), finding["tag"]


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


def test_rows_only_contexts_fail_the_same_rows_as_worded_findings(rules):
    # The remedy search asks its trials for failing rows only (CheckContext.rows_only): every
    # check must name the same rows that its worded findings name, on the demo plant.
    from audit.io.readers import read_register
    from audit.shipped import shipped_dir
    from audit.thermal import resolve_names

    folder = shipped_dir("sample_data")
    table = resolve_names(read_register([folder / "demo_line_list.xlsx",
                                         folder / "demo_equipment.xlsx"], aliases=rules.aliases), rules)
    kinds, params = check_kinds(), validate_checks(rules)
    worded, bare = CheckContext(table, rules), CheckContext(table, rules, rows_only=True)
    compared = 0
    for check in rules.checks.values():
        if not check.enabled:
            continue
        full = kinds[check.kind].evaluate(worded, check, params[check.name])
        rows = kinds[check.kind].evaluate(bare, check, params[check.name])
        assert sorted(rows["row"]) == sorted(full["row"]), check.name
        compared += len(full)
    assert compared > 0
