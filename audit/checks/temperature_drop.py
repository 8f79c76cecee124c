"""``temperature-drop``: a flowing, untraced line whose temperature at the end of its run falls
below its ``maintain`` temperature under the check's site (the cold design day).

The outlet temperature (:func:`audit.coldweather.outlet_temperatures`) is marched along the run
from the operating temperature with the engine's heat loss at each temperature, for lines with
a ``flow`` and a fluid with ``cp``.  Traced lines are ``tracing-shortfall``'s.  Thicker
insulation raises the outlet temperature (the remedy search).  The drop sums the loss along
the whole run, so a line a field survey measured is judged at its readings' mean condition
(``whole_item``), not at its worst spot.
"""

from __future__ import annotations

import numpy as np

from audit.checks.base import CheckKind, Verdict
from audit.coldweather import outlet_temperatures, untraced
from audit.thermal import ZERO_CELSIUS

NAME = "temperature-drop"


def evaluate(context, check, params):
    table = context.table
    outlet = outlet_temperatures(context, check.site)
    maintain = table["maintain_K"].to_numpy(float) if "maintain_K" in table else \
        np.full(len(table), np.nan)
    with np.errstate(invalid="ignore"):
        fails = context.selected(check) & untraced(table) & (outlet < maintain)
    failing = np.flatnonzero(fails)
    return Verdict(failing, value=outlet[failing] - ZERO_CELSIUS,
                   limit=maintain[failing] - ZERO_CELSIUS, unit="degC",
                   facts={"inlet": context.states(check.site)["process_temp_K"].to_numpy(float)
                          [failing] - ZERO_CELSIUS,
                          "length": table["length_m"].to_numpy(float)[failing]})


def word(context, check, params, verdict):
    site = check.site or "its own conditions"
    messages = [f"enters at {inlet:.1f} degC and leaves {length:.0f} m downstream at {out:.1f} "
                f"degC under {site}, below its maintain temperature of {limit:.1f} degC"
                for inlet, length, out, limit in zip(
                    verdict.facts["inlet"].tolist(), verdict.facts["length"].tolist(),
                    np.asarray(verdict.value, float).tolist(),
                    np.asarray(verdict.limit, float).tolist())]
    return messages, ("add insulation to bring the outlet temperature up to maintain, or "
                      "heat-trace the line (the tracing supplier's design)")


KIND = CheckKind(
    evaluate=evaluate,
    word=word,
    params={},
    fixable_by_insulation=True, whole_item=True,
    description="flowing, untraced line whose outlet temperature falls below its maintain "
                "temperature under the check's design case")
