"""heat-loss-limit (audit/checks/heat_loss_limit.py): each limit just inside and just outside,
the multiple-of-specification reference re-computed with the engine, heat gains, validation."""

import numpy as np
import pytest

from audit.checks import validate_checks
from audit.checks.base import CheckContext, validated_params
from audit.checks.heat_loss_limit import KIND
from audit.errors import RuleError
from audit.io.readers import read_register
from audit.rules import load_rules
from audit.thermal import resolve_names, thermal_states

SPEC = """
[spec.heat-conservation]
material = "mineral-wool"
bands = [[50, 400]]
sizes = [48]
thickness = [[50]]
flat = [80]
tolerance = 3
source = "test fixture"

[spec.cold]
material = "elastomeric-foam"
bands = [[-40, 15]]
sizes = [48]
thickness = [[25]]
flat = [40]
tolerance = 2
source = "test fixture"
"""

HEADER = "tag,shape,nps,od,length,temp,layers,jacket,condition,damaged,service\n"
SITE = "outdoor-annual-mean"
# Relative step either side of a boundary computed with the engine itself: far above the
# round-off of re-evaluating the same states, far below any physical difference.
STEP = 1e-6


def rules_with(tmp_path, check_body, name="limit"):
    folder = tmp_path / f"rules-{name}"
    folder.mkdir()
    (folder / "spec.toml").write_text(SPEC, encoding="utf-8")
    (folder / "check.toml").write_text(
        f'[check.{name}]\nkind = "heat-loss-limit"\nsite = "{SITE}"\nseverity = "low"\n'
        f'source = "test fixture"\n{check_body}\n', encoding="utf-8")
    return load_rules([folder])


def table_of(tmp_path, rules, rows):
    path = tmp_path / "reg.csv"
    path.write_text(HEADER + "".join(r + "\n" for r in rows), encoding="utf-8")
    table = resolve_names(read_register(path, aliases=rules.aliases), rules)
    assert (table["status"] == "ok").all(), list(table["reason"])
    return table


def evaluate_with(tmp_path, table, check_body, name="limit"):
    rules = rules_with(tmp_path, check_body, name)
    check = rules.checks[name]
    return KIND.findings(CheckContext(table, rules), check, validated_params(check, KIND))


HOT_PIPE = "P,pipe,4,,10,200,mineral-wool 50mm,aluminium-oxidised,intact,,heat-conservation"
HOT_VESSEL = ("V,vertical-vessel,,2000,5,200,mineral-wool 50mm,aluminium-oxidised,intact,,"
              "heat-conservation")


@pytest.fixture(scope="module")
def base_rules(tmp_path_factory):
    return rules_with(tmp_path_factory.mktemp("base"), "per_m = 1")


def test_per_metre_limit_either_side_of_the_computed_loss(tmp_path, base_rules):
    table = table_of(tmp_path, base_rules, [HOT_PIPE, HOT_VESSEL])
    q = thermal_states(table, base_rules, site=SITE)["heat_loss_W_per_m"][0]
    assert q > 0
    inside = evaluate_with(tmp_path, table, f"per_m = {float(q * (1 + STEP))!r}", "inside")
    outside = evaluate_with(tmp_path, table, f"per_m = {float(q * (1 - STEP))!r}", "outside")
    assert list(inside["tag"]) == []
    # The vessel has no per-metre loss: per_m is for pipes only.
    assert list(outside["tag"]) == ["P"]
    assert outside["value"][0] == pytest.approx(q, rel=1e-12)
    assert outside["unit"][0] == "W/m" and bool(outside["fixable_by_insulation"][0])
    # Evaluated under the check's site, whatever the item's own location.
    assert outside["air_temp [degC]"][0] == pytest.approx(base_rules.sites[SITE].ambient - 273.15)


def test_per_square_metre_limit_for_any_shape(tmp_path, base_rules):
    table = table_of(tmp_path, base_rules, [HOT_PIPE, HOT_VESSEL])
    states = thermal_states(table, base_rules, site=SITE)
    flux = (states["heat_loss_W"] / states["outer_area_m2"]).to_numpy()
    low, high = sorted(flux)
    between = evaluate_with(tmp_path, table, f"per_m2 = {float(low * (1 + STEP))!r}", "between")
    assert list(between["tag"]) == [["P", "V"][int(np.argmax(flux))]]
    assert between["value"][0] == pytest.approx(high, rel=1e-12)
    assert between["unit"][0] == "W/m2"
    below_both = evaluate_with(tmp_path, table, f"per_m2 = {float(low * (1 - STEP))!r}", "below")
    assert list(below_both["tag"]) == ["P", "V"]
    above_both = evaluate_with(tmp_path, table, f"per_m2 = {float(high * (1 + STEP))!r}", "above")
    assert list(above_both["tag"]) == []


def test_heat_gain_of_a_cold_item_compares_by_magnitude(tmp_path, base_rules):
    table = table_of(tmp_path, base_rules,
                     ["COLD,pipe,4,,10,-30,elastomeric-foam 19mm,aluminium-oxidised,intact,,cold"])
    q = thermal_states(table, base_rules, site=SITE)["heat_loss_W_per_m"][0]
    assert q < 0   # a heat gain, negative by the contract
    inside = evaluate_with(tmp_path, table, f"per_m = {float(-q * (1 + STEP))!r}", "inside")
    outside = evaluate_with(tmp_path, table, f"per_m = {float(-q * (1 - STEP))!r}", "outside")
    assert list(inside["tag"]) == [] and list(outside["tag"]) == ["COLD"]
    assert outside["value"][0] == pytest.approx(-q, rel=1e-12)
    assert outside["message"][0].startswith("heat gain")


def test_multiple_of_spec_against_the_engine_at_the_spec_thickness(tmp_path, base_rules):
    thin = table_of(tmp_path, base_rules, [
        "THIN,pipe,4,,10,200,calcium-silicate 25mm,aluminium-oxidised,intact,,heat-conservation",
        "HURT,pipe,4,,10,200,mineral-wool 50mm,aluminium-oxidised,damaged,20,heat-conservation",
        "ASSPEC,pipe,4,,10,200,mineral-wool 50mm,aluminium-oxidised,intact,,heat-conservation"])
    # The same items insulated to the specification (50 mm mineral wool, intact), solved by
    # the engine independently of the check.
    spec = table_of(tmp_path, base_rules, [
        "THIN,pipe,4,,10,200,mineral-wool 50mm,aluminium-oxidised,intact,,heat-conservation",
        "HURT,pipe,4,,10,200,mineral-wool 50mm,aluminium-oxidised,intact,,heat-conservation",
        "ASSPEC,pipe,4,,10,200,mineral-wool 50mm,aluminium-oxidised,intact,,heat-conservation"])
    q = thermal_states(thin, base_rules, site=SITE)["heat_loss_W"].to_numpy()
    q_spec = thermal_states(spec, base_rules, site=SITE)["heat_loss_W"].to_numpy()
    ratio = q / q_spec
    # Both worse than specification; the item as specified is exactly 1.
    assert ratio[0] > 1 and ratio[1] > 1 and ratio[2] == pytest.approx(1.0, rel=1e-12)
    # Factor 1: everything worse than specification is flagged, the item as specified is not.
    found = evaluate_with(tmp_path, thin, "multiple_of_spec = 1.0", "one")
    assert list(found["tag"]) == ["THIN", "HURT"]
    # The engine solves each element alone to its own tolerance; batch order cannot matter
    # beyond round-off.
    np.testing.assert_allclose(found["value"], ratio[:2], rtol=1e-9)
    assert list(found["unit"]) == ["times spec", "times spec"]
    assert "50 mm of mineral-wool" in found["message"][0]
    # Just either side of the thin item's own ratio.
    inside = evaluate_with(tmp_path, thin.iloc[[0]].reset_index(drop=True),
                           f"multiple_of_spec = {float(ratio[0] * (1 + STEP))!r}", "inside")
    outside = evaluate_with(tmp_path, thin.iloc[[0]].reset_index(drop=True),
                            f"multiple_of_spec = {float(ratio[0] * (1 - STEP))!r}", "outside")
    assert list(inside["tag"]) == [] and list(outside["tag"]) == ["THIN"]


def test_multiple_of_spec_for_a_vessel_and_a_cold_pipe(tmp_path, base_rules):
    items = table_of(tmp_path, base_rules, [
        "V,vertical-vessel,,2000,5,200,mineral-wool 40mm,aluminium-oxidised,intact,,",
        "C,pipe,4,,10,-30,elastomeric-foam 13mm,aluminium-oxidised,intact,,cold"])
    specified = table_of(tmp_path, base_rules, [
        "V,vertical-vessel,,2000,5,200,mineral-wool 80mm,aluminium-oxidised,intact,,",
        "C,pipe,4,,10,-30,elastomeric-foam 25mm,aluminium-oxidised,intact,,cold"])
    q = thermal_states(items, base_rules, site=SITE)["heat_loss_W"].to_numpy()
    q_spec = thermal_states(specified, base_rules, site=SITE)["heat_loss_W"].to_numpy()
    assert q[1] < 0 and q_spec[1] < 0
    found = evaluate_with(tmp_path, items, "multiple_of_spec = 1.0", "one")
    assert list(found["tag"]) == ["V", "C"]
    np.testing.assert_allclose(found["value"], np.abs(q) / np.abs(q_spec), rtol=1e-9)


def test_no_requirement_no_multiple_of_spec_comparison(tmp_path, base_rules):
    # 30 degC is outside the specification's bands: bare, but nothing to compare with.
    table = table_of(tmp_path, base_rules,
                     ["WARM,pipe,4,,10,30,none,,intact,,heat-conservation"])
    assert list(evaluate_with(tmp_path, table, "multiple_of_spec = 1.0")["tag"]) == []


def test_one_finding_per_item_for_the_largest_excess(tmp_path, base_rules):
    table = table_of(tmp_path, base_rules, [HOT_PIPE])
    states = thermal_states(table, base_rules, site=SITE)
    per_m = states["heat_loss_W_per_m"][0]
    per_m2 = states["heat_loss_W"][0] / states["outer_area_m2"][0]
    found = evaluate_with(tmp_path, table,
                          f"per_m = {float(per_m / 2)!r}\nper_m2 = {float(per_m2 / 3)!r}")
    assert len(found) == 1
    assert found["unit"][0] == "W/m2" and found["limit"][0] == pytest.approx(per_m2 / 3)
    assert "W/m," in found["message"][0] and "W/m2" in found["message"][0]


def test_a_check_without_any_limit_is_a_rule_error(tmp_path, base_rules):
    table = table_of(tmp_path, base_rules, [HOT_PIPE])
    with pytest.raises(RuleError) as err:
        evaluate_with(tmp_path, table, "", "bare")
    assert err.value.column == "check.bare" and err.value.file.endswith("check.toml")
    assert "per_m" in err.value.expected


@pytest.mark.parametrize("body", ["per_m = -5", "per_m2 = 0", "multiple_of_spec = 0.5",
                                  'per_m = "5 kelvin"'])
def test_invalid_limits_are_rule_errors(tmp_path, body):
    rules = rules_with(tmp_path, body)
    with pytest.raises(RuleError) as err:
        validate_checks(rules)
    assert err.value.problems[0].column.startswith("check.limit.")


def test_limits_take_units(tmp_path, base_rules):
    rules = rules_with(tmp_path, 'per_m = "10 Btu/(h*ft)"')
    params = validated_params(rules.checks["limit"], KIND)
    # 1 Btu_IT/h = 2.930711E-01 W (NIST SP 811, 2008, appendix B.9); 1 ft = 0.3048 m exactly.
    # 1e-6: NIST gives 7 significant digits, and pint's Btu is the ISO 1055.056 J.
    assert params["per_m"] == pytest.approx(10 * 0.2930711 / 0.3048, rel=1e-6)


def test_shipped_check_runs_under_the_annual_mean_site_and_says_it_is_invented():
    rules = load_rules()
    check = rules.checks["heat-loss-limit"]
    assert check.kind == "heat-loss-limit" and check.site == "outdoor-annual-mean"
    assert "INVENTED" in check.source
    params = validated_params(check, KIND)
    assert params == {"multiple_of_spec": 1.5}
