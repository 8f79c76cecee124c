"""``condition``: missing, damaged or wet insulation, and uninsulated fittings on an insulated line.

A check of this kind flags what its ``flags`` parameter names:

* ``missing``: ``condition`` = ``missing`` (the whole item is bare);
* ``damaged``: ``condition`` = ``damaged`` with a bare share (``damaged_pct``) above
  ``damaged_threshold`` (default 0 %);
* ``wet``: ``condition`` = ``wet``;
* ``fittings``: at least ``min_fittings`` (default 1) uninsulated valves and flanges together,
  on a line that is insulated (at least one layer and not ``missing``).

One finding per item lists everything that applies ("damaged: 15 % of the length bare; 2
uninsulated valves").  The finding's value is the bare share of the item's length in %
(missing 100, damaged its ``damaged_pct``, wet 0: the insulation is there, but wet), with
the damaged threshold as its limit; a check that flags only ``fittings`` reports instead the
number of uninsulated fittings, with ``min_fittings`` as its limit.  Only accepted rows are
read; the register's facts need no thermal state, so items the engine could not compute are
still flagged.  The remedies are named repairs; insulation thickness does not fix them.
"""

from __future__ import annotations

import numpy as np

from audit.checks.base import CheckKind, Verdict, cold_service, has_layers
from audit.repeats import per_distinct
from audit.rules.converters import choice, list_of, quantity

NAME = "condition"

FLAGS = ("missing", "damaged", "wet", "fittings")
REINSTATE_MISSING = "reinstate the insulation to the registered build-up (not below the specification)"
REINSTATE_DAMAGED = "reinstate the damaged share to the installed build-up"
DRY_OUT = "dry out or replace wet insulation like for like; find and stop the water entry"
COVERS = "fit removable insulation covers on fittings"
COVERS_COLD = "fit removable vapour-sealed insulation covers on fittings (cold service)"


def _count(value):
    if isinstance(value, bool) or not isinstance(value, int) or value < 1:
        raise ValueError(f"{value!r} is not a whole number of fittings, 1 or more")
    return value


def _plural(n: int, word: str) -> str:
    return f"{n} uninsulated {word}{'' if n == 1 else 's'}"


def _words(missing, damaged, wet, fittings, share, valves, flanges, cold) -> tuple[str, str]:
    """(message, remedy) of one item's condition finding."""
    parts, actions = [], []
    if missing:
        parts.append("insulation missing: 100 % of the length bare")
        actions.append(REINSTATE_MISSING)
    if damaged:
        parts.append(f"damaged: {share:g} % of the length bare")
        actions.append(REINSTATE_DAMAGED)
    if wet:
        parts.append("wet insulation")
        actions.append(DRY_OUT)
    if fittings:
        parts.extend(_plural(int(n), word) for n, word in ((valves, "valve"), (flanges, "flange"))
                     if n > 0)
        actions.append(COVERS_COLD if cold else COVERS)
    return "; ".join(parts), "; ".join(dict.fromkeys(actions))


def evaluate(context, check, params):
    table = context.table
    flags = set(params["flags"])
    threshold = params.get("damaged_threshold", 0.0)
    least = params.get("min_fittings", 1)
    chosen = (table["status"] == "ok").to_numpy()
    if check.applies_to is not None:
        chosen = chosen & check.applies_to.mask(table)
    condition = table["condition"].to_numpy(object)
    share = table["damaged_pct"].to_numpy(float)
    valves = table["valves"].to_numpy(float)
    flanges = table["flanges"].to_numpy(float)
    insulated = context.once(has_layers)

    missing = chosen & ("missing" in flags) & (condition == "missing")
    with np.errstate(invalid="ignore"):
        damaged = chosen & ("damaged" in flags) & (condition == "damaged") & (share > threshold)
    wet = chosen & ("wet" in flags) & (condition == "wet")
    fittings = (chosen & ("fittings" in flags) & insulated & (condition != "missing")
                & (valves + flanges >= least))
    rows = np.flatnonzero(missing | damaged | wet | fittings)
    if flags == {"fittings"}:
        value, limit, unit = (valves + flanges)[rows], float(least), "fittings"
    else:
        value = np.select([condition[rows] == "missing", condition[rows] == "damaged"],
                          [100.0, share[rows]], 0.0)
        limit, unit = threshold, "%"
    return Verdict(rows, value=value, limit=limit, unit=unit, facts={
        "flags": [x[rows] for x in (missing, damaged, wet, fittings, share, valves, flanges)]})


def word(context, check, params, verdict):
    worded = per_distinct(_words, *verdict.facts["flags"], cold_service(context)[verdict.rows])
    return [m for m, _ in worded], [r for _, r in worded]


KIND = CheckKind(
    thermal=False,
    evaluate=evaluate,
    word=word,
    params={
        "flags": (list_of(choice(*FLAGS), "flags: " + ", ".join(FLAGS)), True),
        "damaged_threshold": (quantity("percent", "percent", low=0.0, high=100.0), False),
        "min_fittings": (_count, False),
    },
    fixable_by_insulation=False,
    remedied_by_repair=True,
    description="missing, damaged or wet insulation, and uninsulated valves and flanges on an "
                "insulated line")
