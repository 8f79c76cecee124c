"""The report's data: what the templates show, chosen and counted from an :class:`Audit`.

No physics here: only selecting, sorting, counting, summing columns already computed, and
formatting numbers as text.  Every table longer than :data:`MAX_TABLE_ROWS` lists its worst
rows (by severity, then by distance from the limit) and says where the rest are.
"""

from __future__ import annotations

from dataclasses import replace
from pathlib import Path

import numpy as np
import pandas as pd

from markupsafe import Markup

from audit import display_units, methods
from audit.display_units import named
from audit.digests import rules_digest, sha256_file
from audit.economics.totals import SPLIT, split_sides
from audit.results import carried_columns
from audit.schema import ITEM_COLUMNS
from audit.report import charts
from audit.rules import SEVERITIES

#: Rows shown per table in the HTML and PDF report; the full lists are in results.xlsx.
MAX_TABLE_ROWS = 100

#: Worst first, for sorting.
SEVERITY_RANK = {name: rank for rank, name in enumerate(SEVERITIES)}

#: The plant totals: (name, SI unit of its column or None)
ECONOMIC_COLUMNS = (("annual_energy", "MWh"), ("annual_fuel", "MWh"), ("annual_cost", None),
                    ("annual_co2", "t"), ("saving_if_repaired", "MWh"), ("boil_off", "kg/h"),
                    ("annual_boil_off", "t"))
#: Unit labels the report's text shows, per unit system
LABELS = {"si": {"power": "kW", "energy": "MWh", "co2": "t", "heat": "W", "temp": "°C",
                 "mass_flow": "kg/h"},
          "us": {"power": "kBtu/h", "energy": "MMBtu", "co2": "ton", "heat": "Btu/h",
                 "temp": "°F", "mass_flow": "lb/h"}}


def fmt(value, digits: int = 3) -> str:
    """A number as short text: thousands separated, about ``digits`` significant figures;
    an en dash for a missing value."""
    try:
        x = float(value)
    except (TypeError, ValueError):
        return "" if value is None else str(value)
    if not np.isfinite(x):
        return "–"
    if x == 0:
        return "0"
    if x.is_integer() and abs(x) < 1e15:
        return f"{x:,.0f}"
    magnitude = int(np.floor(np.log10(abs(x))))
    decimals = max(digits - 1 - magnitude, 0)
    return f"{x:,.{decimals}f}"


def anchor(check: str) -> str:
    """An HTML id for a check's table (letters, digits and hyphens only)."""
    return "check-" + "".join(ch if ch.isalnum() else "-" for ch in str(check))


def location_columns(table: pd.DataFrame) -> list[str]:
    """``area_code`` and the register's own extra columns (unit, location, drawing, ...)."""
    known = set(ITEM_COLUMNS)
    extras = [c for c in table.columns if c not in known and not str(c).startswith("raw:")]
    return ["area_code", *extras]


def worst_first(findings: pd.DataFrame) -> pd.DataFrame:
    """Findings sorted by severity (worst first), then by distance from the limit, then tag."""
    if not len(findings):
        return findings
    rank = findings["severity"].map(SEVERITY_RANK).fillna(-1).to_numpy()
    distance = np.abs(findings["value"].to_numpy(float) - findings["limit"].to_numpy(float))
    distance = np.where(np.isfinite(distance), distance, -1.0)
    order = np.lexsort((findings["tag"].astype(str).to_numpy(), -distance, -rank))
    return findings.iloc[order]


def build_context(audit, *, meta: dict, caution: str, economics=None,
                  max_rows: int = MAX_TABLE_ROWS, packs: dict | None = None,
                  units: str = "si") -> dict:
    """Everything the report template shows, as plain values and text.

    ``packs``: the work-order packs' cap (``PackPlan.summary()``) when they are written with
    the report, for the cover to say how many orders the packs leave off, by area.
    ``units``: ``si`` or ``us``; the audit's tables are converted here, at the edge
    (:mod:`audit.display_units`), and every number and label follows.
    """
    table = audit.table
    carried = carried_columns(audit.results)
    results = display_units.frame(audit.results, units, keep=carried)
    findings = display_units.frame(audit.findings, units)
    si_economics, economics = economics, shown_economics(economics, units)
    area = table["area_code"].fillna("").astype(str).to_numpy(object)
    audited = (results["status"] == "audited").to_numpy()
    findings = findings.assign(area_code=area[findings["row"].to_numpy(int)] if len(findings) else "")
    severities = list(reversed(SEVERITIES))  # worst first in every table

    context = {
        "title": "Insulation audit report",
        "meta": _meta(audit, meta),
        "caution": caution,
        "severities": severities,
        "max_rows": max_rows,
        "counts": {"rows": len(results), "audited": int(audited.sum()),
                   "rejected": int((~audited).sum()), "findings": len(findings),
                   "items_with_findings": int(findings["row"].nunique()) if len(findings) else 0},
        # Heat lost and heat gained are never netted: each is summed on its own.
        "heat_lost_kW": fmt(_summed(results[named("heat_loss", "W", units)], audited, 1)
                            / 1000.0, 4),
        "heat_gained_kW": fmt(_summed(results[named("heat_loss", "W", units)], audited, -1)
                              / 1000.0, 4),
        "u": LABELS[units],
        "by_check": _by_check(findings, severities),
        "by_area": _by_area(area, audited, findings, economics, units)[:max_rows],
        "areas": len(set(area)),
        "checks": _check_tables(audit, findings, max_rows),
        "rejected": _rejected(results, max_rows),
        "assumptions": [display_units.text(line) if units == "us" else line
                        for line in _assumptions(audit, meta, economics)],
        "cover_warnings": list(getattr(economics, "warnings", None) or []),
        "economics": _economics(audit, area, economics, max_rows, units, si_economics),
        "methods": [{name: Markup(methods.to_html(value)) for name, value in m._asdict().items()}
                    for m in methods.METHODS],
        "method_notes": [Markup(methods.to_html(note)) for note in methods.NOTES],
        "since_last": _since_last(audit, max_rows, units),
        "survey": survey_section(audit, economics, max_rows=max_rows, units=units, fmt=fmt),
        "packs": packs,
    }
    context["charts"] = {
        "pareto": charts.cost_pareto(results["tag"].to_numpy(object),
                                     economics.per_row["annual_cost"].to_numpy(float),
                                     economics.currency) if economics is not None else None,
        "surface": charts.surface_against_limit(_touch_points(findings), LABELS[units]["temp"]),
        "areas": charts.findings_by_area(_area_severity_counts(findings), severities),
    }
    return context


def survey_section(audit, economics, **options) -> dict | None:
    """The "Field survey" section, when the audit reconciled field readings."""
    if getattr(audit, "survey", None) is None:
        return None
    from audit.report.survey_section import survey_section as section

    return section(audit, economics, **options)


def _summed(heat_loss: pd.Series, audited: np.ndarray, sign: int) -> float:
    """Sum of the heat lost (``sign`` 1) or the magnitude of the heat gained (-1), in the
    column's own unit."""
    values = sign * heat_loss.to_numpy(float)[audited]
    return float(np.nansum(np.where(values > 0, values, 0.0)))


def _since_last(audit, max_rows: int, units: str = "si") -> dict | None:
    """The "Since the last audit" section, when the audit was compared with its history."""
    if getattr(audit, "history", None) is None:
        return None
    from audit.history.section import since_last_section

    return since_last_section(audit.history, audit, max_rows=max_rows, units=units)


def _meta(audit, meta: dict) -> dict:
    rule_files = [str(p) for p in audit.rules.files]
    return {
        "tool": meta.get("tool", ""),
        "run_at": meta.get("run_at", ""),
        "surface_model": meta.get("surface_model", "correlations"),
        "registers": [{"file": r.get("file", ""), "sha256": r.get("sha256", "")}
                      for r in meta.get("registers", [])],
        "rules": [{"file": Path(p).name, "path": p, "sha256": sha256_file(p)} for p in rule_files],
        "rules_digest": meta.get("rules_digest") or rules_digest(rule_files),
    }


def _by_check(findings: pd.DataFrame, severities: list[str]) -> list[dict]:
    if not len(findings):
        return []
    counts = findings.groupby(["check", "severity"]).size().unstack(fill_value=0)
    rows = []
    for check, counted in counts.iterrows():
        by_severity = {s: int(counted.get(s, 0)) for s in severities}
        rows.append({"check": check, "anchor": anchor(check), "counts": by_severity, "total": sum(by_severity.values()),
                     "n_items": int(findings.loc[findings["check"] == check, "row"].nunique())})
    worst = [max((SEVERITY_RANK[s] for s, n in r["counts"].items() if n), default=-1) for r in rows]
    order = sorted(range(len(rows)), key=lambda i: (-worst[i], -rows[i]["total"], rows[i]["check"]))
    return [rows[i] for i in order]


def shown_economics(economics, units: str):
    """The economics' tables in ``units`` (the object itself in SI, or when there is none)."""
    if economics is None or units == "si":
        return economics
    return replace(economics, **{name: display_units.frame(getattr(economics, name), units)
                                 for name in ("per_row", "by_area", "by_check", "top_repairs")})


def _by_area(area: np.ndarray, audited: np.ndarray, findings: pd.DataFrame, economics,
             units: str = "si") -> list[dict]:
    frame = pd.DataFrame({"area": area, "audited": audited})
    items = frame.groupby("area").agg(items=("audited", "size"), audited=("audited", "sum"))
    if len(findings):
        worst = findings.assign(rank=findings["severity"].map(SEVERITY_RANK))
        per_area = worst.groupby("area_code").agg(findings=("row", "size"),
                                                  with_findings=("row", "nunique"),
                                                  worst=("rank", "max"))
        items = items.join(per_area, how="left")
    else:
        items = items.assign(findings=0, with_findings=0, worst=np.nan)
    if economics is not None:
        energy, co2 = named("annual_energy", "MWh", units), named("annual_co2", "t", units)
        money = economics.per_row[["annual_cost", energy, co2]].copy()
        money["area"] = area
        items = items.join(money.groupby("area").sum(min_count=1), how="left")
    items = items.sort_values(["findings", "items"], ascending=False, na_position="last")
    rows = []
    for name, r in items.iterrows():
        rank = r.get("worst")
        row = {"area": name or "(none)", "n_items": int(r["items"]), "audited": int(r["audited"]),
               "findings": int(np.nan_to_num(r.get("findings", 0))),
               "with_findings": int(np.nan_to_num(r.get("with_findings", 0))),
               "worst": SEVERITIES[int(rank)] if pd.notna(rank) else ""}
        if economics is not None:
            row.update(cost=fmt(r["annual_cost"]), energy=fmt(r[energy]), co2=fmt(r[co2]))
        rows.append(row)
    return rows


def _check_tables(audit, findings: pd.DataFrame, max_rows: int) -> list[dict]:
    """One table per check that found something, worst rows first."""
    tables = []
    checks = audit.rules.checks
    for name, group in findings.groupby("check", sort=False):
        ordered = worst_first(group)
        shown = ordered.head(max_rows)
        check = checks.get(name)
        tables.append({
            "name": name,
            "anchor": anchor(name),
            "description": getattr(check, "description", "") or "",
            "site": shown["site"].iloc[0] if len(shown) else "",
            "source": "; ".join(sorted(set(group["limit_source"].astype(str)))),
            "total": len(group),
            "truncated": len(group) > max_rows,
            "worst_rank": int(group["severity"].map(SEVERITY_RANK).max()),
            "rows": [{"tag": r["tag"], "area": r["area_code"], "severity": r["severity"],
                      "value": fmt(r["value"]), "limit": fmt(r["limit"]), "unit": r["unit"],
                      "conditions": conditions_text(r), "message": r["message"], "remedy": r["remedy"]}
                     for r in shown.to_dict(orient="records")],
        })
    tables.sort(key=lambda t: (-t["worst_rank"], -t["total"], t["name"]))
    return tables


def conditions_text(finding: dict) -> str:
    """The scenario a finding was evaluated under, in words, in the units of its columns."""
    air = next(k for k in finding if str(k).startswith("air_temp ["))
    wind = next(k for k in finding if str(k).startswith("wind ["))
    symbol = {"degC": "°C", "degF": "°F"}
    return (f"{finding['site']}: air {fmt(finding[air])} {symbol[display_units.header(air)[1]]}, "
            f"wind {fmt(finding[wind])} {display_units.header(wind)[1]}, "
            f"RH {fmt(finding['rh [%]'])} %")


def _rejected(results: pd.DataFrame, max_rows: int) -> dict:
    rejected = results.loc[results["status"] == "rejected", ["tag", "source", "reason"]]
    return {"total": len(rejected), "truncated": len(rejected) > max_rows,
            "rows": rejected.head(max_rows).to_dict(orient="records")}


def _assumptions(audit, meta: dict, economics) -> list[str]:
    rules = audit.rules
    default = rules.default_site().name
    lines = [f"Outer-surface model: {meta.get('surface_model', 'correlations')}.",
             f"Items without a site condition of their own are audited under {default}."]
    used = sorted({default, *(c.site for c in rules.checks.values() if c.enabled and c.site)})
    for name in used:
        site = rules.sites.get(name)
        if site is not None:
            surroundings = ("" if not np.isfinite(site.surroundings) else
                            f", surroundings {fmt(site.surroundings - 273.15)} °C")
            lines.append(f"Site condition {name}: air {fmt(site.ambient - 273.15)} °C, wind "
                         f"{fmt(site.wind)} m/s, RH {fmt(site.rh)} %{surroundings} ({site.source}).")
    if economics is not None:
        extra = economics.assumptions
        if isinstance(extra, dict):
            lines += [f"{k}: {v}" for k, v in extra.items()]
        elif isinstance(extra, str):
            lines.append(extra)
        else:
            lines += [_assumption(a) for a in extra or ()]
    return lines


def _assumption(item) -> str:
    """One economic assumption as a line: ``{what, value, source}`` or plain text."""
    if isinstance(item, dict) and "what" in item:
        source = f" ({item['source']})" if item.get("source") else ""
        return f"{item['what']}: {item.get('value', '')}{source}"
    return str(item)


def _economics(audit, area: np.ndarray, economics, max_rows: int, units: str = "si",
               si_economics=None) -> dict | None:
    """Plant totals summed from the per-item columns (the same numbers as results.csv) and the
    repairs with the best payback; ``economics`` in ``units``, ``si_economics`` as computed."""
    if economics is None:
        return None
    per_row = economics.per_row
    si_per_row = (si_economics or economics).per_row
    totals = {name: fmt(np.nansum(per_row[named(name, unit, units) if unit else name]
                                  .to_numpy(float)), 4) for name, unit in ECONOMIC_COLUMNS}
    # Heat lost and heat gained apart, each with its energy, money and CO2 (never netted):
    # split on the SI table, then shown in ``units`` like every other column.
    sided = display_units.frame(split_sides(si_per_row)[list(SPLIT)], units)
    totals.update({display_units.header(c)[0]: fmt(np.nansum(sided[c].to_numpy(float)), 4)
                   for c in sided.columns})
    saving = named("saving_if_repaired", "MWh", units)
    ranking = getattr(economics, "top_repairs", None)
    if isinstance(ranking, pd.DataFrame) and {"tag", "payback [yr]"} <= set(ranking.columns):
        top = [{"tag": r["tag"], "area": r.get("area_code", "") or "(none)",
                "repair": r.get("repair", ""), "repair_cost": fmt(r.get("repair_cost")),
                "annual_saving": fmt(r.get("annual_saving")),
                "saving": fmt(r.get(saving)), "payback": fmt(r["payback [yr]"], 2)}
               for r in ranking.head(max_rows).to_dict(orient="records")]
    else:  # no ranking given: the 20 shortest paybacks among the items
        payback = per_row["payback [yr]"].to_numpy(float)
        ranked = np.flatnonzero(np.isfinite(payback))
        ranked = ranked[np.argsort(payback[ranked], kind="stable")][:min(20, max_rows)]
        tags = audit.results["tag"].to_numpy(object)
        top = [{"tag": tags[i], "area": area[i] or "(none)", "repair": "", "repair_cost": "–",
                "annual_saving": "–", "saving": fmt(per_row[saving].iloc[i]),
                "payback": fmt(payback[i], 2)} for i in ranked]
    return {"currency": economics.currency, "totals": totals, "top_repairs": top}


def _touch_points(findings: pd.DataFrame) -> list[tuple]:
    """(tag, surface temperature, limit) of the touch-temperature findings, hottest over the
    limit first."""
    touch = findings.loc[(findings["kind"] == "touch-temperature")
                         & findings["unit"].isin(["degC", "degF"])]
    touch = worst_first(touch)
    return list(zip(touch["tag"].astype(str), touch["value"].astype(float), touch["limit"].astype(float)))


def _area_severity_counts(findings: pd.DataFrame) -> pd.DataFrame:
    """Findings per area (rows) and severity (columns), most findings first."""
    if not len(findings):
        return pd.DataFrame()
    counts = findings.groupby(["area_code", "severity"]).size().unstack(fill_value=0)
    return counts.loc[counts.sum(axis=1).sort_values(ascending=False, kind="stable").index]
