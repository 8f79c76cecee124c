"""The cautions every output carries: on the report, each work-order page and ``--help``."""

CAUTION = (
    "Caution: lagaudit is a screening calculation from register data. Confirm surface "
    "temperatures by measurement before acting; burn and corrosion-under-insulation findings "
    "need a competent person; old insulation may contain asbestos and must be surveyed before "
    "it is disturbed; freeze-protection and heat-tracing findings screen the insulation as "
    "recorded and do not replace the tracing supplier's design; local codes, the owner's "
    "standards and licensed engineers govern.")

#: With field readings (``--survey``): what biases an infrared reading, on the report and in
#: the README's survey walk-through.
THERMOGRAPHY = (
    "An infrared reading is only as good as its emissivity setting and the "
    "reflections around it. Bright metal jackets (aluminium, stainless steel; emissivity about "
    "0.1-0.3) reflect their surroundings and read far from their true temperature: read them "
    "on a patch of known emissivity (tape or paint) and record that emissivity. Record the air "
    "temperature, wind and humidity with every reading, read out of direct sun and not just "
    "after rain, and keep the date and position. A reading shows where to look; it does not "
    "replace inspection by a competent person, and before insulation is opened on old plant, "
    "survey it for asbestos. Local codes, the owner's standards and licensed engineers govern.")
