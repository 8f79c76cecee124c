"""``tracing-shortfall``: a traced line whose tracing cannot hold its ``maintain`` temperature
with the insulation as it is (wet, damaged, thinner than designed).

``tracing_needed [W/m]`` is the engine's heat loss per metre of the line held at ``maintain``
under the check's site (the cold design day), fittings and damage included, times ``margin``
(:func:`audit.coldweather.tracing_needed`).  The tracing's output
(:func:`audit.coldweather.tracing_output`): electric, its rating times cables; steam, the
tracer's conductance from ``steam_tracers`` times the steam temperature less ``maintain``.  An
output below the need fails, and so does a steam tracer whose size the table does not list
(its output is not known: flagged, never guessed).  Lines without ``maintain`` are not judged
(the reader warned).  Thicker insulation lowers the need: the remedy search finds the smallest
standard thickness that makes the tracing sufficient; the message also gives the output needed.
"""

from __future__ import annotations

import numpy as np

from audit.checks.base import CheckKind, Verdict
from audit.coldweather import traced, tracing_needed, tracing_output
from audit.rules.converters import quantity, rows, temperature, text

NAME = "tracing-shortfall"


def evaluate(context, check, params):
    table = context.table
    needed = tracing_needed(context, check.site, params["margin"])
    output = tracing_output(table, params["steam_temp"], params["steam_tracers"])
    judged = context.selected(check) & traced(table) & np.isfinite(needed)
    with np.errstate(invalid="ignore"):
        fails = judged & ((output < needed) | ~np.isfinite(output))
    failing = np.flatnonzero(fails)
    # No thickness can make an output nobody knows suffice: the rules need the tracer first.
    return Verdict(failing, value=output[failing], limit=needed[failing], unit="W/m",
                   fixable=np.isfinite(output[failing]),
                   facts={"kind": table["tracing"].to_numpy(object)[failing],
                          "size": table["tracer_nps"].to_numpy(float)[failing],
                          "maintain": table["maintain_K"].to_numpy(float)[failing]})


def word(context, check, params, verdict):
    f = verdict.facts
    site = check.site or "its own conditions"
    messages, remedies = [], []
    for kind, size, maintain, output, needed in zip(
            f["kind"].tolist(), f["size"].tolist(), f["maintain"].tolist(),
            np.asarray(verdict.value, float).tolist(), np.asarray(verdict.limit, float).tolist()):
        hold = f"holding {maintain - 273.15:.0f} degC under {site} needs {needed:.1f} W/m " \
               f"(heat loss x margin {params['margin']:g})"
        if not np.isfinite(output):
            messages.append(f"steam tracer of {size:g} in is not in the rules' steam_tracers "
                            f"table, so its output is not known; {hold}")
            remedies.append(f"add the tracer's conductance to steam_tracers of "
                            f"[check.{check.name}] from the tracing supplier's data")
            continue
        messages.append(f"{kind} tracing gives {output:.1f} W/m; {hold}")
        remedies.append(f"raise the tracing output to at least {needed:.1f} W/m, or add "
                        "insulation so that the tracing suffices; confirm with the tracing "
                        "supplier's design (freeze and process protection are safety-relevant)")
    return messages, remedies


def _steam_tracers(value):
    return rows(quantity("dimensionless", "dimensionless", low=0.0, low_open=True),
                quantity("W/(m*K)", "W/(m*K)", low=0.0, low_open=True),
                "tracer size inch, conductance W/(m*K)")(value)


KIND = CheckKind(
    evaluate=evaluate,
    word=word,
    params={"margin": (quantity("dimensionless", "dimensionless", low=1.0), True),
            "steam_temp": (temperature, True),
            "steam_tracers": (_steam_tracers, True),
            "steam_source": (text, True)},
    fixable_by_insulation=True,
    description="traced line whose tracing output is below its heat loss at maintain, times a "
                "margin, under the check's design case")
