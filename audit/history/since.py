"""One audit against the history: compare with the plant's last recorded audit before the
outputs are written, record the audit after they are.

``compare_with_last`` reads; ``record_audit`` writes everything in one transaction.  A run
that stops between the two (an output that cannot be written, say) records nothing.
"""

from __future__ import annotations

from dataclasses import dataclass
from datetime import datetime
from pathlib import Path

import numpy as np
import pandas as pd

from audit import __version__
from audit.history.compare import compare, tag_keys
from audit.history.store import History, utc_now
from audit.io.writers import write_csv
from audit.repeats import per_distinct
from audit.results import layers_text

#: The plant name used when neither ``--plant`` nor a ``[defaults] plant`` rule gives one.
DEFAULT_PLANT = "default"


@dataclass
class SinceLast:
    """This audit beside the plant's history."""

    plant: str
    run_at: datetime               #: this audit, UTC
    last_run_at: datetime | None   #: the plant's last recorded audit, UTC; None if none
    findings: pd.DataFrame         #: this audit's findings with since_last, first_reported, change
    closed: pd.DataFrame           #: the last audit's findings that are gone
    audits: pd.DataFrame           #: the plant's recorded audits, oldest first (this one not yet)
    by_check: pd.DataFrame         #: findings per recorded audit (rows: audit id) and check

    def counts(self) -> dict:
        """Findings by ``since_last`` word, and closed findings by ``why``."""
        words = self.findings["since_last"].value_counts()
        why = self.closed["why"].value_counts()
        return {"new": int(words.get("new", 0)), "recurring": int(words.get("recurring", 0)),
                "worsened": int(words.get("worsened", 0)), "improved": int(words.get("improved", 0)),
                "closed": len(self.closed), "cleared": int(why.get("cleared", 0)),
                "item-not-in-register": int(why.get("item-not-in-register", 0)),
                "item-rejected": int(why.get("item-rejected", 0))}


def plant_name(given: str | None, rules, fallback: str | None = None) -> str:
    """``--plant`` if given, else the rules' ``[defaults] plant``, else ``fallback``, else
    :data:`DEFAULT_PLANT`."""
    return (given or rules.defaults.get("plant") or fallback or DEFAULT_PLANT).strip() or DEFAULT_PLANT


def compare_with_last(history: History, audit, *, plant: str) -> SinceLast:
    """``audit``'s findings compared with the last audit of ``plant`` in ``history``."""
    run_at = utc_now()
    last = history.last_audit(plant)
    last_run_at, previous = last if last is not None else (None, None)
    findings, closed = compare(audit.findings, audit.results[["tag", "status"]], previous,
                               today=run_at.strftime("%Y-%m-%d"),
                               last_date=last_run_at.strftime("%Y-%m-%d") if last_run_at else "")
    return SinceLast(plant, run_at, last_run_at, findings, closed, history.audits(plant),
                     history.findings_by_check(plant))


def record_audit(history: History, audit, since: SinceLast, *, registers: list[dict],
                 rules_digest: str, surface_model: str) -> int:
    """Write ``audit`` (with ``since``'s findings) into ``history``; the new audit's id."""
    results, per_row = audit.results, audit.economics.per_row
    audited = (results["status"] == "audited").to_numpy()
    row = {"plant": since.plant, "run_at": since.run_at, "tool": f"lagaudit {__version__}",
           "rules_digest": rules_digest, "surface_model": surface_model,
           "currency": str(audit.economics.currency), "rows": len(results),
           "audited": int(audited.sum()), "rejected": int((~audited).sum()),
           "findings": len(since.findings),
           "heat_loss_w": _total(results["heat_loss [W]"].to_numpy(float)[audited]),
           "annual_energy_mwh": _total(per_row["annual_energy [MWh]"]),
           "annual_cost": _total(per_row["annual_cost"]),
           "annual_co2_t": _total(per_row["annual_co2 [t]"])}
    return history.record(row, registers, item_records(audit), finding_records(since.findings))


def item_records(audit) -> pd.DataFrame:
    """Per item: the recognised inputs and the results (the ``items`` table's columns)."""
    table, results, per_row = audit.table, audit.results, audit.economics.per_row
    layers = per_distinct(layers_text, table["layer_materials"].to_numpy(object),
                          table["layer_thicknesses_m"].to_numpy(object))

    def result(column):
        return results[column].to_numpy(float) if column in results else np.full(len(results), np.nan)

    return pd.DataFrame({
        "row": np.arange(len(table)), "tag": table["tag"].astype(str).to_numpy(),
        "tag_key": tag_keys(table["tag"]), "source": table["source"].astype(str).to_numpy(),
        "status": results["status"].to_numpy(), "reason": results["reason"].astype(str).to_numpy(),
        "shape": table["shape"].to_numpy(), "nps": table["nps"].to_numpy(),
        "od_mm": table["od_m"].to_numpy(float) * 1000.0, "length_m": table["length_m"].to_numpy(float),
        "area_m2": table["area_m2"].to_numpy(float), "temp_c": table["temp_K"].to_numpy(float) - 273.15,
        "layers": layers, "jacket": table["jacket"].to_numpy(), "condition": table["condition"].to_numpy(),
        "damaged_pct": table["damaged_pct"].to_numpy(float), "location": table["location"].to_numpy(),
        "area_code": table["area_code"].astype(str).to_numpy(),
        "accessible": table["accessible"].to_numpy(bool), "service": table["service"].to_numpy(),
        "valves": table["valves"].to_numpy(), "flanges": table["flanges"].to_numpy(),
        "surface_temp_c": result("surface_temp [degC]"), "heat_loss_w_per_m": result("heat_loss [W/m]"),
        "heat_loss_w": result("heat_loss [W]"), "heat_flux_w_m2": result("heat_flux [W/m2]"),
        "annual_energy_mwh": per_row["annual_energy [MWh]"].to_numpy(float),
        "annual_cost": per_row["annual_cost"].to_numpy(float),
        "annual_co2_t": per_row["annual_co2 [t]"].to_numpy(float),
        "findings": results["findings"].astype(str).to_numpy(),
        "severity": results["severity"].astype(str).to_numpy(),
    })


def finding_records(findings: pd.DataFrame) -> pd.DataFrame:
    """Per finding: check, severity, value, limit and its basis (the ``findings`` table's columns)."""
    return pd.DataFrame({
        "seq": np.arange(len(findings)), "row": findings["row"].to_numpy(int),
        "tag": findings["tag"].astype(str).to_numpy(), "tag_key": tag_keys(findings["tag"]),
        "check": findings["check"].astype(str).to_numpy(), "kind": findings["kind"].astype(str).to_numpy(),
        "severity": findings["severity"].astype(str).to_numpy(),
        "value": pd.to_numeric(findings["value"], errors="coerce").to_numpy(float),
        "limit_value": pd.to_numeric(findings["limit"], errors="coerce").to_numpy(float),
        "unit": findings["unit"].astype(str).to_numpy(), "site": findings["site"].astype(str).to_numpy(),
        "limit_source": findings["limit_source"].astype(str).to_numpy(),
        "message": findings["message"].astype(str).to_numpy(),
        "since_last": findings["since_last"].to_numpy(),
        "first_reported": pd.to_datetime(findings["first_reported"]).dt.date.to_numpy(),
    })


def write_closed(since: SinceLast, path) -> Path:
    """``closed.csv`` at ``path``: the last audit's findings that are gone, with ``why``."""
    return write_csv(since.closed, Path(path))


def _total(values) -> float | None:
    values = np.asarray(values, float)
    return float(np.nansum(values)) if np.isfinite(values).any() else None
