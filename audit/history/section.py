"""The report's "Since the last audit" section: counts, the oldest unrepaired findings first,
the findings that are gone, and the trend across every recorded audit of the plant."""

from __future__ import annotations

import numpy as np
import pandas as pd

from audit import display_units
from audit.report import charts
from audit.rules import SEVERITIES

_RANK = {name: rank for rank, name in enumerate(SEVERITIES)}


def since_last_section(since, audit, *, max_rows: int, units: str = "si") -> dict:
    """What the report template shows for ``since`` (a :class:`~audit.history.since.SinceLast`),
    numbers in ``units`` (``si`` or ``us``)."""
    words = display_units.text if units == "us" else str
    findings = since.findings
    standing = findings[findings["since_last"] != "new"]
    order = np.lexsort((standing["tag"].astype(str).to_numpy(),
                        -standing["severity"].map(_RANK).to_numpy(float),
                        standing["first_reported"].astype(str).to_numpy()))
    oldest = standing.iloc[order].head(max_rows)
    closed = since.closed.head(max_rows)
    return {
        "plant": since.plant,
        "last_run_at": since.last_run_at.strftime("%Y-%m-%d %H:%M UTC") if since.last_run_at else "",
        "audits_recorded": len(since.audits),
        "counts": since.counts(),
        "standing_total": len(standing), "standing_truncated": len(standing) > max_rows,
        "oldest": [{"tag": r["tag"], "check": r["check"], "severity": r["severity"],
                    "first_reported": r["first_reported"], "since_last": r["since_last"],
                    "change": words(r["change_since_last"])}
                   for r in oldest.to_dict(orient="records")],
        "closed_total": len(since.closed), "closed_truncated": len(since.closed) > max_rows,
        "closed": closed.to_dict(orient="records"),
        "trend": _trend(since, audit, units),
    }


def _trend(since, audit, units: str = "si"):
    """Every recorded audit of the plant and this one, oldest first."""
    audits, by_check = since.audits, since.by_check
    audited = (audit.results["status"] == "audited").to_numpy()
    now = pd.Series(since.findings["check"].value_counts(), name="now")
    counts = by_check.reindex(audits["id"]).fillna(0)
    counts = pd.concat([counts, now.to_frame().T]).fillna(0)
    labels = [pd.Timestamp(t).strftime("%Y-%m-%d %H:%M") for t in audits["run_at"]]
    labels.append(since.run_at.strftime("%Y-%m-%d %H:%M") + " (this)")
    heat = np.append(audits["heat_loss_w"].to_numpy(float),
                     np.nansum(audit.results["heat_loss [W]"].to_numpy(float)[audited])) / 1000.0
    cost = np.append(audits["annual_cost"].to_numpy(float),
                     np.nansum(audit.economics.per_row["annual_cost"].to_numpy(float)))
    if units == "us":  # kW -> kBtu/h: the same factor as W -> Btu/h
        heat = display_units.to_us(heat, "W")
    return charts.audit_trend(labels, heat, cost, counts, str(audit.economics.currency),
                              power="kW" if units == "si" else "kBtu/h")
