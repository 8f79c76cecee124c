"""The cautions every output carries: on the report, each work-order page and ``--help``."""

CAUTION = (
    "Caution: lagaudit is a screening calculation from register data. Confirm surface "
    "temperatures by measurement before acting; burn and corrosion-under-insulation findings "
    "need a competent person; old insulation may contain asbestos and must be surveyed before "
    "it is disturbed; freeze-protection and heat-tracing findings screen the insulation as "
    "recorded and do not replace the tracing supplier's design; local codes, the owner's "
    "standards and licensed engineers govern.")
