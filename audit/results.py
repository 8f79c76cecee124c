"""The results table: one row per input row, in input order, with the contract's columns.

Built from the item table and the thermal states; holds no physics and writes no files.
Column headers follow the register convention ``name [unit]``.  After the computed columns
come the values each check judged (``surface_temp@CASE [degC]``: the worst surface under each
design case a check evaluated), the recognised inputs as the audit understood them (under their
register names, with units), the warnings, then the register's own extra columns.

``surface_temp [degC]`` is the item's worst outer surface at its own conditions and
``surface_part`` says which part that is (``insulated``, or ``bare metal`` for a bare item, a bare
share of damaged insulation or bare fittings); ``emissivity [-]`` is that part's.
``heat_flux [W/m2]`` is at the main surface, the insulated one where there is one
(``surface_temp_insulated [degC]`` is its temperature).
"""

from __future__ import annotations

import numpy as np
import pandas as pd

from audit.repeats import per_distinct
from audit.schema import ITEM_COLUMNS, SCHEMA
from audit.thermal import ZERO_CELSIUS
from audit.units import parse_quantity

#: Leading columns fixed by the contract, in order.
CONTRACT_COLUMNS = ["tag", "source", "status", "reason", "surface_temp [degC]", "heat_loss [W/m]",
                    "heat_loss [W]", "heat_flux [W/m2]", "findings", "severity"]


def build_results(table: pd.DataFrame, states: pd.DataFrame, *, findings=None,
                  severity=None, extra: pd.DataFrame | None = None,
                  judged: dict | None = None) -> pd.DataFrame:
    """Combine the item table and the item's own-conditions states into the results table.

    ``extra`` (the economics' per-row columns, aligned with the table's rows) follows the
    contract's leading columns; ``judged`` maps each design case a check evaluated to its
    states (``surface_temp@CASE [degC]``).

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
    bare = surface_is_bare(states)
    out["surface_part"] = np.where(states["computed"].to_numpy(bool),
                                   np.where(bare, "bare metal", "insulated"), "")
    out["emissivity [-]"] = np.where(bare, states["bare_emissivity_used"].to_numpy(float),
                                     states["emissivity_used"].to_numpy(float))
    for case, case_states in (judged or {}).items():
        out[f"surface_temp@{case} [degC]"] = case_states["surface_temp_K"].to_numpy(float) \
            - ZERO_CELSIUS
    for column, values in recognised_inputs(table).items():
        out[column] = values
    out["warnings"] = ["; ".join(w for w in (a, b) if w) for a, b in zip(warnings, engine_warnings)]
    for column in _extra_columns(table):
        # An input column that happens to share a result column's name keeps its data.
        name = column if column not in out.columns else f"input:{column}"
        out[name] = table[column].to_numpy(object)
    out.index = table.index
    return out


#: Significant figures a finding's value, limit and remedy thickness keep in the outputs: far
#: more than any input or limit is known to, and no float noise (175.00000000000003).
SIGNIFICANT = 6


def significant(values, digits: int = SIGNIFICANT) -> np.ndarray:
    """``values`` rounded to ``digits`` significant figures (NaN and 0 as they are).

    The rounded value is an integer times an exact power of ten, divided or multiplied once,
    so it is the float nearest the rounded decimal (what ``float(f"{x:.6g}")`` gives) for
    magnitudes whose powers of ten are exact (about 1e-16 to 1e27).
    """
    x = np.asarray(values, float)
    with np.errstate(divide="ignore", invalid="ignore"):
        shift = digits - 1 - np.floor(np.log10(np.abs(x)))
    shift = np.where(np.isfinite(shift), shift, 0).astype(int)
    up = np.power(10.0, np.clip(shift, 0, 300))
    down = np.power(10.0, np.clip(-shift, 0, 300))
    return np.where(shift >= 0, np.round(x * up) / up, np.round(x / down) * down)


def findings_out(findings: pd.DataFrame) -> pd.DataFrame:
    """The findings as the outputs write them: without the item-table row, the figures at
    :data:`SIGNIFICANT` significant figures."""
    out = findings.drop(columns=["row"])
    for column in ("value", "limit", "remedy_thickness [mm]"):
        out[column] = significant(out[column].to_numpy(float))
    return out


def carried_columns(results: pd.DataFrame) -> list[str]:
    """The register's own extra columns, carried through as text: those after ``warnings``."""
    columns = list(results.columns)
    return columns[columns.index("warnings") + 1:] if "warnings" in columns else []


def surface_is_bare(states: pd.DataFrame) -> np.ndarray:
    """Whether each item's worst surface (``surface_temp``) is bare metal: the item has no
    insulated surface, or a bare part (fittings, a damaged share) is farther from the air."""
    worst = states["surface_temp_K"].to_numpy(float)
    insulated = states["surface_temp_insulated_K"].to_numpy(float)
    return np.isfinite(worst) & ~(worst == insulated)


def recognised_inputs(table: pd.DataFrame) -> dict[str, np.ndarray]:
    """The register columns the audit recognised and results echo (``echo`` in
    :data:`audit.schema.SCHEMA`), as it understood them, in the schema's order, under their
    register names with their default units (contract: "Results columns added")."""
    out = {}
    for column in SCHEMA:
        if not column.echo:
            continue
        first = column.item[0]
        if column.name == "layers":
            out["layers"] = per_distinct(layers_text, table["layer_materials"].to_numpy(object),
                                         table["layer_thicknesses_m"].to_numpy(object))
        elif first.dtype == "bool":
            out[column.name] = np.where(table[first.name].fillna(False).to_numpy(bool), "yes", "no")
        elif first.dtype == "float" and column.si_unit:
            scale, offset = _linear(column.si_unit, column.default_unit)
            label = _UNIT_LABELS.get(column.default_unit, column.default_unit)
            out[f"{column.name} [{label}]"] = table[first.name].to_numpy(float) * scale + offset
        else:
            out[column.name] = table[first.name].to_numpy(object)
    return out


#: Units as result headers write them, where pint's name differs.
_UNIT_LABELS = {"m**2": "m2"}


def _linear(unit: str, to: str) -> tuple[float, float]:
    """``(scale, offset)`` of the conversion from ``unit`` to ``to`` (every pint conversion
    between two units is linear)."""
    zero = parse_quantity(0.0, unit, to)
    return parse_quantity(1.0, unit, to) - zero, zero


def layers_text(materials, thicknesses) -> str:
    """Layers as a register writes them: ``calcium-silicate 50mm + mineral-wool 50mm``
    (``none`` for bare; the history database records them so too)."""
    if not isinstance(materials, tuple):
        return ""
    if not materials:
        return "none"
    return " + ".join(f"{m} {t * 1000:g}mm" for m, t in zip(materials, thicknesses))


def _extra_columns(table: pd.DataFrame) -> list[str]:
    """Input columns the reader carried through untouched (neither parsed nor raw copies)."""
    known = set(ITEM_COLUMNS)
    return [c for c in table.columns if c not in known and not str(c).startswith("raw:")]
