"""The one-item what-if (audit/calc.py): same answer as the engine's solve_item, US units by
published conversion factors, failed checks reported, bad flags refused."""

import argparse
import re
import tempfile

import pytest

from audit import thermal
from audit.calc import (FLAG_COLUMNS, _cell, _read_one, add_calc_arguments, calc_item, convert,
                        format_calc, run_calc)
from audit.engine import solve_item
from audit.errors import LagauditError
from audit.pipeline import audit_table
from audit.rules import load_rules

ZERO_C = 273.15  # K, definition of the Celsius scale
INCH = 0.0254    # m, exact (international inch, 1959)
# Engine closure is 1e-6 relative (audit/engine/solver.py); both paths solve the same balance, so
# agreement to that order is what can be asked of two calls that build their inputs differently.
RTOL = 1e-6


@pytest.fixture(scope="module")
def rules():
    return load_rules()


def _k(rules, name):
    return rules.materials[name].k  # (K, W/(m K)) rows, as the engine takes them


def test_pipe_matches_solve_item(rules):
    r = calc_item(rules=rules, nps="4", length="10", temp="250",
                  layers="calcium-silicate 50mm + mineral-wool 2in", jacket="aluminium-oxidised",
                  ambient="20", wind="2", material="carbon-steel")
    ref = solve_item(
        temp=250 + ZERO_C, ambient=20 + ZERO_C,
        od=0.1143,  # NPS 4: OD 4.500 in = 114.3 mm, ASME B36.10M table 1
        length=10.0, layers=[(_k(rules, "calcium-silicate"), 0.050),
                             (_k(rules, "mineral-wool"), 2 * INCH)],
        emissivity=rules.jackets["aluminium-oxidised"].emissivity,
        bare_emissivity=rules.metals["carbon-steel"].emissivity, wind=2.0)
    s = r.state
    assert s["surface_temp_K"] == pytest.approx(ref.surface_temp, rel=RTOL)
    assert s["heat_loss_W_per_m"] == pytest.approx(ref.heat_loss_per_m, rel=RTOL)
    assert s["heat_loss_W"] == pytest.approx(ref.heat_loss, rel=RTOL)
    assert s["heat_flux_W_m2"] == pytest.approx(ref.heat_flux, rel=RTOL)
    interfaces = [s[f"interface_{j}_K"] for j in range(3)]
    assert interfaces == pytest.approx(list(ref.interface_temps), rel=RTOL)
    assert 20 + ZERO_C < ref.surface_temp < ref.interface_temps[1] < 250 + ZERO_C  # sane order


def test_vessel_in_us_notation_matches_solve_item(rules):
    r = calc_item(rules=rules, shape="vertical-vessel", od="2.4 m", length="9",
                  heads="hemispherical", temp="300 F", layers="mineral-wool 3in",
                  emissivity="0.9", ambient="77 degF", wind="0")
    ref = solve_item(temp=(300 - 32) / 1.8 + ZERO_C,  # degF -> K, scale definitions
                     ambient=25 + ZERO_C, od=2.4, length=9.0, shape="vertical-vessel",
                     heads="hemispherical", layers=[(_k(rules, "mineral-wool"), 3 * INCH)],
                     emissivity=0.9, wind=0.0)
    assert r.state["surface_temp_K"] == pytest.approx(ref.surface_temp, rel=RTOL)
    assert r.state["heat_loss_W"] == pytest.approx(ref.heat_loss, rel=RTOL)
    assert r.state["outer_area_m2"] == pytest.approx(ref.outer_area, rel=1e-12)  # same geometry


def test_pipe_without_length_is_per_metre(rules):
    r = calc_item(rules=rules, nps="2", temp="150", layers="mineral-wool 40mm")
    assert r.item["length_m"] == 1.0
    assert r.state["heat_loss_W"] == pytest.approx(r.state["heat_loss_W_per_m"], rel=1e-12)


# US conversions against NIST SP 811 (2008), appendix B.9 (from memory, 7 significant figures):
# 1 Btu_IT/h = 0.2930711 W; 1 Btu_IT/(h ft2) = 3.154591 W/m2; 1 ft = 0.3048 m (exact).
@pytest.mark.parametrize("kind, si, us, label", [
    ("heat_rate", 0.2930711, 1.0, "Btu/h"),
    ("heat_flux", 3.154591, 1.0, "Btu/(h ft2)"),
    ("heat_rate_per_length", 0.2930711 / 0.3048, 1.0, "Btu/h/ft"),
    ("thickness", 25.4, 1.0, "in"),          # exact
    ("length", 0.3048, 1.0, "ft"),           # exact
    ("speed", 0.44704, 1.0, "mph"),          # exact: 1609.344 m / 3600 s
    ("temperature", 100.0, 212.0, "degF"),   # boiling point of water on both scales
    ("temperature", -40.0, -40.0, "degF"),   # where the scales cross
])
def test_us_conversion_factors(kind, si, us, label):
    value, unit = convert(si, kind, "us")
    assert unit == label
    assert value == pytest.approx(us, rel=2e-7, abs=1e-9)  # 7 significant figures in the source


def test_si_is_unchanged_and_unknown_system_refused():
    assert convert(12.5, "heat_flux", "si") == (12.5, "W/m2")
    with pytest.raises(LagauditError, match="unit system"):
        convert(1.0, "heat_flux", "imperial")


def _row(text, label):
    match = re.search(rf"^  {re.escape(label)}\s+(-?[\d.]+)\s+(\S.*)$", text, re.MULTILINE)
    assert match, f"no line {label!r} in:\n{text}"
    return float(match.group(1)), match.group(2)


def test_printed_table_in_si_and_us(rules):
    r = calc_item(rules=rules, nps="6", length="20", temp="200",
                  layers="calcium-silicate 40mm + mineral-wool 40mm", ambient="20", wind="1")
    si, us = format_calc(r, "si"), format_calc(r, "us")
    t_si, unit = _row(si, "surface temperature (worst part)")
    assert unit == "degC"
    assert t_si == pytest.approx(r.state["surface_temp_K"] - ZERO_C, abs=0.05)  # printed to 0.1
    t_us, unit = _row(us, "surface temperature (worst part)")
    assert unit == "degF"
    assert t_us == pytest.approx(t_si * 1.8 + 32, abs=0.05 * 1.8 + 0.05)  # both rounded to 0.1
    q_si, _ = _row(si, "heat loss per metre of run")
    q_us, unit = _row(us, "heat loss per foot of run")
    assert unit == "Btu/h/ft"
    assert q_us == pytest.approx(q_si * 0.3048 / 0.2930711, rel=1e-3)  # NIST SP 811, see above
    for label in ("hot face of layer 1 (calcium-silicate)", "hot face of layer 2 (mineral-wool)",
                  "heat loss, whole item", "heat flux at the outer surface"):
        _row(si, label)
        _row(us, label)
    assert "Conditions" in si and "air              20.0 degC, wind 1 m/s" in si


def test_failed_checks_listed_with_value_limit_and_remedy(rules):
    r = calc_item(rules=rules, nps="3", length="5", temp="180", layers="none", accessible=True,
                  material="carbon-steel")
    checks = set(r.findings["check"])
    assert {"touch-temperature", "below-spec"} <= checks
    touch = r.findings.loc[r.findings["check"] == "touch-temperature"].iloc[0]
    assert touch["value"] > touch["limit"] == 60.0  # rules/checks-touch.toml limit_metal
    text = format_calc(r)
    assert "touch-temperature [high]" in text and "against a limit of 60.0 degC" in text
    assert "remedy:" in text
    assert "Insulation: bare metal" in text


def test_cold_item_condensation(rules):
    r = calc_item(rules=rules, nps="2", temp="-30", layers="elastomeric-foam 13mm",
                  material="stainless-steel", service="cold")
    assert "condensation" in set(r.findings["check"])
    assert "Checks failed" in format_calc(r, "us")


def test_clean_item_fails_nothing(rules):
    # Insulated to the demo spec (rules/spec-demo.toml: NPS 4 at 150 degC asks 50 mm), not
    # accessible, indoor: nothing to flag.
    r = calc_item(rules=rules, nps="4", length="10", temp="150", layers="mineral-wool 50mm",
                  location="indoor", service="heat-conservation", material="aluminium")
    assert len(r.findings) == 0
    assert "Checks: none failed." in format_calc(r)


@pytest.mark.parametrize("flags, flag", [
    (dict(layers="minerl wool 50mm"), "--layers"),
    (dict(layers="mineral-wool 50mm", length="TBA"), "--length"),
    (dict(layers="mineral-wool 50mm", jacket="aluminum"), "--jacket"),
    (dict(layers="mineral-wool 50mm", nps="7"), "--nps"),
    (dict(layers="mineral-wool 50mm", location="moon"), "--location"),
])
def test_bad_flags_refused_naming_the_flag(rules, flags, flag):
    with pytest.raises(LagauditError, match=re.escape(flag)):
        calc_item(rules=rules, temp="200", **{"nps": "4", **flags})


def test_unknown_field_refused(rules):
    with pytest.raises(LagauditError, match="unknown item field"):
        calc_item(rules=rules, temp="200", layers="none", colour="red")


def _parser():
    parser = argparse.ArgumentParser(prog="lagaudit calc")
    add_calc_arguments(parser)
    return parser


def test_parser_has_a_flag_per_column_and_runs(capsys):
    args = _parser().parse_args(["--nps", "4", "--temp", "480 F", "--layers",
                                 "calcium-silicate 2in", "--units", "us", "--accessible"])
    assert all(hasattr(args, column) for column in FLAG_COLUMNS)
    assert args.accessible is True and args.rules == []
    assert run_calc(args) == 0
    out = capsys.readouterr().out
    assert "degF" in out and "Btu/h/ft" in out


def test_parser_refuses_jacket_with_emissivity_and_missing_temp(capsys):
    parser = _parser()
    with pytest.raises(SystemExit) as exc:
        parser.parse_args(["--temp", "100", "--layers", "none", "--jacket", "pvc",
                           "--emissivity", "0.9"])
    assert exc.value.code == 2
    with pytest.raises(SystemExit):
        parser.parse_args(["--layers", "none"])


def test_run_calc_raises_for_the_cli_to_exit_2():
    args = _parser().parse_args(["--nps", "4", "--temp", "hot", "--layers", "none"])
    with pytest.raises(LagauditError, match="--temp"):
        run_calc(args)


def test_surroundings_flag_sets_what_the_item_radiates_to(rules):
    # calc --surroundings: the bare line radiates to -10 C surroundings in 10 C air; the
    # engine called directly with the same surroundings is the reference, and the printed
    # conditions say which surroundings were used.
    r = calc_item(rules=rules, nps="4", temp="150", layers="none", material="carbon-steel",
                  ambient="10", wind="0", surroundings="-10")
    ref = solve_item(temp=150 + ZERO_C, ambient=10 + ZERO_C, od=0.1143, length=1.0, layers=[],
                     surroundings=-10 + ZERO_C, wind=0.0,
                     bare_emissivity=rules.metals["carbon-steel"].emissivity)
    assert r.state["heat_loss_W"] == pytest.approx(ref.heat_loss, rel=RTOL)
    assert r.state["surroundings_temp_K"] == pytest.approx(-10 + ZERO_C)
    text = format_calc(r)
    assert "surroundings -10.0 degC" in text and "overridden: ambient, wind, surroundings" in text
    warmer = calc_item(rules=rules, nps="4", temp="150", layers="none", material="carbon-steel",
                       ambient="10", wind="0", surroundings="40")
    assert warmer.state["heat_loss_W"] < r.state["heat_loss_W"]


def test_calc_writes_no_file(rules, tmp_path, monkeypatch):
    # Anything made through tempfile would land in tmp_path (or fail loudly).

    def refused(*args, **kwargs):
        raise AssertionError("calc made a temporary file")

    monkeypatch.setattr(tempfile, "tempdir", str(tmp_path))
    for name in ("mkstemp", "mkdtemp", "NamedTemporaryFile", "TemporaryFile"):
        monkeypatch.setattr(tempfile, name, refused)
    r = calc_item(rules=rules, nps="4", temp="250", layers="mineral-wool 50")
    assert r.item["tag"] == "calc"
    assert list(tmp_path.iterdir()) == []


def test_calc_solves_no_more_than_the_audit(rules, monkeypatch):
    # The printed state is the audit's own-conditions state, not a second solve: calc makes as
    # many solves as auditing its one-row table does, and its state is that audit's.
    calls = []
    solve = thermal.prepared_states
    monkeypatch.setattr(thermal, "prepared_states",
                        lambda *a, **k: calls.append(k.get("site")) or solve(*a, **k))
    flags = dict(nps="4", length="1", temp="250", layers="calcium-silicate 25mm",
                 accessible=True)
    r = calc_item(rules=rules, **flags)
    in_calc = list(calls)
    calls.clear()
    table = thermal.resolve_names(
        _read_one({c: _cell(flags.get(c)) for c in FLAG_COLUMNS}, rules), rules)
    audit = audit_table(table, rules)
    assert in_calc == calls and None in calls
    assert r.state.equals(audit.states.iloc[0])


def test_the_emissivity_printed_is_that_of_each_surface(rules):
    bare = format_calc(calc_item(rules=rules, nps="4", temp="150", layers="none",
                                 material="stainless-steel"), "si")
    steel = rules.metals["stainless-steel"].emissivity
    assert f"emissivity       {steel:.2f} (bare metal)" in bare
    flanged = format_calc(calc_item(rules=rules, nps="4", temp="150", layers="mineral-wool 50mm",
                                    flanges="2", material="carbon-steel",
                                    jacket="aluminium-oxidised"), "si")
    assert (f"emissivity       {rules.jackets['aluminium-oxidised'].emissivity:.2f} (insulated "
            f"surface), {rules.metals['carbon-steel'].emissivity:.2f} (bare metal)") in flanged


def test_a_flowing_line_prints_its_outlet_temperature_as_the_register_audit_gives_it(rules, tmp_path):
    from support import item_table
    flags = dict(nps="6", length="650", temp="95", layers="mineral-wool 40",
                 jacket="aluminium-oxidised", flow="0.6", fluid="fuel-oil")
    result = calc_item(rules=rules, **flags)
    table = item_table(tmp_path, ",".join(["tag", *flags]) + "\nT," + ",".join(flags.values())
                       + "\n", rules)
    register = audit_table(table, rules).results["outlet_temp [degC]"].iloc[0]
    assert result.cold_weather["outlet_temp [degC]"] == pytest.approx(register, rel=1e-12)
    assert 10 < register < 95  # between the annual-mean air and the inlet
    printed, unit = _row(format_calc(result), "temperature at the end of the run")
    assert unit == "degC" and printed == pytest.approx(register, abs=0.05)  # printed to 0.1
