"""cui-window (audit/checks/cui_window.py): windows, bands, raising factors, who is screened.

Window values are checked against API RP 581, 3rd ed. 2016, Addendum 2 2020, Part 2, quoted
beside each check.  Factors and bands are lagaudit's own ranking choices (rules/checks-cui.toml
says so); their tests check the arithmetic and the boundaries, not a published value.
"""

from dataclasses import replace

import numpy as np
import pytest
from support import item_table, refused_parameter
from hypothesis import given, settings
from hypothesis import strategies as st

from audit.checks import run_checks
from audit.checks.base import CheckContext, validated_params
from audit.checks.cui_window import KIND, REMEDY, window_weight
from audit.units import parse_temperature

C = 273.15
HEAD = "tag,nps,length,temp,insulation,thickness,jacket,location,condition,damaged,material"


def table_from(tmp_path, text, rules):
    return item_table(tmp_path, text, rules)


def run(table, rules, **changes):
    """Findings of the shipped cui-window check, with some of its keys changed."""
    shipped = rules.checks["cui-window"]
    generic = {k: changes.pop(k) for k in ("severity", "applies_to") if k in changes}
    check = replace(shipped, params={**shipped.params, **changes}, **generic)
    return KIND.findings(CheckContext(table, rules), check, validated_params(check, KIND))


def row(tag, temp, material="carbon-steel", condition="intact", damaged="",
        jacket="aluminium-oxidised", insulation="mineral-wool", location="outdoor"):
    return (f"{tag},4,10,{temp},{insulation},50,{jacket},{location},{condition},{damaged},"
            f"{material}\n")


def by_tag(found):
    return {t: (s, v, lim) for t, s, v, lim in
            zip(found["tag"], found["severity"], found["value"], found["limit"])}


# --- window values against their published source ----------------------------------------

def test_carbon_steel_window_is_api_rp_581_section_16_2(rules):
    # API RP 581 3rd ed. 2016 Add. 2 2020, Part 2, section 16.2 (p. 2-106): CUI "generally
    # occurs in the temperature range between -12 degC and 175 degC (10 degF and 350 degF), with
    # the temperature range of 77 degC to 110 degC (170 degF to 230 degF) being the most severe
    # environment."
    windows = validated_params(rules.checks["cui-window"], KIND)["windows"]["carbon-steel"]
    edges = sorted({w[0] for w in windows} | {w[1] for w in windows})
    # abs=1e-9: the rules hold kelvin; degC -> K -> degC is exact to float rounding only
    assert [e - C for e in edges] == pytest.approx([-12, 77, 110, 175], abs=1e-9)
    severe = max(windows, key=lambda w: w[2])
    assert (severe[0] - C, severe[1] - C) == pytest.approx((77, 110), abs=1e-9)
    # The document's own degF figures agree with its degC ones within its rounding (2 K):
    for f, c in ((10, -12), (350, 175), (170, 77), (230, 110)):
        assert parse_temperature(f"{f} degF") - C == pytest.approx(c, abs=2.0)


def test_carbon_steel_weights_are_the_table_16_2_ratio(rules):
    # API RP 581 Part 2 Table 16.2 'Corrosion Rates for Calculation of the DF-CUI', severe
    # driver: 20 mpy at 160 degF, 10 mpy at 43, 90, 225 and 275 degF.  Weight outside the most
    # severe range = 10/20.
    windows = validated_params(rules.checks["cui-window"], KIND)["windows"]["carbon-steel"]
    assert sorted(w[2] for w in windows) == [10 / 20, 10 / 20, 20 / 20]


def test_stainless_window_is_api_rp_581_table_18_2(rules):
    # API RP 581 Part 2 Table 18.2 'SCC Susceptibility-CUI ClSCC' (p. 2-127), moderate driver:
    # <49 degC None; 49 to 93 degC High; 93 to 149 degC Medium; >149 degC None.
    windows = validated_params(rules.checks["cui-window"], KIND)["windows"]["stainless-steel"]
    flat = [x for lo, hi, w in windows for x in (lo - C, hi - C, w)]
    # abs=1e-9: degC -> K -> degC round trip
    assert flat == pytest.approx([49, 93, 1.0, 93, 149, 0.5], abs=1e-9)
    # The table's degF column (<120, 120 to 200, 200 to 300, >300) agrees within 1 K:
    for f, c in ((120, 49), (200, 93), (300, 149)):
        assert parse_temperature(f"{f} degF") - C == pytest.approx(c, abs=1.0)


# --- boundaries: just inside and just outside every window edge ---------------------------

CS_EDGES = [(-12.1, None), (-11.9, 0.5), (76.9, 0.5), (77.0, 1.0), (77.1, 1.0), (109.9, 1.0),
            (110.0, 1.0), (110.1, 0.5), (174.9, 0.5), (175.0, 0.5), (175.1, None)]
SS_EDGES = [(48.9, None), (49.0, 1.0), (49.1, 1.0), (92.9, 1.0), (93.1, 0.5), (148.9, 0.5),
            (149.1, None)]


@pytest.mark.parametrize("metal, edges", [("carbon-steel", CS_EDGES),
                                          ("stainless-steel", SS_EDGES)])
def test_window_edges(tmp_path, rules, metal, edges):
    # Shared edges (77, 110 degC) take the higher weight; outer edges are inside (closed rows).
    text = HEAD + "\n" + "".join(row(f"T{i}", t, metal) for i, (t, _) in enumerate(edges))
    found = by_tag(run(table_from(tmp_path, text, rules), rules))
    for i, (t, weight) in enumerate(edges):
        if weight is None:
            assert f"T{i}" not in found, t
        else:
            # intact, no raising factor: the score is the window weight
            assert found[f"T{i}"][1] == pytest.approx(weight), t


# --- band thresholds --------------------------------------------------------------------

@pytest.mark.parametrize("score, severity", [
    (0.4999, None), (0.5, "info"), (0.9999, "info"), (1.0, "low"), (1.9999, "low"),
    (2.0, "medium"), (2.9999, "medium"), (3.0, "high"), (10.0, "high")])
def test_shipped_bands_at_and_below_each_threshold(tmp_path, rules, score, severity):
    # A one-row window of weight `score` makes an intact item score exactly that.
    table = table_from(tmp_path, HEAD + "\n" + row("A", 90), rules)
    found = run(table, rules, windows={"carbon-steel": [[0, 200, score]]})
    if severity is None:
        assert len(found) == 0
    else:
        assert list(found["severity"]) == [severity]
        assert found["value"][0] == pytest.approx(score)
        limits = {"info": 0.5, "low": 1.0, "medium": 2.0, "high": 3.0}
        assert found["limit"][0] == limits[severity]


def test_check_severity_caps_the_bands(tmp_path, rules):
    table = table_from(tmp_path, HEAD + "\n" + row("A", 90, condition="wet"), rules)
    assert list(run(table, rules)["severity"]) == ["high"]  # 1.0 x wet 3.0 = 3.0
    assert list(run(table, rules, severity="medium")["severity"]) == ["medium"]


# --- raising factors --------------------------------------------------------------------

def test_condition_factors_and_message(tmp_path, rules):
    text = HEAD + "\n" + row("I", 90) + row("D", 90, condition="damaged", damaged=10) \
        + row("W", 90, condition="wet") + row("J", 90, jacket="none")
    found = run(table_from(tmp_path, text, rules), rules)
    got = by_tag(found)
    # score = 1.0 (77-110 degC) x factor: intact 1, damaged 2, wet 3, no jacket 1.5
    assert got["I"][:2] == ("low", 1.0)
    assert got["D"][:2] == ("medium", 2.0)
    assert got["W"][:2] == ("high", 3.0)
    assert got["J"][:2] == ("low", 1.5)
    message = dict(zip(found["tag"], found["message"]))
    assert "window 77 to 110 degC" in message["D"] and "damaged insulation x2" in message["D"]
    assert "no jacket x1.5" in message["J"]
    assert "raised by" not in message["I"]
    assert set(found["remedy"]) == {REMEDY}
    assert not found["fixable_by_insulation"].any()


def test_cyclic_and_age_from_extra_columns(tmp_path, rules):
    text = (HEAD + ",Cyclic Service,Age [yr]\n"
            + row("A", 90).rstrip("\n") + ",yes,16\n"
            + row("B", 90).rstrip("\n") + ",no,14.9\n"
            + row("C", 90).rstrip("\n") + ",sometimes,25\n"
            + row("D", 90).rstrip("\n") + ",,old\n")
    found = run(table_from(tmp_path, text, rules), rules)
    got = by_tag(found)
    assert got["A"][1] == pytest.approx(1.0 * 1.5 * 1.5)   # cyclic 1.5, age >= 15 yr: 1.5
    assert got["B"][1] == pytest.approx(1.0)               # not cyclic, 14.9 yr < 15
    assert got["C"][1] == pytest.approx(2.0)               # cyclic not read; age >= 25 yr: 2.0
    assert got["D"][1] == pytest.approx(1.0)               # age not read
    message = dict(zip(found["tag"], found["message"]))
    assert "cyclic service x1.5" in message["A"] and "age 16 yr x1.5" in message["A"]
    assert "Cyclic Service: cell not read" in message["C"]
    assert "Age [yr]: cell not read" in message["D"]


def test_install_year_is_aged_against_the_audit_year(tmp_path, rules):
    text = (HEAD + ",install_year\n" + row("A", 90).rstrip("\n") + ",2000\n"
            + row("B", 90).rstrip("\n") + ",2011\n" + row("C", 90).rstrip("\n") + ",2030\n")
    table = table_from(tmp_path, text, rules)
    got = by_tag(run(table, rules, audit_year=2025))
    assert got["A"][1] == pytest.approx(2.0)   # 25 yr
    assert got["B"][1] == pytest.approx(1.0)   # 14 yr
    assert got["C"][1] == pytest.approx(1.0)   # installed after the audit year: not read
    assert by_tag(run(table, rules, audit_year=2026))["B"][1] == pytest.approx(1.5)  # 15 yr


def test_intermittent_carbon_steel_above_the_window(tmp_path, rules):
    # API RP 581 Part 2 section 16.3 item g: "Carbon steel systems that normally operate in
    # services above 175 degC (350 degF) but are in intermittent service".
    text = (HEAD + ",cyclic\n" + row("A", 250).rstrip("\n") + ",yes\n"
            + row("B", 250).rstrip("\n") + ",no\n"
            + row("S", 250, "stainless-steel").rstrip("\n") + ",yes\n")
    found = run(table_from(tmp_path, text, rules), rules)
    got = by_tag(found)
    assert got == {"A": ("info", pytest.approx(0.5 * 1.5), 0.5)}
    assert "above 175 degC in cyclic service" in found["message"][0]


def test_normal_max_range_and_ambient_items(tmp_path, rules):
    text = HEAD + "\n" + row("R", "60/90") + row("N", 60) + row("H", "180/200") \
        + row("AMB", "AMB", location="outdoor-annual-mean")
    found = run(table_from(tmp_path, text, rules), rules)
    got = by_tag(found)
    assert got["R"][1] == 1.0       # 60 to 90 degC touches the 77-110 degC row
    assert got["N"][1] == 0.5
    assert "H" not in got           # 180-200 degC: above the window throughout
    assert got["AMB"][1] == 0.5     # at the site's 10 degC air temperature
    assert "60 to 90 degC" in dict(zip(found["tag"], found["message"]))["R"]


# --- who is screened --------------------------------------------------------------------

def test_only_accepted_insulated_items_of_a_windowed_metal(tmp_path, rules):
    text = (HEAD + "\n" + row("OK", 90)
            + row("BARE", 90, insulation="none")
            + row("MISSING", 90, condition="missing")
            + row("REJECTED", 90, location="mars")
            + row("COPPER", 90, material="copper")
            + row("DEFAULT", 90, material=""))
    table = table_from(tmp_path, text, rules)
    assert table.loc[table["tag"] == "REJECTED", "status"].item() == "rejected"
    found = run(table, rules)
    assert sorted(found["tag"]) == ["DEFAULT", "OK"]
    assert "carbon-steel (default metal)" in found.loc[found["tag"] == "DEFAULT", "message"].item()
    all_found = run_checks(CheckContext(table, rules))
    assert "REJECTED" not in set(all_found["tag"])


def test_selector_restricts_the_items(tmp_path, rules):
    from audit.rules.selector import parse_selector
    table = table_from(tmp_path, HEAD + "\n" + row("A", 90) + row("B", 40), rules)
    found = run(table, rules, applies_to=parse_selector("temp > 50"))
    assert list(found["tag"]) == ["A"]


# --- rule grammar -----------------------------------------------------------------------

@pytest.mark.parametrize("key, value", [
    ("windows", {"carbon-steel": [[0, 100, 1.0], [90, 150, 0.5]]}),   # overlap
    ("windows", {"carbon-steel": [[100, 50, 1.0]]}),                   # high below low
    ("windows", {"carbon-steel": [[0, 100, 0]]}),                      # zero weight
    ("bands", [[1.0, "low"], [1.0, "high"]]),                          # not ascending
    ("bands", [[1.0, "severe"]]),                                      # unknown severity
    ("condition_factors", {"intact": 1, "damaged": 2}),                # wet missing
    ("audit_year", "2025"),                                            # not a year
])
def test_invalid_parameters_name_the_key(rules, key, value):
    refused_parameter(rules, "cui-window", KIND, key, value)


# --- invariants -------------------------------------------------------------------------

WINDOWS = ((C - 12, C + 77, 0.5), (C + 77, C + 110, 1.0), (C + 110, C + 175, 0.5))


@settings(max_examples=200, deadline=None)
@given(st.floats(-50, 250), st.floats(0, 100), st.floats(0, 100))
def test_a_wider_range_never_lowers_the_weight(low, widen, more):
    lo, hi = np.array([C + low]), np.array([C + low + widen])
    w, _ = window_weight(WINDOWS, lo, hi)
    wider, _ = window_weight(WINDOWS, lo, hi + more)
    assert wider[0] >= w[0]
    single, _ = window_weight(WINDOWS, lo, lo)
    assert w[0] >= single[0]


def test_window_weight_takes_arrays():
    lo = np.array([C - 20, C + 20, C + 90, C + 150, C + 200, np.nan])
    w, which = window_weight(WINDOWS, lo, lo)
    assert list(w) == [0.0, 0.5, 1.0, 0.5, 0.0, 0.0]
    assert list(which) == [-1, 0, 1, 2, -1, -1]
