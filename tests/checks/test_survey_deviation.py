"""survey-deviation: readings beyond the margin, classed by condition factor as the rules say;
and the audit's survey columns and basis."""

import math

import numpy as np
import pytest

from audit.checks.survey_deviation import KIND
from audit.pipeline import audit_table
from support import refused_parameter
from test_survey import PIPE, register, survey

CHECK = "survey-deviation"


def audited(rules, readings, *rows):
    return audit_table(register(rules, *rows), rules, readings=readings)


def test_readings_are_classed_by_the_rules_words_and_drive_measured_findings(rules):
    rows = [PIPE, ["P-2", *PIPE[1:]], ["P-3", *PIPE[1:]], ["P-4", *PIPE[1:]]]
    readings = survey(("P-1", 29, 20, 1, 0.9),    # within 5 K of about 27 degC: as expected
                      ("P-2", 45, 20, 1, 0.9),    # hotter: a few times the conductivity
                      ("P-3", 179.5, 20, 1, 0.9),  # as hot as bare metal
                      ("P-3", 40, 20, 1, 0.9),    # a second, milder reading of P-3
                      ("P-4", 21, 20, 1, 0.9))    # cooler than predicted
    audit = audited(rules, readings, *rows)
    found = audit.findings[audit.findings["check"] == CHECK].set_index("tag")
    assert "P-1" not in found.index
    params = rules.checks[CHECK].params
    factor_p2 = audit.survey.loc[1, "condition_factor"]
    words = [w for t, w in params["classes"] if factor_p2 >= t]
    assert found.loc["P-2", "message"].startswith(words[-1] + ":")
    assert found.loc["P-3", "message"].startswith(params["classes"][-1][1] + ":")
    assert "worst of 2 readings" in found.loc["P-3", "message"]
    assert found.loc["P-3", "severity"] == params["severities"][-1]
    assert found.loc["P-4", "message"].startswith(params["cooler"]) and \
        found.loc["P-4", "severity"] == "info"
    assert (found["basis"] == "measured").all()
    # The other checks judge P-2 and P-3 at their measured condition (P-3 at the factor of
    # its milder reading: the other has none); P-1 read as expected stays as registered.
    others = audit.findings[audit.findings["check"] != CHECK]
    assert set(others["tag"]) == {"P-2", "P-3"} and (others["basis"] == "measured").all()
    assert list(audit.results["basis"]) == ["register", "measured", "measured", "measured"]
    # The limit: the prediction plus the margin, on the side of the reading.
    p2 = audit.survey.loc[1]
    assert found.loc["P-2", "limit"] == pytest.approx(p2["predicted_temp_K"] - 273.15 + 5.0)


def test_results_carry_the_items_worst_reading(rules):
    audit = audited(rules, survey(("P-1", 40, 20, 1, 0.9), ("P-1", 50, 20, 1, 0.9)), PIPE,
                    ["P-2", *PIPE[1:]])
    results = audit.results
    assert results.loc[0, "measured_temp [degC]"] == pytest.approx(50.0)
    assert results.loc[0, "condition_factor [-]"] == pytest.approx(
        audit.survey.loc[1, "condition_factor"])
    assert results.loc[0, "measured_heat_loss [W]"] == pytest.approx(
        audit.survey.loc[1, "measured_heat_loss_W"])
    assert results.loc[0, "predicted_temp [degC]"] < 40
    assert math.isnan(results.loc[1, "measured_temp [degC]"])


def test_without_a_survey_nothing_changes(rules):
    audit = audit_table(register(rules, PIPE), rules)
    assert audit.survey is None and "basis" not in audit.findings
    assert "measured_temp [degC]" not in audit.results
    assert not np.any(audit.findings["check"] == CHECK)


@pytest.mark.parametrize("key, value", [("margin", "5 degC"), ("classes", [[2, "a"], [1, "b"]]),
                                        ("severities", ["low", "dire"])])
def test_bad_parameters_are_refused_naming_the_key(rules, key, value):
    refused_parameter(rules, CHECK, KIND, key, value)
