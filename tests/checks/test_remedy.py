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
        kind = kinds[check.kind]
        if check.enabled and (kind.fixable_by_insulation or kind.remedy_must_pass):
            names += list(kind.findings(context, check, params[check.name])["check"])
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
        installed = sum(audit.table.loc[int(finding["row"]), "layer_thicknesses_m"])
        # One standard step thinner must still fail something, unless it is thinner than what
        # is installed (a remedy never thins the insulation).
        if k > 0 and standard[k - 1] >= installed - 1e-9:
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


# --- Remedies fix the cause and never thin the insulation ------------------------------------
# The expected fixes are a hand statement of common practice (fix the cause: cover bare
# fittings, reinstate damage to the installed build-up, bring an item up to its specification;
# never reduce the installed thickness), not figures from a published source.

TRAP = """tag,nps,length,temp,layers,jacket,location,accessible,condition,damaged,service,valves,flanges
FLG-1,4,20,180,calcium-silicate 50mm,aluminium-oxidised,indoor,yes,intact,,personnel,0,2
DMG-1,4,20,180,mineral-wool 50mm,aluminium-oxidised,indoor,yes,damaged,10,personnel,0,0
SPEC-1,4,20,180,mineral-wool 25mm,aluminium-oxidised,indoor,no,intact,,heat-conservation,0,0
THIN-1,2,20,5,elastomeric-foam 13mm,pvc,outdoor,no,intact,,cold,0,0
COLDFLG-1,2,20,5,elastomeric-foam 50mm,pvc,outdoor,no,intact,,cold,1,0
"""


@pytest.fixture(scope="module")
def trap(tmp_path_factory):
    path = tmp_path_factory.mktemp("trap") / "trap.csv"
    path.write_text(TRAP, encoding="utf-8")
    return audit_register([path])


def remedies_of(trap, tag):
    found = trap.findings[(trap.findings["tag"] == tag) & trap.findings["fixable_by_insulation"]]
    assert len(found), tag
    return found


def test_bare_flanges_on_an_insulated_line_get_covers_not_new_insulation(trap):
    found = remedies_of(trap, "FLG-1")
    assert found["remedy"].str.startswith("fit removable insulated covers to the bare fittings "
                                          "(2 flanges)").all()
    assert found["remedy_thickness [mm]"].isna().all()


def test_a_damaged_share_is_reinstated_to_the_installed_build_up(trap):
    found = remedies_of(trap, "DMG-1")
    assert found["remedy"].str.startswith("reinstate the damaged 10 % of the length to the "
                                          "installed build-up (mineral-wool 50 mm)").all()


def test_an_item_below_its_specification_is_brought_up_to_it(trap):
    found = remedies_of(trap, "SPEC-1")
    need_mm = 50.0  # rules/spec-demo.toml [spec.heat-conservation], NPS 4 column
    assert (found["remedy_thickness [mm]"] >= need_mm).all()
    assert found["remedy"].str.contains("mineral-wool").all()


def test_cold_fittings_get_vapour_sealed_covers(trap):
    found = remedies_of(trap, "COLDFLG-1")
    assert found["remedy"].str.contains("vapour-sealed insulated covers to the bare fittings "
                                        "(1 valve)", regex=False).all()


def test_a_failing_build_up_is_replaced_thicker_never_thinner(trap):
    found = remedies_of(trap, "THIN-1")
    assert (found["remedy_thickness [mm]"] > 13.0).all()
    assert found["remedy"].str.startswith("replace the insulation with").all()


def test_no_remedy_on_the_demo_is_thinner_than_installed_or_specified(rules):
    from audit.checks.below_spec import installed_thickness, requirement
    from audit.pipeline import audit_register
    from audit.shipped import shipped_dir

    folder = shipped_dir("sample_data")
    demo = audit_register([folder / "demo_line_list.xlsx", folder / "demo_equipment.xlsx"])
    states = demo.states
    need = requirement(demo.table, demo.rules, states["process_temp_K"].to_numpy(float),
                       states["air_temp_K"].to_numpy(float))
    remedied = demo.findings.dropna(subset=["remedy_thickness [mm]"])
    assert len(remedied) > 20
    rows = remedied["row"].to_numpy(int)
    mm = remedied["remedy_thickness [mm]"].to_numpy(float)
    assert (mm >= installed_thickness(demo.table)[rows] * 1000 - 1e-6).all()
    assert (mm >= need.thickness_m[rows] * 1000 - need.tolerance_m[rows] * 1000 - 1e-6).all()


def test_one_checks_impossibility_does_not_spill_into_anothers_remedy(rules):
    # On the demo plant, cold lines whose condensation no standard thickness clears still get
    # a thickness for their below-spec finding, and that thickness clears below-spec.
    from audit.pipeline import audit_register
    from audit.shipped import shipped_dir

    folder = shipped_dir("sample_data")
    demo = audit_register([folder / "demo_line_list.xlsx", folder / "demo_equipment.xlsx"])
    found = demo.findings[demo.findings["fixable_by_insulation"].astype(bool)]
    stuck = set(found.loc[found["remedy"].str.contains("engineer a solution"), "row"])
    others = found[found["row"].isin(stuck) & found["remedy_thickness [mm]"].notna()]
    assert len(others) >= 3
    for _, finding in others.iterrows():
        left = fixable_rows(demo.table, demo.rules, int(finding["row"]), finding["remedy_material"],
                            finding["remedy_thickness [mm]"] / 1000.0)
        assert finding["check"] not in left, finding["tag"]
