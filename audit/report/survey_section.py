"""The report's "Field survey" section, when the audit reconciled field readings: what became
of every reading, the readings against their predictions (a scatter chart with the 1:1 line),
the worst deviations, the energy and money the register alone would have missed, the readings
not used and why, and the cautions of thermography.  Selecting, sorting and summing only: the
figures are those of survey.csv and results.csv."""

from __future__ import annotations

import numpy as np
import pandas as pd

from audit import display_units
from audit.cautions import THERMOGRAPHY
from audit.checks.base import validated_params
from audit.checks.survey_deviation import KIND, NAME
from audit.display_units import named
from audit.report import charts
from audit.survey import survey_out


def survey_section(audit, economics, *, max_rows: int, units: str = "si", fmt) -> dict | None:
    """What the template shows of ``audit.survey`` (None without a survey); ``economics`` in
    ``units``; ``fmt`` formats a number as the report does."""
    survey = getattr(audit, "survey", None)
    if survey is None:
        return None
    shown = display_units.frame(survey_out(survey), units)
    temp = named("measured_temp", "degC", units)
    predicted = named("predicted_temp", "degC", units)
    loss, loss_predicted = named("measured_heat_loss", "W", units), named(
        "predicted_heat_loss", "W", units)
    symbol = "°C" if units == "si" else "°F"
    margin = _margin(audit.rules)
    if units == "us" and np.isfinite(margin):
        margin = float(display_units.to_us(np.array([margin]), "K")[0])
    # On the side of more heat through the insulation: hotter on a hot item, colder on a cold.
    hot = (survey["process_temp_K"].to_numpy(float) >= survey["air_temp_K"].to_numpy(float))
    deviation = shown[temp].to_numpy(float) - shown[predicted].to_numpy(float)
    worse = np.where(hot, 1.0, -1.0) * deviation
    matched = (shown["status"] == "matched").to_numpy()
    points = [(tag, p, m, bool(w > margin)) for tag, p, m, w, ok in zip(
        shown["tag"], shown[predicted].to_numpy(float), shown[temp].to_numpy(float), worse,
        matched) if ok]
    ranked = np.flatnonzero(matched & np.isfinite(worse))
    ranked = ranked[np.argsort(-worse[ranked], kind="stable")][:max_rows]
    worst = [{"tag": r["tag"], "source": r["source"], "date": r["date"], "position": r["position"],
              "measured": fmt(r[temp]), "predicted": fmt(r[predicted]),
              "deviation": fmt(worse[i]), "factor": fmt(r["condition_factor [-]"], 2),
              "loss": fmt(r[loss]), "loss_predicted": fmt(r[loss_predicted])}
             for i, r in zip(ranked, shown.iloc[ranked].to_dict(orient="records"))]
    unused = shown[~matched]
    counts = shown["status"].value_counts()
    return {
        "readings": len(shown), "matched": int(counts.get("matched", 0)),
        "rejected": int(counts.get("rejected", 0)), "unknown": int(counts.get("unknown tag", 0)),
        "item_count": int(survey.loc[matched, "item_row"].nunique()),
        "measured_items": int((audit.results.get("basis", pd.Series(dtype=object))
                               == "measured").sum()),
        "margin": fmt(margin) if np.isfinite(margin) else "",
        "symbol": symbol,
        "chart": charts.measured_against_predicted(points, symbol, margin),
        "worst": worst, "worst_total": int(ranked.size),
        "missed": _missed(audit, economics, max_rows, units, fmt),
        "unused": [{"tag": r["tag"], "source": r["source"], "status": r["status"],
                    "reason": r["reason"]} for r in unused.head(max_rows).to_dict(orient="records")],
        "unused_total": len(unused),
        "cautions": THERMOGRAPHY,
    }


def _margin(rules) -> float:
    """The margin [K] of the first enabled survey-deviation check (NaN: none)."""
    for check in rules.checks.values():
        if check.enabled and check.kind == NAME:
            return float(validated_params(check, KIND)["margin"])
    return float("nan")


def _missed(audit, economics, max_rows: int, units: str, fmt) -> dict | None:
    """The year's energy and money of the items at their measured condition beyond what the
    register alone says (results.csv ``missed_energy``, ``missed_cost``), largest first."""
    if economics is None or "missed_cost" not in economics.per_row:
        return None
    per_row = economics.per_row
    energy = named("missed_energy", "MWh", units)
    missed = per_row[energy].to_numpy(float)
    cost = per_row["missed_cost"].to_numpy(float)
    rows = np.flatnonzero(np.isfinite(missed))
    rows = rows[np.argsort(-cost[rows], kind="stable")]
    tags = audit.results["tag"].to_numpy(object)
    annual = per_row[named("annual_energy", "MWh", units)].to_numpy(float)
    return {"energy": fmt(np.nansum(missed), 4), "cost": fmt(np.nansum(cost), 4),
            "currency": economics.currency, "item_count": int(rows.size),
            "rows": [{"tag": tags[i], "measured": fmt(annual[i]),
                      "registered": fmt(annual[i] - missed[i]), "missed": fmt(missed[i]),
                      "cost": fmt(cost[i])} for i in rows[:max_rows]]}
