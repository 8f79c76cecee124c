"""condensation (audit/checks/condensation.py): the dew-point limit just either side, cold
items only, bare parts, and the limit against psychrolib."""

import numpy as np
import psychrolib
import pytest
from support import item_table
from scipy.optimize import brentq

from audit.checks import run_checks, validate_checks
from audit.checks.base import CheckContext
from audit.checks.condensation import KIND
from audit.errors import RuleError
from audit.rules import load_rules
from audit.thermal import thermal_states

C = 273.15
HEADER = "tag,nps,length,temp,layers,jacket,rh,condition,damaged,valves,flanges\n"
psychrolib.SetUnitSystem(psychrolib.SI)


def table_for(tmp_path, rows, rules):
    table = item_table(tmp_path, HEADER + rows, rules)
    assert (table["status"] == "ok").all(), table["reason"].tolist()
    return table


def condensation(table, rules):
    return KIND.findings(CheckContext(table, rules), rules.checks["condensation"],
                    validate_checks(rules)["condensation"])


def rules_with(tmp_path, body):
    folder = tmp_path / f"rules-{abs(hash(body))}"
    folder.mkdir()
    (folder / "cond.toml").write_text(
        f"[check.condensation]\nsite = \"humid-design-day\"\nseverity = \"medium\"\n{body}\n"
        "source = \"test\"\n", encoding="utf-8")
    return load_rules([folder])


def test_limit_is_the_psychrolib_dew_point_plus_the_margin(tmp_path, rules):
    # humid-design-day (rules/sites.toml): 30 degC, 85 % RH.  psychrolib 2.5
    # GetTDewPointFromRelHum (ASHRAE 2017 ch. 1) gives 27.199 degC; shipped margin 1 K
    # (common practice).  1e-3 K: psychrolib's own Newton stopping step.
    site = rules.sites["humid-design-day"]
    margin = validate_checks(rules)["condensation"]["margin"]
    assert margin == 1.0
    found = condensation(table_for(tmp_path, "A,4,10,5,elastomeric-foam 9mm,pvc,,intact,,,\n", rules), rules)
    dew = psychrolib.GetTDewPointFromRelHum(site.ambient - C, site.rh / 100)
    assert found["limit"].iloc[0] == pytest.approx(dew + margin, abs=1e-3)
    assert found["rh [%]"].iloc[0] == 85.0
    assert "vapour retarder" in found["remedy"].iloc[0]
    assert "insulation thickness" in found["remedy"].iloc[0]
    assert found["fixable_by_insulation"].iloc[0]


def test_thickness_either_side_of_the_dew_point_limit(tmp_path, rules):
    # The thickness of elastomeric foam at which a 5 degC pipe's surface reaches the dew point
    # + margin on the humid design day, found with the engine; then 1 mm each side.
    check = rules.checks["condensation"]
    site = rules.sites[check.site]
    limit = C + psychrolib.GetTDewPointFromRelHum(site.ambient - C, site.rh / 100) + 1.0
    base = table_for(tmp_path, "A,4,10,5,elastomeric-foam 20mm,pvc,,intact,,,\n", rules)

    def surface(x):
        changed = base.copy()
        changed.at[0, "layer_thicknesses_m"] = (x,)
        return thermal_states(changed, rules, site=check.site)["surface_temp_K"].iloc[0]

    crossing = brentq(lambda x: surface(x) - limit, 0.002, 0.2, xtol=1e-8)
    thin, thick = crossing - 0.001, crossing + 0.001
    # Each side is more than 0.02 K from the limit: far above the psychrolib-vs-ours gap
    # (< 1e-3 K) and the solver's balance closure, so each side is unambiguous.
    assert surface(thin) < limit - 0.02 and surface(thick) > limit + 0.02
    rows = (f"thin,4,10,5,elastomeric-foam {thin * 1000:.4f}mm,pvc,,intact,,,\n"
            f"thick,4,10,5,elastomeric-foam {thick * 1000:.4f}mm,pvc,,intact,,,\n")
    found = condensation(table_for(tmp_path, rows, rules), rules)
    assert list(found["tag"]) == ["thin"]
    assert found["value"].iloc[0] < found["limit"].iloc[0]


def test_only_items_colder_than_the_air_can_fail(tmp_path, rules):
    # Saturated air (rh 100 on the row: dew point = air = 30 degC, limit 31 degC).  A pipe at
    # 30.5 degC has its surface between 30 and 30.5, below the limit, but is warmer than the
    # air: no condensation.  A pipe at 29.5 degC is colder than the air and fails.
    rows = ("warm,4,10,30.5,elastomeric-foam 25mm,pvc,100,intact,,,\n"
            "cold,4,10,29.5,elastomeric-foam 25mm,pvc,100,intact,,,\n")
    table = table_for(tmp_path, rows, rules)
    states = thermal_states(table, rules, site="humid-design-day")
    assert (states["surface_temp_K"] - C < 31).all()
    found = condensation(table, rules)
    assert list(found["tag"]) == ["cold"]
    assert found["limit"].iloc[0] == pytest.approx(31.0, abs=1e-6)


def test_bare_parts_are_the_coldest_surface(tmp_path, rules):
    # 60 mm of foam keeps the jacket above the limit; the bare share of damaged insulation
    # and a bare flange sit at the process temperature and fail.
    rows = ("intact,4,10,5,elastomeric-foam 60mm,pvc,,intact,,,\n"
            "damaged,4,10,5,elastomeric-foam 60mm,pvc,,damaged,10,,\n"
            "flange,4,10,5,elastomeric-foam 60mm,pvc,,intact,,,1\n"
            "bare,4,10,5,none,,,intact,,,\n")
    table = table_for(tmp_path, rows, rules)
    found = condensation(table, rules)
    assert list(found["tag"]) == ["damaged", "flange", "bare"]
    states = thermal_states(table, rules, site="humid-design-day")
    for r in range(3):
        assert found["value"].iloc[r] == pytest.approx(states["surface_temp_K"][r + 1] - C)
        assert found["remedy"].iloc[r] == "insulate the bare parts, with a sealed vapour retarder"
    assert "damaged insulation (10 %)" in found["message"].iloc[0]
    assert "1 flanges" in found["message"].iloc[1]


def test_dry_air_cannot_condense_and_does_not_crash(tmp_path, rules):
    # 0 % RH on the row: no dew point (NaN by the psychrometrics module's rule), no finding.
    rows = ("dry,4,10,5,none,,0,intact,,,\n"
            "humid,4,10,5,none,,,intact,,,\n")
    found = condensation(table_for(tmp_path, rows, rules), rules)
    assert list(found["tag"]) == ["humid"]


@pytest.mark.parametrize("margin, expected", [("2", 2.0), ('"1.8 delta_degF"', 1.0), ('"0.5 K"', 0.5)])
def test_margin_is_a_temperature_difference(tmp_path, margin, expected):
    rules = rules_with(tmp_path, f"margin = {margin}")
    assert validate_checks(rules)["condensation"]["margin"] == pytest.approx(expected)


@pytest.mark.parametrize("margin", ['"1 degC"', "-1"])
def test_a_level_or_a_negative_margin_is_a_rule_error(tmp_path, margin):
    rules = rules_with(tmp_path, f"margin = {margin}")
    with pytest.raises(RuleError) as err:
        validate_checks(rules)
    assert "check.condensation.margin" in str(err.value)


def test_margin_moves_the_limit(tmp_path, rules):
    table = table_for(tmp_path, "A,4,10,5,elastomeric-foam 9mm,pvc,,intact,,,\n", rules)
    wide = rules_with(tmp_path, "margin = 3")
    one = condensation(table, rules)["limit"].iloc[0]
    three = condensation(table, wide)["limit"].iloc[0]
    assert three - one == pytest.approx(2.0, abs=1e-9)


def test_run_checks_includes_condensation(tmp_path, rules):
    table = table_for(tmp_path, "A,4,10,5,none,,,intact,,,\n", rules)
    found = run_checks(CheckContext(table, rules))
    assert "condensation" in set(found["check"])
    assert np.isfinite(found.loc[found["check"] == "condensation", "limit"]).all()
