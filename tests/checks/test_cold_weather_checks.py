"""tracing-shortfall, freeze-risk and temperature-drop (audit/checks/tracing_shortfall.py,
freeze_risk.py, temperature_drop.py): each item just inside and just outside its limit.

The limits are computed values (a heat loss, a time, a temperature); each pair is built around
the value the engine gives for the item, read first, so the pair straddles it by a stated step.
"""

import numpy as np
import pytest

from audit.checks.base import CheckContext, validated_params
from audit.checks.freeze_risk import KIND as FREEZE
from audit.checks.temperature_drop import KIND as DROP
from audit.checks.tracing_shortfall import KIND as TRACING
from audit.coldweather import freeze_times, outlet_temperatures, tracing_needed
from support import item_table, refused_parameter

C = 273.15
HEAD = "tag,nps,length,temp,layers,jacket,location,tracing,maintain,flow,fluid\n"
TRACED = "{tag},4,100,60,mineral-wool 50,aluminium-oxidised,outdoor,{tracing},40,,"
STILL = "{tag},2,40,8,mineral-wool 25,aluminium-oxidised,outdoor,{tracing},,,water"
FLOWING = "{tag},6,600,80,mineral-wool 40,aluminium-oxidised,outdoor,none,{maintain},5,water"


def findings(tmp_path, rules, kind, name, rows):
    table = item_table(tmp_path, HEAD + "\n".join(rows) + "\n", rules)
    assert (table["status"] == "ok").all(), table["reason"].tolist()
    check = rules.checks[name]
    context = CheckContext(table, rules)
    return context, kind.findings(context, check, validated_params(check, kind))


def test_tracing_shortfall_either_side_of_the_need(tmp_path, rules):
    check = rules.checks["tracing-shortfall"]
    margin = validated_params(check, TRACING)["margin"]
    context, _ = findings(tmp_path, rules, TRACING, "tracing-shortfall",
                          [TRACED.format(tag="PROBE", tracing="electric 1 W/m")])
    need = tracing_needed(context, check.site, margin)[0]
    # 0.05 W/m either side of the need: far above the solver's closure (1e-9 relative).
    _, found = findings(tmp_path, rules, TRACING, "tracing-shortfall", [
        TRACED.format(tag="IN", tracing=f"electric {need + 0.05:.4f} W/m"),
        TRACED.format(tag="OUT", tracing=f"electric {need - 0.05:.4f} W/m"),
        TRACED.format(tag="OUT-2", tracing=f"electric 2x{(need - 0.1) / 2:.4f} W/m"),
        TRACED.format(tag="STEAM-UNKNOWN", tracing="steam 1in"),
    ])
    assert set(found["tag"]) == {"OUT", "OUT-2", "STEAM-UNKNOWN"}
    out = found.set_index("tag")
    assert out.loc["OUT", "limit"] == pytest.approx(need, rel=1e-9)
    assert out.loc["OUT", "unit"] == "W/m"
    assert "tracing supplier" in out.loc["OUT", "remedy"]
    assert "not in the rules' steam_tracers" in out.loc["STEAM-UNKNOWN", "message"]


def test_steam_tracer_output_against_its_table(tmp_path, rules):
    # steam_tracers of the shipped rules: 1/2 in at 0.4 W/(m K) (from memory, as the rule says);
    # at 150 degC steam and a 40 degC maintain: 0.4 x 110 = 44 W/m, above this line's need.
    params = validated_params(rules.checks["tracing-shortfall"], TRACING)
    assert dict(params["steam_tracers"])[0.5] == pytest.approx(0.4)
    context, found = findings(tmp_path, rules, TRACING, "tracing-shortfall", [
        TRACED.format(tag="STEAM", tracing="steam 1/2in"),
        TRACED.format(tag="STEAM-COOL", tracing="steam 1/2in 41 degC")])
    assert set(found["tag"]) == {"STEAM-COOL"}
    assert found["value"].iloc[0] == pytest.approx(0.4 * 1.0)


def test_freeze_risk_either_side_of_the_hold_time(tmp_path, rules):
    check = rules.checks["freeze-risk"]
    params = validated_params(check, FREEZE)
    context, _ = findings(tmp_path, rules, FREEZE, "freeze-risk",
                          [STILL.format(tag="PROBE", tracing="none")])
    hours = freeze_times(context, check.site, params["frozen_share"])[0] / 3600
    assert np.isfinite(hours)
    table = context.table
    for hold, flagged in ((hours - 0.01, False), (hours + 0.01, True)):
        found = FREEZE.findings(CheckContext(table, rules), check,
                                {**params, "hold_time": hold})
        assert (len(found) == 1) is flagged
    # A traced line is tracing-shortfall's, never freeze-risk's.
    _, found = findings(tmp_path, rules, FREEZE, "freeze-risk",
                        [STILL.format(tag="TRACED", tracing="electric 10 W/m")])
    assert found.empty


def test_temperature_drop_either_side_of_maintain(tmp_path, rules):
    check = rules.checks["temperature-drop"]
    context, _ = findings(tmp_path, rules, DROP, "temperature-drop",
                          [FLOWING.format(tag="PROBE", maintain=10)])
    outlet = outlet_temperatures(context, check.site)[0] - C
    # 0.01 K either side of the outlet temperature the march gives.
    _, found = findings(tmp_path, rules, DROP, "temperature-drop", [
        FLOWING.format(tag="IN", maintain=f"{outlet - 0.01:.4f}"),
        FLOWING.format(tag="OUT", maintain=f"{outlet + 0.01:.4f}")])
    assert set(found["tag"]) == {"OUT"}
    assert found["value"].iloc[0] == pytest.approx(outlet, abs=1e-9)
    assert found["unit"].iloc[0] == "degC"


@pytest.mark.parametrize("name, kind, key, value", [
    ("tracing-shortfall", TRACING, "margin", 0.9),
    ("tracing-shortfall", TRACING, "steam_tracers", [[0.5, 0.4], [0.375, 0.3]]),
    ("freeze-risk", FREEZE, "frozen_share", 1.5),
    ("freeze-risk", FREEZE, "hold_time", 0),
])
def test_bad_parameters_are_refused_naming_the_key(rules, name, kind, key, value):
    refused_parameter(rules, name, kind, key, value)


def test_the_checks_are_judged_on_the_cold_design_day(rules):
    for name in ("tracing-shortfall", "freeze-risk", "temperature-drop"):
        assert rules.checks[name].site == "cold-design-day"
    assert rules.sites["cold-design-day"].ambient < 273.15
    assert "INVENTED" in rules.sites["cold-design-day"].source
    assert "common practice" in rules.checks["freeze-risk"].source.lower()
    assert "from memory" in validated_params(rules.checks["tracing-shortfall"],
                                             TRACING)["steam_source"].lower()


def test_the_tracing_remedy_is_the_smallest_standard_thickness_that_suffices(tmp_path, rules):
    from audit.pipeline import audit_table
    line = "{tag},4,100,60,{layers},aluminium-oxidised,outdoor,electric 20 W/m,50,,"
    table = item_table(tmp_path, HEAD + line.format(tag="SHORT", layers="mineral-wool 25") + "\n",
                       rules)
    found = audit_table(table, rules).findings
    finding = found[found["check"] == "tracing-shortfall"].iloc[0]
    assert finding["remedy_action"] == "insulate"
    mm, material = finding["remedy_thickness [mm]"], finding["remedy_material"]
    standard = [t * 1000 for t in rules.thicknesses]
    thinner = max(t for t in standard if t < mm - 1e-9)
    # Re-run the engine at the remedy and one standard step thinner: passes, then fails.
    _, at = findings(tmp_path, rules, TRACING, "tracing-shortfall",
                     [line.format(tag="AT", layers=f"{material} {mm:g}mm"),
                      line.format(tag="THINNER", layers=f"{material} {thinner:g}mm")])
    assert set(at["tag"]) == {"THINNER"}


def test_an_unknown_tracer_is_sent_to_the_rules_not_to_a_thickness(tmp_path, rules):
    # No thickness can make an output nobody knows suffice: the finding asks for the tracer's
    # data and offers no insulation, while a known tracer on the same table still gets one.
    from audit.pipeline import audit_table
    line = "{tag},4,100,60,mineral-wool 25,aluminium-oxidised,outdoor,{tracing},50,,"
    table = item_table(tmp_path, HEAD + "\n".join([
        line.format(tag="UNKNOWN", tracing="steam 1in"),
        line.format(tag="KNOWN", tracing="electric 20 W/m")]) + "\n", rules)
    found = audit_table(table, rules).findings
    found = found[found["check"] == "tracing-shortfall"].set_index("tag")
    unknown, known = found.loc["UNKNOWN"], found.loc["KNOWN"]
    assert not unknown["fixable_by_insulation"] and known["fixable_by_insulation"]
    assert unknown["remedy"].startswith("add the tracer's conductance")
    assert "standard thickness" not in unknown["remedy"] and unknown["remedy_action"] == ""
    assert np.isnan(unknown["remedy_thickness [mm]"])
    assert known["remedy_action"] == "insulate"
