"""Remedy thickness: the smallest standard thickness that passes all of an item's checks.

For every item with a finding that insulation can fix, the insulation is replaced, in a copy
of the item table, by one layer of the remedy material at each standard thickness in turn
(thinnest first; intact, fittings covered), and every enabled check that insulation can fix,
plus ``layer-overheat``, is evaluated again on the copies, for the whole register at once.
The first thickness at which an item has none of those findings is its remedy.

The remedy material is the material of the specification the item is held to (see
``below-spec``), else its outermost installed material; an item with neither gets a named
action without a thickness.
"""

from __future__ import annotations

import numpy as np
import pandas as pd

from audit.checks.base import CheckContext
from audit.checks.below_spec import requirement


def fill_remedies(context: CheckContext, findings: pd.DataFrame, kinds: dict, params: dict) -> pd.DataFrame:
    """``findings`` with ``remedy_thickness [mm]``, ``remedy_material`` and the remedy text
    completed for the findings that insulation can fix."""
    if not len(findings) or not findings["fixable_by_insulation"].any():
        return findings
    rules, table = context.rules, context.table
    rows = np.unique(findings.loc[findings["fixable_by_insulation"].astype(bool), "row"].astype(int))
    material = _remedy_material(context, rows)
    has_material = material != ""
    recheck = [c for c in rules.checks.values() if c.enabled and
               (kinds[c.kind].fixable_by_insulation or c.kind == "layer-overheat")]
    thickness = np.full(rows.size, np.nan)
    pending = has_material.copy()
    for t in rules.thicknesses:
        if not pending.any():
            break
        subset = rows[pending]
        trial = _insulated_copy(table, subset, material[pending], t)
        trial_context = CheckContext(trial, rules, surface_model=context.surface_model,
                                     _tables=context._tables)
        failing = np.zeros(subset.size, bool)
        for check in recheck:
            found = kinds[check.kind].evaluate(trial_context, check, params[check.name])
            failing[found["row"].to_numpy(int)] = True
        passes = ~failing & trial_context.states("")["computed"].to_numpy(bool)
        positions = np.flatnonzero(pending)[passes]
        thickness[positions] = t
        pending[positions] = False

    out = findings.copy()
    lookup = {r: i for i, r in enumerate(rows)}
    fixable = out["fixable_by_insulation"].astype(bool).to_numpy()
    for k in np.flatnonzero(fixable):
        i = lookup[int(out.at[k, "row"])]
        if not has_material[i]:
            out.at[k, "remedy"] = (f"{out.at[k, 'remedy']}; no remedy material known (no specification "
                                   "for the service and no insulation installed): insulate per the "
                                   "plant specification")
        elif np.isnan(thickness[i]):
            biggest = rules.thicknesses[-1] * 1000 if rules.thicknesses else float("nan")
            out.at[k, "remedy"] = (f"{out.at[k, 'remedy']}; no standard thickness of {material[i]} up "
                                   f"to {biggest:.0f} mm clears every check: engineer a solution")
        else:
            mm = thickness[i] * 1000.0
            out.at[k, "remedy_thickness [mm]"] = mm
            out.at[k, "remedy_material"] = material[i]
            out.at[k, "remedy"] = f"insulate with {mm:.3g} mm of {material[i]} (replacing what is there)"
    return out


def _remedy_material(context: CheckContext, rows: np.ndarray) -> np.ndarray:
    """The governing specification's material (below-spec's choice of spec, so an item with no
    declared service gets the spec it would be held to), else the outermost installed one."""
    states = context.states("")
    spec = requirement(context.table, context.rules, states["process_temp_K"].to_numpy(float),
                       states["air_temp_K"].to_numpy(float))
    layers = context.table["layer_materials"].to_numpy(object)[rows]
    out = np.asarray(spec.material, dtype=object)[rows].copy()
    for i, installed in enumerate(layers):
        if not out[i] and isinstance(installed, tuple) and installed:
            out[i] = installed[-1]
    return out


def _insulated_copy(table: pd.DataFrame, rows: np.ndarray, material: np.ndarray, thickness: float):
    """Rows ``rows`` of ``table`` re-insulated with one intact layer, fittings covered."""
    trial = table.iloc[rows].reset_index(drop=True).copy()
    trial["layer_materials"] = [(m,) for m in material]
    trial["layer_thicknesses_m"] = [(thickness,)] * len(trial)
    trial["condition"] = "intact"
    trial["damaged_pct"] = np.nan
    trial["valves"] = 0
    trial["flanges"] = 0
    return trial
