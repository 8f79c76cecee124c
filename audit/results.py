"""The results table: one row per input row, in input order, with the contract's columns.

Built from the item table and the thermal states; holds no physics and writes no files.
Column headers follow the register convention ``name [unit]``.
"""

from __future__ import annotations

import numpy as np
import pandas as pd

from audit.schema import ITEM_COLUMNS
from audit.thermal import ZERO_CELSIUS

#: Leading columns fixed by the contract, in order.
CONTRACT_COLUMNS = ["tag", "source", "status", "reason", "surface_temp [degC]", "heat_loss [W/m]",
                    "heat_loss [W]", "heat_flux [W/m2]", "findings", "severity"]


def build_results(table: pd.DataFrame, states: pd.DataFrame, *, findings=None,
                  severity=None, extra: pd.DataFrame | None = None) -> pd.DataFrame:
    """Combine the item table and the item's own-conditions states into the results table.

    ``extra`` (the economics' per-row columns, aligned with the table's rows) follows the
    contract's leading columns.

    A row the reader accepted but the engine could not compute is ``rejected`` with the
    engine's reason.  Columns the reader did not recognise follow the computed ones,
    under their original headers.
    """
    computed = states["computed"].to_numpy(bool)
    reader_ok = (table["status"] == "ok").to_numpy()
    reason = table["reason"].fillna("").to_numpy(object).copy()
    engine_failed = reader_ok & ~computed
    reason[engine_failed] = states["engine_reason"].to_numpy(object)[engine_failed]
    status = np.where(computed, "audited", "rejected")

    def celsius(column):
        return states[column].to_numpy(float) - ZERO_CELSIUS

    out = pd.DataFrame({
        "tag": table["tag"].to_numpy(object),
        "source": table["source"].to_numpy(object),
        "status": status,
        "reason": reason,
        "surface_temp [degC]": celsius("surface_temp_K"),
        "heat_loss [W/m]": states["heat_loss_W_per_m"].to_numpy(float),
        "heat_loss [W]": states["heat_loss_W"].to_numpy(float),
        "heat_flux [W/m2]": states["heat_flux_W_m2"].to_numpy(float),
        "findings": "" if findings is None else findings,
        "severity": "" if severity is None else severity,
    })
    if extra is not None:
        for column in extra.columns:
            out[column] = extra[column].to_numpy()
    out["surface_temp_insulated [degC]"] = celsius("surface_temp_insulated_K")
    interfaces = sorted((c for c in states.columns if c.startswith("interface_")),
                        key=lambda c: int(c.split("_")[1]))
    # interface_0 is the hot face of the first layer; the last one is the outer surface.
    for j, column in enumerate(interfaces[1:-1], start=1):
        values = celsius(column)
        if np.isfinite(values).any():
            out[f"interface_{j} [degC]"] = values
    warnings = table["warnings"].fillna("").to_numpy(object) if "warnings" in table else \
        np.full(len(table), "", object)
    engine_warnings = states["engine_warnings"].to_numpy(object)
    out["outer_area [m2]"] = states["outer_area_m2"].to_numpy(float)
    out["convective_share [-]"] = states["convective_share"].to_numpy(float)
    out["radiative_share [-]"] = states["radiative_share"].to_numpy(float)
    out["process_temp [degC]"] = celsius("process_temp_K")
    out["air_temp [degC]"] = celsius("air_temp_K")
    out["surroundings_temp [degC]"] = celsius("surroundings_temp_K")
    out["wind [m/s]"] = states["wind_m_s"].to_numpy(float)
    out["emissivity [-]"] = states["emissivity_used"].to_numpy(float)
    out["warnings"] = ["; ".join(w for w in (a, b) if w) for a, b in zip(warnings, engine_warnings)]
    carried = []
    for column in _extra_columns(table):
        # An input column that happens to share a result column's name keeps its data.
        name = column if column not in out.columns else f"input:{column}"
        out[name] = table[column].to_numpy(object)
        carried.append(name)
    out.index = table.index
    out.attrs["carried"] = tuple(carried)  # the register's own columns: no unit conversion
    return out


def _extra_columns(table: pd.DataFrame) -> list[str]:
    """Input columns the reader carried through untouched (neither parsed nor raw copies)."""
    known = set(ITEM_COLUMNS)
    return [c for c in table.columns if c not in known and not str(c).startswith("raw:")]
