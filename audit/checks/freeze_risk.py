"""``freeze-risk``: an untraced, stagnant line of a liquid that can freeze (water) that freezes
sooner than the rules' hold time under the check's site (the cold design day).

``time_to_freeze`` (:func:`audit.coldweather.freeze_times`): the liquid and its steel wall cool
from the operating temperature to the freezing point, with the engine's heat loss at each
temperature, then ``frozen_share`` of the liquid freezes at the freezing point.  Shorter than
``hold_time`` fails.  A line that does not freeze (air above the freezing point) passes.
Traced lines are ``tracing-shortfall``'s; lines with a flow are not stagnant.  Thicker
insulation lengthens the time (the remedy search); tracing, or draining or keeping the line
flowing in freezing weather, are the other remedies.
"""

from __future__ import annotations

import numpy as np

from audit.checks.base import CheckKind, Verdict
from audit.coldweather import freeze_times, untraced
from audit.rules.converters import quantity

NAME = "freeze-risk"


def evaluate(context, check, params):
    seconds = freeze_times(context, check.site, params["frozen_share"])
    hours = seconds / 3600.0
    with np.errstate(invalid="ignore"):
        fails = context.selected(check) & untraced(context.table) & (hours < params["hold_time"])
    failing = np.flatnonzero(fails)
    return Verdict(failing, value=hours[failing], limit=params["hold_time"], unit="h")


def word(context, check, params, verdict):
    share = f"{params['frozen_share'] * 100:g} %"
    site = check.site or "its own conditions"
    messages = [f"stagnant, it freezes {share} of its contents in {h:.1f} h under {site}, "
                f"sooner than the hold time of {params['hold_time']:g} h"
                for h in np.asarray(verdict.value, float).tolist()]
    remedy = ("add insulation, heat-trace the line, or drain it or keep it flowing in freezing "
              "weather; freeze protection is safety-relevant: follow local codes and the "
              "tracing supplier's design")
    return messages, remedy


KIND = CheckKind(
    evaluate=evaluate,
    word=word,
    params={"hold_time": (quantity("h", "h", low=0.0, low_open=True), True),
            "frozen_share": (quantity("dimensionless", "dimensionless", low=0.0, low_open=True,
                                      high=1.0), True)},
    fixable_by_insulation=True,
    description="untraced stagnant line that freezes sooner than the hold time under the "
                "check's design case")
