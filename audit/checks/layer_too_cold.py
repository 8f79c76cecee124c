"""``layer-too-cold``: a layer whose cold face runs below its material's minimum use temperature.

The cold-side twin of ``layer-overheat``: the inner face of each layer (on a cold item its
coldest face) comes from the engine's interface temperatures, the limit from the material's
``min_temp`` in the rules (a material without one is not judged).  Below it a foam may crack
or shrink from the pipe, and a material made for hot service takes up water; more insulation
outside does not warm the inner face, so the remedy is a material rated for the cold.
"""

from __future__ import annotations

from audit.checks.layer_limits import layer_limit_kind

NAME = "layer-too-cold"

KIND = layer_limit_kind(
    lambda material: material.min_temp, colder=True, face="cold", beyond="below",
    limit="minimum use temperature",
    remedy=("replace the layer with a material rated for the temperature (for cryogenic "
            "service, one whose minimum use temperature is below the process temperature), "
            "with a sealed vapour retarder"),
    description="a layer whose cold face is below its material's minimum use temperature")
