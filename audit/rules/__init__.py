"""Rule files: materials, jackets, metals, site conditions, fittings and column aliases.

:func:`load_rules` reads the shipped ``rules/`` folder and layers user folders over it.
"""

from audit.rules.loader import load_rules, shipped_rules_dir
from audit.rules.model import Fitting, Jacket, Material, Metal, Rules, Site

__all__ = ["Fitting", "Jacket", "Material", "Metal", "Rules", "Site", "load_rules",
           "shipped_rules_dir"]
