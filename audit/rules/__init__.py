"""Rule files: materials, jackets, metals, site conditions, fittings and column aliases.

:func:`load_rules` reads the shipped ``rules/`` folder and layers user folders over it.
"""

from audit.rules.loader import load_rules, shipped_rules_dir
from audit.rules.model import SEVERITIES, Check, Fitting, Jacket, Material, Metal, Rules, Site, Spec

__all__ = ["SEVERITIES", "Check", "Spec", "Fitting", "Jacket", "Material", "Metal", "Rules", "Site", "load_rules",
           "shipped_rules_dir"]
