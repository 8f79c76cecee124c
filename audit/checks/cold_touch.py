"""``cold-touch``: an accessible item whose outer surface is cold enough to injure skin.

The cold counterpart of ``touch-temperature``: evaluated under the check's site condition, each
part of the item is held to the cold-contact limit of its surface class: the insulated outer
surface to its jacket's ``surface`` class (``metal`` or ``non-metal``; a row with only an
emissivity is taken as metal, the stricter class), any bare part (bare item, missing or
damaged insulation, uninsulated fittings) to the metal limit; for a cold item the bare part is
its coldest, the engine's ``surface_temp_K``.  A surface *below* the limit fails.

Why metal is stricter: the skin's contact temperature lies between the skin's and the
surface's, weighted by each side's contact coefficient sqrt(k rho c); a metal's is far larger
than skin's, so touching metal brings the skin almost to the metal's temperature, while a
plastic or fabric jacket leaves it much warmer (ISO 13732-3 states its limits by material and
contact time for this reason).  Insulation, a cover or a guard fixes it.
"""

from __future__ import annotations

from audit.checks.base import CheckKind
from audit.checks.touch_temperature import surface_verdict, surface_words
from audit.rules.converters import boolean, quantity, temperature, text

NAME = "cold-touch"


def evaluate(context, check, params):
    return surface_verdict(context, check, params["limit_metal"], params["limit_non_metal"],
                           cold=True)


def word(context, check, params, verdict):
    return surface_words(
        context, params, verdict, beyond="below",
        limit_name=params.get("injury", "cold injury"),
        bare_action="insulate the bare parts (with a sealed vapour retarder) or fit a cover",
        jacket_action="increase insulation thickness, with a sealed vapour retarder")


KIND = CheckKind(
    evaluate=evaluate,
    word=word,
    params={
        "limit_metal": (temperature, True),
        "limit_non_metal": (temperature, True),
        "contact_time": (quantity("s", "s", low=0.0, low_open=True), False),
        "injury": (text, False),
        "guard_allowed": (boolean, False),
    },
    fixable_by_insulation=True,
    description="an accessible item whose outer surface is below the cold-contact limit of its "
                "surface class")
