"""``layer-overheat``: a layer whose hot face runs above its material's maximum use temperature.

Evaluated at the check's site condition (by default each item's own); the hot face of each
layer comes from the engine's interface temperatures, and the limit from the material's
``max_temp`` in the rules.  Insulation cannot fix it by adding thickness outside (that makes
the inner face hotter): the remedy is a material rated for the temperature.
"""

from __future__ import annotations

import numpy as np

from audit.checks.base import CheckKind, Verdict, rule_source
from audit.repeats import per_distinct
from audit.thermal import ZERO_CELSIUS

NAME = "layer-overheat"


def evaluate(context, check, params):
    table = context.table
    states = context.states(check.site)
    selected = context.selected(check)
    materials = table["layer_materials"].to_numpy(object)
    worst_excess = np.full(len(table), -np.inf)
    worst_temp = np.full(len(table), np.nan)
    worst_limit = np.full(len(table), np.nan)
    worst_name = np.full(len(table), "", dtype=object)
    n_layers = per_distinct(lambda m: len(m) if isinstance(m, tuple) else 0,
                            materials).astype(int).max(initial=0)
    max_temp = {name: m.max_temp for name, m in context.rules.materials.items()}
    missing = table["condition"].to_numpy(object) == "missing"
    for j in range(n_layers):
        column = f"interface_{j}_K"
        if column not in states:
            break
        hot_face = states[column].to_numpy(float)
        names = per_distinct(lambda m: m[j] if isinstance(m, tuple) and len(m) > j else "",
                             materials)
        limit = per_distinct(lambda name: max_temp.get(name, np.nan), names).astype(float)
        with np.errstate(invalid="ignore"):
            excess = hot_face - limit
        better = selected & ~missing & np.isfinite(excess) & (excess > worst_excess)
        worst_excess[better] = excess[better]
        worst_temp[better] = hot_face[better]
        worst_limit[better] = limit[better]
        worst_name[better] = names[better]
    rows = np.flatnonzero(worst_excess > 0)
    materials = context.rules.materials
    sources = per_distinct(lambda name: rule_source(materials[name].origin, f"material.{name}",
                                                    materials[name].source), worst_name[rows])
    return Verdict(rows, value=worst_temp[rows] - ZERO_CELSIUS,
                   limit=worst_limit[rows] - ZERO_CELSIUS, unit="degC", limit_source=sources,
                   facts={"material": worst_name[rows]})


def word(context, check, params, verdict):
    message = [f"{name} hot face at {hot:.0f} degC, above its maximum use temperature of "
               f"{limit:.0f} degC" for name, hot, limit in zip(
                   verdict.facts["material"], verdict.value, verdict.limit)]
    return message, ("replace the overheated layer with a material rated for the temperature "
                     "(or add a high-temperature inner layer)")


KIND = CheckKind(evaluate=evaluate, word=word, params={}, fixable_by_insulation=False,
                 description="a layer whose hot face is above its material's maximum use temperature",
                 remedy_must_pass=True)
