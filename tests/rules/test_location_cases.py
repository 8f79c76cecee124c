"""Design conditions per location: [site.LOCATION.design.CASE] (audit/rules/loader.py,
audit/thermal.py site_batch), as the contract's "Design conditions per location" fixes them."""

import psychrolib
import pytest
from support import item_table

from audit.checks import run_checks, validate_checks
from audit.checks.base import CheckContext
from audit.errors import RuleError
from audit.rules import load_rules
from audit.rules.describe import describe_rules

C = 273.15
psychrolib.SetUnitSystem(psychrolib.SI)

# An invented cold-store hall: 4 degC, still air, 60 % RH on the humid design day (its own air
# conditioning), against the plant-wide humid design day (30 degC, 85 %, rules/sites.toml).
HALL = """
[site.cold-store-hall]
ambient = 4
wind = 0
rh = 70
source = "test: an invented refrigerated hall"

[site.cold-store-hall.design.humid-design-day]
ambient = 4
wind = 0
rh = 60
source = "test: the hall's own humid design day"
"""


def rules_with(tmp_path, body, name="hall"):
    folder = tmp_path / name
    folder.mkdir()
    (folder / "sites.toml").write_text(body, encoding="utf-8")
    return load_rules([folder])


@pytest.fixture
def hall(tmp_path):
    return rules_with(tmp_path, HALL)


CHILLED = ("tag,nps,length,temp,layers,jacket,location\n"
           "CHW-HALL,4,10,12,elastomeric-foam 13mm,pvc,cold-store-hall\n"
           "CHW-OUT,4,10,12,elastomeric-foam 13mm,pvc,outdoor\n")


def test_a_location_case_is_read_and_printed(hall):
    case = hall.sites["cold-store-hall"].design["humid-design-day"]
    assert (case.ambient - C, case.wind, case.rh) == pytest.approx((4.0, 0.0, 60.0))
    text = describe_rules(hall)
    assert "its own humid-design-day: air 4.0 degC, wind 0 m/s, RH 60 %" in text


def test_checks_judge_each_item_at_its_locations_own_case(tmp_path, hall):
    table = item_table(tmp_path, CHILLED, hall)
    context = CheckContext(table, hall)
    states = context.states("humid-design-day")
    # The hall's own case for the hall item, the plant-wide case for the one outdoors.
    assert list(states["conditions_from"]) == ["cold-store-hall", "plant"]
    assert states["air_temp_K"].tolist() == pytest.approx([4 + C, 30 + C])
    assert states["rh_pct"].tolist() == pytest.approx([60.0, 85.0])
    findings = run_checks(context, validate_checks(hall))
    sweating = findings[findings["check"] == "condensation"]
    # Common practice (hand statement): a 12 degC chilled-water line in a 4 degC hall is warmer
    # than the air and cannot sweat; the same line outdoors on a 30 degC, 85 % day does (13 mm
    # of foam leaves its surface below that day's 27 degC dew point).
    assert list(sweating["tag"]) == ["CHW-OUT"]
    assert list(sweating["conditions_from"]) == ["plant"]


def test_the_dew_point_limit_is_the_locations_own(tmp_path, hall):
    # A cold line in the hall: judged against the hall's dew point, computed here by psychrolib
    # (ASHRAE Handbook Fundamentals psychrometrics) at the hall's 4 degC, 60 %.
    table = item_table(tmp_path, "tag,nps,length,temp,layers,jacket,location\n"
                                 "BRINE-1,2,10,-30,none,,cold-store-hall\n", hall)
    findings = run_checks(CheckContext(table, hall), validate_checks(hall))
    found = findings[findings["check"] == "condensation"].iloc[0]
    dew = psychrolib.GetTDewPointFromRelHum(4.0, 0.60)
    margin = validate_checks(hall)["condensation"].get("margin", 1.0)
    # 0.01 K: the engine's dew point (Hyland-Wexler) and psychrolib's agree to this in this range.
    assert found["limit"] == pytest.approx(dew + margin, abs=0.01)
    assert found["conditions_from"] == "cold-store-hall"
    assert found["air_temp [degC]"] == pytest.approx(4.0)


def test_own_conditions_name_the_location(tmp_path, hall):
    table = item_table(tmp_path, CHILLED, hall)
    states = CheckContext(table, hall).states("")
    assert list(states["conditions_from"]) == ["cold-store-hall", "outdoor"]


def test_a_case_no_check_uses_is_an_error_naming_file_and_key(tmp_path):
    with pytest.raises(RuleError, match="no enabled check is evaluated under") as info:
        rules_with(tmp_path, HALL + """
[site.cold-store-hall.design.windy-winter-night]
ambient = -20
wind = 10
rh = 90
source = "test"
""")
    assert info.value.column == "site.cold-store-hall.design.windy-winter-night"
    assert info.value.file.endswith("sites.toml")


def test_a_case_with_a_missing_field_is_an_error_naming_file_and_key(tmp_path):
    with pytest.raises(RuleError) as info:
        rules_with(tmp_path, HALL.replace("rh = 60\n", ""))
    text = str(info.value)
    assert "site.cold-store-hall.design.humid-design-day" in text and "rh" in text
    assert "sites.toml" in text


def test_the_energy_site_follows_the_location(tmp_path):
    # The hall gives its own annual-mean case: its heat gain is reckoned at 4 degC, not 10.
    rules = rules_with(tmp_path, HALL + """
[site.cold-store-hall.design.outdoor-annual-mean]
ambient = 4
wind = 0
rh = 70
source = "test"
""")
    table = item_table(tmp_path, CHILLED, rules)
    from audit.pipeline import audit_table

    audit = audit_table(table, rules)
    states = CheckContext(table, rules).states("outdoor-annual-mean")
    assert states["air_temp_K"].tolist() == pytest.approx([4 + C, 10 + C])
    # The money follows: a year's energy is the heat flow at those conditions times the hours
    # (economics: annual_energy = |heat_loss| x hours, hand arithmetic).
    hours = audit.economics.per_row["hours [h]"].to_numpy(float)
    expected = abs(states["heat_loss_W"].to_numpy(float)) * hours / 1e6
    assert audit.economics.per_row["annual_energy [MWh]"].tolist() == pytest.approx(expected.tolist(),
                                                                                    rel=1e-9)


def test_remedies_in_a_register_with_location_cases_never_thin(tmp_path, hall):
    # A register of our own whose locations carry their own cases: every remedy thickness is at
    # least what is installed and what the specification asks (less its tolerance).
    from audit.checks.below_spec import installed_thickness, requirement
    from audit.pipeline import audit_table

    table = item_table(tmp_path, "tag,nps,length,temp,layers,jacket,location,accessible,service\n"
                                 "CHW-1,4,10,5,elastomeric-foam 13mm,pvc,cold-store-hall,no,cold\n"
                                 "CHW-2,4,10,5,elastomeric-foam 13mm,pvc,outdoor,no,cold\n"
                                 "STM-1,4,10,250,mineral-wool 25mm,aluminium-oxidised,indoor,yes,\n"
                                 "STM-2,6,10,300,mineral-wool 40mm,aluminium-oxidised,outdoor,yes,\n",
                       hall)
    audit = audit_table(table, hall)
    remedied = audit.findings.dropna(subset=["remedy_thickness [mm]"])
    assert len(remedied) >= 2
    rows = remedied["row"].to_numpy(int)
    need = requirement(table, hall, audit.states["process_temp_K"].to_numpy(float),
                       audit.states["air_temp_K"].to_numpy(float))
    mm = remedied["remedy_thickness [mm]"].to_numpy(float)
    assert (mm >= installed_thickness(table)[rows] * 1000 - 1e-6).all()
    assert (mm >= (need.thickness_m - need.tolerance_m)[rows] * 1000 - 1e-6).all()
