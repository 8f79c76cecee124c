"""``survey-deviation``: a field reading that differs from the prediction for the item as
registered by more than the rule's margin.

Judged per item on its worst reading (the one furthest on the side of more heat through the
insulation: hotter on a hot item, colder on a cold one), at the reading's own conditions
(:mod:`audit.survey`), which its findings' air, wind, humidity and surroundings columns show
(``conditions_from`` = ``reading``, or whose conditions stood in for a reading that recorded
none).  A reading beyond the margin is classed by its condition factor against
the rule's ``classes`` (rows of [factor at least, word]); each class has its severity and
remedy.  A reading no factor reproduces (hotter than bare metal would be) takes the last class;
one on the other side of the prediction takes the rule's ``cooler`` word, severity info.
Insulation thickness cannot fix what the reading shows: the remedy is inspection and repair.
"""

from __future__ import annotations

import numpy as np

from audit.checks.base import CheckKind, Verdict
from audit.errors import RuleError
from audit.rules import SEVERITIES
from audit.rules.converters import choice, list_of, quantity, rows, temperature_difference, text
from audit.survey import worst_readings
from audit.thermal import ZERO_CELSIUS

NAME = "survey-deviation"


def evaluate(context, check, params):
    worst, count = worst_readings(context.survey, context.table.index)
    rows = np.flatnonzero(worst >= 0)
    if not rows.size:
        return Verdict(rows, conditions={name: np.empty(0) for name in (
            "conditions_from", "air_temp_K", "surroundings_temp_K", "wind_m_s", "rh_pct")})
    survey = context.survey.iloc[worst[rows]]
    measured = survey["surface_temp_K"].to_numpy(float)
    predicted = survey["predicted_temp_K"].to_numpy(float)
    hot = survey["process_temp_K"].to_numpy(float) >= survey["air_temp_K"].to_numpy(float)
    deviation = np.where(hot, 1.0, -1.0) * (measured - predicted)
    factor = survey["condition_factor"].to_numpy(float)
    beyond = np.abs(deviation) > params["margin"]
    thresholds = np.array([t for t, _ in params["classes"]])
    words = np.array([w for _, w in params["classes"]] + [params["cooler"]], dtype=object)
    severities = np.array([*params["severities"], "info"], dtype=object)
    # Class: the last threshold the factor reaches; no factor on the hot side: the last class.
    which = np.where(np.isfinite(factor), np.searchsorted(thresholds, factor, side="right") - 1,
                     thresholds.size - 1)
    which = np.where(deviation < 0, thresholds.size, which)
    flagged = beyond & (which >= 0)
    keep = rows[flagged]
    which = which[flagged]
    # The limit compared: the prediction plus the margin on the side of the deviation.
    limit = predicted + np.sign(measured - predicted) * params["margin"]
    return Verdict(keep, value=measured[flagged] - ZERO_CELSIUS, limit=limit[flagged] - ZERO_CELSIUS,
                   unit="degC", severity=severities[which], facts={
                       "class": words[which], "which": which, "factor": factor[flagged],
                       "predicted": predicted[flagged] - ZERO_CELSIUS,
                       "readings": count[keep], "source": survey["source"].to_numpy(object)[flagged],
                       "date": survey["date"].to_numpy(object)[flagged]},
                   conditions={"conditions_from": survey["conditions_from"].to_numpy(object)[flagged],
                               **{name: survey[name].to_numpy(float)[flagged] for name in (
                                   "air_temp_K", "surroundings_temp_K")},
                               "wind_m_s": survey["wind_used_m_s"].to_numpy(float)[flagged],
                               "rh_pct": survey["rh_used_pct"].to_numpy(float)[flagged]})


def word(context, check, params, verdict):
    facts = verdict.facts
    if not verdict.rows.size:
        return [], ""
    remedies = np.array([*params["remedies"], params["cooler_remedy"]], dtype=object)
    message = [
        f"{cls}: read {read:.0f} degC ({source}{', ' + date if date else ''}) against "
        f"{pred:.0f} degC predicted as registered at the reading's conditions; "
        + (f"condition factor {factor:.2g}" if np.isfinite(factor) else
           "no condition factor reproduces it") + (f" (worst of {n} readings)" if n > 1 else "")
        for cls, read, pred, factor, n, source, date in zip(
            facts["class"], verdict.value, facts["predicted"], facts["factor"], facts["readings"],
            facts["source"], facts["date"])]
    return message, remedies[facts["which"]]


def _validate(check, params):
    sizes = {len(params["classes"]), len(params["severities"]), len(params["remedies"])}
    if len(sizes) != 1:
        raise RuleError(f"check {check.name!r}: classes, severities and remedies differ in length",
                        file=check.origin, column=f"check.{check.name}",
                        expected="one severity and one remedy per class")


_FACTOR = quantity("dimensionless", "dimensionless", low=0.0, low_open=True)

KIND = CheckKind(
    thermal=False,
    evaluate=evaluate, word=word,
    params={"margin": (temperature_difference, True),
            "classes": (rows(_FACTOR, text, "condition factor at least, class word"), True),
            "severities": (list_of(choice(*SEVERITIES), "severities"), True),
            "remedies": (list_of(text, "remedies"), True),
            "cooler": (text, True), "cooler_remedy": (text, True)},
    fixable_by_insulation=False, validate=_validate,
    description="a field reading that differs from the prediction for the item as registered "
                "by more than the margin")
