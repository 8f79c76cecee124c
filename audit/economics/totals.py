"""Totals by area, by check and for the plant; the repairs with the best payback.

Sums skip items without a result (rejected or not computed); ``items`` counts the items
summed.  An item with findings of several checks counts under each of them, so the totals
by check overlap and do not add up to the plant's.
"""

from __future__ import annotations

import numpy as np
import pandas as pd

#: Heat lost and heat gained are never netted: each has its own energy, cost and CO2
#: (``energy_bought`` "fuel" is a loss; electricity, boil-off or none pay for a gain).
SPLIT = {f"{what}_{side} {unit}".rstrip(): (column, side)
         for side in ("heat_lost", "heat_gained")
         for what, column, unit in (("energy", "annual_energy [MWh]", "[MWh]"),
                                    ("cost", "annual_cost", ""),
                                    ("co2", "annual_co2 [t]", "[t]"))}
#: per-row columns that add up
SUMMED = ["annual_energy [MWh]", "annual_fuel [MWh]", "annual_cost", "annual_co2 [t]",
          "saving_if_repaired [MWh]", "annual_saving", "repair_cost", *SPLIT,
          "boil_off [kg/h]", "annual_boil_off [t]"]
TOP_COLUMNS = ["row", "tag", "source", "area_code", "repair", "repair_cost", "annual_saving",
               "saving_if_repaired [MWh]", "payback [yr]"]


def split_sides(per_row: pd.DataFrame) -> pd.DataFrame:
    """``per_row`` with the :data:`SPLIT` columns: energy, cost and CO2 of each row on its own
    side (heat lost or heat gained), 0 on the other side."""
    lost = (per_row["energy_bought"].fillna("") == "fuel").to_numpy()
    added = {}
    for name, (column, side) in SPLIT.items():
        values = per_row[column].to_numpy(float)
        added[name] = np.where(lost == (side == "heat_lost"), values, 0.0)
    return per_row.assign(**added)


def _sums(frame: pd.DataFrame, by) -> pd.DataFrame:
    frame = split_sides(frame)
    counted = frame.assign(items=np.isfinite(frame["annual_energy [MWh]"].to_numpy(float)).astype(int))
    return counted.groupby(by, sort=True)[["items", *SUMMED]].sum(min_count=0).reset_index()


def by_area(per_row: pd.DataFrame, area_code) -> pd.DataFrame:
    """One row per area code ("" for items without one)."""
    area = pd.Series(area_code, index=per_row.index).fillna("").astype(str)
    return _sums(per_row.assign(area_code=area.to_numpy()), "area_code")


def by_check(per_row: pd.DataFrame, findings: pd.DataFrame) -> pd.DataFrame:
    """One row per check with findings: the sums over the items it flags."""
    if not len(findings):
        return pd.DataFrame(columns=["check", "items", *SUMMED])
    pairs = findings[["row", "check"]].astype({"row": int}).drop_duplicates()
    joined = per_row.iloc[pairs["row"].to_numpy()].reset_index(drop=True)
    return _sums(joined.assign(check=pairs["check"].to_numpy()), "check")


def plant(per_row: pd.DataFrame) -> dict:
    """The plant's sums, and how many items have a result and how many need a repair."""
    sided = split_sides(per_row)
    out = {c: float(np.nansum(sided[c].to_numpy(float))) for c in SUMMED}
    # With a survey: what the register-only audit missed (audit.economics.MISSED_COLUMNS).
    out.update({c: float(np.nansum(per_row[c].to_numpy(float)))
                for c in ("missed_energy [MWh]", "missed_cost") if c in per_row})
    out["items"] = int(np.isfinite(per_row["annual_energy [MWh]"].to_numpy(float)).sum())
    out["items_to_repair"] = int((per_row["repair"].fillna("") != "").sum())
    return out


def top_repairs(per_row: pd.DataFrame, table: pd.DataFrame, count: int = 20) -> pd.DataFrame:
    """The ``count`` repairs with the shortest payback (ties: the larger yearly saving first);
    ``row`` indexes the item table."""
    rows = np.flatnonzero(np.isfinite(per_row["payback [yr]"].to_numpy(float)))
    has = per_row.iloc[rows].assign(row=rows, tag=table["tag"].to_numpy(object)[rows],
                                    source=table["source"].to_numpy(object)[rows],
                                    area_code=table["area_code"].fillna("").to_numpy(object)[rows])
    ranked = has.assign(_neg=-has["annual_saving"]).sort_values(["payback [yr]", "_neg"], kind="stable")
    return ranked.head(count)[TOP_COLUMNS].reset_index(drop=True)
