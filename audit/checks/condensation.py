"""``condensation``: a cold item whose outer surface is below the air's dew point plus a margin.

Evaluated under the check's site condition (shipped: the humid design day with still air,
which gives the coldest surface and the highest dew point).  The dew point comes from the
air temperature and relative humidity of the scenario's states
(:func:`audit.engine.psychrometrics.dew_point_hyland_wexler`).  The part compared is the
coldest of the item: for a cold item that is the engine's worst part (``surface_temp_K``),
which includes bare parts (missing or damaged insulation, uninsulated fittings).

A surface below 0 degC and below the dew point grows frost and ice: the finding says so (no
claim is made about the ice's insulating effect, which is not modelled).  Only items colder
than the air can fail.  Rows whose dew point cannot be computed (relative
humidity of 0 %, where no water can condense, or air outside the psychrometric range) are not
flagged.  Insulation fixes it: more thickness, with a continuous vapour retarder on the warm
side, since a cold item draws moisture into its insulation.
"""

from __future__ import annotations

import numpy as np

from audit.checks.base import CheckKind, Verdict, bare_parts
from audit.engine.psychrometrics import dew_point_hyland_wexler
from audit.rules.converters import temperature_difference
from audit.thermal import ZERO_CELSIUS, table_surfaces

NAME = "condensation"

#: What a finding says of a surface below 0 degC and below the dew point (the work order reads it).
ICE = "below 0 degC and the dew point: frost and ice grow on it"

DEFAULT_MARGIN_K = 1.0
"""Margin above the dew point when the rule gives none [K] (common practice, see the rule file)."""


def _margin(value):
    """A margin above the dew point: a temperature difference, not negative [K]."""
    margin = temperature_difference(value)
    if margin < 0:
        raise ValueError(f"{margin:g} K is negative; a margin is added above the dew point")
    return margin


def evaluate(context, check, params):
    margin = params.get("margin", DEFAULT_MARGIN_K)
    states = context.states(check.site)
    selected = context.selected(check)
    air = states["air_temp_K"].to_numpy(float)
    rh = states["rh_pct"].to_numpy(float)
    process = states["process_temp_K"].to_numpy(float)
    worst = states["surface_temp_K"].to_numpy(float)
    insulated = states["surface_temp_insulated_K"].to_numpy(float)
    coldest = np.fmin(worst, insulated)
    dew = np.asarray(dew_point_hyland_wexler(air, rh), float)
    limit = dew + margin
    with np.errstate(invalid="ignore"):
        cold = process < air
        fails = selected & cold & np.isfinite(limit) & (coldest < limit)
    flagged = np.flatnonzero(fails)
    return Verdict(flagged, value=coldest[flagged] - ZERO_CELSIUS,
                   limit=limit[flagged] - ZERO_CELSIUS, unit="degC",
                   facts={"dew": dew[flagged], "air": air[flagged], "rh": rh[flagged],
                          "bare_is_coldest": ~(insulated[flagged] <= worst[flagged])})


def word(context, check, params, verdict):
    margin = params.get("margin", DEFAULT_MARGIN_K)
    has_bare = context.once(table_surfaces)[1][verdict.rows]
    bare_words = context.once(bare_parts)[verdict.rows]
    facts = verdict.facts
    message, remedy = [], []
    # Python floats in the loop, not numpy scalars: tens of thousands of rows.
    for bare, words, cold_c, dew_c, air_c, rh_r in zip(
            (has_bare & facts["bare_is_coldest"]).tolist(), bare_words.tolist(),
            verdict.value.tolist(), (facts["dew"] - ZERO_CELSIUS).tolist(),
            (facts["air"] - ZERO_CELSIUS).tolist(), facts["rh"].tolist()):
        part = words if bare else "insulated surface"
        # Below 0 degC and below the dew point, water vapour deposits as frost and builds ice.
        ice = f"; {ICE}" if cold_c < 0 and cold_c < dew_c else ""
        message.append(f"{part} at {cold_c:.1f} degC, below the dew point {dew_c:.1f} degC + "
                       f"{margin:g} K margin (air {air_c:.0f} degC, {rh_r:.0f} % RH){ice}")
        remedy.append("insulate the bare parts, with a sealed vapour retarder" if bare
                      else "increase insulation thickness, with a sealed vapour retarder")
    return np.array(message, dtype=object), np.array(remedy, dtype=object)


KIND = CheckKind(
    evaluate=evaluate,
    word=word,
    params={"margin": (_margin, False)},
    fixable_by_insulation=True,
    description="a cold item whose outer surface is below the dew point of the air plus a margin")
