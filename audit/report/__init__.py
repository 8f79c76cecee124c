"""Reports for people: ``report.html``, ``report.pdf`` and the work-order packs.

``write_reports(audit, out_dir, meta=..., formats=...)`` is the one entry point; the command
line passes its ``--format`` list through (names other than ``html``, ``pdf`` and
``workorders`` are for the tabular writers and are ignored here).  ``workorders`` writes the
work-order packs (``workorders/<area>.pdf`` and ``workorders.csv``).
"""

from __future__ import annotations

from contextlib import nullcontext
from pathlib import Path

from audit.cautions import CAUTION
from audit.heap import give_back
from audit.report.context import MAX_TABLE_ROWS, build_context
from audit.report.html import render
from audit.report.pdf import write_pdf
from audit.io.writers.place import OutputFolder
from audit.report.workorders import build_orders, plan_packs, writing_workorders

REPORT_FORMATS = ("html", "pdf", "workorders")


def write_reports(audit, out_dir, *, meta: dict, formats, economics=None,
                  max_rows: int = MAX_TABLE_ROWS, max_pages: int | None = None,
                  units: str = "si") -> list[Path]:
    """Write the reports asked for in ``formats`` into ``out_dir``; the paths written.

    ``meta``: ``tool``, ``run_at``, ``registers`` ([{file, sha256}]), ``surface_model`` and
    optionally ``rules_digest`` (else computed from the rule files' bytes).  ``economics``:
    the economics object (``per_row``, ``currency``, ``assumptions``, ...) or None, in which
    case the energy, cost and CO2 sections are left out.  ``max_pages``: the work-order packs'
    cap on item pages (default ``MAX_WORKORDER_PAGES``), stated on the report's cover when it
    leaves orders off.  ``units``: ``si`` or ``us``, for every number, label and chart axis.
    Each file is written whole to a temporary name, then renamed.
    """
    asked = {f.strip().lower() for f in formats}
    folder = OutputFolder(out_dir)
    folder.prepare()
    plan = plan_packs(build_orders(audit), max_pages) if "workorders" in asked else None
    # The packs render in worker processes while the report is laid out here.
    packs = (nullcontext([]) if plan is None else
             writing_workorders(audit, folder.root, caution=CAUTION, meta=meta, plan=plan,
                                units=units))
    written = []
    with packs as written_packs:
        if asked & {"html", "pdf"}:
            html = render("report.html", build_context(
                audit, meta=meta, caution=CAUTION, economics=economics, max_rows=max_rows,
                packs=plan.summary() if plan is not None else None, units=units))
            if "html" in asked:
                with folder.writing("report.html") as temporary:
                    temporary.write_text(html, encoding="utf-8")
                written.append(folder.root / "report.html")
            if "pdf" in asked:
                with folder.writing("report.pdf") as temporary:
                    write_pdf(html, temporary)
                written.append(folder.root / "report.pdf")
                give_back()  # the layout's boxes, before workorders.csv is made
    return written + written_packs
