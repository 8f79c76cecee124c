"""``layer-overheat``: a layer whose hot face runs above its material's maximum use temperature.

Evaluated at the check's site condition (by default each item's own); the hot face of each
layer comes from the engine's interface temperatures, and the limit from the material's
``max_temp`` in the rules.  Insulation cannot fix it by adding thickness outside (that makes
the inner face hotter): the remedy is a material rated for the temperature.
"""

from __future__ import annotations

from audit.checks.base import CheckKind
from audit.checks.layer_limits import worst_layer

NAME = "layer-overheat"


def evaluate(context, check, params):
    return worst_layer(context, check, lambda material: material.max_temp, colder=False)


def word(context, check, params, verdict):
    message = [f"{name} hot face at {hot:.0f} degC, above its maximum use temperature of "
               f"{limit:.0f} degC" for name, hot, limit in zip(
                   verdict.facts["material"], verdict.value, verdict.limit)]
    return message, ("replace the overheated layer with a material rated for the temperature "
                     "(or add a high-temperature inner layer)")


KIND = CheckKind(evaluate=evaluate, word=word, params={}, fixable_by_insulation=False,
                 description="a layer whose hot face is above its material's maximum use temperature",
                 remedy_must_pass=True)
