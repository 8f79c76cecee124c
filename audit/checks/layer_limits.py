"""What ``layer-overheat`` and ``layer-too-cold`` share: each layer's inner face (the face
towards the process, the engine's ``interface_{j}_K``) held to a use-temperature limit of its
material, and the worst layer of each item.

The inner face is the hottest face of a layer on a hot item and the coldest on a cold one,
so one face serves both limits: above ``max_temp`` the layer overheats; below ``min_temp`` it
is colder than its material is rated for.  A material without the limit (NaN) is never
flagged; missing insulation has no layer to judge.
"""

from __future__ import annotations

import numpy as np

from audit.checks.base import CheckKind, Verdict, rule_source
from audit.repeats import per_distinct
from audit.thermal import ZERO_CELSIUS


def worst_layer(context, check, limit_of, colder: bool) -> Verdict:
    """The verdict on each item's worst layer: the one whose inner face lies farthest beyond
    its material's limit (``limit_of(material) -> K``, NaN for none); beyond means below the
    limit when ``colder``, above it otherwise.  ``facts["material"]`` names that layer."""
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
    limits = {name: limit_of(m) for name, m in context.rules.materials.items()}
    missing = table["condition"].to_numpy(object) == "missing"
    sign = -1.0 if colder else 1.0
    for j in range(n_layers):
        column = f"interface_{j}_K"
        if column not in states:
            break
        face = states[column].to_numpy(float)
        names = per_distinct(lambda m: m[j] if isinstance(m, tuple) and len(m) > j else "",
                             materials)
        limit = per_distinct(lambda name: limits.get(name, np.nan), names).astype(float)
        with np.errstate(invalid="ignore"):
            excess = sign * (face - limit)
        better = selected & ~missing & np.isfinite(excess) & (excess > worst_excess)
        worst_excess[better] = excess[better]
        worst_temp[better] = face[better]
        worst_limit[better] = limit[better]
        worst_name[better] = names[better]
    rows = np.flatnonzero(worst_excess > 0)
    materials = context.rules.materials
    sources = per_distinct(lambda name: rule_source(materials[name].origin, f"material.{name}",
                                                    materials[name].source), worst_name[rows])
    return Verdict(rows, value=worst_temp[rows] - ZERO_CELSIUS,
                   limit=worst_limit[rows] - ZERO_CELSIUS, unit="degC", limit_source=sources,
                   facts={"material": worst_name[rows]})


def layer_limit_kind(limit_of, colder: bool, face: str, beyond: str, limit: str, remedy: str,
                     description: str) -> CheckKind:
    """The check kind holding each layer's inner face to ``limit_of(material)``: its findings
    say "<material> <face> face at T degC, <beyond> its <limit> of L degC"; insulation added
    outside does not move the inner face, so every remedy must pass it too."""
    def evaluate(context, check, params):
        return worst_layer(context, check, limit_of, colder=colder)

    def word(context, check, params, verdict):
        message = [f"{name} {face} face at {value:.0f} degC, {beyond} its {limit} of "
                   f"{bound:.0f} degC" for name, value, bound in zip(
                       verdict.facts["material"], verdict.value, verdict.limit)]
        return message, remedy

    return CheckKind(evaluate=evaluate, word=word, params={}, fixable_by_insulation=False,
                     description=description, remedy_must_pass=True)
