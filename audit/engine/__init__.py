"""The thermal engine: heat loss and surface temperature of insulated items, vectorised.

numpy arrays in SI units in, numpy arrays in SI units out (temperatures in kelvin); no
files, no pandas, no pint.  :func:`solve_items` solves a whole register;
:func:`solve_item` is the same for one item, for people who script.
"""

from importlib import import_module

_EXPORTS = {
    "ConductivityTables": "audit.engine.conduction",
    "ItemBatch": "audit.engine.items",
    "ItemStates": "audit.engine.items",
    "solve_items": "audit.engine.items",
    "ItemResult": "audit.engine.single",
    "solve_item": "audit.engine.single",
}

__all__ = sorted(_EXPORTS)


def __getattr__(name):
    # Lazy, so that importing one model module does not pull in the whole engine.
    if name in _EXPORTS:
        return getattr(import_module(_EXPORTS[name]), name)
    raise AttributeError(f"module 'audit.engine' has no attribute {name!r}")
