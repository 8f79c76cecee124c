"""Reports for people: ``report.html``, ``report.pdf`` and the work-order packs.

``write_reports(audit, out_dir, meta=..., formats=...)`` is the one entry point; the command
line passes its ``--format`` list through (names other than ``html``, ``pdf`` and
``workorders`` are for the tabular writers and are ignored here).  ``workorders`` writes the
work-order packs (``workorders/<area>.pdf`` and ``workorders.csv``).
"""

from __future__ import annotations

from pathlib import Path

from audit.cautions import CAUTION
from audit.report.context import MAX_TABLE_ROWS, build_context
from audit.report.html import render
from audit.report.pdf import write_pdf
from audit.report.workorders import write_workorders

REPORT_FORMATS = ("html", "pdf", "workorders")


def write_reports(audit, out_dir, *, meta: dict, formats, economics=None,
                  max_rows: int = MAX_TABLE_ROWS) -> list[Path]:
    """Write the reports asked for in ``formats`` into ``out_dir``; the paths written.

    ``meta``: ``tool``, ``run_at``, ``registers`` ([{file, sha256}]), ``surface_model`` and
    optionally ``rules_digest`` (else computed from the rule files' bytes).  ``economics``:
    the economics object (``per_row``, ``currency``, ``assumptions``, ...) or None, in which
    case the energy, cost and CO2 sections are left out.
    """
    asked = {f.strip().lower() for f in formats}
    out = Path(out_dir)
    out.mkdir(parents=True, exist_ok=True)
    written = []
    if asked & {"html", "pdf"}:
        html = render("report.html", build_context(audit, meta=meta, caution=CAUTION,
                                                   economics=economics, max_rows=max_rows))
        if "html" in asked:
            path = out / "report.html"
            path.write_text(html, encoding="utf-8")
            written.append(path)
        if "pdf" in asked:
            written.append(write_pdf(html, out / "report.pdf"))
    if "workorders" in asked:
        written += write_workorders(audit, out, caution=CAUTION, meta=meta)
    return written
