"""Work orders as printed, in the run's unit system: built in SI, converted here at the edge.

A work order (:func:`audit.report.workorders.build_orders`) holds numbers (quantities,
thicknesses) and text already worded in SI (``OD 114 mm``, ``air 20 °C``); in US units the
numbers are converted by the one table and the texts reworded (:mod:`audit.display_units`).
"""

from __future__ import annotations

import numpy as np

from audit import display_units
from audit.report.context import fmt

#: A quantity's unit as work orders write it -> the table's SI label
_QUANTITY_UNITS = {"m": "m", "m²": "m2"}
_US_SYMBOLS = {"m": "ft", "m²": "ft²"}


def thickness_label(units: str) -> str:
    return "in" if units == "us" else "mm"


def shown_order(order: dict, units: str) -> dict:
    """One work order's printed fields in ``units`` (the order itself in SI): its own, and
    those of each register row (``parts``) it lists."""
    if units == "si":
        return order
    return {**_shown_fields(order),
            "remedies": [display_units.text(r) for r in order["remedies"]],
            "parts": [{**_shown_fields(p), "quantities": [shown_quantity(q, units)
                                                          for q in p["quantities"]]}
                      for p in order.get("parts", ())],
            "quantities": [shown_quantity(q, units) for q in order["quantities"]]}


def _shown_fields(record: dict) -> dict:
    """A work order's or a row's description and findings, their quantities in US units."""
    words = display_units.text
    return {**record,
            "description": [(label, words(value)) for label, value in record["description"]],
            "findings": [{**f, "found": words(f["found"]), "conditions": words(f["conditions"]),
                          "message": words(f["message"]), "remedy": words(f.get("remedy", ""))}
                         for f in record["findings"]]}


def shown_quantity(row: dict, units: str) -> dict:
    """One row of quantities (of an order or of a bill) in ``units``: its quantity by its unit,
    its thickness from ``thickness_mm`` and its size text."""
    if units == "si":
        return row
    out = {**row, "size": display_units.text(row["size"]),
           "material": display_units.text(row["material"])}
    si = _QUANTITY_UNITS.get(row["unit"])
    if si is not None and np.isfinite(row["quantity"]):
        out["quantity"] = float(display_units.to_us(row["quantity"], si))
        out["unit"] = _US_SYMBOLS[row["unit"]]
        out["text"] = fmt(out["quantity"])
    if np.isfinite(row.get("thickness_mm", np.nan)):
        out["thickness"] = fmt(float(display_units.to_us(row["thickness_mm"], "mm")))
    return out


def planner_fields(fields: tuple, units: str) -> tuple:
    """The blank fields a crew fills in, their units in ``units``."""
    return tuple(f.replace("[°C]", "[°F]") for f in fields) if units == "us" else fields
