"""The ``tracing`` and ``schedule`` cells: what heat tracing a line has, and its pipe schedule.

``tracing`` grammar (case and spacing free):

- ``none`` (also ``no``, ``untraced``): the line is not traced;
- ``electric RATING``: electric tracing, RATING a heat output per length of cable, W/m if no
  unit (``electric 30 W/m``, ``electric 10 W/ft``); ``electric 2x15 W/m`` is two cables of
  15 W/m each;
- ``steam SIZE [TEMPERATURE]``: a steam tracer tube of SIZE inches (``steam 1/2in``,
  ``steam 3/8"``, ``steam 0.5 in``), optionally with its steam temperature (``steam 1/2in
  150 degC``; degC if no unit); without one, the rules' steam temperature is used.

Every pattern is anchored, with one way to match a run of digits, so the time is linear in
the cell's length (DEVELOPERS.md, "Hostile input").
"""

from __future__ import annotations

import math
import re
from functools import lru_cache

from audit.io.readers import cells
from audit.problems import Problem
from audit.units import NUMBER, squeeze

#: Tracing kinds as the item table holds them ("" where the cell is empty).
KINDS = ("none", "electric", "steam")
_NONE_WORDS = frozenset({"none", "no", "untraced"})
_ELECTRIC = re.compile(rf"^electric(?:al)? (?:(?P<count>\d{{1,3}}) ?[x×*] ?)?(?P<rating>{NUMBER.pattern}.*)$",
                       re.IGNORECASE)
_STEAM = re.compile(r"^steam (?P<size>\d{1,2} ?/ ?\d{1,2}|\d{1,2}(?:\.\d{1,3})?|\.\d{1,3})"
                    r" ?(?:in|inch|\"|″)?(?: (?P<temp>[^ ].*))?$", re.IGNORECASE)

EXPECTED = ("none, electric RATING (W/m if no unit: electric 30 W/m, or electric 2x15 W/m for "
            "two cables) or steam SIZE [steam temperature] (steam 1/2in, steam 1/2in 150 degC)")
_NOT_TRACING = Problem("not-tracing", "is not a heat-tracing description", EXPECTED)


@lru_cache(maxsize=4096)
def tracing(text: str):
    """``(kind, electric [W/m], tracer size [inch], steam [K], problem)`` of one cell.

    The electric output is the rating times the number of cables (NaN unless electric); the
    tracer size and steam temperature are NaN unless steam (the temperature also where the
    cell gives none).
    """
    nan = math.nan
    text = squeeze(text)
    if text.lower() in _NONE_WORDS:
        return "none", nan, nan, nan, None
    if match := _ELECTRIC.match(text):
        count = int(match.group("count") or 1)
        rating, problem = cells.quantity(match.group("rating"), "W/m", "W/m",
                                         "a heat output per length", 0.0, math.inf, True)
        if problem is not None or count == 0:
            return "", nan, nan, nan, Problem(
                "not-tracing", "does not give an electric rating", EXPECTED)
        return "electric", count * rating, nan, nan, None
    if match := _STEAM.match(text):
        size = match.group("size").replace(" ", "")
        top, _, bottom = size.partition("/")
        inches = int(top) / int(bottom) if bottom else float(size)
        if not (inches > 0 and math.isfinite(inches)):
            return "", nan, nan, nan, _NOT_TRACING
        steam = nan
        if match.group("temp"):
            steam, _, _, problem, _ = cells.temperature(match.group("temp"), "degC")
            if problem is not None or not math.isfinite(steam):
                return "", nan, nan, nan, Problem(
                    "not-tracing", "does not give a steam temperature after the tracer size",
                    EXPECTED)
        return "steam", nan, inches, steam, None
    return "", nan, nan, nan, _NOT_TRACING
