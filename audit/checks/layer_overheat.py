"""``layer-overheat``: a layer whose hot face runs above its material's maximum use temperature.

Evaluated at the check's site condition (by default each item's own); the hot face of each
layer comes from the engine's interface temperatures, and the limit from the material's
``max_temp`` in the rules.  Insulation cannot fix it by adding thickness outside (that makes
the inner face hotter): the remedy is a material rated for the temperature.
"""

from __future__ import annotations

from audit.checks.layer_limits import layer_limit_kind

NAME = "layer-overheat"

KIND = layer_limit_kind(
    lambda material: material.max_temp, colder=False, face="hot", beyond="above",
    limit="maximum use temperature",
    remedy=("replace the overheated layer with a material rated for the temperature "
            "(or add a high-temperature inner layer)"),
    description="a layer whose hot face is above its material's maximum use temperature")
