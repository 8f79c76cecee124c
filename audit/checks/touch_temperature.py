"""``touch-temperature``: an accessible item whose outer surface is hot enough to burn.

Evaluated under the check's site condition (shipped: the hot still day, which makes surfaces
hottest).  Each part of the item is held to the burn limit of its surface class:

* the insulated outer surface to the limit of its jacket's ``surface`` class in the rules
  (``metal`` or ``non-metal``); a row that gives only an emissivity, no jacket, is held to the
  metal limit (the stricter class in practice) and its finding says so;
* any bare part (a bare item, missing insulation, the bare share of damaged insulation,
  uninsulated valves and flanges on a pipe) is bare metal, held to the metal limit; for a hot
  item it is the item's hottest part, the engine's ``surface_temp_K``.

The limit comes from ``limit_metal`` / ``limit_non_metal``, or for metal from a table of burn
thresholds by contact time (``burn_thresholds``, read at ``contact_time``; no interpolation
between published points).  Insulation (or a personnel guard, where ``guard_allowed``) fixes it.
"""

from __future__ import annotations

import numpy as np

from audit.checks.base import CheckKind, Verdict, bare_parts
from audit.errors import RuleError
from audit.repeats import per_distinct
from audit.rules.converters import boolean, quantity, rows, temperature
from audit.thermal import ZERO_CELSIUS, table_surfaces

NAME = "touch-temperature"

_SECONDS = quantity("s", "s", low=0.0, low_open=True)


def insulated_surface_class(table, rules):
    """Per row: burn class of the insulated outer surface, and whether it was assumed.

    The row's jacket, else the rules' default jacket when the row gives no emissivity (as the
    thermal glue does); a row with only an emissivity is taken as metal (assumed = True).
    """
    default = rules.defaults.get("jacket", "")

    def surface(name, has_eps):
        name = name or ("" if has_eps else default)
        return (rules.jackets[name].surface, False) if name in rules.jackets else ("metal", True)

    classes = per_distinct(surface, table["jacket"].fillna("").to_numpy(object),
                           np.isfinite(table["emissivity"].to_numpy(float)))
    return (np.array([k for k, _ in classes], dtype=object),
            np.array([a for _, a in classes], dtype=bool))


def _limits(check, params):
    """(metal limit [K], non-metal limit [K]); RuleError naming the key when they conflict."""
    def error(message, key, value=None, expected=None):
        return RuleError(message, file=check.origin, column=f"check.{check.name}.{key}",
                         value=value, expected=expected)

    table = params.get("burn_thresholds")
    if table is None:
        if "limit_metal" not in params:
            raise error("missing key 'limit_metal'", "limit_metal",
                        expected="limit_metal = <degC>, or burn_thresholds with contact_time")
        return params["limit_metal"], params["limit_non_metal"]
    if "limit_metal" in params:
        raise error("limit_metal and burn_thresholds both given", "limit_metal",
                    expected="one of them: the metal limit is read from burn_thresholds at "
                             "contact_time")
    if "contact_time" not in params:
        raise error("burn_thresholds needs contact_time", "contact_time",
                    expected="contact_time = <s>, one of the table's contact times")
    for time, threshold in table:
        if np.isclose(time, params["contact_time"], rtol=1e-9, atol=0.0):
            return threshold, params["limit_non_metal"]
    raise error("contact_time is not a row of burn_thresholds", "contact_time",
                value=params["contact_time"],
                expected="one of " + ", ".join(f"{t:g} s" for t, _ in table)
                         + " (values between published points are not interpolated)")


def evaluate(context, check, params):
    return surface_verdict(context, check, *_limits(check, params))


def surface_verdict(context, check, limit_metal, limit_non_metal, *, cold=False):
    """The parts of each selected item beyond the limit of their surface class [K]: hotter
    than it, or with ``cold`` colder (``cold-touch``).  The insulated surface is held to its
    jacket's class, any bare part to the metal limit; the worse of the two is reported."""
    sign = -1.0 if cold else 1.0
    states = context.states(check.site)
    selected = context.selected(check)
    worst = states["surface_temp_K"].to_numpy(float)
    insulated_temp = states["surface_temp_insulated_K"].to_numpy(float)
    has_bare = context.once(table_surfaces)[1]
    kind, assumed = context.once(insulated_surface_class, rules=True)
    insulated_limit = np.where(kind == "metal", limit_metal, limit_non_metal)

    # The insulated surface: the worst part when nothing is bare, else the main insulated wall.
    ins_temp = np.where(has_bare, insulated_temp, worst)
    with np.errstate(invalid="ignore"):
        ins_excess = np.where(np.isfinite(ins_temp), sign * (ins_temp - insulated_limit), -np.inf)
        bare_excess = np.where(has_bare & np.isfinite(worst), sign * (worst - limit_metal), -np.inf)
    bare_is_worse = bare_excess >= ins_excess
    excess = np.maximum(ins_excess, bare_excess)
    flagged = np.flatnonzero(selected & (excess > 0))
    return Verdict(
        flagged, value=np.where(bare_is_worse, worst, ins_temp)[flagged] - ZERO_CELSIUS,
        limit=np.where(bare_is_worse, limit_metal, insulated_limit)[flagged] - ZERO_CELSIUS,
        unit="degC", facts={"bare": bare_is_worse[flagged], "surface": kind[flagged],
                            "assumed": assumed[flagged]})


def surface_words(context, params, verdict, *, beyond: str, limit_name: str, bare_action: str,
                  jacket_action: str):
    """Message and remedy of each row of a :func:`surface_verdict` (hot or cold): the part
    judged, its temperature ``beyond`` (``above``/``below``) the ``limit_name`` limit of its
    surface class, and the action for bare parts or a jacket, a guard where allowed."""
    bare_words = context.once(bare_parts)[verdict.rows]
    guard = " or fit a personnel guard" if params.get("guard_allowed", False) else ""
    contact = params.get("contact_time")
    suffix = f" (contact time {contact:g} s)" if contact is not None else ""
    facts = verdict.facts
    message, remedy = [], []
    # Python values in the loop, not numpy scalars: tens of thousands of rows.
    for bare, words, surface, guessed, v, lim in zip(
            facts["bare"].tolist(), bare_words.tolist(), facts["surface"].tolist(),
            facts["assumed"].tolist(), verdict.value.tolist(), verdict.limit.tolist()):
        if bare:
            text = f"{words} at {v:.0f} degC, {beyond} the {lim:.0f} degC {limit_name} limit for metal"
            action = bare_action
        else:
            text = (f"{surface} jacket surface at {v:.0f} degC, {beyond} the {lim:.0f} degC "
                    f"{limit_name} limit for {surface} surfaces")
            if guessed:
                text += "; no jacket named, only an emissivity: taken as metal (conservative)"
            action = jacket_action
        message.append(text + suffix)
        remedy.append(action + guard)
    return np.array(message, dtype=object), np.array(remedy, dtype=object)


def word(context, check, params, verdict):
    return surface_words(context, params, verdict, beyond="above", limit_name="burn",
                         bare_action="insulate the bare parts",
                         jacket_action="increase insulation thickness")


KIND = CheckKind(
    evaluate=evaluate,
    word=word,
    params={
        "limit_metal": (temperature, False),
        "limit_non_metal": (temperature, True),
        "burn_thresholds": (rows(_SECONDS, temperature, "contact time s, burn threshold degC"),
                            False),
        "contact_time": (_SECONDS, False),
        "guard_allowed": (boolean, False),
    },
    fixable_by_insulation=True,
    description="an accessible item whose outer surface exceeds the burn limit of its surface "
                "class",
    validate=_limits)
