"""condition (audit/checks/condition.py): missing, damaged, wet insulation and bare fittings.

These checks read facts of the register (no published limit is involved): the tests check
each combination of conditions, the two thresholds either side, the value/limit columns and
that rejected rows never produce findings.
"""

from dataclasses import replace

import pytest
from support import item_table, refused_parameter

from audit.checks import run_checks
from audit.checks.base import CheckContext, validated_params
from audit.checks.condition import (COVERS, COVERS_COLD, DRY_OUT, KIND, REINSTATE_DAMAGED,
                                    REINSTATE_MISSING)

HEAD = "tag,nps,length,temp,insulation,thickness,location,condition,damaged,valves,flanges\n"


def table_from(tmp_path, text, rules):
    return item_table(tmp_path, HEAD + text, rules)


def run(table, rules, name="condition", **params):
    shipped = rules.checks[name]
    check = replace(shipped, params={**shipped.params, **params})
    found = KIND.findings(CheckContext(table, rules), check, validated_params(check, KIND))
    return {t: (v, lim, m, r) for t, v, lim, m, r in
            zip(found["tag"], found["value"], found["limit"], found["message"], found["remedy"])}


REGISTER = ("INTACT,4,10,150,mineral-wool,50,outdoor,intact,,0,0\n"
            "MISSING,4,10,150,mineral-wool,50,outdoor,missing,,0,2\n"
            "DAMAGED,4,10,150,mineral-wool,50,outdoor,damaged,15,2,0\n"
            "WET,4,10,150,mineral-wool,50,outdoor,wet,,1,1\n"
            "FITTINGS,4,10,150,mineral-wool,50,outdoor,intact,,0,3\n"
            "BARE,4,10,150,none,,outdoor,intact,,2,2\n")


def test_shipped_condition_check(tmp_path, rules):
    got = run(table_from(tmp_path, REGISTER, rules), rules)
    assert set(got) == {"MISSING", "DAMAGED", "WET"}
    assert got["MISSING"] == (100.0, 0.0, "insulation missing: 100 % of the length bare",
                              REINSTATE_MISSING)
    assert got["DAMAGED"] == (15.0, 0.0, "damaged: 15 % of the length bare",
                              REINSTATE_DAMAGED)
    assert got["WET"] == (0.0, 0.0, "wet insulation", DRY_OUT)


def test_shipped_fittings_check(tmp_path, rules):
    got = run(table_from(tmp_path, REGISTER, rules), rules, "uninsulated-fittings")
    # MISSING (its flanges are bare with the rest) and BARE (no insulation) are not flagged.
    assert set(got) == {"DAMAGED", "WET", "FITTINGS"}
    assert got["DAMAGED"] == (2.0, 1.0, "2 uninsulated valves", COVERS)
    assert got["WET"] == (2.0, 1.0, "1 uninsulated valve; 1 uninsulated flange", COVERS)
    assert got["FITTINGS"][:3] == (3.0, 1.0, "3 uninsulated flanges")


def test_one_finding_lists_everything_that_applies(tmp_path, rules):
    got = run(table_from(tmp_path, REGISTER, rules), rules,
              flags=["missing", "damaged", "wet", "fittings"])
    assert got["DAMAGED"][2] == "damaged: 15 % of the length bare; 2 uninsulated valves"
    assert got["DAMAGED"][3] == f"{REINSTATE_DAMAGED}; {COVERS}"
    assert got["WET"][2] == "wet insulation; 1 uninsulated valve; 1 uninsulated flange"
    assert got["WET"][3] == f"{DRY_OUT}; {COVERS}"
    assert got["FITTINGS"][:2] == (0.0, 0.0)   # mixed check: value is the bare share
    assert "INTACT" not in got and "BARE" not in got


def test_covers_on_cold_service_are_vapour_sealed(tmp_path, rules):
    # Common practice: a cover on a cold line keeps moist air off the cold metal, so it is
    # vapour-sealed like the insulation around it (a plain cover lets the fitting sweat).
    table = table_from(tmp_path, "COLD,2,10,5,elastomeric-foam,50,indoor,intact,,0,2\n"
                                 "HOT,2,10,150,mineral-wool,50,indoor,intact,,0,2\n", rules)
    got = run(table, rules, "uninsulated-fittings")
    assert got["COLD"][3] == COVERS_COLD and got["HOT"][3] == COVERS


@pytest.mark.parametrize("share, flagged", [(4.9, False), (5.0, False), (5.1, True)])
def test_damaged_threshold_either_side(tmp_path, rules, share, flagged):
    table = table_from(tmp_path, f"D,4,10,150,mineral-wool,50,outdoor,damaged,{share},0,0\n", rules)
    got = run(table, rules, damaged_threshold=5)
    assert ("D" in got) is flagged
    if flagged:
        assert got["D"][:2] == (share, 5.0)


@pytest.mark.parametrize("valves, flanges, flagged", [(1, 1, False), (2, 1, True), (0, 3, True)])
def test_min_fittings_either_side(tmp_path, rules, valves, flanges, flagged):
    table = table_from(tmp_path, f"F,4,10,150,mineral-wool,50,outdoor,intact,,{valves},{flanges}\n",
                       rules)
    got = run(table, rules, "uninsulated-fittings", min_fittings=3)
    assert ("F" in got) is flagged


def test_rejected_rows_never_produce_findings(tmp_path, rules):
    text = ("R1,4,10,150,mineral-wool,50,mars,missing,,0,0\n"       # unknown location
            "R2,4,10,150,mineral-wool,50,outdoor,damaged,,2,2\n"    # damaged share empty
            "R3,4,10,,mineral-wool,50,outdoor,wet,,1,0\n")          # no temperature
    table = table_from(tmp_path, text, rules)
    assert set(table["status"]) == {"rejected"}
    assert run(table, rules, flags=["missing", "damaged", "wet", "fittings"]) == {}
    assert len(run_checks(CheckContext(table, rules))) == 0


def test_run_checks_reports_both_shipped_checks(tmp_path, rules):
    table = table_from(tmp_path, "A,4,10,150,mineral-wool,50,outdoor,damaged,15,2,0\n", rules)
    found = run_checks(CheckContext(table, rules))
    mine = found[found["kind"] == "condition"]
    assert dict(zip(mine["check"], mine["severity"])) == {"condition": "medium",
                                                         "uninsulated-fittings": "low"}
    assert dict(zip(mine["check"], mine["unit"])) == {"condition": "%",
                                                     "uninsulated-fittings": "fittings"}
    assert not mine["fixable_by_insulation"].any()


@pytest.mark.parametrize("key, value", [("flags", ["rusty"]), ("flags", []),
                                        ("min_fittings", 0), ("damaged_threshold", 120)])
def test_invalid_parameters_name_the_key(rules, key, value):
    refused_parameter(rules, "condition", KIND, key, value)
