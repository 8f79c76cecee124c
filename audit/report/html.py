"""HTML from the report templates: jinja2 with autoescaping on for every template."""

from __future__ import annotations

import jinja2

from audit.report.charts import SEVERITY_COLOURS

_ENVIRONMENT = jinja2.Environment(
    loader=jinja2.PackageLoader("audit.report", "templates"),
    autoescape=True,              # register text is untrusted: always escaped, never markup
    undefined=jinja2.StrictUndefined,  # a missing value is a bug, not an empty cell
    trim_blocks=True, lstrip_blocks=True)


def render(template: str, context: dict) -> str:
    """The named template rendered with ``context`` (plus the severity colours)."""
    return _ENVIRONMENT.get_template(template).render(severity_colours=SEVERITY_COLOURS, **context)
