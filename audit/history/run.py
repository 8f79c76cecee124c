"""What ``lagaudit run/demo --history DB`` adds to a run, in the order the command line calls it:
open the history before the audit (so a bad database stops the run before anything is written),
compare after the audit, record after the outputs are written."""

from __future__ import annotations

import dataclasses
from pathlib import Path

from audit.digests import rules_digest, sha256_file
from audit.history.since import compare_with_last, plant_name, record_audit, write_closed
from audit.history.store import History
from audit.io.writers.place import OutputFolder
from audit.outputs import placed


def open_history(where: str | None) -> History | None:
    """The history database of ``--history``, schema checked (None without the option)."""
    return History.open(where) if where else None


def compare_audit(history: History, audit, *, plant: str | None, fallback: str | None = None):
    """``audit`` with its findings compared with the plant's last recorded audit (``since_last``,
    ``first_reported``, ``change_since_last``) and the comparison in ``audit.history``."""
    name = plant_name(plant, audit.rules, fallback)
    since = compare_with_last(history, audit, plant=name)
    return dataclasses.replace(audit, findings=since.findings, history=since)


#: What ``record_run`` writes into the output folder.
HISTORY_OUTPUTS = ("closed.csv",)


def record_run(history: History, audit, registers, folder: OutputFolder, *,
               surface_model: str) -> tuple[list[Path], str]:
    """Write ``closed.csv`` into ``folder`` (put in place whole, as every output) and record the
    audit, then close ``history``; the paths written and a line for the user."""
    since = audit.history
    closed = placed(folder, HISTORY_OUTPUTS[0], write_closed, since)
    try:
        audit_id = record_audit(history, audit, since, surface_model=surface_model,
                                registers=[{"file": str(p), "sha256": sha256_file(p)} for p in registers],
                                rules_digest=rules_digest(audit.rules.files))
    finally:
        history.close()
    c = since.counts()
    against = (f"against the audit of {since.last_run_at:%Y-%m-%d %H:%M} UTC: {c['new']} new, "
               f"{c['recurring']} recurring, {c['worsened']} worsened, {c['improved']} improved, "
               f"{c['closed']} closed" if since.last_run_at else "its first recorded audit")
    return [closed], f"recorded audit {audit_id} of plant {since.plant!r} in {history.label} ({against})."
