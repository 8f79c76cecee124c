"""``lagaudit history DB``: the recorded audits as a table on screen, or as CSV files."""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pandas as pd

from audit.history.store import History
from audit.io.writers import write_csv

_SHOWN = [("id", "id"), ("plant", "plant"), ("run_at", "run at (UTC)"), ("audited", "audited"),
          ("rejected", "rejected"), ("findings", "findings"), ("heat_loss_w", "heat loss [kW]"),
          ("annual_energy_mwh", "energy [MWh/yr]"), ("annual_cost", "cost/yr")]


def describe_audits(history: History, plant: str | None = None) -> str:
    """The recorded audits, oldest first: date, plant, totals and the registers' SHA-256."""
    audits = history.audits(plant)
    where = f" for plant {plant!r}" if plant is not None else ""
    if not len(audits):
        return f"{history.label}: no audits recorded{where}."
    cells = [[_cell(name, r[name], r["currency"]) for name, _ in _SHOWN] for _, r in audits.iterrows()]
    heads = [head for _, head in _SHOWN]
    widths = [max(len(h), *(len(row[k]) for row in cells)) for k, h in enumerate(heads)]
    lines = [f"{history.label}: {len(audits)} audit{'s' if len(audits) != 1 else ''} recorded{where}",
             "  ".join(h.ljust(w) for h, w in zip(heads, widths)).rstrip()]
    for row, (_, audit) in zip(cells, audits.iterrows()):
        lines.append("  ".join(c.ljust(w) for c, w in zip(row, widths)).rstrip())
        lines.append(f"    registers: {audit['registers']}; rules digest {audit['rules_digest']}")
    return "\n".join(lines)


def export_audits(history: History, out_dir, plant: str | None = None) -> list[Path]:
    """``audits.csv`` (one row per audit, with its registers' digests), ``items.csv`` and
    ``findings.csv`` (every recorded row, with its audit's id, plant and date) in ``out_dir``."""
    out = Path(out_dir)
    out.mkdir(parents=True, exist_ok=True)
    audits = history.audits(plant).rename(columns={"id": "audit_id"})
    frames = {"audits.csv": audits, "items.csv": history.table("items", plant),
              "findings.csv": history.table("findings", plant).rename(columns={"limit_value": "limit"})}
    return [write_csv(_dated(frame), out / name) for name, frame in frames.items()]


def _dated(frame: pd.DataFrame) -> pd.DataFrame:
    if "run_at" in frame:
        frame = frame.assign(run_at=pd.to_datetime(frame["run_at"]).dt.strftime("%Y-%m-%dT%H:%M:%SZ"))
    return frame


def _cell(name: str, value, currency: str) -> str:
    if name == "run_at":
        return pd.Timestamp(value).strftime("%Y-%m-%d %H:%M")
    if name == "heat_loss_w":
        return "-" if value is None or not np.isfinite(value) else f"{value / 1000:,.1f}"
    if name in ("annual_energy_mwh", "annual_cost"):
        text = "-" if value is None or not np.isfinite(value) else f"{value:,.0f}"
        return f"{text} {currency}" if name == "annual_cost" else text
    return str(value)
