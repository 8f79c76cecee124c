"""``layer-too-cold``: a layer whose cold face runs below its material's minimum use temperature.

The cold-side twin of ``layer-overheat``: the inner face of each layer (on a cold item its
coldest face) comes from the engine's interface temperatures, the limit from the material's
``min_temp`` in the rules (a material without one is not judged).  Below it a foam may crack
or shrink from the pipe, and a material made for hot service takes up water; more insulation
outside does not warm the inner face, so the remedy is a material rated for the cold.
"""

from __future__ import annotations

from audit.checks.base import CheckKind
from audit.checks.layer_limits import worst_layer

NAME = "layer-too-cold"


def evaluate(context, check, params):
    return worst_layer(context, check, lambda material: material.min_temp, colder=True)


def word(context, check, params, verdict):
    message = [f"{name} cold face at {cold:.0f} degC, below its minimum use temperature of "
               f"{limit:.0f} degC" for name, cold, limit in zip(
                   verdict.facts["material"], verdict.value, verdict.limit)]
    return message, ("replace the layer with a material rated for the temperature (for "
                     "cryogenic service, one whose minimum use temperature is below the "
                     "process temperature), with a sealed vapour retarder")


KIND = CheckKind(evaluate=evaluate, word=word, params={}, fixable_by_insulation=False,
                 description="a layer whose cold face is below its material's minimum use temperature",
                 remedy_must_pass=True)
